/* embz size FAMILY --eps E[,E2,...]: the smallest size reaching an error goal. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "cli.h"

static const cli_opt_t size_opts[] = {
    { "eps", 'e', CLI_VALUE, "E[,E2,...]", "error goals (exact decimals, e.g. 0.01,1e-3); required" },
    { "target", 't', CLI_VALUE, "T", "target state: ebit (default), ebits:J, uniform:D, or a list" },
    { "measure", 0, CLI_VALUE, "M", "k (conversion distance, default) or purified" },
    { "qubits", 0, CLI_FLAG, NULL, "stop once the qubits per side are decided (faster at huge n)" },
    { "vs-optimal", 0, CLI_FLAG, NULL,
      "also the smallest rank any state needs (embz optimal) and the extra qubits per side" },
    CLI_OPT_PREC_ONE("; raised where undecided"),
    { "set", 's', CLI_LIST, "NAME=VALUE", "set a parameter" },
    CLI_OPT_AMPLITUDE,
    CLI_OPT_JSON,
    { "csv", 0, CLI_FLAG, NULL, "print a CSV header line and one row per goal (and part)" },
    CLI_OPT_END
};

static const cli_spec_t size_spec = {
    "size", "FAMILY --eps E[,E2,...]",
    "Smallest size n whose embezzlement error is at most each goal, with log10 n and the\n"
    "number of qubits per side, ceil(log2 n).",
    "Every comparison with a goal rests on a certified enclosure of the error. Sizes up to\n"
    "2048 are checked one by one, so a size found there is the smallest. Beyond, a bracketing\n"
    "search locates n with E_n <= eps < E_(n-1); smaller sizes are then checked on samples\n"
    "only (E_n need not be monotone in n), and so is whether the error stays below the goal\n"
    "for larger sizes: the output says which. The search goes up to n = 2^3072 (~10^925),\n"
    "or n = 10^6 (explicit summation's reach) for a family the analytic engine cannot take.\n"
    "--measure purified: the same search on certified enclosures of the purified distance P\n"
    "(explicit values up to 2^20, the analytic engine's beyond: uniform targets, eventually\n"
    "non-increasing weights); a side is taken only when the whole enclosure lies on it. Its\n"
    "bounds meet to about 1e-17, so at huge n the answer is a certified bracket (--qubits: a\n"
    "size at qubit resolution). Where P has bounds only at the size left open, the size lies\n"
    "between the sizes for K <= eps and K <= 1 - sqrt(1 - eps^2) (K <= P <= sqrt(K(2-K))),\n"
    "both shown as before; the measure line says which route was used.\n"
    "--vs-optimal (distance K, uniform targets): the smallest Schmidt rank with which any state\n"
    "reaches each goal (embz optimal --eps), its qubits per side, and how many more the\n"
    "size found needs.\n",
    size_opts, 1, 1
};

#define INT_DIGITS 60

/* log10 n from the exact integer, and the qubits per side the result found */
static void size_numbers(double *l10, long *qubits, const embz_size_result_struct *r)
{
    arb_t x;
    arb_init(x);
    arb_set_fmpz(x, r->n);
    arb_log_base_ui(x, x, 10, 64);
    *l10 = embz_arb_mid_d(x);
    arb_clear(x);
    *qubits = r->qubits;
}

/* One solved goal as JSON (status, n, digits, qubits, enclosures, evidence). */
/* How the sizes were decided, in words (from the result's flags). */
static void method_words(char *buf, size_t len, const embz_size_result_t r)
{
    if (r->measure == EMBZ_MEASURE_PURIFIED) {
        int fe = (r->used & EMBZ_SIZE_USED_FID_EXPLICIT) != 0;
        int fa = (r->used & EMBZ_SIZE_USED_FID_ANALYTIC) != 0;
        snprintf(buf, len, "enclosures of P: %s%s%s%s", fe ? "explicit" : "",
                 fe && fa ? " and " : "", fa ? "analytic" : "",
                 r->bounds_seen ? " (bounds only at some sizes)" : "");
        return;
    }
    int ex = (r->used & (1 << EMBZ_METHOD_EXPLICIT)) != 0;
    int an = (r->used & (1 << EMBZ_METHOD_ANALYTIC)) != 0;
    snprintf(buf, len, "%s%s%s%s", ex ? "explicit" : "", ex && an ? " and " : "",
             an ? "analytic (decision mode)" : "",
             (r->used & EMBZ_SIZE_USED_EXACT) ? "; an exact tie decided in rational arithmetic"
                                              : "");
}

