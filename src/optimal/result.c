/* Result and options of the optimal baseline. */
#include "impl.h"

void embz_optimal_opts_init(embz_optimal_opts_t o)
{
    o->start = EMBZ_OPT_START_EQUAL;
    o->exact = 1;
    o->seconds = 0.0;
}

void embz_optimal_result_init(embz_optimal_result_t r)
{
    r->how = EMBZ_OPT_HOW_NONE;
    r->d = 2;
    fmpq_init(r->lower);
    fmpq_init(r->upper);
    r->exact = 0;
    fmpz_init(r->level);
    r->state_checked = 0;
    r->rows = r->cols = r->nnz = 0;
    r->start = EMBZ_OPT_START_EQUAL;
    r->used_exact = 0;
    r->pivots = 0;
    r->lp_value = 0.0;
    r->primal_exact = 0;
    r->dual_clamped = 0;
    r->solve_seconds = r->certify_seconds = 0.0;
}

void embz_optimal_result_clear(embz_optimal_result_t r)
{
    fmpq_clear(r->lower);
    fmpq_clear(r->upper);
    fmpz_clear(r->level);
}
