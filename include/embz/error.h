/* The embezzlement error E_n(q) of a family: its result, the two methods, and the evaluator
 * that chooses and combines them. Every caller of the library that needs E_n goes through
 * the evaluator (or embz_error, its one-call form), so that the policy (which method from
 * which size, fallbacks, precision steps, decision mode) is written in one place, src/error/eval.c.
 *
 * E_n(q) = K(p^(n) -> p^(n) (x) q), the conversion distance (embz/measure.h) from the n-th
 * state of the family to itself with the target q appended (docs/measures.md). */
#ifndef EMBZ_ERROR_H
#define EMBZ_ERROR_H

#include "embz/vec.h"
#include "embz/family.h"
#include "embz/fidelity.h"
#include "embz/levels.h"

typedef enum { EMBZ_METHOD_AUTO = 0, EMBZ_METHOD_EXPLICIT, EMBZ_METHOD_ANALYTIC } embz_method_t;

/* How an enclosure of E_n(q) was obtained, as numbers and flags; embz_error_how_text
 * (embz/render.h) writes the words. */
typedef enum {
    EMBZ_HOW_NONE = 0,
    EMBZ_HOW_EXPLICIT,   /* explicit summation over i = 1..n */
    EMBZ_HOW_KYFAN,      /* analytic: the Ky Fan maximum by branch and bound (uniform targets) */
    EMBZ_HOW_THRESHOLD,  /* analytic: the threshold form max_t Phi(t) - Phi(d t) by branch and
                            bound over ln t (wide uniform targets) */
    EMBZ_HOW_GENERAL,    /* analytic, target vector: the threshold form of the vector, within
                            the majorization bracket */
    EMBZ_HOW_BRACKET,    /* analytic, target vector: the majorization bracket alone (the
                            threshold search gave no value: reason) */
    EMBZ_HOW_LEVELS,     /* a level family, level by level (embz/levels.h) */
    EMBZ_HOW_BLOCKS      /* a weight constant on blocks (i only inside floor and ceil): its
                            blocks up to n, level by level */
} embz_how_kind_t;

typedef enum {
    EMBZ_HOW_FALLBACK_NONE = 0,
    EMBZ_HOW_DECLINED,   /* explicit summation after the analytic engine declined (reason) */
    EMBZ_HOW_FAILED      /* explicit summation after the analytic engine failed (reason) */
} embz_how_fallback_t;

/* One run of the analytic engine. */
typedef struct {
    int kind;            /* EMBZ_HOW_KYFAN or EMBZ_HOW_THRESHOLD (EMBZ_HOW_NONE: no run) */
    slong terms;         /* weights summed explicitly before the tail (i = 1..terms) */
    slong tail_order;    /* order of the Euler-Maclaurin remainder */
    int tail_dir;        /* +1 weights non-increasing beyond terms, -1 non-decreasing */
    ulong d;             /* EMBZ_HOW_THRESHOLD: the target's dimension */
    slong bounds;        /* interval evaluations of the branch and bound */
    slong series;        /* tail series evaluated */
    slong integrals;     /* tail integrals evaluated */
    int budget_reached;  /* the search stopped at its budget: the upper end is loose */
    slong prec;
} embz_how_run_struct;

typedef struct {
    int kind;            /* embz_how_kind_t */
    slong prec;          /* working precision */
    /* EMBZ_HOW_EXPLICIT */
    int order;           /* +1 streamed (weights non-increasing), -1 streamed (non-decreasing),
                            0 stored and sorted */
    int ball_estimates;  /* the weights left double range: estimates from ball values */
    slong unit_exp;      /* the exact fixed-point sums count in units of 2^unit_exp */
    /* analytic */
    embz_how_run_struct run;    /* KYFAN, THRESHOLD: the run; GENERAL: the vector's threshold
                                   search */
    embz_how_run_struct upper;  /* GENERAL, BRACKET: the run for the bracket's upper end */
    ulong bracket_lo, bracket_hi;  /* GENERAL, BRACKET: E(uniform:lo) <= E(q) <= E(uniform:hi) */
    /* EMBZ_HOW_LEVELS, EMBZ_HOW_BLOCKS (levels: the number of blocks) */
    slong levels;        /* number of levels with a non-zero count */
    slong dim_bits;      /* the dimension (sum of the counts) has this many bits */
    int fallback;        /* embz_how_fallback_t */
    char reason[512];    /* the message behind fallback, or behind BRACKET */
} embz_error_how_struct;

