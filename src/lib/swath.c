/*
 * swathbudget — fail angle per depth and limits (scan + Brent), and the
 * uncertainty grid.
 */
#include "swathbudget/swath.h"

#include <math.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_roots.h>

#include "swathbudget/georef.h"

const char *sb_swath_reason_name(int reason)
{
    switch (reason) {
    case SB_SWATH_TVU: return "tvu";
    case SB_SWATH_THU: return "thu";
    case SB_SWATH_NADIR: return "nadir";
    case SB_SWATH_MAX_ANGLE: return "max_angle";
    case SB_SWATH_RAY_TURNS: return "ray_turns";
    default: return "?";
    }
}

const char *sb_swath_limit_name(int failing)
{
    switch (failing) {
    case SB_LIMIT_NONE: return "none";
    case SB_LIMIT_TVU: return "tvu";
    case SB_LIMIT_THU: return "thu";
    case SB_LIMIT_BOTH: return "tvu+thu";
    default: return "?";
    }
}

/* Everything one evaluation needs. */
struct ctx {
    const struct sb_system *sys;
    const struct sb_horiz95 *h95;
    double depth_m;
    double tvu_lim, thu_lim;
    int rule;
    int status;            /* first failure inside a GSL callback */
    struct sb_error *err;
};

/* TVU95 and THU95 (by the rule) at a signed angle; optional breakdown. */
static int eval(struct ctx *x, double angle, struct sb_tpu *t, struct sb_breakdown *bd)
{
    struct sb_beam b;
    int rc = sb_beam_setup(x->sys, x->depth_m, angle, &b, x->err);
    if (rc)
        return rc;
    rc = sb_propagate(&b, x->rule == SB_THU_EXACT ? x->h95 : NULL, t, bd);
    if (rc)
        return sb_error_set(x->err, rc, "", 0, 0,
                            "uncertainty not finite at depth %.6g m, angle %.6g deg "
                            "(finite inputs)", x->depth_m, angle * 180.0 / 3.14159265358979323846);
    return SB_OK;
}

static double thu_of(const struct ctx *x, const struct sb_tpu *t)
{
    return x->rule == SB_THU_EXACT ? t->thu95_m : t->thu95_s44_m;
}

/* Brent callbacks: quantity - limit at a signed angle (params: ctx and the
 * side's sign folded into the angle by the caller). */
struct bctx {
    struct ctx *x;
    double sign;
    int which; /* SB_LIMIT_TVU or SB_LIMIT_THU */
};

static double excess(double a, void *p)
{
    struct bctx *bc = p;
    struct sb_tpu t;
    if (bc->x->status)
        return 0.0;
    int rc = eval(bc->x, bc->sign * a, &t, NULL);
    if (rc) {
        bc->x->status = rc;
        return 0.0; /* ends the iteration: the caller checks status */
    }
    return bc->which == SB_LIMIT_TVU ? t.tvu95_m - bc->x->tvu_lim : thu_of(bc->x, &t) - bc->x->thu_lim;
}

/* Root of quantity(angle) = limit in [lo, hi] (|angle|), where the
 * quantity is <= limit at lo and > limit at hi. */
static int refine(struct ctx *x, gsl_root_fsolver *s, double sign, int which, double lo,
                  double flo, double hi, double *root)
{
    if (flo == 0.0) { /* exactly at the limit: still passing, and the root */
        *root = lo;
        return SB_OK;
    }
    struct bctx bc = { x, sign, which };
    gsl_function F = { excess, &bc };
    if (gsl_root_fsolver_set(s, &F, lo, hi) != GSL_SUCCESS)
        return sb_error_set(x->err, SB_ENUM, "", 0, 0,
                            "fail-angle search could not bracket the crossing (a sign change)");
    for (int it = 0; it < 200; it++) {
        int st = gsl_root_fsolver_iterate(s);
        if (x->status)
            return x->status;
        if (st != GSL_SUCCESS)
            break;
        double a = gsl_root_fsolver_x_lower(s), b = gsl_root_fsolver_x_upper(s);
        if (gsl_root_test_interval(a, b, SB_SWATH_ANGLE_TOL_RAD, 0.0) == GSL_SUCCESS) {
            *root = gsl_root_fsolver_root(s);
            return SB_OK;
        }
    }
    return sb_error_set(x->err, SB_ENUM, "", 0, 0,
                        "fail-angle search did not converge at depth %.6g m (Brent within 200 "
                        "iterations)", x->depth_m);
}

