/*
 * Tests of the audit statistics (audit.c): the bounded-memory quantiles,
 * the per-sounding checks against IHO S-44 limits, the crossline
 * comparison per angle bin, and the reconciliation of a file seeded with
 * every kind of bad row.
 *
 * The uncertainty "system" here is a closed-form function given to the
 * table (so the expected counts follow from arithmetic, not from the
 * program); the limits are those of IHO S-44 ed. 6.0.0 (2020), Table 1:
 * Special Order a = 0.25 m, b = 0.0075; Order 1a a = 0.5 m, b = 0.013,
 * THU 5 m + 5 % of depth.
 */
#include <check.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <gsl/gsl_sort.h>
#include <gsl/gsl_statistics_double.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <stdio.h>
#include <unistd.h>

#include "swathbudget/area.h"
#include "swathbudget/audit.h"
#include "swathbudget/orders.h"
#include "swathbudget/propagate.h"
#include "swathbudget/simulate.h"
#include "swathbudget/spec.h"
#include "swathbudget/tvutable.h"

#define DEG (3.14159265358979323846 / 180.0)

/* A file of the source tree: SB_SRCDIR is set by Makefile.am for the
 * tests, srcdir by automake; "." otherwise.  Two buffers, used in turn,
 * so that two paths can be alive at once. */
static const char *src(const char *rel)
{
    static char buf[2][4096];
    static int k;
    const char *dir = getenv("SB_SRCDIR");

    if (!dir || !*dir)
        dir = getenv("srcdir");
    k = !k;
    snprintf(buf[k], sizeof buf[k], "%s/%s", dir && *dir ? dir : ".", rel);
    return buf[k];
}

/* TVU95 = 0.2 (1 + 2 theta^2) m whatever the depth: crosses the Special
 * Order limit at 20 m (sqrt(0.25^2 + 0.15^2) = 0.29155 m) where
 * 1 + 2 theta^2 = 1.45774, theta = 0.47841 rad = 27.411 deg.
 * THU95 = 0.5 m (always within Special Order's 2 m). */
static double tvu_of(double a)
{
    return 0.2 * (1 + 2 * a * a);
}

static int model(void *ctx, double d, double a, double *tvu, double *thu,
                 struct sb_error *err)
{
    (void)ctx;
    (void)d;
    (void)err;
    *tvu = tvu_of(a);
    *thu = 0.5;
    return SB_OK;
}

/* Special Order at 20 m: sqrt(0.25^2 + (0.0075 x 20)^2) = 0.29155 m */
static const double CROSS_DEG = 27.411; /* from the formula above */

static struct sb_tvutable *table(void)
{
    struct sb_tvutable_opts o = {1.0, 70 * DEG, 1e-4};
    struct sb_tvutable *t;
    struct sb_error err;

    ck_assert_int_eq(sb_tvutable_alloc(&o, model, NULL, &t, &err), SB_OK);
    return t;
}

static void config(struct sb_audit_config *c, int with_1a)
{
    const struct sb_standard *s = sb_standard_builtin("s44-6");

    sb_audit_config_default(c);
    c->orders[0] = sb_standard_order(s, "special");
    ck_assert_ptr_nonnull(c->orders[0]);
    c->n_orders = 1;
    if (with_1a) {
        c->orders[1] = sb_standard_order(s, "1a");
        c->n_orders = 2;
    }
    c->angle_max_rad = 70 * DEG;
}

/* ---- quantiles ---------------------------------------------------------- */

START_TEST(qhist_matches_sorted_order_statistic)
{
    /* the exact order statistic from a sorted copy (gsl_sort) is the
     * independent reference; the histogram must be within its stated
     * resolution */
    static double v[20000];
    struct sb_qhist *h = malloc(sizeof *h);
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    const double ps[] = {0.05, 0.5, 0.9, 0.95, 0.99};

    sb_qhist_clear(h);
    for (int i = 0; i < 20000; i++) {
        v[i] = fabs(gsl_ran_gaussian(r, 0.1)) + 1e-9;
        sb_qhist_add(h, v[i]);
    }
    sb_qhist_add(h, NAN); /* ignored */
    ck_assert_uint_eq(h->n, 20000);
    gsl_sort(v, 1, 20000);
    for (size_t i = 0; i < sizeof ps / sizeof ps[0]; i++) {
        size_t k = (size_t)ceil(ps[i] * 20000);
        double exact = v[k - 1], got = sb_qhist_quantile(h, ps[i]);

        ck_assert_msg(fabs(got - exact) <= SB_QHIST_RESOLUTION * exact,
                      "p %g: %g vs %g", ps[i], got, exact);
    }
    /* ends of the scale */
    sb_qhist_clear(h);
    sb_qhist_add(h, 0.0);
    sb_qhist_add(h, 1e9);
    ck_assert(sb_qhist_rank(h, 1) == 0.0);
    ck_assert(isinf(sb_qhist_rank(h, 2)));
    ck_assert(isnan(sb_qhist_rank(h, 3)));
    gsl_rng_free(r);
    free(h);
}
END_TEST

