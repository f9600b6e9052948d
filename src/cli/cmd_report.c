/*
 * swathbudget report — one self-contained HTML file for a client (or one of
 * its plots as an SVG file): the usable swath of a system, how it was
 * worked out, every input as stated and as converted, and the cautions.
 *
 *   swathbudget report SYSTEM.yaml [--area AREA.yaml] [--standard ID|FILE]
 *                      [--order ID[,ID...]] [--depths D[,D...]|A:B:S]
 *                      [--mc TRIALS] [--seed N] [--thu-rule exact|s44]
 *                      -o REPORT.html
 *   swathbudget report SYSTEM.yaml --plot NAME [--depth D] [--order ...]
 *                      --format svg -o PLOT.svg
 *
 * The command computes (engine, effort, Monte Carlo); svg.c and html.c only
 * format.  Output goes through sb_outfile_* (atomic).
 */
#include "config.h"

#include <getopt.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "commands.h"
#include "swathbudget/area.h"
#include "swathbudget/density.h"
#include "swathbudget/effort.h"
#include "swathbudget/georef.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/html.h"
#include "swathbudget/montecarlo.h"
#include "swathbudget/orders.h"
#include "swathbudget/propagate.h"
#include "swathbudget/spec.h"
#include "swathbudget/svg.h"
#include "swathbudget/swath.h"
#include "swathbudget/system.h"
#include "swathbudget/writer.h"

#define CMD "report"
#define MAX_DEPTHS 64
#define DEPTH_MAX_M 12000.0
#define PI 3.14159265358979323846
#define RAD2DEG (180.0 / PI)
#define DEG2RAD (PI / 180.0)
#define MPS_PER_KN (1852.0 / 3600.0)
/* Angle step of the TVU/THU curves, deg, and depth samples of the fan. */
#define CURVE_STEP_DEG 0.5
#define FAN_POINTS 48
#define PLOT_W 540
#define PLOT_H 390
/* Trials per Monte Carlo point when --mc is given without a number. */
#define MC_TRIALS_MIN SB_MC_TRIALS_MIN

static const double default_depths[] = {10.0, 20.0, 50.0, 100.0, 200.0};

enum plot_kind {
    PLOT_TVU = 0,   /* tvu-angle */
    PLOT_THU,       /* thu-angle */
    PLOT_FAN,       /* angle-depth */
    PLOT_BARS_TVU,  /* breakdown-tvu */
    PLOT_BARS_THU,  /* breakdown-thu */
    PLOT_COUNT
};
static const char *const plot_names[PLOT_COUNT] = {
    "tvu-angle", "thu-angle", "angle-depth", "breakdown-tvu", "breakdown-thu"};

void cmd_report_help(FILE *f)
{
    fprintf(f,
            "usage: swathbudget report SYSTEM.yaml [--area AREA.yaml] "
            "[--standard ID|FILE]\n"
            "                          [--order ID[,ID...]] [--depths "
            "D[,D...]|A:B:S]\n"
            "                          [--mc TRIALS] [--seed N] [--thu-rule "
            "exact|s44]\n"
            "                          -o REPORT.html\n"
            "       swathbudget report SYSTEM.yaml --plot NAME [--depth D] "
            "[--order ID[,ID...]]\n"
            "                          --format svg -o PLOT.svg\n\n"
            "Write a single HTML file a client can open offline (inline "
            "style and SVG,\nno scripts, nothing fetched): a summary of the "
            "usable swath per depth, plots\nof TVU95 and THU95 against "
            "beam angle with the order limits and fail angles,\nthe usable "
            "half-angle against depth, the component breakdown, the survey\n"
            "effort over an area (--area), every input as stated and as a "
            "standard\nuncertainty, the equations used and the cautions.  "
            "With --plot, write one\nplot as an SVG file instead.\n\n"
            "options:\n"
            "  -o, --output FILE   the file to write (required)\n"
            "  --area AREA.yaml    survey area: its order heads the report, "
            "its depths\n"
            "                      set the depths shown, and the effort is "
            "estimated\n"
            "  --standard ID|FILE  compiled-in standard (default %s) or a "
            "YAML file\n"
            "  --order ID[,ID...]  orders to show (default: the area's "
            "order, else all;\n"
            "                      the first named heads the summary)\n"
            "  --depths LIST|A:B:S depths for the tables, m (default: five "
            "across the\n"
            "                      area, else 10,20,50,100,200); the "
            "angle plots use the\n"
            "                      first, middle and last\n"
            "  --mc TRIALS         add a Monte Carlo check (JCGM 101) with "
            "this many\n"
            "                      trials per point (at least %d)\n"
            "  --seed N            seed of the Monte Carlo draws (default "
            "1)\n"
            "  --thu-rule R        exact (default) or s44, as for plan\n"
            "  --plot NAME         one plot only: tvu-angle, thu-angle, "
            "angle-depth,\n"
            "                      breakdown-tvu or breakdown-thu\n"
            "  --depth D           depth of that plot, m (angle plots and "
            "breakdowns)\n"
            "  --format F          html (default) or svg (with --plot)\n"
            "  -h, --help          this text\n\n"
            "The report states that its figures are a-priori estimates to be "
            "confirmed by\nfield checks, deferring to the hydrographic "
            "authority and licensed practice.\n",
            SB_STANDARD_DEFAULT_ID, MC_TRIALS_MIN);
}

/* Everything the pages and plots are made from. */
struct ctx {
    const char *sys_file, *area_file;
    struct sb_system *sys;
    const struct sb_standard *std;
    const struct sb_order *sel[SB_STANDARD_ORDERS_MAX];
    size_t nsel;
    const struct sb_order *head;   /* the order of the summary */
    struct sb_area *area;
    struct sb_horiz95 *h95;
    int rule;
    struct sb_density_params dp;
    int has_dp;
    double depths[MAX_DEPTHS];
    size_t nd;
    double tx;                     /* transducer depth, m */
    size_t mc_trials;
    uint64_t seed;
    struct sb_error err;
};

static int fail(int rc)
{
    struct sb_error err;

    sb_error_set(&err, rc, "", 0, 0, "could not build the report (%s)",
                 sb_strerror(rc));
    return cli_report(CMD, rc, &err);
}

static int usable(struct ctx *c, const struct sb_order *o, double depth,
                  struct sb_usable *u)
{
    struct sb_usable_ctx uc = {c->sys, c->h95, o, c->rule,
                               c->has_dp ? &c->dp : NULL,
                               c->sys->conditions.speed};

