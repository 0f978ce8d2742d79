/* Fidelity-type measures for pure bipartite states given by Schmidt vectors.
 *
 * Optimal LOCC fidelity. With p and r sorted non-increasing and zero padded to length L, the
 * states LOCC reaches from p include every pure state whose Schmidt vector s majorizes p
 * (Nielsen), and pure outputs are optimal (Vidal, Jonathan, Nielsen, Phys. Rev. A 62, 012304
 * (2000)). For sorted s the fidelity with r after the best local unitaries is
 * (sum_i sqrt(s_i r_i))^2. So
 *     sqrt(F_max) = max { sum_i sqrt(s_i r_i) : s sorted, T_l(s) <= T_l(p) for all l },
 * T_l(x) = sum_{i >= l} x_i the tail sums (0-based l = 0..L, T_0 = 1, T_L = 0).
 *
 * Construction (derived here, tested against a numerical search in tests/test_fidelity.c).
 * Put the points Z_l = (T_l(r), T_l(p)), l = 0..L, in the plane and take their lower convex
 * hull g (a convex piecewise-linear function on [0, 1] with g(0) = 0, g(1) = 1 and
 * g(T_l(r)) <= T_l(p)). On the index block between two consecutive hull vertices l_a < l_b set
 * s_i = c r_i with c = (slope of g on that piece). Then T_l(s) = g(T_l(r)) <= T_l(p), so s
 * majorizes p; slopes fall towards the tail, so s is sorted. Each block contributes
 * sqrt(c) * (block mass of r) = sqrt(dP dR) with dP, dR the block masses of p and r, and
 *     sqrt(F_max) = sum over hull pieces of sqrt(dP dR).
 * Optimality: let S_j be the masses a feasible s puts on the hull blocks j = 0, 1, ...
 * (head first). Cauchy-Schwarz gives sum_i sqrt(s_i r_i) <= Phi(S) = sum_j sqrt(S_j dR_j),
 * and the tail bounds at the hull vertices say D_j = sum_{j' >= j} (S_j' - dP_j') <= 0,
 * D_0 = 0. Phi is concave with d Phi / d S_j = 1 / (2 sqrt(c_j)) at S = dP, non-decreasing in
 * j because the slopes c_j fall towards the tail; by Abel summation the linear term
 * sum_j (S_j - dP_j) / (2 sqrt(c_j)) = sum_{j >= 1} (1/(2 sqrt c_j) - 1/(2 sqrt c_{j-1})) D_j
 * is <= 0, so Phi(S) <= Phi(dP), which the construction attains. (Blocks with c_j = 0 sit where
 * the tail of p is zero and force S_j = 0.)
 *
 * The hull is built by a monotone chain over the points in the order l = 0, 1, ..., L
 * (x = T_l(r) non-increasing), with exact integer coordinates (common denominators). */
#include <stdlib.h>
#include <string.h>
#include "embz/fidelity.h"


/* ------------------------------------------------------------------ measure names */

static const char *const measure_names[] = { "k", "fidelity", "purified", "overlap" };

int embz_measure_parse(int *measure, const char *text, embz_err_t *err)
{
    for (int k = 0; k < 4; k++)
        if (text != NULL && strcmp(text, measure_names[k]) == 0) {
            *measure = k;
            return EMBZ_OK;
        }
    return embz_err_set(err, EMBZ_ERR_INPUT,
                        "unknown measure '%s' (k, fidelity, purified or overlap)",
                        text != NULL ? text : "");
}

const char *embz_measure_name(int measure)
{
    return measure >= 0 && measure < 4 ? measure_names[measure] : "unknown";
}

/* ------------------------------------------------------------------ lower convex hull */

/* Streaming lower hull of points pushed with non-increasing x. */
typedef struct {
    fmpz *x, *y;
    slong *l;
    slong len, alloc;
    fmpz_t u, v, w;
} fhull_t;

static void fhull_init(fhull_t *h)
{
    h->x = h->y = NULL;
    h->l = NULL;
    h->len = h->alloc = 0;
    fmpz_init(h->u); fmpz_init(h->v); fmpz_init(h->w);
}

