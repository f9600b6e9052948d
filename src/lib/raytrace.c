/*
 * Ray tracing through constant-gradient layers (see swathbudget/raytrace.h).
 *
 * Physics.  In a layer where c(z) = c_a + g (z - z_a), Snell's law
 * sin(theta) / c = p (constant along the ray) makes the ray an arc of a circle
 * of radius 1 / (p g); across a thickness h, from (c_a, theta_a) to
 * (c_b, theta_b):
 *
 *   dx = (cos theta_a - cos theta_b) / (p g)                         (1)
 *   dt = (1 / g) ln[ tan(theta_b / 2) / tan(theta_a / 2) ]           (2)
 *
 * and for g = 0 the straight line dx = h tan theta, dt = h / (c cos theta).
 * These are the textbook results of ray acoustics for a linear profile:
 * Medwin & Clay (1998), Fundamentals of Acoustical Oceanography, ch. 3;
 * Jensen, Kuperman, Porter & Schmidt (2011), Computational Ocean Acoustics,
 * 2nd ed., ch. 3 (chapter numbers quoted from memory).  They follow from
 * dx = tan(theta) dz and dt = dz / (c cos theta) integrated with
 * dc = g dz, sin(theta) = p c.
 *
 * Numerics.  (1) and (2) divide by g and lose all their digits as g -> 0
 * (and (1) also as p -> 0).  We use forms rewritten without that division,
 * exact for g = 0 and p = 0 (derivations in docs/raytrace.md):
 *
 *   dx = p h (c_a + c_b) / (cos theta_a + cos theta_b)               (1')
 *   dt = (h / c_a) L(g h / c_a) + K L(g K),                          (2')
 *        K = p^2 h (c_a + c_b) / ((cos theta_a + cos theta_b)(1 + cos theta_b))
 *        L(u) = log1p(u) / u, L(0) = 1
 *
 * and, for the audit direction, the inverse of (2): after a time tau in the
 * layer, tan(theta / 2) = tan(theta_a / 2) e^(g tau), which gives
 *
 *   dz = c_a tau E(g tau) (1 - T T_a) / (1 + T^2),                   (3)
 *        T_a = tan(theta_a / 2), T = T_a e^(g tau), E(u) = expm1(u) / u
 *
 * again without dividing by g.  All layer steps are closed forms, so one
 * query is a binary search in the per-ray boundary table plus one step.
 */
#include "swathbudget/raytrace.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* pi/2; M_PI is not part of C11 + POSIX without XSI. */
static const double half_pi = 1.57079632679489661923;

struct sb_raylayers {
    size_t ns;          /* profile samples, kept for sb_raylayers_speed_at */
    double *zs, *cs;
    double z_t, c_t;    /* transducer depth and the profile speed there */
    size_t m;           /* layers below the transducer, half-space included */
    double *ztop;       /* top depth of layer k (ztop[0] = z_t) */
    double *ctop;       /* unscaled speed at the top of layer k */
    double *g;          /* gradient of layer k, 1/s (0 for the half-space) */
};

/* Speed by linear interpolation in the samples; constant outside. */
static double sample_speed(const double *zs, const double *cs, size_t n,
                           double z)
{
    if (z <= zs[0])
        return cs[0];
    if (z >= zs[n - 1])
        return cs[n - 1];
    size_t lo = 0, hi = n - 1; /* zs[lo] < z < zs[hi] */
    while (hi - lo > 1) {
        size_t mid = lo + (hi - lo) / 2;
        if (zs[mid] <= z)
            lo = mid;
        else
            hi = mid;
    }
    double f = (z - zs[lo]) / (zs[hi] - zs[lo]);
    return cs[lo] + f * (cs[hi] - cs[lo]);
}

