/*
 * swathbudget verify — check the linear uncertainty budget of a system by
 * Monte Carlo (JCGM 101:2008): at each depth and beam angle, draw every
 * input from its distribution, run the forward model, and compare the
 * empirical 95 % figures with the linear TVU and THU; say per point whether
 * the linear budget is valid (JCGM 101 clause 8) and, per order and depth,
 * whether the usable swath on the angle grid changes.
 *
 *   swathbudget verify SYSTEM.yaml [--depth D,...] [--angles A,...]
 *                      [--trials N | --digits K] [--seed S] [--threads T]
 *                      [--standard ID|FILE] [--order ID[,ID...]]
 *                      [--format table|csv|json]
 */
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cli.h"
#include "commands.h"
#include "swathbudget/montecarlo.h"
#include "swathbudget/orders.h"
#include "swathbudget/spec.h"
#include "swathbudget/system.h"
#include "swathbudget/writer.h"

#define CMD "verify"
#define MAX_DEPTHS 256
#define MAX_ANGLES 361
/* Each point costs up to a few seconds of trials: more than this is surely
 * a typing error. */
#define MAX_POINTS 10000
#define DEPTH_MAX_M 12000.0
#define JSON_DIGITS 10
#define PI 3.14159265358979323846
#define RAD2DEG (180.0 / PI)
#define DEG2RAD (PI / 180.0)
/* Angles when none are given: nadir to the system's maximum in 10 deg
 * steps, starboard (the port side mirrors it but for lever-arm offsets). */
#define DEFAULT_ANGLE_STEP_DEG 10.0

/* Significant digits when neither --trials nor --digits is given.  One
 * digit keeps a run to seconds: the validation stops at delta / 5 (JCGM
 * 101 8.2), and at two digits that takes up to 10^7 trials a point. */
#define VERIFY_DIGITS_DEFAULT 1

static const double default_depths[] = {10.0, 50.0, 200.0};
#define DEFAULT_DEPTHS_TEXT "10,50,200"

void cmd_verify_help(FILE *f)
{
    fprintf(f,
            "usage: swathbudget verify SYSTEM.yaml [--depth D[,D...]] "
            "[--angles A[,A...]]\n"
            "                          [--trials N | --digits K] [--seed S] "
            "[--threads T]\n"
            "                          [--standard ID|FILE] "
            "[--order ID[,ID...]]\n"
            "                          [--format table|csv|json]\n\n"
            "Check the linear (GUM) uncertainty budget by Monte Carlo "
            "(JCGM 101:2008).\nAt each depth and beam angle every input "
            "error is drawn from the\ndistribution its stated type implies "
            "(normal for sd, 95%% and rms;\nrectangular for res and max), the "
            "full forward model is run, and the 95 %%\nfigures of the "
            "sounding errors are compared with the linear TVU and THU.\n"
            "A point is \"linear valid\" when both ends of the linear 95 %% "
            "interval of\nthe depth error lie within the numerical tolerance "
            "(delta) of the Monte\nCarlo 2.5 %% and 97.5 %% points "
            "(JCGM 101 clause 8).\n\n"
            "options:\n"
            "  --depth D[,D...]    seafloor depths below the surface, m "
            "(default %s);\n"
            "                      START:STOP:STEP also accepted\n"
            "  --angles A[,A...]   beam angles, deg, port negative (default "
            "0 to the\n"
            "                      maximum beam angle in %g deg steps); "
            "START:STOP:STEP\n"
            "                      also accepted\n"
            "  --trials N          fixed number of trials per point (%d to "
            "%d)\n"
            "  --digits K          adaptive trials (JCGM 101 7.9) until the "
            "results are\n"
            "                      stable to K significant digits of the "
            "standard\n"
            "                      uncertainty (1 to %d, default %d); also "
            "sets delta\n"
            "  --seed S            seed of the random numbers (default 1); "
            "the same seed\n"
            "                      gives the same output whatever the thread "
            "count\n"
            "  --threads T         worker threads (default: processors "
            "online)\n"
            "  --standard ID|FILE  standard for the usable-swath comparison "
            "(default %s)\n"
            "  --order ID[,ID...]  its orders to compare (default: all)\n"
            "  --format F          table (default), csv or json\n"
            "  -h, --help          this text\n\n"
            "Monte Carlo shows whether the linear budget describes the model; "
            "it cannot\nshow that the model or the stated uncertainties "
            "describe the survey.  The\nfigures are a-priori estimates, not "
            "proof of a survey's quality: defer to the\nhydrographic "
            "authority's specifications, local regulations and licensed\n"
            "practice.\n",
            DEFAULT_DEPTHS_TEXT, DEFAULT_ANGLE_STEP_DEG, SB_MC_TRIALS_MIN,
            SB_MC_TRIALS_MAX, SB_MC_DIGITS_MAX, VERIFY_DIGITS_DEFAULT,
            SB_STANDARD_DEFAULT_ID);
}

