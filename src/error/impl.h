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


#endif
