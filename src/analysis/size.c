/* Smallest size n whose embezzlement error reaches a goal eps (see include/embz/size.h).
 *
 * Every decision "E_n <= eps" or "E_n > eps" rests on a certified enclosure of E_n: the side is
 * taken only when the whole ball lies on it; otherwise the precision is raised. The search
 * itself (which n to look at) may use any heuristic: exhaustive for small n, then a bracket
 * in ln n refined by regula falsi (Illinois variant) with bisection safeguards. What the
 * search cannot prove (that no smaller n works when E_n is not monotone, that E_n stays below
 * eps) is checked on samples and reported as such. */
#include <string.h>
#include "embz/size.h"
#include "embz/error.h"
#include "embz/fidelity.h"
#include "sum/sum.h"

#define SIZE_PREC_STEPS 3         /* prec, 2 prec, 4 prec */
#define SIZE_MAX_STEPS 400

typedef struct {
    const embz_family_struct *f;
    const embz_target_struct *q;
    slong prec;
    arb_t eps;
    embz_eval_t ev;      /* the size search's policy (size_eval_opts) */
    embz_eval_work_t work;
    int decision;        /* the engine may stop once the side is settled */
    int used_explicit, used_analytic, used_exact;
    int qubits_only;
    long evals;
    int have_qeps;       /* the goal as an exact rational (qeps), for exact ties */
    fmpq_t qeps;
    int measure;         /* EMBZ_MEASURE_K or EMBZ_MEASURE_PURIFIED (embz/fidelity.h) */
    int bounds_seen;     /* a measure's enclosure came from bounds only (no value) */
    int undecided_bounds;/* a size left undecided had bounds only */
    int used_fid_explicit, used_fid_analytic;
} sctx;

/* Exact E_n for small n when every weight is rational (embz_expr_eval_fmpq) and the target
 * with n entries is small: K(p -> p (x) q) in FLINT's rationals. Returns 0 when not
 * applicable. */
#define SIZE_EXACT_MAX_N 4096
#define SIZE_EXACT_MAX_ENTRIES 65536
static int exact_error(fmpq_t E, const sctx *c, const fmpz_t n)
{
    if (fmpz_cmp_si(n, SIZE_EXACT_MAX_N) > 0 || embz_family_is_levels(c->f)) return 0;
    slong nn = fmpz_get_si(n);
    slong m = c->q->kind == EMBZ_TARGET_UNIFORM ? (slong) c->q->d : c->q->q->len;
    if (c->q->kind == EMBZ_TARGET_UNIFORM && c->q->d > SIZE_EXACT_MAX_ENTRIES) return 0;
    if (nn * m > SIZE_EXACT_MAX_ENTRIES) return 0;
    embz_qvec_t p, r;
    embz_qvec_init(p); embz_qvec_init(r);
    p->p = _fmpq_vec_init(nn);
    p->len = nn;
    fmpq_t W;
    fmpz_t i;
    fmpq_init(W);
    fmpz_init(i);
    int ok = 1;
    for (slong k = 0; k < nn && ok; k++) {
        fmpz_set_si(i, k + 1);
        ok = embz_expr_eval_fmpq(p->p + k, c->f->weight, i, n) == EMBZ_OK
             && fmpq_sgn(p->p + k) >= 0;
        if (ok) fmpq_add(W, W, p->p + k);
    }
    ok = ok && fmpq_sgn(W) > 0;
    if (ok) {
        for (slong k = 0; k < nn; k++) fmpq_div(p->p + k, p->p + k, W);
        r->p = _fmpq_vec_init(nn * m);
        r->len = nn * m;
        fmpq_t qj;
        fmpq_init(qj);
        for (slong j = 0; j < m; j++) {
            if (c->q->kind == EMBZ_TARGET_UNIFORM) fmpq_set_si(qj, 1, c->q->d);
            else fmpq_set(qj, c->q->q->p + j);
            for (slong k = 0; k < nn; k++) fmpq_mul(r->p + j * nn + k, p->p + k, qj);
        }
        fmpq_clear(qj);
        long argk;
        embz_qvec_distance(E, &argk, p, r);
    }
    embz_qvec_clear(p); embz_qvec_clear(r);
    fmpq_clear(W);
    fmpz_clear(i);
    return ok;
}

const char *embz_size_status_id(int status)
{
    return status == EMBZ_SIZE_FOUND ? "found"
         : status == EMBZ_SIZE_NOT_REACHED ? "not_reached" : "undecided";
}

