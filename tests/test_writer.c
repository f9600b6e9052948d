/* Tests of the output writers: JSON syntax (RFC 8259), refusal of
 * non-finite numbers, table alignment and CSV quoting (RFC 4180), atomic
 * output files. */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "swathbudget/writer.h"

/* Run fn on a memory stream and return what it wrote (caller frees). */
static char *capture(void (*fn)(FILE *, int *), int *status)
{
    char *buf = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&buf, &len);

    ck_assert_ptr_nonnull(f);
    fn(f, status);
    fclose(f);
    return buf;
}

static void doc_simple(FILE *f, int *status)
{
    struct sb_json j;
    struct sb_error err;

    sb_json_init(&j, f);
    sb_json_begin_object(&j);
    sb_json_kv_string(&j, "standard", "s44-6");
    sb_json_key(&j, "limits");
    sb_json_begin_array(&j);
    sb_json_begin_object(&j);
    sb_json_kv_number(&j, "depth_m", 10, 6);
    sb_json_key(&j, "feature_m");
    sb_json_null(&j);
    sb_json_key(&j, "ok");
    sb_json_bool(&j, 1);
    sb_json_end_object(&j);
    sb_json_end_array(&j);
    sb_json_kv_string(&j, "note", "quote \" backslash \\ tab \t");
    sb_json_end_object(&j);
    *status = sb_json_finish(&j, &err);
}

START_TEST(json_document)
{
    int status;
    char *out = capture(doc_simple, &status);

    ck_assert_int_eq(status, SB_OK);
    ck_assert_str_eq(out, "{\n"
                          "  \"standard\": \"s44-6\",\n"
                          "  \"limits\": [\n"
                          "    {\n"
                          "      \"depth_m\": 10,\n"
                          "      \"feature_m\": null,\n"
                          "      \"ok\": true\n"
                          "    }\n"
                          "  ],\n"
                          "  \"note\": \"quote \\\" backslash \\\\ tab \\t\"\n"
                          "}\n");
    free(out);
}
END_TEST

static void doc_nan(FILE *f, int *status)
{
    struct sb_json j;
    struct sb_error err;

    sb_json_init(&j, f);
    sb_json_begin_object(&j);
    sb_json_kv_number(&j, "tvu_m", NAN, 6);
    sb_json_kv_number(&j, "thu_m", INFINITY, 6);
    sb_json_end_object(&j);
    *status = sb_json_finish(&j, &err);
}

START_TEST(json_refuses_non_finite)
{
    int status;
    char *out = capture(doc_nan, &status);

    ck_assert_int_eq(status, SB_EINTERNAL);
    ck_assert_ptr_null(strstr(out, "nan"));
    ck_assert_ptr_null(strstr(out, "inf"));
    free(out);
}
END_TEST

static void doc_unbalanced(FILE *f, int *status)
{
    struct sb_json j;
    struct sb_error err;

    sb_json_init(&j, f);
    sb_json_begin_object(&j);
    sb_json_end_array(&j);
    *status = sb_json_finish(&j, &err);
}

START_TEST(json_refuses_bad_nesting)
{
    int status;
    char *out = capture(doc_unbalanced, &status);

    ck_assert_int_eq(status, SB_EINTERNAL);
    free(out);
}
END_TEST

static const struct sb_table_col cols[] = {
    {"depth (m)", "depth_m", 1},
    {"order", "order", 0},
    {"tvu (m)", "tvu_m", 3},
};

static void table_doc(FILE *f, int *status)
{
    struct sb_table *t = sb_table_alloc(cols, 3);
    struct sb_error err;

    sb_table_num(t, 10);
    sb_table_str(t, "1a");
    sb_table_num(t, 0.52);
    sb_table_num(t, 100);
    sb_table_str(t, "special, \"x\"");
    sb_table_empty(t, "-");
    *status = sb_table_write(t, f, (enum sb_format)status[1], &err);
    sb_table_free(t);
}

START_TEST(table_aligned)
{
    int st[2] = {0, SB_FORMAT_TABLE};
    char *out = capture(table_doc, st);

    ck_assert_int_eq(st[0], SB_OK);
    ck_assert_str_eq(out, "depth (m)  order         tvu (m)\n"
                          "---------  ------------  -------\n"
                          "     10.0  1a              0.520\n"
                          "    100.0  special, \"x\"        -\n");
    free(out);
}
END_TEST

