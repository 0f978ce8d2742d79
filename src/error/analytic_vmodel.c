/* Models of h_r in v = ln y for long stretches of s far out (non-increasing tails, s beyond
 * 2^VMODEL_FROM_BITS): the parts of W h_r composed as series in v, the full model for
 * moderate widths and a coarser one (a model of the O(1) part, enclosures of the rest) for
 * wide stretches. */
#include <math.h>
#include "impl.h"

/* With P = M - a, y = s + (r + P)/d and v = ln y, the positions are x1 = d y (of k = d s + r),
 * x2 = y + delta (of s; delta = (P (d-1) - r)/d) and x3 = x2 + 1 (of s + 1), and
 *   W h_r = G(v) - S(v) + em(x1) - em(x2) - (r/d) f(x3),
 *   G(v) = integral_v^(v + ln d) phi,  S(v) = integral_v^(v + lambda(v)) phi,
 *   lambda = ln(1 + delta e^-v),  em(x) = f(x)/2 + sum_j B_2j/(2j)! f^(2j-1)(x),
 * phi(u) = f(e^u) e^u taken from the symbolically simplified expression. The part G is O(1)
 * but only as variable as phi (constant for f = 1/i: no cancellation left to the balls); the
 * other parts are O(1/y). This lets long stretches of s be settled at once. */

/* res(tau) = P(A (e^tau - 1)) for P = sum_l p_l y^l (len terms; p is overwritten), using
 * (e^tau - 1)^l = l! sum_m S(m, l) tau^m / m!   (S: Stirling numbers of the second kind):
 *     res_m = (1/m!) sum_(l <= m) S(m, l) l! A^l p_l */
void _embz_an_compose_exp(arb_ptr res, arb_ptr p, slong len, const arb_t A, slong prec)
{
    fmpz *row = _fmpz_vec_init(len);
    arb_t u;
    arb_init(u);
    arb_one(u);
    for (slong l = 0; l < len; l++) {
        arb_mul(p + l, p + l, u, prec);                  /* l! A^l p_l */
        arb_mul(u, u, A, prec);
        arb_mul_ui(u, u, (ulong) l + 1, prec);
    }
    arb_one(u);
    for (slong m = 0; m < len; m++) {
        arith_stirling_number_2_vec(row, (ulong) m, m + 1);
        arb_zero(res + m);
        for (slong l = 0; l <= m; l++)
            if (!fmpz_is_zero(row + l)) arb_addmul_fmpz(res + m, p + l, row + l, prec);
        if (m > 0) arb_div_ui(u, u, (ulong) m, prec);    /* 1/m! */
        arb_mul(res + m, res + m, u, prec);
    }
    _fmpz_vec_clear(row, len);
    arb_clear(u);
}

/* The same series through w(e^u) = core(u) e^(r u) (embz_expr_log_split): with
 * x = A e^(v + tau) + B = e^Y, Y = ln A + v + tau + ln(1 + (B/A) e^(-v - tau)),
 *     f^(k)(x) = e^((r - k) Y) P_k(Y),   P_k = (D + r)(D + r - 1) ... (D + r - k + 1) core,
 * D = d/dY, as series in sigma = Y - Y(0), composed with sigma(tau) at the end. Over a wide
 * ball of v this keeps the structure of f (e^-v for f = 1/x is one exponential), where the
 * Taylor expansion in x composed with x(tau) multiplies wide balls of x and loses all
 * accuracy in the high coefficients (1e-3 instead of 1e-11 for the remainder coefficient of
 * the inverse family at s ~ 2^20). q < 0: f(x) itself, else em_q(x). Returns EMBZ_ERR_DOMAIN
 * when the core has no finite series there (the caller then expands in x). */
