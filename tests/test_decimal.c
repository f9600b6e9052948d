/*
 * Tests of the decimal parser (src/lib/decimal.c).
 *
 * Reference: the C library's strtod (glibc, which rounds correctly to
 * nearest, ties to even, as ISO C 7.22.1.3 recommends for IEEE 754), called
 * on the same text with '.' as the decimal point in the "C" locale.  The
 * parser under test only calls strtod in its rare fallback and then on a
 * rewritten copy of the text; the fast path (Clinger 1990) and the rewriting
 * are what these tests check, bit for bit; sb_decimal_parse_padded (the
 * 8-bytes-at-a-time path) must agree with sb_decimal_parse on every text.
 *
 * A few values are also checked against exact doubles written as C99
 * hexadecimal literals, worked out by hand from IEEE 754 binary64:
 *   0.1                     -> 0x1.999999999999ap-4 (the nearest double)
 *   9007199254740993 = 2^53+1 halfway between 2^53 and 2^53+2, ties to even
 *                           -> 2^53
 *   2.2250738585072011e-308 lies below the midpoint
 *                           2.22507385850720113605...e-308 between the
 *                           largest subnormal 0x0.fffffffffffffp-1022 and
 *                           DBL_MIN, so it rounds to the largest subnormal
 *                           (the value that hung PHP and Java in 2011)
 *   1.7976931348623157e308  -> DBL_MAX = 0x1.fffffffffffffp+1023
 *   4.9e-324                -> 2^-1074 (least subnormal, 4.94e-324)
 *   1e22 = 2^22 * 5^22 exact; 1e23 is not exact and rounds to
 *                           0x1.52d02c7e14af6p+76 (value from memory,
 *                           confirmed by the strtod agreement below)
 */
#include <check.h>
#include <errno.h>
#include <float.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/decimal.h"

static uint64_t bits_of(double x)
{
    uint64_t u;
    memcpy(&u, &x, sizeof u);
    return u;
}

/* sb_decimal_parse_padded on a copy of s followed by SB_DECIMAL_PAD bytes
 * of digits, marks and exponents (the worst neighbours for a parser that
 * reads past the end): must give the same result as sb_decimal_parse. */
static int padded(const char *s, size_t len, char mark, double *out)
{
    static const char junk[] = "5.25e3,9876543210.0123456789e+7-1";
    char buf[2048 + SB_DECIMAL_PAD];
    size_t i;

    if (len > 2048)
        return -1;
    memcpy(buf, s, len);
    for (i = 0; i < SB_DECIMAL_PAD; i++)
        buf[len + i] = junk[(i + len) % (sizeof junk - 1)];
    return sb_decimal_parse_padded(buf, len, mark, out);
}

static double parse_ok(const char *s, char mark)
{
    double v = 12345.0;
    int rc = sb_decimal_parse(s, strlen(s), mark, &v);
    double w = 54321.0;
    ck_assert_msg(rc == SB_DECIMAL_OK, "'%s' (mark '%c') refused: %s", s,
                  mark, sb_decimal_reason(rc));
    ck_assert_int_eq(padded(s, strlen(s), mark, &w), SB_DECIMAL_OK);
    ck_assert_msg(bits_of(w) == bits_of(v), "'%s': padded %a, plain %a", s,
                  w, v);
    return v;
}

static void parse_bad(const char *s, char mark, int want)
{
    double v = 12345.0;
    int rc = sb_decimal_parse(s, strlen(s), mark, &v);
    ck_assert_msg(rc == want, "'%s' (mark '%c'): got %d (%s), want %d (%s)",
                  s, mark, rc, sb_decimal_reason(rc), want,
                  sb_decimal_reason(want));
    ck_assert_msg(v == 12345.0, "'%s': output written on failure", s);
    rc = padded(s, strlen(s), mark, &v);
    ck_assert_msg(rc == want, "'%s' padded: got %d, want %d", s, rc, want);
    ck_assert_msg(v == 12345.0, "'%s': padded output written on failure", s);
}

/* Compare with strtod on the '.' spelling of s.  Returns 1 when they agree
 * bit for bit (or both say the value overflows), 0 otherwise and prints
 * the first few disagreements. */
