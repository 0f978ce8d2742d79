/* The dual certificate. The program max P_n s.t. A x <= b, x >= 0 has the dual
 * min b^T y s.t. A^T y >= e_n, y >= 0, and every such y bounds the optimum: for feasible x,
 * P_n = e_n^T x <= (A^T y)^T x = y^T A x <= y^T b (weak duality; x >= 0 and y >= 0 are what
 * the two inequalities need). The solver's y is only approximately feasible, so:
 *  - the sorting multipliers are taken from it, rounded to rationals and clamped at 0;
 *  - the Ky Fan multipliers are recomputed: in column j the Ky Fan row k = j has the entry
 *    d (d - 1 for j = 1) and every other Ky Fan row with an entry there has k > j, so going
 *    from j = n down to 1, y_j = max(0, (e_n - the other rows' contributions)_j / a_jj)
 *    makes column j of A^T y at least e_n, exactly (equal unless the clamp acted).
 * Then b^T y = d * (sum of the Ky Fan multipliers) is an exact upper bound on the optimum,
 * whatever the solver's accuracy was. */
#include <math.h>
#include "impl.h"

void _embz_opt_dual(fmpq_t V, slong *clamped, const double *y, const _embz_opt_lp_struct *lp)
{
    slong n = lp->n;
    fmpq *acc = _fmpq_vec_init(n);     /* column sums of A^T y over the rows done so far */
    fmpq *yk = _fmpq_vec_init(n);
    fmpq_t ys, t;
    fmpq_init(ys); fmpq_init(t);
    /* the sign convention of the solver: the Ky Fan multipliers sum to a positive number */
    double sk = 0;
    for (slong k = 0; k < n; k++) sk += y[k];
    double sign = sk < 0 ? -1.0 : 1.0;
    *clamped = 0;
    for (slong i = 0; i < n; i++) {
        double v = sign * y[n + i];
        if (!(v > 0) || !isfinite(v)) continue;   /* clamped at 0 (also a NaN or infinity) */
        _embz_opt_q_from_d(ys, v);
        slong r = n + i;
        for (slong z = lp->start[r]; z < lp->start[r + 1]; z++) {
            fmpq_mul_si(t, ys, lp->val[z]);
            fmpq_add(acc + lp->col[z], acc + lp->col[z], t);
        }
    }
    fmpq_zero(V);
    for (slong j = n - 1; j >= 0; j--) {
        /* row j: its first entry is the diagonal (column j) */
        slong z0 = lp->start[j];
        /* need: acc_j + a_jj y_j >= c_j, c_j = 1 for the last column */
        fmpq_neg(t, acc + j);
        if (j == n - 1) fmpq_add_si(t, t, 1);
        if (fmpq_sgn(t) <= 0) {
            fmpq_zero(yk + j);
            if (fmpq_sgn(t) < 0) (*clamped)++;
            continue;
        }
        {
            fmpz_t a;
            fmpz_init_set_si(a, lp->val[z0]);
            fmpq_div_fmpz(yk + j, t, a);
            fmpz_clear(a);
        }
        for (slong z = z0 + 1; z < lp->start[j + 1]; z++) {
            fmpq_mul_si(t, yk + j, lp->val[z]);
            fmpq_add(acc + lp->col[z], acc + lp->col[z], t);
        }
        fmpq_add(V, V, yk + j);
    }
    fmpq_mul_si(V, V, (slong) lp->d);   /* b_k = d on every Ky Fan row, 0 on sorting rows */
    fmpq_clear(ys); fmpq_clear(t);
    _fmpq_vec_clear(acc, n);
    _fmpq_vec_clear(yk, n);
}
