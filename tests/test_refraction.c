/*
 * Tests of refraction in the error engine (src/lib/refraction.c, the
 * profile path of src/lib/georef.c, propagate.c and swath.c, and the
 * sound_speed profile keys of src/lib/spec.c).
 *
 * Check values and their sources:
 *  - Scaled profile, transducer speed known (Snell parameter p fixed): for a
 *    uniform water column (speed c) scaled by (1 + eps) the sounding moves
 *    by dZ = d eps (1 - tan^2 theta), dE = 2 y eps to first order; closed
 *    form derived in docs/model.md, section 10 ("Refraction: scaled
 *    profile").  The remainders are O(eps^2) and bounded in the test from
 *    the exact expressions z'/d = u sqrt(1 - s^2 u^2) / cos(theta),
 *    y'/y = u^2 (u = 1 + eps, s = sin theta), so the tolerance is that
 *    bound, not a guess.
 *  - Strong thermocline: an independent integration written here, Snell's
 *    law layer by layer with a constant speed in each 1 cm slab (the speed
 *    of the linear profile at the slab's middle): dx = dz tan(theta_i),
 *    dt = dz / (c_i cos(theta_i)), sin(theta_i) = p c_i.  The midpoint rule
 *    converges as h^2; with h = 1 cm and the profile below its error is far
 *    under the 1e-7 relative tolerance used (bound in the test).
 *  - Turning ray in a linear layer: the circular arc of ray acoustics
 *    (Medwin & Clay 1998, Fundamentals of Acoustical Oceanography, ch. 3,
 *    from memory): the ray turns where c = 1/p, at offset cos(theta0)/(p g),
 *    after the time (1/g) ln(1 / tan(theta0 / 2)).
 *  - Casts that are uniform scalings (1 + eps_k) of one column: the spread
 *    of their soundings follows from the same first-order closed form.
 *  - The straight-ray model (constant column) as an independent method for
 *    a profile of constant speed.
 */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "swathbudget/georef.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/propagate.h"
#include "swathbudget/refraction.h"
#include "swathbudget/spec.h"
#include "swathbudget/swath.h"
#include "swathbudget/system.h"

#define PI 3.14159265358979323846
#define DEG (PI / 180.0)

static void stated(struct sb_stated *s, double u, unsigned dim)
{
    memset(s, 0, sizeof *s);
    s->value = s->u = s->written = u;
    s->dim = dim;
    s->type = SB_UTYPE_SD;
    s->dist = SB_DIST_NORMAL;
}

/* A perfect system with the transducer at draft metres. */
static void base(struct sb_system *s, double draft)
{
    sb_system_init_defaults(s);
    s->vertical.draft = draft;
    s->echosounder.max_angle = 80.0 * DEG;
}

/* ---- 1. scaled profile against the first-order closed form -------------- */

/* |d^2/du^2 of u sqrt(1 - s^2 u^2) / cos(theta)|: the O(eps^2) remainder
 * coefficient of z'/d (docs/model.md derives the first derivative). */
static double fpp(double s, double c, double u)
{
    double q = 1.0 - s * s * u * u;
    return fabs(s * s * u * (-3.0 + 2.0 * s * s * u * u) / (c * q * sqrt(q)));
}

START_TEST(scaled_profile_closed_form)
{
    struct sb_system sys;
    struct sb_error err;
    base(&sys, 2.0);
    /* a uniform column given as a layered profile (21 samples, g = 0) */
    double z[21], c[21];
    for (int i = 0; i < 21; i++) {
        z[i] = 10.0 * i;
        c[i] = 1500.0;
    }
    ck_assert_int_eq(sb_system_set_profile(&sys, z, c, 21, &err), SB_OK);
    ck_assert_int_eq(sb_system_validate(&sys, &err), SB_OK);
    const double depth = 102.0, d = 100.0; /* below the transducer */
    const double epss[] = {1e-4, -1e-4, 1e-3};
    for (int ia = 0; ia <= 14; ia++) {
        double th = (ia * 5.0) * DEG * (ia % 2 ? -1.0 : 1.0);
        struct sb_beam b;
        ck_assert_int_eq(sb_beam_setup(&sys, depth, th, &b, &err), SB_OK);
        double s = sin(fabs(th)), co = cos(th), y = d * tan(th);
        for (size_t k = 0; k < sizeof epss / sizeof epss[0]; k++) {
            double eps = epss[k], dx[SB_COMP_COUNT] = {0}, e[3];
            dx[SB_COMP_COLUMN_SS] = eps;
            sb_georef_error(&b, dx, e);
            double fz = d * eps * (1.0 - tan(th) * tan(th));
            double fe = 2.0 * y * eps;
            /* Lagrange remainder bound (with a factor 2 margin) and
             * rounding of the layered sums */
            double u1 = 1.0 + fabs(eps);
            double tz = d * eps * eps * fmax(fpp(s, co, 1.0), fpp(s, co, u1)) + 1e-9;
            double te = 1.01 * fabs(y) * eps * eps + 1e-9;
            ck_assert_msg(fabs(e[2] - fz) <= tz, "theta %g eps %g: dZ %.12g, closed form %.12g",
                          th / DEG, eps, e[2], fz);
            ck_assert_msg(fabs(e[0] - fe) <= te, "theta %g eps %g: dE %.12g, closed form %.12g",
                          th / DEG, eps, e[0], fe);
            ck_assert(fabs(e[1]) < 1e-12);
        }
        /* the Jacobian (linearised ray) has the exact first derivative */
        double j[SB_COMP_COUNT][3];
        sb_jacobian(&b, j);
        double jz = d * (1.0 - tan(th) * tan(th)), je = 2.0 * y;
        ck_assert_msg(fabs(j[SB_COMP_COLUMN_SS][2] - jz) <= 1e-6 * (fabs(d) + fabs(jz)),
                      "theta %g: dZ/deps %.10g vs %.10g", th / DEG, j[SB_COMP_COLUMN_SS][2], jz);
        ck_assert(fabs(j[SB_COMP_COLUMN_SS][0] - je) <= 1e-6 * (d + fabs(je)));
    }
    sb_system_release(&sys);
}
END_TEST

