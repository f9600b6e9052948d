/*
 * swathbudget — auditing a finished survey: per-sounding a-priori checks,
 * the crossline comparison per beam-angle bin, and the reconciliation of
 * rows (see audit.h and docs/audit.md).
 */
#include "swathbudget/audit.h"

#include <gsl/gsl_cdf.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/units.h"

#define PI 3.14159265358979323846
#define DEG (PI / 180.0)
#define PROGRESS_EVERY (1u << 20)
#define LINES_INITIAL 64

/* ---- bounded-memory quantiles ---------------------------------------------- */

void sb_qhist_clear(struct sb_qhist *h)
{
    memset(h, 0, sizeof *h);
}

/* Split a positive normal double v = m 2^e, m in [1, 2), from its bits. */
static inline int split_pow2(double v, double *m)
{
    uint64_t bits;
    int e;

    memcpy(&bits, &v, sizeof bits);
    e = (int)((bits >> 52) & 0x7ff) - 1023;
    bits = (bits & 0xfffffffffffffULL) | (1023ULL << 52);
    memcpy(m, &bits, sizeof bits);
    return e;
}

static const double QHIST_LOW = 0x1p-20;  /* 2^SB_QHIST_E_MIN */
static const double QHIST_HIGH = 0x1p12;  /* 2^SB_QHIST_E_MAX */

static inline int qhist_index(double v)
{
    double m;
    int e;

    if (!(v >= QHIST_LOW))
        return 0;
    if (v >= QHIST_HIGH)
        return SB_QHIST_BINS - 1;
    e = split_pow2(v, &m);
    return 1 + (e - SB_QHIST_E_MIN) * SB_QHIST_SUB +
           (int)((m - 1.0) * SB_QHIST_SUB);
}

void sb_qhist_add(struct sb_qhist *h, double v)
{
    if (isnan(v))
        return;
    h->count[qhist_index(v)]++;
    h->n++;
}

double sb_qhist_rank(const struct sb_qhist *h, uint64_t k)
{
    uint64_t cum = 0;

    if (k < 1 || k > h->n)
        return NAN;
    for (int i = 0; i < SB_QHIST_BINS; i++) {
        if (cum + h->count[i] >= k) {
            int e, j;
            double lo, hi, frac;

            if (i == 0)
                return 0.0;
            if (i == SB_QHIST_BINS - 1)
                return INFINITY;
            e = SB_QHIST_E_MIN + (i - 1) / SB_QHIST_SUB;
            j = (i - 1) % SB_QHIST_SUB;
            lo = ldexp(1.0 + (double)j / SB_QHIST_SUB, e);
            hi = ldexp(1.0 + (double)(j + 1) / SB_QHIST_SUB, e);
            /* the values of a bin taken as spread evenly across it */
            frac = ((double)(k - cum) - 0.5) / h->count[i];
            return lo + frac * (hi - lo);
        }
        cum += h->count[i];
    }
    return NAN;
}

double sb_qhist_quantile(const struct sb_qhist *h, double p)
{
    uint64_t k;

    if (h->n == 0 || !(p > 0 && p < 1))
        return NAN;
    k = (uint64_t)ceil(p * (double)h->n);
    if (k < 1)
        k = 1;
    return sb_qhist_rank(h, k);
}

int sb_qhist_quantile_ci(const struct sb_qhist *h, double p, double conf,
                         double *lo, double *hi)
{
    double tail = 0.5 * (1.0 - conf);
    unsigned n = h->n > 4000000000u ? 4000000000u : (unsigned)h->n;
    uint64_t a, b, l, u;

    *lo = *hi = NAN;
    if (h->n == 0 || !(p > 0 && p < 1) || !(conf > 0 && conf < 1))
        return SB_EINPUT;
    /* lower rank l: the largest with P(B <= l - 1) <= tail, B ~ Bin(n, p)
     * (P(x(l) > the quantile) = P(B <= l - 1)) */
    if (gsl_cdf_binomial_P(0, p, n) > tail)
        return SB_EINPUT;
    a = 1;
    b = n;
    while (a < b) { /* invariant: P(B <= a - 1) <= tail */
        uint64_t mid = a + (b - a + 1) / 2;

        if (gsl_cdf_binomial_P((unsigned)(mid - 1), p, n) <= tail)
            a = mid;
        else
            b = mid - 1;
    }
    l = a;
    /* upper rank u: the smallest with P(B >= u) <= tail */
    if (gsl_cdf_binomial_Q(n - 1, p, n) > tail) /* P(B >= n) */
        return SB_EINPUT;
    a = 1;
    b = n;
    while (a < b) { /* invariant: P(B >= b) <= tail */
        uint64_t mid = a + (b - a) / 2;

        if (gsl_cdf_binomial_Q((unsigned)(mid - 1), p, n) <= tail)
            b = mid;
        else
            a = mid + 1;
    }
    u = a;
    *lo = sb_qhist_rank(h, l);
    *hi = sb_qhist_rank(h, u);
    return SB_OK;
}

/* ---- columns ----------------------------------------------------------------- */

int sb_audit_columns_parse(const char *spec, struct sb_audit_columns *out,
                           struct sb_error *err)
{
    static const char *const keys[] = {"line", "x", "y", "z",
                                       "angle", "tpu_v", "tpu_h"};
    struct sb_audit_columns c;
    char *slots[7];
    const char *p = spec;

    memset(&c, 0, sizeof c);
    slots[0] = c.line;
    slots[1] = c.x;
    slots[2] = c.y;
    slots[3] = c.z;
    slots[4] = c.angle;
    slots[5] = c.tpu_v;
    slots[6] = c.tpu_h;
    if (!spec || !*spec)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "no columns given (expected "
                            "line=NAME,x=NAME,y=NAME,z=NAME,angle=NAME)");
    while (*p) {
        const char *end = strchr(p, ','), *eq;
        size_t len, klen, vlen;
        int k;

        if (!end)
            end = p + strlen(p);
        len = (size_t)(end - p);
        eq = memchr(p, '=', len);
        if (!eq)
            return sb_error_set(err, SB_EINPUT, "", 0, 0,
                                "column mapping '%.*s' has no '=' (expected "
                                "KEY=HEADER_NAME)",
                                (int)len, p);
        klen = (size_t)(eq - p);
        vlen = len - klen - 1;
        for (k = 0; k < 7; k++)
            if (strlen(keys[k]) == klen && memcmp(keys[k], p, klen) == 0)
                break;
        if (k == 7)
            return sb_error_set(err, SB_EINPUT, "", 0, 0,
                                "unknown column key '%.*s' (expected line, "
                                "x, y, z, angle, tpu_v or tpu_h)",
                                (int)klen, p);
        if (slots[k][0])
            return sb_error_set(err, SB_EINPUT, "", 0, 0,
                                "column key '%s' given twice (expected each "
                                "key once)",
                                keys[k]);
        if (vlen == 0 || vlen >= SB_AUDIT_NAME_MAX || memchr(eq + 1, '=', vlen))
            return sb_error_set(err, SB_EINPUT, "", 0, 0,
                                "column name for '%s' is empty, too long or "
                                "holds '=' (expected a header name of 1 to "
                                "%d characters)",
                                keys[k], SB_AUDIT_NAME_MAX - 1);
        memcpy(slots[k], eq + 1, vlen);
        slots[k][vlen] = '\0';
        p = *end ? end + 1 : end;
        if (*end && !*p)
            return sb_error_set(err, SB_EINPUT, "", 0, 0,
                                "column mapping ends with ',' (expected "
                                "another KEY=NAME after it)");
    }
    for (int k = 0; k < 5; k++)
        if (!slots[k][0])
            return sb_error_set(err, SB_EINPUT, "", 0, 0,
                                "column key '%s' missing (expected line, x, "
                                "y, z and angle to be mapped)",
                                keys[k]);
    *out = c;
    return SB_OK;
}

