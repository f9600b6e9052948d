/*
 * Tests of the survey-area loader (area.c).
 *
 * Check values: plane geometry worked by hand in the comments (corners of a
 * rotated rectangle, shoelace areas, linear and bilinear depths).
 */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/area.h"

#define PI 3.14159265358979323846

static const char *SURVEY = "survey:\n"
                            "  overlap: 10 %\n"
                            "  speed: 6 kn\n"
                            "  turn_time: 5 min\n"
                            "  working_day: 10 h\n";

static int load(const char *body, struct sb_area *a, struct sb_error *err)
{
    char text[4096];

    snprintf(text, sizeof text, "%s%s", body, SURVEY);
    sb_error_clear(err);
    return sb_area_load_string("t.yaml", text, strlen(text), a, err);
}

static int load_raw(const char *text, struct sb_area *a, struct sb_error *err)
{
    sb_error_clear(err);
    return sb_area_load_string("t.yaml", text, strlen(text), a, err);
}

START_TEST(test_rectangle_constant)
{
    struct sb_area *a = sb_area_alloc();
    struct sb_error err;
    double lo, hi;

    ck_assert_int_eq(load("name: r\norder: 1a\n"
                          "outline:\n"
                          "  rectangle: {centre: [500 m, 100 m], length: "
                          "1000 m, width: 200 m, azimuth: 90 deg}\n"
                          "depth: 25 m\n",
                          a, &err),
                     SB_OK);
    ck_assert_str_eq(a->order, "1a");
    ck_assert_int_eq(a->order_line, 2);
    ck_assert_int_eq(a->order_col, 8);
    ck_assert_int_eq(a->n_vertices, 4);
    /* Hand: azimuth 90 deg puts the length along east: corners at
     * E = 500 -/+ 500, N = 100 -/+ 100. */
    for (int k = 0; k < 4; k++) {
        double e = a->vertex_e[k], n = a->vertex_n[k];
        ck_assert(fabs(e) < 1e-9 || fabs(e - 1000) < 1e-9);
        ck_assert(fabs(n) < 1e-9 || fabs(n - 200) < 1e-9);
    }
    /* Hand: 1000 m x 200 m = 200000 m^2 */
    ck_assert_double_eq_tol(sb_area_size(a), 200000.0, 1e-6);
    ck_assert_double_eq(sb_area_depth_at(a, 3.0, 4.0), 25.0);
    sb_area_depth_range(a, &lo, &hi);
    ck_assert_double_eq(lo, 25.0);
    ck_assert_double_eq(hi, 25.0);
    /* Hand: 6 kn = 6 x 1852 / 3600 = 3.086667 m/s; 5 min = 300 s;
     * 10 h = 36000 s; 10 % = 0.1 */
    ck_assert_double_eq_tol(a->speed_mps, 3.0866667, 1e-6);
    ck_assert_double_eq(a->min_speed_mps, a->speed_mps);
    ck_assert_int_eq(a->min_speed_given, 0);
    ck_assert_double_eq_tol(a->turn_s, 300.0, 1e-12);
    ck_assert_double_eq_tol(a->day_s, 36000.0, 1e-12);
    ck_assert_double_eq_tol(a->overlap, 0.1, 1e-15);
    sb_area_free(a);
}
END_TEST

