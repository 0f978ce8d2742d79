/* Shared pieces of the command-line front end: the option parser, error reporting, output
 * helpers. Every subcommand lives in its own cmd_NAME.c and is listed in main.c's table. */
#ifndef EMBZ_CLI_H
#define EMBZ_CLI_H

#include <stdio.h>
#include "embz.h"

/* Exit codes. */
#define CLI_EXIT_OK 0
#define CLI_EXIT_RUNTIME 1
#define CLI_EXIT_USAGE 2

/* ---- options ---- */
typedef enum {
    CLI_FLAG = 0,   /* --json: counted */
    CLI_VALUE,      /* -n N / --size=N: the last one given wins */
    CLI_LIST        /* --set A=1 --set B=2: every value kept in order */
} cli_opt_kind_t;

typedef struct {
    const char *name;       /* long name, without the leading "--" */
    char short_name;        /* single-letter alias, or 0 */
    int kind;               /* cli_opt_kind_t */
    const char *metavar;    /* how the value is shown in the help ("N", "BITS"), NULL for flags */
    const char *help;       /* one line */
} cli_opt_t;

#define CLI_MAX_OPTS 32

typedef struct {
    const char *name;       /* the subcommand ("error") */
    const char *args;       /* positional synopsis ("FAMILY -n N") */
    const char *summary;    /* one line */
    const char *details;    /* longer text after the option list, or NULL */
    const cli_opt_t *opts;  /* terminated by an entry with name == NULL */
    long min_pos, max_pos;  /* number of positional arguments allowed */
} cli_spec_t;

typedef struct {
    const cli_spec_t *spec;
    int count[CLI_MAX_OPTS];
    const char *value[CLI_MAX_OPTS];
    const char **list[CLI_MAX_OPTS];
    long nlist[CLI_MAX_OPTS];
    const char **pos;
    long npos;
} cli_args_t;

enum { CLI_PARSE_OK = 0, CLI_PARSE_HELP = 1, CLI_PARSE_ERROR = 2 };

/* Parses argv[1..argc-1] (argv[0] is the subcommand name) against spec. On --help prints the
 * help to stdout and returns CLI_PARSE_HELP; on a usage error prints the message and the usage
 * to stderr and returns CLI_PARSE_ERROR. a must be freed with cli_args_clear in every case. */
int cli_parse(cli_args_t *a, const cli_spec_t *spec, int argc, char **argv);
void cli_args_clear(cli_args_t *a);
int cli_flag(const cli_args_t *a, const char *name);
const char *cli_value(const cli_args_t *a, const char *name);
const char *const *cli_list(const cli_args_t *a, const char *name, long *len);

void cli_print_help(FILE *out, const cli_spec_t *spec);
/* "embz CMD: message" plus the usage on stderr; returns CLI_EXIT_USAGE. */
int cli_usage_error(const cli_spec_t *spec, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;

/* ---- errors from the library ---- */
/* Exit code for a library status: input and domain problems are the user's (2), the rest 1. */
int cli_exit_code(int status);
/* Prints "embz CMD: <formatted err>" to stderr and returns cli_exit_code(err->code or status). */
int cli_report(const char *cmd, int status, const embz_err_t *err);

/* ---- output helpers ---- */
/* A double as a JSON number ("null" when not finite). */
void cli_buf_json_double(embz_buf_t *b, double x);
/* A CSV field, quoted when it holds a comma, a quote or a line break. */
void cli_buf_csv_field(embz_buf_t *b, const char *text);
/* Upper bound of the radius of x as a double. */
double cli_arb_radius_d(const arb_t x);
/* Parse a whole decimal integer in [lo, hi]; returns 0 on success. */
int cli_parse_long(long *res, const char *s, long lo, long hi);

/* ---- common inputs (load.c) ---- */
/* The family named by spec_text, with the --set and --amplitude options of a. On failure the
 * message is printed ("embz CMD: ...") and the exit code returned; 0 on success. */
int cli_load_family(embz_family_t fam, const cli_args_t *a, const char *spec_text,
                    const char *cmd);
/* Every setting names a parameter of fam (an inline expression keeps only those it uses);
 * else a message naming the first one that does not and the option opt ("--set") that gave
 * it, and CLI_EXIT_USAGE. */
int cli_check_settings_used(const embz_family_struct *fam, const embz_setting_t *v, long len,
                            const char *opt, const char *cmd);
/* The --target option (one ebit when absent); message + exit code on failure, 0 on success. */
int cli_load_target(embz_target_t q, const cli_args_t *a, const char *cmd);
/* The --prec option (unchanged when absent); usage error on a bad value, 0 on success. */
int cli_load_prec(long *prec, const cli_args_t *a, const cli_spec_t *spec);

/* ==== shared command helpers (load.c, opts.c, progress.c) ==== begin ==== */
/* Option-table rows that read the same in every command that has them. */
#define CLI_OPT_SET { "set", 's', CLI_LIST, "NAME=VALUE", \
                      "set a parameter (exact decimal, e.g. a=-0.7)" }