const char *sb_audit_reason_name(int reason)
{
    static const char *const names[] = {"unparsable", "non_finite",
                                        "missing_column", "out_of_range",
                                        "outside_grid"};

    return reason >= 0 && reason < SB_AUDIT_NREASONS ? names[reason] : "?";
}

const char *sb_audit_fail_kind_name(int kind)
{
    static const char *const names[] = {"no_data", "crossing", "nadir",
                                        "beyond_data"};

    return kind >= 0 && kind <= 3 ? names[kind] : "?";
}

void sb_audit_config_default(struct sb_audit_config *c)
{
    memset(c, 0, sizeof *c);
    c->bin_width_rad = 5 * DEG;
    c->angle_max_rad = 75 * DEG;
    c->nadir_max_rad = 10 * DEG;
    c->cell_m = 0;
    c->min_ref = 3;
    c->min_bin = 50;
    c->max_fail_frac = 0;
    c->family_conf = 0.95;
}

/* ---- the audit ------------------------------------------------------------------ */

struct line_stats {
    struct sb_audit_line_result r;
    size_t len;
};

/* Running mean and variance (Welford 1962). */
struct welford {
    uint64_t n;
    double mean, m2;
};

static inline void welford_add(struct welford *w, double v)
{
    double d = v - w->mean;

    w->n++;
    w->mean += d / (double)w->n;
    w->m2 += d * (v - w->mean);
}

/* Accumulators of the comparison in one bin. */
struct cmp_bin {
    struct welford diff;
    double sum_uref2;         /* u_ref^2, m^2 */
    double sum_uref2_tvu;     /* (k u_ref / TVU95_apriori)^2 */
    double sum_tvu;           /* a-priori TVU95, m */
    struct sb_qhist abs_d;    /* |d|, m */
    struct sb_qhist ratio;    /* |d| / a-priori TVU95 */
    uint64_t within[SB_AUDIT_ORDERS_MAX];
    double sum_uref2_lim[SB_AUDIT_ORDERS_MAX]; /* (k u_ref / limit)^2 */
    double sum_ap_lim[SB_AUDIT_ORDERS_MAX];    /* TVU95_apriori / limit */
    struct sb_qhist lim[SB_AUDIT_ORDERS_MAX];  /* |d| / limit */
};

struct ap_bin {
    uint64_t n;
    double sum_tvu, sum_thu;
    uint64_t fail_any[SB_AUDIT_ORDERS_MAX];
};

struct sb_audit {
    struct sb_audit_config cfg;
    struct sb_tvutable *table;
    double bound;             /* table's claimed relative bound, cached */
    double lo_f, hi_f, lo_f2, hi_f2; /* 1 -/+ bound and their squares */
    size_t table_evals;       /* to notice when the table grew */

    /* limits per order, the constants squared for the TVU test */
    double a2[SB_AUDIT_ORDERS_MAX], b2[SB_AUDIT_ORDERS_MAX];
    double thu_c[SB_AUDIT_ORDERS_MAX], thu_f[SB_AUDIT_ORDERS_MAX];

    int n_bins, bins_side;
    double inv_bin;
    struct ap_bin *ap;
    struct cmp_bin *cmp;      /* allocated when a comparison starts */

    struct sb_audit_order_result ord[SB_AUDIT_ORDERS_MAX];
    struct sb_audit_bin_result *bins;
    struct sb_audit_totals tot;

    /* survey lines: array + open-addressing index */
    struct line_stats *lines;
    size_t n_lines, cap_lines;
    int32_t *line_index;      /* slots; -1 empty */
    size_t index_slots;
    size_t last_line;         /* cache: rows come grouped by line */
    int have_last;

    /* reference */
    struct sb_grid *base;     /* built while reading */
    struct sb_grid *grid;     /* fixed for the comparison */
    struct sb_qhist *ref_depth;

    size_t listed;            /* bad rows handed to the hook */
    int scanned;
};

int sb_audit_alloc(const struct sb_audit_config *c, struct sb_tvutable *table,
                   struct sb_audit **out, struct sb_error *err)
{
    struct sb_audit *a;

    *out = NULL;
    if (c->n_orders < 1 || c->n_orders > SB_AUDIT_ORDERS_MAX)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "%d orders to audit (expected 1 to %d)",
                            c->n_orders, SB_AUDIT_ORDERS_MAX);
    if (!(c->bin_width_rad >= 0.1 * DEG && c->bin_width_rad <= 45 * DEG))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "angle bin width %g deg (expected 0.1 to 45 "
                            "deg)",
                            c->bin_width_rad / DEG);
    if (!(c->angle_max_rad > 0 && c->angle_max_rad < PI / 2))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "largest angle %g deg (expected 0 to 90 deg)",
                            c->angle_max_rad / DEG);
    if (!(c->nadir_max_rad > 0 && c->nadir_max_rad <= c->angle_max_rad))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "near-nadir limit %g deg (expected above 0 and "
                            "at most the largest beam angle, %g deg)",
                            c->nadir_max_rad / DEG, c->angle_max_rad / DEG);
    if (!(c->cell_m == 0 || (c->cell_m >= SB_GRID_CELL_MIN_M &&
                             c->cell_m <= SB_GRID_CELL_MAX_M)))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "cell size %g m (expected %g to %g m, or 0 to "
                            "derive it)",
                            c->cell_m, SB_GRID_CELL_MIN_M, SB_GRID_CELL_MAX_M);
    if (c->min_ref < 2 || c->min_bin < 20)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "at least %u reference soundings per cell and %u "
                            "per bin (expected >= 2 and >= 20)",
                            c->min_ref, c->min_bin);
    if (!(c->max_fail_frac >= 0 && c->max_fail_frac <= 1) ||
        !(c->family_conf > 0.5 && c->family_conf < 1))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "allowed failing fraction %g or confidence %g "
                            "(expected 0 to 1, and 0.5 to 1)",
                            c->max_fail_frac, c->family_conf);
    if (c->n_crosslines > SB_AUDIT_CROSSLINES_MAX)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "%zu crosslines (expected at most %d)",
                            c->n_crosslines, SB_AUDIT_CROSSLINES_MAX);
    a = calloc(1, sizeof *a);
    if (!a)
        goto nomem;
    a->cfg = *c;
    a->table = table;
    a->bins_side = (int)ceil(c->angle_max_rad / c->bin_width_rad - 1e-9);
    a->n_bins = 2 * a->bins_side;
    if (a->n_bins > SB_AUDIT_BINS_MAX) {
        int nb = a->n_bins;

        free(a);
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "%d angle bins (expected at most %d: use wider "
                            "bins)",
                            nb, SB_AUDIT_BINS_MAX);
    }
    a->inv_bin = 1.0 / c->bin_width_rad;
    a->ap = calloc((size_t)a->n_bins, sizeof *a->ap);
    a->bins = calloc((size_t)a->n_bins, sizeof *a->bins);
    a->lines = malloc(LINES_INITIAL * sizeof *a->lines);
    a->index_slots = 4 * LINES_INITIAL;
    a->line_index = malloc(a->index_slots * sizeof *a->line_index);
    a->ref_depth = calloc(1, sizeof *a->ref_depth);
    if (!a->ap || !a->bins || !a->lines || !a->line_index || !a->ref_depth)
        goto nomem;
    a->cap_lines = LINES_INITIAL;
    for (size_t i = 0; i < a->index_slots; i++)
        a->line_index[i] = -1;
    for (int k = 0; k < c->n_orders; k++) {
        const struct sb_order *o = c->orders[k];

        a->a2[k] = o->tvu_a_m * o->tvu_a_m;
        a->b2[k] = o->tvu_b * o->tvu_b;
        a->thu_c[k] = o->thu_c_m;
        a->thu_f[k] = o->thu_frac;
        a->ord[k].order = o;
    }
    a->lo_f = a->hi_f = a->lo_f2 = a->hi_f2 = 1;
    a->tot.depth_min_m = INFINITY;
    a->tot.depth_max_m = -INFINITY;
    if (c->n_crosslines > 0) {
        int rc = sb_grid_alloc(c->cell_m > 0 ? c->cell_m : 0.5, &a->base,
                               err);
        if (rc != SB_OK) {
            sb_audit_free(a);
            return rc;
        }
        a->tot.have_reference = 1;
    }
    *out = a;
    return SB_OK;
