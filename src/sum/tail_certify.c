/* Certification of a tail: f = w(., n) smooth and monotone on [M, end], walking over chunks
 * of u = ln x and bounding the remainder integrals of every level on the way; the cut of a
 * far end whose weights are negligible; the reason given when a tail is refused (see
 * src/sum/sum.h and _embz_tail_certify in impl.h). */
#include <stdio.h>
#include <stdlib.h>
#include "sum/impl.h"
#include "embz/util.h"

/* The x-range of the u-chunk [ua, ub] (x = e^u, clipped to end) as a ball x, with its ends. */
static void chunk_ball(arb_t x, arb_t xa, arb_t xb, const embz_tail_struct *t,
                       const arf_t ua, const arf_t ub, slong prec)
{
    arf_t lo, hi;
    arb_t e;
    arf_init(lo); arf_init(hi);
    arb_init(e);
    arb_set_arf(xa, ua);
    arb_exp(xa, xa, prec);
    arb_set_arf(xb, ub);
    arb_exp(xb, xb, prec);
    arb_set_fmpz(e, t->end);
    if (arb_gt(xb, e) || arb_overlaps(xb, e)) arb_set(xb, e);
    arb_get_lbound_arf(lo, xa, prec);
    arb_get_ubound_arf(hi, xb, prec);
    arb_set_interval_arf(x, lo, hi, prec);
    arf_clear(lo); arf_clear(hi);
    arb_clear(e);
}

/* the exact midpoint of [ua, ub] */
static void midpoint(arf_t mid, const arf_t ua, const arf_t ub)
{
    arf_add(mid, ua, ub, ARF_PREC_EXACT, ARF_RND_DOWN);
    arf_mul_2exp_si(mid, mid, -1);
}

/* sign of a derivative ball: +1 / -1 decided (0 allowed as either), 2 undecided */
static int sign_of(const arb_t d)
{
    if (arb_is_zero(d)) return 0;
    if (arb_is_nonpositive(d)) return 1;    /* non-increasing */
    if (arb_is_nonnegative(d)) return -1;   /* non-decreasing */
    return 2;
}

static int merge_dir(int *dir, int d)
{
    if (d == 0) return EMBZ_OK;
    if (*dir != 0 && d != *dir) return EMBZ_ERR_UNSUPPORTED;   /* direction changes */
    *dir = d;
    return EMBZ_OK;
}

/* Certify the sign of f' on [ua, ub] with first-order enclosures, bisecting as needed;
 * *deep records the deepest halving that was needed. */
static int certify_sign(embz_tail_t t, const arf_t ua, const arf_t ub, int *dir, int *deep,
                        int depth, slong prec)
{
    arb_t x, xa, xb, one;
    arb_ptr g = _arb_vec_init(2);
    arb_init(x); arb_init(xa); arb_init(xb); arb_init(one);
    arb_one(one);
    chunk_ball(x, xa, xb, t, ua, ub, prec);
    int st = embz_tail_weight_series(g, t, x, one, 2, prec);
    int d = (st == EMBZ_OK) ? sign_of(g + 1) : 2;
    if (d != 2) {
        st = merge_dir(dir, d);
        if (depth > *deep) *deep = depth;
    } else if (depth < EMBZ_TAIL_MAX_SPLIT) {
        arf_t mid;
        arf_init(mid);
        midpoint(mid, ua, ub);
        st = certify_sign(t, ua, mid, dir, deep, depth + 1, prec);
        if (st == EMBZ_OK) st = certify_sign(t, mid, ub, dir, deep, depth + 1, prec);
        arf_clear(mid);
    } else if (st == EMBZ_OK) {
        st = EMBZ_ERR_UNSUPPORTED;
    }
    _arb_vec_clear(g, 2);
    arb_clear(x); arb_clear(xa); arb_clear(xb); arb_clear(one);
    return st;
}

/* does the range [X_j, Z_j] of level j meet the x-range of a chunk? */
static int level_meets(const embz_tail_struct *t, slong j, const arb_t xa, const arb_t xb)
{
    if (!arb_is_finite(xa) || !arb_is_finite(xb)) return 1;   /* (cannot tell: count it) */
    arf_t lo, hi;
    arf_init(lo); arf_init(hi);
    arb_get_lbound_arf(lo, xa, MAG_BITS);
    arb_get_ubound_arf(hi, xb, MAG_BITS);
    int meets = (j == 0 || arf_cmp_2exp_si(hi, t->lev_bits[j]) > 0)
                && (t->lev_top[j] < 0 || arf_cmp_2exp_si(lo, t->lev_top[j]) < 0);
    arf_clear(lo); arf_clear(hi);
    return meets;
}

