/* Complex evaluation for numerical integration along the real axis.
 *
 * With analytic != 0 the value must come from a function that is holomorphic on the whole
 * input box and equals the real weight on the real points of the box; where that is not
 * certain the result is set indeterminate (status stays EMBZ_OK: the integrator then
 * subdivides). Branch cuts: log, sqrt, non-integer pow and lgamma on (-inf, 0]; atan on
 * the imaginary axis beyond +-i. A non-smooth operation is replaced by the holomorphic
 * piece that the real parts of the box certainly select (abs(z) = +-z when Re z has one
 * sign, min/max when the real parts are separated, floor = k when k < Re z < k+1).
 *
 * With analytic == 0 the box is treated as a point evaluation: the same rules apply, and
 * for an input on the real line (imaginary part exactly zero) the real operations are used
 * where the rules above cannot decide. EMBZ_ERR_DOMAIN is returned only for values that are
 * certainly outside the real domain (e.g. log of a real number <= 0). */
#include <stdlib.h>
#include "expr_impl.h"

static int is_real(const acb_t z) { return arb_is_zero(acb_imagref(z)); }

/* real operation on a real input, with the real domain rules */
static int real_op(acb_t r, int op, const acb_t a, const acb_t b, slong prec)
{
    int s = _embz_expr_op_arb(acb_realref(r), op, acb_realref(a), acb_realref(b), prec);
    arb_zero(acb_imagref(r));
    if (s != EMBZ_OK) acb_indeterminate(r);
    return s;
}

/* z certainly a real number <= 0 (outside the real domain of log, lgamma) */
static int certainly_nonpos_real(const acb_t z)
{
    return is_real(z) && arb_is_nonpositive(acb_realref(z));
}

