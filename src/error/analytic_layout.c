/* The layout of one size: sorted Schmidt probabilities as  A | tail | B, where A holds the
 * head weights (i <= M) at least every tail weight, B those at most every tail weight, and
 * the head weights inside the range of the tail are inserted at their places among the tail
 * weights; the totals, and the explicit positions 1..E. Also the context's life cycle. */
#include <string.h>
#include <stdlib.h>
#include "impl.h"

void _embz_an_ctx_init(actx *c, embz_tail_struct *t, const embz_family_struct *f,
                       const fmpz_t n, ulong d, slong prec)
{
    memset(c, 0, sizeof(*c));
    c->t = t;
    c->f = f;
    c->d = d;
    c->prec = prec;
    c->bb_budget = BB_BUDGET;
    fmpz_init_set(c->n, n);
    fmpz_init_set(c->ntrue, n);
    fmpz_init(c->L);
    fmpz_init(c->argk);
    fmpz_init(c->kmax);
    arb_init(c->SA); arb_init(c->SB); arb_init(c->Ttot); arb_init(c->W);
    arb_init(c->best); arf_init(c->upper); arf_init(c->tol);
    arb_init(c->dH);
    mag_init(c->rslack);
    arb_indeterminate(c->best);
}

/* the layout and the context's numbers (not the tail object) */
void _embz_an_ctx_clear(actx *c)
{
    _embz_an_free_layout(c);
    fmpz_clear(c->n); fmpz_clear(c->ntrue); fmpz_clear(c->L); fmpz_clear(c->argk);
    fmpz_clear(c->kmax);
    arb_clear(c->SA); arb_clear(c->SB); arb_clear(c->Ttot); arb_clear(c->W);
    arb_clear(c->best); arf_clear(c->upper); arf_clear(c->tol);
    arb_clear(c->dH);
    mag_clear(c->rslack);
}

void _embz_an_free_layout(actx *c)
{
    if (c->A) _arb_vec_clear(c->A, c->M);
    if (c->B) _arb_vec_clear(c->B, c->M);
    if (c->vals) _arb_vec_clear(c->vals, c->E + 1);
    if (c->S) _arb_vec_clear(c->S, c->E + 1);
    if (c->ins_val) _arb_vec_clear(c->ins_val, c->M);
    if (c->ins_cum) _arb_vec_clear(c->ins_cum, c->M + 1);
    if (c->ins_pos) _fmpz_vec_clear(c->ins_pos, c->M);
    c->A = c->B = c->vals = c->S = c->ins_val = c->ins_cum = NULL;
    c->ins_pos = NULL;
    c->nins = 0;
}

/* After sorting by midpoints, runs of neighbours whose order the balls do not certify (equal
 * weights, or weights closer than the radii) are replaced by the union of the run: whatever
 * the true order inside the run, every position then encloses its true sorted value, and the
 * prefix sums enclose the true Ky Fan sums. */
static void merge_unordered(arb_ptr v, slong len, slong prec)
{
    slong i = 0;
    while (i + 1 < len) {
        if (arb_ge(v + i, v + i + 1)) { i++; continue; }
        slong j = i + 1;
        while (j + 1 < len && !arb_ge(v + j, v + j + 1)) j++;
        arb_t u;
        arb_init(u);
        arb_set(u, v + i);
        for (slong k = i + 1; k <= j; k++) arb_union(u, u, v + k, prec);
        for (slong k = i; k <= j; k++) arb_set(v + k, u);
        arb_clear(u);
        i = j + 1;
    }
}

static int cmp_desc(const void *x, const void *y)
{
    const arb_struct *a = x, *b = y;
    return -arf_cmp(arb_midref(a), arb_midref(b));
}

/* the head weights into head[0..M-1] and the extremes of the tail, [tmin, tmax] */
static int head_weights(arb_ptr head, arb_t tmax, arb_t tmin, actx *c, slong M, const arb_t nn,
                        slong prec, embz_err_t *err)
{
    const embz_expr_struct *w = c->f->weight;
    int st = EMBZ_OK;
    arb_t x, v;
    arb_init(x); arb_init(v);
    for (slong i = 1; i <= M; i++) {
        arb_set_si(x, i);
        if (embz_expr_eval_arb(head + i - 1, w, x, nn, prec) != EMBZ_OK
            || !arb_is_nonnegative(head + i - 1)) {
            st = embz_err_set(err, EMBZ_ERR_DOMAIN, "weight undefined or negative at i = %ld", i);
            goto out;
        }
    }
    /* tail extremes: dec: [f(n), f(M+1)], inc: [f(M+1), f(n)] */
    arb_set_si(x, M + 1);
    embz_expr_eval_arb(v, w, x, nn, prec);
    arb_set_fmpz(x, c->n);
    embz_expr_eval_arb(x, w, x, nn, prec);
    if (c->t->dir > 0) { arb_set(tmax, v); arb_set(tmin, x); }
    else { arb_set(tmax, x); arb_set(tmin, v); }
    if (!arb_is_nonnegative(tmin)) {
        /* say which: a value certainly below 0, or one whose sign this precision cannot tell */
        char at[32];
        if (c->t->dir > 0) snprintf(at, sizeof(at), "n");
        else snprintf(at, sizeof(at), "%ld", (long) M + 1);
        st = embz_err_set(err, EMBZ_ERR_DOMAIN, arb_is_negative(tmin)
                          ? "weight is negative in the tail (at i = %s)"
                          : !arb_is_finite(tmin) ? "weight is undefined in the tail (at i = %s)"
                          : "the sign of the weight at i = %s cannot be told at this precision "
                            "(more bits, --prec, may help)", at);
    }
out:
    arb_clear(x); arb_clear(v);
    return st;
}

