/* The report as a PDF document drawn with cairo: title, wrapped text, the summary table (our
 * own layout: column groups that fit the page, the family column repeated), notes, figures. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <cairo.h>
#include <cairo-pdf.h>
#include "render_impl.h"

#define PAGE_W 595.28
#define PAGE_H 841.89
#define MARGIN 50.0
#define BODY 10.0
#define CELL 8.0
#define ROW_H 15.0
#define TEXT_COL_MAX 150.0

typedef struct {
    cairo_t *cr;
    double y;          /* current base line position from the top */
    int page;
} doc_t;

static void font(cairo_t *cr, double size, int bold, int mono)
{
    cairo_select_font_face(cr, mono ? "DejaVu Sans Mono" : EMBZ_FONT, CAIRO_FONT_SLANT_NORMAL,
                           bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
    cairo_set_font_size(cr, size);
}

static double tw(cairo_t *cr, const char *s)
{
    cairo_text_extents_t e;
    if (s == NULL || !s[0])
        return 0;
    cairo_text_extents(cr, s, &e);
    return e.x_advance;
}

static void new_page(doc_t *d)
{
    cairo_show_page(d->cr);
    d->page++;
    d->y = MARGIN;
}

static void need(doc_t *d, double h)
{
    if (d->y + h > PAGE_H - MARGIN)
        new_page(d);
}

/* Length in bytes of the UTF-8 character at s. */
static size_t u8len(const char *s)
{
    unsigned char c = (unsigned char) *s;
    return c < 0x80 ? 1 : c < 0xe0 ? 2 : c < 0xf0 ? 3 : 4;
}

/* Word-wrapped text in the current font, lines of height lh, width w from x. */
static void wrap(doc_t *d, const char *text, double x, double w, double lh)
{
    cairo_t *cr = d->cr;
    size_t n = strlen(text);
    char *line = malloc(n + 1);
    const char *p = text;
    while (*p) {
        /* take words while they fit */
        size_t len = 0, last_fit = 0;
        const char *q = p;
        while (*q && *q != '\n') {
            const char *word_end = q;
            while (*word_end == ' ')
                word_end++;
            while (*word_end && *word_end != ' ' && *word_end != '\n')
                word_end += u8len(word_end);
            size_t cand = (size_t) (word_end - p);
            memcpy(line, p, cand);
            line[cand] = 0;
            if (tw(cr, line) > w) {
                if (last_fit == 0) {
                    /* one long word: cut it where it stops fitting */
                    size_t k = 0;
                    while (k < cand) {
                        size_t nk = k + u8len(p + k);
                        memcpy(line, p, nk);
                        line[nk] = 0;
                        if (tw(cr, line) > w && k > 0)
                            break;
                        k = nk;
                    }
                    last_fit = k;
                }
                break;
            }
            last_fit = cand;
            q = word_end;
        }
        len = last_fit;
        if (len == 0 && *p != '\n' && *p)
            len = u8len(p);
        memcpy(line, p, len);
        line[len] = 0;
        need(d, lh);
        d->y += lh;
        cairo_move_to(cr, x, d->y);
        cairo_show_text(cr, line);
        p += len;
        while (*p == ' ')
            p++;
        if (*p == '\n')
            p++;
    }
    free(line);
}

typedef struct { doc_t *d; double x, w; } para_ctx;

static void para_draw(void *ctx, const char *para)
{
    para_ctx *pc = ctx;
    wrap(pc->d, para, pc->x, pc->w, BODY * 1.45);
    pc->d->y += BODY * 0.6;
}

static void paragraphs(doc_t *d, const char *text, double x, double w)
{
    para_ctx pc = { d, x, w };
    _embz_render_paragraphs(text, 0, para_draw, &pc);
}

static void heading(doc_t *d, const char *text, double keep)
{
    need(d, 40 + keep);
    d->y += 16;
    font(d->cr, 13, 1, 0);
    cairo_set_source_rgb(d->cr, 0.1, 0.1, 0.1);
    wrap(d, text, MARGIN, PAGE_W - 2 * MARGIN, 16);
    cairo_set_source_rgb(d->cr, 0.75, 0.75, 0.72);
    cairo_set_line_width(d->cr, 0.6);
    cairo_move_to(d->cr, MARGIN, d->y + 4);
    cairo_line_to(d->cr, PAGE_W - MARGIN, d->y + 4);
    cairo_stroke(d->cr);
    d->y += 8;
}

/* Cell text that fits the column: numbers whole, other text cut with an ellipsis. */
static char *cell_text(cairo_t *cr, const char *s, double w)
{
    size_t l = strlen(s);
    char *b = malloc(l + 4);
    memcpy(b, s, l + 1);
    while (l > 0 && tw(cr, b) > w) {
        l--;
        while (l > 0 && (((unsigned char) s[l]) & 0xc0) == 0x80)
            l--;
        memcpy(b, s, l);
        memcpy(b + l, "\xe2\x80\xa6", 4);
    }
    return b;
}

static void table_header(doc_t *d, const embz_report_table_t *t, const slong *cols, slong nc,
                         const double *x, const double *w)
{
    cairo_t *cr = d->cr;
    cairo_set_source_rgb(cr, 0.2, 0.22, 0.25);
    cairo_set_line_width(cr, 1.2);
    cairo_move_to(cr, MARGIN, d->y);
    cairo_line_to(cr, x[nc - 1] + w[nc - 1], d->y);
    cairo_stroke(cr);
    d->y += ROW_H - 3;
    font(cr, CELL, 1, 0);
    for (slong k = 0; k < nc; k++) {
        const char *h = t->head[cols[k]];
        double hx = t->numeric[cols[k]] ? x[k] + w[k] - 4 - tw(cr, h) : x[k] + 4;
        cairo_move_to(cr, hx, d->y);
        cairo_show_text(cr, h);
    }
    d->y += 5;
    cairo_set_line_width(cr, 0.7);
    cairo_move_to(cr, MARGIN, d->y);
    cairo_line_to(cr, x[nc - 1] + w[nc - 1], d->y);
    cairo_stroke(cr);
}

static void draw_table(doc_t *d, const embz_report_table_t *t)
{
    cairo_t *cr = d->cr;
    double *cw = calloc(t->ncols, sizeof(double));
    for (slong c = 0; c < t->ncols; c++) {
        font(cr, CELL, 1, 0);
        cw[c] = tw(cr, t->head[c]) + 8;
        font(cr, CELL, 0, t->numeric[c] || c == 1);
        for (slong i = 0; i < t->nrows; i++) {
            const char *v = t->cell[i * t->ncols + c];
            double vw = tw(cr, v ? v : "\xe2\x80\x93") + 8;
            cw[c] = vw > cw[c] ? vw : cw[c];
        }
        if (!t->numeric[c] && cw[c] > TEXT_COL_MAX)
            cw[c] = TEXT_COL_MAX;
        if (cw[c] > PAGE_W - 2 * MARGIN - cw[0])
            cw[c] = PAGE_W - 2 * MARGIN - cw[0];
    }
    slong *cols = malloc((t->ncols + 1) * sizeof(slong));
    double *x = malloc((t->ncols + 1) * sizeof(double));
    double *w = malloc((t->ncols + 1) * sizeof(double));
    slong next = 1;
    while (next < t->ncols || next == 1) {
        /* one group: the family column plus as many following columns as fit */
        slong nc = 0;
        double pos = MARGIN;
        cols[nc] = 0; x[nc] = pos; w[nc] = cw[0]; pos += cw[0]; nc++;
        while (next < t->ncols && (pos + cw[next] <= PAGE_W - MARGIN || nc == 1)) {
            cols[nc] = next; x[nc] = pos; w[nc] = cw[next]; pos += cw[next]; nc++;
            next++;
        }
        need(d, 3 * ROW_H);
        table_header(d, t, cols, nc, x, w);
        for (slong i = 0; i < t->nrows; i++) {
            if (d->y + ROW_H > PAGE_H - MARGIN) {
                new_page(d);
                table_header(d, t, cols, nc, x, w);
            }
            if (i % 2 == 1) {
                cairo_set_source_rgb(cr, 0.95, 0.955, 0.945);
                cairo_rectangle(cr, MARGIN, d->y, pos - MARGIN, ROW_H);
                cairo_fill(cr);
            }
            d->y += ROW_H - 4;
            cairo_set_source_rgb(cr, 0.1, 0.1, 0.1);
            for (slong k = 0; k < nc; k++) {
                slong c = cols[k];
                const char *v = t->cell[i * t->ncols + c];
                font(cr, CELL, k == 0, t->numeric[c] || c == 1);
                char *s = cell_text(cr, v ? v : "\xe2\x80\x93", w[k] - 8);
                double sx = t->numeric[c] ? x[k] + w[k] - 4 - tw(cr, s) : x[k] + 4;
                cairo_move_to(cr, sx, d->y);
                cairo_show_text(cr, s);
                free(s);
            }
            d->y += 4;
        }
        cairo_set_source_rgb(cr, 0.2, 0.22, 0.25);
        cairo_set_line_width(cr, 1.2);
        cairo_move_to(cr, MARGIN, d->y);
        cairo_line_to(cr, pos, d->y);
        cairo_stroke(cr);
        d->y += 14;
        if (next >= t->ncols)
            break;
    }
    free(cols); free(x); free(w); free(cw);
}

static void figure(doc_t *d, const embz_report_figure_struct *g)
{
    cairo_t *cr = d->cr;
    double avail = PAGE_W - 2 * MARGIN;
    double W = 0, H = 0, s = 1;
    cairo_surface_t *img = NULL;
    if (g->plot != NULL)
        embz_plot_size(&W, &H, g->plot);
    else if (g->path != NULL) {
        char ext[16];
        embz_path_ext(ext, sizeof(ext), g->path);
        if (!strcmp(ext, "png")) {
            img = cairo_image_surface_create_from_png(g->path);
            if (cairo_surface_status(img) != CAIRO_STATUS_SUCCESS) {
                cairo_surface_destroy(img);
                img = NULL;
            } else {
                W = cairo_image_surface_get_width(img);
                H = cairo_image_surface_get_height(img);
            }
        }
    }
    if (W > 0) {
        s = avail / W;
        if (H * s > PAGE_H - 2 * MARGIN - 40)
            s = (PAGE_H - 2 * MARGIN - 40) / H;
        need(d, H * s + 30);
        d->y += 6;
        if (g->plot != NULL)
            embz_plot_draw(cr, g->plot, MARGIN + (avail - W * s) / 2, d->y, s);
        else {
            cairo_save(cr);
            cairo_translate(cr, MARGIN + (avail - W * s) / 2, d->y);
            cairo_scale(cr, s, s);
            cairo_set_source_surface(cr, img, 0, 0);
            cairo_paint(cr);
            cairo_restore(cr);
            cairo_surface_destroy(img);
        }
        d->y += H * s;
    }
    font(cr, 9, 0, 0);
    cairo_set_source_rgb(cr, 0.3, 0.31, 0.34);
    if (g->caption)
        wrap(d, g->caption, MARGIN, avail, 12);
    else if (W == 0)
        wrap(d, "(figure not available in PDF)", MARGIN, avail, 12);
    d->y += 14;
}

int embz_report_pdf_write(const embz_report_struct *r, const char *path, embz_err_t *err)
{
    embz_afile_t f;
    int st = embz_afile_open(f, path, err);
    if (st != EMBZ_OK)
        return st;
    f->fail_after = r->fail_after;
    cairo_surface_t *surf = cairo_pdf_surface_create_for_stream(embz_afile_cairo_write, f,
                                                                PAGE_W, PAGE_H);
    cairo_pdf_surface_set_metadata(surf, CAIRO_PDF_METADATA_CREATOR, "embz");
    if (r->title)
        cairo_pdf_surface_set_metadata(surf, CAIRO_PDF_METADATA_TITLE, r->title);
    doc_t d = { cairo_create(surf), MARGIN, 1 };
    cairo_t *cr = d.cr;
    double width = PAGE_W - 2 * MARGIN;

    font(cr, 19, 1, 0);
    cairo_set_source_rgb(cr, 0.08, 0.08, 0.1);
    wrap(&d, r->title ? r->title : "embz report", MARGIN, width, 24);
    if (r->subtitle) {
        font(cr, 11, 0, 0);
        cairo_set_source_rgb(cr, 0.35, 0.37, 0.4);
        d.y += 2;
        wrap(&d, r->subtitle, MARGIN, width, 15);
    }
    d.y += 8;
    font(cr, BODY, 0, 0);
    cairo_set_source_rgb(cr, 0.1, 0.1, 0.1);
    paragraphs(&d, r->intro, MARGIN, width);

    heading(&d, "Summary", 3 * ROW_H);
    embz_report_table_t t;
    embz_report_table_build(&t, r);
    draw_table(&d, &t);
    embz_report_table_clear(&t);

    int any_notes = 0;
    for (slong i = 0; i < r->nfam; i++)
        any_notes |= r->fam[i].notes != NULL && r->fam[i].notes[0];
    if (any_notes) {
        heading(&d, "Notes", 40);
        for (slong i = 0; i < r->nfam; i++) {
            if (r->fam[i].notes == NULL || !r->fam[i].notes[0])
                continue;
            need(&d, 40);
            font(cr, 11, 1, 0);
            cairo_set_source_rgb(cr, 0.1, 0.1, 0.1);
            d.y += 4;
            wrap(&d, r->fam[i].name ? r->fam[i].name : "", MARGIN, width, 15);
            font(cr, BODY, 0, 0);
            paragraphs(&d, r->fam[i].notes, MARGIN, width);
        }
    }
    if (r->nfig > 0) {
        /* keep the heading with the first figure */
        double keep = 60;
        if (r->fig[0].plot != NULL) {
            double W, H;
            embz_plot_size(&W, &H, r->fig[0].plot);
            keep = H * fmin(1.0, (PAGE_W - 2 * MARGIN) / W) + 30;
        }
        heading(&d, "Figures", keep);
    }
    for (slong k = 0; k < r->nfig; k++)
        figure(&d, r->fig + k);
    if (r->footer) {
        need(&d, 30);
        d.y += 10;
        font(cr, 8.5, 0, 0);
        cairo_set_source_rgb(cr, 0.35, 0.37, 0.4);
        paragraphs(&d, r->footer, MARGIN, width);
    }

    cairo_status_t cst = cairo_status(cr);
    cairo_destroy(cr);
    cairo_surface_finish(surf);
    if (cst == CAIRO_STATUS_SUCCESS)
        cst = cairo_surface_status(surf);
    cairo_surface_destroy(surf);
    if (f->failed)   /* commit refuses and names the reason (e.g. no space left) */
        return embz_afile_commit(f, err);
    if (cst != CAIRO_STATUS_SUCCESS) {
        int io = cst == CAIRO_STATUS_WRITE_ERROR;
        embz_afile_abort(f);
        if (io)
            return embz_err_set(err, EMBZ_ERR_IO, "cannot write %s", path);
        return embz_err_set(err, EMBZ_ERR_IO, "drawing %s failed: %s", path,
                            cairo_status_to_string(cst));
    }
    return embz_afile_commit(f, err);
}
