/* Aligned text tables and CSV (see include/swathbudget/writer.h).
 * Cells are kept as formatted strings until the whole table is known, so
 * that columns can be aligned; this is output code, never on a hot path. */
#include "swathbudget/writer.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define CELL_MAX 64

struct sb_table {
    const struct sb_table_col *cols;
    size_t ncols;
    size_t ncells, cap;
    char (*cells)[CELL_MAX];
    unsigned char *numeric; /* right-align numbers, left-align words */
    int status;             /* SB_EINTERNAL once a non-finite number came */
};

struct sb_table *sb_table_alloc(const struct sb_table_col *cols, size_t ncols)
{
    struct sb_table *t = calloc(1, sizeof *t);

    if (!t)
        return NULL;
    t->cols = cols;
    t->ncols = ncols;
    return t;
}

void sb_table_free(struct sb_table *t)
{
    if (!t)
        return;
    free(t->cells);
    free(t->numeric);
    free(t);
}

static char *next_cell(struct sb_table *t, int numeric)
{
    if (t->ncells == t->cap) {
        size_t cap = t->cap ? 2 * t->cap : 256;
        char(*cells)[CELL_MAX] = realloc(t->cells, cap * sizeof *cells);
        unsigned char *num;

        if (!cells)
            return NULL;
        t->cells = cells;
        num = realloc(t->numeric, cap);
        if (!num)
            return NULL;
        t->numeric = num;
        t->cap = cap;
    }
    t->numeric[t->ncells] = (unsigned char)numeric;
    return t->cells[t->ncells++];
}

int sb_table_num(struct sb_table *t, double v)
{
    size_t col = t->ncells % t->ncols;
    char *c = next_cell(t, 1);

    if (!c)
        return SB_ENOMEM;
    if (!isfinite(v)) {
        t->status = SB_EINTERNAL;
        snprintf(c, CELL_MAX, "?");
        return SB_EINTERNAL;
    }
    if (v == 0.0)
        v = 0.0; /* never print "-0.00" */
    snprintf(c, CELL_MAX, "%.*f", t->cols[col].precision, v);
    /* A small negative value rounded to zero would still print "-0.0". */
    if (c[0] == '-' && strspn(c + 1, "0.") == strlen(c + 1))
        memmove(c, c + 1, strlen(c));
    return SB_OK;
}

int sb_table_str(struct sb_table *t, const char *s)
{
    char *c = next_cell(t, 0);

    if (!c)
        return SB_ENOMEM;
    snprintf(c, CELL_MAX, "%s", s ? s : "");
    return SB_OK;
}

int sb_table_empty(struct sb_table *t, const char *placeholder)
{
    char *c = next_cell(t, 1);

    if (!c)
        return SB_ENOMEM;
    snprintf(c, CELL_MAX, "%s", placeholder ? placeholder : "-");
    return SB_OK;
}

static void csv_field(FILE *f, const char *s)
{
    if (strpbrk(s, ",\"\n\r") == NULL) {
        fputs(s, f);
        return;
    }
    fputc('"', f);
    for (; *s; s++) {
        if (*s == '"')
            fputc('"', f);
        fputc(*s, f);
    }
    fputc('"', f);
}

int sb_table_write(const struct sb_table *t, FILE *f, enum sb_format fmt,
                   struct sb_error *err)
{
    size_t nrows, w[64];

    if (t->status != SB_OK)
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "a non-finite number reached the table writer "
                            "(this is a bug; please report it)");
    if (t->ncols == 0 || t->ncols > 64 || t->ncells % t->ncols != 0)
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "table has ragged rows (this is a bug)");
    nrows = t->ncells / t->ncols;

    if (fmt == SB_FORMAT_CSV) {
        for (size_t c = 0; c < t->ncols; c++) {
            if (c)
                fputc(',', f);
            csv_field(f, t->cols[c].key);
        }
        fputc('\n', f);
        for (size_t r = 0; r < nrows; r++) {
            for (size_t c = 0; c < t->ncols; c++) {
                const char *s = t->cells[r * t->ncols + c];
                if (c)
                    fputc(',', f);
                /* CSV readers want an empty field, not a dash, for "none". */
                csv_field(f, strcmp(s, "-") == 0 ? "" : s);
            }
            fputc('\n', f);
        }
    } else {
        for (size_t c = 0; c < t->ncols; c++)
            w[c] = strlen(t->cols[c].title);
        for (size_t i = 0; i < t->ncells; i++) {
            size_t c = i % t->ncols, l = strlen(t->cells[i]);
            if (l > w[c])
                w[c] = l;
        }
        for (size_t c = 0; c < t->ncols; c++) {
            /* Headers follow their column: right over numbers. */
            int right = nrows == 0 || t->numeric[c];
            fprintf(f, right ? "%s%*s" : "%s%-*s", c ? "  " : "", (int)w[c],
                    t->cols[c].title);
        }
        fputc('\n', f);
        for (size_t c = 0; c < t->ncols; c++) {
            fputs(c ? "  " : "", f);
            for (size_t k = 0; k < w[c]; k++)
                fputc('-', f);
        }
        fputc('\n', f);
        for (size_t r = 0; r < nrows; r++) {
            for (size_t c = 0; c < t->ncols; c++) {
                size_t i = r * t->ncols + c;
                if (t->numeric[i])
                    fprintf(f, "%s%*s", c ? "  " : "", (int)w[c], t->cells[i]);
                else
                    fprintf(f, "%s%-*s", c ? "  " : "", (int)w[c],
                            t->cells[i]);
            }
            fputc('\n', f);
        }
    }
    if (fflush(f) != 0 || ferror(f))
        return sb_error_set(err, SB_EIO, "", 0, 0,
                            "write error on the output (expected a "
                            "writable output)");
    return SB_OK;
}
