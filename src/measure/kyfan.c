/* Ky Fan norms, Nielsen's majorization test and the conversion distance
 * K(p -> r) = max_k (||p||_(k) - ||r||_(k)) for exact and ball vectors. */
#include <stdlib.h>
#include "embz/measure.h"

static int qcmp_desc(const void *a, const void *b)
{
    return -fmpq_cmp((const fmpq *) a, (const fmpq *) b);
}

/* Sorted (non-increasing) copy. */
static fmpq *sorted_copy(const embz_qvec_t p)
{
    fmpq *s = _fmpq_vec_init(p->len > 0 ? p->len : 1);
    for (long k = 0; k < p->len; k++) fmpq_set(s + k, p->p + k);
    if (p->len > 1) qsort(s, (size_t) p->len, sizeof(fmpq), qcmp_desc);
    return s;
}

void embz_qvec_kyfan(fmpq_t res, const embz_qvec_t p, long k)
{
    fmpq *s = sorted_copy(p);
    fmpq_zero(res);
    for (long j = 0; j < k && j < p->len; j++) fmpq_add(res, res, s + j);
    _fmpq_vec_clear(s, p->len > 0 ? p->len : 1);
}

/* Threshold form: K = max_{t >= 0} (Phi_p(t) - Phi_r(t)), Phi_x(t) = sum_i max(x_i - t, 0).
 * The maximum sits at t = 0 or at an entry of p or r. With both vectors sorted and their
 * prefix sums, Phi_x(t) = X_N - N t where N = #{x_i > t}; scanning the merged entries in
 * decreasing order moves both counts forward only. At a maximising t the Ky Fan index
 * k = #{p_i > t} attains the same value (Phi_r(t) >= R_k - k t for every k). */
void embz_qvec_distance(fmpq_t K, long *argk, const embz_qvec_t p, const embz_qvec_t r)
{
    long a = p->len, b = r->len;
    fmpq *ps = sorted_copy(p), *rs = sorted_copy(r);
    fmpq *P = _fmpq_vec_init(a + 1), *R = _fmpq_vec_init(b + 1);
    for (long k = 0; k < a; k++) fmpq_add(P + k + 1, P + k, ps + k);
    for (long k = 0; k < b; k++) fmpq_add(R + k + 1, R + k, rs + k);
    fmpq_t t, h, u, best;
    fmpq_init(t); fmpq_init(h); fmpq_init(u); fmpq_init(best);
    long best_k = 0;
    long ip = 0, ir = 0;   /* next unused entries (merge order) */
    long np = 0, nr = 0;   /* counts of entries > t */
    for (;;) {
        /* next breakpoint: the larger of the next unused entries, then finally t = 0 */
        int last = 0;
        if (ip < a && (ir >= b || fmpq_cmp(ps + ip, rs + ir) >= 0)) fmpq_set(t, ps + ip);
        else if (ir < b) fmpq_set(t, rs + ir);
        else { fmpq_zero(t); last = 1; }
        if (fmpq_sgn(t) <= 0) { fmpq_zero(t); last = 1; }
        while (np < a && fmpq_cmp(ps + np, t) > 0) np++;
        while (nr < b && fmpq_cmp(rs + nr, t) > 0) nr++;
        while (ip < a && fmpq_cmp(ps + ip, t) >= 0) ip++;
        while (ir < b && fmpq_cmp(rs + ir, t) >= 0) ir++;
        /* h = (P_np - np t) - (R_nr - nr t) */
        fmpq_sub(h, P + np, R + nr);
        fmpq_mul_si(u, t, nr - np);
        fmpq_add(h, h, u);
        if (fmpq_cmp(h, best) > 0) { fmpq_set(best, h); best_k = np; }
        if (last) break;
    }
    fmpq_set(K, best);
    if (argk != NULL) *argk = fmpq_is_zero(best) ? 0 : best_k;
    fmpq_clear(t); fmpq_clear(h); fmpq_clear(u); fmpq_clear(best);
    _fmpq_vec_clear(ps, a > 0 ? a : 1);
    _fmpq_vec_clear(rs, b > 0 ? b : 1);
    _fmpq_vec_clear(P, a + 1);
    _fmpq_vec_clear(R, b + 1);
}

