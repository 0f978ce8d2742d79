/* The certified pass of explicit summation (src/error/explicit_certify.c): _embz_x_certify
 * and _embz_x_quotient_interval, and the certified result of embz_error_explicit, at 64 and
 * 256 bits.
 *
 * Reference: E_n(q) = K(p -> p (x) q) computed exactly with FLINT rationals. The weights are
 * evaluated here in fmpq (not by the library's evaluators), normalised, tensored with the
 * target, and K is taken by embz_qvec_distance (exact threshold form, src/measure); the value
 * at a given Ky Fan index by embz_qvec_kyfan. Random small families (1/i, 1/i^2, i,
 * 1/(i + c), and the non-monotone 1/((i - c)^2 + 1) and 2 + (-1)^i) and random targets
 * (uniform:d, or vectors of small integers normalised), n up to 300, from flint_rand_t.
 *
 * The pass works in integers in units of 2^-F: each of its sums (total weight, the maximum
 * of Q (P_k - R_k), the largest weight, the block sums of one ebit) must enclose the exact
 * rational value times 2^F, compared exactly in fmpq; the final ball must contain E_n. Each
 * case runs in the true order of the weights (streamed forward or reversed), stored and
 * sorted, and streamed in a wrong order (the pass must notice and fall back to storing). */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include "embz.h"
#include "error/impl.h"
#include "../testutil.h"

static const slong precs[2] = { 64, 256 };

#include "xcases.h"

/* ------------------------------------------------------------ fixed-point checks */

static void i128_get_fmpz(fmpz_t z, embz_x_i128 v)
{
    unsigned __int128 u = (unsigned __int128) v;
    fmpz_set_signed_uiui(z, (ulong) (u >> 64), (ulong) u);
}

/* lo <= x 2^F <= hi, exactly */
static int fix_encloses(embz_x_i128 lo, embz_x_i128 hi, const fmpq_t x, slong F)
{
    fmpq_t y;
    fmpz_t z;
    fmpq_init(y); fmpz_init(z);
    if (F >= 0) fmpq_mul_2exp(y, x, (ulong) F);
    else fmpq_div_2exp(y, x, (ulong) -F);
    i128_get_fmpz(z, lo);
    int ok = fmpq_cmp_fmpz(y, z) >= 0;
    i128_get_fmpz(z, hi);
    ok = ok && fmpq_cmp_fmpz(y, z) <= 0;
    fmpq_clear(y); fmpz_clear(z);
    return ok;
}

static int ball_contains(const arb_t b, const fmpq_t x)
{
    arb_t t;
    arb_init(t);
    arb_set_fmpq(t, x, 4 * arb_bits(b) + 256);
    int ok = arb_contains(b, t);
    arb_clear(t);
    return ok;
}

/* binary exponent of (an upper estimate of) the exact total, as the driver would pass it */
static int total_exponent(const tcase_t *t)
{
    int ew;
    frexp(fmpq_get_d(t->W) * (1.0 + 1e-6), &ew);
    return ew;
}

/* One certified pass in order `mode`; checks every sum against the exact values and returns
 * the order the pass used. */
static int certify_and_check(const tcase_t *t, const embz_x_tdata_t *T, int mode, slong prec)
{
    embz_x_xres_t X;
    embz_err_t err;
    slong F = 0;
    int used = mode;
    embz_err_clear(&err);
    memset(&X, 0, sizeof(X));
    int st = _embz_x_certify(&X, &F, &used, t->f, t->n, T, total_exponent(t), prec, &err);
    ck_assert_msg(st == EMBZ_OK, "%s, n = %ld, %s, order %d, %ld bits: %s", t->spec,
                  (long) t->n, t->tspec, mode, (long) prec, err.text);
    fmpq_t G, B, p1;
    fmpq_init(G); fmpq_init(B); fmpq_init(p1);
    /* exact: max_k Q (P_k - R_k) = Q K W */
    fmpq_mul(G, t->K, t->W);
    fmpq_mul_si(G, G, T->Q);
    exact_blocks(B, p1, t);
    ck_assert_msg(fix_encloses(X.WL, X.WU, t->W, F), "%s: total", t->spec);
    ck_assert_msg(fix_encloses(X.GL, X.GU, G, F), "%s, n = %ld, %s: maximum", t->spec,
                  (long) t->n, t->tspec);
    ck_assert_msg(fix_encloses(X.p1L, X.p1U, p1, F), "%s: largest weight", t->spec);
    if (t->d == 2)
        ck_assert_msg(fix_encloses(X.BL, X.BU, B, F), "%s, n = %ld: blocks", t->spec,
                      (long) t->n);
    arb_t E;
    arb_init(E);
    _embz_x_quotient_interval(E, X.GL, X.WU, X.GU, X.WL, T->Q, prec);
    ck_assert_msg(ball_contains(E, t->K), "%s, n = %ld, %s, order %d, %ld bits: the enclosure "
                  "misses the exact value", t->spec, (long) t->n, t->tspec, mode, (long) prec);
    /* the fixed-point sums carry about 124 - log2(Q W) - log2(n) bits, the balls prec */
    ck_assert_msg(arb_rel_accuracy_bits(E) >= (prec < 100 ? 40 : 80), "%s, n = %ld: %ld bits",
                  t->spec, (long) t->n, (long) arb_rel_accuracy_bits(E));
    arb_clear(E);
    fmpq_clear(G); fmpq_clear(B); fmpq_clear(p1);
    return used;
}

/* ------------------------------------------------------------ tests */

