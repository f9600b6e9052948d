/*
 * Refraction for the error engine: profiles, mean of casts, and the
 * allocation-free tracer of refraction.h.
 *
 * Physics (one layer of constant gradient g, speed c_a at its top, c_b at
 * depth h below, Snell parameter q, cos_a, cos_b the cosines of the ray
 * angle): the ray is an arc of a circle (Medwin & Clay 1998, Fundamentals
 * of Acoustical Oceanography, ch. 3 -- chapter from memory), and with the
 * division-free forms of docs/raytrace.md:
 *
 *   dx / q = h (c_a + c_b) / (cos_a + cos_b)                       (1')
 *   dt     = (h / c_a) L(g h / c_a) + K L(g K),                    (2')
 *            K = q^2 (dx / q) / (1 + cos_b),  L(u) = log1p(u) / u
 *   after a time tau in the layer (T = tan(theta / 2)):
 *   dz     = c_a tau E(g tau) (1 - T T_a) / (1 + T^2),             (3)
 *            T = T_a e^(g tau),  E(u) = expm1(u) / u
 *
 * The derivatives with respect to q at fixed depth (docs/model.md,
 * "Refraction", derives them): with X the offset and T the time,
 *   dX/dq = integral c / cos^3 dz,  dT/dq = q dX/dq,
 * and per layer, again without dividing by g or q,
 *   dX/dq = h (c_a + c_b) / ((cos_a + cos_b) cos_a cos_b)           (4)
 *   d(dx/q)/dq = q (dx/q) (c_a^2 / cos_a + c_b^2 / cos_b)
 *                / (cos_a + cos_b)                                 (5)
 * (4) is the integral of c / (1 - q^2 c^2)^(3/2) dc / g written with
 * 1/cos_b - 1/cos_a = q^2 (c_b^2 - c_a^2) / ((cos_a + cos_b) cos_a cos_b);
 * (5) differentiates (1') under 1 / (cos_a + cos_b), d cos / dq = -q c^2 / cos.
 */
#include "swathbudget/refraction.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* log1p(u)/u and expm1(u)/u, 1 at u = 0, full precision for small u. */
static inline double log1p_over(double u)
{
    return u == 0.0 ? 1.0 : (fabs(u) < 1e-300 ? 1.0 : log1p(u) / u);
}

static inline double expm1_over(double u)
{
    return u == 0.0 ? 1.0 : expm1(u) / u;
}

/* cos from sin in [0, 1), written (1 - s)(1 + s) to keep the digits of
 * near-horizontal rays; 0 at and beyond horizontal. */
static inline double cos_from_sin(double s)
{
    double v = (1.0 - s) * (1.0 + s);
    return v > 0.0 ? sqrt(v) : 0.0;
}

/* ---- profiles ------------------------------------------------------------ */

static int check_samples(const double *z, const double *c, size_t n,
                         const char *what, struct sb_error *err)
{
    if (n < 1 || n > SB_SVP_MAX_SAMPLES)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "%sprofile has %zu samples (expected 1 to %d)",
                            what, n, SB_SVP_MAX_SAMPLES);
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(z[i]) || z[i] < 0.0)
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "%ssample %zu: depth %g m (expected a finite "
                                "depth >= 0 m)",
                                what, i + 1, z[i]);
        if (!isfinite(c[i]) || !(c[i] > 0.0))
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "%ssample %zu: speed %g m/s (expected a finite "
                                "speed above 0 m/s)",
                                what, i + 1, c[i]);
        if (i > 0 && !(z[i] > z[i - 1]))
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "%ssample %zu: depth %g m is not below the "
                                "previous %g m (depths strictly increasing)",
                                what, i + 1, z[i], z[i - 1]);
    }
    return SB_OK;
}

/* Fill m from samples, its arrays taken from *store (3 n doubles). */
static void svp_fill(struct sb_svp *m, const double *z, const double *c,
                     size_t n, double **store)
{
    m->n = n;
    m->z = *store;
    m->c = m->z + n;
    m->g = m->c + n;
    *store += 3 * n;
    memcpy(m->z, z, n * sizeof *z);
    memcpy(m->c, c, n * sizeof *c);
    double area = 0.0;
    for (size_t i = 0; i + 1 < n; i++) {
        m->g[i] = (c[i + 1] - c[i]) / (z[i + 1] - z[i]);
        area += 0.5 * (c[i] + c[i + 1]) * (z[i + 1] - z[i]);
    }
    m->g[n - 1] = 0.0;
    m->c_mean = n > 1 ? area / (z[n - 1] - z[0]) : c[0];
}

