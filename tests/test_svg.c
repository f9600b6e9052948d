/*
 * Tests of the SVG plot writer (svg.c).
 *
 * Check values: the tick rule (1, 2 or 5 times a power of ten: Heckbert
 * 1990, "Nice numbers for graph labels", Graphics Gems) worked by hand, and
 * pixel positions worked by hand from the linear map of the data range onto
 * the plot area whose edges the comments derive from the layout (70 px left
 * margin, 18 px right, 40 px top, 48 px + the legend rows at the bottom).
 * Well-formedness is checked with xmllint (Debian libxml2-utils) when it is
 * installed; the CLI test checks it always.
 */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "swathbudget/svg.h"

/* Render into a string (caller frees). */
static char *render_plot(const struct sb_plot *p, int w, int h, int standalone,
                         int *rc)
{
    char *buf = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&buf, &len);
    struct sb_error err;

    ck_assert_ptr_nonnull(f);
    *rc = sb_plot_write(p, f, w, h, standalone, "t-", &err);
    fclose(f);
    return buf;
}

static void check_wellformed(const char *text)
{
    char path[] = "/tmp/sb_test_svg_XXXXXX";
    char cmd[256];
    int fd;
    FILE *f;

    if (access("/usr/bin/xmllint", X_OK) != 0)
        return;
    fd = mkstemp(path);
    ck_assert_int_ge(fd, 0);
    f = fdopen(fd, "w");
    fputs(text, f);
    fclose(f);
    snprintf(cmd, sizeof cmd, "/usr/bin/xmllint --noout %s", path);
    ck_assert_int_eq(system(cmd), 0);
    unlink(path);
}

/* Nothing outside the picture: no http: but the SVG namespace name, no
 * href, no @import, every url( a #fragment. */
static void check_self_contained(const char *text)
{
    const char *ns = "xmlns=\"http://www.w3.org/2000/svg\"";
    const char *p;

    for (p = strstr(text, "http:"); p; p = strstr(p + 1, "http:"))
        ck_assert(p - text >= 7 && strncmp(p - 7, ns, strlen(ns)) == 0);
    ck_assert(strstr(text, "href") == NULL);
    ck_assert(strstr(text, "@import") == NULL);
    for (p = strstr(text, "url("); p; p = strstr(p + 1, "url("))
        ck_assert(p[4] == '#');
}

START_TEST(test_tick_step_hand)
{
    /* Hand: range / target, then rounded to 1, 2, 5 x 10^k:
     * 10 / 6 = 1.67 -> 2; 1 / 5 = 0.2 -> 0.2; 73 / 6 = 12.2 -> 10;
     * 0.03 / 6 = 0.005 -> 0.005; 400 / 6 = 66.7 -> 50 */
    ck_assert_double_eq_tol(sb_svg_tick_step(0, 10, 6), 2.0, 1e-12);
    ck_assert_double_eq_tol(sb_svg_tick_step(0, 1, 5), 0.2, 1e-12);
    ck_assert_double_eq_tol(sb_svg_tick_step(-3, 70, 6), 10.0, 1e-12);
    ck_assert_double_eq_tol(sb_svg_tick_step(0.01, 0.04, 6), 0.005, 1e-15);
    ck_assert_double_eq_tol(sb_svg_tick_step(0, 400, 6), 50.0, 1e-12);
    ck_assert_double_eq(sb_svg_tick_step(1, 1, 6), 0.0);
    ck_assert_double_eq(sb_svg_tick_step(0, NAN, 6), 0.0);
}
END_TEST

START_TEST(test_line_positions_hand)
{
    struct sb_plot *p = sb_plot_alloc("TVU <95%> & limits", "angle (deg)",
                                      "TVU95 (m)");
    double x[] = {0.0, 10.0}, y[] = {0.0, 10.0};
    char *s;
    int rc;

    ck_assert_int_eq(sb_plot_series(p, "linear", x, y, 2, 0, 0), SB_OK);
    ck_assert_int_eq(sb_plot_rule(p, 1, 5.0, SB_SVG_RULE_MARK, "fail 5 deg"),
                     SB_OK);
    sb_plot_xrange(p, 0, 10);
    sb_plot_yrange(p, 0, 10);
    s = render_plot(p, 400, 300, 1, &rc);
    ck_assert_int_eq(rc, SB_OK);
    /* Hand: plot area x 70..382 (400 - 18); one legend row: y 40 ..
     * 300 - 48 - 17 - 6 = 229.  (0,0) -> (70, 229), (10,10) -> (382, 40);
     * the rule at x = 5 -> 70 + 0.5 x 312 = 226. */
    ck_assert_ptr_nonnull(strstr(s, "points=\"70.00,229.00 382.00,40.00\""));
    ck_assert_ptr_nonnull(strstr(s, "x1=\"226.00\""));
    /* escaped title */
    ck_assert_ptr_nonnull(strstr(s, "TVU &lt;95%&gt; &amp; limits"));
    check_self_contained(s);
    check_wellformed(s);
    free(s);

    /* depth axis downward: (0,0) now at the top: (70, 40) */
    sb_plot_y_down(p, 1);
    s = render_plot(p, 400, 300, 0, &rc);
    ck_assert_int_eq(rc, SB_OK);
    ck_assert_ptr_nonnull(strstr(s, "points=\"70.00,40.00 382.00,229.00\""));
    /* the inline form has no XML declaration and no namespace */
    ck_assert(strstr(s, "<?xml") == NULL);
    ck_assert(strstr(s, "xmlns") == NULL);
    check_self_contained(s);
    free(s);
    sb_plot_free(p);
}
END_TEST

