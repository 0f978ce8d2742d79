/* Tests for Ky Fan norms, Nielsen's test, the conversion distance K and the embezzlement error
 * at explicit sizes (src/measure). */
#include <check.h>
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include "embz.h"
#include "testutil.h"

/* ------------------------------------------------------------------ helpers */

/* K by the plain Ky Fan definition, over the padded length. */
static void kyfan_brute(fmpq_t K, const embz_qvec_t p, const embz_qvec_t r)
{
    long L = FLINT_MAX(p->len, r->len);
    fmpq_t a, b;
    fmpq_init(a); fmpq_init(b);
    fmpq_zero(K);
    for (long k = 1; k <= L; k++) {
        embz_qvec_kyfan(a, p, k);
        embz_qvec_kyfan(b, r, k);
        fmpq_sub(a, a, b);
        if (fmpq_cmp(a, K) > 0) fmpq_set(K, a);
    }
    fmpq_clear(a); fmpq_clear(b);
}

static int majorized_brute(const embz_qvec_t p, const embz_qvec_t r)
{
    long L = FLINT_MAX(p->len, r->len);
    fmpq_t a, b;
    int ok = 1;
    fmpq_init(a); fmpq_init(b);
    for (long k = 1; k <= L && ok; k++) {
        embz_qvec_kyfan(a, p, k);
        embz_qvec_kyfan(b, r, k);
        if (fmpq_cmp(a, b) > 0) ok = 0;
    }
    fmpq_clear(a); fmpq_clear(b);
    return ok;
}

static void random_qvec(embz_qvec_t v, flint_rand_t state, long maxlen)
{
    long len = 1 + (long) n_randint(state, (ulong) maxlen);
    fmpq_t s;
    fmpq_init(s);
    tu_qvec_alloc(v, len);
    do {
        fmpq_zero(s);
        for (long k = 0; k < len; k++) {
            /* small integers give many ties, which is what breaks sloppy code */
            ulong m = n_randint(state, 4) == 0 ? 0 : n_randint(state, n_randint(state, 2) ? 6 : 50);
            fmpq_set_si(v->p + k, (slong) m, 1);
            fmpq_add(s, s, v->p + k);
        }
    } while (fmpq_is_zero(s));
    for (long k = 0; k < len; k++) fmpq_div(v->p + k, v->p + k, s);
    fmpq_clear(s);
}

static void make_family(embz_family_t f, const char *text)
{
    embz_err_t err;
    embz_err_clear(&err);
    embz_family_init(f);
    ck_assert_msg(embz_expr_parse(f->weight, text, NULL, 0, &err) == EMBZ_OK, "%s: %s", text,
                  err.text);
    free(f->name);
    f->name = strdup(text);
}

static int explicit_error(embz_error_result_t res, const embz_family_t f, slong n,
                          const embz_target_t t, slong prec)
{
    fmpz_t nn;
    embz_err_t err;
    embz_err_clear(&err);
    fmpz_init_set_ui(nn, (ulong) n);
    int st = embz_error_explicit(res, f, nn, t, prec, &err);
    fmpz_clear(nn);
    ck_assert_msg(st == EMBZ_OK, "status %d: %s", st, err.text);
    return st;
}

static int arb_contains_q(const arb_t x, const fmpq_t q)
{
    return arb_contains_fmpq(x, q);
}

static int arb_contains_d(const arb_t x, double d)
{
    arf_t t;
    arf_init(t);
    arf_set_d(t, d);
    int r = arb_contains_arf(x, t);
    arf_clear(t);
    return r;
}

/* ------------------------------------------------------------------ published examples */

/* Jonathan and Plenio, Phys. Rev. Lett. 83, 3566 (1999): the state with Schmidt probabilities
 * (0.4, 0.4, 0.1, 0.1) cannot be converted by LOCC into (0.5, 0.25, 0.25, 0), but with the
 * catalyst (0.6, 0.4) on both sides the conversion becomes possible. */
