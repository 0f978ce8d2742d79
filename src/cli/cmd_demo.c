/* embz demo: the built-in scenario. A lab team must embezzle two ebits at error 1e-3 and
 * compares the shipped families: which needs the fewest qubits per side, which never gets
 * there, and why. Prints the summary table and writes the HTML report. */
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "cli.h"

static const cli_opt_t demo_opts[] = {
    { "output", 'o', CLI_VALUE, "FILE", "the report (default embz-demo.html; - for stdout)" },
    { "format", 'f', CLI_VALUE, "F", "html, md, tex or pdf (default: from the extension of FILE)" },
    CLI_OPT_THREADS("families"),
    { "json", 0, CLI_FLAG, NULL, "print the table as one JSON object (the report is written as usual)" },
    { "csv", 0, CLI_FLAG, NULL, "print the table as CSV (a header, one row per family)" },
    { "quiet", 'q', CLI_FLAG, NULL, "no progress lines on stderr" },
    { NULL, 0, 0, NULL, NULL }
};

static const cli_spec_t demo_spec = {
    "demo", "",
    "The built-in scenario: an experiment must embezzle two ebits (target ebits:2) with\n"
    "error at most 1e-3. Which shipped family needs the fewest qubits per side, which never\n"
    "gets there, and why? Prints the answer as a table and writes the full report (the\n"
    "layout of 'embz report': the answer and a key table first, the details after it).",
    "Runs 8 shipped families (invamp is left out: it is the inverse family written through\n"
    "its amplitudes, the same state). Per family: a short one-ebit classification (10 sizes\n"
    "from 10^2 to 10^60 at 64 bits), certified errors at n = 10^30 and 10^100, and the\n"
    "qubit-resolution size search for the goal 1e-3 (up to n = 2^3072). Families run in\n"
    "parallel when built with OpenMP. Takes well under a minute on two cores.\n"
    "Output: -o - (or /dev/stdout) streams the report to standard output (html unless\n"
    "--format says otherwise); the table then goes to standard error. Any other FILE is\n"
    "written as 'embz report --help' describes (atomically, links followed, mode kept).\n",
    demo_opts, 0, 0
};

/* The cast: one family for each way a family can do or fail. */
static const char *const demo_families[] = {
    "inverse",    /* the classic: error ~ ln 4 / ln n */
    "logpower",   /* universal, but decays like (ln n)^-1/2 */
    "tilted",     /* exponent drifts with n */
    "iterlog",    /* universal in theory, hopelessly slow */
    "nearmiss",   /* within every power envelope, yet summable */
    "geometric",  /* summable, settles at once */
    "power",      /* a = -1/2: too flat, positive limit */
    "uniform",    /* maximally entangled: error 1/2 for one ebit */
};
#define NDEMO ((long) (sizeof(demo_families) / sizeof(demo_families[0])))