typedef struct {
    arb_t error;        /* certified enclosure of E_n(q) */
    double estimate;    /* double fast-path value, NaN if not computed */
    fmpz_t argk;        /* Ky Fan index k at which the maximum is attained (sorted order) */
    int have_bounds;    /* block-mass bounds available (one ebit) */
    arb_t lower, upper; /* max(p1/2, sup B_m) <= E <= max(p1/2, 2 sup B_m) */
    int method;         /* EMBZ_METHOD_EXPLICIT or EMBZ_METHOD_ANALYTIC */
    int order;          /* +1 weights non-increasing in i, -1 non-decreasing, 0 neither (sorted) */
    embz_error_how_struct how;  /* how it was computed */
    int decided;        /* decision mode of the analytic engine: +1 when it stopped because E is
                           proven above the threshold (the enclosure's upper end is then only
                           the trivial 1), -1 below, 0 otherwise */
    int used;           /* evaluator: the methods that produced an enclosure on the way, bits
                           1 << EMBZ_METHOD_EXPLICIT and 1 << EMBZ_METHOD_ANALYTIC */
    int steps;          /* evaluator: precision steps run (embz_eval_side) */
} embz_error_result_struct;
typedef embz_error_result_struct embz_error_result_t[1];

void embz_error_result_init(embz_error_result_t r);
void embz_error_result_clear(embz_error_result_t r);

/* Largest n handled by explicit mode. */
#define EMBZ_EXPLICIT_MAX_N 100000000L

/* E_n(q) by explicit summation over i = 1..n (n <= EMBZ_EXPLICIT_MAX_N). Always fills the
 * double estimate too. Monotone weights are streamed in O(1) memory; otherwise the weights are
 * stored and sorted (n <= 2^24). The enclosure's radius is at least about n d 2^-120 (exact
 * fixed-point sums), whatever prec. */
int embz_error_explicit(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                        const embz_target_t q, slong prec, embz_err_t *err);

/* The double fast path alone (no certification): estimate of E_n(q), the Ky Fan index where
 * the estimate is largest, and the detected order of the weights (+1 non-increasing,
 * -1 non-decreasing, 0 neither: stored and sorted). */
int embz_error_explicit_estimate(double *E, slong *argk, int *order, const embz_family_t f,
                                 const fmpz_t n, const embz_target_t q, embz_err_t *err);

/* E_n(q) by the analytic engine (any n that fits an fmpz). */
int embz_error_analytic(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                        const embz_target_t q, slong prec, embz_err_t *err);


/* ---- the evaluator ----
 * The options say which method runs from which size and what happens when it fails; every
 * size field <= 0 means its default. The evaluator itself is read-only while it evaluates:
 * what one evaluation leaves for the next (the analytic engine's certified tail, one per
 * precision step) lives in a workspace, one per thread. */
typedef enum {
    EMBZ_FALLBACK_EXPLICIT = 0, /* explicit summation (within explicit_max) after any analytic
                                   failure other than an invalid weight (EMBZ_ERR_DOMAIN); the
                                   engine's reason goes in how.reason */
    EMBZ_FALLBACK_NONE
} embz_fallback_t;

/* The one threshold between the methods: explicit summation for n <= 4096, the analytic
 * engine beyond. Measured (embz error, 2026-12): at n = 4096 both take about 10 ms for the
 * shipped families; at 10^5 explicit summation takes 30-250 ms and the engine 10 ms; at
 * 10^6, 0.2-2 s against 10-20 ms. */
#define EMBZ_EVAL_EXPLICIT_UP_TO 4096L
#define EMBZ_EVAL_MAX_STEPS 8              /* most precision steps */

