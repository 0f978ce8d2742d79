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
#include "embz/measure.h"

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

/* The measures of p' -> p' (x) q for an integer vector, the product streamed (only its n
 * largest entries are formed): the form in which a family's explicit sizes are computed
 * (embz_fidelity_explicit, embz/error.h). a: n >= 1 integers
 * sorted non-increasing with sum A (the source p' = a / A); the target as integers
 * alpha_0 >= ... >= alpha_{m-1} > 0 with sum Q (alpha = NULL: uniform, Q = d). With e the n
 * largest entries of a (x) alpha, sorted, sets hs = sum over the hull pieces of sqrt(dP dR)
 * and os = sum_i sqrt(a_i e_i); then sqrt(F_max(p' -> p' (x) q)) = hs / (A sqrt Q) and
 * O(p', p' (x) q) = os / (A sqrt Q). nblocks receives the number of hull pieces. */
void embz_fidelity_appended_sums(arb_t hs, arb_t os, slong *nblocks, const fmpz *a, slong n,
                                 const fmpz_t A, const fmpz *alpha, slong m, const fmpz_t Q,
                                 slong prec);

#endif