START_TEST(test_polygon_and_slope)
{
    struct sb_area *a = sb_area_alloc();
    struct sb_error err;
    double lo, hi;

    ck_assert_int_eq(load("name: p\norder: special\n"
                          "outline:\n"
                          "  polygon:\n"
                          "    - [0 m, 0 m]\n"
                          "    - [1 km, 0 m]\n"
                          "    - [0 m, 500 m]\n"
                          "    - [0 m, 0 m]\n" /* closing corner allowed */
                          "depth:\n"
                          "  slope:\n"
                          "    from: {at: [0 m, 0 m], depth: 10 m}\n"
                          "    to: {at: [1000 m, 0 m], depth: 30 m}\n",
                          a, &err),
                     SB_EINPUT);
    /* "km" is not a unit of units.c: the message names the place */
    ck_assert_int_eq(err.line, 6);
    ck_assert(strstr(err.msg, "outline.polygon[2] (east)") != NULL);

    ck_assert_int_eq(load("name: p\norder: special\n"
                          "outline:\n"
                          "  polygon:\n"
                          "    - [0 m, 0 m]\n"
                          "    - [1000 m, 0 m]\n"
                          "    - [0 m, 500 m]\n"
                          "    - [0 m, 0 m]\n"
                          "depth:\n"
                          "  slope:\n"
                          "    from: {at: [0 m, 0 m], depth: 10 m}\n"
                          "    to: {at: [1000 m, 0 m], depth: 30 m}\n",
                          a, &err),
                     SB_OK);
    ck_assert_int_eq(a->n_vertices, 3);
    /* Hand: right triangle 1000 x 500 / 2 = 250000 m^2 */
    ck_assert_double_eq_tol(sb_area_size(a), 250000.0, 1e-6);
    /* Hand: depth = 10 + 20 E / 1000 whatever N: (500, 123) -> 20 m */
    ck_assert_double_eq_tol(sb_area_depth_at(a, 500.0, 123.0), 20.0, 1e-12);
    sb_area_depth_range(a, &lo, &hi);
    ck_assert_double_eq_tol(lo, 10.0, 1e-12);
    ck_assert_double_eq_tol(hi, 30.0, 1e-12);
    sb_area_free(a);
}
END_TEST

START_TEST(test_grid_bilinear)
{
    struct sb_area *a = sb_area_alloc();
    struct sb_error err;

    ck_assert_int_eq(load("name: g\norder: 1a\n"
                          "outline:\n"
                          "  polygon: [[10 m, 10 m], [90 m, 10 m], "
                          "[90 m, 90 m], [10 m, 90 m]]\n"
                          "depth:\n"
                          "  grid:\n"
                          "    north_west: [0 m, 100 m]\n"
                          "    spacing: 100 m\n"
                          "    unit: m\n"
                          "    rows:\n"
                          "      - [10, 20]\n"
                          "      - [30, 40]\n",
                          a, &err),
                     SB_OK);
    /* Hand: nodes NW 10, NE 20, SW 30, SE 40 are the plane
     * d = 10 + 10 x + 20 y (x = E / 100 eastward, y = (100 - N) / 100
     * southward), which bilinear interpolation reproduces exactly:
     * (25, 75) -> 10 + 2.5 + 5 = 17.5; (50, 50) -> 25. */
    ck_assert_double_eq_tol(sb_area_depth_at(a, 25.0, 75.0), 17.5, 1e-12);
    ck_assert_double_eq_tol(sb_area_depth_at(a, 50.0, 50.0), 25.0, 1e-12);
    ck_assert_double_eq_tol(sb_area_depth_at(a, 100.0, 0.0), 40.0, 1e-12);
    sb_area_free(a);
}
END_TEST

START_TEST(test_survey_options)
{
    struct sb_area *a = sb_area_alloc();
    struct sb_error err;

    ck_assert_int_eq(load_raw("name: r\norder: 1a\n"
                              "outline:\n"
                              "  rectangle: {length: 100 m, width: 50 m, "
                              "azimuth: 0 deg}\n"
                              "depth: 25 m\n"
                              "survey:\n"
                              "  overlap: 0 %\n"
                              "  speed: 4 m/s\n"
                              "  min_speed: 2 kn\n"
                              "  turn_time: 90 s\n"
                              "  working_day: 600 min\n"
                              "  line_azimuth: 200 deg\n",
                              a, &err),
                     SB_OK);
    ck_assert_int_eq(a->min_speed_given, 1);
    /* Hand: 2 kn = 3704 / 3600 = 1.028889 m/s; 600 min = 36000 s;
     * 200 deg is the same line as 20 deg */
    ck_assert_double_eq_tol(a->min_speed_mps, 1.0288889, 1e-6);
    ck_assert_double_eq_tol(a->day_s, 36000.0, 1e-9);
    ck_assert_int_eq(a->azimuth_given, 1);
    ck_assert_double_eq_tol(a->line_azimuth_rad, 20.0 * PI / 180.0, 1e-12);
    sb_area_free(a);
}
END_TEST

struct bad_case {
    const char *text; /* the whole file */
    int line, col;    /* where the error must be reported */
    const char *words;/* a piece of the message */
};

#define OUT_R "outline:\n  rectangle: {length: 100 m, width: 50 m, " \
              "azimuth: 0 deg}\n"
