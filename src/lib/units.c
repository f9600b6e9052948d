/*
 * Stated values and unit tables (see include/swathbudget/units.h).
 *
 * This is the only place (with the report writers) where a number meets a
 * unit other than SI.  Conversions of a stated figure to a standard
 * uncertainty follow the GUM, JCGM 100:2008:
 *   - 4.3.7: a figure stated as a 95 % interval of a normal distribution is
 *     divided by its coverage factor 1.96 (Table G.1 gives 1.960 for 95 %);
 *   - 4.3.7 (same clause) for sd and rms: a stated standard deviation is u;
 *   - 4.3.9 (rectangular distribution): a bound +/- a gives u = a / sqrt(3)
 *     (eq. 7); a resolution step delta (full width of the rectangle) gives
 *     u = delta / sqrt(12), see also F.2.2.1.
 * A 2-D horizontal 95 % figure is the radius of the circle holding 95 % of
 * a circular bivariate normal: P(R <= r) = 1 - exp(-r^2 / (2 sigma^2))
 * (Rayleigh distribution), so r = sigma * sqrt(-2 ln 0.05) = 2.4477 sigma;
 * IHO S-44 ed. 6.0.0 (2020) section 2 rounds it to 2.45.
 */
#include "swathbudget/units.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* pi to double precision; M_PI is not in strict C11 + POSIX. */
#define SB_UNITS_PI 3.14159265358979323846

struct unit_def {
    const char *name;
    unsigned dim;
    double to_si;
};

/* Factors are exact by definition of the unit:
 *   1 deg = pi/180 rad, 1 arcmin = deg/60, 1 arcsec = deg/3600 (SI Brochure,
 *   9th ed. 2019, Table 8, units accepted for use with the SI);
 *   1 kn = 1 nautical mile per hour = 1852 m / 3600 s (international
 *   nautical mile, SI Brochure 8th ed. Table 8). */
static const struct unit_def unit_table[] = {
    {"m", SB_DIM_LENGTH, 1.0},
    {"cm", SB_DIM_LENGTH, 1e-2},
    {"mm", SB_DIM_LENGTH, 1e-3},
    {"deg", SB_DIM_ANGLE, SB_UNITS_PI / 180.0},
    {"arcmin", SB_DIM_ANGLE, SB_UNITS_PI / 10800.0},
    {"arcsec", SB_DIM_ANGLE, SB_UNITS_PI / 648000.0},
    {"rad", SB_DIM_ANGLE, 1.0},
    {"mrad", SB_DIM_ANGLE, 1e-3},
    {"s", SB_DIM_TIME, 1.0},
    {"ms", SB_DIM_TIME, 1e-3},
    {"us", SB_DIM_TIME, 1e-6},
    {"m/s", SB_DIM_SPEED, 1.0},
    {"kn", SB_DIM_SPEED, 1852.0 / 3600.0},
    {"Hz", SB_DIM_FREQ, 1.0},
    {"kHz", SB_DIM_FREQ, 1e3},
    {"%", SB_DIM_RATIO, 1e-2},
    {"ppm", SB_DIM_RATIO, 1e-6},
};

#define N_UNITS (sizeof unit_table / sizeof unit_table[0])

struct dim_def {
    unsigned dim;
    const char *name; /* with its article, for "is a time" */
};

static const struct dim_def dim_table[] = {
    {SB_DIM_LENGTH, "a length"},   {SB_DIM_ANGLE, "an angle"},
    {SB_DIM_TIME, "a time"},       {SB_DIM_SPEED, "a speed"},
    {SB_DIM_FREQ, "a frequency"},  {SB_DIM_RATIO, "a ratio"},
};

#define N_DIMS (sizeof dim_table / sizeof dim_table[0])

static const char *const utype_names[] = {"sd", "95%", "rms", "res", "max"};

#define TYPES_EXPECTED "sd, 95%, rms, res or max"

int sb_unit_lookup(const char *unit, unsigned *dim, double *to_si)
{
    size_t i;

    if (!unit)
        return SB_EINPUT;
    for (i = 0; i < N_UNITS; i++) {
        if (strcmp(unit, unit_table[i].name) == 0) {
            if (dim)
                *dim = unit_table[i].dim;
            if (to_si)
                *to_si = unit_table[i].to_si;
            return SB_OK;
        }
    }
    return SB_EINPUT;
}

