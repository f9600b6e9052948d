/*
 * swathbudget audit — check a finished survey's soundings against a
 * system's a-priori uncertainty and a standard's orders, compare them with
 * crosslines, and account for every row read.
 *
 *   swathbudget audit SYSTEM.yaml SOUNDINGS.csv --columns SPEC
 *        [--standard ID|FILE] [--order ID[,ID...]]
 *        [--crosslines L[,L...] | --reference FILE] [--cell SIZE]
 *        [--nadir DEG] [--min-ref N] [--bin DEG] [--min-bin N]
 *        [--delimiter C] [--decimal C] [--tpu-type 95%|sd]
 *        [--max-fail PCT] [--list-bad N] [--failures FILE.csv]
 *        [--thu-rule exact|s44] [--strict] [--quiet]
 *        [--format table|csv|json]
 */
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cli.h"
#include "commands.h"
#include "swathbudget/audit.h"
#include "swathbudget/csvread.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/orders.h"
#include "swathbudget/propagate.h"
#include "swathbudget/spec.h"
#include "swathbudget/system.h"
#include "swathbudget/tvutable.h"
#include "swathbudget/writer.h"

#define CMD "audit"
#define PI 3.14159265358979323846
#define DEG (PI / 180.0)
#define JSON_DIGITS 8
#define WORST_LINES 5
#define LIST_BAD_DEFAULT 20

void cmd_audit_help(FILE *f)
{
    fprintf(f,
            "usage: swathbudget audit SYSTEM.yaml SOUNDINGS.csv --columns "
            "SPEC\n"
            "         [--standard ID|FILE] [--order ID[,ID...]]\n"
            "         [--crosslines L[,L...] | --reference FILE] [--cell "
            "SIZE]\n"
            "         [--nadir DEG] [--min-ref N] [--bin DEG] [--min-bin N]\n"
            "         [--delimiter C] [--decimal C] [--tpu-type 95%%|sd]\n"
            "         [--max-fail PCT] [--list-bad N] [--failures "
            "FILE.csv]\n"
            "         [--thu-rule exact|s44] [--strict] [--quiet] "
            "[--format table|csv|json]\n\n"
            "Audit a finished survey.  For every sounding: the system's "
            "a-priori TVU95 and\nTHU95 at its depth and beam angle against "
            "each order's limits, and any\nuncertainty the data carry "
            "(tpu_v, tpu_h) against them too.  With crosslines\nor a "
            "reference file: a reference surface from near-nadir "
            "soundings, and per\nbeam-angle bin the spread of the "
            "mainscheme soundings about it, its\nempirical 95%% point "
            "beside the a-priori TVU95, and the empirical fail\nangle "
            "beside the a-priori one.  Every row read is accounted for: "
            "used, or\nrejected with a reason.  Details: docs/audit.md.\n\n"
            "options:\n"
            "  --columns SPEC      header names: line=..,x=..,y=..,z=..,"
            "angle=..\n"
            "                      [,tpu_v=..][,tpu_h=..] (x, y easting "
            "and northing in m;\n"
            "                      z depth below datum in m, down; angle in "
            "deg, port < 0)\n"
            "  --standard ID|FILE  compiled-in standard (default %s) or a "
            "YAML file\n"
            "  --order ID[,ID...]  orders to audit (default: all of the "
            "standard's)\n"
            "  --crosslines L,...  lines whose near-nadir soundings form the "
            "reference\n"
            "  --reference FILE    or a CSV of reference soundings (columns "
            "x, y, z;\n"
            "                      angle too if present)\n"
            "  --cell SIZE         reference cell side in m (default: 5%% "
            "of the median\n"
            "                      reference depth, a power of two, 0.5 to "
            "512 m)\n"
            "  --nadir DEG         near-nadir: |angle| <= DEG (default 10)\n"
            "  --min-ref N         reference soundings a cell needs "
            "(default 3)\n"
            "  --bin DEG           beam-angle bin width (default 5)\n"
            "  --min-bin N         soundings a bin needs for its statistics "
            "(default 50)\n"
            "  --delimiter C       ',', ';', 'tab' or 'space' (default: "
            "detected)\n"
            "  --decimal C         '.' or ',' (default: detected)\n"
            "  --tpu-type T        tpu_v/tpu_h are 95%% figures (default) "
            "or sd\n"
            "  --max-fail PCT      verdict: percent of soundings allowed to "
            "fail (default 0)\n"
            "  --list-bad N        bad rows listed on stderr (default %d)\n"
            "  --failures FILE     write every failing sounding and why "
            "(CSV)\n"
            "  --thu-rule R        exact (default) or s44 THU95\n"
            "  --strict            exit 1 when an order's verdict is FAIL\n"
            "  --quiet             no progress line\n"
            "  --format F          table (default), csv or json\n"
            "  -h, --help          this text\n\n"
            "Exit status: 0 done (whatever the verdict, unless --strict), 1 "
            "a failed\nverdict with --strict or a failure of the program, 2 "
            "bad input.\n\n"
            "An a-priori estimate and a crossline comparison are not proof "
            "of a survey's\nquality: defer to the hydrographic authority's "
            "specifications, local\nregulations and licensed practice.\n",
            SB_STANDARD_DEFAULT_ID, LIST_BAD_DEFAULT);
}

/* ---- hooks ---------------------------------------------------------------- */

struct run {
    int quiet, tty;
    int progress_shown;
    size_t listed, list_max;
    FILE *failures;         /* --failures stream, or NULL */
    int write_failed;
};

static void on_bad_row(void *ctx, int reason, const struct sb_error *e)
{
    struct run *r = ctx;
    char buf[SB_ERROR_FILE_MAX + SB_ERROR_MSG_MAX + 64];

    (void)reason;
    if (r->progress_shown) {
        fputs("\r\033[K", stderr);
        r->progress_shown = 0;
    }
    sb_error_format(e, buf, sizeof buf);
    for (char *p = buf; *p; p++)
        if (*p == '\n' || *p == '\r')
            *p = ' ';
    fprintf(stderr, "%s\n", buf);
    r->listed++;
}

