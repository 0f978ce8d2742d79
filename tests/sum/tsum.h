/* Helpers shared by the unit tests of src/sum (tests/sum/t-PIECE.c): one small Check program
 * per internal piece of the tail object. Each test runs at the precisions of TSUM_PRECS and
 * compares with references computed independently of the piece under test. Header only:
 * every function is static inline. */
#ifndef EMBZ_TSUM_H
#define EMBZ_TSUM_H

#include <check.h>
#include <stdlib.h>
#include "embz.h"
#include "sum/impl.h"
#include "../testutil.h"

/* the two working precisions every test runs at (bits) */
static const slong TSUM_PRECS[2] = { 64, 256 };

/* fewer random cases under EMBZ_QUICK=1 or a sanitizer build (as in tests/test_sum.c) */
static inline int tsum_quick(void)
{
    if (getenv("EMBZ_FULL") != NULL) return 0;
#if defined(__SANITIZE_ADDRESS__)
    return 1;
#else
    return getenv("EMBZ_QUICK") != NULL;
#endif
}

/* e <- the weight expression text (i the index, n the size); fails the test otherwise */
static inline void tsum_parse(embz_expr_t e, const char *text)
{
    embz_err_t err;
    embz_err_clear(&err);
    embz_expr_init(e);
    int st = embz_expr_parse(e, text, NULL, 0, &err);
    ck_assert_msg(st == EMBZ_OK, "parse '%s': %s", text, err.text);
}

/* a tail of w for size n over (M, end]; fails the test when it cannot be certified */
static inline void tsum_tail(embz_tail_t t, const embz_expr_t w, const fmpz_t n, slong M,
                             const fmpz_t end, slong prec)
{
    embz_err_t err;
    embz_err_clear(&err);
    int st = embz_tail_init(t, w, n, M, end, prec, &err);
    ck_assert_msg(st == EMBZ_OK, "embz_tail_init failed (%d): %s", st, err.text);
}

/* r <- 10^e */
static inline void tsum_ten_pow(fmpz_t r, ulong e)
{
    fmpz_set_ui(r, 10);
    fmpz_pow_ui(r, r, e);
}

/* x is finite and its radius is at most 2^-bits |mid x| (or 2^-bits when x contains 0) */
static inline int tsum_accurate(const arb_t x, slong bits)
{
    if (!arb_is_finite(x)) return 0;
    if (arb_contains_zero(x)) return mag_cmp_2exp_si(arb_radref(x), -bits) <= 0;
    return arb_rel_accuracy_bits(x) >= bits;
}

/* Fails unless the certified ball got overlaps the reference want (an enclosure of the same
 * number); what names the check. */
static inline void tsum_check_overlap(const arb_t got, const arb_t want, const char *what)
{
    if (!arb_overlaps(got, want)) {
        char *a = arb_get_str(got, 30, 0), *b = arb_get_str(want, 30, 0);
        ck_abort_msg("%s: %s does not meet the reference %s", what, a, b);   /* (no return) */
    }
}

/* Fails unless got overlaps want and is accurate to bits. */
static inline void tsum_check(const arb_t got, const arb_t want, slong bits, const char *what)
{
    tsum_check_overlap(got, want, what);
    if (!tsum_accurate(got, bits)) {
        char *a = arb_get_str(got, 30, 0);
        ck_abort_msg("%s: %s is not accurate to %ld bits", what, a, (long) bits);
    }
}

/* Fails unless got overlaps want and its radius is at most 2^-bits |got| + k rem: a tail sum
 * carries k remainder bounds rem (k = 1 for T~(x), 2 for a difference), and with a small M
 * the Euler–Maclaurin series itself limits the accuracy (the remainder cannot fall below
 * about e^(-2 pi M) of the scale), which no precision can improve. */
static inline void tsum_check_sum(const arb_t got, const arb_t want, const mag_t rem, int k,
                                  slong bits, const char *what)
{
    tsum_check_overlap(got, want, what);
    mag_t b, r;
    mag_init(b); mag_init(r);
    arb_get_mag(b, got);
    mag_mul_2exp_si(b, b, -bits);
    mag_mul_ui(r, rem, (ulong) k);
    mag_add(b, b, r);
    if (!arb_is_finite(got) || mag_cmp(arb_radref(got), b) > 0) {
        char *a = arb_get_str(got, 30, 0);
        ck_abort_msg("%s: %s wider than 2^-%ld of it plus %d x rem = %g", what, a,
                     (long) bits, k, mag_get_d(rem));
    }
    mag_clear(b); mag_clear(r);
}

/* A suite named name with one test case "core" (generous time-out) for the tests to add. */
static inline TCase *tsum_suite(Suite **s, const char *name)
{
    *s = suite_create(name);
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 600);
    suite_add_tcase(*s, tc);
    return tc;
}

#endif