START_TEST(test_catalysis_example)
{
    embz_qvec_t p, r, c, pc, rc;
    embz_qvec_init(p); embz_qvec_init(r); embz_qvec_init(c);
    embz_qvec_init(pc); embz_qvec_init(rc);
    tu_qvec_set(p, "0.4,0.4,0.1,0.1");
    tu_qvec_set(r, "0.5,0.25,0.25,0");
    tu_qvec_set(c, "0.6,0.4");
    ck_assert(!embz_qvec_convertible(p, r));
    ck_assert(!majorized_brute(p, r));
    fmpq_t K, Kb, want;
    long argk;
    fmpq_init(K); fmpq_init(Kb); fmpq_init(want);
    embz_qvec_distance(K, &argk, p, r);
    ck_assert(fmpq_sgn(K) > 0);
    /* by hand: Ky Fan norms 0.4, 0.8, 0.9, 1 against 0.5, 0.75, 1, 1: K = 0.05 at k = 2 */
    fmpq_set_si(want, 1, 20);
    ck_assert(fmpq_equal(K, want));
    ck_assert_int_eq(argk, 2);
    tu_qvec_tensor(pc, p, c);
    tu_qvec_tensor(rc, r, c);
    ck_assert(embz_qvec_convertible(pc, rc));
    ck_assert(majorized_brute(pc, rc));
    embz_qvec_distance(K, &argk, pc, rc);
    ck_assert(fmpq_is_zero(K));
    ck_assert_int_eq(argk, 0);
    kyfan_brute(Kb, pc, rc);
    ck_assert(fmpq_is_zero(Kb));
    fmpq_clear(K); fmpq_clear(Kb); fmpq_clear(want);
    embz_qvec_clear(p); embz_qvec_clear(r); embz_qvec_clear(c);
    embz_qvec_clear(pc); embz_qvec_clear(rc);
}
END_TEST

/* Nielsen, Phys. Rev. Lett. 83, 436 (1999): conversion p -> r is possible iff p is majorized by
 * r, and there are incomparable pairs (neither direction possible). The pair below is derived
 * by hand: p = (0.5, 0.25, 0.25) has Ky Fan norms 0.5, 0.75, 1 and r = (0.4, 0.4, 0.2) has
 * 0.4, 0.8, 1; p leads at k = 1 and trails at k = 2, so neither majorizes the other, with
 * K(p -> r) = 0.1 (k = 1) and K(r -> p) = 0.05 (k = 2). */
START_TEST(test_incomparable_pair)
{
    embz_qvec_t p, r;
    embz_qvec_init(p); embz_qvec_init(r);
    tu_qvec_set(p, "0.5,0.25,0.25");
    tu_qvec_set(r, "0.4,0.4,0.2");
    ck_assert(!embz_qvec_convertible(p, r));
    ck_assert(!embz_qvec_convertible(r, p));
    fmpq_t K, want;
    long argk;
    fmpq_init(K); fmpq_init(want);
    embz_qvec_distance(K, &argk, p, r);
    fmpq_set_si(want, 1, 10);
    ck_assert(fmpq_equal(K, want));
    ck_assert_int_eq(argk, 1);
    embz_qvec_distance(K, &argk, r, p);
    fmpq_set_si(want, 1, 20);
    ck_assert(fmpq_equal(K, want));
    ck_assert_int_eq(argk, 2);
    /* every state converts to itself and to a product state (1): K(p -> (1)) = 0 */
    embz_qvec_t one;
    embz_qvec_init(one);
    tu_qvec_set(one, "1");
    ck_assert(embz_qvec_convertible(p, one));
    ck_assert(embz_qvec_convertible(p, p));
    /* ... and a product state converts to nothing entangled: K((1) -> p) = 1 - p_1 */
    embz_qvec_distance(K, NULL, one, p);
    fmpq_set_si(want, 1, 2);
    ck_assert(fmpq_equal(K, want));
    embz_qvec_clear(one);
    fmpq_clear(K); fmpq_clear(want);
    embz_qvec_clear(p); embz_qvec_clear(r);
}
END_TEST

/* ------------------------------------------------------------------ random properties */

