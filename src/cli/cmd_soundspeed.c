/*
 * swathbudget soundspeed — a sound velocity profile from a depth-speed file
 * or a CTD cast converted with a chosen equation, with the equation's
 * validity warnings.
 *
 *   swathbudget soundspeed CAST.csv [--equation NAME] [--latitude LAT]
 *                          [--format table|csv|json]
 */
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "cli.h"
#include "commands.h"
#include "swathbudget/profile.h"
#include "swathbudget/soundspeed.h"
#include "swathbudget/writer.h"

#define CMD "soundspeed"
#define JSON_DIGITS 10
#define DEG (3.14159265358979323846 / 180.0)

static const char caution[] =
    "A sound velocity profile feeds an a-priori estimate; neither is proof "
    "of a survey's quality. Defer to the hydrographic authority's "
    "specifications, local regulations and licensed practice.";

void cmd_soundspeed_help(FILE *f)
{
    fprintf(f,
            "usage: swathbudget soundspeed CAST.csv [--equation NAME] "
            "[--latitude LAT]\n"
            "                              [--format table|csv|json]\n\n"
            "Read a sound velocity profile (depth_m or pressure_dbar with "
            "speed_m_s) or a\nCTD cast (depth_m or pressure_dbar, "
            "temperature_degC or\ntemperature_ipts68_degC, salinity_psu) and "
            "print the profile, converting a\ncast with a sound-speed "
            "equation.  Samples outside the equation's range of\nvalidity "
            "are kept and listed as warnings (stderr for table and csv, a\n"
            "\"warnings\" array in json).  See docs/soundspeed.md for the "
            "file format.\n\n"
            "options:\n"
            "  --equation NAME  equation for a cast (default %s):\n",
            sb_soundspeed_info(SB_SS_DEFAULT)->name);
    for (int i = 0; i < SB_SS_COUNT; i++) {
        const struct sb_soundspeed_info *k = sb_soundspeed_info(i);
        fprintf(f, "                     %-19s %s\n", k->name, k->title);
    }
    fprintf(f,
            "  --latitude LAT   station latitude in degrees, -90 to 90, for "
            "pressure-depth\n"
            "                   conversion and Leroy's latitude term (if "
            "needed and not\n"
            "                   given, %g is assumed and a warning printed)\n"
            "  --format F       table (default), csv or json\n"
            "  -h, --help       this text\n\n%s\n",
            SB_PROFILE_DEFAULT_LATITUDE_DEG, caution);
}

static int fail(int rc, const char *what)
{
    struct sb_error err;

    sb_error_set(&err, rc, "", 0, 0, "%s (%s)", what, sb_strerror(rc));
    return cli_report(CMD, rc, &err);
}

static int write_json(const struct sb_profile *p)
{
    const struct sb_soundspeed_info *eq = sb_soundspeed_info(p->equation);
    struct sb_json j;
    struct sb_error err;
    int rc;

    sb_json_init(&j, stdout);
    sb_json_begin_object(&j);
    sb_json_kv_string(&j, "source", p->source);
    sb_json_key(&j, "equation");
    if (eq)
        sb_json_string(&j, eq->name);
    else
        sb_json_null(&j);
    sb_json_key(&j, "equation_citation");
    if (eq)
        sb_json_string(&j, eq->citation);
    else
        sb_json_null(&j);
    sb_json_key(&j, "latitude_deg");
    if (isnan(p->latitude_rad))
        sb_json_null(&j);
    else
        sb_json_number(&j, p->latitude_rad / DEG, JSON_DIGITS);
    sb_json_key(&j, "latitude_assumed");
    sb_json_bool(&j, p->latitude_assumed);
    sb_json_key(&j, "samples");
    sb_json_begin_array(&j);
    for (size_t i = 0; i < p->n; i++) {
        sb_json_begin_object(&j);
        if (p->line) {
            sb_json_key(&j, "line");
            sb_json_integer(&j, p->line[i]);
        }
        sb_json_kv_number(&j, "depth_m", p->depth_m[i], JSON_DIGITS);
        if (p->pressure_dbar)
            sb_json_kv_number(&j, "pressure_dbar", p->pressure_dbar[i],
                              JSON_DIGITS);
        if (p->temperature_degC) {
            sb_json_kv_number(&j, "temperature_degC", p->temperature_degC[i],
                              JSON_DIGITS);
            sb_json_kv_number(&j, "salinity_psu", p->salinity_psu[i],
                              JSON_DIGITS);
        }
        sb_json_kv_number(&j, "speed_m_s", p->speed_mps[i], JSON_DIGITS);
        sb_json_end_object(&j);
    }
    sb_json_end_array(&j);
    sb_json_key(&j, "warnings");
    sb_json_begin_array(&j);
    for (int i = 0; i < p->n_warnings; i++) {
        const struct sb_profile_warning *w = &p->warnings[i];
        sb_json_begin_object(&j);
        sb_json_key(&j, "line");
        if (w->line > 0)
            sb_json_integer(&j, w->line);
        else
            sb_json_null(&j);
        sb_json_key(&j, "depth_m");
        if (isnan(w->depth_m))
            sb_json_null(&j);
        else
            sb_json_number(&j, w->depth_m, JSON_DIGITS);
        sb_json_kv_string(&j, "message", w->msg);
        sb_json_end_object(&j);
    }
    sb_json_end_array(&j);
    sb_json_kv_string(&j, "caution", caution);
    sb_json_end_object(&j);
    sb_error_clear(&err);
    rc = sb_json_finish(&j, &err);
    return rc == SB_OK ? CLI_EXIT_OK : cli_report(CMD, rc, &err);
}

