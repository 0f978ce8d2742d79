/* The threshold form (analytic_threshold.c), in weight units (V = t W):
 *   W Phi(V) = sum_i (w_i - V)_+,   W F(V) = W Phi(V) - sum_j q_j W Phi(V / q_j).
 * References:
 *  - the family 1/i in exact rationals (FLINT's fmpq and its harmonic numbers): with
 *    N = #{i <= n : 1/i > V} = min(n, ceil(1/V) - 1), W Phi(V) = H_N - N V exactly;
 *  - K(p -> p (x) q) of the explicit normalised vector p_i = (1/i) / H_n by
 *    embz_qvec_distance (FLINT rationals): E_n(q) = max_t F(t), and as F is piecewise linear
 *    with corners at the thresholds t = p_i and t = q_j p_i its largest value at points
 *    next to those corners must come within the slope times the offset of K, and never
 *    exceed it;
 *  - for a family with head weights inside the tail, the sorted reference of an_common.h.
 * Checked: W Phi and its count range at random thresholds (also thresholds that tie with a
 * weight), W F at points with its counts, the first- and second-order interval bounds at
 * random points inside their intervals, and max F = K. */
#include "an_common.h"

/* W Phi(V) for 1/i, i <= n, exactly; N receives the count */
static void phi_exact(fmpq_t res, slong *N, slong n, const fmpq_t V)
{
    fmpz_t c;
    fmpq_t t;
    fmpz_init(c);
    fmpq_init(t);
    /* ceil(1/V) - 1 */
    fmpz_cdiv_q(c, fmpq_denref(V), fmpq_numref(V));
    fmpz_sub_ui(c, c, 1);
    slong k = fmpz_cmp_si(c, n) > 0 ? n : fmpz_get_si(c);
    if (k < 0) k = 0;
    arith_harmonic_number(res, (ulong) k);
    fmpq_mul_si(t, V, k);
    fmpq_sub(res, res, t);
    *N = k;
    fmpz_clear(c);
    fmpq_clear(t);
}

/* W F(V) for 1/i and the target (entries v_j with multiplicities), exactly; the counts
 * N(V) and sum_j mult_j N(V / q_j) */
static void f_exact(fmpq_t res, slong *N0, slong *N1, slong n, const th_target *q,
                    const fmpq_t V)
{
    fmpq_t x, u;
    fmpq_init(x); fmpq_init(u);
    phi_exact(res, N0, n, V);
    *N1 = 0;
    for (slong j = 0; j < q->len; j++) {
        slong Nj;
        fmpq_div(x, V, q->v + j);
        phi_exact(u, &Nj, n, x);
        fmpq_mul(u, u, q->v + j);
        fmpq_mul_ui(u, u, q->mult[j]);
        fmpq_sub(res, res, u);
        *N1 += (slong) q->mult[j] * Nj;
    }
    fmpq_clear(x); fmpq_clear(u);
}

/* a random target: m entries c_j / sum c (sorted non-increasing), or uniform:d */
static void random_target(embz_target_t t, flint_rand_t rs)
{
    embz_target_clear(t);
    embz_target_init(t);
    if (n_randint(rs, 4) == 0) {
        t->kind = EMBZ_TARGET_UNIFORM;
        t->d = 2 + n_randint(rs, 6);
        return;
    }
    slong m = 2 + (slong) n_randint(rs, 4);
    t->kind = EMBZ_TARGET_VECTOR;
    tu_qvec_alloc(t->q, m);
    ulong c[8], sum = 0;
    for (slong j = 0; j < m; j++) { c[j] = 1 + n_randint(rs, 20); sum += c[j]; }
    for (slong j = 0; j < m; j++) fmpq_set_si(t->q->p + j, (slong) c[j], sum);
    embz_qvec_sort(t->q);
}

/* a random threshold V in (0, 2], dyadic, from about 1/n^2 up (log-uniformly); one time in
 * five exactly a weight 1/j instead (half of those a head weight, j <= 64) */
static void random_V(fmpq_t V, flint_rand_t rs, slong n)
{
    if (n_randint(rs, 5) == 0) {
        ulong j = n_randint(rs, 2) ? 1 + n_randint(rs, 64) : 1 + n_randint(rs, (ulong) n);
        fmpq_set_si(V, 1, j);
        return;
    }
    slong e = (slong) n_randint(rs, 2 * (ulong) FLINT_BIT_COUNT(n) + 2);
    fmpz_set_ui(fmpq_numref(V), 1 + n_randint(rs, 1 << 20));
    fmpz_one(fmpq_denref(V));
    fmpz_mul_2exp(fmpq_denref(V), fmpq_denref(V), (ulong) (e + 19));
    fmpq_canonicalise(V);
}