static int dominant_of(const struct sb_breakdown *bd, int vertical)
{
    return sb_breakdown_dominant(bd, vertical);
}

/* Fill a side record at |angle| a with the quantities there. */
static int finish_side(struct ctx *x, double sign, double a, int reason, int failing,
                       struct sb_swath_side *sd)
{
    struct sb_tpu t;
    struct sb_breakdown bd;
    struct sb_beam b;
    int rc = sb_beam_setup(x->sys, x->depth_m, sign * a, &b, x->err);
    if (rc)
        return rc;
    if (sb_propagate(&b, x->rule == SB_THU_EXACT ? x->h95 : NULL, &t, &bd))
        return sb_error_set(x->err, SB_ENUM, "", 0, 0, "uncertainty not finite (finite inputs)");
    sd->reason = reason;
    sd->failing = failing;
    sd->angle_rad = a;
    sd->across_m = fabs(b.across_m);
    sd->tvu95_m = t.tvu95_m;
    sd->thu95_m = thu_of(x, &t);
    int vertical;
    if (failing == SB_LIMIT_TVU)
        vertical = 1;
    else if (failing == SB_LIMIT_THU)
        vertical = 0;
    else /* both or none: the quantity nearer (or further beyond) its limit */
        vertical = sd->tvu95_m / x->tvu_lim >= sd->thu95_m / x->thu_lim;
    sd->dominant = dominant_of(&bd, vertical);
    return SB_OK;
}

static int scan_side(struct ctx *x, gsl_root_fsolver *s, double sign, struct sb_swath_side *sd)
{
    double amax = x->sys->echosounder.max_angle;
    /* with a profile, rays beyond the turning angle never reach the
     * seafloor: the scan stops just inside it */
    int end_reason = SB_SWATH_MAX_ANGLE;
    const double aturn = sb_beam_turn_angle(x->sys, x->depth_m) - SB_SWATH_ANGLE_TOL_RAD;
    if (aturn < amax) {
        amax = aturn > 0.0 ? aturn : 0.0;
        end_reason = SB_SWATH_RAY_TURNS;
    }
    struct sb_tpu t;
    int rc = eval(x, 0.0, &t, NULL);
    if (rc)
        return rc;
    double ftv = t.tvu95_m - x->tvu_lim, fth = thu_of(x, &t) - x->thu_lim;
    if (ftv > 0.0 || fth > 0.0)
        return finish_side(x, sign, 0.0, SB_SWATH_NADIR,
                           (ftv > 0.0 ? SB_LIMIT_TVU : 0) | (fth > 0.0 ? SB_LIMIT_THU : 0), sd);

    const int nstep = (int)ceil(amax / SB_SWATH_SCAN_STEP_RAD - 1e-9);
    if (nstep < 1)
        return finish_side(x, sign, amax, end_reason, SB_LIMIT_NONE, sd);
    double lo = 0.0;
    for (int k = 1; k <= nstep; k++) {
        double hi = k == nstep ? amax : k * SB_SWATH_SCAN_STEP_RAD;
        rc = eval(x, sign * hi, &t, NULL);
        if (rc)
            return rc;
        double gtv = t.tvu95_m - x->tvu_lim, gth = thu_of(x, &t) - x->thu_lim;
        if (gtv > 0.0 || gth > 0.0) {
            double rtv = INFINITY, rth = INFINITY;
            if (gtv > 0.0 && (rc = refine(x, s, sign, SB_LIMIT_TVU, lo, ftv, hi, &rtv)))
                return rc;
            if (gth > 0.0 && (rc = refine(x, s, sign, SB_LIMIT_THU, lo, fth, hi, &rth)))
                return rc;
            int failing, reason;
            double a;
            if (fabs(rtv - rth) <= SB_SWATH_ANGLE_TOL_RAD) {
                failing = SB_LIMIT_BOTH;
                reason = SB_SWATH_TVU;
                a = fmin(rtv, rth);
            } else if (rtv < rth) {
                failing = SB_LIMIT_TVU;
                reason = SB_SWATH_TVU;
                a = rtv;
            } else {
                failing = SB_LIMIT_THU;
                reason = SB_SWATH_THU;
                a = rth;
            }
            return finish_side(x, sign, a, reason, failing, sd);
        }
        lo = hi;
        ftv = gtv;
        fth = gth;
    }
    return finish_side(x, sign, amax, end_reason, SB_LIMIT_NONE, sd);
}