static void json_result(embz_buf_t *b, const char *goal, const embz_size_result_t r)
{
    embz_buf_printf(b, "{\"eps\": ");
    embz_buf_json_string(b, goal);
    const char *st = embz_size_status_id(r->status);
    embz_buf_printf(b, ", \"status\": \"%s\"", st);
    if (r->status == EMBZ_SIZE_FOUND) {
        char *ns = fmpz_get_str(NULL, 10, r->n);
        char *lo = embz_arb_lo_string(r->err_n, 30), *hi = embz_arb_hi_string(r->err_n, 30);
        char *plo = embz_arb_lo_string(r->err_prev, 30), *phi = embz_arb_hi_string(r->err_prev, 30);
        double l10;
        long qb;
        size_numbers(&l10, &qb, r);
        embz_buf_printf(b, ", \"n\": ");
        embz_buf_json_string(b, ns);
        embz_buf_printf(b, ", \"log10_n\": ");
        cli_buf_json_double(b, l10);
        embz_buf_printf(b, ", \"qubits\": %ld, \"error_at_n\": [\"%s\", \"%s\"], ", qb, lo, hi);
        /* n = 1 has no smaller size: no error to show for n - 1 */
        if (fmpz_is_one(r->n)) embz_buf_printf(b, "\"error_at_n_minus_1\": null");
        else embz_buf_printf(b, "\"error_at_n_minus_1\": [\"%s\", \"%s\"]", plo, phi);
        embz_buf_printf(b, ", \"exhaustive\": %s, \"checked_below\": %ld, "
                           "\"stay_samples\": %ld", r->exhaustive ? "true" : "false",
                        r->checked_below, r->stay_samples);
        {
            char *nl = fmpz_get_str(NULL, 10, r->n_low);
            embz_buf_printf(b, ", \"n_low\": ");
            embz_buf_json_string(b, nl);
            embz_buf_printf(b, ", \"resolution\": \"%s\"", r->qubits_only ? "qubits" : "exact");
            flint_free(nl);
        }
        char *to = fmpz_get_str(NULL, 10, r->stay_checked_to);
        embz_buf_printf(b, ", \"stay_checked_to\": ");
        embz_buf_json_string(b, to);
        if (!fmpz_is_zero(r->again_above)) {
            char *ag = fmpz_get_str(NULL, 10, r->again_above);
            embz_buf_printf(b, ", \"above_again_at\": ");
            embz_buf_json_string(b, ag);
            flint_free(ag);
        }
        flint_free(ns); flint_free(to);
        free(lo); free(hi); free(plo); free(phi);
    } else if (r->status == EMBZ_SIZE_NOT_REACHED) {
        char *ns = fmpz_get_str(NULL, 10, r->largest);
        char *lo = embz_arb_lo_string(r->err_largest, 30), *hi = embz_arb_hi_string(r->err_largest, 30);
        embz_buf_printf(b, ", \"largest_tried_log2\": %ld, \"error_at_largest\": [\"%s\", \"%s\"]",
                        (long) fmpz_bits(r->largest) - 1, lo, hi);
        flint_free(ns);
        free(lo); free(hi);
    } else {
        char *u = fmpz_get_str(NULL, 10, r->undecided_lo);
        embz_buf_printf(b, ", \"undecided_n\": ");
        embz_buf_json_string(b, u);
        flint_free(u);
        if (r->bracket) {
            char *lo = fmpz_get_str(NULL, 10, r->n_low), *hi = fmpz_get_str(NULL, 10, r->n);
            embz_buf_printf(b, ", \"bracket\": [\"%s\", \"%s\"]", lo, hi);
            if (r->qubits >= 0) embz_buf_printf(b, ", \"qubits\": %ld", r->qubits);
            flint_free(lo); flint_free(hi);
        }
    }
    if (r->explicit_only) {
        embz_buf_printf(b, ", \"explicit_only\": true, \"reach\": \"%ld\"", (long) r->reach);
        cli_buf_json_key_string(b, "why", r->why);
    }
    embz_buf_printf(b, ", \"evaluations\": %ld, \"method\": ", r->evaluations);
    char how[128];
    method_words(how, sizeof(how), r);
    embz_buf_json_string(b, how);
    embz_buf_printf(b, "}");
}

