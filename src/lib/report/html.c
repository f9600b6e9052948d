/*
 * Self-contained HTML pages (contract in include/swathbudget/html.h).  The
 * style sheet is ours: a plain document look for A4 paper, headings ruled
 * underneath, tables with rules above and below, captions under figures.
 */
#include "swathbudget/html.h"

#include <ctype.h>
#include <stdio.h>
#include <string.h>

/* No @import, no url(), no fonts named that would be fetched: generic
 * families only. */
static const char *const STYLE =
    "body{font-family:sans-serif;font-size:14px;line-height:1.45;"
    "color:#000;background:#fff;max-width:1140px;margin:0 auto;"
    "padding:18px 26px 40px 26px}\n"
    "h1{font-size:23px;margin:6px 0 2px 0;font-weight:bold}\n"
    "h2{font-size:17px;margin:26px 0 8px 0;padding-bottom:3px;"
    "border-bottom:1.5px solid #000}\n"
    "h3{font-size:15px;margin:16px 0 6px 0}\n"
    "p{margin:6px 0}\n"
    "p.lead{font-size:16px;margin:10px 0 12px 0}\n"
    "p.note{font-size:12px;color:#333}\n"
    "p.caution{border:1.5px solid #000;border-left-width:7px;"
    "padding:7px 11px;margin:12px 0}\n"
    "div.meta{font-size:12.5px;color:#222;margin-bottom:8px}\n"
    "table{border-collapse:collapse;margin:8px 0 14px 0;font-size:13px}\n"
    "caption{caption-side:top;text-align:left;font-weight:bold;"
    "padding-bottom:4px}\n"
    "thead th{border-top:1.5px solid #000;border-bottom:1px solid #000;"
    "padding:4px 9px;text-align:left;vertical-align:bottom}\n"
    "td{padding:3px 9px;border-bottom:1px solid #c8c8c8}\n"
    "tbody tr:last-child td{border-bottom:1.5px solid #000}\n"
    "td.n,th.n{text-align:right;font-variant-numeric:tabular-nums}\n"
    "pre{font-family:monospace;font-size:12.5px;background:#f4f4f4;"
    "border:1px solid #c8c8c8;padding:8px 10px;white-space:pre-wrap}\n"
    "figure{display:inline-block;margin:6px 12px 14px 0;"
    "vertical-align:top}\n"
    "figcaption{font-size:12.5px;max-width:540px;margin-top:2px}\n"
    "div.row{white-space:nowrap}\n"
    "div.row figure{white-space:normal}\n"
    "@media print{body{max-width:none;padding:0}"
    "div.row{white-space:normal}figure,table{break-inside:avoid}"
    "h2{break-after:avoid}}\n";

static void put(struct sb_html *h, const char *s)
{
    fputs(s, h->f);
}

/* 1 if s holds a word printf makes of a non-finite double ("nan",
 * "-nan", "inf", "-inf", "+inf"; lowercase, as %f and %g write them),
 * standing alone: cells and paragraphs arrive here already formatted, so
 * this is where a NaN or infinity would slip into the page. */
static int has_nonfinite_word(const char *s)
{
    const char *p = s;

    while ((p = strpbrk(p, "ni")) != NULL) {
        const char *start = p;
        size_t n = strncmp(p, "nan", 3) == 0 || strncmp(p, "inf", 3) == 0
                       ? 3
                       : 0;

        if (n) {
            if (start > s && (start[-1] == '-' || start[-1] == '+'))
                start--;
            if ((start == s || !isalnum((unsigned char)start[-1])) &&
                !isalnum((unsigned char)p[n]) && p[n] != '_')
                return 1;
        }
        p++;
    }
    return 0;
}

static void text(struct sb_html *h, const char *s)
{
    if (has_nonfinite_word(s) && h->status == SB_OK) {
        h->status = SB_EINTERNAL;
        snprintf(h->what, sizeof h->what,
                 "a non-finite number reached the HTML writer in '%.80s' "
                 "(this is a bug)", s);
    }
    sb_xml_text(h->f, s);
}

void sb_html_begin(struct sb_html *h, FILE *f, const char *title)
{
    memset(h, 0, sizeof *h);
    h->f = f;
    put(h, "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n"
           "<meta charset=\"utf-8\"/>\n"
           "<meta name=\"viewport\" content=\"width=device-width\"/>\n"
           "<title>");
    text(h, title);
    put(h, "</title>\n<style>\n");
    put(h, STYLE);
    put(h, "</style>\n</head>\n<body>\n");
}

