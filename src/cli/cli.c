/* Shared option helpers of the command layer (see cli.h). */
#include "cli.h"

#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "swathbudget/orders.h"
#include "swathbudget/propagate.h"

int cli_usage_error(const char *cmd, const char *fmt, ...)
{
    va_list ap;

    fprintf(stderr, "swathbudget %s: ", cmd);
    va_start(ap, fmt);
    vfprintf(stderr, fmt, ap);
    va_end(ap);
    fprintf(stderr, " (see 'swathbudget help %s')\n", cmd);
    return CLI_EXIT_INPUT;
}

int cli_report(const char *cmd, int status, const struct sb_error *err)
{
    char buf[SB_ERROR_FILE_MAX + SB_ERROR_MSG_MAX + 64];

    sb_error_format(err, buf, sizeof buf);
    /* Keep the message on one line whatever the library put in it. */
    for (char *p = buf; *p; p++)
        if (*p == '\n' || *p == '\r')
            *p = ' ';
    if (err && err->file[0])
        fprintf(stderr, "%s\n", buf);
    else
        fprintf(stderr, "swathbudget %s: %s\n", cmd, buf);
    return status == SB_EINPUT ? CLI_EXIT_INPUT : CLI_EXIT_FAIL;
}

void cli_warn(const char *cmd, const char *fmt, ...)
{
    va_list ap;

    fprintf(stderr, "swathbudget %s: warning: ", cmd);
    va_start(ap, fmt);
    vfprintf(stderr, fmt, ap);
    va_end(ap);
    fputc('\n', stderr);
}

int cli_parse_format(const char *cmd, const char *arg, enum sb_format *out)
{
    if (sb_format_parse(arg, out) != SB_OK)
        return cli_usage_error(cmd, "--format: unknown format '%s' (expected "
                                    "table, csv or json)", arg);
    return CLI_EXIT_OK;
}

int cli_parse_thu_rule(const char *cmd, const char *arg, int *out)
{
    if (strcmp(arg, "exact") == 0)
        *out = SB_THU_EXACT;
    else if (strcmp(arg, "s44") == 0)
        *out = SB_THU_S44;
    else
        return cli_usage_error(cmd, "--thu-rule: unknown rule '%s' "
                                    "(expected exact or s44)",
                               arg);
    return CLI_EXIT_OK;
}

/* strtod on the whole text, finite only. */
static int number(const char *s, double *v)
{
    char *end;

    if (!s || !*s)
        return -1;
    /* strtod also reads "nan", "inf" and hexadecimal; a surveyor means
     * none of them. */
    for (const char *p = s; *p; p++)
        if (!strchr("0123456789+-.eE", *p))
            return -1;
    errno = 0;
    *v = strtod(s, &end);
    if (*end != '\0' || errno == ERANGE || !isfinite(*v))
        return -1;
    return 0;
}

static int in_range(double v, double lo, double hi, int open_lo)
{
    return (open_lo ? v > lo : v >= lo) && v <= hi;
}

static void describe_range(char *buf, size_t n, double lo, double hi,
                           int open_lo)
{
    if (isinf(hi))
        snprintf(buf, n, "a number %s %g", open_lo ? ">" : ">=", lo);
    else
        snprintf(buf, n, "a number %s %g and <= %g", open_lo ? ">" : ">=", lo,
                 hi);
}

int cli_parse_double(const char *cmd, const char *opt, const char *arg,
                     double lo, double hi, int open_lo, double *out)
{
    char what[96];
    double v;

    describe_range(what, sizeof what, lo, hi, open_lo);
    if (number(arg, &v) != 0)
        return cli_usage_error(cmd, "%s: '%s' is not a number (expected %s)",
                               opt, arg, what);
    if (!in_range(v, lo, hi, open_lo))
        return cli_usage_error(cmd, "%s: %s is out of range (expected %s)",
                               opt, arg, what);
    *out = v;
    return CLI_EXIT_OK;
}

int cli_parse_long(const char *cmd, const char *opt, const char *arg, long lo,
                   long hi, long *out)
{
    char *end;
    long v;

    errno = 0;
    v = strtol(arg, &end, 10);
    if (!*arg || *end || errno == ERANGE)
        return cli_usage_error(cmd, "%s: '%s' is not a whole number "
                                    "(expected %ld to %ld)", opt, arg, lo, hi);
    if (v < lo || v > hi)
        return cli_usage_error(cmd, "%s: %ld is out of range (expected %ld "
                                    "to %ld)", opt, v, lo, hi);
    *out = v;
    return CLI_EXIT_OK;
}

