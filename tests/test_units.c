/*
 * Tests of stated values and units (src/lib/units.c).
 *
 * Every expected value is worked out here from its definition, not taken
 * from the program:
 *   - unit factors: SI Brochure (BIPM, 9th ed. 2019) prefixes and Table 8
 *     (non-SI units accepted for use with the SI: degree = pi/180 rad,
 *     minute = 1/60 degree, second = 1/3600 degree); international nautical
 *     mile = 1852 m exactly, knot = 1 nautical mile per hour;
 *     % = 1/100, ppm = 1e-6 (parts per million, common practice).
 *   - type conversions: GUM, JCGM 100:2008 4.3.7 (normal, 95 % half-width /
 *     1.96, Table G.1), 4.3.9 eq. (7) (rectangular +/- a: a / sqrt 3) and
 *     F.2.2.1 (resolution step delta: delta / sqrt 12).
 *   - 2-D 95 %: radius of a circular bivariate normal containing 95 %,
 *     from the Rayleigh distribution P(R <= r) = 1 - exp(-r^2 / 2 sigma^2),
 *     so r / sigma = sqrt(-2 ln 0.05); IHO S-44 ed. 6.0.0 section 2 writes
 *     2.45.
 */
#include <check.h>
#include <gsl/gsl_cdf.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/units.h"

#define PI 3.14159265358979323846
#define REL 1e-15

/* |a - b| <= rel * |b| (plus a tiny absolute floor for zero). */
#define ck_rel(a, b, rel)                                                   \
    ck_assert_double_eq_tol((a), (b), (rel) * fabs(b) + 1e-300)

static struct sb_stated parse_ok(const char *text, unsigned dims,
                                 unsigned flags)
{
    struct sb_stated s;
    struct sb_error err;
    int rc;

    memset(&s, 0, sizeof s);
    sb_error_clear(&err);
    rc = sb_stated_parse(text, dims, flags, &s, &err);
    ck_assert_msg(rc == SB_OK, "'%s': rc %d, %s", text, rc, err.msg);
    return s;
}

/* Parse must fail with SB_EINPUT and a message holding `want` and the
 * "(expected ...)" tail. */
static void parse_bad(const char *text, unsigned dims, const char *want)
{
    struct sb_stated s;
    struct sb_error err;
    size_t n;
    int rc;

    memset(&s, 0x5a, sizeof s);
    sb_error_clear(&err);
    rc = sb_stated_parse(text, dims, 0, &s, &err);
    ck_assert_msg(rc == SB_EINPUT, "'%s' accepted (rc %d)", text, rc);
    ck_assert_msg(strstr(err.msg, want) != NULL, "'%s': message '%s' lacks '%s'",
                  text, err.msg, want);
    ck_assert_msg(strstr(err.msg, "(expected ") != NULL,
                  "'%s': message '%s' does not say what was expected", text,
                  err.msg);
    n = strlen(err.msg);
    ck_assert_msg(n > 0 && err.msg[n - 1] == ')', "'%s': '%s'", text, err.msg);
    ck_assert_msg(strchr(err.msg, '\n') == NULL, "multi-line message");
    /* the output is left untouched on error */
    ck_assert_int_eq(((unsigned char *)&s)[0], 0x5a);
}

/* ---- every unit ---------------------------------------------------- */

START_TEST(test_units_length)
{
    struct sb_stated s;

    s = parse_ok("2.5 m", SB_DIM_LENGTH, 0);
    ck_rel(s.value, 2.5, REL);
    ck_assert_uint_eq(s.dim, SB_DIM_LENGTH);
    ck_assert_str_eq(s.unit, "m");
    ck_rel(s.written, 2.5, 0);
    s = parse_ok("2.5 cm", SB_DIM_LENGTH, 0);
    ck_rel(s.value, 0.025, REL); /* centi = 1e-2 (SI prefix) */
    ck_assert_str_eq(s.unit, "cm");
    s = parse_ok("2.5 mm", SB_DIM_LENGTH, 0);
    ck_rel(s.value, 0.0025, REL); /* milli = 1e-3 (SI prefix) */
}
END_TEST

