/* Internal helpers shared by the files of src/expr (not part of the public API). */
#ifndef EMBZ_EXPR_IMPL_H
#define EMBZ_EXPR_IMPL_H

#include "embz/expr.h"

/* Appends a node (num set to 0) and returns its index, or -1 when out of memory. */
int _embz_expr_push(embz_expr_t e, int op, int a, int b, long col);
/* the parameter names of src into dst (which has none) */
void _embz_expr_copy_params(embz_expr_t dst, const embz_expr_t src);

/* Drop the nodes the root does not reach (the evaluators walk every node up to the root),
 * keeping the order. */
void _embz_expr_prune(embz_expr_t e);

/* One operation on exact rationals (neg, + - * /, integer powers with an exponent of at most
 * max_pow_bits bits, abs, floor, min, max): EMBZ_OK, EMBZ_ERR_DOMAIN (division by zero, 0 to
 * a power <= 0) or EMBZ_ERR_UNSUPPORTED (not rational in general). */
int _embz_expr_op_fmpq(fmpq_t r, int op, const fmpq_t a, const fmpq_t b, slong max_pow_bits);

/* Number of children of op (0, 1 or 2). */
int _embz_op_arity(int op);
/* binom(a, k) (binom.c): exact, and as a ball; EMBZ_ERR_DOMAIN for a k that is not an
 * integer, EMBZ_ERR_UNSUPPORTED for an exact product too long to form. */
/* The exact value of the subtree at node (embz_expr_eval_fmpq for a part of e). */
int _embz_expr_eval_fmpq_node(fmpq_t res, const embz_expr_t e, long node, const fmpz_t i,
                              const fmpz_t n);
/* The ball of the subtree at node (embz_expr_eval_arb for a part of e). */
int _embz_expr_eval_arb_node(arb_t res, const embz_expr_t e, long node, const arb_t i,
                             const arb_t n, slong prec);
int _embz_binom_fmpq(fmpq_t r, const fmpq_t a, const fmpq_t k);
int _embz_binom_arb(arb_t r, const arb_t a, const arb_t k, slong prec);

/* Name of a function/constant op as written in text, or NULL. */
const char *_embz_op_name(int op);

/* Scanning of an unsigned decimal number "12", "0.75", ".5", "1e-3", "2.5E+4".
 * Returns 0 and sets *end (index after the number) and val; 1 if s does not start with a
 * number; 2 if the exponent is out of range (|exp| > EMBZ_NUMBER_MAX_EXP). */
#define EMBZ_NUMBER_MAX_EXP EMBZ_NUMBER_MAX_EXP10
int _embz_number_scan(fmpq_t val, long *end, const char *s);

/* One scalar operation on balls with the real-domain rules of embz_expr_eval_arb.
 * Returns EMBZ_OK or EMBZ_ERR_DOMAIN (r is then indeterminate). */
int _embz_expr_op_arb(arb_t r, int op, const arb_t a, const arb_t b, slong prec);

/* Leaf value (NUM, constants) as a ball; EMBZ_ERR_INPUT for an unbound parameter. */
int _embz_expr_leaf_arb(arb_t r, const embz_node_t *nd, const arb_t i, const arb_t n, slong prec);

#endif
