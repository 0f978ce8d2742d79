/* Certified bounds on the optimal LOCC fidelity F_max(p -> p (x) u_d) at astronomically large
 * n, tight enough to be reported as values for the usual families.
 *
 * F_max = max { (sum_i sqrt(s_i r_i))^2 : s majorizes p } (docs/measures.md); s has at most
 * n nonzero entries, so only the n largest r_i = p↓_ceil(i/d) / d enter. Two certificates:
 *  - lower: any s whose partial sums S_k are at least P_k (sortedness is not needed: sorting
 *    s only raises its Ky Fan sums, and pairing it sorted with r only raises the sum).
 *    On the first K0 = d m0 positions s follows the lower convex hull of the tail-sum points
 *    (the upper hull of (R_k, P_k)), found on midpoints; every chord is checked in ball
 *    arithmetic to lie above the points it spans (a piece that cannot be certified is split
 *    in the middle, down to single points, where s = p). Beyond K0, the positions
 *    (d m, d m + 1) across each block boundary form pieces of their own where the weight is
 *    proven log-convex (pair_gain), and s = p elsewhere: those positions give the overlap
 *    terms sqrt(p_k r_k), summed by overlap.c.
 *  - upper: Lagrange duality [derived here]. For every non-decreasing lambda_i > 0,
 *        sqrt(F_max) <= sum_(i <= n) ( r_i / (4 lambda_i) + lambda_i p_i ),
 *    (for s majorizing p, Abel summation gives sum_i lambda_i (s_i - p_i) >= 0, and
 *    sqrt(s_i r_i) <= r_i / (4 lambda_i) + lambda_i s_i). On the hull pieces, lambda =
 *    1 / (2 sqrt(c)) with c the piece's slope gives exactly sqrt(dP dR) per piece. Beyond
 *    K0, the smaller of two choices: lambda constant (the last slope, or the mean slope of
 *    the rest when smaller), and lambda constant on each block of d positions, where
 *    r is constant: with tau_m = B_m / p↓_m (B_m the block's mass of p) the block gives
 *    sqrt(p↓_m B_m); valid where tau is proven non-increasing (its tail certified like a
 *    weight) and starts below the last hull slope. Also sqrt(F_max) <= sqrt(R_n)
 *    (Cauchy-Schwarz, R_n the n largest entries of r).
 * For 1/i and one ebit the two meet to about 1e-17 in F_max (docs/engine.md, section 6). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "impl.h"

/* positions whose hull is computed exactly (at least; rounded up to whole blocks) */
#define FMAX_PREFIX (WORD(1) << 15)
#define FMAX_PREFIX_MAX (WORD(1) << 17)
/* the block dual's blocks, and the pairs of the lower bound, up to 2^this */
#define FMAX_BLOCK_BITS 40

/* cross = dPab (R_k - R_a) - (P_k - P_a) dRab: >= 0 when point k is on or below the chord */
static void cross(arb_t res, arb_srcptr P, arb_srcptr R, slong a, slong b, slong k, slong prec)
{
    arb_t x, y;
    arb_init(x); arb_init(y);
    arb_sub(x, P + b, P + a, prec);
    arb_sub(y, R + k, R + a, prec);
    arb_mul(res, x, y, prec);
    arb_sub(x, P + k, P + a, prec);
    arb_sub(y, R + b, R + a, prec);
    arb_mul(x, x, y, prec);
    arb_sub(res, res, x, prec);
    arb_clear(x); arb_clear(y);
}

/* sqrt(dP dR) over (a, b] */
static void piece_primal(arb_t res, arb_srcptr P, arb_srcptr R, slong a, slong b, slong prec)
{
    arb_t x, y;
    arb_init(x); arb_init(y);
    arb_sub(x, P + b, P + a, prec);
    arb_sub(y, R + b, R + a, prec);
    arb_mul(res, x, y, prec);
    arb_sqrtpos(res, res, prec);
    arb_clear(x); arb_clear(y);
}