static int write_json(const struct sb_system *sys,
                      const struct sb_mc_point_result *pts, size_t n)
{
    struct sb_json j;
    struct sb_error err;

    sb_json_init(&j, stdout);
    sb_json_begin_object(&j);
    sb_json_kv_string(&j, "system", sys->name);
    sb_json_key(&j, "points");
    sb_json_begin_array(&j);
    for (size_t i = 0; i < n; i++) {
        const struct sb_mc_point_result *p = &pts[i];
        sb_json_begin_object(&j);
        sb_json_kv_number(&j, "depth_m", p->depth_m, JSON_DIGITS);
        sb_json_kv_number(&j, "angle_deg", p->angle_rad * RAD2DEG,
                          JSON_DIGITS);
        sb_json_kv_number(&j, "tvu_linear_m", p->tvu_linear_m, JSON_DIGITS);
        sb_json_kv_number(&j, "tvu_mc_m", p->tvu_mc_m, JSON_DIGITS);
        sb_json_kv_number(&j, "thu_linear_m", p->thu_linear_m, JSON_DIGITS);
        sb_json_kv_number(&j, "thu_mc_m", p->thu_mc_m, JSON_DIGITS);
        sb_json_kv_number(&j, "bias_z_m", p->bias_z_m, JSON_DIGITS);
        sb_json_kv_number(&j, "d_low_m", p->d_low_m, JSON_DIGITS);
        sb_json_kv_number(&j, "d_high_m", p->d_high_m, JSON_DIGITS);
        sb_json_key(&j, "linear_valid");
        sb_json_bool(&j, p->linear_valid);
        sb_json_key(&j, "trials");
        sb_json_integer(&j, (long long)p->trials);
        sb_json_end_object(&j);
    }
    sb_json_end_array(&j);
    sb_json_end_object(&j);
    sb_error_clear(&err);
    int rc = sb_json_finish(&j, &err);
    return rc == SB_OK ? CLI_EXIT_OK : cli_report(CMD, rc, &err);
}

static int table_fail(struct sb_table *t, int rc, const char *what)
{
    struct sb_error err;
    sb_table_free(t);
    sb_error_set(&err, rc, "", 0, 0, "could not build the %s table (%s)",
                 what, sb_strerror(rc));
    return cli_report(CMD, rc, &err);
}

static int write_points(const struct sb_mc_point_result *pts, size_t n,
                        enum sb_format fmt)
{
    static const struct sb_table_col cols[] = {
        {"depth (m)", "depth_m", 1},
        {"angle (deg)", "angle_deg", 1},
        {"TVU linear (m)", "tvu_linear_m", 3},
        {"TVU MC (m)", "tvu_mc_m", 3},
        {"THU linear (m)", "thu_linear_m", 3},
        {"THU MC (m)", "thu_mc_m", 3},
        {"bias Z (m)", "bias_z_m", 4},
        {"d_low (m)", "d_low_m", 4},
        {"d_high (m)", "d_high_m", 4},
        {"delta (m)", "delta_m", 4},
        {"verdict", "verdict", 0},
        {"trials", "trials", 0},
    };
    struct sb_table *t = sb_table_alloc(cols, sizeof cols / sizeof cols[0]);
    struct sb_error err;
    int rc = SB_OK;

    if (!t)
        return table_fail(NULL, SB_ENOMEM, "points");
    for (size_t i = 0; i < n && rc == SB_OK; i++) {
        const struct sb_mc_point_result *p = &pts[i];
        if ((rc = sb_table_num(t, p->depth_m)) ||
            (rc = sb_table_num(t, p->angle_rad * RAD2DEG)) ||
            (rc = sb_table_num(t, p->tvu_linear_m)) ||
            (rc = sb_table_num(t, p->tvu_mc_m)) ||
            (rc = sb_table_num(t, p->thu_linear_m)) ||
            (rc = sb_table_num(t, p->thu_mc_m)) ||
            (rc = sb_table_num(t, p->bias_z_m)) ||
            (rc = sb_table_num(t, p->d_low_m)) ||
            (rc = sb_table_num(t, p->d_high_m)) ||
            (rc = sb_table_num(t, p->delta_m)) ||
            (rc = sb_table_str(t, p->linear_valid ? "linear valid"
                                                  : "linear not valid")))
            break;
        rc = sb_table_num(t, (double)p->trials);
    }
    if (rc != SB_OK)
        return table_fail(t, rc, "points");
    sb_error_clear(&err);
    rc = sb_table_write(t, stdout, fmt, &err);
    sb_table_free(t);
    return rc == SB_OK ? CLI_EXIT_OK : cli_report(CMD, rc, &err);
}

