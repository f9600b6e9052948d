/*
 * Survey-area files (AREA.yaml, format in docs/area.md) -> struct sb_area.
 * The YAML rules (positions, duplicate and unknown keys) come from ydoc.c;
 * quantities with units from units.c through sb_ynode_quantity (spec.h).
 */
#include "swathbudget/area.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/decimal.h"
#include "swathbudget/spec.h"
#include "swathbudget/units.h"
#include "swathbudget/ydoc.h"

#define PI 3.14159265358979323846 /* M_PI is not C11 */
/* Deeper than any ocean, longer than any survey area: larger is a typo. */
#define DEPTH_MAX_M 12000.0
#define COORD_MAX_M 1e7

struct sb_area *sb_area_alloc(void)
{
    return calloc(1, sizeof(struct sb_area));
}

void sb_area_free(struct sb_area *a)
{
    free(a);
}

const char *sb_area_depth_kind_name(enum sb_area_depth_kind k)
{
    switch (k) {
    case SB_AREA_DEPTH_CONSTANT: return "constant";
    case SB_AREA_DEPTH_SLOPE: return "slope";
    case SB_AREA_DEPTH_GRID: return "grid";
    }
    return "?";
}

/* ---- depth model -------------------------------------------------------- */

static double slope_depth(const struct sb_area *a, double e, double n)
{
    double de = a->slope_e[1] - a->slope_e[0], dn = a->slope_n[1] - a->slope_n[0];
    double t = ((e - a->slope_e[0]) * de + (n - a->slope_n[0]) * dn) /
               (de * de + dn * dn);

    return a->slope_depth[0] + t * (a->slope_depth[1] - a->slope_depth[0]);
}

static double grid_depth(const struct sb_area *a, double e, double n)
{
    double x = (e - a->grid_west_e) / a->grid_step;
    double y = (a->grid_north_n - n) / a->grid_step; /* rows go south */
    int i, j;
    double fx, fy;
    const double *g = a->grid;
    int nc = a->grid_cols;

    if (x < 0.0)
        x = 0.0;
    if (y < 0.0)
        y = 0.0;
    if (x > a->grid_cols - 1)
        x = a->grid_cols - 1;
    if (y > a->grid_rows - 1)
        y = a->grid_rows - 1;
    i = (int)floor(x);
    j = (int)floor(y);
    if (i > a->grid_cols - 2)
        i = a->grid_cols - 2;
    if (j > a->grid_rows - 2)
        j = a->grid_rows - 2;
    fx = x - i;
    fy = y - j;
    return (1 - fx) * (1 - fy) * g[j * nc + i] + fx * (1 - fy) * g[j * nc + i + 1] +
           (1 - fx) * fy * g[(j + 1) * nc + i] + fx * fy * g[(j + 1) * nc + i + 1];
}

double sb_area_depth_at(const struct sb_area *a, double e, double n)
{
    switch (a->depth_kind) {
    case SB_AREA_DEPTH_CONSTANT: return a->depth_m;
    case SB_AREA_DEPTH_SLOPE: return slope_depth(a, e, n);
    case SB_AREA_DEPTH_GRID: return grid_depth(a, e, n);
    }
    return NAN;
}

