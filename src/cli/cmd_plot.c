/* embz plot FAMILY... -o FILE: error versus size on log axes (and the weights against the
 * x^(-1 -+ eps) envelopes with --weights), written as SVG, PDF or PNG. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include "cli.h"

static const cli_opt_t plot_opts[] = {
    { "output", 'o', CLI_VALUE, "FILE", "the figure: .svg, .pdf or .png, or - for stdout (required)" },
    { "format", 'f', CLI_VALUE, "F", "svg, pdf or png (default: from the extension of FILE; svg for -)" },
    CLI_OPT_FROM,
    CLI_OPT_TO,
    CLI_OPT_POINTS,
    { "target", 't', CLI_VALUE, "T", "target state: ebit (default), ebits:J, uniform:D, ..." },
    { "weights", 0, CLI_FLAG, NULL, "add a panel: weights against x^(-1-eps) and x^(-1+eps)" },
    { "optimum", 0, CLI_FLAG, NULL, "also the optimum OPT_n over all states (uniform targets)" },
    { "envelope", 0, CLI_VALUE, "EPS", "exponent offset of the weight envelopes (default 0.1)" },
    { "eps", 0, CLI_VALUE, "EPS", "old name of --envelope (elsewhere --eps is an error goal)" },
    { "set", 's', CLI_LIST, "NAME=VALUE", "set a parameter of the families that have it" },
    CLI_OPT_PREC_MANY,
    { "title", 0, CLI_VALUE, "TEXT", "title of the figure" },
    { "measure", 0, CLI_VALUE, "M", "k (default), or fidelity, purified, overlap: plot that measure" },
    { "data", 0, CLI_VALUE, "FILE", "also write the plotted points as CSV (- for standard output)" },
    CLI_OPT_END
};

static const cli_spec_t plot_spec = {
    "plot", "FAMILY... -o FILE",
    "Plot the certified embezzlement error E_n(q) against n on log axes for each family.",
    "The sizes are log-spaced from A to B (any size embz accepts, e.g. 10^1000); each point\n"
    "is the midpoint of a certified enclosure, with a bar where the enclosure is wide\n"
    "enough to see. Sizes above 4096 use the analytic engine (one per family, reused for\n"
    "all sizes). --weights adds the normalised weights w(x)/w(1) (with n = B when the\n"
    "weight depends on n) against the envelopes x^(-1-eps) and x^(-1+eps).\n"
    "--optimum adds the smallest error any state of Schmidt rank n reaches, OPT_n, at the\n"
    "same sizes: the exact closed form of docs/optimal.md, a dashed grey line labelled\n"
    "'optimum' (uniform targets only: ebit, ebits:J, uniform:D).\n"
    "--measure fidelity|purified|overlap plots that measure instead, each size as 'embz\n"
    "error --measure' certifies it: values as points (with bars where visible), sizes with\n"
    "certified bounds only as vertical intervals without a point (their own legend entry,\n"
    "'bounds only'). P is drawn on a log axis, F_max and O^2 on a linear one; the axis label\n"
    "names the measure. Not with --optimum (the optimum is known for K only).\n"
    "--data FILE writes what is drawn as CSV (panel, series, x, y, y_lo, y_hi): the doubles\n"
    "of the points and bars, for plotting elsewhere; certified digits come from 'embz sweep\n"
    "--csv'. With -o -, --data must name a file.\n"
    "Output: -o - (or /dev/stdout) streams the figure to standard output (svg unless\n"
    "--format says otherwise). Any other FILE is written as 'embz report --help' describes\n"
    "(atomically, links followed, mode kept): an interrupted run leaves no partial or\n"
    "temporary file.\n",
    plot_opts, 1, 16
};


/* log10 of the ball's lower end, midpoint and upper end (doubles, for drawing). */
static void arb_log10_d(double *lo, double *mid, double *hi, const arb_t x)
{
    arb_t t, ln10;
    arf_t b;
    arb_init(t);
    arb_init(ln10);
    arf_init(b);
    arb_const_log10(ln10, 64);
    arb_get_lbound_arf(b, x, 64);
    double *out[3] = { lo, mid, hi };
    for (int k = 0; k < 3; k++) {
        if (k == 1)
            arf_set(b, arb_midref(x));
        if (k == 2)
            arb_get_ubound_arf(b, x, 64);
        if (arf_sgn(b) <= 0) {
            *out[k] = k == 0 ? -INFINITY : NAN;
            continue;
        }
        arb_set_arf(t, b);
        arb_log(t, t, 64);
        arb_div(t, t, ln10, 64);
        *out[k] = arf_get_d(arb_midref(t), ARF_RND_NEAR);
    }
    arf_clear(b);
    arb_clear(ln10);
    arb_clear(t);
}