static int agree(const char *s, size_t len, char mark, long *shown)
{
    char ref[2048];
    char *endp;
    double r, v = 0.0;
    size_t i;
    int rc;

    if (len >= sizeof ref)
        return 0;
    for (i = 0; i < len; i++)
        ref[i] = s[i] == mark ? '.' : s[i];
    ref[len] = '\0';
    errno = 0;
    r = strtod(ref, &endp);
    if ((size_t)(endp - ref) != len) {
        if ((*shown)++ < 5)
            fprintf(stderr, "test corpus error: strtod stops in '%s'\n", ref);
        return 0;
    }
    rc = sb_decimal_parse(s, len, mark, &v);
    {
        double w = 0.0;
        int rp = padded(s, len, mark, &w);
        if (rp != rc || (rc == SB_DECIMAL_OK && bits_of(w) != bits_of(v))) {
            if ((*shown)++ < 5)
                fprintf(stderr, "padded differs on '%.*s': rc %d vs %d\n",
                        (int)len, s, rp, rc);
            return 0;
        }
    }
    if (isinf(r)) {
        if (rc == SB_DECIMAL_NONFINITE)
            return 1;
    } else if (rc == SB_DECIMAL_OK && bits_of(v) == bits_of(r)) {
        return 1;
    }
    if ((*shown)++ < 5)
        fprintf(stderr,
                "disagree on '%.*s' (mark '%c'): rc %d, %a vs strtod %a\n",
                (int)len, s, mark, rc, v, r);
    return 0;
}

START_TEST(test_exact_values)
{
    /* Exact doubles from IEEE 754 binary64, see the header comment. */
    ck_assert(bits_of(parse_ok("0.1", '.')) == bits_of(0x1.999999999999ap-4));
    ck_assert(bits_of(parse_ok("0,1", ',')) == bits_of(0x1.999999999999ap-4));
    ck_assert(parse_ok("9007199254740993", '.') == 0x1p53);
    ck_assert(parse_ok("9007199254740995", '.') == 0x1p53 + 4.0);
    ck_assert(bits_of(parse_ok("2.2250738585072011e-308", '.')) ==
              bits_of(0x0.fffffffffffffp-1022));
    ck_assert(parse_ok("2.2250738585072014e-308", '.') == DBL_MIN);
    ck_assert(parse_ok("1.7976931348623157e308", '.') == DBL_MAX);
    ck_assert(parse_ok("4.9e-324", '.') == 0x1p-1074);
    ck_assert(parse_ok("1e22", '.') == 1e22);
    ck_assert(parse_ok("1e23", '.') == 0x1.52d02c7e14af6p+76);
    ck_assert(parse_ok("-63.25", '.') == -63.25); /* exact in binary */
    ck_assert(parse_ok("512345,125", ',') == 512345.125);
    ck_assert(parse_ok("  -2.5e1\t", '.') == -25.0); /* blanks trimmed */
    ck_assert(parse_ok("+.5", '.') == 0.5);
    ck_assert(parse_ok("7.", '.') == 7.0);
    ck_assert(parse_ok("1E+2", '.') == 100.0);
    /* Signed zeros (IEEE 754: the sign of zero is kept). */
    ck_assert(bits_of(parse_ok("-0.0", '.')) == bits_of(-0.0));
    ck_assert(bits_of(parse_ok("-0,0", ',')) == bits_of(-0.0));
    ck_assert(bits_of(parse_ok("0.000", '.')) == bits_of(0.0));
    ck_assert(bits_of(parse_ok("-0e999999999999999", '.')) == bits_of(-0.0));
    /* Far below the least subnormal: zero, as strtod. */
    ck_assert(bits_of(parse_ok("1e-999999999999", '.')) == bits_of(0.0));
    ck_assert(bits_of(parse_ok("2.4703282292062327e-324", '.')) ==
              bits_of(0.0));
    ck_assert(parse_ok("2.4703282292062328e-324", '.') == 0x1p-1074);
}
END_TEST

