/*
 * swathbudget — depth x angle table of TVU95 / THU95 with a bounded
 * interpolation error (see tvutable.h for the layout and the bound).
 */
#include "swathbudget/tvutable.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/georef.h"
#include "swathbudget/propagate.h"

#define SB_PI 3.14159265358979323846

/* Octave exponents served: 2^-10 m .. 2^14 m. */
#define E_LOWEST (-10)
#define E_HIGHEST 13

struct octave {
    int built;
    int n_d, n_a;     /* cells in depth and angle */
    int j0;           /* first depth node (> 0 only in depth_min's octave) */
    double base;      /* 2^e, m */
    double inv_base;  /* 2^-e, 1/m (exact: a power of two) */
    double lo;        /* depth of node j0, m (depth_min in its octave) */
    int shifted;      /* 1 when lo is not the regular position of node j0 */
    double inv_h_a;   /* 1 / angle step, 1/rad */
    double claimed;   /* relative bound claimed for this octave */
    double measured;  /* relative error measured at the check points */
    double *tvu, *thu; /* (n_d + 1) x (n_a + 1), depth-major */
};

struct sb_tvutable {
    sb_tvu_fn fn;
    void *ctx;
    double depth_min, angle_max, tol;
    int e_lo;                     /* exponent of octave 0 */
    int n_oct;
    size_t evals;
    struct octave oct[E_HIGHEST - E_LOWEST + 1];
};

/* Split a positive normal double d = m 2^e with m in [1, 2), from its bits
 * (IEEE 754 binary64): the table index without calling log(). */
static inline int split_pow2(double d, double *m)
{
    uint64_t bits;
    int e;

    memcpy(&bits, &d, sizeof bits);
    e = (int)((bits >> 52) & 0x7ff) - 1023;
    bits = (bits & 0xfffffffffffffULL) | (1023ULL << 52);
    memcpy(m, &bits, sizeof bits);
    return e;
}

static inline double node_depth(const struct octave *o, int j)
{
    return j == o->j0 ? o->lo : o->base + o->base * (double)j / o->n_d;
}

static inline double node_angle(const struct sb_tvutable *t,
                                const struct octave *o, int i)
{
    /* the last node exactly at +angle_max, whatever the rounding */
    return i == o->n_a ? t->angle_max
                       : -t->angle_max + 2.0 * t->angle_max * i / o->n_a;
}

/* Bilinear interpolation inside a built octave; depth within it.  Always
 * inlined: it is most of a lookup, which an audit makes per sounding. */
#if defined(__GNUC__)
#define ALWAYS_INLINE inline __attribute__((always_inline))
#else
#define ALWAYS_INLINE inline
#endif
static ALWAYS_INLINE void interp(const struct sb_tvutable *t,
                                 const struct octave *o, double depth,
                                 double angle, double *tvu, double *thu)
{
    double x = (depth * o->inv_base - 1.0) * o->n_d;
    double y = (angle + t->angle_max) * o->inv_h_a;
    int j = (int)x, i = (int)y, w = o->n_a + 1;
    double s, u;
    const double *a, *b;

    if (j >= o->n_d)
        j = o->n_d - 1;
    if (j < o->j0)
        j = o->j0;
    if (i >= o->n_a)
        i = o->n_a - 1;
    if (i < 0)
        i = 0;
    if (j == o->j0 && o->shifted) {
        /* the first cell starts at depth_min, not at a regular node */
        s = (depth - o->lo) / (node_depth(o, j + 1) - o->lo);
    } else {
        s = x - j;
    }
    u = y - i;
    a = o->tvu + (size_t)j * w + i;
    b = o->thu + (size_t)j * w + i;
    *tvu = (1 - s) * ((1 - u) * a[0] + u * a[1]) +
           s * ((1 - u) * a[w] + u * a[w + 1]);
    *thu = (1 - s) * ((1 - u) * b[0] + u * b[1]) +
           s * ((1 - u) * b[w] + u * b[w + 1]);
}