static int em_split(arb_ptr res, actx *c, const arb_t v, const arb_t A, const arb_t B,
                    slong len, slong q, slong prec)
{
    embz_tail_struct *t = c->t;
    slong kmax = q <= 0 ? 0 : 2 * q - 1, L = len + kmax;
    arb_ptr a = _arb_vec_init(L), ys = _arb_vec_init(L), e = _arb_vec_init(len);
    arb_ptr lam = _arb_vec_init(len), ex = _arb_vec_init(len), tk = _arb_vec_init(len);
    arb_ptr acc = _arb_vec_init(len);
    arb_t Y0, rho, rk, u;
    arb_init(Y0); arb_init(rho); arb_init(rk); arb_init(u);
    int shifted = !arb_is_zero(B);
    /* Y(0) and lambda(tau) = ln(1 + rho e^-tau), rho = (B/A) e^-v */
    arb_log(Y0, A, prec);
    arb_add(Y0, Y0, v, prec);
    if (shifted) {
        arb_neg(rho, v);
        arb_exp(rho, rho, prec);
        arb_mul(rho, rho, B, prec);
        arb_div(rho, rho, A, prec);
        arb_set(u, rho);
        for (slong k = 0; k < len; k++) {
            arb_set(e + k, u);
            arb_div_si(u, u, -(slong) (k + 1), prec);
        }
        _arb_poly_log1p_series(lam, e, len, len, prec);
        arb_add(Y0, Y0, lam, prec);
    }
    arb_set(ys, Y0);
    arb_one(ys + 1);
    int st = embz_expr_eval_series(a, t->core, ys, t->n, L, prec);
    t->evals++;
    if (st == EMBZ_OK && !_arb_vec_is_finite(a, L)) st = EMBZ_ERR_DOMAIN;
    if (st == EMBZ_OK) {
        _arb_vec_zero(acc, len);
        /* a holds the Taylor coefficients of P_k about Y0 (length L - k) */
        for (slong k = 0; k <= kmax; k++) {
            if (k == 0 || (k & 1)) {
                /* e^((r - k) Y) = e^((r - k) Y0) e^((r - k) sigma) */
                arb_sub_si(rk, t->rate, k, prec);
                arb_mul(u, rk, Y0, prec);
                arb_exp(u, u, prec);
                for (slong l = 0; l < len; l++) {
                    arb_set(ex + l, u);
                    arb_mul(u, u, rk, prec);
                    arb_div_ui(u, u, (ulong) l + 1, prec);
                }
                _arb_poly_mullow(tk, a, len, ex, len, len, prec);
                if (q < 0) _arb_vec_set(acc, tk, len);
                else if (k == 0) _arb_vec_scalar_mul_2exp_si(acc, tk, len, -1);
                else _arb_vec_scalar_addmul(acc, tk, len, t->bern + (k + 1) / 2 - 1, prec);
            }
            if (k == kmax) break;
            /* a <- (D + r - k) a on Taylor coefficients: (D a)_l = (l + 1) a_(l+1) */
            arb_sub_si(rk, t->rate, k, prec);
            for (slong l = 0; l + 1 < L - k; l++) {
                arb_mul(u, a + l, rk, prec);
                arb_mul_ui(a + l, a + l + 1, (ulong) l + 1, prec);
                arb_add(a + l, a + l, u, prec);
            }
        }
        if (shifted) {
            /* sigma(tau) = tau + lambda(tau) - lambda(0) */
            arb_zero(lam);
            if (len > 1) arb_add_ui(lam + 1, lam + 1, 1, prec);
            _arb_poly_compose_series(res, acc, len, lam, len, len, prec);
        } else {
            _arb_vec_set(res, acc, len);
        }
        if (!_arb_vec_is_finite(res, len)) st = EMBZ_ERR_DOMAIN;
    }
    _arb_vec_clear(a, L); _arb_vec_clear(ys, L); _arb_vec_clear(e, len);
    _arb_vec_clear(lam, len); _arb_vec_clear(ex, len); _arb_vec_clear(tk, len);
    _arb_vec_clear(acc, len);
    arb_clear(Y0); arb_clear(rho); arb_clear(rk); arb_clear(u);
    return st;
}

/* em(x(tau)) with x(tau) = scale e^(v + tau) + shift, as a series in tau, with the order of
 * Euler-Maclaurin level lev */
