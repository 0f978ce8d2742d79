/* Fuzz target: weight expressions. The input is the text of an expression in i, n and the
 * parameters a and b. Text that parses must print and parse back to the same tree; after
 * binding a = -1/2, b = 3 it is evaluated by every evaluator at a few points (i, n), and the
 * enclosures must agree wherever two of them return a value: ball arithmetic at 64 and
 * 128 bits, the constant term of the Taylor series, the complex evaluator on the real line,
 * the squared expression, and the substitutions i = e^u (logsub.c) at u = log i. Text that
 * does not parse must give an input error with a well-formed message. */
#include "fuzz_common.h"
#include "embz/expr.h"

static const char *const names[2] = { "a", "b" };

/* (i, n): integers, a fractional index, and sizes from 1 to 10^30 */
static const double points[][2] = {
    { 1, 1 }, { 2, 10 }, { 7, 1000 }, { 2.5, 3 }, { 1000, 1e6 }, { 12345, 1e30 },
};
#define NPOINTS ((long) (sizeof(points) / sizeof(points[0])))

/* Both results are enclosures of one number: they must overlap when both are defined. */
static void check_same(int st1, const arb_t v1, int st2, const arb_t v2)
{
    if (st1 == EMBZ_OK && st2 == EMBZ_OK) FUZZ_CHECK(arb_overlaps(v1, v2));
}

static int eval_at(arb_t res, const embz_expr_t e, double i, double n, slong prec)
{
    arb_t ai, an;
    arb_init(ai); arb_init(an);
    arb_set_d(ai, i);
    arb_set_d(an, n);
    int st = embz_expr_eval_arb(res, e, ai, an, prec);
    FUZZ_CHECK(st == EMBZ_OK || st == EMBZ_ERR_DOMAIN);
    if (st == EMBZ_OK) FUZZ_CHECK(arb_is_finite(res));
    arb_clear(ai); arb_clear(an);
    return st;
}

/* parse(to_string(e)) for a text that is within the parser's limits; returns the status */
static int reparse(embz_expr_t out, const embz_expr_t e, const char *const *params, long np)
{
    char *s = embz_expr_to_string(e);
    FUZZ_CHECK(s != NULL);
    embz_err_t err;
    embz_err_clear(&err);
    int st = embz_expr_parse(out, s, params, np, &err);
    if (st != EMBZ_OK) {
        /* the printed text may be longer or nest deeper than the input did */
        FUZZ_CHECK(strlen(s) > EMBZ_EXPR_MAX_LEN || strstr(err.text, "too deeply") != NULL);
    }
    free(s);
    return st;
}

/* phi(u) = w(e^u) e^u and w(e^u) = core(u) exp(rate u), at u = log i, against w(i). */
static void check_logsub(const embz_expr_t w)
{
    embz_expr_t phi, core, rate;
    embz_expr_init(phi); embz_expr_init(core); embz_expr_init(rate);
    FUZZ_CHECK(embz_expr_log_substitute(phi, w) == EMBZ_OK);
    FUZZ_CHECK(embz_expr_log_split(core, rate, w) == EMBZ_OK);
    FUZZ_CHECK(!(embz_expr_uses(rate) & EMBZ_USES_I));
    arb_t u, ai, an, vw, vphi, vcore, vrate, t;
    arb_init(u); arb_init(ai); arb_init(an); arb_init(vw); arb_init(vphi);
    arb_init(vcore); arb_init(vrate); arb_init(t);
    for (long k = 0; k < NPOINTS; k++) {
        const slong prec = 96;
        arb_set_d(ai, points[k][0]);
        arb_set_d(an, points[k][1]);
        arb_log(u, ai, prec);
        int sw = embz_expr_eval_arb(vw, w, ai, an, prec);
        int sp = embz_expr_eval_arb(vphi, phi, u, an, prec);
        if (sw == EMBZ_OK && sp == EMBZ_OK) {
            arb_mul(t, vw, ai, prec);
            FUZZ_CHECK(arb_overlaps(t, vphi));
        }
        int sc = embz_expr_eval_arb(vcore, core, u, an, prec);
        int sr = embz_expr_eval_arb(vrate, rate, u, an, prec);
        if (sw == EMBZ_OK && sc == EMBZ_OK && sr == EMBZ_OK) {
            arb_mul(t, vrate, u, prec);
            arb_exp(t, t, prec);
            arb_mul(t, t, vcore, prec);
            FUZZ_CHECK(arb_overlaps(t, vw));
        }
    }
    arb_clear(u); arb_clear(ai); arb_clear(an); arb_clear(vw); arb_clear(vphi);
    arb_clear(vcore); arb_clear(vrate); arb_clear(t);
    embz_expr_clear(phi); embz_expr_clear(core); embz_expr_clear(rate);
}

