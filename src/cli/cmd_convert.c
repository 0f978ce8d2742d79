/* embz convert FROM TO: exact LOCC convertibility (Nielsen's majorization criterion) and the
 * conversion distance K in both directions, all in exact rational arithmetic; the optimal LOCC
 * fidelity F_max and the purified distance P = sqrt(1 - F_max) as certified enclosures. */
#include <stdlib.h>
#include <string.h>
#include "cli.h"

static const cli_opt_t convert_opts[] = {
    { "amplitude", 0, CLI_FLAG, NULL, "the numbers are Schmidt amplitudes (squared before use)" },
    CLI_OPT_JSON,
    { "csv", 0, CLI_FLAG, NULL, "print a CSV header line and one row per direction" },
    CLI_OPT_END
};

static const cli_spec_t convert_spec = {
    "convert", "FROM TO",
    "Compare two pure bipartite states given by their Schmidt probabilities: can FROM be\n"
    "turned into TO exactly by local operations and classical communication, and how far\n"
    "from possible is it (the distance K, in both directions)?",
    "FROM and TO are comma-separated lists of numbers (\"0.4,0.4,0.1,0.1\") or files of\n"
    "numbers. They are normalised to sum 1 when they do not. Numbers are read exactly\n"
    "(decimals, 1e-3, 2/3), so every printed result is exact: K as a certified decimal and,\n"
    "when short, as a fraction. F_max is the largest fidelity (squared overlap) with TO that\n"
    "LOCC reaches from FROM, P = sqrt(1 - F_max); both are printed with certified digits.\n",
    convert_opts, 2, 2
};

#define MAX_FRACTION_LEN 40
#define DECIMAL_DIGITS 25
#define SHOW_ENTRIES 8

/* Certified decimal text of an exact rational (malloc'ed). */
static char *fmpq_decimal(const fmpq_t x)
{
    arb_t b;
    arb_init(b);
    arb_set_fmpq(b, x, 4 * DECIMAL_DIGITS + 64);
    char *s = embz_arb_certified_string(b, DECIMAL_DIGITS);
    arb_clear(b);
    return s;
}

static void show_vector(embz_buf_t *out, const char *label, const embz_qvec_t v)
{
    embz_buf_printf(out, "%-5s (", label);
    for (long k = 0; k < v->len && k < SHOW_ENTRIES; k++) {
        char *s = fmpq_get_str(NULL, 10, v->p + k);
        if (strlen(s) > MAX_FRACTION_LEN) {
            flint_free(s);
            s = NULL;
            char *d = fmpq_decimal(v->p + k);
            embz_buf_printf(out, "%s~%s", k ? ", " : "", d);
            free(d);
        } else {
            embz_buf_printf(out, "%s%s", k ? ", " : "", s);
            flint_free(s);
        }
    }
    embz_buf_printf(out, "%s)  [%ld entr%s]\n", v->len > SHOW_ENTRIES ? ", ..." : "", v->len,
                    v->len == 1 ? "y" : "ies");
}

static void json_vector(embz_buf_t *out, const embz_qvec_t v)
{
    embz_buf_printf(out, "{\"length\": %ld, \"normalised\": %s", v->len,
                    v->normalised ? "true" : "false");
    if (v->len <= 1000) {
        embz_buf_printf(out, ", \"entries\": [");
        for (long k = 0; k < v->len; k++) {
            char *s = fmpq_get_str(NULL, 10, v->p + k);
            embz_buf_printf(out, "%s", k ? ", " : "");
            embz_buf_json_string(out, s);
            flint_free(s);
        }
        embz_buf_printf(out, "]");
    }
    embz_buf_printf(out, "}");
}

static void json_distance(embz_buf_t *out, const fmpq_t K, long argk)
{
    char *ex = fmpq_get_str(NULL, 10, K);
    char *dec = fmpq_decimal(K);
    embz_buf_printf(out, "{\"value\": ");
    cli_buf_json_double(out, fmpq_get_d(K));
    embz_buf_printf(out, ", \"exact\": ");
    embz_buf_json_string(out, ex);
    embz_buf_printf(out, ", \"decimal\": ");
    embz_buf_json_string(out, dec);
    embz_buf_printf(out, ", \"argk\": %ld}", argk);
    flint_free(ex);
    free(dec);
}

