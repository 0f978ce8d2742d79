/* Positions in the sorted order (analytic_positions.c): prefix sums and values at any
 * position, the tail sums C(y) and values at tail positions, h(k), and the record of proven
 * values and bounds. Reference: the weights written in C with arb, sorted by the test, prefix
 * sums added one by one (an_common.h); every engine ball must overlap the reference and be
 * narrow. */
#include "an_common.h"

/* largest 2-exponent of |x| (x finite, nonzero) */
static slong exp_of(const arb_t x)
{
    return (slong) arf_abs_bound_lt_2exp_si(arb_midref(x)) + 1;
}

static void check_family(int fam, slong n, ulong d, slong prec, flint_rand_t rs)
{
    tf_ctx X;
    tf_ctx_init(&X, fam, n, d, prec);
    actx *c = &X.c;
    tf_ref R;
    tf_ref_init(&R, fam, n, c->prec + 64);
    arb_t res, y, h;
    fmpz_t K;
    arb_init(res); arb_init(y); arb_init(h);
    fmpz_init(K);
    slong eW = exp_of(R.S + n), tight = -(prec / 2);

    /* the total and the layout's sizes */
    ck_assert(arb_overlaps(c->W, R.S + n));
    tf_assert_narrow(c->W, eW + tight, "W");
    ck_assert_int_eq(c->a + c->b + c->nins + fmpz_get_si(c->L), n);

    /* prefix sums and values: random positions, the ends of each part of the layout and the
     * places of the inserted head weights */
    slong special[16 + 3 * 64], ns = 0;
    slong edge[] = { 0, 1, 2, c->E, c->E + 1, c->a, c->a + 1, c->a + c->nins + 1,
                     n - c->b, n - c->b + 1, n - 1, n };
    for (size_t i = 0; i < sizeof(edge) / sizeof(edge[0]); i++) special[ns++] = edge[i];
    for (slong i = 0; i < c->nins; i++)
        for (slong e = -1; e <= 1; e++) special[ns++] = fmpz_get_si(c->ins_pos + i) + e;
    for (slong t = 0; t < ns + 400; t++) {
        slong k = t < ns ? special[t] : tf_rand_in(rs, 0, n);
        if (k < 0 || k > n) continue;
        fmpz_set_si(K, k);
        ck_assert_int_eq(_embz_an_pos_sum(res, c, K, c->prec), EMBZ_OK);
        ck_assert_msg(arb_overlaps(res, R.S + k), "%s n=%ld: S(%ld) off", tf_expr[fam], n, k);
        tf_assert_narrow(res, eW + tight, "S(K)");
        if (k == 0) continue;
        ck_assert_int_eq(_embz_an_pos_val(res, c, K, c->prec), EMBZ_OK);
        ck_assert_msg(arb_overlaps(res, R.w + k), "%s n=%ld: w(%ld) off", tf_expr[fam], n, k);
        tf_assert_narrow(res, exp_of(R.w + k) + tight, "w(K)");
    }

    /* the tail: C(y) is the sum of the first y tail weights in the tail's own order (indices
     * M+1, M+2, ... for a non-increasing tail, n, n-1, ... for a non-decreasing one), and
     * the value at tail position y the weight there */
    {
        slong M = c->M, L = fmpz_get_si(c->L);
        arb_ptr Q = _arb_vec_init(n + 1);          /* sums in index order */
        for (slong i = 1; i <= n; i++) {
            tf_weight(res, fam, i, R.prec);
            arb_add(Q + i, Q + i - 1, res, R.prec);
        }
        arb_ptr v = _arb_vec_init(1);
        for (slong t = 0; t < 200; t++) {
            slong yy = t == 0 ? 1 : t == 1 ? L : tf_rand_in(rs, 1, L);
            arb_set_si(y, yy);
            ck_assert_int_eq(_embz_an_tail_C(res, c, y, EMBZ_TAIL_LEVEL_AUTO, c->prec), EMBZ_OK);
            if (c->t->dir > 0) arb_sub(h, Q + M + yy, Q + M, R.prec);
            else arb_sub(h, Q + n, Q + n - yy, R.prec);
            ck_assert_msg(arb_overlaps(res, h), "%s: C(%ld) off", tf_expr[fam], yy);
            tf_assert_narrow(res, eW + tight, "C(y)");
            ck_assert_int_eq(_embz_an_tail_v_series(v, c, y, 1, c->prec), EMBZ_OK);
            tf_weight(h, fam, c->t->dir > 0 ? M + yy : n + 1 - yy, R.prec);
            ck_assert_msg(arb_overlaps(v, h), "%s: tail value at %ld off", tf_expr[fam], yy);
            tf_assert_narrow(v, exp_of(h) + tight, "tail value");
            /* the position's x coordinate is the index of that weight */
            _embz_an_tail_x(res, c, y, c->prec);
            ck_assert(arb_equal_si(res, c->t->dir > 0 ? M + yy : n + 1 - yy));
        }
        _arb_vec_clear(v, 1);
        _arb_vec_clear(Q, n + 1);
    }

    /* h(k) = (P_k - P_s - (r/d) p_(s+1)) / W */
    for (slong t = 0; t < 300; t++) {
        slong k = t < 3 ? (slong[]) { 1, c->E + 1, n }[t] : tf_rand_in(rs, 1, n);
        fmpz_set_si(K, k);
        long ev = c->evals;
        ck_assert_int_eq(_embz_an_h_at(res, c, K, c->prec), EMBZ_OK);
        ck_assert_int_eq(c->evals, ev + 1);
        tf_ref_h(h, &R, k, d);
        ck_assert_msg(arb_overlaps(res, h), "%s d=%lu: h(%ld) off", tf_expr[fam], d, k);
        tf_assert_narrow(res, tight, "h(k)");
    }
    tf_ref_clear(&R);
    arb_clear(res); arb_clear(y); arb_clear(h);
    fmpz_clear(K);
    tf_ctx_clear(&X);
}

