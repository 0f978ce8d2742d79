/* The best-first search over thresholds for the threshold form (analytic_threshold.c): the
 * interval of thresholds with the largest bound is split (at a kink of F, else at its
 * geometric mean or midpoint), a value at the split point raises the proven value, and each
 * half is bounded by the first-order, second-order and smooth-model bounds. */
#include "impl.h"

/* a point near V where every comparison is decided (V itself, else nudged by 2^-40 relative
 * steps in the given direction); e receives the value with its counts */
static int threshold_point(arb_t res, th_end *e, actx *c, const th_target *q, arb_t V,
                           int dir, slong prec)
{
    int st = EMBZ_ERR_PREC;
    for (int tries = 0; tries < 8 && st == EMBZ_ERR_PREC; tries++) {
        st = _embz_an_th_end_eval(e, c, q, V, prec);
        if (st == EMBZ_ERR_PREC) _embz_an_nudge(V, dir >= 0 ? 1 : -1, prec);
    }
    arb_set(res, e->F);
    return st;
}

/* an interval [a, b] of thresholds with its bound U and what is known at its ends */
typedef struct { arf_t a, b, U; th_end ea, eb; } th_item;

static void th_item_init(th_item *it, const th_target *q)
{
    arf_init(it->a); arf_init(it->b); arf_init(it->U);
    _embz_an_th_end_init(&it->ea, q); _embz_an_th_end_init(&it->eb, q);
}

static void th_item_clear(th_item *it)
{
    arf_clear(it->a); arf_clear(it->b); arf_clear(it->U);
    _embz_an_th_end_clear(&it->ea); _embz_an_th_end_clear(&it->eb);
}

/* Lowers the first-order bound f of W F over [A, B] where it is not already below the best
 * value: by the second-order bound (it needs the values and counts at both ends, ea and eb),
 * then, while still above the tolerance, by the smooth model. Not on intervals wider than a
 * factor 2^24: neither helps there. Returns the evaluations spent (0 or 1). */
static int threshold_refine(arb_t f, actx *c, const th_target *q, const arb_t A,
                            const arb_t B, th_end *ea, th_end *eb, const arf_t best,
                            const arb_t tol, slong prec)
{
    arf_t U, bnd;
    arb_t w;
    arf_init(U); arf_init(bnd);
    arb_init(w);
    int spent = 0;
    arb_get_ubound_arf(bnd, f, prec);
    arb_mul_2exp_si(w, A, 24);
    if (arf_cmp(bnd, best) >= 0 && !arb_gt(B, w)
        && _embz_an_threshold_bound2(U, c, q, A, B, ea, eb, prec) == EMBZ_OK) {
        spent = 1;
        if (arf_cmp(U, bnd) < 0) {
            arb_set_arf(f, U);
            arf_set(bnd, U);
        }
        arf_sub(U, bnd, best, prec, ARF_RND_UP);
        if (arf_cmp(U, arb_midref(tol)) > 0
            && _embz_an_threshold_model(U, c, q, A, B, ea, eb, prec) == EMBZ_OK
            && arf_cmp(U, bnd) < 0)
            arb_set_arf(f, U);
    }
    arf_clear(U); arf_clear(bnd);
    arb_clear(w);
    return spent;
}

/* the search's tolerance is at least 4 times the radius of a value: intervals cannot be
 * settled more finely than the values themselves are known */
static void raise_tol(arb_t tol, const arb_t f)
{
    arf_t r;
    arf_init(r);
    arf_set_mag(r, arb_radref(f));
    arf_mul_2exp_si(r, r, 2);
    if (arf_cmp(r, arb_midref(tol)) > 0) arb_set_arf(tol, r);
    arf_clear(r);
}

/* The pending intervals (few: searched linearly for the largest bound). */
typedef struct { th_item *v; slong len, cap; } th_list;

/* [V_lo, V_hi] rounded outwards: V_hi the largest weight, V_lo q_m times the smallest one
 * (also wmin); EMBZ_ERR_UNSUPPORTED when there is nothing to search */
