/* Asymptotic series: monomials, coefficients (exact rational or ball), and the ring operations
 * with remainder bookkeeping. */
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include "asym_impl.h"

#define L EMBZ_ASYM_LEVELS

/* ------------------------------------------------------------------ monomials */

int _embz_asym_mono_cmp(const fmpq *a, const fmpq *b)
{
    for (int k = 0; k < L; k++) {
        int c = fmpq_cmp(a + k, b + k);
        if (c != 0) return c > 0 ? 1 : -1;
    }
    return 0;
}

int _embz_asym_mono_cmp_one(const fmpq *a)
{
    for (int k = 0; k < L; k++) {
        int c = fmpq_sgn(a + k);
        if (c != 0) return c;
    }
    return 0;
}

int _embz_asym_mono_is_one(const fmpq *a) { return _embz_asym_mono_cmp_one(a) == 0; }

void _embz_asym_mono_zero(fmpq *a)
{
    for (int k = 0; k < L; k++) fmpq_zero(a + k);
}

void _embz_asym_mono_set(fmpq *r, const fmpq *a)
{
    for (int k = 0; k < L; k++) fmpq_set(r + k, a + k);
}

void _embz_asym_mono_add(fmpq *r, const fmpq *a, const fmpq *b)
{
    for (int k = 0; k < L; k++) fmpq_add(r + k, a + k, b + k);
}

void _embz_asym_mono_sub(fmpq *r, const fmpq *a, const fmpq *b)
{
    for (int k = 0; k < L; k++) fmpq_sub(r + k, a + k, b + k);
}

void _embz_asym_mono_scal(fmpq *r, const fmpq *a, const fmpq_t p)
{
    for (int k = 0; k < L; k++) fmpq_mul(r + k, a + k, p);
}

void _embz_asym_mono_unit(fmpq *r, int level)
{
    _embz_asym_mono_zero(r);
    fmpq_one(r + level);
}

/* ------------------------------------------------------------------ coefficients */

void _embz_asym_term_init(aterm_t *t)
{
    for (int k = 0; k < L; k++) fmpq_init(t->e + k);
    arb_init(&t->c);
    fmpq_init(t->q);
    t->exact = 1;
}

void _embz_asym_term_clear(aterm_t *t)
{
    for (int k = 0; k < L; k++) fmpq_clear(t->e + k);
    arb_clear(&t->c);
    fmpq_clear(t->q);
}

void _embz_asym_term_set(aterm_t *r, const aterm_t *a)
{
    if (r == a) return;
    _embz_asym_mono_set(r->e, a->e);
    arb_set(&r->c, &a->c);
    fmpq_set(r->q, a->q);
    r->exact = a->exact;
}

void _embz_asym_coef_set_fmpq(aterm_t *t, const fmpq_t q)
{
    fmpq_set(t->q, q);
    arb_set_fmpq(&t->c, q, 64);   /* only for display; exact terms use q */
    t->exact = 1;
}

void _embz_asym_coef_set_si(aterm_t *t, slong v)
{
    fmpq_set_si(t->q, v, 1);
    arb_set_si(&t->c, v);
    t->exact = 1;
}

void _embz_asym_coef_set_arb(aterm_t *t, const arb_t x)
{
    arb_set(&t->c, x);
    fmpq_zero(t->q);
    t->exact = 0;
}

/* ball of a coefficient at precision prec */
static void coef_ball(arb_t r, const aterm_t *a, slong prec)
{
    if (a->exact) arb_set_fmpq(r, a->q, prec);
    else arb_set(r, &a->c);
}

void _embz_asym_coef_add(aterm_t *r, const aterm_t *a, const aterm_t *b, slong prec)
{
    if (a->exact && b->exact) {
        fmpq_t z;
        fmpq_init(z);
        /* numerator/denominator form: gcc 12 misjudges the object size of a->q here */
        _fmpq_add(fmpq_numref(z), fmpq_denref(z), fmpq_numref(a->q), fmpq_denref(a->q),
                  fmpq_numref(b->q), fmpq_denref(b->q));
        fmpq_swap(r->q, z);
        fmpq_clear(z);
        arb_set_fmpq(&r->c, r->q, prec);
        r->exact = 1;
    } else {
        arb_t x, y;
        arb_init(x); arb_init(y);
        coef_ball(x, a, prec); coef_ball(y, b, prec);
        arb_add(&r->c, x, y, prec);
        r->exact = 0;
        arb_clear(x); arb_clear(y);
    }
}

