/*
 * Tests of the fail-angle search and the grid (src/lib/swath.c).
 *
 * Sources of the check values:
 *   - IHO S-44 ed. 6.0.0 (2020), table 1: Order 1a TVU limit
 *     sqrt(a^2 + (b d)^2) with a = 0.5 m, b = 0.013, THU limit 5 m + 5 % of
 *     depth (computed here from the formula, not taken from orders.c);
 *   - single-component closed forms (docs/model.md, after Hare, Godin &
 *     Mayer 1995): roll only, TVU95 = 1.959964 |D tan(theta) + dy| u, so the
 *     fail angle solves tan(theta) = (L / (1.959964 u) - dy) / D; heading
 *     only, THU95 = 1.959964 D tan(theta) u (one axis), or 2.45 D tan(theta)
 *     u by the S-44 figure;
 *   - the definition of the fail angle itself: every angle between nadir
 *     and it passes (checked by an independent fine scan here).
 */
#include <check.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/georef.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/propagate.h"
#include "swathbudget/swath.h"
#include "swathbudget/system.h"

#define PI 3.14159265358979323846
#define DEG (PI / 180.0)
#define K1 1.959963984540054 /* normal 0.975 quantile */

static struct sb_horiz95 *H;

static void st(struct sb_stated *s, double u, unsigned dim)
{
    memset(s, 0, sizeof *s);
    s->value = s->u = s->written = u;
    s->dim = dim;
    s->type = SB_UTYPE_SD;
    s->dist = SB_DIST_NORMAL;
}

/* IHO S-44 ed. 6.0.0 table 1, Order 1a */
static double tvu_1a(double d) { return sqrt(0.5 * 0.5 + (0.013 * d) * (0.013 * d)); }
static double thu_1a(double d) { return 5.0 + 0.05 * d; }

static void tpu_at(const struct sb_system *s, double depth, double ang, struct sb_tpu *t)
{
    struct sb_beam b;
    ck_assert_int_eq(sb_beam_setup(s, depth, ang, &b, NULL), SB_OK);
    ck_assert_int_eq(sb_propagate(&b, H, t, NULL), SB_OK);
}

START_TEST(roll_only_closed_form)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    const double u = 0.3 * DEG;
    st(&s.motion.roll, u, SB_DIM_ANGLE);
    const double deps[] = { 15.0, 40.0, 90.0 };
    for (int i = 0; i < 3; i++) {
        const double D = deps[i], L = tvu_1a(D);
        struct sb_swath_result r;
        struct sb_error err;
        ck_assert_int_eq(sb_swath_fail(&s, H, D, L, thu_1a(D), SB_THU_EXACT, &r, &err), SB_OK);
        const double want = atan(L / (K1 * D * u));
        ck_assert_int_eq(r.port.reason, SB_SWATH_TVU);
        ck_assert_int_eq(r.starboard.reason, SB_SWATH_TVU);
        ck_assert_int_eq(r.starboard.failing, SB_LIMIT_TVU);
        ck_assert_double_eq_tol(r.port.angle_rad, want, 1e-4 * DEG);
        ck_assert_double_eq_tol(r.starboard.angle_rad, want, 1e-4 * DEG);
        ck_assert_double_eq_tol(r.starboard.tvu95_m, L, 1e-4);
        ck_assert_int_eq(r.starboard.dominant, SB_COMP_ROLL);
        ck_assert_double_eq_tol(r.width_m, 2 * D * tan(want), 1e-3);
        ck_assert(r.depth_m == D);
    }
}
END_TEST

START_TEST(roll_offset_sides_differ)
{
    /* transducer 2 m to starboard of the motion sensor: the roll error
     * tilts the heave arm too, TVU95 = K1 |D tan(theta) + 2| u */
    struct sb_system s;
    sb_system_init_defaults(&s);
    const double u = 0.3 * DEG, dy = 2.0, D = 40.0, L = tvu_1a(D);
    st(&s.motion.roll, u, SB_DIM_ANGLE);
    s.transducer.y = dy;
    struct sb_swath_result r;
    ck_assert_int_eq(sb_swath_fail(&s, H, D, L, thu_1a(D), SB_THU_EXACT, &r, NULL), SB_OK);
    const double ts = atan((L / (K1 * u) - dy) / D), tp = atan((L / (K1 * u) + dy) / D);
    ck_assert_double_eq_tol(r.starboard.angle_rad, ts, 1e-4 * DEG);
    ck_assert_double_eq_tol(r.port.angle_rad, tp, 1e-4 * DEG);
    ck_assert(r.port.angle_rad > r.starboard.angle_rad + 1 * DEG);
}
END_TEST

