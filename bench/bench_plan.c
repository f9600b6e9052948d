/*
 * swathbudget — benchmark of the plan workload: the full GUM propagation
 * (Jacobian by central differences of the forward model) at 200 depths x
 * 751 beam angles (0 to 75 deg in 0.1 deg), port and starboard, for an
 * invented mid-size survey vessel of the Kestrel Sound scenario; then the
 * fail angles for one order at the same 200 depths.  Three cases: the
 * constant column, the same vessel with a 50-layer measured profile (ray
 * tracing on the hot path), and five casts of 50 samples (the mean traced,
 * the casts' spread as the refraction component); then Monte Carlo trials
 * per second of the exact forward model for each (1 thread only).
 *
 * Targets (issues): the constant grid under 0.5 s on a 2-core machine; with
 * the 50-layer profile under 1 s.  Prints points,
 * seconds and points per second.  Exit status 1 if the library fails, never
 * because of the timing (a benchmark reports, it does not judge).
 *
 * usage: bench_plan [threads]   (default 1; the grid is split by angle)
 */
#include <math.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "swathbudget/georef.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/montecarlo.h"
#include "swathbudget/propagate.h"
#include "swathbudget/swath.h"
#include "swathbudget/system.h"

#define DEG (3.14159265358979323846 / 180.0)
#define ND 200
#define NA 751

static void st(struct sb_stated *s, double u_si, unsigned dim)
{
    memset(s, 0, sizeof *s);
    s->value = s->u = s->written = u_si;
    s->dim = dim;
    s->type = SB_UTYPE_SD;
    s->dist = SB_DIST_NORMAL;
}

static void lever(struct sb_lever_arm *l, double x, double y, double z, double u)
{
    l->x = x;
    l->y = y;
    l->z = z;
    for (int i = 0; i < 3; i++)
        st(&l->u[i], u, SB_DIM_LENGTH);
}

/* The invented survey vessel "Kestrel Tern" (demo figures, not any
 * product's specification): 300 kHz flat-array multibeam, PPP positioning,
 * water level from the harbour gauge. */
static void demo_system(struct sb_system *s)
{
    sb_system_init_defaults(s);
    strcpy(s->name, "kestrel-tern");
    strcpy(s->title, "Kestrel Tern, 300 kHz flat array, PPP (invented)");
    lever(&s->antenna, 1.20, 0.40, -8.50, 0.01);
    lever(&s->transducer, 0.50, 1.10, 2.30, 0.01);
    lever(&s->motion_sensor, 0.0, 0.0, 0.0, 0.005);
    st(&s->positioning.horizontal, 0.10, SB_DIM_LENGTH);
    st(&s->positioning.vertical, 0.15, SB_DIM_LENGTH);
    st(&s->positioning.latency, 0.001, SB_DIM_TIME);
    st(&s->motion.roll, 0.02 * DEG, SB_DIM_ANGLE);
    st(&s->motion.pitch, 0.02 * DEG, SB_DIM_ANGLE);
    st(&s->motion.heading, 0.05 * DEG, SB_DIM_ANGLE);
    st(&s->motion.heave, 0.05, SB_DIM_LENGTH);
    st(&s->motion.heave_fraction, 0.05, SB_DIM_RATIO);
    st(&s->motion.latency, 0.002, SB_DIM_TIME);
    st(&s->motion.align_roll, 0.02 * DEG, SB_DIM_ANGLE);
    st(&s->motion.align_pitch, 0.05 * DEG, SB_DIM_ANGLE);
    st(&s->motion.align_heading, 0.05 * DEG, SB_DIM_ANGLE);
    s->sound_speed.surface = 1500.0;
    st(&s->sound_speed.surface_u, 0.5, SB_DIM_SPEED);
    s->sound_speed.column = 1490.0;
    st(&s->sound_speed.column_u, 0.002, SB_DIM_RATIO);
    s->echosounder.frequency = 300e3;
    s->echosounder.beam_across = 1.0 * DEG;
    s->echosounder.beam_along = 1.0 * DEG;
    s->echosounder.array = SB_ARRAY_FLAT;
    s->echosounder.range_mode = SB_RANGE_SAMPLING;
    s->echosounder.sample_rate = 30e3;
    s->echosounder.pulse_length = 50e-6;
    st(&s->echosounder.pointing, 0.10, SB_DIM_RATIO);
    s->echosounder.max_angle = 75.0 * DEG;
    s->vertical.method = SB_VREF_TIDE;
    s->vertical.draft = 2.3;
    st(&s->vertical.draft_u, 0.02, SB_DIM_LENGTH);
    s->vertical.squat = 0.05;
    st(&s->vertical.squat_u, 0.03, SB_DIM_LENGTH);
    st(&s->vertical.loading_u, 0.02, SB_DIM_LENGTH);
    st(&s->vertical.water_level, 0.03, SB_DIM_LENGTH);
    st(&s->vertical.zoning, 0.05, SB_DIM_LENGTH);
    s->conditions.speed = 4.0;
    s->conditions.roll_amplitude = 3.0 * DEG;
    s->conditions.roll_period = 8.0;
    s->conditions.pitch_amplitude = 1.5 * DEG;
    s->conditions.pitch_period = 6.0;
    s->conditions.heave_amplitude = 0.5;
    s->conditions.heave_period = 7.0;
}