static void fhull_clear(fhull_t *h)
{
    for (slong k = 0; k < h->alloc; k++) {
        fmpz_clear(h->x + k);
        fmpz_clear(h->y + k);
    }
    flint_free(h->x);
    flint_free(h->y);
    flint_free(h->l);
    fmpz_clear(h->u); fmpz_clear(h->v); fmpz_clear(h->w);
}

/* Keep only turns that bend the right way for a lower hull walked from right to left:
 * with O, A the last two vertices and B the new point, A stays iff
 * (A.x - O.x)(B.y - O.y) - (A.y - O.y)(B.x - O.x) < 0. Collinear and equal-x points go. */
static void fhull_push(fhull_t *h, const fmpz_t x, const fmpz_t y, slong l)
{
    while (h->len >= 2) {
        const fmpz *ox = h->x + h->len - 2, *oy = h->y + h->len - 2;
        const fmpz *ax = h->x + h->len - 1, *ay = h->y + h->len - 1;
        fmpz_sub(h->u, ax, ox);
        fmpz_sub(h->v, y, oy);
        fmpz_mul(h->u, h->u, h->v);
        fmpz_sub(h->v, ay, oy);
        fmpz_sub(h->w, x, ox);
        fmpz_mul(h->v, h->v, h->w);
        if (fmpz_cmp(h->u, h->v) >= 0) h->len--;
        else break;
    }
    if (h->len == h->alloc) {
        slong na = h->alloc ? 2 * h->alloc : 16;
        h->x = flint_realloc(h->x, (size_t) na * sizeof(fmpz));
        h->y = flint_realloc(h->y, (size_t) na * sizeof(fmpz));
        h->l = flint_realloc(h->l, (size_t) na * sizeof(slong));
        for (slong k = h->alloc; k < na; k++) {
            fmpz_init(h->x + k);
            fmpz_init(h->y + k);
        }
        h->alloc = na;
    }
    fmpz_set(h->x + h->len, x);
    fmpz_set(h->y + h->len, y);
    h->l[h->len] = l;
    h->len++;
}

/* sum over hull pieces of sqrt(dx * dy) (unscaled). */
static void fhull_sqrt_sum(arb_t res, const fhull_t *h, slong prec)
{
    fmpz_t dx, dy;
    arb_t t;
    fmpz_init(dx); fmpz_init(dy);
    arb_init(t);
    arb_zero(res);
    for (slong j = 0; j + 1 < h->len; j++) {
        fmpz_sub(dx, h->x + j, h->x + j + 1);
        fmpz_sub(dy, h->y + j, h->y + j + 1);
        fmpz_mul(dx, dx, dy);
        arb_sqrt_fmpz(t, dx, prec);
        arb_add(res, res, t, prec);
    }
    fmpz_clear(dx); fmpz_clear(dy);
    arb_clear(t);
}

/* ------------------------------------------------------------------ exact vectors */

static int qcmp_desc(const void *a, const void *b)
{
    return -fmpq_cmp((const fmpq *) a, (const fmpq *) b);
}

/* Sorted (non-increasing) copy padded with zeros to length L, as integers over a common
 * denominator D: v[i] = x↓_i * D. */
static fmpz *sorted_integers(fmpz_t D, const embz_qvec_t x, slong L)
{
    fmpq *s = _fmpq_vec_init(L > 0 ? L : 1);
    for (slong k = 0; k < x->len; k++) fmpq_set(s + k, x->p + k);
    if (L > 1) qsort(s, (size_t) L, sizeof(fmpq), qcmp_desc);
    fmpz_one(D);
    for (slong k = 0; k < L; k++) fmpz_lcm(D, D, fmpq_denref(s + k));
    fmpz *v = _fmpz_vec_init(L > 0 ? L : 1);
    for (slong k = 0; k < L; k++) {
        fmpz_divexact(v + k, D, fmpq_denref(s + k));
        fmpz_mul(v + k, v + k, fmpq_numref(s + k));
    }
    _fmpq_vec_clear(s, L > 0 ? L : 1);
    return v;
}

