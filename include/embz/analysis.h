/* Sweeps of the embezzlement error over log-spaced sizes, fits of candidate decay laws, the
 * embezzler verdict and parameter scans.
 *
 * What is certified and what is not: every E_n in a sweep is a certified enclosure (arb ball).
 * Fits, fitted limits, exponents and their intervals are statistical estimates computed in
 * double precision from the midpoints; they are never presented as certified. */
#ifndef EMBZ_ANALYSIS_H
#define EMBZ_ANALYSIS_H

#include "embz/family.h"
#include "embz/vec.h"
#include "embz/measure.h"
#include "embz/error.h"

/* ------------------------------------------------------------------ sweep */

typedef struct {
    fmpz_t n;            /* the size */
    int status;          /* EMBZ_OK, or the code for which this size was skipped */
    arb_t error;         /* certified enclosure of E_n(q) (status EMBZ_OK) */
    fmpz_t argk;         /* Ky Fan index of the maximum */
    int have_bounds;     /* block-mass bounds present */
    arb_t lower, upper;
    int method;          /* EMBZ_METHOD_EXPLICIT / EMBZ_METHOD_ANALYTIC */
    double seconds;      /* wall time spent on this size */
    double log_n;        /* ln n as a double (for fits and plots) */
    embz_error_how_struct how;  /* status EMBZ_OK: how the enclosure was computed */
    char note[256];      /* otherwise: the reason the size was skipped */
} embz_sweep_point_struct;

typedef struct {
    embz_sweep_point_struct *pts;
    slong len;
    slong nok;           /* number of points with status EMBZ_OK */
    slong prec;
    char target[64];     /* label of the target */
    int narrowed;        /* the analytic engine could not take the family, so the range was
                            cut to what explicit summation reaches: sizes up to reach */
    slong reach;
    char narrow_why[200];/* narrowed: the engine's reason */
} embz_sweep_struct;
typedef embz_sweep_struct embz_sweep_t[1];

void embz_sweep_init(embz_sweep_t s);
void embz_sweep_clear(embz_sweep_t s);

/* Up to k sizes log-spaced from a to b inclusive (1 <= a <= b, k >= 1), each the exact integer
 * nearest to a^(1-t) b^t, t = j/(k-1); duplicates (small ranges) are dropped, so *len <= k.
 * sizes must hold k entries (initialised fmpz). Returns EMBZ_OK or EMBZ_ERR_INPUT. */
int embz_sweep_sizes(fmpz *sizes, slong *len, const fmpz_t a, const fmpz_t b, slong k,
                     embz_err_t *err);

/* Progress callback: called after each size with (done, total). May be NULL. */
typedef void (*embz_progress_fn)(void *ctx, slong done, slong total);


typedef struct {
    int threads;                  /* sizes computed at a time (<= 0: all OpenMP threads) */
    const volatile int *cancel;   /* borrowed, may be NULL: nonzero stops the sweep, which
                                     returns EMBZ_ERR_LIMIT "cancelled" */
    double seconds;               /* > 0: analytic searches stop after this long per size */
    slong explicit_reach;         /* <= 0: EMBZ_EXPLICIT_REACH */
    int keep_range;               /* nonzero: never narrow the range (sizes beyond the reach
                                     are skipped with the engine's reason) */
} embz_sweep_opts_struct;
typedef embz_sweep_opts_struct embz_sweep_opts_t[1];

/* The defaults above (what embz_sweep_run uses). */
void embz_sweep_opts_init(embz_sweep_opts_t o);

/* E_n(q) at the sizes from embz_sweep_sizes(a, b, k), through the evaluator (error.h) with
 * its default policy, one workspace per OpenMP thread prepared for the largest size, and a
 * result with fewer than 8 certified bits retried at 2, 4 and 8 times prec (digit_steps 4).
 * Sizes nothing can handle are kept with their status and reason in note. Returns EMBZ_OK if
 * at least one size succeeded and no weight was invalid; EMBZ_ERR_DOMAIN as soon as one size
 * finds the weight invalid (the others are stopped); else the status of the last failure (err
 * filled). Input errors (bad range) give EMBZ_ERR_INPUT. */
int embz_sweep_run(embz_sweep_t s, const embz_family_t f, const fmpz_t a, const fmpz_t b,
                   slong k, const embz_target_t q, slong prec, embz_progress_fn progress,
                   void *ctx, embz_err_t *err);
