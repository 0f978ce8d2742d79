/* Asymptotic expansions of weight expressions f(i) as i -> +infinity, and the analytic verdict
 * "is the truncation family of f a universal embezzler?".
 *
 * Scale: monomials x^e0 (log x)^e1 (log log x)^e2 (log log log x)^e3 with exact rational
 * exponents, ordered by growth (lexicographic on (e0, e1, e2, e3)). An expansion is a finite
 * sum of terms c * monomial in decreasing order plus a remainder that is O(rem monomial)
 * (or nothing, or a remainder that decays faster than any power). Coefficients are arb
 * balls, carried as exact rationals as long as the computation stays rational, so that
 * cancellation is decided exactly; a coefficient whose ball contains 0 (and is not exactly 0)
 * is never guessed: it is folded into the remainder. */
#ifndef EMBZ_ASYM_H
#define EMBZ_ASYM_H

#include "embz/flint.h"
#include "embz/err.h"
#include "embz/expr.h"

#define EMBZ_ASYM_LEVELS 4   /* x, log x, log log x, log log log x */

/* One term c * x^e[0] (log x)^e[1] (log log x)^e[2] (log log log x)^e[3]. */
typedef struct {
    fmpq e[EMBZ_ASYM_LEVELS];
    arb_struct c;      /* coefficient ball (a point ball equal to q when exact) */
    fmpq_t q;          /* the exact coefficient when exact != 0 */
    int exact;
} embz_asym_term_struct;

/* Kinds of expansion. */
enum {
    EMBZ_ASYM_SCALE = 0,      /* terms + remainder (no terms and no remainder: f is 0) */
    EMBZ_ASYM_FAST_DECAY,     /* |f| -> 0 faster than any power of x; sign in .sign */
    EMBZ_ASYM_FAST_GROWTH,    /* |f| -> infinity faster than any power of x */
    EMBZ_ASYM_UNKNOWN         /* outside what the engine can decide; reason in .why */
};

typedef struct {
    int kind;
    int sign;                          /* FAST_*: eventual sign of f, +1, -1, 0 = undecided */
    embz_asym_term_struct *terms;      /* SCALE: strictly decreasing monomials */
    slong len, alloc;
    int has_rem;                       /* f - sum(terms) = O(rem monomial) */
    fmpq rem[EMBZ_ASYM_LEVELS];
    int tiny;                          /* (no rem) f - sum(terms) is nonzero but decays faster
                                          than any power (e.g. 1/x + exp(-x)) */
    char why[200];                     /* UNKNOWN: reason, for people */
} embz_asym_series_struct;
typedef embz_asym_series_struct embz_asym_series_t[1];

void embz_asym_series_init(embz_asym_series_t s);
void embz_asym_series_clear(embz_asym_series_t s);
void embz_asym_series_set(embz_asym_series_t dst, const embz_asym_series_t src);

/* One expansion attempt of e(i) in the variable x = i, keeping at most nterms terms
 * (nterms >= 1) at working precision prec. Returns EMBZ_OK (s->kind may then be UNKNOWN,
 * or SCALE with no term known above the remainder: retry with more terms / precision),
 * EMBZ_ERR_UNSUPPORTED (and err filled) if e uses n or an unbound parameter, EMBZ_ERR_INPUT
 * for an empty expression. */
int embz_asym_expand(embz_asym_series_t s, const embz_expr_t e, slong nterms, slong prec,
                     embz_err_t *err);

/* 1 if s is SCALE with a leading term above the remainder, or is exactly 0 (len == 0,
 * no remainder, not tiny); 0 otherwise. */
int embz_asym_series_decided(const embz_asym_series_t s);

/* Term-by-term derivative d/dx (valid in a Hardy field; the remainder is differentiated
 * as a monomial, see docs/asymptotics.md). FAST_* and UNKNOWN give UNKNOWN. */
void embz_asym_series_derivative(embz_asym_series_t res, const embz_asym_series_t s,
                                 slong nterms, slong prec);

/* Value of the monomial e at x > 1 (log log log x needs x > e^e when e[3] != 0,
 * log log x needs x > e when e[2] != 0). Returns EMBZ_OK or EMBZ_ERR_DOMAIN. */
int embz_asym_mono_eval(arb_t res, const fmpq *e, const arb_t x, slong prec);
/* Sum of the terms of a SCALE expansion at x (the remainder is not included). */
int embz_asym_series_eval(arb_t res, const embz_asym_series_t s, const arb_t x, slong prec);