/* The u-chunk [ua, ub] certified as a whole through w(e^u) = core(u) e^(r u), u the variable:
 * x^k f^(k)(x) = e^(r u) P_k(u) with P_k = (D + r)(D + r - 1) ... (D + r - k + 1) core,
 * D = d/du (because x d/dx = D and D e^(r u) = e^(r u) (D + r)). core is slowly varying for the
 * usual weights, so one enclosure of its derivatives over a wide ball of u fixes the sign of
 * P_1 (the direction of f) and bounds |P_2q|, and the remainder integral over the chunk is
 * at most sup |P_2q| * integral of e^((r - 2q + 1) u) du over [ua, ub] (x = e^u, dx = x du),
 * which is exact in the exponential part. Mid-radius balls of x itself lose all sign when
 * xb / xa is larger than about e^2; this works for chunks of any width. Nothing is changed
 * unless the whole chunk is certified; returns EMBZ_OK then. */
static int certify_chunk_u(embz_tail_t t, const arf_t ua, const arf_t ub, mag_ptr integral,
                           int *dir, const mag_t allow, slong prec)
{
    arb_t U, xa, xb, x, c, e1, e2;
    arb_init(U); arb_init(xa); arb_init(xb); arb_init(x); arb_init(c); arb_init(e1);
    arb_init(e2);
    chunk_ball(x, xa, xb, t, ua, ub, prec);
    arb_set_interval_arf(U, ua, ub, prec);
    slong qmax = 0;
    for (slong j = 0; j < t->nlev; j++)
        if (level_meets(t, j, xa, xb)) qmax = FLINT_MAX(qmax, t->lev_p[j]);
    slong K = FLINT_MAX(2 * qmax, 1), len = K + 1;
    arb_ptr P = _arb_vec_init(len);
    mag_ptr add = _mag_vec_init(t->nlev);
    int st = embz_tail_pk(P, t, U, K, prec);
    if (st == EMBZ_OK) {
        int s = sign_of(P + 1);
        if (s == 2 || !_arb_vec_is_finite(P, len)) st = EMBZ_ERR_UNSUPPORTED;
        for (slong j = 0; j < t->nlev && st == EMBZ_OK; j++) {
            if (!level_meets(t, j, xa, xb)) continue;
            slong q = t->lev_p[j];
            /* c = r - 2q + 1; the integral of e^(c u) over [ua, ub] */
            arb_sub_si(c, t->rate, 2 * q - 1, prec);
            if (arb_contains_zero(c)) {
                /* at most sup e^(cu) * (ub - ua) */
                arb_mul(e1, c, U, prec);
                arb_exp(e1, e1, prec);
                arb_set_arf(e2, ub);
                arb_sub_arf(e2, e2, ua, prec);
                arb_mul(e1, e1, e2, prec);
            } else {
                arb_set_arf(e1, ub);
                arb_mul(e1, e1, c, prec);
                arb_exp(e1, e1, prec);
                arb_set_arf(e2, ua);
                arb_mul(e2, e2, c, prec);
                arb_exp(e2, e2, prec);
                arb_sub(e1, e1, e2, prec);
                arb_div(e1, e1, c, prec);
            }
            mag_t m;
            mag_init(m);
            arb_get_mag(m, e1);
            arb_get_mag(add + j, P + 2 * q);
            mag_mul(add + j, add + j, m);
            /* refused when this chunk's share of the remainder is not small (for weights
             * whose core varies fast, such as e^(-x/n), these bounds are loose; the x-path
             * then does better) */
            arb_get_mag(m, t->bern + q - 1);
            mag_mul(m, m, add + j);
            if (!mag_is_finite(m) || mag_cmp(m, allow) > 0) st = EMBZ_ERR_UNSUPPORTED;
            mag_clear(m);
        }
        if (st == EMBZ_OK) {
            int dd = *dir;
            st = merge_dir(&dd, s);
            if (st == EMBZ_OK) {
                *dir = dd;
                for (slong j = 0; j < t->nlev; j++) mag_add(integral + j, integral + j, add + j);
            }
        }
    }
    _arb_vec_clear(P, len);
    _mag_vec_clear(add, t->nlev);
    arb_clear(U); arb_clear(xa); arb_clear(xb); arb_clear(x); arb_clear(c); arb_clear(e1);
    arb_clear(e2);
    return st;
}