void embz_qvec_fidelity(arb_t F, embz_qvec_t s, slong *nblocks, const embz_qvec_t p,
                        const embz_qvec_t r, slong prec)
{
    slong L = FLINT_MAX(p->len, r->len);
    fmpz_t Dp, Dr, X, Y, dP, dR;
    fmpz_init(Dp); fmpz_init(Dr); fmpz_init(X); fmpz_init(Y); fmpz_init(dP); fmpz_init(dR);
    fmpz *a = sorted_integers(Dp, p, L), *b = sorted_integers(Dr, r, L);
    fmpz_t sp, sr;
    fmpz_init(sp); fmpz_init(sr);
    _fmpz_vec_sum(sp, a, L);
    _fmpz_vec_sum(sr, b, L);
    /* the inputs are normalised; use the actual sums so that T_0 is exact anyway */
    fhull_t h;
    fhull_init(&h);
    fmpz_set(X, sr);
    fmpz_set(Y, sp);
    for (slong l = 0; l <= L; l++) {
        fhull_push(&h, X, Y, l);
        if (l < L) {
            fmpz_sub(X, X, b + l);
            fmpz_sub(Y, Y, a + l);
        }
    }
    if (h.len == 2) {
        arb_one(F);   /* one piece: s = r, exact conversion */
    } else {
        arb_t t;
        arb_init(t);
        fhull_sqrt_sum(F, &h, prec + 10);
        fmpz_mul(X, sp, sr);
        arb_sqrt_fmpz(t, X, prec + 10);
        arb_div(F, F, t, prec + 10);
        arb_sqr(F, F, prec);
        arb_clear(t);
    }
    if (nblocks != NULL) *nblocks = h.len - 1;
    if (s != NULL) {
        /* s_i = r_i * (dP / sp) / (dR / sr) on each piece */
        embz_qvec_clear(s);
        embz_qvec_init(s);
        s->len = L;
        s->p = _fmpq_vec_init(L > 0 ? L : 1);
        fmpq_t c;
        fmpq_init(c);
        for (slong j = 0; j + 1 < h.len; j++) {
            fmpz_sub(dR, h.x + j, h.x + j + 1);
            fmpz_sub(dP, h.y + j, h.y + j + 1);
            if (fmpz_is_zero(dR)) continue;   /* cannot happen: equal x are popped */
            fmpz_mul(X, dP, sr);
            fmpz_mul(Y, dR, sp);
            fmpq_set_fmpz_frac(c, X, Y);
            for (slong i = h.l[j]; i < h.l[j + 1]; i++) {
                fmpq_set_fmpz_frac(s->p + i, b + i, sr);
                fmpq_mul(s->p + i, s->p + i, c);
            }
        }
        fmpq_clear(c);
    }
    fhull_clear(&h);
    _fmpz_vec_clear(a, L > 0 ? L : 1);
    _fmpz_vec_clear(b, L > 0 ? L : 1);
    fmpz_clear(Dp); fmpz_clear(Dr); fmpz_clear(X); fmpz_clear(Y); fmpz_clear(dP);
    fmpz_clear(dR); fmpz_clear(sp); fmpz_clear(sr);
}

void embz_qvec_purified(arb_t P, const embz_qvec_t p, const embz_qvec_t r, slong prec)
{
    arb_t F;
    arb_init(F);
    embz_qvec_fidelity(F, NULL, NULL, p, r, 2 * prec + 10);
    arb_sub_ui(F, F, 1, 2 * prec + 10);
    arb_neg(F, F);
    arb_sqrtpos(P, F, prec);
    arb_clear(F);
}

void embz_qvec_overlap(arb_t O, const embz_qvec_t p, const embz_qvec_t r, slong prec)
{
    slong L = FLINT_MAX(p->len, r->len);
    fmpz_t Dp, Dr, t;
    fmpz_init(Dp); fmpz_init(Dr); fmpz_init(t);
    fmpz *a = sorted_integers(Dp, p, L), *b = sorted_integers(Dr, r, L);
    arb_t u;
    arb_init(u);
    arb_zero(O);
    for (slong i = 0; i < L; i++) {
        fmpz_mul(t, a + i, b + i);
        arb_sqrt_fmpz(u, t, prec + 10);
        arb_add(O, O, u, prec + 10);
    }
    fmpz_mul(t, Dp, Dr);
    arb_sqrt_fmpz(u, t, prec + 10);
    arb_div(O, O, u, prec);
    arb_clear(u);
    _fmpz_vec_clear(a, L > 0 ? L : 1);
    _fmpz_vec_clear(b, L > 0 ? L : 1);
    fmpz_clear(Dp); fmpz_clear(Dr); fmpz_clear(t);
}

