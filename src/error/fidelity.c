/* Fidelity-type measures of a family: p = p^(n) -> p (x) q.
 *
 * Explicit sizes. The weights are evaluated as balls and normalised, p_i = w_i / W, then
 * rounded to integers a_i = round(p_i 2^G); p' = a / A (A = sum a_i) is an exact probability
 * vector whose measure is computed exactly (up to the final square roots, done in arb) by
 * embz_fidelity_appended_sums. The rounding is paid for with the purified distance
 * Pd(x, y) = sqrt(1 - |<x|y>|^2), a metric on pure states that no channel increases: for the
 * states of p and p' written in the same Schmidt basis,
 *     Pd <= ||sqrt(p) - sqrt(p')||_2 <= ||sqrt(p) - y||_2 + |1 - ||y||_2| =: eta,
 * y_i = sqrt(a_i 2^-G) (so sqrt(p') = y / ||y||). The targets p (x) q and p' (x) q are the same
 * distance apart. With the triangle inequality, the smallest purified distance reachable
 * (by LOCC for F_max, by local unitaries for the overlap) moves by at most 2 eta:
 *     |sqrt(1 - F(p)) - sqrt(1 - F(p'))| <= 2 eta.
 * Beyond explicit sizes: K <= P <= sqrt(K (2 - K)) (docs/measures.md), bounds only; the
 * overlap for uniform targets by the analytic engine (overlap.c). */
#include <stdlib.h>
#include <string.h>
#include "embz/error.h"
#include "impl.h"

void embz_fidelity_result_init(embz_fidelity_result_t r)
{
    r->measure = EMBZ_MEASURE_FIDELITY;
    r->bounds_only = 0;
    arb_init(r->value); arb_init(r->lower); arb_init(r->upper);
    arb_init(r->fidelity); arb_init(r->purified); arb_init(r->overlap); arb_init(r->K);
    arb_init(r->tight_lo); arb_init(r->tight_hi);
    r->have_tight = 0;
    arb_indeterminate(r->value);
    arb_indeterminate(r->lower);
    arb_indeterminate(r->upper);
    arb_indeterminate(r->fidelity);
    arb_indeterminate(r->purified);
    arb_indeterminate(r->overlap);
    arb_indeterminate(r->K);
    r->nblocks = 0;
    memset(&r->how, 0, sizeof(r->how));
}

void embz_fidelity_result_clear(embz_fidelity_result_t r)
{
    arb_clear(r->value); arb_clear(r->lower); arb_clear(r->upper);
    arb_clear(r->fidelity); arb_clear(r->purified); arb_clear(r->overlap); arb_clear(r->K);
    arb_clear(r->tight_lo); arb_clear(r->tight_hi);
}

static int fmpz_cmp_desc(const void *x, const void *y)
{
    return -fmpz_cmp((const fmpz *) x, (const fmpz *) y);
}

/* Ends of x as exact balls. */
static void set_ends(arb_t lo, arb_t hi, const arb_t x, slong prec)
{
    arf_t t;
    arf_init(t);
    arb_get_lbound_arf(t, x, prec);
    arb_set_arf(lo, t);
    arb_get_ubound_arf(t, x, prec);
    arb_set_arf(hi, t);
    arf_clear(t);
}

/* A distance d' of the rounded problem widened by 2 eta and clipped to [0, 1]; sets d and
 * the fidelity 1 - d^2. */
static void widen(arb_t d, arb_t fid, const arb_t dprime, const mag_t eta2, slong prec)
{
    arb_set(d, dprime);
    arb_add_error_mag(d, eta2);
    arf_t lo, hi;
    arf_init(lo); arf_init(hi);
    arb_get_lbound_arf(lo, d, prec);
    arb_get_ubound_arf(hi, d, prec);
    if (arf_sgn(lo) < 0) arf_zero(lo);
    if (arf_cmp_si(hi, 1) > 0) arf_one(hi);
    if (arf_cmp(lo, hi) > 0) arf_set(lo, hi);
    arb_set_interval_arf(d, lo, hi, prec);
    arb_sqr(fid, d, prec);
    arb_sub_ui(fid, fid, 1, prec);
    arb_neg(fid, fid);
    arf_clear(lo); arf_clear(hi);
}

