/*
 * swathbudget raytrace — trace rays through a sound velocity profile to a
 * flat seafloor and print, per launch angle, the travel time, horizontal
 * offset and arrival angle.
 *
 *   swathbudget raytrace PROFILE --angles LIST|START:STOP:STEP --depth D
 *                        [--transducer-depth Z] [--equation NAME]
 *                        [--latitude DEG] [--format table|csv|json]
 */
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "commands.h"
#include "swathbudget/profile.h"
#include "swathbudget/raytrace.h"
#include "swathbudget/soundspeed.h"
#include "swathbudget/writer.h"

#define CMD "raytrace"
#define MAX_ANGLES 20000
/* Deeper than any ocean: a larger depth is a typing error. */
#define DEPTH_MAX_M 12000.0
#define JSON_DIGITS 10

static const double PI = 3.14159265358979323846;

void cmd_raytrace_help(FILE *f)
{
    fprintf(f,
            "usage: swathbudget raytrace PROFILE --angles LIST|START:STOP:STEP "
            "--depth D\n"
            "                            [--transducer-depth Z] "
            "[--equation NAME] [--latitude DEG]\n"
            "                            [--format table|csv|json]\n\n"
            "Trace beams through the sound velocity profile PROFILE down to a "
            "flat seafloor\nat depth D and print, for each launch angle, the "
            "horizontal offset, the one-way\nand two-way travel time, the "
            "angle at the seafloor and whether the ray turned\n(became "
            "horizontal) before reaching it.  The speed is linear between "
            "samples and\nconstant above the first and below the last "
            "sample.\n\n"
            "options:\n"
            "  --angles A[,A...]       launch angles in degrees from the "
            "vertical, positive to\n"
            "  --angles A:B:S          starboard, each between -90 and 90 "
            "(exclusive)\n"
            "  --depth D               seafloor depth in metres below the "
            "surface (> Z)\n"
            "  --transducer-depth Z    transducer depth in metres (default "
            "0)\n"
            "  --equation NAME         sound speed equation for a CTD cast "
            "(default %s)\n"
            "  --latitude DEG          station latitude, for pressure <-> "
            "depth (default %g,\n"
            "                          with a warning, when the file needs "
            "one)\n"
            "  --format F              table (default), csv or json\n"
            "  -h, --help              this text\n\n"
            "A ray table models the water at the time of the cast; it is not "
            "proof of a\nsurvey's quality.  Defer to the hydrographic "
            "authority's specifications, local\nregulations and licensed "
            "practice.\n",
            sb_soundspeed_info(SB_SS_DEFAULT)->name,
            SB_PROFILE_DEFAULT_LATITUDE_DEG);
}

/* One row of the result. */
struct row {
    double angle_deg, depth_m, offset_m, t1_s, floor_angle_deg;
    int turned;
};

static int write_json(const char *path, double zt, double c0, double depth,
                      const struct row *rows, size_t n)
{
    struct sb_json j;
    struct sb_error err;

    sb_json_init(&j, stdout);
    sb_json_begin_object(&j);
    sb_json_kv_string(&j, "profile", path);
    sb_json_kv_number(&j, "transducer_depth_m", zt, JSON_DIGITS);
    sb_json_kv_number(&j, "transducer_speed_mps", c0, JSON_DIGITS);
    sb_json_kv_number(&j, "seafloor_depth_m", depth, JSON_DIGITS);
    sb_json_key(&j, "rays");
    sb_json_begin_array(&j);
    for (size_t i = 0; i < n; i++) {
        sb_json_begin_object(&j);
        sb_json_kv_number(&j, "angle_deg", rows[i].angle_deg, JSON_DIGITS);
        sb_json_kv_number(&j, "depth_m", rows[i].depth_m, JSON_DIGITS);
        sb_json_kv_number(&j, "offset_m", rows[i].offset_m, JSON_DIGITS);
        sb_json_kv_number(&j, "t_oneway_s", rows[i].t1_s, JSON_DIGITS);
        sb_json_kv_number(&j, "t_twoway_s", 2.0 * rows[i].t1_s, JSON_DIGITS);
        sb_json_kv_number(&j, "seafloor_angle_deg", rows[i].floor_angle_deg,
                          JSON_DIGITS);
        sb_json_key(&j, "turned");
        sb_json_bool(&j, rows[i].turned);
        sb_json_end_object(&j);
    }
    sb_json_end_array(&j);
    sb_json_kv_string(&j, "caution",
                      "a ray table models the water at the time of the cast, "
                      "not the quality of a survey; defer to the hydrographic "
                      "authority's specifications, local regulations and "
                      "licensed practice");
    sb_json_end_object(&j);
    sb_error_clear(&err);
    int rc = sb_json_finish(&j, &err);
    return rc == SB_OK ? CLI_EXIT_OK : cli_report(CMD, rc, &err);
}