void _embz_asym_coef_mul(aterm_t *r, const aterm_t *a, const aterm_t *b, slong prec)
{
    if (a->exact && b->exact) {
        fmpq_mul(r->q, a->q, b->q);
        arb_set_fmpq(&r->c, r->q, prec);
        r->exact = 1;
    } else if ((a->exact && fmpq_is_zero(a->q)) || (b->exact && fmpq_is_zero(b->q))) {
        fmpq_zero(r->q); arb_zero(&r->c); r->exact = 1;
    } else {
        arb_t x, y;
        arb_init(x); arb_init(y);
        coef_ball(x, a, prec); coef_ball(y, b, prec);
        arb_mul(&r->c, x, y, prec);
        r->exact = 0;
        arb_clear(x); arb_clear(y);
    }
}

void _embz_asym_coef_neg(aterm_t *r, const aterm_t *a)
{
    fmpq_neg(r->q, a->q);
    arb_neg(&r->c, &a->c);
    r->exact = a->exact;
}

int _embz_asym_coef_sign(const aterm_t *a)
{
    if (a->exact) return fmpq_sgn(a->q);
    if (arb_is_zero(&a->c)) return 0;
    if (arb_is_positive(&a->c)) return 1;
    if (arb_is_negative(&a->c)) return -1;
    return 2;
}

int _embz_asym_coef_inv(aterm_t *r, const aterm_t *a, slong prec)
{
    int s = _embz_asym_coef_sign(a);
    if (s == 0 || s == 2) return 1;
    if (a->exact) {
        fmpq_inv(r->q, a->q);
        arb_set_fmpq(&r->c, r->q, prec);
        r->exact = 1;
    } else {
        arb_inv(&r->c, &a->c, prec);
        r->exact = 0;
    }
    return 0;
}

/* exact v-th root of a non-negative integer, if it is a perfect power */
static int exact_root(fmpz_t r, const fmpz_t x, ulong v)
{
    fmpz_t t;
    int ok;
    if (fmpz_sgn(x) < 0) return 0;
    fmpz_init(t);
    fmpz_root(r, x, v);
    fmpz_pow_ui(t, r, v);
    ok = fmpz_equal(t, x);
    fmpz_clear(t);
    return ok;
}

int _embz_asym_coef_pow(aterm_t *r, const aterm_t *a, const fmpq_t p, slong prec)
{
    int s = _embz_asym_coef_sign(a);
    int integer = fmpz_is_one(fmpq_denref(p));
    if (fmpq_is_zero(p)) { _embz_asym_coef_set_si(r, 1); return 0; }
    if (s == 0) {
        if (fmpq_sgn(p) < 0) return 1;
        _embz_asym_coef_set_si(r, 0);
        return 0;
    }
    if (s == 2) return 1;
    if (!integer && s < 0) return 1;   /* negative base, fractional exponent */
    if (!fmpz_fits_si(fmpq_numref(p)) || !fmpz_fits_si(fmpq_denref(p))) return 1;
    if (fmpz_cmp_ui(fmpq_denref(p), 1000) > 0) return 1;
    slong u = fmpz_get_si(fmpq_numref(p));
    ulong v = fmpz_get_ui(fmpq_denref(p));
    if (a->exact) {
        /* exact when the height of the result stays moderate */
        fmpq_t b;
        int ok = 1;
        fmpq_init(b);
        if (v > 1) {
            ok = exact_root(fmpq_numref(b), fmpq_numref(a->q), v)
                 && exact_root(fmpq_denref(b), fmpq_denref(a->q), v);
        } else {
            fmpq_set(b, a->q);
        }
        if (ok && fmpz_bits(fmpq_numref(b)) + fmpz_bits(fmpq_denref(b)) < 64
            && u < 1000 && u > -1000) {
            fmpq_pow_si(r->q, b, u);
            arb_set_fmpq(&r->c, r->q, prec);
            r->exact = 1;
            fmpq_clear(b);
            return 0;
        }
        fmpq_clear(b);
    }
    {
        arb_t x, y;
        fmpz_t uz;
        arb_init(x); arb_init(y); fmpz_init(uz);
        coef_ball(x, a, prec);
        fmpz_set_si(uz, u);
        if (v > 1) {
            arb_root_ui(y, x, v, prec);
            arb_pow_fmpz(&r->c, y, uz, prec);
        } else {
            arb_pow_fmpz(&r->c, x, uz, prec);
        }
        r->exact = 0;
        fmpq_zero(r->q);
        arb_clear(x); arb_clear(y); fmpz_clear(uz);
    }
    return _embz_asym_coef_sign(r) == 2 ? 1 : 0;
}

