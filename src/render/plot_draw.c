/* Drawing a figure with cairo: axes, ticks and labels, series, maps and legends. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "render_impl.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

#define TICK_FONT 10.5
#define LABEL_FONT 12.0
#define TITLE_FONT 13.0
#define FIG_TITLE_FONT 15.0
#define LEGEND_FONT 10.5
#define MARKER_R 3.3

static void font(cairo_t *cr, double size, int bold)
{
    cairo_select_font_face(cr, EMBZ_FONT, CAIRO_FONT_SLANT_NORMAL,
                           bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
    cairo_set_font_size(cr, size);
}

static double text_width(cairo_t *cr, const char *text)
{
    cairo_text_extents_t e;
    if (text == NULL || text[0] == 0)
        return 0;
    cairo_text_extents(cr, text, &e);
    return e.x_advance;
}

static void rgb(cairo_t *cr, embz_rgb_t c)
{
    cairo_set_source_rgb(cr, c.r, c.g, c.b);
}

static void grey(cairo_t *cr, double v)
{
    cairo_set_source_rgb(cr, v, v, v);
}

/* align: 0 left, 0.5 centre, 1 right; y is the base line. */
static void show(cairo_t *cr, const char *text, double x, double y, double align)
{
    if (text == NULL || text[0] == 0)
        return;
    cairo_move_to(cr, x - align * text_width(cr, text), y);
    cairo_show_text(cr, text);
}

/* Text no wider than maxw: cut at a UTF-8 boundary with an ellipsis. Returns malloc'ed. */
static char *fit_text(cairo_t *cr, const char *text, double maxw)
{
    size_t l = strlen(text);
    char *buf = malloc(l + 4);
    memcpy(buf, text, l + 1);
    if (text_width(cr, buf) <= maxw)
        return buf;
    while (l > 0) {
        l--;
        while (l > 0 && (((unsigned char) text[l]) & 0xc0) == 0x80)
            l--;
        memcpy(buf, text, l);
        memcpy(buf + l, "\xe2\x80\xa6", 4);
        if (text_width(cr, buf) <= maxw)
            break;
    }
    return buf;
}

/* ---- tick labels: base text plus optional superscript ---- */

static double tick_width(cairo_t *cr, const embz_plot_tick_t *t)
{
    font(cr, TICK_FONT, 0);
    double w = text_width(cr, t->text);
    if (t->sup[0]) {
        font(cr, TICK_FONT * 0.72, 0);
        w += 1 + text_width(cr, t->sup);
        font(cr, TICK_FONT, 0);
    }
    return w;
}

static void tick_show(cairo_t *cr, const embz_plot_tick_t *t, double x, double y, double align)
{
    double w = tick_width(cr, t);
    double x0 = x - align * w;
    font(cr, TICK_FONT, 0);
    show(cr, t->text, x0, y, 0);
    if (t->sup[0]) {
        double bw = text_width(cr, t->text);
        font(cr, TICK_FONT * 0.72, 0);
        show(cr, t->sup, x0 + bw + 1, y - TICK_FONT * 0.42, 0);
        font(cr, TICK_FONT, 0);
    }
}

/* ---- axis ranges ---- */

static void data_range(double *lo, double *hi, const embz_plot_panel_struct *P, int yaxis)
{
    double a = INFINITY, b = -INFINITY;
    for (slong s = 0; s < P->nseries; s++) {
        const embz_plot_series_struct *S = P->series + s;
        for (slong i = 0; i < S->len; i++) {
            double v[3] = { yaxis ? S->y[i] : S->x[i], yaxis ? S->lo[i] : NAN,
                            yaxis ? S->hi[i] : NAN };
            if (!isfinite(S->x[i])
                || (!isfinite(S->y[i]) && !(S->style & EMBZ_PLOT_INTERVALS)))
                continue;
            for (int k = 0; k < 3; k++)
                if (isfinite(v[k])) {
                    a = v[k] < a ? v[k] : a;
                    b = v[k] > b ? v[k] : b;
                }
        }
    }
    if (!(a <= b)) {
        a = 0;
        b = 1;
    }
    if (b - a < 1e-12 * (fabs(a) + fabs(b)) || b == a) {
        double d = (P->xlog && !yaxis) || (P->ylog && yaxis) ? 0.5 : fmax(1e-3, 0.1 * fabs(a));
        a -= d;
        b += d;
    }
    double pad = 0.04 * (b - a);
    *lo = a - pad;
    *hi = b + pad;
}

