/* binom(a, k) in the expression language: a(a-1)...(a-k+1) / k! for an integer k >= 0, zero
 * for an integer k < 0 (so binom(n, i) is C(n, i), and 0 for i > n when n is a non-negative
 * integer); a k that is not an integer is outside the domain. Any real a is allowed. */
#include <math.h>
#include "expr_impl.h"

/* Exact products run up to this k; beyond it the exact value is too large to be useful. */
#define BINOM_EXACT_MAX_K 1000000

int _embz_binom_fmpq(fmpq_t r, const fmpq_t a, const fmpq_t k)
{
    if (!fmpz_is_one(fmpq_denref(k))) return EMBZ_ERR_DOMAIN;
    const fmpz *kk = fmpq_numref(k);
    if (fmpz_sgn(kk) < 0) { fmpq_zero(r); return EMBZ_OK; }
    if (fmpz_is_one(fmpq_denref(a)) && fmpz_sgn(fmpq_numref(a)) >= 0) {
        const fmpz *aa = fmpq_numref(a);
        if (fmpz_cmp(kk, aa) > 0) { fmpq_zero(r); return EMBZ_OK; }
        fmpz_t c;
        fmpz_init(c);
        fmpz_sub(c, aa, kk);
        if (fmpz_cmp(c, kk) > 0) fmpz_set(c, kk);   /* C(a, k) = C(a, a - k) */
        int small = fmpz_cmp_si(c, BINOM_EXACT_MAX_K) <= 0;
        fmpz_clear(c);
        if (!small) return EMBZ_ERR_UNSUPPORTED;
        if (fmpz_abs_fits_ui(aa)) {
            fmpz_bin_uiui(fmpq_numref(r), fmpz_get_ui(aa), fmpz_get_ui(kk));
            fmpz_one(fmpq_denref(r));
            return EMBZ_OK;
        }
    }
    if (fmpz_cmp_si(kk, BINOM_EXACT_MAX_K) > 0) return EMBZ_ERR_UNSUPPORTED;
    /* the falling product over k! */
    slong n = fmpz_get_si(kk);
    fmpq_t t, f;
    fmpz_t d;
    fmpq_init(t); fmpq_init(f);
    fmpz_init(d);
    fmpq_one(t);
    for (slong j = 0; j < n; j++) {
        fmpq_sub_si(f, a, j);
        fmpq_mul(t, t, f);
        fmpz_set_si(d, j + 1);
        fmpq_div_fmpz(t, t, d);
    }
    fmpq_swap(r, t);
    fmpq_clear(t); fmpq_clear(f);
    fmpz_clear(d);
    return EMBZ_OK;
}

int _embz_binom_arb(arb_t r, const arb_t a, const arb_t k, slong prec)
{
    fmpz_t kk;
    int st = EMBZ_OK;
    fmpz_init(kk);
    if (!arb_is_exact(k) || !arb_get_unique_fmpz(kk, k)) {
        /* a ball of integers is a single integer here: i and n are exact */
        st = EMBZ_ERR_DOMAIN;
    } else if (fmpz_sgn(kk) < 0) {
        arb_zero(r);
    } else if (!fmpz_abs_fits_ui(kk)) {
        st = EMBZ_ERR_UNSUPPORTED;
    } else {
        arb_bin_ui(r, a, fmpz_get_ui(kk), prec);
        /* binom(a, k) = 0 for integers 0 <= a < k; the product form may leave a ball
         * around 0 when a is an exact integer */
        fmpz_t aa;
        fmpz_init(aa);
        if (arb_is_exact(a) && arb_get_unique_fmpz(aa, a) && fmpz_sgn(aa) >= 0
            && fmpz_cmp(aa, kk) < 0)
            arb_zero(r);
        fmpz_clear(aa);
    }
    fmpz_clear(kk);
    return st;
}

double embz_binom_d(double a, double k)
{
    if (k != floor(k) || isnan(a)) return NAN;
    if (k < 0) return 0;
    if (a == floor(a) && a >= 0 && k > a) return 0;
    if (k <= 64) {
        double t = 1;
        for (double j = 0; j < k; j++) t *= (a - j) / (j + 1);
        return t;
    }
    if (a - k + 1 <= 0) return NAN;   /* a real a below k: no double estimate */
    return exp(lgamma(a + 1) - lgamma(k + 1) - lgamma(a - k + 1));
}
