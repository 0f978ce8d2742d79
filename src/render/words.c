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