void sb_area_depth_range(const struct sb_area *a, double *dmin, double *dmax)
{
    double lo = INFINITY, hi = -INFINITY;

    if (a->depth_kind == SB_AREA_DEPTH_CONSTANT) {
        lo = hi = a->depth_m;
    } else if (a->depth_kind == SB_AREA_DEPTH_SLOPE) {
        for (int k = 0; k < a->n_vertices; k++) {
            double d = slope_depth(a, a->vertex_e[k], a->vertex_n[k]);
            lo = d < lo ? d : lo;
            hi = d > hi ? d : hi;
        }
    } else {
        /* nodes of the cells under the outline's bounding box */
        double e0 = INFINITY, e1 = -INFINITY, n0 = INFINITY, n1 = -INFINITY;
        int i0, i1, j0, j1;

        for (int k = 0; k < a->n_vertices; k++) {
            e0 = fmin(e0, a->vertex_e[k]);
            e1 = fmax(e1, a->vertex_e[k]);
            n0 = fmin(n0, a->vertex_n[k]);
            n1 = fmax(n1, a->vertex_n[k]);
        }
        i0 = (int)floor((e0 - a->grid_west_e) / a->grid_step);
        i1 = (int)ceil((e1 - a->grid_west_e) / a->grid_step);
        j0 = (int)floor((a->grid_north_n - n1) / a->grid_step);
        j1 = (int)ceil((a->grid_north_n - n0) / a->grid_step);
        i0 = i0 < 0 ? 0 : i0;
        j0 = j0 < 0 ? 0 : j0;
        i1 = i1 > a->grid_cols - 1 ? a->grid_cols - 1 : i1;
        j1 = j1 > a->grid_rows - 1 ? a->grid_rows - 1 : j1;
        for (int j = j0; j <= j1; j++)
            for (int i = i0; i <= i1; i++) {
                double d = a->grid[j * a->grid_cols + i];
                lo = d < lo ? d : lo;
                hi = d > hi ? d : hi;
            }
    }
    *dmin = lo;
    *dmax = hi;
}

double sb_area_size(const struct sb_area *a)
{
    double s = 0.0;

    for (int k = 0; k < a->n_vertices; k++) {
        int m = (k + 1) % a->n_vertices;
        s += a->vertex_e[k] * a->vertex_n[m] - a->vertex_e[m] * a->vertex_n[k];
    }
    return 0.5 * fabs(s);
}

/* ---- loader helpers ------------------------------------------------------ */

/* A positive length no larger than max_m. */
static int positive_length(const struct sb_ydoc *doc,
                           const struct sb_ynode *node, const char *what,
                           double max_m, double *out, struct sb_error *err)
{
    double v;
    int rc = sb_ynode_quantity(doc, node, what, SB_DIM_LENGTH, &v, err);

    if (rc != SB_OK)
        return rc;
    if (!(v > 0.0 && v <= max_m))
        return sb_ydoc_error(doc, node, err,
                             "%s: %g m is out of range (expected more than 0 "
                             "and at most %g m)",
                             what, v, max_m);
    *out = v;
    return SB_OK;
}

/* A point written as a two-item list [E, N] of lengths. */
static int point(const struct sb_ydoc *doc, const struct sb_ynode *node,
                 const char *what, double *e, double *n, struct sb_error *err)
{
    char path[128];
    int rc;

    if (!node || node->kind != SB_YSEQ || node->n != 2)
        return sb_ydoc_error(doc, node, err,
                             "%s: found %s (expected a point [E, N], e.g. "
                             "[1200 m, 350 m])",
                             what, node && node->kind == SB_YSEQ
                                       ? "a list of the wrong length"
                                       : sb_ynode_kind_name(node));
    snprintf(path, sizeof path, "%s (east)", what);
    if ((rc = sb_ynode_quantity(doc, node->items[0], path, SB_DIM_LENGTH, e,
                                err)) != SB_OK)
        return rc;
    snprintf(path, sizeof path, "%s (north)", what);
    if ((rc = sb_ynode_quantity(doc, node->items[1], path, SB_DIM_LENGTH, n,
                                err)) != SB_OK)
        return rc;
    if (fabs(*e) > COORD_MAX_M || fabs(*n) > COORD_MAX_M)
        return sb_ydoc_error(doc, node, err,
                             "%s: coordinate out of range (expected at most "
                             "%g m from the origin)",
                             what, COORD_MAX_M);
    return SB_OK;
}

/* A duration "VALUE s|min|h" (units.c knows s, ms and us only; minutes and
 * hours are the natural units of turns and working days). */
static int duration(const struct sb_ydoc *doc, const struct sb_ynode *node,
                    const char *what, double lo, double hi, double *out,
                    struct sb_error *err)
{
    const char *s, *u;
    size_t len;
    double v, f;

