/* The embezzlement error E_n(q) = K(p -> p (x) q) of a family at an explicit size n.
 *
 * Only Ky Fan indices k <= n matter: for k >= n, ||p||_(k) = 1 and the difference
 * 1 - ||p (x) q||_(k) can only shrink. With P_k the sum of the k largest weights (unnormalised)
 * and R_k the sum of the k largest entries of w (x) q,
 *     E_n(q) = max_{0 <= k <= n} (P_k - R_k) / W,   W = P_n.
 * Uniform target u_d: R_k = P_s + (r/d) w_(s+1) with k = d s + r (two cursors k and s).
 * Vector target q = (a_1, ..., a_m) / Q (sorted, integers over a common denominator): R_k is the
 * k-th partial sum of the merge of the m sorted sequences a_j w_(1), a_j w_(2), ... (a heap).
 *
 * Two passes:
 *  1. doubles (estimate): weights in index order, checked for monotonicity (any increase,
 *     however small, means "not monotone"); compensated sums. If the weights are monotone the
 *     sorted order is the index order (or its reverse) and nothing is stored; otherwise the
 *     weights are stored and sorted.
 *  2. certified: every weight is an arb ball, turned into an integer interval [lo, hi] in units
 *     of 2^-F (lo rounded down, hi up). From then on everything is exact integer arithmetic
 *     (128-bit), so the maximum over k of interval enclosures is exact and cheap:
 *        P_k <= sum of the k largest hi,  P_k >= sum of ANY k lo,  the same for R_k,
 *     so max_k (P_k - R_k) lies in [max_k (PL_k - RU_k), max_k (PU_k - RL_k)] provided the hi
 *     values are taken in non-increasing order. That order is checked exactly on the integers
 *     (ties are fine); if the check fails the pass is redone on stored, sorted lo and hi arrays.
 */
#define _DEFAULT_SOURCE 1   /* lgamma_r */
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include <float.h>
#include "embz/measure.h"
#include "embz/error.h"
#include "embz/expr.h"

__extension__ typedef __int128 i128;

#define I128_MAX ((i128) (((unsigned __int128) 1 << 127) - 1))
/* Fixed-point head room: Q * (sum of hi) stays below 2^EMBZ_FIX_BITS. */
#define EMBZ_FIX_BITS 124

/* Largest n for which non-monotone weights are stored (32 bytes per index in the certified
 * pass, 8 in the estimate). */
#define EMBZ_EXPLICIT_SORTED_MAX_N (WORD(1) << 24)

/* internal status: the stream found the hi values out of order */
#define STREAM_UNSORTED (-1)

/* ------------------------------------------------------------------ target data */

typedef struct {
    int uniform;
    ulong d;          /* uniform */
    slong m;          /* vector: number of nonzero entries */
    double *qd;       /* vector: entries as doubles (non-increasing) */
    slong *a;         /* vector: numerators over Q (non-increasing) */
    slong Q;          /* common denominator (d for uniform) */
} tdata_t;

static int tdata_init(tdata_t *T, const embz_target_t q, embz_err_t *err)
{
    memset(T, 0, sizeof(*T));
    if (q->kind == EMBZ_TARGET_UNIFORM) {
        if (q->d < 1 || q->d > EMBZ_TARGET_MAX_D)
            return embz_err_set(err, EMBZ_ERR_INPUT, "uniform target dimension out of range");
        T->uniform = 1;
        T->d = q->d;
        T->Q = (slong) q->d;
        return EMBZ_OK;
    }
    /* vector: sorted copy, zeros dropped, common denominator */
    embz_qvec_t s;
    embz_qvec_init(s);
    s->p = _fmpq_vec_init(q->q->len);
    s->len = q->q->len;
    for (slong j = 0; j < s->len; j++) fmpq_set(s->p + j, q->q->p + j);
    embz_qvec_sort(s);
    slong m = s->len;
    while (m > 0 && fmpq_is_zero(s->p + m - 1)) m--;
    if (m == 0) {
        embz_qvec_clear(s);
        return embz_err_set(err, EMBZ_ERR_INPUT, "target vector is zero");
    }
    fmpz_t L, t, sum;
    fmpz_init(L); fmpz_init(t); fmpz_init(sum);
    fmpz_one(L);
    for (slong j = 0; j < m; j++) fmpz_lcm(L, L, fmpq_denref(s->p + j));
    int status = EMBZ_OK;
    if (fmpz_bits(L) > 40) {
        status = embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                              "target entries need a common denominator above 2^40; "
                              "give them with fewer digits");
        goto done;
    }
    T->m = m;
    T->Q = fmpz_get_si(L);
    T->a = flint_malloc((size_t) m * sizeof(slong));
    T->qd = flint_malloc((size_t) m * sizeof(double));
    for (slong j = 0; j < m; j++) {
        fmpz_divexact(t, L, fmpq_denref(s->p + j));
        fmpz_mul(t, t, fmpq_numref(s->p + j));
        T->a[j] = fmpz_get_si(t);
        fmpz_add(sum, sum, t);
        T->qd[j] = fmpq_get_d(s->p + j);   /* see below */
    }
    if (!fmpz_equal(sum, L))
        status = embz_err_set(err, EMBZ_ERR_INPUT, "target vector does not sum to 1");
