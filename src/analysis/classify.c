/* The embezzler verdict: a numeric route (sweep + fitted laws, every family) and an analytic
 * route (asymptotic expansion of the weight, exp-log weights without n). */
#include <stdlib.h>
#include <string.h>
#include <stdarg.h>
#include <stdio.h>
#include <math.h>
#include "embz/analysis.h"
#include "embz/util.h"

/* ANALYTIC ROUTE HOOK: set to 0 to build the numeric route alone (without the asymptotic
 * engine of include/embz/asym.h and src/analysis/asym*.c). */
#define EMBZ_CLASSIFY_WITH_ASYM 1
#if EMBZ_CLASSIFY_WITH_ASYM
#include "embz/asym.h"
#endif

/* Decision constants of the numeric route (estimates; see docs/analysis.md). */
#define G_MIN 0.03          /* smallest fitted decay exponent counted as visible decay */
#define FLAT_REL 1e-9       /* relative spread of E over the fit range counted as "flat" */
#define LIMIT_NEAR 0.5      /* a fitted limit L counts as reached when L_lo > LIMIT_NEAR E_N */
#define LIMIT_SMALL 0.1     /* a fitted limit below LIMIT_SMALL E_N counts as 0 */
#define G_SLOW 0.75         /* slowest resolved approach (ln n)^-g to a positive limit */

const char *embz_verdict_id(int v)
{
    return v == EMBZ_VERDICT_EMBEZZLER ? "embezzler"
         : v == EMBZ_VERDICT_NOT_EMBEZZLER ? "not_embezzler" : "inconclusive";
}

void embz_classify_opts_init(embz_classify_opts_t o)
{
    fmpz_init(o->from);
    fmpz_init(o->to);
    fmpz_set_ui(o->from, 100);
    fmpz_ui_pow_ui(o->to, 10, 120);
    o->points = 16;
    o->prec = 64;
    o->use_analytic = 1;
}

void embz_classify_opts_clear(embz_classify_opts_t o)
{
    fmpz_clear(o->from);
    fmpz_clear(o->to);
}

void embz_classify_init(embz_classify_t c)
{
    memset(c, 0, sizeof(*c));
    embz_sweep_init(c->sweep);
    embz_fitset_init(c->fits);
    c->limit_lo = c->limit_hi = c->limit_value = NAN;
    c->exponent = c->exponent_lo = c->exponent_hi = NAN;
    c->coeff = NAN;
}

void embz_classify_clear(embz_classify_t c)
{
    for (slong k = 0; k < c->nreasons; k++) free(c->reasons[k]);
    embz_sweep_clear(c->sweep);
    embz_fitset_clear(c->fits);
    memset(c, 0, sizeof(*c));
}

