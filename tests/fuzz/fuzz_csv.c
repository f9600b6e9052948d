/*
 * libFuzzer target: the streaming CSV reader used for soundings files
 * (csvread.h), sb_csv_open / sb_csv_next / sb_csv_field_* on a scratch
 * file holding the input.
 *
 * Byte 0 chooses the options: bits 0-2 the delimiter (detect, ',', ';',
 * tab, whitespace), bits 3-4 the decimal mark (detect, '.', ','), bits 5-7
 * the buffer size k: 0 gives 4096 bytes, 7 the default (1 MiB), others
 * 16 << k bytes, so that rows longer than the buffer are exercised and a
 * run is not dominated by clearing the default buffer.  The rest is the
 * file.
 * Checks: no crash, leak or undefined behaviour; every row and field
 * accessor returns one of its documented codes; a parsed number is finite;
 * row error messages have the FILE:LINE:COL position; rows come in
 * increasing line order.
 */
#include "fuzz_common.h" /* first: it sets _GNU_SOURCE for memfd */

#include <math.h>

#include "swathbudget/csvread.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    static const char delims[] = {0, ',', ';', '\t', ' ', 0, ',', ';'};
    static const char marks[] = {0, '.', ',', 0};
    struct sb_csv_options opt;
    struct sb_csv *csv = NULL;
    struct sb_csv_row row;
    struct sb_error err;
    const char *path;
    long last_line = 0;
    int rc, ncols, k, cols[4], n_rows = 0;

    if (size < 1)
        return 0;
    opt.delimiter = delims[data[0] & 7u];
    opt.decimal_mark = marks[(data[0] >> 3) & 3u];
    switch (data[0] >> 5) {
    case 0: opt.buffer_size = 4096; break;
    case 7: opt.buffer_size = 0; break; /* the default */
    default: opt.buffer_size = (size_t)16u << (data[0] >> 5); break;
    }
    path = fuzz_write_file("soundings.csv", data + 1, size - 1);

    sb_error_clear(&err);
    rc = sb_csv_open(path, &opt, &csv, &err);
    if (rc != SB_OK) {
        FUZZ_ASSERT(rc == SB_EINPUT || rc == SB_EIO || rc == SB_ENOMEM);
        fuzz_check_input_error(&err, 0);
        return 0;
    }
    ncols = sb_csv_ncols(csv);
    FUZZ_ASSERT(ncols >= 1);
    for (k = 0; k < ncols; k++)
        FUZZ_ASSERT(sb_csv_column_name(csv, k) != NULL);
    FUZZ_ASSERT(sb_csv_column_name(csv, ncols) == NULL);
    {
        int idx = -1;
        FUZZ_ASSERT(sb_csv_map(csv, sb_csv_column_name(csv, 0), &idx,
                               &err) == SB_OK && idx >= 0 && idx < ncols);
        sb_error_clear(&err);
        if (sb_csv_map(csv, "\x01no such column", &idx, &err) != SB_OK)
            fuzz_check_input_error(&err, 1);
    }
    for (k = 0; k < 4; k++)
        cols[k] = k % ncols;

    while ((rc = sb_csv_next(csv, &row, &err)) == 1) {
        double v[4];
        int bad = 0, described = 0;

        FUZZ_ASSERT(row.line > last_line);
        last_line = row.line;
        if (++n_rows > 2000)
            break;
        for (k = 0; k <= ncols; k++) {
            double x;
            const char *t;
            size_t len;
            long line;
            int col;
            int r = sb_csv_field_double(csv, &row, k, &x);

            FUZZ_ASSERT(r >= SB_CSV_OK && r < SB_CSV_NREASONS);
            FUZZ_ASSERT(sb_csv_reason_text(r) != NULL);
            if (r == SB_CSV_OK)
                FUZZ_ASSERT(isfinite(x));
            else if (!described++) { /* one message per row is enough */
                sb_error_clear(&err);
                FUZZ_ASSERT(sb_csv_row_error(csv, &row,
                                             row.reason ? -1 : k, r,
                                             &err) == SB_EINPUT);
                fuzz_check_input_error(&err, 1);
            }
            r = sb_csv_field_text(csv, &row, k, &t, &len);
            FUZZ_ASSERT(r >= SB_CSV_OK && r < SB_CSV_NREASONS);
            if (r == SB_CSV_OK && len)
                FUZZ_ASSERT(t != NULL && (volatile char)t[len - 1] == t[len - 1]);
            if (sb_csv_field_pos(csv, &row, k, &line, &col) == SB_CSV_OK)
                FUZZ_ASSERT(line >= row.line && col >= 1);
        }
        rc = sb_csv_fields_double(csv, &row, cols, 4, v, &bad);
        FUZZ_ASSERT(rc >= SB_CSV_OK && rc < SB_CSV_NREASONS);
        if (rc != SB_CSV_OK)
            FUZZ_ASSERT(bad >= -1 && bad < 4);
        FUZZ_ASSERT(sb_csv_line(csv) == row.line);
    }
    FUZZ_ASSERT(rc == 0 || rc == 1 || rc == -SB_EIO || rc == -SB_ENOMEM);
    sb_csv_close(csv);
    return 0;
}
