/* embz error FAMILY -n N: the certified embezzlement error E_n(q) of a family. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "cli.h"

static const cli_opt_t error_opts[] = {
    { "size", 'n', CLI_VALUE, "N", "size n of the state: 1000, 1e6, 10^6, 2^20 (required)" },
    { "target", 't', CLI_VALUE, "T",
      "target state: ebit (default), ebits:J, uniform:D, or a list/file of numbers" },
    CLI_OPT_PREC_ONE("; more bits show more certified digits"),
    { "method", 'm', CLI_VALUE, "M", "auto (default), explicit or analytic" },
    { "measure", 0, CLI_VALUE, "M",
      "k (default: the distance K), fidelity, purified or overlap" },
    CLI_OPT_SET,
    CLI_OPT_AMPLITUDE,
    CLI_OPT_JSON,
    { "csv", 0, CLI_FLAG, NULL, "print a CSV header line and one row" },
    { "vs-optimal", 0, CLI_FLAG, NULL,
      "also the optimum at rank n, the ratio to it and the extra qubits per side" },
    CLI_OPT_END
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
    "unitaries only. These are values for n up to 2^20. Beyond, for uniform targets (ebit,\n"
    "ebits:J with J <= 8, uniform:D with D <= 256) and weights that are eventually\n"
    "non-increasing, the analytic engine certifies the overlap, and fidelity and purified\n"
    "where its two-sided bounds meet; elsewhere fidelity and purified are certified BOUNDS\n"
    "from K (K <= P <= sqrt(K(2-K))), marked as such, with tighter ones when available.\n"
    "--vs-optimal (uniform targets; with --measure fidelity|purified|overlap: the best value\n"
    "of that measure at rank n, and the rank from which the optimal state reaches the\n"
    "family's value, with the extra qubits per side). For K: the smallest error any state of rank n\n"
    "reaches (embz optimal), E_n divided by it, and the qubits per side the optimal state\n"
    "needs for the same error against ceil(log2 n).\n",
    error_opts, 1, 1
};

#define DEFAULT_PREC EMBZ_PREC_ONE
#define JSON_DIGITS_DEFAULT 45
#define TABLE_DIGITS 20
#define CERT_DIGITS_DEFAULT 30
/* digits shown: the defaults at the default precision, and about as many more as the extra
 * bits carry above it (only certified digits are ever printed), so that --prec 1000 shows
 * the hundred digits it buys instead of the same 30 */
static long cert_digits = CERT_DIGITS_DEFAULT, json_digits = JSON_DIGITS_DEFAULT;
#define CERT_DIGITS cert_digits
#define JSON_DIGITS json_digits
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
    char *vs_json, *vs_csv_head, *vs_csv, *vs_text;   /* --vs-optimal, else NULL */
    double mid, radius, estimate;
    int have_bounds;
} row_t;

static void row_clear(row_t *r)
{
    free(r->label); free(r->params_json); free(r->params_text);
    free(r->family); free(r->weight); free(r->n); free(r->target); free(r->method);
    free(r->cert); free(r->lo); free(r->hi); free(r->argk); free(r->blo); free(r->bhi);
    free(r->detail);
    free(r->vs_json); free(r->vs_csv_head); free(r->vs_csv); free(r->vs_text);
}

static void emit_json(embz_buf_t *b, const row_t *r)
{
    embz_buf_printf(b, "{\"family\": ");
    embz_buf_json_string(b, r->family);
    embz_buf_printf(b, ", \"params\": %s", r->params_json);
    const char *head[4][2] = { { "weight", r->weight }, { "n", r->n }, { "target", r->target },
                               { "method", r->method } };
    for (int k = 0; k < 4; k++) cli_buf_json_key_string(b, head[k][0], head[k][1]);
    embz_buf_printf(b, ", \"measure\": \"k\", \"bounds_only\": false");
    cli_buf_json_key_double(b, "error", r->mid);
    cli_buf_json_key_string(b, "error_lo", r->lo);
    cli_buf_json_key_string(b, "error_hi", r->hi);
    cli_buf_json_key_string(b, "error_certified", r->cert);
    cli_buf_json_key_double(b, "radius", r->radius);
    cli_buf_json_key_string(b, "argmax", r->argk);
    cli_buf_json_key_double(b, "estimate", r->estimate);
    if (r->have_bounds) {
        cli_buf_json_key_string(b, "bound_lo", r->blo);
        cli_buf_json_key_string(b, "bound_hi", r->bhi);
    }
    cli_buf_json_key_string(b, "detail", r->detail);
    if (r->vs_json != NULL) embz_buf_printf(b, "%s", r->vs_json);
    embz_buf_printf(b, "}\n");
}

