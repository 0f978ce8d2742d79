/* Goals that no size reaches (see include/embz/size.h). */
#include "embz/size.h"
#include "embz/asym.h"

int embz_target_below_ebit(const embz_target_t q)
{
    if (q->kind == EMBZ_TARGET_UNIFORM) return q->d >= 2;
    if (q->q->len < 2) return 0;
    fmpq_t half;
    fmpq_init(half);
    fmpq_set_si(half, 1, 2);
    int r = fmpq_cmp(q->q->p, half) <= 0;      /* sorted: the largest entry first */
    fmpq_clear(half);
    return r;
}

int embz_family_ebit_limit(arb_t L, const embz_family_t f, slong prec)
{
    if ((embz_expr_uses(f->weight) & EMBZ_USES_N) || embz_family_is_levels(f)) return 0;
    embz_asym_result_t ar;
    embz_err_t err;
    embz_err_clear(&err);
    embz_asym_result_init(ar);
    int ok = embz_asym_analyse(ar, f->weight, prec, &err) == EMBZ_OK && ar->limit_known;
    if (ok) arb_set(L, ar->limit);
    embz_asym_result_clear(ar);
    return ok;
}

int embz_size_never(const embz_size_result_t res, int limit_known, const arb_t limit,
                    const embz_target_t q, const arb_t goal)
{
    return res->status == EMBZ_SIZE_NOT_REACHED && limit_known && arb_gt(limit, goal)
           && embz_target_below_ebit(q);
}