static int em_composed(arb_ptr res, actx *c, const arb_t v, const arb_t scale,
                       const arb_t shift, slong len, slong lev, slong prec)
{
    embz_tail_struct *t = c->t;
    if (lev < 0) return EMBZ_ERR_PREC;
    if (t->usplit && em_split(res, c, v, scale, shift, len, t->lev_p[lev], prec) == EMBZ_OK)
        return EMBZ_OK;
    slong q = t->lev_p[lev];
    slong L = len + 2 * q;
    arb_ptr g = _arb_vec_init(L), em = _arb_vec_init(len), ts = _arb_vec_init(len);
    arb_t xc, ev, one, u;
    fmpz_t rf;
    arb_init(xc); arb_init(ev); arb_init(one); arb_init(u);
    fmpz_init(rf);
    arb_one(one);
    arb_exp(ev, v, prec);
    arb_mul(ev, ev, scale, prec);
    arb_add(xc, ev, shift, prec);
    int st = embz_tail_weight_series(g, t, xc, one, L, prec);
    if (st == EMBZ_OK) {
        for (slong l = 0; l < len; l++) {
            arb_mul_2exp_si(em + l, g + l, -1);
            for (slong j = 1; j <= q; j++) {
                fmpz_rfac_uiui(rf, l + 1, 2 * j - 1);
                arb_mul_fmpz(u, g + l + 2 * j - 1, rf, prec);
                arb_addmul(em + l, u, t->bern + j - 1, prec);
            }
        }
        /* compose with x(tau) - x(0) = A (e^tau - 1), A = scale e^v */
        _embz_an_compose_exp(res, em, len, ev, prec);
    }
    _arb_vec_clear(g, L); _arb_vec_clear(em, len); _arb_vec_clear(ts, len);
    arb_clear(xc); arb_clear(ev); arb_clear(one); arb_clear(u);
    fmpz_clear(rf);
    return st;
}

/* f(e^(v + tau) + shift) as a series in tau */
static int f_composed(arb_ptr res, actx *c, const arb_t v, const arb_t shift, slong len,
                      slong prec)
{
    if (c->t->usplit) {
        arb_t one;
        arb_init(one);
        arb_one(one);
        int st = em_split(res, c, v, one, shift, len, -1, prec);
        arb_clear(one);
        if (st == EMBZ_OK) return st;
    }
    arb_ptr xs = _arb_vec_init(len);
    arb_t u;
    arb_init(u);
    arb_exp(u, v, prec);
    for (slong k = 0; k < len; k++) {
        arb_set(xs + k, u);
        arb_div_ui(u, u, (ulong) (k + 1), prec);
    }
    arb_add(xs, xs, shift, prec);
    int st = embz_expr_eval_series(res, c->t->w, xs, c->t->n, len, prec);
    c->t->evals++;
    if (st == EMBZ_OK && !_arb_vec_is_finite(res, len)) st = EMBZ_ERR_DOMAIN;
    _arb_vec_clear(xs, len);
    arb_clear(u);
    return st;
}

/* S(v + tau) = sum_{m=1}^{K} phi^(m-1)(v + tau) lambda(v + tau)^m / m!  (series in tau) */
static int short_integral(arb_ptr res, actx *c, const arb_t v, const arb_t delta, slong len,
                          slong K, slong prec)
{
    arb_ptr ph = _arb_vec_init(len + K), lam = _arb_vec_init(len), e = _arb_vec_init(len);
    arb_ptr lp = _arb_vec_init(len), dm = _arb_vec_init(len), tmp = _arb_vec_init(len);
    arb_t u;
    fmpz_t rf;
    arb_init(u);
    fmpz_init(rf);
    _arb_vec_zero(res, len);
    int st = embz_tail_phi_series(ph, c->t, v, len + K, prec);
    if (st == EMBZ_OK) {
        /* lambda = log1p(delta e^(-v - tau)) */
        arb_neg(u, v);
        arb_exp(u, u, prec);
        arb_mul(u, u, delta, prec);
        for (slong k = 0; k < len; k++) {
            arb_set(e + k, u);
            arb_div_si(u, u, -(slong) (k + 1), prec);
        }
        _arb_poly_log1p_series(lam, e, len, len, prec);
        _arb_vec_set(lp, lam, len);               /* lambda^m */
        for (slong m = 1; m <= K; m++) {
            /* phi^(m-1)(v + tau): coefficient l is ph[l + m - 1] (l + m - 1)!/l! */
            for (slong l = 0; l < len; l++) {
                fmpz_rfac_uiui(rf, l + 1, m - 1);
                arb_mul_fmpz(dm + l, ph + l + m - 1, rf, prec);
            }
            _arb_poly_mullow(tmp, dm, len, lp, len, len, prec);
            arb_fac_ui(u, m, prec);
            _arb_vec_scalar_div(tmp, tmp, len, u, prec);
            _arb_vec_add(res, res, tmp, len, prec);
            _arb_poly_mullow(tmp, lp, len, lam, len, len, prec);
            _arb_vec_set(lp, tmp, len);
        }
    }
    _arb_vec_clear(ph, len + K); _arb_vec_clear(lam, len); _arb_vec_clear(e, len);
    _arb_vec_clear(lp, len); _arb_vec_clear(dm, len); _arb_vec_clear(tmp, len);
    arb_clear(u);
    fmpz_clear(rf);
    return st;
}

