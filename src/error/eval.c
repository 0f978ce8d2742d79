/* The evaluator of E_n(q): the one place where explicit summation and the analytic engine are
 * chosen, combined and retried (see include/embz/error.h). */
#include <string.h>
#include <math.h>
#include <stdlib.h>
#include "embz/error.h"
#include "impl.h"

void embz_error_result_init(embz_error_result_t r)
{
    arb_init(r->error);
    arb_indeterminate(r->error);
    r->estimate = NAN;
    fmpz_init(r->argk);
    r->have_bounds = 0;
    arb_init(r->lower);
    arb_init(r->upper);
    r->method = EMBZ_METHOD_AUTO;
    r->order = 0;
    r->decided = 0;
    r->used = 0;
    r->steps = 0;
    memset(&r->how, 0, sizeof(r->how));
}

void embz_error_result_clear(embz_error_result_t r)
{
    arb_clear(r->error);
    fmpz_clear(r->argk);
    arb_clear(r->lower);
    arb_clear(r->upper);
}

/* ------------------------------------------------------------------ options, objects */

void embz_eval_opts_init(embz_eval_opts_t o)
{
    memset(o, 0, sizeof(*o));
    o->method = EMBZ_METHOD_AUTO;
    o->fallback = EMBZ_FALLBACK_EXPLICIT;
    o->own_engine = 1;
}

void embz_eval_init(embz_eval_t ev, const embz_family_t f, const embz_eval_opts_t o, slong prec)
{
    memset(ev, 0, sizeof(*ev));
    ev->f = f;
    ev->opts = *o;
    ev->prec = prec;
    ev->analytic_ok = 1;
    fmpz_init(ev->nmax);
}

void embz_eval_clear(embz_eval_t ev)
{
    fmpz_clear(ev->nmax);
}

/* The workspace: one lazily created engine per precision step. */
typedef struct {
    embz_analytic_struct eng[EMBZ_EVAL_MAX_STEPS];
    char have[EMBZ_EVAL_MAX_STEPS];
    char prepared[EMBZ_EVAL_MAX_STEPS];
} eval_work;

void embz_eval_work_init(embz_eval_work_t w)
{
    w->eng = NULL;
}

void embz_eval_work_clear(embz_eval_work_t w)
{
    eval_work *ew = w->eng;
    if (ew == NULL) return;
    for (int s = 0; s < EMBZ_EVAL_MAX_STEPS; s++)
        if (ew->have[s]) embz_analytic_clear(ew->eng + s);
    free(ew);
    w->eng = NULL;
}

static slong explicit_max(const embz_eval_t ev)
{
    return ev->opts.explicit_max > 0 ? ev->opts.explicit_max : EMBZ_EXPLICIT_MAX_N;
}

/* The workspace's engine for precision step s (created on first use; prepared for the
 * evaluator's nmax when the evaluator was prepared). */
static embz_analytic_struct *work_engine(const embz_eval_t ev, embz_eval_work_t w, int s)
{
    if (w->eng == NULL) w->eng = calloc(1, sizeof(eval_work));
    eval_work *ew = w->eng;
    if (!ew->have[s]) {
        embz_analytic_init(ew->eng + s, ev->f, ev->prec << s);
        ew->have[s] = 1;
    }
    if (ev->prepared && ev->analytic_ok && s == 0 && !ew->prepared[s]) {
        embz_err_t e2;
        embz_err_clear(&e2);
        embz_analytic_prepare(ew->eng + s, ev->nmax, &e2);  /* succeeded for the first */
        ew->prepared[s] = 1;
    }
    return ew->eng + s;
}