/* ------------------------------------------------------------------ series */

void embz_asym_series_init(embz_asym_series_t s)
{
    s->kind = EMBZ_ASYM_SCALE;
    s->sign = 0;
    s->terms = NULL;
    s->len = s->alloc = 0;
    s->has_rem = 0;
    for (int k = 0; k < L; k++) fmpq_init(s->rem + k);
    s->tiny = 0;
    s->why[0] = '\0';
}

static void trim(aser_t *s, slong len)
{
    for (slong k = len; k < s->len; k++) _embz_asym_term_clear(s->terms + k);
    if (len < s->len) s->len = len;
}

void embz_asym_series_clear(embz_asym_series_t s)
{
    trim(s, 0);
    flint_free(s->terms);
    for (int k = 0; k < L; k++) fmpq_clear(s->rem + k);
}

void _embz_asym_zero(aser_t *s)
{
    trim(s, 0);
    s->kind = EMBZ_ASYM_SCALE;
    s->sign = 0;
    s->has_rem = 0;
    _embz_asym_mono_zero(s->rem);
    s->tiny = 0;
    s->why[0] = '\0';
}

void _embz_asym_push(aser_t *s, const aterm_t *c, const fmpq *e)
{
    if (s->len == s->alloc) {
        slong na = s->alloc ? 2 * s->alloc : 8;
        s->terms = flint_realloc(s->terms, na * sizeof(aterm_t));
        s->alloc = na;
    }
    aterm_t *t = s->terms + s->len;
    _embz_asym_term_init(t);
    arb_set(&t->c, &c->c);
    fmpq_set(t->q, c->q);
    t->exact = c->exact;
    _embz_asym_mono_set(t->e, e);
    s->len++;
}

void _embz_asym_const(aser_t *s, const aterm_t *c)
{
    fmpq e[L];
    for (int k = 0; k < L; k++) fmpq_init(e + k);
    _embz_asym_zero(s);
    _embz_asym_push(s, c, e);
    _embz_asym_normalize(s, 1, 64);
    for (int k = 0; k < L; k++) fmpq_clear(e + k);
}

void _embz_asym_one(aser_t *s)
{
    aterm_t c;
    _embz_asym_term_init(&c);
    _embz_asym_coef_set_si(&c, 1);
    _embz_asym_const(s, &c);
    _embz_asym_term_clear(&c);
}

void _embz_asym_x(aser_t *s)
{
    aterm_t c;
    _embz_asym_term_init(&c);
    _embz_asym_coef_set_si(&c, 1);
    _embz_asym_zero(s);
    fmpq_one(c.e + 0);
    _embz_asym_push(s, &c, c.e);
    _embz_asym_term_clear(&c);
}

void _embz_asym_unknown(aser_t *s, const char *fmt, ...)
{
    va_list ap;
    _embz_asym_zero(s);
    s->kind = EMBZ_ASYM_UNKNOWN;
    va_start(ap, fmt);
    vsnprintf(s->why, sizeof(s->why), fmt, ap);
    va_end(ap);
}

void _embz_asym_fast(aser_t *s, int kind, int sign)
{
    _embz_asym_zero(s);
    s->kind = kind;
    s->sign = sign;
}

void _embz_asym_swap(aser_t *a, aser_t *b)
{
    aser_t t = *a;
    *a = *b;
    *b = t;
}

void embz_asym_series_set(embz_asym_series_t dst, const embz_asym_series_t src)
{
    if (dst == src) return;
    _embz_asym_zero(dst);
    dst->kind = src->kind;
    dst->sign = src->sign;
    for (slong k = 0; k < src->len; k++) _embz_asym_push(dst, src->terms + k, src->terms[k].e);
    dst->has_rem = src->has_rem;
    _embz_asym_mono_set(dst->rem, src->rem);
    dst->tiny = src->tiny;
    memcpy(dst->why, src->why, sizeof(dst->why));
}

