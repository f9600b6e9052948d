/*
 * Tests of the layered ray tracer (src/lib/raytrace.c).
 *
 * Every check value comes from outside the tracer:
 *   - the straight-line geometry of a constant-speed medium (x = d tan theta,
 *     t = d / (c cos theta));
 *   - the textbook circular-arc closed forms of a constant-gradient layer,
 *     written here in their classic form (not the rearranged form the
 *     library uses): dx = (cos a - cos b) / (p g),
 *     dt = (1/g) ln[tan(b/2) / tan(a/2)]; Medwin & Clay (1998), Fundamentals
 *     of Acoustical Oceanography, ch. 3; Jensen et al. (2011), Computational
 *     Ocean Acoustics, ch. 3 (chapters quoted from memory);
 *   - independent numerical quadrature of dx = tan(theta) dz and
 *     dt = dz / (c cos theta) with sin(theta) = p c(z): a composite Simpson
 *     rule written here, and GSL's adaptive gsl_integration_qagp;
 *   - the numbers quoted in the project issue for c1 = 1500 m/s,
 *     g = 0.05 1/s, h = 200 m, theta1 = 30 deg (dx = 115.9844 m,
 *     dt = 0.1536202 s), which the two methods above reproduce;
 *   - the first-order profile-scale error of a flat seafloor
 *     (vertical d eps (1 - tan^2 theta), horizontal 2 y eps), derived from
 *     Snell's law in the project design guide and re-derived below.
 */
#include "swathbudget/raytrace.h"

#include <check.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_integration.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static const double PI = 3.14159265358979323846;
static double deg(double d) { return d * PI / 180.0; }

/* ---- independent references ------------------------------------------- */

/* Piecewise-linear profile held by the test itself (constant outside). */
struct prof {
    const double *z, *c;
    size_t n;
};

static double prof_c(const struct prof *P, double z)
{
    if (z <= P->z[0])
        return P->c[0];
    if (z >= P->z[P->n - 1])
        return P->c[P->n - 1];
    size_t i = 0;
    while (P->z[i + 1] < z)
        i++;
    return P->c[i] + (P->c[i + 1] - P->c[i]) * (z - P->z[i]) /
                         (P->z[i + 1] - P->z[i]);
}

struct integ {
    const struct prof *P;
    double p;
    int what; /* 0: dx/dz = tan theta; 1: dt/dz = 1 / (c cos theta) */
};

static double integrand(double z, void *v)
{
    const struct integ *I = v;
    double c = prof_c(I->P, z);
    double s = I->p * c;
    double co = sqrt(1.0 - s * s);
    return I->what == 0 ? s / co : 1.0 / (c * co);
}

/* Composite Simpson rule on [a, b] with n (even) intervals. */
static double simpson(double a, double b, int n, struct integ *I)
{
    double h = (b - a) / n, sum = integrand(a, I) + integrand(b, I);
    for (int i = 1; i < n; i++)
        sum += (i % 2 ? 4.0 : 2.0) * integrand(a + i * h, I);
    return sum * h / 3.0;
}

/* GSL adaptive quadrature with the profile samples as break points (the
 * integrand has kinks there). */
static double qagp(const struct prof *P, double p, int what, double z0,
                   double z1)
{
    double pts[64];
    size_t np = 0;
    pts[np++] = z0;
    for (size_t i = 0; i < P->n; i++)
        if (P->z[i] > z0 && P->z[i] < z1)
            pts[np++] = P->z[i];
    pts[np++] = z1;
    struct integ I = {P, p, what};
    gsl_function F = {integrand, &I};
    gsl_integration_workspace *w = gsl_integration_workspace_alloc(1000);
    double r, e;
    int st = gsl_integration_qagp(&F, pts, np, 0.0, 1e-13, 1000, w, &r, &e);
    gsl_integration_workspace_free(w);
    ck_assert_int_eq(st, GSL_SUCCESS);
    return r;
}

/* Classic textbook arc formulas for one layer (long double so that they
 * stay a valid reference even at small g). */
