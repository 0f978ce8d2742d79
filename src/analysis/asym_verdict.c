/* From the leading term of f to the verdict "universal embezzler or not" (docs/asymptotics.md). */
#include <string.h>
#include "asym_impl.h"

#define L EMBZ_ASYM_LEVELS

void embz_asym_result_init(embz_asym_result_t r)
{
    memset(r, 0, sizeof(*r));
    arb_init(r->coeff);
    fmpq_init(r->coeff_q);
    for (int k = 0; k < L; k++) { fmpq_init(r->exps + k); fmpq_init(r->dexps + k); }
    arb_init(r->dcoeff);
    arb_init(r->limit);
    fmpq_init(r->rate_exp);
    r->kind = EMBZ_ASYM_UNKNOWN;
    r->monotone = 2;
    r->sum_diverges = -1;
}

void embz_asym_result_clear(embz_asym_result_t r)
{
    arb_clear(r->coeff);
    fmpq_clear(r->coeff_q);
    for (int k = 0; k < L; k++) { fmpq_clear(r->exps + k); fmpq_clear(r->dexps + k); }
    arb_clear(r->dcoeff);
    arb_clear(r->limit);
    fmpq_clear(r->rate_exp);
}

static void result_reset(embz_asym_result_struct *r)
{
    r->kind = EMBZ_ASYM_UNKNOWN;
    r->zero = 0;
    r->sign = 0;
    arb_indeterminate(r->coeff);
    r->coeff_exact = 0;
    fmpq_zero(r->coeff_q);
    for (int k = 0; k < L; k++) { fmpq_zero(r->exps + k); fmpq_zero(r->dexps + k); }
    r->monotone = 2;
    r->dkind = EMBZ_ASYM_UNKNOWN;
    arb_indeterminate(r->dcoeff);
    r->sum_diverges = -1;
    r->verdict = EMBZ_ASYM_VERDICT_UNKNOWN;
    r->limit_known = 0;
    arb_indeterminate(r->limit);
    r->rate = EMBZ_ASYM_RATE_NONE;
    fmpq_one(r->rate_exp);
    r->rate_text[0] = '\0';
    r->why[0] = '\0';
    r->nterms = r->prec = 0;
}

const char *embz_asym_verdict_name(int verdict)
{
    switch (verdict) {
    case EMBZ_ASYM_VERDICT_EMBEZZLER: return "embezzler";
    case EMBZ_ASYM_VERDICT_NOT_EMBEZZLER: return "not an embezzler";
    case EMBZ_ASYM_VERDICT_NOT_WEIGHT: return "not a weight";
    default: return "unknown";
    }
}

void embz_asym_leading_str(char *buf, size_t len, const embz_asym_result_t r)
{
    if (len == 0) return;
    if (r->kind == EMBZ_ASYM_FAST_DECAY) snprintf(buf, len, "decays faster than any power");
    else if (r->kind == EMBZ_ASYM_FAST_GROWTH) snprintf(buf, len, "grows faster than any power");
    else if (r->kind == EMBZ_ASYM_UNKNOWN) snprintf(buf, len, "unknown");
    else if (r->zero) snprintf(buf, len, "0");
    else embz_asym_mono_str(buf, len, r->exps);
}

static void qstr(char *buf, size_t len, const fmpq_t q)
{
    char *s = fmpq_get_str(NULL, 10, q);
    snprintf(buf, len, "%s", s);
    flint_free(s);
}

/* Rate class and divergence for a == -1 (the borderline power). Divergence of sum f for
 * f ~ x^-1 (log x)^b (log log x)^c (log log log x)^d follows the classical Bertrand series
 * (integral test, or Cauchy condensation applied repeatedly): it diverges iff
 * (b, c, d) >= (-1, -1, -1) lexicographically. */
