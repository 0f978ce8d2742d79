/* embz classify FAMILY: universal embezzler or not, with the reasons. */
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include <time.h>
#include <unistd.h>
#include "cli.h"

static const cli_opt_t classify_opts[] = {
    { "from", 0, CLI_VALUE, "A", "smallest size of the sweep (default 100)" },
    { "to", 0, CLI_VALUE, "B", "largest size of the sweep (default 10^120)" },
    { "points", 'k', CLI_VALUE, "K", "number of log-spaced sizes (default 16)" },
    { "prec", 'p', CLI_VALUE, "BITS", "working precision of the ball arithmetic (default 64)" },
    { "set", 's', CLI_LIST, "NAME=VALUE", "set a parameter (exact decimal, e.g. a=-0.7)" },
    { "amplitude", 0, CLI_FLAG, NULL, "the expression gives amplitudes; weights are squares" },
    { "numeric-only", 0, CLI_FLAG, NULL, "skip the analytic (asymptotic expansion) route" },
    { "json", 0, CLI_FLAG, NULL, "print one JSON object" },
    { NULL, 0, 0, NULL, NULL }
};

static const cli_spec_t classify_spec = {
    "classify", "FAMILY",
    "Is the family a universal embezzler? Verdict 'embezzler', 'not_embezzler' or\n"
    "'inconclusive' (one ebit), with the reasons in words and numbers.",
    "Numeric route (every family): a certified sweep of E_n over log-spaced sizes and fitted\n"
    "decay laws; the fitted limit, law and exponent are estimates, the values E_n are\n"
    "certified. Analytic route (weights without n built from + - * / ^ log exp sqrt): the\n"
    "leading asymptotic term of the weight and the divergence / power-bound criterion. When\n"
    "both give a definite answer and they differ, the verdict is 'inconclusive' and both are\n"
    "shown. See docs/analysis.md.\n",
    classify_opts, 1, 1
};

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

typedef struct { double t0; int shown; } progress_t;

static void progress_cb(void *ctx, slong done, slong total)
{
    progress_t *p = ctx;
    double el = now_s() - p->t0;
    if (el < 1.0 && !p->shown) return;
    p->shown = 1;
    int width = 30, fill = (int) (width * done / (total > 0 ? total : 1));
    char bar[40];
    for (int k = 0; k < width; k++) bar[k] = k < fill ? '#' : '.';
    bar[width] = '\0';
    fprintf(stderr, "\r[%s] %ld/%ld sizes, %.1f s", bar, (long) done, (long) total, el);
    fflush(stderr);
}

static void json_range(embz_buf_t *b, const char *name, double v, double lo, double hi)
{
    embz_buf_printf(b, "\"%s\": {\"value\": ", name);
    cli_buf_json_double(b, v);
    embz_buf_printf(b, ", \"lo\": ");
    cli_buf_json_double(b, lo);
    embz_buf_printf(b, ", \"hi\": ");
    cli_buf_json_double(b, hi);
    embz_buf_printf(b, "}");
}

