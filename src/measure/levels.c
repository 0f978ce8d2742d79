/* Level vectors (include/embz/levels.h): values with multiplicities, and the conversion
 * distance between two of them.
 *
 * Bounds without an order. For true values x_j inside balls [lo_j, hi_j], the Ky Fan norm
 * S_k (sum of the k largest entries) is non-decreasing in every entry, so
 *     S_k(lo) <= S_k(x) <= S_k(hi),
 * where S_k(lo) and S_k(hi) are computed on the exact ends, each list sorted by its own
 * exact (arf) values: no comparison of overlapping balls is ever needed. With the totals
 * W in [W_lo, W_hi], K(p -> r) = max_k S_k(x)/W_x - S_k(y)/W_y therefore lies between
 *     max_k S_k(x_lo)/W_x,hi - S_k(y_hi)/W_y,lo   and   max_k S_k(x_hi)/W_x,lo - S_k(y_lo)/W_y,hi.
 * Each bound is a difference of two functions of k that are linear between the cumulative
 * multiplicities of their lists, so its maximum over k is at one of those breakpoints: one
 * merge of the two sorted lists. */
#include <stdlib.h>
#include <string.h>
#include "embz/levels.h"

void embz_levels_init(embz_levels_t x)
{
    x->v = NULL;
    x->m = NULL;
    x->len = x->alloc = 0;
}

void embz_levels_clear(embz_levels_t x)
{
    if (x->alloc > 0) {
        _arb_vec_clear(x->v, x->alloc);
        _fmpz_vec_clear(x->m, x->alloc);
    }
    embz_levels_init(x);
}

static void fit(embz_levels_t x, slong len)
{
    if (len <= x->alloc) return;
    slong na = FLINT_MAX(len, 2 * x->alloc);
    arb_ptr v = _arb_vec_init(na);
    fmpz *m = _fmpz_vec_init(na);
    for (slong j = 0; j < x->len; j++) {
        arb_swap(v + j, x->v + j);
        fmpz_swap(m + j, x->m + j);
    }
    if (x->alloc > 0) {
        _arb_vec_clear(x->v, x->alloc);
        _fmpz_vec_clear(x->m, x->alloc);
    }
    x->v = v;
    x->m = m;
    x->alloc = na;
}

void embz_levels_push(embz_levels_t x, const arb_t v, const fmpz_t m)
{
    fit(x, x->len + 1);
    arb_set(x->v + x->len, v);
    fmpz_set(x->m + x->len, m);
    x->len++;
}

void embz_levels_dim(fmpz_t dim, const embz_levels_t x)
{
    fmpz_zero(dim);
    for (slong j = 0; j < x->len; j++) fmpz_add(dim, dim, x->m + j);
}

/* r <- v m for a count m of any size: m is rounded to a ball of prec bits first, so that
 * the cost does not grow with its length (counts of 10^5 bits are common) */
static void mul_count(arb_t r, const arb_t v, const fmpz_t m, slong prec)
{
    if (fmpz_bits(m) <= (flint_bitcnt_t) prec) {
        arb_mul_fmpz(r, v, m, prec);
    } else {
        arb_t t;
        arb_init(t);
        arb_set_round_fmpz(t, m, prec);
        arb_mul(r, v, t, prec);
        arb_clear(t);
    }
}

void embz_levels_total(arb_t W, const embz_levels_t x, slong prec)
{
    arb_t t;
    arb_init(t);
    arb_zero(W);
    for (slong j = 0; j < x->len; j++) {
        mul_count(t, x->v + j, x->m + j, prec);
        arb_add(W, W, t, prec);
    }
    arb_clear(t);
}

void embz_levels_tensor_target(embz_levels_t r, const embz_levels_t x, const embz_target_t q,
                               slong prec)
{
    arb_t t;
    fmpz_t m;
    arb_init(t);
    fmpz_init(m);
    r->len = 0;
    if (q->kind == EMBZ_TARGET_UNIFORM) {
        fit(r, x->len);
        for (slong j = 0; j < x->len; j++) {
            arb_div_ui(t, x->v + j, q->d, prec);
            fmpz_mul_ui(m, x->m + j, q->d);
            embz_levels_push(r, t, m);
        }
    } else {
        fit(r, x->len * q->q->len);
        for (slong j = 0; j < x->len; j++)
            for (slong l = 0; l < q->q->len; l++) {
                arb_mul_fmpz(t, x->v + j, fmpq_numref(q->q->p + l), prec);
                arb_div_fmpz(t, t, fmpq_denref(q->q->p + l), prec);
                embz_levels_push(r, t, x->m + j);
            }
    }
    arb_clear(t);
    fmpz_clear(m);
}

