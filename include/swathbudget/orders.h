/*
 * swathbudget — survey standards and their orders.
 *
 * A standard is a named set of orders; an order fixes, at 95 % confidence,
 * the largest vertical (TVU) and horizontal (THU) uncertainty a sounding may
 * have at a depth d, the smallest feature a survey must detect, and the
 * bathymetric coverage it asks for:
 *
 *     TVU(d) = sqrt(a^2 + (b d)^2)      (IHO S-44 ed. 6.0.0 (2020), 3.2;
 *                                        same form in eds. 4 and 5)
 *     THU(d) = c + f d                  (constant plus a fraction of depth)
 *
 * The three IHO S-44 editions are compiled in (as data tables, see
 * orders.c); a client's contract specification can be loaded from a YAML
 * file in the same terms (standard_load.c; format in docs/standards.md).
 * Depths are in metres, positive down; every length is in metres.
 */
#ifndef SWATHBUDGET_ORDERS_H
#define SWATHBUDGET_ORDERS_H

#include <stddef.h>

#include "swathbudget/error.h"

#ifdef __cplusplus
extern "C" {
#endif

#define SB_ORDER_ID_MAX 16
#define SB_ORDER_NAME_MAX 64
#define SB_COVERAGE_TEXT_MAX 96
#define SB_STANDARD_ID_MAX 64
#define SB_STANDARD_TITLE_MAX 128
#define SB_STANDARD_ORDERS_MAX 16
#define SB_STANDARD_SOURCE_MAX 192

/* The id used when no standard is named. */
#define SB_STANDARD_DEFAULT_ID "s44-6"

/*
 * Feature-detection rule.  When specified, the smallest feature to detect at
 * depth d is
 *     size_m            for d <= beyond_m
 *     frac * d          for d >  beyond_m
 * A constant-only rule has beyond_m = INFINITY; a fraction-only rule has
 * size_m = 0 and beyond_m = 0.  (S-44 ed. 6 Order 1a: 2 m down to 40 m,
 * 10 % of depth beyond.)
 */
struct sb_feature_rule {
    int specified;   /* 0: the standard does not specify one */
    double size_m;   /* constant size, m */
    double beyond_m; /* depth beyond which the fraction applies, m */
    double frac;     /* fraction of depth (0.10 for 10 %) */
};

struct sb_order {
    char id[SB_ORDER_ID_MAX];       /* "1a", "special", a client's word */
    char name[SB_ORDER_NAME_MAX];   /* "Order 1a" */
    double tvu_a_m;                 /* TVU constant part a, m */
    double tvu_b;                   /* TVU depth factor b (dimensionless) */
    double thu_c_m;                 /* THU constant, m */
    double thu_frac;                /* THU fraction of depth (0.05 = 5 %) */
    struct sb_feature_rule feature; /* feature-detection size rule */
    double coverage_pct;            /* bathymetric coverage, percent;
                                       NAN when the standard states it only
                                       in words (see coverage) */
    char coverage[SB_COVERAGE_TEXT_MAX]; /* coverage as the standard puts it */
};

struct sb_standard {
    char id[SB_STANDARD_ID_MAX];        /* "s44-6" or the file's id */
    char title[SB_STANDARD_TITLE_MAX];  /* full name with edition */
    char source[SB_STANDARD_SOURCE_MAX]; /* where the figures come from (the
                                            table, or the file loaded) */
    int n_orders;
    struct sb_order orders[SB_STANDARD_ORDERS_MAX];
};

/*
 * A compiled-in standard by id ("s44-6", "s44-5", "s44-4"); NULL if id is
 * NULL or unknown.  The returned table is constant and lives for the whole
 * program.
 */
const struct sb_standard *sb_standard_builtin(const char *id);

/* The ids of the compiled-in standards, NULL-terminated, default first. */
const char *const *sb_standard_builtin_ids(void);

/*
 * Load a custom standard from the YAML file path into *out (format:
 * docs/standards.md).  Returns SB_OK; SB_EINPUT with err at the offending
 * FILE:LINE:COL for every content error; SB_EIO if the file cannot be read;
 * SB_ENOMEM.  *out is left zeroed on failure.
 */
int sb_standard_load(const char *path, struct sb_standard *out,
                     struct sb_error *err);

/* The same from text in memory; name is used as FILE in messages. */
int sb_standard_load_string(const char *name, const char *text, size_t len,
                            struct sb_standard *out, struct sb_error *err);

/*
 * Resolve a --standard argument: a compiled-in id gives that table; any
 * other text is a file path loaded into *storage.  *out points at the
 * result.  NULL or "" means the default (SB_STANDARD_DEFAULT_ID).
 * Errors as sb_standard_load.
 */
int sb_standard_resolve(const char *arg, struct sb_standard *storage,
                        const struct sb_standard **out, struct sb_error *err);

/* The order with this id in std (exact match), or NULL. */
const struct sb_order *sb_standard_order(const struct sb_standard *std,
                                         const char *id);

/*
 * Allowable TVU at 95 %, m, at depth_m (m, >= 0):
 * sqrt(a^2 + (b d)^2)  (IHO S-44 ed. 6.0.0 (2020), 3.2).
 */
double sb_order_tvu(const struct sb_order *o, double depth_m);

/* Allowable THU at 95 %, m, at depth_m: c + f d  (S-44 ed. 6, Table 1). */
double sb_order_thu(const struct sb_order *o, double depth_m);

/*
 * Feature-detection size at depth_m, m, into *size_m (may be NULL).
 * Returns 1 when the order specifies one, 0 when it does not (then *size_m
 * is set to NAN).
 */
int sb_order_feature(const struct sb_order *o, double depth_m,
                     double *size_m);

#ifdef __cplusplus
}
#endif

#endif
