/*
 * Streaming reader of delimited sounding files (see
 * include/swathbudget/csvread.h and docs/csv.md).
 *
 * One fixed buffer of `cap` bytes holds a window of the file.  A row is found
 * by looking for its terminating line feed; when the window ends first, the
 * unread tail is moved to the front and the rest of the buffer is filled with
 * read(2).  A row that fills the whole buffer without ending is reported as
 * too long and skipped up to its end with the same buffer, so memory never
 * depends on the file.  Fields are views into the buffer; quoted fields are
 * unquoted in place (the unquoted text is never longer).
 *
 * The hot path (a delimited row without '"', wholly in the buffer) finds the
 * delimiters and the line feed 16 bytes at a time with SSE2 (fast_row).  The
 * general path finds the row's end with memchr (vectorised by the C
 * library) and splits it byte by byte; rows holding a quote go through a
 * small state machine that follows RFC 4180 (Shafranovich 2005, section 2):
 * a '"' opens a quoted field only at the start of a field, '""' inside
 * stands for '"'.  Both paths give the same rows (the tests run the reader
 * with and without SSE2).
 */
#include "swathbudget/csvread.h"

#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#if defined(__SSE2__) && defined(__GNUC__)
#include <emmintrin.h>
#define SB_CSV_SSE2 1
#else
#define SB_CSV_SSE2 0
#endif

/* Rows looked at to detect the decimal mark. */
#define DETECT_ROWS 100
/* Field text quoted in messages is cut to this many bytes. */
#define QUOTE_MAX 32

/* Where the search for the end of the current row stands.  Offsets are
 * absolute indices into buf; they move with the data on a refill. */
struct row_scan {
    size_t off;  /* first byte not yet examined */
    int slow;    /* the row holds a '"': the state machine is in charge */
    int inq;     /* inside a quoted field */
    int fstart;  /* the next byte would start a field */
    long nls;    /* line feeds inside quoted fields so far */
};

/* Position of a field of a quoted row (plain rows derive it). */
struct field_pos {
    long line;
    int col;
};

struct sb_csv {
    int fd;
    int own_fd;
    int eof;
    char *buf;
    size_t cap;
    size_t pos; /* start of the unread data (the current row) */
    size_t end; /* end of valid data */
    struct row_scan scan;
    long next_line;   /* line number at buf[pos] */
    long last_line;   /* line of the last row handed out */
    long header_line;
    long row_end_line; /* where the last split row ends (for messages) */
    int row_end_col;
    char delim;       /* ' ' means whitespace-delimited */
    char mark;
    int ws;
    int ncols;
    char **names;     /* ncols NUL-terminated header names */
    char *name_block;
    struct sb_csv_field *fields; /* ncols + 1 slots (one to place an extra
                                    field of a ragged row) */
    struct field_pos *fpos;      /* as many; filled for quoted rows only */
    int fcap;
    /* The current row, to place its fields: a row without quotes lies on
     * one line and a field's column is its offset from row_start. */
    const char *row_start;
    long row_line;
    int row_quoted;
    char path[SB_ERROR_FILE_MAX];
};

static int is_blank(char c)
{
    return c == ' ' || c == '\t';
}

static int clamp_int(long long v)
{
    return v > INT_MAX ? INT_MAX : (int)v;
}

/* ---------------------------------------------------------------- input */

/* Move the unread data [pos, end) to the front and read once into the free
 * space.  Returns SB_OK (eof set when read gave 0) or SB_EIO. */
static int refill(struct sb_csv *c, struct sb_error *err)
{
    ssize_t n;

    if (c->pos > 0) {
        size_t keep = c->end - c->pos;
        memmove(c->buf, c->buf + c->pos, keep);
        c->scan.off -= c->pos;
        c->pos = 0;
        c->end = keep;
    }
    if (c->end == c->cap || c->eof)
        return SB_OK;
    do
        n = read(c->fd, c->buf + c->end, c->cap - c->end);
    while (n < 0 && errno == EINTR);
    if (n < 0)
        return sb_error_set(err, SB_EIO, c->path, 0, 0,
                            "cannot read: %s (expected a readable file)",
                            strerror(errno));
    if (n == 0)
        c->eof = 1;
    c->end += (size_t)n;
    return SB_OK;
}

/* ---------------------------------------------------------- row finding */

static void scan_reset(struct sb_csv *c)
{
    c->scan.off = c->pos;
    c->scan.slow = 0;
    c->scan.inq = 0;
    c->scan.fstart = 1;
    c->scan.nls = 0;
}

/* Would a '"' at index i (not inside quotes) open a quoted field?  Look back
 * over blanks to the delimiter or to `floor`, where the state was
 * `floor_fstart`. */
static int field_start_before(const struct sb_csv *c, size_t floor,
                              int floor_fstart, size_t i)
{
    while (i > floor) {
        char ch = c->buf[i - 1];
        if (ch == c->delim)
            return 1;
        if (!is_blank(ch))
            return 0;
        if (c->ws)
            return 1;
        i--;
    }
    return floor_fstart;
}

