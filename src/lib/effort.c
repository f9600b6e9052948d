/*
 * Line layout and survey effort over an area (the layout rules are in
 * include/swathbudget/effort.h and docs/area.md).
 */
#include "swathbudget/effort.h"

#include <math.h>
#include <stddef.h>
#include <stdlib.h>
#include <string.h>

#define PI 3.14159265358979323846 /* M_PI is not C11 */
#define BISECT_STEPS 80
/* Most crossings of one line with the outline's edges. */
#define CROSSINGS_MAX (SB_AREA_VERTICES_MAX + 2)

/* ---- long axis ---------------------------------------------------------- */

static int cmp_point(const void *pa, const void *pb)
{
    const double *a = pa, *b = pb;

    if (a[0] != b[0])
        return a[0] < b[0] ? -1 : 1;
    if (a[1] != b[1])
        return a[1] < b[1] ? -1 : 1;
    return 0;
}

static double turn(const double *o, const double *a, const double *b)
{
    return (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0]);
}

/* Convex hull by Andrew's monotone chain (Andrew 1979); hull[] gets the
 * corners counter-clockwise, returns their number.  Hand-rolled: a few lines,
 * and GSL has no geometry. */
static int hull(const struct sb_area *a, double (*pts)[2], double (*h)[2])
{
    int n = a->n_vertices, k = 0;

    for (int i = 0; i < n; i++) {
        pts[i][0] = a->vertex_e[i];
        pts[i][1] = a->vertex_n[i];
    }
    qsort(pts, (size_t)n, sizeof pts[0], cmp_point);
    for (int i = 0; i < n; i++) {
        while (k >= 2 && turn(h[k - 2], h[k - 1], pts[i]) <= 0)
            k--;
        h[k][0] = pts[i][0];
        h[k][1] = pts[i][1];
        k++;
    }
    for (int i = n - 2, t = k + 1; i >= 0; i--) {
        while (k >= t && turn(h[k - 2], h[k - 1], pts[i]) <= 0)
            k--;
        h[k][0] = pts[i][0];
        h[k][1] = pts[i][1];
        k++;
    }
    return k - 1;
}

static double wrap_pi(double az)
{
    while (az < 0.0)
        az += PI;
    while (az >= PI)
        az -= PI;
    return az;
}

double sb_effort_axis(const struct sb_area *a)
{
    double pts[SB_AREA_VERTICES_MAX][2], h[2 * SB_AREA_VERTICES_MAX + 1][2];
    double best_w = INFINITY, best_az = 0.0;
    int m;

    if (a->azimuth_given)
        return a->line_azimuth_rad;
    m = hull(a, pts, h);
    for (int i = 0; i < m; i++) {
        double de = h[i + 1][0] - h[i][0], dn = h[i + 1][1] - h[i][1];
        double len = hypot(de, dn), lo = INFINITY, hi = -INFINITY;

        if (len <= 0.0)
            continue;
        /* width across this edge: spread of projections on its normal */
        for (int k = 0; k < m; k++) {
            double p = (h[k][0] * dn - h[k][1] * de) / len;
            lo = fmin(lo, p);
            hi = fmax(hi, p);
        }
        /* ties (a square, a rectangle's opposite sides) keep the first */
        if (hi - lo < best_w * (1.0 - 1e-12)) {
            best_w = hi - lo;
            best_az = wrap_pi(atan2(de, dn));
        }
    }
    return best_az;
}

/* ---- one line ------------------------------------------------------------ */

struct frame {
    double ue, un;   /* along the lines */
    double we, wn;   /* across, to the right of u */
    double vmin, vmax;
};

struct table {
    double d0, step;   /* depth of node 0, spacing (0: one node) */
    int n;
    double h[SB_EFFORT_DEPTH_NODES];
};

static double table_h(const struct table *t, double d)
{
    double x;
    int i;

    if (t->n == 1 || t->step <= 0.0)
        return t->h[0];
    x = (d - t->d0) / t->step;
    if (x <= 0.0)
        return t->h[0];
    if (x >= t->n - 1)
        return t->h[t->n - 1];
    i = (int)x;
    return t->h[i] + (x - i) * (t->h[i + 1] - t->h[i]);
}

