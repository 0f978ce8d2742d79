/* What the split w(e^u) = core(u) e^(rate u) gives (src/sum/tail_logsplit.c):
 * embz_tail_pk, P_k with x^k f^(k)(x) = e^(rate u) P_k(u), and embz_tail_logweight_series,
 * the Taylor coefficients of sigma -> ln f(e^(s + sigma)). References:
 *   - f = x^a: x^k f^(k)(x) = a (a-1) ... (a-k+1) x^a, so P_k is that falling factorial
 *     (exact rationals from FLINT) wherever U is, and ln f(e^(s+sigma)) = a (s + sigma);
 *   - f = 1/(x ln x): P_k against k! x^k g_k e^(-rate u) with g_k the Taylor coefficients of
 *     f at x = e^u from the x-evaluator (embz_tail_weight_series: another code path), and
 *     ln f(e^(s+sigma)) = -(s + sigma) - ln(s + sigma), whose coefficients are -s - ln s,
 *     -1 - 1/s and (-1)^k / (k s^k) for k >= 2;
 *   - without the split both refuse (EMBZ_ERR_UNSUPPORTED); a negative weight has no
 *     logarithm (EMBZ_ERR_DOMAIN). */
#include "tsum.h"

#define K 10

START_TEST(test_power)
{
    flint_rand_t rs;
    flint_randinit(rs);
    fmpz_t n, end;
    fmpq_t a, ff, f;
    arb_t U, e, s;
    arb_ptr P = _arb_vec_init(K + 1), L = _arb_vec_init(K);
    fmpz_init(n); fmpz_init(end);
    fmpq_init(a); fmpq_init(ff); fmpq_init(f);
    arb_init(U); arb_init(e); arb_init(s);
    const slong num[3] = { -1, 3, -7 };
    const ulong den[3] = { 2, 2, 3 };
    tsum_ten_pow(end, 40);
    fmpz_set(n, end);
    for (int c = 0; c < 3; c++) {
        char text[64];
        snprintf(text, sizeof(text), "i^(%ld/%lu)", (long) num[c], den[c]);
        embz_expr_t w;
        tsum_parse(w, text);
        fmpq_set_si(a, num[c], den[c]);
        for (int pi = 0; pi < 2; pi++) {
            slong prec = TSUM_PRECS[pi];
            embz_tail_t t;
            tsum_tail(t, w, n, 10, end, prec);
            ck_assert(t->usplit);
            for (int cs = 0; cs < (tsum_quick() ? 5 : 20); cs++) {
                /* U a point or a wide ball in [3, 90] */
                arb_set_ui(U, 3 + n_randint(rs, 87));
                if (cs & 1) mag_set_ui_2exp_si(arb_radref(U), 1 + n_randint(rs, 8), -1);
                ck_assert_int_eq(embz_tail_pk(P, t, U, K, prec), EMBZ_OK);
                fmpq_one(ff);
                for (slong k = 0; k <= K; k++) {
                    arb_set_fmpq(e, ff, prec + 64);
                    tsum_check_overlap(P + k, e, "P_k of a power");
                    if (!arb_is_zero(e)) ck_assert(tsum_accurate(P + k, prec - 16));
                    fmpq_set_si(f, k, 1);
                    fmpq_sub(f, a, f);
                    fmpq_mul(ff, ff, f);
                }
                /* ln f(e^(s + sigma)) = a s + a sigma at a point s */
                arb_set_arf(s, arb_midref(U));
                ck_assert_int_eq(embz_tail_logweight_series(L, t, s, K, prec), EMBZ_OK);
                arb_set_fmpq(e, a, prec + 64);
                tsum_check_overlap(L + 1, e, "d/ds ln f");
                arb_mul(e, e, s, prec + 64);
                tsum_check(L, e, prec - 16, "ln f");
                for (slong k = 2; k < K; k++) ck_assert(arb_contains_zero(L + k));
            }
            embz_tail_clear(t);
        }
        embz_expr_clear(w);
    }
    _arb_vec_clear(P, K + 1); _arb_vec_clear(L, K);
    fmpz_clear(n); fmpz_clear(end);
    fmpq_clear(a); fmpq_clear(ff); fmpq_clear(f);
    arb_clear(U); arb_clear(e); arb_clear(s);
    flint_randclear(rs);
}
END_TEST