/* Choose the coarsest-needed tick level whose labels do not collide. length: axis length in
 * points. vertical: labels stacked (height matters) else side by side (widths matter). */
static slong choose_ticks(cairo_t *cr, embz_plot_tick_t *t, double lo, double hi, int logscale,
                          double length, int vertical)
{
    slong best = 0;
    for (int level = 0; level < 60; level++) {
        slong n = embz_plot_ticks(t, lo, hi, logscale, level);
        if (n < 0)
            break;
        best = n;
        /* collect major positions in order */
        int ok = 1;
        double prev_pos = 0, prev_w = 0;
        int have = 0;
        slong nmaj = 0;
        for (slong i = 0; i < n; i++) {
            if (!t[i].major)
                continue;
            nmaj++;
            double pos = (t[i].pos - lo) / (hi - lo) * length;
            double w = vertical ? TICK_FONT * 1.9 : tick_width(cr, t + i) + 14;
            if (have && fabs(pos - prev_pos) < (w + prev_w) / 2)
                ok = 0;
            prev_pos = pos;
            prev_w = w;
            have = 1;
        }
        if (nmaj > 14)
            ok = 0;
        if (ok)
            return n;
    }
    /* nothing fits: keep only the first and last labelled ticks of the coarsest level */
    slong n = best, first = -1, last = -1;
    for (slong i = 0; i < n; i++)
        if (t[i].major) {
            if (first < 0)
                first = i;
            last = i;
        }
    for (slong i = 0; i < n; i++)
        if (t[i].major && i != first && i != last)
            t[i].major = 0, t[i].text[0] = 0, t[i].sup[0] = 0;
    return n;
}

/* ---- markers ---- */

static void marker_path(cairo_t *cr, int m, double x, double y, double r)
{
    switch (m % 6) {
    case 0:
        cairo_new_sub_path(cr);
        cairo_arc(cr, x, y, r, 0, 2 * M_PI);
        break;
    case 1:
        cairo_rectangle(cr, x - 0.88 * r, y - 0.88 * r, 1.76 * r, 1.76 * r);
        break;
    case 2:
        cairo_move_to(cr, x, y - 1.2 * r);
        cairo_line_to(cr, x + 1.1 * r, y + 0.8 * r);
        cairo_line_to(cr, x - 1.1 * r, y + 0.8 * r);
        cairo_close_path(cr);
        break;
    case 3:
        cairo_move_to(cr, x, y - 1.25 * r);
        cairo_line_to(cr, x + 1.0 * r, y);
        cairo_line_to(cr, x, y + 1.25 * r);
        cairo_line_to(cr, x - 1.0 * r, y);
        cairo_close_path(cr);
        break;
    case 4:
        cairo_move_to(cr, x, y + 1.2 * r);
        cairo_line_to(cr, x + 1.1 * r, y - 0.8 * r);
        cairo_line_to(cr, x - 1.1 * r, y - 0.8 * r);
        cairo_close_path(cr);
        break;
    default:
        cairo_move_to(cr, x - r, y - r);
        cairo_line_to(cr, x + r, y + r);
        cairo_move_to(cr, x - r, y + r);
        cairo_line_to(cr, x + r, y - r);
        break;
    }
}

static void draw_marker(cairo_t *cr, int m, double x, double y, embz_rgb_t c)
{
    marker_path(cr, m, x, y, MARKER_R);
    rgb(cr, c);
    if (m % 6 == 5) {
        cairo_set_line_width(cr, 1.6);
        cairo_stroke(cr);
    } else {
        cairo_fill_preserve(cr);
        cairo_set_source_rgb(cr, 1, 1, 1);
        cairo_set_line_width(cr, 0.7);
        cairo_stroke(cr);
    }
}

