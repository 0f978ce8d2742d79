/* Private to the library: the analytic engine of src/error (used by the evaluator, eval.c,
 * and by the tests and benchmarks), not installed. */
#ifndef EMBZ_ERROR_IMPL_H
#define EMBZ_ERROR_IMPL_H

#include "embz/error.h"
#include "embz/levels.h"
#include "sum/sum.h"

/* The analytic engine for one family, reusable across sizes: for weights that do not depend on
 * n the certified tail (and its integral cache) is built once and serves every n up to nmax. */
typedef struct {
    const embz_family_struct *f;   /* borrowed */
    slong prec;
    int uses_n;
    int have_tail;
    fmpz_t nmax;
    embz_tail_t tail;
    int have_decide;
    arf_t decide, decide_lo;       /* decision threshold: the upper and lower ends of its ball
                                      (see embz_analytic_set_decision) */
    const volatile int *cancel;    /* borrowed, may be NULL: the search stops when nonzero */
    double deadline;               /* CLOCK_MONOTONIC seconds; 0: none */
    slong bb_budget;               /* interval evaluations of the branch and bound; <= 0:
                                      the default (40000) */
    slong th_budget;               /* evaluations of the threshold search; <= 0: the
                                      default (600) */
} embz_analytic_struct;
typedef embz_analytic_struct embz_analytic_t[1];

void embz_analytic_init(embz_analytic_t a, const embz_family_t f, slong prec);
void embz_analytic_clear(embz_analytic_t a);
/* Optional: certify the tail for all sizes up to nmax at once (saves work in sweeps). */
int embz_analytic_prepare(embz_analytic_t a, const fmpz_t nmax, embz_err_t *err);
/* Decision mode: the maximisation may stop as soon as the enclosure lies entirely above or
 * entirely below the threshold (the result is still a valid, possibly wider, enclosure).
 * Used by size searches that only need the side of an error goal. */
void embz_analytic_set_decision(embz_analytic_t a, const arb_t threshold);
void embz_analytic_clear_decision(embz_analytic_t a);
/* Limits for callers that must be able to stop a computation (a notebook, a long scan): the
 * searches check *cancel (when cancel is not NULL) and the clock (when seconds > 0, counted
 * from this call) between steps, and an evaluation stopped that way fails with
 * EMBZ_ERR_LIMIT ("stopped: ...") instead of returning a wider enclosure. The object stays
 * usable; call again with NULL, 0 to lift the limits. */
void embz_analytic_set_limits(embz_analytic_t a, const volatile int *cancel, double seconds);
/* E_n(q) for a uniform target (embz_error_analytic is init + this + clear). */
int embz_analytic_error(embz_error_result_t res, embz_analytic_t a, const fmpz_t n,
                        const embz_target_t q, embz_err_t *err);


/* ==================================================================== explicit summation
 * E_n(q) by summation over i = 1..n, in three files: explicit.c (the target data and the
 * driver), explicit_estimate.c (the double pass: estimate, argmax, the order of the weights)
 * and explicit_certify.c (the certified pass in exact 128-bit fixed point). The method is
 * described at the top of explicit.c. Not for use outside src/error and its tests. */

__extension__ typedef __int128 embz_x_i128;

/* Fixed-point head room: Q * (sum of hi) stays below 2^EMBZ_FIX_BITS. */
#define EMBZ_FIX_BITS 124

/* Largest n for which non-monotone weights are stored (32 bytes per index in the certified
 * pass, 8 in the estimate). */
#define EMBZ_EXPLICIT_SORTED_MAX_N (WORD(1) << 24)

/* The target, read once: d for a uniform target, else the nonzero entries, non-increasing,
 * as doubles and as integers a_j over the common denominator Q. */
typedef struct {
    int uniform;
    ulong d;          /* uniform */
    slong m;          /* vector: number of nonzero entries */
    double *qd;       /* vector: entries as doubles (non-increasing) */
    slong *a;         /* vector: numerators over Q (non-increasing) */
    slong Q;          /* common denominator (d for uniform) */
} embz_x_tdata_t;