static int parse_range_form(const char *cmd, const char *opt, const char *arg,
                            double lo, double hi, int open_lo, double *out,
                            size_t max, size_t *n)
{
    char buf[256], what[96], *a, *b, *c;
    double start, stop, step;
    size_t count;

    describe_range(what, sizeof what, lo, hi, open_lo);
    if (strlen(arg) >= sizeof buf)
        return cli_usage_error(cmd, "%s: range too long (expected "
                                    "START:STOP:STEP)", opt);
    snprintf(buf, sizeof buf, "%s", arg);
    a = buf;
    b = strchr(a, ':');
    c = b ? strchr(b + 1, ':') : NULL;
    if (!b || !c || strchr(c + 1, ':'))
        return cli_usage_error(cmd, "%s: malformed range '%s' (expected "
                                    "START:STOP:STEP)", opt, arg);
    *b++ = '\0';
    *c++ = '\0';
    if (number(a, &start) || number(b, &stop) || number(c, &step))
        return cli_usage_error(cmd, "%s: malformed range '%s' (expected "
                                    "three numbers START:STOP:STEP)", opt, arg);
    if (!(step > 0) || stop < start)
        return cli_usage_error(cmd, "%s: empty range '%s' (expected STEP > 0 "
                                    "and START <= STOP)", opt, arg);
    if (!in_range(start, lo, hi, open_lo) || !in_range(stop, lo, hi, open_lo))
        return cli_usage_error(cmd, "%s: range '%s' leaves the allowed values "
                                    "(expected %s)", opt, arg, what);
    /* Inclusive of STOP despite rounding: 10:100:10 gives ten values. */
    {
        double k = floor((stop - start) / step + 1e-9);
        if (k + 1 > (double)max)
            return cli_usage_error(cmd, "%s: range '%s' has too many values "
                                        "(expected at most %zu)", opt, arg,
                                   max);
        count = (size_t)k + 1;
    }
    for (size_t i = 0; i < count; i++) {
        double v = start + (double)i * step;
        out[i] = v > stop ? stop : v;
    }
    *n = count;
    return CLI_EXIT_OK;
}

int cli_parse_range(const char *cmd, const char *opt, const char *arg,
                    double lo, double hi, int open_lo, double *out, size_t max,
                    size_t *n)
{
    return parse_range_form(cmd, opt, arg, lo, hi, open_lo, out, max, n);
}

int cli_parse_values(const char *cmd, const char *opt, const char *arg,
                     double lo, double hi, int open_lo, double *out,
                     size_t max, size_t *n)
{
    char buf[4096], what[96];
    size_t count = 0;
    char *save = NULL, *tok;

    if (strchr(arg, ':'))
        return parse_range_form(cmd, opt, arg, lo, hi, open_lo, out, max, n);
    describe_range(what, sizeof what, lo, hi, open_lo);
    if (strlen(arg) >= sizeof buf)
        return cli_usage_error(cmd, "%s: list too long (expected at most %zu "
                                    "characters)", opt, sizeof buf - 1);
    if (!*arg || arg[0] == ',' || arg[strlen(arg) - 1] == ',' ||
        strstr(arg, ",,"))
        return cli_usage_error(cmd, "%s: empty value in '%s' (expected "
                                    "V[,V...] or START:STOP:STEP)", opt, arg);
    snprintf(buf, sizeof buf, "%s", arg);
    for (tok = strtok_r(buf, ",", &save); tok; tok = strtok_r(NULL, ",", &save)) {
        double v;
        if (number(tok, &v) != 0)
            return cli_usage_error(cmd, "%s: '%s' is not a number (expected "
                                        "%s)", opt, tok, what);
        if (!in_range(v, lo, hi, open_lo))
            return cli_usage_error(cmd, "%s: %s is out of range (expected %s)",
                                   opt, tok, what);
        if (count == max)
            return cli_usage_error(cmd, "%s: too many values (expected at "
                                        "most %zu)", opt, max);
        out[count++] = v;
    }
    *n = count;
    return CLI_EXIT_OK;
}

