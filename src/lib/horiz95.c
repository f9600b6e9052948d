/*
 * The 95 % radius of a zero-mean 2-D normal error (see horiz95.h).
 *
 * The probability held by a circle.  Rotate to the axes of the error
 * ellipse and scale by the major semi-axis sigma_max, so that x ~ N(0, 1)
 * along the major axis and y ~ N(0, k^2) along the minor one, with
 * k = sigma_min / sigma_max.  Conditioning on y,
 *
 *   P(rho; k) = P(x^2 + y^2 <= rho^2)
 *             = Int_{-rho/k}^{rho/k} phi(t) erf( sqrt(rho^2 - k^2 t^2) / sqrt 2 ) dt     (1)
 *
 * with y = k t, phi the standard normal density and P(|x| <= a) = erf(a /
 * sqrt 2) (Abramowitz & Stegun 1964, 26.2.5 with 7.1.1).  Substituting
 * t = (rho/k) sin(theta) removes the square root at the end points:
 *
 *   P = 2 Int_0^{theta_m} phi(s sin th) erf(rho cos th / sqrt 2) s cos th dth,
 *       s = rho / k,  theta_m = pi/2 (or asin(T/s) where phi(T) underflows)  (2)
 *
 * Why this form and not the polar one,
 *   P = 1/(2 pi sqrt(l1 l2)) Int_0^{2 pi} (1 - exp(-r^2 q/2)) / q dphi,
 *   q = cos^2(phi)/l1 + sin^2(phi)/l2,
 * which is used as the independent check in tests/test_horiz95.c: the polar
 * form divides by sqrt(l2) and as l2 -> 0 its integrand becomes a spike of
 * width ~k about phi = 0, pi, so it loses accuracy exactly where surveys
 * live (across-track error >> along-track error at the outer beams), and it
 * is undefined at l2 = 0.  The integrand of (2) is an entire function of
 * theta for every k > 0 (no end-point singularity, no spike: the t-range
 * it covers is just the part of the normal density that is not negligible)
 * and as k -> 0 it tends smoothly to the 1-D result erf(rho / sqrt 2), which
 * we use below k = 1e-8 (the neglected term is O(k^2) ~ 1e-16).
 *
 * The radius.  f(k) = rho with P(rho; k) = 0.95 lies in
 * [1.959964, 2.447747] (k = 0: 1-D normal quantile; k = 1: circular,
 * Rayleigh P = 1 - exp(-rho^2/2), so rho = sqrt(-2 ln 0.05)); P rises with
 * rho and falls with k, so [1.9, 2.5] always brackets it and Brent's method
 * (Brent 1973, ch. 4; gsl_root_fsolver_brent) solves it.
 *
 * The table.  f is an even, smooth (analytic) function of k, so four-point
 * Lagrange interpolation on an equally spaced table has error
 * h^4 max|f''''| / 24 * max|(u)(u-1)(u-2)(u-3)| (a standard result, e.g.
 * Abramowitz & Stegun 25.2.3 with its remainder term).  We hand-roll it
 * instead of gsl_spline because GSL's natural cubic spline forces f'' = 0 at
 * the ends (f''(0) is not 0 here), which costs O(h^2) accuracy near k = 0,
 * and because gsl_spline_eval's accelerator is mutable state; the local
 * stencil needs neither and is a dozen flops.
 */
#include "swathbudget/horiz95.h"

#include <math.h>
#include <stdlib.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_integration.h>
#include <gsl/gsl_roots.h>

#define H95_PI 3.14159265358979323846
#define H95_SQRT1_2 0.70710678118654752440
#define H95_INV_SQRT_2PI 0.39894228040143267794

/* phi(t) < 1e-31 beyond T: (2) is truncated there. */
#define H95_T 12.0
/* Below this k the minor axis changes P by O(k^2) < 1e-16: 1-D form. */
#define H95_K_TINY 1e-8
/* A negative eigenvalue smaller than this fraction of the larger one is
 * rounding in the caller's J S J^T and is taken as 0. */
#define H95_PSD_TOL 1e-12
/* S-44 ed. 6 section 2: 95 % of a 2-D quantity written as 2.45 sigma. */
#define H95_S44_K 2.45

#define H95_WS_LIMIT 64

struct sb_horiz95 {
    double f[SB_HORIZ95_NODES]; /* f(k_i), k_i = i / (NODES - 1) */
};

