/* Weight expressions: text -> AST -> evaluators (double, arb ball, arb Taylor series, acb). */
#ifndef EMBZ_EXPR_H
#define EMBZ_EXPR_H

#include "embz/flint.h"
#include "embz/err.h"

/* Limits: text length and nesting depth (parentheses, unary chains, calls). */
#define EMBZ_EXPR_MAX_LEN 4096
#define EMBZ_EXPR_MAX_DEPTH 200

typedef enum {
    EMBZ_OP_NUM = 0, /* exact rational constant (node.num) */
    EMBZ_OP_I,       /* the index i (1-based) */
    EMBZ_OP_N,       /* the size n */
    EMBZ_OP_PARAM,   /* named parameter, node.param indexes expr.params */
    EMBZ_OP_PI, EMBZ_OP_E, EMBZ_OP_GAMMA,          /* constants */
    EMBZ_OP_NEG,                                   /* unary: a */
    EMBZ_OP_ADD, EMBZ_OP_SUB, EMBZ_OP_MUL, EMBZ_OP_DIV, EMBZ_OP_POW, /* binary: a, b */
    EMBZ_OP_LOG, EMBZ_OP_LOG2, EMBZ_OP_LOG10, EMBZ_OP_EXP, EMBZ_OP_SQRT,
    EMBZ_OP_ABS, EMBZ_OP_LGAMMA, EMBZ_OP_ATAN, EMBZ_OP_SIN, EMBZ_OP_COS,
    EMBZ_OP_FLOOR,                                 /* unary functions: a */
    EMBZ_OP_MIN, EMBZ_OP_MAX,                      /* binary functions: a, b (pow() parses to EMBZ_OP_POW) */
    EMBZ_OP_COUNT
} embz_op_t;

typedef struct {
    int op;        /* embz_op_t */
    int a, b;      /* child node indices, -1 when absent */
    int param;     /* for EMBZ_OP_PARAM */
    long col;      /* 1-based column of the token in the source text */
    fmpq_t num;    /* for EMBZ_OP_NUM */
} embz_node_t;

typedef struct {
    embz_node_t *nodes;   /* children always have smaller indices than parents */
    long len, alloc;
    int root;             /* -1 for an empty expression */
    char **params;        /* parameter names (owned) */
    long nparams;
} embz_expr_struct;
typedef embz_expr_struct embz_expr_t[1];

void embz_expr_init(embz_expr_t e);
void embz_expr_clear(embz_expr_t e);
void embz_expr_set(embz_expr_t dst, const embz_expr_t src);

/* Parse text. Identifiers other than i, n, constants and functions must be among the
 * nparams names in params, else "unknown name" with its column. On error returns
 * EMBZ_ERR_INPUT and fills err (col, source = text, text = message). */
int embz_expr_parse(embz_expr_t e, const char *text,
                    const char *const *params, long nparams, embz_err_t *err);

/* Replace every parameter node by its exact value (values[k] for params[k]). */
void embz_expr_bind(embz_expr_t e, const fmpq *values);

/* Wrap: e <- e^2 (used for amplitude families). */
void embz_expr_square(embz_expr_t e);

/* Exact decimal / integer / exponent number "1", "-0.75", "1e-3", "2.5E+4" -> rational.
 * Returns EMBZ_OK or EMBZ_ERR_INPUT. Also accepts "p/q". */
int embz_number_parse(fmpq_t res, const char *s);

/* Queries. */
#define EMBZ_USES_I 1
#define EMBZ_USES_N 2
#define EMBZ_USES_PARAM 4
#define EMBZ_USES_NONSMOOTH 8   /* floor, abs, min, max present */
int embz_expr_uses(const embz_expr_t e);

/* Canonical text (fully parenthesised where needed); parse(to_string(e)) has the same AST.
 * Returns a malloc'ed string the caller frees. */
char *embz_expr_to_string(const embz_expr_t e);

/* Double evaluation (fast path). Returns NaN when undefined (log of non-positive, etc.). */
double embz_expr_eval_d(const embz_expr_t e, double i, double n);

/* Ball evaluation at precision prec. i and n are balls. Returns EMBZ_OK with a finite ball, or
 * EMBZ_ERR_DOMAIN when the value is certainly undefined or the ball is not finite (res is
 * set indeterminate then). */
int embz_expr_eval_arb(arb_t res, const embz_expr_t e, const arb_t i, const arb_t n, slong prec);

/* Taylor-mode evaluation: x is a power series (len coefficients) substituted for i; n a ball.
 * res receives len coefficients of the composed series, each a ball. Non-smooth operations
 * are accepted when their argument's constant-term ball decides the branch (abs away from 0,
 * min/max with separated arguments, floor strictly between integers: derivatives 0);
 * otherwise EMBZ_ERR_NONSMOOTH. Domain failures give EMBZ_ERR_DOMAIN. res must not alias x. */
int embz_expr_eval_series(arb_ptr res, const embz_expr_t e, arb_srcptr x,
                          const arb_t n, slong len, slong prec);

/* Complex evaluation for acb_calc_integrate. With analytic != 0, the result is set
 * indeterminate wherever the function is not certainly holomorphic on the input box (branch
 * cuts of log/sqrt/pow/lgamma, any non-smooth operation). Returns EMBZ_OK or EMBZ_ERR_DOMAIN. */
int embz_expr_eval_acb(acb_t res, const embz_expr_t e, const acb_t i, const acb_t n,
                       int analytic, slong prec);

#endif
