/*
 * swathbudget — a synthetic multibeam survey, for demonstrations and for
 * end-to-end tests of the audit.
 *
 * Over an area (area.h) the generator lays mainscheme lines at the spacing
 * the effort estimate chooses for the area's order (effort.h, with the
 * usable half-width of swath.h), and a few crosslines perpendicular to
 * them.  Along each line it places pings at a fixed spacing, each with
 * equiangular beams out to the system's maximum angle, over an invented
 * seafloor: the area's own depth model plus, optionally, a mound and a
 * wreck-sized block.  Every sounding's error is drawn from the system's
 * model the way the Monte Carlo check draws it (JCGM 101:2008, 6.4): one
 * draw per component from its distribution with its standard uncertainty
 * (struct sb_beam u[] and dist[]), pushed through the full forward model
 * (sb_georef_error).  Draws are independent from sounding to sounding --
 * a real survey's errors are partly common to neighbouring soundings (a
 * tide error shifts a whole line), which a crossline comparison partly
 * cancels; the simulation is the case the a-priori budget describes
 * exactly, sounding by sounding.
 *
 * Output: CSV with the header
 *     line,easting_m,northing_m,depth_m,beam_angle_deg[,tvu95_m,thu95_m]
 * mainscheme lines named M001, M002, ... and crosslines X01, X02, ...
 */
#ifndef SWATHBUDGET_SIMULATE_H
#define SWATHBUDGET_SIMULATE_H

#include <stdint.h>
#include <stdio.h>

#include "swathbudget/area.h"
#include "swathbudget/error.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/orders.h"
#include "swathbudget/system.h"

#ifdef __cplusplus
extern "C" {
#endif

enum sb_relief {
    SB_RELIEF_NONE = 0,    /* the area's depth model only */
    SB_RELIEF_FEATURES = 1 /* plus a mound and a wreck-sized block */
};

/* Bounds of the options. */
#define SB_SIMULATE_BEAMS_MAX 2048
#define SB_SIMULATE_CROSSLINES_MAX 99
#define SB_SIMULATE_SOUNDINGS_DEFAULT 5000000ULL

struct sb_simulate_opts {
    uint64_t seed;           /* random seed */
    const struct sb_order *order; /* order whose limits fix the usable
                                     swath and so the line spacing */
    int thu_rule;            /* enum sb_thu_rule (propagate.h) */
    double ping_spacing_m;   /* along-track distance between pings, m > 0 */
    int beams;               /* beams per ping, 2..SB_SIMULATE_BEAMS_MAX,
                                equiangular across the system's swath */
    int n_crosslines;        /* 1..SB_SIMULATE_CROSSLINES_MAX */
    int relief;              /* enum sb_relief */
    int with_tpu;            /* 1: add each sounding's a-priori TVU95 and
                                THU95 (columns tvu95_m, thu95_m), as a
                                processing package would deliver them */
    uint64_t max_soundings;  /* refuse to write more than this */
};

/* Defaults: seed 1, no order (must be set), exact THU, pings every 5 m,
 * 41 beams, 3 crosslines, features on, no TPU columns, at most
 * SB_SIMULATE_SOUNDINGS_DEFAULT soundings. */
void sb_simulate_opts_default(struct sb_simulate_opts *o);

struct sb_simulate_stats {
    uint64_t soundings;      /* rows written */
    uint64_t skipped;        /* beams dropped: seafloor too close below the
                                transducer there */
    size_t n_main, n_cross;  /* lines */
    double spacing_min_m, spacing_max_m; /* mainscheme line spacing */
    double azimuth_rad;      /* mainscheme direction, clockwise from north */
    double depth_min_m, depth_max_m;     /* true depths sounded */
};

/*
 * The invented seafloor: depth (m, positive down) at (e, n) (m): the
 * area's depth model, plus for SB_RELIEF_FEATURES a Gaussian mound (its
 * top 5 % of the local depth shoaler, standard deviation a sixth of the
 * outline's smaller extent, centred at 30 % of its south-north extent and
 * half its west-east extent) and a block 24 m (north) x 8 m (east)
 * standing 3 m proud of the seafloor (at 70 % of the south-north extent).
 * Never shallower than min_depth_m.  Pure.
 */
double sb_simulate_seafloor(const struct sb_area *a, int relief,
                            double min_depth_m, double e, double n);

/*
 * Write the survey to out (a CSV stream; the caller makes it atomic, e.g.
 * with sb_outfile).  sys: a validated system; h95: the THU table (needed
 * for the exact rule and for with_tpu).  Returns SB_OK with *st filled;
 * SB_EINPUT for bad options, an area with no usable swath at some depth
 * for the order, or more soundings than allowed (message without
 * position); SB_ENOMEM; SB_EIO on a write error; engine statuses.
 */
int sb_simulate(const struct sb_system *sys, const struct sb_horiz95 *h95,
                const struct sb_area *area, const struct sb_simulate_opts *o,
                FILE *out, struct sb_simulate_stats *st,
                struct sb_error *err);

#ifdef __cplusplus
}
#endif

#endif
