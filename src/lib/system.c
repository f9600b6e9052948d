/*
 * swathbudget — defaults, allocation and cross-field validation of a survey
 * system description (struct sb_system).  No YAML here: spec.c fills the
 * struct, this file only knows what a complete, consistent one looks like.
 */
#include "swathbudget/system.h"

#include "swathbudget/refraction.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define DEG (3.14159265358979323846 / 180.0) /* M_PI is not C11 */

/* A zero standard uncertainty of the given dimension, written in SI. */
static void zero_stated(struct sb_stated *s, unsigned dim, const char *unit)
{
    memset(s, 0, sizeof *s);
    s->dim = dim;
    s->type = SB_UTYPE_SD;
    s->dist = SB_DIST_NORMAL;
    strncpy(s->unit, unit, SB_UNIT_NAME_MAX - 1);
}

static void zero_lever(struct sb_lever_arm *l)
{
    l->x = l->y = l->z = 0.0;
    for (int i = 0; i < 3; i++)
        zero_stated(&l->u[i], SB_DIM_LENGTH, "m");
}

void sb_system_init_defaults(struct sb_system *sys)
{
    memset(sys, 0, sizeof *sys);
    strcpy(sys->name, "system");

    zero_lever(&sys->antenna);
    zero_lever(&sys->transducer);
    zero_lever(&sys->motion_sensor);

    zero_stated(&sys->positioning.horizontal, SB_DIM_LENGTH, "m");
    zero_stated(&sys->positioning.vertical, SB_DIM_LENGTH, "m");
    zero_stated(&sys->positioning.latency, SB_DIM_TIME, "s");

    zero_stated(&sys->motion.roll, SB_DIM_ANGLE, "rad");
    zero_stated(&sys->motion.pitch, SB_DIM_ANGLE, "rad");
    zero_stated(&sys->motion.heading, SB_DIM_ANGLE, "rad");
    zero_stated(&sys->motion.heave, SB_DIM_LENGTH, "m");
    zero_stated(&sys->motion.heave_fraction, SB_DIM_RATIO, "%");
    zero_stated(&sys->motion.latency, SB_DIM_TIME, "s");
    zero_stated(&sys->motion.align_roll, SB_DIM_ANGLE, "rad");
    zero_stated(&sys->motion.align_pitch, SB_DIM_ANGLE, "rad");
    zero_stated(&sys->motion.align_heading, SB_DIM_ANGLE, "rad");

    sys->sound_speed.surface = 1500.0;
    zero_stated(&sys->sound_speed.surface_u, SB_DIM_SPEED, "m/s");
    sys->sound_speed.column = 1500.0;
    zero_stated(&sys->sound_speed.column_u, SB_DIM_SPEED, "m/s");

    sys->echosounder.frequency = 0.0;
    sys->echosounder.beam_across = 1.0 * DEG;
    sys->echosounder.beam_along = 1.0 * DEG;
    sys->echosounder.array = SB_ARRAY_FLAT;
    sys->echosounder.range_mode = SB_RANGE_GIVEN;
    zero_stated(&sys->echosounder.range_resolution, SB_DIM_LENGTH, "m");
    sys->echosounder.sample_rate = 0.0;
    sys->echosounder.pulse_length = 0.0;
    zero_stated(&sys->echosounder.pointing, SB_DIM_RATIO, "%");
    sys->echosounder.max_angle = 75.0 * DEG;
    sys->echosounder.beams = 0;
    sys->echosounder.beam_spacing = 0;
    sys->echosounder.ping_overhead = 0.0;
    sys->echosounder.feature_soundings = 3.0; /* common practice */

    sys->vertical.method = SB_VREF_TIDE;
    zero_stated(&sys->vertical.draft_u, SB_DIM_LENGTH, "m");
    zero_stated(&sys->vertical.squat_u, SB_DIM_LENGTH, "m");
    zero_stated(&sys->vertical.loading_u, SB_DIM_LENGTH, "m");
    zero_stated(&sys->vertical.water_level, SB_DIM_LENGTH, "m");
    zero_stated(&sys->vertical.zoning, SB_DIM_LENGTH, "m");
    zero_stated(&sys->vertical.separation, SB_DIM_LENGTH, "m");

    sys->conditions.roll_period = 8.0;
    sys->conditions.pitch_period = 6.0;
    sys->conditions.heave_period = 6.0;
}

struct sb_system *sb_system_alloc(void)
{
    struct sb_system *s = malloc(sizeof *s);
    if (s)
        sb_system_init_defaults(s);
    return s;
}

void sb_system_release(struct sb_system *sys)
{
    if (!sys)
        return;
    sb_refraction_free(sys->sound_speed.refraction);
    sys->sound_speed.refraction = NULL;
    sys->sound_speed.model = SB_COLUMN_CONSTANT;
}

