/*
 * Tests of the YAML tree (src/lib/ydoc.c).  Expected lines and columns were
 * counted by hand from the test texts (1-based, as a text editor shows them);
 * the rules checked (duplicate keys, tabs, aliases, one document) are the
 * project's strictness rules, and the YAML syntax facts are those of the
 * YAML 1.1 specification (yaml.org, 2005) that libyaml implements.
 */
#include <check.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "swathbudget/ydoc.h"

/* Load text; return the status and leave the error in *e. */
static int load(const char *text, struct sb_ydoc **d, struct sb_error *e)
{
    sb_error_clear(e);
    return sb_ydoc_load_string("t.yaml", text, strlen(text), d, e);
}

/* Assert that text fails as an input error at line:col with a message
 * containing want. */
static void expect_fail(const char *text, int line, int col, const char *want)
{
    struct sb_ydoc *d = NULL;
    struct sb_error e;
    int rc = load(text, &d, &e);

    ck_assert_int_eq(rc, SB_EINPUT);
    ck_assert_ptr_null(d);
    ck_assert_str_eq(e.file, "t.yaml");
    ck_assert_int_eq(e.line, line);
    ck_assert_int_eq(e.col, col);
    ck_assert_msg(strstr(e.msg, want) != NULL, "message '%s' lacks '%s'",
                  e.msg, want);
    ck_assert_msg(strchr(e.msg, '\n') == NULL, "message is not one line");
}

START_TEST(tree_and_positions)
{
    const char *text = "name: Kestrel\n"          /* line 1 */
                       "motion:\n"                /* line 2 */
                       "  roll: 0.02 deg sd\n"    /* line 3, value col 9 */
                       "  list: [1, 2.5, 'x']\n"  /* line 4 */
                       "empty:\n";                /* line 5 */
    struct sb_ydoc *d;
    struct sb_error e;
    const struct sb_ynode *root, *m, *v, *l;

    ck_assert_int_eq(load(text, &d, &e), SB_OK);
    root = sb_ydoc_root(d);
    ck_assert_int_eq(root->kind, SB_YMAP);
    ck_assert_uint_eq(root->n, 3);
    ck_assert_str_eq(root->keys[0], "name");
    ck_assert_str_eq(root->keys[1], "motion");
    ck_assert_int_eq(root->key_nodes[1]->line, 2);
    ck_assert_int_eq(root->key_nodes[1]->col, 1);
    m = sb_ymap_get(root, "motion");
    ck_assert_int_eq(m->kind, SB_YMAP);
    v = sb_ymap_get(m, "roll");
    ck_assert_int_eq(v->kind, SB_YSCALAR);
    ck_assert_str_eq(v->text, "0.02 deg sd");
    ck_assert_int_eq(v->line, 3);
    ck_assert_int_eq(v->col, 9);
    l = sb_ymap_get(m, "list");
    ck_assert_int_eq(l->kind, SB_YSEQ);
    ck_assert_uint_eq(l->n, 3);
    ck_assert_int_eq(l->items[1]->line, 4);
    ck_assert_int_eq(l->items[1]->col, 13);
    ck_assert_int_eq(l->items[0]->quoted, 0);
    ck_assert_int_eq(l->items[2]->quoted, 1);
    /* "empty:" with nothing after it is an empty plain scalar */
    v = sb_ymap_get(root, "empty");
    ck_assert_int_eq(v->kind, SB_YSCALAR);
    ck_assert_str_eq(v->text, "");
    ck_assert_ptr_null(sb_ymap_get(root, "absent"));
    ck_assert_str_eq(sb_ydoc_name(d), "t.yaml");
    sb_ydoc_free(d);
}
END_TEST

START_TEST(duplicate_key_at_second)
{
    expect_fail("a: 1\nb: 2\na: 3\n", 3, 1, "duplicate key 'a'");
    /* in a flow mapping: second 'b' at column 11 */
    expect_fail("a: {b: 1, b: 2}\n", 1, 11, "duplicate key 'b'");
}
END_TEST

START_TEST(tab_indentation)
{
    expect_fail("a:\n\tb: 1\n", 2, 1,
                "tab character used for indentation (expected spaces)");
    expect_fail("a:\n  b: 1\n  \tc: 2\n", 3, 3, "tab character");
}
END_TEST

START_TEST(anchors_and_aliases)
{
    expect_fail("a: &x 1\nb: 2\n", 1, 4, "anchors and aliases");
    expect_fail("a: 1\nb: *x\n", 2, 4, "anchors and aliases");
}
END_TEST

