/* Smooth models of F over wide threshold intervals (the threshold form: analytic_threshold.c)
 *
 * Where F is flat over many decades of t (weights close to 1/i: W F ~ H(q) - (m - 1) V / 2
 * in the tail), interval bounds built from counts leave a slack of order (B/A - 1)^2 and
 * cannot close. There F is modelled as a function of u = ln V, term by term:
 *     W F(V) = W Phi(V) - sum_j q_j W Phi(V / q_j),
 * each W Phi(T) (T = V / q_j) either
 *   - linear: no weight lies in (T_min, T_max], so W Phi(T) = S(K) - K T exactly, or
 *   - tail: (non-increasing tail only) every non-tail weight is above T_max or at most
 *     T_min, the K0 above sum to S0, and the tail position y(T) (v(y) = T, v(y) = f(M + y))
 *     stays in [1, L]. Then W Phi(T) = S0 - K0 T + C(floor y) - floor(y) T (C: sum of the
 *     first y tail values) is close to the smooth
 *         Psi(T) = S0 - K0 T + C~(y) - y T,   d Psi / d u = -T (K0 + y - 1/2) + T e(y),
 *     e(y) = (C~'(y) - v - v'/2) / v' = sum_i b_i f^(2i) / f' (the Euler-Maclaurin terms of
 *     C~ = T~(M + y), b_i = B_2i / (2i)!). With theta = y - floor(y) <= 1,
 *         |C(floor y) - C~(floor y)| <= rem,
 *         C~(floor y) - C~(y) + theta T = -int_(floor y)^y (C~'(s) - T) ds, where
 *         C~' - T = (f - T) + f'/2 + sum_i b_i f^(2i) with f - T in [0, |f'| (y - s)] and
 *         f'/2 <= 0, so its size is at most sup|f'|/2 + E1, E1 = sum_i |b_i| sup|f^(2i)|;
 *         and the part T e(y) left out of the derivative integrates exactly (du = f'/f dx)
 *         to sum_i b_i [f^(2i-1)] between x(u0) and x(u), at most
 *         E2 = 2 sum_i |b_i| sup|f^(2i-1)|,
 *     so rho = rem + sup|f'|/2 + E1 + E2, sups over x = M + y in the interval's range of y
 *     (from the counts at its ends). The Taylor model's centre u0 must lie in [ln A, ln B]
 *     so that every intermediate point of Taylor's theorem stays in that range.
 * The coefficients of -T (K0 - 1/2 + y(u)) come from y(u), the inverse of ln v (series
 * reversion of ln v(y0 + sigma)); at the centre y0 is a verified root, and the Lagrange
 * remainder coefficient comes from the same series over the whole range of y, which
 * encloses the inverse function's derivatives at every u of the interval. The terms'
 * models are added coefficient by coefficient, so the large slopes (about 1 per unit of u
 * in each term) cancel exactly in the model, and the bound (_embz_an_taylor_bound) is tight to the
 * slack. A term in neither regime (an interval across a weight of the head or across the
 * smallest weight) leaves the interval to the bounds above. */
#include "impl.h"

/* the log-position s = ln x (x = M + y) with f(x) = T as a tight ball, given
 * s in [slo, shi]: Newton on midpoints of L(s) = ln f(e^s), then L(s-) > ln T > L(s+) is
 * verified (L decreases on the tail) */
int _embz_an_tail_root(arb_t s0, actx *c, const arb_t lnT, const arb_t slo,
                       const arb_t shi, slong prec)
{
    arb_t s, step, a, b;
    arb_ptr g = _arb_vec_init(1);
    arb_init(s); arb_init(step); arb_init(a); arb_init(b);
    int st = embz_tail_log_root(s, c->t, lnT, slo, shi, prec);
    for (slong eb = prec - 10; st == EMBZ_OK && eb > prec / 2; eb -= 12) {
        arb_one(step);
        arb_mul_2exp_si(step, step, -eb);
        arb_add(step, step, s, prec);      /* half-width about 2^-eb |s| */
        arb_abs(step, step);
        arb_mul_2exp_si(step, step, -eb);
        arb_sub(a, s, step, prec);
        arb_add(b, s, step, prec);
        arb_set_arf(a, arb_midref(a));
        arb_set_arf(b, arb_midref(b));
        if (embz_tail_logweight_series(g, c->t, a, 1, prec) == EMBZ_OK && arb_gt(g, lnT)
            && embz_tail_logweight_series(g, c->t, b, 1, prec) == EMBZ_OK && arb_lt(g, lnT)) {
            arb_union(s0, a, b, prec);
            break;
        }
        if (eb - 12 <= prec / 2) st = EMBZ_ERR_PREC;
    }
    _arb_vec_clear(g, 1);
    arb_clear(s); arb_clear(step); arb_clear(a); arb_clear(b);
    return st;
}

