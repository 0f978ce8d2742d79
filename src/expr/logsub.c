/* The substitution x = e^u with the Jacobian: phi(u) = w(e^u) e^u, simplified so that powers
 * and products of e^u are merged exactly. For w = 1/i this gives phi = 1 with no cancellation
 * left to ball arithmetic; for w = i^a, phi = exp((a+1) u). The large-n engine integrates and
 * models sums in the variable u, where this simplification keeps enclosures tight. */
#include <stdlib.h>
#include "expr_impl.h"

/* GCC 12 reports false buffer overflows for fmpq_t fields passed to inline FLINT functions. */
#if defined(__GNUC__) && !defined(__clang__)
#pragma GCC diagnostic ignored "-Wstringop-overflow"
#endif

/* A transformed subtree: value = core * exp((alpha + anode) * u); core == -1 means the
 * constant 1; anode is a node for a part of the rate that is not a rational number (an
 * exponent such as -1 + 1/log(n+1)), or -1. */
typedef struct {
    int core;
    fmpq_t alpha;
    int anode;
} part_t;

static int push(embz_expr_t e, int op, int a, int b)
{
    int k = _embz_expr_push(e, op, a, b, 0);
    if (k < 0) abort();
    return k;
}

static int push_num(embz_expr_t e, const fmpq_t v)
{
    int k = push(e, EMBZ_OP_NUM, -1, -1);
    fmpq_set(e->nodes[k].num, v);
    return k;
}

/* core as a node (1 when absent) */
static int core_node(embz_expr_t e, int core)
{
    if (core >= 0) return core;
    fmpq_t one;
    fmpq_init(one);
    fmpq_one(one);
    int k = push_num(e, one);
    fmpq_clear(one);
    return k;
}

/* exp(alpha u) as a node (alpha != 0) */
static int exp_node(embz_expr_t e, const fmpq_t alpha)
{
    int u = push(e, EMBZ_OP_I, -1, -1);
    if (fmpq_is_one(alpha)) return push(e, EMBZ_OP_EXP, u, -1);
    int a = push_num(e, alpha);
    int m = push(e, EMBZ_OP_MUL, a, u);
    return push(e, EMBZ_OP_EXP, m, -1);
}

/* the rate alpha + anode as one node */
static int rate_node(embz_expr_t e, const part_t *p)
{
    if (p->anode < 0) return push_num(e, p->alpha);
    if (fmpq_is_zero(p->alpha)) return p->anode;
    return push(e, EMBZ_OP_ADD, push_num(e, p->alpha), p->anode);
}

static int rate_is_zero(const part_t *p)
{
    return fmpq_is_zero(p->alpha) && p->anode < 0;
}

/* combine the non-rational parts of two rates (op: ADD or SUB), -1 when both are absent */
static int anode_combine(embz_expr_t e, int a, int b, int op)
{
    if (a < 0 && b < 0) return -1;
    if (b < 0) return a;
    if (a < 0) return op == EMBZ_OP_ADD ? b : push(e, EMBZ_OP_NEG, b, -1);
    return push(e, op, a, b);
}

/* 1 if the subtree at k uses the variable i */
static int uses_var(const embz_expr_struct *src, int k)
{
    if (k < 0) return 0;
    const embz_node_t *nd = src->nodes + k;
    if (nd->op == EMBZ_OP_I) return 1;
    return uses_var(src, nd->a) || uses_var(src, nd->b);
}

static int materialize(embz_expr_t e, const part_t *p)
{
    if (rate_is_zero(p)) return core_node(e, p->core);
    int x;
    if (p->anode < 0) x = exp_node(e, p->alpha);
    else {
        int u = push(e, EMBZ_OP_I, -1, -1);
        x = push(e, EMBZ_OP_EXP, push(e, EMBZ_OP_MUL, rate_node(e, p), u), -1);
    }
    if (p->core < 0) return x;
    return push(e, EMBZ_OP_MUL, p->core, x);
}

static int mul_core(embz_expr_t e, int a, int b, int op)
{
    if (op == EMBZ_OP_MUL) {
        if (a < 0) return b;
        if (b < 0) return a;
        return push(e, EMBZ_OP_MUL, a, b);
    }
    /* division */
    if (b < 0) return a;
    return push(e, EMBZ_OP_DIV, core_node(e, a), b);
}

/* exact rational value of a constant subtree built from numbers with + - * / and small
 * integer powers; 0 when the subtree is not of that kind */