/* One cell of the swath comparison: the grid angle, or "-" for none. */
static int edge_cell(struct sb_table *t, double rad)
{
    return isnan(rad) ? sb_table_empty(t, "-") : sb_table_num(t, rad * RAD2DEG);
}

static int write_swath(const struct sb_standard *std,
                       const struct sb_order *const *sel, size_t nsel,
                       const struct sb_mc_point_result *pts,
                       const double *depths, size_t nd, size_t na,
                       enum sb_format fmt, int *n_differ)
{
    static const struct sb_table_col cols[] = {
        {"order", "order", 0},
        {"depth (m)", "depth_m", 1},
        {"port linear (deg)", "port_linear_deg", 1},
        {"port MC (deg)", "port_mc_deg", 1},
        {"stbd linear (deg)", "stbd_linear_deg", 1},
        {"stbd MC (deg)", "stbd_mc_deg", 1},
        {"edge moves", "edge_moves", 0},
    };
    struct sb_table *t = sb_table_alloc(cols, sizeof cols / sizeof cols[0]);
    struct sb_error err;
    int rc = SB_OK;

    (void)std;
    *n_differ = 0;
    if (!t)
        return table_fail(NULL, SB_ENOMEM, "swath");
    for (size_t k = 0; k < nsel && rc == SB_OK; k++)
        for (size_t i = 0; i < nd && rc == SB_OK; i++) {
            struct sb_mc_fail_compare fc;
            const char *moves;
            rc = sb_mc_fail_compare(&pts[i * na], na,
                                    sb_order_tvu(sel[k], depths[i]),
                                    sb_order_thu(sel[k], depths[i]), &fc);
            if (rc != SB_OK)
                break;
            if (fc.port_differs && fc.stbd_differs)
                moves = "port, starboard";
            else if (fc.port_differs)
                moves = "port";
            else if (fc.stbd_differs)
                moves = "starboard";
            else
                moves = "no";
            *n_differ += fc.port_differs || fc.stbd_differs;
            if ((rc = sb_table_str(t, sel[k]->id)) ||
                (rc = sb_table_num(t, depths[i])) ||
                (rc = edge_cell(t, fc.port_linear_rad)) ||
                (rc = edge_cell(t, fc.port_mc_rad)) ||
                (rc = edge_cell(t, fc.stbd_linear_rad)) ||
                (rc = edge_cell(t, fc.stbd_mc_rad)))
                break;
            rc = sb_table_str(t, moves);
        }
    if (rc != SB_OK)
        return table_fail(t, rc, "swath");
    sb_error_clear(&err);
    rc = sb_table_write(t, stdout, fmt, &err);
    sb_table_free(t);
    return rc == SB_OK ? CLI_EXIT_OK : cli_report(CMD, rc, &err);
}

static int write_text(const struct sb_system *sys,
                      const struct sb_standard *std,
                      const struct sb_order *const *sel, size_t nsel,
                      const struct sb_mc_point_result *pts,
                      const double *depths, size_t nd, size_t na,
                      const struct sb_mc_options *o, enum sb_format fmt)
{
    int rc, n_differ = 0;
    size_t n = nd * na, n_valid = 0;

    for (size_t i = 0; i < n; i++)
        n_valid += pts[i].linear_valid != 0;
    if (fmt == SB_FORMAT_TABLE) {
        printf("%s: Monte Carlo check of the linear budget (JCGM 101:2008)\n",
               sys->name);
        if (sys->title[0])
            printf("%s\n", sys->title);
        if (o->trials)
            printf("trials: %zu per point (fixed); seed %llu; delta from "
                   "the linear sigma_z to %d significant digit(s)\n\n",
                   o->trials, (unsigned long long)o->seed, o->digits);
        else
            printf("trials: adaptive (JCGM 101 7.9) to %d significant "
                   "digit(s), at delta / 5 (JCGM 101 8.2); seed %llu\n\n",
                   o->digits, (unsigned long long)o->seed);
    }
    if ((rc = write_points(pts, n, fmt)) != CLI_EXIT_OK)
        return rc;
    if (fmt == SB_FORMAT_TABLE)
        printf("\nUsable swath on the angle grid (%s), by the linear and by "
               "the Monte Carlo\nfigures: the largest grid angle out to which "
               "every grid angle passes\nboth limits ('-': none passes, or no "
               "grid angle on that side).\n\n",
               std->title);
    else
        putchar('\n');
    if ((rc = write_swath(std, sel, nsel, pts, depths, nd, na, fmt,
                          &n_differ)) != CLI_EXIT_OK)
        return rc;
    if (fmt == SB_FORMAT_TABLE) {
        printf("\n%zu of %zu points linear valid; the usable swath edge "
               "moves at %d order/depth pair%s.\n",
               n_valid, n, n_differ, n_differ == 1 ? "" : "s");
        printf("TVU/THU MC: empirical 95 %% points of |dZ| and of the "
               "horizontal error\nradius; bias Z: mean depth error (positive "
               "= too deep); d_low, d_high:\ndistance of the linear interval's "
               "ends from the MC 2.5 %% and 97.5 %% points.\n"
               "Monte Carlo tests the linear budget against the model, not "
               "the model or the\nstated figures against the survey.  These "
               "are a-priori estimates, not proof\nof a survey's quality: "
               "defer to the hydrographic authority's specifications,\nlocal "
               "regulations and licensed practice.\n");
    }
    return CLI_EXIT_OK;
}