nomem:
    sb_audit_free(a);
    return sb_error_set(err, SB_ENOMEM, "", 0, 0, "out of memory for the "
                                                  "audit");
}

void sb_audit_free(struct sb_audit *a)
{
    if (!a)
        return;
    free(a->ap);
    free(a->cmp);
    free(a->bins);
    free(a->lines);
    free(a->line_index);
    free(a->ref_depth);
    sb_grid_free(a->base);
    sb_grid_free(a->grid);
    free(a);
}

const struct sb_audit_config *sb_audit_config(const struct sb_audit *a)
{
    return &a->cfg;
}

/* ---- survey lines ------------------------------------------------------------------ */

static uint64_t name_hash(const char *s, size_t n)
{
    uint64_t h = 0xcbf29ce484222325ULL; /* FNV-1a, Fowler-Noll-Vo */

    for (size_t i = 0; i < n; i++)
        h = (h ^ (unsigned char)s[i]) * 0x100000001b3ULL;
    return h;
}

static int index_grow(struct sb_audit *a)
{
    size_t slots = a->index_slots * 2;
    int32_t *idx = malloc(slots * sizeof *idx);

    if (!idx)
        return SB_ENOMEM;
    for (size_t i = 0; i < slots; i++)
        idx[i] = -1;
    for (size_t i = 0; i < a->n_lines; i++) {
        size_t k = name_hash(a->lines[i].r.name, a->lines[i].len) &
                   (slots - 1);

        while (idx[k] >= 0)
            k = (k + 1) & (slots - 1);
        idx[k] = (int32_t)i;
    }
    free(a->line_index);
    a->line_index = idx;
    a->index_slots = slots;
    return SB_OK;
}

/* Index of the line named s[0..n) (created if new); -1 out of memory. */
static long line_find(struct sb_audit *a, const char *s, size_t n)
{
    size_t k;
    struct line_stats *l;

    if (a->have_last) {
        /* rows come in line order: almost always the line of the last
         * row; names are short, a byte loop beats a call to memcmp */
        size_t i = 0;

        l = &a->lines[a->last_line];
        if (l->len == n) {
            while (i < n && l->r.name[i] == s[i])
                i++;
            if (i == n)
                return (long)a->last_line;
        }
    }
    k = name_hash(s, n) & (a->index_slots - 1);
    while (a->line_index[k] >= 0) {
        l = &a->lines[a->line_index[k]];
        if (l->len == n && memcmp(l->r.name, s, n) == 0) {
            a->last_line = (size_t)a->line_index[k];
            a->have_last = 1;
            return (long)a->last_line;
        }
        k = (k + 1) & (a->index_slots - 1);
    }
    if (a->n_lines == a->cap_lines) {
        struct line_stats *nl =
            realloc(a->lines, 2 * a->cap_lines * sizeof *nl);
        if (!nl)
            return -1;
        a->lines = nl;
        a->cap_lines *= 2;
    }
    if (4 * (a->n_lines + 1) > a->index_slots) {
        if (index_grow(a) != SB_OK)
            return -1;
        k = name_hash(s, n) & (a->index_slots - 1);
        while (a->line_index[k] >= 0)
            k = (k + 1) & (a->index_slots - 1);
    }
    l = &a->lines[a->n_lines];
    memset(l, 0, sizeof *l);
    memcpy(l->r.name, s, n);
    l->r.name[n] = '\0';
    l->len = n;
    for (size_t i = 0; i < a->cfg.n_crosslines; i++)
        if (strlen(a->cfg.crosslines[i]) == n &&
            memcmp(a->cfg.crosslines[i], s, n) == 0)
            l->r.crossline = 1;
    a->line_index[k] = (int32_t)a->n_lines;
    a->last_line = a->n_lines;
    a->have_last = 1;
    return (long)a->n_lines++;
}

/* ---- per-sounding checks --------------------------------------------------------- */

static inline int bin_of(const struct sb_audit *a, double angle)
{
    /* the small addend puts an angle written exactly on an edge (30.0
     * deg, converted to radians with rounding) in the bin above it */
    int k = (int)(fabs(angle) * a->inv_bin + 1e-9);

    if (k >= a->bins_side)
        k = a->bins_side - 1;
    return angle < 0 ? a->bins_side - 1 - k : a->bins_side + k;
}

/* The a-priori part of one usable sounding; line index li.  Returns SB_OK,
 * SB_EINPUT (outside the table: caller counts it) or another status. */
static int check_sounding(struct sb_audit *a, long li, long file_line,
                          double x, double y, double z, double angle,
                          double tpu_v, double tpu_h,
                          const struct sb_audit_hooks *hooks,
                          struct sb_error *err)
{
    struct line_stats *l = &a->lines[li];
    struct ap_bin *bin;
    double tvu, thu, tvu2, lo2, hi2, z2;
    int rc, b;
    size_t ev;