/* The reach of explicit summation for a family the analytic engine cannot take (its tail not
 * certifiable: weights not provably monotone, and the like): sweeps take their sizes from
 * [from, this] and size searches stop here, rather than skip or grind through larger sizes.
 * Measured (2026-12, 2 cores): 1/(i (2 + sin i)) at n = 10^6 in about 1 s (stored and
 * sorted), a 16-size sweep to 10^6 in about 3 s. */
#define EMBZ_EXPLICIT_REACH 1000000L

typedef struct {
    int method;            /* EMBZ_METHOD_AUTO (default), _EXPLICIT or _ANALYTIC (forced: an
                              engine of its own at each call, the workspace is not used) */
    slong explicit_up_to;  /* AUTO: n <= this by explicit summation, larger n analytic first;
                              0: EMBZ_EVAL_EXPLICIT_UP_TO (the default, and what every
                              caller in the library uses); < 0: analytic first at every n */
    slong explicit_max;    /* the fallback to explicit summation (and goal_explicit) only for
                              n <= this (<= 0: EMBZ_EXPLICIT_MAX_N); explicit summation chosen
                              by method or by explicit_up_to has its own limit, 10^8 */
    int fallback;          /* embz_fallback_t */
    int own_engine;        /* (default 1) an analytic failure where the workspace's tail was certified for
                              larger sizes is retried with an engine certified up to n (for
                              increasing weights that shared remainder bound can exceed the
                              total weight at a much smaller n) */
    int digit_steps;       /* an analytic enclosure with fewer than 8 certified bits (about
                              two digits) is retried at 2, 4, .. 2^(digit_steps - 1) times the
                              precision, and one still short of them is a failure
                              (EMBZ_ERR_PREC), also after explicit summation; <= 1: accepted
                              as it is; at most EMBZ_EVAL_MAX_STEPS */
    int goal_steps;        /* embz_eval_side: precisions prec, 2 prec, .. 2^(goal_steps - 1)
                              prec while the enclosure straddles the goal (<= 0: 1) */
    int goal_explicit;     /* embz_eval_side: a target vector whose analytic enclosure still
                              straddles the goal is summed explicitly where that reaches */
    const volatile int *cancel;  /* borrowed, may be NULL: analytic searches stop when nonzero */
    double seconds;        /* > 0: analytic searches stop after this long, counted from each
                              evaluation (EMBZ_ERR_LIMIT) */
    slong bb_budget;       /* the analytic engine's branch and bound (uniform targets) stops
                              refining after this many interval evaluations, leaving a wider
                              enclosure; <= 0: the default, 40000 */
    slong threshold_budget;/* the same for the threshold search (target vectors, wide uniform
                              targets); <= 0: the default, 600 */
} embz_eval_opts_struct;
typedef embz_eval_opts_struct embz_eval_opts_t[1];

/* The default policy (the one embz_error uses). */
void embz_eval_opts_init(embz_eval_opts_t o);

typedef struct {
    const embz_family_struct *f;  /* borrowed */
    embz_eval_opts_struct opts;
    slong prec;
    int prepared;                 /* embz_eval_prepare was called */
    int analytic_ok;              /* 0: the prepared tail could not be certified; the analytic
                                     engine is skipped and declined gives this reason: */
    char prep_reason[200];
    fmpz_t nmax;                  /* prepared: the largest size */
} embz_eval_struct;
typedef embz_eval_struct embz_eval_t[1];

/* Per-thread state of evaluations: engines reused across sizes (one per precision step). */
typedef struct {
    void *eng;                    /* private */
} embz_eval_work_struct;
typedef embz_eval_work_struct embz_eval_work_t[1];

void embz_eval_init(embz_eval_t ev, const embz_family_t f, const embz_eval_opts_t o, slong prec);
void embz_eval_clear(embz_eval_t ev);
/* Optional, before any evaluation: certify the analytic tail in w once for every size up to
 * nmax (weights that do not depend on n), so that a sweep pays for it once per workspace.
 * EMBZ_ERR_DOMAIN (an invalid weight) is returned; any other failure only marks the analytic
 * engine as not applicable (ev->analytic_ok = 0) and returns EMBZ_OK. Other workspaces are
 * prepared for nmax when first used. */