/* ---- covariance to ellipse ----------------------------------------- */

enum { COV_OK = 0, COV_ZERO = 1, COV_NONFINITE = -1, COV_NEGVAR = -2,
       COV_NOTPSD = -3 };

/*
 * Eigen-decomposition of [[cee, cen], [cen, cnn]] in closed form (2x2
 * symmetric).  The matrix is first scaled by its largest diagonal entry so
 * that no product overflows or underflows; the small eigenvalue is taken
 * as det / l1, which keeps its relative accuracy when l2 << l1 (the
 * difference m - d would cancel).
 */
static int decompose(double cee, double cen, double cnn, double *sig_max,
                     double *k, double *azimuth)
{
    double s, a, b, c, m, d, l1, l2, det;

    if (!isfinite(cee) || !isfinite(cen) || !isfinite(cnn))
        return COV_NONFINITE;
    if (cee < 0.0 || cnn < 0.0)
        return COV_NEGVAR;
    s = cee > cnn ? cee : cnn;
    if (s == 0.0) {
        if (cen != 0.0)
            return COV_NOTPSD;
        *sig_max = 0.0;
        *k = 0.0;
        *azimuth = 0.0;
        return COV_ZERO;
    }
    a = cee / s;
    b = cnn / s;
    c = cen / s;
    if (!isfinite(c))
        return COV_NOTPSD;
    det = a * b - c * c;
    if (det < -H95_PSD_TOL)
        return COV_NOTPSD;
    m = 0.5 * (a + b);
    d = hypot(0.5 * (a - b), c);
    l1 = m + d;
    l2 = det > 0.0 ? det / l1 : 0.0;
    *sig_max = sqrt(l1) * sqrt(s);
    *k = sqrt(l2 / l1);
    if (*k > 1.0)
        *k = 1.0;
    if (d == 0.0) {
        *azimuth = 0.0;
    } else {
        /* major axis at alpha = atan2(2c, a - b) / 2 from east,
         * counter-clockwise; azimuth is clockwise from north */
        double az = 0.5 * H95_PI - 0.5 * atan2(2.0 * c, a - b);

        if (az >= H95_PI)
            az -= H95_PI;
        if (az < 0.0)
            az += H95_PI;
        *azimuth = az;
    }
    return COV_OK;
}

static int cov_error(int code, double cee, double cen, double cnn,
                     struct sb_error *err)
{
    switch (code) {
    case COV_NONFINITE:
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "non-finite horizontal covariance (%g, %g, %g) "
                            "m^2 (expected finite entries)",
                            cee, cen, cnn);
    case COV_NEGVAR:
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "negative horizontal variance (%g, %g) m^2 "
                            "(expected variances >= 0)",
                            cee, cnn);
    default:
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "horizontal covariance (%g, %g, %g) m^2 is not "
                            "positive semi-definite (expected cen^2 <= "
                            "cee*cnn)",
                            cee, cen, cnn);
    }
}

int sb_horiz95_ellipse(double cee, double cen, double cnn,
                       struct sb_ellipse2 *out, struct sb_error *err)
{
    double smax, k, az;
    int code = decompose(cee, cen, cnn, &smax, &k, &az);

    if (code < 0)
        return cov_error(code, cee, cen, cnn, err);
    if (out) {
        out->sigma_max = smax;
        out->sigma_min = k * smax;
        out->azimuth = az;
    }
    return SB_OK;
}

double sb_horiz95_s44(double cee, double cen, double cnn)
{
    double smax, k, az;
    int code = decompose(cee, cen, cnn, &smax, &k, &az);

    if (code < 0)
        return SB_HORIZ95_INVALID;
    return H95_S44_K * smax; /* IHO S-44 ed. 6.0.0 (2020) section 2 */
}

/* ---- exact probability and radius ---------------------------------- */

struct prob_params {
    double rho, s;
};

/* Integrand of (2), without the factor 2. */
static double prob_integrand(double th, void *vp)
{
    const struct prob_params *p = vp;
    double t = p->s * sin(th);

    return H95_INV_SQRT_2PI * exp(-0.5 * t * t) *
           erf(p->rho * cos(th) * H95_SQRT1_2) * p->s * cos(th);
}

