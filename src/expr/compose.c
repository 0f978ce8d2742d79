/* New expressions from old ones, for sums that the large-n engine takes over other index
 * sets: an affine change of the index, w(i) -> w(a i + b), and the geometric mean
 * sqrt(x y) of two expressions. The results are ordinary expressions (children before
 * parents, constants folded), so every evaluator and the substitution x = e^u apply. */
#include <stdlib.h>
#include <string.h>
#include "expr_impl.h"

static int push(embz_expr_t e, int op, int a, int b)
{
    int k = _embz_expr_push(e, op, a, b, 0);
    if (k < 0) abort();   /* out of memory, as FLINT does */
    return k;
}


/* the affine node A i + B in dst */
static int affine_node(embz_expr_t dst, const fmpq_t A, const fmpq_t B)
{
    int x = push(dst, EMBZ_OP_I, -1, -1);
    if (!fmpq_is_one(A)) {
        int ka = push(dst, EMBZ_OP_NUM, -1, -1);
        fmpq_set(dst->nodes[ka].num, A);
        x = push(dst, EMBZ_OP_MUL, ka, x);
    }
    if (!fmpq_is_zero(B)) {
        int kb = push(dst, EMBZ_OP_NUM, -1, -1);
        fmpq_set(dst->nodes[kb].num, B);
        x = push(dst, EMBZ_OP_ADD, x, kb);
    }
    return x;
}

/* The nodes of src up to its root appended to dst, with i replaced by A i + B when A is not
 * NULL. A sum i + c or difference i - c of the source becomes A i + (B +- c) at once, so that
 * w = 1/(i log(i + 1)) under i -> 2 i - 1 reads log(2 i) rather than log(2 i - 1 + 1) (the
 * substitution x = e^u would keep the cancelling constants as two exponentials). Returns the
 * index of the copied root. */
static int append(embz_expr_t dst, const embz_expr_t src, const fmpq *A,
                  const fmpq *B)
{
    int *map = calloc((size_t) (src->root + 1), sizeof(int));
    if (map == NULL) abort();
    for (long k = 0; k <= src->root; k++) map[k] = -1;
    int ivar = -1;
    fmpq_t c;
    fmpq_init(c);
    for (long k = 0; k <= src->root; k++) {
        const embz_node_t *s = src->nodes + k;
        if (A != NULL && s->op == EMBZ_OP_I) {
            if (ivar < 0) ivar = affine_node(dst, A, B);
            map[k] = ivar;
            continue;
        }
        if (A != NULL && (s->op == EMBZ_OP_ADD || s->op == EMBZ_OP_SUB)) {
            const embz_node_t *x = src->nodes + s->a, *y = src->nodes + s->b;
            int shift = 0;
            if (x->op == EMBZ_OP_I && y->op == EMBZ_OP_NUM) {
                if (s->op == EMBZ_OP_ADD) fmpq_add(c, B, y->num);
                else fmpq_sub(c, B, y->num);
                shift = 1;
            } else if (s->op == EMBZ_OP_ADD && x->op == EMBZ_OP_NUM && y->op == EMBZ_OP_I) {
                fmpq_add(c, B, x->num);
                shift = 1;
            }
            if (shift) { map[k] = affine_node(dst, A, c); continue; }
        }
        int j = push(dst, s->op, s->a >= 0 ? map[s->a] : -1, s->b >= 0 ? map[s->b] : -1);
        dst->nodes[j].param = s->param;
        dst->nodes[j].col = s->col;
        fmpq_set(dst->nodes[j].num, s->num);
        map[k] = j;
    }
    int r = map[src->root];
    fmpq_clear(c);
    free(map);
    return r;
}

static int push_num(embz_expr_t e, const fmpq_t v)
{
    int k = push(e, EMBZ_OP_NUM, -1, -1);
    fmpq_set(e->nodes[k].num, v);
    return k;
}

/* A node for sqrt of the node k of e, the root pushed inside where that is exact: products
 * and quotients factor by factor, powers with a rational exponent halved (unless half of it
 * is an odd integer, where sqrt(x^(2m)) = |x|^m would lose the sign), powers of a positive
 * number and exponentials with the exponent halved. Each rule gives, wherever the new
 * expression is defined, a value >= 0 equal to sqrt of the old one (a factor whose own root
 * is undefined makes the whole undefined: sqrt(x) sqrt(y) for x, y < 0), so a weight's
 * certified enclosures stay valid. Square roots of products of weights over wide ranges of x
 * are what this avoids: the root of a ball that reaches near 0 has a huge derivative. */
