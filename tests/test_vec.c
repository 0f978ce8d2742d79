/* Tests for exact Schmidt vectors and targets (src/measure/vec.c). */
#include <check.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "embz.h"
#include "testutil.h"

static int qeq(const fmpq *x, long num, long den)
{
    fmpq_t t;
    fmpq_init(t);
    fmpq_set_si(t, num, (ulong) den);
    int r = fmpq_equal(x, t);
    fmpq_clear(t);
    return r;
}

START_TEST(test_parse_list)
{
    embz_qvec_t v;
    embz_err_t err;
    embz_err_clear(&err);
    embz_qvec_init(v);
    ck_assert_int_eq(embz_qvec_parse(v, "0.5,0.3,0.2", 0, &err), EMBZ_OK);
    ck_assert_int_eq(v->len, 3);
    ck_assert(qeq(v->p + 0, 1, 2) && qeq(v->p + 1, 3, 10) && qeq(v->p + 2, 1, 5));
    ck_assert_int_eq(v->normalised, 0);
    /* whitespace separated, unnormalised: rescaled and flagged */
    ck_assert_int_eq(embz_qvec_parse(v, " 1  2\t1 ", 0, &err), EMBZ_OK);
    ck_assert_int_eq(v->len, 3);
    ck_assert(qeq(v->p + 0, 1, 4) && qeq(v->p + 1, 1, 2) && qeq(v->p + 2, 1, 4));
    ck_assert_int_eq(v->normalised, 1);
    /* amplitudes are squared: (0.6, 0.8) -> (0.36, 0.64), already normalised */
    ck_assert_int_eq(embz_qvec_parse(v, "0.6, 0.8", 1, &err), EMBZ_OK);
    ck_assert(qeq(v->p + 0, 9, 25) && qeq(v->p + 1, 16, 25));
    ck_assert_int_eq(v->normalised, 0);
    /* fractions and exponents, zeros kept */
    ck_assert_int_eq(embz_qvec_parse(v, "1/3,2/3,0,1e-0", 0, &err), EMBZ_OK);
    ck_assert_int_eq(v->len, 4);
    ck_assert(qeq(v->p + 0, 1, 6) && qeq(v->p + 2, 0, 1) && qeq(v->p + 3, 1, 2));
    embz_qvec_sort(v);
    ck_assert(qeq(v->p + 0, 1, 2) && qeq(v->p + 1, 1, 3) && qeq(v->p + 3, 0, 1));
    embz_qvec_clear(v);
}
END_TEST

START_TEST(test_parse_errors)
{
    embz_qvec_t v;
    embz_err_t err;
    embz_qvec_init(v);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, "0.5,-0.1,0.6", 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "entry 2") && strstr(err.text, "negative"), "%s", err.text);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, "0.5 0.2 abc", 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "entry 3") && strstr(err.text, "not a number"), "%s", err.text);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, "", 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "empty") != NULL, "%s", err.text);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, " , ,", 0, &err), EMBZ_ERR_INPUT);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, "0,0,0.0", 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "zero") != NULL, "%s", err.text);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, "0.5,1/0", 0, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(v->len, 0);   /* untouched on failure */
    embz_qvec_clear(v);
}
END_TEST

static void write_file(const char *path, const char *text)
{
    FILE *fp = fopen(path, "w");
    ck_assert_ptr_nonnull(fp);
    fputs(text, fp);
    fclose(fp);
}

