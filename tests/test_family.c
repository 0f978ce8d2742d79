/* Tests of the family module: family files, resolution, --set, amplitudes, weights. */
#include <check.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include "embz.h"
#include "testutil.h"

/* ---------------------------------------------------------------- helpers */

static void resolve_ok(embz_family_t f, const char *spec, const embz_setting_t *s, long ns,
                       int amplitude)
{
    embz_err_t err;
    int st = embz_family_resolve(f, spec, s, ns, amplitude, &err);
    ck_assert_msg(st == EMBZ_OK, "resolving '%s' failed: %s", spec, err.text);
}

/* weight at (i, n) must contain the exact rational num/den and be narrow */
static void check_exact(const embz_family_t f, slong i, slong n, slong num, ulong den)
{
    fmpz_t fi, fn;
    fmpq_t q;
    arb_t w;
    embz_err_t err;
    fmpz_init_set_si(fi, i);
    fmpz_init_set_si(fn, n);
    fmpq_init(q);
    arb_init(w);
    fmpq_set_si(q, num, den);
    ck_assert_int_eq(embz_family_weight_arb(w, f, fi, fn, 128, &err), EMBZ_OK);
    ck_assert_msg(arb_contains_fmpq(w, q), "weight of %s at i = %ld misses %ld/%lu", f->name,
                  (long) i, (long) num, (unsigned long) den);
    ck_assert(arb_rel_accuracy_bits(w) > 100 || arb_is_exact(w));
    arb_clear(w);
    fmpq_clear(q);
    fmpz_clear(fi);
    fmpz_clear(fn);
}

/* Expect a domain error naming the index (and a word of the cause). */
static void check_weight_error(const char *expr, slong i, const char *word)
{
    embz_family_t f;
    embz_err_t err;
    fmpz_t fi, fn;
    arb_t w;
    char want[64];
    embz_family_init(f);
    fmpz_init_set_si(fi, i);
    fmpz_init_set_si(fn, 100);
    arb_init(w);
    resolve_ok(f, expr, NULL, 0, 0);
    ck_assert_int_eq(embz_family_weight_arb(w, f, fi, fn, 64, &err), EMBZ_ERR_DOMAIN);
    snprintf(want, sizeof(want), "at i = %ld", (long) i);
    ck_assert_msg(strstr(err.text, want) != NULL, "'%s': message '%s' lacks '%s'", expr,
                  err.text, want);
    ck_assert_msg(strstr(err.text, word) != NULL, "'%s': message '%s' lacks '%s'", expr,
                  err.text, word);
    arb_clear(w);
    fmpz_clear(fi);
    fmpz_clear(fn);
    embz_family_clear(f);
}

/* ---------------------------------------------------------------- file format */

START_TEST(test_parse_good)
{
    const char *text =
        "# a test family\n"
        "\n"
        "name = tf\n"
        "description = i to the a = power, shifted by c\n"
        "   param a = -1/2\n"
        "param c=3\n"
        "weight = (i + c)^a   \n";
    embz_family_t f;
    embz_err_t err;
    embz_family_init(f);
    ck_assert_int_eq(embz_family_parse_text(f, text, "tf.fam", &err), EMBZ_OK);
    ck_assert_str_eq(f->name, "tf");
    ck_assert_str_eq(f->description, "i to the a = power, shifted by c");
    ck_assert_str_eq(f->weight_text, "(i + c)^a");
    ck_assert_int_eq(f->amplitude, 0);
    ck_assert_int_eq(f->nparams, 2);
    ck_assert_str_eq(f->param_names[0], "a");
    ck_assert_str_eq(f->param_names[1], "c");
    fmpq_t q;
    fmpq_init(q);
    fmpq_set_si(q, -1, 2);
    ck_assert(fmpq_equal(f->param_values + 0, q));
    fmpq_set_si(q, 3, 1);
    ck_assert(fmpq_equal(f->param_values + 1, q));
    fmpq_clear(q);
    ck_assert_int_eq(embz_family_depends_on_n(f), 0);
    /* (1 + 3)^(-1/2) = 1/2 at i = 1; (6 + 3)^(-1/2) = 1/3 at i = 6 */
    check_exact(f, 1, 10, 1, 2);
    check_exact(f, 6, 10, 1, 3);
    embz_family_clear(f);

    /* no name: taken from the file name; CRLF line ends; no final newline */
    embz_family_init(f);
    ck_assert_int_eq(embz_family_parse_text(f, "amplitude = 1/i\r\ndescription = x\r\n",
                                            "/some/dir/sq.fam", &err), EMBZ_OK);
    ck_assert_str_eq(f->name, "sq");
    ck_assert_str_eq(f->weight_text, "1/i");
    ck_assert_int_eq(f->amplitude, 1);
    check_exact(f, 7, 10, 1, 49);
    embz_family_clear(f);
}
END_TEST

