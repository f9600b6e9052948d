/*
 * Numerical edge cases of the engine (georef.c, propagate.c, swath.c):
 * every one has a defined answer or a clear error, never a NaN or an
 * infinity handed on as a result.
 *
 * Sources of the check values (none is the program's own output):
 *   - first-order closed forms of a flat seafloor at depth D below the
 *     transducer, beam angle theta, slant range R = D / cos(theta) and
 *     across-track distance Y = D tan(theta), straight rays (the a-priori
 *     multibeam model after Hare, Godin & Mayer 1995; derived in
 *     docs/model.md): the sounding (Y, D) = R (sin theta, cos theta), so
 *       a pointing (roll) error u_phi moves it by (D, -Y) u_phi: vertical
 *         Y u_phi, horizontal (across-track) D u_phi;
 *       a range error u_R moves it by (sin theta, cos theta) u_R;
 *       heave moves it vertically one to one;
 *   - the 95 % factors: 1.959964 for a 1-D normal (JCGM 100:2008, G.3;
 *     IHO S-44 ed. 6.0.0 (2020), section 2), which is also the 95 % radius
 *     factor of a 2-D normal whose error lies along one axis only;
 *   - Snell's law for a layered ocean, sin(theta) / c constant along a ray:
 *     a ray leaving the transducer (speed c_t) at theta turns where the
 *     speed reaches c_t / sin(theta), so the steepest ray that turns above
 *     a seafloor whose largest speed above it is c_max leaves at
 *     asin(c_t / c_max);
 *   - IHO S-44 ed. 6.0.0 (2020), table 1, Order 1a: TVU limit
 *     sqrt(0.5^2 + (0.013 d)^2) m, THU limit 5 m + 5 % of depth.
 */
#include <check.h>
#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/georef.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/html.h"
#include "swathbudget/propagate.h"
#include "swathbudget/swath.h"
#include "swathbudget/svg.h"
#include "swathbudget/system.h"
#include "swathbudget/writer.h"

#define PI 3.14159265358979323846
#define DEG (PI / 180.0)
#define K1 1.959963984540054 /* normal 0.975 quantile (JCGM 100:2008 G.3) */

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
static double tvu_1a(double d) { return sqrt(0.25 + (0.013 * d) * (0.013 * d)); }
static double thu_1a(double d) { return 5.0 + 0.05 * d; }

static void tpu_at(const struct sb_system *s, double depth, double ang,
                   struct sb_tpu *t)
{
    struct sb_beam b;
    struct sb_error err;
    int rc = sb_beam_setup(s, depth, ang, &b, &err);
    ck_assert_msg(rc == SB_OK, "setup at %g m, %g deg: %s", depth,
                  ang / DEG, err.msg);
    ck_assert_int_eq(sb_propagate(&b, H, t, NULL), SB_OK);
}

static void assert_all_finite(const struct sb_tpu *t)
{
    ck_assert(isfinite(t->sigma_z_m));
    ck_assert(isfinite(t->tvu95_m));
    ck_assert(isfinite(t->thu95_m));
    ck_assert(isfinite(t->thu95_s44_m));
    ck_assert(isfinite(t->sigma_h_max_m));
    ck_assert(isfinite(t->sigma_h_min_m));
}

static const double DEPTHS[] = {0.1, 0.5, 1.0, 10.0, 100.0, 1000.0, 5000.0,
                                11000.0};
#define N_DEPTHS (sizeof DEPTHS / sizeof DEPTHS[0])

/* A system with no uncertainty at all gives zero, not NaN: every figure is
 * exactly 0 at every depth and angle (0/0 must not appear anywhere). */
