/* The fidelity-type optimum at large n by classes of equal subtrees (docs/optimal.md,
 * section 6). Let a_t be the ancestor of n at depth t (a_L = n, a_(t-1) = ceil(a_t / d),
 * a_0 = 1). At depth t the nodes before a_t have complete d-ary subtrees reaching depth L
 * (class F_t, height L - t), those after it complete subtrees reaching depth L - 1 (class E_t,
 * height L - 1 - t), and a_t itself (class A_t) has f_t F-children, the child a_(t+1) and e_t
 * E-children. A complete subtree of height h has the pivot G_h = mu - (d/4) / G_(h-1),
 * G_0 = mu, so the whole elimination takes O(L) numbers. The Perron vector is constant on the
 * nodes of depth t that left the path at depth s (F(s, t), E(s, t)): O(L^2) values with their
 * multiplicities f_(s-1) d^(t-s), e_(s-1) d^(t-s). The two certificates are those of
 * fid_cert.c, summed over the classes with exact multiplicities. */
#include <math.h>
#include "impl.h"

typedef struct {
    slong L;
    ulong d;
    fmpz *f, *e;          /* f_t, e_t, t = 0..L-1 */
    double *fd, *ed;
    int *hasF, *hasE;     /* F_t / E_t nodes exist (t = 0..L) */
    double *G, *gA;       /* G_h (h = 0..L), the pivot of A_t (t = 0..L) */
} lev_t;

static void lev_init(lev_t *v, const fmpz_t n, ulong d)
{
    fmpz_t a, b;
    fmpz_init_set(a, n);
    fmpz_init(b);
    slong L = 0;
    while (fmpz_cmp_ui(a, 1) > 0) {           /* a <- ceil(a / d) */
        fmpz_cdiv_q_ui(a, a, d);
        L++;
    }
    v->L = L;
    v->d = d;
    fmpz *anc = _fmpz_vec_init(L + 1);
    fmpz_set(anc + L, n);
    for (slong t = L; t >= 1; t--) fmpz_cdiv_q_ui(anc + t - 1, anc + t, d);
    v->f = _fmpz_vec_init(L + 1);
    v->e = _fmpz_vec_init(L + 1);
    v->fd = flint_calloc(L + 1, sizeof(double));
    v->ed = flint_calloc(L + 1, sizeof(double));
    v->hasF = flint_calloc(L + 2, sizeof(int));
    v->hasE = flint_calloc(L + 2, sizeof(int));
    v->G = flint_calloc(L + 1, sizeof(double));
    v->gA = flint_calloc(L + 1, sizeof(double));
    for (slong t = 0; t < L; t++) {
        /* children of a_t: 2..d for the root, d (a_t - 1) + 1 .. d a_t else; cut at n */
        if (t == 0) fmpz_set_ui(a, 2);
        else {
            fmpz_sub_ui(a, anc + t, 1);
            fmpz_mul_ui(a, a, d);
            fmpz_add_ui(a, a, 1);
        }
        fmpz_sub(v->f + t, anc + t + 1, a);
        fmpz_mul_ui(b, anc + t, d);
        if (fmpz_cmp(b, n) > 0) fmpz_set(b, n);
        fmpz_sub(v->e + t, b, anc + t + 1);
        v->fd[t] = fmpz_get_d(v->f + t);
        v->ed[t] = fmpz_get_d(v->e + t);
    }
    for (slong t = 1; t <= L; t++) {
        v->hasF[t] = v->hasF[t - 1] || !fmpz_is_zero(v->f + t - 1);
        v->hasE[t] = t <= L - 1 && (v->hasE[t - 1] || !fmpz_is_zero(v->e + t - 1));
    }
    _fmpz_vec_clear(anc, L + 1);
    fmpz_clear(a); fmpz_clear(b);
}

static void lev_clear(lev_t *v)
{
    _fmpz_vec_clear(v->f, v->L + 1);
    _fmpz_vec_clear(v->e, v->L + 1);
    flint_free(v->fd); flint_free(v->ed);
    flint_free(v->hasF); flint_free(v->hasE);
    flint_free(v->G); flint_free(v->gA);
}