START_TEST(test_distance_properties)
{
    flint_rand_t state;
    flint_randinit(state);
    embz_qvec_t p, r, s, w, ps, rs;
    embz_qvec_init(p); embz_qvec_init(r); embz_qvec_init(s); embz_qvec_init(w);
    embz_qvec_init(ps); embz_qvec_init(rs);
    fmpq_t K, Kb, K1, K2, K3, a, b;
    fmpq_init(K); fmpq_init(Kb); fmpq_init(K1); fmpq_init(K2); fmpq_init(K3);
    fmpq_init(a); fmpq_init(b);
    arb_ptr pa = _arb_vec_init(16), ra = _arb_vec_init(16);
    arb_t Ka;
    arb_init(Ka);
    for (int iter = 0; iter < 3000; iter++) {
        random_qvec(p, state, 8);
        random_qvec(r, state, 8);
        long argk;
        embz_qvec_distance(K, &argk, p, r);
        kyfan_brute(Kb, p, r);
        /* threshold form = Ky Fan form; K >= 0; K = 0 iff majorized */
        ck_assert(fmpq_equal(K, Kb));
        ck_assert(fmpq_sgn(K) >= 0);
        ck_assert_int_eq(fmpq_is_zero(K), majorized_brute(p, r));
        ck_assert_int_eq(embz_qvec_convertible(p, r), majorized_brute(p, r));
        /* the reported index attains the maximum */
        embz_qvec_kyfan(a, p, argk);
        embz_qvec_kyfan(b, r, argk);
        fmpq_sub(a, a, b);
        ck_assert(fmpq_equal(a, K));
        /* triangle inequality */
        random_qvec(s, state, 8);
        embz_qvec_distance(K1, NULL, p, r);
        embz_qvec_distance(K2, NULL, r, s);
        embz_qvec_distance(K3, NULL, p, s);
        fmpq_add(a, K1, K2);
        ck_assert(fmpq_cmp(K3, a) <= 0);
        /* tensoring both sides with the same state never increases K */
        if (iter % 3 == 0) {
            random_qvec(w, state, 4);
            tu_qvec_tensor(ps, p, w);
            tu_qvec_tensor(rs, r, w);
            embz_qvec_distance(K2, NULL, ps, rs);
            ck_assert(fmpq_cmp(K2, K1) <= 0);
        }
        /* ball version: exact and slightly blurred inputs enclose the exact K */
        for (long k = 0; k < p->len; k++) arb_set_fmpq(pa + k, p->p + k, 200);
        for (long k = 0; k < r->len; k++) arb_set_fmpq(ra + k, r->p + k, 200);
        if (iter % 2) {
            for (long k = 0; k < p->len; k++) mag_set_d(arb_radref(pa + k), 1e-30);
        }
        slong ak;
        embz_vec_distance_arb(Ka, &ak, pa, p->len, ra, r->len, 128);
        ck_assert(arb_contains_q(Ka, K));
        if (mag_cmp_2exp_si(arb_radref(Ka), -80) >= 0) { arb_printd(Ka, 20); flint_printf(" len %ld %ld iter %d\n", p->len, r->len, iter); }
        ck_assert(mag_cmp_2exp_si(arb_radref(Ka), -80) < 0);
    }
    arb_clear(Ka);
    _arb_vec_clear(pa, 16); _arb_vec_clear(ra, 16);
    fmpq_clear(K); fmpq_clear(Kb); fmpq_clear(K1); fmpq_clear(K2); fmpq_clear(K3);
    fmpq_clear(a); fmpq_clear(b);
    embz_qvec_clear(p); embz_qvec_clear(r); embz_qvec_clear(s); embz_qvec_clear(w);
    embz_qvec_clear(ps); embz_qvec_clear(rs);
    flint_randclear(state);
}
END_TEST

/* ------------------------------------------------------------------ embezzlement error */

/* The inverse-index family w = 1/i against u_d, n = d s + r (0 <= r < d), exactly [derived, see
 * the method notes]: E_n(u_d) = 1 - (H_s + r / (d (s + 1))) / H_n, with FLINT's exact harmonic
 * numbers as the reference. */