/* Fills T (to be cleared with _embz_x_tdata_clear even on failure): EMBZ_ERR_INPUT for a
 * uniform dimension out of range, a zero vector or one not summing to 1,
 * EMBZ_ERR_UNSUPPORTED for a common denominator above 2^40. */
int _embz_x_tdata_init(embz_x_tdata_t *T, const embz_target_t q, embz_err_t *err);
void _embz_x_tdata_clear(embz_x_tdata_t *T);

/* What the double pass finds (weights unnormalised). */
typedef struct {
    double W;         /* sum of all weights */
    double best;      /* max_k (P_k - R_k), unnormalised */
    slong argk;
    double p1;        /* largest weight */
    double supB;      /* ebit: sup_m (P_2m - P_m) */
    int sorted;       /* 1 if the stream order was non-increasing */
} embz_x_dres_t;

/* The double pass for 1 <= n <= EMBZ_EXPLICIT_MAX_N. *order: +1 (weights non-increasing in
 * i) or -1 (non-decreasing), both streamed, or 0 (stored and sorted). *bad: 0, or the first
 * index whose double weight is not a finite number >= 0 (R is then incomplete). Fails only
 * for non-monotone weights beyond EMBZ_EXPLICIT_SORTED_MAX_N or out of memory. */
int _embz_x_estimate(embz_x_dres_t *R, int *order, slong *bad, const embz_family_t f, slong n,
                     const embz_x_tdata_t *T, embz_err_t *err);
/* The same from 64-bit ball values scaled by 2^*k (k chosen so that the largest weight is
 * near 1), stored and sorted: for weights the double evaluator cannot reach. */
int _embz_x_estimate_arb(embz_x_dres_t *R, slong *k, const embz_family_t f, slong n,
                         const embz_x_tdata_t *T, embz_err_t *err);

/* What the certified pass finds, in units of 2^-F (all values exact integers). */
typedef struct {
    embz_x_i128 WL, WU;      /* sum of all lo / hi */
    embz_x_i128 GL, GU;      /* enclosure of max_k Q (P_k - R_k) */
    embz_x_i128 p1L, p1U;    /* largest weight */
    embz_x_i128 BL, BU;      /* enclosure of sup_m (P_2m - P_m) (uniform targets) */
} embz_x_xres_t;

/* The certified pass at prec bits. *mode on entry: the order to try (+1 or -1: stream in
 * index order or its reverse, 0: store and sort); on return: the order used (0 when the
 * certified upper ends contradicted a streamed order). ew: binary exponent of an estimate
 * of the total weight (it fixes F; up to three retries with more head room). *F receives the
 * scale. EMBZ_ERR_PREC when the range stays exceeded. */
int _embz_x_certify(embz_x_xres_t *X, slong *F, int *mode, const embz_family_t f, slong n,
                    const embz_x_tdata_t *T, int ew, slong prec, embz_err_t *err);
/* A ball containing every real in [a / (Q b), c / (Q e)] (b, e > 0). */
void _embz_x_quotient_interval(arb_t res, embz_x_i128 a, embz_x_i128 b, embz_x_i128 c,
                               embz_x_i128 e, slong Q, slong prec);

/* A binary max-heap of NODE ordered by the field KEY, as static functions PREFIX_push and
 * PREFIX_pop: the merge of the sequences a_j w_(1) >= a_j w_(2) >= ... for a target vector,
 * in the double pass and in the certified pass. */