/* Target as integers alpha (sorted, zeros dropped) over Q; alpha = NULL for uniform. */
static int target_integers(fmpz **alpha, slong *m, fmpz_t Q, const embz_target_t q,
                           embz_err_t *err)
{
    *alpha = NULL;
    *m = 0;
    if (q->kind == EMBZ_TARGET_UNIFORM) {
        if (q->d < 1 || q->d > EMBZ_TARGET_MAX_D)
            return embz_err_set(err, EMBZ_ERR_INPUT, "uniform target dimension out of range");
        fmpz_set_ui(Q, q->d);
        *m = (slong) q->d;
        return EMBZ_OK;
    }
    embz_qvec_t s;
    embz_qvec_init(s);
    s->len = q->q->len;
    s->p = _fmpq_vec_init(s->len > 0 ? s->len : 1);
    for (slong j = 0; j < s->len; j++) fmpq_set(s->p + j, q->q->p + j);
    embz_qvec_sort(s);
    slong len = s->len;
    while (len > 0 && fmpq_is_zero(s->p + len - 1)) len--;
    if (len == 0) {
        embz_qvec_clear(s);
        return embz_err_set(err, EMBZ_ERR_INPUT, "target vector is zero");
    }
    fmpz_one(Q);
    for (slong j = 0; j < len; j++) fmpz_lcm(Q, Q, fmpq_denref(s->p + j));
    *alpha = _fmpz_vec_init(len);
    fmpz_t sum;
    fmpz_init(sum);
    for (slong j = 0; j < len; j++) {
        fmpz_divexact(*alpha + j, Q, fmpq_denref(s->p + j));
        fmpz_mul(*alpha + j, *alpha + j, fmpq_numref(s->p + j));
        fmpz_add(sum, sum, *alpha + j);
    }
    fmpz_set(Q, sum);   /* the entries sum to Q exactly, normalised or not */
    fmpz_clear(sum);
    *m = len;
    embz_qvec_clear(s);
    return EMBZ_OK;
}

