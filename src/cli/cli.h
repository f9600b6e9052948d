/*
 * swathbudget command layer: shared option helpers.
 *
 * Convention for a command NAME (file src/cli/cmd_NAME.c):
 *     int cmd_NAME(int argc, char **argv);   argv[0] is "NAME"; returns the
 *                                            process exit status
 *     void cmd_NAME_help(FILE *f);           usage text for help / --help
 * and one line in the dispatch table of main.c.  Commands parse options with
 * getopt_long (set optind = 1 first: the parser is shared; main() sets
 * opterr = 0 so that getopt stays quiet and cli_bad_option speaks), load inputs
 * through the library, call the engine and hand results to a writer.
 *
 * Exit statuses: 0 success, 1 failure of the program or of the system (I/O,
 * numerical, internal), 2 bad input or bad usage, and for commands that
 * judge something (audit --strict) 1 for a failed verdict.
 */
#ifndef SWATHBUDGET_CLI_H
#define SWATHBUDGET_CLI_H

#include <stddef.h>
#include <stdio.h>

#include "swathbudget/error.h"
#include "swathbudget/writer.h"

#define CLI_EXIT_OK 0
#define CLI_EXIT_FAIL 1
#define CLI_EXIT_INPUT 2

/* Print "swathbudget CMD: message (see 'swathbudget help CMD')" on one line
 * to stderr; returns CLI_EXIT_INPUT. */
int cli_usage_error(const char *cmd, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;

/* Print a library error on one line ("FILE:LINE:COL: msg", or
 * "swathbudget CMD: msg" when it has no file) and map the status to an exit
 * status: SB_EINPUT -> 2, anything else -> 1. */
int cli_report(const char *cmd, int status, const struct sb_error *err);

/* Print a warning line "swathbudget CMD: warning: ..." to stderr. */
void cli_warn(const char *cmd, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;

/* Option parsers.  On a bad value they print the one-line usage error
 * themselves and return CLI_EXIT_INPUT; on success CLI_EXIT_OK. */
int cli_parse_format(const char *cmd, const char *arg, enum sb_format *out);
/* --thu-rule: "exact" or "s44" (enum sb_thu_rule of propagate.h). */
int cli_parse_thu_rule(const char *cmd, const char *arg, int *out);
/* A finite number; lo/hi bound it (inclusive unless open_lo: lo < v). */
int cli_parse_double(const char *cmd, const char *opt, const char *arg,
                     double lo, double hi, int open_lo, double *out);
int cli_parse_long(const char *cmd, const char *opt, const char *arg, long lo,
                   long hi, long *out);
/* "A,B,C" (list) or "START:STOP:STEP" (inclusive range, STEP > 0,
 * START <= STOP).  Each value must lie in [lo, hi] (lo excluded when
 * open_lo).  At most max values; *n receives the count. */
int cli_parse_values(const char *cmd, const char *opt, const char *arg,
                     double lo, double hi, int open_lo, double *out,
                     size_t max, size_t *n);
/* Same, but only the range form is accepted. */
int cli_parse_range(const char *cmd, const char *opt, const char *arg,
                    double lo, double hi, int open_lo, double *out, size_t max,
                    size_t *n);
/* Split "a,b,c" into at most max words (pointers into buf, a copy of arg
 * of size bufsize).  Empty words are a usage error. */
int cli_split_words(const char *cmd, const char *opt, const char *arg,
                    char *buf, size_t bufsize, const char **words, size_t max,
                    size_t *n);

/* An input file named on the command line must exist and not be a
 * directory; otherwise a usage error "OPT: no such file 'PATH' (expected
 * WHAT)" (opt may be "" for a positional argument).  A file that exists but
 * cannot be read is left to its loader (an I/O failure, exit 1). */
int cli_check_input_file(const char *cmd, const char *opt, const char *path,
                         const char *what);

/* --standard: a compiled-in id, or an existing file (a custom standard).
 * A word that is neither is most likely a mistyped id: a usage error that
 * lists the compiled-in ids.  NULL (the default) is fine. */
int cli_check_standard_arg(const char *cmd, const char *arg);

struct sb_standard;
struct sb_order;
/* --order A,B,...: the orders of std named in arg, in that order, each at
 * most once; all of the standard's orders when arg is NULL.  sel must hold
 * SB_STANDARD_ORDERS_MAX entries. */
int cli_select_orders(const char *cmd, const struct sb_standard *std,
                      const char *arg, const struct sb_order **sel,
                      size_t *n);

/* After getopt: exactly one positional argument, the system file, left in
 * argv[optind]; otherwise a usage error. */
int cli_one_system_file(const char *cmd, int argc, char **argv);

/* Print "swathbudget CMD: unknown option ..." for getopt's '?' case. */
int cli_bad_option(const char *cmd, int argc, char **argv);

#endif
