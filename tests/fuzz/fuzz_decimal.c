/*
 * libFuzzer differential target: the fast decimal parser (decimal.h)
 * against the C library's strtod, which is correctly rounded in glibc.
 *
 * Byte 0 chooses the decimal mark (bit 0: '.' or ','); the rest is the
 * text.  Checks, following the contract in decimal.h:
 *   - sb_decimal_parse and sb_decimal_parse_padded give the same result
 *     code and the same bits;
 *   - when the (trimmed) text matches the documented grammar, strtod on
 *     the same text written with '.' consumes all of it, and the parser
 *     returns exactly strtod's double (same bits, sign of zero included),
 *     or SB_DECIMAL_NONFINITE where strtod overflows to infinity;
 *   - when the text does not match the grammar, the parser refuses it.
 */
#include "fuzz_common.h" /* first: it sets _GNU_SOURCE for memfd */

#include <errno.h>
#include <math.h>

#include "swathbudget/decimal.h"

/* The grammar of decimal.h, written independently of the parser:
 *   [+|-] digits [MARK [digits]] [(e|E) [+|-] digits]
 *   [+|-] MARK digits [(e|E) [+|-] digits]
 * on the text with spaces and tabs trimmed at both ends. */
static int matches_grammar(const char *s, size_t n, char mark)
{
    size_t i = 0, int_digits = 0, frac_digits = 0, exp_digits = 0;

    if (i < n && (s[i] == '+' || s[i] == '-'))
        i++;
    while (i < n && s[i] >= '0' && s[i] <= '9')
        i++, int_digits++;
    if (i < n && s[i] == mark) {
        i++;
        while (i < n && s[i] >= '0' && s[i] <= '9')
            i++, frac_digits++;
    }
    if (int_digits + frac_digits == 0)
        return 0;
    if (i < n && (s[i] == 'e' || s[i] == 'E')) {
        i++;
        if (i < n && (s[i] == '+' || s[i] == '-'))
            i++;
        while (i < n && s[i] >= '0' && s[i] <= '9')
            i++, exp_digits++;
        if (exp_digits == 0)
            return 0;
    }
    return i == n;
}

static int same_bits(double a, double b)
{
    return memcmp(&a, &b, sizeof a) == 0;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char mark, *text, *padded, *c_text, *end;
    const char *s;
    size_t n, i;
    double a = 1234.5, b = 1234.5, ref;
    int ra, rb;

    if (size < 1 || size > 4096)
        return 0;
    mark = (data[0] & 1u) ? ',' : '.';
    n = size - 1;
    text = fuzz_strndup(data + 1, n);   /* exact length, NUL after */

    ra = sb_decimal_parse(text, n, mark, &a);
    padded = malloc(n + SB_DECIMAL_PAD);
    if (!padded)
        abort();
    if (n)
        memcpy(padded, text, n);
    memset(padded + n, '7', SB_DECIMAL_PAD); /* digits: must not be read as
                                                 part of the number */
    rb = sb_decimal_parse_padded(padded, n, mark, &b);
    FUZZ_ASSERT(ra == rb);
    FUZZ_ASSERT(ra >= SB_DECIMAL_OK && ra <= SB_DECIMAL_NONFINITE);
    FUZZ_ASSERT(same_bits(a, b));
    if (ra != SB_DECIMAL_OK)
        FUZZ_ASSERT(a == 1234.5); /* untouched on failure */

    /* trim spaces and tabs */
    s = text;
    while (n && (*s == ' ' || *s == '\t'))
        s++, n--;
    while (n && (s[n - 1] == ' ' || s[n - 1] == '\t'))
        n--;

    if (!matches_grammar(s, n, mark)) {
        FUZZ_ASSERT(ra != SB_DECIMAL_OK);
        if (n == 0)
            FUZZ_ASSERT(ra == SB_DECIMAL_EMPTY);
    } else {
        c_text = fuzz_strndup((const uint8_t *)s, n);
        for (i = 0; i < n; i++)
            if (c_text[i] == mark)
                c_text[i] = '.';
        errno = 0;
        ref = strtod(c_text, &end);
        FUZZ_ASSERT(end == c_text + n);
        if (isinf(ref))
            FUZZ_ASSERT(ra == SB_DECIMAL_NONFINITE);
        else {
            FUZZ_ASSERT(ra == SB_DECIMAL_OK);
            FUZZ_ASSERT(same_bits(a, ref));
        }
        free(c_text);
    }
    free(padded);
    free(text);
    return 0;
}
