/* Benchmark: 100 log-spaced sizes 10 .. 10^100 for the inverse family in one process, with
 * the reusable analytic engine (embz_sweep_run) against computing the same sizes one by one
 * with a fresh engine each (embz_error, auto method). Usage: bench_sweep [POINTS] [EXP10]. */
#include <stdio.h>
#include <stdlib.h>
#include "embz.h"
#include "benchutil.h"

int main(int argc, char **argv)
{
    long points = argc > 1 ? atol(argv[1]) : 100;
    long e10 = argc > 2 ? atol(argv[2]) : 100;
    slong prec = 64;
    embz_family_t f;
    embz_target_t q;
    embz_sweep_t s;
    embz_err_t err;
    fmpz_t a, b;
    embz_family_init(f);
    embz_target_init(q);
    embz_sweep_init(s);
    embz_err_clear(&err);
    fmpz_init_set_ui(a, 10);
    fmpz_init(b);
    fmpz_ui_pow_ui(b, 10, (ulong) e10);
    if (embz_family_resolve(f, "1/i", NULL, 0, 0, &err) != EMBZ_OK) return 1;

    double t0 = bench_cpu_now();
    int st = embz_sweep_run(s, f, a, b, points, q, prec, NULL, NULL, &err);
    double t_reuse = bench_cpu_now() - t0;
    if (st != EMBZ_OK) {
        fprintf(stderr, "sweep failed: %s\n", err.text);
        return 1;
    }

    embz_error_result_t r;
    embz_error_result_init(r);
    int mismatch = 0;
    t0 = bench_cpu_now();
    for (slong j = 0; j < s->len; j++) {
        embz_err_clear(&err);
        if (embz_error(r, f, s->pts[j].n, q, EMBZ_METHOD_AUTO, prec, &err) != EMBZ_OK) {
            fprintf(stderr, "size %ld failed: %s\n", (long) j, err.text);
            continue;
        }
        if (s->pts[j].status == EMBZ_OK && !arb_overlaps(r->error, s->pts[j].error)) mismatch++;
    }
    double t_fresh = bench_cpu_now() - t0;
    printf("inverse family, %ld sizes 10 .. 10^%ld (%ld computed), prec %ld bits\n",
           (long) s->len, e10, (long) s->nok, (long) prec);
    printf("reused engine (embz_sweep_run): %8.2f s CPU  (%.3f s per size)\n", t_reuse,
           t_reuse / (double) s->len);
    printf("fresh engine per size (embz_error): %8.2f s CPU  (%.3f s per size)\n", t_fresh,
           t_fresh / (double) s->len);
    printf("ratio fresh / reused: %.2f   enclosures disjoint: %d\n", t_fresh / t_reuse, mismatch);
    embz_error_result_clear(r);
    fmpz_clear(a); fmpz_clear(b);
    embz_sweep_clear(s);
    embz_target_clear(q);
    embz_family_clear(f);
    flint_cleanup();
    return mismatch != 0;
}
