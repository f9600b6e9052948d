/*
 * Tests of the system specification loader (src/lib/spec.c, ystated.c).
 *
 * Check values are worked by hand from the demo files and from the GUM
 * conversions (JCGM 100:2008):
 *   95 % of a 1-D normal:          u = v / 1.959964   (4.3.7, G.1.3)
 *   95 % radius of a circular 2-D normal: u = v / sqrt(-2 ln 0.05)
 *                                   = v / 2.447747    (the Rayleigh
 *     distribution; IHO S-44 ed. 6.0.0 (2020) section 2 rounds it to 2.45)
 *   resolution step delta:         u = delta / sqrt(12)  (4.3.9, F.2.2.1)
 *   1 knot = 1852 m / 3600 s (international nautical mile, exact by
 *   definition); 1 deg = pi/180 rad.
 * Error positions were counted by hand in the test texts and files.
 */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/spec.h"

#define PI 3.14159265358979323846
#define TOL 1e-12

static const char *srcdir(void)
{
    const char *s = getenv("srcdir"); /* set by automake's test driver */

    return s && *s ? s : ".";
}

static int load_profile(const char *name, struct sb_system *sys,
                        struct sb_error *err)
{
    char path[1024];

    snprintf(path, sizeof path, "%s/profiles/systems/%s", srcdir(), name);
    sb_error_clear(err);
    return sb_spec_load(path, sys, err);
}

START_TEST(launch_profile)
{
    struct sb_system s;
    struct sb_error e;

    ck_assert_int_eq(load_profile("kestrel-launch.yaml", &s, &e), SB_OK);
    ck_assert_str_eq(s.name, "kestrel-launch");
    /* lever arms as written, m */
    ck_assert_double_eq_tol(s.antenna.x, 0.40, TOL);
    ck_assert_double_eq_tol(s.antenna.z, -3.10, TOL);
    ck_assert_double_eq_tol(s.transducer.x, 1.10, TOL);
    ck_assert_double_eq_tol(s.transducer.z, 0.62, TOL);
    /* "1 cm sd" applied to each axis */
    ck_assert_double_eq_tol(s.transducer.u[0].u, 0.01, TOL);
    ck_assert_double_eq_tol(s.transducer.u[2].u, 0.01, TOL);
    ck_assert_double_eq_tol(s.motion_sensor.u[1].u, 0.005, TOL);
    /* "3 cm 95%" horizontal, a 2-D figure: 0.03 / 2.447747 per axis */
    ck_assert_double_eq_tol(s.positioning.horizontal.u,
                            0.03 / sqrt(-2.0 * log(0.05)), 1e-9);
    /* "5 cm 95%" vertical, 1-D: 0.05 / 1.959964 */
    ck_assert_double_eq_tol(s.positioning.vertical.u, 0.05 / 1.959964, 1e-8);
    ck_assert_double_eq_tol(s.positioning.latency.u, 0.001, TOL);
    /* "0.02 deg sd" -> 0.02 pi / 180 rad */
    ck_assert_double_eq_tol(s.motion.roll.u, 0.02 * PI / 180.0, TOL);
    ck_assert_double_eq_tol(s.motion.heading.u, 0.04 * PI / 180.0, TOL);
    ck_assert_double_eq_tol(s.motion.heave.u, 0.05, TOL);
    ck_assert_double_eq_tol(s.motion.heave_fraction.u, 0.05, TOL);
    ck_assert_uint_eq(s.motion.heave_fraction.dim, SB_DIM_RATIO);
    ck_assert_double_eq_tol(s.motion.latency.u, 0.0005, TOL);
    ck_assert_double_eq_tol(s.motion.align_pitch.u, 0.03 * PI / 180.0, TOL);
    ck_assert_double_eq_tol(s.sound_speed.surface, 1487.0, TOL);
    ck_assert_double_eq_tol(s.sound_speed.surface_u.u, 0.5, TOL);
    ck_assert_double_eq_tol(s.sound_speed.column, 1489.0, TOL);
    ck_assert_double_eq_tol(s.sound_speed.column_u.u, 2.0, TOL);
    ck_assert_double_eq_tol(s.echosounder.frequency, 400e3, 1e-6);
    ck_assert_double_eq_tol(s.echosounder.beam_across, 0.5 * PI / 180.0, TOL);
    ck_assert_double_eq_tol(s.echosounder.beam_along, 1.0 * PI / 180.0, TOL);
    ck_assert_int_eq(s.echosounder.array, SB_ARRAY_FLAT);
    ck_assert_int_eq(s.echosounder.range_mode, SB_RANGE_GIVEN);
    /* "1.25 cm res": rectangular, full width 0.0125 m -> /sqrt(12) */
    ck_assert_double_eq_tol(s.echosounder.range_resolution.u,
                            0.0125 / sqrt(12.0), TOL);
    ck_assert_int_eq(s.echosounder.range_resolution.dist, SB_DIST_RECT);
    ck_assert_double_eq_tol(s.echosounder.pointing.u, 0.05, TOL);
    ck_assert_double_eq_tol(s.echosounder.max_angle, 70.0 * PI / 180.0, TOL);
    ck_assert_int_eq(s.vertical.method, SB_VREF_TIDE);
    ck_assert_double_eq_tol(s.vertical.draft, 0.55, TOL);
    ck_assert_double_eq_tol(s.vertical.draft_u.u, 0.02, TOL);
    ck_assert_double_eq_tol(s.vertical.squat, 0.04, TOL);
    ck_assert_double_eq_tol(s.vertical.loading_u.u, 0.01, TOL);
    ck_assert_double_eq_tol(s.vertical.water_level.u, 0.02, TOL);
    ck_assert_double_eq_tol(s.vertical.zoning.u, 0.05 / 1.959964, 1e-8);
    /* 6 kn = 6 * 1852 / 3600 m/s */
    ck_assert_double_eq_tol(s.conditions.speed, 6.0 * 1852.0 / 3600.0, 1e-12);
    ck_assert_double_eq_tol(s.conditions.roll_amplitude, 3.0 * PI / 180.0,
                            TOL);
    ck_assert_double_eq_tol(s.conditions.roll_period, 4.0, TOL);
    ck_assert_double_eq_tol(s.conditions.heave_amplitude, 0.3, TOL);
    ck_assert_double_eq_tol(s.conditions.heave_period, 4.0, TOL);
    ck_assert_msg(strstr(s.source, "kestrel-launch.yaml") != NULL, "%s",
                  s.source);
}
END_TEST