int embz_qvec_convertible(const embz_qvec_t p, const embz_qvec_t r)
{
    fmpq_t K;
    fmpq_init(K);
    embz_qvec_distance(K, NULL, p, r);
    int ok = fmpq_is_zero(K);
    fmpq_clear(K);
    return ok;
}

/* ---------------------------------------------------------------- ball vectors */

static arf_ptr arfvec_init(slong n)
{
    arf_ptr v = flint_malloc((size_t) n * sizeof(arf_struct));
    for (slong k = 0; k < n; k++) arf_init(v + k);
    return v;
}

static void arfvec_clear(arf_ptr v, slong n)
{
    for (slong k = 0; k < n; k++) arf_clear(v + k);
    flint_free(v);
}

static int arf_cmp_desc(const void *a, const void *b)
{
    return -arf_cmp((arf_srcptr) a, (arf_srcptr) b);
}

/* Lower and upper endpoints of the entries, each list sorted non-increasing, zero padded to
 * length L. (arf structs may be moved bytewise.) */
static void endpoints(arf_ptr lo, arf_ptr hi, arb_srcptr x, slong len, slong L, slong prec)
{
    for (slong k = 0; k < L; k++) {
        if (k < len) {
            arb_get_lbound_arf(lo + k, x + k, prec);
            arb_get_ubound_arf(hi + k, x + k, prec);
        } else {
            arf_zero(lo + k);
            arf_zero(hi + k);
        }
    }
    qsort(lo, (size_t) L, sizeof(arf_struct), arf_cmp_desc);
    qsort(hi, (size_t) L, sizeof(arf_struct), arf_cmp_desc);
}

/* The true k largest entries of x sum to at least the k largest lower endpoints and at most the
 * k largest upper endpoints, whatever the (uncertain) order of the entries. Hence
 * ||p||_(k) - ||r||_(k) lies in [PL_k - RU_k, PU_k - RL_k] for every k, and the maximum over k
 * of these enclosures encloses K without trusting any ordering decision. */
void embz_vec_distance_arb(arb_t K, slong *argk, arb_srcptr p, slong plen,
                           arb_srcptr r, slong rlen, slong prec)
{
    slong L = FLINT_MAX(plen, rlen);
    slong best_k = 0;
    arb_zero(K);
    if (L == 0) { if (argk != NULL) *argk = 0; return; }
    arf_ptr plo = arfvec_init(L), phi = arfvec_init(L);
    arf_ptr rlo = arfvec_init(L), rhi = arfvec_init(L);
    endpoints(plo, phi, p, plen, L, prec);
    endpoints(rlo, rhi, r, rlen, L, prec);
    arb_t PL, PU, RL, RU, dl, du, b;
    arb_init(PL); arb_init(PU); arb_init(RL); arb_init(RU);
    arb_init(dl); arb_init(du); arb_init(b);
    double best_mid = 0.0;
    for (slong k = 1; k <= L; k++) {
        arb_add_arf(PL, PL, plo + k - 1, prec);
        arb_add_arf(PU, PU, phi + k - 1, prec);
        arb_add_arf(RL, RL, rlo + k - 1, prec);
        arb_add_arf(RU, RU, rhi + k - 1, prec);
        arb_sub(dl, PL, RU, prec);
        arb_sub(du, PU, RL, prec);
        arb_union(b, dl, du, prec);
        arb_max(K, K, b, prec);
        double m = arf_get_d(arb_midref(b), ARF_RND_NEAR);
        if (m > best_mid) { best_mid = m; best_k = k; }
    }
    if (argk != NULL) *argk = best_k;
    arb_clear(PL); arb_clear(PU); arb_clear(RL); arb_clear(RU);
    arb_clear(dl); arb_clear(du); arb_clear(b);
    arfvec_clear(plo, L); arfvec_clear(phi, L);
    arfvec_clear(rlo, L); arfvec_clear(rhi, L);
}