void embz_size_result_init(embz_size_result_t r)
{
    memset(r, 0, sizeof(*r));
    fmpz_init(r->n);
    arb_init(r->err_n);
    arb_init(r->err_prev);
    fmpz_init(r->stay_checked_to);
    fmpz_init(r->again_above);
    fmpz_init(r->undecided_lo);
    fmpz_init(r->undecided_hi);
    fmpz_init(r->largest);
    arb_init(r->err_largest);
    fmpz_init(r->n_low);
}

void embz_size_result_clear(embz_size_result_t r)
{
    fmpz_clear(r->n);
    arb_clear(r->err_n);
    arb_clear(r->err_prev);
    fmpz_clear(r->stay_checked_to);
    fmpz_clear(r->again_above);
    fmpz_clear(r->undecided_lo);
    fmpz_clear(r->undecided_hi);
    fmpz_clear(r->largest);
    arb_clear(r->err_largest);
    fmpz_clear(r->n_low);
}

/* The size search's policy: the default one (the analytic engine in decision mode, reused
 * across sizes, one per precision), explicit summation also where a target vector's side
 * is left open, and SIZE_PREC_STEPS precisions while the side is undecided. */
static void size_eval_opts(embz_eval_opts_t o)
{
    embz_eval_opts_init(o);
    o->goal_steps = SIZE_PREC_STEPS;
    o->goal_explicit = 1;
}

/* 1 when the analytic engine cannot take the family at sizes up to nmax (its tail is not
 * certifiable there), the engine's reason in why; a probe on an evaluator of its own, so
 * that the search's own engines stay as they were. */
static int analytic_declines(char *why, size_t len, const sctx *c, const fmpz_t nmax)
{
    if (embz_family_is_levels(c->f)) return 0;
    embz_eval_t ev;
    embz_eval_work_t w;
    embz_eval_init(ev, c->f, &c->ev->opts, c->prec);
    embz_eval_work_init(w);
    embz_err_t e;
    embz_err_clear(&e);
    int declines = embz_eval_prepare(ev, w, nmax, &e) == EMBZ_OK && !ev->analytic_ok;
    if (declines) snprintf(why, len, "%s", ev->prep_reason);
    embz_eval_work_clear(w);
    embz_eval_clear(ev);
    return declines;
}

/* Which side of eps E_n lies on: -1 (E_n <= eps), +1 (E_n > eps), 0 undecided even at the
 * highest precision tried. E receives the last enclosure. Returns a status. */
static int measure_side(int *sd, arb_t E, sctx *c, const fmpz_t n, embz_err_t *err);

static int side(int *sd, arb_t E, sctx *c, const fmpz_t n, embz_err_t *err)
{
    if (c->measure != EMBZ_MEASURE_K) return measure_side(sd, E, c, n, err);
    embz_error_result_t res;
    embz_error_result_init(res);
    int st = embz_eval_side(sd, res, c->ev, c->work, n, c->q, c->eps, c->decision, err);
    if (res->used & (1 << EMBZ_METHOD_ANALYTIC)) c->used_analytic = 1;
    if (res->used & (1 << EMBZ_METHOD_EXPLICIT)) c->used_explicit = 1;
    c->evals += res->steps;
    if (st == EMBZ_OK) arb_set(E, res->error);
    if (st == EMBZ_OK && *sd == 0 && c->have_qeps) {
        /* undecided at every precision: an exact tie is decided in exact arithmetic */
        fmpq_t Eq;
        fmpq_init(Eq);
        if (exact_error(Eq, c, n)) {
            *sd = fmpq_cmp(Eq, c->qeps) <= 0 ? -1 : 1;
            arb_set_fmpq(E, Eq, c->prec);
            c->used_exact = 1;
        }
        fmpq_clear(Eq);
    }
    embz_error_result_clear(res);
    return st;
}

/* The side of eps for a fidelity-type distance (the purified distance P): its certified range
 * [lo, hi] from embz_fidelity: the value's ends, or for bounds only the tightest certified
 * bounds (those from K, intersected with the LOCC fidelity bounds where available). A side is
 * taken only when the whole range lies on it; else the precision is raised (prec, 2 prec,
 * 4 prec), as for K. E receives the range as a ball. */