START_TEST(test_inverse_log)
{
    flint_rand_t rs;
    flint_randinit(rs);
    fmpz_t n, end;
    arb_t u, x, e, one, r;
    arb_ptr P = _arb_vec_init(K + 1), g = _arb_vec_init(K + 1), L = _arb_vec_init(K);
    fmpz_init(n); fmpz_init(end);
    arb_init(u); arb_init(x); arb_init(e); arb_init(one); arb_init(r);
    arb_one(one);
    embz_expr_t w;
    tsum_parse(w, "1/(i*log(i))");
    tsum_ten_pow(end, 40);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, 10, end, prec);
        ck_assert(t->usplit);
        for (int cs = 0; cs < (tsum_quick() ? 10 : 40); cs++) {
            /* u a dyadic point in [3, 60] */
            arb_set_ui(u, 3 * 64 + n_randint(rs, 57 * 64));
            arb_mul_2exp_si(u, u, -6);
            ck_assert_int_eq(embz_tail_pk(P, t, u, K, prec), EMBZ_OK);
            /* x^k f^(k)(x) e^(-rate u) = k! g_k x^k x^(-rate) from the x-evaluator */
            arb_exp(x, u, prec + 64);
            ck_assert_int_eq(embz_tail_weight_series(g, t, x, one, K + 1, prec + 64), EMBZ_OK);
            arb_mul(r, t->rate, u, prec + 64);
            arb_neg(r, r);
            arb_exp(r, r, prec + 64);                   /* e^(-rate u) */
            for (slong k = 0; k <= K; k++) {
                arb_fac_ui(e, (ulong) k, prec + 64);
                arb_mul(e, e, g + k, prec + 64);
                arb_mul(e, e, r, prec + 64);
                arb_mul(r, r, x, prec + 64);            /* (times x^k for the next k) */
                tsum_check(P + k, e, prec - 24, "P_k of 1/(x ln x)");
            }
            /* ln f(e^(u + sigma)) = -(u + sigma) - ln(u + sigma) */
            ck_assert_int_eq(embz_tail_logweight_series(L, t, u, K, prec), EMBZ_OK);
            arb_log(e, u, prec + 64);
            arb_add(e, e, u, prec + 64);
            arb_neg(e, e);
            tsum_check(L, e, prec - 16, "ln f");
            arb_inv(e, u, prec + 64);
            arb_add_ui(e, e, 1, prec + 64);
            arb_neg(e, e);
            tsum_check(L + 1, e, prec - 16, "d/du ln f");
            for (slong k = 2; k < K; k++) {
                arb_pow_ui(e, u, (ulong) k, prec + 64);
                arb_mul_ui(e, e, (ulong) k, prec + 64);
                arb_inv(e, e, prec + 64);
                if (k & 1) arb_neg(e, e);
                tsum_check(L + k, e, prec - 16, "coefficient of ln f");
            }
        }
        embz_tail_clear(t);
    }
    embz_expr_clear(w);
    _arb_vec_clear(P, K + 1); _arb_vec_clear(g, K + 1); _arb_vec_clear(L, K);
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(u); arb_clear(x); arb_clear(e); arb_clear(one); arb_clear(r);
    flint_randclear(rs);
}
END_TEST

START_TEST(test_refusals)
{
    fmpz_t n, end;
    arb_t u;
    arb_ptr P = _arb_vec_init(K + 1);
    fmpz_init(n); fmpz_init(end);
    arb_init(u);
    tsum_ten_pow(end, 10);
    fmpz_set(n, end);
    embz_expr_t w1, w2;
    tsum_parse(w1, "1/i");
    tsum_parse(w2, "-1/i");
    arb_set_ui(u, 5);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w1, n, 10, end, prec);
        t->usplit = 0;
        ck_assert_int_eq(embz_tail_pk(P, t, u, K, prec), EMBZ_ERR_UNSUPPORTED);
        ck_assert_int_eq(embz_tail_logweight_series(P, t, u, K, prec), EMBZ_ERR_UNSUPPORTED);
        embz_tail_clear(t);
        tsum_tail(t, w2, n, 10, end, prec);
        ck_assert(t->usplit);
        ck_assert_int_eq(embz_tail_pk(P, t, u, K, prec), EMBZ_OK);
        ck_assert_int_eq(embz_tail_logweight_series(P, t, u, K, prec), EMBZ_ERR_DOMAIN);
        embz_tail_clear(t);
    }
    embz_expr_clear(w1); embz_expr_clear(w2);
    _arb_vec_clear(P, K + 1);
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(u);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-logsplit");
    tcase_add_test(tc, test_power);
    tcase_add_test(tc, test_inverse_log);
    tcase_add_test(tc, test_refusals);
    return tu_run_suite(s);
}