done:
    fmpz_clear(L); fmpz_clear(t); fmpz_clear(sum);
    embz_qvec_clear(s);
    return status;
}

static void tdata_clear(tdata_t *T)
{
    flint_free(T->a);
    flint_free(T->qd);
}

/* ------------------------------------------------------------------ double pass */

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

typedef struct {
    double W;         /* sum of all weights */
    double best;      /* max_k (P_k - R_k), unnormalised */
    slong argk;
    double p1;        /* largest weight */
    double supB;      /* ebit: sup_m (P_2m - P_m) */
    int sorted;       /* 1 if the stream order was non-increasing */
} dres_t;

static void dstream_uniform(dres_t *R, dsrc_t *src, ulong d, int check)
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

/* Heap of cursors for the merge of the sequences a_j w_(1) >= a_j w_(2) >= ...: a binary
 * max-heap of NODE ordered by the field KEY, as PREFIX_push and PREFIX_pop. The double
 * stream and the exact (128-bit) stream each instantiate one. */
#define MAX_HEAP_DEFINE(PREFIX, NODE, KEY)                                                  \
    static void PREFIX##_push(NODE *h, slong *len, NODE x)                                 \
    {                                                                                      \
        slong i = (*len)++;                                                                \
        while (i > 0) {                                                                    \
            slong p = (i - 1) / 2;                                                         \
            if (h[p].KEY >= x.KEY) break;                                                  \
            h[i] = h[p];                                                                   \
            i = p;                                                                         \
        }                                                                                  \
        h[i] = x;                                                                          \
    }                                                                                      \
                                                                                           \
    static NODE PREFIX##_pop(NODE *h, slong *len)                                          \
    {                                                                                      \
        NODE top = h[0], x = h[--(*len)];                                                  \
        slong i = 0, L = *len;                                                             \
        for (;;) {                                                                         \
            slong c = 2 * i + 1;                                                           \
            if (c >= L) break;                                                             \
            if (c + 1 < L && h[c + 1].KEY > h[c].KEY) c++;                                 \
            if (h[c].KEY <= x.KEY) break;                                                  \
            h[i] = h[c];                                                                   \
            i = c;                                                                         \
        }                                                                                  \
        if (L > 0) h[i] = x;                                                               \
        return top;                                                                        \
    }

typedef struct { double v; slong c; slong j; } dnode_t;
MAX_HEAP_DEFINE(dheap, dnode_t, v)

static void dstream_vector(dres_t *R, dsrc_t *src, const tdata_t *T, int check)
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

static void dstream(dres_t *R, dsrc_t *src, const tdata_t *T, int check)
{
    if (T->uniform) dstream_uniform(R, src, T->d, check);
    else dstream_vector(R, src, T, check);
}

/* The estimate. order: +1/-1 monotone (streamed), 0 stored and sorted. On a weight that is not
 * a finite number >= 0 in double, *bad is its index. */
static int estimate_pass(dres_t *R, int *order, slong *bad, const embz_family_t f, slong n,
                         const tdata_t *T, embz_err_t *err)
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

/* ------------------------------------------------------------------ certified pass */

/* A ball tape for the certified pass: node values live in a preallocated vector and constants
 * are converted once per precision. It covers the operations whose domain can be checked
 * cheaply; every doubtful case (a divisor or logarithm argument not certainly positive, an
 * operation it does not cover) returns failure, and the caller then uses the family's own
 * evaluator for that index. All results are enclosures produced by arb's rigorous functions. */
typedef struct {
    const embz_expr_struct *e;
    int ok;               /* the expression uses only covered operations */
    arb_ptr v;            /* one ball per node */
    arb_ptr cst;          /* constants */
    fmpz *ipow;           /* exact integer exponents of POW nodes with a NUM exponent */
    char *is_ipow;
} xtape_t;

