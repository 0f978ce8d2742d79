/* The optimal baseline: the smallest embezzlement error OPT_n(q) that any state of Schmidt rank
 * at most n reaches for a uniform target q = u_d (one ebit, j ebits, a d-level maximally
 * entangled state), a state reaching it, and the smallest rank for an error goal.
 *
 *     OPT_n(u_d) = min over sorted probability vectors p of length n of K(p -> p (x) u_d).
 *
 * Two ways, both certified (docs/optimal.md has the derivations):
 *  - the closed form OPT_n(u_d) = 1 / psi_d(n), psi_d(n) = j + 1 + n / (d^j (d - 1)),
 *    j = floor(log_d n), exact at every n (a proof: a lower bound by induction over the Ky Fan
 *    constraints and the state p_i proportional to d^(-ceil(log_d i)) reaching it);
 *  - the linear program in the cumulative sums P_k, solved by GLPK's simplex in double
 *    precision and certified in exact rationals: the primal rounded to a sorted probability
 *    vector whose error is recomputed exactly (an upper bound), and a dual vector whose
 *    equations are made to hold exactly (a lower bound by weak duality). */
#ifndef EMBZ_OPTIMAL_H
#define EMBZ_OPTIMAL_H

#include "embz/vec.h"
#include "embz/analysis.h"   /* embz_progress_fn */
#include "embz/fidelity.h"   /* embz_measure_t */

typedef enum {
    EMBZ_OPT_HOW_NONE = 0,
    EMBZ_OPT_HOW_CLOSED,     /* the closed form (a proof, docs/optimal.md) */
    EMBZ_OPT_HOW_LP          /* the linear program, primal and dual certified exactly */
} embz_opt_how_t;

/* Where the simplex starts. */
typedef enum {
    EMBZ_OPT_START_EQUAL = 0, /* every Ky Fan constraint tight (the equalising guess of a
                                 minimax problem): no pivots when it is optimal */
    EMBZ_OPT_START_SOLVER     /* GLPK's own advanced basis (about n pivots, time ~ n^2) */
} embz_opt_start_t;

/* Largest rank of the linear program (two rows and about 5.5 non-zeros per rank; GLPK needs
 * about 1.7 kB per rank: 1.7 GB at 10^6, measured 2026-12). */
#define EMBZ_OPTIMAL_LP_MAX_N 1000000L
/* Largest rank for GLPK's own start (the time grows like n^2: about 3 s at 10^4). */
#define EMBZ_OPTIMAL_LP_SOLVER_START_MAX_N 20000L
/* Largest rank for which GLPK's exact rational simplex refines the solution (no pivots
 * after an optimal start; its rational LU costs grow quickly with n). */
#define EMBZ_OPTIMAL_LP_EXACT_MAX_N 2000L
/* Largest rank for which the state is formed as an explicit vector. */
#define EMBZ_OPTIMAL_STATE_MAX_N 10000000L
/* Largest rank for which embz_optimal_closed recomputes the state's error from its vector. */
#define EMBZ_OPTIMAL_CHECK_MAX_N 100000L
/* Largest optimal rank that embz_optimal_eps returns: n < 2^this. */
#define EMBZ_OPTIMAL_MAX_BITS 200000L

typedef struct {
    int start;          /* embz_opt_start_t */
    int exact;          /* 1 (default): glp_exact after the simplex for n <= ..._EXACT_MAX_N;
                           0: double precision only */
    double seconds;     /* > 0: the simplex stops after this long (EMBZ_ERR_LIMIT) */
} embz_optimal_opts_struct;
typedef embz_optimal_opts_struct embz_optimal_opts_t[1];

void embz_optimal_opts_init(embz_optimal_opts_t o);

typedef struct {
    int how;             /* embz_opt_how_t */
    ulong d;             /* the target's dimension */
    fmpq_t lower, upper; /* certified: lower <= OPT_n(u_d) <= upper (exact rationals) */
    int exact;           /* lower == upper */
    /* EMBZ_OPT_HOW_CLOSED */
    fmpz_t level;        /* j = floor(log_d n) */
    int state_checked;   /* the error of the optimal state was recomputed exactly from its
                            vector and equals the closed form (n <= EMBZ_OPTIMAL_CHECK_MAX_N) */
    /* EMBZ_OPT_HOW_LP */
    slong rows, cols, nnz;
    int start;           /* embz_opt_start_t */
    int used_exact;      /* GLPK's exact rational simplex refined the basis */
    slong pivots;        /* simplex iterations */
    double lp_value;     /* the solver's optimum in double precision (an estimate only) */
    int primal_exact;    /* the rounded primal is an exact optimum of the LP (its error equals
                            the dual bound) */
    slong dual_clamped;  /* Ky Fan multipliers set to 0 because the other rows already covered
                            their column (the dual stays feasible) */
    double solve_seconds, certify_seconds;
} embz_optimal_result_struct;
typedef embz_optimal_result_struct embz_optimal_result_t[1];