START_TEST(test_parse_file)
{
    char path[] = "/tmp/embz_test_vec_XXXXXX";
    int fd = mkstemp(path);
    ck_assert_int_ge(fd, 0);
    close(fd);
    embz_qvec_t v;
    embz_err_t err;
    embz_qvec_init(v);
    embz_err_clear(&err);
    write_file(path, "# a comment line\n0.25   # first\n\n0.25, 0.5\n");
    ck_assert_int_eq(embz_qvec_parse(v, path, 0, &err), EMBZ_OK);
    ck_assert_int_eq(v->len, 3);
    ck_assert(qeq(v->p + 2, 1, 2));
    write_file(path, "0.25\n0.5\n0.1x\n");
    ck_assert_int_eq(embz_qvec_parse(v, path, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(err.line, 3);
    ck_assert_str_eq(err.file, path);
    char buf[1024];
    embz_err_format(buf, sizeof(buf), &err);
    char want[300];
    snprintf(want, sizeof(want), "%s:3: ", path);
    ck_assert_msg(strncmp(buf, want, strlen(want)) == 0, "%s", buf);
    embz_err_clear(&err);
    write_file(path, "0.3\n# only\n-0.2\n");
    ck_assert_int_eq(embz_qvec_parse(v, path, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(err.line, 3);
    embz_err_clear(&err);
    write_file(path, "# nothing here\n\n");
    ck_assert_int_eq(embz_qvec_parse(v, path, 0, &err), EMBZ_ERR_INPUT);
    unlink(path);
    embz_qvec_clear(v);
}
END_TEST

/* An empty entry is refused with its position, never dropped. */
START_TEST(test_parse_empty_entries)
{
    static const struct { const char *s; const char *words; } bad[] = {
        { "0.5,,0.5", "entry 2 is empty: two separators in a row (',' at character 5)" },
        { "0.5, ,0.5", "entry 2 is empty: two separators in a row (',' at character 6)" },
        { "0.5;;0.5", "entry 2 is empty" },
        { "0.5,0.25;,0.25", "entry 3 is empty" },
        { ",0.5,0.5", "entry 1 is empty: the list starts with a separator" },
        { "0.5,0.5,", "entry 3 is empty: the list ends with a separator" },
        { "0.5 0.5 ; ", "entry 3 is empty" },
    };
    embz_qvec_t v;
    embz_err_t err;
    embz_qvec_init(v);
    for (size_t k = 0; k < sizeof(bad) / sizeof(bad[0]); k++) {
        embz_err_clear(&err);
        ck_assert_msg(embz_qvec_parse(v, bad[k].s, 0, &err) == EMBZ_ERR_INPUT, "'%s' accepted",
                      bad[k].s);
        ck_assert_msg(strstr(err.text, bad[k].words) != NULL, "'%s': %s", bad[k].s, err.text);
    }
    /* one separator with blanks around it is still one */
    ck_assert_int_eq(embz_qvec_parse(v, " 0.5 ,\t0.25 ; 0.25 ", 0, &err), EMBZ_OK);
    ck_assert_int_eq(v->len, 3);
    /* in a file: the line and the entry counted over the whole file */
    char path[] = "/tmp/embz_test_vec_XXXXXX";
    int fd = mkstemp(path);
    ck_assert_int_ge(fd, 0);
    close(fd);
    write_file(path, "0.25 0.25\n0.25,,0.25\n");
    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, path, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(err.line, 2);
    ck_assert_msg(strstr(err.text, "entry 4 is empty") != NULL, "%s", err.text);
    write_file(path, "0.5,\n0.5\n");
    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, path, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(err.line, 1);
    ck_assert_msg(strstr(err.text, "the line ends with a separator") != NULL, "%s", err.text);
    unlink(path);
    embz_qvec_clear(v);
}
END_TEST

/* What is wrong with a target that is not a list of numbers is said as it is: a missing
 * file, a directory, a device, a number out of range; bytes from a binary file are shown
 * escaped, never raw. */
START_TEST(test_parse_not_numbers)
{
    embz_qvec_t v;
    embz_err_t err;
    char buf[2048];
    embz_qvec_init(v);

    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, "/nonexistent/file", 0, &err), EMBZ_ERR_INPUT);
    ck_assert_str_eq(err.file, "/nonexistent/file");
    ck_assert_msg(strstr(err.text, "no such file") != NULL, "%s", err.text);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, "/tmp", 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "is a directory") != NULL, "%s", err.text);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, "/dev/null", 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "not a regular file") != NULL, "%s", err.text);

    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, "0.5,1e999999", 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "entry 2 is out of range: '1e999999'") != NULL, "%s",
                  err.text);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, "1e-100001 0.5", 0, &err), EMBZ_ERR_INPUT);
    ck_assert_msg(strstr(err.text, "entry 1 is out of range") != NULL, "%s", err.text);
    /* the largest exponent allowed is a number */
    ck_assert_int_eq(embz_qvec_parse(v, "1e-100000 0.5", 0, &err), EMBZ_OK);

    char path[] = "/tmp/embz_test_vec_XXXXXX";
    int fd = mkstemp(path);
    ck_assert_int_ge(fd, 0);
    close(fd);
    write_file(path, "0.5 \x7f" "ELF\x01\xff\x1b[2J\n");
    embz_err_clear(&err);
    ck_assert_int_eq(embz_qvec_parse(v, path, 0, &err), EMBZ_ERR_INPUT);
    embz_err_format(buf, sizeof(buf), &err);
    ck_assert_msg(strstr(buf, "entry 2 is not a number: '\\x7fELF\\x01\\xff\\x1b[2J'") != NULL,
                  "%s", buf);
    for (const char *p = buf; *p; p++)
        ck_assert_msg((unsigned char) *p >= 0x20 && (unsigned char) *p < 0x7f, "raw byte in %s",
                      buf);
    unlink(path);
    embz_qvec_clear(v);
}
END_TEST

/* Round trip: random rational entries printed as p/q text parse back to the normalised
 * vector, exactly. */