    if (!node || node->kind != SB_YSCALAR || !node->text[0])
        return sb_ydoc_error(doc, node, err,
                             "%s: found %s (expected a time: VALUE s, min or "
                             "h)",
                             what, sb_ynode_kind_name(node));
    s = node->text;
    len = strcspn(s, " ");
    u = s + len;
    while (*u == ' ')
        u++;
    if (sb_decimal_parse(s, len, '.', &v) != SB_DECIMAL_OK)
        return sb_ydoc_error(doc, node, err,
                             "%s: '%s' does not start with a number (expected "
                             "VALUE s, min or h, e.g. '5 min')",
                             what, s);
    if (strcmp(u, "s") == 0)
        f = 1.0;
    else if (strcmp(u, "min") == 0)
        f = 60.0;
    else if (strcmp(u, "h") == 0)
        f = 3600.0;
    else
        return sb_ydoc_error(doc, node, err,
                             "%s: unit '%s' is not a time unit here (expected "
                             "s, min or h)",
                             what, u);
    v *= f;
    if (!(v >= lo && v <= hi))
        return sb_ydoc_error(doc, node, err,
                             "%s: %g s is out of range (expected %g to %g s)",
                             what, v, lo, hi);
    *out = v;
    return SB_OK;
}

/* ---- outline ------------------------------------------------------------- */

static double cross(double ax, double ay, double bx, double by)
{
    return ax * by - ay * bx;
}

/* Do the closed segments p1p2 and p3p4 share a point? */
static int segments_meet(double x1, double y1, double x2, double y2, double x3,
                         double y3, double x4, double y4)
{
    double d1 = cross(x4 - x3, y4 - y3, x1 - x3, y1 - y3);
    double d2 = cross(x4 - x3, y4 - y3, x2 - x3, y2 - y3);
    double d3 = cross(x2 - x1, y2 - y1, x3 - x1, y3 - y1);
    double d4 = cross(x2 - x1, y2 - y1, x4 - x1, y4 - y1);

    if (((d1 > 0 && d2 < 0) || (d1 < 0 && d2 > 0)) &&
        ((d3 > 0 && d4 < 0) || (d3 < 0 && d4 > 0)))
        return 1;
    /* collinear touching */
    if (d1 == 0 && fmin(x3, x4) <= x1 && x1 <= fmax(x3, x4) &&
        fmin(y3, y4) <= y1 && y1 <= fmax(y3, y4))
        return 1;
    if (d2 == 0 && fmin(x3, x4) <= x2 && x2 <= fmax(x3, x4) &&
        fmin(y3, y4) <= y2 && y2 <= fmax(y3, y4))
        return 1;
    if (d3 == 0 && fmin(x1, x2) <= x3 && x3 <= fmax(x1, x2) &&
        fmin(y1, y2) <= y3 && y3 <= fmax(y1, y2))
        return 1;
    if (d4 == 0 && fmin(x1, x2) <= x4 && x4 <= fmax(x1, x2) &&
        fmin(y1, y2) <= y4 && y4 <= fmax(y1, y2))
        return 1;
    return 0;
}

static int load_polygon(const struct sb_ydoc *doc, const struct sb_ynode *seq,
                        struct sb_area *a, struct sb_error *err)
{
    int rc, n;