/* The same under options (NULL: the defaults). A family the analytic engine declines at the
 * largest size (embz_eval_prepare: not applicable) whose range goes beyond the explicit reach
 * is swept over [a, reach] instead (unless o->keep_range), with s->narrowed set and the
 * reason kept, so that fits and verdicts rest on sizes that were computed. */
int embz_sweep_run_opts(embz_sweep_t s, const embz_family_t f, const fmpz_t a,
                        const fmpz_t b, slong k, const embz_target_t q,
                        const embz_sweep_opts_t o, slong prec, embz_progress_fn progress,
                        void *ctx, embz_err_t *err);

/* ------------------------------------------------------------------ sweeps of a measure */

/* A fidelity-type measure (embz/fidelity.h: fidelity, purified, overlap) at one size. */
typedef struct {
    fmpz_t n;
    int status;                        /* EMBZ_OK, or why the size has no result */
    char note[256];                    /* the reason when status != EMBZ_OK */
    double seconds;
    embz_fidelity_result_struct res;   /* status EMBZ_OK: the value or the bounds */
} embz_msweep_point_struct;

typedef struct {
    slong len;
    int measure;
    embz_msweep_point_struct *pts;
} embz_msweep_struct;
typedef embz_msweep_struct embz_msweep_t[1];

void embz_msweep_init(embz_msweep_t s);
void embz_msweep_clear(embz_msweep_t s);

/* The measure at the sizes of embz_sweep_sizes(a, b, k), one embz_fidelity call per size
 * (explicit values up to 2^20, the analytic engine's values or bounds beyond). A size that
 * fails keeps its status and reason; returns EMBZ_OK if at least one size succeeded,
 * EMBZ_ERR_INPUT for a bad range or a measure that is not a fidelity measure, else the
 * status of the last failure (err filled). */
int embz_msweep_run(embz_msweep_t s, const embz_family_t f, const fmpz_t a, const fmpz_t b,
                    slong k, const embz_target_t q, int measure, slong prec,
                    embz_progress_fn progress, void *ctx, embz_err_t *err);

/* ------------------------------------------------------------------ fits */

/* Candidate laws for E as a function of n (x = ln n). */
enum {
    EMBZ_LAW_NONE = 0,
    EMBZ_LAW_POWER_LIMIT,    /* L + C n^-g       (limit L) */
    EMBZ_LAW_LOG,            /* C (ln n)^-g      (limit 0) */
    EMBZ_LAW_LOGLOG,         /* C (ln ln n)^-g   (limit 0) */
    EMBZ_LAW_LOG_LIMIT,      /* L + C (ln n)^-g  (limit L; a summable weight's tail) */
    EMBZ_LAW_COUNT
};

typedef struct {
    int law;                 /* EMBZ_LAW_* */
    int ok;                  /* the fit converged */
    int nparams;
    double L, C, g;          /* parameters (L = 0 for the zero-limit laws) */
    double L_lo, L_hi, C_lo, C_hi, g_lo, g_hi;   /* jackknife intervals (estimates) */
    double rss;              /* sum of squared relative residuals (E_fit - E) / E */
    double max_rel;          /* largest |relative residual| */
    double bic;              /* m ln(rss/m) + k ln m, m points, k parameters */
    double *resid;           /* relative residuals, one per point used (malloc'ed) */
    slong m;
} embz_fit_struct;

typedef struct {
    embz_fit_struct fits[EMBZ_LAW_COUNT];   /* index by law; fits[0] unused */
    int best;                /* selected law (lowest BIC among converged fits), or NONE */
    slong first, m;          /* the fits use the points first .. first+m-1 of the data */
    double *logn, *E;        /* the data used (copies) */
} embz_fitset_struct;
typedef embz_fitset_struct embz_fitset_t[1];

void embz_fitset_init(embz_fitset_t fs);
void embz_fitset_clear(embz_fitset_t fs);

/* Fit every law to the points (ln n_j, E_j), j = 0..len-1 (increasing n, E_j > 0), using the
 * upper part of the range: the points with ln n >= sqrt(ln n_min ln n_max) (at least 6 points;
 * all when fewer are given). Returns EMBZ_OK, or EMBZ_ERR_INPUT with fewer than 5 usable
 * points. The first fit switches GSL's abort-on-error handler off for the whole process (once,
 * thread-safely; every GSL status is checked instead) and leaves it off. */
