/* Positions in the sorted order A | tail with the inserted head weights | B (see
 * analytic_layout.c): the tail by its Euler-Maclaurin sums at real positions, every position
 * as a prefix sum or a value, the expression h(k) of the Ky Fan form at one k, and the record
 * of the maximisation (best proven value, running upper bound). */
#include "impl.h"

/* ---------- tail positions (1-based, real balls) ---------- */

/* x coordinate of tail position y: dec: M + y, inc: n + 1 - y (the subtraction with the bits
 * of n, so that positions near the start of the tail, x ~ M, stay exact however large n is) */
void _embz_an_tail_x(arb_t x, const actx *c, const arb_t y, slong prec)
{
    if (c->t->dir > 0) {
        arb_add_si(x, y, c->M, prec);
    } else {
        slong wp = FLINT_MAX(prec, (slong) fmpz_bits(c->n) + 16);
        arb_set_fmpz(x, c->n);
        arb_add_ui(x, x, 1, wp);
        arb_sub(x, x, y, wp);
    }
}

/* the x argument of the tail sum behind C(y): dec: M + y, inc: n - y (as in _embz_an_tail_x) */
static void sum_x(arb_t x, const actx *c, const arb_t y, slong prec)
{
    if (c->t->dir > 0) {
        arb_add_si(x, y, c->M, prec);
    } else {
        slong wp = FLINT_MAX(prec, (slong) fmpz_bits(c->n) + 16);
        arb_set_fmpz(x, c->n);
        arb_sub(x, x, y, wp);
    }
}

/* the Euler-Maclaurin level valid for C over the whole ball y */
slong _embz_an_tail_level(const actx *c, const arb_t y, slong prec)
{
    arb_t x;
    arb_init(x);
    sum_x(x, c, y, prec);
    slong lev = embz_tail_level(c->t, x);
    arb_clear(x);
    return lev;
}

/* C(y) = sum of the first y sorted tail values (smooth extension for real y, from the
 * given level or EMBZ_TAIL_LEVEL_AUTO) */
int _embz_an_tail_C(arb_t res, actx *c, const arb_t y, slong lev, slong prec)
{
    arb_t x, top;
    arb_init(x); arb_init(top);
    sum_x(x, c, y, prec);
    int st;
    if (c->t->dir > 0) {
        st = embz_tail_sum_level(res, c->t, x, lev, prec);
    } else {
        /* the last y weights up to n: T~(n) - T~(n - y), taken without cancellation */
        arb_set_fmpz(top, c->n);
        st = embz_tail_sum_top(res, c->t, y, top, lev, prec);
    }
    arb_clear(x); arb_clear(top);
    return st;
}

/* Taylor coefficients 1..len-1 of sigma -> C(y + scale sigma), from level lev */
int _embz_an_tail_C_series(arb_ptr res, actx *c, const arb_t y, const arb_t scale, slong len,
                           slong lev, slong prec)
{
    arb_t x, sc;
    arb_init(x); arb_init(sc);
    sum_x(x, c, y, prec);
    int st;
    if (c->t->dir > 0) {
        st = embz_tail_series_level(res, c->t, x, scale, len, lev, prec);
    } else {
        arb_neg(sc, scale);
        st = embz_tail_series_level(res, c->t, x, sc, len, lev, prec);
        _arb_vec_neg(res, res, len);
    }
    arb_clear(x); arb_clear(sc);
    return st;
}

/* value at tail position y + sigma, as a series in sigma */
int _embz_an_tail_v_series(arb_ptr res, actx *c, const arb_t y, slong len, slong prec)
{
    arb_t x, sc;
    arb_init(x); arb_init(sc);
    _embz_an_tail_x(x, c, y, prec);
    arb_set_si(sc, c->t->dir > 0 ? 1 : -1);
    int st = embz_tail_weight_series(res, c->t, x, sc, len, prec);
    arb_clear(x); arb_clear(sc);
    return st;
}

/* ---------- sorted positions (integers) ---------- */

/* number of inserted head weights at positions < K, and the index i (0-based) of the one at
 * position K, or -1 */
slong _embz_an_ins_before(const actx *c, const fmpz_t K, slong *at)
{
    slong cnt = 0;
    *at = -1;
    for (slong i = 0; i < c->nins; i++) {
        int cmp = fmpz_cmp(c->ins_pos + i, K);
        if (cmp < 0) cnt++;
        else if (cmp == 0) *at = i;
    }
    return cnt;
}

/* Sorted position K: the numerator of P_K (sum of the K largest weights, K in [0, n]) when
 * want_sum, else the weight at position K (K in [1, n]). The order is A | tail with the
 * inserted head weights | B. */
