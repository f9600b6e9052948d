/*
 * Tests of the survey standards module (src/lib/orders.c) and of the custom
 * standard loader (src/lib/standard_load.c).
 *
 * Sources of the check values:
 *  - IHO S-44 Edition 6.0.0 (2020), Table 1 ("ed. 6, Table 1" below),
 *    checked against the standard's text, and its section 3.2 for the TVU
 *    formula sqrt(a^2 + (b d)^2).
 *  - IHO S-44 5th Edition (2008), Table 1 and 4th Edition (1998), Table 1:
 *    FROM MEMORY, not checked against the text (marked so beside each).
 *  - TVU / THU at given depths: computed by hand from those figures, the
 *    arithmetic written out beside each check.
 *  - The custom loader: the figures written in the shipped example file
 *    profiles/standards/kestrel-harbour.yaml and in the inline texts, with
 *    unit conversions done by hand (50 cm = 0.5 m, 5% = 0.05).
 */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/orders.h"

#define TOL 1e-12

static const struct sb_order *order_of(const char *std_id, const char *ord)
{
    const struct sb_standard *s = sb_standard_builtin(std_id);

    ck_assert_ptr_nonnull(s);
    const struct sb_order *o = sb_standard_order(s, ord);
    ck_assert_msg(o != NULL, "%s has no order %s", std_id, ord);
    return o;
}

/* Check one order's table figures. */
static void check_order(const char *std_id, const char *ord, double a,
                        double b, double thu_c, double thu_f)
{
    const struct sb_order *o = order_of(std_id, ord);

    ck_assert_double_eq_tol(o->tvu_a_m, a, TOL);
    ck_assert_double_eq_tol(o->tvu_b, b, TOL);
    ck_assert_double_eq_tol(o->thu_c_m, thu_c, TOL);
    ck_assert_double_eq_tol(o->thu_frac, thu_f, TOL);
}

static void check_feature(const char *std_id, const char *ord, double depth,
                          int specified, double size)
{
    const struct sb_order *o = order_of(std_id, ord);
    double s = -1.0;

    ck_assert_int_eq(sb_order_feature(o, depth, &s), specified);
    if (specified)
        ck_assert_double_eq_tol(s, size, TOL);
    else
        ck_assert(isnan(s));
}

/* ---- compiled-in tables ---------------------------------------------- */

START_TEST(test_builtin_ids)
{
    const char *const *ids = sb_standard_builtin_ids();
    const struct sb_standard *s;

    ck_assert_str_eq(ids[0], SB_STANDARD_DEFAULT_ID);
    ck_assert_str_eq(SB_STANDARD_DEFAULT_ID, "s44-6");
    ck_assert_str_eq(ids[1], "s44-5");
    ck_assert_str_eq(ids[2], "s44-4");
    ck_assert_ptr_null(ids[3]);
    ck_assert_ptr_null(sb_standard_builtin("s44-7"));
    ck_assert_ptr_null(sb_standard_builtin(NULL));
    ck_assert_ptr_null(sb_standard_builtin(""));
    s = sb_standard_builtin("s44-6");
    ck_assert_ptr_null(sb_standard_order(s, "1"));  /* no Order 1 in ed. 6 */
    ck_assert_ptr_null(sb_standard_order(s, "1A")); /* exact match only */
    ck_assert_ptr_null(sb_standard_order(NULL, "1a"));
}
END_TEST

