/* The double pass of explicit summation (see explicit.c for the method): the weights in
 * index order through a block evaluator of the weight expression, checked for monotonicity,
 * with compensated sums; stored and sorted when they are not monotone. It gives the estimate,
 * the argmax k and the order the certified pass then tries; nothing certified comes from
 * here. */
#define _DEFAULT_SOURCE 1   /* lgamma_r */
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include <float.h>
#include "embz/expr.h"
#include "impl.h"


/* A block evaluator for the double pass: the expression is interpreted once per node for a
 * whole block of consecutive indices, with constants converted once. It follows the rules of
 * the library's double evaluator (undefined or non-finite intermediate values give NaN). Only
 * estimates and the guessed order come from here; certification never relies on it. */
#define DBLOCK 256

typedef struct {
    const embz_expr_struct *e;
    double *cst;          /* constant value of each node (NUM, PI, E, GAMMA) */
} dtape_t;

static void dtape_init(dtape_t *T, const embz_expr_struct *e)
{
    T->e = e;
    slong nn = e->root + 1 > 0 ? e->root + 1 : 1;
    T->cst = flint_malloc((size_t) nn * sizeof(double));
    for (slong k = 0; k <= e->root; k++) {
        const embz_node_t *nd = e->nodes + k;
        switch (nd->op) {
        case EMBZ_OP_NUM: T->cst[k] = fmpq_get_d(nd->num); break;
        case EMBZ_OP_PI: T->cst[k] = 3.14159265358979323846; break;
        case EMBZ_OP_E: T->cst[k] = 2.71828182845904523536; break;
        case EMBZ_OP_GAMMA: T->cst[k] = 0.57721566490153286061; break;
        default: T->cst[k] = NAN;
        }
    }
}

static void dtape_clear(dtape_t *T)
{
    flint_free(T->cst);
}

static inline double dfix(double x) { return isfinite(x) ? x : NAN; }

static double pow_dd(double x, double y)
{
    if (isnan(x) || isnan(y)) return NAN;
    if (y == floor(y) && fabs(y) < 9007199254740992.0) return pow(x, y);
    if (x > 0) return pow(x, y);
    if (x == 0 && y > 0) return 0.0;
    return NAN;
}

/* v: workspace of (root + 1) * B doubles; evaluates indices i0, i0 + step, ... (c of them).
 * Returns the row of the root. */
static const double *dtape_eval(const dtape_t *T, double *v, slong B, double i0, double step,
                                slong c, double nval)
{
    const embz_expr_struct *e = T->e;
    for (slong k = 0; k <= e->root; k++) {
        const embz_node_t *nd = e->nodes + k;
        double *o = v + k * B;
        const double *a = nd->a >= 0 ? v + nd->a * B : NULL;
        const double *b = nd->b >= 0 ? v + nd->b * B : NULL;
        slong j;
        int sg;
        switch (nd->op) {
        case EMBZ_OP_NUM: case EMBZ_OP_PI: case EMBZ_OP_E: case EMBZ_OP_GAMMA:
        case EMBZ_OP_PARAM:
            for (j = 0; j < c; j++) o[j] = T->cst[k];
            break;
        case EMBZ_OP_I: for (j = 0; j < c; j++) o[j] = i0 + step * (double) j; break;
        case EMBZ_OP_N: for (j = 0; j < c; j++) o[j] = nval; break;
        case EMBZ_OP_NEG: for (j = 0; j < c; j++) o[j] = -a[j]; break;
        case EMBZ_OP_ADD: for (j = 0; j < c; j++) o[j] = dfix(a[j] + b[j]); break;
        case EMBZ_OP_SUB: for (j = 0; j < c; j++) o[j] = dfix(a[j] - b[j]); break;
        case EMBZ_OP_MUL: for (j = 0; j < c; j++) o[j] = dfix(a[j] * b[j]); break;
        case EMBZ_OP_DIV:
            for (j = 0; j < c; j++) o[j] = b[j] == 0 ? NAN : dfix(a[j] / b[j]);
            break;
        case EMBZ_OP_POW:
            if (nd->b >= 0 && e->nodes[nd->b].op == EMBZ_OP_NUM && T->cst[nd->b] == -1.0) {
                for (j = 0; j < c; j++) o[j] = a[j] == 0 ? NAN : dfix(1.0 / a[j]);
            } else if (nd->b >= 0 && e->nodes[nd->b].op == EMBZ_OP_NUM && T->cst[nd->b] == 2.0) {
                for (j = 0; j < c; j++) o[j] = dfix(a[j] * a[j]);
            } else {
                for (j = 0; j < c; j++) o[j] = dfix(pow_dd(a[j], b[j]));
            }
            break;
        case EMBZ_OP_LOG: for (j = 0; j < c; j++) o[j] = a[j] > 0 ? dfix(log(a[j])) : NAN; break;
        case EMBZ_OP_LOG2: for (j = 0; j < c; j++) o[j] = a[j] > 0 ? dfix(log2(a[j])) : NAN; break;
        case EMBZ_OP_LOG10: for (j = 0; j < c; j++) o[j] = a[j] > 0 ? dfix(log10(a[j])) : NAN; break;
        case EMBZ_OP_EXP: for (j = 0; j < c; j++) o[j] = dfix(exp(a[j])); break;
        case EMBZ_OP_SQRT: for (j = 0; j < c; j++) o[j] = a[j] >= 0 ? dfix(sqrt(a[j])) : NAN; break;
        case EMBZ_OP_ABS: for (j = 0; j < c; j++) o[j] = fabs(a[j]); break;
        case EMBZ_OP_LGAMMA:
            for (j = 0; j < c; j++) o[j] = a[j] > 0 ? dfix(lgamma_r(a[j], &sg)) : NAN;
            break;
        case EMBZ_OP_ATAN: for (j = 0; j < c; j++) o[j] = dfix(atan(a[j])); break;
        case EMBZ_OP_SIN: for (j = 0; j < c; j++) o[j] = dfix(sin(a[j])); break;
        case EMBZ_OP_COS: for (j = 0; j < c; j++) o[j] = dfix(cos(a[j])); break;
        case EMBZ_OP_FLOOR: for (j = 0; j < c; j++) o[j] = floor(a[j]); break;
        case EMBZ_OP_CEIL: for (j = 0; j < c; j++) o[j] = ceil(a[j]); break;
        case EMBZ_OP_BINOM: for (j = 0; j < c; j++) o[j] = dfix(embz_binom_d(a[j], b[j])); break;
        case EMBZ_OP_MIN:
            for (j = 0; j < c; j++)
                o[j] = (isnan(a[j]) || isnan(b[j])) ? NAN : (a[j] < b[j] ? a[j] : b[j]);
            break;
        case EMBZ_OP_MAX:
            for (j = 0; j < c; j++)
                o[j] = (isnan(a[j]) || isnan(b[j])) ? NAN : (a[j] > b[j] ? a[j] : b[j]);
            break;
        default: for (j = 0; j < c; j++) o[j] = NAN;
        }
    }
    return v + e->root * B;
}

