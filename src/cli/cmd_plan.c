/*
 * swathbudget plan — the usable swath of a survey system: for each order
 * and depth, the beam angle from nadir, port and starboard, out to which
 * every sounding meets the order's TVU and THU limits; with --angles also
 * the TVU/THU grid.
 *
 *   swathbudget plan SYSTEM.yaml [--standard ID|FILE] [--order ID[,ID...]]
 *                    [--depths START:STOP:STEP | --depth D[,D...]]
 *                    [--angles START:STOP:STEP] [--thu-rule exact|s44]
 *                    [--format table|csv|json]
 */
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "commands.h"
#include "swathbudget/density.h"
#include "swathbudget/georef.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/orders.h"
#include "swathbudget/propagate.h"
#include "swathbudget/spec.h"
#include "swathbudget/swath.h"
#include "swathbudget/system.h"
#include "swathbudget/writer.h"

#define CMD "plan"
#define MAX_DEPTHS 4096
#define MAX_ANGLES 1801
/* Keep a grid printable: more points than this is surely a typing error. */
#define MAX_GRID 1000000
#define DEPTH_MAX_M 12000.0
#define JSON_DIGITS 10
#define PI 3.14159265358979323846
#define RAD2DEG (180.0 / PI)
#define DEG2RAD (PI / 180.0)

/* Depths used when none are given: the bands a harbour tender usually
 * asks about (channel, approaches, anchorage), in metres. */
static const double default_depths[] = {10.0, 20.0, 50.0, 100.0, 200.0};
#define DEFAULT_DEPTHS_TEXT "10,20,50,100,200"

void cmd_plan_help(FILE *f)
{
    fprintf(f,
            "usage: swathbudget plan SYSTEM.yaml [--standard ID|FILE] "
            "[--order ID[,ID...]]\n"
            "                        [--depths START:STOP:STEP | --depth "
            "D[,D...]]\n"
            "                        [--angles START:STOP:STEP] "
            "[--thu-rule exact|s44]\n"
            "                        [--format table|csv|json]\n\n"
            "For each order and depth, the beam angle from nadir, port and "
            "starboard, out\nto which every sounding of the system meets the "
            "order's TVU and THU limits\n(95 %%), the swath width this gives "
            "on a flat seafloor, what ends it (tvu,\nthu, max_angle, or nadir "
            "when even nadir fails) and the component that\ndominates there. "
            "With --angles, also TVU and THU on the depth x angle grid.\n\n"
            "options:\n"
            "  --standard ID|FILE  compiled-in standard (default %s) or a "
            "YAML file\n"
            "  --order ID[,ID...]  orders to plan for (default: all of the "
            "standard's)\n"
            "  --depth D[,D...]    seafloor depths below the surface, m "
            "(default %s)\n"
            "  --depths A:B:S      depths from A to B inclusive in steps of "
            "S metres\n"
            "  --angles A:B:S      beam angles for the grid, deg, port "
            "negative\n"
            "  --thu-rule R        horizontal 95 %% figure compared with "
            "THU: exact (the\n"
            "                      exact 95 %% radius, default) or s44 "
            "(2.45 x larger\n"
            "                      semi-axis); both figures are printed\n"
            "  --format F          table (default), csv or json; csv "
            "prints the usable\n"
            "                      table, then a blank line and the grid\n"
            "  -h, --help          this text\n\n"
            "System file format: docs/spec.md.  The figures are a-priori "
            "estimates, not\nproof of a survey's quality: defer to the "
            "hydrographic authority's\nspecifications, local regulations and "
            "licensed practice.\n",
            SB_STANDARD_DEFAULT_ID, DEFAULT_DEPTHS_TEXT);
}

/* One usable-swath row, with the uncertainty at the edge of the narrower
 * half (so that both THU figures can be shown). */
struct usable_row {
    const struct sb_order *order;
    struct sb_swath_result res;
    const struct sb_swath_side *narrow; /* port or starboard of res */
    struct sb_grid_point edge;          /* at the narrower side's angle */
    /* the second limit: sounding density for the order's feature size at
     * the system's survey speed (issue text: beside the TVU/THU angle) */
    int density_applies;                /* beams stated and a feature size */
    struct sb_density_limit density;
};