START_TEST(test_s44_ed6_table1)
{
    const struct sb_standard *s = sb_standard_builtin("s44-6");

    /* IHO S-44 Edition 6.0.0 (2020), Table 1: five orders, in this order. */
    ck_assert_int_eq(s->n_orders, 5);
    ck_assert_str_eq(s->orders[0].id, "exclusive");
    ck_assert_str_eq(s->orders[1].id, "special");
    ck_assert_str_eq(s->orders[2].id, "1a");
    ck_assert_str_eq(s->orders[3].id, "1b");
    ck_assert_str_eq(s->orders[4].id, "2");
    /*                       order        a     b       THU c  THU f
     * IHO S-44 ed. 6.0.0 (2020), Table 1: */
    check_order("s44-6", "exclusive", 0.15, 0.0075, 1.0, 0.0);
    check_order("s44-6", "special", 0.25, 0.0075, 2.0, 0.0);
    check_order("s44-6", "1a", 0.5, 0.013, 5.0, 0.05);
    check_order("s44-6", "1b", 0.5, 0.013, 5.0, 0.05);
    check_order("s44-6", "2", 1.0, 0.023, 20.0, 0.10);

    /* Bathymetric coverage, IHO S-44 ed. 6.0.0 (2020), Table 1:
     * Exclusive 200 %, Special 100 %, 1a <= 100 %, 1b 5 %, Order 2 5 %. */
    ck_assert_double_eq_tol(order_of("s44-6", "exclusive")->coverage_pct,
                            200.0, TOL);
    ck_assert_double_eq_tol(order_of("s44-6", "special")->coverage_pct,
                            100.0, TOL);
    ck_assert_double_eq_tol(order_of("s44-6", "1a")->coverage_pct, 100.0,
                            TOL);
    ck_assert_str_eq(order_of("s44-6", "1a")->coverage, "<= 100%");
    ck_assert_double_eq_tol(order_of("s44-6", "1b")->coverage_pct, 5.0, TOL);
    ck_assert_double_eq_tol(order_of("s44-6", "2")->coverage_pct, 5.0, TOL);
}
END_TEST

START_TEST(test_s44_ed6_features)
{
    /* Feature detection, IHO S-44 Edition 6.0.0 (2020), Table 1:
     * Exclusive cubic features > 0.5 m, Special > 1 m, at every depth. */
    check_feature("s44-6", "exclusive", 5.0, 1, 0.5);
    check_feature("s44-6", "exclusive", 500.0, 1, 0.5);
    check_feature("s44-6", "special", 5.0, 1, 1.0);
    check_feature("s44-6", "special", 300.0, 1, 1.0);
    /* Order 1a: > 2 m in depths up to 40 m; 10 % of depth beyond 40 m
     * (ed. 6, Table 1).  At 40 m itself: 2 m; at 50 m: 0.10 x 50 = 5 m;
     * at 100 m: 0.10 x 100 = 10 m. */
    check_feature("s44-6", "1a", 10.0, 1, 2.0);
    check_feature("s44-6", "1a", 40.0, 1, 2.0);
    check_feature("s44-6", "1a", 50.0, 1, 5.0);
    check_feature("s44-6", "1a", 100.0, 1, 10.0);
    /* Orders 1b and 2: "not specified" (ed. 6, Table 1). */
    check_feature("s44-6", "1b", 20.0, 0, 0.0);
    check_feature("s44-6", "2", 20.0, 0, 0.0);
    /* size_m may be NULL */
    ck_assert_int_eq(sb_order_feature(order_of("s44-6", "1a"), 50.0, NULL),
                     1);
}
END_TEST

