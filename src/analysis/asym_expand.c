/* Expansion of an expression tree in the variable x = i, bottom-up over the AST. */
#include <string.h>
#include "asym_impl.h"

#define L EMBZ_ASYM_LEVELS

static void const_arb(aser_t *r, const arb_t x)
{
    aterm_t c;
    _embz_asym_term_init(&c);
    _embz_asym_coef_set_arb(&c, x);
    _embz_asym_const(r, &c);
    _embz_asym_term_clear(&c);
}

/* r = s / log(base) */
static void div_log(aser_t *r, const aser_t *s, ulong base, slong prec)
{
    arb_t x;
    aterm_t c;
    fmpq e[L];
    arb_init(x);
    _embz_asym_term_init(&c);
    for (int k = 0; k < L; k++) fmpq_init(e + k);
    arb_log_ui(x, base, prec);
    arb_inv(x, x, prec);
    _embz_asym_coef_set_arb(&c, x);
    _embz_asym_scale(r, s, &c, e, prec);
    arb_clear(x);
    _embz_asym_term_clear(&c);
    for (int k = 0; k < L; k++) fmpq_clear(e + k);
}

/* is s an exact rational constant? then p receives it */
static int exact_const(fmpq_t p, const aser_t *s)
{
    if (s->kind != EMBZ_ASYM_SCALE || s->has_rem || s->tiny) return 0;
    if (s->len == 0) { fmpq_zero(p); return 1; }
    if (s->len == 1 && s->terms[0].exact && _embz_asym_mono_is_one(s->terms[0].e)) {
        fmpq_set(p, s->terms[0].q);
        return 1;
    }
    return 0;
}