static int cmp_double(const void *pa, const void *pb)
{
    double a = *(const double *)pa, b = *(const double *)pb;

    return a < b ? -1 : a > b;
}

/* Evaluate the line at across coordinate v: its pieces inside the outline,
 * the narrowest half-width and the depth range along it. */
static void eval_line(const struct sb_area *a, const struct frame *f,
                      const struct table *t, double v,
                      struct sb_effort_line *out)
{
    double s[CROSSINGS_MAX];
    int ns = 0, n = a->n_vertices;
    double hmin = INFINITY, dmin = INFINITY, dmax = -INFINITY, len = 0.0;

    for (int k = 0; k < n && ns < CROSSINGS_MAX; k++) {
        int m = (k + 1) % n;
        double va = a->vertex_e[k] * f->we + a->vertex_n[k] * f->wn;
        double vb = a->vertex_e[m] * f->we + a->vertex_n[m] * f->wn;

        /* half-open rule: a corner exactly on the line counts once */
        if ((va <= v && v < vb) || (vb <= v && v < va)) {
            double r = (v - va) / (vb - va);
            double pe = a->vertex_e[k] + r * (a->vertex_e[m] - a->vertex_e[k]);
            double pn = a->vertex_n[k] + r * (a->vertex_n[m] - a->vertex_n[k]);

            s[ns++] = pe * f->ue + pn * f->un;
        }
    }
    qsort(s, (size_t)ns, sizeof s[0], cmp_double);
    for (int k = 0; k + 1 < ns; k += 2) {
        len += s[k + 1] - s[k];
        for (int j = 0; j < SB_EFFORT_SAMPLES; j++) {
            double sj = s[k] + (s[k + 1] - s[k]) * j / (SB_EFFORT_SAMPLES - 1);
            double d = sb_area_depth_at(a, sj * f->ue + v * f->we,
                                        sj * f->un + v * f->wn);
            double hw = table_h(t, d);

            hmin = fmin(hmin, hw);
            dmin = fmin(dmin, d);
            dmax = fmax(dmax, d);
        }
    }
    memset(out, 0, sizeof *out);
    out->offset_m = v - f->vmin;
    out->length_m = len;
    if (ns >= 2) {
        out->half_width_m = hmin;
        out->depth_min_m = dmin;
        out->depth_max_m = dmax;
        out->e0 = s[0] * f->ue + v * f->we;
        out->n0 = s[0] * f->un + v * f->wn;
        out->e1 = s[ns - 1] * f->ue + v * f->we;
        out->n1 = s[ns - 1] * f->un + v * f->wn;
    } else {
        /* outside the outline: no constraint from it */
        out->half_width_m = INFINITY;
    }
}

/* Keep a line strictly inside the outline's across extent. */
static double inside(const struct frame *f, double v)
{
    double eps = 1e-9 * (f->vmax - f->vmin);

    if (v < f->vmin + eps)
        return f->vmin + eps;
    if (v > f->vmax - eps)
        return f->vmax - eps;
    return v;
}

/* Smallest-bracket bisection of g(v) = v - base - k h(v) = 0 on [lo, hi],
 * g(lo) < 0 <= g(hi).  h is only piecewise smooth in v (the narrowest point
 * along a line may jump), so no derivative-based method. */
static double solve(const struct sb_area *a, const struct frame *f,
                    const struct table *t, double base, double k, double lo,
                    double hi)
{
    for (int i = 0; i < BISECT_STEPS; i++) {
        double mid = 0.5 * (lo + hi);
        struct sb_effort_line L;

        eval_line(a, f, t, inside(f, mid), &L);
        if (mid - base - k * fmin(L.half_width_m, 1e12) < 0.0)
            lo = mid;
        else
            hi = mid;
    }
    return hi;
}

static int build_table(const struct sb_area *a, sb_halfwidth_fn fn, void *ctx,
                       struct table *t, struct sb_effort *out,
                       struct sb_error *err)
{
    double dmin, dmax;
    int rc;