START_TEST(surveyor_profile)
{
    struct sb_system s;
    struct sb_error e;

    ck_assert_int_eq(load_profile("kestrel-surveyor.yaml", &s, &e), SB_OK);
    /* mapping form {value: 0.01, unit: deg, type: sd} */
    ck_assert_double_eq_tol(s.motion.roll.u, 0.01 * PI / 180.0, TOL);
    ck_assert_str_eq(s.motion.roll.unit, "deg");
    ck_assert_double_eq_tol(s.antenna.y, -0.80, TOL);
    /* "10 cm 95%" horizontal (2-D) */
    ck_assert_double_eq_tol(s.positioning.horizontal.u,
                            0.10 / sqrt(-2.0 * log(0.05)), 1e-9);
    /* "0.15 %" of 1490 m/s = 2.235 m/s */
    ck_assert_uint_eq(s.sound_speed.column_u.dim, SB_DIM_RATIO);
    ck_assert_double_eq_tol(s.sound_speed.column_u.u, 0.0015, TOL);
    ck_assert_double_eq_tol(sb_system_abs_u(&s.sound_speed.column_u,
                                            s.sound_speed.column),
                            2.235, 1e-9);
    ck_assert_int_eq(s.echosounder.array, SB_ARRAY_CURVED);
    ck_assert_int_eq(s.echosounder.range_mode, SB_RANGE_SAMPLING);
    ck_assert_double_eq_tol(s.echosounder.sample_rate, 20e3, 1e-9);
    ck_assert_double_eq_tol(s.echosounder.pulse_length, 80e-6, 1e-15);
    ck_assert_int_eq(s.vertical.method, SB_VREF_ELLIPSOID);
    ck_assert_double_eq_tol(s.vertical.separation.u, 0.08, TOL);
    ck_assert_double_eq_tol(s.vertical.loading, -0.05, TOL);
    ck_assert_double_eq_tol(s.conditions.speed, 8.0 * 1852.0 / 3600.0, 1e-12);
}
END_TEST

START_TEST(deep_profile)
{
    struct sb_system s;
    struct sb_error e;

    ck_assert_int_eq(load_profile("kestrel-deep.yaml", &s, &e), SB_OK);
    ck_assert_double_eq_tol(s.echosounder.frequency, 20e3, 1e-9);
    ck_assert_double_eq_tol(s.echosounder.pulse_length, 0.5e-3, 1e-15);
    ck_assert_double_eq_tol(s.vertical.zoning.u, 0.15 / 1.959964, 1e-8);
    ck_assert_double_eq_tol(s.positioning.horizontal.u,
                            0.2 / sqrt(-2.0 * log(0.05)), 1e-9);
    ck_assert_double_eq_tol(s.conditions.heave_amplitude, 1.5, TOL);
    ck_assert_double_eq_tol(s.conditions.roll_period, 12.0, TOL);
    /* the demo traces three casts of one survey day */
    ck_assert_int_eq(s.sound_speed.model, SB_COLUMN_CASTS);
    sb_system_release(&s);
}
END_TEST