START_TEST(test_s44_ed6_values_at_depth)
{
    const struct sb_order *o;

    /* Hand computations with TVU = sqrt(a^2 + (b d)^2) (S-44 ed. 6, 3.2)
     * and the figures of ed. 6, Table 1. */

    /* Order 1a at 40 m: TVU = sqrt(0.5^2 + (0.013 x 40)^2)
     *                       = sqrt(0.25 + 0.2704) = sqrt(0.5204) = 0.721388 m
     *                   THU = 5 + 0.05 x 40 = 7.0 m */
    o = order_of("s44-6", "1a");
    ck_assert_double_eq_tol(sb_order_tvu(o, 40.0), 0.721388, 1e-6);
    ck_assert_double_eq_tol(sb_order_thu(o, 40.0), 7.0, TOL);
    /* Order 1a at 10 m: TVU = sqrt(0.25 + 0.13^2) = sqrt(0.2669) = 0.516624;
     *                   THU = 5 + 0.5 = 5.5 m */
    ck_assert_double_eq_tol(sb_order_tvu(o, 10.0), 0.516624, 1e-6);
    ck_assert_double_eq_tol(sb_order_thu(o, 10.0), 5.5, TOL);

    /* Exclusive at 20 m: b d = 0.0075 x 20 = 0.15 = a, so
     * TVU = 0.15 sqrt(2) = 0.212132 m; THU = 1 m at every depth. */
    o = order_of("s44-6", "exclusive");
    ck_assert_double_eq_tol(sb_order_tvu(o, 20.0), 0.212132, 1e-6);
    ck_assert_double_eq_tol(sb_order_thu(o, 20.0), 1.0, TOL);
    ck_assert_double_eq_tol(sb_order_thu(o, 200.0), 1.0, TOL);

    /* Special at 10 m: TVU = sqrt(0.0625 + 0.075^2) = sqrt(0.068125)
     * = 0.261008 m; at 100 m: sqrt(0.0625 + 0.5625) = sqrt(0.625)
     * = 0.790569 m; THU = 2 m. */
    o = order_of("s44-6", "special");
    ck_assert_double_eq_tol(sb_order_tvu(o, 10.0), 0.261008, 1e-6);
    ck_assert_double_eq_tol(sb_order_tvu(o, 100.0), 0.790569, 1e-6);
    ck_assert_double_eq_tol(sb_order_thu(o, 100.0), 2.0, TOL);

    /* Order 1b at 200 m: TVU = sqrt(0.25 + 2.6^2) = sqrt(7.01) = 2.647640 m;
     * THU = 5 + 0.05 x 200 = 15 m. */
    o = order_of("s44-6", "1b");
    ck_assert_double_eq_tol(sb_order_tvu(o, 200.0), 2.647640, 1e-6);
    ck_assert_double_eq_tol(sb_order_thu(o, 200.0), 15.0, TOL);

    /* Order 2 at 100 m: TVU = sqrt(1 + 2.3^2) = sqrt(6.29) = 2.507987 m;
     * THU = 20 + 0.10 x 100 = 30 m. */
    o = order_of("s44-6", "2");
    ck_assert_double_eq_tol(sb_order_tvu(o, 100.0), 2.507987, 1e-6);
    ck_assert_double_eq_tol(sb_order_thu(o, 100.0), 30.0, TOL);

    /* At zero depth only the constants remain: TVU = a, THU = c. */
    ck_assert_double_eq_tol(sb_order_tvu(o, 0.0), 1.0, TOL);
    ck_assert_double_eq_tol(sb_order_thu(o, 0.0), 20.0, TOL);
}
END_TEST

START_TEST(test_s44_ed5_table1)
{
    const struct sb_standard *s = sb_standard_builtin("s44-5");

    /* IHO S-44 5th Edition (2008), Table 1 -- FROM MEMORY, not checked
     * against the text: Special, 1a, 1b, 2 with the same a, b and THU as
     * edition 6's namesakes. */
    ck_assert_int_eq(s->n_orders, 4);
    ck_assert_ptr_null(sb_standard_order(s, "exclusive")); /* new in ed. 6 */
    check_order("s44-5", "special", 0.25, 0.0075, 2.0, 0.0);
    check_order("s44-5", "1a", 0.5, 0.013, 5.0, 0.05);
    check_order("s44-5", "1b", 0.5, 0.013, 5.0, 0.05);
    check_order("s44-5", "2", 1.0, 0.023, 20.0, 0.10);
    /* Feature detection, ed. 5 Table 1, FROM MEMORY: Special > 1 m; 1a > 2 m
     * to 40 m, 10 % of depth beyond; 1b and 2 not applicable. */
    check_feature("s44-5", "special", 30.0, 1, 1.0);
    check_feature("s44-5", "1a", 30.0, 1, 2.0);
    check_feature("s44-5", "1a", 60.0, 1, 6.0); /* 0.10 x 60 */
    check_feature("s44-5", "1b", 30.0, 0, 0.0);
    check_feature("s44-5", "2", 30.0, 0, 0.0);
    /* Coverage, ed. 5, FROM MEMORY: full search for Special and 1a only. */
    ck_assert_double_eq_tol(order_of("s44-5", "special")->coverage_pct,
                            100.0, TOL);
    ck_assert_double_eq_tol(order_of("s44-5", "1a")->coverage_pct, 100.0,
                            TOL);
    ck_assert(isnan(order_of("s44-5", "1b")->coverage_pct));
    ck_assert(isnan(order_of("s44-5", "2")->coverage_pct));
}
END_TEST

