/*
 * swathbudget — decimal text -> double, correctly rounded, for either
 * decimal mark ('.' or ',').
 *
 * Survey exports write numbers in plain decimal form ("-63.25", "512345,12",
 * "1.5e-3").  The CSV reader parses millions of them, so this parser has a
 * fast path for the common short numbers and falls back to the C library's
 * strtod only for long or extreme ones; either way the result is the double
 * nearest to the decimal value (round half to even), i.e. the same double as
 * strtod gives for the same text written with '.'.
 *
 * Accepted form (after trimming spaces and tabs at both ends):
 *
 *     [+|-] digits [MARK [digits]] [(e|E) [+|-] digits]
 *     [+|-] MARK digits [(e|E) [+|-] digits]
 *
 * where MARK is the decimal mark given by the caller and at least one digit
 * is in the significand.  No thousands separators, no hexadecimal, no "nan"
 * or "inf".  Values too small for a double round to (signed) zero or to a
 * subnormal exactly as strtod rounds them; values beyond DBL_MAX are
 * rejected as non-finite.
 */
#ifndef SWATHBUDGET_DECIMAL_H
#define SWATHBUDGET_DECIMAL_H

#include <float.h>
#include <stddef.h>
#include <stdint.h>
#if defined(__SSE2__)
#include <emmintrin.h>
#endif

