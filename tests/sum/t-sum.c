/* Tail sums at integers (embz_tail_sum, embz_tail_sum_level, src/sum/tail_sum.c): T~(k) with
 * the remainder bound encloses sum_(M < i <= k) f(i). References:
 *   - explicit sums (embz_sum_explicit: one ball per index, no Euler–Maclaurin) for k up to
 *     20000, random weights, starts and ends;
 *   - values computed once with Debian's python3-mpmath 1.3.0 at mp.dps = 110 (the command
 *     is quoted beside each value) for ends up to 10^30;
 *   - Faulhaber's closed form for i^3 (the Euler–Maclaurin formula is exact on polynomials),
 *     an exact integer from FLINT, for k up to 10^15;
 *   - agreement of every level valid at k (they are chained at the level starts). */
#include "tsum.h"

/* bits a tail sum may lose against the working precision (an estimate, with room: the
 * integral and the boundary terms each lose a few bits, the order is chosen for 2^-prec) */
#define LOSS 32

START_TEST(test_explicit)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const char *const texts[5] = { "1/i", "sqrt(i)", "exp(-i/n)", "1/(i*log(i))",
                                   "i^(-1 + 1/log(n+1))" };
    const slong top = 20000;
    fmpz_t n, end;
    arb_t x, T, S, nb;
    fmpz_init(n); fmpz_init(end);
    arb_init(x); arb_init(T); arb_init(S); arb_init(nb);
    fmpz_set_si(end, top);
    fmpz_set_ui(n, 3000);
    for (int k = 0; k < 5; k++) {
        embz_expr_t w;
        tsum_parse(w, texts[k]);
        for (int pi = 0; pi < 2; pi++) {
            slong prec = TSUM_PRECS[pi];
            slong M = 2 + (slong) n_randint(rs, 60);
            embz_tail_t t;
            tsum_tail(t, w, n, M, end, prec);
            arb_set_fmpz(nb, n);
            for (int cs = 0; cs < (tsum_quick() ? 5 : 20); cs++) {
                slong kk = M + 1 + (slong) n_randint(rs, (ulong) (top - M));
                embz_err_t err;
                embz_err_clear(&err);
                arb_set_si(x, kk);
                ck_assert_int_eq(embz_tail_sum(T, t, x, prec), EMBZ_OK);
                ck_assert_int_eq(embz_sum_explicit(S, w, nb, M + 1, kk, prec + 64, &err),
                                 EMBZ_OK);
                tsum_check_sum(T, S, t->rem, 1, prec - LOSS, texts[k]);
                ck_assert(mag_cmp(arb_radref(T), t->rem) >= 0);    /* rem is in the radius */
            }
            /* T(M) is the empty sum */
            arb_set_si(x, M);
            ck_assert_int_eq(embz_tail_sum(T, t, x, prec), EMBZ_OK);
            ck_assert(arb_contains_zero(T));
            {
                mag_t b;
                mag_init(b);
                mag_one(b);
                mag_mul_2exp_si(b, b, -prec + LOSS);
                mag_add(b, b, t->rem);
                ck_assert(mag_cmp(arb_radref(T), b) <= 0);
                mag_clear(b);
            }
            embz_tail_clear(t);
        }
        embz_expr_clear(w);
    }
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(x); arb_clear(T); arb_clear(S); arb_clear(nb);
    flint_randclear(rs);
}
END_TEST

/* one mpmath reference: the sum of w over (M, k] for size n (decimal powers) */
typedef struct {
    const char *w;
    slong M;
    ulong k10, n10;        /* k = 10^k10, n = 10^n10 */
    const char *value;     /* mpmath, 95 significant digits, with its error as "+/- ..." */
} mp_case;

static const mp_case MP[5] = {
    /* zeta(mpf(3)/2, 11) - zeta(mpf(3)/2, 10**6 + 1) */
    { "i^(-3/2)", 10, 6, 6,
      "0.61503885583988650382687397522796132097673925062833018826523626674739926389428082636"
      "620343312048 +/- 1e-90" },
    /* digamma(10**30 + 1) - digamma(101) */
    { "1/i", 100, 30, 30,
      "64.467390937083283120341138054955575501166231868094661226629070223991493126232355248"
      "077842113723 +/- 1e-88" },
    /* s = 1 - 1/log(mpf(10)**9 + 1); zeta(s, 21) - zeta(s, 10**9 + 1) */
    { "i^(-1 + 1/log(n+1))", 20, 9, 9,
      "32.356667781489377590179899902214695069133286326128149134556722761121117971980635087"
      "839062709812 +/- 1e-88" },
    /* q = exp(-mpf(1)/10**6); q**51 * (1 - q**(10**7 - 50)) / (1 - q) */
    { "exp(-i/n)", 50, 7, 6,
      "999904.1013679993473506474499016550849050068043429993929158974349101835678197504448"
      "0498903921094 +/- 1e-83" },
    /* loggamma(mpf(10)**20 + 1) - loggamma(31) */
    { "log(i)", 30, 20, 20,
      "4505170185988091367985.269462483043380398676411139950578479589702827268566112508497"
      "4518802949988 +/- 1e-71" },
};