int _embz_an_pos_query(arb_t res, actx *c, const fmpz_t K, int want_sum, slong prec)
{
    if (fmpz_cmp_si(K, c->E) <= 0) {
        arb_set(res, (want_sum ? c->S : c->vals) + fmpz_get_si(K));
        return EMBZ_OK;
    }
    slong at, cb = _embz_an_ins_before(c, K, &at);
    fmpz_t j;
    fmpz_init(j);
    /* tail positions up to K */
    fmpz_sub_si(j, K, c->a + cb + (at >= 0 ? 1 : 0));
    int st = EMBZ_OK;
    if (at >= 0) {
        if (want_sum) {
            arb_t y;
            arb_init(y);
            arb_set_fmpz(y, j);
            st = _embz_an_tail_C(res, c, y, EMBZ_TAIL_LEVEL_AUTO, prec);
            arb_add(res, res, c->SA, prec);
            arb_add(res, res, c->ins_cum + at + 1, prec);
            arb_clear(y);
        } else {
            arb_set(res, c->ins_val + at);
        }
    } else if (fmpz_cmp(j, c->L) <= 0) {
        /* inside the tail */
        arb_t y;
        arb_init(y);
        arb_set_fmpz(y, j);
        if (want_sum) {
            st = _embz_an_tail_C(res, c, y, EMBZ_TAIL_LEVEL_AUTO, prec);
            arb_add(res, res, c->SA, prec);
            arb_add(res, res, c->ins_cum + cb, prec);
        } else {
            arb_ptr v = _arb_vec_init(1);
            st = _embz_an_tail_v_series(v, c, y, 1, prec);
            arb_set(res, v);
            _arb_vec_clear(v, 1);
        }
        arb_clear(y);
    } else {
        /* inside B */
        fmpz_sub(j, j, c->L);
        slong m = fmpz_get_si(j);
        if (want_sum) {
            arb_add(res, c->SA, c->Ttot, prec);
            arb_add(res, res, c->ins_cum + c->nins, prec);
            for (slong i = 0; i < m && i < c->b; i++) arb_add(res, res, c->B + i, prec);
        } else {
            arb_set(res, c->B + m - 1);
        }
    }
    fmpz_clear(j);
    return st;
}

/* h(k) = (P_k - P_s - (r/d) p_(s+1)) / W with P_k = W for k >= n */
int _embz_an_h_at(arb_t res, actx *c, const fmpz_t k, slong prec)
{
    fmpz_t s, s1;
    ulong r;
    arb_t Pk, Ps, v;
    fmpz_init(s); fmpz_init(s1);
    arb_init(Pk); arb_init(Ps); arb_init(v);
    r = fmpz_fdiv_ui(k, c->d);
    fmpz_fdiv_q_ui(s, k, c->d);
    fmpz_add_ui(s1, s, 1);
    int st;
    if (fmpz_cmp(k, c->n) >= 0) {
        arb_set(Pk, c->W);
        st = EMBZ_OK;
    } else {
        st = _embz_an_pos_sum(Pk, c, k, prec);
    }
    if (st == EMBZ_OK) st = _embz_an_pos_sum(Ps, c, s, prec);
    arb_sub(res, Pk, Ps, prec);
    if (st == EMBZ_OK && r != 0 && fmpz_cmp(s1, c->n) <= 0) {
        st = _embz_an_pos_val(v, c, s1, prec);
        arb_mul_ui(v, v, r, prec);
        arb_div_ui(v, v, c->d, prec);
        arb_sub(res, res, v, prec);
    }
    arb_div(res, res, c->W, prec);
    fmpz_clear(s); fmpz_clear(s1);
    arb_clear(Pk); arb_clear(Ps); arb_clear(v);
    c->evals++;
    return st;
}

/* ---------- the record of the maximisation ---------- */

/* the final upper bound is the largest upper end over every evaluated point and every
 * resolved or abandoned interval */
void _embz_an_raise_upper(actx *c, const arb_t x)
{
    arf_t u;
    arf_init(u);
    arb_get_ubound_arf(u, x, c->prec);
    if (!arb_is_finite(x)) arf_pos_inf(u);
    if (arf_cmp(u, c->upper) > 0) arf_set(c->upper, u);
    arf_clear(u);
}

/* h, a value at k, becomes the best proven value when its lower end is higher */
void _embz_an_offer(actx *c, const arb_t h, const fmpz_t k)
{
    arf_t lo, blo;
    arf_init(lo); arf_init(blo);
    arb_get_lbound_arf(lo, h, c->prec);
    arb_get_lbound_arf(blo, c->best, c->prec);
    if (arb_is_finite(h) && (!arb_is_finite(c->best) || arf_cmp(lo, blo) > 0)) {
        arb_set(c->best, h);
        fmpz_set(c->argk, k);
    }
    _embz_an_raise_upper(c, h);
    arf_clear(lo); arf_clear(blo);
}
