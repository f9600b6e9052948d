/*
 * swathbudget — forward georeferencing model and the error of a sounding.
 *
 * The model (docs/model.md derives every term):
 *
 *   sounding = antenna position
 *            + R(attitude) (L_tx - L_antenna)          lever arm, rotated
 *            + ray(beam direction, travel time, sound speed)
 *   depth    = transducer depth below datum (draft, squat, loading, heave,
 *              water level -- or antenna ellipsoid height, separation model
 *              and the rotated lever arm) + depth of the ray
 *
 * The true state is a level vessel heading north (E across-track, N along
 * track), every input at its nominal value.  sb_georef_error() runs the
 * georeferencing with measured = true + dx and returns computed - true.
 * Attitude angles compose as R = Rz(heading) Ry(pitch) Rx(roll) (vessel to
 * local level, x forward / north, y starboard / east, z down).
 *
 * Sources: the error budget follows the structure of Hare, Godin & Mayer
 * (1995), "Accuracy estimation of Canadian swath (multibeam) and sweep
 * (multitransducer) sounding systems", Canadian Hydrographic Service; the
 * beam steering by Snell's law at the array face and beam broadening with
 * steering follow Lurton (2010), "An Introduction to Underwater Acoustics",
 * 2nd ed., Springer, the sections on transducer arrays (steering) and on
 * bathymetric sonars (chapter numbers not given: cited from memory).  Everything is re-derived in docs/model.md.
 */
#include "swathbudget/georef.h"

#include <math.h>
#include <string.h>

#define SB_PI 3.14159265358979323846 /* M_PI is not C11 */

/* ---- component names ---------------------------------------------------- */

struct comp_info {
    const char *name;
    int group;
    const char *unit;
};

static const struct comp_info COMP[SB_COMP_COUNT] = {
    [SB_COMP_GNSS_E] = { "gnss_horizontal_e", SB_GROUP_POSITIONING, "m" },
    [SB_COMP_GNSS_N] = { "gnss_horizontal_n", SB_GROUP_POSITIONING, "m" },
    [SB_COMP_ELLIPSOID_HEIGHT] = { "ellipsoid_height", SB_GROUP_POSITIONING, "m" },
    [SB_COMP_LEVER_ANT_X] = { "lever_antenna_x", SB_GROUP_LEVER_ARMS, "m" },
    [SB_COMP_LEVER_ANT_Y] = { "lever_antenna_y", SB_GROUP_LEVER_ARMS, "m" },
    [SB_COMP_LEVER_ANT_Z] = { "lever_antenna_z", SB_GROUP_LEVER_ARMS, "m" },
    [SB_COMP_LEVER_TX_X] = { "lever_tx_x", SB_GROUP_LEVER_ARMS, "m" },
    [SB_COMP_LEVER_TX_Y] = { "lever_tx_y", SB_GROUP_LEVER_ARMS, "m" },
    [SB_COMP_LEVER_TX_Z] = { "lever_tx_z", SB_GROUP_LEVER_ARMS, "m" },
    [SB_COMP_LEVER_MOT_X] = { "lever_motion_x", SB_GROUP_LEVER_ARMS, "m" },
    [SB_COMP_LEVER_MOT_Y] = { "lever_motion_y", SB_GROUP_LEVER_ARMS, "m" },
    [SB_COMP_LEVER_MOT_Z] = { "lever_motion_z", SB_GROUP_LEVER_ARMS, "m" },
    [SB_COMP_ROLL] = { "roll", SB_GROUP_MOTION, "rad" },
    [SB_COMP_PITCH] = { "pitch", SB_GROUP_MOTION, "rad" },
    [SB_COMP_HEADING] = { "heading", SB_GROUP_MOTION, "rad" },
    [SB_COMP_HEAVE] = { "heave", SB_GROUP_MOTION, "m" },
    [SB_COMP_HEAVE_REL] = { "heave_relative", SB_GROUP_MOTION, "m" },
    [SB_COMP_LATENCY_ROLL] = { "latency_roll", SB_GROUP_LATENCY, "s" },
    [SB_COMP_LATENCY_PITCH] = { "latency_pitch", SB_GROUP_LATENCY, "s" },
    [SB_COMP_LATENCY_HEAVE] = { "latency_heave", SB_GROUP_LATENCY, "s" },
    [SB_COMP_LATENCY_POSITION] = { "latency_position", SB_GROUP_LATENCY, "s" },
    [SB_COMP_ALIGN_ROLL] = { "align_roll", SB_GROUP_ALIGNMENT, "rad" },
    [SB_COMP_ALIGN_PITCH] = { "align_pitch", SB_GROUP_ALIGNMENT, "rad" },
    [SB_COMP_ALIGN_HEADING] = { "align_heading", SB_GROUP_ALIGNMENT, "rad" },
    [SB_COMP_SURFACE_SS] = { "surface_sound_speed", SB_GROUP_SOUND_SPEED, "m/s" },
    [SB_COMP_COLUMN_SS] = { "sound_speed_column", SB_GROUP_SOUND_SPEED, "1" },
    [SB_COMP_REFRACTION] = { "refraction", SB_GROUP_REFRACTION, "1" },
    [SB_COMP_RANGE] = { "range", SB_GROUP_ECHOSOUNDER, "m" },
    [SB_COMP_POINTING] = { "beam_pointing", SB_GROUP_ECHOSOUNDER, "rad" },
    [SB_COMP_POINTING_ALONG] = { "beam_pointing_along", SB_GROUP_ECHOSOUNDER, "rad" },
    [SB_COMP_DRAFT] = { "draft", SB_GROUP_VERTICAL_REF, "m" },
    [SB_COMP_SQUAT] = { "squat", SB_GROUP_VERTICAL_REF, "m" },
    [SB_COMP_LOADING] = { "loading", SB_GROUP_VERTICAL_REF, "m" },
    [SB_COMP_WATER_LEVEL] = { "water_level", SB_GROUP_VERTICAL_REF, "m" },
    [SB_COMP_TIDE_ZONING] = { "tide_zoning", SB_GROUP_VERTICAL_REF, "m" },
    [SB_COMP_SEPARATION] = { "separation_model", SB_GROUP_VERTICAL_REF, "m" },
};

