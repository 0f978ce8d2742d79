/* The smallest rank whose best purified distance reaches a goal. OPT^P_n is non-increasing in n
 * (a zero appended to a state changes neither F_max nor the overlap: the product gains only
 * zeros, and neither a hull nor a sum of sqrt(p_i r_i) sees them), so the ranks reaching eps
 * form [n*, infinity). A bisection keeps two certified facts: OPT^P_L > eps (so n* > L) and
 * OPT^P_H <= eps (so n* <= H), each decided by a whole enclosure on one side; H is found by
 * doubling from 1, then [L, H] is halved; it stops with the bracket [L + 1, H] when an
 * enclosure straddles eps. */
#include "impl.h"

/* +1: OPT^P_n <= eps certainly, -1: > eps certainly, 0: undecided; v receives the enclosure */
static int decide(arb_t v, const fmpz_t n, const arb_t eps, const embz_target_t q, int *status,
                  embz_err_t *err)
{
    embz_optimal_fid_t r;
    embz_optimal_fid_init(r);
    int s = _embz_opt_fid_run(r, NULL, n, q, EMBZ_MEASURE_PURIFIED, 1, err);   /* O(log^2 n) */
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

int embz_optimal_fid_eps(fmpz_t n_lo, fmpz_t n_hi, arb_t at_hi, arb_t before_lo,
                         const fmpq_t eps, const embz_target_t q, embz_err_t *err)
{
    if (q->kind != EMBZ_TARGET_UNIFORM)
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "the optimum is known for uniform "
                            "targets only (ebit, ebits:J, uniform:D), not for the target %s",
                            q->label);
    if (fmpq_sgn(eps) <= 0)
        return embz_err_set(err, EMBZ_ERR_INPUT, "the error goal must be positive");
    arb_t e, v;
    fmpz_t L, H, m, top;
    arb_init(e); arb_init(v);
    fmpz_init(L); fmpz_init(H); fmpz_init(m); fmpz_init(top);
    arb_set_fmpq(e, eps, 128);
    int status = EMBZ_OK;
    arb_indeterminate(before_lo);
    arb_indeterminate(at_hi);
    /* the largest rank computed: 2^MAX_BITS - 1 */
    fmpz_one(top);
    fmpz_mul_2exp(top, top, EMBZ_OPTIMAL_FID_MAX_BITS);
    fmpz_sub_ui(top, top, 1);
    /* doubling first (the cost stays about twice that of the answer's rank), then bisection */
    for (fmpz_one(m); status == EMBZ_OK; ) {
        int s = decide(v, m, e, q, &status, err);
        if (s == 1) { fmpz_set(H, m); arb_set(at_hi, v); break; }
        if (s == -1) { fmpz_set(L, m); arb_set(before_lo, v); }
        if (fmpz_equal(m, top)) break;
        fmpz_mul_2exp(m, m, 1);
        if (fmpz_cmp(m, top) > 0) fmpz_set(m, top);
    }
    if (status == EMBZ_OK && fmpz_is_zero(H)) {
        status = embz_err_set(err, EMBZ_ERR_LIMIT, "the best purified distance is not certified "
                              "to be <= the goal at any n < 2^%d; larger ranks are not computed",
                              EMBZ_OPTIMAL_FID_MAX_BITS);
        goto done;
    }
    for (;;) {
        if (status != EMBZ_OK) break;
        fmpz_sub(m, H, L);
        if (fmpz_cmp_ui(m, 1) <= 0) break;
        fmpz_fdiv_q_2exp(m, m, 1);
        fmpz_add(m, m, L);
        int s = decide(v, m, e, q, &status, err);
        if (s == 1) { fmpz_set(H, m); arb_set(at_hi, v); }
        else if (s == -1) { fmpz_set(L, m); arb_set(before_lo, v); }
        else break;
    }
done:
    fmpz_add_ui(n_lo, L, 1);
    fmpz_set(n_hi, H);
    arb_clear(e); arb_clear(v);
    fmpz_clear(L); fmpz_clear(H); fmpz_clear(m); fmpz_clear(top);
    return status;
}