static int measure_side(int *sd, arb_t E, sctx *c, const fmpz_t n, embz_err_t *err)
{
    int st = EMBZ_OK;
    *sd = 0;
    arf_t lo, hi;
    arf_init(lo); arf_init(hi);
    mag_t w, wprev;
    mag_init(w); mag_init(wprev);
    for (int step = 0; step < SIZE_PREC_STEPS; step++) {
        slong p = c->prec << step;
        embz_fidelity_result_t fr;
        embz_fidelity_result_init(fr);
        st = embz_fidelity(fr, c->f, n, c->q, c->measure, EMBZ_METHOD_AUTO, p, err);
        c->evals++;
        if (st == EMBZ_OK) {
            arb_get_lbound_arf(lo, fr->lower, p);
            arb_get_ubound_arf(hi, fr->upper, p);
            if (fr->bounds_only && fr->have_tight) {
                if (arf_cmp(arb_midref(fr->tight_lo), lo) > 0) arf_set(lo, arb_midref(fr->tight_lo));
                if (arf_cmp(arb_midref(fr->tight_hi), hi) < 0) arf_set(hi, arb_midref(fr->tight_hi));
            }
            if (fr->bounds_only) c->bounds_seen = 1;
            if (fr->how.analytic || fr->bounds_only) c->used_fid_analytic = 1;
            else c->used_fid_explicit = 1;
            arb_set_interval_arf(E, lo, hi, 4 * p);
            if (arb_le(E, c->eps)) *sd = -1;
            else if (arb_gt(E, c->eps)) *sd = 1;
            if (*sd == 0 && fr->bounds_only) c->undecided_bounds = 1;
            mag_set(w, arb_radref(E));
        }
        embz_fidelity_result_clear(fr);
        if (st != EMBZ_OK || *sd != 0) break;
        /* a range that did not halve with the precision is limited by the bounds, not by
         * the arithmetic: more precision would not decide it */
        if (step > 0) {
            mag_mul_2exp_si(wprev, wprev, -1);
            if (mag_cmp(w, wprev) > 0) break;
        }
        mag_set(wprev, w);
    }
    mag_clear(w); mag_clear(wprev);
    arf_clear(lo); arf_clear(hi);
    return st;
}

/* floor(exp(x)) for a ball x, clamped to [lo, hi] */
static void exp_floor_clamp(fmpz_t r, const arb_t x, const fmpz_t lo, const fmpz_t hi, slong prec)
{
    arb_t e;
    arb_init(e);
    arb_exp(e, x, prec);
    if (arb_is_finite(e)) arf_get_fmpz(r, arb_midref(e), ARF_RND_FLOOR);
    else fmpz_set(r, lo);
    if (fmpz_cmp(r, lo) < 0) fmpz_set(r, lo);
    if (fmpz_cmp(r, hi) > 0) fmpz_set(r, hi);
    arb_clear(e);
}

/* Refine the bracket (E_lo > eps at nlo, E_hi <= eps at nhi) down to adjacent integers.
 * Returns status; *undecided set when a size could not be decided. */
/* ceil(log2 (nlo + 1)) == ceil(log2 nhi): every n in (nlo, nhi] needs the same qubits */
static int same_qubits(const fmpz_t nlo, const fmpz_t nhi)
{
    fmpz_t a, b;
    fmpz_init(a); fmpz_init(b);
    fmpz_set(a, nlo);                 /* ceil(log2 (nlo+1)) = bits(nlo) */
    fmpz_sub_ui(b, nhi, 1);           /* ceil(log2 nhi) = bits(nhi - 1) */
    int r = fmpz_bits(a) == fmpz_bits(b);
    fmpz_clear(a); fmpz_clear(b);
    return r;
}

/* A measure with a structural gap (its bounds meet to a fixed width, not to the precision)
 * leaves a zone of sizes around the crossing undecided. Shrink the certified bracket around
 * the undecided size u: bisect (nlo, lowest undecided) and (highest undecided, nhi) in turn,
 * at most SIZE_NARROW_STEPS evaluations. und receives the lowest undecided size. */
#define SIZE_NARROW_STEPS 48
static void mid_size(fmpz_t m, const fmpz_t a, const fmpz_t b)
{
    /* geometric midpoint while the ratio is large, else arithmetic; strictly inside (a, b) */
    fmpz_mul_2exp(m, a, 1);
    if (fmpz_cmp(b, m) > 0) {
        fmpz_mul(m, a, b);
        fmpz_sqrt(m, m);
    } else {
        fmpz_add(m, a, b);
        fmpz_fdiv_q_2exp(m, m, 1);
    }
}