static const char *dominant_name(const struct sb_swath_side *s)
{
    return s->dominant >= 0 ? sb_component_name(s->dominant) : NULL;
}

static int compute_usable(const struct sb_system *sys,
                          const struct sb_horiz95 *h95,
                          const struct sb_order *const *sel, size_t nsel,
                          const double *depths, size_t nd, int rule,
                          struct usable_row *rows, struct sb_error *err)
{
    struct sb_density_params dp;
    const int has_beams = sb_density_params_from_system(sys, &dp);
    const double tx = sys->vertical.draft + sys->vertical.squat +
                      sys->vertical.loading;

    for (size_t k = 0; k < nsel; k++)
        for (size_t i = 0; i < nd; i++) {
            struct usable_row *r = &rows[k * nd + i];
            double a;
            int rc;

            r->order = sel[k];
            rc = sb_swath_fail(sys, h95, depths[i],
                               sb_order_tvu(sel[k], depths[i]),
                               sb_order_thu(sel[k], depths[i]), rule,
                               &r->res, err);
            if (rc != SB_OK)
                return rc;
            /* the narrower half limits the swath; on a tie either will do */
            r->narrow = r->res.port.across_m < r->res.starboard.across_m
                            ? &r->res.port
                            : &r->res.starboard;
            a = r->narrow == &r->res.port ? -r->narrow->angle_rad
                                          : r->narrow->angle_rad;
            rc = sb_swath_grid(sys, h95, &depths[i], 1, &a, 1, &r->edge, err);
            if (rc != SB_OK)
                return rc;
            {
                double feature;
                r->density_applies =
                    has_beams && sb_order_feature(sel[k], depths[i], &feature);
                if (r->density_applies &&
                    (rc = sb_density_limit(&dp, depths[i] - tx,
                                           sys->conditions.speed, feature,
                                           &r->density, err)) != SB_OK)
                    return rc;
            }
        }
    return SB_OK;
}

static void json_side_angle(struct sb_json *j, const char *key,
                            const struct sb_swath_side *s)
{
    sb_json_key(j, key);
    if (s->reason == SB_SWATH_NADIR)
        sb_json_null(j);
    else
        sb_json_number(j, s->angle_rad * RAD2DEG, JSON_DIGITS);
}

