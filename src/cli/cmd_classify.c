/* embz classify FAMILY: universal embezzler or not, with the reasons. */
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include "cli.h"

static const cli_opt_t classify_opts[] = {
    CLI_OPT_FROM,
    CLI_OPT_TO,
    CLI_OPT_POINTS,
    CLI_OPT_PREC_MANY,
    CLI_OPT_THREADS("sizes"),
    CLI_OPT_SET,
    CLI_OPT_AMPLITUDE,
    { "numeric-only", 0, CLI_FLAG, NULL, "skip the analytic (asymptotic expansion) route" },
    { "measure", 0, CLI_VALUE, "M",
      "k (default), or fidelity, purified, overlap: does it converge, how fast" },
    CLI_OPT_JSON,
    { "csv", 0, CLI_FLAG, NULL, "print a CSV header line and one row (the reasons joined by '; ')" },
    CLI_OPT_END
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
    "shown. See docs/analysis.md.\n"
    "--measure fidelity|purified|overlap: whether that measure converges to a perfect\n"
    "conversion (P -> 0, F_max -> 1, O -> 1) and how fast: its distance (P, 1 - F_max, 1 - O)\n"
    "is certified per size (sizes with bounds only are used as bounds, never fitted) and\n"
    "fitted (estimates); the verdict follows from the K classification where a theorem ties\n"
    "them (K <= P <= sqrt(K (2 - K))), and for the weight 1/i the overlap's exact law\n"
    "1 - O = C_2(n) / H_n. The output says which parts are proven and which are fitted.\n",
    classify_opts, 1, 1
};

/* "reasons:" and one line per fact */
static void reasons_text(embz_buf_t *b, const embz_classify_fact_struct *facts, slong n)
{
    embz_buf_printf(b, "reasons:\n");
    for (slong k = 0; k < n; k++) {
        char *t = embz_classify_fact_text(facts + k);
        embz_buf_printf(b, "  - %s\n", t);
        free(t);
    }
}