START_TEST(qhist_ci_covers)
{
    /* Coverage of the distribution-free interval for the 95 % point of
     * |N(0, 1)|, whose true value is 1.959964 (the normal's 97.5 % point,
     * JCGM 100:2008 G.3).  Nominal coverage 90 %; the interval is
     * conservative (at least the nominal level, Conover 1999 3.2), so in
     * 400 trials at least 0.9 * 400 - 3 sd of a Bin(400, 0.9) = 360 - 18
     * must cover. */
    struct sb_qhist *h = malloc(sizeof *h);
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    int covered = 0;
    double lo, hi;

    for (int t = 0; t < 400; t++) {
        sb_qhist_clear(h);
        for (int i = 0; i < 500; i++)
            sb_qhist_add(h, fabs(gsl_ran_gaussian(r, 1.0)));
        ck_assert_int_eq(sb_qhist_quantile_ci(h, 0.95, 0.90, &lo, &hi),
                         SB_OK);
        ck_assert(lo <= hi);
        covered += lo <= 1.959964 && 1.959964 <= hi;
    }
    ck_assert_msg(covered >= 342, "covered %d of 400", covered);
    /* too few values for a 99.9 % interval of the 95 % point: with n = 20,
     * P(B >= 20) = 0.95^20 = 0.358 > 0.0005 */
    sb_qhist_clear(h);
    for (int i = 0; i < 20; i++)
        sb_qhist_add(h, 1.0 + i);
    ck_assert_int_eq(sb_qhist_quantile_ci(h, 0.95, 0.999, &lo, &hi),
                     SB_EINPUT);
    ck_assert(isnan(lo) && isnan(hi));
    gsl_rng_free(r);
    free(h);
}
END_TEST

/* ---- columns ------------------------------------------------------------ */

START_TEST(columns)
{
    struct sb_audit_columns c;
    struct sb_error err;

    ck_assert_int_eq(sb_audit_columns_parse("line=Line,x=E,y=N,z=Depth,"
                                            "angle=Beam,tpu_v=TVU",
                                            &c, &err),
                     SB_OK);
    ck_assert_str_eq(c.z, "Depth");
    ck_assert_str_eq(c.tpu_v, "TVU");
    ck_assert_str_eq(c.tpu_h, "");
    ck_assert_int_eq(sb_audit_columns_parse("line=L,x=E,y=N,z=D", &c, &err),
                     SB_EINPUT); /* angle missing */
    ck_assert_ptr_nonnull(strstr(err.msg, "angle"));
    ck_assert_int_eq(sb_audit_columns_parse("line=L,x=E,y=N,z=D,angle=A,"
                                            "depth=Q",
                                            &c, &err),
                     SB_EINPUT);
    ck_assert_int_eq(sb_audit_columns_parse("line=L,x=E,x=F,y=N,z=D,angle=A",
                                            &c, &err),
                     SB_EINPUT);
    ck_assert_int_eq(sb_audit_columns_parse("line=L,x=,y=N,z=D,angle=A", &c,
                                            &err),
                     SB_EINPUT);
    ck_assert_int_eq(sb_audit_columns_parse("line=L,x=E,y=N,z=D,angle=A,",
                                            &c, &err),
                     SB_EINPUT);
    ck_assert_int_eq(sb_audit_columns_parse("line", &c, &err), SB_EINPUT);
}
END_TEST

/* ---- a-priori checks ---------------------------------------------------- */

static int failures_seen;
static int count_failure(void *ctx, const struct sb_audit_failure *f)
{
    (void)ctx;
    /* every failure handed out must be a real one */
    ck_assert(f->what != 0);
    if (f->what & SB_AUDIT_FAIL_TVU)
        ck_assert(f->tvu95_m > f->tvu_limit_m);
    failures_seen++;
    return SB_OK;
}

