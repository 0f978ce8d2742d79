/* Integrals of a tail's weight in u = ln x: integral_a^b f(x) dx = integral of
 * phi(u) = f(e^u) e^u over [ln a, ln b]. Short pieces by a Taylor rule, the others by arb's
 * adaptive integrator with a bounded effort and halving; integrals from M to x through a
 * cache of integrals from M to fixed nodes in u (see src/sum/sum.h). */
#include <string.h>
#include "sum/impl.h"

/* phi(u) = f(e^u) e^u for the integrator. */
static int phi_acb(acb_ptr out, const acb_t u, void *param, slong order, slong prec)
{
    embz_tail_struct *t = param;
    acb_t nn;
    acb_init(nn);
    acb_set_arb(nn, t->n);
    /* phi(u) = w(e^u) e^u, simplified symbolically (see embz_expr_log_substitute) */
    if (embz_expr_eval_acb(out, t->phi, u, nn, order != 0, prec) != EMBZ_OK)
        acb_indeterminate(out);
    acb_clear(nn);
    return 0;
}

/* Short integrals by a Taylor expansion about the midpoint m of [ua, ub], h = (ub - ua)/2:
 *     integral = sum_(k even, k < K) 2 c_k h^(k+1) / (k+1) + R,
 *     |R| <= 2 sup |c_K| |h|^(K+1) / (K+1),
 * c_k the Taylor coefficients of phi at m (for R: enclosed over [m - |h|, m + |h|], at low
 * precision, which also picks K <= TAYLOR_INT_MAX). Cheaper than the adaptive integrator
 * when phi is smooth on the scale of h (exact for a polynomial phi). Returns 0 when no such
 * K brings R below 2^-(prec+4) of the value; after repeated failures (phi not smooth enough
 * on these scales) the tail stops trying. At most 16 terms: a series costs about the square
 * of its length, and where 16 terms are not enough the adaptive integrator is cheaper (for
 * (u + log1p(e^-u))^-1/2 at u ~ 30: 1.8M instructions with up to 32 terms, 1M adaptive). */
static int integrate_taylor(arb_t res, embz_tail_t t, const arb_t ua, const arb_t ub,
                            slong prec)
{
    if (t->taylor_fail >= 8 && t->taylor_fail > 4 * t->taylor_ok) return 0;
    arb_t m, h, b, hp, acc, term;
    mag_t r, lim, hm;
    arb_init(m); arb_init(h); arb_init(b); arb_init(hp); arb_init(acc); arb_init(term);
    mag_init(r); mag_init(lim); mag_init(hm);
    int ok = 0;
    slong Kmax = TAYLOR_INT_MAX;
    arb_ptr c = _arb_vec_init(Kmax + 1);
    arb_add(m, ua, ub, prec);
    arb_mul_2exp_si(m, m, -1);
    arb_sub(h, ub, ua, prec);
    arb_mul_2exp_si(h, h, -1);
    arb_get_mag(hm, h);
    if (mag_cmp_2exp_si(hm, 0) <= 0) {                   /* |h| <= 1 */
        arb_set(b, m);
        arb_add_error_mag(b, hm);
        slong K = -1;
        if (embz_tail_phi_series(c, t, b, Kmax + 1, 64) == EMBZ_OK) {
            /* size of the value: about 2 h |phi| */
            arb_get_mag_lower(lim, c);
            mag_mul(lim, lim, hm);
            mag_mul_2exp_si(lim, lim, -prec - 3);
            for (slong k = 4; k <= Kmax && K < 0; k += 4) {
                arb_get_mag(r, c + k);
                mag_t hk;
                mag_init(hk);
                mag_pow_ui(hk, hm, (ulong) k + 1);
                mag_mul(r, r, hk);
                mag_mul_2exp_si(r, r, 1);
                mag_div_ui(r, r, (ulong) k + 1);
                mag_clear(hk);
                if (mag_is_finite(r) && mag_cmp(r, lim) <= 0) K = k;
            }
        }
        if (K > 0 && embz_tail_phi_series(c, t, m, K, prec) == EMBZ_OK) {
            arb_zero(acc);
            arb_set(hp, h);                              /* h^(k+1) */
            arb_mul(b, h, h, prec);                      /* h^2 */
            for (slong k = 0; k < K; k += 2) {
                arb_mul(term, c + k, hp, prec);
                arb_div_ui(term, term, (ulong) k + 1, prec);
                arb_add(acc, acc, term, prec);
                arb_mul(hp, hp, b, prec);
            }
            arb_mul_2exp_si(acc, acc, 1);
            if (arb_is_finite(acc)) {
                arb_add_error_mag(acc, r);
                arb_set(res, acc);
                ok = 1;
            }
        }
    }
    if (ok) t->taylor_ok++;
    else if (mag_cmp_2exp_si(hm, 0) <= 0) t->taylor_fail++;   /* (long pieces: not tried) */
    _arb_vec_clear(c, Kmax + 1);
    arb_clear(m); arb_clear(h); arb_clear(b); arb_clear(hp); arb_clear(acc); arb_clear(term);
    mag_clear(r); mag_clear(lim); mag_clear(hm);
    return ok;
}

