/* The report and its figures for `embz report` and `embz demo`: the rows of compare.c (the
 * library's comparison, made into words there) become the report struct and the figures,
 * with the optimum's row and curve for uniform targets. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "cli.h"
#include "compare_impl.h"

/* log10 of the ball's lower end, midpoint and upper end (doubles, for drawing). */
static void arb_log10_d(double *lo, double *mid, double *hi, const arb_t x)
{
    arb_t t;
    arf_t b;
    arb_init(t);
    arf_init(b);
    double *out[3] = { lo, mid, hi };
    for (int k = 0; k < 3; k++) {
        if (k == 0) arb_get_lbound_arf(b, x, 64);
        else if (k == 1) arf_set(b, arb_midref(x));
        else arb_get_ubound_arf(b, x, 64);
        if (arf_sgn(b) <= 0) {
            *out[k] = k == 0 ? -INFINITY : NAN;
            continue;
        }
        arb_set_arf(t, b);
        arb_log_base_ui(t, t, 10, 64);
        *out[k] = arf_get_d(arb_midref(t), ARF_RND_NEAR);
    }
    arf_clear(b);
    arb_clear(t);
}

static double fmpz_log10_d(const fmpz_t n)
{
    arb_t x;
    arb_init(x);
    arb_set_fmpz(x, n);
    arb_log_base_ui(x, x, 10, 64);
    double d = arf_get_d(arb_midref(x), ARF_RND_NEAR);
    arb_clear(x);
    return d;
}

void cli_plot_envelopes(embz_plot_t fig, slong pw, double eps, const char *eps_label,
                        double LB, double ymin, double ymax)
{
    char l1[96], l2[96];
    snprintf(l1, sizeof(l1), "x^(-1-%.60s)", eps_label);
    snprintf(l2, sizeof(l2), "x^(-1+%.60s)", eps_label);
    slong e1 = embz_plot_add_series(fig, pw, l1, EMBZ_PLOT_LINE | EMBZ_PLOT_DASHED, EMBZ_PLOT_GREY);
    slong e2 = embz_plot_add_series(fig, pw, l2, EMBZ_PLOT_LINE | EMBZ_PLOT_DASHED, EMBZ_PLOT_DARK);
    embz_plot_push(fig, pw, e1, 0, 0, NAN, NAN);
    embz_plot_push(fig, pw, e1, LB, (-1 - eps) * LB, NAN, NAN);
    embz_plot_push(fig, pw, e2, 0, 0, NAN, NAN);
    embz_plot_push(fig, pw, e2, LB, (-1 + eps) * LB, NAN, NAN);
    /* weights that fall far below the envelopes are clipped, so the envelopes stay readable */
    double lo_env = (-1 - eps) * LB, floor_y = 3 * lo_env - 1;
    double y0 = ymin < lo_env ? (ymin > floor_y ? ymin : floor_y) : lo_env;
    double y1 = ymax > 0 ? ymax : 0;
    double pad = 0.04 * (y1 - y0 + 1e-9);
    embz_plot_set_yrange(fig, pw, y0 - pad, y1 + pad);
}

int cli_plot_optimum(embz_plot_t fig, slong p, const fmpz *ns, const double *xs, slong len,
                     const embz_target_t q, int strict, embz_err_t *err)
{
    slong s = embz_plot_add_series(fig, p, "optimum", EMBZ_PLOT_LINE | EMBZ_PLOT_DASHED,
                                   EMBZ_PLOT_GREY);
    embz_optimal_result_t res;
    arb_t x;
    arb_init(x);
    int st = EMBZ_OK;
    for (slong j = 0; j < len && st == EMBZ_OK; j++) {
        embz_optimal_result_init(res);
        embz_err_clear(err);
        int sj = embz_optimal_closed(res, ns + j, q, err);
        if (sj == EMBZ_OK) {
            double lo, mid, hi;
            arb_set_fmpq(x, res->upper, 64);
            arb_log10_d(&lo, &mid, &hi, x);
            if (isfinite(mid)) embz_plot_push(fig, p, s, xs[j], mid, NAN, NAN);
        } else if (strict) {
            st = sj;
        }
        embz_optimal_result_clear(res);
    }
    arb_clear(x);
    return st;
}