static void arc_classic(long double c_a, long double g, long double h,
                        long double p, long double *dx, long double *dt)
{
    long double c_b = c_a + g * h;
    long double a = asinl(p * c_a), b = asinl(p * c_b);
    *dx = (cosl(a) - cosl(b)) / (p * g);
    *dt = logl(tanl(b / 2) / tanl(a / 2)) / g;
}

static struct sb_raylayers *mk(const double *z, const double *c, size_t n,
                               double zt)
{
    struct sb_raylayers *L = NULL;
    struct sb_error err;
    int st = sb_raylayers_alloc(z, c, n, zt, &L, &err);
    ck_assert_msg(st == SB_OK, "alloc: %s", err.msg);
    return L;
}

/* An invented multi-layer profile with positive, negative and zero
 * gradients (demo-style data: used only as input, never as a check value). */
static const double MZ[] = {0.0, 5.0, 12.0, 20.0, 35.0, 60.0, 90.0, 150.0};
static const double MC[] = {1512.0, 1512.0, 1507.5, 1493.0,
                            1489.0, 1489.0, 1490.2, 1491.4};
#define MN (sizeof MZ / sizeof MZ[0])

/* ---- tests -------------------------------------------------------------- */

/* Constant speed: straight lines (geometry). */
START_TEST(test_constant_speed)
{
    const double z[] = {0.0, 100.0}, c[] = {1480.0, 1480.0};
    struct sb_raylayers *L = mk(z, c, 2, 3.0);
    for (double a = -70.0; a <= 70.0; a += 7.0) {
        struct sb_ray r;
        ck_assert_int_eq(sb_ray_init_angle(L, deg(a), 1.0, &r), SB_OK);
        ck_assert(!r.turns);
        for (double d = 3.0; d <= 400.0; d += 37.0) {
            double t, x, zz, xx;
            ck_assert_int_eq(sb_ray_at_depth(&r, d, &t, &x), SB_OK);
            double dd = d - 3.0;
            ck_assert_double_eq_tol(x, dd * tan(deg(a)), 1e-9);
            ck_assert_double_eq_tol(t, dd / (1480.0 * cos(deg(a))), 1e-13);
            /* and from the time back: range R = c t along the line */
            ck_assert_int_eq(sb_ray_at_time(&r, t, &zz, &xx), SB_OK);
            ck_assert_double_eq_tol(zz, d, 1e-9);
            ck_assert_double_eq_tol(xx, x, 1e-9);
        }
    }
    sb_raylayers_free(L);
}
END_TEST

/* One gradient layer: the numbers, the classic closed form, and
 * Simpson quadrature, all three independent of the library's algebra. */
START_TEST(test_single_gradient_layer)
{
    const double z[] = {0.0, 200.0}, c[] = {1500.0, 1510.0}; /* g = 0.05 1/s */
    struct sb_raylayers *L = mk(z, c, 2, 0.0);
    const double th = deg(30.0), p = sin(th) / 1500.0;
    struct sb_ray r;
    ck_assert_int_eq(sb_ray_init(L, p, 1.0, &r), SB_OK);
    double t, x;
    ck_assert_int_eq(sb_ray_at_depth(&r, 200.0, &t, &x), SB_OK);

    /* Numbers quoted in the issue (7 significant digits). */
    ck_assert_double_eq_tol(x, 115.9844, 5e-5);
    ck_assert_double_eq_tol(t, 0.1536202, 5e-8);

    /* Classic closed form. */
    long double dx, dt;
    arc_classic(1500.0L, 0.05L, 200.0L, (long double)p, &dx, &dt);
    ck_assert_double_eq_tol(x, (double)dx, 1e-10);
    ck_assert_double_eq_tol(t, (double)dt, 1e-14);

    /* Fine Simpson rule (h = 0.01 m: error ~ h^4 f'''' , far below 1e-9). */
    const struct prof P = {z, c, 2};
    struct integ Ix = {&P, p, 0}, It = {&P, p, 1};
    ck_assert_double_eq_tol(x, simpson(0.0, 200.0, 20000, &Ix), 1e-9);
    ck_assert_double_eq_tol(t, simpson(0.0, 200.0, 20000, &It), 1e-13);

    /* Partial depths inside the layer against the closed form too. */
    for (double d = 1.0; d < 200.0; d += 13.7) {
        ck_assert_int_eq(sb_ray_at_depth(&r, d, &t, &x), SB_OK);
        arc_classic(1500.0L, 0.05L, (long double)d, (long double)p, &dx, &dt);
        ck_assert_double_eq_tol(x, (double)dx, 1e-10);
        ck_assert_double_eq_tol(t, (double)dt, 1e-14);
    }
    sb_raylayers_free(L);
}
END_TEST

