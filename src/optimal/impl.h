/* Private declarations of src/optimal (not installed). */
#ifndef EMBZ_OPTIMAL_IMPL_H
#define EMBZ_OPTIMAL_IMPL_H

#include "embz/optimal.h"

/* The linear program in the unnormalised form (E scaled to 1): variables P_1..P_n (the
 * cumulative sums of an unnormalised sorted vector), maximise P_n subject to
 *   Ky Fan row k = 1..n, k = d m + r (0 <= r < d):
 *       d P_k - (d - r) P_m - r P_(m+1) <= d        (P_0 = 0)
 *   sorting row i = 1..n-1:   P_(i-1) - 2 P_i + P_(i+1) <= 0      (p_i >= p_(i+1))
 *   sorting row n:            P_(n-1) - P_n <= 0                   (p_n >= 0)
 * and P_i >= 0. Its optimum V is 1 / OPT_n(u_d) (docs/optimal.md). Rows 0..n-1 are the Ky
 * Fan rows (row k - 1 for k), rows n..2n-1 the sorting rows; columns 0..n-1 are P_1..P_n.
 * Coefficients are integers (|a| <= d). */
typedef struct {
    slong n;
    ulong d;
    slong nrows;
    slong *start;       /* row r holds entries start[r] .. start[r + 1] - 1 */
    slong *col;
    slong *val;
    slong *rhs;         /* each row: sum val x <= rhs */
} _embz_opt_lp_struct;

void _embz_opt_lp_init(_embz_opt_lp_struct *lp, slong n, ulong d);
void _embz_opt_lp_clear(_embz_opt_lp_struct *lp);

/* GLPK: solve the program; x (length n) receives the primal P, y (length 2n) the row duals
 * (>= 0 in the <= form), pivots the simplex iterations. EMBZ_ERR_LIMIT on a time-out,
 * EMBZ_ERR_PREC when the solver does not report an optimum. */
int _embz_opt_lp_solve(double *x, double *y, double *value, slong *pivots, int *used_exact,
                       const _embz_opt_lp_struct *lp, const embz_optimal_opts_struct *o,
                       embz_progress_fn progress, void *ctx, embz_err_t *err);

/* x <- a rational close to v: the continued-fraction convergent of v with denominator at
 * most 2^30 that lies within 2^-46 |v| of it, else v itself (a dyadic rational); 0 for a NaN
 * or an infinity. */
void _embz_opt_q_from_d(fmpq_t x, double v);

/* Primal certificate: state <- the sorted probability vector made of the double cumulative
 * sums P (length n; rounded, made non-negative and non-increasing, normalised), E <- its
 * error K(p -> p (x) u_d), exactly. */
void _embz_opt_primal(fmpq_t E, embz_qvec_t state, const double *P, slong n, ulong d);

/* Dual certificate: V <- an exact upper bound on the program's optimum (so 1/V is a lower
 * bound on OPT_n) from the double duals y: the sorting multipliers are rounded and clamped at
 * 0, the Ky Fan multipliers recomputed by back substitution so that the dual equations hold
 * exactly (the Ky Fan part of the matrix is triangular), negative ones set to 0 and their
 * residuals paid with the bounds 0 <= P_i <= i d / (d - 1). clamped <- how many. */
void _embz_opt_dual(fmpq_t V, slong *clamped, const double *y, const _embz_opt_lp_struct *lp);

/* E <- K(w / W -> (w / W) (x) u_d) for non-negative non-increasing weights w (length n,
 * W = their sum > 0), exactly, by the Ky Fan form; argk (may be NULL) a maximising k. */
void _embz_opt_error_weights(fmpq_t E, slong *argk, const fmpq *w, slong n, ulong d);
/* w <- w / s (one division per run of equal entries) */
void _embz_opt_normalise(fmpq *w, slong n, const fmpq_t s);

/* psi <- psi_d(n) = j + 1 + n / (d^j (d - 1)), j = floor(log_d n) (level), n >= 1. */
void _embz_opt_psi(fmpq_t psi, fmpz_t level, const fmpz_t n, ulong d);

/* ---- the fidelity-type optimum (fid_perron.c, fid_cert.c, fid.c) ---- */

/* par(j) = ceil(j / d), the parent of j in the tree of the sorted product (par(1) = 1) */
static inline slong _embz_opt_par(slong j, ulong d)
{
    return j <= 1 ? 1 : (slong) ((ulong) (j - 1) / d) + 1;
}

/* Double-precision estimates (not trusted): lambda <- just above lambda_max of the tree matrix
 * M (bisection on the positivity of the pivots of mu I - M), x <- its Perron vector (x_1 = 1,
 * made non-increasing), ell <- the multipliers 2 g_j (ell_1 = 1, made non-decreasing). All of
 * length n. Returns 0 when the estimate failed (a pivot or an entry not positive). */
int _embz_opt_perron_d(double *x, double *ell, double *lambda, slong n, ulong d);

/* a <- x 2^bits exactly, with bits such that every entry is an integer (x > 0 doubles). */
void _embz_opt_fid_scale(fmpz *a, slong *bits, const double *x, slong n);

/* f <- O(p, p (x) u_d)^2 exactly for the state p = a^2 / |a|^2; a lower bound on the best
 * overlap and on the best F_max. Returns 0 (f untouched) unless a is positive and
 * non-increasing. */
int _embz_opt_fid_lower(fmpq_t f, const fmpz *a, slong n, ulong d);

/* f <- a rational upper bound on F_max(q -> q (x) u_d) (and on O^2) for every sorted
 * probability vector q of length n, from the non-decreasing multipliers ell > 0 (ball
 * arithmetic at prec bits). Returns 0 unless ell is positive and non-decreasing. */
int _embz_opt_fid_upper(fmpq_t f, const double *ell, slong n, ulong d, slong prec);

/* The same two ends by classes of equal subtrees (fid_levels.c), for any n >= 1 whose Perron
 * vector stays within the range of doubles: f_lo, f_hi as for _embz_opt_fid_lower/_upper,
 * lambda the double estimate, bits the scale of the integer state. Returns 0 when an estimate
 * or a certificate could not be formed. */
int _embz_opt_fid_levels(fmpq_t f_lo, fmpq_t f_hi, double *lambda, slong *bits,
                         const fmpz_t n, ulong d, slong prec);

/* embz_optimal_fid, by classes of equal subtrees at every n when by_classes (no state). */
int _embz_opt_fid_run(embz_optimal_fid_t res, embz_qvec_t state, const fmpz_t n,
                      const embz_target_t q, int measure, int by_classes, embz_err_t *err);

#endif