static double now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec + 1e-9 * ts.tv_nsec;
}

struct job {
    const struct sb_system *sys;
    const struct sb_horiz95 *h95;
    const double *depths;
    const double *angles; /* 2 NA signed angles */
    size_t a0, a1;        /* angle range of this thread */
    struct sb_grid_point *out;
    int rc;
};

static void *run(void *p)
{
    struct job *j = p;
    struct sb_error err;
    /* one grid call per angle slice: out is [depth][angle] for the slice */
    j->rc = sb_swath_grid(j->sys, j->h95, j->depths, ND, j->angles + j->a0, j->a1 - j->a0,
                          j->out, &err);
    return NULL;
}

/* An invented late-summer profile of the Kestrel Sound anchorage (demo
 * figures): warm mixed layer, a thermocline near 18 m, then a slow rise
 * with pressure.  n samples from 0 to 200 m: n layers below the
 * transducer with the half-space (the 50-layer case of the issue).
 * shift_mps and tilt move it for the casts case. */
static void demo_profile(double *z, double *c, int n, double shift_mps, double tilt)
{
    for (int i = 0; i < n; i++) {
        z[i] = 200.0 * i / (n - 1);
        c[i] = 1500.0 - 12.0 * tanh((z[i] - 18.0) / 6.0) + 0.016 * z[i] + shift_mps +
               tilt * exp(-z[i] / 30.0);
    }
}

/* The plan workload (grid + fail angles) for one system. */
static int plan_case(const char *label, const struct sb_system *sys,
                     const struct sb_horiz95 *h95, int threads)
{
    static double depths[ND], angles[2 * NA];
    struct sb_error err;
    for (int i = 0; i < ND; i++)
        depths[i] = 5.0 + i * (200.0 - 5.0) / (ND - 1); /* 5 .. 200 m */
    for (int i = 0; i < NA; i++) {
        angles[i] = -i * 0.1 * DEG;     /* port */
        angles[NA + i] = i * 0.1 * DEG; /* starboard */
    }
    const size_t npts = (size_t)ND * 2 * NA;
    struct sb_grid_point *out = malloc(npts * sizeof *out);
    struct job *jobs = calloc((size_t)threads, sizeof *jobs);
    pthread_t *tid = calloc((size_t)threads, sizeof *tid);
    if (!out || !jobs || !tid) {
        fprintf(stderr, "bench_plan: out of memory\n");
        return 1;
    }

    double t0 = now();
    size_t per = (2 * NA + threads - 1) / threads, pos = 0;
    for (int k = 0; k < threads; k++) {
        size_t a0 = pos, a1 = pos + per > 2 * NA ? 2 * NA : pos + per;
        jobs[k] = (struct job){ sys, h95, depths, angles, a0, a1, out + (size_t)ND * a0, 0 };
        pos = a1;
        pthread_create(&tid[k], NULL, run, &jobs[k]);
    }
    int bad = 0;
    for (int k = 0; k < threads; k++) {
        pthread_join(tid[k], NULL);
        bad |= jobs[k].rc;
    }
    double t1 = now();
    if (bad) {
        fprintf(stderr, "bench_plan: grid failed\n");
        return 1;
    }
    double checksum = 0.0;
    size_t turned = 0;
    for (size_t i = 0; i < npts; i++) {
        if (out[i].ray_turns) {
            turned++;
            continue;
        }
        checksum += out[i].tvu95_m + out[i].thu95_m;
    }
    printf("[%s] plan grid: %d depths x %d angles x 2 sides = %zu points, full Jacobian, "
           "%d thread(s)\n", label, ND, NA, npts, threads);
    printf("  time_s %.4f  points_per_s %.0f  (target: under 1 s)  checksum %.6f  "
           "rays_turning %zu\n", t1 - t0, npts / (t1 - t0), checksum, turned);

    /* fail angles for S-44 ed. 6 Order 1a (TVU a = 0.5 m, b = 0.013; THU
     * 5 m + 5 % of depth) at the same depths */
    double t2 = now();
    double wsum = 0.0;
    for (int i = 0; i < ND; i++) {
        struct sb_swath_result r;
        double d = depths[i];
        double tvu = sqrt(0.25 + (0.013 * d) * (0.013 * d)), thu = 5.0 + 0.05 * d;
        if (sb_swath_fail(sys, h95, d, tvu, thu, SB_THU_EXACT, &r, &err)) {
            fprintf(stderr, "bench_plan: %s\n", err.msg);
            return 1;
        }
        wsum += r.width_m;
    }
    double t3 = now();
    printf("[%s] fail angles: %d depths, both sides, Order 1a: time_s %.4f  (sum of widths "
           "%.3f m)\n", label, ND, t3 - t2, wsum);
    free(out);
    free(jobs);
    free(tid);
    return 0;
}