START_TEST(heading_only_thu_limited)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    const double u = 0.5 * DEG, D = 100.0, Lt = 5.0; /* a strict THU limit */
    st(&s.motion.heading, u, SB_DIM_ANGLE);
    struct sb_swath_result r;
    ck_assert_int_eq(sb_swath_fail(&s, H, D, 1.0, Lt, SB_THU_EXACT, &r, NULL), SB_OK);
    ck_assert_int_eq(r.starboard.reason, SB_SWATH_THU);
    ck_assert_int_eq(r.port.failing, SB_LIMIT_THU);
    ck_assert_int_eq(r.port.dominant, SB_COMP_HEADING);
    ck_assert_double_eq_tol(r.starboard.angle_rad, atan(Lt / (K1 * D * u)), 1e-4 * DEG);
    ck_assert_double_eq_tol(r.starboard.thu95_m, Lt, 1e-4);
    /* the S-44 figure 2.45 sigma_max is larger: a narrower swath */
    ck_assert_int_eq(sb_swath_fail(&s, NULL, D, 1.0, Lt, SB_THU_S44, &r, NULL), SB_OK);
    ck_assert_double_eq_tol(r.port.angle_rad, atan(Lt / (2.45 * D * u)), 1e-4 * DEG);
}
END_TEST

/* A realistic (invented) system of the Kestrel Sound demo scenario. */
static void realistic(struct sb_system *s)
{
    sb_system_init_defaults(s);
    s->antenna.x = 1.2; s->antenna.y = 0.4; s->antenna.z = -8.5;
    s->transducer.x = 0.5; s->transducer.y = 1.1; s->transducer.z = 2.3;
    for (int i = 0; i < 3; i++) {
        st(&s->antenna.u[i], 0.01, SB_DIM_LENGTH);
        st(&s->transducer.u[i], 0.01, SB_DIM_LENGTH);
        st(&s->motion_sensor.u[i], 0.005, SB_DIM_LENGTH);
    }
    st(&s->positioning.horizontal, 0.10, SB_DIM_LENGTH);
    st(&s->motion.roll, 0.03 * DEG, SB_DIM_ANGLE);
    st(&s->motion.pitch, 0.03 * DEG, SB_DIM_ANGLE);
    st(&s->motion.heading, 0.05 * DEG, SB_DIM_ANGLE);
    st(&s->motion.heave, 0.05, SB_DIM_LENGTH);
    st(&s->motion.heave_fraction, 0.05, SB_DIM_RATIO);
    st(&s->motion.latency, 0.002, SB_DIM_TIME);
    st(&s->motion.align_roll, 0.03 * DEG, SB_DIM_ANGLE);
    st(&s->sound_speed.surface_u, 1.0, SB_DIM_SPEED);
    st(&s->sound_speed.column_u, 0.003, SB_DIM_RATIO);
    st(&s->echosounder.range_resolution, 0.03, SB_DIM_LENGTH);
    st(&s->echosounder.pointing, 0.15, SB_DIM_RATIO);
    s->echosounder.beam_across = 1.5 * DEG;
    s->vertical.draft = 2.3;
    st(&s->vertical.draft_u, 0.02, SB_DIM_LENGTH);
    st(&s->vertical.water_level, 0.05, SB_DIM_LENGTH);
    st(&s->vertical.zoning, 0.08, SB_DIM_LENGTH);
    s->conditions.speed = 4.0;
    s->conditions.roll_amplitude = 3.0 * DEG;
    s->conditions.pitch_amplitude = 1.5 * DEG;
    s->conditions.heave_amplitude = 0.5;
}

