/* Tests of level vectors (include/embz/levels.h, src/measure/levels.c).
 *
 * References: the exact conversion distance of the expanded vectors in FLINT rationals
 * (embz_qvec_distance, itself checked against the plain definition in test_measure.c), and
 * the maximally entangled state of any dimension D, whose one-ebit error is exactly 1/2
 * (S_k(u_D) - S_k(u_2D) = k/(2D) for k <= D, largest at k = D [derived]). */
#include <check.h>
#include <stdlib.h>
#include <string.h>
#include "embz.h"
#include "testutil.h"

static const slong precs[2] = { 64, 256 };

/* v <- the levels (val_j, mul_j) expanded and normalised, as an exact vector */
static void expand(embz_qvec_t v, const fmpq *val, const ulong *mul, slong L)
{
    slong len = 0;
    for (slong j = 0; j < L; j++) len += (slong) mul[j];
    tu_qvec_alloc(v, len);
    fmpq_t W;
    fmpq_init(W);
    slong k = 0;
    for (slong j = 0; j < L; j++)
        for (ulong c = 0; c < mul[j]; c++) {
            fmpq_set(v->p + k++, val + j);
            fmpq_add(W, W, val + j);
        }
    for (k = 0; k < len; k++) fmpq_div(v->p + k, v->p + k, W);
    embz_qvec_sort(v);
    fmpq_clear(W);
}

/* Random small level vectors (values with ties, zero multiplicities, balls that overlap)
 * against the exact distance of the expanded vectors, for uniform and vector targets. */
START_TEST(test_random_exact)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const char *targets[] = { "ebit", "uniform:3", "ebits:2", "0.7,0.3", "0.5,0.3,0.2" };
    for (int iter = 0; iter < 300; iter++) {
        slong prec = precs[iter % 2];
        slong L = 1 + (slong) n_randint(rs, 7);
        fmpq *val = _fmpq_vec_init(L);
        ulong *mul = flint_malloc(sizeof(ulong) * (size_t) L);
        ulong total = 0;
        for (slong j = 0; j < L; j++) {
            /* values from a small set so that ties occur */
            fmpq_set_si(val + j, 1 + (slong) n_randint(rs, 6), 1 + n_randint(rs, 3));
            mul[j] = n_randint(rs, 5);
            total += mul[j];
        }
        if (total == 0) mul[0] = 1;
        embz_levels_t x, y;
        embz_levels_init(x);
        embz_levels_init(y);
        arb_t v, K;
        fmpz_t m, argk;
        arb_init(v); arb_init(K);
        fmpz_init(m); fmpz_init(argk);
        int widen = iter % 3 == 0;   /* balls of radius 2^-40 that overlap at ties */
        for (slong j = 0; j < L; j++) {
            arb_set_fmpq(v, val + j, prec);
            if (widen) mag_set_ui_2exp_si(arb_radref(v), 1, -40);
            fmpz_set_ui(m, mul[j]);
            embz_levels_push(x, v, m);
        }
        embz_target_t q;
        embz_target_init(q);
        tu_target_set(q, targets[iter % 5]);
        embz_levels_tensor_target(y, x, q, prec);
        embz_levels_distance(K, argk, x, y, prec);
        /* the reference */
        embz_qvec_t p, r, qv;
        embz_qvec_init(p); embz_qvec_init(r); embz_qvec_init(qv);
        expand(p, val, mul, L);
        if (q->kind == EMBZ_TARGET_UNIFORM) {
            tu_qvec_alloc(qv, (slong) q->d);
            for (ulong l = 0; l < q->d; l++) fmpq_set_ui(qv->p + l, 1, q->d);
        } else {
            tu_qvec_alloc(qv, q->q->len);
            for (slong l = 0; l < q->q->len; l++) fmpq_set(qv->p + l, q->q->p + l);
        }
        tu_qvec_tensor(r, p, qv);
        embz_qvec_sort(r);
        fmpq_t E;
        fmpq_init(E);
        long kk;
        embz_qvec_distance(E, &kk, p, r);
        ck_assert_msg(arb_contains_fmpq(K, E), "iter %d: exact K outside", iter);
        ck_assert(arb_is_finite(K));
        ck_assert(mag_cmp_2exp_si(arb_radref(K), widen ? -30 : -prec + 16) < 0);
        if (!widen) {
            /* the reported k attains the lower end, so the exact K there is within it */
            ck_assert(fmpz_sgn(argk) >= 0);
        }
        fmpq_clear(E);
        embz_qvec_clear(p); embz_qvec_clear(r); embz_qvec_clear(qv);
        embz_target_clear(q);
        arb_clear(v); arb_clear(K);
        fmpz_clear(m); fmpz_clear(argk);
        embz_levels_clear(x);
        embz_levels_clear(y);
        _fmpq_vec_clear(val, L);
        flint_free(mul);
    }
    flint_randclear(rs);
}
END_TEST

/* The maximally entangled state of dimension 2^L (L copies of one ebit, a single level):
 * the one-ebit error is exactly 1/2 at every L, here up to dimension 2^100000. */