/* The bad files of tests/bad/spec/: each an input error at the position
 * counted by hand in the file (see the file's first comment line). */
START_TEST(bad_files)
{
    static const struct {
        const char *file;
        int line, col;
        const char *want;
    } cases[] = {
        {"unknown-key.yaml", 20, 3, "motion: unknown key 'rol'"},
        {"missing-key.yaml", 20, 3, "motion: missing required key 'pitch'"},
        {"wrong-type.yaml", 41, 14, "echosounder.frequency: found a mapping"},
        {"wrong-dimension.yaml", 20, 9,
         "motion.roll: unit 'm' is a length (expected an angle"},
        {"negative-uncertainty.yaml", 23, 10, "motion.heave: negative"},
        {"nan.yaml", 23, 10, "motion.heave: "},
        {"inf.yaml", 16, 20, "positioning.latency.value: '.inf' is not a "
                             "finite number"},
        {"angle-90.yaml", 47, 19, "echosounder.max_beam_angle: "},
        {"duplicate-key.yaml", 23, 3, "duplicate key 'heading'"},
        {"tab-indent.yaml", 22, 1, "tab character used for indentation"},
        /* libyaml closes an unterminated last line, so the end of the
         * stream is reported at the start of the next line */
        {"truncated.yaml", 8, 1, "YAML syntax error: "},
        {"empty.yaml", 1, 1, "empty file (expected a YAML mapping)"},
        /* first byte 0x1f is a control character */
        {"binary.yaml", 1, 1, "control characters"},
    };
    size_t i;

    for (i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        char path[1024];
        struct sb_system s;
        struct sb_error e;
        int rc;

        snprintf(path, sizeof path, "%s/tests/bad/spec/%s", srcdir(),
                 cases[i].file);
        sb_error_clear(&e);
        memset(&s, 0x5a, sizeof s);
        rc = sb_spec_load(path, &s, &e);
        ck_assert_msg(rc == SB_EINPUT, "%s: status %d", cases[i].file, rc);
        ck_assert_str_eq(e.file, path);
        ck_assert_msg(e.line == cases[i].line && e.col == cases[i].col,
                      "%s: at %d:%d, expected %d:%d (%s)", cases[i].file,
                      e.line, e.col, cases[i].line, cases[i].col, e.msg);
        ck_assert_msg(strstr(e.msg, cases[i].want) != NULL,
                      "%s: '%s' lacks '%s'", cases[i].file, e.msg,
                      cases[i].want);
        /* out is untouched on failure */
        ck_assert_int_eq(((unsigned char *)&s)[0], 0x5a);
    }
}
END_TEST

/* A minimal valid text with one line replaceable; used for the error
 * tests below.  Line numbers are given beside each line. */
static const char *const base_lines[] = {
    "name: t1",                                                    /* 1 */
    "lever_arms:",                                                 /* 2 */
    "  antenna: {x: 0 m, y: 0 m, z: -2 m, uncertainty: 1 cm}",     /* 3 */
    "  transducer: {x: 0 m, y: 0 m, z: 0.5 m, uncertainty: 1 cm}", /* 4 */
    "  motion_sensor: {x: 0 m, y: 0 m, z: 0 m, uncertainty: 1 cm}", /* 5 */
    "positioning: {horizontal: 2 cm, vertical: 3 cm}",             /* 6 */
    "motion:",                                                     /* 7 */
    "  roll: 0.02 deg",                                            /* 8 */
    "  pitch: 0.02 deg",                                           /* 9 */
    "  heading: 0.05 deg",                                         /* 10 */
    "  heave: 5 cm",                                               /* 11 */
    "  alignment: {roll: 0.01 deg, pitch: 0.01 deg, heading: 0.02 deg}",
    "sound_speed:",                                                /* 13 */
    "  transducer: {nominal: 1490 m/s, uncertainty: 0.5 m/s}",     /* 14 */
    "  water_column: {model: constant, nominal: 1490 m/s, uncertainty: 1 m/s}",
    "echosounder:",                                                /* 16 */
    "  frequency: 300 kHz",                                        /* 17 */
    "  beam_width_across: 1 deg",                                  /* 18 */
    "  beam_width_along: 1 deg",                                   /* 19 */
    "  array: flat",                                               /* 20 */
    "  range_resolution: 2 cm res",                                /* 21 */
    "  pointing: 5 %",                                             /* 22 */
    "  max_beam_angle: 70 deg",                                    /* 23 */
    "vertical_reference:",                                         /* 24 */
    "  method: tide_gauge",                                        /* 25 */
    "  draft: {nominal: 1 m, uncertainty: 2 cm}",                  /* 26 */
    "  water_level: 2 cm",                                         /* 27 */
    "  zoning: 3 cm",                                              /* 28 */
    "conditions:",                                                 /* 29 */
    "  speed: 4 m/s",                                              /* 30 */
    "  roll_amplitude: 2 deg",                                     /* 31 */
    "  roll_period: 5 s",                                          /* 32 */
    "  pitch_amplitude: 1 deg",                                    /* 33 */
    "  pitch_period: 4 s",                                         /* 34 */
    "  heave_amplitude: 0.2 m",                                    /* 35 */
    NULL};

