/* Certified ball evaluation with the real-domain rules:
 *   log, log2, log10, lgamma need a certainly positive argument; sqrt a certainly
 *   non-negative one; x^y with y an exact integer works for every x != 0 (and x = 0 when
 *   y >= 0); otherwise x^y needs x > 0, or x >= 0 with y > 0. Undecided cases are DOMAIN
 *   errors as well (the caller may retry at a higher precision). */
#include <stdlib.h>
#include "expr_impl.h"

int _embz_expr_leaf_arb(arb_t r, const embz_node_t *nd, const arb_t i, const arb_t n, slong prec)
{
    switch (nd->op) {
    case EMBZ_OP_NUM: arb_set_fmpq(r, nd->num, prec); return EMBZ_OK;
    case EMBZ_OP_I: arb_set(r, i); return EMBZ_OK;
    case EMBZ_OP_N: arb_set(r, n); return EMBZ_OK;
    case EMBZ_OP_PI: arb_const_pi(r, prec); return EMBZ_OK;
    case EMBZ_OP_E: arb_const_e(r, prec); return EMBZ_OK;
    case EMBZ_OP_GAMMA: arb_const_euler(r, prec); return EMBZ_OK;
    default: arb_indeterminate(r); return EMBZ_ERR_INPUT;   /* unbound parameter */
    }
}

/* x^y for y > 0 and x >= 0 possibly containing 0: [0, ub(x)^y]. */
static void pow_nonneg(arb_t r, const arb_t x, const arb_t y, slong prec)
{
    arb_t u;
    arb_init(u);
    arb_get_ubound_arf(arb_midref(u), x, prec);
    mag_zero(arb_radref(u));
    if (arf_is_zero(arb_midref(u))) {
        arb_zero(r);
    } else {
        arb_pow(u, u, y, prec);
        arb_get_ubound_arf(arb_midref(u), u, prec);
        mag_zero(arb_radref(u));
        arb_zero(r);
        arb_union(r, r, u, prec);
    }
    arb_clear(u);
}

static int pow_arb(arb_t r, const arb_t x, const arb_t y, slong prec)
{
    if (arb_is_int(y) && arf_cmpabs_2exp_si(arb_midref(y), 62) < 0) {
        fmpz_t k;
        fmpz_init(k);
        arf_get_fmpz(k, arb_midref(y), ARF_RND_DOWN);
        if (fmpz_sgn(k) < 0 && arb_contains_zero(x)) {
            fmpz_clear(k);
            arb_indeterminate(r);
            return EMBZ_ERR_DOMAIN;
        }
        arb_pow_fmpz(r, x, k, prec);
        fmpz_clear(k);
        return EMBZ_OK;
    }
    if (arb_is_positive(x)) {
        arb_pow(r, x, y, prec);
        return EMBZ_OK;
    }
    if (arb_is_nonnegative(x) && arb_is_positive(y)) {
        pow_nonneg(r, x, y, prec);
        return EMBZ_OK;
    }
    arb_indeterminate(r);
    return EMBZ_ERR_DOMAIN;
}

int _embz_expr_op_arb(arb_t r, int op, const arb_t a, const arb_t b, slong prec)
{
    switch (op) {
    case EMBZ_OP_NEG: arb_neg(r, a); break;
    case EMBZ_OP_ADD: arb_add(r, a, b, prec); break;
    case EMBZ_OP_SUB: arb_sub(r, a, b, prec); break;
    case EMBZ_OP_MUL: arb_mul(r, a, b, prec); break;
    case EMBZ_OP_DIV:
        if (arb_contains_zero(b)) goto domain;
        arb_div(r, a, b, prec);
        break;
    case EMBZ_OP_POW:
        if (pow_arb(r, a, b, prec) != EMBZ_OK) goto domain;
        break;
    case EMBZ_OP_LOG: case EMBZ_OP_LOG2: case EMBZ_OP_LOG10:
        if (!arb_is_positive(a)) goto domain;
        arb_log(r, a, prec);
        if (op != EMBZ_OP_LOG) {
            arb_t c;
            arb_init(c);
            arb_log_ui(c, op == EMBZ_OP_LOG2 ? 2 : 10, prec);
            arb_div(r, r, c, prec);
            arb_clear(c);
        }
        break;
    case EMBZ_OP_EXP: arb_exp(r, a, prec); break;
    case EMBZ_OP_SQRT:
        if (!arb_is_nonnegative(a)) goto domain;
        if (arb_contains_zero(a)) {
            arb_t h;
            arb_init(h);
            arb_set_d(h, 0.5);
            pow_nonneg(r, a, h, prec);
            arb_clear(h);
        } else arb_sqrt(r, a, prec);
        break;
    case EMBZ_OP_ABS: arb_abs(r, a); break;
    case EMBZ_OP_LGAMMA:
        if (!arb_is_positive(a)) goto domain;
        arb_lgamma(r, a, prec);
        break;
    case EMBZ_OP_ATAN: arb_atan(r, a, prec); break;
    case EMBZ_OP_SIN: arb_sin(r, a, prec); break;
    case EMBZ_OP_COS: arb_cos(r, a, prec); break;
    case EMBZ_OP_FLOOR: arb_floor(r, a, prec); break;
    case EMBZ_OP_CEIL: arb_ceil(r, a, prec); break;
    case EMBZ_OP_BINOM:
        if (_embz_binom_arb(r, a, b, prec) != EMBZ_OK) goto domain;
        break;
    case EMBZ_OP_MIN: arb_min(r, a, b, prec); break;
    case EMBZ_OP_MAX: arb_max(r, a, b, prec); break;
    default: goto domain;
    }
    if (!arb_is_finite(r)) goto domain;
    return EMBZ_OK;
domain:
    arb_indeterminate(r);
    return EMBZ_ERR_DOMAIN;
}