static int narrow(sctx *c, fmpz_t nlo, arb_t Elo, fmpz_t nhi, arb_t Ehi, fmpz_t und,
                  embz_err_t *err)
{
    fmpz_t ulo, uhi, cand, g;
    arb_t E;
    fmpz_init_set(ulo, und); fmpz_init_set(uhi, und); fmpz_init(cand); fmpz_init(g);
    arb_init(E);
    int st = EMBZ_OK;
    for (int it = 0; it < SIZE_NARROW_STEPS; it++) {
        int below = it % 2 == 0;
        fmpz_sub(g, below ? ulo : nhi, below ? nlo : uhi);
        if (fmpz_cmp_ui(g, 1) <= 0) {
            below = !below;
            fmpz_sub(g, below ? ulo : nhi, below ? nlo : uhi);
            if (fmpz_cmp_ui(g, 1) <= 0) break;
        }
        if (below) mid_size(cand, nlo, ulo);
        else mid_size(cand, uhi, nhi);
        int sd;
        st = side(&sd, E, c, cand, err);
        if (st != EMBZ_OK) break;
        if (sd == 0) fmpz_set(below ? ulo : uhi, cand);
        else if (sd > 0 && below) { fmpz_set(nlo, cand); arb_set(Elo, E); }
        else if (sd < 0 && !below) { fmpz_set(nhi, cand); arb_set(Ehi, E); }
        else if (sd < 0) {
            /* below the undecided zone the goal is reached: the bracket moves down */
            fmpz_set(nhi, cand); arb_set(Ehi, E);
            fmpz_set(uhi, cand); fmpz_sub_ui(uhi, uhi, 1);
            if (fmpz_cmp(ulo, uhi) > 0) break;
        } else {
            /* above it the goal is missed: the bracket moves up */
            fmpz_set(nlo, cand); arb_set(Elo, E);
            fmpz_add_ui(ulo, cand, 1);
            if (fmpz_cmp(ulo, uhi) > 0) break;
        }
    }
    if (fmpz_cmp(ulo, uhi) <= 0) fmpz_set(und, ulo);
    else fmpz_add_ui(und, nlo, 1);
    fmpz_clear(ulo); fmpz_clear(uhi); fmpz_clear(cand); fmpz_clear(g);
    arb_clear(E);
    return st;
}

static int refine(sctx *c, fmpz_t nlo, arb_t Elo, fmpz_t nhi, arb_t Ehi, int *undecided,
                  fmpz_t und, embz_err_t *err)
{
    fmpz_t cand, width, prevw, lo1, hi1;
    arb_t xlo, xhi, ylo, yhi, x, t, E;
    int st = EMBZ_OK, last = 0, stuck = 0;
    fmpz_init(cand); fmpz_init(width); fmpz_init(prevw); fmpz_init(lo1); fmpz_init(hi1);
    arb_init(xlo); arb_init(xhi); arb_init(ylo); arb_init(yhi); arb_init(x); arb_init(t);
    arb_init(E);
    *undecided = 0;
    slong wp = 2 * fmpz_bits(nhi) + 64;
    /* enough steps for bisection alone to reach adjacent integers */
    slong steps = SIZE_MAX_STEPS + 2 * (slong) fmpz_bits(nhi);
    int yok_lo, yok_hi;
    /* y = E - eps at the midpoints: only used to choose where to look; yok: E - eps is
     * resolved by its enclosure (near the crossing it is not, and the secant is noise) */
#define SET_XY(xx, yy, ok, nn, EE) do { arb_set_fmpz(xx, nn); arb_log(xx, xx, wp); \
        arb_sub(yy, EE, c->eps, wp); ok = arb_rel_accuracy_bits(yy) >= 4; \
        arb_set_arf(yy, arb_midref(EE)); arb_sub(yy, yy, c->eps, wp); \
        arb_set_arf(yy, arb_midref(yy)); } while (0)
    SET_XY(xlo, ylo, yok_lo, nlo, Elo);
    SET_XY(xhi, yhi, yok_hi, nhi, Ehi);
    fmpz_sub(prevw, nhi, nlo);
    for (slong it = 0;; it++) {
        fmpz_sub(width, nhi, nlo);
        if (fmpz_cmp_ui(width, 1) <= 0) break;
        if (it >= steps) {
            /* not narrowed to adjacent sizes: no exact answer is claimed */
            *undecided = 1;
            fmpz_add_ui(und, nlo, 1);
            break;
        }
        if (c->qubits_only && same_qubits(nlo, nhi)) break;
        fmpz_add_ui(lo1, nlo, 1);
        fmpz_sub_ui(hi1, nhi, 1);
        int bisect = stuck >= 2 || !arb_is_positive(ylo) || arb_is_positive(yhi) || !yok_lo
                     || !yok_hi;
        if (!bisect) {
            /* x = xlo - ylo (xhi - xlo) / (yhi - ylo) */
            arb_sub(t, xhi, xlo, wp);
            arb_mul(t, t, ylo, wp);
            arb_sub(x, yhi, ylo, wp);
            arb_div(t, t, x, wp);
            arb_sub(x, xlo, t, wp);
            exp_floor_clamp(cand, x, lo1, hi1, wp);
        } else {
            /* geometric midpoint while the ratio is large, else arithmetic */
            fmpz_mul_2exp(cand, nlo, 1);
            if (fmpz_cmp(nhi, cand) > 0) {
                fmpz_mul(cand, nlo, nhi);
                fmpz_sqrt(cand, cand);
            } else {
                fmpz_add(cand, nlo, nhi);
                fmpz_fdiv_q_2exp(cand, cand, 1);
            }
            if (fmpz_cmp(cand, lo1) < 0) fmpz_set(cand, lo1);
            if (fmpz_cmp(cand, hi1) > 0) fmpz_set(cand, hi1);
            stuck = 0;
        }
        int sd;
        st = side(&sd, E, c, cand, err);
        if (st != EMBZ_OK) break;
        if (sd == 0) {
            *undecided = 1;
            fmpz_set(und, cand);
            /* (bounds only there: the caller takes another route, no narrowing) */
            if (c->measure != EMBZ_MEASURE_K && !c->undecided_bounds)
                st = narrow(c, nlo, Elo, nhi, Ehi, und, err);
            break;
        }
        if (sd < 0) {
            fmpz_set(nhi, cand);
            arb_set(Ehi, E);
            SET_XY(xhi, yhi, yok_hi, nhi, E);
            if (last < 0) arb_mul_2exp_si(ylo, ylo, -1);    /* Illinois */
            last = -1;
        } else {
            fmpz_set(nlo, cand);
            arb_set(Elo, E);
            SET_XY(xlo, ylo, yok_lo, nlo, E);
            if (last > 0) arb_mul_2exp_si(yhi, yhi, -1);
            last = 1;
        }
        /* the bracket must at least halve every other step, else bisect */
        fmpz_sub(width, nhi, nlo);
        fmpz_mul_2exp(width, width, 1);
        if (fmpz_cmp(width, prevw) > 0) stuck++;
        else stuck = 0;
        fmpz_sub(prevw, nhi, nlo);
    }
