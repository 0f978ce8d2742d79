/* A state of rank n with a certified error against the optimum at the same rank: the ratio,
 * and the smallest rank at which the optimum reaches the same error. The rank m(E) = min
 * { m : OPT_m <= E } is non-increasing in E, so for E in [lo, hi], m(hi) <= m(E) <= m(lo). */
#include "impl.h"

void embz_optimal_vs_init(embz_optimal_vs_t v)
{
    fmpq_init(v->opt);
    arb_init(v->ratio);
    v->have_rank = 0;
    fmpz_init(v->rank_lo);
    fmpz_init(v->rank_hi);
    v->qubits = v->opt_qubits_lo = v->opt_qubits_hi = 0;
}

void embz_optimal_vs_clear(embz_optimal_vs_t v)
{
    fmpq_clear(v->opt);
    arb_clear(v->ratio);
    fmpz_clear(v->rank_lo);
    fmpz_clear(v->rank_hi);
}

static slong qubits_of(const fmpz_t m)
{
    return fmpz_cmp_ui(m, 1) <= 0 ? 0 : fmpz_clog_ui(m, 2);
}

int embz_optimal_vs(embz_optimal_vs_t v, const arb_t error, const fmpz_t n,
                    const embz_target_t q, embz_err_t *err)
{
    /* the closed form without the state check: a comparison, the value is proven */
    fmpz_t lev;
    fmpq_t psi;
    fmpz_init(lev);
    fmpq_init(psi);
    int status = EMBZ_OK;
    if (q->kind != EMBZ_TARGET_UNIFORM) {
        status = embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "the optimum is known for uniform "
                              "targets only (ebit, ebits:J, uniform:D), not for the target %s",
                              q->label);
        goto done;
    }
    if (fmpz_cmp_ui(n, 1) < 0) {
        status = embz_err_set(err, EMBZ_ERR_INPUT, "the rank n must be at least 1");
        goto done;
    }
    _embz_opt_psi(psi, lev, n, q->d);
    fmpq_inv(v->opt, psi);
    slong prec = arb_rel_accuracy_bits(error) + 64;
    if (prec < 64) prec = 64;
    arb_t o;
    arb_init(o);
    arb_set_fmpq(o, v->opt, prec + 64);
    arb_div(v->ratio, error, o, prec + 64);
    arb_clear(o);
    v->qubits = qubits_of(n);
    /* the ends of the enclosure as exact rationals */
    arf_t a;
    fmpq_t lo, hi;
    arf_init(a);
    fmpq_init(lo); fmpq_init(hi);
    arb_get_lbound_arf(a, error, prec);
    v->have_rank = 0;
    if (arf_is_finite(a) && arf_sgn(a) > 0) {
        arf_get_fmpq(lo, a);
        arb_get_ubound_arf(a, error, prec);
        if (arf_is_finite(a)) {
            arf_get_fmpq(hi, a);
            /* (a rank beyond 2^EMBZ_OPTIMAL_MAX_BITS leaves have_rank at 0) */
            if (embz_optimal_eps(v->rank_lo, hi, q, NULL) == EMBZ_OK
                && embz_optimal_eps(v->rank_hi, lo, q, NULL) == EMBZ_OK) {
                /* E_n >= OPT_n (a state of rank n is a candidate), so the rank is at most n,
                 * whatever the enclosure's width */
                if (fmpz_cmp(v->rank_hi, n) > 0) fmpz_set(v->rank_hi, n);
                if (fmpz_cmp(v->rank_lo, v->rank_hi) > 0) fmpz_set(v->rank_lo, v->rank_hi);
                v->have_rank = 1;
                v->opt_qubits_lo = qubits_of(v->rank_lo);
                v->opt_qubits_hi = qubits_of(v->rank_hi);
            }
        }
    }
    arf_clear(a);
    fmpq_clear(lo); fmpq_clear(hi);
done:
    fmpz_clear(lev);
    fmpq_clear(psi);
    return status;
}