static void inverse_exact(fmpq_t E, slong n, ulong d)
{
    fmpq_t Hs, Hn, t;
    fmpq_init(Hs); fmpq_init(Hn); fmpq_init(t);
    slong s = n / (slong) d, r = n % (slong) d;
    arith_harmonic_number(Hs, (ulong) s);
    arith_harmonic_number(Hn, (ulong) n);
    fmpq_set_si(t, r, (ulong) (d * (ulong) (s + 1)));
    fmpq_add(t, t, Hs);
    fmpq_div(t, t, Hn);
    fmpq_one(E);
    fmpq_sub(E, E, t);
    fmpq_clear(Hs); fmpq_clear(Hn); fmpq_clear(t);
}

START_TEST(test_inverse_exact)
{
    embz_family_t f;
    make_family(f, "1/i");
    embz_target_t t;
    embz_target_init(t);
    embz_error_result_t res;
    embz_error_result_init(res);
    fmpq_t E;
    fmpq_init(E);
    const ulong ds[] = { 2, 3, 4, 5, 8, 1024 };
    const char *specs[] = { "ebit", "uniform:3", "ebits:2", "uniform:5", "ebits:3", "ebits:10" };
    for (int j = 0; j < 6; j++) {
        tu_target_set(t, specs[j]);
        ck_assert_int_eq(t->d, ds[j]);
        for (slong n = 1; n <= 2200; n += (n < 60 ? 1 : 37 + n / 7)) {
            explicit_error(res, f, n, t, 128);
            inverse_exact(E, n, ds[j]);
            ck_assert_msg(arb_contains_q(res->error, E), "n = %ld, d = %lu", (long) n, ds[j]);
            ck_assert(mag_cmp_2exp_si(arb_radref(res->error), -90) < 0);
            ck_assert_int_eq(res->order, 1);
            ck_assert(fabs(res->estimate - fmpq_get_d(E)) < 1e-12);
        }
    }
    /* a larger size, one ebit */
    tu_target_set(t, "ebit");
    explicit_error(res, f, 100001, t, 96);
    inverse_exact(E, 100001, 2);
    ck_assert(arb_contains_q(res->error, E));
    ck_assert_int_eq(res->how.kind, EMBZ_HOW_EXPLICIT);
    ck_assert_int_eq(res->how.order, 1);   /* streamed, weights non-increasing */
    fmpq_clear(E);
    embz_error_result_clear(res);
    embz_target_clear(t);
    embz_family_clear(f);
}
END_TEST

/* Families with rational weights: the exact K(p -> p (x) q) from the exact vectors must lie in
 * the certified ball; the double estimate must be close to it. */
typedef void (*qweight_fn)(fmpq_t w, slong i, slong n);
static void qw_inv(fmpq_t w, slong i, slong n) { (void) n; fmpq_set_si(w, 1, (ulong) i); }
static void qw_lin(fmpq_t w, slong i, slong n) { (void) n; fmpq_set_si(w, i, 1); }
static void qw_bump(fmpq_t w, slong i, slong n) { (void) n; fmpq_set_si(w, 1 + (i - 7) * (i - 7), 1); }
static void qw_inv2(fmpq_t w, slong i, slong n) { (void) n; fmpq_set_si(w, 1, (ulong) (i * i)); }
static void qw_const(fmpq_t w, slong i, slong n) { (void) n; (void) i; fmpq_set_si(w, 3, 1); }
static void qw_ndep(fmpq_t w, slong i, slong n) { fmpq_set_si(w, 1, (ulong) (i + n)); }
static void qw_zigzag(fmpq_t w, slong i, slong n) { (void) n; fmpq_set_si(w, 1 + (i % 3), (ulong) i); }