/* The head weights into A and B, or inserted where they belong among the tail weights: after
 * the tail positions whose weight is certainly larger (bisection on the index). Sets the
 * insertions' values, places (without the offset a) and cumulative sums. */
static int place_head(actx *c, arb_srcptr head, slong M, const arb_t tmax, const arb_t tmin,
                      const arb_t nn, slong prec, embz_err_t *err)
{
    const embz_expr_struct *w = c->f->weight;
    int st = EMBZ_OK;
    fmpz *cnt = _fmpz_vec_init(M);
    fmpz_t lo, mid;
    arb_t x, v;
    fmpz_init(lo); fmpz_init(mid);
    arb_init(x); arb_init(v);
    for (slong i = 0; i < M && st == EMBZ_OK; i++) {
        if (arb_ge(head + i, tmax)) { arb_set(c->A + c->a++, head + i); continue; }
        if (arb_le(head + i, tmin)) { arb_set(c->B + c->b++, head + i); continue; }
        /* its place: the number of tail weights above it */
        fmpz_add_ui(mid, c->L, (ulong) M);
        int cst = embz_tail_count(lo, c->t, head + i, mid, prec);
        /* neighbouring weights near an index beyond 2^prec differ by less than the
         * working precision: this one bisection gets the bits of n as well */
        if (cst == EMBZ_ERR_PREC) {
            slong hp = prec + (slong) fmpz_bits(c->n) + 16;
            arb_set_si(x, i + 1);
            cst = embz_expr_eval_arb(v, w, x, nn, hp);
            if (cst == EMBZ_OK) cst = embz_tail_count(lo, c->t, v, mid, hp);
        }
        if (cst != EMBZ_OK)
            st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                              "the weight at i = %ld cannot be placed among the tail "
                              "weights at this precision (more bits, --prec, may help)",
                              i + 1);
        if (st != EMBZ_OK) break;
        arb_set(c->ins_val + c->nins, head + i);
        fmpz_set(cnt + c->nins, lo);
        c->nins++;
    }
    if (st == EMBZ_OK) {
        /* order the insertions by place, then by value (insertion sort: few) */
        for (slong i = 1; i < c->nins; i++)
            for (slong j = i; j > 0; j--) {
                int cmp = fmpz_cmp(cnt + j - 1, cnt + j);
                if (cmp < 0 || (cmp == 0 && arf_cmp(arb_midref(c->ins_val + j - 1),
                                                    arb_midref(c->ins_val + j)) >= 0))
                    break;
                fmpz_swap(cnt + j - 1, cnt + j);
                arb_swap(c->ins_val + j - 1, c->ins_val + j);
            }
        arb_zero(c->ins_cum);
        for (slong i = 0; i < c->nins; i++) {
            /* P_i = a + (tail positions before) + (insertions before, this one included) */
            fmpz_add_ui(c->ins_pos + i, cnt + i, (ulong) (i + 1));
            arb_add(c->ins_cum + i + 1, c->ins_cum + i, c->ins_val + i, prec);
        }
    }
    _fmpz_vec_clear(cnt, M);
    fmpz_clear(lo); fmpz_clear(mid);
    arb_clear(x); arb_clear(v);
    return st;
}

/* explicit positions 1..E (past the insertions, so that the smooth region starts inside
 * the tail): their values and prefix sums */
