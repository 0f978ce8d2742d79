/* embz scan FAMILY --grid NAME=LO:HI:COUNT: the verdict over a parameter grid. */
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include "cli.h"

static const cli_opt_t scan_opts[] = {
    { "grid", 'g', CLI_LIST, "NAME=LO:HI:COUNT",
      "scan parameter NAME over COUNT equally spaced values from LO to HI" },
    { "shard", 0, CLI_VALUE, "I/N", "compute only block I of N (1 <= I <= N) of the grid" },
    { "threads", 'j', CLI_VALUE, "T", "worker threads (OpenMP; default 1)" },
    { "from", 0, CLI_VALUE, "A", "smallest size of each sweep (default 100)" },
    { "to", 0, CLI_VALUE, "B", "largest size of each sweep (default 10^60)" },
    { "points", 'k', CLI_VALUE, "K", "sizes per sweep (default 12)" },
    { "prec", 'p', CLI_VALUE, "BITS", "working precision (default 64)" },
    { "set", 's', CLI_LIST, "NAME=VALUE", "fix a parameter that is not scanned" },
    { "amplitude", 0, CLI_FLAG, NULL, "the expression gives amplitudes; weights are squares" },
    { "numeric-only", 0, CLI_FLAG, NULL, "skip the analytic (asymptotic expansion) route" },
    { "no-header", 0, CLI_FLAG, NULL, "CSV without the header line (for concatenating shards)" },
    { "json", 0, CLI_FLAG, NULL, "print JSON lines, one object per grid point" },
    { "csv", 0, CLI_FLAG, NULL, "print CSV (the default)" },
    { NULL, 0, 0, NULL, NULL }
};

static const cli_spec_t scan_spec = {
    "scan", "FAMILY --grid NAME=LO:HI:COUNT",
    "Classify the family at every point of a parameter grid: verdict, limit and decay law.",
    "Several --grid options span a product grid (the first axis varies slowest). Every row\n"
    "carries its index in the full grid. With --shard I/N only the I-th of N contiguous\n"
    "blocks is computed, so the outputs of shards 1..N concatenated in order (the header\n"
    "from shard 1 only, see --no-header) are the output of the unsharded scan: one command\n"
    "per job of a cluster array. Limits and exponents are estimates (see 'embz classify').\n",
    scan_opts, 1, 1
};

/* ",value" with 10 significant digits, or "," alone when the value is not available */
static void csv_num(embz_buf_t *b, double x)
{
    if (isfinite(x)) embz_buf_printf(b, ",%.10g", x);
    else embz_buf_printf(b, ",");
}