START_TEST(all_zero_uncertainties_give_zero)
{
    struct sb_system s;
    const double angles[] = {0.0, 1e-9, 30 * DEG, -45 * DEG, 75 * DEG,
                             -75 * DEG};
    sb_system_init_defaults(&s);
    ck_assert_int_eq(sb_system_validate(&s, NULL), SB_OK);
    for (size_t i = 0; i < N_DEPTHS; i++)
        for (size_t k = 0; k < sizeof angles / sizeof angles[0]; k++) {
            struct sb_tpu t;
            tpu_at(&s, DEPTHS[i], angles[k], &t);
            ck_assert(t.sigma_z_m == 0.0);
            ck_assert(t.tvu95_m == 0.0);
            ck_assert(t.thu95_m == 0.0);
            ck_assert(t.thu95_s44_m == 0.0);
            ck_assert(t.sigma_h_max_m == 0.0);
        }
}
END_TEST

/* ... and such a system never fails before its maximum angle: the side
 * ends at the maximum angle with no limit crossed and no dominant
 * component; the width is 2 D tan(max) on a flat seafloor. */
START_TEST(never_fails_before_max_angle)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    for (size_t i = 0; i < N_DEPTHS; i++) {
        const double d = DEPTHS[i];
        struct sb_swath_result r;
        struct sb_error err;
        ck_assert_int_eq(sb_swath_fail(&s, H, d, tvu_1a(d), thu_1a(d),
                                       SB_THU_EXACT, &r, &err),
                         SB_OK);
        ck_assert_int_eq(r.port.reason, SB_SWATH_MAX_ANGLE);
        ck_assert_int_eq(r.starboard.reason, SB_SWATH_MAX_ANGLE);
        ck_assert_int_eq(r.starboard.failing, SB_LIMIT_NONE);
        ck_assert_int_eq(r.starboard.dominant, -1);
        ck_assert(r.starboard.angle_rad == s.echosounder.max_angle);
        ck_assert(r.starboard.tvu95_m == 0.0);
        ck_assert(r.starboard.thu95_m == 0.0);
        ck_assert_double_eq_tol(r.width_m,
                                2.0 * d * tan(s.echosounder.max_angle),
                                1e-9 * d);
    }
    /* a small but non-zero figure: still out to the maximum angle */
    st(&s.motion.roll, 1e-6 * DEG, SB_DIM_ANGLE);
    {
        struct sb_swath_result r;
        struct sb_error err;
        ck_assert_int_eq(sb_swath_fail(&s, H, 50.0, tvu_1a(50.0),
                                       thu_1a(50.0), SB_THU_EXACT, &r, &err),
                         SB_OK);
        ck_assert_int_eq(r.starboard.reason, SB_SWATH_MAX_ANGLE);
        ck_assert_int_eq(r.port.reason, SB_SWATH_MAX_ANGLE);
        ck_assert(isfinite(r.starboard.tvu95_m) && r.starboard.tvu95_m > 0.0);
    }
}
END_TEST

/* Exactly at nadir: a pointing error has no vertical effect (Y = 0) and a
 * horizontal one of D u_phi along one axis; a range error is all vertical.
 * Closed forms (first order, see the head of this file). */
START_TEST(nadir_exactly)
{
    struct sb_system s;
    const double u_phi = 0.05 * DEG, u_r = 0.02;
    sb_system_init_defaults(&s);
    st(&s.motion.roll, u_phi, SB_DIM_ANGLE);
    for (size_t i = 0; i < N_DEPTHS; i++) {
        const double d = DEPTHS[i];
        struct sb_tpu t;
        tpu_at(&s, d, 0.0, &t);
        assert_all_finite(&t);
        ck_assert_double_eq_tol(t.tvu95_m, 0.0, 1e-9 * d);
        ck_assert_double_eq_tol(t.thu95_m, K1 * d * u_phi,
                                1e-4 * K1 * d * u_phi);
        ck_assert_double_eq_tol(t.sigma_h_min_m, 0.0, 1e-9 * d);
    }
    sb_system_init_defaults(&s);
    st(&s.echosounder.range_resolution, u_r, SB_DIM_LENGTH);
    for (size_t i = 0; i < N_DEPTHS; i++) {
        struct sb_tpu t;
        tpu_at(&s, DEPTHS[i], 0.0, &t);
        assert_all_finite(&t);
        ck_assert_double_eq_tol(t.tvu95_m, K1 * u_r, 1e-6 * K1 * u_r);
        ck_assert_double_eq_tol(t.thu95_m, 0.0, 1e-9);
    }
}
END_TEST