/* Vertical ray: no offset at all, t = ln(c_b / c_a) / g (integral of
 * dz / (c_a + g z)). */
START_TEST(test_vertical_ray)
{
    const double z[] = {0.0, 200.0}, c[] = {1500.0, 1510.0};
    struct sb_raylayers *L = mk(z, c, 2, 0.0);
    struct sb_ray r;
    ck_assert_int_eq(sb_ray_init_angle(L, 0.0, 1.0, &r), SB_OK);
    double t, x, zz;
    ck_assert_int_eq(sb_ray_at_depth(&r, 200.0, &t, &x), SB_OK);
    ck_assert(x == 0.0);
    ck_assert_double_eq_tol(t, log(1510.0 / 1500.0) / 0.05, 1e-14);
    ck_assert_int_eq(sb_ray_at_time(&r, t, &zz, &x), SB_OK);
    ck_assert_double_eq_tol(zz, 200.0, 1e-9);
    ck_assert(x == 0.0);
    ck_assert(sb_ray_angle_at(&r, 100.0) == 0.0);
    sb_raylayers_free(L);
}
END_TEST

/* Several layers (positive, negative, zero gradients, half-space) against
 * GSL adaptive quadrature with break points at the samples. */
START_TEST(test_multilayer_quadrature)
{
    const struct prof P = {MZ, MC, MN};
    const double zt = 2.5;
    struct sb_raylayers *L = mk(MZ, MC, MN, zt);
    const double c0 = 1512.0;
    ck_assert_double_eq_tol(sb_raylayers_transducer_speed(L), c0, 1e-12);
    for (double a = 0.0; a <= 70.0; a += 10.0) {
        double p = sin(deg(a)) / c0;
        struct sb_ray r;
        ck_assert_int_eq(sb_ray_init(L, p, 1.0, &r), SB_OK);
        ck_assert(!r.turns);
        const double ds[] = {3.0, 5.0, 11.0, 20.0, 47.3, 90.0, 149.0, 260.0};
        for (size_t i = 0; i < sizeof ds / sizeof ds[0]; i++) {
            double t, x;
            ck_assert_int_eq(sb_ray_at_depth(&r, ds[i], &t, &x), SB_OK);
            double xr = qagp(&P, p, 0, zt, ds[i]);
            double tr = qagp(&P, p, 1, zt, ds[i]);
            ck_assert_msg(fabs(x - xr) < 1e-8, "a=%g d=%g x=%.12g ref=%.12g",
                          a, ds[i], x, xr);
            ck_assert_msg(fabs(t - tr) < 1e-12, "a=%g d=%g t=%.15g ref=%.15g",
                          a, ds[i], t, tr);
        }
    }
    sb_raylayers_free(L);
}
END_TEST

/* Snell's law along the ray: sin(theta(z)) / c(z) stays p, and the local
 * slope of the traced path agrees with it: dx/dz = tan(theta) and
 * dt/dz = 1 / (c cos theta) (differential form of the ray equations). */
