/* Expression objects: memory, copying, binding, squaring, queries, structural equality. */
#include <stdlib.h>
#include <string.h>
#include "expr_impl.h"

void embz_expr_init(embz_expr_t e)
{
    e->nodes = NULL;
    e->len = 0;
    e->alloc = 0;
    e->root = -1;
    e->params = NULL;
    e->nparams = 0;
    e->notes = 0;
}

void embz_expr_clear(embz_expr_t e)
{
    for (long k = 0; k < e->alloc; k++)
        fmpq_clear(e->nodes[k].num);
    free(e->nodes);
    for (long k = 0; k < e->nparams; k++)
        free(e->params[k]);
    free(e->params);
    embz_expr_init(e);
}

int _embz_expr_push(embz_expr_t e, int op, int a, int b, long col)
{
    if (e->len >= e->alloc) {
        long na = e->alloc < 16 ? 16 : 2 * e->alloc;
        embz_node_t *nn = realloc(e->nodes, (size_t) na * sizeof(embz_node_t));
        if (nn == NULL) return -1;
        for (long k = e->alloc; k < na; k++)
            fmpq_init(nn[k].num);
        e->nodes = nn;
        e->alloc = na;
    }
    embz_node_t *nd = e->nodes + e->len;
    nd->op = op;
    nd->a = a;
    nd->b = b;
    nd->param = -1;
    nd->col = col;
    fmpq_zero(nd->num);
    return (int) e->len++;
}

void embz_expr_set(embz_expr_t dst, const embz_expr_t src)
{
    if (dst == src) return;
    embz_expr_clear(dst);
    for (long k = 0; k < src->len; k++) {
        const embz_node_t *s = src->nodes + k;
        int j = _embz_expr_push(dst, s->op, s->a, s->b, s->col);
        if (j < 0) abort();   /* out of memory, as FLINT does */
        dst->nodes[j].param = s->param;
        fmpq_set(dst->nodes[j].num, s->num);
    }
    dst->root = src->root;
    dst->notes = src->notes;
    _embz_expr_copy_params(dst, src);
}

void _embz_expr_copy_params(embz_expr_t dst, const embz_expr_t src)
{
    if (src->nparams <= 0) return;
    dst->params = malloc((size_t) src->nparams * sizeof(char *));
    if (dst->params == NULL) abort();
    for (long k = 0; k < src->nparams; k++) {
        size_t l = strlen(src->params[k]) + 1;
        dst->params[k] = malloc(l);
        if (dst->params[k] == NULL) abort();
        memcpy(dst->params[k], src->params[k], l);
    }
    dst->nparams = src->nparams;
}

/* largest |exponent| and result size of an integer power folded exactly */
#define FOLD_MAX_POW 63      /* exponents of at most 6 bits */
#define FOLD_MAX_BITS 4096

/* Replace every subtree whose value is an exact rational independent of i and n by a number:
 * + - * /, integer powers, abs, floor, min and max of numbers. floor(10) or (3 - 1) then cost
 * nothing and no longer look non-smooth to the engine (floor of a constant is a constant).
 * Division by zero and irrational operations stay for the evaluators to handle. */
void embz_expr_fold(embz_expr_t e)
{
    int folded = 0;
    for (long k = 0; k < e->len; k++) {
        embz_node_t *nd = e->nodes + k;
        int ar = _embz_op_arity(nd->op);
        if (nd->op == EMBZ_OP_NUM || ar == 0) continue;
        const embz_node_t *A = e->nodes + nd->a, *B = ar == 2 ? e->nodes + nd->b : NULL;
        if (A->op != EMBZ_OP_NUM || (B != NULL && B->op != EMBZ_OP_NUM)) continue;
        const fmpq *a = A->num, *b = B != NULL ? B->num : NULL;
        fmpq_t r;
        fmpq_init(r);
        /* integer powers only of small enough numbers: no result of more than FOLD_MAX_BITS */
        int ok = !(nd->op == EMBZ_OP_POW
                   && (fmpz_bits(fmpq_numref(a)) + fmpz_bits(fmpq_denref(a))) * FOLD_MAX_POW
                      > FOLD_MAX_BITS)
                 && _embz_expr_op_fmpq(r, nd->op, a, b, 6) == EMBZ_OK;
        if (ok) {
            fmpq_swap(nd->num, r);
            nd->op = EMBZ_OP_NUM;
            nd->a = nd->b = -1;
            folded = 1;
        }
        fmpq_clear(r);
    }
    if (folded) _embz_expr_prune(e);
}

