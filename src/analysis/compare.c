/* Comparing families (see include/embz/compare.h): the computation behind a comparison row,
 * families in parallel. Everything here is numbers and flags; the words are the renderers'. */
#include <stdlib.h>
#include <string.h>
#include <time.h>
#ifdef _OPENMP
#include <omp.h>
#endif
#include "embz/compare.h"
#include "embz/asym.h"
#include "embz/defaults.h"

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

int embz_threads_available(void)
{
#ifdef _OPENMP
    return omp_get_num_procs();
#else
    return 1;
#endif
}

int embz_threads_default(void)
{
#ifdef _OPENMP
    int t = omp_get_max_threads();
#else
    int t = 1;
#endif
    return t < 1 ? 1 : t > EMBZ_THREADS_MAX ? EMBZ_THREADS_MAX : t;
}

void embz_compare_opts_init(embz_compare_opts_t o)
{
    memset(o, 0, sizeof(*o));
    fmpz_init(o->from);
    fmpz_init(o->to);
    embz_default_range(o->from, o->to);
    o->points = EMBZ_RANGE_POINTS;
    o->prec = EMBZ_PREC_MANY;
    o->threads = 1;
}

void embz_compare_opts_clear(embz_compare_opts_t o)
{
    fmpz_clear(o->from);
    fmpz_clear(o->to);
}

void embz_compare_row_init(embz_compare_row_struct *r, const embz_family_struct *f,
                           const embz_compare_opts_t o)
{
    memset(r, 0, sizeof(*r));
    r->fam = f;
    embz_classify_init(r->c);
    arb_init(r->limit);
    r->summable = -1;
    embz_sweep_init(r->tsweep);
    embz_fitset_init(r->tfits);
    r->err_at = _arb_vec_init(o->nsizes > 0 ? o->nsizes : 1);
    r->err_status = calloc((size_t) o->nsizes + 1, sizeof(int));
    r->err_why = calloc((size_t) o->nsizes + 1, sizeof(char *));
    r->need = calloc((size_t) o->ngoals + 1, sizeof(embz_size_result_struct));
    r->need_status = calloc((size_t) o->ngoals + 1, sizeof(int));
    r->never = calloc((size_t) o->ngoals + 1, sizeof(int));
    for (slong j = 0; j < o->ngoals; j++) {
        embz_size_result_init(r->need + j);
        r->need_status[j] = -1;
    }
    for (slong j = 0; j < o->nsizes; j++) r->err_status[j] = -1;
}

void embz_compare_row_clear(embz_compare_row_struct *r, const embz_compare_opts_t o)
{
    embz_classify_clear(r->c);
    arb_clear(r->limit);
    embz_sweep_clear(r->tsweep);
    embz_fitset_clear(r->tfits);
    _arb_vec_clear(r->err_at, o->nsizes > 0 ? o->nsizes : 1);
    free(r->err_status);
    for (slong j = 0; j < o->nsizes; j++) free(r->err_why[j]);
    free(r->err_why);
    for (slong j = 0; j < o->ngoals; j++) embz_size_result_clear(r->need + j);
    free(r->need);
    free(r->need_status);
    free(r->never);
}

void embz_compare_eval_opts(embz_eval_opts_t o)
{
    embz_eval_opts_init(o);
}

int embz_errors_at(arb_ptr E, int *status, embz_err_t *errs, const embz_family_t f,
                   const fmpz *sizes, slong len, const embz_target_t q, slong prec)
{
    embz_eval_opts_t eo;
    embz_eval_t ev;
    embz_eval_work_t wk;
    embz_compare_eval_opts(eo);
    embz_eval_init(ev, f, eo, prec);
    embz_eval_work_init(wk);
    int ret = EMBZ_OK;
    for (slong j = 0; j < len; j++) status[j] = -1;
    for (slong j = 0; j < len; j++) {
        embz_error_result_t res;
        embz_err_t err;
        embz_error_result_init(res);
        embz_err_clear(&err);
        status[j] = embz_eval_error(res, ev, wk, sizes + j, q, &err);
        if (status[j] == EMBZ_OK) arb_set(E + j, res->error);
        if (errs != NULL) errs[j] = err;
        embz_error_result_clear(res);
        if (status[j] == EMBZ_ERR_DOMAIN) {
            ret = EMBZ_ERR_DOMAIN;
            break;
        }
    }
    embz_eval_work_clear(wk);
    embz_eval_clear(ev);
    return ret;
}

static char *sdup(const char *s)
{
    size_t l = strlen(s) + 1;
    char *d = malloc(l);
    memcpy(d, s, l);
    return d;
}

static int is_one_ebit(const embz_target_t q)
{
    return q->kind == EMBZ_TARGET_UNIFORM && q->d == 2;
}

