/* Counts where weights may tie with the value (embz_tail_count_range, src/sum/tail_count.c):
 * lo <= N <= hi, each of the hi - lo undecided weights exceeding v by at most tie. Near the
 * start by bisection, far out (indices beyond about 2^prec) by a bracket around the root of
 * f = v found in ln x (_embz_tail_bracket, also tested alone). References: exact counts N known in closed form for v between two
 * weights of 1/i and sqrt(i) (1/i > 1/(q + 1/2) exactly for i <= q; sqrt(i) > sqrt(q + 1/2)
 * exactly for i > q), with q random up to 10^80; exact equalities (v = 1/64, v = 4 for
 * i^2/4) and a value whose ball straddles one weight, with the counts known. */
#include "tsum.h"

/* v = 1/(q + 1/2) (k = 0) or sqrt(q + 1/2) (k = 1) at 1024 bits (rounded: the closed-form
 * count holds for any v strictly between the neighbouring weights, which 1024 bits keep) */
static void value_at(arb_t v, int k, const fmpz_t q)
{
    arb_set_fmpz(v, q);
    arb_mul_2exp_si(v, v, 1);
    arb_add_ui(v, v, 1, 1024);
    arb_mul_2exp_si(v, v, -1);                 /* q + 1/2, exact */
    if (k == 0) arb_inv(v, v, 1024);
    else arb_sqrt(v, v, 1024);
    /* an exact ball (a point) inside the rounding: the count is about that point */
    mag_zero(arb_radref(v));
}

/* the undecided weights exceed v by at most tie: checked on the largest one, with the excess
 * taken as (upper end of the weight) - (lower end of v) in exact arf arithmetic */
static void check_tie(int k, const fmpz_t lo, const fmpz_t hi, const arb_t tie, const arb_t v,
                      slong M, const fmpz_t upto)
{
    ck_assert(arb_is_exact(tie) && !arb_is_negative(tie));
    if (fmpz_equal(lo, hi)) {
        ck_assert(arb_is_zero(tie));
        return;
    }
    fmpz_t idx;
    arb_t x;
    arf_t a, b;
    fmpz_init(idx);
    arb_init(x);
    arf_init(a); arf_init(b);
    if (k == 0) fmpz_add_si(idx, lo, M + 1);             /* the first undecided index */
    else { fmpz_sub(idx, upto, hi); fmpz_add_ui(idx, idx, 1); }
    arb_set_fmpz(x, idx);
    if (k == 0) arb_inv(x, x, 2048);
    else arb_sqrt(x, x, 2048);
    arb_get_ubound_arf(a, x, 2048);
    arb_get_lbound_arf(b, v, ARF_PREC_EXACT);
    arf_sub(a, a, b, 2048, ARF_RND_UP);
    ck_assert_msg(arf_cmp(a, arb_midref(tie)) <= 0,
                  "an undecided weight exceeds v by more than tie");
    fmpz_clear(idx);
    arb_clear(x);
    arf_clear(a); arf_clear(b);
}

/* far out: 1/i and sqrt(i) up to 10^80, q random of up to 266 bits; the bracket applies at
 * both precisions (the index has more than prec - 16 bits) */
START_TEST(test_far)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const slong M = 40;
    fmpz_t n, end, q, lo, hi, want, bound, b0, b1;
    arb_t v, tie;
    fmpz_init(n); fmpz_init(end); fmpz_init(q); fmpz_init(lo); fmpz_init(hi);
    fmpz_init(want); fmpz_init(bound); fmpz_init(b0); fmpz_init(b1);
    arb_init(v); arb_init(tie);
    tsum_ten_pow(end, 80);
    fmpz_set(n, end);
    const char *const texts[2] = { "1/i", "sqrt(i)" };
    for (int k = 0; k < 2; k++) {
        embz_expr_t w;
        tsum_parse(w, texts[k]);
        for (int pi = 0; pi < 2; pi++) {
            slong prec = TSUM_PRECS[pi];
            embz_tail_t t;
            tsum_tail(t, w, n, M, end, prec);
            int undecided = 0;
            for (int cs = 0; cs < (tsum_quick() ? 15 : 60); cs++) {
                fmpz_randm(q, rs, end);
                if (fmpz_cmp_si(q, M + 1) < 0) fmpz_set_si(q, M + 1);
                value_at(v, k, q);
                ck_assert_int_eq(embz_tail_count_range(lo, hi, tie, t, v, end, prec), EMBZ_OK);
                if (k == 0) fmpz_sub_si(want, q, M);     /* i = M+1 .. q */
                else fmpz_sub(want, end, q);             /* i = q+1 .. end */
                ck_assert_msg(fmpz_cmp(lo, want) <= 0 && fmpz_cmp(want, hi) <= 0,
                              "%s at %ld bits: the count is outside [lo, hi]", texts[k],
                              (long) prec);
                check_tie(k, lo, hi, tie, v, M, end);
                /* the undecided range is a few 2^-prec of the index (an estimate of what
                 * prec bits can separate, with room: 2^-(prec - 24) q) */
                fmpz_sub(bound, hi, lo);
                fmpz_mul_2exp(bound, bound, (ulong) (prec - 24));
                ck_assert_msg(fmpz_cmp(bound, q) <= 0 || fmpz_cmp_ui(hi, 2) < 0,
                              "%s: undecided range too wide", texts[k]);
                if (!fmpz_equal(lo, hi)) undecided++;
                /* the bracket itself: the boundary (after index q, in both directions) lies
                 * in [b0, b1], as narrow as above */
                ck_assert_int_eq(_embz_tail_bracket(b0, b1, t, v, end, prec), EMBZ_OK);
                ck_assert(fmpz_cmp(b0, q) <= 0 && fmpz_cmp(q, b1) <= 0);
                fmpz_sub(bound, b1, b0);
                fmpz_mul_2exp(bound, bound, (ulong) (prec - 24));
                ck_assert(fmpz_cmp(bound, q) <= 0);
            }
            /* beyond the range: all or none counted, decided */
            arb_set_ui(v, 2);
            if (k == 1) { arb_set_fmpz(v, end); arb_mul_2exp_si(v, v, 1); }
            ck_assert_int_eq(embz_tail_count_range(lo, hi, tie, t, v, end, prec), EMBZ_OK);
            ck_assert(fmpz_is_zero(lo) && fmpz_is_zero(hi) && arb_is_zero(tie));
            arb_set_ui(v, 1);
            arb_mul_2exp_si(v, v, -400);
            ck_assert_int_eq(embz_tail_count_range(lo, hi, tie, t, v, end, prec), EMBZ_OK);
            fmpz_sub_si(want, end, M);
            ck_assert(fmpz_equal(lo, want) && fmpz_equal(hi, want) && arb_is_zero(tie));
            /* at 64 bits indices of 266 bits cannot all be told apart from their neighbours */
            if (prec == 64) ck_assert_msg(undecided > 0, "%s: no undecided case", texts[k]);
            embz_tail_clear(t);
        }
        embz_expr_clear(w);
    }
    fmpz_clear(n); fmpz_clear(end); fmpz_clear(q); fmpz_clear(lo); fmpz_clear(hi);
    fmpz_clear(want); fmpz_clear(bound); fmpz_clear(b0); fmpz_clear(b1);
    arb_clear(v); arb_clear(tie);
    flint_randclear(rs);
}
END_TEST

