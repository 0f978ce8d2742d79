/* Tests of the evaluator of E_n(q) (include/embz/error.h, src/error/eval.c): which method runs
 * where, the fallback, workspaces reused across sizes and shared among threads, the side of a
 * goal, at two precisions.
 *
 * Reference: for the inverse-index weights 1/i and the d-level maximally entangled target,
 *     E_n(u_d) = 1 - (H_s + r/(d(s+1))) / H_n,   n = d s + r, 0 <= r < d
 * (docs/math.md section 6, [derived]), evaluated with FLINT's exact harmonic numbers
 * (arith_harmonic_number), independently of both methods. */
#include <check.h>
#include <stdlib.h>
#include <string.h>
#ifdef _OPENMP
#include <omp.h>
#endif
#include "embz.h"
#include "testutil.h"

static void family(embz_family_t f, const char *spec)
{
    embz_err_t err;
    embz_err_clear(&err);
    embz_family_init(f);
    ck_assert_msg(embz_family_resolve(f, spec, NULL, 0, 0, &err) == EMBZ_OK, "%s: %s", spec,
                  err.text);
}

/* the enclosure contains the exact value */
static void assert_contains(const arb_t e, const fmpq_t x, const char *what)
{
    arb_t t;
    arb_init(t);
    arb_set_fmpq(t, x, 4 * arb_bits(e) + 256);
    ck_assert_msg(arb_contains(e, t), "%s: the enclosure misses the exact value", what);
    arb_clear(t);
}

static const slong precs[2] = { 64, 192 };