/* On the u-chunk [ua, ub] by enclosures of f's own derivatives over the x-range: certify
 * smoothness (finite enclosures of f^(j), j <= 2q) and the monotone direction, adding
 * sup |f^(2q)| * (xb - xa) to the remainder integral bound of each level (order q) whose range
 * meets the chunk; halves the chunk while the enclosures are not finite. */
static int certify_chunk(embz_tail_t t, const arf_t ua, const arf_t ub, mag_ptr integral,
                         int *deep,
                         int *dir, int depth, slong prec)
{
    arb_t xa, xb, x, one, w;
    arb_init(xa); arb_init(xb); arb_init(x); arb_init(one); arb_init(w);
    arb_one(one);
    chunk_ball(x, xa, xb, t, ua, ub, prec);
    /* only the levels whose range meets the chunk need their derivative here */
    slong qmax = 0;
    for (slong j = 0; j < t->nlev; j++)
        if (level_meets(t, j, xa, xb)) qmax = FLINT_MAX(qmax, t->lev_p[j]);
    slong len = FLINT_MAX(2 * qmax + 1, 2);
    arb_ptr g = _arb_vec_init(len);
    int st = embz_tail_weight_series(g, t, x, one, len, prec);
    if (st == EMBZ_OK) {
        /* integral[j] += sup |f^(2q)| * (xb - xa), q the order of level j, for the levels
         * whose range meets the chunk */
        mag_t m, tmp, wd;
        mag_init(m); mag_init(tmp); mag_init(wd);
        arb_sub(w, xb, xa, prec);
        arb_get_mag(wd, w);
        for (slong j = 0; j < t->nlev; j++) {
            slong q = t->lev_p[j];
            if (!level_meets(t, j, xa, xb)) continue;
            arb_get_mag(m, g + 2 * q);
            mag_fac_ui(tmp, 2 * q);
            mag_mul(m, m, tmp);
            mag_mul(m, m, wd);
            mag_add(integral + j, integral + j, m);
        }
        mag_clear(m); mag_clear(tmp); mag_clear(wd);
        int d = sign_of(g + 1);
        if (depth > *deep) *deep = depth;
        if (d != 2) st = merge_dir(dir, d);
        else st = certify_sign(t, ua, ub, dir, deep, 0, prec);
    } else if (st != EMBZ_ERR_NONSMOOTH && depth < EMBZ_TAIL_MAX_SPLIT) {
        /* enclosures too wide to be finite: halve the chunk */
        arf_t mid;
        arf_init(mid);
        midpoint(mid, ua, ub);
        st = certify_chunk(t, ua, mid, integral, deep, dir, depth + 1, prec);
        if (st == EMBZ_OK) st = certify_chunk(t, mid, ub, integral, deep, dir, depth + 1, prec);
        arf_clear(mid);
    } else if (st == EMBZ_OK) {
        st = EMBZ_ERR_UNSUPPORTED;
    }
    _arb_vec_clear(g, len);
    arb_clear(xa); arb_clear(xb); arb_clear(x); arb_clear(one); arb_clear(w);
    return st;
}

/* Bound the total weight on [e^ua, e^ub] by sup |f| times the number of integers there,
 * halving the chunk until each piece is within its share of the allowance. */