/* Series in tau of T x = e^(lnT + tau + s(tau)), where s(tau) is the log-position of the
 * threshold T e^tau: the reversion of L(s + sigma) - L(s) at a (point or wide) ball s of
 * log-positions containing the root (ln T may be a wide ball too) */
static int tail_tx_series(arb_ptr res, actx *c, const arb_t s, const arb_t lnT, slong len,
                          slong prec)
{
    arb_ptr l = _arb_vec_init(len), r = _arb_vec_init(len);
    int st = embz_tail_logweight_series(l, c->t, s, len, prec);
    if (st == EMBZ_OK && !arb_is_negative(l + 1)) st = EMBZ_ERR_PREC;
    if (st == EMBZ_OK) {
        arb_zero(l);
        _arb_poly_revert_series(r, l, len, len, prec);
        arb_add(r, lnT, s, prec);
        arb_add_ui(r + 1, r + 1, 1, prec);
        _arb_poly_exp_series(res, r, len, len, prec);
        if (!_arb_vec_is_finite(res, len)) st = EMBZ_ERR_PREC;
    }
    _arb_vec_clear(l, len);
    _arb_vec_clear(r, len);
    return st;
}

/* the slope series -T (K0 - 1/2 - M) - T x (T = e^lnT e^tau), length len, from T x's */
static void tail_slope_series(arb_ptr res, arb_srcptr tx, const arb_t lnT, const fmpz_t K0,
                              slong M, slong len, slong prec)
{
    arb_t a, e;
    arb_init(a); arb_init(e);
    arb_set_d(a, 0.5);
    arb_sub_fmpz(a, a, K0, prec);
    arb_add_si(a, a, M, prec);              /* -(K0 - 1/2 - M) */
    arb_exp(e, lnT, prec);
    arb_mul(e, e, a, prec);
    for (slong k = 0; k < len; k++) {
        if (k > 0) arb_div_ui(e, e, (ulong) k, prec);
        arb_sub(res + k, e, tx + k, prec);
    }
    arb_clear(a); arb_clear(e);
}

/* The model of one tail-regime term: ps[0..J-1] at the centre (ln T0), ps[J] over the
 * interval (ln T in lnTw, positions [ylo, yhi]), and its slack rho (see above). */