int embz_eval_prepare(embz_eval_t ev, embz_eval_work_t w, const fmpz_t nmax, embz_err_t *err)
{
    fmpz_set(ev->nmax, nmax);
    ev->prepared = 1;
    ev->analytic_ok = 1;
    ev->prep_reason[0] = '\0';
    if (embz_family_is_levels(ev->f)) return EMBZ_OK;   /* evaluated level by level */
    if (_embz_steps_applies(ev->f)) {
        /* block by block, at any n, unless there are provably too many blocks up to nmax */
        if (_embz_steps_refused(ev->prep_reason, sizeof(ev->prep_reason), ev->f, nmax))
            ev->analytic_ok = 0;
        return EMBZ_OK;
    }
    if (w->eng == NULL) w->eng = calloc(1, sizeof(eval_work));
    eval_work *ew = w->eng;
    if (!ew->have[0]) {
        embz_analytic_init(ew->eng, ev->f, ev->prec);
        ew->have[0] = 1;
    }
    embz_err_t e2;
    embz_err_clear(&e2);
    int st = embz_analytic_prepare(ew->eng, nmax, &e2);
    ew->prepared[0] = 1;
    if (st == EMBZ_OK) return EMBZ_OK;
    ev->analytic_ok = 0;
    snprintf(ev->prep_reason, sizeof(ev->prep_reason), "%.190s", e2.text);
    if (st == EMBZ_ERR_DOMAIN) return embz_err_set(err, st, "%s", e2.text);
    return EMBZ_OK;
}

/* ------------------------------------------------------------------ one evaluation */

/* a finite enclosure with a few certified bits (8: about two digits), what digit_steps asks */
static int usable(const arb_t e)
{
    return arb_is_finite(e) && arb_rel_accuracy_bits(e) >= 8;
}

static void engine_limits(embz_analytic_struct *a, const embz_eval_t ev)
{
    a->bb_budget = ev->opts.bb_budget;
    a->th_budget = ev->opts.threshold_budget;
    if (ev->opts.cancel != NULL || ev->opts.seconds > 0)
        embz_analytic_set_limits(a, ev->opts.cancel, ev->opts.seconds);
}

static void engine_goal(embz_analytic_struct *a, const arb_t goal)
{
    if (goal != NULL) embz_analytic_set_decision(a, goal);
    else embz_analytic_clear_decision(a);
}

/* The analytic engine with an engine of its own at working precision wp. */
static int analytic_own(embz_error_result_t res, const embz_eval_t ev, const fmpz_t n,
                        const embz_target_t q, const arb_t goal, slong wp, embz_err_t *err)
{
    embz_analytic_t a;
    embz_analytic_init(a, ev->f, wp);
    engine_limits(a, ev);
    if (goal != NULL) embz_analytic_set_decision(a, goal);
    int st = embz_analytic_error(res, a, n, q, err);
    embz_analytic_clear(a);
    if (st == EMBZ_OK) res->used |= 1 << EMBZ_METHOD_ANALYTIC;
    return st;
}

static int explicit_at(embz_error_result_t res, const embz_eval_t ev, const fmpz_t n,
                       const embz_target_t q, slong wp, embz_err_t *err)
{
    int st = embz_error_explicit(res, ev->f, n, q, wp, err);
    if (st == EMBZ_OK) res->used |= 1 << EMBZ_METHOD_EXPLICIT;
    return st;
}

/* A weight constant on blocks, block by block (steps.c). */
static int blocks_at(embz_error_result_t res, const embz_eval_t ev, const fmpz_t n,
                     const embz_target_t q, slong wp, embz_err_t *err)
{
    int st = _embz_error_steps(res, ev->f, n, q, ev->opts.cancel, ev->opts.seconds, wp, err);
    /* as on the other routes: fewer than 8 certified bits, more precision (digit_steps) */
    int dsteps = ev->opts.digit_steps < EMBZ_EVAL_MAX_STEPS ? ev->opts.digit_steps
                                                            : EMBZ_EVAL_MAX_STEPS;
    for (slong hp = 2 * wp; dsteps > 1 && st == EMBZ_OK && !usable(res->error)
         && hp <= (wp << (dsteps - 1)); hp *= 2) {
        embz_err_clear(err);
        st = _embz_error_steps(res, ev->f, n, q, ev->opts.cancel, ev->opts.seconds, hp, err);
    }
    if (dsteps > 1 && st == EMBZ_OK && !usable(res->error))
        st = embz_err_set(err, EMBZ_ERR_PREC, "no certified digit up to %ld bits",
                          (long) (wp << (dsteps - 1)));
    if (st == EMBZ_OK) res->used |= 1 << EMBZ_METHOD_ANALYTIC;
    return st;
}