static void xtape_init(xtape_t *T, const embz_expr_struct *e, const arb_t n, slong prec)
{
    slong nn = e->root + 1 > 0 ? e->root + 1 : 1;
    T->e = e;
    T->ok = e->root >= 0;
    T->v = _arb_vec_init(nn);
    T->cst = _arb_vec_init(nn);
    T->ipow = _fmpz_vec_init(nn);
    T->is_ipow = flint_calloc((size_t) nn, 1);
    for (slong k = 0; k <= e->root; k++) {
        const embz_node_t *nd = e->nodes + k;
        switch (nd->op) {
        case EMBZ_OP_NUM: arb_set_fmpq(T->cst + k, nd->num, prec); break;
        case EMBZ_OP_PI: arb_const_pi(T->cst + k, prec); break;
        case EMBZ_OP_E: arb_const_e(T->cst + k, prec); break;
        case EMBZ_OP_GAMMA: arb_const_euler(T->cst + k, prec); break;
        case EMBZ_OP_N: arb_set(T->cst + k, n); break;
        case EMBZ_OP_POW:
            if (e->nodes[nd->b].op == EMBZ_OP_NUM && fmpz_is_one(fmpq_denref(e->nodes[nd->b].num))
                && fmpz_bits(fmpq_numref(e->nodes[nd->b].num)) < 20) {
                T->is_ipow[k] = 1;
                fmpz_set(T->ipow + k, fmpq_numref(e->nodes[nd->b].num));
            }
            break;
        case EMBZ_OP_I: case EMBZ_OP_NEG: case EMBZ_OP_ADD: case EMBZ_OP_SUB:
        case EMBZ_OP_MUL: case EMBZ_OP_DIV: case EMBZ_OP_LOG: case EMBZ_OP_EXP:
        case EMBZ_OP_SQRT: case EMBZ_OP_ABS: case EMBZ_OP_ATAN: case EMBZ_OP_SIN:
        case EMBZ_OP_COS:
            break;
        default: T->ok = 0;
        }
    }
}

static void xtape_clear(xtape_t *T)
{
    slong nn = T->e->root + 1 > 0 ? T->e->root + 1 : 1;
    _arb_vec_clear(T->v, nn);
    _arb_vec_clear(T->cst, nn);
    _fmpz_vec_clear(T->ipow, nn);
    flint_free(T->is_ipow);
}

/* 1 on success (result in T->v[root]), 0 when the caller must use the general evaluator. */
static int xtape_eval(xtape_t *T, slong i, slong prec)
{
    const embz_expr_struct *e = T->e;
    for (slong k = 0; k <= e->root; k++) {
        const embz_node_t *nd = e->nodes + k;
        arb_ptr o = T->v + k;
        arb_srcptr a = nd->a >= 0 ? T->v + nd->a : NULL;
        arb_srcptr b = nd->b >= 0 ? T->v + nd->b : NULL;
        switch (nd->op) {
        case EMBZ_OP_NUM: case EMBZ_OP_PI: case EMBZ_OP_E: case EMBZ_OP_GAMMA: case EMBZ_OP_N:
            arb_set(o, T->cst + k); break;
        case EMBZ_OP_I: arb_set_si(o, i); break;
        case EMBZ_OP_NEG: arb_neg(o, a); break;
        case EMBZ_OP_ADD: arb_add(o, a, b, prec); break;
        case EMBZ_OP_SUB: arb_sub(o, a, b, prec); break;
        case EMBZ_OP_MUL: arb_mul(o, a, b, prec); break;
        case EMBZ_OP_DIV:
            if (arb_contains_zero(b)) return 0;
            arb_div(o, a, b, prec);
            break;
        case EMBZ_OP_POW:
            if (T->is_ipow[k]) {
                if (fmpz_sgn(T->ipow + k) < 0 && arb_contains_zero(a)) return 0;
                arb_pow_fmpz(o, a, T->ipow + k, prec);
            } else {
                if (!arb_is_positive(a)) return 0;
                arb_pow(o, a, b, prec);
            }
            break;
        case EMBZ_OP_LOG:
            if (!arb_is_positive(a)) return 0;
            arb_log(o, a, prec);
            break;
        case EMBZ_OP_EXP: arb_exp(o, a, prec); break;
        case EMBZ_OP_SQRT:
            if (!arb_is_nonnegative(a)) return 0;
            arb_sqrt(o, a, prec);
            break;
        case EMBZ_OP_ABS: arb_abs(o, a); break;
        case EMBZ_OP_ATAN: arb_atan(o, a, prec); break;
        case EMBZ_OP_SIN: arb_sin(o, a, prec); break;
        case EMBZ_OP_COS: arb_cos(o, a, prec); break;
        default: return 0;
        }
        if (!arb_is_finite(o)) return 0;
    }
    return 1;
}

typedef struct {
    const embz_family_struct *f;
    slong n;
    int dir;
    slong F, wp;
    const i128 *alo, *ahi;   /* stored sorted endpoints, or NULL */
    arb_t w, ia, na;
    arf_t t;
    fmpz_t iz, nz, z;
    embz_err_t *err;
    xtape_t tape;
} xsrc_t;

