/* The small option parser shared by all subcommands, and common output helpers. */
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <errno.h>
#include <math.h>
#include "cli.h"

static long opt_count(const cli_spec_t *spec)
{
    long k = 0;
    while (spec->opts != NULL && spec->opts[k].name != NULL) k++;
    return k;
}

static long opt_index(const cli_spec_t *spec, const char *name)
{
    long n = opt_count(spec);
    for (long k = 0; k < n; k++)
        if (strcmp(spec->opts[k].name, name) == 0) return k;
    return -1;
}

static long opt_index_short(const cli_spec_t *spec, char c)
{
    long n = opt_count(spec);
    for (long k = 0; k < n; k++)
        if (spec->opts[k].short_name == c) return k;
    return -1;
}

void cli_print_help(FILE *out, const cli_spec_t *spec)
{
    fprintf(out, "usage: embz %s%s%s [options]\n", spec->name,
            spec->args && spec->args[0] ? " " : "", spec->args ? spec->args : "");
    if (spec->summary) fprintf(out, "\n%s\n", spec->summary);
    fprintf(out, "\noptions:\n");
    long n = opt_count(spec);
    for (long k = 0; k <= n; k++) {
        /* the last row is the --help every command has */
        const cli_opt_t help = { "help", 'h', CLI_FLAG, NULL, "show this help and exit" };
        const cli_opt_t *o = (k < n) ? &spec->opts[k] : &help;
        if (o->help == NULL) continue;      /* an old name, still accepted */
        char head[96];
        int w;
        if (o->short_name)
            w = snprintf(head, sizeof(head), "-%c, --%s", o->short_name, o->name);
        else
            w = snprintf(head, sizeof(head), "    --%s", o->name);
        if (o->kind != CLI_FLAG && w > 0 && (size_t) w < sizeof(head))
            snprintf(head + w, sizeof(head) - (size_t) w, " %s", o->metavar ? o->metavar : "X");
        fprintf(out, "  %-26s %s%s\n", head, o->help,
                o->kind == CLI_LIST ? " (repeatable)" : "");
    }
    if (spec->details) fprintf(out, "\n%s", spec->details);
}

static void print_usage_short(FILE *out, const cli_spec_t *spec)
{
    fprintf(out, "usage: embz %s%s%s [options]\n", spec->name,
            spec->args && spec->args[0] ? " " : "", spec->args ? spec->args : "");
    fprintf(out, "Try 'embz %s --help' for the options.\n", spec->name);
}

int cli_usage_error(const cli_spec_t *spec, const char *fmt, ...)
{
    va_list ap;
    fprintf(stderr, "embz %s: ", spec->name);
    va_start(ap, fmt);
    vfprintf(stderr, fmt, ap);
    va_end(ap);
    fprintf(stderr, "\n");
    print_usage_short(stderr, spec);
    return CLI_EXIT_USAGE;
}

static void store(cli_args_t *a, long k, const char *value)
{
    a->count[k]++;
    if (a->spec->opts[k].kind == CLI_VALUE) {
        a->value[k] = value;
    } else if (a->spec->opts[k].kind == CLI_LIST) {
        a->list[k] = realloc(a->list[k], (size_t) (a->nlist[k] + 1) * sizeof(char *));
        a->list[k][a->nlist[k]++] = value;
    }
}

/* "-5", "-0.3,0.2", "-.5": negative numbers are arguments, not options. */
static int looks_negative_number(const char *s)
{
    return s[0] == '-' && ((s[1] >= '0' && s[1] <= '9') || (s[1] == '.' && s[2] >= '0'
                                                              && s[2] <= '9'));
}