int embz_fidelity_explicit(embz_fidelity_result_t res, const embz_family_t f, const fmpz_t n,
                           const embz_target_t q, int measure, slong prec, embz_err_t *err)
{
    if (measure != EMBZ_MEASURE_FIDELITY && measure != EMBZ_MEASURE_PURIFIED &&
        measure != EMBZ_MEASURE_OVERLAP)
        return embz_err_set(err, EMBZ_ERR_INPUT, "measure '%s' is not a fidelity measure",
                            embz_measure_name(measure));
    if (fmpz_cmp_si(n, 1) < 0) return embz_err_set(err, EMBZ_ERR_INPUT, "n must be at least 1");
    if (fmpz_cmp_si(n, EMBZ_FIDELITY_MAX_N) > 0)
        return embz_err_set(err, EMBZ_ERR_LIMIT,
                            "explicit fidelity measures need n <= %ld (they store n exact "
                            "numbers)", (long) EMBZ_FIDELITY_MAX_N);
    slong nn = fmpz_get_si(n);
    slong wprec = prec + 32;
    slong G = prec + (slong) FLINT_BIT_COUNT((ulong) nn) + 8;
    int status = EMBZ_OK;
    fmpz *alpha = NULL;
    slong m = 0;
    fmpz_t Q, A, i, t;
    arb_t W, w, x, y, D, hs, os, u;
    fmpz_init(Q); fmpz_init(A); fmpz_init(i); fmpz_init(t);
    arb_init(W); arb_init(w); arb_init(x); arb_init(y); arb_init(D);
    arb_init(hs); arb_init(os); arb_init(u);
    fmpz *a = _fmpz_vec_init(nn);

    status = target_integers(&alpha, &m, Q, q, err);
    if (status != EMBZ_OK) goto done;

    /* pass 1: W */
    arb_zero(W);
    for (slong k = 1; k <= nn; k++) {
        fmpz_set_si(i, k);
        status = embz_family_weight_arb(w, f, i, n, wprec, err);
        if (status != EMBZ_OK) goto done;
        arb_add(W, W, w, wprec);
    }
    if (!arb_is_positive(W)) {
        status = embz_err_set(err, EMBZ_ERR_DOMAIN,
                              "the weights do not have a certainly positive sum at n = %ld",
                              (long) nn);
        goto done;
    }
    /* pass 2: rounding, A, D = ||sqrt(p) - y||^2 */
    arb_zero(D);
    fmpz_zero(A);
    for (slong k = 1; k <= nn; k++) {
        fmpz_set_si(i, k);
        status = embz_family_weight_arb(w, f, i, n, wprec, err);
        if (status != EMBZ_OK) goto done;
        arb_div(w, w, W, wprec);
        arb_mul_2exp_si(u, w, G);
        arf_get_fmpz(a + k - 1, arb_midref(u), ARF_RND_NEAR);
        if (fmpz_sgn(a + k - 1) < 0) fmpz_zero(a + k - 1);
        fmpz_add(A, A, a + k - 1);
        arb_sqrtpos(x, w, wprec);
        arb_sqrt_fmpz(y, a + k - 1, wprec);
        arb_mul_2exp_si(y, y, -G / 2);
        if (G % 2) {
            arb_sqrt_ui(u, 2, wprec);
            arb_div(y, y, u, wprec);
        }
        arb_sub(x, x, y, wprec);
        arb_sqr(x, x, wprec);
        arb_add(D, D, x, wprec);
    }
    if (fmpz_is_zero(A)) {
        status = embz_err_set(err, EMBZ_ERR_PREC, "the rounded weights vanish; raise --prec");
        goto done;
    }
    /* eta = sqrt(D) + |1 - sqrt(A 2^-G)| */
    mag_t eta2;
    mag_init(eta2);
    {
        arb_t e;
        arb_init(e);
        arb_sqrtpos(e, D, wprec);
        arb_set_fmpz(u, A);
        arb_mul_2exp_si(u, u, -G);
        arb_sqrt(u, u, wprec);
        arb_sub_ui(u, u, 1, wprec);
        arb_abs(u, u);
        arb_add(e, e, u, wprec);
        arb_get_mag(eta2, e);
        mag_mul_2exp_si(eta2, eta2, 1);
        arb_clear(e);
    }

    /* the exact problem for p' */
    qsort(a, (size_t) nn, sizeof(fmpz), fmpz_cmp_desc);
    slong nblocks = 0;
    embz_fidelity_appended_sums(hs, os, &nblocks, a, nn, A, alpha, m, Q, wprec);
    arb_sqrt_fmpz(u, Q, wprec);
    arb_mul_fmpz(u, u, A, wprec);
    arb_div(hs, hs, u, wprec);     /* sqrt(F') */
    arb_div(os, os, u, wprec);     /* O' */

    /* distances of the rounded problem, then widened */
    arb_sqr(x, hs, wprec);
    arb_sub_ui(x, x, 1, wprec);
    arb_neg(x, x);
    arb_sqrtpos(x, x, wprec);      /* P' */
    widen(res->purified, res->fidelity, x, eta2, prec);
    if (measure == EMBZ_MEASURE_OVERLAP) {
        arb_sqr(x, os, wprec);
        arb_sub_ui(x, x, 1, wprec);
        arb_neg(x, x);
        arb_sqrtpos(x, x, wprec);
        widen(y, res->value, x, eta2, prec);   /* value = O^2 */
        arb_sqrtpos(res->overlap, res->value, prec);
    } else if (measure == EMBZ_MEASURE_FIDELITY) {
        arb_set(res->value, res->fidelity);
        arb_indeterminate(res->overlap);
    } else {
        arb_set(res->value, res->purified);
        arb_indeterminate(res->overlap);
    }
    set_ends(res->lower, res->upper, res->value, prec);
    res->measure = measure;
    res->bounds_only = 0;
    res->nblocks = nblocks;
    arb_indeterminate(res->K);
    memset(&res->how, 0, sizeof(res->how));
    res->how.int_bits = G;
    res->how.pieces = nblocks;
    res->how.allowance_log2 = mag_is_zero(eta2) ? -1e300 : mag_get_d_log2_approx(eta2);
    res->how.prec = wprec;
    mag_clear(eta2);

done:
    if (alpha != NULL) _fmpz_vec_clear(alpha, m);
    _fmpz_vec_clear(a, nn);
    fmpz_clear(Q); fmpz_clear(A); fmpz_clear(i); fmpz_clear(t);
    arb_clear(W); arb_clear(w); arb_clear(x); arb_clear(y); arb_clear(D);
    arb_clear(hs); arb_clear(os); arb_clear(u);
    return status;
}