int sb_swath_fail(const struct sb_system *sys, const struct sb_horiz95 *h95, double depth_m,
                  double tvu_limit_m, double thu_limit_m, int thu_rule,
                  struct sb_swath_result *out, struct sb_error *err)
{
    if (!(tvu_limit_m > 0.0) || !(thu_limit_m > 0.0)) /* NaN fails too */
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "TVU or THU limit not positive (limits above 0 m)");
    if (thu_rule != SB_THU_EXACT && thu_rule != SB_THU_S44)
        return sb_error_set(err, SB_EINPUT, "", 0, 0, "unknown THU rule (exact or s44)");
    if (thu_rule == SB_THU_EXACT && !h95)
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "exact THU rule without its table (sb_horiz95_alloc first)");
    struct sb_beam probe;
    int rc = sb_beam_setup(sys, depth_m, 0.0, &probe, err);
    if (rc)
        return rc;

    memset(out, 0, sizeof *out);
    out->depth_m = depth_m;
    out->tvu_limit_m = tvu_limit_m;
    out->thu_limit_m = thu_limit_m;
    out->thu_rule = thu_rule;

    gsl_root_fsolver *s = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
    if (!s)
        return sb_error_set(err, SB_ENOMEM, "", 0, 0, "out of memory (Brent solver)");
    struct ctx x = { sys, h95, depth_m, tvu_limit_m, thu_limit_m, thu_rule, 0, err };
    rc = scan_side(&x, s, -1.0, &out->port);
    if (!rc)
        rc = scan_side(&x, s, +1.0, &out->starboard);
    gsl_root_fsolver_free(s);
    if (rc)
        return rc;
    out->width_m = out->port.across_m + out->starboard.across_m;
    return SB_OK;
}

int sb_swath_grid(const struct sb_system *sys, const struct sb_horiz95 *h95,
                  const double *depths_m, size_t n_depths, const double *angles_rad,
                  size_t n_angles, struct sb_grid_point *out, struct sb_error *err)
{
    for (size_t ia = 0; ia < n_angles; ia++) {
        struct sb_beam b;
        int fresh = 1; /* b must be set up (first depth, or after a turn) */
        for (size_t id = 0; id < n_depths; id++) {
            int rc = fresh ? sb_beam_setup(sys, depths_m[id], angles_rad[ia], &b, err)
                           : sb_beam_redepth(&b, depths_m[id], err);
            struct sb_grid_point *g = &out[id * n_angles + ia];
            if (rc == SB_RAY_TURNS) {
                g->tvu95_m = g->thu95_m = g->thu95_s44_m = g->sigma_z_m = INFINITY;
                g->ray_turns = 1;
                fresh = 1;
                continue;
            }
            if (rc)
                return rc;
            fresh = 0;
            struct sb_tpu t;
            if (sb_propagate(&b, h95, &t, NULL))
                return sb_error_set(err, SB_ENUM, "", 0, 0,
                                    "uncertainty not finite at depth %.6g m (finite inputs)",
                                    depths_m[id]);
            g->ray_turns = 0;
            g->tvu95_m = t.tvu95_m;
            g->thu95_m = t.thu95_m;
            g->thu95_s44_m = t.thu95_s44_m;
            g->sigma_z_m = t.sigma_z_m;
        }
    }
    return SB_OK;
}
