/*
 * swathbudget — the forward georeferencing model and its error function.
 *
 * For one beam (a beam angle theta and a flat seafloor at depth d) the
 * engine builds the TRUE geometry: a level vessel heading north, the
 * transducer at its draft, a ray leaving at theta in the true water and
 * reaching the seafloor after the true travel time.  Every measured quantity
 * the georeferencing uses (antenna position, lever arms, attitude, beam
 * angle, travel time, sound speeds, draft, water level, ...) is then
 * "true + error".  Georeferencing with the measured values gives the
 * computed sounding; the error of the sounding is computed - true.
 *
 * The uncertain inputs are the components below (enum sb_component).  Each
 * has a stable snake_case name, a unit for its deviation dx, and a display
 * group used by breakdowns.  docs/model.md derives every term.
 *
 * Depth convention: depth_m is the depth of the seafloor below the water
 * surface at the vessel, which is also the depth below the chart datum for
 * the nominal water level of zero; the transducer sits at draft + squat +
 * loading below the surface, and the geometry of the ray uses the depth
 * below the transducer, depth_m - (draft + squat + loading), which must be
 * > 0.
 *
 * Output axes: E (east), N (north), Z (down), metres.  The true vessel heads
 * north, so E is across-track (positive to starboard) and N along-track.
 */
#ifndef SWATHBUDGET_GEOREF_H
#define SWATHBUDGET_GEOREF_H

#include "swathbudget/error.h"
#include "swathbudget/refraction.h"
#include "swathbudget/system.h"
#include "swathbudget/units.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The uncertain inputs.  The unit of each deviation dx[c] is given; the
 * order is stable (reports list components in this order). */
enum sb_component {
    /* positioning */
    SB_COMP_GNSS_E = 0,        /* "gnss_horizontal_e"  m   antenna east */
    SB_COMP_GNSS_N,            /* "gnss_horizontal_n"  m   antenna north */
    SB_COMP_ELLIPSOID_HEIGHT,  /* "ellipsoid_height"   m   antenna height
                                  (ellipsoid method only) */
    /* lever arms (measurement errors of the surveyed offsets) */
    SB_COMP_LEVER_ANT_X,       /* "lever_antenna_x"    m */
    SB_COMP_LEVER_ANT_Y,       /* "lever_antenna_y"    m */
    SB_COMP_LEVER_ANT_Z,       /* "lever_antenna_z"    m */
    SB_COMP_LEVER_TX_X,        /* "lever_tx_x"         m */
    SB_COMP_LEVER_TX_Y,        /* "lever_tx_y"         m */
    SB_COMP_LEVER_TX_Z,        /* "lever_tx_z"         m */
    SB_COMP_LEVER_MOT_X,       /* "lever_motion_x"     m */
    SB_COMP_LEVER_MOT_Y,       /* "lever_motion_y"     m */
    SB_COMP_LEVER_MOT_Z,       /* "lever_motion_z"     m */
    /* motion sensor */
    SB_COMP_ROLL,              /* "roll"               rad */
    SB_COMP_PITCH,             /* "pitch"              rad */
    SB_COMP_HEADING,           /* "heading"            rad */
    SB_COMP_HEAVE,             /* "heave"              m   fixed part */
    SB_COMP_HEAVE_REL,         /* "heave_relative"     m   fraction x amplitude */
    /* time-stamp errors (latency) times the RMS rates */
    SB_COMP_LATENCY_ROLL,      /* "latency_roll"       s */
    SB_COMP_LATENCY_PITCH,     /* "latency_pitch"      s */
    SB_COMP_LATENCY_HEAVE,     /* "latency_heave"      s */
    SB_COMP_LATENCY_POSITION,  /* "latency_position"   s   x vessel speed */
    /* mounting alignment residuals */
    SB_COMP_ALIGN_ROLL,        /* "align_roll"         rad */
    SB_COMP_ALIGN_PITCH,       /* "align_pitch"        rad */
    SB_COMP_ALIGN_HEADING,     /* "align_heading"      rad */
    /* sound speed */
    SB_COMP_SURFACE_SS,        /* "surface_sound_speed" m/s at the transducer */
    SB_COMP_COLUMN_SS,         /* "sound_speed_column" 1   relative (scale - 1) */
    /* refraction: the spread of the casts of one survey (casts model) */
    SB_COMP_REFRACTION,        /* "refraction"         1   standardised
                                  (u = 1; the sensitivity is the spread) */
    /* echosounder */
    SB_COMP_RANGE,             /* "range"              m   slant range */
    SB_COMP_POINTING,          /* "beam_pointing"      rad across-track */
    SB_COMP_POINTING_ALONG,    /* "beam_pointing_along" rad along-track */
    /* vertical reference */
    SB_COMP_DRAFT,             /* "draft"              m */
    SB_COMP_SQUAT,             /* "squat"              m */
    SB_COMP_LOADING,           /* "loading"            m */
    SB_COMP_WATER_LEVEL,       /* "water_level"        m   gauge (tide method) */
    SB_COMP_TIDE_ZONING,       /* "tide_zoning"        m   (tide method) */
    SB_COMP_SEPARATION,        /* "separation_model"   m   (ellipsoid method) */
    SB_COMP_COUNT
};