START_TEST(test_rejects)
{
    parse_bad("", '.', SB_DECIMAL_EMPTY);
    parse_bad("   \t ", '.', SB_DECIMAL_EMPTY);
    parse_bad("-", '.', SB_DECIMAL_SYNTAX);
    parse_bad("+", '.', SB_DECIMAL_SYNTAX);
    parse_bad(".", '.', SB_DECIMAL_SYNTAX);
    parse_bad("-.e5", '.', SB_DECIMAL_SYNTAX);
    parse_bad("e5", '.', SB_DECIMAL_SYNTAX);
    parse_bad("1e", '.', SB_DECIMAL_SYNTAX);
    parse_bad("1e+", '.', SB_DECIMAL_SYNTAX);
    parse_bad("1.5.3", '.', SB_DECIMAL_SYNTAX);
    parse_bad("1..5", '.', SB_DECIMAL_SYNTAX);
    parse_bad("1 2", '.', SB_DECIMAL_SYNTAX);
    parse_bad("12abc", '.', SB_DECIMAL_SYNTAX);
    parse_bad("--1", '.', SB_DECIMAL_SYNTAX);
    parse_bad("+-1", '.', SB_DECIMAL_SYNTAX);
    parse_bad("0x1p3", '.', SB_DECIMAL_SYNTAX);
    parse_bad("0x10", '.', SB_DECIMAL_SYNTAX);
    parse_bad("1.5e3x", '.', SB_DECIMAL_SYNTAX);
    parse_bad("1d5", '.', SB_DECIMAL_SYNTAX);
    parse_bad("nan", '.', SB_DECIMAL_NONFINITE);
    parse_bad("NaN", '.', SB_DECIMAL_NONFINITE);
    parse_bad("inf", '.', SB_DECIMAL_NONFINITE);
    parse_bad("-Infinity", '.', SB_DECIMAL_NONFINITE);
    parse_bad("+INF", ',', SB_DECIMAL_NONFINITE);
    parse_bad("nan(123)", '.', SB_DECIMAL_SYNTAX);
    parse_bad("1e400", '.', SB_DECIMAL_NONFINITE);
    parse_bad("-1e999999999999", '.', SB_DECIMAL_NONFINITE);
    parse_bad("1.7976931348623159e308", '.', SB_DECIMAL_NONFINITE);
    /* The other decimal mark: a mixed-mark file gives this reason. */
    parse_bad("12,5", '.', SB_DECIMAL_MARK);
    parse_bad(",5", '.', SB_DECIMAL_MARK);
    parse_bad("12.5", ',', SB_DECIMAL_MARK);
    parse_bad("1.234,5", ',', SB_DECIMAL_MARK);
}
END_TEST

/* The parser must not read past len: give it an unterminated heap copy
 * (AddressSanitizer reports any overread), and a prefix of a longer text. */
START_TEST(test_bounds)
{
    const char *txt = "-1234.5678e-2";
    size_t n = strlen(txt);
    char *heap = malloc(n);
    double v = 0.0;

    ck_assert_ptr_nonnull(heap);
    memcpy(heap, txt, n);
    ck_assert_int_eq(sb_decimal_parse(heap, n, '.', &v), SB_DECIMAL_OK);
    ck_assert(v == -12.345678);
    ck_assert_int_eq(sb_decimal_parse(heap, 5, '.', &v), SB_DECIMAL_OK);
    ck_assert(v == -1234.0);
    ck_assert_int_eq(sb_decimal_parse(heap, 12, '.', &v), SB_DECIMAL_SYNTAX);
    ck_assert_int_eq(sb_decimal_parse(NULL, 0, '.', &v), SB_DECIMAL_EMPTY);
    free(heap);
}
END_TEST

/* Hard cases, each compared with strtod, with both decimal marks. */
START_TEST(test_hard_cases)
{
    static const char *cases[] = {
        "0.1", "0.2", "0.3", "9007199254740992", "9007199254740993",
        "9007199254740994", "9007199254740995", "2.2250738585072011e-308",
        "2.2250738585072012e-308", "2.2250738585072014e-308",
        "1.7976931348623157e308", "1.7976931348623158e308",
        "1.7976931348623159e308", "4.9e-324", "5e-324", "2e-324",
        "2.4703282292062327e-324", "2.4703282292062328e-324",
        /* the fast path limits: 10^22 exact, 10^23 not */
        "1e22", "1e23", "1e-22", "1e-23", "9007199254740992e22",
        "9007199254740993e22", "9007199254740992e-22", "9007199254740991e23",
        "123e30", "123e40", "4.5e37",
        /* m * 10^(e-22) above 2^53: not exact, must leave the fast path
         * (the 3... ones were found by a search where rounding twice is
         * wrong; strtod is the reference) */
        "1801439850948199e23", "3360472722792401e23", "3152310677426655e23",
        "900719925474099e24",
        /* 19 and 20 digit significands, around 2^64 */
        "1234567890123456789", "12345678901234567890",
        "9999999999999999999", "99999999999999999999",
        "18446744073709551615", "18446744073709551616",
        "1.234567890123456789e-5", "0.12345678901234567890123",
        /* many leading / trailing zeros */
        "0000000000000000000000000000000000001.5",
        "0.00000000000000000000000000000000000000000000000001",
        "1.50000000000000000000000000000000000000",
        "100000000000000000000000000000000000000000000000000e-50",
        "-0.0", "-0", "+0", "0e0",
        /* classic difficult conversions */
        "7.038531e-26", "9.5e-5", "8.98846567431158e307",
        "2.2250738585072009e-308", "3.4028235677973366e38",
        "1.00000000000000011102230246251565404236316680908203125",
        "1.00000000000000011102230246251565404236316680908203124",
        "1.00000000000000011102230246251565404236316680908203126",
        "179769313486231580793728971405301e276",
        "4.4501477170144023e-308", "1e-320", "-1e-400", "1e308", "1e309",
    };
    char buf[256];
    long shown = 0, bad = 0;
    size_t i, j, n;

    for (i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        n = strlen(cases[i]);
        ck_assert(n < sizeof buf);
        bad += !agree(cases[i], n, '.', &shown);
        memcpy(buf, cases[i], n + 1);
        for (j = 0; j < n; j++)
            if (buf[j] == '.')
                buf[j] = ',';
        bad += !agree(buf, n, ',', &shown);
    }
    ck_assert_msg(bad == 0, "%ld disagreements with strtod", bad);
}
END_TEST

