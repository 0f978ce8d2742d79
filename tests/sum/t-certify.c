/* Certification of a tail (src/sum/tail_certify.c through embz_tail_init): the direction of
 * monotone weights, refusals of weights that are not smooth and monotone (with the reason
 * where one is known), the cut of a negligible far end and the mass it leaves out, and
 * _embz_tail_negligible_mass. References: the monotonicity of the weights as known from
 * calculus; exact sums where the remainder bound dominates the error (1/i from M = 3, exact
 * harmonic numbers from FLINT: an underestimated remainder would show); the closed form of
 * geometric sums, sum_(a <= i <= b) 2^-i = 2^(1-a) - 2^-b; exact rational sums of 1/i^2. */
#include <string.h>
#include "tsum.h"

static int init_status(embz_tail_t t, const char *text, slong M, const char *end_text,
                       slong prec, embz_err_t *err)
{
    embz_expr_t w;
    fmpz_t n, end;
    fmpz_init(n); fmpz_init(end);
    tsum_parse(w, text);
    ck_assert(fmpz_set_str(end, end_text, 10) == 0);
    fmpz_set(n, end);
    embz_err_clear(err);
    int st = embz_tail_init(t, w, n, M, end, prec, err);
    embz_tail_clear(t);
    embz_expr_clear(w);
    fmpz_clear(n); fmpz_clear(end);
    return st;
}

/* the direction: +1 for non-increasing weights (constants count as such), -1 for
 * non-decreasing ones */
START_TEST(test_direction)
{
    const char *const texts[6] = { "1/i", "sqrt(i)", "1", "exp(-i/n)", "i^3", "log(i)" };
    const int dirs[6] = { 1, -1, 1, 1, -1, -1 };
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        for (int k = 0; k < 6; k++) {
            embz_expr_t w;
            embz_tail_t t;
            fmpz_t n, end;
            fmpz_init(n); fmpz_init(end);
            tsum_parse(w, texts[k]);
            tsum_ten_pow(end, 40);
            fmpz_set(n, end);
            tsum_tail(t, w, n, 10, end, prec);
            ck_assert_msg(t->dir == dirs[k], "%s: direction %d", texts[k], t->dir);
            ck_assert(mag_is_finite(t->rem) && mag_is_zero(t->neglected));
            ck_assert(fmpz_equal(t->end, end));
            embz_tail_clear(t);
            embz_expr_clear(w);
            fmpz_clear(n); fmpz_clear(end);
        }
    }
}
END_TEST

/* weights that are not monotone, not smooth, undefined, or too steep */
START_TEST(test_refusals)
{
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        embz_err_t err;
        ck_assert_int_eq(init_status(t, "1 + sin(i)/2", 10, "1000000", prec, &err),
                         EMBZ_ERR_UNSUPPORTED);
        ck_assert(strstr(err.text, "smooth and monotone") != NULL);
        ck_assert_int_eq(init_status(t, "(i - 100)^2 + 1", 10, "10000", prec, &err),
                         EMBZ_ERR_UNSUPPORTED);
        ck_assert_int_eq(init_status(t, "1/floor(sqrt(i))", 10, "10000", prec, &err),
                         EMBZ_ERR_UNSUPPORTED);
        /* a pole at i = 500 */
        ck_assert_int_eq(init_status(t, "1/(i - 500)", 10, "1000", prec, &err),
                         EMBZ_ERR_DOMAIN);
        /* undefined at M itself */
        ck_assert_int_eq(init_status(t, "log(i - 20)", 10, "1000", prec, &err),
                         EMBZ_ERR_DOMAIN);
        ck_assert(strstr(err.text, "i = 10") != NULL);
        /* growing by e^(10^6) over the tail: refused, and the reason says so */
        ck_assert_int_eq(init_status(t, "exp(i/100)", 10, "100000000", prec, &err),
                         EMBZ_ERR_UNSUPPORTED);
        ck_assert_msg(strstr(err.text, "grows by a factor") != NULL, "%s", err.text);
    }
}
END_TEST

/* 1/i from M = 3: the Euler–Maclaurin series diverges soon, so the remainder bound is most
 * of the radius; every T(k) must still contain H_k - H_3 */