static void emit_csv(embz_buf_t *b, const row_t *r)
{
    embz_buf_printf(b, "family,params,weight,n,target,method,error,error_lo,error_hi,error_certified,"
                    "radius,argmax,estimate,bound_lo,bound_hi,detail%s\n",
                    r->vs_csv_head != NULL ? r->vs_csv_head : "");
    const char *fields1[] = { r->family, r->params_text, r->weight, r->n, r->target,
                              r->method };
    cli_buf_csv_fields(b, fields1, 6);
    embz_buf_printf(b, "%.17g,", r->mid);
    const char *fields2[] = { r->lo, r->hi };
    cli_buf_csv_fields(b, fields2, 2);
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
    if (r->vs_csv != NULL) embz_buf_printf(b, "%s", r->vs_csv);
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
    if (fmpz_sgn(res->argk) > 0)   /* (none for a target vector searched by thresholds) */
        embz_buf_printf(b, "%-10s %s   (Ky Fan index of the largest proven value)\n",
                        "argmax k", ks);
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
    if (r->vs_text != NULL) embz_buf_printf(b, "%s", r->vs_text);
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
    char key[64];
    snprintf(key, sizeof(key), "%s_lo", name);
    cli_buf_json_key_string(b, key, lo);
    snprintf(key, sizeof(key), "%s_hi", name);
    cli_buf_json_key_string(b, key, hi);
    free(lo); free(hi);
}

static char *params_text(const embz_family_t fam, int json)
{
    embz_buf_t pj;
    embz_buf_init(&pj);
    if (json) {
        cli_buf_json_params(&pj, fam);
        return pj.s;
    }
    for (long k = 0; k < fam->nparams; k++) {
        char *v = fmpq_get_str(NULL, 10, fam->param_values + k);
        embz_buf_printf(&pj, "%s%s=%s", k ? ";" : "", fam->param_names[k], v);
        flint_free(v);
    }
    return pj.s;
}

static char *weight_text(const embz_family_t fam)
{
    size_t l = strlen(fam->weight_text) + 32;
    char *w = malloc(l);
    snprintf(w, l, fam->amplitude ? "(%s)^2" : "%s", fam->weight_text);
    return w;
}

static char *rank_range(const fmpz_t a, const fmpz_t b);
static char *slong_range(slong a, slong b);

