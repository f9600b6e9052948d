/*
 * swathbudget — streaming reader of delimited text (CSV and its cousins) for
 * sounding files.
 *
 * A file is a header row naming the columns, then one record per row.  The
 * reader goes through it once with a fixed read buffer, so memory does not
 * grow with the number of rows and files larger than memory are fine; no
 * allocation happens after sb_csv_open.  Rows are handed out one at a time
 * as views into that buffer.
 *
 * Format (details and the detection rules in docs/csv.md):
 *   - delimiter ',', ';', tab, or whitespace (runs of spaces/tabs; leading
 *     and trailing blanks ignored), given or detected from the header row;
 *   - decimal mark '.' or ',', given or detected from the first data rows;
 *   - RFC 4180 quoting: a field may be wrapped in '"', a '""' inside stands
 *     for one '"', and a quoted field may hold delimiters and line breaks;
 *   - line ends LF or CRLF; a UTF-8 byte order mark at the start is skipped;
 *   - blank lines (only spaces/tabs; tabs not counting as blanks in a
 *     tab-delimited file) are skipped but still count for line numbers;
 *     the header is the first non-blank line.
 *
 * Problems are of two kinds:
 *   - the header (missing, duplicate names, a requested column not there)
 *     and I/O failures are errors: the functions return SB_EINPUT / SB_EIO /
 *     SB_ENOMEM and fill the struct sb_error with FILE:LINE:COL;
 *   - a bad row is NOT an error of the reader: sb_csv_next hands it out
 *     with a reason (row too long, ragged, broken quoting) and the field
 *     accessors give a reason per field (empty, not a number, wrong decimal
 *     mark, non-finite).  The caller decides: count it, list it with
 *     sb_csv_row_error, carry on.  Nothing is dropped silently.
 *
 * Positions: lines are 1-based physical lines of the file (a quoted line
 * break starts a new one); columns are 1-based byte offsets in that line.
 */
#ifndef SWATHBUDGET_CSVREAD_H
#define SWATHBUDGET_CSVREAD_H

#include <stddef.h>

#include "swathbudget/decimal.h"
#include "swathbudget/error.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Default read buffer: also the longest row the reader accepts. */
#define SB_CSV_BUFFER_DEFAULT (1024u * 1024u)
/* Smallest buffer used (tests use small ones to split rows); a smaller
 * request is raised to it. */
#define SB_CSV_BUFFER_MIN 16u
/* Largest buffer accepted (1 GiB). */
#define SB_CSV_BUFFER_MAX (1024u * 1024u * 1024u)

/* Reasons a row or a field cannot be used; 0 = usable.  The first values
 * are those of enum sb_decimal_result, so a decimal result is a reason. */
enum sb_csv_reason {
    SB_CSV_OK = SB_DECIMAL_OK,
    SB_CSV_EMPTY_FIELD = SB_DECIMAL_EMPTY,   /* field holds nothing */
    SB_CSV_NOT_NUMBER = SB_DECIMAL_SYNTAX,   /* unparsable number */
    SB_CSV_DECIMAL_MARK = SB_DECIMAL_MARK,   /* the file's other decimal
                                                mark (mixed marks) */
    SB_CSV_NONFINITE = SB_DECIMAL_NONFINITE, /* nan, inf, overflow */
    SB_CSV_RAGGED = 5,     /* field count differs from the header's */
    SB_CSV_TOO_LONG = 6,   /* row longer than the read buffer; skipped */
    SB_CSV_BAD_QUOTE = 7,  /* unterminated quote, or text after a closing
                              quote */
    SB_CSV_NO_FIELD = 8    /* column index outside the header */
};
#define SB_CSV_NREASONS 9

struct sb_csv_options {
    char delimiter;     /* ',', ';', '\t', ' ' (whitespace), or 0: detect */
    char decimal_mark;  /* '.', ',', or 0: detect */
    size_t buffer_size; /* read buffer in bytes = longest row accepted;
                           0: SB_CSV_BUFFER_DEFAULT; raised to at least
                           SB_CSV_BUFFER_MIN; at most SB_CSV_BUFFER_MAX */
};

/* One field of the current row: a view into the reader's buffer, valid
 * until the next sb_csv_next or sb_csv_close.  Quotes are already removed
 * ('""' turned into '"'); surrounding blanks are still there.  Its
 * position in the file: sb_csv_field_pos.  At least SB_DECIMAL_PAD bytes
 * after text + len can be read (the buffer has that slack), so a field
 * may go straight to sb_decimal_parse_padded or
 * sb_decimal_parse_short_padded (decimal.h) with the file's decimal mark:
 * that gives what sb_csv_field_double gives for a field of a usable row. */
struct sb_csv_field {
    const char *text; /* not NUL-terminated */
    size_t len;
};

/* The current row.  When reason is not SB_CSV_OK the row is unusable as a
 * whole (nfields is 0 for SB_CSV_TOO_LONG); reason_line/reason_col then
 * point at the problem. */
struct sb_csv_row {
    long line;                        /* line where the row starts */
    int reason;                       /* SB_CSV_OK, SB_CSV_RAGGED,
                                         SB_CSV_TOO_LONG or SB_CSV_BAD_QUOTE */
    long reason_line;
    int reason_col;
    int nfields;                      /* fields found in the row */
    const struct sb_csv_field *field; /* the first min(nfields, header
                                         count + 1) of them */
};

