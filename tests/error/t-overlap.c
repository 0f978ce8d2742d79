/* The local-unitary overlap at large n (overlap.c): O = d^(-1/2) sum_j sqrt(p↓_j p↓_ceil(j/d))
 * by the layout's explicit positions and one Euler-Maclaurin tail per residue class, against
 * the reference of an_common.h (every weight written in C with arb, sorted by the test, the
 * overlap summed term by term). Families with a non-increasing tail (exact rationals, a power,
 * a summable weight, and a head that rises before it falls, so that head weights are inserted
 * far into the tail), d = 1 .. 5, both test precisions; a non-decreasing tail is declined. */
#include "an_common.h"

/* the reference overlap from the sorted weights */
static void ref_overlap(arb_t O, const tf_ref *R, ulong d)
{
    arb_t t;
    arb_init(t);
    arb_zero(O);
    for (slong j = 1; j <= R->n; j++) {
        slong m = (j + (slong) d - 1) / (slong) d;
        arb_mul(t, R->w + j, R->w + m, R->prec);
        arb_sqrtpos(t, t, R->prec);
        arb_add(O, O, t, R->prec);
    }
    arb_sqrt_ui(t, d, R->prec);
    arb_mul(t, t, R->S + R->n, R->prec);
    arb_div(O, O, t, R->prec);
    arb_clear(t);
}

static int run(arb_t O, mag_t eta, embz_fidelity_how_struct *how, const char *expr, slong n,
               ulong d, slong prec, embz_err_t *err)
{
    embz_family_t f;
    embz_family_init(f);
    ck_assert(embz_family_resolve(f, expr, NULL, 0, 0, err) == EMBZ_OK);
    embz_analytic_t an;
    embz_analytic_init(an, f, prec);
    fmpz_t nn;
    fmpz_init_set_si(nn, n);
    int st = _embz_overlap_analytic(O, eta, how, an, nn, d, err);
    fmpz_clear(nn);
    embz_analytic_clear(an);
    embz_family_clear(f);
    return st;
}

START_TEST(test_against_reference)
{
    static const int fams[] = { TF_INVERSE, TF_POWER, TF_NEARMISS, TF_BUMP };
    static const slong sizes[] = { 3000, 20000, 150000 };
    arb_t O, R0;
    mag_t eta;
    arb_init(O); arb_init(R0);
    mag_init(eta);
    embz_err_t err;
    int bumps = 0;
    for (int fi = 0; fi < 4; fi++)
        for (int si = 0; si < 3; si++) {
            slong n = sizes[si];
            tf_ref R;
            tf_ref_init(&R, fams[fi], n, 300);
            for (ulong d = 1; d <= 5; d++) {
                ref_overlap(R0, &R, d);
                for (int pi = 0; pi < 2; pi++) {
                    embz_fidelity_how_struct how;
                    embz_err_clear(&err);
                    int st = run(O, eta, &how, tf_expr[fams[fi]], n, d, tf_precs[pi], &err);
                    if (fams[fi] == TF_BUMP && st == EMBZ_ERR_UNSUPPORTED) {
                        /* its inserted head weights sit some 16000 places down: the first
                         * d times that many positions are summed term by term */
                        ck_assert_msg(n < 16000 * (slong) d + 100 || 16000 * (slong) d > 65536,
                                      "bump, n = %ld: %s", n, err.text);
                        ck_assert(strstr(err.text, "term by term") != NULL);
                        continue;
                    }
                    ck_assert_msg(st == EMBZ_OK, "%s n = %ld d = %lu: %s", tf_expr[fams[fi]],
                                  n, d, err.text);
                    ck_assert(how.analytic && how.residues == (slong) d);
                    ck_assert(mag_is_zero(eta));
                    if (fams[fi] == TF_BUMP) bumps++;
                    ck_assert_msg(arb_overlaps(O, R0), "%s n = %ld d = %lu prec %ld",
                                  tf_expr[fams[fi]], n, d, tf_precs[pi]);
                    tf_assert_narrow(O, -(tf_precs[pi] - 32), "overlap");
                }
            }
            tf_ref_clear(&R);
        }
    ck_assert(bumps >= 4);   /* the inserted head weights were met at some sizes */
    arb_clear(O); arb_clear(R0);
    mag_clear(eta);
}
END_TEST

