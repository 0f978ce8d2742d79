/* The branch and bound over s (analytic_bb.c).
 *  - the heap: random bounds (ties and infinities among them) pushed, then popped in
 *    non-increasing order, each item once;
 *  - _embz_an_special_in: on a family with head weights inserted into the tail, the first
 *    special size is in the interval, and before it (over the whole interval when there is
 *    none) no inserted weight sits at s, s + 1 or k = d s + r and the counts of insertions
 *    before s and before k stay constant (checked by counting the insertions here);
 *  - _embz_an_branch_and_bound over the residue ranges the driver uses: the maximum of h
 *    over those ranges, from the explicit reference sums of an_common.h, lies between the
 *    best proven value and the upper end, which are within a small gap of each other. */
#include "an_common.h"

START_TEST(test_heap)
{
    flint_rand_t rs;
    flint_randinit(rs);
    for (int p = 0; p < 2; p++) {
        slong prec = tf_precs[p];
        for (int rep = 0; rep < 200; rep++) {
            bb_heap hp = { NULL, 0, 0 };
            slong m = (slong) n_randint(rs, 300);
            slong sum = 0;
            for (slong i = 0; i < m; i++) {
                bb_item it;
                fmpz_init_set_si(it.lo, i);
                fmpz_init_set_si(it.hi, i + 1);
                arf_init(it.U);
                ulong kind = n_randint(rs, 10);
                if (kind == 0) arf_pos_inf(it.U);
                else if (kind == 1) arf_set_si(it.U, (slong) n_randint(rs, 4));   /* ties */
                else arf_randtest(it.U, rs, prec, 8);
                it.r = (ulong) i;
                sum += i;
                _embz_an_heap_push(&hp, &it);
            }
            ck_assert_int_eq(hp.len, m);
            arf_t last;
            arf_init(last);
            arf_pos_inf(last);
            slong got = 0;
            while (hp.len > 0) {
                bb_item it;
                _embz_an_heap_pop(&hp, &it);
                ck_assert(arf_cmp(it.U, last) <= 0);
                arf_set(last, it.U);
                ck_assert(fmpz_get_si(it.hi) == fmpz_get_si(it.lo) + 1
                          && fmpz_get_si(it.lo) == (slong) it.r);
                got += (slong) it.r;
                _embz_an_bb_item_clear(&it);
            }
            ck_assert_int_eq(got, sum);      /* each item came back once */
            arf_clear(last);
            flint_free(hp.v);
        }
    }
    flint_randclear(rs);
}
END_TEST

/* insertions at positions < K, and whether one sits at K (counted here) */
static slong count_ins(const actx *c, slong K, int *at)
{
    slong cnt = 0;
    *at = 0;
    for (slong i = 0; i < c->nins; i++) {
        slong P = fmpz_get_si(c->ins_pos + i);
        if (P < K) cnt++;
        else if (P == K) *at = 1;
    }
    return cnt;
}

/* s is ordinary for residue r: no insertion at s, s + 1 or k, and the same counts before s
 * and before k as at s0 */
static int ordinary(const actx *c, ulong r, slong s, slong s0)
{
    int a1, a2, a3, b1, b2;
    slong k = (slong) c->d * s + (slong) r, k0 = (slong) c->d * s0 + (slong) r;
    slong cs = count_ins(c, s, &a1), ck = count_ins(c, k, &a2);
    count_ins(c, s + 1, &a3);
    slong cs0 = count_ins(c, s0, &b1), ck0 = count_ins(c, k0, &b2);
    return !a1 && !a2 && !a3 && cs == cs0 && ck == ck0;
}

START_TEST(test_special_in)
{
    flint_rand_t rs;
    flint_randinit(rs);
    long found = 0, none = 0;
    for (int p = 0; p < 2; p++) {
        for (ulong d = 1; d <= 3; d++) {
            tf_ctx X;
            tf_ctx_init(&X, TF_BUMP, 20000, d, tf_precs[p]);
            actx *c = &X.c;
            ck_assert(c->nins > 0);
            slong Pmax = fmpz_get_si(c->ins_pos + c->nins - 1);
            fmpz_t lo, hi, m;
            fmpz_init(lo); fmpz_init(hi); fmpz_init(m);
            for (int rep = 0; rep < 300; rep++) {
                ulong r = n_randint(rs, d);
                slong a = tf_rand_in(rs, 1, Pmax + 50), b = a + (slong) n_randint(rs, 200);
                fmpz_set_si(lo, a);
                fmpz_set_si(hi, b);
                slong end = b;
                if (_embz_an_special_in(m, c, r, lo, hi)) {
                    found++;
                    slong sm = fmpz_get_si(m);
                    ck_assert(a <= sm && sm <= b);
                    /* special: an insertion at s, s + 1 or k, or the counts change from the
                     * size before or to the size after */
                    ck_assert(!ordinary(c, r, sm, sm) || (sm > 1 && !ordinary(c, r, sm, sm - 1))
                              || !ordinary(c, r, sm + 1, sm));
                    end = sm - 1;
                } else {
                    none++;
                }
                for (slong s = a; s <= end; s++)
                    ck_assert_msg(ordinary(c, r, s, a), "d=%lu r=%lu [%ld, %ld]: size %ld",
                                  d, r, a, b, s);
            }
            fmpz_clear(lo); fmpz_clear(hi); fmpz_clear(m);
            tf_ctx_clear(&X);
        }
    }
    ck_assert(found > 100 && none > 100);
    flint_randclear(rs);
}
END_TEST

