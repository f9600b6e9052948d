/*
 * swathbudget — a precomputed depth x beam-angle table of the engine's
 * TVU95 and THU95, for checking millions of soundings.
 *
 * Running the full propagation (sb_beam_setup + sb_propagate, a few
 * microseconds) for every sounding of a survey would dominate an audit; the
 * uncertainty varies smoothly with depth and angle, so a table interpolated
 * bilinearly serves instead, with its interpolation error bounded.
 *
 * Layout.  Depth is split into octaves [2^e, 2^(e+1)) metres; inside an
 * octave the nodes are equally spaced in depth (n_d cells), so the step is
 * between 1/n_d and 1/(2 n_d) of the depth: a relative resolution that is
 * the same at 5 m and at 5000 m, and an index found from the bits of the
 * double without a logarithm.  Beam angles are equally spaced from
 * -angle_max to +angle_max (n_a cells).  An octave is built the first time a
 * depth in it is looked up, so only the octaves a survey touches cost
 * anything.
 *
 * Error bound.  After an octave is built, the engine is evaluated again at
 * the midpoint of every cell edge and at every cell centre, where the error
 * of bilinear interpolation of a locally quadratic function is largest
 * (it is s(1-s) h^2 f_xx / 2 + t(1-t) k^2 f_yy / 2, largest at s or
 * t = 1/2; e.g. Press et al. 2007, Numerical Recipes 3rd ed., 3.6 -- cited
 * from memory).  The octave is refined (the resolution doubled in the
 * direction whose error dominates) until that measured error is at most
 * half the tolerance; the bound claimed for the octave is twice its
 * measured error, and never less than the tolerance asked for -- the
 * factor 2 covers the variation of the curvature across a cell, and
 * tests/test_tvutable.c checks the claim against direct evaluation at many
 * random points.
 */
#ifndef SWATHBUDGET_TVUTABLE_H
#define SWATHBUDGET_TVUTABLE_H

#include <stddef.h>

#include "swathbudget/error.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/system.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Tolerance used when the caller gives none: 0.1 % of the uncertainty,
 * a millimetre at 1 m TVU -- well below any limit's resolution. */
#define SB_TVUTABLE_TOL_DEFAULT 1e-3

/* Resolution the octaves start from: 16 depth cells per octave (a step of
 * 3-6 % of the depth), 1 degree in angle.  Refinement stops at 512 depth
 * cells and 0.01 deg. */
#define SB_TVUTABLE_ND_START 16
#define SB_TVUTABLE_ND_MAX 512
#define SB_TVUTABLE_ANGLE_STEP_START (3.14159265358979323846 / 180.0)
#define SB_TVUTABLE_NA_MAX 20000

/* Deepest depth served: 2^14 m = 16384 m, beyond any ocean. */
#define SB_TVUTABLE_DEPTH_MAX_M 16384.0

/*
 * The function tabulated: TVU95 and THU95 (metres) at depth_m (m, seafloor
 * below the surface) and angle_rad (rad, port negative).  Returns SB_OK or
 * an SB_* code with err filled.  Must be deterministic.
 */
typedef int (*sb_tvu_fn)(void *ctx, double depth_m, double angle_rad,
                         double *tvu95_m, double *thu95_m,
                         struct sb_error *err);

struct sb_tvutable_opts {
    double depth_min_m;   /* shallowest depth served, m, > 0; the function
                             must be defined there (for the engine: below
                             the transducer) */
    double angle_max_rad; /* largest |angle| served, rad, in (0, pi/2) */
    double tol_rel;       /* relative error bound asked for, in
                             [1e-6, 0.1]; 0 means SB_TVUTABLE_TOL_DEFAULT */
};

struct sb_tvutable; /* opaque */

/*
 * Make an empty table for fn over depth [o->depth_min_m,
 * SB_TVUTABLE_DEPTH_MAX_M] and angle [-angle_max, +angle_max].  Nothing is
 * evaluated yet.  Returns SB_OK with *out; SB_EINPUT for bad options
 * (message without position); SB_ENOMEM.  Free with sb_tvutable_free.
 */
int sb_tvutable_alloc(const struct sb_tvutable_opts *o, sb_tvu_fn fn,
                      void *ctx, struct sb_tvutable **out,
                      struct sb_error *err);

void sb_tvutable_free(struct sb_tvutable *t);

/*
 * Build every octave that holds a depth in [d0_m, d1_m] now (so that a later
 * lookup in that range never evaluates the engine).  Errors as for
 * sb_tvutable_lookup.
 */
int sb_tvutable_prepare(struct sb_tvutable *t, double d0_m, double d1_m,
                        struct sb_error *err);

/*
 * TVU95 and THU95 (m) at depth_m and angle_rad, interpolated.  The first
 * lookup in an octave builds it (evaluates fn some thousands of times and
 * allocates the octave once); every other lookup is allocation-free, a few
 * nanoseconds.  Returns SB_OK; SB_EINPUT when the point is outside the
 * table (depth below depth_min or above SB_TVUTABLE_DEPTH_MAX_M, |angle|
 * above angle_max, not finite) -- err is filled only when not NULL, so a
 * hot loop may pass NULL and word its own message; SB_ENOMEM or the
 * function's own status when building an octave fails (err filled).
 */
int sb_tvutable_lookup(struct sb_tvutable *t, double depth_m,
                       double angle_rad, double *tvu95_m, double *thu95_m,
                       struct sb_error *err);

/* The relative interpolation error claimed for every lookup so far:
 * the largest claimed bound over the octaves built (0 before any). */
double sb_tvutable_bound(const struct sb_tvutable *t);

/* The largest relative error measured at the check points (edge midpoints
 * and cell centres) of the octaves built (0 before any). */
double sb_tvutable_measured(const struct sb_tvutable *t);

/* Number of function evaluations spent so far (nodes and checks). */
size_t sb_tvutable_evaluations(const struct sb_tvutable *t);

/* Shallowest depth and largest |angle| served (m, rad). */
double sb_tvutable_depth_min(const struct sb_tvutable *t);
double sb_tvutable_angle_max(const struct sb_tvutable *t);

/* ---- the engine as a tabulated function -------------------------------- */

/* Context of sb_tvu_engine: a validated system, the THU table, and which
 * horizontal figure to tabulate (enum sb_thu_rule of propagate.h). */
struct sb_tvu_engine {
    const struct sb_system *sys;
    const struct sb_horiz95 *h95; /* required for SB_THU_EXACT */
    int thu_rule;
};

/* An sb_tvu_fn: sb_beam_setup + sb_propagate (TVU95 = 1.96 sigma_z,
 * THU95 by the rule).  ctx is a struct sb_tvu_engine. */
int sb_tvu_engine(void *ctx, double depth_m, double angle_rad,
                  double *tvu95_m, double *thu95_m, struct sb_error *err);

/* Shallowest depth the engine accepts for sys plus a margin (the transducer
 * depth draft + squat + loading, plus 0.1 m), m: a good depth_min_m. */
double sb_tvu_engine_depth_min(const struct sb_system *sys);

#ifdef __cplusplus
}
#endif

#endif
