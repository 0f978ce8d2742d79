/* Fidelity-type measures: the optimal LOCC fidelity F_max(p -> r), the purified distance
 * P = sqrt(1 - F_max), and the best overlap reachable with local unitaries alone.
 *
 * Conventions. "Fidelity" is always the squared overlap |<a|b>|^2 of two pure states.
 *  - F_max(p -> r): largest fidelity with the pure state of Schmidt vector r that LOCC can reach
 *    from the pure state of Schmidt vector p. Computed exactly from the lower convex hull of the
 *    points (tail sum of r, tail sum of p) (see docs/measures.md).
 *  - P(p -> r) = sqrt(1 - F_max(p -> r)), the smallest purified (sine) distance reachable.
 *  - Overlap (local unitaries only): O(p, r) = sum_i sqrt(p↓_i r↓_i); its fidelity is O^2.
 * Relations checked by the tests: K <= P <= sqrt(K (2 - K)), and O(p, r)^2 <= F_max(p -> r). */
#ifndef EMBZ_FIDELITY_H
#define EMBZ_FIDELITY_H

#include "embz/vec.h"
#include "embz/family.h"
#include "embz/measure.h"
#include "embz/error.h"

/* What "error" means for a family. */
typedef enum {
    EMBZ_MEASURE_K = 0,        /* the conversion distance K (embz_error) */
    EMBZ_MEASURE_FIDELITY,     /* F_max(p -> p (x) q) */
    EMBZ_MEASURE_PURIFIED,     /* sqrt(1 - F_max) */
    EMBZ_MEASURE_OVERLAP       /* O(p, p (x) q)^2, local unitaries only */
} embz_measure_t;

/* "k", "fidelity", "purified", "overlap" <-> embz_measure_t. Parse returns EMBZ_OK or
 * EMBZ_ERR_INPUT with a message listing the choices. */
int embz_measure_parse(int *measure, const char *text, embz_err_t *err);
const char *embz_measure_name(int measure);

/* ---- exact vectors (zero padded to a common length) ---- */

/* F = F_max(p -> r) as a ball. If s is not NULL it receives an optimal output Schmidt vector
 * (exact, sorted non-increasing, s majorizes p), and nblocks (if not NULL) the number of
 * pieces on which s is proportional to r. */
void embz_qvec_fidelity(arb_t F, embz_qvec_t s, slong *nblocks, const embz_qvec_t p,
                        const embz_qvec_t r, slong prec);
/* P = sqrt(1 - F_max(p -> r)). */
void embz_qvec_purified(arb_t P, const embz_qvec_t p, const embz_qvec_t r, slong prec);
/* O(p, r) = sum_i sqrt(p↓_i r↓_i) (the overlap itself, not squared). */
void embz_qvec_overlap(arb_t O, const embz_qvec_t p, const embz_qvec_t r, slong prec);

/* ---- families ---- */

/* Largest n for which embz_fidelity_explicit works (it stores n exact integers). */
#define EMBZ_FIDELITY_MAX_N (WORD(1) << 20)

typedef struct {
    int measure;        /* embz_measure_t */
    int bounds_only;    /* 1: value/fidelity/purified are certified BOUNDS from K, not values */
    arb_t value;        /* the chosen measure: a ball (or, bounds_only, a ball covering the
                           certified interval [lower, upper]) */
    arb_t lower, upper; /* certified lower and upper ends of the value */
    arb_t fidelity;     /* F_max (fidelity, purified; also computed for overlap) */
    arb_t purified;     /* sqrt(1 - F_max) */
    arb_t overlap;      /* overlap measure only: O (not squared); indeterminate otherwise */
    arb_t K;            /* bounds_only: the conversion distance the bounds come from */
    slong nblocks;      /* pieces of the optimal output (explicit fidelity/purified) */
    char detail[256];   /* how it was computed */
} embz_fidelity_result_struct;
typedef embz_fidelity_result_struct embz_fidelity_result_t[1];

void embz_fidelity_result_init(embz_fidelity_result_t r);
void embz_fidelity_result_clear(embz_fidelity_result_t r);

/* The measure (EMBZ_MEASURE_FIDELITY, _PURIFIED or _OVERLAP) of p^(n) -> p^(n) (x) q at an
 * explicit size n <= EMBZ_FIDELITY_MAX_N. The normalised weights are rounded to exact rationals
 * p' (about prec + log2 n bits), the measure of p' is computed exactly, and the rounding is
 * accounted for by the purified distance between the states of p and p' (a metric that LOCC
 * and local unitaries cannot increase); the enclosure width is about 2^(-prec/2) or better.
 * The product vector p' (x) q is streamed (only its n largest entries are formed).
 * Errors: EMBZ_ERR_LIMIT for n too large, EMBZ_ERR_DOMAIN for bad weights,
 * EMBZ_ERR_INPUT for an unknown measure or a bad target. */
int embz_fidelity_explicit(embz_fidelity_result_t res, const embz_family_t f, const fmpz_t n,
                           const embz_target_t q, int measure, slong prec, embz_err_t *err);

/* Dispatcher: explicit values for n <= EMBZ_FIDELITY_MAX_N (unless method is
 * EMBZ_METHOD_ANALYTIC), otherwise certified bounds from K = embz_error(...):
 * K <= P <= sqrt(K (2 - K)), i.e. (1 - K)^2 <= F_max <= 1 - K^2, with res->bounds_only = 1.
 * The overlap has no such bounds: beyond explicit sizes it is EMBZ_ERR_UNSUPPORTED. */
int embz_fidelity(embz_fidelity_result_t res, const embz_family_t f, const fmpz_t n,
                  const embz_target_t q, int measure, int method, slong prec, embz_err_t *err);


#endif
