/* Double-precision evaluation (fast path, not certified). Undefined -> NaN; any
 * non-finite intermediate value also gives NaN, matching the ball evaluator's rule. */
#define _DEFAULT_SOURCE 1   /* lgamma_r: lgamma() writes the global signgam */
#include <math.h>
#include <stdlib.h>
#include "expr_impl.h"

static double pow_d(double x, double y)
{
    if (y == floor(y) && fabs(y) < 9007199254740992.0) return pow(x, y);
    if (x > 0) return pow(x, y);
    if (x == 0 && y > 0) return 0.0;
    return NAN;
}

static double op_d(const embz_node_t *nd, double a, double b, double i, double n)
{
    int s;
    switch (nd->op) {
    case EMBZ_OP_NUM: return fmpq_get_d(nd->num);
    case EMBZ_OP_I: return i;
    case EMBZ_OP_N: return n;
    case EMBZ_OP_PARAM: return NAN;
    case EMBZ_OP_PI: return 3.14159265358979323846;
    case EMBZ_OP_E: return 2.71828182845904523536;
    case EMBZ_OP_GAMMA: return 0.57721566490153286061;
    case EMBZ_OP_NEG: return -a;
    case EMBZ_OP_ADD: return a + b;
    case EMBZ_OP_SUB: return a - b;
    case EMBZ_OP_MUL: return a * b;
    case EMBZ_OP_DIV: return b == 0 ? NAN : a / b;
    case EMBZ_OP_POW: return pow_d(a, b);
    case EMBZ_OP_LOG: return a > 0 ? log(a) : NAN;
    case EMBZ_OP_LOG2: return a > 0 ? log2(a) : NAN;
    case EMBZ_OP_LOG10: return a > 0 ? log10(a) : NAN;
    case EMBZ_OP_EXP: return exp(a);
    case EMBZ_OP_SQRT: return a >= 0 ? sqrt(a) : NAN;
    case EMBZ_OP_ABS: return fabs(a);
    case EMBZ_OP_LGAMMA: return a > 0 ? lgamma_r(a, &s) : NAN;
    case EMBZ_OP_ATAN: return atan(a);
    case EMBZ_OP_SIN: return sin(a);
    case EMBZ_OP_COS: return cos(a);
    case EMBZ_OP_FLOOR: return floor(a);
    case EMBZ_OP_CEIL: return ceil(a);
    case EMBZ_OP_BINOM: return embz_binom_d(a, b);
    case EMBZ_OP_MIN: return a < b ? a : b;
    case EMBZ_OP_MAX: return a > b ? a : b;
    default: return NAN;
    }
}

double embz_expr_eval_d(const embz_expr_t e, double i, double n)
{
    double small[64], *v = small;
    double r;
    if (e->root < 0) return NAN;
    if (e->root >= 64) {
        v = malloc((size_t) (e->root + 1) * sizeof(double));
        if (v == NULL) return NAN;
    }
    for (long k = 0; k <= e->root; k++) {
        const embz_node_t *nd = e->nodes + k;
        double a = nd->a >= 0 ? v[nd->a] : 0.0;
        double b = nd->b >= 0 ? v[nd->b] : 0.0;
        double x = (isnan(a) || isnan(b)) ? NAN : op_d(nd, a, b, i, n);
        v[k] = isfinite(x) ? x : NAN;
    }
    r = v[e->root];
    if (v != small) free(v);
    return r;
}
