/* Resource size: the smallest n whose embezzlement error reaches a goal. */
#ifndef EMBZ_SIZE_H
#define EMBZ_SIZE_H

#include "embz/measure.h"
#include "embz/error.h"
#include "embz/fidelity.h"

typedef enum {
    EMBZ_SIZE_FOUND = 0,      /* n found: E_n <= eps certified, E > eps certified at n_low
                                 (n - 1, or in the qubit search a size below n needing the
                                 same qubits) */
    EMBZ_SIZE_NOT_REACHED,    /* E > eps certified at the largest size tried */
    EMBZ_SIZE_UNDECIDED       /* enclosures straddle eps even at raised precision */
} embz_size_status_t;

#define EMBZ_SIZE_USED_EXACT (1 << 8)
/* a fidelity-type measure (embz_size_solve_measure): sizes decided by its explicit values
 * (n <= EMBZ_FIDELITY_MAX_N), and beyond by the analytic engine's values or bounds */
#define EMBZ_SIZE_USED_FID_EXPLICIT (1 << 9)
#define EMBZ_SIZE_USED_FID_ANALYTIC (1 << 10)

typedef struct {
    int status;
    fmpz_t n;             /* FOUND: the size */
    long qubits;          /* FOUND: qubits per side the state of size n needs, ceil(log2) of
                             its Schmidt rank (n, or a level family's dimension) */
    int levels;           /* a level family: the Schmidt rank is its dimension, not n */
    arb_t err_n;          /* enclosure of E at n */
    arb_t err_prev;       /* enclosure of E at n_low */
    int exhaustive;       /* every m < n was checked (E_m > eps certified) */
    long checked_below;   /* number of sizes below n with E > eps certified */
    fmpz_t stay_checked_to;/* E <= eps certified at every sampled size in [n, this] */
    long stay_samples;    /* how many sizes were sampled there */
    fmpz_t again_above;   /* a size > n with E > eps found by the sampling (0 if none) */
    fmpz_t undecided_lo, undecided_hi; /* UNDECIDED: the n whose side could not be decided */
    int bracket;          /* UNDECIDED with a certified bracket: E > eps at n_low (err_prev),
                             E <= eps at n (err_n), a crossing in (n_low, n]; qubits is the
                             count every size there needs when they agree, else -1 */
    fmpz_t largest;       /* NOT_REACHED: the largest size tried */
    arb_t err_largest;    /* NOT_REACHED: E there */
    int qubits_only;      /* the search stopped once ceil(log2 n) was decided */
    fmpz_t n_low;         /* the largest size known not to reach the goal (E > eps) */
    int small_by_bound;   /* sizes up to EMBZ_SIZE_EXHAUSTIVE excluded at once by
                             E_m >= p_1 (1 - q_max) > eps, not one by one */
    long evaluations;
    int explicit_only;    /* the analytic engine cannot take the family: the search stayed
                             within n <= reach, what explicit summation reaches
                             (EMBZ_EXPLICIT_REACH), why says why */
    slong reach;
    char why[200];
    int used;             /* how sizes were decided, bits: 1 << EMBZ_METHOD_EXPLICIT,
                             1 << EMBZ_METHOD_ANALYTIC (the engine in decision mode), and
                             EMBZ_SIZE_USED_EXACT (an exact tie decided in rational
                             arithmetic) */
    int measure;          /* the measure searched: EMBZ_MEASURE_K or EMBZ_MEASURE_PURIFIED;
                             "E" above means that measure */
    int bounds_seen;      /* purified: at some size the measure was known by bounds only (its
                             range, not a value; a side is still taken only when the whole
                             range lies on it) */
    int undecided_bounds; /* UNDECIDED where the measure had bounds only at a size left open
                             (a value there would be needed to decide it); the bracket is then
                             not narrowed further */
} embz_size_result_struct;
typedef embz_size_result_struct embz_size_result_t[1];

/* "found", "not_reached" or "undecided" (the id machine-readable outputs use). */
const char *embz_size_status_id(int status);

void embz_size_result_init(embz_size_result_t r);
void embz_size_result_clear(embz_size_result_t r);