START_TEST(test_units_angle)
{
    struct sb_stated s;

    s = parse_ok("0.02 deg", SB_DIM_ANGLE, 0);
    ck_rel(s.value, 0.02 * PI / 180.0, REL); /* 1 deg = pi/180 rad */
    ck_assert_uint_eq(s.dim, SB_DIM_ANGLE);
    s = parse_ok("3 arcmin", SB_DIM_ANGLE, 0);
    ck_rel(s.value, 3.0 * PI / (180.0 * 60.0), REL); /* 1' = 1/60 deg */
    s = parse_ok("36 arcsec", SB_DIM_ANGLE, 0);
    ck_rel(s.value, 36.0 * PI / 648000.0, REL); /* 1" = 1/3600 deg */
    ck_rel(s.value, 0.01 * PI / 180.0, 1e-14); /* 36" = 0.01 deg */
    s = parse_ok("0.5 rad", SB_DIM_ANGLE, 0);
    ck_rel(s.value, 0.5, REL);
    s = parse_ok("0.5 mrad", SB_DIM_ANGLE, 0);
    ck_rel(s.value, 0.5e-3, REL);
}
END_TEST

START_TEST(test_units_time)
{
    struct sb_stated s;

    s = parse_ok("1.5 s", SB_DIM_TIME, 0);
    ck_rel(s.value, 1.5, REL);
    ck_assert_uint_eq(s.dim, SB_DIM_TIME);
    s = parse_ok("1.5 ms", SB_DIM_TIME, 0);
    ck_rel(s.value, 1.5e-3, REL);
    s = parse_ok("1.5 us", SB_DIM_TIME, 0);
    ck_rel(s.value, 1.5e-6, REL);
}
END_TEST

START_TEST(test_units_speed_freq_ratio)
{
    struct sb_stated s;

    s = parse_ok("0.3 m/s", SB_DIM_SPEED, 0);
    ck_rel(s.value, 0.3, REL);
    ck_assert_uint_eq(s.dim, SB_DIM_SPEED);
    /* 1 kn = 1852 m / 3600 s (international nautical mile per hour):
     * 9 kn = 16668 / 3600 m/s = 4.63 m/s exactly */
    s = parse_ok("9 kn", SB_DIM_SPEED, 0);
    ck_rel(s.value, 4.63, 1e-15);
    s = parse_ok("400 Hz", SB_DIM_FREQ, 0);
    ck_rel(s.value, 400.0, REL);
    ck_assert_uint_eq(s.dim, SB_DIM_FREQ);
    s = parse_ok("300 kHz", SB_DIM_FREQ, 0);
    ck_rel(s.value, 3e5, REL);
    s = parse_ok("0.2 %", SB_DIM_RATIO, 0);
    ck_rel(s.value, 0.002, REL); /* percent = 1/100 */
    ck_assert_uint_eq(s.dim, SB_DIM_RATIO);
    s = parse_ok("50 ppm", SB_DIM_RATIO, 0);
    ck_rel(s.value, 5e-5, REL); /* parts per million = 1e-6 */
}
END_TEST

START_TEST(test_unit_lookup)
{
    unsigned dim = 0;
    double f = 0.0;

    ck_assert_int_eq(sb_unit_lookup("kn", &dim, &f), SB_OK);
    ck_assert_uint_eq(dim, SB_DIM_SPEED);
    ck_rel(f, 1852.0 / 3600.0, REL);
    ck_assert_int_eq(sb_unit_lookup("arcmin", NULL, &f), SB_OK);
    ck_rel(f, PI / 10800.0, REL);
    ck_assert_int_eq(sb_unit_lookup("ft", &dim, &f), SB_EINPUT);
    ck_assert_int_eq(sb_unit_lookup("M", &dim, &f), SB_EINPUT); /* case */
    ck_assert_int_eq(sb_unit_lookup(NULL, &dim, &f), SB_EINPUT);
}
END_TEST