static const char *const csv_head[] = {
    "family", "target", "measure", "part", "eps", "status", "n", "log10_n", "qubits",
    "error_lo", "error_hi", "n_low", "error_low_lo", "error_low_hi", "exhaustive",
    "checked_below", "stay_samples", "stay_checked_to", "above_again_at", "largest",
    "error_largest_lo", "error_largest_hi", "never", "explicit_only", "reach", "evaluations",
    "method"
};

/* One solved goal as a CSV row (the columns of csv_head; empty where not applicable). */
static void csv_result(embz_buf_t *b, const char *fam, const char *tgt, const char *measure,
                       const char *part, const char *goal, const embz_size_result_t r, int never)
{
    const char *st = embz_size_status_id(r->status);
    cli_buf_csv_field(b, fam);
    embz_buf_printf(b, ",");
    cli_buf_csv_field(b, tgt);
    embz_buf_printf(b, ",%s,%s,", measure, part);
    cli_buf_csv_field(b, goal);
    embz_buf_printf(b, ",%s", st);
    if (r->status == EMBZ_SIZE_FOUND) {
        char *ns = fmpz_get_str(NULL, 10, r->n), *nl = fmpz_get_str(NULL, 10, r->n_low);
        char *to = fmpz_get_str(NULL, 10, r->stay_checked_to);
        char *lo = embz_arb_lo_string(r->err_n, 30), *hi = embz_arb_hi_string(r->err_n, 30);
        char *plo = embz_arb_lo_string(r->err_prev, 30), *phi = embz_arb_hi_string(r->err_prev, 30);
        double l10;
        long qb;
        size_numbers(&l10, &qb, r);
        embz_buf_printf(b, ",%s", ns);
        cli_buf_csv_num(b, l10);
        embz_buf_printf(b, ",%ld,%s,%s,%s", qb, lo, hi, nl);
        if (fmpz_is_one(r->n)) embz_buf_printf(b, ",,");
        else embz_buf_printf(b, ",%s,%s", plo, phi);
        embz_buf_printf(b, ",%d,%ld,%ld,%s,", r->exhaustive, r->checked_below, r->stay_samples,
                        to);
        if (!fmpz_is_zero(r->again_above)) {
            char *ag = fmpz_get_str(NULL, 10, r->again_above);
            embz_buf_printf(b, "%s", ag);
            flint_free(ag);
        }
        embz_buf_printf(b, ",,,");
        flint_free(ns); flint_free(nl); flint_free(to);
        free(lo); free(hi); free(plo); free(phi);
    } else if (r->status == EMBZ_SIZE_NOT_REACHED) {
        char *ls = fmpz_get_str(NULL, 10, r->largest);
        char *lo = embz_arb_lo_string(r->err_largest, 30), *hi = embz_arb_hi_string(r->err_largest, 30);
        embz_buf_printf(b, ",,,,,,,,,,,,,,%s,%s,%s", ls, lo, hi);
        flint_free(ls);
        free(lo); free(hi);
    } else {
        char *u = fmpz_get_str(NULL, 10, r->undecided_lo);
        embz_buf_printf(b, ",%s,,,,,,,,,,,,,,,", u);
        flint_free(u);
    }
    embz_buf_printf(b, ",%d,%d,", never, r->explicit_only);
    if (r->explicit_only) embz_buf_printf(b, "%ld", (long) r->reach);
    char how[128];
    method_words(how, sizeof(how), r);
    embz_buf_printf(b, ",%ld,", r->evaluations);
    cli_buf_csv_field(b, how);
    embz_buf_printf(b, "\n");
}