START_TEST(realistic_fail_angle_definition)
{
    struct sb_system s;
    realistic(&s);
    ck_assert_int_eq(sb_system_validate(&s, NULL), SB_OK);
    const double deps[] = { 12.0, 30.0, 60.0, 120.0 };
    int seen_tvu = 0;
    for (int i = 0; i < 4; i++) {
        const double d = deps[i], Lv = tvu_1a(d), Lh = thu_1a(d);
        struct sb_swath_result r;
        struct sb_error err;
        ck_assert_int_eq(sb_swath_fail(&s, H, d, Lv, Lh, SB_THU_EXACT, &r, &err), SB_OK);
        const struct sb_swath_side *sides[2] = { &r.port, &r.starboard };
        for (int k = 0; k < 2; k++) {
            const struct sb_swath_side *sd = sides[k];
            const double sign = k ? 1.0 : -1.0;
            ck_assert(sd->reason == SB_SWATH_TVU || sd->reason == SB_SWATH_THU ||
                      sd->reason == SB_SWATH_MAX_ANGLE);
            /* independent fine scan: every angle up to it passes */
            for (double a = 0.0; a < sd->angle_rad; a += 0.01 * DEG) {
                struct sb_tpu t;
                tpu_at(&s, d, sign * a, &t);
                ck_assert(t.tvu95_m <= Lv + 1e-9 && t.thu95_m <= Lh + 1e-9);
            }
            struct sb_tpu t;
            tpu_at(&s, d, sign * sd->angle_rad, &t);
            if (sd->reason == SB_SWATH_TVU) {
                seen_tvu = 1;
                ck_assert_double_eq_tol(t.tvu95_m, Lv, 1e-4);
                ck_assert_double_eq_tol(sd->tvu95_m, Lv, 1e-4);
                /* just beyond, it fails */
                tpu_at(&s, d, sign * (sd->angle_rad + 0.01 * DEG), &t);
                ck_assert(t.tvu95_m > Lv);
            } else if (sd->reason == SB_SWATH_THU) {
                ck_assert_double_eq_tol(t.thu95_m, Lh, 1e-4);
            } else {
                ck_assert_double_eq_tol(sd->angle_rad, s.echosounder.max_angle, 1e-15);
            }
            ck_assert_int_ge(sd->dominant, 0);
        }
        /* width = sum of the across-track distances on the flat seafloor */
        const double D = d - 2.3;
        ck_assert_double_eq_tol(r.width_m,
                                D * (tan(r.port.angle_rad) + tan(r.starboard.angle_rad)), 1e-9);
    }
    ck_assert(seen_tvu);
}
END_TEST

START_TEST(nadir_fails)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    st(&s.motion.heave, 0.5, SB_DIM_LENGTH); /* TVU95 = 0.98 m everywhere */
    struct sb_swath_result r;
    ck_assert_int_eq(sb_swath_fail(&s, H, 10.0, tvu_1a(10.0), thu_1a(10.0), SB_THU_EXACT, &r, NULL),
                     SB_OK);
    ck_assert_int_eq(r.port.reason, SB_SWATH_NADIR);
    ck_assert_int_eq(r.starboard.reason, SB_SWATH_NADIR);
    ck_assert_int_eq(r.starboard.failing, SB_LIMIT_TVU);
    ck_assert_int_eq(r.starboard.dominant, SB_COMP_HEAVE);
    ck_assert(r.port.angle_rad == 0.0);
    ck_assert(r.width_m == 0.0);
    ck_assert_str_eq(sb_swath_reason_name(r.port.reason), "nadir");
    /* both limits at nadir */
    st(&s.positioning.horizontal, 10.0, SB_DIM_LENGTH);
    ck_assert_int_eq(sb_swath_fail(&s, H, 10.0, tvu_1a(10.0), thu_1a(10.0), SB_THU_EXACT, &r, NULL),
                     SB_OK);
    ck_assert_int_eq(r.port.failing, SB_LIMIT_BOTH);
    ck_assert_str_eq(sb_swath_limit_name(r.port.failing), "tvu+thu");
}
END_TEST

