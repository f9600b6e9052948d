/*
 * A small SVG plot writer: line plots with rules, stacked bars (contract in
 * include/swathbudget/svg.h).  Hand-rolled because the pictures are simple
 * and the project takes no plotting dependency; the look is our own: plain
 * axes on white, a light grid, the legend under the plot.
 */
#include "swathbudget/svg.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define FONT "sans-serif"
#define FS_TITLE 15
#define FS_LABEL 12
#define FS_TICK 11
#define FS_LEGEND 11
/* Rough width of a character in units of the font size, to lay the legend
 * out without measuring text (no fonts are known in advance). */
#define CHAR_W 0.56
#define LEGEND_ROW 17
#define MARKERS_PER_LINE 10

struct series {
    char label[SB_SVG_LABEL_MAX];
    size_t n;
    double *x, *y;
    int style, points_only;
};

struct rule {
    int vertical;
    double at;
    enum sb_svg_rule_kind kind;
    char label[SB_SVG_LABEL_MAX];
};

struct sb_plot {
    char title[SB_SVG_LABEL_MAX], xlabel[SB_SVG_LABEL_MAX],
        ylabel[SB_SVG_LABEL_MAX];
    struct series *s;
    size_t ns, cap_s;
    struct rule *r;
    size_t nr, cap_r;
    int fixed_x, fixed_y, y_down;
    double xlo, xhi, ylo, yhi;
    int bad; /* a refused value was offered: writing reports it */
};

/* colour, dash pattern ("" solid), marker: chosen to differ in grey too */
static const struct {
    const char *colour, *dash;
    int marker; /* 0 circle, 1 square, 2 triangle, 3 diamond, 4 cross, 5 plus */
} STYLE[SB_SVG_STYLES] = {
    {"#000000", "", 0},          {"#1f4e8c", "8 4", 1},
    {"#a23b1e", "2 3", 2},       {"#2e6b30", "10 3 2 3", 3},
    {"#6a3d8f", "5 2", 4},       {"#7a5c00", "1 2", 5},
};

static void copy_label(char *dst, const char *src)
{
    snprintf(dst, SB_SVG_LABEL_MAX, "%s", src ? src : "");
}

struct sb_plot *sb_plot_alloc(const char *title, const char *xlabel,
                              const char *ylabel)
{
    struct sb_plot *p = calloc(1, sizeof *p);

    if (!p)
        return NULL;
    copy_label(p->title, title);
    copy_label(p->xlabel, xlabel);
    copy_label(p->ylabel, ylabel);
    return p;
}

void sb_plot_free(struct sb_plot *p)
{
    if (!p)
        return;
    for (size_t i = 0; i < p->ns; i++) {
        free(p->s[i].x);
        free(p->s[i].y);
    }
    free(p->s);
    free(p->r);
    free(p);
}

int sb_plot_series(struct sb_plot *p, const char *label, const double *x,
                   const double *y, size_t n, int style, int points_only)
{
    struct series *s;

    if (n == 0) {
        p->bad = 1;
        return SB_EINTERNAL;
    }
    for (size_t i = 0; i < n; i++)
        if (!isfinite(x[i]) || !isfinite(y[i])) {
            p->bad = 1;
            return SB_EINTERNAL;
        }
    if (p->ns == p->cap_s) {
        size_t cap = p->cap_s ? 2 * p->cap_s : 8;
        struct series *ns = realloc(p->s, cap * sizeof *ns);

        if (!ns)
            return SB_ENOMEM;
        p->s = ns;
        p->cap_s = cap;
    }
    s = &p->s[p->ns];
    memset(s, 0, sizeof *s);
    s->x = malloc(n * sizeof(double));
    s->y = malloc(n * sizeof(double));
    if (!s->x || !s->y) {
        free(s->x);
        free(s->y);
        return SB_ENOMEM;
    }
    memcpy(s->x, x, n * sizeof(double));
    memcpy(s->y, y, n * sizeof(double));
    s->n = n;
    s->style = style < 0 ? 0 : style % SB_SVG_STYLES;
    s->points_only = points_only;
    copy_label(s->label, label);
    p->ns++;
    return SB_OK;
}