static const char *const GROUP[SB_GROUP_COUNT] = {
    [SB_GROUP_POSITIONING] = "positioning",
    [SB_GROUP_LEVER_ARMS] = "lever_arms",
    [SB_GROUP_MOTION] = "motion",
    [SB_GROUP_LATENCY] = "latency",
    [SB_GROUP_ALIGNMENT] = "alignment",
    [SB_GROUP_SOUND_SPEED] = "sound_speed",
    [SB_GROUP_REFRACTION] = "refraction",
    [SB_GROUP_ECHOSOUNDER] = "echosounder",
    [SB_GROUP_VERTICAL_REF] = "vertical_reference",
};

const char *sb_component_name(int c)
{
    return (c >= 0 && c < SB_COMP_COUNT) ? COMP[c].name : "?";
}

int sb_component_group_id(int c)
{
    return (c >= 0 && c < SB_COMP_COUNT) ? COMP[c].group : -1;
}

const char *sb_component_group(int c)
{
    return (c >= 0 && c < SB_COMP_COUNT) ? GROUP[COMP[c].group] : "?";
}

const char *sb_group_name(int g)
{
    return (g >= 0 && g < SB_GROUP_COUNT) ? GROUP[g] : "?";
}

const char *sb_component_unit(int c)
{
    return (c >= 0 && c < SB_COMP_COUNT) ? COMP[c].unit : "?";
}

int sb_component_lookup(const char *name)
{
    if (!name)
        return -1;
    for (int c = 0; c < SB_COMP_COUNT; c++)
        if (strcmp(COMP[c].name, name) == 0)
            return c;
    return -1;
}

/* ---- the water column ---------------------------------------------------
 *
 * Constant column (b->refr == NULL).
 * The georeferencing sees the water column through two functions only:
 *   medium_time_to_depth  (setup, true geometry): one-way time to reach the
 *                         depth below the transducer;
 *   medium_ray            (hot path, measured geometry): where a ray is after
 *                         a time.
 * A ray is described by the cosine of its launch angle from the vertical,
 * cos_g (so the Snell parameter is p = sqrt(1 - cos_g^2) / c_top), and the
 * speed scale applied to the profile.  medium_ray returns the depth below the
 * transducer and the horizontal distance DIVIDED BY sin(g): the caller
 * multiplies it by the horizontal part of the launch unit vector (whose
 * length is sin(g)), which keeps the nadir ray free of 0/0.  For the
 * constant-speed column of this issue the ray is straight; a traced profile
 * (raytrace.h: sb_ray_init with p and the scale, sb_ray_at_time) replaces
 * the bodies of these two functions and nothing else.
 */

/* One-way time (s) of the true ray to the depth d_tx (m) below the
 * transducer, launched at cos_g in the unscaled column. */
static double medium_time_to_depth(const struct sb_beam *b, double cos_g, double d_tx)
{
    return d_tx / (b->c_col * cos_g);
}

/* Position after one-way time t (s): *z depth below the transducer (m),
 * *hq horizontal distance / sin(g) (m). */
static inline void medium_ray(const struct sb_beam *b, double cos_g, double scale,
                              double t, double *z, double *hq)
{
    double r = b->c_col * scale * t; /* straight ray: slant range */
    *z = r * cos_g;
    *hq = r;
}

/* Measured profile (b->refr != NULL), docs/model.md "Refraction".
 *
 * The true ray leaves the transducer at the beam angle theta in the water of
 * the reference profile there (speed c_t): Snell parameter p0 = sin(theta) /
 * c_t.  The processing takes the REPORTED launch direction (roll, pointing,
 * alignment, and for a flat array the steering by the transducer probe) in
 * the same water: p = sin(gamma) / c_t, gamma the angle of the launch
 * vector from the vertical; it traces the measured travel time through the
 * profile scaled by (1 + dx[COLUMN_SS]) below the transducer with p held
 * (the transducer's own speed is known).  In the unscaled profile that is
 * the ray q = p s after the time s t (refraction.h). */

