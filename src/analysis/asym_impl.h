/* Internal helpers of the asymptotic-expansion engine (src/analysis/asym*.c). */
#ifndef EMBZ_ASYM_IMPL_H
#define EMBZ_ASYM_IMPL_H

#include "embz/asym.h"

typedef embz_asym_term_struct aterm_t;
typedef embz_asym_series_struct aser_t;

/* ---- monomials (fmpq[EMBZ_ASYM_LEVELS]) */
int _embz_asym_mono_cmp(const fmpq *a, const fmpq *b);
int _embz_asym_mono_is_one(const fmpq *a);
int _embz_asym_mono_cmp_one(const fmpq *a);           /* sign of the growth: >0 grows, <0 -> 0 */
void _embz_asym_mono_zero(fmpq *a);
void _embz_asym_mono_set(fmpq *r, const fmpq *a);
void _embz_asym_mono_add(fmpq *r, const fmpq *a, const fmpq *b);
void _embz_asym_mono_sub(fmpq *r, const fmpq *a, const fmpq *b);
void _embz_asym_mono_scal(fmpq *r, const fmpq *a, const fmpq_t p);
void _embz_asym_mono_unit(fmpq *r, int level);          /* (log^level x) as a monomial */

/* ---- coefficients: terms whose monomial is ignored */
void _embz_asym_term_init(aterm_t *t);
void _embz_asym_term_clear(aterm_t *t);
void _embz_asym_term_set(aterm_t *r, const aterm_t *a);
void _embz_asym_coef_set_fmpq(aterm_t *t, const fmpq_t q);
void _embz_asym_coef_set_si(aterm_t *t, slong v);
void _embz_asym_coef_set_arb(aterm_t *t, const arb_t x);
void _embz_asym_coef_add(aterm_t *r, const aterm_t *a, const aterm_t *b, slong prec);
void _embz_asym_coef_mul(aterm_t *r, const aterm_t *a, const aterm_t *b, slong prec);
void _embz_asym_coef_neg(aterm_t *r, const aterm_t *a);
int _embz_asym_coef_inv(aterm_t *r, const aterm_t *a, slong prec);   /* 0 ok, 1 if not invertible */
int _embz_asym_coef_pow(aterm_t *r, const aterm_t *a, const fmpq_t p, slong prec); /* 0 ok */
int _embz_asym_coef_sign(const aterm_t *a);   /* +1, -1, 0 (exactly 0), 2 (undecided) */

/* ---- series */
void _embz_asym_zero(aser_t *s);
void _embz_asym_one(aser_t *s);
void _embz_asym_const(aser_t *s, const aterm_t *c);
void _embz_asym_x(aser_t *s);
void _embz_asym_unknown(aser_t *s, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;
void _embz_asym_fast(aser_t *s, int kind, int sign);
void _embz_asym_swap(aser_t *a, aser_t *b);
/* appends c * x^e (copies) */
void _embz_asym_push(aser_t *s, const aterm_t *c, const fmpq *e);
/* sort, merge, drop zeros, fold undecided coefficients and the tail beyond K into the
 * remainder */
void _embz_asym_normalize(aser_t *s, slong K, slong prec);
/* top monomial (first term or remainder); returns 0 if s is exactly zero */
int _embz_asym_top(fmpq *e, const aser_t *s);
int _embz_asym_is_zero(const aser_t *s);
void _embz_asym_add(aser_t *r, const aser_t *a, const aser_t *b, slong K, slong prec);
void _embz_asym_sub(aser_t *r, const aser_t *a, const aser_t *b, slong K, slong prec);
void _embz_asym_neg(aser_t *r, const aser_t *a);
void _embz_asym_mul(aser_t *r, const aser_t *a, const aser_t *b, slong K, slong prec);
/* r = c * x^e * a */
void _embz_asym_scale(aser_t *r, const aser_t *a, const aterm_t *c, const fmpq *e, slong prec);
/* r = sum_{k<n} t[k] eps^k, plus O(top(eps)^n) unless finite; eps is SCALE with top < 1 or
 * FAST_DECAY */
void _embz_asym_compose(aser_t *r, const aterm_t *t, slong n, int finite, const aser_t *eps,
                        slong K, slong prec);

/* ---- functions of series (asym_func.c) */
void _embz_asym_pow_fmpq(aser_t *r, const aser_t *s, const fmpq_t p, slong K, slong prec);
void _embz_asym_log(aser_t *r, const aser_t *s, slong K, slong prec);
void _embz_asym_exp(aser_t *r, const aser_t *s, slong K, slong prec);
void _embz_asym_lgamma(aser_t *r, const aser_t *s, slong K, slong prec);
void _embz_asym_atan(aser_t *r, const aser_t *s, slong K, slong prec);
void _embz_asym_sincos(aser_t *r, const aser_t *s, int cosine, slong K, slong prec);
void _embz_asym_abs(aser_t *r, const aser_t *s);
void _embz_asym_minmax(aser_t *r, const aser_t *a, const aser_t *b, int max, slong K, slong prec);
/* eventual sign of a series: +1, -1, 0 (exactly zero), 2 (undecided) */
int _embz_asym_sign(const aser_t *s);

#endif
