/*
 * Tests of the forward georeferencing model and its error function
 * (src/lib/georef.c) and of the system description (src/lib/system.c).
 *
 * Check values are the single-component closed forms derived in
 * docs/model.md ("Closed forms"), which follow the error terms of Hare,
 * Godin & Mayer (1995), "Accuracy estimation of Canadian swath (multibeam)
 * and sweep (multitransducer) sounding systems", Canadian Hydrographic
 * Service technical report: for a flat seafloor at depth D below the
 * transducer, beam angle theta, slant range R = D / cos(theta) and
 * across-track distance y = D tan(theta), the first-order change of the
 * sounding (E across, N along, Z down) per unit error of one input is
 *     roll          (-D, 0, y)                 (rotation of the beam)
 *     pitch         (0, D, 0)
 *     heading       (0, -y, 0)
 *     range         (sin theta, 0, cos theta)
 *     column scale  (y, 0, D)
 *     surface speed, flat array   (D tan theta, 0, -D tan^2 theta) / c0
 *     pointing      (D, 0, -y)
 *     heave, draft, squat, loading (0, 0, 1); water level, zoning (0, 0, -1)
 * and for the lever arms (rigid-body rotation, common practice):
 *     roll turns the arm antenna -> transducer: E changes by -(z_tx - z_ant)
 *     and the heave arm motion sensor -> transducer: Z by (y_tx - y_mot).
 * These are derivatives of the geometry, computed here from the formulas
 * and compared with the model's own central differences (an independent
 * route: the model never evaluates these formulas).
 */
#include <check.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/georef.h"
#include "swathbudget/propagate.h"
#include "swathbudget/system.h"

#define PI 3.14159265358979323846
#define DEG (PI / 180.0)

static void st(struct sb_stated *s, double u, unsigned dim)
{
    memset(s, 0, sizeof *s);
    s->value = s->u = s->written = u;
    s->dim = dim;
    s->type = SB_UTYPE_SD;
    s->dist = SB_DIST_NORMAL;
}

/* tolerance: relative 1e-6 of the scale of the vector, absolute 1e-12 */
static void ck_vec(const double got[3], double e, double n, double z, double rel)
{
    double scale = fabs(e) + fabs(n) + fabs(z);
    double tol = rel * scale + 1e-12;
    ck_assert_double_eq_tol(got[0], e, tol);
    ck_assert_double_eq_tol(got[1], n, tol);
    ck_assert_double_eq_tol(got[2], z, tol);
}

/* Sensitivity of component c at (depth, angle) for system s, by the
 * library's Jacobian. */
static void sens(const struct sb_system *s, double depth, double ang, int c, double out[3])
{
    struct sb_beam b;
    struct sb_error err;
    ck_assert_int_eq(sb_beam_setup(s, depth, ang, &b, &err), SB_OK);
    double j[SB_COMP_COUNT][3];
    sb_jacobian(&b, j);
    memcpy(out, j[c], sizeof j[c]);
}

static const double ANG[] = { -70, -45, -20, -3, 0, 5, 30, 60, 75 };
static const double DEP[] = { 2.0, 10.0, 55.0, 400.0 };
#define NANG (sizeof ANG / sizeof ANG[0])
#define NDEP (sizeof DEP / sizeof DEP[0])

START_TEST(names_unique_and_stable)
{
    for (int c = 0; c < SB_COMP_COUNT; c++) {
        const char *n = sb_component_name(c);
        ck_assert_str_ne(n, "?");
        for (const char *p = n; *p; p++) /* snake_case */
            ck_assert(( *p >= 'a' && *p <= 'z') || (*p >= '0' && *p <= '9') || *p == '_');
        ck_assert_int_eq(sb_component_lookup(n), c);
        ck_assert_str_ne(sb_component_group(c), "?");
        ck_assert_str_ne(sb_component_unit(c), "?");
        for (int d = c + 1; d < SB_COMP_COUNT; d++)
            ck_assert_str_ne(n, sb_component_name(d));
    }
    /* names the issue asks for */
    const char *want[] = { "roll", "heading", "gnss_horizontal_e", "lever_tx_y", "surface_sound_speed",
                           "sound_speed_column", "range", "beam_pointing", "heave", "draft", "squat",
                           "loading", "water_level", "tide_zoning", "ellipsoid_height",
                           "separation_model" };
    for (size_t i = 0; i < sizeof want / sizeof want[0]; i++)
        ck_assert_int_ge(sb_component_lookup(want[i]), 0);
    ck_assert_str_eq(sb_component_name(-1), "?");
    ck_assert_str_eq(sb_component_name(SB_COMP_COUNT), "?");
    ck_assert_int_eq(sb_component_lookup("nonsense"), -1);
}
END_TEST