int embz_eval_prepare(embz_eval_t ev, embz_eval_work_t w, const fmpz_t nmax, embz_err_t *err);

void embz_eval_work_init(embz_eval_work_t w);
/* Clear a workspace in the thread that used it (FLINT's caches are per thread). */
void embz_eval_work_clear(embz_eval_work_t w);

/* E_n(q): a finite certified enclosure in res->error, or a failure with the reason in err.
 * w may be NULL (engines for this call only). */
int embz_eval_error(embz_error_result_t res, const embz_eval_t ev, embz_eval_work_t w,
                    const fmpz_t n, const embz_target_t q, embz_err_t *err);
/* Which side of goal E_n(q) lies on: *side = -1 (E_n <= goal), +1 (E_n > goal) or 0
 * (undecided at every precision step). decision != 0 lets the analytic engine stop as soon
 * as the side is settled (res->decided; the enclosure may then be wide). res->error is the
 * last enclosure; res->steps counts the precision steps run. */
int embz_eval_side(int *side, embz_error_result_t res, const embz_eval_t ev, embz_eval_work_t w,
                   const fmpz_t n, const embz_target_t q, const arb_t goal, int decision,
                   embz_err_t *err);

/* One call with the default policy: explicit summation up to EMBZ_EVAL_EXPLICIT_UP_TO, the
 * analytic engine beyond (explicit summation when it fails, up to EMBZ_EXPLICIT_MAX_N, with
 * the reason in res->how). method EMBZ_METHOD_EXPLICIT / _ANALYTIC forces one. */
int embz_error(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
               const embz_target_t q, int method, slong prec, embz_err_t *err);

/* ---- fidelity-type measures of a family (embz/fidelity.h has them for vectors) ---- */

/* Largest n for which embz_fidelity_explicit works (it stores n exact integers). */
#define EMBZ_FIDELITY_MAX_N (WORD(1) << 20)

/* How a fidelity-type value was computed; embz_fidelity_how_text (embz/render.h) writes the
 * words. */
typedef struct {
    int bounds_only;        /* 0: explicit value; 1: bounds from K (K tells how K was found) */
    slong int_bits;         /* explicit: the weights were rounded to integers of this many bits */
    slong pieces;           /* explicit: pieces of the exact lower convex hull */
    double allowance_log2;  /* explicit: the rounding allowance is at most 2^this (an upper
                               bound's exponent, rounded; -1e300 for none) */
    slong prec;
    embz_error_how_struct K;
    /* the overlap at large n by the analytic engine (analytic = 1), or F_max (analytic = 2): */
    int analytic;
    slong head;             /* head size M of the layout (weights i <= M placed explicitly) */
    slong terms;            /* sorted positions summed term by term */
    slong residues;         /* residue classes j = d (m - 1) + s, one Euler-Maclaurin tail each */
    slong tail_order;       /* the highest Euler-Maclaurin order among those tails */
    int tail_neglect;       /* some residue tail stopped at a point beyond which its terms are
                               negligible (their mass bounded) */
    slong series, integrals;/* tail series and integrals evaluated by the residue tails */
    /* F_max at large n (analytic = 2): pieces = hull pieces of the first `terms` positions,
       splits = pieces split to certify them, block_dual = the upper bound beyond them came
       from constant multipliers per block of d (else one constant) */
    slong splits;
    int block_dual;
    slong last_vertex;      /* F_max: the upper bound's last hull vertex before the chord to n */
    int pairs;              /* F_max: the lower bound pairs the positions (d m, d m + 1) beyond
                               the prefix (the weight proven log-convex there) */
    /* allowance_log2 (analytic): the weights beyond a negligible point were dropped from the
       state, which moves the value by a purified distance of at most 2^this (-1e300: none) */
} embz_fidelity_how_struct;