static void on_progress(void *ctx, int pass, uint64_t rows)
{
    static const char *const names[] = {"", "a-priori", "reference",
                                        "comparison"};
    struct run *r = ctx;

    if (r->quiet || !r->tty)
        return;
    fprintf(stderr, "\rswathbudget audit: %s pass: %.1f million rows",
            names[pass], rows / 1e6);
    fflush(stderr);
    r->progress_shown = 1;
}

static void failure_text(unsigned what, char *buf, size_t n)
{
    static const char *const names[] = {"tvu", "thu", "data_tvu",
                                        "data_thu"};
    size_t used = 0;

    buf[0] = '\0';
    for (int k = 0; k < 4; k++)
        if (what & (1u << k)) {
            int w = snprintf(buf + used, n - used, "%s%s", used ? "+" : "",
                             names[k]);
            if (w < 0 || (size_t)w >= n - used)
                break;
            used += (size_t)w;
        }
}

static int on_failure(void *ctx, const struct sb_audit_failure *f)
{
    struct run *r = ctx;
    char why[64];

    if (!r->failures)
        return SB_OK;
    failure_text(f->what, why, sizeof why);
    if (fprintf(r->failures, "%ld,%.*s,%.3f,%.3f,%.3f,%.3f,%s,%s,%.4f,%.4f,"
                             "%.4f,%.4f,",
                f->file_line, (int)f->line_len, f->line, f->x_m, f->y_m,
                f->z_m, f->angle_rad / DEG, f->order->id, why, f->tvu95_m,
                f->tvu_limit_m, f->thu95_m, f->thu_limit_m) < 0)
        r->write_failed = 1;
    if (!isnan(f->tpu_v95_m))
        fprintf(r->failures, "%.4f", f->tpu_v95_m);
    fputc(',', r->failures);
    if (!isnan(f->tpu_h95_m))
        fprintf(r->failures, "%.4f", f->tpu_h95_m);
    if (fputc('\n', r->failures) == EOF)
        r->write_failed = 1;
    return r->write_failed ? SB_EIO : SB_OK;
}

/* ---- output ---------------------------------------------------------------- */

static double pct(uint64_t a, uint64_t b)
{
    return b ? 100.0 * (double)a / (double)b : 0.0;
}

/* A fail angle as text for the table. */
static void angle_text(const struct sb_audit_fail_angle *a, char *buf,
                       size_t n)
{
    switch (a->kind) {
    case SB_AUDIT_ANGLE_CROSS: snprintf(buf, n, "%.1f", a->angle_rad / DEG);
        break;
    case SB_AUDIT_ANGLE_NADIR: snprintf(buf, n, "fails at nadir"); break;
    case SB_AUDIT_ANGLE_BEYOND:
        snprintf(buf, n, "> %.1f", a->angle_rad / DEG);
        break;
    default: snprintf(buf, n, "no data"); break;
    }
}

struct cols {
    struct sb_table_col c[64];
    char title[64][48];
    char key[64][48];
    size_t n;
};

static void col(struct cols *c, const char *title, const char *key, int prec)
{
    snprintf(c->title[c->n], sizeof c->title[0], "%s", title);
    snprintf(c->key[c->n], sizeof c->key[0], "%s", key);
    c->c[c->n].title = c->title[c->n];
    c->c[c->n].key = c->key[c->n];
    c->c[c->n].precision = prec;
    c->n++;
}

static const char *label_csv(const char *s)
{
    while (*s == ' ')
        s++;
    return s;
}

static int emit(struct sb_table *t, const char *section, enum sb_format fmt,
                struct sb_error *err)
{
    int rc;

    if (fmt == SB_FORMAT_CSV)
        printf("# %s\n", section);
    else
        printf("%s\n", section);
    rc = sb_table_write(t, stdout, fmt, err);
    printf("\n");
    sb_table_free(t);
    return rc;
}

/* Shorthand: stop adding cells at the first failure. */
#define NUM(t, v) (rc = rc ? rc : sb_table_num((t), (v)))
#define STR(t, s) (rc = rc ? rc : sb_table_str((t), (s)))
/* A row label: indented under its parent in a table, plain in CSV. */
#define LABEL(t, s) STR((t), fmt == SB_FORMAT_CSV ? label_csv(s) : (s))
#define NUM_OR(t, v)                                                          \
    (rc = rc ? rc : (isfinite(v) ? sb_table_num((t), (v))                    \
                                 : sb_table_empty((t), "-")))

static int write_tables(const struct sb_audit *a, const struct sb_system *sys,
                        const char *path, const struct sb_standard *std,
                        enum sb_format fmt)
{
    const struct sb_audit_totals *tot = sb_audit_totals(a);
    const struct sb_audit_config *cfg = sb_audit_config(a);
    int no = sb_audit_n_orders(a), nb = sb_audit_n_bins(a), rc = SB_OK;
    struct sb_error err;
    struct sb_table *t;
    struct cols c;
    char buf[64];

    sb_error_clear(&err);
    if (fmt == SB_FORMAT_TABLE)
        printf("Audit of %s\nsystem: %s (%s)\nstandard: %s (%s)\n"
               "uncertainty table: interpolation error <= %.3g %% "
               "(relative)\n\n",
               path, sys->name, sys->title, std->title, std->id,
               100 * tot->table_bound);

    /* reconciliation */
    c.n = 0;
    col(&c, "rows", "rows", 0);
    col(&c, "count", "count", 0);
    t = sb_table_alloc(c.c, c.n);
    if (!t)
        return SB_ENOMEM;
    LABEL(t, "read");
    NUM(t, (double)tot->rows_read);
    LABEL(t, "used");
    NUM(t, (double)tot->rows_used);
    LABEL(t, "rejected");
    NUM(t, (double)tot->rows_rejected);
    for (int r = 0; r < SB_AUDIT_OUTSIDE_GRID; r++) {
        snprintf(buf, sizeof buf, "  %s", sb_audit_reason_name(r));
        LABEL(t, buf);
        NUM(t, (double)tot->reason[r]);
    }
    LABEL(t, "carrying tpu_v");
    NUM(t, (double)tot->rows_with_tpu_v);
    LABEL(t, "carrying tpu_h");
    NUM(t, (double)tot->rows_with_tpu_h);
    if (tot->ref_rows_read) {
        LABEL(t, "reference file read");
        NUM(t, (double)tot->ref_rows_read);
        LABEL(t, "reference file used");
        NUM(t, (double)tot->ref_rows_used);
        LABEL(t, "reference file rejected");
        NUM(t, (double)tot->ref_rows_rejected);
    }
    if (tot->compared) {
        LABEL(t, "mainscheme soundings to compare");
        NUM(t, (double)tot->cmp_candidates);
        LABEL(t, "  compared");
        NUM(t, (double)tot->cmp_compared);
        LABEL(t, "  outside_grid");
        NUM(t, (double)tot->cmp_outside);
    }
    if (rc || (rc = emit(t, "Reconciliation (read = used + rejected)", fmt,
                         &err)))
        return rc;