static void check_bound(const embz_expr_t e)
{
    int uses = embz_expr_uses(e);
    FUZZ_CHECK(!(uses & EMBZ_USES_PARAM));
    arb_t v64, v128, vs, vsq, t, first;
    acb_t ci, cn, cv;
    arb_init(v64); arb_init(v128); arb_init(vs); arb_init(vsq); arb_init(t); arb_init(first);
    acb_init(ci); acb_init(cn); acb_init(cv);
    arb_ptr x = _arb_vec_init(3), ser = _arb_vec_init(3);
    embz_expr_t sq, back;
    embz_expr_init(sq); embz_expr_init(back);
    embz_expr_set(sq, e);
    FUZZ_CHECK(embz_expr_equal(sq, e));
    embz_expr_square(sq);
    int have_back = reparse(back, e, NULL, 0) == EMBZ_OK;
    int first_st = -1;

    for (long k = 0; k < NPOINTS; k++) {
        double i = points[k][0], n = points[k][1];
        double d = embz_expr_eval_d(e, i, n);
        (void) d;   /* not certified: only that it runs */
        int s64 = eval_at(v64, e, i, n, 64);
        int s128 = eval_at(v128, e, i, n, 128);
        check_same(s64, v64, s128, v128);

        /* a value free of i (or n) is the same at every i (or n) */
        if (k == 0) {
            first_st = s128;
            arb_set(first, v128);
        } else if (!(uses & (EMBZ_USES_I | EMBZ_USES_N))) {
            check_same(first_st, first, s128, v128);
        }
        if (!(uses & EMBZ_USES_I)) {
            int st = eval_at(t, e, i + 1, n, 128);
            check_same(st, t, s128, v128);
        }

        if (have_back) {
            int st = eval_at(t, back, i, n, 128);
            check_same(st, t, s128, v128);
        }

        int ssq = eval_at(vsq, sq, i, n, 128);
        if (s128 == EMBZ_OK && ssq == EMBZ_OK) {
            arb_sqr(t, v128, 128);
            FUZZ_CHECK(arb_overlaps(t, vsq));
        }

        /* Taylor series in i + t: its constant term is the value at i */
        arb_set_d(x, i);
        arb_one(x + 1);
        arb_zero(x + 2);
        arb_set_d(t, n);
        int ss = embz_expr_eval_series(ser, e, x, t, 3, 128);
        FUZZ_CHECK(ss == EMBZ_OK || ss == EMBZ_ERR_DOMAIN || ss == EMBZ_ERR_NONSMOOTH);
        check_same(ss, ser, s128, v128);
        ss = embz_expr_eval_series(ser, e, x, t, 1, 128);
        FUZZ_CHECK(ss == EMBZ_OK || ss == EMBZ_ERR_DOMAIN || ss == EMBZ_ERR_NONSMOOTH);
        check_same(ss, ser, s128, v128);

        /* on the real line the complex evaluator follows the real rules */
        acb_set_d(ci, i);
        acb_set_d(cn, n);
        int sc = embz_expr_eval_acb(cv, e, ci, cn, 0, 128);
        FUZZ_CHECK(sc == EMBZ_OK || sc == EMBZ_ERR_DOMAIN);
        if (sc == EMBZ_OK && s128 == EMBZ_OK && acb_is_finite(cv)) {
            FUZZ_CHECK(arb_overlaps(acb_realref(cv), v128));
            FUZZ_CHECK(arb_contains_zero(acb_imagref(cv)));
        }
        sc = embz_expr_eval_acb(cv, e, ci, cn, 1, 128);
        FUZZ_CHECK(sc == EMBZ_OK || sc == EMBZ_ERR_DOMAIN);
        if (sc == EMBZ_OK && s128 == EMBZ_OK && acb_is_finite(cv))
            FUZZ_CHECK(arb_overlaps(acb_realref(cv), v128));
    }
    if (e->root >= 0) check_logsub(e);

    _arb_vec_clear(x, 3); _arb_vec_clear(ser, 3);
    embz_expr_clear(sq); embz_expr_clear(back);
    arb_clear(v64); arb_clear(v128); arb_clear(vs); arb_clear(vsq); arb_clear(t);
    arb_clear(first);
    acb_clear(ci); acb_clear(cn); acb_clear(cv);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    if (size > 2 * EMBZ_EXPR_MAX_LEN) return 0;
    char *text = fuzz_text(data, size);
    embz_expr_t e, back;
    embz_err_t err;
    embz_expr_init(e);
    embz_expr_init(back);
    embz_err_clear(&err);

    int st = embz_expr_parse(e, text, names, 2, &err);
    if (st != EMBZ_OK) {
        FUZZ_CHECK(st == EMBZ_ERR_INPUT);
        FUZZ_CHECK(err.code == EMBZ_ERR_INPUT && err.text[0] != '\0');
        FUZZ_CHECK(e->root == -1);
        FUZZ_CHECK(err.col >= 0 && err.col <= (long) strlen(text) + 1);
        FUZZ_CHECK_ERR(&err);
    } else {
        FUZZ_CHECK(e->root >= 0 && e->root < e->len);
        FUZZ_CHECK(e->nparams == 2);
        for (long k = 0; k < e->len; k++) {
            const embz_node_t *nd = e->nodes + k;
            FUZZ_CHECK(nd->a < k && nd->b < k);
        }
        if (reparse(back, e, names, 2) == EMBZ_OK) FUZZ_CHECK(embz_expr_equal(back, e));
        int uses = embz_expr_uses(e);
        if (uses & EMBZ_USES_PARAM) {
            arb_t v, one;
            arb_init(v); arb_init(one);
            arb_one(one);
            /* unbound: no value (a domain error met first may be what is reported,
             * e.g. for 0^-1-a) */
            FUZZ_CHECK(embz_expr_eval_arb(v, e, one, one, 64) != EMBZ_OK);
            FUZZ_CHECK(embz_expr_eval_d(e, 1, 1) != embz_expr_eval_d(e, 1, 1));   /* NaN */
            arb_clear(v); arb_clear(one);
        }
        fmpq values[2];
        fmpq_init(values + 0); fmpq_init(values + 1);
        fmpq_set_si(values + 0, -1, 2);
        fmpq_set_si(values + 1, 3, 1);
        embz_expr_bind(e, values);
        fmpq_clear(values + 0); fmpq_clear(values + 1);
        check_bound(e);
    }
    embz_expr_clear(e);
    embz_expr_clear(back);
    free(text);
    flint_cleanup();
    return 0;
}
