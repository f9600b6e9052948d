/*
 * Tests of the GUM propagation for one sounding (src/lib/propagate.c).
 *
 * Sources of the check values:
 *   - JCGM 100:2008 (GUM) 5.1.2, eq. (10): for independent inputs
 *     u_c^2(y) = sum (c_i u_i)^2; with one input, u_c = |c_1| u_1;
 *   - the single-component closed forms of docs/model.md (after Hare, Godin
 *     & Mayer 1995, CHS): D depth below the transducer, theta the beam
 *     angle, y = D tan(theta):
 *         roll      sigma_z = y u,          horizontal D u   (across only)
 *         heading   sigma_z = 0,            horizontal y u   (along only)
 *         range     sigma_z = cos(theta) u, horizontal sin(theta) u
 *         column    sigma_z = D eps,        horizontal y eps (eps relative)
 *         heave     sigma_z = u
 *         GNSS      horizontal circular, u per axis
 *   - 95 % figures: 1-D normal 1.959963984540054 sigma (the 0.975 quantile
 *     of the standard normal, e.g. Abramowitz & Stegun 1964 table 26.5,
 *     JCGM 100:2008 table G.1 gives 1.960); a 2-D error on one axis only is
 *     a 1-D normal (same factor); a circular 2-D normal has a Rayleigh
 *     radius, 95 % at sqrt(-2 ln 0.05) sigma = 2.4477 sigma; IHO S-44 ed.
 *     6.0.0 (2020) section 2 writes 2.45 sigma for a 2-D quantity;
 *   - an independent computation of C = J diag(u^2) J^T with GSL BLAS
 *     (dgemm) from the Jacobian, and of the Jacobian itself by central
 *     differences of the full sb_georef_error written here.
 */
#include <check.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_blas.h>
#include <gsl/gsl_matrix.h>

#include "swathbudget/georef.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/propagate.h"
#include "swathbudget/system.h"

#define PI 3.14159265358979323846
#define DEG (PI / 180.0)
#define K1 1.959963984540054   /* normal 0.975 quantile */
#define K2 2.447746830680816   /* sqrt(-2 ln 0.05) */

static struct sb_horiz95 *H;

static void st(struct sb_stated *s, double u, unsigned dim)
{
    memset(s, 0, sizeof *s);
    s->value = s->u = s->written = u;
    s->dim = dim;
    s->type = SB_UTYPE_SD;
    s->dist = SB_DIST_NORMAL;
}

#define ck_rel(a, b, rel) ck_assert_double_eq_tol((a), (b), (rel) * fabs(b) + 1e-13)

static void tpu_at(const struct sb_system *s, double depth, double ang, struct sb_tpu *t,
                   struct sb_breakdown *bd)
{
    struct sb_beam b;
    struct sb_error err;
    ck_assert_int_eq(sb_beam_setup(s, depth, ang, &b, &err), SB_OK);
    ck_assert_int_eq(sb_propagate(&b, H, t, bd), SB_OK);
}

static const double ANG[] = { -72, -50, -15, 0, 8, 45, 65 };
static const double DEP[] = { 3.0, 20.0, 150.0, 1200.0 };
#define NANG (sizeof ANG / sizeof ANG[0])
#define NDEP (sizeof DEP / sizeof DEP[0])

START_TEST(single_roll)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    const double u = 0.03 * DEG;
    st(&s.motion.roll, u, SB_DIM_ANGLE);
    for (size_t id = 0; id < NDEP; id++)
        for (size_t ia = 0; ia < NANG; ia++) {
            const double D = DEP[id], th = ANG[ia] * DEG;
            struct sb_tpu t;
            tpu_at(&s, D, th, &t, NULL);
            ck_rel(t.sigma_z_m, fabs(D * tan(th)) * u, 1e-6);
            ck_rel(t.tvu95_m, K1 * fabs(D * tan(th)) * u, 1e-6);
            /* horizontal error across-track only: a 1-D normal */
            ck_rel(t.thu95_m, K1 * D * u, 1e-6);
            ck_rel(t.thu95_s44_m, 2.45 * D * u, 1e-6);
        }
}
END_TEST