    sb_area_depth_range(a, &dmin, &dmax);
    t->d0 = dmin;
    t->n = dmax > dmin ? SB_EFFORT_DEPTH_NODES : 1;
    t->step = t->n > 1 ? (dmax - dmin) / (t->n - 1) : 0.0;
    for (int i = 0; i < t->n; i++) {
        double d = i == t->n - 1 ? dmax : dmin + i * t->step;

        if ((rc = fn(ctx, d, &t->h[i], err)) != SB_OK)
            return rc;
        if (!(t->h[i] >= 0.0 && isfinite(t->h[i])))
            return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                                "usable half-width %g m at %g m depth (a "
                                "finite width >= 0 was expected; this is a "
                                "bug)",
                                t->h[i], d);
        /* 1 mm of swath is no swath: nadir fails at this depth */
        if (t->h[i] < 1e-3 && !(out->feasible == 0)) {
            out->feasible = 0;
            out->infeasible_depth_m = d;
        }
    }
    return SB_OK;
}

int sb_effort_plan(const struct sb_area *a, double speed_mps,
                   sb_halfwidth_fn fn, void *ctx, struct sb_effort *out,
                   struct sb_error *err)
{
    struct frame f;
    struct table t;
    struct sb_effort_line L;
    double az, hmax = 0.0, v;
    size_t cap = 64;
    int rc;

    memset(out, 0, sizeof *out);
    out->feasible = 1;
    if (!(speed_mps > 0.0 && isfinite(speed_mps)))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "survey speed %g m/s (expected a finite speed "
                            "> 0)",
                            speed_mps);
    az = sb_effort_axis(a);
    f.ue = sin(az);
    f.un = cos(az);
    f.we = f.un;
    f.wn = -f.ue;
    f.vmin = INFINITY;
    f.vmax = -INFINITY;
    for (int k = 0; k < a->n_vertices; k++) {
        double vk = a->vertex_e[k] * f.we + a->vertex_n[k] * f.wn;
        f.vmin = fmin(f.vmin, vk);
        f.vmax = fmax(f.vmax, vk);
    }
    out->azimuth_rad = az;
    out->across_m = f.vmax - f.vmin;
    out->speed_mps = speed_mps;
    if ((rc = build_table(a, fn, ctx, &t, out, err)) != SB_OK)
        return rc;
    if (!out->feasible)
        return SB_OK;
    for (int i = 0; i < t.n; i++)
        hmax = fmax(hmax, t.h[i]);

    out->lines = malloc(cap * sizeof out->lines[0]);
    if (!out->lines)
        return sb_error_set(err, SB_ENOMEM, "", 0, 0, "out of memory");

    /* first line: v - h(v) = vmin, between vmin and vmin + hmax */
    v = solve(a, &f, &t, f.vmin, 1.0, f.vmin, f.vmin + hmax * (1 + 1e-9));
    v = inside(&f, v);
    for (;;) {
        eval_line(a, &f, &t, v, &L);
        if (out->n_lines == cap) {
            struct sb_effort_line *p;

            cap *= 2;
            p = realloc(out->lines, cap * sizeof out->lines[0]);
            if (!p) {
                sb_effort_release(out);
                return sb_error_set(err, SB_ENOMEM, "", 0, 0,
                                    "out of memory");
            }
            out->lines = p;
        }
        out->lines[out->n_lines++] = L;
        if (v + L.half_width_m >= f.vmax)
            break;
        if (out->n_lines >= SB_EFFORT_LINES_MAX) {
            sb_effort_release(out);
            return sb_error_set(err, SB_EINPUT, "", 0, 0,
                                "the layout needs more than %d lines "
                                "(expected a usable swath wider than %g m "
                                "for an area %g m across)",
                                SB_EFFORT_LINES_MAX, L.half_width_m * 2,
                                f.vmax - f.vmin);
        }
        {
            double k = 1.0 - a->overlap;
            double base = v + k * L.half_width_m;
            double nv = solve(a, &f, &t, base, k, v,
                              base + k * hmax * (1 + 1e-9) + 1e-9);

            /* a next line beyond the edge is pulled inside: its swath then
             * reaches the edge all the more */
            v = inside(&f, nv);
        }
    }
    for (size_t i = 0; i < out->n_lines; i++) {
        out->line_m += out->lines[i].length_m;
        if (i > 0) {
            double sp = out->lines[i].offset_m - out->lines[i - 1].offset_m;

            if (i == 1 || sp < out->spacing_min_m)
                out->spacing_min_m = sp;
            if (i == 1 || sp > out->spacing_max_m)
                out->spacing_max_m = sp;
        }
    }
    out->time_lines_s = out->line_m / speed_mps;
    out->time_turns_s = (double)(out->n_lines - 1) * a->turn_s;
    out->time_s = out->time_lines_s + out->time_turns_s;
    out->days = out->time_s / a->day_s;
    return SB_OK;
}