static int search_range(arb_t Va, arb_t Vb, arb_t wmin, actx *c, const th_target *q,
                        slong prec)
{
    arb_t qm;
    fmpz_t K;
    arb_init(qm);
    fmpz_init(K);
    fmpz_one(K);
    int st = _embz_an_pos_val(Vb, c, K, prec);
    if (st == EMBZ_OK) {
        fmpz_set(K, c->n);
        st = _embz_an_pos_val(wmin, c, K, prec);
    }
    fmpz_clear(K);
    arb_set_fmpq(qm, q->v + q->len - 1, prec);     /* the smallest entry */
    arb_mul(Va, wmin, qm, prec);
    {
        arf_t e;
        arf_init(e);
        arb_get_lbound_arf(e, Va, prec);
        arb_set_arf(Va, e);
        arb_get_ubound_arf(e, Vb, prec);
        arb_set_arf(Vb, e);
        arf_clear(e);
    }
    if (st == EMBZ_OK && !(arb_is_positive(Va) && arb_lt(Va, Vb)))
        st = EMBZ_ERR_UNSUPPORTED;      /* zero weights (or a single value): no search */
    arb_clear(qm);
    return st;
}

/* kinks of F where a term's count saturates: V = q_j w_min (q_0 = 1 for Phi(V)); F has a
 * corner there (often the maximum), so intervals are split just below and just above each
 * (a relative 2^-(prec-12) outside the ball, past the weights that tie with it). Fills
 * kink[0 .. 2 (m + 1) - 1] (exact midpoints) and returns their number of pairs, m + 1. */
static slong search_kinks(arb_ptr kink, const arb_t wmin, const th_target *q, slong prec)
{
    slong nk = 0;
    arb_t f, e, V;
    arb_init(f); arb_init(e); arb_init(V);
    for (slong j = -1; j < q->len; j++) {
        if (j >= 0) {
            arb_set_fmpq(f, q->v + j, prec);
            arb_mul(f, f, wmin, prec);
        } else {
            arb_set(f, wmin);
        }
        arb_mul_2exp_si(e, f, -(prec - 12));
        arb_sub(V, f, e, prec);
        arb_get_lbound_arf(arb_midref(kink + 2 * nk), V, prec);
        arb_add(V, f, e, prec);
        arb_get_ubound_arf(arb_midref(kink + 2 * nk + 1), V, prec);
        nk++;
    }
    arb_clear(f); arb_clear(e); arb_clear(V);
    return nk;
}

/* the tolerance in weight units, 2^-(prec-16) W, but not below what the tail sums can resolve
 * (their remainder bound enters every value, and each term of a smooth model) */
static void search_tol(arb_t tol, const actx *c, slong prec)
{
    arb_mul_2exp_si(tol, c->W, -(prec - 16));
    arb_t r;
    arb_init(r);
    arf_set_mag(arb_midref(r), c->t->rem);
    arb_mul_2exp_si(r, r, 3);
    if (arf_cmp(arb_midref(r), arb_midref(tol)) > 0) arb_set(tol, r);
    arb_clear(r);
}

/* One half [Va, Vb] of a split interval: its first-order bound with the ends nudged outwards
 * until decided, refined (threshold_refine) with the values known at its ends (ca, cb: the
 * parent's and the split point's; they do not apply to nudged ends), then kept in L unless
 * below the best proven value. *evals counts the evaluations. */
