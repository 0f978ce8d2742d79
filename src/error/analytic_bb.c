/* The branch and bound over s (k = d s + r) for the Ky Fan form of uniform targets: the ends
 * of every residue's range, a coarse pass over stretches of s, then best first over the
 * intervals kept in a heap by their model bounds (analytic_taylor.c, analytic_vmodel.c);
 * every interval is discarded (below a proven value), settled (within the tolerance of the
 * best value, or monotone) or split. */
#include <string.h>
#include "impl.h"

static int h_at_s(arb_t h, actx *c, ulong r, const fmpz_t s, slong prec)
{
    fmpz_t k;
    fmpz_init(k);
    fmpz_mul_ui(k, s, c->d);
    fmpz_add_ui(k, k, r);
    int st = _embz_an_h_at(h, c, k, prec);
    if (st == EMBZ_OK) _embz_an_offer(c, h, k);
    fmpz_clear(k);
    return st;
}

/* ---------- the heap of pending intervals ---------- */

static void heap_swap(bb_item *a, bb_item *b) { bb_item t = *a; *a = *b; *b = t; }

void _embz_an_heap_push(bb_heap *h, bb_item *it)
{
    if (h->len == h->cap) {
        h->cap = FLINT_MAX(64, 2 * h->cap);
        h->v = flint_realloc(h->v, sizeof(bb_item) * h->cap);
    }
    slong i = h->len++;
    h->v[i] = *it;
    while (i > 0 && arf_cmp(h->v[(i - 1) / 2].U, h->v[i].U) < 0) {
        heap_swap(h->v + (i - 1) / 2, h->v + i);
        i = (i - 1) / 2;
    }
}

void _embz_an_heap_pop(bb_heap *h, bb_item *out)
{
    *out = h->v[0];
    h->v[0] = h->v[--h->len];
    slong i = 0;
    for (;;) {
        slong l = 2 * i + 1, r = l + 1, m = i;
        if (l < h->len && arf_cmp(h->v[l].U, h->v[m].U) > 0) m = l;
        if (r < h->len && arf_cmp(h->v[r].U, h->v[m].U) > 0) m = r;
        if (m == i) break;
        heap_swap(h->v + i, h->v + m);
        i = m;
    }
}

void _embz_an_bb_item_clear(bb_item *it)
{
    fmpz_clear(it->lo);
    fmpz_clear(it->hi);
    arf_clear(it->U);
}

/* ---------- bounds of stretches ---------- */

/* The first s in [lo, hi] at which an inserted head weight changes the layout for residue
 * r: s, s + 1 or k = d s + r at an inserted position, or the last s before k passes one. */
int _embz_an_special_in(fmpz_t res, const actx *c, ulong r, const fmpz_t lo,
                        const fmpz_t hi)
{
    fmpz_t cand, best;
    fmpz_init(cand);
    fmpz_init(best);
    int found = 0;
    for (slong i = 0; i < c->nins; i++) {
        for (int t = 0; t < 5; t++) {
            if (t < 3) {
                fmpz_add_si(cand, c->ins_pos + i, t - 1);          /* P - 1, P, P + 1 */
            } else {
                fmpz_sub_ui(cand, c->ins_pos + i, r + 1);          /* floor((P - r - 1)/d) */
                fmpz_fdiv_q_ui(cand, cand, c->d);
                fmpz_add_ui(cand, cand, (ulong) (t - 3));         /* and the next one */
            }
            if (fmpz_cmp(cand, lo) >= 0 && fmpz_cmp(cand, hi) <= 0
                && (!found || fmpz_cmp(cand, best) < 0)) {
                fmpz_set(best, cand);
                found = 1;
            }
        }
    }
    if (found) fmpz_set(res, best);
    fmpz_clear(cand);
    fmpz_clear(best);
    return found;
}

/* offsets of the tail positions of k = d lo + r and of s = lo (constant over an interval
 * without special sizes) */
void _embz_an_set_offsets(actx *c, ulong r, const fmpz_t lo)
{
    fmpz_t k;
    slong at, ck, cs;
    fmpz_init(k);
    fmpz_mul_ui(k, lo, c->d);
    fmpz_add_ui(k, k, r);
    ck = _embz_an_ins_before(c, k, &at);
    cs = _embz_an_ins_before(c, lo, &at);
    c->off_k = c->a + ck;
    c->off_s = c->a + cs;
    arb_sub(c->dH, c->ins_cum + ck, c->ins_cum + cs, c->prec);
    fmpz_clear(k);
}

