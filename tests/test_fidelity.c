/* Tests for the fidelity-type measures (src/measure/fidelity*.c): the optimal LOCC fidelity
 * F_max, the purified distance P = sqrt(1 - F_max), the local-unitary overlap, for exact vectors
 * and for families. */
#include <check.h>
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include "embz.h"
#include "testutil.h"

/* ------------------------------------------------------------------ helpers */

/* Random probability vector of length len with entries k / sum, k in [lo, 30]. */
static void random_qvec(embz_qvec_t v, flint_rand_t state, long len, int lo)
{
    tu_qvec_alloc(v, len);
    fmpz_t s;
    fmpz_init(s);
    for (long k = 0; k < len; k++) {
        long x = lo + (long) n_randint(state, (ulong) (31 - lo));
        if (n_randint(state, 4) == 0) x = k > 0 ? fmpz_get_si(fmpq_numref(v->p + k - 1)) : x;
        fmpq_set_si(v->p + k, x, 1);
        fmpz_add(s, s, fmpq_numref(v->p + k));
    }
    if (fmpz_is_zero(s)) { fmpq_one(v->p); fmpz_one(s); }
    for (long k = 0; k < len; k++) fmpq_div_fmpz(v->p + k, v->p + k, s);
    fmpz_clear(s);
}

static int dcmp_desc(const void *a, const void *b)
{
    double x = *(const double *) a, y = *(const double *) b;
    return (x < y) - (x > y);
}

static void qvec_sorted_d(double *out, const embz_qvec_t v, long L)
{
    for (long k = 0; k < L; k++) out[k] = k < v->len ? fmpq_get_d(v->p + k) : 0.0;
    qsort(out, (size_t) L, sizeof(double), dcmp_desc);
}

/* ---------------------------------------------------------- independent numerical search
 * maximise f(s) = sum_i sqrt(r_i s_i) over s >= 0, sum s = 1, S_k >= P_k (k < n), where P_k are
 * the sorted partial sums of p. Dropping the order of s loses nothing (sorting s keeps it
 * feasible and, by rearrangement, does not lower f). Log-barrier method with Newton steps in
 * the variables y = (s_1, ..., s_{n-1}); p must have positive entries (strict interior).
 * Returns the objective at the final (strictly feasible) point, squared. */
static int solve_lin(double *A, double *b, int m)
{
    for (int c = 0; c < m; c++) {
        int piv = c;
        for (int r = c + 1; r < m; r++) if (fabs(A[r * m + c]) > fabs(A[piv * m + c])) piv = r;
        if (A[piv * m + c] == 0) return 0;
        if (piv != c) {
            for (int k = 0; k < m; k++) { double t = A[c * m + k]; A[c * m + k] = A[piv * m + k]; A[piv * m + k] = t; }
            double t = b[c]; b[c] = b[piv]; b[piv] = t;
        }
        for (int r = c + 1; r < m; r++) {
            double f = A[r * m + c] / A[c * m + c];
            for (int k = c; k < m; k++) A[r * m + k] -= f * A[c * m + k];
            b[r] -= f * b[c];
        }
    }
    for (int c = m - 1; c >= 0; c--) {
        for (int k = c + 1; k < m; k++) b[c] -= A[c * m + k] * b[k];
        b[c] /= A[c * m + c];
    }
    return 1;
}

/* barrier objective; -inf outside */
static double barrier_val(const double *y, int n, const double *r, const double *P, double t)
{
    double sn = 1.0, v = 0.0, S = 0.0;
    for (int j = 0; j < n - 1; j++) {
        if (y[j] <= 0) return -INFINITY;
        sn -= y[j];
        v += t * sqrt(r[j] * y[j]) + log(y[j]);
        S += y[j];
        if (S - P[j] <= 0) return -INFINITY;
        v += log(S - P[j]);
    }
    if (sn <= 0) return -INFINITY;
    return v + t * sqrt(r[n - 1] * sn) + log(sn);
}

static double brute_fmax(const double *p, const double *r, int n)
{
    double P[8], y[8], g[8], H[64], s0[8];
    double acc = 0;
    for (int k = 0; k < n; k++) { acc += p[k]; P[k] = acc; }
    /* start: (1 - lambda) p + lambda e_1 */
    for (int k = 0; k < n; k++) s0[k] = 0.9 * p[k] + (k == 0 ? 0.1 : 0.0);
    for (int j = 0; j < n - 1; j++) y[j] = s0[j];
    int m = n - 1;
    for (double t = 1.0; t <= 1e13; t *= 8.0) {
        for (int it = 0; it < 100; it++) {
            double sn = 1.0;
            for (int j = 0; j < m; j++) sn -= y[j];
            memset(H, 0, sizeof(H));
            double gn = -t * sqrt(r[n - 1]) / (2 * sqrt(sn)) - 1.0 / sn;
            double hn = -t * sqrt(r[n - 1]) / (4 * sn * sqrt(sn)) - 1.0 / (sn * sn);
            for (int j = 0; j < m; j++) {
                g[j] = t * sqrt(r[j]) / (2 * sqrt(y[j])) + 1.0 / y[j] + gn;
                for (int k = 0; k < m; k++) H[j * m + k] = hn;
                H[j * m + j] += -t * sqrt(r[j]) / (4 * y[j] * sqrt(y[j])) - 1.0 / (y[j] * y[j]);
            }
            double S = 0;
            for (int k = 0; k < m; k++) {
                S += y[k];
                double sl = S - P[k];
                for (int j = 0; j <= k; j++) {
                    g[j] += 1.0 / sl;
                    for (int l = 0; l <= k; l++) H[j * m + l] -= 1.0 / (sl * sl);
                }
            }
            /* Newton direction d = -H^-1 g */
            double d[8], gg[8];
            for (int j = 0; j < m; j++) d[j] = -g[j], gg[j] = g[j];
            if (!solve_lin(H, d, m)) break;
            double dec = 0;
            for (int j = 0; j < m; j++) dec += gg[j] * d[j];
            if (dec < 1e-14) break;
            double f0 = barrier_val(y, n, r, P, t), step = 1.0, yn[8];
            for (int ls = 0; ls < 60; ls++, step *= 0.5) {
                for (int j = 0; j < m; j++) yn[j] = y[j] + step * d[j];
                if (barrier_val(yn, n, r, P, t) >= f0 + 0.25 * step * dec) break;
            }
            if (barrier_val(yn, n, r, P, t) < f0) break;
            memcpy(y, yn, sizeof(double) * (size_t) m);
        }
    }
    double sn = 1.0, f = 0;
    for (int j = 0; j < m; j++) { sn -= y[j]; f += sqrt(r[j] * y[j]); }
    f += sqrt(r[n - 1] * sn);
    return f * f;
}