/* One family, start to end; only this row's objects are touched (safe in parallel). */
static void compute_row(embz_compare_row_struct *r, const embz_compare_opts_t o,
                        const embz_target_t q)
{
    double t0 = now_s();
    embz_err_t err;
    embz_classify_opts_t co;
    embz_classify_opts_init(co);
    embz_err_clear(&err);
    int status = EMBZ_OK;

    /* 1. one-ebit classification */
    fmpz_set(co->from, o->from);
    fmpz_set(co->to, o->to);
    co->points = o->points;
    co->prec = o->prec;
    co->use_analytic = 1;
    if ((status = embz_classify(r->c, r->fam, co, NULL, NULL, &err)) != EMBZ_OK) goto fail;

    /* the asymptotic route's facts used for "never" and for the one-line reasons */
    if (!(embz_expr_uses(r->fam->weight) & EMBZ_USES_N)) {
        embz_asym_result_t ar;
        embz_err_t e2;
        embz_err_clear(&e2);
        embz_asym_result_init(ar);
        if (embz_asym_analyse(ar, r->fam->weight, 128, &e2) == EMBZ_OK) {
            r->summable = ar->sum_diverges == 1 ? 0 : ar->sum_diverges == 0 ? 1 : -1;
            if (ar->limit_known) {
                r->limit_known = 1;
                arb_set(r->limit, ar->limit);
            }
        }
        embz_asym_result_clear(ar);
    }

    /* 2. the sweep for the target (the classification sweep when the target is one ebit) */
    if (!is_one_ebit(q)) {
        r->own_sweep = 1;
        embz_err_clear(&err);
        status = embz_sweep_run(r->tsweep, r->fam, o->from, o->to, o->points, q, o->prec,
                                NULL, NULL, &err);
        if (status != EMBZ_OK) goto fail;
        embz_err_clear(&err);
        r->tfit_ok = embz_fit_sweep(r->tfits, r->tsweep, &err) == EMBZ_OK;
        embz_err_clear(&err);
    }

    /* 3. certified errors at the chosen sizes */
    if (o->nsizes > 0) {
        embz_err_t *errs = calloc((size_t) o->nsizes, sizeof(embz_err_t));
        status = embz_errors_at(r->err_at, r->err_status, errs, r->fam, o->sizes, o->nsizes,
                                q, o->prec);
        for (slong j = 0; j < o->nsizes; j++)
            if (r->err_status[j] != EMBZ_OK && r->err_status[j] != -1)
                r->err_why[j] = sdup(errs[j].text[0] ? errs[j].text : "no enclosure");
        for (slong j = 0; j < o->nsizes; j++)
            if (r->err_status[j] == EMBZ_ERR_DOMAIN) err = errs[j];
        free(errs);
        if (status == EMBZ_ERR_DOMAIN) goto fail;
        status = EMBZ_OK;
    }

    /* 4. sizes for the goals, resolved to the number of qubits */
    for (slong j = 0; j < o->ngoals; j++) {
        arb_t g;
        arb_init(g);
        arb_set_fmpq(g, o->goals + j, 4 * o->prec);
        embz_err_clear(&err);
        r->need_status[j] = embz_size_solve_qubits(r->need + j, r->fam, g, q, o->prec, &err);
        if (r->need_status[j] == EMBZ_OK)
            r->never[j] = embz_size_never(r->need + j, r->limit_known, r->limit, q, g);
        arb_clear(g);
        if (r->need_status[j] == EMBZ_ERR_DOMAIN) {
            status = EMBZ_ERR_DOMAIN;
            goto fail;
        }
    }
    r->status = EMBZ_OK;
    goto done;
fail:
    r->status = status == EMBZ_OK ? EMBZ_ERR_UNSUPPORTED : status;
    embz_err_format(r->message, sizeof(r->message), &err);
done:
    r->seconds = now_s() - t0;
    embz_classify_opts_clear(co);
}

int embz_compare_run(embz_compare_row_struct *const *rows, slong nfam,
                     const embz_compare_opts_t o, embz_compare_progress_fn progress, void *ctx)
{
    embz_target_t ebit;
    embz_target_init(ebit);
    const embz_target_struct *q = o->target != NULL ? o->target : ebit;
    slong done = 0;
#ifdef _OPENMP
#pragma omp parallel for schedule(dynamic, 1) num_threads(o->threads > 0 ? o->threads : 1)
#endif
    for (slong i = 0; i < nfam; i++) {
        compute_row(rows[i], o, q);
        if (progress != NULL) {
#ifdef _OPENMP
#pragma omp critical(embz_compare_progress)
#endif
            {
                done++;
                progress(ctx, i, done, nfam);
            }
        }
    }
    embz_target_clear(ebit);
    return EMBZ_OK;
}