/* The series of W h_r in tau at v (len coefficients; coefficient 0 only when point != 0). */
static int vmodel_series(arb_ptr co, actx *c, ulong r, const arb_t v, const arb_t delta,
                         slong len, int point, const slong *lev, slong K, slong prec)
{
    arb_ptr G = _arb_vec_init(len), S = _arb_vec_init(len), E1 = _arb_vec_init(len);
    arb_ptr E2 = _arb_vec_init(len), F3 = _arb_vec_init(len);
    arb_ptr p0 = _arb_vec_init(len), p1 = _arb_vec_init(len);
    arb_t ld, v1, dd, zero, sh, y;
    arb_init(ld); arb_init(v1); arb_init(dd); arb_init(zero); arb_init(sh); arb_init(y);
    arb_log_ui(ld, c->d, prec);
    arb_add(v1, v, ld, prec);
    arb_set_ui(dd, c->d);
    int st = embz_tail_phi_series(p0, c->t, v, len, prec);
    if (st == EMBZ_OK) st = embz_tail_phi_series(p1, c->t, v1, len, prec);
    if (st == EMBZ_OK) {
        for (slong j = 1; j < len; j++) {
            arb_sub(G + j, p1 + j - 1, p0 + j - 1, prec);
            arb_div_ui(G + j, G + j, (ulong) j, prec);
        }
        if (point) {
            /* G(v) = integral of phi over [v, v + ln d] */
            st = embz_tail_integral_u(G, c->t, v, v1, prec);
        }
    }
    /* the other parts are O(e^-v): they need fewer bits for the same absolute accuracy */
    slong lp = prec;
    {
        double vm = arf_get_d(arb_midref(v), ARF_RND_DOWN);
        if (vm > 0) lp = FLINT_MAX(64, prec - (slong) (vm / 0.6931471805599453) + 8);
    }
    if (st == EMBZ_OK && !arb_is_zero(delta)) st = short_integral(S, c, v, delta, len, K, lp);
    if (st == EMBZ_OK) st = em_composed(E1, c, v, dd, zero, len, lev[0], lp);
    arb_one(y);
    if (st == EMBZ_OK) st = em_composed(E2, c, v, y, delta, len, lev[1], lp);
    arb_add_ui(sh, delta, 1, prec);
    if (st == EMBZ_OK && r != 0) st = f_composed(F3, c, v, sh, len, lp);
    if (st == EMBZ_OK) {
        for (slong j = point ? 0 : 1; j < len; j++) {
            arb_sub(co + j, G + j, S + j, prec);
            arb_add(co + j, co + j, E1 + j, prec);
            arb_sub(co + j, co + j, E2 + j, prec);
            _embz_an_finish_coeff(co + j, F3 + j, r, c, prec);
        }
    }
    _arb_vec_clear(G, len); _arb_vec_clear(S, len); _arb_vec_clear(E1, len);
    _arb_vec_clear(E2, len); _arb_vec_clear(F3, len);
    _arb_vec_clear(p0, len); _arb_vec_clear(p1, len);
    arb_clear(ld); arb_clear(v1); arb_clear(dd); arb_clear(zero); arb_clear(sh); arb_clear(y);
    return st;
}

