/* The engine object: one family at one precision, reused across sizes (a tail certified
 * once serves every size up to nmax when the weights do not depend on n), with the caller's
 * decision threshold and limits. */
#include <string.h>
#include <time.h>
#include "impl.h"

static double mono_seconds(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

/* 0: go on; 1: cancelled; 2: past the deadline */
int _embz_an_limits_reached(const volatile int *cancel, double deadline)
{
    if (cancel != NULL && *cancel) return 1;
    if (deadline > 0 && mono_seconds() > deadline) return 2;
    return 0;
}

/* 1 when the caller's limits say stop (and c->stopped says why) */
int _embz_an_should_stop(actx *c)
{
    if (!c->stopped) c->stopped = _embz_an_limits_reached(c->cancel, c->deadline);
    return c->stopped != 0;
}

void embz_analytic_init(embz_analytic_t a, const embz_family_t f, slong prec)
{
    memset(a, 0, sizeof(*a));
    a->f = f;
    a->prec = prec;
    a->uses_n = (embz_expr_uses(f->weight) & EMBZ_USES_N) != 0;
    fmpz_init(a->nmax);
}

void embz_analytic_clear(embz_analytic_t a)
{
    if (a->have_tail) embz_tail_clear(a->tail);
    fmpz_clear(a->nmax);
    if (a->have_decide) { arf_clear(a->decide); arf_clear(a->decide_lo); }
}

void embz_analytic_set_decision(embz_analytic_t a, const arb_t threshold)
{
    if (!a->have_decide) { arf_init(a->decide); arf_init(a->decide_lo); }
    a->have_decide = 1;
    /* above: beyond every point of the threshold's ball; below: under every point */
    arb_get_ubound_arf(a->decide, threshold, 4 * a->prec);
    arb_get_lbound_arf(a->decide_lo, threshold, 4 * a->prec);
}

void embz_analytic_set_limits(embz_analytic_t a, const volatile int *cancel, double seconds)
{
    a->cancel = cancel;
    a->deadline = seconds > 0 ? mono_seconds() + seconds : 0;
}

void embz_analytic_clear_decision(embz_analytic_t a)
{
    if (a->have_decide) { arf_clear(a->decide); arf_clear(a->decide_lo); }
    a->have_decide = 0;
}

/* Certify the tail once for all sizes up to nmax (weights that do not depend on n). */
int embz_analytic_prepare(embz_analytic_t a, const fmpz_t nmax, embz_err_t *err)
{
    if (a->uses_n) return EMBZ_OK;
    if (a->have_tail && fmpz_cmp(a->nmax, nmax) >= 0) return EMBZ_OK;
    if (a->have_tail) embz_tail_clear(a->tail);
    a->have_tail = 0;
    slong wp = a->prec + 32;
    int st = EMBZ_ERR_UNSUPPORTED;
    for (slong M = 64; M <= 4096; M *= 4) {
        embz_err_clear(err);
        st = embz_tail_init(a->tail, a->f->weight, nmax, M, nmax, wp, err);
        if (st == EMBZ_OK) {
            a->have_tail = 1;
            fmpz_set(a->nmax, nmax);
            break;
        }
        embz_tail_clear(a->tail);
        if (st == EMBZ_ERR_DOMAIN) break;
    }
    return st;
}