static int run_fidelity(const embz_family_t fam, const fmpz_t n, const embz_target_t q,
                        int measure, int method, slong prec, int json, int csv, int vs)
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
    /* --vs-optimal: the optimum at rank n and the rank at which it reaches this value */
    embz_optimal_fid_vs_t v;
    embz_optimal_fid_vs_init(v);
    char *vlo = NULL, *vhi = NULL, *vc = NULL, *vrk = NULL, *voq = NULL, *vex = NULL;
    if (vs) {
        status = embz_optimal_fid_vs(v, res->lower, res->upper, n, q, measure, &err);
        if (status != EMBZ_OK) {
            embz_optimal_fid_vs_clear(v);
            embz_fidelity_result_clear(res);
            return cli_report("error", status, &err);
        }
        vlo = embz_arb_lo_string(v->opt->value, JSON_DIGITS);
        vhi = embz_arb_hi_string(v->opt->value, JSON_DIGITS);
        vc = embz_arb_certified_string(v->opt->value, CERT_DIGITS);
        if (v->have_rank) {
            vrk = rank_range(v->rank_lo, v->rank_hi);
            voq = slong_range(v->opt_qubits_lo, v->opt_qubits_hi);
            vex = slong_range(v->qubits - v->opt_qubits_hi, v->qubits - v->opt_qubits_lo);
        }
    }
    const char *mname = embz_measure_name(measure);
    const char *how = res->bounds_only ? "bounds" : res->how.analytic ? "analytic" : "explicit";
    char *ns = fmpz_get_str(NULL, 10, n);
    char *w = weight_text(fam);
    char *detail = embz_fidelity_how_text(&res->how);
    /* lower and upper are exact ends (for bounds tighter than the ball around them) */
    char *lo = embz_arb_lo_string(res->lower, JSON_DIGITS);
    char *hi = embz_arb_hi_string(res->upper, JSON_DIGITS);
    embz_buf_t b;
    embz_buf_init(&b);
    if (json) {
        char *pj = params_text(fam, 1);
        embz_buf_printf(&b, "{\"family\": ");
        embz_buf_json_string(&b, fam->name);
        embz_buf_printf(&b, ", \"params\": %s", pj);
        const char *head[6][2] = { { "weight", w }, { "n", ns }, { "target", q->label },
                                   { "measure", mname }, { "meaning", measure_meaning(measure) },
                                   { "method", how } };
        for (int k = 0; k < 6; k++) cli_buf_json_key_string(&b, head[k][0], head[k][1]);
        embz_buf_printf(&b, ", \"bounds_only\": %s", res->bounds_only ? "true" : "false");
        /* NaN is written as null */
        cli_buf_json_key_double(&b, "value", res->bounds_only ? NAN : embz_arb_mid_d(res->value));
        cli_buf_json_key_string(&b, "value_lo", lo);
        cli_buf_json_key_string(&b, "value_hi", hi);
        if (!res->bounds_only) {
            char *c = embz_arb_certified_string(res->value, CERT_DIGITS);
            cli_buf_json_key_string(&b, "value_certified", c);
            free(c);
        }
        if (!res->bounds_only && res->how.analytic != 1) {
            json_ends(&b, "fidelity", res->fidelity);
            json_ends(&b, "purified", res->purified);
        }
        if (measure == EMBZ_MEASURE_OVERLAP) json_ends(&b, "overlap", res->overlap);
        if (res->bounds_only) json_ends(&b, "K", res->K);
        if (res->bounds_only && res->have_tight) {
            char *a = embz_arb_lo_string(res->tight_lo, JSON_DIGITS);
            char *z = embz_arb_hi_string(res->tight_hi, JSON_DIGITS);
            cli_buf_json_key_string(&b, "tight_lo", a);
            cli_buf_json_key_string(&b, "tight_hi", z);
            free(a); free(z);
        }
        cli_buf_json_key_string(&b, "detail", detail);
        if (vs) {
            cli_buf_json_key_string(&b, "optimum_lo", vlo);
            cli_buf_json_key_string(&b, "optimum_hi", vhi);
            cli_buf_json_key_string(&b, "optimum_certified", vc);
            embz_buf_printf(&b, ", \"qubits_per_side\": %ld", (long) v->qubits);
            if (v->have_rank) {
                char *a1 = fmpz_get_str(NULL, 10, v->rank_lo), *a2 = fmpz_get_str(NULL, 10, v->rank_hi);
                cli_buf_json_key_string(&b, "optimal_rank_lo", a1);
                cli_buf_json_key_string(&b, "optimal_rank_hi", a2);
                flint_free(a1); flint_free(a2);
                embz_buf_printf(&b, ", \"extra_qubits_lo\": %ld, \"extra_qubits_hi\": %ld",
                                (long) (v->qubits - v->opt_qubits_hi),
                                (long) (v->qubits - v->opt_qubits_lo));
            }
        }
        embz_buf_printf(&b, "}\n");
        free(pj);
    } else if (csv) {
        char *pt = params_text(fam, 0);
        embz_buf_printf(&b, "family,params,weight,n,target,measure,bounds_only,value,value_lo,"
                        "value_hi,detail%s\n", vs ? ",optimum_lo,optimum_hi,extra_qubits_lo,"
                        "extra_qubits_hi" : "");
        const char *f1[] = { fam->name, pt, w, ns, q->label, mname };
        cli_buf_csv_fields(&b, f1, 6);
        embz_buf_printf(&b, "%s,", res->bounds_only ? "true" : "false");
        if (!res->bounds_only) embz_buf_printf(&b, "%.17g", embz_arb_mid_d(res->value));
        embz_buf_printf(&b, ",");
        const char *f2[] = { lo, hi };
        cli_buf_csv_fields(&b, f2, 2);
        cli_buf_csv_field(&b, detail);
        if (vs) {
            embz_buf_printf(&b, ",%s,%s,", vlo, vhi);
            if (v->have_rank)
                embz_buf_printf(&b, "%ld,%ld", (long) (v->qubits - v->opt_qubits_hi),
                                (long) (v->qubits - v->opt_qubits_lo));
            else
                embz_buf_printf(&b, ",");
        }
        embz_buf_printf(&b, "\n");
        free(pt);
    } else {
        char *label = cli_family_label(fam);
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
            if (res->have_tight) {
                char *a = embz_arb_lo_string(res->tight_lo, TABLE_DIGITS);
                char *z = embz_arb_hi_string(res->tight_hi, TABLE_DIGITS);
                embz_buf_printf(&b, "%-10s %s <= %s <= %s   (LOCC fidelity bounds: exact hull "
                                "of the first %ld positions, s = p and Lagrange multipliers "
                                "beyond)\n", "tighter", a, mname, z, (long) res->how.terms);
                free(a); free(z);
            }
        } else {
            char *c = embz_arb_certified_string(res->value, CERT_DIGITS);
            embz_buf_printf(&b, "%-10s %s   (certified digits)\n", "value", c);
            embz_buf_printf(&b, "%-10s [%s, %s]\n", "enclosure", tl, th);
            free(c);
            if (measure != EMBZ_MEASURE_FIDELITY && res->how.analytic != 1) {
                char *x = embz_arb_certified_string(res->fidelity, CERT_DIGITS);
                embz_buf_printf(&b, "%-10s %s   (F_max, certified digits)\n", "fidelity", x);
                free(x);
            }
            if (measure != EMBZ_MEASURE_PURIFIED && res->how.analytic != 1) {
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
        embz_buf_printf(&b, "%-10s %s (%s)\n", "method", how, detail);
        if (vs) {
            embz_buf_printf(&b, "%-10s %s   (the best %s any state of rank n reaches; embz "
                            "optimal --measure %s)\n", "optimum", vc, mname, mname);
            if (v->have_rank)
                embz_buf_printf(&b, "%-10s %ld per side; the optimal state reaches this value "
                                "from rank %s (%s per side): %s extra per side\n", "qubits",
                                (long) v->qubits, vrk, voq, vex);
        }
        free(label); free(nt);
    }
    fputs(b.s, stdout);
    embz_buf_clear(&b);
    free(ns); free(w); free(lo); free(hi); free(detail);
    free(vlo); free(vhi); free(vc); free(vrk); free(voq); free(vex);
    embz_optimal_fid_vs_clear(v);
    embz_fidelity_result_clear(res);
    return CLI_EXIT_OK;
}