/* RFC 4180 state machine over [scan.off, end).  Returns 1 with *nl the
 * index of the line feed ending the row, or 0 when more data is needed
 * (scan.off then says where to resume). */
static int scan_quoted(struct sb_csv *c, size_t *nl)
{
    struct row_scan *s = &c->scan;
    const char *b = c->buf;
    size_t i;

    for (i = s->off; i < c->end; i++) {
        char ch = b[i];
        if (s->inq) {
            if (ch == '"') {
                if (i + 1 >= c->end)
                    break; /* '"' or '""'? decided by the next byte */
                if (b[i + 1] == '"') {
                    i++;
                    continue;
                }
                s->inq = 0;
                s->fstart = 0;
            } else if (ch == '\n') {
                s->nls++;
            }
            continue;
        }
        if (ch == '\n') {
            s->off = i;
            *nl = i;
            return 1;
        }
        if (ch == '"' && s->fstart) {
            s->inq = 1;
            s->fstart = 0;
        } else if (ch == c->delim || (c->ws && is_blank(ch))) {
            s->fstart = 1;
        } else if (!is_blank(ch)) {
            s->fstart = 0;
        }
    }
    s->off = i;
    return 0;
}

/* Find the end of the row starting at pos within the data at hand.  `floor`
 * is the lowest index of the row still in the buffer (pos, or 0 while a too
 * long row is being skipped) and floor_fstart the field-start state there. */
static int find_row_end(struct sb_csv *c, size_t floor, int floor_fstart,
                        size_t *nl)
{
    struct row_scan *s = &c->scan;

    if (!s->slow) {
        const char *b = c->buf;
        const char *lf = memchr(b + s->off, '\n', c->end - s->off);
        size_t lim = lf ? (size_t)(lf - b) : c->end;
        const char *q = memchr(b + s->off, '"', lim - s->off);

        if (!q) {
            if (lf) {
                *nl = lim;
                return 1;
            }
            s->off = c->end;
            return 0;
        }
        /* First quote of the row: hand over to the state machine at the
         * quote, with the field-start state found by looking back. */
        s->slow = 1;
        s->inq = 0;
        s->off = (size_t)(q - b);
        s->fstart = field_start_before(c, floor, floor_fstart, s->off);
    }
    return scan_quoted(c, nl);
}

/* ------------------------------------------------------------ splitting */

static void put_field(struct sb_csv *c, int n, const char *text, size_t len)
{
    if (n < c->fcap) {
        c->fields[n].text = text;
        c->fields[n].len = len;
    }
}

/* A field of a quoted row, with its position. */
static void put_field_at(struct sb_csv *c, int n, const char *text,
                         size_t len, long line, const char *line_start,
                         const char *at)
{
    if (n < c->fcap) {
        c->fields[n].text = text;
        c->fields[n].len = len;
        c->fpos[n].line = line;
        c->fpos[n].col = clamp_int((long long)(at - line_start) + 1);
    }
}

/* Line and column where field k (< min(nfields, fcap)) of the current row
 * starts. */
static void field_pos(const struct sb_csv *c, int k, long *line, int *col)
{
    if (c->row_quoted) {
        *line = c->fpos[k].line;
        *col = c->fpos[k].col;
    } else {
        *line = c->row_line;
        *col = clamp_int((long long)(c->fields[k].text - c->row_start) + 1);
    }
}

/* Split the row [s, e) (line feed and a CR before it excluded) that starts
 * on line `line` and holds no '"', into c->fields.  Returns the number of
 * fields. */
static int split_plain(struct sb_csv *c, char *s, char *e, long line)
{
    const char d = c->delim;
    char *p = s;
    int n = 0;

    c->row_start = s;
    c->row_line = line;
    c->row_quoted = 0;
    c->row_end_line = line;
    c->row_end_col = clamp_int((long long)(e - s) + 1);
    if (c->ws) {
        for (;;) {
            char *f;
            while (p < e && is_blank(*p))
                p++;
            if (p == e)
                return n;
            f = p;
            while (p < e && !is_blank(*p))
                p++;
            put_field(c, n++, f, (size_t)(p - f));
        }
    }
    for (;;) {
        char *f = p;
        while (p < e && *p != d)
            p++;
        put_field(c, n++, f, (size_t)(p - f));
        if (p == e)
            return n;
        p++;
    }
}

/* Note where a quoted row ends, for the message of a short row. */
static int quoted_end(struct sb_csv *c, int n, long ln, const char *ls,
                      const char *e)
{
    c->row_end_line = ln;
    c->row_end_col = clamp_int((long long)(e - ls) + 1);
    return n;
}

/* Split a row that holds quotes (RFC 4180), unquoting in place.  On broken
 * quoting sets row->reason and its position and stops. */
static int split_quoted(struct sb_csv *c, char *s, char *e, long line,
                        struct sb_csv_row *row)
{
    const char d = c->delim;
    char *p = s, *ls = s;
    long ln = line;
    int n = 0;

    c->row_start = s;
    c->row_line = line;
    c->row_quoted = 1;

