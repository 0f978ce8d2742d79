/* Tests of the asymptotic-expansion engine and of the analytic embezzler verdict.
 * References:
 *  - universality criterion for truncated families f(1..n): the family is universal iff the sum
 *    of f diverges and x^(-1-eps) <= f <= x^(-1+eps) eventually for every eps > 0
 *    [published: Quantum 8, 1368 (2024), arXiv:2303.17749];
 *  - divergence of sum 1/(x (log x)^b (log log x)^c ...): Bertrand series (classical, integral
 *    test);
 *  - Taylor series of log(1+t), (1+t)^p, exp, sin, cos, atan (classical closed forms, checked
 *    with FLINT exact rationals);
 *  - Stirling series lgamma(x+1) = x log x - x + (1/2) log(2 pi x) + 1/(12x) - 1/(360 x^3) + ...
 *    [published: DLMF 5.11.1];
 *  - numerical values of the expressions themselves, from the arb ball evaluator of the
 *    expression module and its Taylor-mode evaluator (derivatives), at x = 10^50 and 10^100. */
#include <check.h>
#include <stdlib.h>
#include <string.h>
#include "embz.h"
#include "testutil.h"

/* ------------------------------------------------------------------ helpers */

static void parse_ok(embz_expr_t e, const char *text)
{
    embz_err_t err;
    int s = embz_expr_parse(e, text, NULL, 0, &err);
    ck_assert_msg(s == EMBZ_OK, "parse of '%s' failed: %s", text, err.text);
}

static int analyse_text(embz_asym_result_t r, const char *text, slong prec)
{
    embz_expr_t e;
    embz_err_t err;
    int st;
    embz_expr_init(e);
    parse_ok(e, text);
    st = embz_asym_analyse(r, e, prec, &err);
    embz_expr_clear(e);
    return st;
}

static void expand_text(embz_asym_series_t s, const char *text, slong K, slong prec)
{
    embz_expr_t e;
    embz_err_t err;
    embz_expr_init(e);
    parse_ok(e, text);
    ck_assert_int_eq(embz_asym_expand(s, e, K, prec, &err), EMBZ_OK);
    embz_expr_clear(e);
}

static int q_eq_str(const fmpq_t q, const char *s)
{
    fmpq_t t;
    int eq;
    fmpq_init(t);
    ck_assert_int_eq(fmpq_set_str(t, s, 10), 0);
    fmpq_canonicalise(t);
    eq = fmpq_equal(t, q);
    fmpq_clear(t);
    return eq;
}

static void mono_set_str(fmpq *e, const char *a, const char *b, const char *c, const char *d)
{
    const char *v[4] = {a, b, c, d};
    for (int k = 0; k < 4; k++) {
        ck_assert_int_eq(fmpq_set_str(e + k, v[k], 10), 0);
        fmpq_canonicalise(e + k);
    }
}

static int mono_is_one(const fmpq *e)
{
    for (int k = 0; k < 4; k++) if (!fmpq_is_zero(e + k)) return 0;
    return 1;
}

/* ------------------------------------------------------------------ table of verdicts */

typedef struct {
    const char *f;
    int kind;
    const char *a, *b, *c;      /* exponents of x, log x, log log x (SCALE only) */
    const char *coeff;          /* exact leading coefficient, or NULL */
    int verdict;
    int diverges;
    int rate;
    const char *rate_exp;       /* exponent of the rate class, NULL to skip */
    int monotone;
} row_t;

#define SC EMBZ_ASYM_SCALE
#define EMB EMBZ_ASYM_VERDICT_EMBEZZLER
#define NOT EMBZ_ASYM_VERDICT_NOT_EMBEZZLER

/* Rows follow the classification of f ~ x^a (log x)^b (log log x)^c: universal iff a = -1 and
 * the sum diverges (criterion of arXiv:2303.17749; divergence by the Bertrand series). The
 * exponents and leading coefficients were worked out by hand from the classical Taylor series
 * (e.g. 1/i - 1/(i+1) = 1/(i(i+1)) ~ x^-2, sqrt(i+1) - sqrt(i) ~ (1/2) x^(-1/2),
 * log(i+1) - log(i) ~ 1/x). */