static int const_rational(fmpq_t v, const embz_expr_struct *src, int k)
{
    const embz_node_t *nd = src->nodes + k;
    fmpq_t a, b;
    int ok = 0;
    if (nd->op == EMBZ_OP_NUM) { fmpq_set(v, nd->num); return 1; }
    fmpq_init(a);
    fmpq_init(b);
    switch (nd->op) {
    case EMBZ_OP_NEG:
        if ((ok = const_rational(a, src, nd->a))) fmpq_neg(v, a);
        break;
    case EMBZ_OP_ADD: case EMBZ_OP_SUB: case EMBZ_OP_MUL: case EMBZ_OP_DIV:
        ok = const_rational(a, src, nd->a) && const_rational(b, src, nd->b);
        if (ok) {
            if (nd->op == EMBZ_OP_ADD) fmpq_add(v, a, b);
            else if (nd->op == EMBZ_OP_SUB) fmpq_sub(v, a, b);
            else if (nd->op == EMBZ_OP_MUL) fmpq_mul(v, a, b);
            else if (fmpq_is_zero(b)) ok = 0;
            else fmpq_div(v, a, b);
        }
        break;
    case EMBZ_OP_POW:
        ok = const_rational(a, src, nd->a) && const_rational(b, src, nd->b)
             && fmpz_is_one(fmpq_denref(b)) && fmpz_bits(fmpq_numref(b)) <= 6
             && !(fmpq_is_zero(a) && fmpz_sgn(fmpq_numref(b)) < 0);
        if (ok) fmpq_pow_si(v, a, fmpz_get_si(fmpq_numref(b)));
        break;
    default:
        break;
    }
    fmpq_clear(a);
    fmpq_clear(b);
    return ok;
}

static void transform(part_t *res, embz_expr_t out, const embz_expr_struct *src, int k)
{
    const embz_node_t *nd = src->nodes + k;
    part_t a, b;
    fmpq_init(a.alpha);
    fmpq_init(b.alpha);
    a.anode = b.anode = -1;
    fmpq_zero(res->alpha);
    res->anode = -1;
    res->core = -1;
    switch (nd->op) {
    case EMBZ_OP_I:
        fmpq_one(res->alpha);
        break;
    case EMBZ_OP_NUM: case EMBZ_OP_N: case EMBZ_OP_PARAM:
    case EMBZ_OP_PI: case EMBZ_OP_E: case EMBZ_OP_GAMMA: {
        int j = push(out, nd->op, -1, -1);
        out->nodes[j].param = nd->param;
        fmpq_set(out->nodes[j].num, nd->num);
        res->core = j;
        break;
    }
    case EMBZ_OP_MUL: case EMBZ_OP_DIV:
        transform(&a, out, src, nd->a);
        transform(&b, out, src, nd->b);
        res->core = mul_core(out, a.core, b.core, nd->op);
        if (nd->op == EMBZ_OP_MUL) fmpq_add(res->alpha, a.alpha, b.alpha);
        else fmpq_sub(res->alpha, a.alpha, b.alpha);
        res->anode = anode_combine(out, a.anode, b.anode,
                                   nd->op == EMBZ_OP_MUL ? EMBZ_OP_ADD : EMBZ_OP_SUB);
        break;
    case EMBZ_OP_NEG:
        transform(&a, out, src, nd->a);
        res->core = push(out, EMBZ_OP_NEG, core_node(out, a.core), -1);
        fmpq_set(res->alpha, a.alpha);
        res->anode = a.anode;
        break;
    case EMBZ_OP_SQRT:
        transform(&a, out, src, nd->a);
        res->core = a.core < 0 ? -1 : push(out, EMBZ_OP_SQRT, a.core, -1);
        fmpq_div_2exp(res->alpha, a.alpha, 1);
        if (a.anode >= 0) {
            fmpq_t h;
            fmpq_init(h);
            fmpq_set_si(h, 1, 2);
            res->anode = push(out, EMBZ_OP_MUL, push_num(out, h), a.anode);
            fmpq_clear(h);
        }
        break;
    case EMBZ_OP_POW: {
        fmpq_t v;
        fmpq_init(v);
        transform(&a, out, src, nd->a);
        if (const_rational(v, src, nd->b)) {
            /* (core e^(alpha u))^v = core^v e^(alpha v u) for a positive base */
            if (a.core >= 0) res->core = push(out, EMBZ_OP_POW, a.core, push_num(out, v));
            fmpq_mul(res->alpha, a.alpha, v);
            if (a.anode >= 0) res->anode = push(out, EMBZ_OP_MUL, push_num(out, v), a.anode);
        } else if (!uses_var(src, nd->b)) {
            /* an exponent free of i: (core e^(r u))^b = core^b e^(r b u) */
            transform(&b, out, src, nd->b);
            int bn = core_node(out, b.core);
            if (a.core >= 0) res->core = push(out, EMBZ_OP_POW, a.core, bn);
            if (!rate_is_zero(&a))
                res->anode = push(out, EMBZ_OP_MUL, rate_node(out, &a), bn);
        } else {
            transform(&b, out, src, nd->b);
            res->core = push(out, EMBZ_OP_POW, materialize(out, &a), materialize(out, &b));
        }
        fmpq_clear(v);
        break;
    }
    case EMBZ_OP_LOG: case EMBZ_OP_LOG2: case EMBZ_OP_LOG10:
        transform(&a, out, src, nd->a);
        if (!rate_is_zero(&a)) {
            /* log(core e^(alpha u)) = log(core) + alpha u */
            int u = push(out, EMBZ_OP_I, -1, -1);
            int lin = push(out, EMBZ_OP_MUL, rate_node(out, &a), u);
            int sum = a.core < 0 ? lin
                                 : push(out, EMBZ_OP_ADD, push(out, EMBZ_OP_LOG, a.core, -1), lin);
            if (nd->op != EMBZ_OP_LOG) {
                fmpq_t base;
                fmpq_init(base);
                fmpq_set_si(base, nd->op == EMBZ_OP_LOG2 ? 2 : 10, 1);
                int lb = push(out, EMBZ_OP_LOG, push_num(out, base), -1);
                sum = push(out, EMBZ_OP_DIV, sum, lb);
                fmpq_clear(base);
            }
            res->core = sum;
        } else {
            res->core = push(out, nd->op, core_node(out, a.core), -1);
        }
        break;
    case EMBZ_OP_ADD: case EMBZ_OP_SUB:
        transform(&a, out, src, nd->a);
        transform(&b, out, src, nd->b);
        if (a.anode >= 0 || b.anode >= 0) {
            /* rates that cannot be compared exactly: no factoring */
            res->core = push(out, nd->op, materialize(out, &a), materialize(out, &b));
        } else if (fmpq_equal(a.alpha, b.alpha)) {
            res->core = push(out, nd->op, core_node(out, a.core), core_node(out, b.core));
            fmpq_set(res->alpha, a.alpha);
        } else {
            /* factor out the faster exponential: A e^(au) + B e^(bu) = (A + B e^((b-a)u)) e^(au)
             * for a > b, so that a later log sees log(A + small) + a u, which keeps
             * enclosures over wide ranges of u tight */
            part_t *big = fmpq_cmp(a.alpha, b.alpha) > 0 ? &a : &b;
            part_t *sml = big == &a ? &b : &a;
            fmpq_t diff;
            fmpq_init(diff);
            fmpq_sub(diff, sml->alpha, big->alpha);
            int e = exp_node(out, diff);
            int smallterm = sml->core < 0 ? e : push(out, EMBZ_OP_MUL, sml->core, e);
            int bigcore = core_node(out, big->core);
            if (big == &a) res->core = push(out, nd->op, bigcore, smallterm);
            else res->core = push(out, nd->op, smallterm, bigcore);
            fmpq_set(res->alpha, big->alpha);
            fmpq_clear(diff);
        }
        break;
    default:
        /* every other operation sees its arguments materialised */
        transform(&a, out, src, nd->a);
        if (_embz_op_arity(nd->op) == 2) {
            transform(&b, out, src, nd->b);
            res->core = push(out, nd->op, materialize(out, &a), materialize(out, &b));
        } else {
            res->core = push(out, nd->op, materialize(out, &a), -1);
        }
        break;
    }
    fmpq_clear(a.alpha);
    fmpq_clear(b.alpha);
}