int cli_cmd_scan(int argc, char **argv)
{
    cli_args_t a;
    int pr = cli_parse(&a, &scan_spec, argc, argv);
    if (pr != CLI_PARSE_OK) {
        cli_args_clear(&a);
        return pr == CLI_PARSE_HELP ? CLI_EXIT_OK : CLI_EXIT_USAGE;
    }
    int code = CLI_EXIT_OK, status;
    embz_err_t err;
    embz_family_t fam;
    embz_classify_opts_t o;
    embz_scan_t sc;
    long nset = 0, ngrid = 0, prec = 64, points = 12, threads = 1, shard = 1, nshards = 1;
    const char *const *sets = cli_list(&a, "set", &nset);
    const char *const *grids = cli_list(&a, "grid", &ngrid);
    embz_setting_t *settings = calloc((size_t) (nset > 0 ? nset : 1), sizeof(embz_setting_t));
    char **setcopies = calloc((size_t) (nset > 0 ? nset : 1), sizeof(char *));
    embz_grid_axis_struct *axes = calloc((size_t) (ngrid > 0 ? ngrid : 1),
                                         sizeof(embz_grid_axis_struct));
    long naxes = 0;
    const char *t;

    embz_family_init(fam);
    embz_classify_opts_init(o);
    embz_scan_init(sc);
    embz_err_clear(&err);
    fmpz_ui_pow_ui(o->to, 10, 60);

    int json = cli_flag(&a, "json");
    if (json && cli_flag(&a, "csv")) {
        code = cli_usage_error(&scan_spec, "--json and --csv exclude each other");
        goto done;
    }
    if (ngrid == 0) {
        code = cli_usage_error(&scan_spec, "at least one --grid NAME=LO:HI:COUNT is required");
        goto done;
    }
    if ((t = cli_value(&a, "prec")) != NULL && cli_parse_long(&prec, t, 16, 1L << 16)) {
        code = cli_usage_error(&scan_spec, "bad precision '%s' (bits, 16 to 65536)", t);
        goto done;
    }
    if ((t = cli_value(&a, "points")) != NULL && cli_parse_long(&points, t, 5, 100000)) {
        code = cli_usage_error(&scan_spec, "bad number of points '%s' (5 to 100000)", t);
        goto done;
    }
    if ((t = cli_value(&a, "threads")) != NULL && cli_parse_long(&threads, t, 1, 1024)) {
        code = cli_usage_error(&scan_spec, "bad thread count '%s' (1 to 1024)", t);
        goto done;
    }
    if ((t = cli_value(&a, "shard")) != NULL) {
        char buf[64];
        snprintf(buf, sizeof(buf), "%s", t);
        char *sl = strchr(buf, '/');
        if (sl == NULL) {
            code = cli_usage_error(&scan_spec, "bad shard '%s' (expected I/N, e.g. 3/10)", t);
            goto done;
        }
        *sl = '\0';
        if (cli_parse_long(&nshards, sl + 1, 1, 1000000) || cli_parse_long(&shard, buf, 1,
                                                                           nshards)) {
            code = cli_usage_error(&scan_spec, "bad shard '%s' (expected I/N with 1 <= I <= N)",
                                   t);
            goto done;
        }
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
            code = cli_usage_error(&scan_spec, "bad size for --%s: '%s'%s%s", names[k], t,
                                   err.text[0] ? ": " : "", err.text);
            goto done;
        }
    }
    if (fmpz_cmp(o->from, o->to) > 0) {
        code = cli_usage_error(&scan_spec, "--from must not exceed --to");
        goto done;
    }
    for (long k = 0; k < ngrid; k++) {
        status = embz_grid_axis_parse(axes + k, grids[k], &err);
        naxes = k + 1;
        if (status != EMBZ_OK) {
            code = cli_report("scan", status, &err);
            goto done;
        }
    }
    for (long k = 0; k < nset; k++) {
        size_t l = strlen(sets[k]) + 1;
        setcopies[k] = malloc(l);
        memcpy(setcopies[k], sets[k], l);
        status = embz_setting_split(&settings[k], setcopies[k], &err);
        if (status != EMBZ_OK) {
            code = cli_report("scan", status, &err);
            goto done;
        }
    }
    /* an inline expression declares its parameters through settings: the grid's names count
     * as settings (with the lower ends) when they are not set otherwise */
    {
        long extra = 0;
        embz_setting_t *all = calloc((size_t) (nset + naxes + 1), sizeof(embz_setting_t));
        char **lo_text = calloc((size_t) (naxes + 1), sizeof(char *));
        for (long k = 0; k < nset; k++) all[k] = settings[k];
        for (long k = 0; k < naxes; k++) {
            int found = 0;
            for (long s = 0; s < nset; s++)
                if (strcmp(settings[s].name, axes[k].name) == 0) found = 1;
            if (found) continue;
            lo_text[k] = fmpq_get_str(NULL, 10, axes[k].lo);
            all[nset + extra].name = axes[k].name;
            all[nset + extra].value = lo_text[k];
            extra++;
        }
        status = embz_family_resolve(fam, a.pos[0], all, nset + extra,
                                     cli_flag(&a, "amplitude"), &err);
        for (long k = 0; k < naxes; k++) flint_free(lo_text[k]);
        free(lo_text);
        free(all);
    }
    if (status != EMBZ_OK) {
        code = cli_report("scan", status, &err);
        goto done;
    }
    embz_err_clear(&err);
    status = embz_scan_run(sc, fam, axes, naxes, shard - 1, nshards, (int) threads, o, &err);
    if (status != EMBZ_OK) {
        code = cli_report("scan", status, &err);
        goto done;
    }

    embz_buf_t b;
    embz_buf_init(&b);
    if (!json && !cli_flag(&a, "no-header")) {
        embz_buf_printf(&b, "index");
        for (long k = 0; k < naxes; k++) {
            embz_buf_printf(&b, ",");
            cli_buf_csv_field(&b, axes[k].name);
        }
        embz_buf_printf(&b, ",verdict,numeric_verdict,analytic_verdict,limit,limit_lo,"
                        "limit_hi,law,exponent,exponent_lo,exponent_hi,asymptotic_form,status\n");
    }
    int failures = 0;
    for (slong r = 0; r < sc->len; r++) {
        const embz_scan_row_struct *row = sc->rows + r;
        const embz_classify_struct *c = row->c;
        const char *av = c->analytic_available ? embz_verdict_id(c->analytic_verdict) : "";
        if (row->status != EMBZ_OK) failures++;
        if (json) {
            embz_buf_printf(&b, "{\"index\": %ld, \"params\": {", (long) row->index);
            for (long k = 0; k < naxes; k++) {
                char *v = fmpq_get_str(NULL, 10, row->values + k);
                embz_buf_printf(&b, "%s", k ? ", " : "");
                embz_buf_json_string(&b, axes[k].name);
                embz_buf_printf(&b, ": \"%s\"", v);
                flint_free(v);
            }
            embz_buf_printf(&b, "}, \"status\": ");
            embz_buf_json_string(&b, row->status == EMBZ_OK ? "ok" : row->message);
            embz_buf_printf(&b, ", \"verdict\": \"%s\", \"numeric_verdict\": \"%s\", "
                            "\"analytic_verdict\": ", embz_verdict_id(c->verdict),
                            embz_verdict_id(c->numeric_verdict));
            if (av[0]) embz_buf_printf(&b, "\"%s\"", av);
            else embz_buf_printf(&b, "null");
            embz_buf_printf(&b, ", \"limit\": {\"value\": ");
            cli_buf_json_double(&b, c->limit_value);
            embz_buf_printf(&b, ", \"lo\": ");
            cli_buf_json_double(&b, c->limit_lo);
            embz_buf_printf(&b, ", \"hi\": ");
            cli_buf_json_double(&b, c->limit_hi);
            embz_buf_printf(&b, "}, \"law\": \"%s\", \"exponent\": {\"value\": ",
                            embz_law_id(c->law));
            cli_buf_json_double(&b, c->exponent);
            embz_buf_printf(&b, ", \"lo\": ");
            cli_buf_json_double(&b, c->exponent_lo);
            embz_buf_printf(&b, ", \"hi\": ");
            cli_buf_json_double(&b, c->exponent_hi);
            embz_buf_printf(&b, "}, \"asymptotic_form\": ");
            if (c->asymptotic_form[0]) embz_buf_json_string(&b, c->asymptotic_form);
            else embz_buf_printf(&b, "null");
            embz_buf_printf(&b, "}\n");
        } else {
            embz_buf_printf(&b, "%ld", (long) row->index);
            for (long k = 0; k < naxes; k++) {
                char *v = fmpq_get_str(NULL, 10, row->values + k);
                embz_buf_printf(&b, ",%s", v);
                flint_free(v);
            }
            embz_buf_printf(&b, ",%s,%s,%s", embz_verdict_id(c->verdict),
                            embz_verdict_id(c->numeric_verdict), av);
            double nums[3] = { c->limit_value, c->limit_lo, c->limit_hi };
            for (int k = 0; k < 3; k++) csv_num(&b, nums[k]);
            embz_buf_printf(&b, ",%s", embz_law_id(c->law));
            double ex[3] = { c->exponent, c->exponent_lo, c->exponent_hi };
            for (int k = 0; k < 3; k++) csv_num(&b, ex[k]);
            embz_buf_printf(&b, ",");
            cli_buf_csv_field(&b, c->asymptotic_form);
            embz_buf_printf(&b, ",");
            cli_buf_csv_field(&b, row->status == EMBZ_OK ? "ok" : row->message);
            embz_buf_printf(&b, "\n");
        }
    }
    fputs(b.s, stdout);
    embz_buf_clear(&b);
    if (failures > 0) {
        fprintf(stderr, "embz scan: %d grid point%s failed (see the status column)\n", failures,
                failures > 1 ? "s" : "");
        code = CLI_EXIT_RUNTIME;
    }

done:
    for (long k = 0; k < naxes; k++) embz_grid_axis_clear(axes + k);
    free(axes);
    for (long k = 0; k < nset; k++) free(setcopies[k]);
    free(setcopies);
    free(settings);
    embz_scan_clear(sc);
    embz_classify_opts_clear(o);
    embz_family_clear(fam);
    cli_args_clear(&a);
    return code;
}
