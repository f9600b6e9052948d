/*
 * Tests of the streaming CSV reader (src/lib/csvread.c).
 *
 * Sources of the expected values:
 *   - quoting, line ends: RFC 4180 (Shafranovich 2005), section 2, rules
 *     1-7 ('""' inside a quoted field is one '"', quoted fields may hold
 *     delimiters and line breaks, CRLF ends a record), and one file written
 *     and read back by an independent implementation, Python 3's csv
 *     module (test_python_csv_reference, with the script that made it);
 *   - delimiter / decimal-mark detection and the message texts: the rules
 *     written in docs/csv.md and include/swathbudget/csvread.h (the
 *     behaviour asked for, written before the code);
 *   - numbers: the files are written here from known values; a value
 *     exact in binary (45.5, -63.25) is compared with ==, others with the
 *     C library's strtod of the same text (the independent reference used
 *     for the decimal parser, see tests/test_decimal.c);
 *   - line numbers and columns: counted by hand in each small file, or
 *     computed from how the generated files are built.
 */
#include <check.h>
#include <dirent.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "swathbudget/csvread.h"

static char tmpdir[64];

static const char *write_file(const char *name, const char *data, size_t len)
{
    static char path[256];
    FILE *f;

    snprintf(path, sizeof path, "%s/%s", tmpdir, name);
    f = fopen(path, "wb");
    ck_assert_ptr_nonnull(f);
    ck_assert(fwrite(data, 1, len, f) == len);
    ck_assert_int_eq(fclose(f), 0);
    return path;
}

static const char *write_str(const char *name, const char *data)
{
    return write_file(name, data, strlen(data));
}

static struct sb_csv *open_ok(const char *path, char delim, char mark,
                              size_t bufsize)
{
    struct sb_csv_options o;
    struct sb_csv *c = NULL;
    struct sb_error err;
    int rc;

    o.delimiter = delim;
    o.decimal_mark = mark;
    o.buffer_size = bufsize;
    sb_error_clear(&err);
    rc = sb_csv_open(path, &o, &c, &err);
    ck_assert_msg(rc == SB_OK, "open %s: rc %d: %s:%d:%d: %s", path, rc,
                  err.file, err.line, err.col, err.msg);
    ck_assert_ptr_nonnull(c);
    return c;
}

/* Open must fail with `code`; the formatted message must equal `want`. */
static void open_bad(const char *path, char delim, char mark, size_t bufsize,
                     int code, const char *want)
{
    struct sb_csv_options o;
    struct sb_csv *c = (struct sb_csv *)&o; /* must be reset to NULL */
    struct sb_error err;
    char msg[1200];
    int rc;

    o.delimiter = delim;
    o.decimal_mark = mark;
    o.buffer_size = bufsize;
    sb_error_clear(&err);
    rc = sb_csv_open(path, &o, &c, &err);
    ck_assert_int_eq(rc, code);
    ck_assert_ptr_null(c);
    sb_error_format(&err, msg, sizeof msg);
    ck_assert_msg(strcmp(msg, want) == 0, "message\n  '%s'\nexpected\n  '%s'",
                  msg, want);
}

static void next_row(struct sb_csv *c, struct sb_csv_row *row)
{
    struct sb_error err;
    int rc = sb_csv_next(c, row, &err);
    ck_assert_msg(rc == 1, "sb_csv_next: %d (%s)", rc, err.msg);
}

static void at_end(struct sb_csv *c)
{
    struct sb_csv_row row;
    struct sb_error err;
    ck_assert_int_eq(sb_csv_next(c, &row, &err), 0);
    ck_assert_int_eq(sb_csv_next(c, &row, &err), 0); /* and stays there */
}

static double num(struct sb_csv *c, struct sb_csv_row *row, int k)
{
    double v = 0.0;
    int rc = sb_csv_field_double(c, row, k, &v);
    ck_assert_msg(rc == SB_CSV_OK, "line %ld field %d: %s", row->line, k,
                  sb_csv_reason_text(rc));
    return v;
}

static void text_is(struct sb_csv *c, struct sb_csv_row *row, int k,
                    const char *want)
{
    const char *t = NULL;
    size_t n = 0;
    ck_assert_int_eq(sb_csv_field_text(c, row, k, &t, &n), SB_CSV_OK);
    ck_assert_msg(n == strlen(want) && memcmp(t, want, n) == 0,
                  "field %d is '%.*s', expected '%s'", k, (int)n, t, want);
}

static void pos_is(struct sb_csv *c, struct sb_csv_row *row, int k,
                   long line, int col)
{
    long l = -1;
    int cc = -1;
    ck_assert_int_eq(sb_csv_field_pos(c, row, k, &l, &cc), SB_CSV_OK);
    ck_assert_msg(l == line && cc == col, "field %d at %ld:%d, expected %ld:%d",
                  k, l, cc, line, col);
}

/* The formatted message of a bad field (k >= 0) or row (k < 0). */
static void row_msg_is(struct sb_csv *c, struct sb_csv_row *row, int k,
                       int reason, const char *want)
{
    struct sb_error err;
    char msg[1200];
    ck_assert_int_eq(sb_csv_row_error(c, row, k, reason, &err), SB_EINPUT);
    sb_error_format(&err, msg, sizeof msg);
    ck_assert_msg(strcmp(msg, want) == 0, "message\n  '%s'\nexpected\n  '%s'",
                  msg, want);
}

/* ------------------------------------------------------------ detection */