/* Display groups of the components (breakdowns add variances per group). */
enum sb_group {
    SB_GROUP_POSITIONING = 0, /* "positioning" */
    SB_GROUP_LEVER_ARMS,      /* "lever_arms" */
    SB_GROUP_MOTION,          /* "motion" */
    SB_GROUP_LATENCY,         /* "latency" */
    SB_GROUP_ALIGNMENT,       /* "alignment" */
    SB_GROUP_SOUND_SPEED,     /* "sound_speed" */
    SB_GROUP_REFRACTION,      /* "refraction" */
    SB_GROUP_ECHOSOUNDER,     /* "echosounder" */
    SB_GROUP_VERTICAL_REF,    /* "vertical_reference" */
    SB_GROUP_COUNT
};

/*
 * Per-beam state: everything the error function needs, precomputed by
 * sb_beam_setup for one (depth, angle).  Plain data, fixed size (a few
 * KiB), no allocation.  With a constant column it holds no pointer into the
 * system; with a profile it points at the system's profiles (read-only), so
 * the system must outlive the beam.  Public fields a caller may read are
 * marked; the rest is private.
 */
struct sb_beam {
    /* -- public, read-only -- */
    double depth_m;      /* seafloor depth below the surface, m */
    double angle_rad;    /* beam angle, rad (port < 0) */
    double depth_tx_m;   /* depth of the seafloor below the transducer, m */
    double t_oneway_s;   /* true one-way travel time, s */
    double true_enz[3];  /* true sounding: E, N relative to the reference
                            point's nominal position, Z below datum, m */
    double across_m;     /* across-track distance of the sounding from the
                            transducer, m (signed, starboard > 0); traced
                            through the profile when there is one */
    double u[SB_COMP_COUNT];          /* standard uncertainty of each
                                         component (unit as in the enum) */
    enum sb_dist dist[SB_COMP_COUNT]; /* its distribution (Monte Carlo) */

    /* -- private to georef.c -- */
    double z_tx;         /* transducer depth below the surface, m */
    double y_tx;         /* transducer across-track lever arm, m */
    int flat;            /* 1 flat array (steered), 0 curved */
    int ellipsoid;       /* 1 ellipsoid method, 0 tide method */
    double sin_t, cos_t; /* of the true beam angle */
    double c_col;        /* column speed, m/s */
    double inv_c0;       /* 1 / surface speed, s/m */
    double inv_c_col;    /* 1 / column speed, s/m */
    double ray_z, ray_y; /* true ray: depth below and across from the
                            transducer, m (same arithmetic as the hot path) */
    double rate_roll, rate_pitch, rate_heave; /* RMS rates: rad/s, rad/s, m/s */
    double speed;        /* m/s */
    double lev_h[3];     /* antenna -> transducer offset (vessel frame), m */
    double lev_v[3];     /* vertical reference point -> transducer, m */
    double m[3][3];      /* rotation at the effective (RMS) attitude */

    /* profile (refr != NULL): the nominal ray, traced */
    const struct sb_refraction *refr;
    struct sb_svp_start st; /* start of the rays in the reference profile */
    double c_t;          /* reference speed at the transducer, m/s */
    double p0;           /* |Snell parameter| of the true ray, s/m */
    double ray_w;        /* w of the exact trace at t_oneway (dx = 0) */
    double lin_zq, lin_zt, lin_wq, lin_wt; /* ray derivatives (linear
                            model): dz/dq, dz/dt, dw/dq, dw/dt at the seafloor */
    double w0;           /* w at the seafloor (planning direction) */
    struct sb_svp_cursor cur; /* depth cursor of the nominal ray */
    struct sb_svp_cursor tcur; /* time cursor of its exact trace */
    double refr_e[3];    /* E, N, Z per unit of SB_COMP_REFRACTION, m */
    size_t n_casts;
    struct sb_svp_start cast_st[SB_CASTS_MAX];
    struct sb_svp_cursor cast_cur[SB_CASTS_MAX];
};