/* the pivots at mu; 1 when every pivot of an existing node is positive */
static int lev_pivots(lev_t *v, double mu)
{
    slong L = v->L;
    double q = 0.25 * (double) v->d;
    /* the largest height in use: F_t has height L - t, E_t height L - 1 - t (t >= 1); G_h is
       decreasing while positive, so it suffices that G_h > 0 up to there */
    slong hmax = -1;
    for (slong t = 1; t <= L; t++) {
        if (v->hasF[t] && L - t > hmax) hmax = L - t;
        if (v->hasE[t] && L - 1 - t > hmax) hmax = L - 1 - t;
    }
    int ok = 1;
    v->G[0] = mu;
    for (slong h = 1; h <= L; h++) v->G[h] = h <= hmax ? mu - q / v->G[h - 1] : 0.0;
    for (slong h = 0; h <= hmax; h++)
        if (!(v->G[h] > 0.0)) ok = 0;
    if (!ok) return 0;
    v->gA[L] = mu - (L == 0 ? 1.0 : 0.0);
    for (slong t = L - 1; t >= 0; t--) {
        double s = 1.0 / v->gA[t + 1];
        if (v->fd[t] > 0) s += v->fd[t] / v->G[L - t - 1];
        if (v->ed[t] > 0) s += v->ed[t] / v->G[L - t - 2];
        v->gA[t] = mu - (t == 0 ? 1.0 : 0.0) - 0.25 * s;
    }
    for (slong t = 0; ok && t <= L; t++)
        if (!(v->gA[t] > 0.0) || !isfinite(v->gA[t])) ok = 0;
    return ok;
}

/* x classes in index order */
typedef struct {
    double x;
    fmpz_t count;
    slong parent;         /* class index of the parents (-1: the root's own loop) */
} cls_t;

