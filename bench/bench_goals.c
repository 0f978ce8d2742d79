/* The speed and memory goals of the project in one table: each goal, what was measured, the
 * baseline measured in the same run, the ratio and whether the goal is met. Run on demand
 * (never under meson test):
 *
 *     build/bench/bench_goals [quick]
 *
 * "quick" uses n = 10^6 instead of 10^7 for the explicit rows and fewer goals for the size
 * search. Goals (DEVELOPERS.md, "Benchmarks"):
 *   explicit   certified E_n at n = 10^7 within 5x a plain double loop (10x for weights
 *              with log), 1/i and 1/(i log(i+1)^2)
 *   vector     target (0.7, 0.3) within 5x the one-ebit cost at 10^30 and 10^1000
 *   vsize      embz size with the target (0.7, 0.3) under 1 s
 *   sweep      at most 1 ms per size on average at 64 bits (100 sizes, 10 .. 10^100)
 *   size       embz size for one ebit and uniform:3 under 5 s per goal
 *   memory     peak memory flat in n for monotone weights (explicit, 10^7 against 10^5,
 *              each in its own child process): ratio at most 1.5 */
#define _DEFAULT_SOURCE          /* wait4 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include <unistd.h>
#include <sys/wait.h>
#include <sys/resource.h>
#include "embz.h"
#include "benchutil.h"

static int fails = 0, missed = 0;

static void row(const char *goal, const char *what, double value, double base, double limit,
                const char *unit)
{
    double r = base > 0 ? value / base : value;
    int met = r <= limit;
    if (!met) missed++;
    if (base > 0)
        printf("%-8s %-44s %10.4g %-3s base %10.4g  ratio %7.2f  goal <= %-5g %s\n", goal, what,
               value, unit, base, r, limit, met ? "met" : "MISSED");
    else
        printf("%-8s %-44s %10.4g %-3s %32s goal <= %-5g %s\n", goal, what, value, unit, "",
               limit, met ? "met" : "MISSED");
    fflush(stdout);
}

/* Plain double loops: E_n(ebit) written out by hand, one pass, two cursors. */
#define PLAIN_LOOP(NAME, W)                                                                  \
    static double NAME(long n)                                                               \
    {                                                                                        \
        double Sk = 0.0, Ss = 0.0, best = 0.0;                                               \
        long s = 0;                                                                          \
        for (long k = 1; k <= n; k++) {                                                      \
            double x = (double) k;                                                           \
            Sk += (W);                                                                       \
            if ((k & 1) == 0) { s++; x = (double) s; Ss += (W); }                            \
            x = (double) (s + 1);                                                            \
            double g = Sk - Ss - ((k & 1) ? 0.5 * (W) : 0.0);                                \
            if (g > best) best = g;                                                          \
        }                                                                                    \
        return best / Sk;                                                                    \
    }
PLAIN_LOOP(plain_inverse, 1.0 / x)
PLAIN_LOOP(plain_logsq, 1.0 / (x * log(x + 1.0) * log(x + 1.0)))

static int load(embz_family_t f, const char *spec)
{
    embz_err_t err;
    embz_err_clear(&err);
    if (embz_family_resolve(f, spec, NULL, 0, 0, &err) == EMBZ_OK) return 1;
    fprintf(stderr, "family %s: %s\n", spec, err.text);
    fails++;
    return 0;
}

/* seconds of one embz_error call (median of reps), or -1 on failure */
static double time_error(const embz_family_t f, const fmpz_t n, const embz_target_t q,
                         int method, slong prec, int reps)
{
    double t[9];
    if (reps > 9) reps = 9;
    for (int r = 0; r < reps; r++) {
        embz_error_result_t res;
        embz_err_t err;
        embz_err_clear(&err);
        embz_error_result_init(res);
        double t0 = bench_now();
        int st = embz_error(res, f, n, q, method, prec, &err);
        t[r] = bench_now() - t0;
        embz_error_result_clear(res);
        if (st != EMBZ_OK) {
            fprintf(stderr, "error: %s\n", err.text);
            fails++;
            return -1;
        }
    }
    for (int i = 1; i < reps; i++)       /* insertion sort for the median */
        for (int j = i; j > 0 && t[j] < t[j - 1]; j--) {
            double s = t[j]; t[j] = t[j - 1]; t[j - 1] = s;
        }
    return t[reps / 2];
}