START_TEST(test_mpmath)
{
    fmpz_t n, end;
    arb_t x, T, ref;
    fmpz_init(n); fmpz_init(end);
    arb_init(x); arb_init(T); arb_init(ref);
    for (int c = 0; c < 5; c++) {
        embz_expr_t w;
        tsum_parse(w, MP[c].w);
        tsum_ten_pow(end, MP[c].k10);
        tsum_ten_pow(n, MP[c].n10);
        for (int pi = 0; pi < 2; pi++) {
            slong prec = TSUM_PRECS[pi];
            embz_tail_t t;
            tsum_tail(t, w, n, MP[c].M, end, prec);
            ck_assert_int_eq(arb_set_str(ref, MP[c].value, 400), 0);
            arb_set_fmpz(x, end);
            ck_assert_int_eq(embz_tail_sum(T, t, x, prec), EMBZ_OK);
            tsum_check_sum(T, ref, t->rem, 1, prec - LOSS, MP[c].w);
            embz_tail_clear(t);
        }
        embz_expr_clear(w);
    }
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(x); arb_clear(T); arb_clear(ref);
}
END_TEST

/* i^3: sum_(M < i <= k) i^3 = (k(k+1)/2)^2 - (M(M+1)/2)^2 exactly; f^(2p) vanishes from
 * p = 2 on, so the remainder bound is 0 */
START_TEST(test_faulhaber)
{
    flint_rand_t rs;
    flint_randinit(rs);
    fmpz_t n, end, kk, a, b;
    arb_t x, T, ref;
    fmpz_init(n); fmpz_init(end); fmpz_init(kk); fmpz_init(a); fmpz_init(b);
    arb_init(x); arb_init(T); arb_init(ref);
    embz_expr_t w;
    tsum_parse(w, "i^3");
    tsum_ten_pow(end, 15);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        slong M = 1 + (slong) n_randint(rs, 100);
        embz_tail_t t;
        tsum_tail(t, w, n, M, end, prec);
        ck_assert(mag_is_zero(t->rem));
        ck_assert_int_eq(t->dir, -1);
        for (int cs = 0; cs < (tsum_quick() ? 10 : 40); cs++) {
            fmpz_randm(kk, rs, end);
            fmpz_add_si(kk, kk, M + 1);
            if (fmpz_cmp(kk, end) > 0) fmpz_set(kk, end);
            fmpz_add_ui(a, kk, 1);
            fmpz_mul(a, a, kk);
            fmpz_fdiv_q_2exp(a, a, 1);
            fmpz_mul(a, a, a);
            fmpz_set_si(b, M * (M + 1) / 2);
            fmpz_mul(b, b, b);
            fmpz_sub(a, a, b);
            arb_set_fmpz(ref, a);
            arb_set_fmpz(x, kk);
            ck_assert_int_eq(embz_tail_sum(T, t, x, prec), EMBZ_OK);
            tsum_check_sum(T, ref, t->rem, 1, prec - LOSS, "i^3");
        }
        embz_tail_clear(t);
    }
    embz_expr_clear(w);
    fmpz_clear(n); fmpz_clear(end); fmpz_clear(kk); fmpz_clear(a); fmpz_clear(b);
    arb_clear(x); arb_clear(T); arb_clear(ref);
    flint_randclear(rs);
}
END_TEST

/* every level valid at k gives an enclosure of the same sum (the overlap is a necessary
 * condition); the automatic level is the highest valid one; a level that is not there is
 * refused */
START_TEST(test_levels_agree)
{
    flint_rand_t rs;
    flint_randinit(rs);
    fmpz_t n, end, kk;
    arb_t x, T, Tj;
    fmpz_init(n); fmpz_init(end); fmpz_init(kk);
    arb_init(x); arb_init(T); arb_init(Tj);
    embz_expr_t w;
    tsum_parse(w, "1/(i*log(i))");
    tsum_ten_pow(end, 60);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, 30, end, prec);
        ck_assert(t->nlev > 1);
        int multi = 0;
        for (int cs = 0; cs < (tsum_quick() ? 15 : 60); cs++) {
            fmpz_randbits(kk, rs, 1 + n_randint(rs, 199));
            fmpz_abs(kk, kk);
            fmpz_add_ui(kk, kk, 31);
            if (fmpz_cmp(kk, end) > 0) fmpz_set(kk, end);
            arb_set_fmpz(x, kk);
            slong lev = embz_tail_level(t, x);
            ck_assert(lev >= 0);
            ck_assert_int_eq(embz_tail_sum(T, t, x, prec), EMBZ_OK);
            ck_assert_int_eq(embz_tail_sum_level(Tj, t, x, EMBZ_TAIL_LEVEL_AUTO, prec), EMBZ_OK);
            ck_assert(arb_equal(T, Tj));
            ck_assert_int_eq(embz_tail_sum_level(Tj, t, x, lev, prec), EMBZ_OK);
            ck_assert(arb_equal(T, Tj));
            for (slong j = 0; j < lev; j++) {
                /* a lower level may or may not reach k; where it does it must agree */
                if (fmpz_bits(kk) > (flint_bitcnt_t) t->lev_top[j] && t->lev_top[j] >= 0)
                    continue;
                ck_assert_int_eq(embz_tail_sum_level(Tj, t, x, j, prec), EMBZ_OK);
                tsum_check_overlap(Tj, T, "two levels");
                multi++;
            }
            ck_assert_int_eq(embz_tail_sum_level(Tj, t, x, t->nlev, prec), EMBZ_ERR_PREC);
            ck_assert_int_eq(embz_tail_sum_level(Tj, t, x, -1, prec), EMBZ_ERR_PREC);
        }
        ck_assert(multi > 0);
        embz_tail_clear(t);
    }
    embz_expr_clear(w);
    fmpz_clear(n); fmpz_clear(end); fmpz_clear(kk);
    arb_clear(x); arb_clear(T); arb_clear(Tj);
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-sum");
    tcase_add_test(tc, test_explicit);
    tcase_add_test(tc, test_mpmath);
    tcase_add_test(tc, test_faulhaber);
    tcase_add_test(tc, test_levels_agree);
    return tu_run_suite(s);
}
