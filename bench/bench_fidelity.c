/* Benchmark of the fidelity-type measures at large n against the conversion distance K of the
 * same family and size, one ebit (or the target given): for each shipped family at n = 10^30
 * and 10^1000, the median wall time of embz_error (K, the baseline), of the overlap and of the
 * purified distance (embz_fidelity), their ratios to K, and the certified digits of each
 * (or "bounds" when only bounds came out). The goal of the issue: each within 10x of K.
 * Usage: bench_fidelity [prec] [runs] [target] [family ...]   (EMBZ_FAMILY_PATH must name
 * families/) */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "embz.h"
#include "benchutil.h"

static int cmp_d(const void *a, const void *b)
{
    double x = *(const double *) a, y = *(const double *) b;
    return (x > y) - (x < y);
}

/* certified decimal digits of a ball (relative), 0 when not finite */
static double digits(const arb_t x)
{
    if (!arb_is_finite(x) || arb_is_zero(x)) return 0;
    slong b = arb_rel_accuracy_bits(x);
    return b > 0 ? b * 0.30103 : 0;
}

/* median ms of up to runs calls of measure (-1: K); *dig the digits of the last value
 * (-1 for bounds only), *st its status */
static double time_measure(int *st, double *dig, int measure, const embz_family_t f,
                           const fmpz_t n, const embz_target_t q, slong prec, int runs)
{
    double t[16];
    int k;
    if (runs > 16) runs = 16;
    for (k = 0; k < runs; k++) {
        embz_err_t err;
        embz_err_clear(&err);
        double t0 = bench_now();
        if (measure < 0) {
            embz_error_result_t r;
            embz_error_result_init(r);
            *st = embz_error(r, f, n, q, EMBZ_METHOD_AUTO, prec, &err);
            t[k] = 1e3 * (bench_now() - t0);
            *dig = digits(r->error);
            embz_error_result_clear(r);
        } else {
            embz_fidelity_result_t r;
            embz_fidelity_result_init(r);
            *st = embz_fidelity(r, f, n, q, measure, EMBZ_METHOD_AUTO, prec, &err);
            t[k] = 1e3 * (bench_now() - t0);
            *dig = r->bounds_only ? -1 : digits(r->value);
            embz_fidelity_result_clear(r);
        }
        if (*st != EMBZ_OK || t[k] > 3000.0) { k++; break; }
    }
    qsort(t, k, sizeof(double), cmp_d);
    return t[k / 2];
}

int main(int argc, char **argv)
{
    static const char *const all[] = { "inverse", "power", "logpower", "iterlog", "nearmiss",
                                       "uniform", "geometric", "tilted", "invamp" };
    slong prec = argc > 1 ? atol(argv[1]) : 128;
    int runs = argc > 2 ? atoi(argv[2]) : 3;
    const char *tq = argc > 3 ? argv[3] : "ebit";
    const char *const *fams = all;
    int nf = 9;
    if (argc > 4) { fams = (const char *const *) (argv + 4); nf = argc - 4; }
    static const ulong exps[2] = { 30, 1000 };
    embz_target_t q;
    embz_err_t err;
    embz_target_init(q);
    if (embz_target_parse(q, tq, 0, &err) != EMBZ_OK) {
        fprintf(stderr, "bench_fidelity: %s\n", err.text);
        return 2;
    }
    printf("fidelity-type measures vs K, target %s, %ld bits, median of %d runs (ms; ratio to "
           "K; certified digits)\n", tq, (long) prec, runs);
    printf("%-10s %-7s %9s %9s %7s %9s %7s %5s %5s %5s\n", "family", "n", "K", "overlap",
           "ratio", "purified", "ratio", "dK", "dO", "dP");
    double worst = 0;
    for (int fi = 0; fi < nf; fi++) {
        embz_family_t f;
        embz_family_init(f);
        embz_err_clear(&err);
        if (embz_family_resolve(f, fams[fi], NULL, 0, 0, &err) != EMBZ_OK) {
            printf("%-10s %s\n", fams[fi], err.text);
            embz_family_clear(f);
            continue;
        }
        for (int ei = 0; ei < 2; ei++) {
            fmpz_t n;
            fmpz_init(n);
            fmpz_ui_pow_ui(n, 10, exps[ei]);
            int s1, s2, s3;
            double dK, dO, dP;
            double tK = time_measure(&s1, &dK, -1, f, n, q, prec, runs);
            double tO = time_measure(&s2, &dO, EMBZ_MEASURE_OVERLAP, f, n, q, prec, runs);
            double tP = time_measure(&s3, &dP, EMBZ_MEASURE_PURIFIED, f, n, q, prec, runs);
            char nn[16], o[16], p[16];
            snprintf(nn, sizeof(nn), "10^%lu", exps[ei]);
            snprintf(o, sizeof(o), s2 == EMBZ_OK ? "%.0f" : "-", dO);
            snprintf(p, sizeof(p), s3 != EMBZ_OK ? "-" : dP < 0 ? "bnds" : "%.0f", dP);
            printf("%-10s %-7s %9.1f %9.1f %7.2f %9.1f %7.2f %5.0f %5s %5s\n", fams[fi], nn,
                   tK, s2 == EMBZ_OK ? tO : NAN, s2 == EMBZ_OK ? tO / tK : NAN, tP, tP / tK,
                   s1 == EMBZ_OK ? dK : 0, o, p);
            if (s2 == EMBZ_OK && tO / tK > worst) worst = tO / tK;
            if (tP / tK > worst) worst = tP / tK;
            fmpz_clear(n);
        }
        embz_family_clear(f);
    }
    printf("largest ratio to K: %.2f (goal: at most 10)\n", worst);
    embz_target_clear(q);
    flint_cleanup();
    return 0;
}