typedef struct {
    const char *text;
    long line;
    const char *words;
} bad_file_t;

static const bad_file_t bad_files[] = {
    { "name = a\nfoo = 1\nweight = 1\n", 2, "unknown key 'foo'" },
    { "# ok\nname a\nweight = 1\n", 2, "missing '='" },
    { "weight = 1\nname = a\nname = b\n", 3, "duplicate key 'name'" },
    { "weight = 1\nweight = 2\n", 2, "duplicate key 'weight'" },
    { "weight = 1\n\namplitude = 2\n", 3, "both 'weight' and 'amplitude'" },
    { "param a = abc\nweight = i^a\n", 1, "bad parameter value" },
    { "param a = 0.5.1\nweight = i^a\n", 1, "bad parameter value" },
    { "weight = i^a\n\n\nparam a\n", 4, "missing '='" },
    { "param 1a = 2\nweight = 1\n", 1, "bad parameter name" },
    { "param log = 2\nweight = 1\n", 1, "bad parameter name" },
    { "param i = 2\nweight = 1\n", 1, "bad parameter name" },
    { "param a = 1\nparam a = 2\nweight = i^a\n", 2, "duplicate parameter 'a'" },
    { "name = x\ndescription = y\n", 0, "missing weight" },
    { "", 0, "missing weight" },
    { "name = x\nweight =\n", 2, "empty value" },
    /* level families */
    { "level = 2^-i\ncount = 1\nfirst = 1\n", 1, "needs 'last" },
    { "weight = 1/i\ncount = 2\n", 2, "belongs to a level family" },
    { "weight = 1/i\nlevel = 2\n", 2, "both 'weight' and 'level'" },
    { "level = 2^-i\ncount = binom(n,\nfirst = 0\nlast = n\n", 2, "" },
};

START_TEST(test_parse_errors)
{
    for (size_t k = 0; k < sizeof(bad_files) / sizeof(bad_files[0]); k++) {
        embz_family_t f;
        embz_err_t err;
        char buf[2048];
        embz_family_init(f);
        int st = embz_family_parse_text(f, bad_files[k].text, "bad.fam", &err);
        ck_assert_msg(st == EMBZ_ERR_INPUT, "case %zu accepted", k);
        ck_assert_msg(err.line == bad_files[k].line, "case %zu: line %ld, want %ld", k,
                      err.line, bad_files[k].line);
        ck_assert_str_eq(err.file, "bad.fam");
        ck_assert_msg(strstr(err.text, bad_files[k].words) != NULL,
                      "case %zu: message '%s' lacks '%s'", k, err.text, bad_files[k].words);
        embz_err_format(buf, sizeof(buf), &err);
        if (bad_files[k].line > 0) {
            char want[64];
            snprintf(want, sizeof(want), "bad.fam:%ld: ", bad_files[k].line);
            ck_assert_msg(strncmp(buf, want, strlen(want)) == 0, "case %zu: '%s'", k, buf);
        }
        /* a failed parse leaves f usable and empty */
        ck_assert_int_eq(f->nparams, 0);
        embz_family_clear(f);
    }
}
END_TEST

