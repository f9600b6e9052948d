/*
 * Tests of the line layout and effort (effort.c).
 *
 * Every check value is worked by hand in the comment beside it from the
 * layout rules of include/swathbudget/effort.h (plane geometry and the
 * recurrences v1 - h(v1) = v_min, v[k+1] - v[k] = (1 - overlap)(h[k] +
 * h[k+1])), never taken from the program's output.
 */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/area.h"
#include "swathbudget/effort.h"

#define PI 3.14159265358979323846

/* half-width = factor x depth (a fixed usable angle: factor = tan) */
static int hw_factor(void *ctx, double depth_m, double *hw, struct sb_error *err)
{
    (void)err;
    *hw = *(const double *)ctx * depth_m;
    return SB_OK;
}

/* a constant half-width */
static int hw_const(void *ctx, double depth_m, double *hw, struct sb_error *err)
{
    (void)err;
    (void)depth_m;
    *hw = *(const double *)ctx;
    return SB_OK;
}

static struct sb_area *load(const char *text)
{
    struct sb_area *a = sb_area_alloc();
    struct sb_error err;

    sb_error_clear(&err);
    if (sb_area_load_string("t.yaml", text, strlen(text), a, &err) != SB_OK)
        ck_abort_msg("load: %s:%d:%d: %s", err.file, err.line, err.col,
                     err.msg);
    return a;
}

START_TEST(test_rectangle_constant_depth)
{
    struct sb_area *a = load("name: r\norder: 1a\n"
                             "outline:\n  rectangle: {centre: [2000 m, 300 m],"
                             " length: 4000 m, width: 600 m, azimuth: 90 deg}\n"
                             "depth: 20 m\n"
                             "survey:\n  overlap: 10 %\n  speed: 3 m/s\n"
                             "  turn_time: 5 min\n  working_day: 10 h\n");
    double f = tan(60.0 * PI / 180.0);
    struct sb_effort e;
    struct sb_error err;

    ck_assert_int_eq(sb_effort_plan(a, a->speed_mps, hw_factor, &f, &e, &err),
                     SB_OK);
    ck_assert_int_eq(e.feasible, 1);
    /* Hand: lines along the long side, azimuth 90 deg; 600 m across. */
    ck_assert_double_eq_tol(e.azimuth_rad, PI / 2, 1e-12);
    ck_assert_double_eq_tol(e.across_m, 600.0, 1e-9);
    /* Hand: h = 20 tan 60 = 34.641 m; line 1 at 34.641 m; spacing
     * 0.9 x 2 x 34.641 = 62.354 m; line k at 34.641 + 62.354 (k - 1); the
     * last is the first with v + h >= 600: (600 - 69.282) / 62.354 = 8.51,
     * so k - 1 = 9: 10 lines. */
    ck_assert_uint_eq(e.n_lines, 10);
    ck_assert_double_eq_tol(e.lines[0].offset_m, 34.641016, 1e-5);
    ck_assert_double_eq_tol(e.spacing_min_m, 62.353829, 1e-5);
    ck_assert_double_eq_tol(e.spacing_max_m, 62.353829, 1e-5);
    /* Hand: 10 x 4000 m = 40 km; 40000 / 3 = 13333.33 s on line; 9 turns
     * x 300 s = 2700 s; 16033.33 s in all = 4.4537 h; / 10 h = 0.44537 days */
    ck_assert_double_eq_tol(e.line_m, 40000.0, 1e-6);
    ck_assert_double_eq_tol(e.time_lines_s, 13333.3333, 1e-3);
    ck_assert_double_eq_tol(e.time_turns_s, 2700.0, 1e-9);
    ck_assert_double_eq_tol(e.time_s, 16033.3333, 1e-3);
    ck_assert_double_eq_tol(e.days, 0.445370, 1e-6);
    sb_effort_release(&e);
    sb_area_free(a);
}
END_TEST

