/*
 * swathbudget — stated values: "VALUE UNIT [TYPE]" -> SI value + standard
 * uncertainty, following the GUM (JCGM 100:2008, clause 4.3).
 *
 * A stated value is how a surveyor writes an uncertainty figure taken from a
 * data sheet or a calibration report: "0.02 deg sd", "5 cm 95%", "0.1 m res".
 * The type says what the figure means and fixes the conversion to a standard
 * uncertainty u and the distribution assumed for Monte Carlo draws:
 *
 *   sd   (default) one standard deviation        u = v          normal
 *   95%  95 % half-width of a normal interval   u = v / 1.96   normal
 *        (2-D horizontal figures: u = v / 2.4477 per axis)
 *   rms  root mean square of a zero-mean error   u = v          normal
 *   res  resolution step, full width             u = v / sqrt(12)  rectangular
 *   max  bound +/- v                             u = v / sqrt(3)   rectangular
 *
 * Units are grouped by dimension; a field accepts a set of dimensions (a
 * bit mask of SB_DIM_*) and a unit of any other dimension is an input error.
 * Unit and type names are case-sensitive ("Hz", "kHz", "ms" vs "Ms").
 *
 * With SB_STATED_2D (a horizontal position figure) only the 95 % type
 * changes meaning: it is then the radius of the 95 % circle, and u is the
 * per-axis standard deviation of a circular 2-D normal.  sd, rms, res and
 * max are taken as per-axis figures either way (a radial "DRMS" figure
 * must be divided by sqrt(2) by the user).
 */
#ifndef SWATHBUDGET_UNITS_H
#define SWATHBUDGET_UNITS_H

#include <stddef.h>

#include "swathbudget/error.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Dimensions, as bits so that a field can accept several. */
enum sb_dim {
    SB_DIM_NONE = 0,
    SB_DIM_LENGTH = 1u << 0, /* m cm mm                      -> m      */
    SB_DIM_ANGLE = 1u << 1,  /* deg arcmin arcsec rad mrad   -> rad    */
    SB_DIM_TIME = 1u << 2,   /* s ms us                      -> s      */
    SB_DIM_SPEED = 1u << 3,  /* m/s kn                       -> m/s    */
    SB_DIM_FREQ = 1u << 4,   /* Hz kHz                       -> Hz     */
    SB_DIM_RATIO = 1u << 5   /* % ppm (relative figures)     -> 1      */
};

/* What a stated figure means (JCGM 100:2008, 4.3). */
enum sb_utype {
    SB_UTYPE_SD = 0,
    SB_UTYPE_95 = 1,
    SB_UTYPE_RMS = 2,
    SB_UTYPE_RES = 3,
    SB_UTYPE_MAX = 4
};

/* Distribution implied by the type (used by Monte Carlo, JCGM 101 6.4). */
enum sb_dist {
    SB_DIST_NORMAL = 0,
    SB_DIST_RECT = 1
};

/* Coverage factors (IHO S-44 ed. 6.0.0 (2020) section 2 and JCGM 100:2008
 * G.3): 1.96 for a 1-D normal at 95 %; sqrt(-2 ln 0.05) = 2.4477 for the
 * radius of a circular 2-D normal at 95 % (S-44 rounds it to 2.45). */
#define SB_K95_1D 1.959963984540054
#define SB_K95_2D 2.447746830680816
#define SB_S44_K95_1D 1.96
#define SB_S44_K95_2D 2.45

/* Flags for the parsers. */
#define SB_STATED_2D 1u /* the figure is a 2-D horizontal one (95% -> /2.4477) */

#define SB_UNIT_NAME_MAX 8

struct sb_stated {
    double value;     /* the figure as written, converted to SI (m, rad, s,
                         m/s, Hz) or to a fraction for % and ppm */
    double u;         /* the standard uncertainty it implies, same unit */
    double written;   /* the number exactly as written, in its own unit */
    unsigned dim;     /* dimension of the unit written (one SB_DIM_* bit) */
    enum sb_utype type;
    enum sb_dist dist;
    char unit[SB_UNIT_NAME_MAX]; /* the unit as written, e.g. "cm" */
};

/*
 * Parse "VALUE UNIT [TYPE]" (TYPE defaults to sd).  Tokens are separated by
 * blanks; the unit may also follow the number directly ("5cm").  VALUE is a
 * plain decimal number (sign, digits, point, exponent); hexadecimal floats,
 * "nan" and "inf" are refused, and so is a number that overflows (1e999).
 * dims: the dimensions this field accepts (bit mask of SB_DIM_*).
 * flags: 0 or SB_STATED_2D.
 * The value must be finite and >= 0.
 * Returns SB_OK and fills *out, or SB_EINPUT (out untouched) with err->msg
 * filled as "what is wrong (what was expected)", e.g.
 *     unit 'ms' is a time (expected a length: m, cm, mm)
 * The position in err is left for the caller (who knows where the text came
 * from) to set with sb_error_at().  err may be NULL.
 */
int sb_stated_parse(const char *text, unsigned dims, unsigned flags,
                    struct sb_stated *out, struct sb_error *err);

/* The same from separate parts, as given by a YAML map
 * {value: V, unit: U, type: T}; type may be NULL (sd).  unit NULL or ""
 * is an input error (missing unit), as is a non-finite or negative value. */
int sb_stated_from_parts(double value, const char *unit, const char *type,
                         unsigned dims, unsigned flags, struct sb_stated *out,
                         struct sb_error *err);

/*
 * Parse a plain quantity "VALUE UNIT" (no type; the value may be negative,
 * e.g. a lever-arm coordinate) into SI (*si).  dims as above.  *dim_out
 * (may be NULL) receives the dimension of the unit written.  Same number
 * rules and errors as sb_stated_parse, except that a negative value is
 * accepted and anything after the unit is an error.  Outputs untouched on
 * error.
 */
int sb_quantity_parse(const char *text, unsigned dims, double *si,
                      unsigned *dim_out, struct sb_error *err);

/* Look a unit up (exact, case-sensitive name).  *dim (may be NULL) receives
 * its dimension bit, *to_si (may be NULL) the factor that converts a number
 * in that unit to SI (or to a fraction for % and ppm).
 * Returns SB_OK, or SB_EINPUT for an unknown unit (no message: the caller,
 * who knows which dimensions the field accepts, words it, see
 * sb_dim_describe). */
int sb_unit_lookup(const char *unit, unsigned *dim, double *to_si);

/* Enough room for sb_dim_describe() of any mask. */
#define SB_DIM_DESCRIBE_MAX 256

/* Describe a dimension mask with the units it accepts, for messages, e.g.
 * "a length: m, cm, mm" or "a length: m, cm, mm; or an angle: deg, ...".
 * Writes into buf (n bytes, SB_DIM_DESCRIBE_MAX is always enough; the text
 * is truncated, still terminated, if n is smaller) and returns buf, so the
 * call is thread-safe.  dims == 0 gives "no unit". */
const char *sb_dim_describe(unsigned dims, char *buf, size_t n);

/* The name of one dimension bit with its article, e.g. "a length",
 * "an angle"; "an unknown dimension" for anything else. */
const char *sb_dim_name(unsigned dim);

/* Look a type name up ("sd", "95%", "rms", "res", "max"; exact).
 * Returns SB_OK and sets *t, or SB_EINPUT (no message) if unknown. */
int sb_utype_lookup(const char *name, enum sb_utype *t);

/* Name of a type as written ("sd", "95%", ...); "?" if out of range. */
const char *sb_utype_name(enum sb_utype t);

#ifdef __cplusplus
}
#endif

#endif
