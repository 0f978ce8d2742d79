/* Taylor-model bounds (analytic_taylor.c).
 *  - _embz_an_taylor_bound on random models: its upper bound must bound the polynomial, for
 *    every constant remainder coefficient in the ball co[J], plus the slack, at every point
 *    of a dense grid evaluated exactly with arb (dyadic coefficients and points at a high
 *    precision); a claimed monotone direction must hold on the grid; and the bound may not
 *    exceed the absolute-value bound c0 + sum |c_j| w^j + slack.
 *  - _embz_an_model_bound on contexts of the engine: upper bound plus the Euler-Maclaurin
 *    slack at least h at every integer of the interval, from the explicit reference sums of
 *    an_common.h, and a claimed monotone direction respected by those values. */
#include "an_common.h"

/* the model at sigma with the remainder coefficient cJ (exact arithmetic: dyadic inputs) */
static void model_at(arb_t v, arb_srcptr co, slong J, const arb_t cJ, const arb_t sigma)
{
    const slong hp = 8192;
    arb_set(v, cJ);
    for (slong j = J - 1; j >= 0; j--) {
        arb_mul(v, v, sigma, hp);
        arb_add(v, v, co + j, hp);
    }
}

static void random_dyadic(arb_t x, flint_rand_t rs, slong bits, slong shift)
{
    fmpz_t m;
    fmpz_init(m);
    fmpz_randtest(m, rs, bits);
    arb_set_fmpz(x, m);
    arb_mul_2exp_si(x, x, -shift);
    fmpz_clear(m);
}

