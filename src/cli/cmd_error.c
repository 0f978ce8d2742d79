/* embz error FAMILY -n N: the certified embezzlement error E_n(q) of a family. */
#include <stdlib.h>
#include <string.h>
#include "cli.h"

static const cli_opt_t error_opts[] = {
    { "size", 'n', CLI_VALUE, "N", "size n of the state: 1000, 1e6, 10^6, 2^20 (required)" },
    { "target", 't', CLI_VALUE, "T",
      "target state: ebit (default), ebits:J, uniform:D, or a list/file of numbers" },
    { "prec", 'p', CLI_VALUE, "BITS", "working precision of the ball arithmetic (default 128)" },
    { "method", 'm', CLI_VALUE, "M", "auto (default), explicit or analytic" },
    { "measure", 0, CLI_VALUE, "M",
      "k (default: the distance K), fidelity, purified or overlap" },
    { "set", 's', CLI_LIST, "NAME=VALUE", "set a parameter (exact decimal, e.g. a=-0.7)" },
    { "amplitude", 0, CLI_FLAG, NULL, "the expression gives amplitudes; weights are squares" },
    { "json", 0, CLI_FLAG, NULL, "print one JSON object" },
    { "csv", 0, CLI_FLAG, NULL, "print a CSV header line and one row" },
    { NULL, 0, 0, NULL, NULL }
};

static const cli_spec_t error_spec = {
    "error", "FAMILY -n N",
    "Certified embezzlement error E_n(q) = K(p -> p (x) q) of the family's state of size n\n"
    "for the target q.",
    "FAMILY is a library name (see 'embz families'), the path of a family file, or an\n"
    "expression in i (and n), e.g. '1/i' or 'i^a' with --set a=-0.5.\n"
    "The printed error shows only digits certified by the enclosure; 'estimate' is a\n"
    "double-precision value without guarantee.\n"
    "--measure fidelity: the optimal LOCC fidelity F_max(p -> p (x) q) (fidelity = squared\n"
    "overlap); purified: sqrt(1 - F_max); overlap: the best squared overlap with local\n"
    "unitaries only. These are values for n up to 2^20; beyond, fidelity and purified are\n"
    "certified BOUNDS from K (K <= P <= sqrt(K(2-K))), marked as such.\n",
    error_opts, 1, 1
};

#define DEFAULT_PREC 128
#define JSON_DIGITS 45
#define TABLE_DIGITS 20
#define CERT_DIGITS 30
#define TABLE_INT_DIGITS 60

static const char *method_name(int m)
{
    return m == EMBZ_METHOD_EXPLICIT ? "explicit" : m == EMBZ_METHOD_ANALYTIC ? "analytic"
                                                                             : "auto";
}

/* Everything printed about one result, as strings. */
typedef struct {
    char *label, *params_json, *params_text;
    char *family, *weight, *n, *target, *method, *cert, *lo, *hi, *argk, *blo, *bhi, *detail;
    double mid, radius, estimate;
    int have_bounds;
} row_t;

static void row_clear(row_t *r)
{
    free(r->label); free(r->params_json); free(r->params_text);
    free(r->family); free(r->weight); free(r->n); free(r->target); free(r->method);
    free(r->cert); free(r->lo); free(r->hi); free(r->argk); free(r->blo); free(r->bhi);
    free(r->detail);
}

static char *dup(const char *s)
{
    size_t l = strlen(s) + 1;
    char *d = malloc(l);
    memcpy(d, s, l);
    return d;
}