START_TEST(test_snell_invariance)
{
    struct sb_raylayers *L = mk(MZ, MC, MN, 0.0);
    const double scales[] = {1.0, 1.004};
    for (size_t si = 0; si < 2; si++) {
        double sc = scales[si];
        for (double a = 5.0; a <= 65.0; a += 15.0) {
            double p = sin(deg(a)) / 1512.0;
            struct sb_ray r;
            ck_assert_int_eq(sb_ray_init(L, p, sc, &r), SB_OK);
            for (double z = 1.0; z < 200.0; z += 6.1) {
                double c = sc * sb_raylayers_speed_at(L, z);
                double th = sb_ray_angle_at(&r, z);
                ck_assert_double_eq_tol(sin(th) / c, p, 1e-15);
                double h = 1e-4, t1, x1, t2, x2;
                ck_assert_int_eq(sb_ray_at_depth(&r, z - h, &t1, &x1), SB_OK);
                ck_assert_int_eq(sb_ray_at_depth(&r, z + h, &t2, &x2), SB_OK);
                ck_assert_double_eq_tol((x2 - x1) / (2 * h), tan(th), 1e-6);
                ck_assert_double_eq_tol((t2 - t1) / (2 * h),
                                        1.0 / (c * cos(th)), 1e-9);
            }
        }
    }
    sb_raylayers_free(L);
}
END_TEST

/* Planning and audit directions are inverses: depth -> time -> depth. */
START_TEST(test_round_trip)
{
    struct sb_raylayers *L = mk(MZ, MC, MN, 1.7);
    const double scales[] = {1.0, 0.997, 1.003};
    for (size_t si = 0; si < 3; si++) {
        for (double a = -75.0; a <= 75.0; a += 2.5) {
            struct sb_ray r;
            ck_assert_int_eq(sb_ray_init_angle(L, deg(a), scales[si], &r),
                             SB_OK);
            for (double d = 1.7; d < 600.0; d = d * 1.13 + 0.31) {
                double t, x, z2, x2;
                int st = sb_ray_at_depth(&r, d, &t, &x);
                if (st == SB_RAY_TURNED)
                    continue; /* steep scale-up may turn the widest rays */
                ck_assert_int_eq(st, SB_OK);
                ck_assert_int_eq(sb_ray_at_time(&r, t, &z2, &x2), SB_OK);
                ck_assert_msg(fabs(z2 - d) < 1e-9,
                              "a=%g d=%.12g back=%.12g", a, d, z2);
                ck_assert_msg(fabs(x2 - x) < 1e-9, "a=%g d=%g x %g vs %g", a,
                              d, x, x2);
            }
        }
    }
    sb_raylayers_free(L);
}
END_TEST

/* Port and starboard are mirror images. */
START_TEST(test_port_symmetry)
{
    struct sb_raylayers *L = mk(MZ, MC, MN, 0.0);
    struct sb_ray s, pt;
    ck_assert_int_eq(sb_ray_init_angle(L, deg(48.0), 1.0, &s), SB_OK);
    ck_assert_int_eq(sb_ray_init_angle(L, deg(-48.0), 1.0, &pt), SB_OK);
    for (double d = 0.0; d < 300.0; d += 17.0) {
        double t1, x1, t2, x2;
        ck_assert_int_eq(sb_ray_at_depth(&s, d, &t1, &x1), SB_OK);
        ck_assert_int_eq(sb_ray_at_depth(&pt, d, &t2, &x2), SB_OK);
        ck_assert(t1 == t2);
        ck_assert(x1 == -x2);
        ck_assert(sb_ray_angle_at(&s, d) == -sb_ray_angle_at(&pt, d));
    }
    sb_raylayers_free(L);
}
END_TEST

/* A linear profile sampled at several depths, with the transducer between
 * samples, is still one arc: the classic closed form from the transducer. */
