/* Far levels of a tail (set_levels in src/sum/tail_init.c, embz_tail_level): their layout as
 * documented in sum.h (starts X_j = 2^lev_bits[j] increasing, orders falling, level j
 * certified up to 2^(lev_bits[j+1] + 32), the last one to the end), the level chosen for a
 * ball against that definition evaluated with exact arb comparisons, the promise that every
 * ball narrower than a factor 2^31 has a level, and the sums at the level starts (where two
 * levels are valid) against psi(X + 1) - psi(M + 1) from arb's digamma (H_k = psi(k+1) +
 * gamma). */
#include "tsum.h"

/* the definition: the highest j whose range contains the ball x, or -1 */
static slong expected_level(const embz_tail_struct *t, const arb_t x)
{
    if (!arb_is_finite(x)) return -1;
    arb_t p;
    arb_init(p);
    slong found = -1;
    for (slong j = t->nlev - 1; j >= 0 && found < 0; j--) {
        int ok = 1;
        if (j > 0) {
            arb_one(p);
            arb_mul_2exp_si(p, p, t->lev_bits[j]);
            arb_sub(p, x, p, ARF_PREC_EXACT);         /* lower end of x >= X_j */
            ok = arb_is_nonnegative(p);
        }
        if (ok && t->lev_top[j] >= 0) {
            arb_one(p);
            arb_mul_2exp_si(p, p, t->lev_top[j]);
            arb_sub(p, p, x, ARF_PREC_EXACT);         /* upper end of x <= Z_j */
            ok = arb_is_nonnegative(p);
        }
        if (ok) found = j;
    }
    arb_clear(p);
    return found;
}

START_TEST(test_layout_and_choice)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const slong M = 30;
    fmpz_t n, end;
    arb_t x, lo, e;
    fmpz_init(n); fmpz_init(end);
    arb_init(x); arb_init(lo); arb_init(e);
    tsum_ten_pow(end, 1000);
    fmpz_set(n, end);
    const char *const texts[2] = { "1/i", "1/(i*log(i))" };
    for (int c = 0; c < 2; c++) {
        embz_expr_t w;
        tsum_parse(w, texts[c]);
        for (int pi = 0; pi < 2; pi++) {
            slong prec = TSUM_PRECS[pi];
            embz_tail_t t;
            tsum_tail(t, w, n, M, end, prec);
            /* layout */
            ck_assert(t->nlev > 1 && t->nlev <= EMBZ_TAIL_MAX_LEVELS);
            ck_assert(t->lev_bits[0] == 0 && t->lev_p[0] == t->p);
            for (slong j = 1; j < t->nlev; j++) {
                ck_assert(t->lev_bits[j] > t->lev_bits[j - 1]);
                ck_assert(t->lev_p[j] >= 1 && t->lev_p[j] < t->lev_p[j - 1]);
                ck_assert((slong) fmpz_bits(end) > t->lev_bits[j]);
                ck_assert(t->lev_top[j - 1] == t->lev_bits[j] + 32);
            }
            ck_assert(t->lev_top[t->nlev - 1] == -1);
            /* choice against the definition, for random balls */
            int cases = tsum_quick() ? 300 : 2000;
            for (int cs = 0; cs < cases; cs++) {
                slong b = 5 + (slong) n_randint(rs, 3330);
                arb_set_ui(x, 1 + n_randint(rs, 1 << 20));
                arb_mul_2exp_si(x, x, b - 20);
                /* radius up to about the midpoint times 2^-r, r in [-1, 40] */
                arf_get_mag(arb_radref(x), arb_midref(x));
                mag_mul_2exp_si(arb_radref(x), arb_radref(x), (slong) n_randint(rs, 42) - 1);
                if (cs % 4 == 0) mag_zero(arb_radref(x));
                slong got = embz_tail_level(t, x), want = expected_level(t, x);
                if (got != want) {
                    /* the ends of the ball are rounded outwards to 30 bits, which may cost a
                     * level within 2^-28 of its edge, never give a level not covering it */
                    arb_set(lo, x);
                    arb_get_mag(arb_radref(e), x);
                    mag_mul_2exp_si(arb_radref(e), arb_radref(e), -28);
                    mag_add(arb_radref(lo), arb_radref(lo), arb_radref(e));
                    ck_assert_msg(got < want && expected_level(t, lo) <= got,
                                  "level %ld, the definition gives %ld", (long) got,
                                  (long) want);
                }
                /* narrower than a factor 2^31 with a positive lower end: a level exists */
                arb_get_lbound_arf(arb_midref(lo), x, prec);
                mag_zero(arb_radref(lo));
                if (arf_sgn(arb_midref(lo)) > 0) {
                    arb_mul_2exp_si(lo, lo, 31);
                    arb_sub(lo, lo, x, ARF_PREC_EXACT);
                    if (arb_is_nonnegative(lo)) ck_assert(embz_tail_level(t, x) >= 0);
                }
            }
            arb_indeterminate(x);
            ck_assert_int_eq(embz_tail_level(t, x), -1);
            arb_pos_inf(x);
            ck_assert_int_eq(embz_tail_level(t, x), -1);
            embz_tail_clear(t);
        }
        embz_expr_clear(w);
    }
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(x); arb_clear(lo); arb_clear(e);
    flint_randclear(rs);
}
END_TEST

/* at X_j both level j - 1 and level j are valid; both enclose H_X - H_M */
START_TEST(test_chained_sums)
{
    const slong M = 30;
    fmpz_t n, end;
    arb_t x, T, ref, e;
    fmpz_init(n); fmpz_init(end);
    arb_init(x); arb_init(T); arb_init(ref); arb_init(e);
    tsum_ten_pow(end, 1000);
    fmpz_set(n, end);
    embz_expr_t w;
    tsum_parse(w, "1/i");
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, M, end, prec);
        arb_set_si(e, M + 1);
        arb_digamma(e, e, prec + 64);
        for (slong j = 1; j < t->nlev; j++) {
            arb_one(x);
            arb_mul_2exp_si(x, x, t->lev_bits[j]);
            arb_add_ui(ref, x, 1, ARF_PREC_EXACT);
            arb_digamma(ref, ref, prec + 64);
            arb_sub(ref, ref, e, prec + 64);
            for (slong l = j - 1; l <= j; l++) {
                ck_assert_int_eq(embz_tail_sum_level(T, t, x, l, prec), EMBZ_OK);
                tsum_check_sum(T, ref, t->rem, 1, prec - 32, "sum at a level start");
            }
        }
        embz_tail_clear(t);
    }
    embz_expr_clear(w);
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(x); arb_clear(T); arb_clear(ref); arb_clear(e);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-level");
    tcase_add_test(tc, test_layout_and_choice);
    tcase_add_test(tc, test_chained_sums);
    return tu_run_suite(s);
}