START_TEST(test_taylor_bound_random)
{
    flint_rand_t rs;
    flint_randinit(rs);
    long monos = 0, cases = 0;
    for (int p = 0; p < 2; p++) {
        slong prec = tf_precs[p];
        for (int rep = 0; rep < 400; rep++) {
            slong J = 2 + (slong) n_randint(rs, 18);
            arb_ptr co = _arb_vec_init(J + 1), ends = _arb_vec_init(2);
            arb_t w, cJ, sg, v, prev, t;
            arb_init(w); arb_init(cJ); arb_init(sg); arb_init(v); arb_init(prev);
            arb_init(t);
            /* w in (0, 4], dyadic */
            arb_set_ui(w, 1 + n_randint(rs, 1 << 20));
            arb_mul_2exp_si(w, w, -18);
            for (slong j = 0; j <= J; j++)
                random_dyadic(co + j, rs, 24, 20 + (slong) n_randint(rs, 3 * (ulong) j + 1));
            /* often a dominant slope, so that monotone models occur */
            if (n_randint(rs, 2)) arb_mul_2exp_si(co + 1, co + 1, 12);
            /* the remainder coefficient as a ball */
            mag_set_ui_2exp_si(arb_radref(co + J), n_randint(rs, 1000) + 1, -30);
            mag_t slack;
            mag_init(slack);
            int use_slack = n_randint(rs, 2);
            if (use_slack) mag_set_ui_2exp_si(slack, n_randint(rs, 1000) + 1, -25);
            int use_ends = n_randint(rs, 2);
            /* the interval: [-w, w] or a sub-interval given by its ends */
            arb_neg(ends, w);
            arb_set(ends + 1, w);
            if (use_ends && n_randint(rs, 2)) arb_mul_2exp_si(ends, ends, -1);
            arb_t ds;
            arb_init(ds);
            random_dyadic(ds, rs, 10, 20);
            int use_ds = n_randint(rs, 3) == 0;
            arf_t U;
            arf_init(U);
            int mono = 7;
            int st = _embz_an_taylor_bound(U, &mono, co, J, w, use_slack ? slack : NULL,
                                           use_ds ? ds : NULL, use_ends ? ends : NULL, prec);
            ck_assert_int_eq(st, EMBZ_OK);
            ck_assert(mono == 0 || mono == 1 || mono == -1);
            cases++;
            if (mono != 0) monos++;
            /* not above the absolute-value bound (computed here, rounded up) */
            {
                /* c0 + sum_j |c_j| w^j + slack, with c0 signed */
                arb_t cb;
                arb_init(cb);
                arb_set(cb, co);
                arb_one(t);
                for (slong j = 1; j <= J; j++) {
                    arb_mul(t, t, w, 8192);
                    arb_abs(v, co + j);
                    arb_addmul(cb, v, t, 8192);
                }
                if (use_slack) {
                    arb_set_ui(v, 0);
                    arf_set_mag(arb_midref(v), slack);
                    arb_add(cb, cb, v, 8192);
                }
                /* the engine rounds at prec bits, and radii (slack, the remainder
                 * coefficient's) at the 30 bits of a mag: allow 2^-(prec-10) of the sum of
                 * the absolute values of the terms and 2^-26 of the radii */
                arb_abs(v, co);
                arb_mul_2exp_si(v, v, 1);
                arb_add(v, v, cb, 8192);
                arb_mul_2exp_si(v, v, -(prec - 10));
                arb_add(cb, cb, v, 8192);
                arb_zero(v);
                arf_set_mag(arb_midref(v), arb_radref(co + J));
                arb_pow_ui(t, w, (ulong) J, 8192);
                arb_mul(v, v, t, 8192);
                if (use_slack) {
                    arb_zero(t);
                    arf_set_mag(arb_midref(t), slack);
                    arb_add(v, v, t, 8192);
                }
                arb_mul_2exp_si(v, v, -26);
                arb_add(cb, cb, v, 8192);
                arf_t cu;
                arf_init(cu);
                arb_get_ubound_arf(cu, cb, 8192);
                ck_assert_msg(arf_cmp(U, cu) <= 0, "bound above the absolute-value bound");
                arf_clear(cu);
                arb_clear(cb);
            }
            /* the grid: 65 exact points across [ends[0], ends[1]], three constant remainder
             * coefficients (both ends of the ball and its middle) */
            for (int e = -1; e <= 1; e++) {
                arb_set_arf(cJ, arb_midref(co + J));
                if (e != 0) {
                    arf_t r;
                    arf_init(r);
                    arf_set_mag(r, arb_radref(co + J));
                    if (e > 0)
                        arf_add(arb_midref(cJ), arb_midref(cJ), r, ARF_PREC_EXACT, ARF_RND_DOWN);
                    else
                        arf_sub(arb_midref(cJ), arb_midref(cJ), r, ARF_PREC_EXACT, ARF_RND_DOWN);
                    arf_clear(r);
                }
                for (slong i = 0; i <= 64; i++) {
                    arb_sub(sg, ends + 1, ends, 8192);
                    arb_mul_si(sg, sg, i, 8192);
                    arb_mul_2exp_si(sg, sg, -6);
                    arb_add(sg, sg, ends, 8192);
                    model_at(v, co, J, cJ, sg);
                    arb_set(t, v);
                    if (use_slack) {
                        arb_t sl;
                        arb_init(sl);
                        arf_set_mag(arb_midref(sl), slack);
                        arb_add(t, t, sl, 8192);
                        arb_clear(sl);
                    }
                    /* U >= model + slack: U below the certain lower end is an error */
                    arf_t lo;
                    arf_init(lo);
                    arb_get_lbound_arf(lo, t, 8192);
                    ck_assert_msg(arf_cmp(U, lo) >= 0, "J=%ld: bound below the model at grid "
                                  "point %ld", (long) J, (long) i);
                    arf_clear(lo);
                    if (i > 0 && mono != 0) {
                        /* a certain step against the claimed direction is an error */
                        arb_sub(t, v, prev, 8192);
                        if (mono > 0) ck_assert_msg(!arb_is_negative(t), "not increasing");
                        else ck_assert_msg(!arb_is_positive(t), "not decreasing");
                    }
                    arb_set(prev, v);
                }
            }
            arf_clear(U);
            mag_clear(slack);
            arb_clear(ds);
            _arb_vec_clear(co, J + 1); _arb_vec_clear(ends, 2);
            arb_clear(w); arb_clear(cJ); arb_clear(sg); arb_clear(v); arb_clear(prev);
            arb_clear(t);
        }
    }
    /* both kinds of models occurred */
    ck_assert(monos > 20 && monos < cases - 20);
    flint_randclear(rs);
}
END_TEST

/* a model of a function that is not finite gives EMBZ_ERR_PREC */
START_TEST(test_taylor_bound_infinite)
{
    for (int p = 0; p < 2; p++) {
        arb_ptr co = _arb_vec_init(4);
        arb_t w;
        arb_init(w);
        arb_one(w);
        arb_one(co + 1);
        arb_indeterminate(co + 2);
        arf_t U;
        arf_init(U);
        int mono;
        ck_assert_int_eq(_embz_an_taylor_bound(U, &mono, co, 3, w, NULL, NULL, NULL,
                                               tf_precs[p]), EMBZ_ERR_PREC);
        arf_clear(U);
        arb_clear(w);
        _arb_vec_clear(co, 4);
    }
}
END_TEST

