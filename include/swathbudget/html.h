/*
 * swathbudget — a writer of plain, self-contained HTML pages for reports.
 *
 * The page is one file a client can open offline: the style sheet is inline,
 * pictures are inline SVG (svg.h), there are no scripts and nothing is
 * fetched from anywhere (no links to fonts, images or style sheets).  The
 * markup is also well-formed XML (every element closed, only the five XML
 * entities and numeric character references), so that it can be checked
 * with an XML parser.  The look is meant for paper: black text on white,
 * thin rules, no colour that carries meaning on its own.
 *
 * The writer formats; it does not compute.  Every text passes through XML
 * escaping; numbers are formatted by the caller.
 */
#ifndef SWATHBUDGET_HTML_H
#define SWATHBUDGET_HTML_H

#include <stddef.h>
#include <stdio.h>

#include "swathbudget/error.h"
#include "swathbudget/svg.h"

#ifdef __cplusplus
extern "C" {
#endif

struct sb_html {
    FILE *f;
    int status;   /* first failure (SB_EINTERNAL from a plot, SB_EIO) */
    char what[SB_ERROR_MSG_MAX];
    int figures;  /* figures written, for numbering and unique ids */
    int tables;   /* tables written, for numbering */
    int in_row;   /* inside a table row */
};

/* Start the page: doctype, head with the inline style sheet, title, and
 * the opening of the body. */
void sb_html_begin(struct sb_html *h, FILE *f, const char *title);

/* A heading (level 1 to 3) with escaped text. */
void sb_html_heading(struct sb_html *h, int level, const char *text);

/* A paragraph of escaped text; cls (may be NULL) names a style:
 * "lead" (the summary sentence), "note" (small print), "caution" (a boxed
 * caution). */
void sb_html_para(struct sb_html *h, const char *cls, const char *text);

/* Open and close a block <div class="cls"> around other content. */
void sb_html_div_begin(struct sb_html *h, const char *cls);
void sb_html_div_end(struct sb_html *h);

/* Tables: a numbered caption, a header row, rows of cells (escaped), end.
 * Numeric columns (num[i] != 0) are right-aligned.  A cell may be "" */
void sb_html_table_begin(struct sb_html *h, const char *caption,
                         const char *const *headers, const int *num,
                         size_t ncols);
void sb_html_table_row(struct sb_html *h, const char *const *cells,
                       const int *num, size_t ncols);
void sb_html_table_end(struct sb_html *h);

/* A preformatted block (equations), escaped. */
void sb_html_pre(struct sb_html *h, const char *text);

/* A numbered figure holding an inline SVG plot or bar chart of
 * width x height pixels, with a caption.  A failure of the plot is kept in
 * h->status (the page is still closed properly by sb_html_end). */
void sb_html_plot(struct sb_html *h, const struct sb_plot *p, int width,
                  int height, const char *caption);
void sb_html_bars(struct sb_html *h, const struct sb_bars *b, int width,
                  int height, const char *caption);

/* Two figures side by side on a wide page (stacked on paper). */
void sb_html_row_begin(struct sb_html *h);
void sb_html_row_end(struct sb_html *h);

/* Close the page; returns h->status or SB_EIO on a write error, err
 * filled. */
int sb_html_end(struct sb_html *h, struct sb_error *err);

#ifdef __cplusplus
}
#endif

#endif
