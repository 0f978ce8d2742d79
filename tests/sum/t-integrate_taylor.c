/* The short Taylor rule for integrals in u (_embz_tail_integrate_taylor, src/sum/
 * tail_integral.c). References: closed forms of the integral of phi(u) = f(e^u) e^u, which is
 * the integral of f over [e^ua, e^ub]: for f = x^a it is (e^((a+1)ub) - e^((a+1)ua))/(a+1),
 * for f = 1/x (phi = 1, a polynomial: the rule is exact) it is ub - ua. Also its contract:
 * pieces longer than 2 are refused untouched, and after many failures the rule gives up. */
#include "tsum.h"

/* e^(c ub) - e^(c ua) over c, at prec */
static void exp_integral(arb_t r, const arb_t c, const arb_t ua, const arb_t ub, slong prec)
{
    arb_t e;
    arb_init(e);
    arb_mul(r, c, ub, prec);
    arb_exp(r, r, prec);
    arb_mul(e, c, ua, prec);
    arb_exp(e, e, prec);
    arb_sub(r, r, e, prec);
    arb_div(r, r, c, prec);
    arb_clear(e);
}

/* random short pieces [ua, ua + len] of u in [2, 40], len = 2^-j with j >= j0 */
static void random_piece(arb_t ua, arb_t ub, flint_rand_t rs, slong j0)
{
    arb_set_ui(ua, 128 + n_randint(rs, 38 * 64));
    arb_mul_2exp_si(ua, ua, -6);
    arb_one(ub);
    arb_mul_2exp_si(ub, ub, -(j0 + (slong) n_randint(rs, 4)));
    arb_add(ub, ub, ua, 1000);
}

/* f = x^(1/2): phi = e^(3u/2), smooth on every scale; pieces short enough for 16 terms */
START_TEST(test_exponential)
{
    flint_rand_t rs;
    flint_randinit(rs);
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n, end;
    arb_t ua, ub, r, ref, c;
    fmpz_init(n); fmpz_init(end);
    arb_init(ua); arb_init(ub); arb_init(r); arb_init(ref); arb_init(c);
    tsum_parse(w, "i^(1/2)");
    tsum_ten_pow(end, 20);
    fmpz_set(n, end);
    arb_set_d(c, 1.5);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        tsum_tail(t, w, n, 10, end, prec);
        /* the remainder of K = 16 terms is about 1.5^16/16! (2h)^17: h = 2^-(prec/16 + 2)
         * makes it small enough at either precision */
        for (int cs = 0; cs < (tsum_quick() ? 20 : 100); cs++) {
            random_piece(ua, ub, rs, prec / 16 + 2);
            long ok = t->taylor_ok;
            ck_assert_int_eq(_embz_tail_integrate_taylor(r, t, ua, ub, prec), 1);
            ck_assert_int_eq(t->taylor_ok, ok + 1);
            exp_integral(ref, c, ua, ub, prec + 64);
            tsum_check(r, ref, prec - 8, "integral of e^(3u/2)");
        }
        embz_tail_clear(t);
    }
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(ua); arb_clear(ub); arb_clear(r); arb_clear(ref); arb_clear(c);
    embz_expr_clear(w);
    flint_randclear(rs);
}
END_TEST

/* f = 1/x: phi = 1, so the rule is exact on pieces up to length 2 */
START_TEST(test_polynomial)
{
    flint_rand_t rs;
    flint_randinit(rs);
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n, end;
    arb_t ua, ub, r, ref;
    fmpz_init(n); fmpz_init(end);
    arb_init(ua); arb_init(ub); arb_init(r); arb_init(ref);
    tsum_parse(w, "1/i");
    tsum_ten_pow(end, 20);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        tsum_tail(t, w, n, 10, end, prec);
        for (int cs = 0; cs < (tsum_quick() ? 20 : 100); cs++) {
            random_piece(ua, ub, rs, 0);       /* lengths 1, 1/2, 1/4, 1/8 */
            ck_assert_int_eq(_embz_tail_integrate_taylor(r, t, ua, ub, prec), 1);
            arb_sub(ref, ub, ua, prec + 64);
            tsum_check(r, ref, prec - 4, "integral of 1");
        }
        embz_tail_clear(t);
    }
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(ua); arb_clear(ub); arb_clear(r); arb_clear(ref);
    embz_expr_clear(w);
    flint_randclear(rs);
}
END_TEST