/* the upper hull of (R_k, P_k), k = 0..last, on the midpoints of the cross products; returns
 * the number of vertices */
static slong build_hull(slong *hull, arb_srcptr P, arb_srcptr R, slong last, slong prec)
{
    arb_t t;
    arb_init(t);
    slong h = 0;
    for (slong k = 0; k <= last; k++) {
        while (h >= 2) {
            cross(t, P, R, hull[h - 2], k, hull[h - 1], prec);
            if (arf_sgn(arb_midref(t)) < 0) break;   /* hull[h-1] strictly above: keep */
            h--;
        }
        hull[h++] = k;
    }
    arb_clear(t);
    return h;
}

/* The lower bound of the hull pieces hull[0..h-1]: each chord certified above the points it
 * spans, or split in the middle (points on the chord, exactly collinear ones, cannot be
 * certified below it: O(K0 log K0) checks, not O(K0^2)). *splits counts the splits. */
static int certified_pieces(arb_t L, slong *splits, const slong *hull, slong h, arb_srcptr P,
                            arb_srcptr R, slong K0, slong prec, embz_err_t *err)
{
    int st = EMBZ_OK;
    slong *stack = flint_malloc(sizeof(slong) * 2 * (size_t) (K0 + 2));
    slong work = 0;
    arb_t t;
    arb_init(t);
    arb_zero(L);
    for (slong q = h - 1; q >= 1 && st == EMBZ_OK; q--) {
        slong sp = 0;
        stack[sp++] = hull[q - 1];
        stack[sp++] = hull[q];
        while (sp > 0 && st == EMBZ_OK) {
            slong b = stack[--sp], a = stack[--sp], bad = -1;
            for (slong k = a + 1; k < b; k++) {
                cross(t, P, R, a, b, k, prec);
                if (!arb_is_nonnegative(t)) { bad = k; break; }
            }
            work += b - a;
            if (work > 64 * K0) {
                st = embz_err_set(err, EMBZ_ERR_PREC, "the hull of the first positions "
                                  "could not be certified at this precision");
                break;
            }
            if (bad < 0) {
                piece_primal(t, P, R, a, b, prec);
                arb_add(L, L, t, prec);
            } else {
                slong mid = a + (b - a) / 2;
                (*splits)++;
                stack[sp++] = mid; stack[sp++] = b;
                stack[sp++] = a; stack[sp++] = mid;
            }
        }
    }
    arb_clear(t);
    flint_free(stack);
    return st;
}

/* f log-convex (f f'' >= f'^2) for x in [xlo, xhi]: P_0 P_2 - P_1^2 >= 0 on chunks of
 * u = ln x (x^k f^(k) = e^(r u) P_k(u), so f f'' - f'^2 = e^(2 r u) (P_0 P_2 - P_1^2) / x^2) */
static int log_convex(embz_tail_struct *t, slong xlo, const fmpz_t xhi, slong prec)
{
    if (!t->usplit) return 0;
    arb_t u, uend, w, U, v;
    arb_ptr Pk = _arb_vec_init(3);
    arb_init(u); arb_init(uend); arb_init(w); arb_init(U); arb_init(v);
    arb_set_si(u, xlo);
    arb_log(u, u, prec);
    arb_set_fmpz(uend, xhi);
    arb_log(uend, uend, prec);
    double wd = 1.0;
    int ok = 1;
    for (int it = 0; it < 20000 && ok; it++) {
        if (!arb_lt(u, uend)) break;
        arb_set_d(w, wd);
        arb_add(v, u, w, prec);
        if (arb_gt(v, uend)) arb_set(v, uend);
        arb_union(U, u, v, prec);
        int good = embz_tail_pk(Pk, t, U, 2, prec) == EMBZ_OK;
        if (good) {
            arb_mul(w, Pk, Pk + 2, prec);
            arb_submul(w, Pk + 1, Pk + 1, prec);
            good = arb_is_nonnegative(w);
        }
        if (good) {
            arb_set(u, v);
            if (wd < 64) wd *= 2;
        } else {
            wd /= 4;
            if (wd < 1e-4) ok = 0;
        }
    }
    if (arb_lt(u, uend)) ok = 0;
    _arb_vec_clear(Pk, 3);
    arb_clear(u); arb_clear(uend); arb_clear(w); arb_clear(U); arb_clear(v);
    return ok;
}

