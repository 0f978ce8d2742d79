/* Sentences for how an optimum was found (embz_optimal_result_struct, embz/optimal.h). */
#include <stdlib.h>
#include "embz/render.h"
#include "embz/optimal.h"

char *embz_optimal_how_text(const embz_optimal_result_struct *r)
{
    if (r->how == EMBZ_OPT_HOW_CLOSED) {
        char *j = fmpz_get_str(NULL, 10, r->level);
        char *s = embz_strdup_printf(
            "closed form 1/psi_%lu(n), psi_d(n) = j + 1 + n/(d^j (d-1)) with j = floor(log_d n) "
            "= %s (proven: docs/optimal.md)%s", r->d, j,
            r->state_checked ? "; the optimal state's error recomputed exactly from its vector"
                             : "");
        flint_free(j);
        return s;
    }
    if (r->how == EMBZ_OPT_HOW_LP)
        return embz_strdup_printf(
            "linear program in the cumulative sums: %ld rows, %ld columns, %ld non-zeros; GLPK "
            "simplex from %s, %ld pivots%s, %.3g s; certified in exact rationals: the primal "
            "rounded to a sorted vector whose error was recomputed (upper end), the Ky Fan "
            "multipliers of the dual recomputed so that the dual equations hold exactly "
            "(lower end, weak duality), %.3g s%s",
            (long) r->rows, (long) r->cols, (long) r->nnz,
            r->start == EMBZ_OPT_START_EQUAL ? "the equalising start (every Ky Fan row tight)"
                                             : "GLPK's own start",
            (long) r->pivots, r->used_exact ? ", refined by GLPK's exact rational simplex" : "",
            r->solve_seconds, r->certify_seconds,
            r->exact ? "; both ends agree: the exact optimum" : "");
    return embz_strdup_printf("not computed");
}

char *embz_optimal_fid_how_text(const embz_optimal_fid_struct *r)
{
    return embz_strdup_printf(
        "best F_max = best O^2 = lambda_max(M)^2/%lu, M the matrix of the tree j -> ceil(j/%lu) "
        "(docs/optimal.md, section 6)%s; lower end: the exact overlap of the Perron vector "
        "rounded to integers (times 2^%ld); upper end: Lagrange multipliers from the tree's "
        "pivots, a bound for every sorted state, in ball arithmetic; %.3g s",
        r->d, r->d, r->levels ? ", by classes of equal subtrees" : "", (long) r->bits,
        r->seconds);
}