/* Exact: depth below the transducer and horizontal distance / sin(gamma)
 * of the ray with |Snell parameter| p (s/m), scale s, one-way time t. */
static inline void profile_ray(const struct sb_beam *b, double p, double s, double t,
                               double *z, double *hq)
{
    double zz, w;
    (void)sb_svp_at_time(&b->refr->ref, &b->st, p * s, s * t, NULL, &zz, &w);
    *z = zz - b->z_tx;
    *hq = s * w / b->c_t; /* x / sin(gamma) = (p s w) / (p c_t) */
}

/* First-order expansion of the same about the nominal ray (SB_PART_LINEAR):
 * the ray's derivatives in q and in the unscaled time (set_depth). */
static inline void profile_ray_lin(const struct sb_beam *b, double p, double s, double t,
                                   double *dz, double *hq)
{
    const double dq = p * s - b->p0, dtau = s * t - b->t_oneway_s;
    *dz = b->lin_zq * dq + b->lin_zt * dtau; /* change of depth */
    *hq = s * (b->w0 + b->lin_wq * dq + b->lin_wt * dtau) / b->c_t;
}

/* ---- small-angle sine and cosine ----------------------------------------
 * The error function rotates by error angles that are almost always tiny
 * (below 0.05 rad); their sine and cosine by a short Taylor series (terms
 * to x^7 and x^8; truncation below 1e-17 relative) are several times cheaper
 * than libm's and exact to double precision.  Larger angles (Monte Carlo
 * tails, gross errors) go to libm. */
static inline void sincos_small(double x, double *s, double *c)
{
    double x2 = x * x;
    if (x2 == 0.0) { /* the common case inside a Jacobian: no perturbation */
        *s = x;
        *c = 1.0;
    } else if (x2 < 1e-6) { /* |x| < 1e-3: next terms below 1e-17 relative */
        *s = x * (1.0 + x2 * (-1.0 / 6.0 + x2 * (1.0 / 120.0)));
        *c = 1.0 + x2 * (-0.5 + x2 * (1.0 / 24.0 + x2 * (-1.0 / 720.0)));
    } else if (x2 < 2.5e-3) {
        /* Horner in x^2 with the Taylor coefficients (multiplications only:
         * a division by a constant is not turned into a multiplication by
         * the compiler, and would dominate the cost) */
        *s = x * (1.0 + x2 * (-1.0 / 6.0 + x2 * (1.0 / 120.0 + x2 * (-1.0 / 5040.0))));
        *c = 1.0 + x2 * (-0.5 + x2 * (1.0 / 24.0 + x2 * (-1.0 / 720.0 + x2 * (1.0 / 40320.0))));
    } else {
        *s = sin(x);
        *c = cos(x);
    }
}

/* ---- setup -------------------------------------------------------------- */

/* RMS rate of a sinusoid of amplitude a and period T: a (2 pi / T) / sqrt 2.
 * The RMS, not the peak: a sounding falls at a random phase of the motion,
 * and the standard uncertainty of rate x latency over all phases is the RMS
 * rate times the latency uncertainty (docs/model.md, "Latency"). */
static double rms_rate(double amplitude, double period)
{
    if (!(amplitude > 0.0) || !(period > 0.0))
        return 0.0;
    return amplitude * (2.0 * SB_PI / period) / sqrt(2.0);
}

/* Sensitivity of the refraction component: the spread of the soundings
 * each cast gives for the true travel time against the reference
 * (docs/model.md, "Cast variability").  With the mean as reference every
 * cast counts and one degree of freedom goes to the mean; with one cast as
 * reference the others count: both divide by n - 1. */
static void cast_spread(struct sb_beam *b, const struct sb_svp_cursor *cur_in,
                        struct sb_svp_cursor *cur_out)
{
    const struct sb_refraction *r = b->refr;
    double sz = 0.0, se = 0.0, sze = 0.0;
    const double z_true = b->depth_m, x_scale = b->sin_t / b->c_t;
    for (size_t k = 0; k < b->n_casts; k++) {
        cur_out[k] = cur_in[k];
        if ((int)k == r->reference)
            continue;
        double zk, wk;
        (void)sb_svp_at_time(&r->casts[k], &b->cast_st[k], b->p0, b->t_oneway_s,
                             &cur_out[k], &zk, &wk);
        const double ez = zk - z_true, ee = (wk - b->w0) * x_scale;
        sz += ez * ez;
        se += ee * ee;
        sze += ez * ee;
    }
    const double inv = 1.0 / (double)(b->n_casts - 1);
    b->refr_e[0] = (sze < 0.0 ? -1.0 : 1.0) * sqrt(se * inv);
    b->refr_e[1] = 0.0; /* a level vessel: the casts move the sounding in the
                           plane of the beam */
    b->refr_e[2] = sqrt(sz * inv);
}