static int write_json(const struct sb_system *sys,
                      const struct sb_standard *std,
                      const struct usable_row *rows, size_t nrows,
                      const double *depths, size_t nd, const double *angles,
                      size_t na, const struct sb_grid_point *grid)
{
    struct sb_json j;
    struct sb_error err;
    int rc;

    sb_json_init(&j, stdout);
    sb_json_begin_object(&j);
    sb_json_kv_string(&j, "system", sys->name);
    sb_json_kv_string(&j, "standard", std->id);
    sb_json_key(&j, "usable");
    sb_json_begin_array(&j);
    for (size_t r = 0; r < nrows; r++) {
        const struct usable_row *u = &rows[r];
        const char *dom = dominant_name(u->narrow);

        sb_json_begin_object(&j);
        sb_json_kv_string(&j, "order", u->order->id);
        sb_json_kv_number(&j, "depth_m", u->res.depth_m, JSON_DIGITS);
        json_side_angle(&j, "port_deg", &u->res.port);
        json_side_angle(&j, "starboard_deg", &u->res.starboard);
        sb_json_kv_number(&j, "swath_width_m", u->res.width_m, JSON_DIGITS);
        sb_json_kv_string(&j, "limited_by",
                          sb_swath_reason_name(u->narrow->reason));
        if (u->res.port.reason != u->res.starboard.reason) {
            sb_json_kv_string(&j, "limited_by_port",
                              sb_swath_reason_name(u->res.port.reason));
            sb_json_kv_string(&j, "limited_by_starboard",
                              sb_swath_reason_name(u->res.starboard.reason));
        }
        sb_json_key(&j, "dominant");
        if (dom)
            sb_json_string(&j, dom);
        else
            sb_json_null(&j);
        /* the density limit angle, null where it does not apply (no beam
         * count stated, or the order sets no feature size) */
        sb_json_key(&j, "density_deg");
        if (u->density_applies)
            sb_json_number(&j, u->density.angle_rad * RAD2DEG, JSON_DIGITS);
        else
            sb_json_null(&j);
        sb_json_end_object(&j);
    }
    sb_json_end_array(&j);
    sb_json_key(&j, "grid");
    sb_json_begin_array(&j);
    for (size_t i = 0; i < nd; i++)
        for (size_t a = 0; a < na; a++) {
            const struct sb_grid_point *g = &grid[i * na + a];

            sb_json_begin_object(&j);
            sb_json_kv_number(&j, "depth_m", depths[i], JSON_DIGITS);
            sb_json_kv_number(&j, "angle_deg", angles[a], JSON_DIGITS);
            if (g->ray_turns) {
                /* the ray turns above the seafloor: no sounding */
                static const char *const k[] = {"tvu_m", "thu_m", "sigma_z_m", "thu_s44_m"};
                for (int q = 0; q < 4; q++) {
                    sb_json_key(&j, k[q]);
                    sb_json_null(&j);
                }
                sb_json_kv_string(&j, "note", "ray_turns");
                sb_json_end_object(&j);
                continue;
            }
            sb_json_kv_number(&j, "tvu_m", g->tvu95_m, JSON_DIGITS);
            sb_json_kv_number(&j, "thu_m", g->thu95_m, JSON_DIGITS);
            sb_json_kv_number(&j, "sigma_z_m", g->sigma_z_m, JSON_DIGITS);
            sb_json_kv_number(&j, "thu_s44_m", g->thu95_s44_m, JSON_DIGITS);
            sb_json_end_object(&j);
        }
    sb_json_end_array(&j);
    sb_json_end_object(&j);
    sb_error_clear(&err);
    rc = sb_json_finish(&j, &err);
    return rc == SB_OK ? CLI_EXIT_OK : cli_report(CMD, rc, &err);
}

static int table_fail(struct sb_table *t, int rc)
{
    struct sb_error err;

    sb_table_free(t);
    sb_error_set(&err, rc, "", 0, 0, "could not build the table (%s)",
                 sb_strerror(rc));
    return cli_report(CMD, rc, &err);
}

static int side_cell(struct sb_table *t, const struct sb_swath_side *s)
{
    return s->reason == SB_SWATH_NADIR ? sb_table_empty(t, "-")
                                       : sb_table_num(t, s->angle_rad *
                                                             RAD2DEG);
}

static int write_usable_table(const struct usable_row *rows, size_t nrows,
                              enum sb_format fmt)
{
    static const struct sb_table_col cols[] = {
        {"order", "order", 0},
        {"depth (m)", "depth_m", 1},
        {"port (deg)", "port_deg", 2},
        {"starboard (deg)", "starboard_deg", 2},
        {"swath width (m)", "swath_width_m", 1},
        {"limited by", "limited_by", 0},
        {"port by", "limited_by_port", 0},
        {"stbd by", "limited_by_starboard", 0},
        {"dominant", "dominant", 0},
        {"density (deg)", "density_deg", 2},
        {"TVU95 edge (m)", "tvu_edge_m", 3},
        {"THU95 exact edge (m)", "thu_edge_m", 3},
        {"THU95 S-44 edge (m)", "thu_s44_edge_m", 3},
    };
    struct sb_table *t = sb_table_alloc(cols, sizeof cols / sizeof cols[0]);
    struct sb_error err;
    int rc = SB_OK;

