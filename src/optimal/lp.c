/* The certified linear program: build, solve (GLPK), certify the primal (upper bound) and
 * the dual (lower bound), each in exact rationals. */
#include <time.h>
#include "impl.h"

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

int embz_optimal_lp(embz_optimal_result_t res, embz_qvec_t state, slong n,
                    const embz_target_t q, const embz_optimal_opts_t o,
                    embz_progress_fn progress, void *ctx, embz_err_t *err)
{
    embz_optimal_opts_t def;
    embz_optimal_opts_init(def);
    if (o == NULL) o = def;
    if (q->kind != EMBZ_TARGET_UNIFORM)
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                            "the linear program is for uniform targets only (ebit, ebits:J, "
                            "uniform:D), not for the target %s", q->label);
    if (n < 1)
        return embz_err_set(err, EMBZ_ERR_INPUT, "the rank n must be at least 1");
    if (n > EMBZ_OPTIMAL_LP_MAX_N)
        return embz_err_set(err, EMBZ_ERR_LIMIT, "the linear program is limited to "
                            "n <= %ld (about 2n rows)", (long) EMBZ_OPTIMAL_LP_MAX_N);
    if (o->start == EMBZ_OPT_START_SOLVER && n > EMBZ_OPTIMAL_LP_SOLVER_START_MAX_N)
        return embz_err_set(err, EMBZ_ERR_LIMIT, "the solver's own start is limited to "
                            "n <= %ld (its time grows like n^2)",
                            (long) EMBZ_OPTIMAL_LP_SOLVER_START_MAX_N);
    res->how = EMBZ_OPT_HOW_LP;
    res->d = q->d;
    res->start = o->start;
    double t0 = now_s();
    if (progress != NULL) progress(ctx, 0, 4);
    _embz_opt_lp_struct lp;
    _embz_opt_lp_init(&lp, n, q->d);
    res->rows = lp.nrows;
    res->cols = n;
    res->nnz = lp.start[lp.nrows];
    double *x = flint_malloc(sizeof(double) * (size_t) n);
    double *y = flint_malloc(sizeof(double) * (size_t) lp.nrows);
    int status = _embz_opt_lp_solve(x, y, &res->lp_value, &res->pivots, &res->used_exact, &lp,
                                    o, progress, ctx, err);
    double t1 = now_s();
    res->solve_seconds = t1 - t0;
    if (status == EMBZ_OK) {
        fmpq_t V;
        fmpq_init(V);
        if (progress != NULL) progress(ctx, 2, 4);
        _embz_opt_primal(res->upper, state, x, n, q->d);
        if (progress != NULL) progress(ctx, 3, 4);
        _embz_opt_dual(V, &res->dual_clamped, y, &lp);
        fmpq_inv(res->lower, V);       /* V >= 1 (any state has E <= 1 - 1/d) */
        res->exact = fmpq_equal(res->lower, res->upper);
        res->primal_exact = res->exact;
        if (fmpq_cmp(res->lower, res->upper) > 0)
            status = embz_err_set(err, EMBZ_ERR_PREC, "internal check failed: the dual bound "
                                  "lies above the primal error");
        fmpq_clear(V);
        if (progress != NULL) progress(ctx, 4, 4);
    }
    res->certify_seconds = now_s() - t1;
    flint_free(x);
    flint_free(y);
    _embz_opt_lp_clear(&lp);
    return status;
}