START_TEST(single_heading)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    const double u = 0.1 * DEG;
    st(&s.motion.heading, u, SB_DIM_ANGLE);
    for (size_t id = 0; id < NDEP; id++)
        for (size_t ia = 0; ia < NANG; ia++) {
            const double D = DEP[id], th = ANG[ia] * DEG;
            struct sb_tpu t;
            tpu_at(&s, D, th, &t, NULL);
            ck_assert_double_eq_tol(t.tvu95_m, 0.0, 1e-12);
            ck_rel(t.thu95_m, K1 * fabs(D * tan(th)) * u, 1e-6);
        }
}
END_TEST

START_TEST(single_range)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    const double u = 0.05;
    st(&s.echosounder.range_resolution, u, SB_DIM_LENGTH);
    for (size_t id = 0; id < NDEP; id++)
        for (size_t ia = 0; ia < NANG; ia++) {
            const double D = DEP[id], th = ANG[ia] * DEG;
            struct sb_tpu t;
            tpu_at(&s, D, th, &t, NULL);
            ck_rel(t.tvu95_m, K1 * cos(th) * u, 1e-6);
            ck_rel(t.thu95_m, K1 * fabs(sin(th)) * u, 1e-6);
        }
}
END_TEST

START_TEST(single_column_scale)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    const double eps = 0.002; /* 0.2 % of the column speed */
    st(&s.sound_speed.column_u, eps, SB_DIM_RATIO);
    s.vertical.draft = 2.0;
    for (size_t id = 0; id < NDEP; id++)
        for (size_t ia = 0; ia < NANG; ia++) {
            const double D = DEP[id], th = ANG[ia] * DEG;
            struct sb_tpu t;
            tpu_at(&s, D + 2.0, th, &t, NULL);
            ck_rel(t.tvu95_m, K1 * D * eps, 1e-6);
            ck_rel(t.thu95_m, K1 * fabs(D * tan(th)) * eps, 1e-6);
        }
}
END_TEST

START_TEST(single_heave_and_gnss)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    st(&s.motion.heave, 0.07, SB_DIM_LENGTH);
    st(&s.positioning.horizontal, 0.4, SB_DIM_LENGTH);
    for (size_t id = 0; id < NDEP; id++)
        for (size_t ia = 0; ia < NANG; ia++) {
            struct sb_tpu t;
            tpu_at(&s, DEP[id], ANG[ia] * DEG, &t, NULL);
            ck_rel(t.tvu95_m, K1 * 0.07, 1e-9);
            ck_rel(t.thu95_m, K2 * 0.4, 1e-9);       /* Rayleigh */
            ck_rel(t.thu95_s44_m, 2.45 * 0.4, 1e-12); /* S-44 */
            ck_rel(t.sigma_h_max_m, 0.4, 1e-12);
            ck_rel(t.sigma_h_min_m, 0.4, 1e-12);
        }
}
END_TEST

