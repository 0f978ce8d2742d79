/* Sums of the last weights below a top index (embz_tail_sum_top, src/sum/tail_sum.c):
 * T~(top) - T~(top - y) with both remainders, which for integer y encloses
 * sum_(top - y < i <= top) f(i). References: explicit sums (embz_sum_explicit) for tops up
 * to 20000 and every y, on both sides of y = top/2 (direct integral below, a difference of
 * two tail sums above); plain arb loops over the last weights, written with arb functions,
 * for tops near 10^30 where only the direct integral keeps the digits; integer points of a
 * ball y. */
#include "tsum.h"

#define LOSS 32

/* weight k (0: sqrt(i), 1: log(i), 2: 1/i) at the integer x, with arb directly */
static void w_ref(arb_t r, int k, const fmpz_t x, slong prec)
{
    arb_set_fmpz(r, x);
    if (k == 0) arb_sqrt(r, r, prec);
    else if (k == 1) arb_log(r, r, prec);
    else arb_inv(r, r, prec);
}

static const char *const TEXTS[3] = { "sqrt(i)", "log(i)", "1/i" };

START_TEST(test_explicit)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const slong Ms[2] = { 4, 40 }, ends = 20000;
    fmpz_t n, end;
    arb_t y, top, r, S, nb;
    mag_t m;
    fmpz_init(n); fmpz_init(end);
    arb_init(y); arb_init(top); arb_init(r); arb_init(S); arb_init(nb);
    mag_init(m);
    fmpz_set_si(end, ends);
    fmpz_set(n, end);
    arb_set_fmpz(nb, n);
    for (int k = 0; k < 3; k++) {
        embz_expr_t w;
        tsum_parse(w, TEXTS[k]);
        for (int pi = 0; pi < 4; pi++) {
            /* M = 4: the remainder bound is most of the radius (the series diverges early) */
            slong prec = TSUM_PRECS[pi % 2], M = Ms[pi / 2];
            embz_tail_t t;
            tsum_tail(t, w, n, M, end, prec);
            int below = 0, above = 0;
            for (int cs = 0; cs < (tsum_quick() ? 10 : 40); cs++) {
                slong tp = M + 1 + (slong) n_randint(rs, (ulong) (ends - M));
                slong yy = 1 + (slong) n_randint(rs, (ulong) (tp - M));
                arb_set_si(top, tp);
                arb_set_si(y, yy);
                embz_err_t err;
                embz_err_clear(&err);
                ck_assert_int_eq(embz_tail_sum_top(r, t, y, top, EMBZ_TAIL_LEVEL_AUTO, prec),
                                 EMBZ_OK);
                ck_assert_int_eq(embz_sum_explicit(S, w, nb, tp - yy + 1, tp, prec + 64, &err),
                                 EMBZ_OK);
                tsum_check_sum(r, S, t->rem, 2, prec - LOSS, TEXTS[k]);
                /* the remainders of both ends are in the radius */
                mag_mul_2exp_si(m, t->rem, 1);
                ck_assert(mag_cmp(arb_radref(r), m) >= 0);
                if (2 * yy < tp) below++; else above++;
            }
            ck_assert(below > 0 && above > 0);
            embz_tail_clear(t);
        }
        embz_expr_clear(w);
    }
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(y); arb_clear(top); arb_clear(r); arb_clear(S); arb_clear(nb);
    mag_clear(m);
    flint_randclear(rs);
}
END_TEST

/* increasing tails up to 10^30: the last 1 <= y <= 60 weights below a random top, to the
 * working precision (relative), against a plain loop at prec + 64 bits; y = 0 gives 0 to
 * the working precision on the scale of f(top) (the boundary terms at both ends cancel) */
