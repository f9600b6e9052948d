/*
 * Tests of the depth x angle uncertainty table (tvutable.c): the claimed
 * interpolation bound holds against direct evaluation at many random
 * points, for analytic functions and for the engine itself.
 */
#include <check.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/propagate.h"
#include "swathbudget/system.h"
#include "swathbudget/tvutable.h"
#include "swathbudget/units.h"

#define DEG (3.14159265358979323846 / 180.0)

/* A smooth closed form with the shape of an a-priori budget: a constant
 * part and a part growing with depth and with 1/cos of the angle (the
 * growth of a slant-range term).  The "true" value is the closed form
 * itself, evaluated independently of the table. */
static int analytic(void *ctx, double d, double a, double *tvu, double *thu,
                    struct sb_error *err)
{
    int *calls = ctx;

    (void)err;
    if (calls)
        (*calls)++;
    *tvu = sqrt(0.1 * 0.1 + pow(0.004 * d / cos(a), 2));
    *thu = 0.05 + 0.01 * d * (1 + tan(a) * tan(a));
    return SB_OK;
}

/* Bilinear in (depth, angle): bilinear interpolation must reproduce it to
 * rounding inside every octave (an exact property of the method). */
static int bilinear(void *ctx, double d, double a, double *tvu, double *thu,
                    struct sb_error *err)
{
    (void)ctx;
    (void)err;
    *tvu = 0.3 + 0.01 * d + 0.2 * a + 0.001 * d * a + 1.0;
    *thu = 2.0 - 0.1 * a;
    return SB_OK;
}

static int failing(void *ctx, double d, double a, double *tvu, double *thu,
                   struct sb_error *err)
{
    (void)ctx;
    (void)a;
    *tvu = *thu = 0;
    if (d > 50)
        return sb_error_set(err, SB_ENUM, "", 0, 0, "made to fail");
    return SB_OK;
}

static double max_rel_error(struct sb_tvutable *t, sb_tvu_fn fn, void *ctx,
                            double d0, double d1, double amax, int n,
                            unsigned long seed)
{
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    struct sb_error err;
    double worst = 0;

    gsl_rng_set(r, seed);
    for (int k = 0; k < n; k++) {
        /* depths uniform in log, so every octave is sampled alike */
        double d = d0 * pow(d1 / d0, gsl_rng_uniform(r));
        double a = amax * (2 * gsl_rng_uniform(r) - 1);
        double tv, th, etv, eth;

        ck_assert_int_eq(sb_tvutable_lookup(t, d, a, &tv, &th, &err), SB_OK);
        ck_assert_int_eq(fn(ctx, d, a, &etv, &eth, &err), SB_OK);
        worst = fmax(worst, fabs(tv - etv) / etv);
        worst = fmax(worst, fabs(th - eth) / eth);
    }
    gsl_rng_free(r);
    return worst;
}

START_TEST(bound_holds_analytic)
{
    struct sb_tvutable_opts o = {0.7, 75 * DEG, 1e-3};
    struct sb_tvutable *t;
    struct sb_error err;
    double worst;

    ck_assert_int_eq(sb_tvutable_alloc(&o, analytic, NULL, &t, &err), SB_OK);
    /* random points against the closed form (independent evaluation) */
    worst = max_rel_error(t, analytic, NULL, 0.7, 3000, 75 * DEG, 200000,
                          11);
    ck_assert(sb_tvutable_bound(t) >= 1e-3);
    ck_assert_msg(worst <= sb_tvutable_bound(t),
                  "measured %g > claimed %g", worst, sb_tvutable_bound(t));
    /* and the bound is not vacuous: the table really interpolates (a
     * coarse table would be off by far more than 1e-3) */
    ck_assert(sb_tvutable_measured(t) > 1e-6);
    sb_tvutable_free(t);
}
END_TEST

START_TEST(tight_tolerance_refines)
{
    struct sb_tvutable_opts loose = {1.0, 70 * DEG, 1e-2};
    struct sb_tvutable_opts tight = {1.0, 70 * DEG, 1e-5};
    struct sb_tvutable *a, *b;
    struct sb_error err;
    double wa, wb;

    ck_assert_int_eq(sb_tvutable_alloc(&loose, analytic, NULL, &a, &err),
                     SB_OK);
    ck_assert_int_eq(sb_tvutable_alloc(&tight, analytic, NULL, &b, &err),
                     SB_OK);
    wa = max_rel_error(a, analytic, NULL, 10, 100, 70 * DEG, 50000, 3);
    wb = max_rel_error(b, analytic, NULL, 10, 100, 70 * DEG, 50000, 3);
    ck_assert(wa <= sb_tvutable_bound(a));
    ck_assert(wb <= sb_tvutable_bound(b));
    ck_assert(sb_tvutable_bound(b) <= 1e-5 * 1.0000001 ||
              sb_tvutable_bound(b) < sb_tvutable_bound(a));
    ck_assert(sb_tvutable_evaluations(b) > sb_tvutable_evaluations(a));
    sb_tvutable_free(a);
    sb_tvutable_free(b);
}
END_TEST