void sb_effort_release(struct sb_effort *e)
{
    if (!e)
        return;
    free(e->lines);
    e->lines = NULL;
    e->n_lines = 0;
}

/* ---- usable swath from the engine ---------------------------------------- */

int sb_usable_at(const struct sb_usable_ctx *c, double depth_m,
                 struct sb_usable *out, struct sb_error *err)
{
    const struct sb_system *s = c->sys;
    double tvu = sb_order_tvu(c->order, depth_m);
    double thu = sb_order_thu(c->order, depth_m);
    double feat;
    int rc;

    memset(out, 0, sizeof *out);
    out->depth_m = depth_m;
    out->depth_tx_m = depth_m - (s->vertical.draft + s->vertical.squat +
                                 s->vertical.loading);
    rc = sb_swath_fail(s, c->h95, depth_m, tvu, thu, c->thu_rule, &out->swath,
                       err);
    if (rc != SB_OK)
        return rc;
    /* the narrower half limits the swath (lines run both ways) */
    out->narrow = out->swath.port.across_m < out->swath.starboard.across_m
                      ? &out->swath.port
                      : &out->swath.starboard;
    out->angle_rad = out->narrow->angle_rad;
    out->half_width_m = out->narrow->across_m;
    out->feature_m = NAN;
    if (c->density && sb_order_feature(c->order, depth_m, &feat)) {
        out->density_applies = 1;
        out->feature_m = feat;
        rc = sb_density_limit(c->density, out->depth_tx_m, c->speed_mps, feat,
                              &out->density, err);
        if (rc != SB_OK)
            return rc;
        if (out->density.angle_rad < out->angle_rad) {
            out->by_density = 1;
            out->angle_rad = out->density.angle_rad;
            out->half_width_m = out->depth_tx_m * tan(out->angle_rad);
        }
    }
    return SB_OK;
}

int sb_usable_halfwidth(void *ctx, double depth_m, double *half_width_m,
                        struct sb_error *err)
{
    struct sb_usable u;
    int rc = sb_usable_at(ctx, depth_m, &u, err);

    if (rc == SB_OK)
        *half_width_m = u.half_width_m;
    return rc;
}

int sb_effort_speed(const struct sb_area *a, const struct sb_usable_ctx *c,
                    double *speed_mps, enum sb_speed_reason *reason,
                    struct sb_error *err)
{
    struct sb_usable_ctx plain = *c;
    double dmin, dmax, v = a->speed_mps;
    int rc;