static void emit_json(embz_buf_t *b, const row_t *r)
{
    embz_buf_printf(b, "{\"family\": ");
    embz_buf_json_string(b, r->family);
    embz_buf_printf(b, ", \"params\": %s, \"weight\": ", r->params_json);
    embz_buf_json_string(b, r->weight);
    embz_buf_printf(b, ", \"n\": ");
    embz_buf_json_string(b, r->n);
    embz_buf_printf(b, ", \"target\": ");
    embz_buf_json_string(b, r->target);
    embz_buf_printf(b, ", \"method\": ");
    embz_buf_json_string(b, r->method);
    embz_buf_printf(b, ", \"measure\": \"k\", \"bounds_only\": false");
    embz_buf_printf(b, ", \"error\": ");
    cli_buf_json_double(b, r->mid);
    embz_buf_printf(b, ", \"error_lo\": ");
    embz_buf_json_string(b, r->lo);
    embz_buf_printf(b, ", \"error_hi\": ");
    embz_buf_json_string(b, r->hi);
    embz_buf_printf(b, ", \"error_certified\": ");
    embz_buf_json_string(b, r->cert);
    embz_buf_printf(b, ", \"radius\": ");
    cli_buf_json_double(b, r->radius);
    embz_buf_printf(b, ", \"argmax\": ");
    embz_buf_json_string(b, r->argk);
    embz_buf_printf(b, ", \"estimate\": ");
    cli_buf_json_double(b, r->estimate);
    if (r->have_bounds) {
        embz_buf_printf(b, ", \"bound_lo\": ");
        embz_buf_json_string(b, r->blo);
        embz_buf_printf(b, ", \"bound_hi\": ");
        embz_buf_json_string(b, r->bhi);
    }
    embz_buf_printf(b, ", \"detail\": ");
    embz_buf_json_string(b, r->detail);
    embz_buf_printf(b, "}\n");
}

static void emit_csv(embz_buf_t *b, const row_t *r)
{
    embz_buf_printf(b, "family,params,weight,n,target,method,error,error_lo,error_hi,error_certified,"
                    "radius,argmax,estimate,bound_lo,bound_hi,detail\n");
    const char *fields1[] = { r->family, r->params_text, r->weight, r->n, r->target,
                              r->method };
    for (int k = 0; k < 6; k++) {
        cli_buf_csv_field(b, fields1[k]);
        embz_buf_printf(b, ",");
    }
    embz_buf_printf(b, "%.17g,", r->mid);
    cli_buf_csv_field(b, r->lo);
    embz_buf_printf(b, ",");
    cli_buf_csv_field(b, r->hi);
    embz_buf_printf(b, ",");
    cli_buf_csv_field(b, r->cert);
    embz_buf_printf(b, ",%.6g,", r->radius);
    cli_buf_csv_field(b, r->argk);
    if (r->estimate == r->estimate)
        embz_buf_printf(b, ",%.17g,", r->estimate);
    else
        embz_buf_printf(b, ",,");
    if (r->have_bounds) {
        cli_buf_csv_field(b, r->blo);
        embz_buf_printf(b, ",");
        cli_buf_csv_field(b, r->bhi);
    } else {
        embz_buf_printf(b, ",");
    }
    embz_buf_printf(b, ",");
    cli_buf_csv_field(b, r->detail);
    embz_buf_printf(b, "\n");
}

static char *int_text(const fmpz_t x);

static void emit_table(embz_buf_t *b, const row_t *r, const embz_error_result_t res,
                       const fmpz_t n)
{
    embz_buf_printf(b, "%-10s %s\n", "family", r->label);
    if (strcmp(r->family, r->weight) != 0)
        embz_buf_printf(b, "%-10s %s\n", "weight", r->weight);
    char *ns = int_text(n);
    char *ks = int_text(res->argk);
    embz_buf_printf(b, "%-10s %s\n", "n", ns);
    embz_buf_printf(b, "%-10s %s\n", "target", r->target);
    embz_buf_printf(b, "%-10s %s   (certified digits)\n", "error", r->cert);
    char *lo = embz_arb_lo_string(res->error, TABLE_DIGITS);
    char *hi = embz_arb_hi_string(res->error, TABLE_DIGITS);
    embz_buf_printf(b, "%-10s [%s, %s]\n", "enclosure", lo, hi);
    free(lo); free(hi);
    embz_buf_printf(b, "%-10s %s   (Ky Fan index of the maximum)\n", "argmax k", ks);
    free(ns);
    free(ks);
    if (r->have_bounds) {
        char *bl = embz_arb_lo_string(res->lower, 10);
        char *bh = embz_arb_hi_string(res->upper, 10);
        embz_buf_printf(b, "%-10s %s <= error <= %s   (block masses)\n", "bounds", bl, bh);
        free(bl); free(bh);
    }
    embz_buf_printf(b, "%-10s %s (%s)\n", "method", r->method, r->detail);
    if (r->estimate == r->estimate)
        embz_buf_printf(b, "%-10s %.10g   (double precision, not certified)\n", "estimate",
                        r->estimate);
}