/* (the rule under its internal name, for the tests; the integrator calls the static one) */
int _embz_tail_integrate_taylor(arb_t res, embz_tail_t t, const arb_t ua, const arb_t ub,
                                slong prec)
{
    return integrate_taylor(res, t, ua, ub, prec);
}

/* The adaptive integrator gets a bounded effort per call on pieces longer than 2 (its
 * default, 1000 prec + prec^2 evaluations, spent tens of seconds on atan(e^u), which has
 * branch points at distance pi/2 from every real u); when the result is then neither within
 * 2^12 of the tolerance nor accurate to prec - 20 bits, the piece is halved, so the
 * subdivision follows the strip of analyticity instead of one long rule. Pieces of length
 * at most 2 get the default effort. The effort (evaluations per bit) and the number of
 * halvings are fields of the tail (integrate_effort, integrate_halvings; defaults in impl.h). */
static int integrate_u_depth(arb_t res, embz_tail_t t, const arb_t ua, const arb_t ub,
                             slong prec, int depth);

static int integrate_u(arb_t res, embz_tail_t t, const arb_t ua, const arb_t ub, slong prec)
{
    return integrate_u_depth(res, t, ua, ub, prec, 0);
}

static int integrate_u_depth(arb_t res, embz_tail_t t, const arb_t ua, const arb_t ub,
                             slong prec, int depth)
{
    if (integrate_taylor(res, t, ua, ub, prec)) {
        t->integrals++;
        return EMBZ_OK;
    }
    acb_t a, b, r;
    mag_t tol;
    acb_calc_integrate_opt_t opt;
    acb_init(a); acb_init(b); acb_init(r);
    mag_init(tol);
    acb_calc_integrate_opt_init(opt);
    acb_set_arb(a, ua);
    acb_set_arb(b, ub);
    /* absolute tolerance relative to the size of the integrand at the larger end (for a
     * growing phi such as e^(u/2) the integral is about the value at the right end; a
     * tolerance from the left end would ask for far more than 2^-prec relative accuracy) */
    {
        acb_t fa, fb;
        mag_t mb;
        acb_init(fa); acb_init(fb);
        mag_init(mb);
        phi_acb(fa, a, t, 0, 64);
        phi_acb(fb, b, t, 0, 64);
        if (acb_is_finite(fa)) acb_get_mag(tol, fa);
        if (acb_is_finite(fb)) {
            acb_get_mag(mb, fb);
            if (mag_cmp(mb, tol) > 0) mag_set(tol, mb);
        }
        mag_mul_2exp_si(tol, tol, -prec - 4);
        if (mag_is_zero(tol) || !mag_is_finite(tol))
            mag_set_ui_2exp_si(tol, 1, -prec - 4);
        acb_clear(fa); acb_clear(fb);
        mag_clear(mb);
    }
    arb_t len;
    arb_init(len);
    arb_sub(len, ub, ua, prec);
    int longer = arf_cmpabs_2exp_si(arb_midref(len), 1) > 0;     /* halves of length >= 1 */
    arb_clear(len);
    slong halvings = _embz_tail_max_halvings(t);
    if (longer && depth < halvings)
        opt->eval_limit = _embz_tail_evals_per_bit(t) * prec;       /* else the default */
    acb_calc_integrate(r, phi_acb, t, a, b, prec, tol, opt, prec + 10);
    t->integrals++;
    int st = EMBZ_OK;
    mag_t lim;
    mag_init(lim);
    mag_mul_2exp_si(lim, tol, 12);
    if ((!acb_is_finite(r) || (mag_cmp(arb_radref(acb_realref(r)), lim) > 0
                                && arb_rel_accuracy_bits(acb_realref(r)) < prec - 20))
        && longer && depth < halvings) {
        /* halve: [ua, m] + [m, ub], m an exact midpoint */
        arb_t m, r1, r2;
        arb_init(m); arb_init(r1); arb_init(r2);
        arb_add(m, ua, ub, prec);
        arb_mul_2exp_si(m, m, -1);
        arb_set_arf(m, arb_midref(m));
        st = integrate_u_depth(r1, t, ua, m, prec, depth + 1);
        if (st == EMBZ_OK) st = integrate_u_depth(r2, t, m, ub, prec, depth + 1);
        if (st == EMBZ_OK) arb_add(res, r1, r2, prec);
        arb_clear(m); arb_clear(r1); arb_clear(r2);
        mag_clear(lim);
        acb_clear(a); acb_clear(b); acb_clear(r);
        mag_clear(tol);
        return st;
    }
    mag_clear(lim);
    if (!acb_is_finite(r)) st = EMBZ_ERR_PREC;
    arb_set(res, acb_realref(r));
    /* the integrand is real on the real axis: the imaginary part is noise */
    acb_clear(a); acb_clear(b); acb_clear(r);
    mag_clear(tol);
    return st;
}