/* ---- every type ---------------------------------------------------- */

START_TEST(test_types)
{
    struct sb_stated s;

    /* sd is the default and the value itself (JCGM 100:2008 4.3.7) */
    s = parse_ok("4 cm", SB_DIM_LENGTH, 0);
    ck_assert_int_eq(s.type, SB_UTYPE_SD);
    ck_assert_int_eq(s.dist, SB_DIST_NORMAL);
    ck_rel(s.u, 0.04, REL);
    s = parse_ok("4 cm sd", SB_DIM_LENGTH, 0);
    ck_assert_int_eq(s.type, SB_UTYPE_SD);
    ck_rel(s.u, 0.04, REL);

    /* 95 %: normal quantile Phi^-1(0.975) = 1.959963984540054
     * (JCGM 100:2008 Table G.1 gives 1.960) */
    s = parse_ok("0.098 m 95%", SB_DIM_LENGTH, 0);
    ck_assert_int_eq(s.type, SB_UTYPE_95);
    ck_assert_int_eq(s.dist, SB_DIST_NORMAL);
    ck_rel(s.u, 0.098 / 1.959963984540054, 1e-15);
    ck_rel(s.u, 0.05, 1e-4); /* 0.098 / 1.96 = 0.05 to 4 digits */
    /* the factor is the 97.5 % normal quantile (GSL, independent code) */
    ck_rel(SB_K95_1D, gsl_cdf_ugaussian_Pinv(0.975), 1e-15);
    ck_rel(s.value, 0.098, REL);

    /* rms of a zero-mean error equals its standard deviation */
    s = parse_ok("0.3 deg rms", SB_DIM_ANGLE, 0);
    ck_assert_int_eq(s.type, SB_UTYPE_RMS);
    ck_assert_int_eq(s.dist, SB_DIST_NORMAL);
    ck_rel(s.u, 0.3 * PI / 180.0, REL);

    /* resolution step delta: u = delta / sqrt 12 (JCGM 100:2008 F.2.2.1);
     * 12 mm -> 12 / 3.4641016151377544 mm = 3.4641016151377544 mm */
    s = parse_ok("12 mm res", SB_DIM_LENGTH, 0);
    ck_assert_int_eq(s.type, SB_UTYPE_RES);
    ck_assert_int_eq(s.dist, SB_DIST_RECT);
    ck_rel(s.u, 0.0034641016151377544, 1e-15);

    /* bound +/- a: u = a / sqrt 3 (JCGM 100:2008 4.3.9 eq. 7);
     * 3 ms -> sqrt(3) ms = 1.7320508075688772 ms */
    s = parse_ok("3 ms max", SB_DIM_TIME, 0);
    ck_assert_int_eq(s.type, SB_UTYPE_MAX);
    ck_assert_int_eq(s.dist, SB_DIST_RECT);
    ck_rel(s.u, 0.0017320508075688772, 1e-15);
}
END_TEST

START_TEST(test_type_2d)
{
    struct sb_stated s;

    /* 2-D 95 % radius: sigma = r / sqrt(-2 ln 0.05) (Rayleigh) */
    s = parse_ok("0.5 m 95%", SB_DIM_LENGTH, SB_STATED_2D);
    ck_rel(s.u, 0.5 / sqrt(-2.0 * log(0.05)), 1e-15);
    /* S-44 ed. 6 section 2 rounds the factor to 2.45 */
    ck_rel(s.u, 0.5 / 2.45, 2e-3);
    /* the 2-D flag leaves the other types alone (per-axis figures) */
    s = parse_ok("0.5 m sd", SB_DIM_LENGTH, SB_STATED_2D);
    ck_rel(s.u, 0.5, REL);
    s = parse_ok("0.5 m max", SB_DIM_LENGTH, SB_STATED_2D);
    ck_rel(s.u, 0.5 / sqrt(3.0), REL);
    /* the macros hold the closed forms */
    ck_rel(SB_K95_2D, sqrt(-2.0 * log(0.05)), 1e-15);
}
END_TEST