int embz_fit_laws(embz_fitset_t fs, const double *logn, const double *E, slong len,
                  embz_err_t *err);
/* Same on the successful points of a sweep. */
int embz_fit_sweep(embz_fitset_t fs, const embz_sweep_t s, embz_err_t *err);

/* Short names: "L + C n^-g", "C (ln n)^-g", "C (ln ln n)^-g", "L + C (ln n)^-g", "none";
 * and identifiers for JSON/CSV: "power_limit", "log", "loglog", "log_limit", "none". */
const char *embz_law_formula(int law);
const char *embz_law_id(int law);

/* ------------------------------------------------------------------ verdict */

enum {
    EMBZ_VERDICT_INCONCLUSIVE = 0,
    EMBZ_VERDICT_EMBEZZLER,
    EMBZ_VERDICT_NOT_EMBEZZLER
};
const char *embz_verdict_id(int v);   /* "inconclusive", "embezzler", "not_embezzler" */

#define EMBZ_CLASSIFY_MAX_REASONS 16

/* The reasons behind a verdict, as facts: a kind and its numbers (the renderer,
 * embz_classify_fact_text in embz/render.h, writes the sentence). Which fields a kind uses is
 * listed beside it; x[] are estimates (fits) unless the kind says certified, s[] are exact
 * decimal texts of certified balls, sizes or messages. */
