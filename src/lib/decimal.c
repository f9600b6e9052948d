/*
 * Decimal text -> correctly rounded double (see include/swathbudget/decimal.h).
 *
 * Hand-rolled rather than calling strtod on every field because (1) strtod
 * needs a NUL-terminated copy, (2) it follows the locale's decimal point and
 * we must accept ',' or '.' as told, and (3) it accepts forms we must refuse
 * (hex, "nan", "inf").  Speed comes from Clinger's fast path (W. D. Clinger,
 * "How to read floating point numbers accurately", PLDI 1990, section 4):
 * when the decimal significand m is an integer exactly representable in a
 * double (m <= 2^53) and |e| <= 22 (10^e is then exact too), m * 10^e or
 * m / 10^e is ONE correctly rounded IEEE operation on exact operands, hence
 * the correctly rounded value of the decimal number.  Everything else goes to
 * strtod on a canonical, locale-free copy "DIGITSe[-]EXP" in a stack buffer.
 */
#include "swathbudget/decimal.h"

#include <errno.h>
#include <float.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

/* The fast path needs double arithmetic evaluated in double precision (not
 * x87 extended precision, which would round twice). */
#if defined(FLT_EVAL_METHOD) && FLT_EVAL_METHOD == 0
#define SB_DECIMAL_FAST 1
#else
#define SB_DECIMAL_FAST 0
#endif

/* 10^0 .. 10^22: every one is exactly representable in a double
 * (10^22 = 2^22 * 5^22 and 5^22 < 2^53). */
static const double exact_pow10[23] = {
    1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,  1e8,  1e9,  1e10, 1e11,
    1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};

static const uint64_t u64_pow10[20] = {
    UINT64_C(1),
    UINT64_C(10),
    UINT64_C(100),
    UINT64_C(1000),
    UINT64_C(10000),
    UINT64_C(100000),
    UINT64_C(1000000),
    UINT64_C(10000000),
    UINT64_C(100000000),
    UINT64_C(1000000000),
    UINT64_C(10000000000),
    UINT64_C(100000000000),
    UINT64_C(1000000000000),
    UINT64_C(10000000000000),
    UINT64_C(100000000000000),
    UINT64_C(1000000000000000),
    UINT64_C(10000000000000000),
    UINT64_C(100000000000000000),
    UINT64_C(1000000000000000000),
    UINT64_C(10000000000000000000)};

#define TWO_POW_53 (UINT64_C(1) << 53)

/* Significant digits kept for the strtod fallback.  The exact decimal
 * expansion of a point halfway between two adjacent doubles has at most 767
 * significant digits (a known bound, quoted from memory: the halfway
 * points near DBL_MIN are odd multiples of 2^-1075), so a number cut after
 * 800 digits, with a nonzero "sticky" digit appended when anything nonzero
 * was cut, lies on the same side of every halfway point as the full number
 * and rounds the same.  (The random test fails with 700.) */
#define KEEP_DIGITS 800

/* Saturation of the written exponent: far beyond any double's range, small
 * enough that sums with digit counts cannot overflow a long long. */
#define EXP_SATURATE 100000000LL

static int is_blank(char c)
{
    return c == ' ' || c == '\t';
}

static int is_digit(char c)
{
    return (unsigned)(c - '0') < 10u;
}

/* Case-insensitive: is [p, end) exactly the lower-case word w? */
static int is_word(const char *p, const char *end, const char *w)
{
    while (p < end && *w) {
        char c = *p;
        if (c >= 'A' && c <= 'Z')
            c = (char)(c - 'A' + 'a');
        if (c != *w)
            return 0;
        p++;
        w++;
    }
    return p == end && *w == '\0';
}

/* Rare path: build "DIGITSeEXP" from the validated significand text
 * [mb, me) (digits with at most one mark) and the written exponent, and let
 * strtod round it.  No decimal point in the copy, so the locale is
 * irrelevant. */
