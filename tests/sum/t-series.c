/* Taylor coefficients of T~ (embz_tail_series, embz_tail_series_level, src/sum/tail_sum.c):
 * res[l] = T~^(l)(x) scale^l / l!, l = 1 .. len-1, res[0] = 0. References:
 *   - i^3, where the Euler–Maclaurin formula is exact and T~(x) = P(x) - P(M) with
 *     P(x) = (x(x+1)/2)^2 (Faulhaber): the Taylor coefficients of P about x, from arb's
 *     arb_poly_taylor_shift, are a rigorous reference;
 *   - 1/i, where T~(x) is the asymptotic expansion of psi(x+1) - psi(M+1) (H_k = psi(k+1) +
 *     gamma): the coefficients of sigma -> psi(x + 1 + sigma) from arb's digamma series agree
 *     up to the truncation of the expansion (an estimate, not a bound: the test allows
 *     2^-(prec - 24) of each coefficient, for x at least 10 M);
 *   - central finite differences of T~ itself (midpoints of embz_tail_sum_level; an
 *     estimate with room) for the first coefficient of an increasing weight;
 *   - scaling: coefficient l at scale s is s^l times the one at scale 1;
 *   - a wide ball x encloses the coefficients at points of it. */
#include "tsum.h"

#define LEN 6

START_TEST(test_polynomial)
{
    flint_rand_t rs;
    flint_randinit(rs);
    fmpz_t n, end;
    arb_t x, s, e;
    arb_poly_t P, Q;
    arb_ptr c = _arb_vec_init(LEN);
    fmpz_init(n); fmpz_init(end);
    arb_init(x); arb_init(s); arb_init(e);
    arb_poly_init(P); arb_poly_init(Q);
    embz_expr_t w;
    tsum_parse(w, "i^3");
    tsum_ten_pow(end, 12);
    fmpz_set(n, end);
    /* P(x) = (x^4 + 2 x^3 + x^2) / 4 */
    arb_poly_set_coeff_si(P, 4, 1);
    arb_poly_set_coeff_si(P, 3, 2);
    arb_poly_set_coeff_si(P, 2, 1);
    arb_poly_scalar_mul_2exp_si(P, P, -2);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, 12, end, prec);
        for (int cs = 0; cs < (tsum_quick() ? 10 : 40); cs++) {
            /* x in [13, 10^12), a dyadic point; scale a dyadic in [-4, 4] */
            arb_set_ui(x, 13 + n_randint(rs, UWORD(1000000000000) - 13));
            arb_set_ui(e, n_randint(rs, 256));
            arb_mul_2exp_si(e, e, -8);
            arb_add(x, x, e, prec);
            arb_set_si(s, (slong) n_randint(rs, 64) - 32);
            arb_mul_2exp_si(s, s, -3);
            ck_assert_int_eq(embz_tail_series(c, t, x, s, LEN, prec), EMBZ_OK);
            ck_assert(arb_is_zero(c));
            arb_poly_taylor_shift(Q, P, x, prec + 64);
            for (slong l = 1; l < LEN; l++) {
                arb_poly_get_coeff_arb(e, Q, l);
                arb_mul(e, e, s, prec + 64);
                for (slong j = 1; j < l; j++) arb_mul(e, e, s, prec + 64);
                tsum_check_overlap(c + l, e, "coefficient of P");
                if (!arb_is_zero(e)) ck_assert(tsum_accurate(c + l, prec - 24));
            }
        }
        embz_tail_clear(t);
    }
    embz_expr_clear(w);
    _arb_vec_clear(c, LEN);
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(x); arb_clear(s); arb_clear(e);
    arb_poly_clear(P); arb_poly_clear(Q);
    flint_randclear(rs);
}
END_TEST

