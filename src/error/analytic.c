/* The embezzlement error E_n(u_d) at astronomically large n.
 *
 * Sorted Schmidt probabilities are laid out as  A | tail | B : A holds the head values (i <= M)
 * that are at least every tail value, B those that are at most every tail value, and the tail
 * (i > M, certified monotone) sits between them in its own order. For the d-level maximally
 * entangled target (Ky Fan form, k = d s + r, 0 <= r < d)
 *     E = max_k  P_k - P_s - (r/d) p_(s+1),       P_k = sum of the k largest p,
 * which is evaluated
 *   - exactly for the first few positions (explicit sums),
 *   - at k = n (P_k = 1 from there on and the expression only decreases afterwards),
 *   - for k in B explicitly, and
 *   - for k, s inside the tail by branch and bound over s: on each interval a Taylor model in s
 *     (coefficients at the centre, Lagrange remainder from an enclosure over the interval) of
 *     the smooth Euler–Maclaurin extension gives an upper bound; values at integers give lower
 *     bounds. Every interval is either discarded (its bound is below a proven value), resolved
 *     (bound within the tolerance of the best value), or split. */
#include <math.h>
#include <string.h>
#include <stdlib.h>
#include "embz/measure.h"
#include "impl.h"

#define TAYLOR_LEN 12          /* smallest Taylor model order */
#define TAYLOR_MAX 80          /* largest Taylor model order */
#define BB_BUDGET 40000        /* default: interval evaluations before giving up refining */
#define BB_SMALL 6             /* intervals with at most this many integers are enumerated */
#define THRESHOLD_BUDGET 600   /* default: evaluations of the threshold search for a target
                                  vector */
#define TH_MODEL_TERMS 128     /* smooth threshold models for targets up to this length (each
                                  end of a search interval keeps two counts per entry) */
#define TH_MODEL_LEN 16        /* their order */
#define TH_SEARCH_TERMS 1024   /* the threshold search for target vectors up to this length
                                  (longer ones get the majorization bracket) */
#define KYFAN_MAX_D 256        /* uniform targets u_d up to this d by the Ky Fan search over
                                  the d residues of k; larger d by the threshold form, whose
                                  cost does not grow with d (the one choice between the two) */

typedef struct {
    embz_tail_struct *t;
    const embz_family_struct *f;
    const arf_struct *decide;   /* stop as soon as E is known to be above this ... */
    const arf_struct *decide_lo;/* ... or below this (the ends of the threshold's ball) */
    int search_open;            /* the threshold search stopped at its budget with bounds
                                   above the tolerance (the upper end is not tight) */
    int cut_short;              /* decision mode skipped part of the search: the result's
                                   upper end is not known */
    fmpz_t n;            /* effective dimension: the true n, or less when the weights beyond
                            it were found negligible (their mass is t->neglected) */
    fmpz_t ntrue;        /* the size n of the family (weights may depend on it) */
    ulong d;
    slong M;             /* head size */
    slong a, b;          /* sizes of A and B */
    fmpz_t L;            /* tail length n - M */
    arb_ptr A, B;        /* sorted non-increasing */
    arb_t SA, SB, Ttot, W;
    slong E;             /* explicit positions 1..E */
    fmpz_t kmax;         /* last k whose position lies in the tail */
    arb_ptr vals, S;     /* vals[K] value at position K (1-based), S[K] prefix sums, S[0] = 0 */
    slong nins;          /* head weights that fall inside the range of the tail ... */
    arb_ptr ins_val;     /* ... their values, in sorted order, */
    fmpz *ins_pos;       /* ... their positions P_i in the merged sorted order, increasing, */
    arb_ptr ins_cum;     /* ... and ins_cum[i] = sum of the first i of them */
    slong off_k, off_s;  /* for the interval being modelled: a + (insertions before k) and
                            a + (insertions before s) */
    arb_t dH;            /* ins_cum[off_k - a] - ins_cum[off_s - a] */
    mag_t rslack;        /* |h - h~| <= rslack at integer s: the Euler-Maclaurin remainders
                            of the two tail sums in h (2 rem / W), which the smooth models
                            of h~ leave out */
    arb_t best;          /* best proven value (lower end used) */
    fmpz_t argk;
    arf_t upper;         /* running maximum of the upper bounds (points and intervals) */
    arf_t tol;           /* intervals whose bound is within tol of the best value are settled */
    long evals;
    slong bb_budget;     /* interval evaluations of the branch and bound before it stops */
    slong prec;
    const volatile int *cancel; /* limits of the caller (embz_analytic_set_limits) */
    double deadline;
    int stopped;                /* 1 cancelled, 2 past the deadline */
} actx;

#include <time.h>
static double mono_seconds(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

/* 0: go on; 1: cancelled; 2: past the deadline */
static int limits_reached(const volatile int *cancel, double deadline)
{
    if (cancel != NULL && *cancel) return 1;
    if (deadline > 0 && mono_seconds() > deadline) return 2;
    return 0;
}

/* 1 when the caller's limits say stop (and c->stopped says why) */
static int should_stop(actx *c)
{
    if (!c->stopped) c->stopped = limits_reached(c->cancel, c->deadline);
    return c->stopped != 0;
}

/* ---------- tail positions (1-based, real balls) ---------- */

/* x coordinate of tail position y: dec: M + y, inc: n + 1 - y (the subtraction with the bits
 * of n, so that positions near the start of the tail, x ~ M, stay exact however large n is) */
static void tail_x(arb_t x, const actx *c, const arb_t y, slong prec)
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

/* the x argument of the tail sum behind C(y): dec: M + y, inc: n - y (as in tail_x) */
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
static slong tail_level(const actx *c, const arb_t y, slong prec)
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
static int tail_C(arb_t res, actx *c, const arb_t y, slong lev, slong prec)
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
static int tail_C_series(arb_ptr res, actx *c, const arb_t y, const arb_t scale, slong len,
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
static int tail_v_series(arb_ptr res, actx *c, const arb_t y, slong len, slong prec)
{
    arb_t x, sc;
    arb_init(x); arb_init(sc);
    tail_x(x, c, y, prec);
    arb_set_si(sc, c->t->dir > 0 ? 1 : -1);
    int st = embz_tail_weight_series(res, c->t, x, sc, len, prec);
    arb_clear(x); arb_clear(sc);
    return st;
}

/* ---------- sorted positions (integers) ---------- */

/* number of inserted head weights at positions < K, and the index i (0-based) of the one at
 * position K, or -1 */
static slong ins_before(const actx *c, const fmpz_t K, slong *at)
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
static int pos_query(arb_t res, actx *c, const fmpz_t K, int want_sum, slong prec)
{
    if (fmpz_cmp_si(K, c->E) <= 0) {
        arb_set(res, (want_sum ? c->S : c->vals) + fmpz_get_si(K));
        return EMBZ_OK;
    }
    slong at, cb = ins_before(c, K, &at);
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
            st = tail_C(res, c, y, EMBZ_TAIL_LEVEL_AUTO, prec);
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
            st = tail_C(res, c, y, EMBZ_TAIL_LEVEL_AUTO, prec);
            arb_add(res, res, c->SA, prec);
            arb_add(res, res, c->ins_cum + cb, prec);
        } else {
            arb_ptr v = _arb_vec_init(1);
            st = tail_v_series(v, c, y, 1, prec);
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

#define pos_sum(res, c, K, prec) pos_query(res, c, K, 1, prec)
#define pos_val(res, c, K, prec) pos_query(res, c, K, 0, prec)

/* h(k) = (P_k - P_s - (r/d) p_(s+1)) / W with P_k = W for k >= n */
static int h_at(arb_t res, actx *c, const fmpz_t k, slong prec)
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
        st = pos_sum(Pk, c, k, prec);
    }
    if (st == EMBZ_OK) st = pos_sum(Ps, c, s, prec);
    arb_sub(res, Pk, Ps, prec);
    if (st == EMBZ_OK && r != 0 && fmpz_cmp(s1, c->n) <= 0) {
        st = pos_val(v, c, s1, prec);
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

/* the final upper bound is the largest upper end over every evaluated point and every
 * resolved or abandoned interval */
static void raise_upper(actx *c, const arb_t x)
{
    arf_t u;
    arf_init(u);
    arb_get_ubound_arf(u, x, c->prec);
    if (!arb_is_finite(x)) arf_pos_inf(u);
    if (arf_cmp(u, c->upper) > 0) arf_set(c->upper, u);
    arf_clear(u);
}

static void offer(actx *c, const arb_t h, const fmpz_t k)
{
    arf_t lo, blo;
    arf_init(lo); arf_init(blo);
    arb_get_lbound_arf(lo, h, c->prec);
    arb_get_lbound_arf(blo, c->best, c->prec);
    if (arb_is_finite(h) && (!arb_is_finite(c->best) || arf_cmp(lo, blo) > 0)) {
        arb_set(c->best, h);
        fmpz_set(c->argk, k);
    }
    raise_upper(c, h);
    arf_clear(lo); arf_clear(blo);
}

/* ---------- branch and bound over s ---------- */

/* co <- (co - (r/d) v) / W: the last steps shared by every model coefficient of h_r */
static void finish_coeff(arb_t co, const arb_t v, ulong r, const actx *c, slong prec)
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
static int taylor_bound(arf_t U, int *mono, arb_srcptr co, slong J, const arb_t w,
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
static int model_bound(arf_t U, int *mono, actx *c, ulong r, const fmpz_t lo, const fmpz_t hi,
                       slong prec)
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
            lev1 = tail_level(c, y1, prec);
            lev2 = tail_level(c, y2, prec);
        }
        st = tail_C_series(A1, c, y1, dd, len, lev1, sp);
        if (st == EMBZ_OK) st = tail_C_series(A2, c, y2, one, len, lev2, sp);
        if (st == EMBZ_OK && r != 0) st = tail_v_series(A3, c, y3, len, sp);
        if (st == EMBZ_OK && pass == 0) {
            st = tail_C(A1, c, y1, lev1, prec);
            if (st == EMBZ_OK) st = tail_C(A2, c, y2, lev2, prec);
        }
        arb_clear(s);
        if (st != EMBZ_OK) break;
        for (slong j = (pass == 0 ? 0 : J); j < len; j++) {
            arb_sub(co + j, A1 + j, A2 + j, prec);
            if (j == 0) arb_add(co, co, c->dH, prec);
            finish_coeff(co + j, A3 + j, r, c, prec);
        }
    }
    if (st == EMBZ_OK) {
        arb_ptr ends = _arb_vec_init(2);
        arb_neg(ends, w);
        arb_set(ends + 1, w);
        st = taylor_bound(U, mono, co, J, w, NULL, NULL, ends, prec);
        _arb_vec_clear(ends, 2);
    }
    _arb_vec_clear(A1, J + 1); _arb_vec_clear(A2, J + 1); _arb_vec_clear(A3, J + 1);
    _arb_vec_clear(co, J + 1);
    arb_clear(sc); arb_clear(w); arb_clear(y1); arb_clear(y2); arb_clear(y3);
    arb_clear(dd); arb_clear(one);
    c->evals++;
    return st;
}

/* ---------- Taylor models in v = ln y (large s, non-increasing tails) ----------
 *
 * With P = M - a, y = s + (r + P)/d and v = ln y, the positions are x1 = d y (of k = d s + r),
 * x2 = y + delta (of s; delta = (P (d-1) - r)/d) and x3 = x2 + 1 (of s + 1), and
 *   W h_r = G(v) - S(v) + em(x1) - em(x2) - (r/d) f(x3),
 *   G(v) = integral_v^(v + ln d) phi,  S(v) = integral_v^(v + lambda(v)) phi,
 *   lambda = ln(1 + delta e^-v),  em(x) = f(x)/2 + sum_j B_2j/(2j)! f^(2j-1)(x),
 * phi(u) = f(e^u) e^u taken from the symbolically simplified expression. The part G is O(1)
 * but only as variable as phi (constant for f = 1/i: no cancellation left to the balls); the
 * other parts are O(1/y). This lets long stretches of s be settled at once. */

#define VMODEL_FROM_BITS 10    /* v-models for s >= 2^10 */
#define VMODEL_LEN 10          /* their order */
#define VMODEL_SHORT 12        /* most terms kept of the short integral S */
#define VMODEL_FULL_EXP 1      /* full v-models up to half-width 2^1 when the parts in x are
                                  expanded through the split w(e^u) = core e^(ru) (else 1/2) */
#define VMODEL_SPLIT_PIECE 3.5 /* and unsettled stretches cut into pieces this long in v
                                  (measured: 3.5 costs least for the inverse family at 10^30,
                                  10^100 and 10^1000; 0.7 without the split) */

/* res(tau) = P(A (e^tau - 1)) for P = sum_l p_l y^l (len terms; p is overwritten), using
 * (e^tau - 1)^l = l! sum_m S(m, l) tau^m / m!   (S: Stirling numbers of the second kind):
 *     res_m = (1/m!) sum_(l <= m) S(m, l) l! A^l p_l */
static void compose_exp(arb_ptr res, arb_ptr p, slong len, const arb_t A, slong prec)
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
        compose_exp(res, em, len, ev, prec);
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
            finish_coeff(co + j, F3 + j, r, c, prec);
        }
    }
    _arb_vec_clear(G, len); _arb_vec_clear(S, len); _arb_vec_clear(E1, len);
    _arb_vec_clear(E2, len); _arb_vec_clear(F3, len);
    _arb_vec_clear(p0, len); _arb_vec_clear(p1, len);
    arb_clear(ld); arb_clear(v1); arb_clear(dd); arb_clear(zero); arb_clear(sh); arb_clear(y);
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
    slong L = 2 * FLINT_MAX(t->lev_p[lev[0]], t->lev_p[lev[1]]) + 1, sp = FLINT_MIN(prec, 96);
    arb_ptr p0 = _arb_vec_init(J + 1), p1 = _arb_vec_init(J + 1), G = _arb_vec_init(J + 1);
    arb_ptr g = _arb_vec_init(L);
    arb_t ld, v1, y, a1, acc, tmp, x, one, rest, lam;
    arb_init(ld); arb_init(v1); arb_init(y); arb_init(a1); arb_init(acc);
    arb_init(tmp); arb_init(x); arb_init(one); arb_init(rest); arb_init(lam);
    arb_one(one);
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
    if (st == EMBZ_OK) {
        /* the model of G, the small parts as a uniform bound and, for monotonicity, their
         * derivative; when G decreases the bound is already its value at the left end */
        arf_t UG;
        int m;
        arf_init(UG);
        st = taylor_bound(UG, &m, G, J, w, NULL, drest, ends, prec);
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
    _arb_vec_clear(g, L);
    arb_clear(ld); arb_clear(v1); arb_clear(y); arb_clear(a1); arb_clear(acc);
    arb_clear(tmp); arb_clear(x); arb_clear(one); arb_clear(rest); arb_clear(lam);
    return st;
}

