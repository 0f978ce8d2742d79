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
    "double-precision value without guarantee.\n",
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
