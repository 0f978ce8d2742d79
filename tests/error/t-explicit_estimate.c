/* The double pass of explicit summation (src/error/explicit_estimate.c): _embz_x_estimate,
 * _embz_x_estimate_arb and the public wrapper embz_error_explicit_estimate.
 *
 * Reference: E_n(q) = K(p -> p (x) q) computed exactly with FLINT rationals. The weights are
 * evaluated here in fmpq (not by the library's evaluators), normalised, tensored with the
 * target, and K is taken by embz_qvec_distance (exact threshold form, src/measure); the value
 * at a given Ky Fan index by embz_qvec_kyfan. Random small families (1/i, 1/i^2, i,
 * 1/(i + c), and the non-monotone 1/((i - c)^2 + 1) and 2 + (-1)^i) and random targets
 * (uniform:d, or vectors of small integers normalised), n up to 300, from flint_rand_t.
 *
 * The estimate is double precision: it must agree with the exact value to 1e-12 relative, its
 * argmax k must be an exact maximiser, and the order it reports must be the true order of the
 * weights (so the streamed paths, forward and reverse, and the stored and sorted path all
 * run). The double pass has no working precision; the two precisions of the certified pass
 * are tested in t-explicit_certify.c. */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include "embz.h"
#include "error/impl.h"
#include "../testutil.h"

#include "xcases.h"

/* ------------------------------------------------------------ tests */

START_TEST(test_double_pass)
{
    /* the streamed and the stored pass against the exact value */
    flint_rand_t state;
    flint_randinit(state);
    int seen[3] = { 0, 0, 0 };    /* orders -1, 0, +1 reported */
    fmpq_t B, p1;
    fmpq_init(B); fmpq_init(p1);
    for (int iter = 0; iter < 400; iter++) {
        tcase_t t;
        tcase_init(&t, state);
        embz_x_tdata_t T;
        embz_x_dres_t R;
        embz_err_t err;
        int order = 7;
        slong bad = -1;
        embz_err_clear(&err);
        ck_assert_int_eq(_embz_x_tdata_init(&T, t.q, &err), EMBZ_OK);
        memset(&R, 0, sizeof(R));
        ck_assert_msg(_embz_x_estimate(&R, &order, &bad, t.f, t.n, &T, &err) == EMBZ_OK,
                      "%s: %s", t.spec, err.text);
        _embz_x_tdata_clear(&T);
        ck_assert_int_eq(bad, 0);
        ck_assert_msg(order == t.order, "%s, n = %ld: order %d, expected %d", t.spec,
                      (long) t.n, order, t.order);
        seen[order + 1]++;
        double K = fmpq_get_d(t.K);
        ck_assert_msg(close_rel(R.best / R.W, K, 1e-12), "%s, n = %ld, %s: %.17g vs exact %.17g",
                      t.spec, (long) t.n, t.tspec, R.best / R.W, K);
        ck_assert_msg(close_rel(R.W, fmpq_get_d(t.W), 1e-12), "%s: total", t.spec);
        ck_assert_msg(R.argk >= 1 && R.argk <= t.n && is_maximiser(&t, R.argk),
                      "%s, n = %ld, %s: k = %ld is not a maximiser", t.spec, (long) t.n,
                      t.tspec, (long) R.argk);
        exact_blocks(B, p1, &t);
        ck_assert_msg(close_rel(R.p1, fmpq_get_d(p1), 1e-12), "%s: largest weight", t.spec);
        if (t.d == 2)
            ck_assert_msg(fabs(R.supB - fmpq_get_d(B)) <= 1e-12 * fmpq_get_d(t.W),
                          "%s, n = %ld: sup of the blocks", t.spec, (long) t.n);

        /* the public wrapper reports the same */
        double E;
        slong argk;
        int order2;
        fmpz_t nz;
        fmpz_init_set_si(nz, t.n);
        ck_assert_int_eq(embz_error_explicit_estimate(&E, &argk, &order2, t.f, nz, t.q, &err),
                         EMBZ_OK);
        ck_assert(order2 == order && argk == R.argk && close_rel(E, K, 1e-12));
        fmpz_clear(nz);
        tcase_clear(&t);
    }
    /* every path ran */
    ck_assert_msg(seen[0] > 0 && seen[1] > 0 && seen[2] > 0, "orders seen: %d %d %d", seen[0],
                  seen[1], seen[2]);
    fmpq_clear(B); fmpq_clear(p1);
    flint_randclear(state);
}
END_TEST

START_TEST(test_ball_pass)
{
    /* the estimate from 64-bit balls, scaled so the largest weight lies in [1/2, 1), stored
     * and sorted */
    flint_rand_t state;
    flint_randinit(state);
    for (int iter = 0; iter < 150; iter++) {
        tcase_t t;
        tcase_init(&t, state);
        embz_x_tdata_t T;
        embz_x_dres_t R;
        embz_err_t err;
        slong k = 0;
        embz_err_clear(&err);
        ck_assert_int_eq(_embz_x_tdata_init(&T, t.q, &err), EMBZ_OK);
        memset(&R, 0, sizeof(R));
        ck_assert_msg(_embz_x_estimate_arb(&R, &k, t.f, t.n, &T, &err) == EMBZ_OK, "%s: %s",
                      t.spec, err.text);
        _embz_x_tdata_clear(&T);
        ck_assert_msg(R.p1 >= 0.5 && R.p1 < 1.0, "%s: largest weight %g after scaling", t.spec,
                      R.p1);
        double K = fmpq_get_d(t.K);
        ck_assert_msg(close_rel(R.best / R.W, K, 1e-12), "%s, n = %ld, %s: %.17g vs exact %.17g",
                      t.spec, (long) t.n, t.tspec, R.best / R.W, K);
        ck_assert_msg(close_rel(ldexp(R.W, (int) -k), fmpq_get_d(t.W), 1e-12), "%s: total",
                      t.spec);
        ck_assert_msg(is_maximiser(&t, R.argk), "%s, n = %ld, %s: k = %ld is not a maximiser",
                      t.spec, (long) t.n, t.tspec, (long) R.argk);
        tcase_clear(&t);
    }
    flint_randclear(state);
}
END_TEST

START_TEST(test_bad_weight)
{
    /* a weight that is not a finite double is reported by its index, not summed:
     * 1/(i - 3)^2 is undefined at i = 3 only */
    embz_family_t f;
    embz_target_t q;
    embz_err_t err;
    embz_x_tdata_t T;
    embz_x_dres_t R;
    int order;
    slong bad = 0;
    embz_family_init(f);
    embz_target_init(q);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_family_resolve(f, "1/(i - 3)^2", NULL, 0, 0, &err), EMBZ_OK);
    ck_assert_int_eq(_embz_x_tdata_init(&T, q, &err), EMBZ_OK);
    ck_assert_int_eq(_embz_x_estimate(&R, &order, &bad, f, 10, &T, &err), EMBZ_OK);
    ck_assert_int_eq(bad, 3);
    _embz_x_tdata_clear(&T);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("explicit_estimate");
    TCase *tc = tcase_create("estimate");
    tcase_add_test(tc, test_double_pass);
    tcase_add_test(tc, test_ball_pass);
    tcase_add_test(tc, test_bad_weight);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
