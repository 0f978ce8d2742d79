/* Exact evaluation of a weight expression at integer points, for expressions whose value
 * there is rational: numbers, i, n, + - * /, integer powers, abs, floor, min, max. Used
 * where a tie with an error goal must be decided exactly (small sizes). */
#include "expr_impl.h"

#define EVAL_Q_MAX_POW_BITS 8       /* integer exponents up to 255 */

int _embz_expr_op_fmpq(fmpq_t r, int op, const fmpq_t a, const fmpq_t b, slong max_pow_bits)
{
    switch (op) {
    case EMBZ_OP_NEG: fmpq_neg(r, a); return EMBZ_OK;
    case EMBZ_OP_ADD: fmpq_add(r, a, b); return EMBZ_OK;
    case EMBZ_OP_SUB: fmpq_sub(r, a, b); return EMBZ_OK;
    case EMBZ_OP_MUL: fmpq_mul(r, a, b); return EMBZ_OK;
    case EMBZ_OP_DIV:
        if (fmpq_is_zero(b)) return EMBZ_ERR_DOMAIN;
        fmpq_div(r, a, b);
        return EMBZ_OK;
    case EMBZ_OP_POW:
        /* integer exponents only (x^(1/2) is irrational in general) */
        if (!fmpz_is_one(fmpq_denref(b)) || (slong) fmpz_bits(fmpq_numref(b)) > max_pow_bits)
            return EMBZ_ERR_UNSUPPORTED;
        if (fmpq_is_zero(a) && fmpz_sgn(fmpq_numref(b)) <= 0) return EMBZ_ERR_DOMAIN;
        fmpq_pow_si(r, a, fmpz_get_si(fmpq_numref(b)));
        return EMBZ_OK;
    case EMBZ_OP_ABS: fmpq_abs(r, a); return EMBZ_OK;
    case EMBZ_OP_FLOOR:
        fmpz_fdiv_q(fmpq_numref(r), fmpq_numref(a), fmpq_denref(a));
        fmpz_one(fmpq_denref(r));
        return EMBZ_OK;
    case EMBZ_OP_MIN: fmpq_set(r, fmpq_cmp(a, b) <= 0 ? a : b); return EMBZ_OK;
    case EMBZ_OP_MAX: fmpq_set(r, fmpq_cmp(a, b) >= 0 ? a : b); return EMBZ_OK;
    default:
        return EMBZ_ERR_UNSUPPORTED;       /* constants, log, exp, sqrt, ...: not rational */
    }
}

int embz_expr_eval_fmpq(fmpq_t res, const embz_expr_t e, const fmpz_t i, const fmpz_t n)
{
    if (e->root < 0) return EMBZ_ERR_INPUT;
    fmpq *v = _fmpq_vec_init(e->root + 1);
    int st = EMBZ_OK;
    for (long k = 0; k <= e->root && st == EMBZ_OK; k++) {
        const embz_node_t *nd = e->nodes + k;
        const fmpq *a = nd->a >= 0 ? v + nd->a : NULL, *b = nd->b >= 0 ? v + nd->b : NULL;
        fmpq *r = v + k;
        switch (nd->op) {
        case EMBZ_OP_NUM: fmpq_set(r, nd->num); break;
        case EMBZ_OP_I: fmpz_set(fmpq_numref(r), i); fmpz_one(fmpq_denref(r)); break;
        case EMBZ_OP_N: fmpz_set(fmpq_numref(r), n); fmpz_one(fmpq_denref(r)); break;
        default: st = _embz_expr_op_fmpq(r, nd->op, a, b, EVAL_Q_MAX_POW_BITS);
        }
    }
    if (st == EMBZ_OK) fmpq_set(res, v + e->root);
    _fmpq_vec_clear(v, e->root + 1);
    return st;
}
