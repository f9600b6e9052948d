/*
 * Tests of the sounding-density module (density.c).
 *
 * Check values are either worked by hand in the comments (plane geometry of
 * beams on a flat seafloor) or computed here by an independent method: the
 * across-track spacing as the plain difference of tan() at the two
 * neighbouring beams (the module uses the sin/cos identity), and the limit
 * angle found by bisection on that difference (the module uses a closed
 * form).
 */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/density.h"
#include "swathbudget/spec.h"
#include "swathbudget/system.h"

#define PI 3.14159265358979323846
#define DEG (PI / 180.0)

/* 256 beams over +/-60 deg, equiangular, 1 deg x 1 deg flat array,
 * 10 ms overhead, 1500 m/s, N = 3. */
static struct sb_density_params base(void)
{
    struct sb_density_params p;

    p.n_beams = 256;
    p.spacing = SB_SPACING_EQUIANGULAR;
    p.sector_rad = 60.0 * DEG;
    p.beam_across_rad = 1.0 * DEG;
    p.beam_along_rad = 1.0 * DEG;
    p.flat_array = 1;
    p.ping_overhead_s = 0.010;
    p.sound_speed_mps = 1500.0;
    p.min_soundings = SB_DENSITY_N_DEFAULT;
    return p;
}

/* independent: neighbours at theta -/+ dtheta/2, difference of tan */
static double dy_tan(const struct sb_density_params *p, double d, double th)
{
    double h = p->sector_rad / (double)(p->n_beams - 1);

    return d * (tan(th + h) - tan(th - h));
}

START_TEST(test_nadir_spacing_hand)
{
    struct sb_density_params p = base();
    /* Hand: dtheta = 120/255 deg = 0.470588 deg; at nadir the neighbours
     * sit at +/-0.235294 deg, so dy = 2 d tan(0.235294 deg)
     * = 100 m x 0.00410668 = 0.410668 m at d = 50 m. */
    double dy = sb_density_across_spacing(&p, 50.0, 0.0);

    ck_assert_double_eq_tol(dy, 0.410668, 1e-6);
}
END_TEST

START_TEST(test_spacing_matches_tan_difference)
{
    struct sb_density_params p = base();

    for (double th = 0.0; th <= 59.0; th += 3.7) {
        double a = sb_density_across_spacing(&p, 37.0, th * DEG);
        double b = dy_tan(&p, 37.0, th * DEG);

        ck_assert_double_eq_tol(a, b, 1e-12 * b + 1e-15);
        /* symmetric port/starboard */
        ck_assert_double_eq_tol(
            sb_density_across_spacing(&p, 37.0, -th * DEG), a, 1e-13);
    }
}
END_TEST

START_TEST(test_equidistant_constant)
{
    struct sb_density_params p = base();

    p.n_beams = 101;
    p.spacing = SB_SPACING_EQUIDISTANT;
    /* Hand: the swath 2 d tan 60 deg = 2 x 20 x 1.7320508 = 69.28203 m over
     * 100 gaps: 0.6928203 m at every angle. */
    ck_assert_double_eq_tol(sb_density_across_spacing(&p, 20.0, 0.0),
                            0.6928203, 1e-7);
    ck_assert_double_eq_tol(sb_density_across_spacing(&p, 20.0, 55 * DEG),
                            0.6928203, 1e-7);
}
END_TEST

START_TEST(test_ping_period_hand)
{
    struct sb_density_params p = base();
    /* Hand: R_out = 50 / cos 60 = 100 m; 2 R / c = 200 / 1500 = 0.133333 s;
     * plus 0.010 s overhead = 0.143333 s. */
    ck_assert_double_eq_tol(sb_density_ping_period(&p, 50.0), 0.1433333333,
                            1e-9);
}
END_TEST