int cli_cmd_classify(int argc, char **argv)
{
    cli_args_t a;
    int pr = cli_parse(&a, &classify_spec, argc, argv);
    if (pr != CLI_PARSE_OK) {
        cli_args_clear(&a);
        return pr == CLI_PARSE_HELP ? CLI_EXIT_OK : CLI_EXIT_USAGE;
    }
    int code = CLI_EXIT_OK, status;
    embz_err_t err;
    embz_family_t fam;
    embz_classify_t c;
    embz_classify_opts_t o;
    long nset = 0, prec = 64, points = 16;
    const char *const *sets = cli_list(&a, "set", &nset);
    embz_setting_t *settings = calloc((size_t) (nset > 0 ? nset : 1), sizeof(embz_setting_t));
    char **setcopies = calloc((size_t) (nset > 0 ? nset : 1), sizeof(char *));
    const char *t;

    embz_family_init(fam);
    embz_classify_init(c);
    embz_classify_opts_init(o);
    embz_err_clear(&err);

    if ((t = cli_value(&a, "prec")) != NULL && cli_parse_long(&prec, t, 16, 1L << 16)) {
        code = cli_usage_error(&classify_spec, "bad precision '%s' (bits, 16 to 65536)", t);
        goto done;
    }
    if ((t = cli_value(&a, "points")) != NULL && cli_parse_long(&points, t, 5, 100000)) {
        code = cli_usage_error(&classify_spec, "bad number of points '%s' (5 to 100000)", t);
        goto done;
    }
    o->prec = prec;
    o->points = points;
    o->use_analytic = !cli_flag(&a, "numeric-only");
    const char *names[2] = { "from", "to" };
    fmpz *vals[2] = { o->from, o->to };
    for (int k = 0; k < 2; k++) {
        if ((t = cli_value(&a, names[k])) == NULL) continue;
        status = embz_size_parse(vals[k], t, &err);
        if (status != EMBZ_OK || fmpz_cmp_ui(vals[k], 1) < 0) {
            code = cli_usage_error(&classify_spec, "bad size for --%s: '%s'%s%s", names[k], t,
                                   err.text[0] ? ": " : "", err.text);
            goto done;
        }
    }
    if (fmpz_cmp(o->from, o->to) > 0) {
        code = cli_usage_error(&classify_spec, "--from must not exceed --to");
        goto done;
    }
    for (long k = 0; k < nset; k++) {
        size_t l = strlen(sets[k]) + 1;
        setcopies[k] = malloc(l);
        memcpy(setcopies[k], sets[k], l);
        status = embz_setting_split(&settings[k], setcopies[k], &err);
        if (status != EMBZ_OK) {
            code = cli_report("classify", status, &err);
            goto done;
        }
    }
    status = embz_family_resolve(fam, a.pos[0], settings, nset, cli_flag(&a, "amplitude"),
                                 &err);
    if (status != EMBZ_OK) {
        code = cli_report("classify", status, &err);
        goto done;
    }

    progress_t prog = { now_s(), 0 };
    embz_err_clear(&err);
    status = embz_classify(c, fam, o, isatty(fileno(stderr)) ? progress_cb : NULL, &prog, &err);
    if (prog.shown) {
        fprintf(stderr, "\r%*s\r", 70, "");
        fflush(stderr);
    }
    if (status != EMBZ_OK) {
        code = cli_report("classify", status, &err);
        goto done;
    }

    embz_buf_t b;
    embz_buf_init(&b);
    if (cli_flag(&a, "json")) {
        embz_buf_printf(&b, "{\"family\": ");
        embz_buf_json_string(&b, fam->name);
        embz_buf_printf(&b, ", \"weight\": ");
        embz_buf_json_string(&b, fam->weight_text);
        embz_buf_printf(&b, ", \"params\": {");
        for (long k = 0; k < fam->nparams; k++) {
            char *v = fmpq_get_str(NULL, 10, fam->param_values + k);
            embz_buf_printf(&b, "%s", k ? ", " : "");
            embz_buf_json_string(&b, fam->param_names[k]);
            embz_buf_printf(&b, ": ");
            embz_buf_json_string(&b, v);
            flint_free(v);
        }
        embz_buf_printf(&b, "}, \"target\": \"ebit\", \"verdict\": \"%s\", "
                        "\"numeric_verdict\": \"%s\", \"analytic_verdict\": ",
                        embz_verdict_id(c->verdict), embz_verdict_id(c->numeric_verdict));
        if (c->analytic_available)
            embz_buf_printf(&b, "\"%s\"", embz_verdict_id(c->analytic_verdict));
        else
            embz_buf_printf(&b, "null");
        embz_buf_printf(&b, ", \"routes_disagree\": %s, \"limit\": {\"value\": ",
                        c->disagree ? "true" : "false");
        cli_buf_json_double(&b, c->limit_value);
        embz_buf_printf(&b, ", \"lo\": ");
        cli_buf_json_double(&b, c->limit_lo);
        embz_buf_printf(&b, ", \"hi\": ");
        cli_buf_json_double(&b, c->limit_hi);
        embz_buf_printf(&b, ", \"certified\": %s}, \"law\": ", c->limit_certified ? "true"
                                                                                  : "false");
        embz_buf_json_string(&b, embz_law_id(c->law));
        embz_buf_printf(&b, ", \"law_formula\": ");
        embz_buf_json_string(&b, embz_law_formula(c->law));
        embz_buf_printf(&b, ", ");
        json_range(&b, "exponent", c->exponent, c->exponent_lo, c->exponent_hi);
        embz_buf_printf(&b, ", \"coefficient\": ");
        cli_buf_json_double(&b, c->coeff);
        embz_buf_printf(&b, ", \"estimates_not_certified\": [\"limit\", \"law\", \"exponent\", "
                        "\"coefficient\"], \"asymptotic_form\": ");
        if (c->asymptotic_form[0]) embz_buf_json_string(&b, c->asymptotic_form);
        else embz_buf_printf(&b, "null");
        embz_buf_printf(&b, ", \"analytic_rate\": ");
        if (c->analytic_rate[0]) embz_buf_json_string(&b, c->analytic_rate);
        else embz_buf_printf(&b, "null");
        embz_buf_printf(&b, ", \"reasons\": [");
        for (slong k = 0; k < c->nreasons; k++) {
            embz_buf_printf(&b, "%s\n  ", k ? "," : "");
            embz_buf_json_string(&b, c->reasons[k]);
        }
        embz_buf_printf(&b, "], \"points\": [");
        slong k = 0;
        for (slong j = 0; j < c->sweep->len; j++) {
            const embz_sweep_point_struct *p = c->sweep->pts + j;
            if (p->status != EMBZ_OK) continue;
            char *ns = fmpz_get_str(NULL, 10, p->n);
            char *lo = embz_arb_lo_string(p->error, 20), *hi = embz_arb_hi_string(p->error, 20);
            embz_buf_printf(&b, "%s\n  {\"n\": \"%s\", \"log10_n\": %.10g, \"error_lo\": \"%s\", "
                            "\"error_hi\": \"%s\"}", k ? "," : "", ns, p->log_n / log(10.0),
                            lo, hi);
            flint_free(ns); free(lo); free(hi);
            k++;
        }
        embz_buf_printf(&b, "]}\n");
    } else {
        embz_buf_printf(&b, "family     %s\nweight     %s\n", fam->name, fam->weight_text);
        embz_buf_printf(&b, "verdict    %s", embz_verdict_id(c->verdict));
        if (c->disagree) embz_buf_printf(&b, "   (the analytic and numeric routes DISAGREE)");
        embz_buf_printf(&b, "\nnumeric    %s\nanalytic   %s\n",
                        embz_verdict_id(c->numeric_verdict),
                        c->analytic_available ? embz_verdict_id(c->analytic_verdict)
                                              : "not applicable");
        if (c->asymptotic_form[0])
            embz_buf_printf(&b, "f ~        %s\n", c->asymptotic_form);
        if (c->analytic_rate[0])
            embz_buf_printf(&b, "rate       %s   (predicted, leading order)\n", c->analytic_rate);
        embz_buf_printf(&b, "limit      %.8g in [%.8g, %.8g]   (%s)\n", c->limit_value,
                        c->limit_lo, c->limit_hi, c->limit_certified ? "certified"
                                                                      : "estimate");
        if (c->law)
            embz_buf_printf(&b, "law        E ~ %s, C = %.5g, g = %.5g [%.5g, %.5g]   "
                            "(fitted estimate)\n", embz_law_formula(c->law), c->coeff,
                            c->exponent, c->exponent_lo, c->exponent_hi);
        embz_buf_printf(&b, "reasons:\n");
        for (slong k = 0; k < c->nreasons; k++)
            embz_buf_printf(&b, "  - %s\n", c->reasons[k]);
    }
    fputs(b.s, stdout);
    embz_buf_clear(&b);

done:
    for (long k = 0; k < nset; k++) free(setcopies[k]);
    free(setcopies);
    free(settings);
    embz_classify_opts_clear(o);
    embz_classify_clear(c);
    embz_family_clear(fam);
    cli_args_clear(&a);
    return code;
}