static void line_style(cairo_t *cr, const embz_plot_series_struct *S)
{
    static const double dash[2] = { 5.0, 3.5 };
    cairo_set_line_width(cr, S->style & EMBZ_PLOT_DASHED ? 1.3 : 1.7);
    if (S->style & EMBZ_PLOT_DASHED)
        cairo_set_dash(cr, dash, 2, 0);
    else
        cairo_set_dash(cr, NULL, 0, 0);
    cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
    cairo_set_line_cap(cr, CAIRO_LINE_CAP_BUTT);
}

/* ---- legend ---- */

typedef struct {
    const char *label;
    embz_rgb_t colour;
    int kind;        /* 0 series, 1 swatch */
    const embz_plot_series_struct *S;
} legend_entry_t;

#define LEGEND_ROW 17.0
#define LEGEND_SAMPLE 24.0

static slong legend_entries(legend_entry_t **out, const embz_plot_panel_struct *P)
{
    slong n = 0;
    legend_entry_t *e = malloc((P->nseries + P->ncat + 1) * sizeof(*e));
    if (P->kind == EMBZ_PANEL_MAP) {
        for (slong c = 0; c < P->ncat; c++) {
            e[n].label = P->cat[c].name ? P->cat[c].name : "";
            e[n].colour = embz_plot_colour(P->cat[c].colour);
            e[n].kind = 1;
            e[n].S = NULL;
            n++;
        }
    } else {
        for (slong s = 0; s < P->nseries; s++)
            if (P->series[s].label != NULL && P->series[s].label[0]) {
                e[n].label = P->series[s].label;
                e[n].colour = embz_plot_colour(P->series[s].colour);
                e[n].kind = 0;
                e[n].S = P->series + s;
                n++;
            }
    }
    *out = e;
    return n;
}

/* Lays the legend out in rows inside width w; draws it when draw != 0. Returns its height. */
static double legend(cairo_t *cr, const embz_plot_panel_struct *P, double x0, double y0,
                     double w, int draw)
{
    legend_entry_t *e;
    slong n = legend_entries(&e, P);
    if (n == 0) {
        free(e);
        return 0;
    }
    font(cr, LEGEND_FONT, 0);
    double x = x0, y = y0 + LEGEND_ROW * 0.5;
    for (slong i = 0; i < n; i++) {
        char *text = fit_text(cr, e[i].label, w - LEGEND_SAMPLE - 12);
        double iw = LEGEND_SAMPLE + 6 + text_width(cr, text) + 16;
        if (x > x0 && x + iw > x0 + w) {
            x = x0;
            y += LEGEND_ROW;
        }
        if (draw) {
            if (e[i].kind == 1) {
                rgb(cr, e[i].colour);
                cairo_rectangle(cr, x + 6, y - 5.5, 12, 11);
                cairo_fill(cr);
            } else {
                const embz_plot_series_struct *S = e[i].S;
                if (S->style & EMBZ_PLOT_BAND) {
                    cairo_set_source_rgba(cr, e[i].colour.r, e[i].colour.g, e[i].colour.b,
                                          0.2);
                    cairo_rectangle(cr, x, y - 5, LEGEND_SAMPLE, 10);
                    cairo_fill(cr);
                }
                if (S->style & EMBZ_PLOT_LINE) {
                    line_style(cr, S);
                    rgb(cr, e[i].colour);
                    cairo_move_to(cr, x, y);
                    cairo_line_to(cr, x + LEGEND_SAMPLE, y);
                    cairo_stroke(cr);
                    cairo_set_dash(cr, NULL, 0, 0);
                }
                if (S->style & EMBZ_PLOT_POINTS)
                    draw_marker(cr, S->marker, x + LEGEND_SAMPLE / 2, y, e[i].colour);
                if (S->style & EMBZ_PLOT_INTERVALS) {
                    double xm = x + LEGEND_SAMPLE / 2;
                    cairo_move_to(cr, xm, y - 6);
                    cairo_line_to(cr, xm, y + 6);
                    cairo_move_to(cr, xm - 3, y - 6);
                    cairo_line_to(cr, xm + 3, y - 6);
                    cairo_move_to(cr, xm - 3, y + 6);
                    cairo_line_to(cr, xm + 3, y + 6);
                    rgb(cr, e[i].colour);
                    cairo_set_line_width(cr, 1.0);
                    cairo_stroke(cr);
                }
            }
            grey(cr, 0.15);
            font(cr, LEGEND_FONT, 0);
            show(cr, text, x + LEGEND_SAMPLE + 6, y + LEGEND_FONT * 0.36, 0);
        }
        x += iw;
        free(text);
    }
    free(e);
    return y - y0 + LEGEND_ROW * 0.5 + 4;
}