/* A realistic (invented) system with every component stated. */
static void realistic(struct sb_system *s)
{
    sb_system_init_defaults(s);
    s->antenna.x = 1.2; s->antenna.y = 0.4; s->antenna.z = -8.5;
    s->transducer.x = 0.5; s->transducer.y = 1.1; s->transducer.z = 2.3;
    for (int i = 0; i < 3; i++) {
        st(&s->antenna.u[i], 0.01, SB_DIM_LENGTH);
        st(&s->transducer.u[i], 0.01, SB_DIM_LENGTH);
        st(&s->motion_sensor.u[i], 0.005, SB_DIM_LENGTH);
    }
    st(&s->positioning.horizontal, 0.10, SB_DIM_LENGTH);
    st(&s->positioning.latency, 0.001, SB_DIM_TIME);
    st(&s->motion.roll, 0.02 * DEG, SB_DIM_ANGLE);
    st(&s->motion.pitch, 0.02 * DEG, SB_DIM_ANGLE);
    st(&s->motion.heading, 0.05 * DEG, SB_DIM_ANGLE);
    st(&s->motion.heave, 0.05, SB_DIM_LENGTH);
    st(&s->motion.heave_fraction, 0.05, SB_DIM_RATIO);
    st(&s->motion.latency, 0.002, SB_DIM_TIME);
    st(&s->motion.align_roll, 0.02 * DEG, SB_DIM_ANGLE);
    st(&s->motion.align_pitch, 0.05 * DEG, SB_DIM_ANGLE);
    st(&s->motion.align_heading, 0.05 * DEG, SB_DIM_ANGLE);
    st(&s->sound_speed.surface_u, 0.5, SB_DIM_SPEED);
    s->sound_speed.column = 1490.0;
    st(&s->sound_speed.column_u, 0.002, SB_DIM_RATIO);
    s->echosounder.range_mode = SB_RANGE_SAMPLING;
    s->echosounder.sample_rate = 30e3;
    s->echosounder.pulse_length = 50e-6;
    st(&s->echosounder.pointing, 0.10, SB_DIM_RATIO);
    s->vertical.draft = 2.3;
    st(&s->vertical.draft_u, 0.02, SB_DIM_LENGTH);
    s->vertical.squat = 0.05;
    st(&s->vertical.squat_u, 0.03, SB_DIM_LENGTH);
    st(&s->vertical.loading_u, 0.02, SB_DIM_LENGTH);
    st(&s->vertical.water_level, 0.03, SB_DIM_LENGTH);
    st(&s->vertical.zoning, 0.05, SB_DIM_LENGTH);
    s->conditions.speed = 4.0;
    s->conditions.roll_amplitude = 3.0 * DEG;
    s->conditions.pitch_amplitude = 1.5 * DEG;
    s->conditions.heave_amplitude = 0.5;
}

START_TEST(covariance_independent_check)
{
    struct sb_system s;
    realistic(&s);
    struct sb_error err;
    ck_assert_int_eq(sb_system_validate(&s, &err), SB_OK);
    for (size_t ia = 0; ia < NANG; ia++) {
        struct sb_beam b;
        ck_assert_int_eq(sb_beam_setup(&s, 60.0, ANG[ia] * DEG, &b, NULL), SB_OK);
        struct sb_tpu t;
        struct sb_breakdown bd;
        ck_assert_int_eq(sb_propagate(&b, H, &t, &bd), SB_OK);

        /* Jacobian by central differences of the FULL model, written here */
        gsl_matrix *Ju = gsl_matrix_alloc(3, SB_COMP_COUNT);
        for (int c = 0; c < SB_COMP_COUNT; c++) {
            double dx[SB_COMP_COUNT] = { 0 }, ep[3], em[3];
            double h = b.u[c] > 0 ? 1e-3 * b.u[c] : 1e-9;
            dx[c] = h;
            sb_georef_error(&b, dx, ep);
            dx[c] = -h;
            sb_georef_error(&b, dx, em);
            for (int k = 0; k < 3; k++) {
                double jk = (ep[k] - em[k]) / (2 * h);
                /* the library's parts-wise Jacobian agrees */
                if (b.u[c] > 0)
                    ck_assert_double_eq_tol(bd.j[c][k], jk, 1e-6 * fabs(jk) + 1e-9);
                gsl_matrix_set(Ju, k, c, jk * b.u[c]);
            }
        }
        /* C = (J U)(J U)^T by BLAS */
        gsl_matrix *C = gsl_matrix_alloc(3, 3);
        gsl_blas_dgemm(CblasNoTrans, CblasTrans, 1.0, Ju, Ju, 0.0, C);
        ck_rel(t.cov_ee_m2, gsl_matrix_get(C, 0, 0), 1e-6);
        ck_rel(t.cov_nn_m2, gsl_matrix_get(C, 1, 1), 1e-6);
        ck_assert_double_eq_tol(t.cov_en_m2, gsl_matrix_get(C, 0, 1),
                                1e-6 * sqrt(t.cov_ee_m2 * t.cov_nn_m2));
        ck_rel(t.sigma_z_m * t.sigma_z_m, gsl_matrix_get(C, 2, 2), 1e-6);
        gsl_matrix_free(C);
        gsl_matrix_free(Ju);

        /* shares add to one; contributions add in quadrature (GUM eq. 10) */
        double sz = 0, sh = 0, q = 0;
        for (int c = 0; c < SB_COMP_COUNT; c++) {
            sz += bd.share_z[c];
            sh += bd.share_h[c];
            q += bd.cz[c] * bd.cz[c];
        }
        ck_assert_double_eq_tol(sz, 1.0, 1e-12);
        ck_assert_double_eq_tol(sh, 1.0, 1e-12);
        ck_rel(sqrt(q), t.sigma_z_m, 1e-12);
        /* exact radius between the one-axis and the S-44 figures */
        ck_assert(t.thu95_m <= t.thu95_s44_m);
        ck_assert(t.thu95_m >= K1 * t.sigma_h_max_m * (1 - 1e-12));
        ck_rel(t.tvu95_m, K1 * t.sigma_z_m, 1e-15);
    }
}
END_TEST

