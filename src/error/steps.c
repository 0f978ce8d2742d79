/* Weights constant on blocks of indices: every i of the weight sits inside the argument of a
 * floor or ceil (2^(-ceil(log2 i)), 1/(1 + floor(sqrt(i))), ...). Up to n such a weight is a
 * list of blocks, each a value repeated over a run of indices, so E_n is computed level by
 * level (levels.c) at a cost that grows with the number of blocks, not with n.
 *
 * The blocks are found from i = 1 on. For the block starting at a, each outermost floor/ceil
 * node (embz_expr_step_nodes) has an integer value K at a; the last index b with the same
 * value is searched on the node's argument g: a root of g(x) = c (c the integer where the
 * value changes) by regula falsi in ln x with bisection safeguards, on exact integer
 * decisions. Nothing of the search is trusted: a block [a, b] is accepted only when every
 * node is proven constant on it, exactly at a and b (exact rational evaluation where the
 * argument is rational there, else more precision: embz_expr_eval_arb) and by one ball
 * evaluation over the real interval [a + 1, b - 1], which encloses every value in between;
 * if that fails, the largest proven b is found by bisection. So the blocks are right for
 * any argument, monotone or not; monotone arguments make them cheap. */
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include "embz/error.h"
#include "embz/util.h"
#include "embz/levels.h"
#include "impl.h"

#define STEPS_MAX_NODES 8
/* falsi iterations for one change point before plain bisection on exact decisions */
#define STEPS_FALSI_ITER 200

typedef struct {
    const embz_expr_struct *e;
    long node[STEPS_MAX_NODES];
    slong len;
    arb_t n;                 /* the size, exact */
    slong wp;                /* working precision of the decisions */
    slong evals;             /* evaluations spent */
    slong max_evals;         /* the budget of evaluations */
    const volatile int *cancel;
    double deadline;         /* > 0: wall-clock seconds (CLOCK_MONOTONIC) to stop at */
    int domain;              /* an evaluation was undefined (not merely undecided) */
    fmpz_t bad;              /* where */
} steps_ctx;