int sb_raylayers_alloc(const double *depth_m, const double *speed_mps,
                       size_t n, double z_transducer_m,
                       struct sb_raylayers **out, struct sb_error *err)
{
    if (out)
        *out = NULL;
    if (!out || !depth_m || !speed_mps)
        return sb_error_set(err, SB_EINTERNAL, NULL, 0, 0,
                            "sb_raylayers_alloc: null argument");
    if (n == 0)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "sound speed profile is empty (at least one "
                            "depth/speed sample expected)");
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(depth_m[i]))
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "sound speed profile sample %zu: depth is not "
                                "a finite number (a depth in m expected)",
                                i + 1);
        if (!isfinite(speed_mps[i]) || !(speed_mps[i] > 0.0))
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "sound speed profile sample %zu: speed %g m/s "
                                "(a finite speed > 0 m/s expected)",
                                i + 1, speed_mps[i]);
        if (i > 0 && !(depth_m[i] > depth_m[i - 1]))
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "sound speed profile sample %zu: depth %g m "
                                "is not below the previous sample's %g m "
                                "(depths strictly increasing expected)",
                                i + 1, depth_m[i], depth_m[i - 1]);
    }
    if (!isfinite(z_transducer_m) || z_transducer_m < 0.0)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "transducer depth %g m (a finite depth >= 0 m "
                            "expected)", z_transducer_m);

    /* First sample strictly below the transducer. */
    size_t j = 0;
    while (j < n && depth_m[j] <= z_transducer_m)
        j++;
    size_t m = (n - j) + 1; /* one layer per sample below, plus the half-space */
    if (m > SB_RAY_MAX_LAYERS)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "sound speed profile has %zu layers below the "
                            "transducer (at most %d expected; resample the "
                            "profile more coarsely)",
                            m, SB_RAY_MAX_LAYERS);

    struct sb_raylayers *L = calloc(1, sizeof *L);
    if (!L)
        return sb_error_set(err, SB_ENOMEM, NULL, 0, 0, "out of memory");
    /* One block for the five arrays: one allocation, one free. */
    double *block = malloc((2 * n + 3 * m) * sizeof *block);
    if (!block) {
        free(L);
        return sb_error_set(err, SB_ENOMEM, NULL, 0, 0, "out of memory");
    }
    L->ns = n;
    L->zs = block;
    L->cs = block + n;
    L->ztop = block + 2 * n;
    L->ctop = L->ztop + m;
    L->g = L->ctop + m;
    memcpy(L->zs, depth_m, n * sizeof *block);
    memcpy(L->cs, speed_mps, n * sizeof *block);
    L->z_t = z_transducer_m;
    L->c_t = sample_speed(L->zs, L->cs, n, z_transducer_m);
    L->m = m;

    /* Layer k runs from ztop[k] to ztop[k + 1]; the tops below the transducer
     * are the samples themselves, so the speed at each boundary is a sample
     * value, and the gradient is that of the segment it lies in (zero above
     * the first sample, where the speed is held constant). */
    L->ztop[0] = z_transducer_m;
    L->ctop[0] = L->c_t;
    for (size_t k = 1; k < m; k++) {
        L->ztop[k] = depth_m[j + k - 1];
        L->ctop[k] = speed_mps[j + k - 1];
    }
    for (size_t k = 0; k + 1 < m; k++)
        L->g[k] = (L->ctop[k + 1] - L->ctop[k]) / (L->ztop[k + 1] - L->ztop[k]);
    L->g[m - 1] = 0.0; /* constant-speed half-space below the last sample */

    *out = L;
    return SB_OK;
}

void sb_raylayers_free(struct sb_raylayers *L)
{
    if (!L)
        return;
    free(L->zs); /* the head of the single block */
    free(L);
}

double sb_raylayers_speed_at(const struct sb_raylayers *L, double z_m)
{
    if (isnan(z_m))
        return z_m;
    return sample_speed(L->zs, L->cs, L->ns, z_m);
}

double sb_raylayers_transducer_depth(const struct sb_raylayers *L)
{
    return L->z_t;
}

double sb_raylayers_transducer_speed(const struct sb_raylayers *L)
{
    return L->c_t;
}

size_t sb_raylayers_count(const struct sb_raylayers *L)
{
    return L->m;
}

/* log1p(u) / u with its limit 1 at u = 0; log1p keeps full relative
 * precision for small u, so no series is needed. */
static double log1p_over(double u)
{
    return u == 0.0 ? 1.0 : log1p(u) / u;
}

/* expm1(u) / u with its limit 1 at u = 0. */
static double expm1_over(double u)
{
    return u == 0.0 ? 1.0 : expm1(u) / u;
}

/* cos(theta) from sin(theta) = s in [0, 1], written (1-s)(1+s) to keep the
 * digits of near-horizontal rays. */