/* Load base_lines with line `line` (1-based) replaced by repl (NULL: keep;
 * "" removes nothing but blanks it). */
static int load_variant(int line, const char *repl, struct sb_system *s,
                        struct sb_error *e)
{
    char text[4096];
    size_t used = 0;
    int i;

    for (i = 0; base_lines[i]; i++) {
        const char *l = (i + 1 == line && repl) ? repl : base_lines[i];
        int w = snprintf(text + used, sizeof text - used, "%s\n", l);

        used += (size_t)w;
    }
    sb_error_clear(e);
    return sb_spec_load_string("v.yaml", text, used, s, e);
}

static void expect_variant(int line, const char *repl, int eline, int ecol,
                           const char *want)
{
    struct sb_system s;
    struct sb_error e;
    int rc = load_variant(line, repl, &s, &e);

    ck_assert_msg(rc == SB_EINPUT, "'%s': status %d", repl, rc);
    ck_assert_str_eq(e.file, "v.yaml");
    ck_assert_msg(e.line == eline && e.col == ecol,
                  "'%s': at %d:%d, expected %d:%d (%s)", repl, e.line, e.col,
                  eline, ecol, e.msg);
    ck_assert_msg(strstr(e.msg, want) != NULL, "'%s': '%s' lacks '%s'", repl,
                  e.msg, want);
}

START_TEST(minimal_text_and_defaults)
{
    struct sb_system s;
    struct sb_error e;

    ck_assert_int_eq(load_variant(0, NULL, &s, &e), SB_OK);
    /* optional fields keep the documented defaults (docs/spec.md) */
    ck_assert_double_eq(s.positioning.latency.u, 0.0);
    ck_assert_double_eq(s.motion.heave_fraction.u, 0.0);
    ck_assert_double_eq(s.motion.latency.u, 0.0);
    ck_assert_double_eq(s.vertical.squat, 0.0);
    ck_assert_double_eq(s.vertical.loading_u.u, 0.0);
    ck_assert_double_eq(s.conditions.heave_period, 6.0);
    ck_assert_str_eq(s.title, "");
    /* "2 cm" with no type is a standard deviation */
    ck_assert_double_eq_tol(s.positioning.horizontal.u, 0.02, TOL);
}
END_TEST