/* Depths from 0.1 m to 11 000 m at nadir, 45 deg and 70 deg with a
 * pointing and a range error together (independent): sigma_z^2 =
 * (Y u_phi)^2 + (cos(theta) u_R)^2, and all the horizontal error lies
 * across track, sigma^2 = (D u_phi)^2 + (sin(theta) u_R)^2, so THU95 is
 * 1.96 sigma. */
START_TEST(depths_tenth_of_a_metre_to_eleven_km)
{
    struct sb_system s;
    const double u_phi = 0.03 * DEG, u_r = 0.05;
    const double angles[] = {0.0, 45 * DEG, -70 * DEG};
    sb_system_init_defaults(&s);
    st(&s.motion.roll, u_phi, SB_DIM_ANGLE);
    st(&s.echosounder.range_resolution, u_r, SB_DIM_LENGTH);
    for (size_t i = 0; i < N_DEPTHS; i++)
        for (size_t k = 0; k < sizeof angles / sizeof angles[0]; k++) {
            const double d = DEPTHS[i], th = angles[k];
            const double y = d * tan(th);
            const double sz = hypot(y * u_phi, cos(th) * u_r);
            const double sh = hypot(d * u_phi, sin(th) * u_r);
            struct sb_tpu t;
            tpu_at(&s, d, th, &t);
            assert_all_finite(&t);
            ck_assert_double_eq_tol(t.tvu95_m, K1 * sz, 1e-5 * K1 * sz);
            ck_assert_double_eq_tol(t.thu95_m, K1 * sh, 1e-4 * K1 * sh);
        }
}
END_TEST

/* Depths outside the domain are clear input errors, not results. */
START_TEST(bad_depths_are_errors)
{
    struct sb_system s;
    struct sb_beam b;
    struct sb_error err;
    struct sb_swath_result r;
    const double bad[] = {0.0, -1.0, NAN, INFINITY, -INFINITY};
    sb_system_init_defaults(&s);
    s.vertical.draft = 2.0; /* transducer 2 m down */
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        ck_assert_int_eq(sb_beam_setup(&s, bad[i], 0.0, &b, &err),
                         SB_EINPUT);
        ck_assert(err.msg[0] != '\0');
        ck_assert_int_ne(sb_swath_fail(&s, H, bad[i], 1.0, 1.0, SB_THU_EXACT,
                                       &r, &err),
                         SB_OK);
    }
    /* seafloor at or above the transducer */
    ck_assert_int_eq(sb_beam_setup(&s, 2.0, 0.0, &b, &err), SB_EINPUT);
    ck_assert_int_eq(sb_beam_setup(&s, 1.0, 0.0, &b, &err), SB_EINPUT);
    ck_assert_int_eq(sb_beam_setup(&s, 2.1, 0.0, &b, &err), SB_OK);
}
END_TEST

/* Angles at and near the maximum: exactly the maximum is a beam (and so is
 * anything within the 1e-12 relative rounding allowance of georef.c), a
 * hair beyond it (1e-9 relative) is an input error, and so are 90 deg and
 * NaN.  A system
 * whose maximum is 89.9 deg still gives finite figures there (tan 89.9 deg
 * = 573), matching the pointing closed form Y u_phi. */