int sb_plot_rule(struct sb_plot *p, int vertical, double at,
                 enum sb_svg_rule_kind kind, const char *label)
{
    if (!isfinite(at)) {
        p->bad = 1;
        return SB_EINTERNAL;
    }
    if (p->nr == p->cap_r) {
        size_t cap = p->cap_r ? 2 * p->cap_r : 8;
        struct rule *nr = realloc(p->r, cap * sizeof *nr);

        if (!nr)
            return SB_ENOMEM;
        p->r = nr;
        p->cap_r = cap;
    }
    p->r[p->nr].vertical = vertical;
    p->r[p->nr].at = at;
    p->r[p->nr].kind = kind;
    copy_label(p->r[p->nr].label, label);
    p->nr++;
    return SB_OK;
}

void sb_plot_xrange(struct sb_plot *p, double lo, double hi)
{
    p->fixed_x = 1;
    p->xlo = lo;
    p->xhi = hi;
}

void sb_plot_yrange(struct sb_plot *p, double lo, double hi)
{
    p->fixed_y = 1;
    p->ylo = lo;
    p->yhi = hi;
}

void sb_plot_y_down(struct sb_plot *p, int down)
{
    p->y_down = down;
}

/* ---- shared pieces ------------------------------------------------------- */

void sb_xml_text(FILE *f, const char *s)
{
    for (; s && *s; s++) {
        unsigned char c = (unsigned char)*s;

        switch (c) {
        case '&': fputs("&amp;", f); break;
        case '<': fputs("&lt;", f); break;
        case '>': fputs("&gt;", f); break;
        case '"': fputs("&quot;", f); break;
        case '\'': fputs("&#39;", f); break;
        default:
            if (c < 0x20 && c != '\t' && c != '\n')
                fputc('?', f);
            else
                fputc(c, f);
        }
    }
}

double sb_svg_tick_step(double lo, double hi, int target)
{
    double raw, mag, fr;

    if (!isfinite(lo) || !isfinite(hi) || hi <= lo || target < 1)
        return 0.0;
    raw = (hi - lo) / target;
    mag = pow(10.0, floor(log10(raw)));
    fr = raw / mag;
    if (fr < 1.5)
        return mag;
    if (fr < 3.5)
        return 2.0 * mag;
    if (fr < 7.5)
        return 5.0 * mag;
    return 10.0 * mag;
}

/* Decimals that show a tick step exactly (0.25 -> 2, 5 -> 0). */
static int step_decimals(double step)
{
    int d = 0;

    while (d < 8 && fabs(step * pow(10.0, d) - round(step * pow(10.0, d))) >
                        1e-6 * step * pow(10.0, d))
        d++;
    return d;
}

/* Widen [lo, hi] to whole tick steps; a flat range is opened up. */
static void nice_range(double *lo, double *hi, double *step, int fixed)
{
    if (!(*hi > *lo)) {
        double pad = fabs(*lo) > 0 ? 0.1 * fabs(*lo) : 1.0;
        *lo -= pad;
        *hi += pad;
    }
    *step = sb_svg_tick_step(*lo, *hi, 6);
    if (!fixed) {
        *lo = floor(*lo / *step + 1e-9) * *step;
        *hi = ceil(*hi / *step - 1e-9) * *step;
    }
}

static void svg_open(FILE *f, int w, int h, int standalone, const char *title)
{
    if (standalone)
        fprintf(f, "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
                   "<svg xmlns=\"http://www.w3.org/2000/svg\" ");
    else
        fprintf(f, "<svg ");
    fprintf(f,
            "width=\"%d\" height=\"%d\" viewBox=\"0 0 %d %d\" role=\"img\" "
            "font-family=\"%s\" aria-label=\"",
            w, h, w, h, FONT);
    sb_xml_text(f, title);
    fprintf(f, "\">\n<title>");
    sb_xml_text(f, title);
    fprintf(f, "</title>\n<rect x=\"0\" y=\"0\" width=\"%d\" height=\"%d\" "
               "fill=\"#ffffff\"/>\n",
            w, h);
}