typedef struct {
    const embz_family_struct *f;
    double nd;
    slong n;
    int dir;              /* +1: position k is index k; -1: index n + 1 - k */
    const double *arr;    /* stored sorted weights, or NULL */
    slong bad;            /* index where the double weight was not a finite number >= 0 */
    dtape_t tape;
    double *one;          /* workspace for single evaluations */
} dsrc_t;

/* A cursor reading consecutive positions through a block buffer. */
typedef struct {
    double *v;
    const double *row;
    slong start, cnt;
} dbuf_t;

static void dsrc_init(dsrc_t *s, const embz_family_t f, slong n)
{
    memset(s, 0, sizeof(*s));
    s->f = f;
    s->nd = (double) n;
    s->n = n;
    s->dir = 1;
    dtape_init(&s->tape, f->weight);
    s->one = flint_malloc((size_t) (f->weight->root + 2) * sizeof(double));
}

static void dsrc_clear(dsrc_t *s)
{
    dtape_clear(&s->tape);
    flint_free(s->one);
}

static void dbuf_init(dbuf_t *b, const dsrc_t *s)
{
    b->v = flint_malloc((size_t) (s->f->weight->root + 2) * DBLOCK * sizeof(double));
    b->row = NULL;
    b->start = 0;
    b->cnt = 0;
}

static void dbuf_clear(dbuf_t *b)
{
    flint_free(b->v);
}

static inline double dcheck(dsrc_t *s, double w, slong i)
{
    if (!(w >= 0.0 && w <= DBL_MAX)) {
        if (s->bad == 0) s->bad = i;
        w = 0.0;
    }
    return w;
}

static inline slong dindex(const dsrc_t *s, slong pos)
{
    return s->dir > 0 ? pos : s->n + 1 - pos;
}

static double dget(dsrc_t *s, slong pos)
{
    if (s->arr != NULL) return s->arr[pos - 1];
    slong i = dindex(s, pos);
    if (s->f->weight->root < 0) return dcheck(s, NAN, i);
    const double *r = dtape_eval(&s->tape, s->one, 1, (double) i, 0.0, 1, s->nd);
    return dcheck(s, r[0], i);
}

