/* Fuzz target: the option parsing of every command, without running the command. The input
 * is a command line, one word per line: the first word names the command (as in main.c's
 * table), the rest are its arguments. They go through cli_parse with that command's option
 * table, then through the shared loaders a command calls before it computes anything: the
 * precision, the size range, the target, the settings, the family (or, for convert, the two
 * vectors), sizes, measures and grid axes. The computation itself is never started.
 *
 * main.c is included here (its main renamed) so that its command table is visible: every
 * command listed there must have an option table here, checked on the first input. Messages
 * the CLI prints while parsing go to /dev/null unless EMBZ_FUZZ_VERBOSE is set. */
#define main embz_cli_main_unused
#include "src/cli/main.c"
#undef main

#include "fuzz_common.h"

const cli_spec_t *fuzz_spec_families(void);
const cli_spec_t *fuzz_spec_convert(void);
const cli_spec_t *fuzz_spec_error(void);
const cli_spec_t *fuzz_spec_sweep(void);
const cli_spec_t *fuzz_spec_classify(void);
const cli_spec_t *fuzz_spec_scan(void);
const cli_spec_t *fuzz_spec_size(void);
const cli_spec_t *fuzz_spec_optimal(void);
const cli_spec_t *fuzz_spec_plot(void);
const cli_spec_t *fuzz_spec_report(void);
const cli_spec_t *fuzz_spec_demo(void);

static const cli_spec_t *(*const spec_getters[])(void) = {
    fuzz_spec_families, fuzz_spec_convert, fuzz_spec_error, fuzz_spec_sweep,
    fuzz_spec_classify, fuzz_spec_scan, fuzz_spec_size, fuzz_spec_optimal, fuzz_spec_plot,
    fuzz_spec_report, fuzz_spec_demo,
};
#define NSPECS ((long) (sizeof(spec_getters) / sizeof(spec_getters[0])))

#define MAX_WORDS 256

static const cli_spec_t *find_spec(const char *name)
{
    for (long k = 0; k < NSPECS; k++)
        if (strcmp(spec_getters[k]()->name, name) == 0) return spec_getters[k]();
    return NULL;
}

/* The tables here and in main.c name the same commands. */
static void check_tables(void)
{
    FUZZ_CHECK(NSPECS == NCOMMANDS);
    for (long k = 0; k < NCOMMANDS; k++) FUZZ_CHECK(find_spec(commands[k].name) != NULL);
    for (long k = 0; k < NSPECS; k++) {
        const cli_spec_t *s = spec_getters[k]();
        FUZZ_CHECK(find_command(s->name) != NULL);
        long n = 0;
        while (s->opts[n].name != NULL) n++;
        FUZZ_CHECK(n <= CLI_MAX_OPTS);
    }
}

static long opt_of(const cli_spec_t *spec, const char *name)
{
    for (long k = 0; spec->opts[k].name != NULL; k++)
        if (strcmp(spec->opts[k].name, name) == 0) return k;
    return -1;
}

/* What cli_parse returned must describe the words it was given. */
static void check_args(const cli_args_t *a, const cli_spec_t *spec, int argc, char **argv)
{
    FUZZ_CHECK(a->npos >= spec->min_pos && a->npos <= spec->max_pos);
    for (long k = 0; k < a->npos; k++) {
        int found = 0;
        for (int j = 1; j < argc && !found; j++) found = a->pos[k] == argv[j];
        FUZZ_CHECK(found);
    }
    for (long k = 0; spec->opts[k].name != NULL; k++) {
        FUZZ_CHECK(a->count[k] >= 0 && a->count[k] < argc);
        if (spec->opts[k].kind == CLI_VALUE) FUZZ_CHECK((a->count[k] > 0) == (a->value[k] != NULL));
        if (spec->opts[k].kind == CLI_LIST) FUZZ_CHECK(a->nlist[k] == a->count[k]);
        if (spec->opts[k].kind == CLI_FLAG) FUZZ_CHECK(a->value[k] == NULL && a->nlist[k] == 0);
    }
}

