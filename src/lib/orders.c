/*
 * Survey standards compiled in: IHO S-44 editions 6.0.0 (2020), 5 (2008)
 * and 4 (1998), as data tables (see include/swathbudget/orders.h).
 *
 * Every figure is at 95 % confidence; d is the depth in metres.
 *
 * Provenance of the figures:
 *  - Edition 6.0.0: IHO S-44 Edition 6.0.0 (2020), Table 1, checked against
 *    the standard's text.
 *  - Edition 5 and edition 4: FROM MEMORY of each edition's Table 1, NOT
 *    checked against the standard's text.  Feature-detection sizes and
 *    coverage wording for these editions are given only where we are
 *    confident of them, and are marked "from memory" below.
 *
 * The 95 % coverage factors of S-44 ed. 6 section 2 (1.96 sigma for 1-D,
 * 2.45 sigma for 2-D) are SB_S44_K95_1D / SB_S44_K95_2D in units.h; the
 * limits below are already 95 % figures and need no factor.
 */
#include "swathbudget/orders.h"

#include <math.h>
#include <string.h>

/* Feature-rule shorthands (a table needs constant initialisers). */
#define FEATURE_NONE {0, 0.0, 0.0, 0.0}
#define FEATURE_CONST(size) {1, (size), INFINITY, 0.0}
#define FEATURE_CONST_THEN_FRAC(size, beyond, frac) {1, (size), (beyond), (frac)}

/* IHO S-44 Edition 6.0.0 (2020), Table 1 (checked against the text). */
static const struct sb_standard s44_ed6 = {
    .id = "s44-6",
    .title = "IHO S-44 Edition 6.0.0 (2020)",
    .source = "IHO S-44 Edition 6.0.0 (2020), Table 1",
    .n_orders = 5,
    .orders = {
        /* id, name, a, b, THU c, THU f, feature rule, coverage %, text */
        {"exclusive", "Exclusive Order", 0.15, 0.0075, 1.0, 0.0,
         FEATURE_CONST(0.5), 200.0, "200%"},
        {"special", "Special Order", 0.25, 0.0075, 2.0, 0.0,
         FEATURE_CONST(1.0), 100.0, "100%"},
        {"1a", "Order 1a", 0.5, 0.013, 5.0, 0.05,
         FEATURE_CONST_THEN_FRAC(2.0, 40.0, 0.10), 100.0, "<= 100%"},
        {"1b", "Order 1b", 0.5, 0.013, 5.0, 0.05, FEATURE_NONE, 5.0, "5%"},
        {"2", "Order 2", 1.0, 0.023, 20.0, 0.10, FEATURE_NONE, 5.0, "5%"},
    },
};

/*
 * IHO S-44 5th Edition (2008), Table 1 -- FROM MEMORY, not checked against
 * the standard's text.  TVU a/b and THU are those of edition 6's namesakes.
 * Feature sizes (from memory): Special cubic features > 1 m; 1a > 2 m down
 * to 40 m, 10 % of depth beyond; 1b and 2 "not applicable".
 * Coverage (from memory): full sea floor search required for Special and
 * 1a, not required for 1b and 2 (which give a line spacing instead).
 */
static const struct sb_standard s44_ed5 = {
    .id = "s44-5",
    .title = "IHO S-44 5th Edition (2008)",
    .source = "IHO S-44 5th Edition (2008), Table 1, compiled from memory "
              "and not checked against the text: verify before relying on it",
    .n_orders = 4,
    .orders = {
        {"special", "Special Order", 0.25, 0.0075, 2.0, 0.0,
         FEATURE_CONST(1.0), 100.0, "full sea floor search"},
        {"1a", "Order 1a", 0.5, 0.013, 5.0, 0.05,
         FEATURE_CONST_THEN_FRAC(2.0, 40.0, 0.10), 100.0,
         "full sea floor search"},
        {"1b", "Order 1b", 0.5, 0.013, 5.0, 0.05, FEATURE_NONE, NAN,
         "no full search; lines 3 x mean depth or 25 m apart, the greater"},
        {"2", "Order 2", 1.0, 0.023, 20.0, 0.10, FEATURE_NONE, NAN,
         "no full search; lines 4 x mean depth apart"},
    },
};

