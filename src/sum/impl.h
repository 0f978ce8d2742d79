/* What the files of src/sum share and nothing outside src/sum sees: the engine's constants
 * and the internal pieces of the tail object (prefix _embz_tail_). The interface used by the
 * rest of the library is src/sum/sum.h.
 *
 * Files:
 *   tail_init.c      set-up and clearing, the Euler–Maclaurin order, the far levels
 *   tail_certify.c   certification of smoothness and monotonicity chunk by chunk, the cut of
 *                    a negligible far end, the reason given when a tail is refused
 *   tail_weight.c    Taylor series of the weight f and of phi(u) = f(e^u) e^u
 *   tail_integral.c  integrals in u = ln x (short Taylor rule, bounded adaptive rule) and
 *                    the cache of integrals from M to fixed nodes
 *   tail_count.c     counts of the weights above a value (bisection, bracket by a root)
 *   tail_sum.c       T~ and its Taylor series: the boundary terms, sums, sums of the last
 *                    weights
 *   tail_logsplit.c  what the split w(e^u) = core(u) e^(rate u) gives: P_k, ln f, the root
 *                    of f = v in ln x
 *   explicit.c       plain sums of a weight over a range of indices */
#ifndef EMBZ_SUM_IMPL_H
#define EMBZ_SUM_IMPL_H

#include <math.h>
#include "sum/sum.h"

#define EMBZ_TAIL_MAX_ORDER 60   /* largest Euler–Maclaurin order tried */
#define EMBZ_TAIL_MAX_SPLIT 12   /* bisection depth when certifying a chunk */
#define LEVEL_OVERLAP 32         /* level j is certified up to 2^LEVEL_OVERLAP X_(j+1) */

/* The short Taylor rule for integrals (see _embz_tail_integrate_taylor) uses at most this
 * many terms. */
#define TAYLOR_INT_MAX 16

/* Defaults of the adaptive integrator's effort on pieces of u longer than 2 (see
 * integrate_effort and integrate_halvings in sum.h): evaluations per bit of precision before
 * a piece is halved, and how many times a piece may be halved. */
#define INTEGRATE_EVALS_PER_BIT 40
#define INTEGRATE_MAX_HALVINGS 16

/* The integral cache: the first NODES_LINEAR nodes are evenly spaced in u, the later ones in
 * geometric progression (see _embz_tail_node_off). */
#define NODES_LINEAR 64

/* The effort fields of the tail with their defaults filled in. */
static inline slong _embz_tail_evals_per_bit(const embz_tail_struct *t)
{
    return t->integrate_effort > 0 ? t->integrate_effort : INTEGRATE_EVALS_PER_BIT;
}

static inline slong _embz_tail_max_halvings(const embz_tail_struct *t)
{
    return t->integrate_halvings > 0 ? t->integrate_halvings : INTEGRATE_MAX_HALVINGS;
}

/* f's Taylor coefficients g_m = f^(m)(x)/m!, m < len (the weight series with scale 1). */
static inline int _embz_tail_weight_taylor(arb_ptr g, embz_tail_t t, const arb_t x, slong len,
                                           slong prec)
{
    arb_t one;
    arb_init(one);
    arb_one(one);
    int st = embz_tail_weight_series(g, t, x, one, len, prec);
    arb_clear(one);
    return st;
}

/* The Euler–Maclaurin boundary terms of order q at a point x whose Taylor coefficients of f
 * are g (at least 2q of them): f(x)/2 + sum_(j<=q) bern_j (2j-1)! g_(2j-1). */
static inline void _embz_tail_em_terms(arb_t res, const embz_tail_struct *t, arb_srcptr g,
                                       slong q, slong prec)
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

/* Offset in u of cache node k from ln M: k du for k <= NODES_LINEAR, then growing by a factor
 * 2^(1/4) per node, so that reaching a size n takes O(log log n) nodes. A double computed the
 * same way every time: each node is an exact and reproducible point. */
static inline double _embz_tail_node_off(const embz_tail_struct *t, slong k)
{
    if (k <= NODES_LINEAR) return t->du * (double) k;
    return t->du * NODES_LINEAR * pow(2.0, (double) (k - NODES_LINEAR) / 4.0);
}

/* The last node k with node_off(k) <= rel (0 for rel <= 0). */
static inline slong _embz_tail_node_below(const embz_tail_struct *t, double rel)
{
    slong k;
    if (rel <= 0) return 0;
    if (rel < t->du * NODES_LINEAR) k = (slong) floor(rel / t->du);
    else k = NODES_LINEAR + (slong) floor(4.0 * log2(rel / (t->du * NODES_LINEAR)));
    while (k > 0 && _embz_tail_node_off(t, k) > rel) k--;
    while (_embz_tail_node_off(t, k + 1) <= rel) k++;
    return k;
}

/* The integral of phi over [ua, ub] by a Taylor expansion about the midpoint (tail_integral.c):
 * 1 with res set to an enclosure, 0 when the rule does not apply or is not accurate enough
 * (res untouched); counts its successes and failures in t and gives up after many failures. */
int _embz_tail_integrate_taylor(arb_t res, embz_tail_t t, const arb_t ua, const arb_t ub,
                                slong prec);

/* The far bracket of a count (tail_count.c): indices b0 <= b1 such that every index up to b0
 * is certainly on the left of the boundary between w > v and the rest (for a non-increasing
 * tail, the left part is w > v; for a non-decreasing one, w <= v) and every index above b1
 * certainly on the right; found around the root of f = v in ln x, b1 - b0 about 2^-prec of
 * the root. EMBZ_ERR_PREC when it cannot be established (the count then bisects). */
int _embz_tail_bracket(fmpz_t b0, fmpz_t b1, embz_tail_t t, const arb_t v, const fmpz_t upto,
                       slong prec);

/* Certification of [M, end] (tail_certify.c): walks over chunks of u = ln x from ln M,
 * certifying that f is smooth and monotone; adds to integral[j] (j < t->nlev) a bound on the
 * integral of |f^(2q)| over the chunks that meet the range of level j (q = t->lev_p[j]) and
 * merges the direction of f into *dir (+1 non-increasing, -1 non-decreasing, 0 while
 * undecided). g holds f's Taylor coefficients at M, goal = M f(M) the scale of the sums.
 * May lower t->end (and set t->neglected) when the far weights are negligible. On failure
 * fills err and returns its code. */
int _embz_tail_certify(embz_tail_t t, mag_ptr integral, int *dir, arb_srcptr g,
                       const arb_t goal, const fmpz_t end, slong prec, embz_err_t *err);

/* Adds to mass a bound on the total weight at the integers in [e^ua, e^ub] (sup |f| times the
 * number of integers, halving while a piece at depth d exceeds allow 2^-d). EMBZ_OK, or
 * EMBZ_ERR_UNSUPPORTED when the pieces stay too heavy (mass then partly added). */
int _embz_tail_negligible_mass(mag_t mass, embz_tail_t t, const arf_t ua, const arf_t ub,
                               const mag_t allow, int depth, slong prec);

#endif