static void check_exact(const fmpq_t x, const arb_t b, slong prec, const char *what)
{
    arb_t e;
    arb_init(e);
    arb_set_fmpq(e, x, prec + 64);
    ck_assert_msg(arb_overlaps(e, b), "%s: not the exact value", what);
    arb_clear(e);
}

START_TEST(test_phi_inverse)
{
    flint_rand_t rs;
    flint_randinit(rs);
    for (int p = 0; p < 2; p++) {
        slong prec = tf_precs[p], n = p == 0 ? 3000 : 700;
        tf_ctx X;
        tf_ctx_init(&X, TF_INVERSE, n, 1, prec);
        actx *c = &X.c;
        fmpq_t V, ex;
        arb_t Vb, res;
        fmpz_t lo, hi;
        fmpq_init(V); fmpq_init(ex);
        arb_init(Vb); arb_init(res);
        fmpz_init(lo); fmpz_init(hi);
        long ok = 0, ties = 0;
        for (int rep = 0; rep < 600; rep++) {
            random_V(V, rs, n);
            arb_set_fmpq(Vb, V, c->prec);
            int st = _embz_an_phi_wn(res, lo, hi, c, Vb, c->prec);
            if (st == EMBZ_ERR_PREC) {
                /* only where a head weight ties with V: V = 1/j, j <= M */
                ck_assert(fmpz_is_one(fmpq_numref(V)) && fmpz_cmp_si(fmpq_denref(V), c->M) <= 0);
                ties++;
                continue;
            }
            ck_assert_int_eq(st, EMBZ_OK);
            ok++;
            slong N;
            phi_exact(ex, &N, n, V);
            check_exact(ex, res, c->prec, "W Phi(V)");
            ck_assert(fmpz_cmp_si(lo, N) <= 0 && fmpz_cmp_si(hi, N) >= 0);
            if (fmpz_cmp(lo, hi) == 0) tf_assert_narrow(res, 4 - prec / 2, "W Phi");
        }
        ck_assert_msg(ok > 400 && ties > 0, "%ld values, %ld ties", ok, ties);
        fmpq_clear(V); fmpq_clear(ex);
        arb_clear(Vb); arb_clear(res);
        fmpz_clear(lo); fmpz_clear(hi);
        tf_ctx_clear(&X);
    }
    flint_randclear(rs);
}
END_TEST

/* a layout with insertions: W Phi(V) = S(N) - N V from the sorted reference */
START_TEST(test_phi_insertions)
{
    flint_rand_t rs;
    flint_randinit(rs);
    for (int p = 0; p < 2; p++) {
        slong prec = tf_precs[p], n = 20000;
        tf_ctx X;
        tf_ctx_init(&X, TF_BUMP, n, 1, prec);
        actx *c = &X.c;
        ck_assert(c->nins > 0);
        tf_ref R;
        tf_ref_init(&R, TF_BUMP, n, c->prec + 64);
        arb_t V, res, ex;
        fmpz_t lo, hi;
        arb_init(V); arb_init(res); arb_init(ex);
        fmpz_init(lo); fmpz_init(hi);
        long ok = 0;
        for (int rep = 0; rep < 400; rep++) {
            /* between two neighbouring sorted weights, or at a head weight's value */
            slong k = tf_rand_in(rs, 1, n - 1);
            if (rep % 4 == 0)
                k = fmpz_get_si(c->ins_pos + n_randint(rs, (ulong) c->nins));
            arb_add(V, R.w + k, R.w + k + 1, R.prec);
            arb_mul_2exp_si(V, V, -1);
            arb_set_arf(V, arb_midref(V));
            if (!arb_gt(R.w + k, V) || !arb_lt(R.w + k + 1, V)) continue;
            int st = _embz_an_phi_wn(res, lo, hi, c, V, c->prec);
            if (st != EMBZ_OK) continue;
            ok++;
            arb_mul_si(ex, V, k, R.prec);
            arb_sub(ex, R.S + k, ex, R.prec);
            ck_assert_msg(arb_overlaps(res, ex), "W Phi between positions %ld and %ld", k, k + 1);
            ck_assert(fmpz_cmp_si(lo, k) <= 0 && fmpz_cmp_si(hi, k) >= 0);
        }
        ck_assert(ok > 300);
        arb_clear(V); arb_clear(res); arb_clear(ex);
        fmpz_clear(lo); fmpz_clear(hi);
        tf_ref_clear(&R);
        tf_ctx_clear(&X);
    }
    flint_randclear(rs);
}
END_TEST

