/* Certified bounds on the best overlap and the best F_max for u_d (docs/optimal.md,
 * section 6), each from an explicit object checked in exact or ball arithmetic:
 *  - lower end: a sorted vector a of positive integers is the state p = a^2 / |a|^2; its
 *    overlap is O = d^(-1/2) (a^T M a) / (a^T a), exactly, and F_max(p -> p (x) u_d) >= O^2;
 *  - upper end: for non-decreasing ell_i > 0 the multipliers lambda_i = ell_i / (2 sqrt d) bound
 *    sqrt(F_max) of every sorted state by sum_k q_k c_k, a linear function of q whose
 *    coefficients are c_k = (ell_k + sum over the children i of k of 1/ell_i) / (2 sqrt d)
 *    (the children of 1 include 1 itself); so F_max <= max_k (2 sqrt d c_k)^2 / (4 d), and
 *    O^2 <= F_max as well. */
#include <math.h>
#include "impl.h"

int _embz_opt_fid_lower(fmpq_t f, const fmpz *a, slong n, ulong d)
{
    for (slong j = 0; j < n; j++)
        if (fmpz_sgn(a + j) <= 0 || (j > 0 && fmpz_cmp(a + j, a + j - 1) > 0)) return 0;
    fmpz_t N, S;
    fmpz_init(N); fmpz_init(S);
    /* N = a^T M a = a_1^2 + sum_(j >= 2) a_j a_par(j), S = a^T a */
    fmpz_mul(N, a, a);
    for (slong j = 2; j <= n; j++) fmpz_addmul(N, a + j - 1, a + _embz_opt_par(j, d) - 1);
    for (slong j = 0; j < n; j++) fmpz_addmul(S, a + j, a + j);
    /* O^2 = N^2 / (d S^2) */
    fmpz_mul(N, N, N);
    fmpz_mul(S, S, S);
    fmpz_mul_ui(S, S, d);
    fmpq_set_fmpz_frac(f, N, S);
    fmpz_clear(N); fmpz_clear(S);
    return 1;
}

int _embz_opt_fid_upper(fmpq_t f, const double *ell, slong n, ulong d, slong prec)
{
    for (slong j = 0; j < n; j++)
        if (!(ell[j] > 0.0) || (j > 0 && ell[j] < ell[j - 1])) return 0;
    arb_ptr c = _arb_vec_init(n);
    arb_t t, best;
    arb_init(t); arb_init(best);
    for (slong j = 0; j < n; j++) arb_set_d(c + j, ell[j]);
    for (slong i = 1; i <= n; i++) {       /* 1/ell_i to its parent (1 is its own child) */
        arb_set_d(t, ell[i - 1]);
        arb_inv(t, t, prec);
        slong k = _embz_opt_par(i, d);
        arb_add(c + k - 1, c + k - 1, t, prec);
    }
    arb_zero(best);
    for (slong k = 0; k < n; k++) arb_max(best, best, c + k, prec);
    /* F <= best^2 / (4 d), rounded up to a rational */
    arb_mul(best, best, best, prec);
    arb_div_ui(best, best, 4 * d, prec);
    arf_t u;
    arf_init(u);
    arb_get_ubound_arf(u, best, prec);
    int ok = arf_is_finite(u);
    if (ok) arf_get_fmpq(f, u);
    arf_clear(u);
    arb_clear(t); arb_clear(best);
    _arb_vec_clear(c, n);
    return ok;
}

void _embz_opt_fid_scale(fmpz *a, slong *bits, const double *x, slong n)
{
    /* a_j = x_j 2^B exactly: B large enough that the smallest entry becomes an integer */
    int emin = 0;
    for (slong j = 0; j < n; j++) {
        int e;
        frexp(x[j], &e);
        if (j == 0 || e < emin) emin = e;
    }
    slong B = 53 - (slong) emin;
    if (B < 0) B = 0;
    for (slong j = 0; j < n; j++) {
        int e;
        double m = frexp(x[j], &e);                 /* x = m 2^e, 1/2 <= m < 1 */
        fmpz_set_d(a + j, ldexp(m, 53));            /* an integer below 2^53, exact */
        fmpz_mul_2exp(a + j, a + j, (ulong) (e - 53 + B));
    }
    *bits = B;
}
