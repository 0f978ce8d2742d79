/* Elementary functions of asymptotic series: powers, log, exp, lgamma, atan, sin, cos, abs,
 * min, max. */
#include <string.h>
#include "asym_impl.h"

#define L EMBZ_ASYM_LEVELS

static void copy_unknown(aser_t *r, const aser_t *s)
{
    char why[sizeof(s->why)];
    memcpy(why, s->why, sizeof(why));
    _embz_asym_unknown(r, "%s", why);
}

static void qdiv_si(fmpq_t r, const fmpq_t a, slong d)
{
    fmpz_t z;
    fmpz_init_set_si(z, d);
    fmpq_div_fmpz(r, a, z);
    fmpz_clear(z);
}

static void mono_init(fmpq *e) { for (int k = 0; k < L; k++) fmpq_init(e + k); }
static void mono_clear(fmpq *e) { for (int k = 0; k < L; k++) fmpq_clear(e + k); }

static aterm_t *terms_init(slong n)
{
    aterm_t *t = flint_malloc((n > 0 ? n : 1) * sizeof(aterm_t));
    for (slong k = 0; k < n; k++) _embz_asym_term_init(t + k);
    return t;
}

static void terms_clear(aterm_t *t, slong n)
{
    for (slong k = 0; k < n; k++) _embz_asym_term_clear(t + k);
    flint_free(t);
}

/* s += O(x^e) */
static void add_rem(aser_t *s, const fmpq *e, slong K, slong prec)
{
    aser_t z, t;
    embz_asym_series_init(&z); embz_asym_series_init(&t);
    z.has_rem = 1;
    _embz_asym_mono_set(z.rem, e);
    _embz_asym_add(&t, s, &z, K, prec);
    _embz_asym_swap(s, &t);
    embz_asym_series_clear(&z); embz_asym_series_clear(&t);
}

/* s = c x^m (1 + eps); s must be SCALE with at least one term */
static void split_lead(aterm_t *c, fmpq *m, aser_t *eps, const aser_t *s, slong prec)
{
    aterm_t ci;
    fmpq mn[L];
    _embz_asym_term_init(&ci);
    mono_init(mn);
    _embz_asym_term_set(c, s->terms);
    _embz_asym_mono_set(m, s->terms[0].e);
    _embz_asym_zero(eps);
    for (slong k = 1; k < s->len; k++) _embz_asym_push(eps, s->terms + k, s->terms[k].e);
    eps->has_rem = s->has_rem;
    _embz_asym_mono_set(eps->rem, s->rem);
    eps->tiny = s->tiny;
    _embz_asym_coef_inv(&ci, c, prec);   /* leading coefficients are never undecided */
    for (int k = 0; k < L; k++) fmpq_neg(mn + k, m + k);
    _embz_asym_scale(eps, eps, &ci, mn, prec);
    _embz_asym_term_clear(&ci);
    mono_clear(mn);
}

/* s = c0 + eps with eps -> 0. Returns 0 on success, 1 if s grows (not bounded), 2 if
 * undecided or unknown. */
static int split_const(aterm_t *c0, aser_t *eps, const aser_t *s)
{
    _embz_asym_coef_set_si(c0, 0);
    if (s->kind == EMBZ_ASYM_FAST_DECAY) { embz_asym_series_set(eps, s); return 0; }
    if (s->kind == EMBZ_ASYM_FAST_GROWTH) return 1;
    if (s->kind == EMBZ_ASYM_UNKNOWN) return 2;
    if (s->len > 0 && _embz_asym_mono_cmp_one(s->terms[0].e) > 0) return 1;
    if (s->has_rem && _embz_asym_mono_cmp_one(s->rem) >= 0) return 2;
    _embz_asym_zero(eps);
    for (slong k = 0; k < s->len; k++) {
        if (_embz_asym_mono_is_one(s->terms[k].e)) _embz_asym_term_set(c0, s->terms + k);
        else _embz_asym_push(eps, s->terms + k, s->terms[k].e);
    }
    _embz_asym_mono_zero(c0->e);
    eps->has_rem = s->has_rem;
    _embz_asym_mono_set(eps->rem, s->rem);
    eps->tiny = s->tiny;
    return 0;
}

