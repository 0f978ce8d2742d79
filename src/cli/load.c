/* Loading the common inputs of the commands: a family (with --set and --amplitude), a
 * target (--target), the precision (--prec) and a sweep range (--points, --from, --to).
 * Every command that takes these uses the functions here, so messages and exit codes are
 * the same everywhere. */
#include <stdlib.h>
#include <string.h>
#include <errno.h>
#include <unistd.h>
#include "cli.h"

int cli_settings_load(cli_settings_t *s, const cli_args_t *a, const char *cmd)
{
    long nset = 0;
    const char *const *sets = cli_list(a, "set", &nset);
    s->v = calloc((size_t) (nset > 0 ? nset : 1), sizeof(embz_setting_t));
    s->copies = calloc((size_t) (nset > 0 ? nset : 1), sizeof(char *));
    s->len = nset;
    embz_err_t err;
    embz_err_clear(&err);
    for (long k = 0; k < nset; k++) {
        s->copies[k] = cli_strdup(sets[k]);
        int status = embz_setting_split(&s->v[k], s->copies[k], &err);
        if (status != EMBZ_OK) return cli_report(cmd, status, &err);
        /* on the command line a parameter given twice is a slip, not "the last one wins"
         * (the library's rule for settings lists) */
        for (long j = 0; j < k; j++)
            if (strcmp(s->v[j].name, s->v[k].name) == 0) {
                embz_err_set(&err, EMBZ_ERR_INPUT, "parameter '%s' is set twice", s->v[k].name);
                return cli_report(cmd, EMBZ_ERR_INPUT, &err);
            }
    }
    return CLI_EXIT_OK;
}

void cli_settings_clear(cli_settings_t *s)
{
    for (long k = 0; k < s->len; k++) free(s->copies[k]);
    free(s->copies);
    free(s->v);
    s->copies = NULL;
    s->v = NULL;
    s->len = 0;
}

int cli_check_settings_used(const embz_family_struct *fam, const embz_setting_t *v, long len,
                            const char *opt, const char *cmd)
{
    for (long k = 0; k < len; k++) {
        int found = 0;
        for (long j = 0; j < fam->nparams && !found; j++)
            found = strcmp(fam->param_names[j], v[k].name) == 0;
        if (found) continue;
        char name[300], fname[300];
        embz_err_quote(name, sizeof(name), v[k].name, 64);
        embz_err_quote(fname, sizeof(fname), fam->name, 200);
        fprintf(stderr, "embz %s: the parameter '%s' given by %s is not used by '%s'%s\n",
                cmd, name, opt, fname, fam->nparams == 0 ? " (it has no parameters)" : "");
        return CLI_EXIT_USAGE;
    }
    return CLI_EXIT_OK;
}

int cli_load_family(embz_family_t fam, const cli_args_t *a, const char *spec_text,
                    const char *cmd)
{
    cli_settings_t s;
    int code = cli_settings_load(&s, a, cmd);
    if (code == CLI_EXIT_OK) {
        embz_err_t err;
        embz_err_clear(&err);
        int status = embz_family_resolve(fam, spec_text, s.v, s.len, cli_flag(a, "amplitude"),
                                         &err);
        if (status != EMBZ_OK) code = cli_report(cmd, status, &err);
        /* an inline expression takes only the settings it uses: a setting left over (a
         * typo, or a parameter of another family) would otherwise change nothing */
        else code = cli_check_settings_used(fam, s.v, s.len, "--set", cmd);
    }
    cli_settings_clear(&s);
    if (code == CLI_EXIT_OK
        && ((fam->raw->notes | fam->count_raw->notes | fam->first_raw->notes
             | fam->last_raw->notes) & EMBZ_EXPR_NOTE_OLD_GAMMA))
        fprintf(stderr, "embz %s: note: 'gamma' in %s is Euler's constant 0.5772...; write "
                        "'euler' (the old name still works; the Gamma function is "
                        "exp(lgamma(x)))\n", cmd, fam->name);
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
    char buf[3000], shown[300];
    embz_err_format(buf, sizeof(buf), &err);
    fprintf(stderr, "embz %s: bad target '%s': %s\n", cmd,
            embz_err_quote(shown, sizeof(shown), text, 200), buf);
    return cli_exit_code(status);
}

