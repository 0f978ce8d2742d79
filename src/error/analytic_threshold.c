/* General targets: the threshold form
 *
 * E_n(q) = max_(t >= 0) F(t),  F(t) = Phi(t) - sum_j q_j Phi(t / q_j),
 * Phi(t) = sum_i (p_i - t)_+. In weight units (V = t W): W Phi = S(N(V)) - N(V) V with
 * N(V) = #{i : w_i > V} (A, B and the inserted head weights by comparison, the tail by
 * embz_tail_count_range) and S(N) the sum of the N largest weights (_embz_an_pos_sum). Phi
 * decreases, so on [V1, V2]:  W F <= W Phi(V1) - sum_j q_j W Phi(V2 / q_j) (first order;
 * _embz_an_threshold_bound2 gives the second-order bound), and values at points are lower
 * bounds. Below V_lo = q_m w_min, F = n V (m - 1) / W increases; above the largest weight F = 0.
 * The search runs best first in ln V over [V_lo, V_hi] (analytic_thsearch.c). */
#include "impl.h"

/* *k += the number of the len values above V; EMBZ_ERR_PREC when one cannot be compared */
static int count_above(slong *k, arb_srcptr v, slong len, const arb_t V)
{
    for (slong i = 0; i < len; i++) {
        if (arb_gt(v + i, V)) (*k)++;
        else if (!arb_le(v + i, V)) return EMBZ_ERR_PREC;
    }
    return EMBZ_OK;
}

/* V moved by 2^-40 of itself (dir > 0: up, else down), as an exact midpoint */
void _embz_an_nudge(arb_t V, int dir, slong prec)
{
    arb_t e;
    arb_init(e);
    arb_mul_2exp_si(e, V, -40);
    if (dir > 0) arb_add(V, V, e, prec);
    else arb_sub(V, V, e, prec);
    arb_set_arf(V, arb_midref(V));
    arb_clear(e);
}

/* W Phi(V) and (Nlo, Nhi, may be NULL) bounds on N(V). Tail weights that cannot be told apart
 * from V at this precision are allowed: with Nlo weights certainly above V, and the N(V) - Nlo
 * others above V by at most tie each (embz_tail_count_range),
 *     S(Nlo) - Nlo V <= W Phi(V) <= S(Nlo) - Nlo V + (Nhi - Nlo) tie
 * (S(N) - N V <= W Phi(V) for every N; and the (Nlo+1)-th largest weight is at most V + tie,
 * as every larger one is counted in Nlo). EMBZ_ERR_PREC when a head weight ties with V. */
int _embz_an_phi_wn(arb_t res, fmpz_t Nlo, fmpz_t Nhi, actx *c, const arb_t V,
                    slong prec)
{
    fmpz_t N, clo, chi;
    arb_t tie;
    fmpz_init(N); fmpz_init(clo); fmpz_init(chi);
    arb_init(tie);
    slong k = 0;
    int st = count_above(&k, c->A, c->a, V);
    if (st == EMBZ_OK) st = count_above(&k, c->ins_val, c->nins, V);
    if (st == EMBZ_OK) st = count_above(&k, c->B, c->b, V);
    if (st == EMBZ_OK) st = embz_tail_count_range(clo, chi, tie, c->t, V, c->n, prec);
    if (st == EMBZ_OK) {
        fmpz_add_si(N, clo, k);
        st = _embz_an_pos_sum(res, c, N, prec);
        arb_t nv;
        arb_init(nv);
        arb_mul_fmpz(nv, V, N, prec);
        arb_sub(res, res, nv, prec);
        if (fmpz_cmp(chi, clo) > 0) {
            /* + [0, (Nhi - Nlo) tie] */
            fmpz_sub(N, chi, clo);
            arb_mul_fmpz(nv, tie, N, prec);
            arb_mul_2exp_si(nv, nv, -1);
            arb_add(res, res, nv, prec);
            arb_add_error(res, nv);
        }
        arb_clear(nv);
        if (Nlo != NULL) fmpz_add_si(Nlo, clo, k);
        if (Nhi != NULL) fmpz_add_si(Nhi, chi, k);
    }
    fmpz_clear(N); fmpz_clear(clo); fmpz_clear(chi);
    arb_clear(tie);
    return st;
}

/* the target and the values at the ends of intervals: th_target, th_end (impl.h) */
void _embz_an_th_target_init(th_target *t, const embz_target_t q)
{
    slong len = q->kind == EMBZ_TARGET_UNIFORM ? 1 : q->q->len;
    t->v = _fmpq_vec_init(len);
    t->mult = flint_malloc(sizeof(ulong) * (size_t) len);
    t->len = 0;
    t->alloc = len;
    if (q->kind == EMBZ_TARGET_UNIFORM) {
        fmpq_set_si(t->v, 1, q->d);
        t->mult[0] = q->d;
        t->len = 1;
        return;
    }
    for (slong j = 0; j < len; j++) {
        if (fmpq_is_zero(q->q->p + j)) continue;
        fmpq_set(t->v + t->len, q->q->p + j);
        t->mult[t->len++] = 1;
    }
}

void _embz_an_th_target_clear(th_target *t)
{
    _fmpq_vec_clear(t->v, t->alloc);
    flint_free(t->mult);
}

void _embz_an_th_end_init(th_end *e, const th_target *q)
{
    arb_init(e->F);
    arb_init(e->P0);
    for (int k = 0; k < 4; k++) fmpz_init(e->n + k);
    e->tlen = q->len <= TH_MODEL_TERMS ? 2 * q->len + 2 : 0;
    e->tn = e->tlen > 0 ? _fmpz_vec_init(e->tlen) : NULL;
    e->ok = 0;
}