START_TEST(apriori_counts)
{
    /* 20 m depth.  Special: TVU fails beyond 27.41 deg (formula above).
     * Order 1a (0.5 m, 0.013): limit sqrt(0.25 + 0.0676) = 0.56356 m:
     * 1 + 2 t^2 = 2.8178, t = 0.95335 rad = 54.62 deg.
     * Soundings every whole degree from -60 to +60 on line A, and one row
     * at 10 deg on line B carrying its own TVU 0.35 m (fails Special's
     * 0.2915 m, passes 1a's 0.5636 m). */
    struct sb_audit_config c;
    struct sb_tvutable *t = table();
    struct sb_audit *a;
    struct sb_error err;
    struct sb_audit_hooks hooks = {NULL, NULL, 0, count_failure, NULL};
    const struct sb_audit_order_result *sp, *o1a;
    size_t idx[4], nworst;
    uint64_t sum = 0;

    config(&c, 1);
    ck_assert_int_eq(sb_audit_alloc(&c, t, &a, &err), SB_OK);
    failures_seen = 0;
    for (int deg = -60; deg <= 60; deg++)
        ck_assert_int_eq(sb_audit_add_sounding(a, "A", 1, 0, 0, 20.0,
                                               deg * DEG, NAN, NAN, &hooks,
                                               &err),
                         SB_OK);
    ck_assert_int_eq(sb_audit_add_sounding(a, "B", 1, 0, 0, 20.0, 10 * DEG,
                                           0.35, NAN, &hooks, &err),
                     SB_OK);
    /* out of range: deeper than the table is fine, beyond 70 deg is not */
    ck_assert_int_eq(sb_audit_add_sounding(a, "B", 1, 0, 0, 20.0, 71 * DEG,
                                           NAN, NAN, &hooks, &err),
                     SB_EINPUT);
    ck_assert_int_eq(sb_audit_finish(a, &err), SB_OK);
    sp = sb_audit_order(a, 0);
    o1a = sb_audit_order(a, 1);
    /* Special: |deg| in 28..60 fails: 2 x 33 = 66 a-priori failures */
    ck_assert_uint_eq(sp->checked, 122);
    ck_assert_uint_eq(sp->fail_tvu, 66);
    ck_assert_uint_eq(sp->fail_thu, 0);
    ck_assert_uint_eq(sp->data_v, 1);
    ck_assert_uint_eq(sp->data_fail_v, 1);
    ck_assert_uint_eq(sp->fail_sounding, 67);
    ck_assert(!sp->pass);
    /* 1a: |deg| in 55..60: 2 x 6 = 12 */
    ck_assert_uint_eq(o1a->fail_tvu, 12);
    ck_assert_uint_eq(o1a->data_fail_v, 0);
    ck_assert_uint_eq(o1a->fail_sounding, 12);
    ck_assert_int_eq(failures_seen, 67 + 12);
    /* reconciliation */
    ck_assert_uint_eq(sb_audit_totals(a)->rows_read, 123);
    ck_assert_uint_eq(sb_audit_totals(a)->rows_used, 122);
    ck_assert_uint_eq(sb_audit_totals(a)->reason[SB_AUDIT_OUT_OF_RANGE], 1);
    /* per bin: the 5-deg bins hold the whole degrees in [5k, 5k + 5) */
    for (int b = 0; b < sb_audit_n_bins(a); b++)
        sum += sb_audit_bin(a, b)->n;
    ck_assert_uint_eq(sum, 122);
    {
        /* starboard bin [25, 30): degrees 25..29; Special fails 28, 29 */
        const struct sb_audit_bin_result *r = sb_audit_bin(a, 14 + 5);

        ck_assert(fabs(r->from_rad - 25 * DEG) < 1e-12);
        ck_assert_uint_eq(r->n, 5);
        ck_assert_uint_eq(r->fail_any[0], 2);
    }
    /* worst lines for Special: B (1 of 1) before A (66 of 121) */
    nworst = sb_audit_worst_lines(a, 0, idx, 4);
    ck_assert_uint_eq(nworst, 2);
    ck_assert_str_eq(sb_audit_line(a, idx[0])->name, "B");
    ck_assert_str_eq(sb_audit_line(a, idx[1])->name, "A");
    /* 1a: only A has failures */
    ck_assert_uint_eq(sb_audit_worst_lines(a, 1, idx, 4), 1);
    sb_audit_free(a);
    sb_tvutable_free(t);
}
END_TEST

START_TEST(verdict_tolerance)
{
    /* the same failures pass when the allowed fraction covers them:
     * 12 of 121 (9.9 %) for 1a */
    struct sb_audit_config c;
    struct sb_tvutable *t = table();
    struct sb_audit *a;
    struct sb_error err;

    config(&c, 1);
    c.max_fail_frac = 0.10;
    ck_assert_int_eq(sb_audit_alloc(&c, t, &a, &err), SB_OK);
    for (int deg = -60; deg <= 60; deg++)
        sb_audit_add_sounding(a, "A", 1, 0, 0, 20.0, deg * DEG, NAN, NAN,
                              NULL, &err);
    sb_audit_finish(a, &err);
    ck_assert(!sb_audit_order(a, 0)->pass); /* 66/121 */
    ck_assert(sb_audit_order(a, 1)->pass);  /* 12/121 */
    sb_audit_free(a);
    sb_tvutable_free(t);
}
END_TEST

/* ---- crossline comparison ----------------------------------------------- */

/* A flat seafloor at 20 m; reference cells of 2 m over [0, 200) x [0, 200)
 * each given n_ref soundings with noise sd_ref; mainscheme soundings at
 * random places and angles with errors N(0, (scale * TVU95 / 1.96)^2) -- a
 * normal with the stated 95 % figure (1.96 sigma, IHO S-44 ed. 6 sec. 2)
 * when scale = 1. */
static struct sb_audit *comparison(double scale, int n_ref, double sd_ref,
                                   int n_main, struct sb_tvutable *t,
                                   unsigned long seed)
{
    struct sb_audit_config c;
    struct sb_audit *a;
    struct sb_error err;
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);

    gsl_rng_set(r, seed);
    config(&c, 0);
    c.cell_m = 2.0;
    ck_assert_int_eq(sb_audit_alloc(&c, t, &a, &err), SB_OK);
    for (int i = 0; i < 100; i++)
        for (int j = 0; j < 100; j++)
            for (int k = 0; k < n_ref; k++)
                ck_assert_int_eq(
                    sb_audit_add_reference(a, 2 * i + 1, 2 * j + 1,
                                           20 + gsl_ran_gaussian(r, sd_ref),
                                           &err),
                    SB_OK);
    ck_assert_int_eq(sb_audit_fix_reference(a, &err), SB_OK);
    for (int s = 0; s < n_main; s++) {
        double ang = (2 * gsl_rng_uniform(r) - 1) * 69.99 * DEG;
        double e = gsl_ran_gaussian(r, scale * tvu_of(ang) / 1.959964);

        ck_assert_int_eq(sb_audit_compare_sounding(a, 200 * gsl_rng_uniform(r),
                                                   200 * gsl_rng_uniform(r),
                                                   20 + e, ang, &err),
                         SB_OK);
    }
    /* one outside the reference */
    ck_assert_int_eq(sb_audit_compare_sounding(a, -50, 10, 20, 0, &err),
                     SB_OK);
    ck_assert_int_eq(sb_audit_finish(a, &err), SB_OK);
    gsl_rng_free(r);
    return a;
}

