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

/* The summary table as text cells, shared by every writer. Column 0 is the family name. */
typedef struct {
    slong ncols, nrows;
    char **head;       /* ncols */
    int *numeric;      /* ncols: right-aligned numbers */
    const char **cell; /* nrows * ncols, borrowed (NULL: not available) */
    char **owned;      /* the limit cells, built here */
} embz_report_table_t;

void embz_report_table_build(embz_report_table_t *t, const embz_report_struct *r);
void embz_report_table_clear(embz_report_table_t *t);

/* Calls fn(ctx, paragraph) for each paragraph of text (split at blank lines; runs of line
 * breaks between paragraphs are dropped); with skip_blank, paragraphs of white space only are
 * left out. text may be NULL. */
void _embz_render_paragraphs(const char *text, int skip_blank,
                             void (*fn)(void *ctx, const char *para), void *ctx);

/* malloc'ed copy of s (NULL stays NULL) */
char *_embz_render_strdup(const char *s);

#endif
