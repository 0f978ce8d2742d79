/* Random small families and targets with their exact E_n, shared by the tests of explicit
 * summation (t-explicit_estimate.c, t-explicit_certify.c). Header only: every function is
 * static inline. Reference: E_n(q) = K(p -> p (x) q) in FLINT rationals (embz_qvec_distance),
 * the weights evaluated here in fmpq, not by the library. */
#ifndef EMBZ_TEST_XCASES_H
#define EMBZ_TEST_XCASES_H

#include <check.h>
#include "embz.h"
#include "error/impl.h"

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

static inline void exact_weight(fmpq_t w, const tcase_t *t, slong i)
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

static inline void tcase_init(tcase_t *t, flint_rand_t state)
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

static inline void tcase_clear(tcase_t *t)
{
    _fmpq_vec_clear(t->w, t->n);
    embz_qvec_clear(t->p);
    embz_qvec_clear(t->r);
    embz_target_clear(t->q);
    embz_family_clear(t->f);
    fmpq_clear(t->c); fmpq_clear(t->W); fmpq_clear(t->K);
}

/* |x - y| <= tol |y| */
static inline int close_rel(double x, double y, double tol)
{
    return fabs(x - y) <= tol * fabs(y);
}

/* the exact value of ||p||_(k) - ||p (x) q||_(k) (embz_qvec_kyfan) equals K */
static inline int is_maximiser(const tcase_t *t, slong k)
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
static inline void exact_blocks(fmpq_t B, fmpq_t p1, const tcase_t *t)
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

#endif
