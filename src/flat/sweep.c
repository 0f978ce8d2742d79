/* Sweeps through the flat interface: the sizes of embz_sweep_sizes, each through one
 * evaluator with the sweep's policy (the default one, digit_steps 4, the tail certified once
 * for the largest size, largest sizes first), in this thread, so that the caller's cancel flag
 * is seen between sizes and inside the engine; then the library's fits (embz_fit_sweep). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "impl.h"

static double fmpz_log_d(const fmpz_t n)
{
    slong bits = fmpz_bits(n);
    if (bits <= 1000) return log(fmpz_get_d(n));
    fmpz_t t;
    fmpz_init(t);
    fmpz_fdiv_q_2exp(t, n, (ulong) (bits - 60));
    double r = log(fmpz_get_d(t)) + (double) (bits - 60) * log(2.0);
    fmpz_clear(t);
    return r;
}

void _flat_sweep_rows(embz_flat_table *t, const embz_sweep_t s, slong digits)
{
    for (slong j = 0; j < s->len; j++) {
        const embz_sweep_point_struct *p = s->pts + j;
        long r = _flat_row_add(t);
        _flat_set(t, r, "kind", "point");
        _flat_set_size(t, r, "n", p->n);
        _flat_set_d(t, r, "log_n", p->log_n);
        _flat_set_l(t, r, "status", p->status);
        if (p->status == EMBZ_OK) {
            _flat_set_ends(t, r, "", p->error, digits);
            _flat_set_d(t, r, "mid", embz_arb_mid_d(p->error));
            char *c = embz_arb_certified_string(p->error, 30);
            _flat_set(t, r, "certified", c);
            free(c);
            _flat_set(t, r, "method", _flat_method_name(p->method));
            _flat_set_size(t, r, "argmax", p->argk);
        }
        _flat_set_d(t, r, "seconds", p->seconds);
        char *how = p->status == EMBZ_OK ? embz_error_how_text(&p->how) : NULL;
        _flat_set(t, r, "how", how != NULL ? how : p->note);
        free(how);
    }
}

static void fit_rows(embz_flat_table *t, const embz_fitset_t fs)
{
    for (int law = 1; law < EMBZ_LAW_COUNT; law++) {
        const embz_fit_struct *fit = fs->fits + law;
        long r = _flat_row_add(t);
        _flat_set(t, r, "kind", "fit");
        _flat_set(t, r, "law", embz_law_id(law));
        _flat_set(t, r, "formula", embz_law_formula(law));
        _flat_set_l(t, r, "ok", fit->ok);
        if (!fit->ok) continue;
        const char *k[] = { "L", "L_lo", "L_hi", "C", "C_lo", "C_hi", "g", "g_lo", "g_hi",
                            "rss", "max_rel", "bic" };
        double v[] = { fit->L, fit->L_lo, fit->L_hi, fit->C, fit->C_lo, fit->C_hi, fit->g,
                       fit->g_lo, fit->g_hi, fit->rss, fit->max_rel, fit->bic };
        for (int j = 0; j < 12; j++) _flat_set_d(t, r, k[j], v[j]);
        _flat_set_l(t, r, "points", fit->m);
    }
}

static void point_init(embz_sweep_point_struct *p)
{
    memset(p, 0, sizeof(*p));
    fmpz_init(p->n);
    fmpz_init(p->argk);
    arb_init(p->error);
    arb_init(p->lower);
    arb_init(p->upper);
    p->status = EMBZ_ERR_UNSUPPORTED;
}

/* The points of s (sizes set) through ev and wk; EMBZ_OK, EMBZ_ERR_DOMAIN (invalid weight,
 * err filled) or EMBZ_ERR_LIMIT (cancelled). */
static int run_points(embz_sweep_t s, const embz_eval_t ev, embz_eval_work_t wk,
                      const embz_target_t q, const embz_flat_opts *o, embz_flat_err *err)
{
    embz_error_result_t r;
    embz_error_result_init(r);
    int st = EMBZ_OK;
    for (slong jj = 0; jj < s->len; jj++) {
        slong j = s->len - 1 - jj;        /* largest first, as embz_sweep_run */
        embz_sweep_point_struct *p = s->pts + j;
        if (_flat_cancelled(o)) {
            st = _flat_err_set(err, EMBZ_ERR_LIMIT, "cancelled");
            break;
        }
        embz_err_t e;
        embz_err_clear(&e);
        double t0 = _flat_now();
        int ps = embz_eval_error(r, ev, wk, p->n, q, &e);
        p->seconds = _flat_now() - t0;
        p->status = ps;
        if (ps == EMBZ_OK) {
            p->method = (r->used & (1 << EMBZ_METHOD_EXPLICIT)) ? EMBZ_METHOD_EXPLICIT
                                                                : EMBZ_METHOD_ANALYTIC;
            arb_set(p->error, r->error);
            fmpz_set(p->argk, r->argk);
            p->have_bounds = r->have_bounds;
            if (r->have_bounds) {
                arb_set(p->lower, r->lower);
                arb_set(p->upper, r->upper);
            }
            p->how = r->how;
            p->note[0] = '\0';
            s->nok++;
        } else {
            snprintf(p->note, sizeof(p->note), "skipped: %.190s",
                     e.text[0] ? e.text : "no method handles this size");
        }
        if (ps == EMBZ_ERR_LIMIT && _flat_cancelled(o)) {
            st = _flat_err_set(err, EMBZ_ERR_LIMIT, "cancelled");
            break;
        }
        if (ps == EMBZ_ERR_DOMAIN) {
            char *nstr = embz_fmpz_string(p->n, 30);
            st = _flat_err_set(err, EMBZ_ERR_DOMAIN, "n = %s: %s", nstr, e.text);
            free(nstr);
            break;
        }
    }
    embz_error_result_clear(r);
    return st;
}

