/* The smooth extension T~ of a tail sum and its Taylor series: the Euler–Maclaurin boundary
 * terms at a level, T~(x) with the remainder bound, the sum of the last weights below a top
 * index, and the Taylor coefficients of T~ (see src/sum/sum.h). */
#include "sum/impl.h"

int embz_tail_sum(arb_t res, embz_tail_t t, const arb_t x, slong prec)
{
    return embz_tail_sum_level(res, t, x, EMBZ_TAIL_LEVEL_AUTO, prec);
}

/* the part of T~ at level lev (valid at x) besides the integral: em_(lev_p)(x) + lev_base */
static int tail_ends(arb_t res, embz_tail_t t, const arb_t x, slong lev, slong prec)
{
    slong q = t->lev_p[lev], len = 2 * q + 1;
    arb_ptr g = _arb_vec_init(len);
    int st = _embz_tail_weight_taylor(g, t, x, len, prec);
    if (st == EMBZ_OK) {
        _embz_tail_em_terms(res, t, g, q, prec);
        arb_add(res, res, t->lev_base + lev, prec);
    }
    _arb_vec_clear(g, len);
    return st;
}

int embz_tail_sum_level(arb_t res, embz_tail_t t, const arb_t x, slong lev, slong prec)
{
    if (lev == EMBZ_TAIL_LEVEL_AUTO) lev = embz_tail_level(t, x);
    if (lev < 0 || lev >= t->nlev) return EMBZ_ERR_PREC;
    arb_t I, e;
    arb_init(I); arb_init(e);
    int st = tail_ends(e, t, x, lev, prec);
    if (st == EMBZ_OK) st = embz_tail_integral(I, t, x, prec);
    if (st == EMBZ_OK) {
        arb_add(res, I, e, prec);
        arb_add_error_mag(res, t->rem);
    }
    arb_clear(I); arb_clear(e);
    return st;
}

/* integrand f(top - tau) for embz_tail_sum_top */
typedef struct { embz_tail_struct *t; const arb_struct *top; } top_param;

static int top_acb(acb_ptr out, const acb_t tau, void *param, slong order, slong prec)
{
    top_param *tp = param;
    acb_t x, nn;
    acb_init(x); acb_init(nn);
    acb_set_arb(nn, tp->t->n);
    acb_set_arb(x, tp->top);
    acb_sub(x, x, tau, prec);
    if (embz_expr_eval_acb(out, tp->t->w, x, nn, order != 0, prec) != EMBZ_OK)
        acb_indeterminate(out);
    acb_clear(x); acb_clear(nn);
    return 0;
}