START_TEST(zero_error_is_exactly_zero)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    s.antenna.z = -7.3;
    s.transducer.y = 1.7;
    s.vertical.draft = 1.9;
    s.conditions.roll_amplitude = 4 * DEG;
    s.conditions.pitch_amplitude = 2 * DEG;
    for (int arr = 0; arr < 2; arr++)
        for (size_t i = 0; i < NANG; i++) {
            s.echosounder.array = arr;
            struct sb_beam b;
            ck_assert_int_eq(sb_beam_setup(&s, 40.0, ANG[i] * DEG, &b, NULL), SB_OK);
            double dx[SB_COMP_COUNT] = { 0 }, e[3];
            sb_georef_error(&b, dx, e);
            ck_assert(e[0] == 0.0 && e[1] == 0.0 && e[2] == 0.0);
        }
}
END_TEST

START_TEST(parts_sum_to_full_model)
{
    /* every component perturbed at once: the sum of the parts is the model,
     * and a part a component does not feed does not move with it */
    struct sb_system s;
    sb_system_init_defaults(&s);
    s.antenna.x = 1.0; s.antenna.y = -0.5; s.antenna.z = -9.0;
    s.transducer.x = 0.4; s.transducer.y = 1.2; s.transducer.z = 2.0;
    s.motion_sensor.y = 0.3;
    s.conditions.roll_amplitude = 5 * DEG;
    s.conditions.roll_period = 7.0;
    s.conditions.pitch_amplitude = 2 * DEG;
    s.conditions.heave_amplitude = 1.0;
    s.conditions.speed = 5.0;
    struct sb_beam b;
    ck_assert_int_eq(sb_beam_setup(&s, 60.0, 37 * DEG, &b, NULL), SB_OK);
    double dx[SB_COMP_COUNT];
    for (int c = 0; c < SB_COMP_COUNT; c++)
        dx[c] = 1e-3 * (1 + c % 5) * ((c & 1) ? 1 : -1);
    double full[3], p1[3], p2[3], p4[3];
    sb_georef_error(&b, dx, full);
    sb_georef_error_parts(&b, dx, SB_PART_BEAM, p1);
    sb_georef_error_parts(&b, dx, SB_PART_LEVER, p2);
    sb_georef_error_parts(&b, dx, SB_PART_ADD, p4);
    for (int k = 0; k < 3; k++)
        ck_assert_double_eq_tol(full[k], p1[k] + p2[k] + p4[k], 1e-12);
    for (int c = 0; c < SB_COMP_COUNT; c++) {
        unsigned parts = sb_component_parts(c);
        ck_assert_uint_ne(parts, 0);
        for (unsigned p = 1; p <= 4; p <<= 1) {
            if (parts & p)
                continue;
            double a[3], z[3];
            sb_georef_error_parts(&b, dx, p, a);
            double save = dx[c];
            dx[c] += 0.01;
            sb_georef_error_parts(&b, dx, p, z);
            dx[c] = save;
            for (int k = 0; k < 3; k++)
                ck_assert(a[k] == z[k]);
        }
    }
}
END_TEST

/* closed forms of the beam terms, zero lever arms, transducer at the
 * surface (draft 0) so that D = depth */