    *speed_mps = a->speed_mps;
    *reason = SB_SPEED_PLANNED;
    if (!c->density)
        return SB_OK;
    plain.density = NULL; /* the TVU/THU angle alone */
    sb_area_depth_range(a, &dmin, &dmax);
    for (int i = 0; i < SB_EFFORT_DEPTH_NODES; i++) {
        double d = dmin + (dmax - dmin) * i / (SB_EFFORT_DEPTH_NODES - 1);
        double feat, vmax;
        struct sb_usable u;

        if (!sb_order_feature(c->order, d, &feat))
            continue;
        if ((rc = sb_usable_at(&plain, d, &u, err)) != SB_OK)
            return rc;
        if (u.narrow->reason == SB_SWATH_NADIR)
            continue; /* no swath to keep dense: the plan reports it */
        rc = sb_density_max_speed(c->density, u.depth_tx_m, feat,
                                  u.angle_rad, &vmax, err);
        if (rc != SB_OK)
            return rc;
        v = fmin(v, vmax);
        if (dmax == dmin)
            break;
    }
    if (v < a->speed_mps) {
        if (v >= a->min_speed_mps) {
            *speed_mps = v;
            *reason = SB_SPEED_DENSITY;
        } else {
            *speed_mps = a->min_speed_mps;
            *reason = SB_SPEED_FLOOR;
        }
    }
    return SB_OK;
}

const char *sb_speed_reason_name(enum sb_speed_reason r)
{
    switch (r) {
    case SB_SPEED_PLANNED: return "planned";
    case SB_SPEED_DENSITY: return "density";
    case SB_SPEED_FLOOR: return "min_speed";
    }
    return "?";
}

/* ---- stated inputs by name ----------------------------------------------- */

#define SYS_OFF(member) offsetof(struct sb_system, member)
#define L SB_DIM_LENGTH
#define A SB_DIM_ANGLE

static const struct sb_input_field FIELDS[] = {
    {"lever_arms.antenna.uncertainty",
     "lever_antenna_x,lever_antenna_y,lever_antenna_z", L, 0,
     SYS_OFF(antenna.u), 3},
    {"lever_arms.transducer.uncertainty", "lever_tx_x,lever_tx_y,lever_tx_z",
     L, 0, SYS_OFF(transducer.u), 3},
    {"lever_arms.motion_sensor.uncertainty",
     "lever_motion_x,lever_motion_y,lever_motion_z", L, 0,
     SYS_OFF(motion_sensor.u), 3},
    {"positioning.horizontal", "gnss_horizontal_e,gnss_horizontal_n", L,
     SB_STATED_2D, SYS_OFF(positioning.horizontal), 1},
    {"positioning.vertical", "ellipsoid_height", L, 0,
     SYS_OFF(positioning.vertical), 1},
    {"positioning.latency", "latency_position", SB_DIM_TIME, 0,
     SYS_OFF(positioning.latency), 1},
    {"motion.roll", "roll", A, 0, SYS_OFF(motion.roll), 1},
    {"motion.pitch", "pitch", A, 0, SYS_OFF(motion.pitch), 1},
    {"motion.heading", "heading", A, 0, SYS_OFF(motion.heading), 1},
    {"motion.heave", "heave", L, 0, SYS_OFF(motion.heave), 1},
    {"motion.heave_fraction", "heave_relative", SB_DIM_RATIO, 0,
     SYS_OFF(motion.heave_fraction), 1},
    {"motion.latency", "latency_roll,latency_pitch,latency_heave",
     SB_DIM_TIME, 0, SYS_OFF(motion.latency), 1},
    {"motion.alignment.roll", "align_roll", A, 0, SYS_OFF(motion.align_roll),
     1},
    {"motion.alignment.pitch", "align_pitch", A, 0,
     SYS_OFF(motion.align_pitch), 1},
    {"motion.alignment.heading", "align_heading", A, 0,
     SYS_OFF(motion.align_heading), 1},
    {"sound_speed.transducer.uncertainty", "surface_sound_speed",
     SB_DIM_SPEED | SB_DIM_RATIO, 0, SYS_OFF(sound_speed.surface_u), 1},
    {"sound_speed.water_column.uncertainty", "sound_speed_column",
     SB_DIM_SPEED | SB_DIM_RATIO, 0, SYS_OFF(sound_speed.column_u), 1},
    {"echosounder.range_resolution", "range", L, 0,
     SYS_OFF(echosounder.range_resolution), 1},
    {"echosounder.pointing", "beam_pointing,beam_pointing_along",
     SB_DIM_RATIO | A, 0, SYS_OFF(echosounder.pointing), 1},
    {"vertical_reference.draft.uncertainty", "draft", L, 0,
     SYS_OFF(vertical.draft_u), 1},
    {"vertical_reference.squat.uncertainty", "squat", L, 0,
     SYS_OFF(vertical.squat_u), 1},
    {"vertical_reference.loading.uncertainty", "loading", L, 0,
     SYS_OFF(vertical.loading_u), 1},
    {"vertical_reference.water_level", "water_level", L, 0,
     SYS_OFF(vertical.water_level), 1},
    {"vertical_reference.zoning", "tide_zoning", L, 0,
     SYS_OFF(vertical.zoning), 1},
    {"vertical_reference.separation", "separation_model", L, 0,
     SYS_OFF(vertical.separation), 1},
};

