/* Tests of src/util: messages with a caret, certified decimal printing, JSON escaping,
 * atomic file writes. The decimal checks compare against MPFR's correctly rounded parsing
 * (mpfr_set_str), an independent reference for the value of a printed string. */
#include <check.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <dirent.h>
#include "embz.h"
#include "testutil.h"

/* the exact value of a decimal string as a ball: [round down, round up] of mpfr parsing */
static void parse_ball(arb_t x, const char *s, slong prec)
{
    mpfr_t lo, hi;
    mpfr_init2(lo, prec);
    mpfr_init2(hi, prec);
    ck_assert_msg(mpfr_set_str(lo, s, 10, MPFR_RNDD) == 0, "not a number: %s", s);
    mpfr_set_str(hi, s, 10, MPFR_RNDU);
    arf_t a, b;
    arf_init(a); arf_init(b);
    arf_set_mpfr(a, lo);
    arf_set_mpfr(b, hi);
    arb_set_interval_arf(x, a, b, prec);
    arf_clear(a); arf_clear(b);
    mpfr_clear(lo);
    mpfr_clear(hi);
}

START_TEST(test_bounds_enclose)
{
    /* lo and hi strings enclose the ball, over many random balls */
    flint_rand_t st;
    flint_randinit(st);
    arb_t x, lo, hi;
    arb_init(x); arb_init(lo); arb_init(hi);
    for (int k = 0; k < 2000; k++) {
        arb_randtest(x, st, 200, 20);
        if (!arb_is_finite(x)) continue;
        slong digits = 1 + n_randint(st, 40);
        char *a = embz_arb_lo_string(x, digits), *b = embz_arb_hi_string(x, digits);
        parse_ball(lo, a, 400);
        parse_ball(hi, b, 400);
        arf_t xl, xh, ll, hh;
        arf_init(xl); arf_init(xh); arf_init(ll); arf_init(hh);
        arb_get_lbound_arf(xl, x, 400);
        arb_get_ubound_arf(xh, x, 400);
        arb_get_ubound_arf(ll, lo, 400);   /* the printed lower end, at its largest */
        arb_get_lbound_arf(hh, hi, 400);   /* the printed upper end, at its smallest */
        ck_assert_msg(arf_cmp(ll, xl) <= 0, "lower string %s above the ball", a);
        ck_assert_msg(arf_cmp(hh, xh) >= 0, "upper string %s below the ball", b);
        arf_clear(xl); arf_clear(xh); arf_clear(ll); arf_clear(hh);
        free(a); free(b);
    }
    arb_clear(x); arb_clear(lo); arb_clear(hi);
    flint_randclear(st);
}
END_TEST

START_TEST(test_certified_digits)
{
    /* every point of the ball rounds to the printed digits: both ends, rounded to that many
     * significant digits, give the same string; and a ball around 1/3 of radius 1e-10
     * prints about ten threes */
    arb_t x;
    arb_init(x);
    arb_set_ui(x, 1);
    arb_div_ui(x, x, 3, 128);
    mag_set_d(arb_radref(x), 1e-10);
    char *s = embz_arb_certified_string(x, 30);
    ck_assert_msg(strncmp(s, "0.333333333", 11) == 0 && strlen(s) <= 13, "got %s", s);
    free(s);
    /* an exact ball prints exactly */
    arb_set_d(x, 0.375);
    s = embz_arb_certified_string(x, 30);
    ck_assert_str_eq(s, "0.375");
    free(s);
    /* a ball too wide for one digit prints as an interval */
    arb_set_d(x, 0.5);
    mag_set_d(arb_radref(x), 0.45);
    s = embz_arb_certified_string(x, 30);
    ck_assert_msg(s[0] == '[', "got %s", s);
    free(s);
    arb_clear(x);
}
END_TEST

START_TEST(test_fmpz_string)
{
    fmpz_t n;
    fmpz_init(n);
    fmpz_set_ui(n, 123456);
    char *s = embz_fmpz_string(n, 10);
    ck_assert_str_eq(s, "123456");
    free(s);
    fmpz_set_ui(n, 10);
    fmpz_pow_ui(n, n, 100);
    fmpz_add_ui(n, n, 7);
    s = embz_fmpz_string(n, 20);
    ck_assert_str_eq(s, "1.000000000e+100");
    free(s);
    fmpz_clear(n);
}
END_TEST

START_TEST(test_json_escape)
{
    embz_buf_t b;
    embz_buf_init(&b);
    embz_buf_json_string(&b, "a\"b\\c\n<script>&\x01");
    ck_assert_str_eq(b.s, "\"a\\\"b\\\\c\\n\\u003cscript\\u003e\\u0026\\u0001\"");
    embz_buf_clear(&b);
}
END_TEST

/* Text that is not UTF-8 still gives valid JSON: each stray byte becomes the character of
 * its Latin-1 reading; well-formed UTF-8 (2, 3 and 4 bytes) is kept as it is. */
START_TEST(test_json_utf8)
{
    embz_buf_t b;
    embz_buf_init(&b);
    embz_buf_json_string(&b, "caf\xe9 \xc3\xa9 \xe2\x82\xac \xf0\x9f\x98\x80 \xc3 \xed\xa0\x80");
    ck_assert_str_eq(b.s, "\"caf\\u00e9 \xc3\xa9 \xe2\x82\xac \xf0\x9f\x98\x80 \\u00c3 "
                          "\\u00ed\\u00a0\\u0080\"");
    embz_buf_clear(&b);
}
END_TEST

