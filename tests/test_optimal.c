/* The optimal baseline (embz/optimal.h) against outside references:
 *  - brute force at n <= 8: an independent random search with local moves over the sorted
 *    simplex, its errors from a double threshold form written here (max over breakpoints t of
 *    Phi(t) - Phi(d t), math notes sec. 4, derived there), the best vector re-evaluated
 *    exactly by measure's embz_qvec_distance: it never beats the certified lower bound and
 *    comes within 0.01 of the upper bound;
 *  - the certified linear program (exact primal and dual) against the closed form at every
 *    n <= 300 (d = 2, 3, 4) from the equalising start, at every n <= 120 from GLPK's own start,
 *    and (unless EMBZ_QUICK=1) every n <= 2000 for one ebit, plus powers of the target
 *    dimension, 10^4 and 10^5;
 *  - the optimum never above a family's certified error (embz_error) at the same n: the
 *    shipped families inverse, power, logpower, uniform, iterlog, geometric at n = 2..10^6, and
 *    van Dam and Hayden's family 1/i exactly (E_n = 1 - (H_s + r/(d(s+1)))/H_n, math notes
 *    sec. 6, with FLINT's harmonic numbers);
 *  - the family 2^(-ceil(log2(i))) (shipped as dyadic) reaches the optimum: its certified
 *    error contains OPT_n for one ebit;
 *  - a family against the optimum (embz_optimal_vs): the ratio is never certainly below 1,
 *    the extra qubits per side never negative, and for dyadic the ratio contains 1 and the
 *    rank range contains n;
 *  - a target vector is refused (EMBZ_ERR_UNSUPPORTED), n beyond the program's limit too;
 *  - the fidelity-type optimum (embz_optimal_fid): an independent random search with local
 *    moves over the sorted simplex at n <= 8 (the overlap in doubles from the sorted tensor
 *    product written here, F_max of sampled states by measure's exact hull) never exceeds the
 *    certified upper end and its best comes within 10^-4 of the lower end; the shipped
 *    families' certified fidelity, overlap and purified distance (embz_fidelity) are never
 *    better than the optimum at n = 10 .. 2^20; the K-optimal state dyadic is strictly worse
 *    than the optimum in F_max at n >= 3. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include "testutil.h"

static int quick(void)
{
    const char *q = getenv("EMBZ_QUICK");
    return q != NULL && q[0] == '1';
}

static void closed(fmpq_t lo, fmpq_t hi, slong n, const embz_target_t q)
{
    embz_optimal_result_t r;
    embz_optimal_result_init(r);
    fmpz_t nz;
    fmpz_init_set_si(nz, n);
    embz_err_t err;
    embz_err_clear(&err);
    ck_assert_msg(embz_optimal_closed(r, nz, q, &err) == EMBZ_OK, "%s", err.text);
    ck_assert(r->state_checked || n > EMBZ_OPTIMAL_CHECK_MAX_N);
    fmpq_set(lo, r->lower);
    fmpq_set(hi, r->upper);
    fmpz_clear(nz);
    embz_optimal_result_clear(r);
}

/* ---------------------------------------------------------------- brute force */

static double phi(const double *p, int n, double t)
{
    double s = 0;
    for (int i = 0; i < n; i++) s += p[i] > t ? p[i] - t : 0;
    return s;
}

/* E(p) by the threshold form, breakpoints t in {p_i, p_i / d} */
static double err_threshold(const double *p, int n, int d)
{
    double best = 0;
    for (int i = 0; i < n; i++)
        for (int s = 0; s < 2; s++) {
            double t = s ? p[i] / d : p[i];
            double v = phi(p, n, t) - phi(p, n, d * t);
            if (v > best) best = v;
        }
    return best;
}

static int cmp_desc(const void *a, const void *b)
{
    double x = *(const double *) a, y = *(const double *) b;
    return (x < y) - (x > y);
}

static void normalise(double *p, int n)
{
    double s = 0;
    for (int i = 0; i < n; i++) s += p[i];
    for (int i = 0; i < n; i++) p[i] /= s;
    qsort(p, (size_t) n, sizeof(double), cmp_desc);
}