static const row_t ROWS[] = {
    /* a > -1: not universal, positive limit */
    {"i^-0.5", SC, "-1/2", "0", "0", "1", NOT, 1, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    {"i^0.5", SC, "1/2", "0", "0", "1", NOT, 1, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, 1},
    {"1", SC, "0", "0", "0", "1", NOT, 1, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, 0},
    {"sqrt(i+1)-sqrt(i)", SC, "-1/2", "0", "0", "1/2", NOT, 1, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    {"(i+1)^2 - i^2", SC, "1", "0", "0", "2", NOT, 1, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, 1},
    {"i^-0.9*log(i+1)^-5", SC, "-9/10", "-5", "0", "1", NOT, 1, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    /* a < -1: summable */
    {"i^-2", SC, "-2", "0", "0", "1", NOT, 0, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    {"i^-1.5", SC, "-3/2", "0", "0", "1", NOT, 0, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    {"1/i - 1/(i+1)", SC, "-2", "0", "0", "1", NOT, 0, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    {"i^-1.1*log(i+1)^7", SC, "-11/10", "7", "0", "1", NOT, 0, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    {"exp(-i)", EMBZ_ASYM_FAST_DECAY, NULL, NULL, NULL, NULL, NOT, 0, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    {"0.9^i", EMBZ_ASYM_FAST_DECAY, NULL, NULL, NULL, NULL, NOT, 0, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    {"exp(-sqrt(i))", EMBZ_ASYM_FAST_DECAY, NULL, NULL, NULL, NULL, NOT, 0, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    {"i^100*exp(-i/1000)", EMBZ_ASYM_FAST_DECAY, NULL, NULL, NULL, NULL, NOT, 0, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    {"2^i", EMBZ_ASYM_FAST_GROWTH, NULL, NULL, NULL, NULL, NOT, 1, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, 1},
    /* a = -1, b > 0 */
    {"log(i)/i", SC, "-1", "1", "0", "1", EMB, 1, EMBZ_ASYM_RATE_LOG_B, "1", -1},
    {"log(i+1)^2/i", SC, "-1", "2", "0", "1", EMB, 1, EMBZ_ASYM_RATE_LOG_B, "1", -1},
    {"log(i+1)^0.5*log(log(i+2))^-3/i", SC, "-1", "1/2", "-3", "1", EMB, 1, EMBZ_ASYM_RATE_LOG_B, "1", -1},
    /* a = -1, b = 0 */
    {"1/i", SC, "-1", "0", "0", "1", EMB, 1, EMBZ_ASYM_RATE_LOG, "1", -1},
    {"i^-1*(1+1/i)", SC, "-1", "0", "0", "1", EMB, 1, EMBZ_ASYM_RATE_LOG, "1", -1},
    {"log(i+1)-log(i)", SC, "-1", "0", "0", "1", EMB, 1, EMBZ_ASYM_RATE_LOG, "1", -1},
    {"atan(1/i)", SC, "-1", "0", "0", "1", EMB, 1, EMBZ_ASYM_RATE_LOG, "1", -1},
    {"3/(2*i+7)", SC, "-1", "0", "0", "3/2", EMB, 1, EMBZ_ASYM_RATE_LOG, "1", -1},
    /* a = -1, -1 < b < 0 */
    {"1/(i*sqrt(log(i+1)))", SC, "-1", "-1/2", "0", "1", EMB, 1, EMBZ_ASYM_RATE_LOG_POW, "1/2", -1},
    {"1/(i*log(i+1)^0.25)", SC, "-1", "-1/4", "0", "1", EMB, 1, EMBZ_ASYM_RATE_LOG_POW, "3/4", -1},
    /* a = -1, b = -1, c >= -1 */
    {"1/(i*log(i+1))", SC, "-1", "-1", "0", "1", EMB, 1, EMBZ_ASYM_RATE_LOGLOG, "1", -1},
    {"1/(i*log(i+1)*sqrt(log(log(i+2))))", SC, "-1", "-1", "-1/2", "1", EMB, 1, EMBZ_ASYM_RATE_LOGLOG, "1/2", -1},
    {"1/(i*log(i+1)*log(log(i+2)))", SC, "-1", "-1", "-1", "1", EMB, 1, EMBZ_ASYM_RATE_LOGLOGLOG, "1", -1},
    /* d = -1 exactly: still divergent (the sum grows like log log log log n) */
    {"1/(i*log(i+1)*log(log(i+2))*log(log(log(i+16))))", SC, "-1", "-1", "-1", "1", EMB, 1,
     EMBZ_ASYM_RATE_LOGLOGLOG, "0", -1},
    /* a = -1, summable */
    {"1/(i*log(i+1)^2)", SC, "-1", "-2", "0", "1", NOT, 0, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    {"1/(i*log(i+1)^1.5)", SC, "-1", "-3/2", "0", "1", NOT, 0, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    {"1/(i*log(i+1)*log(log(i+3))^2)", SC, "-1", "-1", "-2", "1", NOT, 0, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
    {"1/(i*log(i+1)*log(log(i+2))*log(log(log(i+16)))^2)", SC, "-1", "-1", "-1", "1", NOT, 0,
     EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, -1},
};

START_TEST(test_table)
{
    const row_t *w = ROWS + _i;
    embz_asym_result_t r;
    embz_asym_result_init(r);
    ck_assert_int_eq(analyse_text(r, w->f, 128), EMBZ_OK);
    ck_assert_msg(r->kind == w->kind, "%s: kind %d, expected %d (%s)", w->f, r->kind, w->kind, r->why);
    ck_assert_msg(r->verdict == w->verdict, "%s: verdict %s (%s)", w->f,
                  embz_asym_verdict_name(r->verdict), r->why);
    ck_assert_msg(r->sum_diverges == w->diverges, "%s: diverges %d", w->f, r->sum_diverges);
    ck_assert_msg(r->rate == w->rate, "%s: rate %d (%s)", w->f, r->rate, r->rate_text);
    ck_assert_msg(r->monotone == w->monotone, "%s: monotone %d", w->f, r->monotone);
    ck_assert_int_eq(r->sign, 1);
    if (w->kind == SC) {
        ck_assert_msg(q_eq_str(r->exps + 0, w->a) && q_eq_str(r->exps + 1, w->b)
                      && q_eq_str(r->exps + 2, w->c), "%s: exponents wrong", w->f);
        if (w->coeff) {
            ck_assert_msg(r->coeff_exact && q_eq_str(r->coeff_q, w->coeff),
                          "%s: leading coefficient wrong", w->f);
        }
    }
    if (w->rate_exp) ck_assert_msg(q_eq_str(r->rate_exp, w->rate_exp), "%s: rate exponent", w->f);
    ck_assert(r->rate_text[0] != '\0');
    embz_asym_result_clear(r);
}
END_TEST

/* one-ebit limit 1 - 2^-(a+1) for -1 < a <= 0 (f = x^a up to slowly varying factors); for a = 0
 * (maximally entangled state) the error is 1/2 for every n; for a > 0 the limit of the
 * increasing profile. */
START_TEST(test_limits)
{
    embz_asym_result_t r;
    arb_t ref;
    embz_asym_result_init(r);
    arb_init(ref);
    ck_assert_int_eq(analyse_text(r, "i^-0.5", 128), EMBZ_OK);
    ck_assert(r->limit_known);
    arb_sqrt_ui(ref, 2, 128);
    arb_inv(ref, ref, 128);
    arb_sub_ui(ref, ref, 1, 128);
    arb_neg(ref, ref);                       /* 1 - 1/sqrt 2 = 0.2928932... */
    ck_assert(arb_overlaps(ref, r->limit));
    ck_assert(arb_rel_accuracy_bits(r->limit) > 100);
    ck_assert_int_eq(analyse_text(r, "1", 128), EMBZ_OK);
    ck_assert(r->limit_known);
    arb_set_d(ref, 0.5);
    ck_assert(arb_equal(ref, r->limit));
    ck_assert_int_eq(analyse_text(r, "i^-2", 128), EMBZ_OK);
    ck_assert(!r->limit_known);                 /* depends on all weights, not on the tail */
    /* increasing weights: max_t (1 - t/2)^(a+1) - (1 - t)^(a+1) [derived, docs/analysis.md]:
     * 1/3 for a = 1 (at t = 2/3), (4/7)^1.5 - (1/7)^1.5 for a = 1/2 (at t = 6/7) */
    ck_assert_int_eq(analyse_text(r, "i", 128), EMBZ_OK);
    ck_assert(r->limit_known);
    arb_set_ui(ref, 1);
    arb_div_ui(ref, ref, 3, 128);
    ck_assert(arb_overlaps(ref, r->limit));
    ck_assert(arb_rel_accuracy_bits(r->limit) > 100);
    ck_assert_int_eq(analyse_text(r, "sqrt(i)", 128), EMBZ_OK);
    ck_assert(r->limit_known);
    {
        arb_t u;
        arb_init(u);
        arb_set_ui(ref, 4);
        arb_div_ui(ref, ref, 7, 128);
        arb_sqrt(u, ref, 128);
        arb_mul(ref, ref, u, 128);               /* (4/7)^1.5 */
        arb_set_ui(u, 1);
        arb_div_ui(u, u, 7, 128);
        arb_sqrt(u, u, 128);
        arb_div_ui(u, u, 7, 128);                /* (1/7)^1.5 */
        arb_sub(ref, ref, u, 128);
        arb_clear(u);
    }
    ck_assert(arb_overlaps(ref, r->limit));
    ck_assert(arb_rel_accuracy_bits(r->limit) > 100);
    arb_clear(ref);
    embz_asym_result_clear(r);
}
END_TEST

/* ------------------------------------------------------------------ exact cancellation */

START_TEST(test_cancellation)
{
    embz_asym_series_t s;
    embz_asym_series_init(s);

    /* (i+1)^2 - i^2 = 2x + 1 exactly: a finite expansion without remainder */
    expand_text(s, "(i+1)^2 - i^2", 6, 128);
    ck_assert_int_eq(s->kind, EMBZ_ASYM_SCALE);
    ck_assert_int_eq(s->len, 2);
    ck_assert(!s->has_rem);
    ck_assert(s->terms[0].exact && q_eq_str(s->terms[0].q, "2"));
    ck_assert(q_eq_str(s->terms[0].e + 0, "1"));
    ck_assert(s->terms[1].exact && q_eq_str(s->terms[1].q, "1"));
    ck_assert(q_eq_str(s->terms[1].e + 0, "0"));

    /* 1/i - 1/(i+1) = sum_{k>=2} (-1)^k x^-k */
    expand_text(s, "1/i - 1/(i+1)", 6, 128);
    ck_assert_int_eq(s->len, 5);
    for (slong k = 0; k < s->len; k++) {
        fmpq_t t;
        fmpq_init(t);
        fmpq_set_si(t, (k % 2) ? -1 : 1, 1);
        ck_assert(s->terms[k].exact && fmpq_equal(s->terms[k].q, t));
        fmpq_set_si(t, -2 - k, 1);
        ck_assert(fmpq_equal(s->terms[k].e + 0, t));
        fmpq_clear(t);
    }
    ck_assert(s->has_rem && q_eq_str(s->rem + 0, "-7"));

    /* log(i+1) - log(i) = log(1 + 1/x) = sum (-1)^(k+1) x^-k / k */
    expand_text(s, "log(i+1)-log(i)", 6, 128);
    ck_assert_int_eq(s->len, 5);
    for (slong k = 0; k < s->len; k++) {
        fmpq_t t;
        fmpq_init(t);
        fmpq_set_si(t, (k % 2) ? -1 : 1, k + 1);
        ck_assert(s->terms[k].exact && fmpq_equal(s->terms[k].q, t));
        fmpq_clear(t);
    }

    /* sqrt(i+1) - sqrt(i) = x^(1/2) ((1+1/x)^(1/2) - 1): coefficients binom(1/2, k) */
    expand_text(s, "sqrt(i+1)-sqrt(i)", 6, 128);
    ck_assert_int_eq(s->len, 5);
    ck_assert(q_eq_str(s->terms[0].q, "1/2") && q_eq_str(s->terms[0].e, "-1/2"));
    ck_assert(q_eq_str(s->terms[1].q, "-1/8") && q_eq_str(s->terms[1].e, "-3/2"));
    ck_assert(q_eq_str(s->terms[2].q, "1/16") && q_eq_str(s->terms[2].e, "-5/2"));
    ck_assert(q_eq_str(s->terms[3].q, "-5/128") && q_eq_str(s->terms[3].e, "-7/2"));

    /* exp(log(i)*a) = x^a exactly; e^(-log(i)) = 1/x; log(e) = 1 */
    expand_text(s, "exp(log(i)*3/2)", 6, 128);
    ck_assert(s->len == 1 && !s->has_rem && q_eq_str(s->terms[0].e, "3/2")
              && s->terms[0].exact && q_eq_str(s->terms[0].q, "1"));
    expand_text(s, "e^(-log(i))*log(e)", 6, 128);
    ck_assert(s->len == 1 && !s->has_rem && q_eq_str(s->terms[0].e, "-1")
              && s->terms[0].exact && q_eq_str(s->terms[0].q, "1"));

    /* (1+1/i)^i -> e - e/(2x) + 11e/(24x^2) - ... (classical) */
    expand_text(s, "(1+1/i)^i", 6, 128);
    {
        arb_t ref;
        arb_init(ref);
        arb_const_e(ref, 128);
        ck_assert(arb_overlaps(ref, &s->terms[0].c));
        arb_mul_2exp_si(ref, ref, -1);
        arb_neg(ref, ref);
        ck_assert(arb_overlaps(ref, &s->terms[1].c));
        arb_const_e(ref, 128);
        arb_mul_ui(ref, ref, 11, 128);
        arb_div_ui(ref, ref, 24, 128);
        ck_assert(arb_overlaps(ref, &s->terms[2].c));
        arb_clear(ref);
    }

    /* sin and cos at 0 with exact rational Taylor coefficients */
    expand_text(s, "i*sin(1/i) - 1", 6, 128);
    ck_assert(s->terms[0].exact && q_eq_str(s->terms[0].q, "-1/6") && q_eq_str(s->terms[0].e, "-2"));
    ck_assert(s->terms[1].exact && q_eq_str(s->terms[1].q, "1/120") && q_eq_str(s->terms[1].e, "-4"));
    expand_text(s, "cos(1/i) - 1 + 1/(2*i^2)", 6, 128);
    ck_assert(s->terms[0].exact && q_eq_str(s->terms[0].q, "1/24") && q_eq_str(s->terms[0].e, "-4"));
    embz_asym_series_clear(s);
}
END_TEST

/* Stirling series [DLMF 5.11.1]: lgamma(x+1) - x log x + x
 *   = (1/2) log x + (1/2) log(2 pi) + 1/(12 x) - 1/(360 x^3) + ... */
START_TEST(test_stirling)
{
    embz_asym_series_t s;
    arb_t ref;
    embz_asym_series_init(s);
    arb_init(ref);
    expand_text(s, "lgamma(i+1) - i*log(i) + i", 6, 128);
    ck_assert_int_eq(s->kind, EMBZ_ASYM_SCALE);
    ck_assert(s->len >= 4);
    ck_assert(q_eq_str(s->terms[0].e + 1, "1") && q_eq_str(s->terms[0].q, "1/2"));
    ck_assert(mono_is_one(s->terms[1].e));
    arb_const_pi(ref, 128);
    arb_mul_2exp_si(ref, ref, 1);
    arb_log(ref, ref, 128);
    arb_mul_2exp_si(ref, ref, -1);            /* log(2 pi)/2 = 0.9189385... */
    ck_assert(arb_overlaps(ref, &s->terms[1].c));
    ck_assert(arb_rel_accuracy_bits(&s->terms[1].c) > 100);
    ck_assert(q_eq_str(s->terms[2].e, "-1") && s->terms[2].exact && q_eq_str(s->terms[2].q, "1/12"));
    ck_assert(q_eq_str(s->terms[3].e, "-3") && s->terms[3].exact && q_eq_str(s->terms[3].q, "-1/360"));
    arb_clear(ref);
    embz_asym_series_clear(s);
}
END_TEST

/* ------------------------------------------------------------------ derivative, monotonicity */

START_TEST(test_monotone)
{
    static const struct { const char *f; int mono; const char *dc; const char *da, *db, *dcc; } M[] = {
        {"1/i", -1, "-1", "-2", "0", "0"},
        {"1/(i*log(i+1))", -1, "-1", "-2", "-1", "0"},          /* d/dx 1/(x L) = -1/(x^2 L) - ... */
        {"log(i)", 1, "1", "-1", "0", "0"},
        {"log(log(i+2))", 1, "1", "-1", "-1", "0"},             /* 1/(x log x) */
        {"(i+1)^2 - i^2", 1, "2", "0", "0", "0"},
        {"cos(1/i) - 1", 1, "1", "-3", "0", "0"},               /* -1/(2x^2) rises to 0 */
        {"exp(1/i)", -1, "-1", "-2", "0", "0"},
        {"i - 10*sqrt(i)", 1, "1", "0", "0", "0"},
        {"7", 0, NULL, NULL, NULL, NULL},
        {"i^-0.5*log(i+1)^3", -1, "-1/2", "-3/2", "3", "0"},
    };
    embz_asym_result_t r;
    embz_asym_result_init(r);
    for (size_t k = 0; k < sizeof(M) / sizeof(M[0]); k++) {
        ck_assert_int_eq(analyse_text(r, M[k].f, 128), EMBZ_OK);
        ck_assert_msg(r->monotone == M[k].mono, "%s: monotone %d", M[k].f, r->monotone);
        if (M[k].dc) {
            ck_assert_msg(q_eq_str(r->dexps + 0, M[k].da) && q_eq_str(r->dexps + 1, M[k].db)
                          && q_eq_str(r->dexps + 2, M[k].dcc), "%s: derivative exponents", M[k].f);
            fmpq_t q;
            arb_t x;
            fmpq_init(q); arb_init(x);
            fmpq_set_str(q, M[k].dc, 10);
            fmpq_canonicalise(q);
            arb_set_fmpq(x, q, 128);
            ck_assert_msg(arb_overlaps(x, r->dcoeff), "%s: derivative coefficient", M[k].f);
            fmpq_clear(q); arb_clear(x);
        }
    }
    embz_asym_result_clear(r);
}
END_TEST

/* ------------------------------------------------------------------ honest "unknown" */

START_TEST(test_unknown)
{
    static const char *U[] = {
        "sin(i)/i", "floor(i)/i", "cos(i)", "1/i + sin(i)/i^2",
        "i^pi",                      /* irrational exponent: outside the scale */
        "log(e*i) - log(i) - 1",     /* exactly 0, but only ball arithmetic sees it */
        "pi - pi",
        "log(log(log(log(i))))",     /* a fifth level */
        "exp(sqrt(log(i)))/i",       /* between all powers of log x and x^eps */
        "exp(-i)/exp(-2*i)",         /* fast / fast */
        "1/(i-i)",
        "1/i + exp(-i) - 1/i",       /* sign of the fast-decaying rest is not tracked */
    };
    embz_asym_result_t r;
    embz_asym_result_init(r);
    for (size_t k = 0; k < sizeof(U) / sizeof(U[0]); k++) {
        ck_assert_int_eq(analyse_text(r, U[k], 128), EMBZ_OK);
        ck_assert_msg(r->verdict == EMBZ_ASYM_VERDICT_UNKNOWN, "%s: verdict %s", U[k],
                      embz_asym_verdict_name(r->verdict));
        ck_assert_msg(r->why[0] != '\0', "%s: no reason given", U[k]);
        ck_assert_int_eq(r->rate, EMBZ_ASYM_RATE_NONE);
    }
    /* abs, min, max are exact once the order of the arguments is decided */
    ck_assert_int_eq(analyse_text(r, "abs(5 - i)/i^2", 128), EMBZ_OK);
    ck_assert(r->verdict == EMBZ_ASYM_VERDICT_EMBEZZLER && q_eq_str(r->exps, "-1"));
    ck_assert_int_eq(analyse_text(r, "max(1/i, 1/(i*log(i+1)))", 128), EMBZ_OK);
    ck_assert(r->verdict == EMBZ_ASYM_VERDICT_EMBEZZLER && q_eq_str(r->exps + 1, "0"));
    ck_assert_int_eq(analyse_text(r, "min(1/i, 1/(i*log(i+1)))", 128), EMBZ_OK);
    ck_assert(q_eq_str(r->exps + 1, "-1"));
    /* not weights */
    ck_assert_int_eq(analyse_text(r, "cos(1/i) - 1", 128), EMBZ_OK);
    ck_assert_int_eq(r->verdict, EMBZ_ASYM_VERDICT_NOT_WEIGHT);
    ck_assert_int_eq(r->sign, -1);
    ck_assert_int_eq(analyse_text(r, "i - i", 128), EMBZ_OK);
    ck_assert_int_eq(r->verdict, EMBZ_ASYM_VERDICT_NOT_WEIGHT);
    ck_assert(r->zero);
    embz_asym_result_clear(r);
}
END_TEST

START_TEST(test_unsupported)
{
    static const char *P[] = {"a"};
    embz_expr_t e;
    embz_err_t err;
    embz_asym_result_t r;
    fmpq_t v;
    embz_expr_init(e);
    embz_asym_result_init(r);
    fmpq_init(v);
    parse_ok(e, "i^(-1 + 1/log(n+1))");
    ck_assert_int_eq(embz_asym_analyse(r, e, 128, &err), EMBZ_ERR_UNSUPPORTED);
    ck_assert(strstr(err.text, "n") != NULL);
    ck_assert_int_eq(embz_expr_parse(e, "i^a", P, 1, &err), EMBZ_OK);
    ck_assert_int_eq(embz_asym_analyse(r, e, 128, &err), EMBZ_ERR_UNSUPPORTED);
    fmpq_set_si(v, -1, 1);
    embz_expr_bind(e, v);                  /* once bound it is fine */
    ck_assert_int_eq(embz_asym_analyse(r, e, 128, &err), EMBZ_OK);
    ck_assert_int_eq(r->verdict, EMBZ_ASYM_VERDICT_EMBEZZLER);
    embz_expr_clear(e);
    embz_expr_init(e);
    ck_assert_int_eq(embz_asym_analyse(r, e, 128, &err), EMBZ_ERR_INPUT);
    fmpq_clear(v);
    embz_expr_clear(e);
    embz_asym_result_clear(r);
}
END_TEST

/* ------------------------------------------------------------------ shipped families */

typedef struct { const char *name; const char *set; int verdict; int rate; const char *a, *b, *c; } fam_t;

static const fam_t FAMS[] = {
    {"inverse", NULL, EMB, EMBZ_ASYM_RATE_LOG, "-1", "0", "0"},
    {"invamp", NULL, EMB, EMBZ_ASYM_RATE_LOG, "-1", "0", "0"},
    {"iterlog", NULL, EMB, EMBZ_ASYM_RATE_LOGLOGLOG, "-1", "-1", "-1"},
    {"logpower", NULL, EMB, EMBZ_ASYM_RATE_LOG_POW, "-1", "-1/2", "0"},
    {"logpower", "b=1", EMB, EMBZ_ASYM_RATE_LOGLOG, "-1", "-1", "0"},
    {"logpower", "b=2", NOT, EMBZ_ASYM_RATE_POSITIVE_LIMIT, "-1", "-2", "0"},
    {"nearmiss", NULL, NOT, EMBZ_ASYM_RATE_POSITIVE_LIMIT, "-1", "-2", "0"},
    {"power", NULL, NOT, EMBZ_ASYM_RATE_POSITIVE_LIMIT, "-1/2", "0", "0"},
    {"power", "a=-1", EMB, EMBZ_ASYM_RATE_LOG, "-1", "0", "0"},
    {"power", "a=-2", NOT, EMBZ_ASYM_RATE_POSITIVE_LIMIT, "-2", "0", "0"},
    {"uniform", NULL, NOT, EMBZ_ASYM_RATE_POSITIVE_LIMIT, "0", "0", "0"},
    {"geometric", NULL, NOT, EMBZ_ASYM_RATE_POSITIVE_LIMIT, NULL, NULL, NULL},
};

START_TEST(test_families)
{
    const fam_t *w = FAMS + _i;
    embz_family_t f;
    embz_err_t err;
    embz_setting_t set;
    char buf[64];
    embz_asym_result_t r;
    embz_family_init(f);
    embz_asym_result_init(r);
    if (w->set) {
        strcpy(buf, w->set);
        ck_assert_int_eq(embz_setting_split(&set, buf, &err), EMBZ_OK);
    }
    ck_assert_msg(embz_family_resolve(f, w->name, &set, w->set ? 1 : 0, 0, &err) == EMBZ_OK,
                  "%s: %s", w->name, err.text);
    ck_assert_int_eq(embz_asym_analyse(r, f->weight, 128, &err), EMBZ_OK);
    ck_assert_msg(r->verdict == w->verdict, "%s %s: %s (%s)", w->name, w->set ? w->set : "",
                  embz_asym_verdict_name(r->verdict), r->why);
    ck_assert_int_eq(r->rate, w->rate);
    if (w->a) {
        ck_assert(q_eq_str(r->exps + 0, w->a) && q_eq_str(r->exps + 1, w->b)
                  && q_eq_str(r->exps + 2, w->c));
    } else {
        ck_assert_int_eq(r->kind, EMBZ_ASYM_FAST_DECAY);
    }
    embz_asym_result_clear(r);
    embz_family_clear(f);
}
END_TEST

START_TEST(test_family_n)
{
    embz_family_t f;
    embz_err_t err;
    embz_asym_result_t r;
    embz_family_init(f);
    embz_asym_result_init(r);
    ck_assert_int_eq(embz_family_resolve(f, "tilted", NULL, 0, 0, &err), EMBZ_OK);
    ck_assert_int_eq(embz_asym_analyse(r, f->weight, 128, &err), EMBZ_ERR_UNSUPPORTED);
    embz_asym_result_clear(r);
    embz_family_clear(f);
}
END_TEST

/* ------------------------------------------------------------------ text */

START_TEST(test_text)
{
    fmpq e[4];
    char buf[128];
    embz_asym_result_t r;
    for (int k = 0; k < 4; k++) fmpq_init(e + k);
    mono_set_str(e, "-1", "-2", "0", "0");
    embz_asym_mono_str(buf, sizeof(buf), e);
    ck_assert_str_eq(buf, "x^-1 (log x)^-2");
    mono_set_str(e, "1/2", "0", "1", "0");
    embz_asym_mono_str(buf, sizeof(buf), e);
    ck_assert_str_eq(buf, "x^(1/2) log log x");
    mono_set_str(e, "0", "0", "0", "-3/2");
    embz_asym_mono_str(buf, sizeof(buf), e);
    ck_assert_str_eq(buf, "(log log log x)^(-3/2)");
    mono_set_str(e, "0", "0", "0", "0");
    embz_asym_mono_str(buf, sizeof(buf), e);
    ck_assert_str_eq(buf, "1");
    mono_set_str(e, "-1", "-2", "0", "0");
    embz_asym_mono_str(buf, 6, e);                 /* truncated, terminated */
    ck_assert_str_eq(buf, "x^-1 ");
    embz_asym_result_init(r);
    ck_assert_int_eq(analyse_text(r, "1/(i*log(i+1)^2)", 128), EMBZ_OK);
    embz_asym_leading_str(buf, sizeof(buf), r);
    ck_assert_str_eq(buf, "x^-1 (log x)^-2");
    ck_assert_int_eq(analyse_text(r, "0.9^i", 128), EMBZ_OK);
    embz_asym_leading_str(buf, sizeof(buf), r);
    ck_assert_str_eq(buf, "decays faster than any power");
    ck_assert_int_eq(analyse_text(r, "sin(i)", 128), EMBZ_OK);
    embz_asym_leading_str(buf, sizeof(buf), r);
    ck_assert_str_eq(buf, "unknown");
    embz_asym_result_clear(r);
    for (int k = 0; k < 4; k++) fmpq_clear(e + k);
}
END_TEST

/* ------------------------------------------------------------------ random expressions */

typedef struct {
    char text[1024];
    fmpq e[4];       /* exponents of the main term, tracked independently of the engine */
} gen_t;

static const char *PX[] = {"-2", "-3/2", "-1", "-1/2", "1/2", "1", "2"};
static const char *PL[] = {"-2", "-1", "-1/2", "1/2", "1", "3"};
static const char *PLL[] = {"-2", "-1", "-1/2", "1/2", "1"};

static void gen_add_exp(gen_t *g, int level, const char *p)
{
    fmpq_t q;
    fmpq_init(q);
    fmpq_set_str(q, p, 10);
    fmpq_canonicalise(q);
    fmpq_add(g->e + level, g->e + level, q);
    fmpq_clear(q);
}

static void gen_expr(gen_t *g, flint_rand_t st)
{
    char main[512], piece[128];
    int nf = 1 + (int) n_randint(st, 3);
    for (int k = 0; k < 4; k++) fmpq_zero(g->e + k);
    snprintf(main, sizeof(main), "%d", 1 + (int) n_randint(st, 5));
    for (int k = 0; k < nf; k++) {
        int kind = (int) n_randint(st, 3);
        const char *p;
        if (kind == 0) {
            p = PX[n_randint(st, 7)];
            snprintf(piece, sizeof(piece), "*(i+%d)^(%s)", (int) n_randint(st, 4), p);
        } else if (kind == 1) {
            p = PL[n_randint(st, 6)];
            snprintf(piece, sizeof(piece), "*log(i+%d)^(%s)", 1 + (int) n_randint(st, 3), p);
        } else {
            p = PLL[n_randint(st, 5)];
            snprintf(piece, sizeof(piece), "*log(log(i+%d))^(%s)", 2 + (int) n_randint(st, 3), p);
        }
        gen_add_exp(g, kind, p);
        strncat(main, piece, sizeof(main) - strlen(main) - 1);
    }
    switch (n_randint(st, 4)) {
    case 0: snprintf(g->text, sizeof(g->text), "%s", main); break;
    case 1: snprintf(g->text, sizeof(g->text), "%s*(1 + 3/log(i+2))", main); break;
    case 2: snprintf(g->text, sizeof(g->text), "%s*(1 - log(log(i+3))/log(i+1))", main); break;
    default: snprintf(g->text, sizeof(g->text), "(%s)/(1 + 1/sqrt(i)) + pi*i^-3", main); break;
    }
}

/* |f(x) / m(x) - C| at x = 10^digits */
static void ratio_dist(arb_t d, const embz_expr_t e, const embz_asym_result_t r, slong digits,
                       slong prec)
{
    arb_t x, f, m, c;
    arb_init(x); arb_init(f); arb_init(m); arb_init(c);
    arb_ui_pow_ui(x, 10, digits, prec);
    ck_assert_int_eq(embz_expr_eval_arb(f, e, x, x, prec), EMBZ_OK);
    ck_assert_int_eq(embz_asym_mono_eval(m, r->exps, x, prec), EMBZ_OK);
    arb_div(f, f, m, prec);
    arb_sub(d, f, r->coeff, prec);
    arb_abs(d, d);
    arb_clear(x); arb_clear(f); arb_clear(m); arb_clear(c);
}

START_TEST(test_random_numeric)
{
    flint_rand_t st;
    gen_t g;
    embz_asym_result_t r;
    embz_asym_series_t s;
    embz_expr_t e;
    embz_err_t err;
    arb_t d50, d100, x, f, v, m, t;
    slong prec = 320;
    flint_randinit(st);
    for (int k = 0; k < 4; k++) fmpq_init(g.e + k);
    embz_asym_result_init(r);
    embz_asym_series_init(s);
    embz_expr_init(e);
    arb_init(d50); arb_init(d100); arb_init(x); arb_init(f); arb_init(v); arb_init(m); arb_init(t);
    for (int iter = 0; iter < 150; iter++) {
        gen_expr(&g, st);
        parse_ok(e, g.text);
        ck_assert_int_eq(embz_asym_analyse(r, e, 128, &err), EMBZ_OK);
        ck_assert_msg(r->kind == EMBZ_ASYM_SCALE && r->sign == 1, "%s: %s", g.text, r->why);
        /* the last variant adds pi x^-3, which leads when the main term is smaller */
        if (fmpq_cmp_si(g.e + 0, -3) > 0 || strstr(g.text, "pi*") == NULL) {
            ck_assert_msg(fmpq_equal(r->exps + 0, g.e + 0) && fmpq_equal(r->exps + 1, g.e + 1)
                          && fmpq_equal(r->exps + 2, g.e + 2) && fmpq_is_zero(r->exps + 3),
                          "%s: exponents differ from the construction", g.text);
        }
        /* leading coefficient: f(x) / m(x) -> C, closer at 10^100 than at 10^50 */
        ratio_dist(d50, e, r, 50, prec);
        ratio_dist(d100, e, r, 100, prec);
        arb_abs(t, r->coeff);
        arb_mul_2exp_si(t, t, -2);
        ck_assert_msg(arb_lt(d100, t), "%s: f/m far from C at 1e100", g.text);
        arb_mul_ui(t, d50, 1001, prec);
        arb_div_ui(t, t, 1000, prec);
        arb_mul_2exp_si(v, r->coeff, -200);
        arb_abs(v, v);
        arb_add(t, t, v, prec);
        ck_assert_msg(arb_le(d100, t), "%s: no convergence towards C", g.text);
        /* the full expansion is at least as close as its leading term */
        ck_assert_int_eq(embz_asym_expand(s, e, 6, 256, &err), EMBZ_OK);
        arb_ui_pow_ui(x, 10, 100, prec);
        embz_expr_eval_arb(f, e, x, x, prec);
        ck_assert_int_eq(embz_asym_series_eval(v, s, x, prec), EMBZ_OK);
        embz_asym_mono_eval(m, r->exps, x, prec);
        arb_sub(v, f, v, prec);
        arb_div(v, v, m, prec);
        arb_abs(v, v);
        arb_mul_ui(t, d100, 1001, prec);
        arb_div_ui(t, t, 1000, prec);
        arb_mul_2exp_si(f, r->coeff, -200);
        arb_abs(f, f);
        arb_add(t, t, f, prec);
        ck_assert_msg(arb_le(v, t), "%s: full expansion worse than its leading term", g.text);
        /* derivative: the Taylor-mode evaluator at 10^100 against the derivative's leading term */
        if (r->monotone != 0 && r->dkind == EMBZ_ASYM_SCALE) {
            arb_struct xs[2], fs[2];
            arb_init(xs + 0); arb_init(xs + 1); arb_init(fs + 0); arb_init(fs + 1);
            arb_set(xs + 0, x);
            arb_one(xs + 1);
            ck_assert_int_eq(embz_expr_eval_series(fs, e, xs, x, 2, prec), EMBZ_OK);
            embz_asym_mono_eval(m, r->dexps, x, prec);
            arb_div(v, fs + 1, m, prec);
            arb_sub(v, v, r->dcoeff, prec);
            arb_abs(v, v);
            arb_abs(t, r->dcoeff);
            arb_mul_2exp_si(t, t, -1);
            ck_assert_msg(arb_lt(v, t), "%s: derivative's leading term does not match", g.text);
            ck_assert_int_eq(arb_is_positive(fs + 1) ? 1 : -1, r->monotone);
            arb_clear(xs + 0); arb_clear(xs + 1); arb_clear(fs + 0); arb_clear(fs + 1);
        }
    }
    arb_clear(d50); arb_clear(d100); arb_clear(x); arb_clear(f); arb_clear(v); arb_clear(m); arb_clear(t);
    embz_expr_clear(e);
    embz_asym_series_clear(s);
    embz_asym_result_clear(r);
    for (int k = 0; k < 4; k++) fmpq_clear(g.e + k);
    flint_randclear(st);
}
END_TEST

/* two working precisions give the same exponents and overlapping coefficients */
START_TEST(test_random_precisions)
{
    flint_rand_t st;
    gen_t g;
    embz_asym_result_t r1, r2;
    flint_randinit(st);
    n_randint(st, 2);   /* a different stream from the numeric test */
    for (int k = 0; k < 4; k++) fmpq_init(g.e + k);
    embz_asym_result_init(r1);
    embz_asym_result_init(r2);
    for (int iter = 0; iter < 100; iter++) {
        gen_expr(&g, st);
        ck_assert_int_eq(analyse_text(r1, g.text, 64), EMBZ_OK);
        ck_assert_int_eq(analyse_text(r2, g.text, 300), EMBZ_OK);
        ck_assert_int_eq(r1->kind, r2->kind);
        ck_assert_int_eq(r1->verdict, r2->verdict);
        for (int k = 0; k < 4; k++) ck_assert(fmpq_equal(r1->exps + k, r2->exps + k));
        ck_assert(arb_overlaps(r1->coeff, r2->coeff));
        ck_assert(arb_rel_accuracy_bits(r2->coeff) >= arb_rel_accuracy_bits(r1->coeff));
        ck_assert_int_eq(r1->monotone, r2->monotone);
    }
    embz_asym_result_clear(r1);
    embz_asym_result_clear(r2);
    for (int k = 0; k < 4; k++) fmpq_clear(g.e + k);
    flint_randclear(st);
}
END_TEST

static Suite *asym_suite(void)
{
    Suite *s = suite_create("asym");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 120);
    tcase_add_loop_test(tc, test_table, 0, sizeof(ROWS) / sizeof(ROWS[0]));
    tcase_add_test(tc, test_limits);
    tcase_add_test(tc, test_cancellation);
    tcase_add_test(tc, test_stirling);
    tcase_add_test(tc, test_monotone);
    tcase_add_test(tc, test_unknown);
    tcase_add_test(tc, test_unsupported);
    tcase_add_loop_test(tc, test_families, 0, sizeof(FAMS) / sizeof(FAMS[0]));
    tcase_add_test(tc, test_family_n);
    tcase_add_test(tc, test_text);
    tcase_add_test(tc, test_random_numeric);
    tcase_add_test(tc, test_random_precisions);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    return tu_run_suite(asym_suite());
}