/* All digits when short, else "~d.ddddddddde+N" (truncated, marked as such). */
static char *int_text(const fmpz_t x)
{
    char *s = embz_fmpz_string(x, TABLE_INT_DIGITS);
    if (s[0] == '~' || (slong) fmpz_sizeinbase(x, 10) <= TABLE_INT_DIGITS) return s;
    size_t l = strlen(s) + 2;
    char *t = malloc(l);
    snprintf(t, l, "~%s", s);
    free(s);
    return t;
}

static char *family_label(const embz_family_t f)
{
    embz_buf_t b;
    embz_buf_init(&b);
    embz_buf_printf(&b, "%s", f->name);
    for (long k = 0; k < f->nparams; k++) {
        char *v = fmpq_get_str(NULL, 10, f->param_values + k);
        embz_buf_printf(&b, "%s%s=%s", k ? ", " : " (", f->param_names[k], v);
        flint_free(v);
    }
    if (f->nparams > 0) embz_buf_printf(&b, ")");
    return b.s;
}

/* ---------------------------------------------------------------- fidelity measures */

static const char *measure_meaning(int m)
{
    switch (m) {
    case EMBZ_MEASURE_FIDELITY: return "optimal LOCC fidelity F_max (fidelity = |<a|b>|^2)";
    case EMBZ_MEASURE_PURIFIED: return "purified distance P = sqrt(1 - F_max)";
    case EMBZ_MEASURE_OVERLAP:
        return "best fidelity with local unitaries only, O^2 (O = sum sqrt(p r))";
    default: return "conversion distance K";
    }
}

static void json_ends(embz_buf_t *b, const char *name, const arb_t x)
{
    char *lo = embz_arb_lo_string(x, JSON_DIGITS), *hi = embz_arb_hi_string(x, JSON_DIGITS);
    embz_buf_printf(b, ", \"%s_lo\": ", name);
    embz_buf_json_string(b, lo);
    embz_buf_printf(b, ", \"%s_hi\": ", name);
    embz_buf_json_string(b, hi);
    free(lo); free(hi);
}

static char *params_text(const embz_family_t fam, int json)
{
    embz_buf_t pj;
    embz_buf_init(&pj);
    if (json) embz_buf_printf(&pj, "{");
    for (long k = 0; k < fam->nparams; k++) {
        char *v = fmpq_get_str(NULL, 10, fam->param_values + k);
        if (json) {
            embz_buf_printf(&pj, "%s", k ? ", " : "");
            embz_buf_json_string(&pj, fam->param_names[k]);
            embz_buf_printf(&pj, ": ");
            embz_buf_json_string(&pj, v);
        } else {
            embz_buf_printf(&pj, "%s%s=%s", k ? ";" : "", fam->param_names[k], v);
        }
        flint_free(v);
    }
    if (json) embz_buf_printf(&pj, "}");
    return pj.s;
}

static char *weight_text(const embz_family_t fam)
{
    size_t l = strlen(fam->weight_text) + 32;
    char *w = malloc(l);
    snprintf(w, l, fam->amplitude ? "(%s)^2" : "%s", fam->weight_text);
    return w;
}