/* ------------------------------------------------------------------ powers */

void _embz_asym_pow_fmpq(aser_t *r, const aser_t *s, const fmpq_t p, slong K, slong prec)
{
    int integer = fmpz_is_one(fmpq_denref(p));
    if (s->kind == EMBZ_ASYM_UNKNOWN) { if (r != s) copy_unknown(r, s); return; }
    if (fmpq_is_zero(p)) { _embz_asym_one(r); return; }
    if (s->kind != EMBZ_ASYM_SCALE) {
        int kind = s->kind, sign = s->sign;
        if (sign == 1) sign = 1;
        else if (integer && sign == -1) sign = fmpz_is_even(fmpq_numref(p)) ? 1 : -1;
        else if (!integer && sign == -1) { _embz_asym_unknown(r, "fractional power of a negative function"); return; }
        else sign = 0;
        if (fmpq_sgn(p) < 0)
            kind = kind == EMBZ_ASYM_FAST_DECAY ? EMBZ_ASYM_FAST_GROWTH : EMBZ_ASYM_FAST_DECAY;
        _embz_asym_fast(r, kind, sign);
        return;
    }
    if (_embz_asym_is_zero(s)) {
        if (fmpq_sgn(p) > 0) _embz_asym_zero(r);
        else _embz_asym_unknown(r, "negative power of a function that is eventually 0");
        return;
    }
    if (s->len == 0) {
        if (fmpq_sgn(p) > 0) {   /* O(m)^p = O(m^p) */
            fmpq e[L];
            mono_init(e);
            _embz_asym_mono_scal(e, s->rem, p);
            _embz_asym_zero(r);
            r->has_rem = 1;
            _embz_asym_mono_set(r->rem, e);
            mono_clear(e);
        } else {
            _embz_asym_unknown(r, "leading term undetermined (cancellation)");
        }
        return;
    }
    if (integer && fmpq_sgn(p) > 0 && fmpz_cmp_ui(fmpq_numref(p), 64) <= 0) {
        /* exact repeated squaring (a finite expansion stays finite) */
        ulong n = fmpz_get_ui(fmpq_numref(p));
        aser_t acc, b, t;
        embz_asym_series_init(&acc); embz_asym_series_init(&b); embz_asym_series_init(&t);
        _embz_asym_one(&acc);
        embz_asym_series_set(&b, s);
        while (n) {
            if (n & 1) { _embz_asym_mul(&t, &acc, &b, K, prec); _embz_asym_swap(&acc, &t); }
            n >>= 1;
            if (n) { _embz_asym_mul(&t, &b, &b, K, prec); _embz_asym_swap(&b, &t); }
        }
        _embz_asym_swap(r, &acc);
        embz_asym_series_clear(&acc); embz_asym_series_clear(&b); embz_asym_series_clear(&t);
        return;
    }
    {
        aterm_t c, cp, *t;
        fmpq m[L], mp[L];
        aser_t eps, res;
        fmpq_t b, f;
        slong n = K + 1;
        _embz_asym_term_init(&c); _embz_asym_term_init(&cp);
        mono_init(m); mono_init(mp);
        embz_asym_series_init(&eps); embz_asym_series_init(&res);
        fmpq_init(b); fmpq_init(f);
        split_lead(&c, m, &eps, s, prec);
        if (_embz_asym_coef_pow(&cp, &c, p, prec)) {
            _embz_asym_unknown(r, "power of a coefficient that is negative or undecided");
        } else {
            /* (1 + eps)^p = sum binom(p, k) eps^k */
            t = terms_init(n);
            fmpq_one(b);
            for (slong k = 0; k < n; k++) {
                _embz_asym_coef_set_fmpq(t + k, b);
                fmpq_sub_si(f, p, k);
                fmpq_mul(b, b, f);
                qdiv_si(b, b, k + 1);
            }
            _embz_asym_compose(&res, t, n, 0, &eps, K, prec);
            _embz_asym_mono_scal(mp, m, p);
            _embz_asym_scale(&res, &res, &cp, mp, prec);
            _embz_asym_normalize(&res, K, prec);
            _embz_asym_swap(r, &res);
            terms_clear(t, n);
        }
        _embz_asym_term_clear(&c); _embz_asym_term_clear(&cp);
        mono_clear(m); mono_clear(mp);
        embz_asym_series_clear(&eps); embz_asym_series_clear(&res);
        fmpq_clear(b); fmpq_clear(f);
    }
}