static void xsrc_init(xsrc_t *s, const embz_family_t f, slong n, slong F, slong wp,
                      embz_err_t *err)
{
    memset(s, 0, sizeof(*s));
    s->f = f;
    s->n = n;
    s->dir = 1;
    s->F = F;
    s->wp = wp;
    s->err = err;
    arb_init(s->w); arb_init(s->ia); arb_init(s->na);
    arf_init(s->t);
    fmpz_init(s->iz); fmpz_init(s->nz); fmpz_init(s->z);
    fmpz_set_si(s->nz, n);
    arb_set_si(s->na, n);
    xtape_init(&s->tape, f->weight, s->na, wp);
}

static void xsrc_clear(xsrc_t *s)
{
    arb_clear(s->w); arb_clear(s->ia); arb_clear(s->na);
    arf_clear(s->t);
    fmpz_clear(s->iz); fmpz_clear(s->nz); fmpz_clear(s->z);
    xtape_clear(&s->tape);
}

/* x * 2^F rounded (floor or ceiling) to a non-negative 128-bit integer below 2^122. */
static int arf_fix(i128 *res, xsrc_t *s, const arf_t x, arf_rnd_t rnd)
{
    if (arf_sgn(x) <= 0) { *res = 0; return EMBZ_OK; }
    arf_mul_2exp_si(s->t, x, s->F);
    arf_get_fmpz(s->z, s->t, rnd);
    if (fmpz_bits(s->z) > 122) return EMBZ_ERR_PREC;
    ulong hi, lo;
    fmpz_get_uiui(&hi, &lo, s->z);
    *res = (i128) (((unsigned __int128) hi << 64) | lo);
    return EMBZ_OK;
}

/* Fast conversion of a non-negative ball with a 1- or 2-limb midpoint: lo = floor(mid 2^F) -
 * ceil(rad 2^F) (clamped at 0: the weight is known to be >= 0), hi = ceil(mid 2^F) +
 * ceil(rad 2^F), read directly from the limbs. Returns 0 if the ball does not have that shape
 * (the caller then uses the general conversion). */
static int arb_fix_fast(i128 *lo, i128 *hi, const arb_t w, slong F)
{
    const arf_struct *m = arb_midref(w);
    const mag_struct *r = arb_radref(w);
    unsigned __int128 M, fl, R;
    int frac;
    if (arf_is_zero(m)) {
        fl = 0;
        frac = 0;
    } else {
        mp_srcptr d;
        mp_size_t sz;
        if (!ARF_IS_LAGOM(m) || ARF_SGNBIT(m) || ARF_SIZE(m) > 2) return 0;
        ARF_GET_MPN_READONLY(d, sz, m);
        M = (sz == 2) ? (((unsigned __int128) d[1] << 64) | d[0]) : ((unsigned __int128) d[0] << 64);
        slong sh = 128 - (slong) ARF_EXP(m) - F;   /* mid 2^F = M / 2^sh */
        if (sh <= 6) return 0;
        if (sh >= 128) { fl = 0; frac = 1; }
        else { fl = M >> sh; frac = (M << (128 - sh)) != 0; }
    }
    if (mag_is_zero(r)) {
        R = 0;
    } else {
        if (!MAG_IS_LAGOM(r)) return 0;
        slong re = (slong) MAG_EXP(r) + F - MAG_BITS;   /* rad 2^F = man 2^re */
        if (re >= 80) return 0;
        if (re >= 0) R = (unsigned __int128) MAG_MAN(r) << re;
        else if (re > -64) R = (MAG_MAN(r) >> (-re)) + 1;
        else R = 1;
    }
    *lo = fl >= R ? (i128) (fl - R) : 0;
    *hi = (i128) (fl + (unsigned __int128) frac + R);
    return (*hi >> 122) == 0;
}

/* The certified weight at index i as an integer interval. */
static int xweight_index(i128 *lo, i128 *hi, xsrc_t *s, slong i)
{
    arb_srcptr w = s->w;
    int st = EMBZ_ERR_DOMAIN;
    if (s->tape.ok && xtape_eval(&s->tape, i, s->wp)) {
        w = s->tape.v + s->f->weight->root;
        st = EMBZ_OK;
    }
    if (st != EMBZ_OK || !arb_is_nonnegative(w)) {
        w = s->w;
        /* the family's own evaluation retries at higher precision and words the error */
        fmpz_set_si(s->iz, i);
        st = embz_family_weight_arb(s->w, s->f, s->iz, s->nz, s->wp, s->err);
        if (st != EMBZ_OK) return st;
    }
    if (arb_fix_fast(lo, hi, w, s->F)) return EMBZ_OK;
    arb_get_lbound_arf(s->t, w, s->wp);
    if (arf_fix(lo, s, s->t, ARF_RND_FLOOR) != EMBZ_OK) return EMBZ_ERR_PREC;
    arb_get_ubound_arf(s->t, w, s->wp);
    if (arf_fix(hi, s, s->t, ARF_RND_CEIL) != EMBZ_OK) return EMBZ_ERR_PREC;
    return EMBZ_OK;
}