START_TEST(test_detect_comma_point)
{
    const char *p =
        write_str("a.csv", "Line,Easting,Northing,Depth,BeamAngle\n"
                           "K-01,512345.12,6123456.78,45.5,-63.25\n");
    struct sb_csv *c = open_ok(p, 0, 0, 0);
    struct sb_csv_row row;
    int iz, ia, ix;
    struct sb_error err;

    ck_assert_int_eq(sb_csv_delimiter(c), ',');
    ck_assert_int_eq(sb_csv_decimal_mark(c), '.');
    ck_assert_int_eq(sb_csv_ncols(c), 5);
    ck_assert_str_eq(sb_csv_column_name(c, 3), "Depth");
    ck_assert_ptr_null(sb_csv_column_name(c, 5));
    ck_assert_int_eq(sb_csv_map(c, "Depth", &iz, &err), SB_OK);
    ck_assert_int_eq(sb_csv_map(c, "BeamAngle", &ia, &err), SB_OK);
    ck_assert_int_eq(sb_csv_map(c, "Easting", &ix, &err), SB_OK);
    ck_assert_int_eq(iz, 3);
    next_row(c, &row);
    ck_assert_int_eq(row.line, 2);
    ck_assert_int_eq(row.reason, SB_CSV_OK);
    ck_assert_int_eq(row.nfields, 5);
    ck_assert(num(c, &row, iz) == 45.5);
    ck_assert(num(c, &row, ia) == -63.25);
    ck_assert(num(c, &row, ix) == strtod("512345.12", NULL));
    text_is(c, &row, 0, "K-01");
    ck_assert_int_eq(sb_csv_line(c), 2);
    at_end(c);
    sb_csv_close(c);
}
END_TEST

START_TEST(test_detect_semicolon_comma)
{
    /* European export: ';' delimiter, ',' decimals. */
    const char *p = write_str("b.csv", "Line;Easting;Northing;Depth\n"
                                       "K-01;512345,12;6123456,78;45,5\n"
                                       "K-01;512346,5;6123457;-0,25\n");
    struct sb_csv *c = open_ok(p, 0, 0, 0);
    struct sb_csv_row row;

    ck_assert_int_eq(sb_csv_delimiter(c), ';');
    ck_assert_int_eq(sb_csv_decimal_mark(c), ',');
    next_row(c, &row);
    ck_assert(num(c, &row, 1) == strtod("512345.12", NULL));
    ck_assert(num(c, &row, 3) == 45.5);
    next_row(c, &row);
    ck_assert(num(c, &row, 1) == 512346.5);
    ck_assert(num(c, &row, 2) == 6123457.0);
    ck_assert(num(c, &row, 3) == -0.25);
    at_end(c);
    sb_csv_close(c);
}
END_TEST

START_TEST(test_detect_tab_and_space)
{
    const char *p = write_str("c.tsv", "Line\tx\ty\tz\n"
                                       "K 01\t1,5\t2,5\t3\n");
    struct sb_csv *c = open_ok(p, 0, 0, 0);
    struct sb_csv_row row;

    ck_assert_int_eq(sb_csv_delimiter(c), '\t');
    ck_assert_int_eq(sb_csv_decimal_mark(c), ',');
    next_row(c, &row);
    text_is(c, &row, 0, "K 01"); /* a space inside a tab-delimited field */
    ck_assert(num(c, &row, 1) == 1.5);
    sb_csv_close(c);

    /* Tab-delimited with quotes: a tab is the delimiter, never a blank to
     * skip before a quote; a line of tabs is a row of empty fields
     * (RFC 4180 section 2 rules 4-6), a line of spaces is blank. */
    p = write_str("c2.tsv", "a\tb\tc\n"
                            "\t\"x\ty\"\t 2 \n"
                            "\t\t\n"
                            "   \n"
                            "\"1\" \t\t3\n");
    c = open_ok(p, 0, 0, 0);
    ck_assert_int_eq(sb_csv_delimiter(c), '\t');
    next_row(c, &row);
    ck_assert_int_eq(row.reason, SB_CSV_OK);
    text_is(c, &row, 0, "");
    text_is(c, &row, 1, "x\ty");
    ck_assert(num(c, &row, 2) == 2.0);
    next_row(c, &row);
    ck_assert_int_eq(row.line, 3);
    ck_assert_int_eq(row.reason, SB_CSV_OK);
    ck_assert_int_eq(row.nfields, 3);
    ck_assert_int_eq(sb_csv_field_double(c, &row, 2, &(double){0}),
                     SB_CSV_EMPTY_FIELD);
    next_row(c, &row);
    ck_assert_int_eq(row.line, 5);
    ck_assert(num(c, &row, 0) == 1.0);
    ck_assert(num(c, &row, 2) == 3.0);
    at_end(c);
    sb_csv_close(c);

    /* Whitespace-delimited: runs of blanks, leading/trailing ignored. */
    p = write_str("d.txt", "Line  x   y z\n"
                           "  K1   1.5  2.5\t 3  \n"
                           "   \n"
                           "K2 4 5 6\n");
    c = open_ok(p, 0, 0, 0);
    ck_assert_int_eq(sb_csv_delimiter(c), ' ');
    ck_assert_int_eq(sb_csv_decimal_mark(c), '.');
    ck_assert_int_eq(sb_csv_ncols(c), 4);
    ck_assert_str_eq(sb_csv_column_name(c, 1), "x");
    next_row(c, &row);
    ck_assert_int_eq(row.reason, SB_CSV_OK);
    ck_assert_int_eq(row.nfields, 4);
    text_is(c, &row, 0, "K1");
    ck_assert(num(c, &row, 2) == 2.5);
    ck_assert(num(c, &row, 3) == 3.0);
    pos_is(c, &row, 1, 2, 8);
    next_row(c, &row); /* the blank line 3 is skipped */
    ck_assert_int_eq(row.line, 4);
    ck_assert(num(c, &row, 3) == 6.0);
    at_end(c);
    sb_csv_close(c);
}
END_TEST