const char *sb_dim_name(unsigned dim)
{
    size_t i;

    for (i = 0; i < N_DIMS; i++)
        if (dim_table[i].dim == dim)
            return dim_table[i].name;
    return "an unknown dimension";
}

/* Append text to buf (size n, current length *len), never overflowing. */
static void append(char *buf, size_t n, size_t *len, const char *text)
{
    size_t k = strlen(text);

    if (*len + 1 >= n)
        return;
    if (k > n - 1 - *len)
        k = n - 1 - *len;
    memcpy(buf + *len, text, k);
    *len += k;
    buf[*len] = '\0';
}

const char *sb_dim_describe(unsigned dims, char *buf, size_t n)
{
    size_t len = 0, d, u;
    int first_dim = 1;

    if (!buf || n == 0)
        return buf;
    buf[0] = '\0';
    for (d = 0; d < N_DIMS; d++) {
        int first_unit = 1;

        if (!(dims & dim_table[d].dim))
            continue;
        append(buf, n, &len, first_dim ? "" : "; or ");
        append(buf, n, &len, dim_table[d].name);
        append(buf, n, &len, ": ");
        for (u = 0; u < N_UNITS; u++) {
            if (unit_table[u].dim != dim_table[d].dim)
                continue;
            append(buf, n, &len, first_unit ? "" : ", ");
            append(buf, n, &len, unit_table[u].name);
            first_unit = 0;
        }
        first_dim = 0;
    }
    if (first_dim)
        append(buf, n, &len, "no unit");
    return buf;
}

int sb_utype_lookup(const char *name, enum sb_utype *t)
{
    size_t i;

    if (!name)
        return SB_EINPUT;
    for (i = 0; i < sizeof utype_names / sizeof utype_names[0]; i++) {
        if (strcmp(name, utype_names[i]) == 0) {
            if (t)
                *t = (enum sb_utype)i;
            return SB_OK;
        }
    }
    return SB_EINPUT;
}

const char *sb_utype_name(enum sb_utype t)
{
    if ((unsigned)t < sizeof utype_names / sizeof utype_names[0])
        return utype_names[t];
    return "?";
}

/* ---- tokenising ---------------------------------------------------- */

static int is_blank(char c)
{
    return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\f' ||
           c == '\v';
}

static int is_digit(char c)
{
    return c >= '0' && c <= '9';
}

/* Length of the plain decimal number at s (sign, digits, optional point
 * and fraction, optional exponent), 0 if there is none.  This is checked
 * by hand before strtod because strtod would also take hexadecimal
 * floats, "nan" and "inf", which have no place in a data sheet figure. */
static size_t decimal_length(const char *s)
{
    size_t i = 0, digits = 0;

    if (s[i] == '+' || s[i] == '-')
        i++;
    while (is_digit(s[i])) {
        i++;
        digits++;
    }
    if (s[i] == '.') {
        i++;
        while (is_digit(s[i])) {
            i++;
            digits++;
        }
    }
    if (digits == 0)
        return 0;
    if (s[i] == 'e' || s[i] == 'E') {
        size_t j = i + 1;

        if (s[j] == '+' || s[j] == '-')
            j++;
        if (is_digit(s[j])) {
            while (is_digit(s[j]))
                j++;
            i = j;
        }
    }
    return i;
}

/* Copy the blank-free token at *p into tok (size n, truncated but
 * terminated) and advance *p past it and the blanks after it.  Returns 0,
 * or -1 if the token did not fit (a truncated number would be read as a
 * different number without a word, so callers refuse it). */
static int next_token(const char **p, char *tok, size_t n)
{
    const char *s = *p;
    size_t k = 0;
    int fit = 0;

    while (*s && !is_blank(*s)) {
        if (k + 1 < n)
            tok[k++] = *s;
        else
            fit = -1;
        s++;
    }
    tok[k] = '\0';
    while (is_blank(*s))
        s++;
    *p = s;
    return fit;
}

#define TOO_LONG(tok)                                                       \
    sb_error_set(err, SB_EINPUT, NULL, 0, 0,                                \
                 "'%.16s...' is too long (expected a word of at most %d "   \
                 "characters)",                                             \
                 (tok), TOKEN_MAX - 1)

/* Does tok spell a non-finite number or a hexadecimal one? Used only to
 * word the message better than "not a number". */