typedef enum {
    EMBZ_FACT_CERTIFIED_LAST = 0, /* s0 <= E_n <= s1 (certified) at the largest size n = s2;
                                     k1: s2 is shortened */
    EMBZ_FACT_SKIPPED,            /* k1 of k2 sizes could not be computed */
    EMBZ_FACT_NO_FIT,             /* no fit; s0 the reason */
    EMBZ_FACT_FIT_RANGE,          /* fits use the k1 largest sizes, ln n from x0 to x1 */
    EMBZ_FACT_CONSTANT,           /* relative spread x0 over the fit range, settled near x1 */
    EMBZ_FACT_LIMIT_LAW,          /* best law `law` with L = x0 [x1, x2], C = x3, g = x4
                                     [x5, x6], largest relative residual x7 */
    EMBZ_FACT_LIMIT_REACHED,      /* the fitted limit is positive and E_n close to it */
    EMBZ_FACT_LIMIT_FAR,          /* best law `law` with limit x0 [x1, x2], E_n = x3 at the
                                     largest size, g = x4 [x5, x6]; k1: the approach is
                                     resolved (E_n still far above L), else too slow */
    EMBZ_FACT_LIMIT_SMALL,        /* best law `law` has limit x0 [x1, x2], small against
                                     E_n = x3: treated as 0 */
    EMBZ_FACT_DECAY_LAW,          /* E_n decays like `law`: C = x0 [x1, x2], g = x3 [x4, x5],
                                     largest relative residual x6 */
    EMBZ_FACT_DECAY_TO_ZERO,      /* keeps decreasing towards 0; E_n <= s0 certified at n = s1 */
    EMBZ_FACT_FLAT_LIMIT,         /* relative variation x0, `law` fits with L = x1 */
    EMBZ_FACT_NO_LAW,             /* no visible decay exponent: best zero-limit law `law` (-1:
                                     none) with g = x0 [x1, x2] */
    EMBZ_FACT_ASYM_NOT_APPLICABLE,/* the asymptotic route does not apply; s0 the reason */
    EMBZ_FACT_ASYM_FORM,          /* f(x) ~ s0; asymptotic verdict v1 (EMBZ_ASYM_VERDICT_*),
                                     why s1 ("" : the criterion), predicted rate s2 (or "") */
    EMBZ_FACT_ASYM_LIMIT,         /* predicted limit of E_n in [s0, s1] (derived formula) */
    EMBZ_FACT_RATES_DIFFER,       /* analytic rate s0 against fitted `law` */
    EMBZ_FACT_EXPONENTS,          /* predicted exponent x0, fitted x1 [x2, x3] */
    EMBZ_FACT_DEPENDS_ON_N,       /* the asymptotic route does not apply: the weight uses n */
    EMBZ_FACT_LEVELS,             /* the asymptotic route does not apply: a level family */
    EMBZ_FACT_ASYM_NOT_BUILT,     /* the asymptotic route is not built in */
    EMBZ_FACT_FROM_ANALYTIC,      /* the verdict comes from the analytic route alone */
    EMBZ_FACT_DISAGREE,           /* analytic verdict v1 against numeric v2 (EMBZ_VERDICT_*) */
    EMBZ_FACT_AGREE,              /* both routes agree */
    EMBZ_FACT_NARROWED,           /* the sweep was cut to sizes n <= k1, the reach of explicit
                                     summation; s0 why the analytic engine declined */
    /* facts of a measure's classification (embz_mclassify); D is its distance (see there) */
    EMBZ_FACT_M_LAST,             /* certified s0 <= D_n <= s1 at the largest size with a value,
                                     n = s2 (k1: shortened); v1 the measure */
    EMBZ_FACT_M_BOUNDS,           /* k1 of k2 sizes have certified bounds only (the largest
                                     n = s0, s1 <= D_n <= s2 there): used as bounds, not fitted;
                                     v1 the measure */
    EMBZ_FACT_M_NO_VALUES,        /* no size has a value (bounds only or failed): no fit */
    EMBZ_FACT_M_FIT,              /* D decays like `law` with C = x0 [x1, x2], g = x3 [x4, x5],
                                     largest relative residual x6, k1 points; v1 the measure */
    EMBZ_FACT_M_FIT_LIMIT,        /* best law `law` has a positive limit x0 [x1, x2] against
                                     D_N = x3; k1: resolved (does not converge), else too slow */
    EMBZ_FACT_M_FIT_NONE,         /* no decay exponent visible (g = x0 [x1, x2] of `law`) */
    EMBZ_FACT_M_BY_K,             /* the K classification's verdict v2 (EMBZ_VERDICT_*), k1: it
                                     rests on the analytic criterion; with K <= P <= sqrt(K (2 -
                                     K)) (fidelity, purified) or O^2 <= F_max <= 1 - K^2
                                     (overlap, k2 = 1) the measure's verdict v1 */
    EMBZ_FACT_M_SANDWICH_RATE,    /* K fitted like `law` with g = x0 [x1, x2]: P lies between
                                     that law and its square root, exponent in [x0/2, x0]
                                     (1 - F_max: [x0, 2 x0]; k1 = 1) */
    EMBZ_FACT_M_HARMONIC,         /* weight 1/i, d = k1: 1 - O = C_d(n)/H_n exactly, C_d
                                     convergent; C_d(N) in [s0, s1] at n = s2 (certified),
                                     1 - O ~ C_d / ln n */
    EMBZ_FACT_M_HARMONIC_P,       /* weight 1/i (fidelity, purified): 1 - F_max <= 1 - O^2 <=
                                     2 C_2 / H_n, so P <= sqrt(2 C_2 / H_n) at every n; C_2 in
                                     [s0, s1]; s2 the certified ratio (1 - F_max) / (1 - O^2)
                                     at the largest size with a value, as "[lo, hi]" */
    EMBZ_FACT_M_AGREE,            /* the fit agrees with the proven verdict */
    EMBZ_FACT_M_DISAGREE          /* the fit (v2, EMBZ_CONVERGE_*) against the verdict v1 from
                                     K (k1: proven, kept; else inconclusive); k2: against K's
                                     fitted positive limit (K inconclusive) */
} embz_fact_t;

typedef struct {
    int kind;                    /* embz_fact_t */
    int law;                     /* EMBZ_LAW_*, where the kind names one */
    int v1, v2;                  /* verdicts, where the kind names them */
    long k1, k2;
    double x[8];
    char *s[3];                  /* malloc'ed or NULL */
} embz_classify_fact_struct;