static int explicit_positions(actx *c, const arb_t nn, slong prec, embz_err_t *err)
{
    const embz_expr_struct *w = c->f->weight;
    int st = EMBZ_OK;
    c->E = (slong) c->d * (c->a + c->nins + 2) + (slong) c->d;
    if (c->nins > 0) {
        slong last = fmpz_get_si(c->ins_pos + c->nins - 1);
        if (fmpz_bits(c->ins_pos + c->nins - 1) < 40 && last + 2 > c->E) c->E = last + 2;
    }
    c->vals = _arb_vec_init(c->E + 1);
    c->S = _arb_vec_init(c->E + 1);
    fmpz_t K;
    arb_t x, v;
    fmpz_init(K);
    arb_init(x); arb_init(v);
    for (slong k = 1; k <= c->E; k++) {
        if (k <= c->a) arb_set(c->vals + k, c->A + k - 1);
        else {
            slong at, cb;
            fmpz_set_si(K, k);
            cb = _embz_an_ins_before(c, K, &at);
            if (at >= 0) arb_set(c->vals + k, c->ins_val + at);
            else {
                arb_set_si(v, k - c->a - cb);
                _embz_an_tail_x(x, c, v, prec);
                if (embz_expr_eval_arb(c->vals + k, w, x, nn, prec) != EMBZ_OK) {
                    st = embz_err_set(err, EMBZ_ERR_DOMAIN, "weight undefined in the tail");
                    break;
                }
            }
        }
        arb_add(c->S + k, c->S + k - 1, c->vals + k, prec);
    }
    fmpz_clear(K);
    arb_clear(x); arb_clear(v);
    return st;
}

int _embz_an_setup(actx *c, slong M, int shared, slong prec, embz_err_t *err)
{
    const embz_expr_struct *w = c->f->weight;
    int st = EMBZ_OK;
    arb_t nn, x, tmax, tmin;
    arb_ptr head = _arb_vec_init(M);
    arb_init(nn); arb_init(x); arb_init(tmax); arb_init(tmin);
    arb_set_round_fmpz(nn, c->ntrue, prec);
    c->M = M;

    if (!shared) {
        st = embz_tail_init(c->t, w, c->ntrue, M, c->ntrue, prec, err);
        if (st != EMBZ_OK) goto out;
    }
    /* the tail may end early when the weights beyond are negligible */
    if (fmpz_cmp(c->t->end, c->ntrue) < 0) fmpz_set(c->n, c->t->end);
    else fmpz_set(c->n, c->ntrue);
    fmpz_sub_ui(c->L, c->n, (ulong) M);

    st = head_weights(head, tmax, tmin, c, M, nn, prec, err);
    if (st != EMBZ_OK) goto out;
    c->a = c->b = 0;
    c->nins = 0;
    c->A = _arb_vec_init(M);
    c->B = _arb_vec_init(M);
    c->ins_val = _arb_vec_init(M);
    c->ins_cum = _arb_vec_init(M + 1);
    c->ins_pos = _fmpz_vec_init(M);
    st = place_head(c, head, M, tmax, tmin, nn, prec, err);
    if (st != EMBZ_OK) goto out;
    qsort(c->A, c->a, sizeof(arb_struct), cmp_desc);
    qsort(c->B, c->b, sizeof(arb_struct), cmp_desc);
    merge_unordered(c->A, c->a, prec);
    merge_unordered(c->B, c->b, prec);
    merge_unordered(c->ins_val, c->nins, prec);   /* equal places: unions, see above */
    for (slong i = 0; i < c->nins; i++) fmpz_add_ui(c->ins_pos + i, c->ins_pos + i, (ulong) c->a);
    arb_zero(c->SA);
    for (slong i = 0; i < c->a; i++) arb_add(c->SA, c->SA, c->A + i, prec);
    arb_zero(c->SB);
    for (slong i = 0; i < c->b; i++) arb_add(c->SB, c->SB, c->B + i, prec);
    c->off_k = c->off_s = c->a;
    arb_zero(c->dH);
    /* total tail */
    arb_set_fmpz(x, c->n);
    st = embz_tail_sum(c->Ttot, c->t, x, prec);
    if (st != EMBZ_OK) { embz_err_set(err, st, "cannot bound the tail sum"); goto out; }
    arb_add(c->W, c->SA, c->Ttot, prec);
    arb_add(c->W, c->W, c->SB, prec);
    arb_add(c->W, c->W, c->ins_cum + c->nins, prec);
    if (!arb_is_positive(c->W)) {
        st = embz_err_set(err, EMBZ_ERR_DOMAIN, "total weight is 0");
        goto out;
    }
    {
        mag_t wl;
        mag_init(wl);
        arb_get_mag_lower(wl, c->W);
        mag_div(c->rslack, c->t->rem, wl);
        mag_mul_2exp_si(c->rslack, c->rslack, 1);
        mag_clear(wl);
    }
    st = explicit_positions(c, nn, prec, err);
out:
    _arb_vec_clear(head, M);
    arb_clear(nn); arb_clear(x); arb_clear(tmax); arb_clear(tmin);
    return st;
}
