/* Target vectors within the majorization bracket (analytic_bracket.c): for the family 1/i at
 * small sizes the enclosure of E_n(q) must contain K(p -> p (x) q) of the explicit vector
 * p_i = (1/i) / H_n (embz_qvec_distance, FLINT rationals) - for short vectors, where the
 * threshold form tightens the bracket, and for a vector longer than TH_SEARCH_TERMS, where
 * the bracket E(u_d') <= E(q) <= E(u_m) alone is the result (d' = floor(1/q_1), m the
 * number of entries); a stop requested by the caller is a failure, not a bracket. */
#include "an_common.h"

static void explicit_K(fmpq_t K, slong n, const embz_qvec_t q)
{
    embz_qvec_t pv, r;
    fmpq_t H;
    embz_qvec_init(pv); embz_qvec_init(r);
    fmpq_init(H);
    arith_harmonic_number(H, (ulong) n);
    tu_qvec_alloc(pv, n);
    for (slong i = 0; i < n; i++) {
        fmpq_set_si(pv->p + i, 1, (ulong) (i + 1));
        fmpq_div(pv->p + i, pv->p + i, H);
    }
    tu_qvec_tensor(r, pv, q);
    embz_qvec_distance(K, NULL, pv, r);
    fmpq_clear(H);
    embz_qvec_clear(pv); embz_qvec_clear(r);
}

/* E_n(q) by the bracket function on a fresh engine */
static int bracket(embz_error_result_t res, slong n, const embz_target_t q, slong prec,
                   const volatile int *cancel)
{
    embz_family_t f;
    embz_analytic_t an;
    embz_err_t err;
    fmpz_t nn;
    embz_err_clear(&err);
    embz_family_init(f);
    ck_assert(embz_family_resolve(f, "1/i", NULL, 0, 0, &err) == EMBZ_OK);
    fmpz_init_set_si(nn, n);
    embz_analytic_init(an, f, prec);
    if (cancel != NULL) embz_analytic_set_limits(an, cancel, 0);
    int st = _embz_an_vector_target_bounds(res, an, nn, q, &err);
    embz_analytic_clear(an);
    fmpz_clear(nn);
    embz_family_clear(f);
    return st;
}

static void check_contains(const embz_error_result_t res, const fmpq_t K, slong prec)
{
    arb_t Kb;
    arb_init(Kb);
    arb_set_fmpq(Kb, K, prec + 64);
    ck_assert_msg(arb_overlaps(res->error, Kb), "K outside the enclosure (how %d)", res->how.kind);
    ck_assert(arb_is_finite(res->error));
    arb_clear(Kb);
}

START_TEST(test_short_vectors)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const slong n = 900;
    for (int pi = 0; pi < 2; pi++) {
        slong prec = tf_precs[pi];
        for (int rep = 0; rep < 6; rep++) {
            embz_target_t q;
            embz_target_init(q);
            slong m = 2 + (slong) n_randint(rs, 4);
            ulong cc[8], sum = 0;
            q->kind = EMBZ_TARGET_VECTOR;
            tu_qvec_alloc(q->q, m);
            for (slong j = 0; j < m; j++) { cc[j] = 1 + n_randint(rs, 30); sum += cc[j]; }
            for (slong j = 0; j < m; j++) fmpq_set_si(q->q->p + j, (slong) cc[j], sum);
            embz_qvec_sort(q->q);
            fmpq_t K;
            fmpq_init(K);
            explicit_K(K, n, q->q);
            embz_error_result_t res;
            embz_error_result_init(res);
            ck_assert_int_eq(bracket(res, n, q, prec, NULL), EMBZ_OK);
            check_contains(res, K, prec);
            /* the threshold form made it tight (a bracket alone is about 0.1 wide) */
            ck_assert_int_eq(res->how.kind, EMBZ_HOW_GENERAL);
            tf_assert_narrow(res->error, -30, "tight enclosure");
            embz_error_result_clear(res);
            fmpq_clear(K);
            embz_target_clear(q);
        }
    }
    flint_randclear(rs);
}
END_TEST

START_TEST(test_long_vector)
{
    const slong n = 450, m = TH_SEARCH_TERMS + 6;
    /* q = (1/3, the rest shared equally by m - 1 entries): d' = 3 */
    embz_target_t q;
    embz_target_init(q);
    q->kind = EMBZ_TARGET_VECTOR;
    tu_qvec_alloc(q->q, m);
    fmpq_set_si(q->q->p, 1, 3);
    for (slong j = 1; j < m; j++) fmpq_set_si(q->q->p + j, 2, (ulong) (3 * (m - 1)));
    fmpq_t K;
    fmpq_init(K);
    explicit_K(K, n, q->q);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = tf_precs[pi];
        embz_error_result_t res;
        embz_error_result_init(res);
        ck_assert_int_eq(bracket(res, n, q, prec, NULL), EMBZ_OK);
        check_contains(res, K, prec);
        ck_assert_int_eq(res->how.kind, EMBZ_HOW_BRACKET);   /* the bracket alone */
        ck_assert(res->how.bracket_lo == 3 && res->how.bracket_hi == (ulong) m);
        ck_assert(strstr(res->how.reason, "not run") != NULL);
        /* the lower end of the bracket, E(u_3), is above 0 */
        arf_t lo;
        arf_init(lo);
        arb_get_lbound_arf(lo, res->error, prec);
        ck_assert_msg(arf_sgn(lo) > 0, "lower end of the bracket not above 0");
        arf_clear(lo);
        embz_error_result_clear(res);
    }
    fmpq_clear(K);
    embz_target_clear(q);
}
END_TEST

START_TEST(test_cancelled)
{
    volatile int stop = 1;
    embz_target_t q;
    embz_target_init(q);
    tu_target_set(q, "0.5,0.3,0.2");
    for (int pi = 0; pi < 2; pi++) {
        embz_error_result_t res;
        embz_error_result_init(res);
        ck_assert_int_eq(bracket(res, 5000, q, tf_precs[pi], &stop), EMBZ_ERR_LIMIT);
        embz_error_result_clear(res);
    }
    embz_target_clear(q);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("error-bracket");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_short_vectors);
    tcase_add_test(tc, test_long_vector);
    tcase_add_test(tc, test_cancelled);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