static void walk(aser_t *r, const embz_expr_t e, int node, slong K, slong prec)
{
    const embz_node_t *nd = e->nodes + node;
    aser_t a, b, t;
    fmpq_t p;
    arb_t x;
    embz_asym_series_init(&a); embz_asym_series_init(&b); embz_asym_series_init(&t);
    fmpq_init(p);
    arb_init(x);
    switch (nd->op) {
    case EMBZ_OP_NUM: {
        aterm_t c;
        _embz_asym_term_init(&c);
        _embz_asym_coef_set_fmpq(&c, nd->num);
        _embz_asym_const(r, &c);
        _embz_asym_term_clear(&c);
        break;
    }
    case EMBZ_OP_I: _embz_asym_x(r); break;
    case EMBZ_OP_PI: arb_const_pi(x, prec); const_arb(r, x); break;
    case EMBZ_OP_E: arb_const_e(x, prec); const_arb(r, x); break;
    case EMBZ_OP_GAMMA: arb_const_euler(x, prec); const_arb(r, x); break;
    case EMBZ_OP_NEG:
        walk(&a, e, nd->a, K, prec);
        _embz_asym_neg(r, &a);
        break;
    case EMBZ_OP_ADD: case EMBZ_OP_SUB: case EMBZ_OP_MUL: case EMBZ_OP_DIV:
        walk(&a, e, nd->a, K, prec);
        walk(&b, e, nd->b, K, prec);
        if (nd->op == EMBZ_OP_ADD) _embz_asym_add(r, &a, &b, K, prec);
        else if (nd->op == EMBZ_OP_SUB) _embz_asym_sub(r, &a, &b, K, prec);
        else if (nd->op == EMBZ_OP_MUL) _embz_asym_mul(r, &a, &b, K, prec);
        else {
            fmpq_set_si(p, -1, 1);
            _embz_asym_pow_fmpq(&t, &b, p, K, prec);
            _embz_asym_mul(r, &a, &t, K, prec);
        }
        break;
    case EMBZ_OP_POW:
        walk(&b, e, nd->b, K, prec);
        if (e->nodes[nd->a].op == EMBZ_OP_E) {            /* e^v = exp(v) exactly */
            _embz_asym_exp(r, &b, K, prec);
            break;
        }
        walk(&a, e, nd->a, K, prec);
        if (exact_const(p, &b)) {
            _embz_asym_pow_fmpq(r, &a, p, K, prec);
        } else {                                           /* u^v = exp(v log u) */
            _embz_asym_log(&t, &a, K, prec);
            _embz_asym_mul(&a, &t, &b, K, prec);
            _embz_asym_exp(r, &a, K, prec);
        }
        break;
    case EMBZ_OP_LOG: case EMBZ_OP_LOG2: case EMBZ_OP_LOG10:
        if (nd->op == EMBZ_OP_LOG && e->nodes[nd->a].op == EMBZ_OP_E) {   /* log(e) = 1 */
            _embz_asym_one(r);
            break;
        }
        walk(&a, e, nd->a, K, prec);
        _embz_asym_log(&t, &a, K, prec);
        if (nd->op == EMBZ_OP_LOG) _embz_asym_swap(r, &t);
        else div_log(r, &t, nd->op == EMBZ_OP_LOG2 ? 2 : 10, prec);
        break;
    case EMBZ_OP_EXP:
        walk(&a, e, nd->a, K, prec);
        _embz_asym_exp(r, &a, K, prec);
        break;
    case EMBZ_OP_SQRT:
        walk(&a, e, nd->a, K, prec);
        fmpq_set_si(p, 1, 2);
        _embz_asym_pow_fmpq(r, &a, p, K, prec);
        break;
    case EMBZ_OP_ABS:
        walk(&a, e, nd->a, K, prec);
        _embz_asym_abs(r, &a);
        break;
    case EMBZ_OP_MIN: case EMBZ_OP_MAX:
        walk(&a, e, nd->a, K, prec);
        walk(&b, e, nd->b, K, prec);
        _embz_asym_minmax(r, &a, &b, nd->op == EMBZ_OP_MAX, K, prec);
        break;
    case EMBZ_OP_LGAMMA:
        walk(&a, e, nd->a, K, prec);
        _embz_asym_lgamma(r, &a, K, prec);
        break;
    case EMBZ_OP_ATAN:
        walk(&a, e, nd->a, K, prec);
        _embz_asym_atan(r, &a, K, prec);
        break;
    case EMBZ_OP_SIN: case EMBZ_OP_COS:
        walk(&a, e, nd->a, K, prec);
        _embz_asym_sincos(r, &a, nd->op == EMBZ_OP_COS, K, prec);
        break;
    case EMBZ_OP_FLOOR: case EMBZ_OP_CEIL:
        _embz_asym_unknown(r, nd->op == EMBZ_OP_FLOOR ? "floor has no expansion in the scale"
                                                      : "ceil has no expansion in the scale");
        break;
    case EMBZ_OP_BINOM:
        _embz_asym_unknown(r, "binom has no expansion in the scale");
        break;
    default:
        _embz_asym_unknown(r, "operation not supported by the expansion engine");
        break;
    }
    embz_asym_series_clear(&a); embz_asym_series_clear(&b); embz_asym_series_clear(&t);
    fmpq_clear(p);
    arb_clear(x);
}

int embz_asym_expand(embz_asym_series_t s, const embz_expr_t e, slong nterms, slong prec,
                     embz_err_t *err)
{
    int uses;
    if (err) embz_err_clear(err);
    _embz_asym_zero(s);
    if (e->root < 0) {
        if (err) embz_err_set(err, EMBZ_ERR_INPUT, "empty expression");
        return EMBZ_ERR_INPUT;
    }
    uses = embz_expr_uses(e);
    if (uses & EMBZ_USES_N) {
        if (err) embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                              "the asymptotic analysis needs a weight f(i) that does not use n");
        return EMBZ_ERR_UNSUPPORTED;
    }
    if (uses & EMBZ_USES_PARAM) {
        if (err) embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                              "the expression has parameters without values");
        return EMBZ_ERR_UNSUPPORTED;
    }
    if (nterms < 1) nterms = 1;
    if (prec < 32) prec = 32;
    walk(s, e, e->root, nterms, prec);
    return EMBZ_OK;
}
