/* A flat interface for bindings (Python's embz package, other languages' FFIs): opaque
 * handles and plain C types only (char *, double, int, long), so that a binding needs none of
 * FLINT's, arb's or embz's own structs, which change with the library.
 *
 * - Sizes and indices are text: any form the CLI takes ("1000", "1e6", "10^30", "2^20") and
 *   also hexadecimal "0x..." (what a binding gets from its big integers without a decimal
 *   conversion).
 * - Results are tables (embz_flat_table): rows of KEY = TEXT pairs, every value text. Numbers
 *   that are certified come as decimal ends rounded outward ("*_lo", "*_hi": lo <= x <= hi for
 *   the printed numbers) and as the certified digits ("certified"); doubles ("mid",
 *   "estimate", fits) are printed with %.17g and are estimates unless the key says otherwise.
 *   The keys of each call are listed beside it and in docs/python.md.
 * - Failures: every call returns EMBZ_OK or a status of embz/err.h and fills an
 *   embz_flat_err (may be NULL): the code, the message alone, the location (column and
 *   source line for expressions, file and line for family files) and the complete formatted
 *   message with the caret display. Nothing is printed.
 * - Ownership: handles and tables are freed with their embz_flat_*_free; strings a table
 *   returns belong to the table; embz_flat_str_free frees the strings returned as char **.
 * - Cancellation: embz_flat_opts.cancel is a flag the caller may set from another thread or a
 *   signal handler; the analytic searches and the loops over sizes stop (EMBZ_ERR_LIMIT) and
 *   the library stays usable.
 * - Threads: distinct calls may run at the same time; families and targets are read-only
 *   once made and may be shared.
 *
 * The declarations between the two markers are plain C that cffi's cdef reads as they are
 * (python/embz/_cdef.py holds a copy; a test checks that they agree). */
#ifndef EMBZ_FLAT_H
#define EMBZ_FLAT_H