/* ---- panels ---- */

static double clampc(double v)
{
    if (v != v)
        return v;
    return v < -1e5 ? -1e5 : v > 1e5 ? 1e5 : v;
}

typedef struct { double px, py, pw, ph, x0, x1, y0, y1; } frame_t;

static double fx(const frame_t *f, double v)
{
    if (v == -INFINITY)
        return f->px - 50;
    return clampc(f->px + (v - f->x0) / (f->x1 - f->x0) * f->pw);
}

static double fy(const frame_t *f, double v)
{
    if (v == -INFINITY)
        return f->py + f->ph + 50;
    if (v == INFINITY)
        return f->py - 50;
    return clampc(f->py + f->ph - (v - f->y0) / (f->y1 - f->y0) * f->ph);
}

static void draw_series(cairo_t *cr, const frame_t *F, const embz_plot_series_struct *S)
{
    embz_rgb_t c = embz_plot_colour(S->colour);
    slong i;
    if (S->style & EMBZ_PLOT_BAND) {
        /* each run of points with finite lo and hi becomes one filled polygon */
        i = 0;
        while (i < S->len) {
            while (i < S->len && !(isfinite(S->x[i]) && !isnan(S->lo[i]) && !isnan(S->hi[i])))
                i++;
            slong j = i;
            while (j < S->len && isfinite(S->x[j]) && !isnan(S->lo[j]) && !isnan(S->hi[j]))
                j++;
            if (j - i >= 2) {
                cairo_move_to(cr, fx(F, S->x[i]), fy(F, S->hi[i]));
                for (slong k = i + 1; k < j; k++)
                    cairo_line_to(cr, fx(F, S->x[k]), fy(F, S->hi[k]));
                for (slong k = j - 1; k >= i; k--)
                    cairo_line_to(cr, fx(F, S->x[k]), fy(F, S->lo[k]));
                cairo_close_path(cr);
                cairo_set_source_rgba(cr, c.r, c.g, c.b, 0.2);
                cairo_fill(cr);
            }
            i = j;
        }
    }
    if (S->style & EMBZ_PLOT_LINE) {
        int pen = 0;
        for (i = 0; i < S->len; i++) {
            if (!isfinite(S->x[i]) || !isfinite(S->y[i])) {
                pen = 0;
                continue;
            }
            if (pen)
                cairo_line_to(cr, fx(F, S->x[i]), fy(F, S->y[i]));
            else
                cairo_move_to(cr, fx(F, S->x[i]), fy(F, S->y[i]));
            pen = 1;
        }
        line_style(cr, S);
        rgb(cr, c);
        cairo_stroke(cr);
        cairo_set_dash(cr, NULL, 0, 0);
    }
    if (!(S->style & EMBZ_PLOT_BAND)) {
        /* error bars, only where they are visible at all */
        for (i = 0; i < S->len; i++) {
            if (!isfinite(S->x[i]) || isnan(S->lo[i]) || isnan(S->hi[i]))
                continue;
            double x = fx(F, S->x[i]), a = fy(F, S->lo[i]), b = fy(F, S->hi[i]);
            if (fabs(a - b) < 2 * MARKER_R + 1 && !(S->style & EMBZ_PLOT_INTERVALS))
                continue;
            cairo_move_to(cr, x, a);
            cairo_line_to(cr, x, b);
            cairo_move_to(cr, x - 3, a);
            cairo_line_to(cr, x + 3, a);
            cairo_move_to(cr, x - 3, b);
            cairo_line_to(cr, x + 3, b);
            rgb(cr, c);
            cairo_set_line_width(cr, 1.0);
            cairo_stroke(cr);
        }
    }
    if (S->style & EMBZ_PLOT_POINTS)
        for (i = 0; i < S->len; i++)
            if (isfinite(S->x[i]) && isfinite(S->y[i]))
                draw_marker(cr, S->marker, fx(F, S->x[i]), fy(F, S->y[i]), c);
}