/* ------------------------------------------------------------------ log */

void _embz_asym_log(aser_t *r, const aser_t *s, slong K, slong prec)
{
    aterm_t c, lc, *t;
    fmpq m[L], e[L];
    aser_t eps, res, tmp;
    slong n = K + 1;
    if (s->kind == EMBZ_ASYM_UNKNOWN) { if (r != s) copy_unknown(r, s); return; }
    if (s->kind == EMBZ_ASYM_FAST_GROWTH) {
        _embz_asym_unknown(r, "logarithm of a function growing faster than any power");
        return;
    }
    if (s->kind == EMBZ_ASYM_FAST_DECAY) {
        _embz_asym_unknown(r, "logarithm of a function decaying faster than any power");
        return;
    }
    if (_embz_asym_is_zero(s)) { _embz_asym_unknown(r, "logarithm of 0"); return; }
    if (s->len == 0) { _embz_asym_unknown(r, "leading term undetermined (cancellation)"); return; }
    if (_embz_asym_coef_sign(s->terms) != 1) {
        _embz_asym_unknown(r, "logarithm of an eventually negative function");
        return;
    }
    if (!fmpq_is_zero(s->terms[0].e + 3)) {
        _embz_asym_unknown(r, "needs log log log log x, beyond the scale");
        return;
    }
    _embz_asym_term_init(&c); _embz_asym_term_init(&lc);
    mono_init(m); mono_init(e);
    embz_asym_series_init(&eps); embz_asym_series_init(&res); embz_asym_series_init(&tmp);
    split_lead(&c, m, &eps, s, prec);
    /* log(c x^a L1^b L2^c) = log c + a L1 + b L2 + c L3 */
    if (c.exact && fmpq_is_one(c.q)) {
        _embz_asym_coef_set_si(&lc, 0);
    } else {
        arb_t x;
        arb_init(x);
        if (c.exact) arb_set_fmpq(x, c.q, prec); else arb_set(x, &c.c);
        arb_log(x, x, prec);
        _embz_asym_coef_set_arb(&lc, x);
        arb_clear(x);
    }
    _embz_asym_const(&res, &lc);
    for (int lev = 0; lev < 3; lev++) {
        if (fmpq_is_zero(m + lev)) continue;
        _embz_asym_coef_set_fmpq(&lc, m + lev);
        _embz_asym_mono_unit(e, lev + 1);
        _embz_asym_push(&res, &lc, e);
    }
    _embz_asym_normalize(&res, K, prec);
    /* log(1 + eps) = sum (-1)^(k+1) eps^k / k */
    t = terms_init(n);
    _embz_asym_coef_set_si(t + 0, 0);
    for (slong k = 1; k < n; k++) {
        fmpq_t q;
        fmpq_init(q);
        fmpq_set_si(q, (k % 2) ? 1 : -1, k);
        _embz_asym_coef_set_fmpq(t + k, q);
        fmpq_clear(q);
    }
    _embz_asym_compose(&tmp, t, n, 0, &eps, K, prec);
    _embz_asym_add(r, &res, &tmp, K, prec);
    terms_clear(t, n);
    _embz_asym_term_clear(&c); _embz_asym_term_clear(&lc);
    mono_clear(m); mono_clear(e);
    embz_asym_series_clear(&eps); embz_asym_series_clear(&res); embz_asym_series_clear(&tmp);
}

/* ------------------------------------------------------------------ exp */