/* A cheap bound for long stretches of s far out (non-increasing tails): the tail values at
 * positions s+1 .. k lie between x2 = M + s - off_s and x1 = M + k - off_k, and as f does
 * not increase,
 *     W h_r(s) <= sum_(x2 < x <= x1) f(x) + dH <= integral_(x2)^(x1) f + dH
 *              =  integral_(ln x2)^(ln x1) phi  + dH  <=  Lambda sup phi + dH,
 * with Lambda the largest ln(x1/x2) over the stretch (at one of its ends: x1/x2 is a
 * Moebius function of s) and sup phi over [ln x2(lo), ln x1(hi)], taken piecewise on
 * sub-balls of width 2. Returns 1 when this bound is below the best proven value: the whole
 * stretch can then be dropped without a model. */
static int phi_discard(actx *c, ulong r, const fmpz_t lo, const fmpz_t hi, slong prec)
{
    embz_tail_struct *t = c->t;
    if (t->dir <= 0 || !arb_is_finite(c->best)) return 0;
    slong sp = prec;   /* the bound may settle a stretch to within the tolerance */
    arb_t x1, x2, lam, l2, ua, ub, u, v, acc;
    arf_t a, b, blo;
    arb_init(x1); arb_init(x2); arb_init(lam); arb_init(l2); arb_init(ua); arb_init(ub);
    arb_init(u); arb_init(v); arb_init(acc);
    arf_init(a); arf_init(b); arf_init(blo);
    int ok = 1;
    arb_zero(lam);
    for (int e = 0; e < 2; e++) {
        const fmpz *s = e ? hi : lo;
        arb_set_fmpz(x1, s);
        arb_mul_ui(x1, x1, c->d, sp);
        arb_add_si(x1, x1, c->M + (slong) r - c->off_k, sp);
        arb_set_fmpz(x2, s);
        arb_add_si(x2, x2, c->M - c->off_s, sp);
        if (e == 0) arb_log(ua, x2, sp);
        else arb_log(ub, x1, sp);
        arb_div(l2, x1, x2, sp);
        arb_log(l2, l2, sp);
        arb_max(lam, lam, l2, sp);
    }
    /* sup phi over [ua, ub], piecewise */
    arb_get_lbound_arf(a, ua, sp);
    arb_get_ubound_arf(b, ub, sp);
    arb_zero(acc);
    long pieces = 0;
    while (ok && arf_cmp(a, b) < 0) {
        arf_t e;
        arf_init(e);
        arf_add_ui(e, a, 2, sp, ARF_RND_UP);
        if (arf_cmp(e, b) > 0) arf_set(e, b);
        arb_set_interval_arf(u, a, e, sp);
        if (embz_expr_eval_arb(v, t->phi, u, t->n, sp) != EMBZ_OK || !arb_is_finite(v)) ok = 0;
        else arb_max(acc, acc, v, sp);
        arf_set(a, e);
        arf_clear(e);
        if (++pieces > 4096) ok = 0;
    }
    int drop = 0;
    if (ok) {
        arb_mul(acc, acc, lam, sp);
        arb_add(acc, acc, c->dH, sp);
        arb_div(acc, acc, c->W, sp);
        arb_get_ubound_arf(a, acc, sp);
        arb_get_lbound_arf(blo, c->best, prec);
        drop = arb_is_finite(acc) && arf_cmp(a, blo) < 0;
        if (!drop && arb_is_finite(acc)) {
            /* within the tolerance of the best value (far out for flat families): the
             * stretch is settled, its bound joins the upper end of the result */
            arb_get_ubound_arf(blo, c->best, prec);
            arf_add(blo, blo, c->tol, prec, ARF_RND_DOWN);
            if (arf_cmp(a, blo) <= 0) {
                if (arf_cmp(a, c->upper) > 0) arf_set(c->upper, a);
                drop = 1;
            }
        }
    }
    c->evals++;
    arb_clear(x1); arb_clear(x2); arb_clear(lam); arb_clear(l2); arb_clear(ua); arb_clear(ub);
    arb_clear(u); arb_clear(v); arb_clear(acc);
    arf_clear(a); arf_clear(b); arf_clear(blo);
    return drop;
}

/* Bound [lo, hi] for residue r: enumerate small intervals, settle monotone ones at their
 * maximising end, push the others (unless already below a proven value). */
