/* The report as a PDF document drawn with cairo on A4, in the order of the HTML page: the
 * answer and the key table, the first figure, the reading notes, a block per family, the other
 * figures, the full numbers. Tables fit the text width (long cells wrap, never cut; a table
 * that is still too wide is split into column groups that repeat the family column) and move
 * whole to the next page when they fit there; a family's block is kept on one page. The layout
 * is tried at up to four densities, and the first that does not end on an almost empty page is
 * kept. Powers in text are set with Unicode superscripts. */
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
#define WIDTH (PAGE_W - 2 * MARGIN)
#define BOTTOM (PAGE_H - MARGIN)
#define BULLET "\xe2\x80\xa2 "
#define DASH "\xe2\x80\x93"

typedef struct {
    cairo_t *cr;
    double y;          /* current position from the top */
    int page;
    double body;       /* body text size */
    double cell;       /* table text size */
    double fig_scale;  /* figures at this fraction of the text width */
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
    if (d->y + h > BOTTOM && d->y > MARGIN + 1)
        new_page(d);
}

static size_t u8len(const char *s)
{
    unsigned char c = (unsigned char) *s;
    return c < 0x80 ? 1 : c < 0xe0 ? 2 : c < 0xf0 ? 3 : 4;
}

/* ------------------------------------------------------------------ lines */

typedef struct { slong n, alloc; char **s; } lines_t;

static void lines_push(lines_t *l, const char *p, size_t len)
{
    if (l->n == l->alloc) {
        l->alloc = l->alloc ? 2 * l->alloc : 8;
        l->s = realloc(l->s, l->alloc * sizeof(char *));
    }
    char *c = malloc(len + 1);
    memcpy(c, p, len);
    c[len] = 0;
    l->s[l->n++] = c;
}

static void lines_clear(lines_t *l)
{
    for (slong i = 0; i < l->n; i++)
        free(l->s[i]);
    free(l->s);
    memset(l, 0, sizeof(*l));
}

/* text broken into lines of width at most w in the current font: at spaces, and inside a
 * word only when the word alone is wider than w */
