/*
 * swathbudget — sounding density for feature detection.
 *
 * IHO S-44 ed. 6.0.0 (2020), Table 1, asks the Exclusive and Special Orders
 * (and Order 1a down to 40 m) to detect cubic features of a stated size.
 * Whether a multibeam can do that at a given beam angle depends on how
 * closely its soundings fall on the seafloor there, which this module works
 * out from the echosounder's beam layout, its ping rate and the vessel
 * speed, on a flat seafloor:
 *
 *  - across-track spacing at beam angle theta (depth d below the
 *    transducer, n beams spanning -theta_out..+theta_out):
 *      equiangular: beams dtheta = 2 theta_out / (n - 1) apart, so two
 *        neighbours at theta -/+ dtheta/2 land
 *          dy = d [tan(theta + dtheta/2) - tan(theta - dtheta/2)]
 *             = 2 d sin(dtheta) / (cos(2 theta) + cos(dtheta))
 *        apart (tan a - tan b = sin(a - b) / (cos a cos b) and
 *        2 cos a cos b = cos(a + b) + cos(a - b));
 *      equidistant: the beams are steered to fall at equal distances,
 *          dy = 2 d tan(theta_out) / (n - 1) at every angle;
 *  - along-track spacing: one ping per ping period T, so dx = v T, with
 *    T = 2 R_out / c + overhead the two-way travel time to the outermost
 *    beam (R_out = d / cos theta_out, straight rays at the column speed c)
 *    plus a stated overhead (single-sector pinging, one ping in the water);
 *  - the footprint of a beam of widths (b_across, b_along) at theta: slant
 *    range R = d / cos theta, across-track R b_eff / cos theta with
 *    b_eff = b_across / cos theta for a flat array (steered beams broaden)
 *    and b_across for a curved one; along-track R b_along (small-angle
 *    footprint of a conical beam on a flat seafloor, e.g. Lurton 2010,
 *    "An Introduction to Underwater Acoustics", 2nd ed., ch. 8);
 *  - the soundings a cube of side s receives on its top face: the sounding
 *    density times the face's area, count = s^2 / (dx dy) (a mean: the
 *    actual number depends on where the cube sits in the sounding pattern).
 *
 * The density limit angle is the largest |theta| up to which count >= N,
 * N a stated parameter (default 3: common practice for a confident
 * detection, not a figure of S-44).  Depths here are below the TRANSDUCER
 * (the caller subtracts draft, squat and loading).  SI units throughout.
 */
#ifndef SWATHBUDGET_DENSITY_H
#define SWATHBUDGET_DENSITY_H

#include "swathbudget/error.h"
#include "swathbudget/system.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Soundings a feature must receive when nothing else is stated (common
 * practice, not a figure of IHO S-44). */
#define SB_DENSITY_N_DEFAULT 3.0

enum sb_beam_spacing {
    SB_SPACING_EQUIANGULAR = 0, /* equal angles between beams */
    SB_SPACING_EQUIDISTANT = 1  /* equal distances on a flat seafloor */
};

/* The echosounder as this module needs it (plain data, no system.h). */
struct sb_density_params {
    int n_beams;              /* soundings per ping across the swath, >= 2 */
    enum sb_beam_spacing spacing;
    double sector_rad;        /* outermost beam angle each side, the swath
                                 the beams are spread over, in (0, pi/2) */
    double beam_across_rad;   /* across-track beam width at broadside, > 0 */
    double beam_along_rad;    /* along-track beam width, > 0 */
    int flat_array;           /* 1: steered beams broaden as 1/cos theta */
    double ping_overhead_s;   /* added to the two-way travel time, >= 0 */
    double sound_speed_mps;   /* mean speed of the water column, > 0 */
    double min_soundings;     /* N: soundings a feature must receive, > 0 */
};

/* Spacing and footprint at one beam angle. */
struct sb_density_point {
    double angle_rad;         /* beam angle asked for */
    double across_spacing_m;  /* distance to the neighbouring soundings */
    double along_spacing_m;   /* distance between pings, v T */
    double footprint_across_m;
    double footprint_along_m;
    double soundings_per_m2;  /* 1 / (dx dy) */
};

