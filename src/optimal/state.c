/* The optimal state p_i ~ d^(-ceil(log_d i)) (weight 1 at i = 1, d^-t on the block
 * d^(t-1) < i <= d^t), and the exact error K(p -> p (x) u_d) of a sorted vector by its Ky Fan
 * form: ||p (x) u_d||_(k) = P_m + r p_(m+1) / d for k = d m + r (docs/optimal.md). */
#include "impl.h"

int embz_optimal_state(embz_qvec_t p, slong n, const embz_target_t q, embz_err_t *err)
{
    if (q->kind != EMBZ_TARGET_UNIFORM)
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                            "the optimal state is known for uniform targets only");
    if (n < 1 || n > EMBZ_OPTIMAL_STATE_MAX_N)
        return embz_err_set(err, EMBZ_ERR_LIMIT, "the optimal state is formed for "
                            "1 <= n <= %ld only", (long) EMBZ_OPTIMAL_STATE_MAX_N);
    fmpz_t dz;
    fmpq_t w, W;
    fmpz_init_set_ui(dz, q->d);
    fmpq_init(w); fmpq_init(W);
    embz_qvec_clear(p);
    embz_qvec_init(p);
    p->p = _fmpq_vec_init(n);
    p->len = n;
    /* weights first: 1, then d^-t on indices (0-based) lo .. hi - 1, lo = d^(t-1) */
    fmpq_one(w);
    fmpq_one(p->p);
    fmpq_one(W);
    slong lo = 1;
    while (lo < n) {
        fmpq_div_fmpz(w, w, dz);
        slong hi = (ulong) lo > (ulong) n / q->d ? n : lo * (slong) q->d;
        for (slong i = lo; i < hi; i++) fmpq_set(p->p + i, w);
        fmpq_t t;
        fmpq_init(t);
        fmpq_mul_si(t, w, hi - lo);
        fmpq_add(W, W, t);
        fmpq_clear(t);
        lo = hi;
    }
    _embz_opt_normalise(p->p, n, W);
    p->normalised = 0;
    fmpq_clear(w); fmpq_clear(W);
    fmpz_clear(dz);
    return EMBZ_OK;
}

void _embz_opt_error_weights(fmpq_t E, slong *argk, const fmpq *w, slong n, ulong d)
{
    fmpq *P = _fmpq_vec_init(n + 1);
    for (slong i = 0; i < n; i++) fmpq_add(P + i + 1, P + i, w + i);
    fmpq_t v, t;
    fmpz_t dz;
    fmpq_init(v); fmpq_init(t);
    fmpz_init_set_ui(dz, d);
    fmpq_zero(E);
    slong best = 0;
    for (slong k = 1; k <= n; k++) {
        slong m = k / (slong) d, r = k % (slong) d;
        fmpq_sub(v, P + k, P + m);
        if (r != 0) {
            /* r w_(m+1) / d, w_(m+1) = P_(m+1) - P_m (m + 1 <= k <= n) */
            fmpq_sub(t, P + m + 1, P + m);
            fmpq_mul_si(t, t, r);
            fmpq_div_fmpz(t, t, dz);
            fmpq_sub(v, v, t);
        }
        if (fmpq_cmp(v, E) > 0) {
            fmpq_set(E, v);
            best = k;
        }
    }
    if (!fmpq_is_zero(P + n)) fmpq_div(E, E, P + n);
    if (argk != NULL) *argk = best;
    fmpq_clear(v); fmpq_clear(t);
    fmpz_clear(dz);
    _fmpq_vec_clear(P, n + 1);
}

void embz_optimal_uniform_error(fmpq_t E, slong *argk, const embz_qvec_t p, ulong d)
{
    _embz_opt_error_weights(E, argk, p->p, p->len, d);
}
