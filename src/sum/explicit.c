/* Plain sums of a weight over a range of indices, one ball evaluation per index (the head of
 * a sum before its Euler–Maclaurin tail, and small sizes). */
#include "sum/impl.h"

int embz_sum_explicit(arb_t res, const embz_expr_t w, const arb_t n, slong a, slong b,
                      slong prec, embz_err_t *err)
{
    arb_t x, v;
    arb_init(x); arb_init(v);
    arb_zero(res);
    int st = EMBZ_OK;
    for (slong i = a; i <= b; i++) {
        arb_set_si(x, i);
        st = embz_expr_eval_arb(v, w, x, n, prec);
        if (st != EMBZ_OK) {
            embz_err_set(err, EMBZ_ERR_DOMAIN, "weight undefined at i = %ld", i);
            break;
        }
        arb_add(res, res, v, prec);
    }
    arb_clear(x); arb_clear(v);
    return st;
}
