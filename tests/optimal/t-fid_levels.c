/* The fidelity-type optimum by classes of equal subtrees (fid_levels.c) against the node by
 * node computation (fid_perron.c, fid_cert.c, itself checked against arb's dense eigenvalues in
 * t-fid_cert.c): the two certified enclosures overlap and both are narrow, at every n <= 3000
 * (1000 with EMBZ_QUICK=1) for d = 2, 3, 5, 16, at random n up to 2^22 and at the powers of d;
 * beyond, the optimum never decreases in n (checked on a chain of sizes up to 10^300) and stays
 * below 1;
 *  - against the distance K's proven optimum OPT^K_n = 1/psi_d(n) (closed.c) through
 *    K <= P <= sqrt(K (2 - K)) (docs/measures.md: Fuchs-van de Graaf and the construction
 *    there): OPT^K_n <= OPT^P_n (every state has P >= K) and OPT^P_n <= sqrt(K (2 - K)) at the
 *    K-optimal state, at n = 1..600 and at 10^k (every seventh k) up to 10^300, d = 2, 3, 7. */
#include <stdio.h>
#include "topt.h"

#define PREC 128

static void flat(fmpq_t lo, fmpq_t hi, slong n, ulong d)
{
    double *x = malloc(sizeof(double) * n), *ell = malloc(sizeof(double) * n), l;
    fmpz *a = _fmpz_vec_init(n);
    slong bits;
    ck_assert(_embz_opt_perron_d(x, ell, &l, n, d));
    _embz_opt_fid_scale(a, &bits, x, n);
    ck_assert(_embz_opt_fid_lower(lo, a, n, d));
    ck_assert(_embz_opt_fid_upper(hi, ell, n, d, PREC));
    _fmpz_vec_clear(a, n);
    free(x); free(ell);
}

static void compare(const fmpz_t n, ulong d)
{
    fmpq_t lo, hi, lo2, hi2, w;
    fmpq_init(lo); fmpq_init(hi); fmpq_init(lo2); fmpq_init(hi2); fmpq_init(w);
    flat(lo, hi, fmpz_get_si(n), d);
    double lam;
    slong bits;
    ck_assert(_embz_opt_fid_levels(lo2, hi2, &lam, &bits, n, d, PREC));
    ck_assert_msg(fmpq_cmp(lo2, hi) <= 0 && fmpq_cmp(lo, hi2) <= 0,
                  "the enclosures are disjoint at n = %ld, d = %lu", fmpz_get_si(n), d);
    fmpq_sub(w, hi2, lo2);
    ck_assert_msg(fmpq_sgn(w) >= 0 && fmpq_get_d(w) < 1e-14, "wide at n = %ld", fmpz_get_si(n));
    fmpq_clear(lo); fmpq_clear(hi); fmpq_clear(lo2); fmpq_clear(hi2); fmpq_clear(w);
}

START_TEST(test_against_flat)
{
    ulong ds[] = { 2, 3, 5, 16 };
    slong N = topt_quick() ? 1000 : 3000;
    fmpz_t n;
    fmpz_init(n);
    flint_rand_t rs;
    flint_randinit(rs);
    for (int k = 0; k < 4; k++) {
        for (slong m = 1; m <= N; m++) {
            fmpz_set_si(n, m);
            compare(n, ds[k]);
        }
        for (slong p = ds[k]; p <= (WORD(1) << 22); p *= (slong) ds[k]) {
            fmpz_set_si(n, p);
            compare(n, ds[k]);
        }
        for (int r = 0; r < (topt_quick() ? 2 : 6); r++) {
            fmpz_set_ui(n, 1 + n_randint(rs, WORD(1) << 22));
            compare(n, ds[k]);
        }
    }
    flint_randclear(rs);
    fmpz_clear(n);
}
END_TEST

START_TEST(test_large)
{
    /* OPT^F_n never decreases in n (a zero appended keeps F_max), so certified enclosures
       along a growing chain may not be ordered the other way; and F < 1 */
    fmpq_t lo, hi, plo;
    fmpq_init(lo); fmpq_init(hi); fmpq_init(plo);
    fmpz_t n;
    fmpz_init(n);
    ulong ds[] = { 2, 3, 1000 };
    for (int k = 0; k < 3; k++) {
        fmpq_zero(plo);
        for (slong e = 7; e <= 300; e = e < 40 ? e + 1 : e + 29) {
            fmpz_set_ui(n, 10);
            fmpz_pow_ui(n, n, (ulong) e);
            double lam;
            slong bits;
            ck_assert_msg(_embz_opt_fid_levels(lo, hi, &lam, &bits, n, ds[k], PREC),
                          "no certificate at 10^%ld, d = %lu", (long) e, ds[k]);
            ck_assert(fmpq_cmp(lo, hi) <= 0);
            ck_assert(fmpq_cmp_ui(lo, 1) < 0);
            ck_assert_msg(fmpq_cmp(hi, plo) >= 0, "the optimum fell from one size to a larger one");
            fmpq_set(plo, lo);
        }
    }
    fmpz_clear(n);
    fmpq_clear(lo); fmpq_clear(hi); fmpq_clear(plo);
}
END_TEST

START_TEST(test_against_k)
{
    ulong ds[] = { 2, 3, 7 };
    fmpz_t n;
    fmpz_init(n);
    arb_t k, t;
    arb_init(k); arb_init(t);
    for (int j = 0; j < 3; j++) {
        char spec[32];
        snprintf(spec, sizeof(spec), "uniform:%lu", ds[j]);
        embz_target_t q;
        embz_target_init(q);
        tu_target_set(q, spec);
        slong M = topt_quick() ? 200 : 600;
        for (slong i = 1; i <= M + 300; i += i <= M ? 1 : 7) {
            if (i <= M) fmpz_set_si(n, i);
            else {
                fmpz_set_ui(n, 10);
                fmpz_pow_ui(n, n, (ulong) (i - M));
            }
            embz_optimal_result_t r;
            embz_optimal_result_init(r);
            ck_assert(embz_optimal_closed(r, n, q, NULL) == EMBZ_OK);
            arb_set_fmpq(k, r->upper, PREC);
            embz_optimal_result_clear(r);
            embz_optimal_fid_t o;
            embz_optimal_fid_init(o);
            embz_err_t err;
            embz_err_clear(&err);
            ck_assert_msg(embz_optimal_fid(o, NULL, n, q, EMBZ_MEASURE_PURIFIED, &err) == EMBZ_OK,
                          "%s", err.text);
            ck_assert_msg(!arb_lt(o->value, k), "best P below best K at i = %ld, d = %lu",
                          (long) i, ds[j]);
            arb_sub_ui(t, k, 2, PREC);
            arb_neg(t, t);
            arb_mul(t, t, k, PREC);
            arb_sqrtpos(t, t, PREC);                /* sqrt(K (2 - K)) */
            ck_assert_msg(!arb_gt(o->value, t), "best P above sqrt(K(2-K)) at i = %ld", (long) i);
            embz_optimal_fid_clear(o);
        }
        embz_target_clear(q);
    }
    arb_clear(k); arb_clear(t);
    fmpz_clear(n);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("optimal-fid_levels");
    TCase *tc = tcase_create("fid_levels");
    tcase_set_timeout(tc, 900);
    tcase_add_test(tc, test_against_flat);
    tcase_add_test(tc, test_large);
    tcase_add_test(tc, test_against_k);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