/* --measure fidelity|purified|overlap: the measure's convergence */
static int run_measure(const embz_family_t fam, int measure, const embz_classify_opts_t o,
                       int json, int csv)
{
    embz_err_t err;
    embz_err_clear(&err);
    embz_mclassify_t c;
    embz_mclassify_init(c);
    cli_progress_t prog;
    embz_progress_fn show = cli_progress_start(&prog, 0);
    int status = embz_mclassify(c, fam, measure, o, show, &prog, &err);
    cli_progress_end(&prog);
    if (status != EMBZ_OK) {
        embz_mclassify_clear(c);
        return cli_report("classify", status, &err);
    }
    const char *mname = embz_measure_name(measure);
    const char *dname = embz_mclassify_distance_name(measure);
    const char *how = c->proven ? "proven" : "estimate";
    char *hlo = NULL, *hhi = NULL;
    if (c->harmonic) {
        hlo = embz_arb_lo_string(c->harmonic_c, 12);
        hhi = embz_arb_hi_string(c->harmonic_c, 12);
    }
    embz_buf_t rs;
    embz_buf_init(&rs);
    embz_buf_t b;
    embz_buf_init(&b);
    if (csv) {
        static const char *const head[] = {
            "family", "weight", "measure", "distance", "verdict", "verdict_proven",
            "fit_verdict", "k_verdict", "k_by_criterion", "sizes_values", "sizes_bounds_only",
            "sizes_failed", "limit_lo", "limit_hi", "law", "exponent", "exponent_lo",
            "exponent_hi", "coefficient", "harmonic_c_lo", "harmonic_c_hi", "reasons"
        };
        for (size_t k = 0; k < sizeof(head) / sizeof(head[0]); k++)
            embz_buf_printf(&b, "%s%s", k ? "," : "", head[k]);
        embz_buf_printf(&b, "\n");
        cli_buf_csv_field(&b, fam->name);
        embz_buf_printf(&b, ",");
        cli_buf_csv_field(&b, fam->weight_text);
        embz_buf_printf(&b, ",%s,", mname);
        cli_buf_csv_field(&b, dname);
        embz_buf_printf(&b, ",%s,%d,%s,%s,%d,%ld,%ld,%ld", embz_converge_id(c->verdict),
                        c->proven, embz_converge_id(c->fit_verdict),
                        embz_verdict_id(c->k_verdict), c->k_by_criterion, (long) c->nvalues,
                        (long) c->nbounds, (long) c->nfailed);
        cli_buf_csv_num(&b, c->limit_lo);
        cli_buf_csv_num(&b, c->limit_hi);
        embz_buf_printf(&b, ",%s", embz_law_id(c->law));
        double ex[4] = { c->exponent, c->exponent_lo, c->exponent_hi, c->coeff };
        for (int k = 0; k < 4; k++) cli_buf_csv_num(&b, ex[k]);
        embz_buf_printf(&b, ",%s,%s,", hlo ? hlo : "", hhi ? hhi : "");
        for (slong k = 0; k < c->nfacts; k++) {
            char *t = embz_classify_fact_text(c->facts + k);
            embz_buf_printf(&rs, "%s%s", k ? "; " : "", t);
            free(t);
        }
        cli_buf_csv_field(&b, rs.s != NULL ? rs.s : "");
        embz_buf_printf(&b, "\n");
    } else if (json) {
        embz_buf_printf(&b, "{\"family\": ");
        embz_buf_json_string(&b, fam->name);
        cli_buf_json_key_string(&b, "weight", fam->weight_text);
        embz_buf_printf(&b, ", \"params\": ");
        cli_buf_json_params(&b, fam);
        embz_buf_printf(&b, ", \"target\": \"ebit\"");
        cli_buf_json_key_string(&b, "measure", mname);
        cli_buf_json_key_string(&b, "distance", dname);
        cli_buf_json_key_string(&b, "verdict", embz_converge_id(c->verdict));
        embz_buf_printf(&b, ", \"verdict_proven\": %s", c->proven ? "true" : "false");
        cli_buf_json_key_string(&b, "fit_verdict", embz_converge_id(c->fit_verdict));
        cli_buf_json_key_string(&b, "k_verdict", embz_verdict_id(c->k_verdict));
        embz_buf_printf(&b, ", \"k_by_criterion\": %s, \"sizes\": {\"values\": %ld, "
                        "\"bounds_only\": %ld, \"failed\": %ld}, \"limit\": {",
                        c->k_by_criterion ? "true" : "false", (long) c->nvalues,
                        (long) c->nbounds, (long) c->nfailed);
        cli_buf_json_vlohi(&b, c->verdict == EMBZ_CONVERGE_YES ? 0.0 : NAN, c->limit_lo,
                           c->limit_hi);
        embz_buf_printf(&b, "}");
        cli_buf_json_key_string(&b, "law", embz_law_id(c->law));
        cli_buf_json_key_string(&b, "law_formula", embz_law_formula(c->law));
        embz_buf_printf(&b, ", \"exponent\": {");
        cli_buf_json_vlohi(&b, c->exponent, c->exponent_lo, c->exponent_hi);
        embz_buf_printf(&b, "}");
        cli_buf_json_key_double(&b, "coefficient", c->coeff);
        embz_buf_printf(&b, ", \"estimates_not_certified\": [\"fit_verdict\", \"limit\", "
                        "\"law\", \"exponent\", \"coefficient\"], \"harmonic_law\": ");
        if (c->harmonic) {
            embz_buf_printf(&b, "{\"d\": 2, \"law\": \"%s\"", measure == EMBZ_MEASURE_OVERLAP
                            ? "1 - O = C_d(n) / H_n" : "1 - F_max <= 2 C_d / H_n");
            cli_buf_json_key_string(&b, "limit_c_lo", hlo);
            cli_buf_json_key_string(&b, "limit_c_hi", hhi);
            embz_buf_printf(&b, "}");
        } else
            embz_buf_printf(&b, "null");
        embz_buf_printf(&b, ", \"reasons\": [");
        for (slong k = 0; k < c->nfacts; k++) {
            char *t = embz_classify_fact_text(c->facts + k);
            embz_buf_printf(&b, "%s\n  ", k ? "," : "");
            embz_buf_json_string(&b, t);
            free(t);
        }
        embz_buf_printf(&b, "], \"points\": [");
        for (slong j = 0; j < c->sweep->len; j++) {
            const embz_msweep_point_struct *p = c->sweep->pts + j;
            char *ns = fmpz_get_str(NULL, 10, p->n);
            embz_buf_printf(&b, "%s\n  {\"n\": \"%s\", \"log10_n\": %.10g, \"status\": \"%s\"",
                            j ? "," : "", ns, fmpz_dlog(p->n) / log(10.0),
                            p->status == EMBZ_OK ? "ok" : "skipped");
            if (p->status == EMBZ_OK) {
                char *lo = embz_arb_lo_string(c->dist + j, 20);
                char *hi = embz_arb_hi_string(c->dist + j, 20);
                embz_buf_printf(&b, ", \"bounds_only\": %s",
                                p->res.bounds_only ? "true" : "false");
                cli_buf_json_key_string(&b, "distance_lo", lo);
                cli_buf_json_key_string(&b, "distance_hi", hi);
                free(lo); free(hi);
            } else
                cli_buf_json_key_string(&b, "note", p->note);
            embz_buf_printf(&b, "}");
            flint_free(ns);
        }
        embz_buf_printf(&b, "]}\n");
    } else {
        embz_buf_printf(&b, "family     %s\nweight     %s\n", fam->name, fam->weight_text);
        embz_buf_printf(&b, "measure    %s   (distance %s, one ebit)\n", mname, dname);
        embz_buf_printf(&b, "verdict    %s   (%s)\n", embz_converge_id(c->verdict),
                        c->verdict == EMBZ_CONVERGE_INCONCLUSIVE ? "see the reasons"
                                                                 : how);
        embz_buf_printf(&b, "K verdict  %s   (%s)\n", embz_verdict_id(c->k_verdict),
                        c->k_by_criterion ? "analytic criterion" : "numeric estimate");
        if (c->verdict == EMBZ_CONVERGE_YES && isfinite(c->limit_hi))
            embz_buf_printf(&b, "limit      0   (%s; certified %s <= %.8g at the largest size "
                            "with a value)\n", how, dname, c->limit_hi);
        else if (isfinite(c->limit_lo) && isfinite(c->limit_hi))
            embz_buf_printf(&b, "limit      in [%.8g, %.8g]   (estimate)\n", c->limit_lo,
                            c->limit_hi);
        else if (isfinite(c->limit_lo))
            embz_buf_printf(&b, "limit      at least %.8g   (%s; estimate)\n", c->limit_lo,
                            measure == EMBZ_MEASURE_FIDELITY
                                ? "1 - F_max >= K^2: the square of the K classification's "
                                  "lower end of the limit of K"
                                : "P >= K: the K classification's lower end of the limit of K");
        else if (c->verdict == EMBZ_CONVERGE_NO)
            embz_buf_printf(&b, "limit      positive, not estimated\n");
        else
            embz_buf_printf(&b, "limit      not estimated\n");
        if (c->law && isfinite(c->coeff) && isfinite(c->exponent) && isfinite(c->exponent_lo)
            && isfinite(c->exponent_hi))
            embz_buf_printf(&b, "law        %s ~ %s, C = %.5g, g = %.5g [%.5g, %.5g]   "
                            "(fitted estimate)\n", dname, embz_law_formula(c->law), c->coeff,
                            c->exponent, c->exponent_lo, c->exponent_hi);
        if (c->harmonic && measure == EMBZ_MEASURE_OVERLAP)
            embz_buf_printf(&b, "derived    1 - O = C_2(n) / H_n, C_2 in [%s, %s] (certified), "
                            "so 1 - O ~ C_2 / ln n\n", hlo, hhi);
        else if (c->harmonic)
            embz_buf_printf(&b, "derived    1 - F_max <= 2 C_2 / H_n, so P <= sqrt(2 C_2 / H_n) "
                            "(proven), C_2 in [%s, %s] (certified)\n", hlo, hhi);
        embz_buf_printf(&b, "sizes      %ld: %ld with values, %ld with bounds only, %ld failed\n",
                        (long) c->sweep->len, (long) c->nvalues, (long) c->nbounds,
                        (long) c->nfailed);
        reasons_text(&b, c->facts, c->nfacts);
    }
    fputs(b.s, stdout);
    embz_buf_clear(&b);
    embz_buf_clear(&rs);
    free(hlo);
    free(hhi);
    embz_mclassify_clear(c);
    return CLI_EXIT_OK;
}