#define FID_PREC 256
#define FID_DIGITS 30

/* One direction as a CSV row: direction, convertible, K exact and decimal, argk, and the ends
 * of F_max and P. */
static void csv_direction(embz_buf_t *out, const char *dir, int conv, const fmpq_t K, long argk,
                          const arb_t F, const arb_t P)
{
    char *ex = fmpq_get_str(NULL, 10, K);
    char *dec = fmpq_decimal(K);
    char *flo = embz_arb_lo_string(F, FID_DIGITS), *fhi = embz_arb_hi_string(F, FID_DIGITS);
    char *plo = embz_arb_lo_string(P, FID_DIGITS), *phi = embz_arb_hi_string(P, FID_DIGITS);
    embz_buf_printf(out, "%s,%d,%s,%s,%ld,%s,%s,%s,%s\n", dir, conv, ex, dec, argk, flo, fhi,
                    plo, phi);
    flint_free(ex);
    free(dec); free(flo); free(fhi); free(plo); free(phi);
}

static void json_ball(embz_buf_t *out, const arb_t x)
{
    char *lo = embz_arb_lo_string(x, FID_DIGITS), *hi = embz_arb_hi_string(x, FID_DIGITS);
    char *c = embz_arb_certified_string(x, FID_DIGITS);
    embz_buf_printf(out, "{\"value\": ");
    cli_buf_json_double(out, embz_arb_mid_d(x));
    embz_buf_printf(out, ", \"lo\": ");
    embz_buf_json_string(out, lo);
    embz_buf_printf(out, ", \"hi\": ");
    embz_buf_json_string(out, hi);
    embz_buf_printf(out, ", \"certified\": ");
    embz_buf_json_string(out, c);
    embz_buf_printf(out, ", \"exact\": %s}", arb_is_exact(x) ? "true" : "false");
    free(lo); free(hi); free(c);
}

static void text_ball(embz_buf_t *out, const char *label, const arb_t x, const char *what)
{
    char *c = embz_arb_certified_string(x, FID_DIGITS);
    embz_buf_printf(out, "%s = %s%s   (%s)\n", label, c, arb_is_exact(x) ? " exactly" : "", what);
    free(c);
}

static void text_distance(embz_buf_t *out, const char *label, const fmpq_t K, long argk)
{
    char *ex = fmpq_get_str(NULL, 10, K);
    char *dec = fmpq_decimal(K);
    embz_buf_printf(out, "%s = %s", label, dec);
    if (strlen(ex) <= MAX_FRACTION_LEN && strcmp(ex, dec) != 0)
        embz_buf_printf(out, "  (= %s exactly)", ex);
    if (fmpq_is_zero(K))
        embz_buf_printf(out, "  (exact conversion possible)\n");
    else
        embz_buf_printf(out, ", attained at k = %ld\n", argk);
    flint_free(ex);
    free(dec);
}