/* ---- 2. strong thermocline against 1 cm slabs ---------------------------- */

static const double TZ[] = {0, 5, 10, 12, 14, 16, 18, 20, 30, 60, 100};
static const double TC[] = {1525.0, 1524.5, 1524.0, 1515.0, 1500.0, 1490.0,
                            1484.0, 1482.0, 1481.0, 1480.0, 1482.0};
#define TN (sizeof TZ / sizeof TZ[0])

/* The profile's speed, written here independently: linear between samples,
 * constant outside. */
static double tspeed(double zq)
{
    if (zq <= TZ[0])
        return TC[0];
    for (size_t i = 0; i + 1 < TN; i++)
        if (zq <= TZ[i + 1])
            return TC[i] + (TC[i + 1] - TC[i]) * (zq - TZ[i]) / (TZ[i + 1] - TZ[i]);
    return TC[TN - 1];
}

/* Slab integration from z0 down to z1 (multiples of 1 cm from z0): time
 * and offset of the ray with Snell parameter p. */
static void slabs_to_depth(double p, double z0, double z1, double *t, double *x)
{
    const double h = 0.01;
    long n = lround((z1 - z0) / h);
    double tt = 0.0, xx = 0.0;
    for (long k = 0; k < n; k++) {
        double ci = tspeed(z0 + (k + 0.5) * h);
        double si = p * ci, ci_cos = sqrt(1.0 - si * si);
        tt += h / (ci * ci_cos);
        xx += h * si / ci_cos;
    }
    *t = tt;
    *x = xx;
}

/* Slab integration in time: depth and offset after time t from z0. */
static void slabs_at_time(double p, double z0, double t, double *z, double *x)
{
    const double h = 0.01;
    double tt = 0.0, xx = 0.0;
    for (long k = 0;; k++) {
        double ci = tspeed(z0 + (k + 0.5) * h);
        double si = p * ci, co = sqrt(1.0 - si * si);
        double dt = h / (ci * co);
        if (tt + dt >= t) { /* straight inside the slab */
            double f = (t - tt) / dt;
            *z = z0 + (k + f) * h;
            *x = xx + f * h * si / co;
            return;
        }
        tt += dt;
        xx += h * si / co;
    }
}

START_TEST(thermocline_against_slabs)
{
    struct sb_system sys;
    struct sb_error err;
    base(&sys, 2.0);
    ck_assert_int_eq(sb_system_set_profile(&sys, TZ, TC, TN, &err), SB_OK);
    const double depth = 80.0, ct = tspeed(2.0);
    const double angles[] = {0.0, 20.0, -35.0, 50.0, 65.0, -72.0};
    for (size_t i = 0; i < sizeof angles / sizeof angles[0]; i++) {
        double th = angles[i] * DEG, p = sin(fabs(th)) / ct;
        struct sb_beam b;
        ck_assert_int_eq(sb_beam_setup(&sys, depth, th, &b, &err), SB_OK);
        double t, x;
        slabs_to_depth(p, 2.0, depth, &t, &x);
        /* midpoint-rule error: h^2/24 * depth * max|f''|, with f'' of
         * 1/(c cos) and tan of the order (g/c)^2 (1 + tan^4) f: below 1e-9
         * relative here; 1e-7 leaves room for rounding over 7800 slabs */
        ck_assert_msg(fabs(b.t_oneway_s - t) <= 1e-7 * t, "angle %g: t %.12g vs slabs %.12g",
                      angles[i], b.t_oneway_s, t);
        ck_assert_msg(fabs(fabs(b.across_m) - x) <= 1e-7 * (x + 1.0),
                      "angle %g: x %.12g vs slabs %.12g", angles[i], b.across_m, x);
        ck_assert(th >= 0.0 ? b.across_m >= 0.0 : b.across_m <= 0.0);

        /* audit direction: a range error of 0.8 m is a time error 0.8 m / c
         * (c the column speed the engine states); the sounding goes where
         * the ray is after t + dt */
        double dx[SB_COMP_COUNT] = {0}, e[3];
        dx[SB_COMP_RANGE] = 0.8;
        sb_georef_error(&b, dx, e);
        double zs, xs;
        slabs_at_time(p, 2.0, t + 0.8 / sys.sound_speed.column, &zs, &xs);
        ck_assert_msg(fabs(e[2] - (zs - depth)) <= 1e-6, "angle %g: dZ %.9g vs slabs %.9g",
                      angles[i], e[2], zs - depth);
        double de = (th < 0.0 ? -1.0 : 1.0) * (xs - x);
        ck_assert_msg(fabs(e[0] - de) <= 1e-6, "angle %g: dE %.9g vs slabs %.9g",
                      angles[i], e[0], de);
    }
    sb_system_release(&sys);
}
END_TEST

