/* E_n(q) of a level family (EMBZ_FAMILY_LEVELS, embz/family.h): the levels of size n are
 * formed (values as balls, counts exact) and the distance is taken on the levels
 * (embz_levels_distance, src/measure/levels.c), so the cost grows with the number of levels,
 * not with the dimension. */
#include <string.h>
#include <math.h>
#include "embz/error.h"
#include "embz/levels.h"
#include "impl.h"

/* count = binom(n, i) exactly (the counts of tensor powers): then each count follows from the
 * one before, C(n, i + 1) = C(n, i) (n - i) / (i + 1), instead of a binomial of n bits at
 * every level. */
static int count_is_binom_n_i(const embz_expr_t e)
{
    if (e->root < 0) return 0;
    const embz_node_t *r = e->nodes + e->root;
    return r->op == EMBZ_OP_BINOM && e->nodes[r->a].op == EMBZ_OP_N
           && e->nodes[r->b].op == EMBZ_OP_I;
}

/* The levels of size n: i runs over [first(n), last(n)]; at most EMBZ_LEVELS_MAX. */
int embz_family_levels(embz_levels_t x, const embz_family_t f, const fmpz_t n, slong prec,
                       embz_err_t *err)
{
    fmpq_t a, b, c;
    fmpz_t i, cnt;
    arb_t v, bi, bn;
    int st = EMBZ_OK;
    fmpq_init(a); fmpq_init(b); fmpq_init(c);
    fmpz_init(i); fmpz_init(cnt);
    arb_init(v); arb_init(bi); arb_init(bn);
    x->len = 0;
    if (!embz_family_is_levels(f)) {
        st = embz_err_set(err, EMBZ_ERR_INPUT, "not a level family");
        goto out;
    }
    fmpz_zero(i);
    if (embz_expr_eval_fmpq(a, f->first, i, n) != EMBZ_OK
        || embz_expr_eval_fmpq(b, f->last, i, n) != EMBZ_OK
        || !fmpz_is_one(fmpq_denref(a)) || !fmpz_is_one(fmpq_denref(b))) {
        st = embz_err_set(err, EMBZ_ERR_DOMAIN,
                          "the range of levels must be integers at n (first and last)");
        goto out;
    }
    fmpz_sub(cnt, fmpq_numref(b), fmpq_numref(a));
    if (fmpz_sgn(cnt) < 0) {
        st = embz_err_set(err, EMBZ_ERR_DOMAIN, "no levels at this n: last < first");
        goto out;
    }
    if (fmpz_cmp_si(cnt, EMBZ_LEVELS_MAX - 1) > 0) {
        st = embz_err_set(err, EMBZ_ERR_LIMIT, "more than %ld levels at this n",
                          (long) EMBZ_LEVELS_MAX);
        goto out;
    }
    arb_set_fmpz(bn, n);
    int binom = count_is_binom_n_i(f->count) && fmpz_sgn(fmpq_numref(a)) >= 0
                && fmpz_sgn(n) >= 0;
    int have_prev = 0;
    for (fmpz_set(i, fmpq_numref(a)); fmpz_cmp(i, fmpq_numref(b)) <= 0; fmpz_add_ui(i, i, 1)) {
        int s;
        if (binom && have_prev && fmpz_cmp(i, n) <= 0) {
            /* c <- c (n - i + 1) / i, exact */
            fmpz_t t;
            fmpz_init(t);
            fmpz_sub(t, n, i);
            fmpz_add_ui(t, t, 1);
            fmpz_mul(fmpq_numref(c), fmpq_numref(c), t);
            fmpz_divexact(fmpq_numref(c), fmpq_numref(c), i);
            fmpz_clear(t);
            s = EMBZ_OK;
        } else {
            s = embz_expr_eval_fmpq(c, f->count, i, n);
            have_prev = s == EMBZ_OK && fmpz_sgn(fmpq_numref(c)) > 0;
        }
        if (s != EMBZ_OK || !fmpz_is_one(fmpq_denref(c)) || fmpz_sgn(fmpq_numref(c)) < 0) {
            char *is = fmpz_get_str(NULL, 10, i);
            st = embz_err_set(err, EMBZ_ERR_DOMAIN,
                              "the count must be an exact non-negative integer at i = %.40s%s",
                              is, s == EMBZ_ERR_UNSUPPORTED ? " (it is not rational there)" : "");
            flint_free(is);
            goto out;
        }
        if (fmpz_is_zero(fmpq_numref(c))) continue;
        arb_set_fmpz(bi, i);
        s = embz_expr_eval_arb(v, f->weight, bi, bn, prec);
        if (s != EMBZ_OK || !arb_is_finite(v) || arb_is_negative(v)) {
            char *is = fmpz_get_str(NULL, 10, i);
            st = embz_err_set(err, EMBZ_ERR_DOMAIN, "the level value is %s at i = %.40s",
                              s != EMBZ_OK || !arb_is_finite(v) ? "undefined or infinite"
                                                                : "negative", is);
            flint_free(is);
            goto out;
        }
        embz_levels_push(x, v, fmpq_numref(c));
    }
    if (x->len == 0) st = embz_err_set(err, EMBZ_ERR_DOMAIN, "every count is 0 at this n");
out:
    fmpq_clear(a); fmpq_clear(b); fmpq_clear(c);
    fmpz_clear(i); fmpz_clear(cnt);
    arb_clear(v); arb_clear(bi); arb_clear(bn);
    return st;
}

int _embz_error_levels(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                       const embz_target_t q, slong prec, embz_err_t *err)
{
    embz_levels_t x;
    embz_levels_init(x);
    int st = embz_family_levels(x, f, n, prec + 32, err);
    if (st == EMBZ_OK) st = _embz_error_of_levels(res, x, q, prec, err);
    embz_levels_clear(x);
    return st;
}

int _embz_error_of_levels(embz_error_result_t res, const embz_levels_t x,
                          const embz_target_t q, slong prec, embz_err_t *err)
{
    embz_levels_t y;
    arb_t W;
    embz_levels_init(y);
    arb_init(W);
    slong wp = prec + 32;
    int st = EMBZ_OK;
    {
        embz_levels_total(W, x, wp);
        if (!arb_is_positive(W))
            st = embz_err_set(err, EMBZ_ERR_DOMAIN, "the levels' total weight is not positive");
    }
    if (st == EMBZ_OK) {
        embz_levels_tensor_target(y, x, q, wp);
        embz_levels_distance(res->error, res->argk, x, y, prec);
        if (!arb_is_finite(res->error))
            st = embz_err_set(err, EMBZ_ERR_PREC, "no finite enclosure from the levels");
    }
    if (st == EMBZ_OK) {
        fmpz_t dim;
        fmpz_init(dim);
        embz_levels_dim(dim, x);
        res->estimate = arf_get_d(arb_midref(res->error), ARF_RND_NEAR);
        res->method = EMBZ_METHOD_EXPLICIT;
        res->order = 0;
        res->have_bounds = 0;
        res->decided = 0;
        memset(&res->how, 0, sizeof(res->how));
        res->how.kind = EMBZ_HOW_LEVELS;
        res->how.prec = prec;
        res->how.levels = x->len;
        res->how.dim_bits = (slong) fmpz_bits(dim);
        fmpz_clear(dim);
    }
    arb_clear(W);
    embz_levels_clear(y);
    return st;
}
