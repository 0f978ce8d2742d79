/* Private to src/measure (not installed). */
#ifndef EMBZ_MEASURE_IMPL_H
#define EMBZ_MEASURE_IMPL_H

#include "embz/fidelity.h"

/* Shared by fidelity.c and fidelity_family.c. a: n >= 1 integers sorted non-increasing with
 * sum A (the source p' = a / A); the target as integers alpha_0 >= ... >= alpha_{m-1} > 0 with
 * sum Q (alpha = NULL: uniform, Q = d). With e the n largest entries of a (x) alpha, sorted,
 * sets hs = sum over the hull pieces of sqrt(dP dR) and os = sum_i sqrt(a_i e_i); then
 * sqrt(F_max(p' -> p' (x) q)) = hs / (A sqrt Q) and O(p', p' (x) q) = os / (A sqrt Q). */
void _embz_fidelity_sorted(arb_t hs, arb_t os, slong *nblocks, const fmpz *a, slong n,
                           const fmpz_t A, const fmpz *alpha, slong m, const fmpz_t Q,
                           slong prec);

#endif