/* The general tracer (raytrace.h) is a second implementation: the engine's
 * travel times must agree with it as well -- checked by the slab test above
 * for both; here the linearised Jacobian against central differences of the
 * exact (re-traced) model on the same thermocline, every component. */
START_TEST(linear_jacobian_matches_exact)
{
    struct sb_system sys;
    struct sb_error err;
    base(&sys, 2.0);
    stated(&sys.motion.roll, 0.05 * DEG, SB_DIM_ANGLE);
    stated(&sys.motion.pitch, 0.05 * DEG, SB_DIM_ANGLE);
    stated(&sys.motion.heading, 0.1 * DEG, SB_DIM_ANGLE);
    stated(&sys.sound_speed.surface_u, 0.5, SB_DIM_SPEED);
    stated(&sys.sound_speed.column_u, 0.002, SB_DIM_RATIO);
    stated(&sys.echosounder.range_resolution, 0.02, SB_DIM_LENGTH);
    stated(&sys.echosounder.pointing, 0.1, SB_DIM_RATIO);
    stated(&sys.motion.align_pitch, 0.05 * DEG, SB_DIM_ANGLE);
    ck_assert_int_eq(sb_system_set_profile(&sys, TZ, TC, TN, &err), SB_OK);
    ck_assert_int_eq(sb_system_validate(&sys, &err), SB_OK);
    const double angles[] = {0.0, 10.0, -45.0, 60.0, 70.0};
    for (size_t i = 0; i < sizeof angles / sizeof angles[0]; i++) {
        struct sb_beam b;
        ck_assert_int_eq(sb_beam_setup(&sys, 60.0, angles[i] * DEG, &b, &err), SB_OK);
        double j[SB_COMP_COUNT][3];
        sb_jacobian(&b, j);
        for (int c = 0; c < SB_COMP_COUNT; c++) {
            if (!(b.u[c] > 0.0))
                continue;
            double h = 1e-3 * b.u[c], dx[SB_COMP_COUNT] = {0}, ep[3], em[3];
            dx[c] = h;
            sb_georef_error(&b, dx, ep);
            dx[c] = -h;
            sb_georef_error(&b, dx, em);
            for (int a = 0; a < 3; a++) {
                double ref = (ep[a] - em[a]) / (2.0 * h);
                double scale = (fabs(j[c][0]) + fabs(j[c][1]) + fabs(j[c][2])) * b.u[c];
                ck_assert_msg(fabs(j[c][a] - ref) * b.u[c] <= 1e-6 * scale + 1e-10,
                              "angle %g comp %s axis %d: %.10g vs %.10g", angles[i],
                              sb_component_name(c), a, j[c][a], ref);
            }
        }
        /* all dx = 0 gives exactly 0 */
        double z0[SB_COMP_COUNT] = {0}, e[3];
        sb_georef_error(&b, z0, e);
        ck_assert(e[0] == 0.0 && e[1] == 0.0 && e[2] == 0.0);
    }
    sb_system_release(&sys);
}
END_TEST

/* A walk down a column of depths (redepth, cursor) equals fresh set-ups. */
START_TEST(redepth_equals_setup)
{
    struct sb_system sys;
    struct sb_error err;
    base(&sys, 2.0);
    stated(&sys.motion.roll, 0.05 * DEG, SB_DIM_ANGLE);
    ck_assert_int_eq(sb_system_set_profile(&sys, TZ, TC, TN, &err), SB_OK);
    struct sb_beam w, f;
    ck_assert_int_eq(sb_beam_setup(&sys, 5.0, 55.0 * DEG, &w, &err), SB_OK);
    const double deps[] = {5.0, 11.0, 11.5, 30.0, 99.0, 150.0, 20.0, 60.0};
    for (size_t i = 0; i < sizeof deps / sizeof deps[0]; i++) {
        ck_assert_int_eq(sb_beam_redepth(&w, deps[i], &err), SB_OK);
        ck_assert_int_eq(sb_beam_setup(&sys, deps[i], 55.0 * DEG, &f, &err), SB_OK);
        ck_assert_double_eq(w.t_oneway_s, f.t_oneway_s);
        ck_assert_double_eq(w.across_m, f.across_m);
        struct sb_tpu tw, tf;
        ck_assert_int_eq(sb_propagate(&w, NULL, &tw, NULL), SB_OK);
        ck_assert_int_eq(sb_propagate(&f, NULL, &tf, NULL), SB_OK);
        ck_assert_double_eq(tw.tvu95_m, tf.tvu95_m);
        double z0[SB_COMP_COUNT] = {0}, e[3];
        sb_georef_error(&w, z0, e);
        ck_assert(e[0] == 0.0 && e[1] == 0.0 && e[2] == 0.0);
    }
    sb_system_release(&sys);
}
END_TEST