static inline double dbget(dsrc_t *s, dbuf_t *b, slong pos)
{
    if (s->arr != NULL) return s->arr[pos - 1];
    if (pos < b->start || pos >= b->start + b->cnt) {
        slong c = FLINT_MIN(DBLOCK, s->n - pos + 1);
        if (s->f->weight->root < 0) return dcheck(s, NAN, dindex(s, pos));
        b->row = dtape_eval(&s->tape, b->v, DBLOCK, (double) dindex(s, pos), (double) s->dir,
                            c, s->nd);
        b->start = pos;
        b->cnt = c;
        for (slong j = 0; j < c; j++)
            if (!(b->row[j] >= 0.0 && b->row[j] <= DBL_MAX)) {
                dcheck(s, b->row[j], dindex(s, pos + j));
                ((double *) b->row)[j] = 0.0;
            }
    }
    return b->row[pos - b->start];
}

/* Neumaier compensated summation. */
typedef struct { double s, c; } ksum_t;
static inline void ksum_add(ksum_t *a, double x)
{
    double t = a->s + x;
    if (fabs(a->s) >= fabs(x)) a->c += (a->s - t) + x;
    else a->c += (x - t) + a->s;
    a->s = t;
}

static void dstream_uniform(embz_x_dres_t *R, dsrc_t *src, ulong d, int check)
{
    ksum_t Sk = { 0, 0 }, Ss = { 0, 0 };
    double prev = INFINITY, best = 0.0, supB = 0.0;
    slong bestk = 0, n = src->n, s = 0;
    ulong r = 0;
    dbuf_t kb, sb;
    dbuf_init(&kb, src);
    dbuf_init(&sb, src);
    double ws1 = dbget(src, &sb, 1);
    double invd = 1.0 / (double) d;
    R->sorted = 1;
    R->p1 = ws1;
    for (slong k = 1; k <= n; k++) {
        double w = dbget(src, &kb, k);
        if (check && w > prev) { R->sorted = 0; dbuf_clear(&kb); dbuf_clear(&sb); return; }
        prev = w;
        ksum_add(&Sk, w);
        if (++r == d) {
            r = 0;
            s++;
            ksum_add(&Ss, ws1);
            ws1 = (s + 1 <= n) ? dbget(src, &sb, s + 1) : 0.0;
        }
        double D = (Sk.s - Ss.s) + (Sk.c - Ss.c);
        double g = D - (double) r * invd * ws1;
        if (g > best) { best = g; bestk = k; }
        if (r == 0 && D > supB) supB = D;
    }
    dbuf_clear(&kb);
    dbuf_clear(&sb);
    R->W = Sk.s + Sk.c;
    R->best = best;
    R->argk = bestk;
    R->supB = supB;
}

typedef struct { double v; slong c; slong j; } dnode_t;
EMBZ_X_MAX_HEAP_DEFINE(dheap, dnode_t, v)

static void dstream_vector(embz_x_dres_t *R, dsrc_t *src, const embz_x_tdata_t *T,
                           int check)
{
    ksum_t Sk = { 0, 0 }, Rk = { 0, 0 };
    double prev = INFINITY, best = 0.0;
    slong bestk = 0, n = src->n, hlen = 0;
    dnode_t *h = flint_malloc((size_t) T->m * sizeof(dnode_t));
    double w1 = dget(src, 1);
    dnode_t x0 = { T->qd[0] * w1, 1, 0 };
    dheap_push(h, &hlen, x0);
    dbuf_t kb;
    dbuf_init(&kb, src);
    R->sorted = 1;
    R->p1 = w1;
    for (slong k = 1; k <= n; k++) {
        double w = dbget(src, &kb, k);
        if (check && w > prev) { R->sorted = 0; flint_free(h); dbuf_clear(&kb); return; }
        prev = w;
        ksum_add(&Sk, w);
        dnode_t t = dheap_pop(h, &hlen);
        ksum_add(&Rk, t.v);
        if (t.c == 1 && t.j + 1 < T->m) {
            dnode_t y = { T->qd[t.j + 1] * w1, 1, t.j + 1 };
            dheap_push(h, &hlen, y);
        }
        if (t.c < n) {
            dnode_t y = { T->qd[t.j] * dget(src, t.c + 1), t.c + 1, t.j };
            dheap_push(h, &hlen, y);
        }
        double g = (Sk.s - Rk.s) + (Sk.c - Rk.c);
        if (g > best) { best = g; bestk = k; }
    }
    dbuf_clear(&kb);
    flint_free(h);
    R->W = Sk.s + Sk.c;
    R->best = best;
    R->argk = bestk;
    R->supB = NAN;
}

static int dcmp_desc(const void *a, const void *b)
{
    double x = *(const double *) a, y = *(const double *) b;
    return (x < y) - (x > y);
}

static void dstream(embz_x_dres_t *R, dsrc_t *src, const embz_x_tdata_t *T, int check)
{
    if (T->uniform) dstream_uniform(R, src, T->d, check);
    else dstream_vector(R, src, T, check);
}

/* The estimate. order: +1/-1 monotone (streamed), 0 stored and sorted. On a weight that is not
 * a finite number >= 0 in double, *bad is its index. */
