/* The embezzlement error E_n(u_d) at astronomically large n.
 *
 * Sorted Schmidt probabilities are laid out as  A | tail | B : A holds the head values (i <= M)
 * that are at least every tail value, B those that are at most every tail value, and the tail
 * (i > M, certified monotone) sits between them in its own order. For the d-level maximally
 * entangled target (Ky Fan form, k = d s + r, 0 <= r < d)
 *     E = max_k  P_k - P_s - (r/d) p_(s+1),       P_k = sum of the k largest p,
 * which is evaluated
 *   - exactly for the first few positions (explicit sums),
 *   - at k = n (P_k = 1 from there on and the expression only decreases afterwards),
 *   - for k in B explicitly, and
 *   - for k, s inside the tail by branch and bound over s: on each interval a Taylor model in s
 *     (coefficients at the centre, Lagrange remainder from an enclosure over the interval) of
 *     the smooth Euler–Maclaurin extension gives an upper bound; values at integers give lower
 *     bounds. Every interval is either discarded (its bound is below a proven value), resolved
 *     (bound within the tolerance of the best value), or split.
 *
 * This file is the driver for one size; the pieces it calls are declared in impl.h, one
 * concept per file analytic_*.c. */
#include <string.h>
#include "impl.h"

/* The layout for size n: on the engine's shared tail when the weights do not use n, else on
 * a tail of its own in the storage tail (*have_tail: to be cleared), with heads of 64, 256,
 * ... weights and, where a weight that uses n needs them, the bits of n (raising *wp). */
int _embz_an_layout(actx *c, embz_analytic_t an, const fmpz_t n, embz_tail_struct *tail,
                    int *have_tail, slong *wp, embz_err_t *err)
{
    slong prec = an->prec;
    int st = EMBZ_ERR_UNSUPPORTED;
    if (!an->uses_n) {
        /* one certified tail serves every size up to its end */
        st = embz_analytic_prepare(an, fmpz_cmp(an->nmax, n) >= 0 ? an->nmax : n, err);
        if (st != EMBZ_OK) return st;
        c->t = an->tail;
        if (fmpz_cmp_si(n, 2 * ((slong) c->d * (an->tail->M + 2) + (slong) c->d)) <= 0)
            return embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                                "n is too small for the analytic engine (use explicit mode)");
        *wp = FLINT_MAX(*wp, an->tail->prec);
        c->prec = *wp;
        return _embz_an_setup(c, an->tail->M, 1, *wp, err);
    }
    slong M = 64;
    for (int attempt = 0; attempt < 4; attempt++, M *= 4) {
        /* the analytic layout needs a long tail */
        if (fmpz_cmp_si(n, 2 * ((slong) c->d * (M + 2) + (slong) c->d)) <= 0) {
            st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                              "n is too small for the analytic engine (use explicit mode)");
            break;
        }
        embz_err_clear(err);
        if (*have_tail) {
            embz_tail_clear(tail);
            *have_tail = 0;
            _embz_an_free_layout(c);
        }
        st = _embz_an_setup(c, M, 0, *wp, err);
        *have_tail = 1;
        if ((st == EMBZ_ERR_DOMAIN
             || (st == EMBZ_ERR_UNSUPPORTED && (slong) fmpz_bits(n) > prec - 16
                 && (slong) fmpz_bits(n) <= 8 * prec))
            && *wp < prec + 32 + (slong) fmpz_bits(n)) {
            /* a weight that uses n may only look negative or undefined because n was
             * rounded (n - i at i = n), or its weights differ by less than the precision
             * resolves (1/(i + n/10) at 10^70: the head cannot be placed among the tail
             * weights): once more with the bits of n (for the second kind only up to
             * 8 prec bits of n: 10^300 costs 20 s at 128 bits, 10^1000 over ten minutes) */
            *wp = prec + 32 + (slong) fmpz_bits(n);
            c->prec = *wp;
            M /= 4;
            attempt--;
            continue;
        }
        if (st == EMBZ_OK || st == EMBZ_ERR_DOMAIN) break;
    }
    return st;
}

/* the threshold form (the result is [proven value, bound]) into c->best and c->upper */
static int run_threshold(actx *c, const embz_target_t q, slong budget, slong wp)
{
    arf_t tlo, thi;
    arb_t x;
    arf_init(tlo); arf_init(thi);
    arb_init(x);
    th_target tq;
    _embz_an_th_target_init(&tq, q);
    int st = _embz_an_threshold_search(tlo, thi, c, &tq, budget, wp);
    _embz_an_th_target_clear(&tq);
    if (st == EMBZ_OK) {
        arb_set_arf(x, tlo);
        arb_div(c->best, x, c->W, wp);
        arb_get_lbound_arf(tlo, c->best, wp);
        arb_set_arf(c->best, tlo);
        arb_set_arf(x, thi);
        arb_div(x, x, c->W, wp);
        arb_get_ubound_arf(c->upper, x, wp);
    }
    arf_clear(tlo); arf_clear(thi);
    arb_clear(x);
    return st;
}