int cli_load_prec_upto(long *prec, const cli_args_t *a, const cli_spec_t *spec,
                       long max_bits)
{
    const char *text = cli_value(a, "prec");
    if (text == NULL) return CLI_EXIT_OK;
    if (cli_parse_long(prec, text, 16, max_bits))
        return cli_usage_error(spec, "bad precision '%s' (bits, 16 to %ld)", text, max_bits);
    return CLI_EXIT_OK;
}

int cli_load_threads(int *threads, const cli_args_t *a, const cli_spec_t *spec)
{
    const char *text = cli_value(a, "threads");
    /* every processor, or what OMP_NUM_THREADS allows */
    long t = embz_threads_default();
    if (text != NULL && cli_parse_long(&t, text, 1, EMBZ_THREADS_MAX))
        return cli_usage_error(spec, "bad number of threads '%s' (1 to %d)", text,
                               EMBZ_THREADS_MAX);
    *threads = (int) t;
    return CLI_EXIT_OK;
}

int cli_load_prec(long *prec, const cli_args_t *a, const cli_spec_t *spec)
{
    return cli_load_prec_upto(prec, a, spec, 1L << 20);
}

int cli_load_size(fmpz_t n, const char *text, const char *what, const cli_spec_t *spec)
{
    embz_err_t err;
    embz_err_clear(&err);
    if (embz_size_parse(n, text, &err) == EMBZ_OK) {
        if (fmpz_sgn(n) > 0) return CLI_EXIT_OK;
        embz_err_set(&err, EMBZ_ERR_INPUT, "size '%.80s': n must be at least 1", text);
    }
    char buf[3000];
    embz_err_format(buf, sizeof(buf), &err);
    return what != NULL ? cli_usage_error(spec, "%s: %s", what, buf)
                        : cli_usage_error(spec, "%s", buf);
}

void cli_levels_range(fmpz_t from, fmpz_t to, const embz_family_t f, const cli_args_t *a)
{
    if (!embz_family_is_levels(f) || cli_value(a, "to") != NULL) return;
    if (fmpz_cmp_si(to, CLI_LEVELS_DEFAULT_TO) > 0) fmpz_set_si(to, CLI_LEVELS_DEFAULT_TO);
    if (fmpz_cmp(from, to) > 0) fmpz_set(from, to);
}

int cli_load_range(fmpz_t from, fmpz_t to, long *points, long min_points, long max_points,
                   const cli_args_t *a, const cli_spec_t *spec)
{
    const char *t;
    if (points != NULL && (t = cli_value(a, "points")) != NULL
        && cli_parse_long(points, t, min_points, max_points))
        return cli_usage_error(spec, "bad number of points '%s' (%ld to %ld)", t, min_points,
                               max_points);
    const char *names[2] = { "from", "to" };
    fmpz *vals[2] = { from, to };
    for (int k = 0; k < 2; k++) {
        char what[8];
        snprintf(what, sizeof(what), "--%s", names[k]);
        int code;
        if ((t = cli_value(a, names[k])) != NULL
            && (code = cli_load_size(vals[k], t, what, spec)) != CLI_EXIT_OK)
            return code;
    }
    if (fmpz_cmp(from, to) > 0) return cli_usage_error(spec, "--from must not exceed --to");
    return CLI_EXIT_OK;
}

int cli_check_output(const char *path, const char *cmd)
{
    /* said before any work: a refused output (not a regular file, several hard links) or a
     * directory that is missing or not writable */
    embz_err_t err;
    embz_err_clear(&err);
    int st = embz_output_check(path, &err);
    return st == EMBZ_OK ? CLI_EXIT_OK : cli_report(cmd, st, &err);
}

void cli_note_old_grid(const char *cmd, const char *text, const embz_grid_axis_struct *axis)
{
    if (!axis->old_form) return;
    /* the same grid in the form to write: the first ':' becomes '..', the second ',count=' */
    char now[300];
    size_t j = 0;
    int colons = 0;
    for (const char *p = text; *p != '\0' && j + 8 < sizeof(now); p++) {
        if (*p == ':' && colons < 2) {
            const char *w = colons++ == 0 ? ".." : ",count=";
            while (*w != '\0') now[j++] = *w++;
        } else {
            now[j++] = *p;
        }
    }
    now[j] = '\0';
    fprintf(stderr, "embz %s: note: --grid %s is the old form (LO:HI:COUNT reads as "
                    "start:step:stop in matrix languages); write --grid %s\n", cmd, text, now);
}
