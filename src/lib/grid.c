/*
 * swathbudget — reference surface: a hash table of square cells holding
 * the count, mean and squared deviations of the depths in each.
 *
 * Hand-rolled rather than GSL: GSL has no hash table, and open addressing
 * with linear probing over a flat array of cells keeps a lookup to one or
 * two cache lines, which the comparison pass does once per sounding.
 */
#include "swathbudget/grid.h"

#include <math.h>
#include <stdlib.h>

#define INITIAL_SLOTS 1024 /* a power of two */

struct sb_grid {
    double cell;
    double inv_cell;
    size_t slots;  /* power of two */
    size_t used;
    struct sb_grid_cell *cells;
};

/* Mix the two indices into a slot number (the SplitMix64 finaliser, Steele,
 * Lea & Flood 2014): neighbouring cells land far apart. */
static inline uint64_t hash(int32_t ix, int32_t iy)
{
    uint64_t z = ((uint64_t)(uint32_t)ix << 32) | (uint32_t)iy;

    z += 0x9e3779b97f4a7c15ULL;
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
    return z ^ (z >> 31);
}

/* Cell index of a coordinate; 0 outside the 32-bit range. */
static inline int cell_index(double v, double inv_cell, int32_t *i)
{
    double f = floor(v * inv_cell);

    if (!(f >= -2147483648.0 && f < 2147483648.0))
        return 0;
    *i = (int32_t)f;
    return 1;
}

int sb_grid_alloc(double cell_m, struct sb_grid **out, struct sb_error *err)
{
    struct sb_grid *g;

    *out = NULL;
    if (!(cell_m >= SB_GRID_CELL_MIN_M && cell_m <= SB_GRID_CELL_MAX_M))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "cell size %g m is out of range (expected %g to "
                            "%g m)",
                            cell_m, SB_GRID_CELL_MIN_M, SB_GRID_CELL_MAX_M);
    g = calloc(1, sizeof *g);
    if (g)
        g->cells = calloc(INITIAL_SLOTS, sizeof *g->cells);
    if (!g || !g->cells) {
        free(g);
        return sb_error_set(err, SB_ENOMEM, "", 0, 0,
                            "out of memory for the reference grid");
    }
    g->cell = cell_m;
    g->inv_cell = 1.0 / cell_m;
    g->slots = INITIAL_SLOTS;
    *out = g;
    return SB_OK;
}

void sb_grid_free(struct sb_grid *g)
{
    if (!g)
        return;
    free(g->cells);
    free(g);
}

double sb_grid_cell_size(const struct sb_grid *g)
{
    return g->cell;
}

/* The slot of (ix, iy): the cell itself or the empty slot where it goes. */
static inline struct sb_grid_cell *slot(struct sb_grid_cell *cells,
                                        size_t slots, int32_t ix, int32_t iy)
{
    size_t mask = slots - 1, k = (size_t)hash(ix, iy) & mask;

    while (cells[k].n && (cells[k].ix != ix || cells[k].iy != iy))
        k = (k + 1) & mask;
    return &cells[k];
}

static int grow(struct sb_grid *g)
{
    size_t slots = g->slots * 2;
    struct sb_grid_cell *cells = calloc(slots, sizeof *cells);

    if (!cells)
        return SB_ENOMEM;
    for (size_t k = 0; k < g->slots; k++)
        if (g->cells[k].n)
            *slot(cells, slots, g->cells[k].ix, g->cells[k].iy) = g->cells[k];
    free(g->cells);
    g->cells = cells;
    g->slots = slots;
    return SB_OK;
}

/* Merge the statistics (n, mean, m2) of b into a (Chan, Golub & LeVeque
 * 1983, eq. 2.1b); with nb = 1 and m2b = 0 this is Welford's update. */
static void merge(struct sb_grid_cell *a, uint32_t nb, double meanb,
                  double m2b)
{
    double n = (double)a->n + nb, delta = meanb - a->mean;

    a->mean += delta * nb / n;
    a->m2 += m2b + delta * delta * ((double)a->n * nb / n);
    a->n += nb;
}

