/* The smallest rank whose best purified distance reaches a goal. OPT^P_n is non-increasing in n
 * (a zero appended to a state changes neither F_max nor the overlap: the product gains only
 * zeros, and neither a hull nor a sum of sqrt(p_i r_i) sees them), so the ranks reaching eps
 * form [n*, infinity). A bisection keeps two certified facts: OPT^P_L > eps (so n* > L) and
 * OPT^P_H <= eps (so n* <= H), each decided by a whole enclosure on one side; H is found by
 * doubling from 1, then [L, H] is halved; it stops with the bracket [L + 1, H] when an
 * enclosure straddles eps. */
#include "impl.h"

/* +1: OPT^P_n <= eps certainly, -1: > eps certainly, 0: undecided; v receives the enclosure */
static int decide(arb_t v, slong n, const arb_t eps, const embz_target_t q, int *status,
                  embz_err_t *err)
{
    embz_optimal_fid_t r;
    embz_optimal_fid_init(r);
    int s = embz_optimal_fid(r, NULL, n, q, EMBZ_MEASURE_PURIFIED, err);
    int res = 0;
    if (s != EMBZ_OK) *status = s;
    else {
        arb_set(v, r->value);
        if (arb_le(r->value, eps)) res = 1;
        else if (arb_gt(r->value, eps)) res = -1;
    }
    embz_optimal_fid_clear(r);
    return res;
}

int embz_optimal_fid_eps(slong *n_lo, slong *n_hi, arb_t at_hi, arb_t before_lo,
                         const fmpq_t eps, const embz_target_t q, embz_err_t *err)
{
    if (q->kind != EMBZ_TARGET_UNIFORM)
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "the optimum is known for uniform "
                            "targets only (ebit, ebits:J, uniform:D), not for the target %s",
                            q->label);
    if (fmpq_sgn(eps) <= 0)
        return embz_err_set(err, EMBZ_ERR_INPUT, "the error goal must be positive");
    arb_t e, v;
    arb_init(e); arb_init(v);
    arb_set_fmpq(e, eps, 128);
    int status = EMBZ_OK;
    slong L = 0, H = 0;
    arb_indeterminate(before_lo);
    arb_indeterminate(at_hi);
    /* doubling first (the cost stays about twice that of the answer's rank), then bisection */
    for (slong m = 1; status == EMBZ_OK; m = m >= EMBZ_OPTIMAL_FID_MAX_N / 2
                                            ? EMBZ_OPTIMAL_FID_MAX_N : 2 * m) {
        int s = decide(v, m, e, q, &status, err);
        if (s == 1) { H = m; arb_set(at_hi, v); break; }
        if (s == -1) { L = m; arb_set(before_lo, v); }
        if (m == EMBZ_OPTIMAL_FID_MAX_N) break;
    }
    if (status == EMBZ_OK && H == 0) {
        status = embz_err_set(err, EMBZ_ERR_LIMIT, "the best purified distance at n = 2^22 is "
                              "not certified to be <= the goal; larger ranks are not computed");
        goto done;
    }
    while (status == EMBZ_OK && H - L > 1) {
        slong m = L + (H - L) / 2;
        int s = decide(v, m, e, q, &status, err);
        if (s == 1) { H = m; arb_set(at_hi, v); }
        else if (s == -1) { L = m; arb_set(before_lo, v); }
        else break;
    }
done:
    *n_lo = L + 1;
    *n_hi = H;
    arb_clear(e); arb_clear(v);
    return status;
}