void _embz_an_th_end_clear(th_end *e)
{
    arb_clear(e->F);
    arb_clear(e->P0);
    for (int k = 0; k < 4; k++) fmpz_clear(e->n + k);
    if (e->tn != NULL) _fmpz_vec_clear(e->tn, e->tlen);
}

void _embz_an_th_end_set(th_end *d, const th_end *e)
{
    arb_set(d->F, e->F);
    arb_set(d->P0, e->P0);
    for (int k = 0; k < 4; k++) fmpz_set(d->n + k, e->n + k);
    if (d->tn != NULL) _fmpz_vec_set(d->tn, e->tn, d->tlen);
    d->ok = e->ok;
}

/* The upper bound W Phi(V1) - sum_j q_j W Phi(V2/q_j) of W F on [V1, V2] (W F at V when
 * V1 = V2 = V); e (may be NULL, only with V1 = V2) receives the value with its counts. */
int _embz_an_threshold_f(arb_t res, th_end *e, actx *c, const th_target *q, const arb_t V1,
                         const arb_t V2, slong prec)
{
    arb_t u, qj, x;
    fmpz_t klo, khi;
    arb_init(u); arb_init(qj); arb_init(x);
    fmpz_init(klo); fmpz_init(khi);
    int st = _embz_an_phi_wn(res, klo, khi, c, V1, prec);
    if (e != NULL) {
        arb_set(e->P0, res);
        fmpz_set(e->n, klo);
        fmpz_set(e->n + 1, khi);
        fmpz_zero(e->n + 2);
        fmpz_zero(e->n + 3);
        if (e->tn != NULL) { fmpz_set(e->tn, klo); fmpz_set(e->tn + 1, khi); }
    }
    for (slong j = 0; j < q->len && st == EMBZ_OK; j++) {
        arb_set_fmpq(qj, q->v + j, prec);
        arb_div(x, V2, qj, prec);
        st = _embz_an_phi_wn(u, klo, khi, c, x, prec);
        arb_mul_ui(qj, qj, q->mult[j], prec);
        arb_submul(res, u, qj, prec);
        if (e != NULL) {
            fmpz_addmul_ui(e->n + 2, klo, q->mult[j]);
            fmpz_addmul_ui(e->n + 3, khi, q->mult[j]);
            if (e->tn != NULL) {
                fmpz_set(e->tn + 2 * j + 2, klo);
                fmpz_set(e->tn + 2 * j + 3, khi);
            }
        }
    }
    arb_clear(u); arb_clear(qj); arb_clear(x);
    fmpz_clear(klo); fmpz_clear(khi);
    c->evals++;
    return st;
}

int _embz_an_th_end_eval(th_end *e, actx *c, const th_target *q, const arb_t V,
                         slong prec)
{
    int st = _embz_an_threshold_f(e->F, e, c, q, V, V, prec);
    e->ok = (st == EMBZ_OK);
    return st;
}

/* Second-order bound of W F on [A, B]. F' = -N(t) + sum_j N(t/q_j) (N(t): the number of
 * weights above t, non-increasing), so on [A, B]
 *     F' <= sum_j N(A/q_j) - N(B)   and   -F' <= N(A) - sum_j N(B/q_j),
 * hence F <= F(A) + (B - A) max(0, sum_j N(A/q_j) - N(B)) and
 *       F <= F(B) + (B - A) max(0, N(A) - sum_j N(B/q_j))
 * (counts taken at the ends of their certified ranges that make these larger). Near the
 * maximum the count differences are small, so the slack falls like (B - A)^2 where the
 * first-order bound W Phi(A) - sum_j q_j W Phi(B/q_j) keeps a slack of order (B - A) N. Sets
 * U to the smaller upper bound. The values at the ends come from ea, eb when known there
 * (a split point is an end of both halves), else they are computed and kept in them. */
int _embz_an_threshold_bound2(arf_t U, actx *c, const th_target *q, const arb_t A,
                              const arb_t B, th_end *ea, th_end *eb, slong prec)
{
    arb_t w, t;
    fmpz_t s;
    arf_t u;
    arb_init(w); arb_init(t);
    fmpz_init(s);
    arf_init(u);
    int st = ea->ok ? EMBZ_OK : _embz_an_th_end_eval(ea, c, q, A, prec);
    if (st == EMBZ_OK && !eb->ok) st = _embz_an_th_end_eval(eb, c, q, B, prec);
    if (st == EMBZ_OK) {
        arb_sub(w, B, A, prec);
        fmpz_sub(s, ea->n + 3, eb->n);
        if (fmpz_sgn(s) < 0) fmpz_zero(s);
        arb_mul_fmpz(t, w, s, prec);
        arb_add(t, t, ea->F, prec);
        arb_get_ubound_arf(U, t, prec);
        fmpz_sub(s, ea->n + 1, eb->n + 2);
        if (fmpz_sgn(s) < 0) fmpz_zero(s);
        arb_mul_fmpz(t, w, s, prec);
        arb_add(t, t, eb->F, prec);
        arb_get_ubound_arf(u, t, prec);
        if (arf_cmp(u, U) < 0) arf_set(U, u);
        if (!arf_is_finite(U)) st = EMBZ_ERR_PREC;
    }
    arb_clear(w); arb_clear(t);
    fmpz_clear(s);
    arf_clear(u);
    return st;
}