START_TEST(jacobian_closed_forms_beam)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    const double c0 = s.sound_speed.surface;
    for (size_t id = 0; id < NDEP; id++)
        for (size_t ia = 0; ia < NANG; ia++) {
            const double D = DEP[id], th = ANG[ia] * DEG, y = D * tan(th);
            double j[3];
            s.echosounder.array = SB_ARRAY_FLAT;
            sens(&s, D, th, SB_COMP_ROLL, j);
            ck_vec(j, -D, 0, y, 1e-6);
            sens(&s, D, th, SB_COMP_ALIGN_ROLL, j);
            ck_vec(j, -D, 0, y, 1e-6);
            sens(&s, D, th, SB_COMP_PITCH, j);
            ck_vec(j, 0, D, 0, 1e-6);
            sens(&s, D, th, SB_COMP_ALIGN_PITCH, j);
            ck_vec(j, 0, D, 0, 1e-6);
            sens(&s, D, th, SB_COMP_HEADING, j);
            ck_vec(j, 0, -y, 0, 1e-6);
            sens(&s, D, th, SB_COMP_ALIGN_HEADING, j);
            ck_vec(j, 0, -y, 0, 1e-6);
            sens(&s, D, th, SB_COMP_RANGE, j);
            ck_vec(j, sin(th), 0, cos(th), 1e-6);
            sens(&s, D, th, SB_COMP_COLUMN_SS, j);
            ck_vec(j, y, 0, D, 1e-6);
            sens(&s, D, th, SB_COMP_POINTING, j);
            ck_vec(j, D, 0, -y, 1e-6);
            /* along-track pointing turns the slant range out of the fan */
            sens(&s, D, th, SB_COMP_POINTING_ALONG, j);
            ck_vec(j, 0, D / cos(th), 0, 1e-6);
            sens(&s, D, th, SB_COMP_SURFACE_SS, j);
            ck_vec(j, D * tan(th) / c0, 0, -D * tan(th) * tan(th) / c0, 1e-6);
            /* a curved array is not steered by the surface speed */
            s.echosounder.array = SB_ARRAY_CURVED;
            sens(&s, D, th, SB_COMP_SURFACE_SS, j);
            ck_vec(j, 0, 0, 0, 1e-6);
        }
}
END_TEST

START_TEST(jacobian_closed_forms_additive)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    s.vertical.draft = 1.5;
    s.conditions.speed = 4.5;
    double j[3];
    const double th = 33 * DEG;
    sens(&s, 30.0, th, SB_COMP_GNSS_E, j);   ck_vec(j, 1, 0, 0, 1e-9);
    sens(&s, 30.0, th, SB_COMP_GNSS_N, j);   ck_vec(j, 0, 1, 0, 1e-9);
    sens(&s, 30.0, th, SB_COMP_HEAVE, j);    ck_vec(j, 0, 0, 1, 1e-9);
    sens(&s, 30.0, th, SB_COMP_HEAVE_REL, j); ck_vec(j, 0, 0, 1, 1e-9);
    sens(&s, 30.0, th, SB_COMP_DRAFT, j);    ck_vec(j, 0, 0, 1, 1e-9);
    sens(&s, 30.0, th, SB_COMP_SQUAT, j);    ck_vec(j, 0, 0, 1, 1e-9);
    sens(&s, 30.0, th, SB_COMP_LOADING, j);  ck_vec(j, 0, 0, 1, 1e-9);
    sens(&s, 30.0, th, SB_COMP_WATER_LEVEL, j); ck_vec(j, 0, 0, -1, 1e-9);
    sens(&s, 30.0, th, SB_COMP_TIDE_ZONING, j); ck_vec(j, 0, 0, -1, 1e-9);
    /* position latency: along-track, speed x time */
    sens(&s, 30.0, th, SB_COMP_LATENCY_POSITION, j); ck_vec(j, 0, 4.5, 0, 1e-9);
    /* the tide-method terms do not enter the ellipsoid method and back */
    sens(&s, 30.0, th, SB_COMP_SEPARATION, j); ck_vec(j, 0, 0, 0, 1e-9);
    s.vertical.method = SB_VREF_ELLIPSOID;
    sens(&s, 30.0, th, SB_COMP_ELLIPSOID_HEIGHT, j); ck_vec(j, 0, 0, -1, 1e-9);
    sens(&s, 30.0, th, SB_COMP_SEPARATION, j); ck_vec(j, 0, 0, 1, 1e-9);
    sens(&s, 30.0, th, SB_COMP_HEAVE, j); ck_vec(j, 0, 0, 0, 1e-9);
    sens(&s, 30.0, th, SB_COMP_WATER_LEVEL, j); ck_vec(j, 0, 0, 0, 1e-9);
}
END_TEST

