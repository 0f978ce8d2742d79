/* Helpers shared by the Check suites (header only: every function is static inline, so a
 * suite that does not use one pays nothing and gets no warning). */
#ifndef EMBZ_TESTUTIL_H
#define EMBZ_TESTUTIL_H

#include <check.h>
#include "embz.h"

/* v <- the vector written in spec (as the command line reads it); fails the test otherwise */
static inline void tu_qvec_set(embz_qvec_t v, const char *spec)
{
    embz_err_t err;
    embz_err_clear(&err);
    ck_assert_msg(embz_qvec_parse(v, spec, 0, &err) == EMBZ_OK, "%s: %s", spec, err.text);
}

/* v <- len zero entries (v is emptied first) */
static inline void tu_qvec_alloc(embz_qvec_t v, long len)
{
    embz_qvec_clear(v);
    embz_qvec_init(v);
    v->len = len;
    v->p = _fmpq_vec_init(len);
}

/* v <- a (x) b */
static inline void tu_qvec_tensor(embz_qvec_t v, const embz_qvec_t a, const embz_qvec_t b)
{
    tu_qvec_alloc(v, a->len * b->len);
    for (long i = 0; i < a->len; i++)
        for (long j = 0; j < b->len; j++)
            fmpq_mul(v->p + i * b->len + j, a->p + i, b->p + j);
}

/* q <- the target written in spec; fails the test otherwise */
static inline void tu_target_set(embz_target_t q, const char *spec)
{
    embz_err_t err;
    embz_err_clear(&err);
    ck_assert_msg(embz_target_parse(q, spec, 0, &err) == EMBZ_OK, "%s: %s", spec, err.text);
}

/* E <- E_n(u_d) for the weights 1/i, exactly: 1 - (H_s + r/(d(s+1))) / H_n for n = d s + r,
 * 0 <= r < d (docs/math.md section 6, [derived]), with FLINT's harmonic numbers */
static inline void tu_inverse_error_exact(fmpq_t E, ulong n, ulong d)
{
    ulong s = n / d, r = n % d;
    fmpq_t Hs, Hn, t;
    fmpq_init(Hs); fmpq_init(Hn); fmpq_init(t);
    arith_harmonic_number(Hs, s);
    arith_harmonic_number(Hn, n);
    fmpq_set_si(t, (slong) r, (slong) (d * (s + 1)));
    fmpq_add(Hs, Hs, t);
    fmpq_div(Hs, Hs, Hn);
    fmpq_one(E);
    fmpq_sub(E, E, Hs);
    fmpq_clear(Hs); fmpq_clear(Hn); fmpq_clear(t);
}

/* The body of every suite's main: run s with CK_NORMAL output; 1 when a test failed. */
static inline int tu_run_suite(Suite *s)
{
    SRunner *sr = srunner_create(s);
    srunner_run_all(sr, CK_NORMAL);
    int failed = srunner_ntests_failed(sr);
    srunner_free(sr);
    flint_cleanup();
    return failed != 0;
}

#endif