static void style_series(embz_plot_t fig, slong panel, slong s, long i)
{
    fig->panels[panel].series[s].marker = (int) ((i + i / EMBZ_PLOT_NCOLOURS) % 6);
}

/* Figures of the report: drawn 1.25 times larger than their layout so that tick labels are
 * about 13 px at the page width (figure width about 1050 pt). */
#define REPORT_ZOOM 1.25
#define REPORT_FIG_W 840.0

/* The optimum's curve OPT_n (exact closed form, docs/optimal.md) at the sizes of the first
 * computed sweep, as a dashed grey line labelled 'optimum'; uniform targets only. */
static void optimum_series(embz_plot_t fig, slong p, const cli_compare_row_t *rows,
                           const long *order, long nfam, const embz_target_t q, int xmode)
{
    if (q->kind != EMBZ_TARGET_UNIFORM) return;
    const embz_sweep_struct *sw = NULL;
    for (long k = 0; k < nfam && sw == NULL; k++)
        if (rows[order[k]].d.status == EMBZ_OK) sw = _cli_cmp_target_sweep(rows + order[k]);
    if (sw == NULL) return;
    fmpz *ns = _fmpz_vec_init(sw->len);
    double *xs = malloc((size_t) (sw->len > 0 ? sw->len : 1) * sizeof(double));
    slong m = 0;
    for (slong j = 0; j < sw->len; j++) {
        const embz_sweep_point_struct *pt = sw->pts + j;
        if (!(pt->log_n > 0)) continue;
        fmpz_set(ns + m, pt->n);
        xs[m++] = xmode == 0 ? pt->log_n / log(10.0) : log10(pt->log_n);
    }
    embz_err_t err;
    embz_err_clear(&err);
    cli_plot_optimum(fig, p, ns, xs, m, q, 0, &err);
    free(xs);
    _fmpz_vec_clear(ns, sw->len);
}

/* which families a panel shows: 1 the embezzlers, 0 the others, -1 all */
static int in_group(const cli_compare_row_t *r, int group)
{
    if (r->d.status != EMBZ_OK) return 0;
    int e = r->d.c->verdict == EMBZ_VERDICT_EMBEZZLER;
    return group < 0 || e == group;
}

/* Error against n (xmode 0) or against ln n (xmode 1), both on log axes, for the families of
 * one group, with the fits, the first goal as a solid dark line and, for a uniform target,
 * the optimum. Returns the panel, or -1 when the group is empty. */