    if ((rc = sb_ynode_expect_seq(doc, seq, "outline.polygon", err)) != SB_OK)
        return rc;
    if (seq->n > SB_AREA_VERTICES_MAX + 1)
        return sb_ydoc_error(doc, seq, err,
                             "outline.polygon: %zu corners (expected at most "
                             "%d)",
                             seq->n, SB_AREA_VERTICES_MAX);
    n = 0;
    for (size_t k = 0; k < seq->n; k++) {
        char what[64];

        snprintf(what, sizeof what, "outline.polygon[%zu]", k + 1);
        if ((rc = point(doc, seq->items[k], what, &a->vertex_e[n],
                        &a->vertex_n[n], err)) != SB_OK)
            return rc;
        /* the same corner twice in a row adds nothing; a closing corner
         * equal to the first is allowed too */
        if (n > 0 && a->vertex_e[n] == a->vertex_e[n - 1] &&
            a->vertex_n[n] == a->vertex_n[n - 1])
            return sb_ydoc_error(doc, seq->items[k], err,
                                 "%s: the same corner as the one before "
                                 "(expected distinct corners)",
                                 what);
        n++;
    }
    if (n > 1 && a->vertex_e[n - 1] == a->vertex_e[0] &&
        a->vertex_n[n - 1] == a->vertex_n[0])
        n--;
    if (n > SB_AREA_VERTICES_MAX)
        return sb_ydoc_error(doc, seq, err,
                             "outline.polygon: %d corners (expected at most "
                             "%d)",
                             n, SB_AREA_VERTICES_MAX);
    if (n < 3)
        return sb_ydoc_error(doc, seq, err,
                             "outline.polygon: %d distinct corners (expected "
                             "at least 3)",
                             n);
    a->n_vertices = n;
    /* edges k -> k+1; adjacent edges share a corner and are not tested */
    for (int i = 0; i < n; i++)
        for (int j = i + 2; j < n; j++) {
            int i2 = (i + 1) % n, j2 = (j + 1) % n;

            if (j2 == i)
                continue;
            if (segments_meet(a->vertex_e[i], a->vertex_n[i], a->vertex_e[i2],
                              a->vertex_n[i2], a->vertex_e[j], a->vertex_n[j],
                              a->vertex_e[j2], a->vertex_n[j2]))
                return sb_ydoc_error(
                    doc, seq->items[j], err,
                    "outline.polygon: edge %d-%d crosses or touches edge "
                    "%d-%d (expected a simple polygon whose edges meet only "
                    "at shared corners)",
                    i + 1, i2 + 1, j + 1, j2 + 1);
        }
    if (sb_area_size(a) <= 0.0)
        return sb_ydoc_error(doc, seq, err,
                             "outline.polygon: zero area (expected corners "
                             "that enclose an area)");
    a->shape = SB_AREA_POLYGON;
    return SB_OK;
}

static int load_rectangle(const struct sb_ydoc *doc,
                          const struct sb_ynode *map, struct sb_area *a,
                          struct sb_error *err)
{
    static const char *const keys[] = {"centre", "length", "width", "azimuth",
                                       NULL};
    const struct sb_ynode *v;
    double ce = 0.0, cn = 0.0, len, wid, az, ue, un, we, wn;
    int rc;

    if ((rc = sb_ymap_check_keys(doc, map, "outline.rectangle", keys, err)))
        return rc;
    if ((v = sb_ymap_get(map, "centre")) &&
        (rc = point(doc, v, "outline.rectangle.centre", &ce, &cn, err)))
        return rc;
    if ((rc = sb_ymap_require(doc, map, "length", "outline.rectangle", &v,
                              err)) ||
        (rc = positive_length(doc, v, "outline.rectangle.length", COORD_MAX_M,
                              &len, err)))
        return rc;
    if ((rc = sb_ymap_require(doc, map, "width", "outline.rectangle", &v,
                              err)) ||
        (rc = positive_length(doc, v, "outline.rectangle.width", COORD_MAX_M,
                              &wid, err)))
        return rc;
    if ((rc = sb_ymap_require(doc, map, "azimuth", "outline.rectangle", &v,
                              err)) ||
        (rc = sb_ynode_quantity(doc, v, "outline.rectangle.azimuth",
                                SB_DIM_ANGLE, &az, err)))
        return rc;
    if (!(az >= 0.0 && az < 2 * PI))
        return sb_ydoc_error(doc, v, err,
                             "outline.rectangle.azimuth: %g deg is out of "
                             "range (expected 0 to less than 360 deg)",
                             az * 180.0 / PI);
    /* u along the length (azimuth clockwise from north), w to its right */
    ue = sin(az);
    un = cos(az);
    we = un;
    wn = -ue;
    for (int k = 0; k < 4; k++) {
        double sl = (k == 0 || k == 3) ? -0.5 : 0.5;
        double sw = (k < 2) ? -0.5 : 0.5;

        a->vertex_e[k] = ce + sl * len * ue + sw * wid * we;
        a->vertex_n[k] = cn + sl * len * un + sw * wid * wn;
    }
    a->n_vertices = 4;
    a->shape = SB_AREA_RECTANGLE;
    return SB_OK;
}