static void borderline(embz_asym_result_struct *r)
{
    const fmpq *b = r->exps + 1, *c = r->exps + 2, *d = r->exps + 3;
    char s1[64];
    fmpq_t px;
    int cb = fmpq_cmp_si(b, -1), cc = fmpq_cmp_si(c, -1), cd = fmpq_cmp_si(d, -1);
    int diverges = cb > 0 || (cb == 0 && (cc > 0 || (cc == 0 && cd >= 0)));
    r->sum_diverges = diverges;
    if (!diverges) {
        r->verdict = EMBZ_ASYM_VERDICT_NOT_EMBEZZLER;
        r->rate = EMBZ_ASYM_RATE_POSITIVE_LIMIT;
        snprintf(r->rate_text, sizeof(r->rate_text), "positive limit (summable weights)");
        snprintf(r->why, sizeof(r->why),
                 "f ~ x^-1 with log factors that make the sum converge (Bertrand series)");
        return;
    }
    r->verdict = EMBZ_ASYM_VERDICT_EMBEZZLER;
    fmpq_init(px);
    if (cb > 0 && fmpq_sgn(b) > 0) {
        r->rate = EMBZ_ASYM_RATE_LOG_B;
        fmpq_one(r->rate_exp);
        {
            fmpq_t bp;
            fmpq_init(bp);
            fmpq_add_si(bp, b, 1);
            qstr(s1, sizeof(s1), bp);
            snprintf(r->rate_text, sizeof(r->rate_text), "(k+1) ln 2 / ln n, k+1 = %s (k: the power of ln x in f)", s1);
            fmpq_clear(bp);
        }
    } else if (fmpq_is_zero(b)) {
        r->rate = EMBZ_ASYM_RATE_LOG;
        fmpq_one(r->rate_exp);
        snprintf(r->rate_text, sizeof(r->rate_text), "C / ln n");
    } else if (cb > 0) {
        r->rate = EMBZ_ASYM_RATE_LOG_POW;
        fmpq_add_si(px, b, 1);
        fmpq_set(r->rate_exp, px);
        qstr(s1, sizeof(s1), px);
        snprintf(r->rate_text, sizeof(r->rate_text), "C / (ln n)^p, p = 1 + (the power of ln x in f) = %s", s1);
    } else if (cc > 0) {
        r->rate = EMBZ_ASYM_RATE_LOGLOG;
        fmpq_add_si(px, c, 1);
        fmpq_set(r->rate_exp, px);
        if (fmpq_is_one(r->rate_exp)) {
            snprintf(r->rate_text, sizeof(r->rate_text), "C / ln ln n");
        } else {
            qstr(s1, sizeof(s1), px);
            snprintf(r->rate_text, sizeof(r->rate_text), "C / (ln ln n)^p, p = 1 + (the power of ln ln x in f) = %s", s1);
        }
    } else {
        r->rate = EMBZ_ASYM_RATE_LOGLOGLOG;
        fmpq_add_si(px, d, 1);
        fmpq_set(r->rate_exp, px);
        if (fmpq_is_zero(r->rate_exp)) {
            snprintf(r->rate_text, sizeof(r->rate_text),
                     "slower than any power of 1 / ln ln ln n (sum grows like ln ln ln ln n)");
        } else if (fmpq_is_one(r->rate_exp)) {
            snprintf(r->rate_text, sizeof(r->rate_text), "C / ln ln ln n");
        } else {
            qstr(s1, sizeof(s1), px);
            snprintf(r->rate_text, sizeof(r->rate_text), "C / (ln ln ln n)^p, p = 1 + (the power of ln ln ln x in f) = %s", s1);
        }
    }
    fmpq_clear(px);
    snprintf(r->why, sizeof(r->why),
             "f ~ x^-1 up to log factors and the sum of f diverges (Bertrand series)");
}