static int term_cmp_desc(const void *x, const void *y)
{
    const aterm_t *a = x, *b = y;
    return -_embz_asym_mono_cmp(a->e, b->e);
}

static void rem_max(aser_t *s, const fmpq *e)
{
    if (!s->has_rem || _embz_asym_mono_cmp(e, s->rem) > 0) {
        _embz_asym_mono_set(s->rem, e);
        s->has_rem = 1;
    }
}

void _embz_asym_normalize(aser_t *s, slong K, slong prec)
{
    slong w, k;
    if (s->kind != EMBZ_ASYM_SCALE) { trim(s, 0); return; }
    if (s->len > 1) qsort(s->terms, s->len, sizeof(aterm_t), term_cmp_desc);
    /* merge equal monomials */
    w = 0;
    for (k = 0; k < s->len; k++) {
        if (w > 0 && _embz_asym_mono_cmp(s->terms[w - 1].e, s->terms[k].e) == 0) {
            _embz_asym_coef_add(s->terms + w - 1, s->terms + w - 1, s->terms + k, prec);
            _embz_asym_term_clear(s->terms + k);
        } else {
            if (w != k) s->terms[w] = s->terms[k];
            w++;
        }
    }
    s->len = w;
    /* filter */
    w = 0;
    for (k = 0; k < s->len; k++) {
        aterm_t *t = s->terms + k;
        int keep = 1, sg;
        if (s->has_rem && _embz_asym_mono_cmp(t->e, s->rem) <= 0) keep = 0;
        else if ((sg = _embz_asym_coef_sign(t)) == 0) keep = 0;
        else if (sg == 2 || w >= K) { rem_max(s, t->e); keep = 0; }
        if (keep) {
            if (w != k) s->terms[w] = s->terms[k];
            w++;
        } else {
            _embz_asym_term_clear(t);
        }
    }
    s->len = w;
    if (s->has_rem) s->tiny = 0;
    if (s->len == 0 && !s->has_rem && s->tiny) _embz_asym_fast(s, EMBZ_ASYM_FAST_DECAY, 0);
}

int _embz_asym_top(fmpq *e, const aser_t *s)
{
    if (s->len > 0) { _embz_asym_mono_set(e, s->terms[0].e); return 1; }
    if (s->has_rem) { _embz_asym_mono_set(e, s->rem); return 1; }
    return 0;
}

int _embz_asym_is_zero(const aser_t *s)
{
    return s->kind == EMBZ_ASYM_SCALE && s->len == 0 && !s->has_rem && !s->tiny;
}

int _embz_asym_sign(const aser_t *s)
{
    if (s->kind == EMBZ_ASYM_UNKNOWN) return 2;
    if (s->kind != EMBZ_ASYM_SCALE) return s->sign == 0 ? 2 : s->sign;
    if (s->len > 0) return _embz_asym_coef_sign(s->terms);
    if (s->has_rem || s->tiny) return 2;
    return 0;
}

int embz_asym_series_decided(const embz_asym_series_t s)
{
    return s->kind == EMBZ_ASYM_SCALE && (s->len > 0 || (!s->has_rem && !s->tiny));
}

void _embz_asym_neg(aser_t *r, const aser_t *a)
{
    if (r != a) embz_asym_series_set(r, a);
    if (r->kind != EMBZ_ASYM_SCALE) { r->sign = -r->sign; return; }
    for (slong k = 0; k < r->len; k++) _embz_asym_coef_neg(r->terms + k, r->terms + k);
}

