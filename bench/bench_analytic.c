/* Benchmark of the analytic engine (embz_error_analytic), one ebit.
 *
 * For each shipped smooth family: E_n at n = 10^30, 10^100, 10^1000 (median wall time of a few
 * runs; a single run when the first one takes over 2 s), the same family by the explicit engine
 * at n = 10^6 measured in the same process, and their ratio. Then 100 sizes log-spaced from 10
 * to 10^100 for the inverse family in one process with embz_sweep_run (engines reused across
 * sizes, sizes shared among OpenMP threads; OMP_NUM_THREADS=1 for one thread). Peak RSS from
 * getrusage. Then a general target vector, (0.7, 0.3), for four families (one run each).
 * Usage: bench_analytic [prec] [runs] [family ...]   (EMBZ_FAMILY_PATH must name families/) */
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

/* median time in ms of up to `runs` calls; status of the last call in *st, radius in *rad */
static double time_error(int *st, double *rad, int method, const embz_family_t f, const fmpz_t n,
                         const embz_target_t q, slong prec, int runs, char *msg, size_t msglen)
{
    double t[16];
    int k;
    if (runs > 16) runs = 16;
    for (k = 0; k < runs; k++) {
        embz_error_result_t res;
        embz_err_t err;
        embz_err_clear(&err);
        embz_error_result_init(res);
        double t0 = bench_now();
        if (method == EMBZ_METHOD_ANALYTIC) *st = embz_error_analytic(res, f, n, q, prec, &err);
        else if (method == EMBZ_METHOD_EXPLICIT) *st = embz_error_explicit(res, f, n, q, prec, &err);
        else *st = embz_error(res, f, n, q, EMBZ_METHOD_AUTO, prec, &err);
        t[k] = 1e3 * (bench_now() - t0);
        *rad = mag_get_d(arb_radref(res->error));
        if (*st != EMBZ_OK) snprintf(msg, msglen, "%s", err.text);
        else msg[0] = '\0';
        embz_error_result_clear(res);
        if (*st != EMBZ_OK || t[k] > 2000.0) { k++; break; }
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
    const char *const *fams = all;
    int nf = 9;
    if (argc > 3) { fams = (const char *const *) (argv + 3); nf = argc - 3; }
    static const ulong exps[3] = { 30, 100, 1000 };
    embz_target_t q;
    embz_err_t err;
    fmpz_t n;
    char msg[512];
    int fails = 0;
    fmpz_init(n);
    embz_target_init(q);          /* one ebit */
    embz_err_clear(&err);

    printf("analytic engine, one ebit, %ld bits, median of up to %d runs (goal: each < 20 ms)\n",
           (long) prec, runs);
    printf("%-10s %12s %12s %12s   %12s  %s\n", "family", "n=10^30", "n=10^100", "n=10^1000",
           "explicit 1e6", "ratio analytic(10^30,10^100,10^1000)/explicit(10^6)");
    for (int i = 0; i < nf; i++) {
        embz_family_t f;
        double ta[3], tx, rad;
        int st[3], sx;
        embz_family_init(f);
        if (embz_family_resolve(f, fams[i], NULL, 0, 0, &err) != EMBZ_OK) {
            printf("%-10s cannot resolve: %s\n", fams[i], err.text);
            embz_family_clear(f);
            fails++;
            continue;
        }
        for (int j = 0; j < 3; j++) {
            fmpz_set_ui(n, 10);
            fmpz_pow_ui(n, n, exps[j]);
            ta[j] = time_error(st + j, &rad, EMBZ_METHOD_ANALYTIC, f, n, q, prec, runs, msg,
                               sizeof(msg));
            if (st[j] != EMBZ_OK) {
                fprintf(stderr, "%s at 10^%lu: status %d: %s\n", fams[i], exps[j], st[j], msg);
                fails++;
            }
        }
        fmpz_set_ui(n, 1000000);
        tx = time_error(&sx, &rad, EMBZ_METHOD_EXPLICIT, f, n, q, prec, runs, msg, sizeof(msg));
        printf("%-10s", fams[i]);
        for (int j = 0; j < 3; j++) {
            if (st[j] == EMBZ_OK) printf(" %9.1f ms%s", ta[j], ta[j] < 20.0 ? " " : "*");
            else printf(" %9s (%d)", "fail", st[j]);
        }
        if (sx == EMBZ_OK) printf("   %9.1f ms ", tx);
        else printf("   %9s (%d)", "fail", sx);
        printf(" ");
        for (int j = 0; j < 3; j++)
            if (st[j] == EMBZ_OK && sx == EMBZ_OK) printf(" %8.3f", ta[j] / tx);
            else printf(" %8s", "-");
        printf("\n");
        fflush(stdout);
        embz_family_clear(f);
    }
    printf("(* = above the 20 ms goal)\n");

    /* a general target vector (threshold search with smooth models; no speed goal): one run
     * per size, with the enclosure's radius and the ratio to explicit mode at 10^6 */
    {
        static const char *const vf[4] = { "inverse", "power", "logpower", "tilted" };
        embz_target_t qv;
        embz_target_init(qv);
        if (embz_target_parse(qv, "0.7,0.3", 0, &err) != EMBZ_OK) {
            fprintf(stderr, "target: %s\n", err.text);
            fails++;
        } else {
            printf("\ntarget (0.7, 0.3), %ld bits, one run: time (radius)\n", (long) prec);
            for (int i = 0; i < 4 && argc <= 3; i++) {
                embz_family_t f;
                double tv[3], rv[3], tx, rad;
                int st[3], sx;
                embz_family_init(f);
                if (embz_family_resolve(f, vf[i], NULL, 0, 0, &err) != EMBZ_OK) {
                    embz_family_clear(f);
                    fails++;
                    continue;
                }
                printf("%-10s", vf[i]);
                for (int j = 0; j < 3; j++) {
                    fmpz_set_ui(n, 10);
                    fmpz_pow_ui(n, n, exps[j]);
                    tv[j] = time_error(st + j, rv + j, EMBZ_METHOD_ANALYTIC, f, n, qv, prec, 1,
                                       msg, sizeof(msg));
                    if (st[j] == EMBZ_OK) printf(" %8.0f ms (%7.1e)", tv[j], rv[j]);
                    else { printf(" %8s (%d)      ", "fail", st[j]); fails++; }
                }
                fmpz_set_ui(n, 1000000);
                tx = time_error(&sx, &rad, EMBZ_METHOD_EXPLICIT, f, n, qv, prec, 1, msg,
                                sizeof(msg));
                if (sx == EMBZ_OK) {
                    printf("   explicit 1e6 %6.0f ms, ratios", tx);
                    for (int j = 0; j < 3; j++) printf(" %.2f", tv[j] / tx);
                }
                printf("\n");
                fflush(stdout);
                embz_family_clear(f);
            }
        }
        embz_target_clear(qv);
    }

    /* 100 sizes log-spaced from 10 to 10^100, inverse family, one process: the sweep with
     * reused engines (embz_sweep_run, OpenMP threads), wall and CPU time */
    {
        embz_family_t f;
        embz_sweep_t sw;
        fmpz_t a, b;
        embz_family_init(f);
        embz_sweep_init(sw);
        fmpz_init_set_ui(a, 10);
        fmpz_init(b);
        fmpz_ui_pow_ui(b, 10, 100);
        /* at the benchmark's precision and at 64 bits, the default of `embz sweep` */
        slong precs[2] = { prec, 64 };
        int have = embz_family_resolve(f, "inverse", NULL, 0, 0, &err) == EMBZ_OK;
        for (int pi = 0; have && pi < (prec == 64 ? 1 : 2); pi++) {
            double w0 = bench_now(), c0 = bench_cpu_now();
            int st = embz_sweep_run(sw, f, a, b, 100, q, precs[pi], NULL, NULL, &err);
            double wall = bench_now() - w0, cpu = bench_cpu_now() - c0;
            double worst = 0.0;
            int nan = 0, nex = 0;
            for (slong j = 0; j < sw->len; j++) {
                if (sw->pts[j].seconds > worst) worst = sw->pts[j].seconds;
                if (sw->pts[j].status != EMBZ_OK) continue;
                if (sw->pts[j].method == EMBZ_METHOD_ANALYTIC) nan++;
                else nex++;
            }
            printf("inverse, 100 sizes log-spaced 10 .. 10^100, %ld bits, reused engines: wall "
                   "%.3f s (goal < 1 s)%s, CPU %.3f s, %d threads; slowest size %.1f ms; "
                   "%d analytic, %d explicit, %ld failed\n",
                   (long) precs[pi], wall, wall < 1.0 ? "" : " *", cpu, bench_threads(),
                   1e3 * worst, nan, nex, (long) (sw->len - sw->nok));
            if (st != EMBZ_OK) {
                fprintf(stderr, "sweep: %s\n", err.text);
                fails++;
            }
        }
        embz_sweep_clear(sw);
        embz_family_clear(f);
        fmpz_clear(a); fmpz_clear(b);
    }
    printf("peak RSS: %.1f MB\n", (double) bench_peak_kb() / 1024.0);
    embz_target_clear(q);
    fmpz_clear(n);
    flint_cleanup();
    return fails ? 1 : 0;
}