static void classify(embz_asym_result_struct *r, const aser_t *s, const aser_t *d, slong prec)
{
    r->kind = s->kind;
    if (s->kind == EMBZ_ASYM_UNKNOWN) {
        snprintf(r->why, sizeof(r->why), "%s", s->why);
        return;
    }
    /* derivative */
    r->dkind = d->kind;
    if (d->kind == EMBZ_ASYM_SCALE && embz_asym_series_decided(d)) {
        if (d->len == 0) {
            r->monotone = 0;
            arb_zero(r->dcoeff);
        } else {
            int sg = _embz_asym_coef_sign(d->terms);
            r->monotone = sg;
            if (d->terms[0].exact) arb_set_fmpq(r->dcoeff, d->terms[0].q, prec);
            else arb_set(r->dcoeff, &d->terms[0].c);
            _embz_asym_mono_set(r->dexps, d->terms[0].e);
        }
    } else if (d->kind == EMBZ_ASYM_FAST_DECAY || d->kind == EMBZ_ASYM_FAST_GROWTH) {
        r->monotone = d->sign == 0 ? 2 : d->sign;
    }

    if (s->kind == EMBZ_ASYM_FAST_DECAY || s->kind == EMBZ_ASYM_FAST_GROWTH) {
        int growth = s->kind == EMBZ_ASYM_FAST_GROWTH;
        r->sign = s->sign;
        if (s->sign < 0) {
            r->verdict = EMBZ_ASYM_VERDICT_NOT_WEIGHT;
            snprintf(r->why, sizeof(r->why), "f is eventually negative");
            return;
        }
        if (s->sign == 0) {
            snprintf(r->why, sizeof(r->why), "%s, but the sign of f is undecided",
                     growth ? "|f| grows faster than any power" : "f decays faster than any power");
            return;
        }
        r->sum_diverges = growth;
        r->verdict = EMBZ_ASYM_VERDICT_NOT_EMBEZZLER;
        r->rate = EMBZ_ASYM_RATE_POSITIVE_LIMIT;
        snprintf(r->rate_text, sizeof(r->rate_text), "positive limit");
        snprintf(r->why, sizeof(r->why), growth
                 ? "f grows faster than any power: it is not within x^(-1 +- eps) [derived]"
                 : "f decays faster than any power: the sum of f converges");
        return;
    }
    /* SCALE, decided */
    if (s->len == 0) {
        r->zero = 1;
        r->verdict = EMBZ_ASYM_VERDICT_NOT_WEIGHT;
        snprintf(r->why, sizeof(r->why), "f is eventually 0");
        return;
    }
    {
        const aterm_t *t = s->terms;
        int sg = _embz_asym_coef_sign(t);
        const fmpq *a = t->e;
        r->sign = sg;
        r->coeff_exact = t->exact;
        if (t->exact) { fmpq_set(r->coeff_q, t->q); arb_set_fmpq(r->coeff, t->q, prec); }
        else arb_set(r->coeff, &t->c);
        _embz_asym_mono_set(r->exps, t->e);
        if (sg < 0) {
            r->verdict = EMBZ_ASYM_VERDICT_NOT_WEIGHT;
            snprintf(r->why, sizeof(r->why), "f is eventually negative");
            return;
        }
        if (fmpq_cmp_si(a, -1) > 0) {
            /* a > -1: the sum diverges, but f is not below x^(-1+eps) */
            r->sum_diverges = 1;
            r->verdict = EMBZ_ASYM_VERDICT_NOT_EMBEZZLER;
            r->rate = EMBZ_ASYM_RATE_POSITIVE_LIMIT;
            if (fmpq_sgn(a) <= 0) {
                /* one-ebit limit 1 - 2^-(a+1) [derived] */
                arb_t x;
                fmpq_t ap;
                arb_init(x); fmpq_init(ap);
                fmpq_add_si(ap, a, 1);
                fmpq_neg(ap, ap);
                arb_set_fmpq(x, ap, prec);
                arb_set_ui(r->limit, 2);
                arb_pow(r->limit, r->limit, x, prec);
                arb_sub_ui(r->limit, r->limit, 1, prec);
                arb_neg(r->limit, r->limit);
                r->limit_known = 1;
                arb_clear(x); fmpq_clear(ap);
                snprintf(r->rate_text, sizeof(r->rate_text),
                         "positive limit 1 - 2^-(a+1) [derived]");
            } else {
                /* increasing weights [derived]: the sorted profile is (a+1)(1-t)^a, so
                 * E -> max_t (1 - t/2)^(a+1) - (1 - t)^(a+1), attained where
                 * (1 - t)/(1 - t/2) = r = 2^(-1/a): (1 - r^(a+1)) / (2 - r)^(a+1) */
                arb_t x, rr, b, num;
                arb_init(x); arb_init(rr); arb_init(b); arb_init(num);
                arb_set_fmpq(x, a, prec);
                arb_inv(rr, x, prec);
                arb_neg(rr, rr);
                arb_set_ui(num, 2);
                arb_pow(rr, num, rr, prec);              /* r = 2^(-1/a) */
                arb_add_ui(b, x, 1, prec);               /* a + 1 */
                arb_pow(num, rr, b, prec);
                arb_sub_ui(num, num, 1, prec);
                arb_neg(num, num);                       /* 1 - r^(a+1) */
                arb_sub_ui(x, rr, 2, prec);
                arb_neg(x, x);                           /* 2 - r */
                arb_pow(x, x, b, prec);
                arb_div(r->limit, num, x, prec);
                r->limit_known = 1;
                arb_clear(x); arb_clear(rr); arb_clear(b); arb_clear(num);
                snprintf(r->rate_text, sizeof(r->rate_text),
                         "positive limit (1 - r^(a+1)) / (2 - r)^(a+1), r = 2^(-1/a) "
                         "[derived]");
            }
            snprintf(r->why, sizeof(r->why), "f ~ x^a with a > -1: f is not below x^(-1+eps)");
        } else if (fmpq_cmp_si(a, -1) < 0) {
            r->sum_diverges = 0;
            r->verdict = EMBZ_ASYM_VERDICT_NOT_EMBEZZLER;
            r->rate = EMBZ_ASYM_RATE_POSITIVE_LIMIT;
            snprintf(r->rate_text, sizeof(r->rate_text), "positive limit (summable weights)");
            snprintf(r->why, sizeof(r->why), "f ~ x^a with a < -1: the sum of f converges");
        } else {
            borderline(r);
        }
    }
}