START_TEST(test_brute_force)
{
    flint_rand_t rs;
    flint_randinit(rs);
    const char *targets[] = { "ebit", "uniform:3" };
    fmpq_t lo, hi, E, t;
    fmpq_init(lo); fmpq_init(hi); fmpq_init(E); fmpq_init(t);
    for (int tg = 0; tg < 2; tg++) {
        embz_target_t q;
        embz_target_init(q);
        tu_target_set(q, targets[tg]);
        int d = (int) q->d;
        for (int n = 1; n <= 8; n++) {
            double best[8], cur[8], trial[8];
            double bestE = 2;
            int starts = quick() ? 10 : 40, steps = quick() ? 1500 : 4000;
            for (int st = 0; st < starts; st++) {
                for (int i = 0; i < n; i++) cur[i] = (double) (1 + n_randint(rs, 1000));
                normalise(cur, n);
                double curE = err_threshold(cur, n, d), step = 0.2;
                for (int it = 0; it < steps; it++) {
                    for (int i = 0; i < n; i++) {
                        double u = (double) n_randint(rs, 1 << 20) / (double) (1 << 20) - 0.5;
                        trial[i] = cur[i] * (1 + step * u);
                        if (trial[i] < 0) trial[i] = 0;
                    }
                    normalise(trial, n);
                    double e = err_threshold(trial, n, d);
                    if (e < curE) {
                        curE = e;
                        for (int i = 0; i < n; i++) cur[i] = trial[i];
                    } else if (it % 200 == 199) {
                        step *= 0.7;
                    }
                }
                if (curE < bestE) {
                    bestE = curE;
                    for (int i = 0; i < n; i++) best[i] = cur[i];
                }
            }
            /* the best vector, exactly */
            embz_qvec_t p, u, r;
            embz_qvec_init(p); embz_qvec_init(u); embz_qvec_init(r);
            tu_qvec_alloc(p, n);
            fmpq_t s;
            fmpq_init(s);
            for (int i = 0; i < n; i++) {
                fmpq_set_si(p->p + i, (slong) floor(best[i] * 1e12), 1);
                fmpq_add(s, s, p->p + i);
            }
            for (int i = 0; i < n; i++) fmpq_div(p->p + i, p->p + i, s);
            fmpq_clear(s);
            tu_qvec_alloc(u, d);
            for (int j = 0; j < d; j++) fmpq_set_si(u->p + j, 1, (ulong) d);
            tu_qvec_tensor(r, p, u);
            embz_qvec_distance(E, NULL, p, r);
            closed(lo, hi, n, q);
            ck_assert_msg(fmpq_cmp(E, lo) >= 0, "%s n = %d: the search beat the lower bound",
                          targets[tg], n);
            fmpq_sub(t, E, hi);
            ck_assert_msg(fmpq_get_d(t) < 0.01, "%s n = %d: search %g, optimum %g", targets[tg],
                          n, fmpq_get_d(E), fmpq_get_d(hi));
            embz_qvec_clear(p); embz_qvec_clear(u); embz_qvec_clear(r);
        }
        embz_target_clear(q);
    }
    fmpq_clear(lo); fmpq_clear(hi); fmpq_clear(E); fmpq_clear(t);
    flint_randclear(rs);
}
END_TEST

/* ---------------------------------------------------------------- the program */

static void lp_vs_closed(slong n, const embz_target_t q, int start, int with_state)
{
    embz_optimal_opts_t o;
    embz_optimal_opts_init(o);
    o->start = start;
    embz_optimal_result_t r;
    embz_optimal_result_init(r);
    embz_qvec_t st;
    embz_qvec_init(st);
    embz_err_t err;
    embz_err_clear(&err);
    ck_assert_msg(embz_optimal_lp(r, with_state ? st : NULL, n, q, o, NULL, NULL, &err)
                  == EMBZ_OK, "n = %ld: %s", (long) n, err.text);
    fmpq_t lo, hi, E;
    fmpq_init(lo); fmpq_init(hi); fmpq_init(E);
    closed(lo, hi, n, q);
    ck_assert(fmpq_cmp(r->lower, r->upper) <= 0);
    ck_assert_msg(fmpq_cmp(r->lower, lo) <= 0 && fmpq_cmp(hi, r->upper) <= 0,
                  "%s n = %ld: the program's enclosure misses the closed form", q->label,
                  (long) n);
    if (start == EMBZ_OPT_START_EQUAL) ck_assert_msg(r->exact, "n = %ld", (long) n);
    else {
        /* from GLPK's own start the bounds are still within 1e-9 */
        fmpq_sub(E, r->upper, r->lower);
        ck_assert(fmpq_get_d(E) < 1e-9);
    }
    if (with_state) {
        embz_optimal_uniform_error(E, NULL, st, q->d);
        ck_assert(fmpq_equal(E, r->upper));
    }
    fmpq_clear(lo); fmpq_clear(hi); fmpq_clear(E);
    embz_qvec_clear(st);
    embz_optimal_result_clear(r);
}