int sb_refraction_alloc_profile(const double *depth_m, const double *speed_mps,
                                size_t n, const char *source,
                                struct sb_refraction **out,
                                struct sb_error *err)
{
    *out = NULL;
    int rc = check_samples(depth_m, speed_mps, n, "", err);
    if (rc)
        return rc;
    struct sb_refraction *r = calloc(1, sizeof *r);
    double *block = r ? malloc(3 * n * sizeof *block) : NULL;
    if (!block) {
        free(r);
        return sb_error_set(err, SB_ENOMEM, NULL, 0, 0, "out of memory");
    }
    r->block = block;
    svp_fill(&r->ref, depth_m, speed_mps, n, &block);
    r->reference = SB_REFERENCE_SINGLE;
    snprintf(r->source, sizeof r->source, "%s", source ? source : "(inline)");
    *out = r;
    return SB_OK;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

int sb_refraction_alloc_casts(const double *const *depth_m,
                              const double *const *speed_mps, const size_t *n,
                              size_t n_casts, int reference,
                              struct sb_refraction **out,
                              struct sb_error *err)
{
    *out = NULL;
    if (n_casts < 2 || n_casts > SB_CASTS_MAX)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "%zu casts (expected 2 to %d)", n_casts,
                            SB_CASTS_MAX);
    if (reference != SB_REFERENCE_MEAN &&
        (reference < 0 || (size_t)reference >= n_casts))
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "reference cast %d out of range", reference);
    size_t total = 0;
    for (size_t k = 0; k < n_casts; k++) {
        char what[32];
        snprintf(what, sizeof what, "cast %zu ", k + 1);
        int rc = check_samples(depth_m[k], speed_mps[k], n[k], what, err);
        if (rc)
            return rc;
        total += n[k];
    }
    /* the mean is sampled at the union of the depths */
    size_t n_ref = reference == SB_REFERENCE_MEAN ? total : n[reference];
    struct sb_refraction *r = calloc(1, sizeof *r);
    double *block = r ? malloc((3 * total + 3 * n_ref + 2 * total) *
                               sizeof *block)
                      : NULL;
    if (!block) {
        free(r);
        return sb_error_set(err, SB_ENOMEM, NULL, 0, 0, "out of memory");
    }
    r->block = block;
    r->n_casts = n_casts;
    r->reference = reference;
    for (size_t k = 0; k < n_casts; k++)
        svp_fill(&r->casts[k], depth_m[k], speed_mps[k], n[k], &block);
    if (reference != SB_REFERENCE_MEAN) {
        svp_fill(&r->ref, depth_m[reference], speed_mps[reference],
                 n[reference], &block);
    } else {
        double *uz = block + 3 * n_ref, *uc = uz + total;
        size_t m = 0;
        for (size_t k = 0; k < n_casts; k++)
            for (size_t i = 0; i < n[k]; i++)
                uz[m++] = depth_m[k][i];
        qsort(uz, m, sizeof *uz, cmp_double);
        size_t u = 0;
        for (size_t i = 0; i < m; i++) /* exact duplicates only */
            if (u == 0 || uz[i] > uz[u - 1])
                uz[u++] = uz[i];
        for (size_t i = 0; i < u; i++) {
            double s = 0.0;
            for (size_t k = 0; k < n_casts; k++)
                s += sb_svp_speed_at(&r->casts[k], uz[i]);
            uc[i] = s / (double)n_casts;
        }
        svp_fill(&r->ref, uz, uc, u, &block);
    }
    *out = r;
    return SB_OK;
}

void sb_refraction_free(struct sb_refraction *r)
{
    if (!r)
        return;
    free(r->block);
    free(r);
}

/* Largest i with z[i] <= zq, or -1 above the first sample. */
static long below_index(const struct sb_svp *m, double zq)
{
    if (zq < m->z[0])
        return -1;
    size_t lo = 0, hi = m->n; /* z[lo] <= zq < z[hi] (z[n] = inf) */
    while (hi - lo > 1) {
        size_t mid = lo + (hi - lo) / 2;
        if (m->z[mid] <= zq)
            lo = mid;
        else
            hi = mid;
    }
    return (long)lo;
}