static inline int xget(i128 *lo, i128 *hi, xsrc_t *s, slong pos)
{
    if (s->ahi != NULL) {
        *lo = s->alo[pos - 1];
        *hi = s->ahi[pos - 1];
        return EMBZ_OK;
    }
    return xweight_index(lo, hi, s, s->dir > 0 ? pos : s->n + 1 - pos);
}

#define IMAX(a, b) ((a) > (b) ? (a) : (b))

typedef struct {
    i128 WL, WU;      /* sum of all lo / hi */
    i128 GL, GU;      /* enclosure of max_k Q (P_k - R_k) */
    i128 p1L, p1U;    /* largest weight */
    i128 BL, BU;      /* enclosure of sup_m (P_2m - P_m) (uniform targets) */
} xres_t;

static int xstream_uniform(xres_t *X, xsrc_t *src, ulong d, i128 cap)
{
    i128 SkL = 0, SkU = 0, SsL = 0, SsU = 0, prev = I128_MAX;
    i128 GL = 0, GU = 0, BL = 0, BU = 0, lo, hi, s1L, s1U;
    i128 dd = (i128) d;
    slong n = src->n, s = 0;
    ulong r = 0;
    int st;
    if ((st = xget(&s1L, &s1U, src, 1)) != EMBZ_OK) return st;
    X->p1L = s1L;
    X->p1U = s1U;
    for (slong k = 1; k <= n; k++) {
        if (k == 1) { lo = s1L; hi = s1U; }
        else if ((st = xget(&lo, &hi, src, k)) != EMBZ_OK) return st;
        if (hi > prev) return STREAM_UNSORTED;
        prev = hi;
        SkL += lo;
        SkU += hi;
        if (SkU > cap) return EMBZ_ERR_PREC;
        if (++r == d) {
            r = 0;
            s++;
            SsL += s1L;
            SsU += s1U;
            if (s + 1 <= n) {
                if ((st = xget(&s1L, &s1U, src, s + 1)) != EMBZ_OK) return st;
            } else {
                s1L = s1U = 0;
            }
        }
        i128 gU = dd * (SkU - SsL) - (i128) r * s1L;
        i128 gL = dd * (SkL - SsU) - (i128) r * s1U;
        GU = IMAX(GU, gU);
        GL = IMAX(GL, gL);
        if (r == 0) {
            BU = IMAX(BU, SkU - SsL);
            BL = IMAX(BL, SkL - SsU);
        }
    }
    X->WL = SkL; X->WU = SkU;
    X->GL = GL; X->GU = GU;
    X->BL = BL; X->BU = BU;
    return EMBZ_OK;
}

/* the exact stream's heap is ordered by the upper ends */
typedef struct { i128 vhi, vlo; slong c; slong j; } xnode_t;
MAX_HEAP_DEFINE(xheap, xnode_t, vhi)

static int xstream_vector(xres_t *X, xsrc_t *src, const tdata_t *T, i128 cap)
{
    i128 SkL = 0, SkU = 0, RL = 0, RU = 0, prev = I128_MAX, GL = 0, GU = 0;
    i128 Q = (i128) T->Q, lo, hi, w1L, w1U;
    slong n = src->n, hlen = 0;
    int st;
    if ((st = xget(&w1L, &w1U, src, 1)) != EMBZ_OK) return st;
    xnode_t *h = flint_malloc((size_t) T->m * sizeof(xnode_t));
    xnode_t x0 = { T->a[0] * w1U, T->a[0] * w1L, 1, 0 };
    xheap_push(h, &hlen, x0);
    X->p1L = w1L;
    X->p1U = w1U;
    for (slong k = 1; k <= n; k++) {
        if (k == 1) { lo = w1L; hi = w1U; }
        else if ((st = xget(&lo, &hi, src, k)) != EMBZ_OK) goto done;
        if (hi > prev) { st = STREAM_UNSORTED; goto done; }
        prev = hi;
        SkL += lo;
        SkU += hi;
        if (SkU > cap) { st = EMBZ_ERR_PREC; goto done; }
        xnode_t t = xheap_pop(h, &hlen);
        RU += t.vhi;
        RL += t.vlo;
        if (t.c == 1 && t.j + 1 < T->m) {
            xnode_t y = { T->a[t.j + 1] * w1U, T->a[t.j + 1] * w1L, 1, t.j + 1 };
            xheap_push(h, &hlen, y);
        }
        if (t.c < n) {
            i128 l2, h2;
            if ((st = xget(&l2, &h2, src, t.c + 1)) != EMBZ_OK) goto done;
            xnode_t y = { T->a[t.j] * h2, T->a[t.j] * l2, t.c + 1, t.j };
            xheap_push(h, &hlen, y);
        }
        GU = IMAX(GU, Q * SkU - RL);
        GL = IMAX(GL, Q * SkL - RU);
    }
    X->WL = SkL; X->WU = SkU;
    X->GL = GL; X->GU = GU;
    X->BL = X->BU = 0;
    st = EMBZ_OK;
done:
    flint_free(h);
    return st;
}