    /* a-priori per order */
    c.n = 0;
    col(&c, "order", "order", 0);
    col(&c, "soundings", "soundings", 0);
    col(&c, "TVU fail", "fail_tvu", 0);
    col(&c, "THU fail", "fail_thu", 0);
    col(&c, "a-priori fail (%)", "fail_apriori_pct", 2);
    col(&c, "with tpu_v", "data_tvu", 0);
    col(&c, "tpu_v fail", "data_fail_tvu", 0);
    col(&c, "with tpu_h", "data_thu", 0);
    col(&c, "tpu_h fail", "data_fail_thu", 0);
    col(&c, "borderline", "borderline", 0);
    col(&c, "failing (%)", "failing_pct", 2);
    t = sb_table_alloc(c.c, c.n);
    if (!t)
        return SB_ENOMEM;
    for (int k = 0; k < no; k++) {
        const struct sb_audit_order_result *o = sb_audit_order(a, k);

        STR(t, o->order->id);
        NUM(t, (double)o->checked);
        NUM(t, (double)o->fail_tvu);
        NUM(t, (double)o->fail_thu);
        NUM(t, pct(o->fail_any, o->checked));
        NUM(t, (double)o->data_v);
        NUM(t, (double)o->data_fail_v);
        NUM(t, (double)o->data_h);
        NUM(t, (double)o->data_fail_h);
        NUM(t, (double)o->borderline);
        NUM(t, pct(o->fail_sounding, o->checked));
    }
    if (rc || (rc = emit(t, "A-priori compliance per order", fmt, &err)))
        return rc;

    /* a-priori per angle bin */
    c.n = 0;
    col(&c, "from (deg)", "from_deg", 0);
    col(&c, "to (deg)", "to_deg", 0);
    col(&c, "soundings", "soundings", 0);
    col(&c, "TVU95 mean (m)", "tvu95_mean_m", 3);
    col(&c, "THU95 mean (m)", "thu95_mean_m", 3);
    for (int k = 0; k < no && c.n < 60; k++) {
        char ti[48], ke[48];

        snprintf(ti, sizeof ti, "fail %s (%%)", cfg->orders[k]->id);
        snprintf(ke, sizeof ke, "fail_%s_pct", cfg->orders[k]->id);
        col(&c, ti, ke, 1);
    }
    t = sb_table_alloc(c.c, c.n);
    if (!t)
        return SB_ENOMEM;
    for (int b = 0; b < nb; b++) {
        const struct sb_audit_bin_result *r = sb_audit_bin(a, b);

        if (!r->n)
            continue;
        NUM(t, r->from_rad / DEG);
        NUM(t, r->to_rad / DEG);
        NUM(t, (double)r->n);
        NUM(t, r->tvu95_mean_m);
        NUM(t, r->thu95_mean_m);
        for (int k = 0; k < no && k < 55; k++)
            NUM(t, pct(r->fail_any[k], r->n));
    }
    if (rc || (rc = emit(t, "A-priori compliance per beam-angle bin", fmt,
                         &err)))
        return rc;

    /* worst lines */
    c.n = 0;
    col(&c, "order", "order", 0);
    col(&c, "line", "line", 0);
    col(&c, "soundings", "soundings", 0);
    col(&c, "failing", "failing", 0);
    col(&c, "failing (%)", "failing_pct", 2);
    t = sb_table_alloc(c.c, c.n);
    if (!t)
        return SB_ENOMEM;
    for (int k = 0; k < no; k++) {
        size_t idx[WORST_LINES], n = sb_audit_worst_lines(a, k, idx,
                                                          WORST_LINES);

        for (size_t i = 0; i < n; i++) {
            const struct sb_audit_line_result *l = sb_audit_line(a, idx[i]);

            STR(t, cfg->orders[k]->id);
            STR(t, l->name);
            NUM(t, (double)l->n);
            NUM(t, (double)l->fail[k]);
            NUM(t, pct(l->fail[k], l->n));
        }
    }
    if (rc || (rc = emit(t, "Worst lines (up to 5 per order; lines without "
                            "failures are left out)",
                         fmt, &err)))
        return rc;