/* One evaluation at precision step s (working precision prec 2^s) under the options. goal
 * (may be NULL) is the decision threshold of the analytic engine, side_goal (may be NULL) the
 * goal whose side is wanted. */
static int eval_step(embz_error_result_t res, const embz_eval_t ev, embz_eval_work_t w,
                     const fmpz_t n, const embz_target_t q, int s, const arb_t goal,
                     const arb_t side_goal, embz_err_t *err)
{
    const embz_eval_opts_struct *o = &ev->opts;
    slong wp = ev->prec << s;
    int dsteps = o->digit_steps < EMBZ_EVAL_MAX_STEPS ? o->digit_steps : EMBZ_EVAL_MAX_STEPS;
    slong xmax = explicit_max(ev);
    res->decided = 0;
    if (embz_family_is_levels(ev->f)) {
        /* level families have one method: level by level, whatever the options */
        int st = _embz_error_levels(res, ev->f, n, q, wp, err);
        if (st == EMBZ_OK) res->used |= 1 << EMBZ_METHOD_EXPLICIT;
        return st;
    }
    if (o->method == EMBZ_METHOD_EXPLICIT) return explicit_at(res, ev, n, q, wp, err);
    int steps = _embz_steps_applies(ev->f);
    if (o->method == EMBZ_METHOD_ANALYTIC)
        return steps ? blocks_at(res, ev, n, q, wp, err)
                     : analytic_own(res, ev, n, q, goal, wp, err);
    if (o->method != EMBZ_METHOD_AUTO)
        return embz_err_set(err, EMBZ_ERR_INPUT, "unknown method %d", o->method);
    slong up_to = o->explicit_up_to == 0 ? EMBZ_EVAL_EXPLICIT_UP_TO : o->explicit_up_to;
    if (up_to > 0 && fmpz_cmp_si(n, up_to) <= 0) return explicit_at(res, ev, n, q, wp, err);

    int st = EMBZ_ERR_UNSUPPORTED;
    if (steps && ev->analytic_ok) {
        /* a weight constant on blocks: the analytic engine has no Taylor expansion to use,
         * the blocks are what it is made of */
        st = blocks_at(res, ev, n, q, wp, err);
    } else if (!ev->analytic_ok) {
        st = embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "%s", ev->prep_reason);
    } else {
        embz_analytic_struct *a;
        embz_analytic_t own;
        int have_own = 0;
        if (w != NULL) {
            a = work_engine(ev, w, s);
        } else {
            embz_analytic_init(own, ev->f, wp);
            a = own;
            have_own = 1;
        }
        engine_limits(a, ev);
        engine_goal(a, goal);
        embz_err_clear(err);
        st = embz_analytic_error(res, a, n, q, err);
        if (st == EMBZ_OK) res->used |= 1 << EMBZ_METHOD_ANALYTIC;
        int shared_beyond = a->have_tail && fmpz_cmp(a->nmax, n) > 0;
        if (have_own) embz_analytic_clear(own);
        if (st != EMBZ_OK && o->own_engine && shared_beyond) {
            embz_err_clear(err);
            st = analytic_own(res, ev, n, q, goal, wp, err);
        }
        for (slong hp = 2 * wp; dsteps > 1 && st == EMBZ_OK && !usable(res->error)
             && hp <= (wp << (dsteps - 1)); hp *= 2) {
            embz_err_clear(err);
            st = analytic_own(res, ev, n, q, goal, hp, err);
        }
        if (dsteps > 1 && st == EMBZ_OK && !usable(res->error))
            st = embz_err_set(err, EMBZ_ERR_PREC, "no certified digit up to %ld bits",
                              (long) (wp << (dsteps - 1)));
        /* a target vector whose enclosure does not decide the side (the threshold search at
         * its budget): exact sums where they reach, before more bits */
        if (st == EMBZ_OK && o->goal_explicit && side_goal != NULL
            && q->kind != EMBZ_TARGET_UNIFORM && res->decided == 0
            && !arb_le(res->error, side_goal) && !arb_gt(res->error, side_goal)
            && fmpz_cmp_si(n, xmax) <= 0)
            st = EMBZ_ERR_UNSUPPORTED;
    }
    if (st == EMBZ_OK) return st;
    if (o->fallback == EMBZ_FALLBACK_EXPLICIT && st != EMBZ_ERR_DOMAIN
        && fmpz_cmp_si(n, xmax) <= 0) {
        char reason[sizeof(err->text)];
        int declined = st == EMBZ_ERR_UNSUPPORTED;
        snprintf(reason, sizeof(reason), "%s", err != NULL ? err->text : "");
        embz_err_clear(err);
        st = explicit_at(res, ev, n, q, wp, err);
        if (dsteps > 1 && st == EMBZ_OK && !usable(res->error))
            st = embz_err_set(err, EMBZ_ERR_PREC, "no certified digit at %ld bits", (long) wp);
        if (st == EMBZ_OK && reason[0] != '\0') {
            res->how.fallback = declined ? EMBZ_HOW_DECLINED : EMBZ_HOW_FAILED;
            snprintf(res->how.reason, sizeof(res->how.reason), "%s", reason);
        }
    }
    return st;
}

