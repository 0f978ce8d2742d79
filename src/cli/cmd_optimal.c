/* embz optimal -n N: the smallest embezzlement error any state of Schmidt rank n reaches for
 * a uniform target, certified, with how it is known and (on request) the state; --eps E: the
 * smallest rank for an error goal. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "cli.h"

static const cli_opt_t optimal_opts[] = {
    { "size", 'n', CLI_VALUE, "N", "Schmidt rank n: 1000, 1e6, 10^6, 2^20" },
    { "eps", 'e', CLI_VALUE, "E", "instead of -n: the smallest rank whose optimum is at most E" },
    { "target", 't', CLI_VALUE, "T", "target state: ebit (default), ebits:J or uniform:D" },
    { "measure", 0, CLI_VALUE, "M",
      "k (default: the distance K), fidelity (F_max), purified (sqrt(1 - F_max)) or overlap "
      "(O^2, local unitaries only)" },
    { "method", 'm', CLI_VALUE, "M",
      "closed (default: the proven closed form, any n) or lp (the certified linear program)" },
    { "start", 0, CLI_VALUE, "S",
      "lp: equal (default: every Ky Fan constraint tight) or solver (GLPK's own start)" },
    { "state", 0, CLI_VALUE, "FILE",
      "write the optimal Schmidt vector (exact fractions, one per line) to FILE" },
    { "output", 'o', CLI_VALUE, "FILE", "write the result to FILE instead of standard output" },
    CLI_OPT_JSON,
    { "csv", 0, CLI_FLAG, NULL, "print a CSV header line and one row" },
    CLI_OPT_END
};

static const cli_spec_t optimal_spec = {
    "optimal", "-n N | --eps E",
    "The optimal baseline: OPT_n = the smallest embezzlement error K(p -> p (x) q) that any\n"
    "state of Schmidt rank at most n reaches for the target q (uniform targets); with\n"
    "--measure fidelity, purified or overlap the best value of that measure instead.",
    "--method closed: OPT_n(u_d) = 1/psi_d(n), psi_d(n) = j + 1 + n/(d^j (d - 1)),\n"
    "j = floor(log_d n), exact at every n (proof in docs/optimal.md); the optimal state has\n"
    "Schmidt probabilities proportional to d^(-ceil(log_d i)) (for one ebit the family\n"
    "'dyadic'). --method lp: the linear program over sorted vectors, solved by GLPK and\n"
    "certified in exact rationals (a rounded primal whose error is recomputed: upper end; a\n"
    "dual whose equations hold exactly: lower end), for n <= 10^6 (about 4 s and 1.7 GB at 10^6); it is\n"
    "an independent check of the closed form. The optimum is printed as an exact fraction\n"
    "or as certified bounds [lower, upper], never as an unchecked float.\n"
    "--state FILE writes the state (n <= 10^6) in the vector form 'embz convert' and\n"
    "--target read. OPT_n never increases with n (a zero appended to p changes no Ky Fan\n"
    "norm), so --eps E gives the smallest rank n with OPT_n <= E, and every larger rank\n"
    "reaches E too; qubits per side are ceil(log2 n).\n"
    "--measure fidelity|overlap: the largest F_max(p -> p (x) u_d) (LOCC) and the largest O^2\n"
    "(local unitaries only) over states of rank n are one number, lambda^2/d with lambda the\n"
    "largest eigenvalue of the tree matrix of the sorted product (docs/optimal.md, section 6);\n"
    "--measure purified: the smallest sqrt(1 - F_max). Printed as a certified enclosure: the\n"
    "exact overlap of an explicit state (the Perron vector rounded) and a Lagrange bound that\n"
    "holds for every state, for n < 2^1000 (node by node up to 2^22, beyond by classes of\n"
    "equal subtrees); --state writes that state (n <= 10^6). It is not the K-optimal state:\n"
    "other values on the blocks (d^(t-1), d^t], and in general not constant on them (it is\n"
    "at n = d^L).\n"
    "--eps E --measure purified: the smallest rank whose best purified distance is <= E\n"
    "(searched in n < 2^1000; a bracket if E falls inside an enclosure).\n",
    optimal_opts, 0, 0
};

#define STATE_MAX_N 1000000L
#define DIGITS 30
#define FRACTION_MAX 60

static char *fmpq_dec(const fmpq_t x, int side)   /* side -1 lower, +1 upper, 0 certified */
{
    arb_t b;
    arb_init(b);
    arb_set_fmpq(b, x, 4 * DIGITS + 64);
    char *s = side < 0 ? embz_arb_lo_string(b, DIGITS)
              : side > 0 ? embz_arb_hi_string(b, DIGITS) : embz_arb_certified_string(b, DIGITS);
    arb_clear(b);
    return s;
}

