/*
 * swathbudget — Monte Carlo propagation of distributions (JCGM 101:2008).
 *
 * The linear budget (GUM law of propagation, JCGM 100:2008 clause 5) is
 * exact only when the forward model is linear over the spread of its
 * inputs.  This module checks it the way JCGM 101:2008 prescribes: draw
 * every input error from the distribution its stated type implies, run the
 * full forward model on each draw, and summarise the sounding errors.
 *
 * Two layers:
 *  - a GENERIC statistics core that knows nothing of soundings: a model
 *    callback maps n_in input errors dx[] to an output error (E, N, Z); the
 *    inputs are described by standard uncertainties u[] and distributions
 *    dist[] (normal: N(0, u^2); rectangular: uniform on [-sqrt(3) u,
 *    +sqrt(3) u], which has standard deviation u).  It works for any model
 *    and is tested on the JCGM 101 clause 9.2 additive model;
 *  - the sounding glue (sb_mc_verify_*), which sets the model up with the
 *    engine's beam (georef.h) and compares with the linear TVU/THU.
 *
 * Random numbers: GSL's gsl_rng_mt19937, normal draws by
 * gsl_ran_gaussian_ziggurat, rectangular draws by gsl_ran_flat.  Every
 * problem (point) has its own generator, seeded from the user's seed and
 * the point's identity through a splitmix64 hash, and its trials run in
 * order on one thread: results depend on the seed only, never on the
 * number of threads or on scheduling.
 *
 * Units: the core is unit-agnostic (outputs carry the model's unit); the
 * sounding glue works in metres and radians.
 */
#ifndef SWATHBUDGET_MONTECARLO_H
#define SWATHBUDGET_MONTECARLO_H

#include <stddef.h>
#include <stdint.h>

#include "swathbudget/error.h"
#include "swathbudget/units.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Coverage probability of every interval and quantile here. */
#define SB_MC_P 0.95

/* Trials per batch of the adaptive procedure: M = max(J, 10^4) with
 * J = ceil(100 / (1 - p)) = 2000 for p = 0.95 (JCGM 101:2008, 7.9.4 b). */
#define SB_MC_BATCH 10000

/* Smallest fixed number of trials accepted (fewer leave too few values in
 * the tails for a 95 % interval to mean anything; JCGM 101 7.2.2 advises
 * far more, about 10^6). */
#define SB_MC_TRIALS_MIN 1000

/* Largest number of trials, fixed or adaptive: the trial values are kept
 * (8 bytes each for Z and for the horizontal radius) to take quantiles, so
 * this bounds the memory of one point at 160 MB. */
#define SB_MC_TRIALS_MAX 10000000

/* Significant digits of the standard uncertainty the adaptive procedure
 * aims at when none is asked (JCGM 101 7.9.1: 1 or 2 is usual). */
#define SB_MC_DIGITS_DEFAULT 2
#define SB_MC_DIGITS_MAX 4

/*
 * The model: given the input errors dx[0..n_in-1] (each in its input's
 * unit), write the output error out_enz = (E, N, Z) (east, north, down for
 * a sounding; a scalar model uses out_enz[2] and sets the others to 0).
 * It must be a pure function of ctx and dx (it is called concurrently from
 * several threads with the same ctx) and must not allocate.
 */
typedef void (*sb_mc_model)(const void *ctx, const double *dx,
                            double out_enz[3]);

struct sb_mc_options {
    uint64_t seed;     /* user seed (--seed) */
    size_t trials;     /* > 0: fixed number of trials (--trials);
                          0: adaptive (JCGM 101 7.9) to `digits` */
    int digits;        /* n_dig (--digits), 1..SB_MC_DIGITS_MAX: sets the
                          numerical tolerance of the adaptive stop and of
                          the validation (JCGM 101 7.9.2, 8.2) */
    size_t max_trials; /* adaptive cap, <= SB_MC_TRIALS_MAX */
    int threads;       /* worker threads over points, >= 1 */
    double tol_factor; /* the adaptive stop compares twice the standard
                          deviation of each batch average with
                          tol_factor x delta: 1 for JCGM 101 7.9.4, 0.2
                          for a validation run (JCGM 101 8.2 asks for
                          delta / 5); in (0, 1] */
};

/* Defaults: seed 1, adaptive, digits 2, cap SB_MC_TRIALS_MAX, 1 thread,
 * tol_factor 1. */
void sb_mc_options_default(struct sb_mc_options *o);

/*
 * Check the options; SB_EINPUT with a "what is wrong (what was expected)"
 * message (no position: the caller knows which option) for trials outside
 * [SB_MC_TRIALS_MIN, SB_MC_TRIALS_MAX] (0 = adaptive is fine), digits
 * outside 1..SB_MC_DIGITS_MAX, max_trials outside [2 SB_MC_BATCH,
 * SB_MC_TRIALS_MAX], threads < 1 or > 1024, tol_factor outside (0, 1].
 */