START_TEST(test_error_vs_exact)
{
    struct { const char *text; qweight_fn fn; int order; } fams[] = {
        { "1/i", qw_inv, 1 }, { "i", qw_lin, -1 }, { "1+(i-7)^2", qw_bump, 0 },
        { "i^-2", qw_inv2, 1 }, { "3", qw_const, 1 }, { "1/(i+n)", qw_ndep, 1 },
        { "(1+i-3*floor(i/3))/i", qw_zigzag, 0 },
    };
    const char *targets[] = { "ebit", "uniform:3", "0.7,0.2,0.1", "0.5,0.25,0.25", "ebits:2",
                              "0.4,0.3,0.2,0.1" };
    embz_error_result_t res;
    embz_error_result_init(res);
    embz_target_t t;
    embz_target_init(t);
    embz_qvec_t p, q, pq;
    embz_qvec_init(p); embz_qvec_init(q); embz_qvec_init(pq);
    fmpq_t K, W;
    fmpq_init(K); fmpq_init(W);
    arb_t tmp;
    arb_init(tmp);
    for (size_t a = 0; a < sizeof(fams) / sizeof(fams[0]); a++) {
        embz_family_t f;
        make_family(f, fams[a].text);
        for (size_t b = 0; b < sizeof(targets) / sizeof(targets[0]); b++) {
            tu_target_set(t, targets[b]);
            /* exact q as a vector */
            embz_qvec_clear(q);
            if (t->kind == EMBZ_TARGET_UNIFORM) {
                q->len = (long) t->d;
                q->p = _fmpq_vec_init(q->len);
                for (long j = 0; j < q->len; j++) fmpq_set_si(q->p + j, 1, t->d);
            } else {
                q->len = t->q->len;
                q->p = _fmpq_vec_init(q->len);
                for (long j = 0; j < q->len; j++) fmpq_set(q->p + j, t->q->p + j);
            }
            for (slong n = 1; n <= 40; n += (n < 14 ? 1 : 13)) {
                embz_qvec_clear(p);
                p->len = n;
                p->p = _fmpq_vec_init(n);
                fmpq_zero(W);
                for (slong i = 1; i <= n; i++) {
                    fams[a].fn(p->p + i - 1, i, n);
                    fmpq_add(W, W, p->p + i - 1);
                }
                for (slong i = 0; i < n; i++) fmpq_div(p->p + i, p->p + i, W);
                tu_qvec_tensor(pq, p, q);
                long argk;
                embz_qvec_distance(K, &argk, p, pq);
                explicit_error(res, f, n, t, 100);
                ck_assert_msg(arb_contains_q(res->error, K), "%s, %s, n = %ld",
                              fams[a].text, targets[b], (long) n);
                ck_assert(mag_cmp_2exp_si(arb_radref(res->error), -70) < 0);
                ck_assert(fabs(res->estimate - fmpq_get_d(K)) < 1e-13);
                if (n > 2 && fams[a].order != 0) ck_assert_int_eq(res->order, fams[a].order);
                if (n > 10) ck_assert_int_eq(res->order, fams[a].order);
                /* the reported argmax attains the estimate (up to rounding) */
                fmpq_t x, y;
                fmpq_init(x); fmpq_init(y);
                embz_qvec_kyfan(x, p, (long) fmpz_get_si(res->argk));
                embz_qvec_kyfan(y, pq, (long) fmpz_get_si(res->argk));
                fmpq_sub(x, x, y);
                ck_assert(fabs(fmpq_get_d(x) - fmpq_get_d(K)) < 1e-13);
                fmpq_clear(x); fmpq_clear(y);
                /* block-mass bounds for one ebit */
                if (t->kind == EMBZ_TARGET_UNIFORM && t->d == 2) {
                    ck_assert(res->have_bounds);
                    arb_set_fmpq(tmp, K, 128);
                    ck_assert(!arb_gt(res->lower, tmp));
                    ck_assert(!arb_lt(res->upper, tmp));
                } else {
                    ck_assert(!res->have_bounds);
                }
            }
        }
        embz_family_clear(f);
    }
    arb_clear(tmp);
    fmpq_clear(K); fmpq_clear(W);
    embz_qvec_clear(p); embz_qvec_clear(q); embz_qvec_clear(pq);
    embz_target_clear(t);
    embz_error_result_clear(res);
}
END_TEST

/* Ball-vector reference for families that are not rational: the explicit error against
 * embz_vec_distance_arb on the full vectors p and p (x) q (an independent code path that
 * trusts no ordering); uniform targets given as vectors agree with the uniform path. */
