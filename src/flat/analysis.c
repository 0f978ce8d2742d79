/* Verdicts, scans and the size search through the flat interface (embz classify, embz scan,
 * embz size). These library calls take no cancel flag: they run to their end. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "impl.h"

static int range_opts(embz_classify_opts_t co, const char *from, const char *to, long points,
                      long default_points, const embz_flat_opts *o, embz_flat_err *err)
{
    int st = EMBZ_OK;
    if (from != NULL) st = _flat_size_parse(co->from, from, "size 'from'", err);
    if (st == EMBZ_OK && to != NULL) st = _flat_size_parse(co->to, to, "size 'to'", err);
    if (st == EMBZ_OK && fmpz_cmp(co->from, co->to) > 0)
        st = _flat_err_set(err, EMBZ_ERR_INPUT, "'from' must not exceed 'to'");
    if (st == EMBZ_OK && points > 0 && (points < 5 || points > 100000))
        st = _flat_err_set(err, EMBZ_ERR_INPUT, "bad number of points %ld (5 to 100000)", points);
    co->points = points > 0 ? points : default_points;
    co->prec = o->prec > 0 ? o->prec : EMBZ_PREC_MANY;
    co->use_analytic = 1;
    return st;
}

static void verdict_fields(embz_flat_table *t, long r, const embz_classify_struct *c)
{
    _flat_set(t, r, "verdict", embz_verdict_id(c->verdict));
    _flat_set(t, r, "numeric_verdict", embz_verdict_id(c->numeric_verdict));
    _flat_set(t, r, "analytic_verdict",
              c->analytic_available ? embz_verdict_id(c->analytic_verdict) : "");
    _flat_set_l(t, r, "analytic_available", c->analytic_available);
    _flat_set_l(t, r, "disagree", c->disagree);
    _flat_set_d(t, r, "limit_lo", c->limit_lo);
    _flat_set_d(t, r, "limit_hi", c->limit_hi);
    _flat_set_d(t, r, "limit_value", c->limit_value);
    _flat_set_l(t, r, "limit_certified", c->limit_certified);
    _flat_set_l(t, r, "limit_by_criterion", c->limit_by_criterion);
    _flat_set(t, r, "law", embz_law_id(c->law));
    _flat_set(t, r, "law_formula", embz_law_formula(c->law));
    _flat_set_d(t, r, "exponent", c->exponent);
    _flat_set_d(t, r, "exponent_lo", c->exponent_lo);
    _flat_set_d(t, r, "exponent_hi", c->exponent_hi);
    _flat_set_d(t, r, "coeff", c->coeff);
    _flat_set(t, r, "asymptotic_form", c->asymptotic_form);
    _flat_set(t, r, "analytic_rate", c->analytic_rate);
}

int embz_flat_classify(embz_flat_table **out, const embz_flat_family *f, const char *from,
                       const char *to, long points, const embz_flat_opts *given,
                       embz_flat_err *err)
{
    *out = NULL;
    embz_flat_opts o;
    _flat_opts_get(&o, given);
    embz_classify_opts_t co;
    embz_classify_opts_init(co);
    int st = range_opts(co, from, to, points, EMBZ_RANGE_POINTS, &o, err);
    if (st != EMBZ_OK) {
        embz_classify_opts_clear(co);
        return st;
    }
    embz_classify_t c;
    embz_classify_init(c);
    embz_err_t e;
    embz_err_clear(&e);
    st = embz_classify(c, f->f, co, NULL, NULL, &e);
    if (st != EMBZ_OK) _flat_err_from(err, st, &e);
    else {
        embz_flat_table *t = _flat_table_new();
        long r = _flat_row_add(t);
        _flat_set(t, r, "kind", "verdict");
        verdict_fields(t, r, c);
        for (slong k = 0; k < c->nfacts; k++) {
            char *text = embz_classify_fact_text(c->facts + k);
            long fr = _flat_row_add(t);
            _flat_set(t, fr, "kind", "fact");
            _flat_set(t, fr, "text", text);
            free(text);
        }
        _flat_sweep_rows(t, c->sweep, _flat_end_digits(&o, 128));
        *out = t;
    }
    embz_classify_clear(c);
    embz_classify_opts_clear(co);
    return st;
}

int embz_flat_scan(embz_flat_table **out, const embz_flat_family *f, const char *const *axes,
                   long naxes, const char *from, const char *to, long points,
                   const embz_flat_opts *given, embz_flat_err *err)
{
    *out = NULL;
    embz_flat_opts o;
    _flat_opts_get(&o, given);
    embz_classify_opts_t co;
    embz_classify_opts_init(co);
    int st = range_opts(co, from, to, points, EMBZ_RANGE_POINTS, &o, err);
    if (st == EMBZ_OK && naxes < 1) st = _flat_err_set(err, EMBZ_ERR_INPUT, "no grid axis given");
    embz_grid_axis_struct *ax = calloc((size_t) (naxes > 0 ? naxes : 1), sizeof(*ax));
    if (ax == NULL) abort();
    embz_err_t e;
    embz_err_clear(&e);
    for (long k = 0; k < naxes && st == EMBZ_OK; k++) {
        st = embz_grid_axis_parse(ax + k, axes[k] ? axes[k] : "", &e);
        if (st != EMBZ_OK) _flat_err_from(err, st, &e);
    }
    if (st == EMBZ_OK) {
        embz_scan_t s;
        embz_scan_init(s);
        st = embz_scan_run(s, f->f, ax, naxes, 0, 1, o.threads > 0 ? o.threads : 1, co, NULL,
                           NULL, &e);
        if (st != EMBZ_OK) _flat_err_from(err, st, &e);
        else {
            embz_flat_table *t = _flat_table_new();
            for (slong j = 0; j < s->len; j++) {
                const embz_scan_row_struct *row = s->rows + j;
                long r = _flat_row_add(t);
                _flat_set_l(t, r, "index", (long) row->index);
                for (long k = 0; k < naxes; k++) {
                    char key[300];
                    char *v = fmpq_get_str(NULL, 10, row->values + k);
                    snprintf(key, sizeof(key), "param:%s", ax[k].name);
                    _flat_set(t, r, key, v);
                    flint_free(v);
                }
                _flat_set_l(t, r, "status", row->status);
                _flat_set(t, r, "message", row->status == EMBZ_OK ? "" : row->message);
                verdict_fields(t, r, row->c);
            }
            *out = t;
        }
        embz_scan_clear(s);
    }
    for (long k = 0; k < naxes; k++) embz_grid_axis_clear(ax + k);
    free(ax);
    embz_classify_opts_clear(co);
    return st;
}

/* The fields of one solved goal (embz_flat_size and embz_flat_size_measure). */
static void size_fields(embz_flat_table *t, long row, const embz_size_result_t r,
                        const embz_family_t f, const embz_target_t tq, const arb_t goal,
                        slong digits)
{
    _flat_set(t, row, "status", embz_size_status_id(r->status));
    _flat_set_l(t, row, "qubits_only", r->qubits_only);
    _flat_set_l(t, row, "evaluations", r->evaluations);
    _flat_set_l(t, row, "explicit_only", r->explicit_only);
    if (r->explicit_only) {
        _flat_set_l(t, row, "reach", (long) r->reach);
        _flat_set(t, row, "why", r->why);
    }
    if (r->status == EMBZ_SIZE_FOUND) {
        _flat_set_size(t, row, "n", r->n);
        /* the library's count: ceil(log2) of the Schmidt rank (a level family's
         * dimension, not n) */
        _flat_set_l(t, row, "qubits", r->qubits);
        _flat_set_size(t, row, "n_low", r->n_low);
        _flat_set_l(t, row, "exhaustive", r->exhaustive);
        _flat_set_l(t, row, "checked_below", r->checked_below);
        _flat_set_size(t, row, "stay_checked_to", r->stay_checked_to);
        _flat_set_l(t, row, "stay_samples", r->stay_samples);
        _flat_set_size(t, row, "again_above", r->again_above);
        _flat_set_ends(t, row, "err", r->err_n, digits);
        _flat_set_ends(t, row, "prev", r->err_prev, digits);
    } else if (r->status == EMBZ_SIZE_NOT_REACHED) {
        _flat_set_size(t, row, "largest", r->largest);
        _flat_set_ends(t, row, "largest", r->err_largest, digits);
        arb_t L;
        arb_init(L);
        /* P >= K: where K never reaches the goal, neither does P */
        int known = embz_family_ebit_limit(L, f, 128);
        int never = embz_size_never(r, known > 0, L, tq, goal);
        _flat_set_l(t, row, "never", never);
        if (known > 0) _flat_set_ends(t, row, "limit", L, digits);
        arb_clear(L);
    } else {
        _flat_set_size(t, row, "undecided_lo", r->undecided_lo);
        _flat_set_size(t, row, "undecided_hi", r->undecided_hi);
        _flat_set_l(t, row, "bracket", r->bracket);
        if (r->bracket) {
            _flat_set_size(t, row, "n_low", r->n_low);
            _flat_set_size(t, row, "n", r->n);
            _flat_set_l(t, row, "qubits", r->qubits);
        }
    }
}