    for (;;) {
        char *q = p;
        if (c->ws) {
            while (p < e && is_blank(*p))
                p++;
            if (p == e)
                return quoted_end(c, n, ln, ls, e);
            q = p;
        } else {
            while (q < e && is_blank(*q) && *q != d) /* tab may be d */
                q++;
        }
        if (q < e && *q == '"') {
            char *w = q, *r = q + 1;
            long fline = ln;
            const char *fls = ls;
            int closed = 0;

            while (r < e) {
                if (*r == '"') {
                    if (r + 1 < e && r[1] == '"') {
                        *w++ = '"';
                        r += 2;
                        continue;
                    }
                    r++;
                    closed = 1;
                    break;
                }
                if (*r == '\n') {
                    ln++;
                    ls = r + 1;
                }
                *w++ = *r++;
            }
            put_field_at(c, n++, q, (size_t)(w - q), fline, fls, q);
            if (!closed) {
                row->reason = SB_CSV_BAD_QUOTE;
                row->reason_line = fline;
                row->reason_col = clamp_int((long long)(q - fls) + 1);
                return quoted_end(c, n, ln, ls, e);
            }
            if (!c->ws)
                while (r < e && is_blank(*r) && *r != d)
                    r++;
            if (r < e && *r != d && !(c->ws && is_blank(*r))) {
                row->reason = SB_CSV_BAD_QUOTE;
                row->reason_line = ln;
                row->reason_col = clamp_int((long long)(r - ls) + 1);
                return quoted_end(c, n, ln, ls, e);
            }
            p = r;
        } else {
            char *f = p;
            if (c->ws)
                while (p < e && !is_blank(*p))
                    p++;
            else
                while (p < e && *p != d)
                    p++;
            put_field_at(c, n++, f, (size_t)(p - f), ln, ls, f);
        }
        if (p == e)
            return quoted_end(c, n, ln, ls, e);
        if (!c->ws)
            p++; /* past the delimiter; a final one leaves an empty field */
    }
}

/* Is [s, e) a blank line (nothing, or only spaces and tabs)?  Used for
 * the header, before the delimiter is known. */
static int is_blank_row(const char *s, const char *e)
{
    while (s < e && is_blank(*s))
        s++;
    return s == e;
}

/* Is the data row [s, e) blank?  As above, except that a tab is a field
 * separator, not a blank, in a tab-delimited file: a line of tabs there is
 * a row of empty fields (reported), as a line of commas is elsewhere. */
static int is_empty_row(const struct sb_csv *c, const char *s, const char *e)
{
    while (s < e && is_blank(*s) && (c->ws || *s != c->delim))
        s++;
    return s == e;
}

/* Skip the rest of a row too long for the buffer.  The whole buffer holds
 * its beginning (pos 0, end cap); scan state says how far it is examined. */
static int skip_long_row(struct sb_csv *c, struct sb_error *err)
{
    const long start = c->next_line;
    size_t nl;
    int rc;

    for (;;) {
        /* Keep only what the scanner has not examined (at most one '"'),
         * remembering whether a field starts there. */
        size_t keep_from = c->scan.off;
        int fs = c->scan.slow ? c->scan.fstart
                              : field_start_before(c, 0, c->scan.fstart,
                                                   keep_from);
        c->scan.fstart = fs;
        memmove(c->buf, c->buf + keep_from, c->end - keep_from);
        c->end -= keep_from;
        c->pos = 0;
        c->scan.off = 0;
        if (c->eof) {
            c->pos = c->end;
            c->next_line = start + 1 + c->scan.nls;
            return SB_OK;
        }
        rc = refill(c, err);
        if (rc != SB_OK)
            return rc;
        if (find_row_end(c, 0, fs, &nl)) {
            c->pos = nl + 1;
            c->next_line = start + 1 + c->scan.nls;
            return SB_OK;
        }
    }
}

/* Common end of a split row: the ragged check, line bookkeeping, and the
 * move to the next row (at index next).  Returns 1 (a row). */
static inline int finish_row(struct sb_csv *c, struct sb_csv_row *row,
                             size_t next)
{
    if (row->reason == SB_CSV_OK && row->nfields != c->ncols) {
        row->reason = SB_CSV_RAGGED;
        if (row->nfields > c->ncols) { /* at the first extra field */
            field_pos(c, c->ncols, &row->reason_line, &row->reason_col);
        } else { /* just past the end of the row */
            row->reason_line = c->row_end_line;
            row->reason_col = c->row_end_col;
        }
    }
    c->last_line = row->line;
    c->next_line += 1 + c->scan.nls;
    c->pos = next;
    scan_reset(c);
    return 1;
}

#if SB_CSV_SSE2
/* The hot path for a delimited row without quotes, 16 bytes per step:
 * one compare each for the delimiter, the line feed and '"' gives a bit
 * mask of the bytes that matter, walked with count-trailing-zeros (the
 * idea of structural-character masks as in simdjson, Langdale & Lemire,
 * "Parsing gigabytes of JSON per second", 2019).  Returns 1 with the row
 * split, 2 when it skipped a blank line, 0 when the general path must take
 * over (a '"' in the row, or no line feed in the data at hand).  Loads may
 * read up to 15 bytes past the data: the buffer has slack for that. */