struct sb_csv;

/*
 * Open path ("-" = standard input, named "<stdin>" in messages) and read
 * its header row.  opt may be NULL (detect everything, default buffer).
 * On SB_OK *out is a reader to free with sb_csv_close.  Errors:
 *   SB_EIO     the file cannot be opened or read;
 *   SB_ENOMEM  no memory for the buffer;
 *   SB_EINPUT  empty file (no non-blank line), header row longer than the
 *              buffer, broken quoting in the header, two columns with the
 *              same name, a delimiter or decimal mark not in the lists
 *              above, ',' given as both delimiter and decimal mark, or a
 *              buffer size above SB_CSV_BUFFER_MAX (option errors carry
 *              no file position).
 * Header names are compared after removing surrounding blanks.
 */
int sb_csv_open(const char *path, const struct sb_csv_options *opt,
                struct sb_csv **out, struct sb_error *err);

/* Release everything (closes the file unless it is standard input).
 * NULL is allowed. */
void sb_csv_close(struct sb_csv *csv);

/*
 * Find the column whose header name is exactly `name` (case-sensitive)
 * and store its 0-based index in *col_index.  SB_EINPUT when there is no
 * such column, with the position of the header row and the names that do
 * exist in the message.
 */
int sb_csv_map(const struct sb_csv *csv, const char *name, int *col_index,
               struct sb_error *err);

/*
 * Read the next row into *row.  Returns 1 when a row was read (check
 * row->reason: a bad row is still a row), 0 at the end of the file, or a
 * negative status (-SB_EIO on a read failure) with err filled.  Never
 * allocates.  A row longer than the buffer is returned once with reason
 * SB_CSV_TOO_LONG and skipped up to its end, however long it is.
 */
int sb_csv_next(struct sb_csv *csv, struct sb_csv_row *row,
                struct sb_error *err);

/*
 * Parse field k (0-based column index, e.g. from sb_csv_map) of row as a
 * number with the file's decimal mark (blanks around it allowed) and store
 * it in *out.  Returns SB_CSV_OK, the row's own reason if the row is bad,
 * SB_CSV_NO_FIELD if k is not a header column, or the field's reason
 * (SB_CSV_EMPTY_FIELD, SB_CSV_NOT_NUMBER, SB_CSV_DECIMAL_MARK,
 * SB_CSV_NONFINITE).  The value is correctly rounded (see decimal.h);
 * *out is untouched on failure.
 */
int sb_csv_field_double(const struct sb_csv *csv, const struct sb_csv_row *row,
                        int k, double *out);

/*
 * Parse the n columns cols[0..n-1] of row as numbers into out[0..n-1], as
 * sb_csv_field_double does for one, stopping at the first that fails.
 * Returns SB_CSV_OK when all n are numbers; otherwise the reason, with
 * *bad (if bad is not NULL) set to the position i in cols of the failing
 * column, or to -1 when the row itself is bad (row->reason).  out[j] for
 * j >= the failing position is unspecified.  The per-row form of the hot
 * loop: one call instead of n.
 */
int sb_csv_fields_double(const struct sb_csv *csv, const struct sb_csv_row *row,
                         const int *cols, int n, double *out, int *bad);

/*
 * The text of field k with surrounding blanks removed (e.g. a survey line
 * name), as a view valid until the next sb_csv_next: *text and *len.
 * Returns SB_CSV_OK, the row's reason if the row is bad, or
 * SB_CSV_NO_FIELD.  An empty text is allowed (len 0).
 */
int sb_csv_field_text(const struct sb_csv *csv, const struct sb_csv_row *row,
                      int k, const char **text, size_t *len);

/*
 * Describe a bad row (k < 0: the row's own reason) or a bad field k in err
 * as "FILE:LINE:COL: what is wrong (what was expected)", naming the column
 * and quoting (a cut, printable form of) the field text.  Returns
 * SB_EINPUT, so that a caller can `return sb_csv_row_error(...)`.
 */
int sb_csv_row_error(const struct sb_csv *csv, const struct sb_csv_row *row,
                     int k, int reason, struct sb_error *err);

/*
 * Where field k (0-based) of the current row starts: *line and *col
 * (1-based; for a quoted field, its opening quote).  Returns SB_CSV_OK, or
 * SB_CSV_NO_FIELD when the row has no field k among those kept (the first
 * header-count + 1).  Only for the row last returned by sb_csv_next.
 */
int sb_csv_field_pos(const struct sb_csv *csv, const struct sb_csv_row *row,
                     int k, long *line, int *col);

/* A short constant description of a reason ("unparsable number", ...),
 * for tallies. */
const char *sb_csv_reason_text(int reason);

/* Line where the last row returned by sb_csv_next starts (after open: the
 * header's line; 0 before any). */
long sb_csv_line(const struct sb_csv *csv);

/* Number of columns in the header, and the name of column k (0-based;
 * NULL when out of range). */
int sb_csv_ncols(const struct sb_csv *csv);
const char *sb_csv_column_name(const struct sb_csv *csv, int k);

/* The delimiter (' ' for whitespace) and decimal mark in use, given or
 * detected. */
char sb_csv_delimiter(const struct sb_csv *csv);
char sb_csv_decimal_mark(const struct sb_csv *csv);

/* The file name used in messages. */
const char *sb_csv_path(const struct sb_csv *csv);

#ifdef __cplusplus
}
#endif

#endif