    rc = sb_tvutable_lookup(a->table, z, angle, &tvu, &thu, err);
    if (rc != SB_OK)
        return rc;
    ev = sb_tvutable_evaluations(a->table);
    if (ev != a->table_evals) { /* an octave was built: bound may change */
        a->table_evals = ev;
        a->bound = sb_tvutable_bound(a->table);
        a->lo_f = 1 - a->bound;
        a->hi_f = 1 + a->bound;
        a->lo_f2 = a->lo_f * a->lo_f;
        a->hi_f2 = a->hi_f * a->hi_f;
    }
    if (a->cfg.tpu_is_sd) {
        tpu_v *= SB_S44_K95_1D;
        tpu_h *= SB_S44_K95_2D;
    }
    b = bin_of(a, angle);
    bin = &a->ap[b];
    bin->n++;
    bin->sum_tvu += tvu;
    bin->sum_thu += thu;
    l->r.n++;
    a->tot.rows_used++;
    if (z < a->tot.depth_min_m)
        a->tot.depth_min_m = z;
    if (z > a->tot.depth_max_m)
        a->tot.depth_max_m = z;
    if (!isnan(tpu_v))
        a->tot.rows_with_tpu_v++;
    if (!isnan(tpu_h))
        a->tot.rows_with_tpu_h++;
    tvu2 = tvu * tvu;
    /* a decision is borderline when the limit lies within the table's
     * error bound of the value */
    lo2 = tvu2 * a->lo_f2;
    hi2 = tvu2 * a->hi_f2;
    z2 = z * z;
    for (int k = 0; k < a->cfg.n_orders; k++) {
        struct sb_audit_order_result *o = &a->ord[k];
        double ltvu2 = a->a2[k] + a->b2[k] * z2;
        double lthu = a->thu_c[k] + a->thu_f[k] * z;
        unsigned what = 0;

        /* (o->checked is rows_used, filled in by sb_audit_finish) */
        if (tvu2 > ltvu2)
            what |= SB_AUDIT_FAIL_TVU;
        if (thu > lthu)
            what |= SB_AUDIT_FAIL_THU;
        o->borderline += (ltvu2 >= lo2 && ltvu2 <= hi2) |
                         (lthu >= thu * a->lo_f && lthu <= thu * a->hi_f);
        if (!isnan(tpu_v)) {
            o->data_v++;
            if (tpu_v * tpu_v > ltvu2) {
                what |= SB_AUDIT_FAIL_DATA_TVU;
                o->data_fail_v++;
            }
        }
        if (!isnan(tpu_h)) {
            o->data_h++;
            if (tpu_h > lthu) {
                what |= SB_AUDIT_FAIL_DATA_THU;
                o->data_fail_h++;
            }
        }
        if (!what)
            continue;
        if (what & SB_AUDIT_FAIL_TVU)
            o->fail_tvu++;
        if (what & SB_AUDIT_FAIL_THU)
            o->fail_thu++;
        if (what & (SB_AUDIT_FAIL_TVU | SB_AUDIT_FAIL_THU)) {
            o->fail_any++;
            bin->fail_any[k]++;
        }
        o->fail_sounding++;
        l->r.fail[k]++;
        if (hooks && hooks->failure) {
            struct sb_audit_failure f;

            f.file_line = file_line;
            f.line = l->r.name;
            f.line_len = l->len;
            f.x_m = x;
            f.y_m = y;
            f.z_m = z;
            f.angle_rad = angle;
            f.order = o->order;
            f.what = what;
            f.tvu95_m = tvu;
            f.thu95_m = thu;
            f.tvu_limit_m = sqrt(ltvu2);
            f.thu_limit_m = lthu;
            f.tpu_v95_m = tpu_v;
            f.tpu_h95_m = tpu_h;
            if ((rc = hooks->failure(hooks->ctx, &f)) != SB_OK)
                return sb_error_set(err, rc, "", 0, 0,
                                    "could not record a failing sounding "
                                    "(%s)",
                                    sb_strerror(rc));
        }
    }
    return SB_OK;
}

static int add_reference_point(struct sb_audit *a, double x, double y,
                               double z, struct sb_error *err)
{
    int rc = sb_grid_add(a->base, x, y, z, err);

    if (rc != SB_OK)
        return rc;
    sb_qhist_add(a->ref_depth, z);
    a->tot.ref_soundings++;
    return SB_OK;
}

int sb_audit_add_sounding(struct sb_audit *a, const char *line,
                          size_t line_len, double x_m, double y_m,
                          double z_m, double angle_rad, double tpu_v_m,
                          double tpu_h_m, const struct sb_audit_hooks *hooks,
                          struct sb_error *err)
{
    long li;
    int rc;

    a->tot.rows_read++;
    if (line_len == 0 || line_len >= SB_AUDIT_NAME_MAX || !isfinite(x_m) ||
        !isfinite(y_m) || !isfinite(z_m) || !isfinite(angle_rad) ||
        tpu_v_m < 0 || tpu_h_m < 0 || isinf(tpu_v_m) || isinf(tpu_h_m)) {
        int r = line_len == 0 ? SB_AUDIT_MISSING
                : line_len >= SB_AUDIT_NAME_MAX ? SB_AUDIT_UNPARSABLE
                : (tpu_v_m < 0 || tpu_h_m < 0) ? SB_AUDIT_OUT_OF_RANGE
                                               : SB_AUDIT_NONFINITE;
        a->tot.rows_rejected++;
        a->tot.reason[r]++;
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "sounding rejected (%s)", sb_audit_reason_name(r));
    }
    li = line_find(a, line, line_len);
    if (li < 0)
        return sb_error_set(err, SB_ENOMEM, "", 0, 0,
                            "out of memory for the survey lines");
    rc = check_sounding(a, li, 0, x_m, y_m, z_m, angle_rad, tpu_v_m, tpu_h_m,
                        hooks, err);
    if (rc == SB_EINPUT) {
        a->tot.rows_rejected++;
        a->tot.reason[SB_AUDIT_OUT_OF_RANGE]++;
        return rc;
    }
    if (rc != SB_OK)
        return rc;
    if (a->lines[li].r.crossline && fabs(angle_rad) <= a->cfg.nadir_max_rad)
        return add_reference_point(a, x_m, y_m, z_m, err);
    return SB_OK;
}

int sb_audit_add_reference(struct sb_audit *a, double x_m, double y_m,
                           double z_m, struct sb_error *err)
{
    int rc;

    if (!a->base) {
        rc = sb_grid_alloc(a->cfg.cell_m > 0 ? a->cfg.cell_m : 0.5, &a->base,
                           err);
        if (rc != SB_OK)
            return rc;
    }
    a->tot.have_reference = 1;
    return add_reference_point(a, x_m, y_m, z_m, err);
}

/* ---- reading files --------------------------------------------------------------- */

/* Column indices of a file. */
struct colmap {
    int line, x, y, z, angle, tpu_v, tpu_h; /* -1 = not mapped */
    int num[4], n_num; /* x, y, z and (when mapped) angle, in order */
    char mark;         /* the file's decimal mark */
};