static int fast_row(struct sb_csv *c, struct sb_csv_row *row)
{
    char *const s = c->buf + c->pos;
    const char *const endp = c->buf + c->end;
    const char d = c->delim;
    const __m128i vd = _mm_set1_epi8(d);
    const __m128i vn = _mm_set1_epi8('\n');
    const __m128i vq = _mm_set1_epi8('"');
    const long line = c->next_line;
    char *p = s, *f = s;
    int n = 0;

    for (; p < endp; p += 16) {
        __m128i v = _mm_loadu_si128((const __m128i *)(const void *)p);
        unsigned m = (unsigned)_mm_movemask_epi8(
            _mm_or_si128(_mm_or_si128(_mm_cmpeq_epi8(v, vd),
                                      _mm_cmpeq_epi8(v, vn)),
                         _mm_cmpeq_epi8(v, vq)));
        if (endp - p < 16)
            m &= (1u << (endp - p)) - 1u;
        while (m) {
            char *q = p + __builtin_ctz(m);
            if (*q == d) {
                put_field(c, n++, f, (size_t)(q - f));
                f = q + 1;
            } else if (*q == '\n') {
                char *e = q;
                if (e > s && e[-1] == '\r')
                    e--;
                if (is_empty_row(c, s, e)) {
                    c->next_line++;
                    c->pos = (size_t)(q + 1 - c->buf);
                    scan_reset(c);
                    return 2;
                }
                put_field(c, n++, f, (size_t)(e - f));
                c->row_start = s;
                c->row_line = line;
                c->row_quoted = 0;
                c->row_end_line = line;
                c->row_end_col = clamp_int((long long)(e - s) + 1);
                row->line = line;
                row->reason = SB_CSV_OK;
                row->reason_line = 0;
                row->reason_col = 0;
                row->nfields = n;
                row->field = c->fields;
                return finish_row(c, row, (size_t)(q + 1 - c->buf));
            } else {
                return 0; /* a quote: RFC 4180 rules apply */
            }
            m &= m - 1;
        }
    }
    return 0;
}
#endif

int sb_csv_next(struct sb_csv *c, struct sb_csv_row *row,
                struct sb_error *err)
{
    size_t nl, next;
    int rc;

    for (;;) {
        char *s, *e;

        if (c->pos == c->end) {
            if (c->eof)
                return 0;
            scan_reset(c);
            rc = refill(c, err);
            if (rc != SB_OK)
                return -rc;
            continue;
        }
#if SB_CSV_SSE2
        if (!c->ws && !c->scan.slow && c->scan.off == c->pos) {
            int r = fast_row(c, row);
            if (r == 1)
                return 1;
            if (r == 2)
                continue;
        }
#endif
        if (find_row_end(c, c->pos, 1, &nl)) {
            next = nl + 1;
        } else if (!c->eof) {
            if (c->pos == 0 && c->end == c->cap) { /* does not fit */
                row->line = c->next_line;
                row->reason = SB_CSV_TOO_LONG;
                row->reason_line = c->next_line;
                row->reason_col = 1;
                row->nfields = 0;
                row->field = c->fields;
                c->last_line = row->line;
                rc = skip_long_row(c, err);
                scan_reset(c);
                if (rc != SB_OK)
                    return -rc;
                return 1;
            }
            rc = refill(c, err);
            if (rc != SB_OK)
                return -rc;
            continue;
        } else {
            nl = c->end; /* last row, no final line feed */
            next = c->end;
        }

        s = c->buf + c->pos;
        e = c->buf + nl;
        if (e > s && e[-1] == '\r')
            e--;
        row->line = c->next_line;
        if (is_empty_row(c, s, e)) {
            c->next_line += 1 + c->scan.nls;
            c->pos = next;
            scan_reset(c);
            continue;
        }
        row->reason = SB_CSV_OK;
        row->reason_line = 0;
        row->reason_col = 0;
        row->field = c->fields;
        if (c->scan.slow)
            row->nfields = split_quoted(c, s, e, row->line, row);
        else
            row->nfields = split_plain(c, s, e, row->line);
        return finish_row(c, row, next);
    }
}

/* ------------------------------------------------------- header, detect */

/* End of the header row: the first line feed outside quotes, by quote
 * parity (the delimiter is not known yet).  Counts quoted line feeds. */
static int header_end(const struct sb_csv *c, size_t *nl, long *nls)
{
    int inq = 0;
    size_t i;

    *nls = 0;
    for (i = c->pos; i < c->end; i++) {
        char ch = c->buf[i];
        if (ch == '"')
            inq = !inq;
        else if (ch == '\n') {
            if (!inq) {
                *nl = i;
                return 1;
            }
            (*nls)++;
        }
    }
    return 0;
}

/* Delimiter rule (docs/csv.md): among tab, ';' and ',' the one found most
 * often outside quotes in the header wins, ties in that order; ',' is not
 * a candidate when ',' is the given decimal mark.  With none of them, a
 * header of several blank-separated names is whitespace-delimited;
 * otherwise the file has one column. */
