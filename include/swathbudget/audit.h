/*
 * swathbudget — auditing a finished survey against a system's a-priori
 * budget and a standard's orders.
 *
 * Three checks (docs/audit.md explains each and its statistics):
 *
 *  1. A-priori compliance.  For every sounding, the TVU95 and THU95 of the
 *     system at its depth and beam angle (from the interpolated table of
 *     tvutable.h) against each order's limits; where the data carry their
 *     own uncertainties (tpu_v, tpu_h columns), those against the limits
 *     too.  Totals per order, per survey line and per beam-angle bin.
 *
 *  2. Crossline comparison.  A reference surface (grid.h) is built from the
 *     near-nadir soundings of the crosslines (or from a reference file);
 *     every mainscheme sounding that falls in a cell holding enough
 *     reference soundings gives a difference d = z - mean(cell).  Per
 *     beam-angle bin: count, mean and standard deviation of d, and the
 *     empirical 95 % point of |d| (from a bounded-memory histogram, see
 *     struct sb_qhist) with the reference's own uncertainty removed in
 *     quadrature; the fraction of |d| within each order's TVU; the
 *     empirical fail angle beside the a-priori one.
 *
 *  3. Reconciliation.  rows read = rows used + rows rejected, with a count
 *     per reason; bad rows never stop the run and are handed to the caller
 *     (hooks) with FILE:LINE:COL up to a limit.
 *
 * Memory does not grow with the number of rows: per-row work is
 * allocation-free; the tables that grow (survey lines, reference cells)
 * grow with the number of lines and the area covered.
 *
 * Units: SI inside (m, rad); the CSV columns are metres (x, y as projected
 * easting and northing, z depth positive down below the datum) and degrees
 * for the beam angle (port negative).
 */
#ifndef SWATHBUDGET_AUDIT_H
#define SWATHBUDGET_AUDIT_H

#include <stddef.h>
#include <stdint.h>

#include "swathbudget/csvread.h"
#include "swathbudget/error.h"
#include "swathbudget/grid.h"
#include "swathbudget/orders.h"
#include "swathbudget/tvutable.h"