static int search_half(th_list *L, actx *c, const th_target *q, const arb_t Va, const arb_t Vb,
                       th_end *ca, th_end *cb, const arf_t best, const arb_t tol,
                       slong *evals, slong prec)
{
    int st = EMBZ_OK;
    arb_t A, B, f;
    arb_init(A); arb_init(B); arb_init(f);
    arb_set(A, Va);
    arb_set(B, Vb);
    int ok = 0, tries;
    for (tries = 0; tries < 8 && !ok; tries++) {
        int s2 = _embz_an_threshold_f(f, NULL, c, q, A, B, prec);
        if (s2 == EMBZ_OK) ok = 1;
        else if (s2 != EMBZ_ERR_PREC) { st = s2; break; }
        else {
            _embz_an_nudge(A, -1, prec);
            _embz_an_nudge(B, 1, prec);
        }
    }
    (*evals)++;
    if (tries > 1) ca->ok = cb->ok = 0;      /* nudged ends: known values do not apply */
    if (st == EMBZ_OK && ok)
        *evals += threshold_refine(f, c, q, A, B, ca, cb, best, tol, prec);
    if (st == EMBZ_OK) {
        if (L->len == L->cap) {
            L->cap *= 2;
            L->v = flint_realloc(L->v, sizeof(th_item) * L->cap);
        }
        th_item *it = L->v + L->len;
        th_item_init(it, q);
        arf_set(it->a, arb_midref(Va));
        arf_set(it->b, arb_midref(Vb));
        if (ok) arb_get_ubound_arf(it->U, f, prec);
        else arf_pos_inf(it->U);
        if (tries <= 1) {
            _embz_an_th_end_set(&it->ea, ca);
            _embz_an_th_end_set(&it->eb, cb);
        }
        if (arf_cmp(it->U, best) >= 0) L->len++;   /* else: below a proven value */
        else th_item_clear(it);
    }
    arb_clear(A); arb_clear(B); arb_clear(f);
    return st;
}

/* a value f at a point (V, with its count in ev) joins the proven value and the upper end */
static void search_record(arf_t best, arf_t hi, actx *c, const arb_t f, const th_end *ev,
                          slong prec)
{
    arf_t bnd;
    arf_init(bnd);
    arb_get_lbound_arf(bnd, f, prec);
    if (arf_cmp(bnd, best) > 0) { arf_set(best, bnd); fmpz_set(c->argk, ev->n); }
    arb_get_ubound_arf(bnd, f, prec);
    if (arf_cmp(bnd, hi) > 0) arf_set(hi, bnd);
    arf_clear(bnd);
}

/* best-first search; fills *lo (proven value, lower end) and *hi (upper bound) of W E, and
 * c->argk with the count N(V) at the point V of the best proven value: at a maximising
 * threshold t, k = N_p(t) is a maximising Ky Fan index (||p||_(k) = k t + Phi_p(t) there,
 * ||p (x) q||_(k) <= k t + Phi_(p (x) q)(t)), so this is the argmax up to the tolerance (the
 * lower end of the count's range where weights tie with V) */
