/* The error E_n(q) at one or many sizes through the flat interface (include/embz/flat.h):
 * one evaluator with the default policy (the one embz_error uses) and one workspace, the
 * caller's cancel flag and time limit. */
#include <stdlib.h>
#include <string.h>
#include "impl.h"

/* How the result was computed, malloc'ed: the one place in src/flat that reads it from the
 * result (errors and sweeps). */
char *_flat_how_text(const embz_error_result_struct *res)
{
    return embz_error_how_text(&res->how);
}

static void error_row(embz_flat_table *t, long r, const embz_error_result_t res, slong prec,
                      slong digits)
{
    _flat_set(t, r, "measure", "k");
    _flat_set(t, r, "bounds_only", "0");
    _flat_set_ends(t, r, "", res->error, digits);
    char *c = embz_arb_certified_string(res->error, _flat_cert_digits(prec));
    _flat_set(t, r, "certified", c);
    free(c);
    _flat_set_d(t, r, "mid", embz_arb_mid_d(res->error));
    _flat_set_d(t, r, "radius", mag_get_d(arb_radref(res->error)));
    _flat_set_d(t, r, "estimate", res->estimate);
    _flat_set_size(t, r, "argmax", res->argk);
    _flat_set(t, r, "method", _flat_method_name(res->method));
    char *how = _flat_how_text(res);
    _flat_set(t, r, "how", how);
    free(how);
    if (res->have_bounds) {
        char *lo = embz_arb_lo_string(res->lower, digits);
        char *hi = embz_arb_hi_string(res->upper, digits);
        _flat_set(t, r, "bound_lo", lo);
        _flat_set(t, r, "bound_hi", hi);
        free(lo);
        free(hi);
    }
}

static void fidelity_row(embz_flat_table *t, long r, const embz_fidelity_result_t res,
                         slong prec, slong digits)
{
    _flat_set(t, r, "measure", embz_measure_name(res->measure));
    _flat_set_l(t, r, "bounds_only", res->bounds_only);
    char *lo = embz_arb_lo_string(res->lower, digits), *hi = embz_arb_hi_string(res->upper, digits);
    _flat_set(t, r, "lo", lo);
    _flat_set(t, r, "hi", hi);
    free(lo);
    free(hi);
    if (!res->bounds_only) {
        char *c = embz_arb_certified_string(res->value, _flat_cert_digits(prec));
        _flat_set(t, r, "certified", c);
        free(c);
        _flat_set_d(t, r, "mid", embz_arb_mid_d(res->value));
        _flat_set_d(t, r, "radius", mag_get_d(arb_radref(res->value)));
        if (res->how.analytic != 1) {   /* the analytic overlap does not compute F_max */
            _flat_set_ends(t, r, "fidelity", res->fidelity, digits);
            _flat_set_ends(t, r, "purified", res->purified, digits);
        }
        if (res->measure == EMBZ_MEASURE_OVERLAP) _flat_set_ends(t, r, "overlap", res->overlap, digits);
    } else {
        _flat_set_ends(t, r, "K", res->K, digits);
    }
    if (res->bounds_only && res->have_tight) {
        char *a = embz_arb_lo_string(res->tight_lo, digits);
        char *z = embz_arb_hi_string(res->tight_hi, digits);
        _flat_set(t, r, "tight_lo", a);
        _flat_set(t, r, "tight_hi", z);
        free(a);
        free(z);
    }
    _flat_set(t, r, "method", res->bounds_only ? "bounds"
                              : res->how.analytic ? "analytic" : "explicit");
    char *how = embz_fidelity_how_text(&res->how);
    _flat_set(t, r, "how", how);
    free(how);
}

