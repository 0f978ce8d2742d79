/* Does a fidelity-type measure converge to a perfect conversion, and how fast (embz/analysis.h,
 * embz_mclassify)? Three sources, kept apart in the facts:
 *  - theorems: K <= P <= sqrt(K (2 - K)) and O^2 <= F_max <= 1 - K^2 (docs/measures.md) tie
 *    the measure's verdict to the K classification's; for the weight 1/i the overlap obeys
 *    the exact law 1 - O = C_d(n) / H_n with C_d(n) convergent [derived in docs/measures.md];
 *  - certified values: the measure at the sizes (explicit or analytic), bounds where only
 *    bounds are certified (used as bounds, never fitted);
 *  - fits of the distance D over the sizes with values (estimates, as for K). */
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include "embz/analysis.h"
#include "embz/util.h"
#include "classify_impl.h"

const char *embz_converge_id(int v)
{
    return v == EMBZ_CONVERGE_YES ? "converges"
         : v == EMBZ_CONVERGE_NO ? "does_not_converge" : "inconclusive";
}

void embz_mclassify_init(embz_mclassify_t c)
{
    memset(c, 0, sizeof(*c));
    c->measure = EMBZ_MEASURE_PURIFIED;
    embz_msweep_init(c->sweep);
    embz_fitset_init(c->fits);
    embz_classify_init(c->kc);
    arb_init(c->harmonic_c);
    arb_indeterminate(c->harmonic_c);
    c->dist = NULL;
    c->exponent = c->exponent_lo = c->exponent_hi = c->coeff = NAN;
    c->limit_lo = c->limit_hi = NAN;
}

void embz_mclassify_clear(embz_mclassify_t c)
{
    _embz_facts_clear(c->facts, &c->nfacts);
    if (c->dist != NULL) _arb_vec_clear(c->dist, c->sweep->len);
    embz_msweep_clear(c->sweep);
    embz_fitset_clear(c->fits);
    embz_classify_clear(c->kc);
    arb_clear(c->harmonic_c);
    memset(c, 0, sizeof(*c));
}

static embz_classify_fact_struct *mfact(embz_mclassify_t c, int kind)
{
    return _embz_fact_new(c->facts, &c->nfacts, kind);
}

static embz_classify_fact_struct *mfact_sx(embz_mclassify_t c, int kind, int law,
                                           const char *s0, const char *s1, const char *s2,
                                           int nx, const double *x)
{
    return _embz_fact_add(c->facts, &c->nfacts, kind, law, s0, s1, s2, nx, x);
}

/* D of one size as a ball: the value's distance, or a ball covering the certified bounds. */
static void distance(arb_t D, const embz_fidelity_result_struct *r, int measure, slong prec)
{
    if (measure == EMBZ_MEASURE_OVERLAP && !r->bounds_only) {
        arb_sub_ui(D, r->overlap, 1, prec);
        arb_neg(D, D);
        return;
    }
    arb_t lo, hi;
    arb_init(lo);
    arb_init(hi);
    if (!r->bounds_only) {
        arb_set(lo, r->value);
        arb_set(hi, r->value);
    } else if (r->have_tight) {
        arb_set(lo, r->tight_lo);
        arb_set(hi, r->tight_hi);
    } else {
        arb_set(lo, r->lower);
        arb_set(hi, r->upper);
    }
    if (measure != EMBZ_MEASURE_PURIFIED) {
        /* a fidelity (larger is better): D = 1 - F (overlap with bounds: F = O^2) */
        if (measure == EMBZ_MEASURE_OVERLAP) {
            arb_sqrtpos(lo, lo, prec);
            arb_sqrtpos(hi, hi, prec);
        }
        arb_sub_ui(lo, lo, 1, prec);
        arb_neg(lo, lo);
        arb_sub_ui(hi, hi, 1, prec);
        arb_neg(hi, hi);
    }
    arb_union(D, lo, hi, prec);
    arb_clear(lo);
    arb_clear(hi);
}

