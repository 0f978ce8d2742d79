/* What the split w(e^u) = core(u) e^(rate u) of a weight gives (t->usplit): the functions P_k
 * with x^k f^(k)(x) = e^(rate u) P_k(u), the Taylor series of ln f in u = ln x, and the root
 * of f(x) = v in ln x by Newton's method (see src/sum/sum.h). */
#include "sum/impl.h"

/* Taylor coefficients 0..len-1 of sigma -> core(u + sigma) at a (point or wide) ball u */
static int core_series(arb_ptr d, embz_tail_t t, const arb_t u, slong len, slong prec)
{
    arb_ptr us = _arb_vec_init(len);
    arb_set(us, u);
    if (len > 1) arb_one(us + 1);
    int st = embz_expr_eval_series(d, t->core, us, t->n, len, prec);
    t->evals++;
    if (st == EMBZ_OK && !_arb_vec_is_finite(d, len)) st = EMBZ_ERR_DOMAIN;
    _arb_vec_clear(us, len);
    return st;
}

/* P_k over a ball U of u = ln x, k = 0..K, where x^k f^(k)(x) = e^(rate u) P_k(u):
 * P_0 = core, P_(k+1) = (D + rate - k) P_k (D = d/du). Needs t->usplit. */
int embz_tail_pk(arb_ptr P, embz_tail_t t, const arb_t U, slong K, slong prec)
{
    if (!t->usplit) return EMBZ_ERR_UNSUPPORTED;
    slong len = K + 1;
    arb_ptr d = _arb_vec_init(len);
    arb_t c, e1;
    arb_init(c); arb_init(e1);
    int st = core_series(d, t, U, len, prec);
    if (st == EMBZ_OK) {
        /* d[i] = core^(i)(U); then P[k] = P_k(U) by applying (D + r - m), m = 0 .. K-1 */
        for (slong i = 1; i < len; i++) {
            arb_fac_ui(c, (ulong) i, prec);
            arb_mul(d + i, d + i, c, prec);
        }
        arb_set(P, d);
        for (slong m = 0; m < K; m++) {
            arb_sub_si(c, t->rate, m, prec);
            for (slong i = 0; i + m + 1 < len; i++) {
                arb_mul(e1, c, d + i, prec);
                arb_add(d + i, d + i + 1, e1, prec);
            }
            arb_set(P + m + 1, d);
        }
    }
    _arb_vec_clear(d, len);
    arb_clear(c); arb_clear(e1);
    return st;
}

/* Taylor coefficients 0..len-1 of sigma -> ln f(e^(s + sigma)) = ln core(s + sigma)
 * + rate (s + sigma), s a (point or wide) ball. Needs t->usplit. */
int embz_tail_logweight_series(arb_ptr res, embz_tail_t t, const arb_t s, slong len,
                               slong prec)
{
    if (!t->usplit) return EMBZ_ERR_UNSUPPORTED;
    arb_ptr d = _arb_vec_init(len);
    int st = core_series(d, t, s, len, prec);
    if (st == EMBZ_OK && !arb_is_positive(d)) st = EMBZ_ERR_DOMAIN;
    if (st == EMBZ_OK) {
        _arb_poly_log_series(res, d, len, len, prec);
        arb_addmul(res, t->rate, s, prec);
        if (len > 1) arb_add(res + 1, res + 1, t->rate, prec);
    }
    _arb_vec_clear(d, len);
    return st;
}

/* s = ln x with f(x) = e^lnv approximately (an exact ball, not verified): Newton on
 * L(s) = ln f(e^s) from the middle of [slo, shi], clamped to it. EMBZ_ERR_PREC when it does
 * not settle to 2^-(prec - 8) max(1, |s|). Needs t->usplit. */
int embz_tail_log_root(arb_t s, embz_tail_t t, const arb_t lnv, const arb_t slo,
                       const arb_t shi, slong prec)
{
    arb_t step;
    arb_ptr g = _arb_vec_init(2);
    arb_init(step);
    int st = EMBZ_ERR_PREC;
    arb_add(s, slo, shi, prec);
    arb_mul_2exp_si(s, s, -1);
    arb_set_arf(s, arb_midref(s));
    for (int it = 0; it < 60; it++) {
        if (embz_tail_logweight_series(g, t, s, 2, prec) != EMBZ_OK) break;
        arb_sub(step, g, lnv, prec);
        arb_div(step, step, g + 1, prec);
        if (!arb_is_finite(step)) break;
        arb_sub(s, s, step, prec);
        arb_set_arf(s, arb_midref(s));
        if (arf_cmp(arb_midref(s), arb_midref(slo)) < 0) arb_set_arf(s, arb_midref(slo));
        if (arf_cmp(arb_midref(s), arb_midref(shi)) > 0) arb_set_arf(s, arb_midref(shi));
        if (arf_cmpabs_2exp_si(arb_midref(step), -prec + 8 + FLINT_MAX(0,
                arf_abs_bound_lt_2exp_si(arb_midref(s)))) < 0) { st = EMBZ_OK; break; }
    }
    _arb_vec_clear(g, 2);
    arb_clear(step);
    return st;
}