START_TEST(test_lp_small)
{
    const char *targets[] = { "ebit", "uniform:3", "ebits:2" };
    for (int t = 0; t < 3; t++) {
        embz_target_t q;
        embz_target_init(q);
        tu_target_set(q, targets[t]);
        for (slong n = 1; n <= 300; n++) lp_vs_closed(n, q, EMBZ_OPT_START_EQUAL, n <= 60);
        for (slong n = 1; n <= 120; n++) lp_vs_closed(n, q, EMBZ_OPT_START_SOLVER, n <= 60);
        embz_target_clear(q);
    }
}
END_TEST

START_TEST(test_lp_large)
{
    embz_target_t q;
    embz_target_init(q);
    tu_target_set(q, "ebit");
    if (!quick())
        for (slong n = 301; n <= 2000; n++) lp_vs_closed(n, q, EMBZ_OPT_START_EQUAL, 0);
    for (slong n = 512; n <= 2048; n *= 2) lp_vs_closed(n, q, EMBZ_OPT_START_SOLVER, 1);
    lp_vs_closed(10000, q, EMBZ_OPT_START_EQUAL, 1);
    lp_vs_closed(100000, q, EMBZ_OPT_START_EQUAL, 0);
    tu_target_set(q, "uniform:5");
    lp_vs_closed(3125, q, EMBZ_OPT_START_EQUAL, 1);
    lp_vs_closed(15625, q, EMBZ_OPT_START_EQUAL, 0);
    embz_target_clear(q);
}
END_TEST

START_TEST(test_refusals)
{
    embz_target_t q;
    embz_target_init(q);
    tu_target_set(q, "0.5,0.3,0.2");
    embz_optimal_result_t r;
    embz_optimal_result_init(r);
    fmpz_t n;
    fmpz_init_set_si(n, 10);
    ck_assert(embz_optimal_closed(r, n, q, NULL) == EMBZ_ERR_UNSUPPORTED);
    ck_assert(embz_optimal_lp(r, NULL, 10, q, NULL, NULL, NULL, NULL) == EMBZ_ERR_UNSUPPORTED);
    tu_target_set(q, "ebit");
    ck_assert(embz_optimal_lp(r, NULL, EMBZ_OPTIMAL_LP_MAX_N + 1, q, NULL, NULL, NULL, NULL)
              == EMBZ_ERR_LIMIT);
    ck_assert(embz_optimal_lp(r, NULL, 0, q, NULL, NULL, NULL, NULL) == EMBZ_ERR_INPUT);
    fmpz_zero(n);
    ck_assert(embz_optimal_closed(r, n, q, NULL) == EMBZ_ERR_INPUT);
    fmpz_clear(n);
    embz_optimal_result_clear(r);
    embz_target_clear(q);
}
END_TEST

/* ---------------------------------------------------------------- against families */

static void family_not_below(const char *spec, const char *target, slong n, int contains)
{
    embz_family_t f;
    embz_target_t q;
    embz_error_result_t res;
    embz_err_t err;
    embz_err_clear(&err);
    embz_family_init(f);
    embz_target_init(q);
    embz_error_result_init(res);
    tu_target_set(q, target);
    ck_assert_msg(embz_family_resolve(f, spec, NULL, 0, 0, &err) == EMBZ_OK, "%s", err.text);
    fmpz_t nz;
    fmpz_init_set_si(nz, n);
    ck_assert_msg(embz_error(res, f, nz, q, EMBZ_METHOD_AUTO, 128, &err) == EMBZ_OK, "%s: %s",
                  spec, err.text);
    fmpq_t lo, hi;
    fmpq_init(lo); fmpq_init(hi);
    closed(lo, hi, n, q);
    arb_t o;
    arb_init(o);
    arb_set_fmpq(o, hi, 256);
    /* never certainly below the optimum */
    ck_assert_msg(!arb_lt(res->error, o), "%s at n = %ld is below the optimum", spec, (long) n);
    if (contains) ck_assert_msg(arb_overlaps(res->error, o), "%s at n = %ld", spec, (long) n);
    arb_clear(o);
    fmpq_clear(lo); fmpq_clear(hi);
    fmpz_clear(nz);
    embz_error_result_clear(res);
    embz_target_clear(q);
    embz_family_clear(f);
}