#ifdef __cplusplus
extern "C" {
#endif

/* flat-cdef-begin */
typedef struct embz_flat_family_s embz_flat_family;
typedef struct embz_flat_target_s embz_flat_target;
typedef struct embz_flat_table_s embz_flat_table;

typedef struct {
    int code;              /* EMBZ_OK (0) or EMBZ_ERR_* (embz/err.h) */
    long col;              /* 1-based column in an expression, 0 if none */
    long line;             /* 1-based line in a file, 0 if none */
    char file[256];        /* file name, "" if none */
    char source[1024];     /* the offending line of text, "" if none */
    char text[512];        /* the message alone */
    char message[4096];    /* "file:line: column N: text" and the caret display */
} embz_flat_err;

typedef struct {
    int method;            /* 0 auto, 1 explicit, 2 analytic (EMBZ_METHOD_*) */
    int measure;           /* 0 k, 1 fidelity, 2 purified, 3 overlap (embz_measure_t) */
    long prec;             /* working precision in bits (<= 0: 128; sweeps 64) */
    long digits;           /* significant digits of the *_lo / *_hi ends (<= 0: 45, and more
                              above 128 bits, as the CLI's JSON) */
    const volatile int *cancel;  /* borrowed, may be NULL: nonzero stops the call */
    double seconds;        /* > 0: analytic searches stop after this long per size */
    int threads;           /* scans, comparisons, sweeps: points or families at a time */
} embz_flat_opts;

/* The defaults above. */
void embz_flat_opts_init(embz_flat_opts *o);
const char *embz_flat_version(void);
/* Frees a string returned through char ** (NULL is allowed). */
void embz_flat_str_free(char *s);
/* Frees FLINT's caches of the calling thread (flint_cleanup): call it in a thread that made
 * calls before the thread ends, so that its caches do not outlive it. */
void embz_flat_thread_cleanup(void);

/* ---- tables ---- */
long embz_flat_rows(const embz_flat_table *t);
long embz_flat_nkeys(const embz_flat_table *t, long row);
const char *embz_flat_key(const embz_flat_table *t, long row, long j);
const char *embz_flat_value(const embz_flat_table *t, long row, long j);
/* The value of key in row, or NULL when the row has no such key. */
const char *embz_flat_get(const embz_flat_table *t, long row, const char *key);
void embz_flat_table_free(embz_flat_table *t);

/* ---- families ----
 * spec: a library name, the path of a family file, or an expression in i (and n); the
 * settings names[k] = values[k] (exact decimals or p/q) override parameters or declare those
 * of an expression, and each must name a parameter; amplitude != 0: the text gives
 * amplitudes. */
int embz_flat_family_new(embz_flat_family **out, const char *spec, const char *const *names,
                         const char *const *values, long nsettings, int amplitude,
                         embz_flat_err *err);
void embz_flat_family_free(embz_flat_family *f);
/* One row: name, label, description, weight_text, weight (the bound weight, canonical),
 * amplitude, origin, depends_on_n, nparams, then param:NAME = exact value for each. */
int embz_flat_family_info(embz_flat_table **out, const embz_flat_family *f, embz_flat_err *err);
/* The weights w(i, n) at the indices i[0..len-1] for size n (n may be NULL when the weight
 * does not use n): rows i, exact (p/q when rational at the integers, else absent), lo, hi,
 * certified, mid. EMBZ_ERR_DOMAIN names the index where the weight is invalid. */
int embz_flat_family_weights(embz_flat_table **out, const embz_flat_family *f,
                             const char *const *i, long len, const char *n,
                             const embz_flat_opts *o, embz_flat_err *err);
/* The library (embz families): rows name, path, description, weight, params. */
int embz_flat_family_list(embz_flat_table **out, embz_flat_err *err);

/* ---- targets ----
 * "ebit", "ebits:J", "uniform:D", or numbers "0.7,0.3" (exact decimals or p/q, normalised). */
int embz_flat_target_new(embz_flat_target **out, const char *spec, int amplitude,
                         embz_flat_err *err);
void embz_flat_target_free(embz_flat_target *t);
/* "ebit", "ebits:3", "uniform:5", "vector[4]" ...; belongs to t. */
const char *embz_flat_target_label(const embz_flat_target *t);

/* ---- the error E_n(q) ----
 * At the sizes sizes[0..len-1] through one evaluator and one workspace (q NULL: one ebit).
 * One row per size: n, n_hex, status (0 or EMBZ_ERR_*), message (on failure), measure,
 * bounds_only, lo, hi, certified, mid, radius, estimate, argmax, method (explicit/analytic),
 * how (how it was computed), bound_lo, bound_hi (one ebit: block-mass bounds, when known);
 * measures other than k also give fidelity_lo/_hi, purified_lo/_hi, overlap_lo/_hi,
 * K_lo/_hi where computed. Returns EMBZ_OK when every size was tried (failures stay in their
 * rows), EMBZ_ERR_INPUT for a bad size text, EMBZ_ERR_DOMAIN for an invalid weight (later
 * sizes are not tried), EMBZ_ERR_LIMIT when cancelled (the rows done so far are kept). */
int embz_flat_errors(embz_flat_table **out, const embz_flat_family *f,
                     const char *const *sizes, long len, const embz_flat_target *q,
                     const embz_flat_opts *o, embz_flat_err *err);

/* ---- conversion between two vectors (embz convert) ----
 * One row: from_len, to_len, from_normalised, to_normalised, convertible,
 * reverse_convertible, K_forward, K_forward_decimal, K_forward_argk, the same _backward, and
 * F_forward_lo/_hi/_certified, P_forward_..., F_backward_..., P_backward_... */
int embz_flat_convert(embz_flat_table **out, const char *from, const char *to, int amplitude,
                      embz_flat_err *err);

/* ---- sweeps, verdicts, scans, sizes, comparisons ---- */
/* E_n(q) at `points` log-spaced sizes from..to (the sweep policy), then the fitted laws.
 * Rows: kind = point (n, n_hex, log_n, status, lo, hi, mid, certified, method, argmax,
 * seconds, how), kind = fit (law, formula, ok, L, L_lo, L_hi, C, C_lo, C_hi, g, g_lo, g_hi,
 * rss, max_rel, bic; estimates), and one kind = summary (target, points, nok, best, fit_status,
 * fit_message). Cancellation stops between sizes and inside the engine. */
int embz_flat_sweep(embz_flat_table **out, const embz_flat_family *f, const char *from,
                    const char *to, long points, const embz_flat_target *q,
                    const embz_flat_opts *o, embz_flat_err *err);
/* The one-ebit verdict (embz classify): kind = verdict (verdict, numeric_verdict,
 * analytic_verdict, analytic_available, disagree, limit_lo, limit_hi, limit_value, law,
 * exponent, exponent_lo, exponent_hi, coeff, asymptotic_form, analytic_rate), kind = fact
 * (text: one sentence per reason), and the sweep's kind = point rows. from/to NULL: the
 * defaults 10^2 .. 10^120; points <= 0: 16. */
int embz_flat_classify(embz_flat_table **out, const embz_flat_family *f, const char *from,
                       const char *to, long points, const embz_flat_opts *o,
                       embz_flat_err *err);
/* Verdicts over a grid (embz scan): axes[k] = "NAME=LO..HI,count=COUNT". One row per grid point:
 * index, param:NAME (exact), status, message, verdict, law, exponent, limit_lo, limit_hi. */
int embz_flat_scan(embz_flat_table **out, const embz_flat_family *f, const char *const *axes,
                   long naxes, const char *from, const char *to, long points,
                   const embz_flat_opts *o, embz_flat_err *err);
/* The smallest size reaching E_n(q) <= eps (embz size; eps an exact decimal or p/q;
 * qubits_only != 0: stop once ceil(log2 n) is decided). One row: status (found,
 * not_reached, undecided), n, n_hex, qubits, n_low, exhaustive, checked_below,
 * stay_checked_to, again_above, err_lo, err_hi, prev_lo, prev_hi, largest, largest_lo,
 * largest_hi, undecided_lo, undecided_hi, never, evaluations.
 * o->measure = 2 (purified) searches P_n <= eps as embz size --measure purified: first on
 * certified enclosures of P (one row, measure "purified", route "direct", goal, bounds_seen;
 * err_* enclose P); where that search was left open at a size with bounds only, the bracket
 * between two searches on K instead, two rows: route "lower" (K <= eps, needed since P >= K)
 * and route "upper" (K <= 1 - sqrt(1 - eps^2), enough since P <= sqrt(K (2 - K)); goal_lo,
 * goal_hi that goal). Measures 1 and 3 (fidelities: larger is better) are EMBZ_ERR_INPUT. */
int embz_flat_size(embz_flat_table **out, const embz_flat_family *f, const char *eps,
                   const embz_flat_target *q, int qubits_only, const embz_flat_opts *o,
                   embz_flat_err *err);

/* ---- plots (the C renderer, embz/render.h) ----
 * One XY panel with nseries series; series k has lens[k] points, taken in turn from the
 * concatenated arrays x, y, lo, hi (axis coordinates: log10 values on log axes; lo/hi NaN
 * where there is no enclosure). path NULL: the SVG text in *svg (free it with
 * embz_flat_str_free); else the file path (format "svg", "pdf", "png" or NULL: from the
 * extension), written atomically. */
int embz_flat_plot(char **svg, const char *title, const char *xlabel, const char *ylabel,
                   int xlog, int ylog, long nseries, const char *const *labels,
                   const long *lens, const double *x, const double *y, const double *lo,
                   const double *hi, const char *path, const char *format, embz_flat_err *err);

/* ---- reports (the C renderer behind embz report) ----
 * A comparison document from the caller's texts: nfam rows of 8 + nsizes + 2 ngoals cells
 * each, in turn in cells: name, weight, verdict, law, exponent, limit_lo, limit_hi, notes,
 * the error at each size, the n needed for each goal, the qubits for each goal (NULL: not
 * available). Figures: nfig SVG texts with captions (captions may be NULL). format "html",
 * "md", "tex" or "pdf" (NULL: html); path NULL: the text in *text (not for pdf; free it with
 * embz_flat_str_free), else the file path, written atomically. */
int embz_flat_report(char **text, const char *title, const char *subtitle, const char *intro,
                     long nsizes, const char *const *sizes, long ngoals,
                     const char *const *goals, long nfam, const char *const *cells,
                     long nfig, const char *const *captions, const char *const *svgs,
                     const char *footer, const char *format, const char *path,
                     embz_flat_err *err);

/* flat-cdef-end */

#ifdef __cplusplus
}
#endif

#endif
