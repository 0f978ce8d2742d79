/* The overlap reachable with local unitaries alone, O = sum_j sqrt(p↓_j r↓_j) with
 * r = p (x) u_d, at astronomically large n.
 *
 * For the d-level maximally entangled target the sorted product is explicit in p: the entries
 * of p (x) u_d are the p_i / d, each d times, so r↓_j = p↓_m / d with m = ceil(j/d), and only
 * j <= n meet a nonzero p↓_j:
 *     O = d^(-1/2) sum_{j=1..n} sqrt(p↓_j p↓_ceil(j/d)).
 * The sorted order is the engine's layout A | tail with inserted head weights | B
 * (analytic_layout.c). Once j and m = ceil(j/d) are both tail positions past A and past every
 * inserted head weight, both are affine in the tail index: with c = M - a - (insertions),
 * p↓_K = f(K + c) / W. Writing j = d (m - 1) + s (s = 1..d, one residue class each),
 *     sqrt(p↓_j p↓_m) = g_s(m) / W,   g_s(x) = sqrt(f(d x + c + s - d) f(x + c)),
 * a smooth function of x wherever f is smooth, non-increasing where f is. Each class is then
 * a tail sum of g_s, certified like any weight (src/sum: smoothness and monotonicity proven on
 * its range, Euler–Maclaurin with a rigorous remainder, or the part beyond a negligible point
 * bounded by its mass). The first positions (up to d times the last inserted place) and the
 * positions in B are summed term by term from the layout's values.
 *
 * Only a non-increasing tail is handled: its sorted positions are affine in the index. (A
 * non-decreasing tail is ordered from n down, and its positions carry the bits of n.) */
#include <string.h>
#include "impl.h"

/* largest target dimension: one certified tail per residue class (about 5 ms each) */
#define OVERLAP_MAX_D 256
/* most sorted positions summed one by one before the residue tails take over */
#define OVERLAP_EXPLICIT_MAX (WORD(1) << 16)

/* the term sqrt(p↓_j p↓_ceil(j/d)) (times W) at sorted position j, from the layout */
static int pos_term(arb_t res, actx *c, const fmpz_t j, ulong d, slong prec)
{
    fmpz_t m;
    arb_t vm;
    fmpz_init(m);
    arb_init(vm);
    fmpz_cdiv_q_ui(m, j, d);
    int st = _embz_an_pos_val(res, c, j, prec);
    if (st == EMBZ_OK) st = _embz_an_pos_val(vm, c, m, prec);
    arb_mul(res, res, vm, prec);
    arb_sqrtpos(res, res, prec);
    fmpz_clear(m);
    arb_clear(vm);
    return st;
}

/* g_s(x) = sqrt(w(d x + beta) w(x + gamma)) as an expression in x */
static int residue_expr(embz_expr_t g, const embz_expr_t w, ulong d, slong beta, slong gamma)
{
    embz_expr_t x, y;
    fmpq_t a, b;
    embz_expr_init(x); embz_expr_init(y);
    fmpq_init(a); fmpq_init(b);
    fmpq_set_si(a, (slong) d, 1);
    fmpq_set_si(b, beta, 1);
    int st = embz_expr_affine(x, w, a, b);
    fmpq_one(a);
    fmpq_set_si(b, gamma, 1);
    if (st == EMBZ_OK) st = embz_expr_affine(y, w, a, b);
    if (st == EMBZ_OK) st = embz_expr_geomean(g, x, y);
    embz_expr_clear(x); embz_expr_clear(y);
    fmpq_clear(a); fmpq_clear(b);
    return st;
}

/* sum of sqrt(v_j v_ceil(j/d)) over the sorted positions d m0 < j <= c->n (v the layout's
 * weights, not normalised): the residue tails up to the last tail position jT, then B term
 * by term. Needs m0 past A and past every inserted head weight, and jT > d m0 + 2 d. */
