/* The list of facts behind a verdict (private, classify_impl.h). */
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include "classify_impl.h"

static char *dup_text(const char *t)
{
    if (t == NULL) return NULL;
    size_t l = strlen(t) + 1;
    char *d = malloc(l);
    memcpy(d, t, l);
    return d;
}

embz_classify_fact_struct *_embz_fact_new(embz_classify_fact_struct *facts, slong *n, int kind)
{
    if (*n >= EMBZ_CLASSIFY_MAX_REASONS) return NULL;
    embz_classify_fact_struct *f = facts + (*n)++;
    memset(f, 0, sizeof(*f));
    f->kind = kind;
    f->law = -1;
    for (int j = 0; j < 8; j++) f->x[j] = NAN;
    return f;
}

embz_classify_fact_struct *_embz_fact_add(embz_classify_fact_struct *facts, slong *n, int kind,
                                          int law, const char *s0, const char *s1,
                                          const char *s2, int nx, const double *x)
{
    embz_classify_fact_struct *f = _embz_fact_new(facts, n, kind);
    if (f == NULL) return NULL;
    f->law = law;
    f->s[0] = dup_text(s0);
    f->s[1] = dup_text(s1);
    f->s[2] = dup_text(s2);
    for (int j = 0; j < nx && j < 8; j++) f->x[j] = x[j];
    return f;
}

void _embz_facts_clear(embz_classify_fact_struct *facts, slong *n)
{
    for (slong k = 0; k < *n; k++)
        for (int j = 0; j < 3; j++) free(facts[k].s[j]);
    *n = 0;
}