int embz_asym_analyse(embz_asym_result_t r, const embz_expr_t e, slong prec, embz_err_t *err)
{
    static const slong kterms[] = {6, 12, 24};
    aser_t s, d;
    int st = EMBZ_OK;
    result_reset(r);
    if (prec < 64) prec = 64;
    embz_asym_series_init(&s);
    embz_asym_series_init(&d);
    for (int att = 0; att < 3; att++) {
        slong K = kterms[att], p = prec << att;
        st = embz_asym_expand(&s, e, K, p, err);
        if (st != EMBZ_OK) break;
        embz_asym_series_derivative(&d, &s, K, p);
        r->nterms = K;
        r->prec = p;
        if (s.kind == EMBZ_ASYM_FAST_DECAY || s.kind == EMBZ_ASYM_FAST_GROWTH) {
            if (s.sign != 0) break;
        } else if (embz_asym_series_decided(&s) && embz_asym_series_decided(&d)) {
            break;
        }
    }
    if (st == EMBZ_OK) {
        if (s.kind == EMBZ_ASYM_SCALE && !embz_asym_series_decided(&s)) {
            char *txt = embz_asym_series_to_string(&s, 10);
            _embz_asym_unknown(&s, "leading term undetermined (%s)", txt);
            flint_free(txt);
        }
        classify(r, &s, &d, r->prec);
    }
    embz_asym_series_clear(&s);
    embz_asym_series_clear(&d);
    return st;
}