static char detect_delimiter(const char *s, const char *e, char mark)
{
    static const char cand[3] = {'\t', ';', ','};
    long count[3] = {0, 0, 0};
    int inq = 0, best = -1, k, tokens = 0, in_tok = 0;
    const char *p;

    for (p = s; p < e; p++) {
        if (*p == '"')
            inq = !inq;
        if (inq)
            continue;
        for (k = 0; k < 3; k++)
            if (*p == cand[k])
                count[k]++;
    }
    if (mark == ',')
        count[2] = 0;
    for (k = 0; k < 3; k++)
        if (count[k] > 0 && (best < 0 || count[k] > count[best]))
            best = k;
    if (best >= 0)
        return cand[best];
    for (p = s; p < e; p++) {
        if (is_blank(*p))
            in_tok = 0;
        else if (!in_tok) {
            in_tok = 1;
            tokens++;
        }
    }
    if (tokens >= 2)
        return ' ';
    return mark == ',' ? ';' : ',';
}

/* Which mark does the text [a, b) use if it is a number with exactly one
 * '.' or ',' between digits ([sign] digits mark digits [exponent])?  0 if
 * it is not such a number. */
static char number_mark(const char *a, const char *b)
{
    char m;

    while (a < b && (is_blank(*a) || *a == '"'))
        a++;
    while (b > a && (is_blank(b[-1]) || b[-1] == '"' || b[-1] == '\r'))
        b--;
    if (a < b && (*a == '+' || *a == '-'))
        a++;
    if (a == b || (unsigned)(*a - '0') > 9u)
        return 0;
    while (a < b && (unsigned)(*a - '0') <= 9u)
        a++;
    if (a == b || (*a != '.' && *a != ','))
        return 0;
    m = *a++;
    if (a == b || (unsigned)(*a - '0') > 9u)
        return 0;
    while (a < b && (unsigned)(*a - '0') <= 9u)
        a++;
    if (a < b && (*a == 'e' || *a == 'E')) {
        a++;
        if (a < b && (*a == '+' || *a == '-'))
            a++;
        if (a == b || (unsigned)(*a - '0') > 9u)
            return 0;
        while (a < b && (unsigned)(*a - '0') <= 9u)
            a++;
    }
    return a == b ? m : 0;
}

/* Decimal-mark rule (docs/csv.md): ',' delimiter -> '.'; otherwise count
 * the numbers written with '.' and with ',' in the first DETECT_ROWS
 * non-blank rows after the header (as far as the buffer holds them):
 * ',' only if strictly more numbers use it, else '.'. */
static char detect_mark(const struct sb_csv *c)
{
    const char *p = c->buf + c->pos, *end = c->buf + c->end;
    long dots = 0, commas = 0;
    int rows = 0;

    if (c->delim == ',')
        return '.';
    while (p < end && rows < DETECT_ROWS) {
        const char *lf = memchr(p, '\n', (size_t)(end - p));
        const char *le = lf ? lf : end;
        const char *f = p, *q;

        if (!is_blank_row(p, le))
            rows++;
        for (q = p; q <= le; q++) {
            if (q == le || (c->ws ? is_blank(*q) : *q == c->delim)) {
                char m = number_mark(f, q);
                dots += m == '.';
                commas += m == ',';
                f = q + 1;
            }
        }
        p = le + 1;
    }
    return commas > dots ? ',' : '.';
}