/* ---- 3. a constant profile against the straight-ray model ---------------- */

START_TEST(constant_profile_equals_straight_rays)
{
    struct sb_system a, p;
    struct sb_error err;
    base(&a, 1.5);
    stated(&a.motion.roll, 0.03 * DEG, SB_DIM_ANGLE);
    stated(&a.motion.pitch, 0.03 * DEG, SB_DIM_ANGLE);
    stated(&a.motion.heading, 0.05 * DEG, SB_DIM_ANGLE);
    stated(&a.sound_speed.surface_u, 0.8, SB_DIM_SPEED);
    /* column_u stays 0: the two models define the column error
     * differently on purpose -- the constant column scales every speed,
     * the transducer's included, so the angles hold (dZ = D eps); a profile
     * is scaled below the transducer with the transducer speed known, so p
     * holds (dZ = D eps (1 - tan^2), tested above).  docs/model.md s. 5. */
    stated(&a.echosounder.range_resolution, 0.03, SB_DIM_LENGTH);
    stated(&a.echosounder.pointing, 0.1, SB_DIM_RATIO);
    stated(&a.positioning.horizontal, 0.05, SB_DIM_LENGTH);
    a.sound_speed.surface = a.sound_speed.column = 1490.0;
    p = a;
    const double z[] = {0.0, 50.0, 300.0}, c[] = {1490.0, 1490.0, 1490.0};
    ck_assert_int_eq(sb_system_set_profile(&p, z, c, 3, &err), SB_OK);
    ck_assert_double_eq_tol(p.sound_speed.column, 1490.0, 1e-12);
    for (int ia = -7; ia <= 7; ia++) {
        struct sb_beam ba, bp;
        struct sb_tpu ta, tp;
        double th = ia * 10.0 * DEG;
        ck_assert_int_eq(sb_beam_setup(&a, 120.0, th, &ba, &err), SB_OK);
        ck_assert_int_eq(sb_beam_setup(&p, 120.0, th, &bp, &err), SB_OK);
        ck_assert_double_eq_tol(bp.t_oneway_s, ba.t_oneway_s, 1e-12 * ba.t_oneway_s);
        ck_assert_double_eq_tol(bp.across_m, ba.across_m, 1e-9);
        ck_assert_int_eq(sb_propagate(&ba, NULL, &ta, NULL), SB_OK);
        ck_assert_int_eq(sb_propagate(&bp, NULL, &tp, NULL), SB_OK);
        ck_assert_double_eq_tol(tp.tvu95_m, ta.tvu95_m, 1e-8 * ta.tvu95_m);
        ck_assert_double_eq_tol(tp.sigma_h_max_m, ta.sigma_h_max_m, 1e-8 * ta.sigma_h_max_m);
        /* exact model, larger errors: same sounding */
        double dx[SB_COMP_COUNT] = {0}, ea[3], ep[3];
        dx[SB_COMP_ROLL] = 0.5 * DEG;
        dx[SB_COMP_SURFACE_SS] = 3.0;
        dx[SB_COMP_RANGE] = 0.2;
        dx[SB_COMP_POINTING_ALONG] = 0.3 * DEG;
        sb_georef_error(&ba, dx, ea);
        sb_georef_error(&bp, dx, ep);
        for (int k = 0; k < 3; k++)
            ck_assert_double_eq_tol(ep[k], ea[k], 1e-9);
    }
    sb_system_release(&p);
}
END_TEST

/* ---- 4. cast variability ------------------------------------------------- */