    if (!t)
        return table_fail(NULL, SB_ENOMEM);
    for (size_t r = 0; r < nrows && rc == SB_OK; r++) {
        const struct usable_row *u = &rows[r];
        const char *dom = dominant_name(u->narrow);

        if ((rc = sb_table_str(t, u->order->id)) ||
            (rc = sb_table_num(t, u->res.depth_m)) ||
            (rc = side_cell(t, &u->res.port)) ||
            (rc = side_cell(t, &u->res.starboard)) ||
            (rc = sb_table_num(t, u->res.width_m)) ||
            (rc = sb_table_str(t, sb_swath_reason_name(u->narrow->reason))) ||
            (rc = sb_table_str(t,
                               sb_swath_reason_name(u->res.port.reason))) ||
            (rc = sb_table_str(
                 t, sb_swath_reason_name(u->res.starboard.reason))) ||
            (rc = dom ? sb_table_str(t, dom) : sb_table_empty(t, "-")) ||
            (rc = !u->density_applies ? sb_table_empty(t, "-")
                  : u->density.verdict == SB_DENSITY_NADIR
                      ? sb_table_str(t, "nadir")
                      : sb_table_num(t, u->density.angle_rad * RAD2DEG)) ||
            (rc = sb_table_num(t, u->edge.tvu95_m)) ||
            (rc = sb_table_num(t, u->edge.thu95_m)) ||
            (rc = sb_table_num(t, u->edge.thu95_s44_m)))
            break;
    }
    if (rc != SB_OK)
        return table_fail(t, rc);
    sb_error_clear(&err);
    rc = sb_table_write(t, stdout, fmt, &err);
    sb_table_free(t);
    return rc == SB_OK ? CLI_EXIT_OK : cli_report(CMD, rc, &err);
}

static int write_grid_table(const double *depths, size_t nd,
                            const double *angles, size_t na,
                            const struct sb_grid_point *grid,
                            enum sb_format fmt)
{
    static const struct sb_table_col cols[] = {
        {"depth (m)", "depth_m", 1},
        {"angle (deg)", "angle_deg", 2},
        {"TVU95 (m)", "tvu_m", 3},
        {"THU95 exact (m)", "thu_m", 3},
        {"sigma z (m)", "sigma_z_m", 4},
        {"THU95 S-44 (m)", "thu_s44_m", 3},
    };
    struct sb_table *t = sb_table_alloc(cols, sizeof cols / sizeof cols[0]);
    struct sb_error err;
    int rc = SB_OK;

    if (!t)
        return table_fail(NULL, SB_ENOMEM);
    for (size_t i = 0; i < nd && rc == SB_OK; i++)
        for (size_t a = 0; a < na && rc == SB_OK; a++) {
            const struct sb_grid_point *g = &grid[i * na + a];

            if (g->ray_turns) { /* no sounding: the ray turns above it */
                if ((rc = sb_table_num(t, depths[i])) ||
                    (rc = sb_table_num(t, angles[a])))
                    break;
                for (int q = 0; q < 4 && rc == SB_OK; q++)
                    rc = sb_table_empty(t, q ? "-" : "ray turns");
                continue;
            }
            if ((rc = sb_table_num(t, depths[i])) ||
                (rc = sb_table_num(t, angles[a])) ||
                (rc = sb_table_num(t, g->tvu95_m)) ||
                (rc = sb_table_num(t, g->thu95_m)) ||
                (rc = sb_table_num(t, g->sigma_z_m)) ||
                (rc = sb_table_num(t, g->thu95_s44_m)))
                break;
        }
    if (rc != SB_OK)
        return table_fail(t, rc);
    sb_error_clear(&err);
    rc = sb_table_write(t, stdout, fmt, &err);
    sb_table_free(t);
    return rc == SB_OK ? CLI_EXIT_OK : cli_report(CMD, rc, &err);
}

static int write_text(const struct sb_system *sys,
                      const struct sb_standard *std, int rule,
                      const struct usable_row *rows, size_t nrows,
                      const double *depths, size_t nd, const double *angles,
                      size_t na, const struct sb_grid_point *grid,
                      enum sb_format fmt)
{
    int rc;