START_TEST(test_utf8_len)
{
    static const struct { const char *s; int len; } cases[] = {
        { "a", 1 }, { "\x7f", 1 }, { "\xc3\xa9", 2 }, { "\xe2\x82\xac", 3 },
        { "\xf0\x9f\x98\x80", 4 }, { "\xf4\x8f\xbf\xbf", 4 },  /* U+10FFFF */
        { "", 0 }, { "\x80", 0 }, { "\xc0\xaf", 0 }, { "\xc1\xbf", 0 },   /* overlong */
        { "\xe0\x80\xaf", 0 }, { "\xf0\x80\x80\xaf", 0 },              /* overlong */
        { "\xed\xa0\x80", 0 },                                          /* surrogate */
        { "\xf4\x90\x80\x80", 0 }, { "\xf5\x80\x80\x80", 0 },          /* > U+10FFFF */
        { "\xe2\x82", 0 }, { "\xc3", 0 }, { "\xc3" "a", 0 },               /* truncated */
    };
    for (size_t k = 0; k < sizeof(cases) / sizeof(cases[0]); k++)
        ck_assert_msg(embz_utf8_len(cases[k].s) == cases[k].len, "case %zu", k);
}
END_TEST

START_TEST(test_err_quote)
{
    char buf[64];
    ck_assert_str_eq(embz_err_quote(buf, sizeof(buf), "plain 1/i", 100), "plain 1/i");
    ck_assert_str_eq(embz_err_quote(buf, sizeof(buf), "a\x01\x7f\xff\tz", 100),
                     "a\\x01\\x7f\\xff\\x09z");
    ck_assert_str_eq(embz_err_quote(buf, sizeof(buf), "caf\xc3\xa9", 100), "caf\xc3\xa9");
    ck_assert_str_eq(embz_err_quote(buf, sizeof(buf), "abcdefgh", 3), "abc...");
    /* a small buffer: cut with the mark, never overrun */
    ck_assert_str_eq(embz_err_quote(buf, 8, "abcdefgh", 100), "abcd...");
    ck_assert_str_eq(embz_err_quote(buf, 8, "\x01\x02", 100), "\\x01...");
}
END_TEST

START_TEST(test_caret)
{
    embz_err_t e;
    char buf[4096];
    embz_err_clear(&e);
    snprintf(e.source, sizeof(e.source), "1/(i*log(i-7)");
    e.col = 3;
    embz_err_set(&e, EMBZ_ERR_INPUT, "missing ')'");
    embz_err_format(buf, sizeof(buf), &e);
    ck_assert_msg(strstr(buf, "column 3: missing ')'\n  1/(i*log(i-7)\n    ^") != NULL, "%s", buf);
    /* a column beyond the text does not read past it */
    e.col = 500;
    embz_err_format(buf, sizeof(buf), &e);
    ck_assert(strlen(buf) < 600);
    /* file:line prefix */
    embz_err_clear(&e);
    snprintf(e.file, sizeof(e.file), "x.fam");
    e.line = 4;
    embz_err_set(&e, EMBZ_ERR_INPUT, "unknown key 'wieght'");
    embz_err_format(buf, sizeof(buf), &e);
    ck_assert_str_eq(buf, "x.fam:4: unknown key 'wieght'");
    /* control and stray bytes of a source line or file name are escaped, and the caret
     * stays under the byte it points at (four columns per escape, one per UTF-8 character,
     * tabs kept) */
    embz_err_clear(&e);
    snprintf(e.source, sizeof(e.source), "\x01\xc3\xa9\t+x");
    e.col = 6;
    embz_err_set(&e, EMBZ_ERR_INPUT, "unknown name 'x'");
    embz_err_format(buf, sizeof(buf), &e);
    ck_assert_str_eq(buf, "column 6: unknown name 'x'\n  \\x01\xc3\xa9\t+x\n       \t ^");
    embz_err_clear(&e);
    snprintf(e.file, sizeof(e.file), "a\x1b[2Jb");
    e.line = 2;
    embz_err_set(&e, EMBZ_ERR_INPUT, "bad");
    embz_err_format(buf, sizeof(buf), &e);
    ck_assert_str_eq(buf, "a\\x1b[2Jb:2: bad");
}
END_TEST

START_TEST(test_write_atomic)
{
    char dir[] = "/tmp/embz-util-XXXXXX";
    ck_assert(mkdtemp(dir) != NULL);
    char path[256];
    snprintf(path, sizeof(path), "%s/out.txt", dir);
    embz_err_t e;
    embz_err_clear(&e);
    ck_assert_int_eq(embz_write_atomic(path, "hello\n", 6, &e), EMBZ_OK);
    FILE *f = fopen(path, "r");
    char line[32] = { 0 };
    ck_assert(f != NULL && fgets(line, sizeof(line), f) != NULL);
    fclose(f);
    ck_assert_str_eq(line, "hello\n");
    /* a path in a missing directory fails cleanly */
    char bad[300];
    snprintf(bad, sizeof(bad), "%s/missing/out.txt", dir);
    ck_assert_int_eq(embz_write_atomic(bad, "x", 1, &e), EMBZ_ERR_IO);
    /* nothing but the file is left in the directory */
    DIR *d = opendir(dir);
    int count = 0;
    struct dirent *de;
    while ((de = readdir(d)) != NULL)
        if (de->d_name[0] != '.') count++;
    closedir(d);
    ck_assert_int_eq(count, 1);
    unlink(path);
    rmdir(dir);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("util");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, test_bounds_enclose);
    tcase_add_test(tc, test_certified_digits);
    tcase_add_test(tc, test_fmpz_string);
    tcase_add_test(tc, test_json_escape);
    tcase_add_test(tc, test_json_utf8);
    tcase_add_test(tc, test_utf8_len);
    tcase_add_test(tc, test_err_quote);
    tcase_add_test(tc, test_caret);
    tcase_add_test(tc, test_write_atomic);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