/* The bound weight is 1/i (structurally, after folding; not an amplitude text of it). */
static int weight_is_harmonic(const embz_family_t f)
{
    if (embz_family_is_levels(f)) return 0;
    static const char *const forms[] = { "1/i", "i^-1", "i^(-1)" };
    int yes = 0;
    for (size_t k = 0; k < sizeof(forms) / sizeof(forms[0]) && !yes; k++) {
        embz_expr_t e;
        embz_err_t err;
        embz_err_clear(&err);
        embz_expr_init(e);
        if (embz_expr_parse(e, forms[k], NULL, 0, &err) == EMBZ_OK) {
            embz_expr_fold(e);
            yes = embz_expr_equal(e, f->weight);
        }
        embz_expr_clear(e);
    }
    return yes;
}

/* The fit route: a verdict from the fitted laws of D (estimates). */
static int fit_route(embz_mclassify_t c, double DN)
{
    const embz_fitset_struct *fs = c->fits;
    slong m = fs->m;
    const embz_fit_struct *best = fs->best ? fs->fits + fs->best : NULL;
    const embz_fit_struct *zl = NULL;
    for (int law = EMBZ_LAW_LOG; law <= EMBZ_LAW_LOGLOG; law++)
        if (fs->fits[law].ok && (zl == NULL || fs->fits[law].bic < zl->bic))
            zl = fs->fits + law;
    double emin = INFINITY, emax = -INFINITY;
    for (slong j = 0; j < m; j++) {
        if (fs->E[j] < emin) emin = fs->E[j];
        if (fs->E[j] > emax) emax = fs->E[j];
    }
    if ((emax - emin) < FLAT_REL * DN) {
        double x[3] = { DN, DN, DN };
        embz_classify_fact_struct *f = mfact_sx(c, EMBZ_FACT_M_FIT_LIMIT, EMBZ_LAW_NONE, NULL,
                                                NULL, NULL, 3, x);
        if (f != NULL) { f->x[3] = DN; f->k1 = 1; }
        c->limit_lo = c->limit_hi = DN;
        return EMBZ_CONVERGE_NO;
    }
    if (best != NULL && (best->law == EMBZ_LAW_POWER_LIMIT || best->law == EMBZ_LAW_LOG_LIMIT)
        && best->L_lo > LIMIT_SMALL * DN) {
        double xmax = fs->logn[m - 1];
        int resolved = best->law == EMBZ_LAW_POWER_LIMIT ? best->g * xmax >= 8.0
                                                          : best->g_lo >= G_SLOW;
        resolved = resolved && best->L_lo > LIMIT_NEAR * DN;
        double x[4] = { best->L, best->L_lo, best->L_hi, DN };
        embz_classify_fact_struct *f = mfact_sx(c, EMBZ_FACT_M_FIT_LIMIT, best->law, NULL,
                                                NULL, NULL, 4, x);
        if (f != NULL) f->k1 = resolved;
        c->law = best->law;
        c->exponent = best->g;
        c->exponent_lo = best->g_lo;
        c->exponent_hi = best->g_hi;
        c->coeff = best->C;
        c->limit_lo = best->L_lo;
        c->limit_hi = best->L_hi;
        return resolved ? EMBZ_CONVERGE_NO : EMBZ_CONVERGE_INCONCLUSIVE;
    }
    if (zl != NULL) {
        c->law = zl->law;
        c->exponent = zl->g;
        c->exponent_lo = zl->g_lo;
        c->exponent_hi = zl->g_hi;
        c->coeff = zl->C;
    }
    if (zl != NULL && zl->g_lo > G_MIN) {
        double x[7] = { zl->C, zl->C_lo, zl->C_hi, zl->g, zl->g_lo, zl->g_hi, zl->max_rel };
        embz_classify_fact_struct *f = mfact_sx(c, EMBZ_FACT_M_FIT, zl->law, NULL, NULL, NULL,
                                                7, x);
        if (f != NULL) { f->k1 = (long) m; f->v1 = c->measure; }
        return EMBZ_CONVERGE_YES;
    }
    double x[3] = { zl ? zl->g : NAN, zl ? zl->g_lo : NAN, zl ? zl->g_hi : NAN };
    mfact_sx(c, EMBZ_FACT_M_FIT_NONE, zl ? zl->law : -1, NULL, NULL, NULL, 3, x);
    return EMBZ_CONVERGE_INCONCLUSIVE;
}