static int map_columns(const struct sb_csv *csv,
                       const struct sb_audit_columns *c, int need_line,
                       int need_angle, struct colmap *m, struct sb_error *err)
{
    int rc;

    m->line = m->angle = m->tpu_v = m->tpu_h = -1;
    if ((rc = sb_csv_map(csv, c->x, &m->x, err)) != SB_OK ||
        (rc = sb_csv_map(csv, c->y, &m->y, err)) != SB_OK ||
        (rc = sb_csv_map(csv, c->z, &m->z, err)) != SB_OK)
        return rc;
    if (need_line && (rc = sb_csv_map(csv, c->line, &m->line, err)) != SB_OK)
        return rc;
    if (c->angle[0]) {
        if (need_angle) {
            if ((rc = sb_csv_map(csv, c->angle, &m->angle, err)) != SB_OK)
                return rc;
        } else if (sb_csv_map(csv, c->angle, &m->angle, NULL) != SB_OK) {
            m->angle = -1; /* a reference file need not have angles */
        }
    }
    if (need_line && c->tpu_v[0] &&
        (rc = sb_csv_map(csv, c->tpu_v, &m->tpu_v, err)) != SB_OK)
        return rc;
    if (need_line && c->tpu_h[0] &&
        (rc = sb_csv_map(csv, c->tpu_h, &m->tpu_h, err)) != SB_OK)
        return rc;
    m->num[0] = m->x;
    m->num[1] = m->y;
    m->num[2] = m->z;
    m->num[3] = m->angle;
    m->n_num = m->angle >= 0 ? 4 : 3;
    m->mark = sb_csv_decimal_mark(csv);
    return SB_OK;
}

/* Reconciliation reason of a reader's reason. */
static int reason_of(const struct sb_csv *csv, const struct sb_csv_row *row,
                     int csv_reason)
{
    switch (csv_reason) {
    case SB_CSV_EMPTY_FIELD:
    case SB_CSV_NO_FIELD:
        return SB_AUDIT_MISSING;
    case SB_CSV_NONFINITE:
        return SB_AUDIT_NONFINITE;
    case SB_CSV_RAGGED:
        return row->nfields < sb_csv_ncols(csv) ? SB_AUDIT_MISSING
                                                : SB_AUDIT_UNPARSABLE;
    default:
        return SB_AUDIT_UNPARSABLE;
    }
}

/* One parsed row. */
struct parsed {
    const char *line;
    size_t line_len;
    double x, y, z, angle, tpu_v, tpu_h;
};

/* Parse a row; returns -1 when usable, else the reconciliation reason with
 * *bad_col the field at fault (-1: the row) and *csv_reason the reader's
 * reason (-1: a reason of our own, message in *own). */
static int parse_row(const struct sb_csv *csv, const struct sb_csv_row *row,
                     const struct colmap *m, struct parsed *p, int *bad_col,
                     int *csv_reason, const char **own)
{
    int r;
    double v[4] = {0, 0, 0, 0};

    *bad_col = -1;
    *own = NULL;
    if (row->reason != SB_CSV_OK) {
        *csv_reason = row->reason;
        return reason_of(csv, row, row->reason);
    }
    p->line = "";
    p->line_len = 0;
    if (m->line >= 0) {
        sb_csv_field_text(csv, row, m->line, &p->line, &p->line_len);
        if (p->line_len == 0) {
            *bad_col = m->line;
            *csv_reason = SB_CSV_EMPTY_FIELD;
            return SB_AUDIT_MISSING;
        }
        if (p->line_len >= SB_AUDIT_NAME_MAX) {
            *bad_col = m->line;
            *csv_reason = -1;
            *own = "line name too long (expected at most 63 characters)";
            return SB_AUDIT_UNPARSABLE;
        }
    }
    /* x, y, z, angle in this order: the first that fails is reported.
     * The short plain form is parsed inline (the reader guarantees the
     * padding, csvread.h); anything else goes through the reader, which
     * gives the same value for the short form and the reason otherwise. */
    for (int i = 0; i < m->n_num; i++) {
        const struct sb_csv_field *f = &row->field[m->num[i]];

        if (f->len - 1 < SB_DECIMAL_SHORT_MAX &&
            sb_decimal_parse_short_padded(f->text, f->len, m->mark,
                                          &v[i]))
            continue;
        r = sb_csv_field_double(csv, row, m->num[i], &v[i]);
        if (r != SB_CSV_OK) {
            *bad_col = m->num[i];
            *csv_reason = r;
            return reason_of(csv, row, r);
        }
    }
    p->x = v[0];
    p->y = v[1];
    p->z = v[2];
    p->angle = m->n_num == 4 ? v[3] * DEG : 0;
    p->tpu_v = p->tpu_h = NAN;
    if (m->tpu_v >= 0) {
        r = sb_csv_field_double(csv, row, m->tpu_v, &p->tpu_v);
        if (r == SB_CSV_EMPTY_FIELD)
            p->tpu_v = NAN; /* not carried for this sounding */
        else if (r != SB_CSV_OK) {
            *bad_col = m->tpu_v;
            *csv_reason = r;
            return reason_of(csv, row, r);
        } else if (p->tpu_v < 0) {
            *bad_col = m->tpu_v;
            *csv_reason = -1;
            *own = "negative vertical uncertainty (expected >= 0 m)";
            return SB_AUDIT_OUT_OF_RANGE;
        }
    }
    if (m->tpu_h >= 0) {
        r = sb_csv_field_double(csv, row, m->tpu_h, &p->tpu_h);
        if (r == SB_CSV_EMPTY_FIELD)
            p->tpu_h = NAN;
        else if (r != SB_CSV_OK) {
            *bad_col = m->tpu_h;
            *csv_reason = r;
            return reason_of(csv, row, r);
        } else if (p->tpu_h < 0) {
            *bad_col = m->tpu_h;
            *csv_reason = -1;
            *own = "negative horizontal uncertainty (expected >= 0 m)";
            return SB_AUDIT_OUT_OF_RANGE;
        }
    }
    return -1;
}

/* Count a rejected row and hand it to the hook (first list_max). */
static void reject(struct sb_audit *a, uint64_t *reasons, uint64_t *rejected,
                   const struct sb_csv *csv, const struct sb_csv_row *row,
                   int reason, int bad_col, int csv_reason, const char *own,
                   const struct sb_audit_hooks *hooks)
{
    struct sb_error e;

    reasons[reason]++;
    (*rejected)++;
    if (!hooks || !hooks->bad_row || a->listed >= hooks->list_max)
        return;
    a->listed++;
    sb_error_clear(&e);
    if (csv_reason >= 0) {
        sb_csv_row_error(csv, row, bad_col, csv_reason, &e);
    } else {
        long line = row->line;
        int col = 1;

        if (bad_col >= 0)
            sb_csv_field_pos(csv, row, bad_col, &line, &col);
        sb_error_set(&e, SB_EINPUT, sb_csv_path(csv), (int)line, col, "%s",
                     own);
    }
    hooks->bad_row(hooks->ctx, reason, &e);
}

static int open_csv(const char *path, const struct sb_csv_options *copt,
                    struct sb_csv **csv, struct sb_error *err)
{
    return sb_csv_open(path, copt, csv, err);
}