START_TEST(test_threshold)
{
    /* explicit summation up to the one threshold, the analytic engine beyond; both enclose
     * the closed form */
    embz_family_t f;
    embz_target_t q;
    family(f, "1/i");
    embz_target_init(q);
    fmpq_t E;
    fmpq_init(E);
    for (int k = 0; k < 2; k++) {
        embz_eval_opts_t o;
        embz_eval_t ev;
        embz_eval_opts_init(o);
        embz_eval_init(ev, f, o, precs[k]);
        for (slong n = EMBZ_EVAL_EXPLICIT_UP_TO; n <= EMBZ_EVAL_EXPLICIT_UP_TO + 1; n++) {
            embz_error_result_t res;
            embz_err_t err;
            fmpz_t nn;
            fmpz_init_set_si(nn, n);
            embz_err_clear(&err);
            embz_error_result_init(res);
            ck_assert_msg(embz_eval_error(res, ev, NULL, nn, q, &err) == EMBZ_OK, "%s", err.text);
            int want = n <= EMBZ_EVAL_EXPLICIT_UP_TO ? EMBZ_METHOD_EXPLICIT : EMBZ_METHOD_ANALYTIC;
            ck_assert_int_eq(res->method, want);
            ck_assert_int_eq(res->used, 1 << want);
            tu_inverse_error_exact(E, (ulong) n, 2);
            assert_contains(res->error, E, "threshold");
            ck_assert(arb_rel_accuracy_bits(res->error) > precs[k] / 2);
            embz_error_result_clear(res);
            fmpz_clear(nn);
        }
        embz_eval_clear(ev);
    }
    fmpq_clear(E);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

START_TEST(test_fallback)
{
    /* 2 + sin(i) is not monotone: the engine declines it, explicit summation takes over at
     * n = 10^5 and the detail says why; with the fallback off the evaluation fails. The value
     * is checked against a forced explicit summation (same method, independent call). */
    embz_family_t f;
    embz_target_t q;
    family(f, "2 + sin(i)");
    embz_target_init(q);
    fmpz_t n;
    fmpz_init_set_ui(n, 100000);
    embz_eval_opts_t o;
    embz_eval_t ev;
    embz_error_result_t res, ref;
    embz_err_t err;
    embz_error_result_init(res);
    embz_error_result_init(ref);
    embz_eval_opts_init(o);
    embz_eval_init(ev, f, o, 64);
    embz_err_clear(&err);
    ck_assert_msg(embz_eval_error(res, ev, NULL, n, q, &err) == EMBZ_OK, "%s", err.text);
    ck_assert_int_eq(res->method, EMBZ_METHOD_EXPLICIT);
    ck_assert(res->how.kind == EMBZ_HOW_EXPLICIT && res->how.fallback != EMBZ_HOW_FALLBACK_NONE);
    ck_assert(res->how.reason[0] != '\0');
    embz_err_clear(&err);
    ck_assert_int_eq(embz_error(ref, f, n, q, EMBZ_METHOD_EXPLICIT, 64, &err), EMBZ_OK);
    ck_assert(arb_overlaps(res->error, ref->error));
    embz_eval_clear(ev);
    o->fallback = EMBZ_FALLBACK_NONE;
    embz_eval_init(ev, f, o, 64);
    embz_err_clear(&err);
    int st = embz_eval_error(res, ev, NULL, n, q, &err);
    ck_assert_int_ne(st, EMBZ_OK);
    ck_assert(err.text[0] != '\0');
    embz_eval_clear(ev);
    /* n below 1 is an input error */
    embz_eval_opts_init(o);
    embz_eval_init(ev, f, o, 64);
    fmpz_zero(n);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_eval_error(res, ev, NULL, n, q, &err), EMBZ_ERR_INPUT);
    embz_eval_clear(ev);
    embz_error_result_clear(res);
    embz_error_result_clear(ref);
    fmpz_clear(n);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

START_TEST(test_workspace)
{
    /* a prepared workspace reused across sizes (largest first, as a sweep does) gives
     * enclosures that overlap those of fresh engines, contain the closed form where it is
     * computable, and are as narrow as the precision allows */
    embz_family_t f;
    embz_target_t q;
    family(f, "1/i");
    embz_target_init(q);
    static const char *const sizes[5] = { "10^30", "10^12", "123457", "5000", "1000" };
    fmpq_t E;
    fmpq_init(E);
    for (int k = 0; k < 2; k++) {
        embz_eval_opts_t o;
        embz_eval_t ev;
        embz_eval_work_t w;
        embz_err_t err;
        fmpz_t n, nmax;
        fmpz_init(n);
        fmpz_init(nmax);
        embz_eval_opts_init(o);
        embz_eval_init(ev, f, o, precs[k]);
        embz_eval_work_init(w);
        embz_err_clear(&err);
        ck_assert_int_eq(embz_size_parse(nmax, sizes[0], &err), EMBZ_OK);
        ck_assert_int_eq(embz_eval_prepare(ev, w, nmax, &err), EMBZ_OK);
        ck_assert(ev->analytic_ok);
        for (int j = 0; j < 5; j++) {
            embz_error_result_t a, b;
            embz_error_result_init(a);
            embz_error_result_init(b);
            ck_assert_int_eq(embz_size_parse(n, sizes[j], &err), EMBZ_OK);
            ck_assert_msg(embz_eval_error(a, ev, w, n, q, &err) == EMBZ_OK, "%s", err.text);
            ck_assert_msg(embz_eval_error(b, ev, NULL, n, q, &err) == EMBZ_OK, "%s", err.text);
            ck_assert_msg(arb_overlaps(a->error, b->error), "workspace vs fresh at %s", sizes[j]);
            ck_assert(arb_rel_accuracy_bits(a->error) > precs[k] / 2);
            if (fmpz_cmp_ui(n, 200000) <= 0) {
                tu_inverse_error_exact(E, fmpz_get_ui(n), 2);
                assert_contains(a->error, E, sizes[j]);
            }
            embz_error_result_clear(a);
            embz_error_result_clear(b);
        }
        embz_eval_work_clear(w);
        embz_eval_clear(ev);
        fmpz_clear(n);
        fmpz_clear(nmax);
    }
    fmpq_clear(E);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

START_TEST(test_threads)
{
    /* one evaluator read by two threads, a workspace each: the same enclosures as one
     * thread alone */
    embz_family_t f;
    embz_target_t q;
    family(f, "1/(i*log(i+1)^2)");
    embz_target_init(q);
    enum { N = 8 };
    fmpz sizes[N];
    arb_struct one[N], two[N];
    for (int j = 0; j < N; j++) {
        fmpz_init(sizes + j);
        fmpz_ui_pow_ui(sizes + j, 10, 5 + 7 * (ulong) j);
        arb_init(one + j);
        arb_init(two + j);
    }
    embz_eval_opts_t o;
    embz_eval_t ev;
    embz_eval_opts_init(o);
    embz_eval_init(ev, f, o, 64);
    embz_eval_work_t w1;
    embz_eval_work_init(w1);
    for (int j = 0; j < N; j++) {
        embz_error_result_t r;
        embz_err_t err;
        embz_err_clear(&err);
        embz_error_result_init(r);
        ck_assert_msg(embz_eval_error(r, ev, w1, sizes + j, q, &err) == EMBZ_OK, "%s", err.text);
        arb_set(one + j, r->error);
        embz_error_result_clear(r);
    }
    embz_eval_work_clear(w1);
    int fails = 0;
#ifdef _OPENMP
#pragma omp parallel num_threads(2) reduction(+:fails)
#endif
    {
        embz_eval_work_t w;
        embz_eval_work_init(w);
        int tid = 0, nt = 1;
#ifdef _OPENMP
        tid = omp_get_thread_num();
        nt = omp_get_num_threads();
#endif
        for (int j = tid; j < N; j += nt) {
            embz_error_result_t r;
            embz_err_t err;
            embz_err_clear(&err);
            embz_error_result_init(r);
            if (embz_eval_error(r, ev, w, sizes + j, q, &err) != EMBZ_OK) fails++;
            else arb_set(two + j, r->error);
            embz_error_result_clear(r);
        }
        embz_eval_work_clear(w);
    }
    ck_assert_int_eq(fails, 0);
    for (int j = 0; j < N; j++) ck_assert(arb_equal(one + j, two + j));
    embz_eval_clear(ev);
    for (int j = 0; j < N; j++) {
        fmpz_clear(sizes + j);
        arb_clear(one + j);
        arb_clear(two + j);
    }
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

START_TEST(test_side)
{
    /* the side of goals just above and below the exact E_n (1/i, n = 10^5 and 5000), with and
     * without decision mode, at two precisions */
    embz_family_t f;
    embz_target_t q;
    family(f, "1/i");
    embz_target_init(q);
    static const ulong ns[2] = { 5000, 100000 };
    fmpq_t E, g, d;
    fmpq_init(E); fmpq_init(g); fmpq_init(d);
    fmpq_set_si(d, 1, 1000000);
    for (int k = 0; k < 2; k++)
        for (int j = 0; j < 2; j++)
            for (int dec = 0; dec < 2; dec++)
                for (int above = 0; above < 2; above++) {
                    embz_eval_opts_t o;
                    embz_eval_t ev;
                    embz_eval_work_t w;
                    embz_eval_opts_init(o);
                    o->goal_steps = 3;
                    embz_eval_init(ev, f, o, precs[k]);
                    embz_eval_work_init(w);
                    tu_inverse_error_exact(E, ns[j], 2);
                    if (above) fmpq_add(g, E, d);
                    else fmpq_sub(g, E, d);
                    arb_t ga;
                    arb_init(ga);
                    arb_set_fmpq(ga, g, 4 * precs[k]);
                    fmpz_t n;
                    fmpz_init_set_ui(n, ns[j]);
                    embz_error_result_t r;
                    embz_err_t err;
                    embz_err_clear(&err);
                    embz_error_result_init(r);
                    int side = 2;
                    ck_assert_int_eq(embz_eval_side(&side, r, ev, w, n, q, ga, dec, &err),
                                     EMBZ_OK);
                    ck_assert_int_eq(side, above ? -1 : 1);
                    ck_assert(r->steps >= 1 && r->steps <= 3);
                    embz_error_result_clear(r);
                    arb_clear(ga);
                    fmpz_clear(n);
                    embz_eval_work_clear(w);
                    embz_eval_clear(ev);
                }
    fmpq_clear(E); fmpq_clear(g); fmpq_clear(d);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

/* How a value was computed comes as numbers and flags; the renderer's words carry them in
 * full (no truncated inner text, the whole fallback reason). */
START_TEST(test_how_words)
{
    embz_family_t f;
    embz_target_t q;
    embz_error_result_t res;
    embz_err_t err;
    fmpz_t n;
    char *s;
    family(f, "1/i");
    embz_target_init(q);
    embz_error_result_init(res);
    fmpz_init(n);
    embz_err_clear(&err);
    /* explicit, streamed: the order, the precision and the fixed-point unit */
    tu_target_set(q, "ebit");
    fmpz_set_ui(n, 100);
    ck_assert_int_eq(embz_error(res, f, n, q, EMBZ_METHOD_AUTO, 64, &err), EMBZ_OK);
    ck_assert(res->how.kind == EMBZ_HOW_EXPLICIT && res->how.order == 1 && res->how.prec == 64);
    ck_assert(res->how.unit_exp < -100);
    s = embz_error_how_text(&res->how);
    ck_assert_msg(strstr(s, "streaming (weights non-increasing), arb 64 bits") != NULL, "%s", s);
    free(s);
    /* analytic, Ky Fan form: the counts appear as numbers */
    fmpz_set_ui(n, 10);
    fmpz_pow_ui(n, n, 30);
    ck_assert_int_eq(embz_error(res, f, n, q, EMBZ_METHOD_AUTO, 64, &err), EMBZ_OK);
    ck_assert(res->how.kind == EMBZ_HOW_KYFAN && res->how.run.tail_dir == 1);
    ck_assert(res->how.run.terms >= 1 && res->how.run.bounds >= 1);
    s = embz_error_how_text(&res->how);
    char want[64];
    snprintf(want, sizeof(want), "analytic: %ld explicit terms", (long) res->how.run.terms);
    ck_assert_msg(strstr(s, want) != NULL && strstr(s, "arb 64 bits") != NULL, "%s", s);
    free(s);
    /* a target vector: the bracket's dimensions and the upper end's run, untruncated */
    tu_target_set(q, "0.7,0.3");
    ck_assert_int_eq(embz_error(res, f, n, q, EMBZ_METHOD_AUTO, 64, &err), EMBZ_OK);
    ck_assert_int_eq(res->how.kind, EMBZ_HOW_GENERAL);
    ck_assert(res->how.bracket_lo == 1 && res->how.bracket_hi == 2);
    ck_assert_int_eq(res->how.upper.kind, EMBZ_HOW_KYFAN);
    s = embz_error_how_text(&res->how);
    ck_assert_msg(strstr(s, "E(uniform:1) <= E(q) <= E(uniform:2)") != NULL, "%s", s);
    ck_assert_msg(strstr(s, "integrals, arb 64 bits") != NULL, "%s", s);
    free(s);
    /* a fallback with a long reason keeps all of it */
    embz_error_how_struct h;
    memset(&h, 0, sizeof(h));
    h.kind = EMBZ_HOW_EXPLICIT;
    h.prec = 128;
    h.fallback = EMBZ_HOW_DECLINED;
    memset(h.reason, 'x', 400);
    h.reason[400] = '\0';
    s = embz_error_how_text(&h);
    ck_assert(strstr(s, "(analytic engine declined: xxx") != NULL);
    ck_assert(strstr(s, h.reason) != NULL);
    ck_assert_int_eq(s[strlen(s) - 1], ')');
    free(s);
    /* fidelity bounds beyond explicit sizes (logpower: the LOCC bounds are not tight
     * enough for a value): the words of K's computation follow */
    embz_fidelity_result_t fr;
    embz_fidelity_result_init(fr);
    tu_target_set(q, "ebit");
    {
        embz_family_t g;
        family(g, "logpower");
        ck_assert_int_eq(embz_fidelity(fr, g, n, q, EMBZ_MEASURE_PURIFIED, EMBZ_METHOD_AUTO,
                                       64, &err), EMBZ_OK);
        embz_family_clear(g);
    }
    ck_assert(fr->how.bounds_only && fr->how.K.kind == EMBZ_HOW_KYFAN);
    s = embz_fidelity_how_text(&fr->how);
    ck_assert_msg(strstr(s, "bounds from K <= P <= sqrt(K(2-K)); K by analytic: ") != NULL, "%s",
                  s);
    free(s);
    /* the inverse family there: a value from the LOCC bounds, with their words */
    ck_assert_int_eq(embz_fidelity(fr, f, n, q, EMBZ_MEASURE_PURIFIED, EMBZ_METHOD_AUTO, 64, &err),
                     EMBZ_OK);
    ck_assert(!fr->how.bounds_only && fr->how.analytic == 2);
    s = embz_fidelity_how_text(&fr->how);
    ck_assert_msg(strstr(s, "analytic: exact hull of the first ") != NULL, "%s", s);
    free(s);
    tu_target_set(q, "ebit");
    ck_assert_int_eq(embz_fidelity(fr, f, n, q, EMBZ_MEASURE_OVERLAP, EMBZ_METHOD_AUTO, 64, &err),
                     EMBZ_OK);
    s = embz_fidelity_how_text(&fr->how);
    ck_assert_msg(strstr(s, "residue classes as Euler-Maclaurin tails") != NULL, "%s", s);
    free(s);
    fmpz_set_ui(n, 50);
    ck_assert_int_eq(embz_fidelity(fr, f, n, q, EMBZ_MEASURE_PURIFIED, EMBZ_METHOD_AUTO, 64, &err),
                     EMBZ_OK);
    ck_assert(!fr->how.bounds_only && fr->how.pieces >= 1 && fr->how.int_bits > 64);
    s = embz_fidelity_how_text(&fr->how);
    ck_assert_msg(strstr(s, "explicit: weights rounded to ") != NULL, "%s", s);
    free(s);
    embz_fidelity_result_clear(fr);
    fmpz_clear(n);
    embz_error_result_clear(res);
    embz_target_clear(q);
    embz_family_clear(f);
}
END_TEST

/* Level families: the error through the evaluator against the exact distance of the expanded
 * vector (FLINT rationals); a level family with one copy of each value 1/i against the weight
 * family 1/i (two independent methods); n copies of one ebit give exactly 1/2 [derived:
 * the maximally entangled state of any dimension]. */
START_TEST(test_level_family)
{
    embz_family_t f, g;
    embz_target_t q;
    embz_error_result_t res, ref;
    embz_err_t err;
    fmpz_t n;
    embz_family_init(f);
    embz_target_init(q);
    embz_error_result_init(res);
    embz_error_result_init(ref);
    fmpz_init(n);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_family_parse_text(f, "level = a^i * (1 - a)^(n - i)\ncount = binom(n, i)\n"
                                               "first = 0\nlast = n\nparam a = 7/10\n", "c.fam", &err),
                     EMBZ_OK);
    ck_assert(embz_family_is_levels(f));
    const char *tg[] = { "ebit", "0.6,0.4", "uniform:3" };
    for (slong L = 1; L <= 9; L++)
        for (int t = 0; t < 3; t++) {
            tu_target_set(q, tg[t]);
            fmpz_set_si(n, L);
            ck_assert_msg(embz_error(res, f, n, q, EMBZ_METHOD_AUTO, 128, &err) == EMBZ_OK, "%s",
                          err.text);
            ck_assert_int_eq(res->how.kind, EMBZ_HOW_LEVELS);
            ck_assert_int_eq(res->how.dim_bits, L + 1);   /* dimension 2^L */
            /* the reference: the expanded vector of 2^L entries */
            embz_qvec_t p, r, qv;
            embz_qvec_init(p); embz_qvec_init(r); embz_qvec_init(qv);
            tu_qvec_alloc(p, WORD(1) << L);
            fmpq_t a, b, s;
            fmpq_init(a); fmpq_init(b); fmpq_init(s);
            for (slong x = 0; x < (WORD(1) << L); x++) {
                slong ones = (slong) __builtin_popcountl((unsigned long) x);
                fmpq_set_si(a, 7, 10);
                fmpq_pow_si(a, a, ones);
                fmpq_set_si(b, 3, 10);
                fmpq_pow_si(b, b, L - ones);
                fmpq_mul(p->p + x, a, b);
            }
            embz_qvec_sort(p);
            if (q->kind == EMBZ_TARGET_UNIFORM) {
                tu_qvec_alloc(qv, (slong) q->d);
                for (ulong l = 0; l < q->d; l++) fmpq_set_ui(qv->p + l, 1, q->d);
            } else {
                tu_qvec_alloc(qv, q->q->len);
                for (slong l = 0; l < q->q->len; l++) fmpq_set(qv->p + l, q->q->p + l);
            }
            tu_qvec_tensor(r, p, qv);
            embz_qvec_sort(r);
            long kk;
            embz_qvec_distance(s, &kk, p, r);
            ck_assert_msg(arb_contains_fmpq(res->error, s), "L = %ld target %s", (long) L, tg[t]);
            ck_assert(mag_cmp_2exp_si(arb_radref(res->error), -100) < 0);
            fmpq_clear(a); fmpq_clear(b); fmpq_clear(s);
            embz_qvec_clear(p); embz_qvec_clear(r); embz_qvec_clear(qv);
        }
    /* one copy of each value 1/i is the weight family 1/i */
    embz_family_clear(f);
    embz_family_init(f);
    ck_assert_int_eq(embz_family_parse_text(f, "level = 1/i\ncount = 1\nfirst = 1\nlast = n\n",
                                            "h.fam", &err), EMBZ_OK);
    family(g, "1/i");
    const slong ns[] = { 1, 2, 7, 100, 3000 };
    for (int j = 0; j < 5; j++)
        for (int t = 0; t < 2; t++) {
            tu_target_set(q, tg[t]);
            fmpz_set_si(n, ns[j]);
            ck_assert_int_eq(embz_error(res, f, n, q, EMBZ_METHOD_AUTO, 128, &err), EMBZ_OK);
            ck_assert_int_eq(embz_error(ref, g, n, q, EMBZ_METHOD_EXPLICIT, 128, &err), EMBZ_OK);
            ck_assert_msg(arb_overlaps(res->error, ref->error), "n = %ld", (long) ns[j]);
        }
    /* n copies of one ebit: the maximally entangled state of dimension 2^n, error 1/2 */
    embz_family_clear(f);
    embz_family_init(f);
    ck_assert_int_eq(embz_family_parse_text(f, "level = 2^-n\ncount = 2^n\nfirst = 0\nlast = 0\n",
                                            "m.fam", &err), EMBZ_OK);
    tu_target_set(q, "ebit");
    arb_t h;
    arb_init(h);
    arb_set_d(h, 0.5);
    for (slong L = 1; L <= 200; L += 37) {
        fmpz_set_si(n, L);
        ck_assert_int_eq(embz_error(res, f, n, q, EMBZ_METHOD_AUTO, 64, &err), EMBZ_OK);
        ck_assert(arb_contains(res->error, h));
    }
    arb_clear(h);
    /* bad counts and ranges are domain errors that say why */
    embz_family_clear(f);
    embz_family_init(f);
    ck_assert_int_eq(embz_family_parse_text(f, "level = 1/i\ncount = i/2\nfirst = 1\nlast = n\n",
                                            "b.fam", &err), EMBZ_OK);
    fmpz_set_si(n, 5);
    ck_assert_int_eq(embz_error(res, f, n, q, EMBZ_METHOD_AUTO, 64, &err), EMBZ_ERR_DOMAIN);
    ck_assert(strstr(err.text, "count must be an exact non-negative integer at i = 1") != NULL);
    fmpz_clear(n);
    embz_error_result_clear(res);
    embz_error_result_clear(ref);
    embz_target_clear(q);
    embz_family_clear(f);
    embz_family_clear(g);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("error");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_threshold);
    tcase_add_test(tc, test_fallback);
    tcase_add_test(tc, test_workspace);
    tcase_add_test(tc, test_threads);
    tcase_add_test(tc, test_side);
    tcase_add_test(tc, test_how_words);
    tcase_add_test(tc, test_level_family);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
