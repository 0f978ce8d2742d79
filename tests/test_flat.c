/* Tests for the flat interface of bindings (src/flat, include/embz/flat.h): handles, tables
 * of text, messages with locations, sizes in every form, cancellation. The values are checked
 * against the library's own calls (embz_error, embz_arb_lo_string) and exact rationals. */
#include <check.h>
#include <stdlib.h>
#include <string.h>
#include "embz.h"
#include "testutil.h"

static embz_flat_family *fam(const char *spec)
{
    embz_flat_family *f = NULL;
    embz_flat_err err;
    ck_assert_int_eq(embz_flat_family_new(&f, spec, NULL, NULL, 0, 0, &err), EMBZ_OK);
    return f;
}

START_TEST(test_error_matches_embz_error)
{
    /* the one-size result is the one embz_error gives, in the CLI's JSON digits (45) */
    embz_flat_family *f = fam("1/i");
    const char *sizes[] = { "10^30", "0xc9f2c9cd04674edea40000000" };   /* 10^30 in hex */
    embz_flat_table *t = NULL;
    embz_flat_err err;
    ck_assert_int_eq(embz_flat_errors(&t, f, sizes, 2, NULL, NULL, &err), EMBZ_OK);
    ck_assert_int_eq(embz_flat_rows(t), 2);

    embz_family_t g;
    embz_target_t q;
    embz_error_result_t res;
    embz_err_t e;
    fmpz_t n;
    embz_family_init(g);
    embz_target_init(q);
    embz_error_result_init(res);
    fmpz_init(n);
    embz_err_clear(&e);
    ck_assert_int_eq(embz_family_resolve(g, "1/i", NULL, 0, 0, &e), EMBZ_OK);
    fmpz_ui_pow_ui(n, 10, 30);
    ck_assert_int_eq(embz_error(res, g, n, q, EMBZ_METHOD_AUTO, 128, &e), EMBZ_OK);
    char *lo = embz_arb_lo_string(res->error, 45), *hi = embz_arb_hi_string(res->error, 45);
    for (long r = 0; r < 2; r++) {
        ck_assert_str_eq(embz_flat_get(t, r, "status"), "0");
        ck_assert_str_eq(embz_flat_get(t, r, "n"), "1000000000000000000000000000000");
        ck_assert_str_eq(embz_flat_get(t, r, "n_hex"), "0xc9f2c9cd04674edea40000000");
        ck_assert_str_eq(embz_flat_get(t, r, "method"), "analytic");
        ck_assert_ptr_eq(embz_flat_get(t, r, "no such key"), NULL);
    }
    /* the first size as embz_error (a fresh workspace); the second reuses the engine */
    ck_assert_str_eq(embz_flat_get(t, 0, "lo"), lo);
    ck_assert_str_eq(embz_flat_get(t, 0, "hi"), hi);
    char *how = embz_error_how_text(&res->how);
    ck_assert_str_eq(embz_flat_get(t, 0, "how"), how);
    free(how);
    ck_assert_str_eq(embz_flat_key(t, 0, 0), "n");
    ck_assert_ptr_eq(embz_flat_key(t, 0, 1000), NULL);
    ck_assert_ptr_eq(embz_flat_get(t, 7, "n"), NULL);
    free(lo);
    free(hi);
    fmpz_clear(n);
    embz_error_result_clear(res);
    embz_target_clear(q);
    embz_family_clear(g);
    embz_flat_table_free(t);
    embz_flat_family_free(f);
}
END_TEST