static int eval(struct sb_tvutable *t, double d, double a, double *tvu,
                double *thu, struct sb_error *err)
{
    int rc = t->fn(t->ctx, d, a, tvu, thu, err);

    t->evals++;
    if (rc != SB_OK)
        return rc;
    if (!isfinite(*tvu) || !isfinite(*thu) || *tvu < 0 || *thu < 0)
        return sb_error_set(err, SB_ENUM, "", 0, 0,
                            "uncertainty at depth %g m, angle %g deg is not "
                            "a finite non-negative number (expected TVU95 "
                            "and THU95 >= 0)",
                            d, a * 180.0 / SB_PI);
    return SB_OK;
}

static double rel_err(double approx, double exact)
{
    double den = fabs(exact) > 1e-12 ? fabs(exact) : 1e-12;
    return fabs(approx - exact) / den;
}

/* Fill the nodes of octave k at resolution (n_d, n_a). */
static int fill(struct sb_tvutable *t, struct octave *o, int n_d, int n_a,
                struct sb_error *err)
{
    size_t n = (size_t)(n_d + 1) * (size_t)(n_a + 1);
    double *tv = malloc(n * sizeof *tv), *th = malloc(n * sizeof *th);
    int rc;

    if (!tv || !th) {
        free(tv);
        free(th);
        return sb_error_set(err, SB_ENOMEM, "", 0, 0,
                            "out of memory for the uncertainty table");
    }
    free(o->tvu);
    free(o->thu);
    o->tvu = tv;
    o->thu = th;
    o->n_d = n_d;
    o->n_a = n_a;
    o->inv_h_a = n_a / (2.0 * t->angle_max);
    o->j0 = 0;
    o->lo = o->base;
    if (t->depth_min > o->base) {
        o->j0 = (int)floor((t->depth_min / o->base - 1.0) * n_d);
        if (o->j0 >= n_d)
            o->j0 = n_d - 1;
        o->lo = t->depth_min;
    }
    o->shifted = o->lo != o->base + o->base * (double)o->j0 / n_d;
    for (int j = o->j0; j <= n_d; j++)
        for (int i = 0; i <= n_a; i++) {
            size_t at = (size_t)j * (n_a + 1) + i;

            rc = eval(t, node_depth(o, j), node_angle(t, o, i), &tv[at],
                      &th[at], err);
            if (rc != SB_OK)
                return rc;
        }
    return SB_OK;
}

/* Error at the check points: edge midpoints in depth (ed) and in angle
 * (ea), and cell centres (ec), the largest relative error of TVU or THU. */
static int check(struct sb_tvutable *t, struct octave *o, double *ed,
                 double *ea, double *ec, struct sb_error *err)
{
    *ed = *ea = *ec = 0;
    for (int j = o->j0; j <= o->n_d; j++)
        for (int i = 0; i <= o->n_a; i++) {
            for (int kind = 0; kind < 3; kind++) {
                double d, a, tv, th, etv, eth, e;
                int rc;

                /* kind 0: midpoint of a depth edge; 1: of an angle edge;
                 * 2: centre.  The last node row/column has only edges. */
                if ((kind == 0 || kind == 2) && j == o->n_d)
                    continue;
                if ((kind == 1 || kind == 2) && i == o->n_a)
                    continue;
                d = kind == 1 ? node_depth(o, j)
                              : 0.5 * (node_depth(o, j) +
                                       node_depth(o, j + 1));
                a = kind == 0 ? node_angle(t, o, i)
                              : 0.5 * (node_angle(t, o, i) +
                                       node_angle(t, o, i + 1));
                if (j == o->n_d)
                    d = node_depth(o, j) * (1 - 1e-15);
                rc = eval(t, d, a, &etv, &eth, err);
                if (rc != SB_OK)
                    return rc;
                interp(t, o, d, a, &tv, &th);
                e = fmax(rel_err(tv, etv), rel_err(th, eth));
                if (kind == 0 && e > *ed)
                    *ed = e;
                else if (kind == 1 && e > *ea)
                    *ea = e;
                else if (kind == 2 && e > *ec)
                    *ec = e;
            }
        }
    return SB_OK;
}