void embz_optimal_result_init(embz_optimal_result_t r);
void embz_optimal_result_clear(embz_optimal_result_t r);

/* res <- OPT_n(q) by the closed form, exact, for any n >= 1 (the state's error is also
 * recomputed from its vector for n <= EMBZ_OPTIMAL_CHECK_MAX_N: res->state_checked; a
 * disagreement would be a failure, EMBZ_ERR_PREC).
 * Errors: EMBZ_ERR_UNSUPPORTED for a target vector, EMBZ_ERR_INPUT for n < 1. */
int embz_optimal_closed(embz_optimal_result_t res, const fmpz_t n, const embz_target_t q,
                        embz_err_t *err);

/* res <- certified bounds on OPT_n(q) from the linear program, 1 <= n <=
 * EMBZ_OPTIMAL_LP_MAX_N (EMBZ_ERR_LIMIT beyond, and beyond
 * EMBZ_OPTIMAL_LP_SOLVER_START_MAX_N with GLPK's own start). state (may be NULL) receives
 * the rounded primal: a sorted probability vector of length n whose error is res->upper.
 * progress (may be NULL) is called with (stage, 4) at the stages build, solve, primal, dual
 * and during the solve. o may be NULL (the defaults). */
int embz_optimal_lp(embz_optimal_result_t res, embz_qvec_t state, slong n,
                    const embz_target_t q, const embz_optimal_opts_t o,
                    embz_progress_fn progress, void *ctx, embz_err_t *err);

/* p <- the optimal state of rank n for u_d: p_i proportional to d^(-ceil(log_d i)), sorted,
 * exact (n <= EMBZ_OPTIMAL_STATE_MAX_N, else EMBZ_ERR_LIMIT). */
int embz_optimal_state(embz_qvec_t p, slong n, const embz_target_t q, embz_err_t *err);

/* E <- K(p -> p (x) u_d) exactly for a sorted (non-increasing) exact probability vector p;
 * argk (may be NULL) a maximising Ky Fan index. */
void embz_optimal_uniform_error(fmpq_t E, slong *argk, const embz_qvec_t p, ulong d);

/* n <- the smallest rank with OPT_n(q) <= eps, for 0 < eps (exact); OPT_n is non-increasing
 * in n (padding a zero keeps the error), so every larger rank reaches eps too. Errors:
 * EMBZ_ERR_INPUT for eps <= 0, EMBZ_ERR_LIMIT when n would need more than
 * EMBZ_OPTIMAL_MAX_BITS bits, EMBZ_ERR_UNSUPPORTED for a target vector. */
int embz_optimal_eps(fmpz_t n, const fmpq_t eps, const embz_target_t q, embz_err_t *err);

/* ---- a family against the optimum ---- */
typedef struct {
    fmpq_t opt;            /* OPT_n(q), exact */
    arb_t ratio;           /* E_n / OPT_n (>= 1 up to the enclosure's width) */
    int have_rank;         /* the rank below was found (the error's lower end is > 0) */
    fmpz_t rank_lo, rank_hi;  /* the smallest rank whose optimum reaches E_n lies in
                                 [rank_lo, rank_hi] (equal when the enclosure decides it;
                                 rank_hi <= n since E_n >= OPT_n) */
    slong qubits;          /* ceil(log2 n): qubits per side of the family's state */
    slong opt_qubits_lo, opt_qubits_hi;  /* ceil(log2 rank_lo), ceil(log2 rank_hi) */
} embz_optimal_vs_struct;
typedef embz_optimal_vs_struct embz_optimal_vs_t[1];

void embz_optimal_vs_init(embz_optimal_vs_t v);
void embz_optimal_vs_clear(embz_optimal_vs_t v);
/* v <- how a state of rank n with certified error enclosure `error` compares with the
 * optimum: the ratio E_n / OPT_n and the smallest rank (and qubits per side) at which the
 * optimum reaches the same error; the extra qubits per side of the family are
 * qubits - opt_qubits_hi .. qubits - opt_qubits_lo. Uniform targets only
 * (EMBZ_ERR_UNSUPPORTED). */
int embz_optimal_vs(embz_optimal_vs_t v, const arb_t error, const fmpz_t n,
                    const embz_target_t q, embz_err_t *err);

/* ---- the fidelity-type measures ----
 * The best F_max(p -> p (x) u_d) and the best local-unitary overlap O^2 over sorted states of
 * rank at most n are the same number, (lambda_max(M))^2 / d with M the matrix of the tree
 * j -> ceil(j / d) (docs/optimal.md, section 6, derived here); the best purified distance is
 * sqrt(1 - that). It is enclosed by two explicit certificates: an exact state (the Perron
 * vector rounded to integers a, p = a^2 / |a|^2, its overlap computed exactly: lower end) and
 * non-decreasing Lagrange multipliers whose bound holds for every sorted state (upper end). */