static void text_at(FILE *f, double x, double y, int size, const char *anchor,
                    const char *extra, const char *s)
{
    fprintf(f, "<text x=\"%.1f\" y=\"%.1f\" font-size=\"%d\" "
               "text-anchor=\"%s\"%s%s>",
            x, y, size, anchor, extra && *extra ? " " : "",
            extra ? extra : "");
    sb_xml_text(f, s);
    fprintf(f, "</text>\n");
}

static void marker(FILE *f, int kind, double x, double y, double r,
                   const char *colour, int open)
{
    const char *fill = open ? "#ffffff" : colour;

    switch (kind) {
    case 0:
        fprintf(f, "<circle cx=\"%.2f\" cy=\"%.2f\" r=\"%.2f\" fill=\"%s\" "
                   "stroke=\"%s\" stroke-width=\"1.2\"/>\n",
                x, y, r, fill, colour);
        break;
    case 1:
        fprintf(f, "<rect x=\"%.2f\" y=\"%.2f\" width=\"%.2f\" height=\"%.2f\" "
                   "fill=\"%s\" stroke=\"%s\" stroke-width=\"1.2\"/>\n",
                x - r, y - r, 2 * r, 2 * r, fill, colour);
        break;
    case 2:
        fprintf(f, "<path d=\"M%.2f,%.2f L%.2f,%.2f L%.2f,%.2f Z\" fill=\"%s\" "
                   "stroke=\"%s\" stroke-width=\"1.2\"/>\n",
                x, y - 1.2 * r, x + 1.1 * r, y + 0.8 * r, x - 1.1 * r,
                y + 0.8 * r, fill, colour);
        break;
    case 3:
        fprintf(f, "<path d=\"M%.2f,%.2f L%.2f,%.2f L%.2f,%.2f L%.2f,%.2f Z\" "
                   "fill=\"%s\" stroke=\"%s\" stroke-width=\"1.2\"/>\n",
                x, y - 1.3 * r, x + 1.3 * r, y, x, y + 1.3 * r, x - 1.3 * r,
                y, fill, colour);
        break;
    case 4:
        fprintf(f, "<path d=\"M%.2f,%.2f L%.2f,%.2f M%.2f,%.2f L%.2f,%.2f\" "
                   "stroke=\"%s\" stroke-width=\"1.8\"/>\n",
                x - r, y - r, x + r, y + r, x - r, y + r, x + r, y - r,
                colour);
        break;
    default:
        fprintf(f, "<path d=\"M%.2f,%.2f L%.2f,%.2f M%.2f,%.2f L%.2f,%.2f\" "
                   "stroke=\"%s\" stroke-width=\"1.8\"/>\n",
                x - 1.2 * r, y, x + 1.2 * r, y, x, y - 1.2 * r, x, y + 1.2 * r,
                colour);
    }
}

/* A legend entry: its width in pixels (for the layout). */
static double entry_width(const char *label)
{
    return 34.0 + CHAR_W * FS_LEGEND * (double)strlen(label) + 18.0;
}

/* Rows the legend needs in a given width. */
static int legend_rows(const double *widths, size_t n, double avail)
{
    int rows = n ? 1 : 0;
    double x = 0.0;

    for (size_t i = 0; i < n; i++) {
        if (x > 0.0 && x + widths[i] > avail) {
            rows++;
            x = 0.0;
        }
        x += widths[i];
    }
    return rows;
}

static int finish(FILE *f, struct sb_error *err)
{
    if (ferror(f))
        return sb_error_set(err, SB_EIO, "", 0, 0,
                            "could not write the picture (expected a "
                            "writable output)");
    return SB_OK;
}

/* ---- line plots ---------------------------------------------------------- */

struct mapping {
    double x0, x1, y0, y1;       /* plot area, pixels */
    double xlo, xhi, ylo, yhi;   /* data range */
    int y_down;
};

static double map_x(const struct mapping *m, double x)
{
    return m->x0 + (x - m->xlo) / (m->xhi - m->xlo) * (m->x1 - m->x0);
}

static double map_y(const struct mapping *m, double y)
{
    double t = (y - m->ylo) / (m->yhi - m->ylo);

    return m->y_down ? m->y0 + t * (m->y1 - m->y0) : m->y1 - t * (m->y1 - m->y0);
}