static int run_fidelity(const embz_family_t fam, const fmpz_t n, const embz_target_t q,
                        int measure, int method, slong prec, int json, int csv)
{
    embz_err_t err;
    embz_err_clear(&err);
    embz_fidelity_result_t res;
    embz_fidelity_result_init(res);
    int status = embz_fidelity(res, fam, n, q, measure, method, prec, &err);
    if (status != EMBZ_OK) {
        embz_fidelity_result_clear(res);
        return cli_report("error", status, &err);
    }
    const char *mname = embz_measure_name(measure);
    const char *how = res->bounds_only ? "bounds" : "explicit";
    char *ns = fmpz_get_str(NULL, 10, n);
    char *w = weight_text(fam);
    /* lower and upper are exact ends (for bounds tighter than the ball around them) */
    char *lo = embz_arb_lo_string(res->lower, JSON_DIGITS);
    char *hi = embz_arb_hi_string(res->upper, JSON_DIGITS);
    embz_buf_t b;
    embz_buf_init(&b);
    if (json) {
        char *pj = params_text(fam, 1);
        embz_buf_printf(&b, "{\"family\": ");
        embz_buf_json_string(&b, fam->name);
        embz_buf_printf(&b, ", \"params\": %s, \"weight\": ", pj);
        embz_buf_json_string(&b, w);
        embz_buf_printf(&b, ", \"n\": ");
        embz_buf_json_string(&b, ns);
        embz_buf_printf(&b, ", \"target\": ");
        embz_buf_json_string(&b, q->label);
        embz_buf_printf(&b, ", \"measure\": ");
        embz_buf_json_string(&b, mname);
        embz_buf_printf(&b, ", \"meaning\": ");
        embz_buf_json_string(&b, measure_meaning(measure));
        embz_buf_printf(&b, ", \"method\": ");
        embz_buf_json_string(&b, how);
        embz_buf_printf(&b, ", \"bounds_only\": %s", res->bounds_only ? "true" : "false");
        embz_buf_printf(&b, ", \"value\": ");
        if (res->bounds_only) embz_buf_printf(&b, "null");
        else cli_buf_json_double(&b, embz_arb_mid_d(res->value));
        embz_buf_printf(&b, ", \"value_lo\": ");
        embz_buf_json_string(&b, lo);
        embz_buf_printf(&b, ", \"value_hi\": ");
        embz_buf_json_string(&b, hi);
        if (!res->bounds_only) {
            char *c = embz_arb_certified_string(res->value, CERT_DIGITS);
            embz_buf_printf(&b, ", \"value_certified\": ");
            embz_buf_json_string(&b, c);
            free(c);
        }
        if (!res->bounds_only) {
            json_ends(&b, "fidelity", res->fidelity);
            json_ends(&b, "purified", res->purified);
        }
        if (measure == EMBZ_MEASURE_OVERLAP) json_ends(&b, "overlap", res->overlap);
        if (res->bounds_only) json_ends(&b, "K", res->K);
        embz_buf_printf(&b, ", \"detail\": ");
        embz_buf_json_string(&b, res->detail);
        embz_buf_printf(&b, "}\n");
        free(pj);
    } else if (csv) {
        char *pt = params_text(fam, 0);
        embz_buf_printf(&b, "family,params,weight,n,target,measure,bounds_only,value,value_lo,"
                        "value_hi,detail\n");
        const char *f1[] = { fam->name, pt, w, ns, q->label, mname };
        for (int k = 0; k < 6; k++) {
            cli_buf_csv_field(&b, f1[k]);
            embz_buf_printf(&b, ",");
        }
        embz_buf_printf(&b, "%s,", res->bounds_only ? "true" : "false");
        if (!res->bounds_only) embz_buf_printf(&b, "%.17g", embz_arb_mid_d(res->value));
        embz_buf_printf(&b, ",");
        cli_buf_csv_field(&b, lo);
        embz_buf_printf(&b, ",");
        cli_buf_csv_field(&b, hi);
        embz_buf_printf(&b, ",");
        cli_buf_csv_field(&b, res->detail);
        embz_buf_printf(&b, "\n");
        free(pt);
    } else {
        char *label = family_label(fam);
        char *nt = int_text(n);
        embz_buf_printf(&b, "%-10s %s\n", "family", label);
        if (strcmp(fam->name, w) != 0) embz_buf_printf(&b, "%-10s %s\n", "weight", w);
        embz_buf_printf(&b, "%-10s %s\n", "n", nt);
        embz_buf_printf(&b, "%-10s %s\n", "target", q->label);
        embz_buf_printf(&b, "%-10s %s: %s\n", "measure", mname, measure_meaning(measure));
        char *tl = embz_arb_lo_string(res->lower, TABLE_DIGITS);
        char *th = embz_arb_hi_string(res->upper, TABLE_DIGITS);
        if (res->bounds_only) {
            embz_buf_printf(&b, "%-10s BOUNDS ONLY, no value (explicit sizes are n <= %ld)\n",
                            "value", (long) EMBZ_FIDELITY_MAX_N);
            embz_buf_printf(&b, "%-10s %s <= %s <= %s   (from K <= P <= sqrt(K(2-K)))\n",
                            "bounds", tl, mname, th);
            char *kc = embz_arb_certified_string(res->K, CERT_DIGITS);
            embz_buf_printf(&b, "%-10s %s   (conversion distance, certified digits)\n", "K",
                            kc);
            free(kc);
        } else {
            char *c = embz_arb_certified_string(res->value, CERT_DIGITS);
            embz_buf_printf(&b, "%-10s %s   (certified digits)\n", "value", c);
            embz_buf_printf(&b, "%-10s [%s, %s]\n", "enclosure", tl, th);
            free(c);
            if (measure != EMBZ_MEASURE_FIDELITY) {
                char *x = embz_arb_certified_string(res->fidelity, CERT_DIGITS);
                embz_buf_printf(&b, "%-10s %s   (F_max, certified digits)\n", "fidelity", x);
                free(x);
            }
            if (measure != EMBZ_MEASURE_PURIFIED) {
                char *x = embz_arb_certified_string(res->purified, CERT_DIGITS);
                embz_buf_printf(&b, "%-10s %s   (sqrt(1 - F_max), certified digits)\n",
                                "purified", x);
                free(x);
            }
            if (measure == EMBZ_MEASURE_OVERLAP) {
                char *x = embz_arb_certified_string(res->overlap, CERT_DIGITS);
                embz_buf_printf(&b, "%-10s %s   (O = sum sqrt(p r), certified digits)\n",
                                "overlap", x);
                free(x);
            }
        }
        free(tl); free(th);
        embz_buf_printf(&b, "%-10s %s (%s)\n", "method", how, res->detail);
        free(label); free(nt);
    }
    fputs(b.s, stdout);
    embz_buf_clear(&b);
    free(ns); free(w); free(lo); free(hi);
    embz_fidelity_result_clear(res);
    return CLI_EXIT_OK;
}

