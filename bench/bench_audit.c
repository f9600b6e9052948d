/*
 * Benchmark of the audit (src/lib/audit.c) on a large soundings file.
 *
 *     bench_audit [ROWS [SYSTEM.yaml]]
 *
 * Writes an invented soundings file of ROWS rows (default 10^7, about
 * 0.42 GB) to $TMPDIR (or /tmp)/sb_bench_audit_ROWS.csv, reusing it when it
 * is already there with the right size, and times on a warm page cache
 * (RUNS runs each, interleaved, one thread; minimum and median printed, as
 * the machine may be shared and noisy):
 *   - `wc -l` on the file (through popen): the yardstick;
 *   - the a-priori pass (sb_audit_scan: reconciliation, per-sounding checks
 *     against two orders, per-line and per-bin tallies, the reference grid
 *     from three crosslines) -- target: at least 1/3 of the throughput of
 *     `wc -l`;
 *   - the whole crossline comparison (sb_audit_scan + sb_audit_compare) --
 *     target: at most 3 times the a-priori pass;
 *   - for the record, reading alone: every row split (sb_csv_next), the
 *     line name taken and the four numbers converted, nothing checked --
 *     the part of the a-priori pass that is the reader's.
 * The uncertainty table is built before the timing (a one-off cost of a
 * fraction of a second, reported separately).  SYSTEM.yaml defaults to
 * profiles/systems/kestrel-launch.yaml (run from the source tree).
 * Prints both figures and whether the targets are met; exit status 0
 * whatever the figures (it measures, it does not judge), 1 when it cannot
 * run.
 */
#include <gsl/gsl_errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>

#include "swathbudget/audit.h"
#include "swathbudget/csvread.h"
#include "swathbudget/orders.h"
#include "swathbudget/propagate.h"
#include "swathbudget/spec.h"
#include "swathbudget/tvutable.h"

#define RUNS 5
#define DEG (3.14159265358979323846 / 180.0)