START_TEST(several_documents)
{
    expect_fail("a: 1\n---\nb: 2\n", 2, 1, "second YAML document");
}
END_TEST

START_TEST(empty_file)
{
    expect_fail("", 1, 1, "empty file (expected a YAML mapping)");
    expect_fail("# only a comment\n\n", 1, 1, "empty file");
}
END_TEST

START_TEST(non_scalar_key)
{
    /* explicit key "? [a, b]": the sequence starts at column 3 */
    expect_fail("? [a, b]\n: 1\n", 1, 3, "used as a mapping key");
}
END_TEST

START_TEST(syntax_errors)
{
    /* unterminated flow list: libyaml notices at the end of the text */
    expect_fail("a: [1, 2\n", 2, 1, "YAML syntax error: ");
    /* a more-indented key after a scalar value */
    expect_fail("a: 1\n b: 2\n", 2, 3,
                "YAML syntax error: mapping values are not allowed");
    expect_fail("a: \"open\n", 2, 1, "(expected well-formed YAML");
}
END_TEST

START_TEST(binary_garbage)
{
    /* control character 0x01 is the 4th character of line 1 */
    expect_fail("a: \x01\x02\xff\n", 1, 4, "control characters");
    /* an invalid UTF-8 lead byte on line 2 column 1 */
    expect_fail("a: 1\n\xff\xfe\n", 2, 1, "not a readable YAML text");
}
END_TEST

START_TEST(deep_nesting_refused)
{
    char buf[400];
    int i;

    for (i = 0; i < 100; i++)
        buf[i] = '[';
    buf[i] = '\0';
    expect_fail(buf, 1, 66, "nesting deeper");
}
END_TEST

START_TEST(scalar_conversions)
{
    const char *text = "d: 1.5e2\n"
                       "neg: -3\n"
                       "nan: .nan\n"
                       "inf: 1e999\n"
                       "hex: 0x10\n"
                       "word: abc\n"
                       "b: true\n"
                       "n: 7\n"
                       "map: {x: 1}\n"
                       "kind: curved\n";
    struct sb_ydoc *d;
    struct sb_error e;
    const struct sb_ynode *r;
    double x;
    long n;
    int b, idx;
    const char *s;
    static const char *const words[] = {"flat", "curved", NULL};

    ck_assert_int_eq(load(text, &d, &e), SB_OK);
    r = sb_ydoc_root(d);
    ck_assert_int_eq(sb_ynode_double(d, sb_ymap_get(r, "d"), "d", &x, &e),
                     SB_OK);
    ck_assert_double_eq(x, 150.0);
    ck_assert_int_eq(sb_ynode_double(d, sb_ymap_get(r, "neg"), "neg", &x, &e),
                     SB_OK);
    ck_assert_double_eq(x, -3.0);
    ck_assert_int_eq(sb_ynode_double(d, sb_ymap_get(r, "nan"), "x.nan", &x,
                                     &e),
                     SB_EINPUT);
    ck_assert_int_eq(e.line, 3);
    ck_assert_int_eq(e.col, 6);
    ck_assert_msg(strncmp(e.msg, "x.nan: ", 7) == 0, "%s", e.msg);
    ck_assert_ptr_nonnull(strstr(e.msg, "'.nan' is not a finite number"));
    ck_assert_int_eq(sb_ynode_double(d, sb_ymap_get(r, "inf"), "inf", &x, &e),
                     SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(e.msg, "finite"));
    ck_assert_int_eq(sb_ynode_double(d, sb_ymap_get(r, "hex"), "hex", &x, &e),
                     SB_EINPUT);
    ck_assert_int_eq(sb_ynode_double(d, sb_ymap_get(r, "word"), "w", &x, &e),
                     SB_EINPUT);
    ck_assert_int_eq(sb_ynode_double(d, sb_ymap_get(r, "map"), "map", &x, &e),
                     SB_EINPUT);
    ck_assert_int_eq(e.line, 9);
    ck_assert_int_eq(e.col, 6);
    ck_assert_ptr_nonnull(strstr(e.msg, "found a mapping (expected a number)"));
    ck_assert_int_eq(sb_ynode_bool(d, sb_ymap_get(r, "b"), "b", &b, &e), SB_OK);
    ck_assert_int_eq(b, 1);
    ck_assert_int_eq(sb_ynode_bool(d, sb_ymap_get(r, "word"), "w", &b, &e),
                     SB_EINPUT);
    ck_assert_int_eq(sb_ynode_int(d, sb_ymap_get(r, "n"), "n", 0, 10, &n, &e),
                     SB_OK);
    ck_assert_int_eq(n, 7);
    ck_assert_int_eq(sb_ynode_int(d, sb_ymap_get(r, "n"), "n", 0, 5, &n, &e),
                     SB_EINPUT);
    ck_assert_int_eq(sb_ynode_int(d, sb_ymap_get(r, "d"), "d", 0, 500, &n, &e),
                     SB_EINPUT);
    ck_assert_int_eq(sb_ynode_string(d, sb_ymap_get(r, "word"), "w", &s, &e),
                     SB_OK);
    ck_assert_str_eq(s, "abc");
    ck_assert_int_eq(sb_ynode_choice(d, sb_ymap_get(r, "kind"), "k", words,
                                     &idx, &e),
                     SB_OK);
    ck_assert_int_eq(idx, 1);
    ck_assert_int_eq(sb_ynode_choice(d, sb_ymap_get(r, "word"), "k", words,
                                     &idx, &e),
                     SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(e.msg, "expected one of: flat, curved"));
    sb_ydoc_free(d);
}
END_TEST

