/*
 * swathbudget compare — survey systems side by side: the usable swath of
 * each per order and depth (TVU/THU limit and sounding-density limit), the
 * survey effort over an area, and what one changed input would buy.
 *
 *   swathbudget compare SYSTEM.yaml [SYSTEM.yaml...] [--standard ID|FILE]
 *                       [--order ID[,ID...]] [--depths LIST|A:B:S]
 *                       [--area AREA.yaml] [--upgrade FIELD=VALUE]
 *                       [--thu-rule exact|s44] [--format table|csv|json]
 */
#include <getopt.h>
#include <math.h>
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
#include "swathbudget/orders.h"
#include "swathbudget/spec.h"
#include "swathbudget/swath.h"
#include "swathbudget/system.h"
#include "swathbudget/writer.h"

#define CMD "compare"
#define MAX_SYSTEMS 8
#define MAX_DEPTHS 256
#define DEPTH_MAX_M 12000.0
#define JSON_DIGITS 10
#define PI 3.14159265358979323846
#define RAD2DEG (180.0 / PI)
#define MPS_PER_KN (1852.0 / 3600.0)

static const double default_depths[] = {10.0, 20.0, 50.0, 100.0, 200.0};
#define DEFAULT_DEPTHS_TEXT "10,20,50,100,200"

void cmd_compare_help(FILE *f)
{
    fprintf(f,
            "usage: swathbudget compare SYSTEM.yaml [SYSTEM.yaml...] "
            "[--standard ID|FILE]\n"
            "                           [--order ID[,ID...]] [--depths "
            "D[,D...]|A:B:S]\n"
            "                           [--area AREA.yaml] [--upgrade "
            "FIELD=VALUE]\n"
            "                           [--thu-rule exact|s44] [--format "
            "table|csv|json]\n\n"
            "Put survey systems side by side.  For each system, order and "
            "depth: the beam\nangle, port and starboard, out to which "
            "soundings meet the order's TVU and\nTHU limits, the swath "
            "width, what ends it and the dominant component; the\nangle "
            "beyond which a feature of the order's size gets too few "
            "soundings\n(when the system states its beams), at the "
            "system's own speed; and the\nusable half-angle, the smaller "
            "of the two on the narrower side.\n\n"
            "With --area, the survey effort of each system over the area: "
            "line spacing,\nlines, line kilometres, hours and days (layout "
            "in docs/area.md).  With\n--upgrade, the first system is run "
            "again with one stated uncertainty\nreplaced, and the change "
            "in usable angle and effort is printed.\n\n"
            "options:\n"
            "  --standard ID|FILE  compiled-in standard (default %s) or a "
            "YAML file\n"
            "  --order ID[,ID...]  orders to compare (default: the area's "
            "order with\n"
            "                      --area, else all of the standard's)\n"
            "  --depths D[,D...]   seafloor depths, m, as a list or "
            "START:STOP:STEP\n"
            "                      (default %s)\n"
            "  --area AREA.yaml    survey area for the effort estimate\n"
            "  --upgrade F=V       what-if: F a field path of the system "
            "file or an\n"
            "                      engine component (motion.roll or roll), V "
            "a stated\n"
            "                      value, e.g. --upgrade motion.roll='0.01 "
            "deg sd'\n"
            "  --thu-rule R        exact (default) or s44, as for plan\n"
            "  --format F          table (default), csv or json\n"
            "  -h, --help          this text\n\n"
            "The figures are a-priori estimates, not proof of a survey's "
            "quality: defer to\nthe hydrographic authority's specifications, "
            "local regulations and licensed\npractice.\n",
            SB_STANDARD_DEFAULT_ID, DEFAULT_DEPTHS_TEXT);
}

struct run {
    const char *file;
    char label[SB_SYSTEM_NAME_MAX + 16];
    struct sb_system *sys;
    /* 1 for the upgraded copy: a shallow copy of the first system, whose
     * profile(s) it borrows and must not free */
    int borrowed;
    struct sb_density_params dp;
    int has_dp;
};

