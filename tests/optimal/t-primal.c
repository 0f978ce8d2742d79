/* The primal pieces (primal.c, state.c):
 *  - the exact Ky Fan error of a sorted vector (embz_optimal_uniform_error) equals measure's
 *    threshold form (embz_qvec_distance) on random sorted vectors, n <= 60, d in {2, 3, 4, 8};
 *  - the rounding of doubles: small fractions come back exactly, other values stay within
 *    2^-46 relative (2^-45 with the roundings of the check);
 *  - the primal certificate from perturbed cumulative sums is a sorted probability vector
 *    whose error is the returned bound and never below the optimum;
 *  - the optimal state's entries: sorted, sum 1, error equal to the closed form. */
#include <math.h>
#include "topt.h"

START_TEST(test_error_matches_measure)
{
    flint_rand_t rs;
    flint_randinit(rs);
    ulong ds[] = { 2, 3, 4, 8 };
    fmpq_t a, b;
    fmpq_init(a); fmpq_init(b);
    int reps = topt_quick() ? 200 : 1500;
    for (int rep = 0; rep < reps; rep++) {
        slong n = 1 + (slong) n_randint(rs, 60);
        ulong d = ds[n_randint(rs, 4)];
        embz_qvec_t p;
        embz_qvec_init(p);
        topt_random_sorted(p, n, rs);
        embz_optimal_uniform_error(a, NULL, p, d);
        topt_distance(b, p, d);
        ck_assert_msg(fmpq_equal(a, b), "n = %ld d = %lu", (long) n, d);
        embz_qvec_clear(p);
    }
    fmpq_clear(a); fmpq_clear(b);
    flint_randclear(rs);
}
END_TEST

START_TEST(test_rounding)
{
    flint_rand_t rs;
    flint_randinit(rs);
    fmpq_t x, w;
    fmpq_init(x); fmpq_init(w);
    for (int rep = 0; rep < 5000; rep++) {
        slong num = (slong) n_randint(rs, 1000000) - 500000;
        ulong den = 1 + n_randint(rs, 1 << 20);
        fmpq_set_si(w, num, den);
        _embz_opt_q_from_d(x, fmpq_get_d(w));
        ck_assert(fmpq_equal(x, w));
        double v = ldexp((double) n_randint(rs, 1 << 30) + 0.123456789, -(int) n_randint(rs, 60));
        _embz_opt_q_from_d(x, v);
        ck_assert(fabs(fmpq_get_d(x) - v) <= ldexp(fabs(v), -45));   /* 2^-46 and roundings */
    }
    fmpq_clear(x); fmpq_clear(w);
    flint_randclear(rs);
}
END_TEST

START_TEST(test_primal_certificate)
{
    flint_rand_t rs;
    flint_randinit(rs);
    fmpq_t E, s, opt, psi, chk;
    fmpz_t nz, lev;
    fmpq_init(E); fmpq_init(s); fmpq_init(opt); fmpq_init(psi); fmpq_init(chk);
    fmpz_init(nz); fmpz_init(lev);
    for (int rep = 0; rep < 300; rep++) {
        slong n = 1 + (slong) n_randint(rs, 300);
        ulong d = 2 + n_randint(rs, 6);
        fmpz_set_si(nz, n);
        _embz_opt_psi(psi, lev, nz, d);
        fmpq_inv(opt, psi);
        /* the optimal cumulative sums psi(k), perturbed (or not) */
        double *P = flint_malloc(sizeof(double) * (size_t) n);
        double noise = rep % 3 == 0 ? 0 : ldexp(1.0, -20 - (int) n_randint(rs, 30));
        for (slong k = 1; k <= n; k++) {
            fmpz_set_si(nz, k);
            _embz_opt_psi(psi, lev, nz, d);
            P[k - 1] = fmpq_get_d(psi) * (1 + noise * (2 * (double) n_randint(rs, 1000) / 1000 - 1));
        }
        embz_qvec_t st;
        embz_qvec_init(st);
        _embz_opt_primal(E, st, P, n, d);
        ck_assert_int_eq(st->len, n);
        fmpq_zero(s);
        for (slong i = 0; i < n; i++) {
            ck_assert(fmpq_sgn(st->p + i) >= 0);
            if (i) ck_assert(fmpq_cmp(st->p + i, st->p + i - 1) <= 0);
            fmpq_add(s, s, st->p + i);
        }
        ck_assert(fmpq_is_one(s));
        topt_distance(chk, st, d);
        ck_assert(fmpq_equal(chk, E));
        ck_assert(fmpq_cmp(E, opt) >= 0);
        if (noise == 0) ck_assert(fmpq_equal(E, opt));
        embz_qvec_clear(st);
        flint_free(P);
    }
    fmpq_clear(E); fmpq_clear(s); fmpq_clear(opt); fmpq_clear(psi); fmpq_clear(chk);
    fmpz_clear(nz); fmpz_clear(lev);
    flint_randclear(rs);
}
END_TEST

START_TEST(test_state)
{
    const char *targets[] = { "ebit", "ebits:2", "uniform:3", "uniform:6" };
    fmpq_t E, s, opt, chk;
    fmpz_t nz, lev;
    fmpq_init(E); fmpq_init(s); fmpq_init(opt); fmpq_init(chk);
    fmpz_init(nz); fmpz_init(lev);
    for (int t = 0; t < 4; t++) {
        embz_target_t q;
        embz_target_init(q);
        tu_target_set(q, targets[t]);
        for (slong n = 1; n <= 200; n += (n < 40 ? 1 : 7)) {
            embz_qvec_t p;
            embz_qvec_init(p);
            ck_assert(embz_optimal_state(p, n, q, NULL) == EMBZ_OK);
            fmpq_zero(s);
            for (slong i = 0; i < n; i++) {
                if (i) ck_assert(fmpq_cmp(p->p + i, p->p + i - 1) <= 0);
                fmpq_add(s, s, p->p + i);
            }
            ck_assert(fmpq_is_one(s));
            fmpz_set_si(nz, n);
            _embz_opt_psi(opt, lev, nz, q->d);
            fmpq_inv(opt, opt);
            topt_distance(chk, p, q->d);
            ck_assert_msg(fmpq_equal(chk, opt), "%s n = %ld", targets[t], (long) n);
            embz_qvec_clear(p);
        }
        embz_target_clear(q);
    }
    fmpq_clear(E); fmpq_clear(s); fmpq_clear(opt); fmpq_clear(chk);
    fmpz_clear(nz); fmpz_clear(lev);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("optimal-primal");
    TCase *tc = tcase_create("primal");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_error_matches_measure);
    tcase_add_test(tc, test_rounding);
    tcase_add_test(tc, test_primal_certificate);
    tcase_add_test(tc, test_state);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