static int xstream(xres_t *X, xsrc_t *src, const tdata_t *T, i128 cap)
{
    if (T->uniform) return xstream_uniform(X, src, T->d, cap);
    return xstream_vector(X, src, T, cap);
}

static int i128_cmp_desc(const void *a, const void *b)
{
    i128 x = *(const i128 *) a, y = *(const i128 *) b;
    return (x < y) - (x > y);
}

/* Stored pass: all endpoints, lo and hi sorted separately (each non-increasing). */
static int xstored(xres_t *X, xsrc_t *src, const tdata_t *T, i128 cap)
{
    slong n = src->n;
    if (n > EMBZ_EXPLICIT_SORTED_MAX_N)
        return embz_err_set(src->err, EMBZ_ERR_LIMIT,
                            "the weights could not be certified monotone; explicit mode then "
                            "stores all n weights and is limited to n <= %ld",
                            (long) EMBZ_EXPLICIT_SORTED_MAX_N);
    i128 *lo = malloc((size_t) n * sizeof(i128)), *hi = malloc((size_t) n * sizeof(i128));
    if (lo == NULL || hi == NULL) {
        free(lo); free(hi);
        return embz_err_set(src->err, EMBZ_ERR_NOMEM, "out of memory (n = %ld)", (long) n);
    }
    int st = EMBZ_OK;
    for (slong i = 1; i <= n && st == EMBZ_OK; i++)
        st = xweight_index(lo + i - 1, hi + i - 1, src, i);
    if (st == EMBZ_OK) {
        qsort(lo, (size_t) n, sizeof(i128), i128_cmp_desc);
        qsort(hi, (size_t) n, sizeof(i128), i128_cmp_desc);
        src->alo = lo;
        src->ahi = hi;
        st = xstream(X, src, T, cap);
        src->alo = src->ahi = NULL;
    }
    free(lo);
    free(hi);
    return st;
}

static void arb_set_i128(arb_t x, i128 v, fmpz_t z)
{
    unsigned __int128 u = (unsigned __int128) v;
    fmpz_set_signed_uiui(z, (ulong) (u >> 64), (ulong) u);
    arb_set_fmpz(x, z);
}

/* Ball containing every real in [a / b, c / e] (b, e > 0 integers, both scaled alike). */
static void arb_quotient_interval(arb_t res, i128 a, i128 b, i128 c, i128 e, slong F,
                                  slong Q, slong prec)
{
    arb_t x, y, t;
    fmpz_t z;
    arb_init(x); arb_init(y); arb_init(t); fmpz_init(z);
    (void) F;
    arb_set_i128(x, a, z);
    arb_set_i128(t, b, z);
    arb_mul_si(t, t, Q, prec);
    arb_div(x, x, t, prec);
    arb_set_i128(y, c, z);
    arb_set_i128(t, e, z);
    arb_mul_si(t, t, Q, prec);
    arb_div(y, y, t, prec);
    arb_union(res, x, y, prec);
    arb_clear(x); arb_clear(y); arb_clear(t); fmpz_clear(z);
}

static int check_size(slong *nn, const fmpz_t n, embz_err_t *err)
{
    if (fmpz_cmp_si(n, 1) < 0) return embz_err_set(err, EMBZ_ERR_INPUT, "n must be at least 1");
    if (fmpz_cmp_si(n, EMBZ_EXPLICIT_MAX_N) > 0)
        return embz_err_set(err, EMBZ_ERR_LIMIT,
                            "explicit summation is limited to n <= %ld",
                            (long) EMBZ_EXPLICIT_MAX_N);
    *nn = fmpz_get_si(n);
    return EMBZ_OK;
}

/* The error for a weight at index bad that is not a finite double: the weight's own failure
 * when ball arithmetic fails too (evaluated at prec bits), else EMBZ_ERR_UNSUPPORTED. */
static int bad_weight_error(const embz_family_t f, slong bad, const fmpz_t n, slong prec,
                            embz_err_t *err)
{
    fmpz_t iz;
    arb_t w;
    fmpz_init(iz); arb_init(w);
    fmpz_set_si(iz, bad);
    int st = embz_family_weight_arb(w, f, iz, n, prec, err);
    if (st == EMBZ_OK)
        st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                          "the weight at i = %ld is not a finite double (it is finite in "
                          "ball arithmetic); explicit mode needs double-range weights",
                          (long) bad);
    fmpz_clear(iz); arb_clear(w);
    return st;
}