static int build(struct sb_tvutable *t, int k, struct sb_error *err)
{
    struct octave *o = &t->oct[k];
    int n_d = SB_TVUTABLE_ND_START;
    int n_a = (int)ceil(2.0 * t->angle_max / SB_TVUTABLE_ANGLE_STEP_START);
    double ed, ea, ec, worst;
    int rc;

    o->base = ldexp(1.0, t->e_lo + k);
    o->inv_base = ldexp(1.0, -(t->e_lo + k));
    for (;;) {
        int more_d, more_a;

        if ((rc = fill(t, o, n_d, n_a, err)) != SB_OK ||
            (rc = check(t, o, &ed, &ea, &ec, err)) != SB_OK) {
            free(o->tvu);
            free(o->thu);
            o->tvu = o->thu = NULL;
            return rc;
        }
        worst = fmax(ec, fmax(ed, ea));
        if (worst <= 0.5 * t->tol)
            break;
        /* Refine the direction whose error dominates; both when the
         * centre error is the worst (it is the sum of the two). */
        more_d = ed >= ea || ec > fmax(ed, ea);
        more_a = ea >= ed || ec > fmax(ed, ea);
        if (more_d && 2 * n_d > SB_TVUTABLE_ND_MAX)
            more_d = 0;
        if (more_a && 2 * n_a > SB_TVUTABLE_NA_MAX)
            more_a = 0;
        if (!more_d && !more_a) {
            /* at the resolution cap: claim what was measured */
            if (2 * n_d <= SB_TVUTABLE_ND_MAX)
                more_d = 1;
            else if (2 * n_a <= SB_TVUTABLE_NA_MAX)
                more_a = 1;
            else
                break;
        }
        if (more_d)
            n_d *= 2;
        if (more_a)
            n_a *= 2;
    }
    o->measured = worst;
    o->claimed = fmax(t->tol, 2.0 * worst);
    o->built = 1;
    return SB_OK;
}

int sb_tvutable_alloc(const struct sb_tvutable_opts *o, sb_tvu_fn fn,
                      void *ctx, struct sb_tvutable **out,
                      struct sb_error *err)
{
    struct sb_tvutable *t;
    double tol, m;
    int e;

    *out = NULL;
    if (!fn)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "no function to tabulate (expected one)");
    if (!(o->depth_min_m >= ldexp(1.0, E_LOWEST)) ||
        !(o->depth_min_m < SB_TVUTABLE_DEPTH_MAX_M))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "shallowest depth %g m is outside the table "
                            "(expected %g to %g m)",
                            o->depth_min_m, ldexp(1.0, E_LOWEST),
                            SB_TVUTABLE_DEPTH_MAX_M);
    if (!(o->angle_max_rad > 0) || !(o->angle_max_rad < SB_PI / 2))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "largest beam angle %g deg is outside the table "
                            "(expected 0 to 90 deg, both excluded)",
                            o->angle_max_rad * 180.0 / SB_PI);
    tol = o->tol_rel == 0 ? SB_TVUTABLE_TOL_DEFAULT : o->tol_rel;
    if (!(tol >= 1e-6 && tol <= 0.1))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "interpolation tolerance %g is out of range "
                            "(expected 1e-6 to 0.1)",
                            tol);
    t = calloc(1, sizeof *t);
    if (!t)
        return sb_error_set(err, SB_ENOMEM, "", 0, 0,
                            "out of memory for the uncertainty table");
    t->fn = fn;
    t->ctx = ctx;
    t->depth_min = o->depth_min_m;
    t->angle_max = o->angle_max_rad;
    t->tol = tol;
    e = split_pow2(o->depth_min_m, &m);
    t->e_lo = e;
    t->n_oct = E_HIGHEST - e + 1;
    *out = t;
    return SB_OK;
}

void sb_tvutable_free(struct sb_tvutable *t)
{
    if (!t)
        return;
    for (int k = 0; k < t->n_oct; k++) {
        free(t->oct[k].tvu);
        free(t->oct[k].thu);
    }
    free(t);
}

static int outside(const struct sb_tvutable *t, double depth, double angle,
                   struct sb_error *err)
{
    if (!err)
        return SB_EINPUT;
    if (!(depth >= t->depth_min && depth < SB_TVUTABLE_DEPTH_MAX_M))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "depth %g m is outside the uncertainty table "
                            "(expected %.3f to %g m)",
                            depth, t->depth_min, SB_TVUTABLE_DEPTH_MAX_M);
    return sb_error_set(err, SB_EINPUT, "", 0, 0,
                        "beam angle %g deg is beyond the system's maximum "
                        "(expected -%.2f to %.2f deg)",
                        angle * 180.0 / SB_PI, t->angle_max * 180.0 / SB_PI,
                        t->angle_max * 180.0 / SB_PI);
}

