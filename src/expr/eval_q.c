/* Exact evaluation of a weight expression at integer points, for expressions whose value
 * there is rational: numbers, i, n, + - * /, integer powers, abs, floor, ceil, min, max,
 * binom, and the functions at the points where their value is rational (log2 of a power of
 * 2, log10 of a power of 10, log of 1, exp of 0, sqrt of a square). Used where a tie with an
 * error goal must be decided exactly (small sizes), and where a ball straddles a jump of
 * floor or ceil. */
#include "expr_impl.h"

/* k <- the integer with x = base^k, if there is one (x > 0) */
static int exact_log(fmpz_t k, const fmpq_t x, ulong base)
{
    if (fmpq_sgn(x) <= 0) return 0;
    const fmpz *num = fmpq_numref(x), *den = fmpq_denref(x);
    int inv = !fmpz_is_one(den);
    if (inv && !fmpz_is_one(num)) return 0;
    const fmpz *m = inv ? den : num;
    fmpz_t b, p;
    fmpz_init_set_ui(b, base);
    fmpz_init(p);
    slong e = fmpz_remove(p, m, b);   /* m = base^e p, p not divisible by base */
    int ok = fmpz_is_one(p);
    if (ok) fmpz_set_si(k, inv ? -e : e);
    fmpz_clear(b);
    fmpz_clear(p);
    return ok;
}

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
    case EMBZ_OP_LOG2: case EMBZ_OP_LOG10: {
        fmpz_t k;
        fmpz_init(k);
        int ok = exact_log(k, a, op == EMBZ_OP_LOG2 ? 2 : 10);
        if (ok) {
            fmpz_set(fmpq_numref(r), k);
            fmpz_one(fmpq_denref(r));
        }
        fmpz_clear(k);
        return ok ? EMBZ_OK : EMBZ_ERR_UNSUPPORTED;
    }
    case EMBZ_OP_LOG:
        if (fmpq_is_one(a)) { fmpq_zero(r); return EMBZ_OK; }
        return EMBZ_ERR_UNSUPPORTED;   /* (the ball evaluators name a domain error) */
    case EMBZ_OP_EXP:
        if (fmpq_is_zero(a)) { fmpq_one(r); return EMBZ_OK; }
        return EMBZ_ERR_UNSUPPORTED;
    case EMBZ_OP_SQRT:
        if (fmpq_sgn(a) >= 0 && fmpz_is_square(fmpq_numref(a)) && fmpz_is_square(fmpq_denref(a))) {
            fmpz_sqrt(fmpq_numref(r), fmpq_numref(a));
            fmpz_sqrt(fmpq_denref(r), fmpq_denref(a));
            return EMBZ_OK;
        }
        return EMBZ_ERR_UNSUPPORTED;
    case EMBZ_OP_CEIL:
        fmpz_cdiv_q(fmpq_numref(r), fmpq_numref(a), fmpq_denref(a));
        fmpz_one(fmpq_denref(r));
        return EMBZ_OK;
    case EMBZ_OP_BINOM:
        return _embz_binom_fmpq(r, a, b);
    case EMBZ_OP_MIN: fmpq_set(r, fmpq_cmp(a, b) <= 0 ? a : b); return EMBZ_OK;
    case EMBZ_OP_MAX: fmpq_set(r, fmpq_cmp(a, b) >= 0 ? a : b); return EMBZ_OK;
    default:
        return EMBZ_ERR_UNSUPPORTED;       /* constants, log, exp, sqrt, ...: not rational */
    }
}

int embz_expr_eval_fmpq(fmpq_t res, const embz_expr_t e, const fmpz_t i, const fmpz_t n)
{
    if (e->root < 0) return EMBZ_ERR_INPUT;
    return _embz_expr_eval_fmpq_node(res, e, e->root, i, n);
}

/* Precisions at which floor or ceil of an argument that is not rational at the point is
 * decided from its ball (the integer part of log2(5) is 2 although log2(5) is irrational). */
