/* Timing and memory helpers shared by the benchmarks (header only, static inline). */
#ifndef EMBZ_BENCHUTIL_H
#define EMBZ_BENCHUTIL_H

#include <time.h>
#include <sys/resource.h>
#ifdef _OPENMP
#include <omp.h>
#endif

static inline double bench_clock_seconds(clockid_t id)
{
    struct timespec ts;
    clock_gettime(id, &ts);
    return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

/* wall-clock time (monotonic), seconds */
static inline double bench_now(void)
{
    return bench_clock_seconds(CLOCK_MONOTONIC);
}

/* CPU time of the process, seconds: comparisons stay fair on a loaded machine */
static inline double bench_cpu_now(void)
{
    return bench_clock_seconds(CLOCK_PROCESS_CPUTIME_ID);
}

/* threads an OpenMP parallel region would use (1 without OpenMP) */
static inline int bench_threads(void)
{
#ifdef _OPENMP
    return omp_get_max_threads();
#else
    return 1;
#endif
}

/* peak resident memory of the process so far, in kB (getrusage) */
static inline long bench_peak_kb(void)
{
    struct rusage ru;
    getrusage(RUSAGE_SELF, &ru);
    return ru.ru_maxrss;
}

#endif