/* sum over m0 <= m <= mP of e(m) (a tail from m0 - 1), the part beyond a negligible point as
 * [0, its bound] */
static int expr_sum(arb_t res, const embz_expr_t e, const actx *c, slong m0, const fmpz_t mP,
                    slong wp, embz_err_t *err)
{
    embz_tail_t t;
    arb_t x, b;
    arb_init(x); arb_init(b);
    int st = embz_tail_init(t, e, c->ntrue, m0 - 1, mP, wp, err);
    if (st == EMBZ_OK) {
        arb_set_fmpz(x, t->end);
        st = embz_tail_sum(res, t, x, wp);
        if (st == EMBZ_OK && fmpz_cmp(t->end, mP) < 0) {
            arf_set_mag(arb_midref(b), t->neglected);
            mag_set(arb_radref(b), t->neglected);
            arb_mul_2exp_si(b, b, -1);
            arb_add(res, res, b, wp);
        }
    }
    embz_tail_clear(t);
    arb_clear(x); arb_clear(b);
    return st;
}

/* The pairs of positions (d m, d m + 1), m = m0 .. mP (the last of block m and the first of
 * block m + 1, across the convex corner between the blocks), each given its own piece of s
 * proportional to r: res = sum of sqrt(dP dR) over the pairs minus the overlap terms
 * sqrt(p r) of their positions (so that adding res to the overlap's sum moves s from p to
 * the pairs), all times sqrt(d). The pair is feasible (the chord above the point between)
 * when p_(dm+1) / r_(dm+1) >= p_(dm) / r_(dm), i.e. f(x_dm + 1)/f(x_dm) >= f(x_m + 1)/f(x_m),
 * which follows from f log-convex on the tail (the mean value theorem for ln f, x_dm > x_m):
 * that is what the caller certifies. */
static int pair_gain(arb_t res, const actx *c, slong m0, ulong d, const fmpz_t mP, slong wp,
                     embz_err_t *err)
{
    slong gamma = c->M - c->a - c->nins;
    embz_expr_t A, B, C, D, S1, S2, G, gd, g1;
    fmpq_t a, b;
    arb_t t;
    embz_expr_init(A); embz_expr_init(B); embz_expr_init(C); embz_expr_init(D);
    embz_expr_init(S1); embz_expr_init(S2); embz_expr_init(G); embz_expr_init(gd);
    embz_expr_init(g1);
    fmpq_init(a); fmpq_init(b);
    arb_init(t);
    const embz_expr_struct *w = c->f->weight;
    fmpq_set_si(a, (slong) d, 1);
    fmpq_set_si(b, gamma, 1);
    int st = embz_expr_affine(A, w, a, b);                    /* p at d m */
    fmpq_set_si(b, gamma + 1, 1);
    if (st == EMBZ_OK) st = embz_expr_affine(B, w, a, b);     /* p at d m + 1 */
    fmpq_one(a);
    fmpq_set_si(b, gamma, 1);
    if (st == EMBZ_OK) st = embz_expr_affine(C, w, a, b);     /* d r at d m */
    fmpq_set_si(b, gamma + 1, 1);
    if (st == EMBZ_OK) st = embz_expr_affine(D, w, a, b);     /* d r at d m + 1 */
    if (st == EMBZ_OK) st = embz_expr_binary(S1, EMBZ_OP_ADD, A, B);
    if (st == EMBZ_OK) st = embz_expr_binary(S2, EMBZ_OP_ADD, C, D);
    if (st == EMBZ_OK) st = embz_expr_geomean(G, S1, S2);
    if (st == EMBZ_OK) st = embz_expr_geomean(gd, A, C);
    if (st == EMBZ_OK) st = embz_expr_geomean(g1, B, D);
    if (st == EMBZ_OK) st = expr_sum(res, G, c, m0, mP, wp, err);
    if (st == EMBZ_OK) st = expr_sum(t, gd, c, m0, mP, wp, err);
    arb_sub(res, res, t, wp);
    if (st == EMBZ_OK) st = expr_sum(t, g1, c, m0, mP, wp, err);
    arb_sub(res, res, t, wp);
    embz_expr_clear(A); embz_expr_clear(B); embz_expr_clear(C); embz_expr_clear(D);
    embz_expr_clear(S1); embz_expr_clear(S2); embz_expr_clear(G); embz_expr_clear(gd);
    embz_expr_clear(g1);
    fmpq_clear(a); fmpq_clear(b);
    arb_clear(t);
    return st;
}