START_TEST(test_error_vs_ball_vectors)
{
    const char *fams[] = { "1+sin(i)^2", "i^-0.5", "1/(i*log(i+1)^2)", "i^0.5", "exp(-i/5)",
                           "log(i+1)", "2^-i" };
    const char *targets[] = { "ebit", "0.7,0.2,0.1", "uniform:3" };
    embz_error_result_t res, res2;
    embz_error_result_init(res);
    embz_error_result_init(res2);
    embz_target_t t, tv;
    embz_target_init(t);
    embz_target_init(tv);
    embz_err_t err;
    slong prec = 128;
    arb_ptr p = _arb_vec_init(400), pq = _arb_vec_init(1200);
    arb_t W, K, qj;
    arb_init(W); arb_init(K); arb_init(qj);
    fmpz_t iz, nz;
    fmpz_init(iz); fmpz_init(nz);
    for (size_t a = 0; a < sizeof(fams) / sizeof(fams[0]); a++) {
        embz_family_t f;
        make_family(f, fams[a]);
        for (size_t b = 0; b < sizeof(targets) / sizeof(targets[0]); b++) {
            tu_target_set(t, targets[b]);
            for (slong n = 1; n <= 400; n = 3 * n + 1) {
                fmpz_set_si(nz, n);
                arb_zero(W);
                for (slong i = 1; i <= n; i++) {
                    fmpz_set_si(iz, i);
                    embz_err_clear(&err);
                    ck_assert(embz_family_weight_arb(p + i - 1, f, iz, nz, prec, &err) == EMBZ_OK);
                    arb_add(W, W, p + i - 1, prec);
                }
                for (slong i = 0; i < n; i++) arb_div(p + i, p + i, W, prec);
                slong m = t->kind == EMBZ_TARGET_UNIFORM ? (slong) t->d : t->q->len;
                for (slong j = 0; j < m; j++) {
                    if (t->kind == EMBZ_TARGET_UNIFORM) arb_set_si(qj, 1), arb_div_ui(qj, qj, t->d, prec);
                    else arb_set_fmpq(qj, t->q->p + j, prec);
                    for (slong i = 0; i < n; i++) arb_mul(pq + i * m + j, p + i, qj, prec);
                }
                embz_vec_distance_arb(K, NULL, p, n, pq, n * m, prec);
                explicit_error(res, f, n, t, prec);
                ck_assert_msg(arb_overlaps(res->error, K), "%s %s n=%ld", fams[a], targets[b], (long) n);
                ck_assert(mag_cmp_2exp_si(arb_radref(res->error), -80) < 0);
                /* estimate inside the (slightly widened) ball */
                arb_t e;
                arb_init(e);
                arb_set(e, res->error);
                arb_add_error_2exp_si(e, -40);
                ck_assert(arb_contains_d(e, res->estimate));
                arb_clear(e);
                if (strcmp(fams[a], "1+sin(i)^2") == 0 && n > 3) ck_assert_int_eq(res->order, 0);
                if (strcmp(fams[a], "i^0.5") == 0 && n > 1) ck_assert_int_eq(res->order, -1);
                /* uniform target as an explicit vector (bypassing the uniform detection) */
                if (t->kind == EMBZ_TARGET_UNIFORM) {
                    embz_target_clear(tv);
                    embz_target_init(tv);
                    tv->kind = EMBZ_TARGET_VECTOR;
                    tv->q->len = (long) t->d;
                    tv->q->p = _fmpq_vec_init(tv->q->len);
                    for (long j = 0; j < tv->q->len; j++) fmpq_set_si(tv->q->p + j, 1, t->d);
                    explicit_error(res2, f, n, tv, prec);
                    ck_assert(arb_overlaps(res->error, res2->error));
                    ck_assert(fabs(res->estimate - res2->estimate) < 1e-13);
                }
            }
        }
        embz_family_clear(f);
    }
    fmpz_clear(iz); fmpz_clear(nz);
    arb_clear(W); arb_clear(K); arb_clear(qj);
    _arb_vec_clear(p, 400); _arb_vec_clear(pq, 1200);
    embz_target_clear(t);
    embz_target_clear(tv);
    embz_error_result_clear(res);
    embz_error_result_clear(res2);
}
END_TEST

