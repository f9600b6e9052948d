/* Error records shared by every module (see include/swathbudget/error.h). */
#include "swathbudget/error.h"

#include <stdarg.h>
#include <stdio.h>
#include <string.h>

void sb_error_clear(struct sb_error *err)
{
    if (!err)
        return;
    err->file[0] = '\0';
    err->line = 0;
    err->col = 0;
    err->msg[0] = '\0';
}

/* A message must stay on one line even when it quotes input text (a YAML
 * key or a CSV column name may hold a line break): control characters
 * become '?'. */
static void one_line(char *s)
{
    for (; *s; s++)
        if ((unsigned char)*s < 0x20 || *s == 0x7f)
            *s = '?';
}

void sb_error_at(struct sb_error *err, const char *file, int line, int col)
{
    if (!err)
        return;
    snprintf(err->file, sizeof err->file, "%s", file ? file : "");
    err->line = line;
    err->col = col;
}

int sb_error_set(struct sb_error *err, int code, const char *file, int line,
                 int col, const char *fmt, ...)
{
    va_list ap;

    if (!err)
        return code;
    sb_error_at(err, file, line, col);
    va_start(ap, fmt);
    vsnprintf(err->msg, sizeof err->msg, fmt, ap);
    va_end(ap);
    one_line(err->msg);
    return code;
}

void sb_error_prefix(struct sb_error *err, const char *prefix)
{
    char tmp[SB_ERROR_MSG_MAX];
    size_t lp, lm;

    if (!err || !prefix || !*prefix)
        return;
    /* Assemble by hand: the message is cut at the buffer's end if the
     * prefix and the message together are too long. */
    lp = strlen(prefix);
    if (lp > sizeof tmp - 3)
        lp = sizeof tmp - 3;
    memcpy(tmp, prefix, lp);
    tmp[lp] = ':';
    tmp[lp + 1] = ' ';
    lm = strlen(err->msg);
    if (lm > sizeof tmp - lp - 3)
        lm = sizeof tmp - lp - 3;
    memcpy(tmp + lp + 2, err->msg, lm);
    tmp[lp + 2 + lm] = '\0';
    memcpy(err->msg, tmp, sizeof tmp);
    one_line(err->msg);
}

void sb_error_format(const struct sb_error *err, char *buf, size_t n)
{
    if (!buf || n == 0)
        return;
    if (!err) {
        snprintf(buf, n, "unknown error");
        return;
    }
    if (err->file[0])
        snprintf(buf, n, "%s:%d:%d: %s", err->file, err->line, err->col,
                 err->msg);
    else
        snprintf(buf, n, "%s", err->msg);
    one_line(buf); /* also for messages written into err->msg directly */
}

const char *sb_strerror(int code)
{
    switch (code) {
    case SB_OK: return "success";
    case SB_EINPUT: return "invalid input";
    case SB_ENUM: return "numerical failure";
    case SB_EIO: return "input/output error";
    case SB_ENOMEM: return "out of memory";
    case SB_EINTERNAL: return "internal error";
    default: return "unknown status";
    }
}
