/*
 * Benchmark of the layered ray tracer (standalone program, run by
 * `make bench`).  Measures, on an invented 50-layer profile:
 *   - layer-table build (sb_raylayers_alloc + free),
 *   - per-ray table build (sb_ray_init, 50 layers),
 *   - time -> depth queries (sb_ray_at_time) and depth -> time queries
 *     (sb_ray_at_depth) per second,
 *   - the planning workload of the issue: 200 depths x 751 angles, each
 *     traced unperturbed plus 16 perturbed speed scales (a Jacobian's worth).
 * Prints one line per measurement; the numbers are timings, not checks.
 */
#include "swathbudget/raytrace.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

#define NL 50

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* Sink so that the compiler keeps the work. */
static volatile double sink;

int main(void)
{
    double z[NL], c[NL];
    for (int i = 0; i < NL; i++) { /* invented: thermocline then deep rise */
        z[i] = 4.0 * i * (1.0 + 0.05 * i);
        c[i] = 1500.0 - 25.0 * tanh((z[i] - 40.0) / 15.0) + 0.016 * z[i];
    }
    struct sb_error err;
    struct sb_raylayers *L = NULL;
    const double pi = 3.14159265358979323846;

    /* Layer table build. */
    int reps = 200000;
    double t0 = now_s();
    for (int r = 0; r < reps; r++) {
        if (sb_raylayers_alloc(z, c, NL, 2.5, &L, &err) != SB_OK) {
            fprintf(stderr, "bench_raytrace: %s\n", err.msg);
            return 1;
        }
        sb_raylayers_free(L);
    }
    double t1 = now_s();
    printf("raylayers_alloc+free (%d samples): %.3f us each\n", NL,
           1e6 * (t1 - t0) / reps);

    if (sb_raylayers_alloc(z, c, NL, 2.5, &L, &err) != SB_OK)
        return 1;
    double c0 = sb_raylayers_transducer_speed(L);
    static struct sb_ray ray;

    /* Per-ray table build. */
    reps = 1000000;
    t0 = now_s();
    for (int r = 0; r < reps; r++) {
        double th = (-75.0 + 150.0 * (r % 751) / 750.0) * pi / 180.0;
        sb_ray_init(L, sin(th) / c0, 1.0 + 1e-4 * (r % 7), &ray);
        sink = ray.t_s[NL - 1];
    }
    t1 = now_s();
    printf("ray_init (%zu layers): %.3f us each\n", sb_raylayers_count(L),
           1e6 * (t1 - t0) / reps);

    /* Queries on one 60-degree ray. */
    sb_ray_init(L, sin(60.0 * pi / 180.0) / c0, 1.0, &ray);
    double tmax;
    sb_ray_at_depth(&ray, 900.0, &tmax, NULL);
    reps = 10000000;
    double acc = 0.0, zq, xq;
    t0 = now_s();
    for (int r = 0; r < reps; r++) {
        sb_ray_at_time(&ray, tmax * (r % 1000) / 1000.0, &zq, &xq);
        acc += zq + xq;
    }
    t1 = now_s();
    sink = acc;
    printf("ray_at_time: %.1f million queries/s\n",
           reps / (t1 - t0) / 1e6);
    t0 = now_s();
    for (int r = 0; r < reps; r++) {
        sb_ray_at_depth(&ray, 2.5 + 897.5 * (r % 1000) / 1000.0, &zq, &xq);
        acc += zq + xq;
    }
    t1 = now_s();
    sink = acc;
    printf("ray_at_depth: %.1f million queries/s\n",
           reps / (t1 - t0) / 1e6);

    /* Planning workload: 751 angles x (1 + 16 scales) rays, 200 depths each. */
    const int nang = 751, nd = 200, npert = 16;
    long nturn = 0;
    t0 = now_s();
    for (int a = 0; a < nang; a++) {
        double th = (-75.0 + 0.2 * a) * pi / 180.0;
        for (int k = 0; k <= npert; k++) {
            double sc = 1.0 + (k == 0 ? 0.0 : 1e-4 * (k - 8.5));
            sb_ray_init(L, sin(th) / c0, sc, &ray);
            for (int d = 0; d < nd; d++) {
                double tq;
                if (sb_ray_at_depth(&ray, 5.0 + d * 4.0, &tq, &xq) != SB_OK)
                    nturn++;
                acc += tq + xq;
            }
        }
    }
    t1 = now_s();
    sink = acc;
    printf("plan workload (%d angles x %d depths x %d traces): %.3f s "
           "(%ld turned)\n", nang, nd, npert + 1, t1 - t0, nturn);

    sb_raylayers_free(L);
    return 0;
}