static int load_outline(const struct sb_ydoc *doc, const struct sb_ynode *node,
                        struct sb_area *a, struct sb_error *err)
{
    static const char *const keys[] = {"polygon", "rectangle", NULL};
    const struct sb_ynode *p, *r;
    int rc;

    if ((rc = sb_ymap_check_keys(doc, node, "outline", keys, err)) != SB_OK)
        return rc;
    p = sb_ymap_get(node, "polygon");
    r = sb_ymap_get(node, "rectangle");
    if ((p && r) || (!p && !r))
        return sb_ydoc_error(doc, node, err,
                             "outline: %s (expected exactly one of polygon "
                             "or rectangle)",
                             p ? "both polygon and rectangle given"
                               : "no shape given");
    return p ? load_polygon(doc, p, a, err) : load_rectangle(doc, r, a, err);
}

/* ---- depth --------------------------------------------------------------- */

static int load_slope(const struct sb_ydoc *doc, const struct sb_ynode *map,
                      struct sb_area *a, struct sb_error *err)
{
    static const char *const keys[] = {"from", "to", NULL};
    static const char *const pkeys[] = {"at", "depth", NULL};
    static const char *const names[] = {"from", "to"};
    int rc;

    if ((rc = sb_ymap_check_keys(doc, map, "depth.slope", keys, err)))
        return rc;
    for (int k = 0; k < 2; k++) {
        const struct sb_ynode *pm, *v;
        char what[64];

        snprintf(what, sizeof what, "depth.slope.%s", names[k]);
        if ((rc = sb_ymap_require(doc, map, names[k], "depth.slope", &pm,
                                  err)) ||
            (rc = sb_ymap_check_keys(doc, pm, what, pkeys, err)))
            return rc;
        if ((rc = sb_ymap_require(doc, pm, "at", what, &v, err)))
            return rc;
        snprintf(what, sizeof what, "depth.slope.%s.at", names[k]);
        if ((rc = point(doc, v, what, &a->slope_e[k], &a->slope_n[k], err)))
            return rc;
        snprintf(what, sizeof what, "depth.slope.%s", names[k]);
        if ((rc = sb_ymap_require(doc, pm, "depth", what, &v, err)))
            return rc;
        snprintf(what, sizeof what, "depth.slope.%s.depth", names[k]);
        if ((rc = positive_length(doc, v, what, DEPTH_MAX_M,
                                  &a->slope_depth[k], err)))
            return rc;
    }
    if (a->slope_e[0] == a->slope_e[1] && a->slope_n[0] == a->slope_n[1])
        return sb_ydoc_error(doc, map, err,
                             "depth.slope: from and to are the same point "
                             "(expected two distinct points)");
    a->depth_kind = SB_AREA_DEPTH_SLOPE;
    /* linear: extremes at corners, so checking corners checks everywhere */
    for (int k = 0; k < a->n_vertices; k++) {
        double d = slope_depth(a, a->vertex_e[k], a->vertex_n[k]);

        if (!(d > 0.0 && d <= DEPTH_MAX_M))
            return sb_ydoc_error(doc, map, err,
                                 "depth.slope: the depth at corner %d "
                                 "(%g m, %g m) would be %g m (expected a "
                                 "slope that keeps the depth over the whole "
                                 "outline in (0, %g] m)",
                                 k + 1, a->vertex_e[k], a->vertex_n[k], d,
                                 DEPTH_MAX_M);
    }
    return SB_OK;
}

static int load_grid(const struct sb_ydoc *doc, const struct sb_ynode *map,
                     struct sb_area *a, struct sb_error *err)
{
    static const char *const keys[] = {"north_west", "spacing", "unit", "rows",
                                       NULL};
    const struct sb_ynode *v, *rows;
    const char *unit;
    unsigned dim;
    double f, e1, s1;
    int rc;

