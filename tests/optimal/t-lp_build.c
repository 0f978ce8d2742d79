/* The linear program's matrix (lp_build.c) encodes the error exactly: for random sorted
 * vectors p (n <= 40, d in {2, 3, 5}) with E = K(p -> p (x) u_d) from measure's threshold form
 * (embz_qvec_distance, an independent exact path), the point x = P / E (the cumulative sums
 * scaled so that the error is 1) satisfies every row, and some Ky Fan row is tight; its
 * objective P_n / E = 1 / E. Also the shape: 2n rows, fewer than 6n entries, the diagonal
 * first in each Ky Fan row. */
#include "topt.h"

static void row_value(fmpq_t v, const _embz_opt_lp_struct *lp, slong r, const fmpq *x)
{
    fmpq_t t;
    fmpq_init(t);
    fmpq_zero(v);
    for (slong z = lp->start[r]; z < lp->start[r + 1]; z++) {
        fmpq_mul_si(t, x + lp->col[z], lp->val[z]);
        fmpq_add(v, v, t);
    }
    fmpq_clear(t);
}

START_TEST(test_rows)
{
    flint_rand_t rs;
    flint_randinit(rs);
    ulong ds[] = { 2, 3, 5 };
    fmpq_t E, v, r;
    fmpq_init(E); fmpq_init(v); fmpq_init(r);
    int reps = topt_quick() ? 100 : 600;
    for (int rep = 0; rep < reps; rep++) {
        slong n = 1 + (slong) n_randint(rs, 40);
        ulong d = ds[n_randint(rs, 3)];
        embz_qvec_t p;
        embz_qvec_init(p);
        topt_random_sorted(p, n, rs);
        topt_distance(E, p, d);
        ck_assert(fmpq_sgn(E) > 0);     /* no state embezzles exactly */
        _embz_opt_lp_struct lp;
        _embz_opt_lp_init(&lp, n, d);
        ck_assert_int_eq(lp.nrows, 2 * n);
        ck_assert(lp.start[lp.nrows] < 6 * n);
        fmpq *x = _fmpq_vec_init(n);
        for (slong i = 0; i < n; i++) {
            fmpq_add(x + i, i ? x + i - 1 : x + i, p->p + i);
        }
        for (slong i = 0; i < n; i++) fmpq_div(x + i, x + i, E);
        int tight = 0;
        for (slong k = 0; k < lp.nrows; k++) {
            row_value(v, &lp, k, x);
            fmpq_set_si(r, lp.rhs[k], 1);
            ck_assert_msg(fmpq_cmp(v, r) <= 0, "n = %ld d = %lu row %ld", (long) n, d, (long) k);
            if (k < n) {
                tight |= fmpq_equal(v, r);
                ck_assert_int_eq(lp.col[lp.start[k]], k);   /* the diagonal first */
            }
        }
        ck_assert_msg(tight, "no tight Ky Fan row (n = %ld, d = %lu)", (long) n, d);
        fmpq_inv(v, E);
        ck_assert(fmpq_equal(x + n - 1, v));
        _fmpq_vec_clear(x, n);
        _embz_opt_lp_clear(&lp);
        embz_qvec_clear(p);
    }
    fmpq_clear(E); fmpq_clear(v); fmpq_clear(r);
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("optimal-lp_build");
    TCase *tc = tcase_create("lp_build");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_rows);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
