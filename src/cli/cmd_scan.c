/* embz scan FAMILY --grid NAME=LO..HI,count=COUNT: the verdict over a parameter grid. */
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include "cli.h"

static const cli_opt_t scan_opts[] = {
    { "grid", 'g', CLI_LIST, "NAME=LO..HI,count=COUNT",
      "scan parameter NAME over COUNT equally spaced values from LO to HI" },
    { "shard", 0, CLI_VALUE, "I/N", "compute only block I of N (1 <= I <= N) of the grid" },
    CLI_OPT_THREADS("grid points"),
    CLI_OPT_FROM,
    CLI_OPT_TO,
    CLI_OPT_POINTS,
    CLI_OPT_PREC_MANY,
    { "set", 's', CLI_LIST, "NAME=VALUE", "fix a parameter that is not scanned" },
    CLI_OPT_AMPLITUDE,
    { "numeric-only", 0, CLI_FLAG, NULL, "skip the analytic (asymptotic expansion) route" },
    { "no-header", 0, CLI_FLAG, NULL, "CSV without the header line (for concatenating shards)" },
    { "json", 0, CLI_FLAG, NULL, "print JSON lines, one object per grid point" },
    { "csv", 0, CLI_FLAG, NULL, "print CSV (the default)" },
    CLI_OPT_END
};

static const cli_spec_t scan_spec = {
    "scan", "FAMILY --grid NAME=LO..HI,count=COUNT",
    "Classify the family at every point of a parameter grid: verdict, limit and decay law.",
    "Several --grid options span a product grid (the first axis varies slowest). Every row\n"
    "carries its index in the full grid. With --shard I/N only the I-th of N contiguous\n"
    "blocks is computed, so the outputs of shards 1..N concatenated in order (the header\n"
    "from shard 1 only, see --no-header) are the output of the unsharded scan: one command\n"
    "per job of a cluster array. Limits and exponents are estimates (see 'embz classify').\n",
    scan_opts, 1, 1
};