    if (tot->compared) {
        if (fmt == SB_FORMAT_TABLE)
            printf("Reference surface: %llu soundings, cells of %g m (%s), "
                   "%llu cells, %llu with >= %u soundings; median reference "
                   "depth %.2f m\n\n",
                   (unsigned long long)tot->ref_soundings, tot->cell_m,
                   tot->cell_derived ? "derived from the depth" : "given",
                   (unsigned long long)tot->cells,
                   (unsigned long long)tot->cells_usable, cfg->min_ref,
                   tot->ref_depth_median_m);
        c.n = 0;
        col(&c, "from (deg)", "from_deg", 0);
        col(&c, "to (deg)", "to_deg", 0);
        col(&c, "compared", "compared", 0);
        col(&c, "mean diff (m)", "diff_mean_m", 3);
        col(&c, "sd diff (m)", "diff_sd_m", 3);
        col(&c, "95% |diff| (m)", "abs_diff95_m", 3);
        col(&c, "ref u (m)", "reference_u_m", 3);
        col(&c, "95% corrected (m)", "abs_diff95_corrected_m", 3);
        col(&c, "a-priori TVU95 (m)", "tvu95_apriori_m", 3);
        col(&c, "ratio", "ratio", 3);
        col(&c, "ratio low", "ratio_low", 3);
        col(&c, "ratio high", "ratio_high", 3);
        col(&c, "flag", "flag", 0);
        for (int k = 0; k < no && c.n < 60; k++) {
            char ti[48], ke[48];

            snprintf(ti, sizeof ti, "within %s (%%)", cfg->orders[k]->id);
            snprintf(ke, sizeof ke, "within_%s_pct", cfg->orders[k]->id);
            col(&c, ti, ke, 1);
        }
        t = sb_table_alloc(c.c, c.n);
        if (!t)
            return SB_ENOMEM;
        for (int b = 0; b < nb; b++) {
            const struct sb_audit_bin_result *r = sb_audit_bin(a, b);

            if (!r->n_cmp)
                continue;
            NUM(t, r->from_rad / DEG);
            NUM(t, r->to_rad / DEG);
            NUM(t, (double)r->n_cmp);
            NUM(t, r->diff_mean_m);
            NUM(t, r->diff_sd_m);
            NUM_OR(t, r->q95_raw_m);
            NUM(t, r->u_ref_m);
            NUM_OR(t, r->q95_m);
            NUM(t, r->tvu95_cmp_mean_m);
            NUM_OR(t, r->ratio);
            NUM_OR(t, r->ratio_lo);
            NUM_OR(t, r->ratio_hi);
            STR(t, !r->enough            ? "few"
                   : isnan(r->ratio_lo) ? "wide"
                   : r->exceeds         ? "exceeds"
                   : r->below           ? "below"
                                        : "agrees");
            for (int k = 0; k < no && k < 47; k++)
                NUM(t, 100 * r->within[k]);
        }
        if (rc || (rc = emit(t, "Crossline comparison per beam-angle bin "
                                "(ratio: corrected 95% |diff| / a-priori "
                                "TVU95)",
                             fmt, &err)))
            return rc;

        c.n = 0;
        col(&c, "order", "order", 0);
        col(&c, "side", "side", 0);
        col(&c, "empirical (deg)", "empirical_deg", 0);
        col(&c, "a-priori (deg)", "apriori_deg", 0);
        col(&c, "bins over TVU (both sides)", "bins_over", 0);
        t = sb_table_alloc(c.c, c.n);
        if (!t)
            return SB_ENOMEM;
        for (int k = 0; k < no; k++) {
            const struct sb_audit_order_result *o = sb_audit_order(a, k);
            char e[32], p[32];

            for (int s = 0; s < 2; s++) {
                STR(t, o->order->id);
                STR(t, s ? "starboard" : "port");
                angle_text(s ? &o->emp_stbd : &o->emp_port, e, sizeof e);
                angle_text(s ? &o->ap_stbd : &o->ap_port, p, sizeof p);
                STR(t, e);
                STR(t, p);
                NUM(t, (double)o->bins_over);
            }
        }
        if (rc || (rc = emit(t, "Fail angle, vertical (where the 95% point "
                                "crosses the TVU limit)",
                             fmt, &err)))
            return rc;
    }

    if (fmt == SB_FORMAT_CSV)
        printf("# verdict\norder,verdict,why\n");
    for (int k = 0; k < no; k++) {
        const struct sb_audit_order_result *o = sb_audit_order(a, k);

        if (fmt == SB_FORMAT_CSV)
            printf("%s,%s,\"%s\"\n", o->order->id, o->pass ? "pass" : "fail",
                   o->why);
        else
            printf("verdict %s: %s (%s)\n", o->order->id,
                   o->pass ? "PASS" : "FAIL", o->why);
    }
    if (fmt == SB_FORMAT_TABLE)
        printf("\nAn a-priori estimate and a crossline comparison are not "
               "proof of a survey's\nquality: defer to the hydrographic "
               "authority's specifications, local\nregulations and licensed "
               "practice.\n");
    return SB_OK;
}

static void json_angle(struct sb_json *j, const char *key,
                       const struct sb_audit_fail_angle *a)
{
    sb_json_key(j, key);
    sb_json_begin_object(j);
    sb_json_kv_string(j, "kind", sb_audit_fail_kind_name(a->kind));
    sb_json_key(j, "angle_deg");
    if (a->kind == SB_AUDIT_ANGLE_NONE)
        sb_json_null(j);
    else
        sb_json_number(j, a->angle_rad / DEG, JSON_DIGITS);
    sb_json_end_object(j);
}

static void json_num_or_null(struct sb_json *j, const char *key, double v)
{
    sb_json_key(j, key);
    if (isfinite(v))
        sb_json_number(j, v, JSON_DIGITS);
    else
        sb_json_null(j);
}

static int write_json(const struct sb_audit *a, const struct sb_system *sys,
                      const char *path, const struct sb_standard *std,
                      struct sb_error *err)
{
    const struct sb_audit_totals *tot = sb_audit_totals(a);
    const struct sb_audit_config *cfg = sb_audit_config(a);
    int no = sb_audit_n_orders(a), nb = sb_audit_n_bins(a);
    struct sb_json j;