/* Bounds and monotone streams on larger sizes; explicit versus the block-mass bounds. */
START_TEST(test_error_bounds_large)
{
    const char *fams[] = { "1/i", "i^-0.5", "1/(i*log(i+1)^2)", "i^-2", "1+sin(i)^2" };
    embz_error_result_t res;
    embz_error_result_init(res);
    embz_target_t t;
    embz_target_init(t);
    for (size_t a = 0; a < sizeof(fams) / sizeof(fams[0]); a++) {
        embz_family_t f;
        make_family(f, fams[a]);
        for (slong n = 1000; n <= 300000; n *= 17) {
            explicit_error(res, f, n, t, 128);
            ck_assert(res->have_bounds);
            ck_assert(!arb_gt(res->lower, res->error));
            ck_assert(!arb_lt(res->upper, res->error));
            ck_assert(arb_is_nonnegative(res->error));
            ck_assert(arb_contains_d(res->error, res->estimate) ||
                      fabs(res->estimate - arf_get_d(arb_midref(res->error), ARF_RND_NEAR)) < 1e-12);
        }
        embz_family_clear(f);
    }
    embz_target_clear(t);
    embz_error_result_clear(res);
}
END_TEST

/* Values from the method notes [derived there, computed independently]:
 * power family i^-0.5, one ebit: E at n = 2^8 is 0.306162 (6 digits);
 * maximally entangled resource (constant weights): E_n = 1/2 for every n;
 * inverse family: the smallest n with E_n(ebit) <= 0.2 is 15, with E_n <= 0.1 it is 570. */
START_TEST(test_error_table)
{
    embz_error_result_t res;
    embz_error_result_init(res);
    embz_target_t t;
    embz_target_init(t);
    embz_family_t f;
    arb_t x;
    arb_init(x);
    make_family(f, "i^-0.5");
    explicit_error(res, f, 256, t, 128);
    ck_assert(fabs(arf_get_d(arb_midref(res->error), ARF_RND_NEAR) - 0.306162) < 6e-7);
    embz_family_clear(f);

    make_family(f, "1");
    for (slong n = 1; n < 300; n += 7) {
        explicit_error(res, f, n, t, 128);
        arb_set_d(x, 0.5);
        ck_assert(arb_contains(res->error, x));
    }
    embz_family_clear(f);

    make_family(f, "1/i");
    arb_set_d(x, 0.2);
    explicit_error(res, f, 14, t, 128);
    ck_assert(arb_gt(res->error, x));
    explicit_error(res, f, 15, t, 128);
    ck_assert(arb_le(res->error, x));
    arb_set_d(x, 0.1);
    explicit_error(res, f, 569, t, 128);
    ck_assert(arb_gt(res->error, x));
    explicit_error(res, f, 570, t, 128);
    ck_assert(arb_le(res->error, x));
    embz_family_clear(f);
    arb_clear(x);
    embz_target_clear(t);
    embz_error_result_clear(res);
}
END_TEST

START_TEST(test_error_failures)
{
    embz_error_result_t res;
    embz_error_result_init(res);
    embz_target_t t;
    embz_target_init(t);
    embz_family_t f;
    embz_err_t err;
    fmpz_t n;
    fmpz_init(n);
    make_family(f, "1/i");
    fmpz_set_si(n, 0);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_error_explicit(res, f, n, t, 128, &err), EMBZ_ERR_INPUT);
    fmpz_set_si(n, EMBZ_EXPLICIT_MAX_N + 1);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_error_explicit(res, f, n, t, 128, &err), EMBZ_ERR_LIMIT);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_error(res, f, n, t, EMBZ_METHOD_EXPLICIT, 128, &err), EMBZ_ERR_LIMIT);
    /* auto: explicit up to the one threshold, the analytic engine beyond */
    fmpz_set_si(n, EMBZ_EVAL_EXPLICIT_UP_TO);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_error(res, f, n, t, EMBZ_METHOD_AUTO, 128, &err), EMBZ_OK);
    ck_assert_int_eq(res->method, EMBZ_METHOD_EXPLICIT);
    fmpz_add_ui(n, n, 1);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_error(res, f, n, t, EMBZ_METHOD_AUTO, 128, &err), EMBZ_OK);
    ck_assert_int_eq(res->method, EMBZ_METHOD_ANALYTIC);
    embz_family_clear(f);
    /* negative and undefined weights name the index */
    make_family(f, "i-3");
    fmpz_set_si(n, 10);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_error_explicit(res, f, n, t, 128, &err), EMBZ_ERR_DOMAIN);
    ck_assert_msg(strstr(err.text, "i = 1") != NULL, "%s", err.text);
    embz_family_clear(f);
    make_family(f, "1/log(i)");
    embz_err_clear(&err);
    ck_assert_int_eq(embz_error_explicit(res, f, n, t, 128, &err), EMBZ_ERR_DOMAIN);
    ck_assert_msg(strstr(err.text, "i = 1") != NULL, "%s", err.text);
    embz_family_clear(f);
    make_family(f, "0*i");
    embz_err_clear(&err);
    ck_assert_int_eq(embz_error_explicit(res, f, n, t, 128, &err), EMBZ_ERR_DOMAIN);
    embz_family_clear(f);
    fmpz_clear(n);
    embz_target_clear(t);
    embz_error_result_clear(res);
}
END_TEST