#ifdef __cplusplus
extern "C" {
#endif

/* ---- bounded-memory quantiles ------------------------------------------ */

/*
 * A histogram of positive values on a logarithmic scale: octaves 2^e for e
 * in [SB_QHIST_E_MIN, SB_QHIST_E_MAX), each split into SB_QHIST_SUB equal
 * bins.  A bin's width is at most 1/SB_QHIST_SUB of its lower edge, so a
 * quantile read from it is within 0.8 % (relative) of the exact order
 * statistic, whatever the number of values, with fixed memory (16 KiB).
 * Values below 2^SB_QHIST_E_MIN (including 0) count in an underflow bin
 * read as 0, values at or above 2^SB_QHIST_E_MAX in an overflow bin read as
 * +infinity.
 */
#define SB_QHIST_E_MIN (-20) /* 0.95 micrometre (or 1e-6 of a ratio) */
#define SB_QHIST_E_MAX 12    /* 4096 */
#define SB_QHIST_SUB 128
#define SB_QHIST_BINS ((SB_QHIST_E_MAX - SB_QHIST_E_MIN) * SB_QHIST_SUB + 2)
/* Relative resolution of a quantile read from the histogram. */
#define SB_QHIST_RESOLUTION (1.0 / SB_QHIST_SUB)

struct sb_qhist {
    uint64_t n;
    uint32_t count[SB_QHIST_BINS];
};

void sb_qhist_clear(struct sb_qhist *h);
/* Count one value v >= 0 (a NaN is ignored; negatives count as 0). */
void sb_qhist_add(struct sb_qhist *h, double v);
/*
 * The value of rank k (1-based, 1 <= k <= n) in ascending order, to the
 * histogram's resolution: linear interpolation inside the bin holding it.
 * NAN when k is outside [1, n].
 */
double sb_qhist_rank(const struct sb_qhist *h, uint64_t k);
/* The empirical p-quantile (0 < p < 1): rank ceil(p n) (the nearest-rank
 * definition, Hyndman & Fan 1996, The American Statistician 50(4),
 * definition 1 -- cited from memory).  NAN for an empty histogram. */
double sb_qhist_quantile(const struct sb_qhist *h, double p);
/*
 * A distribution-free confidence interval of level conf (e.g. 0.95) for the
 * p-quantile of the population: the order statistics x(l) and x(u) with
 * l, u chosen from the binomial distribution Bin(n, p) so that
 * P(l <= B <= u - 1) >= conf with equal tails (the classical interval of
 * order statistics, e.g. Conover 1999, Practical Nonparametric Statistics,
 * 3rd ed., section 3.2 -- cited from memory).  Needs enough values for both
 * tails: returns SB_OK, or SB_EINPUT (interval not available: too few
 * values; lo/hi set to NAN).
 */
int sb_qhist_quantile_ci(const struct sb_qhist *h, double p, double conf,
                         double *lo, double *hi);

/* ---- input columns ------------------------------------------------------- */

#define SB_AUDIT_NAME_MAX 64

/* Column names in the soundings file (header names); "" = not mapped. */
struct sb_audit_columns {
    char line[SB_AUDIT_NAME_MAX];  /* survey line name (required) */
    char x[SB_AUDIT_NAME_MAX];     /* easting, m (required) */
    char y[SB_AUDIT_NAME_MAX];     /* northing, m (required) */
    char z[SB_AUDIT_NAME_MAX];     /* depth below datum, m, down (required) */
    char angle[SB_AUDIT_NAME_MAX]; /* beam angle, deg, port < 0 (required
                                      for the soundings; optional in a
                                      reference file) */
    char tpu_v[SB_AUDIT_NAME_MAX]; /* vertical uncertainty carried by the
                                      data, m (optional) */
    char tpu_h[SB_AUDIT_NAME_MAX]; /* horizontal uncertainty, m (optional) */
};

/*
 * Parse "line=Line,x=Easting,y=Northing,z=Depth,angle=BeamAngle[,tpu_v=..,
 * tpu_h=..]" into *out.  Keys are those of struct sb_audit_columns, each
 * at most once; values are header names (no ',' or '=').  SB_EINPUT with a
 * "what is wrong (what was expected)" message (no position) for an unknown
 * or repeated key, an empty name, or a missing required key (line, x, y, z,
 * angle).
 */
int sb_audit_columns_parse(const char *spec, struct sb_audit_columns *out,
                           struct sb_error *err);

/* ---- configuration ------------------------------------------------------- */

#define SB_AUDIT_ORDERS_MAX SB_STANDARD_ORDERS_MAX
#define SB_AUDIT_CROSSLINES_MAX 256
#define SB_AUDIT_BINS_MAX 360

/* What makes a row unusable (the reconciliation's reasons). */
enum sb_audit_reason {
    SB_AUDIT_UNPARSABLE = 0, /* "unparsable": a field that is not a number,
                                broken quoting, a row too long, too many
                                fields, a line name too long */
    SB_AUDIT_NONFINITE,      /* "non_finite": nan, inf, overflow */
    SB_AUDIT_MISSING,        /* "missing_column": an empty required field
                                or a row with fewer fields than the
                                header */
    SB_AUDIT_OUT_OF_RANGE,   /* "out_of_range": depth outside the
                                uncertainty table (above the transducer),
                                |angle| beyond the system's maximum, a
                                negative uncertainty */
    SB_AUDIT_OUTSIDE_GRID,   /* "outside_grid": comparison only -- a
                                mainscheme sounding in no reference cell
                                with enough reference soundings */
    SB_AUDIT_NREASONS
};

/* "unparsable", "non_finite", "missing_column", "out_of_range",
 * "outside_grid"; "?" out of range. */
const char *sb_audit_reason_name(int reason);

struct sb_audit_config {
    const struct sb_order *orders[SB_AUDIT_ORDERS_MAX];
    int n_orders;              /* >= 1 */
    double bin_width_rad;      /* beam-angle bin width, rad (> 0): bins
                                  [k w, (k+1) w) to starboard and
                                  (-(k+1) w, -k w] to port */
    double angle_max_rad;      /* bins cover |angle| <= this (the table's) */
    const char *crosslines[SB_AUDIT_CROSSLINES_MAX]; /* line names whose
                                  near-nadir soundings form the reference */
    size_t n_crosslines;
    double nadir_max_rad;      /* |angle| <= this for a reference sounding */
    double cell_m;             /* reference cell side, m; 0: derived from
                                  the median reference depth
                                  (sb_grid_cell_for_depth) */
    unsigned min_ref;          /* reference soundings a cell needs (>= 2) */
    unsigned min_bin;          /* compared soundings a bin needs for its
                                  quantile to count (>= 20) */
    int tpu_is_sd;             /* 0: tpu_v/tpu_h are 95 % figures (m);
                                  1: standard uncertainties, turned into
                                  95 % figures with 1.96 (vertical) and
                                  2.45 (horizontal, IHO S-44 ed. 6 sec. 2) */
    double max_fail_frac;      /* verdict: largest fraction of soundings
                                  allowed to fail a per-sounding check
                                  (0 = none) */
    double family_conf;        /* family-wise confidence of the "exceeds
                                  the a-priori budget" flags over all
                                  bins (0.95) */
};

/* Defaults: no orders, bins of 5 deg, angle_max 75 deg, no crosslines,
 * nadir 10 deg, cell 0 (derived), min_ref 3, min_bin 50, 95 % figures,
 * max_fail_frac 0, family_conf 0.95. */
void sb_audit_config_default(struct sb_audit_config *c);

/* ---- hooks: what the caller is told while the passes run ----------------- */

/* What failed for one sounding and one order (bits). */
#define SB_AUDIT_FAIL_TVU 1u      /* a-priori TVU95 > the order's TVU */
#define SB_AUDIT_FAIL_THU 2u      /* a-priori THU95 > the order's THU */
#define SB_AUDIT_FAIL_DATA_TVU 4u /* the data's own tpu_v > TVU */
#define SB_AUDIT_FAIL_DATA_THU 8u /* the data's own tpu_h > THU */

struct sb_audit_failure {
    long file_line;         /* line of the row in the soundings file */
    const char *line;       /* survey line name (not NUL-terminated) */
    size_t line_len;
    double x_m, y_m, z_m;   /* as read */
    double angle_rad;
    const struct sb_order *order;
    unsigned what;          /* SB_AUDIT_FAIL_* bits */
    double tvu95_m, thu95_m;       /* a-priori, from the table */
    double tvu_limit_m, thu_limit_m;
    double tpu_v95_m, tpu_h95_m;   /* the data's, as 95 % figures; NAN if
                                      not carried */
};

struct sb_audit_hooks {
    void *ctx;
    /* A rejected row (called for the first list_max of them; err holds
     * FILE:LINE:COL and the message).  May be NULL. */
    void (*bad_row)(void *ctx, int reason, const struct sb_error *err);
    size_t list_max;
    /* A sounding failing a per-sounding check for one order.  Return
     * SB_OK to go on, anything else stops the pass with that status.
     * May be NULL. */
    int (*failure)(void *ctx, const struct sb_audit_failure *f);
    /* Progress: pass 1 (a-priori), 2 (reference file), 3 (comparison); rows
     * so far.  Called every 2^20 rows.  May be NULL. */
    void (*progress)(void *ctx, int pass, uint64_t rows);
};

/* ---- the audit ----------------------------------------------------------- */

struct sb_audit; /* opaque */

/*
 * A new audit.  table: the system's uncertainty table (borrowed, must
 * outlive the audit; lookups may extend it).  Returns SB_OK with *out;
 * SB_EINPUT (bad configuration, message without position); SB_ENOMEM.
 */
int sb_audit_alloc(const struct sb_audit_config *c, struct sb_tvutable *table,
                   struct sb_audit **out, struct sb_error *err);
void sb_audit_free(struct sb_audit *a);

/*
 * Pass 1 over the soundings file: reconciliation, a-priori compliance, and
 * (when crosslines are configured) the reference surface from their
 * near-nadir soundings.  copt may be NULL (detect).  Returns SB_OK (bad
 * rows are counted, not errors); SB_EINPUT for a header problem (missing
 * column) or a file with no usable row, with FILE:LINE:COL; SB_EIO;
 * SB_ENOMEM; a hook's or the table's status.
 */
int sb_audit_scan(struct sb_audit *a, const char *path,
                  const struct sb_csv_options *copt,
                  const struct sb_audit_columns *cols,
                  const struct sb_audit_hooks *hooks, struct sb_error *err);

/*
 * The reference surface from a separate file of soundings (columns x, y,
 * z of cols; angle too when mapped and present, then only near-nadir
 * soundings count).  Instead of crosslines; call before sb_audit_compare.
 * Bad rows are counted in the reference's own tally.  Errors as
 * sb_audit_scan.
 */
int sb_audit_reference(struct sb_audit *a, const char *path,
                       const struct sb_csv_options *copt,
                       const struct sb_audit_columns *cols,
                       const struct sb_audit_hooks *hooks,
                       struct sb_error *err);

/*
 * Pass 2 over the soundings file (after sb_audit_scan): fixes the reference
 * grid (coarsening it to the derived cell size when none was given) and
 * compares every usable mainscheme sounding with it.  Rows already
 * rejected by pass 1 are skipped without being counted again.  Errors as
 * sb_audit_scan; SB_EINPUT also when there is no reference at all.
 */
int sb_audit_compare(struct sb_audit *a, const char *path,
                     const struct sb_csv_options *copt,
                     const struct sb_audit_columns *cols,
                     const struct sb_audit_hooks *hooks,
                     struct sb_error *err);

/* The same three steps one sounding at a time (tests, other front ends).
 * line/line_len: survey line name; tpu_v_m/tpu_h_m: NAN when not carried.
 * Return SB_OK, SB_EINPUT (out of range: the reason is counted), or a
 * hook's/the table's status. */
int sb_audit_add_sounding(struct sb_audit *a, const char *line,
                          size_t line_len, double x_m, double y_m,
                          double z_m, double angle_rad, double tpu_v_m,
                          double tpu_h_m, const struct sb_audit_hooks *hooks,
                          struct sb_error *err);
int sb_audit_add_reference(struct sb_audit *a, double x_m, double y_m,
                           double z_m, struct sb_error *err);
int sb_audit_compare_sounding(struct sb_audit *a, double x_m, double y_m,
                              double z_m, double angle_rad,
                              struct sb_error *err);
/* Fix the reference grid now (done by sb_audit_compare; needed before
 * sb_audit_compare_sounding). */
int sb_audit_fix_reference(struct sb_audit *a, struct sb_error *err);

/* ---- results ------------------------------------------------------------- */

/* How a fail angle was found. */
enum sb_audit_fail_kind {
    SB_AUDIT_ANGLE_NONE = 0,  /* "no_data": no bin with enough soundings */
    SB_AUDIT_ANGLE_CROSS = 1, /* "crossing": interpolated between the
                                 centres of the last passing and the first
                                 failing bin */
    SB_AUDIT_ANGLE_NADIR = 2, /* "nadir": the innermost bin already fails */
    SB_AUDIT_ANGLE_BEYOND = 3 /* "beyond_data": every bin passes; the angle
                                 is the outer edge of the last bin */
};
const char *sb_audit_fail_kind_name(int kind);

struct sb_audit_fail_angle {
    int kind;          /* enum sb_audit_fail_kind */
    double angle_rad;  /* |angle|, rad */
};

struct sb_audit_order_result {
    const struct sb_order *order;
    /* a-priori, per sounding */
    uint64_t checked;           /* soundings checked (= rows used) */
    uint64_t fail_tvu, fail_thu, fail_any; /* a-priori failures */
    uint64_t borderline;        /* decisions within the table's error
                                   bound of the limit (either way) */
    uint64_t data_v, data_fail_v;   /* soundings carrying tpu_v; failing */
    uint64_t data_h, data_fail_h;
    uint64_t fail_sounding;     /* soundings failing any per-sounding check
                                   (a-priori or data) */
    /* crossline comparison (TVU only) */
    int compared;               /* 1 when the comparison ran */
    int bins_over;              /* bins whose corrected empirical 95 %
                                   exceeds the order's TVU */
    struct sb_audit_fail_angle emp_port, emp_stbd; /* empirical */
    struct sb_audit_fail_angle ap_port, ap_stbd;   /* a-priori, same bins */
    /* verdict */
    int pass;
    char why[160];              /* one line: what decided it */
};

struct sb_audit_bin_result {
    double from_rad, to_rad;    /* signed edges, from < to */
    /* a-priori */
    uint64_t n;                 /* soundings used in the bin */
    double tvu95_mean_m, thu95_mean_m; /* mean a-priori figures */
    uint64_t fail_any[SB_AUDIT_ORDERS_MAX];
    /* comparison */
    uint64_t n_cmp;             /* soundings compared */
    int enough;                 /* n_cmp >= min_bin */
    double diff_mean_m, diff_sd_m;
    double q95_raw_m;           /* empirical 95 % of |d| */
    double u_ref_m;             /* rms standard uncertainty of the
                                   reference cell means used */
    double q95_m;               /* q95_raw with 1.96 u_ref removed in
                                   quadrature */
    double tvu95_cmp_mean_m;    /* mean a-priori TVU95 of those soundings */
    double ratio;               /* corrected 95 % of |d| / a-priori TVU95
                                   (sounding by sounding): 1 when the
                                   budget is right */
    double ratio_lo, ratio_hi;  /* its confidence interval (family-wise
                                   level over the bins); NAN if too few */
    int exceeds;                /* ratio_lo > 1: the data scatter more than
                                   the a-priori budget says */
    int below;                  /* ratio_hi < 1: less than it says */
    double within[SB_AUDIT_ORDERS_MAX];   /* fraction of |d| <= TVU limit */
    double emp_limit[SB_AUDIT_ORDERS_MAX];/* corrected 95 % of |d| / limit */
    double ap_limit[SB_AUDIT_ORDERS_MAX]; /* mean a-priori TVU95 / limit */
};

struct sb_audit_line_result {
    char name[SB_AUDIT_NAME_MAX];
    int crossline;
    uint64_t n;                 /* soundings used */
    uint64_t fail[SB_AUDIT_ORDERS_MAX]; /* failing any per-sounding check */
};

struct sb_audit_totals {
    /* pass 1 */
    uint64_t rows_read, rows_used, rows_rejected;
    uint64_t reason[SB_AUDIT_NREASONS];
    uint64_t rows_with_tpu_v, rows_with_tpu_h;
    double depth_min_m, depth_max_m;  /* of the used rows */
    /* reference */
    int have_reference;        /* crosslines or a reference file */
    uint64_t ref_rows_read, ref_rows_used, ref_rows_rejected;
    uint64_t ref_reason[SB_AUDIT_NREASONS];
    uint64_t ref_soundings;    /* soundings that went into the grid */
    double cell_m;             /* cell size used */
    int cell_derived;          /* 1 when derived from the depth */
    double ref_depth_median_m; /* median depth of the reference soundings */
    uint64_t cells, cells_usable; /* cells; cells with >= min_ref */
    /* pass 2 */
    int compared;
    uint64_t cmp_candidates;   /* usable mainscheme rows */
    uint64_t cmp_compared;     /* in a usable cell */
    uint64_t cmp_outside;      /* reason outside_grid */
    uint64_t bins_exceeding, bins_below, bins_enough;
    double table_bound;        /* relative interpolation error bound */
};

/* Compute the derived statistics and verdicts (after the passes).  May be
 * called again after more data. */
int sb_audit_finish(struct sb_audit *a, struct sb_error *err);

const struct sb_audit_totals *sb_audit_totals(const struct sb_audit *a);
int sb_audit_n_orders(const struct sb_audit *a);
const struct sb_audit_order_result *sb_audit_order(const struct sb_audit *a,
                                                   int k);
int sb_audit_n_bins(const struct sb_audit *a);
const struct sb_audit_bin_result *sb_audit_bin(const struct sb_audit *a,
                                               int b);
/* The ratio histogram of bin b (|d| / a-priori TVU95 of each compared
 * sounding), for callers that want other quantiles or intervals. */
const struct sb_qhist *sb_audit_bin_ratio_hist(const struct sb_audit *a,
                                               int b);
size_t sb_audit_n_lines(const struct sb_audit *a);
const struct sb_audit_line_result *sb_audit_line(const struct sb_audit *a,
                                                 size_t i);
/* Indices of the at most n lines with the largest fraction of failing
 * soundings for order k (ties: more failures first, then file order),
 * written to idx; returns how many (lines with no failure are left out). */
size_t sb_audit_worst_lines(const struct sb_audit *a, int k, size_t *idx,
                            size_t n);
/* The configuration in use. */
const struct sb_audit_config *sb_audit_config(const struct sb_audit *a);

#ifdef __cplusplus
}
#endif

#endif