START_TEST(test_s44_ed4_table1)
{
    const struct sb_standard *s = sb_standard_builtin("s44-4");
    const struct sb_order *o;

    /* IHO S-44 4th Edition (1998), Table 1 -- FROM MEMORY, not checked
     * against the text. */
    ck_assert_int_eq(s->n_orders, 4);
    ck_assert_ptr_null(sb_standard_order(s, "1a")); /* 1a/1b came in ed. 5 */
    check_order("s44-4", "special", 0.25, 0.0075, 2.0, 0.0);
    check_order("s44-4", "1", 0.5, 0.013, 5.0, 0.05);
    check_order("s44-4", "2", 1.0, 0.023, 20.0, 0.05);
    check_order("s44-4", "3", 1.0, 0.023, 150.0, 0.05);
    /* Feature detection, ed. 4, FROM MEMORY: Special > 1 m; Orders 1 and 2
     * > 2 m to 40 m, 10 % of depth beyond; Order 3 not applicable. */
    check_feature("s44-4", "special", 30.0, 1, 1.0);
    check_feature("s44-4", "1", 40.0, 1, 2.0);
    check_feature("s44-4", "2", 80.0, 1, 8.0); /* 0.10 x 80 */
    check_feature("s44-4", "3", 80.0, 0, 0.0);

    /* Order 3 at 100 m: TVU = sqrt(1 + 2.3^2) = 2.507987 m;
     * THU = 150 + 0.05 x 100 = 155 m.  Order 2 at 100 m:
     * THU = 20 + 0.05 x 100 = 25 m (ed. 6 would give 30 m). */
    o = order_of("s44-4", "3");
    ck_assert_double_eq_tol(sb_order_tvu(o, 100.0), 2.507987, 1e-6);
    ck_assert_double_eq_tol(sb_order_thu(o, 100.0), 155.0, TOL);
    ck_assert_double_eq_tol(sb_order_thu(order_of("s44-4", "2"), 100.0), 25.0,
                            TOL);
}
END_TEST

START_TEST(test_resolve_builtin)
{
    struct sb_standard storage;
    const struct sb_standard *s = NULL;
    struct sb_error err;

    ck_assert_int_eq(sb_standard_resolve(NULL, &storage, &s, &err), SB_OK);
    ck_assert_str_eq(s->id, "s44-6");
    ck_assert_int_eq(sb_standard_resolve("", &storage, &s, &err), SB_OK);
    ck_assert_str_eq(s->id, "s44-6");
    ck_assert_int_eq(sb_standard_resolve("s44-4", &storage, &s, &err), SB_OK);
    ck_assert_str_eq(s->id, "s44-4");
    /* not an id, so a path; that file does not exist */
    ck_assert_int_ne(sb_standard_resolve("/nonexistent/s44-9.yaml", &storage,
                                         &s, &err),
                     SB_OK);
    ck_assert_ptr_null(s);
}
END_TEST

/* ---- custom standards ------------------------------------------------ */

static void example_path(char *buf, size_t n)
{
    /* SB_SRCDIR is set by Makefile.am for the tests, srcdir by automake */
    const char *srcdir = getenv("SB_SRCDIR");

    if (!srcdir || !*srcdir)
        srcdir = getenv("srcdir");

    snprintf(buf, n, "%s/profiles/standards/kestrel-harbour.yaml",
             srcdir && *srcdir ? srcdir : ".");
}

