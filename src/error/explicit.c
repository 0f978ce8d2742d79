/* The embezzlement error E_n(q) = K(p -> p (x) q) of a family at an explicit size n.
 *
 * Only Ky Fan indices k <= n matter: for k >= n, ||p||_(k) = 1 and the difference
 * 1 - ||p (x) q||_(k) can only shrink. With P_k the sum of the k largest weights (unnormalised)
 * and R_k the sum of the k largest entries of w (x) q,
 *     E_n(q) = max_{0 <= k <= n} (P_k - R_k) / W,   W = P_n.
 * Uniform target u_d: R_k = P_s + (r/d) w_(s+1) with k = d s + r (two cursors k and s).
 * Vector target q = (a_1, ..., a_m) / Q (sorted, integers over a common denominator): R_k is the
 * k-th partial sum of the merge of the m sorted sequences a_j w_(1), a_j w_(2), ... (a heap).
 *
 * Two passes:
 *  1. doubles (estimate): weights in index order, checked for monotonicity (any increase,
 *     however small, means "not monotone"); compensated sums. If the weights are monotone the
 *     sorted order is the index order (or its reverse) and nothing is stored; otherwise the
 *     weights are stored and sorted.
 *  2. certified: every weight is an arb ball, turned into an integer interval [lo, hi] in units
 *     of 2^-F (lo rounded down, hi up). From then on everything is exact integer arithmetic
 *     (128-bit), so the maximum over k of interval enclosures is exact and cheap:
 *        P_k <= sum of the k largest hi,  P_k >= sum of ANY k lo,  the same for R_k,
 *     so max_k (P_k - R_k) lies in [max_k (PL_k - RU_k), max_k (PU_k - RL_k)] provided the hi
 *     values are taken in non-increasing order. That order is checked exactly on the integers
 *     (ties are fine); if the check fails the pass is redone on stored, sorted lo and hi arrays.
 *
 * This file holds the target data and the driver; the double pass is in explicit_estimate.c,
 * the certified pass in explicit_certify.c (their shared types are in impl.h).
 */
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include <float.h>
#include "embz/measure.h"
#include "embz/error.h"
#include "embz/expr.h"
#include "impl.h"

/* ------------------------------------------------------------------ target data */

int _embz_x_tdata_init(embz_x_tdata_t *T, const embz_target_t q, embz_err_t *err)
{
    memset(T, 0, sizeof(*T));
    if (q->kind == EMBZ_TARGET_UNIFORM) {
        if (q->d < 1 || q->d > EMBZ_TARGET_MAX_D)
            return embz_err_set(err, EMBZ_ERR_INPUT, "uniform target dimension out of range");
        T->uniform = 1;
        T->d = q->d;
        T->Q = (slong) q->d;
        return EMBZ_OK;
    }
    /* vector: sorted copy, zeros dropped, common denominator */
    embz_qvec_t s;
    embz_qvec_init(s);
    s->p = _fmpq_vec_init(q->q->len);
    s->len = q->q->len;
    for (slong j = 0; j < s->len; j++) fmpq_set(s->p + j, q->q->p + j);
    embz_qvec_sort(s);
    slong m = s->len;
    while (m > 0 && fmpq_is_zero(s->p + m - 1)) m--;
    if (m == 0) {
        embz_qvec_clear(s);
        return embz_err_set(err, EMBZ_ERR_INPUT, "target vector is zero");
    }
    fmpz_t L, t, sum;
    fmpz_init(L); fmpz_init(t); fmpz_init(sum);
    fmpz_one(L);
    for (slong j = 0; j < m; j++) fmpz_lcm(L, L, fmpq_denref(s->p + j));
    int status = EMBZ_OK;
    if (fmpz_bits(L) > 40) {
        status = embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                              "target entries need a common denominator above 2^40; "
                              "give them with fewer digits");
        goto done;
    }
    T->m = m;
    T->Q = fmpz_get_si(L);
    T->a = flint_malloc((size_t) m * sizeof(slong));
    T->qd = flint_malloc((size_t) m * sizeof(double));
    for (slong j = 0; j < m; j++) {
        fmpz_divexact(t, L, fmpq_denref(s->p + j));
        fmpz_mul(t, t, fmpq_numref(s->p + j));
        T->a[j] = fmpz_get_si(t);
        fmpz_add(sum, sum, t);
        T->qd[j] = fmpq_get_d(s->p + j);   /* see below */
    }
    if (!fmpz_equal(sum, L))
        status = embz_err_set(err, EMBZ_ERR_INPUT, "target vector does not sum to 1");
done:
    fmpz_clear(L); fmpz_clear(t); fmpz_clear(sum);
    embz_qvec_clear(s);
    return status;
}

void _embz_x_tdata_clear(embz_x_tdata_t *T)
{
    flint_free(T->a);
    flint_free(T->qd);
}

/* ------------------------------------------------------------------ driver */