#define CLI_OPT_AMPLITUDE { "amplitude", 0, CLI_FLAG, NULL, \
                            "the expression gives amplitudes; weights are squares" }
#define CLI_OPT_JSON { "json", 0, CLI_FLAG, NULL, "print one JSON object" }
#define CLI_OPT_END { NULL, 0, 0, NULL, NULL }
/* The rows behind the shared defaults of embz/defaults.h (docs/cli.md, "Defaults"): every
 * command that has the option shows the same line. */
#define CLI_STR_(x) #x
#define CLI_STR(x) CLI_STR_(x)
#define CLI_OPT_PREC_ONE(MORE) { "prec", 'p', CLI_VALUE, "BITS", \
    "working precision in bits (default " CLI_STR(EMBZ_PREC_ONE) MORE ")" }
#define CLI_OPT_PREC_MANY { "prec", 'p', CLI_VALUE, "BITS", \
    "working precision in bits, per size (default " CLI_STR(EMBZ_PREC_MANY) ")" }
#define CLI_OPT_FROM { "from", 0, CLI_VALUE, "A", \
    "smallest size of the sweep (default " CLI_STR(EMBZ_RANGE_FROM) ")" }
#define CLI_OPT_TO { "to", 0, CLI_VALUE, "B", \
    "largest size of the sweep (default 10^" CLI_STR(EMBZ_RANGE_TO_EXP10) ")" }
#define CLI_OPT_POINTS { "points", 'k', CLI_VALUE, "K", \
    "number of log-spaced sizes (default " CLI_STR(EMBZ_RANGE_POINTS) ")" }
#define CLI_OPT_THREADS(WHAT) { "threads", 'j', CLI_VALUE, "T", \
    WHAT " at a time (default: every processor; 1 to " CLI_STR(EMBZ_THREADS_MAX) ")" }

/* cli_parse for a command's main: 1 when the command goes on (*code = CLI_EXIT_OK), 0 when
 * it returns *code at once (0 after --help, CLI_EXIT_USAGE after a usage error; a is then
 * already cleared). */
int cli_begin(cli_args_t *a, const cli_spec_t *spec, int argc, char **argv, int *code);

/* The --set options split into settings; the texts are copies owned by s (load.c). */
typedef struct {
    embz_setting_t *v;
    char **copies;
    long len;
} cli_settings_t;
/* Fills s (always clear it afterwards); message + exit code on failure, 0 on success. */
int cli_settings_load(cli_settings_t *s, const cli_args_t *a, const char *cmd);
void cli_settings_clear(cli_settings_t *s);
/* --prec in [16, max_bits] (unchanged when absent); usage error on a bad value, else 0. */
/* The -j option: every processor (embz_threads_available) when absent, else 1 to
 * EMBZ_THREADS_MAX; usage error on a bad value, 0 on success. */
int cli_load_threads(int *threads, const cli_args_t *a, const cli_spec_t *spec);
int cli_load_prec_upto(long *prec, const cli_args_t *a, const cli_spec_t *spec,
                       long max_bits);
/* n <- the size written in text (any form embz_size_parse takes, n >= 1); a bad one is a
 * usage error with the parser's column and caret, after what (an option such as "--from",
 * or NULL for a positional size). */
int cli_load_size(fmpz_t n, const char *text, const char *what, const cli_spec_t *spec);
/* A level family's sizes are numbers of sites or copies, evaluated level by level: without
 * --to, a range ends at CLI_LEVELS_DEFAULT_TO (and starts no later than it). */
#define CLI_LEVELS_DEFAULT_TO 10000
void cli_levels_range(fmpz_t from, fmpz_t to, const embz_family_t f, const cli_args_t *a);
/* --points in [min_points, max_points] (skipped when points is NULL), then --from and --to
 * (sizes >= 1, from <= to); values absent from the command line keep what the caller put
 * in. Usage error on a bad value, else 0. */