int _embz_x_estimate(embz_x_dres_t *R, int *order, slong *bad, const embz_family_t f, slong n,
                     const embz_x_tdata_t *T, embz_err_t *err)
{
    dsrc_t src;
    int st = EMBZ_OK;
    dsrc_init(&src, f, n);
    *bad = 0;
    double w1 = dget(&src, 1), wn = dget(&src, n);
    if (src.bad) { *bad = src.bad; goto out; }
    src.dir = (wn <= w1) ? 1 : -1;
    dstream(R, &src, T, 1);
    if (src.bad) { *bad = src.bad; goto out; }
    if (R->sorted) { *order = src.dir; goto out; }
    /* not monotone: store and sort */
    if (n > EMBZ_EXPLICIT_SORTED_MAX_N) {
        st = embz_err_set(err, EMBZ_ERR_LIMIT,
                            "the weights are not monotone in i; explicit mode then stores all "
                            "n weights and is limited to n <= %ld", (long) EMBZ_EXPLICIT_SORTED_MAX_N);
        goto out;
    }
    double *arr = malloc((size_t) n * sizeof(double));
    if (arr == NULL) {
        st = embz_err_set(err, EMBZ_ERR_NOMEM, "out of memory (n = %ld)", (long) n);
        goto out;
    }
    src.dir = 1;
    {
        dbuf_t b;
        dbuf_init(&b, &src);
        for (slong i = 1; i <= n; i++) arr[i - 1] = dbget(&src, &b, i);
        dbuf_clear(&b);
    }
    if (src.bad) { *bad = src.bad; free(arr); goto out; }
    qsort(arr, (size_t) n, sizeof(double), dcmp_desc);
    src.arr = arr;
    dstream(R, &src, T, 0);
    free(arr);
    *order = 0;
out:
    dsrc_clear(&src);
    return st;
}


/* The estimate pass from ball values (for weights whose double evaluation fails even after
 * scaling): every weight in arb at 64 bits, scaled by 2^k with k bringing the largest near 1,
 * rounded to double, stored and sorted (n <= EMBZ_EXPLICIT_SORTED_MAX_N). Two passes over the
 * weights (the largest exponent, then the values) keep the memory at n doubles. */
int _embz_x_estimate_arb(embz_x_dres_t *R, slong *k, const embz_family_t f, slong n,
                         const embz_x_tdata_t *T, embz_err_t *err)
{
    if (n > EMBZ_EXPLICIT_SORTED_MAX_N)
        return embz_err_set(err, EMBZ_ERR_LIMIT, "weights outside double range are limited "
                            "to n <= %ld in explicit mode", (long) EMBZ_EXPLICIT_SORTED_MAX_N);
    double *arr = malloc((size_t) n * sizeof(double));
    if (arr == NULL) return embz_err_set(err, EMBZ_ERR_NOMEM, "out of memory (n = %ld)", (long) n);
    arb_t w;
    fmpz_t i, nz, ex, top;
    arb_init(w);
    fmpz_init(i); fmpz_init(nz); fmpz_init(ex); fmpz_init(top);
    fmpz_set_si(nz, n);
    int st = EMBZ_OK, have = 0;
    for (int pass = 0; pass < 2 && st == EMBZ_OK; pass++) {
        for (slong j = 1; j <= n && st == EMBZ_OK; j++) {
            fmpz_set_si(i, j);
            st = embz_family_weight_arb(w, f, i, nz, 64, err);
            if (st != EMBZ_OK) break;
            if (pass == 0) {
                if (arf_is_zero(arb_midref(w))) continue;
                fmpz_set(ex, ARF_EXPREF(arb_midref(w)));
                if (!have || fmpz_cmp(ex, top) > 0) fmpz_set(top, ex);
                have = 1;
            } else {
                arf_t m;
                arf_init(m);
                arf_mul_2exp_si(m, arb_midref(w), *k);
                arr[j - 1] = arf_get_d(m, ARF_RND_NEAR);
                arf_clear(m);
                if (!(arr[j - 1] >= 0.0)) arr[j - 1] = 0.0;
            }
        }
        if (pass == 0) {
            if (!have || fmpz_bits(top) > 60)
                st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "the weights have no usable size");
            else
                *k = -fmpz_get_si(top);
        }
    }
    if (st == EMBZ_OK) {
        dsrc_t src;
        qsort(arr, (size_t) n, sizeof(double), dcmp_desc);
        dsrc_init(&src, f, n);
        src.arr = arr;
        dstream(R, &src, T, 0);
        dsrc_clear(&src);
    }
    free(arr);
    arb_clear(w);
    fmpz_clear(i); fmpz_clear(nz); fmpz_clear(ex); fmpz_clear(top);
    return st;
}

