/*
 * swathbudget — the description of a multibeam survey system, as the engine
 * reads it.
 *
 * Everything is SI: metres, seconds, radians, m/s, Hz; relative figures are
 * plain fractions (0.01 for "1 %").  Every uncertain figure is kept as a
 * struct sb_stated (units.h) so that a report can echo it exactly as it was
 * written next to the standard uncertainty it implies.  A nominal value (a
 * lever-arm coordinate, a draft) is a plain double beside its stated
 * uncertainty.
 *
 * Frames and signs (docs/model.md, section "Frames"):
 *   vessel frame  x forward, y starboard, z down, origin at the reference
 *                 point (any point fixed to the hull the surveyor chooses);
 *   attitude      roll positive starboard down, pitch positive bow up,
 *                 heading clockwise from north;
 *   beam angle    positive to starboard, from the vertical after roll
 *                 stabilisation;
 *   depth         positive down.
 *
 * The struct is plain data: the YAML loader (spec.c) fills it, the engine
 * (georef.c, propagate.c, swath.c) reads it and never changes it.
 * sb_system_init_defaults() gives a "perfect" system (every uncertainty zero,
 * neutral conditions) that a loader or a test then fills in.
 */
#ifndef SWATHBUDGET_SYSTEM_H
#define SWATHBUDGET_SYSTEM_H

#include <stddef.h>

#include "swathbudget/error.h"
#include "swathbudget/units.h"