/* One solved goal as lines of text. */
static void text_result(embz_buf_t *b, const char *goal, const embz_size_result_t r,
                        const char *never_reason)
{
    /* the measure's letter: E for the error K, P for the purified distance */
    const char *S = r->measure == EMBZ_MEASURE_PURIFIED ? "P" : "E";
    embz_buf_printf(b, "goal %s <= %s\n", S, goal);
    if (r->status == EMBZ_SIZE_FOUND) {
        char *ns = embz_fmpz_string(r->n, INT_DIGITS);
        double l10;
        long qb;
        size_numbers(&l10, &qb, r);
        char *e = embz_arb_certified_string(r->err_n, 12);
        char *ep = embz_arb_certified_string(r->err_prev, 12);
        /* at huge n, E at n and at the size below agree to about log10 n digits: then the
         * enclosures are shown with enough digits to tell them apart */
        char *crossing = NULL;
        if (strcmp(e, ep) == 0 && !fmpz_is_one(r->n)) {
            /* the first digits count that separates them, plus 8 (outward rounding of the
             * ends would otherwise show the goal itself as an end) */
            slong sep = 400;
            for (slong d = 16; d < sep; d += 8) {
                char *bb = embz_arb_hi_string(r->err_n, d), *c = embz_arb_lo_string(r->err_prev, d);
                if (strcmp(bb, c) != 0) sep = d + 8;
                free(bb); free(c);
            }
            {
                slong d = sep;
                char *a = embz_arb_lo_string(r->err_n, d), *bb = embz_arb_hi_string(r->err_n, d);
                char *c = embz_arb_lo_string(r->err_prev, d), *dd = embz_arb_hi_string(r->err_prev, d);
                crossing = embz_strdup_printf("  %s at n     in [%s, %s]   (certified, <= goal)\n"
                                                  "  %s below    in [%s, %s]   (certified, > goal, "
                                                  "at n_low)\n", S, a, bb, S, c, dd);
                free(a); free(bb); free(c); free(dd);
            }
        }
        embz_buf_printf(b, "  n          %s%s\n", fmpz_sizeinbase(r->n, 10) > INT_DIGITS ? "~" : "", ns);
        embz_buf_printf(b, "  log10 n    %.4f\n", l10);
        embz_buf_printf(b, "  qubits     %ld per side (%s)\n", qb,
                        r->levels ? "ceil(log2 of the dimension, the sum of the counts)"
                                  : "ceil(log2 n)");
        if (crossing != NULL) {
            embz_buf_printf(b, "%s", crossing);
            free(crossing);
        } else if (r->qubits_only && !r->exhaustive) {
            char *nl = embz_fmpz_string(r->n_low, INT_DIGITS);
            embz_buf_printf(b, "  %s at n     %s   %s at %s%s  %s   (certified)\n", S, e, S,
                            fmpz_sizeinbase(r->n_low, 10) > INT_DIGITS ? "~" : "", nl, ep);
            embz_buf_printf(b, "  resolution the smallest size lies in (%s%s, n]: same qubits\n",
                            fmpz_sizeinbase(r->n_low, 10) > INT_DIGITS ? "~" : "", nl);
            free(nl);
        } else if (fmpz_is_one(r->n))
            embz_buf_printf(b, "  %s at n     %s   (certified)   %s at n-1  not applicable "
                               "(n = 1 is the smallest size)\n", S, e, S);
        else
            embz_buf_printf(b, "  %s at n     %s   %s at n-1  %s   (certified)\n", S, e, S, ep);
        if (r->small_by_bound && !r->exhaustive)
            embz_buf_printf(b, "  small n    every n <= 2048 excluded at once: E_n >= p_1 (1 - q_max) > goal\n");
        if (r->exhaustive)
            embz_buf_printf(b, "  smallest   yes: every smaller size was checked\n");
        else
            embz_buf_printf(b, "  smallest   first crossing of a bracketing search; %s > goal checked at %ld "
                               "smaller sizes%s (samples, not all)\n", S, r->checked_below,
                            r->small_by_bound ? " and, by the bound above, at every n <= 2048" : "");
        if (!fmpz_is_zero(r->again_above)) {
            char *ag = embz_fmpz_string(r->again_above, INT_DIGITS);
            embz_buf_printf(b, "  stays      no: %s exceeds the goal again at n = %s\n", S, ag);
            free(ag);
        } else {
            char *to = embz_fmpz_string(r->stay_checked_to, INT_DIGITS);
            embz_buf_printf(b, "  stays      %s <= goal at all %ld sampled sizes up to %s%s (not a proof)\n",
                            S, r->stay_samples, fmpz_sizeinbase(r->stay_checked_to, 10) > INT_DIGITS ? "~" : "", to);
            free(to);
        }
        free(ns); free(e); free(ep);
    } else if (r->status == EMBZ_SIZE_NOT_REACHED) {
        char *e = embz_arb_certified_string(r->err_largest, 12);
        embz_buf_printf(b, "  n          %s\n", never_reason != NULL ? "never" : "not reached");
        if (r->explicit_only) {
            char *ls = embz_fmpz_string(r->largest, INT_DIGITS);
            embz_buf_printf(b, "  largest    n = %s: %s = %s (certified)\n", ls, S, e);
            free(ls);
        } else {
            embz_buf_printf(b, "  largest    n = 2^%ld: %s = %s (certified)\n",
                            (long) fmpz_bits(r->largest) - 1, S, e);
        }
        if (never_reason != NULL) embz_buf_printf(b, "  why        %s\n", never_reason);
        free(e);
    } else {
        char *u = embz_fmpz_string(r->undecided_lo, INT_DIGITS);
        embz_buf_printf(b, "  undecided  at n = %s the enclosure of %s straddles the goal even at raised precision\n", u, S);
        free(u);
        if (r->bracket) {
            /* the ends differ by little against n: the gap says more than two long numbers */
            fmpz_t gap;
            fmpz_init(gap);
            fmpz_sub(gap, r->n, r->n_low);
            char *hi = embz_fmpz_string(r->n, INT_DIGITS), *g = embz_fmpz_string(gap, INT_DIGITS);
            embz_buf_printf(b, "  bracket    %s > goal at n - %s and %s <= goal at n = %s%s (both "
                               "certified): a crossing lies in between\n", S, g, S,
                            fmpz_sizeinbase(r->n, 10) > INT_DIGITS ? "~" : "", hi);
            if (r->qubits >= 0)
                embz_buf_printf(b, "  qubits     %ld per side (ceil(log2 n)): the same for every "
                                   "size in the bracket\n", r->qubits);
            free(hi); free(g);
            fmpz_clear(gap);
        }
    }
    if (r->explicit_only)
        embz_buf_printf(b, "  reach      sizes searched up to n = %ld only, what explicit summation "
                           "reaches: the analytic engine cannot take this family (%s)\n",
                        (long) r->reach, r->why);
    char how[128];
    method_words(how, sizeof(how), r);
    embz_buf_printf(b, "  method     %s, %ld evaluations\n", how, r->evaluations);
}

