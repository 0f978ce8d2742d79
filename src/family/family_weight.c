/* Weights of a family at one index, with certified domain checks.
 *
 * When the ball evaluation fails, the expression is re-evaluated node by node (children have
 * smaller indices than parents, so evaluating with the root moved to node k evaluates exactly
 * the nodes 0..k) to find the first failing operation and to say why: a division by an exact
 * zero makes the weight infinite, a logarithm of a non-positive number makes it undefined.
 * When the failure is not decided by the balls (a divisor that merely contains 0), the
 * precision is doubled a couple of times before giving up. */
#include <math.h>
#include <stdlib.h>
#include "family_internal.h"
#include "embz/util.h"

#define EMBZ_WEIGHT_RETRIES 2

enum { CAUSE_NONE = 0, CAUSE_INFINITE, CAUSE_UNDEFINED };

static int index_error(embz_err_t *err, int code, const char *what, const fmpz_t i,
                       const char *extra)
{
    char *s = embz_fmpz_string(i, 40);
    embz_err_set(err, code, "%s at i = %s%s", what, s, extra);
    free(s);
    return code;
}

/* The cause of a failed evaluation when the balls decide it, else CAUSE_NONE. */
static int failure_cause(const embz_expr_t e, const arb_t i, const arb_t n, slong prec)
{
    embz_expr_t t;
    arb_t r, va, vb;
    int cause = CAUSE_NONE;
    long k;

    embz_expr_init(t);
    arb_init(r);
    arb_init(va);
    arb_init(vb);
    embz_expr_set(t, e);
    for (k = 0; k <= e->root; k++) {
        t->root = (int) k;
        if (embz_expr_eval_arb(r, t, i, n, prec) != EMBZ_OK || !arb_is_finite(r)) break;
    }
    if (k <= e->root) {
        const embz_node_t *nd = e->nodes + k;
        int oka = 1, okb = 1;
        if (nd->a >= 0) { t->root = nd->a; oka = embz_expr_eval_arb(va, t, i, n, prec) == EMBZ_OK; }
        if (nd->b >= 0) { t->root = nd->b; okb = embz_expr_eval_arb(vb, t, i, n, prec) == EMBZ_OK; }
        if (oka && okb) {
            switch (nd->op) {
            case EMBZ_OP_DIV:
                if (arb_is_zero(vb))
                    cause = arb_is_nonzero(va) ? CAUSE_INFINITE : CAUSE_UNDEFINED;
                break;
            case EMBZ_OP_POW:
                if (arb_is_zero(va) && arb_is_negative(vb))
                    cause = CAUSE_INFINITE;
                else if (arb_is_negative(va) && arb_is_exact(vb) && !arb_is_int(vb))
                    cause = CAUSE_UNDEFINED;
                break;
            case EMBZ_OP_LOG: case EMBZ_OP_LOG2: case EMBZ_OP_LOG10: case EMBZ_OP_LGAMMA:
                if (arb_is_nonpositive(va)) cause = CAUSE_UNDEFINED;
                break;
            case EMBZ_OP_SQRT:
                if (arb_is_negative(va)) cause = CAUSE_UNDEFINED;
                break;
            default:
                break;
            }
        }
    }
    t->root = e->root;
    embz_expr_clear(t);
    arb_clear(r);
    arb_clear(va);
    arb_clear(vb);
    return cause;
}

int embz_family_weight_arb(arb_t w, const embz_family_t f, const fmpz_t i, const fmpz_t n,
                           slong prec, embz_err_t *err)
{
    if (embz_family_is_levels(f)) {
        arb_indeterminate(w);
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED,
                            "a level family has levels with counts, not a weight w(i)");
    }
    arb_t ia, na;
    int status = EMBZ_OK, straddle = 0;
    slong p = prec;
    arb_init(ia);
    arb_init(na);
    arb_set_fmpz(ia, i);
    arb_set_fmpz(na, n);
    for (int attempt = 0; attempt <= EMBZ_WEIGHT_RETRIES; attempt++) {
        p = prec << attempt;
        int st = embz_expr_eval_arb(w, f->weight, ia, na, p);
        if (st == EMBZ_OK && arb_is_finite(w)) {
            if (arb_is_nonnegative(w)) { straddle = 0; goto done; }
            if (arb_is_negative(w)) {
                status = index_error(err, EMBZ_ERR_DOMAIN, "weight is negative", i, "");
                goto done;
            }
            straddle = 1;          /* contains 0 and negative numbers: look closer */
            continue;
        }
        if (st != EMBZ_OK && st != EMBZ_ERR_DOMAIN) {
            status = index_error(err, st, "weight could not be evaluated", i, "");
            goto done;
        }
        straddle = 0;
        int cause = failure_cause(f->weight, ia, na, p);
        if (cause == CAUSE_INFINITE) {
            status = index_error(err, EMBZ_ERR_DOMAIN, "weight is infinite", i,
                                 " (division by zero)");
            goto done;
        }
        if (cause == CAUSE_UNDEFINED) {
            status = index_error(err, EMBZ_ERR_DOMAIN, "weight undefined", i, "");
            goto done;
        }
    }
    {
        char extra[96];
        if (straddle) {
            snprintf(extra, sizeof(extra), " (its enclosure at %ld bits contains 0 and negative "
                     "numbers)", (long) p);
            status = index_error(err, EMBZ_ERR_DOMAIN, "cannot decide the sign of the weight",
                                 i, extra);
        } else {
            snprintf(extra, sizeof(extra), " (no finite enclosure at %ld bits: infinite or "
                     "undefined)", (long) p);
            status = index_error(err, EMBZ_ERR_DOMAIN, "cannot evaluate the weight", i, extra);
        }
    }
done:
    if (status != EMBZ_OK) arb_indeterminate(w);
    arb_clear(ia);
    arb_clear(na);
    return status;
}

double embz_family_weight_d(const embz_family_t f, double i, double n)
{
    return embz_expr_eval_d(f->weight, i, n);
}