void _embz_asym_exp(aser_t *r, const aser_t *s, slong K, slong prec)
{
    fmpq l1[L], m[L];
    aterm_t c0, *t;
    aser_t eps, res;
    slong n = K + 1;
    int ok = 1;
    if (s->kind == EMBZ_ASYM_UNKNOWN) { if (r != s) copy_unknown(r, s); return; }
    if (s->kind == EMBZ_ASYM_FAST_DECAY) {
        _embz_asym_one(r);
        r->tiny = 1;
        return;
    }
    if (s->kind == EMBZ_ASYM_FAST_GROWTH) {
        if (s->sign == 1) _embz_asym_fast(r, EMBZ_ASYM_FAST_GROWTH, 1);
        else if (s->sign == -1) _embz_asym_fast(r, EMBZ_ASYM_FAST_DECAY, 1);
        else _embz_asym_unknown(r, "exp of a fast function of undecided sign");
        return;
    }
    mono_init(l1); mono_init(m);
    _embz_asym_mono_unit(l1, 1);
    /* a growing part beyond log x: faster than any power */
    if (s->len > 0 && _embz_asym_mono_cmp(s->terms[0].e, l1) > 0) {
        int sg = _embz_asym_coef_sign(s->terms);
        _embz_asym_fast(r, sg > 0 ? EMBZ_ASYM_FAST_GROWTH : EMBZ_ASYM_FAST_DECAY, 1);
        mono_clear(l1); mono_clear(m);
        return;
    }
    if (s->has_rem && _embz_asym_mono_cmp_one(s->rem) >= 0) {
        _embz_asym_unknown(r, "exp of an expansion whose remainder does not tend to 0");
        mono_clear(l1); mono_clear(m);
        return;
    }
    _embz_asym_term_init(&c0);
    embz_asym_series_init(&eps); embz_asym_series_init(&res);
    _embz_asym_coef_set_si(&c0, 0);
    _embz_asym_zero(&eps);
    for (slong k = 0; k < s->len && ok; k++) {
        const aterm_t *u = s->terms + k;
        int g = _embz_asym_mono_cmp_one(u->e);
        if (g < 0) { _embz_asym_push(&eps, u, u->e); continue; }
        if (g == 0) { _embz_asym_term_set(&c0, u); continue; }
        /* growing terms must be q log x, q log log x or q log log log x, q rational:
         * exp of them is x^q, (log x)^q, (log log x)^q */
        int lev = -1;
        for (int j = 1; j < L; j++) {
            fmpq e[L];
            mono_init(e);
            _embz_asym_mono_unit(e, j);
            if (_embz_asym_mono_cmp(u->e, e) == 0) lev = j;
            mono_clear(e);
        }
        if (lev < 1) {
            char txt[200];
            embz_asym_mono_str(txt, sizeof(txt), u->e);
            _embz_asym_unknown(r, "exp of a term %s is outside the scale", txt);
            ok = 0;
        } else if (!u->exact) {
            _embz_asym_unknown(r, "exponent of a power is not an exact rational");
            ok = 0;
        } else if (lev == 3) {
            fmpq_set(m + 2, u->q);
        } else {
            fmpq_set(m + lev - 1, u->q);
        }
    }
    if (ok) {
        aterm_t ec;
        _embz_asym_term_init(&ec);
        eps.has_rem = s->has_rem;
        _embz_asym_mono_set(eps.rem, s->rem);
        eps.tiny = s->tiny;
        _embz_asym_normalize(&eps, K, prec);
        if (_embz_asym_coef_sign(&c0) == 0) {
            _embz_asym_coef_set_si(&ec, 1);
        } else {
            arb_t x;
            arb_init(x);
            if (c0.exact) arb_set_fmpq(x, c0.q, prec); else arb_set(x, &c0.c);
            arb_exp(x, x, prec);
            _embz_asym_coef_set_arb(&ec, x);
            arb_clear(x);
        }
        t = terms_init(n);
        {
            fmpq_t q;
            fmpz_t f;
            fmpq_init(q); fmpz_init(f);
            for (slong k = 0; k < n; k++) {
                fmpz_fac_ui(f, k);
                fmpq_one(q);
                fmpq_div_fmpz(q, q, f);
                _embz_asym_coef_set_fmpq(t + k, q);
            }
            fmpq_clear(q); fmpz_clear(f);
        }
        _embz_asym_compose(&res, t, n, 0, &eps, K, prec);
        _embz_asym_scale(&res, &res, &ec, m, prec);
        _embz_asym_normalize(&res, K, prec);
        _embz_asym_swap(r, &res);
        terms_clear(t, n);
        _embz_asym_term_clear(&ec);
    }
    _embz_asym_term_clear(&c0);
    embz_asym_series_clear(&eps); embz_asym_series_clear(&res);
    mono_clear(l1); mono_clear(m);
}

