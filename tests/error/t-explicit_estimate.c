/* The double pass of explicit summation (src/error/explicit_estimate.c): _embz_x_estimate,
 * _embz_x_estimate_arb and the public wrapper embz_error_explicit_estimate.
 *
 * Reference: E_n(q) = K(p -> p (x) q) computed exactly with FLINT rationals. The weights are
 * evaluated here in fmpq (not by the library's evaluators), normalised, tensored with the
 * target, and K is taken by embz_qvec_distance (exact threshold form, src/measure); the value
 * at a given Ky Fan index by embz_qvec_kyfan. Random small families (1/i, 1/i^2, i,
 * 1/(i + c), and the non-monotone 1/((i - c)^2 + 1) and 2 + (-1)^i) and random targets
 * (uniform:d, or vectors of small integers normalised), n up to 300, from flint_rand_t.
 *
 * The estimate is double precision: it must agree with the exact value to 1e-12 relative, its
 * argmax k must be an exact maximiser, and the order it reports must be the true order of the
 * weights (so the streamed paths, forward and reverse, and the stored and sorted path all
 * run). The double pass has no working precision; the two precisions of the certified pass
 * are tested in t-explicit_certify.c. */
#include <check.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include "embz.h"
#include "error/impl.h"
#include "../testutil.h"

/* ------------------------------------------------------------ random cases, exact values */

enum { W_INV, W_INV2, W_LIN, W_SHIFT, W_BUMP, W_ALT, W_KINDS };

typedef struct {
    int kind;
    slong n;
    fmpq_t c;            /* the shift of W_SHIFT and W_BUMP */
    int order;           /* the true order of w(1), ..., w(n): +1, -1 or 0 */
    char spec[128];      /* the family as the command line reads it */
    embz_family_t f;
    ulong d;             /* uniform target (also a vector of equal entries): d; else 0 */
    slong a[4], m;       /* vector target: entries a_j / sum */
    char tspec[64];
    embz_target_t q;
    fmpq *w;             /* the exact weights, index order */
    fmpq_t W;            /* their sum */
    embz_qvec_t p, r;    /* p = w / W, r = p (x) q */
    fmpq_t K;            /* exact E_n(q) */
} tcase_t;

static void exact_weight(fmpq_t w, const tcase_t *t, slong i)
{
    fmpq_t x;
    fmpq_init(x);
    switch (t->kind) {
    case W_INV: fmpq_set_si(w, 1, i); break;
    case W_INV2: fmpq_set_si(w, 1, i * i); break;
    case W_LIN: fmpq_set_si(w, i, 1); break;
    case W_SHIFT:
        fmpq_set_si(x, i, 1);
        fmpq_add(x, x, t->c);
        fmpq_inv(w, x);
        break;
    case W_BUMP:
        fmpq_set_si(x, i, 1);
        fmpq_sub(x, x, t->c);
        fmpq_mul(x, x, x);
        fmpq_add_si(x, x, 1);
        fmpq_inv(w, x);
        break;
    default: fmpq_set_si(w, i % 2 == 0 ? 3 : 1, 1); break;
    }
    fmpq_clear(x);
}