/* W F at points, and the interval bounds, against the exact values of 1/i */
START_TEST(test_form_inverse)
{
    flint_rand_t rs;
    flint_randinit(rs);
    for (int p = 0; p < 2; p++) {
        slong prec = tf_precs[p], n = 2000;
        tf_ctx X;
        tf_ctx_init(&X, TF_INVERSE, n, 1, prec);
        actx *c = &X.c;
        embz_target_t tq;
        embz_target_init(tq);
        fmpq_t V1, V2, t, ex;
        arb_t A, B, res;
        arf_t U, lo;
        fmpq_init(V1); fmpq_init(V2); fmpq_init(t); fmpq_init(ex);
        arb_init(A); arb_init(B); arb_init(res);
        arf_init(U); arf_init(lo);
        long pts = 0, ivs = 0, b2 = 0;
        for (int rep = 0; rep < 150; rep++) {
            random_target(tq, rs);
            th_target q;
            _embz_an_th_target_init(&q, tq);
            th_end e, ea, eb;
            _embz_an_th_end_init(&e, &q); _embz_an_th_end_init(&ea, &q);
            _embz_an_th_end_init(&eb, &q);
            /* a point */
            random_V(V1, rs, n);
            arb_set_fmpq(A, V1, c->prec);
            if (_embz_an_threshold_f(res, &e, c, &q, A, A, c->prec) == EMBZ_OK) {
                slong N0, N1;
                f_exact(ex, &N0, &N1, n, &q, V1);
                check_exact(ex, res, c->prec, "W F(V)");
                /* the same value kept with the end's counts */
                ck_assert_int_eq(_embz_an_th_end_eval(&e, c, &q, A, c->prec), EMBZ_OK);
                ck_assert(e.ok);
                check_exact(ex, e.F, c->prec, "th_end W F(V)");
                ck_assert(fmpz_cmp_si(e.n, N0) <= 0 && fmpz_cmp_si(e.n + 1, N0) >= 0);
                ck_assert(fmpz_cmp_si(e.n + 2, N1) <= 0 && fmpz_cmp_si(e.n + 3, N1) >= 0);
                pts++;
            }
            /* an interval [V1, V2] with V2 / V1 up to 2^8, as dyadic balls */
            random_V(V1, rs, n);
            fmpq_mul_2exp(V2, V1, 1 + n_randint(rs, 8));
            fmpz_add_ui(fmpq_numref(V2), fmpq_numref(V2), 1);
            fmpq_canonicalise(V2);
            arb_set_fmpq(A, V1, c->prec);
            arb_set_fmpq(B, V2, c->prec);
            if (!arb_is_exact(A) || !arb_is_exact(B)) goto next;
            int s1 = _embz_an_threshold_f(res, NULL, c, &q, A, B, c->prec);
            int s2 = _embz_an_threshold_bound2(U, c, &q, A, B, &ea, &eb, c->prec);
            if (s1 == EMBZ_OK) ivs++;
            if (s2 == EMBZ_OK) b2++;
            for (int k = 0; k <= 20; k++) {
                /* t = V1 + (V2 - V1) k / 20 */
                fmpq_t w;
                fmpq_init(w);
                fmpq_set_si(w, k, 20);
                fmpq_sub(t, V2, V1);
                fmpq_mul(t, t, w);
                fmpq_add(t, t, V1);
                fmpq_clear(w);
                slong N0, N1;
                f_exact(ex, &N0, &N1, n, &q, t);
                arb_set_fmpq(A, ex, c->prec + 64);
                arb_get_lbound_arf(lo, A, c->prec + 64);
                if (s1 == EMBZ_OK) {
                    arb_get_ubound_arf(U, res, c->prec);
                    ck_assert_msg(arf_cmp(lo, U) <= 0, "first-order bound below W F");
                }
                if (s2 == EMBZ_OK) {
                    arf_t U2;
                    arf_init(U2);
                    arb_set_fmpq(B, V2, c->prec);
                    arb_set_fmpq(A, V1, c->prec);
                    ck_assert_int_eq(_embz_an_threshold_bound2(U2, c, &q, A, B, &ea, &eb,
                                                               c->prec), EMBZ_OK);
                    ck_assert_msg(arf_cmp(lo, U2) <= 0, "second-order bound below W F");
                    arf_clear(U2);
                }
            }
        next:
            _embz_an_th_end_clear(&e); _embz_an_th_end_clear(&ea); _embz_an_th_end_clear(&eb);
            _embz_an_th_target_clear(&q);
        }
        ck_assert(pts > 100 && ivs > 100 && b2 > 100);
        embz_target_clear(tq);
        fmpq_clear(V1); fmpq_clear(V2); fmpq_clear(t); fmpq_clear(ex);
        arb_clear(A); arb_clear(B); arb_clear(res);
        arf_clear(U); arf_clear(lo);
        tf_ctx_clear(&X);
    }
    flint_randclear(rs);
}
END_TEST

