/* Models in v = ln y (analytic_vmodel.c).
 *  - _embz_an_compose_exp: P(A (e^tau - 1)) against arb's general series composition
 *    (_arb_poly_compose_series with the series of A (e^tau - 1)).
 *  - _embz_an_model_bound_v on non-increasing families at sizes where s passes 2^10 by far,
 *    on stretches narrow and wide (both the full and the wide model): upper bound plus the
 *    Euler-Maclaurin slack at least h at the integers of the stretch (h from the explicit
 *    reference sums of an_common.h), and a claimed monotone direction respected there. */
#include <math.h>
#include "an_common.h"

START_TEST(test_compose_exp)
{
    flint_rand_t rs;
    flint_randinit(rs);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = tf_precs[pi];
        for (int rep = 0; rep < 300; rep++) {
            slong len = 1 + (slong) n_randint(rs, 20);
            arb_ptr p = _arb_vec_init(len), q = _arb_vec_init(len), res = _arb_vec_init(len);
            arb_ptr ser = _arb_vec_init(len), ref = _arb_vec_init(len);
            arb_t A, u;
            arb_init(A); arb_init(u);
            for (slong l = 0; l < len; l++) arb_randtest_exact(p + l, rs, prec, 3);
            arb_randtest_exact(A, rs, prec, 3);
            _arb_vec_set(q, p, len);
            _embz_an_compose_exp(res, q, len, A, prec);
            /* the series A (e^tau - 1) = A (tau + tau^2/2! + ...), then P of it */
            arb_set(u, A);
            for (slong m = 1; m < len; m++) {
                arb_div_ui(u, u, (ulong) m, 2 * prec);      /* A / m! */
                arb_set(ser + m, u);
            }
            _arb_poly_compose_series(ref, p, len, ser, len, len, 2 * prec);
            for (slong m = 0; m < len; m++) {
                ck_assert_msg(arb_overlaps(res + m, ref + m), "len %ld: coefficient %ld",
                              (long) len, (long) m);
                ck_assert(arb_is_finite(res + m));
                /* radius at most 2^-(prec-20) of the size of the terms: coefficient m of
                 * (e^tau - 1)^l is at most l^m / m! (it is below the one of e^(l tau)), so
                 * B = sum_l |p_l| |A|^l l^m / m! bounds them */
                arb_t t, B;
                arb_init(t); arb_init(B);
                for (slong l = 0; l <= m; l++) {
                    arb_abs(t, A);
                    arb_pow_ui(t, t, (ulong) l, 2 * prec);
                    arb_mul(t, t, p + l, 2 * prec);
                    arb_abs(t, t);
                    arb_ui_pow_ui(u, (ulong) l, (ulong) m, 2 * prec);
                    arb_mul(t, t, u, 2 * prec);
                    arb_add(B, B, t, 2 * prec);
                }
                arb_fac_ui(t, (ulong) m, 2 * prec);
                arb_div(B, B, t, 2 * prec);
                arb_mul_2exp_si(B, B, -(prec - 20));
                ck_assert_msg(arf_cmpabs_mag(arb_midref(B), arb_radref(res + m)) >= 0,
                              "coefficient %ld too wide", (long) m);
                arb_clear(t); arb_clear(B);
            }
            _arb_vec_clear(p, len); _arb_vec_clear(q, len); _arb_vec_clear(res, len);
            _arb_vec_clear(ser, len); _arb_vec_clear(ref, len);
            arb_clear(A); arb_clear(u);
        }
    }
    flint_randclear(rs);
}
END_TEST