/* One end of every ball, with its multiplicity, sorted non-increasing by value. */
typedef struct {
    arf_struct *v;
    const fmpz **m;
    slong len;
} ends_t;

typedef struct { const arf_struct *v; const fmpz *m; } end_ref_t;

static int end_cmp_desc(const void *a, const void *b)
{
    return arf_cmp(((const end_ref_t *) b)->v, ((const end_ref_t *) a)->v);
}

static void ends_init(ends_t *e, const embz_levels_t x, int upper, slong prec)
{
    e->len = x->len;
    e->v = (arf_struct *) flint_malloc(sizeof(arf_struct) * (size_t) FLINT_MAX(1, x->len));
    e->m = (const fmpz **) flint_malloc(sizeof(fmpz *) * (size_t) FLINT_MAX(1, x->len));
    end_ref_t *r = (end_ref_t *) flint_malloc(sizeof(end_ref_t) * (size_t) FLINT_MAX(1, x->len));
    arf_struct *tmp = (arf_struct *) flint_malloc(sizeof(arf_struct) * (size_t) FLINT_MAX(1, x->len));
    for (slong j = 0; j < x->len; j++) {
        arf_init(tmp + j);
        if (upper) arb_get_ubound_arf(tmp + j, x->v + j, prec);
        else arb_get_lbound_arf(tmp + j, x->v + j, prec);
        if (arf_sgn(tmp + j) < 0) arf_zero(tmp + j);   /* weights are >= 0 */
        r[j].v = tmp + j;
        r[j].m = x->m + j;
    }
    qsort(r, (size_t) x->len, sizeof(end_ref_t), end_cmp_desc);
    for (slong j = 0; j < x->len; j++) {
        arf_init(e->v + j);
        arf_set(e->v + j, r[j].v);
        e->m[j] = r[j].m;
    }
    for (slong j = 0; j < x->len; j++) arf_clear(tmp + j);
    flint_free(tmp);
    flint_free(r);
}

static void ends_clear(ends_t *e)
{
    for (slong j = 0; j < e->len; j++) arf_clear(e->v + j);
    flint_free(e->v);
    flint_free(e->m);
}

/* best <- max over the breakpoints k of ca S_k(a) - cb S_k(b), taking the upper (upper != 0)
 * or the lower end of each enclosure; bestk <- that k (the first where it is reached). */
static void max_excess(arf_t best, fmpz_t bestk, const ends_t *a, const arb_t ca,
                       const ends_t *b, const arb_t cb, int upper, slong prec)
{
    fmpz_t pos, ea, eb, next, step;
    arb_t sa, sb, t, u;
    arf_t val;
    fmpz_init(pos); fmpz_init(ea); fmpz_init(eb); fmpz_init(next); fmpz_init(step);
    arb_init(sa); arb_init(sb); arb_init(t); arb_init(u);
    arf_init(val);
    arf_zero(best);      /* k = 0 */
    fmpz_zero(bestk);
    slong ia = 0, ib = 0;
    /* ea, eb: where the current level of a, b ends (cumulative multiplicity) */
    while (ia < a->len && fmpz_is_zero(a->m[ia])) ia++;
    while (ib < b->len && fmpz_is_zero(b->m[ib])) ib++;
    if (ia < a->len) fmpz_set(ea, a->m[ia]);
    if (ib < b->len) fmpz_set(eb, b->m[ib]);
    while (ia < a->len || ib < b->len) {
        if (ia < a->len && (ib >= b->len || fmpz_cmp(ea, eb) <= 0)) fmpz_set(next, ea);
        else fmpz_set(next, eb);
        fmpz_sub(step, next, pos);
        if (ia < a->len) {
            arb_set_arf(t, a->v + ia);
            mul_count(t, t, step, prec);
            arb_add(sa, sa, t, prec);
        }
        if (ib < b->len) {
            arb_set_arf(t, b->v + ib);
            mul_count(t, t, step, prec);
            arb_add(sb, sb, t, prec);
        }
        fmpz_set(pos, next);
        arb_mul(t, sa, ca, prec);
        arb_mul(u, sb, cb, prec);
        arb_sub(t, t, u, prec);
        if (upper) arb_get_ubound_arf(val, t, prec);
        else arb_get_lbound_arf(val, t, prec);
        if (arf_cmp(val, best) > 0) {
            arf_set(best, val);
            fmpz_set(bestk, pos);
        }
        /* move past the levels that end here */
        if (ia < a->len && fmpz_equal(ea, pos)) {
            for (ia++; ia < a->len && fmpz_is_zero(a->m[ia]); ia++) ;
            if (ia < a->len) fmpz_add(ea, ea, a->m[ia]);
        }
        if (ib < b->len && fmpz_equal(eb, pos)) {
            for (ib++; ib < b->len && fmpz_is_zero(b->m[ib]); ib++) ;
            if (ib < b->len) fmpz_add(eb, eb, b->m[ib]);
        }
    }
    fmpz_clear(pos); fmpz_clear(ea); fmpz_clear(eb); fmpz_clear(next); fmpz_clear(step);
    arb_clear(sa); arb_clear(sb); arb_clear(t); arb_clear(u);
    arf_clear(val);
}

