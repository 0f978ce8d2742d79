/* The primal certificate: the solver's cumulative sums made into an exact sorted
 * probability vector, and its error recomputed exactly. Any such vector gives an upper bound
 * on OPT_n; the rounding only decides how close it is. */
#include <math.h>
#include "impl.h"

void _embz_opt_q_from_d(fmpq_t x, double v)
{
    if (!isfinite(v)) {
        fmpq_zero(x);
        return;
    }
    /* continued fraction of |v| in double precision; accepted only when the convergent is
     * within 2^-46 |v| (the test only chooses between two valid rationals) */
    double a = fabs(v);
    if (a > 0 && a < 1e15) {
        double h0 = 1, h1 = floor(a), k0 = 0, k1 = 1, rem = a - floor(a);
        for (int it = 0; it < 40; it++) {
            if (fabs(h1 / k1 - a) <= ldexp(a, -46)) {
                fmpz_t hz, kz;
                fmpz_init(hz); fmpz_init(kz);
                fmpz_set_d(hz, h1);
                fmpz_set_d(kz, k1);
                fmpq_set_fmpz_frac(x, hz, kz);
                if (v < 0) fmpq_neg(x, x);
                fmpz_clear(hz); fmpz_clear(kz);
                return;
            }
            if (rem == 0) break;
            double t = 1.0 / rem, q = floor(t);
            rem = t - q;
            double h2 = q * h1 + h0, k2 = q * k1 + k0;
            if (k2 > 1073741824.0 || h2 > 9e15) break;
            h0 = h1; h1 = h2; k0 = k1; k1 = k2;
        }
    }
    arf_t f;
    arf_init(f);
    arf_set_d(f, v);
    arf_get_fmpq(x, f);
    arf_clear(f);
}

void _embz_opt_normalise(fmpq *w, slong n, const fmpq_t s)
{
    /* one division per run of equal weights */
    fmpq_t last;
    fmpq_init(last);
    for (slong i = 0; i < n; i++) {
        if (i > 0 && fmpq_equal(w + i, last)) {
            fmpq_set(w + i, w + i - 1);
            continue;
        }
        fmpq_set(last, w + i);
        fmpq_div(w + i, w + i, s);
    }
    fmpq_clear(last);
}

void _embz_opt_primal(fmpq_t E, embz_qvec_t state, const double *P, slong n, ulong d)
{
    embz_qvec_t p;
    embz_qvec_init(p);
    p->p = _fmpq_vec_init(n);
    p->len = n;
    fmpq_t s, Pq, Pprev;
    fmpq_init(s); fmpq_init(Pq); fmpq_init(Pprev);
    /* the cumulative sums are rounded (their exact values have small denominators at an
     * optimal vertex, and the solver's doubles carry them to about 16 digits), the entries
     * are their exact differences, made non-negative and non-increasing */
    for (slong i = 0; i < n; i++) {
        if (isfinite(P[i])) _embz_opt_q_from_d(Pq, P[i]);
        else fmpq_set(Pq, Pprev);         /* (not from a solver that reports an optimum) */
        fmpq_sub(p->p + i, Pq, Pprev);
        fmpq_swap(Pq, Pprev);
        if (fmpq_sgn(p->p + i) < 0) fmpq_zero(p->p + i);
        if (i > 0 && fmpq_cmp(p->p + i, p->p + i - 1) > 0) fmpq_set(p->p + i, p->p + i - 1);
        fmpq_add(s, s, p->p + i);
    }
    fmpq_clear(Pq); fmpq_clear(Pprev);
    if (fmpq_is_zero(s)) {               /* nothing usable: the uniform vector */
        for (slong i = 0; i < n; i++) fmpq_one(p->p + i);
        fmpq_set_si(s, n, 1);
    }
    _embz_opt_error_weights(E, NULL, p->p, n, d);
    if (state != NULL) {
        _embz_opt_normalise(p->p, n, s);
        embz_qvec_clear(state);
        *state = *p;
        state->normalised = 0;
    } else {
        embz_qvec_clear(p);
    }
    fmpq_clear(s);
}