/* P(rho; k) of (1)-(2) for the scaled ellipse (sigma_max = 1). */
static int prob_scaled(double rho, double k, gsl_integration_workspace *w,
                       double *p)
{
    struct prob_params par;
    gsl_function fn;
    double res = 0.0, abserr = 0.0, thm;
    int st;

    if (rho <= 0.0) {
        *p = 0.0;
        return SB_OK;
    }
    if (k < H95_K_TINY) {
        *p = erf(rho * H95_SQRT1_2); /* 1-D normal: P(|x| <= rho) */
        return SB_OK;
    }
    par.rho = rho;
    par.s = rho / k;
    thm = par.s <= H95_T ? 0.5 * H95_PI : asin(H95_T / par.s);
    fn.function = prob_integrand;
    fn.params = &par;
    /* The integrand is entire, so Gauss-Kronrod 41 meets 1e-13 in one or
     * a few panels; a looser request would cost accuracy of the root. */
    st = gsl_integration_qag(&fn, 0.0, thm, 0.0, 1e-13, H95_WS_LIMIT,
                             GSL_INTEG_GAUSS41, w, &res, &abserr);
    if (st != GSL_SUCCESS || !isfinite(res))
        return SB_ENUM;
    *p = 2.0 * res;
    return SB_OK;
}

struct root_params {
    double k;
    gsl_integration_workspace *w;
    int status;
};

static double root_fn(double rho, void *vp)
{
    struct root_params *rp = vp;
    double p = 0.0;

    if (prob_scaled(rho, rp->k, rp->w, &p) != SB_OK) {
        rp->status = SB_ENUM;
        return 0.0; /* stops Brent; the status reports the failure */
    }
    return p - SB_HORIZ95_P;
}

/* f(k) by Brent's method, with caller-owned workspace and solver. */
static int factor_solve(double k, gsl_integration_workspace *w,
                        gsl_root_fsolver *solver, double *f)
{
    struct root_params rp;
    gsl_function fn;
    double lo = 1.9, hi = 2.5, x = 0.0;
    int iter, st;

    rp.k = k;
    rp.w = w;
    rp.status = SB_OK;
    fn.function = root_fn;
    fn.params = &rp;
    if (gsl_root_fsolver_set(solver, &fn, lo, hi) != GSL_SUCCESS ||
        rp.status != SB_OK)
        return SB_ENUM;
    for (iter = 0; iter < 200; iter++) {
        if (gsl_root_fsolver_iterate(solver) != GSL_SUCCESS ||
            rp.status != SB_OK)
            return SB_ENUM;
        x = gsl_root_fsolver_root(solver);
        lo = gsl_root_fsolver_x_lower(solver);
        hi = gsl_root_fsolver_x_upper(solver);
        /* 1e-14 relative: well above the ~1e-16 noise of P, so Brent
         * always reaches it, and far below any use of the radius */
        st = gsl_root_test_interval(lo, hi, 0.0, 1e-14);
        if (st == GSL_SUCCESS) {
            *f = x;
            return SB_OK;
        }
    }
    return SB_ENUM;
}

/* Workspace + solver for the slow path. */
struct solver_kit {
    gsl_integration_workspace *w;
    gsl_root_fsolver *s;
};

static int kit_alloc(struct solver_kit *kit, struct sb_error *err)
{
    kit->w = gsl_integration_workspace_alloc(H95_WS_LIMIT);
    kit->s = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
    if (!kit->w || !kit->s) {
        gsl_integration_workspace_free(kit->w);
        if (kit->s)
            gsl_root_fsolver_free(kit->s);
        return sb_error_set(err, SB_ENOMEM, NULL, 0, 0,
                            "out of memory for the THU95 solver");
    }
    return SB_OK;
}

static void kit_free(struct solver_kit *kit)
{
    gsl_integration_workspace_free(kit->w);
    gsl_root_fsolver_free(kit->s);
}

static int factor_exact_kit(double k, struct solver_kit *kit, double *f,
                            struct sb_error *err)
{
    if (factor_solve(k, kit->w, kit->s, f) != SB_OK)
        return sb_error_set(err, SB_ENUM, NULL, 0, 0,
                            "THU95 radius did not converge for axis ratio "
                            "%.17g",
                            k);
    return SB_OK;
}

int sb_horiz95_factor_exact(double k, double *f, struct sb_error *err)
{
    struct solver_kit kit;
    int rc;

    if (!(k >= 0.0 && k <= 1.0))
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "axis ratio %g out of range (expected 0 to 1)", k);
    rc = kit_alloc(&kit, err);
    if (rc != SB_OK)
        return rc;
    rc = factor_exact_kit(k, &kit, f, err);
    kit_free(&kit);
    return rc;
}