/* The small parts of W h_r over the ball vball of v, for the wide bound below: adds to rest
 * an enclosure of |em(x1)| + |em(x2)| + (r/d) |f(x3)| + |S| there, and to drest one of the
 * size of their derivative in v (indeterminate when it has none). */
static int wide_small_parts(arb_t rest, arb_t drest, actx *c, ulong r, const arb_t vball,
                            const arb_t delta, const slong *lev, slong sp)
{
    embz_tail_struct *t = c->t;
    slong L = 2 * FLINT_MAX(t->lev_p[lev[0]], t->lev_p[lev[1]]) + 1;
    arb_ptr g = _arb_vec_init(L);
    arb_t y, a1, tmp, x, one, lam;
    arb_init(y); arb_init(a1); arb_init(tmp); arb_init(x); arb_init(one); arb_init(lam);
    arb_one(one);
    int st = EMBZ_OK;
    for (int part = 0; st == EMBZ_OK && part < 3; part++) {
        /* part 0: em(x1), x1 = d e^v; part 1: em(x2), x2 = e^v + delta; part 2: f(x3) */
        arb_exp(x, vball, sp);
        if (part == 0) arb_mul_ui(x, x, c->d, sp);
        else arb_add(x, x, delta, sp);
        if (part == 2) {
            if (r == 0) break;
            arb_add_ui(x, x, 1, sp);
        }
        slong q = (part == 2) ? 0 : t->lev_p[lev[part]];
        st = embz_tail_weight_series(g, t, x, one, part == 2 ? 2 : 2 * q + 1, sp);
        if (st != EMBZ_OK) break;
        /* dx/dv: x1 for part 0, e^v for parts 1 and 2 */
        if (part == 0) arb_set(y, x);
        else arb_exp(y, vball, sp);
        arb_abs(y, y);
        if (part == 2) {
            arb_abs(tmp, g);
            arb_mul_ui(tmp, tmp, r, sp);
            arb_div_ui(tmp, tmp, c->d, sp);
            arb_add(rest, rest, tmp, sp);
            arb_abs(tmp, g + 1);
            arb_mul(tmp, tmp, y, sp);
            arb_mul_ui(tmp, tmp, r, sp);
            arb_div_ui(tmp, tmp, c->d, sp);
            arb_add(drest, drest, tmp, sp);
        } else {
            /* |d/dv em(x)| <= |dx/dv| (|f'|/2 + sum |B_2j/(2j)!| |f^(2j)|) */
            arb_abs(tmp, g + 1);
            arb_mul_2exp_si(tmp, tmp, -1);
            for (slong j = 1; j <= q; j++) {
                arb_fac_ui(a1, 2 * j, sp);
                arb_mul(a1, a1, g + 2 * j, sp);
                arb_mul(a1, a1, t->bern + j - 1, sp);
                arb_abs(a1, a1);
                arb_add(tmp, tmp, a1, sp);
            }
            arb_mul(tmp, tmp, y, sp);
            arb_add(drest, drest, tmp, sp);
            arb_abs(tmp, g);
            arb_mul_2exp_si(tmp, tmp, -1);
            arb_add(rest, rest, tmp, sp);
            for (slong j = 1; j <= q; j++) {
                arb_fac_ui(a1, 2 * j - 1, sp);
                arb_mul(a1, a1, g + 2 * j - 1, sp);
                arb_mul(a1, a1, t->bern + j - 1, sp);
                arb_abs(a1, a1);
                arb_add(rest, rest, a1, sp);
            }
        }
    }
    if (st == EMBZ_OK && !arb_is_zero(delta)) {
        /* |S| <= |lambda| sup |phi| on [v, v + lambda] */
        arb_neg(lam, vball);
        arb_exp(lam, lam, sp);
        arb_mul(lam, lam, delta, sp);
        arb_log1p(lam, lam, sp);
        arb_abs(lam, lam);
        arb_set(y, vball);                 /* [v, v + lambda], lambda of either sign */
        arb_add_error(y, lam);
        st = embz_tail_phi_series(g, t, y, 2, sp);
        if (st == EMBZ_OK) {
            arb_abs(tmp, g);
            arb_mul(tmp, tmp, lam, sp);
            arb_add(rest, rest, tmp, sp);
            /* |S'| <= |lambda| sup|phi'| + sup|phi| |lambda'|,
             * |lambda'| <= |delta| e^-v / (1 - |delta| e^-v) */
            arb_abs(tmp, g + 1);
            arb_mul(tmp, tmp, lam, sp);
            arb_add(drest, drest, tmp, sp);
            arb_neg(a1, vball);
            arb_exp(a1, a1, sp);
            arb_abs(x, delta);
            arb_mul(a1, a1, x, sp);
            arb_sub_ui(x, a1, 1, sp);
            arb_neg(x, x);
            if (arb_is_positive(x)) {
                arb_div(a1, a1, x, sp);
                arb_abs(tmp, g);
                arb_mul(tmp, tmp, a1, sp);
                arb_add(drest, drest, tmp, sp);
            } else {
                arb_indeterminate(drest);
            }
        }
    }
    _arb_vec_clear(g, L);
    arb_clear(y); arb_clear(a1); arb_clear(tmp); arb_clear(x); arb_clear(one); arb_clear(lam);
    return st;
}