static void goal_explicit(long n)
{
    static const char *const spec[2] = { "1/i", "1/(i*log(i+1)^2)" };
    static const double limit[2] = { 5, 10 };
    embz_target_t q;
    embz_target_init(q);
    fmpz_t nz;
    fmpz_init_set_ui(nz, (ulong) n);
    for (int k = 0; k < 2; k++) {
        embz_family_t f;
        embz_family_init(f);
        if (load(f, spec[k])) {
            double t0 = bench_now();
            volatile double e = k == 0 ? plain_inverse(n) : plain_logsq(n);
            double tp = bench_now() - t0;
            (void) e;
            double tc = time_error(f, nz, q, EMBZ_METHOD_EXPLICIT, 128, 1);
            char what[96];
            snprintf(what, sizeof(what), "certified %s at n = %.0e (s)", spec[k], (double) n);
            if (tc >= 0) row("explicit", what, tc, tp, limit[k], "s");
        }
        embz_family_clear(f);
    }
    fmpz_clear(nz);
    embz_target_clear(q);
}

static void goal_vector(void)
{
    static const char *const fams[3] = { "inverse", "power", "logpower" };
    static const ulong exps[2] = { 30, 1000 };
    embz_target_t ebit, v;
    embz_target_init(ebit);
    embz_target_init(v);
    embz_err_t err;
    embz_err_clear(&err);
    embz_target_parse(v, "0.7,0.3", 0, &err);
    fmpz_t n;
    fmpz_init(n);
    for (int k = 0; k < 3; k++) {
        embz_family_t f;
        embz_family_init(f);
        if (load(f, fams[k])) {
            for (int j = 0; j < 2; j++) {
                fmpz_ui_pow_ui(n, 10, exps[j]);
                double t1 = time_error(f, n, ebit, EMBZ_METHOD_AUTO, 128, 3);
                double tv = time_error(f, n, v, EMBZ_METHOD_AUTO, 128, 3);
                char what[96];
                snprintf(what, sizeof(what), "%s, target (0.7,0.3) at 10^%lu (ms)", fams[k],
                         exps[j]);
                if (t1 > 0 && tv >= 0) row("vector", what, 1e3 * tv, 1e3 * t1, 5, "ms");
            }
        }
        embz_family_clear(f);
    }
    fmpz_clear(n);
    embz_target_clear(ebit);
    embz_target_clear(v);
}

static double time_size(const embz_family_t f, const char *eps_text, const embz_target_t q)
{
    arb_t eps;
    arb_init(eps);
    fmpq_t e;
    fmpq_init(e);
    embz_number_parse(e, eps_text);
    arb_set_fmpq(eps, e, 256);
    embz_size_result_t r;
    embz_size_result_init(r);
    embz_err_t err;
    embz_err_clear(&err);
    double t0 = bench_now();
    int st = embz_size_solve(r, f, eps, q, 128, &err);
    double t = bench_now() - t0;
    if (st != EMBZ_OK) {
        fprintf(stderr, "size %s: %s\n", eps_text, err.text);
        fails++;
        t = -1;
    }
    embz_size_result_clear(r);
    fmpq_clear(e);
    arb_clear(eps);
    return t;
}