/* C_d(N) = (1 - O_N) H_N for the weight 1/i, and the limit C_d in [C_d(N), C_d(N) + (d-1)/N]:
 * the terms (1/j)(1 - sqrt(j / (d ceil(j/d)))) beyond N are at most (d-1)/j^2, since
 * 1 - sqrt(1 - t) <= t with t = (d ceil(j/d) - j) / (d ceil(j/d)) <= (d-1)/j [derived]. */
static void harmonic_constant(arb_t lim, arb_t CN, const arb_t O, const fmpz_t N, ulong d,
                              slong prec)
{
    arb_t H, t;
    arb_init(H);
    arb_init(t);
    arb_set_fmpz(t, N);
    arb_add_ui(t, t, 1, prec);
    arb_digamma(H, t, prec);            /* H_N = psi(N + 1) + gamma */
    arb_const_euler(t, prec);
    arb_add(H, H, t, prec);
    arb_sub_ui(CN, O, 1, prec);
    arb_neg(CN, CN);
    arb_mul(CN, CN, H, prec);
    /* lim = CN + [0, (d-1)/N] */
    arb_set_fmpz(t, N);
    arb_ui_div(t, d - 1, t, prec);
    arb_mul_2exp_si(t, t, -1);
    arb_add_error(t, t);                /* the ball [0, (d-1)/N] */
    arb_add(lim, CN, t, prec);
    arb_clear(H);
    arb_clear(t);
}

