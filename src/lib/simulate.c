/*
 * swathbudget — synthetic survey generator (see simulate.h).
 */
#include "swathbudget/simulate.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/density.h"
#include "swathbudget/effort.h"
#include "swathbudget/georef.h"
#include "swathbudget/propagate.h"
#include "swathbudget/swath.h"

#define PI 3.14159265358979323846
#define DEG (PI / 180.0)
/* Beams stay this far inside the maximum angle, so that the angle written
 * with three decimals never exceeds it. */
#define ANGLE_MARGIN (0.005 * DEG)
/* Seafloor at least this far below the transducer for a beam to count. */
#define MIN_CLEARANCE_M 0.5

void sb_simulate_opts_default(struct sb_simulate_opts *o)
{
    memset(o, 0, sizeof *o);
    o->seed = 1;
    o->thu_rule = SB_THU_EXACT;
    o->ping_spacing_m = 5.0;
    o->beams = 41;
    o->n_crosslines = 3;
    o->relief = SB_RELIEF_FEATURES;
    o->with_tpu = 0;
    o->max_soundings = SB_SIMULATE_SOUNDINGS_DEFAULT;
}

/* The area's frame: u along the mainscheme lines, w across (u turned 90
 * degrees clockwise), and the outline's extent in both. */
struct frame {
    double ue, un, we, wn;
    double s0, s1, v0, v1; /* extents along u and along w, m */
};

static void frame_of(const struct sb_area *a, double az, struct frame *f)
{
    f->ue = sin(az);
    f->un = cos(az);
    f->we = cos(az);
    f->wn = -sin(az);
    f->s0 = f->v0 = INFINITY;
    f->s1 = f->v1 = -INFINITY;
    for (int i = 0; i < a->n_vertices; i++) {
        double s = a->vertex_e[i] * f->ue + a->vertex_n[i] * f->un;
        double v = a->vertex_e[i] * f->we + a->vertex_n[i] * f->wn;

        f->s0 = fmin(f->s0, s);
        f->s1 = fmax(f->s1, s);
        f->v0 = fmin(f->v0, v);
        f->v1 = fmax(f->v1, v);
    }
}

double sb_simulate_seafloor(const struct sb_area *a, int relief,
                            double min_depth_m, double e, double n)
{
    double d = sb_area_depth_at(a, e, n);

    if (relief == SB_RELIEF_FEATURES) {
        struct frame f;
        double s, v, sm, vm, ext, r, sigma, sb;

        frame_of(a, 0.0, &f); /* fixed to grid north: the features do not
                                 depend on the line layout */
        s = e * f.ue + n * f.un;
        v = e * f.we + n * f.wn;
        ext = fmin(f.s1 - f.s0, f.v1 - f.v0);
        vm = 0.5 * (f.v0 + f.v1);
        /* mound: Gaussian, sd a sixth of the smaller extent, its top 5 %
         * of the depth there shoaler (a gentle rise a cell can follow) */
        sm = f.s0 + 0.3 * (f.s1 - f.s0);
        sigma = ext / 6.0;
        r = hypot(s - sm, v - vm);
        d -= 0.05 * sb_area_depth_at(a, sm * f.ue + vm * f.we,
                                     sm * f.un + vm * f.wn) *
             exp(-0.5 * r * r / (sigma * sigma));
        /* block: 24 m along north, 8 m across, 3 m proud */
        sb = f.s0 + 0.7 * (f.s1 - f.s0);
        if (fabs(s - sb) <= 12.0 && fabs(v - vm) <= 4.0)
            d -= 3.0;
    }
    return d > min_depth_m ? d : min_depth_m;
}

/* Point in polygon by the even-odd rule (crossings of a ray to +e). */
static int inside(const struct sb_area *a, double e, double n)
{
    int in = 0;

    for (int i = 0, j = a->n_vertices - 1; i < a->n_vertices; j = i++) {
        double ei = a->vertex_e[i], ni = a->vertex_n[i];
        double ej = a->vertex_e[j], nj = a->vertex_n[j];

        if ((ni > n) != (nj > n) &&
            e < (ej - ei) * (n - ni) / (nj - ni) + ei)
            in = !in;
    }
    return in;
}

/* ---- one line ----------------------------------------------------------- */

struct sim {
    const struct sb_system *sys;
    const struct sb_horiz95 *h95;
    const struct sb_area *area;
    const struct sb_simulate_opts *o;
    FILE *out;
    gsl_rng *rng;
    double tx;       /* transducer depth below the surface, m */
    double amax;     /* largest beam angle used, rad */
    struct sb_simulate_stats *st;
};

static double draw(gsl_rng *r, double u, enum sb_dist dist)
{
    if (u == 0)
        return 0;
    if (dist == SB_DIST_RECT) /* uniform on +/- sqrt(3) u: sd u */
        return gsl_ran_flat(r, -sqrt(3.0) * u, sqrt(3.0) * u);
    return gsl_ran_gaussian_ziggurat(r, u);
}

