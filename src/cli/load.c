/* Loading the common inputs of the commands: a family (with --set and --amplitude) and a
 * target (--target). Every command that takes a FAMILY uses these, so messages and exit codes
 * are the same everywhere. */
#include <stdlib.h>
#include <string.h>
#include "cli.h"

int cli_load_family(embz_family_t fam, const cli_args_t *a, const char *spec_text,
                    const char *cmd)
{
    long nset = 0;
    const char *const *sets = cli_list(a, "set", &nset);
    embz_setting_t *settings = calloc((size_t) (nset > 0 ? nset : 1), sizeof(embz_setting_t));
    char **copies = calloc((size_t) (nset > 0 ? nset : 1), sizeof(char *));
    embz_err_t err;
    int code = CLI_EXIT_OK, status = EMBZ_OK;
    embz_err_clear(&err);
    for (long k = 0; k < nset && status == EMBZ_OK; k++) {
        size_t l = strlen(sets[k]) + 1;
        copies[k] = malloc(l);
        memcpy(copies[k], sets[k], l);
        status = embz_setting_split(&settings[k], copies[k], &err);
    }
    if (status == EMBZ_OK)
        status = embz_family_resolve(fam, spec_text, settings, nset,
                                     cli_flag(a, "amplitude"), &err);
    if (status != EMBZ_OK) code = cli_report(cmd, status, &err);
    for (long k = 0; k < nset; k++) free(copies[k]);
    free(copies);
    free(settings);
    return code;
}

int cli_load_target(embz_target_t q, const cli_args_t *a, const char *cmd)
{
    const char *text = cli_value(a, "target");
    if (text == NULL) return CLI_EXIT_OK;   /* one ebit */
    embz_err_t err;
    embz_err_clear(&err);
    int status = embz_target_parse(q, text, 0, &err);
    if (status == EMBZ_OK) return CLI_EXIT_OK;
    char buf[3000];
    embz_err_format(buf, sizeof(buf), &err);
    fprintf(stderr, "embz %s: bad target '%s': %s\n", cmd, text, buf);
    return cli_exit_code(status);
}

int cli_load_prec(long *prec, const cli_args_t *a, const cli_spec_t *spec)
{
    const char *text = cli_value(a, "prec");
    if (text == NULL) return CLI_EXIT_OK;
    if (cli_parse_long(prec, text, 16, 1L << 20))
        return cli_usage_error(spec, "bad precision '%s' (bits, 16 to %ld)", text, 1L << 20);
    return CLI_EXIT_OK;
}