/* Upper bound of h_r over the integers s in [lo, hi] from a Taylor model in v; *slack bounds
 * the part of h_r the model leaves out (the tail of the short integral S), uniformly. */
static int model_bound_v(arf_t U, int *mono, mag_t slack, actx *c, ulong r, const fmpz_t lo,
                         const fmpz_t hi, slong prec)
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
        st = taylor_bound(U, mono, co, J, w, slack, NULL, ends, prec);
    }
    _arb_vec_clear(co, J + 1); _arb_vec_clear(ci, J + 1); _arb_vec_clear(ends, 2);
    arb_clear(delta); arb_clear(va); arb_clear(vb); arb_clear(vc); arb_clear(w); arb_clear(vball);
    arb_clear(tmp); arb_clear(acc); arb_clear(lam);
    c->evals++;
    return st;
}

/* v-models apply to non-increasing tails from s = 2^VMODEL_FROM_BITS on */
static int use_vmodel(const actx *c, const fmpz_t lo)
{
    return c->t->dir > 0 && fmpz_bits(lo) > VMODEL_FROM_BITS;
}

static int h_at_s(arb_t h, actx *c, ulong r, const fmpz_t s, slong prec)
{
    fmpz_t k;
    fmpz_init(k);
    fmpz_mul_ui(k, s, c->d);
    fmpz_add_ui(k, k, r);
    int st = h_at(h, c, k, prec);
    if (st == EMBZ_OK) offer(c, h, k);
    fmpz_clear(k);
    return st;
}

/* A pending interval of s for residue r with its upper bound U. */
typedef struct { ulong r; fmpz_t lo, hi; arf_t U; } bb_item;

typedef struct { bb_item *v; slong len, cap; } bb_heap;   /* max-heap on U */

static void heap_swap(bb_item *a, bb_item *b) { bb_item t = *a; *a = *b; *b = t; }

static void heap_push(bb_heap *h, bb_item *it)
{
    if (h->len == h->cap) {
        h->cap = FLINT_MAX(64, 2 * h->cap);
        h->v = flint_realloc(h->v, sizeof(bb_item) * h->cap);
    }
    slong i = h->len++;
    h->v[i] = *it;
    while (i > 0 && arf_cmp(h->v[(i - 1) / 2].U, h->v[i].U) < 0) {
        heap_swap(h->v + (i - 1) / 2, h->v + i);
        i = (i - 1) / 2;
    }
}

static void heap_pop(bb_heap *h, bb_item *out)
{
    *out = h->v[0];
    h->v[0] = h->v[--h->len];
    slong i = 0;
    for (;;) {
        slong l = 2 * i + 1, r = l + 1, m = i;
        if (l < h->len && arf_cmp(h->v[l].U, h->v[m].U) > 0) m = l;
        if (r < h->len && arf_cmp(h->v[r].U, h->v[m].U) > 0) m = r;
        if (m == i) break;
        heap_swap(h->v + i, h->v + m);
        i = m;
    }
}

static void item_clear(bb_item *it) { fmpz_clear(it->lo); fmpz_clear(it->hi); arf_clear(it->U); }

/* Bound [lo, hi] for residue r: enumerate small intervals, settle monotone ones at their
 * maximising end, push the others (unless already below a proven value). */
/* The first s in [lo, hi] at which an inserted head weight changes the layout for residue
 * r: s, s + 1 or k = d s + r at an inserted position, or the last s before k passes one. */
static int special_in(fmpz_t res, const actx *c, ulong r, const fmpz_t lo, const fmpz_t hi)
{
    fmpz_t cand, best;
    fmpz_init(cand);
    fmpz_init(best);
    int found = 0;
    for (slong i = 0; i < c->nins; i++) {
        for (int t = 0; t < 5; t++) {
            if (t < 3) {
                fmpz_add_si(cand, c->ins_pos + i, t - 1);          /* P - 1, P, P + 1 */
            } else {
                fmpz_sub_ui(cand, c->ins_pos + i, r + 1);          /* floor((P - r - 1)/d) */
                fmpz_fdiv_q_ui(cand, cand, c->d);
                fmpz_add_ui(cand, cand, (ulong) (t - 3));         /* and the next one */
            }
            if (fmpz_cmp(cand, lo) >= 0 && fmpz_cmp(cand, hi) <= 0
                && (!found || fmpz_cmp(cand, best) < 0)) {
                fmpz_set(best, cand);
                found = 1;
            }
        }
    }
    if (found) fmpz_set(res, best);
    fmpz_clear(cand);
    fmpz_clear(best);
    return found;
}

/* offsets of the tail positions of k = d lo + r and of s = lo (constant over an interval
 * without special sizes) */
static void set_offsets(actx *c, ulong r, const fmpz_t lo)
{
    fmpz_t k;
    slong at, ck, cs;
    fmpz_init(k);
    fmpz_mul_ui(k, lo, c->d);
    fmpz_add_ui(k, k, r);
    ck = ins_before(c, k, &at);
    cs = ins_before(c, lo, &at);
    c->off_k = c->a + ck;
    c->off_s = c->a + cs;
    arb_sub(c->dH, c->ins_cum + ck, c->ins_cum + cs, c->prec);
    fmpz_clear(k);
}

/* A cheap bound for long stretches of s far out (non-increasing tails): the tail values at
 * positions s+1 .. k lie between x2 = M + s - off_s and x1 = M + k - off_k, and as f does
 * not increase,
 *     W h_r(s) <= sum_(x2 < x <= x1) f(x) + dH <= integral_(x2)^(x1) f + dH
 *              =  integral_(ln x2)^(ln x1) phi  + dH  <=  Lambda sup phi + dH,
 * with Lambda the largest ln(x1/x2) over the stretch (at one of its ends: x1/x2 is a
 * Moebius function of s) and sup phi over [ln x2(lo), ln x1(hi)], taken piecewise on
 * sub-balls of width 2. Returns 1 when this bound is below the best proven value: the whole
 * stretch can then be dropped without a model. */
static int phi_discard(actx *c, ulong r, const fmpz_t lo, const fmpz_t hi, slong prec)
{
    embz_tail_struct *t = c->t;
    if (t->dir <= 0 || !arb_is_finite(c->best)) return 0;
    slong sp = prec;   /* the bound may settle a stretch to within the tolerance */
    arb_t x1, x2, lam, l2, ua, ub, u, v, acc;
    arf_t a, b, blo;
    arb_init(x1); arb_init(x2); arb_init(lam); arb_init(l2); arb_init(ua); arb_init(ub);
    arb_init(u); arb_init(v); arb_init(acc);
    arf_init(a); arf_init(b); arf_init(blo);
    int ok = 1;
    arb_zero(lam);
    for (int e = 0; e < 2; e++) {
        const fmpz *s = e ? hi : lo;
        arb_set_fmpz(x1, s);
        arb_mul_ui(x1, x1, c->d, sp);
        arb_add_si(x1, x1, c->M + (slong) r - c->off_k, sp);
        arb_set_fmpz(x2, s);
        arb_add_si(x2, x2, c->M - c->off_s, sp);
        if (e == 0) arb_log(ua, x2, sp);
        else arb_log(ub, x1, sp);
        arb_div(l2, x1, x2, sp);
        arb_log(l2, l2, sp);
        arb_max(lam, lam, l2, sp);
    }
    /* sup phi over [ua, ub], piecewise */
    arb_get_lbound_arf(a, ua, sp);
    arb_get_ubound_arf(b, ub, sp);
    arb_zero(acc);
    long pieces = 0;
    while (ok && arf_cmp(a, b) < 0) {
        arf_t e;
        arf_init(e);
        arf_add_ui(e, a, 2, sp, ARF_RND_UP);
        if (arf_cmp(e, b) > 0) arf_set(e, b);
        arb_set_interval_arf(u, a, e, sp);
        if (embz_expr_eval_arb(v, t->phi, u, t->n, sp) != EMBZ_OK || !arb_is_finite(v)) ok = 0;
        else arb_max(acc, acc, v, sp);
        arf_set(a, e);
        arf_clear(e);
        if (++pieces > 4096) ok = 0;
    }
    int drop = 0;
    if (ok) {
        arb_mul(acc, acc, lam, sp);
        arb_add(acc, acc, c->dH, sp);
        arb_div(acc, acc, c->W, sp);
        arb_get_ubound_arf(a, acc, sp);
        arb_get_lbound_arf(blo, c->best, prec);
        drop = arb_is_finite(acc) && arf_cmp(a, blo) < 0;
        if (!drop && arb_is_finite(acc)) {
            /* within the tolerance of the best value (far out for flat families): the
             * stretch is settled, its bound joins the upper end of the result */
            arb_get_ubound_arf(blo, c->best, prec);
            arf_add(blo, blo, c->tol, prec, ARF_RND_DOWN);
            if (arf_cmp(a, blo) <= 0) {
                if (arf_cmp(a, c->upper) > 0) arf_set(c->upper, a);
                drop = 1;
            }
        }
    }
    c->evals++;
    arb_clear(x1); arb_clear(x2); arb_clear(lam); arb_clear(l2); arb_clear(ua); arb_clear(ub);
    arb_clear(u); arb_clear(v); arb_clear(acc);
    arf_clear(a); arf_clear(b); arf_clear(blo);
    return drop;
}