START_TEST(test_example_loads)
{
    char path[1024];
    struct sb_standard std;
    struct sb_error err;
    const struct sb_standard *s = NULL;
    const struct sb_order *o;
    double f;
    int rc;

    example_path(path, sizeof path);
    sb_error_clear(&err);
    rc = sb_standard_load(path, &std, &err);
    ck_assert_msg(rc == SB_OK, "%s:%d:%d: %s", err.file, err.line, err.col,
                  err.msg);
    /* Figures as written in profiles/standards/kestrel-harbour.yaml. */
    ck_assert_str_eq(std.id, "ksha-hs2");
    ck_assert_str_eq(std.source, path);
    ck_assert_int_eq(std.n_orders, 4);
    o = sb_standard_order(&std, "berths");
    ck_assert_ptr_nonnull(o);
    ck_assert_str_eq(o->name, "Berths and swing basin");
    ck_assert_double_eq_tol(o->tvu_a_m, 0.15, TOL);
    ck_assert_double_eq_tol(o->tvu_b, 0.0075, TOL);
    ck_assert_double_eq_tol(o->thu_c_m, 0.8, TOL);
    ck_assert_double_eq_tol(o->thu_frac, 0.0, TOL);
    ck_assert_double_eq_tol(o->coverage_pct, 200.0, TOL);
    ck_assert_int_eq(sb_order_feature(o, 150.0, &f), 1); /* size only */
    ck_assert_double_eq_tol(f, 0.5, TOL);

    /* channel: 1 m to 30 m, 4 % beyond: at 50 m 0.04 x 50 = 2 m */
    o = sb_standard_order(&std, "channel");
    ck_assert_int_eq(sb_order_feature(o, 30.0, &f), 1);
    ck_assert_double_eq_tol(f, 1.0, TOL);
    ck_assert_int_eq(sb_order_feature(o, 50.0, &f), 1);
    ck_assert_double_eq_tol(f, 2.0, TOL);

    /* anchorage: a written "50 cm" = 0.5 m, depth_fraction "5%" = 0.05.
     * At 60 m: TVU = sqrt(0.25 + 0.78^2) = sqrt(0.8584) = 0.926499 m,
     * THU = 5 + 3 = 8 m. */
    o = sb_standard_order(&std, "anchorage");
    ck_assert_double_eq_tol(o->tvu_a_m, 0.5, TOL);
    ck_assert_double_eq_tol(o->thu_frac, 0.05, TOL);
    ck_assert_double_eq_tol(sb_order_tvu(o, 60.0), 0.926499, 1e-6);
    ck_assert_double_eq_tol(sb_order_thu(o, 60.0), 8.0, 1e-12);

    /* passage: feature none; coverage in words only */
    o = sb_standard_order(&std, "passage");
    ck_assert_int_eq(sb_order_feature(o, 60.0, &f), 0);
    ck_assert(isnan(o->coverage_pct));
    ck_assert_str_eq(o->coverage, "lines no more than 4 x mean depth apart");

    /* The same file through --standard resolution. */
    rc = sb_standard_resolve(path, &std, &s, &err);
    ck_assert_int_eq(rc, SB_OK);
    ck_assert_ptr_eq(s, &std);
    ck_assert_str_eq(s->id, "ksha-hs2");
}
END_TEST

/* A valid one-order standard, built from pieces so that each error case
 * below changes one piece.  Line numbers (1-based) are in the comments. */
#define HEAD "id: test-std\n"              /* 1 */ \
             "name: Test standard\n"       /* 2 */ \
             "orders:\n"                   /* 3 */ \
             "  - id: o1\n"                /* 4 */ \
             "    name: First\n"           /* 5 */
#define TVU_OK "    tvu:\n"                /* 6 */ \
               "      a: 0.5 m\n"          /* 7: value at col 10 */ \
               "      b: 0.013\n"          /* 8 */
#define THU_OK "    thu:\n"                /* 9 */ \
               "      constant: 5 m\n"     /* 10 */ \
               "      depth_fraction: 5%\n" /* 11 */
#define TAIL "    feature: none\n"         /* 12 */ \
             "    coverage: 100%\n"        /* 13 */

START_TEST(test_inline_valid_shapes)
{
    static const char text[] =
        HEAD TVU_OK THU_OK TAIL
        "  - id: o2\n"
        "    name: Second\n"
        "    tvu: {a: 20 cm, b: 1.3 %}\n"
        "    thu: {constant: 2000 mm, depth_fraction: 0.1}\n"
        "    feature: {fraction: 10%}\n"
        "    coverage: \"5%\"\n";
    struct sb_standard std;
    struct sb_error err;
    const struct sb_order *o;
    double f;
    int rc;

    rc = sb_standard_load_string("inline.yaml", text, strlen(text), &std, &err);
    ck_assert_msg(rc == SB_OK, "%s:%d:%d: %s", err.file, err.line, err.col,
                  err.msg);
    ck_assert_str_eq(std.title, "Test standard");
    o = sb_standard_order(&std, "o1");
    ck_assert_double_eq_tol(o->thu_frac, 0.05, TOL); /* "5%" */
    ck_assert_int_eq(sb_order_feature(o, 10.0, &f), 0);
    o = sb_standard_order(&std, "o2");
    ck_assert_double_eq_tol(o->tvu_a_m, 0.2, TOL);   /* 20 cm */
    ck_assert_double_eq_tol(o->tvu_b, 0.013, TOL);   /* 1.3 % */
    ck_assert_double_eq_tol(o->thu_c_m, 2.0, TOL);   /* 2000 mm */
    ck_assert_double_eq_tol(o->thu_frac, 0.1, TOL);
    ck_assert_double_eq_tol(o->coverage_pct, 5.0, TOL);
    /* fraction only: 10 % of depth at every depth, 0.1 x 7 = 0.7 m */
    ck_assert_int_eq(sb_order_feature(o, 7.0, &f), 1);
    ck_assert_double_eq_tol(f, 0.7, TOL);
}
END_TEST