/* The words for "never" (embz_size_never): the one-ebit limit, and for a target other than
 * one ebit why that limit bounds its error too. */
static void never_words(char *buf, size_t len, const arb_t limit, const embz_target_t q)
{
    char *l = embz_arb_certified_string(limit, 10);
    if (q->kind == EMBZ_TARGET_UNIFORM && q->d == 2)
        snprintf(buf, len, "the error tends to the positive limit %s [derived: docs/math.md "
                           "section 5], above the goal", l);
    else
        snprintf(buf, len, "the one-ebit error tends to the positive limit %s [derived: "
                           "docs/math.md section 5], above the goal, and this target is majorized by "
                           "one ebit, so its error is never below the one-ebit error", l);
    free(l);
}

/* --vs-optimal: the optimal rank for the goal e (exact), against the qubits of the size found */
static int vs_optimal(embz_buf_t *out, int json, const fmpq_t e, const embz_target_t q,
                      const embz_size_result_t r)
{
    fmpz_t m;
    fmpz_init(m);
    embz_err_t err;
    embz_err_clear(&err);
    int status = embz_optimal_eps(m, e, q, &err);
    if (status != EMBZ_OK) {
        fmpz_clear(m);
        return cli_report("size", status, &err);
    }
    long oq = fmpz_cmp_ui(m, 1) <= 0 ? 0 : (long) fmpz_clog_ui(m, 2);
    int found = r->status == EMBZ_SIZE_FOUND;
    if (json) {
        char *ms = fmpz_get_str(NULL, 10, m);
        out->len--;   /* reopen the object */
        out->s[out->len] = '\0';
        embz_buf_printf(out, ", \"optimal_n\": ");
        embz_buf_json_string(out, ms);
        embz_buf_printf(out, ", \"optimal_qubits\": %ld", oq);
        if (found) embz_buf_printf(out, ", \"extra_qubits\": %ld", r->qubits - oq);
        embz_buf_printf(out, "}");
        flint_free(ms);
    } else {
        char *ms = embz_fmpz_string(m, INT_DIGITS);
        embz_buf_printf(out, "  optimal    rank %s (%ld qubits per side): the smallest any state "
                        "needs (embz optimal)\n", ms, oq);
        if (found)
            embz_buf_printf(out, "  extra      %ld qubits per side for the size above\n",
                            r->qubits - oq);
        free(ms);
    }
    fmpz_clear(m);
    return CLI_EXIT_OK;
}

