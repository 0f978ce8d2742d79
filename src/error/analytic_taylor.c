/* Taylor-model bounds: the upper bound of a polynomial model with an enclosed remainder
 * coefficient over an interval (with its monotonicity), and the model of h_r in s (k = d s + r)
 * built from the tail's Euler-Maclaurin series, which the branch and bound uses wherever the
 * models in v = ln y (analytic_vmodel.c) do not apply. */
#include <math.h>
#include "impl.h"

/* co <- (co - (r/d) v) / W: the last steps shared by every model coefficient of h_r */
void _embz_an_finish_coeff(arb_t co, const arb_t v, ulong r, const actx *c, slong prec)
{
    if (r != 0) {
        arb_t t;
        arb_init(t);
        arb_mul_ui(t, v, r, prec);
        arb_div_ui(t, t, c->d, prec);
        arb_sub(co, co, t, prec);
        arb_clear(t);
    }
    arb_div(co, co, c->W, prec);
}

/* Sharper bounds of the Taylor model below on P pieces of [-w, w] (Horner on each piece):
 * the absolute-value bound c0 + sum |c_j| w^j overstates a model with alternating terms
 * (such as e^-sigma, the shape of h near a maximum approached from below) by the whole
 * variation over the interval, the pieces by about |p'| w / P. The derivative model is
 * sum_j j c_j sigma^(j-1), j <= J (co[J], an enclosure of h^(J)/J! over the interval, also
 * covers the derivative's remainder by Taylor's theorem for h'). Lowers U; sets *mono when
 * the derivative keeps its sign on every piece. */
static void taylor_bound_pieces(arf_t U, int *mono, arb_srcptr co, slong J, const arb_t w,
                                const mag_struct *slack, const arb_struct *dslack, slong prec)
{
    slong P = (slong) ceil(8.0 * arf_get_d(arb_midref(w), ARF_RND_UP));
    P = FLINT_MAX(4, FLINT_MIN(P, 32));
    arb_t sg, acc, dacc, ds, lo, hi;
    arf_t Ub, u;
    arb_init(sg); arb_init(acc); arb_init(dacc); arb_init(ds); arb_init(lo); arb_init(hi);
    arf_init(Ub); arf_init(u);
    arf_neg_inf(Ub);
    if (dslack != NULL) arb_abs(ds, dslack);
    int pos = 1, neg = 1, ok = 1;
    for (slong k = 0; k < P && ok; k++) {
        /* sigma in [-w + 2wk/P, -w + 2w(k+1)/P] */
        arb_mul_si(lo, w, 2 * k - P, prec);
        arb_div_si(lo, lo, P, prec);
        arb_mul_si(hi, w, 2 * k + 2 - P, prec);
        arb_div_si(hi, hi, P, prec);
        arb_union(sg, lo, hi, prec);
        arb_set(acc, co + J);
        arb_mul_ui(dacc, co + J, (ulong) J, prec);
        for (slong j = J - 1; j >= 0; j--) {
            arb_mul(acc, acc, sg, prec);
            arb_add(acc, acc, co + j, prec);
            if (j >= 1) {
                arb_mul(dacc, dacc, sg, prec);
                arb_addmul_ui(dacc, co + j, (ulong) j, prec);
            }
        }
        if (slack != NULL) arb_add_error_mag(acc, slack);
        if (dslack != NULL) arb_add_error(dacc, ds);
        if (!arb_is_finite(acc)) { ok = 0; break; }
        arb_get_ubound_arf(u, acc, prec);
        if (arf_cmp(u, Ub) > 0) arf_set(Ub, u);
        if (!arb_is_positive(dacc)) pos = 0;
        if (!arb_is_negative(dacc)) neg = 0;
    }
    if (ok) {
        if (arf_cmp(Ub, U) < 0) arf_set(U, Ub);
        if (pos) *mono = 1;
        else if (neg) *mono = -1;
    }
    arb_clear(sg); arb_clear(acc); arb_clear(dacc); arb_clear(ds); arb_clear(lo); arb_clear(hi);
    arf_clear(Ub); arf_clear(u);
}

