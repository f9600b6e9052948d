/*
 * Tests of src/lib/profile.c: reading depth-speed profiles and CTD casts,
 * the conversion through the equations (end to end against published check
 * values), validity warnings, and every input defect with its exact
 * FILE:LINE:COL.  Each test writes its own small file to a temporary
 * directory; the demo casts under profiles/ are not used as check values.
 */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "swathbudget/profile.h"
#include "swathbudget/soundspeed.h"

#define DEG (3.14159265358979323846 / 180.0)

static char path[256];

/* Write text to a fresh temporary file; its name goes to path. */
static const char *write_cast(const char *text)
{
    FILE *f;
    int fd;

    snprintf(path, sizeof path, "/tmp/sb_test_profile_XXXXXX");
    fd = mkstemp(path);
    ck_assert_int_ge(fd, 0);
    f = fdopen(fd, "w");
    ck_assert_ptr_nonnull(f);
    fputs(text, f);
    ck_assert_int_eq(fclose(f), 0);
    return path;
}

static void drop(void) { unlink(path); }

/* Load text expecting an input error at line:col whose message contains
 * want. */
static void expect_error(const char *text, int eq, int line, int col,
                         const char *want)
{
    struct sb_profile *p = (struct sb_profile *)1;
    struct sb_error err;
    int rc;

    sb_error_clear(&err);
    rc = sb_profile_load(write_cast(text), eq, 30.0 * DEG, &p, &err);
    drop();
    ck_assert_msg(rc == SB_EINPUT, "rc %d for:\n%s", rc, text);
    ck_assert_ptr_null(p);
    ck_assert_str_eq(err.file, path);
    ck_assert_msg(err.line == line && err.col == col,
                  "at %d:%d, expected %d:%d (%s)", err.line, err.col, line,
                  col, err.msg);
    ck_assert_msg(strstr(err.msg, want) != NULL, "message '%s' lacks '%s'",
                  err.msg, want);
    ck_assert_msg(strstr(err.msg, "(expected") != NULL,
                  "message '%s' does not say what was expected", err.msg);
    ck_assert_msg(strchr(err.msg, '\n') == NULL, "two-line message");
}

/* ---- end to end against published values ------------------------------- */

START_TEST(cast_by_pressure_reproduces_unesco_check_values)
{
    /* A cast of uniform water S = 40, T = 40 degC (IPTS-68, given as such)
     * down to 10000 dbar at latitude 30 deg, converted with the default
     * equation (UNESCO 1983).  The deepest sample must give both published
     * check values of Fofonoff & Millard (1983): sound speed 1731.995 m/s
     * (SVEL) and depth 9712.653 m (DEPTH). */
    static const char text[] =
        "# uniform test water\n"
        "pressure_dbar,temperature_ipts68_degC,salinity_psu\n"
        "0,40,40\n10,40,40\n20,40,40\n30,40,40\n45,40,40\n67,40,40\n"
        "100,40,40\n150,40,40\n225,40,40\n337,40,40\n500,40,40\n"
        "750,40,40\n1100,40,40\n1600,40,40\n2400,40,40\n3600,40,40\n"
        "5400,40,40\n8000,40,40\n10000,40,40\n";
    struct sb_profile *p = NULL;
    struct sb_error err;
    size_t last;

    ck_assert_int_eq(sb_profile_load(write_cast(text), -1, 30.0 * DEG, &p,
                                     &err),
                     SB_OK);
    drop();
    ck_assert_uint_eq(p->n, 19);
    last = p->n - 1;
    ck_assert_int_eq(p->equation, SB_SS_DEFAULT);
    ck_assert_msg(fabs(p->speed_mps[last] - 1731.995) <= 0.0005, "%.4f",
                  p->speed_mps[last]);
    ck_assert_msg(fabs(p->depth_m[last] - 9712.653) <= 0.0005, "%.4f",
                  p->depth_m[last]);
    /* Stored temperature is ITS-90: 40 / 1.00024 (Saunders 1990). */
    ck_assert(fabs(p->temperature_degC[last] - 40.0 / 1.00024) < 1e-12);
    ck_assert(p->pressure_given && !p->depth_given);
    ck_assert_int_eq(p->line[0], 3);
    ck_assert_int_eq(p->line[last], 21);
    ck_assert(!p->latitude_assumed);
    ck_assert_int_eq(p->n_warnings, 0); /* inside UNESCO's range */
    sb_profile_free(p);
}
END_TEST

