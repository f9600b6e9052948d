/*
 * swathbudget — survey effort: a line layout over an area (area.h), the line
 * spacing it implies and the time it takes.
 *
 * Layout (docs/area.md, "Line layout"):
 *  - lines are straight, parallel, and run along the area's long axis: the
 *    direction of the edge of the outline's convex hull across which the
 *    outline is narrowest (its minimum width, found by trying every hull
 *    edge, as with rotating calipers, Shamos 1978), unless the area file
 *    fixes survey.line_azimuth;
 *  - with u the line direction and w = u turned 90 degrees clockwise, a
 *    point's across coordinate is v = p . w; the lines are laid from the
 *    smallest v (the left-hand edge looking along the azimuth) to the
 *    largest;
 *  - each line's swath is the usable half-width h (from the caller: the
 *    narrower side's usable across-track distance at a depth) at the
 *    shallowest-swath point along the line, on BOTH sides (lines are run in
 *    alternate directions, so either side may face either neighbour);
 *  - the first line's outer edge meets the area's edge: v1 - h(v1) = v_min;
 *    each next line shares the stated overlap of the swath width with its
 *    neighbour: v[k+1] - v[k] = (1 - overlap) (h[k] + h[k+1]); the last
 *    line is the first whose outer edge reaches v_max.  Both conditions are
 *    solved by bisection because h depends on where the line falls;
 *  - line length is the length of the line inside the outline (the pieces
 *    of a line crossing a bay are added up); effort counts time on line and
 *    one turn between consecutive lines, no transit to or from the area.
 * Units: m, s, m/s, rad.
 */
#ifndef SWATHBUDGET_EFFORT_H
#define SWATHBUDGET_EFFORT_H

#include <stddef.h>

#include "swathbudget/area.h"
#include "swathbudget/density.h"
#include "swathbudget/error.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/orders.h"
#include "swathbudget/swath.h"
#include "swathbudget/system.h"