    sb_json_init(&j, stdout);
    sb_json_begin_object(&j);
    sb_json_kv_string(&j, "soundings_file", path);
    sb_json_kv_string(&j, "system", sys->name);
    sb_json_kv_string(&j, "standard", std->id);
    sb_json_kv_number(&j, "table_bound_rel", tot->table_bound, JSON_DIGITS);
    sb_json_key(&j, "reconciliation");
    sb_json_begin_object(&j);
    sb_json_key(&j, "rows_read");
    sb_json_integer(&j, (long long)tot->rows_read);
    sb_json_key(&j, "rows_used");
    sb_json_integer(&j, (long long)tot->rows_used);
    sb_json_key(&j, "rows_rejected");
    sb_json_integer(&j, (long long)tot->rows_rejected);
    sb_json_key(&j, "rejected_by_reason");
    sb_json_begin_object(&j);
    for (int r = 0; r < SB_AUDIT_OUTSIDE_GRID; r++) {
        sb_json_key(&j, sb_audit_reason_name(r));
        sb_json_integer(&j, (long long)tot->reason[r]);
    }
    sb_json_end_object(&j);
    sb_json_key(&j, "rows_with_tpu_v");
    sb_json_integer(&j, (long long)tot->rows_with_tpu_v);
    sb_json_key(&j, "rows_with_tpu_h");
    sb_json_integer(&j, (long long)tot->rows_with_tpu_h);
    if (tot->ref_rows_read) {
        sb_json_key(&j, "reference_rows_read");
        sb_json_integer(&j, (long long)tot->ref_rows_read);
        sb_json_key(&j, "reference_rows_used");
        sb_json_integer(&j, (long long)tot->ref_rows_used);
        sb_json_key(&j, "reference_rows_rejected");
        sb_json_integer(&j, (long long)tot->ref_rows_rejected);
    }
    if (tot->compared) {
        sb_json_key(&j, "compare_candidates");
        sb_json_integer(&j, (long long)tot->cmp_candidates);
        sb_json_key(&j, "compared");
        sb_json_integer(&j, (long long)tot->cmp_compared);
        sb_json_key(&j, "outside_grid");
        sb_json_integer(&j, (long long)tot->cmp_outside);
    }
    sb_json_end_object(&j);

    sb_json_key(&j, "orders");
    sb_json_begin_array(&j);
    for (int k = 0; k < no; k++) {
        const struct sb_audit_order_result *o = sb_audit_order(a, k);
        size_t idx[WORST_LINES], n = sb_audit_worst_lines(a, k, idx,
                                                          WORST_LINES);

        sb_json_begin_object(&j);
        sb_json_kv_string(&j, "order", o->order->id);
        sb_json_key(&j, "soundings");
        sb_json_integer(&j, (long long)o->checked);
        sb_json_key(&j, "fail_tvu");
        sb_json_integer(&j, (long long)o->fail_tvu);
        sb_json_key(&j, "fail_thu");
        sb_json_integer(&j, (long long)o->fail_thu);
        sb_json_key(&j, "fail_apriori");
        sb_json_integer(&j, (long long)o->fail_any);
        sb_json_key(&j, "data_tvu");
        sb_json_integer(&j, (long long)o->data_v);
        sb_json_key(&j, "data_fail_tvu");
        sb_json_integer(&j, (long long)o->data_fail_v);
        sb_json_key(&j, "data_thu");
        sb_json_integer(&j, (long long)o->data_h);
        sb_json_key(&j, "data_fail_thu");
        sb_json_integer(&j, (long long)o->data_fail_h);
        sb_json_key(&j, "borderline");
        sb_json_integer(&j, (long long)o->borderline);
        sb_json_key(&j, "failing");
        sb_json_integer(&j, (long long)o->fail_sounding);
        sb_json_kv_number(&j, "failing_frac",
                          o->checked ? (double)o->fail_sounding / o->checked
                                     : 0,
                          JSON_DIGITS);
        if (o->compared) {
            sb_json_key(&j, "bins_over_tvu");
            sb_json_integer(&j, o->bins_over);
            json_angle(&j, "fail_angle_empirical_port", &o->emp_port);
            json_angle(&j, "fail_angle_empirical_starboard", &o->emp_stbd);
            json_angle(&j, "fail_angle_apriori_port", &o->ap_port);
            json_angle(&j, "fail_angle_apriori_starboard", &o->ap_stbd);
        }
        sb_json_key(&j, "worst_lines");
        sb_json_begin_array(&j);
        for (size_t i = 0; i < n; i++) {
            const struct sb_audit_line_result *l = sb_audit_line(a, idx[i]);

            sb_json_begin_object(&j);
            sb_json_kv_string(&j, "line", l->name);
            sb_json_key(&j, "soundings");
            sb_json_integer(&j, (long long)l->n);
            sb_json_key(&j, "failing");
            sb_json_integer(&j, (long long)l->fail[k]);
            sb_json_end_object(&j);
        }
        sb_json_end_array(&j);
        sb_json_kv_string(&j, "verdict", o->pass ? "pass" : "fail");
        sb_json_kv_string(&j, "why", o->why);
        sb_json_end_object(&j);
    }
    sb_json_end_array(&j);

    sb_json_key(&j, "lines");
    sb_json_begin_array(&j);
    for (size_t i = 0; i < sb_audit_n_lines(a); i++) {
        const struct sb_audit_line_result *l = sb_audit_line(a, i);

        sb_json_begin_object(&j);
        sb_json_kv_string(&j, "line", l->name);
        sb_json_key(&j, "crossline");
        sb_json_bool(&j, l->crossline);
        sb_json_key(&j, "soundings");
        sb_json_integer(&j, (long long)l->n);
        sb_json_key(&j, "failing");
        sb_json_begin_object(&j);
        for (int k = 0; k < no; k++) {
            sb_json_key(&j, cfg->orders[k]->id);
            sb_json_integer(&j, (long long)l->fail[k]);
        }
        sb_json_end_object(&j);
        sb_json_end_object(&j);
    }
    sb_json_end_array(&j);