/* w(e^u) = r.core e^(rate u) built in out (r.alpha to be cleared by the caller) */
static void transform_root(part_t *r, embz_expr_t out, const embz_expr_t w)
{
    fmpq_init(r->alpha);
    r->anode = -1;
    transform(r, out, w, w->root);
}

int embz_expr_log_substitute(embz_expr_t out, const embz_expr_t w)
{
    embz_expr_clear(out);
    if (w->root < 0) return EMBZ_ERR_INPUT;
    part_t r;
    transform_root(&r, out, w);
    fmpq_add_ui(r.alpha, r.alpha, 1);      /* the Jacobian dx/du = e^u */
    out->root = materialize(out, &r);
    fmpq_clear(r.alpha);
    _embz_expr_prune(out);    /* parts built and then folded away are not evaluated */
    return EMBZ_OK;
}

int embz_expr_log_split(embz_expr_t core, embz_expr_t rate, const embz_expr_t w)
{
    embz_expr_clear(core);
    embz_expr_clear(rate);
    if (w->root < 0) return EMBZ_ERR_INPUT;
    part_t r;
    transform_root(&r, core, w);
    embz_expr_set(rate, core);
    core->root = core_node(core, r.core);
    rate->root = rate_node(rate, &r);
    fmpq_clear(r.alpha);
    _embz_expr_prune(core);
    _embz_expr_prune(rate);
    return EMBZ_OK;
}