int cmd_verify(int argc, char **argv)
{
    enum {
        OPT_DEPTH = 256,
        OPT_ANGLES,
        OPT_TRIALS,
        OPT_DIGITS,
        OPT_SEED,
        OPT_THREADS,
        OPT_STANDARD,
        OPT_ORDER,
        OPT_FORMAT
    };
    static const struct option opts[] = {
        {"depth", required_argument, NULL, OPT_DEPTH},
        {"angles", required_argument, NULL, OPT_ANGLES},
        {"trials", required_argument, NULL, OPT_TRIALS},
        {"digits", required_argument, NULL, OPT_DIGITS},
        {"seed", required_argument, NULL, OPT_SEED},
        {"threads", required_argument, NULL, OPT_THREADS},
        {"standard", required_argument, NULL, OPT_STANDARD},
        {"order", required_argument, NULL, OPT_ORDER},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    static double depths[MAX_DEPTHS], angles[MAX_ANGLES], rad[MAX_ANGLES];
    const char *depth_arg = NULL, *angles_arg = NULL, *std_arg = NULL;
    const char *order_arg = NULL, *trials_arg = NULL, *digits_arg = NULL;
    const char *seed_arg = NULL, *threads_arg = NULL, *path;
    const struct sb_order *sel[SB_STANDARD_ORDERS_MAX];
    struct sb_standard storage;
    const struct sb_standard *std = NULL;
    enum sb_format fmt = SB_FORMAT_TABLE;
    struct sb_mc_options o;
    struct sb_mc_point_result *pts = NULL;
    struct sb_system sys;
    struct sb_error err;
    size_t nd = 0, na = 0, nsel = 0;
    long v;
    int c, rc;

    optind = 1;
    while ((c = getopt_long(argc, argv, ":h", opts, NULL)) != -1) {
        switch (c) {
        case OPT_DEPTH: depth_arg = optarg; break;
        case OPT_ANGLES: angles_arg = optarg; break;
        case OPT_TRIALS: trials_arg = optarg; break;
        case OPT_DIGITS: digits_arg = optarg; break;
        case OPT_SEED: seed_arg = optarg; break;
        case OPT_THREADS: threads_arg = optarg; break;
        case OPT_STANDARD: std_arg = optarg; break;
        case OPT_ORDER: order_arg = optarg; break;
        case OPT_FORMAT:
            if ((rc = cli_parse_format(CMD, optarg, &fmt)) != CLI_EXIT_OK)
                return rc;
            break;
        case 'h':
            cmd_verify_help(stdout);
            return CLI_EXIT_OK;
        default:
            return cli_bad_option(CMD, argc, argv);
        }
    }
    if ((rc = cli_one_system_file(CMD, argc, argv)) != CLI_EXIT_OK)
        return rc;
    path = argv[optind];

    sb_mc_options_default(&o);
    o.digits = VERIFY_DIGITS_DEFAULT;
    {
        long nproc = sysconf(_SC_NPROCESSORS_ONLN);
        o.threads = nproc >= 1 ? (nproc > 64 ? 64 : (int)nproc) : 1;
    }
    if (trials_arg && digits_arg)
        return cli_usage_error(CMD, "--trials and --digits given together "
                                    "(expected a fixed number of trials or "
                                    "adaptive digits, not both)");
    if (trials_arg) {
        if ((rc = cli_parse_long(CMD, "--trials", trials_arg,
                                 SB_MC_TRIALS_MIN, SB_MC_TRIALS_MAX, &v)) !=
            CLI_EXIT_OK)
            return rc;
        o.trials = (size_t)v;
    }
    if (digits_arg) {
        if ((rc = cli_parse_long(CMD, "--digits", digits_arg, 1,
                                 SB_MC_DIGITS_MAX, &v)) != CLI_EXIT_OK)
            return rc;
        o.digits = (int)v;
    }
    if (seed_arg) {
        if ((rc = cli_parse_long(CMD, "--seed", seed_arg, 0, 2147483647L,
                                 &v)) != CLI_EXIT_OK)
            return rc;
        o.seed = (uint64_t)v;
    }
    if (threads_arg) {
        if ((rc = cli_parse_long(CMD, "--threads", threads_arg, 1, 1024,
                                 &v)) != CLI_EXIT_OK)
            return rc;
        o.threads = (int)v;
    }
    if (depth_arg) {
        if ((rc = cli_parse_values(CMD, "--depth", depth_arg, 0.0,
                                   DEPTH_MAX_M, 1, depths, MAX_DEPTHS,
                                   &nd)) != CLI_EXIT_OK)
            return rc;
    } else {
        nd = sizeof default_depths / sizeof default_depths[0];
        memcpy(depths, default_depths, sizeof default_depths);
    }
    if (angles_arg &&
        (rc = cli_parse_values(CMD, "--angles", angles_arg, -90.0, 90.0, 0,
                               angles, MAX_ANGLES, &na)) != CLI_EXIT_OK)
        return rc;
    if ((rc = cli_check_standard_arg(CMD, std_arg)) != CLI_EXIT_OK)
        return rc;
    if ((rc = cli_check_input_file(CMD, "", path, "a system YAML file, see "
                                       "docs/spec.md")) != CLI_EXIT_OK)
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

    /* checks that need the system */
    const double max_deg = sys.echosounder.max_angle * RAD2DEG;
    if (!angles_arg) {
        for (double a = 0.0; a < max_deg - 1e-9 && na < MAX_ANGLES - 1;
             a += DEFAULT_ANGLE_STEP_DEG)
            angles[na++] = a;
        angles[na++] = max_deg;
    }
    const double tx_depth =
        sys.vertical.draft + sys.vertical.squat + sys.vertical.loading;
    for (size_t i = 0; i < nd; i++)
        if (!(depths[i] > tx_depth)) {
            rc = cli_usage_error(CMD, "--depth: %g m is not below the "
                                      "transducer of %s (expected depths "
                                      "greater than %g m)",
                                 depths[i], sys.name, tx_depth);
            goto done;
        }
    for (size_t a = 0; a < na; a++) {
        if (fabs(angles[a]) > max_deg * (1 + 1e-12)) {
            rc = cli_usage_error(CMD, "--angles: %g deg is beyond the "
                                      "maximum beam angle of %s (expected "
                                      "angles within +/-%g deg)",
                                 angles[a], sys.name, max_deg);
            goto done;
        }
        rad[a] = angles[a] * DEG2RAD;
    }
    if (nd * na > MAX_POINTS) {
        rc = cli_usage_error(CMD, "%zu depths x %zu angles is too many "
                                  "points (expected at most %d)",
                             nd, na, MAX_POINTS);
        goto done;
    }

    pts = calloc(nd * na, sizeof *pts);
    if (!pts) {
        sb_error_set(&err, SB_ENOMEM, "", 0, 0, "out of memory");
        rc = cli_report(CMD, SB_ENOMEM, &err);
        goto done;
    }
    rc = sb_mc_verify_points(&sys, depths, nd, rad, na, &o, pts, &err);
    if (rc != SB_OK) {
        rc = cli_report(CMD, rc, &err);
        goto done;
    }
    for (size_t i = 0; i < nd * na; i++)
        if (!pts[i].converged)
            cli_warn(CMD, "depth %g m, angle %g deg: stopped at the cap of "
                          "%zu trials before the results were stable to %d "
                          "digits",
                     pts[i].depth_m, pts[i].angle_rad * RAD2DEG,
                     pts[i].trials, o.digits);
    if (fmt == SB_FORMAT_JSON)
        rc = write_json(&sys, pts, nd * na);
    else
        rc = write_text(&sys, std, sel, nsel, pts, depths, nd, na, &o, fmt);
done:
    free(pts);
    sb_system_release(&sys); /* the profile(s) it owns */
    return rc;
}