typedef struct {
    int measure;        /* embz_measure_t */
    int bounds_only;    /* 1: value/fidelity/purified are certified BOUNDS from K, not values */
    arb_t value;        /* the chosen measure: a ball (or, bounds_only, a ball covering the
                           certified interval [lower, upper]) */
    arb_t lower, upper; /* certified lower and upper ends of the value */
    arb_t fidelity;     /* F_max (fidelity, purified; also computed for overlap) */
    arb_t purified;     /* sqrt(1 - F_max) */
    arb_t overlap;      /* overlap measure only: O (not squared); indeterminate otherwise */
    arb_t K;            /* bounds_only: the conversion distance the bounds come from */
    int have_tight;     /* bounds_only: tighter certified bounds on the value from the LOCC
                           fidelity bounds at large n, how.analytic = 2 says how) */
    arb_t tight_lo, tight_hi;  /* have_tight: exact ends, tight_lo <= value <= tight_hi */
    slong nblocks;      /* pieces of the optimal output (explicit fidelity/purified) */
    embz_fidelity_how_struct how;  /* how it was computed */
} embz_fidelity_result_struct;
typedef embz_fidelity_result_struct embz_fidelity_result_t[1];

void embz_fidelity_result_init(embz_fidelity_result_t r);
void embz_fidelity_result_clear(embz_fidelity_result_t r);

/* The measure (EMBZ_MEASURE_FIDELITY, _PURIFIED or _OVERLAP) of p^(n) -> p^(n) (x) q at an
 * explicit size n <= EMBZ_FIDELITY_MAX_N. The normalised weights are rounded to exact rationals
 * p' (about prec + log2 n bits), the measure of p' is computed exactly, and the rounding is
 * accounted for by the purified distance between the states of p and p' (a metric that LOCC
 * and local unitaries cannot increase); the enclosure width is about 2^(-prec/2) or better.
 * The product vector p' (x) q is streamed (only its n largest entries are formed).
 * Errors: EMBZ_ERR_LIMIT for n too large, EMBZ_ERR_DOMAIN for bad weights,
 * EMBZ_ERR_INPUT for an unknown measure or a bad target. */
int embz_fidelity_explicit(embz_fidelity_result_t res, const embz_family_t f, const fmpz_t n,
                           const embz_target_t q, int measure, slong prec, embz_err_t *err);

/* Dispatcher: explicit values for n <= EMBZ_FIDELITY_MAX_N (unless method is
 * EMBZ_METHOD_ANALYTIC), otherwise certified bounds from K = embz_error(...):
 * K <= P <= sqrt(K (2 - K)), i.e. (1 - K)^2 <= F_max <= 1 - K^2, with res->bounds_only = 1.
 * The overlap has no such bounds: beyond explicit sizes it is EMBZ_ERR_UNSUPPORTED. */
int embz_fidelity(embz_fidelity_result_t res, const embz_family_t f, const fmpz_t n,
                  const embz_target_t q, int measure, int method, slong prec, embz_err_t *err);


/* ---- level families (EMBZ_FAMILY_LEVELS) ---- */

/* Most levels formed for one size. */
#define EMBZ_LEVELS_MAX 10000000L
/* Most blocks of a weight constant on blocks (floor and ceil of i) summed for one size: the
 * cost is about a hundred evaluations of the weight's floor/ceil arguments per block. */
#define EMBZ_STEPS_MAX_BLOCKS 1000000L
/* ... and the evaluations of floor/ceil arguments spent finding and proving them (about a
 * minute at 10^1000, far less at smaller n). */
#define EMBZ_STEPS_MAX_EVALS 20000000L

/* x <- the levels of f at size n (values as balls at prec, counts exact). Errors:
 * EMBZ_ERR_DOMAIN for a count that is not a non-negative integer, a value that is negative or
 * undefined, or an empty range; EMBZ_ERR_LIMIT beyond EMBZ_LEVELS_MAX levels. */
int embz_family_levels(embz_levels_t x, const embz_family_t f, const fmpz_t n, slong prec,
                       embz_err_t *err);

#endif
