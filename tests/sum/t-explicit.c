/* embz_sum_explicit (src/sum/explicit.c): plain sums of a weight over a range of indices.
 * References: FLINT's exact rationals (arith_harmonic_number, fmpq sums), the closed forms of
 * sums of powers (Faulhaber: sum i^3 = (b(b+1)/2)^2 - ((a-1)a/2)^2), and the error path for a
 * weight undefined inside the range. */
#include <string.h>
#include "tsum.h"

/* enclosure of the exact rational q at prec */
static void set_q(arb_t r, const fmpq_t q, slong prec) { arb_set_fmpq(r, q, prec); }

/* 1/i over random ranges [a, b]: H_b - H_(a-1), exact (FLINT arith_harmonic_number) */
START_TEST(test_harmonic)
{
    flint_rand_t rs;
    flint_randinit(rs);
    embz_expr_t w;
    arb_t n, s, ref;
    fmpq_t hb, ha;
    tsum_parse(w, "1/i");
    arb_init(n); arb_init(s); arb_init(ref);
    fmpq_init(hb); fmpq_init(ha);
    arb_set_ui(n, 1000);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        int cases = tsum_quick() ? 20 : 100;
        for (int c = 0; c < cases; c++) {
            slong a = 1 + (slong) n_randint(rs, 2000);
            slong b = a + (slong) n_randint(rs, 2000);
            embz_err_t err;
            embz_err_clear(&err);
            ck_assert_int_eq(embz_sum_explicit(s, w, n, a, b, prec, &err), EMBZ_OK);
            arith_harmonic_number(hb, (ulong) b);
            arith_harmonic_number(ha, (ulong) (a - 1));
            fmpq_sub(hb, hb, ha);
            set_q(ref, hb, prec + 64);
            /* one rounding per term at most: about log2(b - a + 1) bits lost */
            tsum_check(s, ref, prec - 16, "sum 1/i");
        }
    }
    fmpq_clear(hb); fmpq_clear(ha);
    arb_clear(n); arb_clear(s); arb_clear(ref);
    embz_expr_clear(w);
    flint_randclear(rs);
}
END_TEST

/* 1/i^2 and i/n (n a ball: the size enters the weight) against exact fmpq loops */
START_TEST(test_rational_weights)
{
    flint_rand_t rs;
    flint_randinit(rs);
    embz_expr_t w2, wn;
    arb_t n, s, ref;
    fmpq_t acc, term;
    tsum_parse(w2, "1/i^2");
    tsum_parse(wn, "i/n");
    arb_init(n); arb_init(s); arb_init(ref);
    fmpq_init(acc); fmpq_init(term);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        for (int c = 0; c < (tsum_quick() ? 10 : 40); c++) {
            slong a = 1 + (slong) n_randint(rs, 300);
            slong b = a + (slong) n_randint(rs, 300);
            ulong nn = 1 + n_randint(rs, 1000000);
            arb_set_ui(n, nn);
            embz_err_t err;
            embz_err_clear(&err);
            /* sum 1/i^2, exact */
            ck_assert_int_eq(embz_sum_explicit(s, w2, n, a, b, prec, &err), EMBZ_OK);
            fmpq_zero(acc);
            for (slong i = a; i <= b; i++) {
                fmpq_set_si(term, 1, (ulong) (i * i));
                fmpq_add(acc, acc, term);
            }
            set_q(ref, acc, prec + 64);
            tsum_check(s, ref, prec - 16, "sum 1/i^2");
            /* sum i/n = (a + b)(b - a + 1) / (2n), exact */
            ck_assert_int_eq(embz_sum_explicit(s, wn, n, a, b, prec, &err), EMBZ_OK);
            fmpz_set_si(fmpq_numref(acc), (a + b) * (b - a + 1));
            fmpz_set_ui(fmpq_denref(acc), 2 * nn);
            fmpq_canonicalise(acc);
            set_q(ref, acc, prec + 64);
            tsum_check(s, ref, prec - 16, "sum i/n");
        }
    }
    fmpq_clear(acc); fmpq_clear(term);
    arb_clear(n); arb_clear(s); arb_clear(ref);
    embz_expr_clear(w2); embz_expr_clear(wn);
    flint_randclear(rs);
}
END_TEST

/* i^3: Faulhaber's closed form, an exact integer; the sum of integers is exact at both
 * precisions as long as it fits (here below 2^64) */
START_TEST(test_cubes)
{
    embz_expr_t w;
    arb_t n, s, ref;
    fmpz_t x, y;
    tsum_parse(w, "i^3");
    arb_init(n); arb_init(s); arb_init(ref);
    fmpz_init(x); fmpz_init(y);
    arb_one(n);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        for (slong a = 1; a <= 41; a += 10)
            for (slong b = a; b <= a + 3000; b += 997) {
                embz_err_t err;
                embz_err_clear(&err);
                ck_assert_int_eq(embz_sum_explicit(s, w, n, a, b, prec, &err), EMBZ_OK);
                fmpz_set_si(x, b * (b + 1) / 2);
                fmpz_mul(x, x, x);
                fmpz_set_si(y, (a - 1) * a / 2);
                fmpz_mul(y, y, y);
                fmpz_sub(x, x, y);
                arb_set_fmpz(ref, x);
                ck_assert_msg(arb_equal(s, ref), "sum i^3 over [%ld, %ld] not exact", a, b);
            }
    }
    fmpz_clear(x); fmpz_clear(y);
    arb_clear(n); arb_clear(s); arb_clear(ref);
    embz_expr_clear(w);
}
END_TEST

/* an empty range sums to 0; a weight undefined at i = 0 stops the sum with EMBZ_ERR_DOMAIN
 * and a message naming the index */
START_TEST(test_edges)
{
    embz_expr_t w;
    arb_t n, s;
    tsum_parse(w, "1/i");
    arb_init(n); arb_init(s);
    arb_one(n);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_err_t err;
        embz_err_clear(&err);
        arb_set_ui(s, 7);
        ck_assert_int_eq(embz_sum_explicit(s, w, n, 10, 9, prec, &err), EMBZ_OK);
        ck_assert(arb_is_zero(s));
        embz_err_clear(&err);
        ck_assert_int_eq(embz_sum_explicit(s, w, n, -3, 5, prec, &err), EMBZ_ERR_DOMAIN);
        ck_assert_int_eq(err.code, EMBZ_ERR_DOMAIN);
        ck_assert_msg(strstr(err.text, "i = 0") != NULL, "message: %s", err.text);
    }
    arb_clear(n); arb_clear(s);
    embz_expr_clear(w);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-explicit");
    tcase_add_test(tc, test_harmonic);
    tcase_add_test(tc, test_rational_weights);
    tcase_add_test(tc, test_cubes);
    tcase_add_test(tc, test_edges);
    return tu_run_suite(s);
}