START_TEST(cast_spread_closed_form)
{
    /* four casts, each a uniform column 1500 (1 + eps_k) */
    const double delta = 2e-4, eps[4] = {0.0, delta, -delta, 2.0 * delta};
    double zk[4][2], ck[4][2];
    const double *zp[4], *cp[4];
    size_t nk[4];
    for (int k = 0; k < 4; k++) {
        zk[k][0] = 0.0;
        zk[k][1] = 300.0;
        ck[k][0] = ck[k][1] = 1500.0 * (1.0 + eps[k]);
        zp[k] = zk[k];
        cp[k] = ck[k];
        nk[k] = 2;
    }
    for (int ref = 0; ref < 2; ref++) {
        struct sb_system sys;
        struct sb_error err;
        base(&sys, 0.0);
        /* ref 0: cast 1 is the reference: the others count, sum eps^2 =
         * 6 delta^2 over n - 1 = 3; ref 1: the mean (1500 (1 + delta/2))
         * is the reference */
        ck_assert_int_eq(sb_system_set_casts(&sys, zp, cp, nk, 4,
                                             ref == 0 ? 0 : SB_REFERENCE_MEAN, &err),
                         SB_OK);
        ck_assert_int_eq(sb_system_validate(&sys, &err), SB_OK);
        double var;
        if (ref == 0) {
            var = (delta * delta + delta * delta + 4.0 * delta * delta) / 3.0;
        } else {
            /* relative to the mean speed cm = 1500 (1 + m): eps'_k =
             * (1 + eps_k) / (1 + m) - 1 */
            double m = (eps[0] + eps[1] + eps[2] + eps[3]) / 4.0, s = 0.0;
            for (int k = 0; k < 4; k++) {
                double e = (1.0 + eps[k]) / (1.0 + m) - 1.0;
                s += e * e;
            }
            var = s / 3.0;
        }
        const double d = 80.0;
        for (int ia = 0; ia <= 7; ia++) {
            double th = ia * 10.0 * DEG;
            struct sb_beam b;
            struct sb_tpu t;
            struct sb_breakdown bd;
            ck_assert_int_eq(sb_beam_setup(&sys, d, th, &b, &err), SB_OK);
            ck_assert_int_eq(sb_propagate(&b, NULL, &t, &bd), SB_OK);
            double sz = d * fabs(1.0 - tan(th) * tan(th)) * sqrt(var);
            double sh = 2.0 * d * tan(th) * sqrt(var);
            /* O(eps^2) remainder: relative 3 * 2 delta * (1 + tan^2)^2 */
            double rel = 6.0 * 2.0 * delta * pow(1.0 + tan(th) * tan(th), 2.0);
            ck_assert_msg(fabs(fabs(bd.cz[SB_COMP_REFRACTION]) - sz) <=
                              rel * d * sqrt(var) + 1e-9,
                          "ref %d theta %g: %.9g vs %.9g", ref, th / DEG,
                          bd.cz[SB_COMP_REFRACTION], sz);
            ck_assert_msg(fabs(bd.ch[SB_COMP_REFRACTION] - sh) <= rel * (sh + 1e-3) + 1e-9,
                          "ref %d theta %g: %.9g vs %.9g", ref, th / DEG,
                          bd.ch[SB_COMP_REFRACTION], sh);
            ck_assert_str_eq(sb_component_group(SB_COMP_REFRACTION), "refraction");
        }
        sb_system_release(&sys);
    }
}
END_TEST

/* ---- 5. turning rays ---------------------------------------------------- */

START_TEST(turning_rays)
{
    /* 1470 m/s at the surface rising to 1530 m/s at 50 m (g = 1.2 1/s),
     * constant below */
    const double z[] = {0.0, 50.0}, c[] = {1470.0, 1530.0};
    struct sb_system sys;
    struct sb_error err;
    base(&sys, 0.0);
    stated(&sys.motion.roll, 0.02 * DEG, SB_DIM_ANGLE);
    stated(&sys.positioning.horizontal, 0.05, SB_DIM_LENGTH);
    ck_assert_int_eq(sb_system_set_profile(&sys, z, c, 2, &err), SB_OK);
    /* Snell: rays with sin(theta) >= 1470/1530 turn above 50 m */
    const double aturn = asin(1470.0 / 1530.0);
    ck_assert_double_eq_tol(sb_beam_turn_angle(&sys, 100.0), aturn, 1e-14);
    ck_assert_double_eq_tol(sb_beam_turn_angle(&sys, 25.0), asin(1470.0 / 1500.0), 1e-14);
    struct sb_beam b;
    ck_assert_int_eq(sb_beam_setup(&sys, 100.0, aturn + 1e-6, &b, &err), SB_RAY_TURNS);
    ck_assert_ptr_nonnull(strstr(err.msg, "turns"));
    ck_assert_int_eq(sb_beam_setup(&sys, 100.0, -(aturn + 1e-6), &b, &err), SB_RAY_TURNS);
    ck_assert_int_eq(sb_beam_setup(&sys, 100.0, aturn - 1e-4, &b, &err), SB_OK);
    /* the exact model never gives NaN, even for a ray that turns on the
     * way (+5 % profile scale) */
    double dx[SB_COMP_COUNT] = {0}, e[3];
    dx[SB_COMP_COLUMN_SS] = 0.05;
    dx[SB_COMP_ROLL] = -0.1;
    sb_georef_error(&b, dx, e);
    ck_assert(isfinite(e[0]) && isfinite(e[1]) && isfinite(e[2]));
    struct sb_tpu t;
    ck_assert_int_eq(sb_propagate(&b, NULL, &t, NULL), SB_OK);
    ck_assert(isfinite(t.tvu95_m));

    /* the swath ends where the rays turn when no limit fails first */
    struct sb_swath_result r;
    ck_assert_int_eq(sb_swath_fail(&sys, NULL, 100.0, INFINITY, INFINITY, SB_THU_S44, &r, &err),
                     SB_OK);
    ck_assert_int_eq(r.port.reason, SB_SWATH_RAY_TURNS);
    ck_assert_int_eq(r.starboard.reason, SB_SWATH_RAY_TURNS);
    ck_assert_str_eq(sb_swath_reason_name(r.starboard.reason), "ray_turns");
    ck_assert_double_eq_tol(r.starboard.angle_rad, aturn, 1e-7);
    ck_assert(isfinite(r.width_m) && r.width_m > 0.0);

    /* a grid across the turning angle: marked points, no NaN */
    const double deps[] = {30.0, 100.0}, angs[] = {-78.0 * DEG, 0.0, 70.0 * DEG, 78.0 * DEG};
    struct sb_grid_point g[8];
    ck_assert_int_eq(sb_swath_grid(&sys, NULL, deps, 2, angs, 4, g, &err), SB_OK);
    for (int i = 0; i < 8; i++) {
        ck_assert(!isnan(g[i].tvu95_m));
        ck_assert_int_eq(g[i].ray_turns, isinf(g[i].tvu95_m) ? 1 : 0);
    }
    ck_assert_int_eq(g[0].ray_turns, 1);     /* 30 m, 78 deg port: 1470/1506 < sin 78 */
    ck_assert_int_eq(g[1].ray_turns, 0);
    ck_assert_int_eq(g[2].ray_turns, 0);     /* 70 deg at 30 m: 1470/1506 > sin 70 */
    ck_assert_int_eq(g[4 + 3].ray_turns, 1); /* 100 m, 78 deg */
    ck_assert_int_eq(g[4 + 2].ray_turns, 0); /* 100 m, 70 deg < 73.86 deg */
    sb_system_release(&sys);
}
END_TEST