START_TEST(test_slope_across_lines)
{
    /* Lines east-west over N in [0, 200], depth 10 + 0.1 N (from the
     * slope points), h = depth (45 deg), overlap 20 %. */
    struct sb_area *a = load("name: s\norder: 1a\n"
                             "outline:\n  rectangle: {centre: [500 m, 100 m],"
                             " length: 1000 m, width: 200 m, azimuth: 90 deg}\n"
                             "depth:\n  slope:\n"
                             "    from: {at: [0 m, 0 m], depth: 10 m}\n"
                             "    to: {at: [0 m, 200 m], depth: 30 m}\n"
                             "survey:\n  overlap: 20 %\n  speed: 2 m/s\n"
                             "  turn_time: 2 min\n  working_day: 8 h\n");
    double f = 1.0;
    struct sb_effort e;
    struct sb_error err;
    /* Hand: with w = u turned clockwise, v = -N, v_min = -200 (the north
     * edge, deep side first), h(v) = 10 - 0.1 v.
     *   line 1: v - (10 - 0.1 v) = -200 -> v1 = -190 / 1.1 = -172.7273
     *   next:   v' = (v + 0.8 h + 8) / 1.08 (from v' - v = 0.8 (h + h'))
     *   -> -132.3232, -97.9050, -68.5857, -43.6101, -22.3345, -4.2109;
     *   line 6 edge: -22.3345 + 12.2335 = -10.10 < 0, line 7 edge:
     *   -4.2109 + 10.4211 = 6.21 >= 0: 7 lines of 1000 m. */
    static const double north[] = {172.7273, 132.3232, 97.9050, 68.5857,
                                   43.6101,  22.3345,  4.2109};

    ck_assert_int_eq(sb_effort_plan(a, a->speed_mps, hw_factor, &f, &e, &err),
                     SB_OK);
    ck_assert_uint_eq(e.n_lines, 7);
    for (size_t i = 0; i < 7; i++) {
        /* offset is v - v_min = 200 - N */
        ck_assert_double_eq_tol(e.lines[i].offset_m, 200.0 - north[i], 1e-3);
        ck_assert_double_eq_tol(e.lines[i].half_width_m,
                                10.0 + 0.1 * north[i], 1e-3);
        ck_assert_double_eq_tol(e.lines[i].length_m, 1000.0, 1e-6);
    }
    /* Hand: spacings 40.4041 (first) ... 18.1236 (last) */
    ck_assert_double_eq_tol(e.spacing_max_m, 40.4041, 1e-3);
    ck_assert_double_eq_tol(e.spacing_min_m, 18.1236, 1e-3);
    /* Hand: 7000 m / 2 m/s = 3500 s, 6 turns x 120 s = 720 s, 4220 s;
     * / 28800 s = 0.146528 days */
    ck_assert_double_eq_tol(e.time_s, 4220.0, 1e-6);
    ck_assert_double_eq_tol(e.days, 0.1465278, 1e-6);
    sb_effort_release(&e);
    sb_area_free(a);
}
END_TEST

START_TEST(test_triangle_axis_and_chords)
{
    /* Right triangle (0,0), (1000,0), (0,500). */
    struct sb_area *a = load("name: t\norder: 1a\n"
                             "outline:\n  polygon: [[0 m, 0 m], [1000 m, 0 m],"
                             " [0 m, 500 m]]\n"
                             "depth: 50 m\n"
                             "survey:\n  overlap: 0 %\n  speed: 2 m/s\n"
                             "  turn_time: 0 s\n  working_day: 10 h\n");
    /* Hand: widths across the three edges: 500 (E edge), 1000 (N edge), and
     * across the hypotenuse the height H = 1000 x 500 / sqrt(1000^2 + 500^2)
     * = 447.2136 m, the smallest: lines parallel to the hypotenuse, whose
     * direction (1000, -500) has azimuth atan2(1000, -500) = 116.5651 deg.
     * Take h = H / 7.5 = 59.6285 m: lines at h, 3h, 5h, 7h from the
     * hypotenuse (v_min side; 7h + h = 8h > H, 5h + h = 6h < H); a chord at
     * distance s is L (1 - s / H) long, L = 1118.0340 m: in all
     * L (4 - 16 / 7.5) = 2086.9968 m. */
    double H = 1000.0 * 500.0 / sqrt(1000.0 * 1000.0 + 500.0 * 500.0);
    double h = H / 7.5;
    struct sb_effort e;
    struct sb_error err;

    ck_assert_double_eq_tol(H, 447.2136, 1e-4);
    ck_assert_int_eq(sb_effort_plan(a, 2.0, hw_const, &h, &e, &err), SB_OK);
    ck_assert_double_eq_tol(e.azimuth_rad * 180.0 / PI, 116.5651, 1e-4);
    ck_assert_double_eq_tol(e.across_m, 447.2136, 1e-4);
    ck_assert_uint_eq(e.n_lines, 4);
    ck_assert_double_eq_tol(e.line_m, 2086.9968, 1e-3);
    ck_assert_double_eq_tol(e.lines[0].length_m, 1118.0340 * (1 - 1 / 7.5),
                            1e-3);
    /* Hand: no turns (0 s): 2086.9968 / 2 = 1043.4984 s */
    ck_assert_double_eq_tol(e.time_s, 1043.4984, 1e-3);
    sb_effort_release(&e);
    sb_area_free(a);
}
END_TEST