struct effort_row {
    int done;
    double speed_mps;
    enum sb_speed_reason why;
    struct sb_effort e;
};

/* Usable across-track distance of one side, capped by the density angle. */
static double side_width(const struct sb_usable *u,
                         const struct sb_swath_side *s)
{
    double w = s->across_m;

    if (u->density_applies && u->density.angle_rad < s->angle_rad)
        w = u->depth_tx_m * tan(u->density.angle_rad);
    return w;
}

static double usable_width(const struct sb_usable *u)
{
    return side_width(u, &u->swath.port) + side_width(u, &u->swath.starboard);
}

static const char *dominant_name(const struct sb_swath_side *s)
{
    return s->dominant >= 0 ? sb_component_name(s->dominant) : "-";
}

static int fail(int rc)
{
    struct sb_error err;

    sb_error_set(&err, rc, "", 0, 0, "could not build the output (%s)",
                 sb_strerror(rc));
    return cli_report(CMD, rc, &err);
}

/* ---- output -------------------------------------------------------------- */

static int write_tables(const struct run *runs, size_t nr,
                        const struct sb_order *const *sel, size_t nsel,
                        size_t nd, const struct sb_usable *U,
                        const struct sb_area *area,
                        const struct sb_order *aorder,
                        const struct effort_row *E, const char *upgrade,
                        enum sb_format fmt)
{
    static const struct sb_table_col ucols[] = {
        {"system", "system", 0},
        {"order", "order", 0},
        {"depth (m)", "depth_m", 1},
        {"port (deg)", "port_deg", 2},
        {"starboard (deg)", "starboard_deg", 2},
        {"width (m)", "swath_width_m", 1},
        {"limited by", "limited_by", 0},
        {"dominant", "dominant", 0},
        {"density (deg)", "density_deg", 2},
        {"usable (deg)", "usable_deg", 2},
        {"usable width (m)", "usable_width_m", 1},
    };
    static const struct sb_table_col ecols[] = {
        {"system", "system", 0},
        {"order", "order", 0},
        {"speed (kn)", "speed_kn", 2},
        {"speed set by", "speed_set_by", 0},
        {"lines", "lines", 0},
        {"spacing min (m)", "spacing_min_m", 1},
        {"spacing max (m)", "spacing_max_m", 1},
        {"line length (km)", "line_km", 2},
        {"hours (h)", "hours_h", 2},
        {"days (d)", "days_d", 2},
    };
    struct sb_table *t = sb_table_alloc(ucols, sizeof ucols / sizeof ucols[0]);
    struct sb_error err;
    int rc = SB_OK;

    if (!t)
        return fail(SB_ENOMEM);
    for (size_t r = 0; r < nr && rc == SB_OK; r++)
        for (size_t k = 0; k < nsel && rc == SB_OK; k++)
            for (size_t i = 0; i < nd && rc == SB_OK; i++) {
                const struct sb_usable *u = &U[(r * nsel + k) * nd + i];
                const struct sb_swath_side *p = &u->swath.port,
                                           *s = &u->swath.starboard;

                if ((rc = sb_table_str(t, runs[r].label)) ||
                    (rc = sb_table_str(t, sel[k]->id)) ||
                    (rc = sb_table_num(t, u->depth_m)) ||
                    (rc = p->reason == SB_SWATH_NADIR
                              ? sb_table_empty(t, "-")
                              : sb_table_num(t, p->angle_rad * RAD2DEG)) ||
                    (rc = s->reason == SB_SWATH_NADIR
                              ? sb_table_empty(t, "-")
                              : sb_table_num(t, s->angle_rad * RAD2DEG)) ||
                    (rc = sb_table_num(t, u->swath.width_m)) ||
                    (rc = sb_table_str(
                         t, sb_swath_reason_name(u->narrow->reason))) ||
                    (rc = sb_table_str(t, dominant_name(u->narrow))) ||
                    (rc = u->density_applies
                              ? sb_table_num(t, u->density.angle_rad * RAD2DEG)
                              : sb_table_empty(t, "-")) ||
                    (rc = sb_table_num(t, u->angle_rad * RAD2DEG)))
                    break;
                rc = sb_table_num(t, usable_width(u));
            }
    if (rc != SB_OK) {
        sb_table_free(t);
        return fail(rc);
    }
    if (fmt == SB_FORMAT_TABLE)
        printf("Usable swath (TVU/THU limit, port and starboard; density "
               "limit at each\nsystem's own speed; usable = the smaller, on "
               "the narrower side)\n\n");
    sb_error_clear(&err);
    rc = sb_table_write(t, stdout, fmt, &err);
    sb_table_free(t);
    if (rc != SB_OK)
        return cli_report(CMD, rc, &err);