START_TEST(test_transducer_between_samples)
{
    const double z[] = {0.0, 10.0, 25.0, 60.0, 100.0};
    double c[5];
    for (int i = 0; i < 5; i++)
        c[i] = 1490.0 + 0.04 * z[i];
    const double zt = 4.3, ct = 1490.0 + 0.04 * zt;
    struct sb_raylayers *L = mk(z, c, 5, zt);
    ck_assert_double_eq_tol(sb_raylayers_speed_at(L, zt), ct, 1e-12);
    ck_assert_double_eq_tol(sb_raylayers_transducer_speed(L), ct, 1e-12);
    ck_assert(sb_raylayers_transducer_depth(L) == zt);
    ck_assert_uint_eq(sb_raylayers_count(L), 5); /* 4 below + half-space */
    double p = sin(deg(55.0)) / ct;
    struct sb_ray r;
    ck_assert_int_eq(sb_ray_init(L, p, 1.0, &r), SB_OK);
    for (double d = 5.0; d <= 100.0; d += 9.5) {
        double t, x;
        long double dx, dt;
        ck_assert_int_eq(sb_ray_at_depth(&r, d, &t, &x), SB_OK);
        arc_classic(ct, 0.04L, (long double)(d - zt), (long double)p, &dx,
                    &dt);
        ck_assert_double_eq_tol(x, (double)dx, 1e-9);
        ck_assert_double_eq_tol(t, (double)dt, 1e-13);
    }
    sb_raylayers_free(L);
}
END_TEST

/* Below the last sample the speed is constant (documented choice): the
 * path continues as a straight line at the last angle. */
START_TEST(test_halfspace_extension)
{
    struct sb_raylayers *L = mk(MZ, MC, MN, 0.0);
    double p = sin(deg(40.0)) / 1512.0;
    struct sb_ray r;
    ck_assert_int_eq(sb_ray_init(L, p, 1.0, &r), SB_OK);
    double t0, x0, t1, x1;
    ck_assert_int_eq(sb_ray_at_depth(&r, 150.0, &t0, &x0), SB_OK);
    ck_assert_int_eq(sb_ray_at_depth(&r, 950.0, &t1, &x1), SB_OK);
    double s = p * 1491.4, co = sqrt(1 - s * s);
    ck_assert_double_eq_tol(x1 - x0, 800.0 * s / co, 1e-9);
    ck_assert_double_eq_tol(t1 - t0, 800.0 / (1491.4 * co), 1e-13);
    ck_assert(sb_raylayers_speed_at(L, 5000.0) == 1491.4);
    ck_assert(sb_raylayers_speed_at(L, -1.0) == 1512.0);
    sb_raylayers_free(L);

    /* Transducer above the first sample: constant speed down to it. */
    const double z2[] = {5.0, 50.0}, c2[] = {1500.0, 1505.0};
    L = mk(z2, c2, 2, 1.0);
    ck_assert_int_eq(sb_ray_init_angle(L, deg(30.0), 1.0, &r), SB_OK);
    ck_assert_int_eq(sb_ray_at_depth(&r, 5.0, &t0, &x0), SB_OK);
    ck_assert_double_eq_tol(x0, 4.0 * tan(deg(30.0)), 1e-12);
    ck_assert_double_eq_tol(t0, 4.0 / (1500.0 * cos(deg(30.0))), 1e-15);
    sb_raylayers_free(L);

    /* Transducer below the last sample: a single constant layer. */
    L = mk(z2, c2, 2, 80.0);
    ck_assert_uint_eq(sb_raylayers_count(L), 1);
    ck_assert_int_eq(sb_ray_init_angle(L, deg(30.0), 1.0, &r), SB_OK);
    ck_assert_int_eq(sb_ray_at_depth(&r, 180.0, &t0, &x0), SB_OK);
    ck_assert_double_eq_tol(x0, 100.0 * tan(deg(30.0)), 1e-10);
    sb_raylayers_free(L);
}
END_TEST

/* Zero-gradient layers between gradient layers: straight segments exactly,
 * no division by g (values against straight-line geometry + the classic arc
 * for the gradient layer). */
START_TEST(test_zero_gradient_layers)
{
    const double z[] = {0.0, 30.0, 80.0}, c[] = {1500.0, 1500.0, 1490.0};
    struct sb_raylayers *L = mk(z, c, 3, 0.0);
    double p = sin(deg(60.0)) / 1500.0;
    struct sb_ray r;
    ck_assert_int_eq(sb_ray_init(L, p, 1.0, &r), SB_OK);
    double t, x;
    ck_assert_int_eq(sb_ray_at_depth(&r, 80.0, &t, &x), SB_OK);
    long double dx, dt;
    arc_classic(1500.0L, -0.2L, 50.0L, (long double)p, &dx, &dt);
    ck_assert_double_eq_tol(x, 30.0 * tan(deg(60.0)) + (double)dx, 1e-9);
    ck_assert_double_eq_tol(
        t, 30.0 / (1500.0 * cos(deg(60.0))) + (double)dt, 1e-13);
    sb_raylayers_free(L);
}
END_TEST

