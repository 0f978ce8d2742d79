/* Helpers of the tests of src/optimal (header only). */
#ifndef EMBZ_TOPT_H
#define EMBZ_TOPT_H

#include <stdlib.h>
#include "../testutil.h"
#include "optimal/impl.h"

/* fewer cases under EMBZ_QUICK=1 */
static inline int topt_quick(void)
{
    const char *q = getenv("EMBZ_QUICK");
    return q != NULL && q[0] == '1';
}

/* E <- K(p -> p (x) u_d) by measure's own exact routine (the threshold form of
 * embz_qvec_distance, a path independent of src/optimal) */
static inline void topt_distance(fmpq_t E, const embz_qvec_t p, ulong d)
{
    embz_qvec_t u, r;
    embz_qvec_init(u); embz_qvec_init(r);
    tu_qvec_alloc(u, (long) d);
    for (ulong j = 0; j < d; j++) fmpq_set_si(u->p + j, 1, d);
    tu_qvec_tensor(r, p, u);
    embz_qvec_distance(E, NULL, p, r);
    embz_qvec_clear(u); embz_qvec_clear(r);
}

/* p <- a random sorted probability vector of length n (rational entries; some ties, some
 * zeros at the end) */
static inline void topt_random_sorted(embz_qvec_t p, slong n, flint_rand_t rs)
{
    tu_qvec_alloc(p, n);
    fmpq_t s;
    fmpq_init(s);
    for (slong i = 0; i < n; i++) {
        ulong kind = n_randint(rs, 6);
        if (kind == 0 && i > 0) fmpq_set(p->p + i, p->p + i - 1);
        else fmpq_set_si(p->p + i, (slong) n_randint(rs, 1000), 1 + n_randint(rs, 50));
        if (i > 0 && fmpq_cmp(p->p + i, p->p + i - 1) > 0) fmpq_set(p->p + i, p->p + i - 1);
        fmpq_add(s, s, p->p + i);
    }
    if (fmpq_is_zero(s)) {
        fmpq_one(p->p);
        fmpq_one(s);
    }
    for (slong i = 0; i < n; i++) fmpq_div(p->p + i, p->p + i, s);
    fmpq_clear(s);
}

/* psi <- psi_d(n) by its recursion (docs/optimal.md): psi(1) = d/(d-1) and, for k = d m + r
 * >= 2, psi(k) = 1 + ((d - r) psi(m) + r psi(m + 1)) / d with psi(0) = 0; all k <= n */
static inline void topt_psi_recursion(fmpq *psi, slong n, ulong d)
{
    fmpq_zero(psi);
    if (n >= 1) fmpq_set_si(psi + 1, (slong) d, d - 1);
    fmpq_t a, b;
    fmpq_init(a); fmpq_init(b);
    for (slong k = 2; k <= n; k++) {
        slong m = k / (slong) d, r = k % (slong) d;
        fmpq_mul_si(a, psi + m, (slong) d - r);
        if (r) {
            fmpq_mul_si(b, psi + m + 1, r);
            fmpq_add(a, a, b);
        }
        fmpq_set_si(b, 1, d);
        fmpq_mul(a, a, b);
        fmpq_add_si(psi + k, a, 1);
    }
    fmpq_clear(a); fmpq_clear(b);
}

#endif
