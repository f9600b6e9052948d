/*
 * Tests of the 95 % radius of a 2-D normal (src/lib/horiz95.c).
 *
 * Check values come from closed forms or from methods written here and
 * independent of the library's (which integrates over the minor axis with
 * GSL's adaptive Gauss-Kronrod and solves with GSL's Brent):
 *   - circular case: the radius of a circular bivariate normal follows the
 *     Rayleigh distribution, P(R <= r) = 1 - exp(-r^2 / (2 sigma^2)), so the
 *     95 % radius is sigma * sqrt(-2 ln 0.05);
 *   - one axis only: a 1-D normal, P(|x| <= r) = 1 - 2 Q(r / sigma), 95 % at
 *     r = Phi^-1(0.975) sigma = 1.959963984540054 sigma (quantile taken
 *     from GSL's gsl_cdf_ugaussian_Pinv, a separate implementation);
 *   - elliptical cases: (A) the polar form of the probability,
 *       P(r) = 1/(2 pi s1 s2) Int_0^{2pi} (1 - exp(-r^2 q / 2)) / q dphi,
 *       q = cos^2 phi / s1^2 + sin^2 phi / s2^2,
 *     (the bivariate normal density integrated over the disc in polar
 *     coordinates, radial part in closed form), evaluated with the
 *     trapezoidal rule, which converges geometrically for a smooth periodic
 *     integrand (Trefethen & Weideman, SIAM Review 56 (2014), Thm 3.2), and
 *     solved for r by bisection; (B) a plain 2-D midpoint rule of the
 *     density itself over the disc, a cruder but assumption-free check.
 *   - IHO S-44 ed. 6.0.0 (2020) section 2: 95 % of a 2-D quantity is
 *     written 2.45 sigma.
 */
#include <check.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>

#include "swathbudget/horiz95.h"

#define PI 3.14159265358979323846

static struct sb_horiz95 *table;

#define ck_rel(a, b, rel)                                                   \
    ck_assert_double_eq_tol((a), (b), (rel) * fabs(b) + 1e-300)

/* ---- independent methods ------------------------------------------- */

/* (A) polar form with the m-point trapezoidal rule over one period. */
static double prob_polar(double s1, double s2, double r, int m)
{
    double sum = 0.0, l1 = s1 * s1, l2 = s2 * s2;
    int i;

    for (i = 0; i < m; i++) {
        double ph = 2.0 * PI * i / m, c = cos(ph), s = sin(ph);
        double q = c * c / l1 + s * s / l2;

        sum += -expm1(-0.5 * r * r * q) / q;
    }
    return sum * (2.0 * PI / m) / (2.0 * PI * s1 * s2);
}

/* radius holding 95 % by bisection on (A): P rises with r. */
static double radius_polar(double s1, double s2, int m)
{
    double lo = 1.9 * s1, hi = 2.5 * s1;
    int i;

    for (i = 0; i < 80; i++) {
        double mid = 0.5 * (lo + hi);

        if (prob_polar(s1, s2, mid, m) < 0.95)
            lo = mid;
        else
            hi = mid;
    }
    return 0.5 * (lo + hi);
}

/* (B) midpoint rule of the density in polar coordinates over the disc. */
static double prob_disc_midpoint(double s1, double s2, double r, int nr,
                                 int nphi)
{
    double sum = 0.0, dr = r / nr, dph = 2.0 * PI / nphi;
    int i, j;

    for (i = 0; i < nr; i++) {
        double rho = (i + 0.5) * dr;

        for (j = 0; j < nphi; j++) {
            double ph = (j + 0.5) * dph;
            double x = rho * cos(ph), y = rho * sin(ph);

            sum += exp(-0.5 * (x * x / (s1 * s1) + y * y / (s2 * s2))) * rho;
        }
    }
    return sum * dr * dph / (2.0 * PI * s1 * s2);
}

/* Covariance (cee, cen, cnn) of an ellipse with the major axis at
 * azimuth az (clockwise from north): C = s1^2 u u' + s2^2 v v' with
 * u = (sin az, cos az), v = (cos az, -sin az) in (E, N). */
