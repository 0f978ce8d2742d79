/* Fuzz target: the family-file reader. The input is the text of a family file. It is read
 * twice, from memory (embz_family_parse_text) and from a file on disk (embz_family_load_file),
 * and both must agree. A family that loads must be well formed (a weight, valid distinct
 * parameter names), its weights must be non-negative and finite wherever they are defined,
 * and every parameter must accept a new value. A file that does not load must name the file
 * and a line inside it. */
#include <unistd.h>
#include "fuzz_common.h"
#include "embz/family.h"

static char dir_path[64];
static char file_path[96];

static void remove_file(void)
{
    unlink(file_path);
    rmdir(dir_path);
}

static const char *temp_file(void)
{
    if (file_path[0] == '\0') {
        const char *tmp = getenv("TMPDIR");
        snprintf(dir_path, sizeof(dir_path), "%s/embz-fuzz-XXXXXX",
                 tmp != NULL && strlen(tmp) < 40 ? tmp : "/tmp");
        FUZZ_CHECK(mkdtemp(dir_path) != NULL);
        snprintf(file_path, sizeof(file_path), "%s/fuzz.fam", dir_path);
        atexit(remove_file);
    }
    return file_path;
}

static void write_file(const char *path, const uint8_t *data, size_t size)
{
    FILE *fp = fopen(path, "wb");
    FUZZ_CHECK(fp != NULL);
    FUZZ_CHECK(fwrite(data, 1, size, fp) == size);
    FUZZ_CHECK(fclose(fp) == 0);
}

static void check_family(embz_family_t f)
{
    FUZZ_CHECK(f->name != NULL && f->name[0] != '\0');
    FUZZ_CHECK(f->weight_text != NULL && f->weight_text[0] != '\0');
    FUZZ_CHECK(f->raw->root >= 0 && f->weight->root >= 0);
    FUZZ_CHECK(f->raw->nparams == f->nparams);
    FUZZ_CHECK(!(embz_expr_uses(f->weight) & EMBZ_USES_PARAM));
    for (long k = 0; k < f->nparams; k++)
        for (long j = 0; j < k; j++)
            FUZZ_CHECK(strcmp(f->param_names[j], f->param_names[k]) != 0);

    embz_err_t err;
    arb_t w;
    fmpz_t i, n;
    arb_init(w); fmpz_init(i); fmpz_init(n);
    static const long sizes[] = { 1, 10, 1000 };
    for (int s = 0; s < 3; s++) {
        fmpz_set_si(n, sizes[s]);
        for (long k = 1; k <= sizes[s] && k <= 12; k += 1 + k / 3) {
            fmpz_set_si(i, k);
            embz_err_clear(&err);
            int st = embz_family_weight_arb(w, f, i, n, 64, &err);
            FUZZ_CHECK(st == EMBZ_OK || st == EMBZ_ERR_DOMAIN);
            if (st == EMBZ_OK) {
                FUZZ_CHECK(arb_is_finite(w));
                FUZZ_CHECK(!arb_is_negative(w));
            } else {
                FUZZ_CHECK(err.text[0] != '\0');
                FUZZ_CHECK_ERR(&err);
            }
            (void) embz_family_weight_d(f, (double) k, (double) sizes[s]);
        }
    }
    (void) embz_family_depends_on_n(f);

    /* every declared parameter takes a new value; an undeclared one is refused */
    embz_setting_t set[2];
    if (f->nparams > 0) {
        set[0].name = f->param_names[f->nparams - 1];
        set[0].value = "1/3";
        embz_err_clear(&err);
        FUZZ_CHECK(embz_family_apply_settings(f, set, 1, &err) == EMBZ_OK);
        fmpq_t third;
        fmpq_init(third);
        fmpq_set_si(third, 1, 3);
        FUZZ_CHECK(fmpq_equal(f->param_values + f->nparams - 1, third));
        fmpq_clear(third);
        FUZZ_CHECK(!(embz_expr_uses(f->weight) & EMBZ_USES_PARAM));
    }
    set[1].name = "no_such_parameter_in_any_file";
    set[1].value = "1";
    int declared = 0;
    for (long k = 0; k < f->nparams; k++)
        declared |= strcmp(f->param_names[k], set[1].name) == 0;
    embz_err_clear(&err);
    if (!declared) {
        FUZZ_CHECK(embz_family_apply_settings(f, set + 1, 1, &err) == EMBZ_ERR_INPUT);
        FUZZ_CHECK_ERR(&err);
    }
    arb_clear(w); fmpz_clear(i); fmpz_clear(n);
}

/* Both readers must reach the same family, or fail on the same line. */
static void check_same(const embz_family_t f, int st, const embz_err_t *e,
                       const embz_family_t g, int sg, const embz_err_t *eg)
{
    FUZZ_CHECK(st == sg);
    if (st != EMBZ_OK) {
        FUZZ_CHECK(e->line == eg->line && e->col == eg->col);
        FUZZ_CHECK(strcmp(e->text, eg->text) == 0);
        return;
    }
    FUZZ_CHECK(strcmp(f->name, g->name) == 0);
    FUZZ_CHECK(strcmp(f->description, g->description) == 0);
    FUZZ_CHECK(strcmp(f->weight_text, g->weight_text) == 0);
    FUZZ_CHECK(f->amplitude == g->amplitude && f->nparams == g->nparams);
    FUZZ_CHECK(embz_expr_equal(f->raw, g->raw) && embz_expr_equal(f->weight, g->weight));
    for (long k = 0; k < f->nparams; k++)
        FUZZ_CHECK(fmpq_equal(f->param_values + k, g->param_values + k));
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    if (size > 65536) return 0;
    const char *path = temp_file();
    char *text = fuzz_text(data, size);
    embz_family_t f, g;
    embz_err_t err, errg;
    embz_family_init(f);
    embz_family_init(g);
    embz_err_clear(&err);
    embz_err_clear(&errg);

    int st = embz_family_parse_text(f, text, path, &err);
    long nlines = 1;
    for (const char *p = text; *p; p++) nlines += *p == '\n';
    if (st == EMBZ_OK) {
        check_family(f);
    } else {
        FUZZ_CHECK(st == EMBZ_ERR_INPUT);
        FUZZ_CHECK(err.code == st && err.text[0] != '\0');
        FUZZ_CHECK(strcmp(err.file, path) == 0);
        FUZZ_CHECK(err.line >= 0 && err.line <= nlines);
        FUZZ_CHECK_ERR(&err);
    }

    write_file(path, data, size);
    int sg = embz_family_load_file(g, path, &errg);
    if (memchr(data, '\0', size) != NULL) {
        FUZZ_CHECK(sg == EMBZ_ERR_INPUT);
        FUZZ_CHECK_ERR(&errg);
    } else {
        embz_family_t h;
        embz_family_init(h);
        embz_err_clear(&err);
        st = embz_family_parse_text(h, text, path, &err);   /* f was changed by the checks */
        check_same(h, st, &err, g, sg, &errg);
        embz_family_clear(h);
    }

    embz_family_clear(f);
    embz_family_clear(g);
    free(text);
    flint_cleanup();
    return 0;
}
