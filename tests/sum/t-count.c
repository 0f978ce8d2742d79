/* Counts of the weights above a value by bisection (embz_tail_count, src/sum/tail_count.c).
 * Reference: the explicit count #{ i : M < i <= upto, w(i) > v } over every index, with the
 * weights written directly as arb functions (not through the expression evaluator) at 512
 * bits; v is put halfway between two weights (or beyond all of them) so that every comparison
 * is decided. An exact tie (v equal to a weight, here 1/64) must be reported as
 * EMBZ_ERR_PREC, never guessed. */
#include "tsum.h"

#define NW 4
static const char *const TEXTS[NW] = { "1/i", "sqrt(i)", "exp(-i/n)", "i^2/n" };
static const ulong SIZE = 500;   /* n for the weights that use it */

/* weight k at index i, written with arb directly */
static void w_ref(arb_t r, int k, slong i, slong prec)
{
    arb_set_si(r, i);
    switch (k) {
    case 0: arb_inv(r, r, prec); break;
    case 1: arb_sqrt(r, r, prec); break;
    case 2: arb_div_ui(r, r, SIZE, prec); arb_neg(r, r); arb_exp(r, r, prec); break;
    default: arb_mul(r, r, r, prec); arb_div_ui(r, r, SIZE, prec); break;
    }
}

static slong explicit_count(int k, const arb_t v, slong M, slong upto)
{
    arb_t x;
    arb_init(x);
    slong c = 0;
    for (slong i = M + 1; i <= upto; i++) {
        w_ref(x, k, i, 512);
        ck_assert(arb_gt(x, v) || arb_lt(x, v));        /* the reference is decided */
        if (arb_gt(x, v)) c++;
    }
    arb_clear(x);
    return c;
}

START_TEST(test_explicit_counts)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const slong ends = 3000, Ms[3] = { 1, 7, 30 };
    fmpz_t n, end, upto, got;
    arb_t v, a;
    fmpz_init(n); fmpz_init(end); fmpz_init(upto); fmpz_init(got);
    arb_init(v); arb_init(a);
    fmpz_set_ui(n, SIZE);
    fmpz_set_si(end, ends);
    for (int k = 0; k < NW; k++) {
        embz_expr_t w;
        tsum_parse(w, TEXTS[k]);
        for (int pi = 0; pi < 2; pi++) {
            slong prec = TSUM_PRECS[pi];
            for (int mi = 0; mi < 3; mi++) {
                slong M = Ms[mi];
                embz_tail_t t;
                tsum_tail(t, w, n, M, end, prec);
                for (int cs = 0; cs < (tsum_quick() ? 6 : 20); cs++) {
                    slong up = M + 1 + (slong) n_randint(rs, (ulong) (ends - M));
                    fmpz_set_si(upto, up);
                    /* v halfway between the weights at j and j + 1, or beyond the range */
                    slong j = M + (slong) n_randint(rs, (ulong) (up - M + 2));
                    int where = (int) n_randint(rs, 8);
                    if (where == 0) {
                        w_ref(v, k, M + 1, 512);
                        w_ref(a, k, up, 512);
                        arb_max(v, v, a, 512);
                        arb_mul_2exp_si(v, v, 1);           /* above every weight */
                    } else if (where == 1) {
                        w_ref(v, k, M + 1, 512);
                        w_ref(a, k, up, 512);
                        arb_min(v, v, a, 512);
                        arb_mul_2exp_si(v, v, -1);          /* below every weight */
                    } else {
                        w_ref(v, k, j, 512);
                        w_ref(a, k, j + 1, 512);
                        arb_add(v, v, a, 512);
                        arb_mul_2exp_si(v, v, -1);
                    }
                    ck_assert_int_eq(embz_tail_count(got, t, v, upto, prec), EMBZ_OK);
                    slong want = explicit_count(k, v, M, up);
                    ck_assert_msg(fmpz_equal_si(got, want), "%s, M = %ld, upto = %ld: "
                                  "count %ld, explicit %ld", TEXTS[k], M, up,
                                  fmpz_get_si(got), want);
                }
                embz_tail_clear(t);
            }
        }
        embz_expr_clear(w);
    }
    fmpz_clear(n); fmpz_clear(end); fmpz_clear(upto); fmpz_clear(got);
    arb_clear(v); arb_clear(a);
    flint_randclear(rs);
}
END_TEST

/* v = 1/64 exactly equals the weight 1/i at i = 64 (an exact ball at any precision): the
 * count cannot be decided and says so; with 64 outside (M, upto] it is decided */
START_TEST(test_tie)
{
    embz_expr_t w;
    fmpz_t n, end, upto, got;
    arb_t v;
    fmpz_init(n); fmpz_init(end); fmpz_init(upto); fmpz_init(got);
    arb_init(v);
    tsum_parse(w, "1/i");
    fmpz_set_ui(n, 1000);
    fmpz_set_ui(end, 1000);
    arb_one(v);
    arb_mul_2exp_si(v, v, -6);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, 10, end, prec);
        fmpz_set_ui(upto, 1000);
        ck_assert_int_eq(embz_tail_count(got, t, v, upto, prec), EMBZ_ERR_PREC);
        fmpz_set_ui(upto, 63);           /* indices 11 .. 63, all above 1/64 */
        ck_assert_int_eq(embz_tail_count(got, t, v, upto, prec), EMBZ_OK);
        ck_assert(fmpz_equal_si(got, 53));
        embz_tail_clear(t);
    }
    fmpz_clear(n); fmpz_clear(end); fmpz_clear(upto); fmpz_clear(got);
    arb_clear(v);
    embz_expr_clear(w);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-count");
    tcase_add_test(tc, test_explicit_counts);
    tcase_add_test(tc, test_tie);
    return tu_run_suite(s);
}