int embz_error_explicit_estimate(double *E, slong *argk, int *order, const embz_family_t f,
                                 const fmpz_t n, const embz_target_t q, embz_err_t *err)
{
    slong nn, bad;
    tdata_t T;
    dres_t R;
    int st = check_size(&nn, n, err);
    if (st != EMBZ_OK) return st;
    if ((st = tdata_init(&T, q, err)) != EMBZ_OK) { tdata_clear(&T); return st; }
    memset(&R, 0, sizeof(R));
    *order = 0;
    st = estimate_pass(&R, order, &bad, f, nn, &T, err);
    tdata_clear(&T);
    if (st != EMBZ_OK) return st;
    if (bad) return bad_weight_error(f, bad, n, 64, err);
    if (!(R.W > 0.0) || !(R.W <= DBL_MAX))
        return embz_err_set(err, R.W > 0.0 ? EMBZ_ERR_UNSUPPORTED : EMBZ_ERR_DOMAIN,
                            R.W > 0.0 ? "the sum of the weights overflows double range"
                                      : "all weights are zero (or below double range)");
    *E = R.best / R.W;
    if (argk != NULL) *argk = R.argk;
    return EMBZ_OK;
}

/* The estimate pass from ball values (for weights whose double evaluation fails even after
 * scaling): every weight in arb at 64 bits, scaled by 2^k with k bringing the largest near 1,
 * rounded to double, stored and sorted (n <= EMBZ_EXPLICIT_SORTED_MAX_N). Two passes over the
 * weights (the largest exponent, then the values) keep the memory at n doubles. */
static int arb_estimate_pass(dres_t *R, slong *k, const embz_family_t f, slong n,
                             const tdata_t *T, embz_err_t *err)
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

/* 2^k with k bringing the larger of w(1), w(n) near 1; 0 when neither is a positive finite
 * ball at this precision */
static int scale_exponent(slong *k, const embz_family_t f, const fmpz_t n, slong prec)
{
    arb_t w;
    embz_err_t e;
    fmpz_t i;
    arb_init(w);
    fmpz_init(i);
    slong best = WORD_MIN;
    for (int end = 0; end < 2; end++) {
        if (end == 0) fmpz_one(i);
        else fmpz_set(i, n);
        embz_err_clear(&e);
        if (embz_family_weight_arb(w, f, i, n, prec, &e) != EMBZ_OK || !arb_is_positive(w)
            || !arb_is_finite(w))
            continue;
        fmpz_t ex;
        fmpz_init(ex);
        arf_frexp(arb_midref(w), ex, arb_midref(w));
        if (fmpz_fits_si(ex) && fmpz_get_si(ex) > best) best = fmpz_get_si(ex);
        fmpz_clear(ex);
    }
    arb_clear(w);
    fmpz_clear(i);
    if (best == WORD_MIN || best > WORD_MAX / 4 || best < WORD_MIN / 4) return 0;
    *k = -best;
    return 1;
}

static int explicit_run(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                        const embz_target_t q, slong prec, int rescaled, embz_err_t *err);

int embz_error_explicit(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                        const embz_target_t q, slong prec, embz_err_t *err)
{
    return explicit_run(res, f, n, q, prec, 0, err);
}