static const slong step_precs[] = { 64, 256, 1024, 4096 };

/* r = floor or ceil (op) of the subtree at node a: from its exact value when it has one,
 * else from balls that lie strictly between two integers. */
static int step_exact(fmpq_t r, int op, const embz_expr_t e, long a, const fmpz_t i,
                      const fmpz_t n)
{
    fmpq_t x;
    fmpq_init(x);
    int st = _embz_expr_eval_fmpq_node(x, e, a, i, n);
    if (st == EMBZ_OK) {
        if (op == EMBZ_OP_FLOOR) fmpz_fdiv_q(fmpq_numref(r), fmpq_numref(x), fmpq_denref(x));
        else fmpz_cdiv_q(fmpq_numref(r), fmpq_numref(x), fmpq_denref(x));
        fmpz_one(fmpq_denref(r));
    } else if (st == EMBZ_ERR_UNSUPPORTED) {
        arb_t bi, bn, y, t;
        arb_init(bi); arb_init(bn); arb_init(y); arb_init(t);
        arb_set_fmpz(bi, i);
        arb_set_fmpz(bn, n);
        for (size_t k = 0; k < sizeof(step_precs) / sizeof(step_precs[0]); k++) {
            slong prec = step_precs[k];
            if (_embz_expr_eval_arb_node(y, e, a, bi, bn, prec) != EMBZ_OK) break;
            if (op == EMBZ_OP_FLOOR) arb_floor(t, y, prec);
            else arb_ceil(t, y, prec);
            /* exact: both ends of the ball have the same floor (ceil) */
            if (arb_is_exact(t)) {
                arb_get_unique_fmpz(fmpq_numref(r), t);
                fmpz_one(fmpq_denref(r));
                st = EMBZ_OK;
                break;
            }
        }
        arb_clear(bi); arb_clear(bn); arb_clear(y); arb_clear(t);
    }
    fmpq_clear(x);
    return st;
}

int _embz_expr_eval_fmpq_node(fmpq_t res, const embz_expr_t e, long node, const fmpz_t i,
                              const fmpz_t n)
{
    fmpq *v = _fmpq_vec_init(node + 1);
    char *reach = flint_calloc((size_t) node + 1, 1);
    int st = EMBZ_OK;
    reach[node] = 1;
    for (long k = node; k >= 0; k--) {   /* children come before their parents */
        if (!reach[k]) continue;
        int op = e->nodes[k].op;
        if (op == EMBZ_OP_FLOOR || op == EMBZ_OP_CEIL) continue;   /* step_exact does them */
        if (e->nodes[k].a >= 0) reach[e->nodes[k].a] = 1;
        if (e->nodes[k].b >= 0) reach[e->nodes[k].b] = 1;
    }
    for (long k = 0; k <= node && st == EMBZ_OK; k++) {
        if (!reach[k]) continue;
        const embz_node_t *nd = e->nodes + k;
        const fmpq *a = nd->a >= 0 ? v + nd->a : NULL, *b = nd->b >= 0 ? v + nd->b : NULL;
        fmpq *r = v + k;
        switch (nd->op) {
        case EMBZ_OP_NUM: fmpq_set(r, nd->num); break;
        case EMBZ_OP_I: fmpz_set(fmpq_numref(r), i); fmpz_one(fmpq_denref(r)); break;
        case EMBZ_OP_N: fmpz_set(fmpq_numref(r), n); fmpz_one(fmpq_denref(r)); break;
        case EMBZ_OP_FLOOR: case EMBZ_OP_CEIL: st = step_exact(r, nd->op, e, nd->a, i, n); break;
        default: st = _embz_expr_op_fmpq(r, nd->op, a, b, EVAL_Q_MAX_POW_BITS);
        }
    }
    if (st == EMBZ_OK) fmpq_set(res, v + node);
    _fmpq_vec_clear(v, node + 1);
    flint_free(reach);
    return st;
}