/* A tiny gradient must not lose digits (the classic form divides by g):
 * compare with the classic form evaluated in long double. */
START_TEST(test_small_gradient_stable)
{
    const double z[] = {0.0, 100.0}, c[] = {1500.0, 1500.0001}; /* g = 1e-6 */
    struct sb_raylayers *L = mk(z, c, 2, 0.0);
    double p = sin(deg(45.0)) / 1500.0;
    struct sb_ray r;
    ck_assert_int_eq(sb_ray_init(L, p, 1.0, &r), SB_OK);
    double t, x, zz;
    ck_assert_int_eq(sb_ray_at_depth(&r, 100.0, &t, &x), SB_OK);
    long double dx, dt;
    long double g = (1500.0001L - 1500.0L) / 100.0L;
    arc_classic(1500.0L, g, 100.0L, (long double)p, &dx, &dt);
    ck_assert_double_eq_tol(x, (double)dx, 1e-9);
    ck_assert_double_eq_tol(t, (double)dt, 1e-13);
    ck_assert_int_eq(sb_ray_at_time(&r, t, &zz, NULL), SB_OK);
    ck_assert_double_eq_tol(zz, 100.0, 1e-9);
    sb_raylayers_free(L);
}
END_TEST

/* Turning ray in a positive gradient: c = 1500 + 0.1 z; sin(theta0) =
 * 1500/1550 turns where c = 1550, z = 500 m.  Closed forms with
 * cos(theta_turn) = 0: x = cos(theta0) / (p g),
 * t = -(1/g) ln tan(theta0 / 2). */
START_TEST(test_turning_ray)
{
    const double z[] = {0.0, 1000.0}, c[] = {1500.0, 1600.0};
    struct sb_raylayers *L = mk(z, c, 2, 0.0);
    double s0 = 1500.0 / 1550.0, th0 = asin(s0), p = s0 / 1500.0;
    struct sb_ray r;
    ck_assert_int_eq(sb_ray_init(L, -p, 1.0, &r), SB_OK); /* port side */
    ck_assert(r.turns);
    ck_assert_double_eq_tol(r.z_turn_m, 500.0, 1e-9);
    double xt = -cos(th0) / (p * 0.1), tt = -log(tan(th0 / 2)) / 0.1;
    ck_assert_double_eq_tol(r.x_turn_m, xt, 1e-8);
    ck_assert_double_eq_tol(r.t_turn_s, tt, 1e-12);

    double t = -1, x = -1, zz;
    ck_assert_int_eq(sb_ray_at_depth(&r, 400.0, &t, &x), SB_OK);
    ck_assert_int_eq(sb_ray_at_depth(&r, 600.0, &t, &x), SB_RAY_TURNED);
    ck_assert(isfinite(t) && isfinite(x));
    ck_assert_double_eq_tol(t, tt, 1e-12);
    ck_assert_double_eq_tol(x, xt, 1e-8);
    ck_assert_int_eq(sb_ray_at_time(&r, tt + 0.05, &zz, &x), SB_RAY_TURNED);
    ck_assert_double_eq_tol(zz, 500.0, 1e-9);
    ck_assert_int_eq(sb_ray_at_time(&r, 0.5 * tt, &zz, &x), SB_OK);
    ck_assert(zz < 500.0);
    /* Round trip close to the turn, where the ray is nearly horizontal. */
    const double below[] = {50.0, 1.0, 1e-2, 1e-4};
    for (int i = 0; i < 4; i++) {
        double d = 500.0 - below[i], x2;
        ck_assert_int_eq(sb_ray_at_depth(&r, d, &t, &x), SB_OK);
        ck_assert_int_eq(sb_ray_at_time(&r, t, &zz, &x2), SB_OK);
        ck_assert_msg(fabs(zz - d) < 1e-9, "d=%.12g back %.12g", d, zz);
        ck_assert_double_eq_tol(x2, x, 1e-6);
    }
    ck_assert_double_eq_tol(sb_ray_angle_at(&r, 700.0), -PI / 2, 1e-15);
    ck_assert_int_eq(SB_RAY_TURNED, SB_ENUM);

    /* A ray that cannot even leave the transducer (scaled speed too high). */
    ck_assert_int_eq(sb_ray_init(L, sin(deg(80.0)) / 1500.0, 1.2, &r), SB_OK);
    ck_assert(r.turns);
    ck_assert(r.z_turn_m == 0.0);
    ck_assert_int_eq(sb_ray_at_depth(&r, 1.0, &t, &x), SB_RAY_TURNED);
    ck_assert(t == 0.0 && x == 0.0);
    sb_raylayers_free(L);
}
END_TEST

