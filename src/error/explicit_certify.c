/* The certified pass of explicit summation (see explicit.c for the method): every weight an
 * arb ball, turned into an integer interval in units of 2^-F, summed exactly in 128-bit
 * integers; streamed in the order the estimate found, or stored and sorted when the certified
 * upper ends do not confirm that order. */
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include "impl.h"

typedef embz_x_i128 i128;

#define I128_MAX ((i128) (((unsigned __int128) 1 << 127) - 1))

/* internal status: the stream found the hi values out of order */
#define STREAM_UNSORTED (-1)

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

static int xstream_uniform(embz_x_xres_t *X, xsrc_t *src, ulong d, i128 cap)
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
EMBZ_X_MAX_HEAP_DEFINE(xheap, xnode_t, vhi)

static int xstream_vector(embz_x_xres_t *X, xsrc_t *src, const embz_x_tdata_t *T, i128 cap)
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

static int xstream(embz_x_xres_t *X, xsrc_t *src, const embz_x_tdata_t *T, i128 cap)
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
static int xstored(embz_x_xres_t *X, xsrc_t *src, const embz_x_tdata_t *T, i128 cap)
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

/* A ball containing every real in [a / (Q b), c / (Q e)]. */
void _embz_x_quotient_interval(arb_t res, i128 a, i128 b, i128 c, i128 e, slong Q, slong prec)
{
    arb_t x, y, t;
    fmpz_t z;
    arb_init(x); arb_init(y); arb_init(t); fmpz_init(z);
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

/* F from the estimated total (the sums of hi, times Q, stay below 2^EMBZ_FIX_BITS), retried
 * with 8 more bits of head room up to three times when the estimate was too small. */
int _embz_x_certify(embz_x_xres_t *X, slong *F, int *mode, const embz_family_t f, slong n,
                    const embz_x_tdata_t *T, int ew, slong prec, embz_err_t *err)
{
    xsrc_t src;
    int eq, st = EMBZ_OK;
    frexp((double) T->Q, &eq);
    for (int attempt = 0; attempt < 4; attempt++) {
        *F = EMBZ_FIX_BITS - eq - ew - 8 * attempt;
        i128 cap = (i128) 1 << (EMBZ_FIX_BITS - eq);
        xsrc_init(&src, f, n, *F, prec, err);
        if (*mode != 0) {
            src.dir = *mode;
            st = xstream(X, &src, T, cap);
            if (st == STREAM_UNSORTED) {
                *mode = 0;      /* the certified endpoints do not confirm the order */
                st = xstored(X, &src, T, cap);
            }
        } else {
            st = xstored(X, &src, T, cap);
        }
        xsrc_clear(&src);
        if (st != EMBZ_ERR_PREC) break;
    }
    if (st == EMBZ_ERR_PREC)
        embz_err_set(err, st, "fixed-point range exceeded in explicit summation");
    return st;
}