START_TEST(bilinear_is_exact)
{
    struct sb_tvutable_opts o = {3.3, 60 * DEG, 1e-3};
    struct sb_tvutable *t;
    struct sb_error err;

    ck_assert_int_eq(sb_tvutable_alloc(&o, bilinear, NULL, &t, &err), SB_OK);
    /* a bilinear function is reproduced exactly by bilinear
     * interpolation, also in the shifted first cell at depth_min */
    ck_assert(max_rel_error(t, bilinear, NULL, 3.3, 500, 60 * DEG, 20000, 5) <
              1e-13);
    /* the nodes at the ends: depth_min and +/- angle_max */
    {
        double tv, th, etv, eth;

        ck_assert_int_eq(sb_tvutable_lookup(t, 3.3, 60 * DEG, &tv, &th, &err),
                         SB_OK);
        bilinear(NULL, 3.3, 60 * DEG, &etv, &eth, &err);
        ck_assert(fabs(tv - etv) < 1e-13 && fabs(th - eth) < 1e-13);
        ck_assert_int_eq(
            sb_tvutable_lookup(t, 3.3, -60 * DEG, &tv, &th, &err), SB_OK);
    }
    sb_tvutable_free(t);
}
END_TEST

START_TEST(lazy_octaves)
{
    struct sb_tvutable_opts o = {1.0, 60 * DEG, 1e-3};
    struct sb_tvutable *t;
    struct sb_error err;
    double tv, th;
    int calls = 0, after_first;

    ck_assert_int_eq(sb_tvutable_alloc(&o, analytic, &calls, &t, &err),
                     SB_OK);
    ck_assert_int_eq(calls, 0);
    ck_assert_int_eq(sb_tvutable_lookup(t, 20, 0.1, &tv, &th, &err), SB_OK);
    after_first = calls;
    ck_assert(after_first > 0);
    /* same octave [16, 32) m: no more evaluations */
    ck_assert_int_eq(sb_tvutable_lookup(t, 31.9, -0.5, &tv, &th, &err),
                     SB_OK);
    ck_assert_int_eq(calls, after_first);
    ck_assert_int_eq(sb_tvutable_prepare(t, 16, 31, &err), SB_OK);
    ck_assert_int_eq(calls, after_first);
    ck_assert_int_eq(sb_tvutable_lookup(t, 32, 0, &tv, &th, &err), SB_OK);
    ck_assert(calls > after_first);
    sb_tvutable_free(t);
}
END_TEST

START_TEST(outside_is_refused)
{
    struct sb_tvutable_opts o = {2.0, 60 * DEG, 1e-3};
    struct sb_tvutable *t;
    struct sb_error err;
    double tv = -7, th = -7;

    ck_assert_int_eq(sb_tvutable_alloc(&o, analytic, NULL, &t, &err), SB_OK);
    ck_assert_int_eq(sb_tvutable_lookup(t, 1.9, 0, &tv, &th, &err),
                     SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "depth"));
    ck_assert_int_eq(sb_tvutable_lookup(t, 10, 61 * DEG, &tv, &th, &err),
                     SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "beam angle"));
    ck_assert_int_eq(sb_tvutable_lookup(t, NAN, 0, &tv, &th, NULL),
                     SB_EINPUT);
    ck_assert_int_eq(sb_tvutable_lookup(t, 10, NAN, &tv, &th, NULL),
                     SB_EINPUT);
    ck_assert_int_eq(sb_tvutable_lookup(t, 20000, 0, &tv, &th, NULL),
                     SB_EINPUT);
    ck_assert(tv == -7 && th == -7);
    sb_tvutable_free(t);
}
END_TEST

START_TEST(bad_options)
{
    struct sb_tvutable *t = NULL;
    struct sb_error err;
    struct sb_tvutable_opts o1 = {0, 60 * DEG, 0};
    struct sb_tvutable_opts o2 = {1, 90 * DEG, 0};
    struct sb_tvutable_opts o3 = {1, 60 * DEG, 0.5};

    ck_assert_int_eq(sb_tvutable_alloc(&o1, analytic, NULL, &t, &err),
                     SB_EINPUT);
    ck_assert_int_eq(sb_tvutable_alloc(&o2, analytic, NULL, &t, &err),
                     SB_EINPUT);
    ck_assert_int_eq(sb_tvutable_alloc(&o3, analytic, NULL, &t, &err),
                     SB_EINPUT);
    ck_assert_ptr_null(t);
}
END_TEST

