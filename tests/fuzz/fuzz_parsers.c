/* Fuzz target: the small parsers of option values. The input text is handed to each of them:
 * targets (embz_target_parse, with and without amplitudes), probability vectors
 * (embz_qvec_parse), sizes (embz_size_parse), grid axes (embz_grid_axis_parse), exact numbers
 * (embz_number_parse) and measures (embz_measure_parse). What one of them accepts must satisfy
 * its contract: a target is a valid uniform state or a sorted vector of positive rationals
 * summing to 1, a size is a positive integer within the limit, a number prints and parses
 * back to itself, a grid axis has a name, a count in range and its ends as first and last
 * value. A refusal must come with a well-formed message. */
#include <ctype.h>
#include "fuzz_common.h"
#include "embz.h"

static void check_target(const char *text, int amplitude)
{
    embz_target_t t;
    embz_err_t err;
    embz_target_init(t);
    embz_err_clear(&err);
    int st = embz_target_parse(t, text, amplitude, &err);
    if (st == EMBZ_OK) {
        FUZZ_CHECK(memchr(t->label, '\0', sizeof(t->label)) != NULL && t->label[0] != '\0');
        if (t->kind == EMBZ_TARGET_UNIFORM) {
            FUZZ_CHECK(t->d >= 2 && t->d <= EMBZ_TARGET_MAX_D);
        } else {
            FUZZ_CHECK(t->kind == EMBZ_TARGET_VECTOR);
            FUZZ_CHECK(t->q->len >= 2);
            fmpq_t sum;
            fmpq_init(sum);
            int all_equal = 1;
            for (long k = 0; k < t->q->len; k++) {
                FUZZ_CHECK(fmpq_sgn(t->q->p + k) > 0);
                if (k > 0) FUZZ_CHECK(fmpq_cmp(t->q->p + k - 1, t->q->p + k) >= 0);
                all_equal &= fmpq_equal(t->q->p + k, t->q->p);
                fmpq_add(sum, sum, t->q->p + k);
            }
            FUZZ_CHECK(fmpq_is_one(sum));
            /* equal entries make a uniform target unless there are too many of them */
            FUZZ_CHECK(!all_equal || (ulong) t->q->len > EMBZ_TARGET_MAX_D);
            fmpq_clear(sum);
        }
    } else {
        FUZZ_CHECK(st == EMBZ_ERR_INPUT || st == EMBZ_ERR_LIMIT || st == EMBZ_ERR_IO);
        FUZZ_CHECK(err.text[0] != '\0');
        FUZZ_CHECK_ERR(&err);
    }
    embz_target_clear(t);
}

static void check_qvec(const char *text)
{
    embz_qvec_t v;
    embz_err_t err;
    embz_qvec_init(v);
    embz_err_clear(&err);
    int st = embz_qvec_parse(v, text, 0, &err);
    if (st == EMBZ_OK) {
        FUZZ_CHECK(v->len >= 1);
        fmpq_t sum;
        fmpq_init(sum);
        for (long k = 0; k < v->len; k++) {
            FUZZ_CHECK(fmpq_sgn(v->p + k) >= 0);
            fmpq_add(sum, sum, v->p + k);
        }
        FUZZ_CHECK(fmpq_is_one(sum));
        fmpq_clear(sum);
        embz_qvec_sort(v);
        for (long k = 1; k < v->len; k++) FUZZ_CHECK(fmpq_cmp(v->p + k - 1, v->p + k) >= 0);
    } else {
        FUZZ_CHECK(err.text[0] != '\0');
        FUZZ_CHECK_ERR(&err);
    }
    embz_qvec_clear(v);
}

static void check_size(const char *text)
{
    fmpz_t n, m;
    embz_err_t err;
    fmpz_init(n); fmpz_init(m);
    embz_err_clear(&err);
    int st = embz_size_parse(n, text, &err);
    if (st == EMBZ_OK) {
        FUZZ_CHECK(fmpz_sgn(n) > 0);
        FUZZ_CHECK(fmpz_bits(n) <= 4000000);
        /* a plain run of digits is that integer */
        size_t len = strlen(text), k = 0;
        while (k < len && isdigit((unsigned char) text[k])) k++;
        if (len > 0 && k == len) {
            FUZZ_CHECK(fmpz_set_str(m, text, 10) == 0);
            FUZZ_CHECK(fmpz_equal(m, n));
        }
    } else {
        FUZZ_CHECK(st == EMBZ_ERR_INPUT);
        FUZZ_CHECK(err.text[0] != '\0');
        FUZZ_CHECK(err.col >= 0 && err.col <= (long) strlen(text) + 1);
        FUZZ_CHECK_ERR(&err);
    }
    fmpz_clear(n); fmpz_clear(m);
}

static void check_number(const char *text)
{
    fmpq_t x, y;
    fmpq_init(x); fmpq_init(y);
    if (embz_number_parse(x, text) == EMBZ_OK && fmpz_bits(fmpq_denref(x)) < 100000) {
        /* "p/q" (and "-p/q") is accepted and gives the same value back */
        char *s = fmpq_get_str(NULL, 10, x);
        FUZZ_CHECK(embz_number_parse(y, s) == EMBZ_OK);
        FUZZ_CHECK(fmpq_equal(x, y));
        flint_free(s);
    }
    fmpq_clear(x); fmpq_clear(y);
}

static void check_grid(const char *text)
{
    embz_grid_axis_struct axis;
    embz_err_t err;
    embz_err_clear(&err);
    int st = embz_grid_axis_parse(&axis, text, &err);
    if (st == EMBZ_OK) {
        FUZZ_CHECK(axis.name != NULL && axis.name[0] != '\0');
        FUZZ_CHECK(axis.count >= 1 && axis.count <= 1000000);
        fmpq_t v;
        fmpq_init(v);
        embz_grid_axis_value(v, &axis, 0);
        FUZZ_CHECK(fmpq_equal(v, axis.lo));
        if (axis.count > 1) {
            embz_grid_axis_value(v, &axis, axis.count - 1);
            FUZZ_CHECK(fmpq_equal(v, axis.hi));
            embz_grid_axis_value(v, &axis, axis.count / 2);
            /* between the ends (in either order) */
            FUZZ_CHECK((fmpq_cmp(v, axis.lo) >= 0 && fmpq_cmp(v, axis.hi) <= 0)
                       || (fmpq_cmp(v, axis.lo) <= 0 && fmpq_cmp(v, axis.hi) >= 0));
        }
        fmpq_clear(v);
    } else {
        FUZZ_CHECK(st == EMBZ_ERR_INPUT && err.text[0] != '\0');
        FUZZ_CHECK_ERR(&err);
    }
    embz_grid_axis_clear(&axis);
}

static void check_measure(const char *text)
{
    int m = -1;
    embz_err_t err;
    embz_err_clear(&err);
    if (embz_measure_parse(&m, text, &err) == EMBZ_OK) {
        FUZZ_CHECK(strcmp(embz_measure_name(m), text) == 0);
    } else {
        FUZZ_CHECK(err.text[0] != '\0');
        FUZZ_CHECK_ERR(&err);
    }
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    if (size > 65536) return 0;
    char *text = fuzz_text(data, size);
    check_target(text, 0);
    check_target(text, 1);
    check_qvec(text);
    check_size(text);
    check_number(text);
    check_grid(text);
    check_measure(text);
    free(text);
    flint_cleanup();
    return 0;
}