int embz_tail_integral_u(arb_t res, embz_tail_t t, const arb_t ua, const arb_t ub, slong prec)
{
    return integrate_u(res, t, ua, ub, prec);
}

/* u of cache node k: ln M + off(k) (_embz_tail_node_off in impl.h) */
static void node_u(arb_t u, embz_tail_struct *t, slong k, slong prec)
{
    arb_t off;
    arb_init(off);
    arb_set_d(off, _embz_tail_node_off(t, k));
    arb_add(u, t->logM, off, prec);
    arb_clear(off);
}

/* make icum[k] exist: icum[k] = icum[p] + integral from node p to node k with p = k with its
 * lowest set bit cleared, so a node costs at most popcount(k) integrals (the first query at
 * n = 10^1000 needs a handful, not one per node below it), and every icum[k] is the same ball
 * whatever the order of the queries (a sweep on any number of threads gives the same
 * enclosures). */
static int node_value(embz_tail_t t, slong k, slong prec)
{
    if (k + 1 > t->nalloc) {
        slong na = FLINT_MAX(k + 1, 2 * t->nalloc);
        arb_ptr v = _arb_vec_init(na);
        char *h = flint_calloc((size_t) na, 1);
        _arb_vec_swap(v, t->icum, t->nalloc);
        memcpy(h, t->ihave, (size_t) t->nalloc);
        _arb_vec_clear(t->icum, t->nalloc);
        flint_free(t->ihave);
        t->icum = v;
        t->ihave = h;
        t->nalloc = na;
    }
    if (t->ihave[k]) return EMBZ_OK;
    if (k == 0) {
        arb_zero(t->icum);
        t->ihave[0] = 1;
        return EMBZ_OK;
    }
    slong p = k & (k - 1);
    int st = node_value(t, p, prec);
    if (st != EMBZ_OK) return st;
    arb_t ua, ub, piece;
    arb_init(ua); arb_init(ub); arb_init(piece);
    node_u(ua, t, p, prec);
    node_u(ub, t, k, prec);
    st = integrate_u(piece, t, ua, ub, prec);
    if (st == EMBZ_OK) {
        arb_add(t->icum + k, t->icum + p, piece, prec);
        t->ihave[k] = 1;
    }
    arb_clear(ua); arb_clear(ub); arb_clear(piece);
    return st;
}

int embz_tail_integral(arb_t res, embz_tail_t t, const arb_t x, slong prec)
{
    arb_t u, uk;
    arb_init(u); arb_init(uk);
    arb_log(u, x, prec);
    double rel = arf_get_d(arb_midref(u), ARF_RND_DOWN) - arf_get_d(arb_midref(t->logM), ARF_RND_DOWN);
    slong k = _embz_tail_node_below(t, rel);
    int st = node_value(t, k, prec);
    if (st == EMBZ_OK) {
        node_u(uk, t, k, prec);
        if (arb_equal(uk, u)) {
            arb_set(res, t->icum + k);
        } else {
            st = integrate_u(res, t, uk, u, prec);
            arb_add(res, res, t->icum + k, prec);
        }
    }
    arb_clear(u); arb_clear(uk);
    return st;
}