START_TEST(angles_near_the_maximum)
{
    struct sb_system s;
    struct sb_beam b;
    struct sb_error err;
    struct sb_tpu t;
    const double u_phi = 0.01 * DEG;
    sb_system_init_defaults(&s);
    st(&s.motion.roll, u_phi, SB_DIM_ANGLE);
    const double mx = s.echosounder.max_angle;
    ck_assert_int_eq(sb_beam_setup(&s, 20.0, mx, &b, &err), SB_OK);
    ck_assert_int_eq(sb_beam_setup(&s, 20.0, -mx, &b, &err), SB_OK);
    ck_assert_int_eq(sb_beam_setup(&s, 20.0, nextafter(mx, 4.0), &b, &err),
                     SB_OK);
    ck_assert_int_eq(sb_beam_setup(&s, 20.0, mx * (1.0 + 1e-9), &b, &err),
                     SB_EINPUT);
    ck_assert_int_eq(sb_beam_setup(&s, 20.0, -mx * (1.0 + 1e-9), &b, &err),
                     SB_EINPUT);
    ck_assert_int_eq(sb_beam_setup(&s, 20.0, PI / 2, &b, &err), SB_EINPUT);
    ck_assert_int_eq(sb_beam_setup(&s, 20.0, NAN, &b, &err), SB_EINPUT);

    s.echosounder.max_angle = 89.9 * DEG;
    ck_assert_int_eq(sb_system_validate(&s, &err), SB_OK);
    for (size_t i = 0; i < N_DEPTHS; i++) {
        const double d = DEPTHS[i], th = 89.9 * DEG;
        const double want = K1 * d * tan(th) * u_phi;
        tpu_at(&s, d, th, &t);
        assert_all_finite(&t);
        ck_assert_double_eq_tol(t.tvu95_m, want, 1e-4 * want);
    }
    /* the maximum angle itself must stay below 90 deg */
    s.echosounder.max_angle = 90.0 * DEG;
    ck_assert_int_eq(sb_system_validate(&s, &err), SB_EINPUT);
    s.echosounder.max_angle = 95.0 * DEG;
    ck_assert_int_eq(sb_system_validate(&s, &err), SB_EINPUT);
}
END_TEST

/* A system that fails at nadir: heave alone, 1 m standard uncertainty,
 * gives TVU95 = 1.96 m everywhere (heave is vertical one to one), above
 * the Order 1a limit at 10 m (0.51 m): the side is "nadir", angle 0,
 * failing on TVU, heave dominant. */
START_TEST(fails_at_nadir)
{
    struct sb_system s;
    struct sb_swath_result r;
    struct sb_error err;
    sb_system_init_defaults(&s);
    st(&s.motion.heave, 1.0, SB_DIM_LENGTH);
    ck_assert_int_eq(sb_swath_fail(&s, H, 10.0, tvu_1a(10.0), thu_1a(10.0),
                                   SB_THU_EXACT, &r, &err),
                     SB_OK);
    ck_assert_int_eq(r.port.reason, SB_SWATH_NADIR);
    ck_assert_int_eq(r.starboard.reason, SB_SWATH_NADIR);
    ck_assert(r.starboard.angle_rad == 0.0);
    ck_assert(r.starboard.failing == SB_LIMIT_TVU);
    ck_assert_double_eq_tol(r.starboard.tvu95_m, K1, 1e-9);
    ck_assert_int_eq(r.starboard.dominant, SB_COMP_HEAVE);
    ck_assert_double_eq_tol(r.width_m, 0.0, 1e-12);
}
END_TEST

/* Enormous uncertainties: a heave of 1e6 m is a (silly) defined answer,
 * TVU95 = 1.96e6 m and a nadir failure; figures whose square overflows a
 * double (1e200 m) are a clear numerical error, never an infinite
 * result. */