#undef L
#undef A

const struct sb_input_field *sb_input_fields(size_t *n)
{
    *n = sizeof FIELDS / sizeof FIELDS[0];
    return FIELDS;
}

/* Is word one of the comma-separated names in list? */
static int in_list(const char *list, const char *word)
{
    size_t w = strlen(word);

    while (*list) {
        size_t k = strcspn(list, ",");

        if (k == w && strncmp(list, word, w) == 0)
            return 1;
        list += k;
        if (*list == ',')
            list++;
    }
    return 0;
}

const struct sb_input_field *sb_input_field_find(const char *name)
{
    size_t n = sizeof FIELDS / sizeof FIELDS[0];

    for (size_t i = 0; i < n; i++)
        if (strcmp(FIELDS[i].path, name) == 0)
            return &FIELDS[i];
    for (size_t i = 0; i < n; i++)
        if (in_list(FIELDS[i].components, name))
            return &FIELDS[i];
    return NULL;
}

const struct sb_stated *sb_input_field_get(const struct sb_system *sys,
                                           const struct sb_input_field *f)
{
    return (const struct sb_stated *)((const char *)sys + f->offset);
}

int sb_whatif_apply(struct sb_system *sys, const char *assignment,
                    const struct sb_input_field **field,
                    struct sb_error *err)
{
    char name[96];
    const char *eq = strchr(assignment, '=');
    const struct sb_input_field *f;
    struct sb_stated st, *dst;
    struct sb_system trial;
    size_t len;
    int rc;

    if (!eq || eq == assignment)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "'%s' is not an assignment (expected "
                            "FIELD=VALUE, e.g. motion.roll=0.01 deg sd)",
                            assignment);
    len = (size_t)(eq - assignment);
    if (len >= sizeof name)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "field name too long (expected a field path of "
                            "the system file or an engine component name)");
    memcpy(name, assignment, len);
    name[len] = '\0';
    f = sb_input_field_find(name);
    if (!f)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "unknown field '%s' (expected a stated "
                            "uncertainty of the system file, e.g. "
                            "motion.roll, or an engine component name such "
                            "as roll; see docs/report.md)",
                            name);
    if ((rc = sb_stated_parse(eq + 1, f->dims, f->flags, &st, err)) != SB_OK) {
        sb_error_prefix(err, f->path);
        return rc;
    }
    if (st.dim == SB_DIM_ANGLE && st.value >= 0.5 * PI)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "%s: %g %s is not below 90 deg (expected an "
                            "angle uncertainty below 90 deg)",
                            f->path, st.written, st.unit);
    if (st.dim == SB_DIM_RATIO && st.value > 1.0)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "%s: %g %s is more than 100 %% (expected a "
                            "relative uncertainty of at most 100 %%)",
                            f->path, st.written, st.unit);
    /* A shallow copy: the trial shares the profile(s) *sys owns, so it
     * must never be released, only dropped. */
    trial = *sys;
    dst = (struct sb_stated *)((char *)&trial + f->offset);
    for (int k = 0; k < f->count; k++)
        dst[k] = st;
    if (f->offset == offsetof(struct sb_system, echosounder.range_resolution))
        trial.echosounder.range_mode = SB_RANGE_GIVEN;
    rc = sb_system_validate(&trial, err);
    if (rc == SB_OK) {
        *sys = trial;
        if (field)
            *field = f;
    }
    return rc;
}