#undef SET_XY
    fmpz_clear(cand); fmpz_clear(width); fmpz_clear(prevw); fmpz_clear(lo1); fmpz_clear(hi1);
    arb_clear(xlo); arb_clear(xhi); arb_clear(ylo); arb_clear(yhi); arb_clear(x); arb_clear(t);
    arb_clear(E);
    return st;
}

/* A lower bound valid for every n <= N at once: E_n >= p_1 (1 - q_max), p_1 = w(1)/W_n and
 * W_n <= W_N (weights are non-negative). Returns 1 when it exceeds eps. Only for weights that
 * do not depend on n. */
static int small_sizes_excluded(sctx *c, slong N)
{
    if ((embz_expr_uses(c->f->weight) & EMBZ_USES_N) || embz_family_is_levels(c->f)) return 0;
    arb_t W, w1, x, nn, qm;
    embz_err_t e;
    arb_init(W); arb_init(w1); arb_init(x); arb_init(nn); arb_init(qm);
    embz_err_clear(&e);
    arb_set_si(nn, N);
    int ok = embz_sum_explicit(W, c->f->weight, nn, 1, N, c->prec, &e) == EMBZ_OK;
    arb_one(x);
    ok = ok && embz_expr_eval_arb(w1, c->f->weight, x, nn, c->prec) == EMBZ_OK;
    if (ok) {
        if (c->q->kind == EMBZ_TARGET_UNIFORM) {
            arb_set_ui(qm, c->q->d);
            arb_inv(qm, qm, c->prec);
        } else {
            arb_set_fmpq(qm, c->q->q->p, c->prec);   /* sorted: the largest first */
        }
        arb_sub_ui(qm, qm, 1, c->prec);
        arb_neg(qm, qm);
        arb_mul(w1, w1, qm, c->prec);
        arb_div(w1, w1, W, c->prec);
        ok = arb_gt(w1, c->eps);
    }
    arb_clear(W); arb_clear(w1); arb_clear(x); arb_clear(nn); arb_clear(qm);
    return ok;
}

static int size_solve(embz_size_result_t res, const embz_family_t f, const arb_t eps,
                      const fmpq *qeps, const embz_target_t q, int measure, slong prec,
                      int qubits_only, embz_err_t *err);