static slong error_panel(embz_plot_t fig, const cli_compare_row_t *rows, const long *order,
                         long nfam, const embz_target_t q, int xmode, int group,
                         const char *title, const cli_compare_opts_t *o)
{
    int any = 0;
    for (long k = 0; k < nfam; k++) any |= in_group(rows + order[k], group);
    if (!any) return -1;
    slong p = embz_plot_add_panel(fig, title, xmode == 0 ? "size n" : "ln n",
                                  "E\xe2\x82\x99", 1, 1);
    double gx0 = INFINITY, gx1 = -INFINITY;
    for (long k = 0; k < nfam; k++) {
        const cli_compare_row_t *r = rows + order[k];
        if (!in_group(r, group)) continue;
        const embz_sweep_struct *sw = _cli_cmp_target_sweep(r);
        slong s = embz_plot_add_series(fig, p, r->label, EMBZ_PLOT_POINTS, k);
        style_series(fig, p, s, k);
        double xmin = INFINITY, xmax = -INFINITY;
        for (slong j = 0; j < sw->len; j++) {
            const embz_sweep_point_struct *pt = sw->pts + j;
            if (pt->status != EMBZ_OK || !(pt->log_n > 0)) continue;
            double lo, mid, hi;
            arb_log10_d(&lo, &mid, &hi, pt->error);
            if (!isfinite(mid)) continue;
            double x = xmode == 0 ? pt->log_n / log(10.0) : log10(pt->log_n);
            embz_plot_push(fig, p, s, x, mid, lo, hi);
            xmin = x < xmin ? x : xmin;
            xmax = x > xmax ? x : xmax;
        }
        gx0 = xmin < gx0 ? xmin : gx0;
        gx1 = xmax > gx1 ? xmax : gx1;
        const embz_fitset_struct *fs = _cli_cmp_target_fits(r);
        int law = fs == NULL ? EMBZ_LAW_NONE : r->d.own_sweep ? fs->best : r->d.c->law;
        if (law == EMBZ_LAW_NONE || fs->m < 2 || !(xmax > xmin)) continue;
        const embz_fit_struct *f = fs->fits + law;
        if (!f->ok || !isfinite(f->C) || !isfinite(f->g)) continue;
        slong sf = embz_plot_add_series(fig, p, NULL, EMBZ_PLOT_LINE | EMBZ_PLOT_DASHED, k);
        /* drawn over the range the fit used */
        double ln_lo = fs->logn[0], ln_hi = fs->logn[fs->m - 1];
        for (int j = 0; j <= 60; j++) {
            double ln = exp(log(ln_lo) + (log(ln_hi) - log(ln_lo)) * j / 60.0);
            double v = _cli_cmp_law_value(law, f, ln);
            double x = xmode == 0 ? ln / log(10.0) : log10(ln);
            embz_plot_push(fig, p, sf, x, v > 0 ? log10(v) : NAN, NAN, NAN);
        }
    }
    fmpq_t g;
    fmpq_init(g);
    if (o->ngoals > 0 && embz_number_parse(g, o->goal_text[0]) == EMBZ_OK && fmpq_sgn(g) > 0
        && gx1 > gx0) {
        char label[96];
        snprintf(label, sizeof(label), "goal %.60s", o->goal_text[0]);
        slong sg = embz_plot_add_series(fig, p, label, EMBZ_PLOT_LINE, EMBZ_PLOT_DARK);
        double gy = log10(fmpq_get_d(g));
        embz_plot_push(fig, p, sg, gx0, gy, NAN, NAN);
        embz_plot_push(fig, p, sg, gx1, gy, NAN, NAN);
    }
    fmpq_clear(g);
    optimum_series(fig, p, rows, order, nfam, q, xmode);
    return p;
}

/* One small panel per family: its weights against the two envelopes (no legend; the caption
 * names the lines). */