int cli_cmd_error(int argc, char **argv)
{
    cli_args_t a;
    int pr = cli_parse(&a, &error_spec, argc, argv);
    if (pr != CLI_PARSE_OK) {
        cli_args_clear(&a);
        return pr == CLI_PARSE_HELP ? CLI_EXIT_OK : CLI_EXIT_USAGE;
    }
    int code = CLI_EXIT_OK, status;
    embz_err_t err;
    fmpz_t n;
    embz_family_t fam;
    embz_target_t q;
    embz_error_result_t res;
    long nset = 0;
    const char *const *sets = cli_list(&a, "set", &nset);
    embz_setting_t *settings = calloc((size_t) (nset > 0 ? nset : 1), sizeof(embz_setting_t));
    char **setcopies = calloc((size_t) (nset > 0 ? nset : 1), sizeof(char *));
    long prec = DEFAULT_PREC;
    int method = EMBZ_METHOD_AUTO;

    fmpz_init(n);
    embz_family_init(fam);
    embz_target_init(q);
    embz_error_result_init(res);
    embz_err_clear(&err);

    int json = cli_flag(&a, "json"), csv = cli_flag(&a, "csv");
    const char *size_text = cli_value(&a, "size");
    const char *target_text = cli_value(&a, "target");
    const char *prec_text = cli_value(&a, "prec");
    const char *method_text = cli_value(&a, "method");
    const char *measure_text = cli_value(&a, "measure");
    int measure = EMBZ_MEASURE_K;

    if (json && csv) {
        code = cli_usage_error(&error_spec, "--json and --csv exclude each other");
        goto done;
    }
    if (size_text == NULL) {
        code = cli_usage_error(&error_spec, "the size is required: -n N");
        goto done;
    }
    if (prec_text != NULL && cli_parse_long(&prec, prec_text, 16, 1L << 20)) {
        code = cli_usage_error(&error_spec, "bad precision '%s' (bits, 16 to %ld)", prec_text,
                               1L << 20);
        goto done;
    }
    if (method_text != NULL) {
        if (strcmp(method_text, "auto") == 0) method = EMBZ_METHOD_AUTO;
        else if (strcmp(method_text, "explicit") == 0) method = EMBZ_METHOD_EXPLICIT;
        else if (strcmp(method_text, "analytic") == 0) method = EMBZ_METHOD_ANALYTIC;
        else {
            code = cli_usage_error(&error_spec,
                                   "bad method '%s' (auto, explicit or analytic)", method_text);
            goto done;
        }
    }
    if (measure_text != NULL && embz_measure_parse(&measure, measure_text, &err) != EMBZ_OK) {
        code = cli_usage_error(&error_spec, "%s", err.text);
        goto done;
    }
    status = embz_size_parse(n, size_text, &err);
    if (status != EMBZ_OK) {
        fprintf(stderr, "embz error: bad size '%s': ", size_text);
        char buf[3000];
        embz_err_format(buf, sizeof(buf), &err);
        fprintf(stderr, "%s\n", buf);
        code = cli_exit_code(status);
        goto done;
    }
    if (fmpz_cmp_ui(n, 1) < 0) {
        fprintf(stderr, "embz error: the size n must be at least 1 (got %s)\n", size_text);
        code = CLI_EXIT_USAGE;
        goto done;
    }
    for (long k = 0; k < nset; k++) {
        setcopies[k] = dup(sets[k]);
        status = embz_setting_split(&settings[k], setcopies[k], &err);
        if (status != EMBZ_OK) {
            code = cli_report("error", status, &err);
            goto done;
        }
    }
    status = embz_family_resolve(fam, a.pos[0], settings, nset, cli_flag(&a, "amplitude"),
                                 &err);
    if (status != EMBZ_OK) {
        code = cli_report("error", status, &err);
        goto done;
    }
    if (target_text != NULL) {
        embz_err_clear(&err);
        status = embz_target_parse(q, target_text, 0, &err);
        if (status != EMBZ_OK) {
            char buf[3000];
            embz_err_format(buf, sizeof(buf), &err);
            fprintf(stderr, "embz error: bad target '%s': %s\n", target_text, buf);
            code = cli_exit_code(status);
            goto done;
        }
    }

    embz_err_clear(&err);
    if (measure != EMBZ_MEASURE_K) {
        code = run_fidelity(fam, n, q, measure, method, prec, json, csv);
        goto done;
    }
    status = embz_error(res, fam, n, q, method, prec, &err);
    if (status != EMBZ_OK) {
        code = cli_report("error", status, &err);
        goto done;
    }

    row_t r;
    memset(&r, 0, sizeof(r));
    r.label = family_label(fam);
    r.family = dup(fam->name);
    {
        embz_buf_t pj, pt;
        embz_buf_init(&pj);
        embz_buf_init(&pt);
        embz_buf_printf(&pj, "{");
        for (long k = 0; k < fam->nparams; k++) {
            char *v = fmpq_get_str(NULL, 10, fam->param_values + k);
            embz_buf_printf(&pt, "%s%s=%s", k ? ";" : "", fam->param_names[k], v);
            embz_buf_printf(&pj, "%s", k ? ", " : "");
            embz_buf_json_string(&pj, fam->param_names[k]);
            embz_buf_printf(&pj, ": ");
            embz_buf_json_string(&pj, v);
            flint_free(v);
        }
        embz_buf_printf(&pj, "}");
        r.params_json = pj.s;
        r.params_text = pt.s;
    }
    r.weight = dup(fam->weight_text);
    if (fam->amplitude) {
        free(r.weight);
        size_t l = strlen(fam->weight_text) + 32;
        r.weight = malloc(l);
        snprintf(r.weight, l, "(%s)^2", fam->weight_text);
    }
    r.n = fmpz_get_str(NULL, 10, n);
    r.target = dup(q->label);
    r.method = dup(method_name(res->method));
    r.cert = embz_arb_certified_string(res->error, CERT_DIGITS);
    r.lo = embz_arb_lo_string(res->error, JSON_DIGITS);
    r.hi = embz_arb_hi_string(res->error, JSON_DIGITS);
    r.argk = fmpz_get_str(NULL, 10, res->argk);
    r.have_bounds = res->have_bounds;
    if (r.have_bounds) {
        r.blo = embz_arb_lo_string(res->lower, JSON_DIGITS);
        r.bhi = embz_arb_hi_string(res->upper, JSON_DIGITS);
    }
    r.detail = dup(res->detail);
    r.mid = embz_arb_mid_d(res->error);
    r.radius = cli_arb_radius_d(res->error);
    r.estimate = res->estimate;

    embz_buf_t out;
    embz_buf_init(&out);
    if (json) emit_json(&out, &r);
    else if (csv) emit_csv(&out, &r);
    else emit_table(&out, &r, res, n);
    fputs(out.s, stdout);
    embz_buf_clear(&out);
    row_clear(&r);

done:
    for (long k = 0; k < nset; k++) free(setcopies[k]);
    free(setcopies);
    free(settings);
    embz_error_result_clear(res);
    embz_target_clear(q);
    embz_family_clear(fam);
    fmpz_clear(n);
    cli_args_clear(&a);
    return code;
}