#define EMBZ_X_MAX_HEAP_DEFINE(PREFIX, NODE, KEY)                                           \
    static void PREFIX##_push(NODE *h, slong *len, NODE x)                                 \
    {                                                                                      \
        slong i = (*len)++;                                                                \
        while (i > 0) {                                                                    \
            slong p = (i - 1) / 2;                                                         \
            if (h[p].KEY >= x.KEY) break;                                                  \
            h[i] = h[p];                                                                   \
            i = p;                                                                         \
        }                                                                                  \
        h[i] = x;                                                                          \
    }                                                                                      \
                                                                                           \
    static NODE PREFIX##_pop(NODE *h, slong *len)                                          \
    {                                                                                      \
        NODE top = h[0], x = h[--(*len)];                                                  \
        slong i = 0, L = *len;                                                             \
        for (;;) {                                                                         \
            slong c = 2 * i + 1;                                                           \
            if (c >= L) break;                                                             \
            if (c + 1 < L && h[c + 1].KEY > h[c].KEY) c++;                                 \
            if (h[c].KEY <= x.KEY) break;                                                  \
            h[i] = h[c];                                                                   \
            i = c;                                                                         \
        }                                                                                  \
        if (L > 0) h[i] = x;                                                               \
        return top;                                                                        \
    }

/* =========================================================================================
 * Inside the engine: the files src/error/analytic*.c, one concept each, share the context of
 * one size (actx) and the functions declared below (prefix _embz_an_). Not for other modules.
 *   analytic.c            the driver for one size: layout, then the Ky Fan search or the
 *                         threshold form, then the result
 *   analytic_engine.c     the engine object (init, tail for many sizes, decision, limits)
 *   analytic_layout.c     the layout A | tail with inserted head weights | B
 *   analytic_positions.c  tail positions and sorted positions: prefix sums and values at
 *                         any position, h(k), the record of proven values and bounds
 *   analytic_taylor.c     Taylor-model bounds, and the model of h_r in s
 *   analytic_vmodel.c     models of h_r in v = ln y for long stretches far out
 *   analytic_bb.c         the branch and bound over s, with its heap
 *   analytic_threshold.c  the threshold form F(t) for general targets and its bounds
 *   analytic_thmodel.c    smooth models of F over wide threshold intervals
 *   analytic_thsearch.c   the best-first search over thresholds
 *   analytic_bracket.c    the majorization bracket of long target vectors
 * ========================================================================================= */

#define TAYLOR_LEN 12          /* smallest Taylor model order */
#define TAYLOR_MAX 80          /* largest Taylor model order */
#define BB_BUDGET 40000        /* default: interval evaluations before giving up refining */
#define BB_SMALL 6             /* intervals with at most this many integers are enumerated */
#define THRESHOLD_BUDGET 600   /* default: evaluations of the threshold search for a target
                                  vector */
#define TH_MODEL_TERMS 128     /* smooth threshold models for targets up to this length (each
                                  end of a search interval keeps two counts per entry) */
#define TH_MODEL_LEN 16        /* their order */
#define TH_SEARCH_TERMS 1024   /* the threshold search for target vectors up to this length
                                  (longer ones get the majorization bracket) */
#define KYFAN_MAX_D 256        /* uniform targets u_d up to this d by the Ky Fan search over
                                  the d residues of k; larger d by the threshold form, whose
                                  cost does not grow with d (the one choice between the two) */
#define VMODEL_FROM_BITS 10    /* v-models for s >= 2^10 */
#define VMODEL_LEN 10          /* their order */
#define VMODEL_SHORT 12        /* most terms kept of the short integral S */
#define VMODEL_FULL_EXP 1      /* full v-models up to half-width 2^1 when the parts in x are
                                  expanded through the split w(e^u) = core e^(ru) (else 1/2) */
#define VMODEL_SPLIT_PIECE 3.5 /* and unsettled stretches cut into pieces this long in v
                                  (measured: 3.5 costs least for the inverse family at 10^30,
                                  10^100 and 10^1000; 0.7 without the split) */

