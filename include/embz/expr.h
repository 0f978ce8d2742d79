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
    EMBZ_OP_CEIL,                                  /* unary: a */
    EMBZ_OP_BINOM,                                 /* binary: binom(a, k), k an integer */
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
    int notes;            /* EMBZ_EXPR_NOTE_* bits set by the parser: accepted, but worth a
                             word to the user */
} embz_expr_struct;

/* The text used 'gamma' for Euler's constant: the name is kept for old family files, 'euler'
 * is the one to write (the Gamma function is exp(lgamma(x))). */
#define EMBZ_EXPR_NOTE_OLD_GAMMA 1
typedef embz_expr_struct embz_expr_t[1];

void embz_expr_init(embz_expr_t e);
void embz_expr_clear(embz_expr_t e);
void embz_expr_set(embz_expr_t dst, const embz_expr_t src);

/* Parse text. Identifiers other than i, n, constants and functions must be among the
 * nparams names in params, else "unknown name" with its column. On error returns
 * EMBZ_ERR_INPUT and fills err (col, source = text, text = message); e is left empty.
 * Parameter names must be identifiers that are not built-in names (i, n, pi, e, gamma,
 * function names), else EMBZ_ERR_INPUT with col 0. All nparams names are stored in e, in
 * order, whether used or not (so bind's values line up with params).
 * Syntax: numbers 2, 0.75, .5, 1e-3, 2.5E+4 (exact); + - * / ^ with ^ right-associative and
 * binding tighter than unary minus (-i^2 = -(i^2), 2^-1 allowed); functions log log2 log10
 * exp sqrt abs lgamma atan sin cos floor (one argument), min max pow (two); constants pi, e,
 * gamma (Euler's constant). A text longer than EMBZ_EXPR_MAX_LEN is refused with col 0;
 * a column beyond the capacity of err->source is named in err->text instead (source ""). */
int embz_expr_parse(embz_expr_t e, const char *text,
                    const char *const *params, long nparams, embz_err_t *err);

/* Replace every parameter node by its exact value (values[k] for params[k]), then fold
 * constants (embz_expr_fold). */
void embz_expr_bind(embz_expr_t e, const fmpq *values);
/* Replace each subtree whose value is an exact rational independent of i and n (numbers
 * combined by + - * /, integer powers up to 63, abs, floor, min, max) by that number, and drop
 * the nodes no longer reached. The parser keeps the tree of the text; families fold their
 * bound weight, so floor(10) costs nothing and does not look non-smooth to the engine. */
void embz_expr_fold(embz_expr_t e);
/* e := e * 2^k (a new root; the value scaled exactly). */
int embz_expr_scale_2exp(embz_expr_t e, slong k);

/* phi(u) = w(e^u) e^u as a new expression in which the variable i stands for u; products and
 * powers of e^u are merged exactly (w = 1/i gives the constant 1). Parameters must be bound.
 * Returns EMBZ_OK, or EMBZ_ERR_INPUT for an empty expression. */
int embz_expr_log_substitute(embz_expr_t out, const embz_expr_t w);

/* The same substitution without the Jacobian, split as w(e^u) = core(u) exp(rate u): core is an
 * expression in which i stands for u, rate an expression free of i (it may use n), e.g.
 * w = 1/(i log(i+1)^b) gives core = (log(1 + e^-u) + u)^-b and rate = -1. Parameters must be
 * bound. Returns EMBZ_OK, or EMBZ_ERR_INPUT for an empty expression. */
int embz_expr_log_split(embz_expr_t core, embz_expr_t rate, const embz_expr_t w);

/* out(i) = w(a i + b): every occurrence of the variable i replaced by a i + b (constants
 * folded). out may not alias w. Returns EMBZ_OK, or EMBZ_ERR_INPUT for an empty expression. */
int embz_expr_affine(embz_expr_t out, const embz_expr_t w, const fmpq_t a, const fmpq_t b);
/* out = sqrt(x y), the geometric mean of two expressions in the same variables (used for the
 * terms sqrt(p_j r_j) of the overlap), written as sqrt(x) sqrt(y) with the roots pushed
 * inside products, quotients, powers and exponentials where that is exact: wherever out is
 * defined it equals sqrt(x y) (it may be undefined where a factor is negative). out may not
 * alias x or y. EMBZ_ERR_INPUT for an empty expression. */
int embz_expr_geomean(embz_expr_t out, const embz_expr_t x, const embz_expr_t y);

/* out = x op y for a binary operation (EMBZ_OP_ADD, _SUB, _MUL, _DIV, _POW, _MIN, _MAX).
 * out may not alias x or y. EMBZ_ERR_INPUT for an empty expression or another op. */
int embz_expr_binary(embz_expr_t out, int op, const embz_expr_t x, const embz_expr_t y);

/* Wrap: e <- e^2 (used for amplitude families). */
void embz_expr_square(embz_expr_t e);

/* Sizes n >= 1: parse "1000", "1e6", "10^6", "2^20" ("10^10000" is accepted, "10^(10^4)"
 * is not). */
int embz_size_parse(fmpz_t n, const char *s, embz_err_t *err);

/* Exact decimal / integer / exponent number "1", "-0.75", "1e-3", "2.5E+4" -> rational.
 * Returns EMBZ_OK or EMBZ_ERR_INPUT. Also accepts "p/q". */
int embz_number_parse(fmpq_t res, const char *s);
/* 1 when s is written like a number ("1e999999", "-2.5e-200000") but embz_number_parse
 * refuses it because its decimal exponent lies beyond +-EMBZ_NUMBER_MAX_EXP10; else 0. Lets
 * messages say "out of range" rather than "not a number". */