int _embz_overlap_sum_from(arb_t res, embz_fidelity_how_struct *how, actx *c, slong m0,
                           ulong d, slong wp, embz_err_t *err)
{
    int st = EMBZ_OK;
    embz_tail_t gt;
    embz_expr_t g;
    fmpz_t j, jT, mhi;
    arb_t t, x, sum;
    fmpz_init(j); fmpz_init(jT); fmpz_init(mhi);
    arb_init(t); arb_init(x); arb_init(sum);
    embz_expr_init(g);
    fmpz_add_si(jT, c->L, c->a + c->nins);          /* the last tail position */
    arb_zero(sum);
    /* the positions in B */
    for (fmpz_add_ui(j, jT, 1); st == EMBZ_OK && fmpz_cmp(j, c->n) <= 0; fmpz_add_ui(j, j, 1)) {
        st = pos_term(t, c, j, d, wp);
        arb_add(sum, sum, t, wp);
    }
    if (st != EMBZ_OK) embz_err_set(err, st, "a weight of the overlap's explicit positions is undefined");
    /* one residue class s at a time: m = m0 + 1 .. mhi(s), mhi = floor((jT - s)/d) + 1 */
    slong gamma = c->M - c->a - c->nins;
    for (ulong s = 1; s <= d && st == EMBZ_OK; s++) {
        if (_embz_an_should_stop(c)) {
            st = embz_err_set(err, EMBZ_ERR_LIMIT, "stopped: %s", c->stopped == 1
                              ? "cancelled by the caller" : "the time limit was reached");
            break;
        }
        fmpz_sub_ui(mhi, jT, s);
        fmpz_fdiv_q_ui(mhi, mhi, d);
        fmpz_add_ui(mhi, mhi, 1);
        st = residue_expr(g, c->f->weight, d, gamma + (slong) s - (slong) d, gamma);
        if (st != EMBZ_OK) break;
        st = embz_tail_init(gt, g, c->ntrue, m0, mhi, wp, err);
        if (st != EMBZ_OK) {
            embz_tail_clear(gt);
            break;
        }
        arb_set_fmpz(x, gt->end);
        st = embz_tail_sum(t, gt, x, wp);
        if (st == EMBZ_OK && fmpz_cmp(gt->end, mhi) < 0) {
            /* the terms beyond the negligible point: between 0 and their bound */
            arb_t e;
            arb_init(e);
            arf_set_mag(arb_midref(e), gt->neglected);
            mag_set(arb_radref(e), gt->neglected);
            arb_mul_2exp_si(e, e, -1);
            arb_add(t, t, e, wp);
            arb_clear(e);
            how->tail_neglect = 1;
        }
        if (st != EMBZ_OK) embz_err_set(err, st, "cannot bound the tail sum of a residue class");
        how->tail_order = FLINT_MAX(how->tail_order, gt->p);
        how->series += gt->evals;
        how->integrals += gt->integrals;
        embz_tail_clear(gt);
        arb_add(sum, sum, t, wp);
    }
    arb_swap(res, sum);
    fmpz_clear(j); fmpz_clear(jT); fmpz_clear(mhi);
    arb_clear(t); arb_clear(x); arb_clear(sum);
    embz_expr_clear(g);
    return st;
}

/* the layout for the overlap-type sums at size n: a non-increasing tail, and m0 (the first
 * block past A and every inserted head weight, at least mmin) with d m0 <= max_explicit and
 * a tail long enough beyond it */