START_TEST(comparison_agrees_with_budget)
{
    struct sb_tvutable *t = table();
    struct sb_audit *a = comparison(1.0, 4, 0.0, 280000, t, 21);
    const struct sb_audit_totals *tot = sb_audit_totals(a);
    const struct sb_audit_order_result *o = sb_audit_order(a, 0);

    ck_assert_uint_eq(tot->cmp_candidates, 280001);
    ck_assert_uint_eq(tot->cmp_compared, 280000);
    ck_assert_uint_eq(tot->cmp_outside, 1);
    ck_assert(tot->cell_m == 2.0);
    ck_assert_uint_eq(tot->cells, 10000);
    /* every bin's interval (Bonferroni family-wise 95 %) holds 1 */
    ck_assert_uint_eq(tot->bins_enough, 28);
    for (int b = 0; b < sb_audit_n_bins(a); b++) {
        const struct sb_audit_bin_result *r = sb_audit_bin(a, b);

        ck_assert(r->enough);
        ck_assert_msg(r->ratio_lo <= 1 + SB_QHIST_RESOLUTION &&
                          r->ratio_hi >= 1 - SB_QHIST_RESOLUTION,
                      "bin %d: [%g, %g]", b, r->ratio_lo, r->ratio_hi);
        ck_assert(!r->exceeds && !r->below);
        ck_assert(fabs(r->diff_mean_m) < 0.01);
        ck_assert(r->u_ref_m == 0.0);
    }
    ck_assert_uint_eq(tot->bins_exceeding, 0);
    /* Special Order fail angle: 27.41 deg by the formula.  The a-priori
     * one is interpolated between bin centres (22.5, 27.5): the
     * interpolation of a quadratic between nodes 5 deg apart errs by at
     * most h^2 f''/8 / f' ~ 0.1 deg here; allow 0.5 deg. */
    ck_assert_int_eq(o->ap_stbd.kind, SB_AUDIT_ANGLE_CROSS);
    ck_assert_msg(fabs(o->ap_stbd.angle_rad / DEG - CROSS_DEG) < 0.5,
                  "a-priori %g", o->ap_stbd.angle_rad / DEG);
    ck_assert(fabs(o->ap_port.angle_rad / DEG - CROSS_DEG) < 0.5);
    /* the empirical one within a bin width of the a-priori one */
    ck_assert_int_eq(o->emp_stbd.kind, SB_AUDIT_ANGLE_CROSS);
    ck_assert(fabs(o->emp_stbd.angle_rad - o->ap_stbd.angle_rad) < 5 * DEG);
    ck_assert(fabs(o->emp_port.angle_rad - o->ap_port.angle_rad) < 5 * DEG);
    /* beyond 27.4 deg the empirical 95 % exceeds the limit: bins from
     * 30 deg outward on both sides, 8 per side, are over; [25, 30) holds
     * the crossing and may go either way */
    ck_assert(o->bins_over >= 16 && o->bins_over <= 18);
    ck_assert(!o->pass);
    sb_audit_free(a);
    sb_tvutable_free(t);
}
END_TEST

START_TEST(comparison_stats_match_gsl)
{
    /* mean, sd and the within-limit fraction of the differences in one bin
     * against GSL on the same values (regenerated with the same seed) */
    struct sb_tvutable *t = table();
    struct sb_audit *a = comparison(1.0, 4, 0.0, 20000, t, 5);
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    static double d[20000];
    size_t n = 0, within = 0;
    const struct sb_audit_bin_result *bin = sb_audit_bin(a, 14); /* [0,5) */

    /* replay the draws of comparison(): reference first, then soundings */
    gsl_rng_set(r, 5);
    for (int i = 0; i < 100 * 100 * 4; i++)
        gsl_ran_gaussian(r, 0.0);
    for (int s = 0; s < 20000; s++) {
        double ang = (2 * gsl_rng_uniform(r) - 1) * 69.99 * DEG;
        double e = gsl_ran_gaussian(r, tvu_of(ang) / 1.959964);

        gsl_rng_uniform(r);
        gsl_rng_uniform(r);
        if (ang >= 0 && ang < 5 * DEG) {
            d[n++] = e;
            /* the limit at the sounding's own depth 20 + e (S-44) */
            within += fabs(e) <= sqrt(0.0625 + pow(0.0075 * (20 + e), 2));
        }
    }
    ck_assert_uint_eq(bin->n_cmp, n);
    ck_assert(fabs(bin->diff_mean_m - gsl_stats_mean(d, 1, n)) < 1e-9);
    ck_assert(fabs(bin->diff_sd_m - gsl_stats_sd(d, 1, n)) < 1e-9);
    ck_assert(fabs(bin->within[0] - (double)within / n) < 1e-12);
    gsl_rng_free(r);
    sb_audit_free(a);
    sb_tvutable_free(t);
}
END_TEST