/* ------------------------------------------------------------------ tests */

/* The constructed optimum is feasible (checked exactly) and no worse than an independent
 * numerical search over {s majorizing p}, on thousands of random pairs, n = 2..6. */
START_TEST(test_brute_force)
{
    flint_rand_t state;
    flint_randinit(state);
    embz_qvec_t p, r, s;
    embz_qvec_init(p); embz_qvec_init(r); embz_qvec_init(s);
    arb_t F, Fs;
    arb_init(F); arb_init(Fs);
    fmpq_t sum;
    fmpq_init(sum);
    double worst = 0, worst_search = 0;
    int trials = 0;
    for (int iter = 0; iter < 3000; iter++) {
        int n = 2 + (int) n_randint(state, 5);
        random_qvec(p, state, n, 1);                               /* positive entries */
        random_qvec(r, state, n, n_randint(state, 3) == 0 ? 0 : 1);  /* zeros allowed */
        slong nb = 0;
        embz_qvec_fidelity(F, s, &nb, p, r, 128);
        /* exact feasibility: s is a sorted probability vector majorizing p */
        ck_assert(embz_qvec_convertible(p, s));
        fmpq_zero(sum);
        for (long k = 0; k < s->len; k++) {
            ck_assert(fmpq_sgn(s->p + k) >= 0);
            if (k) ck_assert(fmpq_cmp(s->p + k - 1, s->p + k) >= 0);
            fmpq_add(sum, sum, s->p + k);
        }
        ck_assert(fmpq_is_one(sum));
        /* F is the fidelity of s with r (overlap of sorted vectors, squared) */
        embz_qvec_overlap(Fs, s, r, 128);
        arb_sqr(Fs, Fs, 128);
        ck_assert_msg(arb_overlaps(F, Fs), "F does not match its optimal output");
        ck_assert(arb_rel_accuracy_bits(F) > 100);
        double pd[8], rd[8];
        qvec_sorted_d(pd, p, n);
        qvec_sorted_d(rd, r, n);
        double b = brute_fmax(pd, rd, n);
        double f = arf_get_d(arb_midref(F), ARF_RND_NEAR);
        ck_assert_msg(f >= b - 1e-9, "n = %d: constructed %.15g < search %.15g", n, f, b);
        if (b - f > worst) worst = b - f;
        if (f - b > worst_search) worst_search = f - b;
        trials++;
    }
    /* the search itself must be effective, otherwise the comparison above says little */
    ck_assert_msg(worst_search < 1e-6, "numerical search far from optimum: %g", worst_search);
    ck_assert(trials == 3000);
    fmpq_clear(sum);
    arb_clear(F); arb_clear(Fs);
    embz_qvec_clear(p); embz_qvec_clear(r); embz_qvec_clear(s);
    flint_randclear(state);
}
END_TEST

/* Two-level closed form [derived]: for sorted p = (p1, p2), r = (r1, r2): F_max = 1 when
 * p1 <= r1 (Nielsen), else the best output is p itself, F_max = (sqrt(p1 r1) + sqrt(p2 r2))^2. */
START_TEST(test_two_level)
{
    embz_qvec_t p, r;
    embz_qvec_init(p); embz_qvec_init(r);
    arb_t F, ref, t;
    arb_init(F); arb_init(ref); arb_init(t);
    tu_qvec_set(p, "0.8,0.2");
    tu_qvec_set(r, "0.6,0.4");
    embz_qvec_fidelity(F, NULL, NULL, p, r, 128);
    arb_set_ui(ref, 48); arb_div_ui(ref, ref, 100, 128); arb_sqrt(ref, ref, 128);
    arb_set_ui(t, 8); arb_div_ui(t, t, 100, 128); arb_sqrt(t, t, 128);
    arb_add(ref, ref, t, 128);
    arb_sqr(ref, ref, 128);
    ck_assert(arb_overlaps(F, ref));
    tu_qvec_set(p, "0.5,0.5");
    embz_qvec_fidelity(F, NULL, NULL, p, r, 128);
    ck_assert(arb_is_one(F));
    arb_clear(F); arb_clear(ref); arb_clear(t);
    embz_qvec_clear(p); embz_qvec_clear(r);
}
END_TEST

/* Catalysis, Jonathan and Plenio, Phys. Rev. Lett. 83, 3566 (1999): (0.4,0.4,0.1,0.1) cannot be
 * turned into (0.5,0.25,0.25,0) exactly, but with the catalyst (0.6,0.4) on both sides it can. */