/* Speed scale with p fixed.  (a) Physics identity: in water c' = s c a ray
 * with parameter p has sin(theta) = (p s) c, the same path as parameter p s
 * in the unscaled water, traversed s times faster.  (b) Constant speed,
 * audit direction (time fixed): x' = s^2 x exactly (R' = s R,
 * sin theta' = s sin theta) and, to first order in eps = s - 1,
 * z' - z = d eps (1 - tan^2 theta) (design guide, re-derived:
 * z' = s R cos theta' with cos theta' ~ cos theta - eps sin^2/cos). */
START_TEST(test_scale)
{
    struct sb_raylayers *L = mk(MZ, MC, MN, 0.0);
    double p = sin(deg(50.0)) / 1512.0, s = 1.0025;
    struct sb_ray a, b;
    ck_assert_int_eq(sb_ray_init(L, p, s, &a), SB_OK);
    ck_assert_int_eq(sb_ray_init(L, p * s, 1.0, &b), SB_OK);
    for (double d = 0.5; d < 300.0; d += 23.0) {
        double ta, xa, tb, xb;
        ck_assert_int_eq(sb_ray_at_depth(&a, d, &ta, &xa), SB_OK);
        ck_assert_int_eq(sb_ray_at_depth(&b, d, &tb, &xb), SB_OK);
        ck_assert_double_eq_tol(xa, xb, 1e-10);
        ck_assert_double_eq_tol(ta, tb / s, 1e-14);
    }
    sb_raylayers_free(L);

    const double z[] = {0.0}, c[] = {1500.0};
    L = mk(z, c, 1, 0.0);
    const double eps = 1e-6, d = 100.0;
    for (double ang = 0.0; ang <= 70.0; ang += 10.0) {
        double th = deg(ang), pp = sin(th) / 1500.0;
        ck_assert_int_eq(sb_ray_init(L, pp, 1.0, &a), SB_OK);
        ck_assert_int_eq(sb_ray_init(L, pp, 1.0 + eps, &b), SB_OK);
        double t, x, z2, x2;
        ck_assert_int_eq(sb_ray_at_depth(&a, d, &t, &x), SB_OK);
        ck_assert_int_eq(sb_ray_at_time(&b, t, &z2, &x2), SB_OK);
        ck_assert_double_eq_tol(x2, (1 + eps) * (1 + eps) * x, 1e-9);
        double tn = tan(th);
        /* second-order remainder ~ d eps^2 / cos^4 < 1e-8 m here */
        ck_assert_double_eq_tol(z2 - d, d * eps * (1 - tn * tn), 1e-8);
        ck_assert_double_eq_tol(x2 - x, 2 * d * tn * eps, 1e-8);
    }
    sb_raylayers_free(L);
}
END_TEST