START_TEST(function_failure_is_passed_on)
{
    struct sb_tvutable_opts o = {1.0, 60 * DEG, 1e-3};
    struct sb_tvutable *t;
    struct sb_error err;
    double tv, th;

    ck_assert_int_eq(sb_tvutable_alloc(&o, failing, NULL, &t, &err), SB_OK);
    ck_assert_int_eq(sb_tvutable_lookup(t, 60, 0, &tv, &th, &err), SB_ENUM);
    ck_assert_int_eq(sb_tvutable_lookup(t, 60, 0, &tv, &th, &err), SB_ENUM);
    sb_tvutable_free(t);
}
END_TEST

/* A plausible invented system (figures of the kind a launch carries; the
 * values only need to exercise every term, not to match any product). */
static void demo_system(struct sb_system *s)
{
    struct sb_error err;

    sb_system_init_defaults(s);
    ck_assert_int_eq(sb_stated_parse("3 cm 95%", SB_DIM_LENGTH, SB_STATED_2D,
                                     &s->positioning.horizontal, &err),
                     SB_OK);
    ck_assert_int_eq(sb_stated_parse("0.03 deg", SB_DIM_ANGLE, 0,
                                     &s->motion.roll, &err), SB_OK);
    ck_assert_int_eq(sb_stated_parse("0.03 deg", SB_DIM_ANGLE, 0,
                                     &s->motion.pitch, &err), SB_OK);
    ck_assert_int_eq(sb_stated_parse("0.05 deg", SB_DIM_ANGLE, 0,
                                     &s->motion.heading, &err), SB_OK);
    ck_assert_int_eq(sb_stated_parse("5 cm", SB_DIM_LENGTH, 0,
                                     &s->motion.heave, &err), SB_OK);
    ck_assert_int_eq(sb_stated_parse("2 m/s", SB_DIM_SPEED, 0,
                                     &s->sound_speed.column_u, &err), SB_OK);
    ck_assert_int_eq(sb_stated_parse("0.5 m/s", SB_DIM_SPEED, 0,
                                     &s->sound_speed.surface_u, &err), SB_OK);
    ck_assert_int_eq(sb_stated_parse("1 cm res", SB_DIM_LENGTH, 0,
                                     &s->echosounder.range_resolution, &err),
                     SB_OK);
    ck_assert_int_eq(sb_stated_parse("5 %", SB_DIM_RATIO | SB_DIM_ANGLE, 0,
                                     &s->echosounder.pointing, &err), SB_OK);
    ck_assert_int_eq(sb_stated_parse("3 cm", SB_DIM_LENGTH, 0,
                                     &s->vertical.water_level, &err), SB_OK);
    s->vertical.draft = 0.6;
    s->transducer.y = 0.4; /* off the centreline: port and starboard differ */
    s->echosounder.max_angle = 72 * DEG;
    ck_assert_int_eq(sb_system_validate(s, &err), SB_OK);
}

START_TEST(bound_holds_engine)
{
    struct sb_system sys;
    struct sb_error err;
    struct sb_horiz95 *h;
    struct sb_tvu_engine eng;
    struct sb_tvutable_opts o;
    struct sb_tvutable *t;
    double worst;

    demo_system(&sys);
    h = sb_horiz95_alloc(&err);
    ck_assert_ptr_nonnull(h);
    eng.sys = &sys;
    eng.h95 = h;
    eng.thu_rule = SB_THU_EXACT;
    o.depth_min_m = sb_tvu_engine_depth_min(&sys);
    o.angle_max_rad = sys.echosounder.max_angle;
    o.tol_rel = 1e-3;
    ck_assert(fabs(o.depth_min_m - 0.7) < 1e-12);
    ck_assert_int_eq(sb_tvutable_alloc(&o, sb_tvu_engine, &eng, &t, &err),
                     SB_OK);
    /* the engine evaluated directly is the reference */
    worst = max_rel_error(t, sb_tvu_engine, &eng, o.depth_min_m, 300,
                          o.angle_max_rad, 20000, 7);
    ck_assert_msg(worst <= sb_tvutable_bound(t), "measured %g > claimed %g",
                  worst, sb_tvutable_bound(t));
    sb_tvutable_free(t);
    sb_horiz95_free(h);
}
END_TEST

static Suite *suite(void)
{
    Suite *s = suite_create("tvutable");
    TCase *tc = tcase_create("core");

    tcase_set_timeout(tc, 300);
    tcase_add_test(tc, bound_holds_analytic);
    tcase_add_test(tc, tight_tolerance_refines);
    tcase_add_test(tc, bilinear_is_exact);
    tcase_add_test(tc, lazy_octaves);
    tcase_add_test(tc, outside_is_refused);
    tcase_add_test(tc, bad_options);
    tcase_add_test(tc, function_failure_is_passed_on);
    tcase_add_test(tc, bound_holds_engine);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(suite());
    int failed;

    gsl_set_error_handler_off();
    srunner_run_all(sr, CK_NORMAL);
    failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed ? EXIT_FAILURE : EXIT_SUCCESS;
}