static double fmpz_log10_d(const fmpz_t n)
{
    arb_t x;
    arb_init(x);
    arb_set_fmpz(x, n);
    double lo, mid, hi;
    arb_log10_d(&lo, &mid, &hi, x);
    arb_clear(x);
    return mid;
}

/* Up to k integers log-spaced from a to b (ends exact, duplicates dropped). */
static slong log_sizes(fmpz *out, const fmpz_t a, const fmpz_t b, slong k)
{
    double la = fmpz_log10_d(a), lb = fmpz_log10_d(b);
    slong len = 0;
    arb_t x, ln10;
    arb_init(x);
    arb_init(ln10);
    for (slong j = 0; j < k; j++) {
        fmpz_t n;
        fmpz_init(n);
        if (j == 0)
            fmpz_set(n, a);
        else if (j == k - 1)
            fmpz_set(n, b);
        else {
            double t = la + (lb - la) * (double) j / (double) (k - 1);
            slong prec = (slong) (3.33 * t) + 64;
            arb_const_log10(ln10, prec);
            arb_set_d(x, t);
            arb_mul(x, x, ln10, prec);
            arb_exp(x, x, prec);
            arf_get_fmpz(n, arb_midref(x), ARF_RND_NEAR);
            if (fmpz_cmp(n, a) < 0)
                fmpz_set(n, a);
            if (fmpz_cmp(n, b) > 0)
                fmpz_set(n, b);
        }
        if (len == 0 || fmpz_cmp(n, out + len - 1) > 0)
            fmpz_set(out + len++, n);
        fmpz_clear(n);
    }
    arb_clear(ln10);
    arb_clear(x);
    return len;
}

/* The axis coordinate of a value of the measure: log10 on the purified distance's log axis,
 * the value itself on the linear axis of a fidelity. */
static void measure_coords(double *lo, double *mid, double *hi, const arb_t lo_b,
                           const arb_t mid_b, const arb_t hi_b, int ylog)
{
    if (ylog) {
        double a, b, c;
        arb_log10_d(&a, &b, &c, lo_b);
        *lo = a;
        arb_log10_d(&a, &b, &c, mid_b);
        *mid = b;
        arb_log10_d(&a, &b, &c, hi_b);
        *hi = c;
        return;
    }
    arf_t t;
    arf_init(t);
    arb_get_lbound_arf(t, lo_b, 64);
    *lo = arf_get_d(t, ARF_RND_DOWN);
    *mid = arf_get_d(arb_midref(mid_b), ARF_RND_NEAR);
    arb_get_ubound_arf(t, hi_b, 64);
    *hi = arf_get_d(t, ARF_RND_UP);
    arf_clear(t);
}

/* --measure: one family's series of the measure at the sizes (values), and a series of
 * vertical intervals for the sizes with certified bounds only. Returns EMBZ_ERR_DOMAIN when
 * the weight is invalid (the caller stops), else EMBZ_OK; other failures leave a size out. */