    if (area) {
        t = sb_table_alloc(ecols, sizeof ecols / sizeof ecols[0]);
        if (!t)
            return fail(SB_ENOMEM);
        for (size_t r = 0; r < nr && rc == SB_OK; r++) {
            const struct effort_row *e = &E[r];

            if ((rc = sb_table_str(t, runs[r].label)) ||
                (rc = sb_table_str(t, aorder->id)) ||
                (rc = sb_table_num(t, e->speed_mps / MPS_PER_KN)) ||
                (rc = sb_table_str(t, sb_speed_reason_name(e->why))))
                break;
            if (!e->e.feasible) {
                for (int c = 0; c < 6 && rc == SB_OK; c++)
                    rc = sb_table_empty(t, "-");
                continue;
            }
            if ((rc = sb_table_num(t, (double)e->e.n_lines)) != SB_OK)
                break;
            if ((rc = sb_table_num(t, e->e.spacing_min_m)) ||
                (rc = sb_table_num(t, e->e.spacing_max_m)) ||
                (rc = sb_table_num(t, e->e.line_m / 1000.0)) ||
                (rc = sb_table_num(t, e->e.time_s / 3600.0)))
                break;
            rc = sb_table_num(t, e->e.days);
        }
        if (rc != SB_OK) {
            sb_table_free(t);
            return fail(rc);
        }
        if (fmt == SB_FORMAT_TABLE)
            printf("\nSurvey effort over %s (%s), order %s\n\n", area->name,
                   area->source, aorder->id);
        else
            printf("\n");
        rc = sb_table_write(t, stdout, fmt, &err);
        sb_table_free(t);
        if (rc != SB_OK)
            return cli_report(CMD, rc, &err);
    }
    if (upgrade) {
        static const struct sb_table_col wcols[] = {
            {"order", "order", 0},
            {"depth (m)", "depth_m", 1},
            {"usable before (deg)", "usable_before_deg", 2},
            {"usable after (deg)", "usable_after_deg", 2},
            {"change (deg)", "change_deg", 2},
            {"width before (m)", "width_before_m", 1},
            {"width after (m)", "width_after_m", 1},
        };
        t = sb_table_alloc(wcols, sizeof wcols / sizeof wcols[0]);
        if (!t)
            return fail(SB_ENOMEM);
        for (size_t k = 0; k < nsel && rc == SB_OK; k++)
            for (size_t i = 0; i < nd && rc == SB_OK; i++) {
                const struct sb_usable *a = &U[(0 * nsel + k) * nd + i];
                const struct sb_usable *b = &U[(1 * nsel + k) * nd + i];

                if ((rc = sb_table_str(t, sel[k]->id)) ||
                    (rc = sb_table_num(t, a->depth_m)) ||
                    (rc = sb_table_num(t, a->angle_rad * RAD2DEG)) ||
                    (rc = sb_table_num(t, b->angle_rad * RAD2DEG)) ||
                    (rc = sb_table_num(t, (b->angle_rad - a->angle_rad) *
                                              RAD2DEG)) ||
                    (rc = sb_table_num(t, usable_width(a))))
                    break;
                rc = sb_table_num(t, usable_width(b));
            }
        if (rc != SB_OK) {
            sb_table_free(t);
            return fail(rc);
        }
        if (fmt == SB_FORMAT_TABLE)
            printf("\nWhat-if: %s with %s\n\n", runs[0].label, upgrade);
        else
            printf("\n");
        rc = sb_table_write(t, stdout, fmt, &err);
        sb_table_free(t);
        if (rc != SB_OK)
            return cli_report(CMD, rc, &err);
        if (area && fmt == SB_FORMAT_TABLE) {
            if (E[0].e.feasible && E[1].e.feasible)
                printf("\neffort: %zu -> %zu lines, %.2f -> %.2f km, "
                       "%.2f -> %.2f days (change %+.2f days)\n",
                       E[0].e.n_lines, E[1].e.n_lines, E[0].e.line_m / 1000.0,
                       E[1].e.line_m / 1000.0, E[0].e.days, E[1].e.days,
                       E[1].e.days - E[0].e.days);
            else
                printf("\neffort: not comparable (no usable swath at some "
                       "depth of the area)\n");
        }
    }
    if (fmt == SB_FORMAT_TABLE)
        printf("\nThese are a-priori estimates, not proof of a survey's "
               "quality: defer to the\nhydrographic authority's "
               "specifications, local regulations and licensed\n"
               "practice, and confirm them by field checks.\n");
    return CLI_EXIT_OK;
}