/* the dual term sqrt(c) dR / 2 + dP / (2 sqrt(c)) for an exact c > 0 */
static void dual_term(arb_t res, const arb_t dP, const arb_t dR, const arf_t c, slong prec)
{
    arb_t sc, t;
    arb_init(sc); arb_init(t);
    arb_set_arf(sc, c);
    arb_sqrt(sc, sc, prec);
    arb_mul(res, sc, dR, prec);
    arb_div(t, dP, sc, prec);
    arb_add(res, res, t, prec);
    arb_mul_2exp_si(res, res, -1);
    arb_clear(sc); arb_clear(t);
}

/* an exact midpoint value of x, rounded to 64 bits */
static void mid64(arf_t c, const arb_t x)
{
    arf_set_round(c, arb_midref(x), 64, ARF_RND_DOWN);
}

/* S(x) = sum_s w(d x + gamma + s - d) and the block expressions sqrt(w(x + gamma) S(x))
 * (the block dual) and S(x) / w(x + gamma) (tau) */
static int block_exprs(embz_expr_t g, embz_expr_t tau, const embz_expr_t w, ulong d,
                       slong gamma)
{
    embz_expr_t S, x, y, t;
    fmpq_t a, b;
    embz_expr_init(S); embz_expr_init(x); embz_expr_init(y); embz_expr_init(t);
    fmpq_init(a); fmpq_init(b);
    int st = EMBZ_OK;
    fmpq_set_si(a, (slong) d, 1);
    for (ulong s = 1; s <= d && st == EMBZ_OK; s++) {
        fmpq_set_si(b, gamma + (slong) s - (slong) d, 1);
        st = embz_expr_affine(x, w, a, b);
        if (st != EMBZ_OK) break;
        if (s == 1) embz_expr_set(S, x);
        else {
            st = embz_expr_binary(t, EMBZ_OP_ADD, S, x);
            embz_expr_set(S, t);
        }
    }
    fmpq_one(a);
    fmpq_set_si(b, gamma, 1);
    if (st == EMBZ_OK) st = embz_expr_affine(y, w, a, b);
    if (st == EMBZ_OK) st = embz_expr_geomean(g, y, S);
    if (st == EMBZ_OK) st = embz_expr_binary(tau, EMBZ_OP_DIV, S, y);
    embz_expr_clear(S); embz_expr_clear(x); embz_expr_clear(y); embz_expr_clear(t);
    fmpq_clear(a); fmpq_clear(b);
    return st;
}

/* The block dual beyond m0: sum over the blocks m0 < m <= mF of sqrt(v_m B_m), then the
 * positions after d mF with lambda constant (that of block mF); tau0 receives an exact upper
 * bound of tau(m0 + 1) (the multipliers before m0 must not exceed its lambda).
 * EMBZ_ERR_UNSUPPORTED when tau is not proven non-increasing. */
