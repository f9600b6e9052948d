/*
 * swathbudget — a small SVG plot writer of our own (no plotting library):
 * x-y line plots with reference rules, and stacked bar charts.
 *
 * Made to print: every series has a line style (solid, dashed, dotted,
 * dash-dot) and a marker shape as well as a colour, and bar segments a
 * hatch pattern, so a black-and-white copy still tells them apart.  The
 * output refers to nothing outside itself: no fonts, no images, no scripts;
 * the only url() references are to patterns and clip paths defined in the
 * same picture (url(#...)).
 *
 * A plot is described first (series, rules, ranges) and written in one go;
 * the writer only formats what it is given.  Non-finite values are refused
 * (SB_EINTERNAL when written), as everywhere in swathbudget's writers.
 */
#ifndef SWATHBUDGET_SVG_H
#define SWATHBUDGET_SVG_H

#include <stddef.h>
#include <stdio.h>

#include "swathbudget/error.h"

#ifdef __cplusplus
extern "C" {
#endif

#define SB_SVG_LABEL_MAX 128
/* Number of distinct series styles (colour + dash + marker); style numbers
 * wrap around. */
#define SB_SVG_STYLES 6
/* Number of distinct bar fills (colour + hatch). */
#define SB_SVG_FILLS 8

enum sb_svg_rule_kind {
    SB_SVG_RULE_LIMIT = 0, /* a heavy dashed line: an order's limit */
    SB_SVG_RULE_MARK = 1   /* a thin dotted line with its label: an angle */
};

struct sb_plot;

/* A new empty plot; texts are copied (truncated to SB_SVG_LABEL_MAX - 1).
 * NULL if out of memory. */
struct sb_plot *sb_plot_alloc(const char *title, const char *xlabel,
                              const char *ylabel);
void sb_plot_free(struct sb_plot *p);

/*
 * Add a series of n >= 1 points (x[i], y[i]) (copied): drawn as a line with
 * markers (points_only = 0) or as markers alone (points_only = 1).  style:
 * 0, 1, ... picks colour, dash and marker; an empty label keeps the
 * series out of the legend (e.g. the second half of a pair).  Returns SB_OK, SB_ENOMEM, or
 * SB_EINTERNAL for a non-finite value or n == 0 (a bug of the caller).
 */
int sb_plot_series(struct sb_plot *p, const char *label, const double *x,
                   const double *y, size_t n, int style, int points_only);

/* A horizontal (vertical = 0; at = y) or vertical (vertical = 1; at = x)
 * rule across the whole plot, with a label (in the legend for LIMIT rules,
 * beside the rule for MARK rules).  Returns SB_OK, SB_ENOMEM or
 * SB_EINTERNAL (non-finite at). */
int sb_plot_rule(struct sb_plot *p, int vertical, double at,
                 enum sb_svg_rule_kind kind, const char *label);

/* Fix an axis range (else it is taken from the data, rules included, and
 * widened to round tick values).  lo < hi, finite. */
void sb_plot_xrange(struct sb_plot *p, double lo, double hi);
void sb_plot_yrange(struct sb_plot *p, double lo, double hi);
/* Draw y growing downward (depth axes). */
void sb_plot_y_down(struct sb_plot *p, int down);

/*
 * Write the plot as one <svg> element of width x height pixels to f.
 * standalone = 1 writes a complete SVG file (XML declaration and the SVG
 * namespace, which is a name, not a reference); 0 writes an element for
 * inline use in an HTML page (no declaration, no namespace).  id_prefix
 * (letters, digits, '-'; may be "") keeps the ids of clip paths unique
 * when several plots share a page.  Returns SB_OK, SB_EINTERNAL (an empty
 * plot, an impossible range) or SB_EIO (write error), err filled.
 */
int sb_plot_write(const struct sb_plot *p, FILE *f, int width, int height,
                  int standalone, const char *id_prefix,
                  struct sb_error *err);

struct sb_bars;

/*
 * A stacked bar chart: categories along x (e.g. beam angles), each bar the
 * sum of n_parts stacked values (e.g. each component group's share of
 * TVU95).  part_labels (n_parts >= 1 of them) name the stacked parts in the
 * legend; NULL if out of memory.
 */
struct sb_bars *sb_bars_alloc(const char *title, const char *xlabel,
                              const char *ylabel, const char *const *part_labels,
                              size_t n_parts);
void sb_bars_free(struct sb_bars *b);

/* Add a bar: its category label and n_parts values (>= 0, finite; copied).
 * SB_OK, SB_ENOMEM or SB_EINTERNAL (negative or non-finite value). */
int sb_bars_add(struct sb_bars *b, const char *category, const double *values);

/* Write as sb_plot_write. */
int sb_bars_write(const struct sb_bars *b, FILE *f, int width, int height,
                  int standalone, const char *id_prefix, struct sb_error *err);

/* Write s with the five XML special characters escaped (&, <, >, ", ').
 * Bytes below 0x20 other than tab and newline (not allowed in XML 1.0) are
 * written as '?'. */
void sb_xml_text(FILE *f, const char *s);

/*
 * Round tick step for an axis from lo to hi with about `target` ticks:
 * 1, 2 or 5 times a power of ten (the usual "nice numbers" rule, e.g.
 * Heckbert 1990, "Nice numbers for graph labels", Graphics Gems).
 * Returns a step > 0, or 0 if hi <= lo or either is not finite.
 */
double sb_svg_tick_step(double lo, double hi, int target);

#ifdef __cplusplus
}
#endif

#endif
