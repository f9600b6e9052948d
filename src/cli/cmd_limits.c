/*
 * swathbudget limits — the allowable TVU and THU (95 %) and the
 * feature-detection size of a standard's orders at given depths.
 *
 *   swathbudget limits [--standard ID|FILE] [--order ID[,ID...]]
 *                      (--depth D[,D...] | --depths START:STOP:STEP)
 *                      [--format table|csv|json]
 */
#include <getopt.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>

#include "cli.h"
#include "commands.h"
#include "swathbudget/orders.h"
#include "swathbudget/writer.h"

#define CMD "limits"
#define MAX_DEPTHS 4096
/* Deeper than any ocean: a larger depth is a typing error. */
#define DEPTH_MAX_M 12000.0
#define JSON_DIGITS 10

void cmd_limits_help(FILE *f)
{
    const char *const *ids = sb_standard_builtin_ids();

    fprintf(f,
            "usage: swathbudget limits [--standard ID|FILE] "
            "[--order ID[,ID...]]\n"
            "                          (--depth D[,D...] | --depths "
            "START:STOP:STEP)\n"
            "                          [--format table|csv|json]\n\n"
            "Print, for each order and depth, the largest vertical (TVU) "
            "and horizontal\n(THU) uncertainty a sounding may have at 95%% "
            "confidence, and the smallest\nfeature the order asks a survey "
            "to detect.\n\n"
            "options:\n"
            "  --standard ID|FILE  a compiled-in standard (default %s) or a "
            "YAML file\n"
            "                      with a client's specification (see "
            "docs/standards.md)\n"
            "  --order ID[,ID...]  orders to list (default: all of the "
            "standard's)\n"
            "  --depth D[,D...]    depths in metres, each > 0\n"
            "  --depths A:B:S      depths from A to B inclusive in steps of S "
            "metres\n"
            "  --format F          table (default), csv or json\n"
            "  -h, --help          this text\n\n"
            "compiled-in standards and their orders:\n",
            SB_STANDARD_DEFAULT_ID);
    for (; *ids; ids++) {
        const struct sb_standard *s = sb_standard_builtin(*ids);

        fprintf(f, "  %-7s %s:", s->id, s->title);
        for (int i = 0; i < s->n_orders; i++)
            fprintf(f, " %s", s->orders[i].id);
        fputc('\n', f);
    }
    fprintf(f,
            "\nThe limits are the standard's; whether a survey meets them is "
            "for the\nhydrographic authority's specifications, local "
            "regulations and licensed\npractice to judge, not for an "
            "a-priori estimate.\n");
}

static int write_json(const struct sb_standard *std,
                      const struct sb_order *const *sel, size_t nsel,
                      const double *depths, size_t nd)
{
    struct sb_json j;
    struct sb_error err;
    int rc;

    sb_json_init(&j, stdout);
    sb_json_begin_object(&j);
    sb_json_kv_string(&j, "standard", std->id);
    sb_json_key(&j, "limits");
    sb_json_begin_array(&j);
    for (size_t k = 0; k < nsel; k++)
        for (size_t i = 0; i < nd; i++) {
            double feat;

            sb_json_begin_object(&j);
            sb_json_kv_string(&j, "order", sel[k]->id);
            sb_json_kv_number(&j, "depth_m", depths[i], JSON_DIGITS);
            sb_json_kv_number(&j, "tvu_m", sb_order_tvu(sel[k], depths[i]),
                              JSON_DIGITS);
            sb_json_kv_number(&j, "thu_m", sb_order_thu(sel[k], depths[i]),
                              JSON_DIGITS);
            sb_json_key(&j, "feature_m");
            if (sb_order_feature(sel[k], depths[i], &feat))
                sb_json_number(&j, feat, JSON_DIGITS);
            else
                sb_json_null(&j);
            sb_json_end_object(&j);
        }
    sb_json_end_array(&j);
    sb_json_end_object(&j);
    sb_error_clear(&err);
    rc = sb_json_finish(&j, &err);
    return rc == SB_OK ? CLI_EXIT_OK : cli_report(CMD, rc, &err);
}