static int explicit_run(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                        const embz_target_t q, slong prec, int rescaled, embz_err_t *err)
{
    slong nn, bad = 0;
    tdata_t T;
    dres_t R;
    xres_t X;
    xsrc_t src;
    int order = 0, st;
    if (prec < 32) prec = 32;
    if ((st = check_size(&nn, n, err)) != EMBZ_OK) return st;
    if ((st = tdata_init(&T, q, err)) != EMBZ_OK) { tdata_clear(&T); return st; }
    memset(&R, 0, sizeof(R));
    memset(&X, 0, sizeof(X));

    /* 1. estimate */
    st = estimate_pass(&R, &order, &bad, f, nn, &T, err);
    if (st != EMBZ_OK) goto out;
    int unscaled = 0;      /* a weight or the sum outside double range, all finite in arb */
    slong wshift = 0;      /* the estimates are of the weights times 2^wshift */
    int ball_estimates = 0;
    if (bad) {
        st = bad_weight_error(f, bad, n, prec, err);
        if (st != EMBZ_ERR_UNSUPPORTED) goto out;
        unscaled = 1;
    }
    if ((unscaled || !(R.W > 0.0) || !(R.W <= 1e300)) && rescaled) {
        /* even scaled, the double pass fails (constants such as 1e-400 underflow inside the
         * expression): estimates from ball values, scaled, stored and sorted */
        embz_err_t e2;
        embz_err_clear(&e2);
        memset(&R, 0, sizeof(R));
        int as = arb_estimate_pass(&R, &wshift, f, nn, &T, &e2);
        if (as == EMBZ_OK && R.W > 0.0 && R.W <= 1e300) {
            order = 0;
            unscaled = 0;
            ball_estimates = 1;
            embz_err_clear(err);
            st = EMBZ_OK;
        } else {
            if (as == EMBZ_ERR_DOMAIN || as == EMBZ_ERR_NOMEM) { st = as; *err = e2; }
            goto out;
        }
    }
    if (unscaled || !(R.W > 0.0) || !(R.W <= 1e300)) {
        /* the double pass left its range: E does not change when every weight is scaled by
         * one factor, so once more with the largest end weight brought near 1 */
        slong k;
        if (!rescaled && scale_exponent(&k, f, n, prec)) {
            embz_family_struct g = *f;          /* shallow: only the weight differs */
            embz_expr_t sw;
            embz_expr_init(sw);
            embz_expr_set(sw, f->weight);
            if (embz_expr_scale_2exp(sw, k) == EMBZ_OK) {
                g.weight[0] = sw[0];
                tdata_clear(&T);
                st = explicit_run(res, &g, n, q, prec, 1, err);
                embz_expr_clear(sw);
                return st;
            }
            embz_expr_clear(sw);
        }
        if (unscaled) goto out;
        st = embz_err_set(err, R.W > 0.0 ? EMBZ_ERR_UNSUPPORTED : EMBZ_ERR_DOMAIN,
                          R.W > 0.0 ? "the sum of the weights overflows double range"
                                    : "all weights are zero (or below double range)");
        goto out;
    }

    /* 2. certified pass; F from the estimated total, retried with more head room if the
     * estimate was too small */
    int eq, ew;
    frexp((double) T.Q, &eq);
    frexp(R.W * (1.0 + 1e-6), &ew);
    ew -= (int) wshift;                 /* the exponent of the true total */
    int mode = order;
    for (int attempt = 0; attempt < 4; attempt++) {
        slong F = EMBZ_FIX_BITS - eq - ew - 8 * attempt;
        i128 cap = (i128) 1 << (EMBZ_FIX_BITS - eq);
        xsrc_init(&src, f, nn, F, prec, err);
        if (mode != 0) {
            src.dir = mode;
            st = xstream(&X, &src, &T, cap);
            if (st == STREAM_UNSORTED) {
                mode = 0;      /* the certified endpoints do not confirm the order */
                st = xstored(&X, &src, &T, cap);
            }
        } else {
            st = xstored(&X, &src, &T, cap);
        }
        if (st == EMBZ_ERR_PREC && attempt < 3) { xsrc_clear(&src); continue; }
        if (st == EMBZ_ERR_PREC)
            embz_err_set(err, st, "fixed-point range exceeded in explicit summation");
        if (st != EMBZ_OK) { xsrc_clear(&src); goto out; }
        if (X.WL <= 0) {
            st = embz_err_set(err, EMBZ_ERR_PREC,
                              "the total weight cannot be separated from 0 at %ld bits",
                              (long) prec);
            xsrc_clear(&src);
            goto out;
        }
        /* enclosures */
        arb_quotient_interval(res->error, X.GL, X.WU, X.GU, X.WL, F, T.Q, prec);
        res->estimate = R.best / R.W;
        fmpz_set_si(res->argk, R.argk);
        res->method = EMBZ_METHOD_EXPLICIT;
        res->order = mode;
        res->have_bounds = T.uniform && T.d == 2;
        if (res->have_bounds) {
            /* lower: max(p1/2, supB), upper: max(p1/2, 2 supB), all over W; scaled by Q = 2 */
            i128 a = IMAX(X.p1L, 2 * X.BL), b = IMAX(X.p1U, 2 * X.BU);
            arb_quotient_interval(res->lower, a, X.WU, b, X.WL, F, 2, prec);
            a = IMAX(X.p1L, 4 * X.BL);
            b = IMAX(X.p1U, 4 * X.BU);
            arb_quotient_interval(res->upper, a, X.WU, b, X.WL, F, 2, prec);
        }
        snprintf(res->detail, sizeof(res->detail),
                 "explicit, %s, arb %ld bits, exact fixed-point sums in units of 2^%ld",
                 mode > 0 ? "streaming (weights non-increasing)"
                 : mode < 0 ? "streaming (weights non-decreasing)"
                 : ball_estimates ? "stored and sorted (weights outside double range)"
                 : "stored and sorted (weights not monotone)",
                 (long) prec, (long) -F);
        xsrc_clear(&src);
        break;
    }
out:
    tdata_clear(&T);
    if (st == EMBZ_OK && !arb_is_finite(res->error))      /* never a nan called certified */
        st = embz_err_set(err, EMBZ_ERR_LIMIT, "explicit summation found no finite enclosure");
    return st;
}