int _embz_opt_fid_levels(fmpq_t f_lo, fmpq_t f_hi, double *lambda, slong *bits,
                         const fmpz_t n, ulong d, slong prec)
{
    lev_t v;
    lev_init(&v, n, d);
    slong L = v.L;
    double lo = 1.0, hi = 2.0 + 0.5 * (double) d;
    int ok = lev_pivots(&v, hi);
    for (int it = 0; ok && it < 200; it++) {
        double mid = 0.5 * (lo + hi);
        if (!(mid > lo && mid < hi)) break;
        if (lev_pivots(&v, mid)) hi = mid;
        else lo = mid;
    }
    if (ok) ok = lev_pivots(&v, hi);
    *lambda = hi;
    if (!ok) { lev_clear(&v); return 0; }

    /* ---- the x classes: level 0: A_0; level t: F(1..t, t), A_t, E(t..1, t) ---- */
    slong cap = 1 + (L + 1) * (2 * L + 1), m = 0;
    cls_t *c = flint_malloc(sizeof(cls_t) * cap);
    slong *idxA = flint_malloc(sizeof(slong) * (L + 1));
    slong *prevF = flint_malloc(sizeof(slong) * (L + 2));   /* F(s, t-1) index by s */
    slong *prevE = flint_malloc(sizeof(slong) * (L + 2));
    for (slong s = 0; s <= L + 1; s++) prevF[s] = prevE[s] = -1;
    c[0].x = 1.0; fmpz_init_set_ui(c[0].count, 1); c[0].parent = -1;
    idxA[0] = 0;
    m = 1;
    slong *curF = flint_malloc(sizeof(slong) * (L + 2));
    slong *curE = flint_malloc(sizeof(slong) * (L + 2));
    for (slong t = 1; t <= L; t++) {
        for (slong s = 0; s <= L + 1; s++) curF[s] = curE[s] = -1;
        for (slong s = 1; s <= t; s++) {
            if (fmpz_is_zero(v.f + s - 1)) continue;
            cls_t *k = c + m;
            fmpz_init(k->count);
            fmpz_set_ui(k->count, d);
            fmpz_pow_ui(k->count, k->count, (ulong) (t - s));
            fmpz_mul(k->count, k->count, v.f + s - 1);
            k->parent = s == t ? idxA[t - 1] : prevF[s];
            k->x = c[k->parent].x / (2.0 * v.G[L - t]);
            curF[s] = m++;
        }
        c[m].x = c[idxA[t - 1]].x / (2.0 * v.gA[t]);
        fmpz_init_set_ui(c[m].count, 1);
        c[m].parent = idxA[t - 1];
        idxA[t] = m++;
        if (t <= L - 1)
            for (slong s = t; s >= 1; s--) {
                if (fmpz_is_zero(v.e + s - 1)) continue;
                cls_t *k = c + m;
                fmpz_init(k->count);
                fmpz_set_ui(k->count, d);
                fmpz_pow_ui(k->count, k->count, (ulong) (t - s));
                fmpz_mul(k->count, k->count, v.e + s - 1);
                k->parent = s == t ? idxA[t - 1] : prevE[s];
                k->x = c[k->parent].x / (2.0 * v.G[L - 1 - t]);
                curE[s] = m++;
            }
        for (slong s = 0; s <= L + 1; s++) { prevF[s] = curF[s]; prevE[s] = curE[s]; }
    }
    flint_free(curF);
    flint_free(curE);
    /* non-increasing in index order (rounding may break ties), positive */
    for (slong k = 1; k < m; k++) {
        if (c[k].x > c[k - 1].x) c[k].x = c[k - 1].x;
        if (!(c[k].x > 0.0)) ok = 0;
    }
    /* ---- lower end: the exact overlap of the integer state a = x 2^B ---- */
    if (ok) {
        double *xs = flint_malloc(sizeof(double) * m);
        fmpz *a = _fmpz_vec_init(m);
        for (slong k = 0; k < m; k++) xs[k] = c[k].x;
        _embz_opt_fid_scale(a, bits, xs, m);
        fmpz_t N, S, t;
        fmpz_init(N); fmpz_init(S); fmpz_init(t);
        fmpz_mul(N, a, a);
        fmpz_mul(S, a, a);
        for (slong k = 1; k < m; k++) {
            fmpz_mul(t, a + k, a + c[k].parent);
            fmpz_addmul(N, t, c[k].count);
            fmpz_mul(t, a + k, a + k);
            fmpz_addmul(S, t, c[k].count);
        }
        fmpz_mul(N, N, N);
        fmpz_mul(S, S, S);
        fmpz_mul_ui(S, S, d);
        fmpq_set_fmpz_frac(f_lo, N, S);
        fmpz_clear(N); fmpz_clear(S); fmpz_clear(t);
        _fmpz_vec_clear(a, m);
        flint_free(xs);
    }
    /* ---- upper end: multipliers per pivot class, running maximum in index order ---- */
    if (ok) {
        double *lF = flint_calloc(L + 2, sizeof(double)), *lA = flint_calloc(L + 2, sizeof(double));
        double *lE = flint_calloc(L + 2, sizeof(double));
        double run = 1.0;
        lA[0] = 1.0;
        for (slong t = 1; t <= L; t++) {
            if (v.hasF[t]) { double l = 2.0 * v.G[L - t]; run = l > run ? l : run; lF[t] = run; }
            { double l = 2.0 * v.gA[t]; run = l > run ? l : run; lA[t] = run; }
            if (v.hasE[t]) { double l = 2.0 * v.G[L - 1 - t]; run = l > run ? l : run; lE[t] = run; }
        }
        arb_t best, cc, u, w;
        arb_init(best); arb_init(cc); arb_init(u); arb_init(w);
        arb_zero(best);
#define ADD_INV(cnt, ell) do { arb_set_d(w, ell); arb_inv(w, w, prec); \
        arb_mul_fmpz(w, w, cnt, prec); arb_add(cc, cc, w, prec); } while (0)
        fmpz_t one, dz;
        fmpz_init_set_ui(one, 1);
        fmpz_init_set_ui(dz, d);
        for (slong t = 0; t <= L; t++) {
            /* A_t (the root includes its own loop: 1 / ell_1) */
            arb_set_d(cc, lA[t]);
            if (t == 0) ADD_INV(one, lA[0]);
            if (t < L) {
                if (!fmpz_is_zero(v.f + t)) ADD_INV(v.f + t, lF[t + 1]);
                ADD_INV(one, lA[t + 1]);
                if (!fmpz_is_zero(v.e + t)) ADD_INV(v.e + t, lE[t + 1]);
            }
            arb_max(best, best, cc, prec);
            if (t >= 1 && v.hasF[t]) {
                arb_set_d(cc, lF[t]);
                if (t < L) ADD_INV(dz, lF[t + 1]);
                arb_max(best, best, cc, prec);
            }
            if (t >= 1 && v.hasE[t]) {
                arb_set_d(cc, lE[t]);
                if (t < L - 1) ADD_INV(dz, lE[t + 1]);
                arb_max(best, best, cc, prec);
            }
        }
#undef ADD_INV
        arb_mul(best, best, best, prec);
        arb_div_ui(best, best, 4 * d, prec);
        arf_t ub;
        arf_init(ub);
        arb_get_ubound_arf(ub, best, prec);
        if (arf_is_finite(ub)) arf_get_fmpq(f_hi, ub);
        else ok = 0;
        arf_clear(ub);
        fmpz_clear(one); fmpz_clear(dz);
        arb_clear(best); arb_clear(cc); arb_clear(u); arb_clear(w);
        flint_free(lF); flint_free(lA); flint_free(lE);
    }
    for (slong k = 0; k < m; k++) fmpz_clear(c[k].count);
    flint_free(c); flint_free(idxA); flint_free(prevF); flint_free(prevE);
    lev_clear(&v);
    return ok;
}