static void weights_panels(embz_plot_t fig, const cli_compare_row_t *rows, const long *order,
                           long nfam, const cli_compare_opts_t *o)
{
    slong nw = 40;
    double LB = fmpz_log10_d(o->to);
    fmpz_t x, one;
    arb_t w, w1;
    fmpz_init(x);
    fmpz_init_set_ui(one, 1);
    arb_init(w);
    arb_init(w1);
    for (long k = 0; k < nfam; k++) {
        const cli_compare_row_t *r = rows + order[k];
        double ymin = INFINITY, ymax = -INFINITY;
        slong pw = embz_plot_add_panel(fig, r->label, "index x", "w(x)/w(1)", 1, 1);
        slong s = embz_plot_add_series(fig, pw, NULL, EMBZ_PLOT_LINE, k);
        style_series(fig, pw, s, k);
        embz_err_t err;
        embz_err_clear(&err);
        if (embz_family_weight_arb(w1, r->d.fam, one, o->to, o->prec, &err) == EMBZ_OK
            && arb_is_positive(w1))
            for (slong j = 0; j < nw; j++) {
                /* x = 10^(LB j / (nw - 1)), rounded to an integer */
                double t = LB * (double) j / (double) (nw - 1);
                arb_set_d(w, t);
                arb_t ten;
                arb_init(ten);
                arb_set_ui(ten, 10);
                arb_pow(w, ten, w, (slong) (3.4 * t) + 64);
                arb_clear(ten);
                arf_get_fmpz(x, arb_midref(w), ARF_RND_NEAR);
                if (fmpz_cmp_ui(x, 1) < 0) fmpz_one(x);
                embz_err_clear(&err);
                if (embz_family_weight_arb(w, r->d.fam, x, o->to, o->prec, &err) != EMBZ_OK)
                    continue;
                arb_div(w, w, w1, o->prec);
                double lo, mid, hi;
                arb_log10_d(&lo, &mid, &hi, w);
                if (!isfinite(mid)) {
                    embz_plot_push(fig, pw, s, NAN, NAN, NAN, NAN);
                    continue;
                }
                embz_plot_push(fig, pw, s, fmpz_log10_d(x), mid, NAN, NAN);
                ymin = mid < ymin ? mid : ymin;
                ymax = mid > ymax ? mid : ymax;
            }
        char env[32];
        snprintf(env, sizeof(env), "%g", o->envelope);
        slong before = fig->panels[pw].nseries;
        cli_plot_envelopes(fig, pw, o->envelope, env, LB, ymin, ymax);
        for (slong e = before; e < fig->panels[pw].nseries; e++) {
            free(fig->panels[pw].series[e].label);   /* named once, in the caption */
            fig->panels[pw].series[e].label = NULL;
        }
    }
    arb_clear(w);
    arb_clear(w1);
    fmpz_clear(x);
    fmpz_clear(one);
}

/* The weight of the optimal state for u_d, d^(-ceil(log_d i)), as an expression. */
static char *optimum_weight(ulong d)
{
    if (d == 2) return _cli_cmp_sdup("2^(-ceil(log2(i)))");
    if ((d & (d - 1)) == 0) {
        int j = 0;
        while ((1UL << j) < d) j++;
        return embz_strdup_printf("2^(-%d*ceil(log2(i)/%d))", j, j);
    }
    return embz_strdup_printf("%lu^(-ceil(log(i)/log(%lu)))", d, d);
}

/* One row for the optimum over all states (it does not depend on the family): OPT_n at the
 * table's sizes and the smallest rank for each goal, all exact from the closed form of
 * docs/optimal.md; every cell "n/a" for a target that is not uniform. */
