/* The embezzler verdict: a numeric route (sweep + fitted laws, every family) and an analytic
 * route (asymptotic expansion of the weight, exp-log weights without n). */
#include <stdlib.h>
#include <string.h>
#include <stdarg.h>
#include <stdio.h>
#include <math.h>
#include "embz/analysis.h"
#include "embz/util.h"
#include "embz/defaults.h"
#include "classify_impl.h"

/* ANALYTIC ROUTE HOOK: set to 0 to build the numeric route alone (without the asymptotic
 * engine of include/embz/asym.h and src/analysis/asym*.c). */
#define EMBZ_CLASSIFY_WITH_ASYM 1
#if EMBZ_CLASSIFY_WITH_ASYM
#include "embz/asym.h"
#endif

const char *embz_verdict_id(int v)
{
    return v == EMBZ_VERDICT_EMBEZZLER ? "embezzler"
         : v == EMBZ_VERDICT_NOT_EMBEZZLER ? "not_embezzler" : "inconclusive";
}

void embz_classify_opts_init(embz_classify_opts_t o)
{
    fmpz_init(o->from);
    fmpz_init(o->to);
    embz_default_range(o->from, o->to);
    o->points = EMBZ_RANGE_POINTS;
    o->prec = EMBZ_PREC_MANY;
    o->use_analytic = 1;
    o->threads = 0;
}

void embz_classify_opts_clear(embz_classify_opts_t o)
{
    fmpz_clear(o->from);
    fmpz_clear(o->to);
}

static void clear_facts(embz_classify_t c)
{
    _embz_facts_clear(c->facts, &c->nfacts);
}

static embz_classify_fact_struct *fact(embz_classify_t c, int kind)
{
    return _embz_fact_new(c->facts, &c->nfacts, kind);
}