/* ------------------------------------------------------------------ sorted integer stream */

/* Heap of the m streams alpha_j a_0 >= alpha_j a_1 >= ... (vector targets): the next entry of
 * the sorted product a (x) alpha is the top. */
typedef struct {
    slong *j;      /* heap of stream indices */
    slong *k;      /* next position in a of each stream */
    fmpz *v;       /* current value of each stream */
    slong size;
} pheap_t;

static int pheap_less(const pheap_t *H, slong s, slong t)   /* value(s) > value(t) */
{
    return fmpz_cmp(H->v + s, H->v + t) > 0;
}

static void pheap_down(pheap_t *H, slong pos)
{
    for (;;) {
        slong c = 2 * pos + 1, best = pos;
        if (c < H->size && pheap_less(H, H->j[c], H->j[best])) best = c;
        if (c + 1 < H->size && pheap_less(H, H->j[c + 1], H->j[best])) best = c + 1;
        if (best == pos) return;
        slong t = H->j[pos]; H->j[pos] = H->j[best]; H->j[best] = t;
        pos = best;
    }
}

void embz_fidelity_appended_sums(arb_t hs, arb_t os, slong *nblocks, const fmpz *a, slong n,
                                 const fmpz_t A, const fmpz *alpha, slong m, const fmpz_t Q,
                                 slong prec)
{
    fhull_t h;
    fmpz_t X, Y, e;
    arb_t t;
    fhull_init(&h);
    fmpz_init(X); fmpz_init(Y); fmpz_init(e);
    arb_init(t);
    pheap_t H;
    memset(&H, 0, sizeof(H));
    if (alpha != NULL) {
        H.j = flint_malloc((size_t) m * sizeof(slong));
        H.k = flint_calloc((size_t) m, sizeof(slong));
        H.v = _fmpz_vec_init(m);
        for (slong j = 0; j < m; j++) {
            H.j[j] = j;
            fmpz_mul(H.v + j, alpha + j, a + 0);
        }
        H.size = m;
        for (slong pos = m / 2; pos >= 0; pos--) pheap_down(&H, pos);
    }
    fmpz_mul(X, A, Q);
    fmpz_set(Y, A);
    arb_zero(os);
    for (slong l = 0; l <= n; l++) {
        fhull_push(&h, X, Y, l);
        if (l == n) break;
        /* e = the l-th largest entry of a (x) alpha (0-based) */
        if (alpha == NULL) {
            fmpz_set(e, a + (slong) ((ulong) l / fmpz_get_ui(Q)));
        } else {
            slong j = H.j[0];
            fmpz_set(e, H.v + j);
            H.k[j]++;
            if (H.k[j] < n) {
                fmpz_mul(H.v + j, alpha + j, a + H.k[j]);
            } else {
                H.j[0] = H.j[H.size - 1];
                H.size--;
            }
            if (H.size > 0) pheap_down(&H, 0);
        }
        fmpz_sub(X, X, e);
        fmpz_sub(Y, Y, a + l);
        fmpz_mul(e, e, a + l);
        arb_sqrt_fmpz(t, e, prec);
        arb_add(os, os, t, prec);
    }
    fhull_sqrt_sum(hs, &h, prec);
    if (nblocks != NULL) *nblocks = h.len - 1;
    if (alpha != NULL) {
        flint_free(H.j);
        flint_free(H.k);
        _fmpz_vec_clear(H.v, m);
    }
    arb_clear(t);
    fmpz_clear(X); fmpz_clear(Y); fmpz_clear(e);
    fhull_clear(&h);
}