#ifdef __cplusplus
extern "C" {
#endif

/* Why a text is not an acceptable number (0 = it is). */
enum sb_decimal_result {
    SB_DECIMAL_OK = 0,
    SB_DECIMAL_EMPTY = 1,     /* nothing but spaces */
    SB_DECIMAL_SYNTAX = 2,    /* not a decimal number (letters, lone sign,
                                 two marks, trailing text, hex, ...) */
    SB_DECIMAL_MARK = 3,      /* uses the other decimal mark ('.' where ','
                                 is expected or the reverse) */
    SB_DECIMAL_NONFINITE = 4  /* "nan", "inf", "infinity", or a magnitude
                                 beyond the largest double */
};

/*
 * Parse the len bytes at s (no NUL needed; s may be NULL when len is 0) as a
 * decimal number whose decimal mark is decimal_mark ('.' or ',').
 * On SB_DECIMAL_OK stores the correctly rounded double in *out (a negative
 * zero for "-0", "-0.0", ...); otherwise leaves *out untouched and returns
 * the reason.  Does not allocate; reentrant; assumes the default
 * round-to-nearest floating-point mode.
 */
int sb_decimal_parse(const char *s, size_t len, char decimal_mark,
                     double *out);

/* Readable bytes a caller of sb_decimal_parse_padded guarantees after the
 * text (their content does not matter). */
#define SB_DECIMAL_PAD 32

/*
 * Same contract and same results as sb_decimal_parse, but the caller
 * guarantees that SB_DECIMAL_PAD bytes after s + len can be read (e.g. the
 * text sits in a buffer with that much slack at its end).  This lets the
 * common short forms ("-63.25") be converted 8 bytes at a time.
 */
int sb_decimal_parse_padded(const char *s, size_t len, char decimal_mark,
                            double *out);

/* ---- the short form, inline ----------------------------------------------
 *
 * Most fields of a survey export are short plain numbers ("-63.25",
 * "612794.689").  sb_decimal_parse_padded first tries this inline parser,
 * which callers in a hot loop (the CSV reader) may also call directly to
 * save a function call per field: it returns 1 with *out set when
 * [s, s+len) is [sign] digits [mark digits] with 1 to 15 digits in all
 * and at most 16 bytes after the sign ("-612794.689", "7", ".5", "5."),
 * and 0 otherwise -- then the caller must run sb_decimal_parse (or
 * _padded), which gives the same double for everything this one accepts.
 * Needs 1 <= len <= SB_DECIMAL_SHORT_MAX and SB_DECIMAL_PAD readable bytes
 * after s + len, like sb_decimal_parse_padded.
 *
 * SSE2, 16 bytes at once: one compare finds the non-digits, which must be
 * at most one, the decimal mark; the digits, the mark squeezed out, go
 * left-aligned after one zero into 16 digit places, zeros after them, and
 * are combined in pairs, quads and octets by multiply-adds (the idea of
 * the eight-digit SWAR conversion of simdjson / fast_float, D. Lemire and
 * co-authors, done on 16-bit lanes).  With n1 integer and n2 fraction
 * digits (n1 + n2 <= 15) that gives m = digits * 10^(15 - n1 - n2) below
 * 10^15 < 2^53, and the value is m / 10^(15 - n1): exact operands and one
 * correctly rounded division (W. D. Clinger, "How to read floating point
 * numbers accurately", PLDI 1990, section 4), so the double nearest the
 * text, as strtod gives it.  tests/test_decimal.c and tests/test_csvread.c
 * check it bit for bit against strtod.  Without SSE2 (or with x87
 * arithmetic) it always returns 0 and sb_decimal_parse does the work. */
#define SB_DECIMAL_SHORT_MAX 17u

#if defined(__GNUC__) && defined(__SSE2__) && defined(FLT_EVAL_METHOD) && \
    FLT_EVAL_METHOD == 0
#define SB_DECIMAL_SHORT_INLINE 1 /* 0: the inline parser always declines */

static inline int sb_decimal_parse_short_padded(const char *s, size_t len,
                                                char mark, double *out)
{
    static const double pow10_[16] = {1e0,  1e1,  1e2,  1e3,  1e4,  1e5,
                                      1e6,  1e7,  1e8,  1e9,  1e10, 1e11,
                                      1e12, 1e13, 1e14, 1e15};
    /* 16 bytes from ones_ + 16 - k: 0xff in bytes 0..k-1, 0 after */
    static const unsigned char ones_[32] = {
        255, 255, 255, 255, 255, 255, 255, 255, 255, 255, 255,
        255, 255, 255, 255, 255, 0,   0,   0,   0,   0,   0,
        0,   0,   0,   0,   0,   0,   0,   0,   0,   0};
    const char *p = s;
    const int neg = *p == '-';
    size_t rest, n1, ndig;
    unsigned nd;
    __m128i dig, before, x;
    uint64_t m;
    double v;

    p += neg | (*p == '+');
    rest = len - (size_t)(p - s); /* bytes after the sign */
    if (rest - 1 >= 16)
        return 0;
    dig = _mm_sub_epi8(_mm_loadu_si128((const __m128i *)(const void *)p),
                       _mm_set1_epi8('0'));
    /* bit i set: byte i of the text is not a digit (above 9 unsigned) */
    nd = ~(unsigned)_mm_movemask_epi8(_mm_cmpeq_epi8(
             _mm_subs_epu8(dig, _mm_set1_epi8(9)), _mm_setzero_si128())) &
         ((1u << rest) - 1u);
    if (!nd) { /* an integer */
        if (rest > 15)
            return 0;
        n1 = ndig = rest;
    } else {
        if (nd & (nd - 1)) /* two non-digits */
            return 0;
        n1 = (size_t)__builtin_ctz(nd);
        if (p[n1] != mark || rest == 1)
            return 0;
        ndig = rest - 1;
    }
    /* squeeze out the mark: bytes before it, then the rest moved down one */
    before = _mm_loadu_si128((const __m128i *)(const void *)(ones_ + 16 - n1));
    x = _mm_or_si128(_mm_and_si128(before, dig),
                     _mm_andnot_si128(before, _mm_srli_si128(dig, 1)));
    x = _mm_and_si128(x, _mm_loadu_si128((const __m128i *)(const void *)(
                             ones_ + 16 - ndig)));
    x = _mm_slli_si128(x, 1); /* a leading zero: 15 digits at most */
    /* pairs 10 a + b in 16-bit lanes, quads 100 p + q and octets
     * 10^4 q + r in 32-bit lanes */
    x = _mm_add_epi16(_mm_mullo_epi16(_mm_and_si128(x, _mm_set1_epi16(0xff)),
                                      _mm_set1_epi16(10)),
                      _mm_srli_epi16(x, 8));
    x = _mm_madd_epi16(x, _mm_set1_epi32(0x00010064));
    x = _mm_madd_epi16(_mm_packs_epi32(x, x), _mm_set1_epi32(0x00012710));
    m = (uint64_t)(uint32_t)_mm_cvtsi128_si32(x) * UINT64_C(100000000) +
        (uint32_t)_mm_cvtsi128_si32(_mm_srli_si128(x, 4));
    v = (double)(int64_t)m / pow10_[15 - n1];
    *out = neg ? -v : v;
    return 1;
}

#else
#define SB_DECIMAL_SHORT_INLINE 0

static inline int sb_decimal_parse_short_padded(const char *s, size_t len,
                                                char mark, double *out)
{
    (void)s;
    (void)len;
    (void)mark;
    (void)out;
    return 0;
}

#endif

/* A short constant description of a result code ("not a number", ...). */
const char *sb_decimal_reason(int result);

#ifdef __cplusplus
}
#endif

#endif