/* Ambiguous cases, each resolved by the documented rule. */
START_TEST(test_detect_rules)
{
    struct sb_csv *c;
    struct sb_csv_row row;
    const char *p;

    /* ',' delimiter implies '.' decimals even if the data look like
     * comma decimals (they are then simply more columns). */
    p = write_str("e.csv", "a,b\n1,5\n");
    c = open_ok(p, 0, 0, 0);
    ck_assert_int_eq(sb_csv_delimiter(c), ',');
    ck_assert_int_eq(sb_csv_decimal_mark(c), '.');
    sb_csv_close(c);

    /* Most frequent candidate wins: two ';' against one ','. */
    p = write_str("f.csv", "Line,name;x;y\n");
    c = open_ok(p, 0, 0, 0);
    ck_assert_int_eq(sb_csv_delimiter(c), ';');
    ck_assert_int_eq(sb_csv_ncols(c), 3);
    ck_assert_str_eq(sb_csv_column_name(c, 0), "Line,name");
    sb_csv_close(c);

    /* Tie: tab before ';' before ','. */
    p = write_str("g.csv", "a;b,c\td\n");
    c = open_ok(p, 0, 0, 0);
    ck_assert_int_eq(sb_csv_delimiter(c), '\t');
    sb_csv_close(c);
    p = write_str("g2.csv", "a;b,c\n");
    c = open_ok(p, 0, 0, 0);
    ck_assert_int_eq(sb_csv_delimiter(c), ';');
    sb_csv_close(c);

    /* Delimiters inside quotes do not count. */
    p = write_str("h.csv", "\"a;b;c\",d\n");
    c = open_ok(p, 0, 0, 0);
    ck_assert_int_eq(sb_csv_delimiter(c), ',');
    ck_assert_str_eq(sb_csv_column_name(c, 0), "a;b;c");
    sb_csv_close(c);

    /* A given ',' decimal mark removes ',' from the candidates. */
    p = write_str("i.csv", "a,b;c\n1,5;2\n");
    c = open_ok(p, 0, ',', 0);
    ck_assert_int_eq(sb_csv_delimiter(c), ';');
    sb_csv_close(c);

    /* Decimal mark: ',' only when strictly more numbers use it; a tie
     * gives '.', and a number with the other mark is then a field error
     * (mixed marks). */
    p = write_str("j.csv", "x;y\n1.5;2,5\n");
    c = open_ok(p, 0, 0, 0);
    ck_assert_int_eq(sb_csv_decimal_mark(c), '.');
    next_row(c, &row);
    ck_assert(num(c, &row, 0) == 1.5);
    {
        double v = 7.0;
        ck_assert_int_eq(sb_csv_field_double(c, &row, 1, &v),
                         SB_CSV_DECIMAL_MARK);
        ck_assert(v == 7.0);
    }
    {
        char want[600];
        snprintf(want, sizeof want,
                 "%s:2:5: '2,5' in column 'y' uses the decimal mark ',' "
                 "(expected '.', the mark of this file)", p);
        row_msg_is(c, &row, 1, SB_CSV_DECIMAL_MARK, want);
    }
    sb_csv_close(c);

    /* More commas than points: ','; integers count for neither. */
    p = write_str("k.csv", "x;y;z\n1,5;2,5;3\n4.5;6;7\n");
    c = open_ok(p, 0, 0, 0);
    ck_assert_int_eq(sb_csv_decimal_mark(c), ',');
    next_row(c, &row);
    ck_assert(num(c, &row, 1) == 2.5);
    next_row(c, &row);
    ck_assert_int_eq(sb_csv_field_double(c, &row, 0, &(double){0}),
                     SB_CSV_DECIMAL_MARK);
    sb_csv_close(c);

    /* Given options override detection. */
    p = write_str("l.csv", "a;b,c\n1;2,5\n");
    c = open_ok(p, ';', ',', 0);
    next_row(c, &row);
    ck_assert(num(c, &row, 1) == 2.5);
    sb_csv_close(c);
}
END_TEST

START_TEST(test_bad_options)
{
    const char *p = write_str("m.csv", "a,b\n");
    open_bad(p, ',', ',', 0, SB_EINPUT,
             "',' given as both delimiter and decimal mark (expected "
             "different characters)");
    open_bad(p, '|', 0, 0, SB_EINPUT,
             "unknown delimiter '|' (expected ',', ';', tab or space)");
    open_bad(p, 0, 0, (size_t)SB_CSV_BUFFER_MAX + 1, SB_EINPUT,
             "read buffer of 1073741825 bytes (expected at most "
             "1073741824)");
    open_bad(p, 0, ':', 0, SB_EINPUT,
             "unknown decimal mark ':' (expected '.' or ',')");
    {
        char want[600];
        snprintf(want, sizeof want,
                 "%s/none.csv:0:0: cannot open: No such file or directory "
                 "(expected a readable file)", tmpdir);
        snprintf(want + 300, 300, "%s/none.csv", tmpdir);
        open_bad(want + 300, 0, 0, 0, SB_EIO, want);
    }
}
END_TEST

/* --------------------------------------------------------------- format */

START_TEST(test_quoted_fields)
{
    /* RFC 4180 section 2 rules 5-7; line numbers counted by hand: the
     * quoted line break puts the third row on line 4. */
    const char *p = write_str("q.csv",
                              "\"Line\",\"Depth (m)\",\"Note\"\n"
                              "\"K \"\"A\"\"\",45.5,\"a,b\n"
                              "c\"\n"
                              "K2,\"46.5\",  \"x\"  \n"
                              "\"\",\"-1\",\"\"\"\"\n"
                              "\"L\"\"\n3\",2,3\n"
                              "x,y,z\n");
    struct sb_csv *c = open_ok(p, 0, 0, 0);
    struct sb_csv_row row;

    ck_assert_str_eq(sb_csv_column_name(c, 1), "Depth (m)");
    next_row(c, &row);
    ck_assert_int_eq(row.line, 2);
    ck_assert_int_eq(row.reason, SB_CSV_OK);
    text_is(c, &row, 0, "K \"A\"");
    ck_assert(num(c, &row, 1) == 45.5);
    ck_assert_int_eq(row.field[2].len, 5);
    ck_assert(memcmp(row.field[2].text, "a,b\nc", 5) == 0);
    pos_is(c, &row, 2, 2, 16);
    next_row(c, &row);
    ck_assert_int_eq(row.line, 4);
    ck_assert(num(c, &row, 1) == 46.5);
    text_is(c, &row, 2, "x");
    pos_is(c, &row, 2, 4, 13);
    next_row(c, &row);
    ck_assert_int_eq(row.line, 5);
    text_is(c, &row, 0, "");
    ck_assert(num(c, &row, 1) == -1.0);
    text_is(c, &row, 2, "\"");
    next_row(c, &row); /* '""' then a line break, inside quotes */
    ck_assert_int_eq(row.line, 6);
    ck_assert_int_eq(row.reason, SB_CSV_OK);
    text_is(c, &row, 0, "L\"\n3");
    pos_is(c, &row, 0, 6, 1);
    pos_is(c, &row, 1, 7, 4); /* after the quoted line break */
    {
        long l;
        int cc;
        ck_assert_int_eq(sb_csv_field_pos(c, &row, 3, &l, &cc),
                         SB_CSV_NO_FIELD);
    }
    next_row(c, &row);
    ck_assert_int_eq(row.line, 8);
    text_is(c, &row, 2, "z");
    at_end(c);
    sb_csv_close(c);
}
END_TEST