static void axes(FILE *f, const struct mapping *m, double xstep, double ystep,
                 const char *xlabel, const char *ylabel)
{
    int dx = step_decimals(xstep), dy = step_decimals(ystep);
    char buf[64];

    /* light grid and ticks */
    /* ticks counted in whole steps: adding steps up would drift */
    for (long k = (long)ceil(m->xlo / xstep - 1e-9);
         k <= (long)floor(m->xhi / xstep + 1e-9); k++) {
        double v = (double)k * xstep;
        double px = map_x(m, v), t = k == 0 ? 0.0 : v;

        fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" "
                   "stroke=\"#d9d9d9\" stroke-width=\"0.8\"/>\n",
                px, m->y0, px, m->y1);
        fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" "
                   "stroke=\"#000000\" stroke-width=\"1\"/>\n",
                px, m->y1, px, m->y1 + 4);
        snprintf(buf, sizeof buf, "%.*f", dx, t);
        text_at(f, px, m->y1 + 16, FS_TICK, "middle", NULL, buf);
    }
    for (long k = (long)ceil(m->ylo / ystep - 1e-9);
         k <= (long)floor(m->yhi / ystep + 1e-9); k++) {
        double v = (double)k * ystep;
        double py = map_y(m, v), t = k == 0 ? 0.0 : v;

        fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" "
                   "stroke=\"#d9d9d9\" stroke-width=\"0.8\"/>\n",
                m->x0, py, m->x1, py);
        fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" "
                   "stroke=\"#000000\" stroke-width=\"1\"/>\n",
                m->x0 - 4, py, m->x0, py);
        snprintf(buf, sizeof buf, "%.*f", dy, t);
        text_at(f, m->x0 - 7, py + 4, FS_TICK, "end", NULL, buf);
    }
    fprintf(f, "<rect x=\"%.2f\" y=\"%.2f\" width=\"%.2f\" height=\"%.2f\" "
               "fill=\"none\" stroke=\"#000000\" stroke-width=\"1.2\"/>\n",
            m->x0, m->y0, m->x1 - m->x0, m->y1 - m->y0);
    text_at(f, 0.5 * (m->x0 + m->x1), m->y1 + 34, FS_LABEL, "middle", NULL,
            xlabel);
    snprintf(buf, sizeof buf, "transform=\"rotate(-90 %.1f %.1f)\"", 16.0,
             0.5 * (m->y0 + m->y1));
    text_at(f, 16.0, 0.5 * (m->y0 + m->y1), FS_LABEL, "middle", buf, ylabel);
}

static void data_range(const struct sb_plot *p, double *xlo, double *xhi,
                       double *ylo, double *yhi)
{
    *xlo = *ylo = INFINITY;
    *xhi = *yhi = -INFINITY;
    for (size_t i = 0; i < p->ns; i++)
        for (size_t k = 0; k < p->s[i].n; k++) {
            *xlo = fmin(*xlo, p->s[i].x[k]);
            *xhi = fmax(*xhi, p->s[i].x[k]);
            *ylo = fmin(*ylo, p->s[i].y[k]);
            *yhi = fmax(*yhi, p->s[i].y[k]);
        }
    for (size_t i = 0; i < p->nr; i++) {
        if (p->r[i].vertical) {
            *xlo = fmin(*xlo, p->r[i].at);
            *xhi = fmax(*xhi, p->r[i].at);
        } else {
            *ylo = fmin(*ylo, p->r[i].at);
            *yhi = fmax(*yhi, p->r[i].at);
        }
    }
}

