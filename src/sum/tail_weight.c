/* Taylor series of the weight f(x) = w(x, n) of a tail and of phi(u) = f(e^u) e^u, the
 * integrand in u = ln x (see src/sum/sum.h). */
#include "sum/impl.h"

/* xs = x + scale*t as a series of length len. */
static void lin_series(arb_ptr xs, const arb_t x, const arb_t scale, slong len)
{
    _arb_vec_zero(xs, len);
    arb_set(xs, x);
    if (len > 1) arb_set(xs + 1, scale);
}

int embz_tail_weight_series(arb_ptr res, embz_tail_t t, const arb_t x, const arb_t scale,
                            slong len, slong prec)
{
    arb_ptr xs = _arb_vec_init(len);
    lin_series(xs, x, scale, len);
    int st = embz_expr_eval_series(res, t->w, xs, t->n, len, prec);
    t->evals++;
    _arb_vec_clear(xs, len);
    if (st == EMBZ_OK && !_arb_vec_is_finite(res, len)) st = EMBZ_ERR_DOMAIN;
    return st;
}

int embz_tail_phi_series(arb_ptr res, embz_tail_t t, const arb_t v, slong len, slong prec)
{
    arb_ptr vs = _arb_vec_init(len);
    arb_set(vs, v);
    if (len > 1) arb_one(vs + 1);
    int st = embz_expr_eval_series(res, t->phi, vs, t->n, len, prec);
    t->evals++;
    _arb_vec_clear(vs, len);
    if (st == EMBZ_OK && !_arb_vec_is_finite(res, len)) st = EMBZ_ERR_DOMAIN;
    return st;
}