static char *fmpq_frac(const fmpq_t x)
{
    char *f = fmpq_get_str(NULL, 10, x);
    char *s = cli_strdup(f);
    flint_free(f);
    return s;
}

static char *int_text(const fmpz_t n)
{
    return embz_fmpz_string(n, 60);
}

/* the state as exact fractions, one per line, after a comment */
static int write_state(const char *path, const embz_qvec_t p, const embz_target_t q,
                       const char *ntext, const char *value)
{
    embz_buf_t b;
    embz_buf_init(&b);
    embz_buf_printf(&b, "# Schmidt probabilities of a state of rank %s whose embezzlement error "
                    "for %s is %s (embz optimal)\n", ntext, q->label, value);
    for (slong i = 0; i < p->len; i++) {
        char *s = fmpq_get_str(NULL, 10, p->p + i);
        embz_buf_printf(&b, "%s\n", s);
        flint_free(s);
    }
    embz_err_t err;
    embz_err_clear(&err);
    int status = embz_write_atomic(path, b.s, b.len, &err);
    embz_buf_clear(&b);
    if (status != EMBZ_OK) return cli_report("optimal", status, &err);
    return CLI_EXIT_OK;
}

static int emit(const char *out, embz_buf_t *b)
{
    if (out == NULL) {
        fputs(b->s, stdout);
        return CLI_EXIT_OK;
    }
    embz_err_t err;
    embz_err_clear(&err);
    int status = embz_write_atomic(out, b->s, b->len, &err);
    if (status != EMBZ_OK) return cli_report("optimal", status, &err);
    return CLI_EXIT_OK;
}

static void qubits_text(char *buf, size_t len, const fmpz_t n)
{
    /* a rank-n state needs ceil(log2 n) qubits per side */
    slong qb = fmpz_cmp_ui(n, 1) <= 0 ? 0 : fmpz_clog_ui(n, 2);
    snprintf(buf, len, "%ld", (long) qb);
}