START_TEST(test_digamma)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const slong M = 100;
    fmpz_t n, end;
    arb_t x, one, d, tol;
    arb_ptr c = _arb_vec_init(LEN), h = _arb_vec_init(2), psi = _arb_vec_init(LEN);
    fmpz_init(n); fmpz_init(end);
    arb_init(x); arb_init(one); arb_init(d); arb_init(tol);
    arb_one(one);
    embz_expr_t w;
    tsum_parse(w, "1/i");
    tsum_ten_pow(end, 40);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, M, end, prec);
        for (int cs = 0; cs < (tsum_quick() ? 10 : 40); cs++) {
            /* x = 10 M 2^b (1 + r), b in [0, 60] */
            arb_set_ui(x, 1024 + n_randint(rs, 1024));
            arb_mul_2exp_si(x, x, (slong) n_randint(rs, 61) - 10);
            arb_mul_ui(x, x, 10 * M, prec);
            ck_assert_int_eq(embz_tail_series(c, t, x, one, LEN, prec), EMBZ_OK);
            arb_add_ui(h, x, 1, prec + 64);
            arb_one(h + 1);
            _arb_poly_digamma_series(psi, h, 2, LEN, prec + 64);
            for (slong l = 1; l < LEN; l++) {
                arb_sub(d, c + l, psi + l, prec + 64);
                arb_abs(d, d);
                arb_mul_2exp_si(tol, psi + l, -(prec - 24));
                arb_abs(tol, tol);
                ck_assert_msg(arb_le(d, tol) || arb_overlaps(c + l, psi + l),
                              "coefficient %ld differs from psi's", (long) l);
                ck_assert(tsum_accurate(c + l, prec - 24));
            }
        }
        embz_tail_clear(t);
    }
    embz_expr_clear(w);
    _arb_vec_clear(c, LEN); _arb_vec_clear(h, 2); _arb_vec_clear(psi, LEN);
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(x); arb_clear(one); arb_clear(d); arb_clear(tol);
    flint_randclear(rs);
}
END_TEST

/* the first coefficient of sqrt(x) log(x) against (T~(x + h) - T~(x - h)) / 2h on the
 * midpoints (the remainder bound widens the balls, not their centres), h = 2^-(prec/3) x:
 * truncation h^2 T'''/6 and rounding 2^-prec T / h are both about 2^-(2 prec/3) of the
 * scale; allowed: 2^-(prec/2) of the coefficient */
START_TEST(test_finite_difference)
{
    flint_rand_t rs;
    flint_randinit(rs);
    fmpz_t n, end;
    arb_t x, xp, xm, h, one, Tp, Tm, fd;
    arb_ptr c = _arb_vec_init(3);
    fmpz_init(n); fmpz_init(end);
    arb_init(x); arb_init(xp); arb_init(xm); arb_init(h); arb_init(one);
    arb_init(Tp); arb_init(Tm); arb_init(fd);
    arb_one(one);
    embz_expr_t w;
    tsum_parse(w, "sqrt(i)*log(i)");
    tsum_ten_pow(end, 12);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, 20, end, prec);
        for (int cs = 0; cs < (tsum_quick() ? 10 : 30); cs++) {
            arb_set_ui(x, 100 + n_randint(rs, 100000000));
            slong lev = embz_tail_level(t, x);
            ck_assert_int_eq(embz_tail_series_level(c, t, x, one, 3, lev, prec), EMBZ_OK);
            arb_mul_2exp_si(h, x, -(prec / 3));
            arb_add(xp, x, h, prec);
            arb_sub(xm, x, h, prec);
            ck_assert_int_eq(embz_tail_sum_level(Tp, t, xp, lev, prec), EMBZ_OK);
            ck_assert_int_eq(embz_tail_sum_level(Tm, t, xm, lev, prec), EMBZ_OK);
            arb_set_arf(fd, arb_midref(Tp));
            arb_sub_arf(fd, fd, arb_midref(Tm), prec);
            arb_div(fd, fd, h, prec);
            arb_mul_2exp_si(fd, fd, -1);
            arb_sub(fd, fd, c + 1, prec);
            arb_abs(fd, fd);
            arb_mul_2exp_si(Tp, c + 1, -(prec / 2));
            arb_abs(Tp, Tp);
            ck_assert_msg(arb_le(fd, Tp), "finite difference differs");
        }
        embz_tail_clear(t);
    }
    embz_expr_clear(w);
    _arb_vec_clear(c, 3);
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(x); arb_clear(xp); arb_clear(xm); arb_clear(h); arb_clear(one);
    arb_clear(Tp); arb_clear(Tm); arb_clear(fd);
    flint_randclear(rs);
}
END_TEST