static int write_table(const struct sb_standard *std,
                       const struct sb_order *const *sel, size_t nsel,
                       const double *depths, size_t nd, enum sb_format fmt)
{
    static const struct sb_table_col cols[] = {
        {"order", "order", 0},
        {"depth (m)", "depth_m", 2},
        {"TVU 95% (m)", "tvu_m", 3},
        {"THU 95% (m)", "thu_m", 2},
        {"feature (m)", "feature_m", 2},
    };
    struct sb_table *t = sb_table_alloc(cols, sizeof cols / sizeof cols[0]);
    struct sb_error err;
    int rc = SB_OK;

    if (!t) {
        sb_error_set(&err, SB_ENOMEM, "", 0, 0, "out of memory");
        return cli_report(CMD, SB_ENOMEM, &err);
    }
    for (size_t k = 0; k < nsel && rc == SB_OK; k++)
        for (size_t i = 0; i < nd && rc == SB_OK; i++) {
            double feat;

            if ((rc = sb_table_str(t, sel[k]->id)) ||
                (rc = sb_table_num(t, depths[i])) ||
                (rc = sb_table_num(t, sb_order_tvu(sel[k], depths[i]))) ||
                (rc = sb_table_num(t, sb_order_thu(sel[k], depths[i]))))
                break;
            rc = sb_order_feature(sel[k], depths[i], &feat)
                     ? sb_table_num(t, feat)
                     : sb_table_empty(t, "-");
        }
    if (rc != SB_OK) {
        sb_table_free(t);
        sb_error_set(&err, rc, "", 0, 0, "could not build the table (%s)",
                     sb_strerror(rc));
        return cli_report(CMD, rc, &err);
    }
    if (fmt == SB_FORMAT_TABLE)
        printf("%s (%s): allowable uncertainty at 95%% confidence\n"
               "source: %s\n\n",
               std->title, std->id, std->source);
    sb_error_clear(&err);
    rc = sb_table_write(t, stdout, fmt, &err);
    sb_table_free(t);
    if (rc != SB_OK)
        return cli_report(CMD, rc, &err);
    if (fmt == SB_FORMAT_TABLE)
        printf("\nfeature: smallest feature to detect; '-' where the order "
               "specifies none.\nThese are the standard's limits, not an "
               "estimate of any survey's quality.\n");
    return CLI_EXIT_OK;
}

int cmd_limits(int argc, char **argv)
{
    enum { OPT_STANDARD = 256, OPT_ORDER, OPT_DEPTH, OPT_DEPTHS, OPT_FORMAT };
    static const struct option opts[] = {
        {"standard", required_argument, NULL, OPT_STANDARD},
        {"order", required_argument, NULL, OPT_ORDER},
        {"depth", required_argument, NULL, OPT_DEPTH},
        {"depths", required_argument, NULL, OPT_DEPTHS},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0},
    };
    double depths[MAX_DEPTHS];
    const struct sb_order *sel[SB_STANDARD_ORDERS_MAX];
    struct sb_standard storage;
    const struct sb_standard *std = NULL;
    const char *std_arg = NULL, *order_arg = NULL;
    const char *depth_opt = NULL, *depth_arg = NULL;
    enum sb_format fmt = SB_FORMAT_TABLE;
    struct sb_error err;
    size_t nd = 0, nsel = 0;
    int c, rc;

    optind = 1;
    while ((c = getopt_long(argc, argv, ":h", opts, NULL)) != -1) {
        switch (c) {
        case OPT_STANDARD: std_arg = optarg; break;
        case OPT_ORDER: order_arg = optarg; break;
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
        case OPT_FORMAT:
            if ((rc = cli_parse_format(CMD, optarg, &fmt)) != CLI_EXIT_OK)
                return rc;
            break;
        case 'h':
            cmd_limits_help(stdout);
            return CLI_EXIT_OK;
        default:
            return cli_bad_option(CMD, argc, argv);
        }
    }
    if (optind < argc)
        return cli_usage_error(CMD, "unexpected argument '%s' (expected "
                                    "options only)", argv[optind]);
    if (!depth_opt)
        return cli_usage_error(CMD, "no depths given (expected --depth "
                                    "D[,D...] or --depths START:STOP:STEP)");
    if (strcmp(depth_opt, "--depth") == 0)
        rc = cli_parse_values(CMD, "--depth", depth_arg, 0.0, DEPTH_MAX_M, 1,
                              depths, MAX_DEPTHS, &nd);
    else
        rc = cli_parse_range(CMD, "--depths", depth_arg, 0.0, DEPTH_MAX_M, 1,
                             depths, MAX_DEPTHS, &nd);
    if (rc != CLI_EXIT_OK)
        return rc;

    /* A word that is neither a known id nor an existing file is most
     * likely a mistyped id: a usage error, not an I/O failure. */
    if (std_arg && !sb_standard_builtin(std_arg)) {
        const char *const *ids = sb_standard_builtin_ids();
        char known[128] = "";
        struct stat st;

        for (size_t i = 0; ids[i]; i++) {
            size_t used = strlen(known);
            snprintf(known + used, sizeof known - used, "%s%s", ids[i],
                     ids[i + 1] ? ", " : "");
        }
        if (stat(std_arg, &st) != 0 || S_ISDIR(st.st_mode))
            return cli_usage_error(CMD, "--standard: '%s' is neither a "
                                        "compiled-in standard nor an existing "
                                        "file (expected %s or a YAML file)",
                                   std_arg, known);
    }
    sb_error_clear(&err);
    rc = sb_standard_resolve(std_arg, &storage, &std, &err);
    if (rc != SB_OK)
        return cli_report(CMD, rc, &err);
    if ((rc = cli_select_orders(CMD, std, order_arg, sel, &nsel)) != CLI_EXIT_OK)
        return rc;

    if (fmt == SB_FORMAT_JSON)
        return write_json(std, sel, nsel, depths, nd);
    return write_table(std, sel, nsel, depths, nd, fmt);
}