/* Pings along (e0, n0) -> (e1, n1), inside the outline only. */
static int run_line(struct sim *s, const char *name, double e0, double n0,
                    double e1, double n1, int count_only, uint64_t *count,
                    struct sb_error *err)
{
    double len = hypot(e1 - e0, n1 - n0), he, hn, se, sn;
    long pings = (long)floor(len / s->o->ping_spacing_m) + 1;
    double dx[SB_COMP_COUNT];
    double min_depth = s->tx + MIN_CLEARANCE_M;

    if (len <= 0)
        return SB_OK;
    he = (e1 - e0) / len;
    hn = (n1 - n0) / len;
    se = hn; /* starboard: the heading turned 90 degrees clockwise */
    sn = -he;
    for (long p = 0; p < pings; p++) {
        double t = p * s->o->ping_spacing_m;
        double pe = e0 + t * he, pn = n0 + t * hn;

        if (!inside(s->area, pe, pn))
            continue;
        if (count_only) {
            *count += (uint64_t)s->o->beams;
            continue;
        }
        for (int i = 0; i < s->o->beams; i++) {
            double th = -s->amax + 2 * s->amax * i / (s->o->beams - 1);
            double y = 0, d = 0, qe = pe, qn = pn, enz[3];
            struct sb_beam b;
            int rc, ok = 1;

            /* where the beam meets the seafloor: across distance y with
             * y = (depth there - transducer depth) tan(theta), by fixed
             * point iteration (converges for slopes below the beam's
             * grazing angle, which any plausible seafloor is) */
            for (int it = 0; it < 8; it++) {
                d = sb_simulate_seafloor(s->area, s->o->relief, min_depth, qe,
                                         qn);
                y = (d - s->tx) * tan(th);
                qe = pe + y * se;
                qn = pn + y * sn;
            }
            d = sb_simulate_seafloor(s->area, s->o->relief, min_depth, qe, qn);
            if (d <= min_depth) {
                s->st->skipped++;
                continue;
            }
            rc = sb_beam_setup(s->sys, d, th, &b, err);
            if (rc != SB_OK)
                return rc;
            for (int c = 0; c < SB_COMP_COUNT; c++)
                dx[c] = draw(s->rng, b.u[c], b.dist[c]);
            sb_georef_error(&b, dx, enz);
            if (!isfinite(enz[0]) || !isfinite(enz[1]) || !isfinite(enz[2]))
                return sb_error_set(err, SB_ENUM, "", 0, 0,
                                    "non-finite sounding error at depth %g "
                                    "m, angle %g deg",
                                    d, th / DEG);
            /* E of the engine is across-track (starboard), N along */
            if (fprintf(s->out, "%s,%.3f,%.3f,%.3f,%.3f", name,
                        qe + enz[0] * se + enz[1] * he,
                        qn + enz[0] * sn + enz[1] * hn, d + enz[2],
                        th / DEG) < 0)
                ok = 0;
            if (ok && s->o->with_tpu) {
                struct sb_tpu tpu;

                if ((rc = sb_propagate(&b, s->h95, &tpu, NULL)) != SB_OK)
                    return sb_error_set(err, rc, "", 0, 0,
                                        "propagation failed at depth %g m",
                                        d);
                if (fprintf(s->out, ",%.4f,%.4f", tpu.tvu95_m,
                            s->o->thu_rule == SB_THU_S44 ? tpu.thu95_s44_m
                                                         : tpu.thu95_m) < 0)
                    ok = 0;
            }
            if (!ok || fputc('\n', s->out) == EOF)
                return sb_error_set(err, SB_EIO, "", 0, 0,
                                    "could not write the survey");
            s->st->soundings++;
            s->st->depth_min_m = fmin(s->st->depth_min_m, d);
            s->st->depth_max_m = fmax(s->st->depth_max_m, d);
        }
    }
    return SB_OK;
}

/* All lines, once counting (count_only) and once writing. */
static int run_all(struct sim *s, const struct sb_effort *plan,
                   const struct frame *f, int count_only, uint64_t *count,
                   struct sb_error *err)
{
    char name[32];
    int rc;

    for (size_t k = 0; k < plan->n_lines; k++) {
        const struct sb_effort_line *l = &plan->lines[k];

        snprintf(name, sizeof name, "M%03zu", k + 1);
        /* alternate directions, as a launch runs them */
        rc = k % 2 == 0 ? run_line(s, name, l->e0, l->n0, l->e1, l->n1,
                                   count_only, count, err)
                        : run_line(s, name, l->e1, l->n1, l->e0, l->n0,
                                   count_only, count, err);
        if (rc != SB_OK)
            return rc;
    }
    for (int k = 0; k < s->o->n_crosslines; k++) {
        double sk = f->s0 + (k + 0.5) / s->o->n_crosslines * (f->s1 - f->s0);

        snprintf(name, sizeof name, "X%02d", k + 1);
        rc = run_line(s, name, sk * f->ue + f->v0 * f->we,
                      sk * f->un + f->v0 * f->wn, sk * f->ue + f->v1 * f->we,
                      sk * f->un + f->v1 * f->wn, count_only, count, err);
        if (rc != SB_OK)
            return rc;
    }
    return SB_OK;
}