int cli_parse(cli_args_t *a, const cli_spec_t *spec, int argc, char **argv)
{
    memset(a, 0, sizeof(*a));
    a->spec = spec;
    a->pos = malloc((size_t) (argc > 0 ? argc : 1) * sizeof(char *));
    int only_pos = 0;

    for (int k = 1; k < argc; k++) {
        const char *arg = argv[k];
        if (only_pos || arg[0] != '-' || arg[1] == '\0' || looks_negative_number(arg)) {
            a->pos[a->npos++] = arg;
            continue;
        }
        if (strcmp(arg, "--") == 0) { only_pos = 1; continue; }
        if (strcmp(arg, "--help") == 0 || strcmp(arg, "-h") == 0) {
            cli_print_help(stdout, spec);
            return CLI_PARSE_HELP;
        }
        long idx;
        const char *inline_value = NULL;
        char namebuf[64];
        if (arg[1] == '-') {
            const char *name = arg + 2;
            const char *eq = strchr(name, '=');
            size_t len = eq ? (size_t) (eq - name) : strlen(name);
            if (len >= sizeof(namebuf)) len = sizeof(namebuf) - 1;
            memcpy(namebuf, name, len);
            namebuf[len] = '\0';
            idx = opt_index(spec, namebuf);
            if (idx < 0)
                return cli_usage_error(spec, "unknown option '--%s'", namebuf);
            if (eq) inline_value = eq + 1;
        } else {
            idx = opt_index_short(spec, arg[1]);
            if (idx < 0)
                return cli_usage_error(spec, "unknown option '-%c'", arg[1]);
            snprintf(namebuf, sizeof(namebuf), "%s", spec->opts[idx].name);
            if (arg[2] != '\0') {
                if (spec->opts[idx].kind == CLI_FLAG)
                    return cli_usage_error(spec, "option '-%c' takes no value (got '%s')",
                                           arg[1], arg);
                inline_value = arg + 2;
            }
        }
        const cli_opt_t *o = &spec->opts[idx];
        if (o->kind == CLI_FLAG) {
            if (inline_value != NULL)
                return cli_usage_error(spec, "option '--%s' takes no value", o->name);
            store(a, idx, NULL);
        } else {
            if (inline_value == NULL) {
                if (k + 1 >= argc)
                    return cli_usage_error(spec, "option '--%s' needs a value (%s)", o->name,
                                           o->metavar ? o->metavar : "X");
                inline_value = argv[++k];
            }
            store(a, idx, inline_value);
        }
    }
    if (a->npos < spec->min_pos || a->npos > spec->max_pos) {
        if (a->npos < spec->min_pos)
            return cli_usage_error(spec, "missing argument%s (expected: %s)",
                                   spec->min_pos - a->npos > 1 ? "s" : "", spec->args);
        return cli_usage_error(spec, "unexpected argument '%s'", a->pos[spec->max_pos]);
    }
    return CLI_PARSE_OK;
}

void cli_args_clear(cli_args_t *a)
{
    for (int k = 0; k < CLI_MAX_OPTS; k++) free(a->list[k]);
    free(a->pos);
    memset(a, 0, sizeof(*a));
}

static long must_index(const cli_args_t *a, const char *name)
{
    long k = opt_index(a->spec, name);
    if (k < 0) {
        /* a programming error in a subcommand, not a user error */
        fprintf(stderr, "embz: internal error: no option '%s' in '%s'\n", name, a->spec->name);
        abort();
    }
    return k;
}

int cli_flag(const cli_args_t *a, const char *name)
{
    return a->count[must_index(a, name)];
}

const char *cli_value(const cli_args_t *a, const char *name)
{
    return a->value[must_index(a, name)];
}

const char *const *cli_list(const cli_args_t *a, const char *name, long *len)
{
    long k = must_index(a, name);
    *len = a->nlist[k];
    return (const char *const *) a->list[k];
}

int cli_exit_code(int status)
{
    if (status == EMBZ_OK) return CLI_EXIT_OK;
    if (status == EMBZ_ERR_INPUT || status == EMBZ_ERR_DOMAIN) return CLI_EXIT_USAGE;
    return CLI_EXIT_RUNTIME;
}

int cli_report(const char *cmd, int status, const embz_err_t *err)
{
    char buf[4096];
    int code = status;
    if (err != NULL && err->text[0] != '\0') {
        embz_err_format(buf, sizeof(buf), err);
    } else {
        snprintf(buf, sizeof(buf), "failed (status %d)", status);
    }
    fprintf(stderr, "embz %s: %s\n", cmd, buf);
    return cli_exit_code(code);
}

void cli_buf_json_double(embz_buf_t *b, double x)
{
    if (isfinite(x))
        embz_buf_printf(b, "%.17g", x);
    else
        embz_buf_printf(b, "null");
}