START_TEST(keys_checked_and_required)
{
    const char *text = "motion:\n"
                       "  roll: 1\n"
                       "  rol: 2\n";
    struct sb_ydoc *d;
    struct sb_error e;
    const struct sb_ynode *m, *v;
    static const char *const allowed[] = {"roll", "pitch", NULL};

    ck_assert_int_eq(load(text, &d, &e), SB_OK);
    m = sb_ymap_get(sb_ydoc_root(d), "motion");
    ck_assert_int_eq(sb_ymap_check_keys(d, m, "motion", allowed, &e),
                     SB_EINPUT);
    ck_assert_int_eq(e.line, 3);
    ck_assert_int_eq(e.col, 3);
    ck_assert_str_eq(e.msg, "motion: unknown key 'rol' (expected one of: "
                            "roll, pitch)");
    ck_assert_int_eq(sb_ymap_require(d, m, "roll", "motion", &v, &e), SB_OK);
    ck_assert_str_eq(v->text, "1");
    ck_assert_int_eq(sb_ymap_require(d, m, "pitch", "motion", &v, &e),
                     SB_EINPUT);
    /* reported at the mapping, which starts at the first key "roll" */
    ck_assert_int_eq(e.line, 2);
    ck_assert_int_eq(e.col, 3);
    ck_assert_ptr_nonnull(strstr(e.msg, "missing required key 'pitch'"));
    ck_assert_int_eq(sb_ynode_expect_seq(d, m, "motion", &e), SB_EINPUT);
    ck_assert_int_eq(sb_ynode_expect_map(d, m, "motion", &e), SB_OK);
    sb_ydoc_free(d);
}
END_TEST

START_TEST(load_file_and_missing_file)
{
    char path[] = "/tmp/sb_ydoc_XXXXXX";
    int fd = mkstemp(path);
    FILE *f;
    struct sb_ydoc *d;
    struct sb_error e;

    ck_assert_int_ge(fd, 0);
    f = fdopen(fd, "w");
    fputs("a: 1\nb:\n  c: x\n", f);
    fclose(f);
    ck_assert_int_eq(sb_ydoc_load_file(path, &d, &e), SB_OK);
    ck_assert_str_eq(sb_ydoc_name(d), path);
    ck_assert_str_eq(sb_ymap_get(sb_ymap_get(sb_ydoc_root(d), "b"), "c")->text,
                     "x");
    sb_ydoc_free(d);
    unlink(path);
    ck_assert_int_eq(sb_ydoc_load_file(path, &d, &e), SB_EIO);
    ck_assert_ptr_null(d);
}
END_TEST

static Suite *ydoc_suite(void)
{
    Suite *s = suite_create("ydoc");
    TCase *tc = tcase_create("core");

    tcase_add_test(tc, tree_and_positions);
    tcase_add_test(tc, duplicate_key_at_second);
    tcase_add_test(tc, tab_indentation);
    tcase_add_test(tc, anchors_and_aliases);
    tcase_add_test(tc, several_documents);
    tcase_add_test(tc, empty_file);
    tcase_add_test(tc, non_scalar_key);
    tcase_add_test(tc, syntax_errors);
    tcase_add_test(tc, binary_garbage);
    tcase_add_test(tc, deep_nesting_refused);
    tcase_add_test(tc, scalar_conversions);
    tcase_add_test(tc, keys_checked_and_required);
    tcase_add_test(tc, load_file_and_missing_file);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(ydoc_suite());
    int failed;

    srunner_run_all(sr, CK_NORMAL);
    failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