int sb_simulate(const struct sb_system *sys, const struct sb_horiz95 *h95,
                const struct sb_area *area, const struct sb_simulate_opts *o,
                FILE *out, struct sb_simulate_stats *st, struct sb_error *err)
{
    struct sb_density_params dp;
    struct sb_usable_ctx uc;
    struct sb_effort plan;
    double speed;
    struct frame f;
    struct sim s;
    uint64_t count = 0;
    int rc;

    memset(st, 0, sizeof *st);
    if (!o->order)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "no order for the line spacing (expected one)");
    if (!(o->ping_spacing_m > 0 && o->ping_spacing_m <= 10000))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "ping spacing %g m (expected above 0, at most "
                            "10000 m)",
                            o->ping_spacing_m);
    if (o->beams < 2 || o->beams > SB_SIMULATE_BEAMS_MAX)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "%d beams (expected 2 to %d)", o->beams,
                            SB_SIMULATE_BEAMS_MAX);
    if (o->n_crosslines < 1 || o->n_crosslines > SB_SIMULATE_CROSSLINES_MAX)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "%d crosslines (expected 1 to %d)",
                            o->n_crosslines, SB_SIMULATE_CROSSLINES_MAX);
    if ((o->thu_rule == SB_THU_EXACT || o->with_tpu) && !h95)
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "no THU table (expected one from "
                            "sb_horiz95_alloc)");
    /* the layout of `compare --area`: the usable half-width (TVU/THU fail
     * angle, and the density limit when the system states its beams) at
     * the speed the effort estimate picks */
    memset(&uc, 0, sizeof uc);
    uc.sys = sys;
    uc.h95 = h95;
    uc.order = o->order;
    uc.thu_rule = o->thu_rule;
    uc.density = sb_density_params_from_system(sys, &dp) ? &dp : NULL;
    memset(&plan, 0, sizeof plan);
    {
        enum sb_speed_reason why;

        if ((rc = sb_effort_speed(area, &uc, &speed, &why, err)) != SB_OK)
            return rc;
    }
    uc.speed_mps = speed;
    rc = sb_effort_plan(area, speed, sb_usable_halfwidth, &uc, &plan, err);
    if (rc != SB_OK)
        return rc;
    if (!plan.feasible || plan.n_lines == 0) {
        double d = plan.infeasible_depth_m;

        sb_effort_release(&plan);
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "no usable swath for order %s at depth %.1f m "
                            "(expected a system that meets the order at "
                            "nadir everywhere in the area)",
                            o->order->id, d);
    }
    frame_of(area, plan.azimuth_rad, &f);
    memset(&s, 0, sizeof s);
    s.sys = sys;
    s.h95 = h95;
    s.area = area;
    s.o = o;
    s.out = out;
    s.st = st;
    s.tx = sys->vertical.draft + sys->vertical.squat + sys->vertical.loading;
    s.amax = sys->echosounder.max_angle - ANGLE_MARGIN;
    st->n_main = plan.n_lines;
    st->n_cross = (size_t)o->n_crosslines;
    st->spacing_min_m = plan.spacing_min_m;
    st->spacing_max_m = plan.spacing_max_m;
    st->azimuth_rad = plan.azimuth_rad;
    st->depth_min_m = INFINITY;
    st->depth_max_m = -INFINITY;
    rc = run_all(&s, &plan, &f, 1, &count, err);
    if (rc == SB_OK && count > o->max_soundings)
        rc = sb_error_set(err, SB_EINPUT, "", 0, 0,
                          "the survey would have %llu soundings (expected "
                          "at most %llu: use a larger ping spacing or fewer "
                          "beams)",
                          (unsigned long long)count,
                          (unsigned long long)o->max_soundings);
    if (rc == SB_OK) {
        s.rng = gsl_rng_alloc(gsl_rng_mt19937);
        if (!s.rng)
            rc = sb_error_set(err, SB_ENOMEM, "", 0, 0,
                              "out of memory for the random generator");
    }
    if (rc == SB_OK) {
        gsl_rng_set(s.rng, (unsigned long)o->seed);
        if (fprintf(out, "line,easting_m,northing_m,depth_m,beam_angle_deg%s\n",
                    o->with_tpu ? ",tvu95_m,thu95_m" : "") < 0)
            rc = sb_error_set(err, SB_EIO, "", 0, 0,
                              "could not write the survey");
    }
    if (rc == SB_OK)
        rc = run_all(&s, &plan, &f, 0, &count, err);
    gsl_rng_free(s.rng);
    sb_effort_release(&plan);
    if (rc == SB_OK && st->soundings == 0)
        rc = sb_error_set(err, SB_EINPUT, "", 0, 0,
                          "no sounding falls inside the area (expected an "
                          "outline larger than the ping spacing)");
    return rc;
}