/* The depth-dependent part of the set-up with a profile.  Leaves *b
 * unchanged and returns SB_RAY_TURNS when the ray turns above the seafloor. */
static int set_depth_profile(struct sb_beam *b, double depth_m, struct sb_error *err)
{
    const double d_tx = depth_m - b->z_tx;
    struct sb_svp_cursor cur = b->cur;
    struct sb_svp_point pt;
    if (sb_svp_to_depth(&b->refr->ref, &b->st, b->p0, depth_m, &cur, &pt) != SB_OK)
        return sb_error_set(err, SB_RAY_TURNS, "", 0, 0,
                            "the ray of beam angle %.6g deg turns before it reaches the "
                            "seafloor at %.6g m (a beam angle within %.6g deg)",
                            b->angle_rad * 180.0 / SB_PI, depth_m,
                            sb_svp_turn_angle(&b->refr->ref, &b->st, depth_m) * 180.0 / SB_PI);
    b->cur = cur;
    b->depth_m = depth_m;
    b->depth_tx_m = d_tx;
    b->t_oneway_s = pt.t;
    b->w0 = pt.w;
    /* derivatives at fixed time (docs/model.md): z_q = -T_q / T_z with
     * T_q = q X_q and 1/T_z = c cos; w_q = (dw/dq)_z - c^2 q X_q;
     * z_t = c cos; w_t = c^2 */
    const double cc = pt.c * pt.co;
    b->lin_zq = -b->p0 * pt.xq * cc;
    b->lin_zt = cc;
    b->lin_wq = pt.wq - pt.c * pt.c * b->p0 * pt.xq;
    b->lin_wt = pt.c * pt.c;
    b->across_m = b->p0 * pt.w * (b->sin_t < 0.0 ? -1.0 : 1.0);
    /* the exact trace back from the time, by the arithmetic of the hot path
     * (the cursor only skips the layers above, whose sums it holds bit for
     * bit as a walk from the transducer would), so that dx = 0 gives
     * exactly 0 */
    double zz, w;
    (void)sb_svp_at_time(&b->refr->ref, &b->st, b->p0, b->t_oneway_s, &b->tcur, &zz, &w);
    b->ray_z = zz - b->z_tx;
    b->ray_y = w / b->c_t * b->sin_t;
    b->true_enz[0] = b->y_tx + b->across_m;
    b->true_enz[2] = depth_m;
    if (b->n_casts)
        cast_spread(b, b->cast_cur, b->cast_cur);
    return SB_OK;
}

/* The depth-dependent part of the set-up (true ray and travel time). */
static void set_depth(struct sb_beam *b, double depth_m)
{
    const double d_tx = depth_m - b->z_tx;
    b->depth_m = depth_m;
    b->depth_tx_m = d_tx;
    b->t_oneway_s = medium_time_to_depth(b, b->cos_t, d_tx);
    b->across_m = d_tx * b->sin_t / b->cos_t;
    double z0, hq0;
    medium_ray(b, b->cos_t, 1.0, b->t_oneway_s, &z0, &hq0);
    b->ray_z = z0;
    b->ray_y = hq0 * b->sin_t;
    b->true_enz[0] = b->y_tx + b->across_m;
    b->true_enz[2] = depth_m;
}

int sb_beam_redepth(struct sb_beam *b, double depth_m, struct sb_error *err)
{
    if (!isfinite(depth_m) || !(depth_m - b->z_tx > 0.0))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "depth %.6g m is not below the transducer (a finite depth greater "
                            "than draft + squat + loading = %.6g m)", depth_m, b->z_tx);
    if (b->refr)
        return set_depth_profile(b, depth_m, err);
    set_depth(b, depth_m);
    return SB_OK;
}

double sb_beam_turn_angle(const struct sb_system *sys, double depth_m)
{
    const struct sb_refraction *r = sys->sound_speed.refraction;
    const struct sb_vertical_ref *v = &sys->vertical;
    const double z_tx = v->draft + v->squat + v->loading;
    if (sys->sound_speed.model == SB_COLUMN_CONSTANT || !r || !(depth_m > z_tx))
        return 0.5 * SB_PI;
    struct sb_svp_start st;
    sb_svp_start_at(&r->ref, z_tx, &st);
    return sb_svp_turn_angle(&r->ref, &st, depth_m);
}

static enum sb_dist dist_of(const struct sb_stated *s)
{
    return s->dist == SB_DIST_RECT ? SB_DIST_RECT : SB_DIST_NORMAL;
}