START_TEST(test_remainder_encloses)
{
    embz_expr_t w;
    fmpz_t n, end;
    fmpq_t h, h3;
    arb_t x, T, ref;
    fmpz_init(n); fmpz_init(end);
    fmpq_init(h); fmpq_init(h3);
    arb_init(x); arb_init(T); arb_init(ref);
    tsum_parse(w, "1/i");
    fmpz_set_ui(end, 2000);
    fmpz_set(n, end);
    arith_harmonic_number(h3, 3);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, 3, end, prec);
        ck_assert(mag_cmp_2exp_si(t->rem, -prec) > 0);     /* it is the remainder that counts */
        for (slong k = 4; k <= 2000; k += 7) {
            arith_harmonic_number(h, (ulong) k);
            fmpq_sub(h, h, h3);
            arb_set_fmpq(ref, h, prec + 64);
            arb_set_si(x, k);
            ck_assert_int_eq(embz_tail_sum(T, t, x, prec), EMBZ_OK);
            tsum_check_sum(T, ref, t->rem, 1, prec - 32, "H_k - H_3");
        }
        embz_tail_clear(t);
    }
    embz_expr_clear(w);
    fmpz_clear(n); fmpz_clear(end);
    fmpq_clear(h); fmpq_clear(h3);
    arb_clear(x); arb_clear(T); arb_clear(ref);
}
END_TEST

/* sum_(a <= i <= b) 2^-i for integers a <= b */
static void geometric(arb_t r, const fmpz_t a, const fmpz_t b, slong prec)
{
    arb_t e;
    arb_init(e);
    arb_one(r);
    arb_mul_2exp_fmpz(r, r, a);
    arb_inv(r, r, prec);
    arb_mul_2exp_si(r, r, 1);                  /* 2^(1-a) */
    arb_one(e);
    arb_mul_2exp_fmpz(e, e, b);
    arb_inv(e, e, prec);
    arb_sub(r, r, e, prec);
    arb_clear(e);
}

/* 2^-i up to 10^50: the far weights are negligible, the tail ends early; what is left out
 * (2^-E - 2^-(10^50) beyond the new end E) is at most neglected, which is below
 * 2^-(prec+20) f(M); the sums up to E are the geometric ones */
START_TEST(test_cut)
{
    const slong M = 10;
    embz_expr_t w;
    fmpz_t n, end, a, k;
    arb_t x, T, ref;
    mag_t m;
    fmpz_init(n); fmpz_init(end); fmpz_init(a); fmpz_init(k);
    arb_init(x); arb_init(T); arb_init(ref);
    mag_init(m);
    tsum_parse(w, "2^(-i)");
    tsum_ten_pow(end, 50);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, M, end, prec);
        ck_assert(fmpz_cmp(t->end, end) < 0 && fmpz_cmp_si(t->end, M + 1) > 0);
        ck_assert(!mag_is_zero(t->neglected));
        /* neglected >= 2^-E (the mass beyond E differs from 2^-E by 2^-(10^50) only) */
        mag_one(m);
        mag_mul_2exp_si(m, m, -fmpz_get_si(t->end));
        ck_assert(mag_cmp(t->neglected, m) >= 0);
        /* neglected <= 2^-(prec + 20) f(M) = 2^-(prec + 20 + M) */
        mag_one(m);
        mag_mul_2exp_si(m, m, -(prec + 20 + M));
        ck_assert(mag_cmp(t->neglected, m) <= 0);
        /* the sums up to the new end */
        fmpz_set_si(a, M + 1);
        for (fmpz_set_si(k, M + 1); fmpz_cmp(k, t->end) <= 0; fmpz_add_ui(k, k, 3)) {
            geometric(ref, a, k, prec + 64);
            arb_set_fmpz(x, k);
            ck_assert_int_eq(embz_tail_sum(T, t, x, prec), EMBZ_OK);
            tsum_check_sum(T, ref, t->rem, 1, prec - 32, "geometric sum");
        }
        embz_tail_clear(t);
    }
    embz_expr_clear(w);
    fmpz_clear(n); fmpz_clear(end); fmpz_clear(a); fmpz_clear(k);
    arb_clear(x); arb_clear(T); arb_clear(ref);
    mag_clear(m);
}
END_TEST