int sb_plot_write(const struct sb_plot *p, FILE *f, int width, int height,
                  int standalone, const char *id_prefix, struct sb_error *err)
{
    struct mapping m;
    double xstep, ystep, widths[64], lx, ly;
    size_t nleg = 0;
    int rows, nmark = 0;
    const char *pre = id_prefix ? id_prefix : "";

    if (p->bad || (p->ns == 0 && p->nr == 0))
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "plot '%s': no data or a non-finite value (this "
                            "is a bug)",
                            p->title);
    if (width < 200 || height < 150)
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "plot size %d x %d (expected at least 200 x 150; "
                            "this is a bug)",
                            width, height);
    data_range(p, &m.xlo, &m.xhi, &m.ylo, &m.yhi);
    if (p->fixed_x) {
        m.xlo = p->xlo;
        m.xhi = p->xhi;
    }
    if (p->fixed_y) {
        m.ylo = p->ylo;
        m.yhi = p->yhi;
    }
    if (!isfinite(m.xlo) || !isfinite(m.xhi)) {
        m.xlo = 0.0;
        m.xhi = 1.0;
    }
    if (!isfinite(m.ylo) || !isfinite(m.yhi)) {
        m.ylo = 0.0;
        m.yhi = 1.0;
    }
    nice_range(&m.xlo, &m.xhi, &xstep, p->fixed_x);
    nice_range(&m.ylo, &m.yhi, &ystep, p->fixed_y);
    if (xstep <= 0.0 || ystep <= 0.0)
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "plot '%s': impossible axis range (this is a "
                            "bug)",
                            p->title);
    m.y_down = p->y_down;

    /* legend: series, then limit rules */
    for (size_t i = 0; i < p->ns && nleg < 64; i++)
        if (p->s[i].label[0])
            widths[nleg++] = entry_width(p->s[i].label);
    for (size_t i = 0; i < p->nr && nleg < 64; i++)
        if (p->r[i].kind == SB_SVG_RULE_LIMIT && p->r[i].label[0])
            widths[nleg++] = entry_width(p->r[i].label);
    m.x0 = 70.0;
    m.x1 = width - 18.0;
    rows = legend_rows(widths, nleg, m.x1 - m.x0);
    m.y0 = 40.0;
    m.y1 = height - 48.0 - rows * LEGEND_ROW - (rows ? 6 : 0);
    if (m.y1 - m.y0 < 60.0)
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "plot '%s': too small for its legend (this is a "
                            "bug)",
                            p->title);

    svg_open(f, width, height, standalone, p->title);
    fprintf(f, "<defs><clipPath id=\"%sclip\"><rect x=\"%.2f\" y=\"%.2f\" "
               "width=\"%.2f\" height=\"%.2f\"/></clipPath></defs>\n",
            pre, m.x0, m.y0, m.x1 - m.x0, m.y1 - m.y0);
    text_at(f, m.x0, 24, FS_TITLE, "start", "font-weight=\"bold\"", p->title);
    axes(f, &m, xstep, ystep, p->xlabel, p->ylabel);

    fprintf(f, "<g clip-path=\"url(#%sclip)\">\n", pre);
    for (size_t i = 0; i < p->nr; i++) {
        const struct rule *r = &p->r[i];
        const char *dash = r->kind == SB_SVG_RULE_LIMIT ? "10 5" : "2 3";
        double w = r->kind == SB_SVG_RULE_LIMIT ? 1.8 : 1.2;

        if (r->vertical) {
            double px = map_x(&m, r->at);
            fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" "
                       "stroke=\"#333333\" stroke-width=\"%.1f\" "
                       "stroke-dasharray=\"%s\"/>\n",
                    px, m.y0, px, m.y1, w, dash);
        } else {
            double py = map_y(&m, r->at);
            fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" "
                       "stroke=\"#333333\" stroke-width=\"%.1f\" "
                       "stroke-dasharray=\"%s\"/>\n",
                    m.x0, py, m.x1, py, w, dash);
        }
    }
    for (size_t i = 0; i < p->ns; i++) {
        const struct series *s = &p->s[i];
        const char *col = STYLE[s->style].colour;
        size_t every = s->n > MARKERS_PER_LINE ? s->n / MARKERS_PER_LINE : 1;

        if (!s->points_only && s->n > 1) {
            fprintf(f, "<polyline fill=\"none\" stroke=\"%s\" "
                       "stroke-width=\"1.8\" stroke-linejoin=\"round\"",
                    col);
            if (STYLE[s->style].dash[0])
                fprintf(f, " stroke-dasharray=\"%s\"", STYLE[s->style].dash);
            fprintf(f, " points=\"");
            for (size_t k = 0; k < s->n; k++)
                fprintf(f, "%s%.2f,%.2f", k ? " " : "", map_x(&m, s->x[k]),
                        map_y(&m, s->y[k]));
            fprintf(f, "\"/>\n");
        }
        for (size_t k = 0; k < s->n; k++)
            if (s->points_only || k % every == 0 || k == s->n - 1)
                marker(f, STYLE[s->style].marker, map_x(&m, s->x[k]),
                       map_y(&m, s->y[k]), s->points_only ? 4.2 : 3.0, col,
                       s->points_only);
    }
    fprintf(f, "</g>\n");
    /* labels of mark rules, outside the clip so they stay whole */
    for (size_t i = 0; i < p->nr; i++) {
        const struct rule *r = &p->r[i];

        if (r->kind != SB_SVG_RULE_MARK || !r->label[0])
            continue;
        if (r->vertical) {
            double px = map_x(&m, r->at);
            int right = px > 0.5 * (m.x0 + m.x1);

            if (px < m.x0 || px > m.x1)
                continue;
            text_at(f, right ? px - 4 : px + 4, m.y0 + 14 + 13 * (nmark % 3),
                    FS_TICK, right ? "end" : "start", NULL, r->label);
        } else {
            double py = map_y(&m, r->at);

            if (py < m.y0 || py > m.y1)
                continue;
            text_at(f, m.x1 - 4, py - 4, FS_TICK, "end", NULL, r->label);
        }
        nmark++;
    }

    /* legend */
    lx = m.x0;
    ly = m.y1 + 54;
    {
        size_t e = 0;

        for (size_t i = 0; i < p->ns + p->nr; i++) {
            const char *label, *col = "#333333", *dash = "10 5";
            int mk = -1, open = 0;
            double w;

            if (i < p->ns) {
                if (!p->s[i].label[0])
                    continue;
                label = p->s[i].label;
                col = STYLE[p->s[i].style].colour;
                dash = p->s[i].points_only ? NULL : STYLE[p->s[i].style].dash;
                mk = STYLE[p->s[i].style].marker;
                open = p->s[i].points_only;
            } else {
                if (p->r[i - p->ns].kind != SB_SVG_RULE_LIMIT ||
                    !p->r[i - p->ns].label[0])
                    continue;
                label = p->r[i - p->ns].label;
            }
            if (e >= 64)
                break;
            w = widths[e++];
            if (lx > m.x0 && lx + w > m.x1) {
                lx = m.x0;
                ly += LEGEND_ROW;
            }
            if (dash) {
                fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" "
                           "y2=\"%.2f\" stroke=\"%s\" stroke-width=\"1.8\"",
                        lx, ly - 4, lx + 28, ly - 4, col);
                if (dash[0])
                    fprintf(f, " stroke-dasharray=\"%s\"", dash);
                fprintf(f, "/>\n");
            }
            if (mk >= 0)
                marker(f, mk, lx + 14, ly - 4, open ? 4.2 : 3.0, col, open);
            text_at(f, lx + 34, ly, FS_LEGEND, "start", NULL, label);
            lx += w;
        }
    }
    fprintf(f, "</svg>\n");
    return finish(f, err);
}