START_TEST(comparison_removes_reference_noise)
{
    /* reference soundings with sd 0.1 m, 3 per cell: the cell means carry
     * 0.1 / sqrt(3) = 0.0577 m; without the correction the nadir bin's
     * ratio would be sqrt(1 + (1.96 * 0.0577 / 0.2)^2) = 1.120 */
    struct sb_tvutable *t = table();
    struct sb_audit *a = comparison(1.0, 3, 0.1, 280000, t, 8);

    for (int b = 0; b < sb_audit_n_bins(a); b++) {
        const struct sb_audit_bin_result *r = sb_audit_bin(a, b);

        ck_assert_msg(r->ratio_lo <= 1.02 && r->ratio_hi >= 0.98,
                      "bin %d: [%g, %g]", b, r->ratio_lo, r->ratio_hi);
        ck_assert(r->q95_m < r->q95_raw_m);
    }
    /* the rms reference uncertainty is about 0.0577 m (sd estimated from
     * 3 values per cell: E[s^2] = sigma^2, so the rms is unbiased) */
    ck_assert(fabs(sb_audit_bin(a, 14)->u_ref_m - 0.0577) < 0.003);
    sb_audit_free(a);
    sb_tvutable_free(t);
}
END_TEST

START_TEST(comparison_reports_excess)
{
    /* errors 30 % larger than the budget: every bin flags the excess */
    struct sb_tvutable *t = table();
    struct sb_audit *a = comparison(1.3, 4, 0.0, 280000, t, 9);

    ck_assert_uint_eq(sb_audit_totals(a)->bins_exceeding, 28);
    for (int b = 0; b < sb_audit_n_bins(a); b++)
        ck_assert(fabs(sb_audit_bin(a, b)->ratio - 1.3) < 0.05);
    /* and the empirical fail angle moves inward: 0.2 * 1.3 (1 + 2 t^2) =
     * 0.29155 at t = 0.2266 rad = 12.98 deg */
    ck_assert(fabs(sb_audit_order(a, 0)->emp_stbd.angle_rad / DEG - 12.98) <
              5);
    ck_assert(sb_audit_order(a, 0)->emp_stbd.angle_rad <
              sb_audit_order(a, 0)->ap_stbd.angle_rad - 5 * DEG);
    sb_audit_free(a);
    sb_tvutable_free(t);
}
END_TEST

/* ---- reconciliation ------------------------------------------------------- */

static int listed[SB_AUDIT_NREASONS];
static char first_msg[1024];
static void on_bad(void *ctx, int reason, const struct sb_error *e)
{
    (void)ctx;
    listed[reason]++;
    if (!first_msg[0])
        sb_error_format(e, first_msg, sizeof first_msg);
}

START_TEST(reconciliation_every_bad_row)
{
    /* tests/bad/csv/every-bad-row.csv, counted by hand from the file:
     *   good rows at lines 2, 3, 16 (tpu_v empty: not carried), 20, 21;
     *   unparsable: 4 (abc), 10 (8 fields), 11 (text after a quote),
     *     12 (5.0.0), 17 (line name of 70 characters), 22 (open quote);
     *   non_finite: 5 (nan), 6 (inf), 7 (1e999);
     *   missing_column: 8 (empty y), 9 (4 fields), 18 (empty line name);
     *   out_of_range: 13 (95 deg), 14 (0.5 m, above the table's 1 m),
     *     15 (negative TVU).
     * Line 19 is blank: not a row. */
    struct sb_audit_config c;
    struct sb_tvutable *t = table();
    struct sb_audit *a;
    struct sb_error err;
    struct sb_audit_columns cols;
    struct sb_csv_options copt = {',', '.', 0};
    struct sb_audit_hooks hooks = {NULL, on_bad, 100, NULL, NULL};
    const struct sb_audit_totals *tot;

    config(&c, 0);
    ck_assert_int_eq(sb_audit_columns_parse("line=Line,x=Easting,y=Northing,"
                                            "z=Depth,angle=BeamAngle,"
                                            "tpu_v=TVU,tpu_h=THU",
                                            &cols, &err),
                     SB_OK);
    ck_assert_int_eq(sb_audit_alloc(&c, t, &a, &err), SB_OK);
    memset(listed, 0, sizeof listed);
    first_msg[0] = '\0';
    ck_assert_int_eq(sb_audit_scan(a, src("tests/bad/csv/every-bad-row.csv"),
                                   &copt, &cols, &hooks, &err),
                     SB_OK);
    tot = sb_audit_totals(a);
    ck_assert_uint_eq(tot->rows_read, 20);
    ck_assert_uint_eq(tot->rows_used, 5);
    ck_assert_uint_eq(tot->rows_rejected, 15);
    ck_assert_uint_eq(tot->rows_read, tot->rows_used + tot->rows_rejected);
    ck_assert_uint_eq(tot->reason[SB_AUDIT_UNPARSABLE], 6);
    ck_assert_uint_eq(tot->reason[SB_AUDIT_NONFINITE], 3);
    ck_assert_uint_eq(tot->reason[SB_AUDIT_MISSING], 3);
    ck_assert_uint_eq(tot->reason[SB_AUDIT_OUT_OF_RANGE], 3);
    ck_assert_uint_eq(tot->rows_with_tpu_v, 4);
    ck_assert_uint_eq(tot->rows_with_tpu_h, 5);
    /* every rejected row was handed out, the first at line 4 */
    ck_assert_int_eq(listed[SB_AUDIT_UNPARSABLE] + listed[SB_AUDIT_NONFINITE] +
                         listed[SB_AUDIT_MISSING] +
                         listed[SB_AUDIT_OUT_OF_RANGE],
                     15);
    ck_assert_msg(strstr(first_msg, "every-bad-row.csv:4:") != NULL, "%s",
                  first_msg);
    sb_audit_free(a);

    /* a listing limit stops the listing, not the counting */
    ck_assert_int_eq(sb_audit_alloc(&c, t, &a, &err), SB_OK);
    memset(listed, 0, sizeof listed);
    hooks.list_max = 2;
    ck_assert_int_eq(sb_audit_scan(a, src("tests/bad/csv/every-bad-row.csv"),
                                   &copt, &cols, &hooks, &err),
                     SB_OK);
    ck_assert_int_eq(listed[SB_AUDIT_UNPARSABLE] + listed[SB_AUDIT_NONFINITE],
                     2);
    ck_assert_uint_eq(sb_audit_totals(a)->rows_rejected, 15);
    sb_audit_free(a);
    sb_tvutable_free(t);
}
END_TEST

