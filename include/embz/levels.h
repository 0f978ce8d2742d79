/* Schmidt vectors given as levels: values with multiplicities, so that a vector of dimension
 * 2^100000 (tensor powers, products of modes, block-constant weights) costs what its number
 * of distinct levels costs.
 *
 * A level vector holds L pairs (v_j, m_j): the value v_j >= 0 (an arb ball, not normalised)
 * repeated m_j >= 0 times (an exact integer). Its entries need not be sorted: the functions
 * below never decide an order between overlapping balls; they bound the Ky Fan norms from the
 * ends of the balls instead (docs/measures.md, "Levels"). */
#ifndef EMBZ_LEVELS_H
#define EMBZ_LEVELS_H

#include "embz/vec.h"

typedef struct {
    arb_ptr v;      /* values (weights: the vector is v / sum_j m_j v_j) */
    fmpz *m;        /* multiplicities */
    slong len, alloc;
} embz_levels_struct;
typedef embz_levels_struct embz_levels_t[1];

void embz_levels_init(embz_levels_t x);
void embz_levels_clear(embz_levels_t x);
/* Append the level (v, m). */
void embz_levels_push(embz_levels_t x, const arb_t v, const fmpz_t m);
/* dim <- sum_j m_j; W <- sum_j m_j v_j. */
void embz_levels_dim(fmpz_t dim, const embz_levels_t x);
void embz_levels_total(arb_t W, const embz_levels_t x, slong prec);

/* r <- x (x) q: for a uniform target (v_j / d, d m_j), for a vector (v_j q_l, m_j) over all
 * j and l. */
void embz_levels_tensor_target(embz_levels_t r, const embz_levels_t x, const embz_target_t q,
                               slong prec);

/* K(p -> r) for p = x / W_x and r = y / W_y (docs/math.md: the largest excess of a Ky Fan
 * norm of p over that of r, k over the padded length): a certified enclosure, and argk
 * (may be NULL) the number k of largest entries at which the proven lower bound is largest.
 * Both vectors must have a positive total. */
void embz_levels_distance(arb_t K, fmpz_t argk, const embz_levels_t x, const embz_levels_t y,
                          slong prec);

#endif