int sb_beam_setup(const struct sb_system *sys, double depth_m, double angle_rad,
                  struct sb_beam *b, struct sb_error *err)
{
    if (!isfinite(depth_m) || !isfinite(angle_rad))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "depth or beam angle is not a finite number (finite values)");
    const double amax = sys->echosounder.max_angle;
    if (fabs(angle_rad) > amax * (1.0 + 1e-12) || fabs(angle_rad) >= 0.5 * SB_PI)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "beam angle %.6g deg beyond the system's maximum (at most %.6g deg)",
                            angle_rad * 180.0 / SB_PI, amax * 180.0 / SB_PI);
    const struct sb_vertical_ref *v = &sys->vertical;
    const double z_tx = v->draft + v->squat + v->loading;
    const double d_tx = depth_m - z_tx;
    if (!(d_tx > 0.0))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "depth %.6g m is not below the transducer (a depth greater than "
                            "draft + squat + loading = %.6g m)", depth_m, z_tx);

    memset(b, 0, sizeof *b);
    const int tide = (v->method == SB_VREF_TIDE);
    b->angle_rad = angle_rad;
    b->z_tx = z_tx;
    b->y_tx = sys->transducer.y;
    b->flat = (sys->echosounder.array == SB_ARRAY_FLAT);
    b->ellipsoid = !tide;
    b->sin_t = sin(angle_rad);
    b->cos_t = cos(angle_rad);
    b->c_col = sys->sound_speed.column;
    b->inv_c0 = 1.0 / sys->sound_speed.surface;
    b->inv_c_col = 1.0 / sys->sound_speed.column;
    if (sys->sound_speed.model != SB_COLUMN_CONSTANT && sys->sound_speed.refraction) {
        const struct sb_refraction *r = sys->sound_speed.refraction;
        b->refr = r;
        sb_svp_start_at(&r->ref, z_tx, &b->st);
        b->c_t = b->st.c_t;
        b->p0 = fabs(b->sin_t) / b->c_t;
        b->n_casts = r->n_casts;
        for (size_t k = 0; k < r->n_casts; k++)
            sb_svp_start_at(&r->casts[k], z_tx, &b->cast_st[k]);
        /* cursors are zero from the memset: at the transducer */
        int rc = set_depth_profile(b, depth_m, err);
        if (rc)
            return rc;
    } else {
        set_depth(b, depth_m);
    }
    b->true_enz[1] = sys->transducer.x;

    const struct sb_conditions *cd = &sys->conditions;
    b->rate_roll = rms_rate(cd->roll_amplitude, cd->roll_period);
    b->rate_pitch = rms_rate(cd->pitch_amplitude, cd->pitch_period);
    b->rate_heave = rms_rate(cd->heave_amplitude, cd->heave_period);
    b->speed = cd->speed;

    const struct sb_lever_arm *ant = &sys->antenna, *tx = &sys->transducer,
                              *mot = &sys->motion_sensor;
    const struct sb_lever_arm *vref = tide ? mot : ant;
    b->lev_h[0] = tx->x - ant->x;
    b->lev_h[1] = tx->y - ant->y;
    b->lev_h[2] = tx->z - ant->z;
    b->lev_v[0] = tx->x - vref->x;
    b->lev_v[1] = tx->y - vref->y;
    b->lev_v[2] = tx->z - vref->z;

    /* Rotation at the effective attitude (RMS roll and pitch, a/sqrt 2):
     * lever-arm errors are turned by the attitude of the moment, and over
     * the motion cycle their off-diagonal effects have the RMS of
     * sin(attitude) (docs/model.md, "Lever arms in motion"). */
    const double fr = cd->roll_amplitude / sqrt(2.0), fp = cd->pitch_amplitude / sqrt(2.0);
    const double sr = sin(fr), cr = cos(fr), sp = sin(fp), cp = cos(fp);
    /* M = Ry(fp) Rx(fr) */
    b->m[0][0] = cp;  b->m[0][1] = sp * sr; b->m[0][2] = sp * cr;
    b->m[1][0] = 0.0; b->m[1][1] = cr;      b->m[1][2] = -sr;
    b->m[2][0] = -sp; b->m[2][1] = cp * sr; b->m[2][2] = cp * cr;

    /* ---- standard uncertainties and distributions ---- */
    double *u = b->u;
    enum sb_dist *dist = b->dist;
    for (int c = 0; c < SB_COMP_COUNT; c++)
        dist[c] = SB_DIST_NORMAL;