/* Read and split the header row; sets ncols, names, fields. */
static int read_header(struct sb_csv *c, struct sb_error *err)
{
    size_t nl, next, ub;
    long nls;
    char *s, *e, *copy, *w;
    const char *p;
    struct sb_csv_row row;
    int rc, n, k, j;

    for (;;) {
        if (c->pos == c->end && c->eof)
            return sb_error_set(err, SB_EINPUT, c->path, 1, 1,
                                "empty file (expected a header row naming "
                                "the columns)");
        if (header_end(c, &nl, &nls)) {
            next = nl + 1;
        } else if (!c->eof) {
            if (c->pos == 0 && c->end == c->cap)
                return sb_error_set(
                    err, SB_EINPUT, c->path, clamp_int(c->next_line), 1,
                    "header row longer than the %zu-byte read buffer "
                    "(expected a header row shorter than that)",
                    c->cap);
            rc = refill(c, err);
            if (rc != SB_OK)
                return rc;
            continue;
        } else {
            nl = next = c->end;
        }
        s = c->buf + c->pos;
        e = c->buf + nl;
        if (e > s && e[-1] == '\r')
            e--;
        if (!is_blank_row(s, e))
            break;
        c->next_line += 1 + nls;
        c->pos = next;
    }

    if (!c->delim)
        c->delim = detect_delimiter(s, e, c->mark);
    c->ws = c->delim == ' ';
    c->header_line = c->last_line = c->next_line;

    /* Split a copy (unquoting works in place); the number of fields is at
     * most one more than the number of delimiter (or blank) bytes. */
    ub = 1;
    for (p = s; p < e; p++)
        ub += c->ws ? is_blank(*p) : *p == c->delim;
    if (ub > (size_t)INT_MAX - 1)
        return sb_error_set(err, SB_EINPUT, c->path,
                            clamp_int(c->header_line), 1,
                            "too many columns in the header (expected "
                            "fewer than %d)", INT_MAX - 1);
    copy = malloc((size_t)(e - s) + 1);
    c->fields = malloc(ub * sizeof *c->fields);
    c->fpos = malloc(ub * sizeof *c->fpos);
    if (!copy || !c->fields || !c->fpos) {
        free(copy);
        return sb_error_set(err, SB_ENOMEM, c->path, 0, 0,
                            "out of memory reading the header");
    }
    memcpy(copy, s, (size_t)(e - s));
    c->fcap = (int)ub;
    memset(&row, 0, sizeof row);
    if (memchr(copy, '"', (size_t)(e - s)))
        n = split_quoted(c, copy, copy + (e - s), c->header_line, &row);
    else
        n = split_plain(c, copy, copy + (e - s), c->header_line);
    if (row.reason != SB_CSV_OK) {
        free(copy);
        return sb_error_set(err, SB_EINPUT, c->path,
                            clamp_int(row.reason_line), row.reason_col,
                            "broken quoting in the header row (expected a "
                            "closing '\"' followed by the delimiter or the "
                            "end of the row)");
    }

    c->ncols = n;
    c->names = malloc((size_t)n * sizeof *c->names);
    c->name_block = malloc((size_t)(e - s) + (size_t)n + 1);
    if (!c->names || !c->name_block) {
        free(copy);
        return sb_error_set(err, SB_ENOMEM, c->path, 0, 0,
                            "out of memory reading the header");
    }
    w = c->name_block;
    for (k = 0; k < n; k++) {
        const char *a = c->fields[k].text, *b = a + c->fields[k].len;
        while (a < b && is_blank(*a))
            a++;
        while (b > a && is_blank(b[-1]))
            b--;
        c->names[k] = w;
        memcpy(w, a, (size_t)(b - a));
        w += b - a;
        *w++ = '\0';
    }
    for (k = 1; k < n; k++) {
        if (!c->names[k][0])
            continue;
        for (j = 0; j < k; j++)
            if (strcmp(c->names[j], c->names[k]) == 0) {
                long lk, lj;
                int ck, cj;
                field_pos(c, k, &lk, &ck);
                field_pos(c, j, &lj, &cj);
                rc = sb_error_set(
                    err, SB_EINPUT, c->path, clamp_int(lk), ck,
                    "column name '%.64s' appears twice in the header, "
                    "also at column %d (expected distinct column names)",
                    c->names[k], cj);
                free(copy);
                return rc;
            }
    }
    free(copy);

    /* From here on: one slot per column plus one for a ragged row's first
     * extra field. */
    {
        struct sb_csv_field *f =
            realloc(c->fields, ((size_t)n + 1) * sizeof *c->fields);
        struct field_pos *fp;
        if (f)
            c->fields = f;
        fp = realloc(c->fpos, ((size_t)n + 1) * sizeof *c->fpos);
        if (fp)
            c->fpos = fp;
        if (!f || !fp)
            return sb_error_set(err, SB_ENOMEM, c->path, 0, 0,
                                "out of memory reading the header");
        c->fcap = n + 1;
    }
    c->next_line += 1 + nls;
    c->pos = next;
    scan_reset(c);
    return SB_OK;
}

/* --------------------------------------------------------- open, close */

int sb_csv_open(const char *path, const struct sb_csv_options *opt,
                struct sb_csv **out, struct sb_error *err)
{
    struct sb_csv_options o = {0, 0, 0};
    struct sb_csv *c;
    int rc;

    *out = NULL;
    if (opt)
        o = *opt;
    if (o.delimiter && o.delimiter != ',' && o.delimiter != ';' &&
        o.delimiter != '\t' && o.delimiter != ' ')
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "unknown delimiter '%c' (expected ',', ';', tab "
                            "or space)", o.delimiter);
    if (o.decimal_mark && o.decimal_mark != '.' && o.decimal_mark != ',')
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "unknown decimal mark '%c' (expected '.' or ',')",
                            o.decimal_mark);
    if (o.delimiter == ',' && o.decimal_mark == ',')
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "',' given as both delimiter and decimal mark "
                            "(expected different characters)");
    if (!path)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "no file name (expected a path or '-')");
    if (o.buffer_size > SB_CSV_BUFFER_MAX)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "read buffer of %zu bytes (expected at most %zu)",
                            o.buffer_size, (size_t)SB_CSV_BUFFER_MAX);

    c = calloc(1, sizeof *c);
    if (!c)
        return sb_error_set(err, SB_ENOMEM, path, 0, 0, "out of memory");
    c->fd = -1;
    c->cap = o.buffer_size ? o.buffer_size : SB_CSV_BUFFER_DEFAULT;
    if (c->cap < SB_CSV_BUFFER_MIN)
        c->cap = SB_CSV_BUFFER_MIN;
    c->delim = o.delimiter;
    c->mark = o.decimal_mark;
    c->next_line = 1;
    snprintf(c->path, sizeof c->path, "%s",
             strcmp(path, "-") == 0 ? "<stdin>" : path);

    /* Slack after the data for 16-byte loads and the padded decimal
     * parser; zeroed so that it is never uninitialised memory. */
    c->buf = calloc(1, c->cap + SB_DECIMAL_PAD);
    if (!c->buf) {
        sb_csv_close(c);
        return sb_error_set(err, SB_ENOMEM, path, 0, 0,
                            "out of memory for a %zu-byte read buffer",
                            o.buffer_size);
    }
    if (strcmp(path, "-") == 0) {
        c->fd = 0;
    } else {
        c->fd = open(path, O_RDONLY);
        if (c->fd < 0) {
            rc = sb_error_set(err, SB_EIO, path, 0, 0,
                              "cannot open: %s (expected a readable file)",
                              strerror(errno));
            sb_csv_close(c);
            return rc;
        }
        c->own_fd = 1;
#ifdef POSIX_FADV_SEQUENTIAL
        (void)posix_fadvise(c->fd, 0, 0, POSIX_FADV_SEQUENTIAL);
#endif
    }

    /* Fill the buffer (a pipe may deliver it in pieces) so that detection
     * sees as many rows as fit. */
    while (!c->eof && c->end < c->cap) {
        rc = refill(c, err);
        if (rc != SB_OK) {
            sb_csv_close(c);
            return rc;
        }
    }
    if (c->end >= 3 && (unsigned char)c->buf[0] == 0xEF &&
        (unsigned char)c->buf[1] == 0xBB && (unsigned char)c->buf[2] == 0xBF)
        c->pos = 3; /* UTF-8 byte order mark */

    rc = read_header(c, err);
    if (rc != SB_OK) {
        sb_csv_close(c);
        return rc;
    }
    if (!c->mark)
        c->mark = detect_mark(c);
    *out = c;
    return SB_OK;
}