static void json_angle(struct sb_json *j, const char *key,
                       const struct sb_swath_side *s)
{
    sb_json_key(j, key);
    if (s->reason == SB_SWATH_NADIR)
        sb_json_null(j);
    else
        sb_json_number(j, s->angle_rad * RAD2DEG, JSON_DIGITS);
}

static void json_effort(struct sb_json *j, const struct effort_row *e)
{
    sb_json_begin_object(j);
    sb_json_kv_number(j, "speed_mps", e->speed_mps, JSON_DIGITS);
    sb_json_kv_string(j, "speed_set_by", sb_speed_reason_name(e->why));
    sb_json_key(j, "feasible");
    sb_json_bool(j, e->e.feasible);
    if (e->e.feasible) {
        sb_json_kv_number(j, "line_azimuth_deg", e->e.azimuth_rad * RAD2DEG,
                          JSON_DIGITS);
        sb_json_key(j, "lines");
        sb_json_integer(j, (long long)e->e.n_lines);
        sb_json_kv_number(j, "spacing_min_m", e->e.spacing_min_m, JSON_DIGITS);
        sb_json_kv_number(j, "spacing_max_m", e->e.spacing_max_m, JSON_DIGITS);
        sb_json_kv_number(j, "line_km", e->e.line_m / 1000.0, JSON_DIGITS);
        sb_json_kv_number(j, "hours_h", e->e.time_s / 3600.0, JSON_DIGITS);
        sb_json_kv_number(j, "days_d", e->e.days, JSON_DIGITS);
    } else {
        sb_json_kv_number(j, "nadir_fails_at_depth_m",
                          e->e.infeasible_depth_m, JSON_DIGITS);
    }
    sb_json_end_object(j);
}

