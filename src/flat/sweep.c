/* Sweeps through the flat interface: embz_sweep_run_opts (the library's sweep, with its
 * policy and its narrowing for families the analytic engine cannot take) on opts.threads
 * threads (default 1), the caller's cancel flag seen between sizes and inside the engine;
 * then the library's fits (embz_fit_sweep). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "impl.h"

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

int embz_flat_sweep(embz_flat_table **out, const embz_flat_family *f, const char *from,
                    const char *to, long points, const embz_flat_target *q,
                    const embz_flat_opts *given, embz_flat_err *err)
{
    *out = NULL;
    embz_flat_opts o;
    _flat_opts_get(&o, given);
    slong prec = o.prec > 0 ? o.prec : EMBZ_PREC_MANY;
    slong digits = _flat_end_digits(&o, 128);
    if (points <= 0) points = EMBZ_RANGE_POINTS;     /* embz/defaults.h */
    if (points > 100000)
        return _flat_err_set(err, EMBZ_ERR_INPUT, "too many points %ld (at most 100000)", points);
    fmpz_t a, b;
    fmpz_init(a);
    fmpz_init(b);
    embz_default_range(a, b);
    int st = from != NULL ? _flat_size_parse(a, from, "size 'from'", err) : EMBZ_OK;
    if (st == EMBZ_OK && to != NULL) st = _flat_size_parse(b, to, "size 'to'", err);
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
    embz_sweep_opts_t so;
    embz_sweep_opts_init(so);
    so->threads = o.threads > 0 ? o.threads : 1;
    so->cancel = o.cancel;
    so->seconds = o.seconds;
    embz_err_t e;
    embz_err_clear(&e);
    st = embz_sweep_run_opts(s, f->f, a, b, points, tq, so, prec, NULL, NULL, &e);
    if (st != EMBZ_OK) _flat_err_from(err, st, &e);

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
                               "no size of the sweep could be computed: %s", s->pts[s->len - 1].note);
        }
    } else {
        sr = _flat_row_add(t);
        _flat_set(t, sr, "kind", "summary");
        _flat_set(t, sr, "best", "none");
    }
    _flat_set(t, sr, "target", tq->label);
    _flat_set_l(t, sr, "points", (long) s->len);
    _flat_set_l(t, sr, "nok", (long) s->nok);
    _flat_set_l(t, sr, "prec", (long) prec);
    if (s->narrowed) {
        _flat_set_l(t, sr, "narrowed_to", (long) s->reach);
        _flat_set(t, sr, "narrowed_why", s->narrow_why);
    }
    embz_sweep_clear(s);
    embz_target_clear(one);
    fmpz_clear(a);
    fmpz_clear(b);
    *out = t;
    return st;
}