static int parse_goal(fmpq_t e, const char *eps, embz_flat_err *err)
{
    char shown[300];
    if (eps == NULL || embz_number_parse(e, eps) != EMBZ_OK || fmpq_sgn(e) <= 0
        || fmpq_cmp_ui(e, 1) >= 0)
        return _flat_err_set(err, EMBZ_ERR_INPUT, "bad error goal '%s' (a number between 0 and 1)",
                             eps ? embz_err_quote(shown, sizeof(shown), eps, 100) : "");
    return EMBZ_OK;
}

static int size_purified(embz_flat_table **out, const embz_flat_family *f, const char *eps,
                         const embz_flat_target *q, int qubits_only, const embz_flat_opts *given,
                         embz_flat_err *err);

int embz_flat_size(embz_flat_table **out, const embz_flat_family *f, const char *eps,
                   const embz_flat_target *q, int qubits_only, const embz_flat_opts *given,
                   embz_flat_err *err)
{
    *out = NULL;
    embz_flat_opts o;
    _flat_opts_get(&o, given);
    if (o.measure == EMBZ_MEASURE_PURIFIED)
        return size_purified(out, f, eps, q, qubits_only, given, err);
    if (o.measure != EMBZ_MEASURE_K)
        return _flat_err_set(err, EMBZ_ERR_INPUT, "the size search takes the measures k and "
                             "purified (%s, a fidelity, larger is better, is no goal of it)",
                             embz_measure_name(o.measure));
    slong prec = o.prec > 0 ? o.prec : EMBZ_PREC_ONE;
    slong digits = o.digits > 0 ? o.digits : 20;
    fmpq_t e;
    fmpq_init(e);
    if (parse_goal(e, eps, err) != EMBZ_OK) {
        fmpq_clear(e);
        return EMBZ_ERR_INPUT;
    }
    embz_target_t one;
    embz_target_init(one);
    const embz_target_struct *tq = q != NULL ? q->q : one;
    embz_size_result_t r;
    embz_size_result_init(r);
    embz_err_t ee;
    embz_err_clear(&ee);
    int st = embz_size_solve_exact_goal(r, f->f, e, tq, prec, qubits_only != 0, &ee);
    if (st != EMBZ_OK) _flat_err_from(err, st, &ee);
    else {
        embz_flat_table *t = _flat_table_new();
        long row = _flat_row_add(t);
        arb_t g;
        arb_init(g);
        arb_set_fmpq(g, e, 4 * prec);
        _flat_set(t, row, "status", embz_size_status_id(r->status));
        _flat_set(t, row, "eps", eps);
        _flat_set(t, row, "target", tq->label);
        size_fields(t, row, r, f->f, tq, g, digits);
        arb_clear(g);
        *out = t;
    }
    embz_size_result_clear(r);
    embz_target_clear(one);
    fmpq_clear(e);
    return st;
}