static int bb_consider(bb_heap *hp, actx *c, ulong r, const fmpz_t lo, const fmpz_t hi,
                       slong prec)
{
    int st = EMBZ_OK;
    arb_t h;
    fmpz_t m;
    arb_init(h);
    fmpz_init(m);
    fmpz_sub(m, hi, lo);
    if (c->nins > 0 && fmpz_cmp_ui(m, BB_SMALL) >= 0 && _embz_an_special_in(m, c, r, lo, hi)) {
        /* a size where an inserted head weight changes the layout: exactly, then the rest */
        fmpz_t e;
        fmpz_init(e);
        st = h_at_s(h, c, r, m, prec);
        if (st == EMBZ_OK && fmpz_cmp(m, lo) > 0) {
            fmpz_sub_ui(e, m, 1);
            st = bb_consider(hp, c, r, lo, e, prec);
        }
        if (st == EMBZ_OK && fmpz_cmp(m, hi) < 0) {
            fmpz_add_ui(e, m, 1);
            st = bb_consider(hp, c, r, e, hi, prec);
        }
        fmpz_clear(e);
    } else if (fmpz_cmp_ui(m, BB_SMALL) < 0) {
        for (fmpz_set(m, lo); st == EMBZ_OK && fmpz_cmp(m, hi) <= 0; fmpz_add_ui(m, m, 1))
            st = h_at_s(h, c, r, m, prec);
    } else if (_embz_an_set_offsets(c, r, lo),
               _embz_an_use_vmodel(c, lo) && phi_discard(c, r, lo, hi, prec)) {
        /* the whole stretch is below a proven value */
    } else {
        bb_item it;
        int mono;
        fmpz_init_set(it.lo, lo);
        fmpz_init_set(it.hi, hi);
        arf_init(it.U);
        it.r = r;
        mag_t slack;
        mag_init(slack);
        if (_embz_an_use_vmodel(c, lo))
            st = _embz_an_model_bound_v(it.U, &mono, slack, c, r, lo, hi, prec);
        else st = _embz_an_model_bound(it.U, &mono, c, r, lo, hi, prec);
        if (st != EMBZ_OK) {
            /* no model (e.g. precision lost): split blindly */
            st = EMBZ_OK;
            mono = 0;
            arf_pos_inf(it.U);
        } else {
            /* the models describe the smooth extension h~; at integers h differs from it by
             * the Euler-Maclaurin remainders, at most rslack */
            arb_t u;
            arb_init(u);
            arb_set_arf(u, it.U);
            arb_add_error_mag(u, c->rslack);
            arb_get_ubound_arf(it.U, u, prec);
            arb_clear(u);
            mag_add(slack, slack, c->rslack);
        }
        arf_t blo;
        arf_init(blo);
        arb_get_lbound_arf(blo, c->best, prec);
        if (mono != 0 && arb_is_finite(c->best) && arf_cmp(it.U, blo) < 0) {
            /* monotone and even its maximising end (U) is below a proven value */
            _embz_an_bb_item_clear(&it);
        } else if (mono != 0) {
            /* the model is monotone; h itself may exceed it by the slack at most, so the
             * maximum over the interval is at most h(end) + 2 slack */
            st = h_at_s(h, c, r, mono > 0 ? hi : lo, prec);
            if (st == EMBZ_OK && !mag_is_zero(slack)) {
                arb_t hs;
                arb_init(hs);
                arb_set(hs, h);
                arb_add_error_mag(hs, slack);
                arb_add_error_mag(hs, slack);
                _embz_an_raise_upper(c, hs);
                arb_clear(hs);
            }
            _embz_an_bb_item_clear(&it);
        } else if (arb_is_finite(c->best) && arf_cmp(it.U, blo) < 0) {
            _embz_an_bb_item_clear(&it);
        } else {
            _embz_an_heap_push(hp, &it);
        }
        arf_clear(blo);
        mag_clear(slack);
    }
    arb_clear(h);
    fmpz_clear(m);
    return st;
}

/* bb_consider on k pieces of [lo, hi] of (nearly) equal ratio: cuts near lo (hi/lo)^(j/k).
 * Any cuts give a valid partition (empty pieces are skipped, the last one ends at hi), so the
 * cuts are computed with just enough bits to resolve hi - lo, not with all bits of hi (an
 * exponential at thousands of bits cost more than the bounds at n = 10^1000). */