/* c <- 1 / (the lower (lower != 0) or upper end of W) */
static void inv_end(arb_t c, const arb_t W, int lower, slong prec)
{
    arf_t e;
    arf_init(e);
    if (lower) arb_get_lbound_arf(e, W, prec);
    else arb_get_ubound_arf(e, W, prec);
    arb_set_arf(c, e);
    arb_inv(c, c, prec);
    arf_clear(e);
}

void embz_levels_distance(arb_t K, fmpz_t argk, const embz_levels_t x, const embz_levels_t y,
                          slong prec)
{
    slong wp = prec + 32;
    arb_t Wx, Wy, cxl, cxh, cyl, cyh;
    arf_t lo, hi;
    fmpz_t klo, khi;
    arb_init(Wx); arb_init(Wy);
    arb_init(cxl); arb_init(cxh); arb_init(cyl); arb_init(cyh);
    arf_init(lo); arf_init(hi);
    fmpz_init(klo); fmpz_init(khi);
    embz_levels_total(Wx, x, wp);
    embz_levels_total(Wy, y, wp);
    if (!arb_is_positive(Wx) || !arb_is_positive(Wy)) {
        arb_indeterminate(K);
        if (argk != NULL) fmpz_zero(argk);
        goto out;
    }
    inv_end(cxl, Wx, 1, wp);   /* 1 / W_x,lo */
    inv_end(cxh, Wx, 0, wp);   /* 1 / W_x,hi */
    inv_end(cyl, Wy, 1, wp);
    inv_end(cyh, Wy, 0, wp);
    {
        ends_t xl, xh, yl, yh;
        ends_init(&xl, x, 0, wp);
        ends_init(&xh, x, 1, wp);
        ends_init(&yl, y, 0, wp);
        ends_init(&yh, y, 1, wp);
        /* upper: S_k(x_hi) / W_x,lo - S_k(y_lo) / W_y,hi */
        max_excess(hi, khi, &xh, cxl, &yl, cyh, 1, wp);
        /* lower: S_k(x_lo) / W_x,hi - S_k(y_hi) / W_y,lo */
        max_excess(lo, klo, &xl, cxh, &yh, cyl, 0, wp);
        ends_clear(&xl); ends_clear(&xh); ends_clear(&yl); ends_clear(&yh);
    }
    if (arf_cmp(hi, lo) < 0) arb_indeterminate(K);   /* impossible (U >= L at every k) */
    else arb_set_interval_arf(K, lo, hi, prec);
    if (argk != NULL) fmpz_set(argk, klo);
out:
    arb_clear(Wx); arb_clear(Wy);
    arb_clear(cxl); arb_clear(cxh); arb_clear(cyl); arb_clear(cyh);
    arf_clear(lo); arf_clear(hi);
    fmpz_clear(klo); fmpz_clear(khi);
}
