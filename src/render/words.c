/* Sentences for the library's facts: the reasons behind a classification
 * (embz_classify_fact_struct, include/embz/analysis.h). */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "embz/render.h"
#include "embz/asym.h"

static const char *txt(const char *s)
{
    return s != NULL ? s : "";
}

const char *embz_mclassify_distance_name(int measure)
{
    return measure == EMBZ_MEASURE_FIDELITY ? "1 - F_max"
         : measure == EMBZ_MEASURE_OVERLAP ? "1 - O" : "P";
}

char *embz_classify_fact_text(const embz_classify_fact_struct *f)
{
    const double *x = f->x;
    const char *law = f->law >= 0 ? embz_law_formula(f->law) : "none";
    switch (f->kind) {
    case EMBZ_FACT_CERTIFIED_LAST:
        return embz_strdup_printf("certified: %s <= E_n <= %s at the largest size n = %s%s", txt(f->s[0]),
                   txt(f->s[1]), txt(f->s[2]), f->k1 ? " (n shortened)" : "");
    case EMBZ_FACT_SKIPPED:
        return embz_strdup_printf("%ld of %ld sizes could not be computed and were left out", f->k1, f->k2);
    case EMBZ_FACT_NO_FIT:
        return embz_strdup_printf("no fit: %s", txt(f->s[0]));
    case EMBZ_FACT_FIT_RANGE:
        return embz_strdup_printf("fits use the %ld largest sizes, ln n from %.4g to %.4g (estimates, not "
                   "certified)", f->k1, x[0], x[1]);
    case EMBZ_FACT_CONSTANT:
        return embz_strdup_printf("E_n is constant to relative %.1e over the fit range: it has already settled "
                   "at a positive limit near %.8g (the approach is faster than any visible "
                   "power of ln n, consistent with a power of n; its exponent is not resolved)",
                   x[0], x[1]);
    case EMBZ_FACT_LIMIT_LAW:
        return embz_strdup_printf("best law by BIC: E ~ %s with L = %.6g [%.6g, %.6g], C = %.4g, g = %.4g "
                   "[%.4g, %.4g] (jackknife); largest relative residual %.2g", law, x[0], x[1],
                   x[2], x[3], x[4], x[5], x[6], x[7]);
    case EMBZ_FACT_LIMIT_REACHED:
        return embz_strdup_printf("the fitted limit is positive and E_n is already close to it: not an "
                   "embezzler (numeric estimate)");
    case EMBZ_FACT_LIMIT_FAR:
        return embz_strdup_printf("best law by BIC: E ~ %s with a positive limit L = %.4g [%.4g, %.4g] (E_n = "
                   "%.4g at the largest size), g = %.3g [%.3g, %.3g]; %s: inconclusive", law,
                   x[0], x[1], x[2], x[3], x[4], x[5], x[6],
                   f->k1 ? "E_n is still far above the limit"
                         : "the approach to it is too slow to exclude a decay to 0 like a "
                           "power of ln ln n over this range");
    case EMBZ_FACT_LIMIT_SMALL:
        return embz_strdup_printf("the best law by BIC, %s, has a limit L = %.3g [%.3g, %.3g], small against "
                   "E_n = %.3g: treated as 0 (a correction to the leading decay)", law, x[0],
                   x[1], x[2], x[3]);
    case EMBZ_FACT_DECAY_LAW:
        return embz_strdup_printf("E_n decays like %s with C = %.4g [%.4g, %.4g], g = %.4g [%.4g, %.4g] "
                   "(jackknife); largest relative residual %.2g", law, x[0], x[1], x[2], x[3],
                   x[4], x[5], x[6]);
    case EMBZ_FACT_DECAY_TO_ZERO:
        return embz_strdup_printf("the error keeps decreasing towards 0: a universal embezzler (numeric "
                   "estimate; the limit 0 is extrapolated, only E_n <= %s at n = %s is "
                   "certified)", txt(f->s[0]), txt(f->s[1]));
    case EMBZ_FACT_FLAT_LIMIT:
        return embz_strdup_printf("E_n varies by only %.2g (relative) over the fit range and %s fits with "
                   "L = %.6g: positive limit (numeric estimate)", x[0], law, x[1]);
    case EMBZ_FACT_NO_LAW:
        return embz_strdup_printf("no decay law with a visible exponent (best zero-limit law %s has g = %.3g "
                   "[%.3g, %.3g]) and no positive limit resolved: inconclusive", law, x[0],
                   x[1], x[2]);
    case EMBZ_FACT_ASYM_NOT_APPLICABLE:
        return embz_strdup_printf("analytic route not applicable: %s", txt(f->s[0]));
    case EMBZ_FACT_ASYM_FORM:
        return embz_strdup_printf("analytic: f(x) ~ %s as x -> infinity; %s: %s%s%s", txt(f->s[0]),
                   embz_asym_verdict_name(f->v1),
                   txt(f->s[1])[0] ? f->s[1] : "criterion of the divergent sum and the "
                                               "x^(-1 +- eps) bounds",
                   txt(f->s[2])[0] ? "; predicted rate " : "", txt(f->s[2]));
    case EMBZ_FACT_ASYM_LIMIT:
        return embz_strdup_printf("analytic: predicted limit of E_n in [%s, %s] (derived leading-order "
                   "formula)", txt(f->s[0]), txt(f->s[1]));
    case EMBZ_FACT_RATES_DIFFER:
        return embz_strdup_printf("rate classes differ: analytic %s, fitted %s (the fitted law is an estimate "
                   "over a finite range)", txt(f->s[0]), law);
    case EMBZ_FACT_EXPONENTS:
        return embz_strdup_printf("predicted exponent %.4g, fitted %.4g [%.4g, %.4g]", x[0], x[1], x[2], x[3]);
    case EMBZ_FACT_LEVELS:
        return embz_strdup_printf("analytic route not applicable: a level family (numeric "
                                  "verdict from its sizes only)");
    case EMBZ_FACT_DEPENDS_ON_N:
        return embz_strdup_printf("analytic route not applicable: the weight depends on n");
    case EMBZ_FACT_ASYM_NOT_BUILT:
        return embz_strdup_printf("analytic route not built in");
    case EMBZ_FACT_FROM_ANALYTIC:
        return embz_strdup_printf("verdict from the analytic route (numeric route inconclusive)");
    case EMBZ_FACT_DISAGREE:
        return embz_strdup_printf("the routes DISAGREE: analytic says %s, numeric says %s",
                   embz_verdict_id(f->v1), embz_verdict_id(f->v2));
    case EMBZ_FACT_NARROWED:
        return embz_strdup_printf("sizes limited to n <= %ld, the reach of explicit summation: the "
                   "analytic engine cannot take this family (%s)", f->k1, txt(f->s[0]));
    case EMBZ_FACT_AGREE:
        return embz_strdup_printf("analytic and numeric routes agree");
    case EMBZ_FACT_M_LAST:
        return embz_strdup_printf("certified: %s <= %s <= %s at the largest size with a value, n = "
                   "%s%s", txt(f->s[0]), embz_mclassify_distance_name(f->v1), txt(f->s[1]), txt(f->s[2]),
                   f->k1 ? " (n shortened)" : "");
    case EMBZ_FACT_M_BOUNDS:
        return embz_strdup_printf("%ld of %ld sizes have certified bounds only (the largest: %s <= %s "
                   "<= %s at n = %s): used as bounds, left out of the fits", f->k1, f->k2,
                   txt(f->s[1]), embz_mclassify_distance_name(f->v1), txt(f->s[2]), txt(f->s[0]));
    case EMBZ_FACT_M_NO_VALUES:
        return embz_strdup_printf("no size has a certified value (bounds only or failed): no fit");
    case EMBZ_FACT_M_FIT:
        return embz_strdup_printf("%s decays like %s with C = %.4g [%.4g, %.4g], g = %.4g [%.4g, %.4g] "
                   "(jackknife, %ld sizes); largest relative residual %.2g: converges (fitted "
                   "estimate)", embz_mclassify_distance_name(f->v1), law, x[0], x[1], x[2], x[3], x[4], x[5],
                   f->k1, x[6]);
    case EMBZ_FACT_M_FIT_LIMIT:
        if (f->law <= 0)
            return embz_strdup_printf("the distance is constant to relative 1e-9 over the fit "
                       "range, near %.8g: a positive limit, does not converge (fitted "
                       "estimate)", x[0]);
        return embz_strdup_printf("the best law by BIC, %s, has a positive limit %.4g [%.4g, %.4g] "
                   "(%.4g at the largest size): %s (fitted estimate)", law, x[0], x[1], x[2],
                   x[3], f->k1 ? "does not converge" : "inconclusive, the approach is too slow "
                   "to tell");
    case EMBZ_FACT_M_FIT_NONE:
        return embz_strdup_printf("no decay law with a visible exponent (best zero-limit law %s has "
                   "g = %.3g [%.3g, %.3g]) and no positive limit resolved: the fit is "
                   "inconclusive", law, x[0], x[1], x[2]);
    case EMBZ_FACT_M_BY_K:
        if (f->v2 == EMBZ_VERDICT_INCONCLUSIVE)
            return embz_strdup_printf("K classification: inconclusive (its limit estimated in "
                       "[%.4g, %.4g]); %s, so the verdict rests on the fit of the measure "
                       "alone", x[0], x[1], f->k2 ? "O^2 <= 1 - K^2" : "P >= K");
        if (f->k2 && f->v1 == EMBZ_CONVERGE_INCONCLUSIVE)
            return embz_strdup_printf("K classification: %s%s; O^2 <= F_max only bounds the overlap "
                       "from above, so this does not decide it", embz_verdict_id(f->v2),
                       f->k1 ? " (by the analytic criterion)" : " (numeric estimate)");
        return embz_strdup_printf("K classification: %s%s; since %s, the measure %s%s",
                   embz_verdict_id(f->v2),
                   f->k1 ? " (by the analytic criterion)" : " (numeric estimate)",
                   f->k2 ? "O^2 <= F_max <= 1 - K^2 (a K that stays away from 0 keeps the "
                           "overlap away from 1)"
                         : "K <= P <= sqrt(K (2 - K)) (P -> 0 exactly when K -> 0)",
                   f->v1 == EMBZ_CONVERGE_YES ? "converges" : "does not converge",
                   f->k1 ? " (proven)" : " (as certain as the K verdict, an estimate)");
    case EMBZ_FACT_M_SANDWICH_RATE:
        return embz_strdup_printf("rate: K fits %s with g = %.4g [%.4g, %.4g] (estimate); since K <= "
                   "P <= sqrt(2 K), %s decays with an exponent between %.4g and %.4g of that law "
                   "(the bracket is a theorem, the exponent a fit)", law, x[0], x[1], x[2],
                   f->k1 ? "1 - F_max = P^2" : "P", f->k1 ? x[0] : x[0] / 2,
                   f->k1 ? 2 * x[0] : x[0]);
    case EMBZ_FACT_M_HARMONIC:
        return embz_strdup_printf("law (derived for the weight 1/i, d = %ld): 1 - O = C_%ld(n) / H_n "
                   "exactly, with C_%ld(n) increasing to a finite limit C_%ld in [%s, %s] "
                   "(certified from n = %s); so O converges (proven) and 1 - O ~ C_%ld / ln n",
                   f->k1, f->k1, f->k1, f->k1, txt(f->s[0]), txt(f->s[1]), txt(f->s[2]), f->k1);
    case EMBZ_FACT_M_HARMONIC_P:
        return embz_strdup_printf("law (derived for the weight 1/i, one ebit): F_max >= O^2 and 1 - O = "
                   "C_2(n) / H_n give 1 - F_max <= 2 C_2 / H_n, so P <= sqrt(2 C_2 / H_n) at "
                   "every n (proven, order (ln n)^-1/2), with C_2 in [%s, %s]; P >= K = E_n, "
                   "about ln 2 / ln n (proven). Certified (1 - F_max) / (1 - O^2) = %s at the "
                   "largest size with a value", txt(f->s[0]), txt(f->s[1]), txt(f->s[2]));
    case EMBZ_FACT_M_AGREE:
        return embz_strdup_printf("the fit agrees");
    case EMBZ_FACT_M_DISAGREE:
        if (f->k2)
            return embz_strdup_printf("the fit says %s, but K's fitted limit is positive and P >= K: "
                       "the estimates disagree, inconclusive", embz_converge_id(f->v2));
        return embz_strdup_printf("the fit says %s against %s%s", embz_converge_id(f->v2),
                   embz_converge_id(f->v1), f->k1 ? " (proven; kept)" : ": inconclusive");
    default:
        return embz_strdup_printf("(unknown fact %d)", f->kind);
    }
}

char *embz_sweep_narrow_text(const embz_sweep_struct *s)
{
    if (!s->narrowed) return NULL;
    embz_classify_fact_struct f;
    memset(&f, 0, sizeof(f));
    f.kind = EMBZ_FACT_NARROWED;
    f.law = -1;
    f.k1 = (long) s->reach;
    f.s[0] = (char *) s->narrow_why;
    return embz_classify_fact_text(&f);
}