static int write_table(const char *path, double zt, double c0, double depth,
                       const struct row *rows, size_t n, enum sb_format fmt)
{
    static const struct sb_table_col cols[] = {
        {"angle (deg)", "angle_deg", 2},
        {"depth (m)", "depth_m", 3},
        {"offset (m)", "offset_m", 3},
        {"one-way (s)", "t_oneway_s", 7},
        {"two-way (s)", "t_twoway_s", 7},
        {"seafloor angle (deg)", "seafloor_angle_deg", 3},
        {"turned", "turned", 0},
    };
    struct sb_table *t = sb_table_alloc(cols, sizeof cols / sizeof cols[0]);
    struct sb_error err;
    int rc = SB_OK;
    size_t nturn = 0;

    if (!t) {
        sb_error_set(&err, SB_ENOMEM, "", 0, 0, "out of memory");
        return cli_report(CMD, SB_ENOMEM, &err);
    }
    for (size_t i = 0; i < n && rc == SB_OK; i++) {
        nturn += rows[i].turned != 0;
        if ((rc = sb_table_num(t, rows[i].angle_deg)) ||
            (rc = sb_table_num(t, rows[i].depth_m)) ||
            (rc = sb_table_num(t, rows[i].offset_m)) ||
            (rc = sb_table_num(t, rows[i].t1_s)) ||
            (rc = sb_table_num(t, 2.0 * rows[i].t1_s)) ||
            (rc = sb_table_num(t, rows[i].floor_angle_deg)))
            break;
        rc = sb_table_str(t, rows[i].turned ? "yes" : "no");
    }
    if (rc != SB_OK) {
        sb_table_free(t);
        sb_error_set(&err, rc, "", 0, 0, "could not build the table (%s)",
                     sb_strerror(rc));
        return cli_report(CMD, rc, &err);
    }
    if (fmt == SB_FORMAT_TABLE)
        printf("ray table: %s\ntransducer at %.2f m (sound speed %.2f m/s), "
               "flat seafloor at %.2f m\n\n",
               path, zt, c0, depth);
    sb_error_clear(&err);
    rc = sb_table_write(t, stdout, fmt, &err);
    sb_table_free(t);
    if (rc != SB_OK)
        return cli_report(CMD, rc, &err);
    if (fmt == SB_FORMAT_TABLE) {
        printf("\noffset: horizontal distance from the transducer, negative "
               "to port; angles from\nthe vertical.");
        if (nturn)
            printf("  turned = yes: the ray became horizontal above the "
                   "seafloor;\nits row gives the turning point (depth, "
                   "offset and time where it turned).");
        printf("\nA ray table models the water at the time of the cast, not "
               "the quality of a\nsurvey: defer to the hydrographic "
               "authority's specifications, local regulations\nand licensed "
               "practice.\n");
    }
    return CLI_EXIT_OK;
}