int embz_flat_errors(embz_flat_table **out, const embz_flat_family *f,
                     const char *const *sizes, long len, const embz_flat_target *q,
                     const embz_flat_opts *given, embz_flat_err *err)
{
    *out = NULL;
    embz_flat_opts o;
    _flat_opts_get(&o, given);
    slong prec = o.prec > 0 ? o.prec : EMBZ_PREC_ONE;
    slong digits = _flat_end_digits(&o, prec);
    if (o.method < EMBZ_METHOD_AUTO || o.method > EMBZ_METHOD_ANALYTIC)
        return _flat_err_set(err, EMBZ_ERR_INPUT, "bad method %d (0 auto, 1 explicit, 2 analytic)",
                             o.method);
    if (o.measure < EMBZ_MEASURE_K || o.measure > EMBZ_MEASURE_OVERLAP)
        return _flat_err_set(err, EMBZ_ERR_INPUT,
                             "bad measure %d (0 k, 1 fidelity, 2 purified, 3 overlap)", o.measure);
    if (prec < 16 || prec > (1L << 20))
        return _flat_err_set(err, EMBZ_ERR_INPUT, "bad precision %ld (bits, 16 to %ld)",
                             (long) prec, 1L << 20);
    fmpz *ns = _fmpz_vec_init(len > 0 ? len : 1);
    int st = EMBZ_OK;
    for (long k = 0; k < len && st == EMBZ_OK; k++) st = _flat_size_parse(ns + k, sizes[k], "size n", err);
    if (st != EMBZ_OK) {
        _fmpz_vec_clear(ns, len > 0 ? len : 1);
        return st;
    }
    embz_target_t one;
    embz_target_init(one);
    const embz_target_struct *tq = q != NULL ? q->q : one;
    embz_eval_opts_t eo;
    embz_eval_opts_init(eo);
    eo->method = o.method;
    eo->cancel = o.cancel;
    eo->seconds = o.seconds;
    embz_eval_t ev;
    embz_eval_init(ev, f->f, eo, prec);
    embz_eval_work_t wk;
    embz_eval_work_init(wk);
    embz_flat_table *t = _flat_table_new();
    for (long k = 0; k < len; k++) {
        if (_flat_cancelled(&o)) {
            st = _flat_err_set(err, EMBZ_ERR_LIMIT, "cancelled");
            break;
        }
        long r = _flat_row_add(t);
        _flat_set_size(t, r, "n", ns + k);
        embz_err_t e;
        embz_err_clear(&e);
        double t0 = _flat_now();
        int ps;
        if (o.measure == EMBZ_MEASURE_K) {
            embz_error_result_t res;
            embz_error_result_init(res);
            ps = embz_eval_error(res, ev, wk, ns + k, tq, &e);
            if (ps == EMBZ_OK) error_row(t, r, res, prec, digits);
            embz_error_result_clear(res);
        } else {
            embz_fidelity_result_t res;
            embz_fidelity_result_init(res);
            ps = embz_fidelity(res, f->f, ns + k, tq, o.measure, o.method, prec, &e);
            if (ps == EMBZ_OK) fidelity_row(t, r, res, prec, digits);
            embz_fidelity_result_clear(res);
        }
        _flat_set_d(t, r, "seconds", _flat_now() - t0);
        _flat_set_l(t, r, "status", ps);
        if (ps != EMBZ_OK) {
            char msg[4096];
            if (e.code == 0) e.code = ps;
            embz_err_format(msg, sizeof(msg), &e);
            _flat_set(t, r, "message", msg);
        }
        if (ps == EMBZ_ERR_DOMAIN || (ps == EMBZ_ERR_LIMIT && _flat_cancelled(&o))) {
            st = ps;
            _flat_err_from(err, ps, &e);
            if (ps == EMBZ_ERR_LIMIT) _flat_err_set(err, EMBZ_ERR_LIMIT, "cancelled");
            break;
        }
    }
    embz_eval_work_clear(wk);
    embz_eval_clear(ev);
    embz_target_clear(one);
    _fmpz_vec_clear(ns, len > 0 ? len : 1);
    *out = t;
    return st;
}