START_TEST(test_input_errors)
{
    struct sb_raylayers *L = NULL;
    struct sb_error err;
    const double z[] = {0.0, 10.0, 10.0}, c[] = {1500.0, 1501.0, 1502.0};
    ck_assert_int_eq(sb_raylayers_alloc(z, c, 0, 0.0, &L, &err), SB_EINPUT);
    ck_assert_int_eq(sb_raylayers_alloc(z, c, 3, 0.0, &L, &err), SB_EINPUT);
    ck_assert_ptr_null(L);
    ck_assert_ptr_nonnull(strstr(err.msg, "sample 3"));
    const double cz[] = {1500.0, 0.0};
    ck_assert_int_eq(sb_raylayers_alloc(z, cz, 2, 0.0, &L, &err), SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "sample 2"));
    const double zn[] = {0.0, NAN};
    ck_assert_int_eq(sb_raylayers_alloc(zn, c, 2, 0.0, &L, &err), SB_EINPUT);
    ck_assert_int_eq(sb_raylayers_alloc(z, c, 2, -1.0, &L, &err), SB_EINPUT);
    ck_assert_int_eq(sb_raylayers_alloc(z, c, 2, NAN, &L, &err), SB_EINPUT);

    /* Layer limit: 1023 samples below the transducer + half-space fit. */
    size_t n = SB_RAY_MAX_LAYERS + 5;
    double *zz = malloc(n * sizeof *zz), *cc = malloc(n * sizeof *cc);
    for (size_t i = 0; i < n; i++) {
        zz[i] = (double)i;
        cc[i] = 1500.0 + 0.01 * (double)i;
    }
    ck_assert_int_eq(sb_raylayers_alloc(zz, cc, n, 0.0, &L, &err), SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "at most 1024"));
    /* samples 1..1023 strictly below z_t = 0: 1023 layers + half-space */
    ck_assert_int_eq(sb_raylayers_alloc(zz, cc, SB_RAY_MAX_LAYERS, 0.0, &L,
                                        &err), SB_OK);
    ck_assert_uint_eq(sb_raylayers_count(L), SB_RAY_MAX_LAYERS);
    struct sb_ray *r = malloc(sizeof *r);
    ck_assert_int_eq(sb_ray_init_angle(L, deg(20.0), 1.0, r), SB_OK);
    double t, x, z2;
    ck_assert_int_eq(sb_ray_at_depth(r, 1500.0, &t, &x), SB_OK);
    ck_assert_int_eq(sb_ray_at_time(r, t, &z2, &x), SB_OK);
    ck_assert_double_eq_tol(z2, 1500.0, 1e-9);
    /* query and init errors */
    ck_assert_int_eq(sb_ray_at_depth(r, -0.5, &t, &x), SB_EINPUT);
    ck_assert_int_eq(sb_ray_at_depth(r, NAN, &t, &x), SB_EINPUT);
    ck_assert_int_eq(sb_ray_at_time(r, -1e-3, &t, &x), SB_EINPUT);
    ck_assert_int_eq(sb_ray_at_time(r, INFINITY, &t, &x), SB_EINPUT);
    ck_assert_int_eq(sb_ray_init(L, 1e-4, 0.0, r), SB_EINPUT);
    ck_assert_int_eq(sb_ray_init(L, NAN, 1.0, r), SB_EINPUT);
    ck_assert_int_eq(sb_ray_init_angle(L, deg(90.0), 1.0, r), SB_EINPUT);
    free(r);
    sb_raylayers_free(L);
    free(zz);
    free(cc);
    sb_raylayers_free(NULL);
}
END_TEST

static Suite *raytrace_suite(void)
{
    Suite *s = suite_create("raytrace");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, test_constant_speed);
    tcase_add_test(tc, test_single_gradient_layer);
    tcase_add_test(tc, test_vertical_ray);
    tcase_add_test(tc, test_multilayer_quadrature);
    tcase_add_test(tc, test_snell_invariance);
    tcase_add_test(tc, test_round_trip);
    tcase_add_test(tc, test_port_symmetry);
    tcase_add_test(tc, test_transducer_between_samples);
    tcase_add_test(tc, test_halfspace_extension);
    tcase_add_test(tc, test_zero_gradient_layers);
    tcase_add_test(tc, test_small_gradient_stable);
    tcase_add_test(tc, test_turning_ray);
    tcase_add_test(tc, test_scale);
    tcase_add_test(tc, test_input_errors);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(raytrace_suite());
    srunner_run_all(sr, CK_NORMAL);
    int failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
