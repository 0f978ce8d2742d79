/* Internal pieces shared by the plot and report renderers. */
#ifndef EMBZ_RENDER_IMPL_H
#define EMBZ_RENDER_IMPL_H

#include <cairo.h>
#include "embz/render.h"

#define EMBZ_FONT "DejaVu Sans"

/* Draw the whole figure with its top-left corner at (x, y), scaled by s. */
void embz_plot_draw(cairo_t *cr, const embz_plot_struct *fig, double x, double y, double s);

/* cairo write callback into an embz_afile_t (closure). */
cairo_status_t embz_afile_cairo_write(void *closure, const unsigned char *data,
                                      unsigned int len);

/* Lower-case file extension of path without the dot ("" when none), in buf. */
void embz_path_ext(char *buf, size_t len, const char *path);

/* The report as a PDF document (report_pdf.c). */
int embz_report_pdf_write(const embz_report_struct *r, const char *path, embz_err_t *err);

/* The tables of a report as text cells, shared by every writer. Column 0 is the family name.
 * EMBZ_TABLE_KEY: the answer (family, verdict, qubits per side and extra qubits per goal, E at
 * the largest size, the one-line reason); EMBZ_TABLE_CLASS: the classification (weight,
 * verdict, law, exponent, limit); EMBZ_TABLE_NUMBERS: E at every size, n, qubits and extra
 * qubits per goal. */
enum { EMBZ_TABLE_KEY = 0, EMBZ_TABLE_CLASS, EMBZ_TABLE_NUMBERS };
/* column styles */
enum { EMBZ_COL_TEXT = 0, EMBZ_COL_NUM, EMBZ_COL_CODE, EMBZ_COL_PROSE };
typedef struct {
    slong ncols, nrows;
    char **head;       /* ncols */
    int *numeric;      /* ncols: right-aligned numbers */
    int *style;        /* ncols: EMBZ_COL_* */
    const char **cell; /* nrows * ncols (NULL: not available) */
    char **owned;      /* nrows * ncols: cells built here (freed with the table) */
} embz_report_table_t;

void embz_report_table_build(embz_report_table_t *t, const embz_report_struct *r, int kind);
void embz_report_table_clear(embz_report_table_t *t);
/* The anchor of family i in HTML ("fam-1", ...), in buf. */
void _embz_report_anchor(char *buf, size_t len, slong i);
/* The Markdown and LaTeX text; stem (or NULL) names the figure files written beside the
 * document: STEM-figK.svg (Markdown) and STEM-figK.pdf (LaTeX), K = 1, 2, ... */
int _embz_report_markdown(char **text, const embz_report_struct *r, const char *stem,
                          embz_err_t *err);
int _embz_report_latex(char **text, const embz_report_struct *r, const char *stem,
                       embz_err_t *err);

/* The order of a report, the same in every format: the head (title, subtitle, answer), the
 * key table, the first figure, the introduction, a heading and one block per family, the
 * other figures, a heading and the tables of all numbers, the footer. A writer gives one
 * function per part; _embz_report_walk calls them in that order and stops at the first
 * figure that fails (its status is returned). */
typedef struct {
    void (*head)(void *ctx, const embz_report_struct *r);
    void (*table)(void *ctx, const embz_report_table_t *t, int kind);
    int (*figure)(void *ctx, const embz_report_figure_struct *g, slong k);
    void (*text)(void *ctx, const char *paragraphs);
    void (*heading)(void *ctx, const char *title, const char *id);
    void (*family)(void *ctx, const embz_report_struct *r, slong i);
    void (*footer)(void *ctx, const char *paragraphs);
} embz_report_writer_t;
int _embz_report_walk(const embz_report_struct *r, const embz_report_writer_t *w, void *ctx);

/* ---- math in text (report_math.c) ---- */
/* A power base^exp or an index base_sub found in text: byte ranges [base0, base1) and
 * [exp0, exp1) (parentheses around the exponent dropped), the span ends at end. */
typedef struct { long base0, base1, exp0, exp1, end; int sub; } embz_math_span_t;
/* The next span at or after from; 0 when there is none. */
int _embz_math_next(embz_math_span_t *m, const char *s, long from);
/* s with its spans as MathML (the rest HTML-escaped) / as LaTeX math (the rest escaped). */
void _embz_math_html(embz_buf_t *out, const char *s);
void _embz_math_tex(embz_buf_t *out, const char *s);
/* s with its spans in Unicode super- and subscripts where every character has one
 * (malloc'ed; spans that cannot be written so stay as they are). */
char *_embz_math_unicode(const char *s);

/* Calls fn(ctx, paragraph) for each paragraph of text (split at blank lines; runs of line
 * breaks between paragraphs are dropped); with skip_blank, paragraphs of white space only are
 * left out. text may be NULL. */
void _embz_render_paragraphs(const char *text, int skip_blank,
                             void (*fn)(void *ctx, const char *para), void *ctx);

/* malloc'ed copy of s (NULL stays NULL) */
char *_embz_render_strdup(const char *s);

#endif