static void cov_from_axes(double s1, double s2, double az, double *cee,
                          double *cen, double *cnn)
{
    double ue = sin(az), un = cos(az), ve = cos(az), vn = -sin(az);

    *cee = s1 * s1 * ue * ue + s2 * s2 * ve * ve;
    *cen = s1 * s1 * ue * un + s2 * s2 * ve * vn;
    *cnn = s1 * s1 * un * un + s2 * s2 * vn * vn;
}

/* ---- closed forms -------------------------------------------------- */

START_TEST(test_circular)
{
    const double sigma = 0.3, want = sqrt(-2.0 * log(0.05)) * sigma;
    double r = 0.0, p = 0.0, rr;
    struct sb_error err;

    /* Rayleigh closed form */
    ck_assert_int_eq(sb_horiz95_radius_exact(sigma * sigma, 0.0,
                                             sigma * sigma, &r, &err),
                     SB_OK);
    ck_rel(r, want, 1e-13);
    ck_rel(sb_horiz95_radius(table, sigma * sigma, 0.0, sigma * sigma), want,
           1e-13);
    /* the Rayleigh CDF at several radii */
    for (rr = 0.05; rr < 1.5; rr += 0.1) {
        ck_assert_int_eq(sb_horiz95_prob(sigma, sigma, rr, &p, &err), SB_OK);
        ck_rel(p, -expm1(-rr * rr / (2.0 * sigma * sigma)), 1e-13);
    }
}
END_TEST

START_TEST(test_one_axis)
{
    const double sigma = 2.0, q975 = gsl_cdf_ugaussian_Pinv(0.975);
    double r = 0.0, p = 0.0, rr, cee, cen, cnn;
    struct sb_error err;

    /* the quantile itself: 1.959963984540054 (normal tables give 1.96) */
    ck_rel(q975, 1.959963984540054, 1e-14);
    ck_assert_int_eq(sb_horiz95_radius_exact(0.0, 0.0, sigma * sigma, &r,
                                             &err),
                     SB_OK);
    ck_rel(r, q975 * sigma, 1e-13);
    ck_rel(sb_horiz95_radius(table, sigma * sigma, 0.0, 0.0), q975 * sigma,
           1e-13);
    /* the same line error at azimuth 30 deg */
    cov_from_axes(sigma, 0.0, PI / 6.0, &cee, &cen, &cnn);
    ck_rel(sb_horiz95_radius(table, cee, cen, cnn), q975 * sigma, 1e-12);
    /* the 1-D CDF, P(|x| <= r) = 1 - 2 Q(r / sigma) */
    for (rr = 0.1; rr < 6.0; rr += 0.5) {
        ck_assert_int_eq(sb_horiz95_prob(sigma, 0.0, rr, &p, &err), SB_OK);
        ck_rel(p, 1.0 - 2.0 * gsl_cdf_ugaussian_Q(rr / sigma), 1e-13);
    }
    /* a tiny minor axis tends to the same limit */
    ck_assert_int_eq(sb_horiz95_prob(sigma, 1e-6 * sigma, 1.5, &p, &err),
                     SB_OK);
    ck_rel(p, 1.0 - 2.0 * gsl_cdf_ugaussian_Q(1.5 / sigma), 1e-11);
}
END_TEST

/* ---- elliptical cases against the independent methods -------------- */