int embz_tail_sum_top(arb_t res, embz_tail_t t, const arb_t y, const arb_t top, slong lev,
                      slong prec)
{
    arb_t I, e, ym, x;
    arb_init(I); arb_init(e); arb_init(ym); arb_init(x);
    /* with the bits of top: x ~ M stays exact however large top is */
    arb_sub(x, top, y, FLINT_MAX(prec, arf_abs_bound_lt_2exp_si(arb_midref(top)) + 16));
    if (lev == EMBZ_TAIL_LEVEL_AUTO) lev = embz_tail_level(t, x);
    slong ltop = embz_tail_level(t, top);
    int st = EMBZ_OK;
    arb_mul_2exp_si(e, y, 1);
    if (lev < 0 || lev >= t->nlev || ltop < 0) {
        st = EMBZ_ERR_PREC;
    } else if (!arb_lt(e, top)) {
        /* y >= top / 2 (or not known to be below): T~(top) - T~(x), the difference of
         * integrals from M losing at most a constant factor */
        st = embz_tail_sum_level(I, t, top, ltop, prec);
        if (st == EMBZ_OK) st = embz_tail_sum_level(e, t, x, lev, prec);
        arb_sub(res, I, e, prec);
    } else {
        /* y < top / 2: the integral of f(top - tau) over [0, ym] at the midpoint ym of y,
         * plus f over the ball times its radius, and the end terms at top and x */
        acb_t a, b, r;
        mag_t tol;
        acb_calc_integrate_opt_t opt;
        top_param tp = { t, top };
        acb_init(a); acb_init(b); acb_init(r);
        mag_init(tol);
        acb_calc_integrate_opt_init(opt);
        arb_set_arf(ym, arb_midref(y));
        acb_set_arb(b, ym);
        mag_set_ui_2exp_si(tol, 1, -prec);
        st = acb_calc_integrate(r, top_acb, &tp, a, b, prec, tol, opt, prec + 10);
        t->integrals++;
        arb_set(I, acb_realref(r));
        st = (st == ARB_CALC_SUCCESS && arb_is_finite(I)) ? EMBZ_OK : EMBZ_ERR_PREC;
        if (st == EMBZ_OK && !mag_is_zero(arb_radref(y))) {
            st = _embz_tail_weight_taylor(e, t, x, 1, prec);
            mag_t m;
            mag_init(m);
            arb_get_mag(m, e);
            mag_mul(m, m, arb_radref(y));
            arb_add_error_mag(I, m);
            mag_clear(m);
        }
        acb_clear(a); acb_clear(b); acb_clear(r);
        mag_clear(tol);
        if (st == EMBZ_OK) st = tail_ends(e, t, top, ltop, prec);
        arb_add(I, I, e, prec);
        if (st == EMBZ_OK) st = tail_ends(e, t, x, lev, prec);
        arb_sub(res, I, e, prec);
        /* the remainders of both ends */
        arb_add_error_mag(res, t->rem);
        arb_add_error_mag(res, t->rem);
    }
    arb_clear(I); arb_clear(e); arb_clear(ym); arb_clear(x);
    return st;
}

int embz_tail_series(arb_ptr res, embz_tail_t t, const arb_t x, const arb_t scale,
                     slong len, slong prec)
{
    return embz_tail_series_level(res, t, x, scale, len, EMBZ_TAIL_LEVEL_AUTO, prec);
}

int embz_tail_series_level(arb_ptr res, embz_tail_t t, const arb_t x, const arb_t scale,
                           slong len, slong lev, slong prec)
{
    if (lev == EMBZ_TAIL_LEVEL_AUTO) lev = embz_tail_level(t, x);
    if (lev < 0 || lev >= t->nlev) return EMBZ_ERR_PREC;
    slong q = t->lev_p[lev];
    slong L = len + 2 * q + 1;
    arb_ptr g = _arb_vec_init(L);
    arb_t d, c, sp;
    fmpz_t rf;
    arb_init(d); arb_init(c); arb_init(sp);
    fmpz_init(rf);
    int st = _embz_tail_weight_taylor(g, t, x, L, prec);
    if (st == EMBZ_OK) {
        arb_zero(res);
        arb_set(sp, scale);
        for (slong l = 0; l + 1 < len; l++) {
            /* D(y) = f + f'/2 + sum_j bern_j f^(2j): Taylor coefficient l of D at x */
            arb_set(d, g + l);
            arb_mul_ui(c, g + l + 1, l + 1, prec);
            arb_mul_2exp_si(c, c, -1);
            arb_add(d, d, c, prec);
            for (slong j = 1; j <= q; j++) {
                fmpz_rfac_uiui(rf, l + 1, 2 * j);
                arb_mul_fmpz(c, g + l + 2 * j, rf, prec);
                arb_addmul(d, c, t->bern + j - 1, prec);
            }
            arb_div_ui(d, d, l + 1, prec);
            arb_mul(res + l + 1, d, sp, prec);
            arb_mul(sp, sp, scale, prec);
        }
    }
    _arb_vec_clear(g, L);
    arb_clear(d); arb_clear(c); arb_clear(sp);
    fmpz_clear(rf);
    return st;
}