/* the uniform weight: O = d^(-1/2) exactly [derived: p↓_j = 1/n, r↓_j = 1/(d n)] */
START_TEST(test_uniform)
{
    arb_t O, t;
    mag_t eta;
    arb_init(O); arb_init(t);
    mag_init(eta);
    embz_err_t err;
    embz_fidelity_how_struct how;
    for (ulong d = 1; d <= 7; d++) {
        embz_err_clear(&err);
        ck_assert(run(O, eta, &how, "1", 1000000, d, 128, &err) == EMBZ_OK);
        arb_rsqrt_ui(t, d, 200);
        ck_assert(arb_overlaps(O, t));
        tf_assert_narrow(O, -110, "uniform");
    }
    arb_clear(O); arb_clear(t);
    mag_clear(eta);
}
END_TEST

/* declined: a non-decreasing tail, a target too wide, a size too small */
START_TEST(test_declined)
{
    arb_t O;
    mag_t eta;
    arb_init(O);
    mag_init(eta);
    embz_err_t err;
    embz_fidelity_how_struct how;
    embz_err_clear(&err);
    ck_assert(run(O, eta, &how, tf_expr[TF_LOG], 100000, 2, 128, &err) == EMBZ_ERR_UNSUPPORTED);
    ck_assert(strstr(err.text, "non-increasing") != NULL);
    embz_err_clear(&err);
    ck_assert(run(O, eta, &how, "1/i", 100000, 512, 128, &err) == EMBZ_ERR_UNSUPPORTED);
    ck_assert(strstr(err.text, "d <= 256") != NULL);
    embz_err_clear(&err);
    ck_assert(run(O, eta, &how, tf_expr[TF_BUMP], 20000, 2, 128, &err) == EMBZ_ERR_UNSUPPORTED);
    ck_assert(strstr(err.text, "too small") != NULL);
    arb_clear(O);
    mag_clear(eta);
}
END_TEST

/* weights that become negligible (geometric): the state is truncated and eta bounds the
 * purified distance to the true one; O of the truncated state plus the allowance contains
 * the reference */
START_TEST(test_negligible)
{
    arb_t O, R0, t, w;
    mag_t eta;
    arb_init(O); arb_init(R0); arb_init(t); arb_init(w);
    mag_init(eta);
    embz_err_t err;
    embz_fidelity_how_struct how;
    slong n = 20000;
    /* reference: 0.9^i is already sorted */
    arb_t W, r;
    arb_init(W); arb_init(r);
    arb_set_ui(r, 9);
    arb_div_ui(r, r, 10, 400);
    for (ulong d = 2; d <= 3; d++) {
        arb_zero(R0);
        arb_zero(W);
        for (slong j = 1; j <= n; j++) {
            slong m = (j + (slong) d - 1) / (slong) d;
            arb_pow_ui(w, r, (ulong) j, 400);
            arb_add(W, W, w, 400);
            arb_pow_ui(t, r, (ulong) (j + m), 400);
            arb_sqrt(t, t, 400);
            arb_add(R0, R0, t, 400);
        }
        arb_sqrt_ui(t, d, 400);
        arb_mul(t, t, W, 400);
        arb_div(R0, R0, t, 400);
        embz_err_clear(&err);
        ck_assert(run(O, eta, &how, "0.9^i", n, d, 128, &err) == EMBZ_OK);
        ck_assert(!mag_is_zero(eta));
        /* |sqrt(1 - O^2) - sqrt(1 - O'^2)| <= 2 eta, so |O - O'| <= 2 eta / O' roughly:
         * widen generously by 4 eta */
        mag_t e4;
        mag_init(e4);
        mag_mul_2exp_si(e4, eta, 2);
        arb_set(t, O);
        arb_add_error_mag(t, e4);
        ck_assert(arb_contains(t, R0));
        mag_clear(e4);
    }
    arb_clear(O); arb_clear(R0); arb_clear(t); arb_clear(w);
    arb_clear(W); arb_clear(r);
    mag_clear(eta);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("error-overlap");
    TCase *tc = tcase_create("overlap");
    tcase_set_timeout(tc, 900);
    tcase_add_test(tc, test_against_reference);
    tcase_add_test(tc, test_uniform);
    tcase_add_test(tc, test_declined);
    tcase_add_test(tc, test_negligible);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