int sb_horiz95_radius_exact(double cee, double cen, double cnn, double *r,
                            struct sb_error *err)
{
    double smax, k, az, f = 0.0;
    int code = decompose(cee, cen, cnn, &smax, &k, &az), rc;

    if (code < 0)
        return cov_error(code, cee, cen, cnn, err);
    if (code == COV_ZERO) {
        *r = 0.0;
        return SB_OK;
    }
    rc = sb_horiz95_factor_exact(k, &f, err);
    if (rc != SB_OK)
        return rc;
    *r = smax * f;
    return SB_OK;
}

int sb_horiz95_prob(double sigma_max, double sigma_min, double r, double *p,
                    struct sb_error *err)
{
    gsl_integration_workspace *w;
    int rc;

    if (!isfinite(sigma_max) || !isfinite(sigma_min) || !isfinite(r) ||
        sigma_min < 0.0 || sigma_max < sigma_min || r < 0.0)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "invalid THU95 probability arguments sigma_max "
                            "%g m, sigma_min %g m, r %g m (expected finite, "
                            "sigma_max >= sigma_min >= 0, r >= 0)",
                            sigma_max, sigma_min, r);
    if (sigma_max == 0.0) {
        *p = 1.0; /* all mass at the centre */
        return SB_OK;
    }
    w = gsl_integration_workspace_alloc(H95_WS_LIMIT);
    if (!w)
        return sb_error_set(err, SB_ENOMEM, NULL, 0, 0,
                            "out of memory for the THU95 integration");
    rc = prob_scaled(r / sigma_max, sigma_min / sigma_max, w, p);
    gsl_integration_workspace_free(w);
    if (rc != SB_OK)
        return sb_error_set(err, rc, NULL, 0, 0,
                            "THU95 probability integral failed");
    return SB_OK;
}

/* ---- the table ----------------------------------------------------- */

struct sb_horiz95 *sb_horiz95_alloc(struct sb_error *err)
{
    struct sb_horiz95 *h;
    struct solver_kit kit;
    int i;

    h = malloc(sizeof *h);
    if (!h) {
        sb_error_set(err, SB_ENOMEM, NULL, 0, 0,
                     "out of memory for the THU95 table");
        return NULL;
    }
    if (kit_alloc(&kit, err) != SB_OK) {
        free(h);
        return NULL;
    }
    for (i = 0; i < SB_HORIZ95_NODES; i++) {
        double k = (double)i / (SB_HORIZ95_NODES - 1);

        if (factor_exact_kit(k, &kit, &h->f[i], err) != SB_OK) {
            kit_free(&kit);
            free(h);
            return NULL;
        }
    }
    kit_free(&kit);
    return h;
}

void sb_horiz95_free(struct sb_horiz95 *h)
{
    free(h);
}

double sb_horiz95_factor(const struct sb_horiz95 *h, double k)
{
    const int n = SB_HORIZ95_NODES;
    double x, u, f0, f1, f2, f3;
    int j;

    if (!h || !(k >= 0.0 && k <= 1.0))
        return SB_HORIZ95_INVALID;
    /* stencil of four nodes j..j+3 around x, shifted inwards at the ends */
    x = k * (n - 1);
    j = (int)x - 1;
    if (j < 0)
        j = 0;
    if (j > n - 4)
        j = n - 4;
    u = x - j; /* in [0, 3] */
    f0 = h->f[j];
    f1 = h->f[j + 1];
    f2 = h->f[j + 2];
    f3 = h->f[j + 3];
    /* Lagrange basis on nodes 0, 1, 2, 3 */
    return -f0 * (u - 1.0) * (u - 2.0) * (u - 3.0) / 6.0 +
           f1 * u * (u - 2.0) * (u - 3.0) / 2.0 -
           f2 * u * (u - 1.0) * (u - 3.0) / 2.0 +
           f3 * u * (u - 1.0) * (u - 2.0) / 6.0;
}

double sb_horiz95_radius(const struct sb_horiz95 *h, double cee, double cen,
                         double cnn)
{
    double smax, k, az;
    int code = decompose(cee, cen, cnn, &smax, &k, &az);

    if (code < 0 || !h)
        return SB_HORIZ95_INVALID;
    if (code == COV_ZERO)
        return 0.0;
    return smax * sb_horiz95_factor(h, k);
}
