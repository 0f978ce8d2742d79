/* Private to the library: the analytic engine of src/error (used by the evaluator, eval.c,
 * and by the tests and benchmarks), not installed. */
#ifndef EMBZ_ERROR_IMPL_H
#define EMBZ_ERROR_IMPL_H

#include "embz/error.h"
#include "sum/sum.h"

/* The analytic engine for one family, reusable across sizes: for weights that do not depend on
 * n the certified tail (and its integral cache) is built once and serves every n up to nmax. */
typedef struct {
    const embz_family_struct *f;   /* borrowed */
    slong prec;
    int uses_n;
    int have_tail;
    fmpz_t nmax;
    embz_tail_t tail;
    int have_decide;
    arf_t decide, decide_lo;       /* decision threshold: the upper and lower ends of its ball
                                      (see embz_analytic_set_decision) */
    const volatile int *cancel;    /* borrowed, may be NULL: the search stops when nonzero */
    double deadline;               /* CLOCK_MONOTONIC seconds; 0: none */
    slong bb_budget;               /* interval evaluations of the branch and bound; <= 0:
                                      the default (40000) */
    slong th_budget;               /* evaluations of the threshold search; <= 0: the
                                      default (600) */
} embz_analytic_struct;
typedef embz_analytic_struct embz_analytic_t[1];

void embz_analytic_init(embz_analytic_t a, const embz_family_t f, slong prec);
void embz_analytic_clear(embz_analytic_t a);
/* Optional: certify the tail for all sizes up to nmax at once (saves work in sweeps). */
int embz_analytic_prepare(embz_analytic_t a, const fmpz_t nmax, embz_err_t *err);
/* Decision mode: the maximisation may stop as soon as the enclosure lies entirely above or
 * entirely below the threshold (the result is still a valid, possibly wider, enclosure).
 * Used by size searches that only need the side of an error goal. */
void embz_analytic_set_decision(embz_analytic_t a, const arb_t threshold);
void embz_analytic_clear_decision(embz_analytic_t a);
/* Limits for callers that must be able to stop a computation (a notebook, a long scan): the
 * searches check *cancel (when cancel is not NULL) and the clock (when seconds > 0, counted
 * from this call) between steps, and an evaluation stopped that way fails with
 * EMBZ_ERR_LIMIT ("stopped: ...") instead of returning a wider enclosure. The object stays
 * usable; call again with NULL, 0 to lift the limits. */
void embz_analytic_set_limits(embz_analytic_t a, const volatile int *cancel, double seconds);
/* E_n(q) for a uniform target (embz_error_analytic is init + this + clear). */
int embz_analytic_error(embz_error_result_t res, embz_analytic_t a, const fmpz_t n,
                        const embz_target_t q, embz_err_t *err);


/* ==================================================================== explicit summation
 * E_n(q) by summation over i = 1..n, in three files: explicit.c (the target data and the
 * driver), explicit_estimate.c (the double pass: estimate, argmax, the order of the weights)
 * and explicit_certify.c (the certified pass in exact 128-bit fixed point). The method is
 * described at the top of explicit.c. Not for use outside src/error and its tests. */

__extension__ typedef __int128 embz_x_i128;

/* Fixed-point head room: Q * (sum of hi) stays below 2^EMBZ_FIX_BITS. */
#define EMBZ_FIX_BITS 124

/* Largest n for which non-monotone weights are stored (32 bytes per index in the certified
 * pass, 8 in the estimate). */
#define EMBZ_EXPLICIT_SORTED_MAX_N (WORD(1) << 24)

/* The target, read once: d for a uniform target, else the nonzero entries, non-increasing,
 * as doubles and as integers a_j over the common denominator Q. */
typedef struct {
    int uniform;
    ulong d;          /* uniform */
    slong m;          /* vector: number of nonzero entries */
    double *qd;       /* vector: entries as doubles (non-increasing) */
    slong *a;         /* vector: numerators over Q (non-increasing) */
    slong Q;          /* common denominator (d for uniform) */
} embz_x_tdata_t;

/* Fills T (to be cleared with _embz_x_tdata_clear even on failure): EMBZ_ERR_INPUT for a
 * uniform dimension out of range, a zero vector or one not summing to 1,
 * EMBZ_ERR_UNSUPPORTED for a common denominator above 2^40. */