START_TEST(test_auto_range_rounds_out)
{
    struct sb_plot *p = sb_plot_alloc("t", "x", "y");
    double x[] = {-63.0, 63.0}, y[] = {0.11, 0.52};
    char *s;
    int rc;

    ck_assert_int_eq(sb_plot_series(p, "a", x, y, 2, 1, 0), SB_OK);
    s = render_plot(p, 600, 400, 1, &rc);
    ck_assert_int_eq(rc, SB_OK);
    /* Hand: x step 126 / 6 = 21 -> 20: range -80..80, labels "-80", "80";
     * y step 0.41 / 6 = 0.068 -> 0.05: range 0.10..0.55, label "0.55" */
    ck_assert_ptr_nonnull(strstr(s, ">-80</text>"));
    ck_assert_ptr_nonnull(strstr(s, ">80</text>"));
    ck_assert_ptr_nonnull(strstr(s, ">0.55</text>"));
    ck_assert_ptr_null(strstr(s, ">-0</text>"));
    check_wellformed(s);
    free(s);
    sb_plot_free(p);
}
END_TEST

START_TEST(test_refuses_nonfinite)
{
    struct sb_plot *p = sb_plot_alloc("t", "x", "y");
    double x[] = {0.0, 1.0}, y[] = {0.0, NAN};
    char *s;
    int rc;

    ck_assert_int_eq(sb_plot_series(p, "a", x, y, 2, 0, 0), SB_EINTERNAL);
    ck_assert_int_eq(sb_plot_rule(p, 0, INFINITY, SB_SVG_RULE_LIMIT, "l"),
                     SB_EINTERNAL);
    s = render_plot(p, 400, 300, 1, &rc);
    ck_assert_int_eq(rc, SB_EINTERNAL);
    free(s);
    sb_plot_free(p);
}
END_TEST

START_TEST(test_bars_hand)
{
    static const char *const parts[] = {"motion", "sound speed", "other"};
    struct sb_bars *b = sb_bars_alloc("shares", "beam angle (deg)",
                                      "TVU95 (m)", parts, 3);
    double v1[] = {1.0, 2.0, 1.0}, v2[] = {2.0, 4.0, 4.0};
    char *buf = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&buf, &len);
    struct sb_error err;
    double bad[] = {1.0, -1.0, 0.0};

    ck_assert_int_eq(sb_bars_add(b, "0", v1), SB_OK);
    ck_assert_int_eq(sb_bars_add(b, "60", v2), SB_OK);
    ck_assert_int_eq(sb_bars_write(b, f, 400, 300, 1, "b-", &err), SB_OK);
    fclose(f);
    /* Hand: the tallest bar is 10 -> y 0..10 in steps of 2; one legend row
     * (3 short labels fit 312 px): plot y 40..229, 18.9 px per unit.  Two
     * slots of 156 px; bar width min(0.55 x 156, 90) = 85.8; bar 2's centre
     * 70 + 1.5 x 156 = 304, left edge 261.10.  Its top part (4) spans
     * 229 - 6 x 18.9 = 115.60 up to 229 - 10 x 18.9 = 40.00. */
    ck_assert_ptr_nonnull(
        strstr(buf, "x=\"261.10\" y=\"40.00\" width=\"85.80\" "
                    "height=\"75.60\""));
    ck_assert_ptr_nonnull(strstr(buf, "url(#b-fill"));
    check_self_contained(buf);
    check_wellformed(buf);
    free(buf);
    ck_assert_int_eq(sb_bars_add(b, "x", bad), SB_EINTERNAL);
    sb_bars_free(b);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("svg");
    TCase *tc = tcase_create("core");
    SRunner *sr;
    int nf;

    tcase_add_test(tc, test_tick_step_hand);
    tcase_add_test(tc, test_line_positions_hand);
    tcase_add_test(tc, test_auto_range_rounds_out);
    tcase_add_test(tc, test_refuses_nonfinite);
    tcase_add_test(tc, test_bars_hand);
    suite_add_tcase(s, tc);
    sr = srunner_create(s);
    srunner_run_all(sr, CK_NORMAL);
    nf = srunner_ntests_failed(sr);
    srunner_free(sr);
    return nf == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