static int write_json(const struct sb_standard *std, const struct run *runs,
                      size_t nr, const struct sb_order *const *sel,
                      size_t nsel, size_t nd, const struct sb_usable *U,
                      const struct sb_area *area, const struct sb_order *aorder,
                      const struct effort_row *E, const char *upgrade)
{
    struct sb_json j;
    struct sb_error err;
    int rc;

    sb_json_init(&j, stdout);
    sb_json_begin_object(&j);
    sb_json_kv_string(&j, "standard", std->id);
    sb_json_key(&j, "systems");
    sb_json_begin_array(&j);
    for (size_t r = 0; r < nr; r++) {
        sb_json_begin_object(&j);
        sb_json_kv_string(&j, "system", runs[r].label);
        sb_json_kv_string(&j, "file", runs[r].file);
        sb_json_key(&j, "upgrade");
        if (upgrade && r == 1)
            sb_json_string(&j, upgrade);
        else
            sb_json_null(&j);
        sb_json_key(&j, "usable");
        sb_json_begin_array(&j);
        for (size_t k = 0; k < nsel; k++)
            for (size_t i = 0; i < nd; i++) {
                const struct sb_usable *u = &U[(r * nsel + k) * nd + i];

                sb_json_begin_object(&j);
                sb_json_kv_string(&j, "order", sel[k]->id);
                sb_json_kv_number(&j, "depth_m", u->depth_m, JSON_DIGITS);
                json_angle(&j, "port_deg", &u->swath.port);
                json_angle(&j, "starboard_deg", &u->swath.starboard);
                sb_json_kv_number(&j, "swath_width_m", u->swath.width_m,
                                  JSON_DIGITS);
                sb_json_kv_string(&j, "limited_by",
                                  sb_swath_reason_name(u->narrow->reason));
                sb_json_key(&j, "dominant");
                if (u->narrow->dominant >= 0)
                    sb_json_string(&j, sb_component_name(u->narrow->dominant));
                else
                    sb_json_null(&j);
                sb_json_key(&j, "density_deg");
                if (u->density_applies)
                    sb_json_number(&j, u->density.angle_rad * RAD2DEG,
                                   JSON_DIGITS);
                else
                    sb_json_null(&j);
                sb_json_key(&j, "feature_m");
                if (u->density_applies)
                    sb_json_number(&j, u->feature_m, JSON_DIGITS);
                else
                    sb_json_null(&j);
                sb_json_kv_number(&j, "usable_deg", u->angle_rad * RAD2DEG,
                                  JSON_DIGITS);
                sb_json_kv_number(&j, "usable_width_m", usable_width(u),
                                  JSON_DIGITS);
                sb_json_end_object(&j);
            }
        sb_json_end_array(&j);
        if (area) {
            sb_json_key(&j, "effort");
            json_effort(&j, &E[r]);
        }
        sb_json_end_object(&j);
    }
    sb_json_end_array(&j);
    if (area) {
        sb_json_key(&j, "area");
        sb_json_begin_object(&j);
        sb_json_kv_string(&j, "name", area->name);
        sb_json_kv_string(&j, "file", area->source);
        sb_json_kv_string(&j, "order", aorder->id);
        sb_json_kv_number(&j, "overlap", area->overlap, JSON_DIGITS);
        sb_json_kv_number(&j, "planned_speed_mps", area->speed_mps,
                          JSON_DIGITS);
        sb_json_end_object(&j);
    }
    sb_json_end_object(&j);
    sb_error_clear(&err);
    rc = sb_json_finish(&j, &err);
    return rc == SB_OK ? CLI_EXIT_OK : cli_report(CMD, rc, &err);
}

/* ---- the command --------------------------------------------------------- */

static void free_runs(struct run *runs, size_t nr)
{
    for (size_t r = 0; r < nr; r++) {
        if (runs[r].borrowed)
            free(runs[r].sys);
        else
            sb_system_free(runs[r].sys);
    }
}

