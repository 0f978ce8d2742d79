/* Taylor-mode evaluation: every node carries len coefficients of a truncated power series
 * in t, with the series x(t) substituted for i. Nodes that do not depend on i are constant
 * series and are computed with the scalar rules of eval_arb.c. */
#include <stdlib.h>
#include "expr_impl.h"

/* Are coefficients 1..len-1 exactly zero? */
static int is_const_series(arb_srcptr a, slong len)
{
    for (slong k = 1; k < len; k++)
        if (!arb_is_zero(a + k)) return 0;
    return 1;
}

static int vec_finite(arb_srcptr a, slong len)
{
    for (slong k = 0; k < len; k++)
        if (!arb_is_finite(a + k)) return 0;
    return 1;
}

/* Are coefficients 2..len-1 exactly zero (a + b t), with a narrow constant term? The input
 * x(t) usually is. (On wide balls the recurrences below lose more than arb's series
 * algorithms, so those keep wide arguments.) */
static int is_linear_series(arb_srcptr a, slong len)
{
    if (arb_rel_accuracy_bits(a) < 24) return 0;
    for (slong k = 2; k < len; k++)
        if (!arb_is_zero(a + k)) return 0;
    return 1;
}

/* Closed forms for a linear argument a0 + a1 t (a0 > 0 where needed), O(len) instead of
 * Newton iterations: with q = a1 / a0,
 *   (a0 + a1 t)^p = a0^p sum_k binom(p, k) q^k t^k,   c_k = c_(k-1) q (p - k + 1) / k,
 *   log(a0 + a1 t) = log a0 + sum_(k >= 1) (-1)^(k+1) q^k t^k / k,
 *   exp(a0 + a1 t) = e^a0 sum_k a1^k t^k / k!. */
static void linear_pow(arb_ptr r, arb_srcptr a, const arb_t p, slong len, slong prec)
{
    arb_t q, f;
    arb_init(q); arb_init(f);
    arb_div(q, a + 1, a, prec);
    arb_pow(r, a, p, prec);
    for (slong k = 1; k < len; k++) {
        arb_sub_ui(f, p, (ulong) k - 1, prec);
        arb_mul(f, f, q, prec);
        arb_div_ui(f, f, (ulong) k, prec);
        arb_mul(r + k, r + k - 1, f, prec);
    }
    arb_clear(q); arb_clear(f);
}

static void linear_log(arb_ptr r, arb_srcptr a, slong len, slong prec)
{
    arb_t q, qk;
    arb_init(q); arb_init(qk);
    arb_div(q, a + 1, a, prec);
    arb_log(r, a, prec);
    arb_one(qk);
    for (slong k = 1; k < len; k++) {
        arb_mul(qk, qk, q, prec);
        arb_div_ui(r + k, qk, (ulong) k, prec);
        if (k % 2 == 0) arb_neg(r + k, r + k);
    }
    arb_clear(q); arb_clear(qk);
}

static void linear_exp(arb_ptr r, arb_srcptr a, slong len, slong prec)
{
    arb_exp(r, a, prec);
    for (slong k = 1; k < len; k++) {
        arb_mul(r + k, r + k - 1, a + 1, prec);
        arb_div_ui(r + k, r + k, (ulong) k, prec);
    }
}

static int series_pow(arb_ptr r, arb_srcptr a, arb_srcptr b, slong len, slong prec)
{
    /* (non-negative integer powers stay exact with the general rule below) */
    if (is_const_series(b, len) && is_linear_series(a, len) && arb_is_positive(a)
        && !(arb_is_int(b) && arb_is_nonnegative(b))) {
        linear_pow(r, a, b, len, prec);
        return EMBZ_OK;
    }
    if (is_const_series(b, len)) {
        if (arb_is_int(b) && arf_cmpabs_2exp_si(arb_midref(b), 62) < 0) {
            slong k = arf_get_si(arb_midref(b), ARF_RND_DOWN);
            if (k >= 0) {
                _arb_poly_pow_ui_trunc_binexp(r, a, len, (ulong) k, len, prec);
            } else {
                if (arb_contains_zero(a)) return EMBZ_ERR_DOMAIN;
                arb_ptr inv = _arb_vec_init(len);
                _arb_poly_inv_series(inv, a, len, len, prec);
                _arb_poly_pow_ui_trunc_binexp(r, inv, len, (ulong) (-k), len, prec);
                _arb_vec_clear(inv, len);
            }
            return EMBZ_OK;
        }
        if (!arb_is_positive(a)) return EMBZ_ERR_DOMAIN;
        _arb_poly_pow_arb_series(r, a, len, b, len, prec);
        return EMBZ_OK;
    }
    if (!arb_is_positive(a)) return EMBZ_ERR_DOMAIN;
    _arb_poly_pow_series(r, a, len, b, len, len, prec);
    return EMBZ_OK;
}

