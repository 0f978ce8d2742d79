/* embz sweep FAMILY: the certified error over log-spaced sizes, with fitted decay laws. */
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include "cli.h"

static const cli_opt_t sweep_opts[] = {
    CLI_OPT_FROM,
    CLI_OPT_TO,
    CLI_OPT_POINTS,
    { "target", 't', CLI_VALUE, "T", "target: ebit (default), ebits:J, uniform:D, or a vector" },
    CLI_OPT_PREC_MANY,
    CLI_OPT_THREADS("sizes"),
    CLI_OPT_SET,
    CLI_OPT_AMPLITUDE,
    { "no-fit", 0, CLI_FLAG, NULL, "do not fit decay laws" },
    { "measure", 0, CLI_VALUE, "M",
      "k (default), or fidelity, purified, overlap: that measure per size (no fits)" },
    CLI_OPT_JSON,
    { "csv", 0, CLI_FLAG, NULL, "print CSV: a header line and one row per size" },
    CLI_OPT_END
};

static const cli_spec_t sweep_spec = {
    "sweep", "FAMILY",
    "Certified embezzlement error E_n(q) at log-spaced sizes n from A to B, and the decay\n"
    "laws L + C n^-g, C (ln n)^-g, C (ln ln n)^-g, L + C (ln n)^-g fitted to the upper part.",
    "Sizes are the integers nearest to A^(1-t) B^t, t = 0, 1/(K-1), ..., 1. Each E_n is a\n"
    "certified enclosure (one reusable analytic engine for all sizes; explicit summation for\n"
    "small n). The fitted parameters, their jackknife intervals and the model choice (lowest\n"
    "BIC on relative residuals) are estimates, not certified. Sizes run in parallel (-j).\n"
    "Time: about 10-50 ms per size for the inverse family up to 10^300 (10^1000 is\n"
    "practical) at default precision; a progress bar appears on a terminal when the run\n"
    "takes longer than a second. A family the analytic engine cannot take (a weight not\n"
    "provably monotone) is swept up to n = 10^6 only, what explicit summation reaches, and\n"
    "the output says so.\n"
    "--measure fidelity|purified|overlap: that measure at each size instead (as 'embz error\n"
    "--measure' computes it: values, or BOUNDS where only bounds are certified), no fits.\n",
    sweep_opts, 1, 1
};



/* {"family": ..., "weight": ..., "params": ..., "target": ... (the object left open) */
static void json_head(embz_buf_t *b, const embz_family_t fam, const embz_target_t q)
{
    embz_buf_printf(b, "{\"family\": ");
    embz_buf_json_string(b, fam->name);
    cli_buf_json_key_string(b, "weight", fam->weight_text);
    embz_buf_printf(b, ", \"params\": ");
    cli_buf_json_params(b, fam);
    cli_buf_json_key_string(b, "target", q->label);
}
static const char *method_name(int m)
{
    return m == EMBZ_METHOD_EXPLICIT ? "explicit" : m == EMBZ_METHOD_ANALYTIC ? "analytic"
                                                                             : "none";
}

static double log10_of(const embz_sweep_point_struct *p)
{
    return p->log_n / log(10.0);
}

/* The texts of one point for the CSV and JSON rows: the size in full, and for a computed
 * point the enclosure's ends, its certified digits, the argmax and the block-mass bounds
 * (NULL where they do not apply). */
/* The note of a point (malloc'ed): how it was computed, or why it was skipped. */
static char *point_note(const embz_sweep_point_struct *p)
{
    return p->status == EMBZ_OK ? embz_error_how_text(&p->how) : cli_strdup(p->note);
}

typedef struct { char *n, *lo, *hi, *ce, *ks, *bl, *bh; } point_text_t;

static void point_text_init(point_text_t *t, const embz_sweep_point_struct *p)
{
    memset(t, 0, sizeof(*t));
    t->n = fmpz_get_str(NULL, 10, p->n);
    if (p->status != EMBZ_OK) return;
    t->lo = embz_arb_lo_string(p->error, 30);
    t->hi = embz_arb_hi_string(p->error, 30);
    t->ce = embz_arb_certified_string(p->error, 30);
    t->ks = fmpz_get_str(NULL, 10, p->argk);
    if (!p->have_bounds) return;
    t->bl = embz_arb_lo_string(p->lower, 20);
    t->bh = embz_arb_hi_string(p->upper, 20);
}

static void point_text_clear(point_text_t *t)
{
    flint_free(t->n); flint_free(t->ks);
    free(t->lo); free(t->hi); free(t->ce); free(t->bl); free(t->bh);
}