#ifdef __cplusplus
extern "C" {
#endif

#define SB_SYSTEM_NAME_MAX 64
#define SB_SYSTEM_TITLE_MAX 160

/* How the transducer array is shaped: a flat (linear, planar) array steers
 * its beams with phase delays computed from the sound speed at its face, so a
 * wrong surface sound speed mis-steers them and its beams broaden as 1/cos
 * of the steering angle; a curved (barrel) array forms each beam from the
 * elements facing that way, so it is neither mis-steered nor broadened. */
enum sb_array_type {
    SB_ARRAY_FLAT = 0,
    SB_ARRAY_CURVED = 1
};

/* How depths are referred to the chart datum. */
enum sb_vref_method {
    /* water level from a tide gauge (+ zoning to the survey area); the
     * transducer's depth below the water surface from draft, squat,
     * loading and heave */
    SB_VREF_TIDE = 0,
    /* antenna ellipsoid height from GNSS, reduced to the datum with a
     * separation model (datum height above the ellipsoid); draft, squat,
     * loading, heave and water level are then not used */
    SB_VREF_ELLIPSOID = 1
};

/* Where the range uncertainty comes from. */
enum sb_range_mode {
    /* echosounder.range_resolution is stated directly (a length) */
    SB_RANGE_GIVEN = 0,
    /* from the sample rate and the pulse length: the sampling step c/(2 fs)
     * and the pulse resolution c*tau/2, each a rectangular (resolution)
     * error, combined in quadrature (docs/model.md, "Range") */
    SB_RANGE_SAMPLING = 1
};

/* A lever arm: the position of a sensor in the vessel frame, from the
 * reference point, with the uncertainty of its measurement per axis. */
struct sb_lever_arm {
    double x;              /* m, forward */
    double y;              /* m, starboard */
    double z;              /* m, down */
    struct sb_stated u[3]; /* uncertainty of x, y, z (length, m); a loader
                              may fill all three from one figure */
};

/* GNSS positioning of the antenna. */
struct sb_positioning {
    /* horizontal uncertainty of the antenna position (length, m).  u is
     * the standard uncertainty PER AXIS (east and north alike): a "95%"
     * figure must be parsed with SB_STATED_2D (u = value / 2.4477). */
    struct sb_stated horizontal;
    /* vertical: uncertainty of the antenna's ellipsoid height (length, m);
     * used only with SB_VREF_ELLIPSOID */
    struct sb_stated vertical;
    /* uncertainty of the time offset between positions and sonar time
     * stamps (time, s); with the vessel speed it gives an along-track
     * error.  Zero when not stated. */
    struct sb_stated latency;
};

/* Motion sensor and the residuals of the mounting calibration. */
struct sb_motion {
    struct sb_stated roll;    /* angle, rad */
    struct sb_stated pitch;   /* angle, rad */
    struct sb_stated heading; /* angle, rad */
    /* heave: a fixed part (length, m) plus a part proportional to the heave
     * amplitude (ratio; conditions.heave_amplitude); the engine treats the
     * two as independent components "heave" and "heave_relative" */
    struct sb_stated heave;
    struct sb_stated heave_fraction;
    /* uncertainty of the time offset between motion data and sonar time
     * stamps (time, s); scaled by the RMS roll, pitch and heave rates */
    struct sb_stated latency;
    /* residual mounting misalignment of the transducer relative to the
     * motion sensor after the calibration (angle, rad) */
    struct sb_stated align_roll;
    struct sb_stated align_pitch;
    struct sb_stated align_heading;
};

/* How the water column's sound speed is described. */
enum sb_column_model {
    SB_COLUMN_CONSTANT = 0, /* one speed, straight rays */
    SB_COLUMN_PROFILE = 1,  /* one measured profile, traced */
    SB_COLUMN_CASTS = 2     /* several casts: the reference (their mean or
                               one of them) is traced, their spread is the
                               "refraction" component */
};

struct sb_refraction; /* refraction.h */

/* Sound speed: one constant speed for the water column, or a measured
 * profile (or casts) traced ray by ray (docs/model.md, "Refraction"). */
struct sb_sound_speed {
    /* speed at the transducer face (m/s) and the uncertainty of its
     * measurement (speed, m/s, or ratio of the speed); it steers the beams
     * of a flat array */
    double surface;
    struct sb_stated surface_u;
    /* the (constant) speed of the water column (m/s) and its uncertainty
     * (speed, m/s, or ratio of the speed) */
    double column;
    struct sb_stated column_u;
    /* SB_COLUMN_PROFILE / SB_COLUMN_CASTS: the profile(s), owned by the
     * system (sb_system_release frees them); column is then the depth
     * average of the reference profile, used to turn a relative figure
     * into m/s and back and to express a range error as a time.  NULL for
     * SB_COLUMN_CONSTANT. */
    enum sb_column_model model;
    struct sb_refraction *refraction;
};

/* The multibeam echosounder. */
struct sb_echosounder {
    double frequency;     /* Hz; descriptive for now (reports) */
    double beam_across;   /* across-track beam width at broadside (full
                             width at -3 dB), rad */
    double beam_along;    /* along-track beam width, rad */
    enum sb_array_type array;
    enum sb_range_mode range_mode;
    struct sb_stated range_resolution; /* SB_RANGE_GIVEN: length, m */
    double sample_rate;   /* SB_RANGE_SAMPLING: Hz (> 0) */
    double pulse_length;  /* SB_RANGE_SAMPLING: s (>= 0) */
    /* beam pointing / bottom detection: either a ratio (standard
     * uncertainty as a fraction of the beam width) or an angle (rad); in
     * both cases widened by 1/cos(theta) for a flat array (beam broadening
     * with steering).  The same figure is applied along track to the
     * along-track beam width (ratio) or as the angle itself.  See
     * docs/model.md, "Beam pointing". */
    struct sb_stated pointing;
    double max_angle;     /* largest beam angle the system forms, rad,
                             in (0, pi/2) */
    /* beam layout and ping rate, for the sounding density of feature
     * detection (density.h); beams == 0 when the file does not state them,
     * and then no density limit is evaluated */
    int beams;            /* soundings per ping across the swath, 0 or
                             2..100000 */
    int beam_spacing;     /* 0 equiangular, 1 equidistant (the values of
                             enum sb_beam_spacing in density.h) */
    double ping_overhead; /* s added to the two-way travel time to the
                             outermost beam between pings, >= 0 */
    double feature_soundings; /* N: soundings a feature must receive,
                             > 0 (default 3, common practice) */
};

/* Vertical reference: transducer depth and water level. */
struct sb_vertical_ref {
    enum sb_vref_method method;
    /* static draft of the transducer face below the still waterline (m,
     * positive down) and its uncertainty (length) */
    double draft;
    struct sb_stated draft_u;
    /* dynamic draft (squat / settlement) at survey speed (m, positive =
     * deeper) and its uncertainty */
    double squat;
    struct sb_stated squat_u;
    /* change of draft from loading (fuel, water, stores) since the draft was
     * measured (m, positive = deeper) and its uncertainty */
    double loading;
    struct sb_stated loading_u;
    /* SB_VREF_TIDE: uncertainty of the gauge's water level (length) and of
     * its zoning to the survey area (length) */
    struct sb_stated water_level;
    struct sb_stated zoning;
    /* SB_VREF_ELLIPSOID: uncertainty of the separation model (datum height
     * above the ellipsoid) (length) */
    struct sb_stated separation;
};

/* Operating conditions: they scale the latency and heave terms and the
 * motion-dependent lever-arm terms. */
struct sb_conditions {
    double speed;           /* vessel speed through the survey, m/s */
    double roll_amplitude;  /* rad (amplitude of a sinusoid, not peak-to-peak) */
    double roll_period;     /* s (> 0 when roll_amplitude > 0) */
    double pitch_amplitude; /* rad */
    double pitch_period;    /* s */
    double heave_amplitude; /* m */
    double heave_period;    /* s */
};

struct sb_system {
    char name[SB_SYSTEM_NAME_MAX];   /* short identifier, e.g. "kestrel-launch" */
    char title[SB_SYSTEM_TITLE_MAX]; /* one-line description for reports */
    char source[SB_ERROR_FILE_MAX];  /* file it was read from, "" if built in code */

    struct sb_lever_arm antenna;       /* GNSS antenna phase centre */
    struct sb_lever_arm transducer;    /* acoustic centre of the transducer */
    struct sb_lever_arm motion_sensor; /* where heave is measured */

    struct sb_positioning positioning;
    struct sb_motion motion;
    struct sb_sound_speed sound_speed;
    struct sb_echosounder echosounder;
    struct sb_vertical_ref vertical;
    struct sb_conditions conditions;
};

/*
 * Fill *sys with the defaults (the "perfect" system):
 *   name "system", title "", source "";
 *   all lever arms 0 m, all uncertainties 0 (type sd, normal, unit as SI);
 *   sound speed surface = column = 1500 m/s;
 *   echosounder: frequency 0 Hz, beam widths 1 deg across and along, flat
 *     array, range given (0 m), sample_rate 0 Hz, pulse_length 0 s,
 *     pointing 0 (ratio), max_angle 75 deg, beams 0 (not stated),
 *     equiangular spacing, ping_overhead 0 s, feature_soundings 3;
 *   vertical: tide method, draft/squat/loading 0 m;
 *   conditions: speed 0, no roll/pitch/heave (amplitudes 0; periods 8 s
 *     roll, 6 s pitch, 6 s heave so that a loader that fills only an
 *     amplitude still has a valid period).
 * Never fails.
 */
void sb_system_init_defaults(struct sb_system *sys);

/* Allocate a system filled with the defaults; NULL if out of memory. */
struct sb_system *sb_system_alloc(void);
/* Free a system from sb_system_alloc and what it owns (NULL is fine). */
void sb_system_free(struct sb_system *sys);
/* Free what a system owns (its profiles) without freeing the struct, for a
 * system on the stack filled by sb_spec_load; the column becomes constant
 * again.  A shallow copy of a system (struct assignment) shares the
 * profiles: release only one of them.  NULL is fine. */
void sb_system_release(struct sb_system *sys);

/*
 * Give the system a measured profile (copied): sample depths depth_m (m
 * below the surface, strictly increasing, >= 0) and speeds speed_mps (m/s,
 * each in (1300, 1800)), n from 1 to SB_SVP_MAX_SAMPLES.  Sets model
 * SB_COLUMN_PROFILE and column = the profile's depth-averaged speed; frees
 * a previous profile.  column_u keeps its meaning (uniform error of the
 * profile, absolute or relative).  Errors: SB_EINPUT (message names the
 * sample, no position), SB_ENOMEM; the system is unchanged on error.
 */
int sb_system_set_profile(struct sb_system *sys, const double *depth_m,
                          const double *speed_mps, size_t n,
                          struct sb_error *err);

/*
 * The same with n_casts casts (2..SB_CASTS_MAX) of one survey: model
 * SB_COLUMN_CASTS, the reference being their mean (SB_REFERENCE_MEAN) or
 * cast number `reference` (0-based).  Errors as above ("cast K sample I").
 */
int sb_system_set_casts(struct sb_system *sys, const double *const *depth_m,
                        const double *const *speed_mps, const size_t *n,
                        size_t n_casts, int reference, struct sb_error *err);

/* One line describing the water column for reports, e.g. "measured
 * profile casts/x.csv, 42 samples, traced (mean 1493.2 m/s)" or "4 casts,
 * reference their mean (118 samples), traced; their spread is the
 * refraction component"; "constant 1490.0 m/s" for a constant column.
 * Written into buf (n bytes); returns buf. */
const char *sb_system_describe_column(const struct sb_system *sys, char *buf,
                                      size_t n);

/*
 * Cross-field checks of a filled system: every nominal value finite; every
 * stated uncertainty finite and >= 0 and of an allowed dimension; speeds of
 * sound in (1300, 1800) m/s; beam widths in (0, 30] deg; max_angle in
 * (0, 90) deg; sample_rate > 0 when range_mode is SAMPLING; periods > 0
 * when the matching amplitude > 0; speed >= 0; amplitudes >= 0 (roll and
 * pitch < 45 deg).
 * Returns SB_OK or SB_EINPUT with err->msg = "FIELD: what is wrong (what was
 * expected)", FIELD being the struct path ("echosounder.max_angle"); the
 * position is left empty for the loader to set.
 */
int sb_system_validate(const struct sb_system *sys, struct sb_error *err);

/*
 * Standard uncertainty of a figure that may be absolute or relative: a ratio
 * (SB_DIM_RATIO) is multiplied by |reference|, anything else is returned as
 * is.  Units: those of the reference (e.g. m/s for a sound speed).
 */
double sb_system_abs_u(const struct sb_stated *s, double reference);

#ifdef __cplusplus
}
#endif

#endif