    if ((rc = sb_ymap_check_keys(doc, map, "depth.grid", keys, err)))
        return rc;
    if ((rc = sb_ymap_require(doc, map, "north_west", "depth.grid", &v, err)) ||
        (rc = point(doc, v, "depth.grid.north_west", &a->grid_west_e,
                    &a->grid_north_n, err)))
        return rc;
    if ((rc = sb_ymap_require(doc, map, "spacing", "depth.grid", &v, err)) ||
        (rc = positive_length(doc, v, "depth.grid.spacing", COORD_MAX_M,
                              &a->grid_step, err)))
        return rc;
    if ((rc = sb_ymap_require(doc, map, "unit", "depth.grid", &v, err)) ||
        (rc = sb_ynode_string(doc, v, "depth.grid.unit", &unit, err)))
        return rc;
    if (sb_unit_lookup(unit, &dim, &f) != SB_OK || dim != SB_DIM_LENGTH)
        return sb_ydoc_error(doc, v, err,
                             "depth.grid.unit: '%s' is not a length unit "
                             "(expected m, cm or mm)",
                             unit);
    if ((rc = sb_ymap_require(doc, map, "rows", "depth.grid", &rows, err)) ||
        (rc = sb_ynode_expect_seq(doc, rows, "depth.grid.rows", err)))
        return rc;
    if (rows->n < 2)
        return sb_ydoc_error(doc, rows, err,
                             "depth.grid.rows: %zu row(s) (expected at least "
                             "2)",
                             rows->n);
    a->grid_rows = (int)rows->n;
    a->grid_cols = 0;
    for (size_t j = 0; j < rows->n; j++) {
        const struct sb_ynode *row = rows->items[j];
        char what[64];

        snprintf(what, sizeof what, "depth.grid.rows[%zu]", j + 1);
        if ((rc = sb_ynode_expect_seq(doc, row, what, err)))
            return rc;
        if (j == 0) {
            if (row->n < 2 || row->n * rows->n > SB_AREA_GRID_MAX)
                return sb_ydoc_error(doc, row, err,
                                     "%s: %zu values (expected at least 2, "
                                     "and at most %d nodes in all)",
                                     what, row->n, SB_AREA_GRID_MAX);
            a->grid_cols = (int)row->n;
        } else if ((int)row->n != a->grid_cols) {
            return sb_ydoc_error(doc, row, err,
                                 "%s: %zu values (expected %d, as in the "
                                 "first row)",
                                 what, row->n, a->grid_cols);
        }
        for (size_t i = 0; i < row->n; i++) {
            double d;

            snprintf(what, sizeof what, "depth.grid.rows[%zu][%zu]", j + 1,
                     i + 1);
            if ((rc = sb_ynode_double(doc, row->items[i], what, &d, err)))
                return rc;
            d *= f;
            if (!(d > 0.0 && d <= DEPTH_MAX_M))
                return sb_ydoc_error(doc, row->items[i], err,
                                     "%s: depth %g m is out of range "
                                     "(expected more than 0 and at most %g "
                                     "m)",
                                     what, d, DEPTH_MAX_M);
            a->grid[j * (size_t)a->grid_cols + i] = d;
        }
    }
    e1 = a->grid_west_e + (a->grid_cols - 1) * a->grid_step;
    s1 = a->grid_north_n - (a->grid_rows - 1) * a->grid_step;
    for (int k = 0; k < a->n_vertices; k++)
        if (a->vertex_e[k] < a->grid_west_e - 1e-9 ||
            a->vertex_e[k] > e1 + 1e-9 || a->vertex_n[k] > a->grid_north_n + 1e-9 ||
            a->vertex_n[k] < s1 - 1e-9)
            return sb_ydoc_error(doc, map, err,
                                 "depth.grid: outline corner %d (%g m, %g m) "
                                 "lies outside the grid (expected a grid "
                                 "covering E %g..%g m, N %g..%g m to contain "
                                 "the whole outline)",
                                 k + 1, a->vertex_e[k], a->vertex_n[k],
                                 a->grid_west_e, e1, s1, a->grid_north_n);
    a->depth_kind = SB_AREA_DEPTH_GRID;
    return SB_OK;
}

static int load_depth(const struct sb_ydoc *doc, const struct sb_ynode *node,
                      struct sb_area *a, struct sb_error *err)
{
    static const char *const keys[] = {"slope", "grid", NULL};
    const struct sb_ynode *s, *g;
    int rc;

