/* The layout of one size (analytic_layout.c): A | tail with the inserted head weights | B.
 * Reference: the weights written in C with arb and sorted by the test (an_common.h). The
 * head values in A must be the largest weights, those in B the smallest, each inserted head
 * weight must sit at its place in the sorted order, the explicit positions and their prefix
 * sums must be the sorted values and sums, and the total the sum of all weights. Head weights
 * that tie are merged into unions, and the positions still enclose the sorted values. */
#include "an_common.h"

static void check_layout(const char *expr, int fam, slong n, ulong d, slong prec,
                         int want_ins)
{
    tf_ctx X;
    tf_ctx_init_expr(&X, expr, n, d, prec);
    actx *c = &X.c;
    tf_ref R;
    int have_ref = fam >= 0;
    if (have_ref) tf_ref_init(&R, fam, n, c->prec + 64);
    fmpz_t K;
    fmpz_init(K);
    ck_assert_int_eq(c->M, 64);
    ck_assert_int_eq(c->a + c->b + c->nins, c->M);
    ck_assert_int_eq(fmpz_get_si(c->L), n - c->M);
    if (want_ins) ck_assert_msg(c->nins > 0, "%s: no head weight inside the tail", expr);
    /* A non-increasing (as balls: each at least the next, or merged equal) */
    for (slong i = 0; i + 1 < c->a; i++)
        ck_assert(arb_ge(c->A + i, c->A + i + 1) || arb_equal(c->A + i, c->A + i + 1));
    for (slong i = 0; i + 1 < c->b; i++)
        ck_assert(arb_ge(c->B + i, c->B + i + 1) || arb_equal(c->B + i, c->B + i + 1));
    /* the insertions: places increasing, after A, before B */
    for (slong i = 0; i < c->nins; i++) {
        ck_assert(fmpz_cmp_si(c->ins_pos + i, c->a) > 0);
        ck_assert(fmpz_cmp_si(c->ins_pos + i, n - c->b) <= 0);
        if (i > 0) ck_assert(fmpz_cmp(c->ins_pos + i - 1, c->ins_pos + i) < 0);
    }
    ck_assert(c->E >= (slong) d * (c->a + c->nins + 2));
    if (have_ref) {
        slong tight = -(prec / 2);
        for (slong i = 0; i < c->a; i++) ck_assert(arb_overlaps(c->A + i, R.w + i + 1));
        for (slong i = 0; i < c->b; i++)
            ck_assert_msg(arb_overlaps(c->B + i, R.w + n - c->b + 1 + i), "%s: B[%ld]", expr, i);
        /* each inserted weight at its sorted place, with its cumulative sum */
        arb_t t;
        arb_init(t);
        for (slong i = 0; i < c->nins; i++) {
            slong P = fmpz_get_si(c->ins_pos + i);
            ck_assert_msg(arb_overlaps(c->ins_val + i, R.w + P), "%s: insertion %ld at %ld",
                          expr, i, P);
            ck_assert_msg(R.x[P] <= c->M, "%s: position %ld is not a head weight", expr, P);
            arb_sub(t, c->ins_cum + i + 1, c->ins_cum + i, c->prec);
            ck_assert(arb_overlaps(t, c->ins_val + i));
        }
        for (slong k = 1; k <= c->E; k++) {
            ck_assert_msg(arb_overlaps(c->vals + k, R.w + k), "%s: value at %ld", expr, k);
            ck_assert_msg(arb_overlaps(c->S + k, R.S + k), "%s: sum at %ld", expr, k);
            tf_assert_narrow(c->vals + k, (slong) arf_abs_bound_lt_2exp_si(arb_midref(R.w + k))
                             + 1 + tight, "explicit value");
        }
        ck_assert(arb_overlaps(c->W, R.S + n));
        ck_assert(arb_overlaps(c->SA, R.S + c->a));
        arb_sub(t, R.S + n, R.S + n - c->b, R.prec);
        ck_assert(arb_overlaps(c->SB, t));
        arb_clear(t);
        tf_ref_clear(&R);
    }
    /* the positions of the insertions agree with the counting helper */
    for (slong i = 0; i < c->nins; i++) {
        slong at;
        ck_assert_int_eq(_embz_an_ins_before(c, c->ins_pos + i, &at), i);
        ck_assert_int_eq(at, i);
        fmpz_add_ui(K, c->ins_pos + i, 1);
        ck_assert_int_eq(_embz_an_ins_before(c, K, &at), i + 1);
    }
    fmpz_clear(K);
    tf_ctx_clear(&X);
}

START_TEST(test_layouts)
{
    for (int p = 0; p < 2; p++) {
        slong prec = tf_precs[p];
        for (ulong d = 1; d <= 3; d++) {
            check_layout(tf_expr[TF_INVERSE], TF_INVERSE, 3000, d, prec, 0);
            check_layout(tf_expr[TF_POWER], TF_POWER, 4000, d, prec, 0);
            check_layout(tf_expr[TF_BUMP], TF_BUMP, 20000, d, prec, 1);
            check_layout(tf_expr[TF_LOG], TF_LOG, 3000, d, prec, 0);
            check_layout(tf_expr[TF_NEARMISS], TF_NEARMISS, 3000, d, prec, 0);
        }
    }
}
END_TEST

/* log(i+1) rises: every head weight is below every tail weight, so A and the insertions are
 * empty and B holds the whole head, in reverse index order. */
START_TEST(test_rising_head)
{
    for (int p = 0; p < 2; p++) {
        tf_ctx X;
        tf_ctx_init(&X, TF_LOG, 3000, 2, tf_precs[p]);
        ck_assert_int_eq(X.c.a, 0);
        ck_assert_int_eq(X.c.nins, 0);
        ck_assert_int_eq(X.c.b, 64);
        ck_assert_int_eq(X.c.t->dir, -1);
        arb_t w;
        arb_init(w);
        for (slong i = 0; i < 64; i++) {
            tf_weight(w, TF_LOG, 64 - i, X.c.prec + 64);
            ck_assert(arb_overlaps(X.c.B + i, w));
        }
        arb_clear(w);
        tf_ctx_clear(&X);
    }
}
END_TEST

/* Ties: log(2)/max(i,2) has w(1) = w(2) exactly (the balls cannot order them): the layout
 * merges them into one union, and every explicit position and prefix sum still encloses the
 * true sorted value log 2 / max(i, 2) (reference: arb's log 2). */
START_TEST(test_ties)
{
    for (int p = 0; p < 2; p++) {
        slong prec = tf_precs[p];
        tf_ctx X;
        tf_ctx_init_expr(&X, "log(2)/max(i,2)", 3000, 2, prec);
        actx *c = &X.c;
        arb_t l2, v, s;
        arb_init(l2); arb_init(v); arb_init(s);
        arb_const_log2(l2, c->prec + 64);
        ck_assert(arb_overlaps(c->A, c->A + 1));
        for (slong k = 1; k <= c->E; k++) {
            arb_div_ui(v, l2, (ulong) FLINT_MAX(k, 2), c->prec + 64);
            arb_add(s, s, v, c->prec + 64);
            ck_assert_msg(arb_overlaps(c->vals + k, v), "value at %ld", k);
            ck_assert_msg(arb_overlaps(c->S + k, s), "sum at %ld", k);
        }
        arb_clear(l2); arb_clear(v); arb_clear(s);
        tf_ctx_clear(&X);
    }
}
END_TEST

int main(void)
{
    Suite *s = suite_create("error-layout");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_layouts);
    tcase_add_test(tc, test_rising_head);
    tcase_add_test(tc, test_ties);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