    return sb_usable_at(&uc, depth, u, &c->err);
}

static int point(struct ctx *c, double depth, double angle_rad,
                 struct sb_tpu *t, struct sb_breakdown *bd)
{
    struct sb_beam b;
    int rc;

    if ((rc = sb_beam_setup(c->sys, depth, angle_rad, &b, &c->err)))
        return rc;
    if ((rc = sb_propagate(&b, c->h95, t, bd)))
        return sb_error_set(&c->err, rc, "", 0, 0,
                            "a propagated uncertainty is not finite at %g m, "
                            "%g deg",
                            depth, angle_rad * RAD2DEG);
    return SB_OK;
}

static double thu_of(const struct ctx *c, const struct sb_tpu *t)
{
    return c->rule == SB_THU_S44 ? t->thu95_s44_m : t->thu95_m;
}

/* ---- Monte Carlo check --------------------------------------------------- */

static void mc_model(const void *ctx, const double *dx, double out[3])
{
    sb_georef_error(ctx, dx, out);
}

static int mc_point(struct ctx *c, double depth, double angle_rad,
                    uint64_t key, struct sb_mc_stats *st)
{
    struct sb_beam b;
    struct sb_mc_options o;
    struct sb_mc_problem p;
    int rc;

    if ((rc = sb_beam_setup(c->sys, depth, angle_rad, &b, &c->err)))
        return rc;
    sb_mc_options_default(&o);
    o.seed = c->seed;
    o.trials = c->mc_trials;
    p.model = mc_model;
    p.ctx = &b;
    p.n_in = SB_COMP_COUNT;
    p.u = b.u;
    p.dist = b.dist;
    return sb_mc_run(&p, &o, sb_mc_stream_seed(c->seed, key), st, &c->err);
}

/* ---- plots --------------------------------------------------------------- */

/* TVU95 or THU95 against beam angle at one depth, with every order's limit
 * and the first order's fail angles. */
static int plot_angle(struct ctx *c, int thu, double depth,
                      struct sb_plot **out)
{
    char title[128], label[128];
    double amax = c->sys->echosounder.max_angle * RAD2DEG;
    size_t n = 0, cap = (size_t)(2 * amax / CURVE_STEP_DEG) + 3;
    double *x = malloc(cap * sizeof *x), *y = malloc(cap * sizeof *y);
    struct sb_plot *p;
    struct sb_usable u;
    int rc = SB_OK;

    snprintf(title, sizeof title, "%s95 against beam angle at %g m",
             thu ? "THU" : "TVU", depth);
    p = sb_plot_alloc(title, "beam angle (deg), port negative",
                      thu ? "THU95 (m)" : "TVU95 (m)");
    if (!p || !x || !y) {
        free(x);
        free(y);
        sb_plot_free(p);
        return sb_error_set(&c->err, SB_ENOMEM, "", 0, 0, "out of memory");
    }
    for (double a = -amax; a <= amax + 1e-9 && n < cap; a += CURVE_STEP_DEG) {
        struct sb_tpu t;
        double ang = fmax(-amax, fmin(amax, a));

        if ((rc = point(c, depth, ang * DEG2RAD, &t, NULL)))
            goto done;
        x[n] = ang;
        y[n] = thu ? thu_of(c, &t) : t.tvu95_m;
        n++;
    }
    if ((rc = sb_plot_series(p, "linear (GUM) estimate", x, y, n, 0, 0)))
        goto done;
    if (c->mc_trials) {
        static const double ang[] = {-60, -45, -30, -15, 0, 15, 30, 45, 60};
        size_t m = 0;

        for (size_t i = 0; i < sizeof ang / sizeof ang[0]; i++) {
            struct sb_mc_stats st;

            if (fabs(ang[i]) > amax)
                continue;
            if ((rc = mc_point(c, depth, ang[i] * DEG2RAD,
                               (uint64_t)(depth * 1000.0) * 1000 + i, &st)))
                goto done;
            x[m] = ang[i];
            y[m] = thu ? st.h95 : st.abs_z95;
            m++;
        }
        snprintf(label, sizeof label, "Monte Carlo, %zu trials per point",
                 c->mc_trials);
        if (m && (rc = sb_plot_series(p, label, x, y, m, 1, 1)))
            goto done;
    }
    for (size_t k = 0; k < c->nsel; k++) {
        const struct sb_order *o = c->sel[k];

        snprintf(label, sizeof label, "%s limit", o->name);
        if ((rc = sb_plot_rule(p, 0, thu ? sb_order_thu(o, depth)
                                         : sb_order_tvu(o, depth),
                               SB_SVG_RULE_LIMIT, label)))
            goto done;
    }
    /* the head order's fail angles, exactly as plan finds them */
    if ((rc = usable(c, c->head, depth, &u)))
        goto done;
    if (u.swath.port.reason != SB_SWATH_NADIR) {
        snprintf(label, sizeof label, "%s port %.2f deg (%s)", c->head->id,
                 -u.swath.port.angle_rad * RAD2DEG,
                 sb_swath_reason_name(u.swath.port.reason));
        if ((rc = sb_plot_rule(p, 1, -u.swath.port.angle_rad * RAD2DEG,
                               SB_SVG_RULE_MARK, label)))
            goto done;
    }
    if (u.swath.starboard.reason != SB_SWATH_NADIR) {
        snprintf(label, sizeof label, "%s stbd %.2f deg (%s)", c->head->id,
                 u.swath.starboard.angle_rad * RAD2DEG,
                 sb_swath_reason_name(u.swath.starboard.reason));
        if ((rc = sb_plot_rule(p, 1, u.swath.starboard.angle_rad * RAD2DEG,
                               SB_SVG_RULE_MARK, label)))
            goto done;
    }
    sb_plot_xrange(p, -amax, amax);
    {
        /* keep the limits in view: the curve may run far above them */
        double top = 0.0;

        for (size_t k = 0; k < c->nsel; k++)
            top = fmax(top, thu ? sb_order_thu(c->sel[k], depth)
                                : sb_order_tvu(c->sel[k], depth));
        sb_plot_yrange(p, 0.0, 1.6 * top);
    }
done:
    free(x);
    free(y);
    if (rc != SB_OK) {
        sb_plot_free(p);
        if (!c->err.msg[0])
            sb_error_set(&c->err, rc, "", 0, 0, "could not draw '%s'", title);
        return rc;
    }
    *out = p;
    return SB_OK;
}