/* Extra precision for a floor or ceil whose argument straddles an integer: two steps. */
#define STEP_RESOLVE_FACTOR 4
#define STEP_RESOLVE_MAX_PREC 8192

/* r = floor or ceil of the subtree at node a came out as a ball over two integers: decide
 * the side exactly (the argument's exact value, when it is rational at exact i and n), else
 * with more precision; a ball still straddling stays as it is (wide, but certified). */
static void resolve_step(arb_t r, int op, const embz_expr_t e, long a, const arb_t i,
                         const arb_t n, slong prec)
{
    fmpz_t zi, zn;
    fmpq_t q;
    fmpz_init(zi); fmpz_init(zn);
    fmpq_init(q);
    if (arb_is_exact(i) && arb_get_unique_fmpz(zi, i) && arb_is_exact(n)
        && arb_get_unique_fmpz(zn, n) && _embz_expr_eval_fmpq_node(q, e, a, zi, zn) == EMBZ_OK) {
        if (op == EMBZ_OP_FLOOR) fmpz_fdiv_q(zi, fmpq_numref(q), fmpq_denref(q));
        else fmpz_cdiv_q(zi, fmpq_numref(q), fmpq_denref(q));
        arb_set_fmpz(r, zi);
    } else {
        arb_t x, t;
        arb_init(x); arb_init(t);
        for (slong wp = prec * STEP_RESOLVE_FACTOR; wp <= STEP_RESOLVE_MAX_PREC
                                                    && wp <= prec * STEP_RESOLVE_FACTOR * STEP_RESOLVE_FACTOR;
             wp *= STEP_RESOLVE_FACTOR) {
            if (_embz_expr_eval_arb_node(x, e, a, i, n, wp) != EMBZ_OK) break;
            if (op == EMBZ_OP_FLOOR) arb_floor(t, x, wp);
            else arb_ceil(t, x, wp);
            if (arb_is_exact(t)) { arb_set(r, t); break; }
        }
        arb_clear(x); arb_clear(t);
    }
    fmpz_clear(zi); fmpz_clear(zn);
    fmpq_clear(q);
}

/* The value of the subtree at node. */
int _embz_expr_eval_arb_node(arb_t res, const embz_expr_t e, long node, const arb_t i, const arb_t n,
                     slong prec)
{
    int status = EMBZ_OK;
    arb_ptr v = _arb_vec_init(node + 1);
    for (long k = 0; k <= node && status == EMBZ_OK; k++) {
        const embz_node_t *nd = e->nodes + k;
        if (_embz_op_arity(nd->op) == 0) {
            status = _embz_expr_leaf_arb(v + k, nd, i, n, prec);
            if (status == EMBZ_OK && !arb_is_finite(v + k)) status = EMBZ_ERR_DOMAIN;
        } else {
            status = _embz_expr_op_arb(v + k, nd->op, v + nd->a,
                                       nd->b >= 0 ? v + nd->b : v + nd->a, prec);
            if (status == EMBZ_OK && (nd->op == EMBZ_OP_FLOOR || nd->op == EMBZ_OP_CEIL)
                && !arb_is_exact(v + k))
                resolve_step(v + k, nd->op, e, nd->a, i, n, prec);
        }
    }
    if (status == EMBZ_OK) arb_set(res, v + node);
    else arb_indeterminate(res);
    _arb_vec_clear(v, node + 1);
    return status;
}

int embz_expr_eval_arb_node(arb_t res, const embz_expr_t e, long node, const arb_t i,
                            const arb_t n, slong prec)
{
    if (node < 0 || node >= e->len) { arb_indeterminate(res); return EMBZ_ERR_INPUT; }
    return _embz_expr_eval_arb_node(res, e, node, i, n, prec);
}

int embz_expr_eval_arb(arb_t res, const embz_expr_t e, const arb_t i, const arb_t n, slong prec)
{
    if (e->root < 0) { arb_indeterminate(res); return EMBZ_ERR_INPUT; }
    return _embz_expr_eval_arb_node(res, e, e->root, i, n, prec);
}