int sb_mc_options_check(const struct sb_mc_options *o, struct sb_error *err);

/* One model with its inputs: dx[i] ~ dist[i](0, u[i]).  u[i] >= 0 and
 * finite; an input with u[i] == 0 is held at 0 (no draw is spent). */
struct sb_mc_problem {
    sb_mc_model model;
    const void *ctx;
    size_t n_in;
    const double *u;
    const enum sb_dist *dist;
};

/* Summary of the output errors (unit: the model's output unit). */
struct sb_mc_stats {
    size_t trials;     /* trials used */
    int converged;     /* adaptive: 1 if the JCGM 101 7.9.4 criterion was
                          met before the cap; fixed: 1 */
    double mean_e, mean_n, mean_z; /* mean errors (bias) per axis */
    double mean_h;     /* horizontal bias: |(mean_e, mean_n)| */
    double sd_z;       /* standard deviation of Z (divisor M - 1, JCGM 101
                          7.6) */
    double sd_h;       /* horizontal per-axis rms spread:
                          sqrt((var_e + var_n) / 2) */
    double abs_z95;    /* empirical 95 % quantile of |Z| (the MC TVU) */
    double h95;        /* empirical 95 % quantile of the horizontal radius
                          sqrt(E^2 + N^2) (the MC THU) */
    double low_z, high_z; /* shortest 95 % coverage interval of Z
                             (JCGM 101 7.7.2) */
    double sym_low_z, sym_high_z; /* probabilistically symmetric 95 %
                             interval of Z: its 2.5 % and 97.5 % points
                             (JCGM 101 7.7.1) */
    double tol_z;      /* numerical tolerance delta of sd_z at `digits`
                          (JCGM 101 7.9.2) */
};

/*
 * splitmix64 finaliser of (seed, index): the seed of one point's
 * generator.  Pure; used so that a point's draws depend on nothing but the
 * user's seed and which point it is (Steele, Lea & Flood 2014, "Fast
 * splittable pseudorandom number generators", the SplitMix64 mix).
 */
uint64_t sb_mc_stream_seed(uint64_t seed, uint64_t index);

/*
 * Numerical tolerance of a standard uncertainty u > 0 written to n_dig
 * significant digits (JCGM 101:2008, 7.9.2): write u = c x 10^l with c an
 * integer of n_dig digits; delta = 10^l / 2.  Returns 0 for u <= 0 or not
 * finite, or digits < 1.
 */
double sb_mc_tolerance(double u, int digits);

/*
 * Shortest coverage interval of probability p from m values sorted
 * ascending (JCGM 101:2008, 7.7.2): q = p m rounded to the nearest integer
 * (7.7.1), and [y(r), y(r+q)] the narrowest such window (1-based ranks).
 * Requires 1 <= q < m; returns SB_EINPUT otherwise.
 */
int sb_mc_shortest_interval(const double *sorted, size_t m, double p,
                            double *low, double *high);

/*
 * The q-th smallest value (q = p m rounded, as above) of m values sorted
 * ascending: the empirical p-quantile used for |Z| and the radius.
 * Returns NAN if m == 0.
 */
double sb_mc_quantile_sorted(const double *sorted, size_t m, double p);

/*
 * Run one problem: fixed trials (o->trials > 0) or the adaptive procedure
 * of JCGM 101:2008 7.9.4 (batches of SB_MC_BATCH until twice the standard
 * deviation of the batch means of each statistic -- mean_z, sd_z,
 * sym_low_z, sym_high_z, abs_z95 with the tolerance of sd_z; mean_e,
 * mean_n, h95 with the tolerance of sd_h -- is within tol_factor times
 * the tolerance, or
 * o->max_trials is reached: then converged = 0).  The final statistics use
 * every trial.  The generator is seeded with stream_seed (use
 * sb_mc_stream_seed).  Buffers are allocated once, before the trial loop.
 * Returns SB_OK; SB_EINPUT for bad options or a bad u/dist (message
 * without position); SB_ENOMEM; SB_ENUM if the model returns a non-finite
 * value.
 */
int sb_mc_run(const struct sb_mc_problem *p, const struct sb_mc_options *o,
              uint64_t stream_seed, struct sb_mc_stats *out,
              struct sb_error *err);

/*
 * Run n problems over o->threads POSIX threads.  Problem i uses
 * sb_mc_stream_seed(o->seed, keys ? keys[i] : i), so the results are those
 * of sb_mc_run for each, whatever the thread count.  Each thread allocates
 * its buffers once and reuses them for its problems.  On failure returns
 * the status of the lowest-index failed problem with its message.
 */
int sb_mc_run_many(const struct sb_mc_problem *p, const uint64_t *keys,
                   size_t n, const struct sb_mc_options *o,
                   struct sb_mc_stats *out, struct sb_error *err);