START_TEST(test_elliptical_polar)
{
    /* (sigma_max, sigma_min, trapezoid points): the polar integrand has a
     * peak of width ~ sigma_min / sigma_max, so thin ellipses get more
     * points (the printed agreement shows convergence) */
    static const double cases[][3] = {
        {1.0, 0.5, 2000}, {1.0, 0.1, 20000}, {0.7, 0.5, 2000},
        {3.0, 0.03, 100000}, {1.0, 0.999, 2000}};
    size_t i;

    for (i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        double s1 = cases[i][0], s2 = cases[i][1], r = 0.0, p = 0.0;
        int m = (int)cases[i][2];
        double want = radius_polar(s1, s2, m);
        struct sb_error err;

        ck_assert_int_eq(sb_horiz95_radius_exact(s2 * s2, 0.0, s1 * s1, &r,
                                                 &err),
                         SB_OK);
        ck_assert_msg(fabs(r - want) <= 1e-12 * want,
                      "s %g/%g: exact %.17g polar %.17g", s1, s2, r, want);
        ck_assert_msg(fabs(sb_horiz95_radius(table, s1 * s1, 0.0, s2 * s2) -
                           want) <= 1e-12 * want,
                      "s %g/%g: table", s1, s2);
        /* the probability itself at a few radii */
        ck_assert_int_eq(sb_horiz95_prob(s1, s2, 0.8 * want, &p, &err),
                         SB_OK);
        ck_assert_double_eq_tol(p, prob_polar(s1, s2, 0.8 * want, m), 1e-13);
        ck_assert_int_eq(sb_horiz95_prob(s1, s2, 1.3 * want, &p, &err),
                         SB_OK);
        ck_assert_double_eq_tol(p, prob_polar(s1, s2, 1.3 * want, m), 1e-13);
    }
}
END_TEST

START_TEST(test_elliptical_midpoint)
{
    /* sigma 1 and 0.5: the 2-D midpoint rule (second order, h ~ 1e-3)
     * must find 95 % inside the radius to ~1e-6 */
    double r = 0.0, p;
    struct sb_error err;

    ck_assert_int_eq(sb_horiz95_radius_exact(1.0, 0.0, 0.25, &r, &err),
                     SB_OK);
    p = prob_disc_midpoint(1.0, 0.5, r, 1500, 3000);
    ck_assert_double_eq_tol(p, 0.95, 2e-6);
    /* and not 95 % one millimetre-per-metre off */
    p = prob_disc_midpoint(1.0, 0.5, 1.001 * r, 1500, 3000);
    ck_assert(fabs(p - 0.95) > 1e-4);
}
END_TEST

/* ---- the table ----------------------------------------------------- */

START_TEST(test_table_error)
{
    /* Dense set of ratios, off the nodes (0.37 of a step past each tenth
     * node) and on a few nodes, against the exact solver.  Four-point
     * interpolation error scales as h^4: measured 1.5e-10 / 9e-12 / 6e-13
     * at 257 / 513 / 1025 nodes (ratio 16 per halving, as theory says), so
     * 1e-12 bounds the 1025-node table with a margin of ~2. */
    const int n = 3000;
    double worst = 0.0, f = 0.0;
    struct sb_error err;
    int i;

    for (i = 0; i <= n; i++) {
        double k = (i + 0.37) / (n + 1.0), fi;

        ck_assert_int_eq(sb_horiz95_factor_exact(k, &f, &err), SB_OK);
        fi = sb_horiz95_factor(table, k);
        if (fabs(fi - f) / f > worst)
            worst = fabs(fi - f) / f;
    }
    ck_assert_msg(worst < 1e-12, "table error %g", worst);
    ck_assert_int_eq(sb_horiz95_factor_exact(0.5, &f, &err), SB_OK);
    ck_rel(sb_horiz95_factor(table, 0.5), f, 1e-15);
    ck_rel(sb_horiz95_factor(table, 0.0), gsl_cdf_ugaussian_Pinv(0.975),
           1e-14);
    ck_rel(sb_horiz95_factor(table, 1.0), sqrt(-2.0 * log(0.05)), 1e-14);
}
END_TEST

START_TEST(test_table_monotone)
{
    /* f rises with k: a wider minor axis needs a larger circle */
    double prev = 0.0;
    int i;

    for (i = 0; i <= 20000; i++) {
        double f = sb_horiz95_factor(table, i / 20000.0);

        ck_assert_msg(f > prev,
                      "not increasing at %d", i);
        prev = f;
    }
    ck_assert(sb_horiz95_factor(table, -0.1) == SB_HORIZ95_INVALID);
    ck_assert(sb_horiz95_factor(table, 1.1) == SB_HORIZ95_INVALID);
    ck_assert(sb_horiz95_factor(table, NAN) == SB_HORIZ95_INVALID);
}
END_TEST