#ifdef __cplusplus
extern "C" {
#endif

/* A refusal of layouts that cannot be meant: narrower swaths than this
 * many lines would need are a sign of a wrong input. */
#define SB_EFFORT_LINES_MAX 100000

/* Samples along each piece of a line at which the depth is read. */
#define SB_EFFORT_SAMPLES 33

/* Depth nodes at which the caller's half-width is evaluated (linear
 * interpolation between them; one node for a constant depth). */
#define SB_EFFORT_DEPTH_NODES 65

/*
 * The usable half-width (m, >= 0) at depth_m (m below the datum): how far
 * from the vessel's track soundings meet the order on the narrower side.
 * Returns SB_OK, or a status with err filled (the plan stops with it).
 */
typedef int (*sb_halfwidth_fn)(void *ctx, double depth_m,
                               double *half_width_m, struct sb_error *err);

struct sb_effort_line {
    double offset_m;      /* across coordinate v of the line, m from v_min */
    double length_m;      /* length inside the outline, m */
    double half_width_m;  /* narrowest usable half-width along it, m */
    double depth_min_m, depth_max_m; /* depths met along it, m */
    double e0, n0, e1, n1;/* first and last point inside the outline, m */
};

struct sb_effort {
    double azimuth_rad;       /* line direction, [0, pi) from grid north */
    double across_m;          /* the outline's extent across the lines, m */
    size_t n_lines;
    struct sb_effort_line *lines; /* n_lines of them, owned (release) */
    double spacing_min_m;     /* between adjacent lines (0 for one line) */
    double spacing_max_m;
    double line_m;            /* sum of line lengths, m */
    double speed_mps;         /* speed on line used, m/s */
    double time_lines_s;      /* line_m / speed */
    double time_turns_s;      /* (n_lines - 1) x turn time */
    double time_s;            /* the two added */
    double days;              /* time_s / the area's working day */
    int feasible;             /* 0: some depth of the area has no usable
                                 swath (nadir fails): no plan */
    double infeasible_depth_m;/* that depth when feasible == 0 */
};

/*
 * The direction of the area's long axis (rad in [0, pi) from grid north):
 * survey.line_azimuth when given, else the minimum-width direction above.
 */
double sb_effort_axis(const struct sb_area *a);

/*
 * Lay out the lines over area a and estimate the effort at speed_mps (> 0,
 * m/s; the caller picks it, e.g. the area's speed lowered to keep the
 * sounding density, see density.h), with the usable half-width from
 * fn(ctx, depth).  out is filled (lines allocated) on SB_OK; a plan that
 * is impossible because some depth has no usable swath returns SB_OK with
 * out->feasible = 0 and no lines.  Errors: SB_EINPUT (speed not > 0, more
 * than SB_EFFORT_LINES_MAX lines), whatever fn returns, SB_ENOMEM.
 * Release with sb_effort_release.
 */
int sb_effort_plan(const struct sb_area *a, double speed_mps,
                   sb_halfwidth_fn fn, void *ctx, struct sb_effort *out,
                   struct sb_error *err);

/* Free the lines of a plan (the struct itself is the caller's). */
void sb_effort_release(struct sb_effort *e);

/* ---- usable swath from the engine -------------------------------------
 * The adapter between the engine (swath.h) and the layout: at one depth, the
 * usable half-angle is the smaller of the TVU/THU fail angle of the narrower
 * side and, when the order asks for feature detection and density
 * parameters are given, the density limit angle (density.h) at the speed
 * of the context.  Both limits are reported so that commands can show them
 * side by side. */

struct sb_usable_ctx {
    const struct sb_system *sys;    /* validated */
    const struct sb_horiz95 *h95;   /* THU table (exact rule) */
    const struct sb_order *order;
    int thu_rule;                   /* enum sb_thu_rule */
    const struct sb_density_params *density; /* NULL: no density limit */
    double speed_mps;               /* speed for the density limit, >= 0 */
};

struct sb_usable {
    double depth_m;                 /* below the surface, m */
    double depth_tx_m;              /* below the transducer, m */
    struct sb_swath_result swath;   /* the TVU/THU result, both sides */
    const struct sb_swath_side *narrow; /* the narrower side of swath */
    int density_applies;            /* 1: the order has a feature size and
                                       density parameters were given */
    double feature_m;               /* cube side, m (NAN if none) */
    struct sb_density_limit density;/* valid when density_applies */
    int by_density;                 /* 1: density is the tighter limit */
    double angle_rad;               /* usable half-angle, rad */
    double half_width_m;            /* usable across-track distance on the
                                       narrower side, m */
};

/*
 * The usable half-angle and half-width at depth_m (m below the surface).
 * Returns SB_OK or the engine's status (SB_EINPUT for a depth not below the
 * transducer, SB_ENUM, SB_ENOMEM), err filled.
 */
int sb_usable_at(const struct sb_usable_ctx *c, double depth_m,
                 struct sb_usable *out, struct sb_error *err);

/* sb_halfwidth_fn over a struct sb_usable_ctx (for sb_effort_plan). */
int sb_usable_halfwidth(void *ctx, double depth_m, double *half_width_m,
                        struct sb_error *err);

/* Why the effort speed is what it is. */
enum sb_speed_reason {
    SB_SPEED_PLANNED = 0,  /* the area's planned speed keeps the density */
    SB_SPEED_DENSITY = 1,  /* lowered to keep the density out to the TVU/THU
                              angle */
    SB_SPEED_FLOOR = 2     /* the density would ask for less than the area's
                              min_speed: held at min_speed, and the swath is
                              narrowed to the density angle instead */
};

/*
 * The speed for the effort estimate: the area's planned speed, lowered to
 * the highest speed at which a cube of the order's feature size still gets
 * N soundings out to the TVU/THU usable angle at every depth of the area
 * (sb_density_max_speed at SB_EFFORT_DEPTH_NODES depths of its range), but
 * not below the area's min_speed.  Without density parameters or a feature
 * size it is the planned speed.  c->speed_mps is ignored.  Returns SB_OK
 * with *speed_mps and *reason, or the engine's status.
 */
int sb_effort_speed(const struct sb_area *a, const struct sb_usable_ctx *c,
                    double *speed_mps, enum sb_speed_reason *reason,
                    struct sb_error *err);

/* "planned", "density", "min_speed". */
const char *sb_speed_reason_name(enum sb_speed_reason r);

/* ---- stated inputs by name (what-if and the report's input list) --------
 * Every stated uncertainty of a system, by the path of its key in the
 * system file (docs/spec.md) and by the engine component(s) it feeds
 * (georef.h).  A what-if ("is the better motion sensor worth it?") replaces
 * one of them: PATH=VALUE with VALUE a stated value as in the file, e.g.
 * motion.roll=0.01 deg sd or roll=0.01 deg sd. */

struct sb_input_field {
    const char *path;       /* "motion.roll" */
    const char *components; /* engine components fed, comma-separated */
    unsigned dims;          /* SB_DIM_* accepted */
    unsigned flags;         /* SB_STATED_2D for the horizontal position */
    size_t offset;          /* of the first struct sb_stated in sb_system */
    int count;              /* 1, or 3 for a lever arm's x, y, z */
};

/* The table and its size. */
const struct sb_input_field *sb_input_fields(size_t *n);

/* The field with this path, or the one feeding this component; NULL. */
const struct sb_input_field *sb_input_field_find(const char *name);

/* The stated value of a field in sys (the first of three for lever arms). */
const struct sb_stated *sb_input_field_get(const struct sb_system *sys,
                                           const struct sb_input_field *f);

/*
 * Apply "NAME=VALUE" to sys: NAME a path or component name, VALUE a stated
 * value.  The range resolution becomes a stated figure (range mode GIVEN).
 * The system is validated afterwards.  *field receives the field changed.
 * Returns SB_OK, or SB_EINPUT with "what is wrong (what was expected)" (no
 * position: the text came from the command line); sys is unchanged then.
 */
int sb_whatif_apply(struct sb_system *sys, const char *assignment,
                    const struct sb_input_field **field,
                    struct sb_error *err);

#ifdef __cplusplus
}
#endif

#endif
