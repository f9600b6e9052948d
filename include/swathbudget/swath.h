/*
 * swathbudget — usable swath: the fail angle per depth and order, and the
 * uncertainty on a (depth, angle) grid.
 *
 * Fail angle (per side): the largest |theta| from nadir such that
 * TVU95 <= the TVU limit and THU95 <= the THU limit at EVERY angle between
 * nadir and it.  Found by scanning outward from nadir in steps of
 * SB_SWATH_SCAN_STEP_RAD and refining the first crossing with Brent's
 * method (GSL gsl_root_fsolver_brent) to SB_SWATH_ANGLE_TOL_RAD.  The limits
 * are plain numbers (metres) so this module does not depend on how a
 * standard defines them (orders.h gives them for IHO S-44).
 */
#ifndef SWATHBUDGET_SWATH_H
#define SWATHBUDGET_SWATH_H

#include <stddef.h>

#include "swathbudget/error.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/propagate.h"
#include "swathbudget/system.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Scan step: 0.1 deg.  A window where the limits pass again after failing
 * is not "usable swath" anyway; the step only has to be fine enough not to
 * step over a failing window narrower than it, and TVU and THU vary slowly
 * with angle. */
#define SB_SWATH_SCAN_STEP_RAD (0.1 * 3.14159265358979323846 / 180.0)
/* Brent tolerance on the fail angle: 1e-8 rad (about 6e-7 deg), far below
 * the 0.01 deg asked for. */
#define SB_SWATH_ANGLE_TOL_RAD 1e-8

/* What ends the usable swath on one side. */
enum sb_swath_reason {
    SB_SWATH_TVU = 0,      /* "tvu": TVU95 reaches its limit first */
    SB_SWATH_THU = 1,      /* "thu": THU95 reaches its limit first */
    SB_SWATH_NADIR = 2,    /* "nadir": the limit(s) already fail at nadir */
    SB_SWATH_MAX_ANGLE = 3, /* "max_angle": both limits hold out to the
                              system's maximum beam angle */
    SB_SWATH_RAY_TURNS = 4  /* "ray_turns": both limits hold out to the
                              angle beyond which the ray, refracted by the
                              profile, turns before it reaches the seafloor
                              (sb_beam_turn_angle); the side ends there */
};

/* Which limit(s) are exceeded (bit mask). */
enum sb_swath_limit {
    SB_LIMIT_NONE = 0,
    SB_LIMIT_TVU = 1,
    SB_LIMIT_THU = 2,
    SB_LIMIT_BOTH = 3
};

struct sb_swath_side {
    int reason;        /* enum sb_swath_reason */
    int failing;       /* enum sb_swath_limit: the limit crossed at the fail
                          angle (for "nadir": those exceeded at nadir; BOTH
                          when the two cross within the tolerance; NONE for
                          "max_angle") */
    double angle_rad;  /* |fail angle|, rad: 0 for "nadir", the maximum beam
                          angle for "max_angle", just inside the turning
                          angle (by SB_SWATH_ANGLE_TOL_RAD) for "ray_turns" */
    double across_m;   /* |across-track distance| of the sounding at that
                          angle from the transducer on the flat seafloor, m */
    double tvu95_m;    /* TVU95 at that angle, m */
    double thu95_m;    /* THU95 at that angle by the chosen rule, m */
    int dominant;      /* component (enum sb_component) with the largest
                          share of the variance of the failing quantity at
                          that angle (vertical for TVU, horizontal for THU;
                          for "max_angle" the quantity nearer its limit);
                          -1 if no variance at all */
};

struct sb_swath_result {
    double depth_m;       /* as given, m */
    double tvu_limit_m;   /* as given, m */
    double thu_limit_m;   /* as given, m */
    int thu_rule;         /* enum sb_thu_rule */
    struct sb_swath_side port;      /* beam angles < 0 */
    struct sb_swath_side starboard; /* beam angles > 0 */
    double width_m;       /* port.across_m + starboard.across_m: usable
                             swath width on a flat seafloor, m */
};

/*
 * Fail angles at one depth for one pair of limits.
 *   sys:       a validated system;
 *   h95:       THU table (sb_horiz95_alloc); required for SB_THU_EXACT,
 *              may be NULL for SB_THU_S44;
 *   depth_m:   seafloor depth below the surface, m (below the transducer);
 *   tvu_limit_m, thu_limit_m: the limits at that depth, m, > 0 (INFINITY
 *              allowed: that limit never fails);
 *   thu_rule:  enum sb_thu_rule.
 * Returns SB_OK with *out filled; SB_EINPUT (bad depth, limits or rule,
 * message without position); SB_EINTERNAL (no table for the exact rule);
 * SB_ENOMEM (Brent workspace); SB_ENUM (a non-finite uncertainty, or Brent
 * did not converge).  One GSL solver is allocated per call; the scan itself
 * allocates nothing.
 */
int sb_swath_fail(const struct sb_system *sys, const struct sb_horiz95 *h95,
                  double depth_m, double tvu_limit_m, double thu_limit_m,
                  int thu_rule, struct sb_swath_result *out,
                  struct sb_error *err);

/* "tvu", "thu", "nadir", "max_angle", "ray_turns"; "?" out of range. */
const char *sb_swath_reason_name(int reason);
/* "none", "tvu", "thu", "tvu+thu"; "?" out of range. */
const char *sb_swath_limit_name(int failing);

/* One point of a grid. */
struct sb_grid_point {
    double tvu95_m;     /* m */
    double thu95_m;     /* exact 95 % radius, m (NAN without a table) */
    double thu95_s44_m; /* 2.45 sigma_max, m */
    double sigma_z_m;   /* m */
    int ray_turns;      /* 1: the ray of this angle turns before it reaches
                           this depth (profile); no sounding, the four
                           figures are then INFINITY */
};

/*
 * Uncertainty at every (depth, angle) pair: out[i_depth * n_angles +
 * i_angle].  depths_m: seafloor depths (m); angles_rad: beam angles (rad,
 * port negative, within the system's maximum).  h95 may be NULL (thu95_m =
 * NAN).  The loop runs angle-outer so that the per-angle part of the beam
 * set-up is done once per angle.  A point whose ray turns above the
 * seafloor is marked (ray_turns) and does not stop the grid.  Returns
 * SB_OK, SB_EINPUT (a bad depth or angle; the message names it) or SB_ENUM
 * (a non-finite uncertainty).  Allocation-free.
 */
int sb_swath_grid(const struct sb_system *sys, const struct sb_horiz95 *h95,
                  const double *depths_m, size_t n_depths,
                  const double *angles_rad, size_t n_angles,
                  struct sb_grid_point *out, struct sb_error *err);

#ifdef __cplusplus
}
#endif

#endif