START_TEST(table_csv)
{
    int st[2] = {0, SB_FORMAT_CSV};
    char *out = capture(table_doc, st);

    ck_assert_int_eq(st[0], SB_OK);
    /* RFC 4180 2.6-2.7: fields with commas or quotes are quoted, quotes
     * doubled; "no value" is an empty field. */
    ck_assert_str_eq(out, "depth_m,order,tvu_m\n"
                          "10.0,1a,0.520\n"
                          "100.0,\"special, \"\"x\"\"\",\n");
    free(out);
}
END_TEST

START_TEST(table_no_negative_zero)
{
    struct sb_table *t = sb_table_alloc(cols, 3);
    struct sb_error err;
    char *buf = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&buf, &len);

    sb_table_num(t, -0.0001);
    sb_table_str(t, "x");
    sb_table_num(t, -0.0);
    ck_assert_int_eq(sb_table_write(t, f, SB_FORMAT_CSV, &err), SB_OK);
    fclose(f);
    ck_assert_str_eq(buf, "depth_m,order,tvu_m\n0.0,x,0.000\n");
    free(buf);
    sb_table_free(t);
}
END_TEST

START_TEST(table_refuses_nan)
{
    struct sb_table *t = sb_table_alloc(cols, 3);
    struct sb_error err;
    FILE *f = fopen("/dev/null", "w");

    sb_table_num(t, NAN);
    sb_table_str(t, "x");
    sb_table_num(t, 1);
    ck_assert_int_eq(sb_table_write(t, f, SB_FORMAT_TABLE, &err),
                     SB_EINTERNAL);
    fclose(f);
    sb_table_free(t);
}
END_TEST

START_TEST(outfile_atomic)
{
    char dir[] = "/tmp/sb_writer_XXXXXX", path[256], line[64];
    struct sb_outfile o;
    struct sb_error err;
    FILE *f;

    ck_assert_ptr_nonnull(mkdtemp(dir));
    snprintf(path, sizeof path, "%s/out.txt", dir);
    f = fopen(path, "w");
    fputs("old\n", f);
    fclose(f);

    /* An aborted write leaves the old file untouched. */
    ck_assert_int_eq(sb_outfile_open(&o, path, &err), SB_OK);
    fputs("half", o.f);
    sb_outfile_abort(&o);
    f = fopen(path, "r");
    ck_assert_ptr_nonnull(fgets(line, sizeof line, f));
    fclose(f);
    ck_assert_str_eq(line, "old\n");

    /* A committed write replaces it whole. */
    ck_assert_int_eq(sb_outfile_open(&o, path, &err), SB_OK);
    fputs("new\n", o.f);
    ck_assert_int_eq(sb_outfile_commit(&o, &err), SB_OK);
    f = fopen(path, "r");
    ck_assert_ptr_nonnull(fgets(line, sizeof line, f));
    fclose(f);
    ck_assert_str_eq(line, "new\n");
    unlink(path);
    rmdir(dir);
}
END_TEST

START_TEST(outfile_full_device)
{
    struct sb_outfile o;
    struct sb_error err;
    struct stat st;

    if (stat("/dev/full", &st) != 0)
        return; /* not on this system */
    ck_assert_int_eq(sb_outfile_open(&o, "/dev/full", &err), SB_OK);
    for (int i = 0; i < 10000; i++)
        fputs("0123456789", o.f);
    ck_assert_int_eq(sb_outfile_commit(&o, &err), SB_EIO);
    ck_assert(stat("/dev/full", &st) == 0 && S_ISCHR(st.st_mode));
}
END_TEST

int main(void)
{
    Suite *s = suite_create("writer");
    TCase *tc = tcase_create("core");
    SRunner *sr;
    int failed;

    tcase_add_test(tc, json_document);
    tcase_add_test(tc, json_refuses_non_finite);
    tcase_add_test(tc, json_refuses_bad_nesting);
    tcase_add_test(tc, table_aligned);
    tcase_add_test(tc, table_csv);
    tcase_add_test(tc, table_no_negative_zero);
    tcase_add_test(tc, table_refuses_nan);
    tcase_add_test(tc, outfile_atomic);
    tcase_add_test(tc, outfile_full_device);
    suite_add_tcase(s, tc);
    sr = srunner_create(s);
    srunner_run_all(sr, CK_NORMAL);
    failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed == 0 ? 0 : 1;
}