START_TEST(test_type_names)
{
    enum sb_utype t;

    ck_assert_str_eq(sb_utype_name(SB_UTYPE_SD), "sd");
    ck_assert_str_eq(sb_utype_name(SB_UTYPE_95), "95%");
    ck_assert_str_eq(sb_utype_name(SB_UTYPE_RMS), "rms");
    ck_assert_str_eq(sb_utype_name(SB_UTYPE_RES), "res");
    ck_assert_str_eq(sb_utype_name(SB_UTYPE_MAX), "max");
    ck_assert_str_eq(sb_utype_name((enum sb_utype)17), "?");
    ck_assert_int_eq(sb_utype_lookup("res", &t), SB_OK);
    ck_assert_int_eq(t, SB_UTYPE_RES);
    ck_assert_int_eq(sb_utype_lookup("SD", &t), SB_EINPUT);
}
END_TEST

/* ---- number forms -------------------------------------------------- */

START_TEST(test_number_forms)
{
    struct sb_stated s;

    s = parse_ok("  5cm  95%  ", SB_DIM_LENGTH, 0); /* glued unit, blanks */
    ck_rel(s.value, 0.05, REL);
    ck_assert_int_eq(s.type, SB_UTYPE_95);
    s = parse_ok("\t.5 m", SB_DIM_LENGTH, 0);
    ck_rel(s.value, 0.5, REL);
    s = parse_ok("5. mm", SB_DIM_LENGTH, 0);
    ck_rel(s.value, 0.005, REL);
    s = parse_ok("+2E-2 m", SB_DIM_LENGTH, 0);
    ck_rel(s.value, 0.02, REL);
    s = parse_ok("0 m", SB_DIM_LENGTH, 0);
    ck_assert(s.value == 0.0 && s.u == 0.0);
    s = parse_ok("-0 m", SB_DIM_LENGTH, 0); /* minus zero is zero */
    ck_assert(s.value == 0.0 && !signbit(s.value));
    s = parse_ok("1e-3 %", SB_DIM_RATIO, 0);
    ck_rel(s.value, 1e-5, REL);
    /* a field accepting two dimensions */
    s = parse_ok("2 ms", SB_DIM_LENGTH | SB_DIM_TIME, 0);
    ck_assert_uint_eq(s.dim, SB_DIM_TIME);
}
END_TEST

START_TEST(test_from_parts)
{
    struct sb_stated s;
    struct sb_error err;

    sb_error_clear(&err);
    ck_assert_int_eq(sb_stated_from_parts(2.0, "cm", "95%", SB_DIM_LENGTH, 0,
                                          &s, &err),
                     SB_OK);
    ck_rel(s.value, 0.02, REL);
    ck_rel(s.u, 0.02 / 1.959963984540054, 1e-15);
    ck_assert_str_eq(s.unit, "cm");
    ck_assert_int_eq(sb_stated_from_parts(0.1, "deg", NULL, SB_DIM_ANGLE, 0,
                                          &s, &err),
                     SB_OK);
    ck_assert_int_eq(s.type, SB_UTYPE_SD);
    ck_rel(s.u, 0.1 * PI / 180.0, REL);

    ck_assert_int_eq(sb_stated_from_parts(1.0, "ms", NULL, SB_DIM_LENGTH, 0,
                                          &s, &err),
                     SB_EINPUT);
    ck_assert_str_eq(err.msg,
                     "unit 'ms' is a time (expected a length: m, cm, mm)");
    ck_assert_int_eq(sb_stated_from_parts(-1.0, "m", NULL, SB_DIM_LENGTH, 0,
                                          &s, &err),
                     SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "negative"));
    ck_assert_int_eq(sb_stated_from_parts(NAN, "m", NULL, SB_DIM_LENGTH, 0,
                                          &s, &err),
                     SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "non-finite"));
    ck_assert_int_eq(sb_stated_from_parts(HUGE_VAL, "m", NULL, SB_DIM_LENGTH,
                                          0, &s, &err),
                     SB_EINPUT);
    ck_assert_int_eq(sb_stated_from_parts(1.0, NULL, NULL, SB_DIM_LENGTH, 0,
                                          &s, &err),
                     SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "missing unit"));
    ck_assert_int_eq(sb_stated_from_parts(1.0, "yd", NULL, SB_DIM_LENGTH, 0,
                                          &s, &err),
                     SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "unknown unit 'yd'"));
    ck_assert_int_eq(sb_stated_from_parts(1.0, "m", "2sigma", SB_DIM_LENGTH,
                                          0, &s, &err),
                     SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "unknown uncertainty type"));
}
END_TEST