#define SURV "survey:\n  overlap: 10 %\n  speed: 6 kn\n  turn_time: 5 min\n" \
             "  working_day: 10 h\n"

static const struct bad_case bad[] = {
    /* unknown key at its own position */
    {"name: r\norder: 1a\n" OUT_R "depth: 25 m\n" SURV "colour: red\n", 11, 1,
     "unknown key 'colour'"},
    /* missing order: reported at the root mapping */
    {"name: r\n" OUT_R "depth: 25 m\n" SURV, 1, 1, "'order'"},
    /* a speed in metres */
    {"name: r\norder: 1a\n" OUT_R "depth: 25 m\nsurvey:\n  overlap: 10 %\n"
     "  speed: 6 m\n  turn_time: 5 min\n  working_day: 10 h\n",
     8, 10, "survey.speed"},
    /* negative depth */
    {"name: r\norder: 1a\n" OUT_R "depth: -5 m\n" SURV, 5, 8, "depth"},
    /* bow tie */
    {"name: r\norder: 1a\noutline:\n  polygon: [[0 m, 0 m], [10 m, 10 m], "
     "[10 m, 0 m], [0 m, 10 m]]\ndepth: 25 m\n" SURV,
     4, 0, "crosses"},
    /* overlap too large */
    {"name: r\norder: 1a\n" OUT_R "depth: 25 m\nsurvey:\n  overlap: 95 %\n"
     "  speed: 6 kn\n  turn_time: 5 min\n  working_day: 10 h\n",
     7, 12, "survey.overlap"},
    /* a time in the wrong unit */
    {"name: r\norder: 1a\n" OUT_R "depth: 25 m\nsurvey:\n  overlap: 10 %\n"
     "  speed: 6 kn\n  turn_time: 5 days\n  working_day: 10 h\n",
     9, 14, "survey.turn_time"},
    /* both shapes */
    {"name: r\norder: 1a\noutline:\n  polygon: [[0 m, 0 m], [1 m, 0 m], "
     "[0 m, 1 m]]\n  rectangle: {length: 1 m, width: 1 m, azimuth: 0 deg}\n"
     "depth: 25 m\n" SURV,
     4, 3, "exactly one"},
    /* a grid that misses a corner of the outline */
    {"name: r\norder: 1a\n" OUT_R "depth:\n  grid:\n    north_west: [0 m, "
     "10 m]\n    spacing: 10 m\n    unit: m\n    rows: [[1, 2], [3, 4]]\n"
     SURV,
     7, 5, "outside the grid"},
    /* ragged grid */
    {"name: r\norder: 1a\n" OUT_R "depth:\n  grid:\n    north_west: [-100 m, "
     "100 m]\n    spacing: 100 m\n    unit: m\n    rows:\n      - [1, 2]\n"
     "      - [3]\n" SURV,
     12, 9, "expected 2"},
    /* a slope that reaches the surface inside the area */
    {"name: r\norder: 1a\n" OUT_R "depth:\n  slope:\n    from: {at: [0 m, 0 m],"
     " depth: 10 m}\n    to: {at: [0 m, 10 m], depth: 5 m}\n" SURV,
     7, 5, "corner"},
};

START_TEST(test_bad_files)
{
    struct sb_area *a = sb_area_alloc();
    struct sb_error err;

    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        int rc = load_raw(bad[i].text, a, &err);

        if (rc != SB_EINPUT || err.line != bad[i].line ||
            (bad[i].col && err.col != bad[i].col) ||
            !strstr(err.msg, bad[i].words))
            ck_abort_msg("case %zu: rc %d at %d:%d '%s'", i, rc, err.line,
                         err.col, err.msg);
        ck_assert_str_eq(err.file, "t.yaml");
        ck_assert(strchr(err.msg, '\n') == NULL);
    }
    sb_area_free(a);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("area");
    TCase *tc = tcase_create("core");
    SRunner *sr;
    int nf;

    tcase_add_test(tc, test_rectangle_constant);
    tcase_add_test(tc, test_polygon_and_slope);
    tcase_add_test(tc, test_grid_bilinear);
    tcase_add_test(tc, test_survey_options);
    tcase_add_test(tc, test_bad_files);
    suite_add_tcase(s, tc);
    sr = srunner_create(s);
    srunner_run_all(sr, CK_NORMAL);
    nf = srunner_ntests_failed(sr);
    srunner_free(sr);
    return nf == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