/* Text of a monomial: "x^-1 (log x)^-2", "x^(1/2) log log x", "1". Writes at most len bytes
 * (always NUL-terminated when len > 0). */
void embz_asym_mono_str(char *buf, size_t len, const fmpq *e);
/* Text of a whole expansion, "(1)*x^-1 + (-1)*x^-2 + O(x^-3)": exact coefficients as p/q,
 * others as arb balls with `digits` digits. For people and debugging; flint_malloc'ed, the
 * caller frees it with flint_free (or free). */
char *embz_asym_series_to_string(const embz_asym_series_t s, slong digits);

/* ---------------------------------------------------------------- verdict */

enum {
    EMBZ_ASYM_VERDICT_UNKNOWN = 0,
    EMBZ_ASYM_VERDICT_EMBEZZLER,       /* the truncation family is universal */
    EMBZ_ASYM_VERDICT_NOT_EMBEZZLER,
    EMBZ_ASYM_VERDICT_NOT_WEIGHT       /* f is eventually negative or eventually 0 */
};

/* Predicted behaviour of the one-ebit error E_n (leading-order estimates, not theorems). */
enum {
    EMBZ_ASYM_RATE_NONE = 0,           /* undecided */
    EMBZ_ASYM_RATE_POSITIVE_LIMIT,     /* E_n tends to a positive limit */
    EMBZ_ASYM_RATE_LOG_B,              /* (b+1) ln 2 / ln n          (a = -1, b > 0) */
    EMBZ_ASYM_RATE_LOG,                /* C / ln n                   (a = -1, b = 0) */
    EMBZ_ASYM_RATE_LOG_POW,            /* C / (ln n)^p, p = b+1      (a = -1, -1 < b < 0) */
    EMBZ_ASYM_RATE_LOGLOG,             /* C / (ln ln n)^p, p = c+1   (a = -1, b = -1, c > -1) */
    EMBZ_ASYM_RATE_LOGLOGLOG           /* C / (ln ln ln n)^p, p = d+1 (a = b = c = -1, d >= -1) */
};

typedef struct {
    int kind;                          /* EMBZ_ASYM_SCALE / FAST_DECAY / FAST_GROWTH / UNKNOWN */
    int zero;                          /* SCALE only: f is eventually exactly 0 */
    int sign;                          /* eventual sign of f: +1, -1, 0 undecided */
    arb_t coeff;                       /* SCALE: f ~ coeff * x^a (log x)^b (log log x)^c ... */
    int coeff_exact;
    fmpq_t coeff_q;
    fmpq exps[EMBZ_ASYM_LEVELS];       /* a, b, c, d */
    int monotone;                      /* eventual sign of f': +1, -1, 0 (f constant), 2 unknown */
    int dkind;                         /* kind of the derivative's expansion */
    arb_t dcoeff;                      /* SCALE derivative: f' ~ dcoeff * monomial dexps */
    fmpq dexps[EMBZ_ASYM_LEVELS];
    int sum_diverges;                  /* 1, 0, or -1 undecided */
    int verdict;                       /* EMBZ_ASYM_VERDICT_* */
    int limit_known;                   /* 1: limit holds the one-ebit limit of E_n [derived] */
    arb_t limit;
    int rate;                          /* EMBZ_ASYM_RATE_* */
    fmpq_t rate_exp;                   /* the exponent p of the rate class (1 when none) */
    char rate_text[160];
    char why[256];                     /* explanation when kind is UNKNOWN / verdict unknown */
    slong nterms, prec;                /* the attempt that decided */
} embz_asym_result_struct;
typedef embz_asym_result_struct embz_asym_result_t[1];

void embz_asym_result_init(embz_asym_result_t r);
void embz_asym_result_clear(embz_asym_result_t r);

/* Expand e (retrying with more terms and precision starting from prec), differentiate,
 * classify. Returns EMBZ_OK whenever an answer, possibly "unknown", was produced;
 * EMBZ_ERR_UNSUPPORTED for expressions using n or unbound parameters; EMBZ_ERR_INPUT for an
 * empty expression. */
int embz_asym_analyse(embz_asym_result_t r, const embz_expr_t e, slong prec, embz_err_t *err);

/* Leading form of the result as text: "x^-1 (log x)^-2", "decays faster than any power",
 * "grows faster than any power", "0", "unknown". */
void embz_asym_leading_str(char *buf, size_t len, const embz_asym_result_t r);

/* Short names for people: "embezzler", "not an embezzler", "not a weight", "unknown". */
const char *embz_asym_verdict_name(int verdict);

#endif