/* ---- geometry and edge cases --------------------------------------- */

START_TEST(test_rotation_and_ellipse)
{
    static const double az_deg[] = {0.0, 30.0, 45.0, 90.0, 135.0, 179.0};
    double ref = sb_horiz95_radius(table, 0.04, 0.0, 0.01), cee, cen, cnn;
    struct sb_ellipse2 e;
    struct sb_error err;
    size_t i;

    for (i = 0; i < sizeof az_deg / sizeof az_deg[0]; i++) {
        double az = az_deg[i] * PI / 180.0;

        cov_from_axes(0.2, 0.1, az, &cee, &cen, &cnn);
        /* rotation does not change the radius */
        ck_rel(sb_horiz95_radius(table, cee, cen, cnn), ref, 1e-13);
        ck_assert_int_eq(sb_horiz95_ellipse(cee, cen, cnn, &e, &err), SB_OK);
        ck_rel(e.sigma_max, 0.2, 1e-14);
        ck_rel(e.sigma_min, 0.1, 1e-13);
        ck_assert_double_eq_tol(e.azimuth, az, 1e-13);
    }
    /* east-west major axis: azimuth 90 deg; north-south: 0 */
    ck_assert_int_eq(sb_horiz95_ellipse(4.0, 0.0, 1.0, &e, &err), SB_OK);
    ck_assert_double_eq_tol(e.azimuth, PI / 2.0, 1e-15);
    ck_assert_int_eq(sb_horiz95_ellipse(1.0, 0.0, 4.0, &e, &err), SB_OK);
    ck_assert_double_eq_tol(e.azimuth, 0.0, 1e-15);
    /* a circle: azimuth reported as 0 */
    ck_assert_int_eq(sb_horiz95_ellipse(1.0, 0.0, 1.0, &e, &err), SB_OK);
    ck_assert(e.azimuth == 0.0 && e.sigma_max == 1.0 && e.sigma_min == 1.0);
    /* a thin ellipse keeps its small axis: C = diag(1, 1e-20) rotated */
    cov_from_axes(1.0, 1e-10, 0.3, &cee, &cen, &cnn);
    ck_assert_int_eq(sb_horiz95_ellipse(cee, cen, cnn, &e, &err), SB_OK);
    ck_assert(e.sigma_min < 1e-7);
}
END_TEST

START_TEST(test_s44)
{
    /* IHO S-44 ed. 6.0.0 section 2: 2.45 sigma for a 2-D quantity; with
     * unequal axes the larger is taken, which never falls below the exact
     * radius since f(k) <= sqrt(-2 ln 0.05) = 2.4477 < 2.45 */
    double k;

    ck_rel(sb_horiz95_s44(0.25, 0.0, 0.25), 2.45 * 0.5, 1e-15);
    ck_rel(sb_horiz95_s44(0.01, 0.0, 0.25), 2.45 * 0.5, 1e-15);
    for (k = 0.0; k <= 1.0; k += 0.01)
        ck_assert(sb_horiz95_s44(1.0, 0.0, k * k) >=
                  sb_horiz95_radius(table, 1.0, 0.0, k * k));
    ck_assert(sb_horiz95_s44(0.0, 0.0, 0.0) == 0.0);
    ck_assert(sb_horiz95_s44(NAN, 0.0, 1.0) == SB_HORIZ95_INVALID);
}
END_TEST

