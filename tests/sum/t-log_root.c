/* The root of f(x) = e^lnv in s = ln x (embz_tail_log_root, src/sum/tail_logsplit.c), an
 * approximation by Newton's method that settles to 2^-(prec - 8) max(1, |s|). References:
 * f = x^a, where the root is s = lnv / a exactly; f = 1/(x ln x), where the residual
 * ln f(e^s) - lnv is computed with arb directly (-s - ln s); roots outside [slo, shi] and
 * tails without the split are reported as EMBZ_ERR_PREC. */
#include "tsum.h"

/* |got - want| <= 2^-bits max(1, |want|) */
static int close_to(const arb_t got, const arb_t want, slong bits, slong prec)
{
    arb_t d, m;
    arb_init(d); arb_init(m);
    arb_sub(d, got, want, prec);
    arb_abs(d, d);
    arb_abs(m, want);
    if (arf_cmp_si(arb_midref(m), 1) < 0) arb_one(m);
    arb_mul_2exp_si(m, m, -bits);
    int ok = arb_le(d, m);
    arb_clear(d); arb_clear(m);
    return ok;
}

START_TEST(test_power)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const slong M = 10;
    fmpz_t n, end;
    arb_t s, lnv, slo, shi, want, a;
    fmpz_init(n); fmpz_init(end);
    arb_init(s); arb_init(lnv); arb_init(slo); arb_init(shi); arb_init(want); arb_init(a);
    const char *const texts[3] = { "i^(-1/2)", "i^(-2)", "i^(3/2)" };
    const double as[3] = { -0.5, -2.0, 1.5 };
    tsum_ten_pow(end, 50);
    fmpz_set(n, end);
    for (int c = 0; c < 3; c++) {
        embz_expr_t w;
        tsum_parse(w, texts[c]);
        arb_set_d(a, as[c]);
        for (int pi = 0; pi < 2; pi++) {
            slong prec = TSUM_PRECS[pi];
            embz_tail_t t;
            tsum_tail(t, w, n, M, end, prec);
            arb_set_si(slo, M + 1);
            arb_log(slo, slo, prec);
            arb_set_fmpz(shi, end);
            arb_log(shi, shi, prec);
            for (int cs = 0; cs < (tsum_quick() ? 20 : 100); cs++) {
                /* a root s* in [ln 11 + 0.1, ln 10^50 - 0.1]: lnv = a s* */
                arb_set_ui(want, n_randint(rs, 1 << 20));
                arb_mul_2exp_si(want, want, -20);
                arb_mul_ui(want, want, 110, prec);
                arb_add_si(want, want, 3, prec);
                arb_mul(lnv, a, want, prec);
                ck_assert_int_eq(embz_tail_log_root(s, t, lnv, slo, shi, prec), EMBZ_OK);
                ck_assert(arb_is_exact(s));
                ck_assert_msg(close_to(s, want, prec - 10, prec), "%s: root off", texts[c]);
            }
            /* a root beyond shi (s* = 200 > ln 10^50 ~ 115) or below slo: refused */
            arb_set_ui(want, 200);
            arb_mul(lnv, a, want, prec);
            ck_assert_int_eq(embz_tail_log_root(s, t, lnv, slo, shi, prec), EMBZ_ERR_PREC);
            arb_set_ui(want, 1);
            arb_mul(lnv, a, want, prec);
            ck_assert_int_eq(embz_tail_log_root(s, t, lnv, slo, shi, prec), EMBZ_ERR_PREC);
            /* without the split there is no ln f to solve */
            t->usplit = 0;
            arb_set_ui(want, 20);
            arb_mul(lnv, a, want, prec);
            ck_assert_int_eq(embz_tail_log_root(s, t, lnv, slo, shi, prec), EMBZ_ERR_PREC);
            embz_tail_clear(t);
        }
        embz_expr_clear(w);
    }
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(s); arb_clear(lnv); arb_clear(slo); arb_clear(shi); arb_clear(want); arb_clear(a);
    flint_randclear(rs);
}
END_TEST

/* f = 1/(x ln x): the residual of ln f(e^s) = -s - ln s against lnv, for lnv taken from
 * random points of the range */
START_TEST(test_inverse_log)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const slong M = 10;
    fmpz_t n, end;
    arb_t s, lnv, slo, shi, p, r;
    fmpz_init(n); fmpz_init(end);
    arb_init(s); arb_init(lnv); arb_init(slo); arb_init(shi); arb_init(p); arb_init(r);
    embz_expr_t w;
    tsum_parse(w, "1/(i*log(i))");
    tsum_ten_pow(end, 300);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, M, end, prec);
        arb_set_si(slo, M + 1);
        arb_log(slo, slo, prec);
        arb_set_fmpz(shi, end);
        arb_log(shi, shi, prec);
        for (int cs = 0; cs < (tsum_quick() ? 20 : 100); cs++) {
            /* p in [3, 680]; lnv = -p - ln p (at prec + 64: the target itself is exact
             * enough) */
            arb_set_ui(p, 3 * 1024 + n_randint(rs, 677 * 1024));
            arb_mul_2exp_si(p, p, -10);
            arb_log(lnv, p, prec + 64);
            arb_add(lnv, lnv, p, prec + 64);
            arb_neg(lnv, lnv);
            ck_assert_int_eq(embz_tail_log_root(s, t, lnv, slo, shi, prec), EMBZ_OK);
            /* residual -s - ln s - lnv, with arb directly; |L'| = 1 + 1/s <= 2 */
            arb_log(r, s, prec + 64);
            arb_add(r, r, s, prec + 64);
            arb_neg(r, r);
            ck_assert_msg(close_to(r, lnv, prec - 12, prec + 64), "residual too large");
            ck_assert(close_to(s, p, prec - 10, prec + 64));
        }
        embz_tail_clear(t);
    }
    embz_expr_clear(w);
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(s); arb_clear(lnv); arb_clear(slo); arb_clear(shi); arb_clear(p); arb_clear(r);
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-log_root");
    tcase_add_test(tc, test_power);
    tcase_add_test(tc, test_inverse_log);
    return tu_run_suite(s);
}