    if (node->kind == SB_YSCALAR) {
        if ((rc = positive_length(doc, node, "depth", DEPTH_MAX_M, &a->depth_m,
                                  err)))
            return rc;
        a->depth_kind = SB_AREA_DEPTH_CONSTANT;
        return SB_OK;
    }
    if (node->kind != SB_YMAP)
        return sb_ydoc_error(doc, node, err,
                             "depth: found %s (expected a depth such as "
                             "'25 m', or a mapping with slope or grid)",
                             sb_ynode_kind_name(node));
    if ((rc = sb_ymap_check_keys(doc, node, "depth", keys, err)))
        return rc;
    s = sb_ymap_get(node, "slope");
    g = sb_ymap_get(node, "grid");
    if ((s && g) || (!s && !g))
        return sb_ydoc_error(doc, node, err,
                             "depth: %s (expected a single depth, or exactly "
                             "one of slope or grid)",
                             s ? "both slope and grid given"
                               : "no depth model given");
    return s ? load_slope(doc, s, a, err) : load_grid(doc, g, a, err);
}

/* ---- survey -------------------------------------------------------------- */

static int load_survey(const struct sb_ydoc *doc, const struct sb_ynode *map,
                       struct sb_area *a, struct sb_error *err)
{
    static const char *const keys[] = {"overlap", "speed", "min_speed",
                                       "turn_time", "working_day",
                                       "line_azimuth", NULL};
    const struct sb_ynode *v;
    int rc;

    if ((rc = sb_ymap_check_keys(doc, map, "survey", keys, err)))
        return rc;
    if ((rc = sb_ymap_require(doc, map, "overlap", "survey", &v, err)) ||
        (rc = sb_ynode_quantity(doc, v, "survey.overlap", SB_DIM_RATIO,
                                &a->overlap, err)))
        return rc;
    if (!(a->overlap >= 0.0 && a->overlap <= SB_AREA_OVERLAP_MAX))
        return sb_ydoc_error(doc, v, err,
                             "survey.overlap: %g %% is out of range (expected "
                             "0 to %g %%)",
                             a->overlap * 100.0, SB_AREA_OVERLAP_MAX * 100.0);
    if ((rc = sb_ymap_require(doc, map, "speed", "survey", &v, err)) ||
        (rc = sb_ynode_quantity(doc, v, "survey.speed", SB_DIM_SPEED,
                                &a->speed_mps, err)))
        return rc;
    /* 0.1 m/s to 15 m/s (about 0.2 to 29 kn): a survey line at another
     * speed is a typing error */
    if (!(a->speed_mps >= 0.1 && a->speed_mps <= 15.0))
        return sb_ydoc_error(doc, v, err,
                             "survey.speed: %g m/s is out of range (expected "
                             "0.1 to 15 m/s, about 0.2 to 29 kn)",
                             a->speed_mps);
    a->min_speed_mps = a->speed_mps;
    a->min_speed_given = 0;
    if ((v = sb_ymap_get(map, "min_speed"))) {
        if ((rc = sb_ynode_quantity(doc, v, "survey.min_speed", SB_DIM_SPEED,
                                    &a->min_speed_mps, err)))
            return rc;
        if (!(a->min_speed_mps >= 0.1 && a->min_speed_mps <= a->speed_mps))
            return sb_ydoc_error(doc, v, err,
                                 "survey.min_speed: %g m/s is out of range "
                                 "(expected 0.1 m/s up to survey.speed, %g "
                                 "m/s)",
                                 a->min_speed_mps, a->speed_mps);
        a->min_speed_given = 1;
    }
    if ((rc = sb_ymap_require(doc, map, "turn_time", "survey", &v, err)) ||
        (rc = duration(doc, v, "survey.turn_time", 0.0, 86400.0, &a->turn_s,
                       err)))
        return rc;
    if ((rc = sb_ymap_require(doc, map, "working_day", "survey", &v, err)) ||
        (rc = duration(doc, v, "survey.working_day", 60.0, 86400.0, &a->day_s,
                       err)))
        return rc;
    a->azimuth_given = 0;
    if ((v = sb_ymap_get(map, "line_azimuth"))) {
        double az;

        if ((rc = sb_ynode_quantity(doc, v, "survey.line_azimuth",
                                    SB_DIM_ANGLE, &az, err)))
            return rc;
        if (!(az >= 0.0 && az < 2 * PI))
            return sb_ydoc_error(doc, v, err,
                                 "survey.line_azimuth: %g deg is out of range "
                                 "(expected 0 to less than 360 deg)",
                                 az * 180.0 / PI);
        /* a line and its reverse are the same line */
        a->line_azimuth_rad = az >= PI ? az - PI : az;
        a->azimuth_given = 1;
    }
    return SB_OK;
}