START_TEST(test_positions)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const int fams[] = { TF_INVERSE, TF_BUMP, TF_LOG, TF_POWER };
    const slong ns[] = { 3000, 20000, 5000, 8000 };
    for (int p = 0; p < 2; p++)
        for (int i = 0; i < 4; i++)
            for (ulong d = 2; d <= 3; d++)
                check_family(fams[i], ns[i], d, tf_precs[p], rs);
    flint_randclear(rs);
}
END_TEST

/* The record: the best proven value is the offered value with the highest lower end (and its
 * k), the upper end the highest upper end of everything offered or raised; a ball that is not
 * finite proves nothing and leaves no finite upper end. Reference: the same maxima kept by
 * this loop. */
START_TEST(test_record)
{
    flint_rand_t rs;
    flint_randinit(rs);
    for (int p = 0; p < 2; p++) {
        slong prec = tf_precs[p];
        for (int rep = 0; rep < 200; rep++) {
            tf_ctx X;
            actx *c = &X.c;
            fmpz_t n, k, kbest;
            fmpz_init_set_ui(n, 1000);
            fmpz_init(k); fmpz_init(kbest);
            _embz_an_ctx_init(c, X.tail, NULL, n, 2, prec);
            arf_zero(c->upper);
            arb_t h;
            arf_t lo, hi, blo, up;
            arb_init(h);
            arf_init(lo); arf_init(hi); arf_init(blo); arf_init(up);
            arf_neg_inf(blo);
            arf_zero(up);
            int any = 0, inf = 0;
            slong m = 1 + (slong) n_randint(rs, 30);
            for (slong j = 0; j < m; j++) {
                fmpz_set_ui(k, n_randint(rs, 1000));
                if (n_randint(rs, 10) == 0) {
                    arb_indeterminate(h);
                } else {
                    arb_randtest(h, rs, prec, 4);
                }
                int raise = n_randint(rs, 4) == 0;
                if (raise) _embz_an_raise_upper(c, h);
                else _embz_an_offer(c, h, k);
                if (!arb_is_finite(h)) { inf = 1; continue; }
                arb_get_ubound_arf(hi, h, prec);
                if (arf_cmp(hi, up) > 0) arf_set(up, hi);
                if (raise) continue;
                arb_get_lbound_arf(lo, h, prec);
                if (!any || arf_cmp(lo, blo) > 0) {
                    arf_set(blo, lo);
                    fmpz_set(kbest, k);
                    any = 1;
                }
            }
            if (any) {
                arb_get_lbound_arf(lo, c->best, prec);
                ck_assert(arf_equal(lo, blo));
                ck_assert(fmpz_equal(c->argk, kbest));
            } else {
                ck_assert(!arb_is_finite(c->best));
            }
            if (inf) ck_assert(arf_is_pos_inf(c->upper));
            else ck_assert(arf_equal(c->upper, up));
            arb_clear(h);
            arf_clear(lo); arf_clear(hi); arf_clear(blo); arf_clear(up);
            _embz_an_ctx_clear(c);
            fmpz_clear(n); fmpz_clear(k); fmpz_clear(kbest);
        }
    }
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("error-positions");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_positions);
    tcase_add_test(tc, test_record);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