/* Where the density limit lies. */
enum sb_density_verdict {
    SB_DENSITY_LIMITED = 0,   /* count falls below N at angle_rad */
    SB_DENSITY_SECTOR = 1,    /* count >= N out to the outermost beam */
    SB_DENSITY_NADIR = 2      /* count < N already at nadir (angle 0) */
};

struct sb_density_limit {
    enum sb_density_verdict verdict;
    double angle_rad;         /* density limit angle (0 for NADIR, the
                                 sector for SECTOR), >= 0, same both sides */
    double ping_period_s;     /* T */
    double along_spacing_m;   /* v T */
    double count_nadir;       /* soundings on the cube at nadir */
};

/*
 * Check the parameters (ranges as documented in the struct).  Returns SB_OK
 * or SB_EINPUT with "FIELD: what is wrong (what was expected)" (no
 * position).  err may be NULL.
 */
int sb_density_check(const struct sb_density_params *p, struct sb_error *err);

/* Ping period T (s) at depth_tx_m (> 0, m below the transducer):
 * 2 d / (c cos theta_out) + overhead.  Parameters must have passed
 * sb_density_check.  Allocation-free. */
double sb_density_ping_period(const struct sb_density_params *p,
                              double depth_tx_m);

/* Across-track sounding spacing (m) at angle_rad (|angle| <= sector) and
 * depth_tx_m (> 0), formulas in the header comment.  Allocation-free. */
double sb_density_across_spacing(const struct sb_density_params *p,
                                 double depth_tx_m, double angle_rad);

/*
 * Spacings, footprints and density at one beam angle: depth_tx_m > 0 (m),
 * speed_mps >= 0 (m/s), |angle_rad| <= sector.  Returns SB_OK, or SB_EINPUT
 * (message, no position) for an argument out of range.  err may be NULL.
 */
int sb_density_at(const struct sb_density_params *p, double depth_tx_m,
                  double speed_mps, double angle_rad,
                  struct sb_density_point *out, struct sb_error *err);

/*
 * The density limit angle for a cube of side feature_m (> 0, m) at
 * depth_tx_m (> 0) and speed_mps (>= 0): the largest |theta| <= sector with
 * s^2 / (dx dy(theta)) >= N.  dy grows with |theta| (equiangular) or is
 * constant (equidistant), so the angle has a closed form: for equiangular
 * spacing, dy(theta) = dy_max solves to
 *     cos(2 theta) = 2 d sin(dtheta) / dy_max - cos(dtheta).
 * At speed 0 the along-track spacing is 0 and the limit is the sector.
 * Returns SB_OK or SB_EINPUT (arguments out of range).  err may be NULL.
 */
int sb_density_limit(const struct sb_density_params *p, double depth_tx_m,
                     double speed_mps, double feature_m,
                     struct sb_density_limit *out, struct sb_error *err);

/*
 * The highest speed (m/s) at which a cube of side feature_m still receives
 * N soundings out to angle_rad (|angle| <= sector) at depth_tx_m:
 *     v = s^2 / (N dy(theta) T).
 * Returns it in *speed_mps.  SB_OK or SB_EINPUT.  err may be NULL.
 */
int sb_density_max_speed(const struct sb_density_params *p,
                         double depth_tx_m, double feature_m,
                         double angle_rad, double *speed_mps,
                         struct sb_error *err);

/*
 * The parameters of a system (system.h): its echosounder's beams, spacing,
 * maximum beam angle (the sector), beam widths, array type, ping overhead
 * and feature_soundings, and the column sound speed.  Returns 1 with *p
 * filled when the system states its beams, 0 (p untouched) when it does
 * not (then no density limit applies).
 */
int sb_density_params_from_system(const struct sb_system *sys,
                                  struct sb_density_params *p);

/* "limited", "sector", "nadir". */
const char *sb_density_verdict_name(enum sb_density_verdict v);

/* "equiangular", "equidistant"; "?" otherwise. */
const char *sb_beam_spacing_name(enum sb_beam_spacing s);

#ifdef __cplusplus
}
#endif

#endif