/* Combination of kinds outside the scale for + (op 0) and * (op 1). Returns 1 if r was set. */
static int kinds_combine(aser_t *r, const aser_t *a, const aser_t *b, int op)
{
    int ka = a->kind, kb = b->kind;
    if (ka == EMBZ_ASYM_SCALE && kb == EMBZ_ASYM_SCALE) return 0;
    if (ka == EMBZ_ASYM_UNKNOWN || kb == EMBZ_ASYM_UNKNOWN) {
        const aser_t *u = ka == EMBZ_ASYM_UNKNOWN ? a : b;
        char why[sizeof(u->why)];
        memcpy(why, u->why, sizeof(why));
        _embz_asym_unknown(r, "%s", why);
        return 1;
    }
    if (op == 0) {
        if (ka == kb) {   /* both fast of the same kind */
            int sa = a->sign, sb = b->sign;
            _embz_asym_fast(r, ka, (sa == sb) ? sa : 0);
            if (ka == EMBZ_ASYM_FAST_GROWTH && sa != sb)
                _embz_asym_unknown(r, "difference of two fast-growing functions");
            return 1;
        }
        if (ka == EMBZ_ASYM_FAST_GROWTH || kb == EMBZ_ASYM_FAST_GROWTH) {
            int s = ka == EMBZ_ASYM_FAST_GROWTH ? a->sign : b->sign;
            _embz_asym_fast(r, EMBZ_ASYM_FAST_GROWTH, s);
            return 1;
        }
        /* one FAST_DECAY, one SCALE: the scale part plus a tiny remainder */
        {
            const aser_t *sc = ka == EMBZ_ASYM_SCALE ? a : b;
            const aser_t *fd = ka == EMBZ_ASYM_SCALE ? b : a;
            int sgn = fd->sign;
            embz_asym_series_set(r, sc);
            if (_embz_asym_is_zero(r)) _embz_asym_fast(r, EMBZ_ASYM_FAST_DECAY, sgn);
            else if (!r->has_rem) r->tiny = 1;
            return 1;
        }
    }
    /* product */
    {
        int sa = _embz_asym_sign(a), sb = _embz_asym_sign(b);
        int sg = (sa == 2 || sb == 2) ? 0 : sa * sb;
        if (sa == 0 || sb == 0) { _embz_asym_zero(r); return 1; }
        if (ka != EMBZ_ASYM_SCALE && kb != EMBZ_ASYM_SCALE) {
            if (ka != kb) _embz_asym_unknown(r, "product of a fast-decaying and a fast-growing function");
            else _embz_asym_fast(r, ka, sg);
            return 1;
        }
        {
            const aser_t *sc = ka == EMBZ_ASYM_SCALE ? a : b;
            const aser_t *fa = ka == EMBZ_ASYM_SCALE ? b : a;
            if (!embz_asym_series_decided(sc)) {
                if (fa->kind == EMBZ_ASYM_FAST_DECAY && (sc->len > 0 || sc->has_rem || sc->tiny)) {
                    /* bounded by a power times a fast-decaying function */
                    _embz_asym_fast(r, EMBZ_ASYM_FAST_DECAY, 0);
                } else {
                    _embz_asym_unknown(r, "leading term undetermined (cancellation)");
                }
                return 1;
            }
            _embz_asym_fast(r, fa->kind, sg);
        }
        return 1;
    }
}

void _embz_asym_add(aser_t *r, const aser_t *a, const aser_t *b, slong K, slong prec)
{
    aser_t t;
    if (kinds_combine(r, a, b, 0)) return;
    embz_asym_series_init(&t);
    for (slong k = 0; k < a->len; k++) _embz_asym_push(&t, a->terms + k, a->terms[k].e);
    for (slong k = 0; k < b->len; k++) _embz_asym_push(&t, b->terms + k, b->terms[k].e);
    if (a->has_rem) rem_max(&t, a->rem);
    if (b->has_rem) rem_max(&t, b->rem);
    t.tiny = a->tiny || b->tiny;
    _embz_asym_normalize(&t, K, prec);
    _embz_asym_swap(r, &t);
    embz_asym_series_clear(&t);
}

void _embz_asym_sub(aser_t *r, const aser_t *a, const aser_t *b, slong K, slong prec)
{
    aser_t nb;
    embz_asym_series_init(&nb);
    _embz_asym_neg(&nb, b);
    _embz_asym_add(r, a, &nb, K, prec);
    embz_asym_series_clear(&nb);
}