static void emit_fits_json(embz_buf_t *b, const embz_fitset_t fs)
{
    embz_buf_printf(b, "\"fits\": {\"estimate\": true, \"points_used\": %ld, \"best\": ",
                    (long) fs->m);
    embz_buf_json_string(b, embz_law_id(fs->best));
    embz_buf_printf(b, ", \"criterion\": \"BIC on relative residuals\", \"laws\": [");
    for (int law = 1; law < EMBZ_LAW_COUNT; law++) {
        const embz_fit_struct *F = fs->fits + law;
        embz_buf_printf(b, "%s{\"law\": ", law > 1 ? ", " : "");
        embz_buf_json_string(b, embz_law_id(law));
        embz_buf_printf(b, ", \"formula\": ");
        embz_buf_json_string(b, embz_law_formula(law));
        embz_buf_printf(b, ", \"ok\": %s", F->ok ? "true" : "false");
        const char *names[3] = { "L", "C", "g" };
        double v[3][3] = { { F->L, F->L_lo, F->L_hi }, { F->C, F->C_lo, F->C_hi },
                           { F->g, F->g_lo, F->g_hi } };
        for (int k = 0; k < 3; k++) {
            if (k == 0 && (law == EMBZ_LAW_LOG || law == EMBZ_LAW_LOGLOG)) continue;
            embz_buf_printf(b, ", \"%s\": {", names[k]);
            cli_buf_json_vlohi(b, v[k][0], v[k][1], v[k][2]);
            embz_buf_printf(b, "}");
        }
        cli_buf_json_key_double(b, "bic", F->bic);
        cli_buf_json_key_double(b, "max_rel_residual", F->max_rel);
        embz_buf_printf(b, ", \"residuals\": [");
        for (slong j = 0; j < F->m && F->resid; j++) {
            embz_buf_printf(b, "%s", j ? ", " : "");
            cli_buf_json_double(b, F->resid[j]);
        }
        embz_buf_printf(b, "]}");
    }
    embz_buf_printf(b, "]}");
}

static void emit_fits_table(embz_buf_t *b, const embz_fitset_t fs)
{
    embz_buf_printf(b, "\nfitted laws (estimates, not certified; %ld largest sizes, ln n from "
                    "%.4g to %.4g; jackknife intervals):\n", (long) fs->m, fs->logn[0],
                    fs->logn[fs->m - 1]);
    for (int law = 1; law < EMBZ_LAW_COUNT; law++) {
        const embz_fit_struct *F = fs->fits + law;
        embz_buf_printf(b, "  %s %-16s", law == fs->best ? "*" : " ", embz_law_formula(law));
        if (!F->ok) {
            embz_buf_printf(b, " (no fit)\n");
            continue;
        }
        if (law == EMBZ_LAW_POWER_LIMIT || law == EMBZ_LAW_LOG_LIMIT)
            embz_buf_printf(b, " L = %.6g [%.6g, %.6g]", F->L, F->L_lo, F->L_hi);
        embz_buf_printf(b, " C = %.5g [%.5g, %.5g] g = %.5g [%.5g, %.5g]  BIC %.1f  max "
                        "rel. residual %.2g\n", F->C, F->C_lo, F->C_hi, F->g, F->g_lo, F->g_hi,
                        F->bic, F->max_rel);
    }
    if (fs->best)
        embz_buf_printf(b, "  * selected by the lowest BIC = m ln(RSS/m) + k ln m\n");
    const embz_fit_struct *F = fs->fits + fs->best;
    if (fs->best && F->resid) {
        embz_buf_printf(b, "  residuals of the selected law (relative):");
        for (slong j = 0; j < F->m; j++) embz_buf_printf(b, " %.2g", F->resid[j]);
        embz_buf_printf(b, "\n");
    }
}