static int check_size(slong *nn, const fmpz_t n, embz_err_t *err)
{
    if (fmpz_cmp_si(n, 1) < 0) return embz_err_set(err, EMBZ_ERR_INPUT, "n must be at least 1");
    if (fmpz_cmp_si(n, EMBZ_EXPLICIT_MAX_N) > 0)
        return embz_err_set(err, EMBZ_ERR_LIMIT,
                            "explicit summation is limited to n <= %ld",
                            (long) EMBZ_EXPLICIT_MAX_N);
    *nn = fmpz_get_si(n);
    return EMBZ_OK;
}

/* The error for a weight at index bad that is not a finite double: the weight's own failure
 * when ball arithmetic fails too (evaluated at prec bits), else EMBZ_ERR_UNSUPPORTED. */
static int bad_weight_error(const embz_family_t f, slong bad, const fmpz_t n, slong prec,
                            embz_err_t *err)
{
    fmpz_t iz;
    arb_t w;
    fmpz_init(iz); arb_init(w);
    fmpz_set_si(iz, bad);
    int st = embz_family_weight_arb(w, f, iz, n, prec, err);
    if (st == EMBZ_OK)
        st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                          "the weight at i = %ld is not a finite double (it is finite in "
                          "ball arithmetic); explicit mode needs double-range weights",
                          (long) bad);
    fmpz_clear(iz); arb_clear(w);
    return st;
}

int embz_error_explicit_estimate(double *E, slong *argk, int *order, const embz_family_t f,
                                 const fmpz_t n, const embz_target_t q, embz_err_t *err)
{
    slong nn, bad;
    embz_x_tdata_t T;
    embz_x_dres_t R;
    int st = check_size(&nn, n, err);
    if (st != EMBZ_OK) return st;
    if ((st = _embz_x_tdata_init(&T, q, err)) != EMBZ_OK) { _embz_x_tdata_clear(&T); return st; }
    memset(&R, 0, sizeof(R));
    *order = 0;
    st = _embz_x_estimate(&R, order, &bad, f, nn, &T, err);
    _embz_x_tdata_clear(&T);
    if (st != EMBZ_OK) return st;
    if (bad) return bad_weight_error(f, bad, n, 64, err);
    if (!(R.W > 0.0) || !(R.W <= DBL_MAX))
        return embz_err_set(err, R.W > 0.0 ? EMBZ_ERR_UNSUPPORTED : EMBZ_ERR_DOMAIN,
                            R.W > 0.0 ? "the sum of the weights overflows double range"
                                      : "all weights are zero (or below double range)");
    *E = R.best / R.W;
    if (argk != NULL) *argk = R.argk;
    return EMBZ_OK;
}

/* 2^k with k bringing the larger of w(1), w(n) near 1; 0 when neither is a positive finite
 * ball at this precision */
static int scale_exponent(slong *k, const embz_family_t f, const fmpz_t n, slong prec)
{
    arb_t w;
    embz_err_t e;
    fmpz_t i;
    arb_init(w);
    fmpz_init(i);
    slong best = WORD_MIN;
    for (int end = 0; end < 2; end++) {
        if (end == 0) fmpz_one(i);
        else fmpz_set(i, n);
        embz_err_clear(&e);
        if (embz_family_weight_arb(w, f, i, n, prec, &e) != EMBZ_OK || !arb_is_positive(w)
            || !arb_is_finite(w))
            continue;
        fmpz_t ex;
        fmpz_init(ex);
        arf_frexp(arb_midref(w), ex, arb_midref(w));
        if (fmpz_fits_si(ex) && fmpz_get_si(ex) > best) best = fmpz_get_si(ex);
        fmpz_clear(ex);
    }
    arb_clear(w);
    fmpz_clear(i);
    if (best == WORD_MIN || best > WORD_MAX / 4 || best < WORD_MIN / 4) return 0;
    *k = -best;
    return 1;
}

/* The enclosures and the description of a finished certified pass (in units of 2^-F). */
static void set_result(embz_error_result_t res, const embz_x_xres_t *X, slong F, int mode,
                       const embz_x_dres_t *R, const embz_x_tdata_t *T, int ball_estimates,
                       slong prec)
{
    _embz_x_quotient_interval(res->error, X->GL, X->WU, X->GU, X->WL, T->Q, prec);
    res->estimate = R->best / R->W;
    fmpz_set_si(res->argk, R->argk);
    res->method = EMBZ_METHOD_EXPLICIT;
    res->order = mode;
    res->have_bounds = T->uniform && T->d == 2;
    if (res->have_bounds) {
        /* lower: max(p1/2, supB), upper: max(p1/2, 2 supB), all over W; scaled by Q = 2 */
        embz_x_i128 a = FLINT_MAX(X->p1L, 2 * X->BL), b = FLINT_MAX(X->p1U, 2 * X->BU);
        _embz_x_quotient_interval(res->lower, a, X->WU, b, X->WL, 2, prec);
        a = FLINT_MAX(X->p1L, 4 * X->BL);
        b = FLINT_MAX(X->p1U, 4 * X->BU);
        _embz_x_quotient_interval(res->upper, a, X->WU, b, X->WL, 2, prec);
    }
    memset(&res->how, 0, sizeof(res->how));
    res->how.kind = EMBZ_HOW_EXPLICIT;
    res->how.prec = prec;
    res->how.order = mode;
    res->how.ball_estimates = mode == 0 && ball_estimates;
    res->how.unit_exp = -F;
}