void _embz_asym_mul(aser_t *r, const aser_t *a, const aser_t *b, slong K, slong prec)
{
    aser_t t;
    aterm_t c;
    fmpq e[L], ta[L], tb[L];
    int hasa, hasb;
    if (kinds_combine(r, a, b, 1)) return;
    embz_asym_series_init(&t);
    _embz_asym_term_init(&c);
    for (int k = 0; k < L; k++) { fmpq_init(e + k); fmpq_init(ta + k); fmpq_init(tb + k); }
    for (slong i = 0; i < a->len; i++)
        for (slong j = 0; j < b->len; j++) {
            _embz_asym_coef_mul(&c, a->terms + i, b->terms + j, prec);
            _embz_asym_mono_add(e, a->terms[i].e, b->terms[j].e);
            _embz_asym_push(&t, &c, e);
        }
    hasa = _embz_asym_top(ta, a);
    hasb = _embz_asym_top(tb, b);
    if (a->has_rem && hasb) { _embz_asym_mono_add(e, a->rem, tb); rem_max(&t, e); }
    if (b->has_rem && hasa) { _embz_asym_mono_add(e, b->rem, ta); rem_max(&t, e); }
    t.tiny = (a->tiny && hasb) || (b->tiny && hasa) || (a->tiny && b->tiny);
    _embz_asym_normalize(&t, K, prec);
    _embz_asym_swap(r, &t);
    embz_asym_series_clear(&t);
    _embz_asym_term_clear(&c);
    for (int k = 0; k < L; k++) { fmpq_clear(e + k); fmpq_clear(ta + k); fmpq_clear(tb + k); }
}

void _embz_asym_scale(aser_t *r, const aser_t *a, const aterm_t *c, const fmpq *e, slong prec)
{
    if (r != a) embz_asym_series_set(r, a);
    if (r->kind != EMBZ_ASYM_SCALE) {
        int s = _embz_asym_coef_sign(c);
        if (s == 0) _embz_asym_zero(r);
        else if (s == 2) r->sign = 0;
        else r->sign *= s;
        return;
    }
    for (slong k = 0; k < r->len; k++) {
        _embz_asym_coef_mul(r->terms + k, r->terms + k, c, prec);
        _embz_asym_mono_add(r->terms[k].e, r->terms[k].e, e);
    }
    if (r->has_rem) _embz_asym_mono_add(r->rem, r->rem, e);
    _embz_asym_normalize(r, r->len > 0 ? r->len : 1, prec);
}

void _embz_asym_compose(aser_t *r, const aterm_t *t, slong n, int finite, const aser_t *eps,
                        slong K, slong prec)
{
    aser_t res, pw, tmp, tt;
    fmpq top[L], e[L];
    int early = 0;
    embz_asym_series_init(&res); embz_asym_series_init(&pw);
    embz_asym_series_init(&tmp); embz_asym_series_init(&tt);
    for (int k = 0; k < L; k++) { fmpq_init(top + k); fmpq_init(e + k); }

    _embz_asym_const(&res, t + 0);
    if (eps->kind == EMBZ_ASYM_FAST_DECAY) {
        if (!res.has_rem) res.tiny = 1;
        if (_embz_asym_is_zero(&res) || (res.len == 0 && !res.has_rem))
            _embz_asym_fast(&res, EMBZ_ASYM_FAST_DECAY, 0);
        goto done;
    }
    if (!_embz_asym_top(top, eps)) goto done;   /* eps exactly 0 */
    _embz_asym_one(&pw);
    for (slong k = 1; k < n; k++) {
        _embz_asym_mul(&tmp, &pw, eps, K, prec);
        _embz_asym_swap(&pw, &tmp);
        if (_embz_asym_is_zero(&pw)) { early = 1; break; }
        _embz_asym_mono_zero(e);
        embz_asym_series_set(&tt, &pw);
        _embz_asym_scale(&tt, &tt, t + k, e, prec);
        _embz_asym_add(&tmp, &res, &tt, K, prec);
        _embz_asym_swap(&res, &tmp);
        /* once the next power is below the accumulated remainder nothing more can show */
        if (res.has_rem && _embz_asym_top(e, &pw)) {
            _embz_asym_mono_add(e, e, top);
            if (_embz_asym_mono_cmp(e, res.rem) <= 0) { early = 1; break; }
        }
    }
    if (!finite && !early) {
        _embz_asym_mono_zero(e);
        for (slong k = 0; k < n; k++) _embz_asym_mono_add(e, e, top);
        rem_max(&res, e);
        _embz_asym_normalize(&res, K, prec);
    }
done:
    _embz_asym_swap(r, &res);
    embz_asym_series_clear(&res); embz_asym_series_clear(&pw);
    embz_asym_series_clear(&tmp); embz_asym_series_clear(&tt);
    for (int k = 0; k < L; k++) { fmpq_clear(top + k); fmpq_clear(e + k); }
}