static int consider_pieces(bb_heap *hp, actx *c, ulong r, const fmpz_t lo, const fmpz_t hi,
                           slong k, slong prec)
{
    fmpz_t a, b;
    fmpz_init(b);
    fmpz_sub(b, hi, lo);
    slong wp = (slong) fmpz_bits(hi) - (slong) fmpz_bits(b) + 64;
    arb_t la, lr, x;
    fmpz_init_set(a, lo);
    arb_init(la); arb_init(lr); arb_init(x);
    arb_set_fmpz(la, lo);
    arb_log(la, la, wp);
    arb_set_fmpz(lr, hi);
    arb_log(lr, lr, wp);
    arb_sub(lr, lr, la, wp);
    arb_div_si(lr, lr, k, wp);                    /* ln(hi/lo) / k */
    int st = EMBZ_OK;
    for (slong j = 1; j <= k && st == EMBZ_OK; j++) {
        if (j == k) {
            fmpz_set(b, hi);
        } else {
            arb_mul_si(x, lr, j, wp);
            arb_add(x, x, la, wp);
            arb_exp(x, x, wp);
            arf_get_fmpz(b, arb_midref(x), ARF_RND_FLOOR);
            if (fmpz_cmp(b, hi) >= 0) fmpz_sub_ui(b, hi, 1);
        }
        if (fmpz_cmp(b, a) < 0) continue;          /* empty piece */
        st = bb_consider(hp, c, r, a, b, prec);
        fmpz_add_ui(a, b, 1);
        if (fmpz_cmp(a, hi) > 0) break;
    }
    fmpz_clear(a); fmpz_clear(b);
    arb_clear(la); arb_clear(lr); arb_clear(x);
    return st;
}

/* The stretches of the coarse pass, last in first out: stretch i is [s[2i], s[2i+1]], with
 * the tail sums at its two ends in v[2i], v[2i+1] when have[2i], have[2i+1] (a split shares
 * one end with each half, so a stretch costs two new sums, not four). */
typedef struct {
    fmpz *s;
    arb_ptr v;
    char *have;
    slong cap, top;
} stretch_stack;

static void stack_init(stretch_stack *k, slong cap)
{
    k->cap = cap;
    k->top = 0;
    k->s = _fmpz_vec_init(2 * cap);
    k->v = _arb_vec_init(2 * cap);
    k->have = flint_calloc((size_t) (2 * cap), 1);
}

static void stack_clear(stretch_stack *k)
{
    _fmpz_vec_clear(k->s, 2 * k->cap);
    _arb_vec_clear(k->v, 2 * k->cap);
    flint_free(k->have);
}

/* room for two more stretches */
static void stack_reserve2(stretch_stack *k)
{
    if (k->top + 2 <= k->cap) return;
    slong cap = k->cap, top = k->top;
    fmpz *ns = _fmpz_vec_init(4 * cap);
    arb_ptr nv = _arb_vec_init(4 * cap);
    char *nh = flint_calloc((size_t) (4 * cap), 1);
    _fmpz_vec_set(ns, k->s, 2 * top);
    _arb_vec_swap(nv, k->v, 2 * top);
    memcpy(nh, k->have, (size_t) (2 * top));
    stack_clear(k);
    k->s = ns;
    k->v = nv;
    k->have = nh;
    k->cap = 2 * cap;
}

/* Coarse pass over s for all residues at once: since the tail sums only grow,
 *     h_r(s) <= (C(d hi + d - 1 - a) - C(lo - a)) / W   for lo <= s <= hi,
 * which discards long stretches far below the maximum. Stretches that survive are halved
 * on a log scale down to ratio 2, then handed to the Taylor models residue by residue
 * (bb_consider, which fills the heap). */