START_TEST(enormous_uncertainties)
{
    struct sb_system s;
    struct sb_swath_result r;
    struct sb_error err;
    struct sb_beam b;
    struct sb_tpu t;
    sb_system_init_defaults(&s);
    st(&s.motion.heave, 1e6, SB_DIM_LENGTH);
    ck_assert_int_eq(sb_system_validate(&s, &err), SB_OK);
    tpu_at(&s, 50.0, 30 * DEG, &t);
    ck_assert_double_eq_tol(t.tvu95_m, K1 * 1e6, 1e-6 * K1 * 1e6);
    ck_assert_int_eq(sb_swath_fail(&s, H, 50.0, tvu_1a(50.0), thu_1a(50.0),
                                   SB_THU_EXACT, &r, &err),
                     SB_OK);
    ck_assert_int_eq(r.starboard.reason, SB_SWATH_NADIR);

    st(&s.motion.heave, 1e200, SB_DIM_LENGTH);
    ck_assert_int_eq(sb_beam_setup(&s, 50.0, 0.0, &b, &err), SB_OK);
    ck_assert_int_eq(sb_propagate(&b, H, &t, NULL), SB_ENUM);
    err.msg[0] = '\0';
    ck_assert_int_eq(sb_swath_fail(&s, H, 50.0, tvu_1a(50.0), thu_1a(50.0),
                                   SB_THU_EXACT, &r, &err),
                     SB_ENUM);
    ck_assert(err.msg[0] != '\0');
}
END_TEST

/* Subnormal figures (a user may write "1e-320 deg") are as good as zero:
 * tiny finite results, never NaN (a difference step that underflows to 0
 * would give 0 * inf). */
START_TEST(subnormal_uncertainties_are_not_nan)
{
    struct sb_system s;
    struct sb_tpu t;
    sb_system_init_defaults(&s);
    st(&s.motion.roll, 5e-324, SB_DIM_ANGLE);
    st(&s.motion.pitch, DBL_MIN / 4, SB_DIM_ANGLE);
    st(&s.echosounder.range_resolution, 1e-310, SB_DIM_LENGTH);
    st(&s.motion.heave, 4e-320, SB_DIM_LENGTH);
    for (size_t i = 0; i < N_DEPTHS; i++) {
        tpu_at(&s, DEPTHS[i], 60 * DEG, &t);
        assert_all_finite(&t);
        ck_assert(t.tvu95_m >= 0.0 && t.tvu95_m < 1e-300);
        ck_assert(t.thu95_m >= 0.0 && t.thu95_m < 1e-300);
    }
}
END_TEST

/* A linear profile from 1450 m/s at the surface to 1600 m/s at 100 m (a
 * strong positive gradient, 1.5 /s): rays steeper than asin(1450/1600) =
 * 65.0 deg reach the seafloor at 100 m, flatter ones turn above it
 * (Snell's law).  Below the turning angle a beam is a normal sounding; above
 * it sb_beam_setup says SB_RAY_TURNS and the swath side ends there. */
static void strong_gradient(struct sb_system *s)
{
    double z[11], c[11];
    struct sb_error err;
    for (int i = 0; i <= 10; i++) {
        z[i] = 10.0 * i;
        c[i] = 1450.0 + 1.5 * z[i];
    }
    sb_system_init_defaults(s);
    s->sound_speed.surface = 1450.0;
    s->echosounder.max_angle = 80 * DEG;
    st(&s->motion.roll, 0.01 * DEG, SB_DIM_ANGLE);
    ck_assert_msg(sb_system_set_profile(s, z, c, 11, &err) == SB_OK, "%s",
                  err.msg);
    ck_assert_int_eq(sb_system_validate(s, &err), SB_OK);
}