/* ------------------------------------------------------------------ sizes */

START_TEST(test_size_parse)
{
    struct { const char *s; const char *v; } good[] = {
        { "1000", "1000" }, { "1e6", "1000000" }, { "10^6", "1000000" }, { "2^20", "1048576" },
        { "3*10^5", "300000" }, { "1.5e3", "1500" }, { " 7 ", "7" }, { "2^3*3^2", "72" },
        { "1E2", "100" }, { "1", "1" }, { "12000e-3", "12" },
    };
    fmpz_t n, w;
    fmpz_init(n); fmpz_init(w);
    embz_err_t err;
    for (size_t k = 0; k < sizeof(good) / sizeof(good[0]); k++) {
        embz_err_clear(&err);
        ck_assert_msg(embz_size_parse(n, good[k].s, &err) == EMBZ_OK, "%s: %s", good[k].s, err.text);
        fmpz_set_str(w, good[k].v, 10);
        ck_assert_msg(fmpz_equal(n, w), "%s", good[k].s);
    }
    embz_err_clear(&err);
    ck_assert_int_eq(embz_size_parse(n, "10^10000", &err), EMBZ_OK);
    fmpz_ui_pow_ui(w, 10, 10000);
    ck_assert(fmpz_equal(n, w));
    /* the largest accepted size, about 10^400000 (the engine's reach), and beyond it */
    embz_err_clear(&err);
    ck_assert_int_eq(embz_size_parse(n, "10^400000", &err), EMBZ_OK);
    static const char *huge[] = { "10^500000", "1e999999", "10^401000", "2^1400000",
                                  "10^200000*10^201000" };
    for (size_t k = 0; k < sizeof(huge) / sizeof(huge[0]); k++) {
        embz_err_clear(&err);
        ck_assert_msg(embz_size_parse(n, huge[k], &err) == EMBZ_ERR_INPUT, "%s", huge[k]);
        ck_assert_msg(strstr(err.text, "10^400000") != NULL, "%s: %s", huge[k], err.text);
    }
    const char *bad[] = { "0", "-5", "abc", "1/2", "1.5", "1e-3", "2^", "", "10^", "0^5", "3*",
                          "2^3^2", "1e9999999", "10^(10^4)", "1,000", NULL };
    for (int k = 0; bad[k] != NULL; k++) {
        embz_err_clear(&err);
        ck_assert_msg(embz_size_parse(n, bad[k], &err) == EMBZ_ERR_INPUT, "%s", bad[k]);
        ck_assert(err.text[0] != '\0');
    }
    fmpz_clear(n); fmpz_clear(w);
}
END_TEST

static Suite *measure_suite(void)
{
    Suite *s = suite_create("measure");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 300);
    tcase_add_test(tc, test_catalysis_example);
    tcase_add_test(tc, test_incomparable_pair);
    tcase_add_test(tc, test_distance_properties);
    tcase_add_test(tc, test_inverse_exact);
    tcase_add_test(tc, test_error_vs_exact);
    tcase_add_test(tc, test_error_vs_ball_vectors);
    tcase_add_test(tc, test_error_bounds_large);
    tcase_add_test(tc, test_error_table);
    tcase_add_test(tc, test_error_failures);
    tcase_add_test(tc, test_size_parse);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    return tu_run_suite(measure_suite());
}