static int tail_term_model(arb_ptr ps, mag_t rho, actx *c, const arb_t lnT0, const arb_t lnTw,
                           const fmpz_t K0, const arb_t S0, const fmpz_t ylo, const fmpz_t yhi,
                           slong J, slong prec)
{
    arb_t s0, x0, Sw, X, slo, shi, T0, t;
    arb_ptr tx = _arb_vec_init(J), sl = _arb_vec_init(J);
    arb_init(s0); arb_init(x0); arb_init(Sw); arb_init(X); arb_init(slo); arb_init(shi);
    arb_init(T0); arb_init(t);
    int st;
    /* the range of x = M + y, its logarithm, and the level valid on it */
    arb_set_fmpz(slo, ylo);
    arb_add_si(slo, slo, c->M, prec);
    arb_set_fmpz(shi, yhi);
    arb_add_si(shi, shi, c->M, prec);
    arb_union(X, slo, shi, prec);
    arb_log(slo, slo, prec);
    arb_log(shi, shi, prec);
    arb_union(Sw, slo, shi, prec);
    slong lev = embz_tail_level(c->t, X);
    st = lev >= 0 ? EMBZ_OK : EMBZ_ERR_PREC;
    if (st == EMBZ_OK) st = _embz_an_tail_root(s0, c, lnT0, slo, shi, prec);
    /* value: S0 - K0 T0 + C~(y0) - y0 T0, in mean-value form around the midpoint ym of
     * y0 (the derivative in y, C~'(y) - T0, is small near the root) */
    if (st == EMBZ_OK) {
        arb_t ym, dc;
        arb_ptr cs = _arb_vec_init(2);
        arb_init(ym); arb_init(dc);
        arb_exp(x0, s0, prec);
        arb_sub_si(t, x0, c->M, prec);       /* y0 */
        arb_exp(T0, lnT0, prec);
        arb_set_arf(ym, arb_midref(t));
        st = _embz_an_tail_C(ps, c, ym, lev, prec);
        arb_submul(ps, ym, T0, prec);
        if (st == EMBZ_OK) {
            arb_one(dc);
            st = _embz_an_tail_C_series(cs, c, t, dc, 2, lev, prec);
            arb_sub(dc, cs + 1, T0, prec);
            arb_sub(ym, t, ym, prec);        /* y0 - ym */
            arb_addmul(ps, dc, ym, prec);
        }
        arb_add(ps, ps, S0, prec);
        arb_mul_fmpz(dc, T0, K0, prec);
        arb_sub(ps, ps, dc, prec);
        _arb_vec_clear(cs, 2);
        arb_clear(ym); arb_clear(dc);
    }
    if (st == EMBZ_OK) st = tail_tx_series(tx, c, s0, lnT0, J, prec);
    if (st == EMBZ_OK) {
        tail_slope_series(sl, tx, lnT0, K0, c->M, J, prec);
        for (slong k = 1; k < J; k++) arb_div_ui(ps + k, sl + k - 1, (ulong) k, prec);
        st = tail_tx_series(tx, c, Sw, lnTw, J, prec);
    }
    if (st == EMBZ_OK) {
        tail_slope_series(sl, tx, lnTw, K0, c->M, J, prec);
        arb_div_ui(ps + J, sl + J - 1, (ulong) J, prec);
    }
    if (st == EMBZ_OK) {
        /* rho = rem + sup|f'|/2 + E1 + E2 over the range (see above), from
         * |f^(k)(x)| = e^((rate - k) s) |P_k(s)|, s = ln x */
        slong p = c->t->lev_p[lev], K = 2 * p;
        arb_ptr P = _arb_vec_init(K + 1);
        st = embz_tail_pk(P, c->t, Sw, K, prec);
        if (st == EMBZ_OK && !arb_is_negative(P + 1)) st = EMBZ_ERR_PREC;
        if (st == EMBZ_OK) {
            arb_t acc, u;
            arb_init(acc); arb_init(u);
            for (slong k = 1; k <= K; k++) {
                arb_sub_si(u, c->t->rate, k, prec);
                arb_mul(u, u, Sw, prec);
                arb_exp(u, u, prec);
                arb_mul(u, u, P + k, prec);
                arb_abs(u, u);                      /* sup |f^(k)| */
                if (k == 1) arb_mul_2exp_si(t, u, -1);
                else arb_zero(t);
                /* E1: |b_i| |f^(2i)|;  E2: 2 |b_i| |f^(2i-1)| */
                arb_mul(u, u, c->t->bern + (k + 1) / 2 - 1, prec);
                arb_abs(u, u);
                if (k & 1) arb_mul_2exp_si(u, u, 1);
                arb_add(acc, acc, u, prec);
                arb_add(acc, acc, t, prec);
            }
            arb_get_mag(rho, acc);
            mag_add(rho, rho, c->t->rem);
            if (!mag_is_finite(rho)) st = EMBZ_ERR_PREC;
            arb_clear(acc); arb_clear(u);
        }
        _arb_vec_clear(P, K + 1);
    }
    _arb_vec_clear(tx, J);
    _arb_vec_clear(sl, J);
    arb_clear(s0); arb_clear(x0); arb_clear(Sw); arb_clear(X); arb_clear(slo); arb_clear(shi);
    arb_clear(T0); arb_clear(t);
    return st;
}

/* series in u of S(K) - K T, T = T0 e^tau (coefficients 0..J-1 at the centre, J with Tw over
 * the interval) */
static int linear_series(arb_ptr ps, actx *c, const fmpz_t K, const arb_t T0, const arb_t Tw,
                         slong J, slong prec)
{
    arb_t t;
    arb_init(t);
    int st = _embz_an_pos_sum(ps, c, K, prec);
    arb_mul_fmpz(t, T0, K, prec);
    arb_sub(ps, ps, t, prec);
    arb_neg(ps + 1, t);
    for (slong k = 2; k < J; k++) arb_div_ui(ps + k, ps + k - 1, (ulong) k, prec);
    arb_mul_fmpz(t, Tw, K, prec);
    arb_neg(t, t);
    arb_fac_ui(ps + J, (ulong) J, prec);
    arb_div(ps + J, t, ps + J, prec);
    arb_clear(t);
    return st;
}

/* series in u of the chord of W Phi over [A, B] (an upper bound there, Phi being convex)
 * through the values pa = W Phi(A), pb = W Phi(B): alpha + beta T, T = T0 e^tau */