/* The overlap beyond explicit sizes, for a uniform target (overlap.c): O of the state with
 * the negligible weights dropped, its local-unitary distance sqrt(1 - O^2) widened by 2 eta
 * (the same metric argument as for the rounding of explicit sizes). */
static int overlap_analytic(embz_fidelity_result_t res, const embz_family_t f, const fmpz_t n,
                            const embz_target_t q, slong prec, embz_err_t *err)
{
    if (q->kind != EMBZ_TARGET_UNIFORM)
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                            "the overlap with a target vector needs explicit sizes (n <= %ld); "
                            "beyond, only uniform targets (ebit, ebits:J, uniform:D)",
                            (long) EMBZ_FIDELITY_MAX_N);
    if (embz_family_is_levels(f))
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                            "a level family has levels with counts, not a weight w(i)");
    embz_analytic_t an;
    embz_analytic_init(an, f, prec);
    arb_t O, x;
    mag_t eta, eta2;
    arb_init(O); arb_init(x);
    mag_init(eta); mag_init(eta2);
    embz_fidelity_how_struct how;
    int st = _embz_overlap_analytic(O, eta, &how, an, n, q->d, err);
    if (st == EMBZ_OK) {
        slong wp = how.prec;
        arb_sqr(x, O, wp);
        arb_sub_ui(x, x, 1, wp);
        arb_neg(x, x);
        arb_sqrtpos(x, x, wp);                 /* sqrt(1 - O^2) */
        mag_mul_2exp_si(eta2, eta, 1);
        widen(res->purified, res->value, x, eta2, prec);   /* value = O^2 */
        arb_sqrtpos(res->overlap, res->value, prec);
        arb_indeterminate(res->purified);
        arb_indeterminate(res->fidelity);
        set_ends(res->lower, res->upper, res->value, prec);
        res->measure = EMBZ_MEASURE_OVERLAP;
        res->bounds_only = 0;
        res->nblocks = 0;
        arb_indeterminate(res->K);
        res->how = how;
        res->how.prec = prec;
    }
    arb_clear(O); arb_clear(x);
    mag_clear(eta); mag_clear(eta2);
    embz_analytic_clear(an);
    return st;
}

/* An enclosure counts as a value when the purified distance is known to this relative width
 * (about 6 digits); wider ones only tighten the bounds from K. */
#define FMAX_VALUE_REL_BITS 20

/* F_max and P beyond explicit sizes for a uniform target (fmax.c): sqrt(F_max) in [L, U] for
 * the state with the negligible weights dropped, P = sqrt(1 - F_max) widened by 2 eta.
 * Returns EMBZ_OK with *is_value = 1 and res filled as a value when P is known to
 * FMAX_VALUE_REL_BITS bits; else *is_value = 0 and [Plo, Phi] hold the certified range of P
 * (when the bounds could be computed, *have = 1). */