static int run_eps(const char *eps_text, const embz_target_t q, int json, int csv,
                   const char *out)
{
    fmpq_t eps, a, b;
    fmpz_t n, m;
    fmpq_init(eps); fmpq_init(a); fmpq_init(b);
    fmpz_init(n); fmpz_init(m);
    int code = CLI_EXIT_OK;
    embz_err_t err;
    embz_err_clear(&err);
    if (embz_number_parse(eps, eps_text) != EMBZ_OK || fmpq_sgn(eps) <= 0) {
        code = cli_usage_error(&optimal_spec, "bad error goal '%.80s' (a positive exact "
                               "number, e.g. 0.05 or 1/20)", eps_text);
        goto done;
    }
    int status = embz_optimal_eps(n, eps, q, &err);
    if (status != EMBZ_OK) {
        code = cli_report("optimal", status, &err);
        goto done;
    }
    embz_optimal_result_t r;
    embz_optimal_result_init(r);
    embz_optimal_closed(r, n, q, NULL);
    fmpq_set(a, r->upper);
    int have_prev = fmpz_cmp_ui(n, 1) > 0;
    if (have_prev) {
        fmpz_sub_ui(m, n, 1);
        embz_optimal_closed(r, m, q, NULL);
        fmpq_set(b, r->upper);
    }
    embz_optimal_result_clear(r);
    char *ns = int_text(n), *ad = fmpq_dec(a, 0), *bd = have_prev ? fmpq_dec(b, 0) : NULL;
    char *af = fmpq_frac(a);
    char qb[32];
    qubits_text(qb, sizeof(qb), n);
    embz_buf_t o;
    embz_buf_init(&o);
    if (json) {
        embz_buf_printf(&o, "{\"goal\": ");
        embz_buf_json_string(&o, eps_text);
        cli_buf_json_key_string(&o, "target", q->label);
        cli_buf_json_key_string(&o, "n", ns);
        embz_buf_printf(&o, ", \"qubits_per_side\": %s", qb);
        cli_buf_json_key_string(&o, "optimum_at_n", af);
        cli_buf_json_key_string(&o, "optimum_at_n_certified", ad);
        if (have_prev) cli_buf_json_key_string(&o, "optimum_at_n_minus_1_certified", bd);
        cli_buf_json_key_string(&o, "how", "closed form; OPT_n is non-increasing in n");
        embz_buf_printf(&o, "}\n");
    } else if (csv) {
        embz_buf_printf(&o, "goal,target,n,qubits_per_side,optimum_at_n,optimum_at_n_minus_1\n");
        const char *f[] = { eps_text, q->label, ns, qb, ad };
        cli_buf_csv_fields(&o, f, 5);
        cli_buf_csv_field(&o, have_prev ? bd : "");
        embz_buf_printf(&o, "\n");
    } else {
        embz_buf_printf(&o, "%-10s OPT_n <= %s\n", "goal", eps_text);
        embz_buf_printf(&o, "%-10s %s\n", "target", q->label);
        embz_buf_printf(&o, "%-10s %s   (the smallest rank any state needs)\n", "n", ns);
        embz_buf_printf(&o, "%-10s %s per side (ceil(log2 n))\n", "qubits", qb);
        if (strlen(af) <= FRACTION_MAX)
            embz_buf_printf(&o, "%-10s %s = %s   (exact)\n", "OPT_n", af, ad);
        else
            embz_buf_printf(&o, "%-10s %s   (certified digits of an exact fraction)\n", "OPT_n", ad);
        if (have_prev) {
            /* the comparison is exact; the fraction shows it when short */
            char *bf = fmpq_frac(b);
            if (strlen(bf) <= FRACTION_MAX)
                embz_buf_printf(&o, "%-10s %s = %s > goal   (exact)\n", "OPT_(n-1)", bf, bd);
            else {
                /* enough digits to see the difference from the goal */
                slong dg = (slong) fmpz_sizeinbase(fmpq_denref(b), 10) + 5;
                if (dg > 1200) dg = 1200;
                arb_t x;
                arb_init(x);
                arb_set_fmpq(x, b, 4 * dg + 64);
                char *l = embz_arb_lo_string(x, dg);
                embz_buf_printf(&o, "%-10s > %s > goal   (a certified lower end; exact "
                                "comparison)\n", "OPT_(n-1)", l);
                free(l);
                arb_clear(x);
            }
            free(bf);
        }
        embz_buf_printf(&o, "%-10s closed form (docs/optimal.md); OPT_n never increases with n, "
                        "so every rank >= n reaches the goal\n", "how");
    }
    code = emit(out, &o);
    embz_buf_clear(&o);
    free(ns); free(ad); free(bd); free(af);
done:
    fmpq_clear(eps); fmpq_clear(a); fmpq_clear(b);
    fmpz_clear(n); fmpz_clear(m);
    return code;
}

static const char *fid_meaning(int m)
{
    switch (m) {
    case EMBZ_MEASURE_FIDELITY: return "the largest optimal LOCC fidelity F_max(p -> p (x) q)";
    case EMBZ_MEASURE_PURIFIED: return "the smallest purified distance sqrt(1 - F_max)";
    default: return "the largest fidelity O^2 with local unitaries only";
    }
}

