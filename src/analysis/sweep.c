/* Sweeps: the certified error E_n(q) at log-spaced sizes, with one analytic engine reused
 * across all sizes. */
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include <time.h>
#include "embz/analysis.h"
#include "embz/error.h"
#include "embz/util.h"
#ifdef _OPENMP
#include <omp.h>
#endif

static double now_seconds(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

void embz_sweep_init(embz_sweep_t s)
{
    s->pts = NULL;
    s->len = 0;
    s->nok = 0;
    s->prec = 0;
    s->target[0] = '\0';
    s->narrowed = 0;
    s->reach = 0;
    s->narrow_why[0] = '\0';
}

static void point_init(embz_sweep_point_struct *p)
{
    memset(p, 0, sizeof(*p));
    fmpz_init(p->n);
    fmpz_init(p->argk);
    arb_init(p->error);
    arb_init(p->lower);
    arb_init(p->upper);
    p->status = EMBZ_ERR_UNSUPPORTED;
}

static void point_clear(embz_sweep_point_struct *p)
{
    fmpz_clear(p->n);
    fmpz_clear(p->argk);
    arb_clear(p->error);
    arb_clear(p->lower);
    arb_clear(p->upper);
}

void embz_sweep_clear(embz_sweep_t s)
{
    for (slong j = 0; j < s->len; j++) point_clear(s->pts + j);
    free(s->pts);
    embz_sweep_init(s);
}

/* ln n as a double, also for n far beyond the double range. */
static double fmpz_log_d(const fmpz_t n)
{
    slong bits = fmpz_bits(n);
    if (bits <= 1000) return log(fmpz_get_d(n));
    fmpz_t t;
    fmpz_init(t);
    fmpz_fdiv_q_2exp(t, n, (ulong) (bits - 60));
    double r = log(fmpz_get_d(t)) + (double) (bits - 60) * log(2.0);
    fmpz_clear(t);
    return r;
}

int embz_sweep_sizes(fmpz *sizes, slong *len, const fmpz_t a, const fmpz_t b, slong k,
                     embz_err_t *err)
{
    *len = 0;
    if (fmpz_cmp_ui(a, 1) < 0 || fmpz_cmp(a, b) > 0)
        return embz_err_set(err, EMBZ_ERR_INPUT, "the size range must satisfy 1 <= from <= to");
    if (k < 1) return embz_err_set(err, EMBZ_ERR_INPUT, "at least one point is needed");
    slong prec = fmpz_bits(b) + 64;
    arb_t la, lb, x, t;
    arb_init(la); arb_init(lb); arb_init(x); arb_init(t);
    arb_set_fmpz(x, a);
    arb_log(la, x, prec);
    arb_set_fmpz(x, b);
    arb_log(lb, x, prec);
    arb_sub(lb, lb, la, prec);         /* lb <- ln b - ln a */
    fmpz_t z;
    fmpz_init(z);
    for (slong j = 0; j < k; j++) {
        if (j == 0) fmpz_set(z, a);
        else if (j == k - 1) fmpz_set(z, b);
        else {
            arb_mul_si(t, lb, j, prec);
            arb_div_si(t, t, k - 1, prec);
            arb_add(t, t, la, prec);
            arb_exp(x, t, prec);
            /* nearest integer to the midpoint (x + 1/2 floored) */
            arb_set_d(t, 0.5);
            arb_add(x, x, t, prec);
            arf_get_fmpz(z, arb_midref(x), ARF_RND_FLOOR);
            if (fmpz_cmp(z, a) < 0) fmpz_set(z, a);
            if (fmpz_cmp(z, b) > 0) fmpz_set(z, b);
        }
        if (*len > 0 && fmpz_cmp(z, sizes + *len - 1) <= 0) continue;
        fmpz_set(sizes + *len, z);
        (*len)++;
    }
    fmpz_clear(z);
    arb_clear(la); arb_clear(lb); arb_clear(x); arb_clear(t);
    return EMBZ_OK;
}


static void take_result(embz_sweep_point_struct *p, const embz_error_result_t r)
{
    arb_set(p->error, r->error);
    fmpz_set(p->argk, r->argk);
    p->have_bounds = r->have_bounds;
    if (r->have_bounds) {
        arb_set(p->lower, r->lower);
        arb_set(p->upper, r->upper);
    }
    p->method = r->method;
    p->how = r->how;
    p->note[0] = '\0';
}

/* One size of a sweep under the sweep's policy (see sweep_opts): fills p (status, result or
 * note) and, on failure, why. */
static int sweep_point(embz_sweep_point_struct *p, embz_error_result_t r, const embz_eval_t ev,
                       embz_eval_work_t w, const embz_target_t q, char *why)
{
    embz_err_t e2;
    embz_err_clear(&e2);
    int ps = embz_eval_error(r, ev, w, p->n, q, &e2);
    if (ps == EMBZ_OK)
        r->method = (r->used & (1 << EMBZ_METHOD_EXPLICIT)) ? EMBZ_METHOD_EXPLICIT
                                                            : EMBZ_METHOD_ANALYTIC;
    else snprintf(why, 200, "%.190s", e2.text);
    p->status = ps;
    if (ps == EMBZ_OK) take_result(p, r);
    else snprintf(p->note, sizeof(p->note), "skipped: %s",
                  why[0] ? why : "no method handles this size");
    return ps;
}

/* The sweep's policy: the default one (its tail certified once for the largest size), and
 * an enclosure with too few certified bits for the fits is retried at 2x, 4x and 8x the
 * precision. */
static void sweep_opts(embz_eval_opts_t o)
{
    embz_eval_opts_init(o);
    o->digit_steps = 4;
}

void embz_sweep_opts_init(embz_sweep_opts_t o)
{
    memset(o, 0, sizeof(*o));
}

/* The points of s at sizes a .. b (k log-spaced), their statuses "not computed". */
static int set_points(embz_sweep_t s, const fmpz_t a, const fmpz_t b, slong k, embz_err_t *err)
{
    for (slong j = 0; j < s->len; j++) point_clear(s->pts + j);
    free(s->pts);
    s->pts = NULL;
    s->len = 0;
    fmpz *sizes = _fmpz_vec_init(k > 0 ? k : 1);
    slong len = 0;
    int st = embz_sweep_sizes(sizes, &len, a, b, k, err);
    if (st == EMBZ_OK) {
        s->pts = malloc((size_t) len * sizeof(embz_sweep_point_struct));
        if (s->pts == NULL) abort();
        s->len = len;
        for (slong j = 0; j < len; j++) {
            point_init(s->pts + j);
            fmpz_set(s->pts[j].n, sizes + j);
            s->pts[j].log_n = fmpz_log_d(sizes + j);
        }
    }
    _fmpz_vec_clear(sizes, k > 0 ? k : 1);
    return st;
}

int embz_sweep_run(embz_sweep_t s, const embz_family_t f, const fmpz_t a, const fmpz_t b,
                   slong k, const embz_target_t q, slong prec, embz_progress_fn progress,
                   void *ctx, embz_err_t *err)
{
    return embz_sweep_run_opts(s, f, a, b, k, q, NULL, prec, progress, ctx, err);
}

int embz_sweep_run_opts(embz_sweep_t s, const embz_family_t f, const fmpz_t a,
                        const fmpz_t b, slong k, const embz_target_t q,
                        const embz_sweep_opts_t so, slong prec, embz_progress_fn progress,
                        void *ctx, embz_err_t *err)
{
    embz_sweep_opts_t dflt;
    embz_sweep_opts_init(dflt);
    const embz_sweep_opts_struct *o = so != NULL ? so : dflt;
    slong reach = o->explicit_reach > 0 ? o->explicit_reach : EMBZ_EXPLICIT_REACH;
    embz_sweep_clear(s);
    int st = set_points(s, a, b, k, err);
    if (st != EMBZ_OK) return st;
    s->prec = prec;
    snprintf(s->target, sizeof(s->target), "%s", q->label);

    int stop = 0, fail_domain = 0, cancelled = 0;
    slong done = 0, domain_at = -1;
    char domain_why[200] = "";
    embz_eval_opts_t eo;
    embz_eval_t ev;
    sweep_opts(eo);
    eo->cancel = o->cancel;
    eo->seconds = o->seconds;
    embz_eval_init(ev, f, eo, prec);
    /* The first workspace is prepared for the largest size up front, which also decides
     * whether the analytic engine applies at all; where it does not, sizes beyond the reach
     * of explicit summation would all be skipped, and the range is narrowed to it. */
    embz_eval_work_t w0;
    embz_eval_work_init(w0);
    {
        embz_err_t e2;
        embz_err_clear(&e2);
        int ps = embz_eval_prepare(ev, w0, s->pts[s->len - 1].n, &e2);
        if (ps != EMBZ_OK) {
            embz_eval_work_clear(w0);
            embz_eval_clear(ev);
            return embz_err_set(err, ps, "%s", e2.text);
        }
    }
    if (!ev->analytic_ok && !o->keep_range && fmpz_cmp_si(b, reach) > 0
        && fmpz_cmp_si(a, reach) <= 0) {
        fmpz_t r;
        fmpz_init_set_si(r, reach);
        set_points(s, a, r, k, err);
        fmpz_clear(r);
        s->narrowed = 1;
        s->reach = reach;
        snprintf(s->narrow_why, sizeof(s->narrow_why), "%s", ev->prep_reason);
    }
    slong len = s->len;

    /* Sizes are independent: they are shared out among OpenMP threads (dynamic schedule,
     * largest first), each with a workspace of its own, its tail certified once for the
     * largest size. A weight found invalid stops every thread. */
    int nthreads = 1;
#ifdef _OPENMP
    /* not from inside another parallel region (a scan): threads created there would end
     * with their FLINT caches */
    if (omp_get_level() == 0) nthreads = omp_get_max_threads();
#endif
    if (o->threads > 0 && o->threads < nthreads) nthreads = o->threads;
    if (nthreads > len) nthreads = (int) len;
    if (nthreads < 1) nthreads = 1;
    /* one workspace per thread, the first the one prepared above */
    embz_eval_work_struct *work = flint_malloc((size_t) nthreads * sizeof(embz_eval_work_struct));
    char *used = flint_calloc((size_t) nthreads, 1);
    work[0] = w0[0];
    for (int i = 1; i < nthreads; i++) embz_eval_work_init(work + i);
#ifdef _OPENMP
#pragma omp parallel num_threads(nthreads)
#endif
    {
        int tid = 0;
#ifdef _OPENMP
        tid = omp_get_thread_num();
#endif
        embz_eval_work_struct *wk = work + tid;
        embz_error_result_t r;
        embz_error_result_init(r);
#ifdef _OPENMP
#pragma omp for schedule(dynamic, 1)
#endif
        for (slong jj = 0; jj < len; jj++) {
            slong j = len - 1 - jj;                 /* largest (slowest) sizes first */
            int halt;
#ifdef _OPENMP
#pragma omp atomic read
#endif
            halt = stop;
            if (halt) continue;
            if (o->cancel != NULL && *o->cancel) {
#ifdef _OPENMP
#pragma omp atomic write
#endif
                cancelled = 1;
#ifdef _OPENMP
#pragma omp atomic write
#endif
                stop = 1;
                continue;
            }
            embz_sweep_point_struct *p = s->pts + j;
            char why[200] = "";
            double t0 = now_seconds();
            int ps = sweep_point(p, r, ev, wk, q, why);
            p->seconds = now_seconds() - t0;
#ifdef _OPENMP
#pragma omp critical(embz_sweep)
#endif
            {
                if (ps == EMBZ_ERR_DOMAIN && !fail_domain) {
                    fail_domain = 1;
                    domain_at = j;
                    snprintf(domain_why, sizeof(domain_why), "%.190s", why);
                }
                if (ps == EMBZ_ERR_DOMAIN
                    || (ps == EMBZ_ERR_LIMIT && o->cancel != NULL && *o->cancel)) {
                    if (ps == EMBZ_ERR_LIMIT) cancelled = 1;
#ifdef _OPENMP
#pragma omp atomic write
#endif
                    stop = 1;
                }
                done++;
                if (progress != NULL && !stop) progress(ctx, done, len);
            }
        }
        embz_error_result_clear(r);
        embz_eval_work_clear(wk);   /* in the thread that used it (its FLINT caches) */
        used[tid] = 1;
    }
    for (int i = 0; i < nthreads; i++)       /* a team may come out smaller than asked */
        if (!used[i]) embz_eval_work_clear(work + i);
    flint_free(work);
    flint_free(used);
    embz_eval_clear(ev);
    if (fail_domain) {
        /* the weight itself is invalid: no point in going on */
        char *ns = embz_fmpz_string(s->pts[domain_at].n, 30);
        st = embz_err_set(err, EMBZ_ERR_DOMAIN, "n = %s: %s", ns, domain_why);
        free(ns);
        return st;
    }
    if (cancelled) return embz_err_set(err, EMBZ_ERR_LIMIT, "cancelled");
    int last_fail = EMBZ_OK;
    s->nok = 0;
    for (slong j = 0; j < len; j++) {
        if (s->pts[j].status == EMBZ_OK) s->nok++;
        else last_fail = s->pts[j].status;
    }
    if (s->nok == 0) {
        st = embz_err_set(err, last_fail ? last_fail : EMBZ_ERR_UNSUPPORTED,
                          "no size of the sweep could be computed: %s", s->pts[len - 1].note);
    }
    return st;
}