#define SET(c, st) do { u[c] = (st)->u; dist[c] = dist_of(st); } while (0)
    const struct sb_positioning *ps = &sys->positioning;
    SET(SB_COMP_GNSS_E, &ps->horizontal);
    SET(SB_COMP_GNSS_N, &ps->horizontal);
    if (!tide)
        SET(SB_COMP_ELLIPSOID_HEIGHT, &ps->vertical);
    for (int i = 0; i < 3; i++) {
        SET(SB_COMP_LEVER_ANT_X + i, &ant->u[i]);
        SET(SB_COMP_LEVER_TX_X + i, &tx->u[i]);
        if (tide) /* the motion sensor's position matters for heave only */
            SET(SB_COMP_LEVER_MOT_X + i, &mot->u[i]);
    }
    const struct sb_motion *mo = &sys->motion;
    SET(SB_COMP_ROLL, &mo->roll);
    SET(SB_COMP_PITCH, &mo->pitch);
    SET(SB_COMP_HEADING, &mo->heading);
    if (tide) {
        SET(SB_COMP_HEAVE, &mo->heave);
        u[SB_COMP_HEAVE_REL] = mo->heave_fraction.u * cd->heave_amplitude;
        dist[SB_COMP_HEAVE_REL] = dist_of(&mo->heave_fraction);
        SET(SB_COMP_LATENCY_HEAVE, &mo->latency);
    }
    SET(SB_COMP_LATENCY_ROLL, &mo->latency);
    SET(SB_COMP_LATENCY_PITCH, &mo->latency);
    SET(SB_COMP_LATENCY_POSITION, &ps->latency);
    SET(SB_COMP_ALIGN_ROLL, &mo->align_roll);
    SET(SB_COMP_ALIGN_PITCH, &mo->align_pitch);
    SET(SB_COMP_ALIGN_HEADING, &mo->align_heading);

    const struct sb_sound_speed *ss = &sys->sound_speed;
    u[SB_COMP_SURFACE_SS] = sb_system_abs_u(&ss->surface_u, ss->surface);
    dist[SB_COMP_SURFACE_SS] = dist_of(&ss->surface_u);
    u[SB_COMP_COLUMN_SS] = sb_system_abs_u(&ss->column_u, ss->column) / ss->column;
    dist[SB_COMP_COLUMN_SS] = dist_of(&ss->column_u);
    /* the casts' spread enters as a standardised deviate: u = 1, its
     * effect per unit is the spread itself (b->refr_e) */
    u[SB_COMP_REFRACTION] = b->n_casts ? 1.0 : 0.0;

    const struct sb_echosounder *es = &sys->echosounder;
    if (es->range_mode == SB_RANGE_SAMPLING) {
        /* sampling step c/(2 fs) and pulse resolution c tau / 2, each a
         * rectangular error of full width w (u = w / sqrt 12, JCGM 100
         * 4.3.7), combined in quadrature */
        const double step = ss->column / (2.0 * es->sample_rate);
        const double pulse = ss->column * es->pulse_length / 2.0;
        u[SB_COMP_RANGE] = sqrt((step * step + pulse * pulse) / 12.0);
        dist[SB_COMP_RANGE] = (step > 0.0 && pulse > 0.0) ? SB_DIST_NORMAL : SB_DIST_RECT;
    } else {
        SET(SB_COMP_RANGE, &es->range_resolution);
    }
    /* beam pointing: a fraction of the beam width (or a fixed angle),
     * widened as 1/cos(theta) for a flat array steered to theta (Lurton
     * 2010, arrays: the -3 dB width of a steered line array grows as
     * 1/cos of the steering angle) */
    const double broaden = b->flat ? 1.0 / b->cos_t : 1.0;
    const int ratio = (es->pointing.dim == SB_DIM_RATIO);
    u[SB_COMP_POINTING] = (ratio ? es->pointing.u * es->beam_across : es->pointing.u) * broaden;
    u[SB_COMP_POINTING_ALONG] = ratio ? es->pointing.u * es->beam_along : es->pointing.u;
    dist[SB_COMP_POINTING] = dist[SB_COMP_POINTING_ALONG] = dist_of(&es->pointing);

    if (tide) {
        SET(SB_COMP_DRAFT, &v->draft_u);
        SET(SB_COMP_SQUAT, &v->squat_u);
        SET(SB_COMP_LOADING, &v->loading_u);
        SET(SB_COMP_WATER_LEVEL, &v->water_level);
        SET(SB_COMP_TIDE_ZONING, &v->zoning);
    } else {
        SET(SB_COMP_SEPARATION, &v->separation);
    }
#undef SET
    return SB_OK;
}

/* ---- the error function ------------------------------------------------- */

/* The model is the sum of three parts, each an exact function of its own
 * components (a component may feed two parts: the attitude turns both the
 * beam and the lever arm).  sb_georef_error adds all three; the Jacobian
 * (propagate.c) evaluates only the parts a component feeds, which gives the
 * same central difference of the full model at a fraction of the cost. */

/* Attitude errors as delivered to the georeferencing: sensor error plus
 * latency x RMS rate. */
static inline double att_roll(const struct sb_beam *b, const double *dx)
{
    return dx[SB_COMP_ROLL] + b->rate_roll * dx[SB_COMP_LATENCY_ROLL];
}
static inline double att_pitch(const struct sb_beam *b, const double *dx)
{
    return dx[SB_COMP_PITCH] + b->rate_pitch * dx[SB_COMP_LATENCY_PITCH];
}

/* Part 1: the beam and the ray, from the transducer to the seafloor.
 * Writes e (E, N, Z).  lin: SB_PART_LINEAR (profile only). */