START_TEST(test_far_top)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const slong M = 40;
    fmpz_t n, end, tp, i;
    arb_t y, top, r, S, e;
    fmpz_init(n); fmpz_init(end); fmpz_init(tp); fmpz_init(i);
    arb_init(y); arb_init(top); arb_init(r); arb_init(S); arb_init(e);
    tsum_ten_pow(end, 30);
    fmpz_set(n, end);
    for (int k = 0; k < 2; k++) {
        embz_expr_t w;
        tsum_parse(w, TEXTS[k]);
        for (int pi = 0; pi < 2; pi++) {
            slong prec = TSUM_PRECS[pi];
            embz_tail_t t;
            tsum_tail(t, w, n, M, end, prec);
            for (int cs = 0; cs < (tsum_quick() ? 5 : 20); cs++) {
                fmpz_randm(tp, rs, end);
                fmpz_add_ui(tp, tp, 1000);
                if (fmpz_cmp(tp, end) > 0) fmpz_set(tp, end);
                slong yy = 1 + (slong) n_randint(rs, 60);
                arb_set_fmpz(top, tp);
                arb_set_si(y, yy);
                ck_assert_int_eq(embz_tail_sum_top(r, t, y, top, EMBZ_TAIL_LEVEL_AUTO, prec),
                                 EMBZ_OK);
                arb_zero(S);
                for (slong j = 0; j < yy; j++) {
                    fmpz_sub_ui(i, tp, (ulong) j);
                    w_ref(e, k, i, prec + 64);
                    arb_add(S, S, e, prec + 64);
                }
                tsum_check_sum(r, S, t->rem, 2, prec - LOSS, TEXTS[k]);
                ck_assert(tsum_accurate(r, prec - LOSS));
                arb_zero(y);
                ck_assert_int_eq(embz_tail_sum_top(r, t, y, top, EMBZ_TAIL_LEVEL_AUTO, prec),
                                 EMBZ_OK);
                w_ref(e, k, tp, prec);
                arb_mul_2exp_si(e, e, -prec + LOSS);
                ck_assert(arb_contains_zero(r) && arb_is_finite(r));
                {
                    mag_t b, m2;
                    mag_init(b); mag_init(m2);
                    arb_get_mag(b, e);
                    mag_mul_2exp_si(m2, t->rem, 1);
                    mag_add(b, b, m2);
                    ck_assert(mag_cmp(arb_radref(r), b) <= 0);
                    mag_clear(b); mag_clear(m2);
                }
            }
            embz_tail_clear(t);
        }
        embz_expr_clear(w);
    }
    fmpz_clear(n); fmpz_clear(end); fmpz_clear(tp); fmpz_clear(i);
    arb_clear(y); arb_clear(top); arb_clear(r); arb_clear(S); arb_clear(e);
    flint_randclear(rs);
}
END_TEST

/* y a ball [c - 3, c + 3]: the result contains the sums for every integer in it; a level
 * that does not exist is refused */
START_TEST(test_ball_y)
{
    const slong M = 40;
    fmpz_t n, end, tp, i;
    arb_t y, top, r, S, e;
    fmpz_init(n); fmpz_init(end); fmpz_init(tp); fmpz_init(i);
    arb_init(y); arb_init(top); arb_init(r); arb_init(S); arb_init(e);
    tsum_ten_pow(end, 30);
    fmpz_set(n, end);
    embz_expr_t w;
    tsum_parse(w, "sqrt(i)");
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, M, end, prec);
        tsum_ten_pow(tp, 25);
        arb_set_fmpz(top, tp);
        arb_set_si(y, 20);
        mag_set_ui(arb_radref(y), 3);
        ck_assert_int_eq(embz_tail_sum_top(r, t, y, top, EMBZ_TAIL_LEVEL_AUTO, prec), EMBZ_OK);
        for (slong yy = 17; yy <= 23; yy++) {
            arb_zero(S);
            for (slong j = 0; j < yy; j++) {
                fmpz_sub_ui(i, tp, (ulong) j);
                w_ref(e, 0, i, prec + 64);
                arb_add(S, S, e, prec + 64);
            }
            tsum_check_overlap(r, S, "ball y");
        }
        ck_assert_int_eq(embz_tail_sum_top(r, t, y, top, t->nlev, prec), EMBZ_ERR_PREC);
        embz_tail_clear(t);
    }
    embz_expr_clear(w);
    fmpz_clear(n); fmpz_clear(end); fmpz_clear(tp); fmpz_clear(i);
    arb_clear(y); arb_clear(top); arb_clear(r); arb_clear(S); arb_clear(e);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-sum_top");
    tcase_add_test(tc, test_explicit);
    tcase_add_test(tc, test_far_top);
    tcase_add_test(tc, test_ball_y);
    return tu_run_suite(s);
}