START_TEST(test_zero_and_scale)
{
    double r = -5.0;
    struct sb_error err;

    ck_assert(sb_horiz95_radius(table, 0.0, 0.0, 0.0) == 0.0);
    ck_assert_int_eq(sb_horiz95_radius_exact(0.0, 0.0, 0.0, &r, &err), SB_OK);
    ck_assert(r == 0.0);
    /* tiny and huge variances: no underflow to 0, no overflow to inf */
    ck_rel(sb_horiz95_radius(table, 1e-300, 0.0, 1e-300),
           sqrt(-2.0 * log(0.05)) * 1e-150, 1e-13);
    ck_rel(sb_horiz95_radius(table, 1e300, 0.0, 1e300),
           sqrt(-2.0 * log(0.05)) * 1e150, 1e-13);
    ck_rel(sb_horiz95_radius(table, 1e-320, 0.0, 0.0),
           gsl_cdf_ugaussian_Pinv(0.975) * sqrt(1e-320), 1e-6);
}
END_TEST

START_TEST(test_invalid)
{
    static const double bad[][3] = {
        {NAN, 0.0, 1.0},  {1.0, NAN, 1.0},      {1.0, 0.0, INFINITY},
        {-1.0, 0.0, 1.0}, {1.0, 0.0, -1e-30},   {1.0, 2.0, 1.0},
        {0.0, 1e-3, 0.0}, {1e-300, 1.0, 1e-300}};
    struct sb_ellipse2 e;
    struct sb_error err;
    double r;
    size_t i;

    for (i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        double v = sb_horiz95_radius(table, bad[i][0], bad[i][1], bad[i][2]);

        ck_assert_msg(v == SB_HORIZ95_INVALID, "case %zu gave %g", i, v);
        r = 123.0;
        sb_error_clear(&err);
        ck_assert_int_eq(sb_horiz95_radius_exact(bad[i][0], bad[i][1],
                                                 bad[i][2], &r, &err),
                         SB_EINPUT);
        ck_assert(r == 123.0);
        ck_assert_ptr_nonnull(strstr(err.msg, "(expected "));
        ck_assert_int_eq(sb_horiz95_ellipse(bad[i][0], bad[i][1], bad[i][2],
                                            &e, NULL),
                         SB_EINPUT);
    }
    /* rounding-level indefiniteness is taken as a line error */
    ck_rel(sb_horiz95_radius(table, 1.0, 1.0 + 1e-15, 1.0),
           gsl_cdf_ugaussian_Pinv(0.975) * sqrt(2.0), 1e-12);
    ck_assert(sb_horiz95_radius(NULL, 1.0, 0.0, 1.0) == SB_HORIZ95_INVALID);
    ck_assert_int_eq(sb_horiz95_factor_exact(1.5, &r, &err), SB_EINPUT);
    ck_assert_int_eq(sb_horiz95_prob(1.0, 2.0, 1.0, &r, &err), SB_EINPUT);
    ck_assert_int_eq(sb_horiz95_prob(1.0, 0.5, -1.0, &r, &err), SB_EINPUT);
    ck_assert_int_eq(sb_horiz95_prob(0.0, 0.0, 1.0, &r, &err), SB_OK);
    ck_assert(r == 1.0);
}
END_TEST

static void setup(void)
{
    struct sb_error err;

    table = sb_horiz95_alloc(&err);
    ck_assert_msg(table != NULL, "alloc: %s", err.msg);
}

static void teardown(void)
{
    sb_horiz95_free(table);
    table = NULL;
}

static Suite *horiz95_suite(void)
{
    Suite *s = suite_create("horiz95");
    TCase *tc = tcase_create("core");

    tcase_add_checked_fixture(tc, setup, teardown);
    tcase_set_timeout(tc, 120);
    tcase_add_test(tc, test_circular);
    tcase_add_test(tc, test_one_axis);
    tcase_add_test(tc, test_elliptical_polar);
    tcase_add_test(tc, test_elliptical_midpoint);
    tcase_add_test(tc, test_table_error);
    tcase_add_test(tc, test_table_monotone);
    tcase_add_test(tc, test_rotation_and_ellipse);
    tcase_add_test(tc, test_s44);
    tcase_add_test(tc, test_zero_and_scale);
    tcase_add_test(tc, test_invalid);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr;
    int failed;

    /* GSL's default handler aborts; the library checks every status */
    gsl_set_error_handler_off();
    sr = srunner_create(horiz95_suite());
    srunner_run_all(sr, CK_NORMAL);
    failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