START_TEST(turning_rays_in_a_strong_gradient)
{
    struct sb_system s;
    struct sb_beam b;
    struct sb_error err;
    struct sb_tpu t;
    struct sb_swath_result r;
    const double turn = asin(1450.0 / 1600.0);
    strong_gradient(&s);

    ck_assert_double_eq_tol(sb_beam_turn_angle(&s, 100.0), turn, 1e-9);
    /* at 50 m the largest speed above the seafloor is 1525 m/s */
    ck_assert_double_eq_tol(sb_beam_turn_angle(&s, 50.0),
                            asin(1450.0 / 1525.0), 1e-9);

    tpu_at(&s, 100.0, turn - 0.5 * DEG, &t);
    assert_all_finite(&t);
    ck_assert_int_eq(sb_beam_setup(&s, 100.0, turn + 0.5 * DEG, &b, &err),
                     SB_RAY_TURNS);
    ck_assert_int_eq(sb_beam_setup(&s, 100.0, -(turn + 0.5 * DEG), &b, &err),
                     SB_RAY_TURNS);

    /* limits that never fail: the side ends just inside the turning angle */
    ck_assert_int_eq(sb_swath_fail(&s, H, 100.0, INFINITY, INFINITY,
                                   SB_THU_EXACT, &r, &err),
                     SB_OK);
    ck_assert_int_eq(r.starboard.reason, SB_SWATH_RAY_TURNS);
    ck_assert_int_eq(r.port.reason, SB_SWATH_RAY_TURNS);
    ck_assert_double_eq_tol(r.starboard.angle_rad, turn, 1e-6);
    ck_assert(r.starboard.angle_rad < turn);
    ck_assert(isfinite(r.width_m) && r.width_m > 0.0);
    ck_assert(isfinite(r.starboard.tvu95_m) && isfinite(r.starboard.thu95_m));
    sb_system_release(&s);
}
END_TEST

/* The grid marks a turned ray instead of inventing a sounding. */
START_TEST(grid_marks_turned_rays)
{
    struct sb_system s;
    struct sb_error err;
    struct sb_grid_point g[2];
    const double depth = 100.0;
    const double turn = asin(1450.0 / 1600.0);
    const double angles[2] = {turn - 1.0 * DEG, turn + 1.0 * DEG};
    strong_gradient(&s);
    ck_assert_int_eq(sb_swath_grid(&s, H, &depth, 1, angles, 2, g, &err),
                     SB_OK);
    ck_assert_int_eq(g[0].ray_turns, 0);
    ck_assert(isfinite(g[0].tvu95_m) && isfinite(g[0].thu95_m));
    ck_assert_int_eq(g[1].ray_turns, 1);
    sb_system_release(&s);
}
END_TEST

/* A strong negative gradient (speed falling with depth) bends rays toward
 * the vertical: no ray turns, the turning angle is 90 deg, and the side
 * ends at the maximum angle when nothing fails. */
START_TEST(negative_gradient_never_turns)
{
    struct sb_system s;
    struct sb_error err;
    struct sb_swath_result r;
    double z[11], c[11];
    for (int i = 0; i <= 10; i++) {
        z[i] = 20.0 * i;
        c[i] = 1540.0 - 0.5 * z[i];
    }
    sb_system_init_defaults(&s);
    s.sound_speed.surface = 1540.0;
    ck_assert_int_eq(sb_system_set_profile(&s, z, c, 11, &err), SB_OK);
    ck_assert_double_eq_tol(sb_beam_turn_angle(&s, 200.0), PI / 2, 1e-12);
    ck_assert_int_eq(sb_swath_fail(&s, H, 200.0, tvu_1a(200.0),
                                   thu_1a(200.0), SB_THU_EXACT, &r, &err),
                     SB_OK);
    ck_assert_int_eq(r.starboard.reason, SB_SWATH_MAX_ANGLE);
    ck_assert(isfinite(r.width_m));
    sb_system_release(&s);
}
END_TEST

/* No NaN or infinity reaches an output file: every writer refuses one as
 * an internal error (writer.h) -- the JSON and table writers take numbers,
 * the SVG plots take numbers, the HTML page takes text already formatted,
 * where printf's "nan" / "inf" words are what would slip through. */