START_TEST(test_families)
{
    const char *fams[] = { "inverse", "power", "logpower", "uniform", "iterlog", "geometric" };
    slong sizes[] = { 2, 3, 10, 100, 1000, 4096, 100000, 1000000 };
    for (int f = 0; f < 6; f++)
        for (int k = 0; k < 8; k++) {
            if (quick() && k >= 6) continue;
            family_not_below(fams[f], "ebit", sizes[k], 0);
            if (k < 5) family_not_below(fams[f], "ebits:2", sizes[k], 0);
        }
    for (int k = 0; k < 8; k++) family_not_below("dyadic", "ebit", sizes[k], 1);
    for (slong n = 1; n <= 70; n++) family_not_below("dyadic", "ebit", n, 1);
}
END_TEST

START_TEST(test_inverse_exact)
{
    fmpq_t E, lo, hi;
    fmpq_init(E); fmpq_init(lo); fmpq_init(hi);
    ulong ds[] = { 2, 3, 4, 8 };
    for (int t = 0; t < 4; t++) {
        embz_target_t q;
        embz_target_init(q);
        char spec[32];
        snprintf(spec, sizeof(spec), "uniform:%lu", ds[t]);
        tu_target_set(q, spec);
        for (slong n = 1; n <= 3000; n += (n < 100 ? 1 : 37)) {
            tu_inverse_error_exact(E, (ulong) n, ds[t]);
            closed(lo, hi, n, q);
            ck_assert(fmpq_cmp(E, hi) >= 0);
            /* equality only where 1/i is the optimal state itself (n <= 2 for one ebit) */
        }
        embz_target_clear(q);
    }
    fmpq_clear(E); fmpq_clear(lo); fmpq_clear(hi);
}
END_TEST

static void vs_at(const char *spec, slong n, int optimal)
{
    embz_family_t f;
    embz_target_t q;
    embz_error_result_t res;
    embz_err_t err;
    embz_err_clear(&err);
    embz_family_init(f);
    embz_target_init(q);
    embz_error_result_init(res);
    ck_assert(embz_family_resolve(f, spec, NULL, 0, 0, &err) == EMBZ_OK);
    fmpz_t nz;
    fmpz_init_set_si(nz, n);
    ck_assert(embz_error(res, f, nz, q, EMBZ_METHOD_AUTO, 128, &err) == EMBZ_OK);
    embz_optimal_vs_t v;
    embz_optimal_vs_init(v);
    ck_assert(embz_optimal_vs(v, res->error, nz, q, &err) == EMBZ_OK);
    arb_t one;
    arb_init(one);
    arb_one(one);
    ck_assert(!arb_lt(v->ratio, one));
    ck_assert(v->have_rank);
    ck_assert(fmpz_cmp(v->rank_lo, v->rank_hi) <= 0);
    ck_assert(v->qubits - v->opt_qubits_hi >= 0);
    /* the optimum at rank_lo reaches the error's upper end, at rank_lo - 1 not its lower end */
    fmpq_t lo, hi;
    fmpq_init(lo); fmpq_init(hi);
    embz_optimal_result_t r;
    embz_optimal_result_init(r);
    ck_assert(embz_optimal_closed(r, v->rank_lo, q, NULL) == EMBZ_OK);
    arb_t o;
    arb_init(o);
    arb_set_fmpq(o, r->upper, 256);
    ck_assert(!arb_gt(o, res->error));
    if (optimal) {
        ck_assert(arb_contains(v->ratio, one));
        ck_assert(fmpz_cmp(v->rank_lo, nz) <= 0 && fmpz_cmp(nz, v->rank_hi) <= 0);
    }
    arb_clear(o);
    embz_optimal_result_clear(r);
    fmpq_clear(lo); fmpq_clear(hi);
    arb_clear(one);
    embz_optimal_vs_clear(v);
    fmpz_clear(nz);
    embz_error_result_clear(res);
    embz_target_clear(q);
    embz_family_clear(f);
}