START_TEST(field_errors)
{
    /* the example of the issue: a length where an angle is expected; the
     * value starts at column 9 of line 8 */
    expect_variant(8, "  roll: 0.02 m sd", 8, 9,
                   "motion.roll: unit 'm' is a length (expected an angle: "
                   "deg, arcmin, arcsec, rad, mrad)");
    /* mapping form: the error points at the unit (column 29) */
    expect_variant(8, "  roll: {value: 0.02, unit: m, type: sd}", 8, 29,
                   "motion.roll: unit 'm' is a length");
    /* mapping form: a negative value points at the value (column 17) */
    expect_variant(8, "  roll: {value: -1, unit: deg}", 8, 17,
                   "motion.roll: negative");
    /* mapping form: unknown type points at the type (column 37) */
    expect_variant(8, "  roll: {value: 1, unit: deg, type: 99%}", 8, 37,
                   "unknown uncertainty type '99%'");
    expect_variant(8, "  roll: {value: 1, units: deg}", 8, 20,
                   "motion.roll: unknown key 'units'");
    /* angle uncertainty not below 90 deg */
    expect_variant(8, "  roll: 95 deg sd", 8, 9, "not below 90 deg");
    /* relative figure above 100 % */
    expect_variant(22, "  pointing: 150 %", 22, 13, "more than 100 %");
    /* a sequence where a stated value is expected */
    expect_variant(11, "  heave: [5, cm]", 11, 10,
                   "motion.heave: found a list");
    /* a scalar where a section is expected */
    expect_variant(6, "positioning: 2 cm", 6, 14,
                   "positioning: found a single value (expected a mapping");
    /* a profile model refuses the constant model's key */
    expect_variant(15,
                   "  water_column: {model: profile, nominal: 1490 m/s, "
                   "uncertainty: 1 m/s}",
                   15, 34, "nominal: not used with model profile");
    /* sound speed outside (1300, 1800) m/s */
    expect_variant(14, "  transducer: {nominal: 1200 m/s, uncertainty: 1 m/s}",
                   14, 25, "sound_speed.transducer.nominal: '1200 m/s' is out "
                           "of range");
    /* more than 10 % of the speed */
    expect_variant(14, "  transducer: {nominal: 1490 m/s, uncertainty: 11 %}",
                   14, 48, "more than 10 % of the speed");
    expect_variant(20, "  array: round", 20, 10,
                   "echosounder.array: 'round' is not a known choice");
    /* both range forms */
    expect_variant(20, "  array: flat\n  sample_rate: 10 kHz", 22, 3,
                   "range_resolution given together with sample_rate");
    /* neither range form: reported at the echosounder mapping (17:3) */
    expect_variant(21, "", 17, 3,
                   "missing required key 'range_resolution'");
    /* a figure of the other vertical method is refused */
    expect_variant(28, "  zoning: 3 cm\n  separation: 5 cm", 29, 3,
                   "vertical_reference.separation: not used with method "
                   "tide_gauge");
    expect_variant(25, "  method: ellipsoid", 27, 3,
                   "vertical_reference.water_level: not used with method "
                   "ellipsoid");
    expect_variant(26, "  draft: {nominal: -1 m, uncertainty: 2 cm}", 26, 20,
                   "vertical_reference.draft.nominal: '-1 m' is out of range");
    expect_variant(1, "name: two words", 1, 7, "name: 'two words' contains");
    expect_variant(1, "nom: t1", 1, 1, "unknown key 'nom'");
    expect_variant(30, "  speed: 4 deg", 30, 10,
                   "conditions.speed: unit 'deg' is an angle");
    expect_variant(31, "  roll_amplitude: 50 deg", 31, 19,
                   "conditions.roll_amplitude: '50 deg' is out of range");
    expect_variant(32, "  roll_period: 0 s", 32, 16, "out of range");
    expect_variant(3, "  antenna: {x: 0, y: 0 m, z: -2 m, uncertainty: 1 cm}",
                   3, 16, "lever_arms.antenna.x: missing unit");
    expect_variant(3, "  antenna: {x: 0 m, y: 0 m, uncertainty: 1 cm}", 3, 12,
                   "lever_arms.antenna: missing required key 'z'");
    expect_variant(6, "positioning: [2 cm, 3 cm]", 6, 14,
                   "positioning: found a list (expected a mapping");
    /* a top-level list instead of a mapping */
    {
        struct sb_system s;
        struct sb_error e;

        ck_assert_int_eq(sb_spec_load_string("l.yaml", "- a\n- b\n", 8, &s,
                                             &e),
                         SB_EINPUT);
        ck_assert_int_eq(e.line, 1);
        ck_assert_int_eq(e.col, 1);
        ck_assert_ptr_nonnull(strstr(e.msg, "found a list at the top"));
    }
}
END_TEST

START_TEST(missing_file_is_io)
{
    struct sb_system s;
    struct sb_error e;

    ck_assert_int_eq(sb_spec_load("/nonexistent/dir/none.yaml", &s, &e),
                     SB_EIO);
}
END_TEST

static Suite *spec_suite(void)
{
    Suite *s = suite_create("spec");
    TCase *tc = tcase_create("core");

    tcase_add_test(tc, launch_profile);
    tcase_add_test(tc, surveyor_profile);
    tcase_add_test(tc, deep_profile);
    tcase_add_test(tc, bad_files);
    tcase_add_test(tc, minimal_text_and_defaults);
    tcase_add_test(tc, field_errors);
    tcase_add_test(tc, missing_file_is_io);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(spec_suite());
    int failed;

    srunner_run_all(sr, CK_NORMAL);
    failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed == 0 ? EXIT_SUCCESS : EXIT_FAILURE;
}