int cli_load_range(fmpz_t from, fmpz_t to, long *points, long min_points, long max_points,
                   const cli_args_t *a, const cli_spec_t *spec);

/* Timing and the progress bar on stderr (progress.c). */
double cli_now(void);            /* monotonic clock, seconds */
typedef struct {
    double t0;
    int shown;                   /* the bar has been drawn */
    int clear_when_done;         /* erase the bar when done == total */
    const char *unit;            /* what is counted ("sizes" unless set after start) */
} cli_progress_t;
/* Starts the clock; returns cli_progress_cb when stderr is a terminal, else NULL. */
embz_progress_fn cli_progress_start(cli_progress_t *p, int clear_when_done);
void cli_progress_cb(void *ctx, slong done, slong total);
void cli_progress_end(cli_progress_t *p);   /* erases the bar if it was drawn */

/* Texts and JSON pieces (opts.c). */
char *cli_strdup(const char *s);                     /* malloc'ed copy */
char *cli_family_label(const embz_family_struct *f); /* "name (a=1, b=2)", malloc'ed */
/* {"a": "-1/2", ...}: the parameter values as exact fractions */
void cli_buf_json_params(embz_buf_t *b, const embz_family_struct *f);
/* ", \"key\": " and a JSON string / number */
void cli_buf_json_key_string(embz_buf_t *b, const char *key, const char *text);
void cli_buf_json_key_double(embz_buf_t *b, const char *key, double x);
/* "\"value\": v, \"lo\": lo, \"hi\": hi" (the inside of an estimate with its interval) */
void cli_buf_json_vlohi(embz_buf_t *b, double v, double lo, double hi);
/* text as a JSON string, or null when it is empty */
void cli_buf_json_string_or_null(embz_buf_t *b, const char *text);
/* "\"verdict\": .., \"numeric_verdict\": .., \"analytic_verdict\": .." of a classification */
void cli_buf_json_verdicts(embz_buf_t *b, const embz_classify_struct *c);
/* n CSV fields, each followed by a comma */
void cli_buf_csv_fields(embz_buf_t *b, const char *const *fields, int n);
/* ",value" with 10 significant digits, or "," alone when x is not finite (not available) */
void cli_buf_csv_num(embz_buf_t *b, double x);
/* Figures shared by plot and report (src/cli/compare_report.c): the weight envelopes
 * x^(-1 -+ eps) (eps_label the text of eps in the legend) on a log-log panel up to 10^LB, with the y range fitted to the weights seen
 * (ymin, ymax, clipped far below the envelopes); and the optimum OPT_n (exact closed form) at
 * sizes ns drawn at xs, a dashed grey series 'optimum' (strict: the first failure is returned,
 * else such sizes are left out). */
void cli_plot_envelopes(embz_plot_t fig, slong pw, double eps, const char *eps_label,
                        double LB, double ymin, double ymax);
int cli_plot_optimum(embz_plot_t fig, slong p, const fmpz *ns, const double *xs, slong len,
                     const embz_target_t q, int strict, embz_err_t *err);
/* A note on stderr when a --grid axis was written in the old LO:HI:COUNT form. */
void cli_note_old_grid(const char *cmd, const char *text, const embz_grid_axis_struct *axis);
/* ==== shared command helpers ==== end ==== */

/* ---- comparison of families (compare.c), shared by `report` and `demo` ---- */
typedef struct {
    fmpz_t from, to;             /* sweep range of the classification and of the plots */
    slong points;                /* sizes per sweep */
    slong prec;                  /* working precision (bits) */
    const char *target_text;     /* target as the user wrote it; NULL: one ebit */
    slong nsizes;                /* sizes at which the error is tabulated */
    fmpz *sizes;
    const char *const *size_text;
    slong ngoals;                /* error goals for the size column */
    const char *const *goal_text;
    double envelope;             /* eps of the envelopes x^(-1 -+ eps) in the weights plot */
    int threads;                 /* families computed at the same time (OpenMP), >= 1 */
    int progress;                /* one line per finished family on stderr */
    const char *cmd;             /* "report" or "demo", for messages */
} cli_compare_opts_t;

void cli_compare_opts_init(cli_compare_opts_t *o);
void cli_compare_opts_clear(cli_compare_opts_t *o);

/* One family of a comparison: what the library computed (d) and the texts made of it by
 * cli_compare_run. */
