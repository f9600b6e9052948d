/* The commands of swathbudget: one cmd_NAME.c file each (see cli.h). */
#ifndef SWATHBUDGET_COMMANDS_H
#define SWATHBUDGET_COMMANDS_H

#include <stdio.h>

#define SB_DECLARE_COMMAND(name)                                              \
    int cmd_##name(int argc, char **argv);                                    \
    void cmd_##name##_help(FILE *f)

SB_DECLARE_COMMAND(limits);
SB_DECLARE_COMMAND(plan);
SB_DECLARE_COMMAND(breakdown);
SB_DECLARE_COMMAND(soundspeed);
SB_DECLARE_COMMAND(raytrace);
SB_DECLARE_COMMAND(verify);
SB_DECLARE_COMMAND(compare);
SB_DECLARE_COMMAND(report);
SB_DECLARE_COMMAND(audit);
SB_DECLARE_COMMAND(simulate);

#endif