static void break_lines(lines_t *out, cairo_t *cr, const char *text, double w)
{
    memset(out, 0, sizeof(*out));
    size_t n = strlen(text);
    char *line = malloc(n + 1);
    const char *p = text;
    while (*p) {
        size_t last_fit = 0;
        const char *q = p;
        while (*q && *q != '\n') {
            const char *end = q;
            while (*end == ' ')
                end++;
            while (*end && *end != ' ' && *end != '\n')
                end += u8len(end);
            size_t cand = (size_t) (end - p);
            memcpy(line, p, cand);
            line[cand] = 0;
            if (tw(cr, line) > w) {
                if (last_fit == 0) {
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
            q = end;
        }
        if (last_fit == 0 && *p && *p != '\n')
            last_fit = u8len(p);
        lines_push(out, p, last_fit);
        p += last_fit;
        while (*p == ' ')
            p++;
        if (*p == '\n')
            p++;
    }
    if (out->n == 0)
        lines_push(out, "", 0);
    free(line);
}

/* The widest word (what a column needs at least). */
static double widest_word(cairo_t *cr, const char *s)
{
    double m = 0;
    char *c = malloc(strlen(s) + 1);
    while (*s) {
        while (*s == ' ')
            s++;
        size_t k = 0;
        while (s[k] && s[k] != ' ')
            k++;
        memcpy(c, s, k);
        c[k] = 0;
        double v = tw(cr, c);
        m = v > m ? v : m;
        s += k;
    }
    free(c);
    return m;
}

/* Wrapped text from x, line height lh; the text has its powers in superscripts. */
static void wrap(doc_t *d, const char *text, double x, double w, double lh)
{
    char *u = _embz_math_unicode(text);
    lines_t l;
    break_lines(&l, d->cr, u, w);
    for (slong i = 0; i < l.n; i++) {
        need(d, lh);
        d->y += lh;
        cairo_move_to(d->cr, x, d->y - lh * 0.28);
        cairo_show_text(d->cr, l.s[i]);
    }
    lines_clear(&l);
    free(u);
}

static double wrap_height(doc_t *d, const char *text, double w, double lh)
{
    char *u = _embz_math_unicode(text);
    lines_t l;
    break_lines(&l, d->cr, u, w);
    double h = l.n * lh;
    lines_clear(&l);
    free(u);
    return h;
}

typedef struct { doc_t *d; double x, w; int measure; double h; } para_ctx;

static void para_one(void *ctx, const char *p)
{
    para_ctx *pc = ctx;
    doc_t *d = pc->d;
    double lh = d->body * 1.42;
    int item = strncmp(p, BULLET, strlen(BULLET)) == 0;
    const char *body = item ? p + strlen(BULLET) : p;
    double x = pc->x + (item ? 12 : 0), w = pc->w - (item ? 12 : 0);
    if (pc->measure) {
        pc->h += wrap_height(d, body, w, lh) + d->body * (item ? 0.25 : 0.55);
        return;
    }
    if (item) {
        need(d, lh);
        cairo_move_to(d->cr, pc->x + 2, d->y + lh * 0.72);
        cairo_show_text(d->cr, "\xe2\x80\xa2");
    }
    wrap(d, body, x, w, lh);
    d->y += d->body * (item ? 0.25 : 0.55);
}

static double paragraphs(doc_t *d, const char *text, double x, double w, int measure)
{
    para_ctx pc = { d, x, w, measure, 0 };
    _embz_render_paragraphs(text, 1, para_one, &pc);
    return pc.h;
}

static void ink(cairo_t *cr, double v)
{
    cairo_set_source_rgb(cr, v * 1.02, v, v * 0.95);
}

static void heading(doc_t *d, const char *text, double keep)
{
    need(d, 34 + keep);
    d->y += 12;
    font(d->cr, 13, 1, 0);
    ink(d->cr, 0.12);
    wrap(d, text, MARGIN, WIDTH, 17);
    cairo_set_source_rgb(d->cr, 0.8, 0.77, 0.72);
    cairo_set_line_width(d->cr, 0.6);
    cairo_move_to(d->cr, MARGIN, d->y + 2);
    cairo_line_to(d->cr, PAGE_W - MARGIN, d->y + 2);
    cairo_stroke(d->cr);
    d->y += 8;
}

/* ------------------------------------------------------------------ tables */

typedef struct {
    const embz_report_table_t *t;
    double *w;          /* column widths */
    char **text;        /* nrows * ncols cell texts (superscripts set) */
    char **head;        /* ncols column heads (superscripts set) */
} tab_t;

static double cell_font(doc_t *d, const embz_report_table_t *t, slong c, int head)
{
    font(d->cr, d->cell, head || c == 0, t->style[c] == EMBZ_COL_NUM && !head
                                        ? 1 : t->style[c] == EMBZ_COL_CODE && !head);
    return d->cell * 1.3;
}

/* Column widths that fit width: numbers keep their natural width, text columns share what is
 * left in proportion to their natural width, never below their widest word. Returns the sum. */
static double table_widths(doc_t *d, tab_t *T, const slong *cols, slong nc, double width)
{
    const embz_report_table_t *t = T->t;
    double *nat = calloc(nc, sizeof(double)), *min = calloc(nc, sizeof(double));
    double fixed = 0, flex = 0, flex_min = 0;
    for (slong k = 0; k < nc; k++) {
        slong c = cols[k];
        cell_font(d, t, c, 1);
        nat[k] = tw(d->cr, T->head[c]);
        min[k] = widest_word(d->cr, T->head[c]);
        cell_font(d, t, c, 0);
        for (slong i = 0; i < t->nrows; i++) {
            const char *v = T->text[i * t->ncols + c];
            double vw = tw(d->cr, v);
            nat[k] = vw > nat[k] ? vw : nat[k];
            double ww = t->numeric[c] ? vw : widest_word(d->cr, v);
            min[k] = ww > min[k] ? ww : min[k];
        }
        nat[k] += 8;
        min[k] += 8;
        if (t->numeric[c]) {
            /* a number is never broken; its head may wrap */
            nat[k] = min[k];
            fixed += nat[k];
        } else {
            flex += nat[k];
            flex_min += min[k];
        }
    }
    double sum = 0;
    for (slong k = 0; k < nc; k++) {
        slong c = cols[k];
        double w = nat[k];
        if (!t->numeric[c] && fixed + flex > width && flex > 0) {
            double room = width - fixed;
            w = room > flex_min ? min[k] + (room - flex_min) * (nat[k] - min[k])
                                          / (flex - flex_min > 0 ? flex - flex_min : 1)
                                : min[k];
        }
        T->w[c] = w;
        sum += w;
    }
    free(nat);
    free(min);
    return sum;
}

static double row_height(doc_t *d, const tab_t *T, slong i, const slong *cols, slong nc)
{
    const embz_report_table_t *t = T->t;
    double h = 0;
    for (slong k = 0; k < nc; k++) {
        slong c = cols[k];
        double lh = cell_font(d, t, c, i < 0);
        lines_t l;
        break_lines(&l, d->cr, i < 0 ? T->head[c] : T->text[i * t->ncols + c], T->w[c] - 7.5);
        h = l.n * lh > h ? l.n * lh : h;
        lines_clear(&l);
    }
    return h + 5;
}

static void draw_row(doc_t *d, const tab_t *T, slong i, const slong *cols, slong nc, double h)
{
    const embz_report_table_t *t = T->t;
    cairo_t *cr = d->cr;
    double x = MARGIN, right = MARGIN;
    for (slong k = 0; k < nc; k++)
        right += T->w[cols[k]];
    if (i >= 0 && i % 2 == 1) {
        cairo_set_source_rgb(cr, 0.962, 0.95, 0.925);
        cairo_rectangle(cr, MARGIN, d->y, right - MARGIN, h);
        cairo_fill(cr);
    }
    ink(cr, 0.12);
    for (slong k = 0; k < nc; k++) {
        slong c = cols[k];
        double lh = cell_font(d, t, c, i < 0);
        lines_t l;
        break_lines(&l, cr, i < 0 ? T->head[c] : T->text[i * t->ncols + c], T->w[c] - 7.5);
        for (slong m = 0; m < l.n; m++) {
            double lx = t->numeric[c] ? x + T->w[c] - 4 - tw(cr, l.s[m]) : x + 4;
            cairo_move_to(cr, lx, d->y + 2.5 + (m + 1) * lh - lh * 0.25);
            cairo_show_text(cr, l.s[m]);
        }
        lines_clear(&l);
        x += T->w[c];
    }
    d->y += h;
    if (i < 0) {
        cairo_set_source_rgb(cr, 0.29, 0.25, 0.21);
        cairo_set_line_width(cr, 0.7);
        cairo_move_to(cr, MARGIN, d->y);
        cairo_line_to(cr, right, d->y);
        cairo_stroke(cr);
    }
}

static void rule(doc_t *d, const tab_t *T, const slong *cols, slong nc)
{
    double right = MARGIN;
    for (slong k = 0; k < nc; k++)
        right += T->w[cols[k]];
    cairo_set_source_rgb(d->cr, 0.29, 0.25, 0.21);
    cairo_set_line_width(d->cr, 1.2);
    cairo_move_to(d->cr, MARGIN, d->y);
    cairo_line_to(d->cr, right, d->y);
    cairo_stroke(d->cr);
}

static void draw_table(doc_t *d, const embz_report_table_t *t)
{
    tab_t T = { t, calloc(t->ncols, sizeof(double)),
                calloc(t->ncols * (t->nrows ? t->nrows : 1), sizeof(char *)),
                calloc(t->ncols, sizeof(char *)) };
    for (slong c = 0; c < t->ncols; c++)
        T.head[c] = _embz_math_unicode(t->head[c]);
    for (slong i = 0; i < t->nrows; i++)
        for (slong c = 0; c < t->ncols; c++) {
            const char *v = t->cell[i * t->ncols + c];
            T.text[i * t->ncols + c] = t->style[c] == EMBZ_COL_CODE && v
                                     ? _embz_render_strdup(v) : _embz_math_unicode(v ? v : DASH);
        }
    slong *cols = malloc((t->ncols + 1) * sizeof(slong));
    slong next = 1;
    while (next < t->ncols || next == 1) {
        /* one group: the family column and as many following columns as fit */
        slong nc = 0;
        cols[nc++] = 0;
        while (next < t->ncols) {
            cols[nc++] = next;
            if (nc > 2 && table_widths(d, &T, cols, nc, WIDTH) > WIDTH + 0.5) {
                nc--;
                break;
            }
            next++;
        }
        table_widths(d, &T, cols, nc, WIDTH);
        double hh = row_height(d, &T, -1, cols, nc), total = hh + 6;
        for (slong i = 0; i < t->nrows; i++)
            total += row_height(d, &T, i, cols, nc);
        /* whole on the next page when it fits there and not here */
        if (d->y + total > BOTTOM && total <= BOTTOM - MARGIN)
            new_page(d);
        else
            need(d, hh + 3 * d->cell * 1.3);
        rule(d, &T, cols, nc);
        draw_row(d, &T, -1, cols, nc, hh);
        for (slong i = 0; i < t->nrows; i++) {
            double h = row_height(d, &T, i, cols, nc);
            if (d->y + h > BOTTOM) {
                rule(d, &T, cols, nc);
                new_page(d);
                rule(d, &T, cols, nc);
                draw_row(d, &T, -1, cols, nc, hh);
            }
            draw_row(d, &T, i, cols, nc, h);
        }
        rule(d, &T, cols, nc);
        d->y += 12;
        if (next >= t->ncols)
            break;
    }
    for (slong i = 0; i < t->ncols * (t->nrows ? t->nrows : 1); i++)
        free(T.text[i]);
    free(T.text);
    for (slong c = 0; c < t->ncols; c++)
        free(T.head[c]);
    free(T.head);
    free(T.w);
    free(cols);
}

/* ------------------------------------------------------------------ figures, blocks */

/* On the page a figure is laid out at most PAGE_FIG layout points wide (its panels narrowed
 * in proportion), so that its text, drawn for the layout, keeps about 8 pt once the figure is
 * scaled to the text width. */
#define PAGE_FIG 650.0

static embz_plot_struct page_figure(const embz_plot_struct *p)
{
    embz_plot_struct c = *p;   /* shares the panels, read only */
    double W, H, z = c.zoom > 0 ? c.zoom : 1;
    embz_plot_size(&W, &H, p);
    if (W / z > PAGE_FIG) {
        double f = PAGE_FIG / (W / z);
        c.panel_width *= f;
        c.panel_height *= sqrt(f);   /* keeps room for the vertical axis label */
    }
    return c;
}

static double figure_height(const doc_t *d, const embz_plot_struct *p, double *scale)
{
    double W = 0, H = 0;
    if (p != NULL)
        embz_plot_size(&W, &H, p);
    if (W <= 0) {
        *scale = 0;
        return 0;
    }
    double s = WIDTH * d->fig_scale / W;
    if (H * s > BOTTOM - MARGIN - 60)
        s = (BOTTOM - MARGIN - 60) / H;
    *scale = s;
    return H * s;
}

static void figure(doc_t *d, const embz_report_figure_struct *g, slong k)
{
    cairo_t *cr = d->cr;
    embz_plot_struct pf;
    if (g->plot != NULL)
        pf = page_figure(g->plot);
    double s, H = figure_height(d, g->plot ? &pf : NULL, &s);
    char *cap = embz_strdup_printf("Figure %ld. %s", (long) k + 1,
                                   g->caption ? g->caption : "");
    font(cr, 9, 0, 0);
    double ch = wrap_height(d, cap, WIDTH, 12);
    need(d, H + ch + 14);
    if (s > 0) {
        double W, H0;
        embz_plot_size(&W, &H0, &pf);
        d->y += 4;
        embz_plot_draw(cr, &pf, MARGIN + (WIDTH - W * s) / 2, d->y, s);
        d->y += H;
    } else if (g->path != NULL || g->svg != NULL) {
        free(cap);
        cap = embz_strdup_printf("Figure %ld (drawn in the HTML report only). %s", (long) k + 1,
                                 g->caption ? g->caption : "");
    }
    font(cr, 9, 0, 0);
    ink(cr, 0.3);
    wrap(d, cap, MARGIN, WIDTH, 12);
    d->y += 10;
    free(cap);
}

typedef struct { const char *term; char *value; int mono; } fact_t;

static void family_block(doc_t *d, const embz_report_struct *r, slong i)
{
    const embz_report_family_struct *f = r->fam + i;
    cairo_t *cr = d->cr;
    fact_t facts[3] = { { "weight", f->weight ? _embz_render_strdup(f->weight) : NULL, 1 },
                        { "verdict", f->verdict ? _embz_render_strdup(f->verdict) : NULL, 0 },
                        { "in short", f->summary ? _embz_render_strdup(f->summary) : NULL, 0 } };
    const double tcol = 62, lh = d->body * 1.42;
    /* its height, to keep it on one page when it fits one */
    double h = 22;
    for (int k = 0; k < 3; k++) {
        if (facts[k].value == NULL)
            continue;
        font(cr, d->body, 0, facts[k].mono);
        h += wrap_height(d, facts[k].value, WIDTH - tcol, lh);
    }
    font(cr, d->body, 0, 0);
    h += paragraphs(d, f->notes, MARGIN, WIDTH, 1) + 8;
    if (h <= BOTTOM - MARGIN)
        need(d, h);
    else
        need(d, 80);
    d->y += 6;
    font(cr, 11, 1, 0);
    ink(cr, 0.1);
    wrap(d, f->name ? f->name : "", MARGIN, WIDTH, 15);
    d->y += 2;
    for (int k = 0; k < 3; k++) {
        if (facts[k].value == NULL)
            continue;
        double y0 = d->y;
        font(cr, d->body, 0, 0);
        ink(cr, 0.42);
        cairo_move_to(cr, MARGIN, d->y + lh * 0.72);
        cairo_show_text(cr, facts[k].term);
        font(cr, d->body, 0, facts[k].mono);
        ink(cr, 0.12);
        d->y = y0;
        wrap(d, facts[k].value, MARGIN + tcol, WIDTH - tcol, lh);
        free(facts[k].value);
    }
    d->y += 3;
    font(cr, d->body, 0, 0);
    ink(cr, 0.12);
    paragraphs(d, f->notes, MARGIN, WIDTH, 0);
    d->y += 4;
}

/* ------------------------------------------------------------------ the document */

static cairo_status_t discard(void *closure, const unsigned char *data, unsigned int len)
{
    (void) closure; (void) data; (void) len;
    return CAIRO_STATUS_SUCCESS;
}

static void p_head(void *ctx, const embz_report_struct *r)
{
    doc_t *d = ctx;
    cairo_t *cr = d->cr;
    font(cr, 18, 1, 0);
    ink(cr, 0.08);
    wrap(d, r->title ? r->title : "embz report", MARGIN, WIDTH, 23);
    if (r->subtitle) {
        font(cr, 10, 0, 0);
        ink(cr, 0.4);
        wrap(d, r->subtitle, MARGIN, WIDTH, 14);
    }
    d->y += 6;
    if (r->answer) {
        font(cr, 11, 0, 0);
        double h = wrap_height(d, r->answer, WIDTH - 20, 15);
        cairo_set_source_rgb(cr, 0.918, 0.953, 0.945);
        cairo_rectangle(cr, MARGIN, d->y, WIDTH, h + 12);
        cairo_fill(cr);
        cairo_set_source_rgb(cr, 0.05, 0.37, 0.4);
        cairo_rectangle(cr, MARGIN, d->y, 3.5, h + 12);
        cairo_fill(cr);
        d->y += 6;
        ink(cr, 0.1);
        wrap(d, r->answer, MARGIN + 12, WIDTH - 20, 15);
        d->y += 14;
    }
}

static void p_table(void *ctx, const embz_report_table_t *t, int kind)
{
    (void) kind;
    draw_table(ctx, t);
}

static int p_figure(void *ctx, const embz_report_figure_struct *g, slong k)
{
    figure(ctx, g, k);
    return EMBZ_OK;
}

static void p_text(void *ctx, const char *s)
{
    doc_t *d = ctx;
    font(d->cr, d->body, 0, 0);
    ink(d->cr, 0.12);
    paragraphs(d, s, MARGIN, WIDTH, 0);
}

static void p_heading(void *ctx, const char *title, const char *id)
{
    (void) id;
    heading(ctx, title, 60);
}

static void p_family(void *ctx, const embz_report_struct *r, slong i)
{
    family_block(ctx, r, i);
}

static void p_footer(void *ctx, const char *s)
{
    doc_t *d = ctx;
    font(d->cr, 8.5, 0, 0);
    need(d, 30);
    d->y += 4;
    ink(d->cr, 0.4);
    double keep = d->body;
    d->body = 8.5;
    paragraphs(d, s, MARGIN, WIDTH, 0);
    d->body = keep;
}

static const embz_report_writer_t writer = {
    p_head, p_table, p_figure, p_text, p_heading, p_family, p_footer
};

/* Lays the document out on surf at the density of level 0..3; returns how full the last page
 * is (0..1) and the number of pages in *pages. */
static double layout(cairo_surface_t *surf, const embz_report_struct *r, int level, int *pages)
{
    static const double body[4] = { 10, 9.6, 9.3, 9 }, cell[4] = { 8.6, 8.3, 8.1, 7.9 };
    static const double figs[4] = { 1, 0.92, 0.85, 0.78 };
    doc_t d = { cairo_create(surf), MARGIN, 1, body[level], cell[level], figs[level] };
    _embz_report_walk(r, &writer, &d);
    *pages = d.page;
    double fill = (d.y - MARGIN) / (BOTTOM - MARGIN);
    cairo_status_t st = cairo_status(d.cr);
    cairo_destroy(d.cr);
    return st == CAIRO_STATUS_SUCCESS ? fill : -1;
}

int embz_report_pdf_write(const embz_report_struct *r, const char *path, embz_err_t *err)
{
    /* trial layouts on a surface that writes nothing: the first density whose last page is
     * at least a fifth full (or that is one page long) is kept */
    int level = 0;
    for (; level < 3; level++) {
        cairo_surface_t *s = cairo_pdf_surface_create_for_stream(discard, NULL, PAGE_W, PAGE_H);
        int pages;
        double fill = layout(s, r, level, &pages);
        cairo_surface_finish(s);
        cairo_surface_destroy(s);
        if (fill < 0 || pages == 1 || fill >= 0.2)
            break;
    }
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
    int pages;
    double fill = layout(surf, r, level, &pages);
    cairo_status_t cst = fill < 0 ? CAIRO_STATUS_WRITE_ERROR : CAIRO_STATUS_SUCCESS;
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