/* The context of one size. */
typedef struct {
    embz_tail_struct *t;
    const embz_family_struct *f;
    const arf_struct *decide;   /* stop as soon as E is known to be above this ... */
    const arf_struct *decide_lo;/* ... or below this (the ends of the threshold's ball) */
    int search_open;            /* the threshold search stopped at its budget with bounds
                                   above the tolerance (the upper end is not tight) */
    int cut_short;              /* decision mode skipped part of the search: the result's
                                   upper end is not known */
    fmpz_t n;            /* effective dimension: the true n, or less when the weights beyond
                            it were found negligible (their mass is t->neglected) */
    fmpz_t ntrue;        /* the size n of the family (weights may depend on it) */
    ulong d;
    slong M;             /* head size */
    slong a, b;          /* sizes of A and B */
    fmpz_t L;            /* tail length n - M */
    arb_ptr A, B;        /* sorted non-increasing */
    arb_t SA, SB, Ttot, W;
    slong E;             /* explicit positions 1..E */
    fmpz_t kmax;         /* last k whose position lies in the tail */
    arb_ptr vals, S;     /* vals[K] value at position K (1-based), S[K] prefix sums, S[0] = 0 */
    slong nins;          /* head weights that fall inside the range of the tail ... */
    arb_ptr ins_val;     /* ... their values, in sorted order, */
    fmpz *ins_pos;       /* ... their positions P_i in the merged sorted order, increasing, */
    arb_ptr ins_cum;     /* ... and ins_cum[i] = sum of the first i of them */
    slong off_k, off_s;  /* for the interval being modelled: a + (insertions before k) and
                            a + (insertions before s) */
    arb_t dH;            /* ins_cum[off_k - a] - ins_cum[off_s - a] */
    mag_t rslack;        /* |h - h~| <= rslack at integer s: the Euler-Maclaurin remainders
                            of the two tail sums in h (2 rem / W), which the smooth models
                            of h~ leave out */
    arb_t best;          /* best proven value (lower end used) */
    fmpz_t argk;
    arf_t upper;         /* running maximum of the upper bounds (points and intervals) */
    arf_t tol;           /* intervals whose bound is within tol of the best value are settled */
    long evals;
    slong bb_budget;     /* interval evaluations of the branch and bound before it stops */
    slong prec;
    const volatile int *cancel; /* limits of the caller (embz_analytic_set_limits) */
    double deadline;
    int stopped;                /* 1 cancelled, 2 past the deadline */
} actx;


/* analytic_engine.c: the caller's limits. 0: go on; 1: cancelled; 2: past the deadline */
int _embz_an_limits_reached(const volatile int *cancel, double deadline);
/* 1 when the caller's limits say stop (and c->stopped says why) */
int _embz_an_should_stop(actx *c);

/* analytic_layout.c: a context for size n (the tail object in the storage t, borrowed), with
 * d residues (1 for the threshold form) and working precision prec; no layout yet */
void _embz_an_ctx_init(actx *c, embz_tail_struct *t, const embz_family_struct *f,
                       const fmpz_t n, ulong d, slong prec);
void _embz_an_ctx_clear(actx *c);
/* The layout with head size M: the tail (certified here unless shared), the head weights
 * sorted into A, B and the insertions, the totals and the explicit positions 1..E. */
int _embz_an_setup(actx *c, slong M, int shared, slong prec, embz_err_t *err);
void _embz_an_free_layout(actx *c);

/* analytic_positions.c */
/* x coordinate of tail position y */
void _embz_an_tail_x(arb_t x, const actx *c, const arb_t y, slong prec);
/* the Euler-Maclaurin level valid for C over the whole ball y */
slong _embz_an_tail_level(const actx *c, const arb_t y, slong prec);
/* C(y): the sum of the first y sorted tail values (smooth extension for real y) */
int _embz_an_tail_C(arb_t res, actx *c, const arb_t y, slong lev, slong prec);
/* Taylor coefficients 1..len-1 of sigma -> C(y + scale sigma), from level lev */
int _embz_an_tail_C_series(arb_ptr res, actx *c, const arb_t y, const arb_t scale, slong len,
                           slong lev, slong prec);