/* The depth range of the fan plot: the area's, else the depths'. */
static void fan_range(const struct ctx *c, double *lo, double *hi)
{
    if (c->area) {
        sb_area_depth_range(c->area, lo, hi);
    } else {
        *lo = c->depths[0];
        *hi = c->depths[c->nd - 1];
        for (size_t i = 0; i < c->nd; i++) {
            *lo = fmin(*lo, c->depths[i]);
            *hi = fmax(*hi, c->depths[i]);
        }
    }
    if (*hi <= *lo)
        *hi = *lo + 1.0;
}

/* Usable half-angle (port negative, starboard positive) against depth,
 * depth downward: one pair of curves per order, and the density limit of
 * the head order at the system's speed. */
static int plot_fan(struct ctx *c, struct sb_plot **out)
{
    double lo, hi, amax = c->sys->echosounder.max_angle * RAD2DEG;
    double xs[FAN_POINTS], xp[FAN_POINTS], yd[FAN_POINTS], xd[FAN_POINTS];
    struct sb_plot *p = sb_plot_alloc("Usable half-angle against depth",
                                      "beam angle from nadir (deg), port "
                                      "negative",
                                      "depth (m)");
    int rc = SB_OK, any_density = 0;

    if (!p)
        return sb_error_set(&c->err, SB_ENOMEM, "", 0, 0, "out of memory");
    fan_range(c, &lo, &hi);
    for (size_t k = 0; k < c->nsel && rc == SB_OK; k++) {
        char label[96];

        for (int i = 0; i < FAN_POINTS; i++) {
            struct sb_usable u;
            double d = lo + (hi - lo) * i / (FAN_POINTS - 1);

            if ((rc = usable(c, c->sel[k], d, &u)))
                break;
            xp[i] = -u.swath.port.angle_rad * RAD2DEG;
            xs[i] = u.swath.starboard.angle_rad * RAD2DEG;
            yd[i] = d;
            if (c->sel[k] == c->head) {
                any_density |= u.density_applies;
                xd[i] = u.density_applies ? u.density.angle_rad * RAD2DEG
                                          : amax;
            }
        }
        if (rc != SB_OK)
            break;
        snprintf(label, sizeof label, "%s (TVU and THU)", c->sel[k]->name);
        if ((rc = sb_plot_series(p, label, xp, yd, FAN_POINTS, (int)k, 0)) ||
            (rc = sb_plot_series(p, "", xs, yd, FAN_POINTS, (int)k, 0)))
            break;
    }
    if (rc == SB_OK && any_density) {
        char label[128];

        snprintf(label, sizeof label, "feature density limit, %s, at %.1f kn",
                 c->head->id, c->sys->conditions.speed / MPS_PER_KN);
        if (!(rc = sb_plot_series(p, label, xd, yd, FAN_POINTS,
                                  (int)c->nsel, 0))) {
            for (int i = 0; i < FAN_POINTS; i++)
                xd[i] = -xd[i];
            rc = sb_plot_series(p, "", xd, yd, FAN_POINTS, (int)c->nsel, 0);
        }
    }
    if (rc == SB_OK)
        rc = sb_plot_rule(p, 1, 0.0, SB_SVG_RULE_MARK, "nadir");
    if (rc != SB_OK) {
        sb_plot_free(p);
        if (!c->err.msg[0])
            sb_error_set(&c->err, rc, "", 0, 0, "could not draw the fan");
        return rc;
    }
    sb_plot_xrange(p, -amax, amax);
    sb_plot_y_down(p, 1);
    *out = p;
    return SB_OK;
}

/* Stacked bars: TVU95 (or THU95) at a few starboard angles, split in
 * proportion to each group's share of the variance. */
static int plot_bars(struct ctx *c, int thu, double depth, struct sb_bars **out)
{
    static const double ang[] = {0, 15, 30, 45, 60, 75};
    const char *parts[SB_GROUP_COUNT];
    char title[128];
    struct sb_bars *b;
    double amax = c->sys->echosounder.max_angle * RAD2DEG;
    int rc = SB_OK;

    for (int g = 0; g < SB_GROUP_COUNT; g++)
        parts[g] = sb_group_name(g);
    snprintf(title, sizeof title, "Where the %s95 comes from at %g m",
             thu ? "THU" : "TVU", depth);
    b = sb_bars_alloc(title, "beam angle (deg, starboard)",
                      thu ? "THU95 (m)" : "TVU95 (m)", parts, SB_GROUP_COUNT);
    if (!b)
        return sb_error_set(&c->err, SB_ENOMEM, "", 0, 0, "out of memory");
    for (size_t i = 0; i < sizeof ang / sizeof ang[0] && rc == SB_OK; i++) {
        struct sb_tpu t;
        struct sb_breakdown bd;
        double v[SB_GROUP_COUNT] = {0}, total;
        char cat[32];

        if (ang[i] > amax)
            break;
        if ((rc = point(c, depth, ang[i] * DEG2RAD, &t, &bd)))
            break;
        total = thu ? thu_of(c, &t) : t.tvu95_m;
        for (int k = 0; k < SB_COMP_COUNT; k++) {
            int g = sb_component_group_id(k);

            if (g >= 0)
                v[g] += total * (thu ? bd.share_h[k] : bd.share_z[k]);
        }
        snprintf(cat, sizeof cat, "%g", ang[i]);
        rc = sb_bars_add(b, cat, v);
    }
    if (rc != SB_OK) {
        sb_bars_free(b);
        if (!c->err.msg[0])
            sb_error_set(&c->err, rc, "", 0, 0, "could not draw '%s'", title);
        return rc;
    }
    *out = b;
    return SB_OK;
}

/* ---- the HTML page ------------------------------------------------------- */

static const char *fmt_deg(char *buf, size_t n, const struct sb_swath_side *s)
{
    if (s->reason == SB_SWATH_NADIR)
        snprintf(buf, n, "-");
    else
        snprintf(buf, n, "%.2f", s->angle_rad * RAD2DEG);
    return buf;
}