/*
 * Set up one beam: depth_m (m, seafloor below the surface) and angle_rad
 * (rad, from the vertical, port negative, |angle| <= the system's max angle
 * and < pi/2).  Fills *b with the true geometry, the true travel time and,
 * for every component, its standard uncertainty (from the system's stated
 * figures, the beam-pointing model and the operating conditions) and
 * distribution.  The system must have passed sb_system_validate.
 * Returns SB_OK, SB_EINPUT (non-finite depth or angle, |angle| above the
 * maximum beam angle, seafloor not below the transducer) or SB_RAY_TURNS
 * (with a profile: the ray of this angle turns before it reaches the
 * seafloor -- a defined outcome, not an input error; *b must not be used)
 * with err->msg filled (no position).  Allocation-free; err may be NULL.
 */
int sb_beam_setup(const struct sb_system *sys, double depth_m,
                  double angle_rad, struct sb_beam *b, struct sb_error *err);

/* Status of sb_beam_setup / sb_beam_redepth for a ray that turns above the
 * seafloor (equal to SB_ENUM, which they return for no other reason). */
#define SB_RAY_TURNS SB_ENUM

/*
 * Largest |beam angle| (rad) whose ray reaches depth_m (m below the
 * surface) without turning: asin(c_t / c_max) with c_t the reference
 * profile's speed at the transducer and c_max its largest speed between the
 * transducer and the seafloor; pi/2 for a constant column or when no speed
 * there exceeds c_t.  For depth_m not below the transducer, pi/2.
 */
double sb_beam_turn_angle(const struct sb_system *sys, double depth_m);

/*
 * Move a set-up beam to another depth (m, seafloor below the surface),
 * keeping everything that depends only on the angle and the system: the
 * cheap way to walk a column of depths at one angle (with a profile the
 * ray is walked on from the previous depth when the new one is deeper).
 * Same result as sb_beam_setup at the new depth.  Returns SB_OK, SB_EINPUT
 * (depth not finite or not below the transducer) or SB_RAY_TURNS; *b is
 * unchanged on error.  Allocation-free.
 */
int sb_beam_redepth(struct sb_beam *b, double depth_m, struct sb_error *err);

/*
 * The error of the computed sounding: dx[SB_COMP_COUNT] holds the deviation
 * of every input from its true value (measured - true, units as in the
 * enum); err_enz receives computed - true sounding (E, N, Z down), metres.
 * All dx = 0 gives exactly 0.  Allocation-free, thread-safe (b is only
 * read).  This is the hot function of the Jacobian and of Monte Carlo.
 */
void sb_georef_error(const struct sb_beam *b, const double *dx,
                     double err_enz[3]);

/*
 * The model is a sum of three parts, each depending on a fixed set of
 * components: the beam and ray (SB_PART_BEAM), the lever arms turned by the
 * attitude (SB_PART_LEVER), and the terms that add straight onto the
 * sounding (SB_PART_ADD: antenna position, position latency, vertical
 * reference).  sb_georef_error_parts evaluates only the parts in the mask
 * (SB_PART_ALL = sb_georef_error); sb_component_parts says which parts a
 * component feeds.  A central difference in one component over the parts it
 * feeds equals the central difference of the full model (the other parts
 * do not change), which is how propagate.c keeps the Jacobian cheap.
 */
#define SB_PART_BEAM 1u
#define SB_PART_LEVER 2u
#define SB_PART_ADD 4u
#define SB_PART_ALL 7u
/* Flag for sb_georef_error_parts: with a profile, take the ray from its
 * first-order expansion about the nominal ray in (Snell parameter, time)
 * instead of re-tracing it.  Its value and first derivatives at dx = 0 are
 * those of the exact model, so central differences give the same Jacobian
 * up to O(h^2) (the Jacobian's own truncation order) at the cost of a few
 * multiplications; never use it for Monte Carlo.  No effect with a
 * constant column (the straight ray is exact and cheap). */
#define SB_PART_LINEAR 8u
void sb_georef_error_parts(const struct sb_beam *b, const double *dx,
                           unsigned parts, double err_enz[3]);
/* Bit mask of SB_PART_* fed by component c (0 out of range). */
unsigned sb_component_parts(int c);

/* Stable snake_case name of a component ("roll"); "?" out of range. */
const char *sb_component_name(int c);
/* Name of the display group of a component ("motion"); "?" out of range. */
const char *sb_component_group(int c);
/* Group index (enum sb_group) of a component; -1 out of range. */
int sb_component_group_id(int c);
/* Name of a group ("latency"); "?" out of range. */
const char *sb_group_name(int g);
/* SI unit of a component's deviation ("m", "rad", "s", "m/s", "1"). */
const char *sb_component_unit(int c);
/* Index of a component by name, -1 if unknown. */
int sb_component_lookup(const char *name);

#ifdef __cplusplus
}
#endif

#endif