/* ------------------------------------------------------------------ Taylor at a finite point */

enum { F_SIN, F_COS, F_ATAN, F_LGAMMA };

/* g(c0 + eps) for g analytic at c0. Exact rational coefficients at c0 = 0 for sin, cos, atan. */
static void taylor(aser_t *r, int fn, const aterm_t *c0, const aser_t *eps, slong K, slong prec)
{
    slong n = K + 1;
    aterm_t *t = terms_init(n);
    if (c0->exact && fmpq_is_zero(c0->q) && fn != F_LGAMMA) {
        fmpq_t q;
        fmpz_t f;
        fmpq_init(q); fmpz_init(f);
        for (slong k = 0; k < n; k++) {
            fmpq_zero(q);
            if (fn == F_SIN && (k % 2) == 1) {
                fmpz_fac_ui(f, k);
                fmpq_set_si(q, ((k / 2) % 2) ? -1 : 1, 1);
                fmpq_div_fmpz(q, q, f);
            } else if (fn == F_COS && (k % 2) == 0) {
                fmpz_fac_ui(f, k);
                fmpq_set_si(q, ((k / 2) % 2) ? -1 : 1, 1);
                fmpq_div_fmpz(q, q, f);
            } else if (fn == F_ATAN && (k % 2) == 1) {
                fmpq_set_si(q, ((k / 2) % 2) ? -1 : 1, k);
            }
            _embz_asym_coef_set_fmpq(t + k, q);
        }
        fmpq_clear(q); fmpz_clear(f);
    } else {
        arb_poly_t h, a, b;
        arb_t x;
        arb_poly_init(h); arb_poly_init(a); arb_poly_init(b);
        arb_init(x);
        if (c0->exact) arb_set_fmpq(x, c0->q, prec); else arb_set(x, &c0->c);
        arb_poly_set_coeff_arb(h, 0, x);
        arb_poly_set_coeff_si(h, 1, 1);
        if (fn == F_SIN || fn == F_COS) arb_poly_sin_cos_series(a, b, h, n, prec);
        else if (fn == F_ATAN) arb_poly_atan_series(a, h, n, prec);
        else arb_poly_lgamma_series(a, h, n, prec);
        for (slong k = 0; k < n; k++) {
            arb_poly_get_coeff_arb(x, fn == F_COS ? b : a, k);
            _embz_asym_coef_set_arb(t + k, x);
        }
        arb_poly_clear(h); arb_poly_clear(a); arb_poly_clear(b);
        arb_clear(x);
    }
    _embz_asym_compose(r, t, n, 0, eps, K, prec);
    terms_clear(t, n);
}

void _embz_asym_sincos(aser_t *r, const aser_t *s, int cosine, slong K, slong prec)
{
    aterm_t c0;
    aser_t eps;
    int st;
    if (s->kind == EMBZ_ASYM_UNKNOWN) { if (r != s) copy_unknown(r, s); return; }
    _embz_asym_term_init(&c0);
    embz_asym_series_init(&eps);
    st = split_const(&c0, &eps, s);
    if (st == 0) taylor(r, cosine ? F_COS : F_SIN, &c0, &eps, K, prec);
    else if (st == 1) _embz_asym_unknown(r, "%s of a growing argument oscillates", cosine ? "cos" : "sin");
    else _embz_asym_unknown(r, "argument of %s undetermined", cosine ? "cos" : "sin");
    _embz_asym_term_clear(&c0);
    embz_asym_series_clear(&eps);
}