/*
 * Validation of a linear (GUM) result by Monte Carlo (JCGM 101:2008, 8.1):
 * the linear interval is [y - U, y + U]; d_low = |y - U - low|,
 * d_high = |y + U - high|.  Returns 1 ("linear valid") when both are
 * <= delta, else 0.  d_low, d_high may be NULL.
 */
int sb_mc_validate(double y, double U, double low, double high,
                   double delta, double *d_low, double *d_high);

/* ---- the sounding glue ------------------------------------------------ */

struct sb_system; /* system.h */

/*
 * Monte Carlo check of one sounding (depth, beam angle) against the linear
 * budget.  The "linear" figures are those of `plan` (propagate.h: TVU95 =
 * 1.96 sigma_z, THU95 the exact 95 % radius of the error ellipse); the MC
 * figures are the empirical 95 % quantiles of |dZ| and of the horizontal
 * radius of the error of the same forward model (georef.h) with every
 * component drawn from its distribution.
 */
struct sb_mc_point_result {
    double depth_m;       /* as given, m */
    double angle_rad;     /* as given, rad (port < 0) */
    double sigma_z_linear_m; /* linear standard uncertainty of Z, m */
    double tvu_linear_m;  /* linear TVU95, m */
    double thu_linear_m;  /* linear THU95 (exact radius), m */
    double tvu_mc_m;      /* MC 95 % quantile of |dZ|, m */
    double thu_mc_m;      /* MC 95 % quantile of the horizontal radius, m */
    double bias_z_m;      /* MC mean dZ (positive: sounding too deep), m */
    double bias_h_m;      /* MC horizontal bias |(mean dE, mean dN)|, m */
    double sd_z_mc_m;     /* MC standard deviation of dZ, m */
    double low_z_m, high_z_m; /* MC shortest 95 % interval of dZ, m */
    double sym_low_z_m, sym_high_z_m; /* MC 2.5 % and 97.5 % points of dZ:
                             the interval set against the linear one, m */
    double delta_m;       /* numerical tolerance of sigma_z_linear at the
                             digits asked (JCGM 101 8.2), m */
    double d_low_m, d_high_m; /* |-TVU_lin - sym_low|, |TVU_lin -
                                 sym_high|, m (JCGM 101 8.1) */
    int linear_valid;     /* 1 when d_low and d_high <= delta */
    size_t trials;        /* trials used */
    int converged;        /* see struct sb_mc_stats */
};

/*
 * Validate the linear budget at n_depths x n_angles points:
 * out[i_depth * n_angles + i_angle].  depths_m (m, seafloor below the
 * surface), angles_rad (rad, port negative, within the system's maximum).
 * The options are copied with tol_factor set to 0.2 in adaptive mode (the
 * delta / 5 of JCGM 101 8.2).  Each point's generator is seeded from
 * o->seed and the point's own (depth, angle) -- not its position in the
 * lists -- so a point gets the same draws whatever else is asked and
 * whatever the thread count.  Points run in parallel on o->threads
 * threads.  Returns SB_OK; SB_EINPUT (a bad depth or angle, or bad
 * options; message without position); SB_ENOMEM; SB_ENUM.
 */
int sb_mc_verify_points(const struct sb_system *sys, const double *depths_m,
                        size_t n_depths, const double *angles_rad,
                        size_t n_angles, const struct sb_mc_options *o,
                        struct sb_mc_point_result *out, struct sb_error *err);

/* One point: the same as sb_mc_verify_points with one depth and one
 * angle (same draws as that point in any larger call). */
int sb_mc_verify_point(const struct sb_system *sys, double depth_m,
                       double angle_rad, const struct sb_mc_options *o,
                       struct sb_mc_point_result *out, struct sb_error *err);

/* The usable-swath edge on the verified angle grid of one depth, by the
 * linear and by the MC figures. */
struct sb_mc_fail_compare {
    /* largest |angle| of the grid (rad) on each side such that every grid
     * angle from the one nearest nadir out to it passes both limits; NAN
     * when the grid angle nearest nadir already fails or the side has no
     * grid angle */
    double port_linear_rad, port_mc_rad;
    double stbd_linear_rad, stbd_mc_rad;
    int port_differs, stbd_differs; /* 1 when linear and MC disagree */
};

/*
 * Compare the fail angle on the angle grid by the linear and by the MC
 * figures, for the n points of one depth (any order; angle 0 counts for
 * both sides) and the limits tvu_limit_m, thu_limit_m (m, > 0).  A point
 * passes when TVU95 <= tvu_limit and THU95 <= thu_limit.  The grid's
 * resolution bounds the answer: `plan` finds the linear fail angle itself
 * to 0.01 deg; this says whether the MC figures move it across grid angles.
 * Returns SB_OK, or SB_EINPUT for n == 0 or a bad limit.
 */
int sb_mc_fail_compare(const struct sb_mc_point_result *pts, size_t n,
                       double tvu_limit_m, double thu_limit_m,
                       struct sb_mc_fail_compare *out);

#ifdef __cplusplus
}
#endif

#endif