/* --measure fidelity|purified|overlap at one rank */
static int run_fid(const fmpz_t nz, const char *size_text, const embz_target_t q, int measure,
                   const char *state, int json, int csv, const char *out)
{
    if (fmpz_bits(nz) > EMBZ_OPTIMAL_FID_MAX_BITS) {
        fprintf(stderr, "embz optimal: the optimum for --measure %s is computed for n < 2^%d, "
                "got %.80s\n", embz_measure_name(measure), EMBZ_OPTIMAL_FID_MAX_BITS, size_text);
        return CLI_EXIT_RUNTIME;
    }
    embz_optimal_fid_t r;
    embz_optimal_fid_init(r);
    embz_qvec_t st;
    embz_qvec_init(st);
    embz_err_t err;
    embz_err_clear(&err);
    int code = CLI_EXIT_OK;
    int status = embz_optimal_fid(r, state != NULL ? st : NULL, nz, q, measure, &err);
    if (status != EMBZ_OK) {
        code = cli_report("optimal", status, &err);
        goto done;
    }
    char *ns = int_text(nz), *how = embz_optimal_fid_how_text(r);
    char *flo = fmpq_dec(r->f_lower, -1), *fhi = fmpq_dec(r->f_upper, +1);
    /* the ends: the exact fractions' decimals, or those of the purified distance's ball */
    char *lo = measure == EMBZ_MEASURE_PURIFIED ? embz_arb_lo_string(r->value, DIGITS)
               : cli_strdup(flo);
    char *hi = measure == EMBZ_MEASURE_PURIFIED ? embz_arb_hi_string(r->value, DIGITS)
               : cli_strdup(fhi);
    char *cert = embz_arb_certified_string(r->value, DIGITS);
    char qb[32];
    qubits_text(qb, sizeof(qb), nz);
    const char *mname = embz_measure_name(measure);
    if (state != NULL) {
        embz_buf_t b;
        embz_buf_init(&b);
        embz_buf_printf(&b, "# Schmidt probabilities of a state of rank %s whose overlap squared "
                        "with its embezzled %s is at least %s (embz optimal --measure %s: the "
                        "lower end of the best value)\n", ns, q->label, flo, mname);
        for (slong i = 0; i < st->len; i++) {
            char *s = fmpq_get_str(NULL, 10, st->p + i);
            embz_buf_printf(&b, "%s\n", s);
            flint_free(s);
        }
        status = embz_write_atomic(state, b.s, b.len, &err);
        embz_buf_clear(&b);
        if (status != EMBZ_OK) {
            code = cli_report("optimal", status, &err);
            goto texts;
        }
    }
    embz_buf_t b;
    embz_buf_init(&b);
    if (json) {
        embz_buf_printf(&b, "{\"target\": ");
        embz_buf_json_string(&b, q->label);
        cli_buf_json_key_string(&b, "n", ns);
        embz_buf_printf(&b, ", \"d\": %lu", r->d);
        cli_buf_json_key_string(&b, "measure", mname);
        cli_buf_json_key_string(&b, "method", "perron");
        embz_buf_printf(&b, ", \"exact\": false");
        cli_buf_json_key_string(&b, "optimum_lo", lo);
        cli_buf_json_key_string(&b, "optimum_hi", hi);
        cli_buf_json_key_string(&b, "optimum_certified", cert);
        cli_buf_json_key_string(&b, "fidelity_lo", flo);
        cli_buf_json_key_string(&b, "fidelity_hi", fhi);
        embz_buf_printf(&b, ", \"qubits_per_side\": %s", qb);
        cli_buf_json_key_double(&b, "lambda_estimate", r->lambda);
        cli_buf_json_key_double(&b, "seconds", r->seconds);
        embz_buf_printf(&b, ", \"state_file\": ");
        cli_buf_json_string_or_null(&b, state != NULL ? state : "");
        cli_buf_json_key_string(&b, "how", how);
        embz_buf_printf(&b, "}\n");
    } else if (csv) {
        embz_buf_printf(&b, "target,n,measure,method,optimum_lo,optimum_hi,optimum_certified,"
                        "qubits_per_side,how\n");
        const char *f[] = { q->label, ns, mname, "perron", lo, hi, cert, qb };
        cli_buf_csv_fields(&b, f, 8);
        cli_buf_csv_field(&b, how);
        embz_buf_printf(&b, "\n");
    } else {
        embz_buf_printf(&b, "%-10s %s\n", "target", q->label);
        embz_buf_printf(&b, "%-10s %s   (Schmidt rank; %s qubits per side)\n", "n", ns, qb);
        embz_buf_printf(&b, "%-10s %s: %s\n", "measure", mname, fid_meaning(measure));
        embz_buf_printf(&b, "%-10s %s   (certified digits)\n", "optimum", cert);
        embz_buf_printf(&b, "%-10s [%s, %s]   (certified bounds)\n", "", lo, hi);
        embz_buf_printf(&b, "%-10s %s\n", "how", how);
        embz_buf_printf(&b, "%-10s the Perron vector of the tree matrix, squared: not the K-optimal "
                        "state (docs/optimal.md)\n", "state");
        if (state != NULL)
            embz_buf_printf(&b, "%-10s written to %s (%s exact fractions)\n", "", state, ns);
    }
    code = emit(out, &b);
    embz_buf_clear(&b);
texts:
    free(ns); free(how); free(lo); free(hi); free(cert); free(flo); free(fhi);
done:
    embz_qvec_clear(st);
    embz_optimal_fid_clear(r);
    return code;
}