static int bb_consider(bb_heap *hp, actx *c, ulong r, const fmpz_t lo, const fmpz_t hi,
                       slong prec)
{
    int st = EMBZ_OK;
    arb_t h;
    fmpz_t m;
    arb_init(h);
    fmpz_init(m);
    fmpz_sub(m, hi, lo);
    if (c->nins > 0 && fmpz_cmp_ui(m, BB_SMALL) >= 0 && special_in(m, c, r, lo, hi)) {
        /* a size where an inserted head weight changes the layout: exactly, then the rest */
        fmpz_t e;
        fmpz_init(e);
        st = h_at_s(h, c, r, m, prec);
        if (st == EMBZ_OK && fmpz_cmp(m, lo) > 0) {
            fmpz_sub_ui(e, m, 1);
            st = bb_consider(hp, c, r, lo, e, prec);
        }
        if (st == EMBZ_OK && fmpz_cmp(m, hi) < 0) {
            fmpz_add_ui(e, m, 1);
            st = bb_consider(hp, c, r, e, hi, prec);
        }
        fmpz_clear(e);
    } else if (fmpz_cmp_ui(m, BB_SMALL) < 0) {
        for (fmpz_set(m, lo); st == EMBZ_OK && fmpz_cmp(m, hi) <= 0; fmpz_add_ui(m, m, 1))
            st = h_at_s(h, c, r, m, prec);
    } else if (set_offsets(c, r, lo), use_vmodel(c, lo) && phi_discard(c, r, lo, hi, prec)) {
        /* the whole stretch is below a proven value */
    } else {
        bb_item it;
        int mono;
        fmpz_init_set(it.lo, lo);
        fmpz_init_set(it.hi, hi);
        arf_init(it.U);
        it.r = r;
        mag_t slack;
        mag_init(slack);
        if (use_vmodel(c, lo)) st = model_bound_v(it.U, &mono, slack, c, r, lo, hi, prec);
        else st = model_bound(it.U, &mono, c, r, lo, hi, prec);
        if (st != EMBZ_OK) {
            /* no model (e.g. precision lost): split blindly */
            st = EMBZ_OK;
            mono = 0;
            arf_pos_inf(it.U);
        } else {
            /* the models describe the smooth extension h~; at integers h differs from it by
             * the Euler-Maclaurin remainders, at most rslack */
            arb_t u;
            arb_init(u);
            arb_set_arf(u, it.U);
            arb_add_error_mag(u, c->rslack);
            arb_get_ubound_arf(it.U, u, prec);
            arb_clear(u);
            mag_add(slack, slack, c->rslack);
        }
        arf_t blo;
        arf_init(blo);
        arb_get_lbound_arf(blo, c->best, prec);
        if (mono != 0 && arb_is_finite(c->best) && arf_cmp(it.U, blo) < 0) {
            /* monotone and even its maximising end (U) is below a proven value */
            item_clear(&it);
        } else if (mono != 0) {
            /* the model is monotone; h itself may exceed it by the slack at most, so the
             * maximum over the interval is at most h(end) + 2 slack */
            st = h_at_s(h, c, r, mono > 0 ? hi : lo, prec);
            if (st == EMBZ_OK && !mag_is_zero(slack)) {
                arb_t hs;
                arb_init(hs);
                arb_set(hs, h);
                arb_add_error_mag(hs, slack);
                arb_add_error_mag(hs, slack);
                raise_upper(c, hs);
                arb_clear(hs);
            }
            item_clear(&it);
        } else if (arb_is_finite(c->best) && arf_cmp(it.U, blo) < 0) {
            item_clear(&it);
        } else {
            heap_push(hp, &it);
        }
        arf_clear(blo);
        mag_clear(slack);
    }
    arb_clear(h);
    fmpz_clear(m);
    return st;
}

/* bb_consider on k pieces of [lo, hi] of (nearly) equal ratio: cuts near lo (hi/lo)^(j/k).
 * Any cuts give a valid partition (empty pieces are skipped, the last one ends at hi), so the
 * cuts are computed with just enough bits to resolve hi - lo, not with all bits of hi (an
 * exponential at thousands of bits cost more than the bounds at n = 10^1000). */
static int consider_pieces(bb_heap *hp, actx *c, ulong r, const fmpz_t lo, const fmpz_t hi,
                           slong k, slong prec)
{
    fmpz_t a, b;
    fmpz_init(b);
    fmpz_sub(b, hi, lo);
    slong wp = (slong) fmpz_bits(hi) - (slong) fmpz_bits(b) + 64;
    arb_t la, lr, x;
    fmpz_init_set(a, lo);
    arb_init(la); arb_init(lr); arb_init(x);
    arb_set_fmpz(la, lo);
    arb_log(la, la, wp);
    arb_set_fmpz(lr, hi);
    arb_log(lr, lr, wp);
    arb_sub(lr, lr, la, wp);
    arb_div_si(lr, lr, k, wp);                    /* ln(hi/lo) / k */
    int st = EMBZ_OK;
    for (slong j = 1; j <= k && st == EMBZ_OK; j++) {
        if (j == k) {
            fmpz_set(b, hi);
        } else {
            arb_mul_si(x, lr, j, wp);
            arb_add(x, x, la, wp);
            arb_exp(x, x, wp);
            arf_get_fmpz(b, arb_midref(x), ARF_RND_FLOOR);
            if (fmpz_cmp(b, hi) >= 0) fmpz_sub_ui(b, hi, 1);
        }
        if (fmpz_cmp(b, a) < 0) continue;          /* empty piece */
        st = bb_consider(hp, c, r, a, b, prec);
        fmpz_add_ui(a, b, 1);
        if (fmpz_cmp(a, hi) > 0) break;
    }
    fmpz_clear(a); fmpz_clear(b);
    arb_clear(la); arb_clear(lr); arb_clear(x);
    return st;
}

/* Maximise h over the smooth region: for each residue r, s in [slo[r], shi[r]]. */
static int branch_and_bound(actx *c, const fmpz *slo, const fmpz *shi, const arf_t tol,
                            slong prec)
{
    bb_heap hp = { NULL, 0, 0 };
    int st = EMBZ_OK;
    fmpz_t a, b, m;
    arb_t h;
    arf_t bhi, gap;
    fmpz_init(a); fmpz_init(b); fmpz_init(m);
    arb_init(h);
    arf_init(bhi); arf_init(gap);

    /* the ends of every residue's range first: they often hold the maximum */
    for (ulong r = 0; st == EMBZ_OK && r < c->d; r++) {
        if (fmpz_cmp(slo + r, shi + r) > 0) continue;
        st = h_at_s(h, c, r, shi + r, prec);
        if (st == EMBZ_OK) st = h_at_s(h, c, r, slo + r, prec);
    }
    /* Coarse pass over s for all residues at once: since the tail sums only grow,
     *     h_r(s) <= (C(d hi + d - 1 - a) - C(lo - a)) / W   for lo <= s <= hi,
     * which discards long stretches far below the maximum. Stretches that survive are halved
     * on a log scale down to ratio 2, then handed to the Taylor models residue by residue. */
    if (st == EMBZ_OK) {
        slong cap = 64, top = 0;
        fmpz *stk = _fmpz_vec_init(2 * cap);
        /* the tail sums at a stretch's two ends, when its parent already had them: a split
         * shares one end with each half, so a stretch costs two new sums, not four */
        arb_ptr stv = _arb_vec_init(2 * cap);
        char *sth = flint_calloc((size_t) (2 * cap), 1);
        fmpz_t Slo, Shi, kk;
        arb_t y, ca, cb, ub;
        arf_t blo, u;
        fmpz_init(Slo); fmpz_init(Shi); fmpz_init(kk);
        arb_init(y); arb_init(ca); arb_init(cb); arb_init(ub);
        arf_init(blo); arf_init(u);
        fmpz_set(Slo, slo); fmpz_set(Shi, shi);
        for (ulong r = 1; r < c->d; r++) {
            if (fmpz_cmp(slo + r, Slo) < 0) fmpz_set(Slo, slo + r);
            if (fmpz_cmp(shi + r, Shi) > 0) fmpz_set(Shi, shi + r);
        }
        if (fmpz_cmp(Slo, Shi) <= 0) {
            fmpz_set(stk, Slo); fmpz_set(stk + 1, Shi); top = 1;
        }
        while (st == EMBZ_OK && top > 0) {
            if (should_stop(c)) { st = EMBZ_ERR_LIMIT; break; }
            if (c->decide != NULL && arb_is_finite(c->best)) {
                /* decision mode: a proven value above the threshold settles it */
                arb_get_lbound_arf(blo, c->best, prec);
                if (arf_cmp(blo, c->decide) > 0) { c->cut_short = 1; break; }
            }
            top--;
            fmpz_set(a, stk + 2 * top);
            fmpz_set(b, stk + 2 * top + 1);
            /* crude bound */
            fmpz_mul_ui(kk, b, c->d);
            fmpz_add_ui(kk, kk, c->d - 1);
            if (fmpz_cmp(kk, c->kmax) > 0) fmpz_set(kk, c->kmax);
            if (sth[2 * top + 1]) arb_set(cb, stv + 2 * top + 1);
            else st = pos_sum(cb, c, kk, prec);
            if (st != EMBZ_OK) break;
            if (sth[2 * top]) arb_set(ca, stv + 2 * top);
            else st = pos_sum(ca, c, a, prec);
            if (st != EMBZ_OK) break;
            arb_sub(ub, cb, ca, prec);
            arb_div(ub, ub, c->W, prec);
            c->evals++;
            arb_get_ubound_arf(u, ub, prec);
            arb_get_lbound_arf(blo, c->best, prec);
            if (arb_is_finite(ub) && arb_is_finite(c->best) && arf_cmp(u, blo) < 0)
                continue;                     /* the whole stretch is below a proven value */
            fmpz_mul_2exp(m, a, 1);
            if (fmpz_cmp(m, b) >= 0 || use_vmodel(c, a)) {
                /* ratio at most 2 (or v-models, which take any ratio): models per residue */
                for (ulong r = 0; st == EMBZ_OK && r < c->d; r++) {
                    fmpz_t lo_r, hi_r;
                    fmpz_init(lo_r); fmpz_init(hi_r);
                    fmpz_set(lo_r, fmpz_cmp(a, slo + r) > 0 ? a : slo + r);
                    fmpz_set(hi_r, fmpz_cmp(b, shi + r) < 0 ? b : shi + r);
                    if (fmpz_cmp(lo_r, hi_r) <= 0) st = bb_consider(&hp, c, r, lo_r, hi_r, prec);
                    fmpz_clear(lo_r); fmpz_clear(hi_r);
                }
                continue;
            }
            /* split at the geometric mean; push the lower half first so the upper half,
             * where maxima usually sit, is examined first */
            fmpz_mul(m, a, b);
            fmpz_sqrt(m, m);
            if (fmpz_cmp(m, a) <= 0) fmpz_add_ui(m, a, 1);
            if (top + 2 > cap) {
                fmpz *ns = _fmpz_vec_init(4 * cap);
                arb_ptr nv = _arb_vec_init(4 * cap);
                char *nh = flint_calloc((size_t) (4 * cap), 1);
                _fmpz_vec_set(ns, stk, 2 * top);
                _arb_vec_swap(nv, stv, 2 * top);
                memcpy(nh, sth, (size_t) (2 * top));
                _fmpz_vec_clear(stk, 2 * cap);
                _arb_vec_clear(stv, 2 * cap);
                flint_free(sth);
                stk = ns;
                stv = nv;
                sth = nh;
                cap *= 2;
            }
            /* [a, m - 1] keeps C(a); [m, b] keeps C(position of b) */
            fmpz_set(stk + 2 * top, a);
            fmpz_sub_ui(stk + 2 * top + 1, m, 1);
            arb_set(stv + 2 * top, ca);
            sth[2 * top] = 1;
            sth[2 * top + 1] = 0;
            top++;
            fmpz_set(stk + 2 * top, m);
            fmpz_set(stk + 2 * top + 1, b);
            arb_set(stv + 2 * top + 1, cb);
            sth[2 * top] = 0;
            sth[2 * top + 1] = 1;
            top++;
        }
        _fmpz_vec_clear(stk, 2 * cap);
        _arb_vec_clear(stv, 2 * cap);
        flint_free(sth);
        fmpz_clear(Slo); fmpz_clear(Shi); fmpz_clear(kk);
        arb_clear(y); arb_clear(ca); arb_clear(cb); arb_clear(ub);
        arf_clear(blo); arf_clear(u);
    }
    /* best first: always refine the interval with the largest bound */
    while (st == EMBZ_OK && hp.len > 0) {
        if (should_stop(c)) { st = EMBZ_ERR_LIMIT; break; }
        arb_get_ubound_arf(bhi, c->best, prec);
        arf_sub(gap, hp.v[0].U, bhi, prec, ARF_RND_UP);
        if (arf_cmp(gap, tol) <= 0 || c->evals > c->bb_budget) break;
        if (c->decide != NULL) {
            /* decision mode: enough once a proven value exceeds the threshold, or once every
             * bound is below it */
            arf_t blo2;
            arf_init(blo2);
            arb_get_lbound_arf(blo2, c->best, prec);
            int above = arb_is_finite(c->best) && arf_cmp(blo2, c->decide) > 0;
            int below = arf_cmp(hp.v[0].U, c->decide_lo) < 0
                        && arf_cmp(c->upper, c->decide_lo) < 0;
            arf_clear(blo2);
            if (above || below) {
                /* the remaining heap bounds the rest (added below); an early stop above the
                 * threshold leaves the upper end to those bounds as well */
                break;
            }
        }
        bb_item it;
        heap_pop(&hp, &it);
        /* split at the geometric mean when the ratio is large, else at the midpoint */
        fmpz_mul_2exp(m, it.lo, 1);
        if (fmpz_cmp(m, it.hi) < 0) {
            fmpz_mul(m, it.lo, it.hi);
            fmpz_sqrt(m, m);
        } else {
            fmpz_add(m, it.lo, it.hi);
            fmpz_fdiv_q_2exp(m, m, 1);
        }
        if (fmpz_cmp(m, it.lo) < 0) fmpz_set(m, it.lo);
        if (fmpz_cmp(m, it.hi) >= 0) fmpz_sub_ui(m, it.hi, 1);
        /* a value at the split point sharpens the best proven value; in the v-model range the
         * ends of the residue ranges (evaluated first) usually hold it already, and an exact
         * value there costs more than the models, so it is skipped */
        if (!use_vmodel(c, it.lo)) {
            st = h_at_s(h, c, it.r, m, prec);
            if (st == EMBZ_OK) st = bb_consider(&hp, c, it.r, it.lo, m, prec);
            fmpz_add_ui(m, m, 1);
            if (st == EMBZ_OK) st = bb_consider(&hp, c, it.r, m, it.hi, prec);
        } else {
            /* v-models: a stretch whose model did not settle it is cut at once into pieces
             * of equal ratio: of length 8 in v = ln s while it is longer than that (the
             * reach of the wide models), else of length below 0.7 (where the full models
             * prove monotonicity; VMODEL_SPLIT_PIECE with the split of w), so that few models
             * are spent on intermediate lengths */
            double vw = fmpz_dlog(it.hi) - fmpz_dlog(it.lo);
            double full = c->t->usplit ? VMODEL_SPLIT_PIECE : 0.7;
            slong k = vw > 8.0 ? (slong) ceil(vw / 8.0) : (vw > full ? (slong) ceil(vw / full) : 2);
            st = consider_pieces(&hp, c, it.r, it.lo, it.hi, FLINT_MIN(k, 4096), prec);
        }
        item_clear(&it);
    }
    /* whatever is left bounds the maximum from above */
    if (hp.len > 0 && arf_cmp(hp.v[0].U, c->upper) > 0) arf_set(c->upper, hp.v[0].U);
    for (slong i = 0; i < hp.len; i++) item_clear(hp.v + i);
    flint_free(hp.v);
    fmpz_clear(a); fmpz_clear(b); fmpz_clear(m);
    arb_clear(h);
    arf_clear(bhi); arf_clear(gap);
    return st;
}

