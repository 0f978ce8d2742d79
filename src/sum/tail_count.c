/* Counting the weights of a tail above a value: N = #{ i : M < i <= upto, w(i) > v } on the
 * certified monotone tail, by bisection on the index or, far out, by a bracket around the
 * root of f(x) = v (see src/sum/sum.h). */
#include "sum/impl.h"

/* the bisection predicate at index x (see tail_bisect): 1 / 0, or EMBZ_ERR_* < 0 */
static int tail_left(embz_tail_t t, const fmpz_t x, const arb_t v, int mode, slong prec)
{
    arb_t xb, w;
    arb_init(xb); arb_init(w);
    int res;
    arb_set_fmpz(xb, x);
    if (embz_expr_eval_arb(w, t->w, xb, t->n, prec) != EMBZ_OK) {
        res = -EMBZ_ERR_DOMAIN;
    } else {
        int above = arb_gt(w, v);
        if (mode == 0) {
            if (!above && !arb_lt(w, v)) res = -EMBZ_ERR_PREC;
            else res = (t->dir > 0) == (above != 0);
        } else if (mode == 1) {
            res = t->dir > 0 ? above : arb_le(w, v);
        } else {
            res = t->dir > 0 ? !arb_le(w, v) : !above;
        }
    }
    arb_clear(xb); arb_clear(w);
    return res;
}

/* Bisection on the index for the boundary between a left part (M, a] and the rest of
 * (M, upto]: the left part is "w > v" for a non-increasing tail and "w <= v" for a
 * non-decreasing one. mode 0: every comparison must be decided (EMBZ_ERR_PREC otherwise);
 * mode 1: an index is left when it is certainly left; mode 2: when it is not certainly right.
 * A certified comparison at an index also holds beyond it on the far side (the weights are
 * monotone), so modes 1 and 2 give the lower and upper ends of the true boundary. */
static int tail_bisect(fmpz_t a, embz_tail_t t, const arb_t v, const fmpz_t upto, int mode,
                       slong prec)
{
    fmpz_t b, mid;
    int st = EMBZ_OK;
    fmpz_init(b); fmpz_init(mid);
    fmpz_set_si(a, t->M);
    fmpz_add_ui(b, upto, 1);
    for (;;) {
        fmpz_sub(mid, b, a);
        if (fmpz_cmp_ui(mid, 1) <= 0) break;
        fmpz_add(mid, a, b);
        fmpz_fdiv_q_2exp(mid, mid, 1);
        int left = tail_left(t, mid, v, mode, prec);
        if (left < 0) { st = -left; break; }
        if (left) fmpz_set(a, mid);
        else fmpz_set(b, mid);
    }
    fmpz_clear(b); fmpz_clear(mid);
    return st;
}

int embz_tail_count(fmpz_t res, embz_tail_t t, const arb_t v, const fmpz_t upto, slong prec)
{
    /* the indices with w > v form a prefix (non-increasing) or a suffix (non-decreasing) of
     * (M, upto] */
    fmpz_t a;
    fmpz_init(a);
    int st = tail_bisect(a, t, v, upto, 0, prec);
    if (st == EMBZ_OK) {
        if (t->dir > 0) fmpz_sub_si(res, a, t->M);       /* indices M+1 .. a */
        else fmpz_sub(res, upto, a);                     /* indices a+1 .. upto */
    }
    fmpz_clear(a);
    return st;
}

/* Beyond about 2^prec the set of undecided indices is wide, and bisection to its exact
 * edges costs one evaluation per bit of the index. Instead: the root x* of f(x) = v by Newton
 * in s = ln x (embz_tail_log_root), then b0 = floor(x* (1 - e)) with the mode-1 predicate
 * true and b1 + 1 = ceil(x* (1 + e)) with the mode-2 predicate false, e = 2^-(prec - 10) |s|
 * (what s at prec bits can locate): the same guarantees as the bisection's ends (by
 * monotonicity), with an undecided range about 2 e x* wide instead of the smallest one. A v
 * beyond the tail's range is settled by the predicates at its ends (all or none counted).
 * EMBZ_ERR_PREC when the checks fail (the caller bisects). */