START_TEST(test_maximally_entangled)
{
    const ulong Ls[] = { 1, 10, 1000, 100000 };
    for (int pi = 0; pi < 2; pi++)
        for (int j = 0; j < 4; j++) {
            slong prec = precs[pi];
            embz_levels_t x, y;
            embz_levels_init(x);
            embz_levels_init(y);
            arb_t v, K;
            fmpz_t m, dim;
            arb_init(v); arb_init(K);
            fmpz_init(m); fmpz_init(dim);
            arb_one(v);
            arb_mul_2exp_si(v, v, -(slong) Ls[j]);
            fmpz_one(m);
            fmpz_mul_2exp(m, m, Ls[j]);
            embz_levels_push(x, v, m);
            embz_levels_dim(dim, x);
            ck_assert_int_eq(fmpz_bits(dim), Ls[j] + 1);
            embz_target_t q;
            embz_target_init(q);   /* one ebit */
            embz_levels_tensor_target(y, x, q, prec);
            embz_levels_distance(K, NULL, x, y, prec);
            arb_t h;
            arb_init(h);
            arb_set_d(h, 0.5);
            ck_assert_msg(arb_contains(K, h), "L = %lu", Ls[j]);
            ck_assert(mag_cmp_2exp_si(arb_radref(K), -prec + 8) < 0);
            arb_clear(h);
            embz_target_clear(q);
            arb_clear(v); arb_clear(K);
            fmpz_clear(m); fmpz_clear(dim);
            embz_levels_clear(x);
            embz_levels_clear(y);
        }
}
END_TEST

/* Tensor powers of the qubit state (a, 1 - a): levels a^k (1-a)^(L-k) with multiplicity
 * C(L, k). Against the expanded vector for L <= 10, and narrow at L = 2000 (dimension
 * 2^2000). */
START_TEST(test_qubit_powers)
{
    fmpq_t a, b;
    fmpq_init(a); fmpq_init(b);
    fmpq_set_si(a, 7, 10);
    fmpq_set_si(b, 3, 10);
    const ulong Ls[] = { 1, 2, 5, 10, 2000 };
    const char *targets[] = { "ebit", "0.6,0.4" };
    for (int t = 0; t < 2; t++)
        for (int j = 0; j < 5; j++) {
            ulong L = Ls[j];
            slong prec = precs[j % 2];
            embz_levels_t x, y;
            embz_levels_init(x);
            embz_levels_init(y);
            arb_t v, K, u;
            fmpz_t m;
            arb_init(v); arb_init(K); arb_init(u);
            fmpz_init(m);
            fmpq *val = _fmpq_vec_init((slong) L + 1);
            ulong *mul = flint_malloc(sizeof(ulong) * (L + 1));
            for (ulong k = 0; k <= L; k++) {
                fmpq_t s;
                fmpq_init(s);
                fmpq_pow_si(val + k, a, (slong) k);
                fmpq_pow_si(s, b, (slong) (L - k));
                fmpq_mul(val + k, val + k, s);
                fmpq_clear(s);
                arb_set_fmpq(v, val + k, prec + 16);
                fmpz_bin_uiui(m, L, k);
                mul[k] = L <= 10 ? fmpz_get_ui(m) : 0;
                embz_levels_push(x, v, m);
            }
            embz_target_t q;
            embz_target_init(q);
            tu_target_set(q, targets[t]);
            embz_levels_tensor_target(y, x, q, prec);
            embz_levels_distance(K, NULL, x, y, prec);
            ck_assert(arb_is_finite(K));
            ck_assert_msg(mag_cmp_2exp_si(arb_radref(K), -prec + 24) < 0, "L = %lu", L);
            if (L <= 10) {
                embz_qvec_t p, r, qv;
                embz_qvec_init(p); embz_qvec_init(r); embz_qvec_init(qv);
                expand(p, val, mul, (slong) L + 1);
                if (q->kind == EMBZ_TARGET_UNIFORM) {
                    tu_qvec_alloc(qv, 2);
                    fmpq_set_si(qv->p, 1, 2);
                    fmpq_set_si(qv->p + 1, 1, 2);
                } else {
                    tu_qvec_alloc(qv, q->q->len);
                    for (slong l = 0; l < q->q->len; l++) fmpq_set(qv->p + l, q->q->p + l);
                }
                tu_qvec_tensor(r, p, qv);
                embz_qvec_sort(r);
                fmpq_t E;
                fmpq_init(E);
                long kk;
                embz_qvec_distance(E, &kk, p, r);
                ck_assert_msg(arb_contains_fmpq(K, E), "L = %lu target %s", L, targets[t]);
                fmpq_clear(E);
                embz_qvec_clear(p); embz_qvec_clear(r); embz_qvec_clear(qv);
            }
            embz_target_clear(q);
            _fmpq_vec_clear(val, (slong) L + 1);
            flint_free(mul);
            arb_clear(v); arb_clear(K); arb_clear(u);
            fmpz_clear(m);
            embz_levels_clear(x);
            embz_levels_clear(y);
        }
    fmpq_clear(a); fmpq_clear(b);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("levels");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 300);
    tcase_add_test(tc, test_random_exact);
    tcase_add_test(tc, test_maximally_entangled);
    tcase_add_test(tc, test_qubit_powers);
    suite_add_tcase(s, tc);
    SRunner *sr = srunner_create(s);
    srunner_run_all(sr, CK_NORMAL);
    int failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    flint_cleanup();
    return failed != 0;
}