START_TEST(test_bad_quotes)
{
    char want[600];
    const char *p = write_str("bq.csv", "a,b,c\n"
                                        "K1,\"45.5\"x,1\n"
                                        "K2,1,2\n"
                                        "K3,2,\"3\n");
    struct sb_csv *c = open_ok(p, 0, 0, 0);
    struct sb_csv_row row;

    next_row(c, &row);
    ck_assert_int_eq(row.reason, SB_CSV_BAD_QUOTE);
    ck_assert_int_eq(row.reason_col, 10);
    snprintf(want, sizeof want,
             "%s:2:10: broken quoting (expected a closing '\"' followed by "
             "the delimiter or the end of the row)", p);
    row_msg_is(c, &row, -1, row.reason, want);
    ck_assert_int_eq(sb_csv_field_double(c, &row, 1, &(double){0}),
                     SB_CSV_BAD_QUOTE);
    next_row(c, &row);
    ck_assert_int_eq(row.reason, SB_CSV_OK);
    ck_assert(num(c, &row, 2) == 2.0);
    next_row(c, &row); /* unterminated quote up to the end of the file */
    ck_assert_int_eq(row.line, 4);
    ck_assert_int_eq(row.reason, SB_CSV_BAD_QUOTE);
    ck_assert_int_eq(row.reason_col, 6);
    at_end(c);
    sb_csv_close(c);

    /* A '"' inside an unquoted field is an ordinary character. */
    p = write_str("bq2.csv", "a,b\nK 5\"A,1\n");
    c = open_ok(p, 0, 0, 0);
    next_row(c, &row);
    ck_assert_int_eq(row.reason, SB_CSV_OK);
    text_is(c, &row, 0, "K 5\"A");
    ck_assert(num(c, &row, 1) == 1.0);
    sb_csv_close(c);
}
END_TEST

/* A file written by an independent implementation, Python 3's csv module
 * (csv.writer, ';' delimiter, CRLF, minimal quoting), with the fields and
 * row start lines that Python's csv.reader (strict=True) reads back from it.
 * The C arrays below were printed by this script (kept here so that the
 * check values can be regenerated):
 *
 *     # Emits a C test case: a file written and read back by Python's csv module.
 *     import csv, io, random
 *     random.seed(2024)
 *     alpha = 'ab1.5 -"\n,;\t'
 *     rows = [['Line', 'Note', 'Depth']]
 *     for r in range(8):
 *         rows.append([''.join(random.choice(alpha) for _ in range(random.randint(0, 7))) for _ in range(3)])
 *     buf = io.StringIO()
 *     csv.writer(buf, delimiter=';', lineterminator='\r\n').writerows(rows)
 *     text = buf.getvalue()
 *     want = list(csv.reader(io.StringIO(text, newline=''), delimiter=';', strict=True))
 *     def c(s):
 *         return '"' + s.replace('\\', '\\\\').replace('"', '\\"').replace('\n', '\\n').replace('\r', '\\r').replace('\t', '\\t') + '"'
 *     print('    static const char text[] =')
 *     for line in text.split('\n'):
 *         pass
 *     parts = text.split('\n')
 *     for i, part in enumerate(parts):
 *         if part == '' and i == len(parts) - 1:
 *             continue
 *         print('        ' + c(part + ('\n' if i < len(parts) - 1 else '')))
 *     print('        ;')
 *     print('    static const char *const want[][3] = {')
 *     for r in want[1:]:
 *         print('        {' + ', '.join(c(x) for x in r) + '},')
 *     print('    };')
 *     rd = csv.reader(io.StringIO(text, newline=''), delimiter=';', strict=True)
 *     starts = []
 *     prev = 0
 *     for r in rd:
 *         starts.append(prev + 1)
 *         prev = rd.line_num
 *     print('    static const long start_line[] = {' + ', '.join(str(x) for x in starts[1:]) + '};')
 */