int cli_cmd_scan(int argc, char **argv)
{
    cli_args_t a;
    int code, status = EMBZ_OK;
    if (!cli_begin(&a, &scan_spec, argc, argv, &code)) return code;
    embz_err_t err;
    embz_family_t fam;
    embz_classify_opts_t o;
    embz_scan_t sc;
    long ngrid = 0, prec = EMBZ_PREC_MANY, points = EMBZ_RANGE_POINTS, shard = 1, nshards = 1;
    int threads = 1;
    const char *const *grids = cli_list(&a, "grid", &ngrid);
    cli_settings_t set = { NULL, NULL, 0 };
    embz_grid_axis_struct *axes = calloc((size_t) (ngrid > 0 ? ngrid : 1),
                                         sizeof(embz_grid_axis_struct));
    long naxes = 0;
    const char *t;

    embz_family_init(fam);
    embz_classify_opts_init(o);
    embz_scan_init(sc);
    embz_err_clear(&err);

    int json = cli_flag(&a, "json");
    if (json && cli_flag(&a, "csv")) {
        code = cli_usage_error(&scan_spec, "--json and --csv exclude each other");
        goto done;
    }
    if (ngrid == 0) {
        code = cli_usage_error(&scan_spec, "at least one --grid NAME=LO..HI,count=COUNT is required");
        goto done;
    }
    if ((code = cli_load_prec_upto(&prec, &a, &scan_spec, 1L << 16)) != 0) goto done;
    if ((code = cli_load_threads(&threads, &a, &scan_spec)) != 0) goto done;
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
    if ((code = cli_load_range(o->from, o->to, &points, 5, 100000, &a, &scan_spec)) != 0)
        goto done;
    o->prec = prec;
    o->points = points;
    o->use_analytic = !cli_flag(&a, "numeric-only");
    for (long k = 0; k < ngrid; k++) {
        status = embz_grid_axis_parse(axes + k, grids[k], &err);
        naxes = k + 1;
        if (status != EMBZ_OK) {
            code = cli_report("scan", status, &err);
            goto done;
        }
        cli_note_old_grid("scan", grids[k], axes + k);
    }
    if ((code = cli_settings_load(&set, &a, "scan")) != 0) goto done;
    /* a scanned parameter takes the grid's values: a fixed value for it would be ignored */
    for (long k = 0; k < naxes; k++)
        for (long s = 0; s < set.len; s++)
            if (strcmp(set.v[s].name, axes[k].name) == 0) {
                code = cli_usage_error(&scan_spec, "parameter '%s' is given both by --set and "
                                       "by --grid; scan it or fix it, not both", axes[k].name);
                goto done;
            }
    /* an inline expression declares its parameters through settings: the grid's names count
     * as settings (with the lower ends) when they are not set otherwise */
    {
        long nset = set.len, extra = 0;
        embz_setting_t *all = calloc((size_t) (nset + naxes + 1), sizeof(embz_setting_t));
        char **lo_text = calloc((size_t) (naxes + 1), sizeof(char *));
        for (long k = 0; k < nset; k++) all[k] = set.v[k];
        for (long k = 0; k < naxes; k++) {
            lo_text[k] = fmpq_get_str(NULL, 10, axes[k].lo);
            all[nset + extra].name = axes[k].name;
            all[nset + extra].value = lo_text[k];
            extra++;
        }
        status = embz_family_resolve(fam, a.pos[0], all, nset + extra,
                                     cli_flag(&a, "amplitude"), &err);
        if (status == EMBZ_OK)
            code = cli_check_settings_used(fam, all, nset, "--set", "scan");
        if (status == EMBZ_OK && code == 0)
            code = cli_check_settings_used(fam, all + nset, extra, "--grid", "scan");
        for (long k = 0; k < naxes; k++) flint_free(lo_text[k]);
        free(lo_text);
        free(all);
    }
    if (status != EMBZ_OK) {
        code = cli_report("scan", status, &err);
        goto done;
    }
    if (code != 0) goto done;
    cli_levels_range(o->from, o->to, fam, &a);
    embz_err_clear(&err);
    cli_progress_t prog;
    embz_progress_fn show = cli_progress_start(&prog, 0);
    prog.unit = "grid points";
    status = embz_scan_run(sc, fam, axes, naxes, shard - 1, nshards, (int) threads, o, show,
                           &prog, &err);
    cli_progress_end(&prog);
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
            embz_buf_printf(&b, "}");
            cli_buf_json_key_string(&b, "status", row->status == EMBZ_OK ? "ok" : row->message);
            embz_buf_printf(&b, ", ");
            cli_buf_json_verdicts(&b, c);
            embz_buf_printf(&b, ", \"limit\": {");
            cli_buf_json_vlohi(&b, c->limit_value, c->limit_lo, c->limit_hi);
            embz_buf_printf(&b, "}, \"law\": \"%s\", \"exponent\": {", embz_law_id(c->law));
            cli_buf_json_vlohi(&b, c->exponent, c->exponent_lo, c->exponent_hi);
            embz_buf_printf(&b, "}, \"asymptotic_form\": ");
            cli_buf_json_string_or_null(&b, c->asymptotic_form);
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
            for (int k = 0; k < 3; k++) cli_buf_csv_num(&b, nums[k]);
            embz_buf_printf(&b, ",%s", embz_law_id(c->law));
            double ex[3] = { c->exponent, c->exponent_lo, c->exponent_hi };
            for (int k = 0; k < 3; k++) cli_buf_csv_num(&b, ex[k]);
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
    cli_settings_clear(&set);
    embz_scan_clear(sc);
    embz_classify_opts_clear(o);
    embz_family_clear(fam);
    cli_args_clear(&a);
    return code;
}

/* the option table, for the shell completion (completion.c) */
const cli_spec_t *const cli_spec_scan = &scan_spec;