/* _embz_tail_negligible_mass on 1/x^2 over random [e^ua, e^ub]: what it adds is at least the
 * exact sum of 1/i^2 over the integers there (FLINT rationals); it adds to what mass held;
 * with no allowance at all it fails */
START_TEST(test_negligible_mass)
{
    flint_rand_t rs;
    flint_randinit(rs);
    embz_expr_t w;
    fmpz_t n, end, a, b;
    fmpq_t q, term;
    arf_t ua, ub;
    arb_t e, ref;
    mag_t mass, allow, m, before;
    fmpz_init(n); fmpz_init(end); fmpz_init(a); fmpz_init(b);
    fmpq_init(q); fmpq_init(term);
    arf_init(ua); arf_init(ub);
    arb_init(e); arb_init(ref);
    mag_init(mass); mag_init(allow); mag_init(m); mag_init(before);
    tsum_parse(w, "1/i^2");
    fmpz_set_ui(end, 100000);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, 10, end, prec);
        ck_assert(fmpz_equal(t->end, end));
        for (int cs = 0; cs < (tsum_quick() ? 10 : 40); cs++) {
            /* ua in [3, 8], ub = ua + [1/16, 2], inside [M, end] = [10, 10^5] */
            arf_set_ui(ua, 48 + n_randint(rs, 80));
            arf_mul_2exp_si(ua, ua, -4);
            arf_set_ui(ub, 1 + n_randint(rs, 32));
            arf_mul_2exp_si(ub, ub, -4);
            arf_add(ub, ub, ua, ARF_PREC_EXACT, ARF_RND_DOWN);
            /* the integers in [e^ua, e^ub]: a = ceil(e^ua), b = floor(e^ub) (e^ua is never
             * an integer for a nonzero dyadic ua) */
            arb_set_arf(e, ua);
            arb_exp(e, e, 256);
            arf_get_fmpz(a, arb_midref(e), ARF_RND_CEIL);
            arb_set_arf(e, ub);
            arb_exp(e, e, 256);
            arf_get_fmpz(b, arb_midref(e), ARF_RND_FLOOR);
            fmpq_zero(q);
            for (fmpz_set(n, a); fmpz_cmp(n, b) <= 0; fmpz_add_ui(n, n, 1)) {
                fmpz_one(fmpq_numref(term));
                fmpz_mul(fmpq_denref(term), n, n);
                fmpq_add(q, q, term);
            }
            mag_one(allow);                      /* generous: the sums are below 1/20 */
            mag_set_ui_2exp_si(before, 3, -5000);
            mag_set(mass, before);
            ck_assert_int_eq(_embz_tail_negligible_mass(mass, t, ua, ub, allow, 0, prec),
                             EMBZ_OK);
            arb_set_fmpq(ref, q, 256);
            arb_get_mag_lower(m, ref);
            mag_add_lower(m, m, before);
            ck_assert_msg(mag_cmp(mass, m) >= 0, "mass below the exact sum");
            mag_zero(allow);
            mag_zero(mass);
            ck_assert_int_eq(_embz_tail_negligible_mass(mass, t, ua, ub, allow, 0, prec),
                             EMBZ_ERR_UNSUPPORTED);
        }
        embz_tail_clear(t);
        fmpz_set(n, end);
    }
    embz_expr_clear(w);
    fmpz_clear(n); fmpz_clear(end); fmpz_clear(a); fmpz_clear(b);
    fmpq_clear(q); fmpq_clear(term);
    arf_clear(ua); arf_clear(ub);
    arb_clear(e); arb_clear(ref);
    mag_clear(mass); mag_clear(allow); mag_clear(m); mag_clear(before);
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-certify");
    tcase_add_test(tc, test_direction);
    tcase_add_test(tc, test_refusals);
    tcase_add_test(tc, test_remainder_encloses);
    tcase_add_test(tc, test_cut);
    tcase_add_test(tc, test_negligible_mass);
    return tu_run_suite(s);
}
