/* Weights constant on blocks (steps.c): the blocks found against an independent count in C,
 * E_n against explicit summation (another route: every index summed) at sizes it reaches,
 * for several targets and a non-monotone floor argument; the optimal state 2^(-ceil(log2 i))
 * against its closed form 1/psi_2(n) (docs/optimal.md, derived there and checked against the
 * certified linear program) at sizes up to 2^3000; the refusals. */
#include <check.h>
#include <stdlib.h>
#include <string.h>
#include "embz.h"
#include "error/impl.h"
#include "../testutil.h"

/* fewer cases with EMBZ_QUICK (the sanitizer run) */
static int quick(void)
{
    return getenv("EMBZ_QUICK") != NULL;
}

static void family(embz_family_t f, const char *expr)
{
    embz_err_t err;
    embz_err_clear(&err);
    embz_family_init(f);
    ck_assert_msg(embz_family_resolve(f, expr, NULL, 0, 0, &err) == EMBZ_OK, "%s", err.text);
}

/* E_n by blocks and by explicit summation overlap, and the blocks' enclosure is tight */
static void against_explicit(const char *expr, slong n, const char *target)
{
    embz_family_t f;
    family(f, expr);
    ck_assert(_embz_steps_applies(f));
    embz_target_t q;
    embz_target_init(q);
    tu_target_set(q, target);
    fmpz_t nn;
    fmpz_init_set_si(nn, n);
    embz_error_result_t a, b;
    embz_error_result_init(a);
    embz_error_result_init(b);
    embz_err_t err;
    embz_err_clear(&err);
    ck_assert_msg(_embz_error_steps(a, f, nn, q, NULL, 0, 128, &err) == EMBZ_OK, "%s n=%ld: %s", expr,
                  (long) n, err.text);
    ck_assert_msg(embz_error_explicit(b, f, nn, q, 128, &err) == EMBZ_OK, "%s", err.text);
    ck_assert_msg(arb_overlaps(a->error, b->error), "%s at n = %ld, target %s", expr,
                  (long) n, target);
    ck_assert(a->how.kind == EMBZ_HOW_BLOCKS && a->method == EMBZ_METHOD_ANALYTIC);
    ck_assert(mag_cmp_2exp_si(arb_radref(a->error), -80) < 0);
    embz_error_result_clear(a);
    embz_error_result_clear(b);
    embz_target_clear(q);
    fmpz_clear(nn);
    embz_family_clear(f);
}

START_TEST(test_against_explicit)
{
    static const char *const ws[] = {
        "2^(-ceil(log2(i)))",                /* the optimal state for one ebit */
        "2^(-floor(log2(2*i-1)))",           /* the same blocks, written with floor */
        "1/(1+floor(sqrt(i)))",              /* about sqrt(n) blocks */
        "1/ceil(i/7)^2",                     /* blocks of 7, summable */
        "3^(-floor(log2(i)))",               /* dyadic blocks, values falling faster */
        "1/(3+floor(2*sin(i/40)))",
        "1/(1+floor(n/i))",                  /* about 2 sqrt(n) blocks, jumps of many units */          /* an argument that is not monotone */
    };
    static const char *const targets[] = { "ebit", "uniform:3", "0.7,0.3" };
    static const slong sizes[] = { 1, 2, 3, 17, 1000, 4096, 65537 };
    for (size_t w = 0; w < sizeof(ws) / sizeof(ws[0]); w++)
        for (size_t s = 0; s < sizeof(sizes) / sizeof(sizes[0]); s++)
            for (size_t t = 0; t < 3; t++) {
                if (quick() && (s + t + w) % 3 != 0) continue;
                against_explicit(ws[w], sizes[s], targets[t]);
            }
}
END_TEST

/* the blocks of 1/(1+floor(sqrt(i))) up to n: one per value of floor(sqrt(i)), counted in C */
START_TEST(test_blocks)
{
    embz_family_t f;
    family(f, "1/(1+floor(sqrt(i)))");
    static const slong sizes[] = { 1, 3, 4, 99, 100, 101, 123456 };
    for (size_t s = 0; s < sizeof(sizes) / sizeof(sizes[0]); s++) {
        slong n = sizes[s];
        embz_levels_t x;
        embz_levels_init(x);
        fmpz_t nn;
        fmpz_init_set_si(nn, n);
        embz_err_t err;
        embz_err_clear(&err);
        ck_assert(_embz_steps_levels(x, f, nn, 128, 0, NULL, 0, &err) == EMBZ_OK);
        slong r = 1;
        while ((r + 1) * (r + 1) <= n) r++;          /* floor(sqrt(n)) */
        ck_assert_int_eq(x->len, r);
        /* block j holds the indices with floor(sqrt(i)) = j: j^2 .. (j+1)^2 - 1 */
        for (slong j = 1; j <= r; j++) {
            slong hi = (j + 1) * (j + 1) - 1 < n ? (j + 1) * (j + 1) - 1 : n;
            ck_assert(fmpz_equal_si(x->m + j - 1, hi - j * j + 1));
        }
        fmpz_clear(nn);
        embz_levels_clear(x);
    }
    embz_family_clear(f);
}
END_TEST

