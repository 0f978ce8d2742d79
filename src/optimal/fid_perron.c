/* The tree matrix of the sorted overlap and its Perron vector, in double precision (an
 * estimate; the certificates in fid_cert.c do not trust it).
 *
 * For a sorted p = x^2 of length n and the target u_d, the overlap is
 * O = d^(-1/2) x^T M x with M the matrix of the tree j -> par(j) = ceil(j/d) on 1..n: 1/2 on
 * each edge, M_11 = 1 for the loop at the root (docs/optimal.md, section 6). par(j) < j for
 * j >= 2, so eliminating j = n, n - 1, ..., 1 removes leaves first and creates no fill: the
 * pivots of mu I - M are g_j = mu - M_jj - (1/4) sum over the children c of j of 1/g_c, and
 * mu I - M is positive definite exactly when all of them are positive, i.e. mu > lambda_max.
 * Bisection on that test gives lambda_max; back substitution at mu just above it,
 * x_1 = 1, x_j = x_par(j) / (2 g_j), gives the Perron vector. */
#include <math.h>
#include "impl.h"

/* pivots of mu I - M into g (length n, 0-based); acc is workspace (length n). Returns 1 when
 * every pivot is positive. */
static int pivots(double *g, double *acc, double mu, slong n, ulong d)
{
    for (slong j = 0; j < n; j++) acc[j] = 0.0;
    for (slong j = n; j >= 2; j--) {
        double v = mu - 0.25 * acc[j - 1];
        if (!(v > 0.0)) return 0;
        g[j - 1] = v;
        acc[_embz_opt_par(j, d) - 1] += 1.0 / v;
    }
    g[0] = mu - 1.0 - 0.25 * acc[0];
    return g[0] > 0.0;
}

int _embz_opt_perron_d(double *x, double *ell, double *lambda, slong n, ulong d)
{
    double *g = flint_malloc(sizeof(double) * n), *acc = flint_malloc(sizeof(double) * n);
    /* lambda_max >= M_11 = 1; Gershgorin: lambda_max <= max(1 + (d - 1)/2, (1 + d)/2) */
    double lo = 1.0, hi = 2.0 + 0.5 * (double) d;
    int ok = pivots(g, acc, hi, n, d);
    for (int it = 0; ok && it < 200; it++) {
        double mid = 0.5 * (lo + hi);
        if (!(mid > lo && mid < hi)) break;
        if (pivots(g, acc, mid, n, d)) hi = mid;
        else lo = mid;
    }
    if (ok) ok = pivots(g, acc, hi, n, d);
    if (ok) {
        x[0] = 1.0;
        ell[0] = 1.0;
        for (slong j = 2; j <= n; j++) {
            double v = 0.5 * x[_embz_opt_par(j, d) - 1] / g[j - 1];
            /* keep the vector sorted (rounding may break ties between equal entries) */
            x[j - 1] = v < x[j - 2] ? v : x[j - 2];
            /* the multipliers 2 g_j, kept non-decreasing (they are in exact arithmetic) */
            double l = 2.0 * g[j - 1];
            ell[j - 1] = l > ell[j - 2] ? l : ell[j - 2];
            if (!(x[j - 1] > 0.0) || !isfinite(ell[j - 1])) ok = 0;
        }
    }
    *lambda = hi;
    flint_free(g);
    flint_free(acc);
    return ok;
}