static const char *bad_number_reason(const char *tok)
{
    const char *s = tok;
    char low[16];
    size_t i;

    if (*s == '+' || *s == '-')
        s++;
    for (i = 0; i + 1 < sizeof low && s[i]; i++)
        low[i] = (char)((s[i] >= 'A' && s[i] <= 'Z') ? s[i] - 'A' + 'a' : s[i]);
    low[i] = '\0';
    if (low[0] == '0' && low[1] == 'x')
        return "hexadecimal number";
    if (strncmp(low, "nan", 3) == 0 || strncmp(low, "inf", 3) == 0)
        return "non-finite number";
    return NULL;
}

#define TOKEN_MAX 64

/* Copy a known unit name (all shorter than SB_UNIT_NAME_MAX) into dst. */
static void copy_name(char *dst, const char *src)
{
    size_t k = strlen(src);

    if (k > SB_UNIT_NAME_MAX - 1)
        k = SB_UNIT_NAME_MAX - 1;
    memcpy(dst, src, k);
    dst[k] = '\0';
}

/*
 * The common reader: number, unit, then the rest (*rest points at the first
 * non-blank after the unit).  On success *num is the number as written,
 * *dim and *to_si describe the unit, unit_out (SB_UNIT_NAME_MAX) its name.
 */
static int read_value_unit(const char *text, unsigned dims, const char *form,
                           double *num, unsigned *dim, double *to_si,
                           char *unit_out, const char **rest,
                           struct sb_error *err)
{
    const char *p = text;
    char tok[TOKEN_MAX], numtext[TOKEN_MAX], unit[TOKEN_MAX];
    char expect[SB_DIM_DESCRIBE_MAX];
    size_t nlen;
    double v;
    char *end;

    sb_dim_describe(dims, expect, sizeof expect);
    if (!text)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "missing value (expected %s)", form);
    while (is_blank(*p))
        p++;
    if (!*p)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "empty value (expected %s)", form);

    if (next_token(&p, tok, sizeof tok))
        return TOO_LONG(tok);
    nlen = decimal_length(tok);
    if (nlen == 0 || (tok[nlen] && sb_unit_lookup(tok + nlen, NULL, NULL))) {
        const char *why = bad_number_reason(tok);

        if (why)
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "%s '%s' not accepted (expected a finite "
                                "decimal number, e.g. 0.05)",
                                why, tok);
        if (nlen == 0)
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "'%s' is not a number (expected %s)", tok,
                                form);
        /* A number glued to something that is not a unit. */
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "unknown unit '%s' (expected %s)", tok + nlen,
                            expect);
    }
    memcpy(numtext, tok, nlen);
    numtext[nlen] = '\0';
    errno = 0;
    v = strtod(numtext, &end);
    if (*end != '\0')
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "'%s' is not a number (expected %s)", numtext,
                            form);
    if (!isfinite(v))
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "number '%s' is too large (expected a finite "
                            "number)",
                            numtext);

    if (tok[nlen]) {
        snprintf(unit, sizeof unit, "%s", tok + nlen);
    } else {
        if (!*p)
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "missing unit after '%s' (expected %s)",
                                numtext, expect);
        if (next_token(&p, unit, sizeof unit))
            return TOO_LONG(unit);
    }
    if (sb_unit_lookup(unit, dim, to_si) != SB_OK)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "unknown unit '%s' (expected %s)", unit, expect);
    if (!(*dim & dims))
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "unit '%s' is %s (expected %s)", unit,
                            sb_dim_name(*dim), expect);
    copy_name(unit_out, unit);
    *num = v;
    *rest = p;
    return SB_OK;
}

/* Fill *out from checked parts: u from the type (JCGM 100:2008 4.3). */
static void fill_stated(double written, unsigned dim, double to_si,
                        const char *unit, enum sb_utype type, unsigned flags,
                        struct sb_stated *out)
{
    double v = written * to_si;