double sb_svp_speed_at(const struct sb_svp *m, double z_m)
{
    if (isnan(z_m))
        return z_m;
    long i = below_index(m, z_m);
    if (i < 0)
        return m->c[0];
    if ((size_t)i + 1 >= m->n)
        return m->c[m->n - 1];
    return m->c[i] + m->g[i] * (z_m - m->z[i]);
}

void sb_svp_start_at(const struct sb_svp *m, double z_t_m,
                     struct sb_svp_start *s)
{
    long i = below_index(m, z_t_m);
    s->z_t = z_t_m;
    s->c_t = sb_svp_speed_at(m, z_t_m);
    s->k0 = (size_t)(i + 1);
    /* inside a segment: its gradient; above the first or below the last
     * sample: constant */
    s->g_t = (i >= 0 && (size_t)i + 1 < m->n) ? m->g[i] : 0.0;
}

/* Layer j of a ray from start s: top depth, top speed, gradient, and the
 * depth of its bottom (HUGE_VAL for the half-space). */
static inline void layer(const struct sb_svp *m, const struct sb_svp_start *s,
                         size_t j, double *za, double *ca, double *g,
                         double *zb)
{
    if (j == 0) {
        *za = s->z_t;
        *ca = s->c_t;
        *g = s->g_t;
    } else {
        size_t i = s->k0 + j - 1;
        *za = m->z[i];
        *ca = m->c[i];
        *g = m->g[i];
    }
    size_t ib = s->k0 + j; /* sample at the bottom of layer j */
    *zb = ib < m->n ? m->z[ib] : HUGE_VAL;
}

/* One closed-form step over thickness h: (1') and (2'). */
static inline void step(double q, double g, double h, double ca, double coa,
                        double cb, double cob, double *dt, double *dw)
{
    double csum = ca + cb, cosum = coa + cob;
    *dw = h * csum / cosum;
    double K = q * q * *dw / (1.0 + cob);
    *dt = (h / ca) * log1p_over(g * h / ca) + K * log1p_over(g * K);
}

int sb_svp_to_depth(const struct sb_svp *m, const struct sb_svp_start *s,
                    double q, double z_m, struct sb_svp_cursor *cur,
                    struct sb_svp_point *out)
{
    struct sb_svp_cursor local;
    if (!cur) {
        cur = &local;
        sb_svp_cursor_reset(cur);
    }
    double za, ca, g, zb;
    layer(m, s, cur->j, &za, &ca, &g, &zb);
    if (za > z_m) { /* the new depth is above the cursor: start again */
        sb_svp_cursor_reset(cur);
        layer(m, s, 0, &za, &ca, &g, &zb);
    }
    struct sb_svp_cursor c = *cur;
    for (;;) {
        double sa = q * ca;
        if (sa >= 1.0)
            return SB_ENUM; /* horizontal at the top of this layer */
        double coa = cos_from_sin(sa);
        if (z_m < zb) { /* the depth lies in this layer */
            double h = z_m - za, cb = ca + g * h, sb = q * cb;
            if (sb >= 1.0)
                return SB_ENUM;
            double cob = cos_from_sin(sb), dt, dw;
            step(q, g, h, ca, coa, cb, cob, &dt, &dw);
            double cosum = coa + cob;
            out->t = c.t + dt;
            out->w = c.w + dw;
            out->xq = c.xq + dw / (coa * cob);
            out->wq = c.wq + q * dw * (ca * ca / coa + cb * cb / cob) / cosum;
            out->c = cb;
            out->co = cob;
            *cur = c;
            return SB_OK;
        }
        double h = zb - za, cb = ca + g * h, sb = q * cb;
        if (sb >= 1.0)
            return SB_ENUM;
        double cob = cos_from_sin(sb), dt, dw;
        step(q, g, h, ca, coa, cb, cob, &dt, &dw);
        c.t += dt;
        c.w += dw;
        c.xq += dw / (coa * cob);
        c.wq += q * dw * (ca * ca / coa + cb * cb / cob) / (coa + cob);
        c.j++;
        layer(m, s, c.j, &za, &ca, &g, &zb);
    }
}

/* Inside layer (za, ca, g, h = thickness or HUGE_VAL) after a time tau
 * from its top: equation (3) and (1'). */