int cli_split_words(const char *cmd, const char *opt, const char *arg,
                    char *buf, size_t bufsize, const char **words, size_t max,
                    size_t *n)
{
    size_t count = 0;
    char *save = NULL, *tok;

    if (strlen(arg) >= bufsize)
        return cli_usage_error(cmd, "%s: list too long", opt);
    if (!*arg || arg[0] == ',' || arg[strlen(arg) - 1] == ',' ||
        strstr(arg, ",,"))
        return cli_usage_error(cmd, "%s: empty item in '%s' (expected "
                                    "A[,B...])", opt, arg);
    snprintf(buf, bufsize, "%s", arg);
    for (tok = strtok_r(buf, ",", &save); tok; tok = strtok_r(NULL, ",", &save)) {
        if (count == max)
            return cli_usage_error(cmd, "%s: too many items (expected at most "
                                        "%zu)", opt, max);
        words[count++] = tok;
    }
    *n = count;
    return CLI_EXIT_OK;
}

int cli_bad_option(const char *cmd, int argc, char **argv)
{
    /* getopt_long has moved optind past the offending word. */
    int i = optind - 1;
    const char *w = (i >= 0 && i < argc) ? argv[i] : "?";

    if (optopt && optopt != '?' && i >= 0 && i < argc && w[0] == '-' &&
        w[1] != '-')
        return cli_usage_error(cmd, "unknown option or missing value '-%c' "
                                    "(expected one of the options listed by "
                                    "--help)", optopt);
    return cli_usage_error(cmd, "unknown option or missing value '%s' "
                                "(expected one of the options listed by "
                                "--help)", w);
}

int cli_check_input_file(const char *cmd, const char *opt, const char *path,
                         const char *what)
{
    struct stat st;
    const char *sep = opt && *opt ? ": " : "";

    if (!opt)
        opt = "";
    if (stat(path, &st) != 0)
        return cli_usage_error(cmd, "%s%sno such file '%s' (expected %s)", opt,
                               sep, path, what);
    if (S_ISDIR(st.st_mode))
        return cli_usage_error(cmd, "%s%s'%s' is a directory (expected %s)",
                               opt, sep, path, what);
    return CLI_EXIT_OK;
}

int cli_check_standard_arg(const char *cmd, const char *arg)
{
    const char *const *ids = sb_standard_builtin_ids();
    char known[128] = "";
    struct stat st;

    if (!arg || sb_standard_builtin(arg))
        return CLI_EXIT_OK;
    for (size_t i = 0; ids[i]; i++) {
        size_t used = strlen(known);

        snprintf(known + used, sizeof known - used, "%s%s", ids[i],
                 ids[i + 1] ? ", " : "");
    }
    if (stat(arg, &st) != 0 || S_ISDIR(st.st_mode))
        return cli_usage_error(cmd, "--standard: '%s' is neither a "
                                    "compiled-in standard nor an existing "
                                    "file (expected %s or a YAML file)",
                               arg, known);
    return CLI_EXIT_OK;
}

int cli_select_orders(const char *cmd, const struct sb_standard *std,
                      const char *arg, const struct sb_order **sel, size_t *n)
{
    char buf[1024], known[512];
    const char *words[SB_STANDARD_ORDERS_MAX];
    size_t nw, used = 0;
    int rc;

    if (!arg) {
        for (int i = 0; i < std->n_orders; i++)
            sel[i] = &std->orders[i];
        *n = (size_t)std->n_orders;
        return CLI_EXIT_OK;
    }
    rc = cli_split_words(cmd, "--order", arg, buf, sizeof buf, words,
                         SB_STANDARD_ORDERS_MAX, &nw);
    if (rc != CLI_EXIT_OK)
        return rc;
    known[0] = '\0';
    for (int i = 0; i < std->n_orders && used < sizeof known; i++) {
        int w = snprintf(known + used, sizeof known - used, "%s%s",
                         i ? ", " : "", std->orders[i].id);
        if (w < 0)
            break;
        used += (size_t)w;
    }
    for (size_t k = 0; k < nw; k++) {
        sel[k] = sb_standard_order(std, words[k]);
        if (!sel[k])
            return cli_usage_error(cmd, "--order: unknown order '%s' in %s "
                                        "(expected one of: %s)",
                                   words[k], std->id, known);
        for (size_t m = 0; m < k; m++)
            if (sel[m] == sel[k])
                return cli_usage_error(cmd, "--order: order '%s' named twice "
                                            "(expected each order once)",
                                       words[k]);
    }
    *n = nw;
    return CLI_EXIT_OK;
}

int cli_one_system_file(const char *cmd, int argc, char **argv)
{
    if (optind >= argc)
        return cli_usage_error(cmd, "no system file given (expected "
                                    "SYSTEM.yaml)");
    if (optind + 1 < argc)
        return cli_usage_error(cmd, "unexpected argument '%s' (expected one "
                                    "system file)", argv[optind + 1]);
    return CLI_EXIT_OK;
}