/* Full enclosures (no decision mode) at the sizes the result reports. */
static int final_enclosures(embz_size_result_t res, sctx *c, embz_err_t *err)
{
    int st = EMBZ_OK, sd;
    c->decision = 0;
    if (res->status == EMBZ_SIZE_FOUND) {
        st = side(&sd, res->err_n, c, res->n, err);
        if (fmpz_is_zero(res->n_low)) fmpz_sub_ui(res->n_low, res->n, 1);
        if (st == EMBZ_OK && fmpz_sgn(res->n_low) > 0)
            st = side(&sd, res->err_prev, c, res->n_low, err);
    } else {
        st = side(&sd, res->err_largest, c, res->largest, err);
    }
    c->decision = 1;
    return st;
}

int embz_size_solve(embz_size_result_t res, const embz_family_t f, const arb_t eps,
                    const embz_target_t q, slong prec, embz_err_t *err)
{
    return size_solve(res, f, eps, NULL, q, EMBZ_MEASURE_K, prec, 0, err);
}

int embz_size_solve_qubits(embz_size_result_t res, const embz_family_t f, const arb_t eps,
                           const embz_target_t q, slong prec, embz_err_t *err)
{
    return size_solve(res, f, eps, NULL, q, EMBZ_MEASURE_K, prec, 1, err);
}

int embz_size_solve_exact_goal(embz_size_result_t res, const embz_family_t f, const fmpq_t eps,
                               const embz_target_t q, slong prec, int qubits_only,
                               embz_err_t *err)
{
    arb_t e;
    arb_init(e);
    arb_set_fmpq(e, eps, 4 * prec);
    int st = size_solve(res, f, e, eps, q, EMBZ_MEASURE_K, prec, qubits_only, err);
    arb_clear(e);
    return st;
}

int embz_size_solve_measure(embz_size_result_t res, const embz_family_t f, const arb_t eps,
                            const embz_target_t q, int measure, int qubits_only, slong prec,
                            embz_err_t *err)
{
    if (measure != EMBZ_MEASURE_K && measure != EMBZ_MEASURE_PURIFIED)
        return embz_err_set(err, EMBZ_ERR_INPUT, "the size search takes the measures k and "
                            "purified (a distance, smaller is better), not '%s'",
                            embz_measure_name(measure));
    return size_solve(res, f, eps, NULL, q, measure, prec, qubits_only, err);
}