static inline void partial(double q, double za, double ca, double coa,
                           double g, double h, double tau, double *z,
                           double *dw)
{
    double u = g * tau;
    double Ta = q * ca / (1.0 + coa);
    double T = Ta * exp(u);
    double dz = ca * tau * expm1_over(u) * (1.0 - T * Ta) / (1.0 + T * T);
    if (dz > h)
        dz = h; /* rounding guard */
    if (!(dz > 0.0))
        dz = 0.0;
    double c = ca + g * dz;
    double co = (1.0 - T * T) / (1.0 + T * T);
    if (co < 0.0)
        co = 0.0;
    double cosum = coa + co;
    *z = za + dz;
    *dw = cosum > 0.0 ? dz * (ca + c) / cosum : 0.0;
}

/* Forward in time without turning back; returns 1 and the turning point
 * (time, depth, w) when the ray turns before tau. */
static int forward(const struct sb_svp *m, const struct sb_svp_start *s,
                   double q, double tau, struct sb_svp_cursor *cur, double *z,
                   double *w, double *t_turn)
{
    double za, ca, g, zb;
    layer(m, s, cur->j, &za, &ca, &g, &zb);
    if (cur->t > tau) {
        sb_svp_cursor_reset(cur);
        layer(m, s, 0, &za, &ca, &g, &zb);
    }
    for (;;) {
        double sa = q * ca;
        if (sa >= 1.0) { /* turned at the top of this layer */
            *z = za;
            *w = cur->w;
            *t_turn = cur->t;
            return 1;
        }
        double coa = cos_from_sin(sa);
        double h = zb - za;
        if (zb == HUGE_VAL) { /* constant half-space: never turns */
            double dw;
            partial(q, za, ca, coa, 0.0, h, tau - cur->t, z, &dw);
            *w = cur->w + dw;
            return 0;
        }
        double cb = ca + g * h, sb = q * cb;
        if (sb >= 1.0) { /* turns inside this layer, where c = 1/q */
            double ct = 1.0 / q, ht = (ct - ca) / g, dt, dw;
            if (ht > h)
                ht = h;
            if (ht < 0.0)
                ht = 0.0;
            step(q, g, ht, ca, coa, ct, 0.0, &dt, &dw);
            if (cur->t + dt >= tau) {
                double dwp;
                partial(q, za, ca, coa, g, ht, tau - cur->t, z, &dwp);
                *w = cur->w + dwp;
                return 0;
            }
            *z = za + ht;
            *w = cur->w + dw;
            *t_turn = cur->t + dt;
            return 1;
        }
        double cob = cos_from_sin(sb), dt, dw;
        step(q, g, h, ca, coa, cb, cob, &dt, &dw);
        if (cur->t + dt > tau) {
            double dwp;
            partial(q, za, ca, coa, g, h, tau - cur->t, z, &dwp);
            *w = cur->w + dwp;
            return 0;
        }
        cur->t += dt;
        cur->w += dw;
        cur->j++;
        layer(m, s, cur->j, &za, &ca, &g, &zb);
    }
}

int sb_svp_at_time(const struct sb_svp *m, const struct sb_svp_start *s,
                   double q, double tau, struct sb_svp_cursor *cur,
                   double *z_m, double *w)
{
    struct sb_svp_cursor local;
    if (!cur) {
        cur = &local;
        sb_svp_cursor_reset(cur);
    }
    if (!(tau > 0.0))
        tau = 0.0;
    double zt, wt, tt;
    if (!forward(m, s, q, tau, cur, z_m, w, &tt))
        return SB_OK;
    /* Past the turning point the ray climbs back along the mirror image of
     * its way down (the medium depends on depth only). */
    double back = tt - (tau - tt);
    zt = *z_m;
    wt = *w;
    if (back <= 0.0) {
        *z_m = s->z_t;
        *w = 2.0 * wt;
        return SB_ENUM;
    }
    struct sb_svp_cursor c2;
    sb_svp_cursor_reset(&c2);
    double zb, wb, tt2;
    if (forward(m, s, q, back, &c2, &zb, &wb, &tt2)) {
        zb = zt; /* rounding at the turn itself */
        wb = wt;
    }
    *z_m = zb;
    *w = 2.0 * wt - wb;
    return SB_ENUM;
}

double sb_svp_turn_angle(const struct sb_svp *m, const struct sb_svp_start *s,
                         double z_m)
{
    double cmax = sb_svp_speed_at(m, z_m);
    for (size_t i = s->k0; i < m->n && m->z[i] < z_m; i++)
        if (m->c[i] > cmax)
            cmax = m->c[i];
    if (!(cmax > s->c_t))
        return 1.57079632679489661923;
    return asin(s->c_t / cmax);
}