static int summary(struct ctx *c, struct sb_html *h)
{
    static const char *const heads[] = {
        "order", "depth (m)", "port (deg)", "starboard (deg)",
        "swath width (m)", "swath / depth", "limited by", "dominant component",
        "density limit (deg)", "usable half-angle (deg)"};
    static const int num[] = {0, 1, 1, 1, 1, 1, 0, 0, 1, 1};
    double amin = INFINITY, amax = -INFINITY, dmin = 0, dmax = 0;
    double umin = INFINITY, udep = 0;
    int nadir = 0, rc;
    char s[2048], extra[512] = "";
    const char *who = c->sys->title[0] ? c->sys->title : c->sys->name;

    for (size_t i = 0; i < c->nd; i++) {
        struct sb_usable u;

        if ((rc = usable(c, c->head, c->depths[i], &u)))
            return rc;
        if (u.narrow->reason == SB_SWATH_NADIR)
            nadir = 1;
        if (u.narrow->angle_rad < amin) {
            amin = u.narrow->angle_rad;
            dmin = c->depths[i];
        }
        if (u.narrow->angle_rad > amax) {
            amax = u.narrow->angle_rad;
            dmax = c->depths[i];
        }
        if (u.by_density && u.angle_rad < umin) {
            umin = u.angle_rad;
            udep = c->depths[i];
        }
    }
    if (isfinite(umin) && umin <= 0.0)
        snprintf(extra, sizeof extra,
                 "  At the stated speed of %.1f kn, too few soundings would "
                 "fall on a feature of the order's size even at nadir at "
                 "%g m (the sounding-density limit, Table 1): survey slower "
                 "or with more beams there.",
                 c->sys->conditions.speed / MPS_PER_KN, udep);
    else if (isfinite(umin))
        snprintf(extra, sizeof extra,
                 "  At the stated speed of %.1f kn, too few soundings would "
                 "fall on a feature of the order's size beyond %.1f deg at "
                 "%g m (the sounding-density limit, Table 1).",
                 c->sys->conditions.speed / MPS_PER_KN, umin * RAD2DEG, udep);
    if (nadir)
        snprintf(s, sizeof s,
                 "%s does not meet %s of %s at every depth shown: at some "
                 "depths even the nadir sounding exceeds a limit (see Table "
                 "1).%s",
                 who, c->head->name, c->std->title, extra);
    else
        snprintf(s, sizeof s,
                 "On a flat seafloor, the soundings of %s are estimated to "
                 "meet the TVU and THU limits of %s of %s out to %.1f deg "
                 "from nadir on the narrower side at %g m and %.1f deg at "
                 "%g m: a swath of %.1f to %.1f times the depth below the "
                 "transducer.%s",
                 who, c->head->name, c->std->title, amin * RAD2DEG, dmin,
                 amax * RAD2DEG, dmax, 2 * tan(amin), 2 * tan(amax), extra);
    sb_html_para(h, "lead", s);
    sb_html_table_begin(h, "Usable swath per order and depth (flat "
                           "seafloor; density limit at the system's stated "
                           "speed)",
                        heads, num, 10);
    for (size_t k = 0; k < c->nsel; k++)
        for (size_t i = 0; i < c->nd; i++) {
            struct sb_usable u;
            char b[10][64];
            const char *cells[10];

            if ((rc = usable(c, c->sel[k], c->depths[i], &u)))
                return rc;
            snprintf(b[0], 64, "%s", c->sel[k]->id);
            snprintf(b[1], 64, "%g", c->depths[i]);
            fmt_deg(b[2], 64, &u.swath.port);
            fmt_deg(b[3], 64, &u.swath.starboard);
            snprintf(b[4], 64, "%.1f", u.swath.width_m);
            snprintf(b[5], 64, "%.2f", u.swath.width_m / u.depth_tx_m);
            snprintf(b[6], 64, "%s", sb_swath_reason_name(u.narrow->reason));
            snprintf(b[7], 64, "%s",
                     u.narrow->dominant >= 0
                         ? sb_component_name(u.narrow->dominant)
                         : "-");
            if (u.density_applies)
                snprintf(b[8], 64, "%.2f", u.density.angle_rad * RAD2DEG);
            else
                snprintf(b[8], 64, "%s",
                         c->has_dp ? "no feature size" : "beams not stated");
            snprintf(b[9], 64, "%.2f", u.angle_rad * RAD2DEG);
            for (int j = 0; j < 10; j++)
                cells[j] = b[j];
            sb_html_table_row(h, cells, num, 10);
        }
    sb_html_table_end(h);
    return SB_OK;
}