int embz_mclassify(embz_mclassify_t c, const embz_family_t f, int measure,
                   const embz_classify_opts_t o, embz_progress_fn progress, void *ctx,
                   embz_err_t *err)
{
    if (measure != EMBZ_MEASURE_FIDELITY && measure != EMBZ_MEASURE_PURIFIED
        && measure != EMBZ_MEASURE_OVERLAP)
        return embz_err_set(err, EMBZ_ERR_INPUT, "measure '%s' is not a fidelity measure",
                            embz_measure_name(measure));
    embz_mclassify_clear(c);
    embz_mclassify_init(c);
    c->measure = measure;
    slong prec = o->prec;

    embz_target_t q;
    embz_target_init(q);
    int st = embz_msweep_run(c->sweep, f, o->from, o->to, o->points, q, measure, prec,
                             progress, ctx, err);
    /* the analytic engine declined the family at large sizes (not a value and not bounds):
       sweep the explicit range instead, as the K sweep narrows its range, and say so */
    char narrow_why[256] = "";
    fmpz_t reach;
    fmpz_init_set_si(reach, EMBZ_FIDELITY_MAX_N);
    if (st == EMBZ_OK && fmpz_cmp(o->to, reach) > 0 && fmpz_cmp(o->from, reach) < 0) {
        slong good = 0, declined = 0;
        for (slong j = 0; j < c->sweep->len; j++) {
            const embz_msweep_point_struct *p = c->sweep->pts + j;
            if (p->status == EMBZ_OK) good++;
            else if (p->status != EMBZ_ERR_DOMAIN && fmpz_cmp(p->n, reach) > 0) {
                if (!declined) snprintf(narrow_why, sizeof(narrow_why), "%s", p->note);
                declined++;
            }
        }
        if (good < 5 && declined > 0) {
            st = embz_msweep_run(c->sweep, f, o->from, reach, o->points, q, measure, prec,
                                 progress, ctx, err);
            c->narrowed = 1;
        }
    }
    fmpz_clear(reach);
    embz_target_clear(q);
    if (st != EMBZ_OK) return st;
    if (c->narrowed) {
        embz_classify_fact_struct *fn = mfact_sx(c, EMBZ_FACT_NARROWED, -1, narrow_why, NULL,
                                                 NULL, 0, NULL);
        if (fn != NULL) fn->k1 = (long) EMBZ_FIDELITY_MAX_N;
    }
    st = embz_classify(c->kc, f, o, NULL, NULL, err);
    if (st != EMBZ_OK) return st;
    c->k_verdict = c->kc->verdict;
    c->k_by_criterion = c->kc->analytic_available && !c->kc->disagree
                        && c->kc->analytic_verdict == c->kc->verdict
                        && c->kc->verdict != EMBZ_VERDICT_INCONCLUSIVE;

    /* the distances, certified */
    slong len = c->sweep->len;
    c->dist = _arb_vec_init(len);
    double *logn = flint_malloc(sizeof(double) * (size_t) (len + 1));
    double *D = flint_malloc(sizeof(double) * (size_t) (len + 1));
    slong nfit = 0, last_val = -1, last_bnd = -1;
    for (slong j = 0; j < len; j++) {
        const embz_msweep_point_struct *p = c->sweep->pts + j;
        if (p->status != EMBZ_OK) {
            arb_indeterminate(c->dist + j);
            c->nfailed++;
            continue;
        }
        distance(c->dist + j, &p->res, measure, prec);
        if (p->res.bounds_only) {
            c->nbounds++;
            last_bnd = j;
            continue;
        }
        c->nvalues++;
        last_val = j;
        double dm = arf_get_d(arb_midref(c->dist + j), ARF_RND_NEAR);
        if (dm > 0 && isfinite(dm)) {
            logn[nfit] = fmpz_dlog(p->n);
            D[nfit] = dm;
            nfit++;
        }
    }

    /* certified facts: the largest size with a value, then the bounds-only sizes */
    double DN = NAN;
    char *DNhi = NULL;
    if (last_val >= 0) {
        const embz_msweep_point_struct *p = c->sweep->pts + last_val;
        char *ns = embz_fmpz_string(p->n, 12);
        char *lo = embz_arb_lo_string(c->dist + last_val, 8);
        DNhi = embz_arb_hi_string(c->dist + last_val, 8);
        embz_classify_fact_struct *fl = mfact_sx(c, EMBZ_FACT_M_LAST, -1, lo, DNhi, ns, 0, NULL);
        if (fl != NULL) {
            fl->k1 = fmpz_sizeinbase(p->n, 10) > 12;
            fl->v1 = measure;
        }
        DN = arf_get_d(arb_midref(c->dist + last_val), ARF_RND_NEAR);
        free(ns);
        free(lo);
    }
    if (c->nbounds > 0) {
        const embz_msweep_point_struct *p = c->sweep->pts + last_bnd;
        char *ns = embz_fmpz_string(p->n, 12);
        char *lo = embz_arb_lo_string(c->dist + last_bnd, 8);
        char *hi = embz_arb_hi_string(c->dist + last_bnd, 8);
        embz_classify_fact_struct *fb = mfact_sx(c, EMBZ_FACT_M_BOUNDS, -1, ns, lo, hi, 0, NULL);
        if (fb != NULL) {
            fb->k1 = (long) c->nbounds;
            fb->k2 = (long) len;
            fb->v1 = measure;
        }
        free(ns); free(lo); free(hi);
    }
    if (c->nfailed > 0) {
        embz_classify_fact_struct *fs = mfact(c, EMBZ_FACT_SKIPPED);
        if (fs != NULL) { fs->k1 = (long) c->nfailed; fs->k2 = (long) len; }
    }

    /* the fit route (estimates) */
    c->fit_verdict = EMBZ_CONVERGE_INCONCLUSIVE;
    if (last_val < 0) {
        mfact(c, EMBZ_FACT_M_NO_VALUES);
    } else {
        embz_err_t e2;
        embz_err_clear(&e2);
        if (embz_fit_laws(c->fits, logn, D, nfit, &e2) != EMBZ_OK)
            mfact_sx(c, EMBZ_FACT_NO_FIT, -1, e2.text, NULL, NULL, 0, NULL);
        else {
            double x[2] = { c->fits->logn[0], c->fits->logn[c->fits->m - 1] };
            embz_classify_fact_struct *fr = mfact_sx(c, EMBZ_FACT_FIT_RANGE, -1, NULL, NULL,
                                                     NULL, 2, x);
            if (fr != NULL) fr->k1 = (long) c->fits->m;
            c->fit_verdict = fit_route(c, DN);
        }
    }
    flint_free(logn);
    flint_free(D);

    /* the proven routes */
    int proven_verdict = EMBZ_CONVERGE_INCONCLUSIVE, proven = 0;
    if (measure == EMBZ_MEASURE_OVERLAP && last_val >= 0 && weight_is_harmonic(f)) {
        const embz_msweep_point_struct *p = c->sweep->pts + last_val;
        arb_t CN;
        arb_init(CN);
        c->harmonic = 1;
        harmonic_constant(c->harmonic_c, CN, p->res.overlap, p->n, 2, prec);
        char *ns = embz_fmpz_string(p->n, 12);
        char *lo = embz_arb_lo_string(c->harmonic_c, 12);
        char *hi = embz_arb_hi_string(c->harmonic_c, 12);
        embz_classify_fact_struct *fh = mfact_sx(c, EMBZ_FACT_M_HARMONIC, -1, lo, hi, ns, 0,
                                                 NULL);
        if (fh != NULL) fh->k1 = 2;
        free(ns); free(lo); free(hi);
        arb_clear(CN);
        proven_verdict = EMBZ_CONVERGE_YES;
        proven = 1;
    } else if (last_val >= 0 && weight_is_harmonic(f)) {
        /* 1 - F_max <= 1 - O^2 (F_max >= O^2) with the overlap's exact law at the same size */
        const embz_msweep_point_struct *p = c->sweep->pts + last_val;
        embz_fidelity_result_t ro;
        embz_err_t eo;
        embz_err_clear(&eo);
        embz_fidelity_result_init(ro);
        embz_target_t q1;
        embz_target_init(q1);
        if (embz_fidelity(ro, f, p->n, q1, EMBZ_MEASURE_OVERLAP, EMBZ_METHOD_AUTO, prec, &eo)
            == EMBZ_OK && !ro->bounds_only) {
            arb_t CN, r, t;
            arb_init(CN); arb_init(r); arb_init(t);
            c->harmonic = 1;
            harmonic_constant(c->harmonic_c, CN, ro->overlap, p->n, 2, prec);
            arb_sqr(t, ro->overlap, prec);
            arb_sub_ui(t, t, 1, prec);
            arb_neg(t, t);                          /* 1 - O^2 */
            arb_sub_ui(r, p->res.fidelity, 1, prec);
            arb_neg(r, r);                          /* 1 - F_max */
            arb_div(r, r, t, prec);
            char *lo = embz_arb_lo_string(c->harmonic_c, 12);
            char *hi = embz_arb_hi_string(c->harmonic_c, 12);
            char *rlo = embz_arb_lo_string(r, 6), *rhi = embz_arb_hi_string(r, 6);
            char *rr = embz_strdup_printf("[%s, %s]", rlo, rhi);
            mfact_sx(c, EMBZ_FACT_M_HARMONIC_P, -1, lo, hi, rr, 0, NULL);
            free(lo); free(hi); free(rlo); free(rhi); free(rr);
            arb_clear(CN); arb_clear(r); arb_clear(t);
        }
        embz_target_clear(q1);
        embz_fidelity_result_clear(ro);
    }
    if (proven_verdict == EMBZ_CONVERGE_INCONCLUSIVE && !(measure == EMBZ_MEASURE_OVERLAP
                                                          && c->harmonic)
        && c->k_verdict != EMBZ_VERDICT_INCONCLUSIVE
               && (measure != EMBZ_MEASURE_OVERLAP
                   || c->k_verdict == EMBZ_VERDICT_NOT_EMBEZZLER)) {
        proven_verdict = c->k_verdict == EMBZ_VERDICT_EMBEZZLER ? EMBZ_CONVERGE_YES
                                                                 : EMBZ_CONVERGE_NO;
        proven = c->k_by_criterion;
        embz_classify_fact_struct *fk = mfact(c, EMBZ_FACT_M_BY_K);
        if (fk != NULL) {
            fk->v1 = proven_verdict;
            fk->v2 = c->k_verdict;
            fk->k1 = c->k_by_criterion;
            fk->k2 = measure == EMBZ_MEASURE_OVERLAP;
        }
    } else if (c->k_verdict == EMBZ_VERDICT_INCONCLUSIVE) {
        /* K undecided: its fitted limit (an estimate) is a lower end for P's (P >= K) */
        double x[2] = { c->kc->limit_lo, c->kc->limit_hi };
        embz_classify_fact_struct *fk = mfact_sx(c, EMBZ_FACT_M_BY_K, -1, NULL, NULL, NULL, 2,
                                                 x);
        if (fk != NULL) {
            fk->v1 = EMBZ_CONVERGE_INCONCLUSIVE;
            fk->v2 = c->k_verdict;
            fk->k2 = measure == EMBZ_MEASURE_OVERLAP;
        }
    } else if (measure == EMBZ_MEASURE_OVERLAP && c->k_verdict == EMBZ_VERDICT_EMBEZZLER) {
        /* K -> 0 does not decide the overlap: O^2 <= F_max only bounds it from above */
        embz_classify_fact_struct *fk = mfact(c, EMBZ_FACT_M_BY_K);
        if (fk != NULL) {
            fk->v1 = EMBZ_CONVERGE_INCONCLUSIVE;
            fk->v2 = c->k_verdict;
            fk->k1 = c->k_by_criterion;
            fk->k2 = 1;
        }
    }
    /* the rate of P from the fitted law of K (purified, fidelity) */
    if (measure != EMBZ_MEASURE_OVERLAP && c->k_verdict == EMBZ_VERDICT_EMBEZZLER
        && (c->kc->law == EMBZ_LAW_LOG || c->kc->law == EMBZ_LAW_LOGLOG)
        && isfinite(c->kc->exponent)) {
        double x[3] = { c->kc->exponent, c->kc->exponent_lo, c->kc->exponent_hi };
        embz_classify_fact_struct *fr = mfact_sx(c, EMBZ_FACT_M_SANDWICH_RATE, c->kc->law,
                                                 NULL, NULL, NULL, 3, x);
        if (fr != NULL) fr->k1 = measure == EMBZ_MEASURE_FIDELITY;
    }

    /* combination */
    if (proven_verdict != EMBZ_CONVERGE_INCONCLUSIVE) {
        c->verdict = proven_verdict;
        c->proven = proven;
        if (c->fit_verdict == proven_verdict) mfact(c, EMBZ_FACT_M_AGREE);
        else if (c->fit_verdict != EMBZ_CONVERGE_INCONCLUSIVE) {
            embz_classify_fact_struct *fd = mfact(c, EMBZ_FACT_M_DISAGREE);
            if (fd != NULL) { fd->v1 = proven_verdict; fd->v2 = c->fit_verdict; fd->k1 = proven; }
            if (!proven) c->verdict = EMBZ_CONVERGE_INCONCLUSIVE;
        }
    } else if (c->fit_verdict == EMBZ_CONVERGE_YES && c->k_verdict == EMBZ_VERDICT_INCONCLUSIVE
               && measure != EMBZ_MEASURE_OVERLAP && c->kc->limit_lo > 0) {
        /* two estimates at odds: P >= K, and K's fit has a positive limit */
        c->verdict = EMBZ_CONVERGE_INCONCLUSIVE;
        embz_classify_fact_struct *fd = mfact(c, EMBZ_FACT_M_DISAGREE);
        if (fd != NULL) { fd->v1 = EMBZ_CONVERGE_NO; fd->v2 = c->fit_verdict; fd->k2 = 1; }
    } else {
        c->verdict = c->fit_verdict;
    }
    if (c->verdict == EMBZ_CONVERGE_YES) {
        c->limit_lo = 0;
        c->limit_hi = DNhi != NULL ? atof(DNhi) : NAN;
    } else if (c->verdict == EMBZ_CONVERGE_NO && !isfinite(c->limit_lo)) {
        /* decided by K alone, no fitted limit: P >= K, so (purified) the limit of K is a lower
           end; 1 - F_max >= K^2; for the overlap only "positive" is known */
        double kl = c->kc->limit_lo;
        c->limit_lo = !isfinite(kl) ? NAN : measure == EMBZ_MEASURE_PURIFIED ? kl
                    : measure == EMBZ_MEASURE_FIDELITY ? kl * kl : NAN;
        c->limit_hi = NAN;
    }
    free(DNhi);
    return EMBZ_OK;
}