/* The Taylor model sum_{j <= J} co[j] sigma^j for |sigma| <= w (co[J] already an enclosure
 * over the whole interval), off by at most slack (may be NULL): sets U to an upper bound,
 * c0 + sum_j |c_j| w^j + slack, and *mono to +1 / -1 when the derivative,
 * c1 +- (sum_{j >= 2} j |c_j| w^(j-1) + |dslack|), keeps its sign (dslack, may be NULL, bounds
 * the derivative of a part left out of the model). When the model is monotone and ends (may
 * be NULL) gives the offsets sigma of the two ends of the interval, U is lowered to the
 * model's value at the maximising end plus slack. Returns EMBZ_ERR_PREC when the bound is
 * not finite. */
int _embz_an_taylor_bound(arf_t U, int *mono, arb_srcptr co, slong J, const arb_t w,
                          const mag_struct *slack, const arb_struct *dslack,
                          arb_srcptr ends, slong prec)
{
    arb_t acc, dacc, wp, t, u;
    arb_init(acc); arb_init(dacc); arb_init(wp); arb_init(t); arb_init(u);
    arb_set(acc, co);
    arb_one(wp);                           /* w^(j-1) */
    for (slong j = 1; j <= J; j++) {
        arb_abs(t, co + j);
        if (j >= 2) {
            arb_mul_ui(u, t, (ulong) j, prec);
            arb_addmul(dacc, u, wp, prec);
        }
        arb_mul(wp, wp, w, prec);          /* w^j */
        arb_addmul(acc, t, wp, prec);
    }
    if (slack != NULL) arb_add_error_mag(acc, slack);
    arb_get_ubound_arf(U, acc, prec);
    int st = arb_is_finite(acc) ? EMBZ_OK : EMBZ_ERR_PREC;
    *mono = 0;
    if (dslack != NULL) {
        arb_abs(u, dslack);
        arb_add(dacc, dacc, u, prec);
    }
    arb_sub(t, co + 1, dacc, prec);
    if (arb_is_positive(t)) *mono = 1;
    arb_add(t, co + 1, dacc, prec);
    if (arb_is_negative(t)) *mono = -1;
    if (*mono == 0 && st == EMBZ_OK) taylor_bound_pieces(U, mono, co, J, w, slack, dslack, prec);
    if (*mono != 0 && ends != NULL && st == EMBZ_OK) {
        /* the model at the maximising end (Horner; co[J] covers the Lagrange remainder) */
        arb_srcptr e = ends + (*mono > 0 ? 1 : 0);
        arb_set(acc, co + J);
        for (slong j = J - 1; j >= 0; j--) {
            arb_mul(acc, acc, e, prec);
            arb_add(acc, acc, co + j, prec);
        }
        if (slack != NULL) arb_add_error_mag(acc, slack);
        arf_t Ue;
        arf_init(Ue);
        arb_get_ubound_arf(Ue, acc, prec);
        if (arb_is_finite(acc) && arf_cmp(Ue, U) < 0) arf_set(U, Ue);
        arf_clear(Ue);
    }
    arb_clear(acc); arb_clear(dacc); arb_clear(wp); arb_clear(t); arb_clear(u);
    return st;
}

/* Upper bound of h_r over the integers s in [lo, hi] from a Taylor model of order J at the
 * centre (Lagrange remainder: the J-th coefficient enclosed over the whole interval).
 * *mono is set to +1 (-1) when the model proves h_r increasing (decreasing) on the interval;
 * the maximum over its integers is then at hi (lo) and U is not needed. */