static int copy_text(const struct sb_ydoc *doc, const struct sb_ynode *node,
                     const char *what, char *dst, size_t n,
                     struct sb_error *err)
{
    const char *s;
    int rc = sb_ynode_string(doc, node, what, &s, err);

    if (rc != SB_OK)
        return rc;
    if (strlen(s) >= n)
        return sb_ydoc_error(doc, node, err,
                             "%s: text too long (expected at most %zu "
                             "characters)",
                             what, n - 1);
    memcpy(dst, s, strlen(s) + 1);
    return SB_OK;
}

static int load_doc(const struct sb_ydoc *doc, struct sb_area *a,
                    struct sb_error *err)
{
    static const char *const keys[] = {"name", "title", "order", "outline",
                                       "depth", "survey", NULL};
    const struct sb_ynode *root = sb_ydoc_root(doc), *v;
    int rc;

    if ((rc = sb_ymap_check_keys(doc, root, "", keys, err)))
        return rc;
    if ((rc = sb_ymap_require(doc, root, "name", "", &v, err)) ||
        (rc = copy_text(doc, v, "name", a->name, sizeof a->name, err)))
        return rc;
    if ((v = sb_ymap_get(root, "title")) &&
        (rc = copy_text(doc, v, "title", a->title, sizeof a->title, err)))
        return rc;
    if ((rc = sb_ymap_require(doc, root, "order", "", &v, err)) ||
        (rc = copy_text(doc, v, "order", a->order, sizeof a->order, err)))
        return rc;
    a->order_line = v->line;
    a->order_col = v->col;
    if ((rc = sb_ymap_require(doc, root, "outline", "", &v, err)) ||
        (rc = load_outline(doc, v, a, err)))
        return rc;
    if ((rc = sb_ymap_require(doc, root, "depth", "", &v, err)) ||
        (rc = load_depth(doc, v, a, err)))
        return rc;
    if ((rc = sb_ymap_require(doc, root, "survey", "", &v, err)) ||
        (rc = load_survey(doc, v, a, err)))
        return rc;
    return SB_OK;
}

static int finish(struct sb_ydoc *doc, int rc, struct sb_area *out,
                  struct sb_error *err)
{
    struct sb_area *tmp;

    if (rc != SB_OK)
        return rc;
    tmp = sb_area_alloc();
    if (!tmp) {
        sb_ydoc_free(doc);
        return sb_error_set(err, SB_ENOMEM, "", 0, 0, "out of memory");
    }
    rc = load_doc(doc, tmp, err);
    if (rc == SB_OK) {
        snprintf(tmp->source, sizeof tmp->source, "%s", sb_ydoc_name(doc));
        *out = *tmp;
    }
    sb_area_free(tmp);
    sb_ydoc_free(doc);
    return rc;
}

int sb_area_load(const char *path, struct sb_area *out, struct sb_error *err)
{
    struct sb_ydoc *doc = NULL;
    int rc = sb_ydoc_load_file(path, &doc, err);

    return finish(doc, rc, out, err);
}

int sb_area_load_string(const char *name, const char *text, size_t len,
                        struct sb_area *out, struct sb_error *err)
{
    struct sb_ydoc *doc = NULL;
    int rc = sb_ydoc_load_string(name, text, len, &doc, err);

    return finish(doc, rc, out, err);
}