START_TEST(test_footprint_hand)
{
    struct sb_density_params p = base();
    struct sb_density_point pt;

    /* Hand, d = 10 m, theta = 45 deg, 1 deg beams:
     * flat: across = d b / cos^3 = 10 x 0.0174533 / 0.3535534 = 0.493654 m;
     * along = d b / cos = 10 x 0.0174533 / 0.7071068 = 0.246826 m. */
    ck_assert_int_eq(sb_density_at(&p, 10.0, 2.0, 45 * DEG, &pt, NULL), SB_OK);
    ck_assert_double_eq_tol(pt.footprint_across_m, 0.493654, 1e-6);
    ck_assert_double_eq_tol(pt.footprint_along_m, 0.246826, 1e-6);
    /* curved: across = d b / cos^2 = 0.174533 / 0.5 = 0.349066 m */
    p.flat_array = 0;
    ck_assert_int_eq(sb_density_at(&p, 10.0, 2.0, 45 * DEG, &pt, NULL), SB_OK);
    ck_assert_double_eq_tol(pt.footprint_across_m, 0.349066, 1e-6);
    /* along-track spacing v T, T from the outermost beam (60 deg):
     * 2 x 10 / cos 60 / 1500 + 0.01 = 0.0366667 s;
     * dx = 2 m/s x 0.0366667 s = 0.0733333 m */
    ck_assert_double_eq_tol(pt.along_spacing_m, 0.0733333, 1e-7);
}
END_TEST

START_TEST(test_limit_angle_hand_and_bisection)
{
    struct sb_density_params p = base();
    struct sb_density_limit L;
    double lo = 0.0, hi = p.sector_rad, dx, dymax;

    /* Hand: d = 50 m, v = 2 m/s: dx = 2 x 0.143333 = 0.286667 m; a 1 m cube
     * needs dy <= 1 / (3 x 0.286667) = 1.162791 m.  First order,
     * dy ~ d dtheta / cos^2: cos^2 = 50 x 0.0082133 / 1.162791 = 0.353170,
     * theta ~ 53.54 deg. */
    ck_assert_int_eq(sb_density_limit(&p, 50.0, 2.0, 1.0, &L, NULL), SB_OK);
    ck_assert_int_eq(L.verdict, SB_DENSITY_LIMITED);
    ck_assert_double_eq_tol(L.along_spacing_m, 0.2866667, 1e-7);
    ck_assert_double_eq_tol(L.angle_rad / DEG, 53.54, 0.05);
    /* independent: bisection on the tan difference */
    dx = 2.0 * sb_density_ping_period(&p, 50.0);
    dymax = 1.0 / (3.0 * dx);
    for (int i = 0; i < 200; i++) {
        double m = 0.5 * (lo + hi);
        if (dy_tan(&p, 50.0, m) <= dymax)
            lo = m;
        else
            hi = m;
    }
    ck_assert_double_eq_tol(L.angle_rad, lo, 1e-9);
}
END_TEST

START_TEST(test_limit_verdicts)
{
    struct sb_density_params p = base();
    struct sb_density_limit L;

    /* 20 m/s: dx = 2.8667 m, dy must be <= 0.1163 m but is 0.4107 m at
     * nadir: fails at nadir */
    ck_assert_int_eq(sb_density_limit(&p, 50.0, 20.0, 1.0, &L, NULL), SB_OK);
    ck_assert_int_eq(L.verdict, SB_DENSITY_NADIR);
    ck_assert_double_eq(L.angle_rad, 0.0);
    /* 0.2 m/s: dy may be 11.6 m; at 60 deg it is 1.643 m: whole sector */
    ck_assert_int_eq(sb_density_limit(&p, 50.0, 0.2, 1.0, &L, NULL), SB_OK);
    ck_assert_int_eq(L.verdict, SB_DENSITY_SECTOR);
    ck_assert_double_eq_tol(L.angle_rad, p.sector_rad, 1e-15);
    /* standing still: infinitely dense along track */
    ck_assert_int_eq(sb_density_limit(&p, 50.0, 0.0, 1.0, &L, NULL), SB_OK);
    ck_assert_int_eq(L.verdict, SB_DENSITY_SECTOR);
    /* equidistant: all or nothing */
    p.spacing = SB_SPACING_EQUIDISTANT;
    ck_assert_int_eq(sb_density_limit(&p, 50.0, 2.0, 1.0, &L, NULL), SB_OK);
    ck_assert_int_ne(L.verdict, SB_DENSITY_LIMITED);
}
END_TEST