void cli_buf_csv_field(embz_buf_t *b, const char *text)
{
    if (strpbrk(text, ",\"\n\r") == NULL) {
        embz_buf_printf(b, "%s", text);
        return;
    }
    embz_buf_printf(b, "\"");
    for (const char *p = text; *p; p++) {
        if (*p == '"') embz_buf_printf(b, "\"\"");
        else embz_buf_printf(b, "%c", *p);
    }
    embz_buf_printf(b, "\"");
}

double cli_arb_radius_d(const arb_t x)
{
    arf_t r;
    arf_init(r);
    arf_set_mag(r, arb_radref(x));
    double d = arf_get_d(r, ARF_RND_UP);
    arf_clear(r);
    return d;
}

int cli_parse_long(long *res, const char *s, long lo, long hi)
{
    char *end;
    errno = 0;
    long v = strtol(s, &end, 10);
    if (errno != 0 || end == s || *end != '\0' || v < lo || v > hi) return 1;
    *res = v;
    return 0;
}

/* ---- shared command helpers ---- */

int cli_begin(cli_args_t *a, const cli_spec_t *spec, int argc, char **argv, int *code)
{
    int pr = cli_parse(a, spec, argc, argv);
    *code = pr == CLI_PARSE_ERROR ? CLI_EXIT_USAGE : CLI_EXIT_OK;
    if (pr == CLI_PARSE_OK) return 1;
    cli_args_clear(a);
    return 0;
}

char *cli_strdup(const char *s)
{
    size_t l = strlen(s) + 1;
    char *d = malloc(l);
    memcpy(d, s, l);
    return d;
}

char *cli_family_label(const embz_family_struct *f)
{
    return embz_family_label(f);
}

void cli_buf_json_params(embz_buf_t *b, const embz_family_struct *f)
{
    embz_buf_printf(b, "{");
    for (long k = 0; k < f->nparams; k++) {
        char *v = fmpq_get_str(NULL, 10, f->param_values + k);
        embz_buf_printf(b, "%s", k ? ", " : "");
        embz_buf_json_string(b, f->param_names[k]);
        embz_buf_printf(b, ": ");
        embz_buf_json_string(b, v);
        flint_free(v);
    }
    embz_buf_printf(b, "}");
}

void cli_buf_json_key_string(embz_buf_t *b, const char *key, const char *text)
{
    embz_buf_printf(b, ", \"%s\": ", key);
    embz_buf_json_string(b, text);
}

void cli_buf_json_key_double(embz_buf_t *b, const char *key, double x)
{
    embz_buf_printf(b, ", \"%s\": ", key);
    cli_buf_json_double(b, x);
}

void cli_buf_json_vlohi(embz_buf_t *b, double v, double lo, double hi)
{
    embz_buf_printf(b, "\"value\": ");
    cli_buf_json_double(b, v);
    cli_buf_json_key_double(b, "lo", lo);
    cli_buf_json_key_double(b, "hi", hi);
}

void cli_buf_json_string_or_null(embz_buf_t *b, const char *text)
{
    if (text[0]) embz_buf_json_string(b, text);
    else embz_buf_printf(b, "null");
}

void cli_buf_json_verdicts(embz_buf_t *b, const embz_classify_struct *c)
{
    embz_buf_printf(b, "\"verdict\": \"%s\", \"numeric_verdict\": \"%s\", \"analytic_verdict\": ",
                    embz_verdict_id(c->verdict), embz_verdict_id(c->numeric_verdict));
    if (c->analytic_available)
        embz_buf_printf(b, "\"%s\"", embz_verdict_id(c->analytic_verdict));
    else
        embz_buf_printf(b, "null");
}

void cli_buf_csv_fields(embz_buf_t *b, const char *const *fields, int n)
{
    for (int k = 0; k < n; k++) {
        cli_buf_csv_field(b, fields[k]);
        embz_buf_printf(b, ",");
    }
}

void cli_buf_csv_num(embz_buf_t *b, double x)
{
    if (isfinite(x)) embz_buf_printf(b, ",%.10g", x);
    else embz_buf_printf(b, ",");
}