static void add_optimum_row(embz_report_t r, const cli_compare_opts_t *o, const embz_target_t q)
{
    int uniform = q->kind == EMBZ_TARGET_UNIFORM;
    embz_report_family_struct *f = embz_report_add_family(r, uniform && q->d == 2
                                                          ? "optimal state (dyadic)"
                                                          : "optimal state");
    if (!uniform) {
        embz_report_set(&f->verdict, "n/a");
        embz_report_set(&f->summary, "known for uniform targets only");
        for (slong j = 0; j < o->nsizes; j++) embz_report_set(f->error_at + j, "n/a");
        for (slong j = 0; j < o->ngoals; j++) {
            embz_report_set(f->need_n + j, "n/a");
            embz_report_set(f->need_qubits + j, "n/a");
            embz_report_set(f->extra_qubits + j, "n/a");
        }
        char *t = embz_strdup_printf("The optimum over all states of Schmidt rank n "
            "(docs/optimal.md) is known for uniform targets only (ebit, ebits:J, uniform:D), "
            "not for the target %s: its cells and the extra qubits of the families say n/a.",
            q->label);
        embz_report_set(&f->notes, t);
        free(t);
        return;
    }
    char *w = optimum_weight(q->d);
    embz_report_set(&f->weight, w);
    free(w);
    embz_report_set(&f->verdict, "optimum (proven)");
    embz_report_set(&f->summary, "the least error of any state of Schmidt rank n (exact); "
                    "no family goes below it");
    embz_report_set(&f->law, "1/\xcf\x88" "(n), exact");
    embz_report_set(&f->limit_lo, "0 (proven)");
    embz_buf_t nb;
    embz_buf_init(&nb);
    embz_buf_printf(&nb, "The smallest error any state of Schmidt rank n reaches for the target "
        "%s: OPT_n = 1/\xcf\x88" "(n) with \xcf\x88" "(n) = j + 1 + n/(%lu^j (%lu \xe2\x88\x92" " 1)), "
        "j = floor(log_%lu n), an exact fraction (the closed form proven in docs/optimal.md; "
        "the state of weight %s reaches it at every n). It does not depend on the family, so "
        "it is shown once, as this row.", q->label, q->d, q->d, q->d, f->weight);
    embz_optimal_result_t res;
    embz_err_t err;
    arb_t x;
    arb_init(x);
    for (slong j = 0; j < o->nsizes; j++) {
        embz_optimal_result_init(res);
        embz_err_clear(&err);
        if (embz_optimal_closed(res, o->sizes + j, q, &err) == EMBZ_OK) {
            arb_set_fmpq(x, res->upper, o->prec > 64 ? o->prec : 64);
            char *t = embz_arb_certified_string(x, 6);
            embz_report_set(f->error_at + j, t);
            free(t);
        }
        embz_optimal_result_clear(res);
    }
    arb_clear(x);
    fmpz_t m;
    fmpz_init(m);
    for (slong j = 0; j < o->ngoals; j++) {
        long oq;
        int st = _cli_cmp_optimum_rank(m, &oq, q, o->goal_text[j]);
        if (st != EMBZ_OK) {
            embz_buf_printf(&nb, "\n\nGoal %s: the optimal rank is not computed (%s).",
                            o->goal_text[j], st == EMBZ_ERR_LIMIT
                            ? "it would need more than 200000 bits" : "a bad goal");
            continue;
        }
        char *mt = _cli_cmp_size_text(m, 1), *qt = embz_strdup_printf("%ld", oq);
        embz_report_set(f->need_n + j, mt);
        embz_report_set(f->need_qubits + j, qt);
        embz_buf_printf(&nb, "\n\nGoal %s: rank %s is the smallest whose optimum reaches the "
                        "goal (exact; every larger rank reaches it too), %ld qubits per side. "
                        "The extra qubits of a family are its qubits per side for the goal "
                        "minus these %ld.", o->goal_text[j], mt, oq, oq);
        free(mt);
        free(qt);
    }
    fmpz_clear(m);
    embz_report_set(&f->notes, nb.s);
    embz_buf_clear(&nb);
}

