/* Figures: panels, series, maps; the colour palette; tick placement. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "embz/render.h"

/* The series palette. Chosen by us for readers with red-green colour vision deficiency: the
 * colours differ in lightness and along the blue-yellow axis, which dichromats keep. In a
 * simulation of protanopia and deuteranopia every pair of the 12 stays at least about 18 CIELAB
 * units apart (tests/test_render.c checks this). Markers and dash patterns differ as well, so no
 * series is told apart by colour alone. */
static const embz_rgb_t palette[EMBZ_PLOT_NCOLOURS] = {
    { 0x1b / 255.0, 0x4f / 255.0, 0x9c / 255.0 },   /* deep blue */
    { 0xe0 / 255.0, 0x86 / 255.0, 0x00 / 255.0 },   /* orange */
    { 0x5a / 255.0, 0xa9 / 255.0, 0xe0 / 255.0 },   /* sky blue */
    { 0x6e / 255.0, 0x5a / 255.0, 0x1e / 255.0 },   /* dark olive */
    { 0x2a / 255.0, 0x7a / 255.0, 0x6a / 255.0 },   /* teal */
    { 0xd4 / 255.0, 0x77 / 255.0, 0xa8 / 255.0 },   /* rose */
    /* six more, for reports of up to 12 families (each picked in turn as the candidate of
     * lightness 28..72 and chroma <= 60 farthest, in the worst of the three views, from the
     * colours before it) */
    { 0x99 / 255.0, 0xbb / 255.0, 0x77 / 255.0 },   /* sage */
    { 0x00 / 255.0, 0x99 / 255.0, 0xff / 255.0 },   /* azure */
    { 0x33 / 255.0, 0x44 / 255.0, 0x66 / 255.0 },   /* slate */
    { 0x88 / 255.0, 0x00 / 255.0, 0x33 / 255.0 },   /* wine */
    { 0xbb / 255.0, 0xaa / 255.0, 0x99 / 255.0 },   /* taupe */
    { 0x66 / 255.0, 0x88 / 255.0, 0x55 / 255.0 },   /* moss */
};

embz_rgb_t embz_plot_colour(long k)
{
    embz_rgb_t c;
    if (k >= 0)
        return palette[k % EMBZ_PLOT_NCOLOURS];
    if (k == EMBZ_PLOT_LIGHT)
        c.r = c.g = c.b = 0.84;
    else if (k == EMBZ_PLOT_DARK)
        c.r = c.g = c.b = 0.2;
    else
        c.r = c.g = c.b = 0.5;
    return c;
}

char *_embz_render_strdup(const char *s)
{
    if (s == NULL)
        return NULL;
    size_t l = strlen(s) + 1;
    char *d = malloc(l);
    memcpy(d, s, l);
    return d;
}

#define sdup _embz_render_strdup

void embz_plot_init(embz_plot_t fig, const char *title)
{
    memset(fig, 0, sizeof(*fig));
    fig->title = sdup(title);
    fig->columns = 1;
    fig->panel_width = 640;
    fig->panel_height = 420;
    fig->png_scale = 1.5;
    fig->zoom = 1;
}

void embz_plot_clear(embz_plot_t fig)
{
    for (slong p = 0; p < fig->npanels; p++) {
        embz_plot_panel_struct *P = fig->panels + p;
        free(P->title); free(P->xlabel); free(P->ylabel);
        for (slong s = 0; s < P->nseries; s++) {
            embz_plot_series_struct *S = P->series + s;
            free(S->label); free(S->x); free(S->y); free(S->lo); free(S->hi);
        }
        free(P->series);
        for (slong i = 0; i < P->nx && P->xticks; i++)
            free(P->xticks[i]);
        for (slong i = 0; i < P->ny && P->yticks; i++)
            free(P->yticks[i]);
        free(P->xticks); free(P->yticks); free(P->cells);
        for (slong c = 0; c < P->ncat; c++)
            free(P->cat[c].name);
        free(P->cat);
    }
    free(fig->panels);
    free(fig->title);
    memset(fig, 0, sizeof(*fig));
}

static embz_plot_panel_struct *new_panel(embz_plot_t fig, const char *title, const char *xlabel,
                                         const char *ylabel)
{
    fig->panels = realloc(fig->panels, (fig->npanels + 1) * sizeof(*fig->panels));
    embz_plot_panel_struct *P = fig->panels + fig->npanels++;
    memset(P, 0, sizeof(*P));
    P->title = sdup(title);
    P->xlabel = sdup(xlabel);
    P->ylabel = sdup(ylabel);
    return P;
}

slong embz_plot_add_panel(embz_plot_t fig, const char *title, const char *xlabel,
                          const char *ylabel, int xlog, int ylog)
{
    embz_plot_panel_struct *P = new_panel(fig, title, xlabel, ylabel);
    P->kind = EMBZ_PANEL_XY;
    P->xlog = xlog != 0;
    P->ylog = ylog != 0;
    return fig->npanels - 1;
}

void embz_plot_set_xrange(embz_plot_t fig, slong panel, double lo, double hi)
{
    embz_plot_panel_struct *P = fig->panels + panel;
    P->have_xrange = 1;
    P->xmin = lo;
    P->xmax = hi;
}

