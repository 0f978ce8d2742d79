/* Euler–Maclaurin tail sums with a rigorous remainder bound (see src/sum/sum.h). */
#include <math.h>
#include <string.h>
#include <stdlib.h>
#include "sum/sum.h"
#include "embz/util.h"

#define EMBZ_TAIL_MAX_ORDER 60   /* largest Euler–Maclaurin order tried */
#define EMBZ_TAIL_MAX_SPLIT 12   /* bisection depth when certifying a chunk */
#define LEVEL_OVERLAP 32         /* level j is certified up to 2^LEVEL_OVERLAP X_(j+1) */

/* xs = x + scale*t as a series of length len. */
static void lin_series(arb_ptr xs, const arb_t x, const arb_t scale, slong len)
{
    _arb_vec_zero(xs, len);
    arb_set(xs, x);
    if (len > 1) arb_set(xs + 1, scale);
}

int embz_tail_weight_series(arb_ptr res, embz_tail_t t, const arb_t x, const arb_t scale,
                            slong len, slong prec)
{
    arb_ptr xs = _arb_vec_init(len);
    lin_series(xs, x, scale, len);
    int st = embz_expr_eval_series(res, t->w, xs, t->n, len, prec);
    t->evals++;
    _arb_vec_clear(xs, len);
    if (st == EMBZ_OK && !_arb_vec_is_finite(res, len)) st = EMBZ_ERR_DOMAIN;
    return st;
}

/* f's Taylor coefficients g_m = f^(m)(x)/m!, m < len. */
static int weight_taylor(arb_ptr g, embz_tail_t t, const arb_t x, slong len, slong prec)
{
    arb_t one;
    arb_init(one);
    arb_one(one);
    int st = embz_tail_weight_series(g, t, x, one, len, prec);
    arb_clear(one);
    return st;
}

/* Euler–Maclaurin boundary terms of order q at x: f(x)/2 + sum_(j<=q) bern_j (2j-1)! g_(2j-1). */
static void em_terms(arb_t res, const embz_tail_struct *t, arb_srcptr g, slong q, slong prec)
{
    arb_t u;
    arb_init(u);
    arb_mul_2exp_si(res, g, -1);
    for (slong j = 1; j <= q; j++) {
        arb_fac_ui(u, 2 * j - 1, prec);
        arb_mul(u, u, g + 2 * j - 1, prec);
        arb_addmul(res, u, t->bern + j - 1, prec);
    }
    arb_clear(u);
}

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
#define TAYLOR_INT_MAX 16
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

/* The adaptive integrator gets a bounded effort per call on pieces longer than 2 (its
 * default, 1000 prec + prec^2 evaluations, spent tens of seconds on atan(e^u), which has
 * branch points at distance pi/2 from every real u); when the result is then neither within
 * 2^12 of the tolerance nor accurate to prec - 20 bits, the piece is halved, so the
 * subdivision follows the strip of analyticity instead of one long rule. Pieces of length
 * at most 2 get the default effort. */