static void tcase_init(tcase_t *t, flint_rand_t state)
{
    char cs[64];
    embz_err_t err;
    memset(t, 0, sizeof(*t));
    fmpq_init(t->c); fmpq_init(t->W); fmpq_init(t->K);
    t->kind = (int) n_randint(state, W_KINDS);
    int monotone = t->kind <= W_SHIFT;
    t->n = monotone ? 1 + (slong) n_randint(state, 300) : 5 + (slong) n_randint(state, 296);
    if (t->kind == W_SHIFT)
        fmpq_set_si(t->c, (slong) n_randint(state, 21), 1 + n_randint(state, 5));
    if (t->kind == W_BUMP)   /* a peak strictly inside: rising, then falling */
        fmpq_set_si(t->c, 10 + (t->n - 1) * (slong) (2 + n_randint(state, 7)), 10);
    fmpq_get_str(cs, 10, t->c);
    switch (t->kind) {
    case W_INV: snprintf(t->spec, sizeof(t->spec), "1/i"); break;
    case W_INV2: snprintf(t->spec, sizeof(t->spec), "1/i^2"); break;
    case W_LIN: snprintf(t->spec, sizeof(t->spec), "i"); break;
    case W_SHIFT: snprintf(t->spec, sizeof(t->spec), "1/(i + %s)", cs); break;
    case W_BUMP: snprintf(t->spec, sizeof(t->spec), "1/((i - %s)^2 + 1)", cs); break;
    default: snprintf(t->spec, sizeof(t->spec), "2 + (-1)^i"); break;
    }
    t->order = t->n == 1 ? 1 : monotone ? (t->kind == W_LIN ? -1 : 1) : 0;
    embz_family_init(t->f);
    embz_err_clear(&err);
    ck_assert_msg(embz_family_resolve(t->f, t->spec, NULL, 0, 0, &err) == EMBZ_OK, "%s: %s",
                  t->spec, err.text);

    /* the target and its exact entries */
    embz_qvec_t qv;
    embz_qvec_init(qv);
    if (n_randint(state, 2)) {
        t->d = 2 + n_randint(state, 6);
        snprintf(t->tspec, sizeof(t->tspec), "uniform:%lu", (unsigned long) t->d);
        tu_qvec_alloc(qv, (long) t->d);
        for (ulong j = 0; j < t->d; j++) fmpq_set_si(qv->p + j, 1, t->d);
    } else {
        slong sum = 0;
        int len = 0;
        t->m = 2 + (slong) n_randint(state, 3);
        for (slong j = 0; j < t->m; j++) {
            t->a[j] = 1 + (slong) n_randint(state, 9);
            sum += t->a[j];
            len += snprintf(t->tspec + len, sizeof(t->tspec) - (size_t) len, "%s%ld",
                            j ? "," : "", (long) t->a[j]);
        }
        tu_qvec_alloc(qv, (long) t->m);
        for (slong j = 0; j < t->m; j++) fmpq_set_si(qv->p + j, t->a[j], sum);
        int equal = 1;   /* equal entries: the library keeps the target as uniform:m */
        for (slong j = 1; j < t->m; j++) equal = equal && t->a[j] == t->a[0];
        if (equal) t->d = (ulong) t->m;
    }
    embz_target_init(t->q);
    tu_target_set(t->q, t->tspec);

    /* exact weights, p, r and K */
    t->w = _fmpq_vec_init(t->n);
    for (slong i = 1; i <= t->n; i++) {
        exact_weight(t->w + i - 1, t, i);
        fmpq_add(t->W, t->W, t->w + i - 1);
    }
    embz_qvec_init(t->p);
    embz_qvec_init(t->r);
    tu_qvec_alloc(t->p, (long) t->n);
    for (slong i = 0; i < t->n; i++) fmpq_div(t->p->p + i, t->w + i, t->W);
    tu_qvec_tensor(t->r, t->p, qv);
    embz_qvec_distance(t->K, NULL, t->p, t->r);
    embz_qvec_clear(qv);
}

static void tcase_clear(tcase_t *t)
{
    _fmpq_vec_clear(t->w, t->n);
    embz_qvec_clear(t->p);
    embz_qvec_clear(t->r);
    embz_target_clear(t->q);
    embz_family_clear(t->f);
    fmpq_clear(t->c); fmpq_clear(t->W); fmpq_clear(t->K);
}

/* |x - y| <= tol |y| */
static int close_rel(double x, double y, double tol)
{
    return fabs(x - y) <= tol * fabs(y);
}