void sb_system_free(struct sb_system *sys)
{
    sb_system_release(sys);
    free(sys);
}

/* Speeds of a profile for the engine: the same plausible range as the
 * constant speeds (a speed outside it is a unit or typing error). */
static int check_speeds(const double *c, size_t n, const char *what,
                        struct sb_error *err)
{
    for (size_t i = 0; i < n; i++)
        if (!(c[i] > 1300.0 && c[i] < 1800.0))
            return sb_error_set(err, SB_EINPUT, "", 0, 0,
                                "%ssample %zu: speed %g m/s (expected a sound "
                                "speed between 1300 and 1800 m/s)",
                                what, i + 1, c[i]);
    return SB_OK;
}

static void adopt(struct sb_system *sys, struct sb_refraction *r, int model)
{
    sb_refraction_free(sys->sound_speed.refraction);
    sys->sound_speed.refraction = r;
    sys->sound_speed.model = model;
    sys->sound_speed.column = r->ref.c_mean;
}

int sb_system_set_profile(struct sb_system *sys, const double *depth_m,
                          const double *speed_mps, size_t n,
                          struct sb_error *err)
{
    struct sb_refraction *r;
    int rc = check_speeds(speed_mps, n, "", err);
    if (rc == SB_OK)
        rc = sb_refraction_alloc_profile(depth_m, speed_mps, n, NULL, &r, err);
    if (rc == SB_OK)
        adopt(sys, r, SB_COLUMN_PROFILE);
    return rc;
}

int sb_system_set_casts(struct sb_system *sys, const double *const *depth_m,
                        const double *const *speed_mps, const size_t *n,
                        size_t n_casts, int reference, struct sb_error *err)
{
    struct sb_refraction *r;
    int rc = SB_OK;
    for (size_t k = 0; k < n_casts && k < SB_CASTS_MAX && rc == SB_OK; k++) {
        char what[32];
        snprintf(what, sizeof what, "cast %zu ", k + 1);
        rc = check_speeds(speed_mps[k], n[k], what, err);
    }
    if (rc == SB_OK)
        rc = sb_refraction_alloc_casts(depth_m, speed_mps, n, n_casts,
                                       reference, &r, err);
    if (rc == SB_OK)
        adopt(sys, r, SB_COLUMN_CASTS);
    return rc;
}

const char *sb_system_describe_column(const struct sb_system *sys, char *buf,
                                      size_t n)
{
    const struct sb_sound_speed *ss = &sys->sound_speed;
    const struct sb_refraction *r = ss->refraction;

    if (ss->model == SB_COLUMN_CONSTANT || !r)
        snprintf(buf, n, "constant %.1f m/s, straight rays", ss->column);
    else if (ss->model == SB_COLUMN_PROFILE)
        snprintf(buf, n, "measured profile %s, %zu samples, traced (mean %.1f m/s)",
                 r->source, r->ref.n, ss->column);
    else if (r->reference == SB_REFERENCE_MEAN)
        snprintf(buf, n, "%zu casts, their mean traced (%zu samples, mean %.1f m/s); "
                 "their spread is the refraction component", r->n_casts, r->ref.n,
                 ss->column);
    else
        snprintf(buf, n, "%zu casts, cast %d traced (%zu samples, mean %.1f m/s); "
                 "their spread is the refraction component", r->n_casts,
                 r->reference + 1, r->ref.n, ss->column);
    return buf;
}

double sb_system_abs_u(const struct sb_stated *s, double reference)
{
    return s->dim == SB_DIM_RATIO ? s->u * fabs(reference) : s->u;
}

/* ---- validation ------------------------------------------------------- */

static int bad(struct sb_error *err, const char *field, const char *what)
{
    return sb_error_set(err, SB_EINPUT, "", 0, 0, "%s: %s", field, what);
}

static int check_stated(const struct sb_stated *s, unsigned dims,
                        const char *field, struct sb_error *err)
{
    if (!isfinite(s->value) || !isfinite(s->u))
        return bad(err, field, "uncertainty is not a finite number (a finite value >= 0)");
    if (s->value < 0.0 || s->u < 0.0)
        return bad(err, field, "uncertainty is negative (a value >= 0)");
    if (s->u > 0.0 && !(s->dim & dims)) {
        char buf[SB_DIM_DESCRIBE_MAX];
        return sb_error_set(err, SB_EINPUT, "", 0, 0, "%s: wrong kind of unit (%s)",
                            field, sb_dim_describe(dims, buf, sizeof buf));
    }
    return SB_OK;
}

static int check_finite(double v, const char *field, struct sb_error *err)
{
    if (!isfinite(v))
        return bad(err, field, "not a finite number (a finite value)");
    return SB_OK;
}