static int effort_section(struct ctx *c, struct sb_html *h)
{
    static const char *const heads[] = {
        "quantity", "value"};
    static const int num[] = {0, 1};
    const struct sb_order *o = c->head;
    struct sb_usable_ctx uc = {c->sys, c->h95, o, c->rule,
                               c->has_dp ? &c->dp : NULL, 0.0};
    struct sb_effort e;
    enum sb_speed_reason why;
    double speed;
    char rows[12][2][96];
    const char *cells[2];
    int rc, n = 0;

    if ((rc = sb_effort_speed(c->area, &uc, &speed, &why, &c->err)))
        return rc;
    uc.speed_mps = speed;
    if ((rc = sb_effort_plan(c->area, speed, sb_usable_halfwidth, &uc, &e,
                             &c->err)))
        return rc;
    sb_html_heading(h, 2, "Survey effort");
    {
        char s[2048];

        snprintf(s, sizeof s,
                 "Area %s (%s, %s depth model, %.2f km2), order %s, "
                 "%.0f %% overlap between adjacent lines, planned speed "
                 "%.1f kn, %.0f min per turn, %.1f h of survey per day.  "
                 "Straight parallel lines along the area's long axis; each "
                 "line's spacing comes from the narrowest usable swath "
                 "along it (docs/area.md).",
                 c->area->name, c->area->source,
                 sb_area_depth_kind_name(c->area->depth_kind),
                 sb_area_size(c->area) / 1e6, o->id, c->area->overlap * 100,
                 c->area->speed_mps / MPS_PER_KN, c->area->turn_s / 60.0,
                 c->area->day_s / 3600.0);
        sb_html_para(h, NULL, s);
    }
    if (!e.feasible) {
        char s[256];

        snprintf(s, sizeof s,
                 "No line plan is possible: at %.1f m even the nadir "
                 "sounding does not meet %s.",
                 e.infeasible_depth_m, o->name);
        sb_html_para(h, "caution", s);
        return SB_OK;
    }
    snprintf(rows[n][0], 96, "survey speed (kn)");
    snprintf(rows[n++][1], 96, "%.2f (%s)", speed / MPS_PER_KN,
             why == SB_SPEED_PLANNED   ? "as planned"
             : why == SB_SPEED_DENSITY ? "lowered to keep the feature density"
                                       : "held at the minimum speed");
    snprintf(rows[n][0], 96, "line azimuth (deg)");
    snprintf(rows[n++][1], 96, "%.1f", e.azimuth_rad * RAD2DEG);
    snprintf(rows[n][0], 96, "area width across the lines (m)");
    snprintf(rows[n++][1], 96, "%.1f", e.across_m);
    snprintf(rows[n][0], 96, "lines");
    snprintf(rows[n++][1], 96, "%zu", e.n_lines);
    snprintf(rows[n][0], 96, "line spacing, smallest to largest (m)");
    snprintf(rows[n++][1], 96, "%.1f to %.1f", e.spacing_min_m,
             e.spacing_max_m);
    snprintf(rows[n][0], 96, "line length (km)");
    snprintf(rows[n++][1], 96, "%.2f", e.line_m / 1000.0);
    snprintf(rows[n][0], 96, "time on line (h)");
    snprintf(rows[n++][1], 96, "%.2f", e.time_lines_s / 3600.0);
    snprintf(rows[n][0], 96, "time turning (h)");
    snprintf(rows[n++][1], 96, "%.2f", e.time_turns_s / 3600.0);
    snprintf(rows[n][0], 96, "total (h)");
    snprintf(rows[n++][1], 96, "%.2f", e.time_s / 3600.0);
    snprintf(rows[n][0], 96, "working days (d)");
    snprintf(rows[n++][1], 96, "%.2f", e.days);
    sb_html_table_begin(h, "Survey effort (no transit, weather or "
                           "calibration time included)",
                        heads, num, 2);
    for (int i = 0; i < n; i++) {
        cells[0] = rows[i][0];
        cells[1] = rows[i][1];
        sb_html_table_row(h, cells, num, 2);
    }
    sb_html_table_end(h);
    sb_effort_release(&e);
    return SB_OK;
}

static void stated_text(char *buf, size_t n, const struct sb_stated *s)
{
    snprintf(buf, n, "%g %s %s", s->written, s->unit, sb_utype_name(s->type));
}

/* u in the unit it was written in (the conversion factor of the value). */
static void u_text(char *buf, size_t n, const struct sb_stated *s)
{
    double f = s->written != 0.0 ? s->value / s->written : 0.0;
    const char *si = s->dim == SB_DIM_LENGTH  ? "m"
                     : s->dim == SB_DIM_ANGLE ? "rad"
                     : s->dim == SB_DIM_TIME  ? "s"
                     : s->dim == SB_DIM_SPEED ? "m/s"
                                              : "(fraction)";

    if (f > 0.0)
        snprintf(buf, n, "%.4g %s = %.4g %s", s->u / f, s->unit, s->u, si);
    else
        snprintf(buf, n, "%.4g %s", s->u, si);
}

static void inputs_section(struct ctx *c, struct sb_html *h)
{
    static const char *const heads[] = {"field", "as stated",
                                        "standard uncertainty u",
                                        "distribution", "components fed"};
    static const char *const nheads[] = {"quantity", "value"};
    size_t nf;
    const struct sb_input_field *F = sb_input_fields(&nf);
    const struct sb_system *s = c->sys;
    char b[3][128];
    const char *cells[5];

    sb_html_heading(h, 2, "Inputs as stated and as converted");
    sb_html_para(h, NULL,
                 "Each figure is shown as written in the system file and as "
                 "the standard uncertainty u it implies (JCGM 100:2008, "
                 "4.3): sd and rms are taken as u; 95% as value / 1.96 "
                 "(value / 2.4477 per axis for the horizontal position, a "
                 "2-D figure); res as value / sqrt(12) and max as value / "
                 "sqrt(3), both rectangular.");
    sb_html_table_begin(h, "Stated uncertainties", heads, NULL, 5);
    for (size_t i = 0; i < nf; i++) {
        const struct sb_stated *st = sb_input_field_get(s, &F[i]);

        if (F[i].offset ==
                offsetof(struct sb_system, echosounder.range_resolution) &&
            s->echosounder.range_mode != SB_RANGE_GIVEN)
            continue;
        stated_text(b[0], sizeof b[0], st);
        u_text(b[1], sizeof b[1], st);
        cells[0] = F[i].path;
        cells[1] = b[0];
        cells[2] = b[1];
        cells[3] = st->dist == SB_DIST_RECT ? "rectangular" : "normal";
        cells[4] = F[i].components;
        sb_html_table_row(h, cells, NULL, 5);
    }
    sb_html_table_end(h);

    sb_html_table_begin(h, "Nominal values and conditions", nheads, NULL, 2);
#define ROW(label, ...)                                                       \
    do {                                                                      \
        snprintf(b[0], sizeof b[0], __VA_ARGS__);                             \
        cells[0] = label;                                                     \
        cells[1] = b[0];                                                      \
        sb_html_table_row(h, cells, NULL, 2);                                 \
    } while (0)
    ROW("transducer depth below the waterline (draft + squat + loading)",
        "%.3f m", c->tx);
    ROW("sound speed at the transducer / of the column", "%.1f / %.1f m/s",
        s->sound_speed.surface, s->sound_speed.column);
    ROW("array, beam widths across / along", "%s, %.3g / %.3g deg",
        s->echosounder.array == SB_ARRAY_FLAT ? "flat" : "curved",
        s->echosounder.beam_across * RAD2DEG,
        s->echosounder.beam_along * RAD2DEG);
    ROW("largest beam angle", "%.1f deg", s->echosounder.max_angle * RAD2DEG);
    if (s->echosounder.beams > 0)
        ROW("beams, spacing, ping overhead, soundings per feature",
            "%d, %s, %.4g s, %g", s->echosounder.beams,
            sb_beam_spacing_name(s->echosounder.beam_spacing == 1
                                     ? SB_SPACING_EQUIDISTANT
                                     : SB_SPACING_EQUIANGULAR),
            s->echosounder.ping_overhead, s->echosounder.feature_soundings);
    else
        ROW("beams", "not stated: no feature-density limit evaluated");
    ROW("vessel speed", "%.2f m/s (%.1f kn)", s->conditions.speed,
        s->conditions.speed / MPS_PER_KN);
    ROW("roll / pitch amplitude and period", "%.2f deg, %.1f s / %.2f deg, "
        "%.1f s", s->conditions.roll_amplitude * RAD2DEG,
        s->conditions.roll_period, s->conditions.pitch_amplitude * RAD2DEG,
        s->conditions.pitch_period);
    ROW("heave amplitude and period", "%.2f m, %.1f s",
        s->conditions.heave_amplitude, s->conditions.heave_period);
    ROW("vertical reference", "%s",
        s->vertical.method == SB_VREF_TIDE ? "tide gauge"
                                           : "ellipsoid height");
#undef ROW
    sb_html_table_end(h);
}