/* lever arms: rigid rotation of the arms by the attitude error */
START_TEST(jacobian_lever_arms)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    s.antenna.x = 3.0; s.antenna.y = -1.0; s.antenna.z = -10.0;
    s.transducer.x = 0.5; s.transducer.y = 2.0; s.transducer.z = 1.5;
    s.motion_sensor.x = 0.2; s.motion_sensor.y = 0.5; s.motion_sensor.z = 0.0;
    s.vertical.draft = 1.5;
    const double depth = 41.5, D = depth - 1.5;
    const double Lx = 0.5 - 3.0, Ly = 2.0 + 1.0, Lz = 1.5 + 10.0; /* antenna -> tx */
    const double Vx = 0.5 - 0.2, Vy = 2.0 - 0.5;                  /* motion -> tx */
    for (size_t ia = 0; ia < NANG; ia++) {
        const double th = ANG[ia] * DEG, y = D * tan(th);
        double j[3];
        /* roll: beam (-D, 0, y) + arm Rx: dE = -Lz, dZ(heave arm) = Vy */
        sens(&s, depth, th, SB_COMP_ROLL, j);
        ck_vec(j, -D - Lz, 0, y + Vy, 1e-6);
        /* pitch: beam (0, D, 0) + arm Ry: dN = Lz, dZ(heave arm) = -Vx */
        sens(&s, depth, th, SB_COMP_PITCH, j);
        ck_vec(j, 0, D + Lz, -Vx, 1e-6);
        /* heading: beam (0, -y, 0) + arm Rz: dN = -Ly, dE = Lx */
        sens(&s, depth, th, SB_COMP_HEADING, j);
        ck_vec(j, Lx, -y - Ly, 0, 1e-6);
        /* lever measurement errors, level vessel (no motion): one-to-one
         * horizontally, not vertically (the draft is measured at the
         * transducer) */
        sens(&s, depth, th, SB_COMP_LEVER_TX_Y, j);
        ck_vec(j, 1, 0, 0, 1e-9);
        sens(&s, depth, th, SB_COMP_LEVER_ANT_X, j);
        ck_vec(j, 0, -1, 0, 1e-9);
        sens(&s, depth, th, SB_COMP_LEVER_TX_Z, j);
        ck_vec(j, 0, 0, 0, 1e-9);
        sens(&s, depth, th, SB_COMP_LEVER_MOT_Y, j);
        ck_vec(j, 0, 0, 0, 1e-9);
    }
    /* ellipsoid method: the antenna height is carried down the arm, so the
     * arm's z error counts one-to-one and roll turns it: dZ = Ly */
    s.vertical.method = SB_VREF_ELLIPSOID;
    double j[3];
    sens(&s, depth, 0.0, SB_COMP_LEVER_TX_Z, j);
    ck_vec(j, 0, 0, 1, 1e-9);
    sens(&s, depth, 0.0, SB_COMP_LEVER_ANT_Z, j);
    ck_vec(j, 0, 0, -1, 1e-9);
    sens(&s, depth, 0.0, SB_COMP_ROLL, j);
    ck_vec(j, -D - Lz, 0, Ly, 1e-6);

    /* in motion: roll a, the arm error dy is turned by the RMS roll
     * a / sqrt 2, so it moves Z by sin(a / sqrt 2) (docs/model.md) */
    s.vertical.method = SB_VREF_TIDE;
    s.conditions.roll_amplitude = 6 * DEG;
    sens(&s, depth, 0.0, SB_COMP_LEVER_MOT_Y, j);
    ck_vec(j, 0, 0, -sin(6 * DEG / sqrt(2.0)), 1e-7);
}
END_TEST