START_TEST(test_quantity)
{
    double v = 0.0;
    unsigned dim = 0;
    struct sb_error err;

    ck_assert_int_eq(sb_quantity_parse("-1.25 m", SB_DIM_LENGTH, &v, &dim,
                                       &err),
                     SB_OK);
    ck_rel(v, -1.25, REL);
    ck_assert_uint_eq(dim, SB_DIM_LENGTH);
    ck_assert_int_eq(sb_quantity_parse("-45 deg", SB_DIM_ANGLE, &v, NULL,
                                       &err),
                     SB_OK);
    ck_rel(v, -PI / 4.0, REL);
    ck_assert_int_eq(sb_quantity_parse("1 m sd", SB_DIM_LENGTH, &v, &dim,
                                       &err),
                     SB_EINPUT);
    ck_assert_str_eq(err.msg, "unexpected 'sd' after the unit (expected "
                              "VALUE UNIT, e.g. '-1.25 m')");
    ck_assert_int_eq(sb_quantity_parse("inf m", SB_DIM_LENGTH, &v, &dim,
                                       &err),
                     SB_EINPUT);
    ck_assert_int_eq(sb_quantity_parse("-1e999 m", SB_DIM_LENGTH, &v, &dim,
                                       &err),
                     SB_EINPUT);
    ck_assert_int_eq(sb_quantity_parse("1 s", SB_DIM_LENGTH, &v, &dim, &err),
                     SB_EINPUT);
}
END_TEST

/* ---- every error class --------------------------------------------- */

START_TEST(test_errors)
{
    struct sb_error err;
    struct sb_stated s;

    /* wrong dimension: the exact wording asked for by the project */
    ck_assert_int_eq(sb_stated_parse("5 ms", SB_DIM_LENGTH, 0, &s, &err),
                     SB_EINPUT);
    ck_assert_str_eq(err.msg,
                     "unit 'ms' is a time (expected a length: m, cm, mm)");
    parse_bad("5 m", SB_DIM_ANGLE, "unit 'm' is a length");
    parse_bad("5 kn", SB_DIM_FREQ, "unit 'kn' is a speed");
    parse_bad("5 %", SB_DIM_LENGTH, "unit '%' is a ratio");
    parse_bad("5 kHz", SB_DIM_TIME, "unit 'kHz' is a frequency");
    parse_bad("5 deg", SB_DIM_TIME, "unit 'deg' is an angle");

    parse_bad("5 ft", SB_DIM_LENGTH, "unknown unit 'ft'");
    parse_bad("5 HZ", SB_DIM_FREQ, "unknown unit 'HZ'");
    parse_bad("5ft", SB_DIM_LENGTH, "unknown unit 'ft'");
    parse_bad("5 m 2sigma", SB_DIM_LENGTH, "unknown uncertainty type '2sigma'");
    parse_bad("5 m 95", SB_DIM_LENGTH, "unknown uncertainty type '95'");
    parse_bad("5", SB_DIM_LENGTH, "missing unit after '5'");
    parse_bad("5   ", SB_DIM_LENGTH, "missing unit");
    parse_bad("5 m sd extra", SB_DIM_LENGTH, "unexpected 'extra'");
    parse_bad("-0.02 m", SB_DIM_LENGTH, "negative uncertainty");
    parse_bad("nan m", SB_DIM_LENGTH, "non-finite number 'nan'");
    parse_bad("-NaN m", SB_DIM_LENGTH, "non-finite");
    parse_bad("inf m", SB_DIM_LENGTH, "non-finite number 'inf'");
    parse_bad("Infinity m", SB_DIM_LENGTH, "non-finite");
    parse_bad("1e999 m", SB_DIM_LENGTH, "too large");
    parse_bad("0x1p-3 m", SB_DIM_LENGTH, "hexadecimal number '0x1p-3'");
    parse_bad("0X10 m", SB_DIM_LENGTH, "hexadecimal");
    parse_bad("", SB_DIM_LENGTH, "empty value");
    parse_bad("   \t", SB_DIM_LENGTH, "empty value");
    parse_bad("m 5", SB_DIM_LENGTH, "'m' is not a number");
    parse_bad("., m", SB_DIM_LENGTH, "is not a number");
    parse_bad("0.00000000000000000000000000000000000000000000000000000000000000"
              "000001 m",
              SB_DIM_LENGTH, "too long");
    ck_assert_int_eq(sb_stated_parse(NULL, SB_DIM_LENGTH, 0, &s, &err),
                     SB_EINPUT);
    /* err may be NULL */
    ck_assert_int_eq(sb_stated_parse("5 q", SB_DIM_LENGTH, 0, &s, NULL),
                     SB_EINPUT);
    /* the message leaves the position to the caller */
    sb_stated_parse("5 q", SB_DIM_LENGTH, 0, &s, &err);
    ck_assert_str_eq(err.file, "");
    ck_assert_int_eq(err.line, 0);
}
END_TEST