/* exact equality near the start is decided: the count is of weights strictly above v, and a
 * weight equal to v as exact balls is certainly not. 1/i at v = 1/64: indices M+1 .. 63
 * (lo = hi = 63 - M); i^2/4 at v = 4: the indices from 5 on (lo = hi = upto - 4). The plain
 * count, which needs each comparison decided either way, refuses the same case (t-count). */
START_TEST(test_ties)
{
    fmpz_t n, end, lo, hi;
    arb_t v, tie;
    fmpz_init(n); fmpz_init(end); fmpz_init(lo); fmpz_init(hi);
    arb_init(v); arb_init(tie);
    fmpz_set_ui(end, 1000);
    embz_expr_t w1, w2;
    tsum_parse(w1, "1/i");
    tsum_parse(w2, "i^2/n");
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        fmpz_set_ui(n, 1000);
        tsum_tail(t, w1, n, 10, end, prec);
        arb_one(v);
        arb_mul_2exp_si(v, v, -6);
        ck_assert_int_eq(embz_tail_count_range(lo, hi, tie, t, v, end, prec), EMBZ_OK);
        ck_assert(fmpz_equal_si(lo, 53) && fmpz_equal_si(hi, 53) && arb_is_zero(tie));
        embz_tail_clear(t);
        fmpz_set_ui(n, 4);
        tsum_tail(t, w2, n, 1, end, prec);
        arb_set_ui(v, 4);
        ck_assert_int_eq(embz_tail_count_range(lo, hi, tie, t, v, end, prec), EMBZ_OK);
        ck_assert(fmpz_equal_si(lo, 996) && fmpz_equal_si(hi, 996) && arb_is_zero(tie));
        /* v a little below 4: index 4 now counts, decided */
        arb_set_d(v, 3.75);
        ck_assert_int_eq(embz_tail_count_range(lo, hi, tie, t, v, end, prec), EMBZ_OK);
        ck_assert(fmpz_equal_si(lo, 997) && fmpz_equal_si(hi, 997) && arb_is_zero(tie));
        embz_tail_clear(t);
    }
    embz_expr_clear(w1); embz_expr_clear(w2);
    fmpz_clear(n); fmpz_clear(end); fmpz_clear(lo); fmpz_clear(hi);
    arb_clear(v); arb_clear(tie);
}
END_TEST

/* a value with a small radius straddling a weight: the tie is positive and bounds the excess */
START_TEST(test_wide_value)
{
    fmpz_t n, end, lo, hi;
    arb_t v, tie;
    fmpz_init(n); fmpz_init(end); fmpz_init(lo); fmpz_init(hi);
    arb_init(v); arb_init(tie);
    fmpz_set_ui(end, 1000);
    fmpz_set_ui(n, 1000);
    embz_expr_t w;
    tsum_parse(w, "1/i");
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t;
        tsum_tail(t, w, n, 10, end, prec);
        /* v = 1/100 +- 10^-5 covers the weights 1/i for i = 100 only (1/99 - 1/100 ~ 1e-4) */
        arb_set_ui(v, 100);
        arb_inv(v, v, prec);
        mag_set_d(arb_radref(v), 1e-5);
        ck_assert_int_eq(embz_tail_count_range(lo, hi, tie, t, v, end, prec), EMBZ_OK);
        ck_assert(fmpz_equal_si(lo, 89) && fmpz_equal_si(hi, 90));
        check_tie(0, lo, hi, tie, v, 10, end);
        ck_assert(arb_is_positive(tie));
        embz_tail_clear(t);
    }
    embz_expr_clear(w);
    fmpz_clear(n); fmpz_clear(end); fmpz_clear(lo); fmpz_clear(hi);
    arb_clear(v); arb_clear(tie);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-count_range");
    tcase_add_test(tc, test_far);
    tcase_add_test(tc, test_ties);
    tcase_add_test(tc, test_wide_value);
    return tu_run_suite(s);
}
