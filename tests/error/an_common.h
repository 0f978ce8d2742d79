/* Shared by the unit tests of the analytic engine's pieces (tests/error/t-*.c, one program
 * per piece): a context for a family at one size, built the way the engine builds it, and
 * the reference the tests compare with, computed here without the engine: every weight
 * written in C with arb functions (not through the expression evaluator), sorted by this
 * file, prefix sums added one by one (no Euler-Maclaurin sums). */
#ifndef EMBZ_TEST_AN_COMMON_H
#define EMBZ_TEST_AN_COMMON_H

#include <check.h>
#include <stdlib.h>
#include <string.h>
#include "embz.h"
#include "error/impl.h"
#include "../testutil.h"

/* the families the tests use: the expression the engine reads, and the same weight in C */
enum { TF_INVERSE, TF_POWER, TF_BUMP, TF_LOG, TF_NEARMISS, TF_COUNT };
static const char *const tf_expr[TF_COUNT] = {
    "1/i",                              /* non-increasing, exact rationals */
    "i^(-1/2)",                         /* non-increasing, not summable */
    "i^0.3*log(log(i+3))*i^(-0.5)",     /* rises, then falls: head weights inside the tail */
    "log(i+1)",                         /* non-decreasing: the whole head goes into B */
    "1/(i*log(i+1)^2)",                 /* summable */
};

static inline void tf_weight(arb_t w, int fam, slong i, slong prec)
{
    arb_t t, u;
    arb_init(t); arb_init(u);
    switch (fam) {
    case TF_INVERSE:
        arb_one(w);
        arb_div_ui(w, w, (ulong) i, prec);
        break;
    case TF_POWER:
        arb_rsqrt_ui(w, (ulong) i, prec);
        break;
    case TF_BUMP:
        arb_set_ui(t, 3);
        arb_div_ui(t, t, 10, prec);
        arb_set_ui(u, (ulong) i);
        arb_pow(w, u, t, prec);                 /* i^(3/10) */
        arb_log_ui(t, (ulong) i + 3, prec);
        arb_log(t, t, prec);
        arb_mul(w, w, t, prec);
        arb_rsqrt_ui(t, (ulong) i, prec);
        arb_mul(w, w, t, prec);
        break;
    case TF_LOG:
        arb_log_ui(w, (ulong) i + 1, prec);
        break;
    default:
        arb_log_ui(t, (ulong) i + 1, prec);
        arb_sqr(t, t, prec);
        arb_mul_ui(t, t, (ulong) i, prec);
        arb_inv(w, t, prec);
        break;
    }
    arb_clear(t); arb_clear(u);
}

/* The reference of size n: w[1..n] sorted non-increasing (by midpoints; the families above
 * have no equal weights), S[0..n] their prefix sums, x[1..n] the index i of each. */
typedef struct {
    slong n, prec;
    arb_ptr w, S;
    slong *x;
} tf_ref;

typedef struct { arb_struct v; slong i; } tf_pair;

static int tf_pair_cmp(const void *a, const void *b)
{
    const tf_pair *p = a, *q = b;
    int c = arf_cmp(arb_midref(&q->v), arb_midref(&p->v));
    return c != 0 ? c : (p->i < q->i ? -1 : p->i > q->i);
}

static inline void tf_ref_init(tf_ref *R, int fam, slong n, slong prec)
{
    R->n = n;
    R->prec = prec;
    R->w = _arb_vec_init(n + 1);
    R->S = _arb_vec_init(n + 1);
    R->x = flint_malloc(sizeof(slong) * (size_t) (n + 1));
    tf_pair *pr = flint_malloc(sizeof(tf_pair) * (size_t) n);
    for (slong i = 1; i <= n; i++) {
        arb_init(&pr[i - 1].v);
        tf_weight(&pr[i - 1].v, fam, i, prec);
        pr[i - 1].i = i;
    }
    qsort(pr, (size_t) n, sizeof(tf_pair), tf_pair_cmp);
    for (slong k = 1; k <= n; k++) {
        /* the order must be certain: otherwise a position has no single reference value */
        if (k > 1) ck_assert_msg(arb_gt(R->w + k - 1, &pr[k - 1].v),
                                 "reference weights %ld and %ld not ordered", k - 1, k);
        arb_swap(R->w + k, &pr[k - 1].v);
        R->x[k] = pr[k - 1].i;
        arb_add(R->S + k, R->S + k - 1, R->w + k, prec);
        arb_clear(&pr[k - 1].v);
    }
    flint_free(pr);
}

