/* A family's fidelity-type value against the optimum: the optimum at the same rank, and the
 * smallest rank at which the optimal state reaches the family's value. Every measure is turned
 * into a purified-distance goal (OPT^F = OPT^O, docs/optimal.md section 6: a fidelity or overlap
 * V is reached where the best purified distance is <= sqrt(1 - V)); the goal's enclosure,
 * rounded outward to rationals, brackets the rank: a larger goal is reached earlier. */
#include "impl.h"

void embz_optimal_fid_vs_init(embz_optimal_fid_vs_t v)
{
    embz_optimal_fid_init(v->opt);
    v->have_rank = 0;
    fmpz_init(v->rank_lo);
    fmpz_init(v->rank_hi);
    v->qubits = v->opt_qubits_lo = v->opt_qubits_hi = 0;
}

void embz_optimal_fid_vs_clear(embz_optimal_fid_vs_t v)
{
    embz_optimal_fid_clear(v->opt);
    fmpz_clear(v->rank_lo);
    fmpz_clear(v->rank_hi);
}

static slong qubits(const fmpz_t n)
{
    return fmpz_cmp_ui(n, 1) <= 0 ? 0 : fmpz_clog_ui(n, 2);
}

int embz_optimal_fid_vs(embz_optimal_fid_vs_t v, const arb_t lower, const arb_t upper,
                        const fmpz_t n, const embz_target_t q, int measure, embz_err_t *err)
{
    int status = embz_optimal_fid(v->opt, NULL, n, q, measure, err);
    if (status != EMBZ_OK) return status;
    v->qubits = qubits(n);
    slong prec = 128;
    arb_t g_lo, g_hi;
    arb_init(g_lo); arb_init(g_hi);
    /* the purified-distance goal's ends */
    if (measure == EMBZ_MEASURE_PURIFIED) {
        arb_set(g_lo, lower);
        arb_set(g_hi, upper);
    } else {
        arb_sub_ui(g_lo, upper, 1, prec);     /* sqrt(1 - upper) */
        arb_neg(g_lo, g_lo);
        arb_sqrtpos(g_lo, g_lo, prec);
        arb_sub_ui(g_hi, lower, 1, prec);     /* sqrt(1 - lower) */
        arb_neg(g_hi, g_hi);
        arb_sqrtpos(g_hi, g_hi, prec);
    }
    arf_t lo, hi;
    arf_init(lo); arf_init(hi);
    arb_get_lbound_arf(lo, g_lo, prec);
    arb_get_ubound_arf(hi, g_hi, prec);
    v->have_rank = 0;
    if (arf_is_finite(lo) && arf_is_finite(hi) && arf_sgn(lo) > 0) {
        fmpq_t e;
        fmpz_t a, b;
        arb_t x, y;
        fmpq_init(e);
        fmpz_init(a); fmpz_init(b);
        arb_init(x); arb_init(y);
        embz_err_t e2;
        embz_err_clear(&e2);
        /* the family is reached no earlier than the larger goal, no later than the smaller */
        arf_get_fmpq(e, hi);
        int s1 = embz_optimal_fid_eps(v->rank_lo, a, x, y, e, q, &e2);
        arf_get_fmpq(e, lo);
        int s2 = s1 == EMBZ_OK ? embz_optimal_fid_eps(b, v->rank_hi, x, y, e, q, &e2) : s1;
        if (s1 == EMBZ_OK && s2 == EMBZ_OK) {
            /* the family's own state is a candidate, so the optimum reaches it by rank n */
            if (fmpz_cmp(v->rank_hi, n) > 0) fmpz_set(v->rank_hi, n);
            if (fmpz_cmp(v->rank_lo, v->rank_hi) > 0) fmpz_set(v->rank_lo, v->rank_hi);
            v->have_rank = 1;
            v->opt_qubits_lo = qubits(v->rank_lo);
            v->opt_qubits_hi = qubits(v->rank_hi);
        }
        fmpq_clear(e);
        fmpz_clear(a); fmpz_clear(b);
        arb_clear(x); arb_clear(y);
    }
    arf_clear(lo); arf_clear(hi);
    arb_clear(g_lo); arb_clear(g_hi);
    return EMBZ_OK;
}
