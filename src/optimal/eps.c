/* The smallest rank for an error goal. OPT_n is non-increasing in n (a zero appended to a
 * vector changes none of its Ky Fan norms nor those of p (x) u_d) and 1 / OPT_n = psi_d(n) is
 * strictly increasing, so the answer is the smallest n with psi_d(n) >= 1 / eps:
 * on [d^j, d^(j+1)], psi_d(n) = j + 1 + n / (d^j (d - 1)) runs from j + d/(d-1) to
 * j + 1 + d/(d-1), so j is the smallest with j + 1 + d/(d-1) >= 1/eps and
 * n = ceil((1/eps - j - 1) d^j (d - 1)). */
#include <math.h>
#include "impl.h"

int embz_optimal_eps(fmpz_t n, const fmpq_t eps, const embz_target_t q, embz_err_t *err)
{
    if (q->kind != EMBZ_TARGET_UNIFORM)
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                            "the optimum is known for uniform targets only (ebit, ebits:J, "
                            "uniform:D), not for the target %s", q->label);
    if (fmpq_sgn(eps) <= 0)
        return embz_err_set(err, EMBZ_ERR_INPUT, "the error goal must be positive");
    ulong d = q->d;
    fmpq_t g, c, t;
    fmpz_t j, dj;
    fmpq_init(g); fmpq_init(c); fmpq_init(t);
    fmpz_init(j); fmpz_init(dj);
    int status = EMBZ_OK;
    fmpq_inv(g, eps);
    fmpq_set_si(c, (slong) d, d - 1);                /* psi_d(1) = d / (d - 1) */
    if (fmpq_cmp(g, c) <= 0) {
        fmpz_one(n);
        goto done;
    }
    /* j = ceil(g - 1 - d/(d-1)) (>= 0 since g > d/(d-1) > ... ; at least 0) */
    fmpq_sub(t, g, c);
    fmpq_sub_si(t, t, 1);
    fmpz_cdiv_q(j, fmpq_numref(t), fmpq_denref(t));
    if (fmpz_sgn(j) < 0) fmpz_zero(j);
    /* bits of d^j */
    double bits = fmpz_get_d(j) * log2((double) d);
    if (!(bits <= (double) EMBZ_OPTIMAL_MAX_BITS)) {
        status = embz_err_set(err, EMBZ_ERR_LIMIT, "the goal needs a rank beyond 2^%ld "
                              "(about %.4g qubits per side)", (long) EMBZ_OPTIMAL_MAX_BITS, bits);
        goto done;
    }
    fmpz_ui_pow_ui(dj, d, fmpz_get_ui(j));
    fmpz_mul_ui(dj, dj, d - 1);
    fmpq_sub_fmpz(t, g, j);
    fmpq_sub_si(t, t, 1);
    fmpq_mul_fmpz(t, t, dj);
    fmpz_cdiv_q(n, fmpq_numref(t), fmpq_denref(t));
    if (fmpz_cmp_ui(n, 1) < 0) fmpz_one(n);
done:
    fmpq_clear(g); fmpq_clear(c); fmpq_clear(t);
    fmpz_clear(j); fmpz_clear(dj);
    return status;
}