/* ------------------------------------------------------------------ derivative */

void embz_asym_series_derivative(embz_asym_series_t res, const embz_asym_series_t s,
                                 slong nterms, slong prec)
{
    aser_t t;
    aterm_t c;
    fmpq e[L], q;
    if (s->kind == EMBZ_ASYM_UNKNOWN) { embz_asym_series_set(res, s); return; }
    if (s->kind != EMBZ_ASYM_SCALE) {
        /* Hardy field: a positive function tending to 0 decreases, and its derivative is
         * again o(x^-N) for every N; a function whose absolute value tends to infinity
         * faster than every power has a derivative of the same sign that does too. */
        int kind = s->kind, sign = s->sign;
        _embz_asym_fast(res, kind, kind == EMBZ_ASYM_FAST_DECAY ? -sign : sign);
        return;
    }
    embz_asym_series_init(&t);
    _embz_asym_term_init(&c);
    fmpq_init(&q);
    for (int k = 0; k < L; k++) fmpq_init(e + k);
    for (slong i = 0; i < s->len; i++) {
        const aterm_t *u = s->terms + i;
        /* d/dx of x^a L1^b L2^c L3^d: levels contribute a x^(a-1)..., b x^(a-1) L1^(b-1)...,
         * c x^(a-1) L1^(b-1) L2^(c-1)..., d x^(a-1) L1^(b-1) L2^(c-1) L3^(d-1) */
        for (int lev = 0; lev < L; lev++) {
            if (fmpq_is_zero(u->e + lev)) continue;
            _embz_asym_mono_set(e, u->e);
            for (int j = 0; j <= lev; j++) fmpq_sub_si(e + j, e + j, 1);
            _embz_asym_coef_set_fmpq(&c, u->e + lev);
            _embz_asym_coef_mul(&c, &c, u, prec);
            _embz_asym_push(&t, &c, e);
        }
    }
    if (s->has_rem) {
        /* Rosenlicht: in a Hardy field, f = O(g) with g not of constant order gives
         * f' = O(g'); and a bounded f has f' = o(1/x). */
        int lev;
        for (lev = 0; lev < L && fmpq_is_zero(s->rem + lev); lev++) ;
        _embz_asym_mono_set(e, s->rem);
        if (lev == L) {
            _embz_asym_mono_zero(e);
            fmpq_set_si(e + 0, -1, 1);
        } else {
            for (int j = 0; j <= lev; j++) fmpq_sub_si(e + j, e + j, 1);
        }
        rem_max(&t, e);
    }
    t.tiny = s->tiny;
    _embz_asym_normalize(&t, nterms, prec);
    _embz_asym_swap(res, &t);
    embz_asym_series_clear(&t);
    _embz_asym_term_clear(&c);
    fmpq_clear(&q);
    for (int k = 0; k < L; k++) fmpq_clear(e + k);
}

/* ------------------------------------------------------------------ evaluation, text */

int embz_asym_mono_eval(arb_t res, const fmpq *e, const arb_t x, slong prec)
{
    arb_t lg, t, p;
    int st = EMBZ_OK;
    arb_init(lg); arb_init(t); arb_init(p);
    arb_one(res);
    arb_set(lg, x);
    for (int k = 0; k < L; k++) {
        if (k > 0) {
            if (!arb_is_positive(lg)) { st = EMBZ_ERR_DOMAIN; break; }
            arb_log(lg, lg, prec);
        }
        if (fmpq_is_zero(e + k)) continue;
        if (!arb_is_positive(lg)) { st = EMBZ_ERR_DOMAIN; break; }
        arb_set_fmpq(p, e + k, prec);
        arb_pow(t, lg, p, prec);
        arb_mul(res, res, t, prec);
    }
    if (st != EMBZ_OK) arb_indeterminate(res);
    arb_clear(lg); arb_clear(t); arb_clear(p);
    return st;
}