static int write_table(const struct sb_profile *p, enum sb_format fmt)
{
    const struct sb_soundspeed_info *eq = sb_soundspeed_info(p->equation);
    struct sb_table_col cols[5];
    size_t nc = 0;
    struct sb_table *t;
    struct sb_error err;
    int rc = SB_OK;

    cols[nc++] = (struct sb_table_col){"depth (m)", "depth_m", 2};
    if (p->pressure_dbar)
        cols[nc++] = (struct sb_table_col){"pressure (dbar)", "pressure_dbar",
                                           2};
    if (p->temperature_degC) {
        cols[nc++] = (struct sb_table_col){"temperature ITS-90 (degC)",
                                           "temperature_degC", 3};
        cols[nc++] = (struct sb_table_col){"salinity (psu)", "salinity_psu",
                                           3};
    }
    cols[nc++] = (struct sb_table_col){"sound speed (m/s)", "speed_m_s", 3};
    t = sb_table_alloc(cols, nc);
    if (!t)
        return fail(SB_ENOMEM, "could not build the table");
    for (size_t i = 0; i < p->n && rc == SB_OK; i++) {
        if ((rc = sb_table_num(t, p->depth_m[i])))
            break;
        if (p->pressure_dbar && (rc = sb_table_num(t, p->pressure_dbar[i])))
            break;
        if (p->temperature_degC &&
            ((rc = sb_table_num(t, p->temperature_degC[i])) ||
             (rc = sb_table_num(t, p->salinity_psu[i]))))
            break;
        rc = sb_table_num(t, p->speed_mps[i]);
    }
    if (rc != SB_OK) {
        sb_table_free(t);
        return fail(rc, "could not build the table");
    }
    if (fmt == SB_FORMAT_TABLE) {
        printf("sound velocity profile from %s\n", p->source);
        if (eq)
            printf("equation: %s\n          %s\n", eq->title, eq->citation);
        else
            printf("speeds as given in the file (no equation applied)\n");
        if (!isnan(p->latitude_rad))
            printf("latitude: %.4f deg%s\n", p->latitude_rad / DEG,
                   p->latitude_assumed ? " (assumed: none given)" : "");
        printf("%zu samples, %d warning%s\n\n", p->n, p->n_warnings,
               p->n_warnings == 1 ? "" : "s");
    }
    sb_error_clear(&err);
    rc = sb_table_write(t, stdout, fmt, &err);
    sb_table_free(t);
    if (rc != SB_OK)
        return cli_report(CMD, rc, &err);
    if (fmt == SB_FORMAT_TABLE)
        printf("\n%s\n", caution);
    return CLI_EXIT_OK;
}

int cmd_soundspeed(int argc, char **argv)
{
    enum { OPT_EQUATION = 256, OPT_LATITUDE, OPT_FORMAT };
    static const struct option opts[] = {
        {"equation", required_argument, NULL, OPT_EQUATION},
        {"latitude", required_argument, NULL, OPT_LATITUDE},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    enum sb_format fmt = SB_FORMAT_TABLE;
    double lat_deg = NAN;
    int equation = -1, c, rc;
    struct sb_profile *p = NULL;
    struct sb_error err;
    char names[256];

    optind = 1;
    while ((c = getopt_long(argc, argv, ":h", opts, NULL)) != -1) {
        switch (c) {
        case OPT_EQUATION:
            equation = sb_soundspeed_find(optarg);
            if (equation < 0)
                return cli_usage_error(CMD, "--equation: unknown equation "
                                            "'%s' (expected one of: %s)",
                                       optarg,
                                       sb_soundspeed_names(names,
                                                           sizeof names));
            break;
        case OPT_LATITUDE:
            rc = cli_parse_double(CMD, "--latitude", optarg, -90.0, 90.0, 0,
                                  &lat_deg);
            if (rc != CLI_EXIT_OK)
                return rc;
            break;
        case OPT_FORMAT:
            if ((rc = cli_parse_format(CMD, optarg, &fmt)) != CLI_EXIT_OK)
                return rc;
            break;
        case 'h':
            cmd_soundspeed_help(stdout);
            return CLI_EXIT_OK;
        default:
            return cli_bad_option(CMD, argc, argv);
        }
    }
    if (optind >= argc)
        return cli_usage_error(CMD, "no cast given (expected one CSV file)");
    if (argc - optind > 1)
        return cli_usage_error(CMD, "unexpected argument '%s' (expected one "
                                    "CSV file)",
                               argv[optind + 1]);

    sb_error_clear(&err);
    rc = sb_profile_load(argv[optind], equation,
                         isnan(lat_deg) ? NAN : lat_deg * DEG, &p, &err);
    if (rc != SB_OK)
        return cli_report(CMD, rc, &err);

    if (fmt == SB_FORMAT_JSON) {
        rc = write_json(p);
    } else {
        char buf[SB_PROFILE_WARNING_MAX + 300];
        for (int i = 0; i < p->n_warnings; i++)
            cli_warn(CMD, "%s",
                     sb_profile_warning_format(p, i, buf, sizeof buf));
        rc = write_table(p, fmt);
    }
    sb_profile_free(p);
    return rc;
}