/* the Ky Fan form of a uniform target: the explicit positions, k = n, the positions in B,
 * then the smooth region by branch and bound */
static int run_kyfan(actx *c, slong prec, slong wp)
{
    int st = EMBZ_OK;
    arb_t h;
    fmpz_t k, kmax, tmp;
    arf_t tol;
    arb_init(h);
    fmpz_init(k); fmpz_init(kmax); fmpz_init(tmp);
    arf_init(tol);
    /* explicit positions */
    for (slong kk = 1; kk <= c->E; kk++) {
        fmpz_set_si(k, kk);
        st = _embz_an_h_at(h, c, k, wp);
        if (st != EMBZ_OK) break;
        _embz_an_offer(c, h, k);
    }
    /* k = n */
    if (st == EMBZ_OK) {
        st = _embz_an_h_at(h, c, c->n, wp);
        if (st == EMBZ_OK) _embz_an_offer(c, h, c->n);
    }
    /* k inside B: a + L < k < n */
    if (st == EMBZ_OK) {
        fmpz_add_si(k, c->L, c->a + c->nins + 1);
        for (; st == EMBZ_OK && fmpz_cmp(k, c->n) < 0; fmpz_add_ui(k, k, 1)) {
            st = _embz_an_h_at(h, c, k, wp);
            if (st == EMBZ_OK) _embz_an_offer(c, h, k);
        }
    }
    /* the smooth region, residue by residue */
    fmpz_add_si(kmax, c->L, c->a + c->nins);
    fmpz_sub_ui(tmp, c->n, 1);
    if (fmpz_cmp(tmp, kmax) < 0) fmpz_set(kmax, tmp);
    fmpz_set(c->kmax, kmax);
    arf_one(tol);
    arf_mul_2exp_si(tol, tol, -(prec - 16));
    arf_set(c->tol, tol);
    fmpz *vlo = _fmpz_vec_init(c->d), *vhi = _fmpz_vec_init(c->d);
    for (ulong r = 0; r < c->d; r++) {
        /* s_lo = floor((E - r)/d) + 1, s_hi = floor((kmax - r)/d) */
        fmpz_set_si(vlo + r, c->E - (slong) r);
        fmpz_fdiv_q_ui(vlo + r, vlo + r, c->d);
        fmpz_add_ui(vlo + r, vlo + r, 1);
        fmpz_sub_ui(vhi + r, kmax, r);
        fmpz_fdiv_q_ui(vhi + r, vhi + r, c->d);
    }
    int decided = 0;
    if (c->decide != NULL && arb_is_finite(c->best)) {
        arf_t b0;
        arf_init(b0);
        arb_get_lbound_arf(b0, c->best, wp);
        decided = arf_cmp(b0, c->decide) > 0;
        arf_clear(b0);
    }
    if (st == EMBZ_OK && !decided) st = _embz_an_branch_and_bound(c, vlo, vhi, tol, wp);
    if (decided) c->cut_short = 1;
    _fmpz_vec_clear(vlo, c->d);
    _fmpz_vec_clear(vhi, c->d);
    arb_clear(h);
    fmpz_clear(k); fmpz_clear(kmax); fmpz_clear(tmp);
    arf_clear(tol);
    return st;
}

/* The result from a finished search: E in [best lower end, max(upper bounds)], widened by
 * the neglected weights; EMBZ_ERR_LIMIT when an end is not finite. */