static void goal_size(int quick)
{
    static const char *const goals[] = { "0.1", "0.01", "0.006", "0.005", "0.003" };
    int ngoals = quick ? 3 : 5;
    static const char *const tgt[2] = { "ebit", "uniform:3" };
    embz_family_t f;
    embz_family_init(f);
    if (!load(f, "inverse")) { embz_family_clear(f); return; }
    for (int k = 0; k < 2; k++) {
        embz_target_t q;
        embz_target_init(q);
        embz_err_t err;
        embz_err_clear(&err);
        embz_target_parse(q, tgt[k], 0, &err);
        for (int j = 0; j < ngoals; j++) {
            double t = time_size(f, goals[j], q);
            char what[96];
            snprintf(what, sizeof(what), "size inverse --eps %s, %s (s)", goals[j], tgt[k]);
            if (t >= 0) row("size", what, t, 0, 5, "s");
        }
        embz_target_clear(q);
    }
    embz_target_t v;
    embz_target_init(v);
    embz_err_t err;
    embz_err_clear(&err);
    embz_target_parse(v, "0.7,0.3", 0, &err);
    double t = time_size(f, "0.05", v);
    if (t >= 0) row("vsize", "size inverse --eps 0.05, target (0.7,0.3) (s)", t, 0, 1, "s");
    embz_target_clear(v);
    embz_family_clear(f);
}

static void goal_sweep(void)
{
    static const char *const fams[5] = { "inverse", "power", "logpower", "tilted", "iterlog" };
    fmpz_t a, b;
    fmpz_init_set_ui(a, 10);
    fmpz_init(b);
    fmpz_ui_pow_ui(b, 10, 100);
    embz_target_t q;
    embz_target_init(q);
    for (int k = 0; k < 5; k++) {
        embz_family_t f;
        embz_family_init(f);
        if (load(f, fams[k])) {
            embz_sweep_t s;
            embz_sweep_init(s);
            embz_err_t err;
            embz_err_clear(&err);
            double t0 = bench_now();
            int st = embz_sweep_run(s, f, a, b, 100, q, EMBZ_PREC_MANY, NULL, NULL, &err);
            double t = bench_now() - t0;
            char what[96];
            snprintf(what, sizeof(what), "sweep %s, 100 sizes to 10^100, %d threads (ms/size)",
                     fams[k], bench_threads());
            if (st == EMBZ_OK && s->len > 0) row("sweep", what, 1e3 * t / (double) s->len, 0, 1, "ms");
            else fails++;
            embz_sweep_clear(s);
        }
        embz_family_clear(f);
    }
    embz_target_clear(q);
    fmpz_clear(a);
    fmpz_clear(b);
}

/* peak memory (kB) of one explicit E_n for 1/i in a child process */
static long child_peak_kb(long n)
{
    fflush(stdout);
    pid_t pid = fork();
    if (pid == 0) {
        embz_family_t f;
        embz_family_init(f);
        embz_err_t err;
        embz_err_clear(&err);
        int ok = embz_family_resolve(f, "1/i", NULL, 0, 0, &err) == EMBZ_OK;
        embz_target_t q;
        embz_target_init(q);
        fmpz_t nz;
        fmpz_init_set_ui(nz, (ulong) n);
        embz_error_result_t res;
        embz_error_result_init(res);
        ok = ok && embz_error(res, f, nz, q, EMBZ_METHOD_EXPLICIT, 128, &err) == EMBZ_OK;
        _exit(ok ? 0 : 1);
    }
    int status = 0;
    struct rusage ru;
    if (pid < 0 || wait4(pid, &status, 0, &ru) < 0 || !WIFEXITED(status)
        || WEXITSTATUS(status) != 0) {
        fails++;
        return -1;
    }
    return ru.ru_maxrss;
}

int main(int argc, char **argv)
{
    int quick = argc > 1 && strcmp(argv[1], "quick") == 0;
    long n = quick ? 1000000L : 10000000L;
    printf("embz speed and memory goals (%d threads; base = baseline measured in this run)\n",
           bench_threads());
    goal_explicit(n);
    goal_vector();
    goal_sweep();
    goal_size(quick);
    long small = child_peak_kb(n / 100), big = child_peak_kb(n);
    char what[96];
    snprintf(what, sizeof(what), "peak memory, explicit 1/i at %.0e vs %.0e (MB)", (double) n,
             (double) (n / 100));
    if (small > 0 && big > 0) row("memory", what, big / 1024.0, small / 1024.0, 1.5, "MB");
    printf("%d goals missed, %d failures\n", missed, fails);
    flint_cleanup();
    return fails ? 1 : 0;
}