static int chord_series(arb_ptr ps, const arb_t pa, const arb_t pb, const arb_t A,
                        const arb_t B, const arb_t T0, const arb_t Tw, slong J, slong prec)
{
    arb_t beta, t;
    arb_init(beta); arb_init(t);
    arb_sub(beta, pb, pa, prec);
    arb_sub(t, B, A, prec);
    arb_div(beta, beta, t, prec);
    /* alpha + beta T0 = pa + beta (T0 - A) */
    arb_sub(t, T0, A, prec);
    arb_mul(t, t, beta, prec);
    arb_add(ps, pa, t, prec);
    arb_mul(ps + 1, beta, T0, prec);
    for (slong k = 2; k < J; k++) arb_div_ui(ps + k, ps + k - 1, (ulong) k, prec);
    arb_mul(t, beta, Tw, prec);
    arb_fac_ui(ps + J, (ulong) J, prec);
    arb_div(ps + J, t, ps + J, prec);
    int st = _arb_vec_is_finite(ps, J + 1) ? EMBZ_OK : EMBZ_ERR_PREC;
    arb_clear(beta); arb_clear(t);
    return st;
}

/* the tail regime of one term (see above): the non-tail weights classified against
 * [T_min, T_max], the range of tail positions from the counts at the ends; UNSUPPORTED
 * when the term is not in it */
static int tail_regime(arb_ptr ps, mag_t rho, actx *c, const arb_t Tmin, const arb_t Tmax,
                       const fmpz *nmin, const fmpz *nmax, const arb_t lnT0, const arb_t lnTw,
                       slong J, slong prec)
{
    if (c->t->dir <= 0) return EMBZ_ERR_UNSUPPORTED;
    if (c->a > 0 && !arb_gt(c->A + c->a - 1, Tmax)) return EMBZ_ERR_UNSUPPORTED;
    if (c->b > 0 && !arb_le(c->B, Tmin)) return EMBZ_ERR_UNSUPPORTED;
    fmpz_t K0, ylo, yhi;
    arb_t S0;
    fmpz_init(K0); fmpz_init(ylo); fmpz_init(yhi);
    arb_init(S0);
    int st = EMBZ_OK;
    fmpz_set_si(K0, c->a);
    arb_set(S0, c->SA);
    for (slong i = 0; i < c->nins && st == EMBZ_OK; i++) {
        if (arb_gt(c->ins_val + i, Tmax)) {
            fmpz_add_ui(K0, K0, 1);
            arb_add(S0, S0, c->ins_val + i, prec);
        } else if (!arb_le(c->ins_val + i, Tmin)) {
            st = EMBZ_ERR_UNSUPPORTED;
        }
    }
    if (st == EMBZ_OK) {
        /* tail positions: y(T_max) > count(T_max) >= 1, y(T_min) <= count(T_min) + 1 <= L */
        fmpz_sub(ylo, nmax, K0);
        fmpz_sub(yhi, nmin + 1, K0);
        fmpz_add_ui(yhi, yhi, 1);
        if (fmpz_cmp_ui(ylo, 1) < 0 || fmpz_cmp(yhi, c->L) > 0) st = EMBZ_ERR_UNSUPPORTED;
    }
    if (st == EMBZ_OK) st = tail_term_model(ps, rho, c, lnT0, lnTw, K0, S0, ylo, yhi, J, prec);
    fmpz_clear(K0); fmpz_clear(ylo); fmpz_clear(yhi);
    arb_clear(S0);
    return st;
}

/* Upper bound U of W F over [A, B] from the smooth model; ea, eb: the values and per-term
 * counts at A and B. EMBZ_ERR_UNSUPPORTED when a term is in neither regime. */
