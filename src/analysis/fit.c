/* Fits of candidate decay laws to a sweep (double precision estimates, not certified).
 *
 * Residuals are relative, r_j = (model_j - E_j) / E_j, so that every law is judged on the same
 * scale. The two-parameter laws C (ln n)^-g and C (ln ln n)^-g are straight lines after taking
 * logarithms and are solved by GSL's linear regression (gsl_fit_wlinear). The laws with a limit,
 * L + C h(n)^-g, are linear in (L, C) for fixed g: for each g the weighted linear problem is
 * solved by gsl_multifit_wlinear, and the profile RSS(g) is minimised over g by a scan followed
 * by GSL's Brent minimiser (variable projection). Uncertainties come from a jackknife over the
 * sizes (leave one out, refit). Models are ranked by BIC = m ln(RSS/m) + k ln m. */
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_fit.h>
#include <gsl/gsl_multifit.h>
#include <gsl/gsl_min.h>
#include <pthread.h>
#include "embz/analysis.h"

/* Relative residuals below this level are rounding noise of the double-precision data. */
#define RSS_FLOOR_PER_POINT 1e-28

const char *embz_law_formula(int law)
{
    switch (law) {
    case EMBZ_LAW_POWER_LIMIT: return "L + C n^-g";
    case EMBZ_LAW_LOG: return "C (ln n)^-g";
    case EMBZ_LAW_LOGLOG: return "C (ln ln n)^-g";
    case EMBZ_LAW_LOG_LIMIT: return "L + C (ln n)^-g";
    default: return "none";
    }
}

const char *embz_law_id(int law)
{
    switch (law) {
    case EMBZ_LAW_POWER_LIMIT: return "power_limit";
    case EMBZ_LAW_LOG: return "log";
    case EMBZ_LAW_LOGLOG: return "loglog";
    case EMBZ_LAW_LOG_LIMIT: return "log_limit";
    default: return "none";
    }
}

void embz_fitset_init(embz_fitset_t fs)
{
    memset(fs, 0, sizeof(*fs));
    fs->best = EMBZ_LAW_NONE;
}

void embz_fitset_clear(embz_fitset_t fs)
{
    for (int l = 0; l < EMBZ_LAW_COUNT; l++) free(fs->fits[l].resid);
    free(fs->logn);
    free(fs->E);
    embz_fitset_init(fs);
}

/* The "h" of each law at x = ln n: the model is L + C h^-g (L = 0 for the pure laws);
 * we work with u = ln h. */
static double law_u(int law, double x)
{
    switch (law) {
    case EMBZ_LAW_POWER_LIMIT: return x;                  /* h = n */
    case EMBZ_LAW_LOG: case EMBZ_LAW_LOG_LIMIT: return log(x);   /* h = ln n */
    case EMBZ_LAW_LOGLOG: return log(log(x));             /* h = ln ln n */
    default: return 0.0;
    }
}

static int law_has_limit(int law)
{
    return law == EMBZ_LAW_POWER_LIMIT || law == EMBZ_LAW_LOG_LIMIT;
}

typedef struct {
    double L, C, g, rss;
    int ok;
} params_t;

/* ---- pure laws: ln E = ln C - g u, weighted so that the residual is relative ---- */
static params_t fit_pure(int law, const double *u, const double *E, slong m, slong skip)
{
    params_t p = { 0, 0, 0, INFINITY, 0 };
    double *x = malloc((size_t) m * sizeof(double)), *y = malloc((size_t) m * sizeof(double));
    double *w = malloc((size_t) m * sizeof(double));
    slong k = 0;
    for (slong j = 0; j < m; j++) {
        if (j == skip) continue;
        x[k] = u[j];
        y[k] = log(E[j]);
        w[k] = 1.0;
        k++;
    }
    double c0, c1, cov00, cov01, cov11, chisq;
    if (k >= 3 && gsl_fit_wlinear(x, 1, w, 1, y, 1, (size_t) k, &c0, &c1, &cov00, &cov01,
                                  &cov11, &chisq) == GSL_SUCCESS) {
        p.C = exp(c0);
        p.g = -c1;
        p.ok = isfinite(p.C) && isfinite(p.g);
        double rss = 0;
        for (slong j = 0; j < m; j++) {
            if (j == skip) continue;
            double r = (p.C * exp(-p.g * u[j]) - E[j]) / E[j];
            rss += r * r;
        }
        p.rss = rss;
    }
    (void) law;
    free(x); free(y); free(w);
    return p;
}

/* ---- laws with a limit: for fixed g, weighted linear least squares in (L, C) ---- */
typedef struct {
    const double *u, *E;
    slong m, skip;
    gsl_matrix *X;
    gsl_vector *y, *w, *c;
    gsl_matrix *cov;
    gsl_multifit_linear_workspace *ws;
    double L, C;
} prof_t;