int sb_audit_scan(struct sb_audit *a, const char *path,
                  const struct sb_csv_options *copt,
                  const struct sb_audit_columns *cols,
                  const struct sb_audit_hooks *hooks, struct sb_error *err)
{
    struct sb_csv *csv;
    struct sb_csv_row row;
    struct colmap m;
    struct parsed p;
    int rc, got;

    if ((rc = open_csv(path, copt, &csv, err)) != SB_OK)
        return rc;
    if ((rc = map_columns(csv, cols, 1, 1, &m, err)) != SB_OK)
        goto out;
    while ((got = sb_csv_next(csv, &row, err)) == 1) {
        int bad_col, csv_reason, r;
        const char *own;
        long li;

        if (++a->tot.rows_read % PROGRESS_EVERY == 0 && hooks &&
            hooks->progress)
            hooks->progress(hooks->ctx, 1, a->tot.rows_read);
        r = parse_row(csv, &row, &m, &p, &bad_col, &csv_reason, &own);
        if (r >= 0) {
            reject(a, a->tot.reason, &a->tot.rows_rejected, csv, &row, r,
                   bad_col, csv_reason, own, hooks);
            continue;
        }
        li = line_find(a, p.line, p.line_len);
        if (li < 0) {
            rc = sb_error_set(err, SB_ENOMEM, "", 0, 0,
                              "out of memory for the survey lines");
            goto out;
        }
        rc = check_sounding(a, li, row.line, p.x, p.y, p.z, p.angle, p.tpu_v,
                            p.tpu_h, hooks, err);
        if (rc == SB_EINPUT) {
            int col = fabs(p.angle) > sb_tvutable_angle_max(a->table) ? m.angle
                                                                      : m.z;
            char msg[SB_ERROR_MSG_MAX];

            snprintf(msg, sizeof msg, "%s", err->msg);
            reject(a, a->tot.reason, &a->tot.rows_rejected, csv, &row,
                   SB_AUDIT_OUT_OF_RANGE, col, -1, msg, hooks);
            sb_error_clear(err);
            continue;
        }
        if (rc != SB_OK)
            goto out;
        if (a->lines[li].r.crossline &&
            fabs(p.angle) <= a->cfg.nadir_max_rad) {
            rc = add_reference_point(a, p.x, p.y, p.z, NULL);
            if (rc == SB_ENOMEM) {
                rc = sb_error_set(err, rc, "", 0, 0,
                                  "out of memory for the reference grid");
                goto out;
            }
            if (rc != SB_OK) {
                /* too far from the origin for the grid: the sounding is
                 * still checked, it just cannot serve as a reference */
                rc = SB_OK;
            }
        }
    }
    if (got < 0) {
        rc = -got;
        goto out;
    }
    rc = SB_OK;
    a->scanned = 1;
    if (a->tot.rows_used == 0)
        rc = sb_error_set(err, SB_EINPUT, sb_csv_path(csv),
                          (int)sb_csv_line(csv), 1,
                          "no usable sounding in %llu rows (expected at "
                          "least one row with every mapped column valid)",
                          (unsigned long long)a->tot.rows_read);
out:
    sb_csv_close(csv);
    a->tot.table_bound = sb_tvutable_bound(a->table);
    return rc;
}

int sb_audit_reference(struct sb_audit *a, const char *path,
                       const struct sb_csv_options *copt,
                       const struct sb_audit_columns *cols,
                       const struct sb_audit_hooks *hooks,
                       struct sb_error *err)
{
    struct sb_csv *csv;
    struct sb_csv_row row;
    struct colmap m;
    struct parsed p;
    int rc, got;

    if ((rc = open_csv(path, copt, &csv, err)) != SB_OK)
        return rc;
    if ((rc = map_columns(csv, cols, 0, 0, &m, err)) != SB_OK)
        goto out;
    while ((got = sb_csv_next(csv, &row, err)) == 1) {
        int bad_col, csv_reason, r;
        const char *own;

        if (++a->tot.ref_rows_read % PROGRESS_EVERY == 0 && hooks &&
            hooks->progress)
            hooks->progress(hooks->ctx, 2, a->tot.ref_rows_read);
        r = parse_row(csv, &row, &m, &p, &bad_col, &csv_reason, &own);
        if (r >= 0) {
            reject(a, a->tot.ref_reason, &a->tot.ref_rows_rejected, csv, &row,
                   r, bad_col, csv_reason, own, hooks);
            continue;
        }
        if (m.angle >= 0 && !(fabs(p.angle) <= a->cfg.nadir_max_rad)) {
            a->tot.ref_rows_used++; /* read fine, not near nadir */
            continue;
        }
        rc = sb_audit_add_reference(a, p.x, p.y, p.z, NULL);
        if (rc == SB_ENOMEM) {
            rc = sb_error_set(err, rc, "", 0, 0,
                              "out of memory for the reference grid");
            goto out;
        }
        if (rc != SB_OK) {
            reject(a, a->tot.ref_reason, &a->tot.ref_rows_rejected, csv, &row,
                   SB_AUDIT_OUT_OF_RANGE, m.x, -1,
                   "position too far from the origin for the grid (expected "
                   "projected coordinates within 2^31 cells)",
                   hooks);
            continue;
        }
        a->tot.ref_rows_used++;
    }
    if (got < 0) {
        rc = -got;
        goto out;
    }
    rc = SB_OK;
    if (a->tot.ref_soundings == 0)
        rc = sb_error_set(err, SB_EINPUT, sb_csv_path(csv),
                          (int)sb_csv_line(csv), 1,
                          "no usable reference sounding in %llu rows "
                          "(expected rows with x, y and z%s)",
                          (unsigned long long)a->tot.ref_rows_read,
                          m.angle >= 0 ? " near nadir" : "");
out:
    sb_csv_close(csv);
    return rc;
}

int sb_audit_fix_reference(struct sb_audit *a, struct sb_error *err)
{
    int rc;

    if (a->grid)
        return SB_OK;
    if (!a->base || a->tot.ref_soundings == 0)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "no reference soundings (expected near-nadir "
                            "soundings of the crosslines named, or a "
                            "reference file)");
    a->tot.ref_depth_median_m = sb_qhist_quantile(a->ref_depth, 0.5);
    if (a->cfg.cell_m > 0) {
        a->tot.cell_m = a->cfg.cell_m;
        a->grid = a->base;
    } else {
        double cell = sb_grid_cell_for_depth(a->tot.ref_depth_median_m);
        int factor = (int)(cell / sb_grid_cell_size(a->base) + 0.5);

        rc = sb_grid_coarsen(a->base, factor, &a->grid, err);
        if (rc != SB_OK)
            return rc;
        sb_grid_free(a->base);
        a->tot.cell_m = cell;
        a->tot.cell_derived = 1;
    }
    a->base = NULL;
    a->tot.cells = sb_grid_count(a->grid);
    {
        size_t pos = 0;
        const struct sb_grid_cell *c;

        while ((c = sb_grid_next(a->grid, &pos)) != NULL)
            if (c->n >= a->cfg.min_ref)
                a->tot.cells_usable++;
    }
    if (!a->cmp) {
        a->cmp = calloc((size_t)a->n_bins, sizeof *a->cmp);
        if (!a->cmp)
            return sb_error_set(err, SB_ENOMEM, "", 0, 0,
                                "out of memory for the comparison");
    }
    a->tot.compared = 1;
    return SB_OK;
}