START_TEST(symmetry_port_starboard)
{
    /* centred lever arms: the geometry is a mirror image, so port and
     * starboard have the same figures (common practice: a symmetric
     * installation has a symmetric budget) */
    struct sb_system s;
    realistic(&s);
    s.antenna.y = s.transducer.y = s.motion_sensor.y = 0.0;
    for (double a = 1; a <= 75; a += 7) {
        struct sb_tpu p, q;
        tpu_at(&s, 45.0, -a * DEG, &p, NULL);
        tpu_at(&s, 45.0, a * DEG, &q, NULL);
        ck_rel(p.tvu95_m, q.tvu95_m, 1e-9);
        ck_rel(p.thu95_m, q.thu95_m, 1e-9);
    }
    /* off-centre transducer (2 m to starboard of the motion sensor) + roll
     * only: sigma_z = |D tan(theta) + 2| u_roll (docs/model.md: the roll
     * error also tilts the heave arm), so starboard is worse than port */
    struct sb_system r;
    sb_system_init_defaults(&r);
    const double u = 0.05 * DEG;
    st(&r.motion.roll, u, SB_DIM_ANGLE);
    r.transducer.y = 2.0;
    for (double a = 5; a <= 75; a += 10) {
        struct sb_tpu p, q;
        const double D = 30.0, th = a * DEG;
        tpu_at(&r, D, -th, &p, NULL);
        tpu_at(&r, D, th, &q, NULL);
        ck_rel(q.sigma_z_m, fabs(D * tan(th) + 2.0) * u, 1e-6);
        ck_rel(p.sigma_z_m, fabs(-D * tan(th) + 2.0) * u, 1e-6);
        ck_assert(q.tvu95_m > p.tvu95_m);
    }
}
END_TEST

START_TEST(tvu_monotonic_in_angle)
{
    /* realistic system on the centreline: TVU grows with |theta| (roll,
     * pointing and steering terms grow, the range term shrinks only as
     * cos(theta)).  (Off the centreline it need not near nadir: the roll
     * term |D tan(theta) + dy| u has its minimum at D tan(theta) = -dy on
     * the side opposite the offset -- symmetry_port_starboard checks that
     * form.)  Also not in very shallow water: sigma_z^2 = A + B tan^2 + u_R^2
     * cos^2 falls near nadir while B < u_R^2 (about 3 m below this
     * transducer), so the check runs from 10 m. */
    struct sb_system s;
    realistic(&s);
    s.antenna.y = s.transducer.y = s.motion_sensor.y = 0.0;
    const double deps[] = { 10.0, 20.0, 150.0, 1200.0 };
    for (size_t id = 0; id < 4; id++) {
        double prev_p = 0, prev_s = 0;
        for (double a = 0; a <= 75.0; a += 0.5) {
            struct sb_tpu p, q;
            tpu_at(&s, deps[id] + 2.35, -a * DEG, &p, NULL);
            tpu_at(&s, deps[id] + 2.35, a * DEG, &q, NULL);
            ck_assert(p.tvu95_m >= prev_p * (1 - 1e-12));
            ck_assert(q.tvu95_m >= prev_s * (1 - 1e-12));
            prev_p = p.tvu95_m;
            prev_s = q.tvu95_m;
        }
    }
}
END_TEST