static double now_s(void)
{
    struct timespec t;

    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

/* xorshift64* (Vigna 2016): invented demo values, speed over quality. */
static double uniform01(unsigned long long *st)
{
    *st ^= *st >> 12;
    *st ^= *st << 25;
    *st ^= *st >> 27;
    return (double)((*st * 2685821657736338717ULL) >> 11) * 0x1p-53;
}

/* Write v with three decimals (v >= 0 or negative), fast: snprintf for
 * 5 x 10^7 numbers would take longer than the benchmark itself. */
static char *fixed3(char *p, double v)
{
    long long m = llround(v * 1000.0);
    char tmp[32];
    int n = 0;

    if (m < 0) {
        *p++ = '-';
        m = -m;
    }
    do {
        tmp[n++] = (char)('0' + m % 10);
        m /= 10;
        if (n == 3)
            tmp[n++] = '.';
    } while (m > 0 || n < 5);
    while (n > 0)
        *p++ = tmp[--n];
    return p;
}

/* Invented survey of the Kestrel Sound approach channel: 60 mainscheme
 * lines east-west 40 m apart, 3 crosslines north-south; 10 to 60 m deep. */
static int write_soundings(const char *path, long rows)
{
    FILE *f = fopen(path, "w");
    unsigned long long st = 0x9E3779B97F4A7C15ULL;
    char buf[160];

    if (!f)
        return -1;
    fputs("Line,Easting,Northing,Depth,BeamAngle\n", f);
    for (long i = 0; i < rows; i++) {
        /* one row in 20 on a crossline, in blocks as a logger writes */
        long block = i / 5000;
        int cross = block % 20 == 19;
        double ang = (2 * uniform01(&st) - 1) * 68.0;
        double e, n, d, across;
        char *p = buf;

        if (cross) {
            int k = (int)(block / 20 % 3);
            double along = uniform01(&st) * 2400;

            d = 10 + 50 * (800.0 + 800 * k) / 2400.0;
            across = (d - 0.6) * tan(ang * DEG);
            e = 612000 + 800 + 800 * k + across;
            n = 5710000 + along;
            p += sprintf(p, "X%02d,", k + 1);
        } else {
            int k = (int)(block % 60);
            double along = uniform01(&st) * 2400;

            d = 10 + 50 * along / 2400.0;
            across = (d - 0.6) * tan(ang * DEG);
            e = 612000 + along;
            n = 5710000 + 40 * k + across;
            p += sprintf(p, "M%03d,", k + 1);
        }
        d += 0.15 * (uniform01(&st) - 0.5);
        p = fixed3(p, e);
        *p++ = ',';
        p = fixed3(p, n);
        *p++ = ',';
        p = fixed3(p, d);
        *p++ = ',';
        p = fixed3(p, ang);
        *p++ = '\n';
        if (fwrite(buf, 1, (size_t)(p - buf), f) != (size_t)(p - buf)) {
            fclose(f);
            return -1;
        }
    }
    return fclose(f) == 0 ? 0 : -1;
}

static double wc_pass(const char *path)
{
    char cmd[4200];
    double t0 = now_s();
    FILE *p;
    long lines;

    snprintf(cmd, sizeof cmd, "LC_ALL=C wc -l < '%s'", path);
    p = popen(cmd, "r");
    if (!p || fscanf(p, "%ld", &lines) != 1) {
        if (p)
            pclose(p);
        return -1;
    }
    pclose(p);
    return now_s() - t0;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;

    return (x > y) - (x < y);
}

/* One audit run; compare = 1 adds the comparison pass. */
static double audit_pass(struct sb_tvutable *t, const char *path,
                         int compare, uint64_t *rows)
{
    static const char *const cross[] = {"X01", "X02", "X03"};
    const struct sb_standard *s = sb_standard_builtin("s44-6");
    struct sb_audit_config c;
    struct sb_audit_columns cols;
    struct sb_csv_options copt = {',', '.', 0};
    struct sb_audit *a;
    struct sb_error err;
    double t0;

    sb_audit_config_default(&c);
    c.orders[0] = sb_standard_order(s, "special");
    c.orders[1] = sb_standard_order(s, "1a");
    c.n_orders = 2;
    c.angle_max_rad = sb_tvutable_angle_max(t);
    for (int i = 0; i < 3; i++)
        c.crosslines[i] = cross[i];
    c.n_crosslines = 3;
    c.cell_m = 2.0;
    sb_audit_columns_parse("line=Line,x=Easting,y=Northing,z=Depth,"
                           "angle=BeamAngle",
                           &cols, &err);
    if (sb_audit_alloc(&c, t, &a, &err) != SB_OK)
        return -1;
    t0 = now_s();
    if (sb_audit_scan(a, path, &copt, &cols, NULL, &err) != SB_OK ||
        (compare &&
         sb_audit_compare(a, path, &copt, &cols, NULL, &err) != SB_OK)) {
        fprintf(stderr, "bench_audit: %s\n", err.msg);
        sb_audit_free(a);
        return -1;
    }
    t0 = now_s() - t0;
    *rows = sb_audit_totals(a)->rows_read;
    if (sb_audit_totals(a)->rows_rejected)
        fprintf(stderr, "bench_audit: %llu rows rejected\n",
                (unsigned long long)sb_audit_totals(a)->rows_rejected);
    sb_audit_finish(a, &err);
    sb_audit_free(a);
    return t0;
}

/* Reading alone: split every row, take the line name, convert the four
 * numbers (what the a-priori pass cannot do without). */
static double read_pass(const char *path, uint64_t *rows)
{
    static const int cols[4] = {1, 2, 3, 4};
    struct sb_csv_options copt = {',', '.', 0};
    struct sb_csv *csv;
    struct sb_csv_row row;
    struct sb_error err;
    double v[4], sum = 0, t0 = now_s();
    const char *name;
    size_t len;
    int got;

    if (sb_csv_open(path, &copt, &csv, &err) != SB_OK)
        return -1;
    *rows = 0;
    while ((got = sb_csv_next(csv, &row, &err)) == 1) {
        if (sb_csv_field_text(csv, &row, 0, &name, &len) == SB_CSV_OK &&
            sb_csv_fields_double(csv, &row, cols, 4, v, NULL) == SB_CSV_OK)
            sum += v[2] + (double)len;
        ++*rows;
    }
    sb_csv_close(csv);
    if (got < 0 || !(sum > 0))
        return -1;
    return now_s() - t0;
}

int main(int argc, char **argv)
{
    long rows = argc > 1 ? atol(argv[1]) : 10000000L;
    const char *sys_path =
        argc > 2 ? argv[2] : "profiles/systems/kestrel-launch.yaml";
    const char *dir = getenv("TMPDIR") ? getenv("TMPDIR") : "/tmp";
    char path[4096];
    struct stat stt;
    struct sb_system sys;
    struct sb_horiz95 *h95;
    struct sb_tvu_engine eng;
    struct sb_tvutable_opts to;
    struct sb_tvutable *t;
    struct sb_error err;
    double t_wc[RUNS], t_ap[RUNS], t_cmp[RUNS], t_rd[RUNS], t0, tbuild;
    double best_wc, best_ap, best_cmp, med_wc, med_ap, med_cmp, mb;
    uint64_t read_rows = 0;
    uint64_t nrows = 0;

    gsl_set_error_handler_off();
    if (rows < 1000) {
        fprintf(stderr, "usage: bench_audit [ROWS >= 1000 [SYSTEM.yaml]]\n");
        return 1;
    }
    snprintf(path, sizeof path, "%s/sb_bench_audit_%ld.csv", dir, rows);
    if (stat(path, &stt) != 0 || stt.st_size < rows * 30L) {
        printf("writing %ld invented soundings to %s ...\n", rows, path);
        fflush(stdout);
        t0 = now_s();
        if (write_soundings(path, rows) != 0) {
            fprintf(stderr, "bench_audit: cannot write %s\n", path);
            return 1;
        }
        printf("  written in %.1f s\n", now_s() - t0);
    }
    if (stat(path, &stt) != 0)
        return 1;
    mb = (double)stt.st_size / 1e6;
    if (sb_spec_load(sys_path, &sys, &err) != SB_OK) {
        fprintf(stderr, "bench_audit: %s: %s\n", sys_path, err.msg);
        return 1;
    }
    h95 = sb_horiz95_alloc(&err);
    eng.sys = &sys;
    eng.h95 = h95;
    eng.thu_rule = SB_THU_EXACT;
    to.depth_min_m = sb_tvu_engine_depth_min(&sys);
    to.angle_max_rad = sys.echosounder.max_angle;
    to.tol_rel = SB_TVUTABLE_TOL_DEFAULT;
    t0 = now_s();
    if (!h95 || sb_tvutable_alloc(&to, sb_tvu_engine, &eng, &t, &err) ||
        sb_tvutable_prepare(t, 8.0, 64.0, &err)) {
        fprintf(stderr, "bench_audit: %s\n", err.msg);
        return 1;
    }
    tbuild = now_s() - t0;

    for (int i = 0; i < RUNS + 1; i++) { /* the first run warms the cache */
        double w = wc_pass(path), ap, cmp, rd;

        ap = audit_pass(t, path, 0, &nrows);
        cmp = audit_pass(t, path, 1, &nrows);
        rd = read_pass(path, &read_rows);
        if (w < 0 || ap < 0 || cmp < 0 || rd < 0) {
            fprintf(stderr, "bench_audit: a run failed\n");
            return 1;
        }
        if (i == 0)
            continue;
        t_wc[i - 1] = w;
        t_ap[i - 1] = ap;
        t_cmp[i - 1] = cmp;
        t_rd[i - 1] = rd;
    }
    qsort(t_wc, RUNS, sizeof t_wc[0], cmp_double);
    qsort(t_ap, RUNS, sizeof t_ap[0], cmp_double);
    qsort(t_cmp, RUNS, sizeof t_cmp[0], cmp_double);
    qsort(t_rd, RUNS, sizeof t_rd[0], cmp_double);
    best_wc = t_wc[0];
    best_ap = t_ap[0];
    best_cmp = t_cmp[0];
    med_wc = t_wc[RUNS / 2];
    med_ap = t_ap[RUNS / 2];
    med_cmp = t_cmp[RUNS / 2];
    printf("file: %s (%.1f MB, %llu rows)\n", path, mb,
           (unsigned long long)nrows);
    printf("uncertainty table (8-64 m, %s): built in %.3f s, bound %.3g\n",
           sys.name, tbuild, sb_tvutable_bound(t));
    printf("%d runs each; min (median):\n", RUNS);
    printf("wc -l:                 %7.3f s (%7.3f)  %8.1f MB/s  %6.1f ns/row\n",
           best_wc, med_wc, mb / best_wc, 1e9 * best_wc / nrows);
    printf("audit a-priori pass:   %7.3f s (%7.3f)  %8.1f MB/s  %6.1f ns/row\n",
           best_ap, med_ap, mb / best_ap, 1e9 * best_ap / nrows);
    printf("audit with comparison: %7.3f s (%7.3f)  %8.1f MB/s  %6.1f ns/row\n",
           best_cmp, med_cmp, mb / best_cmp, 1e9 * best_cmp / nrows);
    printf("reading alone:         %7.3f s (%7.3f)  %8.1f MB/s  %6.1f ns/row"
           "  (%.0f %% of the a-priori pass)\n",
           t_rd[0], t_rd[RUNS / 2], mb / t_rd[0], 1e9 * t_rd[0] / nrows,
           100.0 * t_rd[0] / best_ap);
    printf("a-priori / wc -l throughput: %.3f, medians %.3f (target >= 0.333: "
           "%s)\n",
           best_wc / best_ap, med_wc / med_ap,
           best_wc / best_ap >= 1.0 / 3 ? "met" : "NOT met");
    printf("comparison / a-priori time:  %.2f, medians %.2f (target <= 3: "
           "%s)\n",
           best_cmp / best_ap, med_cmp / med_ap,
           best_cmp / best_ap <= 3 ? "met" : "NOT met");
    sb_tvutable_free(t);
    sb_horiz95_free(h95);
    sb_system_release(&sys);
    return 0;
}