int _embz_tail_negligible_mass(mag_t mass, embz_tail_t t, const arf_t ua, const arf_t ub,
                               const mag_t allow, int depth, slong prec)
{
    arb_t x, xa, xb, v, cnt;
    arb_init(x); arb_init(xa); arb_init(xb); arb_init(v); arb_init(cnt);
    chunk_ball(x, xa, xb, t, ua, ub, prec);
    int st = embz_expr_eval_arb(v, t->w, x, t->n, prec);
    t->evals++;
    mag_t m, c, share;
    mag_init(m); mag_init(c); mag_init(share);
    mag_inf(m);
    if (st == EMBZ_OK && arb_is_finite(v)) {
        arb_get_mag(m, v);
        arb_sub(cnt, xb, xa, prec);
        arb_add_ui(cnt, cnt, 1, prec);
        arb_get_mag(c, cnt);
        mag_mul(m, m, c);
    }
    mag_mul_2exp_si(share, allow, -depth);
    if (mag_cmp(m, share) <= 0) {
        mag_add(mass, mass, m);
        st = EMBZ_OK;
    } else if (depth < EMBZ_TAIL_MAX_SPLIT) {
        arf_t mid;
        arf_init(mid);
        midpoint(mid, ua, ub);
        st = _embz_tail_negligible_mass(mass, t, ua, mid, allow, depth + 1, prec);
        if (st == EMBZ_OK)
            st = _embz_tail_negligible_mass(mass, t, mid, ub, allow, depth + 1, prec);
        arf_clear(mid);
    } else {
        st = EMBZ_ERR_UNSUPPORTED;
    }
    mag_clear(m); mag_clear(c); mag_clear(share);
    arb_clear(x); arb_clear(xa); arb_clear(xb); arb_clear(v); arb_clear(cnt);
    return st;
}

/* Is f(e^u) certainly below 2^-(prec+40) f(M) (f(M) = g0)? A cheap first test before
 * try_cut, with room to spare: try_cut then usually succeeds at once. */
static int weight_negligible_at(embz_tail_t t, const arf_t u, arb_srcptr g0, slong prec)
{
    arb_t x, v;
    mag_t a, b;
    arb_init(x); arb_init(v);
    mag_init(a); mag_init(b);
    arb_set_arf(x, u);
    arb_exp(x, x, prec);
    int ok = embz_expr_eval_arb(v, t->w, x, t->n, prec) == EMBZ_OK && arb_is_finite(v);
    if (ok) {
        arb_get_mag(a, v);
        arb_get_mag_lower(b, g0);
        mag_mul_2exp_si(b, b, -prec - 40);
        ok = mag_cmp(a, b) < 0;
    }
    arb_clear(x); arb_clear(v);
    mag_clear(a); mag_clear(b);
    return ok;
}

/* Perhaps the weights from e^ua on are too small to matter (a geometric family far out): if
 * their total is certainly below 2^-(prec+20) of the first weight f(M) = g0, end the tail
 * there (t->end) and record the neglected mass. Returns 1 when it did. */
static int try_cut(embz_tail_t t, const arf_t ua, const arf_t uend, arb_srcptr g0, slong prec)
{
    mag_t mass, goal;
    arb_t x0;
    fmpz_t X;
    mag_init(mass); mag_init(goal);
    arb_init(x0);
    fmpz_init(X);
    arb_get_mag_lower(goal, g0);
    mag_mul_2exp_si(goal, goal, -prec - 20);
    int ok = (_embz_tail_negligible_mass(mass, t, ua, uend, goal, 0, prec) == EMBZ_OK)
             && mag_cmp(mass, goal) <= 0;
    if (ok) {
        arf_t xl;
        arf_init(xl);
        arb_set_arf(x0, ua);
        arb_exp(x0, x0, prec);
        arb_get_lbound_arf(xl, x0, prec);
        arf_get_fmpz(X, xl, ARF_RND_FLOOR);   /* certified up to e^ua >= X */
        arf_clear(xl);
        ok = fmpz_cmp_si(X, t->M + 1) > 0;
    }
    if (ok) {
        fmpz_set(t->end, X);
        mag_set(t->neglected, mass);
    }
    mag_clear(mass); mag_clear(goal);
    arb_clear(x0);
    fmpz_clear(X);
    return ok;
}

/* ln w(x) - ln w(y) as a double (an estimate for a message), NaN when either weight has no
 * positive finite enclosure. */