/* value at tail position y + sigma, as a series in sigma */
int _embz_an_tail_v_series(arb_ptr res, actx *c, const arb_t y, slong len, slong prec);
/* inserted head weights at positions < K; *at: the index of the one at K, or -1 */
slong _embz_an_ins_before(const actx *c, const fmpz_t K, slong *at);
/* sorted position K: the prefix sum S(K) (want_sum) or the value there */
int _embz_an_pos_query(arb_t res, actx *c, const fmpz_t K, int want_sum, slong prec);
static inline int _embz_an_pos_sum(arb_t res, actx *c, const fmpz_t K, slong prec)
{
    return _embz_an_pos_query(res, c, K, 1, prec);
}
static inline int _embz_an_pos_val(arb_t res, actx *c, const fmpz_t K, slong prec)
{
    return _embz_an_pos_query(res, c, K, 0, prec);
}
/* h(k) = (P_k - P_s - (r/d) p_(s+1)) / W, k = d s + r */
int _embz_an_h_at(arb_t res, actx *c, const fmpz_t k, slong prec);
/* the record: the upper end of x raises c->upper; a proven value h at k may become c->best */
void _embz_an_raise_upper(actx *c, const arb_t x);
void _embz_an_offer(actx *c, const arb_t h, const fmpz_t k);

/* analytic_taylor.c */
/* co <- (co - (r/d) v) / W */
void _embz_an_finish_coeff(arb_t co, const arb_t v, ulong r, const actx *c, slong prec);
/* upper bound U of the Taylor model sum_(j <= J) co[j] sigma^j over |sigma| <= w, off by at
 * most slack (may be NULL); *mono the sign of its derivative when certain (dslack, may be
 * NULL, bounds the derivative of a part left out); ends (may be NULL): the offsets of the
 * interval's ends, for the value at the maximising end of a monotone model */
int _embz_an_taylor_bound(arf_t U, int *mono, arb_srcptr co, slong J, const arb_t w,
                          const mag_struct *slack, const arb_struct *dslack,
                          arb_srcptr ends, slong prec);
/* upper bound of the smooth h_r over s in [lo, hi] from a Taylor model in s (set the offsets
 * first: _embz_an_set_offsets) */
int _embz_an_model_bound(arf_t U, int *mono, actx *c, ulong r, const fmpz_t lo,
                         const fmpz_t hi, slong prec);

/* analytic_vmodel.c */
/* v-models apply to non-increasing tails from s = 2^VMODEL_FROM_BITS on */
static inline int _embz_an_use_vmodel(const actx *c, const fmpz_t lo)
{
    return c->t->dir > 0 && fmpz_bits(lo) > VMODEL_FROM_BITS;
}
/* res(tau) = P(A (e^tau - 1)), P = sum_l p_l y^l of len terms (p is overwritten) */
void _embz_an_compose_exp(arb_ptr res, arb_ptr p, slong len, const arb_t A, slong prec);
/* upper bound of the smooth h_r over s in [lo, hi] from a model in v = ln y; slack bounds
 * the part the model leaves out */
int _embz_an_model_bound_v(arf_t U, int *mono, mag_t slack, actx *c, ulong r,
                           const fmpz_t lo, const fmpz_t hi, slong prec);

/* analytic_bb.c */
/* A pending interval of s for residue r with its upper bound U. */
typedef struct { ulong r; fmpz_t lo, hi; arf_t U; } bb_item;
typedef struct { bb_item *v; slong len, cap; } bb_heap;   /* max-heap on U */
/* the heap takes over the item's contents; pop hands one with the largest U back */
void _embz_an_heap_push(bb_heap *h, bb_item *it);
void _embz_an_heap_pop(bb_heap *h, bb_item *out);
void _embz_an_bb_item_clear(bb_item *it);
/* the first s in [lo, hi] where an inserted head weight changes the layout for residue r */
int _embz_an_special_in(fmpz_t res, const actx *c, ulong r, const fmpz_t lo, const fmpz_t hi);
/* the offsets of the models for the stretch of residue r starting at lo */
void _embz_an_set_offsets(actx *c, ulong r, const fmpz_t lo);
/* maximise h over s in [slo[r], shi[r]] for every residue r, to within tol */
int _embz_an_branch_and_bound(actx *c, const fmpz *slo, const fmpz *shi, const arf_t tol,
                              slong prec);