typedef struct {
    embz_compare_row_struct d;
    char *label;                 /* name with its parameter values */
    char *verdict, *law, *exponent, *limit_text;
    char **error_text, **need_n_text, **need_q_text;
    char **extra_q_text;         /* per goal: qubits per side beyond the optimum's (uniform
                                    targets), "n/a" for other targets */
    char *why;                   /* one line, for the terminal table */
    char *notes;                 /* paragraphs, for the document */
} cli_compare_row_t;

/* Load the FAMILY arguments; --set NAME=VALUE goes to every family that has the parameter
 * (an inline expression takes all of them); a setting no family uses is a usage error.
 * Message printed and exit code returned on failure, 0 on success. */
int cli_compare_load(embz_family_struct *fam, long nfam, const char *const *specs,
                     const cli_args_t *a, const cli_spec_t *spec);
/* Compute every row (in parallel when built with OpenMP). Returns the worst exit code of the
 * rows (0 when all succeeded); failed rows keep their message. */
int cli_compare_run(cli_compare_row_t *rows, embz_family_struct *fam, long nfam,
                    const cli_compare_opts_t *o);
void cli_compare_rows_clear(cli_compare_row_t *rows, long nfam, const cli_compare_opts_t *o);
/* Fill r (table, notes, subtitle, answer, footer) and figs (the figures, added to r) from the
 * rows, shown in the order order (NULL: as given). figs must hold 3 figures, initialised here;
 * returns how many were used. Grid panels are added by the caller. */
int cli_compare_fill(embz_report_t r, embz_plot_struct *figs, const cli_compare_row_t *rows,
                     const long *order, long nfam, const cli_compare_opts_t *o);
/* The display order, best first: goal 0 reached (fewest qubits first), embezzlers that do not
 * reach it, the other families, those that never reach it, failures (stable). */
void cli_compare_order(long *order, const cli_compare_row_t *rows, long nfam,
                       const cli_compare_opts_t *o);
/* The answer in one paragraph (malloc'ed): the family with the fewest qubits for goal 0 and
 * the families that do not get there, grouped by why. */
char *cli_compare_answer(const cli_compare_row_t *rows, const long *order, long nfam,
                         const cli_compare_opts_t *o);
/* The plain-text summary for a terminal: a line on the optimum for goal 0, then family,
 * verdict, qubits for goal 0, extra qubits against the optimum, error at size 0, why. order: row indices in display order (NULL: as given). */
void cli_compare_text(embz_buf_t *b, const cli_compare_row_t *rows, const long *order,
                      long nfam, const cli_compare_opts_t *o);
/* The same rows as data, best first: CSV (json == 0: a header, then one line per family with
 * every goal and size) or one JSON object ({"target", "goals", "sizes", "rows": [...]}).
 * Cells are the texts of the table: certified digits, "never", "not by 10^924", "". */
void cli_compare_data(embz_buf_t *b, const cli_compare_row_t *rows, const long *order,
                      long nfam, const cli_compare_opts_t *o, int json);
/* Format from --format or the extension of path (-1 when neither says). */
int cli_compare_format(const char *format_opt, const char *path);

/* The output can be written (embz_output_check: "-" and /dev/stdout are standard output, other
 * names are followed through symbolic links): 0, or the message and exit code 2 for a refused
 * output (not a regular file, several hard links), 1 for a missing or unwritable directory.
 * Checked before any computation, so that a typo does not cost a long run. */
int cli_check_output(const char *path, const char *cmd);

/* ---- subcommands ---- */
int cli_cmd_families(int argc, char **argv);
int cli_cmd_convert(int argc, char **argv);
int cli_cmd_error(int argc, char **argv);
int cli_cmd_sweep(int argc, char **argv);
int cli_cmd_classify(int argc, char **argv);
int cli_cmd_scan(int argc, char **argv);
int cli_cmd_size(int argc, char **argv);
int cli_cmd_optimal(int argc, char **argv);
int cli_cmd_plot(int argc, char **argv);
int cli_cmd_report(int argc, char **argv);
int cli_cmd_demo(int argc, char **argv);
/* embz completion SHELL: the script for the commands' option tables specs[0..nspecs-1]. */
int cli_cmd_completion(int argc, char **argv, const cli_spec_t *const *specs, long nspecs);
/* Each command's option table (defined at the end of its cmd_NAME.c). */
extern const cli_spec_t *const cli_spec_families, *const cli_spec_convert,
    *const cli_spec_error, *const cli_spec_sweep, *const cli_spec_classify,
    *const cli_spec_scan, *const cli_spec_size, *const cli_spec_optimal,
    *const cli_spec_plot, *const cli_spec_report, *const cli_spec_demo;

#endif