START_TEST(test_catalysis)
{
    embz_qvec_t p, r, c, pc, rc, s;
    embz_qvec_init(p); embz_qvec_init(r); embz_qvec_init(c);
    embz_qvec_init(pc); embz_qvec_init(rc); embz_qvec_init(s);
    arb_t F, P, one;
    arb_init(F); arb_init(P); arb_init(one);
    arb_one(one);
    tu_qvec_set(p, "0.4,0.4,0.1,0.1");
    tu_qvec_set(r, "0.5,0.25,0.25,0");
    tu_qvec_set(c, "0.6,0.4");
    embz_qvec_fidelity(F, NULL, NULL, p, r, 128);
    ck_assert(arb_lt(F, one));
    embz_qvec_purified(P, p, r, 128);
    ck_assert(arb_is_positive(P));
    tu_qvec_tensor(pc, p, c);
    tu_qvec_tensor(rc, r, c);
    slong nb = 0;
    embz_qvec_fidelity(F, s, &nb, pc, rc, 128);
    ck_assert(arb_is_one(F));
    ck_assert(nb == 1);
    embz_qvec_purified(P, pc, rc, 128);
    ck_assert(arb_is_zero(P));
    ck_assert(embz_qvec_convertible(pc, rc));
    arb_clear(F); arb_clear(P); arb_clear(one);
    embz_qvec_clear(p); embz_qvec_clear(r); embz_qvec_clear(c);
    embz_qvec_clear(pc); embz_qvec_clear(rc); embz_qvec_clear(s);
}
END_TEST

/* K <= P <= sqrt(K (2 - K)) [derived in docs/measures.md], O^2 <= F_max, and F_max = 1 exactly
 * iff K = 0, on thousands of random pairs of random lengths (with zeros). */
START_TEST(test_relations)
{
    flint_rand_t state;
    flint_randinit(state);
    embz_qvec_t p, r;
    embz_qvec_init(p); embz_qvec_init(r);
    arb_t F, P, O, Kb, up, t;
    arb_init(F); arb_init(P); arb_init(O); arb_init(Kb); arb_init(up); arb_init(t);
    fmpq_t K;
    fmpq_init(K);
    int strict = 0;
    for (int iter = 0; iter < 4000; iter++) {
        random_qvec(p, state, 1 + (long) n_randint(state, 9), 0);
        random_qvec(r, state, 1 + (long) n_randint(state, 9), 0);
        embz_qvec_distance(K, NULL, p, r);
        embz_qvec_fidelity(F, NULL, NULL, p, r, 128);
        embz_qvec_purified(P, p, r, 128);
        embz_qvec_overlap(O, p, r, 128);
        arb_set_fmpq(Kb, K, 128);
        /* up = sqrt(K (2 - K)) */
        arb_sub_ui(t, Kb, 2, 128);
        arb_mul(t, t, Kb, 128);
        arb_neg(t, t);
        arb_sqrtpos(up, t, 128);
        ck_assert_msg(!arb_lt(P, Kb), "P < K");
        ck_assert_msg(!arb_gt(P, up), "P > sqrt(K(2-K))");
        /* with the balls' midpoints and a small margin as well */
        double Pd = arf_get_d(arb_midref(P), ARF_RND_NEAR), Kd = fmpq_get_d(K);
        ck_assert(Pd >= Kd - 1e-12 && Pd <= sqrt(Kd * (2 - Kd)) + 1e-12);
        arb_sqr(t, O, 128);
        ck_assert_msg(!arb_gt(t, F), "overlap above F_max");
        if (fmpq_is_zero(K)) ck_assert(arb_is_one(F));
        else { arb_one(t); ck_assert(arb_lt(F, t)); }
        if (!fmpq_is_zero(K) && Pd > Kd + 1e-6) strict++;
    }
    ck_assert(strict > 100);   /* the relation is not trivially tight on the sample */
    fmpq_clear(K);
    arb_clear(F); arb_clear(P); arb_clear(O); arb_clear(Kb); arb_clear(up); arb_clear(t);
    embz_qvec_clear(p); embz_qvec_clear(r);
    flint_randclear(state);
}
END_TEST

/* ------------------------------------------------------------------ families */

static void family_set(embz_family_t f, const char *spec)
{
    embz_err_t err;
    embz_err_clear(&err);
    ck_assert_msg(embz_family_resolve(f, spec, NULL, 0, 0, &err) == EMBZ_OK, "%s: %s", spec,
                  err.text);
}

/* Exact rational Schmidt vector of the inverse-index family, p_i = (1/i) / H_n. */
static void inverse_qvec(embz_qvec_t v, long n)
{
    tu_qvec_alloc(v, n);
    fmpq_t H;
    fmpq_init(H);
    for (long i = 1; i <= n; i++) {
        fmpq_set_si(v->p + i - 1, 1, i);
        fmpq_add(H, H, v->p + i - 1);
    }
    for (long i = 0; i < n; i++) fmpq_div(v->p + i, v->p + i, H);
    fmpq_clear(H);
}

/* Family values at explicit n against an independent exact computation on the rational
 * vector (no rounding) and, for the overlap, a direct double-precision sum. */