#define EMBZ_NUMBER_MAX_EXP10 100000
int embz_number_out_of_range(const char *s);

/* Queries. */
#define EMBZ_USES_I 1
#define EMBZ_USES_N 2
#define EMBZ_USES_PARAM 4
#define EMBZ_USES_NONSMOOTH 8   /* floor, abs, min, max present */
int embz_expr_uses(const embz_expr_t e);

/* Canonical text (parenthesised only where needed); parse(to_string(e)) has the same AST
 * whenever every number node is a non-negative rational with denominator 2^a 5^b (all
 * parsed numbers are). Other numbers (negative or e.g. 1/3, from bind) have no literal form
 * and print as "(-0.5)", "(1/3)", which parse back to an equal value (NEG/DIV nodes).
 * Returns a malloc'ed string the caller frees. */
char *embz_expr_to_string(const embz_expr_t e);

/* Structural equality of the trees below the roots (ops, exact numbers, parameter names;
 * columns are ignored). */
int embz_expr_equal(const embz_expr_t x, const embz_expr_t y);

/* Exact value at integers i, n when the expression is rational there (numbers, i, n,
 * + - * /, integer powers up to 255, abs, floor, min, max; parameters once bound).
 * EMBZ_ERR_UNSUPPORTED for anything else (constants, log, sqrt, ...), EMBZ_ERR_DOMAIN for a
 * division by zero or 0 to a power <= 0. */
int embz_expr_eval_fmpq(fmpq_t res, const embz_expr_t e, const fmpz_t i, const fmpz_t n);

/* Double evaluation (fast path, not certified). Returns NaN when undefined (log of
 * non-positive, etc.), when any intermediate value is not finite (overflow included), and
 * for unbound parameters. */
double embz_expr_eval_d(const embz_expr_t e, double i, double n);
/* binom(a, k) in double (the language's binom: NaN for a k that is not an integer, 0 for
 * k < 0 and for integers 0 <= a < k). */
double embz_binom_d(double a, double k);

/* Ball evaluation at precision prec. i and n are balls. Returns EMBZ_OK with a finite ball, or
 * EMBZ_ERR_DOMAIN when the value is certainly undefined, when the domain condition cannot be
 * decided at this precision (e.g. log of a ball containing 0; retrying at a higher precision
 * may help), or when the ball is not finite (res is set indeterminate then).
 * Real-domain rules: log, log2, log10, lgamma need x > 0, sqrt x >= 0, division a nonzero
 * divisor; x^y with y an exact integer is defined for all x (x != 0 when y < 0); otherwise
 * x^y needs x > 0, or x >= 0 and y > 0 (negative bases with fractional exponents are
 * DOMAIN errors). An unbound parameter gives EMBZ_ERR_INPUT. */
int embz_expr_eval_arb(arb_t res, const embz_expr_t e, const arb_t i, const arb_t n, slong prec);
/* The same for the subtree at node (an index into e->nodes). */
int embz_expr_eval_arb_node(arb_t res, const embz_expr_t e, long node, const arb_t i,
                            const arb_t n, slong prec);

/* Step structure: when every occurrence of i lies inside the argument of a floor or ceil,
 * the value depends on i only through those floor/ceil nodes, so it is constant on every
 * run of indices where they are. Stores the outermost such nodes (at most max) in nodes and
 * returns their number: 0 when i does not occur, -1 when i occurs outside every floor and
 * ceil, max + 1 when there are more than max. */
slong embz_expr_step_nodes(long *nodes, slong max, const embz_expr_t e);

/* Taylor-mode evaluation: x is a power series (len coefficients) substituted for i; n a ball.
 * res receives len coefficients of the composed series, each a ball. Non-smooth operations
 * are accepted when their argument's constant-term ball decides the branch (abs away from 0,
 * min/max with separated arguments, floor strictly between integers: derivatives 0);
 * otherwise EMBZ_ERR_NONSMOOTH. Domain failures give EMBZ_ERR_DOMAIN. res must not alias x. */
int embz_expr_eval_series(arb_ptr res, const embz_expr_t e, arb_srcptr x,
                          const arb_t n, slong len, slong prec);
/* The same for the subtree at node. */
int embz_expr_eval_series_node(arb_ptr res, const embz_expr_t e, long node, arb_srcptr x,
                               const arb_t n, slong len, slong prec);
/* Details: subexpressions not depending on i follow the scalar rules of embz_expr_eval_arb.
 * Integer powers use exact truncated products (negative: inverse series first); other
 * powers, log, sqrt, lgamma need a certainly positive constant term. With len == 1 the
 * scalar rules apply throughout. x may have wide coefficients (interval enclosures). */

/* Complex evaluation for acb_calc_integrate. With analytic != 0, the result is set
 * indeterminate (status EMBZ_OK) wherever the function is not certainly holomorphic on the
 * input box (branch cuts of log/sqrt/pow/lgamma/atan). A non-smooth operation is replaced
 * by the holomorphic piece that the real parts of the box select (abs(z) = z when Re z > 0,
 * = -z when Re z < 0; min/max with separated real parts; floor = k when k < Re z < k+1),
 * else indeterminate. With analytic == 0, real inputs (imaginary part exactly 0) follow
 * the rules of embz_expr_eval_arb; EMBZ_ERR_DOMAIN is returned only for certain domain
 * errors (log of a real number <= 0, division by exact 0, ...). */
int embz_expr_eval_acb(acb_t res, const embz_expr_t e, const acb_t i, const acb_t n,
                       int analytic, slong prec);

#endif