START_TEST(test_parse_expression_error)
{
    /* an unknown name inside the weight: file:line plus the column within the expression */
    const char *text = "# header\nname = x\nparam a = 1\nweight = 1/(i + foo)\n";
    embz_family_t f;
    embz_err_t err;
    char buf[2048];
    embz_family_init(f);
    ck_assert_int_eq(embz_family_parse_text(f, text, "x.fam", &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(err.line, 4);
    ck_assert_str_eq(err.file, "x.fam");
    ck_assert_str_eq(err.source, "1/(i + foo)");
    ck_assert_int_eq(err.col, 8);                /* the 'f' of foo */
    embz_err_format(buf, sizeof(buf), &err);
    ck_assert_msg(strncmp(buf, "x.fam:4: ", 9) == 0, "%s", buf);
    ck_assert_msg(strstr(buf, "\n  1/(i + foo)\n         ^") != NULL, "caret: %s", buf);
    embz_family_clear(f);

    /* a syntax error: column of the stray operator */
    embz_family_init(f);
    ck_assert_int_eq(embz_family_parse_text(f, "weight = i^a + * 2\nparam a = 1\n", "y.fam",
                                            &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(err.line, 1);
    ck_assert_int_eq(err.col, 7);
    /* parameters declared after the weight line are known to it: only '*' is wrong */
    embz_family_clear(f);
}
END_TEST

START_TEST(test_load_file)
{
    char path[] = "/tmp/embz_test_famXXXXXX";
    int fd = mkstemp(path);
    ck_assert(fd >= 0);
    const char *text = "name = tmp\nparam k = 2\nweight = i^k\n\nbogus line\n";
    ck_assert(write(fd, text, strlen(text)) == (ssize_t) strlen(text));
    close(fd);

    embz_family_t f;
    embz_err_t err;
    embz_family_init(f);
    ck_assert_int_eq(embz_family_load_file(f, path, &err), EMBZ_ERR_INPUT);
    ck_assert_str_eq(err.file, path);
    ck_assert_int_eq(err.line, 5);
    /* via resolve (a path) the same error */
    ck_assert_int_eq(embz_family_resolve(f, path, NULL, 0, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(err.line, 5);

    FILE *fp = fopen(path, "w");
    fputs("name = tmp\nparam k = 2\nweight = i^k\n", fp);
    fclose(fp);
    ck_assert_int_eq(embz_family_resolve(f, path, NULL, 0, 0, &err), EMBZ_OK);
    ck_assert_str_eq(f->origin, path);
    check_exact(f, 7, 7, 49, 1);
    unlink(path);

    ck_assert_int_ne(embz_family_load_file(f, "/nonexistent/dir/x.fam", &err), EMBZ_OK);
    ck_assert_str_eq(err.file, "/nonexistent/dir/x.fam");
    ck_assert_int_ne(embz_family_resolve(f, "/nonexistent/dir/x.fam", NULL, 0, 0, &err),
                     EMBZ_OK);
    embz_family_clear(f);
}
END_TEST

/* A byte-order mark before the first line is not part of its key. */
START_TEST(test_parse_bom)
{
    embz_family_t f;
    embz_err_t err;
    embz_family_init(f);
    ck_assert_int_eq(embz_family_parse_text(f, "\xef\xbb\xbfname = bom\nweight = 1/i\n", "b.fam",
                                            &err), EMBZ_OK);
    ck_assert_str_eq(f->name, "bom");
    check_exact(f, 4, 10, 1, 4);
    /* elsewhere the same bytes are what they are: an unknown key, shown escaped */
    ck_assert_int_eq(embz_family_parse_text(f, "name = x\n\xef\xbb\xbfweight = 1/i\n", "b.fam",
                                            &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(err.line, 2);
    ck_assert_msg(strstr(err.text, "unknown key '\xef\xbb\xbfweight'") != NULL, "%s", err.text);
    ck_assert_int_eq(embz_family_parse_text(f, "name = x\n\x01key = 1\nweight = 1/i\n", "b.fam",
                                            &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "unknown key '\\x01key'") != NULL, "%s", err.text);
    embz_family_clear(f);
}
END_TEST

/* A path that cannot be a family file says why: missing, a directory, a device, a symbolic
 * link loop, no permission; all are input errors (exit code 2), none is read as an
 * expression. */
START_TEST(test_file_refusals)
{
    embz_family_t f;
    embz_err_t err;
    char dir[] = "/tmp/embz_test_famdirXXXXXX";
    char p[400];
    embz_family_init(f);
    ck_assert_ptr_nonnull(mkdtemp(dir));

    snprintf(p, sizeof(p), "%s/sub.fam", dir);
    ck_assert_int_eq(mkdir(p, 0700), 0);
    ck_assert_int_eq(embz_family_resolve(f, p, NULL, 0, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "is a directory") != NULL, "%s", err.text);
    ck_assert_str_eq(err.file, p);
    ck_assert_int_eq(embz_family_load_file(f, p, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "is a directory") != NULL, "%s", err.text);
    rmdir(p);
    /* a directory named without .fam, which is no expression either */
    ck_assert_int_eq(embz_family_resolve(f, dir, NULL, 0, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "is a directory") != NULL, "%s", err.text);
    ck_assert_int_eq(embz_family_resolve(f, "/dev/null", NULL, 0, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "not a regular file") != NULL, "%s", err.text);
    ck_assert_str_eq(err.file, "/dev/null");

    char a[400], b[400];
    snprintf(a, sizeof(a), "%s/a.fam", dir);
    snprintf(b, sizeof(b), "%s/b.fam", dir);
    ck_assert_int_eq(symlink(b, a), 0);
    ck_assert_int_eq(symlink(a, b), 0);
    ck_assert_int_eq(embz_family_resolve(f, a, NULL, 0, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "no such file") == NULL && strstr(err.text, "symbolic")
                  != NULL, "%s", err.text);
    unlink(a);
    unlink(b);
    ck_assert_int_eq(embz_family_resolve(f, a, NULL, 0, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "no such file") != NULL, "%s", err.text);

    /* no permission to read: checked as an unprivileged user in a child process (root may
     * read anything) */
    snprintf(p, sizeof(p), "%s/locked.fam", dir);
    FILE *fp = fopen(p, "w");
    ck_assert_ptr_nonnull(fp);
    fputs("weight = 1/i\n", fp);
    fclose(fp);
    ck_assert_int_eq(chmod(p, 0), 0);
    ck_assert_int_eq(chmod(dir, 0755), 0);
    pid_t pid = fork();
    ck_assert_int_ge(pid, 0);
    if (pid == 0) {
        if (geteuid() == 0 && (setgid(65534) != 0 || setuid(65534) != 0)) _exit(90);
        embz_family_t g;
        embz_err_t e2;
        embz_family_init(g);
        int st = embz_family_resolve(g, p, NULL, 0, 0, &e2);
        _exit(st == EMBZ_ERR_INPUT && strstr(e2.text, "Permission denied") != NULL ? 0 : 91);
    }
    int wst = 0;
    ck_assert_int_eq(waitpid(pid, &wst, 0), pid);
    ck_assert_msg(WIFEXITED(wst) && WEXITSTATUS(wst) == 0, "child: %d", WEXITSTATUS(wst));
    unlink(p);
    rmdir(dir);
    embz_family_clear(f);
}
END_TEST

/* ---------------------------------------------------------------- the library */

static const char *const shipped[] = {
    "inverse", "power", "logpower", "iterlog", "nearmiss", "uniform", "geometric", "tilted",
    "invamp", NULL
};

START_TEST(test_library)
{
    /* the test environment points EMBZ_FAMILY_PATH at families/ */
    const char *env = getenv("EMBZ_FAMILY_PATH");
    const char *const *dirs = embz_family_dirs();
    ck_assert(dirs[0] != NULL);
    if (env != NULL && env[0] != '\0' && strchr(env, ':') == NULL)
        ck_assert_str_eq(dirs[0], env);

    char **paths;
    long count;
    embz_err_t err;
    ck_assert_int_eq(embz_family_list(&paths, &count, &err), EMBZ_OK);
    for (long s = 0; shipped[s] != NULL; s++) {
        int found = 0;
        for (long k = 0; k < count; k++) {
            const char *b = strrchr(paths[k], '/');
            char want[64];
            snprintf(want, sizeof(want), "%s.fam", shipped[s]);
            if (strcmp(b ? b + 1 : paths[k], want) == 0) found = 1;
        }
        ck_assert_msg(found, "family %s not listed", shipped[s]);
    }
    /* sorted, no duplicates */
    for (long k = 1; k < count; k++) {
        const char *a = strrchr(paths[k - 1], '/'), *b = strrchr(paths[k], '/');
        ck_assert(strcmp(a, b) < 0);
    }
    for (long k = 0; k < count; k++) free(paths[k]);
    free(paths);
}
END_TEST

START_TEST(test_shipped_evaluate)
{
    static const slong is[] = { 1, 2, 3, 7, 100, 12345 };
    static const slong ns[] = { 1, 10, 1000, 1000000 };
    for (long s = 0; shipped[s] != NULL; s++) {
        embz_family_t f;
        embz_family_init(f);
        resolve_ok(f, shipped[s], NULL, 0, 0);
        ck_assert_str_eq(f->name, shipped[s]);
        ck_assert_msg(strlen(f->description) > 10, "%s: no description", shipped[s]);
        ck_assert(strchr(f->description, '\n') == NULL);
        for (size_t a = 0; a < sizeof(is) / sizeof(is[0]); a++) {
            for (size_t b = 0; b < sizeof(ns) / sizeof(ns[0]); b++) {
                fmpz_t fi, fn;
                arb_t w, w2;
                embz_err_t err;
                fmpz_init_set_si(fi, is[a]);
                fmpz_init_set_si(fn, ns[b]);
                arb_init(w);
                arb_init(w2);
                ck_assert_msg(embz_family_weight_arb(w, f, fi, fn, 64, &err) == EMBZ_OK,
                              "%s at i = %ld: %s", shipped[s], (long) is[a], err.text);
                ck_assert(arb_is_positive(w));
                ck_assert_int_eq(embz_family_weight_arb(w2, f, fi, fn, 256, &err), EMBZ_OK);
                ck_assert(arb_overlaps(w, w2));
                ck_assert(arb_rel_accuracy_bits(w2) > 200);
                /* the double fast path agrees with the ball */
                double d = embz_family_weight_d(f, (double) is[a], (double) ns[b]);
                double m = arf_get_d(arb_midref(w2), ARF_RND_NEAR);
                ck_assert_msg(fabs(d - m) <= 1e-12 * fabs(m), "%s: %g vs %g", shipped[s], d, m);
                arb_clear(w);
                arb_clear(w2);
                fmpz_clear(fi);
                fmpz_clear(fn);
            }
        }
        ck_assert_int_eq(embz_family_depends_on_n(f), strcmp(shipped[s], "tilted") == 0);
        embz_family_clear(f);
    }
}
END_TEST

START_TEST(test_shipped_values)
{
    /* values from the definitions, independent of the files' spelling */
    embz_family_t f;
    embz_family_init(f);
    resolve_ok(f, "inverse", NULL, 0, 0);
    check_exact(f, 7, 100, 1, 7);                /* 1/7, exactly as a FLINT rational */
    resolve_ok(f, "invamp", NULL, 0, 0);         /* (1/sqrt 7)^2 = 1/7 */
    check_exact(f, 7, 100, 1, 7);
    resolve_ok(f, "uniform", NULL, 0, 0);
    check_exact(f, 5, 9, 1, 1);
    resolve_ok(f, "geometric", NULL, 0, 0);      /* 0.9^3 = 729/1000 */
    check_exact(f, 3, 9, 729, 1000);
    resolve_ok(f, "power", NULL, 0, 0);          /* 16^(-1/2) = 1/4 */
    check_exact(f, 16, 100, 1, 4);

    /* tilted at n = e^2 - 1 would be i^(-1/2); use mpmath-free checks: at i = 1 it is 1 */
    resolve_ok(f, "tilted", NULL, 0, 0);
    check_exact(f, 1, 1000, 1, 1);
    {
        /* i^(-1 + 1/log(n+1)) at i = 8, n = 1: 8^(-1 + 1/log 2) computed with arb directly */
        arb_t w, ref, t;
        fmpz_t fi, fn;
        embz_err_t err;
        arb_init(w); arb_init(ref); arb_init(t);
        fmpz_init_set_ui(fi, 8);
        fmpz_init_set_ui(fn, 1);
        ck_assert_int_eq(embz_family_weight_arb(w, f, fi, fn, 128, &err), EMBZ_OK);
        arb_const_log2(t, 128);
        arb_inv(t, t, 128);
        arb_sub_ui(t, t, 1, 128);
        arb_set_ui(ref, 8);
        arb_pow(ref, ref, t, 128);
        ck_assert(arb_overlaps(w, ref));
        arb_clear(w); arb_clear(ref); arb_clear(t);
        fmpz_clear(fi);
        fmpz_clear(fn);
    }
    embz_family_clear(f);
}
END_TEST

/* ---------------------------------------------------------------- settings and amplitudes */

START_TEST(test_settings)
{
    embz_family_t f;
    embz_err_t err;
    embz_family_init(f);

    embz_setting_t s1[] = { { "a", "2" } };
    resolve_ok(f, "power", s1, 1, 0);
    check_exact(f, 7, 10, 49, 1);                 /* i^2 at 7 */
    embz_setting_t s2[] = { { "a", "-3" }, { "a", "-1" } };   /* the later one wins */
    resolve_ok(f, "power", s2, 2, 0);
    check_exact(f, 7, 10, 1, 7);
    embz_setting_t s3[] = { { "a", "-1.5" } };
    resolve_ok(f, "power", s3, 1, 0);
    check_exact(f, 4, 10, 1, 8);                  /* 4^(-3/2) = 1/8 */
    ck_assert(fmpz_equal_si(fmpq_numref(f->param_values), -3));

    /* unknown parameter names it */
    embz_setting_t bad1[] = { { "b", "1" } };
    ck_assert_int_eq(embz_family_resolve(f, "power", bad1, 1, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "unknown parameter 'b'") != NULL, "%s", err.text);
    ck_assert_int_eq(embz_family_resolve(f, "inverse", bad1, 1, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "'b'") != NULL, "%s", err.text);
    /* bad value */
    embz_setting_t bad2[] = { { "a", "x1" } };
    ck_assert_int_eq(embz_family_resolve(f, "power", bad2, 1, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "'x1'") != NULL, "%s", err.text);

    /* inline expressions take their parameters from the settings */
    embz_setting_t s4[] = { { "c", "3" }, { "d", "1/2" } };
    resolve_ok(f, "c*i^d", s4, 2, 0);
    ck_assert_str_eq(f->origin, "inline");
    check_exact(f, 9, 10, 9, 1);                  /* 3 * 9^(1/2) */
    ck_assert_int_eq(embz_family_resolve(f, "c*i", NULL, 0, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(err.col, 1);                 /* unknown name c */
    /* an inline expression keeps only the settings it uses as its parameters */
    embz_setting_t s5[] = { { "b", "7" }, { "c", "2" } };
    resolve_ok(f, "i^c", s5, 2, 0);
    ck_assert_int_eq(f->nparams, 1);
    ck_assert_str_eq(f->param_names[0], "c");
    check_exact(f, 3, 10, 9, 1);
    resolve_ok(f, "1/i", s5, 2, 0);
    ck_assert_int_eq(f->nparams, 0);
    /* a value beyond the exponent range is called so */
    embz_setting_t big[] = { { "a", "1e999999" } };
    ck_assert_int_eq(embz_family_resolve(f, "power", big, 1, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "out of range") != NULL, "%s", err.text);
    ck_assert_int_eq(embz_family_resolve(f, "i^a", big, 1, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "out of range") != NULL, "%s", err.text);
    embz_setting_t bad3[] = { { "pi", "3" } };
    ck_assert_int_eq(embz_family_resolve(f, "pi*i", bad3, 1, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "'pi'") != NULL, "%s", err.text);

    /* a misspelt library name is explained */
    ck_assert_int_eq(embz_family_resolve(f, "inversee", NULL, 0, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "inversee") != NULL, "%s", err.text);
    ck_assert_int_eq(embz_family_resolve(f, "nothere.fam", NULL, 0, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(embz_family_resolve(f, "", NULL, 0, 0, &err), EMBZ_ERR_INPUT);

    /* setting text splitting */
    char t1[] = " a = -0.7 ", t2[] = "novalue", t3[] = "=3";
    embz_setting_t s;
    ck_assert_int_eq(embz_setting_split(&s, t1, &err), EMBZ_OK);
    ck_assert_str_eq(s.name, "a");
    ck_assert_str_eq(s.value, "-0.7");
    ck_assert_int_eq(embz_setting_split(&s, t2, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(embz_setting_split(&s, t3, &err), EMBZ_ERR_INPUT);
    embz_family_clear(f);
}
END_TEST

START_TEST(test_amplitude)
{
    /* amplitude squaring: weight = text^2, for random points; and --amplitude on a weight file */
    flint_rand_t state;
    flint_randinit(state);
    embz_family_t f, g;
    embz_family_init(f);
    embz_family_init(g);
    embz_setting_t s[] = { { "a", "-0.3" } };
    resolve_ok(f, "power", s, 1, 1);
    resolve_ok(g, "power", s, 1, 0);
    ck_assert_int_eq(f->amplitude, 1);
    ck_assert_int_eq(g->amplitude, 0);
    for (int iter = 0; iter < 500; iter++) {
        fmpz_t fi, fn;
        arb_t w, v;
        embz_err_t err;
        fmpz_init(fi);
        fmpz_init(fn);
        arb_init(w);
        arb_init(v);
        fmpz_randtest_unsigned(fi, state, 40);
        fmpz_add_ui(fi, fi, 1);
        fmpz_set(fn, fi);
        ck_assert_int_eq(embz_family_weight_arb(w, f, fi, fn, 96, &err), EMBZ_OK);
        ck_assert_int_eq(embz_family_weight_arb(v, g, fi, fn, 96, &err), EMBZ_OK);
        arb_sqr(v, v, 96);
        ck_assert(arb_overlaps(w, v));
        arb_clear(w);
        arb_clear(v);
        fmpz_clear(fi);
        fmpz_clear(fn);
    }
    /* amplitude files stay amplitude files with --amplitude */
    resolve_ok(f, "invamp", NULL, 0, 1);
    check_exact(f, 5, 9, 1, 5);
    /* inline amplitude: (1/i)^2 */
    resolve_ok(f, "1/i", NULL, 0, 1);
    check_exact(f, 7, 9, 1, 49);
    flint_randclear(state);
    embz_family_clear(f);
    embz_family_clear(g);
}
END_TEST

/* ---------------------------------------------------------------- weights */

START_TEST(test_exact_random)
{
    /* 1/i and i^k (k a random small integer set through --set) agree with FLINT rationals */
    flint_rand_t state;
    flint_randinit(state);
    embz_family_t f;
    embz_family_init(f);
    for (int iter = 0; iter < 300; iter++) {
        slong i = 1 + (slong) n_randint(state, 100000);
        slong k = (slong) n_randint(state, 7) - 3;
        char val[32];
        snprintf(val, sizeof(val), "%ld", (long) k);
        embz_setting_t s[] = { { "a", val } };
        resolve_ok(f, "power", s, 1, 0);
        fmpz_t fi, fn;
        fmpq_t q;
        arb_t w;
        embz_err_t err;
        fmpz_init_set_si(fi, i);
        fmpz_init_set_si(fn, 100000);
        fmpq_init(q);
        arb_init(w);
        /* q = i^k exactly */
        fmpz_pow_ui(fmpq_numref(q), fi, (ulong) (k < 0 ? -k : k));
        fmpz_one(fmpq_denref(q));
        if (k < 0) fmpq_inv(q, q);
        ck_assert_int_eq(embz_family_weight_arb(w, f, fi, fn, 128, &err), EMBZ_OK);
        ck_assert(arb_contains_fmpq(w, q));
        resolve_ok(f, "inverse", NULL, 0, 0);
        fmpq_set_si(q, 1, (ulong) i);
        ck_assert_int_eq(embz_family_weight_arb(w, f, fi, fn, 128, &err), EMBZ_OK);
        ck_assert(arb_contains_fmpq(w, q));
        arb_clear(w);
        fmpq_clear(q);
        fmpz_clear(fi);
        fmpz_clear(fn);
    }
    embz_family_clear(f);
    flint_randclear(state);
}
END_TEST

START_TEST(test_weight_errors)
{
    check_weight_error("log(i-7)", 7, "undefined");
    check_weight_error("sqrt(3-i)", 5, "undefined");
    check_weight_error("i - 3.5", 3, "negative");
    check_weight_error("1/(i-2)", 2, "infinite");
    check_weight_error("(i-4)^(-2)", 4, "infinite");
    /* sin(pi) is 0 but its ball straddles 0 at every precision */
    check_weight_error("sin(pi*i)", 1, "cannot decide the sign");
    /* fine just before the bad index */
    embz_family_t f;
    embz_err_t err;
    fmpz_t fi, fn;
    arb_t w;
    embz_family_init(f);
    fmpz_init_set_si(fi, 8);
    fmpz_init_set_si(fn, 100);
    arb_init(w);
    resolve_ok(f, "log(i-7)", NULL, 0, 0);
    ck_assert_int_eq(embz_family_weight_arb(w, f, fi, fn, 64, &err), EMBZ_OK);
    ck_assert(arb_is_zero(w) || arb_contains_zero(w));   /* log 1 = 0 is a valid weight */
    /* a huge index is named in full */
    fmpz_set_str(fi, "123456789012345678901234567890", 10);
    resolve_ok(f, "1/(i-123456789012345678901234567890)", NULL, 0, 0);
    ck_assert_int_eq(embz_family_weight_arb(w, f, fi, fn, 64, &err), EMBZ_ERR_DOMAIN);
    ck_assert_msg(strstr(err.text, "i = 123456789012345678901234567890") != NULL, "%s",
                  err.text);
    arb_clear(w);
    fmpz_clear(fi);
    fmpz_clear(fn);
    embz_family_clear(f);
}
END_TEST

static Suite *family_suite(void)
{
    Suite *s = suite_create("family");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, test_parse_good);
    tcase_add_test(tc, test_parse_errors);
    tcase_add_test(tc, test_parse_expression_error);
    tcase_add_test(tc, test_load_file);
    tcase_add_test(tc, test_parse_bom);
    tcase_add_test(tc, test_file_refusals);
    tcase_add_test(tc, test_library);
    tcase_add_test(tc, test_shipped_evaluate);
    tcase_add_test(tc, test_shipped_values);
    tcase_add_test(tc, test_settings);
    tcase_add_test(tc, test_amplitude);
    tcase_add_test(tc, test_exact_random);
    tcase_add_test(tc, test_weight_errors);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    return tu_run_suite(family_suite());
}