int cli_compare_fill(embz_report_t r, embz_plot_struct *figs, const cli_compare_row_t *rows,
                     const long *order_in, long nfam, const cli_compare_opts_t *o)
{
    embz_target_t q;
    embz_err_t err;
    embz_target_init(q);
    embz_err_clear(&err);
    if (o->target_text != NULL) embz_target_parse(q, o->target_text, 0, &err);
    long *order = malloc((size_t) (nfam > 0 ? nfam : 1) * sizeof(long));
    for (long k = 0; k < nfam; k++) order[k] = order_in ? order_in[k] : k;

    embz_report_set_sizes(r, o->nsizes, o->size_text);
    embz_report_set_goals(r, o->ngoals, o->goal_text);
    r->extra_columns = o->ngoals > 0;
    for (long k = 0; k < nfam; k++) {
        const cli_compare_row_t *w = rows + order[k];
        embz_report_family_struct *f = embz_report_add_family(r, w->label);
        embz_report_set(&f->weight, w->d.fam->amplitude ? NULL : w->d.fam->weight_text);
        if (w->d.fam->amplitude) {
            char *t = embz_strdup_printf("(%s)^2", w->d.fam->weight_text);
            embz_report_set(&f->weight, t);
            free(t);
        }
        embz_report_set(&f->verdict, w->verdict);
        embz_report_set(&f->law, w->law);
        embz_report_set(&f->exponent, w->exponent);
        embz_report_set(&f->limit_lo, w->limit_text);
        for (slong j = 0; j < o->nsizes; j++) embz_report_set(f->error_at + j, w->error_text[j]);
        for (slong j = 0; j < o->ngoals; j++) {
            embz_report_set(f->need_n + j, w->need_n_text[j]);
            embz_report_set(f->need_qubits + j, w->need_q_text[j]);
            embz_report_set(f->extra_qubits + j, w->extra_q_text[j]);
        }
        embz_report_set(&f->summary, w->why);
        embz_report_set(&f->notes, w->notes);
    }
    add_optimum_row(r, o, q);
    {
        char *ans = cli_compare_answer(rows, order, nfam, o);
        embz_report_set(&r->answer, ans);
        free(ans);
    }

    char *from = _cli_cmp_size_text(o->from, 0), *to = _cli_cmp_size_text(o->to, 0);
    embz_buf_t b;
    embz_buf_init(&b);
    embz_buf_printf(&b, "target %s", q->label);
    if (o->ngoals > 0) {
        embz_buf_printf(&b, "; error goal%s ", o->ngoals > 1 ? "s" : "");
        for (slong j = 0; j < o->ngoals; j++)
            embz_buf_printf(&b, "%s%s", j ? ", " : "", o->goal_text[j]);
    }
    embz_buf_printf(&b, "; sweeps of %ld sizes from %s to %s at %ld bits", (long) o->points,
                    from, to, (long) o->prec);
    embz_report_set(&r->subtitle, b.s);
    embz_buf_clear(&b);

    embz_buf_init(&b);
    if (r->intro != NULL) embz_buf_printf(&b, "%s\n\n", r->intro);
    embz_buf_printf(&b, "How to read the table. Verdict, law, exponent and limit come from the "
        "classification for one ebit (whether a family embezzles does not depend on the "
        "target); the law and exponent are least-squares fits and are estimates, the limit "
        "says how it is known. The error columns hold E at n for the target %s: only the "
        "digits certified by ball arithmetic are shown.", q->label);
    if (o->ngoals > 0)
        embz_buf_printf(&b, "\n\nThe size columns come from the qubit-resolution solver: it "
            "stops once the number of qubits per side, ceil(log2 n), is decided. \"\xe2\x89\xa4 N\" "
            "means a size N that reaches the goal was found, together with a size needing the "
            "same number of qubits that does not reach it (both certified); the exact smallest "
            "n is not computed. A plain N is the exact smallest size (every smaller size "
            "checked). \"not by 10^%ld\" means the search, which ends at n = 2^%d, found no "
            "size reaching the goal (E above the goal certified where it looked, including the "
            "last size); \"never\" means in addition that the one-ebit error tends to a limit "
            "above the goal (derived formula), which no target of several ebits can beat.",
            _cli_cmp_search_decades(), EMBZ_SIZE_MAX_LOG2);
    if (q->kind == EMBZ_TARGET_UNIFORM)
        embz_buf_printf(&b, "\n\nThe last row is the optimum over all states of Schmidt rank "
            "n, from the closed form OPT_n = 1/\xcf\x88" "(n) proven in docs/optimal.md (exact): "
            "its error columns hold OPT_n%s", o->ngoals > 0
            ? ", its size columns the smallest rank whose optimum reaches each goal and its "
              "qubits per side. \"extra qubits\" is a family's qubits per side for the goal "
              "minus the optimum's (exact, as both are; a dash where the family's size was not "
              "found)." : ".");
    else
        embz_buf_printf(&b, "\n\nThe optimum over all states of Schmidt rank n "
            "(docs/optimal.md) is known for uniform targets only (ebit, ebits:J, uniform:D), "
            "so for the target %s its row and the \"extra qubits\" columns say n/a.", q->label);
    embz_report_set(&r->intro, b.s);
    embz_buf_clear(&b);

    embz_buf_init(&b);
    embz_buf_printf(&b, "Computed by embz %s with arb ball arithmetic. Every E value is a "
        "certified enclosure, printed with the digits it certifies; the plotted points are the "
        "midpoints of those enclosures. Fitted laws, exponents and limits marked as estimates "
        "carry no guarantee.", EMBZ_VERSION);
    embz_report_set(&r->footer, b.s);
    embz_buf_clear(&b);
    free(from);
    free(to);

    /* figure 1: does each family reach the goal? embezzlers and the others side by side */
    int nf = 0;
    char cap[900];
    embz_plot_init(figs + nf, NULL);
    error_panel(figs + nf, rows, order, nfam, q, 0, 1, "Embezzlers: error against size", o);
    error_panel(figs + nf, rows, order, nfam, q, 0, 0, "The others: error against size", o);
    figs[nf].columns = 2;
    figs[nf].panel_width = figs[nf].npanels > 1 ? REPORT_FIG_W / 2 : REPORT_FIG_W;
    figs[nf].panel_height = 340;
    figs[nf].zoom = REPORT_ZOOM;
    snprintf(cap, sizeof(cap), "Certified error E\xe2\x82\x99 for the target %s against n (log "
             "axes), the embezzlers on the left, the other families on the right. Dashed: the "
             "best fitted law over the points it was fitted to (an estimate).%s%s",
             q->label, o->ngoals > 0 ? " Solid dark line: the first error goal." : "",
             q->kind == EMBZ_TARGET_UNIFORM
             ? " Dashed grey: the optimum OPT_n over all states of Schmidt rank n (exact closed "
               "form, docs/optimal.md), which no family can go below." : "");
    embz_report_add_figure(r, cap, figs + nf);
    nf++;
    /* figure 2: how fast the embezzlers decay (C (ln n)^-g is a straight line) */
    embz_plot_init(figs + nf, NULL);
    if (error_panel(figs + nf, rows, order, nfam, q, 1, 1, "Embezzlers: error against ln n",
                    o) >= 0) {
        figs[nf].panel_width = REPORT_FIG_W;
        figs[nf].panel_height = 340;
        figs[nf].zoom = REPORT_ZOOM;
        snprintf(cap, sizeof(cap), "How fast the embezzlers get there: the same points against "
                 "ln n (log axes). A law C (ln n)^-g is a straight line of slope -g here; a "
                 "flatter line means a slower family.");
        embz_report_add_figure(r, cap, figs + nf);
        nf++;
    } else {
        embz_plot_clear(figs + nf);
    }
    /* figure 3: weights, one small panel per family */
    embz_plot_init(figs + nf, NULL);
    weights_panels(figs + nf, rows, order, nfam, o);
    figs[nf].columns = nfam < 4 ? nfam : 4;
    figs[nf].panel_width = REPORT_FIG_W / (double) (figs[nf].columns > 0 ? figs[nf].columns : 1);
    figs[nf].panel_height = 210;
    figs[nf].zoom = REPORT_ZOOM;
    snprintf(cap, sizeof(cap), "Normalised weights w(x)/w(1) of each family (log axes) "
             "between the envelopes x^(-1-%g) (dashed grey) and x^(-1+%g) (dashed dark); "
             "weights that depend on n are taken at the largest swept n. A universal family "
             "must eventually stay between x^(-1-eps) and x^(-1+eps) for every eps, and its "
             "weights must not be summable.", o->envelope, o->envelope);
    embz_report_add_figure(r, cap, figs + nf);
    nf++;
    free(order);
    embz_target_clear(q);
    return nf;
}