START_TEST(test_bay_pieces_added)
{
    /* A U shape 300 x 100 with a notch E 100..200, N 50..100 from the top.
     * Hull: the 300 x 100 rectangle, narrowest across N: lines east-west.
     * Hand: h = 13: lines at N = 87, 61, 35, 9 (9 - 13 < 0: last); the two
     * upper ones cross the notch: 2 x 100 m each, the lower 300 m each:
     * 200 + 200 + 300 + 300 = 1000 m. */
    struct sb_area *a = load("name: u\norder: 1a\n"
                             "outline:\n  polygon: [[0 m, 0 m], [300 m, 0 m],"
                             " [300 m, 100 m], [200 m, 100 m], [200 m, 50 m],"
                             " [100 m, 50 m], [100 m, 100 m], [0 m, 100 m]]\n"
                             "depth: 20 m\n"
                             "survey:\n  overlap: 0 %\n  speed: 2 m/s\n"
                             "  turn_time: 1 min\n  working_day: 10 h\n");
    double h = 13.0;
    struct sb_effort e;
    struct sb_error err;

    ck_assert_int_eq(sb_effort_plan(a, 2.0, hw_const, &h, &e, &err), SB_OK);
    ck_assert_double_eq_tol(e.azimuth_rad, PI / 2, 1e-12);
    ck_assert_uint_eq(e.n_lines, 4);
    ck_assert_double_eq_tol(e.lines[0].length_m, 200.0, 1e-6);
    ck_assert_double_eq_tol(e.lines[1].length_m, 200.0, 1e-6);
    ck_assert_double_eq_tol(e.lines[2].length_m, 300.0, 1e-6);
    ck_assert_double_eq_tol(e.line_m, 1000.0, 1e-6);
    sb_effort_release(&e);
    sb_area_free(a);
}
END_TEST

START_TEST(test_fixed_azimuth_and_infeasible)
{
    struct sb_area *a = load("name: r\norder: 1a\n"
                             "outline:\n  rectangle: {centre: [0 m, 0 m],"
                             " length: 1000 m, width: 200 m, azimuth: 0 deg}\n"
                             "depth: 20 m\n"
                             "survey:\n  overlap: 0 %\n  speed: 2 m/s\n"
                             "  turn_time: 1 min\n  working_day: 10 h\n"
                             "  line_azimuth: 90 deg\n");
    double h = 50.0, zero = 0.0;
    struct sb_effort e;
    struct sb_error err;

    /* Hand: lines forced east-west across a 200 m x 1000 m (E x N) box:
     * 1000 m across, h = 50: lines at 50, 150, ..., 950: 10 lines of 200 m
     * = 2000 m. */
    ck_assert_int_eq(sb_effort_plan(a, 2.0, hw_const, &h, &e, &err), SB_OK);
    ck_assert_uint_eq(e.n_lines, 10);
    ck_assert_double_eq_tol(e.line_m, 2000.0, 1e-6);
    sb_effort_release(&e);
    /* no usable swath: no plan, not a crash or an endless loop */
    ck_assert_int_eq(sb_effort_plan(a, 2.0, hw_const, &zero, &e, &err), SB_OK);
    ck_assert_int_eq(e.feasible, 0);
    ck_assert_double_eq_tol(e.infeasible_depth_m, 20.0, 1e-12);
    ck_assert_uint_eq(e.n_lines, 0);
    sb_effort_release(&e);
    /* bad speed */
    ck_assert_int_eq(sb_effort_plan(a, 0.0, hw_const, &h, &e, &err),
                     SB_EINPUT);
    sb_area_free(a);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("effort");
    TCase *tc = tcase_create("core");
    SRunner *sr;
    int nf;

    tcase_add_test(tc, test_rectangle_constant_depth);
    tcase_add_test(tc, test_slope_across_lines);
    tcase_add_test(tc, test_triangle_axis_and_chords);
    tcase_add_test(tc, test_bay_pieces_added);
    tcase_add_test(tc, test_fixed_azimuth_and_infeasible);
    suite_add_tcase(s, tc);
    sr = srunner_create(s);
    srunner_run_all(sr, CK_NORMAL);
    nf = srunner_ntests_failed(sr);
    srunner_free(sr);
    return nf == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