static inline void tf_ref_clear(tf_ref *R)
{
    _arb_vec_clear(R->w, R->n + 1);
    _arb_vec_clear(R->S, R->n + 1);
    flint_free(R->x);
}

/* h(k) = (S(k) - S(s) - (r/d) w(s+1)) / W, k = d s + r, from the reference */
static inline void tf_ref_h(arb_t h, const tf_ref *R, slong k, ulong d)
{
    slong s = k / (slong) d, r = k % (slong) d;
    arb_t t;
    arb_init(t);
    arb_sub(h, R->S + FLINT_MIN(k, R->n), R->S + s, R->prec);
    if (r != 0 && s + 1 <= R->n) {
        arb_mul_ui(t, R->w + s + 1, (ulong) r, R->prec);
        arb_div_ui(t, t, d, R->prec);
        arb_sub(h, h, t, R->prec);
    }
    arb_div(h, h, R->S + R->n, R->prec);
    arb_clear(t);
}

/* A context of the engine for family fam at size n with d residues (1: the threshold form),
 * laid out with a head of 64 weights and a tail of its own, at the engine's working
 * precision for prec (prec + 32 bits, as the driver takes it). */
typedef struct {
    embz_family_t f;
    embz_tail_t tail;
    actx c;
} tf_ctx;

static inline void tf_ctx_init_expr(tf_ctx *x, const char *expr, slong n, ulong d, slong prec)
{
    embz_err_t err;
    embz_err_clear(&err);
    embz_family_init(x->f);
    ck_assert_msg(embz_family_resolve(x->f, expr, NULL, 0, 0, &err) == EMBZ_OK, "%s: %s", expr,
                  err.text);
    fmpz_t nn;
    fmpz_init_set_si(nn, n);
    _embz_an_ctx_init(&x->c, x->tail, x->f, nn, d, prec + 32);
    int st = _embz_an_setup(&x->c, 64, 0, prec + 32, &err);
    ck_assert_msg(st == EMBZ_OK, "layout of %s at n = %ld: %s", expr, n, err.text);
    ck_assert_msg(fmpz_equal(x->c.n, nn), "%s: tail shortened", expr);
    fmpz_clear(nn);
}

static inline void tf_ctx_init(tf_ctx *x, int fam, slong n, ulong d, slong prec)
{
    tf_ctx_init_expr(x, tf_expr[fam], n, d, prec);
}

static inline void tf_ctx_clear(tf_ctx *x)
{
    embz_tail_clear(x->tail);
    _embz_an_ctx_clear(&x->c);
    embz_family_clear(x->f);
}

/* the ball x is narrow: radius at most 2^e (no check passes through an indeterminate ball) */
static inline void tf_assert_narrow(const arb_t x, slong e, const char *what)
{
    ck_assert_msg(arb_is_finite(x) && mag_cmp_2exp_si(arb_radref(x), e) <= 0,
                  "%s: ball too wide (radius 2^%.1f, allowed 2^%ld)", what,
                  mag_is_finite(arb_radref(x)) ? mag_get_d_log2_approx(arb_radref(x)) : 1e9,
                  (long) e);
}

/* a random integer in [lo, hi] */
static inline slong tf_rand_in(flint_rand_t st, slong lo, slong hi)
{
    return lo + (slong) n_randint(st, (ulong) (hi - lo + 1));
}

/* The two precisions every test runs at. */
static const slong tf_precs[2] = { 64, 256 };

#endif