START_TEST(cast_by_depth_reproduces_mackenzie_check_value)
{
    /* Mackenzie (1981): T = 25 degC, S = 35, D = 1000 m -> 1550.744 m/s.
     * Mackenzie's equation is IPTS-68, so the file gives IPTS-68. */
    static const char text[] =
        "depth_m,temperature_ipts68_degC,salinity_psu\n"
        "0,25,35\n10,25,35\n20,25,35\n30,25,35\n45,25,35\n67,25,35\n"
        "100,25,35\n150,25,35\n225,25,35\n337,25,35\n500,25,35\n"
        "750,25,35\n1000,25,35\n";
    struct sb_profile *p = NULL;
    struct sb_error err;

    ck_assert_int_eq(sb_profile_load(write_cast(text),
                                     sb_soundspeed_find("mackenzie"), NAN, &p,
                                     &err),
                     SB_OK);
    drop();
    ck_assert_msg(fabs(p->speed_mps[p->n - 1] - 1550.744) <= 0.0005, "%.4f",
                  p->speed_mps[p->n - 1]);
    /* A depth equation on a depth cast needs neither pressure nor
     * latitude: nothing is assumed, no pressure column appears. */
    ck_assert_ptr_null(p->pressure_dbar);
    ck_assert(!p->latitude_assumed);
    ck_assert_int_eq(p->n_warnings, 0);
    sb_profile_free(p);
}
END_TEST

START_TEST(depth_cast_through_pressure_equation_uses_inverse)
{
    /* A depth cast through UNESCO needs the pressure of each depth: the
     * published pair 9712.653 m <-> 10000 dbar at 30 deg (Fofonoff & Millard
     * 1983) read backwards, so the last speed is again 1731.995 m/s. */
    static const char text[] =
        "depth_m,temperature_ipts68_degC,salinity_psu\n"
        "0,40,40\n10,40,40\n20,40,40\n30,40,40\n45,40,40\n67,40,40\n"
        "100,40,40\n150,40,40\n225,40,40\n337,40,40\n500,40,40\n"
        "750,40,40\n1100,40,40\n1600,40,40\n2400,40,40\n3600,40,40\n"
        "5400,40,40\n8000,40,40\n9712.653,40,40\n";
    struct sb_profile *p = NULL;
    struct sb_error err;

    ck_assert_int_eq(sb_profile_load(write_cast(text), SB_SS_CHEN_MILLERO,
                                     30.0 * DEG, &p, &err),
                     SB_OK);
    drop();
    ck_assert_msg(fabs(p->pressure_dbar[p->n - 1] - 10000.0) <= 0.001, "%.4f",
                  p->pressure_dbar[p->n - 1]);
    ck_assert_msg(fabs(p->speed_mps[p->n - 1] - 1731.995) <= 0.001, "%.4f",
                  p->speed_mps[p->n - 1]);
    sb_profile_free(p);
}
END_TEST

/* ---- depth-speed files, formats ---------------------------------------- */

START_TEST(depth_speed_file_kept_as_given)
{
    /* CRLF line ends, a byte-order mark, comments, blank lines and blanks
     * around fields are accepted. */
    static const char text[] = "\xEF\xBB\xBF# probe dip\r\n"
                               "\r\n"
                               " depth_m , speed_m_s \r\n"
                               "0.5,1500.25\r\n"
                               "  # a comment between samples\r\n"
                               "5, 1499.5\r\n"
                               "12.5 ,1490\r\n";
    struct sb_profile *p = NULL;
    struct sb_error err;

    ck_assert_int_eq(sb_profile_load(write_cast(text), -1, NAN, &p, &err),
                     SB_OK);
    drop();
    ck_assert_uint_eq(p->n, 3);
    ck_assert(p->depth_m[0] == 0.5 && p->depth_m[1] == 5.0 &&
              p->depth_m[2] == 12.5);
    ck_assert(p->speed_mps[0] == 1500.25 && p->speed_mps[1] == 1499.5 &&
              p->speed_mps[2] == 1490.0);
    ck_assert_int_eq(p->equation, -1);
    ck_assert_ptr_null(p->temperature_degC);
    ck_assert_int_eq(p->line[2], 7);
    ck_assert_int_eq(p->n_warnings, 0);
    ck_assert_str_eq(p->source, path);
    sb_profile_free(p);
}
END_TEST

START_TEST(pressure_speed_file_assumes_latitude_with_warning)
{
    static const char text[] = "pressure_dbar,speed_m_s\n"
                               "0,1500\n10,1499\n1000,1490\n";
    static const char deeper[] = "pressure_dbar,speed_m_s\n"
                                 "0,1500\n10,1499\n20,1490\n";
    struct sb_profile *p = NULL;
    struct sb_error err;
    char buf[512];

    /* 10 -> 1000 dbar is a gap; first check that it is caught. */
    ck_assert_int_eq(sb_profile_load(write_cast(text), -1, NAN, &p, &err),
                     SB_EINPUT);
    drop();
    ck_assert_int_eq(err.line, 4);
    ck_assert_ptr_nonnull(strstr(err.msg, "gap"));

    ck_assert_int_eq(sb_profile_load(write_cast(deeper), -1, NAN, &p, &err),
                     SB_OK);
    ck_assert_int_eq(p->n_warnings, 1);
    ck_assert(p->latitude_assumed);
    ck_assert(fabs(p->latitude_rad - 45.0 * DEG) < 1e-15);
    ck_assert_ptr_nonnull(strstr(p->warnings[0].msg, "latitude not given"));
    sb_profile_warning_format(p, 0, buf, sizeof buf);
    ck_assert(strncmp(buf, path, strlen(path)) == 0);
    drop();
    /* Depth at 20 dbar, 45 deg, from the UNESCO formula. */
    ck_assert(fabs(p->depth_m[2] -
                   sb_soundspeed_depth_from_pressure(20.0, 45.0 * DEG)) <
              1e-12);
    sb_profile_free(p);
}
END_TEST

