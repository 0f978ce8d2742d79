/* The linear program of OPT_n(u_d) in the cumulative sums (impl.h): at most 3 entries per
 * row, so 2n rows hold fewer than 6n non-zeros. */
#include <stdlib.h>
#include "impl.h"

void _embz_opt_lp_init(_embz_opt_lp_struct *lp, slong n, ulong d)
{
    lp->n = n;
    lp->d = d;
    lp->nrows = 2 * n;
    lp->start = flint_malloc(sizeof(slong) * (size_t) (2 * n + 1));
    lp->col = flint_malloc(sizeof(slong) * (size_t) (6 * n));
    lp->val = flint_malloc(sizeof(slong) * (size_t) (6 * n));
    lp->rhs = flint_malloc(sizeof(slong) * (size_t) (2 * n));
    slong z = 0, sd = (slong) d;
    /* Ky Fan rows: d P_k - (d - r) P_m - r P_(m+1) <= d, k = d m + r */
    for (slong k = 1; k <= n; k++) {
        slong m = k / sd, r = k % sd;
        lp->start[k - 1] = z;
        if (k == 1) {                    /* m = 0, r = 1: d P_1 - P_1 */
            lp->col[z] = 0; lp->val[z] = sd - 1; z++;
        } else {
            lp->col[z] = k - 1; lp->val[z] = sd; z++;
            if (r != 0) { lp->col[z] = m; lp->val[z] = -r; z++; }          /* P_(m+1) */
            if (m >= 1) { lp->col[z] = m - 1; lp->val[z] = -(sd - r); z++; } /* P_m */
        }
        lp->rhs[k - 1] = sd;
    }
    /* sorting rows: P_(i-1) - 2 P_i + P_(i+1) <= 0 (i < n), P_(n-1) - P_n <= 0 */
    for (slong i = 1; i <= n; i++) {
        lp->start[n + i - 1] = z;
        if (i < n) {
            if (i >= 2) { lp->col[z] = i - 2; lp->val[z] = 1; z++; }
            lp->col[z] = i - 1; lp->val[z] = -2; z++;
            lp->col[z] = i; lp->val[z] = 1; z++;
        } else {
            if (n >= 2) { lp->col[z] = n - 2; lp->val[z] = 1; z++; }
            lp->col[z] = n - 1; lp->val[z] = -1; z++;
        }
        lp->rhs[n + i - 1] = 0;
    }
    lp->start[2 * n] = z;
}

void _embz_opt_lp_clear(_embz_opt_lp_struct *lp)
{
    flint_free(lp->start);
    flint_free(lp->col);
    flint_free(lp->val);
    flint_free(lp->rhs);
}