/* One operation on series of which at least one operand depends on i. */
static int series_op(arb_ptr r, int op, arb_srcptr a, arb_srcptr b, slong len, slong prec)
{
    switch (op) {
    case EMBZ_OP_NEG: _arb_vec_neg(r, a, len); return EMBZ_OK;
    case EMBZ_OP_ADD: _arb_vec_add(r, a, b, len, prec); return EMBZ_OK;
    case EMBZ_OP_SUB: _arb_vec_sub(r, a, b, len, prec); return EMBZ_OK;
    case EMBZ_OP_MUL:
        if (is_const_series(a, len)) _arb_vec_scalar_mul(r, b, len, a, prec);
        else if (is_const_series(b, len)) _arb_vec_scalar_mul(r, a, len, b, prec);
        else _arb_poly_mullow(r, a, len, b, len, len, prec);
        return EMBZ_OK;
    case EMBZ_OP_DIV:
        if (arb_contains_zero(b)) return EMBZ_ERR_DOMAIN;
        if (is_const_series(b, len)) {
            _arb_vec_scalar_div(r, a, len, b, prec);
        } else if (is_linear_series(b, len)) {
            /* 1/(b0 + b1 t) = (1/b0) sum_k (-b1/b0)^k t^k, then times a */
            arb_ptr inv = _arb_vec_init(len);
            arb_t q;
            arb_init(q);
            arb_div(q, b + 1, b, prec);
            arb_neg(q, q);
            arb_inv(inv, b, prec);
            for (slong k = 1; k < len; k++) arb_mul(inv + k, inv + k - 1, q, prec);
            if (is_const_series(a, len)) _arb_vec_scalar_mul(r, inv, len, a, prec);
            else _arb_poly_mullow(r, a, len, inv, len, len, prec);
            arb_clear(q);
            _arb_vec_clear(inv, len);
        } else {
            _arb_poly_div_series(r, a, len, b, len, len, prec);
        }
        return EMBZ_OK;
    case EMBZ_OP_POW: return series_pow(r, a, b, len, prec);
    case EMBZ_OP_LOG: case EMBZ_OP_LOG2: case EMBZ_OP_LOG10:
        if (!arb_is_positive(a)) return EMBZ_ERR_DOMAIN;
        if (is_linear_series(a, len)) linear_log(r, a, len, prec);
        else _arb_poly_log_series(r, a, len, len, prec);
        if (op != EMBZ_OP_LOG) {
            arb_t c;
            arb_init(c);
            arb_log_ui(c, op == EMBZ_OP_LOG2 ? 2 : 10, prec);
            _arb_vec_scalar_div(r, r, len, c, prec);
            arb_clear(c);
        }
        return EMBZ_OK;
    case EMBZ_OP_EXP:
        if (is_linear_series(a, len)) linear_exp(r, a, len, prec);
        else _arb_poly_exp_series(r, a, len, len, prec);
        return EMBZ_OK;
    case EMBZ_OP_SQRT:
        if (!arb_is_positive(a)) return EMBZ_ERR_DOMAIN;
        if (is_linear_series(a, len)) {
            arb_t h;
            arb_init(h);
            arb_set_d(h, 0.5);
            linear_pow(r, a, h, len, prec);
            arb_clear(h);
        } else {
            _arb_poly_sqrt_series(r, a, len, len, prec);
        }
        return EMBZ_OK;
    case EMBZ_OP_LGAMMA:
        if (!arb_is_positive(a)) return EMBZ_ERR_DOMAIN;
        _arb_poly_lgamma_series(r, a, len, len, prec);
        return EMBZ_OK;
    case EMBZ_OP_ATAN: _arb_poly_atan_series(r, a, len, len, prec); return EMBZ_OK;
    case EMBZ_OP_SIN: case EMBZ_OP_COS: {
        arb_ptr other = _arb_vec_init(len);
        if (op == EMBZ_OP_SIN) _arb_poly_sin_cos_series(r, other, a, len, len, prec);
        else _arb_poly_sin_cos_series(other, r, a, len, len, prec);
        _arb_vec_clear(other, len);
        return EMBZ_OK;
    }
    case EMBZ_OP_ABS:
        if (arb_is_positive(a)) { _arb_vec_set(r, a, len); return EMBZ_OK; }
        if (arb_is_negative(a)) { _arb_vec_neg(r, a, len); return EMBZ_OK; }
        return EMBZ_ERR_NONSMOOTH;
    case EMBZ_OP_MIN: case EMBZ_OP_MAX:
        if (arb_lt(a, b)) { _arb_vec_set(r, op == EMBZ_OP_MIN ? a : b, len); return EMBZ_OK; }
        if (arb_gt(a, b)) { _arb_vec_set(r, op == EMBZ_OP_MIN ? b : a, len); return EMBZ_OK; }
        return EMBZ_ERR_NONSMOOTH;
    case EMBZ_OP_FLOOR: {
        int ok;
        _arb_vec_zero(r, len);
        arb_floor(r, a, prec);
        ok = arb_is_exact(r) && arb_gt(a, r);
        return ok ? EMBZ_OK : EMBZ_ERR_NONSMOOTH;
    }
    case EMBZ_OP_CEIL: {
        int ok;
        _arb_vec_zero(r, len);
        arb_ceil(r, a, prec);
        ok = arb_is_exact(r) && arb_lt(a, r);
        return ok ? EMBZ_OK : EMBZ_ERR_NONSMOOTH;
    }
    case EMBZ_OP_BINOM:
        return EMBZ_ERR_UNSUPPORTED;   /* explicit sizes and level counts only */
    default: return EMBZ_ERR_DOMAIN;
    }
}