static void fact_sx(embz_classify_t c, int kind, int law, const char *s0, const char *s1,
                    const char *s2, int n, const double *x)
{
    _embz_fact_add(c->facts, &c->nfacts, kind, law, s0, s1, s2, n, x);
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
    clear_facts(c);
    embz_sweep_clear(c->sweep);
    embz_fitset_clear(c->fits);
    memset(c, 0, sizeof(*c));
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
    embz_sweep_opts_t so;
    embz_sweep_opts_init(so);
    so->threads = o->threads;
    int st = embz_sweep_run_opts(c->sweep, f, o->from, o->to, o->points, q, so, o->prec,
                                 progress, ctx, err);
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
    fact_sx(c, EMBZ_FACT_CERTIFIED_LAST, -1, elo, ehi, Nstr, 0, NULL);
    if (c->nfacts > 0) c->facts[c->nfacts - 1].k1 = fmpz_sizeinbase(last->n, 10) > 12;
    if (c->sweep->narrowed) {
        fact_sx(c, EMBZ_FACT_NARROWED, -1, c->sweep->narrow_why, NULL, NULL, 0, NULL);
        if (c->nfacts > 0) c->facts[c->nfacts - 1].k1 = (long) c->sweep->reach;
    }
    if (c->sweep->nok < c->sweep->len) {
        embz_classify_fact_struct *fs = fact(c, EMBZ_FACT_SKIPPED);
        if (fs != NULL) {
            fs->k1 = (long) (c->sweep->len - c->sweep->nok);
            fs->k2 = (long) c->sweep->len;
        }
    }

    embz_err_t e2;
    embz_err_clear(&e2);
    if (embz_fit_sweep(c->fits, c->sweep, &e2) != EMBZ_OK) {
        fact_sx(c, EMBZ_FACT_NO_FIT, -1, e2.text, NULL, NULL, 0, NULL);
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
        {
            double x[2] = { fs->logn[0], fs->logn[m - 1] };
            fact_sx(c, EMBZ_FACT_FIT_RANGE, -1, NULL, NULL, NULL, 2, x);
            if (c->nfacts > 0) c->facts[c->nfacts - 1].k1 = (long) m;
        }

        if (spread < FLAT_REL) {
            c->numeric_verdict = EMBZ_VERDICT_NOT_EMBEZZLER;
            c->law = EMBZ_LAW_POWER_LIMIT;
            c->limit_value = Elast;
            c->limit_lo = Elo;
            c->limit_hi = Ehi;
            c->limit_certified = 0;
            double x[2] = { spread, Elast };
            fact_sx(c, EMBZ_FACT_CONSTANT, -1, NULL, NULL, NULL, 2, x);
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
                double x[8] = { best->L, best->L_lo, best->L_hi, best->C, best->g, best->g_lo,
                                best->g_hi, best->max_rel };
                fact_sx(c, EMBZ_FACT_LIMIT_LAW, best->law, NULL, NULL, NULL, 8, x);
                fact(c, EMBZ_FACT_LIMIT_REACHED);
                goto done;
            }
            if (best->L_lo > LIMIT_SMALL * Elast) {
                set_law(c, best);
                c->limit_value = best->L;
                c->limit_lo = best->L_lo;
                c->limit_hi = best->L_hi;
                double x[7] = { best->L, best->L_lo, best->L_hi, Elast, best->g, best->g_lo,
                                best->g_hi };
                fact_sx(c, EMBZ_FACT_LIMIT_FAR, best->law, NULL, NULL, NULL, 7, x);
                if (c->nfacts > 0) c->facts[c->nfacts - 1].k1 = resolved;
                goto done;
            }
            double x[4] = { best->L, best->L_lo, best->L_hi, Elast };
            fact_sx(c, EMBZ_FACT_LIMIT_SMALL, best->law, NULL, NULL, NULL, 4, x);
        }
        if (zl != NULL && zl->g_lo > G_MIN) {
            c->numeric_verdict = EMBZ_VERDICT_EMBEZZLER;
            set_law(c, zl);
            c->limit_value = 0;
            c->limit_lo = 0;
            c->limit_hi = Ehi;
            double x[7] = { zl->C, zl->C_lo, zl->C_hi, zl->g, zl->g_lo, zl->g_hi, zl->max_rel };
            fact_sx(c, EMBZ_FACT_DECAY_LAW, zl->law, NULL, NULL, NULL, 7, x);
            fact_sx(c, EMBZ_FACT_DECAY_TO_ZERO, -1, ehi, Nstr, NULL, 0, NULL);
            goto done;
        }
        if (pl->ok && pl->L_lo > LIMIT_NEAR * Elast && spread < 1e-3) {
            c->numeric_verdict = EMBZ_VERDICT_NOT_EMBEZZLER;
            set_law(c, pl);
            c->limit_value = pl->L;
            c->limit_lo = pl->L_lo;
            c->limit_hi = pl->L_hi;
            double x[2] = { spread, pl->L };
            fact_sx(c, EMBZ_FACT_FLAT_LIMIT, pl->law, NULL, NULL, NULL, 2, x);
            goto done;
        }
        if (zl != NULL) set_law(c, zl);
        c->limit_lo = 0;
        c->limit_hi = Ehi;
        {
            double x[3] = { zl ? zl->g : NAN, zl ? zl->g_lo : NAN, zl ? zl->g_hi : NAN };
            fact_sx(c, EMBZ_FACT_NO_LAW, zl ? zl->law : -1, NULL, NULL, NULL, 3, x);
        }
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
        fact_sx(c, EMBZ_FACT_ASYM_NOT_APPLICABLE, -1, e2.text, NULL, NULL, 0, NULL);
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
    fact_sx(c, EMBZ_FACT_ASYM_FORM, -1, c->asymptotic_form, r->why, r->rate_text, 0, NULL);
    if (c->nfacts > 0) c->facts[c->nfacts - 1].v1 = r->verdict;
    if (r->limit_known) {
        char *lo = embz_arb_lo_string(r->limit, 8), *hi = embz_arb_hi_string(r->limit, 8);
        fact_sx(c, EMBZ_FACT_ASYM_LIMIT, -1, lo, hi, NULL, 0, NULL);
        free(lo);
        free(hi);
    }
    /* the rate class against the fitted law */
    int want = rate_law(r->rate);
    if (want > 0 && c->numeric_verdict == EMBZ_VERDICT_EMBEZZLER && c->law != want)
        fact_sx(c, EMBZ_FACT_RATES_DIFFER, c->law, r->rate_text, NULL, NULL, 0, NULL);
    if (want > 0 && r->rate != EMBZ_ASYM_RATE_LOGLOGLOG && c->law == want) {
        double p = fmpq_get_d(r->rate_exp);
        double x[4] = { p, c->exponent, c->exponent_lo, c->exponent_hi };
        fact_sx(c, EMBZ_FACT_EXPONENTS, -1, NULL, NULL, NULL, 4, x);
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
        c->limit_by_criterion = c->analytic_available
                                && c->analytic_verdict == EMBZ_VERDICT_EMBEZZLER;
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
    clear_facts(c);
    int st = numeric_route(c, f, o, progress, ctx, err);
    if (st != EMBZ_OK) return st;
    c->verdict = c->numeric_verdict;
#if EMBZ_CLASSIFY_WITH_ASYM
    if (o->use_analytic && embz_family_is_levels(f))
        fact(c, EMBZ_FACT_LEVELS);
    else if (o->use_analytic && !(embz_expr_uses(f->weight) & (EMBZ_USES_N | EMBZ_USES_PARAM)))
        analytic_route(c, f, 128);
    else if (o->use_analytic)
        fact(c, EMBZ_FACT_DEPENDS_ON_N);
#else
    fact(c, EMBZ_FACT_ASYM_NOT_BUILT);
#endif
    if (c->analytic_available && c->analytic_verdict != EMBZ_VERDICT_INCONCLUSIVE) {
        if (c->numeric_verdict == EMBZ_VERDICT_INCONCLUSIVE) {
            c->verdict = c->analytic_verdict;
            fact(c, EMBZ_FACT_FROM_ANALYTIC);
        } else if (c->numeric_verdict != c->analytic_verdict) {
            c->disagree = 1;
            c->verdict = EMBZ_VERDICT_INCONCLUSIVE;
            embz_classify_fact_struct *fd = fact(c, EMBZ_FACT_DISAGREE);
            if (fd != NULL) {
                fd->v1 = c->analytic_verdict;
                fd->v2 = c->numeric_verdict;
            }
        } else {
            fact(c, EMBZ_FACT_AGREE);
        }
    }
    settle_limit(c);
    return EMBZ_OK;
}
