/*
 * swathbudget — output writers: a streaming JSON emitter, an aligned
 * table / CSV writer and atomic output files.
 *
 * Writers never compute; they format what the engine produced.  Every number
 * passes through one gate that refuses NaN and infinities: a non-finite value
 * reaching an output is a bug of the program, so the writer records
 * SB_EINTERNAL instead of printing it, and the caller reports it (exit 1).
 */
#ifndef SWATHBUDGET_WRITER_H
#define SWATHBUDGET_WRITER_H

#include <stddef.h>
#include <stdio.h>

#include "swathbudget/error.h"

#ifdef __cplusplus
extern "C" {
#endif

enum sb_format { SB_FORMAT_TABLE = 0, SB_FORMAT_CSV = 1, SB_FORMAT_JSON = 2 };

/* Parse "table", "csv" or "json". Returns SB_OK or SB_EINPUT. */
int sb_format_parse(const char *text, enum sb_format *out);

/* ---- JSON -------------------------------------------------------------- */

#define SB_JSON_MAX_DEPTH 32

struct sb_json {
    FILE *f;
    int depth;
    int count[SB_JSON_MAX_DEPTH]; /* items written at each level */
    int is_object[SB_JSON_MAX_DEPTH];
    int after_key;
    int status;                   /* first failure: SB_EINTERNAL or SB_EIO */
    char what[128];               /* what failed, for the message */
};

void sb_json_init(struct sb_json *j, FILE *f);
void sb_json_begin_object(struct sb_json *j);
void sb_json_end_object(struct sb_json *j);
void sb_json_begin_array(struct sb_json *j);
void sb_json_end_array(struct sb_json *j);
void sb_json_key(struct sb_json *j, const char *key);
/* A number with up to `digits` significant digits (%.*g).  Non-finite
 * values are refused: status becomes SB_EINTERNAL, `null` is written so the
 * document stays parseable, and sb_json_finish() reports the failure. */
void sb_json_number(struct sb_json *j, double v, int digits);
void sb_json_integer(struct sb_json *j, long long v);
void sb_json_string(struct sb_json *j, const char *s);
void sb_json_bool(struct sb_json *j, int v);
void sb_json_null(struct sb_json *j);
/* Shorthands for "key": value. */
void sb_json_kv_number(struct sb_json *j, const char *key, double v, int digits);
void sb_json_kv_string(struct sb_json *j, const char *key, const char *s);
/* Ends the document with a newline and flushes; returns j->status (SB_OK,
 * SB_EINTERNAL for a refused number or bad nesting, SB_EIO on a write
 * error) and fills err. */
int sb_json_finish(struct sb_json *j, struct sb_error *err);

/* ---- Tables (aligned text for people, CSV for machines) ---------------- */

struct sb_table_col {
    const char *title;  /* table header, unit included, e.g. "depth (m)" */
    const char *key;    /* CSV header, snake_case + unit, e.g. "depth_m" */
    int precision;      /* digits after the decimal point for numbers */
};

struct sb_table;

struct sb_table *sb_table_alloc(const struct sb_table_col *cols, size_t ncols);
void sb_table_free(struct sb_table *t);
/* Cells are added row by row, left to right. */
int sb_table_num(struct sb_table *t, double v);     /* column precision */
int sb_table_str(struct sb_table *t, const char *s);
int sb_table_empty(struct sb_table *t, const char *placeholder); /* "-" */
/* Write as SB_FORMAT_TABLE (aligned, header with units) or SB_FORMAT_CSV.
 * Returns SB_OK, SB_EINTERNAL (non-finite number, ragged rows) or SB_EIO. */
int sb_table_write(const struct sb_table *t, FILE *f, enum sb_format fmt,
                   struct sb_error *err);

/* ---- Atomic output files ------------------------------------------------ */

/* Output goes to a temporary file in the destination's directory and is
 * renamed over the destination only by sb_outfile_commit(): an interrupted
 * or failing run leaves the old file or nothing, never half a file. */
struct sb_outfile {
    FILE *f;            /* write here */
    char path[4096];    /* final name */
    char tmp[4096];     /* temporary name */
};

int sb_outfile_open(struct sb_outfile *o, const char *path,
                    struct sb_error *err);
/* Flush, check every write, close and rename; on failure the temporary
 * file is removed and SB_EIO returned. */
int sb_outfile_commit(struct sb_outfile *o, struct sb_error *err);
/* Give up: close and remove the temporary file. */
void sb_outfile_abort(struct sb_outfile *o);

#ifdef __cplusplus
}
#endif

#endif
