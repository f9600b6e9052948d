/*
 * swathbudget — entry point: finds the command and hands it its arguments.
 * Everything a command does lives in its own file src/cli/cmd_NAME.c.
 */
#include "config.h"

#include <getopt.h>
#include <gsl/gsl_errno.h>
#include <stdio.h>
#include <string.h>

#include "cli.h"
#include "commands.h"

struct command {
    const char *name;
    int (*run)(int argc, char **argv);
    void (*help)(FILE *f);
    const char *summary;
};

static const struct command commands[] = {
    {"limits", cmd_limits, cmd_limits_help,
     "allowable TVU and THU of a standard's orders at given depths"},
    {"plan", cmd_plan, cmd_plan_help,
     "usable swath angle per order and depth, port and starboard"},
    {"breakdown", cmd_breakdown, cmd_breakdown_help,
     "each component's share of the uncertainty of one beam"},
    {"soundspeed", cmd_soundspeed, cmd_soundspeed_help,
     "sound velocity profile from a CTD cast, with a chosen equation"},
    {"raytrace", cmd_raytrace, cmd_raytrace_help,
     "travel time, offset and arrival angle of beams through a profile"},
    {"verify", cmd_verify, cmd_verify_help,
     "Monte Carlo check of the linear budget (JCGM 101)"},
    {"compare", cmd_compare, cmd_compare_help,
     "systems side by side: usable swath, survey effort, what-if"},
    {"report", cmd_report, cmd_report_help,
     "a self-contained HTML report for a client, or one plot as SVG"},
    {"audit", cmd_audit, cmd_audit_help,
     "check a finished survey's soundings against the order"},
    {"simulate", cmd_simulate, cmd_simulate_help,
     "write an invented survey (soundings CSV) for demos and tests"},
};

#define N_COMMANDS (sizeof commands / sizeof commands[0])

static const struct command *find(const char *name)
{
    for (size_t i = 0; i < N_COMMANDS; i++)
        if (strcmp(commands[i].name, name) == 0)
            return &commands[i];
    return NULL;
}

static void overview(FILE *f)
{
    fprintf(f,
            "swathbudget %s - a-priori uncertainty of multibeam soundings "
            "against IHO S-44\n\n"
            "usage: swathbudget COMMAND [OPTIONS] [FILES]\n"
            "       swathbudget help COMMAND\n"
            "       swathbudget --version\n\ncommands:\n",
            PACKAGE_VERSION);
    for (size_t i = 0; i < N_COMMANDS; i++)
        fprintf(f, "  %-11s %s\n", commands[i].name, commands[i].summary);
    fprintf(f, "\nThe figures are a-priori estimates, not proof of a survey's "
               "quality: defer to the\nhydrographic authority's "
               "specifications, local regulations and licensed practice.\n");
}

/* What --version and help printed must have reached stdout: a full disk
 * or a closed pipe is a failure (exit 1), not a silent success. */
static int stdout_status(void)
{
    if (fflush(stdout) != 0 || ferror(stdout)) {
        fprintf(stderr, "swathbudget: write error on the output (expected a "
                        "writable output)\n");
        return CLI_EXIT_FAIL;
    }
    return CLI_EXIT_OK;
}

int main(int argc, char **argv)
{
    const struct command *c;

    opterr = 0; /* commands print their own one-line usage errors */
    /* GSL aborts on an error by default; the library checks every status
     * it gets back, so report instead of aborting. */
    gsl_set_error_handler_off();
    if (argc < 2) {
        overview(stderr);
        return CLI_EXIT_INPUT;
    }
    if (strcmp(argv[1], "--version") == 0 || strcmp(argv[1], "version") == 0) {
        printf("swathbudget %s\n", PACKAGE_VERSION);
        return stdout_status();
    }
    if (strcmp(argv[1], "--help") == 0 || strcmp(argv[1], "-h") == 0) {
        overview(stdout);
        return stdout_status();
    }
    if (strcmp(argv[1], "help") == 0) {
        if (argc < 3) {
            overview(stdout);
            return stdout_status();
        }
        c = find(argv[2]);
        if (!c) {
            fprintf(stderr, "swathbudget: unknown command '%s' (expected one "
                            "of the commands listed by 'swathbudget help')\n",
                    argv[2]);
            return CLI_EXIT_INPUT;
        }
        c->help(stdout);
        return stdout_status();
    }
    c = find(argv[1]);
    if (!c) {
        fprintf(stderr, "swathbudget: unknown command '%s' (expected one of "
                        "the commands listed by 'swathbudget help')\n",
                argv[1]);
        return CLI_EXIT_INPUT;
    }
    optind = 1;
    return c->run(argc - 1, argv + 1);
}