typedef struct {
    int verdict;                 /* combined verdict */
    int numeric_verdict;         /* from the sweep and fits */
    int analytic_available;      /* the asymptotic route ran (weight without n, engine built) */
    int analytic_verdict;        /* EMBZ_VERDICT_*, from the asymptotic route */
    int disagree;                /* both routes gave a definite and different answer */
    /* limit of E_n: lo/hi bounds as doubles, an estimate (fits) unless limit_certified is set
     * (no route sets it today); limit_hi is at most the certified E at the largest size, read
     * from its 8-digit outward-rounded text. */
    double limit_lo, limit_hi, limit_value;
    int limit_certified;
    int limit_by_criterion;      /* the limit 0 rests on the analytic route's criterion (docs/
                                    math.md section 5), with which the numeric route agrees */
    int law;                     /* fitted law (EMBZ_LAW_*) */
    double exponent, exponent_lo, exponent_hi;
    double coeff;                /* fitted C */
    char asymptotic_form[160];   /* leading term of f from the asymptotic route, or "" */
    char analytic_rate[160];     /* predicted rate class text, or "" */
    embz_classify_fact_struct facts[EMBZ_CLASSIFY_MAX_REASONS];  /* the reasons, in order */
    slong nfacts;
    embz_sweep_t sweep;          /* the sweep used */
    embz_fitset_t fits;          /* the fits used */
} embz_classify_struct;
typedef embz_classify_struct embz_classify_t[1];

void embz_classify_init(embz_classify_t c);
void embz_classify_clear(embz_classify_t c);

/* Options of a classification. */
typedef struct {
    fmpz_t from, to;             /* sweep range (default 10^2 .. 10^120, embz/defaults.h) */
    slong points;                /* default 16 */
    slong prec;                  /* default 64 */
    int use_analytic;            /* 1: also run the asymptotic route when it applies */
    int threads;                 /* sizes of the sweep at a time (<= 0: every OpenMP thread) */
} embz_classify_opts_struct;
typedef embz_classify_opts_struct embz_classify_opts_t[1];

void embz_classify_opts_init(embz_classify_opts_t o);
void embz_classify_opts_clear(embz_classify_opts_t o);

/* Classify the family for one ebit. Returns EMBZ_OK when a verdict (possibly inconclusive) was
 * produced; errors of the family itself (domain) are returned with err filled. Thread-safe for
 * distinct objects. */
int embz_classify(embz_classify_t c, const embz_family_t f, const embz_classify_opts_t o,
                  embz_progress_fn progress, void *ctx, embz_err_t *err);

/* ------------------------------------------------------------------ classification of a
 * fidelity measure */

/* Does a fidelity-type measure reach a perfect conversion as n grows, and how fast? Its
 * distance D_n is P_n (purified), 1 - F_max (fidelity) or 1 - O_n with O the unsquared
 * local-unitary overlap (overlap); "converges" means D_n -> 0. */
enum {
    EMBZ_CONVERGE_INCONCLUSIVE = 0,
    EMBZ_CONVERGE_YES,
    EMBZ_CONVERGE_NO
};
const char *embz_converge_id(int v);   /* "inconclusive", "converges", "does_not_converge" */

typedef struct {
    int measure;                 /* EMBZ_MEASURE_FIDELITY, _PURIFIED, _OVERLAP */
    int verdict;                 /* combined: EMBZ_CONVERGE_* */
    int proven;                  /* the verdict follows from theorems (the K criterion with
                                    the K bracket, or the exact law of 1/i), not from fits */
    int fit_verdict;             /* from the fit of D over the sizes with values */
    int k_verdict;               /* EMBZ_VERDICT_* of the K classification (one ebit) */
    int k_by_criterion;          /* that verdict rests on the analytic route's criterion */
    slong nvalues, nbounds, nfailed;   /* sizes with a value, with bounds only, failed */
    int narrowed;                /* the engine declined the large sizes (fewer than 5 sizes
                                    had a result): the measure was swept up to
                                    EMBZ_FIDELITY_MAX_N instead (fact EMBZ_FACT_NARROWED) */
    int law;                     /* fitted law of D (EMBZ_LAW_*), an estimate */
    double exponent, exponent_lo, exponent_hi, coeff;
    double limit_lo, limit_hi;   /* limit of D: [0, certified D at the largest size] when
                                    converging, else the fitted interval (estimate); NaN */
    int harmonic;                /* the weight is 1/i: the law 1 - O = C_d(n)/H_n holds */
    arb_t harmonic_c;            /* harmonic: C_d(N) = (1 - O_N) H_N at the largest size N */
    embz_classify_fact_struct facts[EMBZ_CLASSIFY_MAX_REASONS];
    slong nfacts;
    embz_msweep_t sweep;         /* the measure at the sizes */
    embz_fitset_t fits;          /* fits of D (sizes with values only) */
    arb_ptr dist;                /* D per size (sweep.len): the value's ball, or for bounds
                                    only a ball covering the certified bounds; indeterminate
                                    where the size failed */
    embz_classify_t kc;          /* the K classification behind k_verdict */
} embz_mclassify_struct;
typedef embz_mclassify_struct embz_mclassify_t[1];