int embz_asym_series_eval(arb_t res, const embz_asym_series_t s, const arb_t x, slong prec)
{
    arb_t m, c;
    int st = EMBZ_OK;
    if (s->kind != EMBZ_ASYM_SCALE) { arb_indeterminate(res); return EMBZ_ERR_UNSUPPORTED; }
    arb_init(m); arb_init(c);
    arb_zero(res);
    for (slong k = 0; k < s->len && st == EMBZ_OK; k++) {
        st = embz_asym_mono_eval(m, s->terms[k].e, x, prec);
        coef_ball(c, s->terms + k, prec);
        arb_addmul(res, c, m, prec);
    }
    if (st != EMBZ_OK) arb_indeterminate(res);
    arb_clear(m); arb_clear(c);
    return st;
}

static void append(char *buf, size_t len, size_t *pos, const char *text)
{
    size_t n = strlen(text);
    if (len == 0) return;
    if (*pos + n >= len) n = len - 1 - *pos;
    memcpy(buf + *pos, text, n);
    *pos += n;
    buf[*pos] = '\0';
}

static void exp_text(char *out, size_t len, const fmpq_t q)
{
    char *s = fmpq_get_str(NULL, 10, q);
    if (fmpz_is_one(fmpq_denref(q))) snprintf(out, len, "%s", s);
    else snprintf(out, len, "(%s)", s);
    flint_free(s);
}

void embz_asym_mono_str(char *buf, size_t len, const fmpq *e)
{
    static const char *names[L] = {"x", "log x", "log log x", "log log log x"};
    size_t pos = 0;
    char ex[128], piece[200];
    if (len == 0) return;
    buf[0] = '\0';
    for (int k = 0; k < L; k++) {
        if (fmpq_is_zero(e + k)) continue;
        if (pos > 0) append(buf, len, &pos, " ");
        if (fmpq_is_one(e + k)) {
            snprintf(piece, sizeof(piece), "%s", names[k]);
        } else {
            exp_text(ex, sizeof(ex), e + k);
            if (k == 0) snprintf(piece, sizeof(piece), "x^%s", ex);
            else snprintf(piece, sizeof(piece), "(%s)^%s", names[k], ex);
        }
        append(buf, len, &pos, piece);
    }
    if (pos == 0) append(buf, len, &pos, "1");
}

char *embz_asym_series_to_string(const embz_asym_series_t s, slong digits)
{
    size_t cap = 256 + (size_t) s->len * (200 + 2 * (size_t) digits) + 200;
    char *buf = flint_malloc(cap), mono[400];
    size_t pos = 0;
    buf[0] = '\0';
    if (s->kind == EMBZ_ASYM_FAST_DECAY) { append(buf, cap, &pos, "decays faster than any power"); return buf; }
    if (s->kind == EMBZ_ASYM_FAST_GROWTH) { append(buf, cap, &pos, "grows faster than any power"); return buf; }
    if (s->kind == EMBZ_ASYM_UNKNOWN) {
        append(buf, cap, &pos, "unknown: ");
        append(buf, cap, &pos, s->why);
        return buf;
    }
    for (slong k = 0; k < s->len; k++) {
        const aterm_t *t = s->terms + k;
        char *cs;
        if (k > 0) append(buf, cap, &pos, " + ");
        if (t->exact) {
            cs = fmpq_get_str(NULL, 10, t->q);
            append(buf, cap, &pos, "(");
            append(buf, cap, &pos, cs);
            append(buf, cap, &pos, ")");
            flint_free(cs);
        } else {
            cs = arb_get_str(&t->c, digits, 0);
            append(buf, cap, &pos, "(");
            append(buf, cap, &pos, cs);
            append(buf, cap, &pos, ")");
            flint_free(cs);
        }
        embz_asym_mono_str(mono, sizeof(mono), t->e);
        append(buf, cap, &pos, "*");
        append(buf, cap, &pos, mono);
    }
    if (s->has_rem) {
        embz_asym_mono_str(mono, sizeof(mono), s->rem);
        if (s->len > 0) append(buf, cap, &pos, " + ");
        append(buf, cap, &pos, "O(");
        append(buf, cap, &pos, mono);
        append(buf, cap, &pos, ")");
    } else if (s->tiny) {
        append(buf, cap, &pos, " + (faster than any power)");
    }
    if (s->len == 0 && !s->has_rem) append(buf, cap, &pos, "0");
    return buf;
}
