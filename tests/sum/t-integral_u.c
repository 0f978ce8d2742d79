/* Integration in u = ln x (embz_tail_integral_u, src/sum/tail_integral.c): the short Taylor
 * rule and arb's adaptive integrator with a bounded effort and halving. References: closed
 * forms of integral_(e^ua)^(e^ub) f(x) dx, namely (x^(1-a))/(1-a) for f = x^-a,
 * ln x for 1/x and atan x for 1/(1 + x^2) (phi(u) = 1/(2 cosh u), poles at distance pi/2
 * from the real axis: the case the halving exists for). The effort fields integrate_effort
 * and integrate_halvings change the work, never the validity of the enclosure. */
#include "tsum.h"

/* the reference integral of f over [e^ua, e^ub] for weight number k */
static void closed_form(arb_t r, int k, const arb_t ua, const arb_t ub, slong prec)
{
    arb_t a, b;
    arb_init(a); arb_init(b);
    arb_exp(a, ua, prec);
    arb_exp(b, ub, prec);
    if (k == 0) {                                    /* x^(-1/2): 2 (sqrt b - sqrt a) */
        arb_sqrt(b, b, prec);
        arb_sqrt(a, a, prec);
        arb_sub(r, b, a, prec);
        arb_mul_2exp_si(r, r, 1);
    } else if (k == 1) {                             /* x^(-2): 1/a - 1/b */
        arb_inv(a, a, prec);
        arb_inv(b, b, prec);
        arb_sub(r, a, b, prec);
    } else if (k == 2) {                             /* 1/x: ub - ua */
        arb_sub(r, ub, ua, prec);
    } else {                                         /* 1/(1 + x^2): atan b - atan a */
        arb_atan(b, b, prec);
        arb_atan(a, a, prec);
        arb_sub(r, b, a, prec);
    }
    arb_clear(a); arb_clear(b);
}

static const char *const WEIGHTS[4] = { "i^(-1/2)", "i^(-2)", "1/i", "1/(1 + i^2)" };

/* random pieces [ua, ub] in [ln 10, 60], short and long, against the closed forms */
START_TEST(test_closed_forms)
{
    flint_rand_t rs;
    flint_randinit(rs);
    fmpz_t n, end;
    arb_t ua, ub, r, ref, e;
    fmpz_init(n); fmpz_init(end);
    arb_init(ua); arb_init(ub); arb_init(r); arb_init(ref); arb_init(e);
    tsum_ten_pow(end, 30);
    fmpz_set(n, end);
    for (int k = 0; k < 4; k++) {
        embz_expr_t w;
        tsum_parse(w, WEIGHTS[k]);
        for (int pi = 0; pi < 2; pi++) {
            slong prec = TSUM_PRECS[pi];
            embz_tail_t t;
            tsum_tail(t, w, n, 10, end, prec);
            for (int cs = 0; cs < (tsum_quick() ? 6 : 25); cs++) {
                /* ua a dyadic point in [2.5, 30], length 2^j / 16 with j in [0, 9] */
                arb_set_ui(ua, 40 + n_randint(rs, 440));
                arb_mul_2exp_si(ua, ua, -4);
                arb_one(e);
                arb_mul_2exp_si(e, e, (slong) n_randint(rs, 10) - 4);
                arb_add(ub, ua, e, prec);
                long before = t->integrals;
                ck_assert_int_eq(embz_tail_integral_u(r, t, ua, ub, prec), EMBZ_OK);
                ck_assert(t->integrals > before);
                closed_form(ref, k, ua, ub, prec + 64);
                tsum_check(r, ref, prec - 24, WEIGHTS[k]);
            }
            embz_tail_clear(t);
        }
        embz_expr_clear(w);
    }
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(ua); arb_clear(ub); arb_clear(r); arb_clear(ref); arb_clear(e);
    flint_randclear(rs);
}
END_TEST

/* reversed limits give the negated integral (an integral is oriented) */
START_TEST(test_orientation)
{
    embz_expr_t w;
    fmpz_t n, end;
    arb_t ua, ub, r1, r2;
    fmpz_init(n); fmpz_init(end);
    arb_init(ua); arb_init(ub); arb_init(r1); arb_init(r2);
    tsum_parse(w, "i^(-1/2)");
    tsum_ten_pow(end, 30);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, 10, end, prec);
        arb_set_ui(ua, 3);
        arb_set_ui(ub, 40);
        ck_assert_int_eq(embz_tail_integral_u(r1, t, ua, ub, prec), EMBZ_OK);
        ck_assert_int_eq(embz_tail_integral_u(r2, t, ub, ua, prec), EMBZ_OK);
        arb_neg(r2, r2);
        tsum_check_overlap(r1, r2, "reversed limits");
        closed_form(r2, 0, ua, ub, prec + 64);
        tsum_check(r1, r2, prec - 24, "x^(-1/2) over [e^3, e^40]");
        embz_tail_clear(t);
    }
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(ua); arb_clear(ub); arb_clear(r1); arb_clear(r2);
    embz_expr_clear(w);
}
END_TEST

/* The effort fields: on 1/(1 + x^2) over [0, 40] in u (a long piece in the strip of width
 * pi/2), one evaluation per bit makes the integrator give up sooner and halve, so it takes
 * more calls than the default (40 per bit); with a single halving allowed it stops halving
 * early (then the default effort applies to the pieces). Every setting still encloses
 * atan(e^40) - atan(1). */
START_TEST(test_effort)
{
    embz_expr_t w;
    fmpz_t n, end;
    arb_t ua, ub, r, ref;
    fmpz_init(n); fmpz_init(end);
    arb_init(ua); arb_init(ub); arb_init(r); arb_init(ref);
    tsum_parse(w, "1/(1 + i^2)");
    tsum_ten_pow(end, 30);
    fmpz_set(n, end);
    arb_zero(ua);
    arb_set_ui(ub, 40);
    const slong effort[4] = { 0, 1, 1, -5 }, halvings[4] = { 0, 0, 1, 0 };
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        closed_form(ref, 3, ua, ub, prec + 64);
        long calls[4];
        for (int k = 0; k < 4; k++) {
            embz_tail_t t;
            tsum_tail(t, w, n, 10, end, prec);
            ck_assert(t->integrate_effort == 0 && t->integrate_halvings == 0);
            t->integrate_effort = effort[k];
            t->integrate_halvings = halvings[k];
            long before = t->integrals;
            ck_assert_int_eq(embz_tail_integral_u(r, t, ua, ub, prec), EMBZ_OK);
            calls[k] = t->integrals - before;
            tsum_check(r, ref, prec - 24, "atan integral");
            embz_tail_clear(t);
        }
        ck_assert_msg(calls[1] > calls[0], "effort 1: %ld calls, default %ld", calls[1],
                      calls[0]);
        ck_assert_msg(calls[2] < calls[1], "one halving: %ld calls, unlimited %ld", calls[2],
                      calls[1]);
        ck_assert_msg(calls[3] == calls[0], "effort <= 0 is the default: %ld vs %ld",
                      calls[3], calls[0]);
    }
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(ua); arb_clear(ub); arb_clear(r); arb_clear(ref);
    embz_expr_clear(w);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-integral_u");
    tcase_add_test(tc, test_closed_forms);
    tcase_add_test(tc, test_orientation);
    tcase_add_test(tc, test_effort);
    return tu_run_suite(s);
}