static double cos_from_sin(double s)
{
    double v = (1.0 - s) * (1.0 + s);
    return v > 0.0 ? sqrt(v) : 0.0;
}

/*
 * One closed-form step down a layer over a thickness h >= 0, from speed c_a
 * (sin s_a, cos co_a) to c_b (cos co_b), unscaled speeds, q = |p| * scale,
 * gradient g (unscaled).  Equations (1') and (2') above, with the speed scale
 * factored out (the arguments of L() do not depend on it).
 */
static void layer_step(double q, double scale, double g, double h, double c_a,
                       double co_a, double c_b, double co_b, double *dt,
                       double *dx)
{
    double csum = c_a + c_b;
    double cosum = co_a + co_b;
    *dx = q * h * csum / cosum;
    double K = q * q * h * csum / (cosum * (1.0 + co_b));
    *dt = ((h / c_a) * log1p_over(g * h / c_a) + K * log1p_over(g * K)) /
          scale;
}

int sb_ray_init(const struct sb_raylayers *L, double p, double scale,
                struct sb_ray *ray)
{
    if (!isfinite(p) || !isfinite(scale) || !(scale > 0.0))
        return SB_EINPUT;
    double q = fabs(p) * scale;
    ray->layers = L;
    ray->p_spm = p;
    ray->scale = scale;
    ray->q_spm = q;
    ray->turns = 0;
    ray->z_turn_m = HUGE_VAL;
    ray->t_turn_s = HUGE_VAL;
    ray->x_turn_m = 0.0;
    ray->t_s[0] = 0.0;
    ray->x_m[0] = 0.0;

    const size_t m = L->m;
    for (size_t k = 0; k < m; k++) {
        double c_a = L->ctop[k];
        double s_a = q * c_a;
        if (s_a >= 1.0) {
            /* Horizontal (or evanescent) at the top of this layer: the ray
             * turned at the boundary. */
            ray->turns = 1;
            ray->n_valid = k + 1;
            ray->z_turn_m = L->ztop[k];
            ray->t_turn_s = ray->t_s[k];
            ray->x_turn_m = ray->x_m[k];
            break;
        }
        if (k + 1 == m) { /* the half-space: s_a < 1, never turns */
            ray->n_valid = m;
            break;
        }
        double co_a = cos_from_sin(s_a);
        double c_b = L->ctop[k + 1];
        double s_b = q * c_b;
        double dt, dx;
        if (s_b >= 1.0) {
            /* Turns inside the layer where c = 1 / q; s_b > s_a, so g > 0. */
            double c_turn = 1.0 / q;
            double h_turn = (c_turn - c_a) / L->g[k];
            double h = L->ztop[k + 1] - L->ztop[k];
            if (h_turn > h)
                h_turn = h; /* rounding guard */
            layer_step(q, scale, L->g[k], h_turn, c_a, co_a, c_turn, 0.0, &dt,
                       &dx);
            ray->turns = 1;
            ray->n_valid = k + 1;
            ray->z_turn_m = L->ztop[k] + h_turn;
            ray->t_turn_s = ray->t_s[k] + dt;
            ray->x_turn_m = ray->x_m[k] + dx;
            break;
        }
        layer_step(q, scale, L->g[k], L->ztop[k + 1] - L->ztop[k], c_a, co_a,
                   c_b, cos_from_sin(s_b), &dt, &dx);
        ray->t_s[k + 1] = ray->t_s[k] + dt;
        ray->x_m[k + 1] = ray->x_m[k] + dx;
    }
    if (p < 0.0)
        ray->x_turn_m = -ray->x_turn_m;
    return SB_OK;
}

int sb_ray_init_angle(const struct sb_raylayers *L, double theta0_rad,
                      double scale, struct sb_ray *ray)
{
    if (!isfinite(theta0_rad) || !(fabs(theta0_rad) < half_pi))
        return SB_EINPUT;
    return sb_ray_init(L, sin(theta0_rad) / L->c_t, scale, ray);
}

/* Report the turning point through the optional outputs. */
static void put_turn(const struct sb_ray *ray, double *a, double a_val,
                     double *x_m)
{
    if (a)
        *a = a_val;
    if (x_m)
        *x_m = ray->x_turn_m;
}