/* scale s multiplies coefficient l by s^l; a wide ball x encloses the coefficients at its
 * points; the explicit level of the ball gives the automatic result; no level: refused */
START_TEST(test_scale_and_ball)
{
    flint_rand_t rs;
    flint_randinit(rs);
    fmpz_t n, end;
    arb_t x, xp, s, one, e;
    arb_ptr c1 = _arb_vec_init(LEN), cs_ = _arb_vec_init(LEN), cw = _arb_vec_init(LEN);
    fmpz_init(n); fmpz_init(end);
    arb_init(x); arb_init(xp); arb_init(s); arb_init(one); arb_init(e);
    arb_one(one);
    embz_expr_t w;
    tsum_parse(w, "1/(i*log(i))");
    tsum_ten_pow(end, 30);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, 20, end, prec);
        for (int k = 0; k < (tsum_quick() ? 10 : 40); k++) {
            arb_set_ui(x, 100 + n_randint(rs, 1000000));
            arb_set_si(s, (slong) n_randint(rs, 2000) - 1000);
            ck_assert_int_eq(embz_tail_series(c1, t, x, one, LEN, prec), EMBZ_OK);
            ck_assert_int_eq(embz_tail_series(cs_, t, x, s, LEN, prec), EMBZ_OK);
            for (slong l = 1; l < LEN; l++) {
                arb_pow_ui(e, s, (ulong) l, prec);
                arb_mul(e, e, c1 + l, prec);
                tsum_check_overlap(cs_ + l, e, "scaling");
            }
            /* the ball [x - 40, x + 40] and points of it */
            mag_set_ui(arb_radref(x), 40);
            slong lev = embz_tail_level(t, x);
            ck_assert(lev >= 0);
            ck_assert_int_eq(embz_tail_series_level(cw, t, x, one, LEN, lev, prec), EMBZ_OK);
            ck_assert_int_eq(embz_tail_series(c1, t, x, one, LEN, prec), EMBZ_OK);
            for (slong l = 0; l < LEN; l++) ck_assert(arb_equal(c1 + l, cw + l));
            for (int j = 0; j < 4; j++) {
                arb_set_arf(xp, arb_midref(x));
                arb_add_si(xp, xp, (slong) n_randint(rs, 81) - 40, prec);
                ck_assert_int_eq(embz_tail_series_level(c1, t, xp, one, LEN, lev, prec),
                                 EMBZ_OK);
                for (slong l = 1; l < LEN; l++) tsum_check_overlap(cw + l, c1 + l, "ball");
            }
            ck_assert_int_eq(embz_tail_series_level(c1, t, x, one, LEN, t->nlev, prec),
                             EMBZ_ERR_PREC);
        }
        embz_tail_clear(t);
    }
    embz_expr_clear(w);
    _arb_vec_clear(c1, LEN); _arb_vec_clear(cs_, LEN); _arb_vec_clear(cw, LEN);
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(x); arb_clear(xp); arb_clear(s); arb_clear(one); arb_clear(e);
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-series");
    tcase_add_test(tc, test_polynomial);
    tcase_add_test(tc, test_digamma);
    tcase_add_test(tc, test_finite_difference);
    tcase_add_test(tc, test_scale_and_ball);
    return tu_run_suite(s);
}