static int bb_coarse(bb_heap *hp, actx *c, const fmpz *slo, const fmpz *shi, slong prec)
{
    int st = EMBZ_OK;
    stretch_stack k;
    fmpz_t a, b, m, Slo, Shi, kk;
    arb_t ca, cb, ub;
    arf_t blo, u;
    stack_init(&k, 64);
    fmpz_init(a); fmpz_init(b); fmpz_init(m);
    fmpz_init(Slo); fmpz_init(Shi); fmpz_init(kk);
    arb_init(ca); arb_init(cb); arb_init(ub);
    arf_init(blo); arf_init(u);
    fmpz_set(Slo, slo); fmpz_set(Shi, shi);
    for (ulong r = 1; r < c->d; r++) {
        if (fmpz_cmp(slo + r, Slo) < 0) fmpz_set(Slo, slo + r);
        if (fmpz_cmp(shi + r, Shi) > 0) fmpz_set(Shi, shi + r);
    }
    if (fmpz_cmp(Slo, Shi) <= 0) {
        fmpz_set(k.s, Slo); fmpz_set(k.s + 1, Shi); k.top = 1;
    }
    while (st == EMBZ_OK && k.top > 0) {
        if (_embz_an_should_stop(c)) { st = EMBZ_ERR_LIMIT; break; }
        if (c->decide != NULL && arb_is_finite(c->best)) {
            /* decision mode: a proven value above the threshold settles it */
            arb_get_lbound_arf(blo, c->best, prec);
            if (arf_cmp(blo, c->decide) > 0) { c->cut_short = 1; break; }
        }
        slong t = --k.top;
        fmpz_set(a, k.s + 2 * t);
        fmpz_set(b, k.s + 2 * t + 1);
        /* crude bound */
        fmpz_mul_ui(kk, b, c->d);
        fmpz_add_ui(kk, kk, c->d - 1);
        if (fmpz_cmp(kk, c->kmax) > 0) fmpz_set(kk, c->kmax);
        if (k.have[2 * t + 1]) arb_set(cb, k.v + 2 * t + 1);
        else st = _embz_an_pos_sum(cb, c, kk, prec);
        if (st != EMBZ_OK) break;
        if (k.have[2 * t]) arb_set(ca, k.v + 2 * t);
        else st = _embz_an_pos_sum(ca, c, a, prec);
        if (st != EMBZ_OK) break;
        arb_sub(ub, cb, ca, prec);
        arb_div(ub, ub, c->W, prec);
        c->evals++;
        arb_get_ubound_arf(u, ub, prec);
        arb_get_lbound_arf(blo, c->best, prec);
        if (arb_is_finite(ub) && arb_is_finite(c->best) && arf_cmp(u, blo) < 0)
            continue;                     /* the whole stretch is below a proven value */
        fmpz_mul_2exp(m, a, 1);
        if (fmpz_cmp(m, b) >= 0 || _embz_an_use_vmodel(c, a)) {
            /* ratio at most 2 (or v-models, which take any ratio): models per residue */
            for (ulong r = 0; st == EMBZ_OK && r < c->d; r++) {
                fmpz_t lo_r, hi_r;
                fmpz_init(lo_r); fmpz_init(hi_r);
                fmpz_set(lo_r, fmpz_cmp(a, slo + r) > 0 ? a : slo + r);
                fmpz_set(hi_r, fmpz_cmp(b, shi + r) < 0 ? b : shi + r);
                if (fmpz_cmp(lo_r, hi_r) <= 0) st = bb_consider(hp, c, r, lo_r, hi_r, prec);
                fmpz_clear(lo_r); fmpz_clear(hi_r);
            }
            continue;
        }
        /* split at the geometric mean; push the lower half first so the upper half,
         * where maxima usually sit, is examined first */
        fmpz_mul(m, a, b);
        fmpz_sqrt(m, m);
        if (fmpz_cmp(m, a) <= 0) fmpz_add_ui(m, a, 1);
        stack_reserve2(&k);
        /* [a, m - 1] keeps C(a); [m, b] keeps C(position of b) */
        fmpz_set(k.s + 2 * t, a);
        fmpz_sub_ui(k.s + 2 * t + 1, m, 1);
        arb_set(k.v + 2 * t, ca);
        k.have[2 * t] = 1;
        k.have[2 * t + 1] = 0;
        t = ++k.top;
        fmpz_set(k.s + 2 * t, m);
        fmpz_set(k.s + 2 * t + 1, b);
        arb_set(k.v + 2 * t + 1, cb);
        k.have[2 * t] = 0;
        k.have[2 * t + 1] = 1;
        k.top++;
    }
    stack_clear(&k);
    fmpz_clear(a); fmpz_clear(b); fmpz_clear(m);
    fmpz_clear(Slo); fmpz_clear(Shi); fmpz_clear(kk);
    arb_clear(ca); arb_clear(cb); arb_clear(ub);
    arf_clear(blo); arf_clear(u);
    return st;
}

