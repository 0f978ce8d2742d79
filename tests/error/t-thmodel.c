/* Smooth models of the threshold form over wide intervals (analytic_thmodel.c).
 * Reference: the family 1/i, whose W Phi(T) = H_N - N T with N = #{i <= n : 1/i > T}
 * = min(n, ceil(1/T) - 1) counted exactly from a rational T, and H_N = psi(N + 1) + gamma
 * from arb's digamma function (no sum, no engine code), so that sizes up to 10^6 cost nothing.
 *  - _embz_an_tail_root: the log-position of the threshold T among the tail weights, for
 *    1/x exactly -ln T and for x^(-1/2) exactly -2 ln T (arb's log), must lie in the ball;
 *  - _embz_an_threshold_model: on intervals [A, B] up to a factor 2^24 wide, where it gives a
 *    bound, the bound must be at least W F at points spread over the interval. */
#include <math.h>
#include "an_common.h"

/* W Phi(T) for 1/i, i <= n, T rational */
static void phi_ref(arb_t res, slong n, const fmpq_t T, slong prec)
{
    fmpz_t c;
    arb_t t;
    fmpz_init(c);
    arb_init(t);
    fmpz_cdiv_q(c, fmpq_denref(T), fmpq_numref(T));
    fmpz_sub_ui(c, c, 1);
    if (fmpz_cmp_si(c, n) > 0) fmpz_set_si(c, n);
    if (fmpz_sgn(c) < 0) fmpz_zero(c);
    arb_set_fmpz(res, c);
    arb_add_ui(res, res, 1, prec);
    arb_digamma(res, res, prec);
    arb_const_euler(t, prec);
    arb_add(res, res, t, prec);             /* H_N */
    arb_set_fmpq(t, T, prec);
    arb_mul_fmpz(t, t, c, prec);
    arb_sub(res, res, t, prec);
    fmpz_clear(c);
    arb_clear(t);
}

static void f_ref(arb_t res, slong n, const th_target *q, const fmpq_t V, slong prec)
{
    fmpq_t x;
    arb_t u;
    fmpq_init(x);
    arb_init(u);
    phi_ref(res, n, V, prec);
    for (slong j = 0; j < q->len; j++) {
        fmpq_div(x, V, q->v + j);
        phi_ref(u, n, x, prec);
        arb_t qj;
        arb_init(qj);
        arb_set_fmpq(qj, q->v + j, prec);
        arb_mul_ui(qj, qj, q->mult[j], prec);
        arb_submul(res, u, qj, prec);
        arb_clear(qj);
    }
    fmpq_clear(x);
    arb_clear(u);
}

START_TEST(test_tail_root)
{
    flint_rand_t rs;
    flint_randinit(rs);
    for (int p = 0; p < 2; p++) {
        slong prec = tf_precs[p];
        for (int fi = 0; fi < 2; fi++) {
            int fam = fi == 0 ? TF_INVERSE : TF_POWER;
            slong n = 1000000;
            tf_ctx X;
            tf_ctx_init(&X, fam, n, 1, prec);
            actx *c = &X.c;
            arb_t lnT, slo, shi, s0, ex;
            arb_init(lnT); arb_init(slo); arb_init(shi); arb_init(s0); arb_init(ex);
            arb_log_ui(slo, (ulong) c->M + 1, c->prec);
            arb_log_ui(shi, (ulong) n, c->prec);
            long ok = 0;
            for (int rep = 0; rep < 200; rep++) {
                /* x in (M + 1, n), log-uniform; T = f(x) */
                double u = log(c->M + 2.0) + n_randint(rs, 1000000) / 1e6
                           * (log((double) n - 1) - log(c->M + 2.0));
                arb_set_d(ex, u);
                arb_set_arf(ex, arb_midref(ex));
                if (fam == TF_INVERSE) arb_neg(lnT, ex);
                else { arb_neg(lnT, ex); arb_mul_2exp_si(lnT, lnT, -1); }
                int st = _embz_an_tail_root(s0, c, lnT, slo, shi, c->prec);
                if (st != EMBZ_OK) continue;
                ok++;
                /* the exact root: 1/x = T -> ln x = -ln T; x^(-1/2) = T -> ln x = -2 ln T */
                arb_neg(ex, lnT);
                if (fam == TF_POWER) arb_mul_2exp_si(ex, ex, 1);
                ck_assert_msg(arb_contains(s0, ex), "root not in the ball");
                tf_assert_narrow(s0, 8 - prec / 2, "root");
            }
            ck_assert(ok > 150);
            arb_clear(lnT); arb_clear(slo); arb_clear(shi); arb_clear(s0); arb_clear(ex);
            tf_ctx_clear(&X);
        }
    }
    flint_randclear(rs);
}
END_TEST