START_TEST(test_python_csv_reference)
{
    static const char text[] =
        "Line;Note;Depth\r\n"
        "1\t,5.\t-;\"\n"
        ".;\t\";\" -\n"
        "\t,.5\"\r\n"
        "\"\n"
        "b\t.\t\";\"\t;1\n"
        ".-a\";\";-\"\"b\t\"\r\n"
        " -; . --;,.-..\r\n"
        ";\"a5\n"
        "\";,\t-,b\r\n"
        "\";,..\"\"\";\"1. \"\",\";5-\r\n"
        "\" \t\t\"\"1\"; .;b\r\n"
        "a1;\t. .b.5;\"\t\"\",\"\r\n"
        "\"\"\"\n"
        "-;\";.b5551;\"\n"
        "b\"\".\"\r\n"
        ;
    static const char *const want[][3] = {
        {"1\t,5.\t-", "\n.;\t", " -\n\t,.5"},
        {"\nb\t.\t", "\t;1\n.-a", ";-\"b\t"},
        {" -", " . --", ",.-.."},
        {"", "a5\n", ",\t-,b"},
        {";,..\"", "1. \",", "5-"},
        {" \t\t\"1", " .", "b"},
        {"a1", "\t. .b.5", "\t\","},
        {"\"\n-;", ".b5551", "\nb\"."},
    };
    static const long start_line[] = {2, 5, 8, 9, 11, 12, 13, 14};
    const char *p = write_str("py.csv", text);
    size_t r, nrows = sizeof want / sizeof want[0];
    static const size_t sizes[] = {0, 70, 33};
    size_t s;

    for (s = 0; s < sizeof sizes / sizeof sizes[0]; s++) {
        struct sb_csv *c = open_ok(p, 0, 0, sizes[s]);
        struct sb_csv_row row;
        ck_assert_int_eq(sb_csv_delimiter(c), ';');
        for (r = 0; r < nrows; r++) {
            int k;
            next_row(c, &row);
            ck_assert_msg(row.line == start_line[r], "row %zu at line %ld",
                          r, row.line);
            ck_assert_int_eq(row.reason, SB_CSV_OK);
            ck_assert_int_eq(row.nfields, 3);
            for (k = 0; k < 3; k++)
                ck_assert_msg(row.field[k].len == strlen(want[r][k]) &&
                                  memcmp(row.field[k].text, want[r][k],
                                         row.field[k].len) == 0,
                              "buffer %zu row %zu field %d differs", sizes[s],
                              r, k);
        }
        at_end(c);
        sb_csv_close(c);
    }
}
END_TEST

START_TEST(test_crlf_bom_no_final_newline)
{
    const char *p = write_str("crlf.csv", "\xEF\xBB\xBFx,y\r\n"
                                          "1.5,2.5\r\n"
                                          "\r\n"
                                          "3,4");
    struct sb_csv *c = open_ok(p, 0, 0, 0);
    struct sb_csv_row row;

    ck_assert_str_eq(sb_csv_column_name(c, 0), "x");
    ck_assert_str_eq(sb_csv_column_name(c, 1), "y");
    next_row(c, &row);
    ck_assert(num(c, &row, 1) == 2.5); /* no '\r' left in the last field */
    next_row(c, &row);
    ck_assert_int_eq(row.line, 4);
    ck_assert(num(c, &row, 1) == 4.0);
    at_end(c);
    sb_csv_close(c);
}
END_TEST

/* --------------------------------------------------------------- errors */

START_TEST(test_ragged_and_bad_fields)
{
    char want[600];
    const char *p = write_str("r.csv", "Line,Depth,Angle\n"   /* 1 */
                                       "K1,45.5\n"            /* 2 short */
                                       "K1,45.5,3,9\n"        /* 3 long */
                                       "K1,abc,1\n"           /* 4 */
                                       "K1,,1\n"              /* 5 */
                                       "K1, nan ,1e999\n"     /* 6 */
                                       "K1, 12.5 ,-1\n");     /* 7 */
    struct sb_csv *c = open_ok(p, 0, 0, 0);
    struct sb_csv_row row;
    double v;

    next_row(c, &row);
    ck_assert_int_eq(row.reason, SB_CSV_RAGGED);
    ck_assert_int_eq(row.nfields, 2);
    snprintf(want, sizeof want,
             "%s:2:8: row has 2 fields (expected 3, as in the header on "
             "line 1)", p);
    row_msg_is(c, &row, -1, row.reason, want);
    ck_assert_int_eq(sb_csv_field_double(c, &row, 1, &v), SB_CSV_RAGGED);

    next_row(c, &row);
    ck_assert_int_eq(row.reason, SB_CSV_RAGGED);
    ck_assert_int_eq(row.nfields, 4);
    ck_assert_int_eq(row.reason_col, 11);
    {
        int cols[1] = {1}, bad = 3;
        ck_assert_int_eq(sb_csv_fields_double(c, &row, cols, 1, &v, &bad),
                         SB_CSV_RAGGED);
        ck_assert_int_eq(bad, -1);
    }

    next_row(c, &row);
    ck_assert_int_eq(row.reason, SB_CSV_OK);
    ck_assert_int_eq(sb_csv_field_double(c, &row, 1, &v), SB_CSV_NOT_NUMBER);
    snprintf(want, sizeof want,
             "%s:4:4: 'abc' in column 'Depth' is not a number (expected a "
             "decimal number such as -12.5 or 1.5e3)", p);
    row_msg_is(c, &row, 1, SB_CSV_NOT_NUMBER, want);
    ck_assert_int_eq(sb_csv_field_double(c, &row, 3, &v), SB_CSV_NO_FIELD);
    ck_assert_int_eq(sb_csv_field_double(c, &row, -1, &v), SB_CSV_NO_FIELD);

    next_row(c, &row);
    ck_assert_int_eq(sb_csv_field_double(c, &row, 1, &v),
                     SB_CSV_EMPTY_FIELD);
    snprintf(want, sizeof want,
             "%s:5:4: empty field in column 'Depth' (expected a number)", p);
    row_msg_is(c, &row, 1, SB_CSV_EMPTY_FIELD, want);

    next_row(c, &row);
    ck_assert_int_eq(sb_csv_field_double(c, &row, 1, &v), SB_CSV_NONFINITE);
    ck_assert_int_eq(sb_csv_field_double(c, &row, 2, &v), SB_CSV_NONFINITE);
    snprintf(want, sizeof want,
             "%s:6:10: '1e999' in column 'Angle' is not a finite number "
             "(expected a finite decimal number)", p);
    row_msg_is(c, &row, 2, SB_CSV_NONFINITE, want);

    next_row(c, &row); /* blanks around a number are allowed */
    ck_assert_int_eq(row.line, 7);
    ck_assert(num(c, &row, 1) == 12.5);
    {
        /* several columns at once; the second call fails on column 0
         * ('K1' is not a number), reported as position 1 of cols */
        int cols[2] = {1, 2}, cols2[2] = {2, 0}, bad = -7;
        double out[2] = {0.0, 0.0};
        ck_assert_int_eq(sb_csv_fields_double(c, &row, cols, 2, out, &bad),
                         SB_CSV_OK);
        ck_assert(out[0] == 12.5 && out[1] == -1.0);
        ck_assert_int_eq(bad, -7);
        ck_assert_int_eq(sb_csv_fields_double(c, &row, cols2, 2, out, &bad),
                         SB_CSV_NOT_NUMBER);
        ck_assert_int_eq(bad, 1);
        ck_assert(out[0] == -1.0);
        cols2[1] = 3;
        ck_assert_int_eq(sb_csv_fields_double(c, &row, cols2, 2, out, NULL),
                         SB_CSV_NO_FIELD);
    }
    at_end(c);
    sb_csv_close(c);

    ck_assert_str_eq(sb_csv_reason_text(SB_CSV_NOT_NUMBER),
                     "unparsable number");
    ck_assert_str_eq(sb_csv_reason_text(SB_CSV_TOO_LONG), "row too long");
}
END_TEST