int cli_cmd_classify(int argc, char **argv)
{
    cli_args_t a;
    int code, status;
    if (!cli_begin(&a, &classify_spec, argc, argv, &code)) return code;
    embz_err_t err;
    embz_family_t fam;
    embz_classify_t c;
    embz_classify_opts_t o;
    long prec = EMBZ_PREC_MANY, points = EMBZ_RANGE_POINTS;

    embz_family_init(fam);
    embz_classify_init(c);
    embz_classify_opts_init(o);
    embz_err_clear(&err);

    if (cli_flag(&a, "json") && cli_flag(&a, "csv")) {
        code = cli_usage_error(&classify_spec, "--json and --csv exclude each other");
        goto done;
    }
    if ((code = cli_load_prec_upto(&prec, &a, &classify_spec, 1L << 16)) != 0
        || (code = cli_load_threads(&o->threads, &a, &classify_spec)) != 0
        || (code = cli_load_range(o->from, o->to, &points, 5, 100000, &a, &classify_spec)) != 0
        || (code = cli_load_family(fam, &a, a.pos[0], "classify")) != 0)
        goto done;
    cli_levels_range(o->from, o->to, fam, &a);
    o->prec = prec;
    o->points = points;
    o->use_analytic = !cli_flag(&a, "numeric-only");
    if (cli_value(&a, "measure") != NULL) {
        int measure;
        embz_err_t me;
        embz_err_clear(&me);
        if (embz_measure_parse(&measure, cli_value(&a, "measure"), &me) != EMBZ_OK) {
            code = cli_usage_error(&classify_spec, "%s", me.text);
            goto done;
        }
        if (measure != EMBZ_MEASURE_K) {
            code = run_measure(fam, measure, o, cli_flag(&a, "json"), cli_flag(&a, "csv"));
            goto done;
        }
    }

    cli_progress_t prog;
    embz_progress_fn show = cli_progress_start(&prog, 0);
    status = embz_classify(c, fam, o, show, &prog, &err);
    cli_progress_end(&prog);
    if (status != EMBZ_OK) {
        code = cli_report("classify", status, &err);
        goto done;
    }

    embz_buf_t b;
    embz_buf_init(&b);
    if (cli_flag(&a, "csv")) {
        static const char *const head[] = {
            "family", "weight", "verdict", "numeric_verdict", "analytic_verdict",
            "routes_disagree", "limit", "limit_lo", "limit_hi", "limit_certified",
            "limit_by_criterion", "law", "exponent", "exponent_lo", "exponent_hi",
            "coefficient", "asymptotic_form", "analytic_rate", "reasons"
        };
        for (size_t k = 0; k < sizeof(head) / sizeof(head[0]); k++)
            embz_buf_printf(&b, "%s%s", k ? "," : "", head[k]);
        embz_buf_printf(&b, "\n");
        cli_buf_csv_field(&b, fam->name);
        embz_buf_printf(&b, ",");
        cli_buf_csv_field(&b, fam->weight_text);
        embz_buf_printf(&b, ",%s,%s,%s,%d", embz_verdict_id(c->verdict),
                        embz_verdict_id(c->numeric_verdict),
                        c->analytic_available ? embz_verdict_id(c->analytic_verdict) : "",
                        c->disagree);
        double lim[3] = { c->limit_value, c->limit_lo, c->limit_hi };
        for (int k = 0; k < 3; k++) cli_buf_csv_num(&b, lim[k]);
        embz_buf_printf(&b, ",%d,%d,%s", c->limit_certified, c->limit_by_criterion,
                        embz_law_id(c->law));
        double ex[4] = { c->exponent, c->exponent_lo, c->exponent_hi, c->coeff };
        for (int k = 0; k < 4; k++) cli_buf_csv_num(&b, ex[k]);
        embz_buf_printf(&b, ",");
        cli_buf_csv_field(&b, c->asymptotic_form);
        embz_buf_printf(&b, ",");
        cli_buf_csv_field(&b, c->analytic_rate);
        embz_buf_t rs;
        embz_buf_init(&rs);
        for (slong k = 0; k < c->nfacts; k++) {
            char *t = embz_classify_fact_text(c->facts + k);
            embz_buf_printf(&rs, "%s%s", k ? "; " : "", t);
            free(t);
        }
        embz_buf_printf(&b, ",");
        cli_buf_csv_field(&b, rs.s != NULL ? rs.s : "");
        embz_buf_clear(&rs);
        embz_buf_printf(&b, "\n");
    } else if (cli_flag(&a, "json")) {
        embz_buf_printf(&b, "{\"family\": ");
        embz_buf_json_string(&b, fam->name);
        cli_buf_json_key_string(&b, "weight", fam->weight_text);
        embz_buf_printf(&b, ", \"params\": ");
        cli_buf_json_params(&b, fam);
        embz_buf_printf(&b, ", \"target\": \"ebit\", ");
        cli_buf_json_verdicts(&b, c);
        embz_buf_printf(&b, ", \"routes_disagree\": %s, \"limit\": {",
                        c->disagree ? "true" : "false");
        cli_buf_json_vlohi(&b, c->limit_value, c->limit_lo, c->limit_hi);
        embz_buf_printf(&b, ", \"certified\": %s, \"by_criterion\": %s}",
                        c->limit_certified ? "true" : "false",
                        c->limit_by_criterion ? "true" : "false");
        cli_buf_json_key_string(&b, "law", embz_law_id(c->law));
        cli_buf_json_key_string(&b, "law_formula", embz_law_formula(c->law));
        embz_buf_printf(&b, ", \"exponent\": {");
        cli_buf_json_vlohi(&b, c->exponent, c->exponent_lo, c->exponent_hi);
        embz_buf_printf(&b, "}");
        cli_buf_json_key_double(&b, "coefficient", c->coeff);
        embz_buf_printf(&b, ", \"estimates_not_certified\": [\"limit\", \"law\", \"exponent\", "
                        "\"coefficient\"], \"asymptotic_form\": ");
        cli_buf_json_string_or_null(&b, c->asymptotic_form);
        embz_buf_printf(&b, ", \"analytic_rate\": ");
        cli_buf_json_string_or_null(&b, c->analytic_rate);
        embz_buf_printf(&b, ", \"reasons\": [");
        for (slong k = 0; k < c->nfacts; k++) {
            char *t = embz_classify_fact_text(c->facts + k);
            embz_buf_printf(&b, "%s\n  ", k ? "," : "");
            embz_buf_json_string(&b, t);
            free(t);
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
        /* no nan on the screen: what was not computed is said in words */
        const char *kind = c->limit_certified ? "certified" : "estimate";
        if (c->limit_by_criterion && isfinite(c->limit_hi))
            embz_buf_printf(&b, "limit      0   (criterion of the analytic route; the fit agrees: "
                               "certified E_n <= %.8g at the largest size)\n", c->limit_hi);
        else if (c->limit_by_criterion)
            embz_buf_printf(&b, "limit      0   (criterion of the analytic route)\n");
        else if (isfinite(c->limit_value) && isfinite(c->limit_lo) && isfinite(c->limit_hi))
            embz_buf_printf(&b, "limit      %.8g in [%.8g, %.8g]   (%s)\n", c->limit_value,
                            c->limit_lo, c->limit_hi, kind);
        else if (isfinite(c->limit_lo) && isfinite(c->limit_hi))
            embz_buf_printf(&b, "limit      in [%.8g, %.8g], no point estimate   (%s)\n",
                            c->limit_lo, c->limit_hi, kind);
        else
            embz_buf_printf(&b, "limit      not estimated\n");
        if (c->law && isfinite(c->coeff) && isfinite(c->exponent) && isfinite(c->exponent_lo)
            && isfinite(c->exponent_hi))
            embz_buf_printf(&b, "law        E ~ %s, C = %.5g, g = %.5g [%.5g, %.5g]   "
                            "(fitted estimate)\n", embz_law_formula(c->law), c->coeff,
                            c->exponent, c->exponent_lo, c->exponent_hi);
        else if (c->law)
            embz_buf_printf(&b, "law        E ~ %s, coefficients not resolved by the fit   "
                            "(fitted estimate)\n", embz_law_formula(c->law));
        reasons_text(&b, c->facts, c->nfacts);
    }
    fputs(b.s, stdout);
    embz_buf_clear(&b);

done:
    embz_classify_opts_clear(o);
    embz_classify_clear(c);
    embz_family_clear(fam);
    cli_args_clear(&a);
    return code;
}

/* the option table, for the shell completion (completion.c) */
const cli_spec_t *const cli_spec_classify = &classify_spec;
