/*
 * swathbudget simulate — a synthetic survey for demonstrations and for
 * end-to-end tests of `audit`.
 *
 *   swathbudget simulate SYSTEM.yaml --area AREA.yaml -o SURVEY.csv
 *                        [--seed S] [--standard ID|FILE] [--order ID]
 *                        [--ping-spacing M] [--beams N] [--crosslines N]
 *                        [--relief none|features] [--with-tpu]
 *                        [--thu-rule exact|s44] [--max-soundings N]
 */
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "commands.h"
#include "swathbudget/area.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/orders.h"
#include "swathbudget/propagate.h"
#include "swathbudget/simulate.h"
#include "swathbudget/spec.h"
#include "swathbudget/system.h"
#include "swathbudget/writer.h"

#define CMD "simulate"
#define PI 3.14159265358979323846

void cmd_simulate_help(FILE *f)
{
    fprintf(f,
            "usage: swathbudget simulate SYSTEM.yaml --area AREA.yaml -o "
            "SURVEY.csv\n"
            "                            [--seed S] [--standard ID|FILE] "
            "[--order ID]\n"
            "                            [--ping-spacing M] [--beams N] "
            "[--crosslines N]\n"
            "                            [--relief none|features] "
            "[--with-tpu]\n"
            "                            [--thu-rule exact|s44] "
            "[--max-soundings N]\n\n"
            "Write an invented survey of the area as CSV: mainscheme lines "
            "at the spacing\n'compare --area' would choose for the order, "
            "perpendicular crosslines, and\nfor every sounding an error "
            "drawn from the system's uncertainty model (one\ndraw per "
            "component, through the full georeferencing model).  For "
            "demos and\nfor testing 'swathbudget audit'; see "
            "docs/audit.md.\n\n"
            "options:\n"
            "  --area AREA.yaml      the survey area (outline, depths, "
            "order; docs/area.md)\n"
            "  -o, --output FILE     the CSV to write (replaced atomically)\n"
            "  --seed S              random seed, an integer >= 0 (default "
            "1)\n"
            "  --standard ID|FILE    standard of the order (default %s)\n"
            "  --order ID            order for the line spacing (default: "
            "the area's)\n"
            "  --ping-spacing M      metres between pings along a line "
            "(default 5)\n"
            "  --beams N             beams per ping across the swath "
            "(default 41)\n"
            "  --crosslines N        crosslines across the mainscheme "
            "(default 3)\n"
            "  --relief R            'features' (default: a mound and a "
            "wreck-sized block\n"
            "                        on the area's seafloor) or 'none'\n"
            "  --with-tpu            add each sounding's a-priori TVU95 and "
            "THU95 (m)\n"
            "  --thu-rule R          exact (default) or s44: which THU95 "
            "sets the swath\n"
            "  --max-soundings N     refuse to write more (default %llu)\n"
            "  -h, --help            this text\n\n"
            "Columns written: line, easting_m, northing_m, depth_m, "
            "beam_angle_deg\n[, tvu95_m, thu95_m].  Lines M001... "
            "(mainscheme) and X01... (crosslines).\n\n"
            "A simulated survey is invented data: it shows what the "
            "a-priori model implies,\nnot how any real survey turned "
            "out.\n",
            SB_STANDARD_DEFAULT_ID,
            (unsigned long long)SB_SIMULATE_SOUNDINGS_DEFAULT);
}

