/* Set-up of a tail (see src/sum/sum.h): the fields, the Bernoulli factors, the
 * Euler–Maclaurin order at M, the far levels, then the certification of [M, end]
 * (tail_certify.c) and the remainder bounds from it; clearing; the level valid on a ball. */
#include <string.h>
#include "sum/impl.h"

/* Far levels at X = 2^10, 2^15, 2^22, ... (exponents growing by half) below end: the order
 * q at X is the first whose remainder estimate |B_2q|/(2q)! |f^(2q-1)(X)| is below
 * 2^-(prec+8) goal (the criterion of level 0), goal = M f(M); a level is kept when it lowers
 * the order. */
static void set_levels(embz_tail_t t, const arb_t goal, slong prec)
{
    slong len = 2 * t->p + 1;
    arb_ptr g = _arb_vec_init(len);
    arb_t X, term, u, e0, e1;
    mag_t gm, cur;
    arb_init(X); arb_init(term); arb_init(u); arb_init(e0); arb_init(e1);
    mag_init(gm); mag_init(cur);
    t->nlev = 1;
    t->lev_bits[0] = 0;
    t->lev_p[0] = t->p;
    arb_set(t->lev_base, t->base);
    arb_get_mag_lower(gm, goal);
    mag_mul_2exp_si(gm, gm, -prec - 8);
    for (slong b = 10; t->nlev < EMBZ_TAIL_MAX_LEVELS; b += b / 2) {
        if (b <= (slong) FLINT_BIT_COUNT((ulong) t->M) + 1) continue;
        if ((slong) fmpz_bits(t->end) <= b) break;
        arb_one(X);
        arb_mul_2exp_si(X, X, b);
        /* derivatives up to 2 q_prev: the previous level's terms and the orders below it
         * (series cost about the square of their length; the orders only fall) */
        if (_embz_tail_weight_taylor(g, t, X, 2 * t->lev_p[t->nlev - 1] + 1, prec) != EMBZ_OK) break;
        slong q;
        for (q = 1; q < t->lev_p[t->nlev - 1]; q++) {
            arb_fac_ui(u, 2 * q - 1, prec);
            arb_mul(term, u, g + 2 * q - 1, prec);
            arb_mul(term, term, t->bern + q - 1, prec);
            arb_get_mag(cur, term);
            if (mag_cmp(cur, gm) < 0) break;
        }
        if (q >= t->lev_p[t->nlev - 1]) continue;
        /* chained from the previous level, which is certified at X (X <= Z of that level):
         * lev_base = lev_base_prev + em_(q_prev)(X) - em_q(X) */
        _embz_tail_em_terms(e0, t, g, t->lev_p[t->nlev - 1], prec);
        _embz_tail_em_terms(e1, t, g, q, prec);
        arb_sub(e0, e0, e1, prec);
        arb_add(t->lev_base + t->nlev, t->lev_base + t->nlev - 1, e0, prec);
        t->lev_bits[t->nlev] = b;
        t->lev_p[t->nlev] = q;
        t->nlev++;
    }
    for (slong j = 0; j < t->nlev; j++)
        t->lev_top[j] = (j + 1 < t->nlev) ? t->lev_bits[j + 1] + LEVEL_OVERLAP : -1;
    _arb_vec_clear(g, len);
    arb_clear(X); arb_clear(term); arb_clear(u); arb_clear(e0); arb_clear(e1);
    mag_clear(gm); mag_clear(cur);
}

/* With the remainder integrals known, t->rem (level 0) becomes the bound for every level:
 * level j's base holds the sum up to X_j through levels 0 .. j-1, so its error is
 * rem_0 + ... + rem_j; t->rem is the sum over all levels. */
static void finish_levels(embz_tail_t t, mag_srcptr integral)
{
    mag_t c, r;
    mag_init(c); mag_init(r);
    for (slong j = 1; j < t->nlev; j++) {
        arb_get_mag(c, t->bern + t->lev_p[j] - 1);
        mag_mul(r, c, integral + j);
        mag_add(t->rem, t->rem, r);
    }
    mag_clear(c); mag_clear(r);
}