struct bad_case {
    const char *label;
    const char *text;
    int line, col;       /* where the error must point */
    const char *needle;  /* a word the message must contain */
};

static const struct bad_case bad_cases[] = {
    /* unknown key: 'c' on line 9, col 7 */
    {"unknown key",
     HEAD "    tvu:\n      a: 0.5 m\n      b: 0.013\n      c: 1 m\n"
          "    thu:\n      constant: 5 m\n      depth_fraction: 5%\n" TAIL,
     9, 7, "unknown key 'c'"},
    /* unknown top-level key on line 1 */
    {"unknown top-level key", "edition: 2\n" HEAD TVU_OK THU_OK TAIL, 1, 1,
     "unknown key 'edition'"},
    /* missing key b: reported at the tvu mapping, which starts at 'a' (7:7) */
    {"missing key", HEAD "    tvu:\n      a: 0.5 m\n" THU_OK TAIL, 7, 7,
     "'b'"},
    /* missing coverage: reported at the order's mapping (4:5) */
    {"missing coverage", HEAD TVU_OK THU_OK "    feature: none\n", 4, 5,
     "'coverage'"},
    /* negative a, at the value (7:10) */
    {"negative a",
     HEAD "    tvu:\n      a: -0.5 m\n      b: 0.013\n" THU_OK TAIL, 7, 10,
     "negative"},
    /* negative b */
    {"negative b",
     HEAD "    tvu:\n      a: 0.5 m\n      b: -0.013\n" THU_OK TAIL, 8, 10,
     "negative"},
    /* wrong type: a list where a length is expected (7:10) */
    {"list for a", HEAD "    tvu:\n      a: [1, 2]\n      b: 0.013\n" THU_OK
     TAIL, 7, 10, "list"},
    /* wrong type: a scalar where the tvu mapping is expected (6:10) */
    {"scalar for tvu", HEAD "    tvu: 0.5 m\n" THU_OK TAIL, 6, 10, "tvu"},
    /* wrong type: words for a fraction */
    {"words for b", HEAD "    tvu:\n      a: 0.5 m\n      b: small\n"
     THU_OK TAIL, 8, 10, "not a number"},
    /* a length without its unit is refused, not taken as metres */
    {"bare length", HEAD "    tvu:\n      a: 0.5\n      b: 0.013\n" THU_OK
     TAIL, 7, 10, "no unit"},
    /* a unit of the wrong dimension */
    {"wrong unit", HEAD "    tvu:\n      a: 0.5 s\n      b: 0.013\n" THU_OK
     TAIL, 7, 10, "tvu.a"},
    /* feature: size and fraction without beyond, at the feature map (12:7) */
    {"feature without beyond",
     HEAD TVU_OK THU_OK "    feature:\n      size: 2 m\n      fraction: 10%\n"
     "    coverage: 100%\n", 13, 7, "beyond"},
    /* feature: beyond alone, at the beyond key's value (13:15) */
    {"beyond alone",
     HEAD TVU_OK THU_OK "    feature:\n      size: 2 m\n      beyond: 40 m\n"
     "    coverage: 100%\n", 14, 15, "beyond"},
    /* feature: a word other than none (12:14) */
    {"feature word", HEAD TVU_OK THU_OK "    feature: some\n"
     "    coverage: 100%\n", 12, 14, "none"},
    /* coverage as a bare number (13:15) */
    {"bare coverage", HEAD TVU_OK THU_OK "    feature: none\n"
     "    coverage: 100\n", 13, 15, "percentage"},
    /* a and b both zero: at the tvu mapping (7:7) */
    {"zero tvu", HEAD "    tvu:\n      a: 0 m\n      b: 0\n" THU_OK TAIL, 7,
     7, "zero"},
    /* an id of a compiled-in standard (1:5) */
    {"builtin id", "id: s44-6\nname: x\norders:\n  - id: o1\n    name: First\n"
     TVU_OK THU_OK TAIL, 1, 5, "compiled-in"},
    /* an order id with a comma (would break --order lists) (4:9) */
    {"comma in id", "id: t\nname: x\norders:\n  - id: \"a,b\"\n"
     "    name: First\n" TVU_OK THU_OK TAIL, 4, 9, "','"},
    /* the same order id twice: at the second id (14:9) */
    {"duplicate order", HEAD TVU_OK THU_OK TAIL "  - id: o1\n"
     "    name: Again\n" TVU_OK THU_OK TAIL, 14, 9, "twice"},
    /* no orders (3:9) */
    {"empty orders", "id: t\nname: x\norders: []\n", 3, 9, "orders"},
    /* not a mapping at all */
    {"root list", "- 1\n- 2\n", 1, 1, "mapping"},
};

