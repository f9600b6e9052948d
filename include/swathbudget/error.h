/*
 * swathbudget — error reporting shared by every library module.
 *
 * Library functions return one of the SB_* status codes and, on failure,
 * fill a struct sb_error supplied by the caller.  Input errors carry the
 * position (file, line, column; 1-based) of the offending text so that the
 * command layer can print the one-line form
 *
 *     FILE:LINE:COL: what is wrong (what was expected)
 *
 * and exit with status 2.  Other failures exit with status 1.
 */
#ifndef SWATHBUDGET_ERROR_H
#define SWATHBUDGET_ERROR_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

enum sb_status {
    SB_OK = 0,        /* success */
    SB_EINPUT = 1,    /* malformed or out-of-range input: exit status 2 */
    SB_ENUM = 2,      /* numerical failure (no convergence, NaN): exit 1 */
    SB_EIO = 3,       /* file could not be read or written: exit 1 */
    SB_ENOMEM = 4,    /* allocation failed: exit 1 */
    SB_EINTERNAL = 5  /* a broken invariant of the program itself: exit 1 */
};

#define SB_ERROR_FILE_MAX 512
#define SB_ERROR_MSG_MAX 512

struct sb_error {
    char file[SB_ERROR_FILE_MAX]; /* "" when the error has no source file */
    int line;                     /* 1-based; 0 when unknown */
    int col;                      /* 1-based; 0 when unknown */
    char msg[SB_ERROR_MSG_MAX];   /* "what is wrong (what was expected)" */
};

/* Empty the record (no file, no position, no message). */
void sb_error_clear(struct sb_error *err);

/* Fill the record: position and a printf-style message.  err may be NULL.
 * Always returns code, so that a caller can write
 *     return sb_error_set(err, SB_EINPUT, file, line, col, "...", ...);   */
int sb_error_set(struct sb_error *err, int code, const char *file, int line,
                 int col, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 6, 7)))
#endif
    ;

/* Put "prefix: " in front of the existing message (used to name the field,
 * e.g. "motion.roll: "), keeping the position.  err may be NULL. */
void sb_error_prefix(struct sb_error *err, const char *prefix);

/* Set the position of an error whose message is already filled. */
void sb_error_at(struct sb_error *err, const char *file, int line, int col);

/* Format "FILE:LINE:COL: msg" (or just "msg" without a file) into buf. */
void sb_error_format(const struct sb_error *err, char *buf, size_t n);

/* A short constant description of a status code. */
const char *sb_strerror(int code);

#ifdef __cplusplus
}
#endif

#endif
