/*
 * swathbudget — ray tracing through a horizontally stratified water column.
 *
 * The sound velocity profile is cut into layers in which the speed varies
 * linearly with depth (constant gradient g).  Inside such a layer a ray is an
 * arc of a circle, or a straight line where g = 0, so the depth, horizontal
 * offset and travel time across a layer have closed forms.  Along a ray the
 * Snell parameter p = sin(theta) / c is constant (Snell's law for a
 * stratified medium); theta is measured from the vertical.
 *
 * Two objects, both built before the hot loop:
 *
 *   struct sb_raylayers  the layer table of one profile below one transducer
 *                        depth (depths, speeds, gradients); allocated once.
 *   struct sb_ray        one ray (one Snell parameter, one speed scale):
 *                        cumulative travel time and offset at every layer
 *                        boundary.  Fixed size, no allocation; a query for a
 *                        depth or a time is a binary search plus one
 *                        closed-form step inside a layer.
 *
 * Conventions: SI units; depth z positive down from the surface; the ray
 * starts at the transducer depth and goes down; a negative Snell parameter
 * (port) gives a negative horizontal offset, by symmetry.
 *
 * Outside the samples of the profile:
 *   - above the first sample the speed is taken constant (the first sample's);
 *   - below the last sample the speed is taken constant (the last sample's):
 *     the last sample is extended as a constant-speed half-space down to any
 *     seafloor.  We do not continue the last gradient because a steep
 *     gradient measured near the end of a cast, extrapolated over hundreds of
 *     metres, can invent speeds (even turning rays) the water does not have;
 *     a constant extension is the conservative common practice.
 *
 * Turning rays: where p * c reaches 1 the ray is horizontal and turns back
 * up.  A query for a depth below the turning depth (or a time after the
 * turning time) returns SB_RAY_TURNED; the ray's fields turns, z_turn_m,
 * t_turn_s, x_turn_m say where it turned, and the outputs are filled with the
 * turning point (never NaN).
 */
#ifndef SWATHBUDGET_RAYTRACE_H
#define SWATHBUDGET_RAYTRACE_H

#include <stddef.h>

#include "swathbudget/error.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Largest number of layers below the transducer, the constant-speed
 * half-space under the last sample included.  A profile with more samples
 * below the transducer is rejected by sb_raylayers_alloc (SB_EINPUT) with a
 * message asking for a coarser profile: we do not thin silently. */
#define SB_RAY_MAX_LAYERS 1024

/* Status of a query that asks for a depth the ray never reaches (it turned
 * above it) or a time after it turned.  Equal to SB_ENUM: the ray queries
 * return SB_ENUM for this reason only, so a caller may test either name. */
#define SB_RAY_TURNED SB_ENUM

struct sb_raylayers; /* opaque: the layer table of one profile */

/* One ray.  Plain data of fixed size (about 16 KiB): declare it on the stack
 * or inside another structure; sb_ray_init fills it without allocating.
 * Read-only fields for callers: p_spm, scale, turns, z_turn_m, t_turn_s,
 * x_turn_m.  The tables are private to raytrace.c. */
struct sb_ray {
    const struct sb_raylayers *layers; /* the table it was traced through */
    double p_spm;    /* Snell parameter as given, s/m (sign = side) */
    double scale;    /* speed scale below the transducer (1 = none) */
    double q_spm;    /* |p| * scale: sin(theta) = q * c_profile(z) */
    int turns;       /* 1 when the ray turns (becomes horizontal) */
    size_t n_valid;  /* boundaries 0 .. n_valid-1 are reached */
    double z_turn_m; /* depth where it turns (HUGE_VAL when it does not) */
    double t_turn_s; /* one-way time from the transducer to the turn */
    double x_turn_m; /* signed horizontal offset of the turn */
    double t_s[SB_RAY_MAX_LAYERS]; /* one-way time at the top of layer k */
    double x_m[SB_RAY_MAX_LAYERS]; /* |offset| at the top of layer k */
};