START_TEST(test_orders)
{
    /* streamed in the true order, stored, streamed in a wrong order */
    flint_rand_t state;
    flint_randinit(state);
    int fallbacks = 0, streamed = 0;
    for (int pi = 0; pi < 2; pi++) {
        for (int iter = 0; iter < 150; iter++) {
            tcase_t t;
            tcase_init(&t, state);
            embz_x_tdata_t T;
            embz_err_t err;
            embz_err_clear(&err);
            ck_assert_int_eq(_embz_x_tdata_init(&T, t.q, &err), EMBZ_OK);
            slong prec = precs[pi];
            if (t.order != 0) {
                ck_assert_int_eq(certify_and_check(&t, &T, t.order, prec), t.order);
                streamed++;
                /* a wrong order is seen as soon as two weights differ (n >= 2) */
                int used = certify_and_check(&t, &T, -t.order, prec);
                ck_assert_int_eq(used, t.n >= 2 ? 0 : -t.order);
                fallbacks += used == 0;
            } else {
                ck_assert_int_eq(certify_and_check(&t, &T, 1, prec), 0);
                ck_assert_int_eq(certify_and_check(&t, &T, -1, prec), 0);
                fallbacks += 2;
            }
            ck_assert_int_eq(certify_and_check(&t, &T, 0, prec), 0);
            _embz_x_tdata_clear(&T);
            tcase_clear(&t);
        }
    }
    ck_assert(streamed > 0 && fallbacks > 0);
    flint_randclear(state);
}
END_TEST

START_TEST(test_head_room)
{
    /* a total estimated too small: F is lowered by 8 bits per retry (at most three retries).
     * 12 bits too small: attempts 0 and 1 overflow, attempt 2 fits; 40 bits: none fits. */
    flint_rand_t state;
    flint_randinit(state);
    for (int iter = 0; iter < 40; iter++) {
        tcase_t t;
        tcase_init(&t, state);
        embz_x_tdata_t T;
        embz_x_xres_t X;
        embz_err_t err;
        slong F = 0;
        int mode = 0, eq;
        embz_err_clear(&err);
        ck_assert_int_eq(_embz_x_tdata_init(&T, t.q, &err), EMBZ_OK);
        frexp((double) T.Q, &eq);
        int ew = total_exponent(&t) - 12;
        ck_assert_int_eq(_embz_x_certify(&X, &F, &mode, t.f, t.n, &T, ew, 128, &err), EMBZ_OK);
        ck_assert_int_eq(F, EMBZ_FIX_BITS - eq - ew - 16);
        ck_assert(fix_encloses(X.WL, X.WU, t.W, F));
        mode = t.order;
        ck_assert_int_eq(_embz_x_certify(&X, &F, &mode, t.f, t.n, &T, ew - 28, 128, &err),
                         EMBZ_ERR_PREC);
        ck_assert(strstr(err.text, "fixed-point range") != NULL);
        _embz_x_tdata_clear(&T);
        tcase_clear(&t);
    }
    flint_randclear(state);
}
END_TEST

START_TEST(test_explicit)
{
    /* the whole computation: enclosure, order, estimate, argmax and, for one ebit, the
     * block-mass bounds max(p1/2, B) <= E <= max(p1/2, 2 B) with B = max_{2m <= n}
     * (P_2m - P_m) over W. [derived: the lower bound is the value at k = 1 and k = 2m; at odd
     * k = 2s + 1 >= 3 the value is at most B_s + w_(2s+1) <= 2 B_s, as w_(2s+1) <= w_(s+1)
     * <= B_s] */
    flint_rand_t state;
    flint_randinit(state);
    fmpq_t B, p1, lo, hi;
    fmpq_init(B); fmpq_init(p1); fmpq_init(lo); fmpq_init(hi);
    for (int pi = 0; pi < 2; pi++) {
        for (int iter = 0; iter < 150; iter++) {
            tcase_t t;
            tcase_init(&t, state);
            embz_error_result_t res;
            embz_err_t err;
            fmpz_t nz;
            fmpz_init_set_si(nz, t.n);
            embz_err_clear(&err);
            embz_error_result_init(res);
            ck_assert_msg(embz_error_explicit(res, t.f, nz, t.q, precs[pi], &err) == EMBZ_OK,
                          "%s: %s", t.spec, err.text);
            ck_assert_msg(ball_contains(res->error, t.K), "%s, n = %ld, %s, %ld bits: the "
                          "enclosure misses the exact value", t.spec, (long) t.n, t.tspec,
                          (long) precs[pi]);
            ck_assert_int_eq(res->order, t.order);
            double K = fmpq_get_d(t.K);
            ck_assert(close_rel(res->estimate, K, 1e-12));
            ck_assert(is_maximiser(&t, fmpz_get_si(res->argk)));
            ck_assert_int_eq(res->have_bounds, t.d == 2);
            if (t.d == 2) {
                exact_blocks(B, p1, &t);
                fmpq_div_2exp(p1, p1, 1);
                fmpq_set(lo, fmpq_cmp(p1, B) > 0 ? p1 : B);
                fmpq_mul_2exp(B, B, 1);
                fmpq_set(hi, fmpq_cmp(p1, B) > 0 ? p1 : B);
                fmpq_div(lo, lo, t.W);
                fmpq_div(hi, hi, t.W);
                ck_assert(fmpq_cmp(lo, t.K) <= 0 && fmpq_cmp(t.K, hi) <= 0);
                ck_assert(ball_contains(res->lower, lo) && ball_contains(res->upper, hi));
            }
            embz_error_result_clear(res);
            fmpz_clear(nz);
            tcase_clear(&t);
        }
    }
    fmpq_clear(B); fmpq_clear(p1); fmpq_clear(lo); fmpq_clear(hi);
    flint_randclear(state);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("explicit_certify");
    TCase *tc = tcase_create("certify");
    tcase_add_test(tc, test_orders);
    tcase_add_test(tc, test_head_room);
    tcase_add_test(tc, test_explicit);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
