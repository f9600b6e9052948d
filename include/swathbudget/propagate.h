/*
 * swathbudget — the GUM law of propagation of uncertainty applied to one
 * sounding (JCGM 100:2008, 5.1.2, uncorrelated inputs).
 *
 * For a beam set up by sb_beam_setup (georef.h), the sensitivity of the
 * sounding error e = (E, N, Z) to every component x_i is taken by central
 * differences of the full forward model,
 *     J_i = (e(+h_i) - e(-h_i)) / (2 h_i),   h_i = SB_JAC_STEP * u_i,
 * and the covariance of the sounding is C = sum_i (J_i u_i)(J_i u_i)^T
 * (inputs independent).  From it:
 *     sigma_z            standard uncertainty of the depth, m
 *     TVU95 = 1.959964 sigma_z  (SB_K95_1D, the 97.5 % point of the normal;
 *                               IHO S-44 ed. 6 rounds it to 1.96)
 *     THU95 = radius of the circle holding 95 % of the 2-D normal with the
 *             horizontal 2x2 covariance (horiz95.h, tabulated)
 *     THU95_s44 = 2.45 sigma_max (IHO S-44 ed. 6 section 2 writes 2.45 sigma
 *             for equal sigma in both directions; with an elongated ellipse
 *             we take the larger semi-axis: conservative, never below the
 *             exact radius)
 * and, per component, its contribution J_i u_i and share of the variance.
 */
#ifndef SWATHBUDGET_PROPAGATE_H
#define SWATHBUDGET_PROPAGATE_H

#include "swathbudget/error.h"
#include "swathbudget/georef.h"
#include "swathbudget/horiz95.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Central-difference step as a fraction of each input's standard
 * uncertainty.  Small enough that the truncation error (~ h^2 f'''/6) is
 * below 1e-7 relative for every term of the model, large enough that
 * rounding in e (about 1e-16 of the depth) stays below 1e-8 relative for
 * any contribution above a micrometre. */
#define SB_JAC_STEP 1e-2

/* Which horizontal 95 % figure a fail-angle search compares with THU. */
enum sb_thu_rule {
    SB_THU_EXACT = 0, /* exact 95 % radius of the error ellipse */
    SB_THU_S44 = 1    /* 2.45 x larger semi-axis (IHO S-44 style) */
};

/* The total propagated uncertainty of one sounding. */
struct sb_tpu {
    double sigma_z_m;     /* standard uncertainty of the depth, m */
    double cov_ee_m2;     /* horizontal covariance: east variance, m^2 */
    double cov_en_m2;     /*   east-north covariance, m^2 */
    double cov_nn_m2;     /*   north variance, m^2 */
    double sigma_h_max_m; /* larger semi-axis of the error ellipse, m */
    double sigma_h_min_m; /* smaller semi-axis, m */
    double tvu95_m;       /* SB_K95_1D * sigma_z, m */
    double thu95_m;       /* exact 95 % radius (table), m; NAN if no table */
    double thu95_s44_m;   /* 2.45 * sigma_h_max, m */
};

/* Per-component detail of one sounding (for breakdowns). */
struct sb_breakdown {
    double j[SB_COMP_COUNT][3]; /* sensitivity d(E, N, Z)/dx_i, m per unit
                                   of the component (0 where u_i = 0) */
    double cz[SB_COMP_COUNT];   /* signed vertical contribution J_z,i u_i, m */
    double ch[SB_COMP_COUNT];   /* horizontal contribution
                                   sqrt((J_E,i u_i)^2 + (J_N,i u_i)^2), m */
    double share_z[SB_COMP_COUNT]; /* (J_z,i u_i)^2 / sigma_z^2, 0..1 */
    double share_h[SB_COMP_COUNT]; /* ch_i^2 / (var_E + var_N), 0..1 */
};

/*
 * Sensitivities of the sounding error to every component by central
 * differences of sb_georef_error (with a profile, of its SB_PART_LINEAR
 * form: same derivatives, no re-tracing): j[i] = d(E, N, Z)/dx_i.  The step is
 * SB_JAC_STEP * u_i, or for u_i = 0 a small fixed step in the component's
 * unit (1e-6 m, 1e-7 rad, 1e-6 s, 1e-3 m/s, 1e-7 relative), so that every
 * sensitivity is available.  Allocation-free.
 */
void sb_jacobian(const struct sb_beam *b, double j[SB_COMP_COUNT][3]);

/*
 * Propagate the standard uncertainties of beam b into *out (and, when bd is
 * not NULL, the per-component detail).  Components with u_i = 0 are
 * skipped (zero sensitivity reported).  h95 is the THU table from
 * sb_horiz95_alloc; it may be NULL, and thu95_m is then NAN (the S-44 figure
 * is always filled).
 * Returns SB_OK, or SB_ENUM if a result is not finite.  Allocation-free,
 * thread-safe.
 */
int sb_propagate(const struct sb_beam *b, const struct sb_horiz95 *h95,
                 struct sb_tpu *out, struct sb_breakdown *bd);

/*
 * The component with the largest share of the vertical (vertical != 0) or
 * horizontal (vertical == 0) variance in bd; -1 when every share is 0.
 */
int sb_breakdown_dominant(const struct sb_breakdown *bd, int vertical);

#ifdef __cplusplus
}
#endif

#endif