START_TEST(bad_files)
{
    struct sb_audit_config c;
    struct sb_tvutable *t = table();
    struct sb_audit *a;
    struct sb_error err;
    struct sb_audit_columns cols;

    config(&c, 0);
    sb_audit_columns_parse("line=Line,x=Easting,y=Northing,z=Depth,"
                           "angle=BeamAngle",
                           &cols, &err);
    ck_assert_int_eq(sb_audit_alloc(&c, t, &a, &err), SB_OK);
    ck_assert_int_eq(sb_audit_scan(a,
                                   src("tests/bad/csv/header-missing-column.csv"),
                                   NULL, &cols, NULL, &err),
                     SB_EINPUT);
    ck_assert_int_eq(err.line, 1);
    ck_assert_ptr_nonnull(strstr(err.msg, "BeamAngle"));
    sb_audit_free(a);
    ck_assert_int_eq(sb_audit_alloc(&c, t, &a, &err), SB_OK);
    ck_assert_int_eq(sb_audit_scan(a,
                                   src("tests/bad/csv/no-usable-row.csv"),
                                   NULL, &cols, NULL, &err),
                     SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "no usable sounding"));
    ck_assert_uint_eq(sb_audit_totals(a)->rows_rejected, 2);
    sb_audit_free(a);
    ck_assert_int_eq(sb_audit_alloc(&c, t, &a, &err), SB_OK);
    ck_assert_int_eq(sb_audit_scan(a, src("tests/bad/csv/empty.csv"),
                                   NULL, &cols, NULL, &err),
                     SB_EINPUT);
    /* a comparison without any reference */
    ck_assert_int_eq(sb_audit_fix_reference(a, &err), SB_EINPUT);
    sb_audit_free(a);
    sb_tvutable_free(t);
}
END_TEST

START_TEST(bad_config)
{
    struct sb_audit_config c;
    struct sb_tvutable *t = table();
    struct sb_audit *a = NULL;
    struct sb_error err;

    config(&c, 0);
    c.n_orders = 0;
    ck_assert_int_eq(sb_audit_alloc(&c, t, &a, &err), SB_EINPUT);
    config(&c, 0);
    c.bin_width_rad = 0;
    ck_assert_int_eq(sb_audit_alloc(&c, t, &a, &err), SB_EINPUT);
    config(&c, 0);
    c.min_ref = 1;
    ck_assert_int_eq(sb_audit_alloc(&c, t, &a, &err), SB_EINPUT);
    config(&c, 0);
    c.cell_m = -1;
    ck_assert_int_eq(sb_audit_alloc(&c, t, &a, &err), SB_EINPUT);
    ck_assert_ptr_null(a);
    sb_tvutable_free(t);
}
END_TEST


/* ---- end to end: simulate, then audit ----------------------------------- */

/* An invented flat area at 100 m (flat, so that the differences hold only
 * the sounding errors, not the relief inside a cell). */
static const char AREA[] =
    "name: e2e-flat\n"
    "order: 1a\n"
    "outline:\n"
    "  rectangle: {centre: [1000 m, 2000 m], length: 800 m, width: 500 m,\n"
    "              azimuth: 0 deg}\n"
    "depth: 100 m\n"
    "survey:\n"
    "  overlap: 10 %\n"
    "  speed: 3 m/s\n"
    "  turn_time: 5 min\n"
    "  working_day: 10 h\n";

static const char *const CROSS[] = {"X01", "X02", "X03", "X04", "X05"};

/* Every stated uncertainty of the system times f (a better-specified
 * system for f < 1). */
static void scale_system(struct sb_system *s, double f)
{
    struct sb_stated *all[] = {
        &s->positioning.horizontal, &s->positioning.vertical,
        &s->positioning.latency, &s->motion.roll, &s->motion.pitch,
        &s->motion.heading, &s->motion.heave, &s->motion.heave_fraction,
        &s->motion.latency, &s->motion.align_roll, &s->motion.align_pitch,
        &s->motion.align_heading, &s->sound_speed.surface_u,
        &s->sound_speed.column_u, &s->echosounder.range_resolution,
        &s->echosounder.pointing, &s->vertical.draft_u, &s->vertical.squat_u,
        &s->vertical.loading_u, &s->vertical.water_level,
        &s->vertical.zoning, &s->vertical.separation};

    for (size_t i = 0; i < sizeof all / sizeof all[0]; i++)
        all[i]->u *= f;
    for (int i = 0; i < 3; i++) {
        s->antenna.u[i].u *= f;
        s->transducer.u[i].u *= f;
        s->motion_sensor.u[i].u *= f;
    }
}