START_TEST(latency_rms_rates)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    s.conditions.roll_amplitude = 5 * DEG;
    s.conditions.roll_period = 8.0;
    s.conditions.pitch_amplitude = 2 * DEG;
    s.conditions.pitch_period = 5.0;
    s.conditions.heave_amplitude = 1.2;
    s.conditions.heave_period = 9.0;
    /* RMS rate of a sin(2 pi t / T): a (2 pi / T) / sqrt(2) */
    const double wr = 5 * DEG * 2 * PI / 8.0 / sqrt(2.0);
    const double wp = 2 * DEG * 2 * PI / 5.0 / sqrt(2.0);
    const double wh = 1.2 * 2 * PI / 9.0 / sqrt(2.0);
    const double D = 25.0, th = -40 * DEG, y = D * tan(th);
    double j[3];
    sens(&s, D, th, SB_COMP_LATENCY_ROLL, j);
    ck_vec(j, -D * wr, 0, y * wr, 1e-6);
    sens(&s, D, th, SB_COMP_LATENCY_PITCH, j);
    ck_vec(j, 0, D * wp, 0, 1e-6);
    sens(&s, D, th, SB_COMP_LATENCY_HEAVE, j);
    ck_vec(j, 0, 0, wh, 1e-9);
}
END_TEST

START_TEST(uncertainties_per_beam)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    st(&s.echosounder.pointing, 0.1, SB_DIM_RATIO);
    s.echosounder.beam_across = 1.5 * DEG;
    s.echosounder.beam_along = 2.0 * DEG;
    st(&s.motion.heave_fraction, 0.05, SB_DIM_RATIO);
    s.conditions.heave_amplitude = 2.0;
    s.sound_speed.column = 1480.0;
    st(&s.sound_speed.column_u, 0.74, SB_DIM_SPEED);
    struct sb_beam b;
    for (size_t ia = 0; ia < NANG; ia++) {
        const double th = ANG[ia] * DEG;
        s.echosounder.array = SB_ARRAY_FLAT;
        ck_assert_int_eq(sb_beam_setup(&s, 50.0, th, &b, NULL), SB_OK);
        /* flat: 10 % of the beam width, widened 1/cos(theta) */
        ck_assert_double_eq_tol(b.u[SB_COMP_POINTING], 0.1 * 1.5 * DEG / cos(th), 1e-15);
        ck_assert_double_eq_tol(b.u[SB_COMP_POINTING_ALONG], 0.1 * 2.0 * DEG, 1e-15);
        s.echosounder.array = SB_ARRAY_CURVED;
        ck_assert_int_eq(sb_beam_setup(&s, 50.0, th, &b, NULL), SB_OK);
        ck_assert_double_eq_tol(b.u[SB_COMP_POINTING], 0.1 * 1.5 * DEG, 1e-15);
    }
    ck_assert_double_eq_tol(b.u[SB_COMP_HEAVE_REL], 0.05 * 2.0, 1e-15);
    ck_assert_double_eq_tol(b.u[SB_COMP_COLUMN_SS], 0.74 / 1480.0, 1e-15);
    /* range from sampling: step c / (2 fs) and pulse c tau / 2, each
     * rectangular (u = w / sqrt 12, JCGM 100:2008 4.3.7), in quadrature */
    s.echosounder.range_mode = SB_RANGE_SAMPLING;
    s.echosounder.sample_rate = 20e3;
    s.echosounder.pulse_length = 100e-6;
    ck_assert_int_eq(sb_beam_setup(&s, 50.0, 0.0, &b, NULL), SB_OK);
    const double w1 = 1480.0 / 40e3, w2 = 1480.0 * 100e-6 / 2;
    ck_assert_double_eq_tol(b.u[SB_COMP_RANGE], sqrt((w1 * w1 + w2 * w2) / 12.0), 1e-15);
    /* true geometry */
    s.vertical.draft = 2.0;
    ck_assert_int_eq(sb_beam_setup(&s, 52.0, 30 * DEG, &b, NULL), SB_OK);
    ck_assert_double_eq_tol(b.depth_tx_m, 50.0, 1e-12);
    ck_assert_double_eq_tol(b.across_m, 50.0 * tan(30 * DEG), 1e-12);
    ck_assert_double_eq_tol(b.t_oneway_s, 50.0 / cos(30 * DEG) / 1480.0, 1e-15);
    /* redepth = setup at the new depth */
    struct sb_beam b2;
    ck_assert_int_eq(sb_beam_redepth(&b, 80.0, NULL), SB_OK);
    ck_assert_int_eq(sb_beam_setup(&s, 80.0, 30 * DEG, &b2, NULL), SB_OK);
    ck_assert_int_eq(memcmp(&b, &b2, sizeof b), 0);
}
END_TEST

