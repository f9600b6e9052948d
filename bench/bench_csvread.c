/*
 * Benchmark of the streaming CSV reader (src/lib/csvread.c).
 *
 *     bench_csvread [ROWS | FILE]
 *
 * With a number (default 2000000) it writes an invented soundings file of
 * that many rows to $TMPDIR (or /tmp)/sb_bench_soundings_ROWS.csv, reusing
 * it when it already has the right size; with a file name it reads that file
 * and parses the 2nd to 6th columns as numbers.  It then times, best of
 * five runs each on a warm page cache:
 *   - reading the file and parsing 5 numeric columns of every row;
 *   - `wc -l` on the same file (run through popen), the yardstick: the goal
 *     is at least a third of its throughput on one thread.
 * Prints rows/s and MB/s for both and their ratio.  Exit status 0 whatever
 * the figures (it measures, it does not judge), 1 on a failure to run.
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>

#include "swathbudget/csvread.h"

#define RUNS 5

static double now_s(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

/* xorshift64* (Vigna 2016): a fixed-seed generator for invented demo
 * values only; quality does not matter here, speed does. */
static double uniform01(unsigned long long *st)
{
    *st ^= *st >> 12;
    *st ^= *st << 25;
    *st ^= *st >> 27;
    return (double)((*st * 2685821657736338717ULL) >> 11) * 0x1p-53;
}

/* Invented soundings of the Kestrel Sound approach channel. */
static int write_soundings(const char *path, long rows)
{
    FILE *f = fopen(path, "w");
    unsigned long long st = 0x9E3779B97F4A7C15ULL;
    long i;

    if (!f)
        return -1;
    setvbuf(f, NULL, _IOFBF, 1 << 20);
    fprintf(f, "Line,Easting,Northing,Depth,BeamAngle,TpuV\n");
    for (i = 0; i < rows; i++) {
        double e = 402000.0 + 8000.0 * uniform01(&st);
        double n = 5603000.0 + 9000.0 * uniform01(&st);
        double z = 10.0 + 50.0 * uniform01(&st);
        double angle = -70.0 + 140.0 * uniform01(&st);
        double tpu = 0.05 + 0.3 * uniform01(&st);
        fprintf(f, "KS-%03ld,%.3f,%.3f,%.2f,%.2f,%.3f\n", (i / 50000) % 1000,
                e, n, z, angle, tpu);
    }
    return fclose(f) == 0 ? 0 : -1;
}

/* One pass of the reader: returns the seconds taken, -1 on failure. */
static double read_pass(const char *path, long *rows, long *bad,
                        double *checksum)
{
    static const char *const names[5] = {"Easting", "Northing", "Depth",
                                         "BeamAngle", "TpuV"};
    struct sb_csv *c;
    struct sb_csv_row row;
    struct sb_error err;
    int col[5], k, rc;
    double t0 = now_s(), sum = 0.0;
    char msg[1200];

    if (sb_csv_open(path, NULL, &c, &err) != SB_OK) {
        sb_error_format(&err, msg, sizeof msg);
        fprintf(stderr, "bench_csvread: %s\n", msg);
        return -1.0;
    }
    for (k = 0; k < 5; k++)
        if (sb_csv_map(c, names[k], &col[k], NULL) != SB_OK)
            col[k] = k + 1; /* a file of another layout: columns 2-6 */
    *rows = *bad = 0;
    while ((rc = sb_csv_next(c, &row, &err)) == 1) {
        double v[5];
        (*rows)++;
        if (sb_csv_fields_double(c, &row, col, 5, v, NULL) == SB_CSV_OK)
            sum += v[0] + v[1] + v[2] + v[3] + v[4];
        else
            (*bad)++;
    }
    sb_csv_close(c);
    if (rc < 0) {
        sb_error_format(&err, msg, sizeof msg);
        fprintf(stderr, "bench_csvread: %s\n", msg);
        return -1.0;
    }
    *checksum = sum;
    return now_s() - t0;
}

/* One run of `wc -l`: seconds (including the ~1 ms of starting the
 * shell), and the line count it printed. */
static double wc_pass(const char *path, long *lines)
{
    char cmd[1200];
    FILE *p;
    double t0 = now_s();

    if (strchr(path, '\'') != NULL)
        return -1.0; /* keep the shell command simple */
    snprintf(cmd, sizeof cmd, "LC_ALL=C wc -l < '%s'", path);
    p = popen(cmd, "r");
    if (!p)
        return -1.0;
    if (fscanf(p, "%ld", lines) != 1)
        *lines = -1;
    if (pclose(p) != 0)
        return -1.0;
    return now_s() - t0;
}

int main(int argc, char **argv)
{
    char path[1024];
    long rows = 2000000, n = 0, bad = 0, lines = 0;
    double best_read = 1e300, best_wc = 1e300, sum = 0.0, mb;
    struct stat st;
    int i;

    if (argc > 2) {
        fprintf(stderr, "usage: bench_csvread [ROWS | FILE]\n");
        return 1;
    }
    if (argc == 2 && strspn(argv[1], "0123456789e.") != strlen(argv[1])) {
        snprintf(path, sizeof path, "%s", argv[1]);
    } else {
        const char *tmp = getenv("TMPDIR");
        if (argc == 2)
            rows = (long)strtod(argv[1], NULL);
        if (rows < 1) {
            fprintf(stderr, "bench_csvread: ROWS must be positive\n");
            return 1;
        }
        snprintf(path, sizeof path, "%s/sb_bench_soundings_%ld.csv",
                 tmp && *tmp ? tmp : "/tmp", rows);
        if (stat(path, &st) != 0 || wc_pass(path, &lines) < 0 ||
            lines != rows + 1) {
            double t0 = now_s();
            fprintf(stderr, "writing %ld invented soundings to %s ...\n",
                    rows, path);
            if (write_soundings(path, rows) != 0) {
                perror(path);
                return 1;
            }
            fprintf(stderr, "  written in %.1f s\n", now_s() - t0);
        }
    }
    if (stat(path, &st) != 0) {
        perror(path);
        return 1;
    }
    mb = (double)st.st_size / 1e6;

    /* Warm the page cache once with each, then keep the best of RUNS. */
    for (i = 0; i <= RUNS; i++) {
        double t = wc_pass(path, &lines);
        if (t < 0) {
            fprintf(stderr, "bench_csvread: wc -l failed\n");
            return 1;
        }
        if (i > 0 && t < best_wc)
            best_wc = t;
        t = read_pass(path, &n, &bad, &sum);
        if (t < 0)
            return 1;
        if (i > 0 && t < best_read)
            best_read = t;
    }

    printf("file: %s (%.1f MB, %ld rows, %ld bad)\n", path, mb, n, bad);
    printf("checksum of parsed values: %.6e\n", sum);
    printf("sb_csv read + 5 numbers/row: %.3f s  %.2f Mrows/s  %.0f MB/s\n",
           best_read, (double)n / best_read / 1e6, mb / best_read);
    printf("wc -l:                       %.3f s  %.2f Mlines/s %.0f MB/s\n",
           best_wc, (double)lines / best_wc / 1e6, mb / best_wc);
    printf("throughput ratio reader / wc -l: %.2f (target >= 0.33: %s)\n",
           best_wc / best_read, best_wc / best_read >= 1.0 / 3.0 ? "met"
                                                                  : "not met");
    return 0;
}