/* Audit `path` with system sys (crosslines X01..X05, Special Order). */
static struct sb_audit *audit_file(const struct sb_system *sys,
                                   const struct sb_horiz95 *h95,
                                   const char *path,
                                   struct sb_tvu_engine *eng,
                                   struct sb_tvutable **tab)
{
    struct sb_tvutable_opts to;
    struct sb_audit_config c;
    struct sb_audit_columns cols;
    struct sb_audit *a;
    struct sb_error err;

    eng->sys = sys;
    eng->h95 = h95;
    eng->thu_rule = SB_THU_EXACT;
    to.depth_min_m = sb_tvu_engine_depth_min(sys);
    to.angle_max_rad = sys->echosounder.max_angle;
    to.tol_rel = 1e-3;
    ck_assert_int_eq(sb_tvutable_alloc(&to, sb_tvu_engine, eng, tab, &err),
                     SB_OK);
    config(&c, 0);
    c.angle_max_rad = sys->echosounder.max_angle;
    for (int i = 0; i < 5; i++)
        c.crosslines[i] = CROSS[i];
    c.n_crosslines = 5;
    ck_assert_int_eq(sb_audit_columns_parse("line=line,x=easting_m,"
                                            "y=northing_m,z=depth_m,"
                                            "angle=beam_angle_deg",
                                            &cols, &err),
                     SB_OK);
    ck_assert_int_eq(sb_audit_alloc(&c, *tab, &a, &err), SB_OK);
    ck_assert_msg(sb_audit_scan(a, path, NULL, &cols, NULL, &err) == SB_OK,
                  "%s", err.msg);
    ck_assert_msg(sb_audit_compare(a, path, NULL, &cols, NULL, &err) == SB_OK,
                  "%s", err.msg);
    ck_assert_int_eq(sb_audit_finish(a, &err), SB_OK);
    return a;
}

static void free_audit(struct sb_audit *a, struct sb_tvutable *t)
{
    sb_audit_free(a);
    sb_tvutable_free(t);
}

/* Margin for the empirical fail angle on one side: the half-width of the
 * ratio's interval in the two bins around the a-priori crossing, turned
 * into an angle by the slope of the a-priori ratio-to-limit between their
 * centres, plus half a degree for the interpolation between bin centres
 * (test derivation in docs/audit.md, "How the audit is tested"). */
static double angle_margin(const struct sb_audit *a, int side, double ap)
{
    int ns = sb_audit_n_bins(a) / 2;
    double w = sb_audit_config(a)->bin_width_rad;
    int k = (int)floor(ap / w - 0.5); /* centre of bin k <= ap */
    const struct sb_audit_bin_result *b0, *b1;
    double half, slope;

    if (k < 0)
        k = 0;
    if (k + 1 >= ns)
        k = ns - 2;
    b0 = sb_audit_bin(a, side > 0 ? ns + k : ns - 1 - k);
    b1 = sb_audit_bin(a, side > 0 ? ns + k + 1 : ns - 2 - k);
    half = fmax(fmax(b0->ratio_hi - b0->ratio, b0->ratio - b0->ratio_lo),
                fmax(b1->ratio_hi - b1->ratio, b1->ratio - b1->ratio_lo));
    /* the empirical ratio-to-limit is ratio x (a-priori / limit): its
     * interval scales by the a-priori ratio-to-limit, about 1 there */
    slope = (b1->ap_limit[0] - b0->ap_limit[0]) / w;
    ck_assert(slope > 0);
    return half / slope + 0.5 * DEG;
}