/* the exact value of ||p||_(k) - ||p (x) q||_(k) (embz_qvec_kyfan) equals K */
static int is_maximiser(const tcase_t *t, slong k)
{
    fmpq_t a, b;
    fmpq_init(a); fmpq_init(b);
    embz_qvec_kyfan(a, t->p, (long) k);
    embz_qvec_kyfan(b, t->r, (long) k);
    fmpq_sub(a, a, b);
    int ok = fmpq_equal(a, t->K);
    fmpq_clear(a); fmpq_clear(b);
    return ok;
}

/* max_{2m <= n} (P_2m - P_m) of the sorted exact weights (unnormalised), and the largest
 * weight: the by-products the driver turns into the block-mass bounds of one ebit */
static void exact_blocks(fmpq_t B, fmpq_t p1, const tcase_t *t)
{
    fmpq *s = _fmpq_vec_init(t->n + 1);   /* s[k] = P_k */
    fmpq *w = _fmpq_vec_init(t->n);
    fmpq_t x;
    fmpq_init(x);
    for (slong i = 0; i < t->n; i++) fmpq_set(w + i, t->w + i);
    for (slong i = 0; i < t->n; i++)   /* selection sort, non-increasing (n <= 300) */
        for (slong j = i + 1; j < t->n; j++)
            if (fmpq_cmp(w + j, w + i) > 0) fmpq_swap(w + i, w + j);
    for (slong k = 0; k < t->n; k++) fmpq_add(s + k + 1, s + k, w + k);
    fmpq_zero(B);
    for (slong m = 1; 2 * m <= t->n; m++) {
        fmpq_sub(x, s + 2 * m, s + m);
        if (fmpq_cmp(x, B) > 0) fmpq_set(B, x);
    }
    fmpq_set(p1, w + 0);
    fmpq_clear(x);
    _fmpq_vec_clear(s, t->n + 1);
    _fmpq_vec_clear(w, t->n);
}

/* ------------------------------------------------------------ tests */

START_TEST(test_double_pass)
{
    /* the streamed and the stored pass against the exact value */
    flint_rand_t state;
    flint_randinit(state);
    int seen[3] = { 0, 0, 0 };    /* orders -1, 0, +1 reported */
    fmpq_t B, p1;
    fmpq_init(B); fmpq_init(p1);
    for (int iter = 0; iter < 400; iter++) {
        tcase_t t;
        tcase_init(&t, state);
        embz_x_tdata_t T;
        embz_x_dres_t R;
        embz_err_t err;
        int order = 7;
        slong bad = -1;
        embz_err_clear(&err);
        ck_assert_int_eq(_embz_x_tdata_init(&T, t.q, &err), EMBZ_OK);
        memset(&R, 0, sizeof(R));
        ck_assert_msg(_embz_x_estimate(&R, &order, &bad, t.f, t.n, &T, &err) == EMBZ_OK,
                      "%s: %s", t.spec, err.text);
        _embz_x_tdata_clear(&T);
        ck_assert_int_eq(bad, 0);
        ck_assert_msg(order == t.order, "%s, n = %ld: order %d, expected %d", t.spec,
                      (long) t.n, order, t.order);
        seen[order + 1]++;
        double K = fmpq_get_d(t.K);
        ck_assert_msg(close_rel(R.best / R.W, K, 1e-12), "%s, n = %ld, %s: %.17g vs exact %.17g",
                      t.spec, (long) t.n, t.tspec, R.best / R.W, K);
        ck_assert_msg(close_rel(R.W, fmpq_get_d(t.W), 1e-12), "%s: total", t.spec);
        ck_assert_msg(R.argk >= 1 && R.argk <= t.n && is_maximiser(&t, R.argk),
                      "%s, n = %ld, %s: k = %ld is not a maximiser", t.spec, (long) t.n,
                      t.tspec, (long) R.argk);
        exact_blocks(B, p1, &t);
        ck_assert_msg(close_rel(R.p1, fmpq_get_d(p1), 1e-12), "%s: largest weight", t.spec);
        if (t.d == 2)
            ck_assert_msg(fabs(R.supB - fmpq_get_d(B)) <= 1e-12 * fmpq_get_d(t.W),
                          "%s, n = %ld: sup of the blocks", t.spec, (long) t.n);

        /* the public wrapper reports the same */
        double E;
        slong argk;
        int order2;
        fmpz_t nz;
        fmpz_init_set_si(nz, t.n);
        ck_assert_int_eq(embz_error_explicit_estimate(&E, &argk, &order2, t.f, nz, t.q, &err),
                         EMBZ_OK);
        ck_assert(order2 == order && argk == R.argk && close_rel(E, K, 1e-12));
        fmpz_clear(nz);
        tcase_clear(&t);
    }
    /* every path ran */
    ck_assert_msg(seen[0] > 0 && seen[1] > 0 && seen[2] > 0, "orders seen: %d %d %d", seen[0],
                  seen[1], seen[2]);
    fmpq_clear(B); fmpq_clear(p1);
    flint_randclear(state);
}
END_TEST