static int tail_bracket(fmpz_t b0, fmpz_t b1, embz_tail_t t, const arb_t v, const fmpz_t upto,
                        slong prec)
{
    arb_t lv, slo, shi, s, x, e;
    fmpz_t xa, xb;
    arb_init(lv); arb_init(slo); arb_init(shi); arb_init(s); arb_init(x); arb_init(e);
    fmpz_init(xa); fmpz_init(xb);
    int st = EMBZ_ERR_PREC;
    /* v beyond the tail's range: the predicates hold (or fail) at its far end already */
    fmpz_set_si(xa, t->M + 1);
    if (tail_left(t, upto, v, 1, prec) == 1) {
        fmpz_set(b0, upto);
        fmpz_set(b1, upto);
        st = EMBZ_OK;
    } else if (tail_left(t, xa, v, 2, prec) == 0) {
        fmpz_set_si(b0, t->M);
        fmpz_set_si(b1, t->M);
        st = EMBZ_OK;
    }
    if (st == EMBZ_OK) goto out;
    if (t->usplit && arb_is_positive(v)) {
        arb_log(lv, v, prec);
        arb_set_si(slo, t->M + 1);
        arb_log(slo, slo, prec);
        arb_set_fmpz(shi, upto);
        arb_log(shi, shi, prec);
        st = embz_tail_log_root(s, t, lv, slo, shi, prec);
    }
    if (st == EMBZ_OK) {
        /* s is known to about 2^-prec |s| (absolute), so x to that relative precision */
        slong eb = prec - 10 - FLINT_MAX(0, arf_abs_bound_lt_2exp_si(arb_midref(s)));
        arb_exp(x, s, prec);
        arb_mul_2exp_si(e, x, -eb);
        arb_sub(e, x, e, prec);
        arf_get_fmpz(xa, arb_midref(e), ARF_RND_FLOOR);
        arb_mul_2exp_si(e, x, -eb);
        arb_add(e, x, e, prec);
        arf_get_fmpz(xb, arb_midref(e), ARF_RND_CEIL);
        /* the ends M and upto + 1 hold the predicates by convention (as in tail_bisect) */
        if (fmpz_cmp_si(xa, t->M) < 0) fmpz_set_si(xa, t->M);
        if (fmpz_cmp(xb, upto) > 0) fmpz_add_ui(xb, upto, 1);
        st = EMBZ_ERR_PREC;
        if (fmpz_cmp(xa, xb) < 0
            && (fmpz_cmp_si(xa, t->M) == 0 || tail_left(t, xa, v, 1, prec) == 1)
            && (fmpz_cmp(xb, upto) > 0 || tail_left(t, xb, v, 2, prec) == 0)) {
            fmpz_set(b0, xa);
            fmpz_sub_ui(b1, xb, 1);
            st = EMBZ_OK;
        }
    }
out:
    arb_clear(lv); arb_clear(slo); arb_clear(shi); arb_clear(s); arb_clear(x); arb_clear(e);
    fmpz_clear(xa); fmpz_clear(xb);
    return st;
}

/* (the bracket under its internal name, for the tests; the count calls the static one) */
int _embz_tail_bracket(fmpz_t b0, fmpz_t b1, embz_tail_t t, const arb_t v, const fmpz_t upto,
                       slong prec)
{
    return tail_bracket(b0, b1, t, v, upto, prec);
}

int embz_tail_count_range(fmpz_t lo, fmpz_t hi, arb_t tie, embz_tail_t t, const arb_t v,
                          const fmpz_t upto, slong prec)
{
    fmpz_t bnd[2], mid;
    arb_t x, w;
    fmpz_init(bnd[0]); fmpz_init(bnd[1]); fmpz_init(mid);
    arb_init(x); arb_init(w);
    int st = EMBZ_ERR_PREC;
    if (fmpz_bits(upto) > (flint_bitcnt_t) prec - 16)
        st = tail_bracket(bnd[0], bnd[1], t, v, upto, prec);
    if (st != EMBZ_OK) {
        st = tail_bisect(bnd[0], t, v, upto, 1, prec);
        if (st == EMBZ_OK) st = tail_bisect(bnd[1], t, v, upto, 2, prec);
    }
    if (st == EMBZ_OK) {
        /* indices bnd[0] + 1 .. bnd[1] are undecided */
        if (t->dir > 0) {
            fmpz_sub_si(lo, bnd[0], t->M);
            fmpz_sub_si(hi, bnd[1], t->M);
        } else {
            fmpz_sub(lo, upto, bnd[1]);
            fmpz_sub(hi, upto, bnd[0]);
        }
        /* the undecided weights exceed v by at most their largest value minus v */
        arb_zero(tie);
        if (fmpz_cmp(lo, hi) < 0) {
            if (t->dir > 0) fmpz_add_ui(mid, bnd[0], 1);
            else fmpz_set(mid, bnd[1]);
            arb_set_fmpz(x, mid);
            if (embz_expr_eval_arb(w, t->w, x, t->n, prec) != EMBZ_OK) st = EMBZ_ERR_DOMAIN;
            else {
                arb_sub(w, w, v, prec);
                arf_t u;
                arf_init(u);
                arb_get_ubound_arf(u, w, prec);
                if (arf_sgn(u) > 0) arb_set_arf(tie, u);
                arf_clear(u);
            }
        }
    }
    fmpz_clear(bnd[0]); fmpz_clear(bnd[1]); fmpz_clear(mid);
    arb_clear(x); arb_clear(w);
    return st;
}