int cli_cmd_demo(int argc, char **argv)
{
    cli_args_t a;
    int pr = cli_parse(&a, &demo_spec, argc, argv);
    if (pr != CLI_PARSE_OK) {
        cli_args_clear(&a);
        return pr == CLI_PARSE_HELP ? CLI_EXIT_OK : CLI_EXIT_USAGE;
    }
    int code = CLI_EXIT_OK;
    embz_err_t err;
    embz_err_clear(&err);
    cli_compare_opts_t o;
    cli_compare_opts_init(&o);
    o.cmd = "demo";
    static const char *const goals[] = { "1e-3" };
    static const char *const size_text[] = { "10^30", "10^100" };
    fmpz sizes[2];
    fmpz_init(sizes + 0);
    fmpz_init(sizes + 1);
    fmpz_ui_pow_ui(sizes + 0, 10, 30);
    fmpz_ui_pow_ui(sizes + 1, 10, 100);
    o.ngoals = 1;
    o.goal_text = goals;
    o.nsizes = 2;
    o.sizes = sizes;
    o.size_text = size_text;
    o.target_text = "ebits:2";
    o.points = 10;                 /* the scenario's sweeps (docs/report.md), not the defaults */
    o.prec = EMBZ_PREC_MANY;
    fmpz_set_ui(o.from, 100);
    fmpz_ui_pow_ui(o.to, 10, 60);

    embz_family_struct fam[NDEMO];
    cli_compare_row_t rows[NDEMO];
    int have_rows = 0;
    embz_report_t rep;
    embz_plot_struct figs[3];
    long order[NDEMO];
    int nfigs = 0;
    for (long i = 0; i < NDEMO; i++) embz_family_init(fam + i);
    embz_report_init(rep, "Embezzling two ebits at error 1e-3: which family is cheapest?");

    const char *out = cli_value(&a, "output");
    const char *fmt_opt = cli_value(&a, "format");
    /* a directory or device is named as such before its name is read for a format */
    if (out != NULL && !embz_output_is_stdout(out) && (code = cli_check_output(out, "demo")) != 0)
        goto done;
    int format = fmt_opt ? embz_report_format_from_name(fmt_opt)
               : out && !embz_output_is_stdout(out) ? cli_compare_format(NULL, out)
               : EMBZ_REPORT_HTML;
    if (format < 0) {
        code = cli_usage_error(&demo_spec, fmt_opt ? "unknown format '%s' (html, md, tex or pdf)"
                                                   : "cannot tell the format from '%s'",
                               fmt_opt ? fmt_opt : out);
        goto done;
    }
    static const char *const default_out[4] = { "embz-demo.html", "embz-demo.md",
                                                "embz-demo.tex", "embz-demo.pdf" };
    if (out == NULL) out = default_out[format];
    if ((code = cli_check_output(out, "demo")) != 0) goto done;
    if ((code = cli_load_threads(&o.threads, &a, &demo_spec)) != 0) goto done;
    if (cli_flag(&a, "json") && cli_flag(&a, "csv")) {
        code = cli_usage_error(&demo_spec, "--json and --csv exclude each other");
        goto done;
    }
    if ((code = cli_compare_load(fam, NDEMO, demo_families, &a, &demo_spec)) != 0) goto done;

    o.progress = !cli_flag(&a, "quiet") && isatty(fileno(stderr));
    have_rows = 1;
    code = cli_compare_run(rows, fam, NDEMO, &o);
    if (code == CLI_EXIT_USAGE) goto done;

    embz_report_set(&rep->intro,
        "The scenario. A lab team plans an experiment that has to embezzle two ebits (the "
        "target ebits:2, a 4-level maximally entangled state) from a shared resource state "
        "with conversion error E at most 1e-3. The resource is the n-level state of one of "
        "the shipped families, and it costs ceil(log2 n) qubits per side. Which family needs "
        "the fewest qubits, which never gets there, and why?\n\n"
        "The cast: inverse, logpower, tilted, iterlog, nearmiss, geometric, power and uniform "
        "(each fails or succeeds in its own way); invamp is left out because it is the inverse "
        "family written through its amplitudes, the same state.");
    cli_compare_order(order, rows, NDEMO, &o);
    nfigs = cli_compare_fill(rep, figs, rows, order, NDEMO, &o);
    embz_err_clear(&err);
    int st = embz_report_write(rep, out, format, &err);
    if (st != EMBZ_OK) {
        code = cli_report("demo", st, &err);
        goto done;
    }

    /* the table as data, best first, where the terminal table would go */
    if (cli_flag(&a, "json") || cli_flag(&a, "csv")) {
        embz_buf_t b;
        embz_buf_init(&b);
        cli_compare_data(&b, rows, order, NDEMO, &o, cli_flag(&a, "json"));
        fputs(b.s, embz_output_is_stdout(out) ? stderr : stdout);
        embz_buf_clear(&b);
    } else {
        embz_buf_t b;
        embz_buf_init(&b);
        embz_buf_printf(&b, "Embezzling two ebits (target ebits:2) at error 1e-3: the shipped "
                        "families compared\n\n");
        cli_compare_text(&b, rows, order, NDEMO, &o);
        embz_buf_printf(&b, "\n");
        const cli_compare_row_t *best = rows[order[0]].d.status == EMBZ_OK
            && rows[order[0]].d.need_status[0] == EMBZ_OK
            && rows[order[0]].d.need[0].status == EMBZ_SIZE_FOUND ? rows + order[0] : NULL;
        if (best != NULL)
            embz_buf_printf(&b, "Fewest qubits: %s, %s per side (a size n %s reaches the goal, "
                            "certified).\n", best->label, best->need_q_text[0],
                            best->need_n_text[0]);
        else
            embz_buf_printf(&b, "No family reaches the goal within the search.\n");
        embz_buf_printf(&b,
            "Verdicts and limits: one-ebit classification; fitted values are estimates.\n"
            "Errors: certified digits only. Qubits: size search at qubit resolution.\n"
            "'extra': the family's qubits per side minus the optimum's (exact, docs/optimal.md).\n"
            "'never': the one-ebit error tends to a limit above 1e-3 (derived formula);\n"
            "'not by 10^924': the search, which ends at n = 2^3072, found no size.\n");
        /* with the report on standard output, the table goes to standard error */
        int to_stdout = embz_output_is_stdout(out);
        embz_buf_printf(&b, "\nReport: %s\n", to_stdout ? "standard output" : out);
        for (slong k = 0; k < rep->nfig; k++) {   /* the figure files beside it (md, tex) */
            char *fp = rep->fig[k].plot ? embz_report_figure_path(out, k, format) : NULL;
            if (fp) embz_buf_printf(&b, "Figure %ld: %s\n", (long) k + 1, fp);
            free(fp);
        }
        fputs(b.s, to_stdout ? stderr : stdout);
        embz_buf_clear(&b);
    }

done:
    embz_report_clear(rep);
    for (int k = 0; k < nfigs; k++) embz_plot_clear(figs + k);
    if (have_rows) cli_compare_rows_clear(rows, NDEMO, &o);
    for (long i = 0; i < NDEMO; i++) embz_family_clear(fam + i);
    fmpz_clear(sizes + 0);
    fmpz_clear(sizes + 1);
    cli_compare_opts_clear(&o);
    cli_args_clear(&a);
    embz_render_release_caches();
    return code;
}

/* the option table, for the shell completion (completion.c) */
const cli_spec_t *const cli_spec_demo = &demo_spec;