/* Largest size the search tries: 2^(12 * 2^8) = 2^3072, about 10^925 (EMBZ_EXPLICIT_REACH
 * for a family the analytic engine cannot take). */
#define EMBZ_SIZE_MAX_LOG2 3072

/* Smallest n with E_n(q) <= eps for the family (measure K). Sizes up to EMBZ_SIZE_EXHAUSTIVE
 * are checked one by one; beyond, a bracketing search in ln n (regula falsi with bisection
 * safeguards) on certified enclosures locates the crossing, and sampled sizes below and above
 * it are checked. prec is raised (up to 4x) where an enclosure straddles eps. */
#define EMBZ_SIZE_EXHAUSTIVE 2048
/* Level families (embz/family.h) cost a level per unit of n (2^16 copies of a qubit state:
 * about 3 s): their search and its check above the answer stay at n <= this. */
#define EMBZ_SIZE_LEVELS_MAX_N 65536
int embz_size_solve(embz_size_result_t res, const embz_family_t f, const arb_t eps,
                    const embz_target_t q, slong prec, embz_err_t *err);

/* The same search stopped as soon as the number of qubits per side, ceil(log2 n), is decided:
 * res->n is then a size that reaches the goal, res->n_low < n one that does not, with
 * ceil(log2 (n_low + 1)) = ceil(log2 n); sampling above n is lighter. */
int embz_size_solve_qubits(embz_size_result_t res, const embz_family_t f, const arb_t eps,
                           const embz_target_t q, slong prec, embz_err_t *err);

/* Either search (qubits_only selects) for an exact rational goal: where an enclosure still
 * straddles eps at the highest precision, a small size (n <= 4096, n entries times the
 * target's at most 65536) whose weights are rational at the integers (embz_expr_eval_fmpq)
 * is decided exactly, so that E_n = eps exactly counts as reaching the goal. */
int embz_size_solve_exact_goal(embz_size_result_t res, const embz_family_t f, const fmpq_t eps,
                               const embz_target_t q, slong prec, int qubits_only,
                               embz_err_t *err);

/* The same search (qubits_only as in embz_size_solve_qubits) for a measure of embz/fidelity.h:
 * EMBZ_MEASURE_K (as embz_size_solve) or EMBZ_MEASURE_PURIFIED, the purified distance
 * P = sqrt(1 - F_max). Every side of eps is taken from the certified range of P that
 * embz_fidelity gives at that size: a value (explicit sizes; beyond, the analytic engine's
 * where its bounds meet) or two-sided bounds; the side is taken only when the whole range
 * lies on it, else the precision is raised (prec, 2 prec, 4 prec, stopping early when the
 * range does not shrink with it) and then the size is undecided. The bound
 * E_m >= p_1 (1 - q_max) excludes small sizes for P too (P >= K). No exact ties. Other
 * measures (fidelity, overlap: larger is better) are EMBZ_ERR_INPUT. */
int embz_size_solve_measure(embz_size_result_t res, const embz_family_t f, const arb_t eps,
                            const embz_target_t q, int measure, int qubits_only, slong prec,
                            embz_err_t *err);

/* ---- goals no size reaches ---- */
/* 1 when the target is majorized by one ebit, that is its largest entry is at most 1/2 (every
 * uniform target, ebits:J, and vectors like (0.5, 0.3, 0.2)); else 0. Then p (x) q is
 * majorized by p (x) (1/2, 1/2) for every Schmidt vector p, so no Ky Fan norm of p (x) q
 * exceeds that of p (x) (1/2, 1/2), and E_n(q) >= E_n(one ebit) for every family and n. */
int embz_target_below_ebit(const embz_target_t q);

/* The limit of the one-ebit error E_n as n grows, when the asymptotic route derives it (a
 * weight that does not depend on n): 1 and the limit in L (a ball); else 0. */
int embz_family_ebit_limit(arb_t L, const embz_family_t f, slong prec);

/* "Never": the search did not reach the goal (res->status NOT_REACHED), the one-ebit limit
 * is known (limit_known, limit) and lies above the goal, and the target is majorized by
 * one ebit, so that its error stays above that limit too. 1 or 0. */
int embz_size_never(const embz_size_result_t res, int limit_known, const arb_t limit,
                    const embz_target_t q, const arb_t goal);

#endif