void _embz_asym_atan(aser_t *r, const aser_t *s, slong K, slong prec)
{
    aterm_t c0;
    aser_t eps, inv, at;
    fmpq_t m1;
    int st;
    if (s->kind == EMBZ_ASYM_UNKNOWN) { if (r != s) copy_unknown(r, s); return; }
    _embz_asym_term_init(&c0);
    embz_asym_series_init(&eps); embz_asym_series_init(&inv); embz_asym_series_init(&at);
    fmpq_init(m1);
    st = split_const(&c0, &eps, s);
    if (st == 0) {
        taylor(r, F_ATAN, &c0, &eps, K, prec);
    } else if (st == 1) {
        /* atan(y) = sign(y) pi/2 - atan(1/y) for |y| -> infinity */
        int sg = _embz_asym_sign(s);
        if (sg != 1 && sg != -1) {
            _embz_asym_unknown(r, "atan of a growing argument of undecided sign");
        } else {
            arb_t hp;
            aterm_t ch;
            arb_init(hp);
            _embz_asym_term_init(&ch);
            arb_const_pi(hp, prec);
            arb_mul_2exp_si(hp, hp, -1);
            if (sg < 0) arb_neg(hp, hp);
            _embz_asym_coef_set_arb(&ch, hp);
            fmpq_set_si(m1, -1, 1);
            _embz_asym_pow_fmpq(&inv, s, m1, K, prec);
            _embz_asym_coef_set_si(&c0, 0);
            taylor(&at, F_ATAN, &c0, &inv, K, prec);
            _embz_asym_const(&eps, &ch);
            _embz_asym_sub(r, &eps, &at, K, prec);
            arb_clear(hp);
            _embz_asym_term_clear(&ch);
        }
    } else {
        _embz_asym_unknown(r, "argument of atan undetermined");
    }
    _embz_asym_term_clear(&c0);
    embz_asym_series_clear(&eps); embz_asym_series_clear(&inv); embz_asym_series_clear(&at);
    fmpq_clear(m1);
}

/* ------------------------------------------------------------------ lgamma */