int _embz_overlap_layout(actx *c, slong *m0, embz_analytic_t an, const fmpz_t n, ulong d,
                         slong mmin, slong max_explicit, embz_tail_struct *tail,
                         int *have_tail, slong *wp, embz_err_t *err)
{
    if (d > OVERLAP_MAX_D)
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                            "the overlap at large n is summed over the d residue classes of "
                            "the target, d <= %d (here d = %lu)", OVERLAP_MAX_D,
                            (unsigned long) d);
    int st = _embz_an_layout(c, an, n, tail, have_tail, wp, err);
    if (st != EMBZ_OK) return st;
    if (c->t->dir < 0)
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                            "the overlap at large n needs weights that are eventually "
                            "non-increasing (a non-decreasing tail is sorted from n down)");
    /* past A and every inserted head weight, positions are affine in the tail index */
    slong top = c->a;
    if (c->nins > 0) {
        const fmpz *last = c->ins_pos + c->nins - 1;
        if (fmpz_bits(last) > 40 || fmpz_get_si(last) > max_explicit)
            return embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                                "a head weight sits too far down the sorted order for the "
                                "overlap (at a position beyond %ld)", (long) max_explicit);
        top = FLINT_MAX(top, fmpz_get_si(last));
    }
    fmpz_t jT;
    fmpz_init(jT);
    fmpz_add_si(jT, c->L, c->a + c->nins);          /* the last tail position */
    /* at most half the tail for the wished-for first blocks (a tail that ends early because
     * its far weights are negligible may be short) */
    if (fmpz_cmp_si(jT, 2 * (slong) d * mmin) < 0) mmin = fmpz_get_si(jT) / (2 * (slong) d);
    *m0 = FLINT_MAX(top + 1, mmin);
    slong J0 = (slong) d * *m0;
    if (J0 > max_explicit) {
        st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                          "the overlap would sum %ld sorted positions term by term (more than "
                          "%ld)", (long) J0, (long) max_explicit);
    } else if (fmpz_cmp_si(jT, J0 + 2 * (slong) d) <= 0) {
        st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                          "n is too small for the overlap's analytic sum (its first %ld sorted "
                          "positions are summed term by term; use explicit mode)", (long) J0);
    }
    fmpz_clear(jT);
    return st;
}

/* eta <- sqrt(neglected / W) when the layout dropped negligible weights (else 0): the
 * purified distance between the truncated state and the true one */
void _embz_overlap_eta(mag_t eta, const actx *c)
{
    mag_zero(eta);
    if (fmpz_cmp(c->n, c->ntrue) < 0 && !mag_is_zero(c->t->neglected)) {
        /* sqrt(1 - W'/W) <= sqrt(neglected / W') */
        mag_t wl;
        mag_init(wl);
        arb_get_mag_lower(wl, c->W);
        mag_div(eta, c->t->neglected, wl);
        mag_sqrt(eta, eta);
        mag_clear(wl);
    }
}

int _embz_overlap_analytic(arb_t O, mag_t eta, embz_fidelity_how_struct *how,
                           embz_analytic_t an, const fmpz_t n, ulong d, embz_err_t *err)
{
    slong prec = an->prec, wp = prec + 32, m0 = 0;
    actx c;
    embz_tail_t tail;
    int have_tail = 0;
    fmpz_t j;
    arb_t sum, t;
    fmpz_init(j);
    arb_init(sum); arb_init(t);
    mag_zero(eta);
    memset(how, 0, sizeof(*how));
    _embz_an_ctx_init(&c, tail, an->f, n, d, wp);
    c.cancel = an->cancel;
    c.deadline = an->deadline;
    int st = _embz_overlap_layout(&c, &m0, an, n, d, 0, OVERLAP_EXPLICIT_MAX, tail, &have_tail,
                                  &wp, err);
    if (st != EMBZ_OK) goto out;
    slong J0 = (slong) d * m0;
    /* the first J0 positions */
    arb_zero(sum);
    for (slong k = 1; k <= J0 && st == EMBZ_OK; k++) {
        fmpz_set_si(j, k);
        st = pos_term(t, &c, j, d, wp);
        arb_add(sum, sum, t, wp);
    }
    if (st != EMBZ_OK) {
        embz_err_set(err, st, "a weight of the overlap's explicit positions is undefined");
        goto out;
    }
    st = _embz_overlap_sum_from(t, how, &c, m0, d, wp, err);
    if (st != EMBZ_OK) goto out;
    arb_add(sum, sum, t, wp);
    how->terms = J0 + c.b;
    /* O = sum / (W sqrt d) */
    arb_sqrt_ui(t, d, wp);
    arb_mul(t, t, c.W, wp);
    arb_div(O, sum, t, wp);
    _embz_overlap_eta(eta, &c);
    how->analytic = 1;
    how->head = c.M;
    how->residues = (slong) d;
    how->prec = wp;
    how->allowance_log2 = mag_is_zero(eta) ? -1e300 : mag_get_d_log2_approx(eta) + 1;
out:
    if (have_tail) embz_tail_clear(tail);
    _embz_an_ctx_clear(&c);
    fmpz_clear(j);
    arb_clear(sum); arb_clear(t);
    return st;
}