START_TEST(end_to_end)
{
    char path[] = "/tmp/sb_audit_e2e_XXXXXX";
    struct sb_system *sys = sb_system_alloc(), *better = sb_system_alloc();
    struct sb_area *area = sb_area_alloc();
    struct sb_horiz95 *h95;
    struct sb_simulate_opts so;
    struct sb_simulate_stats st;
    struct sb_audit *a;
    struct sb_tvutable *t;
    struct sb_tvu_engine eng;
    struct sb_error err;
    const struct sb_audit_totals *tot;
    const struct sb_audit_order_result *o;
    FILE *f;
    int fd, enough = 0;

    ck_assert_int_eq(sb_spec_load(src("profiles/systems/kestrel-deep.yaml"),
                                  sys, &err),
                     SB_OK);
    ck_assert_int_eq(sb_area_load_string("e2e-area", AREA, sizeof AREA - 1,
                                         area, &err),
                     SB_OK);
    h95 = sb_horiz95_alloc(&err);
    ck_assert_ptr_nonnull(h95);
    sb_simulate_opts_default(&so);
    so.seed = 7;
    /* the line layout for Order 1a (the deep-water system cannot keep
     * Special Order's sounding density at 100 m, so `compare` lays no
     * lines for it); the audit below is against Special Order, whose TVU
     * limit it crosses inside the swath */
    so.order = sb_standard_order(sb_standard_builtin("s44-6"), "1a");
    so.ping_spacing_m = 2;
    so.beams = 201;
    so.n_crosslines = 5;
    so.relief = SB_RELIEF_NONE;
    fd = mkstemp(path);
    ck_assert(fd >= 0);
    f = fdopen(fd, "w");
    ck_assert_msg(sb_simulate(sys, h95, area, &so, f, &st, &err) == SB_OK,
                  "%s", err.msg);
    ck_assert_int_eq(fclose(f), 0);
    ck_assert(st.soundings > 100000);

    /* 1. the same system: the budget holds */
    a = audit_file(sys, h95, path, &eng, &t);
    tot = sb_audit_totals(a);
    ck_assert_uint_eq(tot->rows_read, st.soundings);
    ck_assert_uint_eq(tot->rows_used, st.soundings);
    ck_assert_uint_eq(tot->cmp_candidates,
                      tot->cmp_compared + tot->cmp_outside);
    /* Per bin, the corrected empirical 95 % point of |d| / TVU95 must be 1
     * within: its distribution-free interval (binomial, Bonferroni over the
     * bins, family-wise 95 %), with the reference's own uncertainty removed
     * in quadrature; plus the histogram's resolution (0.8 %) and the
     * table's bound (0.1 %); plus 2 % for the non-linearity of the forward
     * model over the spread of the errors (the draws go through the full
     * model, the budget is its linearisation) -- a stated allowance. */
    for (int b = 0; b < sb_audit_n_bins(a); b++) {
        const struct sb_audit_bin_result *r = sb_audit_bin(a, b);
        double tol = SB_QHIST_RESOLUTION + tot->table_bound + 0.02;

        if (!r->enough)
            continue;
        enough++;
        ck_assert_msg(r->ratio_lo <= 1 + tol && r->ratio_hi >= 1 - tol,
                      "bin %g..%g deg: ratio %g [%g, %g]", r->from_rad / DEG,
                      r->to_rad / DEG, r->ratio, r->ratio_lo, r->ratio_hi);
    }
    ck_assert_int_ge(enough, 24);
    /* the fail angles (Special Order crosses near 53 deg at 100 m) */
    o = sb_audit_order(a, 0);
    ck_assert_int_eq(o->ap_port.kind, SB_AUDIT_ANGLE_CROSS);
    ck_assert_int_eq(o->ap_stbd.kind, SB_AUDIT_ANGLE_CROSS);
    ck_assert_int_eq(o->emp_port.kind, SB_AUDIT_ANGLE_CROSS);
    ck_assert_int_eq(o->emp_stbd.kind, SB_AUDIT_ANGLE_CROSS);
    ck_assert_msg(fabs(o->emp_port.angle_rad - o->ap_port.angle_rad) <=
                      angle_margin(a, -1, o->ap_port.angle_rad),
                  "port %g vs %g deg", o->emp_port.angle_rad / DEG,
                  o->ap_port.angle_rad / DEG);
    ck_assert_msg(fabs(o->emp_stbd.angle_rad - o->ap_stbd.angle_rad) <=
                      angle_margin(a, 1, o->ap_stbd.angle_rad),
                  "starboard %g vs %g deg", o->emp_stbd.angle_rad / DEG,
                  o->ap_stbd.angle_rad / DEG);
    free_audit(a, t);

    /* 2. audited with a better-specified system (every stated uncertainty
     * x 0.6): the budget is linear in the u's, so with every component
     * scaled its TVU95 would be 0.6 of the true one and the data would
     * scatter 1 / 0.6 = 1.67 times more than it claims.  The spread of the
     * system's sound-speed casts is a component derived from the casts,
     * not a stated figure, and stays as it was, so the ratio is somewhat
     * less where refraction matters; above 1.2 everywhere all the same,
     * and every bin must report the excess. */
    *better = *sys; /* a shallow copy: it borrows sys's casts */
    scale_system(better, 0.6);
    a = audit_file(better, h95, path, &eng, &t);
    tot = sb_audit_totals(a);
    ck_assert_uint_eq(tot->bins_exceeding, tot->bins_enough);
    ck_assert_int_ge((int)tot->bins_enough, 24);
    for (int b = 0; b < sb_audit_n_bins(a); b++) {
        const struct sb_audit_bin_result *r = sb_audit_bin(a, b);

        if (r->enough)
            ck_assert_msg(r->exceeds && r->ratio > 1.2, "bin %d ratio %g", b,
                          r->ratio);
    }
    /* and the a-priori swath of the better system reaches further than the
     * data support */
    o = sb_audit_order(a, 0);
    ck_assert(o->ap_stbd.angle_rad > o->emp_stbd.angle_rad + 2 * DEG);
    free_audit(a, t);

    unlink(path);
    sb_horiz95_free(h95);
    sb_area_free(area);
    sb_system_free(sys);
    free(better); /* not sb_system_free: its casts are sys's, freed above */
}
END_TEST

static Suite *suite(void)
{
    Suite *s = suite_create("audit");
    TCase *tc = tcase_create("core");

    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, qhist_matches_sorted_order_statistic);
    tcase_add_test(tc, qhist_ci_covers);
    tcase_add_test(tc, columns);
    tcase_add_test(tc, apriori_counts);
    tcase_add_test(tc, verdict_tolerance);
    tcase_add_test(tc, comparison_agrees_with_budget);
    tcase_add_test(tc, comparison_stats_match_gsl);
    tcase_add_test(tc, comparison_removes_reference_noise);
    tcase_add_test(tc, comparison_reports_excess);
    tcase_add_test(tc, reconciliation_every_bad_row);
    tcase_add_test(tc, bad_files);
    tcase_add_test(tc, bad_config);
    suite_add_tcase(s, tc);
    tc = tcase_create("end_to_end");
    tcase_set_timeout(tc, 900);
    tcase_add_test(tc, end_to_end);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(suite());
    int failed;

    gsl_set_error_handler_off();
    srunner_run_all(sr, CK_NORMAL);
    failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed ? EXIT_FAILURE : EXIT_SUCCESS;
}