#define INTEGRATE_EVALS_PER_BIT 40
#define INTEGRATE_MAX_HALVINGS 16

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
    if (longer && depth < INTEGRATE_MAX_HALVINGS)
        opt->eval_limit = INTEGRATE_EVALS_PER_BIT * prec;           /* else the default */
    acb_calc_integrate(r, phi_acb, t, a, b, prec, tol, opt, prec + 10);
    t->integrals++;
    int st = EMBZ_OK;
    mag_t lim;
    mag_init(lim);
    mag_mul_2exp_si(lim, tol, 12);
    if ((!acb_is_finite(r) || (mag_cmp(arb_radref(acb_realref(r)), lim) > 0
                                && arb_rel_accuracy_bits(acb_realref(r)) < prec - 20))
        && longer && depth < INTEGRATE_MAX_HALVINGS) {
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

int embz_tail_integral_u(arb_t res, embz_tail_t t, const arb_t ua, const arb_t ub, slong prec)
{
    return integrate_u(res, t, ua, ub, prec);
}

/* The cache nodes sit at u = ln M + off(k): evenly spaced (du) for the first NODES_LINEAR,
 * then in geometric progression (ratio 2^(1/4)), so that a size n needs O(log log n) nodes.
 * off(k) is a double computed the same way every time, hence an exact, reproducible node. */
#define NODES_LINEAR 64
static double node_off(const embz_tail_struct *t, slong k)
{
    if (k <= NODES_LINEAR) return t->du * (double) k;
    return t->du * NODES_LINEAR * pow(2.0, (double) (k - NODES_LINEAR) / 4.0);
}

/* the last node at or below the offset rel (>= 0) */
static slong node_below(const embz_tail_struct *t, double rel)
{
    slong k;
    if (rel <= 0) return 0;
    if (rel < t->du * NODES_LINEAR) k = (slong) floor(rel / t->du);
    else k = NODES_LINEAR + (slong) floor(4.0 * log2(rel / (t->du * NODES_LINEAR)));
    while (k > 0 && node_off(t, k) > rel) k--;
    while (node_off(t, k + 1) <= rel) k++;
    return k;
}

static void node_u(arb_t u, embz_tail_struct *t, slong k, slong prec)
{
    arb_t off;
    arb_init(off);
    arb_set_d(off, node_off(t, k));
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
    slong k = node_below(t, rel);
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

/* does level j cover the ball [lo, hi]? */
static int level_covers(const embz_tail_struct *t, slong j, const arf_t lo, const arf_t hi)
{
    if (j > 0 && arf_cmp_2exp_si(lo, t->lev_bits[j]) < 0) return 0;
    return t->lev_top[j] < 0 || arf_cmp_2exp_si(hi, t->lev_top[j]) <= 0;
}

slong embz_tail_level(const embz_tail_t t, const arb_t x)
{
    if (!arb_is_finite(x)) return -1;
    arf_t lo, hi;
    arf_init(lo); arf_init(hi);
    arb_get_lbound_arf(lo, x, MAG_BITS);
    arb_get_ubound_arf(hi, x, MAG_BITS);
    slong j = t->nlev - 1;
    while (j >= 0 && !level_covers(t, j, lo, hi)) j--;
    arf_clear(lo); arf_clear(hi);
    return j;
}

int embz_tail_sum(arb_t res, embz_tail_t t, const arb_t x, slong prec)
{
    return embz_tail_sum_level(res, t, x, EMBZ_TAIL_LEVEL_AUTO, prec);
}

/* the part of T~ at level lev (valid at x) besides the integral: em_(lev_p)(x) + lev_base */
static int tail_ends(arb_t res, embz_tail_t t, const arb_t x, slong lev, slong prec)
{
    slong q = t->lev_p[lev], len = 2 * q + 1;
    arb_ptr g = _arb_vec_init(len);
    int st = weight_taylor(g, t, x, len, prec);
    if (st == EMBZ_OK) {
        em_terms(res, t, g, q, prec);
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
            st = weight_taylor(e, t, x, 1, prec);
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
    int st = weight_taylor(g, t, x, L, prec);
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

/* The x-range of the u-chunk [ua, ub] (x = e^u, clipped to end) as a ball x, with its ends. */
static void chunk_ball(arb_t x, arb_t xa, arb_t xb, const embz_tail_struct *t,
                       const arf_t ua, const arf_t ub, slong prec)
{
    arf_t lo, hi;
    arb_t e;
    arf_init(lo); arf_init(hi);
    arb_init(e);
    arb_set_arf(xa, ua);
    arb_exp(xa, xa, prec);
    arb_set_arf(xb, ub);
    arb_exp(xb, xb, prec);
    arb_set_fmpz(e, t->end);
    if (arb_gt(xb, e) || arb_overlaps(xb, e)) arb_set(xb, e);
    arb_get_lbound_arf(lo, xa, prec);
    arb_get_ubound_arf(hi, xb, prec);
    arb_set_interval_arf(x, lo, hi, prec);
    arf_clear(lo); arf_clear(hi);
    arb_clear(e);
}

/* the exact midpoint of [ua, ub] */
static void midpoint(arf_t mid, const arf_t ua, const arf_t ub)
{
    arf_add(mid, ua, ub, ARF_PREC_EXACT, ARF_RND_DOWN);
    arf_mul_2exp_si(mid, mid, -1);
}

/* sign of a derivative ball: +1 / -1 decided (0 allowed as either), 2 undecided */
static int sign_of(const arb_t d)
{
    if (arb_is_zero(d)) return 0;
    if (arb_is_nonpositive(d)) return 1;    /* non-increasing */
    if (arb_is_nonnegative(d)) return -1;   /* non-decreasing */
    return 2;
}

static int merge_dir(int *dir, int d)
{
    if (d == 0) return EMBZ_OK;
    if (*dir != 0 && d != *dir) return EMBZ_ERR_UNSUPPORTED;   /* direction changes */
    *dir = d;
    return EMBZ_OK;
}

/* Certify the sign of f' on [ua, ub] with first-order enclosures, bisecting as needed;
 * *deep records the deepest halving that was needed. */
static int certify_sign(embz_tail_t t, const arf_t ua, const arf_t ub, int *dir, int *deep,
                        int depth, slong prec)
{
    arb_t x, xa, xb, one;
    arb_ptr g = _arb_vec_init(2);
    arb_init(x); arb_init(xa); arb_init(xb); arb_init(one);
    arb_one(one);
    chunk_ball(x, xa, xb, t, ua, ub, prec);
    int st = embz_tail_weight_series(g, t, x, one, 2, prec);
    int d = (st == EMBZ_OK) ? sign_of(g + 1) : 2;
    if (d != 2) {
        st = merge_dir(dir, d);
        if (depth > *deep) *deep = depth;
    } else if (depth < EMBZ_TAIL_MAX_SPLIT) {
        arf_t mid;
        arf_init(mid);
        midpoint(mid, ua, ub);
        st = certify_sign(t, ua, mid, dir, deep, depth + 1, prec);
        if (st == EMBZ_OK) st = certify_sign(t, mid, ub, dir, deep, depth + 1, prec);
        arf_clear(mid);
    } else if (st == EMBZ_OK) {
        st = EMBZ_ERR_UNSUPPORTED;
    }
    _arb_vec_clear(g, 2);
    arb_clear(x); arb_clear(xa); arb_clear(xb); arb_clear(one);
    return st;
}

/* On the u-chunk [ua, ub]: certify smoothness (finite enclosures of f^(j), j <= 2p) and the
 * monotone direction, adding sup |f^(2p)| * (xb - xa) to the remainder integral bound. */
/* does the range [X_j, Z_j] of level j meet the x-range of a chunk? */
static int level_meets(const embz_tail_struct *t, slong j, const arb_t xa, const arb_t xb)
{
    if (!arb_is_finite(xa) || !arb_is_finite(xb)) return 1;   /* (cannot tell: count it) */
    arf_t lo, hi;
    arf_init(lo); arf_init(hi);
    arb_get_lbound_arf(lo, xa, MAG_BITS);
    arb_get_ubound_arf(hi, xb, MAG_BITS);
    int meets = (j == 0 || arf_cmp_2exp_si(hi, t->lev_bits[j]) > 0)
                && (t->lev_top[j] < 0 || arf_cmp_2exp_si(lo, t->lev_top[j]) < 0);
    arf_clear(lo); arf_clear(hi);
    return meets;
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

/* The u-chunk [ua, ub] certified as a whole through w(e^u) = core(u) e^(r u), u the variable:
 * x^k f^(k)(x) = e^(r u) P_k(u) with P_k = (D + r)(D + r - 1) ... (D + r - k + 1) core,
 * D = d/du (because x d/dx = D and D e^(r u) = e^(r u) (D + r)). core is slowly varying for the
 * usual weights, so one enclosure of its derivatives over a wide ball of u fixes the sign of
 * P_1 (the direction of f) and bounds |P_2q|, and the remainder integral over the chunk is
 * at most sup |P_2q| * integral of e^((r - 2q + 1) u) du over [ua, ub] (x = e^u, dx = x du),
 * which is exact in the exponential part. Mid-radius balls of x itself lose all sign when
 * xb / xa is larger than about e^2; this works for chunks of any width. Nothing is changed
 * unless the whole chunk is certified; returns EMBZ_OK then. */
static int certify_chunk_u(embz_tail_t t, const arf_t ua, const arf_t ub, mag_ptr integral,
                           int *dir, const mag_t allow, slong prec)
{
    arb_t U, xa, xb, x, c, e1, e2;
    arb_init(U); arb_init(xa); arb_init(xb); arb_init(x); arb_init(c); arb_init(e1);
    arb_init(e2);
    chunk_ball(x, xa, xb, t, ua, ub, prec);
    arb_set_interval_arf(U, ua, ub, prec);
    slong qmax = 0;
    for (slong j = 0; j < t->nlev; j++)
        if (level_meets(t, j, xa, xb)) qmax = FLINT_MAX(qmax, t->lev_p[j]);
    slong K = FLINT_MAX(2 * qmax, 1), len = K + 1;
    arb_ptr P = _arb_vec_init(len);
    mag_ptr add = _mag_vec_init(t->nlev);
    int st = embz_tail_pk(P, t, U, K, prec);
    if (st == EMBZ_OK) {
        int s = sign_of(P + 1);
        if (s == 2 || !_arb_vec_is_finite(P, len)) st = EMBZ_ERR_UNSUPPORTED;
        for (slong j = 0; j < t->nlev && st == EMBZ_OK; j++) {
            if (!level_meets(t, j, xa, xb)) continue;
            slong q = t->lev_p[j];
            /* c = r - 2q + 1; the integral of e^(c u) over [ua, ub] */
            arb_sub_si(c, t->rate, 2 * q - 1, prec);
            if (arb_contains_zero(c)) {
                /* at most sup e^(cu) * (ub - ua) */
                arb_mul(e1, c, U, prec);
                arb_exp(e1, e1, prec);
                arb_set_arf(e2, ub);
                arb_sub_arf(e2, e2, ua, prec);
                arb_mul(e1, e1, e2, prec);
            } else {
                arb_set_arf(e1, ub);
                arb_mul(e1, e1, c, prec);
                arb_exp(e1, e1, prec);
                arb_set_arf(e2, ua);
                arb_mul(e2, e2, c, prec);
                arb_exp(e2, e2, prec);
                arb_sub(e1, e1, e2, prec);
                arb_div(e1, e1, c, prec);
            }
            mag_t m;
            mag_init(m);
            arb_get_mag(m, e1);
            arb_get_mag(add + j, P + 2 * q);
            mag_mul(add + j, add + j, m);
            /* refused when this chunk's share of the remainder is not small (for weights
             * whose core varies fast, such as e^(-x/n), these bounds are loose; the x-path
             * then does better) */
            arb_get_mag(m, t->bern + q - 1);
            mag_mul(m, m, add + j);
            if (!mag_is_finite(m) || mag_cmp(m, allow) > 0) st = EMBZ_ERR_UNSUPPORTED;
            mag_clear(m);
        }
        if (st == EMBZ_OK) {
            int dd = *dir;
            st = merge_dir(&dd, s);
            if (st == EMBZ_OK) {
                *dir = dd;
                for (slong j = 0; j < t->nlev; j++) mag_add(integral + j, integral + j, add + j);
            }
        }
    }
    _arb_vec_clear(P, len);
    _mag_vec_clear(add, t->nlev);
    arb_clear(U); arb_clear(xa); arb_clear(xb); arb_clear(x); arb_clear(c); arb_clear(e1);
    arb_clear(e2);
    return st;
}

static int certify_chunk(embz_tail_t t, const arf_t ua, const arf_t ub, mag_ptr integral,
                         int *deep,
                         int *dir, int depth, slong prec)
{
    arb_t xa, xb, x, one, w;
    arb_init(xa); arb_init(xb); arb_init(x); arb_init(one); arb_init(w);
    arb_one(one);
    chunk_ball(x, xa, xb, t, ua, ub, prec);
    /* only the levels whose range meets the chunk need their derivative here */
    slong qmax = 0;
    for (slong j = 0; j < t->nlev; j++)
        if (level_meets(t, j, xa, xb)) qmax = FLINT_MAX(qmax, t->lev_p[j]);
    slong len = FLINT_MAX(2 * qmax + 1, 2);
    arb_ptr g = _arb_vec_init(len);
    int st = embz_tail_weight_series(g, t, x, one, len, prec);
    if (st == EMBZ_OK) {
        /* integral[j] += sup |f^(2q)| * (xb - xa), q the order of level j, for the levels
         * whose range meets the chunk */
        mag_t m, tmp, wd;
        mag_init(m); mag_init(tmp); mag_init(wd);
        arb_sub(w, xb, xa, prec);
        arb_get_mag(wd, w);
        for (slong j = 0; j < t->nlev; j++) {
            slong q = t->lev_p[j];
            if (!level_meets(t, j, xa, xb)) continue;
            arb_get_mag(m, g + 2 * q);
            mag_fac_ui(tmp, 2 * q);
            mag_mul(m, m, tmp);
            mag_mul(m, m, wd);
            mag_add(integral + j, integral + j, m);
        }
        mag_clear(m); mag_clear(tmp); mag_clear(wd);
        int d = sign_of(g + 1);
        if (depth > *deep) *deep = depth;
        if (d != 2) st = merge_dir(dir, d);
        else st = certify_sign(t, ua, ub, dir, deep, 0, prec);
    } else if (st != EMBZ_ERR_NONSMOOTH && depth < EMBZ_TAIL_MAX_SPLIT) {
        /* enclosures too wide to be finite: halve the chunk */
        arf_t mid;
        arf_init(mid);
        midpoint(mid, ua, ub);
        st = certify_chunk(t, ua, mid, integral, deep, dir, depth + 1, prec);
        if (st == EMBZ_OK) st = certify_chunk(t, mid, ub, integral, deep, dir, depth + 1, prec);
        arf_clear(mid);
    } else if (st == EMBZ_OK) {
        st = EMBZ_ERR_UNSUPPORTED;
    }
    _arb_vec_clear(g, len);
    arb_clear(xa); arb_clear(xb); arb_clear(x); arb_clear(one); arb_clear(w);
    return st;
}

/* Bound the total weight on [e^ua, e^ub] by sup |f| times the number of integers there,
 * halving the chunk until each piece is within its share of the allowance. */
static int negligible_mass(mag_t mass, embz_tail_t t, const arf_t ua, const arf_t ub,
                           const mag_t allow, int depth, slong prec)
{
    arb_t x, xa, xb, v, cnt;
    arb_init(x); arb_init(xa); arb_init(xb); arb_init(v); arb_init(cnt);
    chunk_ball(x, xa, xb, t, ua, ub, prec);
    int st = embz_expr_eval_arb(v, t->w, x, t->n, prec);
    t->evals++;
    mag_t m, c, share;
    mag_init(m); mag_init(c); mag_init(share);
    mag_inf(m);
    if (st == EMBZ_OK && arb_is_finite(v)) {
        arb_get_mag(m, v);
        arb_sub(cnt, xb, xa, prec);
        arb_add_ui(cnt, cnt, 1, prec);
        arb_get_mag(c, cnt);
        mag_mul(m, m, c);
    }
    mag_mul_2exp_si(share, allow, -depth);
    if (mag_cmp(m, share) <= 0) {
        mag_add(mass, mass, m);
        st = EMBZ_OK;
    } else if (depth < EMBZ_TAIL_MAX_SPLIT) {
        arf_t mid;
        arf_init(mid);
        midpoint(mid, ua, ub);
        st = negligible_mass(mass, t, ua, mid, allow, depth + 1, prec);
        if (st == EMBZ_OK) st = negligible_mass(mass, t, mid, ub, allow, depth + 1, prec);
        arf_clear(mid);
    } else {
        st = EMBZ_ERR_UNSUPPORTED;
    }
    mag_clear(m); mag_clear(c); mag_clear(share);
    arb_clear(x); arb_clear(xa); arb_clear(xb); arb_clear(v); arb_clear(cnt);
    return st;
}

/* Far levels at X = 2^10, 2^15, 2^22, ... (exponents growing by half) below end: the order
 * q at X is the first whose remainder estimate |B_2q|/(2q)! |f^(2q-1)(X)| is below
 * 2^-(prec+8) goal (the criterion of level 0), goal = M f(M); a level is kept when it lowers
 * the order. */
static void set_levels(embz_tail_t t, const arb_t goal, slong prec)
{
    slong len = 2 * t->p + 1;
    arb_ptr g = _arb_vec_init(len);
    arb_t X, term, u, e0, e1;
    mag_t gm, cur;
    arb_init(X); arb_init(term); arb_init(u); arb_init(e0); arb_init(e1);
    mag_init(gm); mag_init(cur);
    t->nlev = 1;
    t->lev_bits[0] = 0;
    t->lev_p[0] = t->p;
    arb_set(t->lev_base, t->base);
    arb_get_mag_lower(gm, goal);
    mag_mul_2exp_si(gm, gm, -prec - 8);
    for (slong b = 10; t->nlev < EMBZ_TAIL_MAX_LEVELS; b += b / 2) {
        if (b <= (slong) FLINT_BIT_COUNT((ulong) t->M) + 1) continue;
        if ((slong) fmpz_bits(t->end) <= b) break;
        arb_one(X);
        arb_mul_2exp_si(X, X, b);
        /* derivatives up to 2 q_prev: the previous level's terms and the orders below it
         * (series cost about the square of their length; the orders only fall) */
        if (weight_taylor(g, t, X, 2 * t->lev_p[t->nlev - 1] + 1, prec) != EMBZ_OK) break;
        slong q;
        for (q = 1; q < t->lev_p[t->nlev - 1]; q++) {
            arb_fac_ui(u, 2 * q - 1, prec);
            arb_mul(term, u, g + 2 * q - 1, prec);
            arb_mul(term, term, t->bern + q - 1, prec);
            arb_get_mag(cur, term);
            if (mag_cmp(cur, gm) < 0) break;
        }
        if (q >= t->lev_p[t->nlev - 1]) continue;
        /* chained from the previous level, which is certified at X (X <= Z of that level):
         * lev_base = lev_base_prev + em_(q_prev)(X) - em_q(X) */
        em_terms(e0, t, g, t->lev_p[t->nlev - 1], prec);
        em_terms(e1, t, g, q, prec);
        arb_sub(e0, e0, e1, prec);
        arb_add(t->lev_base + t->nlev, t->lev_base + t->nlev - 1, e0, prec);
        t->lev_bits[t->nlev] = b;
        t->lev_p[t->nlev] = q;
        t->nlev++;
    }
    for (slong j = 0; j < t->nlev; j++)
        t->lev_top[j] = (j + 1 < t->nlev) ? t->lev_bits[j + 1] + LEVEL_OVERLAP : -1;
    _arb_vec_clear(g, len);
    arb_clear(X); arb_clear(term); arb_clear(u); arb_clear(e0); arb_clear(e1);
    mag_clear(gm); mag_clear(cur);
}

/* With the remainder integrals known, t->rem (level 0) becomes the bound for every level:
 * level j's base holds the sum up to X_j through levels 0 .. j-1, so its error is
 * rem_0 + ... + rem_j; t->rem is the sum over all levels. */
static void finish_levels(embz_tail_t t, mag_srcptr integral)
{
    mag_t c, r;
    mag_init(c); mag_init(r);
    for (slong j = 1; j < t->nlev; j++) {
        arb_get_mag(c, t->bern + t->lev_p[j] - 1);
        mag_mul(r, c, integral + j);
        mag_add(t->rem, t->rem, r);
    }
    mag_clear(c); mag_clear(r);
}

/* Is f(e^u) certainly below 2^-(prec+40) f(M) (f(M) = g0)? A cheap first test before
 * try_cut, with room to spare: try_cut then usually succeeds at once. */
static int weight_negligible_at(embz_tail_t t, const arf_t u, arb_srcptr g0, slong prec)
{
    arb_t x, v;
    mag_t a, b;
    arb_init(x); arb_init(v);
    mag_init(a); mag_init(b);
    arb_set_arf(x, u);
    arb_exp(x, x, prec);
    int ok = embz_expr_eval_arb(v, t->w, x, t->n, prec) == EMBZ_OK && arb_is_finite(v);
    if (ok) {
        arb_get_mag(a, v);
        arb_get_mag_lower(b, g0);
        mag_mul_2exp_si(b, b, -prec - 40);
        ok = mag_cmp(a, b) < 0;
    }
    arb_clear(x); arb_clear(v);
    mag_clear(a); mag_clear(b);
    return ok;
}

/* Perhaps the weights from e^ua on are too small to matter (a geometric family far out): if
 * their total is certainly below 2^-(prec+20) of the first weight f(M) = g0, end the tail
 * there (t->end) and record the neglected mass. Returns 1 when it did. */
static int try_cut(embz_tail_t t, const arf_t ua, const arf_t uend, arb_srcptr g0, slong prec)
{
    mag_t mass, goal;
    arb_t x0;
    fmpz_t X;
    mag_init(mass); mag_init(goal);
    arb_init(x0);
    fmpz_init(X);
    arb_get_mag_lower(goal, g0);
    mag_mul_2exp_si(goal, goal, -prec - 20);
    int ok = (negligible_mass(mass, t, ua, uend, goal, 0, prec) == EMBZ_OK)
             && mag_cmp(mass, goal) <= 0;
    if (ok) {
        arf_t xl;
        arf_init(xl);
        arb_set_arf(x0, ua);
        arb_exp(x0, x0, prec);
        arb_get_lbound_arf(xl, x0, prec);
        arf_get_fmpz(X, xl, ARF_RND_FLOOR);   /* certified up to e^ua >= X */
        arf_clear(xl);
        ok = fmpz_cmp_si(X, t->M + 1) > 0;
    }
    if (ok) {
        fmpz_set(t->end, X);
        mag_set(t->neglected, mass);
    }
    mag_clear(mass); mag_clear(goal);
    arb_clear(x0);
    fmpz_clear(X);
    return ok;
}

/* ln w(x) - ln w(y) as a double (an estimate for a message), NaN when either weight has no
 * positive finite enclosure. */
static double log_ratio_d(const embz_tail_t t, const fmpz_t x, const fmpz_t y, slong prec)
{
    arb_t a, b, v;
    double r = NAN;
    arb_init(a); arb_init(b); arb_init(v);
    arb_set_fmpz(v, x);
    int ok = embz_expr_eval_arb(a, t->w, v, t->n, prec) == EMBZ_OK && arb_is_positive(a);
    arb_set_fmpz(v, y);
    ok = ok && embz_expr_eval_arb(b, t->w, v, t->n, prec) == EMBZ_OK && arb_is_positive(b);
    if (ok) {
        arb_log(a, a, prec);
        arb_log(b, b, prec);
        arb_sub(v, a, b, prec);
        if (arb_is_finite(v)) r = arf_get_d(arb_midref(v), ARF_RND_NEAR);
    }
    arb_clear(a); arb_clear(b); arb_clear(v);
    return r;
}

/* Why a tail of smooth monotone weights may still fail its certificate: the weights span a
 * range too wide for it. The enclosures over a chunk of u = ln x are only meaningful while
 * ln w changes little across the chunk, so a weight that falls by a huge factor from one
 * index to the next (e^(-10^4 i)), or grows by an astronomic one over the tail (e^(i/100) up
 * to 10^8), defeats them. Fills why (", ..." or "") from estimates of ln w. */
static void range_reason(char *why, size_t len, const embz_tail_t t, slong M, const fmpz_t end,
                         slong prec)
{
    fmpz_t a, b;
    fmpz_init_set_si(a, M);
    fmpz_init_set_si(b, M + 1);
    why[0] = '\0';
    /* far out, a weight like 2^i needs the bits of the index itself to have any sign */
    prec += (slong) fmpz_bits(end) + 16;
    double step = log_ratio_d(t, b, a, prec);
    double total = log_ratio_d(t, end, a, prec);
    if (isfinite(step) && step < -1024.0) {
        snprintf(why, len, ": the weight falls by a factor of about e^%.2g per index there "
                 "(mass on the first terms; the certificate needs ln w to change slowly)",
                 -step);
    } else if (isfinite(total) && fabs(total) > 262144.0) {
        char *e = embz_fmpz_string(end, 12);
        snprintf(why, len, ": the weight %s by a factor of about e^%.2g up to i = %s (mass on "
                 "the %s terms; the certificate needs ln w to change slowly)",
                 total > 0 ? "grows" : "falls", fabs(total), e, total > 0 ? "last" : "first");
        free(e);
    }
    fmpz_clear(a);
    fmpz_clear(b);
}

int embz_tail_init(embz_tail_t t, const embz_expr_t w, const fmpz_t n, slong M,
                   const fmpz_t end, slong prec, embz_err_t *err)
{
    memset(t, 0, sizeof(*t));
    t->w = w;
    arb_init(t->n);
    arb_set_round_fmpz(t->n, n, prec);
    t->M = M;
    fmpz_init_set(t->end, end);
    arb_init(t->base);
    mag_init(t->rem);
    for (slong j = 0; j < EMBZ_TAIL_MAX_LEVELS; j++) arb_init(t->lev_base + j);
    t->nlev = 1;
    mag_init(t->neglected);
    arb_init(t->logM);
    arb_log_ui(t->logM, (ulong) M, prec);
    t->du = 1.0;
    t->nalloc = 16;
    t->icum = _arb_vec_init(t->nalloc);
    t->ihave = flint_calloc((size_t) t->nalloc, 1);
    t->prec = prec;
    t->bern = _arb_vec_init(EMBZ_TAIL_MAX_ORDER);
    embz_expr_init(t->phi);
    embz_expr_log_substitute(t->phi, w);
    embz_expr_init(t->core);
    arb_init(t->rate);
    {
        embz_expr_t re;
        arb_t one;
        embz_expr_init(re);
        arb_init(one);
        arb_one(one);
        t->usplit = embz_expr_log_split(t->core, re, w) == EMBZ_OK
                    && embz_expr_eval_arb(t->rate, re, one, t->n, prec) == EMBZ_OK
                    && arb_is_finite(t->rate);
        embz_expr_clear(re);
        arb_clear(one);
    }

    int st;
    arb_t xM, term, goal, u;
    slong len = 2 * EMBZ_TAIL_MAX_ORDER + 2;
    arb_ptr g = _arb_vec_init(len);
    arb_init(xM); arb_init(term); arb_init(goal); arb_init(u);
    arb_set_ui(xM, (ulong) M);

    t->p = EMBZ_TAIL_MAX_ORDER;
    st = weight_taylor(g, t, xM, len, prec);
    if (st != EMBZ_OK) {
        embz_err_set(err, st, "the weight has no usable Taylor expansion at i = %ld", M);
        goto done;
    }
    for (slong j = 1; j <= EMBZ_TAIL_MAX_ORDER; j++) {
        arb_bernoulli_ui(t->bern + j - 1, 2 * j, prec);
        arb_fac_ui(u, 2 * j, prec);
        arb_div(t->bern + j - 1, t->bern + j - 1, u, prec);
    }
    /* order: the first p whose remainder estimate |B_2p|/(2p)! |f^(2p-1)(M)| (the size of
     * the bound below when f^(2p) keeps its sign) is below 2^-prec times M f(M), the scale of
     * the sums; or the p where these estimates stop decreasing */
    arb_mul_ui(goal, g, (ulong) M, prec);
    {
        slong p;
        mag_t prev, cur, gm;
        mag_init(prev); mag_init(cur); mag_init(gm);
        arb_get_mag_lower(gm, goal);
        mag_mul_2exp_si(gm, gm, -prec - 8);
        mag_inf(prev);
        for (p = 1; p < EMBZ_TAIL_MAX_ORDER; p++) {
            arb_fac_ui(u, 2 * p - 1, prec);
            arb_mul(term, u, g + 2 * p - 1, prec);
            arb_mul(term, term, t->bern + p - 1, prec);
            arb_get_mag(cur, term);
            if (mag_cmp(cur, gm) < 0) break;
            if (mag_cmp(cur, prev) > 0) { p = FLINT_MAX(p - 1, 1); break; }
            mag_set(prev, cur);
        }
        t->p = FLINT_MIN(p, EMBZ_TAIL_MAX_ORDER - 1);
        mag_clear(prev); mag_clear(cur); mag_clear(gm);
    }
    /* base = -(f(M)/2 + sum_j bern_j f^(2j-1)(M)) */
    em_terms(t->base, t, g, t->p, prec);
    arb_neg(t->base, t->base);
    set_levels(t, goal, prec);

    /* certify smoothness + monotonicity on [M, end], bounding the remainder integrals */
    {
        mag_ptr integral = _mag_vec_init(t->nlev);
        mag_t c;
        arf_t ua, ub, uend;
        arb_t le;
        int dir = 0;
        mag_init(c);
        arf_init(ua); arf_init(ub); arf_init(uend);
        arb_init(le);
        arb_set_fmpz(le, end);
        arb_log(le, le, prec);
        arb_get_ubound_arf(uend, le, prec);
        arb_get_lbound_arf(ua, t->logM, prec);
        double width = 0.125;
        slong nextlev = 1;
        arf_t uj, ub0;
        arf_init(uj); arf_init(ub0);
        double uwidth = 0.125;
        int ufail = 0;
        mag_t uallow;                     /* remainder share allowed to one u-chunk */
        mag_init(uallow);
        arb_get_mag_lower(uallow, goal);
        mag_mul_2exp_si(uallow, uallow, -prec - 12);
        st = EMBZ_OK;
        int cut = 0;
        double utry = 0.0;                /* a cut is considered again from u = utry on */
        while (arf_cmp(ua, uend) < 0) {
            /* far out, once the weight itself is negligible, see whether all the rest is:
             * the tail then ends here (a geometric family needs no certificate up to n) */
            if (arf_get_d(ua, ARF_RND_DOWN) >= utry && weight_negligible_at(t, ua, g, prec)) {
                if (try_cut(t, ua, uend, g, prec)) {
                    cut = 1;
                    break;
                }
                utry = 2.0 * arf_get_d(ua, ARF_RND_DOWN) + 8.0;   /* back off */
            }
            arf_set_d(ub, width);
            arf_add(ub, ub, ua, prec, ARF_RND_UP);
            if (arf_cmp(ub, uend) > 0) arf_set(ub, uend);
            /* a chunk ends where a far level starts (ln X_j, rounded down), and the chunks
             * after it start narrow again: the remainder bound of level j is a sum of
             * sup |f^(2q)| * width over chunks, which wide chunks near X_j overstate */
            int restart = 0;
            while (nextlev < t->nlev) {
                arb_const_log2(le, prec);
                arb_mul_si(le, le, t->lev_bits[nextlev], prec);
                arb_get_lbound_arf(uj, le, prec);
                if (arf_cmp(uj, ua) > 0) break;
                nextlev++;
            }
            if (nextlev < t->nlev && arf_cmp(uj, ub) < 0) {
                arf_set(ub, uj);
                restart = 1;
            }
            /* the end of a u-path chunk: the next level start or the end */
            if (nextlev < t->nlev) arf_set(ub0, uj);
            else arf_set(ub0, uend);
            /* first the whole chunk of width uwidth in u (any width); when that fails, a
             * chunk of the x-path's width by enclosures of f's own derivatives */
            if (t->usplit && ufail < 4) {
                arf_set_d(uj, uwidth);
                arf_add(uj, uj, ua, prec, ARF_RND_UP);
                if (arf_cmp(uj, ub0) > 0) arf_set(uj, ub0);
                if (certify_chunk_u(t, ua, uj, integral, &dir, uallow, prec) == EMBZ_OK) {
                    arf_set(ua, uj);
                    uwidth *= 2;
                    ufail = 0;
                    continue;
                }
                ufail++;
                uwidth = FLINT_MAX(uwidth / 4, 0.125);
            }
            int deep = 0;
            st = certify_chunk(t, ua, ub, integral, &deep, &dir, 0, prec);
            if (st != EMBZ_OK) break;
            arf_set(ua, ub);
            /* wider chunks are cheaper, but enclosures over x-ranges wider than a factor
             * e^16 (2^23, near the 30-bit radius of a ball) lose all meaning */
            /* after halvings, go on with the width that worked */
            if (restart) width = 0.25;
            else if (deep > 0) width = FLINT_MAX(ldexp(width, -deep), 0.125);
            else width = FLINT_MIN(2 * width, 16.0);
        }
        arf_clear(uj); arf_clear(ub0);
        mag_clear(uallow);
        if (st != EMBZ_OK && st != EMBZ_ERR_DOMAIN && !cut && try_cut(t, ua, uend, g, prec))
            st = EMBZ_OK;
        if (st != EMBZ_OK) {
            char why[400] = "";
            if (st != EMBZ_ERR_DOMAIN) range_reason(why, sizeof(why), t, M, end, prec);
            if (why[0])
                embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "cannot certify the tail beyond i = "
                             "%ld%s", M, why);
            else
                embz_err_set(err, st == EMBZ_ERR_DOMAIN ? EMBZ_ERR_DOMAIN : EMBZ_ERR_UNSUPPORTED,
                             "cannot certify that the weight is smooth and monotone for i > %ld",
                             M);
            st = err ? err->code : EMBZ_ERR_UNSUPPORTED;
        } else {
            t->dir = (dir == 0) ? 1 : dir;
            /* |R| <= |B_2p|/(2p)! * integral; a far level adds its own remainder to the
             * level-0 one (its base holds the exact sum up to X_j only within that) */
            arb_get_mag(c, t->bern + t->p - 1);
            mag_mul(t->rem, c, integral);
            finish_levels(t, integral);
        }
        _mag_vec_clear(integral, t->nlev);
        mag_clear(c);
        arf_clear(ua); arf_clear(ub); arf_clear(uend);
        arb_clear(le);
    }
done:
    _arb_vec_clear(g, len);
    arb_clear(xM); arb_clear(term); arb_clear(goal); arb_clear(u);
    return st;
}

int embz_tail_phi_series(arb_ptr res, embz_tail_t t, const arb_t v, slong len, slong prec)
{
    arb_ptr vs = _arb_vec_init(len);
    arb_set(vs, v);
    if (len > 1) arb_one(vs + 1);
    int st = embz_expr_eval_series(res, t->phi, vs, t->n, len, prec);
    t->evals++;
    _arb_vec_clear(vs, len);
    if (st == EMBZ_OK && !_arb_vec_is_finite(res, len)) st = EMBZ_ERR_DOMAIN;
    return st;
}

void embz_tail_clear(embz_tail_t t)
{
    embz_expr_clear(t->phi);
    embz_expr_clear(t->core);
    arb_clear(t->rate);
    arb_clear(t->n);
    fmpz_clear(t->end);
    _arb_vec_clear(t->bern, EMBZ_TAIL_MAX_ORDER);
    arb_clear(t->base);
    mag_clear(t->rem);
    for (slong j = 0; j < EMBZ_TAIL_MAX_LEVELS; j++) arb_clear(t->lev_base + j);
    mag_clear(t->neglected);
    arb_clear(t->logM);
    _arb_vec_clear(t->icum, t->nalloc);
    flint_free(t->ihave);
}

int embz_sum_explicit(arb_t res, const embz_expr_t w, const arb_t n, slong a, slong b,
                      slong prec, embz_err_t *err)
{
    arb_t x, v;
    arb_init(x); arb_init(v);
    arb_zero(res);
    int st = EMBZ_OK;
    for (slong i = a; i <= b; i++) {
        arb_set_si(x, i);
        st = embz_expr_eval_arb(v, w, x, n, prec);
        if (st != EMBZ_OK) {
            embz_err_set(err, EMBZ_ERR_DOMAIN, "weight undefined at i = %ld", i);
            break;
        }
        arb_add(res, res, v, prec);
    }
    arb_clear(x); arb_clear(v);
    return st;
}