static inline void part_beam(const struct sb_beam *b, const double *dx, int lin, double e[3])
{
    const double dr = att_roll(b, dx), dp = att_pitch(b, dx), dh = dx[SB_COMP_HEADING];
    /* The true beam leaves at theta from the vertical (level vessel: the
     * same angle from the array normal).  A flat array steered with the
     * measured surface speed reports psi with sin(psi) = (c_meas / c_true)
     * sin(theta) (Snell at the array face, Lurton 2010, arrays); a curved
     * array reports theta.  Roll stabilisation with the measured roll
     * subtracts the roll error (Rx convention: a vessel rolled by +r sees its
     * beams turned by -r), the alignment residual likewise; bottom detection
     * adds its pointing error. */
    double sps = b->sin_t, cps = b->cos_t;
    if (b->flat && dx[SB_COMP_SURFACE_SS] != 0.0) {
        const double k = dx[SB_COMP_SURFACE_SS] * b->inv_c0; /* c_meas/c_true - 1 */
        sps = b->sin_t * (1.0 + k);
        /* cos^2 = cos_t^2 - k (2 + k) sin_t^2: no cancellation for small k,
         * and exactly cos_t for k = 0 (sqrt of a square is exact) */
        const double q = b->cos_t * b->cos_t - k * (2.0 + k) * b->sin_t * b->sin_t;
        cps = sqrt(q > 0.0 ? q : 0.0);
    }
    double s, c;
    sincos_small(dx[SB_COMP_POINTING] - dr - dx[SB_COMP_ALIGN_ROLL], &s, &c);
    const double st = sps * c + cps * s; /* sin, cos of the reported angle */
    const double ct = cps * c - sps * s;
    double sa, ca;
    sincos_small(dx[SB_COMP_POINTING_ALONG], &sa, &ca);
    /* unit launch vector in the roll-stabilised fan frame */
    const double v0 = sa, v1 = st * ca, v2 = ct * ca;
    /* then the measured pitch (+ alignment): Ry */
    double spb, cpb;
    sincos_small(dp + dx[SB_COMP_ALIGN_PITCH], &spb, &cpb);
    const double w0 = cpb * v0 + spb * v2, w2 = -spb * v0 + cpb * v2;
    /* and heading (+ alignment): Rz */
    double shb, chb;
    sincos_small(dh + dx[SB_COMP_ALIGN_HEADING], &shb, &chb);
    const double l0 = chb * w0 - shb * v1, l1 = shb * w0 + chb * v1, l2 = w2;

    /* the ray, with the measured travel time and column speed */
    const double tm = b->t_oneway_s + dx[SB_COMP_RANGE] * b->inv_c_col;
    double zr, hq;
    if (b->refr) {
        /* Snell parameter of the reported launch direction: sin(gamma) is
         * the length of its horizontal part */
        const double p = sqrt(l0 * l0 + l1 * l1) / b->c_t;
        const double sc = 1.0 + dx[SB_COMP_COLUMN_SS];
        if (lin) {
            double dz;
            profile_ray_lin(b, p, sc, tm, &dz, &hq);
            zr = b->ray_z + dz;
        } else {
            profile_ray(b, p, sc, tm, &zr, &hq);
        }
        const double r = dx[SB_COMP_REFRACTION];
        /* the linear model's own baseline, so that dx = 0 gives 0 in both */
        const double y0 = lin ? b->w0 / b->c_t * b->sin_t : b->ray_y;
        e[0] = hq * l1 - y0 + r * b->refr_e[0];
        e[1] = hq * l0 + r * b->refr_e[1];
        e[2] = zr - b->ray_z + r * b->refr_e[2];
        return;
    }
    medium_ray(b, l2, 1.0 + dx[SB_COMP_COLUMN_SS], tm, &zr, &hq);
    /* minus the true ray, computed by the same arithmetic in setup so that
     * dx = 0 gives exactly 0 */
    e[0] = hq * l1 - b->ray_y; /* east = across-track (starboard) */
    e[1] = hq * l0;            /* north = along-track (forward) */
    e[2] = zr - b->ray_z;
}

/* Part 2: the lever arms -- turned by the attitude error, and their own
 * measurement errors turned by the effective attitude M.  Adds to e. */