/* model_bound on intervals of one residue, with its Euler-Maclaurin slack rslack, against h
 * from the reference at the integers of the interval */
static void check_model_bound(int fam, slong n, ulong d, slong prec, flint_rand_t rs,
                              long *ok, long *mono_seen)
{
    tf_ctx X;
    tf_ctx_init(&X, fam, n, d, prec);
    actx *c = &X.c;
    tf_ref R;
    tf_ref_init(&R, fam, n, c->prec + 64);
    slong kmax = FLINT_MIN(fmpz_get_si(c->L) + c->a + c->nins, n - 1);
    fmpz_t lo, hi, m;
    arb_t h, hend;
    arf_t U, sl;
    fmpz_init(lo); fmpz_init(hi); fmpz_init(m);
    arb_init(h); arb_init(hend);
    arf_init(U); arf_init(sl);
    arf_set_mag(sl, c->rslack);
    for (int rep = 0; rep < 60; rep++) {
        ulong r = n_randint(rs, d);
        slong slo = (c->E - (slong) r) / (slong) d + 1, shi = (kmax - (slong) r) / (slong) d;
        /* a stretch of ratio at most 2 (as the branch and bound hands to the models) */
        slong a = tf_rand_in(rs, slo, shi - BB_SMALL);
        slong b = a + BB_SMALL + (slong) n_randint(rs, (ulong) a + 1);
        b = FLINT_MIN(b, shi);
        fmpz_set_si(lo, a);
        fmpz_set_si(hi, b);
        if (c->nins > 0 && _embz_an_special_in(m, c, r, lo, hi)) {
            /* up to the first size where an insertion changes the layout */
            if (fmpz_cmp_si(m, a + BB_SMALL) < 0) continue;
            fmpz_sub_ui(hi, m, 1);
            b = fmpz_get_si(hi);
        }
        _embz_an_set_offsets(c, r, lo);
        int mono;
        if (_embz_an_model_bound(U, &mono, c, r, lo, hi, c->prec) != EMBZ_OK) continue;
        (*ok)++;
        if (mono != 0) (*mono_seen)++;
        arf_add(U, U, sl, c->prec, ARF_RND_UP);
        tf_ref_h(hend, &R, (slong) d * (mono > 0 ? b : a) + (slong) r, d);
        arb_add_error_arf(hend, sl);
        arb_add_error_arf(hend, sl);
        slong cnt = b - a + 1;
        for (slong t = 0; t < FLINT_MIN(cnt, 150); t++) {
            slong s = cnt <= 150 ? a + t : tf_rand_in(rs, a, b);
            tf_ref_h(h, &R, (slong) d * s + (slong) r, d);
            arf_t hl;
            arf_init(hl);
            arb_get_lbound_arf(hl, h, c->prec);
            ck_assert_msg(arf_cmp(hl, U) <= 0, "%s d=%lu r=%lu [%ld, %ld]: h(%ld) above the "
                          "bound", tf_expr[fam], d, r, a, b, s);
            arf_clear(hl);
            if (mono != 0)
                ck_assert_msg(!arb_gt(h, hend), "%s: monotone model, but h(%ld) above the end",
                              tf_expr[fam], s);
        }
    }
    tf_ref_clear(&R);
    fmpz_clear(lo); fmpz_clear(hi); fmpz_clear(m);
    arb_clear(h); arb_clear(hend);
    arf_clear(U); arf_clear(sl);
    tf_ctx_clear(&X);
}

START_TEST(test_model_bound)
{
    flint_rand_t rs;
    flint_randinit(rs);
    long ok = 0, mono = 0;
    const int fams[] = { TF_INVERSE, TF_BUMP, TF_LOG, TF_POWER };
    const slong ns[] = { 20000, 20000, 5000, 8000 };
    for (int p = 0; p < 2; p++)
        for (int i = 0; i < 4; i++)
            for (ulong d = 2; d <= 3; d++)
                check_model_bound(fams[i], ns[i], d, tf_precs[p], rs, &ok, &mono);
    /* the models succeeded on most intervals, and some were monotone */
    ck_assert_msg(ok > 400 && mono > 20, "%ld models, %ld monotone", ok, mono);
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("error-taylor");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_taylor_bound_random);
    tcase_add_test(tc, test_taylor_bound_infinite);
    tcase_add_test(tc, test_model_bound);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
