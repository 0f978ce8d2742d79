/* Benchmark: the certified linear program of the optimal baseline (embz_optimal_lp, one
 * ebit) at n = 10^3, 10^4, 10^5 (and 10^6 with an argument), from the equalising start,
 * against a baseline measured in the same run: GLPK's own start at n = 10^3 (about n pivots).
 * Goal: 10^5 in under a minute. Prints wall time, the solve / certify split, pivots, peak
 * memory and whether the two certified ends agree. Usage: bench_optimal [MAX_EXP10]. */
#include <stdio.h>
#include <stdlib.h>
#include "embz.h"
#include "benchutil.h"

static double run(slong n, int start, embz_optimal_result_t r)
{
    embz_target_t q;
    embz_target_init(q);
    embz_optimal_opts_t o;
    embz_optimal_opts_init(o);
    o->start = start;
    embz_err_t err;
    embz_err_clear(&err);
    double t0 = bench_now();
    int st = embz_optimal_lp(r, NULL, n, q, o, NULL, NULL, &err);
    double t = bench_now() - t0;
    if (st != EMBZ_OK) {
        fprintf(stderr, "n = %ld failed: %s\n", (long) n, err.text);
        exit(1);
    }
    embz_target_clear(q);
    return t;
}

int main(int argc, char **argv)
{
    int maxe = argc > 1 ? atoi(argv[1]) : 5;
    embz_optimal_result_t r;
    embz_optimal_result_init(r);
    double base = run(1000, EMBZ_OPT_START_SOLVER, r);
    printf("baseline: GLPK's own start, n = 1000: %.3f s wall, %ld pivots\n", base,
           (long) r->pivots);
    slong n = 1000;
    for (int e = 3; e <= maxe; e++, n *= 10) {
        double t = run(n, EMBZ_OPT_START_EQUAL, r);
        printf("n = 10^%d: %8.3f s wall (solve %.3f, certify %.3f), %ld pivots, exact %s, "
               "peak %ld MB, ratio to baseline %.2f%s\n", e, t, r->solve_seconds,
               r->certify_seconds, (long) r->pivots, r->exact ? "yes" : "no",
               bench_peak_kb() / 1024, t / base,
               e == 5 ? (t < 60 ? "  [goal < 60 s: met]" : "  [goal < 60 s: MISSED]") : "");
    }
    embz_optimal_result_clear(r);
    flint_cleanup();
    return 0;
}
