/*
 * swathbudget breakdown — where the uncertainty of one sounding comes from:
 * every component's contribution to the vertical and horizontal standard
 * uncertainty and its share of the variance, largest first, with totals.
 *
 *   swathbudget breakdown SYSTEM.yaml --depth D --angle A
 *                         [--format table|csv|json]
 *
 * A contribution is |c_i| u(x_i), the sensitivity times the standard
 * uncertainty of the input (JCGM 100:2008, 5.1.3); with independent inputs
 * the variances add (5.1.2), so the shares sum to 1.
 */
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "commands.h"
#include "swathbudget/georef.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/propagate.h"
#include "swathbudget/spec.h"
#include "swathbudget/system.h"
#include "swathbudget/writer.h"

#define CMD "breakdown"
#define DEPTH_MAX_M 12000.0
#define JSON_DIGITS 10
#define PI 3.14159265358979323846
#define RAD2DEG (180.0 / PI)
#define DEG2RAD (PI / 180.0)

void cmd_breakdown_help(FILE *f)
{
    fprintf(f,
            "usage: swathbudget breakdown SYSTEM.yaml --depth D --angle A\n"
            "                             [--format table|csv|json]\n\n"
            "For one sounding (seafloor depth D metres below the surface, "
            "beam angle A\ndegrees from the vertical, positive to starboard), "
            "list every component of\nthe system with its standard "
            "uncertainty, its contribution to the vertical\nand horizontal "
            "standard uncertainty of the sounding and its share of the\n"
            "variance, largest first, then the totals: sigma z, TVU95, THU95 "
            "(exact\nradius) and THU95 (S-44 style, 2.45 x larger "
            "semi-axis).\n\n"
            "options:\n"
            "  --depth D      seafloor depth below the surface, m (below the "
            "transducer)\n"
            "  --angle A      beam angle, deg, port negative, within the "
            "system's maximum\n"
            "  --format F     table (default), csv or json\n"
            "  -h, --help     this text\n\n"
            "The figures are a-priori estimates, not proof of a survey's "
            "quality: defer\nto the hydrographic authority's specifications, "
            "local regulations and\nlicensed practice.\n");
}

struct line {
    int comp;
    double ch;      /* horizontal contribution, m */
    double cz;      /* |vertical contribution|, m */
    double share_z; /* 0..1 */
    double share_h; /* 0..1 */
};

/* Largest share (of either kind) first; ties by the stable component
 * order so the output never depends on qsort's whims. */
static int by_share(const void *pa, const void *pb)
{
    const struct line *a = pa, *b = pb;
    double ka = a->share_z > a->share_h ? a->share_z : a->share_h;
    double kb = b->share_z > b->share_h ? b->share_z : b->share_h;

    if (ka != kb)
        return ka < kb ? 1 : -1;
    return a->comp - b->comp;
}

static int write_json(const struct sb_system *sys, const struct sb_beam *b,
                      const struct sb_tpu *t, const struct line *lines,
                      size_t n)
{
    struct sb_json j;
    struct sb_error err;
    double sigma_h = sqrt(t->cov_ee_m2 + t->cov_nn_m2);
    int rc;

    sb_json_init(&j, stdout);
    sb_json_begin_object(&j);
    sb_json_kv_string(&j, "system", sys->name);
    sb_json_kv_number(&j, "depth_m", b->depth_m, JSON_DIGITS);
    sb_json_kv_number(&j, "angle_deg", b->angle_rad * RAD2DEG, JSON_DIGITS);
    sb_json_key(&j, "components");
    sb_json_begin_array(&j);
    for (size_t i = 0; i < n; i++) {
        const struct line *l = &lines[i];

        sb_json_begin_object(&j);
        sb_json_kv_string(&j, "component", sb_component_name(l->comp));
        sb_json_kv_string(&j, "group", sb_component_group(l->comp));
        sb_json_kv_number(&j, "u", b->u[l->comp], JSON_DIGITS);
        sb_json_kv_string(&j, "u_unit", sb_component_unit(l->comp));
        sb_json_kv_number(&j, "vertical_m", l->cz, JSON_DIGITS);
        sb_json_kv_number(&j, "vertical_share", l->share_z, JSON_DIGITS);
        sb_json_kv_number(&j, "horizontal_m", l->ch, JSON_DIGITS);
        sb_json_kv_number(&j, "horizontal_share", l->share_h, JSON_DIGITS);
        sb_json_end_object(&j);
    }
    sb_json_end_array(&j);
    sb_json_key(&j, "totals");
    sb_json_begin_object(&j);
    sb_json_kv_number(&j, "sigma_z_m", t->sigma_z_m, JSON_DIGITS);
    sb_json_kv_number(&j, "tvu_m", t->tvu95_m, JSON_DIGITS);
    sb_json_kv_number(&j, "sigma_h_m", sigma_h, JSON_DIGITS);
    sb_json_kv_number(&j, "thu_m", t->thu95_m, JSON_DIGITS);
    sb_json_kv_number(&j, "thu_s44_m", t->thu95_s44_m, JSON_DIGITS);
    sb_json_end_object(&j);
    sb_json_end_object(&j);
    sb_error_clear(&err);
    rc = sb_json_finish(&j, &err);
    return rc == SB_OK ? CLI_EXIT_OK : cli_report(CMD, rc, &err);
}