static const char EQUATIONS[] =
    "Order limits (IHO S-44 ed. 6.0.0, 2020, Table 1 and section 3.2)\n"
    "  TVU(d) = sqrt(a^2 + (b d)^2)          THU(d) = c + f d\n"
    "Propagation (GUM, JCGM 100:2008, 5.1.2; independent inputs)\n"
    "  J_i = d(E, N, Z)/dx_i by central differences of the forward model\n"
    "  C = sum_i (J_i u_i)(J_i u_i)^T;  share of input i = (J_i u_i)^2 / "
    "sigma^2\n"
    "95 % figures (S-44 ed. 6 section 2; JCGM 100:2008 G.3)\n"
    "  TVU95 = 1.96 sigma_z\n"
    "  THU95 = r with P(|e| <= r) = 0.95 for the 2-D normal of the "
    "horizontal\n"
    "          covariance (2.4477 sigma when circular); the s44 rule uses\n"
    "          2.45 sigma_max\n"
    "Single-input checks on a flat seafloor (a-priori model after Hare,\n"
    "Godin & Mayer 1995): roll u_r gives d tan(theta) u_r vertically;\n"
    "range u_R gives cos(theta) u_R vertically; heave, draft and water "
    "level\none to one (docs/model.md derives every term)\n"
    "Fail angle: largest |theta| with TVU95 <= TVU and THU95 <= THU at "
    "every\nangle nearer nadir (scan, then Brent's method)\n"
    "Sounding density (docs/report.md)\n"
    "  equiangular: dy = 2 d sin(dtheta) / (cos 2theta + cos dtheta),\n"
    "               dtheta = 2 theta_max / (n - 1)\n"
    "  equidistant: dy = 2 d tan(theta_max) / (n - 1)\n"
    "  dx = v T,  T = 2 d / (c cos theta_max) + overhead\n"
    "  soundings on a cube of side s: s^2 / (dx dy) >= N\n"
    "Monte Carlo check (JCGM 101:2008): inputs drawn from their stated\n"
    "distributions, TVU95 = 95 % quantile of |Z|, THU95 = 95 % quantile of\n"
    "the horizontal radius\n";

static const char CAUTION[] =
    "Caution: every figure in this report is an a-priori estimate computed "
    "from the stated uncertainties of the equipment and the stated "
    "conditions, for a flat seafloor.  It is not proof of the quality of "
    "any survey.  The usable swath must be confirmed by field checks "
    "(crosslines, reference surfaces, patch tests) on the survey itself.  "
    "Defer to the hydrographic authority's specifications, local "
    "regulations and licensed hydrographic practice; do not use these "
    "figures for navigation.";

static int write_html(struct ctx *c, FILE *f)
{
    struct sb_html h;
    char s[1024];
    int rc;
    double pick[3];
    size_t np = 0;

    snprintf(s, sizeof s, "Usable swath estimate: %s", c->sys->name);
    sb_html_begin(&h, f, s);
    sb_html_heading(&h, 1, s);
    sb_html_div_begin(&h, "meta");
    snprintf(s, sizeof s,
             "System file %s; %s%s%sstandard %s (%s); THU rule %s; "
             "swathbudget %s.",
             c->sys_file, c->area ? "area file " : "",
             c->area ? c->area_file : "", c->area ? "; " : "", c->std->title,
             c->std->id, c->rule == SB_THU_S44 ? "s44 (2.45 sigma_max)"
                                                : "exact 95 % radius",
             PACKAGE_VERSION);
    sb_html_para(&h, NULL, s);
    if (c->sys->title[0])
        sb_html_para(&h, NULL, c->sys->title);
    sb_html_div_end(&h);
    sb_html_para(&h, "caution", CAUTION);

    sb_html_heading(&h, 2, "Summary");
    if ((rc = summary(c, &h)))
        return rc;

    sb_html_heading(&h, 2, "Uncertainty against beam angle");
    sb_html_para(&h, NULL,
                 "Solid curve: the linear (GUM) estimate; heavy dashed "
                 "lines: the order limits at that depth; dotted verticals: "
                 "where the first order's limits are first exceeded, port "
                 "and starboard.");
    pick[np++] = c->depths[0];
    if (c->nd > 2)
        pick[np++] = c->depths[c->nd / 2];
    if (c->nd > 1)
        pick[np++] = c->depths[c->nd - 1];
    for (size_t i = 0; i < np; i++) {
        struct sb_plot *pt = NULL, *ph = NULL;
        char cap[256];

        if ((rc = plot_angle(c, 0, pick[i], &pt)) ||
            (rc = plot_angle(c, 1, pick[i], &ph))) {
            sb_plot_free(pt);
            return rc;
        }
        sb_html_row_begin(&h);
        snprintf(cap, sizeof cap, "TVU95 at %g m against beam angle.",
                 pick[i]);
        sb_html_plot(&h, pt, PLOT_W, PLOT_H, cap);
        snprintf(cap, sizeof cap, "THU95 at %g m against beam angle.",
                 pick[i]);
        sb_html_plot(&h, ph, PLOT_W, PLOT_H, cap);
        sb_html_row_end(&h);
        sb_plot_free(pt);
        sb_plot_free(ph);
    }

    sb_html_heading(&h, 2, "Usable swath against depth");
    {
        struct sb_plot *p = NULL;

        if ((rc = plot_fan(c, &p)))
            return rc;
        sb_html_plot(&h, p, 2 * PLOT_W, 520,
                     "Half-angle out to which each order's TVU and THU "
                     "limits are met, port (left) and starboard (right), "
                     "depth downward; where the system states its beams, "
                     "the angle beyond which a feature of the first "
                     "order's size gets too few soundings.");
        sb_plot_free(p);
    }

    sb_html_heading(&h, 2, "Component breakdown");
    {
        struct sb_bars *bt = NULL, *bh = NULL;
        double d = c->depths[c->nd / 2];

        if ((rc = plot_bars(c, 0, d, &bt)) || (rc = plot_bars(c, 1, d, &bh))) {
            sb_bars_free(bt);
            return rc;
        }
        sb_html_row_begin(&h);
        sb_html_bars(&h, bt, PLOT_W, 420,
                     "TVU95 at a few starboard angles; each segment is a "
                     "group's share of the vertical variance.");
        sb_html_bars(&h, bh, PLOT_W, 420,
                     "THU95 likewise; segments are shares of the "
                     "horizontal variance.");
        sb_html_row_end(&h);
        sb_bars_free(bt);
        sb_bars_free(bh);
    }

    if (c->area && (rc = effort_section(c, &h)))
        return rc;
    inputs_section(c, &h);
    sb_html_heading(&h, 2, "Equations and references");
    sb_html_pre(&h, EQUATIONS);
    sb_html_para(&h, "note",
                 "References: IHO S-44 Standards for Hydrographic Surveys, "
                 "ed. 6.0.0 (2020); JCGM 100:2008 (GUM); JCGM 101:2008 "
                 "(Monte Carlo); Hare, Godin & Mayer (1995), Accuracy "
                 "estimation of Canadian swath and sweep sounding systems; "
                 "Lurton (2010), An Introduction to Underwater Acoustics.");
    sb_html_heading(&h, 2, "Limits of this estimate");
    sb_html_para(&h, NULL, CAUTION);
    sb_html_para(&h, "note",
                 "Produced by swathbudget " PACKAGE_VERSION
                 ", free software under the GNU GPL version 3 or later.");
    rc = sb_html_end(&h, &c->err);
    return rc;
}