int embz_expr_scale_2exp(embz_expr_t e, slong k)
{
    if (e->root < 0) return EMBZ_ERR_INPUT;
    int c = _embz_expr_push(e, EMBZ_OP_NUM, -1, -1, 0);
    if (c < 0) return EMBZ_ERR_NOMEM;
    fmpq_one(e->nodes[c].num);
    if (k >= 0) fmpz_mul_2exp(fmpq_numref(e->nodes[c].num), fmpq_numref(e->nodes[c].num), (ulong) k);
    else fmpz_mul_2exp(fmpq_denref(e->nodes[c].num), fmpq_denref(e->nodes[c].num), (ulong) -k);
    int r = _embz_expr_push(e, EMBZ_OP_MUL, e->root, c, 0);
    if (r < 0) return EMBZ_ERR_NOMEM;
    e->root = r;
    return EMBZ_OK;
}

void embz_expr_bind(embz_expr_t e, const fmpq *values)
{
    for (long k = 0; k < e->len; k++) {
        embz_node_t *nd = e->nodes + k;
        if (nd->op == EMBZ_OP_PARAM && nd->param >= 0 && nd->param < e->nparams) {
            fmpq_set(nd->num, values + nd->param);
            nd->op = EMBZ_OP_NUM;
            nd->param = -1;
        }
    }
    embz_expr_fold(e);
}

/* The square of the subtree at k as a new node, pushing the square inside products, quotients,
 * square roots and rational powers, so that amplitudes such as 1/sqrt(i) give the weight 1/i
 * (cheaper to evaluate, and the same value wherever the amplitude is defined). */
static int square_node(embz_expr_t e, int k)
{
    embz_node_t nd = e->nodes[k];     /* copy: pushing may move the array */
    int a, b;
    switch (nd.op) {
    case EMBZ_OP_SQRT:
        return nd.a;
    case EMBZ_OP_MUL: case EMBZ_OP_DIV:
        a = square_node(e, nd.a);
        b = square_node(e, nd.b);
        a = _embz_expr_push(e, nd.op, a, b, nd.col);
        if (a < 0) abort();
        return a;
    case EMBZ_OP_NEG:
        return square_node(e, nd.a);
    case EMBZ_OP_NUM:
        a = _embz_expr_push(e, EMBZ_OP_NUM, -1, -1, nd.col);
        if (a < 0) abort();
        fmpq_mul(e->nodes[a].num, e->nodes[k].num, e->nodes[k].num);
        return a;
    case EMBZ_OP_POW:
        if (e->nodes[nd.b].op == EMBZ_OP_NUM) {
            b = _embz_expr_push(e, EMBZ_OP_NUM, -1, -1, e->nodes[nd.b].col);
            if (b < 0) abort();
            fmpq_mul_2exp(e->nodes[b].num, e->nodes[nd.b].num, 1);
            a = _embz_expr_push(e, EMBZ_OP_POW, nd.a, b, nd.col);
            if (a < 0) abort();
            return a;
        }
        break;
    default:
        break;
    }
    b = _embz_expr_push(e, EMBZ_OP_NUM, -1, -1, 0);
    if (b < 0) abort();
    fmpq_set_si(e->nodes[b].num, 2, 1);
    a = _embz_expr_push(e, EMBZ_OP_POW, k, b, 0);
    if (a < 0) abort();
    return a;
}

void _embz_expr_prune(embz_expr_t e)
{
    if (e->root < 0) return;
    long len = e->root + 1;
    char *keep = calloc((size_t) len, 1);
    int *map = malloc((size_t) len * sizeof(int));
    if (keep == NULL || map == NULL) abort();
    keep[e->root] = 1;
    long kept = 0;
    for (long k = e->root; k >= 0; k--) {
        if (!keep[k]) continue;
        kept++;
        if (e->nodes[k].a >= 0) keep[e->nodes[k].a] = 1;
        if (e->nodes[k].b >= 0) keep[e->nodes[k].b] = 1;
    }
    if (kept < e->len) {
        embz_expr_t t;
        embz_expr_init(t);
        for (long k = 0; k < len; k++) {
            if (!keep[k]) continue;
            const embz_node_t *s = e->nodes + k;
            int j = _embz_expr_push(t, s->op, s->a >= 0 ? map[s->a] : -1,
                                    s->b >= 0 ? map[s->b] : -1, s->col);
            if (j < 0) abort();
            t->nodes[j].param = s->param;
            fmpq_set(t->nodes[j].num, s->num);
            map[k] = j;
        }
        t->root = map[e->root];
        t->params = e->params;                 /* the parameter names move over */
        t->nparams = e->nparams;
        e->params = NULL;
        e->nparams = 0;
        embz_expr_clear(e);
        *e = *t;
    }
    free(keep);
    free(map);
}

void embz_expr_square(embz_expr_t e)
{
    if (e->root < 0) return;
    e->root = square_node(e, e->root);
    _embz_expr_prune(e);    /* the evaluators walk every node up to the root */
}