START_TEST(turning_point_closed_form)
{
    /* one linear layer to 1000 m: c = 1480 + 0.1 z */
    const double z[] = {0.0, 1000.0}, c[] = {1480.0, 1580.0};
    struct sb_refraction *r;
    struct sb_error err;
    ck_assert_int_eq(sb_refraction_alloc_profile(z, c, 2, NULL, &r, &err), SB_OK);
    struct sb_svp_start st;
    sb_svp_start_at(&r->ref, 0.0, &st);
    const double th0 = 70.0 * DEG, g = 0.1, p = sin(th0) / 1480.0;
    const double zturn = (1.0 / p - 1480.0) / g;          /* c = 1/p */
    const double xturn = cos(th0) / (p * g);              /* arc, (1) */
    const double tturn = log(1.0 / tan(th0 / 2.0)) / g;   /* (2) */
    double zz, w;
    ck_assert_int_eq(sb_svp_at_time(&r->ref, &st, p, tturn, NULL, &zz, &w), SB_OK);
    ck_assert_double_eq_tol(zz, zturn, 1e-6 * zturn);
    ck_assert_double_eq_tol(p * w, xturn, 1e-6 * xturn);
    /* past the turn: the mirror image of the way down */
    double zd, wd, zu, wu;
    ck_assert_int_eq(sb_svp_at_time(&r->ref, &st, p, tturn - 0.05, NULL, &zd, &wd), SB_OK);
    ck_assert_int_eq(sb_svp_at_time(&r->ref, &st, p, tturn + 0.05, NULL, &zu, &wu), SB_ENUM);
    ck_assert_double_eq_tol(zu, zd, 1e-6);
    ck_assert_double_eq_tol(p * wu, 2.0 * xturn - p * wd, 1e-5);
    /* and far past it: back at the transducer depth, finite */
    ck_assert_int_eq(sb_svp_at_time(&r->ref, &st, p, 10.0 * tturn, NULL, &zu, &wu), SB_ENUM);
    ck_assert_double_eq_tol(zu, 0.0, 1e-12);
    ck_assert(isfinite(wu));
    /* the planning direction refuses depths below the turn */
    struct sb_svp_point pt;
    ck_assert_int_eq(sb_svp_to_depth(&r->ref, &st, p, zturn + 1.0, NULL, &pt), SB_ENUM);
    ck_assert_int_eq(sb_svp_to_depth(&r->ref, &st, p, zturn - 1.0, NULL, &pt), SB_OK);
    sb_refraction_free(r);
}
END_TEST

/* ---- 6. the system file ------------------------------------------------- */

static char tmpdir[256];

static void put(const char *name, const char *text)
{
    char path[512];
    snprintf(path, sizeof path, "%s/%s", tmpdir, name);
    FILE *f = fopen(path, "w");
    ck_assert_ptr_nonnull(f);
    fputs(text, f);
    fclose(f);
}

static const char *HEAD =
    "name: refr-test\n"
    "lever_arms:\n"
    "  antenna: {x: 0 m, y: 0 m, z: -2 m, uncertainty: 1 cm}\n"
    "  transducer: {x: 0 m, y: 0 m, z: 1 m, uncertainty: 1 cm}\n"
    "  motion_sensor: {x: 0 m, y: 0 m, z: 0 m, uncertainty: 1 cm}\n"
    "positioning: {horizontal: 5 cm, vertical: 5 cm}\n"
    "motion:\n"
    "  roll: 0.02 deg\n"
    "  pitch: 0.02 deg\n"
    "  heading: 0.05 deg\n"
    "  heave: 5 cm\n"
    "  alignment: {roll: 0.02 deg, pitch: 0.02 deg, heading: 0.02 deg}\n";