/* Largest rank at which the fidelity-type optimum is computed node by node (O(n) doubles and
 * exact integers; the state is formed only there). */
#define EMBZ_OPTIMAL_FID_MAX_N (WORD(1) << 22)
/* Beyond, by classes of equal subtrees (O(log^2 n) classes): n < 2^this. */
#define EMBZ_OPTIMAL_FID_MAX_BITS 1000

typedef struct {
    int measure;          /* embz_measure_t: FIDELITY, PURIFIED or OVERLAP */
    ulong d;
    fmpz_t n;
    int levels;           /* computed by classes of equal subtrees (n > EMBZ_OPTIMAL_FID_MAX_N) */
    fmpq_t f_lower, f_upper;  /* certified: f_lower <= best F_max = best O^2 <= f_upper */
    arb_t value;          /* the measure's enclosure: [f_lower, f_upper] for fidelity and
                             overlap, [sqrt(1 - f_upper), sqrt(1 - f_lower)] for purified */
    double lambda;        /* lambda_max(M) in double precision (an estimate only) */
    slong bits;           /* the state's integers are the Perron vector times 2^bits */
    double seconds;
} embz_optimal_fid_struct;
typedef embz_optimal_fid_struct embz_optimal_fid_t[1];

void embz_optimal_fid_init(embz_optimal_fid_t r);
void embz_optimal_fid_clear(embz_optimal_fid_t r);

/* res <- the certified best value of the measure over states of rank at most n for a uniform
 * target, 1 <= n < 2^EMBZ_OPTIMAL_FID_MAX_BITS (EMBZ_ERR_LIMIT beyond); state (may be NULL;
 * n <= EMBZ_OPTIMAL_FID_MAX_N, else EMBZ_ERR_LIMIT) receives the lower end's state, a sorted
 * exact probability vector of length n whose overlap squared is res->f_lower (and whose
 * F_max is at least that). Errors:
 * EMBZ_ERR_UNSUPPORTED for a target vector or the measure K, EMBZ_ERR_PREC if a certificate
 * could not be formed. */
int embz_optimal_fid(embz_optimal_fid_t res, embz_qvec_t state, const fmpz_t n,
                     const embz_target_t q, int measure, embz_err_t *err);

/* The smallest rank n* whose best purified distance is at most eps (0 < eps, exact), bracketed:
 * n_lo <= n* <= n_hi, equal unless an enclosure straddles eps. OPT^P_n is non-increasing in n
 * (appending a zero changes neither F_max nor the overlap), so every rank >= n* reaches eps.
 * at_hi <- the enclosure at n_hi (<= eps), before_lo <- the enclosure at n_lo - 1 (> eps;
 * indeterminate when n_lo = 1). EMBZ_ERR_LIMIT when the goal is not certified to be reached
 * below 2^EMBZ_OPTIMAL_FID_MAX_BITS. */
int embz_optimal_fid_eps(fmpz_t n_lo, fmpz_t n_hi, arb_t at_hi, arb_t before_lo,
                         const fmpq_t eps, const embz_target_t q, embz_err_t *err);

/* ---- a family's fidelity-type value against the optimum ---- */
typedef struct {
    embz_optimal_fid_t opt;   /* the optimum at the family's rank n */
    int have_rank;            /* the rank below was found (below 2^EMBZ_OPTIMAL_FID_MAX_BITS) */
    fmpz_t rank_lo, rank_hi;  /* the smallest rank whose optimum reaches the family's value lies
                                 in [rank_lo, rank_hi] (rank_hi <= n) */
    slong qubits;             /* ceil(log2 n) */
    slong opt_qubits_lo, opt_qubits_hi;   /* ceil(log2 rank_lo), ceil(log2 rank_hi) */
} embz_optimal_fid_vs_struct;
typedef embz_optimal_fid_vs_struct embz_optimal_fid_vs_t[1];

void embz_optimal_fid_vs_init(embz_optimal_fid_vs_t v);
void embz_optimal_fid_vs_clear(embz_optimal_fid_vs_t v);
/* v <- the optimum of the measure at rank n and the smallest rank at which the optimal state
 * reaches a value certified to lie in [lower, upper] (a family's fidelity, overlap squared or
 * purified distance at rank n). Uniform targets, 1 <= n < 2^EMBZ_OPTIMAL_FID_MAX_BITS. */
int embz_optimal_fid_vs(embz_optimal_fid_vs_t v, const arb_t lower, const arb_t upper,
                        const fmpz_t n, const embz_target_t q, int measure, embz_err_t *err);

#endif