START_TEST(never_fails)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    st(&s.motion.heave, 0.05, SB_DIM_LENGTH);
    st(&s.echosounder.range_resolution, 0.05, SB_DIM_LENGTH);
    s.echosounder.max_angle = 65 * DEG;
    struct sb_swath_result r;
    ck_assert_int_eq(sb_swath_fail(&s, H, 50.0, tvu_1a(50.0), thu_1a(50.0), SB_THU_EXACT, &r, NULL),
                     SB_OK);
    ck_assert_int_eq(r.port.reason, SB_SWATH_MAX_ANGLE);
    ck_assert_int_eq(r.starboard.reason, SB_SWATH_MAX_ANGLE);
    ck_assert_int_eq(r.starboard.failing, SB_LIMIT_NONE);
    ck_assert_double_eq_tol(r.starboard.angle_rad, 65 * DEG, 1e-15);
    ck_assert_double_eq_tol(r.width_m, 2 * 50.0 * tan(65 * DEG), 1e-9);
    ck_assert_str_eq(sb_swath_reason_name(r.port.reason), "max_angle");
    /* an infinite limit never fails */
    ck_assert_int_eq(sb_swath_fail(&s, H, 50.0, INFINITY, INFINITY, SB_THU_EXACT, &r, NULL), SB_OK);
    ck_assert_int_eq(r.port.reason, SB_SWATH_MAX_ANGLE);
}
END_TEST

START_TEST(bad_arguments)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    struct sb_swath_result r;
    struct sb_error err;
    ck_assert_int_eq(sb_swath_fail(&s, H, 10.0, 0.0, 1.0, SB_THU_EXACT, &r, &err), SB_EINPUT);
    ck_assert_int_eq(sb_swath_fail(&s, H, 10.0, 1.0, NAN, SB_THU_EXACT, &r, &err), SB_EINPUT);
    ck_assert_int_eq(sb_swath_fail(&s, H, 10.0, 1.0, 1.0, 7, &r, &err), SB_EINPUT);
    ck_assert_int_eq(sb_swath_fail(&s, NULL, 10.0, 1.0, 1.0, SB_THU_EXACT, &r, &err), SB_EINTERNAL);
    s.vertical.draft = 4.0;
    ck_assert_int_eq(sb_swath_fail(&s, H, 3.0, 1.0, 1.0, SB_THU_EXACT, &r, &err), SB_EINPUT);
    ck_assert_str_eq(sb_swath_reason_name(9), "?");
    ck_assert_str_eq(sb_swath_limit_name(SB_LIMIT_NONE), "none");
}
END_TEST

START_TEST(grid_matches_points)
{
    struct sb_system s;
    realistic(&s);
    const double deps[] = { 10.0, 33.0, 180.0 };
    const double angs[] = { -70 * DEG, -12 * DEG, 0.0, 5 * DEG, 64 * DEG };
    struct sb_grid_point g[15];
    struct sb_error err;
    ck_assert_int_eq(sb_swath_grid(&s, H, deps, 3, angs, 5, g, &err), SB_OK);
    for (int i = 0; i < 3; i++)
        for (int k = 0; k < 5; k++) {
            struct sb_tpu t;
            tpu_at(&s, deps[i], angs[k], &t);
            const struct sb_grid_point *p = &g[i * 5 + k];
            ck_assert_double_eq_tol(p->tvu95_m, t.tvu95_m, 1e-12);
            ck_assert_double_eq_tol(p->thu95_m, t.thu95_m, 1e-12);
            ck_assert_double_eq_tol(p->thu95_s44_m, t.thu95_s44_m, 1e-12);
            ck_assert_double_eq_tol(p->sigma_z_m, t.sigma_z_m, 1e-12);
        }
    const double bad[] = { 10.0, 1.0 }; /* 1 m is above the transducer */
    ck_assert_int_eq(sb_swath_grid(&s, H, bad, 2, angs, 5, g, &err), SB_EINPUT);
}
END_TEST

static Suite *suite(void)
{
    Suite *s = suite_create("swath");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 120);
    tcase_add_test(tc, roll_only_closed_form);
    tcase_add_test(tc, roll_offset_sides_differ);
    tcase_add_test(tc, heading_only_thu_limited);
    tcase_add_test(tc, realistic_fail_angle_definition);
    tcase_add_test(tc, nadir_fails);
    tcase_add_test(tc, never_fails);
    tcase_add_test(tc, bad_arguments);
    tcase_add_test(tc, grid_matches_points);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    struct sb_error err;
    H = sb_horiz95_alloc(&err);
    if (!H)
        return EXIT_FAILURE;
    SRunner *sr = srunner_create(suite());
    srunner_set_fork_status(sr, CK_NOFORK);
    srunner_run_all(sr, CK_NORMAL);
    int nf = srunner_ntests_failed(sr);
    srunner_free(sr);
    sb_horiz95_free(H);
    return nf ? EXIT_FAILURE : EXIT_SUCCESS;
}