/* max_t F(t) = K(p -> p (x) q) for the explicit vector p of 1/i */
START_TEST(test_form_is_K)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const slong n = 300;
    embz_qvec_t pv, qv, r;
    embz_qvec_init(pv); embz_qvec_init(qv); embz_qvec_init(r);
    fmpq_t H, K;
    fmpq_init(H); fmpq_init(K);
    arith_harmonic_number(H, (ulong) n);
    tu_qvec_alloc(pv, n);
    for (slong i = 0; i < n; i++) {
        fmpq_set_si(pv->p + i, 1, (ulong) (i + 1));
        fmpq_div(pv->p + i, pv->p + i, H);
    }
    for (int pi = 0; pi < 2; pi++) {
        slong prec = tf_precs[pi];
        tf_ctx X;
        tf_ctx_init(&X, TF_INVERSE, n, 1, prec);
        actx *c = &X.c;
        embz_target_t tq;
        embz_target_init(tq);
        for (int rep = 0; rep < 6; rep++) {
            random_target(tq, rs);
            th_target q;
            _embz_an_th_target_init(&q, tq);
            /* the exact K */
            if (tq->kind == EMBZ_TARGET_UNIFORM) {
                tu_qvec_alloc(qv, (long) tq->d);
                for (ulong j = 0; j < tq->d; j++) fmpq_set_si(qv->p + j, 1, tq->d);
            } else {
                tu_qvec_alloc(qv, tq->q->len);
                for (long j = 0; j < tq->q->len; j++) fmpq_set(qv->p + j, tq->q->p + j);
            }
            tu_qvec_tensor(r, pv, qv);
            embz_qvec_distance(K, NULL, pv, r);
            /* the largest W F next to the corners V = w_i and V = q_j w_i (relative offsets
             * of 2^-40 on either side); F has slope at most n per unit of V */
            arb_t V, f, best;
            arf_t hi;
            arb_init(V); arb_init(f); arb_init(best);
            arf_init(hi);
            arf_neg_inf(hi);
            arb_neg_inf(best);
            for (slong i = 1; i <= n; i++)
                for (slong j = -1; j < q.len; j++) {
                    arb_set_ui(V, 1);
                    arb_div_ui(V, V, (ulong) i, c->prec);
                    if (j >= 0) {
                        arb_t qq;
                        arb_init(qq);
                        arb_set_fmpq(qq, q.v + j, c->prec);
                        arb_mul(V, V, qq, c->prec);
                        arb_clear(qq);
                    }
                    arb_set_arf(V, arb_midref(V));
                    for (int side = -1; side <= 1; side += 2) {
                        arb_t Vs;
                        arb_init(Vs);
                        arb_set(Vs, V);
                        _embz_an_nudge(Vs, side, c->prec);
                        if (_embz_an_threshold_f(f, NULL, c, &q, Vs, Vs, c->prec) == EMBZ_OK) {
                            arf_t u;
                            arf_init(u);
                            arb_get_ubound_arf(u, f, c->prec);
                            if (arf_cmp(u, hi) > 0) arf_set(hi, u);
                            arb_get_lbound_arf(u, f, c->prec);
                            if (arf_cmp(u, arb_midref(best)) > 0) arb_set_arf(best, u);
                            arf_clear(u);
                        }
                        arb_clear(Vs);
                    }
                }
            /* in units of p: divide by W = H_n */
            arb_t Wb, Kb, slack;
            arb_init(Wb); arb_init(Kb); arb_init(slack);
            arb_set_fmpq(Wb, H, c->prec + 64);
            arb_set_fmpq(Kb, K, c->prec + 64);
            arb_mul(Kb, Kb, Wb, c->prec + 64);          /* W K */
            /* no value above W K */
            ck_assert_msg(!arb_gt(best, Kb), "a value of F above K");
            /* and one within n 2^-39 of it (the offsets times the slope, V <= 1) */
            arb_set_arf(f, hi);
            arb_one(slack);
            arb_mul_2exp_si(slack, slack, -39);
            arb_mul_ui(slack, slack, (ulong) n, c->prec);
            arb_add(f, f, slack, c->prec);
            ck_assert_msg(!arb_lt(f, Kb), "max F below K (%s)", tq->label);
            arb_clear(Wb); arb_clear(Kb); arb_clear(slack);
            arb_clear(V); arb_clear(f); arb_clear(best);
            arf_clear(hi);
            _embz_an_th_target_clear(&q);
        }
        embz_target_clear(tq);
        tf_ctx_clear(&X);
    }
    fmpq_clear(H); fmpq_clear(K);
    embz_qvec_clear(pv); embz_qvec_clear(qv); embz_qvec_clear(r);
    flint_randclear(rs);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("error-threshold");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_phi_inverse);
    tcase_add_test(tc, test_phi_insertions);
    tcase_add_test(tc, test_form_inverse);
    tcase_add_test(tc, test_form_is_K);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