int sb_ray_at_depth(const struct sb_ray *ray, double z_m, double *t_oneway_s,
                    double *x_m)
{
    const struct sb_raylayers *L = ray->layers;
    if (!isfinite(z_m) || z_m < L->z_t)
        return SB_EINPUT;
    if (ray->turns && z_m >= ray->z_turn_m) {
        put_turn(ray, t_oneway_s, ray->t_turn_s, x_m);
        return z_m > ray->z_turn_m ? SB_RAY_TURNED : SB_OK;
    }
    /* Largest k < n_valid with ztop[k] <= z (ztop[0] = z_t <= z). */
    size_t lo = 0, hi = ray->n_valid;
    while (hi - lo > 1) {
        size_t mid = lo + (hi - lo) / 2;
        if (L->ztop[mid] <= z_m)
            lo = mid;
        else
            hi = mid;
    }
    const double q = ray->q_spm;
    double h = z_m - L->ztop[lo];
    double c_a = L->ctop[lo];
    double c = c_a + L->g[lo] * h;
    double dt, dx;
    layer_step(q, ray->scale, L->g[lo], h, c_a, cos_from_sin(q * c_a), c,
               cos_from_sin(q * c), &dt, &dx);
    if (t_oneway_s)
        *t_oneway_s = ray->t_s[lo] + dt;
    if (x_m) {
        double x = ray->x_m[lo] + dx;
        *x_m = ray->p_spm < 0.0 ? -x : x;
    }
    return SB_OK;
}

int sb_ray_at_time(const struct sb_ray *ray, double t_oneway_s, double *z_m,
                   double *x_m)
{
    const struct sb_raylayers *L = ray->layers;
    if (!isfinite(t_oneway_s) || t_oneway_s < 0.0)
        return SB_EINPUT;
    if (ray->turns && t_oneway_s >= ray->t_turn_s) {
        put_turn(ray, z_m, ray->z_turn_m, x_m);
        return t_oneway_s > ray->t_turn_s ? SB_RAY_TURNED : SB_OK;
    }
    size_t lo = 0, hi = ray->n_valid;
    while (hi - lo > 1) {
        size_t mid = lo + (hi - lo) / 2;
        if (ray->t_s[mid] <= t_oneway_s)
            lo = mid;
        else
            hi = mid;
    }
    const double q = ray->q_spm;
    const double g = L->g[lo];
    double tau = t_oneway_s - ray->t_s[lo];
    double c_a = L->ctop[lo];
    double s_a = q * c_a;
    double co_a = cos_from_sin(s_a);
    /* Equation (3) in scaled speeds: c_a' = scale c_a, g' = scale g. */
    double u = ray->scale * g * tau;
    double Ta = s_a / (1.0 + co_a);
    double T = Ta * exp(u);
    double dz = ray->scale * c_a * tau * expm1_over(u) * (1.0 - T * Ta) /
                (1.0 + T * T);
    /* Stay inside the layer the search found (rounding guard). */
    if (lo + 1 < L->m && L->ztop[lo] + dz > L->ztop[lo + 1])
        dz = L->ztop[lo + 1] - L->ztop[lo];
    if (dz < 0.0)
        dz = 0.0;
    if (z_m)
        *z_m = L->ztop[lo] + dz;
    if (x_m) {
        double c = c_a + g * dz;
        double co = (1.0 - T * T) / (1.0 + T * T);
        if (co < 0.0)
            co = 0.0;
        double cosum = co_a + co;
        double x = ray->x_m[lo] + (cosum > 0.0 ? q * dz * (c_a + c) / cosum
                                                : 0.0);
        *x_m = ray->p_spm < 0.0 ? -x : x;
    }
    return SB_OK;
}

double sb_ray_angle_at(const struct sb_ray *ray, double z_m)
{
    if (isnan(z_m))
        return z_m;
    const struct sb_raylayers *L = ray->layers;
    double sign = ray->p_spm < 0.0 ? -1.0 : 1.0;
    if (ray->turns && z_m >= ray->z_turn_m)
        return sign * (half_pi);
    double z = z_m < L->z_t ? L->z_t : z_m;
    /* Just below the transducer the scaled water starts: use the layer speed
     * at z, which at z_t is the transducer speed (ctop[0]). */
    double s = ray->q_spm * sb_raylayers_speed_at(L, z);
    if (s >= 1.0)
        return sign * (half_pi);
    return sign * asin(s);
}