void embz_plot_set_yrange(embz_plot_t fig, slong panel, double lo, double hi)
{
    embz_plot_panel_struct *P = fig->panels + panel;
    P->have_yrange = 1;
    P->ymin = lo;
    P->ymax = hi;
}

slong embz_plot_add_series(embz_plot_t fig, slong panel, const char *label, int style,
                           long colour)
{
    embz_plot_panel_struct *P = fig->panels + panel;
    slong auto_colour = 0;
    for (slong s = 0; s < P->nseries; s++)
        if (P->series[s].colour >= 0)
            auto_colour++;
    P->series = realloc(P->series, (P->nseries + 1) * sizeof(*P->series));
    embz_plot_series_struct *S = P->series + P->nseries;
    memset(S, 0, sizeof(*S));
    S->label = sdup(label);
    S->style = style;
    S->colour = colour < -100 ? (long) auto_colour : colour;
    S->marker = (int) (P->nseries % 6);
    return P->nseries++;
}

void embz_plot_push(embz_plot_t fig, slong panel, slong series, double x, double y,
                    double lo, double hi)
{
    embz_plot_series_struct *S = fig->panels[panel].series + series;
    if (S->len == S->alloc) {
        S->alloc = S->alloc ? 2 * S->alloc : 16;
        S->x = realloc(S->x, S->alloc * sizeof(double));
        S->y = realloc(S->y, S->alloc * sizeof(double));
        S->lo = realloc(S->lo, S->alloc * sizeof(double));
        S->hi = realloc(S->hi, S->alloc * sizeof(double));
    }
    S->x[S->len] = x;
    S->y[S->len] = y;
    S->lo[S->len] = lo;
    S->hi[S->len] = hi;
    S->len++;
}

slong embz_plot_add_map(embz_plot_t fig, const char *title, const char *xlabel,
                        const char *ylabel, slong nx, const char *const *xticks,
                        slong ny, const char *const *yticks)
{
    embz_plot_panel_struct *P = new_panel(fig, title, xlabel, ylabel);
    P->kind = EMBZ_PANEL_MAP;
    P->nx = nx < 1 ? 1 : nx;
    P->ny = ny < 1 ? 1 : ny;
    P->xticks = calloc(P->nx, sizeof(char *));
    P->yticks = calloc(P->ny, sizeof(char *));
    for (slong i = 0; i < P->nx; i++)
        P->xticks[i] = sdup(xticks != NULL && i < nx && xticks[i] ? xticks[i] : "");
    for (slong i = 0; i < P->ny; i++)
        P->yticks[i] = sdup(yticks != NULL && i < ny && yticks[i] ? yticks[i] : "");
    P->cells = malloc(P->nx * P->ny * sizeof(int));
    for (slong i = 0; i < P->nx * P->ny; i++)
        P->cells[i] = -1;
    return fig->npanels - 1;
}

slong embz_plot_add_category(embz_plot_t fig, slong panel, const char *name, long colour)
{
    embz_plot_panel_struct *P = fig->panels + panel;
    P->cat = realloc(P->cat, (P->ncat + 1) * sizeof(*P->cat));
    P->cat[P->ncat].name = sdup(name);
    P->cat[P->ncat].colour = colour;
    return P->ncat++;
}

void embz_plot_set_cell(embz_plot_t fig, slong panel, slong ix, slong iy, int category)
{
    embz_plot_panel_struct *P = fig->panels + panel;
    if (ix >= 0 && ix < P->nx && iy >= 0 && iy < P->ny)
        P->cells[iy * P->nx + ix] = category;
}

void embz_plot_size(double *width, double *height, const embz_plot_t fig)
{
    slong cols = fig->columns < 1 ? 1 : fig->columns;
    slong np = fig->npanels < 1 ? 1 : fig->npanels;
    if (cols > np)
        cols = np;
    slong rows = (np + cols - 1) / cols;
    double z = fig->zoom > 0 ? fig->zoom : 1;
    *width = z * cols * fig->panel_width;
    *height = z * (rows * fig->panel_height + (fig->title != NULL && fig->title[0] ? 34 : 0));
}

/* ------------------------------------------------------------------ ticks */

static void log_label(embz_plot_tick_t *t, long mant, long k)
{
    if (k == 0 || k == 1) {
        long v = k == 0 ? mant : 10 * mant;
        snprintf(t->text, sizeof(t->text), "%ld", v);
        t->sup[0] = 0;
    } else {
        if (mant == 1)
            snprintf(t->text, sizeof(t->text), "10");
        else
            snprintf(t->text, sizeof(t->text), "%ld\xc3\x97" "10", mant);   /* "2×10" */
        snprintf(t->sup, sizeof(t->sup), "%ld", k);
    }
}

static slong push_tick(embz_plot_tick_t *ticks, slong n, double pos, int major)
{
    if (n >= EMBZ_PLOT_MAX_TICKS)
        return n;
    memset(ticks + n, 0, sizeof(*ticks));
    ticks[n].pos = pos;
    ticks[n].major = major;
    return n + 1;
}

