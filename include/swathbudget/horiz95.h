/*
 * swathbudget — the 95 % radius of a 2-D normal error (THU95).
 *
 * The horizontal error e = (dE, dN) of a sounding is taken as a zero-mean
 * bivariate normal with 2x2 covariance C = [[cee, cen], [cen, cnn]] (m^2).
 * THU95 is the radius r of the circle about the true position that holds
 * 95 % of it: P(|e| <= r) = 0.95.  With the eigenvalues l1 >= l2 >= 0 of C,
 * sigma_max = sqrt(l1), sigma_min = sqrt(l2) and the ratio
 * k = sigma_min / sigma_max in [0, 1], r = sigma_max * f(k): the factor f
 * depends on k only, rising from 1.959964 (k = 0, all error on one axis:
 * 1-D normal) to sqrt(-2 ln 0.05) = 2.447747 (k = 1, circular: Rayleigh).
 *
 * sb_horiz95_alloc() solves f exactly on a table of k once; the hot-path
 * sb_horiz95_radius() interpolates it, allocation-free and thread-safe
 * (the table is read-only after alloc).
 *
 * The slow functions call GSL, whose default error handler aborts the
 * process; every GSL status is checked here, so the program should call
 * gsl_set_error_handler_off() once at start (the library does not: that
 * handler is process-wide state).
 */
#ifndef SWATHBUDGET_HORIZ95_H
#define SWATHBUDGET_HORIZ95_H

#include "swathbudget/error.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Returned by the double-valued functions for an invalid covariance
 * (non-finite entry, negative variance, or not positive semi-definite
 * beyond rounding).  Negative, so "r <= limit" tests must check r < 0 first;
 * never NaN. */
#define SB_HORIZ95_INVALID (-1.0)

/* Probability held by the radius (a fixed 95 %, as in IHO S-44). */
#define SB_HORIZ95_P 0.95

/* The table: f(k) at SB_HORIZ95_NODES equally spaced k in [0, 1].  With
 * four-point interpolation its error falls as h^4 (measured: 257 nodes
 * 1.5e-10, 513 nodes 9e-12, 1025 nodes 6e-13 relative); 1025 nodes cost
 * about 25 ms to build. */
#define SB_HORIZ95_NODES 1025

struct sb_horiz95; /* opaque; read-only after alloc */

/* Axes of the error ellipse of a 2x2 covariance. */
struct sb_ellipse2 {
    double sigma_max; /* m, sqrt of the larger eigenvalue */
    double sigma_min; /* m, sqrt of the smaller eigenvalue */
    double azimuth;   /* rad in [0, pi): direction of the major axis,
                         clockwise from north (grid north of E, N); 0 for a
                         circle, where any direction would do */
};

/*
 * Build the table of f(k) (solves SB_HORIZ95_NODES exact radii, some
 * tens of milliseconds).  Returns the table, or NULL with err filled (SB_ENOMEM or
 * SB_ENUM if a solve failed; err may be NULL).  Free with sb_horiz95_free.
 */
struct sb_horiz95 *sb_horiz95_alloc(struct sb_error *err);

/* Free a table from sb_horiz95_alloc (NULL is fine). */
void sb_horiz95_free(struct sb_horiz95 *h);

/*
 * THU95 radius in metres for the covariance (cee, cen, cnn) in m^2 (the
 * east variance, east-north covariance, north variance), from the table.
 * Relative error below 1e-12 against sb_horiz95_radius_exact (bounded by
 * tests/test_horiz95.c).  Zero covariance gives 0.  Invalid covariance
 * gives SB_HORIZ95_INVALID.  Allocation-free, thread-safe.
 */
double sb_horiz95_radius(const struct sb_horiz95 *h, double cee, double cen,
                         double cnn);

/* The factor f(k) = r / sigma_max for the axis ratio k = sigma_min /
 * sigma_max in [0, 1], from the table; SB_HORIZ95_INVALID outside [0, 1]
 * or for NaN. */
double sb_horiz95_factor(const struct sb_horiz95 *h, double k);

/*
 * The same radius solved exactly (slow: numerical integration and Brent's
 * method, allocates a workspace).  Used to build the table and by tests.
 * Returns SB_OK with *r in metres, SB_EINPUT for an invalid covariance,
 * SB_ENOMEM, or SB_ENUM if integration or root finding failed; err may be
 * NULL.
 */
int sb_horiz95_radius_exact(double cee, double cen, double cnn, double *r,
                            struct sb_error *err);

/* The factor f(k), solved exactly (slow).  k in [0, 1] else SB_EINPUT. */
int sb_horiz95_factor_exact(double k, double *f, struct sb_error *err);

/*
 * P(|e| <= r) for a zero-mean 2-D normal with semi-axes sigma_max >=
 * sigma_min >= 0 (m) and radius r >= 0 (m), by numerical integration (slow).
 * Returns SB_OK with *p, SB_EINPUT for invalid arguments, SB_ENOMEM or
 * SB_ENUM.  sigma_max = 0 gives *p = 1.
 */
int sb_horiz95_prob(double sigma_max, double sigma_min, double r, double *p,
                    struct sb_error *err);

/*
 * Axes and orientation of the error ellipse of (cee, cen, cnn) in m^2.
 * Returns SB_OK, or SB_EINPUT (invalid covariance, message filled; out
 * untouched).  Allocation-free.
 */
int sb_horiz95_ellipse(double cee, double cen, double cnn,
                       struct sb_ellipse2 *out, struct sb_error *err);

/*
 * The simpler figure of IHO S-44 ed. 6.0.0 (2020) section 2, which writes
 * the 95 % horizontal uncertainty as 2.45 sigma for equal sigma in both
 * directions; with unequal axes we take the larger, sigma_max (the
 * conservative choice: 2.45 sigma_max >= the exact radius for every k).
 * Metres; 0 for zero covariance; SB_HORIZ95_INVALID for invalid input.
 */
double sb_horiz95_s44(double cee, double cen, double cnn);

#ifdef __cplusplus
}
#endif

#endif