static int explicit_run(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                        const embz_target_t q, slong prec, int rescaled, embz_err_t *err);

int embz_error_explicit(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                        const embz_target_t q, slong prec, embz_err_t *err)
{
    return explicit_run(res, f, n, q, prec, 0, err);
}

static int explicit_run(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                        const embz_target_t q, slong prec, int rescaled, embz_err_t *err)
{
    slong nn, bad = 0, F = 0;
    embz_x_tdata_t T;
    embz_x_dres_t R;
    embz_x_xres_t X;
    int order = 0, st;
    if (prec < 32) prec = 32;
    if ((st = check_size(&nn, n, err)) != EMBZ_OK) return st;
    if ((st = _embz_x_tdata_init(&T, q, err)) != EMBZ_OK) { _embz_x_tdata_clear(&T); return st; }
    memset(&R, 0, sizeof(R));
    memset(&X, 0, sizeof(X));

    /* 1. estimate */
    st = _embz_x_estimate(&R, &order, &bad, f, nn, &T, err);
    if (st != EMBZ_OK) goto out;
    int unscaled = 0;      /* a weight or the sum outside double range, all finite in arb */
    slong wshift = 0;      /* the estimates are of the weights times 2^wshift */
    int ball_estimates = 0;
    if (bad) {
        st = bad_weight_error(f, bad, n, prec, err);
        if (st != EMBZ_ERR_UNSUPPORTED) goto out;
        unscaled = 1;
    }
    if ((unscaled || !(R.W > 0.0) || !(R.W <= 1e300)) && rescaled) {
        /* even scaled, the double pass fails (constants such as 1e-400 underflow inside the
         * expression): estimates from ball values, scaled, stored and sorted */
        embz_err_t e2;
        embz_err_clear(&e2);
        memset(&R, 0, sizeof(R));
        int as = _embz_x_estimate_arb(&R, &wshift, f, nn, &T, &e2);
        if (as == EMBZ_OK && R.W > 0.0 && R.W <= 1e300) {
            order = 0;
            unscaled = 0;
            ball_estimates = 1;
            embz_err_clear(err);
            st = EMBZ_OK;
        } else {
            if (as == EMBZ_ERR_DOMAIN || as == EMBZ_ERR_NOMEM) { st = as; *err = e2; }
            goto out;
        }
    }
    if (unscaled || !(R.W > 0.0) || !(R.W <= 1e300)) {
        /* the double pass left its range: E does not change when every weight is scaled by
         * one factor, so once more with the largest end weight brought near 1 */
        slong k;
        if (!rescaled && scale_exponent(&k, f, n, prec)) {
            embz_family_struct g = *f;          /* shallow: only the weight differs */
            embz_expr_t sw;
            embz_expr_init(sw);
            embz_expr_set(sw, f->weight);
            if (embz_expr_scale_2exp(sw, k) == EMBZ_OK) {
                g.weight[0] = sw[0];
                _embz_x_tdata_clear(&T);
                st = explicit_run(res, &g, n, q, prec, 1, err);
                embz_expr_clear(sw);
                return st;
            }
            embz_expr_clear(sw);
        }
        if (unscaled) goto out;
        st = embz_err_set(err, R.W > 0.0 ? EMBZ_ERR_UNSUPPORTED : EMBZ_ERR_DOMAIN,
                          R.W > 0.0 ? "the sum of the weights overflows double range"
                                    : "all weights are zero (or below double range)");
        goto out;
    }

    /* 2. certified pass, F from the estimated total */
    int ew, mode = order;
    frexp(R.W * (1.0 + 1e-6), &ew);
    ew -= (int) wshift;                 /* the exponent of the true total */
    st = _embz_x_certify(&X, &F, &mode, f, nn, &T, ew, prec, err);
    if (st != EMBZ_OK) goto out;
    if (X.WL <= 0) {
        st = embz_err_set(err, EMBZ_ERR_PREC,
                          "the total weight cannot be separated from 0 at %ld bits", (long) prec);
        goto out;
    }
    set_result(res, &X, F, mode, &R, &T, ball_estimates, prec);
out:
    _embz_x_tdata_clear(&T);
    if (st == EMBZ_OK && !arb_is_finite(res->error))      /* never a nan called certified */
        st = embz_err_set(err, EMBZ_ERR_LIMIT, "explicit summation found no finite enclosure");
    return st;
}