    if (fmt == SB_FORMAT_TABLE) {
        char wc[256];

        printf("system: %s%s%s\n", sys->name, sys->title[0] ? " - " : "",
               sys->title);
        if (sys->sound_speed.model != SB_COLUMN_CONSTANT)
            printf("water column: %s\n",
                   sb_system_describe_column(sys, wc, sizeof wc));
    }
    if (fmt == SB_FORMAT_TABLE)
        printf("standard: %s (%s)\n"
               "THU compared as: %s\n\n"
               "Usable swath: beam angle from nadir out to which every "
               "sounding meets the order\n(95 %%); '-' where nadir already "
               "fails.  Edge figures are at the narrower side.\n"
               "density: angle beyond which a cube of the order's feature "
               "size gets fewer\nsoundings than the system's "
               "feature_soundings at its survey speed ('-': no\nfeature "
               "size, or no beam count stated); a second limit, see "
               "docs/report.md.\n\n",
               std->title, std->id,
               rule == SB_THU_S44 ? "2.45 x larger semi-axis (S-44 style)"
                                  : "exact 95 % radius of the error ellipse");
    rc = write_usable_table(rows, nrows, fmt);
    if (rc != CLI_EXIT_OK)
        return rc;
    if (na > 0) {
        if (fmt == SB_FORMAT_TABLE)
            printf("\nTVU and THU (95 %%) on the grid; angles positive to "
                   "starboard:\n\n");
        else
            printf("\n");
        rc = write_grid_table(depths, nd, angles, na, grid, fmt);
        if (rc != CLI_EXIT_OK)
            return rc;
    }
    if (fmt == SB_FORMAT_TABLE)
        printf("\nA-priori estimate from the stated figures, not proof of a "
               "survey's quality;\ndefer to the hydrographic authority's "
               "specifications, local regulations and\nlicensed practice.\n");
    return CLI_EXIT_OK;
}