START_TEST(breakdown_and_dominant)
{
    struct sb_system s;
    sb_system_init_defaults(&s);
    st(&s.motion.roll, 0.1 * DEG, SB_DIM_ANGLE);
    st(&s.motion.heave, 0.01, SB_DIM_LENGTH);
    struct sb_tpu t;
    struct sb_breakdown bd;
    /* at 60 deg and 100 m: roll gives 100 tan60 * 0.1 deg = 0.30 m against
     * 0.01 m of heave */
    tpu_at(&s, 100.0, 60 * DEG, &t, &bd);
    ck_assert_int_eq(sb_breakdown_dominant(&bd, 1), SB_COMP_ROLL);
    ck_rel(fabs(bd.cz[SB_COMP_ROLL]), 100 * tan(60 * DEG) * 0.1 * DEG, 1e-6);
    ck_rel(bd.cz[SB_COMP_HEAVE], 0.01, 1e-9);
    /* at nadir roll gives no vertical error: heave dominates */
    tpu_at(&s, 100.0, 0.0, &t, &bd);
    ck_assert_int_eq(sb_breakdown_dominant(&bd, 1), SB_COMP_HEAVE);
    ck_assert_int_eq(sb_breakdown_dominant(&bd, 0), SB_COMP_ROLL);
    /* no table: the exact radius is NAN, the S-44 figure still there */
    struct sb_beam b;
    ck_assert_int_eq(sb_beam_setup(&s, 100.0, 0.0, &b, NULL), SB_OK);
    ck_assert_int_eq(sb_propagate(&b, NULL, &t, NULL), SB_OK);
    ck_assert(isnan(t.thu95_m));
    ck_rel(t.thu95_s44_m, 2.45 * 100 * 0.1 * DEG, 1e-6);
    /* perfect system: all zero */
    sb_system_init_defaults(&s);
    tpu_at(&s, 10.0, 0.3, &t, &bd);
    ck_assert(t.tvu95_m == 0.0 && t.thu95_m == 0.0);
    ck_assert_int_eq(sb_breakdown_dominant(&bd, 1), -1);
}
END_TEST

static Suite *suite(void)
{
    Suite *s = suite_create("propagate");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 60);
    tcase_add_test(tc, single_roll);
    tcase_add_test(tc, single_heading);
    tcase_add_test(tc, single_range);
    tcase_add_test(tc, single_column_scale);
    tcase_add_test(tc, single_heave_and_gnss);
    tcase_add_test(tc, covariance_independent_check);
    tcase_add_test(tc, symmetry_port_starboard);
    tcase_add_test(tc, tvu_monotonic_in_angle);
    tcase_add_test(tc, breakdown_and_dominant);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    struct sb_error err;
    H = sb_horiz95_alloc(&err);
    if (!H)
        return EXIT_FAILURE;
    SRunner *sr = srunner_create(suite());
    /* the table is built once in the parent; no fork needed */
    srunner_set_fork_status(sr, CK_NOFORK);
    srunner_run_all(sr, CK_NORMAL);
    int nf = srunner_ntests_failed(sr);
    srunner_free(sr);
    sb_horiz95_free(H);
    return nf ? EXIT_FAILURE : EXIT_SUCCESS;
}