static int half_node(embz_expr_t e, int k)
{
    embz_node_t nd = e->nodes[k];     /* copy: pushing may move the array */
    fmpq_t h;
    fmpq_init(h);
    int r = -1;
    switch (nd.op) {
    case EMBZ_OP_MUL: case EMBZ_OP_DIV: {
        int a = half_node(e, nd.a);
        int b = half_node(e, nd.b);
        r = push(e, nd.op, a, b);
        break;
    }
    case EMBZ_OP_EXP: {
        fmpq_set_si(h, 1, 2);
        int m = push(e, EMBZ_OP_MUL, push_num(e, h), nd.a);
        r = push(e, EMBZ_OP_EXP, m, -1);
        break;
    }
    case EMBZ_OP_POW: {
        const embz_node_t *x = e->nodes + nd.a, *y = e->nodes + nd.b;
        if (y->op == EMBZ_OP_NUM) {
            fmpq_div_2exp(h, y->num, 1);
            int odd = fmpz_is_one(fmpq_denref(h)) && fmpz_is_odd(fmpq_numref(h));
            if (!odd) r = push(e, EMBZ_OP_POW, nd.a, push_num(e, h));
        } else if (x->op == EMBZ_OP_NUM && fmpq_sgn(x->num) > 0) {
            fmpq_set_si(h, 1, 2);
            int m = push(e, EMBZ_OP_MUL, push_num(e, h), nd.b);
            r = push(e, EMBZ_OP_POW, nd.a, m);
        }
        break;
    }
    case EMBZ_OP_NUM:
        if (fmpq_sgn(nd.num) >= 0 && fmpz_is_square(fmpq_numref(nd.num))
            && fmpz_is_square(fmpq_denref(nd.num))) {
            fmpz_sqrt(fmpq_numref(h), fmpq_numref(e->nodes[k].num));
            fmpz_sqrt(fmpq_denref(h), fmpq_denref(e->nodes[k].num));
            r = push_num(e, h);
        }
        break;
    default:
        break;
    }
    if (r < 0) r = push(e, EMBZ_OP_SQRT, k, -1);
    fmpq_clear(h);
    return r;
}

int embz_expr_affine(embz_expr_t out, const embz_expr_t w, const fmpq_t a, const fmpq_t b)
{
    if (w->root < 0) return EMBZ_ERR_INPUT;
    embz_expr_t t;
    embz_expr_init(t);
    t->root = append(t, w, a, b);
    _embz_expr_copy_params(t, w);
    _embz_expr_prune(t);
    embz_expr_fold(t);
    embz_expr_clear(out);
    *out = *t;
    return EMBZ_OK;
}

int embz_expr_geomean(embz_expr_t out, const embz_expr_t x, const embz_expr_t y)
{
    if (x->root < 0 || y->root < 0) return EMBZ_ERR_INPUT;
    embz_expr_t t;
    embz_expr_init(t);
    int kx = append(t, x, NULL, NULL);
    int ky = append(t, y, NULL, NULL);
    /* sqrt(x y) = sqrt(x) sqrt(y) where both roots are defined (see half_node) */
    kx = half_node(t, kx);
    ky = half_node(t, ky);
    t->root = push(t, EMBZ_OP_MUL, kx, ky);
    _embz_expr_copy_params(t, x->nparams > 0 ? x : y);
    _embz_expr_prune(t);
    embz_expr_fold(t);
    embz_expr_clear(out);
    *out = *t;
    return EMBZ_OK;
}

int embz_expr_binary(embz_expr_t out, int op, const embz_expr_t x, const embz_expr_t y)
{
    if (x->root < 0 || y->root < 0) return EMBZ_ERR_INPUT;
    if (_embz_op_arity(op) != 2 || op == EMBZ_OP_BINOM) return EMBZ_ERR_INPUT;
    embz_expr_t t;
    embz_expr_init(t);
    int kx = append(t, x, NULL, NULL);
    int ky = append(t, y, NULL, NULL);
    t->root = push(t, op, kx, ky);
    _embz_expr_copy_params(t, x->nparams > 0 ? x : y);
    _embz_expr_prune(t);
    embz_expr_fold(t);
    embz_expr_clear(out);
    *out = *t;
    return EMBZ_OK;
}