/* 1, 2, 5, 10, 20, 50, ... for j = 0, 1, 2, ... */
static double step125(int j)
{
    static const double m[3] = { 1, 2, 5 };
    return m[j % 3] * pow(10.0, j / 3);
}

static slong linear_ticks(embz_plot_tick_t *ticks, double lo, double hi, int level)
{
    double span = hi - lo;
    if (!(span > 0))
        return -1;
    /* start at the step giving about 12 ticks, coarser with level */
    double raw = span / 12;
    int e = (int) floor(log10(raw));
    double base = pow(10.0, e);
    double step = base;
    int j = 0;
    while (step < raw) {
        j++;
        step = step125(j) * base;
    }
    step = step125(j + level) * base;
    /* allow non-integer exponents of ten in step125 via base */
    double first = ceil(lo / step - 1e-9) * step;
    if (first > hi + 1e-9 * step)
        return -1;
    int dec = (int) ceil(-log10(step) - 1e-9);
    if (dec < 0)
        dec = 0;
    slong n = 0;
    for (double v = first; v <= hi + 1e-9 * step && n < EMBZ_PLOT_MAX_TICKS; v += step) {
        double vv = fabs(v) < 1e-12 * step ? 0.0 : v;
        n = push_tick(ticks, n, vv, 1);
        if (fabs(vv) >= 1e6 || (vv != 0 && fabs(vv) < 1e-4))
            snprintf(ticks[n - 1].text, sizeof(ticks[n - 1].text), "%.3g", vv);
        else
            snprintf(ticks[n - 1].text, sizeof(ticks[n - 1].text), "%.*f", dec, vv);
    }
    /* half-step minor ticks */
    slong nmaj = n;
    for (slong i = 0; i < nmaj; i++) {
        double v = ticks[i].pos - step / 2;
        if (v >= lo)
            n = push_tick(ticks, n, v, 0);
    }
    if (nmaj > 0 && ticks[nmaj - 1].pos + step / 2 <= hi)
        n = push_tick(ticks, n, ticks[nmaj - 1].pos + step / 2, 0);
    return n;
}

slong embz_plot_ticks(embz_plot_tick_t *ticks, double lo, double hi, int logscale, int level)
{
    if (!(lo < hi) || !isfinite(lo) || !isfinite(hi) || level < 0)
        return -1;
    if (!logscale)
        return linear_ticks(ticks, lo, hi, level);

    double span = hi - lo;
    slong n = 0;
    long k0 = (long) floor(lo), k1 = (long) ceil(hi);
    if (level == 0 && span <= 3.0) {
        /* 1, 2, 5 times powers of ten labelled, the other integers as minor ticks */
        slong nmaj = 0;
        for (long k = k0; k <= k1; k++)
            for (long m = 1; m <= 9; m++) {
                double pos = k + log10((double) m);
                if (pos < lo - 1e-9 || pos > hi + 1e-9)
                    continue;
                int major = (m == 1 || m == 2 || m == 5);
                n = push_tick(ticks, n, pos, major);
                if (major) {
                    log_label(ticks + n - 1, m, k);
                    nmaj++;
                }
            }
        if (nmaj >= 2)
            return n;
        /* under a factor of about 2.5: plain linear ticks on the value itself */
        if (fabs(lo) < 300 && fabs(hi) < 300) {
            embz_plot_tick_t lin[EMBZ_PLOT_MAX_TICKS];
            slong m = linear_ticks(lin, pow(10.0, lo), pow(10.0, hi), 0);
            n = 0;
            for (slong i = 0; i < m; i++)
                if (lin[i].major && lin[i].pos > 0) {
                    ticks[n] = lin[i];
                    ticks[n].pos = log10(lin[i].pos);
                    n++;
                }
            return n >= 1 ? n : -1;
        }
        return n;
    }
    int j = span <= 3.0 ? level - 1 : level;     /* decade step: 1, 2, 5, 10, ... */
    double D = step125(j);
    if (D > 1e15)
        return -1;
    double minor = D == 1 ? 0 : (step125(j) / (j % 3 == 1 ? 2 : 5));
    double first = ceil(lo / D - 1e-9) * D;
    slong nmaj = 0;
    for (double k = first; k <= hi + 1e-9; k += D) {
        n = push_tick(ticks, n, k, 1);
        log_label(ticks + n - 1, 1, (long) llround(k));
        nmaj++;
    }
    if (nmaj == 0)
        return -1;
    if (D == 1) {
        if (span <= 12)
            for (long k = k0; k <= k1; k++)
                for (long m = 2; m <= 9; m++) {
                    double pos = k + log10((double) m);
                    if (pos >= lo && pos <= hi)
                        n = push_tick(ticks, n, pos, 0);
                }
    } else if (span / minor <= 300) {
        for (double k = floor(lo / minor) * minor; k <= hi; k += minor) {
            double r = fmod(fabs(k), D);
            if (k >= lo && r > 1e-9 && D - r > 1e-9)
                n = push_tick(ticks, n, k, 0);
        }
    }
    return n;
}