static int run_result(embz_error_result_t res, actx *c, const embz_target_t q, int thform,
                      slong prec, slong wp, embz_err_t *err)
{
    int st = EMBZ_OK;
    arf_t lo, hi;
    arf_init(lo); arf_init(hi);
    arb_get_lbound_arf(lo, c->best, wp);
    arf_set(hi, c->upper);
    /* decision mode stopped before the smooth region was bounded: only the trivial
     * upper end E <= 1 is known (K is a difference of Ky Fan norms, each <= 1) */
    if (c->cut_short && arf_cmp_si(hi, 1) < 0) arf_one(hi);
    if (arf_cmp(hi, lo) < 0) arf_set(hi, lo);
    if (fmpz_cmp(c->n, c->ntrue) < 0 && !mag_is_zero(c->t->neglected)) {
        /* K moves by at most twice the l1 change of p, which is at most
         * 2 * neglected / W when the negligible weights are dropped */
        mag_t e;
        arf_t ea;
        mag_init(e);
        arf_init(ea);
        arb_get_mag_lower(e, c->W);
        mag_div(e, c->t->neglected, e);
        mag_mul_2exp_si(e, e, 2);
        arf_set_mag(ea, e);
        arf_sub(lo, lo, ea, wp, ARF_RND_FLOOR);
        arf_add(hi, hi, ea, wp, ARF_RND_CEIL);
        mag_clear(e);
        arf_clear(ea);
    }
    if (!arf_is_finite(lo) || !arf_is_finite(hi)) {
        /* some interval kept an unbounded model (or no value was proven) when the
         * search stopped: no enclosure, and never a number */
        st = embz_err_set(err, EMBZ_ERR_LIMIT,
                          "the analytic engine could not bound E at this size "
                          "(%s budget reached with an unbounded interval)",
                          thform ? "threshold search" : "branch and bound");
        arf_clear(lo); arf_clear(hi);
        return st;
    }
    arb_set_interval_arf(res->error, lo, hi, wp);
    /* the side of a decision threshold, from the ends themselves (a wide ball's
     * lower end, with its 30-bit radius, is much coarser) */
    res->decided = 0;
    if (c->decide != NULL) {
        if (arf_cmp(lo, c->decide) > 0) res->decided = 1;
        else if (arf_cmp(hi, c->decide_lo) < 0) res->decided = -1;
    }
    arb_set_round(res->error, res->error, prec);
    fmpz_set(res->argk, c->argk);
    res->method = EMBZ_METHOD_ANALYTIC;
    res->order = c->t->dir;
    res->have_bounds = 0;
    res->estimate = arf_get_d(arb_midref(res->error), ARF_RND_NEAR);
    memset(&res->how, 0, sizeof(res->how));
    res->how.kind = thform ? EMBZ_HOW_THRESHOLD : EMBZ_HOW_KYFAN;
    res->how.prec = prec;
    {
        embz_how_run_struct *h = &res->how.run;
        h->kind = res->how.kind;
        h->terms = c->M;
        h->tail_order = c->t->p;
        h->tail_dir = c->t->dir > 0 ? 1 : -1;
        h->d = thform && q->kind == EMBZ_TARGET_UNIFORM ? q->d : 0;   /* 0: a vector */
        h->bounds = c->evals;
        h->series = c->t->evals;
        h->integrals = c->t->integrals;
        h->budget_reached = c->search_open != 0;
        h->prec = prec;
    }
    arf_clear(lo); arf_clear(hi);
    return st;
}

/* The engine for one size: the layout, then the Ky Fan search (uniform targets) or the
 * threshold search (a target vector, or a uniform target beyond KYFAN_MAX_D). */
int _embz_an_run(embz_error_result_t res, embz_analytic_t an, const fmpz_t n,
                 const embz_target_t q, embz_err_t *err)
{
    slong prec = an->prec;
    /* the threshold form for target vectors and for uniform targets beyond KYFAN_MAX_D (the
     * Ky Fan search has d residues to bound: its cost and layout grow with d) */
    int thform = (q->kind != EMBZ_TARGET_UNIFORM) || q->d > KYFAN_MAX_D;
    slong wp = prec + 32;
    actx c;
    embz_tail_t tail;
    _embz_an_ctx_init(&c, tail, an->f, n, thform ? 1 : q->d, wp);
    c.decide = an->have_decide ? an->decide : NULL;
    c.decide_lo = an->have_decide ? an->decide_lo : NULL;
    c.cancel = an->cancel;
    c.deadline = an->deadline;
    c.bb_budget = an->bb_budget > 0 ? an->bb_budget : BB_BUDGET;
    int have_tail = 0;      /* a tail of our own to clear */

    int st = _embz_an_layout(&c, an, n, tail, &have_tail, &wp, err);
    if (st == EMBZ_OK) {
        arf_zero(c.upper);
        if (thform)
            st = run_threshold(&c, q, an->th_budget > 0 ? an->th_budget : THRESHOLD_BUDGET, wp);
        else
            st = run_kyfan(&c, prec, wp);
        if (st == EMBZ_OK)
            st = run_result(res, &c, q, thform, prec, wp, err);
        else if (c.stopped)
            embz_err_set(err, EMBZ_ERR_LIMIT, "stopped: %s", c.stopped == 1
                         ? "cancelled by the caller" : "the time limit was reached");
        else
            embz_err_set(err, st, thform && st == EMBZ_ERR_PREC
                         ? "weights tie with a threshold: more bits needed"
                         : "the analytic engine could not certify the maximum");
    }
    if (have_tail) embz_tail_clear(tail);
    _embz_an_ctx_clear(&c);
    return st;
}

/* E_n(q) for a uniform target, or for a target vector within its bracket */
int embz_analytic_error(embz_error_result_t res, embz_analytic_t an, const fmpz_t n,
                        const embz_target_t q, embz_err_t *err)
{
    int st = q->kind != EMBZ_TARGET_UNIFORM ? _embz_an_vector_target_bounds(res, an, n, q, err)
                                              : _embz_an_run(res, an, n, q, err);
    /* every caller gets a finite enclosure or a failure, never nan or [-inf, inf] */
    if (st == EMBZ_OK && !arb_is_finite(res->error))
        st = embz_err_set(err, EMBZ_ERR_LIMIT, "the analytic engine found no finite enclosure");
    return st;
}

int embz_error_analytic(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                        const embz_target_t q, slong prec, embz_err_t *err)
{
    embz_analytic_t a;
    embz_analytic_init(a, f, prec);
    int st = embz_analytic_error(res, a, n, q, err);
    embz_analytic_clear(a);
    return st;
}