START_TEST(test_vs)
{
    slong sizes[] = { 2, 10, 100, 1000, 100000 };
    for (int k = 0; k < 5; k++) {
        vs_at("inverse", sizes[k], 0);
        vs_at("logpower", sizes[k], 0);
        vs_at("dyadic", sizes[k], 1);
    }
}
END_TEST

/* ---------------------------------------------------------------- fidelity-type optimum */

static void fid_bounds(fmpq_t lo, fmpq_t hi, slong n, const embz_target_t q, int measure)
{
    embz_optimal_fid_t r;
    embz_optimal_fid_init(r);
    embz_err_t err;
    embz_err_clear(&err);
    fmpz_t nz;
    fmpz_init_set_si(nz, n);
    ck_assert_msg(embz_optimal_fid(r, NULL, nz, q, measure, &err) == EMBZ_OK, "%s", err.text);
    fmpz_clear(nz);
    fmpq_set(lo, r->f_lower);
    fmpq_set(hi, r->f_upper);
    embz_optimal_fid_clear(r);
}

/* O(p, p (x) u_d)^2 in doubles: the tensor product formed, sorted, and paired with p */
static int fid_cmp_desc(const void *a, const void *b)
{
    double x = *(const double *) a, y = *(const double *) b;
    return (x < y) - (x > y);
}

static double overlap2_d(const double *p, int n, int d)
{
    double r[8 * 8];
    int m = 0;
    for (int i = 0; i < n; i++)
        for (int j = 0; j < d; j++) r[m++] = p[i] / d;
    qsort(r, (size_t) m, sizeof(double), fid_cmp_desc);
    double ps[8];
    for (int i = 0; i < n; i++) ps[i] = p[i];
    qsort(ps, (size_t) n, sizeof(double), fid_cmp_desc);
    double o = 0;
    for (int i = 0; i < n; i++) o += sqrt(ps[i] * r[i]);
    return o * o;
}

START_TEST(test_fid_brute_force)
{
    flint_rand_t rs;
    flint_randinit(rs);
    fmpq_t lo, hi;
    fmpq_init(lo); fmpq_init(hi);
    arb_t F, t;
    arb_init(F); arb_init(t);
    int ds[] = { 2, 3 };
    for (int k = 0; k < 2; k++)
        for (int n = 2; n <= 8; n++) {
            embz_target_t q;
            embz_target_init(q);
            char spec[32];
            snprintf(spec, sizeof(spec), "uniform:%d", ds[k]);
            tu_target_set(q, spec);
            fid_bounds(lo, hi, n, q, EMBZ_MEASURE_OVERLAP);
            double dlo = fmpq_get_d(lo), dhi = fmpq_get_d(hi), best = 0;
            int starts = quick() ? 10 : 40;
            for (int s = 0; s < starts; s++) {
                double p[8], sum = 0;
                for (int i = 0; i < n; i++) { p[i] = n_randint(rs, 1000) + 1.0; sum += p[i]; }
                for (int i = 0; i < n; i++) p[i] /= sum;
                double v = overlap2_d(p, n, ds[k]), step = 0.1;
                for (int it = 0; it < 4000; it++) {
                    double c[8], cs = 0;
                    for (int i = 0; i < n; i++) {
                        c[i] = p[i] * exp(step * ((double) n_randint(rs, 2001) / 1000.0 - 1.0));
                        cs += c[i];
                    }
                    for (int i = 0; i < n; i++) c[i] /= cs;
                    double w = overlap2_d(c, n, ds[k]);
                    if (w > v) { v = w; for (int i = 0; i < n; i++) p[i] = c[i]; }
                    else if (it % 500 == 499) step *= 0.5;
                }
                ck_assert_msg(v <= dhi * (1 + 1e-12), "search beat the upper end: n=%d d=%d",
                              n, ds[k]);
                if (v > best) best = v;
                /* F_max of the state found (exact rationals, measure's hull) */
                embz_qvec_t pq, u, r;
                embz_qvec_init(pq); embz_qvec_init(u); embz_qvec_init(r);
                tu_qvec_alloc(pq, n);
                for (int i = 0; i < n; i++) fmpq_set_si(pq->p + i, (slong) llround(p[i] * 1e12) + 1, 1);   /* near p */
                embz_qvec_sort(pq);
                tu_qvec_alloc(u, ds[k]);
                for (int j = 0; j < ds[k]; j++) fmpq_set_si(u->p + j, 1, ds[k]);
                fmpq_t sm;
                fmpq_init(sm);
                for (int i = 0; i < n; i++) fmpq_add(sm, sm, pq->p + i);
                for (int i = 0; i < n; i++) fmpq_div(pq->p + i, pq->p + i, sm);
                fmpq_clear(sm);
                tu_qvec_tensor(r, pq, u);
                embz_qvec_fidelity(F, NULL, NULL, pq, r, 128);
                arb_set_fmpq(t, hi, 128);
                ck_assert_msg(!arb_gt(F, t), "a state's F_max above the upper end: n=%d d=%d",
                              n, ds[k]);
                embz_qvec_clear(pq); embz_qvec_clear(u); embz_qvec_clear(r);
            }
            ck_assert_msg(best >= dlo - 1e-4, "the search stayed far below the optimum: n=%d "
                          "d=%d best %.10g lower end %.10g", n, ds[k], best, dlo);
            embz_target_clear(q);
        }
    arb_clear(F); arb_clear(t);
    fmpq_clear(lo); fmpq_clear(hi);
    flint_randclear(rs);
}
END_TEST