void _embz_asym_lgamma(aser_t *r, const aser_t *s, slong K, slong prec)
{
    aterm_t c0;
    aser_t eps, a, b, tmp;
    fmpq_t q;
    int sg = _embz_asym_sign(s);
    if (s->kind == EMBZ_ASYM_UNKNOWN) { if (r != s) copy_unknown(r, s); return; }
    if (s->kind == EMBZ_ASYM_FAST_GROWTH && s->sign == 1) {
        _embz_asym_fast(r, EMBZ_ASYM_FAST_GROWTH, 1);
        return;
    }
    if (s->kind != EMBZ_ASYM_SCALE || sg != 1) {
        _embz_asym_unknown(r, "lgamma of an argument that is not eventually positive in the scale");
        return;
    }
    _embz_asym_term_init(&c0);
    embz_asym_series_init(&eps); embz_asym_series_init(&a);
    embz_asym_series_init(&b); embz_asym_series_init(&tmp);
    fmpq_init(q);
    if (_embz_asym_mono_cmp_one(s->terms[0].e) > 0) {
        /* Stirling: (y - 1/2) log y - y + log(2 pi)/2 + sum B_2k / (2k (2k-1) y^(2k-1)) */
        aser_t inv, inv2, pw;
        aterm_t ck;
        fmpq top[L];
        arb_t x;
        embz_asym_series_init(&inv); embz_asym_series_init(&inv2); embz_asym_series_init(&pw);
        _embz_asym_term_init(&ck);
        mono_init(top);
        arb_init(x);
        _embz_asym_log(&a, s, K, prec);
        fmpq_set_si(q, -1, 2);
        _embz_asym_coef_set_fmpq(&c0, q);
        _embz_asym_const(&b, &c0);
        _embz_asym_add(&tmp, s, &b, K, prec);          /* y - 1/2 */
        _embz_asym_mul(&b, &tmp, &a, K, prec);         /* (y - 1/2) log y */
        _embz_asym_sub(&a, &b, s, K, prec);            /* ... - y */
        arb_const_pi(x, prec);
        arb_mul_2exp_si(x, x, 1);
        arb_log(x, x, prec);
        arb_mul_2exp_si(x, x, -1);
        _embz_asym_coef_set_arb(&ck, x);
        _embz_asym_const(&b, &ck);
        _embz_asym_add(&tmp, &a, &b, K, prec);
        _embz_asym_swap(&a, &tmp);
        fmpq_set_si(q, -1, 1);
        _embz_asym_pow_fmpq(&inv, s, q, K, prec);
        _embz_asym_mul(&inv2, &inv, &inv, K, prec);
        embz_asym_series_set(&pw, &inv);
        _embz_asym_top(top, &inv);
        for (slong k = 1; k <= K + 1; k++) {
            fmpq e0[L];
            if (a.has_rem && _embz_asym_top(top, &pw) && _embz_asym_mono_cmp(top, a.rem) <= 0)
                break;
            if (k == K + 1) {   /* truncation: O(next term) */
                _embz_asym_top(top, &pw);
                add_rem(&a, top, K, prec);
                break;
            }
            arith_bernoulli_number(q, 2 * k);
            qdiv_si(q, q, 2 * k * (2 * k - 1));
            _embz_asym_coef_set_fmpq(&ck, q);
            mono_init(e0);
            _embz_asym_scale(&b, &pw, &ck, e0, prec);
            mono_clear(e0);
            _embz_asym_add(&tmp, &a, &b, K, prec);
            _embz_asym_swap(&a, &tmp);
            _embz_asym_mul(&tmp, &pw, &inv2, K, prec);
            _embz_asym_swap(&pw, &tmp);
        }
        _embz_asym_swap(r, &a);
        embz_asym_series_clear(&inv); embz_asym_series_clear(&inv2); embz_asym_series_clear(&pw);
        _embz_asym_term_clear(&ck);
        mono_clear(top);
        arb_clear(x);
    } else if (_embz_asym_mono_is_one(s->terms[0].e)) {
        split_const(&c0, &eps, s);
        taylor(r, F_LGAMMA, &c0, &eps, K, prec);
    } else {
        /* y -> 0+: lgamma(y) = lgamma(1 + y) - log y */
        _embz_asym_coef_set_si(&c0, 1);
        taylor(&a, F_LGAMMA, &c0, s, K, prec);
        _embz_asym_log(&b, s, K, prec);
        _embz_asym_sub(r, &a, &b, K, prec);
    }
    _embz_asym_term_clear(&c0);
    embz_asym_series_clear(&eps); embz_asym_series_clear(&a);
    embz_asym_series_clear(&b); embz_asym_series_clear(&tmp);
    fmpq_clear(q);
}

/* ------------------------------------------------------------------ abs, min, max */

void _embz_asym_abs(aser_t *r, const aser_t *s)
{
    int sg = _embz_asym_sign(s);
    if (s->kind == EMBZ_ASYM_UNKNOWN) { if (r != s) copy_unknown(r, s); return; }
    if (s->kind != EMBZ_ASYM_SCALE) {
        if (r != s) embz_asym_series_set(r, s);
        if (r->sign != 0) r->sign = 1;
        return;
    }
    if (sg == 2) { _embz_asym_unknown(r, "abs of an expression of undecided sign"); return; }
    if (sg < 0) _embz_asym_neg(r, s);
    else if (r != s) embz_asym_series_set(r, s);
}

void _embz_asym_minmax(aser_t *r, const aser_t *a, const aser_t *b, int max, slong K, slong prec)
{
    aser_t d;
    int sg;
    embz_asym_series_init(&d);
    _embz_asym_sub(&d, a, b, K, prec);
    sg = _embz_asym_sign(&d);
    if (d.kind == EMBZ_ASYM_UNKNOWN) copy_unknown(r, &d);
    else if (sg == 2) _embz_asym_unknown(r, "%s of arguments whose order is undecided", max ? "max" : "min");
    else if ((sg >= 0) == (max != 0)) embz_asym_series_set(r, a);
    else embz_asym_series_set(r, b);
    embz_asym_series_clear(&d);
}