/* The fields of a new tail, before any certification: the weight and size, the integral
 * cache (empty), the substitution phi(u) = w(e^u) e^u and, when it exists, the split
 * w(e^u) = core(u) e^(rate u). */
static void tail_setup(embz_tail_t t, const embz_expr_t w, const fmpz_t n, slong M,
                       const fmpz_t end, slong prec)
{
    memset(t, 0, sizeof(*t));
    t->w = w;
    arb_init(t->n);
    arb_set_round_fmpz(t->n, n, prec);
    t->M = M;
    fmpz_init_set(t->end, end);
    arb_init(t->base);
    mag_init(t->rem);
    for (slong j = 0; j < EMBZ_TAIL_MAX_LEVELS; j++) arb_init(t->lev_base + j);
    t->nlev = 1;
    mag_init(t->neglected);
    arb_init(t->logM);
    arb_log_ui(t->logM, (ulong) M, prec);
    t->du = 1.0;
    t->nalloc = 16;
    t->icum = _arb_vec_init(t->nalloc);
    t->ihave = flint_calloc((size_t) t->nalloc, 1);
    t->prec = prec;
    t->bern = _arb_vec_init(EMBZ_TAIL_MAX_ORDER);
    embz_expr_init(t->phi);
    embz_expr_log_substitute(t->phi, w);
    embz_expr_init(t->core);
    arb_init(t->rate);
    {
        embz_expr_t re;
        arb_t one;
        embz_expr_init(re);
        arb_init(one);
        arb_one(one);
        t->usplit = embz_expr_log_split(t->core, re, w) == EMBZ_OK
                    && embz_expr_eval_arb(t->rate, re, one, t->n, prec) == EMBZ_OK
                    && arb_is_finite(t->rate);
        embz_expr_clear(re);
        arb_clear(one);
    }
}

/* bern[j-1] = B_2j / (2j)!, j = 1 .. EMBZ_TAIL_MAX_ORDER */
static void set_bernoulli(embz_tail_t t, slong prec)
{
    arb_t u;
    arb_init(u);
    for (slong j = 1; j <= EMBZ_TAIL_MAX_ORDER; j++) {
        arb_bernoulli_ui(t->bern + j - 1, 2 * j, prec);
        arb_fac_ui(u, 2 * j, prec);
        arb_div(t->bern + j - 1, t->bern + j - 1, u, prec);
    }
    arb_clear(u);
}

/* The order: the first p whose remainder estimate |B_2p|/(2p)! |f^(2p-1)(M)| (the size of
 * the bound when f^(2p) keeps its sign) is below 2^-(prec+8) goal, goal = M f(M) the scale of
 * the sums; or the p where these estimates stop decreasing. g: f's Taylor coefficients at M
 * (2 EMBZ_TAIL_MAX_ORDER of them). */
static slong choose_order(const embz_tail_struct *t, arb_srcptr g, const arb_t goal,
                          slong prec)
{
    slong p;
    arb_t u, term;
    mag_t prev, cur, gm;
    arb_init(u); arb_init(term);
    mag_init(prev); mag_init(cur); mag_init(gm);
    arb_get_mag_lower(gm, goal);
    mag_mul_2exp_si(gm, gm, -prec - 8);
    mag_inf(prev);
    for (p = 1; p < EMBZ_TAIL_MAX_ORDER; p++) {
        arb_fac_ui(u, 2 * p - 1, prec);
        arb_mul(term, u, g + 2 * p - 1, prec);
        arb_mul(term, term, t->bern + p - 1, prec);
        arb_get_mag(cur, term);
        if (mag_cmp(cur, gm) < 0) break;
        if (mag_cmp(cur, prev) > 0) { p = FLINT_MAX(p - 1, 1); break; }
        mag_set(prev, cur);
    }
    arb_clear(u); arb_clear(term);
    mag_clear(prev); mag_clear(cur); mag_clear(gm);
    return FLINT_MIN(p, EMBZ_TAIL_MAX_ORDER - 1);
}