/* ---------------------------------------------------------------- --vs-optimal */

static char *rank_range(const fmpz_t a, const fmpz_t b)
{
    char *x = int_text(a), *y = int_text(b), *s;
    if (fmpz_equal(a, b)) s = embz_strdup_printf("%s", x);
    else s = embz_strdup_printf("[%s, %s]", x, y);
    free(x); free(y);
    return s;
}

static char *slong_range(slong a, slong b)
{
    return a == b ? embz_strdup_printf("%ld", (long) a)
                  : embz_strdup_printf("%ld..%ld", (long) a, (long) b);
}

/* the optimum at rank n, E / OPT and the extra qubits per side, as texts of the row */
static int vs_optimal(row_t *r, const arb_t error, const fmpz_t n, const embz_target_t q)
{
    embz_optimal_vs_t v;
    embz_optimal_vs_init(v);
    embz_err_t err;
    embz_err_clear(&err);
    int status = embz_optimal_vs(v, error, n, q, &err);
    if (status != EMBZ_OK) {
        embz_optimal_vs_clear(v);
        return cli_report("error", status, &err);
    }
    arb_t o;
    arb_init(o);
    arb_set_fmpq(o, v->opt, 4 * CERT_DIGITS + 64);
    char *oc = embz_arb_certified_string(o, CERT_DIGITS);
    char *of = fmpq_get_str(NULL, 10, v->opt);
    char *rl = embz_arb_lo_string(v->ratio, 12), *rh = embz_arb_hi_string(v->ratio, 12);
    char *rc = embz_arb_certified_string(v->ratio, 12);
    char *rk = v->have_rank ? rank_range(v->rank_lo, v->rank_hi) : NULL;
    char *oq = v->have_rank ? slong_range(v->opt_qubits_lo, v->opt_qubits_hi) : NULL;
    char *ex = v->have_rank ? slong_range(v->qubits - v->opt_qubits_hi,
                                          v->qubits - v->opt_qubits_lo) : NULL;
    embz_buf_t b;
    embz_buf_init(&b);
    if (strlen(of) <= 60)
        embz_buf_printf(&b, "%-10s %s = %s   (the best any state of rank n reaches; embz "
                        "optimal)\n", "optimum", of, oc);
    else
        embz_buf_printf(&b, "%-10s %s   (the best any state of rank n reaches; embz optimal)\n",
                        "optimum", oc);
    embz_buf_printf(&b, "%-10s %s   (error / optimum, certified digits)\n", "ratio", rc);
    if (v->have_rank)
        embz_buf_printf(&b, "%-10s %ld per side; the optimal state reaches this error from rank "
                        "%s (%s per side): %s extra per side\n", "qubits", (long) v->qubits,
                        rk, oq, ex);
    r->vs_text = b.s;
    embz_buf_init(&b);
    cli_buf_json_key_string(&b, "optimum", of);
    cli_buf_json_key_string(&b, "optimum_certified", oc);
    cli_buf_json_key_string(&b, "ratio_lo", rl);
    cli_buf_json_key_string(&b, "ratio_hi", rh);
    embz_buf_printf(&b, ", \"qubits_per_side\": %ld", (long) v->qubits);
    if (v->have_rank) {
        char *a1 = fmpz_get_str(NULL, 10, v->rank_lo), *a2 = fmpz_get_str(NULL, 10, v->rank_hi);
        cli_buf_json_key_string(&b, "optimal_rank_lo", a1);
        cli_buf_json_key_string(&b, "optimal_rank_hi", a2);
        flint_free(a1); flint_free(a2);
        embz_buf_printf(&b, ", \"extra_qubits_lo\": %ld, \"extra_qubits_hi\": %ld",
                        (long) (v->qubits - v->opt_qubits_hi), (long) (v->qubits - v->opt_qubits_lo));
    }
    r->vs_json = b.s;
    r->vs_csv_head = cli_strdup(",optimum,ratio_lo,ratio_hi,extra_qubits_lo,extra_qubits_hi");
    embz_buf_init(&b);
    embz_buf_printf(&b, ",");
    cli_buf_csv_field(&b, of);
    embz_buf_printf(&b, ",%s,%s,", rl, rh);
    if (v->have_rank)
        embz_buf_printf(&b, "%ld,%ld", (long) (v->qubits - v->opt_qubits_hi),
                        (long) (v->qubits - v->opt_qubits_lo));
    else
        embz_buf_printf(&b, ",");
    r->vs_csv = b.s;
    free(oc); flint_free(of); free(rl); free(rh); free(rc); free(rk); free(oq); free(ex);
    arb_clear(o);
    embz_optimal_vs_clear(v);
    return CLI_EXIT_OK;
}