START_TEST(test_family_values)
{
    embz_family_t f;
    embz_family_init(f);
    family_set(f, "1/i");
    embz_target_t q;
    embz_target_init(q);
    embz_qvec_t p, qv, r;
    embz_qvec_init(p); embz_qvec_init(qv); embz_qvec_init(r);
    embz_fidelity_result_t res;
    embz_fidelity_result_init(res);
    arb_t F, O;
    arb_init(F); arb_init(O);
    fmpz_t n;
    fmpz_init(n);
    embz_err_t err;
    const char *targets[] = { "ebit", "uniform:3", "0.5,0.3,0.2", "0.7,0.2,0.1" };
    const char *qvecs[] = { "1/2,1/2", "1/3,1/3,1/3", "0.5,0.3,0.2", "0.7,0.2,0.1" };
    long sizes[] = { 1, 2, 5, 17, 64, 200 };
    for (int ti = 0; ti < 4; ti++) {
        tu_target_set(q, targets[ti]);
        tu_qvec_set(qv, qvecs[ti]);
        for (int si = 0; si < 6; si++) {
            long nn = sizes[si];
            fmpz_set_si(n, nn);
            inverse_qvec(p, nn);
            tu_qvec_tensor(r, p, qv);
            embz_qvec_fidelity(F, NULL, NULL, p, r, 128);
            embz_qvec_overlap(O, p, r, 128);
            embz_err_clear(&err);
            ck_assert(embz_fidelity_explicit(res, f, n, q, EMBZ_MEASURE_FIDELITY, 128, &err)
                      == EMBZ_OK);
            ck_assert_msg(arb_overlaps(res->value, F), "F, %s, n = %ld", targets[ti], nn);
            ck_assert(!res->bounds_only);
            ck_assert(arb_rel_accuracy_bits(res->value) > 50);
            ck_assert(embz_fidelity_explicit(res, f, n, q, EMBZ_MEASURE_OVERLAP, 128, &err)
                      == EMBZ_OK);
            ck_assert_msg(arb_overlaps(res->overlap, O), "O, %s, n = %ld", targets[ti], nn);
            arb_sqr(O, O, 128);
            ck_assert(arb_overlaps(res->value, O));
            /* direct double computation of the overlap */
            double *pd = malloc(sizeof(double) * (size_t) nn);
            double *rd = malloc(sizeof(double) * (size_t) (nn * qv->len));
            qvec_sorted_d(pd, p, nn);
            qvec_sorted_d(rd, r, nn * qv->len);
            double o = 0;
            for (long k = 0; k < nn; k++) o += sqrt(pd[k] * rd[k]);
            ck_assert(fabs(o - arf_get_d(arb_midref(res->overlap), ARF_RND_NEAR)) < 1e-12);
            free(pd); free(rd);
        }
    }
    /* small sizes against the numerical search: s majorizing p (length n, zero padded) lives
     * on the first n entries, so the search runs over n entries against the n largest of r */
    tu_target_set(q, "ebit");
    for (long nn = 2; nn <= 8; nn++) {
        fmpz_set_si(n, nn);
        inverse_qvec(p, nn);
        double pd[8], rd[8];
        qvec_sorted_d(pd, p, nn);
        for (long k = 0; k < nn; k++) rd[k] = pd[k / 2] / 2;
        double b = brute_fmax(pd, rd, (int) nn);
        ck_assert(embz_fidelity_explicit(res, f, n, q, EMBZ_MEASURE_FIDELITY, 128, &err)
                  == EMBZ_OK);
        double v = arf_get_d(arb_midref(res->value), ARF_RND_NEAR);
        ck_assert_msg(v >= b - 1e-9 && v <= b + 1e-6, "n = %ld: %.15g vs %.15g", nn, v, b);
    }
    fmpz_clear(n);
    arb_clear(F); arb_clear(O);
    embz_fidelity_result_clear(res);
    embz_qvec_clear(p); embz_qvec_clear(qv); embz_qvec_clear(r);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

/* Irrational weights: two precisions give overlapping enclosures, the higher one narrower;
 * the purified distance matches the fidelity. */
START_TEST(test_family_precision)
{
    embz_family_t f;
    embz_family_init(f);
    family_set(f, "1/sqrt(i) + 1/(i*log(i+1))");
    embz_target_t q;
    embz_target_init(q);
    embz_fidelity_result_t a, b;
    embz_fidelity_result_init(a);
    embz_fidelity_result_init(b);
    fmpz_t n;
    fmpz_init(n);
    fmpz_set_si(n, 3000);
    embz_err_t err;
    embz_err_clear(&err);
    ck_assert(embz_fidelity_explicit(a, f, n, q, EMBZ_MEASURE_PURIFIED, 64, &err) == EMBZ_OK);
    ck_assert(embz_fidelity_explicit(b, f, n, q, EMBZ_MEASURE_PURIFIED, 200, &err) == EMBZ_OK);
    ck_assert(arb_overlaps(a->value, b->value));
    ck_assert(arb_rel_accuracy_bits(b->value) > arb_rel_accuracy_bits(a->value) + 40);
    arb_t t;
    arb_init(t);
    arb_sqr(t, b->purified, 200);
    arb_add(t, t, b->fidelity, 200);
    ck_assert(arb_contains_si(t, 1));
    arb_clear(t);
    fmpz_clear(n);
    embz_fidelity_result_clear(a);
    embz_fidelity_result_clear(b);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

/* Bounds from K: the explicit value lies inside them, and they are flagged. At large n the
 * inverse family gets values (the LOCC fidelity bounds of fmax.c are tight) inside the
 * bracket from K, logpower bounds only with tighter ones inside the bracket; the overlap is
 * a value there for uniform targets and refused for target vectors. */
START_TEST(test_family_bounds)
{
    embz_family_t f;
    embz_family_init(f);
    family_set(f, "1/i");
    embz_target_t q;
    embz_target_init(q);
    embz_fidelity_result_t v, b;
    embz_fidelity_result_init(v);
    embz_fidelity_result_init(b);
    fmpz_t n;
    fmpz_init(n);
    embz_err_t err;
    embz_err_clear(&err);
    for (int m = EMBZ_MEASURE_FIDELITY; m <= EMBZ_MEASURE_PURIFIED; m++) {
        fmpz_set_si(n, 5000);
        ck_assert(embz_fidelity(v, f, n, q, m, EMBZ_METHOD_AUTO, 128, &err) == EMBZ_OK);
        ck_assert(!v->bounds_only);
        ck_assert(embz_fidelity(b, f, n, q, m, EMBZ_METHOD_ANALYTIC, 128, &err) == EMBZ_OK);
        /* forced past explicit sizes: an analytic value or bounds, with the explicit value */
        if (b->bounds_only) ck_assert(arb_contains(b->value, v->value));
        else ck_assert(b->how.analytic == 2 && arb_overlaps(b->value, v->value));
        ck_assert(!arb_lt(b->upper, b->lower));
        fmpz_set_str(n, "1000000000000000000000000000000", 10);
        ck_assert(embz_fidelity(b, f, n, q, m, EMBZ_METHOD_AUTO, 128, &err) == EMBZ_OK);
        /* a value at 10^30 (fmax.c), inside the bracket from K = ln 2 / (ln n + gamma)
         * roughly 0.0099: P between about 0.0099 and 0.14 */
        ck_assert(!b->bounds_only && b->how.analytic == 2);
        ck_assert(arb_is_finite(b->value));
        ck_assert(arb_rel_accuracy_bits(b->purified) > 30);
        embz_error_result_t e;
        embz_error_result_init(e);
        ck_assert(embz_error(e, f, n, q, EMBZ_METHOD_AUTO, 128, &err) == EMBZ_OK);
        arb_t t;
        arb_init(t);
        ck_assert(arb_ge(b->purified, e->error));        /* K <= P */
        arb_sub_ui(t, e->error, 2, 128);
        arb_mul(t, t, e->error, 128);
        arb_neg(t, t);
        arb_sqrt(t, t, 128);
        ck_assert(arb_le(b->purified, t));               /* P <= sqrt(K (2 - K)) */
        arb_clear(t);
        embz_error_result_clear(e);
    }
    /* bounds only where the LOCC bounds stay wide (1/(i log(i+1)^(1/2))), then tighter ones
     * inside the bracket from K */
    {
        embz_family_t g;
        embz_family_init(g);
        family_set(g, "logpower");
        ck_assert(embz_fidelity(b, g, n, q, EMBZ_MEASURE_PURIFIED, EMBZ_METHOD_AUTO, 128, &err)
                  == EMBZ_OK);
        ck_assert(b->bounds_only && b->have_tight);
        ck_assert(arb_le(b->lower, b->tight_lo) && arb_le(b->tight_hi, b->upper));
        ck_assert(arb_le(b->tight_lo, b->tight_hi));
        /* much tighter: a few per cent against a factor of 7 */
        arb_t t;
        arb_init(t);
        arb_div(t, b->tight_hi, b->tight_lo, 64);
        ck_assert(arf_cmp_d(arb_midref(t), 1.05) < 0);
        arb_clear(t);
        embz_family_clear(g);
    }
    /* the overlap has a value there (uniform targets), not bounds */
    ck_assert(embz_fidelity(b, f, n, q, EMBZ_MEASURE_OVERLAP, EMBZ_METHOD_AUTO, 128, &err)
              == EMBZ_OK);
    ck_assert(!b->bounds_only && b->how.analytic);
    tu_target_set(q, "0.7,0.3");
    ck_assert(embz_fidelity(b, f, n, q, EMBZ_MEASURE_OVERLAP, EMBZ_METHOD_AUTO, 128, &err)
              == EMBZ_ERR_UNSUPPORTED);
    tu_target_set(q, "ebit");
    fmpz_set_si(n, EMBZ_FIDELITY_MAX_N + 1);
    ck_assert(embz_fidelity_explicit(b, f, n, q, EMBZ_MEASURE_FIDELITY, 128, &err)
              == EMBZ_ERR_LIMIT);
    fmpz_clear(n);
    embz_fidelity_result_clear(v);
    embz_fidelity_result_clear(b);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

/* van Dam and Hayden, Phys. Rev. A 67, 060302 (2003): the inverse-index state of size n
 * embezzles a d-level maximally entangled state with local unitaries alone at fidelity
 * >= 1 - log d / log n [form as recalled in the project notes]. The check uses the fidelity
 * convention |<a|b>| (the overlap O itself, not squared). The squared form O^2 >= ... does NOT
 * hold for all n (it fails e.g. for d = 2, n = 1000), so the recalled form can only be the
 * unsquared one. */
START_TEST(test_van_dam_hayden)
{
    embz_family_t f;
    embz_family_init(f);
    family_set(f, "1/i");
    embz_target_t q;
    embz_target_init(q);
    embz_fidelity_result_t res;
    embz_fidelity_result_init(res);
    fmpz_t n;
    fmpz_init(n);
    embz_err_t err;
    embz_err_clear(&err);
    arb_t bound, t;
    arb_init(bound); arb_init(t);
    const char *ds[] = { "ebit", "uniform:3", "uniform:4", "ebits:3", "uniform:16" };
    const long dv[] = { 2, 3, 4, 8, 16 };
    long sizes[] = { 2, 3, 5, 8, 13, 20, 50, 100, 117, 300, 1000, 4096, 20000, 100000 };
    int squared_fails = 0;
    for (int di = 0; di < 5; di++) {
        tu_target_set(q, ds[di]);
        for (int si = 0; si < 14; si++) {
            if (sizes[si] < dv[di]) continue;
            fmpz_set_si(n, sizes[si]);
            ck_assert(embz_fidelity_explicit(res, f, n, q, EMBZ_MEASURE_OVERLAP, 96, &err)
                      == EMBZ_OK);
            /* bound = 1 - log d / log n */
            arb_set_si(t, dv[di]);
            arb_log(bound, t, 96);
            arb_set_si(t, sizes[si]);
            arb_log(t, t, 96);
            arb_div(bound, bound, t, 96);
            arb_sub_ui(bound, bound, 1, 96);
            arb_neg(bound, bound);
            ck_assert_msg(arb_ge(res->overlap, bound), "d = %ld, n = %ld", dv[di], sizes[si]);
            if (arb_lt(res->value, bound)) squared_fails++;
        }
    }
    ck_assert(squared_fails > 0);   /* documents the convention (see above) */
    arb_clear(bound); arb_clear(t);
    fmpz_clear(n);
    embz_fidelity_result_clear(res);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST


static const char *const SHIPPED[] = { "inverse", "power", "logpower", "iterlog", "nearmiss",
                                       "uniform", "geometric", "tilted", "invamp" };
#define NSHIPPED ((int) (sizeof(SHIPPED) / sizeof(SHIPPED[0])))

/* The overlap at large n (the analytic engine, overlap.c) against the explicit certified
 * value (exact rational vector, rounding allowance) at n = 10^3 .. 2^20, for every shipped
 * family with a weight (the level family qubitcopies has none) and the targets ebit and
 * uniform:3: the balls overlap and the analytic one is narrower than 1e-25. Also a weight
 * whose head rises before it falls (head weights inserted among the tail weights). */
START_TEST(test_overlap_analytic_explicit)
{
    const char *targets[] = { "ebit", "uniform:3" };
    long sizes[] = { 1000, 30000, 1L << 20 };
    int nsizes = getenv("EMBZ_QUICK") ? 2 : 3;
    embz_family_t f;
    embz_family_init(f);
    embz_target_t q;
    embz_target_init(q);
    embz_fidelity_result_t a, e;
    embz_fidelity_result_init(a);
    embz_fidelity_result_init(e);
    fmpz_t n;
    fmpz_init(n);
    embz_err_t err;
    arb_t tiny;
    arb_init(tiny);
    arb_set_d(tiny, 1e-25);
    for (int fi = 0; fi <= NSHIPPED; fi++) {
        const char *fam = fi < NSHIPPED ? SHIPPED[fi] : "i^0.3*log(log(i+3))*i^(-0.5)";
        family_set(f, fam);
        for (int ti = 0; ti < 2; ti++) {
            tu_target_set(q, targets[ti]);
            for (int si = fi < NSHIPPED ? 0 : 2; si < nsizes; si++) {
                fmpz_set_si(n, sizes[si]);
                embz_err_clear(&err);
                int st = embz_fidelity(a, f, n, q, EMBZ_MEASURE_OVERLAP, EMBZ_METHOD_ANALYTIC,
                                       128, &err);
                ck_assert_msg(st == EMBZ_OK, "%s %s n = %ld: %s", fam, targets[ti], sizes[si],
                              err.text);
                ck_assert(a->how.analytic && !a->bounds_only);
                ck_assert(embz_fidelity_explicit(e, f, n, q, EMBZ_MEASURE_OVERLAP, 128, &err)
                          == EMBZ_OK);
                ck_assert_msg(arb_overlaps(a->overlap, e->overlap), "%s %s n = %ld", fam,
                              targets[ti], sizes[si]);
                ck_assert(arb_overlaps(a->value, e->value));
                arb_t w;
                arb_init(w);
                arb_get_rad_arb(w, a->overlap);
                ck_assert_msg(arb_lt(w, tiny), "%s %s n = %ld: radius too large", fam,
                              targets[ti], sizes[si]);
                arb_clear(w);
            }
        }
    }
    /* the level family has no weight to sum */
    family_set(f, "qubitcopies");
    fmpz_set_str(n, "1000000000000000000000000000000", 10);
    ck_assert(embz_fidelity(a, f, n, q, EMBZ_MEASURE_OVERLAP, EMBZ_METHOD_AUTO, 128, &err)
              != EMBZ_OK);
    arb_clear(tiny);
    fmpz_clear(n);
    embz_fidelity_result_clear(a);
    embz_fidelity_result_clear(e);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

/* Two precisions overlap at n = 10^30 and 10^300, the higher one narrower, for families with
 * different tails (rational, logarithmic, n-dependent, summable). */
START_TEST(test_overlap_precisions)
{
    const char *fams[] = { "inverse", "logpower", "iterlog", "tilted", "nearmiss", "power" };
    embz_family_t f;
    embz_family_init(f);
    embz_target_t q;
    embz_target_init(q);
    embz_fidelity_result_t a, b;
    embz_fidelity_result_init(a);
    embz_fidelity_result_init(b);
    fmpz_t n;
    fmpz_init(n);
    embz_err_t err;
    for (int fi = 0; fi < 6; fi++) {
        family_set(f, fams[fi]);
        for (int ti = 0; ti < 2; ti++) {
            tu_target_set(q, ti ? "uniform:3" : "ebit");
            for (int e = 30; e <= 300; e += 270) {
                fmpz_ui_pow_ui(n, 10, (ulong) e);
                embz_err_clear(&err);
                ck_assert_msg(embz_fidelity(a, f, n, q, EMBZ_MEASURE_OVERLAP, EMBZ_METHOD_AUTO,
                                            64, &err) == EMBZ_OK, "%s: %s", fams[fi], err.text);
                ck_assert_msg(embz_fidelity(b, f, n, q, EMBZ_MEASURE_OVERLAP, EMBZ_METHOD_AUTO,
                                            256, &err) == EMBZ_OK, "%s: %s", fams[fi], err.text);
                ck_assert_msg(arb_overlaps(a->overlap, b->overlap), "%s 10^%d", fams[fi], e);
                ck_assert(arb_overlaps(a->value, b->value));
                ck_assert_msg(arb_rel_accuracy_bits(b->overlap)
                              > arb_rel_accuracy_bits(a->overlap) + 100, "%s 10^%d: %ld, %ld",
                              fams[fi], e, arb_rel_accuracy_bits(a->overlap),
                              arb_rel_accuracy_bits(b->overlap));
            }
        }
    }
    fmpz_clear(n);
    embz_fidelity_result_clear(a);
    embz_fidelity_result_clear(b);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

/* van Dam and Hayden, Phys. Rev. A 67, 060302 (2003), at astronomically large n: the
 * inverse-index overlap satisfies O >= 1 - log d / log n (the unsquared overlap, see
 * test_van_dam_hayden) at n = 10^30, 10^300, 10^1000 and d = 2, 3, 8, 16; the squared form
 * fails at all of these (documents the convention). */
START_TEST(test_van_dam_hayden_large)
{
    embz_family_t f;
    embz_family_init(f);
    family_set(f, "inverse");
    embz_target_t q;
    embz_target_init(q);
    embz_fidelity_result_t res;
    embz_fidelity_result_init(res);
    fmpz_t n;
    fmpz_init(n);
    embz_err_t err;
    arb_t bound, t;
    arb_init(bound); arb_init(t);
    const char *ds[] = { "ebit", "uniform:3", "ebits:3", "uniform:16" };
    const long dv[] = { 2, 3, 8, 16 };
    const ulong es[] = { 30, 300, 1000 };
    for (int di = 0; di < 4; di++) {
        tu_target_set(q, ds[di]);
        for (int ei = 0; ei < 3; ei++) {
            fmpz_ui_pow_ui(n, 10, es[ei]);
            embz_err_clear(&err);
            ck_assert_msg(embz_fidelity(res, f, n, q, EMBZ_MEASURE_OVERLAP, EMBZ_METHOD_AUTO,
                                        128, &err) == EMBZ_OK, "%s", err.text);
            arb_set_si(t, dv[di]);
            arb_log(bound, t, 128);
            arb_log_fmpz(t, n, 128);
            arb_div(bound, bound, t, 128);
            arb_sub_ui(bound, bound, 1, 128);
            arb_neg(bound, bound);
            ck_assert_msg(arb_gt(res->overlap, bound), "d = %ld, n = 10^%lu", dv[di], es[ei]);
            ck_assert_msg(arb_lt(res->value, bound), "squared, d = %ld, n = 10^%lu", dv[di],
                          es[ei]);
        }
    }
    arb_clear(bound); arb_clear(t);
    fmpz_clear(n);
    embz_fidelity_result_clear(res);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST


/* The duality behind the upper bounds of fmax.c [derived in src/error/fmax.c]: for every
 * non-decreasing lambda > 0, sum_i r_i / (4 lambda_i) + lambda_i p_i >= sqrt(F_max(p -> r))
 * (r restricted to the length of p), with equality for lambda_i = 1 / (2 sqrt(s_i / r_i)), s
 * the optimal output of embz_qvec_fidelity. Random rational pairs of lengths 2..8 and random
 * multipliers; a lambda that decreases somewhere may fall below (checked to happen). */
START_TEST(test_fmax_duality)
{
    flint_rand_t state;
    flint_randinit(state);
    embz_qvec_t p, r, s;
    embz_qvec_init(p); embz_qvec_init(r); embz_qvec_init(s);
    arb_t F, D, t, u, lam;
    arb_init(F); arb_init(D); arb_init(t); arb_init(u); arb_init(lam);
    int below = 0;
    for (int it = 0; it < 2000; it++) {
        long len = 2 + (long) n_randint(state, 7);
        random_qvec(p, state, len, 0);
        random_qvec(r, state, len + (long) n_randint(state, 3), 0);
        embz_qvec_sort(p);
        embz_qvec_sort(r);
        embz_qvec_fidelity(F, s, NULL, p, r, 128);
        arb_sqrt(F, F, 128);
        /* the optimal multipliers: equality */
        arb_zero(D);
        int ok = 1;
        for (long i = 0; i < len && i < s->len; i++) {
            if (fmpq_is_zero(r->p + i) || fmpq_is_zero(s->p + i)) { ok = 0; break; }
            arb_set_fmpq(t, s->p + i, 128);
            arb_set_fmpq(u, r->p + i, 128);
            arb_div(lam, t, u, 128);
            arb_sqrt(lam, lam, 128);
            arb_mul_2exp_si(lam, lam, 1);
            arb_inv(lam, lam, 128);                     /* 1 / (2 sqrt(s/r)) */
            arb_div(u, u, lam, 128);
            arb_mul_2exp_si(u, u, -2);
            arb_add(D, D, u, 128);
            arb_set_fmpq(t, p->p + i, 128);
            arb_mul(t, t, lam, 128);
            arb_add(D, D, t, 128);
        }
        if (ok) ck_assert_msg(arb_overlaps(D, F), "optimal multipliers, it %d", it);
        /* random multipliers: non-decreasing ones bound from above */
        for (int mono = 0; mono < 2; mono++) {
            arb_zero(D);
            double l = 0.2 + n_randint(state, 100) / 50.0;
            for (long i = 0; i < len; i++) {
                l = mono ? l + n_randint(state, 100) / 100.0
                         : 0.2 + n_randint(state, 100) / 50.0;
                arb_set_d(lam, l);
                arb_set_fmpq(u, r->p + i, 128);
                arb_div(u, u, lam, 128);
                arb_mul_2exp_si(u, u, -2);
                arb_add(D, D, u, 128);
                arb_set_fmpq(t, p->p + i, 128);
                arb_mul(t, t, lam, 128);
                arb_add(D, D, t, 128);
            }
            if (mono) ck_assert_msg(!arb_lt(D, F), "non-decreasing multipliers, it %d", it);
            else if (arb_lt(D, F)) below++;
        }
    }
    ck_assert(below > 0);
    arb_clear(F); arb_clear(D); arb_clear(t); arb_clear(u); arb_clear(lam);
    embz_qvec_clear(p); embz_qvec_clear(r); embz_qvec_clear(s);
    flint_randclear(state);
}
END_TEST

/* F_max and P at large n (fmax.c) against the explicit exact hull (embz_fidelity_explicit)
 * at n = 2^18 and 2^20 for every shipped family with a weight and the targets ebit and
 * uniform:3: a value overlaps the explicit one, tighter bounds contain it. The families
 * whose hull is tight (inverse, invamp, power, tilted, uniform, geometric) must give values. */
START_TEST(test_fmax_analytic_explicit)
{
    const char *targets[] = { "ebit", "uniform:3" };
    long sizes[] = { 1L << 18, 1L << 20 };
    int nsizes = getenv("EMBZ_QUICK") ? 1 : 2;
    embz_family_t f;
    embz_family_init(f);
    embz_target_t q;
    embz_target_init(q);
    embz_fidelity_result_t a, e;
    embz_fidelity_result_init(a);
    embz_fidelity_result_init(e);
    fmpz_t n;
    fmpz_init(n);
    embz_err_t err;
    for (int fi = 0; fi < NSHIPPED; fi++) {
        family_set(f, SHIPPED[fi]);
        int want_value = strcmp(SHIPPED[fi], "logpower") != 0
                         && strcmp(SHIPPED[fi], "iterlog") != 0
                         && strcmp(SHIPPED[fi], "nearmiss") != 0;
        for (int ti = 0; ti < 2; ti++) {
            tu_target_set(q, targets[ti]);
            for (int si = 0; si < nsizes; si++) {
                fmpz_set_si(n, sizes[si]);
                embz_err_clear(&err);
                ck_assert(embz_fidelity_explicit(e, f, n, q, EMBZ_MEASURE_PURIFIED, 128, &err)
                          == EMBZ_OK);
                int st = embz_fidelity(a, f, n, q, EMBZ_MEASURE_PURIFIED, EMBZ_METHOD_ANALYTIC,
                                       128, &err);
                ck_assert_msg(st == EMBZ_OK, "%s: %s", SHIPPED[fi], err.text);
                if (!a->bounds_only) {
                    ck_assert(a->how.analytic == 2);
                    ck_assert_msg(arb_overlaps(a->purified, e->purified), "%s %s n = %ld",
                                  SHIPPED[fi], targets[ti], sizes[si]);
                    ck_assert(arb_overlaps(a->fidelity, e->fidelity));
                } else {
                    ck_assert_msg(!want_value, "%s %s n = %ld: bounds only", SHIPPED[fi],
                                  targets[ti], sizes[si]);
                    ck_assert(a->have_tight);
                    ck_assert(!arb_lt(e->purified, a->tight_lo)
                              && !arb_gt(e->purified, a->tight_hi));
                }
            }
        }
    }
    fmpz_clear(n);
    embz_fidelity_result_clear(a);
    embz_fidelity_result_clear(e);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST


/* The LOCC values at large n: two precisions overlap at 10^30 and 10^300 (inverse, power,
 * tilted; ebit and uniform:3), and the tighter bounds of logpower contain each other's
 * intersection (they overlap). */
START_TEST(test_fmax_precisions)
{
    const char *fams[] = { "inverse", "power", "tilted", "logpower" };
    embz_family_t f;
    embz_family_init(f);
    embz_target_t q;
    embz_target_init(q);
    embz_fidelity_result_t a, b;
    embz_fidelity_result_init(a);
    embz_fidelity_result_init(b);
    fmpz_t n;
    fmpz_init(n);
    embz_err_t err;
    for (int fi = 0; fi < 4; fi++) {
        family_set(f, fams[fi]);
        for (int ti = 0; ti < 2; ti++) {
            tu_target_set(q, ti ? "uniform:3" : "ebit");
            for (int e = 30; e <= 300; e += 270) {
                fmpz_ui_pow_ui(n, 10, (ulong) e);
                embz_err_clear(&err);
                ck_assert(embz_fidelity(a, f, n, q, EMBZ_MEASURE_PURIFIED, EMBZ_METHOD_AUTO, 96,
                                        &err) == EMBZ_OK);
                ck_assert(embz_fidelity(b, f, n, q, EMBZ_MEASURE_PURIFIED, EMBZ_METHOD_AUTO,
                                        192, &err) == EMBZ_OK);
                if (fi < 3) {
                    ck_assert_msg(!a->bounds_only && !b->bounds_only, "%s 10^%d", fams[fi], e);
                    ck_assert_msg(arb_overlaps(a->value, b->value), "%s 10^%d", fams[fi], e);
                    ck_assert(arb_overlaps(a->fidelity, b->fidelity));
                } else {
                    ck_assert(a->bounds_only && b->bounds_only && a->have_tight && b->have_tight);
                    ck_assert(!arb_lt(a->tight_hi, b->tight_lo) && !arb_lt(b->tight_hi, a->tight_lo));
                }
            }
        }
    }
    fmpz_clear(n);
    embz_fidelity_result_clear(a);
    embz_fidelity_result_clear(b);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

START_TEST(test_measure_names)
{
    embz_err_t err;
    int m = -1;
    for (int k = 0; k < 4; k++) {
        ck_assert(embz_measure_parse(&m, embz_measure_name(k), &err) == EMBZ_OK);
        ck_assert(m == k);
    }
    embz_err_clear(&err);
    ck_assert(embz_measure_parse(&m, "trace", &err) == EMBZ_ERR_INPUT);
    ck_assert(strstr(err.text, "purified") != NULL);
}
END_TEST

static Suite *fidelity_suite(void)
{
    Suite *s = suite_create("fidelity");
    TCase *tc = tcase_create("vectors");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_brute_force);
    tcase_add_test(tc, test_two_level);
    tcase_add_test(tc, test_catalysis);
    tcase_add_test(tc, test_relations);
    tcase_add_test(tc, test_measure_names);
    tcase_add_test(tc, test_fmax_duality);
    suite_add_tcase(s, tc);
    TCase *tf = tcase_create("families");
    tcase_set_timeout(tf, 600);
    tcase_add_test(tf, test_family_values);
    tcase_add_test(tf, test_family_precision);
    tcase_add_test(tf, test_family_bounds);
    tcase_add_test(tf, test_van_dam_hayden);
    tcase_add_test(tf, test_overlap_analytic_explicit);
    tcase_add_test(tf, test_overlap_precisions);
    tcase_add_test(tf, test_van_dam_hayden_large);
    tcase_add_test(tf, test_fmax_analytic_explicit);
    tcase_add_test(tf, test_fmax_precisions);
    suite_add_tcase(s, tf);
    return s;
}

int main(void)
{
    return tu_run_suite(fidelity_suite());
}