START_TEST(test_inline_errors)
{
    const struct bad_case *c = &bad_cases[_i];
    struct sb_standard std;
    struct sb_error err;
    int rc;

    sb_error_clear(&err);
    memset(&std, 0x5a, sizeof std);
    rc = sb_standard_load_string("bad.yaml", c->text, strlen(c->text), &std,
                                 &err);
    ck_assert_msg(rc == SB_EINPUT, "%s: status %d", c->label, rc);
    ck_assert_str_eq(err.file, "bad.yaml");
    ck_assert_msg(err.line == c->line && err.col == c->col,
                  "%s: at %d:%d, expected %d:%d (%s)", c->label, err.line,
                  err.col, c->line, c->col, err.msg);
    ck_assert_msg(strstr(err.msg, c->needle) != NULL,
                  "%s: message \"%s\" lacks \"%s\"", c->label, err.msg,
                  c->needle);
    ck_assert_msg(strchr(err.msg, '\n') == NULL, "%s: not one line",
                  c->label);
    /* nothing half-filled is left behind */
    ck_assert_int_eq(std.n_orders, 0);
    ck_assert_str_eq(std.id, "");
}
END_TEST

START_TEST(test_file_errors)
{
    char path[] = "/tmp/sb_orders_XXXXXX";
    static const char text[] =
        HEAD "    tvu:\n      a: -1 m\n      b: 0.013\n" THU_OK TAIL;
    struct sb_standard std;
    struct sb_error err;
    FILE *f;
    int fd, rc;

    fd = mkstemp(path);
    ck_assert_int_ge(fd, 0);
    f = fdopen(fd, "w");
    ck_assert_ptr_nonnull(f);
    fputs(text, f);
    fclose(f);
    rc = sb_standard_load(path, &std, &err);
    remove(path);
    ck_assert_int_eq(rc, SB_EINPUT);
    ck_assert_str_eq(err.file, path); /* FILE is the path given */
    ck_assert_int_eq(err.line, 7);
    ck_assert_int_eq(err.col, 10);

    rc = sb_standard_load("/nonexistent/dir/standard.yaml", &std, &err);
    ck_assert_int_ne(rc, SB_OK);
}
END_TEST

static Suite *orders_suite(void)
{
    Suite *s = suite_create("orders");
    TCase *t = tcase_create("builtin");
    TCase *c = tcase_create("custom");

    tcase_add_test(t, test_builtin_ids);
    tcase_add_test(t, test_s44_ed6_table1);
    tcase_add_test(t, test_s44_ed6_features);
    tcase_add_test(t, test_s44_ed6_values_at_depth);
    tcase_add_test(t, test_s44_ed5_table1);
    tcase_add_test(t, test_s44_ed4_table1);
    tcase_add_test(t, test_resolve_builtin);
    suite_add_tcase(s, t);
    tcase_add_test(c, test_example_loads);
    tcase_add_test(c, test_inline_valid_shapes);
    tcase_add_loop_test(c, test_inline_errors, 0,
                        (int)(sizeof bad_cases / sizeof bad_cases[0]));
    tcase_add_test(c, test_file_errors);
    suite_add_tcase(s, c);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(orders_suite());
    int failed;

    srunner_run_all(sr, CK_NORMAL);
    failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