static int write_text(const struct sb_system *sys, const struct sb_beam *b,
                      const struct sb_tpu *t, const struct line *lines,
                      size_t n, enum sb_format fmt)
{
    static const struct sb_table_col cols[] = {
        {"component", "component", 0},
        {"group", "group", 0},
        {"u", "u", 6},
        {"unit of u", "u_unit", 0},
        {"vertical (m)", "vertical_m", 4},
        {"vertical share (%)", "vertical_share_pct", 1},
        {"horizontal (m)", "horizontal_m", 4},
        {"horizontal share (%)", "horizontal_share_pct", 1},
    };
    struct sb_table *tab = sb_table_alloc(cols, sizeof cols / sizeof cols[0]);
    struct sb_error err;
    double sigma_h = sqrt(t->cov_ee_m2 + t->cov_nn_m2);
    int rc = SB_OK;

    if (!tab) {
        sb_error_set(&err, SB_ENOMEM, "", 0, 0, "out of memory");
        return cli_report(CMD, SB_ENOMEM, &err);
    }
    for (size_t i = 0; i < n && rc == SB_OK; i++) {
        const struct line *l = &lines[i];

        if ((rc = sb_table_str(tab, sb_component_name(l->comp))) ||
            (rc = sb_table_str(tab, sb_component_group(l->comp))) ||
            (rc = sb_table_num(tab, b->u[l->comp])) ||
            (rc = sb_table_str(tab, sb_component_unit(l->comp))) ||
            (rc = sb_table_num(tab, l->cz)) ||
            (rc = sb_table_num(tab, 100.0 * l->share_z)) ||
            (rc = sb_table_num(tab, l->ch)) ||
            (rc = sb_table_num(tab, 100.0 * l->share_h)))
            break;
    }
    if (rc != SB_OK) {
        sb_table_free(tab);
        sb_error_set(&err, rc, "", 0, 0, "could not build the table (%s)",
                     sb_strerror(rc));
        return cli_report(CMD, rc, &err);
    }
    if (fmt == SB_FORMAT_TABLE)
        printf("system: %s%s%s\n"
               "sounding: depth %.2f m below the surface (%.2f m below the "
               "transducer),\n          beam angle %.2f deg (%s), "
               "%.2f m across track\n\n",
               sys->name, sys->title[0] ? " - " : "", sys->title, b->depth_m,
               b->depth_tx_m, b->angle_rad * RAD2DEG,
               b->angle_rad < 0 ? "port" : "starboard", b->across_m);
    if (fmt == SB_FORMAT_TABLE && sys->sound_speed.model != SB_COLUMN_CONSTANT) {
        char wc[256];

        printf("water column: %s\n\n", sb_system_describe_column(sys, wc, sizeof wc));
    }
    sb_error_clear(&err);
    rc = sb_table_write(tab, stdout, fmt, &err);
    sb_table_free(tab);
    if (rc != SB_OK)
        return cli_report(CMD, rc, &err);
    if (fmt == SB_FORMAT_TABLE) {
        printf("\ntotals: sigma z %.4f m, TVU95 %.3f m; sigma h %.4f m, "
               "THU95 %.3f m (exact radius), %.3f m (S-44 style)\n",
               t->sigma_z_m, t->tvu95_m, sigma_h, t->thu95_m,
               t->thu95_s44_m);
        printf("\nA-priori estimate from the stated figures, not proof of a "
               "survey's quality;\ndefer to the hydrographic authority's "
               "specifications, local regulations and\nlicensed "
               "practice.\n");
    } else {
        /* CSV: the totals as a second small table after a blank line */
        static const struct sb_table_col tcols[] = {
            {"sigma_z_m", "sigma_z_m", 6}, {"tvu_m", "tvu_m", 6},
            {"sigma_h_m", "sigma_h_m", 6}, {"thu_m", "thu_m", 6},
            {"thu_s44_m", "thu_s44_m", 6},
        };
        struct sb_table *tt =
            sb_table_alloc(tcols, sizeof tcols / sizeof tcols[0]);

        if (!tt) {
            sb_error_set(&err, SB_ENOMEM, "", 0, 0, "out of memory");
            return cli_report(CMD, SB_ENOMEM, &err);
        }
        if ((rc = sb_table_num(tt, t->sigma_z_m)) ||
            (rc = sb_table_num(tt, t->tvu95_m)) ||
            (rc = sb_table_num(tt, sigma_h)) ||
            (rc = sb_table_num(tt, t->thu95_m)) ||
            (rc = sb_table_num(tt, t->thu95_s44_m))) {
            sb_table_free(tt);
            sb_error_set(&err, rc, "", 0, 0, "could not build the table");
            return cli_report(CMD, rc, &err);
        }
        printf("\n");
        rc = sb_table_write(tt, stdout, fmt, &err);
        sb_table_free(tt);
        if (rc != SB_OK)
            return cli_report(CMD, rc, &err);
    }
    return CLI_EXIT_OK;
}