static void reason(embz_classify_t c, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;
static void reason(embz_classify_t c, const char *fmt, ...)
{
    if (c->nreasons >= EMBZ_CLASSIFY_MAX_REASONS) return;
    char buf[600];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(buf, sizeof(buf), fmt, ap);
    va_end(ap);
    size_t l = strlen(buf) + 1;
    c->reasons[c->nreasons] = malloc(l);
    memcpy(c->reasons[c->nreasons], buf, l);
    c->nreasons++;
}

static void set_law(embz_classify_t c, const embz_fit_struct *F)
{
    c->law = F->law;
    c->exponent = F->g;
    c->exponent_lo = F->g_lo;
    c->exponent_hi = F->g_hi;
    c->coeff = F->C;
}

/* ---- numeric route ---- */
static int numeric_route(embz_classify_t c, const embz_family_t f, const embz_classify_opts_t o,
                         embz_progress_fn progress, void *ctx, embz_err_t *err)
{
    embz_target_t q;
    embz_target_init(q);
    int st = embz_sweep_run(c->sweep, f, o->from, o->to, o->points, q, o->prec, progress, ctx,
                            err);
    embz_target_clear(q);
    c->numeric_verdict = EMBZ_VERDICT_INCONCLUSIVE;
    if (st != EMBZ_OK) return st;

    /* the largest size computed: a certified statement */
    const embz_sweep_point_struct *last = NULL;
    for (slong j = c->sweep->len - 1; j >= 0 && last == NULL; j--)
        if (c->sweep->pts[j].status == EMBZ_OK) last = c->sweep->pts + j;
    char *Nstr = embz_fmpz_string(last->n, 12);
    char *elo = embz_arb_lo_string(last->error, 8);
    char *ehi = embz_arb_hi_string(last->error, 8);
    double Elast = arf_get_d(arb_midref(last->error), ARF_RND_NEAR);
    double Ehi = atof(ehi), Elo = atof(elo);
    reason(c, "certified: %s <= E_n <= %s at the largest size n = %s%s", elo, ehi, Nstr,
           fmpz_sizeinbase(last->n, 10) > 12 ? " (n shortened)" : "");
    if (c->sweep->nok < c->sweep->len)
        reason(c, "%ld of %ld sizes could not be computed and were left out",
               (long) (c->sweep->len - c->sweep->nok), (long) c->sweep->len);

    embz_err_t e2;
    embz_err_clear(&e2);
    if (embz_fit_sweep(c->fits, c->sweep, &e2) != EMBZ_OK) {
        reason(c, "no fit: %s", e2.text);
        c->limit_lo = 0;
        c->limit_hi = Ehi;
        goto done;
    }
    {
        const embz_fitset_struct *fs = c->fits;
        slong m = fs->m;
        double emin = INFINITY, emax = -INFINITY;
        for (slong j = 0; j < m; j++) {
            if (fs->E[j] < emin) emin = fs->E[j];
            if (fs->E[j] > emax) emax = fs->E[j];
        }
        double spread = (emax - emin) / Elast;
        const embz_fit_struct *best = fs->best ? fs->fits + fs->best : NULL;
        const embz_fit_struct *pl = fs->fits + EMBZ_LAW_POWER_LIMIT;
        /* best zero-limit law */
        const embz_fit_struct *zl = NULL;
        for (int law = EMBZ_LAW_LOG; law <= EMBZ_LAW_LOGLOG; law++)
            if (fs->fits[law].ok && (zl == NULL || fs->fits[law].bic < zl->bic))
                zl = fs->fits + law;
        reason(c, "fits use the %ld largest sizes, ln n from %.4g to %.4g (estimates, "
               "not certified)", (long) m, fs->logn[0], fs->logn[m - 1]);

        if (spread < FLAT_REL) {
            c->numeric_verdict = EMBZ_VERDICT_NOT_EMBEZZLER;
            c->law = EMBZ_LAW_POWER_LIMIT;
            c->limit_value = Elast;
            c->limit_lo = Elo;
            c->limit_hi = Ehi;
            c->limit_certified = 0;
            reason(c, "E_n is constant to relative %.1e over the fit range: it has already "
                   "settled at a positive limit near %.8g (the approach is faster than any "
                   "visible power of ln n, consistent with a power of n; its exponent is not "
                   "resolved)", spread, Elast);
            goto done;
        }
        if (best != NULL && (best->law == EMBZ_LAW_POWER_LIMIT
                             || best->law == EMBZ_LAW_LOG_LIMIT)) {
            double xmax = fs->logn[m - 1];
            /* is the approach to L resolved? n^-g must fall by e^-8 over the range; a
             * (ln n)^-g approach slower than G_SLOW cannot be told apart from a decay to 0
             * like a power of ln ln n over the reachable sizes */
            int resolved = best->law == EMBZ_LAW_POWER_LIMIT ? best->g * xmax >= 8.0
                                                              : best->g_lo >= G_SLOW;
            if (best->L_lo > LIMIT_NEAR * Elast && resolved) {
                c->numeric_verdict = EMBZ_VERDICT_NOT_EMBEZZLER;
                set_law(c, best);
                c->limit_value = best->L;
                c->limit_lo = best->L_lo;
                c->limit_hi = best->L_hi < Ehi ? best->L_hi : Ehi;
                reason(c, "best law by BIC: E ~ %s with L = %.6g [%.6g, %.6g], C = %.4g, "
                       "g = %.4g [%.4g, %.4g] (jackknife); largest relative residual %.2g",
                       embz_law_formula(best->law), best->L, best->L_lo, best->L_hi, best->C,
                       best->g, best->g_lo, best->g_hi, best->max_rel);
                reason(c, "the fitted limit is positive and E_n is already close to it: "
                       "not an embezzler (numeric estimate)");
                goto done;
            }
            if (best->L_lo > LIMIT_SMALL * Elast) {
                set_law(c, best);
                c->limit_value = best->L;
                c->limit_lo = best->L_lo;
                c->limit_hi = best->L_hi;
                reason(c, "best law by BIC: E ~ %s with a positive limit L = %.4g "
                       "[%.4g, %.4g] (E_n = %.4g at the largest size), g = %.3g [%.3g, %.3g]; "
                       "%s: inconclusive", embz_law_formula(best->law), best->L, best->L_lo,
                       best->L_hi, Elast, best->g, best->g_lo, best->g_hi,
                       resolved ? "E_n is still far above the limit"
                                : "the approach to it is too slow to exclude a decay to 0 "
                                  "like a power of ln ln n over this range");
                goto done;
            }
            reason(c, "the best law by BIC, %s, has a limit L = %.3g [%.3g, %.3g], small "
                   "against E_n = %.3g: treated as 0 (a correction to the leading decay)",
                   embz_law_formula(best->law), best->L, best->L_lo, best->L_hi, Elast);
        }
        if (zl != NULL && zl->g_lo > G_MIN) {
            c->numeric_verdict = EMBZ_VERDICT_EMBEZZLER;
            set_law(c, zl);
            c->limit_value = 0;
            c->limit_lo = 0;
            c->limit_hi = Ehi;
            reason(c, "E_n decays like %s with C = %.4g [%.4g, %.4g], g = %.4g [%.4g, %.4g] "
                   "(jackknife); largest relative residual %.2g",
                   embz_law_formula(zl->law), zl->C, zl->C_lo, zl->C_hi, zl->g, zl->g_lo,
                   zl->g_hi, zl->max_rel);
            reason(c, "the error keeps decreasing towards 0: a universal embezzler (numeric "
                   "estimate; the limit 0 is extrapolated, only E_n <= %s at n = %s is "
                   "certified)", ehi, Nstr);
            goto done;
        }
        if (pl->ok && pl->L_lo > LIMIT_NEAR * Elast && spread < 1e-3) {
            c->numeric_verdict = EMBZ_VERDICT_NOT_EMBEZZLER;
            set_law(c, pl);
            c->limit_value = pl->L;
            c->limit_lo = pl->L_lo;
            c->limit_hi = pl->L_hi;
            reason(c, "E_n varies by only %.2g (relative) over the fit range and %s fits "
                   "with L = %.6g: positive limit (numeric estimate)", spread,
                   embz_law_formula(pl->law), pl->L);
            goto done;
        }
        if (zl != NULL) set_law(c, zl);
        c->limit_lo = 0;
        c->limit_hi = Ehi;
        reason(c, "no decay law with a visible exponent (best zero-limit law %s has g = %.3g "
               "[%.3g, %.3g]) and no positive limit resolved: inconclusive",
               zl ? embz_law_formula(zl->law) : "none", zl ? zl->g : NAN, zl ? zl->g_lo : NAN,
               zl ? zl->g_hi : NAN);
    }
done:
    free(Nstr);
    free(elo);
    free(ehi);
    return EMBZ_OK;
}

/* ---- analytic route ---- */
#if EMBZ_CLASSIFY_WITH_ASYM
static int rate_law(int rate)
{
    switch (rate) {
    case EMBZ_ASYM_RATE_POSITIVE_LIMIT: return EMBZ_LAW_NONE;
    case EMBZ_ASYM_RATE_LOG_B: case EMBZ_ASYM_RATE_LOG: case EMBZ_ASYM_RATE_LOG_POW:
        return EMBZ_LAW_LOG;
    case EMBZ_ASYM_RATE_LOGLOG: return EMBZ_LAW_LOGLOG;
    default: return -1;
    }
}

static void analytic_route(embz_classify_t c, const embz_family_t f, slong prec)
{
    embz_asym_result_t r;
    embz_err_t e2;
    embz_err_clear(&e2);
    embz_asym_result_init(r);
    int st = embz_asym_analyse(r, f->weight, prec, &e2);
    if (st != EMBZ_OK) {
        reason(c, "analytic route not applicable: %s", e2.text);
        embz_asym_result_clear(r);
        return;
    }
    c->analytic_available = 1;
    char lead[160];
    embz_asym_leading_str(lead, sizeof(lead), r);
    if (r->kind == EMBZ_ASYM_SCALE && !r->zero) {
        char *cs = embz_arb_certified_string(r->coeff, 8);
        snprintf(c->asymptotic_form, sizeof(c->asymptotic_form), "%.40s * %.110s", cs, lead);
        free(cs);
    } else {
        snprintf(c->asymptotic_form, sizeof(c->asymptotic_form), "%s", lead);
    }
    snprintf(c->analytic_rate, sizeof(c->analytic_rate), "%s", r->rate_text);
    if (r->verdict == EMBZ_ASYM_VERDICT_EMBEZZLER)
        c->analytic_verdict = EMBZ_VERDICT_EMBEZZLER;
    else if (r->verdict == EMBZ_ASYM_VERDICT_NOT_EMBEZZLER
             || r->verdict == EMBZ_ASYM_VERDICT_NOT_WEIGHT)
        c->analytic_verdict = EMBZ_VERDICT_NOT_EMBEZZLER;
    else
        c->analytic_verdict = EMBZ_VERDICT_INCONCLUSIVE;
    reason(c, "analytic: f(x) ~ %s as x -> infinity; %s: %s%s%s", c->asymptotic_form,
           embz_asym_verdict_name(r->verdict), r->why[0] ? r->why : "criterion of the "
           "divergent sum and the x^(-1 +- eps) bounds",
           r->rate_text[0] ? "; predicted rate " : "", r->rate_text);
    if (r->limit_known) {
        char *lo = embz_arb_lo_string(r->limit, 8), *hi = embz_arb_hi_string(r->limit, 8);
        reason(c, "analytic: predicted limit of E_n in [%s, %s] (derived leading-order "
               "formula)", lo, hi);
        free(lo);
        free(hi);
    }
    /* the rate class against the fitted law */
    int want = rate_law(r->rate);
    if (want > 0 && c->numeric_verdict == EMBZ_VERDICT_EMBEZZLER && c->law != want)
        reason(c, "rate classes differ: analytic %s, fitted %s (the fitted law is an "
               "estimate over a finite range)", r->rate_text, embz_law_formula(c->law));
    if (want > 0 && r->rate != EMBZ_ASYM_RATE_LOGLOGLOG && c->law == want) {
        double p = fmpq_get_d(r->rate_exp);
        reason(c, "predicted exponent %.4g, fitted %.4g [%.4g, %.4g]", p, c->exponent,
               c->exponent_lo, c->exponent_hi);
    }
    embz_asym_result_clear(r);
}
#endif

/* The limit as reported agrees with the verdict and with itself: an embezzler's limit is 0
 * (the criterion, or the decay law), and a point estimate lies inside its own interval (a
 * fitted L above the certified E at the largest size had the interval cut there but kept the
 * value). A non-finite end or value is left NaN for the renderers to word. */
static void settle_limit(embz_classify_t c)
{
    if (c->verdict == EMBZ_VERDICT_EMBEZZLER) {
        c->limit_value = 0;
        c->limit_lo = 0;
        if (!(c->limit_hi >= 0)) c->limit_hi = NAN;
        return;
    }
    if (isfinite(c->limit_lo) && isfinite(c->limit_hi) && c->limit_lo > c->limit_hi)
        c->limit_lo = c->limit_hi;
    if (isfinite(c->limit_value)) {
        if (isfinite(c->limit_hi) && c->limit_value > c->limit_hi) c->limit_value = c->limit_hi;
        if (isfinite(c->limit_lo) && c->limit_value < c->limit_lo) c->limit_value = c->limit_lo;
    }
}

int embz_classify(embz_classify_t c, const embz_family_t f, const embz_classify_opts_t o,
                  embz_progress_fn progress, void *ctx, embz_err_t *err)
{
    for (slong k = 0; k < c->nreasons; k++) free(c->reasons[k]);
    c->nreasons = 0;
    int st = numeric_route(c, f, o, progress, ctx, err);
    if (st != EMBZ_OK) return st;
    c->verdict = c->numeric_verdict;
#if EMBZ_CLASSIFY_WITH_ASYM
    if (o->use_analytic && !(embz_expr_uses(f->weight) & (EMBZ_USES_N | EMBZ_USES_PARAM)))
        analytic_route(c, f, 128);
    else if (o->use_analytic)
        reason(c, "analytic route not applicable: the weight depends on n");
#else
    reason(c, "analytic route not built in");
#endif
    if (c->analytic_available && c->analytic_verdict != EMBZ_VERDICT_INCONCLUSIVE) {
        if (c->numeric_verdict == EMBZ_VERDICT_INCONCLUSIVE) {
            c->verdict = c->analytic_verdict;
            reason(c, "verdict from the analytic route (numeric route inconclusive)");
        } else if (c->numeric_verdict != c->analytic_verdict) {
            c->disagree = 1;
            c->verdict = EMBZ_VERDICT_INCONCLUSIVE;
            reason(c, "the routes DISAGREE: analytic says %s, numeric says %s",
                   embz_verdict_id(c->analytic_verdict), embz_verdict_id(c->numeric_verdict));
        } else {
            reason(c, "analytic and numeric routes agree");
        }
    }
    settle_limit(c);
    return EMBZ_OK;
}