static int block_dual(arb_t res, arf_t tau0, actx *c, slong m0, ulong d, arb_srcptr Rn,
                      slong wp, embz_err_t *err)
{
    slong gamma = c->M - c->a - c->nins;
    embz_expr_t g, tau;
    embz_tail_t tg, tt;
    int have_g = 0, have_t = 0;
    fmpz_t mF, K;
    arb_t x, t, u, v;
    arf_t cF;
    embz_expr_init(g); embz_expr_init(tau);
    fmpz_init(mF); fmpz_init(K);
    arb_init(x); arb_init(t); arb_init(u); arb_init(v);
    arf_init(cF);
    int st = block_exprs(g, tau, c->f->weight, d, gamma);
    /* the last full block inside the tail, at most 2^FMAX_BLOCK_BITS: far out tau is flat
     * to below the working precision (its monotonicity cannot be certified), and a constant
     * multiplier from there on costs only the square of tau's remaining variation */
    fmpz_add_si(mF, c->L, c->a + c->nins);
    fmpz_fdiv_q_ui(mF, mF, d);
    if (fmpz_bits(mF) > FMAX_BLOCK_BITS) {
        fmpz_one(mF);
        fmpz_mul_2exp(mF, mF, FMAX_BLOCK_BITS);
    }
    /* a cheap look first: tau decreasing at a few sample points (the certificate below can
     * take seconds to fail for weights whose tau rises, such as 1/(i log(i+1)^b)) */
    if (st == EMBZ_OK) {
        arb_t prev;
        arb_init(prev);
        for (int k = 0; k <= 8 && st == EMBZ_OK; k++) {
            /* m0 + 1, then geometric steps to mF */
            arb_set_fmpz(x, mF);
            arb_div_si(x, x, m0 + 1, 64);
            arb_root_ui(x, x, 8, 64);
            arb_pow_ui(x, x, (ulong) k, 64);
            arb_mul_si(x, x, m0 + 1, 64);
            arf_get_fmpz(K, arb_midref(x), ARF_RND_DOWN);
            if (k == 0) fmpz_set_si(K, m0 + 1);
            if (fmpz_cmp(K, mF) > 0) fmpz_set(K, mF);
            arb_set_fmpz(x, K);
            if (embz_expr_eval_arb(t, tau, x, c->t->n, wp) != EMBZ_OK) st = EMBZ_ERR_DOMAIN;
            else if (k > 0 && arf_cmp(arb_midref(t), arb_midref(prev)) > 0)
                st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "tau rises");
            arb_swap(prev, t);
        }
        arb_clear(prev);
    }
    if (st == EMBZ_OK) {
        st = embz_tail_init(tt, tau, c->ntrue, m0, mF, wp, err);
        have_t = 1;
    }
    if (st == EMBZ_OK && (c->t->dir <= 0 || tt->dir <= 0 || fmpz_cmp(tt->end, mF) < 0))
        st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "tau is not proven non-increasing");
    if (st == EMBZ_OK) {
        arb_set_si(x, m0 + 1);
        st = embz_expr_eval_arb(t, tau, x, tt->n, wp);
        arb_get_ubound_arf(tau0, t, wp);
        arf_set_round(tau0, tau0, 64, ARF_RND_UP);
    }
    if (st == EMBZ_OK) {
        st = embz_tail_init(tg, g, c->ntrue, m0, mF, wp, err);
        have_g = 1;
    }
    if (st == EMBZ_OK && fmpz_cmp(tg->end, mF) < 0)
        st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "the block sum ends early");
    if (st == EMBZ_OK) {
        arb_set_fmpz(x, mF);
        st = embz_tail_sum(res, tg, x, wp);
    }
    if (st == EMBZ_OK) {
        /* the rest, d mF < i <= n, with lambda = 1 / (2 sqrt(cF)), cF <= tau(mF) exact */
        arb_set_fmpz(x, mF);
        st = embz_expr_eval_arb(t, tau, x, tt->n, wp);
        arb_get_lbound_arf(cF, t, wp);
        if (st == EMBZ_OK && arf_sgn(cF) <= 0) st = EMBZ_ERR_PREC;
    }
    if (st == EMBZ_OK) {
        fmpz_mul_ui(K, mF, d);
        st = _embz_an_pos_sum(t, c, K, wp);                /* P~(d mF) */
        fmpz_set(K, mF);
        if (st == EMBZ_OK) st = _embz_an_pos_sum(u, c, K, wp);   /* R~(d mF) = P~(mF) */
        arb_sub(t, c->W, t, wp);
        arb_sub(u, Rn, u, wp);
        dual_term(v, t, u, cF, wp);
        arb_add(res, res, v, wp);
    }
    if (have_t) embz_tail_clear(tt);
    if (have_g) embz_tail_clear(tg);
    embz_expr_clear(g); embz_expr_clear(tau);
    fmpz_clear(mF); fmpz_clear(K);
    arb_clear(x); arb_clear(t); arb_clear(u); arb_clear(v);
    arf_clear(cF);
    return st;
}

