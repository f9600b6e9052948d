/*
 * swathbudget — a survey area: its outline, its depths, the order it must
 * meet and how the vessel works it.  Read from a YAML file (AREA.yaml, format
 * in docs/area.md) and used by the effort estimate (effort.h).
 *
 * Coordinates are a local plane grid: E (east) and N (north) in metres, any
 * origin the surveyor chooses.  Depths are in metres below the chart datum
 * (positive down).  Everything is SI inside: m, m/s, s, rad; the overlap is a
 * fraction (0.1 for "10 %").
 */
#ifndef SWATHBUDGET_AREA_H
#define SWATHBUDGET_AREA_H

#include <stddef.h>

#include "swathbudget/error.h"

#ifdef __cplusplus
extern "C" {
#endif

#define SB_AREA_NAME_MAX 64
#define SB_AREA_TITLE_MAX 160
#define SB_AREA_ORDER_MAX 16
#define SB_AREA_VERTICES_MAX 512
#define SB_AREA_GRID_MAX 4096   /* nodes of a depth grid (e.g. 64 x 64) */

/* The largest overlap accepted (fraction of the swath width): beyond 90 %
 * every strip of seafloor would be covered ten times or more, which is a
 * typing error rather than a plan. */
#define SB_AREA_OVERLAP_MAX 0.9

enum sb_area_shape { SB_AREA_POLYGON = 0, SB_AREA_RECTANGLE = 1 };

enum sb_area_depth_kind {
    SB_AREA_DEPTH_CONSTANT = 0, /* one depth everywhere */
    SB_AREA_DEPTH_SLOPE = 1,    /* linear along a direction, constant across */
    SB_AREA_DEPTH_GRID = 2      /* regular grid, bilinear between nodes */
};

struct sb_area {
    char name[SB_AREA_NAME_MAX];
    char title[SB_AREA_TITLE_MAX];
    char source[SB_ERROR_FILE_MAX];   /* file it was read from */

    char order[SB_AREA_ORDER_MAX];    /* order id required, e.g. "1a" */
    int order_line, order_col;        /* where it was written, so that an
                                         order unknown to the standard can be
                                         reported at FILE:LINE:COL */

    enum sb_area_shape shape;         /* as written; a rectangle is stored
                                         as its four corners too */
    int n_vertices;                   /* >= 3, counter-clockwise or not */
    double vertex_e[SB_AREA_VERTICES_MAX]; /* m */
    double vertex_n[SB_AREA_VERTICES_MAX]; /* m */

    enum sb_area_depth_kind depth_kind;
    double depth_m;                   /* CONSTANT */
    double slope_e[2], slope_n[2];    /* SLOPE: two points (m) ... */
    double slope_depth[2];            /* ... and their depths (m) */
    int grid_cols, grid_rows;         /* GRID: >= 2 each */
    double grid_west_e, grid_north_n; /* GRID: position of the north-west
                                         node (m) */
    double grid_step;                 /* GRID: node spacing (m), > 0 */
    double grid[SB_AREA_GRID_MAX];    /* GRID: depth (m), row-major, row 0 the
                                         northern row, column 0 the western */

    double overlap;                   /* fraction of the swath width covered
                                         by both of two adjacent lines,
                                         [0, SB_AREA_OVERLAP_MAX] */
    double speed_mps;                 /* planned survey speed, > 0 */
    double min_speed_mps;             /* slowest speed a line can be held at
                                         (> 0, <= speed); = speed when not
                                         stated */
    int min_speed_given;              /* 1 if min_speed was in the file */
    double turn_s;                    /* time to turn onto the next line, s */
    double day_s;                     /* survey time per working day, s */
    int azimuth_given;                /* 1: lines run along line_azimuth */
    double line_azimuth_rad;          /* [0, pi), clockwise from grid north */
};

/* Allocate an empty area (zeroed); NULL if out of memory. */
struct sb_area *sb_area_alloc(void);
void sb_area_free(struct sb_area *a);

/*
 * Read an area file into *out (allocated by the caller, e.g. with
 * sb_area_alloc).  Returns SB_OK; SB_EINPUT with FILE:LINE:COL and "FIELD:
 * what is wrong (what was expected)" for every content error (unknown or
 * missing key, bad unit, a polygon with fewer than 3 corners, zero area or
 * crossing edges, a depth <= 0 anywhere in the area, a grid that does not
 * cover the outline, ...); SB_EIO if the file cannot be read; SB_ENOMEM.
 * *out is written only on success.
 */
int sb_area_load(const char *path, struct sb_area *out, struct sb_error *err);

/* The same from text in memory; name is used in messages and as source. */
int sb_area_load_string(const char *name, const char *text, size_t len,
                        struct sb_area *out, struct sb_error *err);

/* Depth below the datum (m) at the point (e, n) (m): the constant, the
 * linear slope (projected on the line through the two points), or the
 * bilinear interpolation of the grid (clamped to the grid's edge outside
 * it; the loader checks the outline lies inside).  Allocation-free. */
double sb_area_depth_at(const struct sb_area *a, double e, double n);

/* Smallest and largest depth (m) over the area (exact: a linear slope takes
 * its extremes at corners; a bilinear grid at nodes, over the nodes of the
 * cells the outline touches, so it may be slightly wide). */
void sb_area_depth_range(const struct sb_area *a, double *dmin, double *dmax);

/* Area of the outline, m^2 (shoelace formula). */
double sb_area_size(const struct sb_area *a);

/* "constant", "slope", "grid". */
const char *sb_area_depth_kind_name(enum sb_area_depth_kind k);

#ifdef __cplusplus
}
#endif

#endif