static double slow_value(const char *mb, const char *me, char mark,
                         long long written_exp)
{
    char buf[KEEP_DIGITS + 40];
    char tmp[24];
    int k = 0, sticky = 0, in_frac = 0, t = 0;
    long long scale = 0;
    unsigned long long a;
    const char *q;
    int saved_errno = errno;
    double v;

    for (q = mb; q < me; q++) {
        if (*q == mark) {
            in_frac = 1;
            continue;
        }
        if (k == 0 && *q == '0') { /* leading zero */
            if (in_frac)
                scale--;
            continue;
        }
        if (k < KEEP_DIGITS) {
            buf[k++] = *q;
            if (in_frac)
                scale--;
        } else {
            if (!in_frac)
                scale++;
            if (*q != '0')
                sticky = 1;
        }
    }
    if (k == 0)
        return 0.0;
    if (sticky) {
        buf[k++] = '1';
        scale--;
    }
    scale += written_exp;
    buf[k++] = 'e';
    if (scale < 0) {
        buf[k++] = '-';
        a = (unsigned long long)(-scale);
    } else {
        a = (unsigned long long)scale;
    }
    do {
        tmp[t++] = (char)('0' + (int)(a % 10u));
        a /= 10u;
    } while (a);
    while (t)
        buf[k++] = tmp[--t];
    buf[k] = '\0';
    v = strtod(buf, NULL);
    errno = saved_errno; /* ERANGE on underflow is not our business */
    return v;
}