static int plot_measure(embz_plot_t fig, slong pe, const embz_family_struct *fam,
                        const char *label, const fmpz *sizes, slong ns, const embz_target_t q,
                        int measure, int ylog, slong prec, long *skipped)
{
    slong s = embz_plot_add_series(fig, pe, label, EMBZ_PLOT_POINTS | EMBZ_PLOT_LINE, -1000);
    slong sb = -1;
    embz_fidelity_result_t r;
    embz_fidelity_result_init(r);
    int status = EMBZ_OK;
    for (slong j = 0; j < ns; j++) {
        embz_err_t e;
        embz_err_clear(&e);
        int st = embz_fidelity(r, fam, sizes + j, q, measure, EMBZ_METHOD_AUTO, prec, &e);
        double x = fmpz_log10_d(sizes + j), lo, mid, hi;
        if (st != EMBZ_OK) {
            char buf[3000], *ns_text = embz_fmpz_string(sizes + j, 30);
            embz_err_format(buf, sizeof(buf), &e);
            fprintf(stderr, "embz plot: %s: n = %s left out: %s\n", label, ns_text, buf);
            free(ns_text);
            (*skipped)++;
            embz_plot_push(fig, pe, s, NAN, NAN, NAN, NAN);     /* break the line there */
            if (st == EMBZ_ERR_DOMAIN) {
                status = st;
                break;
            }
            continue;
        }
        if (!r->bounds_only) {
            measure_coords(&lo, &mid, &hi, r->value, r->value, r->value, ylog);
            embz_plot_push(fig, pe, s, x, mid, lo, hi);
            continue;
        }
        if (sb < 0) {
            char bl[200];
            snprintf(bl, sizeof(bl), "%s (bounds only)", label);
            sb = embz_plot_add_series(fig, pe, bl, EMBZ_PLOT_INTERVALS,
                                      fig->panels[pe].series[s].colour);
        }
        if (r->have_tight)
            measure_coords(&lo, &mid, &hi, r->tight_lo, r->value, r->tight_hi, ylog);
        else
            measure_coords(&lo, &mid, &hi, r->lower, r->value, r->upper, ylog);
        embz_plot_push(fig, pe, sb, x, NAN, lo, hi);
        embz_plot_push(fig, pe, s, NAN, NAN, NAN, NAN);         /* no value: break the line */
    }
    embz_fidelity_result_clear(r);
    return status;
}