START_TEST(setup_errors)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    s.vertical.draft = 3.0;
    struct sb_beam b;
    struct sb_error err;
    ck_assert_int_eq(sb_beam_setup(&s, 2.0, 0.0, &b, &err), SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "below the transducer"));
    ck_assert_int_eq(sb_beam_setup(&s, 3.0, 0.0, &b, &err), SB_EINPUT);
    ck_assert_int_eq(sb_beam_setup(&s, NAN, 0.0, &b, &err), SB_EINPUT);
    ck_assert_int_eq(sb_beam_setup(&s, 10.0, INFINITY, &b, &err), SB_EINPUT);
    ck_assert_int_eq(sb_beam_setup(&s, 10.0, 76 * DEG, &b, &err), SB_EINPUT);
    ck_assert_int_eq(sb_beam_setup(&s, 10.0, -76 * DEG, &b, &err), SB_EINPUT);
    ck_assert_int_eq(sb_beam_setup(&s, 10.0, 75 * DEG, &b, &err), SB_OK);
    ck_assert_int_eq(sb_beam_redepth(&b, 1.0, &err), SB_EINPUT);
}
END_TEST

START_TEST(system_validation)
{
    struct sb_system *s = sb_system_alloc();
    ck_assert_ptr_nonnull(s);
    struct sb_error err;
    ck_assert_int_eq(sb_system_validate(s, &err), SB_OK);
    s->echosounder.max_angle = 90 * DEG;
    ck_assert_int_eq(sb_system_validate(s, &err), SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "echosounder.max_angle"));
    s->echosounder.max_angle = 0.0;
    ck_assert_int_eq(sb_system_validate(s, &err), SB_EINPUT);
    s->echosounder.max_angle = 70 * DEG;
    st(&s->motion.roll, -0.1, SB_DIM_ANGLE);
    ck_assert_int_eq(sb_system_validate(s, &err), SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "motion.roll"));
    st(&s->motion.roll, NAN, SB_DIM_ANGLE);
    ck_assert_int_eq(sb_system_validate(s, &err), SB_EINPUT);
    st(&s->motion.roll, 0.01, SB_DIM_LENGTH); /* wrong dimension */
    ck_assert_int_eq(sb_system_validate(s, &err), SB_EINPUT);
    st(&s->motion.roll, 0.01, SB_DIM_ANGLE);
    ck_assert_int_eq(sb_system_validate(s, &err), SB_OK);
    s->conditions.roll_amplitude = 5 * DEG;
    s->conditions.roll_period = 0.0;
    ck_assert_int_eq(sb_system_validate(s, &err), SB_EINPUT);
    ck_assert_ptr_nonnull(strstr(err.msg, "conditions.roll_period"));
    s->conditions.roll_period = 8.0;
    s->echosounder.range_mode = SB_RANGE_SAMPLING;
    ck_assert_int_eq(sb_system_validate(s, &err), SB_EINPUT); /* no sample rate */
    s->echosounder.sample_rate = 10e3;
    ck_assert_int_eq(sb_system_validate(s, &err), SB_OK);
    s->sound_speed.surface = 900.0;
    ck_assert_int_eq(sb_system_validate(s, &err), SB_EINPUT);
    sb_system_free(s);
    sb_system_free(NULL);
}
END_TEST

static Suite *suite(void)
{
    Suite *s = suite_create("georef");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, names_unique_and_stable);
    tcase_add_test(tc, zero_error_is_exactly_zero);
    tcase_add_test(tc, parts_sum_to_full_model);
    tcase_add_test(tc, jacobian_closed_forms_beam);
    tcase_add_test(tc, jacobian_closed_forms_additive);
    tcase_add_test(tc, jacobian_lever_arms);
    tcase_add_test(tc, latency_rms_rates);
    tcase_add_test(tc, uncertainties_per_beam);
    tcase_add_test(tc, setup_errors);
    tcase_add_test(tc, system_validation);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    SRunner *sr = srunner_create(suite());
    srunner_run_all(sr, CK_NORMAL);
    int nf = srunner_ntests_failed(sr);
    srunner_free(sr);
    return nf ? EXIT_FAILURE : EXIT_SUCCESS;
}