static double log_ratio_d(const embz_tail_t t, const fmpz_t x, const fmpz_t y, slong prec)
{
    arb_t a, b, v;
    double r = NAN;
    arb_init(a); arb_init(b); arb_init(v);
    arb_set_fmpz(v, x);
    int ok = embz_expr_eval_arb(a, t->w, v, t->n, prec) == EMBZ_OK && arb_is_positive(a);
    arb_set_fmpz(v, y);
    ok = ok && embz_expr_eval_arb(b, t->w, v, t->n, prec) == EMBZ_OK && arb_is_positive(b);
    if (ok) {
        arb_log(a, a, prec);
        arb_log(b, b, prec);
        arb_sub(v, a, b, prec);
        if (arb_is_finite(v)) r = arf_get_d(arb_midref(v), ARF_RND_NEAR);
    }
    arb_clear(a); arb_clear(b); arb_clear(v);
    return r;
}

/* Why a tail of smooth monotone weights may still fail its certificate: the weights span a
 * range too wide for it. The enclosures over a chunk of u = ln x are only meaningful while
 * ln w changes little across the chunk, so a weight that falls by a huge factor from one
 * index to the next (e^(-10^4 i)), or grows by an astronomic one over the tail (e^(i/100) up
 * to 10^8), defeats them. Fills why (", ..." or "") from estimates of ln w. */
static void range_reason(char *why, size_t len, const embz_tail_t t, slong M, const fmpz_t end,
                         slong prec)
{
    fmpz_t a, b;
    fmpz_init_set_si(a, M);
    fmpz_init_set_si(b, M + 1);
    why[0] = '\0';
    /* far out, a weight like 2^i needs the bits of the index itself to have any sign */
    prec += (slong) fmpz_bits(end) + 16;
    double step = log_ratio_d(t, b, a, prec);
    double total = log_ratio_d(t, end, a, prec);
    if (isfinite(step) && step < -1024.0) {
        snprintf(why, len, ": the weight falls by a factor of about e^%.2g per index there "
                 "(mass on the first terms; the certificate needs ln w to change slowly)",
                 -step);
    } else if (isfinite(total) && fabs(total) > 262144.0) {
        char *e = embz_fmpz_string(end, 12);
        snprintf(why, len, ": the weight %s by a factor of about e^%.2g up to i = %s (mass on "
                 "the %s terms; the certificate needs ln w to change slowly)",
                 total > 0 ? "grows" : "falls", fabs(total), e, total > 0 ? "last" : "first");
        free(e);
    }
    fmpz_clear(a);
    fmpz_clear(b);
}

/* The ends of the next chunk from ua: ub for the x-path (width in u, clipped to uend and to
 * the start ln X_j of the next far level, rounded down; *restart then tells that the chunk
 * stops there) and ub0 for the u-path (the next level start or uend). *nextlev is the first
 * level whose start lies beyond ua, advanced here. A chunk ends where a far level starts and
 * the chunks after it start narrow again: the remainder bound of level j is a sum of
 * sup |f^(2q)| * width over chunks, which wide chunks near X_j overstate. uj and le are
 * scratch space owned by the caller (kept across the walk, as the walk allocates little). */
static void chunk_ends(arf_t ub, arf_t ub0, int *restart, slong *nextlev, arf_t uj, arb_t le,
                       const embz_tail_struct *t, const arf_t ua, const arf_t uend,
                       double width, slong prec)
{
    arf_set_d(ub, width);
    arf_add(ub, ub, ua, prec, ARF_RND_UP);
    if (arf_cmp(ub, uend) > 0) arf_set(ub, uend);
    *restart = 0;
    while (*nextlev < t->nlev) {
        arb_const_log2(le, prec);
        arb_mul_si(le, le, t->lev_bits[*nextlev], prec);
        arb_get_lbound_arf(uj, le, prec);
        if (arf_cmp(uj, ua) > 0) break;
        (*nextlev)++;
    }
    if (*nextlev < t->nlev && arf_cmp(uj, ub) < 0) {
        arf_set(ub, uj);
        *restart = 1;
    }
    if (*nextlev < t->nlev) arf_set(ub0, uj);
    else arf_set(ub0, uend);
}

/* The walk from ua (advanced in place) to uend: each step first tries a whole chunk of u
 * through the split (any width, doubling while it works), then a chunk of the x-path's width
 * by enclosures of f's own derivatives. Far out, once the weight itself is negligible, it
 * sees whether all the rest is (*cut = 1: the tail then ends there; a geometric family needs
 * no certificate up to n). Returns the status of the first chunk that failed, ua at its
 * start. */