START_TEST(test_max_speed_hand)
{
    struct sb_density_params p = base();
    double v, ang;
    struct sb_density_limit L;

    /* Hand: v = s^2 / (N dy T) = 1 / (3 x 0.410668 x 0.143333) = 5.66292 m/s
     * at nadir, d = 50 m, 1 m cube. */
    ck_assert_int_eq(sb_density_max_speed(&p, 50.0, 1.0, 0.0, &v, NULL), SB_OK);
    ck_assert_double_eq_tol(v, 5.66292, 1e-5);
    /* consistency: at the max speed for 40 deg the limit angle is 40 deg */
    ang = 40.0 * DEG;
    ck_assert_int_eq(sb_density_max_speed(&p, 50.0, 1.0, ang, &v, NULL), SB_OK);
    ck_assert_int_eq(sb_density_limit(&p, 50.0, v, 1.0, &L, NULL), SB_OK);
    ck_assert_double_eq_tol(L.angle_rad, ang, 1e-9);
}
END_TEST

START_TEST(test_bad_inputs)
{
    struct sb_density_params p = base();
    struct sb_density_point pt;
    struct sb_density_limit L;
    struct sb_error err;

    ck_assert_int_eq(sb_density_at(&p, -1.0, 1.0, 0.0, &pt, &err), SB_EINPUT);
    ck_assert_int_eq(sb_density_at(&p, 10.0, 1.0, 61 * DEG, &pt, &err),
                     SB_EINPUT);
    ck_assert_int_eq(sb_density_at(&p, 10.0, NAN, 0.0, &pt, &err), SB_EINPUT);
    ck_assert_int_eq(sb_density_limit(&p, 10.0, 1.0, 0.0, &L, &err),
                     SB_EINPUT);
    p.n_beams = 1;
    ck_assert_int_eq(sb_density_check(&p, &err), SB_EINPUT);
    p = base();
    p.min_soundings = 0.0;
    ck_assert_int_eq(sb_density_check(&p, &err), SB_EINPUT);
    p = base();
    p.ping_overhead_s = -0.1;
    ck_assert_int_eq(sb_density_check(&p, &err), SB_EINPUT);
    p = base();
    p.sector_rad = 90 * DEG;
    ck_assert_int_eq(sb_density_check(&p, &err), SB_EINPUT);
}
END_TEST

/* A minimal system file; ECHO_EXTRA is spliced into the echosounder. */
static int load_sys(const char *extra, struct sb_system *sys,
                    struct sb_error *err)
{
    char text[4096];

    snprintf(text, sizeof text,
             "name: t\n"
             "lever_arms:\n"
             "  antenna: {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m}\n"
             "  transducer: {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m}\n"
             "  motion_sensor: {x: 0 m, y: 0 m, z: 0 m, uncertainty: 0 m}\n"
             "positioning: {horizontal: 0 m, vertical: 0 m}\n"
             "motion:\n  roll: 0 deg\n  pitch: 0 deg\n  heading: 0 deg\n"
             "  heave: 0 m\n"
             "  alignment: {roll: 0 deg, pitch: 0 deg, heading: 0 deg}\n"
             "sound_speed:\n"
             "  transducer: {nominal: 1500 m/s, uncertainty: 0 m/s}\n"
             "  water_column: {model: constant, nominal: 1480 m/s, "
             "uncertainty: 0 m/s}\n"
             "echosounder:\n  frequency: 300 kHz\n"
             "  beam_width_across: 1 deg\n  beam_width_along: 2 deg\n"
             "  array: curved\n  range_resolution: 0 m\n  pointing: 0 %%\n"
             "  max_beam_angle: 65 deg\n%s"
             "vertical_reference:\n  method: tide_gauge\n"
             "  draft: {nominal: 0 m, uncertainty: 0 m}\n"
             "  water_level: 0 m\n  zoning: 0 m\n"
             "conditions: {speed: 2 m/s, roll_amplitude: 0 deg, "
             "roll_period: 8 s, pitch_amplitude: 0 deg, pitch_period: 6 s, "
             "heave_amplitude: 0 m}\n",
             extra);
    sb_error_clear(err);
    return sb_spec_load_string("s.yaml", text, strlen(text), sys, err);
}