static void check_bb(int fam, slong n, ulong d, slong prec)
{
    tf_ctx X;
    tf_ctx_init(&X, fam, n, d, prec);
    actx *c = &X.c;
    tf_ref R;
    tf_ref_init(&R, fam, n, c->prec + 64);
    slong kmax = FLINT_MIN(fmpz_get_si(c->L) + c->a + c->nins, n - 1);
    fmpz_set_si(c->kmax, kmax);
    arf_t tol;
    arf_init(tol);
    arf_one(tol);
    arf_mul_2exp_si(tol, tol, -(prec - 16));
    arf_set(c->tol, tol);
    arf_zero(c->upper);
    fmpz *vlo = _fmpz_vec_init(d), *vhi = _fmpz_vec_init(d);
    arb_t h, mx;
    arb_init(h); arb_init(mx);
    arb_zero(mx);
    int first = 1;
    for (ulong r = 0; r < d; r++) {
        slong slo = (c->E - (slong) r) / (slong) d + 1, shi = (kmax - (slong) r) / (slong) d;
        fmpz_set_si(vlo + r, slo);
        fmpz_set_si(vhi + r, shi);
        /* the reference maximum over the range */
        for (slong s = slo; s <= shi; s++) {
            tf_ref_h(h, &R, (slong) d * s + (slong) r, d);
            if (first || arb_gt(h, mx)) arb_set(mx, h);
            else if (!arb_lt(h, mx)) arb_union(mx, mx, h, R.prec);
            first = 0;
        }
    }
    ck_assert_int_eq(_embz_an_branch_and_bound(c, vlo, vhi, tol, c->prec), EMBZ_OK);
    arf_t blo, mlo, mhi, gap;
    arf_init(blo); arf_init(mlo); arf_init(mhi); arf_init(gap);
    arb_get_lbound_arf(blo, c->best, c->prec);
    arb_get_lbound_arf(mlo, mx, R.prec);
    arb_get_ubound_arf(mhi, mx, R.prec);
    ck_assert_msg(arf_cmp(blo, mhi) <= 0, "%s d=%lu: proven value above the maximum",
                  tf_expr[fam], d);
    ck_assert_msg(arf_cmp(mlo, c->upper) <= 0, "%s d=%lu: maximum above the upper end",
                  tf_expr[fam], d);
    arf_sub(gap, c->upper, blo, 64, ARF_RND_UP);
    ck_assert_msg(arf_cmp_2exp_si(gap, -(prec / 2)) <= 0, "%s d=%lu: gap too wide",
                  tf_expr[fam], d);
    /* the argmax is a k of the ranges whose h is within the gap of the maximum */
    tf_ref_h(h, &R, fmpz_get_si(c->argk), d);
    arb_add_error_arf(h, gap);
    ck_assert(arb_overlaps(h, mx));
    arf_clear(blo); arf_clear(mlo); arf_clear(mhi); arf_clear(gap);
    arf_clear(tol);
    arb_clear(h); arb_clear(mx);
    _fmpz_vec_clear(vlo, d); _fmpz_vec_clear(vhi, d);
    tf_ref_clear(&R);
    tf_ctx_clear(&X);
}

START_TEST(test_branch_and_bound)
{
    for (int p = 0; p < 2; p++) {
        slong prec = tf_precs[p];
        for (ulong d = 2; d <= 5; d += 3) {
            check_bb(TF_INVERSE, 30000, d, prec);
            check_bb(TF_BUMP, 20000, d, prec);
            check_bb(TF_LOG, 5000, d, prec);
            check_bb(TF_POWER, 10000, d, prec);
            check_bb(TF_NEARMISS, 30000, d, prec);
        }
    }
}
END_TEST

int main(void)
{
    Suite *s = suite_create("error-bb");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_heap);
    tcase_add_test(tc, test_special_in);
    tcase_add_test(tc, test_branch_and_bound);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