/* ---------- set-up ---------- */

static void free_layout(actx *c)
{
    if (c->A) _arb_vec_clear(c->A, c->M);
    if (c->B) _arb_vec_clear(c->B, c->M);
    if (c->vals) _arb_vec_clear(c->vals, c->E + 1);
    if (c->S) _arb_vec_clear(c->S, c->E + 1);
    if (c->ins_val) _arb_vec_clear(c->ins_val, c->M);
    if (c->ins_cum) _arb_vec_clear(c->ins_cum, c->M + 1);
    if (c->ins_pos) _fmpz_vec_clear(c->ins_pos, c->M);
    c->A = c->B = c->vals = c->S = c->ins_val = c->ins_cum = NULL;
    c->ins_pos = NULL;
    c->nins = 0;
}

/* After sorting by midpoints, runs of neighbours whose order the balls do not certify (equal
 * weights, or weights closer than the radii) are replaced by the union of the run: whatever
 * the true order inside the run, every position then encloses its true sorted value, and the
 * prefix sums enclose the true Ky Fan sums. */
static void merge_unordered(arb_ptr v, slong len, slong prec)
{
    slong i = 0;
    while (i + 1 < len) {
        if (arb_ge(v + i, v + i + 1)) { i++; continue; }
        slong j = i + 1;
        while (j + 1 < len && !arb_ge(v + j, v + j + 1)) j++;
        arb_t u;
        arb_init(u);
        arb_set(u, v + i);
        for (slong k = i + 1; k <= j; k++) arb_union(u, u, v + k, prec);
        for (slong k = i; k <= j; k++) arb_set(v + k, u);
        arb_clear(u);
        i = j + 1;
    }
}

static int cmp_desc(const void *x, const void *y)
{
    const arb_struct *a = x, *b = y;
    return -arf_cmp(arb_midref(a), arb_midref(b));
}

static int setup(actx *c, slong M, int shared, slong prec, embz_err_t *err)
{
    const embz_expr_struct *w = c->f->weight;
    int st;
    arb_t nn, x, v, tmax, tmin;
    arb_ptr head = _arb_vec_init(M);
    arb_init(nn); arb_init(x); arb_init(v); arb_init(tmax); arb_init(tmin);
    arb_set_round_fmpz(nn, c->ntrue, prec);
    c->M = M;

    if (!shared) {
        st = embz_tail_init(c->t, w, c->ntrue, M, c->ntrue, prec, err);
        if (st != EMBZ_OK) goto out;
    }
    /* the tail may end early when the weights beyond are negligible */
    if (fmpz_cmp(c->t->end, c->ntrue) < 0) fmpz_set(c->n, c->t->end);
    else fmpz_set(c->n, c->ntrue);
    fmpz_sub_ui(c->L, c->n, (ulong) M);

    for (slong i = 1; i <= M; i++) {
        arb_set_si(x, i);
        if (embz_expr_eval_arb(head + i - 1, w, x, nn, prec) != EMBZ_OK
            || !arb_is_nonnegative(head + i - 1)) {
            st = embz_err_set(err, EMBZ_ERR_DOMAIN, "weight undefined or negative at i = %ld", i);
            goto out;
        }
    }
    /* tail extremes: dec: [f(n), f(M+1)], inc: [f(M+1), f(n)] */
    arb_set_si(x, M + 1);
    embz_expr_eval_arb(v, w, x, nn, prec);
    arb_set_fmpz(x, c->n);
    embz_expr_eval_arb(x, w, x, nn, prec);
    if (c->t->dir > 0) { arb_set(tmax, v); arb_set(tmin, x); }
    else { arb_set(tmax, x); arb_set(tmin, v); }
    if (!arb_is_nonnegative(tmin)) {
        /* say which: a value certainly below 0, or one whose sign this precision cannot tell */
        char at[32];
        if (c->t->dir > 0) snprintf(at, sizeof(at), "n");
        else snprintf(at, sizeof(at), "%ld", (long) M + 1);
        st = embz_err_set(err, EMBZ_ERR_DOMAIN, arb_is_negative(tmin)
                          ? "weight is negative in the tail (at i = %s)"
                          : !arb_is_finite(tmin) ? "weight is undefined in the tail (at i = %s)"
                          : "the sign of the weight at i = %s cannot be told at this precision "
                            "(more bits, --prec, may help)", at);
        goto out;
    }
    c->a = c->b = 0;
    c->nins = 0;
    c->A = _arb_vec_init(M);
    c->B = _arb_vec_init(M);
    c->ins_val = _arb_vec_init(M);
    c->ins_cum = _arb_vec_init(M + 1);
    c->ins_pos = _fmpz_vec_init(M);
    {
        /* head weights inside the range of the tail are inserted where they belong: after
         * the tail positions whose weight is certainly larger (bisection on the index) */
        fmpz *cnt = _fmpz_vec_init(M);
        fmpz_t lo, hi, mid;
        fmpz_init(lo); fmpz_init(hi); fmpz_init(mid);
        for (slong i = 0; i < M && st == EMBZ_OK; i++) {
            if (arb_ge(head + i, tmax)) { arb_set(c->A + c->a++, head + i); continue; }
            if (arb_le(head + i, tmin)) { arb_set(c->B + c->b++, head + i); continue; }
            /* its place: the number of tail weights above it */
            fmpz_add_ui(mid, c->L, (ulong) M);
            int cst = embz_tail_count(lo, c->t, head + i, mid, prec);
            /* neighbouring weights near an index beyond 2^prec differ by less than the
             * working precision: this one bisection gets the bits of n as well */
            if (cst == EMBZ_ERR_PREC) {
                slong hp = prec + (slong) fmpz_bits(c->n) + 16;
                arb_set_si(x, i + 1);
                cst = embz_expr_eval_arb(v, w, x, nn, hp);
                if (cst == EMBZ_OK) cst = embz_tail_count(lo, c->t, v, mid, hp);
            }
            if (cst != EMBZ_OK)
                st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                                  "the weight at i = %ld cannot be placed among the tail "
                                  "weights at this precision (more bits, --prec, may help)",
                                  i + 1);
            if (st != EMBZ_OK) break;
            arb_set(c->ins_val + c->nins, head + i);
            fmpz_set(cnt + c->nins, lo);
            c->nins++;
        }
        if (st == EMBZ_OK) {
            /* order the insertions by place, then by value (insertion sort: few) */
            for (slong i = 1; i < c->nins; i++)
                for (slong j = i; j > 0; j--) {
                    int cmp = fmpz_cmp(cnt + j - 1, cnt + j);
                    if (cmp < 0 || (cmp == 0 && arf_cmp(arb_midref(c->ins_val + j - 1),
                                                        arb_midref(c->ins_val + j)) >= 0))
                        break;
                    fmpz_swap(cnt + j - 1, cnt + j);
                    arb_swap(c->ins_val + j - 1, c->ins_val + j);
                }
            arb_zero(c->ins_cum);
            for (slong i = 0; i < c->nins; i++) {
                /* P_i = a + (tail positions before) + (insertions before, this one included) */
                fmpz_add_ui(c->ins_pos + i, cnt + i, (ulong) (i + 1));
                arb_add(c->ins_cum + i + 1, c->ins_cum + i, c->ins_val + i, prec);
            }
        }
        _fmpz_vec_clear(cnt, M);
        fmpz_clear(lo); fmpz_clear(hi); fmpz_clear(mid);
        if (st != EMBZ_OK) goto out;
    }
    qsort(c->A, c->a, sizeof(arb_struct), cmp_desc);
    qsort(c->B, c->b, sizeof(arb_struct), cmp_desc);
    merge_unordered(c->A, c->a, prec);
    merge_unordered(c->B, c->b, prec);
    merge_unordered(c->ins_val, c->nins, prec);   /* equal places: unions, see above */
    for (slong i = 0; i < c->nins; i++) fmpz_add_ui(c->ins_pos + i, c->ins_pos + i, (ulong) c->a);
    arb_zero(c->SA);
    for (slong i = 0; i < c->a; i++) arb_add(c->SA, c->SA, c->A + i, prec);
    arb_zero(c->SB);
    for (slong i = 0; i < c->b; i++) arb_add(c->SB, c->SB, c->B + i, prec);
    c->off_k = c->off_s = c->a;
    arb_zero(c->dH);
    /* total tail */
    arb_set_fmpz(x, c->n);
    st = embz_tail_sum(c->Ttot, c->t, x, prec);
    if (st != EMBZ_OK) { embz_err_set(err, st, "cannot bound the tail sum"); goto out; }
    arb_add(c->W, c->SA, c->Ttot, prec);
    arb_add(c->W, c->W, c->SB, prec);
    arb_add(c->W, c->W, c->ins_cum + c->nins, prec);
    if (!arb_is_positive(c->W)) { st = embz_err_set(err, EMBZ_ERR_DOMAIN, "total weight is 0"); goto out; }
    {
        mag_t wl;
        mag_init(wl);
        arb_get_mag_lower(wl, c->W);
        mag_div(c->rslack, c->t->rem, wl);
        mag_mul_2exp_si(c->rslack, c->rslack, 1);
        mag_clear(wl);
    }

    /* explicit positions 1..E (past the insertions, so that the smooth region starts inside
     * the tail) */
    c->E = (slong) c->d * (c->a + c->nins + 2) + (slong) c->d;
    if (c->nins > 0) {
        slong last = fmpz_get_si(c->ins_pos + c->nins - 1);
        if (fmpz_bits(c->ins_pos + c->nins - 1) < 40 && last + 2 > c->E) c->E = last + 2;
    }
    c->vals = _arb_vec_init(c->E + 1);
    c->S = _arb_vec_init(c->E + 1);
    {
        fmpz_t K;
        fmpz_init(K);
        for (slong k = 1; k <= c->E; k++) {
            if (k <= c->a) arb_set(c->vals + k, c->A + k - 1);
            else {
                slong at, cb;
                fmpz_set_si(K, k);
                cb = ins_before(c, K, &at);
                if (at >= 0) arb_set(c->vals + k, c->ins_val + at);
                else {
                    arb_set_si(v, k - c->a - cb);
                    tail_x(x, c, v, prec);
                    if (embz_expr_eval_arb(c->vals + k, w, x, nn, prec) != EMBZ_OK) {
                        st = embz_err_set(err, EMBZ_ERR_DOMAIN, "weight undefined in the tail");
                        break;
                    }
                }
            }
            arb_add(c->S + k, c->S + k - 1, c->vals + k, prec);
        }
        fmpz_clear(K);
    }