static int fmax_analytic(embz_fidelity_result_t res, int *is_value, int *have, arb_t Plo,
                         arb_t Phi, embz_fidelity_how_struct *how, const embz_family_t f,
                         const fmpz_t n, const embz_target_t q, int measure, slong prec)
{
    *is_value = 0;
    *have = 0;
    if (q->kind != EMBZ_TARGET_UNIFORM || embz_family_is_levels(f)) return EMBZ_OK;
    embz_err_t e2;
    embz_err_clear(&e2);
    embz_analytic_t an;
    embz_analytic_init(an, f, prec);
    arb_t L, U, x, y;
    mag_t eta, eta2;
    arb_init(L); arb_init(U); arb_init(x); arb_init(y);
    mag_init(eta); mag_init(eta2);
    int st = _embz_fmax_analytic(L, U, eta, how, an, n, q->d, &e2);
    if (st == EMBZ_OK) {
        slong wp = how->prec;
        arf_t lo, hi;
        arf_init(lo); arf_init(hi);
        /* P' in [sqrt(1 - U^2), sqrt(1 - L^2)] */
        arb_sqr(x, U, wp); arb_sub_ui(x, x, 1, wp); arb_neg(x, x); arb_sqrtpos(x, x, wp);
        arb_sqr(y, L, wp); arb_sub_ui(y, y, 1, wp); arb_neg(y, y); arb_sqrtpos(y, y, wp);
        arb_get_lbound_arf(lo, x, wp);
        arb_get_ubound_arf(hi, y, wp);
        if (arf_sgn(lo) < 0) arf_zero(lo);
        arb_set_interval_arf(x, lo, hi, wp);
        mag_mul_2exp_si(eta2, eta, 1);
        widen(res->purified, res->fidelity, x, eta2, prec);
        arb_get_lbound_arf(lo, res->purified, prec);
        arb_get_ubound_arf(hi, res->purified, prec);
        arb_set_arf(Plo, lo);
        arb_set_arf(Phi, hi);
        *have = 1;
        if (arb_rel_accuracy_bits(res->purified) >= FMAX_VALUE_REL_BITS) {
            *is_value = 1;
            arb_set(res->value, measure == EMBZ_MEASURE_FIDELITY ? res->fidelity : res->purified);
            set_ends(res->lower, res->upper, res->value, prec);
            res->measure = measure;
            res->bounds_only = 0;
            res->nblocks = how->pieces;
            arb_indeterminate(res->overlap);
            arb_indeterminate(res->K);
            res->how = *how;
            res->how.prec = prec;
        }
        arf_clear(lo); arf_clear(hi);
    }
    arb_clear(L); arb_clear(U); arb_clear(x); arb_clear(y);
    mag_clear(eta); mag_clear(eta2);
    embz_analytic_clear(an);
    return EMBZ_OK;   /* a failure only means: no tighter bounds */
}