/* Coarser bound for wide v-intervals: a Taylor model of G alone (from phi) plus plain
 * enclosures of the small parts, |S| + |em(x1)| + |em(x2)| + (r/d) |f(x3)|, over the interval.
 * Far out, where those parts are below the tolerance, this settles very long stretches. */
static int model_bound_wide(arf_t U, int *mono, actx *c, ulong r, const arb_t vc,
                            const arb_t w, const arb_t vball, const arb_t delta,
                            const slong *lev, arb_srcptr ends, slong prec)
{
    *mono = 0;
    if (lev[0] < 0 || lev[1] < 0) return EMBZ_ERR_PREC;
    arb_t drest;
    arb_init(drest);
    slong J = VMODEL_LEN;
    embz_tail_struct *t = c->t;
    slong sp = FLINT_MIN(prec, 96);
    arb_ptr p0 = _arb_vec_init(J + 1), p1 = _arb_vec_init(J + 1), G = _arb_vec_init(J + 1);
    arb_t ld, v1, acc, tmp, rest;
    arb_init(ld); arb_init(v1); arb_init(acc); arb_init(tmp); arb_init(rest);
    arb_log_ui(ld, c->d, prec);
    int st = EMBZ_OK;
    /* G at the centre and its Taylor coefficients; the last over the whole interval */
    arb_add(v1, vc, ld, prec);
    st = embz_tail_phi_series(p0, t, vc, J, prec);
    if (st == EMBZ_OK) st = embz_tail_phi_series(p1, t, v1, J, prec);
    for (slong j = 1; st == EMBZ_OK && j < J; j++) {
        arb_sub(G + j, p1 + j - 1, p0 + j - 1, prec);
        arb_div_ui(G + j, G + j, (ulong) j, prec);
    }
    if (st == EMBZ_OK) {
        arb_add(v1, vball, ld, sp);
        st = embz_tail_phi_series(p0, t, vball, J, sp);
        if (st == EMBZ_OK) st = embz_tail_phi_series(p1, t, v1, J, sp);
        if (st == EMBZ_OK) {
            arb_sub(G + J, p1 + J - 1, p0 + J - 1, sp);
            arb_div_ui(G + J, G + J, (ulong) J, sp);
        }
    }
    if (st == EMBZ_OK) {
        /* G(vc) = integral of phi over [vc, vc + ln d] */
        arb_add(v1, vc, ld, prec);
        st = embz_tail_integral_u(G, t, vc, v1, prec);
    }
    /* the small parts, enclosed over the interval */
    arb_zero(rest);
    if (st == EMBZ_OK) st = wide_small_parts(rest, drest, c, r, vball, delta, lev, sp);
    if (st == EMBZ_OK) {
        /* the model of G, the small parts as a uniform bound and, for monotonicity, their
         * derivative; when G decreases the bound is already its value at the left end */
        arf_t UG;
        int m;
        arf_init(UG);
        st = _embz_an_taylor_bound(UG, &m, G, J, w, NULL, drest, ends, prec);
        arb_set_arf(acc, UG);
        arb_add(acc, acc, rest, prec);
        arb_add(acc, acc, c->dH, prec);
        if (lev[0] != lev[1]) {
            /* x1 and x2 on different levels: the difference of their constants */
            arb_sub(tmp, t->lev_base + lev[0], t->lev_base + lev[1], prec);
            arb_add(acc, acc, tmp, prec);
        }
        arb_div(acc, acc, c->W, prec);
        arb_get_ubound_arf(U, acc, prec);
        if (!arb_is_finite(acc)) st = EMBZ_ERR_PREC;
        if (m > 0 && arb_is_finite(drest)) *mono = 1;
        arf_clear(UG);
    }
    arb_clear(drest);
    _arb_vec_clear(p0, J + 1); _arb_vec_clear(p1, J + 1); _arb_vec_clear(G, J + 1);
    arb_clear(ld); arb_clear(v1); arb_clear(acc); arb_clear(tmp); arb_clear(rest);
    return st;
}