START_TEST(test_from_system_file)
{
    struct sb_system *sys = sb_system_alloc();
    struct sb_density_params p;
    struct sb_error err;

    /* not stated: no density parameters */
    ck_assert_int_eq(load_sys("", sys, &err), SB_OK);
    ck_assert_int_eq(sb_density_params_from_system(sys, &p), 0);
    ck_assert_int_eq(load_sys("  beams: 400\n  beam_spacing: equidistant\n"
                              "  ping_overhead: 20 ms\n"
                              "  feature_soundings: 5\n",
                              sys, &err),
                     SB_OK);
    ck_assert_int_eq(sb_density_params_from_system(sys, &p), 1);
    ck_assert_int_eq(p.n_beams, 400);
    ck_assert_int_eq(p.spacing, SB_SPACING_EQUIDISTANT);
    ck_assert_double_eq_tol(p.ping_overhead_s, 0.020, 1e-15);
    ck_assert_double_eq(p.min_soundings, 5.0);
    ck_assert_double_eq_tol(p.sector_rad, 65 * DEG, 1e-12);
    ck_assert_double_eq_tol(p.beam_along_rad, 2 * DEG, 1e-12);
    ck_assert_double_eq(p.sound_speed_mps, 1480.0);
    ck_assert_int_eq(p.flat_array, 0);
    /* defaults with beams: overhead 0 s, N = 3 */
    ck_assert_int_eq(load_sys("  beams: 256\n  beam_spacing: equiangular\n",
                              sys, &err),
                     SB_OK);
    ck_assert_int_eq(sb_density_params_from_system(sys, &p), 1);
    ck_assert_double_eq(p.ping_overhead_s, 0.0);
    ck_assert_double_eq(p.min_soundings, 3.0);
    /* errors at their place (the extra lines start at line 24): spacing
     * missing, one beam, overhead alone, an unknown spacing */
    ck_assert_int_eq(load_sys("  beams: 256\n", sys, &err), SB_EINPUT);
    ck_assert(strstr(err.msg, "beam_spacing") != NULL);
    ck_assert_int_eq(load_sys("  beams: 1\n  beam_spacing: equiangular\n",
                              sys, &err),
                     SB_EINPUT);
    ck_assert_int_eq(err.line, 24);
    ck_assert_int_eq(load_sys("  ping_overhead: 5 ms\n", sys, &err),
                     SB_EINPUT);
    ck_assert_int_eq(err.line, 24);
    ck_assert_int_eq(load_sys("  beams: 256\n  beam_spacing: fan\n", sys,
                              &err),
                     SB_EINPUT);
    ck_assert_int_eq(err.line, 25);
    sb_system_free(sys);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("density");
    TCase *tc = tcase_create("core");
    SRunner *sr;
    int nf;

    tcase_add_test(tc, test_nadir_spacing_hand);
    tcase_add_test(tc, test_spacing_matches_tan_difference);
    tcase_add_test(tc, test_equidistant_constant);
    tcase_add_test(tc, test_ping_period_hand);
    tcase_add_test(tc, test_footprint_hand);
    tcase_add_test(tc, test_limit_angle_hand_and_bisection);
    tcase_add_test(tc, test_limit_verdicts);
    tcase_add_test(tc, test_max_speed_hand);
    tcase_add_test(tc, test_bad_inputs);
    tcase_add_test(tc, test_from_system_file);
    suite_add_tcase(s, tc);
    sr = srunner_create(s);
    srunner_run_all(sr, CK_NORMAL);
    nf = srunner_ntests_failed(sr);
    srunner_free(sr);
    return nf == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
