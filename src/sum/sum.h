/* Certified partial sums of a weight function at astronomically large sizes:
 * an explicit head plus an Euler–Maclaurin tail with a rigorous remainder bound.
 *
 * A tail object describes f(x) = w(x, n) for one fixed n on the range M <= x <= end, where the
 * engine has certified that f is smooth (all needed derivatives finite) and monotone.
 * For integer k in [M, end] the tail sum T(k) = sum_{M < i <= k} f(i) is
 *     T(k) = I(M, k) + (f(k) - f(M))/2 + sum_{j=1}^{p} B_2j/(2j)! (f^(2j-1)(k) - f^(2j-1)(M)) + R,
 *     |R| <= |B_2p|/(2p)! * integral_M^end |f^(2p)(x)| dx,
 * with I(M, k) the integral of f, computed after x = e^u by arb's rigorous integrator.
 * The same formula at real x defines a smooth extension T~(x) used by the maximisation. */
#ifndef EMBZ_SUM_H
#define EMBZ_SUM_H

#include "embz/family.h"

#define EMBZ_TAIL_MAX_LEVELS 48
#define EMBZ_TAIL_LEVEL_AUTO (-2)   /* level argument: the highest valid one */

typedef struct {
    const embz_expr_struct *w; /* borrowed weight expression in (i, n) */
    arb_t n;                   /* the size as a ball (for weights that use n) */
    slong M;                   /* the tail starts after index M */
    fmpz_t end;                /* last index covered (may be lowered by embz_tail_init, see
                                  neglected) */
    mag_t neglected;           /* bound on the total weight beyond end when embz_tail_init
                                  found it negligible and lowered end; 0 otherwise */
    int dir;                   /* +1 non-increasing on [M, end], -1 non-decreasing */
    slong p;                   /* Euler–Maclaurin order */
    arb_ptr bern;              /* bern[j-1] = B_2j / (2j)!, j = 1..p */
    arb_t base;                /* -f(M)/2 - sum_j bern_j f^(2j-1)(M) */
    mag_t rem;                 /* bound on |R|, valid for every upper limit in [M, end] and
                                  every level below */
    /* Far levels: far out, where derivatives are small, a lower order suffices. Level j
     * (1 <= j < nlev) restarts the formula at X_j = 2^lev_bits[j] with order lev_p[j]:
     *   T~_j(x) = I(M, x) + em_(lev_p[j])(x) + lev_base[j],
     *   lev_base[j] = lev_base[j-1] + em_(lev_p[j-1])(X_j) - em_(lev_p[j])(X_j)
     * (chained: level j-1 is certified at X_j). Level j is certified for
     * X_j <= x <= Z_j = 2^lev_top[j] (lev_top[j] < 0: up to end), Z_j = 2^32 X_(j+1), so that
     * any ball starting below X_(j+1) and narrower than a factor 2^32 has a level; rem covers
     * the sum of the remainders of all levels. Level 0 is the formula above (lev_bits[0] = 0,
     * lev_p[0] = p). Far out only the last levels apply, so certification there needs few
     * derivatives. */
    slong nlev;
    slong lev_bits[EMBZ_TAIL_MAX_LEVELS];
    slong lev_top[EMBZ_TAIL_MAX_LEVELS];
    slong lev_p[EMBZ_TAIL_MAX_LEVELS];
    arb_struct lev_base[EMBZ_TAIL_MAX_LEVELS];
    arb_t logM;                /* ln M */
    double du;                 /* spacing of the integral cache nodes in u = ln x */
    slong nalloc;
    arb_ptr icum;              /* icum[k] = integral of f from M to the node k (u = ln M +
                                  node offset), computed on demand */
    char *ihave;               /* ihave[k]: icum[k] is there */
    slong prec;
    /* Effort of the adaptive integrator on a piece of u longer than 2 (shorter pieces get
     * arb's default effort): integrate_effort evaluations of phi per bit of precision, after
     * which a piece whose result is still too wide is halved, at most integrate_halvings
     * times in a row. Each <= 0 means the default (40 evaluations per bit, 16 halvings);
     * embz_tail_init sets both to 0, a caller may change them afterwards. A smaller effort
     * subdivides sooner, a larger one lets one rule work longer; the enclosures are rigorous
     * either way. */
    slong integrate_effort;
    slong integrate_halvings;
    embz_expr_t phi;           /* phi(u) = w(e^u) e^u, simplified (embz_expr_log_substitute) */
    embz_expr_t core;          /* w(e^u) = core(u) e^(rate u) (embz_expr_log_split), used to */
    arb_t rate;                /* certify wide u-chunks; usplit = 0 when rate has no finite */
    int usplit;                /* enclosure */
    long evals;                /* statistics: series evaluations */
    long integrals;            /* statistics: integrator calls */
    long taylor_ok, taylor_fail;  /* short integrals by Taylor expansion: successes, failures */
} embz_tail_struct;
typedef embz_tail_struct embz_tail_t[1];

/* Certify f = w(., n) smooth and monotone on [M, end] and set up the Euler–Maclaurin data.
 * If f cannot be certified from some point on but the total weight from there to end is
 * certainly below 2^-(prec+20) f(M), t->end is lowered to that point and t->neglected bounds
 * the mass left out.
 * Returns EMBZ_OK, EMBZ_ERR_NONSMOOTH / EMBZ_ERR_UNSUPPORTED (with a reason in err) when the
 * tail cannot be certified, EMBZ_ERR_DOMAIN on undefined weights. end >= M + 1. */