START_TEST(test_header_errors)
{
    char want[700];
    const char *p;
    struct sb_csv *c;
    struct sb_error err;
    int k = -5;

    p = write_str("empty.csv", "");
    snprintf(want, sizeof want,
             "%s:1:1: empty file (expected a header row naming the columns)",
             p);
    open_bad(p, 0, 0, 0, SB_EINPUT, want);

    p = write_str("blank.csv", "\n  \r\n\n");
    snprintf(want, sizeof want,
             "%s:1:1: empty file (expected a header row naming the columns)",
             p);
    open_bad(p, 0, 0, 0, SB_EINPUT, want);

    /* duplicate name: header on line 3 after two blank lines; the second
     * field (" Depth ") starts at column 12 (counted by hand) */
    p = write_str("dup.csv", "\n\nLine,Depth, Depth ,x\n1,2,3,4\n");
    snprintf(want, sizeof want,
             "%s:3:12: column name 'Depth' appears twice in the header, also "
             "at column 6 (expected distinct column names)", p);
    open_bad(p, 0, 0, 0, SB_EINPUT, want);

    p = write_str("hq.csv", "a,\"b\"c\n");
    snprintf(want, sizeof want,
             "%s:1:6: broken quoting in the header row (expected a closing "
             "'\"' followed by the delimiter or the end of the row)", p);
    open_bad(p, 0, 0, 0, SB_EINPUT, want);

    p = write_str("hl.csv", "Line,Easting,Northing,Depth,Angle\n1,2,3,4,5\n");
    snprintf(want, sizeof want,
             "%s:1:1: header row longer than the 16-byte read buffer "
             "(expected a header row shorter than that)", p);
    open_bad(p, 0, 0, 16, SB_EINPUT, want);

    /* a mapped column missing from the header */
    p = write_str("map.csv", "\nLine;Easting;Northing\n");
    c = open_ok(p, 0, 0, 0);
    ck_assert_int_eq(sb_csv_line(c), 2);
    ck_assert_int_eq(sb_csv_map(c, "Depth", &k, &err), SB_EINPUT);
    ck_assert_int_eq(k, -5);
    {
        char msg[900];
        sb_error_format(&err, msg, sizeof msg);
        snprintf(want, sizeof want,
                 "%s:2:1: no column named 'Depth' in the header (expected one "
                 "of 'Line', 'Easting', 'Northing')", p);
        ck_assert_str_eq(msg, want);
    }
    ck_assert_int_eq(sb_csv_map(c, "northing", &k, &err), SB_EINPUT);
    ck_assert_int_eq(sb_csv_map(c, "Northing", &k, &err), SB_OK);
    ck_assert_int_eq(k, 2);
    at_end(c); /* a header alone is a valid file without rows */
    sb_csv_close(c);
    sb_csv_close(NULL);
}
END_TEST

/* A row of 3 MB (three times the default buffer) on line 3: reported once
 * with its line, skipped, and the rows after it read with their lines. */
START_TEST(test_very_long_line)
{
    const size_t big = 3u * 1024u * 1024u;
    const char *head = "Line,Depth\nK1,10.5\n";
    const char *tail = "\nK3,11.5\nK4,12.5\n";
    size_t nh = strlen(head), nt = strlen(tail), i;
    char *data = malloc(nh + big + nt);
    const char *p;
    struct sb_csv *c;
    struct sb_csv_row row;
    char want[600];

    ck_assert_ptr_nonnull(data);
    memcpy(data, head, nh);
    for (i = 0; i < big; i++)
        data[nh + i] = (char)('0' + i % 10);
    data[nh + 100] = ','; /* looks like a row at first */
    memcpy(data + nh + big, tail, nt);
    p = write_file("long.csv", data, nh + big + nt);
    free(data);

    c = open_ok(p, 0, 0, 0);
    next_row(c, &row);
    ck_assert_int_eq(row.line, 2);
    ck_assert(num(c, &row, 1) == 10.5);
    next_row(c, &row);
    ck_assert_int_eq(row.line, 3);
    ck_assert_int_eq(row.reason, SB_CSV_TOO_LONG);
    ck_assert_int_eq(row.nfields, 0);
    snprintf(want, sizeof want,
             "%s:3:1: row longer than the 1048576-byte read buffer, skipped "
             "(expected rows shorter than that)", p);
    row_msg_is(c, &row, -1, row.reason, want);
    ck_assert_int_eq(sb_csv_field_double(c, &row, 1, &(double){0}),
                     SB_CSV_TOO_LONG);
    next_row(c, &row);
    ck_assert_int_eq(row.line, 4);
    ck_assert_int_eq(row.reason, SB_CSV_OK);
    ck_assert(num(c, &row, 1) == 11.5);
    next_row(c, &row);
    ck_assert_int_eq(row.line, 5);
    ck_assert(num(c, &row, 1) == 12.5);
    at_end(c);
    sb_csv_close(c);
}
END_TEST

/* Long rows with quotes (and quoted line breaks) through a tiny buffer:
 * the skip must follow the quoting to find the row's real end. */