void sb_html_heading(struct sb_html *h, int level, const char *s)
{
    if (level < 1)
        level = 1;
    if (level > 3)
        level = 3;
    fprintf(h->f, "<h%d>", level);
    text(h, s);
    fprintf(h->f, "</h%d>\n", level);
}

void sb_html_para(struct sb_html *h, const char *cls, const char *s)
{
    if (cls && *cls) {
        put(h, "<p class=\"");
        text(h, cls);
        put(h, "\">");
    } else {
        put(h, "<p>");
    }
    text(h, s);
    put(h, "</p>\n");
}

void sb_html_div_begin(struct sb_html *h, const char *cls)
{
    put(h, "<div class=\"");
    text(h, cls ? cls : "");
    put(h, "\">\n");
}

void sb_html_div_end(struct sb_html *h)
{
    put(h, "</div>\n");
}

void sb_html_table_begin(struct sb_html *h, const char *caption,
                         const char *const *headers, const int *num,
                         size_t ncols)
{
    h->tables++;
    fprintf(h->f, "<table>\n<caption>Table %d. ", h->tables);
    text(h, caption);
    put(h, "</caption>\n<thead><tr>");
    for (size_t i = 0; i < ncols; i++) {
        put(h, num && num[i] ? "<th class=\"n\">" : "<th>");
        text(h, headers[i]);
        put(h, "</th>");
    }
    put(h, "</tr></thead>\n<tbody>\n");
}

void sb_html_table_row(struct sb_html *h, const char *const *cells,
                       const int *num, size_t ncols)
{
    put(h, "<tr>");
    for (size_t i = 0; i < ncols; i++) {
        put(h, num && num[i] ? "<td class=\"n\">" : "<td>");
        text(h, cells[i] ? cells[i] : "");
        put(h, "</td>");
    }
    put(h, "</tr>\n");
}

void sb_html_table_end(struct sb_html *h)
{
    put(h, "</tbody>\n</table>\n");
}

void sb_html_pre(struct sb_html *h, const char *s)
{
    put(h, "<pre>");
    text(h, s);
    put(h, "</pre>\n");
}

static void figure_end(struct sb_html *h, int rc, const struct sb_error *err,
                       const char *caption)
{
    if (rc != SB_OK && h->status == SB_OK) {
        h->status = rc;
        snprintf(h->what, sizeof h->what, "%s", err->msg);
    }
    fprintf(h->f, "<figcaption>Figure %d. ", h->figures);
    text(h, caption);
    put(h, "</figcaption>\n</figure>\n");
}

void sb_html_plot(struct sb_html *h, const struct sb_plot *p, int width,
                  int height, const char *caption)
{
    char pre[32];
    struct sb_error err;
    int rc;

    h->figures++;
    snprintf(pre, sizeof pre, "f%d-", h->figures);
    put(h, "<figure>\n");
    sb_error_clear(&err);
    rc = sb_plot_write(p, h->f, width, height, 0, pre, &err);
    figure_end(h, rc, &err, caption);
}

void sb_html_bars(struct sb_html *h, const struct sb_bars *b, int width,
                  int height, const char *caption)
{
    char pre[32];
    struct sb_error err;
    int rc;

    h->figures++;
    snprintf(pre, sizeof pre, "f%d-", h->figures);
    put(h, "<figure>\n");
    sb_error_clear(&err);
    rc = sb_bars_write(b, h->f, width, height, 0, pre, &err);
    figure_end(h, rc, &err, caption);
}

void sb_html_row_begin(struct sb_html *h)
{
    put(h, "<div class=\"row\">\n");
}

void sb_html_row_end(struct sb_html *h)
{
    put(h, "</div>\n");
}

int sb_html_end(struct sb_html *h, struct sb_error *err)
{
    put(h, "</body>\n</html>\n");
    if (h->status != SB_OK)
        return sb_error_set(err, h->status, "", 0, 0, "%s", h->what);
    if (ferror(h->f))
        return sb_error_set(err, SB_EIO, "", 0, 0,
                            "could not write the report (expected a "
                            "writable output)");
    return SB_OK;
}
