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

#include <stddef.h>

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

/* A short constant description of a result code ("not a number", ...). */
const char *sb_decimal_reason(int result);

#ifdef __cplusplus
}
#endif

#endif