int _embz_an_threshold_search(arf_t lo, arf_t hi, actx *c, const th_target *q, slong budget,
                              slong prec)
{
    th_list L;
    L.cap = 64;
    L.len = 0;
    L.v = flint_malloc(sizeof(th_item) * L.cap);
    arb_t V, Va, Vb, f, wmin, tol;
    arf_t best, bnd;
    arb_init(V); arb_init(Va); arb_init(Vb); arb_init(f); arb_init(wmin);
    arb_init(tol);
    arf_init(best); arf_init(bnd);
    int st = search_range(Va, Vb, wmin, c, q, prec);
    slong m = q->len;
    slong nk = 0, kcap = m <= TH_MODEL_TERMS ? 2 * (m + 1) : 0;
    arb_ptr kink = _arb_vec_init(kcap);          /* exact: midpoints */
    if (st == EMBZ_OK && kcap > 0) nk = search_kinks(kink, wmin, q, prec);
    if (st == EMBZ_OK) {
        /* a few more evaluations per unit of ln t: wide ranges are cut into pieces of a
         * factor e^2 .. e^8 before models settle them */
        arb_div(f, Vb, Va, prec);
        arb_log(f, f, prec);
        budget += 4 * (slong) arf_get_d(arb_midref(f), ARF_RND_UP);
    }
    arf_zero(best);                                  /* F(0) = 0 */
    arf_zero(hi);
    search_tol(tol, c, prec);
    th_end ev, ca, cb;
    _embz_an_th_end_init(&ev, q); _embz_an_th_end_init(&ca, q); _embz_an_th_end_init(&cb, q);
    if (st == EMBZ_OK) {
        /* the maximum over [0, V_lo] is at V_lo */
        st = threshold_point(f, &ev, c, q, Va, -1, prec);
        if (st == EMBZ_OK) {
            raise_tol(tol, f);
            search_record(best, hi, c, f, &ev, prec);
            th_item_init(L.v, q);
            _embz_an_th_end_set(&L.v[0].ea, &ev);
            arf_set(L.v[0].a, arb_midref(Va));
            arf_set(L.v[0].b, arb_midref(Vb));
            arf_pos_inf(L.v[0].U);
            L.len = 1;
        }
    }
    slong evals = 0;
    while (st == EMBZ_OK && L.len > 0) {
        if (_embz_an_should_stop(c)) { st = EMBZ_ERR_LIMIT; break; }
        /* the item with the largest bound */
        slong top = 0;
        for (slong i = 1; i < L.len; i++) if (arf_cmp(L.v[i].U, L.v[top].U) > 0) top = i;
        arf_sub(bnd, L.v[top].U, best, prec, ARF_RND_UP);
        if (arf_cmp(bnd, arb_midref(tol)) <= 0) break;
        if (evals > budget) { c->search_open = 1; break; }
        th_item it = L.v[top];
        L.v[top] = L.v[--L.len];
        /* split: just outside a kink inside the interval, else at the geometric mean while
         * the ratio exceeds 2, else at the midpoint */
        arb_set_arf(Va, it.a);
        arb_set_arf(Vb, it.b);
        arb_mul_2exp_si(V, Va, 1);
        slong kk;
        for (kk = 0; kk < 2 * nk; kk++)
            if (arf_cmp(it.a, arb_midref(kink + kk)) < 0
                && arf_cmp(arb_midref(kink + kk), it.b) < 0)
                break;
        if (kk < 2 * nk) {
            arb_set(V, kink + kk);
        } else if (arb_lt(V, Vb)) {
            arb_mul(V, Va, Vb, prec);
            arb_sqrt(V, V, prec);
        } else {
            arb_add(V, Va, Vb, prec);
            arb_mul_2exp_si(V, V, -1);
        }
        arb_set_arf(V, arb_midref(V));
        st = threshold_point(f, &ev, c, q, V, 1, prec);
        evals++;
        if (st != EMBZ_OK) { th_item_clear(&it); break; }
        raise_tol(tol, f);
        search_record(best, hi, c, f, &ev, prec);
        /* the two halves with their bounds (if V was nudged past b, only the left one) */
        for (int side = 0; side < 2 && st == EMBZ_OK; side++) {
            arb_set_arf(Va, side == 0 ? it.a : arb_midref(V));
            arb_set_arf(Vb, side == 0 ? arb_midref(V) : it.b);
            if (!arb_lt(Va, Vb)) continue;
            _embz_an_th_end_set(&ca, side == 0 ? &it.ea : &ev);
            _embz_an_th_end_set(&cb, side == 0 ? &ev : &it.eb);
            st = search_half(&L, c, q, Va, Vb, &ca, &cb, best, tol, &evals, prec);
        }
        th_item_clear(&it);
    }
    for (slong i = 0; i < L.len; i++) {
        if (arf_cmp(L.v[i].U, hi) > 0) arf_set(hi, L.v[i].U);
        th_item_clear(L.v + i);
    }
    _embz_an_th_end_clear(&ev); _embz_an_th_end_clear(&ca); _embz_an_th_end_clear(&cb);
    if (arf_cmp(hi, best) < 0) arf_set(hi, best);
    arf_set(lo, best);
    flint_free(L.v);
    _arb_vec_clear(kink, kcap);
    arb_clear(V); arb_clear(Va); arb_clear(Vb); arb_clear(f); arb_clear(wmin);
    arb_clear(tol);
    arf_clear(best); arf_clear(bnd);
    return st;
}