/*
 * Build the layer table of a profile for a transducer at depth
 * z_transducer_m (m, >= 0, finite; it may lie between samples, where the
 * speed is interpolated linearly, or above the first or below the last).
 *
 * depth_m:   n sample depths, m, positive down, finite, strictly increasing.
 * speed_mps: n sound speeds, m/s, finite and > 0.
 * n:         >= 1 (one sample means a constant speed everywhere).
 *
 * On success *out owns a new table (free with sb_raylayers_free) and SB_OK
 * is returned.  Errors: SB_EINPUT (bad sample, with the 1-based sample
 * number in the message; more than SB_RAY_MAX_LAYERS layers below the
 * transducer), SB_ENOMEM.  err may be NULL.
 */
int sb_raylayers_alloc(const double *depth_m, const double *speed_mps,
                       size_t n, double z_transducer_m,
                       struct sb_raylayers **out, struct sb_error *err);

/* Free a table from sb_raylayers_alloc (NULL is allowed). */
void sb_raylayers_free(struct sb_raylayers *L);

/* Speed of the profile at depth z_m (m): linear between samples, constant
 * above the first and below the last.  Unscaled.  NaN in, NaN out. */
double sb_raylayers_speed_at(const struct sb_raylayers *L, double z_m);

/* Transducer depth (m) and the profile speed there (m/s, unscaled): c0 in
 * p = sin(theta0) / c0. */
double sb_raylayers_transducer_depth(const struct sb_raylayers *L);
double sb_raylayers_transducer_speed(const struct sb_raylayers *L);

/* Number of layers below the transducer, the half-space included. */
size_t sb_raylayers_count(const struct sb_raylayers *L);

/*
 * Trace one ray: fill *ray with the cumulative one-way time and offset at
 * every layer boundary below the transducer, and find where it turns.
 *
 * p:     Snell parameter sin(theta0) / c0, s/m; the sign picks the side
 *        (negative = port, offsets negative); |p| * c0 < 1 for a ray that
 *        leaves the transducer downward.  p = 0 is the vertical ray.
 * scale: every layer speed below the transducer is multiplied by scale
 *        (1 = none), with p held fixed — the model of a relative error of
 *        the profile when the speed at the transducer is known separately.
 *        Must be finite and > 0.
 *
 * Returns SB_OK (also for a ray that turns: the turn is reported by the
 * queries and the field turns), or SB_EINPUT for a non-finite p or a scale
 * that is not finite and positive.  Cost O(layers); no allocation.
 */
int sb_ray_init(const struct sb_raylayers *L, double p, double scale,
                struct sb_ray *ray);

/* Convenience: sb_ray_init with p = sin(theta0_rad) / c0, where c0 is the
 * unscaled profile speed at the transducer.  theta0_rad in (-pi/2, pi/2),
 * from the vertical, positive to starboard; else SB_EINPUT. */
int sb_ray_init_angle(const struct sb_raylayers *L, double theta0_rad,
                      double scale, struct sb_ray *ray);

/*
 * Planning direction: where the ray reaches depth z_m (m, >= transducer
 * depth): one-way travel time *t_oneway_s (s) from the transducer and
 * signed horizontal offset *x_m (m).  Either output pointer may be NULL.
 *
 * Returns SB_OK; SB_RAY_TURNED when the ray turns above z_m (outputs = the
 * turning point); SB_EINPUT when z_m is not finite or above the transducer
 * (outputs untouched).  O(log layers), no allocation.
 */
int sb_ray_at_depth(const struct sb_ray *ray, double z_m, double *t_oneway_s,
                    double *x_m);

/*
 * Audit direction: where the ray is after a one-way travel time t_oneway_s
 * (s, >= 0): depth *z_m (m, from the surface) and signed horizontal offset
 * *x_m (m).  Either output pointer may be NULL.
 *
 * Returns SB_OK; SB_RAY_TURNED when the ray has turned before that time
 * (outputs = the turning point); SB_EINPUT when the time is not finite or
 * negative (outputs untouched).  O(log layers), no allocation.
 */
int sb_ray_at_time(const struct sb_ray *ray, double t_oneway_s, double *z_m,
                   double *x_m);

/*
 * Signed angle of the ray from the vertical at depth z_m (rad), from Snell's
 * law sin(theta) = p * scale * c(z).  Below a turning depth, or where the
 * ray would be horizontal, it is +-pi/2 (never NaN); above the transducer
 * the transducer's angle in the scaled water.  NaN only for a NaN depth.
 */
double sb_ray_angle_at(const struct sb_ray *ray, double z_m);

#ifdef __cplusplus
}
#endif

#endif