static int put(struct sb_grid *g, int32_t ix, int32_t iy, uint32_t n,
               double mean, double m2)
{
    struct sb_grid_cell *c;

    /* keep the load factor at or below 1/2: short probe sequences */
    if (2 * (g->used + 1) > g->slots && grow(g) != SB_OK)
        return SB_ENOMEM;
    c = slot(g->cells, g->slots, ix, iy);
    if (!c->n) {
        c->ix = ix;
        c->iy = iy;
        c->n = n;
        c->mean = mean;
        c->m2 = m2;
        g->used++;
        return SB_OK;
    }
    if (c->n > UINT32_MAX - n)
        return SB_EINPUT; /* a cell cannot count further: refuse the value */
    merge(c, n, mean, m2);
    return SB_OK;
}

int sb_grid_add(struct sb_grid *g, double x_m, double y_m, double z_m,
                struct sb_error *err)
{
    int32_t ix, iy;
    int rc;

    if (!isfinite(z_m) || !cell_index(x_m, g->inv_cell, &ix) ||
        !cell_index(y_m, g->inv_cell, &iy)) {
        if (!err)
            return SB_EINPUT;
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "position (%g, %g) m or depth %g m cannot go in "
                            "the grid (expected finite values within "
                            "2^31 cells of %g m from the origin)",
                            x_m, y_m, z_m, g->cell);
    }
    rc = put(g, ix, iy, 1, z_m, 0.0);
    if (rc == SB_ENOMEM && err)
        return sb_error_set(err, SB_ENOMEM, "", 0, 0,
                            "out of memory for the reference grid");
    if (rc == SB_EINPUT && err)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "more than %u values in one cell (expected a "
                            "smaller cell size)",
                            (unsigned)UINT32_MAX);
    return rc;
}

const struct sb_grid_cell *sb_grid_find(const struct sb_grid *g, double x_m,
                                        double y_m)
{
    const struct sb_grid_cell *c;
    int32_t ix, iy;

    if (!cell_index(x_m, g->inv_cell, &ix) ||
        !cell_index(y_m, g->inv_cell, &iy))
        return NULL;
    c = slot(g->cells, g->slots, ix, iy);
    return c->n ? c : NULL;
}

double sb_grid_cell_sd(const struct sb_grid_cell *c)
{
    return c->n < 2 ? 0.0 : sqrt(c->m2 / (c->n - 1));
}

size_t sb_grid_count(const struct sb_grid *g)
{
    return g->used;
}

const struct sb_grid_cell *sb_grid_next(const struct sb_grid *g, size_t *pos)
{
    while (*pos < g->slots) {
        const struct sb_grid_cell *c = &g->cells[(*pos)++];

        if (c->n)
            return c;
    }
    return NULL;
}

/* floor(i / f) for a negative i too. */
static int32_t floor_div(int32_t i, int32_t f)
{
    int32_t q = i / f;

    return (i % f != 0 && i < 0) ? q - 1 : q;
}

int sb_grid_coarsen(const struct sb_grid *g, int factor, struct sb_grid **out,
                    struct sb_error *err)
{
    struct sb_grid *c;
    int rc;

    *out = NULL;
    if (factor < 1)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "coarsening factor %d (expected >= 1)", factor);
    if ((rc = sb_grid_alloc(g->cell * factor, &c, err)) != SB_OK)
        return rc;
    for (size_t k = 0; k < g->slots; k++) {
        const struct sb_grid_cell *s = &g->cells[k];

        if (!s->n)
            continue;
        rc = put(c, floor_div(s->ix, factor), floor_div(s->iy, factor), s->n,
                 s->mean, s->m2);
        if (rc != SB_OK) {
            sb_grid_free(c);
            return sb_error_set(err, rc, "", 0, 0,
                                rc == SB_ENOMEM
                                    ? "out of memory for the reference grid"
                                    : "too many values in one cell "
                                      "(expected a smaller cell size)");
        }
    }
    *out = c;
    return SB_OK;
}

double sb_grid_cell_for_depth(double depth_m)
{
    double target = 0.05 * depth_m, cell = 0.5;

    if (!(target > 0.5))
        return 0.5;
    while (cell * 2 <= target && cell < 512)
        cell *= 2;
    return cell;
}