/* pieces longer than 2 are not tried (res untouched, no failure counted); after 8 failures
 * outnumbering the successes four to one the rule is not tried at all */
START_TEST(test_contract)
{
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n, end;
    arb_t ua, ub, r;
    fmpz_init(n); fmpz_init(end);
    arb_init(ua); arb_init(ub); arb_init(r);
    tsum_parse(w, "1/i");
    tsum_ten_pow(end, 20);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        tsum_tail(t, w, n, 10, end, prec);
        arb_set_ui(ua, 3);
        arb_set_ui(ub, 6);
        arb_set_ui(r, 77);
        long ok = t->taylor_ok, fail = t->taylor_fail;
        ck_assert_int_eq(_embz_tail_integrate_taylor(r, t, ua, ub, prec), 0);
        ck_assert(arb_equal_si(r, 77));
        ck_assert(t->taylor_ok == ok && t->taylor_fail == fail);
        /* length 3/2 is a short piece (exactly 2 is not always: the bound on the half
         * length is rounded up) */
        arb_set_d(ub, 4.5);
        ck_assert_int_eq(_embz_tail_integrate_taylor(r, t, ua, ub, prec), 1);
        arb_set_d(ua, 1.5);
        ck_assert(arb_contains(r, ua) && tsum_accurate(r, prec - 4));
        arb_set_ui(ua, 3);
        t->taylor_ok = 1;
        t->taylor_fail = 8;
        arb_set_ui(r, 77);
        ck_assert_int_eq(_embz_tail_integrate_taylor(r, t, ua, ub, prec), 0);
        ck_assert(arb_equal_si(r, 77));
        t->taylor_ok = 2;              /* 8 failures against 2 successes: tried again */
        ck_assert_int_eq(_embz_tail_integrate_taylor(r, t, ua, ub, prec), 1);
        embz_tail_clear(t);
    }
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(ua); arb_clear(ub); arb_clear(r);
    embz_expr_clear(w);
}
END_TEST

/* a phi that is not smooth on the scale of the piece: f = 1/(1 + x^2) gives
 * phi = 1/(2 cosh u), with poles at distance pi/2 from the real axis; on [-7/8, 7/8] the
 * Taylor coefficients shrink only like (2/pi)^k and sixteen terms cannot reach 2^-prec, so
 * the rule declines and counts a failure */
START_TEST(test_declines)
{
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n, end;
    arb_t ua, ub, r;
    fmpz_init(n); fmpz_init(end);
    arb_init(ua); arb_init(ub); arb_init(r);
    tsum_parse(w, "1/(1 + i^2)");
    tsum_ten_pow(end, 20);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        tsum_tail(t, w, n, 10, end, prec);
        arb_set_d(ua, -0.875);
        arb_set_d(ub, 0.875);
        arb_set_ui(r, 77);
        long fail = t->taylor_fail;
        ck_assert_int_eq(_embz_tail_integrate_taylor(r, t, ua, ub, prec), 0);
        ck_assert(arb_equal_si(r, 77));
        ck_assert_int_eq(t->taylor_fail, fail + 1);
        embz_tail_clear(t);
    }
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(ua); arb_clear(ub); arb_clear(r);
    embz_expr_clear(w);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-integrate_taylor");
    tcase_add_test(tc, test_exponential);
    tcase_add_test(tc, test_polynomial);
    tcase_add_test(tc, test_contract);
    tcase_add_test(tc, test_declines);
    return tu_run_suite(s);
}