int cmd_raytrace(int argc, char **argv)
{
    enum { OPT_ANGLES = 256, OPT_DEPTH, OPT_ZT, OPT_EQ, OPT_LAT, OPT_FORMAT };
    static const struct option opts[] = {
        {"angles", required_argument, NULL, OPT_ANGLES},
        {"depth", required_argument, NULL, OPT_DEPTH},
        {"transducer-depth", required_argument, NULL, OPT_ZT},
        {"equation", required_argument, NULL, OPT_EQ},
        {"latitude", required_argument, NULL, OPT_LAT},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    static double angles[MAX_ANGLES];
    const char *angles_arg = NULL, *depth_arg = NULL, *zt_arg = NULL;
    const char *eq_arg = NULL, *lat_arg = NULL;
    double lat_deg = NAN;
    int equation = -1;
    enum sb_format fmt = SB_FORMAT_TABLE;
    double depth = 0.0, zt = 0.0;
    size_t na = 0;
    int c, rc;

    optind = 1;
    while ((c = getopt_long(argc, argv, ":h", opts, NULL)) != -1) {
        switch (c) {
        case OPT_ANGLES: angles_arg = optarg; break;
        case OPT_DEPTH: depth_arg = optarg; break;
        case OPT_ZT: zt_arg = optarg; break;
        case OPT_EQ: eq_arg = optarg; break;
        case OPT_LAT: lat_arg = optarg; break;
        case OPT_FORMAT:
            if ((rc = cli_parse_format(CMD, optarg, &fmt)) != CLI_EXIT_OK)
                return rc;
            break;
        case 'h':
            cmd_raytrace_help(stdout);
            return CLI_EXIT_OK;
        default:
            return cli_bad_option(CMD, argc, argv);
        }
    }
    if (optind >= argc)
        return cli_usage_error(CMD, "no profile given (expected a sound "
                                    "velocity profile file)");
    if (argc - optind > 1)
        return cli_usage_error(CMD, "unexpected argument '%s' (expected one "
                                    "profile file)", argv[optind + 1]);
    const char *path = argv[optind];
    if (!angles_arg)
        return cli_usage_error(CMD, "no launch angles given (expected "
                                    "--angles A[,A...] or START:STOP:STEP)");
    if (!depth_arg)
        return cli_usage_error(CMD, "no seafloor depth given (expected "
                                    "--depth D in metres)");
    rc = cli_parse_values(CMD, "--angles", angles_arg, -90.0, 90.0, 0, angles,
                          MAX_ANGLES, &na);
    if (rc != CLI_EXIT_OK)
        return rc;
    for (size_t i = 0; i < na; i++)
        if (fabs(angles[i]) >= 90.0)
            return cli_usage_error(CMD, "--angles: %g deg is horizontal "
                                        "(expected -90 < angle < 90)",
                                   angles[i]);
    if (zt_arg && (rc = cli_parse_double(CMD, "--transducer-depth", zt_arg,
                                         0.0, DEPTH_MAX_M, 0, &zt)) !=
                      CLI_EXIT_OK)
        return rc;
    if ((rc = cli_parse_double(CMD, "--depth", depth_arg, 0.0, DEPTH_MAX_M, 1,
                               &depth)) != CLI_EXIT_OK)
        return rc;
    if (lat_arg && (rc = cli_parse_double(CMD, "--latitude", lat_arg, -90.0,
                                          90.0, 0, &lat_deg)) != CLI_EXIT_OK)
        return rc;
    if (eq_arg && (equation = sb_soundspeed_find(eq_arg)) < 0) {
        char names[256];
        return cli_usage_error(CMD, "--equation: unknown equation '%s' "
                                    "(expected one of: %s)",
                               eq_arg, sb_soundspeed_names(names, sizeof names));
    }
    if (!(depth > zt))
        return cli_usage_error(CMD, "--depth: seafloor at %g m is not below "
                                    "the transducer at %g m (expected a depth "
                                    "greater than --transducer-depth)",
                               depth, zt);

    /* Inputs checked: load the profile, build the layers, trace. */
    struct sb_error err;
    struct sb_profile *prof = NULL;
    struct sb_raylayers *L = NULL;
    sb_error_clear(&err);
    rc = sb_profile_load(path, equation, lat_deg * PI / 180.0, &prof, &err);
    if (rc != SB_OK)
        return cli_report(CMD, rc, &err);
    for (int i = 0; i < prof->n_warnings; i++) {
        char buf[SB_ERROR_FILE_MAX + SB_PROFILE_WARNING_MAX + 32];
        cli_warn(CMD, "%s", sb_profile_warning_format(prof, i, buf,
                                                      sizeof buf));
    }
    rc = sb_raylayers_alloc(prof->depth_m, prof->speed_mps, prof->n, zt, &L,
                            &err);
    if (rc == SB_EINPUT) {
        /* The loader has checked every row; what is left is the layer
         * count: point at the first sample beyond the limit. */
        size_t j = 0;
        while (j < prof->n && prof->depth_m[j] <= zt)
            j++;
        size_t k = j + SB_RAY_MAX_LAYERS - 1;
        if (k >= prof->n)
            k = prof->n - 1;
        sb_error_at(&err, path, prof->line ? prof->line[k] : 1, 1);
    }
    sb_profile_free(prof);
    if (rc != SB_OK)
        return cli_report(CMD, rc, &err);

    struct row *rows = malloc(na * sizeof *rows);
    struct sb_ray *ray = malloc(sizeof *ray);
    if (!rows || !ray) {
        free(rows);
        free(ray);
        sb_raylayers_free(L);
        sb_error_set(&err, SB_ENOMEM, "", 0, 0, "out of memory");
        return cli_report(CMD, SB_ENOMEM, &err);
    }
    const double c0 = sb_raylayers_transducer_speed(L);
    for (size_t i = 0; i < na && rc == SB_OK; i++) {
        struct row *r = &rows[i];
        double t, x;
        r->angle_deg = angles[i];
        rc = sb_ray_init_angle(L, angles[i] * PI / 180.0, 1.0, ray);
        if (rc != SB_OK)
            break;
        rc = sb_ray_at_depth(ray, depth, &t, &x);
        r->turned = rc == SB_RAY_TURNED;
        if (r->turned)
            rc = SB_OK;
        r->depth_m = r->turned ? ray->z_turn_m : depth;
        r->offset_m = x;
        r->t1_s = t;
        r->floor_angle_deg = sb_ray_angle_at(ray, r->depth_m) * 180.0 / PI;
    }
    free(ray);
    sb_raylayers_free(L);
    if (rc != SB_OK) {
        free(rows);
        sb_error_set(&err, SB_EINTERNAL, "", 0, 0,
                     "ray tracing failed (%s)", sb_strerror(rc));
        return cli_report(CMD, SB_EINTERNAL, &err);
    }
    if (fmt == SB_FORMAT_JSON)
        rc = write_json(path, zt, c0, depth, rows, na);
    else
        rc = write_table(path, zt, c0, depth, rows, na, fmt);
    free(rows);
    return rc;
}