static double profile_rss(double g, void *vp)
{
    prof_t *P = vp;
    slong k = 0;
    for (slong j = 0; j < P->m; j++) {
        if (j == P->skip) continue;
        gsl_matrix_set(P->X, (size_t) k, 0, 1.0);
        gsl_matrix_set(P->X, (size_t) k, 1, exp(-g * P->u[j]));
        gsl_vector_set(P->y, (size_t) k, P->E[j]);
        gsl_vector_set(P->w, (size_t) k, 1.0 / (P->E[j] * P->E[j]));
        k++;
    }
    double chisq;
    if (gsl_multifit_wlinear(P->X, P->w, P->y, P->c, P->cov, &chisq, P->ws) != GSL_SUCCESS)
        return INFINITY;
    P->L = gsl_vector_get(P->c, 0);
    P->C = gsl_vector_get(P->c, 1);
    return isfinite(chisq) ? chisq : INFINITY;
}

static params_t fit_limit(int law, const double *u, const double *E, slong m, slong skip)
{
    params_t p = { 0, 0, 0, INFINITY, 0 };
    slong k = (skip >= 0 && skip < m) ? m - 1 : m;
    if (k < 4) return p;
    prof_t P;
    P.u = u; P.E = E; P.m = m; P.skip = skip;
    P.X = gsl_matrix_alloc((size_t) k, 2);
    P.y = gsl_vector_alloc((size_t) k);
    P.w = gsl_vector_alloc((size_t) k);
    P.c = gsl_vector_alloc(2);
    P.cov = gsl_matrix_alloc(2, 2);
    P.ws = gsl_multifit_linear_alloc((size_t) k, 2);

    /* scan g over a log grid, then refine the best interior point with Brent */
    double glo = (law == EMBZ_LAW_POWER_LIMIT) ? 1e-4 : 0.02;
    double ghi = (law == EMBZ_LAW_POWER_LIMIT) ? 20.0 : 20.0;
    enum { NG = 80 };
    double gs[NG], fs[NG];
    int best = -1;
    for (int t = 0; t < NG; t++) {
        gs[t] = glo * pow(ghi / glo, (double) t / (NG - 1));
        fs[t] = profile_rss(gs[t], &P);
        if (best < 0 || fs[t] < fs[best]) best = t;
    }
    double g = gs[best];
    if (best > 0 && best < NG - 1 && fs[best] < fs[best - 1] && fs[best] < fs[best + 1]) {
        gsl_function F = { profile_rss, &P };
        gsl_min_fminimizer *mz = gsl_min_fminimizer_alloc(gsl_min_fminimizer_brent);
        if (gsl_min_fminimizer_set_with_values(mz, &F, gs[best], fs[best], gs[best - 1],
                                               fs[best - 1], gs[best + 1], fs[best + 1])
            == GSL_SUCCESS) {
            for (int it = 0; it < 100; it++) {
                if (gsl_min_fminimizer_iterate(mz) != GSL_SUCCESS) break;
                double a = gsl_min_fminimizer_x_lower(mz), b = gsl_min_fminimizer_x_upper(mz);
                if (gsl_min_test_interval(a, b, 1e-10, 1e-8) == GSL_SUCCESS) break;
            }
            g = gsl_min_fminimizer_x_minimum(mz);
        }
        gsl_min_fminimizer_free(mz);
    }
    double rss = profile_rss(g, &P);
    p.L = P.L;
    p.C = P.C;
    p.g = g;
    p.rss = rss;
    p.ok = isfinite(rss) && isfinite(p.L) && isfinite(p.C);
    gsl_matrix_free(P.X);
    gsl_vector_free(P.y);
    gsl_vector_free(P.w);
    gsl_vector_free(P.c);
    gsl_matrix_free(P.cov);
    gsl_multifit_linear_free(P.ws);
    return p;
}

static params_t fit_one(int law, const double *u, const double *E, slong m, slong skip)
{
    return law_has_limit(law) ? fit_limit(law, u, E, m, skip) : fit_pure(law, u, E, m, skip);
}

/* jackknife half-width (about two standard errors) from leave-one-out estimates */
static void jack(double *lo, double *hi, double full, const double *loo, slong m)
{
    double mean = 0, var = 0;
    for (slong j = 0; j < m; j++) mean += loo[j];
    mean /= (double) m;
    for (slong j = 0; j < m; j++) var += (loo[j] - mean) * (loo[j] - mean);
    double se = sqrt(var * (double) (m - 1) / (double) m);
    *lo = full - 2 * se;
    *hi = full + 2 * se;
}

/* GSL's default error handler aborts the process; the fits check every status instead. The
 * handler is one process-wide pointer, so it is switched off once (pthread_once) and left
 * off: switching it off and back around each fit would race between threads. */
static pthread_once_t gsl_quiet_once = PTHREAD_ONCE_INIT;
static void gsl_quiet(void)
{
    gsl_set_error_handler_off();
}
static void fits_quiet_gsl(void)
{
    pthread_once(&gsl_quiet_once, gsl_quiet);
}