static const char *TAIL =
    "echosounder:\n"
    "  frequency: 300 kHz\n"
    "  beam_width_across: 1 deg\n"
    "  beam_width_along: 1 deg\n"
    "  array: flat\n"
    "  range_resolution: 2 cm\n"
    "  pointing: 5 %\n"
    "  max_beam_angle: 70 deg\n"
    "vertical_reference:\n"
    "  method: tide_gauge\n"
    "  draft: {nominal: 1 m, uncertainty: 2 cm}\n"
    "  water_level: 2 cm\n"
    "  zoning: 2 cm\n"
    "conditions:\n"
    "  speed: 2 m/s\n"
    "  roll_amplitude: 2 deg\n"
    "  roll_period: 6 s\n"
    "  pitch_amplitude: 1 deg\n"
    "  pitch_period: 5 s\n"
    "  heave_amplitude: 0.2 m\n";

/* Load HEAD + ss (the sound_speed section, starting at line 13) + TAIL
 * from tmpdir/sys.yaml. */
static int load_with(const char *ss, struct sb_system *s, struct sb_error *e)
{
    char text[4096], path[512];
    snprintf(text, sizeof text, "%s%s%s", HEAD, ss, TAIL);
    put("sys.yaml", text);
    snprintf(path, sizeof path, "%s/sys.yaml", tmpdir);
    sb_error_clear(e);
    return sb_spec_load(path, s, e);
}

static void expect_at(int rc, const struct sb_error *e, const char *file_end, int line,
                      int col, const char *what)
{
    ck_assert_int_eq(rc, SB_EINPUT);
    size_t lf = strlen(e->file), ls = strlen(file_end);
    ck_assert_msg(lf >= ls && strcmp(e->file + lf - ls, file_end) == 0, "file %s", e->file);
    ck_assert_msg(e->line == line && e->col == col, "at %d:%d (%s), expected %d:%d", e->line,
                  e->col, e->msg, line, col);
    ck_assert_msg(strstr(e->msg, what) != NULL, "message: %s", e->msg);
}