START_TEST(writers_refuse_non_finite)
{
    const double bad[] = {NAN, INFINITY, -INFINITY};
    struct sb_error err;
    for (size_t i = 0; i < 3; i++) {
        FILE *f = tmpfile();
        struct sb_json j;
        ck_assert_ptr_nonnull(f);
        sb_json_init(&j, f);
        sb_json_begin_object(&j);
        sb_json_kv_number(&j, "depth_m", bad[i], 6);
        sb_json_end_object(&j);
        ck_assert_int_eq(sb_json_finish(&j, &err), SB_EINTERNAL);
        fclose(f);
    }
    {
        static const struct sb_table_col cols[] = {{"depth (m)", "depth_m", 1}};
        struct sb_table *t = sb_table_alloc(cols, 1);
        FILE *f = tmpfile();
        ck_assert_ptr_nonnull(t);
        ck_assert_ptr_nonnull(f);
        ck_assert_int_eq(sb_table_num(t, NAN), SB_EINTERNAL);
        ck_assert_int_eq(sb_table_write(t, f, SB_FORMAT_CSV, &err),
                         SB_EINTERNAL);
        sb_table_free(t);
        fclose(f);
    }
    {
        struct sb_plot *p = sb_plot_alloc("t", "x", "y");
        const double x[2] = {0.0, 1.0}, y[2] = {1.0, NAN};
        ck_assert_ptr_nonnull(p);
        ck_assert_int_eq(sb_plot_series(p, "s", x, y, 2, 0, 0), SB_EINTERNAL);
        ck_assert_int_eq(sb_plot_rule(p, 0, INFINITY, SB_SVG_RULE_LIMIT, "r"),
                         SB_EINTERNAL);
        sb_plot_free(p);
    }
    {
        /* formatted text: a lone nan / -nan / inf / -inf word is refused */
        static const char *const words[] = {"nan", "-nan", "inf", "-inf",
                                            "1.5 to inf", "(nan)"};
        for (size_t i = 0; i < sizeof words / sizeof words[0]; i++) {
            FILE *f = tmpfile();
            struct sb_html h;
            const char *cells[2] = {"10.0", words[i]};
            const int num[2] = {1, 1};
            ck_assert_ptr_nonnull(f);
            sb_html_begin(&h, f, "t");
            sb_html_table_begin(&h, "c", cells, num, 2);
            sb_html_table_row(&h, cells, num, 2);
            sb_html_table_end(&h);
            ck_assert_msg(sb_html_end(&h, &err) == SB_EINTERNAL, "'%s'",
                          words[i]);
            fclose(f);
        }
    }
    {
        /* ... but words that merely contain those letters are text */
        FILE *f = tmpfile();
        struct sb_html h;
        ck_assert_ptr_nonnull(f);
        sb_html_begin(&h, f, "Information on the nanometre scale");
        sb_html_para(&h, NULL, "infinite care, inflow, banana, 5 inf_x");
        ck_assert_int_eq(sb_html_end(&h, &err), SB_OK);
        fclose(f);
    }
}
END_TEST

static Suite *edges_suite(void)
{
    Suite *s = suite_create("edges");
    TCase *tc = tcase_create("engine");
    tcase_set_timeout(tc, 60);
    tcase_add_test(tc, all_zero_uncertainties_give_zero);
    tcase_add_test(tc, never_fails_before_max_angle);
    tcase_add_test(tc, nadir_exactly);
    tcase_add_test(tc, depths_tenth_of_a_metre_to_eleven_km);
    tcase_add_test(tc, bad_depths_are_errors);
    tcase_add_test(tc, angles_near_the_maximum);
    tcase_add_test(tc, fails_at_nadir);
    tcase_add_test(tc, enormous_uncertainties);
    tcase_add_test(tc, subnormal_uncertainties_are_not_nan);
    tcase_add_test(tc, turning_rays_in_a_strong_gradient);
    tcase_add_test(tc, grid_marks_turned_rays);
    tcase_add_test(tc, negative_gradient_never_turns);
    tcase_add_test(tc, writers_refuse_non_finite);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    struct sb_error err;
    int failed;
    SRunner *sr;

    H = sb_horiz95_alloc(&err);
    if (!H) {
        fprintf(stderr, "test_edges: %s\n", err.msg);
        return 1;
    }
    sr = srunner_create(edges_suite());
    srunner_run_all(sr, CK_NORMAL);
    failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    sb_horiz95_free(H);
    return failed == 0 ? 0 : 1;
}
