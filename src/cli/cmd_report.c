/* embz report FAMILY...: one document comparing families (HTML, Markdown, LaTeX or PDF). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "cli.h"

static const cli_opt_t report_opts[] = {
    { "output", 'o', CLI_VALUE, "FILE", "the document (default embz-report.html; - for stdout)" },
    { "format", 'f', CLI_VALUE, "F", "html, md, tex or pdf (default: from the extension of FILE)" },
    { "eps", 'e', CLI_VALUE, "E[,E2,...]", "error goals for the size columns (default 0.01,1e-3)" },
    { "target", 't', CLI_VALUE, "T", "target state: ebit (default), ebits:J, uniform:D, ..." },
    { "size", 'n', CLI_VALUE, "N[,N2,...]", "sizes of the error columns (default 10^6,10^30,10^100)" },
    { "sizes", 0, CLI_VALUE, "N[,N2,...]", NULL },   /* the old name of --size, with a note */
    CLI_OPT_FROM,
    CLI_OPT_TO,
    CLI_OPT_POINTS,
    { "set", 's', CLI_LIST, "NAME=VALUE", "set a parameter of the families that have it" },
    CLI_OPT_PREC_MANY,
    { "envelope", 0, CLI_VALUE, "EPS", "exponent offset of the weight envelopes (default 0.1)" },
    { "grid", 'g', CLI_LIST, "NAME=LO..HI,count=COUNT", "add a verdict map over a parameter grid (at most two)" },
    CLI_OPT_THREADS("families"),
    { "title", 0, CLI_VALUE, "TEXT", "title of the document" },
    { "quiet", 'q', CLI_FLAG, NULL, "no progress lines on stderr" },
    { NULL, 0, 0, NULL, NULL }
};

static const cli_spec_t report_spec = {
    "report", "FAMILY... [-o FILE]",
    "One document comparing families, the answer first: a sentence and a key table (verdict,\n"
    "qubits per side and extra qubits per goal, E at the largest size, the reason in one\n"
    "line; best first, each name linked to the family's notes), then the figures (error\n"
    "against n, embezzlers and the others apart; against ln n; each family's weights against\n"
    "the envelopes x^(-1-eps) and x^(-1+eps); verdict maps for --grid), a block of notes per\n"
    "family and all numbers (classification; errors and sizes).",
    "Formats: html (one self-contained file, figures as inline SVG, math as MathML), md\n"
    "(Markdown), tex (a complete LaTeX document) and pdf (A4). Markdown and LaTeX written to\n"
    "a file get their figures beside it, FILE without its extension plus -fig1.svg, -fig2.svg,\n"
    "... (-fig1.pdf, ... for LaTeX), and link them. Every error value is certified; laws,\n"
    "exponents and fitted limits are estimates and say so. The size columns use the\n"
    "qubit-resolution search (see 'embz size --qubits'). For uniform targets each goal also\n"
    "gets 'extra qubits' (the family's qubits per side minus the optimum's, exact), the table\n"
    "ends with the row 'optimal state' (OPT_n at the sizes, the smallest rank for each goal and\n"
    "its qubits: the closed form of docs/optimal.md, as 'embz optimal'), and the error figure\n"
    "draws the optimum's curve; for other targets those cells say n/a.\n"
    "--grid NAME=LO..HI,count=COUNT (once or twice) classifies every family that has the\n"
    "parameter(s) over the grid, as 'embz scan' does.\n"
    "Output: -o - (or /dev/stdout) streams the document to standard output (html unless\n"
    "--format says otherwise) and the file name is not printed. Any other FILE is written\n"
    "atomically: a temporary file beside it is renamed over it when complete, so an\n"
    "interrupted or failed run leaves the old file as it was and no partial or temporary\n"
    "file. A symbolic link is followed and its target replaced (the link stays); an existing\n"
    "file keeps its permissions. Refused with exit 2 before any work: directories, devices,\n"
    "fifos and other non-regular files, and files with more than one hard link.\n",
    report_opts, 1, 64
};

/* Split "a,b,c" into pieces (in *buf); returns the count, or -(position) of the first empty
 * (or blank) entry, which is refused rather than skipped. */
static long split_list(char ***items, char **buf, const char *text)
{
    *buf = malloc(strlen(text) + 1);
    strcpy(*buf, text);
    long n = 1;
    for (const char *p = text; *p; p++) n += *p == ',';
    *items = calloc((size_t) n, sizeof(char *));
    long k = 0;
    for (char *t = *buf;; k++) {
        char *c = strchr(t, ',');
        if (c != NULL) *c = '\0';
        (*items)[k] = t;
        if (t[strspn(t, " \t")] == '\0') return -(k + 1);
        if (c == NULL) return k + 1;
        t = c + 1;
    }
}