int embz_flat_sweep(embz_flat_table **out, const embz_flat_family *f, const char *from,
                    const char *to, long points, const embz_flat_target *q,
                    const embz_flat_opts *given, embz_flat_err *err)
{
    *out = NULL;
    embz_flat_opts o;
    _flat_opts_get(&o, given);
    slong prec = o.prec > 0 ? o.prec : 64;
    slong digits = _flat_end_digits(&o, 128);
    if (points <= 0) points = 24;        /* the defaults of embz sweep */
    if (points > 100000)
        return _flat_err_set(err, EMBZ_ERR_INPUT, "too many points %ld (at most 100000)", points);
    fmpz_t a, b;
    fmpz_init(a);
    fmpz_init(b);
    int st = _flat_size_parse(a, from ? from : "10", "size 'from'", err);
    if (st == EMBZ_OK) st = _flat_size_parse(b, to ? to : "10^300", "size 'to'", err);
    if (st == EMBZ_OK && fmpz_cmp(a, b) > 0)
        st = _flat_err_set(err, EMBZ_ERR_INPUT, "'from' must not exceed 'to'");
    if (st != EMBZ_OK) {
        fmpz_clear(a);
        fmpz_clear(b);
        return st;
    }
    embz_target_t one;
    embz_target_init(one);
    const embz_target_struct *tq = q != NULL ? q->q : one;

    embz_sweep_t s;
    embz_sweep_init(s);
    fmpz *sizes = _fmpz_vec_init(points);
    slong len = 0;
    embz_err_t e;
    embz_err_clear(&e);
    embz_sweep_sizes(sizes, &len, a, b, points, &e);
    s->pts = malloc((size_t) len * sizeof(embz_sweep_point_struct));
    if (s->pts == NULL) abort();
    s->len = len;
    s->prec = prec;
    snprintf(s->target, sizeof(s->target), "%s", tq->label);
    for (slong j = 0; j < len; j++) {
        point_init(s->pts + j);
        fmpz_set(s->pts[j].n, sizes + j);
        s->pts[j].log_n = fmpz_log_d(sizes + j);
    }
    _fmpz_vec_clear(sizes, points);

    embz_eval_opts_t eo;
    embz_eval_opts_init(eo);
    eo->digit_steps = 4;          /* the sweep policy (src/analysis/sweep.c) */
    eo->cancel = o.cancel;
    eo->seconds = o.seconds;
    embz_eval_t ev;
    embz_eval_init(ev, f->f, eo, prec);
    embz_eval_work_t wk;
    embz_eval_work_init(wk);
    st = embz_eval_prepare(ev, wk, s->pts[len - 1].n, &e);
    if (st != EMBZ_OK) _flat_err_from(err, st, &e);
    else st = run_points(s, ev, wk, tq, &o, err);
    embz_eval_work_clear(wk);
    embz_eval_clear(ev);

    embz_flat_table *t = _flat_table_new();
    _flat_sweep_rows(t, s, digits);
    long sr = -1;
    if (st == EMBZ_OK) {
        embz_fitset_t fs;
        embz_fitset_init(fs);
        embz_err_clear(&e);
        int fst = embz_fit_sweep(fs, s, &e);
        if (fst == EMBZ_OK) fit_rows(t, fs);
        sr = _flat_row_add(t);
        _flat_set(t, sr, "kind", "summary");
        _flat_set(t, sr, "best", fst == EMBZ_OK ? embz_law_id(fs->best) : "none");
        _flat_set_l(t, sr, "fit_status", fst);
        _flat_set(t, sr, "fit_message", fst == EMBZ_OK ? "" : e.text);
        embz_fitset_clear(fs);
        if (s->nok == 0) {
            st = _flat_err_set(err, EMBZ_ERR_UNSUPPORTED,
                               "no size of the sweep could be computed: %s", s->pts[len - 1].note);
        }
    } else {
        sr = _flat_row_add(t);
        _flat_set(t, sr, "kind", "summary");
        _flat_set(t, sr, "best", "none");
    }
    _flat_set(t, sr, "target", tq->label);
    _flat_set_l(t, sr, "points", (long) len);
    _flat_set_l(t, sr, "nok", (long) s->nok);
    _flat_set_l(t, sr, "prec", (long) prec);
    embz_sweep_clear(s);
    embz_target_clear(one);
    fmpz_clear(a);
    fmpz_clear(b);
    *out = t;
    return st;
}