    sb_json_key(&j, "bins");
    sb_json_begin_array(&j);
    for (int b = 0; b < nb; b++) {
        const struct sb_audit_bin_result *r = sb_audit_bin(a, b);

        if (!r->n && !r->n_cmp)
            continue;
        sb_json_begin_object(&j);
        sb_json_kv_number(&j, "from_deg", r->from_rad / DEG, JSON_DIGITS);
        sb_json_kv_number(&j, "to_deg", r->to_rad / DEG, JSON_DIGITS);
        sb_json_key(&j, "soundings");
        sb_json_integer(&j, (long long)r->n);
        json_num_or_null(&j, "tvu95_mean_m", r->tvu95_mean_m);
        json_num_or_null(&j, "thu95_mean_m", r->thu95_mean_m);
        sb_json_key(&j, "fail_apriori");
        sb_json_begin_object(&j);
        for (int k = 0; k < no; k++) {
            sb_json_key(&j, cfg->orders[k]->id);
            sb_json_integer(&j, (long long)r->fail_any[k]);
        }
        sb_json_end_object(&j);
        if (tot->compared) {
            sb_json_key(&j, "compared");
            sb_json_integer(&j, (long long)r->n_cmp);
            sb_json_key(&j, "enough");
            sb_json_bool(&j, r->enough);
            json_num_or_null(&j, "diff_mean_m", r->diff_mean_m);
            json_num_or_null(&j, "diff_sd_m", r->diff_sd_m);
            json_num_or_null(&j, "abs_diff95_m", r->q95_raw_m);
            json_num_or_null(&j, "reference_u_m", r->u_ref_m);
            json_num_or_null(&j, "abs_diff95_corrected_m", r->q95_m);
            json_num_or_null(&j, "tvu95_apriori_m", r->tvu95_cmp_mean_m);
            json_num_or_null(&j, "ratio", r->ratio);
            json_num_or_null(&j, "ratio_low", r->ratio_lo);
            json_num_or_null(&j, "ratio_high", r->ratio_hi);
            sb_json_key(&j, "exceeds_apriori");
            sb_json_bool(&j, r->exceeds);
            sb_json_key(&j, "below_apriori");
            sb_json_bool(&j, r->below);
            sb_json_key(&j, "per_order");
            sb_json_begin_object(&j);
            for (int k = 0; k < no; k++) {
                sb_json_key(&j, cfg->orders[k]->id);
                sb_json_begin_object(&j);
                json_num_or_null(&j, "within_frac", r->within[k]);
                json_num_or_null(&j, "empirical_to_limit", r->emp_limit[k]);
                json_num_or_null(&j, "apriori_to_limit", r->ap_limit[k]);
                sb_json_end_object(&j);
            }
            sb_json_end_object(&j);
        }
        sb_json_end_object(&j);
    }
    sb_json_end_array(&j);
    if (tot->compared) {
        sb_json_key(&j, "reference");
        sb_json_begin_object(&j);
        sb_json_key(&j, "soundings");
        sb_json_integer(&j, (long long)tot->ref_soundings);
        sb_json_kv_number(&j, "cell_m", tot->cell_m, JSON_DIGITS);
        sb_json_key(&j, "cell_derived");
        sb_json_bool(&j, tot->cell_derived);
        sb_json_key(&j, "cells");
        sb_json_integer(&j, (long long)tot->cells);
        sb_json_key(&j, "cells_usable");
        sb_json_integer(&j, (long long)tot->cells_usable);
        sb_json_kv_number(&j, "median_depth_m", tot->ref_depth_median_m,
                          JSON_DIGITS);
        sb_json_key(&j, "bins_exceeding_apriori");
        sb_json_integer(&j, (long long)tot->bins_exceeding);
        sb_json_key(&j, "bins_below_apriori");
        sb_json_integer(&j, (long long)tot->bins_below);
        sb_json_key(&j, "bins_with_enough");
        sb_json_integer(&j, (long long)tot->bins_enough);
        sb_json_end_object(&j);
    }
    sb_json_kv_string(&j, "caution",
                      "An a-priori estimate and a crossline comparison are "
                      "not proof of a survey's quality: defer to the "
                      "hydrographic authority's specifications, local "
                      "regulations and licensed practice.");
    sb_json_end_object(&j);
    return sb_json_finish(&j, err);
}

/* ---- options ---------------------------------------------------------------- */

static int select_orders(const struct sb_standard *std, const char *arg,
                         struct sb_audit_config *cfg)
{
    char buf[1024];
    const char *words[SB_STANDARD_ORDERS_MAX];
    size_t nw;
    int rc;

    if (!arg) {
        for (int i = 0; i < std->n_orders; i++)
            cfg->orders[i] = &std->orders[i];
        cfg->n_orders = std->n_orders;
        return CLI_EXIT_OK;
    }
    rc = cli_split_words(CMD, "--order", arg, buf, sizeof buf, words,
                         SB_STANDARD_ORDERS_MAX, &nw);
    if (rc != CLI_EXIT_OK)
        return rc;
    for (size_t k = 0; k < nw; k++) {
        cfg->orders[k] = sb_standard_order(std, words[k]);
        if (!cfg->orders[k])
            return cli_usage_error(CMD, "--order: unknown order '%s' in %s "
                                        "(expected an order of the "
                                        "standard, see 'swathbudget limits')",
                                   words[k], std->id);
        for (size_t m = 0; m < k; m++)
            if (cfg->orders[m] == cfg->orders[k])
                return cli_usage_error(CMD, "--order: order '%s' named twice "
                                            "(expected each order once)",
                                       words[k]);
    }
    cfg->n_orders = (int)nw;
    return CLI_EXIT_OK;
}

static int parse_char(const char *opt, const char *arg, int delim, char *out)
{
    if (delim && strcmp(arg, "tab") == 0)
        *out = '\t';
    else if (delim && strcmp(arg, "space") == 0)
        *out = ' ';
    else if (strlen(arg) == 1 &&
             strchr(delim ? ",;" : ".,", arg[0]) != NULL)
        *out = arg[0];
    else
        return cli_usage_error(CMD, "%s: '%s' (expected %s)", opt, arg,
                               delim ? "',', ';', 'tab' or 'space'"
                                     : "'.' or ','");
    return CLI_EXIT_OK;
}