static int op_acb(acb_t r, int op, const acb_t a, const acb_t b, int analytic, slong prec)
{
    int both_real = is_real(a) && is_real(b);
    switch (op) {
    case EMBZ_OP_NEG: acb_neg(r, a); return EMBZ_OK;
    case EMBZ_OP_ADD: acb_add(r, a, b, prec); return EMBZ_OK;
    case EMBZ_OP_SUB: acb_sub(r, a, b, prec); return EMBZ_OK;
    case EMBZ_OP_MUL: acb_mul(r, a, b, prec); return EMBZ_OK;
    case EMBZ_OP_DIV:
        if (!analytic && acb_is_zero(b)) { acb_indeterminate(r); return EMBZ_ERR_DOMAIN; }
        acb_div(r, a, b, prec);
        return EMBZ_OK;
    case EMBZ_OP_POW:
        if (acb_is_int(b)) {
            fmpz_t k;
            if (arf_cmpabs_2exp_si(arb_midref(acb_realref(b)), 62) >= 0) break;
            fmpz_init(k);
            arf_get_fmpz(k, arb_midref(acb_realref(b)), ARF_RND_DOWN);
            if (fmpz_sgn(k) < 0 && acb_is_zero(a) && !analytic) {
                fmpz_clear(k);
                acb_indeterminate(r);
                return EMBZ_ERR_DOMAIN;
            }
            acb_pow_fmpz(r, a, k, prec);
            fmpz_clear(k);
            return EMBZ_OK;
        }
        if (!analytic && both_real && arb_is_negative(acb_realref(a))) {
            acb_indeterminate(r);
            return EMBZ_ERR_DOMAIN;
        }
        if (!analytic && both_real) return real_op(r, op, a, b, prec);
        acb_pow_analytic(r, a, b, 1, prec);
        return EMBZ_OK;
    case EMBZ_OP_LOG: case EMBZ_OP_LOG2: case EMBZ_OP_LOG10:
        if (!analytic && certainly_nonpos_real(a)) break;
        acb_log_analytic(r, a, 1, prec);
        if (op != EMBZ_OP_LOG) {
            arb_t c;
            arb_init(c);
            arb_log_ui(c, op == EMBZ_OP_LOG2 ? 2 : 10, prec);
            acb_div_arb(r, r, c, prec);
            arb_clear(c);
        }
        return EMBZ_OK;
    case EMBZ_OP_EXP: acb_exp(r, a, prec); return EMBZ_OK;
    case EMBZ_OP_SQRT:
        if (!analytic && is_real(a)) {
            if (arb_is_negative(acb_realref(a))) break;
            if (arb_is_nonnegative(acb_realref(a))) return real_op(r, op, a, b, prec);
        }
        acb_sqrt_analytic(r, a, 1, prec);
        return EMBZ_OK;
    case EMBZ_OP_LGAMMA:
        if (arb_is_positive(acb_realref(a))) { acb_lgamma(r, a, prec); return EMBZ_OK; }
        if (!analytic && certainly_nonpos_real(a)) break;
        acb_indeterminate(r);
        return EMBZ_OK;
    case EMBZ_OP_ATAN: {
        arb_t t;
        int ok;
        arb_init(t);
        arb_abs(t, acb_imagref(a));
        arb_sub_ui(t, t, 1, prec);
        ok = arb_is_negative(t);
        arb_clear(t);
        if (ok) acb_atan(r, a, prec);
        else acb_indeterminate(r);
        return EMBZ_OK;
    }
    case EMBZ_OP_SIN: acb_sin(r, a, prec); return EMBZ_OK;
    case EMBZ_OP_COS: acb_cos(r, a, prec); return EMBZ_OK;
    case EMBZ_OP_ABS:
        if (arb_is_positive(acb_realref(a))) { acb_set(r, a); return EMBZ_OK; }
        if (arb_is_negative(acb_realref(a))) { acb_neg(r, a); return EMBZ_OK; }
        if (!analytic && is_real(a)) return real_op(r, op, a, b, prec);
        acb_indeterminate(r);
        return EMBZ_OK;
    case EMBZ_OP_MIN: case EMBZ_OP_MAX:
        if (arb_lt(acb_realref(a), acb_realref(b))) {
            acb_set(r, op == EMBZ_OP_MIN ? a : b);
            return EMBZ_OK;
        }
        if (arb_gt(acb_realref(a), acb_realref(b))) {
            acb_set(r, op == EMBZ_OP_MIN ? b : a);
            return EMBZ_OK;
        }
        if (!analytic && both_real) return real_op(r, op, a, b, prec);
        acb_indeterminate(r);
        return EMBZ_OK;
    case EMBZ_OP_BINOM:
        if (!analytic && both_real) return real_op(r, op, a, b, prec);
        acb_indeterminate(r);
        return EMBZ_OK;
    case EMBZ_OP_FLOOR: case EMBZ_OP_CEIL: {
        arb_t f;
        int ok;
        arb_init(f);
        if (op == EMBZ_OP_FLOOR) arb_floor(f, acb_realref(a), prec);
        else arb_ceil(f, acb_realref(a), prec);
        ok = arb_is_exact(f) && (op == EMBZ_OP_FLOOR ? arb_gt(acb_realref(a), f)
                                                     : arb_lt(acb_realref(a), f));
        if (ok) acb_set_arb(r, f);
        arb_clear(f);
        if (ok) return EMBZ_OK;
        if (!analytic && is_real(a)) return real_op(r, op, a, b, prec);
        acb_indeterminate(r);
        return EMBZ_OK;
    }
    default: break;
    }
    acb_indeterminate(r);
    return EMBZ_ERR_DOMAIN;
}

int embz_expr_eval_acb(acb_t res, const embz_expr_t e, const acb_t i, const acb_t n,
                       int analytic, slong prec)
{
    int status = EMBZ_OK;
    if (e->root < 0) { acb_indeterminate(res); return EMBZ_ERR_INPUT; }
    long nn = e->root + 1;
    acb_ptr v = _acb_vec_init(nn);
    for (long k = 0; k < nn && status == EMBZ_OK; k++) {
        const embz_node_t *nd = e->nodes + k;
        acb_ptr r = v + k;
        switch (nd->op) {
        case EMBZ_OP_I: acb_set(r, i); break;
        case EMBZ_OP_N: acb_set(r, n); break;
        case EMBZ_OP_NUM: case EMBZ_OP_PI: case EMBZ_OP_E: case EMBZ_OP_GAMMA:
        case EMBZ_OP_PARAM:
            status = _embz_expr_leaf_arb(acb_realref(r), nd, acb_realref(i),
                                         acb_realref(n), prec);
            arb_zero(acb_imagref(r));
            break;
        default:
            status = op_acb(r, nd->op, v + nd->a, nd->b >= 0 ? v + nd->b : v + nd->a,
                            analytic, prec);
            break;
        }
    }
    if (status == EMBZ_OK) acb_set(res, v + e->root);
    else acb_indeterminate(res);
    _acb_vec_clear(v, nn);
    return status;
}