/* --measure fidelity|purified|overlap: the measure per size, no fits */
static int run_measure(const embz_family_t fam, const fmpz_t from, const fmpz_t to,
                       slong points, const embz_target_t q, int measure, slong prec, int json,
                       int csv)
{
    embz_err_t err;
    embz_err_clear(&err);
    embz_msweep_t ms;
    embz_msweep_init(ms);
    cli_progress_t prog;
    embz_progress_fn show = cli_progress_start(&prog, 1);
    int status = embz_msweep_run(ms, fam, from, to, points, q, measure, prec, show, &prog, &err);
    cli_progress_end(&prog);
    if (status != EMBZ_OK) {
        embz_msweep_clear(ms);
        return cli_report("sweep", status, &err);
    }
    const char *mname = embz_measure_name(measure);
    embz_buf_t b;
    embz_buf_init(&b);
    if (csv)
        embz_buf_printf(&b, "n,log10_n,status,measure,method,bounds_only,value,value_lo,"
                        "value_hi,value_certified,seconds,note\n");
    else if (json) {
        json_head(&b, fam, q);
        cli_buf_json_key_string(&b, "measure", mname);
        embz_buf_printf(&b, ", \"prec\": %ld, \"points\": [", prec);
    } else {
        embz_buf_printf(&b, "family   %s   target %s   measure %s   %ld sizes\n", fam->name,
                        q->label, mname, (long) ms->len);
        embz_buf_printf(&b, "%-16s %-34s %-9s %s\n", "n", "value (certified digits)", "method",
                        "time");
    }
    for (slong j = 0; j < ms->len; j++) {
        const embz_msweep_point_struct *p = ms->pts + j;
        const embz_fidelity_result_struct *r = &p->res;
        int ok = p->status == EMBZ_OK;
        const char *meth = !ok ? "" : r->bounds_only ? "bounds"
                           : r->how.analytic ? "analytic" : "explicit";
        char *nfull = fmpz_get_str(NULL, 10, p->n);
        double l10 = fmpz_dlog(p->n) / log(10.0);
        char *lo = ok ? embz_arb_lo_string(r->lower, 30) : NULL;
        char *hi = ok ? embz_arb_hi_string(r->upper, 30) : NULL;
        char *ce = ok && !r->bounds_only ? embz_arb_certified_string(r->value, 30) : NULL;
        char *how = ok ? embz_fidelity_how_text(&r->how) : NULL;
        if (csv) {
            embz_buf_printf(&b, "%s,%.10g,%s,%s,%s,%s,", nfull, l10, ok ? "ok" : "skipped",
                            mname, meth, ok ? (r->bounds_only ? "true" : "false") : "");
            if (ok && !r->bounds_only) embz_buf_printf(&b, "%.17g", embz_arb_mid_d(r->value));
            embz_buf_printf(&b, ",%s,%s,", ok ? lo : "", ok ? hi : "");
            cli_buf_csv_field(&b, ce ? ce : "");
            embz_buf_printf(&b, ",%.3f,", p->seconds);
            cli_buf_csv_field(&b, ok ? how : p->note);
            embz_buf_printf(&b, "\n");
        } else if (json) {
            embz_buf_printf(&b, "%s\n  {\"n\": \"%s\", \"log10_n\": %.10g, \"status\": \"%s\"",
                            j ? "," : "", nfull, l10, ok ? "ok" : "skipped");
            if (ok) {
                cli_buf_json_key_string(&b, "method", meth);
                embz_buf_printf(&b, ", \"bounds_only\": %s", r->bounds_only ? "true" : "false");
                cli_buf_json_key_double(&b, "value", r->bounds_only ? NAN
                                                                  : embz_arb_mid_d(r->value));
                cli_buf_json_key_string(&b, "value_lo", lo);
                cli_buf_json_key_string(&b, "value_hi", hi);
                if (ce) cli_buf_json_key_string(&b, "value_certified", ce);
                if (r->bounds_only && r->have_tight) {
                    char *a = embz_arb_lo_string(r->tight_lo, 30);
                    char *z = embz_arb_hi_string(r->tight_hi, 30);
                    cli_buf_json_key_string(&b, "tight_lo", a);
                    cli_buf_json_key_string(&b, "tight_hi", z);
                    free(a); free(z);
                }
            }
            embz_buf_printf(&b, ", \"seconds\": %.4f", p->seconds);
            cli_buf_json_key_string(&b, "note", ok ? how : p->note);
            embz_buf_printf(&b, "}");
        } else {
            char *ns = embz_fmpz_string(p->n, 12);
            if (!ok) embz_buf_printf(&b, "%-16s %s\n", ns, p->note);
            else if (r->bounds_only) {
                char *tl = embz_arb_lo_string(r->have_tight ? r->tight_lo : r->lower, 8);
                char *th = embz_arb_hi_string(r->have_tight ? r->tight_hi : r->upper, 8);
                char v[96];
                snprintf(v, sizeof(v), "BOUNDS [%s, %s]", tl, th);
                embz_buf_printf(&b, "%-16s %-34s %-9s %.2fs\n", ns, v, meth, p->seconds);
                free(tl); free(th);
            } else {
                char *c18 = embz_arb_certified_string(r->value, 24);
                embz_buf_printf(&b, "%-16s %-34s %-9s %.2fs\n", ns, c18, meth, p->seconds);
                free(c18);
            }
            free(ns);
        }
        flint_free(nfull);
        free(lo); free(hi); free(ce); free(how);
    }
    if (json) embz_buf_printf(&b, "]}\n");
    else if (!csv)
        embz_buf_printf(&b, "(BOUNDS: certified bounds only, the tighter ones where available; "
                        "sizes with more than 12 digits are shown shortened)\n");
    fputs(b.s, stdout);
    embz_buf_clear(&b);
    embz_msweep_clear(ms);
    return CLI_EXIT_OK;
}