int cmd_compare(int argc, char **argv)
{
    enum {
        OPT_STANDARD = 256,
        OPT_ORDER,
        OPT_DEPTHS,
        OPT_AREA,
        OPT_UPGRADE,
        OPT_THU_RULE,
        OPT_FORMAT
    };
    static const struct option opts[] = {
        {"standard", required_argument, NULL, OPT_STANDARD},
        {"order", required_argument, NULL, OPT_ORDER},
        {"depths", required_argument, NULL, OPT_DEPTHS},
        {"area", required_argument, NULL, OPT_AREA},
        {"upgrade", required_argument, NULL, OPT_UPGRADE},
        {"thu-rule", required_argument, NULL, OPT_THU_RULE},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    double depths[MAX_DEPTHS];
    const struct sb_order *sel[SB_STANDARD_ORDERS_MAX], *aorder = NULL;
    struct sb_standard storage;
    const struct sb_standard *std = NULL;
    const char *std_arg = NULL, *order_arg = NULL, *depth_arg = NULL;
    const char *area_arg = NULL, *upgrade = NULL;
    enum sb_format fmt = SB_FORMAT_TABLE;
    int rule = SB_THU_EXACT;
    struct run runs[MAX_SYSTEMS + 1];
    struct effort_row E[MAX_SYSTEMS + 1];
    struct sb_usable *U = NULL;
    struct sb_area *area = NULL;
    struct sb_horiz95 *h95 = NULL;
    struct sb_error err;
    size_t nd = 0, nsel = 0, nr = 0, nfiles;
    int c, rc, status = CLI_EXIT_OK;

    optind = 1;
    while ((c = getopt_long(argc, argv, ":h", opts, NULL)) != -1) {
        switch (c) {
        case OPT_STANDARD: std_arg = optarg; break;
        case OPT_ORDER: order_arg = optarg; break;
        case OPT_DEPTHS: depth_arg = optarg; break;
        case OPT_AREA: area_arg = optarg; break;
        case OPT_UPGRADE:
            if (upgrade)
                return cli_usage_error(CMD, "--upgrade given twice (expected "
                                            "one changed input)");
            upgrade = optarg;
            break;
        case OPT_THU_RULE:
            if ((rc = cli_parse_thu_rule(CMD, optarg, &rule)) !=
                CLI_EXIT_OK)
                return rc;
            break;
        case OPT_FORMAT:
            if ((rc = cli_parse_format(CMD, optarg, &fmt)) != CLI_EXIT_OK)
                return rc;
            break;
        case 'h':
            cmd_compare_help(stdout);
            return CLI_EXIT_OK;
        default:
            return cli_bad_option(CMD, argc, argv);
        }
    }
    nfiles = (size_t)(argc - optind);
    if (nfiles == 0)
        return cli_usage_error(CMD, "no system file given (expected one or "
                                    "more SYSTEM.yaml)");
    if (nfiles > MAX_SYSTEMS)
        return cli_usage_error(CMD, "%zu system files (expected at most %d)",
                               nfiles, MAX_SYSTEMS);
    if (depth_arg) {
        if ((rc = cli_parse_values(CMD, "--depths", depth_arg, 0.0,
                                   DEPTH_MAX_M, 1, depths, MAX_DEPTHS, &nd)))
            return rc;
    } else {
        nd = sizeof default_depths / sizeof default_depths[0];
        memcpy(depths, default_depths, sizeof default_depths);
    }
    if ((rc = cli_check_standard_arg(CMD, std_arg)))
        return rc;
    if (area_arg &&
        (rc = cli_check_input_file(CMD, "--area", area_arg,
                                   "an area YAML file, see docs/area.md")))
        return rc;
    for (size_t i = 0; i < nfiles; i++)
        if ((rc = cli_check_input_file(CMD, "", argv[optind + i],
                                       "a system YAML file, see "
                                       "docs/spec.md")))
            return rc;

    sb_error_clear(&err);
    if ((rc = sb_standard_resolve(std_arg, &storage, &std, &err)) != SB_OK)
        return cli_report(CMD, rc, &err);
    if (area_arg) {
        area = sb_area_alloc();
        if (!area)
            return fail(SB_ENOMEM);
        if ((rc = sb_area_load(area_arg, area, &err)) != SB_OK) {
            sb_area_free(area);
            return cli_report(CMD, rc, &err);
        }
        aorder = sb_standard_order(std, area->order);
        if (!aorder) {
            sb_error_set(&err, SB_EINPUT, area->source, area->order_line,
                         area->order_col,
                         "order: '%s' is not an order of %s (expected an "
                         "order of the standard compared against)",
                         area->order, std->id);
            sb_area_free(area);
            return cli_report(CMD, SB_EINPUT, &err);
        }
    }
    if (!order_arg && aorder) {
        sel[0] = aorder;
        nsel = 1;
    } else if ((rc = cli_select_orders(CMD, std, order_arg, sel, &nsel))) {
        sb_area_free(area);
        return rc;
    }

    /* load the systems; the upgraded copy of the first goes second */
    memset(runs, 0, sizeof runs);
    memset(E, 0, sizeof E);
    for (size_t i = 0; i < nfiles && status == CLI_EXIT_OK; i++) {
        struct run *r = &runs[nr];

        r->file = argv[optind + i];
        r->sys = sb_system_alloc();
        if (!r->sys) {
            status = fail(SB_ENOMEM);
            break;
        }
        nr++;
        if ((rc = sb_spec_load(r->file, r->sys, &err)) != SB_OK) {
            status = cli_report(CMD, rc, &err);
            break;
        }
        snprintf(r->label, sizeof r->label, "%s", r->sys->name);
        if (i == 0 && upgrade) {
            struct run *u = &runs[nr];
            const struct sb_input_field *fld;

            u->file = r->file;
            u->sys = sb_system_alloc();
            if (!u->sys) {
                status = fail(SB_ENOMEM);
                break;
            }
            nr++;
            *u->sys = *r->sys;
            u->borrowed = 1;
            if ((rc = sb_whatif_apply(u->sys, upgrade, &fld, &err))) {
                status = rc == SB_EINPUT
                             ? cli_usage_error(CMD, "--upgrade: %s", err.msg)
                             : cli_report(CMD, rc, &err);
                break;
            }
            snprintf(u->label, sizeof u->label, "%s+upgrade", r->sys->name);
        }
    }
    for (size_t r = 0; r < nr && status == CLI_EXIT_OK; r++) {
        double tx = runs[r].sys->vertical.draft + runs[r].sys->vertical.squat +
                    runs[r].sys->vertical.loading;

        runs[r].has_dp = sb_density_params_from_system(runs[r].sys,
                                                       &runs[r].dp);
        for (size_t i = 0; i < nd; i++)
            if (!(depths[i] > tx)) {
                status = cli_usage_error(CMD, "depth %g m is not below the "
                                              "transducer of %s (expected "
                                              "depths greater than %g m)",
                                         depths[i], runs[r].label, tx);
                break;
            }
    }
    if (status == CLI_EXIT_OK) {
        h95 = sb_horiz95_alloc(&err);
        if (!h95)
            status = cli_report(CMD, SB_ENOMEM, &err);
    }
    if (status == CLI_EXIT_OK) {
        U = calloc(nr * nsel * nd, sizeof U[0]);
        if (!U)
            status = fail(SB_ENOMEM);
    }
    for (size_t r = 0; r < nr && status == CLI_EXIT_OK; r++) {
        struct sb_usable_ctx ctx = {runs[r].sys, h95, NULL, rule,
                                    runs[r].has_dp ? &runs[r].dp : NULL,
                                    runs[r].sys->conditions.speed};

        for (size_t k = 0; k < nsel && status == CLI_EXIT_OK; k++) {
            ctx.order = sel[k];
            for (size_t i = 0; i < nd; i++)
                if ((rc = sb_usable_at(&ctx, depths[i],
                                       &U[(r * nsel + k) * nd + i], &err))) {
                    status = cli_report(CMD, rc, &err);
                    break;
                }
        }
        if (status != CLI_EXIT_OK || !area)
            continue;
        ctx.order = aorder;
        if ((rc = sb_effort_speed(area, &ctx, &E[r].speed_mps, &E[r].why,
                                  &err)) ||
            (ctx.speed_mps = E[r].speed_mps,
             rc = sb_effort_plan(area, E[r].speed_mps, sb_usable_halfwidth,
                                 &ctx, &E[r].e, &err))) {
            /* a depth of the area above the transducer is the area's
             * fault: point at the file */
            if (rc == SB_EINPUT && !err.file[0])
                snprintf(err.file, sizeof err.file, "%s", area->source);
            status = cli_report(CMD, rc, &err);
            break;
        }
        E[r].done = 1;
    }
    if (status == CLI_EXIT_OK)
        status = fmt == SB_FORMAT_JSON
                     ? write_json(std, runs, nr, sel, nsel, nd, U, area,
                                  aorder, E, upgrade)
                     : write_tables(runs, nr, sel, nsel, nd, U, area, aorder,
                                    E, upgrade, fmt);
    for (size_t r = 0; r < nr; r++)
        if (E[r].done)
            sb_effort_release(&E[r].e);
    free(U);
    sb_horiz95_free(h95);
    sb_area_free(area);
    free_runs(runs, nr);
    return status;
}