START_TEST(test_threshold_model)
{
    flint_rand_t rs;
    flint_randinit(rs);
    long models = 0, tight = 0, inside_models = 0;
    for (int p = 0; p < 2; p++) {
        slong prec = tf_precs[p], n = 1000000;
        tf_ctx X;
        tf_ctx_init(&X, TF_INVERSE, n, 1, prec);
        actx *c = &X.c;
        embz_target_t tq;
        embz_target_init(tq);
        fmpq_t V1, V2, t, w;
        arb_t A, B, F;
        arf_t U, lo;
        fmpq_init(V1); fmpq_init(V2); fmpq_init(t); fmpq_init(w);
        arb_init(A); arb_init(B); arb_init(F);
        arf_init(U); arf_init(lo);
        for (int rep = 0; rep < 120; rep++) {
            /* targets: ebit, uniform:3, or (1/2, 1/3, 1/6) */
            const char *spec = rep % 3 == 0 ? "ebit" : rep % 3 == 1 ? "uniform:3"
                                                                      : "1/2,1/3,1/6";
            embz_target_clear(tq);
            embz_target_init(tq);
            tu_target_set(tq, spec);
            th_target q;
            _embz_an_th_target_init(&q, tq);
            /* A about 2^-e1 in the tail's range of thresholds, B = A 2^e2, e2 <= 24; every
             * other interval with all its thresholds V / q_j among the tail weights (B below
             * 2^-9 < 1/(6 * 65)), where the smooth models are meant to be tight */
            slong e1 = 7 + (slong) n_randint(rs, 12), e2 = 1 + (slong) n_randint(rs, 24);
            int inside = rep % 2;
            if (inside) {
                e1 = 10 + (slong) n_randint(rs, 10);
                e2 = 1 + (slong) n_randint(rs, (ulong) (e1 - 9));
            }
            fmpq_set_si(V1, 1, 1);
            fmpq_div_2exp(V1, V1, (ulong) e1);
            fmpq_mul_2exp(V2, V1, (ulong) e2);
            if (fmpq_cmp_si(V2, 1) > 0) fmpq_set_si(V2, 1, 1);
            /* a little off the powers of two */
            fmpq_set_si(w, 1000 + (slong) n_randint(rs, 1000), 1024);
            fmpq_mul(V1, V1, w);
            arb_set_fmpq(A, V1, c->prec);
            arb_set_fmpq(B, V2, c->prec);
            th_end ea, eb;
            _embz_an_th_end_init(&ea, &q); _embz_an_th_end_init(&eb, &q);
            if (_embz_an_th_end_eval(&ea, c, &q, A, c->prec) == EMBZ_OK
                && _embz_an_th_end_eval(&eb, c, &q, B, c->prec) == EMBZ_OK
                && _embz_an_threshold_model(U, c, &q, A, B, &ea, &eb, c->prec) == EMBZ_OK) {
                models++;
                arf_t fmax;
                arf_init(fmax);
                arf_neg_inf(fmax);
                for (int k = 0; k <= 400; k++) {
                    /* t = V1 (V2/V1)^(k/400), rounded to a rational inside [V1, V2] */
                    double r = pow(fmpq_get_d(V2) / fmpq_get_d(V1), k / 400.0);
                    fmpq_set_si(t, (slong) (r * 1048576.0), 1048576);
                    fmpq_mul(t, t, V1);
                    if (fmpq_cmp(t, V1) < 0) fmpq_set(t, V1);
                    if (fmpq_cmp(t, V2) > 0 || k == 400) fmpq_set(t, V2);
                    f_ref(F, n, &q, t, c->prec + 64);
                    arb_get_lbound_arf(lo, F, c->prec + 64);
                    ck_assert_msg(arf_cmp(lo, U) <= 0, "%s [2^-%ld, 2^%ld A]: model bound below "
                                  "W F", spec, e1, e2);
                    if (arf_cmp(lo, fmax) > 0) arf_set(fmax, lo);
                }
                /* tight inside the tail: within 2 10^-4 of the largest sampled value (the
                 * samples miss the maximum by at most the slope in u = ln V, below V <= 2^-9
                 * there, times their spacing, below 0.042) */
                arf_sub(fmax, U, fmax, 64, ARF_RND_UP);
                if (inside && arf_cmp_d(fmax, 2e-4) <= 0) tight++;
                if (inside) inside_models++;
                arf_clear(fmax);
            }
            _embz_an_th_end_clear(&ea); _embz_an_th_end_clear(&eb);
            _embz_an_th_target_clear(&q);
        }
        embz_target_clear(tq);
        fmpq_clear(V1); fmpq_clear(V2); fmpq_clear(t); fmpq_clear(w);
        arb_clear(A); arb_clear(B); arb_clear(F);
        arf_clear(U); arf_clear(lo);
        tf_ctx_clear(&X);
    }
    ck_assert_msg(models > 200 && tight > 100, "%ld models, %ld tight", models, tight);
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("error-thmodel");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_tail_root);
    tcase_add_test(tc, test_threshold_model);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