START_TEST(test_messages)
{
    embz_flat_family *f = NULL;
    embz_flat_err err;
    ck_assert_int_eq(embz_flat_family_new(&f, "1/(i+", NULL, NULL, 0, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_ptr_eq(f, NULL);
    ck_assert_int_eq(err.code, EMBZ_ERR_INPUT);
    ck_assert_int_eq(err.col, 5);
    ck_assert_str_eq(err.source, "1/(i+");
    ck_assert(strstr(err.message, "column 5") != NULL);
    ck_assert(strstr(err.message, "    ^") != NULL);        /* the caret line */
    /* a setting that names no parameter, a bad value, a setting of an expression */
    const char *nm[] = { "b" }, *va[] = { "1" }, *bad[] = { "x" };
    ck_assert_int_eq(embz_flat_family_new(&f, "1/i", nm, va, 1, 0, &err), EMBZ_ERR_INPUT);
    ck_assert(strstr(err.text, "'b' is not used") != NULL);
    const char *na[] = { "a" };
    ck_assert_int_eq(embz_flat_family_new(&f, "power", na, bad, 1, 0, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(embz_flat_family_new(&f, "i^a", na, va, 1, 0, &err), EMBZ_OK);
    embz_flat_family_free(f);
    /* targets, sizes, an invalid weight */
    embz_flat_target *q = NULL;
    ck_assert_int_eq(embz_flat_target_new(&q, "ebits:99", 0, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(embz_flat_target_new(&q, "0.7,0.3", 0, &err), EMBZ_OK);
    ck_assert_str_eq(embz_flat_target_label(q), "vector[2]");
    f = fam("1/i");
    embz_flat_table *t = NULL;
    const char *badsizes[] = { "0xZZ" }, *zero[] = { "0" }, *one[] = { "10" };
    ck_assert_int_eq(embz_flat_errors(&t, f, badsizes, 1, q, NULL, &err), EMBZ_ERR_INPUT);
    ck_assert_ptr_eq(t, NULL);
    ck_assert_int_eq(embz_flat_errors(&t, f, zero, 1, q, NULL, &err), EMBZ_ERR_INPUT);
    embz_flat_opts o;
    embz_flat_opts_init(&o);
    o.method = 7;
    ck_assert_int_eq(embz_flat_errors(&t, f, one, 1, q, &o, &err), EMBZ_ERR_INPUT);
    embz_flat_family_free(f);
    f = fam("1 - i/3");
    ck_assert_int_eq(embz_flat_errors(&t, f, one, 1, NULL, NULL, &err), EMBZ_ERR_DOMAIN);
    ck_assert_str_eq(embz_flat_get(t, 0, "status"), "3");
    embz_flat_table_free(t);
    embz_flat_family_free(f);
    embz_flat_target_free(q);
    embz_flat_family_free(NULL);
    embz_flat_target_free(NULL);
    embz_flat_table_free(NULL);
}
END_TEST

START_TEST(test_cancel)
{
    /* a flag set before the call: nothing is computed, EMBZ_ERR_LIMIT; the next call works */
    embz_flat_family *f = fam("inverse");
    embz_flat_opts o;
    embz_flat_opts_init(&o);
    volatile int flag = 1;
    o.cancel = &flag;
    embz_flat_table *t = NULL;
    embz_flat_err err;
    ck_assert_int_eq(embz_flat_sweep(&t, f, "10", "10^100", 8, NULL, &o, &err), EMBZ_ERR_LIMIT);
    ck_assert_str_eq(err.text, "cancelled");
    embz_flat_table_free(t);
    const char *sizes[] = { "10^30" };
    ck_assert_int_eq(embz_flat_errors(&t, f, sizes, 1, NULL, &o, &err), EMBZ_ERR_LIMIT);
    embz_flat_table_free(t);
    flag = 0;
    ck_assert_int_eq(embz_flat_sweep(&t, f, "10", "10^100", 8, NULL, &o, &err), EMBZ_OK);
    long points = 0, fits = 0;
    for (long r = 0; r < embz_flat_rows(t); r++) {
        points += strcmp(embz_flat_get(t, r, "kind"), "point") == 0;
        fits += strcmp(embz_flat_get(t, r, "kind"), "fit") == 0;
    }
    ck_assert_int_eq(points, 8);
    ck_assert_int_eq(fits, EMBZ_LAW_COUNT - 1);
    embz_flat_table_free(t);
    embz_flat_family_free(f);
}
END_TEST

START_TEST(test_weights_and_convert)
{
    /* exact weights of an amplitude family: (1/i)^2 */
    embz_flat_family *f = NULL;
    embz_flat_err err;
    ck_assert_int_eq(embz_flat_family_new(&f, "1/i", NULL, NULL, 0, 1, &err), EMBZ_OK);
    const char *idx[] = { "1", "3", "0x10" };
    embz_flat_table *t = NULL;
    ck_assert_int_eq(embz_flat_family_weights(&t, f, idx, 3, NULL, NULL, &err), EMBZ_OK);
    ck_assert_str_eq(embz_flat_get(t, 0, "exact"), "1");
    ck_assert_str_eq(embz_flat_get(t, 1, "exact"), "1/9");
    ck_assert_str_eq(embz_flat_get(t, 2, "exact"), "1/256");
    embz_flat_table_free(t);
    ck_assert_int_eq(embz_flat_family_info(&t, f, &err), EMBZ_OK);
    ck_assert_str_eq(embz_flat_get(t, 0, "amplitude"), "1");
    embz_flat_table_free(t);
    embz_flat_family_free(f);
    /* (0.4,0.4,0.1,0.1) -> (0.5,0.25,0.25) by hand: Ky Fan sums 0.4, 0.8, 0.9 against 0.5,
     * 0.75, 1, so not majorized (0.8 > 0.75) and K = max(0, 0.05, -0.1) = 1/20 at k = 2 */
    ck_assert_int_eq(embz_flat_convert(&t, "0.4,0.4,0.1,0.1", "0.5,0.25,0.25", 0, &err), EMBZ_OK);
    ck_assert_str_eq(embz_flat_get(t, 0, "convertible"), "0");
    ck_assert_str_eq(embz_flat_get(t, 0, "K_forward"), "1/20");
    ck_assert_str_eq(embz_flat_get(t, 0, "K_forward_argk"), "2");
    embz_flat_table_free(t);
    ck_assert_int_eq(embz_flat_convert(&t, "1,x", "1", 0, &err), EMBZ_ERR_INPUT);
    ck_assert(strncmp(err.message, "from: ", 6) == 0);
}
END_TEST

START_TEST(test_plot)
{
    const char *labels[] = { "a" };
    long lens[] = { 3 };
    double x[] = { 1, 2, 3 }, y[] = { -1, -2, -3 }, lo[] = { -1.1, -2.1, -3.1 },
           hi[] = { -0.9, -1.9, -2.9 };
    char *svg = NULL;
    embz_flat_err err;
    ck_assert_int_eq(embz_flat_plot(&svg, "t", "n", "E", 1, 1, 1, labels, lens, x, y, lo, hi,
                                    NULL, NULL, &err), EMBZ_OK);
    ck_assert(strstr(svg, "<svg") != NULL);
    embz_flat_str_free(svg);
    ck_assert_int_eq(embz_flat_plot(NULL, "t", "n", "E", 1, 1, 1, labels, lens, x, y, lo, hi,
                                    "/nonexistent-dir/x.svg", NULL, &err), EMBZ_ERR_IO);
    embz_render_release_caches();
}
END_TEST

START_TEST(test_report)
{
    /* one family, one size, one goal: 8 + 1 + 2 cells */
    const char *sizes[] = { "10^30" }, *goals[] = { "1e-3" };
    const char *cells[] = { "inverse", "1/i", "embezzler", NULL, NULL, NULL, NULL, NULL,
                            "0.0099511806", "7.1e+29", "100" };
    char *text = NULL;
    embz_flat_err err;
    ck_assert_int_eq(embz_flat_report(&text, "T", NULL, NULL, 1, sizes, 1, goals, 1, cells, 0,
                                      NULL, NULL, NULL, "md", NULL, &err), EMBZ_OK);
    ck_assert(strstr(text, "0.0099511806") != NULL && strstr(text, "inverse") != NULL);
    embz_flat_str_free(text);
    ck_assert_int_eq(embz_flat_report(&text, "T", NULL, NULL, 1, sizes, 1, goals, 1, cells, 0,
                                      NULL, NULL, NULL, "pdf", NULL, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(embz_flat_report(&text, "T", NULL, NULL, 1, sizes, 1, goals, 1, cells, 0,
                                      NULL, NULL, NULL, "docx", NULL, &err), EMBZ_ERR_INPUT);
    embz_render_release_caches();
}
END_TEST

START_TEST(test_analysis_calls)
{
    /* every call with its tables freed (the sanitizer build checks for leaks); the numbers
     * themselves are compared with the CLI by python/tests */
    embz_flat_family *f = fam("inverse");
    embz_flat_table *t = NULL;
    embz_flat_err err;
    ck_assert_int_eq(embz_flat_classify(&t, f, "100", "10^30", 8, NULL, &err), EMBZ_OK);
    ck_assert_str_eq(embz_flat_get(t, 0, "verdict"), "embezzler");
    embz_flat_table_free(t);
    ck_assert_int_eq(embz_flat_classify(&t, f, "10^30", "100", 8, NULL, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(embz_flat_size(&t, f, "0.1", NULL, 0, NULL, &err), EMBZ_OK);
    ck_assert_str_eq(embz_flat_get(t, 0, "status"), "found");
    embz_flat_table_free(t);
    ck_assert_int_eq(embz_flat_size(&t, f, "2", NULL, 0, NULL, &err), EMBZ_ERR_INPUT);
    ck_assert_int_eq(embz_flat_family_list(&t, &err), EMBZ_OK);
    ck_assert(embz_flat_rows(t) > 3);
    embz_flat_table_free(t);
    const char *idx[] = { "5" }, *big[] = { "11" };
    ck_assert_int_eq(embz_flat_family_weights(&t, f, big, 1, "10", NULL, &err), EMBZ_ERR_INPUT);
    embz_flat_family_free(f);
    f = fam("log(i-1)");
    ck_assert_int_eq(embz_flat_family_weights(&t, f, idx, 1, NULL, NULL, &err), EMBZ_OK);
    embz_flat_table_free(t);
    ck_assert_int_eq(embz_flat_family_weights(&t, f, (const char *[]) { "1" }, 1, NULL, NULL,
                                              &err), EMBZ_ERR_DOMAIN);
    embz_flat_family_free(f);
    f = fam("power");
    const char *axes[] = { "a=-1.5:-0.5:2" }, *bad[] = { "b=0:1:2" };
    ck_assert_int_eq(embz_flat_scan(&t, f, axes, 1, "100", "10^20", 6, NULL, &err), EMBZ_OK);
    ck_assert_int_eq(embz_flat_rows(t), 2);
    ck_assert_str_eq(embz_flat_get(t, 0, "param:a"), "-3/2");
    embz_flat_table_free(t);
    ck_assert_int_eq(embz_flat_scan(&t, f, bad, 1, NULL, NULL, 0, NULL, &err), EMBZ_ERR_INPUT);
    embz_flat_family_free(f);
    embz_flat_opts o;
    embz_flat_opts_init(&o);
    o.measure = 1;
    f = fam("1/i");
    const char *sizes[] = { "100", "10^7" };
    ck_assert_int_eq(embz_flat_errors(&t, f, sizes, 2, NULL, &o, &err), EMBZ_OK);
    ck_assert_str_eq(embz_flat_get(t, 0, "bounds_only"), "0");
    /* 10^7: beyond explicit sizes, a value from the analytic engine's LOCC bounds */
    ck_assert_str_eq(embz_flat_get(t, 1, "bounds_only"), "0");
    ck_assert_str_eq(embz_flat_get(t, 1, "method"), "analytic");
    embz_flat_table_free(t);
    embz_flat_family_free(f);
    /* bounds only, with the tighter range (logpower) */
    f = fam("logpower");
    const char *sizes2[] = { "10^20" };
    ck_assert_int_eq(embz_flat_errors(&t, f, sizes2, 1, NULL, &o, &err), EMBZ_OK);
    ck_assert_str_eq(embz_flat_get(t, 0, "bounds_only"), "1");
    ck_assert(embz_flat_get(t, 0, "tight_lo") != NULL && embz_flat_get(t, 0, "tight_hi") != NULL);
    embz_flat_table_free(t);
    embz_flat_family_free(f);
    embz_flat_thread_cleanup();
}
END_TEST

static Suite *flat_suite(void)
{
    Suite *s = suite_create("flat");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, test_error_matches_embz_error);
    tcase_add_test(tc, test_messages);
    tcase_add_test(tc, test_cancel);
    tcase_add_test(tc, test_weights_and_convert);
    tcase_add_test(tc, test_plot);
    tcase_add_test(tc, test_report);
    tcase_add_test(tc, test_analysis_calls);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    return tu_run_suite(flat_suite());
}
