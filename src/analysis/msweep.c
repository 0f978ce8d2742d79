/* A fidelity-type measure over log-spaced sizes (embz/analysis.h): one embz_fidelity call per
 * size, in order; the sizes are those of embz_sweep_sizes. */
#include <string.h>
#include <time.h>
#include "embz/analysis.h"

static double now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

void embz_msweep_init(embz_msweep_t s)
{
    s->len = 0;
    s->measure = EMBZ_MEASURE_FIDELITY;
    s->pts = NULL;
}

void embz_msweep_clear(embz_msweep_t s)
{
    for (slong j = 0; j < s->len; j++) {
        fmpz_clear(s->pts[j].n);
        embz_fidelity_result_clear(&s->pts[j].res);
    }
    flint_free(s->pts);
    embz_msweep_init(s);
}

int embz_msweep_run(embz_msweep_t s, const embz_family_t f, const fmpz_t a, const fmpz_t b,
                    slong k, const embz_target_t q, int measure, slong prec,
                    embz_progress_fn progress, void *ctx, embz_err_t *err)
{
    if (measure != EMBZ_MEASURE_FIDELITY && measure != EMBZ_MEASURE_PURIFIED &&
        measure != EMBZ_MEASURE_OVERLAP)
        return embz_err_set(err, EMBZ_ERR_INPUT, "measure '%s' is not a fidelity measure",
                            embz_measure_name(measure));
    embz_msweep_clear(s);
    if (k < 1) return embz_err_set(err, EMBZ_ERR_INPUT, "a sweep needs at least one size");
    fmpz *sizes = _fmpz_vec_init(k);
    slong len = 0;
    int st = embz_sweep_sizes(sizes, &len, a, b, k, err);
    if (st != EMBZ_OK) {
        _fmpz_vec_clear(sizes, k);
        return st;
    }
    s->pts = flint_malloc(sizeof(embz_msweep_point_struct) * (size_t) len);
    s->len = len;
    s->measure = measure;
    for (slong j = 0; j < len; j++) {
        embz_msweep_point_struct *p = s->pts + j;
        fmpz_init_set(p->n, sizes + j);
        embz_fidelity_result_init(&p->res);
        snprintf(p->note, sizeof(p->note), "not computed");
        p->status = EMBZ_ERR_LIMIT;
        p->seconds = 0;
    }
    int ok = 0, last = EMBZ_OK;
    for (slong j = 0; j < len; j++) {
        embz_msweep_point_struct *p = s->pts + j;
        p->note[0] = '\0';
        embz_err_t e;
        embz_err_clear(&e);
        double t0 = now();
        p->status = embz_fidelity(&p->res, f, p->n, q, measure, EMBZ_METHOD_AUTO, prec, &e);
        p->seconds = now() - t0;
        if (p->status == EMBZ_OK) ok = 1;
        else {
            snprintf(p->note, sizeof(p->note), "%.255s", e.text);
            last = p->status;
            if (err != NULL) *err = e;
            if (p->status == EMBZ_ERR_DOMAIN) break;
        }
        if (progress != NULL) progress(ctx, j + 1, len);
    }
    _fmpz_vec_clear(sizes, k);
    if (ok) return EMBZ_OK;
    return last != EMBZ_OK ? last : embz_err_set(err, EMBZ_ERR_INPUT, "no sizes");
}