/* Compare one usable mainscheme sounding with the reference. */
static int compare_one(struct sb_audit *a, double x, double y, double z,
                       double angle, struct sb_error *err)
{
    const struct sb_grid_cell *c;
    struct cmp_bin *b;
    double tvu, thu, d, ad, sd, uref2, k2u2;
    int rc;

    a->tot.cmp_candidates++;
    c = sb_grid_find(a->grid, x, y);
    if (!c || c->n < a->cfg.min_ref) {
        a->tot.cmp_outside++;
        return SB_OK;
    }
    rc = sb_tvutable_lookup(a->table, z, angle, &tvu, &thu, err);
    if (rc != SB_OK)
        return rc;
    a->tot.cmp_compared++;
    b = &a->cmp[bin_of(a, angle)];
    d = z - c->mean;
    ad = fabs(d);
    sd = sb_grid_cell_sd(c);
    /* the reference's standard uncertainty: that of its cell mean */
    uref2 = sd * sd / c->n;
    k2u2 = SB_K95_1D * SB_K95_1D * uref2;
    welford_add(&b->diff, d);
    b->sum_uref2 += uref2;
    b->sum_tvu += tvu;
    b->sum_uref2_tvu += k2u2 / (tvu * tvu);
    sb_qhist_add(&b->abs_d, ad);
    sb_qhist_add(&b->ratio, ad / tvu);
    for (int k = 0; k < a->cfg.n_orders; k++) {
        double l2 = a->a2[k] + a->b2[k] * z * z, l = sqrt(l2);

        if (ad <= l)
            b->within[k]++;
        b->sum_uref2_lim[k] += k2u2 / l2;
        b->sum_ap_lim[k] += tvu / l;
        sb_qhist_add(&b->lim[k], ad / l);
    }
    return SB_OK;
}

int sb_audit_compare_sounding(struct sb_audit *a, double x_m, double y_m,
                              double z_m, double angle_rad,
                              struct sb_error *err)
{
    if (!a->grid)
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "comparison before the reference was fixed "
                            "(expected sb_audit_fix_reference first)");
    return compare_one(a, x_m, y_m, z_m, angle_rad, err);
}

int sb_audit_compare(struct sb_audit *a, const char *path,
                     const struct sb_csv_options *copt,
                     const struct sb_audit_columns *cols,
                     const struct sb_audit_hooks *hooks, struct sb_error *err)
{
    struct sb_csv *csv;
    struct sb_csv_row row;
    struct colmap m;
    struct parsed p;
    uint64_t rows = 0;
    int rc, got;

    if (!a->scanned)
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "comparison before the a-priori pass (expected "
                            "sb_audit_scan first)");
    if ((rc = sb_audit_fix_reference(a, err)) != SB_OK)
        return rc;
    if ((rc = open_csv(path, copt, &csv, err)) != SB_OK)
        return rc;
    if ((rc = map_columns(csv, cols, 1, 1, &m, err)) != SB_OK)
        goto out;
    while ((got = sb_csv_next(csv, &row, err)) == 1) {
        int bad_col, csv_reason;
        const char *own;
        long li;

        if (++rows % PROGRESS_EVERY == 0 && hooks && hooks->progress)
            hooks->progress(hooks->ctx, 3, rows);
        /* rows rejected in pass 1 are rejected identically here and
         * skipped: they are already in the tally */
        if (parse_row(csv, &row, &m, &p, &bad_col, &csv_reason, &own) >= 0)
            continue;
        if (!(p.z >= sb_tvutable_depth_min(a->table) &&
              p.z < SB_TVUTABLE_DEPTH_MAX_M) ||
            !(fabs(p.angle) <= sb_tvutable_angle_max(a->table)))
            continue;
        li = line_find(a, p.line, p.line_len);
        if (li < 0) {
            rc = sb_error_set(err, SB_ENOMEM, "", 0, 0,
                              "out of memory for the survey lines");
            goto out;
        }
        if (a->lines[li].r.crossline)
            continue;
        if ((rc = compare_one(a, p.x, p.y, p.z, p.angle, err)) != SB_OK)
            goto out;
    }
    rc = got < 0 ? -got : SB_OK;
out:
    sb_csv_close(csv);
    return rc;
}

/* ---- results ----------------------------------------------------------------------- */

/* Corrected 95 % point: sqrt(q^2 - mean (k u)^2), 0 when the reference
 * alone would explain it. */
static double corrected(double q, double mean_k2u2)
{
    double v = q * q - mean_k2u2;

    if (isinf(q))
        return q;
    return v > 0 ? sqrt(v) : 0.0;
}

/* Fail angle on one side from per-bin values (index from nadir outward;
 * NAN = not enough data): the crossing of 1, interpolated between centres. */
static struct sb_audit_fail_angle fail_angle(const double *v,
                                             const double *centre,
                                             const double *outer, int n)
{
    struct sb_audit_fail_angle f = {SB_AUDIT_ANGLE_NONE, 0};
    int prev = -1;

    for (int i = 0; i < n; i++) {
        if (isnan(v[i]))
            continue;
        if (v[i] > 1) {
            if (prev < 0) {
                f.kind = SB_AUDIT_ANGLE_NADIR;
                f.angle_rad = 0;
            } else {
                double t = (1 - v[prev]) / (v[i] - v[prev]);

                f.kind = SB_AUDIT_ANGLE_CROSS;
                f.angle_rad = centre[prev] + t * (centre[i] - centre[prev]);
            }
            return f;
        }
        prev = i;
    }
    if (prev >= 0) {
        f.kind = SB_AUDIT_ANGLE_BEYOND;
        f.angle_rad = outer[prev];
    }
    return f;
}

