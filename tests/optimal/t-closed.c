/* The closed form (closed.c, eps.c):
 *  - psi_d(n) against its recursion over the Ky Fan rows k = d m + r (docs/optimal.md), for
 *    every n <= 3000 and d in {2, 3, 4, 7, 16};
 *  - at n = d^L the optimum is (d - 1) / (d + L (d - 1)), the lower bound 1/(2 + log2 n) of
 *    the team's notes for one ebit (math notes sec. 8, derived there) met with equality;
 *  - for one ebit, 1/(2 + ceil(log2 n)) <= OPT_n (math notes sec. 8) at every n <= 5000 and
 *    at huge n (10^1000);
 *  - the smallest rank for a goal: OPT_n <= eps < OPT_(n-1) for random goals, powers of the
 *    target dimension among them, and n = 1 for eps >= (d - 1)/d. */
#include "topt.h"

static void closed_at(fmpq_t opt, const fmpz_t n, const char *target)
{
    embz_target_t q;
    embz_target_init(q);
    tu_target_set(q, target);
    embz_optimal_result_t r;
    embz_optimal_result_init(r);
    embz_err_t err;
    embz_err_clear(&err);
    ck_assert_msg(embz_optimal_closed(r, n, q, &err) == EMBZ_OK, "%s", err.text);
    ck_assert(r->exact && fmpq_equal(r->lower, r->upper));
    fmpq_set(opt, r->upper);
    embz_optimal_result_clear(r);
    embz_target_clear(q);
}

START_TEST(test_psi_recursion)
{
    ulong ds[] = { 2, 3, 4, 7, 16 };
    slong N = 3000;
    fmpq *psi = _fmpq_vec_init(N + 1);
    fmpq_t c;
    fmpz_t n, lev;
    fmpq_init(c);
    fmpz_init(n); fmpz_init(lev);
    for (int t = 0; t < 5; t++) {
        topt_psi_recursion(psi, N, ds[t]);
        for (slong k = 1; k <= N; k++) {
            fmpz_set_si(n, k);
            _embz_opt_psi(c, lev, n, ds[t]);
            ck_assert_msg(fmpq_equal(c, psi + k), "d = %lu, n = %ld", ds[t], (long) k);
        }
    }
    fmpq_clear(c);
    fmpz_clear(n); fmpz_clear(lev);
    _fmpq_vec_clear(psi, N + 1);
}
END_TEST

START_TEST(test_powers)
{
    const char *targets[] = { "ebit", "ebits:2", "uniform:3", "uniform:10" };
    ulong ds[] = { 2, 4, 3, 10 };
    fmpz_t n;
    fmpq_t opt, want;
    fmpz_init(n);
    fmpq_init(opt); fmpq_init(want);
    for (int t = 0; t < 4; t++)
        for (ulong L = 0; L <= 60; L++) {
            fmpz_ui_pow_ui(n, ds[t], L);
            closed_at(opt, n, targets[t]);
            fmpq_set_si(want, (slong) ds[t] - 1, ds[t] + L * (ds[t] - 1));
            ck_assert_msg(fmpq_equal(opt, want), "%s at d^%lu", targets[t], L);
        }
    fmpz_clear(n);
    fmpq_clear(opt); fmpq_clear(want);
}
END_TEST

START_TEST(test_log_bound)
{
    fmpz_t n;
    fmpq_t opt, bound;
    fmpz_init(n);
    fmpq_init(opt); fmpq_init(bound);
    for (slong k = 1; k <= 5000; k++) {
        fmpz_set_si(n, k);
        closed_at(opt, n, "ebit");
        fmpq_set_si(bound, 1, 2 + (ulong) fmpz_clog_ui(n, 2));
        ck_assert_msg(fmpq_cmp(opt, bound) >= 0, "n = %ld", (long) k);
        /* and the other side: the padded optimum at the power of 2 below */
        fmpq_set_si(bound, 1, 2 + (ulong) fmpz_flog_ui(n, 2));
        ck_assert(fmpq_cmp(opt, bound) <= 0);
    }
    fmpz_ui_pow_ui(n, 10, 1000);
    closed_at(opt, n, "ebit");
    fmpq_set_si(bound, 1, 2 + (ulong) fmpz_clog_ui(n, 2));
    ck_assert(fmpq_cmp(opt, bound) >= 0);
    fmpz_clear(n);
    fmpq_clear(opt); fmpq_clear(bound);
}
END_TEST

START_TEST(test_eps)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const char *targets[] = { "ebit", "ebits:3", "uniform:5" };
    fmpz_t n, m;
    fmpq_t eps, a, b;
    fmpz_init(n); fmpz_init(m);
    fmpq_init(eps); fmpq_init(a); fmpq_init(b);
    embz_err_t err;
    for (int t = 0; t < 3; t++) {
        embz_target_t q;
        embz_target_init(q);
        tu_target_set(q, targets[t]);
        for (int rep = 0; rep < 400; rep++) {
            /* goals from 1 down to about 0.02, and exact optima among them */
            if (rep % 4 == 0) {
                fmpz_set_ui(m, 1 + n_randint(rs, 100000));
                closed_at(eps, m, targets[t]);
            } else {
                fmpq_set_si(eps, 1 + (slong) n_randint(rs, 1000), 1 + n_randint(rs, 50000));
            }
            if (fmpq_cmp_si(eps, 1) > 0) fmpq_one(eps);
            embz_err_clear(&err);
            int st = embz_optimal_eps(n, eps, q, &err);
            if (st == EMBZ_ERR_LIMIT) continue;
            ck_assert_msg(st == EMBZ_OK, "%s", err.text);
            closed_at(a, n, targets[t]);
            ck_assert(fmpq_cmp(a, eps) <= 0);
            if (fmpz_cmp_ui(n, 1) > 0) {
                fmpz_sub_ui(m, n, 1);
                closed_at(b, m, targets[t]);
                ck_assert(fmpq_cmp(b, eps) > 0);
            }
        }
        embz_target_clear(q);
    }
    /* errors */
    embz_target_t q;
    embz_target_init(q);
    fmpq_zero(eps);
    ck_assert(embz_optimal_eps(n, eps, q, NULL) == EMBZ_ERR_INPUT);
    fmpq_set_si(eps, 1, 1000000000);
    ck_assert(embz_optimal_eps(n, eps, q, NULL) == EMBZ_ERR_LIMIT);
    embz_target_clear(q);
    fmpz_clear(n); fmpz_clear(m);
    fmpq_clear(eps); fmpq_clear(a); fmpq_clear(b);
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("optimal-closed");
    TCase *tc = tcase_create("closed");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_psi_recursion);
    tcase_add_test(tc, test_powers);
    tcase_add_test(tc, test_log_bound);
    tcase_add_test(tc, test_eps);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