/* ---- stacked bars -------------------------------------------------------- */

struct sb_bars {
    char title[SB_SVG_LABEL_MAX], xlabel[SB_SVG_LABEL_MAX],
        ylabel[SB_SVG_LABEL_MAX];
    size_t n_parts;
    char (*parts)[SB_SVG_LABEL_MAX];
    size_t n, cap;
    char (*cat)[SB_SVG_LABEL_MAX];
    double *v; /* n x n_parts */
    int bad;
};

/* fills: background, hatch colour, hatch path in a 6 x 6 tile ("" none) */
static const struct {
    const char *bg, *ink, *path;
} FILL[SB_SVG_FILLS] = {
    {"#4d4d4d", "", ""},
    {"#ffffff", "#1f4e8c", "M0,6 L6,0 M-1,1 L1,-1 M5,7 L7,5"},
    {"#c9d7ea", "", ""},
    {"#ffffff", "#a23b1e", "M0,0 L6,6 M-1,5 L1,7 M5,-1 L7,1"},
    {"#f1d3c6", "#7a2a12", "M0,3 L6,3"},
    {"#ffffff", "#2e6b30", "M0,6 L6,0 M0,0 L6,6"},
    {"#e3e3e3", "#000000", "M2.5,3 L3.5,3"},
    {"#ffffff", "#6a3d8f", "M3,0 L3,6"},
};