static int certify_walk(embz_tail_t t, arf_t ua, const arf_t uend, mag_ptr integral, int *dir,
                        int *cut, arb_srcptr g, const arb_t goal, slong prec)
{
    arf_t ub, ub0, uj;
    arb_t le;
    mag_t uallow;                     /* remainder share allowed to one u-chunk */
    arf_init(ub); arf_init(ub0); arf_init(uj);
    arb_init(le);
    mag_init(uallow);
    arb_get_mag_lower(uallow, goal);
    mag_mul_2exp_si(uallow, uallow, -prec - 12);
    double width = 0.125, uwidth = 0.125;
    double utry = 0.0;                /* a cut is considered again from u = utry on */
    slong nextlev = 1;
    int ufail = 0, st = EMBZ_OK;
    *cut = 0;
    while (arf_cmp(ua, uend) < 0) {
        if (arf_get_d(ua, ARF_RND_DOWN) >= utry && weight_negligible_at(t, ua, g, prec)) {
            if (try_cut(t, ua, uend, g, prec)) {
                *cut = 1;
                break;
            }
            utry = 2.0 * arf_get_d(ua, ARF_RND_DOWN) + 8.0;   /* back off */
        }
        int restart;
        chunk_ends(ub, ub0, &restart, &nextlev, uj, le, t, ua, uend, width, prec);
        if (t->usplit && ufail < 4) {
            /* (uj is free again: chunk_ends recomputes it whenever it is needed) */
            arf_set_d(uj, uwidth);
            arf_add(uj, uj, ua, prec, ARF_RND_UP);
            if (arf_cmp(uj, ub0) > 0) arf_set(uj, ub0);
            if (certify_chunk_u(t, ua, uj, integral, dir, uallow, prec) == EMBZ_OK) {
                arf_set(ua, uj);
                uwidth *= 2;
                ufail = 0;
                continue;
            }
            ufail++;
            uwidth = FLINT_MAX(uwidth / 4, 0.125);
        }
        int deep = 0;
        st = certify_chunk(t, ua, ub, integral, &deep, dir, 0, prec);
        if (st != EMBZ_OK) break;
        arf_set(ua, ub);
        /* wider chunks are cheaper, but enclosures over x-ranges wider than a factor
         * e^16 (2^23, near the 30-bit radius of a ball) lose all meaning; after halvings,
         * go on with the width that worked */
        if (restart) width = 0.25;
        else if (deep > 0) width = FLINT_MAX(ldexp(width, -deep), 0.125);
        else width = FLINT_MIN(2 * width, 16.0);
    }
    arf_clear(ub); arf_clear(ub0); arf_clear(uj);
    arb_clear(le);
    mag_clear(uallow);
    return st;
}

int _embz_tail_certify(embz_tail_t t, mag_ptr integral, int *dir, arb_srcptr g,
                       const arb_t goal, const fmpz_t end, slong prec, embz_err_t *err)
{
    arf_t ua, uend;
    arb_t le;
    int cut;
    arf_init(ua); arf_init(uend);
    arb_init(le);
    arb_set_fmpz(le, end);
    arb_log(le, le, prec);
    arb_get_ubound_arf(uend, le, prec);
    arb_get_lbound_arf(ua, t->logM, prec);
    int st = certify_walk(t, ua, uend, integral, dir, &cut, g, goal, prec);
    /* a chunk that cannot be certified may lie where the rest is negligible anyway */
    if (st != EMBZ_OK && st != EMBZ_ERR_DOMAIN && !cut && try_cut(t, ua, uend, g, prec))
        st = EMBZ_OK;
    if (st != EMBZ_OK) {
        slong M = t->M;
        char why[400] = "";
        if (st != EMBZ_ERR_DOMAIN) range_reason(why, sizeof(why), t, M, end, prec);
        if (why[0])
            embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "cannot certify the tail beyond i = "
                         "%ld%s", M, why);
        else
            embz_err_set(err, st == EMBZ_ERR_DOMAIN ? EMBZ_ERR_DOMAIN : EMBZ_ERR_UNSUPPORTED,
                         "cannot certify that the weight is smooth and monotone for i > %ld",
                         M);
        st = err ? err->code : EMBZ_ERR_UNSUPPORTED;
    }
    arf_clear(ua); arf_clear(uend);
    arb_clear(le);
    return st;
}