int cmd_simulate(int argc, char **argv)
{
    enum {
        OPT_AREA = 256, OPT_SEED, OPT_STANDARD, OPT_ORDER, OPT_PING,
        OPT_BEAMS, OPT_CROSS, OPT_RELIEF, OPT_TPU, OPT_RULE, OPT_MAX
    };
    static const struct option opts[] = {
        {"area", required_argument, NULL, OPT_AREA},
        {"output", required_argument, NULL, 'o'},
        {"seed", required_argument, NULL, OPT_SEED},
        {"standard", required_argument, NULL, OPT_STANDARD},
        {"order", required_argument, NULL, OPT_ORDER},
        {"ping-spacing", required_argument, NULL, OPT_PING},
        {"beams", required_argument, NULL, OPT_BEAMS},
        {"crosslines", required_argument, NULL, OPT_CROSS},
        {"relief", required_argument, NULL, OPT_RELIEF},
        {"with-tpu", no_argument, NULL, OPT_TPU},
        {"thu-rule", required_argument, NULL, OPT_RULE},
        {"max-soundings", required_argument, NULL, OPT_MAX},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    const char *area_path = NULL, *out_path = NULL, *std_arg = NULL;
    const char *order_arg = NULL;
    struct sb_simulate_opts so;
    struct sb_simulate_stats st;
    struct sb_system *sys = NULL;
    struct sb_area *area = NULL;
    struct sb_horiz95 *h95 = NULL;
    struct sb_standard storage;
    const struct sb_standard *std = NULL;
    struct sb_outfile of;
    struct sb_error err;
    int c, rc, status = CLI_EXIT_OK, out_open = 0;
    long lv;
    double dv;

    sb_simulate_opts_default(&so);
    optind = 1;
    while ((c = getopt_long(argc, argv, ":ho:", opts, NULL)) != -1) {
        switch (c) {
        case OPT_AREA: area_path = optarg; break;
        case 'o': out_path = optarg; break;
        case OPT_SEED:
            if ((rc = cli_parse_double(CMD, "--seed", optarg, 0, 4294967295.0,
                                       0, &dv)) != CLI_EXIT_OK)
                return rc;
            if (dv != floor(dv))
                return cli_usage_error(CMD, "--seed: '%s' is not a whole "
                                            "number (expected an integer "
                                            ">= 0)",
                                       optarg);
            so.seed = (uint64_t)dv;
            break;
        case OPT_STANDARD: std_arg = optarg; break;
        case OPT_ORDER: order_arg = optarg; break;
        case OPT_PING:
            if ((rc = cli_parse_double(CMD, "--ping-spacing", optarg, 0,
                                       10000, 1, &so.ping_spacing_m)) !=
                CLI_EXIT_OK)
                return rc;
            break;
        case OPT_BEAMS:
            if ((rc = cli_parse_long(CMD, "--beams", optarg, 2,
                                     SB_SIMULATE_BEAMS_MAX, &lv)) !=
                CLI_EXIT_OK)
                return rc;
            so.beams = (int)lv;
            break;
        case OPT_CROSS:
            if ((rc = cli_parse_long(CMD, "--crosslines", optarg, 1,
                                     SB_SIMULATE_CROSSLINES_MAX, &lv)) !=
                CLI_EXIT_OK)
                return rc;
            so.n_crosslines = (int)lv;
            break;
        case OPT_RELIEF:
            if (strcmp(optarg, "none") == 0)
                so.relief = SB_RELIEF_NONE;
            else if (strcmp(optarg, "features") == 0)
                so.relief = SB_RELIEF_FEATURES;
            else
                return cli_usage_error(CMD, "--relief: unknown relief '%s' "
                                            "(expected none or features)",
                                       optarg);
            break;
        case OPT_TPU: so.with_tpu = 1; break;
        case OPT_RULE:
            if ((rc = cli_parse_thu_rule(CMD, optarg, &so.thu_rule)) !=
                CLI_EXIT_OK)
                return rc;
            break;
        case OPT_MAX:
            if ((rc = cli_parse_double(CMD, "--max-soundings", optarg, 1,
                                       1e12, 0, &dv)) != CLI_EXIT_OK)
                return rc;
            so.max_soundings = (uint64_t)dv;
            break;
        case 'h':
            cmd_simulate_help(stdout);
            return CLI_EXIT_OK;
        default:
            return cli_bad_option(CMD, argc, argv);
        }
    }
    if (optind >= argc)
        return cli_usage_error(CMD, "no system file (expected SYSTEM.yaml)");
    if (optind + 1 < argc)
        return cli_usage_error(CMD, "unexpected argument '%s' (expected one "
                                    "SYSTEM.yaml)",
                               argv[optind + 1]);
    if (!area_path)
        return cli_usage_error(CMD, "no area (expected --area AREA.yaml)");
    if (!out_path)
        return cli_usage_error(CMD, "no output file (expected -o "
                                    "SURVEY.csv)");

    sb_error_clear(&err);
    sys = sb_system_alloc();
    area = sb_area_alloc();
    if (!sys || !area) {
        sb_error_set(&err, SB_ENOMEM, "", 0, 0, "out of memory");
        status = cli_report(CMD, SB_ENOMEM, &err);
        goto done;
    }
    if ((rc = sb_spec_load(argv[optind], sys, &err)) != SB_OK ||
        (rc = sb_area_load(area_path, area, &err)) != SB_OK ||
        (rc = sb_standard_resolve(std_arg, &storage, &std, &err)) != SB_OK) {
        status = cli_report(CMD, rc, &err);
        goto done;
    }
    if (order_arg) {
        so.order = sb_standard_order(std, order_arg);
        if (!so.order) {
            status = cli_usage_error(CMD, "--order: unknown order '%s' in %s "
                                          "(expected an order of the "
                                          "standard)",
                                     order_arg, std->id);
            goto done;
        }
    } else {
        so.order = sb_standard_order(std, area->order);
        if (!so.order) {
            sb_error_set(&err, SB_EINPUT, area->source, area->order_line,
                         area->order_col,
                         "order: unknown order '%s' in %s (expected an "
                         "order of the standard)",
                         area->order, std->id);
            status = cli_report(CMD, SB_EINPUT, &err);
            goto done;
        }
    }
    h95 = sb_horiz95_alloc(&err);
    if (!h95) {
        status = cli_report(CMD, SB_ENOMEM, &err);
        goto done;
    }
    if ((rc = sb_outfile_open(&of, out_path, &err)) != SB_OK) {
        status = cli_report(CMD, rc, &err);
        goto done;
    }
    out_open = 1;
    rc = sb_simulate(sys, h95, area, &so, of.f, &st, &err);
    if (rc != SB_OK) {
        sb_outfile_abort(&of);
        out_open = 0;
        /* an area the system cannot survey is the area file's matter */
        if (rc == SB_EINPUT && !err.file[0] && !order_arg)
            sb_error_at(&err, area->source, area->order_line,
                        area->order_col);
        status = cli_report(CMD, rc, &err);
        goto done;
    }
    out_open = 0;
    if ((rc = sb_outfile_commit(&of, &err)) != SB_OK) {
        status = cli_report(CMD, rc, &err);
        goto done;
    }
    printf("wrote %llu soundings to %s\n"
           "  system %s, area %s, order %s of %s, seed %llu\n"
           "  %zu mainscheme lines at %.0f deg, spacing %.1f to %.1f m; %zu "
           "crosslines\n"
           "  pings every %.2f m, %d beams; true depths %.2f to %.2f m; "
           "%llu beams skipped (seafloor too close)\n"
           "Invented data for demonstration: not a record of any real "
           "survey.\n",
           (unsigned long long)st.soundings, out_path, sys->name, area->name,
           so.order->id, std->id, (unsigned long long)so.seed, st.n_main,
           st.azimuth_rad * 180.0 / PI, st.spacing_min_m, st.spacing_max_m,
           st.n_cross, so.ping_spacing_m, so.beams, st.depth_min_m,
           st.depth_max_m, (unsigned long long)st.skipped);
done:
    if (out_open)
        sb_outfile_abort(&of);
    sb_horiz95_free(h95);
    sb_area_free(area);
    sb_system_free(sys);
    return status;
}
