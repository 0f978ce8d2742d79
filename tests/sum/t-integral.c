/* Integrals from M through the node cache (embz_tail_integral and the node placement
 * _embz_tail_node_off / _embz_tail_node_below, src/sum/tail_integral.c and impl.h).
 * References: closed forms integral_M^x f = 1/M - 1/x for f = x^-2 and ln(x/M) for f = 1/x,
 * at x up to 10^100; the placement's own definition (node_below(rel) is the last node at or
 * below rel); and the cache's promise that a result does not depend on the order of the
 * queries (bitwise equal balls). */
#include <string.h>
#include "tsum.h"

/* x = a random integer of up to bits bits, at least M + 1 */
static void random_x(arb_t x, flint_rand_t rs, slong M, ulong bits)
{
    fmpz_t z;
    fmpz_init(z);
    fmpz_randbits(z, rs, (flint_bitcnt_t) (1 + n_randint(rs, bits)));
    fmpz_abs(z, z);
    fmpz_add_ui(z, z, (ulong) M + 1);
    arb_set_fmpz(x, z);
    fmpz_clear(z);
}

START_TEST(test_closed_forms)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const slong M = 50;
    fmpz_t n, end;
    arb_t x, r, ref, e;
    fmpz_init(n); fmpz_init(end);
    arb_init(x); arb_init(r); arb_init(ref); arb_init(e);
    tsum_ten_pow(end, 100);
    fmpz_set(n, end);
    const char *const texts[2] = { "i^(-2)", "1/i" };
    for (int k = 0; k < 2; k++) {
        embz_expr_t w;
        tsum_parse(w, texts[k]);
        for (int pi = 0; pi < 2; pi++) {
            slong prec = TSUM_PRECS[pi];
            embz_tail_t t;
            tsum_tail(t, w, n, M, end, prec);
            for (int cs = 0; cs < (tsum_quick() ? 10 : 60); cs++) {
                random_x(x, rs, M, 330);
                ck_assert_int_eq(embz_tail_integral(r, t, x, prec), EMBZ_OK);
                if (k == 0) {
                    arb_set_si(ref, M);
                    arb_inv(ref, ref, prec + 64);
                    arb_inv(e, x, prec + 64);
                    arb_sub(ref, ref, e, prec + 64);
                } else {
                    arb_div_si(ref, x, M, prec + 64);
                    arb_log(ref, ref, prec + 64);
                }
                tsum_check(r, ref, prec - 24, texts[k]);
            }
            /* at x = M the integral is 0 */
            arb_set_si(x, M);
            ck_assert_int_eq(embz_tail_integral(r, t, x, prec), EMBZ_OK);
            ck_assert(arb_contains_zero(r) && mag_cmp_2exp_si(arb_radref(r), -prec + 4) < 0);
            embz_tail_clear(t);
        }
        embz_expr_clear(w);
    }
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(x); arb_clear(r); arb_clear(ref); arb_clear(e);
    flint_randclear(rs);
}
END_TEST

/* the same queries in two orders on two fresh tails give bitwise the same balls */
START_TEST(test_order_independent)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const slong M = 20, Q = 40;
    fmpz_t n, end;
    arb_ptr xs = _arb_vec_init(Q), r1 = _arb_vec_init(Q), r2 = _arb_vec_init(Q);
    fmpz_init(n); fmpz_init(end);
    embz_expr_t w;
    tsum_parse(w, "1/(i*log(i))");
    tsum_ten_pow(end, 100);
    fmpz_set(n, end);
    for (int pi = 0; pi < 2; pi++) {
        slong prec = TSUM_PRECS[pi];
        embz_tail_t t1, t2;
        tsum_tail(t1, w, n, M, end, prec);
        tsum_tail(t2, w, n, M, end, prec);
        for (slong q = 0; q < Q; q++) random_x(xs + q, rs, M, 330);
        for (slong q = 0; q < Q; q++)
            ck_assert_int_eq(embz_tail_integral(r1 + q, t1, xs + q, prec), EMBZ_OK);
        for (slong q = Q - 1; q >= 0; q--)
            ck_assert_int_eq(embz_tail_integral(r2 + q, t2, xs + q, prec), EMBZ_OK);
        for (slong q = 0; q < Q; q++)
            ck_assert_msg(arb_equal(r1 + q, r2 + q), "query %ld differs with the order", q);
        embz_tail_clear(t1);
        embz_tail_clear(t2);
    }
    _arb_vec_clear(xs, Q); _arb_vec_clear(r1, Q); _arb_vec_clear(r2, Q);
    fmpz_clear(n); fmpz_clear(end);
    embz_expr_clear(w);
    flint_randclear(rs);
}
END_TEST

/* node placement: offsets start at 0, increase, are linear (k du) up to NODES_LINEAR, then
 * grow by 2^(1/4) per node; node_below(rel) is the last node at or below rel */
START_TEST(test_nodes)
{
    flint_rand_t rs;
    flint_randinit(rs);
    embz_tail_struct t;
    memset(&t, 0, sizeof(t));
    const double dus[2] = { 1.0, 0.375 };
    for (int d = 0; d < 2; d++) {
        t.du = dus[d];
        ck_assert(_embz_tail_node_off(&t, 0) == 0.0);
        for (slong k = 0; k < 200; k++) {
            double a = _embz_tail_node_off(&t, k), b = _embz_tail_node_off(&t, k + 1);
            ck_assert(a < b);
            if (k + 1 <= NODES_LINEAR) ck_assert(b == t.du * (double) (k + 1));
            else ck_assert(fabs(b / a - pow(2.0, 0.25)) < 1e-12);
        }
        ck_assert_int_eq(_embz_tail_node_below(&t, -3.0), 0);
        ck_assert_int_eq(_embz_tail_node_below(&t, 0.0), 0);
        for (int cs = 0; cs < 2000; cs++) {
            /* rel spread over [0, 10^7] on a log scale, and exact node offsets */
            double rel = (cs % 5 == 0)
                ? _embz_tail_node_off(&t, (slong) n_randint(rs, 150))
                : exp((double) n_randint(rs, 1 << 20) / (1 << 20) * 16.0) - 1.0;
            slong k = _embz_tail_node_below(&t, rel);
            ck_assert(k >= 0);
            ck_assert_msg(_embz_tail_node_off(&t, k) <= rel
                          && _embz_tail_node_off(&t, k + 1) > rel, "rel %g -> node %ld", rel,
                          (long) k);
        }
        /* u up to ln(10^1000) ~ 2303 takes O(log log n) nodes beyond the linear ones */
        ck_assert(_embz_tail_node_below(&t, 2303.0) < NODES_LINEAR + 4 * 7 + 8);
    }
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s;
    TCase *tc = tsum_suite(&s, "sum-integral");
    tcase_add_test(tc, test_closed_forms);
    tcase_add_test(tc, test_order_independent);
    tcase_add_test(tc, test_nodes);
    return tu_run_suite(s);
}