START_TEST(test_long_quoted_rows_small_buffer)
{
    char data[4096];
    size_t n = 0;
    const char *p;
    struct sb_csv *c;
    struct sb_csv_row row;
    int i;

    n += (size_t)sprintf(data + n, "a,b\n1,2\n");           /* lines 1-2 */
    n += (size_t)sprintf(data + n, "\"");                   /* line 3... */
    for (i = 0; i < 200; i++)
        data[n++] = (char)(i % 50 == 49 ? '\n' : 'x');      /* +4 breaks */
    n += (size_t)sprintf(data + n, "\"\",\"\"y\",5\n");     /* ...line 7 */
    n += (size_t)sprintf(data + n, "3,4\n");                /* line 8 */
    n += (size_t)sprintf(data + n, "K");                    /* line 9 */
    for (i = 0; i < 100; i++)
        data[n++] = 'z';
    n += (size_t)sprintf(data + n, ",\"7\"\n5,6\n");        /* line 10 */
    p = write_file("lq.csv", data, n);

    c = open_ok(p, 0, 0, 32);
    next_row(c, &row);
    ck_assert(num(c, &row, 1) == 2.0);
    next_row(c, &row);
    ck_assert_int_eq(row.line, 3);
    ck_assert_int_eq(row.reason, SB_CSV_TOO_LONG);
    next_row(c, &row);
    ck_assert_int_eq(row.line, 8);
    ck_assert_int_eq(row.reason, SB_CSV_OK);
    ck_assert(num(c, &row, 1) == 4.0);
    next_row(c, &row);
    ck_assert_int_eq(row.line, 9);
    ck_assert_int_eq(row.reason, SB_CSV_TOO_LONG);
    next_row(c, &row);
    ck_assert_int_eq(row.line, 10);
    ck_assert(num(c, &row, 1) == 6.0);
    at_end(c);
    sb_csv_close(c);
}
END_TEST

/* Many rows read through buffers of many small sizes, so that rows (and
 * quoted fields, and CRLF pairs) are cut at every possible place.  Every
 * value is known from how the row was written. */
START_TEST(test_buffer_boundaries)
{
    static const size_t sizes[] = {24, 25, 26, 27, 29, 31, 32, 33, 40,
                                   47, 64, 100, 257, 4096, 0};
    const int nrows = 700;
    char *data = malloc((size_t)nrows * 40 + 64);
    size_t n = 0, s;
    const char *p;
    int i;

    ck_assert_ptr_nonnull(data);
    n += (size_t)sprintf(data + n, "id;v;w\n");
    for (i = 0; i < nrows; i++) {
        int a = i * 7 % 1000, b = i * 13 % 100;
        switch (i % 4) {
        case 0:
            n += (size_t)sprintf(data + n, "%d;%d,%02d;%d\n", i, a, b, -i);
            break;
        case 1:
            n += (size_t)sprintf(data + n, "\"%d\";\"%d,%02d\";%d\r\n", i,
                                 a, b, -i);
            break;
        case 2:
            n += (size_t)sprintf(data + n, "%d;%d,%02d;\"%d\"\n\n", i, a, b,
                                 -i);
            break;
        default:
            n += (size_t)sprintf(data + n, "%d; %d,%02d ;%d\n", i, a, b, -i);
            break;
        }
    }
    p = write_file("many.csv", data, n);
    free(data);

    for (s = 0; s < sizeof sizes / sizeof sizes[0]; s++) {
        struct sb_csv *c = open_ok(p, 0, 0, sizes[s]);
        struct sb_csv_row row;
        long line = 2;

        ck_assert_int_eq(sb_csv_delimiter(c), ';');
        ck_assert_int_eq(sb_csv_decimal_mark(c), ',');
        for (i = 0; i < nrows; i++) {
            int a = i * 7 % 1000, b = i * 13 % 100;
            char ref[32];
            next_row(c, &row);
            ck_assert_msg(row.line == line, "buffer %zu row %d: line %ld, "
                          "expected %ld", sizes[s], i, row.line, line);
            ck_assert_msg(row.reason == SB_CSV_OK, "buffer %zu row %d: %s",
                          sizes[s], i, sb_csv_reason_text(row.reason));
            ck_assert(num(c, &row, 0) == (double)i);
            snprintf(ref, sizeof ref, "%d.%02d", a, b);
            ck_assert(num(c, &row, 1) == strtod(ref, NULL));
            ck_assert(num(c, &row, 2) == (double)-i);
            line += i % 4 == 2 ? 2 : 1;
        }
        at_end(c);
        sb_csv_close(c);
    }
}
END_TEST

/* The inline short-number parser (decimal.h) on fields straight from the
 * reader's buffer -- what the audit's hot loop does, relying on the
 * padding promised in csvread.h -- must give exactly what
 * sb_csv_field_double gives: the same status and the same bits, for short
 * and long forms, quoted fields, blanks, and fields at the very end of the
 * buffer (small buffers); and sb_csv_fields_double the same as one field
 * at a time.  Independent check: every accepted plain field equals the C
 * library's strtod of its '.' spelling, bit for bit. */
static unsigned long long xs_state;

static unsigned xs_next(unsigned n)
{
    xs_state ^= xs_state << 13; /* xorshift64 (Marsaglia 2003) */
    xs_state ^= xs_state >> 7;
    xs_state ^= xs_state << 17;
    return (unsigned)(xs_state % n);
}

static size_t random_field(char *s, char mark)
{
    size_t n = 0;
    unsigned i, kind = xs_next(10), ni = xs_next(10), nf = xs_next(11);
    int quoted = kind == 7;

    if (quoted)
        s[n++] = '"';
    if (kind == 8)
        s[n++] = ' ';
    if (xs_next(2))
        s[n++] = xs_next(4) ? '-' : '+';
    for (i = 0; i < ni; i++)
        s[n++] = (char)('0' + xs_next(10));
    if (xs_next(6))
        s[n++] = mark;
    for (i = 0; i < nf; i++)
        s[n++] = (char)('0' + xs_next(10));
    if (kind == 9)
        n += (size_t)sprintf(s + n, "e%d", (int)xs_next(40) - 20);
    if (kind == 6 && n > 0) /* a stray byte */
        s[xs_next((unsigned)n)] = "x.,+- "[xs_next(6)];
    if (quoted)
        s[n++] = '"';
    return n;
}