/* ---- the command --------------------------------------------------------- */

static int pick_head(struct ctx *c, const char *order_arg)
{
    int rc;

    if (order_arg) {
        if ((rc = cli_select_orders(CMD, c->std, order_arg, c->sel,
                                    &c->nsel)))
            return rc;
        c->head = c->sel[0];
    } else if (c->head) { /* the area's */
        c->sel[0] = c->head;
        c->nsel = 1;
    } else {
        for (int i = 0; i < c->std->n_orders; i++)
            c->sel[i] = &c->std->orders[i];
        c->nsel = (size_t)c->std->n_orders;
        c->head = sb_standard_order(c->std, "1a");
        if (!c->head)
            c->head = c->sel[0];
    }
    return CLI_EXIT_OK;
}

static int write_single(struct ctx *c, int kind, double depth, FILE *f)
{
    int rc;

    if (kind == PLOT_BARS_TVU || kind == PLOT_BARS_THU) {
        struct sb_bars *b = NULL;

        if ((rc = plot_bars(c, kind == PLOT_BARS_THU, depth, &b)))
            return rc;
        rc = sb_bars_write(b, f, 720, 480, 1, "", &c->err);
        sb_bars_free(b);
        return rc;
    } else {
        struct sb_plot *p = NULL;

        rc = kind == PLOT_FAN ? plot_fan(c, &p)
                              : plot_angle(c, kind == PLOT_THU, depth, &p);
        if (rc)
            return rc;
        rc = sb_plot_write(p, f, kind == PLOT_FAN ? 900 : 720,
                           kind == PLOT_FAN ? 620 : 480, 1, "", &c->err);
        sb_plot_free(p);
        return rc;
    }
}