/*
 * IHO S-44 4th Edition (1998), Table 1 -- FROM MEMORY, not checked against
 * the standard's text.  Note Order 2's THU of 20 m + 5 % d (edition 6 has
 * 10 %).  Feature sizes (from memory): Special cubic features > 1 m; Orders
 * 1 and 2 > 2 m down to 40 m, 10 % of depth beyond; Order 3 not applicable.
 * Coverage (from memory): 100 % bottom search compulsory for Special,
 * required in selected areas for Order 1, possibly required in selected
 * areas for Order 2, not applicable for Order 3.
 */
static const struct sb_standard s44_ed4 = {
    .id = "s44-4",
    .title = "IHO S-44 4th Edition (1998)",
    .source = "IHO S-44 4th Edition (1998), Table 1, compiled from memory "
              "and not checked against the text: verify before relying on it",
    .n_orders = 4,
    .orders = {
        {"special", "Special Order", 0.25, 0.0075, 2.0, 0.0,
         FEATURE_CONST(1.0), 100.0, "100% bottom search compulsory"},
        {"1", "Order 1", 0.5, 0.013, 5.0, 0.05,
         FEATURE_CONST_THEN_FRAC(2.0, 40.0, 0.10), NAN,
         "100% search in selected areas"},
        {"2", "Order 2", 1.0, 0.023, 20.0, 0.05,
         FEATURE_CONST_THEN_FRAC(2.0, 40.0, 0.10), NAN,
         "100% search may be required in selected areas"},
        {"3", "Order 3", 1.0, 0.023, 150.0, 0.05, FEATURE_NONE, NAN,
         "not applicable"},
    },
};

/* The type table: every compiled-in standard, default first. */
static const struct sb_standard *const builtin[] = {&s44_ed6, &s44_ed5,
                                                    &s44_ed4};
static const char *const builtin_ids[] = {"s44-6", "s44-5", "s44-4", NULL};

const struct sb_standard *sb_standard_builtin(const char *id)
{
    size_t i;

    if (!id)
        return NULL;
    for (i = 0; i < sizeof builtin / sizeof builtin[0]; i++)
        if (strcmp(builtin[i]->id, id) == 0)
            return builtin[i];
    return NULL;
}

const char *const *sb_standard_builtin_ids(void)
{
    return builtin_ids;
}

int sb_standard_resolve(const char *arg, struct sb_standard *storage,
                        const struct sb_standard **out, struct sb_error *err)
{
    const struct sb_standard *b;
    int rc;

    if (!arg || !*arg)
        arg = SB_STANDARD_DEFAULT_ID;
    b = sb_standard_builtin(arg);
    if (b) {
        *out = b;
        return SB_OK;
    }
    rc = sb_standard_load(arg, storage, err);
    *out = rc == SB_OK ? storage : NULL;
    return rc;
}

const struct sb_order *sb_standard_order(const struct sb_standard *std,
                                         const char *id)
{
    int i;

    if (!std || !id)
        return NULL;
    for (i = 0; i < std->n_orders; i++)
        if (strcmp(std->orders[i].id, id) == 0)
            return &std->orders[i];
    return NULL;
}

/* IHO S-44 ed. 6.0.0 (2020), 3.2 (same form in eds. 4 and 5):
 * TVU = sqrt(a^2 + (b d)^2).  hypot avoids overflow and is exact enough. */
double sb_order_tvu(const struct sb_order *o, double depth_m)
{
    return hypot(o->tvu_a_m, o->tvu_b * depth_m);
}

/* IHO S-44 ed. 6.0.0 (2020), Table 1: THU = constant + fraction x depth. */
double sb_order_thu(const struct sb_order *o, double depth_m)
{
    return o->thu_c_m + o->thu_frac * depth_m;
}

int sb_order_feature(const struct sb_order *o, double depth_m, double *size_m)
{
    const struct sb_feature_rule *r = &o->feature;
    double s;

    if (!r->specified) {
        if (size_m)
            *size_m = NAN;
        return 0;
    }
    /* S-44 ed. 6 Table 1 (Order 1a): "2 m in depths up to 40 m; 10 % of
     * depth beyond 40 m" -- the constant applies at the boundary itself. */
    s = depth_m <= r->beyond_m ? r->size_m : r->frac * depth_m;
    if (size_m)
        *size_m = s;
    return 1;
}