    if (v == 0.0)
        v = 0.0; /* no "-0" in reports */
    out->written = written == 0.0 ? 0.0 : written;
    out->value = v;
    out->dim = dim;
    out->type = type;
    copy_name(out->unit, unit);
    switch (type) {
    case SB_UTYPE_95:
        /* 1-D: normal quantile 1.96 (JCGM 100:2008 4.3.7, G.1.3);
         * 2-D circular radius: sqrt(-2 ln 0.05) (Rayleigh, see top). */
        out->u = v / ((flags & SB_STATED_2D) ? SB_K95_2D : SB_K95_1D);
        out->dist = SB_DIST_NORMAL;
        break;
    case SB_UTYPE_RES:
        /* rectangle of full width delta: u = delta / sqrt(12)
         * (JCGM 100:2008 4.3.9 with a = delta/2; F.2.2.1). */
        out->u = v / sqrt(12.0);
        out->dist = SB_DIST_RECT;
        break;
    case SB_UTYPE_MAX:
        /* rectangle +/- a: u = a / sqrt(3) (JCGM 100:2008 4.3.9, eq. 7). */
        out->u = v / sqrt(3.0);
        out->dist = SB_DIST_RECT;
        break;
    case SB_UTYPE_RMS: /* zero-mean error: rms equals the sd */
    case SB_UTYPE_SD:
    default:
        out->u = v;
        out->dist = SB_DIST_NORMAL;
        break;
    }
}

#define STATED_FORM "VALUE UNIT [TYPE], e.g. '0.05 m 95%'"
#define QUANTITY_FORM "VALUE UNIT, e.g. '-1.25 m'"

int sb_stated_parse(const char *text, unsigned dims, unsigned flags,
                    struct sb_stated *out, struct sb_error *err)
{
    double num, to_si;
    unsigned dim;
    char unit[SB_UNIT_NAME_MAX];
    const char *rest;
    enum sb_utype type = SB_UTYPE_SD;
    int rc;

    rc = read_value_unit(text, dims, STATED_FORM, &num, &dim, &to_si, unit,
                         &rest, err);
    if (rc != SB_OK)
        return rc;
    if (num < 0.0)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "negative uncertainty %g %s (expected a value "
                            ">= 0)",
                            num, unit);
    if (*rest) {
        char tok[TOKEN_MAX];

        if (next_token(&rest, tok, sizeof tok))
            return TOO_LONG(tok);
        if (sb_utype_lookup(tok, &type) != SB_OK)
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "unknown uncertainty type '%s' (expected %s)",
                                tok, TYPES_EXPECTED);
        if (*rest) {
            (void)next_token(&rest, tok, sizeof tok); /* message only */
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "unexpected '%s' after the type (expected %s)",
                                tok, STATED_FORM);
        }
    }
    if (out)
        fill_stated(num, dim, to_si, unit, type, flags, out);
    return SB_OK;
}

int sb_stated_from_parts(double value, const char *unit, const char *type,
                         unsigned dims, unsigned flags, struct sb_stated *out,
                         struct sb_error *err)
{
    char expect[SB_DIM_DESCRIBE_MAX];
    unsigned dim;
    double to_si;
    enum sb_utype t = SB_UTYPE_SD;

    sb_dim_describe(dims, expect, sizeof expect);
    if (!isfinite(value))
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "non-finite value (expected a finite number "
                            ">= 0)");
    if (value < 0.0)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "negative uncertainty %g (expected a value >= 0)",
                            value);
    if (!unit || !*unit)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "missing unit (expected %s)", expect);
    if (sb_unit_lookup(unit, &dim, &to_si) != SB_OK)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "unknown unit '%.64s' (expected %s)", unit,
                            expect);
    if (!(dim & dims))
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "unit '%s' is %s (expected %s)", unit,
                            sb_dim_name(dim), expect);
    if (type && sb_utype_lookup(type, &t) != SB_OK)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "unknown uncertainty type '%.64s' (expected %s)",
                            type, TYPES_EXPECTED);
    if (out)
        fill_stated(value, dim, to_si, unit, t, flags, out);
    return SB_OK;
}

int sb_quantity_parse(const char *text, unsigned dims, double *si,
                      unsigned *dim_out, struct sb_error *err)
{
    double num, to_si;
    unsigned dim;
    char unit[SB_UNIT_NAME_MAX];
    const char *rest;
    int rc;

    rc = read_value_unit(text, dims, QUANTITY_FORM, &num, &dim, &to_si, unit,
                         &rest, err);
    if (rc != SB_OK)
        return rc;
    if (*rest) {
        char tok[TOKEN_MAX];

        (void)next_token(&rest, tok, sizeof tok); /* message only */
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "unexpected '%s' after the unit (expected %s)",
                            tok, QUANTITY_FORM);
    }
    if (si) {
        double v = num * to_si;

        *si = v == 0.0 ? 0.0 : v;
    }
    if (dim_out)
        *dim_out = dim;
    return SB_OK;
}