static int breakdown_loaded(const struct sb_system *psys, double depth, double angle,
                            enum sb_format fmt);

int cmd_breakdown(int argc, char **argv)
{
    enum { OPT_DEPTH = 256, OPT_ANGLE, OPT_FORMAT };
    static const struct option opts[] = {
        {"depth", required_argument, NULL, OPT_DEPTH},
        {"angle", required_argument, NULL, OPT_ANGLE},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    const char *depth_arg = NULL, *angle_arg = NULL;
    enum sb_format fmt = SB_FORMAT_TABLE;
    struct sb_system sys;
    struct sb_error err;
    double depth, angle;
    int c, rc;

    optind = 1;
    while ((c = getopt_long(argc, argv, ":h", opts, NULL)) != -1) {
        switch (c) {
        case OPT_DEPTH: depth_arg = optarg; break;
        case OPT_ANGLE: angle_arg = optarg; break;
        case OPT_FORMAT:
            if ((rc = cli_parse_format(CMD, optarg, &fmt)) != CLI_EXIT_OK)
                return rc;
            break;
        case 'h':
            cmd_breakdown_help(stdout);
            return CLI_EXIT_OK;
        default:
            return cli_bad_option(CMD, argc, argv);
        }
    }
    if ((rc = cli_one_system_file(CMD, argc, argv)) != CLI_EXIT_OK)
        return rc;
    if (!depth_arg)
        return cli_usage_error(CMD, "no depth given (expected --depth D)");
    if (!angle_arg)
        return cli_usage_error(CMD, "no beam angle given (expected --angle "
                                    "A)");
    if ((rc = cli_parse_double(CMD, "--depth", depth_arg, 0.0, DEPTH_MAX_M, 1,
                               &depth)) != CLI_EXIT_OK ||
        (rc = cli_parse_double(CMD, "--angle", angle_arg, -90.0, 90.0, 0,
                               &angle)) != CLI_EXIT_OK)
        return rc;

    if ((rc = cli_check_input_file(CMD, "", argv[optind],
                                   "a system YAML file, see docs/spec.md")) !=
        CLI_EXIT_OK)
        return rc;
    sb_error_clear(&err);
    if ((rc = sb_spec_load(argv[optind], &sys, &err)) != SB_OK)
        return cli_report(CMD, rc, &err);
    rc = breakdown_loaded(&sys, depth, angle, fmt);
    sb_system_release(&sys); /* the profile(s) it owns */
    return rc;
}

/* The rest of cmd_breakdown, once the system is loaded. */
static int breakdown_loaded(const struct sb_system *psys, double depth, double angle,
                            enum sb_format fmt)
{
    const struct sb_system sys = *psys; /* shallow: psys keeps ownership */
    struct sb_error err;
    struct sb_beam beam;
    struct sb_horiz95 *h95;
    struct sb_tpu tpu;
    struct sb_breakdown bd;
    struct line lines[SB_COMP_COUNT];
    size_t n = 0;
    double tx_depth;
    int rc;

    tx_depth = sys.vertical.draft + sys.vertical.squat + sys.vertical.loading;
    if (!(depth > tx_depth))
        return cli_usage_error(CMD, "--depth: %g m is not below the "
                                    "transducer of %s (expected a depth "
                                    "greater than %g m)",
                               depth, sys.name, tx_depth);
    if (fabs(angle) * DEG2RAD > sys.echosounder.max_angle * (1 + 1e-12))
        return cli_usage_error(CMD, "--angle: %g deg is beyond the maximum "
                                    "beam angle of %s (expected an angle "
                                    "within +/-%g deg)",
                               angle, sys.name,
                               sys.echosounder.max_angle * RAD2DEG);
    rc = sb_beam_setup(&sys, depth, angle * DEG2RAD, &beam, &err);
    if (rc == SB_RAY_TURNS) /* no sounding there: the ray turns above it */
        return cli_usage_error(CMD, "--angle: %s", err.msg);
    if (rc != SB_OK)
        return cli_report(CMD, rc, &err);
    h95 = sb_horiz95_alloc(&err);
    if (!h95)
        return cli_report(CMD, SB_ENOMEM, &err);
    rc = sb_propagate(&beam, h95, &tpu, &bd);
    sb_horiz95_free(h95);
    if (rc != SB_OK) {
        sb_error_set(&err, rc, "", 0, 0,
                     "the propagated uncertainty is not finite");
        return cli_report(CMD, rc, &err);
    }
    for (int i = 0; i < SB_COMP_COUNT; i++) {
        if (!(beam.u[i] > 0.0))
            continue; /* not part of this system (or stated as zero) */
        lines[n].comp = i;
        lines[n].cz = fabs(bd.cz[i]);
        lines[n].ch = bd.ch[i];
        lines[n].share_z = bd.share_z[i];
        lines[n].share_h = bd.share_h[i];
        n++;
    }
    qsort(lines, n, sizeof lines[0], by_share);
    if (fmt == SB_FORMAT_JSON)
        return write_json(&sys, &beam, &tpu, lines, n);
    return write_text(&sys, &beam, &tpu, lines, n, fmt);
}