int cmd_audit(int argc, char **argv)
{
    enum {
        OPT_COLUMNS = 256, OPT_STANDARD, OPT_ORDER, OPT_CROSS, OPT_REF,
        OPT_CELL, OPT_NADIR, OPT_MINREF, OPT_BIN, OPT_MINBIN, OPT_DELIM,
        OPT_DECIMAL, OPT_TPUTYPE, OPT_MAXFAIL, OPT_LISTBAD, OPT_FAILURES,
        OPT_RULE, OPT_STRICT, OPT_QUIET, OPT_FORMAT
    };
    static const struct option opts[] = {
        {"columns", required_argument, NULL, OPT_COLUMNS},
        {"standard", required_argument, NULL, OPT_STANDARD},
        {"order", required_argument, NULL, OPT_ORDER},
        {"crosslines", required_argument, NULL, OPT_CROSS},
        {"reference", required_argument, NULL, OPT_REF},
        {"cell", required_argument, NULL, OPT_CELL},
        {"nadir", required_argument, NULL, OPT_NADIR},
        {"min-ref", required_argument, NULL, OPT_MINREF},
        {"bin", required_argument, NULL, OPT_BIN},
        {"min-bin", required_argument, NULL, OPT_MINBIN},
        {"delimiter", required_argument, NULL, OPT_DELIM},
        {"decimal", required_argument, NULL, OPT_DECIMAL},
        {"tpu-type", required_argument, NULL, OPT_TPUTYPE},
        {"max-fail", required_argument, NULL, OPT_MAXFAIL},
        {"list-bad", required_argument, NULL, OPT_LISTBAD},
        {"failures", required_argument, NULL, OPT_FAILURES},
        {"thu-rule", required_argument, NULL, OPT_RULE},
        {"strict", no_argument, NULL, OPT_STRICT},
        {"quiet", no_argument, NULL, OPT_QUIET},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    const char *columns_arg = NULL, *std_arg = NULL, *order_arg = NULL;
    const char *cross_arg = NULL, *ref_path = NULL, *fail_path = NULL;
    char cross_buf[4096];
    struct sb_audit_columns cols;
    struct sb_audit_config cfg;
    struct sb_csv_options copt = {0, 0, 0};
    struct sb_audit_hooks hooks;
    struct sb_standard storage;
    const struct sb_standard *std = NULL;
    struct sb_system *sys = NULL;
    struct sb_horiz95 *h95 = NULL;
    struct sb_tvutable *table = NULL;
    struct sb_audit *a = NULL;
    struct sb_tvu_engine eng;
    struct sb_tvutable_opts topt;
    struct sb_outfile of;
    struct sb_error err;
    struct run run;
    enum sb_format fmt = SB_FORMAT_TABLE;
    int c, rc, status = CLI_EXIT_OK, strict = 0, thu_rule = SB_THU_EXACT;
    int of_open = 0;
    double dv;
    long lv;
    uint64_t rejected;

    memset(&run, 0, sizeof run);
    run.list_max = LIST_BAD_DEFAULT;
    sb_audit_config_default(&cfg);
    optind = 1;
    while ((c = getopt_long(argc, argv, ":h", opts, NULL)) != -1) {
        switch (c) {
        case OPT_COLUMNS: columns_arg = optarg; break;
        case OPT_STANDARD: std_arg = optarg; break;
        case OPT_ORDER: order_arg = optarg; break;
        case OPT_CROSS: cross_arg = optarg; break;
        case OPT_REF: ref_path = optarg; break;
        case OPT_CELL:
            if ((rc = cli_parse_double(CMD, "--cell", optarg,
                                       SB_GRID_CELL_MIN_M, SB_GRID_CELL_MAX_M,
                                       0, &cfg.cell_m)) != CLI_EXIT_OK)
                return rc;
            break;
        case OPT_NADIR:
            if ((rc = cli_parse_double(CMD, "--nadir", optarg, 0, 45, 1,
                                       &dv)) != CLI_EXIT_OK)
                return rc;
            cfg.nadir_max_rad = dv * DEG;
            break;
        case OPT_MINREF:
            if ((rc = cli_parse_long(CMD, "--min-ref", optarg, 2, 100000,
                                     &lv)) != CLI_EXIT_OK)
                return rc;
            cfg.min_ref = (unsigned)lv;
            break;
        case OPT_BIN:
            if ((rc = cli_parse_double(CMD, "--bin", optarg, 0.1, 45, 0,
                                       &dv)) != CLI_EXIT_OK)
                return rc;
            cfg.bin_width_rad = dv * DEG;
            break;
        case OPT_MINBIN:
            if ((rc = cli_parse_long(CMD, "--min-bin", optarg, 20, 1000000000,
                                     &lv)) != CLI_EXIT_OK)
                return rc;
            cfg.min_bin = (unsigned)lv;
            break;
        case OPT_DELIM:
            if ((rc = parse_char("--delimiter", optarg, 1, &copt.delimiter)))
                return rc;
            break;
        case OPT_DECIMAL:
            if ((rc = parse_char("--decimal", optarg, 0, &copt.decimal_mark)))
                return rc;
            break;
        case OPT_TPUTYPE:
            if (strcmp(optarg, "95%") == 0)
                cfg.tpu_is_sd = 0;
            else if (strcmp(optarg, "sd") == 0)
                cfg.tpu_is_sd = 1;
            else
                return cli_usage_error(CMD, "--tpu-type: '%s' (expected 95%% "
                                            "or sd)",
                                       optarg);
            break;
        case OPT_MAXFAIL:
            if ((rc = cli_parse_double(CMD, "--max-fail", optarg, 0, 100, 0,
                                       &dv)) != CLI_EXIT_OK)
                return rc;
            cfg.max_fail_frac = dv / 100;
            break;
        case OPT_LISTBAD:
            if ((rc = cli_parse_long(CMD, "--list-bad", optarg, 0, 1000000000,
                                     &lv)) != CLI_EXIT_OK)
                return rc;
            run.list_max = (size_t)lv;
            break;
        case OPT_FAILURES: fail_path = optarg; break;
        case OPT_RULE:
            if ((rc = cli_parse_thu_rule(CMD, optarg, &thu_rule)) !=
                CLI_EXIT_OK)
                return rc;
            break;
        case OPT_STRICT: strict = 1; break;
        case OPT_QUIET: run.quiet = 1; break;
        case OPT_FORMAT:
            if ((rc = cli_parse_format(CMD, optarg, &fmt)) != CLI_EXIT_OK)
                return rc;
            break;
        case 'h':
            cmd_audit_help(stdout);
            return CLI_EXIT_OK;
        default:
            return cli_bad_option(CMD, argc, argv);
        }
    }
    if (argc - optind < 2)
        return cli_usage_error(CMD, "%s (expected SYSTEM.yaml "
                                    "SOUNDINGS.csv)",
                               argc - optind == 0 ? "no files given"
                                                  : "no soundings file");
    if (argc - optind > 2)
        return cli_usage_error(CMD, "unexpected argument '%s' (expected "
                                    "SYSTEM.yaml SOUNDINGS.csv)",
                               argv[optind + 2]);
    if (!columns_arg)
        return cli_usage_error(CMD, "no column mapping (expected --columns "
                                    "line=..,x=..,y=..,z=..,angle=..)");
    if (cross_arg && ref_path)
        return cli_usage_error(CMD, "--crosslines and --reference both "
                                    "given (expected one of them)");
    if (cfg.cell_m > 0 && !cross_arg && !ref_path)
        return cli_usage_error(CMD, "--cell without a comparison (expected "
                                    "--crosslines or --reference too)");
    sb_error_clear(&err);
    if (sb_audit_columns_parse(columns_arg, &cols, &err) != SB_OK)
        return cli_usage_error(CMD, "--columns: %s", err.msg);
    if (cross_arg) {
        size_t n;

        if ((rc = cli_split_words(CMD, "--crosslines", cross_arg, cross_buf,
                                  sizeof cross_buf, cfg.crosslines,
                                  SB_AUDIT_CROSSLINES_MAX, &n)) != CLI_EXIT_OK)
            return rc;
        cfg.n_crosslines = n;
    }
    if ((rc = sb_standard_resolve(std_arg, &storage, &std, &err)) != SB_OK)
        return cli_report(CMD, rc, &err);
    if ((rc = select_orders(std, order_arg, &cfg)) != CLI_EXIT_OK)
        return rc;

    sys = sb_system_alloc();
    if (!sys) {
        sb_error_set(&err, SB_ENOMEM, "", 0, 0, "out of memory");
        return cli_report(CMD, SB_ENOMEM, &err);
    }
    if ((rc = sb_spec_load(argv[optind], sys, &err)) != SB_OK) {
        status = cli_report(CMD, rc, &err);
        goto done;
    }
    h95 = sb_horiz95_alloc(&err);
    if (!h95) {
        status = cli_report(CMD, SB_ENOMEM, &err);
        goto done;
    }
    eng.sys = sys;
    eng.h95 = h95;
    eng.thu_rule = thu_rule;
    topt.depth_min_m = sb_tvu_engine_depth_min(sys);
    topt.angle_max_rad = sys->echosounder.max_angle;
    topt.tol_rel = SB_TVUTABLE_TOL_DEFAULT;
    cfg.angle_max_rad = sys->echosounder.max_angle;
    if (cfg.nadir_max_rad > cfg.angle_max_rad)
        cfg.nadir_max_rad = cfg.angle_max_rad;
    if ((rc = sb_tvutable_alloc(&topt, sb_tvu_engine, &eng, &table, &err)) !=
            SB_OK ||
        (rc = sb_audit_alloc(&cfg, table, &a, &err)) != SB_OK) {
        status = cli_report(CMD, rc, &err);
        goto done;
    }
    if (fail_path) {
        if ((rc = sb_outfile_open(&of, fail_path, &err)) != SB_OK) {
            status = cli_report(CMD, rc, &err);
            goto done;
        }
        of_open = 1;
        run.failures = of.f;
        fprintf(of.f, "row_line,line,easting_m,northing_m,depth_m,"
                      "beam_angle_deg,order,failed,tvu95_m,tvu_limit_m,"
                      "thu95_m,thu_limit_m,data_tvu95_m,data_thu95_m\n");
    }
    run.tty = isatty(STDERR_FILENO);
    hooks.ctx = &run;
    hooks.bad_row = on_bad_row;
    hooks.list_max = run.list_max;
    hooks.failure = on_failure;
    hooks.progress = on_progress;

    rc = sb_audit_scan(a, argv[optind + 1], &copt, &cols, &hooks, &err);
    if (rc == SB_OK && ref_path)
        rc = sb_audit_reference(a, ref_path, &copt, &cols, &hooks, &err);
    if (rc == SB_OK && cross_arg) {
        /* a crossline named but absent is most likely a typing error */
        for (size_t i = 0; i < cfg.n_crosslines; i++) {
            size_t k, n = sb_audit_n_lines(a);

            for (k = 0; k < n; k++)
                if (strcmp(sb_audit_line(a, k)->name, cfg.crosslines[i]) == 0)
                    break;
            if (k == n)
                cli_warn(CMD, "crossline '%s' is not in %s", cfg.crosslines[i],
                         argv[optind + 1]);
        }
    }
    if (rc == SB_OK && (cross_arg || ref_path))
        rc = sb_audit_compare(a, argv[optind + 1], &copt, &cols, &hooks,
                              &err);
    if (rc == SB_OK)
        rc = sb_audit_finish(a, &err);
    if (run.progress_shown)
        fputs("\r\033[K", stderr);
    if (rc != SB_OK) {
        status = cli_report(CMD, rc, &err);
        goto done;
    }
    rejected = sb_audit_totals(a)->rows_rejected +
               sb_audit_totals(a)->ref_rows_rejected;
    if (rejected > run.listed)
        cli_warn(CMD, "%llu bad rows in all, %llu listed above (--list-bad "
                      "N lists more); every one is counted in the "
                      "reconciliation",
                 (unsigned long long)rejected,
                 (unsigned long long)run.listed);
    if (of_open) {
        of_open = 0;
        if ((rc = sb_outfile_commit(&of, &err)) != SB_OK) {
            status = cli_report(CMD, rc, &err);
            goto done;
        }
    }
    if (fmt == SB_FORMAT_JSON)
        rc = write_json(a, sys, argv[optind + 1], std, &err);
    else
        rc = write_tables(a, sys, argv[optind + 1], std, fmt);
    if (rc != SB_OK) {
        if (!err.msg[0])
            sb_error_set(&err, rc, "", 0, 0, "could not write the summary "
                                             "(%s)",
                         sb_strerror(rc));
        status = cli_report(CMD, rc, &err);
        goto done;
    }
    if (strict)
        for (int k = 0; k < sb_audit_n_orders(a); k++)
            if (!sb_audit_order(a, k)->pass)
                status = CLI_EXIT_FAIL;
done:
    if (of_open)
        sb_outfile_abort(&of);
    sb_audit_free(a);
    sb_tvutable_free(table);
    sb_horiz95_free(h95);
    sb_system_free(sys);
    return status;
}