/* Random decimal text of several kinds; returns its length. */
static size_t random_text(gsl_rng *r, char *s, char mark)
{
    unsigned long kind = gsl_rng_uniform_int(r, 100);
    size_t n = 0;
    unsigned long i, nd, pos;

    if (kind < 80 && gsl_rng_uniform_int(r, 2))
        s[n++] = gsl_rng_uniform_int(r, 4) ? '-' : '+';
    if (kind < 40) { /* survey-like: 1-7 integer digits, 0-6 decimals */
        nd = 1 + gsl_rng_uniform_int(r, 7);
        for (i = 0; i < nd; i++)
            s[n++] = (char)('0' + gsl_rng_uniform_int(r, 10));
        s[n++] = mark;
        nd = gsl_rng_uniform_int(r, 7);
        for (i = 0; i < nd; i++)
            s[n++] = (char)('0' + gsl_rng_uniform_int(r, 10));
        return n;
    }
    if (kind < 80) { /* 1-25 digits, mark anywhere, exponent +-340 */
        int long_digits = kind >= 76;
        nd = long_digits ? 20 + gsl_rng_uniform_int(r, 880)
                         : 1 + gsl_rng_uniform_int(r, 25);
        pos = gsl_rng_uniform_int(r, nd + 2); /* nd + 1: no mark */
        i = gsl_rng_uniform_int(r, 4);        /* leading zeros */
        while (i--)
            s[n++] = '0';
        for (i = 0; i < nd; i++) {
            if (i == pos)
                s[n++] = mark;
            s[n++] = (char)('0' + gsl_rng_uniform_int(r, 10));
        }
        if (pos == nd)
            s[n++] = mark;
        if (gsl_rng_uniform_int(r, 2)) {
            long e = (long)gsl_rng_uniform_int(r, 681) - 340;
            n += (size_t)sprintf(s + n, "%c%s%ld",
                                 gsl_rng_uniform_int(r, 2) ? 'e' : 'E',
                                 (e >= 0 && gsl_rng_uniform_int(r, 2)) ? "+"
                                                                         : "",
                                 e);
        }
        return n;
    }
    /* Near a halfway point between two adjacent doubles: its exact decimal
     * expansion (long double holds the 54-bit midpoint exactly on x86-64,
     * and glibc prints exact expansions), then just above or just below. */
    for (;;) {
        uint64_t u = ((uint64_t)gsl_rng_get(r) << 32) ^ gsl_rng_get(r);
        double d, up;
        long double mid;
        char *e;
        int k;

        u &= ~(UINT64_C(1) << 63);
        memcpy(&d, &u, sizeof d);
        if (!isfinite(d))
            continue;
        up = nextafter(d, INFINITY);
        if (!isfinite(up))
            continue;
        mid = ((long double)d + (long double)up) / 2.0L;
        k = sprintf(s, "%.780Le", mid);
        e = strchr(s, 'e');
        ck_assert_ptr_nonnull(e);
        {
            char exp_part[16];
            char *t = e;
            snprintf(exp_part, sizeof exp_part, "%s", e);
            while (t[-1] == '0')
                t--;
            switch (kind % 3) {
            case 0: /* exactly halfway */
                break;
            case 1: /* just above */
                memcpy(t, "000001", 6);
                t += 6;
                break;
            default: /* just below: ...5 -> ...4999999 */
                if (t[-1] == '5') {
                    t[-1] = '4';
                    memcpy(t, "999999", 6);
                    t += 6;
                }
                break;
            }
            k = (int)(t - s) + sprintf(t, "%s", exp_part);
        }
        if (mark != '.') {
            char *dot = strchr(s, '.');
            if (dot)
                *dot = mark;
        }
        return (size_t)k;
    }
}