int sb_audit_finish(struct sb_audit *a, struct sb_error *err)
{
    int nb = a->n_bins, ns = a->bins_side, enough_bins = 0;
    double conf;

    a->tot.table_bound = sb_tvutable_bound(a->table);
    a->tot.bins_exceeding = a->tot.bins_below = a->tot.bins_enough = 0;
    for (int i = 0; i < nb; i++)
        if (a->cmp && a->cmp[i].diff.n >= a->cfg.min_bin)
            enough_bins++;
    /* Bonferroni: each bin's interval at 1 - (1 - family) / bins, so that
     * all hold together with the family-wise confidence */
    conf = 1 - (1 - a->cfg.family_conf) / (enough_bins > 0 ? enough_bins : 1);
    for (int i = 0; i < nb; i++) {
        struct sb_audit_bin_result *r = &a->bins[i];
        const struct ap_bin *ap = &a->ap[i];
        int side = i < ns ? -1 : 1, k = i < ns ? ns - 1 - i : i - ns;
        double inner = k * a->cfg.bin_width_rad;
        double outer = fmin((k + 1) * a->cfg.bin_width_rad,
                            a->cfg.angle_max_rad);

        r->from_rad = side < 0 ? -outer : inner;
        r->to_rad = side < 0 ? -inner : outer;
        r->n = ap->n;
        r->tvu95_mean_m = ap->n ? ap->sum_tvu / ap->n : NAN;
        r->thu95_mean_m = ap->n ? ap->sum_thu / ap->n : NAN;
        for (int o = 0; o < a->cfg.n_orders; o++)
            r->fail_any[o] = ap->fail_any[o];
        r->n_cmp = 0;
        r->enough = 0;
        r->exceeds = r->below = 0;
        r->diff_mean_m = r->diff_sd_m = r->q95_raw_m = r->q95_m = NAN;
        r->u_ref_m = r->tvu95_cmp_mean_m = NAN;
        r->ratio = r->ratio_lo = r->ratio_hi = NAN;
        for (int o = 0; o < a->cfg.n_orders; o++)
            r->within[o] = r->emp_limit[o] = r->ap_limit[o] = NAN;
        if (!a->cmp || a->cmp[i].diff.n == 0)
            continue;
        {
            const struct cmp_bin *b = &a->cmp[i];
            double n = (double)b->diff.n, m_k2u2 = b->sum_uref2_tvu / n, lo,
                   hi;

            r->n_cmp = b->diff.n;
            r->enough = b->diff.n >= a->cfg.min_bin;
            r->diff_mean_m = b->diff.mean;
            r->diff_sd_m = b->diff.n > 1 ? sqrt(b->diff.m2 / (n - 1)) : 0;
            r->q95_raw_m = sb_qhist_quantile(&b->abs_d, 0.95);
            r->u_ref_m = sqrt(b->sum_uref2 / n);
            r->q95_m = corrected(r->q95_raw_m,
                                 SB_K95_1D * SB_K95_1D * b->sum_uref2 / n);
            r->tvu95_cmp_mean_m = b->sum_tvu / n;
            r->ratio = corrected(sb_qhist_quantile(&b->ratio, 0.95), m_k2u2);
            if (sb_qhist_quantile_ci(&b->ratio, 0.95, conf, &lo, &hi) ==
                SB_OK) {
                r->ratio_lo = corrected(lo, m_k2u2);
                r->ratio_hi = corrected(hi, m_k2u2);
            }
            for (int o = 0; o < a->cfg.n_orders; o++) {
                r->within[o] = b->within[o] / n;
                r->emp_limit[o] =
                    corrected(sb_qhist_quantile(&b->lim[o], 0.95),
                              b->sum_uref2_lim[o] / n);
                r->ap_limit[o] = b->sum_ap_lim[o] / n;
            }
            if (r->enough) {
                a->tot.bins_enough++;
                r->exceeds = r->ratio_lo > 1;
                r->below = r->ratio_hi < 1;
                a->tot.bins_exceeding += (uint64_t)r->exceeds;
                a->tot.bins_below += (uint64_t)r->below;
            }
        }
    }
    for (int o = 0; o < a->cfg.n_orders; o++) {
        struct sb_audit_order_result *r = &a->ord[o];
        double emp[2][SB_AUDIT_BINS_MAX / 2], ap[2][SB_AUDIT_BINS_MAX / 2];
        double centre[SB_AUDIT_BINS_MAX / 2], outer[SB_AUDIT_BINS_MAX / 2];
        double frac;

        r->checked = a->tot.rows_used;
        r->compared = a->cmp != NULL;
        r->bins_over = 0;
        for (int k = 0; k < ns; k++) {
            const struct sb_audit_bin_result *port = &a->bins[ns - 1 - k];
            const struct sb_audit_bin_result *stbd = &a->bins[ns + k];

            centre[k] = 0.5 * (stbd->from_rad + stbd->to_rad);
            outer[k] = stbd->to_rad;
            emp[0][k] = port->enough ? port->emp_limit[o] : NAN;
            emp[1][k] = stbd->enough ? stbd->emp_limit[o] : NAN;
            ap[0][k] = port->enough ? port->ap_limit[o] : NAN;
            ap[1][k] = stbd->enough ? stbd->ap_limit[o] : NAN;
            r->bins_over += (port->enough && port->emp_limit[o] > 1) +
                            (stbd->enough && stbd->emp_limit[o] > 1);
        }
        r->emp_port = fail_angle(emp[0], centre, outer, ns);
        r->emp_stbd = fail_angle(emp[1], centre, outer, ns);
        r->ap_port = fail_angle(ap[0], centre, outer, ns);
        r->ap_stbd = fail_angle(ap[1], centre, outer, ns);
        /* verdict */
        frac = r->checked ? (double)r->fail_sounding / r->checked : 1;
        if (r->checked == 0) {
            r->pass = 0;
            snprintf(r->why, sizeof r->why, "no usable soundings");
        } else if (frac > a->cfg.max_fail_frac) {
            r->pass = 0;
            snprintf(r->why, sizeof r->why,
                     "%.2f %% of soundings fail a per-sounding check "
                     "(allowed %.2f %%)",
                     100 * frac, 100 * a->cfg.max_fail_frac);
        } else if (r->compared && r->bins_over > 0) {
            r->pass = 0;
            snprintf(r->why, sizeof r->why,
                     "empirical 95 %% of the crossline differences exceeds "
                     "the TVU limit in %d angle bin%s",
                     r->bins_over, r->bins_over == 1 ? "" : "s");
        } else {
            r->pass = 1;
            snprintf(r->why, sizeof r->why, "%s",
                     r->compared ? "every per-sounding check and every "
                                   "crossline bin within the limits"
                                 : "every per-sounding check within the "
                                   "limits (no crossline comparison)");
        }
    }
    (void)err;
    return SB_OK;
}

const struct sb_audit_totals *sb_audit_totals(const struct sb_audit *a)
{
    return &a->tot;
}

int sb_audit_n_orders(const struct sb_audit *a)
{
    return a->cfg.n_orders;
}

const struct sb_audit_order_result *sb_audit_order(const struct sb_audit *a,
                                                   int k)
{
    return k >= 0 && k < a->cfg.n_orders ? &a->ord[k] : NULL;
}

int sb_audit_n_bins(const struct sb_audit *a)
{
    return a->n_bins;
}

const struct sb_audit_bin_result *sb_audit_bin(const struct sb_audit *a,
                                               int b)
{
    return b >= 0 && b < a->n_bins ? &a->bins[b] : NULL;
}

const struct sb_qhist *sb_audit_bin_ratio_hist(const struct sb_audit *a,
                                               int b)
{
    return a->cmp && b >= 0 && b < a->n_bins ? &a->cmp[b].ratio : NULL;
}

size_t sb_audit_n_lines(const struct sb_audit *a)
{
    return a->n_lines;
}

const struct sb_audit_line_result *sb_audit_line(const struct sb_audit *a,
                                                 size_t i)
{
    return i < a->n_lines ? &a->lines[i].r : NULL;
}

size_t sb_audit_worst_lines(const struct sb_audit *a, int k, size_t *idx,
                            size_t n)
{
    size_t got = 0;

    if (k < 0 || k >= a->cfg.n_orders)
        return 0;
    /* insertion into a short sorted list: n is small (a report's top) */
    for (size_t i = 0; i < a->n_lines; i++) {
        const struct sb_audit_line_result *l = &a->lines[i].r;
        double f;
        size_t at;

        if (l->fail[k] == 0 || l->n == 0)
            continue;
        f = (double)l->fail[k] / l->n;
        for (at = got; at > 0; at--) {
            const struct sb_audit_line_result *o = &a->lines[idx[at - 1]].r;
            double g = (double)o->fail[k] / o->n;

            if (g > f || (g == f && o->fail[k] >= l->fail[k]))
                break;
        }
        if (at >= n)
            continue;
        if (got < n)
            got++;
        memmove(idx + at + 1, idx + at, (got - 1 - at) * sizeof *idx);
        idx[at] = i;
    }
    return got;
}