static int check_range(double v, double lo, double hi, int lo_open, int hi_open,
                       const char *field, const char *expected, struct sb_error *err)
{
    int ok = isfinite(v) && (lo_open ? v > lo : v >= lo) && (hi_open ? v < hi : v <= hi);
    if (!ok)
        return sb_error_set(err, SB_EINPUT, "", 0, 0, "%s: value out of range (%s)",
                            field, expected);
    return SB_OK;
}

static int check_lever(const struct sb_lever_arm *l, const char *name, struct sb_error *err)
{
    static const char *axis[3] = { "x", "y", "z" };
    char f[96];
    const double v[3] = { l->x, l->y, l->z };
    for (int i = 0; i < 3; i++) {
        snprintf(f, sizeof f, "%s.%s", name, axis[i]);
        if (check_finite(v[i], f, err))
            return SB_EINPUT;
        if (fabs(v[i]) > 1000.0)
            return bad(err, f, "lever arm longer than 1000 m (a position on the vessel, in m)");
        snprintf(f, sizeof f, "%s.u_%s", name, axis[i]);
        if (check_stated(&l->u[i], SB_DIM_LENGTH, f, err))
            return SB_EINPUT;
    }
    return SB_OK;
}

int sb_system_validate(const struct sb_system *s, struct sb_error *err)
{
    const unsigned L = SB_DIM_LENGTH, A = SB_DIM_ANGLE, T = SB_DIM_TIME;
    const double deg = DEG;

    if (check_lever(&s->antenna, "antenna", err) ||
        check_lever(&s->transducer, "transducer", err) ||
        check_lever(&s->motion_sensor, "motion_sensor", err))
        return SB_EINPUT;

    if (check_stated(&s->positioning.horizontal, L, "positioning.horizontal", err) ||
        check_stated(&s->positioning.vertical, L, "positioning.vertical", err) ||
        check_stated(&s->positioning.latency, T, "positioning.latency", err))
        return SB_EINPUT;

    if (check_stated(&s->motion.roll, A, "motion.roll", err) ||
        check_stated(&s->motion.pitch, A, "motion.pitch", err) ||
        check_stated(&s->motion.heading, A, "motion.heading", err) ||
        check_stated(&s->motion.heave, L, "motion.heave", err) ||
        check_stated(&s->motion.heave_fraction, SB_DIM_RATIO, "motion.heave_fraction", err) ||
        check_stated(&s->motion.latency, T, "motion.latency", err) ||
        check_stated(&s->motion.align_roll, A, "motion.align_roll", err) ||
        check_stated(&s->motion.align_pitch, A, "motion.align_pitch", err) ||
        check_stated(&s->motion.align_heading, A, "motion.align_heading", err))
        return SB_EINPUT;

    if (check_range(s->sound_speed.surface, 1300.0, 1800.0, 1, 1, "sound_speed.surface",
                    "a sound speed between 1300 and 1800 m/s", err) ||
        check_stated(&s->sound_speed.surface_u, SB_DIM_SPEED | SB_DIM_RATIO,
                     "sound_speed.surface_u", err) ||
        check_range(s->sound_speed.column, 1300.0, 1800.0, 1, 1, "sound_speed.column",
                    "a sound speed between 1300 and 1800 m/s", err) ||
        check_stated(&s->sound_speed.column_u, SB_DIM_SPEED | SB_DIM_RATIO,
                     "sound_speed.column_u", err))
        return SB_EINPUT;
    if (s->sound_speed.model != SB_COLUMN_CONSTANT &&
        !((s->sound_speed.model == SB_COLUMN_PROFILE ||
           s->sound_speed.model == SB_COLUMN_CASTS) &&
          s->sound_speed.refraction))
        return bad(err, "sound_speed.model", "a profile model without its profile (sb_system_set_profile or sb_system_set_casts)");
    /* a 10 % speed uncertainty is already far outside any survey practice;
     * beyond it the linearisation (and Snell steering) stops making sense */
    if (sb_system_abs_u(&s->sound_speed.surface_u, s->sound_speed.surface) >
        0.1 * s->sound_speed.surface)
        return bad(err, "sound_speed.surface_u", "uncertainty larger than 10 % of the speed (a smaller uncertainty)");
    if (sb_system_abs_u(&s->sound_speed.column_u, s->sound_speed.column) >
        0.1 * s->sound_speed.column)
        return bad(err, "sound_speed.column_u", "uncertainty larger than 10 % of the speed (a smaller uncertainty)");

    const struct sb_echosounder *e = &s->echosounder;
    if (check_range(e->frequency, 0.0, 10e6, 0, 0, "echosounder.frequency",
                    "a frequency between 0 and 10 MHz", err) ||
        check_range(e->beam_across, 0.0, 30.0 * deg, 1, 0, "echosounder.beam_across",
                    "a beam width above 0 and at most 30 deg", err) ||
        check_range(e->beam_along, 0.0, 30.0 * deg, 1, 0, "echosounder.beam_along",
                    "a beam width above 0 and at most 30 deg", err) ||
        check_range(e->max_angle, 0.0, 90.0 * deg, 1, 1, "echosounder.max_angle",
                    "an angle above 0 and below 90 deg", err))
        return SB_EINPUT;
    if (e->array != SB_ARRAY_FLAT && e->array != SB_ARRAY_CURVED)
        return bad(err, "echosounder.array", "unknown array type (flat or curved)");
    if (e->range_mode == SB_RANGE_GIVEN) {
        if (check_stated(&e->range_resolution, L, "echosounder.range_resolution", err))
            return SB_EINPUT;
    } else if (e->range_mode == SB_RANGE_SAMPLING) {
        if (check_range(e->sample_rate, 0.0, 1e9, 1, 0, "echosounder.sample_rate",
                        "a sample rate above 0 Hz", err) ||
            check_range(e->pulse_length, 0.0, 1.0, 0, 0, "echosounder.pulse_length",
                        "a pulse length between 0 and 1 s", err))
            return SB_EINPUT;
    } else {
        return bad(err, "echosounder.range_mode", "unknown range mode (given or sampling)");
    }
    if (check_stated(&e->pointing, SB_DIM_RATIO | A, "echosounder.pointing", err))
        return SB_EINPUT;
    if (e->pointing.dim == SB_DIM_RATIO && e->pointing.u > 1.0)
        return bad(err, "echosounder.pointing", "more than the whole beam width (a fraction of at most 100 %)");
    if (e->beams != 0 && (e->beams < 2 || e->beams > 100000))
        return bad(err, "echosounder.beams", "out of range (2 to 100000 soundings per ping, or 0 for not stated)");
    if (e->beam_spacing != 0 && e->beam_spacing != 1)
        return bad(err, "echosounder.beam_spacing", "unknown spacing (equiangular or equidistant)");
    if (check_range(e->ping_overhead, 0.0, 10.0, 0, 0, "echosounder.ping_overhead",
                    "a time from 0 to 10 s", err) ||
        check_range(e->feature_soundings, 0.0, 1000.0, 1, 0, "echosounder.feature_soundings",
                    "a number above 0 and at most 1000", err))
        return SB_EINPUT;

    const struct sb_vertical_ref *v = &s->vertical;
    if (v->method != SB_VREF_TIDE && v->method != SB_VREF_ELLIPSOID)
        return bad(err, "vertical.method", "unknown vertical reference (tide or ellipsoid)");
    if (check_finite(v->draft, "vertical.draft", err) ||
        check_finite(v->squat, "vertical.squat", err) ||
        check_finite(v->loading, "vertical.loading", err) ||
        check_stated(&v->draft_u, L, "vertical.draft_u", err) ||
        check_stated(&v->squat_u, L, "vertical.squat_u", err) ||
        check_stated(&v->loading_u, L, "vertical.loading_u", err) ||
        check_stated(&v->water_level, L, "vertical.water_level", err) ||
        check_stated(&v->zoning, L, "vertical.zoning", err) ||
        check_stated(&v->separation, L, "vertical.separation", err))
        return SB_EINPUT;
    if (v->draft + v->squat + v->loading < 0.0)
        return bad(err, "vertical.draft", "transducer above the water surface (draft + squat + loading >= 0 m)");

    const struct sb_conditions *c = &s->conditions;
    if (check_range(c->speed, 0.0, 30.0, 0, 0, "conditions.speed",
                    "a speed between 0 and 30 m/s", err) ||
        check_range(c->roll_amplitude, 0.0, 45.0 * deg, 0, 1, "conditions.roll_amplitude",
                    "an amplitude of at least 0 and below 45 deg", err) ||
        check_range(c->pitch_amplitude, 0.0, 45.0 * deg, 0, 1, "conditions.pitch_amplitude",
                    "an amplitude of at least 0 and below 45 deg", err) ||
        check_range(c->heave_amplitude, 0.0, 50.0, 0, 0, "conditions.heave_amplitude",
                    "an amplitude between 0 and 50 m", err))
        return SB_EINPUT;
    if (c->roll_amplitude > 0.0 && !(isfinite(c->roll_period) && c->roll_period > 0.0))
        return bad(err, "conditions.roll_period", "not a positive period (a period above 0 s when roll_amplitude > 0)");
    if (c->pitch_amplitude > 0.0 && !(isfinite(c->pitch_period) && c->pitch_period > 0.0))
        return bad(err, "conditions.pitch_period", "not a positive period (a period above 0 s when pitch_amplitude > 0)");
    if (c->heave_amplitude > 0.0 && !(isfinite(c->heave_period) && c->heave_period > 0.0))
        return bad(err, "conditions.heave_period", "not a positive period (a period above 0 s when heave_amplitude > 0)");
    return SB_OK;
}