/* Maximise h over the smooth region: for each residue r, s in [slo[r], shi[r]]. */
int _embz_an_branch_and_bound(actx *c, const fmpz *slo, const fmpz *shi, const arf_t tol,
                              slong prec)
{
    bb_heap hp = { NULL, 0, 0 };
    int st = EMBZ_OK;
    fmpz_t m;
    arb_t h;
    arf_t bhi, gap;
    fmpz_init(m);
    arb_init(h);
    arf_init(bhi); arf_init(gap);

    /* the ends of every residue's range first: they often hold the maximum */
    for (ulong r = 0; st == EMBZ_OK && r < c->d; r++) {
        if (fmpz_cmp(slo + r, shi + r) > 0) continue;
        st = h_at_s(h, c, r, shi + r, prec);
        if (st == EMBZ_OK) st = h_at_s(h, c, r, slo + r, prec);
    }
    if (st == EMBZ_OK) st = bb_coarse(&hp, c, slo, shi, prec);
    /* best first: always refine the interval with the largest bound */
    while (st == EMBZ_OK && hp.len > 0) {
        if (_embz_an_should_stop(c)) { st = EMBZ_ERR_LIMIT; break; }
        arb_get_ubound_arf(bhi, c->best, prec);
        arf_sub(gap, hp.v[0].U, bhi, prec, ARF_RND_UP);
        if (arf_cmp(gap, tol) <= 0 || c->evals > c->bb_budget) break;
        if (c->decide != NULL) {
            /* decision mode: enough once a proven value exceeds the threshold, or once every
             * bound is below it */
            arf_t blo2;
            arf_init(blo2);
            arb_get_lbound_arf(blo2, c->best, prec);
            int above = arb_is_finite(c->best) && arf_cmp(blo2, c->decide) > 0;
            int below = arf_cmp(hp.v[0].U, c->decide_lo) < 0
                        && arf_cmp(c->upper, c->decide_lo) < 0;
            arf_clear(blo2);
            if (above || below) {
                /* the remaining heap bounds the rest (added below); an early stop above the
                 * threshold leaves the upper end to those bounds as well */
                break;
            }
        }
        bb_item it;
        _embz_an_heap_pop(&hp, &it);
        /* split at the geometric mean when the ratio is large, else at the midpoint */
        fmpz_mul_2exp(m, it.lo, 1);
        if (fmpz_cmp(m, it.hi) < 0) {
            fmpz_mul(m, it.lo, it.hi);
            fmpz_sqrt(m, m);
        } else {
            fmpz_add(m, it.lo, it.hi);
            fmpz_fdiv_q_2exp(m, m, 1);
        }
        if (fmpz_cmp(m, it.lo) < 0) fmpz_set(m, it.lo);
        if (fmpz_cmp(m, it.hi) >= 0) fmpz_sub_ui(m, it.hi, 1);
        /* a value at the split point sharpens the best proven value; in the v-model range the
         * ends of the residue ranges (evaluated first) usually hold it already, and an exact
         * value there costs more than the models, so it is skipped */
        if (!_embz_an_use_vmodel(c, it.lo)) {
            st = h_at_s(h, c, it.r, m, prec);
            if (st == EMBZ_OK) st = bb_consider(&hp, c, it.r, it.lo, m, prec);
            fmpz_add_ui(m, m, 1);
            if (st == EMBZ_OK) st = bb_consider(&hp, c, it.r, m, it.hi, prec);
        } else {
            /* v-models: a stretch whose model did not settle it is cut at once into pieces
             * of equal ratio: of length 8 in v = ln s while it is longer than that (the
             * reach of the wide models), else of length below 0.7 (where the full models
             * prove monotonicity; VMODEL_SPLIT_PIECE with the split of w), so that few models
             * are spent on intermediate lengths */
            double vw = fmpz_dlog(it.hi) - fmpz_dlog(it.lo);
            double full = c->t->usplit ? VMODEL_SPLIT_PIECE : 0.7;
            slong k = vw > 8.0 ? (slong) ceil(vw / 8.0) : (vw > full ? (slong) ceil(vw / full) : 2);
            st = consider_pieces(&hp, c, it.r, it.lo, it.hi, FLINT_MIN(k, 4096), prec);
        }
        _embz_an_bb_item_clear(&it);
    }
    /* whatever is left bounds the maximum from above */
    if (hp.len > 0 && arf_cmp(hp.v[0].U, c->upper) > 0) arf_set(c->upper, hp.v[0].U);
    for (slong i = 0; i < hp.len; i++) _embz_an_bb_item_clear(hp.v + i);
    flint_free(hp.v);
    fmpz_clear(m);
    arb_clear(h);
    arf_clear(bhi); arf_clear(gap);
    return st;
}