int _embz_op_arity(int op)
{
    switch (op) {
    case EMBZ_OP_NUM: case EMBZ_OP_I: case EMBZ_OP_N: case EMBZ_OP_PARAM:
    case EMBZ_OP_PI: case EMBZ_OP_E: case EMBZ_OP_GAMMA:
        return 0;
    case EMBZ_OP_ADD: case EMBZ_OP_SUB: case EMBZ_OP_MUL: case EMBZ_OP_DIV:
    case EMBZ_OP_POW: case EMBZ_OP_MIN: case EMBZ_OP_MAX: case EMBZ_OP_BINOM:
        return 2;
    default:
        return 1;
    }
}

const char *_embz_op_name(int op)
{
    switch (op) {
    case EMBZ_OP_PI: return "pi";
    case EMBZ_OP_E: return "e";
    case EMBZ_OP_GAMMA: return "euler";
    case EMBZ_OP_LOG: return "log";
    case EMBZ_OP_LOG2: return "log2";
    case EMBZ_OP_LOG10: return "log10";
    case EMBZ_OP_EXP: return "exp";
    case EMBZ_OP_SQRT: return "sqrt";
    case EMBZ_OP_ABS: return "abs";
    case EMBZ_OP_LGAMMA: return "lgamma";
    case EMBZ_OP_ATAN: return "atan";
    case EMBZ_OP_SIN: return "sin";
    case EMBZ_OP_COS: return "cos";
    case EMBZ_OP_FLOOR: return "floor";
    case EMBZ_OP_MIN: return "min";
    case EMBZ_OP_MAX: return "max";
    case EMBZ_OP_POW: return "pow";
    case EMBZ_OP_CEIL: return "ceil";
    case EMBZ_OP_BINOM: return "binom";
    default: return NULL;
    }
}

/* Flags of the subtree below the root only (nodes left over elsewhere do not count). */
int embz_expr_uses(const embz_expr_t e)
{
    int flags = 0;
    if (e->root < 0) return 0;
    char *reach = calloc((size_t) e->len, 1);
    if (reach == NULL) abort();
    reach[e->root] = 1;
    for (long k = e->root; k >= 0; k--) {
        if (!reach[k]) continue;
        const embz_node_t *nd = e->nodes + k;
        if (nd->a >= 0) reach[nd->a] = 1;
        if (nd->b >= 0) reach[nd->b] = 1;
        switch (nd->op) {
        case EMBZ_OP_I: flags |= EMBZ_USES_I; break;
        case EMBZ_OP_N: flags |= EMBZ_USES_N; break;
        case EMBZ_OP_PARAM: flags |= EMBZ_USES_PARAM; break;
        case EMBZ_OP_ABS: case EMBZ_OP_FLOOR: case EMBZ_OP_CEIL: case EMBZ_OP_MIN:
        case EMBZ_OP_MAX:
            flags |= EMBZ_USES_NONSMOOTH; break;
        default: break;
        }
    }
    free(reach);
    return flags;
}

static int node_equal(const embz_expr_struct *x, int p, const embz_expr_struct *y, int q)
{
    /* explicit stack of pairs: no recursion depth issues on long chains */
    /* each visited node of x pushes two pairs: 2 * len + 1 pairs suffice */
    long top = 0;
    int *st = malloc((size_t) (2 * x->len + 2) * 2 * sizeof(int));
    int eq = 1;
    if (st == NULL) abort();
    st[0] = p; st[1] = q; top = 1;
    while (top > 0 && eq) {
        top--;
        p = st[2 * top]; q = st[2 * top + 1];
        if ((p < 0) != (q < 0)) { eq = 0; break; }
        if (p < 0) continue;
        const embz_node_t *a = x->nodes + p, *b = y->nodes + q;
        if (a->op != b->op) { eq = 0; break; }
        if (a->op == EMBZ_OP_NUM && !fmpq_equal(a->num, b->num)) { eq = 0; break; }
        if (a->op == EMBZ_OP_PARAM) {
            const char *na = (a->param >= 0 && a->param < x->nparams) ? x->params[a->param] : "";
            const char *nb = (b->param >= 0 && b->param < y->nparams) ? y->params[b->param] : "";
            if (strcmp(na, nb) != 0) { eq = 0; break; }
        }
        if (top + 2 > 2 * x->len + 2) { eq = 0; break; }   /* shared subtrees: not a tree */
        st[2 * top] = a->a; st[2 * top + 1] = b->a; top++;
        st[2 * top] = a->b; st[2 * top + 1] = b->b; top++;
    }
    free(st);
    return eq;
}

int embz_expr_equal(const embz_expr_t x, const embz_expr_t y)
{
    return node_equal(x, x->root, y, y->root);
}