int _embz_fmax_analytic(arb_t lo, arb_t hi, mag_t eta, embz_fidelity_how_struct *how,
                        embz_analytic_t an, const fmpz_t n, ulong d, embz_err_t *err)
{
    slong prec = an->prec, wp = prec + 32, m0 = 0;
    actx c;
    embz_tail_t tail;
    int have_tail = 0;
    arb_ptr V = NULL, P = NULL, R = NULL;
    slong *hull = NULL, K0 = 0;
    fmpz_t j;
    arb_t L, U, t, u, Rn, Ua, Ub;
    arf_t cl, ct;
    fmpz_init(j);
    arb_init(L); arb_init(U); arb_init(t); arb_init(u); arb_init(Rn); arb_init(Ua);
    arb_init(Ub);
    arf_init(cl); arf_init(ct);
    mag_zero(eta);
    memset(how, 0, sizeof(*how));
    _embz_an_ctx_init(&c, tail, an->f, n, d, wp);
    c.cancel = an->cancel;
    c.deadline = an->deadline;
    int st = _embz_overlap_layout(&c, &m0, an, n, d, (FMAX_PREFIX + (slong) d - 1) / (slong) d,
                                  FMAX_PREFIX_MAX, tail, &have_tail, &wp, err);
    if (st != EMBZ_OK) goto out;
    K0 = (slong) d * m0;
    /* the first K0 sorted weights, their prefix sums P and those of r, R (not normalised) */
    V = _arb_vec_init(K0 + 1);
    P = _arb_vec_init(K0 + 1);
    R = _arb_vec_init(K0 + 1);
    for (slong k = 1; k <= K0 && st == EMBZ_OK; k++) {
        fmpz_set_si(j, k);
        st = _embz_an_pos_val(V + k, &c, j, wp);
        arb_add(P + k, P + k - 1, V + k, wp);
        arb_div_ui(t, V + (k + (slong) d - 1) / (slong) d, d, wp);
        arb_add(R + k, R + k - 1, t, wp);
    }
    if (st != EMBZ_OK) {
        embz_err_set(err, st, "a weight of the first sorted positions is undefined");
        goto out;
    }
    /* the upper hull of (R_k, P_k), k = 0..K0 (for the upper bound) */
    hull = flint_malloc(sizeof(slong) * (size_t) (K0 + 1));
    slong h = build_hull(hull, P, R, K0, wp);
    slong splits = 0;
    /* lower bound, first with the pairs (d m, d m + 1) beyond the prefix where f is proven
     * log-convex: the hull of 0..K0-1, position K0 alone, the overlap terms beyond, moved
     * to the pairs; else the hull of 0..K0 and the overlap terms beyond */
    {
        fmpz_t mP;
        fmpz_init(mP);
        fmpz_add_si(mP, c.L, c.a + c.nins);
        fmpz_fdiv_q_ui(mP, mP, d);
        fmpz_sub_ui(mP, mP, 1);                 /* d mP + 1 <= the last tail position */
        /* pairs up to 2^FMAX_BLOCK_BITS: beyond, what they add over s = p is of the order of
         * 1/m^3 per block, and their tails cost long integrals (seconds for an exponent
         * that depends on n at 10^1000) */
        if (fmpz_bits(mP) > FMAX_BLOCK_BITS) {
            fmpz_one(mP);
            fmpz_mul_2exp(mP, mP, FMAX_BLOCK_BITS);
        }
        slong gamma = c.M - c.a - c.nins;
        int pairs = 0;
        if (fmpz_cmp_si(mP, m0 + 2) > 0 && log_convex(c.t, m0 + gamma, c.n, wp)) {
            embz_err_t e2;
            embz_err_clear(&e2);
            slong *hl = flint_malloc(sizeof(slong) * (size_t) K0);
            slong h2 = build_hull(hl, P, R, K0 - 1, wp);
            slong sp2 = 0;
            if (certified_pieces(L, &sp2, hl, h2, P, R, K0, wp, &e2) == EMBZ_OK
                && pair_gain(u, &c, m0, d, mP, wp, &e2) == EMBZ_OK) {
                /* u is sqrt(d) times the gain; position K0: sqrt(p r) */
                arb_sqrt_ui(t, d, wp);
                arb_div(u, u, t, wp);
                arb_add(L, L, u, wp);
                arb_mul(t, V + K0, V + m0, wp);
                arb_div_ui(t, t, d, wp);
                arb_sqrtpos(t, t, wp);
                arb_add(L, L, t, wp);
                pairs = 1;
                splits = sp2;
            }
            flint_free(hl);
        }
        fmpz_clear(mP);
        how->pairs = pairs;
        if (!pairs) {
            st = certified_pieces(L, &splits, hull, h, P, R, K0, wp, err);
            if (st != EMBZ_OK) goto out;
        }
    }
    /* the rest of the lower bound: the overlap terms beyond K0 */
    st = _embz_overlap_sum_from(t, how, &c, m0, d, wp, err);
    if (st != EMBZ_OK) goto out;
    arb_sqrt_ui(u, d, wp);
    arb_div(t, t, u, wp);
    arb_add(L, L, t, wp);
    /* upper bound: the hull pieces with lambda = 1 / (2 sqrt(c)), c exact, non-increasing
     * (Ucum[q]: pieces 1..q, slope[q] the slope of piece q) */
    arb_ptr Ucum = _arb_vec_init(h);
    arf_struct *slope = flint_malloc(sizeof(arf_struct) * (size_t) h);
    for (slong q = 0; q < h; q++) arf_init(slope + q);
    arb_zero(U);
    arf_pos_inf(cl);
    for (slong q = 1; q < h; q++) {
        slong a = hull[q - 1], b = hull[q];
        arb_sub(t, P + b, P + a, wp);
        arb_sub(u, R + b, R + a, wp);
        arb_div(Ua, t, u, wp);
        mid64(ct, Ua);
        if (arf_cmp(ct, cl) < 0) arf_set(cl, ct);
        if (arf_sgn(cl) <= 0) { st = embz_err_set(err, EMBZ_ERR_PREC, "hull slope not positive"); goto out; }
        dual_term(Ua, t, u, cl, wp);
        arb_add(U, U, Ua, wp);
        arb_set(Ucum + q, U);
        arf_set(slope + q, cl);
    }
    /* R~_n: the n largest entries of r, n = d s + r0: P~_s + (r0/d) v_(s+1) */
    {
        fmpz_t s;
        fmpz_init(s);
        ulong r0 = fmpz_fdiv_ui(c.n, d);
        fmpz_fdiv_q_ui(s, c.n, d);
        st = _embz_an_pos_sum(Rn, &c, s, wp);
        if (st == EMBZ_OK && r0 != 0) {
            fmpz_add_ui(s, s, 1);
            st = _embz_an_pos_val(t, &c, s, wp);
            arb_mul_ui(t, t, r0, wp);
            arb_div_ui(t, t, d, wp);
            arb_add(Rn, Rn, t, wp);
        }
        fmpz_clear(s);
        if (st != EMBZ_OK) { embz_err_set(err, st, "cannot bound R_n"); goto out; }
    }
    /* (a) the hull with the last point (R_n, W) added: the hull pieces up to the vertex a
     * from which the chord to the last point is steepest-compatible, then lambda constant
     * (that chord's slope) from a to n */
    {
        slong qa = h - 1;
        for (;;) {
            slong a = hull[qa];
            arb_sub(t, c.W, P + a, wp);
            arb_sub(u, Rn, R + a, wp);
            arb_div(Ua, t, u, wp);
            mid64(ct, Ua);
            /* concave: the chord's slope must not exceed that of the piece before a */
            if (qa == 0 || arf_cmp(ct, slope + qa) <= 0) break;
            qa--;
        }
        if (arf_sgn(ct) <= 0) arf_set(ct, cl);
        if (qa > 0 && arf_cmp(ct, slope + qa) > 0) arf_set(ct, slope + qa);
        dual_term(Ua, t, u, ct, wp);
        if (qa > 0) arb_add(Ua, Ua, Ucum + qa, wp);
        arb_set(U, Ua);
        how->last_vertex = hull[qa];
    }
    /* (b) the block dual, where it applies: the hull pieces while their slope is at least
     * tau(m0 + 1), then lambda of that slope up to K0, then the blocks */
    how->block_dual = 0;
    {
        embz_err_t e2;
        embz_err_clear(&e2);
        arf_t tau0;
        arf_init(tau0);
        int bst = block_dual(Ub, tau0, &c, m0, d, Rn, wp, &e2);
        slong qs = 0;
        for (slong q = 1; q < h; q++)
            if (arf_cmp(slope + q, tau0) >= 0) qs = q;
        if (bst == EMBZ_OK && arf_sgn(tau0) > 0) {
            slong a = hull[qs];
            arb_sub(t, P + K0, P + a, wp);
            arb_sub(u, R + K0, R + a, wp);
            dual_term(Ua, t, u, tau0, wp);
            arb_add(Ub, Ub, Ua, wp);
            arb_add(Ub, Ub, Ucum + qs, wp);
            if (arb_lt(Ub, U)) {
                arb_swap(U, Ub);
                how->block_dual = 1;
            }
        }
        arf_clear(tau0);
    }
    for (slong q = 0; q < h; q++) arf_clear(slope + q);
    flint_free(slope);
    _arb_vec_clear(Ucum, h);
    /* sqrt(F) <= sqrt(R_n) too (in these units sqrt(W R~_n)) */
    arb_mul(t, c.W, Rn, wp);
    arb_sqrtpos(t, t, wp);
    if (arb_lt(t, U)) arb_set(U, t);
    /* normalise */
    arb_div(lo, L, c.W, wp);
    arb_div(hi, U, c.W, wp);
    _embz_overlap_eta(eta, &c);
    how->analytic = 2;
    how->head = c.M;
    how->terms = K0;
    how->pieces = h - 1;
    how->splits = splits;
    how->residues = (slong) d;
    how->prec = wp;
    how->allowance_log2 = mag_is_zero(eta) ? -1e300 : mag_get_d_log2_approx(eta) + 1;
out:
    if (V) _arb_vec_clear(V, K0 + 1);
    if (P) _arb_vec_clear(P, K0 + 1);
    if (R) _arb_vec_clear(R, K0 + 1);
    if (hull) flint_free(hull);
    if (have_tail) embz_tail_clear(tail);
    _embz_an_ctx_clear(&c);
    fmpz_clear(j);
    arb_clear(L); arb_clear(U); arb_clear(t); arb_clear(u); arb_clear(Rn); arb_clear(Ua);
    arb_clear(Ub);
    arf_clear(cl); arf_clear(ct);
    return st;
}