START_TEST(test_parse_random)
{
    flint_rand_t state;
    flint_randinit(state);
    embz_qvec_t v;
    embz_err_t err;
    embz_qvec_init(v);
    fmpq *x = _fmpq_vec_init(12);
    fmpq_t sum, t;
    fmpq_init(sum); fmpq_init(t);
    for (int iter = 0; iter < 2000; iter++) {
        long len = 1 + (long) n_randint(state, 12);
        char text[4096];
        size_t pos = 0;
        fmpq_zero(sum);
        for (long k = 0; k < len; k++) {
            fmpz_set_ui(fmpq_numref(x + k), n_randint(state, 1000));
            fmpz_set_ui(fmpq_denref(x + k), 1 + n_randint(state, 1000));
            fmpq_canonicalise(x + k);
            fmpq_add(sum, sum, x + k);
            char *s = fmpq_get_str(NULL, 10, x + k);
            pos += (size_t) snprintf(text + pos, sizeof(text) - pos, "%s%s", k ? "," : "", s);
            flint_free(s);
        }
        embz_err_clear(&err);
        int st = embz_qvec_parse(v, text, 0, &err);
        if (fmpq_is_zero(sum)) { ck_assert_int_eq(st, EMBZ_ERR_INPUT); continue; }
        ck_assert_int_eq(st, EMBZ_OK);
        ck_assert_int_eq(v->len, len);
        ck_assert_int_eq(v->normalised, !fmpq_is_one(sum));
        for (long k = 0; k < len; k++) {
            fmpq_div(t, x + k, sum);
            ck_assert(fmpq_equal(t, v->p + k));
        }
        embz_qvec_sort(v);
        for (long k = 1; k < len; k++) ck_assert(fmpq_cmp(v->p + k - 1, v->p + k) >= 0);
    }
    fmpq_clear(sum); fmpq_clear(t);
    _fmpq_vec_clear(x, 12);
    embz_qvec_clear(v);
    flint_randclear(state);
}
END_TEST

START_TEST(test_targets)
{
    embz_target_t t;
    embz_err_t err;
    embz_err_clear(&err);
    embz_target_init(t);
    ck_assert_int_eq(t->kind, EMBZ_TARGET_UNIFORM);
    ck_assert_int_eq(t->d, 2);
    ck_assert_int_eq(embz_target_parse(t, "ebits:3", 0, &err), EMBZ_OK);
    ck_assert_int_eq(t->kind, EMBZ_TARGET_UNIFORM);
    ck_assert_int_eq(t->d, 8);
    ck_assert_str_eq(t->label, "ebits:3");
    ck_assert_int_eq(embz_target_parse(t, "uniform:5", 0, &err), EMBZ_OK);
    ck_assert_int_eq(t->d, 5);
    ck_assert_int_eq(embz_target_parse(t, "ebit", 0, &err), EMBZ_OK);
    ck_assert_int_eq(t->d, 2);
    ck_assert_str_eq(t->label, "ebit");
    /* uniform vectors are stored as uniform targets; zeros are dropped */
    ck_assert_int_eq(embz_target_parse(t, "0.25,0.25,0.25,0.25", 0, &err), EMBZ_OK);
    ck_assert_int_eq(t->kind, EMBZ_TARGET_UNIFORM);
    ck_assert_int_eq(t->d, 4);
    ck_assert_int_eq(embz_target_parse(t, "3,3,0", 0, &err), EMBZ_OK);
    ck_assert_int_eq(t->kind, EMBZ_TARGET_UNIFORM);
    ck_assert_int_eq(t->d, 2);
    ck_assert_str_eq(t->label, "ebit");
    /* a general vector is sorted non-increasing */
    ck_assert_int_eq(embz_target_parse(t, "0.1,0.7,0.2", 0, &err), EMBZ_OK);
    ck_assert_int_eq(t->kind, EMBZ_TARGET_VECTOR);
    ck_assert_int_eq(t->q->len, 3);
    ck_assert(qeq(t->q->p + 0, 7, 10) && qeq(t->q->p + 1, 1, 5) && qeq(t->q->p + 2, 1, 10));
    ck_assert_str_eq(t->label, "vector[3]");
    /* entries that do not sum to 1 are normalised, and the label says so */
    ck_assert_int_eq(embz_target_parse(t, "0.7,0.4", 0, &err), EMBZ_OK);
    ck_assert(qeq(t->q->p + 0, 7, 11) && qeq(t->q->p + 1, 4, 11));
    ck_assert_str_eq(t->label, "vector[2], normalised to sum 1");
    /* errors */
    const char *bad[] = { "ebits:0", "ebits:31", "ebits:", "ebits:x", "uniform:1", "uniform:",
                          "uniform:-3", "uniform:2.5", "1", "0,0.5,0", "ebitz", "0.5,-0.5", NULL };
    for (int k = 0; bad[k] != NULL; k++) {
        embz_err_clear(&err);
        ck_assert_msg(embz_target_parse(t, bad[k], 0, &err) == EMBZ_ERR_INPUT, "%s", bad[k]);
        ck_assert(err.text[0] != '\0');
    }
    embz_target_clear(t);
}
END_TEST

static Suite *vec_suite(void)
{
    Suite *s = suite_create("vec");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, test_parse_list);
    tcase_add_test(tc, test_parse_errors);
    tcase_add_test(tc, test_parse_file);
    tcase_add_test(tc, test_parse_empty_entries);
    tcase_add_test(tc, test_parse_not_numbers);
    tcase_add_test(tc, test_parse_random);
    tcase_add_test(tc, test_targets);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    return tu_run_suite(vec_suite());
}