int _embz_x_tdata_init(embz_x_tdata_t *T, const embz_target_t q, embz_err_t *err);
void _embz_x_tdata_clear(embz_x_tdata_t *T);

/* What the double pass finds (weights unnormalised). */
typedef struct {
    double W;         /* sum of all weights */
    double best;      /* max_k (P_k - R_k), unnormalised */
    slong argk;
    double p1;        /* largest weight */
    double supB;      /* ebit: sup_m (P_2m - P_m) */
    int sorted;       /* 1 if the stream order was non-increasing */
} embz_x_dres_t;

/* The double pass for 1 <= n <= EMBZ_EXPLICIT_MAX_N. *order: +1 (weights non-increasing in
 * i) or -1 (non-decreasing), both streamed, or 0 (stored and sorted). *bad: 0, or the first
 * index whose double weight is not a finite number >= 0 (R is then incomplete). Fails only
 * for non-monotone weights beyond EMBZ_EXPLICIT_SORTED_MAX_N or out of memory. */
int _embz_x_estimate(embz_x_dres_t *R, int *order, slong *bad, const embz_family_t f, slong n,
                     const embz_x_tdata_t *T, embz_err_t *err);
/* The same from 64-bit ball values scaled by 2^*k (k chosen so that the largest weight is
 * near 1), stored and sorted: for weights the double evaluator cannot reach. */
int _embz_x_estimate_arb(embz_x_dres_t *R, slong *k, const embz_family_t f, slong n,
                         const embz_x_tdata_t *T, embz_err_t *err);

/* What the certified pass finds, in units of 2^-F (all values exact integers). */
typedef struct {
    embz_x_i128 WL, WU;      /* sum of all lo / hi */
    embz_x_i128 GL, GU;      /* enclosure of max_k Q (P_k - R_k) */
    embz_x_i128 p1L, p1U;    /* largest weight */
    embz_x_i128 BL, BU;      /* enclosure of sup_m (P_2m - P_m) (uniform targets) */
} embz_x_xres_t;

/* The certified pass at prec bits. *mode on entry: the order to try (+1 or -1: stream in
 * index order or its reverse, 0: store and sort); on return: the order used (0 when the
 * certified upper ends contradicted a streamed order). ew: binary exponent of an estimate
 * of the total weight (it fixes F; up to three retries with more head room). *F receives the
 * scale. EMBZ_ERR_PREC when the range stays exceeded. */
int _embz_x_certify(embz_x_xres_t *X, slong *F, int *mode, const embz_family_t f, slong n,
                    const embz_x_tdata_t *T, int ew, slong prec, embz_err_t *err);
/* A ball containing every real in [a / (Q b), c / (Q e)] (b, e > 0). */
void _embz_x_quotient_interval(arb_t res, embz_x_i128 a, embz_x_i128 b, embz_x_i128 c,
                               embz_x_i128 e, slong Q, slong prec);

/* A binary max-heap of NODE ordered by the field KEY, as static functions PREFIX_push and
 * PREFIX_pop: the merge of the sequences a_j w_(1) >= a_j w_(2) >= ... for a target vector,
 * in the double pass and in the certified pass. */
#define EMBZ_X_MAX_HEAP_DEFINE(PREFIX, NODE, KEY)                                           \
    static void PREFIX##_push(NODE *h, slong *len, NODE x)                                 \
    {                                                                                      \
        slong i = (*len)++;                                                                \
        while (i > 0) {                                                                    \
            slong p = (i - 1) / 2;                                                         \
            if (h[p].KEY >= x.KEY) break;                                                  \
            h[i] = h[p];                                                                   \
            i = p;                                                                         \
        }                                                                                  \
        h[i] = x;                                                                          \
    }                                                                                      \
                                                                                           \
    static NODE PREFIX##_pop(NODE *h, slong *len)                                          \
    {                                                                                      \
        NODE top = h[0], x = h[--(*len)];                                                  \
        slong i = 0, L = *len;                                                             \
        for (;;) {                                                                         \
            slong c = 2 * i + 1;                                                           \
            if (c >= L) break;                                                             \
            if (c + 1 < L && h[c + 1].KEY > h[c].KEY) c++;                                 \
            if (h[c].KEY <= x.KEY) break;                                                  \
            h[i] = h[c];                                                                   \
            i = c;                                                                         \
        }                                                                                  \
        if (L > 0) h[i] = x;                                                               \
        return top;                                                                        \
    }

#endif