int cmd_plan(int argc, char **argv)
{
    enum {
        OPT_STANDARD = 256,
        OPT_ORDER,
        OPT_DEPTH,
        OPT_DEPTHS,
        OPT_ANGLES,
        OPT_THU_RULE,
        OPT_FORMAT
    };
    static const struct option opts[] = {
        {"standard", required_argument, NULL, OPT_STANDARD},
        {"order", required_argument, NULL, OPT_ORDER},
        {"depth", required_argument, NULL, OPT_DEPTH},
        {"depths", required_argument, NULL, OPT_DEPTHS},
        {"angles", required_argument, NULL, OPT_ANGLES},
        {"thu-rule", required_argument, NULL, OPT_THU_RULE},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    static double depths[MAX_DEPTHS], angles[MAX_ANGLES];
    const struct sb_order *sel[SB_STANDARD_ORDERS_MAX];
    struct sb_standard storage;
    const struct sb_standard *std = NULL;
    const char *std_arg = NULL, *order_arg = NULL, *angles_arg = NULL;
    const char *depth_opt = NULL, *depth_arg = NULL, *path;
    enum sb_format fmt = SB_FORMAT_TABLE;
    int rule = SB_THU_EXACT;
    struct sb_system sys;
    struct sb_error err;
    struct sb_horiz95 *h95 = NULL;
    struct usable_row *rows = NULL;
    struct sb_grid_point *grid = NULL;
    size_t nd = 0, na = 0, nsel = 0;
    double tx_depth;
    int c, rc;

    optind = 1;
    while ((c = getopt_long(argc, argv, ":h", opts, NULL)) != -1) {
        switch (c) {
        case OPT_STANDARD: std_arg = optarg; break;
        case OPT_ORDER: order_arg = optarg; break;
        case OPT_ANGLES: angles_arg = optarg; break;
        case OPT_DEPTH:
        case OPT_DEPTHS:
            if (depth_opt)
                return cli_usage_error(CMD, "%s given after %s (expected "
                                            "one of --depth or --depths, "
                                            "once)",
                                       c == OPT_DEPTH ? "--depth" : "--depths",
                                       depth_opt);
            depth_opt = c == OPT_DEPTH ? "--depth" : "--depths";
            depth_arg = optarg;
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
            cmd_plan_help(stdout);
            return CLI_EXIT_OK;
        default:
            return cli_bad_option(CMD, argc, argv);
        }
    }
    if ((rc = cli_one_system_file(CMD, argc, argv)) != CLI_EXIT_OK)
        return rc;
    path = argv[optind];
    if (!depth_opt) {
        nd = sizeof default_depths / sizeof default_depths[0];
        memcpy(depths, default_depths, sizeof default_depths);
    } else if (strcmp(depth_opt, "--depth") == 0) {
        rc = cli_parse_values(CMD, "--depth", depth_arg, 0.0, DEPTH_MAX_M, 1,
                              depths, MAX_DEPTHS, &nd);
        if (rc != CLI_EXIT_OK)
            return rc;
    } else {
        rc = cli_parse_range(CMD, "--depths", depth_arg, 0.0, DEPTH_MAX_M, 1,
                             depths, MAX_DEPTHS, &nd);
        if (rc != CLI_EXIT_OK)
            return rc;
    }
    if (angles_arg &&
        (rc = cli_parse_range(CMD, "--angles", angles_arg, -90.0, 90.0, 0,
                              angles, MAX_ANGLES, &na)) != CLI_EXIT_OK)
        return rc;
    if ((rc = cli_check_standard_arg(CMD, std_arg)) != CLI_EXIT_OK)
        return rc;

    if ((rc = cli_check_input_file(CMD, "", path, "a system YAML file, see "
                                                  "docs/spec.md")) !=
        CLI_EXIT_OK)
        return rc;
    sb_error_clear(&err);
    if ((rc = sb_spec_load(path, &sys, &err)) != SB_OK)
        return cli_report(CMD, rc, &err);
    if ((rc = sb_standard_resolve(std_arg, &storage, &std, &err)) != SB_OK) {
        rc = cli_report(CMD, rc, &err);
        goto done;
    }
    if ((rc = cli_select_orders(CMD, std, order_arg, sel, &nsel)) != CLI_EXIT_OK)
        goto done;

    /* options that only make sense against this system */
    tx_depth = sys.vertical.draft + sys.vertical.squat + sys.vertical.loading;
    for (size_t i = 0; i < nd; i++)
        if (!(depths[i] > tx_depth)) {
            rc = cli_usage_error(CMD, "depth %g m is not below the "
                                      "transducer of %s (expected depths "
                                      "greater than %g m)",
                                 depths[i], sys.name, tx_depth);
            goto done;
        }
    for (size_t a = 0; a < na; a++)
        if (fabs(angles[a]) * DEG2RAD > sys.echosounder.max_angle * (1 + 1e-12)) {
            rc = cli_usage_error(CMD, "--angles: %g deg is beyond the "
                                      "maximum beam angle of %s (expected "
                                      "angles within +/-%g deg)",
                                 angles[a], sys.name,
                                 sys.echosounder.max_angle * RAD2DEG);
            goto done;
        }
    if (na > 0 && nd * na > MAX_GRID) {
        rc = cli_usage_error(CMD, "grid of %zu depths x %zu angles is too "
                                  "large (expected at most %d points)",
                             nd, na, MAX_GRID);
        goto done;
    }

    h95 = sb_horiz95_alloc(&err);
    if (!h95) {
        rc = cli_report(CMD, SB_ENOMEM, &err);
        goto done;
    }
    rows = calloc(nsel * nd, sizeof *rows);
    grid = na ? calloc(nd * na, sizeof *grid) : NULL;
    if (!rows || (na && !grid)) {
        sb_error_set(&err, SB_ENOMEM, "", 0, 0, "out of memory");
        rc = cli_report(CMD, SB_ENOMEM, &err);
        goto done;
    }
    {
        double rad[MAX_ANGLES];

        for (size_t a = 0; a < na; a++)
            rad[a] = angles[a] * DEG2RAD;
        rc = compute_usable(&sys, h95, sel, nsel, depths, nd, rule, rows,
                            &err);
        if (rc == SB_OK && na)
            rc = sb_swath_grid(&sys, h95, depths, nd, rad, na, grid, &err);
    }
    if (rc != SB_OK) {
        rc = cli_report(CMD, rc, &err);
        goto done;
    }
    if (fmt == SB_FORMAT_JSON)
        rc = write_json(&sys, std, rows, nsel * nd, depths, nd, angles, na,
                        grid);
    else
        rc = write_text(&sys, std, rule, rows, nsel * nd, depths, nd, angles,
                        na, grid, fmt);
done:
    free(grid);
    free(rows);
    sb_horiz95_free(h95);
    sb_system_release(&sys); /* the profile(s) it owns */
    return rc;
}