static void check_vmodel(int fam, slong n, ulong d, slong prec, flint_rand_t rs, long *ok,
                         long *mono_seen, long *wide)
{
    tf_ctx X;
    tf_ctx_init(&X, fam, n, d, prec);
    actx *c = &X.c;
    ck_assert_int_eq(c->t->dir, 1);
    tf_ref R;
    tf_ref_init(&R, fam, n, c->prec + 64);
    slong kmax = FLINT_MIN(fmpz_get_si(c->L) + c->a + c->nins, n - 1);
    fmpz_t lo, hi;
    arb_t h, hend;
    arf_t U, sl;
    mag_t slack;
    fmpz_init(lo); fmpz_init(hi);
    arb_init(h); arb_init(hend);
    arf_init(U); arf_init(sl);
    mag_init(slack);
    for (int rep = 0; rep < 40; rep++) {
        ulong r = n_randint(rs, d);
        slong shi = (kmax - (slong) r) / (slong) d, base = (1 << VMODEL_FROM_BITS) + 1;
        /* lo from 2^10 on, hi up to a factor e^(10) above it (log-uniform) */
        slong a = (slong) (base * exp(n_randint(rs, 1000) / 1000.0 * log((double) shi / base)));
        if (rep % 3 == 0) a = base;
        double f = exp(n_randint(rs, 1000) / 1000.0 * 10.0);
        slong b = (slong) FLINT_MIN((double) shi, a * f);
        a = FLINT_MAX(a, base);
        if (b < a + BB_SMALL) continue;
        fmpz_set_si(lo, a);
        fmpz_set_si(hi, b);
        ck_assert(_embz_an_use_vmodel(c, lo));
        _embz_an_set_offsets(c, r, lo);
        int mono;
        if (_embz_an_model_bound_v(U, &mono, slack, c, r, lo, hi, c->prec) != EMBZ_OK) continue;
        (*ok)++;
        if (mono != 0) (*mono_seen)++;
        /* the wide model: half-width in v above 2^VMODEL_FULL_EXP (2^-1 without the split) */
        if (log((double) b / a) > 2.0 * ldexp(1.0, c->t->usplit ? VMODEL_FULL_EXP : -1))
            (*wide)++;
        /* what the branch and bound takes from the model: U + rslack bounds h; a monotone
         * model leaves h at most h(end) + 2 (slack + rslack) */
        arf_set_mag(sl, c->rslack);
        arf_add(U, U, sl, c->prec, ARF_RND_UP);
        mag_add(slack, slack, c->rslack);
        tf_ref_h(hend, &R, (slong) d * (mono > 0 ? b : a) + (slong) r, d);
        arb_add_error_mag(hend, slack);
        arb_add_error_mag(hend, slack);
        for (slong t = 0; t < 150; t++) {
            slong s = t == 0 ? a : t == 1 ? b : tf_rand_in(rs, a, b);
            tf_ref_h(h, &R, (slong) d * s + (slong) r, d);
            arf_t hl;
            arf_init(hl);
            arb_get_lbound_arf(hl, h, c->prec);
            ck_assert_msg(arf_cmp(hl, U) <= 0, "%s d=%lu r=%lu [%ld, %ld]: h(%ld) above the "
                          "bound", tf_expr[fam], d, r, a, b, s);
            arf_clear(hl);
            if (mono != 0)
                ck_assert_msg(!arb_gt(h, hend), "%s [%ld, %ld]: monotone model, but h(%ld) above "
                              "the end", tf_expr[fam], a, b, s);
        }
    }
    tf_ref_clear(&R);
    fmpz_clear(lo); fmpz_clear(hi);
    arb_clear(h); arb_clear(hend);
    arf_clear(U); arf_clear(sl);
    mag_clear(slack);
    tf_ctx_clear(&X);
}

START_TEST(test_model_bound_v)
{
    flint_rand_t rs;
    flint_randinit(rs);
    long ok = 0, mono = 0, wide = 0;
    const int fams[] = { TF_INVERSE, TF_POWER, TF_NEARMISS };
    for (int p = 0; p < 2; p++)
        for (int i = 0; i < 3; i++)
            for (ulong d = 2; d <= 3; d++)
                check_vmodel(fams[i], 150000, d, tf_precs[p], rs, &ok, &mono, &wide);
    ck_assert_msg(ok > 200 && mono > 10 && wide > 10, "%ld models, %ld monotone, %ld wide", ok,
                  mono, wide);
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("error-vmodel");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_compose_exp);
    tcase_add_test(tc, test_model_bound_v);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