/* --eps E --measure purified: the smallest rank whose best purified distance is at most E */
static int run_fid_eps(const char *eps_text, const embz_target_t q, int json, int csv,
                       const char *out)
{
    fmpq_t eps;
    fmpq_init(eps);
    arb_t a, b;
    arb_init(a); arb_init(b);
    int code = CLI_EXIT_OK;
    embz_err_t err;
    embz_err_clear(&err);
    if (embz_number_parse(eps, eps_text) != EMBZ_OK || fmpq_sgn(eps) <= 0) {
        code = cli_usage_error(&optimal_spec, "bad error goal '%.80s' (a positive exact "
                               "number, e.g. 0.05 or 1/20)", eps_text);
        goto done;
    }
    fmpz_t lo, hi;
    fmpz_init(lo); fmpz_init(hi);
    int status = embz_optimal_fid_eps(lo, hi, a, b, eps, q, &err);
    if (status != EMBZ_OK) {
        code = cli_report("optimal", status, &err);
        fmpz_clear(lo); fmpz_clear(hi);
        goto done;
    }
    char qb[32];
    qubits_text(qb, sizeof(qb), hi);
    char *nlo = int_text(lo), *nhi = int_text(hi);
    int have_prev = fmpz_cmp_ui(lo, 1) > 0, same = fmpz_equal(lo, hi);
    fmpz_t prev;
    fmpz_init(prev);
    fmpz_sub_ui(prev, lo, 1);
    char *npr = int_text(prev);
    fmpz_clear(prev);
    char *ah = embz_arb_hi_string(a, DIGITS), *bl = have_prev ? embz_arb_lo_string(b, DIGITS) : NULL;
    embz_buf_t o;
    embz_buf_init(&o);
    if (json) {
        embz_buf_printf(&o, "{\"goal\": ");
        embz_buf_json_string(&o, eps_text);
        cli_buf_json_key_string(&o, "target", q->label);
        cli_buf_json_key_string(&o, "measure", "purified");
        embz_buf_printf(&o, ", \"n\": ");
        cli_buf_json_string_or_null(&o, same ? nhi : "");
        cli_buf_json_key_string(&o, "n_lo", nlo);
        cli_buf_json_key_string(&o, "n_hi", nhi);
        embz_buf_printf(&o, ", \"qubits_per_side\": %s", qb);
        cli_buf_json_key_string(&o, "optimum_at_n_hi_upper", ah);
        embz_buf_printf(&o, ", \"optimum_before_n_lo_lower\": ");
        cli_buf_json_string_or_null(&o, have_prev ? bl : "");
        cli_buf_json_key_string(&o, "how", "bisection on certified enclosures; the best "
                                "purified distance is non-increasing in n");
        embz_buf_printf(&o, "}\n");
    } else if (csv) {
        embz_buf_printf(&o, "goal,target,measure,n_lo,n_hi,qubits_per_side,optimum_at_n_hi_upper,"
                        "optimum_before_n_lo_lower\n");
        const char *f[] = { eps_text, q->label, "purified", nlo, nhi, qb, ah };
        cli_buf_csv_fields(&o, f, 7);
        cli_buf_csv_field(&o, have_prev ? bl : "");
        embz_buf_printf(&o, "\n");
    } else {
        embz_buf_printf(&o, "%-10s best purified distance <= %s\n", "goal", eps_text);
        embz_buf_printf(&o, "%-10s %s\n", "target", q->label);
        if (same)
            embz_buf_printf(&o, "%-10s %s   (the smallest rank any state needs)\n", "n", nhi);
        else
            embz_buf_printf(&o, "%-10s between %s and %s (certified bracket: the goal lies inside "
                            "an enclosure)\n", "n", nlo, nhi);
        embz_buf_printf(&o, "%-10s %s per side (ceil(log2 n) at the upper end)\n", "qubits", qb);
        embz_buf_printf(&o, "%-10s <= %s <= goal   (certified upper end at n = %s)\n", "optimum",
                        ah, nhi);
        if (have_prev)
            embz_buf_printf(&o, "%-10s >= %s > goal   (certified lower end at n = %s)\n", "",
                            bl, npr);
        embz_buf_printf(&o, "%-10s bisection on certified enclosures (docs/optimal.md, section 6); "
                        "the best purified distance never increases with n\n", "how");
    }
    code = emit(out, &o);
    embz_buf_clear(&o);
    free(ah); free(bl); free(nlo); free(nhi); free(npr);
    fmpz_clear(lo); fmpz_clear(hi);
done:
    arb_clear(a); arb_clear(b);
    fmpq_clear(eps);
    return code;
}