out:
    _arb_vec_clear(head, M);
    arb_clear(nn); arb_clear(x); arb_clear(v); arb_clear(tmax); arb_clear(tmin);
    return st;
}

/* ---------- general targets: the threshold form ----------
 *
 * E_n(q) = max_(t >= 0) F(t),  F(t) = Phi(t) - sum_j q_j Phi(t / q_j),
 * Phi(t) = sum_i (p_i - t)_+. In weight units (V = t W): W Phi = S(N(V)) - N(V) V with
 * N(V) = #{i : w_i > V} (A, B and the inserted head weights by comparison, the tail by
 * embz_tail_count_range) and S(N) the sum of the N largest weights (pos_sum). Phi
 * decreases, so on [V1, V2]:  W F <= W Phi(V1) - sum_j q_j W Phi(V2 / q_j) (first order;
 * threshold_bound2 gives the second-order bound), and values at points are lower bounds.
 * Below V_lo = q_m w_min, F = n V (m - 1) / W increases; above the largest weight F = 0.
 * The search runs best first in ln V over [V_lo, V_hi]. */

/* *k += the number of the len values above V; EMBZ_ERR_PREC when one cannot be compared */
static int count_above(slong *k, arb_srcptr v, slong len, const arb_t V)
{
    for (slong i = 0; i < len; i++) {
        if (arb_gt(v + i, V)) (*k)++;
        else if (!arb_le(v + i, V)) return EMBZ_ERR_PREC;
    }
    return EMBZ_OK;
}

/* V moved by 2^-40 of itself (dir > 0: up, else down), as an exact midpoint */
static void nudge(arb_t V, int dir, slong prec)
{
    arb_t e;
    arb_init(e);
    arb_mul_2exp_si(e, V, -40);
    if (dir > 0) arb_add(V, V, e, prec);
    else arb_sub(V, V, e, prec);
    arb_set_arf(V, arb_midref(V));
    arb_clear(e);
}

/* W Phi(V) and (Nlo, Nhi, may be NULL) bounds on N(V). Tail weights that cannot be told apart
 * from V at this precision are allowed: with Nlo weights certainly above V, and the N(V) - Nlo
 * others above V by at most tie each (embz_tail_count_range),
 *     S(Nlo) - Nlo V <= W Phi(V) <= S(Nlo) - Nlo V + (Nhi - Nlo) tie
 * (S(N) - N V <= W Phi(V) for every N; and the (Nlo+1)-th largest weight is at most V + tie,
 * as every larger one is counted in Nlo). EMBZ_ERR_PREC when a head weight ties with V. */
static int phi_wn(arb_t res, fmpz_t Nlo, fmpz_t Nhi, actx *c, const arb_t V, slong prec)
{
    fmpz_t N, clo, chi;
    arb_t tie;
    fmpz_init(N); fmpz_init(clo); fmpz_init(chi);
    arb_init(tie);
    slong k = 0;
    int st = count_above(&k, c->A, c->a, V);
    if (st == EMBZ_OK) st = count_above(&k, c->ins_val, c->nins, V);
    if (st == EMBZ_OK) st = count_above(&k, c->B, c->b, V);
    if (st == EMBZ_OK) st = embz_tail_count_range(clo, chi, tie, c->t, V, c->n, prec);
    if (st == EMBZ_OK) {
        fmpz_add_si(N, clo, k);
        st = pos_sum(res, c, N, prec);
        arb_t nv;
        arb_init(nv);
        arb_mul_fmpz(nv, V, N, prec);
        arb_sub(res, res, nv, prec);
        if (fmpz_cmp(chi, clo) > 0) {
            /* + [0, (Nhi - Nlo) tie] */
            fmpz_sub(N, chi, clo);
            arb_mul_fmpz(nv, tie, N, prec);
            arb_mul_2exp_si(nv, nv, -1);
            arb_add(res, res, nv, prec);
            arb_add_error(res, nv);
        }
        arb_clear(nv);
        if (Nlo != NULL) fmpz_add_si(Nlo, clo, k);
        if (Nhi != NULL) fmpz_add_si(Nhi, chi, k);
    }
    fmpz_clear(N); fmpz_clear(clo); fmpz_clear(chi);
    arb_clear(tie);
    return st;
}


/* The target as the threshold form sees it: its distinct nonzero entries v_j (non-increasing),
 * v_j standing for mult_j equal entries. A target vector keeps each nonzero entry with
 * multiplicity 1; the uniform target u_d is the one entry 1/d with multiplicity d, so its
 * cost does not grow with d: sum_j q_j Phi(V/q_j) = Phi(d V). */
typedef struct {
    slong len, alloc;
    fmpq *v;
    ulong *mult;
} th_target;

static void th_target_init(th_target *t, const embz_target_t q)
{
    slong len = q->kind == EMBZ_TARGET_UNIFORM ? 1 : q->q->len;
    t->v = _fmpq_vec_init(len);
    t->mult = flint_malloc(sizeof(ulong) * (size_t) len);
    t->len = 0;
    t->alloc = len;
    if (q->kind == EMBZ_TARGET_UNIFORM) {
        fmpq_set_si(t->v, 1, q->d);
        t->mult[0] = q->d;
        t->len = 1;
        return;
    }
    for (slong j = 0; j < len; j++) {
        if (fmpq_is_zero(q->q->p + j)) continue;
        fmpq_set(t->v + t->len, q->q->p + j);
        t->mult[t->len++] = 1;
    }
}

static void th_target_clear(th_target *t)
{
    _fmpq_vec_clear(t->v, t->alloc);
    flint_free(t->mult);
}

/* W F at a point with what the bounds below need: P0 = W Phi(V) (for the chord of the smooth
 * models), n = N(V) lo, hi and sum_j N(V/q_j) lo, hi (second-order bound), tn each term's
 * count range, N(V) in [tn[0], tn[1]] and N(V/q_j) in [tn[2j+2], tn[2j+3]] (smooth models;
 * kept for targets of at most TH_MODEL_TERMS entries, else NULL); ok when known */
typedef struct {
    arb_t F, P0;
    fmpz n[4];
    fmpz *tn;
    slong tlen;
    int ok;
} th_end;

static void th_end_init(th_end *e, const th_target *q)
{
    arb_init(e->F);
    arb_init(e->P0);
    for (int k = 0; k < 4; k++) fmpz_init(e->n + k);
    e->tlen = q->len <= TH_MODEL_TERMS ? 2 * q->len + 2 : 0;
    e->tn = e->tlen > 0 ? _fmpz_vec_init(e->tlen) : NULL;
    e->ok = 0;
}

static void th_end_clear(th_end *e)
{
    arb_clear(e->F);
    arb_clear(e->P0);
    for (int k = 0; k < 4; k++) fmpz_clear(e->n + k);
    if (e->tn != NULL) _fmpz_vec_clear(e->tn, e->tlen);
}

static void th_end_set(th_end *d, const th_end *e)
{
    arb_set(d->F, e->F);
    arb_set(d->P0, e->P0);
    for (int k = 0; k < 4; k++) fmpz_set(d->n + k, e->n + k);
    if (d->tn != NULL) _fmpz_vec_set(d->tn, e->tn, d->tlen);
    d->ok = e->ok;
}

/* The upper bound W Phi(V1) - sum_j q_j W Phi(V2/q_j) of W F on [V1, V2] (W F at V when
 * V1 = V2 = V); e (may be NULL, only with V1 = V2) receives the value with its counts. */
static int threshold_f(arb_t res, th_end *e, actx *c, const th_target *q, const arb_t V1,
                       const arb_t V2, slong prec)
{
    arb_t u, qj, x;
    fmpz_t klo, khi;
    arb_init(u); arb_init(qj); arb_init(x);
    fmpz_init(klo); fmpz_init(khi);
    int st = phi_wn(res, klo, khi, c, V1, prec);
    if (e != NULL) {
        arb_set(e->P0, res);
        fmpz_set(e->n, klo);
        fmpz_set(e->n + 1, khi);
        fmpz_zero(e->n + 2);
        fmpz_zero(e->n + 3);
        if (e->tn != NULL) { fmpz_set(e->tn, klo); fmpz_set(e->tn + 1, khi); }
    }
    for (slong j = 0; j < q->len && st == EMBZ_OK; j++) {
        arb_set_fmpq(qj, q->v + j, prec);
        arb_div(x, V2, qj, prec);
        st = phi_wn(u, klo, khi, c, x, prec);
        arb_mul_ui(qj, qj, q->mult[j], prec);
        arb_submul(res, u, qj, prec);
        if (e != NULL) {
            fmpz_addmul_ui(e->n + 2, klo, q->mult[j]);
            fmpz_addmul_ui(e->n + 3, khi, q->mult[j]);
            if (e->tn != NULL) {
                fmpz_set(e->tn + 2 * j + 2, klo);
                fmpz_set(e->tn + 2 * j + 3, khi);
            }
        }
    }
    arb_clear(u); arb_clear(qj); arb_clear(x);
    fmpz_clear(klo); fmpz_clear(khi);
    c->evals++;
    return st;
}

static int th_end_eval(th_end *e, actx *c, const th_target *q, const arb_t V, slong prec)
{
    int st = threshold_f(e->F, e, c, q, V, V, prec);
    e->ok = (st == EMBZ_OK);
    return st;
}

/* Second-order bound of W F on [A, B]. F' = -N(t) + sum_j N(t/q_j) (N(t): the number of
 * weights above t, non-increasing), so on [A, B]
 *     F' <= sum_j N(A/q_j) - N(B)   and   -F' <= N(A) - sum_j N(B/q_j),
 * hence F <= F(A) + (B - A) max(0, sum_j N(A/q_j) - N(B)) and
 *       F <= F(B) + (B - A) max(0, N(A) - sum_j N(B/q_j))
 * (counts taken at the ends of their certified ranges that make these larger). Near the
 * maximum the count differences are small, so the slack falls like (B - A)^2 where the
 * first-order bound W Phi(A) - sum_j q_j W Phi(B/q_j) keeps a slack of order (B - A) N. Sets
 * U to the smaller upper bound. The values at the ends come from ea, eb when known there
 * (a split point is an end of both halves), else they are computed and kept in them. */
static int threshold_bound2(arf_t U, actx *c, const th_target *q, const arb_t A,
                            const arb_t B, th_end *ea, th_end *eb, slong prec)
{
    arb_t w, t;
    fmpz_t s;
    arf_t u;
    arb_init(w); arb_init(t);
    fmpz_init(s);
    arf_init(u);
    int st = ea->ok ? EMBZ_OK : th_end_eval(ea, c, q, A, prec);
    if (st == EMBZ_OK && !eb->ok) st = th_end_eval(eb, c, q, B, prec);
    if (st == EMBZ_OK) {
        arb_sub(w, B, A, prec);
        fmpz_sub(s, ea->n + 3, eb->n);
        if (fmpz_sgn(s) < 0) fmpz_zero(s);
        arb_mul_fmpz(t, w, s, prec);
        arb_add(t, t, ea->F, prec);
        arb_get_ubound_arf(U, t, prec);
        fmpz_sub(s, ea->n + 1, eb->n + 2);
        if (fmpz_sgn(s) < 0) fmpz_zero(s);
        arb_mul_fmpz(t, w, s, prec);
        arb_add(t, t, eb->F, prec);
        arb_get_ubound_arf(u, t, prec);
        if (arf_cmp(u, U) < 0) arf_set(U, u);
        if (!arf_is_finite(U)) st = EMBZ_ERR_PREC;
    }
    arb_clear(w); arb_clear(t);
    fmpz_clear(s);
    arf_clear(u);
    return st;
}