static void family_fid_not_better(const char *spec, const char *target, slong n, int strict)
{
    embz_family_t f;
    embz_target_t q;
    embz_err_t err;
    embz_err_clear(&err);
    embz_family_init(f);
    embz_target_init(q);
    tu_target_set(q, target);
    ck_assert_msg(embz_family_resolve(f, spec, NULL, 0, 0, &err) == EMBZ_OK, "%s", err.text);
    fmpz_t nz;
    fmpz_init_set_si(nz, n);
    int ms[] = { EMBZ_MEASURE_FIDELITY, EMBZ_MEASURE_OVERLAP, EMBZ_MEASURE_PURIFIED };
    for (int k = 0; k < 3; k++) {
        embz_fidelity_result_t res;
        embz_fidelity_result_init(res);
        ck_assert_msg(embz_fidelity(res, f, nz, q, ms[k], EMBZ_METHOD_AUTO, 128, &err) == EMBZ_OK,
                      "%s: %s", spec, err.text);
        embz_optimal_fid_t o;
        embz_optimal_fid_init(o);
        ck_assert(embz_optimal_fid(o, NULL, nz, q, ms[k], &err) == EMBZ_OK);
        /* fidelity, overlap: larger is better; purified: smaller is better */
        if (ms[k] == EMBZ_MEASURE_PURIFIED) {
            ck_assert_msg(!arb_lt(res->value, o->value), "%s better than the optimum (%s, n=%ld)",
                          spec, embz_measure_name(ms[k]), (long) n);
            if (strict) ck_assert(arb_gt(res->value, o->value));
        } else {
            ck_assert_msg(!arb_gt(res->value, o->value), "%s better than the optimum (%s, n=%ld)",
                          spec, embz_measure_name(ms[k]), (long) n);
            if (strict) ck_assert(arb_lt(res->value, o->value));
        }
        embz_optimal_fid_clear(o);
        embz_fidelity_result_clear(res);
    }
    fmpz_clear(nz);
    embz_target_clear(q);
    embz_family_clear(f);
}

START_TEST(test_fid_families)
{
    const char *fams[] = { "inverse", "power", "logpower", "uniform", "geometric" };
    slong sizes[] = { 10, 100, 1000, 30000, WORD(1) << 20 };
    for (int f = 0; f < 5; f++)
        for (int k = 0; k < 5; k++) {
            if (quick() && k >= 4) continue;
            family_fid_not_better(fams[f], "ebit", sizes[k], 0);
            if (k < 3) family_fid_not_better(fams[f], "uniform:3", sizes[k], 0);
        }
    for (slong n = 3; n <= 40; n++) family_fid_not_better("dyadic", "ebit", n, 1);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("optimal");
    TCase *tc = tcase_create("optimal");
    tcase_set_timeout(tc, 900);
    tcase_add_test(tc, test_brute_force);
    tcase_add_test(tc, test_lp_small);
    tcase_add_test(tc, test_lp_large);
    tcase_add_test(tc, test_refusals);
    tcase_add_test(tc, test_families);
    tcase_add_test(tc, test_inverse_exact);
    tcase_add_test(tc, test_vs);
    tcase_add_test(tc, test_fid_brute_force);
    tcase_add_test(tc, test_fid_families);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