int cli_cmd_sweep(int argc, char **argv)
{
    cli_args_t a;
    int code, status;
    if (!cli_begin(&a, &sweep_spec, argc, argv, &code)) return code;
    embz_err_t err;
    fmpz_t from, to;
    embz_family_t fam;
    embz_target_t q;
    embz_sweep_t sw;
    embz_fitset_t fs;
    long prec = EMBZ_PREC_MANY, points = EMBZ_RANGE_POINTS;
    int threads = 1;
    int have_fit = 0;

    fmpz_init(from);
    fmpz_init(to);
    embz_family_init(fam);
    embz_target_init(q);
    embz_sweep_init(sw);
    embz_fitset_init(fs);
    embz_err_clear(&err);

    int json = cli_flag(&a, "json"), csv = cli_flag(&a, "csv");
    if (json && csv) {
        code = cli_usage_error(&sweep_spec, "--json and --csv exclude each other");
        goto done;
    }
    embz_default_range(from, to);
    if ((code = cli_load_prec_upto(&prec, &a, &sweep_spec, 1L << 16)) != 0
        || (code = cli_load_threads(&threads, &a, &sweep_spec)) != 0
        || (code = cli_load_range(from, to, &points, 1, 100000, &a, &sweep_spec)) != 0
        || (code = cli_load_family(fam, &a, a.pos[0], "sweep")) != 0
        || (code = cli_load_target(q, &a, "sweep")) != 0)
        goto done;
    int measure = EMBZ_MEASURE_K;
    if (cli_value(&a, "measure") != NULL) {
        embz_err_t me;
        embz_err_clear(&me);
        if (embz_measure_parse(&measure, cli_value(&a, "measure"), &me) != EMBZ_OK) {
            code = cli_usage_error(&sweep_spec, "%s", me.text);
            goto done;
        }
    }
    cli_levels_range(from, to, fam, &a);

    if (measure != EMBZ_MEASURE_K) {
        code = run_measure(fam, from, to, points, q, measure, prec, json, csv);
        goto done;
    }
    cli_progress_t prog;
    embz_progress_fn show = cli_progress_start(&prog, 1);
    embz_sweep_opts_t so;
    embz_sweep_opts_init(so);
    so->threads = threads;
    status = embz_sweep_run_opts(sw, fam, from, to, points, q, so, prec, show, &prog, &err);
    cli_progress_end(&prog);
    if (status != EMBZ_OK) {
        code = cli_report("sweep", status, &err);
        goto done;
    }
    if (!cli_flag(&a, "no-fit")) {
        embz_err_t e2;
        embz_err_clear(&e2);
        have_fit = (embz_fit_sweep(fs, sw, &e2) == EMBZ_OK);
    }

    char *narrow = embz_sweep_narrow_text(sw);
    embz_buf_t b;
    embz_buf_init(&b);
    if (csv) {
        if (narrow != NULL) fprintf(stderr, "embz sweep: note: %s\n", narrow);
        embz_buf_printf(&b, "n,log10_n,status,method,error,error_lo,error_hi,error_certified,"
                        "argmax,bound_lo,bound_hi,seconds,note\n");
        for (slong j = 0; j < sw->len; j++) {
            const embz_sweep_point_struct *p = sw->pts + j;
            point_text_t t;
            point_text_init(&t, p);
            embz_buf_printf(&b, "%s,%.10g,%s,%s,", t.n, log10_of(p),
                            p->status == EMBZ_OK ? "ok" : "skipped",
                            p->status == EMBZ_OK ? method_name(p->method) : "");
            if (p->status == EMBZ_OK) {
                embz_buf_printf(&b, "%.17g,%s,%s,", embz_arb_mid_d(p->error), t.lo, t.hi);
                cli_buf_csv_field(&b, t.ce);
                embz_buf_printf(&b, ",%s,%s,%s,", t.ks, t.bl ? t.bl : "", t.bh ? t.bh : "");
            } else {
                embz_buf_printf(&b, ",,,,,,,");
            }
            embz_buf_printf(&b, "%.3f,", p->seconds);
            char *note = point_note(p);
            cli_buf_csv_field(&b, note);
            free(note);
            embz_buf_printf(&b, "\n");
            point_text_clear(&t);
        }
    } else if (json) {
        json_head(&b, fam, q);
        embz_buf_printf(&b, ", \"prec\": %ld", prec);
        if (narrow != NULL) {
            embz_buf_printf(&b, ", \"narrowed_to\": \"%ld\"", (long) sw->reach);
            cli_buf_json_key_string(&b, "narrowed_why", sw->narrow_why);
        }
        embz_buf_printf(&b, ", \"points\": [");
        for (slong j = 0; j < sw->len; j++) {
            const embz_sweep_point_struct *p = sw->pts + j;
            point_text_t t;
            point_text_init(&t, p);
            embz_buf_printf(&b, "%s\n  {\"n\": \"%s\", \"log10_n\": %.10g, \"status\": \"%s\"",
                            j ? "," : "", t.n, log10_of(p), p->status == EMBZ_OK ? "ok"
                                                                                 : "skipped");
            if (p->status == EMBZ_OK) {
                embz_buf_printf(&b, ", \"method\": \"%s\"", method_name(p->method));
                cli_buf_json_key_double(&b, "error", embz_arb_mid_d(p->error));
                embz_buf_printf(&b, ", \"error_lo\": \"%s\", \"error_hi\": \"%s\"", t.lo, t.hi);
                cli_buf_json_key_string(&b, "error_certified", t.ce);
                embz_buf_printf(&b, ", \"argmax\": \"%s\"", t.ks);
                if (t.bl != NULL)
                    embz_buf_printf(&b, ", \"bound_lo\": \"%s\", \"bound_hi\": \"%s\"", t.bl, t.bh);
            }
            embz_buf_printf(&b, ", \"seconds\": %.4f", p->seconds);
            char *note = point_note(p);
            cli_buf_json_key_string(&b, "note", note);
            free(note);
            embz_buf_printf(&b, "}");
            point_text_clear(&t);
        }
        embz_buf_printf(&b, "]");
        if (have_fit) {
            embz_buf_printf(&b, ",\n ");
            emit_fits_json(&b, fs);
        }
        embz_buf_printf(&b, "}\n");
    } else {
        embz_buf_printf(&b, "family   %s   target %s   %ld sizes from 10^%.4g to 10^%.4g\n",
                        fam->name, q->label, (long) sw->len, log10_of(sw->pts),
                        log10_of(sw->pts + sw->len - 1));
        if (narrow != NULL) embz_buf_printf(&b, "%s\n", narrow);
        embz_buf_printf(&b, "%-16s %-24s %-16s %-9s %s\n", "n", "E_n (certified digits)",
                        "argmax", "method", "time");
        for (slong j = 0; j < sw->len; j++) {
            const embz_sweep_point_struct *p = sw->pts + j;
            char *ns = embz_fmpz_string(p->n, 12);
            if (p->status != EMBZ_OK) {
                embz_buf_printf(&b, "%-16s %s\n", ns, p->note);
                free(ns);
                continue;
            }
            char *ce = embz_arb_certified_string(p->error, 18);
            char *ks = embz_fmpz_string(p->argk, 8);
            embz_buf_printf(&b, "%-16s %-24s %-16s %-9s %.2fs", ns, ce, ks,
                            method_name(p->method), p->seconds);
            if (p->have_bounds) {
                char *bl = embz_arb_lo_string(p->lower, 6), *bh = embz_arb_hi_string(p->upper, 6);
                embz_buf_printf(&b, "   bounds [%s, %s]", bl, bh);
                free(bl); free(bh);
            }
            embz_buf_printf(&b, "\n");
            free(ns); free(ce); free(ks);
        }
        embz_buf_printf(&b, "(sizes with more than 12 digits are shown shortened)\n");
        if (have_fit) emit_fits_table(&b, fs);
    }
    fputs(b.s, stdout);
    embz_buf_clear(&b);
    free(narrow);

done:
    embz_fitset_clear(fs);
    embz_sweep_clear(sw);
    embz_target_clear(q);
    embz_family_clear(fam);
    fmpz_clear(from);
    fmpz_clear(to);
    cli_args_clear(&a);
    return code;
}

/* the option table, for the shell completion (completion.c) */
const cli_spec_t *const cli_spec_sweep = &sweep_spec;