void sb_csv_close(struct sb_csv *c)
{
    if (!c)
        return;
    if (c->own_fd && c->fd >= 0)
        close(c->fd);
    free(c->buf);
    free(c->fields);
    free(c->fpos);
    free(c->names);
    free(c->name_block);
    free(c);
}

/* ------------------------------------------------------------ columns */

int sb_csv_map(const struct sb_csv *c, const char *name, int *col_index,
               struct sb_error *err)
{
    char list[256];
    size_t used = 0;
    int k;

    for (k = 0; k < c->ncols; k++)
        if (strcmp(c->names[k], name) == 0) {
            *col_index = k;
            return SB_OK;
        }
    list[0] = '\0';
    for (k = 0; k < c->ncols && used < sizeof list; k++) {
        int w = snprintf(list + used, sizeof list - used, "%s'%s'",
                         k ? ", " : "", c->names[k]);
        if (w < 0)
            break;
        used += (size_t)w;
    }
    if (used >= sizeof list)
        memcpy(list + sizeof list - 4, "...", 4);
    return sb_error_set(err, SB_EINPUT, c->path, clamp_int(c->header_line), 1,
                        "no column named '%.64s' in the header (expected "
                        "one of %s)", name, list);
}

int sb_csv_ncols(const struct sb_csv *c)
{
    return c->ncols;
}

const char *sb_csv_column_name(const struct sb_csv *c, int k)
{
    return k >= 0 && k < c->ncols ? c->names[k] : NULL;
}

char sb_csv_delimiter(const struct sb_csv *c)
{
    return c->delim;
}

char sb_csv_decimal_mark(const struct sb_csv *c)
{
    return c->mark;
}

const char *sb_csv_path(const struct sb_csv *c)
{
    return c->path;
}

long sb_csv_line(const struct sb_csv *c)
{
    return c->last_line;
}

/* ------------------------------------------------------------- fields */

int sb_csv_field_double(const struct sb_csv *c, const struct sb_csv_row *row,
                        int k, double *out)
{
    const struct sb_csv_field *f;

    if (row->reason != SB_CSV_OK)
        return row->reason;
    if (k < 0 || k >= c->ncols)
        return SB_CSV_NO_FIELD;
    f = &row->field[k];
    return sb_decimal_parse_padded(f->text, f->len, c->mark, out);
}

int sb_csv_fields_double(const struct sb_csv *c, const struct sb_csv_row *row,
                         const int *cols, int n, double *out, int *bad)
{
    int i, r;

    if (row->reason != SB_CSV_OK) {
        if (bad)
            *bad = -1;
        return row->reason;
    }
    for (i = 0; i < n; i++) {
        const struct sb_csv_field *f;
        if (cols[i] < 0 || cols[i] >= c->ncols) {
            r = SB_CSV_NO_FIELD;
        } else {
            f = &row->field[cols[i]];
            /* the short form inline, no call (the buffer has the pad) */
            if (f->len - 1 < SB_DECIMAL_SHORT_MAX &&
                sb_decimal_parse_short_padded(f->text, f->len, c->mark,
                                              &out[i]))
                continue;
            r = sb_decimal_parse(f->text, f->len, c->mark, &out[i]);
        }
        if (r != SB_CSV_OK) {
            if (bad)
                *bad = i;
            return r;
        }
    }
    return SB_CSV_OK;
}