int cmd_report(int argc, char **argv)
{
    enum {
        OPT_AREA = 256,
        OPT_STANDARD,
        OPT_ORDER,
        OPT_DEPTHS,
        OPT_DEPTH,
        OPT_MC,
        OPT_SEED,
        OPT_THU_RULE,
        OPT_PLOT,
        OPT_FORMAT
    };
    static const struct option opts[] = {
        {"output", required_argument, NULL, 'o'},
        {"area", required_argument, NULL, OPT_AREA},
        {"standard", required_argument, NULL, OPT_STANDARD},
        {"order", required_argument, NULL, OPT_ORDER},
        {"depths", required_argument, NULL, OPT_DEPTHS},
        {"depth", required_argument, NULL, OPT_DEPTH},
        {"mc", required_argument, NULL, OPT_MC},
        {"seed", required_argument, NULL, OPT_SEED},
        {"thu-rule", required_argument, NULL, OPT_THU_RULE},
        {"plot", required_argument, NULL, OPT_PLOT},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    static struct ctx C;
    struct ctx *c = &C;
    struct sb_standard storage;
    const char *out_path = NULL, *std_arg = NULL, *order_arg = NULL;
    const char *depths_arg = NULL;
    int kind = -1, svg = 0, ch, rc, status = CLI_EXIT_OK;
    double depth = NAN;
    struct sb_outfile of;

    memset(c, 0, sizeof *c);
    c->rule = SB_THU_EXACT;
    c->seed = 1;
    optind = 1;
    while ((ch = getopt_long(argc, argv, ":ho:", opts, NULL)) != -1) {
        switch (ch) {
        case 'o': out_path = optarg; break;
        case OPT_AREA: c->area_file = optarg; break;
        case OPT_STANDARD: std_arg = optarg; break;
        case OPT_ORDER: order_arg = optarg; break;
        case OPT_DEPTHS: depths_arg = optarg; break;
        case OPT_DEPTH:
            if ((rc = cli_parse_double(CMD, "--depth", optarg, 0.0,
                                       DEPTH_MAX_M, 1, &depth)))
                return rc;
            break;
        case OPT_MC: {
            long n;

            if ((rc = cli_parse_long(CMD, "--mc", optarg, MC_TRIALS_MIN,
                                     SB_MC_TRIALS_MAX, &n)))
                return rc;
            c->mc_trials = (size_t)n;
            break;
        }
        case OPT_SEED: {
            long n;

            if ((rc = cli_parse_long(CMD, "--seed", optarg, 0, 2147483647L,
                                     &n)))
                return rc;
            c->seed = (uint64_t)n;
            break;
        }
        case OPT_THU_RULE:
            if ((rc = cli_parse_thu_rule(CMD, optarg, &c->rule)) !=
                CLI_EXIT_OK)
                return rc;
            break;
        case OPT_PLOT:
            for (kind = 0; kind < PLOT_COUNT; kind++)
                if (strcmp(optarg, plot_names[kind]) == 0)
                    break;
            if (kind == PLOT_COUNT)
                return cli_usage_error(CMD, "--plot: unknown plot '%s' "
                                            "(expected tvu-angle, "
                                            "thu-angle, angle-depth, "
                                            "breakdown-tvu or "
                                            "breakdown-thu)",
                                       optarg);
            break;
        case OPT_FORMAT:
            if (strcmp(optarg, "svg") == 0)
                svg = 1;
            else if (strcmp(optarg, "html") == 0)
                svg = 0;
            else
                return cli_usage_error(CMD, "--format: unknown format '%s' "
                                            "(expected html or svg)",
                                       optarg);
            break;
        case 'h':
            cmd_report_help(stdout);
            return CLI_EXIT_OK;
        default:
            return cli_bad_option(CMD, argc, argv);
        }
    }
    if ((rc = cli_one_system_file(CMD, argc, argv)) != CLI_EXIT_OK)
        return rc;
    if (!out_path)
        return cli_usage_error(CMD, "no output file (expected -o FILE)");
    if (svg && kind < 0)
        return cli_usage_error(CMD, "--format svg needs --plot NAME (expected "
                                    "the plot to write)");
    if (kind >= 0 && !svg)
        return cli_usage_error(CMD, "--plot writes one SVG picture (expected "
                                    "--format svg as well)");
    if (kind >= 0 && kind != PLOT_FAN && isnan(depth))
        return cli_usage_error(CMD, "--plot %s needs --depth D (expected the "
                                    "depth of the plot, m)",
                               plot_names[kind]);
    if (!isnan(depth) && (kind < 0 || kind == PLOT_FAN))
        return cli_usage_error(CMD, "--depth is for single angle plots and "
                                    "breakdowns (expected --depths for the "
                                    "report)");
    c->sys_file = argv[optind];
    if ((rc = cli_check_input_file(CMD, "", c->sys_file,
                                   "a system YAML file, see docs/spec.md")) ||
        (c->area_file &&
         (rc = cli_check_input_file(CMD, "--area", c->area_file,
                                    "an area YAML file, see docs/area.md"))) ||
        (rc = cli_check_standard_arg(CMD, std_arg)))
        return rc;
    if (depths_arg &&
        (rc = cli_parse_values(CMD, "--depths", depths_arg, 0.0, DEPTH_MAX_M,
                               1, c->depths, MAX_DEPTHS, &c->nd)))
        return rc;

    sb_error_clear(&c->err);
    c->sys = sb_system_alloc();
    if (!c->sys)
        return fail(SB_ENOMEM);
    if ((rc = sb_spec_load(c->sys_file, c->sys, &c->err))) {
        status = cli_report(CMD, rc, &c->err);
        goto out;
    }
    if ((rc = sb_standard_resolve(std_arg, &storage, &c->std, &c->err))) {
        status = cli_report(CMD, rc, &c->err);
        goto out;
    }
    if (c->area_file) {
        c->area = sb_area_alloc();
        if (!c->area) {
            status = fail(SB_ENOMEM);
            goto out;
        }
        if ((rc = sb_area_load(c->area_file, c->area, &c->err))) {
            status = cli_report(CMD, rc, &c->err);
            goto out;
        }
        c->head = sb_standard_order(c->std, c->area->order);
        if (!c->head) {
            sb_error_set(&c->err, SB_EINPUT, c->area->source,
                         c->area->order_line, c->area->order_col,
                         "order: '%s' is not an order of %s (expected an "
                         "order of the standard reported against)",
                         c->area->order, c->std->id);
            status = cli_report(CMD, SB_EINPUT, &c->err);
            goto out;
        }
    }
    if ((status = pick_head(c, order_arg)) != CLI_EXIT_OK)
        goto out;
    c->tx = c->sys->vertical.draft + c->sys->vertical.squat +
            c->sys->vertical.loading;
    if (!depths_arg) {
        if (c->area) {
            double lo, hi;

            sb_area_depth_range(c->area, &lo, &hi);
            /* whole metres inside the area's range read better */
            c->nd = floor(hi) - ceil(lo) >= 4.0 ? 5 : 1;
            for (size_t i = 0; i < c->nd; i++)
                c->depths[i] =
                    c->nd > 1 ? round(ceil(lo) + (floor(hi) - ceil(lo)) * i /
                                                     4.0)
                              : lo;
        } else {
            c->nd = sizeof default_depths / sizeof default_depths[0];
            memcpy(c->depths, default_depths, sizeof default_depths);
        }
    }
    for (size_t i = 0; i < c->nd; i++)
        if (!(c->depths[i] > c->tx)) {
            status = cli_usage_error(CMD, "depth %g m is not below the "
                                          "transducer of %s (expected depths "
                                          "greater than %g m)",
                                     c->depths[i], c->sys->name, c->tx);
            goto out;
        }
    if (!isnan(depth) && !(depth > c->tx)) {
        status = cli_usage_error(CMD, "--depth %g m is not below the "
                                      "transducer of %s (expected more than "
                                      "%g m)",
                                 depth, c->sys->name, c->tx);
        goto out;
    }
    c->has_dp = sb_density_params_from_system(c->sys, &c->dp);
    c->h95 = sb_horiz95_alloc(&c->err);
    if (!c->h95) {
        status = cli_report(CMD, SB_ENOMEM, &c->err);
        goto out;
    }

    if ((rc = sb_outfile_open(&of, out_path, &c->err))) {
        status = cli_report(CMD, rc, &c->err);
        goto out;
    }
    rc = kind >= 0 ? write_single(c, kind, depth, of.f) : write_html(c, of.f);
    if (rc != SB_OK) {
        sb_outfile_abort(&of);
        /* a depth of the area above the transducer is the area's fault */
        if (rc == SB_EINPUT && !c->err.file[0] && c->area)
            snprintf(c->err.file, sizeof c->err.file, "%s", c->area->source);
        status = cli_report(CMD, rc, &c->err);
        goto out;
    }
    if ((rc = sb_outfile_commit(&of, &c->err)))
        status = cli_report(CMD, rc, &c->err);
out:
    sb_horiz95_free(c->h95);
    sb_area_free(c->area);
    sb_system_free(c->sys);
    return status;
}