static void draw_ylabel(cairo_t *cr, const char *text, double x, double ymid, double maxw)
{
    if (text == NULL || text[0] == 0)
        return;
    font(cr, LABEL_FONT, 0);
    char *t = fit_text(cr, text, maxw);
    cairo_save(cr);
    cairo_translate(cr, x, ymid);
    cairo_rotate(cr, -M_PI / 2);
    grey(cr, 0.15);
    show(cr, t, 0, 0, 0.5);
    cairo_restore(cr);
    free(t);
}

static void draw_panel(cairo_t *cr, const embz_plot_panel_struct *P, double x0, double y0,
                       double w, double h)
{
    double top = y0 + 10;
    if (P->title != NULL && P->title[0]) {
        font(cr, TITLE_FONT, 1);
        char *t = fit_text(cr, P->title, w - 20);
        grey(cr, 0.1);
        show(cr, t, x0 + w / 2, top + TITLE_FONT, 0.5);
        free(t);
        top += TITLE_FONT + 12;
    }
    top += 8;   /* room for the top tick label */
    double leg_h = legend(cr, P, x0 + 16, 0, w - 32, 0);
    double xlab_h = P->xlabel != NULL && P->xlabel[0] ? LABEL_FONT + 8 : 0;
    double bottom = 8 + TICK_FONT * 1.5 + 6 + xlab_h + (leg_h > 0 ? leg_h + 8 : 0) + 6;
    double ph = y0 + h - bottom - top;
    if (ph < 40)
        ph = 40;
    double ylab_w = P->ylabel != NULL && P->ylabel[0] ? LABEL_FONT + 10 : 0;

    frame_t F;
    embz_plot_tick_t *xt = malloc(EMBZ_PLOT_MAX_TICKS * sizeof(*xt));
    embz_plot_tick_t *yt = malloc(EMBZ_PLOT_MAX_TICKS * sizeof(*yt));
    slong nx = 0, ny = 0;
    double left;

    if (P->kind == EMBZ_PANEL_MAP) {
        font(cr, TICK_FONT, 0);
        double maxw = 0;
        for (slong i = 0; i < P->ny; i++) {
            double tw = text_width(cr, P->yticks[i]);
            maxw = tw > maxw ? tw : maxw;
        }
        if (maxw > w * 0.25)
            maxw = w * 0.25;
        left = 12 + ylab_w + maxw + 8;
    } else {
        if (P->have_yrange)
            F.y0 = P->ymin, F.y1 = P->ymax;
        else
            data_range(&F.y0, &F.y1, P, 1);
        ny = choose_ticks(cr, yt, F.y0, F.y1, P->ylog, ph, 1);
        double maxw = 0;
        for (slong i = 0; i < ny; i++)
            if (yt[i].major) {
                double tw = tick_width(cr, yt + i);
                maxw = tw > maxw ? tw : maxw;
            }
        left = 12 + ylab_w + maxw + 8;
    }
    F.px = x0 + left;
    F.py = top;
    F.pw = w - left - 24;
    F.ph = ph;
    if (F.pw < 40)
        F.pw = 40;

    /* plot area */
    cairo_set_source_rgb(cr, 0.985, 0.985, 0.98);
    cairo_rectangle(cr, F.px, F.py, F.pw, F.ph);
    cairo_fill(cr);

    if (P->kind == EMBZ_PANEL_MAP) {
        double cw = F.pw / P->nx, ch = F.ph / P->ny;
        for (slong iy = 0; iy < P->ny; iy++)
            for (slong ix = 0; ix < P->nx; ix++) {
                int c = P->cells[iy * P->nx + ix];
                if (c < 0 || c >= P->ncat)
                    cairo_set_source_rgb(cr, 1, 1, 1);
                else
                    rgb(cr, embz_plot_colour(P->cat[c].colour));
                /* row 0 at the bottom */
                cairo_rectangle(cr, F.px + ix * cw, F.py + F.ph - (iy + 1) * ch, cw, ch);
                cairo_fill(cr);
            }
        if (cw >= 4 && ch >= 4) {
            cairo_set_source_rgb(cr, 1, 1, 1);
            cairo_set_line_width(cr, cw < 10 || ch < 10 ? 0.5 : 1.0);
            for (slong ix = 1; ix < P->nx; ix++) {
                cairo_move_to(cr, F.px + ix * cw, F.py);
                cairo_line_to(cr, F.px + ix * cw, F.py + F.ph);
            }
            for (slong iy = 1; iy < P->ny; iy++) {
                cairo_move_to(cr, F.px, F.py + iy * ch);
                cairo_line_to(cr, F.px + F.pw, F.py + iy * ch);
            }
            cairo_stroke(cr);
        }
        /* labels at cell centres, every m-th one so that they do not collide */
        font(cr, TICK_FONT, 0);
        double maxw = 0;
        for (slong i = 0; i < P->nx; i++) {
            double tw = text_width(cr, P->xticks[i]);
            maxw = tw > maxw ? tw : maxw;
        }
        slong mx = 1;
        while (mx < P->nx && mx * cw < maxw + 10)
            mx++;
        slong my = 1;
        while (my < P->ny && my * ch < TICK_FONT * 1.6)
            my++;
        grey(cr, 0.2);
        for (slong i = 0; i < P->nx; i += mx)
            show(cr, P->xticks[i], F.px + (i + 0.5) * cw, F.py + F.ph + 8 + TICK_FONT, 0.5);
        for (slong i = 0; i < P->ny; i += my) {
            char *t = fit_text(cr, P->yticks[i], left - ylab_w - 20);
            show(cr, t, F.px - 8, F.py + F.ph - (i + 0.5) * ch + TICK_FONT * 0.36, 1);
            free(t);
        }
    } else {
        if (P->have_xrange)
            F.x0 = P->xmin, F.x1 = P->xmax;
        else
            data_range(&F.x0, &F.x1, P, 0);
        nx = choose_ticks(cr, xt, F.x0, F.x1, P->xlog, F.pw, 0);

        /* grid lines at labelled ticks */
        cairo_set_line_width(cr, 0.6);
        cairo_set_source_rgb(cr, 0.88, 0.88, 0.88);
        for (slong i = 0; i < nx; i++)
            if (xt[i].major && xt[i].pos >= F.x0 && xt[i].pos <= F.x1) {
                double X = fx(&F, xt[i].pos);
                cairo_move_to(cr, X, F.py);
                cairo_line_to(cr, X, F.py + F.ph);
            }
        for (slong i = 0; i < ny; i++)
            if (yt[i].major && yt[i].pos >= F.y0 && yt[i].pos <= F.y1) {
                double Y = fy(&F, yt[i].pos);
                cairo_move_to(cr, F.px, Y);
                cairo_line_to(cr, F.px + F.pw, Y);
            }
        cairo_stroke(cr);

        cairo_save(cr);
        cairo_rectangle(cr, F.px, F.py, F.pw, F.ph);
        cairo_clip(cr);
        for (slong s = 0; s < P->nseries; s++)
            draw_series(cr, &F, P->series + s);
        cairo_restore(cr);

        /* ticks and their labels */
        grey(cr, 0.3);
        cairo_set_line_width(cr, 0.9);
        for (slong i = 0; i < nx; i++) {
            if (xt[i].pos < F.x0 - 1e-9 || xt[i].pos > F.x1 + 1e-9)
                continue;
            double X = fx(&F, xt[i].pos);
            cairo_move_to(cr, X, F.py + F.ph);
            cairo_line_to(cr, X, F.py + F.ph + (xt[i].major ? 5 : 3));
        }
        for (slong i = 0; i < ny; i++) {
            if (yt[i].pos < F.y0 - 1e-9 || yt[i].pos > F.y1 + 1e-9)
                continue;
            double Y = fy(&F, yt[i].pos);
            cairo_move_to(cr, F.px, Y);
            cairo_line_to(cr, F.px - (yt[i].major ? 5 : 3), Y);
        }
        cairo_stroke(cr);
        grey(cr, 0.2);
        for (slong i = 0; i < nx; i++)
            if (xt[i].major && xt[i].pos >= F.x0 - 1e-9 && xt[i].pos <= F.x1 + 1e-9)
                tick_show(cr, xt + i, fx(&F, xt[i].pos), F.py + F.ph + 9 + TICK_FONT, 0.5);
        for (slong i = 0; i < ny; i++)
            if (yt[i].major && yt[i].pos >= F.y0 - 1e-9 && yt[i].pos <= F.y1 + 1e-9)
                tick_show(cr, yt + i, F.px - 8, fy(&F, yt[i].pos) + TICK_FONT * 0.36, 1);
    }

    /* axes: left and bottom lines */
    grey(cr, 0.3);
    cairo_set_line_width(cr, 1.0);
    cairo_move_to(cr, F.px, F.py);
    cairo_line_to(cr, F.px, F.py + F.ph);
    cairo_line_to(cr, F.px + F.pw, F.py + F.ph);
    cairo_stroke(cr);

    /* axis labels */
    double yb = F.py + F.ph + 8 + TICK_FONT * 1.5 + 6;
    if (xlab_h > 0) {
        font(cr, LABEL_FONT, 0);
        char *t = fit_text(cr, P->xlabel, F.pw);
        grey(cr, 0.15);
        show(cr, t, F.px + F.pw / 2, yb + LABEL_FONT, 0.5);
        free(t);
        yb += xlab_h;
    }
    draw_ylabel(cr, P->ylabel, x0 + 12 + LABEL_FONT, F.py + F.ph / 2, F.ph);
    if (leg_h > 0)
        legend(cr, P, x0 + 16, yb + 6, w - 32, 1);
    free(xt);
    free(yt);
}