static void beam_model(const void *ctx, const double *dx, double out[3])
{
    sb_georef_error(ctx, dx, out);
}

/* Monte Carlo trials per second on one core (the exact forward model, so
 * with a profile every trial re-traces its ray). */
static int mc_case(const char *label, const struct sb_system *sys)
{
    struct sb_beam beam;
    struct sb_error err;
    if (sb_beam_setup(sys, 150.0, 60.0 * DEG, &beam, &err)) {
        fprintf(stderr, "bench_plan: %s\n", err.msg);
        return 1;
    }
    struct sb_mc_problem p = { beam_model, &beam, SB_COMP_COUNT, beam.u, beam.dist };
    struct sb_mc_options o;
    sb_mc_options_default(&o);
    o.trials = 1000000;
    struct sb_mc_stats st;
    double best = 1e300;
    for (int rep = 0; rep < 3; rep++) {
        double t0 = now();
        if (sb_mc_run(&p, &o, sb_mc_stream_seed(o.seed, (uint64_t)rep), &st, &err)) {
            fprintf(stderr, "bench_plan: %s\n", err.msg);
            return 1;
        }
        double dt = now() - t0;
        if (dt < best)
            best = dt;
    }
    printf("[%s] Monte Carlo, depth 150 m, beam 60 deg: %.3g trials/s on 1 core  "
           "(tvu_mc_m %.4f)\n", label, (double)o.trials / best, st.abs_z95);
    return 0;
}

int main(int argc, char **argv)
{
    int threads = argc > 1 ? atoi(argv[1]) : 1;
    if (threads < 1 || threads > 64)
        threads = 1;
    struct sb_system sys;
    demo_system(&sys);
    struct sb_error err;
    if (sb_system_validate(&sys, &err)) {
        fprintf(stderr, "bench_plan: %s\n", err.msg);
        return 1;
    }
    struct sb_horiz95 *h95 = sb_horiz95_alloc(&err);
    if (!h95) {
        fprintf(stderr, "bench_plan: %s\n", err.msg);
        return 1;
    }
    int rc = plan_case("constant column", &sys, h95, threads);

    /* the same vessel with a measured 50-sample profile (50 layers) */
    struct sb_system prof = sys;
    double z[5][50], c[5][50];
    demo_profile(z[0], c[0], 50, 0.0, 0.0);
    if (!rc && (sb_system_set_profile(&prof, z[0], c[0], 50, &err) ||
                sb_system_validate(&prof, &err))) {
        fprintf(stderr, "bench_plan: %s\n", err.msg);
        rc = 1;
    }
    if (!rc)
        rc = plan_case("50-layer profile", &prof, h95, threads);

    /* and with five casts of the day (the mean traced, their spread a
     * component of the budget) */
    struct sb_system casts = sys;
    const double *zp[5], *cp[5];
    size_t nk[5];
    for (int k = 0; k < 5; k++) {
        demo_profile(z[k], c[k], 50, 0.6 * (k - 2), 1.5 * ((k % 2) ? 1.0 : -1.0));
        zp[k] = z[k];
        cp[k] = c[k];
        nk[k] = 50;
    }
    if (!rc && (sb_system_set_casts(&casts, zp, cp, nk, 5, SB_REFERENCE_MEAN, &err) ||
                sb_system_validate(&casts, &err))) {
        fprintf(stderr, "bench_plan: %s\n", err.msg);
        rc = 1;
    }
    if (!rc)
        rc = plan_case("5 casts x 50 samples", &casts, h95, threads);

    if (!rc && threads == 1)
        rc = mc_case("constant column", &sys) || mc_case("50-layer profile", &prof) ||
             mc_case("5 casts x 50 samples", &casts);
    sb_system_release(&prof);
    sb_system_release(&casts);
    sb_horiz95_free(h95);
    return rc;
}
