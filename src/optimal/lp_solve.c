/* The program solved by GLPK's simplex in double precision (and, for small n, refined by its
 * exact rational simplex). GLPK's terminal output is routed through a hook: it is never
 * printed (the library does not print), and each of its periodic lines (about one per
 * second) advances the caller's progress display. The results are only estimates; primal.c
 * and dual.c certify them. */
#include <glpk.h>
#include "impl.h"

typedef struct {
    embz_progress_fn progress;
    void *ctx;
} hook_ctx;

static int term_hook(void *info, const char *s)
{
    hook_ctx *h = info;
    (void) s;
    if (h->progress != NULL) h->progress(h->ctx, 1, 4);
    return 1;   /* swallowed */
}

int _embz_opt_lp_solve(double *x, double *y, double *value, slong *pivots, int *used_exact,
                       const _embz_opt_lp_struct *lp, const embz_optimal_opts_struct *o,
                       embz_progress_fn progress, void *ctx, embz_err_t *err)
{
    slong n = lp->n, nnz = lp->start[lp->nrows];
    hook_ctx h = { progress, ctx };
    glp_term_hook(term_hook, &h);
    glp_prob *P = glp_create_prob();
    glp_set_obj_dir(P, GLP_MAX);
    glp_add_rows(P, (int) lp->nrows);
    glp_add_cols(P, (int) n);
    for (slong r = 0; r < lp->nrows; r++)
        glp_set_row_bnds(P, (int) r + 1, GLP_UP, 0.0, (double) lp->rhs[r]);
    for (slong j = 0; j < n; j++) glp_set_col_bnds(P, (int) j + 1, GLP_LO, 0.0, 0.0);
    glp_set_obj_coef(P, (int) n, 1.0);
    int *ia = flint_malloc(sizeof(int) * (size_t) (nnz + 1));
    int *ja = flint_malloc(sizeof(int) * (size_t) (nnz + 1));
    double *ar = flint_malloc(sizeof(double) * (size_t) (nnz + 1));
    for (slong r = 0; r < lp->nrows; r++)
        for (slong z = lp->start[r]; z < lp->start[r + 1]; z++) {
            ia[z + 1] = (int) r + 1;
            ja[z + 1] = (int) lp->col[z] + 1;
            ar[z + 1] = (double) lp->val[z];
        }
    glp_load_matrix(P, (int) nnz, ia, ja, ar);
    flint_free(ia); flint_free(ja); flint_free(ar);

    if (o->start == EMBZ_OPT_START_EQUAL) {
        /* every Ky Fan row at its bound, the sorting rows and all columns basic */
        for (slong k = 0; k < n; k++) {
            glp_set_row_stat(P, (int) k + 1, GLP_NU);
            glp_set_row_stat(P, (int) (n + k) + 1, GLP_BS);
            glp_set_col_stat(P, (int) k + 1, GLP_BS);
        }
    } else {
        glp_adv_basis(P, 0);
    }
    glp_smcp sm;
    glp_init_smcp(&sm);
    sm.msg_lev = progress != NULL ? GLP_MSG_ON : GLP_MSG_OFF;
    sm.out_frq = 1000;
    if (o->seconds > 0) sm.tm_lim = (int) (o->seconds * 1000.0 < 2e9 ? o->seconds * 1000.0 : 2e9);
    int status = EMBZ_OK;
    int ret = glp_simplex(P, &sm);
    if (ret == GLP_EBADB || ret == GLP_EFAIL || ret == GLP_ESING || ret == GLP_ECOND) {
        /* a singular start: GLPK's own basis instead */
        glp_adv_basis(P, 0);
        ret = glp_simplex(P, &sm);
    }
    if (ret == GLP_ETMLIM) {
        status = embz_err_set(err, EMBZ_ERR_LIMIT, "the simplex ran out of time (%g s)",
                              o->seconds);
        goto done;
    }
    if (ret != 0 || glp_get_status(P) != GLP_OPT) {
        status = embz_err_set(err, EMBZ_ERR_PREC, "the simplex did not report an optimum "
                              "(GLPK code %d, status %d)", ret, glp_get_status(P));
        goto done;
    }
    *used_exact = 0;
    if (o->exact && n <= EMBZ_OPTIMAL_LP_EXACT_MAX_N) {
        sm.msg_lev = GLP_MSG_OFF;
        if (glp_exact(P, &sm) == 0 && glp_get_status(P) == GLP_OPT) *used_exact = 1;
    }
    for (slong j = 0; j < n; j++) x[j] = glp_get_col_prim(P, (int) j + 1);
    for (slong r = 0; r < lp->nrows; r++) y[r] = glp_get_row_dual(P, (int) r + 1);
    *value = glp_get_obj_val(P);
    *pivots = glp_get_it_cnt(P);
done:
    glp_delete_prob(P);
    glp_term_hook(NULL, NULL);
    return status;
}