/* ---------- smooth models of F over wide threshold intervals ----------
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
 * in each term) cancel exactly in the model, and the bound (taylor_bound) is tight to the
 * slack. A term in neither regime (an interval across a weight of the head or across the
 * smallest weight) leaves the interval to the bounds above. */

/* the log-position s = ln x (x = M + y) with f(x) = T as a tight ball, given
 * s in [slo, shi]: Newton on midpoints of L(s) = ln f(e^s), then L(s-) > ln T > L(s+) is
 * verified (L decreases on the tail) */
static int tail_root(arb_t s0, actx *c, const arb_t lnT, const arb_t slo, const arb_t shi,
                     slong prec)
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
    if (st == EMBZ_OK) st = tail_root(s0, c, lnT0, slo, shi, prec);
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
        st = tail_C(ps, c, ym, lev, prec);
        arb_submul(ps, ym, T0, prec);
        if (st == EMBZ_OK) {
            arb_one(dc);
            st = tail_C_series(cs, c, t, dc, 2, lev, prec);
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
    int st = pos_sum(ps, c, K, prec);
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
static int threshold_model(arf_t U, actx *c, const th_target *q, const arb_t A,
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
        st = taylor_bound(U, &mono, co, J, dl, slack, NULL, ends, prec);
    }
    _arb_vec_clear(co, J + 1); _arb_vec_clear(ps, J + 1); _arb_vec_clear(ends, 2);
    arb_clear(ua); arb_clear(ub); arb_clear(u0); arb_clear(dl); arb_clear(uw); arb_clear(qj);
    arb_clear(T0); arb_clear(Tw); arb_clear(Tmin); arb_clear(Tmax); arb_clear(t);
    arb_clear(lnT0); arb_clear(lnTw);
    mag_clear(slack); mag_clear(rho);
    return st;
}

/* a point near V where every comparison is decided (V itself, else nudged by 2^-40 relative
 * steps in the given direction); e receives the value with its counts */
static int threshold_point(arb_t res, th_end *e, actx *c, const th_target *q, arb_t V,
                           int dir, slong prec)
{
    int st = EMBZ_ERR_PREC;
    for (int tries = 0; tries < 8 && st == EMBZ_ERR_PREC; tries++) {
        st = th_end_eval(e, c, q, V, prec);
        if (st == EMBZ_ERR_PREC) nudge(V, dir >= 0 ? 1 : -1, prec);
    }
    arb_set(res, e->F);
    return st;
}

/* an interval [a, b] of thresholds with its bound U and what is known at its ends */
typedef struct { arf_t a, b, U; th_end ea, eb; } th_item;

static void th_item_init(th_item *it, const th_target *q)
{
    arf_init(it->a); arf_init(it->b); arf_init(it->U);
    th_end_init(&it->ea, q); th_end_init(&it->eb, q);
}

static void th_item_clear(th_item *it)
{
    arf_clear(it->a); arf_clear(it->b); arf_clear(it->U);
    th_end_clear(&it->ea); th_end_clear(&it->eb);
}

/* Lowers the first-order bound f of W F over [A, B] where it is not already below the best
 * value: by the second-order bound (it needs the values and counts at both ends, ea and eb),
 * then, while still above the tolerance, by the smooth model. Not on intervals wider than a
 * factor 2^24: neither helps there. Returns the evaluations spent (0 or 1). */
static int threshold_refine(arb_t f, actx *c, const th_target *q, const arb_t A,
                            const arb_t B, th_end *ea, th_end *eb, const arf_t best,
                            const arb_t tol, slong prec)
{
    arf_t U, bnd;
    arb_t w;
    arf_init(U); arf_init(bnd);
    arb_init(w);
    int spent = 0;
    arb_get_ubound_arf(bnd, f, prec);
    arb_mul_2exp_si(w, A, 24);
    if (arf_cmp(bnd, best) >= 0 && !arb_gt(B, w)
        && threshold_bound2(U, c, q, A, B, ea, eb, prec) == EMBZ_OK) {
        spent = 1;
        if (arf_cmp(U, bnd) < 0) {
            arb_set_arf(f, U);
            arf_set(bnd, U);
        }
        arf_sub(U, bnd, best, prec, ARF_RND_UP);
        if (arf_cmp(U, arb_midref(tol)) > 0
            && threshold_model(U, c, q, A, B, ea, eb, prec) == EMBZ_OK && arf_cmp(U, bnd) < 0)
            arb_set_arf(f, U);
    }
    arf_clear(U); arf_clear(bnd);
    arb_clear(w);
    return spent;
}

/* the search's tolerance is at least 4 times the radius of a value: intervals cannot be
 * settled more finely than the values themselves are known */
static void raise_tol(arb_t tol, const arb_t f)
{
    arf_t r;
    arf_init(r);
    arf_set_mag(r, arb_radref(f));
    arf_mul_2exp_si(r, r, 2);
    if (arf_cmp(r, arb_midref(tol)) > 0) arb_set_arf(tol, r);
    arf_clear(r);
}

/* best-first search; fills *lo (proven value, lower end) and *hi (upper bound) of W E, and
 * c->argk with the count N(V) at the point V of the best proven value: at a maximising
 * threshold t, k = N_p(t) is a maximising Ky Fan index (||p||_(k) = k t + Phi_p(t) there,
 * ||p (x) q||_(k) <= k t + Phi_(p (x) q)(t)), so this is the argmax up to the tolerance (the
 * lower end of the count's range where weights tie with V) */
static int threshold_search(arf_t lo, arf_t hi, actx *c, const th_target *q, slong budget,
                            slong prec)
{
    slong cap = 64, len = 0;
    th_item *h = flint_malloc(sizeof(th_item) * cap);
    arb_t V, Va, Vb, f, wmin, qm, tol;
    arf_t best, bnd;
    arb_init(V); arb_init(Va); arb_init(Vb); arb_init(f); arb_init(wmin); arb_init(qm);
    arb_init(tol);
    arf_init(best); arf_init(bnd);
    int st = EMBZ_OK;
    /* V_hi: the largest weight; V_lo: q_m times the smallest one */
    fmpz_t K;
    fmpz_init(K);
    fmpz_one(K);
    st = pos_val(Vb, c, K, prec);
    if (st == EMBZ_OK) {
        fmpz_set(K, c->n);
        st = pos_val(wmin, c, K, prec);
    }
    fmpz_clear(K);
    slong m = q->len;
    arb_set_fmpq(qm, q->v + m - 1, prec);          /* the smallest entry */
    arb_mul(Va, wmin, qm, prec);
    {
        /* [V_lo, V_hi] rounded outwards */
        arf_t e;
        arf_init(e);
        arb_get_lbound_arf(e, Va, prec);
        arb_set_arf(Va, e);
        arb_get_ubound_arf(e, Vb, prec);
        arb_set_arf(Vb, e);
        arf_clear(e);
    }
    if (st == EMBZ_OK && !(arb_is_positive(Va) && arb_lt(Va, Vb)))
        st = EMBZ_ERR_UNSUPPORTED;      /* zero weights (or a single value): no search */
    /* kinks of F where a term's count saturates: V = q_j w_min (q_0 = 1 for Phi(V)); F has
     * a corner there (often the maximum), so intervals are split just below and just above
     * each (a relative 2^-(prec-12) outside the ball, past the weights that tie with it) */
    slong nk = 0, kcap = m <= TH_MODEL_TERMS ? 2 * (m + 1) : 0;
    arb_ptr kink = _arb_vec_init(kcap);          /* exact: midpoints */
    if (st == EMBZ_OK && kcap > 0) {
        for (slong j = -1; j < m; j++) {
            if (j >= 0) {
                arb_set_fmpq(f, q->v + j, prec);
                arb_mul(f, f, wmin, prec);
            } else {
                arb_set(f, wmin);
            }
            arb_mul_2exp_si(tol, f, -(prec - 12));
            arb_sub(V, f, tol, prec);
            arb_get_lbound_arf(arb_midref(kink + 2 * nk), V, prec);
            arb_add(V, f, tol, prec);
            arb_get_ubound_arf(arb_midref(kink + 2 * nk + 1), V, prec);
            nk++;
        }
    }
    if (st == EMBZ_OK) {
        /* a few more evaluations per unit of ln t: wide ranges are cut into pieces of a
         * factor e^2 .. e^8 before models settle them */
        arb_div(f, Vb, Va, prec);
        arb_log(f, f, prec);
        budget += 4 * (slong) arf_get_d(arb_midref(f), ARF_RND_UP);
    }
    arf_zero(best);                                  /* F(0) = 0 */
    arf_zero(hi);
    /* tolerance in weight units: 2^-(prec-16) W */
    arb_mul_2exp_si(tol, c->W, -(prec - 16));
    {
        /* but not below what the tail sums can resolve: their remainder bound enters every
         * value (and each term of a smooth model) */
        arb_t r;
        arb_init(r);
        arf_set_mag(arb_midref(r), c->t->rem);
        arb_mul_2exp_si(r, r, 3);
        if (arf_cmp(arb_midref(r), arb_midref(tol)) > 0) arb_set(tol, r);
        arb_clear(r);
    }
    th_end ev, ca, cb;
    th_end_init(&ev, q); th_end_init(&ca, q); th_end_init(&cb, q);
    if (st == EMBZ_OK) {
        st = threshold_point(f, &ev, c, q, Va, -1, prec);
        if (st == EMBZ_OK) {
            raise_tol(tol, f);
            arb_get_lbound_arf(bnd, f, prec);
            if (arf_cmp(bnd, best) > 0) { arf_set(best, bnd); fmpz_set(c->argk, ev.n); }
            arb_get_ubound_arf(bnd, f, prec);    /* the maximum over [0, V_lo] is at V_lo */
            if (arf_cmp(bnd, hi) > 0) arf_set(hi, bnd);
        }
        if (st == EMBZ_OK) {
            th_item_init(h, q);
            th_end_set(&h[0].ea, &ev);
            arf_set(h[0].a, arb_midref(Va));
            arf_set(h[0].b, arb_midref(Vb));
            arf_pos_inf(h[0].U);
            len = 1;
        }
    }
    slong evals = 0;
    while (st == EMBZ_OK && len > 0) {
        if (should_stop(c)) { st = EMBZ_ERR_LIMIT; break; }
        /* the item with the largest bound */
        slong top = 0;
        for (slong i = 1; i < len; i++) if (arf_cmp(h[i].U, h[top].U) > 0) top = i;
        arf_sub(bnd, h[top].U, best, prec, ARF_RND_UP);
        if (arf_cmp(bnd, arb_midref(tol)) <= 0) break;
        if (evals > budget) { c->search_open = 1; break; }
        th_item it = h[top];
        h[top] = h[--len];
        /* split: just outside a kink inside the interval, else at the geometric mean while
         * the ratio exceeds 2, else at the midpoint */
        arb_set_arf(Va, it.a);
        arb_set_arf(Vb, it.b);
        arb_mul_2exp_si(V, Va, 1);
        slong kk;
        for (kk = 0; kk < 2 * nk; kk++)
            if (arf_cmp(it.a, arb_midref(kink + kk)) < 0
                && arf_cmp(arb_midref(kink + kk), it.b) < 0)
                break;
        if (kk < 2 * nk) {
            arb_set(V, kink + kk);
        } else if (arb_lt(V, Vb)) {
            arb_mul(V, Va, Vb, prec);
            arb_sqrt(V, V, prec);
        } else {
            arb_add(V, Va, Vb, prec);
            arb_mul_2exp_si(V, V, -1);
        }
        arb_set_arf(V, arb_midref(V));
        st = threshold_point(f, &ev, c, q, V, 1, prec);
        evals++;
        if (st != EMBZ_OK) { th_item_clear(&it); break; }
        raise_tol(tol, f);
        arb_get_lbound_arf(bnd, f, prec);
        if (arf_cmp(bnd, best) > 0) { arf_set(best, bnd); fmpz_set(c->argk, ev.n); }
        arb_get_ubound_arf(bnd, f, prec);
        if (arf_cmp(bnd, hi) > 0) arf_set(hi, bnd);
        /* the two halves with their bounds (if V was nudged past b, only the left one) */
        for (int side = 0; side < 2 && st == EMBZ_OK; side++) {
            arb_set_arf(Va, side == 0 ? it.a : arb_midref(V));
            arb_set_arf(Vb, side == 0 ? arb_midref(V) : it.b);
            if (!arb_lt(Va, Vb)) continue;
            /* bound endpoints nudged outwards until decided */
            arb_t A, B;
            arb_init(A); arb_init(B);
            arb_set(A, Va);
            arb_set(B, Vb);
            int ok = 0, tries;
            /* the values known at the ends: the parent's, and the split point's */
            th_end_set(&ca, side == 0 ? &it.ea : &ev);
            th_end_set(&cb, side == 0 ? &ev : &it.eb);
            for (tries = 0; tries < 8 && !ok; tries++) {
                int s2 = threshold_f(f, NULL, c, q, A, B, prec);
                if (s2 == EMBZ_OK) ok = 1;
                else if (s2 != EMBZ_ERR_PREC) { st = s2; break; }
                else {
                    nudge(A, -1, prec);
                    nudge(B, 1, prec);
                }
            }
            evals++;
            if (tries > 1) ca.ok = cb.ok = 0;      /* nudged ends: known values do not apply */
            if (st == EMBZ_OK && ok)
                evals += threshold_refine(f, c, q, A, B, &ca, &cb, best, tol, prec);
            if (st == EMBZ_OK) {
                if (len == cap) {
                    cap *= 2;
                    h = flint_realloc(h, sizeof(th_item) * cap);
                }
                th_item_init(h + len, q);
                arf_set(h[len].a, arb_midref(Va));
                arf_set(h[len].b, arb_midref(Vb));
                if (ok) arb_get_ubound_arf(h[len].U, f, prec);
                else arf_pos_inf(h[len].U);
                if (tries <= 1) {
                    th_end_set(&h[len].ea, &ca);
                    th_end_set(&h[len].eb, &cb);
                }
                if (arf_cmp(h[len].U, best) >= 0) len++;   /* else: below a proven value */
                else th_item_clear(h + len);
            }
            arb_clear(A); arb_clear(B);
        }
        th_item_clear(&it);
    }
    for (slong i = 0; i < len; i++) {
        if (arf_cmp(h[i].U, hi) > 0) arf_set(hi, h[i].U);
        th_item_clear(h + i);
    }
    th_end_clear(&ev); th_end_clear(&ca); th_end_clear(&cb);
    if (arf_cmp(hi, best) < 0) arf_set(hi, best);
    arf_set(lo, best);
    flint_free(h);
    _arb_vec_clear(kink, kcap);
    arb_clear(V); arb_clear(Va); arb_clear(Vb); arb_clear(f); arb_clear(wmin); arb_clear(qm);
    arb_clear(tol);
    arf_clear(best); arf_clear(bnd);
    return st;
}

