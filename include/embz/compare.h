/* Comparing families: for each family, everything a comparison table needs, as numbers and
 * flags (renderers write the words): the one-ebit classification (verdict, law, limit), a
 * sweep of the chosen target with fitted laws, certified errors at chosen sizes, and for
 * each error goal the size resolved to qubits per side, or "never" when that is proven. */
#ifndef EMBZ_COMPARE_H
#define EMBZ_COMPARE_H

#include "embz/analysis.h"
#include "embz/size.h"

typedef struct {
    fmpz_t from, to;               /* sweep range of the classification and the target sweep */
    slong points;                  /* sizes per sweep */
    slong prec;                    /* working precision (bits) */
    const embz_target_struct *target;  /* borrowed; NULL: one ebit */
    slong nsizes;                  /* sizes at which the error is certified */
    const fmpz *sizes;             /* borrowed */
    slong ngoals;                  /* error goals, exact rationals in (0, 1) */
    const fmpq *goals;             /* borrowed */
    int threads;                   /* families computed at the same time (OpenMP); <= 0: 1 */
} embz_compare_opts_struct;
typedef embz_compare_opts_struct embz_compare_opts_t[1];

/* from = 100, to = 10^60, 12 points, 64 bits, one ebit, no sizes, no goals, one thread. */
void embz_compare_opts_init(embz_compare_opts_t o);
void embz_compare_opts_clear(embz_compare_opts_t o);

typedef struct {
    const embz_family_struct *fam; /* borrowed */
    int status;                    /* EMBZ_OK, or the failure (its message in message) */
    char message[600];
    embz_classify_t c;             /* one-ebit classification with its sweep and fits */
    int limit_known;               /* the asymptotic route derives the one-ebit limit: */
    arb_t limit;
    int summable;                  /* 1 / 0 / -1: the weight sum converges / diverges / unknown */
    int own_sweep;                 /* tsweep and tfits are a sweep of their own for the target
                                      (it is not one ebit); else use c's */
    embz_sweep_t tsweep;
    embz_fitset_t tfits;
    int tfit_ok;
    arb_struct *err_at;            /* nsizes enclosures of E at the chosen sizes */
    int *err_status;               /* nsizes statuses (-1: not computed) */
    char **err_why;                /* nsizes: why a size has no enclosure (malloc'ed, or NULL) */
    embz_size_result_struct *need; /* ngoals size results at qubit resolution */
    int *need_status;              /* ngoals statuses (-1: not computed) */
    int *never;                    /* ngoals: 1 when no size reaches the goal (embz_size_never) */
    double seconds;                /* wall time of the row */
} embz_compare_row_struct;

void embz_compare_row_init(embz_compare_row_struct *r, const embz_family_struct *f,
                           const embz_compare_opts_t o);
void embz_compare_row_clear(embz_compare_row_struct *r, const embz_compare_opts_t o);

/* Called after each finished row (from one thread at a time): i is the row's index. */
typedef void (*embz_compare_progress_fn)(void *ctx, slong i, slong done, slong total);

/* Compute the rows rows[i], i < nfam, each initialised by embz_compare_row_init for its
 * family, families in parallel with o->threads threads (pointers, so that a caller may keep
 * each row inside a larger record of its own). A failure stays in its row (status,
 * message); the return value is EMBZ_OK. */
int embz_compare_run(embz_compare_row_struct *const *rows, slong nfam,
                     const embz_compare_opts_t o, embz_compare_progress_fn progress, void *ctx);

/* The policy for certified errors at chosen sizes (tables and plots): the default one, the
 * analytic engine reused across the sizes. */
void embz_compare_eval_opts(embz_eval_opts_t o);

/* Certified E_n(q) at sizes[0..len-1] under that policy, one workspace for all: status[j]
 * (EMBZ_OK and E[j], or a failure with errs[j], when errs is not NULL). An invalid weight
 * (EMBZ_ERR_DOMAIN) stops the loop, later sizes keep status -1, and it is returned; else
 * EMBZ_OK. */
int embz_errors_at(arb_ptr E, int *status, embz_err_t *errs, const embz_family_t f,
                   const fmpz *sizes, slong len, const embz_target_t q, slong prec);

/* How many threads this machine offers (for a default of `threads`). */
int embz_threads_available(void);
/* The default number of threads of every command: the OpenMP maximum (every processor, or
 * OMP_NUM_THREADS), at most EMBZ_THREADS_MAX, at least 1. */
int embz_threads_default(void);

#endif