START_TEST(spec_profile_keys)
{
    struct sb_system s;
    struct sb_error e;
    snprintf(tmpdir, sizeof tmpdir, "/tmp/sb_refr_XXXXXX");
    ck_assert_ptr_nonnull(mkdtemp(tmpdir));
    char sub[300];
    snprintf(sub, sizeof sub, "%s/casts", tmpdir);
    ck_assert_int_eq(mkdir(sub, 0700), 0);
    put("casts/a.csv", "depth_m,speed_m_s\n0,1500\n10,1498\n25,1494\n40,1490\n");
    put("casts/b.csv", "depth_m,speed_m_s\n0,1502\n10,1499\n25,1496\n40,1492\n");
    put("casts/bad.csv", "depth_m,speed_m_s\n0,1500\n10,abc\n");

    /* a profile file relative to the spec's directory */
    ck_assert_msg(load_with("sound_speed:\n"
                               "  transducer: {nominal: 1500 m/s, uncertainty: 0.5 m/s}\n"
                               "  water_column: {model: profile, file: casts/a.csv, "
                               "uncertainty: 0.1 %}\n",
                               &s, &e) == SB_OK,
                  "%s:%d:%d: %s", e.file, e.line, e.col, e.msg);
    ck_assert_int_eq(s.sound_speed.model, SB_COLUMN_PROFILE);
    ck_assert_ptr_nonnull(s.sound_speed.refraction);
    /* depth average of the piecewise-linear profile (trapezoid rule) */
    ck_assert_double_eq_tol(s.sound_speed.column,
                            (10.0 * 1499.0 + 15.0 * 1496.0 + 15.0 * 1492.0) / 40.0, 1e-9);
    ck_assert_double_eq_tol(s.sound_speed.column_u.u, 0.001, 1e-15);
    sb_system_release(&s);

    /* inline samples */
    ck_assert_int_eq(load_with("sound_speed:\n"
                               "  transducer: {nominal: 1500 m/s, uncertainty: 0.5 m/s}\n"
                               "  water_column:\n"
                               "    model: profile\n"
                               "    samples: {depth_m: [0, 5, 20], speed_m_s: [1500, 1495, "
                               "1490]}\n"
                               "    uncertainty: 0.5 m/s\n",
                               &s, &e),
                     SB_OK);
    ck_assert_int_eq((int)s.sound_speed.refraction->ref.n, 3);
    sb_system_release(&s);

    /* casts with a named reference */
    ck_assert_int_eq(load_with("sound_speed:\n"
                               "  transducer: {nominal: 1500 m/s, uncertainty: 0.5 m/s}\n"
                               "  water_column: {model: casts, reference: casts/b.csv, "
                               "uncertainty: 0.2 m/s}\n"
                               "  casts: [casts/a.csv, casts/b.csv]\n",
                               &s, &e),
                     SB_OK);
    ck_assert_int_eq(s.sound_speed.model, SB_COLUMN_CASTS);
    ck_assert_int_eq(s.sound_speed.refraction->reference, 1);
    ck_assert_double_eq(s.sound_speed.refraction->ref.c[0], 1502.0);
    sb_system_release(&s);

    /* errors, each at its place: line 13 is "sound_speed:" */
    int rc = load_with("sound_speed:\n"
                       "  transducer: {nominal: 1500 m/s, uncertainty: 0.5 m/s}\n"
                       "  water_column: {model: casts, reference: mean, uncertainty: 0.2 m/s}\n"
                       "  casts: [casts/a.csv, casts/none.csv]\n",
                       &s, &e);
    expect_at(rc, &e, "sys.yaml", 16, 24, "casts[2]");
    rc = load_with("sound_speed:\n"
                   "  transducer: {nominal: 1500 m/s, uncertainty: 0.5 m/s}\n"
                   "  water_column: {model: casts, reference: mean, uncertainty: 0.2 m/s}\n"
                   "  casts: [casts/a.csv, casts/bad.csv]\n",
                   &s, &e);
    expect_at(rc, &e, "casts/bad.csv", 3, 4, "");
    rc = load_with("sound_speed:\n"
                   "  transducer: {nominal: 1500 m/s, uncertainty: 0.5 m/s}\n"
                   "  water_column: {model: casts, reference: c.csv, uncertainty: 0.2 m/s}\n"
                   "  casts: [casts/a.csv, casts/b.csv]\n",
                   &s, &e);
    expect_at(rc, &e, "sys.yaml", 15, 43, "not one of the casts");
    rc = load_with("sound_speed:\n"
                   "  transducer: {nominal: 1500 m/s, uncertainty: 0.5 m/s}\n"
                   "  water_column: {model: profile, nominal: 1490 m/s, uncertainty: 1 m/s}\n",
                   &s, &e);
    expect_at(rc, &e, "sys.yaml", 15, 34, "not used with model profile");
    rc = load_with("sound_speed:\n"
                   "  transducer: {nominal: 1500 m/s, uncertainty: 0.5 m/s}\n"
                   "  water_column: {model: constant, nominal: 1490 m/s, uncertainty: 1 m/s}\n"
                   "  casts: [casts/a.csv, casts/b.csv]\n",
                   &s, &e);
    expect_at(rc, &e, "sys.yaml", 16, 3, "only used with water_column model casts");
    rc = load_with("sound_speed:\n"
                   "  transducer: {nominal: 1500 m/s, uncertainty: 0.5 m/s}\n"
                   "  water_column:\n"
                   "    model: profile\n"
                   "    samples: {depth_m: [0, 5, 20], speed_m_s: [1500, 1495]}\n"
                   "    uncertainty: 0.5 m/s\n",
                   &s, &e);
    expect_at(rc, &e, "sys.yaml", 17, 47, "2 speeds for 3 depths");
    rc = load_with("sound_speed:\n"
                   "  transducer: {nominal: 1500 m/s, uncertainty: 0.5 m/s}\n"
                   "  water_column:\n"
                   "    model: profile\n"
                   "    samples: {depth_m: [0, 5, 5], speed_m_s: [1500, 1495, 1490]}\n"
                   "    uncertainty: 0.5 m/s\n",
                   &s, &e);
    expect_at(rc, &e, "sys.yaml", 17, 31, "sample 3");
    rc = load_with("sound_speed:\n"
                   "  transducer: {nominal: 1500 m/s, uncertainty: 0.5 m/s}\n"
                   "  water_column: {model: profile, uncertainty: 0.5 m/s}\n",
                   &s, &e);
    expect_at(rc, &e, "sys.yaml", 15, 17, "exactly one of file and samples");
    rc = load_with("sound_speed:\n"
                   "  transducer: {nominal: 1500 m/s, uncertainty: 0.5 m/s}\n"
                   "  water_column: {model: profile, file: casts/a.csv}\n",
                   &s, &e);
    expect_at(rc, &e, "sys.yaml", 15, 17, "uncertainty");

    const char *rm[] = {"casts/a.csv", "casts/b.csv", "casts/bad.csv", "sys.yaml", "casts"};
    for (size_t i = 0; i < sizeof rm / sizeof rm[0]; i++) {
        char p[600];
        snprintf(p, sizeof p, "%s/%s", tmpdir, rm[i]);
        ck_assert_int_eq(remove(p), 0);
    }
    ck_assert_int_eq(rmdir(tmpdir), 0);
}
END_TEST

static Suite *suite(void)
{
    Suite *s = suite_create("refraction");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 60);
    tcase_add_test(tc, scaled_profile_closed_form);
    tcase_add_test(tc, thermocline_against_slabs);
    tcase_add_test(tc, linear_jacobian_matches_exact);
    tcase_add_test(tc, redepth_equals_setup);
    tcase_add_test(tc, constant_profile_equals_straight_rays);
    tcase_add_test(tc, cast_spread_closed_form);
    tcase_add_test(tc, turning_rays);
    tcase_add_test(tc, turning_point_closed_form);
    tcase_add_test(tc, spec_profile_keys);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(suite());
    srunner_run_all(sr, CK_NORMAL);
    int failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed ? EXIT_FAILURE : EXIT_SUCCESS;
}
