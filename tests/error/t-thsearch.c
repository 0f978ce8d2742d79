/* The best-first search over thresholds (analytic_thsearch.c): for the family 1/i at small
 * sizes its enclosure [lo, hi] / W of E_n(q) must contain K(p -> p (x) q) of the explicit
 * vector p_i = (1/i) / H_n (embz_qvec_distance, FLINT rationals), be narrow, and its Ky Fan
 * index (the count at the best threshold) must reach K to within the enclosure's width
 * (embz_qvec_kyfan, exact). Targets: random vectors of 2 to 6 entries, and uniform ones. */
#include "an_common.h"

START_TEST(test_search_inverse)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const slong sizes[] = { 200, 700, 1500 };
    long runs = 0, closed = 0;
    for (int pi = 0; pi < 2; pi++) {
        slong prec = tf_precs[pi];
        for (int si = 0; si < 3; si++) {
            slong n = sizes[si];
            embz_qvec_t pv, qv, r;
            embz_qvec_init(pv); embz_qvec_init(qv); embz_qvec_init(r);
            fmpq_t H, K, k1, k2;
            fmpq_init(H); fmpq_init(K); fmpq_init(k1); fmpq_init(k2);
            arith_harmonic_number(H, (ulong) n);
            tu_qvec_alloc(pv, n);
            for (slong i = 0; i < n; i++) {
                fmpq_set_si(pv->p + i, 1, (ulong) (i + 1));
                fmpq_div(pv->p + i, pv->p + i, H);
            }
            tf_ctx X;
            tf_ctx_init(&X, TF_INVERSE, n, 1, prec);
            actx *c = &X.c;
            embz_target_t tq;
            embz_target_init(tq);
            for (int rep = 0; rep < 5; rep++) {
                embz_target_clear(tq);
                embz_target_init(tq);
                if (rep == 0) {
                    tq->kind = EMBZ_TARGET_UNIFORM;
                    tq->d = 2 + n_randint(rs, 9);
                    tu_qvec_alloc(qv, (long) tq->d);
                    for (ulong j = 0; j < tq->d; j++) fmpq_set_si(qv->p + j, 1, tq->d);
                } else {
                    slong m = 2 + (slong) n_randint(rs, 5);
                    ulong cc[8], sum = 0;
                    tq->kind = EMBZ_TARGET_VECTOR;
                    tu_qvec_alloc(tq->q, m);
                    for (slong j = 0; j < m; j++) { cc[j] = 1 + n_randint(rs, 30); sum += cc[j]; }
                    for (slong j = 0; j < m; j++) fmpq_set_si(tq->q->p + j, (slong) cc[j], sum);
                    embz_qvec_sort(tq->q);
                    tu_qvec_alloc(qv, m);
                    for (slong j = 0; j < m; j++) fmpq_set(qv->p + j, tq->q->p + j);
                }
                tu_qvec_tensor(r, pv, qv);
                embz_qvec_distance(K, NULL, pv, r);
                th_target q;
                _embz_an_th_target_init(&q, tq);
                arf_t lo, hi;
                arf_init(lo); arf_init(hi);
                arf_zero(c->upper);
                c->search_open = 0;
                ck_assert_int_eq(_embz_an_threshold_search(lo, hi, c, &q, THRESHOLD_BUDGET,
                                                           c->prec), EMBZ_OK);
                /* W K in [lo, hi] */
                arb_t Kb, e;
                arb_init(Kb); arb_init(e);
                arb_set_fmpq(Kb, K, c->prec + 64);
                arb_set_fmpq(e, H, c->prec + 64);
                arb_mul(Kb, Kb, e, c->prec + 64);
                arb_set_interval_arf(e, lo, hi, c->prec + 64);
                ck_assert_msg(arf_cmp(lo, hi) <= 0, "empty enclosure");
                ck_assert_msg(arb_overlaps(e, Kb), "n=%ld: W K outside [lo, hi]", n);
                /* narrow unless the search stopped at its budget (then the upper end is
                 * loose, and says so) */
                if (!c->search_open) {
                    tf_assert_narrow(e, 8 - prec / 2, "search enclosure");
                    closed++;
                }
                runs++;
                /* the Ky Fan index at the best threshold reaches K within the width */
                long k = fmpz_get_si(c->argk);
                ck_assert(k >= 0 && k <= n);
                embz_qvec_kyfan(k1, pv, k);
                embz_qvec_kyfan(k2, r, k);
                fmpq_sub(k1, k1, k2);
                arb_set_fmpq(e, k1, c->prec + 64);
                arb_set_fmpq(Kb, K, c->prec + 64);
                arb_sub(e, Kb, e, c->prec + 64);           /* K - (||p||_k - ||r||_k) >= 0 */
                arb_t wd;
                arb_init(wd);
                arb_set_arf(wd, hi);
                arb_sub_arf(wd, wd, lo, c->prec + 64);
                arb_set_fmpq(Kb, H, c->prec + 64);
                arb_div(wd, wd, Kb, c->prec + 64);
                ck_assert_msg(!arb_is_negative(e), "n=%ld: argk %ld beyond K", n, k);
                if (!c->search_open)
                    ck_assert_msg(!arb_gt(e, wd), "n=%ld: argk %ld off", n, k);
                arb_clear(wd);
                arb_clear(Kb); arb_clear(e);
                arf_clear(lo); arf_clear(hi);
                _embz_an_th_target_clear(&q);
            }
            embz_target_clear(tq);
            tf_ctx_clear(&X);
            fmpq_clear(H); fmpq_clear(K); fmpq_clear(k1); fmpq_clear(k2);
            embz_qvec_clear(pv); embz_qvec_clear(qv); embz_qvec_clear(r);
        }
    }
    ck_assert_msg(2 * closed > runs, "%ld of %ld searches closed", closed, runs);
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("error-thsearch");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_search_inverse);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