static uint64_t bits_of(double x)
{
    uint64_t u;
    memcpy(&u, &x, sizeof u);
    return u;
}

START_TEST(test_short_parser_on_fields)
{
    static const size_t sizes[] = {64, 97, 0};
    static const char marks[2][2] = {{',', '.'}, {';', ','}};
    const int nrows = 3000;
    char *data = malloc((size_t)nrows * 3 * 48 + 64);
    size_t n, s;
    int m, i, checked = 0, accepted = 0;

    ck_assert_ptr_nonnull(data);
    for (m = 0; m < 2; m++) {
        const char d = marks[m][0], mark = marks[m][1];
        const char *p;

        xs_state = 0x2545F4914F6CDD1DULL + (unsigned long long)m;
        n = (size_t)sprintf(data, "a%cb%cc\n", d, d);
        for (i = 0; i < nrows; i++) {
            n += random_field(data + n, mark);
            data[n++] = d;
            n += random_field(data + n, mark);
            data[n++] = d;
            n += random_field(data + n, mark);
            data[n++] = '\n';
        }
        p = write_file(m ? "short_semi.csv" : "short_comma.csv", data, n);
        for (s = 0; s < sizeof sizes / sizeof sizes[0]; s++) {
            struct sb_csv *c = open_ok(p, d, mark, sizes[s]);
            struct sb_csv_row row;
            static const int cols[3] = {0, 1, 2};

            while (sb_csv_next(c, &row, NULL) == 1) {
                double all[3];
                int bad = -2, rall, k, first_bad = -1, first_r = SB_CSV_OK;

                if (row.reason != SB_CSV_OK)
                    continue;
                for (k = 0; k < 3; k++) {
                    const struct sb_csv_field *f = &row.field[k];
                    double v = 1.5, w = 2.5, x = 3.5;
                    int r = sb_csv_field_double(c, &row, k, &v);
                    int rp = sb_decimal_parse_padded(f->text, f->len, mark,
                                                     &w);

                    checked++;
                    ck_assert_int_eq(r, rp);
                    if (r == SB_CSV_OK)
                        ck_assert(bits_of(v) == bits_of(w));
                    else if (first_bad < 0) {
                        first_bad = k;
                        first_r = r;
                    }
                    if (f->len >= 1 && f->len <= SB_DECIMAL_SHORT_MAX &&
                        sb_decimal_parse_short_padded(f->text, f->len, mark,
                                                      &x)) {
                        char ref[32];
                        size_t j;

                        accepted++;
                        ck_assert_int_eq(r, SB_CSV_OK);
                        ck_assert_msg(bits_of(x) == bits_of(v),
                                      "'%.*s': inline %a, reader %a",
                                      (int)f->len, f->text, x, v);
                        for (j = 0; j < f->len; j++)
                            ref[j] = f->text[j] == mark ? '.' : f->text[j];
                        ref[j] = '\0';
                        ck_assert_msg(bits_of(strtod(ref, NULL)) ==
                                          bits_of(x),
                                      "'%s': inline %a", ref, x);
                    }
                }
                rall = sb_csv_fields_double(c, &row, cols, 3, all, &bad);
                ck_assert_int_eq(rall, first_r);
                if (first_bad >= 0)
                    ck_assert_int_eq(bad, first_bad);
            }
            sb_csv_close(c);
        }
    }
    free(data);
    /* the corpus must exercise both sides (where the inline parser
     * exists: without SSE2 it declines everything, decimal.h) */
    ck_assert_msg(SB_DECIMAL_SHORT_INLINE ? accepted > checked / 4 &&
                                                accepted < checked
                                          : accepted == 0,
                  "%d of %d fields took the inline path", accepted, checked);
}
END_TEST

/* ------------------------------------------------------------------ run */

static Suite *csvread_suite(void)
{
    Suite *s = suite_create("csvread");
    TCase *tc = tcase_create("core");

    tcase_set_timeout(tc, 120);
    tcase_add_test(tc, test_detect_comma_point);
    tcase_add_test(tc, test_detect_semicolon_comma);
    tcase_add_test(tc, test_detect_tab_and_space);
    tcase_add_test(tc, test_detect_rules);
    tcase_add_test(tc, test_bad_options);
    tcase_add_test(tc, test_quoted_fields);
    tcase_add_test(tc, test_bad_quotes);
    tcase_add_test(tc, test_python_csv_reference);
    tcase_add_test(tc, test_crlf_bom_no_final_newline);
    tcase_add_test(tc, test_ragged_and_bad_fields);
    tcase_add_test(tc, test_header_errors);
    tcase_add_test(tc, test_very_long_line);
    tcase_add_test(tc, test_long_quoted_rows_small_buffer);
    tcase_add_test(tc, test_buffer_boundaries);
    tcase_add_test(tc, test_short_parser_on_fields);
    suite_add_tcase(s, tc);
    return s;
}

/* Remove the scratch directory and the files the tests wrote in it. */
static void remove_tmpdir(void)
{
    DIR *d = opendir(tmpdir);
    struct dirent *e;
    char path[512];

    if (!d)
        return;
    while ((e = readdir(d)) != NULL) {
        if (strcmp(e->d_name, ".") == 0 || strcmp(e->d_name, "..") == 0)
            continue;
        snprintf(path, sizeof path, "%s/%s", tmpdir, e->d_name);
        unlink(path);
    }
    closedir(d);
    rmdir(tmpdir);
}

int main(void)
{
    SRunner *sr;
    int failed;

    snprintf(tmpdir, sizeof tmpdir, "/tmp/sb_csvtest_XXXXXX");
    if (!mkdtemp(tmpdir)) {
        perror("mkdtemp");
        return EXIT_FAILURE;
    }
    sr = srunner_create(csvread_suite());
    srunner_run_all(sr, CK_NORMAL);
    failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    remove_tmpdir();
    return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