int cli_cmd_optimal(int argc, char **argv)
{
    cli_args_t a;
    int code;
    if (!cli_begin(&a, &optimal_spec, argc, argv, &code)) return code;
    embz_target_t q;
    fmpz_t n;
    embz_target_init(q);
    fmpz_init(n);
    embz_optimal_result_t r;
    embz_optimal_result_init(r);
    embz_qvec_t st;
    embz_qvec_init(st);
    const char *size_text = cli_value(&a, "size"), *eps_text = cli_value(&a, "eps");
    const char *method = cli_value(&a, "method"), *start = cli_value(&a, "start");
    const char *state = cli_value(&a, "state"), *out = cli_value(&a, "output");
    const char *measure_text = cli_value(&a, "measure");
    int measure = EMBZ_MEASURE_K;
    int json = cli_flag(&a, "json"), csv = cli_flag(&a, "csv");
    int lp = 0;
    embz_optimal_opts_t o;
    embz_optimal_opts_init(o);
    embz_err_t err;
    embz_err_clear(&err);

    if (json && csv) { code = cli_usage_error(&optimal_spec, "--json and --csv exclude each other"); goto done; }
    if ((size_text == NULL) == (eps_text == NULL)) {
        code = cli_usage_error(&optimal_spec, size_text == NULL
                               ? "give the rank (-n N) or an error goal (--eps E)"
                               : "-n and --eps exclude each other");
        goto done;
    }
    if (measure_text != NULL && embz_measure_parse(&measure, measure_text, &err) != EMBZ_OK) {
        code = cli_usage_error(&optimal_spec, "%s", err.text);
        goto done;
    }
    if (measure != EMBZ_MEASURE_K && (method != NULL || start != NULL
                                      || (eps_text != NULL && measure != EMBZ_MEASURE_PURIFIED))) {
        code = cli_usage_error(&optimal_spec, "--measure %s takes -n only (neither --method, "
                               "--start nor --eps; --eps goes with k or purified)",
                               embz_measure_name(measure));
        goto done;
    }
    if (method != NULL) {
        if (strcmp(method, "closed") == 0) lp = 0;
        else if (strcmp(method, "lp") == 0) lp = 1;
        else { code = cli_usage_error(&optimal_spec, "bad method '%.80s' (closed or lp)", method); goto done; }
    }
    if (start != NULL) {
        if (strcmp(start, "equal") == 0) o->start = EMBZ_OPT_START_EQUAL;
        else if (strcmp(start, "solver") == 0) o->start = EMBZ_OPT_START_SOLVER;
        else { code = cli_usage_error(&optimal_spec, "bad start '%.80s' (equal or solver)", start); goto done; }
        if (!lp) { code = cli_usage_error(&optimal_spec, "--start needs --method lp"); goto done; }
    }
    if (eps_text != NULL && (lp || state != NULL)) {
        code = cli_usage_error(&optimal_spec, "--eps takes neither --method lp nor --state "
                               "(find the rank, then ask for it with -n)");
        goto done;
    }
    if ((code = cli_load_target(q, &a, "optimal")) != 0) goto done;
    if (q->kind != EMBZ_TARGET_UNIFORM) {
        fprintf(stderr, "embz optimal: the optimum is known for uniform targets only "
                "(ebit, ebits:J, uniform:D), not for a target vector (here %ld entries)\n",
                (long) q->q->len);
        code = CLI_EXIT_USAGE;
        goto done;
    }
    if ((out != NULL && (code = cli_check_output(out, "optimal")) != 0)
        || (state != NULL && (code = cli_check_output(state, "optimal")) != 0))
        goto done;
    if (eps_text != NULL && measure == EMBZ_MEASURE_PURIFIED) {
        code = run_fid_eps(eps_text, q, json, csv, out);
        goto done;
    }
    if (eps_text != NULL) {
        code = run_eps(eps_text, q, json, csv, out);
        goto done;
    }
    if ((code = cli_load_size(n, size_text, NULL, &optimal_spec)) != CLI_EXIT_OK) goto done;
    if (measure != EMBZ_MEASURE_K && (state == NULL || fmpz_cmp_si(n, STATE_MAX_N) <= 0)) {
        code = run_fid(n, size_text, q, measure, state, json, csv, out);
        goto done;
    }
    if (state != NULL && fmpz_cmp_si(n, STATE_MAX_N) > 0) {
        fprintf(stderr, "embz optimal: --state writes vectors of at most %ld entries (got n = "
                "%.80s)\n", STATE_MAX_N, size_text);
        code = CLI_EXIT_USAGE;
        goto done;
    }
    int status;
    if (lp) {
        if (fmpz_cmp_si(n, EMBZ_OPTIMAL_LP_MAX_N) > 0) {
            fprintf(stderr, "embz optimal: the linear program is limited to n <= %ld (got "
                    "%.80s); --method closed has no limit\n", (long) EMBZ_OPTIMAL_LP_MAX_N,
                    size_text);
            code = CLI_EXIT_RUNTIME;
            goto done;
        }
        cli_progress_t pr;
        embz_progress_fn fn = cli_progress_start(&pr, 1);
        pr.unit = "stages";
        status = embz_optimal_lp(r, state != NULL ? st : NULL, fmpz_get_si(n), q, o, fn, &pr,
                                 &err);
        cli_progress_end(&pr);
    } else {
        status = embz_optimal_closed(r, n, q, &err);
        if (status == EMBZ_OK && state != NULL)
            status = embz_optimal_state(st, fmpz_get_si(n), q, &err);
    }
    if (status != EMBZ_OK) {
        code = cli_report("optimal", status, &err);
        goto done;
    }

    char *ns = int_text(n), *how = embz_optimal_how_text(r);
    char *lo = fmpq_dec(r->lower, -1), *hi = fmpq_dec(r->upper, +1);
    char *cert = r->exact ? fmpq_dec(r->upper, 0) : NULL;
    char *flo = fmpq_frac(r->lower), *fhi = fmpq_frac(r->upper);
    char qb[32];
    qubits_text(qb, sizeof(qb), n);
    if (state != NULL) {
        code = write_state(state, st, q, ns, r->exact ? cert : hi);
        if (code != CLI_EXIT_OK) goto done_texts;
    }
    embz_buf_t b;
    embz_buf_init(&b);
    const char *mname = lp ? "lp" : "closed";
    if (json) {
        embz_buf_printf(&b, "{\"target\": ");
        embz_buf_json_string(&b, q->label);
        cli_buf_json_key_string(&b, "n", ns);
        embz_buf_printf(&b, ", \"d\": %lu", r->d);
        cli_buf_json_key_string(&b, "method", mname);
        embz_buf_printf(&b, ", \"exact\": %s", r->exact ? "true" : "false");
        cli_buf_json_key_string(&b, "optimum_lo", lo);
        cli_buf_json_key_string(&b, "optimum_hi", hi);
        embz_buf_printf(&b, ", \"optimum_certified\": ");
        cli_buf_json_string_or_null(&b, cert != NULL ? cert : "");
        cli_buf_json_key_string(&b, "optimum_fraction_lo", flo);
        cli_buf_json_key_string(&b, "optimum_fraction_hi", fhi);
        embz_buf_printf(&b, ", \"qubits_per_side\": %s", qb);
        if (lp) {
            embz_buf_printf(&b, ", \"rows\": %ld, \"nonzeros\": %ld, \"pivots\": %ld",
                            (long) r->rows, (long) r->nnz, (long) r->pivots);
            cli_buf_json_key_string(&b, "start", r->start == EMBZ_OPT_START_EQUAL ? "equal" : "solver");
            cli_buf_json_key_double(&b, "solve_seconds", r->solve_seconds);
            cli_buf_json_key_double(&b, "certify_seconds", r->certify_seconds);
        }
        embz_buf_printf(&b, ", \"state_file\": ");
        cli_buf_json_string_or_null(&b, state != NULL ? state : "");
        cli_buf_json_key_string(&b, "how", how);
        embz_buf_printf(&b, "}\n");
    } else if (csv) {
        embz_buf_printf(&b, "target,n,method,exact,optimum_lo,optimum_hi,optimum_fraction_lo,"
                        "optimum_fraction_hi,qubits_per_side,how\n");
        const char *f[] = { q->label, ns, mname, r->exact ? "true" : "false", lo, hi, flo, fhi,
                            qb };
        cli_buf_csv_fields(&b, f, 9);
        cli_buf_csv_field(&b, how);
        embz_buf_printf(&b, "\n");
    } else {
        embz_buf_printf(&b, "%-10s %s\n", "target", q->label);
        embz_buf_printf(&b, "%-10s %s   (Schmidt rank; %s qubits per side)\n", "n", ns, qb);
        if (r->exact) {
            if (strlen(fhi) <= FRACTION_MAX)
                embz_buf_printf(&b, "%-10s %s = %s   (exact)\n", "optimum", fhi, cert);
            else
                embz_buf_printf(&b, "%-10s %s   (certified digits of an exact fraction)\n",
                                "optimum", cert);
        } else {
            embz_buf_printf(&b, "%-10s [%s, %s]   (certified bounds)\n", "optimum", lo, hi);
        }
        embz_buf_printf(&b, "%-10s %s\n", "how", how);
        if (lp)
            embz_buf_printf(&b, "%-10s the program's rounded primal, a sorted vector whose error "
                            "is the upper end\n", "state");
        else if (q->d == 2)
            embz_buf_printf(&b, "%-10s p_i ~ 2^(-ceil(log2 i)), i = 1..n: 'embz error dyadic -n N' "
                            "reproduces it\n", "state");
        else
            embz_buf_printf(&b, "%-10s p_i ~ %lu^(-ceil(log_%lu i)), i = 1..n\n", "state", r->d, r->d);
        if (state != NULL)
            embz_buf_printf(&b, "%-10s written to %s (%s exact fractions)\n", "", state, ns);
    }
    code = emit(out, &b);
    embz_buf_clear(&b);
done_texts:
    free(ns); free(how); free(lo); free(hi); free(cert); free(flo); free(fhi);
done:
    embz_qvec_clear(st);
    embz_optimal_result_clear(r);
    fmpz_clear(n);
    embz_target_clear(q);
    cli_args_clear(&a);
    return code;
}

/* the option table, for the shell completion (completion.c) */
const cli_spec_t *const cli_spec_optimal = &optimal_spec;
