/* Benchmark of the explicit embezzlement error: inverse-index family, one ebit.
 * Times the double fast path and the certified path against a plain double loop measured in
 * the same run, and prints the peak memory. Usage: bench_explicit [n] [prec] */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "embz.h"
#include "benchutil.h"

/* The plain loop: E_n(ebit) for w = 1/i written out by hand, one pass, two cursors. */
static double plain_loop(long n, long *argk)
{
    double Sk = 0.0, Ss = 0.0, best = 0.0;
    long s = 0, bk = 0;
    for (long k = 1; k <= n; k++) {
        Sk += 1.0 / (double) k;
        if ((k & 1) == 0) { s++; Ss += 1.0 / (double) s; }
        double g = Sk - Ss - ((k & 1) ? 0.5 / (double) (s + 1) : 0.0);
        if (g > best) { best = g; bk = k; }
    }
    *argk = bk;
    return best / Sk;
}

/* The same loop with the weights from the expression evaluator (for reference: the cost of a
 * generic weight function). */
static double evaluator_loop(const embz_family_t f, long n)
{
    double Sk = 0.0, Ss = 0.0, best = 0.0, nd = (double) n;
    long s = 0;
    for (long k = 1; k <= n; k++) {
        Sk += embz_family_weight_d(f, (double) k, nd);
        if ((k & 1) == 0) { s++; Ss += embz_family_weight_d(f, (double) s, nd); }
        double g = Sk - Ss - ((k & 1) ? 0.5 * embz_family_weight_d(f, (double) (s + 1), nd) : 0.0);
        if (g > best) best = g;
    }
    return best / Sk;
}

int main(int argc, char **argv)
{
    long n = argc > 1 ? atol(argv[1]) : 10000000L;
    slong prec = argc > 2 ? atol(argv[2]) : 128;
    embz_family_t f;
    embz_err_t err;
    embz_err_clear(&err);
    embz_family_init(f);
    if (embz_expr_parse(f->weight, "1/i", NULL, 0, &err) != EMBZ_OK) {
        fprintf(stderr, "parse failed: %s\n", err.text);
        return 1;
    }
    embz_target_t t;
    embz_target_init(t);
    fmpz_t nz;
    fmpz_init_set_ui(nz, (ulong) n);

    long pk;
    double t0 = bench_now();
    double Ep = plain_loop(n, &pk);
    double tp = bench_now() - t0;
    t0 = bench_now();
    double Ee = evaluator_loop(f, n);
    double te = bench_now() - t0;

    double Ef;
    slong ak;
    int order;
    t0 = bench_now();
    int st = embz_error_explicit_estimate(&Ef, &ak, &order, f, nz, t, &err);
    double tf = bench_now() - t0;
    if (st != EMBZ_OK) { fprintf(stderr, "estimate failed: %s\n", err.text); return 1; }

    embz_error_result_t res;
    embz_error_result_init(res);
    t0 = bench_now();
    st = embz_error_explicit(res, f, nz, t, prec, &err);
    double tc = bench_now() - t0;
    if (st != EMBZ_OK) { fprintf(stderr, "certified failed: %s\n", err.text); return 1; }

    printf("bench_explicit: family 1/i, target ebit, n = %ld, prec = %ld\n", n, (long) prec);
    printf("  plain double loop      %8.3f s   E ~ %.15f (argmax %ld)\n", tp, Ep, pk);
    printf("  evaluator double loop  %8.3f s   ratio %6.1f   E ~ %.15f\n", te, te / tp, Ee);
    printf("  fast path (estimate)   %8.3f s   ratio %6.1f   E ~ %.15f (argmax %ld, order %d)\n",
           tf, tf / tp, Ef, (long) ak, order);
    printf("  certified              %8.3f s   ratio %6.1f   E in ", tc, tc / tp);
    arb_printd(res->error, 25);
    char *how = embz_error_how_text(&res->how);
    printf("\n  detail: %s\n", how);
    free(how);
    printf("  peak memory (max RSS)  %ld kB\n", bench_peak_kb());
    embz_error_result_clear(res);
    fmpz_clear(nz);
    embz_target_clear(t);
    embz_family_clear(f);
    flint_cleanup();
    return 0;
}
