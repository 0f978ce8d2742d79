/* embz families: the family library as a table or JSON. */
#include <stdlib.h>
#include <string.h>
#include "cli.h"

static const cli_opt_t families_opts[] = {
    { "json", 0, CLI_FLAG, NULL, "print a JSON array instead of the table" },
    { "names", 0, CLI_FLAG, NULL, "print only the names, one per line (for scripts)" },
    { "csv", 0, CLI_FLAG, NULL, "print CSV: name, kind, weight, parameters, description, file" },
    CLI_OPT_END
};

static const cli_spec_t families_spec = {
    "families", "", "List the families of the library: name, weight expression, parameters\n"
    "with their defaults, and what each one is.",
    "A FAMILY argument of the other commands may be one of these names, the path of a family\n"
    "file, or an expression in i (and n). See docs/families.md for the file format.\n",
    families_opts, 0, 0
};

/* "a = -1/2, b = 3" (malloc'ed) */
static char *param_text(const embz_family_t f)
{
    embz_buf_t b;
    embz_buf_init(&b);
    for (long k = 0; k < f->nparams; k++) {
        char *v = fmpq_get_str(NULL, 10, f->param_values + k);
        embz_buf_printf(&b, "%s%s = %s", k ? ", " : "", f->param_names[k], v);
        flint_free(v);
    }
    return b.s;
}

int cli_cmd_families(int argc, char **argv)
{
    cli_args_t a;
    int pr;
    if (!cli_begin(&a, &families_spec, argc, argv, &pr)) return pr;
    int json = cli_flag(&a, "json"), names = cli_flag(&a, "names"), csv = cli_flag(&a, "csv");
    cli_args_clear(&a);
    if (json + names + csv > 1)
        return cli_usage_error(&families_spec, "--json, --csv and --names exclude each other");

    char **paths = NULL;
    long count = 0;
    embz_err_t err;
    int status = embz_family_list(&paths, &count, &err);
    if (status != EMBZ_OK) return cli_report("families", status, &err);

    int code = CLI_EXIT_OK;
    embz_family_t *fams = malloc((size_t) (count > 0 ? count : 1) * sizeof(embz_family_t));
    int *ok = calloc((size_t) (count > 0 ? count : 1), sizeof(int));
    for (long k = 0; k < count; k++) {
        embz_family_init(fams[k]);
        status = embz_family_load_file(fams[k], paths[k], &err);
        if (status != EMBZ_OK) {
            cli_report("families", status, &err);   /* report, go on with the others */
            code = CLI_EXIT_RUNTIME;
        } else {
            ok[k] = 1;
        }
    }

    embz_buf_t out;
    embz_buf_init(&out);
    if (names) {
        for (long k = 0; k < count; k++)
            if (ok[k]) embz_buf_printf(&out, "%s\n", fams[k]->name);
    } else if (csv) {
        embz_buf_printf(&out, "name,kind,weight,parameters,description,file\n");
        for (long k = 0; k < count; k++) {
            if (!ok[k]) continue;
            char *pt = param_text(fams[k]);
            const char *f[6] = { fams[k]->name, embz_family_is_levels(fams[k]) ? "levels"
                                                : fams[k]->amplitude ? "amplitude" : "weight",
                                 fams[k]->weight_text, pt, fams[k]->description,
                                 fams[k]->origin };
            for (int j = 0; j < 6; j++) {
                if (j) embz_buf_printf(&out, ",");
                cli_buf_csv_field(&out, f[j] ? f[j] : "");
            }
            embz_buf_printf(&out, "\n");
            free(pt);
        }
    } else if (json) {
        embz_buf_printf(&out, "[");
        int first = 1;
        for (long k = 0; k < count; k++) {
            if (!ok[k]) continue;
            const embz_family_struct *f = fams[k];
            embz_buf_printf(&out, "%s\n  {\"name\": ", first ? "" : ",");
            first = 0;
            embz_buf_json_string(&out, f->name);
            embz_buf_printf(&out, ", \"%s\": ", f->amplitude ? "amplitude" : "weight");
            embz_buf_json_string(&out, f->weight_text);
            embz_buf_printf(&out, ", \"depends_on_n\": %s, \"params\": ",
                            embz_family_depends_on_n(fams[k]) ? "true" : "false");
            cli_buf_json_params(&out, f);
            cli_buf_json_key_string(&out, "description", f->description);
            cli_buf_json_key_string(&out, "file", f->origin);
            embz_buf_printf(&out, "}");
        }
        embz_buf_printf(&out, "\n]\n");
    } else {
        /* column widths from the content */
        size_t wn = 4, ww = 6, wp = 10;
        char **ptext = calloc((size_t) (count > 0 ? count : 1), sizeof(char *));
        char **wtext = calloc((size_t) (count > 0 ? count : 1), sizeof(char *));
        for (long k = 0; k < count; k++) {
            if (!ok[k]) continue;
            ptext[k] = param_text(fams[k]);
            embz_buf_t w;
            embz_buf_init(&w);
            embz_buf_printf(&w, "%s%s", fams[k]->amplitude ? "amplitude " : "",
                            fams[k]->weight_text);
            wtext[k] = w.s;
            if (strlen(fams[k]->name) > wn) wn = strlen(fams[k]->name);
            if (strlen(wtext[k]) > ww) ww = strlen(wtext[k]);
            if (strlen(ptext[k]) > wp) wp = strlen(ptext[k]);
        }
        embz_buf_printf(&out, "%-*s  %-*s  %-*s  %s\n", (int) wn, "name", (int) ww, "weight",
                        (int) wp, "parameters", "description");
        for (long k = 0; k < count; k++) {
            if (!ok[k]) continue;
            embz_buf_printf(&out, "%-*s  %-*s  %-*s  %s\n", (int) wn, fams[k]->name, (int) ww,
                            wtext[k], (int) wp, ptext[k][0] ? ptext[k] : "-",
                            fams[k]->description);
            free(ptext[k]);
            free(wtext[k]);
        }
        free(ptext);
        free(wtext);
        if (count == 0)
            embz_buf_printf(&out, "(no family files found; set EMBZ_FAMILY_PATH)\n");
    }
    fputs(out.s, stdout);
    embz_buf_clear(&out);

    for (long k = 0; k < count; k++) {
        embz_family_clear(fams[k]);
        free(paths[k]);
    }
    free(fams);
    free(ok);
    free(paths);
    return code;
}

/* the option table, for the shell completion (completion.c) */
const cli_spec_t *const cli_spec_families = &families_spec;