void embz_analytic_init(embz_analytic_t a, const embz_family_t f, slong prec)
{
    memset(a, 0, sizeof(*a));
    a->f = f;
    a->prec = prec;
    a->uses_n = (embz_expr_uses(f->weight) & EMBZ_USES_N) != 0;
    fmpz_init(a->nmax);
}

void embz_analytic_clear(embz_analytic_t a)
{
    if (a->have_tail) embz_tail_clear(a->tail);
    fmpz_clear(a->nmax);
    if (a->have_decide) { arf_clear(a->decide); arf_clear(a->decide_lo); }
}

void embz_analytic_set_decision(embz_analytic_t a, const arb_t threshold)
{
    if (!a->have_decide) { arf_init(a->decide); arf_init(a->decide_lo); }
    a->have_decide = 1;
    /* above: beyond every point of the threshold's ball; below: under every point */
    arb_get_ubound_arf(a->decide, threshold, 4 * a->prec);
    arb_get_lbound_arf(a->decide_lo, threshold, 4 * a->prec);
}

void embz_analytic_set_limits(embz_analytic_t a, const volatile int *cancel, double seconds)
{
    a->cancel = cancel;
    a->deadline = seconds > 0 ? mono_seconds() + seconds : 0;
}

void embz_analytic_clear_decision(embz_analytic_t a)
{
    if (a->have_decide) { arf_clear(a->decide); arf_clear(a->decide_lo); }
    a->have_decide = 0;
}

/* Certify the tail once for all sizes up to nmax (weights that do not depend on n). */
int embz_analytic_prepare(embz_analytic_t a, const fmpz_t nmax, embz_err_t *err)
{
    if (a->uses_n) return EMBZ_OK;
    if (a->have_tail && fmpz_cmp(a->nmax, nmax) >= 0) return EMBZ_OK;
    if (a->have_tail) embz_tail_clear(a->tail);
    a->have_tail = 0;
    slong wp = a->prec + 32;
    int st = EMBZ_ERR_UNSUPPORTED;
    for (slong M = 64; M <= 4096; M *= 4) {
        embz_err_clear(err);
        st = embz_tail_init(a->tail, a->f->weight, nmax, M, nmax, wp, err);
        if (st == EMBZ_OK) {
            a->have_tail = 1;
            fmpz_set(a->nmax, nmax);
            break;
        }
        embz_tail_clear(a->tail);
        if (st == EMBZ_ERR_DOMAIN) break;
    }
    return st;
}

int embz_error_analytic(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                        const embz_target_t q, slong prec, embz_err_t *err)
{
    embz_analytic_t a;
    embz_analytic_init(a, f, prec);
    int st = embz_analytic_error(res, a, n, q, err);
    embz_analytic_clear(a);
    return st;
}

static int analytic_run(embz_error_result_t res, embz_analytic_t an, const fmpz_t n,
                        const embz_target_t q, embz_err_t *err);

/* A general target q (m nonzero entries, largest q_1) is bracketed by uniform ones:
 * u_m is majorized by q, and q by u_d' with d' = floor(1/q_1); tensoring with p keeps these
 * relations and K(p -> r) can only fall as r moves up in the majorization order, so
 *     E_n(u_d') <= E_n(q) <= E_n(u_m)     (E_n(u_1) = 0).
 * The result is a certified enclosure, wider than for uniform targets. */
static int vector_target_bounds(embz_error_result_t res, embz_analytic_t an, const fmpz_t n,
                                const embz_target_t q, embz_err_t *err)
{
    embz_target_t tu;
    embz_error_result_t rl;
    fmpz_t dl;
    arf_t lo, hi;
    int st;
    ulong m = (ulong) q->q->len;
    embz_target_init(tu);
    embz_error_result_init(rl);
    fmpz_init(dl);
    arf_init(lo); arf_init(hi);
    fmpz_fdiv_q(dl, fmpq_denref(q->q->p), fmpq_numref(q->q->p));   /* floor(1/q_1) */
    if (m < 2) {
        st = embz_err_set(err, EMBZ_ERR_INPUT, "the target must have at least two entries");
        goto out;
    }
    tu->kind = EMBZ_TARGET_UNIFORM;
    tu->d = m;
    st = embz_analytic_error(res, an, n, tu, err);
    if (st != EMBZ_OK) goto out;
    arb_get_ubound_arf(hi, res->error, an->prec);
    arf_zero(lo);
    if (fmpz_cmp_ui(dl, 2) >= 0) {
        tu->d = fmpz_get_ui(dl);
        st = embz_analytic_error(rl, an, n, tu, err);
        if (st != EMBZ_OK) goto out;
        arb_get_lbound_arf(lo, rl->error, an->prec);
    }
    {
        /* then the threshold form of E(q) itself; both enclosures hold, so their
         * intersection does (the bracket is kept when the search fails) */
        char inner[sizeof(res->detail)];
        snprintf(inner, sizeof(inner), "%s", res->detail);
        embz_err_t e2;
        embz_err_clear(&e2);
        /* its cost grows with the number of distinct entries (each evaluation counts the
         * weights above V/q_j for every j): beyond TH_SEARCH_TERMS the bracket is the result */
        int ts;
        if (m > TH_SEARCH_TERMS)
            ts = embz_err_set(&e2, EMBZ_ERR_LIMIT, "not run for %lu entries, more than %d",
                              m, TH_SEARCH_TERMS);
        else
            ts = analytic_run(rl, an, n, q, &e2);
        if (ts != EMBZ_OK && limits_reached(an->cancel, an->deadline)) {
            /* stopped by the caller's limits: a failure, not the bracket alone */
            if (err != NULL) *err = e2;
            st = ts;
            goto out;
        }
        int tight = 0, rdec = rl->decided;
        if (ts == EMBZ_OK) {
            arf_t a, b;
            arf_init(a); arf_init(b);
            arb_get_lbound_arf(a, rl->error, an->prec);
            arb_get_ubound_arf(b, rl->error, an->prec);
            if (arf_cmp(a, hi) <= 0 && arf_cmp(b, lo) >= 0) {
                if (arf_cmp(a, lo) > 0) arf_set(lo, a);
                if (arf_cmp(b, hi) < 0) arf_set(hi, b);
                tight = 1;
            } else {
                /* both should enclose E(q): disjoint means a fault, so neither is used
                 * beyond the bracket, and the detail says so */
                ts = EMBZ_ERR_PREC;
                snprintf(e2.text, sizeof(e2.text), "inconsistent with the bracket, ignored");
            }
            arf_clear(a); arf_clear(b);
        }
        if (arf_is_zero(lo) && arf_sgn(hi) > 0) {
            /* [0, hi] with hi rounded up to 30 bits is exactly the ball hi/2 +- hi/2, so the
             * lower end stays 0 (E >= 0; arb_set_interval_arf would round the radius up) */
            fmpz_t man, ex;
            fmpz_init(man); fmpz_init(ex);
            arf_set_round(hi, hi, MAG_BITS - 1, ARF_RND_UP);
            arf_get_fmpz_2exp(man, ex, hi);
            arf_mul_2exp_si(arb_midref(res->error), hi, -1);
            mag_set_ui_2exp_si(arb_radref(res->error), fmpz_get_ui(man), fmpz_get_si(ex) - 1);
            fmpz_clear(man); fmpz_clear(ex);
        } else {
            arb_set_interval_arf(res->error, lo, hi, an->prec);
        }
        res->estimate = NAN;   /* the middle of a bracket is no estimate of E(q) */
        /* decision mode: the side of the threshold from the final enclosure of E(q) (the
         * flag left by the bracket's runs is about other targets) */
        res->decided = 0;
        if (an->have_decide) {
            /* also the threshold run's own side, taken from the exact ends of its enclosure
             * (its ball, with a 30-bit radius, is coarser: a wide ball 1e-12 above the
             * threshold may reach below it) */
            if (arf_cmp(lo, an->decide) > 0 || (tight && rdec > 0)) res->decided = 1;
            else if (arf_cmp(hi, an->decide_lo) < 0 || (tight && rdec < 0)) res->decided = -1;
        }
        res->have_bounds = 0;
        /* the Ky Fan index of the best proven threshold value (see threshold_search) */
        if (tight) fmpz_set(res->argk, rl->argk);
        else fmpz_zero(res->argk);
        if (tight)
            snprintf(res->detail, sizeof(res->detail),
                     "analytic, general target: max_t Phi(t) - sum_j q_j Phi(t/q_j) by branch "
                     "and bound over ln t%s, within E(uniform:%lu) <= E(q) <= E(uniform:%lu) "
                     "(majorization); %.40s",
                     strstr(rl->detail, "budget reached") ? " (budget reached, upper end loose)"
                                                          : "",
                     fmpz_get_ui(dl) >= 2 ? fmpz_get_ui(dl) : 1UL, m, inner);
        else
            snprintf(res->detail, sizeof(res->detail),
                     "analytic bounds for a general target: E(uniform:%lu) <= E(q) <= "
                     "E(uniform:%lu) by majorization (threshold search: %.50s); %.40s",
                     fmpz_get_ui(dl) >= 2 ? fmpz_get_ui(dl) : 1UL, m, e2.text, inner);
    }
out:
    embz_target_clear(tu);
    embz_error_result_clear(rl);
    fmpz_clear(dl);
    arf_clear(lo); arf_clear(hi);
    return st;
}

int embz_analytic_error(embz_error_result_t res, embz_analytic_t an, const fmpz_t n,
                        const embz_target_t q, embz_err_t *err)
{
    int st = q->kind != EMBZ_TARGET_UNIFORM ? vector_target_bounds(res, an, n, q, err)
                                              : analytic_run(res, an, n, q, err);
    /* every caller gets a finite enclosure or a failure, never nan or [-inf, inf] */
    if (st == EMBZ_OK && !arb_is_finite(res->error))
        st = embz_err_set(err, EMBZ_ERR_LIMIT, "the analytic engine found no finite enclosure");
    return st;
}

/* The engine for one size: the layout, then the Ky Fan search (uniform targets) or the
 * threshold search (a target vector, or a uniform target beyond KYFAN_MAX_D). */
