/*
 * Benchmark of the Monte Carlo trial loop (src/lib/montecarlo.c) on the
 * engine's forward model (src/lib/georef.c): forward-model trials per second
 * on one core, for one beam of a demo system with a constant sound-speed
 * profile.  Standalone: run by `make bench`, prints its figures and exits 0
 * (the target, 2e6 trials/s per core, is printed beside the result; a
 * benchmark is not a test and never fails on speed).  The best of five
 * runs is reported, to keep other load on the machine out of the figure.
 *
 *   bench_montecarlo [SYSTEM.yaml]   (default profiles/systems/kestrel-launch.yaml)
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "swathbudget/georef.h"
#include "swathbudget/montecarlo.h"
#include "swathbudget/spec.h"
#include "swathbudget/system.h"

#define TARGET_TRIALS_PER_S 2e6

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static void beam_model(const void *ctx, const double *dx, double out[3])
{
    sb_georef_error(ctx, dx, out);
}

int main(int argc, char **argv)
{
    const char *path = argc > 1 ? argv[1] : "profiles/systems/kestrel-launch.yaml";
    struct sb_system *sys = sb_system_alloc();
    struct sb_beam beam;
    struct sb_error err;
    char msg[SB_ERROR_FILE_MAX + SB_ERROR_MSG_MAX + 8];

    if (!sys) {
        fprintf(stderr, "bench_montecarlo: out of memory\n");
        return 1;
    }
    sb_error_clear(&err);
    if (sb_spec_load(path, sys, &err) != SB_OK ||
        sb_beam_setup(sys, 40.0, 0.7853981633974483, &beam, &err) != SB_OK) {
        sb_error_format(&err, msg, sizeof msg);
        fprintf(stderr, "bench_montecarlo: %s\n", msg);
        sb_system_free(sys);
        return 1;
    }
    struct sb_mc_problem p = {beam_model, &beam, SB_COMP_COUNT, beam.u,
                              beam.dist};
    size_t active = 0;
    for (int c = 0; c < SB_COMP_COUNT; c++)
        active += beam.u[c] > 0.0;

    struct sb_mc_options o;
    sb_mc_options_default(&o);
    o.trials = 4000000;
    struct sb_mc_stats s;
    double best = 1e300;
    for (int rep = 0; rep < 5; rep++) {
        double t0 = now_s();
        if (sb_mc_run(&p, &o, sb_mc_stream_seed(o.seed, (uint64_t)rep), &s,
                      &err) != SB_OK) {
            sb_error_format(&err, msg, sizeof msg);
            fprintf(stderr, "bench_montecarlo: %s\n", msg);
            sb_system_free(sys);
            return 1;
        }
        double dt = now_s() - t0;
        if (dt < best)
            best = dt;
    }
    printf("bench_montecarlo: system %s, depth 40 m, beam 45 deg, %zu of %d "
           "inputs uncertain\n",
           sys->name, active, (int)SB_COMP_COUNT);
    printf("bench_montecarlo: %zu trials in %.3f s (draws, forward model, "
           "statistics and sorting), 1 thread\n",
           o.trials, best);
    printf("bench_montecarlo: %.3g trials/s per core (target >= %.0e)\n",
           (double)o.trials / best, TARGET_TRIALS_PER_S);
    printf("bench_montecarlo: tvu_mc_m %.4f thu_mc_m %.4f bias_z_m %.5f\n",
           s.abs_z95, s.h95, s.mean_z);
    sb_system_free(sys);
    return 0;
}