int embz_tail_init(embz_tail_t t, const embz_expr_t w, const fmpz_t n, slong M,
                   const fmpz_t end, slong prec, embz_err_t *err)
{
    tail_setup(t, w, n, M, end, prec);
    int st;
    arb_t xM, goal;
    slong len = 2 * EMBZ_TAIL_MAX_ORDER + 2;
    arb_ptr g = _arb_vec_init(len);
    arb_init(xM); arb_init(goal);
    arb_set_ui(xM, (ulong) M);

    t->p = EMBZ_TAIL_MAX_ORDER;
    st = _embz_tail_weight_taylor(g, t, xM, len, prec);
    if (st != EMBZ_OK) {
        embz_err_set(err, st, "the weight has no usable Taylor expansion at i = %ld", M);
        goto done;
    }
    set_bernoulli(t, prec);
    arb_mul_ui(goal, g, (ulong) M, prec);
    t->p = choose_order(t, g, goal, prec);
    /* base = -(f(M)/2 + sum_j bern_j f^(2j-1)(M)) */
    _embz_tail_em_terms(t->base, t, g, t->p, prec);
    arb_neg(t->base, t->base);
    set_levels(t, goal, prec);

    /* certify smoothness + monotonicity on [M, end], bounding the remainder integrals */
    {
        mag_ptr integral = _mag_vec_init(t->nlev);
        int dir = 0;
        st = _embz_tail_certify(t, integral, &dir, g, goal, end, prec, err);
        if (st == EMBZ_OK) {
            mag_t c;
            mag_init(c);
            t->dir = (dir == 0) ? 1 : dir;
            /* |R| <= |B_2p|/(2p)! * integral; a far level adds its own remainder to the
             * level-0 one (its base holds the exact sum up to X_j only within that) */
            arb_get_mag(c, t->bern + t->p - 1);
            mag_mul(t->rem, c, integral);
            finish_levels(t, integral);
            mag_clear(c);
        }
        _mag_vec_clear(integral, t->nlev);
    }
done:
    _arb_vec_clear(g, len);
    arb_clear(xM); arb_clear(goal);
    return st;
}

void embz_tail_clear(embz_tail_t t)
{
    embz_expr_clear(t->phi);
    embz_expr_clear(t->core);
    arb_clear(t->rate);
    arb_clear(t->n);
    fmpz_clear(t->end);
    _arb_vec_clear(t->bern, EMBZ_TAIL_MAX_ORDER);
    arb_clear(t->base);
    mag_clear(t->rem);
    for (slong j = 0; j < EMBZ_TAIL_MAX_LEVELS; j++) arb_clear(t->lev_base + j);
    mag_clear(t->neglected);
    arb_clear(t->logM);
    _arb_vec_clear(t->icum, t->nalloc);
    flint_free(t->ihave);
}

/* does level j cover the ball [lo, hi]? */
static int level_covers(const embz_tail_struct *t, slong j, const arf_t lo, const arf_t hi)
{
    if (j > 0 && arf_cmp_2exp_si(lo, t->lev_bits[j]) < 0) return 0;
    return t->lev_top[j] < 0 || arf_cmp_2exp_si(hi, t->lev_top[j]) <= 0;
}

slong embz_tail_level(const embz_tail_t t, const arb_t x)
{
    if (!arb_is_finite(x)) return -1;
    arf_t lo, hi;
    arf_init(lo); arf_init(hi);
    arb_get_lbound_arf(lo, x, MAG_BITS);
    arb_get_ubound_arf(hi, x, MAG_BITS);
    slong j = t->nlev - 1;
    while (j >= 0 && !level_covers(t, j, lo, hi)) j--;
    arf_clear(lo); arf_clear(hi);
    return j;
}