static char *value_label(const fmpq_t v)
{
    char buf[64];
    snprintf(buf, sizeof(buf), "%.4g", fmpq_get_d(v));
    char *s = malloc(strlen(buf) + 1);
    strcpy(s, buf);
    return s;
}

static int family_has(const embz_family_struct *f, const char *name)
{
    for (long k = 0; k < f->nparams; k++)
        if (strcmp(f->param_names[k], name) == 0) return 1;
    return 0;
}

/* Verdict maps for --grid: one panel per family that has every grid parameter. */
static int grid_maps(embz_plot_t fig, slong *npanels, embz_family_struct *fam, long nfam,
                     const embz_grid_axis_struct *axes, long naxes,
                     const cli_compare_opts_t *o)
{
    embz_classify_opts_t co;
    embz_classify_opts_init(co);
    fmpz_set(co->from, o->from);
    fmpz_set(co->to, o->to);
    co->points = o->points;
    co->prec = o->prec;
    co->use_analytic = 1;
    int code = CLI_EXIT_OK;
    *npanels = 0;
    for (long i = 0; i < nfam; i++) {
        int ok = 1;
        for (long k = 0; k < naxes; k++) ok &= family_has(fam + i, axes[k].name);
        if (!ok) continue;
        embz_scan_t sc;
        embz_err_t err;
        embz_err_clear(&err);
        embz_scan_init(sc);
        int st = embz_scan_run(sc, fam + i, axes, naxes, 0, 1, o->threads, co, NULL, NULL, &err);
        if (st != EMBZ_OK) {
            code = cli_report("report", st, &err);
            embz_scan_clear(sc);
            break;
        }
        const embz_grid_axis_struct *ax = naxes == 2 ? axes + 1 : axes;
        const embz_grid_axis_struct *ay = naxes == 2 ? axes : NULL;
        slong nx = ax->count, ny = ay ? ay->count : 1;
        char **xt = calloc((size_t) nx, sizeof(char *)), **yt = calloc((size_t) ny, sizeof(char *));
        fmpq_t v;
        fmpq_init(v);
        for (slong j = 0; j < nx; j++) {
            embz_grid_axis_value(v, ax, j);
            xt[j] = value_label(v);
        }
        for (slong j = 0; j < ny; j++) {
            if (ay) {
                embz_grid_axis_value(v, ay, j);
                yt[j] = value_label(v);
            } else {
                yt[j] = malloc(1);
                yt[j][0] = '\0';
            }
        }
        fmpq_clear(v);
        char title[200];
        snprintf(title, sizeof(title), "Verdict of %s over the grid (one ebit)", fam[i].name);
        slong p = embz_plot_add_map(fig, title, ax->name, ay ? ay->name : "",
                                    nx, (const char *const *) xt, ny, (const char *const *) yt);
        slong cat_e = embz_plot_add_category(fig, p, "embezzler", 0);
        slong cat_n = embz_plot_add_category(fig, p, "not embezzler", 1);
        slong cat_i = embz_plot_add_category(fig, p, "inconclusive", EMBZ_PLOT_LIGHT);
        slong cat_f = embz_plot_add_category(fig, p, "failed", EMBZ_PLOT_DARK);
        for (slong r = 0; r < sc->len; r++) {
            const embz_scan_row_struct *row = sc->rows + r;
            slong ix = naxes == 2 ? row->index % nx : row->index;
            slong iy = naxes == 2 ? row->index / nx : 0;
            int cat = row->status != EMBZ_OK ? (int) cat_f
                    : row->c->verdict == EMBZ_VERDICT_EMBEZZLER ? (int) cat_e
                    : row->c->verdict == EMBZ_VERDICT_NOT_EMBEZZLER ? (int) cat_n : (int) cat_i;
            embz_plot_set_cell(fig, p, ix, iy, cat);
        }
        for (slong j = 0; j < nx; j++) free(xt[j]);
        for (slong j = 0; j < ny; j++) free(yt[j]);
        free(xt);
        free(yt);
        embz_scan_clear(sc);
        (*npanels)++;
    }
    embz_classify_opts_clear(co);
    return code;
}