struct sb_bars *sb_bars_alloc(const char *title, const char *xlabel,
                              const char *ylabel, const char *const *part_labels,
                              size_t n_parts)
{
    struct sb_bars *b;

    if (n_parts == 0)
        return NULL;
    b = calloc(1, sizeof *b);
    if (!b)
        return NULL;
    b->parts = calloc(n_parts, sizeof b->parts[0]);
    if (!b->parts) {
        free(b);
        return NULL;
    }
    copy_label(b->title, title);
    copy_label(b->xlabel, xlabel);
    copy_label(b->ylabel, ylabel);
    for (size_t i = 0; i < n_parts; i++)
        copy_label(b->parts[i], part_labels[i]);
    b->n_parts = n_parts;
    return b;
}

void sb_bars_free(struct sb_bars *b)
{
    if (!b)
        return;
    free(b->parts);
    free(b->cat);
    free(b->v);
    free(b);
}

int sb_bars_add(struct sb_bars *b, const char *category, const double *values)
{
    for (size_t i = 0; i < b->n_parts; i++)
        if (!(values[i] >= 0.0 && isfinite(values[i]))) {
            b->bad = 1;
            return SB_EINTERNAL;
        }
    if (b->n == b->cap) {
        size_t cap = b->cap ? 2 * b->cap : 8;
        char (*nc)[SB_SVG_LABEL_MAX] = realloc(b->cat, cap * sizeof nc[0]);
        double *nv;

        if (!nc)
            return SB_ENOMEM;
        b->cat = nc;
        nv = realloc(b->v, cap * b->n_parts * sizeof(double));
        if (!nv)
            return SB_ENOMEM;
        b->v = nv;
        b->cap = cap;
    }
    copy_label(b->cat[b->n], category);
    memcpy(b->v + b->n * b->n_parts, values, b->n_parts * sizeof(double));
    b->n++;
    return SB_OK;
}

