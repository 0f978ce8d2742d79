/* Target vectors: the bracket by uniform targets (majorization), intersected with the
 * threshold form of the vector itself when it is short enough. */
#include <string.h>
#include <math.h>
#include "impl.h"

/* A general target q (m nonzero entries, largest q_1) is bracketed by uniform ones:
 * u_m is majorized by q, and q by u_d' with d' = floor(1/q_1); tensoring with p keeps these
 * relations and K(p -> r) can only fall as r moves up in the majorization order, so
 *     E_n(u_d') <= E_n(q) <= E_n(u_m)     (E_n(u_1) = 0).
 * The result is a certified enclosure, wider than for uniform targets. */
int _embz_an_vector_target_bounds(embz_error_result_t res, embz_analytic_t an,
                                  const fmpz_t n, const embz_target_t q, embz_err_t *err)
{
    embz_target_t tu;
    embz_error_result_t rl;
    fmpz_t dl;
    arf_t lo, hi;
    int st;
    ulong m = (ulong) q->q->len;
    embz_target_init(tu);
    embz_error_result_init(rl);
    fmpz_init(dl);
    arf_init(lo); arf_init(hi);
    fmpz_fdiv_q(dl, fmpq_denref(q->q->p), fmpq_numref(q->q->p));   /* floor(1/q_1) */
    if (m < 2) {
        st = embz_err_set(err, EMBZ_ERR_INPUT, "the target must have at least two entries");
        goto out;
    }
    tu->kind = EMBZ_TARGET_UNIFORM;
    tu->d = m;
    st = embz_analytic_error(res, an, n, tu, err);
    if (st != EMBZ_OK) goto out;
    arb_get_ubound_arf(hi, res->error, an->prec);
    arf_zero(lo);
    if (fmpz_cmp_ui(dl, 2) >= 0) {
        tu->d = fmpz_get_ui(dl);
        st = embz_analytic_error(rl, an, n, tu, err);
        if (st != EMBZ_OK) goto out;
        arb_get_lbound_arf(lo, rl->error, an->prec);
    }
    {
        /* then the threshold form of E(q) itself; both enclosures hold, so their
         * intersection does (the bracket is kept when the search fails) */
        embz_how_run_struct upper = res->how.run;   /* the run for uniform:m */
        embz_err_t e2;
        embz_err_clear(&e2);
        /* its cost grows with the number of distinct entries (each evaluation counts the
         * weights above V/q_j for every j): beyond TH_SEARCH_TERMS the bracket is the result */
        int ts;
        if (m > TH_SEARCH_TERMS)
            ts = embz_err_set(&e2, EMBZ_ERR_LIMIT, "not run for %lu entries, more than %d",
                              m, TH_SEARCH_TERMS);
        else
            ts = _embz_an_run(rl, an, n, q, &e2);
        if (ts != EMBZ_OK && _embz_an_limits_reached(an->cancel, an->deadline)) {
            /* stopped by the caller's limits: a failure, not the bracket alone */
            if (err != NULL) *err = e2;
            st = ts;
            goto out;
        }
        int tight = 0, rdec = rl->decided;
        if (ts == EMBZ_OK) {
            arf_t a, b;
            arf_init(a); arf_init(b);
            arb_get_lbound_arf(a, rl->error, an->prec);
            arb_get_ubound_arf(b, rl->error, an->prec);
            if (arf_cmp(a, hi) <= 0 && arf_cmp(b, lo) >= 0) {
                if (arf_cmp(a, lo) > 0) arf_set(lo, a);
                if (arf_cmp(b, hi) < 0) arf_set(hi, b);
                tight = 1;
            } else {
                /* both should enclose E(q): disjoint means a fault, so neither is used
                 * beyond the bracket, and the detail says so */
                ts = EMBZ_ERR_PREC;
                snprintf(e2.text, sizeof(e2.text), "inconsistent with the bracket, ignored");
            }
            arf_clear(a); arf_clear(b);
        }
        if (arf_is_zero(lo) && arf_sgn(hi) > 0) {
            /* [0, hi] with hi rounded up to 30 bits is exactly the ball hi/2 +- hi/2, so the
             * lower end stays 0 (E >= 0; arb_set_interval_arf would round the radius up) */
            fmpz_t man, ex;
            fmpz_init(man); fmpz_init(ex);
            arf_set_round(hi, hi, MAG_BITS - 1, ARF_RND_UP);
            arf_get_fmpz_2exp(man, ex, hi);
            arf_mul_2exp_si(arb_midref(res->error), hi, -1);
            mag_set_ui_2exp_si(arb_radref(res->error), fmpz_get_ui(man), fmpz_get_si(ex) - 1);
            fmpz_clear(man); fmpz_clear(ex);
        } else {
            arb_set_interval_arf(res->error, lo, hi, an->prec);
        }
        res->estimate = NAN;   /* the middle of a bracket is no estimate of E(q) */
        /* decision mode: the side of the threshold from the final enclosure of E(q) (the
         * flag left by the bracket's runs is about other targets) */
        res->decided = 0;
        if (an->have_decide) {
            /* also the threshold run's own side, taken from the exact ends of its enclosure
             * (its ball, with a 30-bit radius, is coarser: a wide ball 1e-12 above the
             * threshold may reach below it) */
            if (arf_cmp(lo, an->decide) > 0 || (tight && rdec > 0)) res->decided = 1;
            else if (arf_cmp(hi, an->decide_lo) < 0 || (tight && rdec < 0)) res->decided = -1;
        }
        res->have_bounds = 0;
        /* the Ky Fan index of the best proven threshold value (see _embz_an_threshold_search) */
        if (tight) fmpz_set(res->argk, rl->argk);
        else fmpz_zero(res->argk);
        memset(&res->how, 0, sizeof(res->how));
        res->how.kind = tight ? EMBZ_HOW_GENERAL : EMBZ_HOW_BRACKET;
        res->how.prec = an->prec;
        if (tight) res->how.run = rl->how.run;
        res->how.upper = upper;
        res->how.bracket_lo = fmpz_get_ui(dl) >= 2 ? fmpz_get_ui(dl) : 1UL;
        res->how.bracket_hi = m;
        if (!tight) snprintf(res->how.reason, sizeof(res->how.reason), "%s", e2.text);
    }
out:
    embz_target_clear(tu);
    embz_error_result_clear(rl);
    fmpz_clear(dl);
    arf_clear(lo); arf_clear(hi);
    return st;
}
