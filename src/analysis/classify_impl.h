/* Private to src/analysis: the list of facts behind a verdict (facts.c), shared by the
 * classification of K (classify.c) and of a fidelity measure (mclassify.c), and the decision
 * constants both use. */
#ifndef EMBZ_CLASSIFY_IMPL_H
#define EMBZ_CLASSIFY_IMPL_H

#include "embz/analysis.h"

/* Decision constants of the numeric route (estimates; see docs/analysis.md). */
#define G_MIN 0.03          /* smallest fitted decay exponent counted as visible decay */
#define FLAT_REL 1e-9       /* relative spread of E over the fit range counted as "flat" */
#define LIMIT_NEAR 0.5      /* a fitted limit L counts as reached when L_lo > LIMIT_NEAR E_N */
#define LIMIT_SMALL 0.1     /* a fitted limit below LIMIT_SMALL E_N counts as 0 */
#define G_SLOW 0.75         /* slowest resolved approach (ln n)^-g to a positive limit */

/* A new fact of this kind at the end of facts[0 .. *n) (all numbers NaN, no texts, law -1),
 * or NULL when the list (EMBZ_CLASSIFY_MAX_REASONS) is full. */
embz_classify_fact_struct *_embz_fact_new(embz_classify_fact_struct *facts, slong *n, int kind);
/* The same with up to three texts (copied; NULL for none) and the first nx numbers of x. */
embz_classify_fact_struct *_embz_fact_add(embz_classify_fact_struct *facts, slong *n, int kind,
                                          int law, const char *s0, const char *s1,
                                          const char *s2, int nx, const double *x);
/* Free the texts of facts[0 .. *n) and set *n = 0. */
void _embz_facts_clear(embz_classify_fact_struct *facts, slong *n);

#endif