int embz_expr_eval_series(arb_ptr res, const embz_expr_t e, arb_srcptr x,
                          const arb_t n, slong len, slong prec)
{
    if (len <= 0) return EMBZ_OK;
    if (e->root < 0) { _arb_vec_indeterminate(res, len); return EMBZ_ERR_INPUT; }
    return embz_expr_eval_series_node(res, e, e->root, x, n, len, prec);
}

int embz_expr_eval_series_node(arb_ptr res, const embz_expr_t e, long node, arb_srcptr x,
                               const arb_t n, slong len, slong prec)
{
    int status = EMBZ_OK;
    if (len <= 0) return EMBZ_OK;
    if (node < 0 || node >= e->len) { _arb_vec_indeterminate(res, len); return EMBZ_ERR_INPUT; }
    long nn = node + 1;
    arb_ptr v = _arb_vec_init(nn * len);
    char *dep = calloc((size_t) nn, 1);   /* node depends on i */
    if (dep == NULL) abort();

    for (long k = 0; k < nn && status == EMBZ_OK; k++) {
        const embz_node_t *nd = e->nodes + k;
        arb_ptr r = v + k * len;
        if (nd->op == EMBZ_OP_I) {
            _arb_vec_set(r, x, len);
            dep[k] = 1;
            if (!vec_finite(r, len)) status = EMBZ_ERR_DOMAIN;
            continue;
        }
        if (_embz_op_arity(nd->op) == 0) {
            status = _embz_expr_leaf_arb(r, nd, x, n, prec);
            if (status == EMBZ_OK && !arb_is_finite(r)) status = EMBZ_ERR_DOMAIN;
            continue;
        }
        arb_srcptr a = v + nd->a * len;
        arb_srcptr b = nd->b >= 0 ? v + nd->b * len : a;
        dep[k] = dep[nd->a] || (nd->b >= 0 && dep[nd->b]);
        if (!dep[k] || len == 1) {
            status = _embz_expr_op_arb(r, nd->op, a, b, prec);
        } else {
            status = series_op(r, nd->op, a, b, len, prec);
            if (status == EMBZ_OK && !vec_finite(r, len)) status = EMBZ_ERR_DOMAIN;
        }
    }
    if (status == EMBZ_OK) _arb_vec_set(res, v + node * len, len);
    else _arb_vec_indeterminate(res, len);
    _arb_vec_clear(v, nn * len);
    free(dep);
    return status;
}