START_TEST(test_ball_pass)
{
    /* the estimate from 64-bit balls, scaled so the largest weight lies in [1/2, 1), stored
     * and sorted */
    flint_rand_t state;
    flint_randinit(state);
    for (int iter = 0; iter < 150; iter++) {
        tcase_t t;
        tcase_init(&t, state);
        embz_x_tdata_t T;
        embz_x_dres_t R;
        embz_err_t err;
        slong k = 0;
        embz_err_clear(&err);
        ck_assert_int_eq(_embz_x_tdata_init(&T, t.q, &err), EMBZ_OK);
        memset(&R, 0, sizeof(R));
        ck_assert_msg(_embz_x_estimate_arb(&R, &k, t.f, t.n, &T, &err) == EMBZ_OK, "%s: %s",
                      t.spec, err.text);
        _embz_x_tdata_clear(&T);
        ck_assert_msg(R.p1 >= 0.5 && R.p1 < 1.0, "%s: largest weight %g after scaling", t.spec,
                      R.p1);
        double K = fmpq_get_d(t.K);
        ck_assert_msg(close_rel(R.best / R.W, K, 1e-12), "%s, n = %ld, %s: %.17g vs exact %.17g",
                      t.spec, (long) t.n, t.tspec, R.best / R.W, K);
        ck_assert_msg(close_rel(ldexp(R.W, (int) -k), fmpq_get_d(t.W), 1e-12), "%s: total",
                      t.spec);
        ck_assert_msg(is_maximiser(&t, R.argk), "%s, n = %ld, %s: k = %ld is not a maximiser",
                      t.spec, (long) t.n, t.tspec, (long) R.argk);
        tcase_clear(&t);
    }
    flint_randclear(state);
}
END_TEST

START_TEST(test_bad_weight)
{
    /* a weight that is not a finite double is reported by its index, not summed:
     * 1/(i - 3)^2 is undefined at i = 3 only */
    embz_family_t f;
    embz_target_t q;
    embz_err_t err;
    embz_x_tdata_t T;
    embz_x_dres_t R;
    int order;
    slong bad = 0;
    embz_family_init(f);
    embz_target_init(q);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_family_resolve(f, "1/(i - 3)^2", NULL, 0, 0, &err), EMBZ_OK);
    ck_assert_int_eq(_embz_x_tdata_init(&T, q, &err), EMBZ_OK);
    ck_assert_int_eq(_embz_x_estimate(&R, &order, &bad, f, 10, &T, &err), EMBZ_OK);
    ck_assert_int_eq(bad, 3);
    _embz_x_tdata_clear(&T);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("explicit_estimate");
    TCase *tc = tcase_create("estimate");
    tcase_add_test(tc, test_double_pass);
    tcase_add_test(tc, test_ball_pass);
    tcase_add_test(tc, test_bad_weight);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