int cli_cmd_report(int argc, char **argv)
{
    cli_args_t a;
    int pr = cli_parse(&a, &report_spec, argc, argv);
    if (pr != CLI_PARSE_OK) {
        cli_args_clear(&a);
        return pr == CLI_PARSE_HELP ? CLI_EXIT_OK : CLI_EXIT_USAGE;
    }
    int code = CLI_EXIT_OK, status;
    embz_err_t err;
    embz_err_clear(&err);
    cli_compare_opts_t o;
    cli_compare_opts_init(&o);
    o.cmd = "report";
    long nfam = a.npos, ngrid = 0;
    const char *const *grids = cli_list(&a, "grid", &ngrid);
    embz_grid_axis_struct axes[2];
    long naxes = 0;
    embz_family_struct *fam = calloc((size_t) nfam, sizeof(embz_family_struct));
    cli_compare_row_t *rows = calloc((size_t) nfam, sizeof(cli_compare_row_t));
    int have_rows = 0;
    char **goals = NULL, **sizes_text = NULL, *goals_buf = NULL, *sizes_buf = NULL;
    long ngoals = 0, nsizes = 0;
    fmpz *sizes = NULL;
    embz_report_t rep;
    embz_plot_struct figs[4];
    long *order = malloc((size_t) (nfam > 0 ? nfam : 1) * sizeof(long));
    int nfigs = 0;
    const char *t;
    for (long i = 0; i < nfam; i++) embz_family_init(fam + i);
    embz_report_init(rep, cli_value(&a, "title") ? cli_value(&a, "title")
                                                  : "Embezzling families compared");

    /* output and format */
    const char *fmt_opt = cli_value(&a, "format");
    const char *out = cli_value(&a, "output");
    int format = -1;
    if (fmt_opt != NULL && (format = embz_report_format_from_name(fmt_opt)) < 0) {
        code = cli_usage_error(&report_spec, "unknown format '%s' (html, md, tex or pdf)", fmt_opt);
        goto done;
    }
    /* a directory or device is named as such before its name is read for a format */
    if (out != NULL && !embz_output_is_stdout(out)
        && (code = cli_check_output(out, "report")) != 0)
        goto done;
    if (fmt_opt == NULL) {
        format = out && !embz_output_is_stdout(out) ? cli_compare_format(NULL, out)
                                                     : EMBZ_REPORT_HTML;
        if (format < 0) {
            code = cli_usage_error(&report_spec, "cannot tell the format from '%s': give "
                                   "--format html|md|tex|pdf or end the name in one of those",
                                   out);
            goto done;
        }
    }
    static const char *const default_out[4] = { "embz-report.html", "embz-report.md",
                                                "embz-report.tex", "embz-report.pdf" };
    if (out == NULL) out = default_out[format];
    if ((code = cli_check_output(out, "report")) != 0) goto done;

    /* numbers */
    if ((code = cli_load_prec(&o.prec, &a, &report_spec)) != 0) goto done;
    if ((code = cli_load_threads(&o.threads, &a, &report_spec)) != 0) goto done;
    if ((t = cli_value(&a, "envelope")) != NULL) {
        char *end;
        o.envelope = strtod(t, &end);
        if (*end || !(o.envelope > 0 && o.envelope < 1)) {
            code = cli_usage_error(&report_spec, "bad --envelope '%s' (between 0 and 1)", t);
            goto done;
        }
    }
    long points = o.points;
    if ((code = cli_load_range(o.from, o.to, &points, 5, 1000, &a, &report_spec)) != 0)
        goto done;
    o.points = points;
    if (fmpz_cmp(o.from, o.to) >= 0) {
        code = cli_usage_error(&report_spec, "need --from < --to");
        goto done;
    }
    ngoals = split_list(&goals, &goals_buf, cli_value(&a, "eps") ? cli_value(&a, "eps")
                                                                  : "0.01,1e-3");
    if (ngoals < 0) {
        code = cli_usage_error(&report_spec, "goal %ld of --eps is empty", -ngoals);
        ngoals = 0;
        goto done;
    }
    for (long j = 0; j < ngoals; j++) {
        fmpq_t e;
        fmpq_init(e);
        int ok = embz_number_parse(e, goals[j]) == EMBZ_OK && fmpq_sgn(e) > 0
                 && fmpq_cmp_ui(e, 1) < 0;
        fmpq_clear(e);
        if (!ok) {
            code = cli_usage_error(&report_spec, "bad error goal '%s' (a number between 0 and 1)",
                                   goals[j]);
            goto done;
        }
    }
    const char *size_opt = cli_value(&a, "size"), *size_name = "--size";
    if (cli_value(&a, "sizes") != NULL) {
        fprintf(stderr, "embz report: note: --sizes is now --size (-n), as in embz error\n");
        if (size_opt == NULL) size_opt = cli_value(&a, "sizes"), size_name = "--sizes";
    }
    nsizes = split_list(&sizes_text, &sizes_buf, size_opt ? size_opt : "10^6,10^30,10^100");
    if (nsizes < 0) {
        code = cli_usage_error(&report_spec, "size %ld of %s is empty", -nsizes, size_name);
        nsizes = 0;
        goto done;
    }
    sizes = _fmpz_vec_init(nsizes > 0 ? nsizes : 1);
    for (long j = 0; j < nsizes; j++) {
        if ((code = cli_load_size(sizes + j, sizes_text[j], size_name, &report_spec))
            != CLI_EXIT_OK)
            goto done;
    }
    o.ngoals = ngoals;
    o.goal_text = (const char *const *) goals;
    o.nsizes = nsizes;
    o.sizes = sizes;
    o.size_text = (const char *const *) sizes_text;
    if ((t = cli_value(&a, "target")) != NULL) {
        embz_target_t q;
        embz_target_init(q);
        code = cli_load_target(q, &a, "report");
        embz_target_clear(q);
        if (code != 0) goto done;
        o.target_text = t;
    }
    if (ngrid > 2) {
        code = cli_usage_error(&report_spec, "at most two --grid axes");
        goto done;
    }
    for (long k = 0; k < ngrid; k++) {
        embz_err_clear(&err);
        if ((status = embz_grid_axis_parse(axes + k, grids[k], &err)) != EMBZ_OK) {
            code = cli_report("report", status, &err);
            goto done;
        }
        cli_note_old_grid("report", grids[k], axes + k);
        naxes++;
    }

    if ((code = cli_compare_load(fam, nfam, a.pos, &a, &report_spec)) != 0) goto done;
    if (naxes > 0) {
        int any = 0;
        for (long i = 0; i < nfam; i++) {
            int ok = 1;
            for (long k = 0; k < naxes; k++) ok &= family_has(fam + i, axes[k].name);
            any |= ok;
        }
        if (!any) {
            code = cli_usage_error(&report_spec, "no family has the grid parameter%s",
                                   naxes > 1 ? "s" : "");
            goto done;
        }
    }

    o.progress = !cli_flag(&a, "quiet") && isatty(fileno(stderr));
    have_rows = 1;
    code = cli_compare_run(rows, fam, nfam, &o);
    if (code == CLI_EXIT_USAGE) goto done;
    cli_compare_order(order, rows, nfam, &o);
    nfigs = cli_compare_fill(rep, figs, rows, order, nfam, &o);
    if (naxes > 0) {
        slong np = 0;
        embz_plot_struct *gf = figs + nfigs;
        embz_plot_init(gf, NULL);
        gf->zoom = 1.25;   /* as the other figures: readable labels at the page width */
        nfigs++;
        int c2 = grid_maps(gf, &np, fam, nfam, axes, naxes, &o);
        if (c2 != 0) {
            code = c2;
            goto done;
        }
        embz_report_add_figure(rep, "Verdict (one ebit) at every point of the parameter grid, "
                               "from the same classification as the table.", gf);
    }
    embz_err_clear(&err);
    status = embz_report_write(rep, out, format, &err);
    if (status != EMBZ_OK) {
        code = cli_report("report", status, &err);
        goto done;
    }
    if (!embz_output_is_stdout(out)) {   /* else stdout holds the document */
        printf("%s\n", out);
        for (slong k = 0; k < rep->nfig; k++) {   /* the figure files beside it (md, tex) */
            char *fp = rep->fig[k].plot ? embz_report_figure_path(out, k, format) : NULL;
            if (fp) printf("%s\n", fp);
            free(fp);
        }
    }

done:
    embz_report_clear(rep);
    for (int k = 0; k < nfigs; k++) embz_plot_clear(figs + k);
    if (have_rows) cli_compare_rows_clear(rows, nfam, &o);
    free(rows);
    free(order);
    for (long i = 0; i < nfam; i++) embz_family_clear(fam + i);
    free(fam);
    for (long k = 0; k < naxes; k++) embz_grid_axis_clear(axes + k);
    if (sizes) _fmpz_vec_clear(sizes, nsizes > 0 ? nsizes : 1);
    free(goals); free(goals_buf); free(sizes_text); free(sizes_buf);
    cli_compare_opts_clear(&o);
    cli_args_clear(&a);
    embz_render_release_caches();
    return code;
}

/* the option table, for the shell completion (completion.c) */
const cli_spec_t *const cli_spec_report = &report_spec;