int sb_tvutable_lookup(struct sb_tvutable *t, double depth_m,
                       double angle_rad, double *tvu95_m, double *thu95_m,
                       struct sb_error *err)
{
    double m;
    int k, rc;

    /* The comparisons are false for NaN, so NaN lands outside too. */
    if (!(depth_m >= t->depth_min && depth_m < SB_TVUTABLE_DEPTH_MAX_M) ||
        !(fabs(angle_rad) <= t->angle_max))
        return outside(t, depth_m, angle_rad, err);
    k = split_pow2(depth_m, &m) - t->e_lo;
    if (!t->oct[k].built && (rc = build(t, k, err)) != SB_OK)
        return rc;
    interp(t, &t->oct[k], depth_m, angle_rad, tvu95_m, thu95_m);
    return SB_OK;
}

int sb_tvutable_prepare(struct sb_tvutable *t, double d0_m, double d1_m,
                        struct sb_error *err)
{
    double m;
    int k0, k1, rc;

    if (!(d0_m >= t->depth_min && d1_m >= d0_m &&
          d1_m < SB_TVUTABLE_DEPTH_MAX_M))
        return outside(t, !(d0_m >= t->depth_min) ? d0_m : d1_m, 0.0, err);
    k0 = split_pow2(d0_m, &m) - t->e_lo;
    k1 = split_pow2(d1_m, &m) - t->e_lo;
    for (int k = k0; k <= k1; k++)
        if (!t->oct[k].built && (rc = build(t, k, err)) != SB_OK)
            return rc;
    return SB_OK;
}

double sb_tvutable_bound(const struct sb_tvutable *t)
{
    double b = 0;

    for (int k = 0; k < t->n_oct; k++)
        if (t->oct[k].built && t->oct[k].claimed > b)
            b = t->oct[k].claimed;
    return b;
}

double sb_tvutable_measured(const struct sb_tvutable *t)
{
    double b = 0;

    for (int k = 0; k < t->n_oct; k++)
        if (t->oct[k].built && t->oct[k].measured > b)
            b = t->oct[k].measured;
    return b;
}

size_t sb_tvutable_evaluations(const struct sb_tvutable *t)
{
    return t->evals;
}

double sb_tvutable_depth_min(const struct sb_tvutable *t)
{
    return t->depth_min;
}

double sb_tvutable_angle_max(const struct sb_tvutable *t)
{
    return t->angle_max;
}

/* ---- the engine ---------------------------------------------------------- */

int sb_tvu_engine(void *ctx, double depth_m, double angle_rad,
                  double *tvu95_m, double *thu95_m, struct sb_error *err)
{
    const struct sb_tvu_engine *e = ctx;
    struct sb_beam b;
    struct sb_tpu tpu;
    int rc;

    if ((rc = sb_beam_setup(e->sys, depth_m, angle_rad, &b, err)) != SB_OK)
        return rc;
    if (e->thu_rule == SB_THU_EXACT && !e->h95)
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "no THU table for the exact 95%% radius "
                            "(expected one from sb_horiz95_alloc)");
    if ((rc = sb_propagate(&b, e->h95, &tpu, NULL)) != SB_OK)
        return sb_error_set(err, rc, "", 0, 0,
                            "propagation failed at depth %g m, angle %g deg",
                            depth_m, angle_rad * 180.0 / SB_PI);
    *tvu95_m = tpu.tvu95_m;
    *thu95_m = e->thu_rule == SB_THU_S44 ? tpu.thu95_s44_m : tpu.thu95_m;
    return SB_OK;
}

double sb_tvu_engine_depth_min(const struct sb_system *sys)
{
    const struct sb_vertical_ref *v = &sys->vertical;
    double tx = v->draft + v->squat + v->loading;

    return (tx > 0 ? tx : 0) + 0.1;
}