int embz_eval_error(embz_error_result_t res, const embz_eval_t ev, embz_eval_work_t w,
                    const fmpz_t n, const embz_target_t q, embz_err_t *err)
{
    if (fmpz_cmp_si(n, 1) < 0) return embz_err_set(err, EMBZ_ERR_INPUT, "n must be at least 1");
    res->used = 0;
    res->steps = 1;
    return eval_step(res, ev, w, n, q, 0, NULL, NULL, err);
}

int embz_eval_side(int *side, embz_error_result_t res, const embz_eval_t ev, embz_eval_work_t w,
                   const fmpz_t n, const embz_target_t q, const arb_t goal, int decision,
                   embz_err_t *err)
{
    *side = 0;
    if (fmpz_cmp_si(n, 1) < 0) return embz_err_set(err, EMBZ_ERR_INPUT, "n must be at least 1");
    int steps = ev->opts.goal_steps > 0 ? ev->opts.goal_steps : 1;
    if (steps > EMBZ_EVAL_MAX_STEPS) steps = EMBZ_EVAL_MAX_STEPS;
    res->used = 0;
    res->steps = 0;
    int st = EMBZ_OK;
    for (int s = 0; s < steps; s++) {
        res->steps++;
        st = eval_step(res, ev, w, n, q, s, decision ? goal : NULL, goal, err);
        if (st != EMBZ_OK) break;
        if (arb_le(res->error, goal)) { *side = -1; break; }
        if (arb_gt(res->error, goal)) { *side = 1; break; }
        /* decision mode: a proven value above the goal's whole ball settled it, and the
         * enclosure's upper end was left at the trivial 1 */
        if (res->decided > 0) { *side = 1; break; }
        if (res->decided < 0) { *side = -1; break; }
    }
    return st;
}

int embz_error(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
               const embz_target_t q, int method, slong prec, embz_err_t *err)
{
    embz_eval_opts_t o;
    embz_eval_t ev;
    embz_eval_opts_init(o);
    o->method = method;
    embz_eval_init(ev, f, o, prec);
    int st = embz_eval_error(res, ev, NULL, n, q, err);
    embz_eval_clear(ev);
    return st;
}