void embz_plot_draw(cairo_t *cr, const embz_plot_struct *fig, double x, double y, double s)
{
    double W, H, z = fig->zoom > 0 ? fig->zoom : 1;
    embz_plot_size(&W, &H, fig);
    W /= z;   /* the layout is in unzoomed points */
    H /= z;
    cairo_save(cr);
    cairo_translate(cr, x, y);
    cairo_scale(cr, s * z, s * z);
    cairo_set_source_rgb(cr, 1, 1, 1);
    cairo_rectangle(cr, 0, 0, W, H);
    cairo_fill(cr);
    double top = 0;
    if (fig->title != NULL && fig->title[0]) {
        font(cr, FIG_TITLE_FONT, 1);
        char *t = fit_text(cr, fig->title, W - 24);
        grey(cr, 0.1);
        show(cr, t, W / 2, 12 + FIG_TITLE_FONT, 0.5);
        free(t);
        top = 34;
    }
    slong cols = fig->columns < 1 ? 1 : fig->columns;
    if (cols > fig->npanels)
        cols = fig->npanels < 1 ? 1 : fig->npanels;
    for (slong p = 0; p < fig->npanels; p++) {
        double px = (p % cols) * fig->panel_width;
        double py = top + (p / cols) * fig->panel_height;
        draw_panel(cr, fig->panels + p, px, py, fig->panel_width, fig->panel_height);
    }
    cairo_restore(cr);
}