/* Upper bound of h_r over the integers s in [lo, hi] from a Taylor model in v; *slack bounds
 * the part of h_r the model leaves out (the tail of the short integral S), uniformly. */
int _embz_an_model_bound_v(arf_t U, int *mono, mag_t slack, actx *c, ulong r,
                           const fmpz_t lo, const fmpz_t hi, slong prec)
{
    slong J = VMODEL_LEN;
    arb_ptr co = _arb_vec_init(J + 1), ci = _arb_vec_init(J + 1);
    arb_t delta, va, vb, vc, w, vball, tmp, acc, lam;
    arb_init(delta); arb_init(va); arb_init(vb); arb_init(vc); arb_init(w); arb_init(vball);
    arb_init(tmp); arb_init(acc); arb_init(lam);
    *mono = 0;
    mag_zero(slack);
    /* y = s + (r + P1)/d, delta = (M - off_s) - (r + P1)/d with P1 = M - off_k */
    slong P1 = c->M - c->off_k, P2 = c->M - c->off_s;
    arb_set_si(tmp, (slong) r + P1);
    arb_div_ui(tmp, tmp, c->d, prec);
    arb_set_si(delta, P2);
    arb_sub(delta, delta, tmp, prec);
    arb_set_fmpz(va, lo);
    arb_add(va, va, tmp, prec);
    arb_log(va, va, prec);
    arb_set_fmpz(vb, hi);
    arb_add(vb, vb, tmp, prec);
    arb_log(vb, vb, prec);
    arb_add(vc, va, vb, prec);
    arb_mul_2exp_si(vc, vc, -1);
    arb_set_arf(vc, arb_midref(vc));                    /* an exact centre */
    {
        /* w >= |v - vc| for every v in [va, vb]; the ball vball covers [va, vb] */
        arf_t w1, w2;
        arf_init(w1); arf_init(w2);
        arb_sub(tmp, vb, vc, prec);
        arb_get_ubound_arf(w1, tmp, prec);
        arb_sub(tmp, vc, va, prec);
        arb_get_ubound_arf(w2, tmp, prec);
        if (arf_cmp(w2, w1) > 0) arf_set(w1, w2);
        arb_set_arf(w, w1);
        arf_clear(w1); arf_clear(w2);
        arb_union(vball, va, vb, prec);
    }
    arb_ptr ends = _arb_vec_init(2);
    arb_sub(ends, va, vc, prec);
    arb_sub(ends + 1, vb, vc, prec);
    /* Euler-Maclaurin levels valid over the interval for x1 = d e^v and x2 = e^v + delta */
    slong lev[2];
    arb_exp(tmp, vball, prec);
    arb_mul_ui(acc, tmp, c->d, prec);
    lev[0] = embz_tail_level(c->t, acc);
    arb_add(acc, tmp, delta, prec);
    lev[1] = embz_tail_level(c->t, acc);
    if (arf_cmpabs_2exp_si(arb_midref(w), c->t->usplit ? VMODEL_FULL_EXP : -1) > 0) {
        /* wide: enclosures of the small parts lose too much under a full model */
        int st = EMBZ_ERR_PREC;
        /* x-ranges wider than a factor e^20 would put 0 inside the enclosures of x */
        if (arf_cmp_si(arb_midref(w), 10) <= 0)
            st = model_bound_wide(U, mono, c, r, vc, w, vball, delta, lev, ends, prec);
        _arb_vec_clear(co, J + 1); _arb_vec_clear(ci, J + 1); _arb_vec_clear(ends, 2);
        arb_clear(delta); arb_clear(va); arb_clear(vb); arb_clear(vc); arb_clear(w);
        arb_clear(vball); arb_clear(tmp); arb_clear(acc);
        arb_clear(lam);
        c->evals++;
        return st;
    }
    /* terms of S: |lambda| <= |delta| e^-va, and K terms leave about |lambda|^(K+1) */
    slong K = VMODEL_SHORT;
    {
        double l2 = log2(fabs(arf_get_d(arb_midref(delta), ARF_RND_UP)) + 1.0)
                    - arf_get_d(arb_midref(va), ARF_RND_DOWN) / 0.6931471805599453 + 1.0;
        if (l2 < -1.0) K = FLINT_MAX(2, FLINT_MIN(K, (slong) ceil((prec + 16) / -l2)));
    }
    int st = vmodel_series(co, c, r, vc, delta, J, 1, lev, K, prec);
    if (st == EMBZ_OK && !arb_is_zero(c->dH)) {
        arb_div(tmp, c->dH, c->W, prec);
        arb_add(co, co, tmp, prec);
    }
    if (st == EMBZ_OK && lev[0] != lev[1]) {
        /* x1 and x2 on different Euler-Maclaurin levels: their constants do not cancel */
        arb_sub(tmp, c->t->lev_base + lev[0], c->t->lev_base + lev[1], prec);
        arb_div(tmp, tmp, c->W, prec);
        arb_add(co, co, tmp, prec);
    }
    slong sp = FLINT_MIN(prec, 96);
    if (st == EMBZ_OK) st = vmodel_series(ci, c, r, vball, delta, J + 1, 0, lev, K, sp);
    if (st == EMBZ_OK && !arb_is_zero(delta)) {
        /* tail of S: |R| <= sup |phi^(K)| |lambda|^(K+1) / (K+1)!, over [va, vb + |lambda|] */
        arb_ptr ph = _arb_vec_init(K + 1);
        arb_neg(lam, va);
        arb_exp(lam, lam, sp);
        arb_mul(lam, lam, delta, sp);
        arb_log1p(lam, lam, sp);
        arb_abs(lam, lam);
        arb_t b;
        arb_init(b);
        /* S runs over [v, v + lambda] with lambda of either sign: vball +- |lambda| */
        arb_set(b, vball);
        arb_add_error(b, lam);
        st = embz_tail_phi_series(ph, c->t, b, K + 1, sp);
        if (st == EMBZ_OK) {
            /* ph[K] = phi^(K)/K!: sup|phi^(K)|/(K+1)! = |ph[K]|/(K+1) */
            arb_abs(tmp, ph + K);
            arb_pow_ui(acc, lam, (ulong) K + 1, sp);
            arb_mul(tmp, tmp, acc, sp);
            arb_div_ui(tmp, tmp, (ulong) K + 1, sp);
            arb_div(tmp, tmp, c->W, sp);
            arb_get_mag(slack, tmp);
        }
        arb_clear(b);
        _arb_vec_clear(ph, K + 1);
    }
    if (st == EMBZ_OK) {
        arb_set(co + J, ci + J);
        st = _embz_an_taylor_bound(U, mono, co, J, w, slack, NULL, ends, prec);
    }
    _arb_vec_clear(co, J + 1); _arb_vec_clear(ci, J + 1); _arb_vec_clear(ends, 2);
    arb_clear(delta); arb_clear(va); arb_clear(vb); arb_clear(vc); arb_clear(w); arb_clear(vball);
    arb_clear(tmp); arb_clear(acc); arb_clear(lam);
    c->evals++;
    return st;
}