int sb_csv_field_text(const struct sb_csv *c, const struct sb_csv_row *row,
                      int k, const char **text, size_t *len)
{
    const char *a, *b;

    if (row->reason != SB_CSV_OK)
        return row->reason;
    if (k < 0 || k >= c->ncols)
        return SB_CSV_NO_FIELD;
    a = row->field[k].text;
    b = a + row->field[k].len;
    while (a < b && is_blank(*a))
        a++;
    while (b > a && is_blank(b[-1]))
        b--;
    *text = a;
    *len = (size_t)(b - a);
    return SB_CSV_OK;
}

int sb_csv_field_pos(const struct sb_csv *c, const struct sb_csv_row *row,
                     int k, long *line, int *col)
{
    if (k < 0 || k >= row->nfields || k >= c->fcap)
        return SB_CSV_NO_FIELD;
    field_pos(c, k, line, col);
    return SB_CSV_OK;
}

const char *sb_csv_reason_text(int reason)
{
    switch (reason) {
    case SB_CSV_OK: return "valid";
    case SB_CSV_EMPTY_FIELD: return "empty field";
    case SB_CSV_NOT_NUMBER: return "unparsable number";
    case SB_CSV_DECIMAL_MARK: return "wrong decimal mark";
    case SB_CSV_NONFINITE: return "non-finite number";
    case SB_CSV_RAGGED: return "ragged row";
    case SB_CSV_TOO_LONG: return "row too long";
    case SB_CSV_BAD_QUOTE: return "broken quoting";
    case SB_CSV_NO_FIELD: return "missing column";
    default: return "unknown reason";
    }
}

/* A printable, cut copy of a field's text for a message. */
static void quote_text(char *dst, size_t n, const char *s, size_t len)
{
    size_t i, k = 0;

    for (i = 0; i < len && k + 4 < n && i < QUOTE_MAX; i++) {
        unsigned char ch = (unsigned char)s[i];
        dst[k++] = (ch >= 0x20 && ch < 0x7f) || ch >= 0x80 ? (char)ch : '?';
    }
    if (i < len && k + 4 <= n) {
        memcpy(dst + k, "...", 3);
        k += 3;
    }
    dst[k] = '\0';
}

int sb_csv_row_error(const struct sb_csv *c, const struct sb_csv_row *row,
                     int k, int reason, struct sb_error *err)
{
    char txt[QUOTE_MAX + 8];
    const struct sb_csv_field *f;
    const char *name;
    int line, col;

    if (k < 0 || row->reason != SB_CSV_OK) {
        line = clamp_int(row->reason_line ? row->reason_line : row->line);
        col = row->reason_col > 0 ? row->reason_col : 1;
        switch (row->reason != SB_CSV_OK ? row->reason : reason) {
        case SB_CSV_RAGGED:
            return sb_error_set(err, SB_EINPUT, c->path, line, col,
                                "row has %d fields (expected %d, as in the "
                                "header on line %ld)",
                                row->nfields, c->ncols, c->header_line);
        case SB_CSV_TOO_LONG:
            return sb_error_set(err, SB_EINPUT, c->path, line, col,
                                "row longer than the %zu-byte read buffer, "
                                "skipped (expected rows shorter than that)",
                                c->cap);
        case SB_CSV_BAD_QUOTE:
            return sb_error_set(err, SB_EINPUT, c->path, line, col,
                                "broken quoting (expected a closing '\"' "
                                "followed by the delimiter or the end of the "
                                "row)");
        default:
            return sb_error_set(err, SB_EINPUT, c->path, line, col, "%s",
                                sb_csv_reason_text(reason));
        }
    }
    if (k >= c->ncols || k >= row->nfields)
        return sb_error_set(err, SB_EINPUT, c->path, clamp_int(row->line), 1,
                            "column %d does not exist (expected one of the "
                            "%d columns of the header)",
                            k + 1, c->ncols);
    f = &row->field[k];
    name = c->names[k];
    {
        long l;
        field_pos(c, k, &l, &col);
        line = clamp_int(l);
    }
    quote_text(txt, sizeof txt, f->text, f->len);
    switch (reason) {
    case SB_CSV_EMPTY_FIELD:
        return sb_error_set(err, SB_EINPUT, c->path, line, col,
                            "empty field in column '%.64s' (expected a "
                            "number)", name);
    case SB_CSV_NOT_NUMBER:
        return sb_error_set(err, SB_EINPUT, c->path, line, col,
                            "'%s' in column '%.64s' is not a number "
                            "(expected a decimal number such as -12%c5 or "
                            "1%c5e3)", txt, name, c->mark, c->mark);
    case SB_CSV_DECIMAL_MARK:
        return sb_error_set(err, SB_EINPUT, c->path, line, col,
                            "'%s' in column '%.64s' uses the decimal mark "
                            "'%c' (expected '%c', the mark of this file)",
                            txt, name, c->mark == ',' ? '.' : ',', c->mark);
    case SB_CSV_NONFINITE:
        return sb_error_set(err, SB_EINPUT, c->path, line, col,
                            "'%s' in column '%.64s' is not a finite number "
                            "(expected a finite decimal number)", txt, name);
    default:
        return sb_error_set(err, SB_EINPUT, c->path, line, col,
                            "'%s' in column '%.64s': %s", txt, name,
                            sb_csv_reason_text(reason));
    }
}