START_TEST(out_of_range_samples_are_warnings_with_lines)
{
    /* Del Grosso is valid from 30 psu (Del Grosso 1974): the brackish
     * samples on lines 3 and 4 are converted but listed. */
    static const char text[] = "depth_m,temperature_degC,salinity_psu\n"
                               "# surface layer\n"
                               "0.5,15,25\n"
                               "2,15,28\n"
                               "5,12,33\n"
                               "9,10,34\n";
    struct sb_profile *p = NULL;
    struct sb_error err;

    ck_assert_int_eq(sb_profile_load(write_cast(text),
                                     sb_soundspeed_find("del-grosso"),
                                     52.0 * DEG, &p, &err),
                     SB_OK);
    drop();
    ck_assert_int_eq(p->n_warnings, 2);
    ck_assert_int_eq(p->warnings[0].line, 3);
    ck_assert_int_eq(p->warnings[1].line, 4);
    ck_assert_uint_eq(p->warnings[1].index, 1);
    ck_assert(p->warnings[1].depth_m == 2.0);
    ck_assert_ptr_nonnull(strstr(p->warnings[0].msg, "del-grosso"));
    ck_assert_ptr_nonnull(strstr(p->warnings[0].msg, "salinity 25.00 psu"));
    /* Speeds are still there for every sample and finite. */
    for (size_t i = 0; i < p->n; i++)
        ck_assert(isfinite(p->speed_mps[i]));
    sb_profile_free(p);
}
END_TEST

/* ---- input defects ------------------------------------------------------ */

START_TEST(defects_have_file_line_col)
{
    /* non-monotonic depth: line 4, depth column at col 1 */
    expect_error("depth_m,speed_m_s\n0,1500\n5,1499\n5,1498\n", -1, 4, 1,
                 "strictly increasing");
    expect_error("depth_m,speed_m_s\n0,1500\n5,1499\n4,1498\n", -1, 4, 1,
                 "not below");
    /* non-monotonic pressure: column 1 */
    expect_error("pressure_dbar,temperature_degC,salinity_psu\n"
                 "1,10,35\n3,10,35\n2,10,35\n",
                 -1, 4, 1, "increasing pressures");
    /* gap: 10 -> 40 m exceeds max(20, 5) */
    expect_error("depth_m,speed_m_s\n0,1500\n10,1499\n40,1498\n", -1, 4, 1,
                 "gap of 30.00 m");
    /* first sample too deep */
    expect_error("depth_m,speed_m_s\n25,1500\n30,1499\n", -1, 2, 1,
                 "below the surface");
    /* missing value: empty third field, col 6 */
    expect_error("depth_m,temperature_degC,salinity_psu\n0,10,35\n1,10,\n", -1,
                 3, 6, "missing value of salinity_psu");
    /* non-finite values */
    expect_error("depth_m,speed_m_s\n0,1500\n1,1e999\n", -1, 3, 3,
                 "not finite");
    expect_error("depth_m,speed_m_s\n0,1500\n1,nan\n", -1, 3, 3,
                 "not finite");
    /* unparsable */
    expect_error("depth_m,speed_m_s\n0,1500\n1,1499.5x\n", -1, 3, 3,
                 "is not a number");
    expect_error("depth_m,speed_m_s\n0,1500\n1,1499,5\n", -1, 3, 8,
                 "row has 3 fields");
    /* ragged: too few fields; col just past the end of the line */
    expect_error("depth_m,temperature_degC,salinity_psu\n0,10,35\n1,10\n", -1,
                 3, 5, "row has 2 fields");
    /* physical bounds */
    expect_error("depth_m,temperature_degC,salinity_psu\n0,80,35\n1,10,35\n",
                 -1, 2, 3, "out of bounds");
    expect_error("depth_m,speed_m_s\n0,1500\n1,150\n", -1, 3, 3,
                 "out of bounds");
    expect_error("depth_m,speed_m_s\n-1,1500\n1,1500\n", -1, 2, 1,
                 "out of bounds");
}
END_TEST