int _embz_an_threshold_model(arf_t U, actx *c, const th_target *q, const arb_t A,
                             const arb_t B, const th_end *ea, const th_end *eb, slong prec)
{
    if (ea->tn == NULL || !ea->ok || !eb->ok) return EMBZ_ERR_UNSUPPORTED;
    const slong J = TH_MODEL_LEN;
    arb_ptr co = _arb_vec_init(J + 1), ps = _arb_vec_init(J + 1), ends = _arb_vec_init(2);
    arb_t ua, ub, u0, dl, uw, qj, T0, Tw, Tmin, Tmax, t, lnT0, lnTw;
    mag_t slack, rho;
    arb_init(ua); arb_init(ub); arb_init(u0); arb_init(dl); arb_init(uw); arb_init(qj);
    arb_init(T0); arb_init(Tw); arb_init(Tmin); arb_init(Tmax); arb_init(t);
    arb_init(lnT0); arb_init(lnTw);
    mag_init(slack); mag_init(rho);
    int st = EMBZ_OK;
    /* u in [ua, ub] within [u0 - dl, u0 + dl] */
    arb_log(Tmin, A, prec);
    arb_get_lbound_arf(arb_midref(ua), Tmin, prec);
    arb_log(Tmax, B, prec);
    arb_get_ubound_arf(arb_midref(ub), Tmax, prec);
    arb_add(u0, ua, ub, prec);
    arb_mul_2exp_si(u0, u0, -1);
    arb_set_arf(u0, arb_midref(u0));
    /* the centre inside [ln A, ln B] (not certain for intervals a few ulps wide) */
    if (!(arb_le(Tmin, u0) && arb_le(u0, Tmax))) st = EMBZ_ERR_UNSUPPORTED;
    arb_sub(dl, ub, u0, prec);
    arb_sub(t, u0, ua, prec);
    arb_max(dl, dl, t, prec);
    arb_get_ubound_arf(arb_midref(dl), dl, prec);
    mag_zero(arb_radref(dl));
    arb_sub(ends, ua, u0, prec);
    arb_sub(ends + 1, ub, u0, prec);
    arb_set(uw, u0);
    arb_add_error(uw, dl);
    for (slong j = -1; j < q->len && st == EMBZ_OK; j++) {
        /* term j: T = V / q_j with coefficient -mult_j q_j; j = -1: T = V, coefficient 1 */
        if (j >= 0) arb_set_fmpq(qj, q->v + j, prec);
        else arb_one(qj);
        const fmpz *nmin = ea->tn + 2 * (j + 1), *nmax = eb->tn + 2 * (j + 1);
        arb_log(t, qj, prec);
        arb_sub(lnT0, u0, t, prec);
        arb_sub(lnTw, uw, t, prec);
        arb_exp(T0, lnT0, prec);
        arb_exp(Tw, lnTw, prec);
        mag_zero(rho);
        if (fmpz_equal(nmin, nmin + 1) && fmpz_equal(nmin, nmax) && fmpz_equal(nmax, nmax + 1)) {
            /* linear: S(K) - K T */
            st = linear_series(ps, c, nmin, T0, Tw, J, prec);
        } else {
            /* tail, else a one-sided bound of the right direction */
            arb_div(Tmin, A, qj, prec);
            arb_div(Tmax, B, qj, prec);
            st = tail_regime(ps, rho, c, Tmin, Tmax, nmin, nmax, lnT0, lnTw, J, prec);
            if (st != EMBZ_OK && j >= 0) {
                /* -q_j W Phi: W Phi(T) >= S(K) - K T for every K (x_+ >= x), K = the
                 * weights certainly above T_min */
                mag_zero(rho);
                st = linear_series(ps, c, nmin, T0, Tw, J, prec);
            } else if (st != EMBZ_OK) {
                /* + W Phi(V): convex in V, so below its chord over [A, B] */
                mag_zero(rho);
                st = chord_series(ps, ea->P0, eb->P0, A, B, T0, Tw, J, prec);
            }
        }
        if (st != EMBZ_OK) break;
        /* add with the term's coefficient */
        if (j >= 0) {
            arb_mul_ui(qj, qj, q->mult[j], prec);
            arb_neg(qj, qj);
            _arb_vec_scalar_mul(ps, ps, J + 1, qj, prec);
            mag_t qm;
            mag_init(qm);
            arb_get_mag(qm, qj);
            mag_mul(rho, rho, qm);
            mag_clear(qm);
        }
        _arb_vec_add(co, co, ps, J + 1, prec);
        mag_add(slack, slack, rho);
    }
    if (st == EMBZ_OK) {
        int mono;
        st = _embz_an_taylor_bound(U, &mono, co, J, dl, slack, NULL, ends, prec);
    }
    _arb_vec_clear(co, J + 1); _arb_vec_clear(ps, J + 1); _arb_vec_clear(ends, 2);
    arb_clear(ua); arb_clear(ub); arb_clear(u0); arb_clear(dl); arb_clear(uw); arb_clear(qj);
    arb_clear(T0); arb_clear(Tw); arb_clear(Tmin); arb_clear(Tmax); arb_clear(t);
    arb_clear(lnT0); arb_clear(lnTw);
    mag_clear(slack); mag_clear(rho);
    return st;
}