/* the optimal state: E_n = 1/psi_2(n), psi_2(n) = j + 1 + n/2^j for 2^j <= n < 2^(j+1) */
START_TEST(test_optimal_state)
{
    embz_family_t f;
    family(f, "2^(-ceil(log2(i)))");
    embz_target_t q;
    embz_target_init(q);
    flint_rand_t st;
    flint_randinit(st);
    fmpz_t n, p;
    fmpq_t psi;
    arb_t exact;
    fmpz_init(n); fmpz_init(p);
    fmpq_init(psi);
    arb_init(exact);
    for (int k = 0; k < (quick() ? 12 : 40); k++) {
        ulong bits = k < 4 ? (ulong) (1000 * (k + 0)) + 3 : 2 + n_randint(st, 400);
        if (k == 3) bits = 3001;                       /* n = 2^3000 */
        if (k == 3) { fmpz_one(n); fmpz_mul_2exp(n, n, 3000); }
        else { fmpz_randbits(n, st, bits); fmpz_abs(n, n); fmpz_add_ui(n, n, 1); }
        ulong j = fmpz_bits(n) - 1;
        fmpz_one(p);
        fmpz_mul_2exp(p, p, j);
        fmpq_set_fmpz_frac(psi, n, p);
        fmpq_add_ui(psi, psi, j + 1);
        arb_set_fmpq(exact, psi, 256);
        arb_inv(exact, exact, 256);
        embz_error_result_t r;
        embz_error_result_init(r);
        embz_err_t err;
        embz_err_clear(&err);
        ck_assert_msg(_embz_error_steps(r, f, n, q, NULL, 0, 128, &err) == EMBZ_OK, "%s", err.text);
        ck_assert(arb_overlaps(r->error, exact));
        ck_assert(mag_cmp_2exp_si(arb_radref(r->error), -90) < 0);
        ck_assert_int_eq(r->how.levels, (slong) j + 1 + (fmpz_equal(n, p) ? 0 : 1));
        embz_error_result_clear(r);
    }
    fmpz_clear(n); fmpz_clear(p);
    fmpq_clear(psi);
    arb_clear(exact);
    flint_randclear(st);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

START_TEST(test_refused)
{
    embz_family_t f;
    family(f, "floor(log2(i))/i");            /* i outside the floor: not a step weight */
    ck_assert(!_embz_steps_applies(f));
    embz_family_clear(f);
    family(f, "1");                           /* no i at all */
    ck_assert(!_embz_steps_applies(f));
    embz_family_clear(f);
    family(f, "1/ceil(i/3)");                 /* blocks of 3: far too many at 10^30 */
    embz_levels_t x;
    embz_levels_init(x);
    fmpz_t n;
    fmpz_init(n);
    fmpz_ui_pow_ui(n, 10, 30);
    embz_err_t err;
    embz_err_clear(&err);
    ck_assert_int_eq(_embz_steps_levels(x, f, n, 128, 0, NULL, 0, &err), EMBZ_ERR_LIMIT);
    ck_assert(strstr(err.text, "blocks") != NULL);
    /* a budget of its own: <= 0 means the default */
    fmpz_set_ui(n, 100);
    embz_err_clear(&err);
    ck_assert_int_eq(_embz_steps_levels(x, f, n, 128, 10, NULL, 0, &err), EMBZ_ERR_LIMIT);
    /* floor(n/i) jumps by many units at small i: no lower bound on the count is proven, so
     * it is not refused up front, and its 2 sqrt(n) blocks are summed (n = 10^7) */
    embz_family_clear(f);
    family(f, "1/(1+floor(n/i))");
    fmpz_set_ui(n, 10000000);
    embz_levels_clear(x);
    embz_levels_init(x);
    embz_err_clear(&err);
    ck_assert_int_eq(_embz_steps_levels(x, f, n, 128, 0, NULL, 0, &err), EMBZ_OK);
    ck_assert(x->len > 6000 && x->len < 6400);
    /* an undefined value is a domain error naming the index, not an undecided step */
    embz_family_clear(f);
    family(f, "1/(1+floor(log(100-i)))");
    fmpz_set_ui(n, 200);
    embz_levels_clear(x);
    embz_levels_init(x);
    embz_err_clear(&err);
    ck_assert_int_eq(_embz_steps_levels(x, f, n, 128, 0, NULL, 0, &err), EMBZ_ERR_DOMAIN);
    /* a cancel flag stops the search */
    embz_family_clear(f);
    family(f, "2^(-ceil(log2(i)))");
    fmpz_ui_pow_ui(n, 10, 30);
    volatile int cancel = 1;
    embz_levels_clear(x);
    embz_levels_init(x);
    embz_err_clear(&err);
    ck_assert_int_eq(_embz_steps_levels(x, f, n, 128, 0, &cancel, 0, &err), EMBZ_ERR_LIMIT);
    ck_assert(strstr(err.text, "cancelled") != NULL);
    fmpz_clear(n);
    embz_levels_clear(x);
    embz_family_clear(f);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("error-steps");
    TCase *tc = tcase_create("steps");
    tcase_set_timeout(tc, 900);
    tcase_add_test(tc, test_against_explicit);
    tcase_add_test(tc, test_blocks);
    tcase_add_test(tc, test_optimal_state);
    tcase_add_test(tc, test_refused);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
