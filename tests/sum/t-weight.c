/* The Taylor series of a tail's weight (src/sum/tail_weight.c): embz_tail_weight_series and
 * embz_tail_phi_series. References: the binomial series (x + s sigma)^a =
 * sum_k binom(a, k) x^(a-k) s^k sigma^k with exact rational binomial coefficients (FLINT
 * fmpq), and the closed forms of phi(u) = f(e^u) e^u: e^((a+1)u) for f = x^a, 1/u for
 * f = 1/(x ln x), whose Taylor coefficients are (a+1)^k e^((a+1)v) / k! and (-1)^k / v^(k+1). */
#include "tsum.h"

#define LEN 12

/* binom(a, k) for a rational a, exact */
static void binom_q(fmpq_t r, const fmpq_t a, slong k)
{
    fmpq_t f;
    fmpq_init(f);
    fmpq_one(r);
    for (slong j = 0; j < k; j++) {
        fmpq_set_si(f, j, 1);
        fmpq_sub(f, a, f);
        fmpq_mul(r, r, f);
        fmpq_set_si(f, 1, (ulong) j + 1);
        fmpq_mul(r, r, f);
    }
    fmpq_clear(f);
}

/* x^a for the weights i^(p/q): coefficients at random points and scales */
static void power_case(slong p, ulong q)
{
    char text[64];
    snprintf(text, sizeof(text), "i^(%ld/%lu)", (long) p, q);
    flint_rand_t rs;
    flint_randinit(rs);
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n, end;
    fmpq_t a, ak, b;
    arb_t x, s, ref, e, aa;
    arb_ptr c = _arb_vec_init(LEN);
    fmpz_init(n); fmpz_init(end);
    fmpq_init(a); fmpq_init(ak); fmpq_init(b);
    arb_init(x); arb_init(s); arb_init(ref); arb_init(e); arb_init(aa);
    tsum_parse(w, text);
    fmpq_set_si(a, p, q);
    tsum_ten_pow(end, 6);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        tsum_tail(t, w, n, 10, end, prec);
        for (int cs = 0; cs < (tsum_quick() ? 10 : 50); cs++) {
            /* x = integer + random dyadic fraction in [1, 10^6); s a small dyadic scale */
            arb_set_ui(x, 1 + n_randint(rs, 1000000));
            arb_set_ui(e, n_randint(rs, 1024));
            arb_mul_2exp_si(e, e, -10);
            arb_add(x, x, e, prec);
            arb_set_si(s, (slong) n_randint(rs, 64) - 32);
            arb_mul_2exp_si(s, s, -3);
            long before = t->evals;
            ck_assert_int_eq(embz_tail_weight_series(c, t, x, s, LEN, prec), EMBZ_OK);
            ck_assert_int_eq(t->evals, before + 1);
            for (slong k = 0; k < LEN; k++) {
                binom_q(b, a, k);
                fmpq_set_si(ak, k, 1);
                fmpq_sub(ak, a, ak);
                arb_set_fmpq(aa, ak, prec + 64);
                arb_pow(ref, x, aa, prec + 64);
                arb_pow_ui(e, s, (ulong) k, prec + 64);
                arb_mul(ref, ref, e, prec + 64);
                arb_set_fmpq(e, b, prec + 64);
                arb_mul(ref, ref, e, prec + 64);
                tsum_check_overlap(c + k, ref, text);
                /* a zero scale makes every coefficient but the first exactly 0 */
                if (!arb_is_zero(ref)) ck_assert(tsum_accurate(c + k, prec - 24));
            }
        }
        embz_tail_clear(t);
    }
    _arb_vec_clear(c, LEN);
    fmpz_clear(n); fmpz_clear(end);
    fmpq_clear(a); fmpq_clear(ak); fmpq_clear(b);
    arb_clear(x); arb_clear(s); arb_clear(ref); arb_clear(e); arb_clear(aa);
    embz_expr_clear(w);
    flint_randclear(rs);
}

START_TEST(test_power_minus_half) { power_case(-1, 2); }
END_TEST
START_TEST(test_power_three_halves) { power_case(3, 2); }
END_TEST

/* a wide ball x: the coefficients enclose those at any point of it (what Lagrange remainder
 * bounds rely on); checked at random points of the ball */
START_TEST(test_wide_ball)
{
    flint_rand_t rs;
    flint_randinit(rs);
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n, end;
    arb_t x, xp, one, e;
    arb_ptr cw = _arb_vec_init(LEN), cp = _arb_vec_init(LEN);
    fmpz_init(n); fmpz_init(end);
    arb_init(x); arb_init(xp); arb_init(one); arb_init(e);
    arb_one(one);
    tsum_parse(w, "1/(i*log(i))");
    tsum_ten_pow(end, 8);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        tsum_tail(t, w, n, 10, end, prec);
        for (int cs = 0; cs < (tsum_quick() ? 10 : 40); cs++) {
            arb_set_ui(x, 20 + n_randint(rs, 100000));
            mag_set_ui(arb_radref(x), 1 + n_randint(rs, 10));
            ck_assert_int_eq(embz_tail_weight_series(cw, t, x, one, LEN, prec), EMBZ_OK);
            for (int j = 0; j < 5; j++) {
                /* a point of the ball: mid + rad * (r/64 - 1), r in [0, 128] */
                arb_set_si(e, (slong) n_randint(rs, 129) - 64);
                arb_mul_2exp_si(e, e, -6);
                arf_set_mag(arb_midref(xp), arb_radref(x));
                mag_zero(arb_radref(xp));
                arb_mul(xp, xp, e, prec);
                arb_add_arf(xp, xp, arb_midref(x), prec);
                ck_assert_int_eq(embz_tail_weight_series(cp, t, xp, one, LEN, prec), EMBZ_OK);
                for (slong k = 0; k < LEN; k++)
                    tsum_check_overlap(cw + k, cp + k, "wide ball");
            }
        }
        embz_tail_clear(t);
    }
    _arb_vec_clear(cw, LEN); _arb_vec_clear(cp, LEN);
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(x); arb_clear(xp); arb_clear(one); arb_clear(e);
    embz_expr_clear(w);
    flint_randclear(rs);
}
END_TEST