int cli_cmd_plot(int argc, char **argv)
{
    cli_args_t a;
    int code, status;
    if (!cli_begin(&a, &plot_spec, argc, argv, &code)) return code;
    embz_err_t err;
    embz_err_clear(&err);
    const char *out = cli_value(&a, "output");
    const char *data = cli_value(&a, "data");
    const char *format = cli_value(&a, "format");
    /* the envelope offset is --envelope, as in report; --eps (its old name) still works */
    const char *eps_text = cli_value(&a, "envelope");
    if (eps_text == NULL && cli_value(&a, "eps") != NULL) {
        eps_text = cli_value(&a, "eps");
        fprintf(stderr, "embz plot: note: --eps is now --envelope (the exponent offset of the "
                        "weight envelopes); --eps means an error goal in size and report\n");
    }
    if (eps_text == NULL) eps_text = "0.1";
    long points = EMBZ_RANGE_POINTS, prec = EMBZ_PREC_MANY;
    double eps = 0.1;
    long nfam = a.npos;
    embz_family_struct *fam = calloc(nfam, sizeof(embz_family_struct));
    fmpz *sizes = _fmpz_vec_init(1024);
    fmpz_t A, B;
    embz_target_t q;
    embz_plot_t fig;
    fmpz_init(A);
    fmpz_init(B);
    embz_default_range(A, B);
    embz_target_init(q);
    for (long i = 0; i < nfam; i++)
        embz_family_init(fam + i);
    embz_plot_init(fig, cli_value(&a, "title"));

    if (data != NULL && out != NULL && embz_output_is_stdout(out) && embz_output_is_stdout(data)) {
        code = cli_usage_error(&plot_spec, "the figure goes to standard output: --data must "
                               "name a file");
        goto done;
    }
    if (data != NULL && !embz_output_is_stdout(data)
        && (code = cli_check_output(data, "plot")) != 0)
        goto done;
    if (out == NULL) {
        code = cli_usage_error(&plot_spec, "the output file is required: -o FILE");
        goto done;
    }
    if (format != NULL) {
        if (strcasecmp(format, "svg") && strcasecmp(format, "pdf") && strcasecmp(format, "png")) {
            code = cli_usage_error(&plot_spec, "unknown format '%s' (svg, pdf or png)", format);
            goto done;
        }
    } else if (embz_output_is_stdout(out)) {
        format = "svg";
    } else if ((code = cli_check_output(out, "plot")) != 0) {
        goto done;        /* a directory or device is named as such, not as a bad extension */
    } else {
        char *ext = strrchr(out, '.');
        if (ext == NULL || (strcasecmp(ext, ".svg") && strcasecmp(ext, ".pdf")
                            && strcasecmp(ext, ".png"))) {
            code = cli_usage_error(&plot_spec, "the output file must end in .svg, .pdf or .png "
                                   "(or give --format)");
            goto done;
        }
    }
    if ((code = cli_load_range(A, B, &points, 2, 1000, &a, &plot_spec)) != 0
        || (code = cli_load_prec_upto(&prec, &a, &plot_spec, 1L << 16)) != 0
        || (code = cli_check_output(out, "plot")) != 0)
        goto done;
    {
        char *end;
        eps = strtod(eps_text, &end);
        if (*end || !(eps > 0 && eps < 1)) {
            code = cli_usage_error(&plot_spec, "bad --envelope '%s' (a number between 0 and 1)",
                                   eps_text);
            goto done;
        }
    }
    if (fmpz_equal(A, B)) {
        code = cli_usage_error(&plot_spec, "need 1 <= --from < --to");
        goto done;
    }
    /* families: each takes the settings naming one of its parameters */
    if ((code = cli_load_target(q, &a, "plot")) != 0
        || (code = cli_compare_load(fam, nfam, a.pos, &a, &plot_spec)) != 0)
        goto done;

    int optimum = cli_flag(&a, "optimum");
    int measure = EMBZ_MEASURE_K;
    if (cli_value(&a, "measure") != NULL) {
        embz_err_t me;
        embz_err_clear(&me);
        if (embz_measure_parse(&measure, cli_value(&a, "measure"), &me) != EMBZ_OK) {
            code = cli_usage_error(&plot_spec, "%s", me.text);
            goto done;
        }
        if (measure != EMBZ_MEASURE_K && optimum) {
            code = cli_usage_error(&plot_spec, "--optimum is known for the distance K only, "
                                   "not with --measure %s", embz_measure_name(measure));
            goto done;
        }
    }
    if (optimum && q->kind != EMBZ_TARGET_UNIFORM) {
        code = cli_usage_error(&plot_spec, "--optimum needs a uniform target (ebit, ebits:J, "
                               "uniform:D): the optimum is not known for the target %s",
                               q->label);
        goto done;
    }

    slong ns = log_sizes(sizes, A, B, points);
    char title[160];
    long skipped = 0;
    slong pe;
    if (measure != EMBZ_MEASURE_K) {
        static const char *const names[] = { "", "Optimal LOCC fidelity F_max",
                                             "Purified distance P", "Local-unitary fidelity O\xc2\xb2" };
        static const char *const ylabels[] = {
            "", "F_max (certified)", "P = \xe2\x88\x9a(1 - F_max) (certified)",
            "O\xc2\xb2, local unitaries only (certified)" };
        int ylog = measure == EMBZ_MEASURE_PURIFIED;
        snprintf(title, sizeof(title), "%s, target %s", names[measure], q->label);
        pe = embz_plot_add_panel(fig, title, "size n", ylabels[measure], 1, ylog);
        for (long i = 0; i < nfam; i++) {
            char *label = cli_family_label(fam + i);
            status = plot_measure(fig, pe, fam + i, label, sizes, ns, q, measure, ylog, prec,
                                  &skipped);
            free(label);
            if (status == EMBZ_ERR_DOMAIN) {
                code = cli_exit_code(status);
                goto done;
            }
        }
    } else {
        snprintf(title, sizeof(title), "Embezzlement error, target %s", q->label);
        pe = embz_plot_add_panel(fig, title, "size n",
                                       "E\xe2\x82\x99(q) (certified; bars where visible)", 1, 1);
        for (long i = 0; i < nfam; i++) {
            char *label = cli_family_label(fam + i);
            slong s = embz_plot_add_series(fig, pe, label, EMBZ_PLOT_POINTS | EMBZ_PLOT_LINE, -1000);
            arb_ptr E = _arb_vec_init(ns);
            int *st = calloc((size_t) ns, sizeof(int));
            embz_err_t *errs = calloc((size_t) ns, sizeof(embz_err_t));
            status = embz_errors_at(E, st, errs, fam + i, sizes, ns, q, prec);
            for (slong j = 0; j < ns && st[j] != -1; j++) {
                if (st[j] == EMBZ_OK) {
                    double lo, mid, hi;
                    arb_log10_d(&lo, &mid, &hi, E + j);
                    embz_plot_push(fig, pe, s, fmpz_log10_d(sizes + j), mid, lo, hi);
                } else {
                    char buf[3000], *ns_text = embz_fmpz_string(sizes + j, 30);
                    embz_err_format(buf, sizeof(buf), errs + j);
                    fprintf(stderr, "embz plot: %s: n = %s left out: %s\n", label, ns_text, buf);
                    free(ns_text);
                    skipped++;
                }
            }
            _arb_vec_clear(E, ns);
            free(st);
            free(errs);
            free(label);
            if (status == EMBZ_ERR_DOMAIN) {
                code = cli_exit_code(status);
                goto done;
            }
        }
    }

    if (optimum) {
        /* OPT_n = 1/psi_d(n), exact at each plotted size (docs/optimal.md) */
        double *xs = malloc((size_t) (ns > 0 ? ns : 1) * sizeof(double));
        for (slong j = 0; j < ns; j++) xs[j] = fmpz_log10_d(sizes + j);
        status = cli_plot_optimum(fig, pe, sizes, xs, ns, q, 1, &err);
        free(xs);
        if (status != EMBZ_OK) {
            code = cli_report("plot", status, &err);
            goto done;
        }
    }

    if (cli_flag(&a, "weights")) {
        char wt[160];
        snprintf(wt, sizeof(wt), "Weights against x^(-1\xc2\xb1%s)", eps_text);
        slong pw = embz_plot_add_panel(fig, wt, "index x", "w(x) / w(1)", 1, 1);
        slong nw = points * 2 < 24 ? 24 : points * 2;
        fmpz *xs = _fmpz_vec_init(nw);
        fmpz_t one;
        fmpz_init_set_ui(one, 1);
        slong nx = log_sizes(xs, one, B, nw);
        double LB = fmpz_log10_d(B), ymin = INFINITY, ymax = -INFINITY;
        arb_t w, w1;
        arb_init(w);
        arb_init(w1);
        for (long i = 0; i < nfam; i++) {
            char *label = cli_family_label(fam + i);
            slong s = embz_plot_add_series(fig, pw, label, EMBZ_PLOT_POINTS | EMBZ_PLOT_LINE,
                                           i);
            embz_err_clear(&err);
            status = embz_family_weight_arb(w1, fam + i, one, B, prec, &err);
            if (status == EMBZ_OK && arb_is_positive(w1)) {
                for (slong j = 0; j < nx; j++) {
                    embz_err_clear(&err);
                    if (embz_family_weight_arb(w, fam + i, xs + j, B, prec, &err) != EMBZ_OK)
                        continue;
                    arb_div(w, w, w1, prec);
                    double lo, mid, hi;
                    arb_log10_d(&lo, &mid, &hi, w);
                    if (!isfinite(mid)) {
                        embz_plot_push(fig, pw, s, NAN, NAN, NAN, NAN);
                        continue;
                    }
                    embz_plot_push(fig, pw, s, fmpz_log10_d(xs + j), mid, NAN, NAN);
                    ymin = mid < ymin ? mid : ymin;
                    ymax = mid > ymax ? mid : ymax;
                }
            } else if (status != EMBZ_OK) {
                fprintf(stderr, "embz plot: %s: %s; weights panel left empty for it\n", label,
                        err.text);
            } else {
                fprintf(stderr, "embz plot: %s: w(1) is not positive; weights panel left "
                        "empty for it\n", label);
            }
            free(label);
        }
        cli_plot_envelopes(fig, pw, eps, eps_text, LB, ymin, ymax);
        arb_clear(w);
        arb_clear(w1);
        fmpz_clear(one);
        _fmpz_vec_clear(xs, nw);
        fig->columns = 1;
    }

    embz_err_clear(&err);
    status = embz_plot_write_format(fig, out, format, &err);
    if (status != EMBZ_OK) {
        code = cli_report("plot", status, &err);
        goto done;
    }
    if (data != NULL) {
        char *csv = embz_plot_data_csv(fig);
        embz_err_clear(&err);
        status = embz_write_atomic(data, csv, strlen(csv), &err);
        free(csv);
        if (status != EMBZ_OK) {
            code = cli_report("plot", status, &err);
            goto done;
        }
    }
    fprintf(stderr, "embz plot: wrote %s (%ld %s, %ld sizes each%s)\n",
            embz_output_is_stdout(out) ? "standard output" : out, nfam,
            nfam == 1 ? "family" : "families", (long) ns, skipped ? ", some left out" : "");

done:
    embz_plot_clear(fig);
    for (long i = 0; i < nfam; i++)
        embz_family_clear(fam + i);
    free(fam);
    _fmpz_vec_clear(sizes, 1024);
    embz_target_clear(q);
    fmpz_clear(A);
    fmpz_clear(B);
    cli_args_clear(&a);
    embz_render_release_caches();
    return code;
}

/* the option table, for the shell completion (completion.c) */
const cli_spec_t *const cli_spec_plot = &plot_spec;
