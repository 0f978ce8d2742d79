/* The closed form OPT_n(u_d) = 1 / psi_d(n), psi_d(n) = j + 1 + n / (d^j (d - 1)) with
 * j = floor(log_d n) (docs/optimal.md: the lower bound by induction over the Ky Fan
 * constraints k = d m + r, the upper bound by the state p_i ~ d^(-ceil(log_d i))). */
#include "impl.h"

void _embz_opt_psi(fmpq_t psi, fmpz_t level, const fmpz_t n, ulong d)
{
    fmpz_t t;
    fmpz_init(t);
    slong j = fmpz_flog_ui(n, d);               /* d^j <= n < d^(j+1) */
    fmpz_set_si(level, j);
    fmpz_ui_pow_ui(t, d, (ulong) j);
    fmpz_mul_ui(t, t, d - 1);                   /* d^j (d - 1) */
    fmpq_set_fmpz_frac(psi, n, t);
    fmpz_set_si(t, j + 1);
    fmpq_add_fmpz(psi, psi, t);
    fmpz_clear(t);
}

int embz_optimal_closed(embz_optimal_result_t res, const fmpz_t n, const embz_target_t q,
                        embz_err_t *err)
{
    if (q->kind != EMBZ_TARGET_UNIFORM)
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                            "the optimum is known for uniform targets only (ebit, ebits:J, "
                            "uniform:D), not for the target %s", q->label);
    if (fmpz_cmp_ui(n, 1) < 0)
        return embz_err_set(err, EMBZ_ERR_INPUT, "the rank n must be at least 1");
    res->how = EMBZ_OPT_HOW_CLOSED;
    res->d = q->d;
    fmpq_t psi;
    fmpq_init(psi);
    _embz_opt_psi(psi, res->level, n, q->d);
    fmpq_inv(res->upper, psi);
    fmpq_set(res->lower, res->upper);
    res->exact = 1;
    res->state_checked = 0;
    int status = EMBZ_OK;
    if (fmpz_cmp_si(n, EMBZ_OPTIMAL_CHECK_MAX_N) <= 0) {
        /* the upper end once more, from the state's vector (an independent exact path) */
        embz_qvec_t p;
        fmpq_t E;
        embz_qvec_init(p);
        fmpq_init(E);
        if (embz_optimal_state(p, fmpz_get_si(n), q, NULL) == EMBZ_OK) {
            embz_optimal_uniform_error(E, NULL, p, q->d);
            res->state_checked = fmpq_equal(E, res->upper);
            if (!res->state_checked)
                status = embz_err_set(err, EMBZ_ERR_PREC, "internal check failed: the optimal "
                                      "state's error differs from the closed form");
        }
        fmpq_clear(E);
        embz_qvec_clear(p);
    }
    fmpq_clear(psi);
    return status;
}