int cli_cmd_error(int argc, char **argv)
{
    cli_args_t a;
    int code, status;
    if (!cli_begin(&a, &error_spec, argc, argv, &code)) return code;
    embz_err_t err;
    fmpz_t n;
    embz_family_t fam;
    embz_target_t q;
    embz_error_result_t res;
    long prec = DEFAULT_PREC;
    int method = EMBZ_METHOD_AUTO;

    fmpz_init(n);
    embz_family_init(fam);
    embz_target_init(q);
    embz_error_result_init(res);
    embz_err_clear(&err);

    int json = cli_flag(&a, "json"), csv = cli_flag(&a, "csv");
    const char *size_text = cli_value(&a, "size");
    const char *method_text = cli_value(&a, "method");
    const char *measure_text = cli_value(&a, "measure");
    int measure = EMBZ_MEASURE_K;
    int vs = cli_flag(&a, "vs-optimal");

    if (json && csv) {
        code = cli_usage_error(&error_spec, "--json and --csv exclude each other");
        goto done;
    }
    if (size_text == NULL) {
        code = cli_usage_error(&error_spec, "the size is required: -n N");
        goto done;
    }
    if ((code = cli_load_prec(&prec, &a, &error_spec)) != 0) goto done;
    if (prec > DEFAULT_PREC) {
        cert_digits = CERT_DIGITS_DEFAULT + (long) ((prec - DEFAULT_PREC) * 0.30103);
        json_digits = JSON_DIGITS_DEFAULT + (long) ((prec - DEFAULT_PREC) * 0.30103);
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
    if ((code = cli_load_size(n, size_text, NULL, &error_spec)) != CLI_EXIT_OK) goto done;
    if (fmpz_cmp_ui(n, 1) < 0) {
        fprintf(stderr, "embz error: the size n must be at least 1 (got %s)\n", size_text);
        code = CLI_EXIT_USAGE;
        goto done;
    }
    if ((code = cli_load_family(fam, &a, a.pos[0], "error")) != 0
        || (code = cli_load_target(q, &a, "error")) != 0)
        goto done;

    embz_err_clear(&err);
    if (vs && (q->kind != EMBZ_TARGET_UNIFORM || embz_family_is_levels(fam))) {
        fprintf(stderr, "embz error: --vs-optimal compares the %s for uniform targets "
                "(ebit, ebits:J, uniform:D) and families whose n is the Schmidt rank%s\n",
                measure == EMBZ_MEASURE_K ? "distance K" : "measure with its optimum",
                embz_family_is_levels(fam) ? " (a level family's n counts copies or sites)" : "");
        code = CLI_EXIT_USAGE;
        goto done;
    }
    if (measure != EMBZ_MEASURE_K) {
        code = run_fidelity(fam, n, q, measure, method, prec, json, csv, vs);
        goto done;
    }
    status = embz_error(res, fam, n, q, method, prec, &err);
    if (status != EMBZ_OK) {
        code = cli_report("error", status, &err);
        goto done;
    }

    row_t r;
    memset(&r, 0, sizeof(r));
    r.label = cli_family_label(fam);
    r.family = cli_strdup(fam->name);
    r.params_json = params_text(fam, 1);
    r.params_text = params_text(fam, 0);
    r.weight = weight_text(fam);
    r.n = fmpz_get_str(NULL, 10, n);
    r.target = cli_strdup(q->label);
    r.method = cli_strdup(method_name(res->method));
    r.cert = embz_arb_certified_string(res->error, CERT_DIGITS);
    r.lo = embz_arb_lo_string(res->error, JSON_DIGITS);
    r.hi = embz_arb_hi_string(res->error, JSON_DIGITS);
    r.argk = fmpz_get_str(NULL, 10, res->argk);
    r.have_bounds = res->have_bounds;
    if (r.have_bounds) {
        r.blo = embz_arb_lo_string(res->lower, JSON_DIGITS);
        r.bhi = embz_arb_hi_string(res->upper, JSON_DIGITS);
    }
    r.detail = embz_error_how_text(&res->how);
    r.mid = embz_arb_mid_d(res->error);
    r.radius = cli_arb_radius_d(res->error);
    r.estimate = res->estimate;
    if (vs && (code = vs_optimal(&r, res->error, n, q)) != CLI_EXIT_OK) {
        row_clear(&r);
        goto done;
    }

    embz_buf_t out;
    embz_buf_init(&out);
    if (json) emit_json(&out, &r);
    else if (csv) emit_csv(&out, &r);
    else emit_table(&out, &r, res, n);
    fputs(out.s, stdout);
    embz_buf_clear(&out);
    row_clear(&r);

done:
    embz_error_result_clear(res);
    embz_target_clear(q);
    embz_family_clear(fam);
    fmpz_clear(n);
    cli_args_clear(&a);
    return code;
}

/* the option table, for the shell completion (completion.c) */
const cli_spec_t *const cli_spec_error = &error_spec;