/* analytic_threshold.c */
/* The target as the threshold form sees it: its distinct nonzero entries v_j (non-increasing),
 * v_j standing for mult_j equal entries. A target vector keeps each nonzero entry with
 * multiplicity 1; the uniform target u_d is the one entry 1/d with multiplicity d, so its
 * cost does not grow with d: sum_j q_j Phi(V/q_j) = Phi(d V). */
typedef struct {
    slong len, alloc;
    fmpq *v;
    ulong *mult;
} th_target;
/* W F at a point with what the bounds need: P0 = W Phi(V) (for the chord of the smooth
 * models), n = N(V) lo, hi and sum_j N(V/q_j) lo, hi (second-order bound), tn each term's
 * count range, N(V) in [tn[0], tn[1]] and N(V/q_j) in [tn[2j+2], tn[2j+3]] (smooth models;
 * kept for targets of at most TH_MODEL_TERMS entries, else NULL); ok when known */
typedef struct {
    arb_t F, P0;
    fmpz n[4];
    fmpz *tn;
    slong tlen;
    int ok;
} th_end;
void _embz_an_th_target_init(th_target *t, const embz_target_t q);
void _embz_an_th_target_clear(th_target *t);
void _embz_an_th_end_init(th_end *e, const th_target *q);
void _embz_an_th_end_clear(th_end *e);
void _embz_an_th_end_set(th_end *d, const th_end *e);
/* V moved by 2^-40 of itself (dir > 0: up, else down), as an exact midpoint */
void _embz_an_nudge(arb_t V, int dir, slong prec);
/* W Phi(V) and (may be NULL) the range [Nlo, Nhi] of N(V) */
int _embz_an_phi_wn(arb_t res, fmpz_t Nlo, fmpz_t Nhi, actx *c, const arb_t V, slong prec);
/* upper bound W Phi(V1) - sum_j q_j W Phi(V2/q_j) of W F on [V1, V2]; e (may be NULL, only
 * with V1 = V2) receives the value with its counts */
int _embz_an_threshold_f(arb_t res, th_end *e, actx *c, const th_target *q, const arb_t V1,
                         const arb_t V2, slong prec);
/* e <- W F at V with its counts */
int _embz_an_th_end_eval(th_end *e, actx *c, const th_target *q, const arb_t V, slong prec);
/* second-order upper bound U of W F on [A, B] (the values at the ends from ea, eb when known,
 * else computed into them) */
int _embz_an_threshold_bound2(arf_t U, actx *c, const th_target *q, const arb_t A,
                              const arb_t B, th_end *ea, th_end *eb, slong prec);

/* analytic_thmodel.c */
/* the log-position s = ln x with f(x) = e^lnT as a verified ball, given s in [slo, shi] */
int _embz_an_tail_root(arb_t s0, actx *c, const arb_t lnT, const arb_t slo, const arb_t shi,
                       slong prec);
/* upper bound U of W F over [A, B] from the smooth model (ea, eb: values and per-term counts
 * at A and B); EMBZ_ERR_UNSUPPORTED when a term is in neither regime */
int _embz_an_threshold_model(arf_t U, actx *c, const th_target *q, const arb_t A,
                             const arb_t B, const th_end *ea, const th_end *eb, slong prec);

/* analytic_thsearch.c */
/* best-first search over thresholds: *lo (proven value) and *hi (upper bound) of W E, and
 * c->argk */
int _embz_an_threshold_search(arf_t lo, arf_t hi, actx *c, const th_target *q, slong budget,
                              slong prec);

/* analytic_bracket.c: E(q) for a target vector, within its majorization bracket */
int _embz_an_vector_target_bounds(embz_error_result_t res, embz_analytic_t an,
                                  const fmpz_t n, const embz_target_t q, embz_err_t *err);

/* analytic.c: the layout for size n (the engine's shared tail when the weights do not use n,
 * else a tail of its own in the storage tail, *have_tail then 1: the caller clears it), at
 * working precision *wp (raised where a weight that uses n needs the bits of n) */