int cli_cmd_convert(int argc, char **argv)
{
    cli_args_t a;
    int code;
    if (!cli_begin(&a, &convert_spec, argc, argv, &code)) return code;
    int json = cli_flag(&a, "json"), csv = cli_flag(&a, "csv");
    int amplitude = cli_flag(&a, "amplitude");
    embz_err_t err;
    embz_qvec_t p, r;
    fmpq_t K1, K2;
    long k1 = 0, k2 = 0;

    embz_qvec_init(p);
    embz_qvec_init(r);
    fmpq_init(K1);
    fmpq_init(K2);
    if (json && csv) {
        code = cli_usage_error(&convert_spec, "--json and --csv exclude each other");
        goto done;
    }

    /* FROM, then TO: the first bad one is reported */
    embz_qvec_struct *vecs[2] = { p, r };
    const char *names[2] = { "FROM", "TO" };
    for (int k = 0; k < 2; k++) {
        embz_err_clear(&err);
        int status = embz_qvec_parse(vecs[k], a.pos[k], amplitude, &err);
        if (status != EMBZ_OK) {
            char buf[3000];
            embz_err_format(buf, sizeof(buf), &err);
            fprintf(stderr, "embz convert: %s: %s\n", names[k], buf);
            code = cli_exit_code(status);
            goto done;
        }
    }

    int fwd = embz_qvec_convertible(p, r), bwd = embz_qvec_convertible(r, p);
    embz_qvec_distance(K1, &k1, p, r);
    embz_qvec_distance(K2, &k2, r, p);
    arb_t F1, F2, P1, P2;
    arb_init(F1); arb_init(F2); arb_init(P1); arb_init(P2);
    embz_qvec_fidelity(F1, NULL, NULL, p, r, FID_PREC);
    embz_qvec_fidelity(F2, NULL, NULL, r, p, FID_PREC);
    embz_qvec_purified(P1, p, r, FID_PREC);
    embz_qvec_purified(P2, r, p, FID_PREC);

    embz_buf_t out;
    embz_buf_init(&out);
    if (csv) {
        embz_buf_printf(&out, "direction,convertible,K_exact,K_decimal,argk,F_max_lo,F_max_hi,"
                        "P_lo,P_hi\n");
        csv_direction(&out, "forward", fwd, K1, k1, F1, P1);
        csv_direction(&out, "backward", bwd, K2, k2, F2, P2);
    } else if (json) {
        embz_buf_printf(&out, "{\"from\": ");
        json_vector(&out, p);
        embz_buf_printf(&out, ", \"to\": ");
        json_vector(&out, r);
        embz_buf_printf(&out, ", \"amplitude\": %s, \"convertible\": %s, "
                        "\"reverse_convertible\": %s, \"K_forward\": ",
                        amplitude ? "true" : "false", fwd ? "true" : "false",
                        bwd ? "true" : "false");
        json_distance(&out, K1, k1);
        embz_buf_printf(&out, ", \"K_backward\": ");
        json_distance(&out, K2, k2);
        embz_buf_printf(&out, ", \"F_max_forward\": ");
        json_ball(&out, F1);
        embz_buf_printf(&out, ", \"P_forward\": ");
        json_ball(&out, P1);
        embz_buf_printf(&out, ", \"F_max_backward\": ");
        json_ball(&out, F2);
        embz_buf_printf(&out, ", \"P_backward\": ");
        json_ball(&out, P2);
        embz_buf_printf(&out, "}\n");
    } else {
        show_vector(&out, "FROM", p);
        show_vector(&out, "TO", r);
        if (p->normalised)
            embz_buf_printf(&out, "note: FROM did not sum to 1 and was normalised\n");
        if (r->normalised)
            embz_buf_printf(&out, "note: TO did not sum to 1 and was normalised\n");
        embz_buf_printf(&out, "exact conversion FROM -> TO: %s\n",
                        fwd ? "possible (FROM is majorized by TO; Nielsen's criterion)"
                            : "not possible (FROM is not majorized by TO; Nielsen's criterion)");
        embz_buf_printf(&out, "exact conversion TO -> FROM: %s\n",
                        bwd ? "possible (TO is majorized by FROM)"
                            : "not possible (TO is not majorized by FROM)");
        text_distance(&out, "K(FROM -> TO)", K1, k1);
        text_distance(&out, "K(TO -> FROM)", K2, k2);
        text_ball(&out, "F_max(FROM -> TO)", F1,
                  "optimal LOCC fidelity, |<a|b>|^2; certified digits");
        text_ball(&out, "P(FROM -> TO)", P1, "purified distance sqrt(1 - F_max)");
        text_ball(&out, "F_max(TO -> FROM)", F2,
                  "optimal LOCC fidelity, |<a|b>|^2; certified digits");
        text_ball(&out, "P(TO -> FROM)", P2, "purified distance sqrt(1 - F_max)");
    }
    fputs(out.s, stdout);
    embz_buf_clear(&out);
    arb_clear(F1); arb_clear(F2); arb_clear(P1); arb_clear(P2);

done:
    fmpq_clear(K1);
    fmpq_clear(K2);
    embz_qvec_clear(p);
    embz_qvec_clear(r);
    cli_args_clear(&a);
    return code;
}

/* the option table, for the shell completion (completion.c) */
const cli_spec_t *const cli_spec_convert = &convert_spec;