START_TEST(test_dim_describe)
{
    char buf[SB_DIM_DESCRIBE_MAX], small[8];

    ck_assert_str_eq(sb_dim_describe(SB_DIM_LENGTH, buf, sizeof buf),
                     "a length: m, cm, mm");
    ck_assert_str_eq(sb_dim_describe(SB_DIM_ANGLE, buf, sizeof buf),
                     "an angle: deg, arcmin, arcsec, rad, mrad");
    ck_assert_str_eq(sb_dim_describe(SB_DIM_SPEED | SB_DIM_RATIO, buf,
                                     sizeof buf),
                     "a speed: m/s, kn; or a ratio: %, ppm");
    ck_assert_str_eq(sb_dim_describe(0, buf, sizeof buf), "no unit");
    /* every dimension together fits the documented size */
    sb_dim_describe(0x3f, buf, sizeof buf);
    ck_assert_uint_lt(strlen(buf), SB_DIM_DESCRIBE_MAX - 1);
    ck_assert_ptr_nonnull(strstr(buf, "a frequency: Hz, kHz"));
    ck_assert_ptr_nonnull(strstr(buf, "a time: s, ms, us"));
    /* truncated but terminated */
    ck_assert_str_eq(sb_dim_describe(SB_DIM_LENGTH, small, sizeof small),
                     "a lengt");
    ck_assert_str_eq(sb_dim_name(SB_DIM_TIME), "a time");
    ck_assert_str_eq(sb_dim_name(3), "an unknown dimension");
}
END_TEST

static Suite *units_suite(void)
{
    Suite *s = suite_create("units");
    TCase *tc = tcase_create("core");

    tcase_add_test(tc, test_units_length);
    tcase_add_test(tc, test_units_angle);
    tcase_add_test(tc, test_units_time);
    tcase_add_test(tc, test_units_speed_freq_ratio);
    tcase_add_test(tc, test_unit_lookup);
    tcase_add_test(tc, test_types);
    tcase_add_test(tc, test_type_2d);
    tcase_add_test(tc, test_type_names);
    tcase_add_test(tc, test_number_forms);
    tcase_add_test(tc, test_from_parts);
    tcase_add_test(tc, test_quantity);
    tcase_add_test(tc, test_errors);
    tcase_add_test(tc, test_dim_describe);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(units_suite());
    int failed;

    srunner_run_all(sr, CK_NORMAL);
    failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