static int analytic_run(embz_error_result_t res, embz_analytic_t an, const fmpz_t n,
                        const embz_target_t q, embz_err_t *err)
{
    const embz_family_struct *f = an->f;
    slong prec = an->prec;
    /* the threshold form for target vectors and for uniform targets beyond KYFAN_MAX_D (the
     * Ky Fan search has d residues to bound: its cost and layout grow with d) */
    int thform = (q->kind != EMBZ_TARGET_UNIFORM) || q->d > KYFAN_MAX_D;
    slong wp = prec + 32;
    actx c;
    memset(&c, 0, sizeof(c));
    embz_tail_t tail;
    c.t = tail;
    c.f = f;
    c.d = thform ? 1 : q->d;
    c.prec = wp;
    c.decide = an->have_decide ? an->decide : NULL;
    c.decide_lo = an->have_decide ? an->decide_lo : NULL;
    c.cancel = an->cancel;
    c.deadline = an->deadline;
    c.bb_budget = an->bb_budget > 0 ? an->bb_budget : BB_BUDGET;
    fmpz_init_set(c.n, n);
    fmpz_init_set(c.ntrue, n);
    fmpz_init(c.L);
    fmpz_init(c.argk);
    fmpz_init(c.kmax);
    arb_init(c.SA); arb_init(c.SB); arb_init(c.Ttot); arb_init(c.W);
    arb_init(c.best); arf_init(c.upper); arf_init(c.tol);
    arb_init(c.dH);
    mag_init(c.rslack);
    arb_indeterminate(c.best);
    int st = EMBZ_ERR_UNSUPPORTED;
    int have_tail = 0;      /* a tail of our own to clear */

    if (!an->uses_n) {
        /* one certified tail serves every size up to its end */
        st = embz_analytic_prepare(an, fmpz_cmp(an->nmax, n) >= 0 ? an->nmax : n, err);
        if (st != EMBZ_OK) goto cleanup;
        c.t = an->tail;
        if (fmpz_cmp_si(n, 2 * ((slong) c.d * (an->tail->M + 2) + (slong) c.d)) <= 0) {
            st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                              "n is too small for the analytic engine (use explicit mode)");
            goto cleanup;
        }
        wp = FLINT_MAX(wp, an->tail->prec);
        c.prec = wp;
        st = setup(&c, an->tail->M, 1, wp, err);
    } else {
        slong M = 64;
        for (int attempt = 0; attempt < 4; attempt++, M *= 4) {
            /* the analytic layout needs a long tail */
            if (fmpz_cmp_si(n, 2 * ((slong) c.d * (M + 2) + (slong) c.d)) <= 0) {
                st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                                  "n is too small for the analytic engine (use explicit mode)");
                break;
            }
            embz_err_clear(err);
            if (have_tail) {
                embz_tail_clear(tail);
                have_tail = 0;
                free_layout(&c);
            }
            st = setup(&c, M, 0, wp, err);
            have_tail = 1;
            if ((st == EMBZ_ERR_DOMAIN
                 || (st == EMBZ_ERR_UNSUPPORTED && (slong) fmpz_bits(n) > prec - 16
                     && (slong) fmpz_bits(n) <= 8 * prec))
                && wp < prec + 32 + (slong) fmpz_bits(n)) {
                /* a weight that uses n may only look negative or undefined because n was
                 * rounded (n - i at i = n), or its weights differ by less than the precision
                 * resolves (1/(i + n/10) at 10^70: the head cannot be placed among the tail
                 * weights): once more with the bits of n (for the second kind only up to
                 * 8 prec bits of n: 10^300 costs 20 s at 128 bits, 10^1000 over ten minutes) */
                wp = prec + 32 + (slong) fmpz_bits(n);
                c.prec = wp;
                M /= 4;
                attempt--;
                continue;
            }
            if (st == EMBZ_OK || st == EMBZ_ERR_DOMAIN) break;
        }
    }
    if (st != EMBZ_OK) goto cleanup;

    {
        arb_t h;
        fmpz_t k, kmax, tmp;
        arf_t tol;
        arb_init(h);
        fmpz_init(k); fmpz_init(kmax); fmpz_init(tmp);
        arf_init(tol);
        arf_zero(c.upper);
        if (thform) {
            /* the threshold form (the result is [proven value, bound]) */
            arf_t tlo, thi;
            arb_t x;
            arf_init(tlo); arf_init(thi);
            arb_init(x);
            th_target tq;
            th_target_init(&tq, q);
            st = threshold_search(tlo, thi, &c, &tq,
                                  an->th_budget > 0 ? an->th_budget : THRESHOLD_BUDGET, wp);
            th_target_clear(&tq);
            if (st == EMBZ_OK) {
                arb_set_arf(x, tlo);
                arb_div(c.best, x, c.W, wp);
                arb_get_lbound_arf(tlo, c.best, wp);
                arb_set_arf(c.best, tlo);
                arb_set_arf(x, thi);
                arb_div(x, x, c.W, wp);
                arb_get_ubound_arf(c.upper, x, wp);
            }
            arf_clear(tlo); arf_clear(thi);
            arb_clear(x);
        } else {
            /* explicit positions */
            for (slong kk = 1; kk <= c.E; kk++) {
                fmpz_set_si(k, kk);
                st = h_at(h, &c, k, wp);
                if (st != EMBZ_OK) break;
                offer(&c, h, k);
            }
            /* k = n */
            if (st == EMBZ_OK) {
                st = h_at(h, &c, c.n, wp);
                if (st == EMBZ_OK) offer(&c, h, c.n);
            }
            /* k inside B: a + L < k < n */
            if (st == EMBZ_OK) {
                fmpz_add_si(k, c.L, c.a + c.nins + 1);
                for (; st == EMBZ_OK && fmpz_cmp(k, c.n) < 0; fmpz_add_ui(k, k, 1)) {
                    st = h_at(h, &c, k, wp);
                    if (st == EMBZ_OK) offer(&c, h, k);
                }
            }
            /* the smooth region, residue by residue */
            fmpz_add_si(kmax, c.L, c.a + c.nins);
            fmpz_sub_ui(tmp, c.n, 1);
            if (fmpz_cmp(tmp, kmax) < 0) fmpz_set(kmax, tmp);
            fmpz_set(c.kmax, kmax);
            arf_one(tol);
            arf_mul_2exp_si(tol, tol, -(prec - 16));
            arf_set(c.tol, tol);
            {
                fmpz *vlo = _fmpz_vec_init(c.d), *vhi = _fmpz_vec_init(c.d);
                for (ulong r = 0; r < c.d; r++) {
                    /* s_lo = floor((E - r)/d) + 1, s_hi = floor((kmax - r)/d) */
                    fmpz_set_si(vlo + r, c.E - (slong) r);
                    fmpz_fdiv_q_ui(vlo + r, vlo + r, c.d);
                    fmpz_add_ui(vlo + r, vlo + r, 1);
                    fmpz_sub_ui(vhi + r, kmax, r);
                    fmpz_fdiv_q_ui(vhi + r, vhi + r, c.d);
                }
                int decided = 0;
                if (c.decide != NULL && arb_is_finite(c.best)) {
                    arf_t b0;
                    arf_init(b0);
                    arb_get_lbound_arf(b0, c.best, wp);
                    decided = arf_cmp(b0, c.decide) > 0;
                    arf_clear(b0);
                }
                if (st == EMBZ_OK && !decided) st = branch_and_bound(&c, vlo, vhi, tol, wp);
                if (decided) c.cut_short = 1;
                _fmpz_vec_clear(vlo, c.d);
                _fmpz_vec_clear(vhi, c.d);
            }
        }
        if (st == EMBZ_OK) {
            /* E in [best lower end, max(upper bounds)] */
            arf_t lo, hi;
            arf_init(lo); arf_init(hi);
            arb_get_lbound_arf(lo, c.best, wp);
            arf_set(hi, c.upper);
            /* decision mode stopped before the smooth region was bounded: only the trivial
             * upper end E <= 1 is known (K is a difference of Ky Fan norms, each <= 1) */
            if (c.cut_short && arf_cmp_si(hi, 1) < 0) arf_one(hi);
            if (arf_cmp(hi, lo) < 0) arf_set(hi, lo);
            if (fmpz_cmp(c.n, c.ntrue) < 0 && !mag_is_zero(c.t->neglected)) {
                /* K moves by at most twice the l1 change of p, which is at most
                 * 2 * neglected / W when the negligible weights are dropped */
                mag_t e;
                arf_t ea;
                mag_init(e);
                arf_init(ea);
                arb_get_mag_lower(e, c.W);
                mag_div(e, c.t->neglected, e);
                mag_mul_2exp_si(e, e, 2);
                arf_set_mag(ea, e);
                arf_sub(lo, lo, ea, wp, ARF_RND_FLOOR);
                arf_add(hi, hi, ea, wp, ARF_RND_CEIL);
                mag_clear(e);
                arf_clear(ea);
            }
            if (!arf_is_finite(lo) || !arf_is_finite(hi)) {
                /* some interval kept an unbounded model (or no value was proven) when the
                 * search stopped: no enclosure, and never a number */
                st = embz_err_set(err, EMBZ_ERR_LIMIT,
                                  "the analytic engine could not bound E at this size "
                                  "(%s budget reached with an unbounded interval)",
                                  thform ? "threshold search" : "branch and bound");
                arf_clear(lo); arf_clear(hi);
                goto done;
            }
            arb_set_interval_arf(res->error, lo, hi, wp);
            /* the side of a decision threshold, from the ends themselves (a wide ball's
             * lower end, with its 30-bit radius, is much coarser) */
            res->decided = 0;
            if (c.decide != NULL) {
                if (arf_cmp(lo, c.decide) > 0) res->decided = 1;
                else if (arf_cmp(hi, c.decide_lo) < 0) res->decided = -1;
            }
            arb_set_round(res->error, res->error, prec);
            fmpz_set(res->argk, c.argk);
            res->method = EMBZ_METHOD_ANALYTIC;
            res->order = c.t->dir;
            res->have_bounds = 0;
            res->estimate = arf_get_d(arb_midref(res->error), ARF_RND_NEAR);
            if (thform && q->kind == EMBZ_TARGET_UNIFORM)
                snprintf(res->detail, sizeof(res->detail),
                         "analytic: %ld explicit terms + Euler-Maclaurin tail (order %ld, weights %s "
                         "beyond i = %ld), threshold form max_t Phi(t) - Phi(%lu t) by branch and "
                         "bound over ln t: %ld bounds, %ld series, %ld integrals, arb %ld bits%s",
                         (long) c.M, (long) c.t->p, c.t->dir > 0 ? "non-increasing" : "non-decreasing",
                         (long) c.M, q->d, c.evals, c.t->evals, c.t->integrals, (long) prec,
                         c.search_open ? "; search budget reached, upper end loose" : "");
            else
            snprintf(res->detail, sizeof(res->detail),
                     "analytic: %ld explicit terms + Euler-Maclaurin tail (order %ld, weights %s "
                     "beyond i = %ld), branch and bound: %ld bounds, %ld series, %ld integrals, arb %ld bits%s",
                     (long) c.M, (long) c.t->p, c.t->dir > 0 ? "non-increasing" : "non-decreasing",
                     (long) c.M, c.evals, c.t->evals, c.t->integrals, (long) prec,
                     c.search_open ? "; search budget reached" : "");
            arf_clear(lo); arf_clear(hi);
        } else if (c.stopped) {
            embz_err_set(err, EMBZ_ERR_LIMIT, "stopped: %s", c.stopped == 1
                         ? "cancelled by the caller" : "the time limit was reached");
        } else {
            embz_err_set(err, st, thform && st == EMBZ_ERR_PREC
                         ? "weights tie with a threshold: more bits needed"
                         : "the analytic engine could not certify the maximum");
        }
    done:
        arb_clear(h);
        fmpz_clear(k); fmpz_clear(kmax);
        fmpz_clear(tmp);
        arf_clear(tol);
    }
cleanup:
    if (have_tail) embz_tail_clear(tail);
    free_layout(&c);
    fmpz_clear(c.n); fmpz_clear(c.ntrue); fmpz_clear(c.L); fmpz_clear(c.argk); fmpz_clear(c.kmax);
    arb_clear(c.SA); arb_clear(c.SB); arb_clear(c.Ttot); arb_clear(c.W);
    arb_clear(c.best); arf_clear(c.upper); arf_clear(c.tol);
    arb_clear(c.dH);
    mag_clear(c.rslack);
    return st;
}