int sb_decimal_parse(const char *s, size_t len, char decimal_mark,
                     double *out)
{
    const char mark = decimal_mark;
    const char other = mark == ',' ? '.' : ',';
    const char *p = s, *end, *mb, *me;
    uint64_t m = 0;
    int nd = 0;         /* significant digits held in m (at most 19) */
    int lost = 0;       /* a nonzero digit did not fit in m */
    long long ndig = 0; /* digits in the significand, zeros included */
    long long e10 = 0;  /* value = m * 10^(e10 + written exponent) */
    long long ex = 0;   /* written exponent, saturated */
    int neg = 0;
    double v;

    if (len == 0 || s == NULL)
        return SB_DECIMAL_EMPTY;
#if SB_DECIMAL_FAST
    /* Short plain numbers ("-63.25", "6123456.789"): at most 19 digits, so
     * m cannot overflow; no blanks, no exponent.  Anything else (or m above
     * 2^53) falls through to the general scan below. */
    if (len <= 19) {
        const char *q = s, *qe = s + len, *d0;
        uint64_t mm = 0;
        size_t nint, nfrac = 0;
        int qneg = 0;

        if (*q == '-' || *q == '+') {
            qneg = *q == '-';
            q++;
        }
        for (d0 = q; q < qe && is_digit(*q); q++)
            mm = mm * 10u + (uint64_t)(*q - '0');
        nint = (size_t)(q - d0);
        if (q < qe && *q == mark) {
            for (d0 = ++q; q < qe && is_digit(*q); q++)
                mm = mm * 10u + (uint64_t)(*q - '0');
            nfrac = (size_t)(q - d0);
        }
        if (q == qe && nint + nfrac > 0 && mm <= TWO_POW_53) {
            v = (double)mm; /* exact */
            if (nfrac)
                v /= exact_pow10[nfrac]; /* one rounding: Clinger 1990 */
            *out = qneg ? -v : v;
            return SB_DECIMAL_OK;
        }
    }
#endif
    end = s + len;
    while (p < end && is_blank(*p))
        p++;
    while (end > p && is_blank(end[-1]))
        end--;
    if (p == end)
        return SB_DECIMAL_EMPTY;

    if (*p == '+' || *p == '-') {
        neg = *p == '-';
        p++;
    }
    mb = p;
    for (; p < end && is_digit(*p); p++) {
        unsigned d = (unsigned)(*p - '0');
        ndig++;
        if (nd < 19) {
            if (m != 0 || d != 0) {
                m = m * 10u + d;
                nd++;
            }
        } else {
            e10++; /* integer digit beyond what m holds */
            if (d)
                lost = 1;
        }
    }
    if (p < end && *p == other)
        return SB_DECIMAL_MARK;
    if (p < end && *p == mark) {
        for (p++; p < end && is_digit(*p); p++) {
            unsigned d = (unsigned)(*p - '0');
            ndig++;
            if (nd < 19) {
                if (m != 0 || d != 0) {
                    m = m * 10u + d;
                    nd++;
                }
                e10--;
            } else if (d) {
                lost = 1;
            }
        }
    }
    me = p;
    if (ndig == 0) {
        if (is_word(p, end, "nan") || is_word(p, end, "inf") ||
            is_word(p, end, "infinity"))
            return SB_DECIMAL_NONFINITE;
        return SB_DECIMAL_SYNTAX;
    }
    if (p < end && (*p == 'e' || *p == 'E')) {
        int eneg = 0;
        p++;
        if (p < end && (*p == '+' || *p == '-')) {
            eneg = *p == '-';
            p++;
        }
        if (p == end || !is_digit(*p))
            return SB_DECIMAL_SYNTAX;
        for (; p < end && is_digit(*p); p++)
            if (ex < EXP_SATURATE)
                ex = ex * 10 + (*p - '0');
        if (eneg)
            ex = -ex;
    }
    if (p != end)
        return SB_DECIMAL_SYNTAX;

    if (nd == 0) { /* all digits zero */
        *out = neg ? -0.0 : 0.0;
        return SB_DECIMAL_OK;
    }
    e10 += ex;

    /* The value lies in [10^(nd+e10-1), 10^(nd+e10)). */
    if (nd + e10 - 1 >= 309) /* >= 1e309 > DBL_MAX */
        return SB_DECIMAL_NONFINITE;
    if (nd + e10 <= -324) { /* < 1e-324, below half the least subnormal */
        *out = neg ? -0.0 : 0.0;
        return SB_DECIMAL_OK;
    }

    if (SB_DECIMAL_FAST && !lost && m <= TWO_POW_53) {
        if (e10 >= 0 && e10 <= 22) {
            v = (double)m * exact_pow10[e10];
            *out = neg ? -v : v;
            return SB_DECIMAL_OK;
        }
        if (e10 < 0 && e10 >= -22) {
            v = (double)m / exact_pow10[-e10];
            *out = neg ? -v : v;
            return SB_DECIMAL_OK;
        }
        /* Clinger's extension: "12e30" = (12 * 10^8) * 10^22 when the
         * integer product is still exact. */
        if (e10 > 22 && e10 - 22 < 20 &&
            m <= TWO_POW_53 / u64_pow10[e10 - 22]) {
            v = (double)(m * u64_pow10[e10 - 22]) * exact_pow10[22];
            *out = neg ? -v : v;
            return SB_DECIMAL_OK;
        }
    }

    v = slow_value(mb, me, mark, ex);
    if (isinf(v))
        return SB_DECIMAL_NONFINITE;
    *out = neg ? -v : v;
    return SB_DECIMAL_OK;
}

int sb_decimal_parse_padded(const char *s, size_t len, char decimal_mark,
                            double *out)
{
    /* the short form inline (decimal.h), the rest in full */
    if (len - 1 < SB_DECIMAL_SHORT_MAX &&
        sb_decimal_parse_short_padded(s, len, decimal_mark, out))
        return SB_DECIMAL_OK;
    return sb_decimal_parse(s, len, decimal_mark, out);
}

const char *sb_decimal_reason(int result)
{
    switch (result) {
    case SB_DECIMAL_OK: return "valid number";
    case SB_DECIMAL_EMPTY: return "empty field";
    case SB_DECIMAL_SYNTAX: return "not a number";
    case SB_DECIMAL_MARK: return "wrong decimal mark";
    case SB_DECIMAL_NONFINITE: return "not a finite number";
    default: return "unknown result";
    }
}