int embz_fit_laws(embz_fitset_t fs, const double *logn, const double *E, slong len,
                  embz_err_t *err)
{
    embz_fitset_clear(fs);
    /* usable points: E > 0 finite, ln ln n > 0 (so that every law is defined) */
    slong nuse = 0;
    double xmin = INFINITY, xmax = -INFINITY;
    for (slong j = 0; j < len; j++)
        if (E[j] > 0 && isfinite(E[j]) && logn[j] > 1.0) {
            nuse++;
            if (logn[j] < xmin) xmin = logn[j];
            if (logn[j] > xmax) xmax = logn[j];
        }
    if (nuse < 5)
        return embz_err_set(err, EMBZ_ERR_INPUT,
                            "too few usable sizes for a fit (%ld; need at least 5 with n > e)",
                            (long) nuse);
    /* the upper part: ln n >= geometric mean of the extreme ln n, but at least 6 points */
    double cut = sqrt(xmin * xmax);
    slong first = -1, count_above = 0;
    for (slong j = 0; j < len; j++)
        if (E[j] > 0 && isfinite(E[j]) && logn[j] >= cut) count_above++;
    fs->logn = malloc((size_t) nuse * sizeof(double));
    fs->E = malloc((size_t) nuse * sizeof(double));
    slong m = 0, want = count_above >= 6 ? count_above : (nuse < 6 ? nuse : 6);
    for (slong j = len - 1; j >= 0 && m < want; j--) {
        if (!(E[j] > 0 && isfinite(E[j]) && logn[j] > 1.0)) continue;
        m++;
        first = j;
    }
    m = 0;
    for (slong j = first; j < len; j++) {
        if (!(E[j] > 0 && isfinite(E[j]) && logn[j] > 1.0)) continue;
        fs->logn[m] = logn[j];
        fs->E[m] = E[j];
        m++;
    }
    fs->first = first;
    fs->m = m;

    fits_quiet_gsl();
    double *u = malloc((size_t) m * sizeof(double));
    double *loo = malloc((size_t) m * 3 * sizeof(double));
    double bestbic = INFINITY;
    fs->best = EMBZ_LAW_NONE;
    for (int law = 1; law < EMBZ_LAW_COUNT; law++) {
        embz_fit_struct *F = fs->fits + law;
        memset(F, 0, sizeof(*F));
        F->law = law;
        F->nparams = law_has_limit(law) ? 3 : 2;
        F->m = m;
        for (slong j = 0; j < m; j++) u[j] = law_u(law, fs->logn[j]);
        params_t p = fit_one(law, u, fs->E, m, -1);
        F->ok = p.ok;
        F->L = p.L; F->C = p.C; F->g = p.g; F->rss = p.rss;
        F->resid = malloc((size_t) m * sizeof(double));
        F->max_rel = 0;
        for (slong j = 0; j < m; j++) {
            double model = p.L + p.C * exp(-p.g * u[j]);
            F->resid[j] = (model - fs->E[j]) / fs->E[j];
            if (fabs(F->resid[j]) > F->max_rel) F->max_rel = fabs(F->resid[j]);
        }
        if (!p.ok) {
            F->bic = INFINITY;
            continue;
        }
        double rss = F->rss;
        if (rss < RSS_FLOOR_PER_POINT * (double) m) rss = RSS_FLOOR_PER_POINT * (double) m;
        F->bic = (double) m * log(rss / (double) m) + F->nparams * log((double) m);
        /* jackknife over the sizes */
        int jok = 1;
        for (slong s = 0; s < m; s++) {
            params_t q = fit_one(law, u, fs->E, m, s);
            if (!q.ok) { jok = 0; break; }
            loo[s] = q.L; loo[m + s] = q.C; loo[2 * m + s] = q.g;
        }
        if (jok) {
            jack(&F->L_lo, &F->L_hi, F->L, loo, m);
            jack(&F->C_lo, &F->C_hi, F->C, loo + m, m);
            jack(&F->g_lo, &F->g_hi, F->g, loo + 2 * m, m);
        } else {
            F->L_lo = F->C_lo = F->g_lo = -INFINITY;
            F->L_hi = F->C_hi = F->g_hi = INFINITY;
        }
        if (F->bic < bestbic) {
            bestbic = F->bic;
            fs->best = law;
        }
    }
    free(u);
    free(loo);
    return EMBZ_OK;
}

int embz_fit_sweep(embz_fitset_t fs, const embz_sweep_t s, embz_err_t *err)
{
    double *x = malloc((size_t) (s->len > 0 ? s->len : 1) * sizeof(double));
    double *E = malloc((size_t) (s->len > 0 ? s->len : 1) * sizeof(double));
    slong k = 0;
    for (slong j = 0; j < s->len; j++) {
        if (s->pts[j].status != EMBZ_OK) continue;
        x[k] = s->pts[j].log_n;
        E[k] = arf_get_d(arb_midref(s->pts[j].error), ARF_RND_NEAR);
        k++;
    }
    int st = embz_fit_laws(fs, x, E, k, err);
    free(x);
    free(E);
    return st;
}