/* The loaders, each one only where the command has its options. */
static void load_values(const cli_args_t *a, const cli_spec_t *spec)
{
    const char *cmd = spec->name;
    embz_err_t err;
    if (opt_of(spec, "prec") >= 0) {
        long prec = 128;
        if (cli_load_prec(&prec, a, spec) == 0) FUZZ_CHECK(prec >= 16 && prec <= (1L << 20));
    }
    if (opt_of(spec, "from") >= 0 && opt_of(spec, "to") >= 0) {
        fmpz_t from, to;
        long points = 20;
        fmpz_init(from); fmpz_init(to);
        fmpz_set_ui(from, 10);
        fmpz_ui_pow_ui(to, 10, 30);
        int has_points = opt_of(spec, "points") >= 0;
        if (cli_load_range(from, to, has_points ? &points : NULL, 5, 1000, a, spec) == 0) {
            FUZZ_CHECK(fmpz_cmp_ui(from, 1) >= 0 && fmpz_cmp(from, to) <= 0);
            FUZZ_CHECK(points >= 5 && points <= 1000);
        }
        fmpz_clear(from); fmpz_clear(to);
    }
    if (opt_of(spec, "target") >= 0) {
        embz_target_t q;
        embz_target_init(q);
        if (cli_load_target(q, a, cmd) == 0)
            FUZZ_CHECK(q->kind == EMBZ_TARGET_UNIFORM ? q->d >= 2 : q->q->len >= 2);
        embz_target_clear(q);
    }
    if (opt_of(spec, "size") >= 0 && cli_value(a, "size") != NULL) {
        fmpz_t n;
        fmpz_init(n);
        embz_err_clear(&err);
        if (embz_size_parse(n, cli_value(a, "size"), &err) == EMBZ_OK)
            FUZZ_CHECK(fmpz_sgn(n) > 0);
        fmpz_clear(n);
    }
    if (opt_of(spec, "measure") >= 0 && cli_value(a, "measure") != NULL) {
        int m;
        embz_err_clear(&err);
        (void) embz_measure_parse(&m, cli_value(a, "measure"), &err);
    }
    if (opt_of(spec, "threads") >= 0 && cli_value(a, "threads") != NULL) {
        long th;
        if (cli_parse_long(&th, cli_value(a, "threads"), 1, 1024) == 0)
            FUZZ_CHECK(th >= 1 && th <= 1024);
    }
    if (opt_of(spec, "grid") >= 0) {
        long ng;
        const char *const *grids = cli_list(a, "grid", &ng);
        for (long k = 0; k < ng; k++) {
            embz_grid_axis_struct axis;
            embz_err_clear(&err);
            if (embz_grid_axis_parse(&axis, grids[k], &err) == EMBZ_OK)
                FUZZ_CHECK(axis.count >= 1);
            embz_grid_axis_clear(&axis);
        }
    }
    if (opt_of(spec, "set") >= 0) {
        cli_settings_t s;
        if (cli_settings_load(&s, a, cmd) == 0)
            for (long k = 0; k < s.len; k++) FUZZ_CHECK(s.v[k].name[0] != '\0');
        cli_settings_clear(&s);
    }

    /* the positional arguments */
    if (strcmp(cmd, "convert") == 0) {
        int amp = cli_flag(a, "amplitude");
        for (long k = 0; k < a->npos; k++) {
            embz_qvec_t v;
            embz_qvec_init(v);
            embz_err_clear(&err);
            (void) embz_qvec_parse(v, a->pos[k], amp, &err);
            embz_qvec_clear(v);
        }
    } else if (a->npos == 1 && opt_of(spec, "set") >= 0 && opt_of(spec, "amplitude") >= 0) {
        embz_family_t f;
        embz_family_init(f);
        if (cli_load_family(f, a, a->pos[0], cmd) == 0)
            FUZZ_CHECK(f->weight->root >= 0 && !(embz_expr_uses(f->weight) & EMBZ_USES_PARAM));
        embz_family_clear(f);
    } else if (a->npos >= 1) {
        embz_family_struct *fam = calloc((size_t) a->npos, sizeof(embz_family_struct));
        FUZZ_CHECK(fam != NULL);
        for (long k = 0; k < a->npos; k++) embz_family_init(fam + k);
        if (cli_compare_load(fam, a->npos, a->pos, a, spec) == 0)
            for (long k = 0; k < a->npos; k++) FUZZ_CHECK(fam[k].weight->root >= 0);
        for (long k = 0; k < a->npos; k++) embz_family_clear(fam + k);
        free(fam);
    }
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    static int checked = 0;
    if (!checked) {
        check_tables();
        checked = 1;
    }
    if (size > 16384) return 0;
    char *text = fuzz_text(data, size);
    char *argv[MAX_WORDS + 1];
    int argc = 0;
    for (char *p = text; p != NULL && argc < MAX_WORDS;) {
        argv[argc++] = p;
        p = strchr(p, '\n');
        if (p != NULL) *p++ = '\0';
    }
    argv[argc] = NULL;
    const cli_spec_t *spec = find_spec(argv[0]);
    if (spec == NULL) {
        free(text);
        return 0;
    }

    /* glibc lets stdout and stderr be reassigned: the CLI's messages go nowhere */
    FILE *out = stdout, *errf = stderr, *null = NULL;
    if (getenv("EMBZ_FUZZ_VERBOSE") == NULL) {
        null = fopen("/dev/null", "w");
        FUZZ_CHECK(null != NULL);
        stdout = null;
        stderr = null;
    }
    cli_args_t a;
    int pr = cli_parse(&a, spec, argc, argv);
    FUZZ_CHECK(pr == CLI_PARSE_OK || pr == CLI_PARSE_HELP || pr == CLI_PARSE_ERROR);
    if (pr == CLI_PARSE_OK) {
        check_args(&a, spec, argc, argv);
        load_values(&a, spec);
    }
    cli_args_clear(&a);
    if (null != NULL) {
        stdout = out;
        stderr = errf;
        fclose(null);
    }
    free(text);
    flint_cleanup();
    return 0;
}