void embz_mclassify_init(embz_mclassify_t c);
void embz_mclassify_clear(embz_mclassify_t c);

/* The measure's classification for one ebit over the sizes of o (embz_classify_opts_t): the
 * sweep of the measure (embz_msweep_run; over [from, EMBZ_FIDELITY_MAX_N] instead when the
 * analytic engine declines the large sizes and fewer than 5 have a result), fits of D over the sizes with values (bounds-only
 * sizes are reported, never fitted), the K classification embz_classify(f, o), and the
 * derived law for the weight 1/i (overlap). Verdict: for fidelity and purified, P -> 0
 * exactly when K -> 0 (K <= P <= sqrt(K (2 - K))), so a definite K verdict decides it; for the
 * overlap a K that does not go to 0 decides "does not converge" (O^2 <= F_max <= 1 - K^2) and
 * the weight 1/i decides "converges" (exact law); otherwise the fit, marked as an estimate.
 * Returns EMBZ_OK, EMBZ_ERR_INPUT for a measure that is not a fidelity measure, or the
 * failure of the sweeps (err filled). */
int embz_mclassify(embz_mclassify_t c, const embz_family_t f, int measure,
                   const embz_classify_opts_t o, embz_progress_fn progress, void *ctx,
                   embz_err_t *err);

/* ------------------------------------------------------------------ scans */

typedef struct {
    char *name;                  /* parameter name */
    fmpq_t lo, hi;               /* inclusive range */
    slong count;                 /* number of values, >= 1 */
    int old_form;                /* written LO:HI:COUNT (still read; callers say so) */
} embz_grid_axis_struct;

/* Parse "NAME=LO..HI,count=COUNT": COUNT values from LO to HI, both ends included (LO, HI
 * exact decimals or p/q; COUNT >= 1; COUNT = 1 uses LO). The older "NAME=LO:HI:COUNT" (which
 * reads as start:step:stop to users of matrix languages) is still read, with old_form set.
 * Returns EMBZ_OK or EMBZ_ERR_INPUT with a message. axis must be cleared with
 * embz_grid_axis_clear. */
int embz_grid_axis_parse(embz_grid_axis_struct *axis, const char *text, embz_err_t *err);
void embz_grid_axis_clear(embz_grid_axis_struct *axis);
/* The j-th value lo + j (hi - lo)/(count - 1), exactly. */
void embz_grid_axis_value(fmpq_t res, const embz_grid_axis_struct *axis, slong j);

typedef struct {
    slong index;                 /* position in the full grid (row-major, first axis slowest) */
    fmpq *values;                /* one per axis */
    int status;                  /* EMBZ_OK or the failure */
    embz_classify_t c;           /* only the summary fields are kept (sweep/fits cleared) */
    char message[256];           /* failure reason */
} embz_scan_row_struct;

typedef struct {
    embz_scan_row_struct *rows;
    slong len;                   /* rows of this shard */
    slong total;                 /* size of the full grid */
    slong naxes;
} embz_scan_struct;
typedef embz_scan_struct embz_scan_t[1];

void embz_scan_init(embz_scan_t s);
void embz_scan_clear(embz_scan_t s);

/* Classify f at every grid point of shard `shard` of `nshards` (0-based here; the CLI counts
 * from 1). Shard I takes the contiguous block of grid indices [I total/N, (I+1) total/N), so
 * the shards' rows, concatenated in shard order, are exactly the rows of the full grid. threads > 1 uses OpenMP
 * when built with it. Failures at single points are recorded in their rows. Returns EMBZ_OK,
 * or EMBZ_ERR_INPUT for a bad grid (unknown parameter name, empty). */
int embz_scan_run(embz_scan_t s, const embz_family_t f, const embz_grid_axis_struct *axes,
                  slong naxes, slong shard, slong nshards, int threads,
                  const embz_classify_opts_t o, embz_progress_fn progress, void *ctx,
                  embz_err_t *err);

#endif