int _embz_an_layout(actx *c, embz_analytic_t an, const fmpz_t n, embz_tail_struct *tail,
                    int *have_tail, slong *wp, embz_err_t *err);
/* analytic.c: the engine for one size (uniform targets or the threshold form) */
int _embz_an_run(embz_error_result_t res, embz_analytic_t an, const fmpz_t n,
                 const embz_target_t q, embz_err_t *err);

/* overlap.c: O = sum_j sqrt(p↓_j (p (x) u_d)↓_j) at large n (non-increasing tails), for
 * the state whose weights beyond a negligible point are dropped; eta bounds the purified
 * distance between that state and the true one (0 when nothing was dropped). how receives
 * the counts (how->analytic = 1). EMBZ_ERR_UNSUPPORTED with a reason where the sorted order
 * is not known in the form the sum needs. */
int _embz_overlap_analytic(arb_t O, mag_t eta, embz_fidelity_how_struct *how,
                           embz_analytic_t an, const fmpz_t n, ulong d, embz_err_t *err);
/* overlap.c, shared with fmax.c: the layout for sums over the sorted positions with a
 * non-increasing tail (*m0: the first block of d positions past A and past every inserted head
 * weight, at least mmin; d m0 at most max_explicit; EMBZ_ERR_UNSUPPORTED with a reason
 * otherwise), the sum of sqrt(v_j v_ceil(j/d)) over d m0 < j <= n (weights not normalised;
 * residue tails and B), and the allowance eta of a layout that dropped negligible weights */
int _embz_overlap_layout(actx *c, slong *m0, embz_analytic_t an, const fmpz_t n, ulong d,
                         slong mmin, slong max_explicit, embz_tail_struct *tail,
                         int *have_tail, slong *wp, embz_err_t *err);
int _embz_overlap_sum_from(arb_t res, embz_fidelity_how_struct *how, actx *c, slong m0,
                           ulong d, slong wp, embz_err_t *err);
void _embz_overlap_eta(mag_t eta, const actx *c);
/* fmax.c: lo <= sqrt(F_max(p -> p (x) u_d)) <= hi at large n (non-increasing tails), for the
 * state with the negligible weights dropped (eta as above); how->analytic = 2 */
int _embz_fmax_analytic(arb_t lo, arb_t hi, mag_t eta, embz_fidelity_how_struct *how,
                        embz_analytic_t an, const fmpz_t n, ulong d, embz_err_t *err);

/* E_n(q) of a level family (levels.c); the evaluator's one path for such families. */
int _embz_error_levels(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                       const embz_target_t q, slong prec, embz_err_t *err);
/* E_n(q) of the state with the levels x (values at least prec + 32 bits): K(x -> x (x) q)
 * level by level, how.kind EMBZ_HOW_LEVELS (levels.c). */
int _embz_error_of_levels(embz_error_result_t res, const embz_levels_t x,
                          const embz_target_t q, slong prec, embz_err_t *err);

/* Weights constant on blocks (steps.c): 1 when every i of the weight lies inside a floor or
 * ceil (at most 8 outermost ones); the blocks up to n as levels (at most max_blocks, <= 0:
 * EMBZ_STEPS_MAX_BLOCKS); E_n(q) from them (method analytic, how.kind EMBZ_HOW_BLOCKS). */
int _embz_steps_applies(const embz_family_t f);
/* 1 (and why) when more than EMBZ_STEPS_MAX_BLOCKS blocks up to n are proven up front. */
int _embz_steps_refused(char *why, size_t len, const embz_family_t f, const fmpz_t n);
/* cancel (may be NULL) and seconds (> 0) stop the search with EMBZ_ERR_LIMIT. */
int _embz_steps_levels(embz_levels_t x, const embz_family_t f, const fmpz_t n, slong prec,
                       slong max_blocks, const volatile int *cancel, double seconds,
                       embz_err_t *err);
int _embz_error_steps(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                      const embz_target_t q, const volatile int *cancel, double seconds,
                      slong prec, embz_err_t *err);

#endif