static inline void part_lever(const struct sb_beam *b, const double *dx, double e[3])
{
    const double dr = att_roll(b, dx), dp = att_pitch(b, dx), dh = dx[SB_COMP_HEADING];
    /* (R_err - I) L with R_err = Rz(dh) Ry(dp) Rx(dr), written as
     * differences so that dx = 0 gives exactly 0 */
    double sr, cr, sp, cp, sh, ch;
    sincos_small(dr, &sr, &cr);
    sincos_small(dp, &sp, &cp);
    sincos_small(dh, &sh, &ch);
    const double *L = b->lev_h;
    const double a1 = cr * L[1] - sr * L[2], a2 = sr * L[1] + cr * L[2]; /* Rx */
    const double b0 = cp * L[0] + sp * a2, b2 = -sp * L[0] + cp * a2;    /* Ry */
    const double rh0 = ch * b0 - sh * a1 - L[0];                         /* Rz */
    const double rh1 = sh * b0 + ch * a1 - L[1];

    const double dlh0 = dx[SB_COMP_LEVER_TX_X] - dx[SB_COMP_LEVER_ANT_X];
    const double dlh1 = dx[SB_COMP_LEVER_TX_Y] - dx[SB_COMP_LEVER_ANT_Y];
    const double dlh2 = dx[SB_COMP_LEVER_TX_Z] - dx[SB_COMP_LEVER_ANT_Z];
    const double(*m)[3] = b->m;
    e[0] += rh1 + m[1][0] * dlh0 + m[1][1] * dlh1 + m[1][2] * dlh2;
    e[1] += rh0 + m[0][0] * dlh0 + m[0][1] * dlh1 + m[0][2] * dlh2;

    if (b->ellipsoid) {
        /* antenna height carried down the rotated arm antenna -> transducer */
        e[2] += b2 - L[2] + m[2][0] * dlh0 + m[2][1] * dlh1 + m[2][2] * dlh2;
    } else {
        /* heave measured at the motion sensor, carried to the transducer by
         * the rotated arm: only its change with attitude counts (the static
         * depth of the transducer is the draft) */
        const double *V = b->lev_v;
        const double c2 = sr * V[1] + cr * V[2];
        const double rv2 = -sp * V[0] + cp * c2 - V[2];
        const double d0 = dx[SB_COMP_LEVER_TX_X] - dx[SB_COMP_LEVER_MOT_X];
        const double d1 = dx[SB_COMP_LEVER_TX_Y] - dx[SB_COMP_LEVER_MOT_Y];
        const double d2 = dx[SB_COMP_LEVER_TX_Z] - dx[SB_COMP_LEVER_MOT_Z];
        e[2] += rv2 + m[2][0] * d0 + m[2][1] * d1 + (m[2][2] - 1.0) * d2;
    }
}

/* Part 3: the terms that add straight onto the sounding (antenna position,
 * position latency x speed, vertical reference).  Adds to e. */
static inline void part_add(const struct sb_beam *b, const double *dx, double e[3])
{
    e[0] += dx[SB_COMP_GNSS_E];
    e[1] += dx[SB_COMP_GNSS_N] + b->speed * dx[SB_COMP_LATENCY_POSITION];
    if (b->ellipsoid) /* depth below datum = -(ellipsoid height - separation) */
        e[2] += -dx[SB_COMP_ELLIPSOID_HEIGHT] + dx[SB_COMP_SEPARATION];
    else /* transducer depth below the surface, surface height above datum */
        e[2] += dx[SB_COMP_DRAFT] + dx[SB_COMP_SQUAT] + dx[SB_COMP_LOADING] +
                dx[SB_COMP_HEAVE] + dx[SB_COMP_HEAVE_REL] +
                b->rate_heave * dx[SB_COMP_LATENCY_HEAVE] - dx[SB_COMP_WATER_LEVEL] -
                dx[SB_COMP_TIDE_ZONING];
}

void sb_georef_error(const struct sb_beam *b, const double *dx, double e[3])
{
    part_beam(b, dx, 0, e);
    part_lever(b, dx, e);
    part_add(b, dx, e);
}

void sb_georef_error_parts(const struct sb_beam *b, const double *dx, unsigned parts,
                           double e[3])
{
    if (parts & SB_PART_BEAM) {
        part_beam(b, dx, (parts & SB_PART_LINEAR) != 0, e);
    } else {
        e[0] = e[1] = e[2] = 0.0;
    }
    if (parts & SB_PART_LEVER)
        part_lever(b, dx, e);
    if (parts & SB_PART_ADD)
        part_add(b, dx, e);
}

unsigned sb_component_parts(int c)
{
    switch (c) {
    case SB_COMP_ROLL: case SB_COMP_PITCH: case SB_COMP_HEADING:
    case SB_COMP_LATENCY_ROLL: case SB_COMP_LATENCY_PITCH:
        return SB_PART_BEAM | SB_PART_LEVER;
    case SB_COMP_ALIGN_ROLL: case SB_COMP_ALIGN_PITCH: case SB_COMP_ALIGN_HEADING:
    case SB_COMP_SURFACE_SS: case SB_COMP_COLUMN_SS: case SB_COMP_REFRACTION:
    case SB_COMP_RANGE:
    case SB_COMP_POINTING: case SB_COMP_POINTING_ALONG:
        return SB_PART_BEAM;
    case SB_COMP_LEVER_ANT_X: case SB_COMP_LEVER_ANT_Y: case SB_COMP_LEVER_ANT_Z:
    case SB_COMP_LEVER_TX_X: case SB_COMP_LEVER_TX_Y: case SB_COMP_LEVER_TX_Z:
    case SB_COMP_LEVER_MOT_X: case SB_COMP_LEVER_MOT_Y: case SB_COMP_LEVER_MOT_Z:
        return SB_PART_LEVER;
    default:
        return (c >= 0 && c < SB_COMP_COUNT) ? SB_PART_ADD : 0u;
    }
}