static int size_solve(embz_size_result_t res, const embz_family_t f, const arb_t eps,
                      const fmpq *qeps, const embz_target_t q, int measure, slong prec,
                      int qubits_only, embz_err_t *err)
{
    sctx c;
    memset(&c, 0, sizeof(c));
    fmpq_init(c.qeps);
    if (qeps != NULL) { fmpq_set(c.qeps, qeps); c.have_qeps = 1; }
    c.qubits_only = qubits_only && !embz_family_is_levels(f);   /* (qubits are not ceil(log2 n)) */
    res->qubits_only = qubits_only;
    res->explicit_only = 0;
    res->bracket = 0;
    res->reach = 0;
    res->why[0] = '\0';
    c.f = f;
    c.q = q;
    c.prec = prec;
    c.measure = measure;
    res->measure = measure;
    res->bounds_seen = 0;
    res->undecided_bounds = 0;
    arb_init(c.eps);
    arb_set(c.eps, eps);
    embz_eval_opts_t eo;
    size_eval_opts(eo);
    embz_eval_init(c.ev, f, eo, prec);
    embz_eval_work_init(c.work);
    c.decision = 1;
    fmpz_t n, nlo, nhi, m;
    arb_t E, Elo, Ehi;
    fmpz_init(n); fmpz_init(nlo); fmpz_init(nhi); fmpz_init(m);
    arb_init(E); arb_init(Elo); arb_init(Ehi);
    int st = EMBZ_OK, sd = 0, found = 0;
    res->status = EMBZ_SIZE_NOT_REACHED;

    if (!arb_is_positive(eps)) {
        st = embz_err_set(err, EMBZ_ERR_INPUT, "the error goal must be positive");
        goto done;
    }
    /* 1. small sizes one by one (or all at once by the p_1 bound) */
    if (small_sizes_excluded(&c, EMBZ_SIZE_EXHAUSTIVE)) {
        res->small_by_bound = 1;
        fmpz_set_si(n, EMBZ_SIZE_EXHAUSTIVE);
        st = side(&sd, E, &c, n, err);
        if (st != EMBZ_OK) goto done;
        arb_set(res->err_prev, E);
    }
    for (slong k = 1; !res->small_by_bound && k <= EMBZ_SIZE_EXHAUSTIVE; k++) {
        fmpz_set_si(n, k);
        st = side(&sd, E, &c, n, err);
        if (st != EMBZ_OK) goto done;
        if (sd == 0) {
            res->status = EMBZ_SIZE_UNDECIDED;
            fmpz_set(res->undecided_lo, n);
            fmpz_set(res->undecided_hi, n);
            goto done;
        }
        if (sd < 0) {
            fmpz_set(res->n, n);
            fmpz_sub_ui(res->n_low, n, 1);
            arb_set(res->err_n, E);
            res->exhaustive = 1;
            res->checked_below = k - 1;
            found = 1;
            break;
        }
        arb_set(res->err_prev, E);
    }
    if (!found) {
        /* 2. bracket: n = 2^(12 * 2^j) */
        fmpz_set_si(nlo, EMBZ_SIZE_EXHAUSTIVE);
        arb_set(Elo, res->err_prev);
        int levels = embz_family_is_levels(f);
        for (slong e = 12; e <= EMBZ_SIZE_MAX_LOG2; e = levels ? e + 1 : 2 * e) {
            fmpz_one(n);
            fmpz_mul_2exp(n, n, (ulong) e);
            if (levels && fmpz_cmp_si(n, EMBZ_SIZE_LEVELS_MAX_N) > 0) break;
            if (!levels && fmpz_cmp_si(n, EMBZ_EXPLICIT_REACH) > 0 && !res->explicit_only
                && analytic_declines(res->why, sizeof(res->why), &c, n)) {
                /* explicit summation only: its reach is the last size tried */
                res->explicit_only = 1;
                res->reach = EMBZ_EXPLICIT_REACH;
                fmpz_set_si(n, EMBZ_EXPLICIT_REACH);
                e = EMBZ_SIZE_MAX_LOG2;
            }
            st = side(&sd, E, &c, n, err);
            if (st != EMBZ_OK) goto done;
            fmpz_set(res->largest, n);
            arb_set(res->err_largest, E);
            if (sd < 0) {
                fmpz_set(nhi, n);
                arb_set(Ehi, E);
                found = 1;
                break;
            }
            if (sd > 0) {
                fmpz_set(nlo, n);
                arb_set(Elo, E);
            }
        }
        if (!found) {
            res->status = EMBZ_SIZE_NOT_REACHED;
            st = final_enclosures(res, &c, err);
            goto done;
        }
        /* 3. refine to adjacent integers; then look below for a smaller crossing */
        for (int round = 0; round < 4; round++) {
            int und = 0;
            st = refine(&c, nlo, Elo, nhi, Ehi, &und, m, err);
            if (st != EMBZ_OK) goto done;
            if (und) {
                res->status = EMBZ_SIZE_UNDECIDED;
                fmpz_set(res->undecided_lo, m);
                fmpz_set(res->undecided_hi, m);
                /* what was certified still brackets a crossing */
                res->bracket = 1;
                fmpz_set(res->n, nhi);
                fmpz_set(res->n_low, nlo);
                arb_set(res->err_n, Ehi);
                arb_set(res->err_prev, Elo);
                if (same_qubits(nlo, nhi)) {
                    fmpz_sub_ui(m, nhi, 1);
                    res->qubits = fmpz_sgn(m) > 0 ? (long) fmpz_bits(m) : 0;
                } else {
                    res->qubits = -1;
                }
                goto done;
            }
            fmpz_set(res->n, nhi);
            fmpz_set(res->n_low, nlo);
            arb_set(res->err_n, Ehi);
            arb_set(res->err_prev, Elo);
            /* samples below: the 8 sizes just below n - 1, then n / 16^j down to the
             * exhaustive range */
            int again = 0;
            res->checked_below = 0;
            for (int j = qubits_only ? 10 : 2; j <= 9 + 40 && !again; j++) {
                if (j <= 9) fmpz_sub_ui(m, nhi, (ulong) j);
                else {
                    /* log-spaced: m = floor(nhi^(1 - (j - 9)/40)) */
                    arb_t lg;
                    arb_init(lg);
                    slong wp2 = 2 * fmpz_bits(nhi) + 64;
                    arb_set_fmpz(lg, nhi);
                    arb_log(lg, lg, wp2);
                    arb_mul_si(lg, lg, 40 - (j - 9), wp2);
                    arb_div_ui(lg, lg, 40, wp2);
                    arb_exp(lg, lg, wp2);
                    arf_get_fmpz(m, arb_midref(lg), ARF_RND_FLOOR);
                    arb_clear(lg);
                    if (fmpz_cmp(m, nhi) >= 0) continue;
                }
                if (fmpz_cmp_si(m, EMBZ_SIZE_EXHAUSTIVE) <= 0) break;
                st = side(&sd, E, &c, m, err);
                if (st != EMBZ_OK) goto done;
                if (sd > 0) res->checked_below++;
                else if (sd < 0) {
                    /* a smaller size also reaches the goal: search below it */
                    again = 1;
                    fmpz_set(nhi, m);
                    arb_set(Ehi, E);
                }
            }
            if (!again) break;
            /* new lower end: the largest size below nhi known to be above eps */
            fmpz_set_si(nlo, EMBZ_SIZE_EXHAUSTIVE);
            fmpz_fdiv_q_2exp(m, nhi, 1);
            while (fmpz_cmp_si(m, EMBZ_SIZE_EXHAUSTIVE) > 0) {
                st = side(&sd, E, &c, m, err);
                if (st != EMBZ_OK) goto done;
                if (sd > 0) { fmpz_set(nlo, m); arb_set(Elo, E); break; }
                fmpz_fdiv_q_2exp(m, m, 1);
            }
            if (fmpz_equal_si(nlo, EMBZ_SIZE_EXHAUSTIVE)) {
                fmpz_set_si(m, EMBZ_SIZE_EXHAUSTIVE);
                st = side(&sd, Elo, &c, m, err);
                if (st != EMBZ_OK) goto done;
            }
        }
        if (!res->small_by_bound) res->checked_below += EMBZ_SIZE_EXHAUSTIVE;
    }
    res->status = EMBZ_SIZE_FOUND;
    /* 4. does E stay below eps? sample sizes above n */
    {
        fmpz_set(res->stay_checked_to, res->n);
        res->stay_samples = 0;
        for (int j = qubits_only ? 16 : 0; j < 24; j++) {
            if (j < 8) fmpz_add_ui(m, res->n, (ulong) j + 1);
            else if (j < 16) {
                fmpz_fdiv_q_2exp(m, res->n, (ulong) (16 - j));   /* n + n / 2^(16-j) */
                fmpz_add(m, m, res->n);
            } else {
                fmpz_mul_2exp(m, res->n, (ulong) (1 << (j - 16)));
            }
            if (embz_family_is_levels(f) && fmpz_cmp_si(m, EMBZ_SIZE_LEVELS_MAX_N) > 0) break;
            if (res->explicit_only && fmpz_cmp_si(m, res->reach) > 0) break;
            st = side(&sd, E, &c, m, err);
            if (st != EMBZ_OK) goto done;
            if (sd > 0) {
                fmpz_set(res->again_above, m);
                break;
            }
            if (sd < 0) {
                res->stay_samples++;
                if (fmpz_cmp(m, res->stay_checked_to) > 0) fmpz_set(res->stay_checked_to, m);
            }
        }
    }
    if (res->status == EMBZ_SIZE_FOUND) {
        /* ceil(log2 d) = bits(d - 1) for the Schmidt rank d */
        fmpz_t d;
        fmpz_init(d);
        fmpz_set(d, res->n);
        res->levels = embz_family_is_levels(f);
        if (res->levels) {
            embz_levels_t x;
            embz_levels_init(x);
            if (embz_family_levels(x, f, res->n, 64, NULL) == EMBZ_OK) embz_levels_dim(d, x);
            embz_levels_clear(x);
        }
        fmpz_sub_ui(d, d, 1);
        res->qubits = fmpz_sgn(d) > 0 ? (long) fmpz_bits(d) : 0;
        fmpz_clear(d);
    }
    /* 5. the enclosures reported: evaluated in full (decision mode may have stopped early and
     * left only the trivial upper end) */
    if (st == EMBZ_OK && (res->status == EMBZ_SIZE_FOUND || res->status == EMBZ_SIZE_NOT_REACHED))
        st = final_enclosures(res, &c, err);
done:
    res->evaluations = c.evals;
    res->used = (c.used_explicit ? 1 << EMBZ_METHOD_EXPLICIT : 0)
              | (c.used_analytic ? 1 << EMBZ_METHOD_ANALYTIC : 0)
              | (c.used_exact ? EMBZ_SIZE_USED_EXACT : 0)
              | (c.used_fid_explicit ? EMBZ_SIZE_USED_FID_EXPLICIT : 0)
              | (c.used_fid_analytic ? EMBZ_SIZE_USED_FID_ANALYTIC : 0);
    res->bounds_seen = c.bounds_seen;
    res->undecided_bounds = res->status == EMBZ_SIZE_UNDECIDED && c.undecided_bounds;
    fmpq_clear(c.qeps);
    embz_eval_work_clear(c.work);
    embz_eval_clear(c.ev);
    arb_clear(c.eps);
    fmpz_clear(n); fmpz_clear(nlo); fmpz_clear(nhi); fmpz_clear(m);
    arb_clear(E); arb_clear(Elo); arb_clear(Ehi);
    return st;
}