int sb_bars_write(const struct sb_bars *b, FILE *f, int width, int height,
                  int standalone, const char *id_prefix, struct sb_error *err)
{
    struct mapping m;
    double widths[64], ystep, top = 0.0, slot, bw, lx, ly;
    size_t nleg = b->n_parts < 64 ? b->n_parts : 64;
    int rows;
    const char *pre = id_prefix ? id_prefix : "";

    if (b->bad || b->n == 0)
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "bar chart '%s': no bars or a bad value (this is "
                            "a bug)",
                            b->title);
    for (size_t i = 0; i < b->n; i++) {
        double sum = 0.0;
        for (size_t k = 0; k < b->n_parts; k++)
            sum += b->v[i * b->n_parts + k];
        top = fmax(top, sum);
    }
    m.xlo = 0.0;
    m.xhi = (double)b->n;
    m.ylo = 0.0;
    m.yhi = top > 0.0 ? top : 1.0;
    m.y_down = 0;
    nice_range(&m.ylo, &m.yhi, &ystep, 0);
    for (size_t i = 0; i < nleg; i++)
        widths[i] = entry_width(b->parts[i]);
    m.x0 = 70.0;
    m.x1 = width - 18.0;
    rows = legend_rows(widths, nleg, m.x1 - m.x0);
    m.y0 = 40.0;
    m.y1 = height - 48.0 - rows * LEGEND_ROW - 6;
    if (width < 200 || m.y1 - m.y0 < 60.0)
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "bar chart '%s': too small (this is a bug)",
                            b->title);

    svg_open(f, width, height, standalone, b->title);
    fprintf(f, "<defs>\n");
    for (size_t k = 0; k < SB_SVG_FILLS; k++) {
        if (!FILL[k].path[0])
            continue;
        fprintf(f, "<pattern id=\"%sfill%zu\" width=\"6\" height=\"6\" "
                   "patternUnits=\"userSpaceOnUse\"><rect width=\"6\" "
                   "height=\"6\" fill=\"%s\"/><path d=\"%s\" stroke=\"%s\" "
                   "stroke-width=\"1.3\"/></pattern>\n",
                pre, k, FILL[k].bg, FILL[k].path, FILL[k].ink);
    }
    fprintf(f, "</defs>\n");
    text_at(f, m.x0, 24, FS_TITLE, "start", "font-weight=\"bold\"", b->title);
    {
        /* y grid and ticks; category labels under the bars */
        int dy = step_decimals(ystep);
        char buf[64];

        for (long k = 0; k <= (long)floor(m.yhi / ystep + 1e-9); k++) {
            double v = (double)k * ystep, py = map_y(&m, v);

            fprintf(f, "<line x1=\"%.2f\" y1=\"%.2f\" x2=\"%.2f\" y2=\"%.2f\" "
                       "stroke=\"#d9d9d9\" stroke-width=\"0.8\"/>\n",
                    m.x0, py, m.x1, py);
            snprintf(buf, sizeof buf, "%.*f", dy, v);
            text_at(f, m.x0 - 7, py + 4, FS_TICK, "end", NULL, buf);
        }
        fprintf(f, "<rect x=\"%.2f\" y=\"%.2f\" width=\"%.2f\" "
                   "height=\"%.2f\" fill=\"none\" stroke=\"#000000\" "
                   "stroke-width=\"1.2\"/>\n",
                m.x0, m.y0, m.x1 - m.x0, m.y1 - m.y0);
        text_at(f, 0.5 * (m.x0 + m.x1), m.y1 + 34, FS_LABEL, "middle", NULL,
                b->xlabel);
        snprintf(buf, sizeof buf, "transform=\"rotate(-90 %.1f %.1f)\"", 16.0,
                 0.5 * (m.y0 + m.y1));
        text_at(f, 16.0, 0.5 * (m.y0 + m.y1), FS_LABEL, "middle", buf,
                b->ylabel);
    }
    slot = (m.x1 - m.x0) / (double)b->n;
    bw = fmin(0.55 * slot, 90.0);
    for (size_t i = 0; i < b->n; i++) {
        double cx = m.x0 + (i + 0.5) * slot, base = 0.0;

        for (size_t k = 0; k < b->n_parts; k++) {
            double v = b->v[i * b->n_parts + k];
            double ya = map_y(&m, base), yb = map_y(&m, base + v);
            size_t fk = k % SB_SVG_FILLS;

            base += v;
            if (ya - yb <= 0.0)
                continue;
            fprintf(f, "<rect x=\"%.2f\" y=\"%.2f\" width=\"%.2f\" "
                       "height=\"%.2f\" stroke=\"#000000\" "
                       "stroke-width=\"0.8\" fill=\"",
                    cx - 0.5 * bw, yb, bw, ya - yb);
            if (FILL[fk].path[0])
                fprintf(f, "url(#%sfill%zu)\"/>\n", pre, fk);
            else
                fprintf(f, "%s\"/>\n", FILL[fk].bg);
        }
        text_at(f, cx, m.y1 + 16, FS_TICK, "middle", NULL, b->cat[i]);
    }
    lx = m.x0;
    ly = m.y1 + 54;
    for (size_t k = 0; k < nleg; k++) {
        size_t fk = k % SB_SVG_FILLS;

        if (lx > m.x0 && lx + widths[k] > m.x1) {
            lx = m.x0;
            ly += LEGEND_ROW;
        }
        fprintf(f, "<rect x=\"%.2f\" y=\"%.2f\" width=\"24\" height=\"11\" "
                   "stroke=\"#000000\" stroke-width=\"0.8\" fill=\"",
                lx + 2, ly - 10);
        if (FILL[fk].path[0])
            fprintf(f, "url(#%sfill%zu)\"/>\n", pre, fk);
        else
            fprintf(f, "%s\"/>\n", FILL[fk].bg);
        text_at(f, lx + 34, ly, FS_LEGEND, "start", NULL, b->parts[k]);
        lx += widths[k];
    }
    fprintf(f, "</svg>\n");
    return finish(f, err);
}