static double now_seconds(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

/* The budget, the cancel flag or the time is used up. */
static int stopped(const steps_ctx *c)
{
    if (c->evals > c->max_evals) return 1;
    if (c->cancel != NULL && *c->cancel) return 1;
    return c->deadline > 0 && (c->evals & 63) == 0 && now_seconds() > c->deadline;
}

int _embz_steps_applies(const embz_family_t f)
{
    long nodes[STEPS_MAX_NODES];
    if (embz_family_is_levels(f)) return 0;
    slong k = embz_expr_step_nodes(nodes, STEPS_MAX_NODES, f->weight);
    return k >= 1 && k <= STEPS_MAX_NODES;
}

/* The value of node k at the integer i, exactly: 1, or 0 when it cannot be decided. */
static int key_at(fmpz_t key, steps_ctx *c, slong k, const fmpz_t i)
{
    arb_t x, v;
    arb_init(x);
    arb_init(v);
    arb_set_fmpz(x, i);
    c->evals++;
    int st = embz_expr_eval_arb_node(v, c->e, c->node[k], x, c->n, c->wp);
    int ok = st == EMBZ_OK && arb_is_exact(v) && arb_get_unique_fmpz(key, v) && !stopped(c);
    if (st == EMBZ_ERR_DOMAIN && !c->domain) {
        c->domain = 1;
        fmpz_set(c->bad, i);
    }
    arb_clear(x);
    arb_clear(v);
    return ok;
}

/* Every node has the values keys on the indices a..b (keys are their values at a). */
static int constant_on(steps_ctx *c, const fmpz *keys, const fmpz_t a, const fmpz_t b)
{
    fmpz_t k, w;
    arb_t x, v;
    fmpz_init(k);
    fmpz_init(w);
    arb_init(x);
    arb_init(v);
    int ok = 1;
    fmpz_sub(w, b, a);
    if (fmpz_cmp_ui(w, 2) >= 0) {
        /* the real interval [a + 1, b - 1]: midpoint (a + b)/2, radius (b - a - 2)/2 */
        arf_set_fmpz(arb_midref(x), a);
        arf_add_fmpz(arb_midref(x), arb_midref(x), b, ARF_PREC_EXACT, ARF_RND_DOWN);
        arf_mul_2exp_si(arb_midref(x), arb_midref(x), -1);
        fmpz_sub_ui(w, w, 2);
        mag_set_fmpz(arb_radref(x), w);
        mag_mul_2exp_si(arb_radref(x), arb_radref(x), -1);
    }
    for (slong j = 0; j < c->len && ok; j++)
        ok = fmpz_equal(a, b) || (key_at(k, c, j, b) && fmpz_equal(k, keys + j));
    fmpz_sub(w, b, a);
    if (ok && fmpz_cmp_ui(w, 2) >= 0) {
        arb_struct s[2], d[2];
        arb_init(s + 0); arb_init(s + 1); arb_init(d + 0); arb_init(d + 1);
        /* the real interval [a, b] as the series x + t */
        arb_set_fmpz(s + 0, a);
        arb_union(s + 0, s + 0, x, c->wp);
        arb_t bb;
        arb_init(bb);
        arb_set_fmpz(bb, b);
        arb_union(s + 0, s + 0, bb, c->wp);
        arb_clear(bb);
        arb_one(s + 1);
        for (slong j = 0; j < c->len && ok; j++) {
            c->evals++;
            /* an argument with a derivative of one sign over [a, b] is monotone there, so
             * the value, equal at both ends, is that value throughout; otherwise one ball
             * over the interior must show it */
            if (embz_expr_eval_series_node(d, c->e, c->e->nodes[c->node[j]].a, s, c->n, 2,
                                           c->wp) == EMBZ_OK
                && (arb_is_positive(d + 1) || arb_is_negative(d + 1)))
                continue;
            ok = embz_expr_eval_arb_node(v, c->e, c->node[j], x, c->n, c->wp) == EMBZ_OK
                 && arb_is_exact(v) && arb_get_unique_fmpz(k, v) && fmpz_equal(k, keys + j);
        }
        arb_clear(s + 0); arb_clear(s + 1); arb_clear(d + 0); arb_clear(d + 1);
    }
    fmpz_clear(k);
    fmpz_clear(w);
    arb_clear(x);
    arb_clear(v);
    return ok;
}

/* mid(g(i)) - target for the argument g of node k at the integer i (an estimate that only
 * guides the search), and ln i; 0 when g cannot be evaluated there. */
static int guide_at(arf_t h, arf_t u, steps_ctx *c, slong k, const fmpz_t i, const fmpz_t target)
{
    arb_t x, v;
    arb_init(x);
    arb_init(v);
    arb_set_fmpz(x, i);
    c->evals++;
    int ok = embz_expr_eval_arb_node(v, c->e, c->e->nodes[c->node[k]].a, x, c->n, c->wp)
             == EMBZ_OK;
    if (ok) {
        arb_sub_fmpz(v, v, target, c->wp);
        arf_set(h, arb_midref(v));
        arb_log(x, x, c->wp);
        arf_set(u, arb_midref(x));
    }
    arb_clear(x);
    arb_clear(v);
    return ok;
}

/* The last index b in [lo, hi) with node k equal to K (its value at lo), given that its
 * value at hi differs (khi). A change point found by regula falsi in ln i, then exact
 * bisection; the caller proves the block. Returns 0 when a value cannot be decided. */
static int change_point(fmpz_t b, steps_ctx *c, slong k, const fmpz_t K, const fmpz_t khi,
                        const fmpz_t lo_in, const fmpz_t hi_in)
{
    const embz_node_t *nd = c->e->nodes + c->node[k];
    int up = fmpz_cmp(khi, K) > 0;
    fmpz_t lo, hi, m, key, target, w;
    arf_t hlo, hhi, ulo, uhi, hm, um, t;
    fmpz_init_set(lo, lo_in);
    fmpz_init_set(hi, hi_in);
    fmpz_init(m); fmpz_init(key); fmpz_init(target); fmpz_init(w);
    arf_init(hlo); arf_init(hhi); arf_init(ulo); arf_init(uhi);
    arf_init(hm); arf_init(um); arf_init(t);
    /* the integer the argument crosses where the value leaves K */
    if (nd->op == EMBZ_OP_FLOOR) fmpz_add_si(target, K, up ? 1 : 0);
    else fmpz_sub_si(target, K, up ? 0 : 1);
    int ok = 1;
    int guided = guide_at(hlo, ulo, c, k, lo, target) && guide_at(hhi, uhi, c, k, hi, target)
                 && arf_sgn(hlo) * arf_sgn(hhi) < 0;
    int side = 0;     /* Illinois: the end kept twice in a row has its value halved */
    for (slong it = 0; ok; it++) {
        fmpz_sub(w, hi, lo);
        if (fmpz_cmp_ui(w, 1) <= 0) break;
        int done = 0;
        if (guided && it < STEPS_FALSI_ITER && it % 4 != 3) {
            /* um = ulo - hlo (uhi - ulo) / (hhi - hlo), m = floor(e^um) inside (lo, hi) */
            arf_sub(t, uhi, ulo, c->wp, ARF_RND_NEAR);
            arf_mul(t, t, hlo, c->wp, ARF_RND_NEAR);
            arf_sub(hm, hhi, hlo, c->wp, ARF_RND_NEAR);
            if (!arf_is_zero(hm)) {
                arf_div(t, t, hm, c->wp, ARF_RND_NEAR);
                arf_sub(um, ulo, t, c->wp, ARF_RND_NEAR);
                arb_t x;
                arb_init(x);
                arb_set_arf(x, um);
                arb_exp(x, x, c->wp);
                done = arf_is_finite(arb_midref(x));
                if (done) arf_get_fmpz(m, arb_midref(x), ARF_RND_FLOOR);
                arb_clear(x);
            }
        }
        if (!done) {
            /* bisection: in ln i while the bracket spans a factor above 2, else in i */
            fmpz_mul_2exp(w, lo, 1);
            if (fmpz_cmp(hi, w) > 0 && fmpz_cmp_ui(lo, 0) > 0) {
                fmpz_mul(m, lo, hi);
                fmpz_sqrt(m, m);
            } else {
                fmpz_add(m, lo, hi);
                fmpz_fdiv_q_2exp(m, m, 1);
            }
        }
        if (fmpz_cmp(m, lo) <= 0) fmpz_add_ui(m, lo, 1);
        if (fmpz_cmp(m, hi) >= 0) fmpz_sub_ui(m, hi, 1);
        if (!key_at(key, c, k, m)) { ok = 0; break; }
        int same = fmpz_equal(key, K);
        if (guided && !guide_at(hm, um, c, k, m, target)) guided = 0;
        if (same) {
            fmpz_set(lo, m);
            if (guided) { arf_set(hlo, hm); arf_set(ulo, um); }
            if (guided && side == -1) arf_mul_2exp_si(hhi, hhi, -1);
            side = -1;
        } else {
            fmpz_set(hi, m);
            if (guided) { arf_set(hhi, hm); arf_set(uhi, um); }
            if (guided && side == 1) arf_mul_2exp_si(hlo, hlo, -1);
            side = 1;
        }
        if (guided && (arf_sgn(hlo) * arf_sgn(hhi) >= 0 || it + 1 >= STEPS_FALSI_ITER))
            guided = 0;
    }
    fmpz_set(b, lo);
    fmpz_clear(lo); fmpz_clear(hi); fmpz_clear(m); fmpz_clear(key); fmpz_clear(target);
    fmpz_clear(w);
    arf_clear(hlo); arf_clear(hhi); arf_clear(ulo); arf_clear(uhi);
    arf_clear(hm); arf_clear(um); arf_clear(t);
    return ok;
}

/* A proven lower bound on the number of blocks up to n, or -1 when none is proven: a node
 * whose argument g has |g'| <= 1 on [1, n] changes by at most 1 from one index to the next,
 * so it takes every integer between its values at 1 and n, each on a block of its own. */
static int count_lower(fmpz_t count, steps_ctx *c, const fmpz_t n)
{
    fmpz_t k0, k1;
    arb_struct s[2], d[2];
    fmpz_init(k0); fmpz_init(k1);
    arb_init(s + 0); arb_init(s + 1); arb_init(d + 0); arb_init(d + 1);
    arb_set_fmpz(s + 0, n);
    arb_union(s + 0, s + 0, c->n, c->wp);
    arb_t one;
    arb_init(one);
    arb_one(one);
    arb_union(s + 0, s + 0, one, c->wp);          /* the real interval [1, n] */
    arb_one(s + 1);
    fmpz_zero(count);
    int any = 0;
    for (slong j = 0; j < c->len; j++) {
        fmpz_one(k0);
        if (!key_at(k1, c, j, k0) || !key_at(k0, c, j, n)) continue;
        if (embz_expr_eval_series_node(d, c->e, c->e->nodes[c->node[j]].a, s, c->n, 2, c->wp)
            != EMBZ_OK)
            continue;
        arb_abs(d + 1, d + 1);
        if (!arb_le(d + 1, one)) continue;
        fmpz_sub(k1, k1, k0);
        fmpz_abs(k1, k1);
        fmpz_add_ui(k1, k1, 1);
        if (fmpz_cmp(k1, count) > 0) fmpz_set(count, k1);
        any = 1;
    }
    fmpz_clear(k0); fmpz_clear(k1);
    arb_clear(s + 0); arb_clear(s + 1); arb_clear(d + 0); arb_clear(d + 1);
    arb_clear(one);
    return any;
}

static void ctx_init(steps_ctx *c, const embz_family_t f, const fmpz_t n, slong prec)
{
    memset(c, 0, sizeof(*c));
    c->e = f->weight;
    c->len = embz_expr_step_nodes(c->node, STEPS_MAX_NODES, f->weight);
    arb_init(c->n);
    arb_set_fmpz(c->n, n);
    c->wp = prec + (slong) fmpz_bits(n) + 64;
    c->max_evals = EMBZ_STEPS_MAX_EVALS;
    fmpz_init(c->bad);
}

static void ctx_clear(steps_ctx *c)
{
    arb_clear(c->n);
    fmpz_clear(c->bad);
}

int _embz_steps_refused(char *why, size_t len, const embz_family_t f, const fmpz_t n)
{
    steps_ctx c;
    ctx_init(&c, f, n, 64);
    fmpz_t count;
    fmpz_init(count);
    int refused = c.len >= 1 && c.len <= STEPS_MAX_NODES && count_lower(count, &c, n)
                  && fmpz_cmp_si(count, EMBZ_STEPS_MAX_BLOCKS) > 0;
    if (refused) {
        char *cs = embz_fmpz_string(count, 12);
        snprintf(why, len, "the weight has at least %s blocks of constant value up to n; at "
                 "most %ld are summed block by block", cs, (long) EMBZ_STEPS_MAX_BLOCKS);
        free(cs);
    }
    fmpz_clear(count);
    ctx_clear(&c);
    return refused;
}

int _embz_steps_levels(embz_levels_t x, const embz_family_t f, const fmpz_t n, slong prec,
                       slong max_blocks, const volatile int *cancel, double seconds,
                       embz_err_t *err)
{
    steps_ctx c;
    ctx_init(&c, f, n, prec);
    if (c.len < 1 || c.len > STEPS_MAX_NODES) {
        ctx_clear(&c);
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "the weight is not constant on blocks "
                            "(i outside floor and ceil, or more than %d of them)",
                            STEPS_MAX_NODES);
    }
    if (max_blocks <= 0) max_blocks = EMBZ_STEPS_MAX_BLOCKS;
    c.cancel = cancel;
    if (seconds > 0) c.deadline = now_seconds() + seconds;
    fmpz *keys = _fmpz_vec_init(c.len);
    fmpz_t a, b, end, k1, one, len;
    arb_t w;
    fmpz_init(a); fmpz_init(b); fmpz_init(end); fmpz_init(k1); fmpz_init(len);
    fmpz_init_set_ui(one, 1);
    arb_init(w);
    int st = EMBZ_OK;

    /* up front, where it is proven: at least this many blocks */
    if (count_lower(len, &c, n) && fmpz_cmp_si(len, max_blocks) > 0) {
        char *ls = embz_fmpz_string(len, 12);
        st = embz_err_set(err, EMBZ_ERR_LIMIT, "the weight has at least %s blocks of constant "
                          "value up to n; at most %ld are summed block by block", ls,
                          (long) max_blocks);
        free(ls);
    }
    fmpz_one(a);
    while (st == EMBZ_OK && fmpz_cmp(a, n) <= 0) {
        if (x->len >= max_blocks) {
            st = embz_err_set(err, EMBZ_ERR_LIMIT, "more than %ld blocks of constant weight "
                              "up to n", (long) max_blocks);
            break;
        }
        fmpz_set(end, n);
        for (slong j = 0; j < c.len && st == EMBZ_OK; j++) {
            if (!key_at(keys + j, &c, j, a) || !key_at(k1, &c, j, end)) {
                st = EMBZ_ERR_UNSUPPORTED;
                break;
            }
            if (fmpz_equal(k1, keys + j)) continue;
            if (!change_point(b, &c, j, keys + j, k1, a, end)) st = EMBZ_ERR_UNSUPPORTED;
            else fmpz_set(end, b);
        }
        if (st != EMBZ_OK) break;
        if (!constant_on(&c, keys, a, end)) {
            /* the search was misled (an argument that is not monotone): the largest proven
             * block, by bisection (a proven block stays proven when shortened) */
            fmpz_t lo, hi, m;
            fmpz_init_set(lo, a);
            fmpz_init_set(hi, end);
            fmpz_init(m);
            while (fmpz_cmp(lo, hi) < 0) {
                fmpz_add(m, lo, hi);
                fmpz_add_ui(m, m, 1);
                fmpz_fdiv_q_2exp(m, m, 1);
                if (constant_on(&c, keys, a, m)) fmpz_set(lo, m);
                else fmpz_sub_ui(hi, m, 1);
                if (c.domain || stopped(&c)) break;
            }
            fmpz_set(end, lo);
            fmpz_clear(lo); fmpz_clear(hi); fmpz_clear(m);
        }
        /* at the decisions' precision: a floor or ceil in the weight must come out exact
         * at a, which is as hard as the decisions themselves (log2(2^t + 1) against t) */
        if (c.domain || stopped(&c)) {
            st = EMBZ_ERR_UNSUPPORTED;
            break;
        }
        if (embz_family_weight_arb(w, f, a, n, c.wp, err) != EMBZ_OK) {
            st = err != NULL && err->code ? err->code : EMBZ_ERR_DOMAIN;
            break;
        }
        if (arb_is_negative(w) || !arb_is_finite(w)) {
            char *is = embz_fmpz_string(a, 40);
            st = embz_err_set(err, EMBZ_ERR_DOMAIN, "the weight is negative or undefined at "
                              "i = %s", is);
            free(is);
            break;
        }
        arb_set_round(w, w, prec);
        fmpz_sub(len, end, a);
        fmpz_add_ui(len, len, 1);
        embz_levels_push(x, w, len);
        fmpz_add_ui(a, end, 1);
    }
    if (st == EMBZ_ERR_UNSUPPORTED) {
        /* say why: an undefined value (its own message), a limit, or an undecided step */
        char *is = embz_fmpz_string(c.domain ? c.bad : a, 40);
        if (c.domain) {
            if (embz_family_weight_arb(w, f, c.bad, n, c.wp, err) == EMBZ_OK)
                embz_err_set(err, EMBZ_ERR_DOMAIN, "a floor or ceil of the weight is undefined "
                             "at i = %s", is);
            st = EMBZ_ERR_DOMAIN;
        } else if (cancel != NULL && *cancel) {
            st = embz_err_set(err, EMBZ_ERR_LIMIT, "cancelled");
        } else if (c.evals > c.max_evals || (c.deadline > 0 && now_seconds() > c.deadline)) {
            st = embz_err_set(err, EMBZ_ERR_LIMIT, "the blocks of the weight took more than "
                              "%s up to i = %s (%ld blocks so far)",
                              c.evals > c.max_evals ? "the evaluation budget" : "the time allowed",
                              is, (long) x->len);
        } else {
            st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "cannot decide a floor or ceil of the "
                              "weight near i = %s", is);
        }
        free(is);
    }
    _fmpz_vec_clear(keys, c.len);
    fmpz_clear(a); fmpz_clear(b); fmpz_clear(end); fmpz_clear(k1); fmpz_clear(one);
    fmpz_clear(len);
    arb_clear(w);
    ctx_clear(&c);
    return st;
}

int _embz_error_steps(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                      const embz_target_t q, const volatile int *cancel, double seconds,
                      slong prec, embz_err_t *err)
{
    embz_levels_t x;
    embz_levels_init(x);
    int st = _embz_steps_levels(x, f, n, prec + 32, 0, cancel, seconds, err);
    if (st == EMBZ_OK) st = _embz_error_of_levels(res, x, q, prec, err);
    if (st == EMBZ_OK) {
        res->method = EMBZ_METHOD_ANALYTIC;
        res->how.kind = EMBZ_HOW_BLOCKS;
    }
    embz_levels_clear(x);
    return st;
}