static void random_corpus(char mark, long count, unsigned long seed)
{
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    char s[2048];
    long i, bad = 0, shown = 0;

    ck_assert_ptr_nonnull(r);
    gsl_rng_set(r, seed);
    for (i = 0; i < count; i++) {
        size_t n = random_text(r, s, mark);
        bad += !agree(s, n, mark, &shown);
    }
    gsl_rng_free(r);
    ck_assert_msg(bad == 0, "%ld of %ld random texts disagree with strtod",
                  bad, count);
}

/* The inline fast path of sb_decimal_parse_padded (decimal.h) takes
 * [sign] digits [mark digits], 1 to 15 digits and at most 16 bytes after
 * the sign; random texts around those limits (0-12 digits on each side,
 * an optional stray character, either mark) must give bit for bit
 * what strtod gives (or be refused when strtod would not read them all):
 * the "agree" check above, which also compares with sb_decimal_parse. */
static size_t short_text(gsl_rng *r, char *s, char mark)
{
    static const char stray[] = "+-.,eE x0";
    unsigned long i, ni = gsl_rng_uniform_int(r, 13),
                     nf = gsl_rng_uniform_int(r, 13);
    size_t n = 0;

    if (gsl_rng_uniform_int(r, 2))
        s[n++] = gsl_rng_uniform_int(r, 3) ? '-' : '+';
    for (i = 0; i < ni; i++)
        s[n++] = (char)('0' + gsl_rng_uniform_int(r, 10));
    if (gsl_rng_uniform_int(r, 5))
        s[n++] = mark;
    for (i = 0; i < nf; i++)
        s[n++] = (char)('0' + gsl_rng_uniform_int(r, 10));
    if (gsl_rng_uniform_int(r, 8) == 0) /* a stray character somewhere */
        s[gsl_rng_uniform_int(r, n + 1)] =
            stray[gsl_rng_uniform_int(r, sizeof stray - 1)];
    return n;
}

START_TEST(test_short_forms)
{
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    char s[64], ref[64];
    long i, bad = 0, shown = 0;

    ck_assert_ptr_nonnull(r);
    gsl_rng_set(r, 4242UL);
    for (i = 0; i < 400000; i++) {
        char mark = i % 2 ? ',' : '.';
        size_t n = short_text(r, s, mark), k;
        char *endp;
        double v = 0.0, w = 0.0;
        int rc = sb_decimal_parse(s, n, mark, &v);
        int rp = padded(s, n, mark, &w);

        for (k = 0; k < n; k++)
            ref[k] = s[k] == mark ? '.' : s[k];
        ref[n] = '\0';
        /* strtod reads it all and it is in our grammar (no blanks, no
         * exponent, no other mark): then it must agree bit for bit */
        if (n > 0 && !strpbrk(ref, " eExX") &&
            !memchr(s, mark == '.' ? ',' : '.', n) &&
            (strtod(ref, &endp), endp == ref + n))
            bad += !agree(s, n, mark, &shown);
        else if (rp != rc ||
                 (rc == SB_DECIMAL_OK && bits_of(v) != bits_of(w))) {
            if (shown++ < 5)
                fprintf(stderr, "padded differs on '%.*s': %d vs %d\n",
                        (int)n, s, rp, rc);
            bad++;
        }
    }
    gsl_rng_free(r);
    ck_assert_msg(bad == 0, "%ld short texts disagree", bad);
}
END_TEST

START_TEST(test_random_point)
{
    random_corpus('.', 1000000, 20240611UL);
}
END_TEST

START_TEST(test_random_comma)
{
    random_corpus(',', 200000, 77UL);
}
END_TEST

static Suite *decimal_suite(void)
{
    Suite *s = suite_create("decimal");
    TCase *tc = tcase_create("core");
    TCase *tr = tcase_create("random");

    tcase_add_test(tc, test_exact_values);
    tcase_add_test(tc, test_rejects);
    tcase_add_test(tc, test_bounds);
    tcase_add_test(tc, test_hard_cases);
    tcase_add_test(tc, test_short_forms);
    tcase_set_timeout(tr, 600);
    tcase_add_test(tr, test_random_point);
    tcase_add_test(tr, test_random_comma);
    suite_add_tcase(s, tc);
    suite_add_tcase(s, tr);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(decimal_suite());
    int failed;

    srunner_run_all(sr, CK_NORMAL);
    failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