START_TEST(header_defects)
{
    expect_error("depth_m,temp_C,salinity_psu\n0,10,35\n", -1, 1, 9,
                 "unknown column 'temp_C'");
    expect_error("# c\ndepth_m,speed_m_s,depth_m\n0,1500,0\n", -1, 2, 19,
                 "appears twice");
    expect_error("depth_m,,speed_m_s\n", -1, 1, 9, "empty column name");
    expect_error("temperature_degC,salinity_psu\n10,35\n", -1, 1, 1,
                 "no vertical column");
    expect_error("depth_m,temperature_degC\n0,10\n", -1, 1, 1,
                 "no salinity column");
    expect_error("depth_m,salinity_psu\n0,10\n", -1, 1, 1,
                 "no temperature column");
    expect_error("depth_m,speed_m_s,temperature_degC,salinity_psu\n", -1, 1, 9,
                 "both speed_m_s");
    expect_error("depth_m,temperature_degC,temperature_ipts68_degC,"
                 "salinity_psu\n",
                 -1, 1, 26, "two temperature columns");
    /* an equation cannot convert given speeds */
    expect_error("depth_m,speed_m_s\n0,1500\n1,1500\n", SB_SS_MACKENZIE, 1, 1,
                 "equation was chosen");
    /* empty files and too few samples */
    expect_error("# only a comment\n", -1, 1, 1, "no header line");
    expect_error("depth_m,speed_m_s\n0,1500\n", -1, 2, 1, "1 sample after");
}
END_TEST

START_TEST(unreadable_file_and_bad_arguments)
{
    struct sb_profile *p = (struct sb_profile *)1;
    struct sb_error err;

    ck_assert_int_eq(sb_profile_load("/nonexistent/dir/cast.csv", -1, NAN, &p,
                                     &err),
                     SB_EIO);
    ck_assert_ptr_null(p);
    ck_assert_ptr_nonnull(strstr(err.msg, "cannot open"));
    ck_assert_int_eq(sb_profile_load("x.csv", 99, NAN, &p, &err), SB_EINPUT);
    ck_assert_int_eq(sb_profile_load("x.csv", -1, 2.0, &p, &err), SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "latitude"));
}
END_TEST

/* ---- arrays ----------------------------------------------------------- */

START_TEST(from_pairs)
{
    const double z[] = {0.0, 5.0, 12.0, 30.0};
    const double c[] = {1500.0, 1499.0, 1495.0, 1490.0};
    const double zbad[] = {0.0, 5.0, 5.0};
    const double zgap[] = {0.0, 5.0, 50.0};
    const double cnan[] = {1500.0, NAN, 1490.0};
    struct sb_profile *p = NULL;
    struct sb_error err;

    ck_assert_int_eq(sb_profile_from_pairs(z, c, 4, &p, &err), SB_OK);
    ck_assert_uint_eq(p->n, 4);
    ck_assert(p->depth_m != z && p->depth_m[3] == 30.0); /* copied */
    ck_assert(p->speed_mps[2] == 1495.0);
    ck_assert_int_eq(p->n_warnings, 0);
    sb_profile_free(p);

    ck_assert_int_eq(sb_profile_from_pairs(zbad, c, 3, &p, &err), SB_EINPUT);
    ck_assert_ptr_null(p);
    ck_assert_ptr_nonnull(strstr(err.msg, "sample 3"));
    ck_assert_int_eq(sb_profile_from_pairs(zgap, c, 3, &p, &err), SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "gap"));
    ck_assert_int_eq(sb_profile_from_pairs(z, cnan, 3, &p, &err), SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "sample 2"));
    ck_assert_int_eq(sb_profile_from_pairs(z, c, 1, &p, &err), SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "at least 2"));
    sb_profile_free(NULL);
}
END_TEST

static Suite *profile_suite(void)
{
    Suite *s = suite_create("profile");
    TCase *tc = tcase_create("profile");

    tcase_add_test(tc, cast_by_pressure_reproduces_unesco_check_values);
    tcase_add_test(tc, cast_by_depth_reproduces_mackenzie_check_value);
    tcase_add_test(tc, depth_cast_through_pressure_equation_uses_inverse);
    tcase_add_test(tc, depth_speed_file_kept_as_given);
    tcase_add_test(tc, pressure_speed_file_assumes_latitude_with_warning);
    tcase_add_test(tc, out_of_range_samples_are_warnings_with_lines);
    tcase_add_test(tc, defects_have_file_line_col);
    tcase_add_test(tc, header_defects);
    tcase_add_test(tc, unreadable_file_and_bad_arguments);
    tcase_add_test(tc, from_pairs);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(profile_suite());
    int failed;

    srunner_run_all(sr, CK_NORMAL);
    failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    return failed ? EXIT_FAILURE : EXIT_SUCCESS;
}