/* embz_flat_size with o->measure = purified (embz size --measure purified). */
static int size_purified(embz_flat_table **out, const embz_flat_family *f, const char *eps,
                         const embz_flat_target *q, int qubits_only, const embz_flat_opts *given,
                         embz_flat_err *err)
{
    *out = NULL;
    embz_flat_opts o;
    _flat_opts_get(&o, given);
    slong prec = o.prec > 0 ? o.prec : EMBZ_PREC_ONE;   /* embz size's default */
    slong digits = o.digits > 0 ? o.digits : 20;
    fmpq_t e;
    fmpq_init(e);
    if (parse_goal(e, eps, err) != EMBZ_OK) {
        fmpq_clear(e);
        return EMBZ_ERR_INPUT;
    }
    embz_target_t one;
    embz_target_init(one);
    const embz_target_struct *tq = q != NULL ? q->q : one;
    /* the goals: eps for P (and for K, since P >= K), and for K <= 1 - sqrt(1 - eps^2) (then
     * P <= sqrt(K (2 - K)) <= eps), its lower end so that the size found certainly suffices */
    arb_t g0, g1;
    arb_init(g0);
    arb_init(g1);
    arb_set_fmpq(g0, e, 4 * prec);
    arb_sqr(g1, g0, 4 * prec);
    arb_sub_ui(g1, g1, 1, 4 * prec);
    arb_neg(g1, g1);
    arb_sqrt(g1, g1, 4 * prec);
    arb_sub_ui(g1, g1, 1, 4 * prec);
    arb_neg(g1, g1);
    {
        arf_t lo;
        arf_init(lo);
        arb_get_lbound_arf(lo, g1, 4 * prec);
        arb_set_arf(g1, lo);
        arf_clear(lo);
    }
    embz_size_result_t r;
    embz_size_result_init(r);
    embz_err_t ee;
    embz_err_clear(&ee);
    embz_flat_table *t = NULL;
    int st = embz_size_solve_measure(r, f->f, g0, tq, EMBZ_MEASURE_PURIFIED, qubits_only != 0,
                                     prec, &ee);
    /* as embz size --measure purified: the search on enclosures of P decides unless it was
     * left open where P had bounds only; then the bracket between two searches on K */
    int direct = st == EMBZ_OK
                 && (r->status == EMBZ_SIZE_FOUND
                     || (r->status == EMBZ_SIZE_UNDECIDED && !r->undecided_bounds)
                     || (r->status == EMBZ_SIZE_NOT_REACHED && !r->bounds_seen));
    if (st == EMBZ_OK) {
        t = _flat_table_new();
        if (direct) {
            long row = _flat_row_add(t);
            _flat_set(t, row, "status", embz_size_status_id(r->status));
            _flat_set(t, row, "eps", eps);
            _flat_set(t, row, "target", tq->label);
            _flat_set(t, row, "measure", "purified");
            _flat_set(t, row, "route", "direct");
            _flat_set(t, row, "goal", eps);
            _flat_set_l(t, row, "bounds_seen", r->bounds_seen);
            size_fields(t, row, r, f->f, tq, g0, digits);
        }
    }
    for (int part = 0; st == EMBZ_OK && !direct && part < 2; part++) {
        embz_size_result_clear(r);
        embz_size_result_init(r);
        st = part == 0 ? embz_size_solve_exact_goal(r, f->f, e, tq, prec, qubits_only != 0, &ee)
           : qubits_only ? embz_size_solve_qubits(r, f->f, g1, tq, prec, &ee)
           : embz_size_solve(r, f->f, g1, tq, prec, &ee);
        if (st != EMBZ_OK) break;
        long row = _flat_row_add(t);
        _flat_set(t, row, "status", embz_size_status_id(r->status));
        _flat_set(t, row, "eps", eps);
        _flat_set(t, row, "target", tq->label);
        _flat_set(t, row, "measure", "purified");
        _flat_set(t, row, "route", part == 0 ? "lower" : "upper");
        if (part == 0) _flat_set(t, row, "goal", eps);
        else _flat_set_ends(t, row, "goal", g1, digits);
        size_fields(t, row, r, f->f, tq, part == 0 ? g0 : g1, digits);
    }
    if (st != EMBZ_OK) {
        _flat_err_from(err, st, &ee);
        if (t != NULL) embz_flat_table_free(t);
    } else
        *out = t;
    embz_size_result_clear(r);
    arb_clear(g0);
    arb_clear(g1);
    embz_target_clear(one);
    fmpq_clear(e);
    return st;
}