int embz_fidelity(embz_fidelity_result_t res, const embz_family_t f, const fmpz_t n,
                  const embz_target_t q, int measure, int method, slong prec, embz_err_t *err)
{
    if (measure != EMBZ_MEASURE_FIDELITY && measure != EMBZ_MEASURE_PURIFIED &&
        measure != EMBZ_MEASURE_OVERLAP)
        return embz_err_set(err, EMBZ_ERR_INPUT, "measure '%s' is not a fidelity measure",
                            embz_measure_name(measure));
    if (fmpz_cmp_si(n, 1) < 0) return embz_err_set(err, EMBZ_ERR_INPUT, "n must be at least 1");
    int small = fmpz_cmp_si(n, EMBZ_FIDELITY_MAX_N) <= 0;
    if (method == EMBZ_METHOD_EXPLICIT || (method == EMBZ_METHOD_AUTO && small))
        return embz_fidelity_explicit(res, f, n, q, measure, prec, err);
    if (measure == EMBZ_MEASURE_OVERLAP)
        return overlap_analytic(res, f, n, q, prec, err);
    int is_value = 0, have_tight = 0;
    arb_t Plo, Phi;
    embz_fidelity_how_struct fhow;
    arb_init(Plo); arb_init(Phi);
    memset(&fhow, 0, sizeof(fhow));
    fmax_analytic(res, &is_value, &have_tight, Plo, Phi, &fhow, f, n, q, measure, prec);
    if (is_value) {
        arb_clear(Plo); arb_clear(Phi);
        return EMBZ_OK;
    }
    embz_error_result_t e;
    embz_error_result_init(e);
    int status = embz_error(e, f, n, q, method, prec, err);
    if (status == EMBZ_OK) {
        /* P in [K, sqrt(K (2 - K))], F = 1 - P^2 in [(1 - K)^2, 1 - K^2] */
        arb_t K, t;
        arb_init(K); arb_init(t);
        arb_set(K, e->error);
        arb_nonnegative_part(K, K);
        arb_set(res->K, K);
        arf_t l, h;
        arf_init(l); arf_init(h);
        arf_t pl, ph;
        arf_init(pl); arf_init(ph);
        /* purified */
        arb_get_lbound_arf(l, K, prec);
        if (arf_sgn(l) < 0) arf_zero(l);
        arb_sub_ui(t, K, 2, prec);
        arb_mul(t, t, K, prec);
        arb_neg(t, t);
        arb_sqrtpos(t, t, prec);
        arb_get_ubound_arf(h, t, prec);
        if (arf_cmp_si(h, 1) > 0) arf_one(h);
        arb_set_interval_arf(res->purified, l, h, prec);
        arf_set(pl, l);
        arf_set(ph, h);
        /* fidelity */
        arb_sub_ui(t, K, 1, prec);
        arb_sqr(t, t, prec);
        arb_get_lbound_arf(l, t, prec);
        if (arf_sgn(l) < 0) arf_zero(l);
        arb_sqr(t, K, prec);
        arb_sub_ui(t, t, 1, prec);
        arb_neg(t, t);
        arb_get_ubound_arf(h, t, prec);
        if (arf_cmp_si(h, 1) > 0) arf_one(h);
        arb_set_interval_arf(res->fidelity, l, h, prec);
        arb_set(res->value, measure == EMBZ_MEASURE_FIDELITY ? res->fidelity : res->purified);
        /* the exact ends (the ball's radius is rounded outward) */
        if (measure == EMBZ_MEASURE_PURIFIED) {
            arf_set(l, pl);
            arf_set(h, ph);
        }
        arb_set_arf(res->lower, l);
        arb_set_arf(res->upper, h);
        arb_indeterminate(res->overlap);
        res->measure = measure;
        res->bounds_only = 1;
        res->nblocks = 0;
        memset(&res->how, 0, sizeof(res->how));
        res->how.bounds_only = 1;
        res->how.prec = prec;
        res->how.K = e->how;
        res->have_tight = 0;
        if (have_tight) {
            /* the LOCC fidelity bounds, intersected with those from K */
            arf_t a, b;
            arf_init(a); arf_init(b);
            arf_set(a, arb_midref(Plo));
            arf_set(b, arb_midref(Phi));
            if (arf_cmp(a, pl) < 0) arf_set(a, pl);
            if (arf_cmp(b, ph) > 0) arf_set(b, ph);
            if (arf_cmp(a, b) <= 0) {
                res->have_tight = 1;
                if (measure == EMBZ_MEASURE_PURIFIED) {
                    arb_set_arf(res->tight_lo, a);
                    arb_set_arf(res->tight_hi, b);
                } else {
                    /* F = 1 - P^2, decreasing in P */
                    arb_set_arf(t, b);
                    arb_sqr(t, t, prec); arb_sub_ui(t, t, 1, prec); arb_neg(t, t);
                    arb_get_lbound_arf(l, t, prec);
                    if (arf_sgn(l) < 0) arf_zero(l);
                    arb_set_arf(res->tight_lo, l);
                    arb_set_arf(t, a);
                    arb_sqr(t, t, prec); arb_sub_ui(t, t, 1, prec); arb_neg(t, t);
                    arb_get_ubound_arf(h, t, prec);
                    if (arf_cmp_si(h, 1) > 0) arf_one(h);
                    arb_set_arf(res->tight_hi, h);
                }
                embz_error_how_struct kh = res->how.K;
                res->how = fhow;
                res->how.bounds_only = 1;
                res->how.prec = prec;
                res->how.K = kh;
            }
            arf_clear(a); arf_clear(b);
        }
        arf_clear(pl); arf_clear(ph);
        arf_clear(l); arf_clear(h);
        arb_clear(K); arb_clear(t);
    }
    embz_error_result_clear(e);
    arb_clear(Plo); arb_clear(Phi);
    return status;
}