int cli_cmd_size(int argc, char **argv)
{
    cli_args_t a;
    int code;
    if (!cli_begin(&a, &size_spec, argc, argv, &code)) return code;
    long prec = EMBZ_PREC_ONE;
    embz_family_t fam;
    embz_target_t q;
    embz_buf_t out;
    arb_t limit;                  /* the one-ebit limit, for "never" (found once, if needed) */
    int limit_known = -1;
    embz_family_init(fam);
    embz_target_init(q);
    embz_buf_init(&out);
    arb_init(limit);
    int json = cli_flag(&a, "json"), csv = cli_flag(&a, "csv");
    const char *eps_text = cli_value(&a, "eps");
    const char *measure = cli_value(&a, "measure");
    int purified = 0;
    char *goals = NULL;

    if (json && csv) { code = cli_usage_error(&size_spec, "--json and --csv exclude each other"); goto done; }
    if (eps_text == NULL) { code = cli_usage_error(&size_spec, "the error goal is required: --eps E"); goto done; }
    if (measure != NULL) {
        if (strcmp(measure, "purified") == 0) purified = 1;
        else if (strcmp(measure, "k") != 0) {
            code = cli_usage_error(&size_spec, "bad measure '%s' (k or purified)", measure);
            goto done;
        }
    }
    if ((code = cli_load_prec(&prec, &a, &size_spec)) != 0) goto done;
    if ((code = cli_load_family(fam, &a, a.pos[0], "size")) != 0) goto done;
    if ((code = cli_load_target(q, &a, "size")) != 0) goto done;
    int vs = cli_flag(&a, "vs-optimal");
    if (vs && (purified || q->kind != EMBZ_TARGET_UNIFORM)) {
        fprintf(stderr, "embz size: --vs-optimal compares the distance K for uniform targets "
                "(ebit, ebits:J, uniform:D)\n");
        code = CLI_EXIT_USAGE;
        goto done;
    }

    goals = malloc(strlen(eps_text) + 1);
    strcpy(goals, eps_text);
    if (csv) {
        for (size_t k = 0; k < sizeof(csv_head) / sizeof(csv_head[0]); k++)
            embz_buf_printf(&out, "%s%s", k ? "," : "", csv_head[k]);
        embz_buf_printf(&out, "\n");
    } else if (json) {
        embz_buf_printf(&out, "{\"family\": ");
        embz_buf_json_string(&out, fam->name);
        embz_buf_printf(&out, ", \"target\": ");
        embz_buf_json_string(&out, q->label);
        embz_buf_printf(&out, ", \"measure\": \"%s\", \"goals\": [", purified ? "purified" : "k");
    }
    /* text: the header is written last, when the route of every goal is known */
    int n_direct = 0, n_bracket = 0;
    /* the goals, all checked before any is solved: an empty one (",," or a comma at either
     * end) is refused rather than skipped */
    {
        long pos = 1;
        for (const char *p = goals; ; p++) {
            if (*p != ',' && *p != '\0') continue;
            const char *start = p;
            while (start > goals && start[-1] != ',') start--;
            int blank = 1;
            for (const char *c = start; c < p; c++)
                if (*c != ' ' && *c != '\t') blank = 0;
            if (blank) {
                char shown[300];
                code = cli_usage_error(&size_spec, "goal %ld of --eps '%s' is empty", pos,
                                       embz_err_quote(shown, sizeof(shown), eps_text, 200));
                goto done;
            }
            pos++;
            if (*p == '\0') break;
        }
    }
    int first = 1;
    for (char *save = NULL, *tok = strtok_r(goals, ",", &save); tok != NULL;
         tok = strtok_r(NULL, ",", &save)) {
        fmpq_t e;
        fmpq_init(e);
        if (embz_number_parse(e, tok) != EMBZ_OK || fmpq_sgn(e) <= 0 || fmpq_cmp_ui(e, 1) >= 0) {
            char shown[300];
            embz_err_quote(shown, sizeof(shown), tok, 100);
            code = embz_number_out_of_range(tok)
                ? cli_usage_error(&size_spec, "error goal '%s' is out of range (decimal "
                                  "exponents from -%d to %d)", shown, EMBZ_NUMBER_MAX_EXP10,
                                  EMBZ_NUMBER_MAX_EXP10)
                : cli_usage_error(&size_spec, "bad error goal '%s' (a number between 0 and 1)",
                                  shown);
            fmpq_clear(e);
            goto done;
        }
        /* the goals for K: eps itself, and for the purified distance also 1 - sqrt(1 - eps^2) */
        arb_t g[2];
        arb_init(g[0]); arb_init(g[1]);
        arb_set_fmpq(g[0], e, 4 * prec);
        arb_sqr(g[1], g[0], 4 * prec);
        arb_sub_ui(g[1], g[1], 1, 4 * prec);
        arb_neg(g[1], g[1]);
        arb_sqrt(g[1], g[1], 4 * prec);
        arb_sub_ui(g[1], g[1], 1, 4 * prec);
        arb_neg(g[1], g[1]);
        /* use the lower end, so that the size found certainly suffices */
        {
            arf_t lo;
            arf_init(lo);
            arb_get_lbound_arf(lo, g[1], 4 * prec);
            arb_set_arf(g[1], lo);
            arf_clear(lo);
        }
        /* --measure purified: the search on certified enclosures of P itself; where it is
         * left undecided at a size with bounds only (no value of P there), the bracket
         * between two searches on K below */
        int direct = 0;
        if (purified) {
            embz_size_result_t r;
            embz_err_t err;
            char reason[300];
            embz_err_clear(&err);
            embz_size_result_init(r);
            int status = embz_size_solve_measure(r, fam, g[0], q, EMBZ_MEASURE_PURIFIED,
                                                 cli_flag(&a, "qubits"), prec, &err);
            /* found; undecided only where P had a value; not reached on values of P alone */
            direct = status == EMBZ_OK
                     && (r->status == EMBZ_SIZE_FOUND
                         || (r->status == EMBZ_SIZE_UNDECIDED && !r->undecided_bounds)
                         || (r->status == EMBZ_SIZE_NOT_REACHED && !r->bounds_seen));
            if (direct) {
                n_direct++;
                if (r->status == EMBZ_SIZE_NOT_REACHED && limit_known < 0)
                    limit_known = embz_family_ebit_limit(limit, fam, 128);
                /* P >= K: where K never reaches the goal, neither does P */
                int nev = embz_size_never(r, limit_known > 0, limit, q, g[0]);
                if (nev) never_words(reason, sizeof(reason), limit, q);
                if (csv) {
                    csv_result(&out, fam->name, q->label, "purified", "direct", tok, r, nev);
                } else if (json) {
                    embz_buf_printf(&out, "%s", first ? "" : ", ");
                    json_result(&out, tok, r);
                    out.len--;   /* reopen the object */
                    out.s[out.len] = '\0';
                    embz_buf_printf(&out, ", \"route\": \"enclosures of P\"");
                    if (nev) {
                        embz_buf_printf(&out, ", \"never\": true, \"never_reason\": ");
                        embz_buf_json_string(&out, reason);
                    }
                    embz_buf_printf(&out, "}");
                } else {
                    embz_buf_printf(&out, "P <= eps decided on certified enclosures of P itself:\n");
                    text_result(&out, tok, r, nev ? reason : NULL);
                    embz_buf_printf(&out, "\n");
                }
                first = 0;
            }
            embz_size_result_clear(r);
            if (!direct) n_bracket++;
        }
        for (int part = 0; part < (purified ? 2 : 1) && !direct; part++) {
            embz_size_result_t r;
            embz_err_t err;
            char reason[300];
            embz_err_clear(&err);
            embz_size_result_init(r);
            /* K's goal is the exact decimal (ties at small n decided exactly); the purified
             * distance's derived goal is a ball */
            int status = part == 0
                ? embz_size_solve_exact_goal(r, fam, e, q, prec, cli_flag(&a, "qubits"), &err)
                : cli_flag(&a, "qubits")
                ? embz_size_solve_qubits(r, fam, g[part], q, prec, &err)
                : embz_size_solve(r, fam, g[part], q, prec, &err);
            if (status != EMBZ_OK) {
                code = cli_report("size", status, &err);
                embz_size_result_clear(r);
                arb_clear(g[0]); arb_clear(g[1]);
                fmpq_clear(e);
                goto done;
            }
            char label[128];
            if (part == 0) snprintf(label, sizeof(label), "%s", tok);
            else {
                char *gs = embz_arb_hi_string(g[1], 12);
                snprintf(label, sizeof(label), "%s", gs);
                free(gs);
            }
            if (r->status == EMBZ_SIZE_NOT_REACHED && limit_known < 0)
                limit_known = embz_family_ebit_limit(limit, fam, 128);
            int nev = embz_size_never(r, limit_known > 0, limit, q, g[part]);
            if (nev) never_words(reason, sizeof(reason), limit, q);
            if (csv) {
                csv_result(&out, fam->name, q->label, purified ? "purified" : "k",
                           purified ? (part == 0 ? "lower" : "upper") : "", label, r, nev);
            } else if (json) {
                embz_buf_printf(&out, "%s", first ? "" : ", ");
                json_result(&out, label, r);
                if (nev) {
                    out.len--;   /* reopen the object */
                    out.s[out.len] = '\0';
                    embz_buf_printf(&out, ", \"never\": true, \"never_reason\": ");
                    embz_buf_json_string(&out, reason);
                    embz_buf_printf(&out, "}");
                }
                if (vs && (code = vs_optimal(&out, 1, e, q, r)) != CLI_EXIT_OK) {
                    embz_size_result_clear(r);
                    arb_clear(g[0]); arb_clear(g[1]);
                    fmpq_clear(e);
                    goto done;
                }
            } else {
                if (purified)
                    embz_buf_printf(&out, "%s\n", part == 0
                        ? "P <= eps needs at least the size for K <= eps (P >= K):"
                        : "and at most the size for K <= 1 - sqrt(1 - eps^2) (P <= sqrt(K(2-K))):");
                text_result(&out, label, r, nev ? reason : NULL);
                if (vs && (code = vs_optimal(&out, 0, e, q, r)) != CLI_EXIT_OK) {
                    embz_size_result_clear(r);
                    arb_clear(g[0]); arb_clear(g[1]);
                    fmpq_clear(e);
                    goto done;
                }
                embz_buf_printf(&out, "\n");
            }
            first = 0;
            embz_size_result_clear(r);
        }
        arb_clear(g[0]); arb_clear(g[1]);
        fmpq_clear(e);
    }
    if (json) embz_buf_printf(&out, "]}\n");
    if (!json && !csv)
        printf("family     %s\ntarget     %s\nmeasure    %s\n\n", fam->name, q->label,
               !purified ? "conversion distance K"
               : n_direct == 0 ? "purified distance P (from bounds on K)"
               : n_bracket == 0 ? "purified distance P (certified enclosures of P)"
               : "purified distance P (per goal: certified enclosures of P, else bounds on K)");
    fputs(out.s, stdout);
done:
    free(goals);
    arb_clear(limit);
    embz_buf_clear(&out);
    embz_family_clear(fam);
    embz_target_clear(q);
    cli_args_clear(&a);
    return code;
}

/* the option table, for the shell completion (completion.c) */
const cli_spec_t *const cli_spec_size = &size_spec;