int embz_tail_init(embz_tail_t t, const embz_expr_t w, const fmpz_t n, slong M,
                   const fmpz_t end, slong prec, embz_err_t *err);
void embz_tail_clear(embz_tail_t t);

/* The count N = #{ i : M < i <= upto, w(i, n) > v } (upto <= end), by bisection on the
 * monotone tail with certified comparisons. EMBZ_ERR_PREC when a weight cannot be told apart
 * from v at this precision (for instance an exact tie). */
int embz_tail_count(fmpz_t res, embz_tail_t t, const arb_t v, const fmpz_t upto, slong prec);

/* The same count where weights may tie with v at this precision: lo <= N <= hi, and each of
 * the hi - lo undecided weights exceeds v by at most tie (>= 0, exact). lo == hi with tie 0
 * when every comparison was decided. */
int embz_tail_count_range(fmpz_t lo, fmpz_t hi, arb_t tie, embz_tail_t t, const arb_t v,
                          const fmpz_t upto, slong prec);
/* integral of phi(u) = f(e^u) e^u over [ua, ub] (= integral of f over [e^ua, e^ub]). */
int embz_tail_integral_u(arb_t res, embz_tail_t t, const arb_t ua, const arb_t ub, slong prec);
/* integral_M^x f(y) dy for a (narrow) ball x in [M, end]. */
int embz_tail_integral(arb_t res, embz_tail_t t, const arb_t x, slong prec);
/* The highest level certified on the whole ball x, or -1 when none covers it. */
slong embz_tail_level(const embz_tail_t t, const arb_t x);
/* T~(x) with the remainder bound added to the radius: for integer x it encloses
 * sum_{M < i <= x} f(i). The _level form uses the given level (valid for x, or
 * EMBZ_TAIL_LEVEL_AUTO), the plain form the highest valid one; EMBZ_ERR_PREC without one. */
int embz_tail_sum(arb_t res, embz_tail_t t, const arb_t x, slong prec);
int embz_tail_sum_level(arb_t res, embz_tail_t t, const arb_t x, slong lev, slong prec);
/* T~(top) - T~(top - y) for 0 <= y <= top - M (top an integer, y a ball of offsets), with
 * the remainders of both ends added: for integer y it encloses the sum of the last y weights,
 * sum_{top - y < i <= top} f(i). For y < top/2 the integral is taken directly over
 * [top - y, top] (no cancellation between two integrals from M, and no position near top
 * has to be represented), so the sum of the last few weights of a long increasing tail is
 * accurate at the working precision. The level lev (or EMBZ_TAIL_LEVEL_AUTO) is used at
 * top - y, the highest valid one at top. */
int embz_tail_sum_top(arb_t res, embz_tail_t t, const arb_t y, const arb_t top, slong lev,
                      slong prec);
/* Taylor coefficients 1..len-1 of sigma -> T~(x + scale sigma) (res[0] is set to 0).
 * x may be a wide ball: the coefficients then enclose the values over the whole ball,
 * which is what Lagrange remainder bounds need. A Taylor model must take all its
 * coefficients from one level: use the _level form with the level of the whole interval. */
int embz_tail_series(arb_ptr res, embz_tail_t t, const arb_t x, const arb_t scale,
                     slong len, slong prec);
int embz_tail_series_level(arb_ptr res, embz_tail_t t, const arb_t x, const arb_t scale,
                           slong len, slong lev, slong prec);
/* Taylor coefficients 0..len-1 of sigma -> f(x + scale sigma). */
int embz_tail_weight_series(arb_ptr res, embz_tail_t t, const arb_t x, const arb_t scale,
                            slong len, slong prec);

/* With w(e^u) = core(u) e^(rate u) (t->usplit): P_k over a ball U of u = ln x, k = 0..K,
 * where x^k f^(k)(x) = e^(rate u) P_k(u); and the Taylor coefficients 0..len-1 of
 * sigma -> ln f(e^(s + sigma)) at a (point or wide) ball s. EMBZ_ERR_UNSUPPORTED without
 * the split. */
int embz_tail_pk(arb_ptr P, embz_tail_t t, const arb_t U, slong K, slong prec);
int embz_tail_logweight_series(arb_ptr res, embz_tail_t t, const arb_t s, slong len,
                               slong prec);
/* An approximation s (exact ball, not verified) of ln x where f(x) = e^lnv, by Newton on
 * ln f(e^s) from the middle of [slo, shi]; EMBZ_ERR_PREC when it does not converge. */
int embz_tail_log_root(arb_t s, embz_tail_t t, const arb_t lnv, const arb_t slo,
                       const arb_t shi, slong prec);

/* Taylor coefficients 0..len-1 of tau -> phi(v + tau), phi(u) = w(e^u) e^u; v may be wide. */
int embz_tail_phi_series(arb_ptr res, embz_tail_t t, const arb_t v, slong len, slong prec);

/* Sum of w(i, n) for i = a..b (explicit, arb). */
int embz_sum_explicit(arb_t res, const embz_expr_t w, const arb_t n, slong a, slong b,
                      slong prec, embz_err_t *err);

#endif