int _embz_an_model_bound(arf_t U, int *mono, actx *c, ulong r, const fmpz_t lo,
                         const fmpz_t hi, slong prec)
{
    /* order: enough that (w/s)^J falls below 1/s, the relative size of the differences that
     * decide the maximum on nearly flat stretches; at least TAYLOR_LEN */
    slong J = TAYLOR_LEN;
    {
        /* rho = half width / centre: the terms of the model fall roughly like rho^j */
        double ls = fmpz_bits(hi), dlo = fmpz_get_d(lo), dhi = fmpz_get_d(hi);
        double rho = (dhi - dlo) / (dhi + dlo);
        if (rho > 0.9) J = TAYLOR_MAX;
        else if (rho > 0) J = FLINT_MIN(FLINT_MAX(J, (slong) ceil((ls + 4) / -log2(rho)) + 1),
                                        TAYLOR_MAX);
    }
    arb_t sc, w, y1, y2, y3, dd, one;
    arb_ptr A1 = _arb_vec_init(J + 1), A2 = _arb_vec_init(J + 1), A3 = _arb_vec_init(J + 1);
    arb_ptr co = _arb_vec_init(J + 1);
    arb_init(sc); arb_init(w); arb_init(y1); arb_init(y2); arb_init(y3);
    arb_init(dd); arb_init(one);
    arb_one(one);
    arb_set_ui(dd, c->d);
    int st = EMBZ_OK;
    *mono = 0;

    /* centre and half width, and below the positions, exactly (with the bits of hi: a
     * non-decreasing tail maps positions near n to x = n - y near M) */
    slong pp = FLINT_MAX(prec, (slong) fmpz_bits(hi) + 16);
    arb_set_fmpz(sc, lo);
    arb_add_fmpz(sc, sc, hi, pp);
    arb_mul_2exp_si(sc, sc, -1);
    arb_set_fmpz(w, hi);
    arb_sub_fmpz(w, w, lo, prec);
    arb_mul_2exp_si(w, w, -1);

    /* one Euler-Maclaurin level per sum for the whole model: the one valid on the interval */
    slong lev1 = 0, lev2 = 0;
    for (int pass = 1; pass >= 0 && st == EMBZ_OK; pass--) {
        /* pass 1: enclosures over the interval; pass 0: coefficients at the centre */
        arb_t s;
        arb_init(s);
        arb_set(s, sc);
        if (pass == 1) arb_add_error(s, w);
        slong len = (pass == 0) ? J : J + 1;
        /* y1 = d s + r - a (position of k), y2 = s - a (of s), y3 = s + 1 - a (of s + 1) */
        arb_mul_ui(y1, s, c->d, pp);
        arb_add_ui(y1, y1, r, pp);
        arb_sub_si(y1, y1, c->off_k, pp);
        arb_sub_si(y2, s, c->off_s, pp);
        arb_add_ui(y3, y2, 1, pp);
        /* the remainder coefficient is only needed to a few bits */
        slong sp = (pass == 0) ? prec : FLINT_MIN(prec, 64 + (slong) fmpz_bits(hi));
        if (pass == 1) {
            lev1 = _embz_an_tail_level(c, y1, prec);
            lev2 = _embz_an_tail_level(c, y2, prec);
        }
        st = _embz_an_tail_C_series(A1, c, y1, dd, len, lev1, sp);
        if (st == EMBZ_OK) st = _embz_an_tail_C_series(A2, c, y2, one, len, lev2, sp);
        if (st == EMBZ_OK && r != 0) st = _embz_an_tail_v_series(A3, c, y3, len, sp);
        if (st == EMBZ_OK && pass == 0) {
            st = _embz_an_tail_C(A1, c, y1, lev1, prec);
            if (st == EMBZ_OK) st = _embz_an_tail_C(A2, c, y2, lev2, prec);
        }
        arb_clear(s);
        if (st != EMBZ_OK) break;
        for (slong j = (pass == 0 ? 0 : J); j < len; j++) {
            arb_sub(co + j, A1 + j, A2 + j, prec);
            if (j == 0) arb_add(co, co, c->dH, prec);
            _embz_an_finish_coeff(co + j, A3 + j, r, c, prec);
        }
    }
    if (st == EMBZ_OK) {
        arb_ptr ends = _arb_vec_init(2);
        arb_neg(ends, w);
        arb_set(ends + 1, w);
        st = _embz_an_taylor_bound(U, mono, co, J, w, NULL, NULL, ends, prec);
        _arb_vec_clear(ends, 2);
    }
    _arb_vec_clear(A1, J + 1); _arb_vec_clear(A2, J + 1); _arb_vec_clear(A3, J + 1);
    _arb_vec_clear(co, J + 1);
    arb_clear(sc); arb_clear(w); arb_clear(y1); arb_clear(y2); arb_clear(y3);
    arb_clear(dd); arb_clear(one);
    c->evals++;
    return st;
}