/* phi_series against the closed forms of phi for x^(-3/2) and 1/(x ln x) */
START_TEST(test_phi_series)
{
    flint_rand_t rs;
    flint_randinit(rs);
    embz_expr_t w1, w2;
    embz_tail_t t1, t2;
    fmpz_t n, end;
    arb_t v, ref, e, c;
    arb_ptr s = _arb_vec_init(LEN);
    fmpz_init(n); fmpz_init(end);
    arb_init(v); arb_init(ref); arb_init(e); arb_init(c);
    tsum_parse(w1, "i^(-3/2)");
    tsum_parse(w2, "1/(i*log(i))");
    tsum_ten_pow(end, 8);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        tsum_tail(t1, w1, n, 10, end, prec);
        tsum_tail(t2, w2, n, 10, end, prec);
        for (int cs = 0; cs < (tsum_quick() ? 10 : 50); cs++) {
            /* v in [1, 40], a dyadic point */
            arb_set_ui(v, 64 + n_randint(rs, 39 * 64));
            arb_mul_2exp_si(v, v, -6);
            long before = t1->evals;
            ck_assert_int_eq(embz_tail_phi_series(s, t1, v, LEN, prec), EMBZ_OK);
            ck_assert_int_eq(t1->evals, before + 1);
            /* phi = e^(-u/2): coefficient k = (-1/2)^k e^(-v/2) / k! */
            for (slong k = 0; k < LEN; k++) {
                arb_mul_2exp_si(ref, v, -1);
                arb_neg(ref, ref);
                arb_exp(ref, ref, prec + 64);
                arb_fac_ui(e, (ulong) k, prec + 64);
                arb_div(ref, ref, e, prec + 64);
                arb_mul_2exp_si(ref, ref, -k);
                if (k & 1) arb_neg(ref, ref);
                tsum_check(s + k, ref, prec - 16, "phi of x^(-3/2)");
            }
            ck_assert_int_eq(embz_tail_phi_series(s, t2, v, LEN, prec), EMBZ_OK);
            /* phi = 1/u: coefficient k = (-1)^k / v^(k+1) */
            for (slong k = 0; k < LEN; k++) {
                arb_pow_ui(ref, v, (ulong) k + 1, prec + 64);
                arb_inv(ref, ref, prec + 64);
                if (k & 1) arb_neg(ref, ref);
                tsum_check(s + k, ref, prec - 16, "phi of 1/(x ln x)");
            }
        }
        embz_tail_clear(t1);
        embz_tail_clear(t2);
    }
    _arb_vec_clear(s, LEN);
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(v); arb_clear(ref); arb_clear(e); arb_clear(c);
    embz_expr_clear(w1); embz_expr_clear(w2);
    flint_randclear(rs);
}
END_TEST

/* a weight without a finite enclosure on the ball (1/x on a ball around 0) is reported as a
 * domain error, not returned as a non-finite series */
START_TEST(test_domain)
{
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n, end;
    arb_t x, one;
    arb_ptr c = _arb_vec_init(4);
    fmpz_init(n); fmpz_init(end);
    arb_init(x); arb_init(one);
    arb_one(one);
    tsum_parse(w, "1/i");
    fmpz_set_ui(end, 1000);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        tsum_tail(t, w, n, 10, end, prec);
        arb_zero(x);
        mag_set_ui(arb_radref(x), 1);
        ck_assert_int_eq(embz_tail_weight_series(c, t, x, one, 4, prec), EMBZ_ERR_DOMAIN);
        arb_set_si(x, -1);     /* phi(u) = 1 for 1/x: finite everywhere, also at u = -1 */
        ck_assert_int_eq(embz_tail_phi_series(c, t, x, 4, prec), EMBZ_OK);
        ck_assert(arb_contains_si(c, 1) && arb_contains_zero(c + 1) && arb_contains_zero(c + 3));
        ck_assert(tsum_accurate(c, prec - 4) && tsum_accurate(c + 1, prec - 4));
        embz_tail_clear(t);
    }
    _arb_vec_clear(c, 4);
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(x); arb_clear(one);
    embz_expr_clear(w);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-weight");
    tcase_add_test(tc, test_power_minus_half);
    tcase_add_test(tc, test_power_three_halves);
    tcase_add_test(tc, test_wide_ball);
    tcase_add_test(tc, test_phi_series);
    tcase_add_test(tc, test_domain);
    return tu_run_suite(s);
}
