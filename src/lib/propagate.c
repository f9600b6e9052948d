/*
 * swathbudget — GUM law of propagation for one sounding (JCGM 100:2008,
 * 5.1.2, eq. (10) for uncorrelated inputs): Jacobian of the full forward
 * model by central differences, covariance C = J diag(u^2) J^T, the 95 %
 * figures, and each component's share.
 *
 * Why central differences rather than hand-written derivatives: the
 * forward model (georef.c) is the single statement of the physics; its
 * derivatives then cannot drift from it when a term changes, and the
 * closed forms of docs/model.md test both at once (tests/test_propagate.c).
 */
#include "swathbudget/propagate.h"

#include <math.h>
#include <string.h>

/* Fixed step for a component with u = 0 (sb_jacobian only), in its SI
 * unit: well inside the linear range of every term, well above rounding. */
static double fixed_step(int c)
{
    switch (c) {
    case SB_COMP_ROLL: case SB_COMP_PITCH: case SB_COMP_HEADING:
    case SB_COMP_ALIGN_ROLL: case SB_COMP_ALIGN_PITCH: case SB_COMP_ALIGN_HEADING:
    case SB_COMP_POINTING: case SB_COMP_POINTING_ALONG:
        return 1e-7; /* rad */
    case SB_COMP_LATENCY_ROLL: case SB_COMP_LATENCY_PITCH:
    case SB_COMP_LATENCY_HEAVE: case SB_COMP_LATENCY_POSITION:
        return 1e-6; /* s */
    case SB_COMP_SURFACE_SS:
        return 1e-3; /* m/s */
    case SB_COMP_COLUMN_SS:
        return 1e-7; /* relative */
    default:
        return 1e-6; /* m */
    }
}

/* The difference step for component c of standard uncertainty u > 0: a
 * fraction of u, so that the secant spans the figure's own scale, but not
 * below a floor far under any meaningful figure -- a step that underflows
 * (u subnormal, e.g. "1e-320 deg") would make the difference quotient
 * 0 * inf = NaN instead of the derivative. */
static inline double step_for(int c, double u)
{
    const double lo = 1e-3 * fixed_step(c);
    const double h = SB_JAC_STEP * u;
    return h > lo ? h : lo;
}

/* d e / d x_c by a central difference with step h; dx is all zero on entry
 * and on return. */
static inline void central(const struct sb_beam *b, double *dx, int c, double h,
                           double j[3])
{
    double ep[3], em[3];
    /* only the parts of the model that component c feeds: the others are
     * unchanged and cancel in the difference (georef.h); with a profile the
     * ray comes from its first-order expansion about the nominal ray, which
     * has the same derivatives as the exact trace and costs no tracing
     * (SB_PART_LINEAR, georef.h) */
    const unsigned parts = sb_component_parts(c) | SB_PART_LINEAR;
    dx[c] = h;
    sb_georef_error_parts(b, dx, parts, ep);
    dx[c] = -h;
    sb_georef_error_parts(b, dx, parts, em);
    dx[c] = 0.0;
    const double inv = 0.5 / h;
    j[0] = (ep[0] - em[0]) * inv;
    j[1] = (ep[1] - em[1]) * inv;
    j[2] = (ep[2] - em[2]) * inv;
}

void sb_jacobian(const struct sb_beam *b, double j[SB_COMP_COUNT][3])
{
    double dx[SB_COMP_COUNT] = { 0 };
    for (int c = 0; c < SB_COMP_COUNT; c++) {
        const double h = b->u[c] > 0.0 ? step_for(c, b->u[c]) : fixed_step(c);
        central(b, dx, c, h, j[c]);
    }
}

int sb_propagate(const struct sb_beam *b, const struct sb_horiz95 *h95,
                 struct sb_tpu *out, struct sb_breakdown *bd)
{
    double dx[SB_COMP_COUNT] = { 0 };
    double vee = 0.0, ven = 0.0, vnn = 0.0, vzz = 0.0;
    if (bd)
        memset(bd, 0, sizeof *bd);
    for (int c = 0; c < SB_COMP_COUNT; c++) {
        const double u = b->u[c];
        if (!(u > 0.0))
            continue;
        double j[3];
        central(b, dx, c, step_for(c, u), j);
        const double ce = j[0] * u, cn = j[1] * u, cz = j[2] * u;
        vee += ce * ce;
        ven += ce * cn;
        vnn += cn * cn;
        vzz += cz * cz;
        if (bd) {
            bd->j[c][0] = j[0];
            bd->j[c][1] = j[1];
            bd->j[c][2] = j[2];
            bd->cz[c] = cz;
            bd->ch[c] = sqrt(ce * ce + cn * cn);
        }
    }
    if (bd) {
        const double vh = vee + vnn;
        for (int c = 0; c < SB_COMP_COUNT; c++) {
            bd->share_z[c] = vzz > 0.0 ? bd->cz[c] * bd->cz[c] / vzz : 0.0;
            bd->share_h[c] = vh > 0.0 ? bd->ch[c] * bd->ch[c] / vh : 0.0;
        }
    }

    out->sigma_z_m = sqrt(vzz);
    out->cov_ee_m2 = vee;
    out->cov_en_m2 = ven;
    out->cov_nn_m2 = vnn;
    /* eigenvalues of the 2x2 symmetric covariance */
    const double mid = 0.5 * (vee + vnn);
    const double rad = hypot(0.5 * (vee - vnn), ven);
    const double l1 = mid + rad, l2 = mid - rad;
    out->sigma_h_max_m = sqrt(l1 > 0.0 ? l1 : 0.0);
    out->sigma_h_min_m = sqrt(l2 > 0.0 ? l2 : 0.0);
    out->tvu95_m = SB_K95_1D * out->sigma_z_m;
    /* IHO S-44 ed. 6 section 2: 2.45 sigma, here with sigma = sigma_max */
    out->thu95_s44_m = SB_S44_K95_2D * out->sigma_h_max_m;
    out->thu95_m = h95 ? sb_horiz95_radius(h95, vee, ven, vnn) : NAN;

    if (!isfinite(out->sigma_z_m) || !isfinite(out->sigma_h_max_m) ||
        (h95 && !(out->thu95_m >= 0.0)))
        return SB_ENUM;
    return SB_OK;
}

int sb_breakdown_dominant(const struct sb_breakdown *bd, int vertical)
{
    const double *s = vertical ? bd->share_z : bd->share_h;
    int best = -1;
    double bv = 0.0;
    for (int c = 0; c < SB_COMP_COUNT; c++)
        if (s[c] > bv) {
            bv = s[c];
            best = c;
        }
    return best;
}
