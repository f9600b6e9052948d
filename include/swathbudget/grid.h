/*
 * swathbudget — a reference surface: depths averaged in square cells.
 *
 * The crossline comparison of an audit needs, for every mainscheme sounding,
 * the depth the reference soundings (near-nadir crossline soundings, or a
 * reference survey) give at the same place.  The surface is a grid of
 * square cells of side cell_m aligned on multiples of cell_m (cell (i, j)
 * holds i cell <= x < (i + 1) cell, j cell <= y < (j + 1) cell); each cell
 * keeps the count, mean and sum of squared deviations of the depths that
 * fell in it, updated one value at a time by Welford's method (Welford
 * 1962, Technometrics 4(3):419-420) and merged exactly by the pairwise
 * formula of Chan, Golub & LeVeque (1983, The American Statistician
 * 37(3):242-247, eq. 2.1b; the references cited from memory).
 *
 * Only the cells that receive a value exist (an open-addressing hash table
 * keyed by the cell indices): memory grows with the area the reference
 * covers, never with the number of soundings of the survey.  Adding may
 * allocate when the table doubles (amortised; never per value); finding is
 * allocation-free.  Coordinates are projected metres (easting, northing).
 */
#ifndef SWATHBUDGET_GRID_H
#define SWATHBUDGET_GRID_H

#include <stddef.h>
#include <stdint.h>

#include "swathbudget/error.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Cell sizes accepted, m. */
#define SB_GRID_CELL_MIN_M 0.01
#define SB_GRID_CELL_MAX_M 10000.0

/* One cell. */
struct sb_grid_cell {
    int32_t ix, iy;  /* cell indices: floor(x / cell), floor(y / cell) */
    uint32_t n;      /* values in the cell (0: the slot is empty) */
    double mean;     /* mean depth, m */
    double m2;       /* sum of squared deviations from the mean, m^2 */
};

struct sb_grid; /* opaque */

/*
 * A new empty grid of square cells of side cell_m (m, in
 * [SB_GRID_CELL_MIN_M, SB_GRID_CELL_MAX_M]).  Returns SB_OK with *out;
 * SB_EINPUT for a bad size (message without position); SB_ENOMEM.
 */
int sb_grid_alloc(double cell_m, struct sb_grid **out, struct sb_error *err);

void sb_grid_free(struct sb_grid *g);

/* Side of the cells, m. */
double sb_grid_cell_size(const struct sb_grid *g);

/*
 * Add the depth z_m (m) at (x_m, y_m) (m).  Returns SB_OK; SB_EINPUT when a
 * value is not finite or the position is too far from the origin for a
 * 32-bit cell index (|x / cell| >= 2^31: the position is outside the grid);
 * SB_ENOMEM when the table could not grow (the grid is unchanged).
 * err is filled only when not NULL.
 */
int sb_grid_add(struct sb_grid *g, double x_m, double y_m, double z_m,
                struct sb_error *err);

/*
 * The cell holding (x_m, y_m), or NULL when no value fell there (or the
 * position is outside the grid).  Allocation-free.  The pointer is valid
 * until the next sb_grid_add.
 */
const struct sb_grid_cell *sb_grid_find(const struct sb_grid *g, double x_m,
                                        double y_m);

/* Standard deviation of the depths in a cell (divisor n - 1), m; 0 when
 * n < 2. */
double sb_grid_cell_sd(const struct sb_grid_cell *c);

/* Number of non-empty cells. */
size_t sb_grid_count(const struct sb_grid *g);

/*
 * Visit the non-empty cells: *pos starts at 0; each call returns the next
 * cell and advances *pos, NULL at the end.  Order is unspecified.
 */
const struct sb_grid_cell *sb_grid_next(const struct sb_grid *g, size_t *pos);

/*
 * A new grid of cells factor times larger (factor >= 1), each cell the
 * exact merge (Chan et al. 1983) of the factor x factor cells it covers.
 * Returns SB_OK with *out; SB_EINPUT for factor < 1; SB_ENOMEM.
 */
int sb_grid_coarsen(const struct sb_grid *g, int factor, struct sb_grid **out,
                    struct sb_error *err);

/*
 * A cell size derived from a depth: 5 % of depth_m (m), rounded down to a
 * power of two metres and clamped to [0.5 m, 512 m].  Five per cent of the
 * depth is about the across-track footprint of a 3-degree beam at nadir
 * (2 d tan 1.5 deg = 0.052 d), so a cell holds a few independent
 * near-nadir soundings without averaging over much of the relief (common
 * practice, not a standard's figure).  Powers of two let a grid built at a
 * finer size be coarsened to it exactly.
 */
double sb_grid_cell_for_depth(double depth_m);

#ifdef __cplusplus
}
#endif

#endif
