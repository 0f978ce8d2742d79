/* The dual certificate (dual.c): whatever the multipliers given (random, negative, NaN,
 * infinite, zero), the bound V is an exact upper bound on the program's optimum psi_d(n),
 * i.e. never below it (weak duality; the closed form's state is a feasible point); with all
 * usable sorting multipliers 0 the back substitution gives the equalising basis's dual and
 * V = psi_d(n) exactly. */
#include <math.h>
#include "topt.h"

START_TEST(test_dual_bound)
{
    flint_rand_t rs;
    flint_randinit(rs);
    fmpq_t V, psi;
    fmpz_t nz, lev;
    fmpq_init(V); fmpq_init(psi);
    fmpz_init(nz); fmpz_init(lev);
    int reps = topt_quick() ? 200 : 1000;
    for (int rep = 0; rep < reps; rep++) {
        slong n = 1 + (slong) n_randint(rs, 400);
        ulong d = 2 + n_randint(rs, 9);
        _embz_opt_lp_struct lp;
        _embz_opt_lp_init(&lp, n, d);
        double *y = flint_malloc(sizeof(double) * (size_t) (2 * n));
        int kind = rep % 4;
        for (slong r = 0; r < 2 * n; r++) {
            double u = (double) n_randint(rs, 100000) / 100000.0;
            if (kind == 0) y[r] = 0;
            else if (kind == 1) y[r] = u - 0.5;
            else if (kind == 2) y[r] = r == 0 ? NAN : ldexp(u, -(int) n_randint(rs, 40));
            else y[r] = r < n ? u : (r == n ? INFINITY : 0);
        }
        slong clamped;
        _embz_opt_dual(V, &clamped, y, &lp);
        fmpz_set_si(nz, n);
        _embz_opt_psi(psi, lev, nz, d);
        ck_assert_msg(fmpq_cmp(V, psi) >= 0, "n = %ld d = %lu kind %d", (long) n, d, kind);
        if (kind == 0 || kind == 3) ck_assert(fmpq_equal(V, psi));
        flint_free(y);
        _embz_opt_lp_clear(&lp);
    }
    fmpq_clear(V); fmpq_clear(psi);
    fmpz_clear(nz); fmpz_clear(lev);
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("optimal-dual");
    TCase *tc = tcase_create("dual");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_dual_bound);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
