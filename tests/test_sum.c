/* Tests of the certified Euler–Maclaurin tail sums (src/sum/sum.h, internal).
 *
 * Every check compares the tail object with an outside reference: FLINT's exact harmonic
 * numbers, arb's digamma and Hurwitz zeta functions, plain arb loops over the weights written
 * directly with arb functions (not through the expression evaluator), closed-form integrals,
 * and finite differences of the tail sum itself for the Taylor coefficients. */
#include <check.h>
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include "embz.h"
#include "sum/sum.h"
#include "testutil.h"

static int quick(void)
{
    if (getenv("EMBZ_FULL") != NULL) return 0;
#if defined(__SANITIZE_ADDRESS__)
    return 1;
#else
    return getenv("EMBZ_QUICK") != NULL;
#endif
}

static void parse_or_die(embz_expr_t e, const char *text)
{
    embz_err_t err;
    embz_err_clear(&err);
    embz_expr_init(e);
    int st = embz_expr_parse(e, text, NULL, 0, &err);
    ck_assert_msg(st == EMBZ_OK, "parse '%s': %s", text, err.text);
}

/* 10^e as an fmpz */
static void ten_pow(fmpz_t r, ulong e) { fmpz_set_ui(r, 10); fmpz_pow_ui(r, r, e); }

/* finite with radius below bound */
static int rad_below(const arb_t x, double bound)
{
    return arb_is_finite(x) && mag_get_d(arb_radref(x)) < bound;
}

/* rad(x) <= |mid(x)| * 2^-bits */
static int rel_ok(const arb_t x, slong bits)
{
    return arb_is_finite(x) && arb_rel_accuracy_bits(x) >= bits;
}

static int init_tail(embz_tail_t t, const embz_expr_t w, const fmpz_t n, slong M,
                     const fmpz_t end, slong prec)
{
    embz_err_t err;
    embz_err_clear(&err);
    int st = embz_tail_init(t, w, n, M, end, prec, &err);
    ck_assert_msg(st == EMBZ_OK, "embz_tail_init failed (%d): %s", st, err.text);
    return st;
}

/* ---------------------------------------------------------------------------------------
 * 1/i: T(k) + H_M = H_k, exact harmonic numbers from FLINT (arith_harmonic_number). */
START_TEST(test_harmonic_exact)
{
    const slong M = 64, prec = 128, top = 100000;
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n, end;
    fmpq_t Hk, HM;
    arb_t x, T;
    flint_rand_t st;
    flint_randinit(st);
    fmpz_init(n); fmpz_init(end);
    fmpq_init(Hk); fmpq_init(HM);
    arb_init(x); arb_init(T);
    parse_or_die(w, "1/i");
    fmpz_set_si(end, top);
    fmpz_set(n, end);
    init_tail(t, w, n, M, end, prec);
    ck_assert_int_eq(t->dir, 1);
    arith_harmonic_number(HM, M);
    int count = quick() ? 15 : 60;
    for (int it = 0; it < count + 4; it++) {
        slong k;
        if (it == 0) k = M;
        else if (it == 1) k = M + 1;
        else if (it == 2) k = 100;
        else if (it == 3) k = top;
        else k = 100 + (slong) n_randint(st, top - 100 + 1);
        arith_harmonic_number(Hk, k);
        fmpq_sub(Hk, Hk, HM);         /* sum_{M < i <= k} 1/i, exactly */
        arb_set_si(x, k);
        ck_assert_int_eq(embz_tail_sum(T, t, x, prec), EMBZ_OK);
        ck_assert_msg(arb_contains_fmpq(T, Hk), "T(%ld) does not contain H_k - H_M", (long) k);
        ck_assert_msg(rad_below(T, 1e-30), "T(%ld) radius too large: %g", (long) k,
                      mag_get_d(arb_radref(T)));
    }
    embz_tail_clear(t);
    embz_expr_clear(w);
    fmpz_clear(n); fmpz_clear(end);
    fmpq_clear(Hk); fmpq_clear(HM);
    arb_clear(x); arb_clear(T);
    flint_randclear(st);
}
END_TEST

/* H_k = digamma(k + 1) + gamma (arb_digamma) at k = 10^30 and k = 10^1000. */
static void digamma_case(ulong e, slong prec)
{
    const slong M = 64;
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n;
    fmpq_t HM;
    arb_t x, T, ref, g, h;
    fmpz_init(n);
    fmpq_init(HM);
    arb_init(x); arb_init(T); arb_init(ref); arb_init(g); arb_init(h);
    parse_or_die(w, "1/i");
    ten_pow(n, e);
    init_tail(t, w, n, M, n, prec);
    arb_set_fmpz(x, n);
    ck_assert_int_eq(embz_tail_sum(T, t, x, prec), EMBZ_OK);
    arith_harmonic_number(HM, M);
    arb_set_fmpq(h, HM, prec);
    arb_add(T, T, h, prec);                       /* H_k from the engine */
    arb_add_ui(ref, x, 1, prec + 16 + 4 * (slong) e);
    arb_digamma(ref, ref, prec);
    arb_const_euler(g, prec);
    arb_add(ref, ref, g, prec);                   /* H_k from digamma */
    ck_assert_msg(arb_overlaps(T, ref), "H_(10^%lu): tail sum does not overlap digamma", e);
    ck_assert_msg(rad_below(T, 1e-30), "H_(10^%lu): radius %g", e, mag_get_d(arb_radref(T)));
    embz_tail_clear(t);
    embz_expr_clear(w);
    fmpz_clear(n);
    fmpq_clear(HM);
    arb_clear(x); arb_clear(T); arb_clear(ref); arb_clear(g); arb_clear(h);
}

/* Far levels (lower Euler-Maclaurin orders from X_j = 2^b_j on): at points beyond several
 * thresholds every valid level must enclose H_x - H_M, taken from arb_digamma. */
START_TEST(test_harmonic_levels)
{
    const slong M = 64, prec = 128;
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n, X;
    fmpq_t HM;
    arb_t x, T, ref, g, h;
    fmpz_init(n); fmpz_init(X);
    fmpq_init(HM);
    arb_init(x); arb_init(T); arb_init(ref); arb_init(g); arb_init(h);
    parse_or_die(w, "1/i");
    ten_pow(n, 80);
    init_tail(t, w, n, M, n, prec);
    ck_assert_msg(t->nlev >= 2, "expected far levels for 1/i up to 10^80, got %ld", t->nlev);
    arith_harmonic_number(HM, M);
    arb_set_fmpq(h, HM, prec);
    arb_const_euler(g, prec);
    static const slong bits[] = { 20, 33, 47, 65, 100, 200, 265 };
    for (int i = 0; i < 7; i++) {
        fmpz_one(X);
        fmpz_mul_2exp(X, X, (ulong) bits[i]);
        fmpz_add_ui(X, X, 12345);
        if (fmpz_cmp(X, n) > 0) continue;
        arb_set_fmpz(x, X);
        arb_add_ui(ref, x, 1, 2 * prec + bits[i]);
        arb_digamma(ref, ref, prec);
        arb_add(ref, ref, g, prec);
        arb_sub(ref, ref, h, prec);                  /* H_X - H_M */
        slong top = embz_tail_level(t, x);
        for (slong j = 0; j <= top; j++) {
            ck_assert_int_eq(embz_tail_sum_level(T, t, x, j, prec), EMBZ_OK);
            ck_assert_msg(arb_overlaps(T, ref), "level %ld at 2^%ld: no overlap", (long) j,
                          (long) bits[i]);
            ck_assert_msg(rad_below(T, 1e-30), "level %ld at 2^%ld: radius %g", (long) j,
                          (long) bits[i], mag_get_d(arb_radref(T)));
        }
    }
    embz_tail_clear(t);
    embz_expr_clear(w);
    fmpz_clear(n); fmpz_clear(X);
    fmpq_clear(HM);
    arb_clear(x); arb_clear(T); arb_clear(ref); arb_clear(g); arb_clear(h);
}
END_TEST

START_TEST(test_harmonic_digamma_1e30) { digamma_case(30, 128); }
END_TEST
START_TEST(test_harmonic_digamma_1e1000) { digamma_case(1000, 128); }
END_TEST

/* ---------------------------------------------------------------------------------------
 * i^-s: sum_{i <= k} i^-s = zeta(s) - zeta(s, k + 1) (arb_hurwitz_zeta), for s = 1/2, 2, 3/2
 * and s = -2 (weights i^2, increasing). zeta(1/2) < 0; the identity still holds by analytic
 * continuation (both sides are entire in s apart from s = 1). */
static void zeta_case(const char *text, slong snum, slong sden)
{
    const slong M = 64, prec = 128;
    const ulong exps[3] = { 6, 30, 100 };
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n;
    fmpq_t sq;
    arb_t s, x, T, head, ref, z, v;
    fmpz_init(n);
    fmpq_init(sq);
    arb_init(s); arb_init(x); arb_init(T); arb_init(head); arb_init(ref); arb_init(z);
    arb_init(v);
    fmpq_set_si(sq, snum, sden);
    arb_set_fmpq(s, sq, prec);
    parse_or_die(w, text);
    /* the head, written directly: sum_{i <= M} i^-s */
    arb_zero(head);
    for (slong i = 1; i <= M; i++) {
        arb_set_si(v, i);
        arb_neg(z, s);
        arb_pow(v, v, z, prec);
        arb_add(head, head, v, prec);
    }
    arb_zeta(z, s, prec);
    /* one tail object covering [M, 10^100]: its remainder bound holds for every upper limit,
     * so every partial sum must be enclosed (accuracy is only required at the far end: for
     * increasing weights the uniform bound is dominated by the end of the range) */
    ten_pow(n, 100);
    init_tail(t, w, n, M, n, prec);
    ck_assert_int_eq(t->dir, snum > 0 ? 1 : -1);
    for (int pass = 0; pass < 2; pass++) {
        for (int j = 0; j < 3; j++) {
            ten_pow(n, exps[j]);
            if (pass == 1) {
                /* a tail object ending exactly at k */
                embz_tail_clear(t);
                init_tail(t, w, n, M, n, prec);
            }
            arb_set_fmpz(x, n);
            ck_assert_int_eq(embz_tail_sum(T, t, x, prec), EMBZ_OK);
            arb_add(T, T, head, prec);
            arb_add_ui(v, x, 1, prec);
            arb_hurwitz_zeta(ref, s, v, prec);
            arb_sub(ref, z, ref, prec);
            ck_assert_msg(arb_overlaps(T, ref), "%s at k = 10^%lu: no overlap with Hurwitz zeta",
                          text, exps[j]);
            if (pass == 1 || j == 2 || snum > 0)
                ck_assert_msg(rel_ok(T, 100), "%s at k = 10^%lu (pass %d): relative accuracy %ld "
                              "bits", text, exps[j], pass, (long) arb_rel_accuracy_bits(T));
        }
    }
    embz_tail_clear(t);
    embz_expr_clear(w);
    fmpz_clear(n);
    fmpq_clear(sq);
    arb_clear(s); arb_clear(x); arb_clear(T); arb_clear(head); arb_clear(ref); arb_clear(z);
    arb_clear(v);
}

START_TEST(test_zeta_half) { zeta_case("i^-0.5", 1, 2); }
END_TEST
START_TEST(test_zeta_two) { zeta_case("1/i^2", 2, 1); }
END_TEST
START_TEST(test_zeta_three_halves) { zeta_case("i^(-1.5)", 3, 2); }
END_TEST
START_TEST(test_zeta_minus_two) { zeta_case("i^2", -2, 1); }
END_TEST

/* ---------------------------------------------------------------------------------------
 * Explicit arb sums at moderate sizes: an increasing weight sqrt(i), and n-dependent weights
 * at a fixed n. The reference weights are computed with arb functions directly. */
typedef void (*direct_w)(arb_t res, slong i, const fmpz_t n, slong prec);

static void w_sqrt(arb_t r, slong i, const fmpz_t n, slong prec)
{
    (void) n;
    arb_sqrt_ui(r, (ulong) i, prec);
}

/* exp(-i/n) */
static void w_expdecay(arb_t r, slong i, const fmpz_t n, slong prec)
{
    arb_set_si(r, i);
    arb_div_fmpz(r, r, n, prec);
    arb_neg(r, r);
    arb_exp(r, r, prec);
}

/* i^(-1 + 1/log(n+1)) */
static void w_tilted(arb_t r, slong i, const fmpz_t n, slong prec)
{
    arb_t a, l;
    arb_init(a); arb_init(l);
    arb_set_fmpz(a, n);
    arb_add_ui(a, a, 1, prec);
    arb_log(a, a, prec);
    arb_inv(a, a, prec);
    arb_sub_ui(a, a, 1, prec);
    arb_log_ui(l, (ulong) i, prec);
    arb_mul(a, a, l, prec);
    arb_exp(r, a, prec);
    arb_clear(a); arb_clear(l);
}

/* n/(n + i^2): n-dependent, decreasing */
static void w_lorentz(arb_t r, slong i, const fmpz_t n, slong prec)
{
    arb_t d;
    arb_init(d);
    arb_set_si(d, i);
    arb_mul(d, d, d, prec);
    arb_add_fmpz(d, d, n, prec);
    arb_set_fmpz(r, n);
    arb_div(r, r, d, prec);
    arb_clear(d);
}

static void explicit_case(const char *text, direct_w fn, slong nval, slong top, int dir,
                          slong bits)
{
    const slong M = 64, prec = 128;
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n, end;
    arb_t x, T, v;
    arb_ptr cum;
    flint_rand_t st;
    flint_randinit(st);
    fmpz_init(n); fmpz_init(end);
    arb_init(x); arb_init(T); arb_init(v);
    parse_or_die(w, text);
    fmpz_set_si(n, nval);
    fmpz_set_si(end, top);
    init_tail(t, w, n, M, end, prec);
    ck_assert_msg(t->dir == dir, "%s: direction %d, expected %d", text, t->dir, dir);
    cum = _arb_vec_init(top + 1);        /* cum[k] = sum_{M < i <= k} w(i) */
    for (slong i = M + 1; i <= top; i++) {
        fn(v, i, n, prec);
        arb_add(cum + i, cum + i - 1, v, prec);
    }
    int count = quick() ? 10 : 40;
    for (int it = 0; it < count; it++) {
        slong k = (it == 0) ? top : (it == 1) ? M + 1 : M + 1 + (slong) n_randint(st, top - M);
        arb_set_si(x, k);
        ck_assert_int_eq(embz_tail_sum(T, t, x, prec), EMBZ_OK);
        ck_assert_msg(arb_overlaps(T, cum + k), "%s (n = %ld): T(%ld) misses the explicit sum",
                      text, (long) nval, (long) k);
        ck_assert_msg(rel_ok(T, bits), "%s: T(%ld) relative accuracy %ld bits", text, (long) k,
                      (long) arb_rel_accuracy_bits(T));
    }
    _arb_vec_clear(cum, top + 1);
    embz_tail_clear(t);
    embz_expr_clear(w);
    fmpz_clear(n); fmpz_clear(end);
    arb_clear(x); arb_clear(T); arb_clear(v);
    flint_randclear(st);
}

START_TEST(test_explicit_sqrt) { explicit_case("i^0.5", w_sqrt, 1, 5000, -1, 100); }
END_TEST
START_TEST(test_explicit_expdecay) { explicit_case("exp(-i/n)", w_expdecay, 2000, 6000, 1, 100); }
END_TEST
START_TEST(test_explicit_tilted)
{
    explicit_case("i^(-1 + 1/log(n+1))", w_tilted, 10000, 10000, 1, 100);
}
END_TEST
/* Poles at +-i sqrt(n), close to the real axis: the engine picks a lower Euler-Maclaurin order
 * here (about 92 bits of 128 were observed), so only 85 bits are required. */
START_TEST(test_explicit_lorentz)
{
    explicit_case("n/(n + i^2)", w_lorentz, 3000, 8000, 1, 85);
}
END_TEST

/* ---------------------------------------------------------------------------------------
 * Taylor coefficients of T~ against finite differences of embz_tail_sum at 256 bits:
 * c1 = scale T~'(x), c2 = scale^2 T~''(x)/2. Central differences with step h = x 2^-48 have
 * truncation error about (h/x)^2 = 2^-96 relative (the derivatives of these weights scale
 * like f/x^j), far above the 256-bit rounding and the remainder bound divided by h^2. */
static void series_case(const char *text, const char *endtext)
{
    const slong M = 64, prec = 256;
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n;
    embz_err_t err;
    arb_t x, xp, xm, h, Tp, Tm, T0, d1, d2, sc, diff;
    arb_ptr c = _arb_vec_init(3), g = _arb_vec_init(1);
    flint_rand_t st;
    flint_randinit(st);
    fmpz_init(n);
    arb_init(x); arb_init(xp); arb_init(xm); arb_init(h); arb_init(Tp); arb_init(Tm);
    arb_init(T0); arb_init(d1); arb_init(d2); arb_init(sc); arb_init(diff);
    embz_err_clear(&err);
    ck_assert_int_eq(embz_size_parse(n, endtext, &err), EMBZ_OK);
    parse_or_die(w, text);
    init_tail(t, w, n, M, n, prec);
    double lmax = (double) fmpz_bits(n) * 0.6931 - 1.0;
    int count = quick() ? 6 : 20;
    for (int it = 0; it < count; it++) {
        /* x = e^u, u uniform in [log(M+1), lmax], rounded to a double (exact in arb) */
        double u = log((double) (M + 1)) + (lmax - log((double) (M + 1)))
                   * (double) n_randint(st, 1000000) / 1e6;
        arb_set_d(x, exp(u));
        arf_t hx;
        arf_init(hx);
        arf_set_ui_2exp_si(hx, 1, arf_abs_bound_lt_2exp_si(arb_midref(x)) - 48);
        arb_set_arf(h, hx);
        arf_clear(hx);
        arb_add(xp, x, h, prec);
        arb_sub(xm, x, h, prec);
        ck_assert_int_eq(embz_tail_sum(Tp, t, xp, prec), EMBZ_OK);
        ck_assert_int_eq(embz_tail_sum(Tm, t, xm, prec), EMBZ_OK);
        ck_assert_int_eq(embz_tail_sum(T0, t, x, prec), EMBZ_OK);
        arb_sub(d1, Tp, Tm, prec);
        arb_div(d1, d1, h, prec);
        arb_mul_2exp_si(d1, d1, -1);                  /* ~ T'(x) */
        arb_add(d2, Tp, Tm, prec);
        arb_submul_ui(d2, T0, 2, prec);
        arb_div(d2, d2, h, prec);
        arb_div(d2, d2, h, prec);
        arb_mul_2exp_si(d2, d2, -1);                  /* ~ T''(x)/2 */
        /* a random scale, exact */
        arb_set_si(sc, 1 + (slong) n_randint(st, 1000));
        arb_mul_2exp_si(sc, sc, -(slong) n_randint(st, 12));
        ck_assert_int_eq(embz_tail_series(c, t, x, sc, 3, prec), EMBZ_OK);
        ck_assert_msg(arb_is_zero(c), "%s: coefficient 0 is not 0", text);
        arb_mul(d1, d1, sc, prec);
        arb_mul(d2, d2, sc, prec);
        arb_mul(d2, d2, sc, prec);
        arb_sub(diff, c + 1, d1, prec);
        ck_assert_msg(arb_is_finite(diff) && arb_rel_accuracy_bits(c + 1) > 150,
                      "%s: coefficient 1 not finite or not accurate", text);
        {
            /* |c1 - d1| <= 2^-80 |c1| */
            arb_t tol;
            arb_init(tol);
            arb_abs(tol, c + 1);
            arb_mul_2exp_si(tol, tol, -80);
            arb_abs(diff, diff);
            ck_assert_msg(arb_le(diff, tol), "%s at x = %g: c1 differs from the finite difference",
                          text, exp(u));
            arb_sub(diff, c + 2, d2, prec);
            arb_abs(diff, diff);
            arb_abs(tol, c + 2);
            arb_mul_2exp_si(tol, tol, -60);
            ck_assert_msg(arb_le(diff, tol), "%s at x = %g: c2 differs from the second difference",
                          text, exp(u));
            arb_clear(tol);
        }
        /* weight series coefficient 0 is the weight itself */
        ck_assert_int_eq(embz_tail_weight_series(g, t, x, sc, 1, prec), EMBZ_OK);
        ck_assert_int_eq(embz_expr_eval_arb(d1, w, x, t->n, prec), EMBZ_OK);
        ck_assert(arb_overlaps(g, d1));
    }
    embz_tail_clear(t);
    embz_expr_clear(w);
    fmpz_clear(n);
    arb_clear(x); arb_clear(xp); arb_clear(xm); arb_clear(h); arb_clear(Tp); arb_clear(Tm);
    arb_clear(T0); arb_clear(d1); arb_clear(d2); arb_clear(sc); arb_clear(diff);
    _arb_vec_clear(c, 3);
    _arb_vec_clear(g, 1);
    flint_randclear(st);
}

START_TEST(test_series_inverse_log) { series_case("1/(i*log(i))", "10^12"); }
END_TEST
START_TEST(test_series_power) { series_case("i^-0.5", "10^15"); }
END_TEST
START_TEST(test_series_increasing) { series_case("sqrt(i)*log(i)", "10^10"); }
END_TEST

/* ---------------------------------------------------------------------------------------
 * Integrals in closed form: int_M^x dy/y = log(x/M); int_M^x dy/(y log y) = log log x - log log M. */
static void integral_case(const char *text, int kind, ulong e)
{
    const slong M = 64, prec = 128;
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n;
    arb_t x, I, ref, lm;
    flint_rand_t st;
    flint_randinit(st);
    fmpz_init(n);
    arb_init(x); arb_init(I); arb_init(ref); arb_init(lm);
    parse_or_die(w, text);
    ten_pow(n, e);
    init_tail(t, w, n, M, n, prec);
    int count = quick() ? 8 : 25;
    for (int it = 0; it < count; it++) {
        if (it == 0) arb_set_fmpz(x, n);
        else if (it == 1) arb_set_si(x, M);
        else {
            /* x = 10^(random real in [2, e]) as an exact ball midpoint */
            arb_set_si(x, 2000 + (slong) n_randint(st, (e - 2) * 1000 + 1));
            arb_div_ui(x, x, 1000, prec);
            arb_set_ui(lm, 10);
            arb_pow(x, lm, x, prec);
            arf_set(arb_midref(lm), arb_midref(x));
            arb_set_arf(x, arb_midref(lm));
            if (arf_cmp_si(arb_midref(x), M + 1) < 0) arb_set_si(x, M + 1);
        }
        ck_assert_int_eq(embz_tail_integral(I, t, x, prec), EMBZ_OK);
        arb_log(ref, x, prec);
        arb_log_ui(lm, M, prec);
        if (kind == 1) {
            arb_log(ref, ref, prec);
            arb_log(lm, lm, prec);
        }
        arb_sub(ref, ref, lm, prec);
        ck_assert_msg(arb_overlaps(I, ref), "%s: integral misses the closed form", text);
        ck_assert_msg(rad_below(I, 1e-30), "%s: integral radius %g", text,
                      mag_get_d(arb_radref(I)));
    }
    embz_tail_clear(t);
    embz_expr_clear(w);
    fmpz_clear(n);
    arb_clear(x); arb_clear(I); arb_clear(ref); arb_clear(lm);
    flint_randclear(st);
}

/* Short u-integrals (the Taylor path of the integrator, and the adaptive one beyond it)
 * against closed forms: phi = u^-2 for w = 1/(i log(i)^2), phi = e^(u/2) for w = i^-0.5. */
START_TEST(test_integral_short)
{
    const slong M = 64, prec = 128;
    static const char *const ws[] = { "1/(i*log(i)^2)", "i^-0.5" };
    flint_rand_t st;
    flint_randinit(st);
    for (int k = 0; k < 2; k++) {
        embz_expr_t w;
        embz_tail_t t;
        fmpz_t n;
        arb_t a, b, I, ref, u;
        fmpz_init(n);
        arb_init(a); arb_init(b); arb_init(I); arb_init(ref); arb_init(u);
        parse_or_die(w, ws[k]);
        ten_pow(n, 40);
        init_tail(t, w, n, M, n, prec);
        for (int it = 0; it < 30; it++) {
            /* a in [5, 80], length up to 3 (mostly beyond the Taylor path's reach) or, every
             * other time, up to 0.05 */
            arb_set_ui(a, 5000 + n_randint(st, 75001));
            arb_div_ui(a, a, 1000, prec);
            arb_set_ui(b, 1 + n_randint(st, (it % 2) ? 50 : 3000));
            arb_div_ui(b, b, 1000, prec);
            arb_add(b, b, a, prec);
            ck_assert_int_eq(embz_tail_integral_u(I, t, a, b, prec), EMBZ_OK);
            if (k == 0) {
                arb_inv(ref, a, prec);
                arb_inv(u, b, prec);
                arb_sub(ref, ref, u, prec);
            } else {
                arb_mul_2exp_si(u, b, -1);
                arb_exp(ref, u, prec);
                arb_mul_2exp_si(u, a, -1);
                arb_exp(u, u, prec);
                arb_sub(ref, ref, u, prec);
                arb_mul_2exp_si(ref, ref, 1);
            }
            ck_assert_msg(arb_overlaps(I, ref), "%s: short integral misses the closed form",
                          ws[k]);
            ck_assert_msg(arb_rel_accuracy_bits(I) >= prec - 16, "%s: %ld bits", ws[k],
                          (long) arb_rel_accuracy_bits(I));
        }
        ck_assert_msg(t->taylor_ok > 0, "%s: the Taylor path was never taken", ws[k]);
        embz_tail_clear(t);
        embz_expr_clear(w);
        fmpz_clear(n);
        arb_clear(a); arb_clear(b); arb_clear(I); arb_clear(ref); arb_clear(u);
    }
    flint_randclear(st);
}
END_TEST

START_TEST(test_integral_log) { integral_case("1/i", 0, 60); }
END_TEST
START_TEST(test_integral_loglog) { integral_case("1/(i*log(i))", 1, 60); }
END_TEST

/* ---------------------------------------------------------------------------------------
 * Weights that are not monotone beyond M must be refused, never summed. */
static void refuse_case(const char *text, slong top)
{
    embz_expr_t w;
    embz_tail_t t;
    fmpz_t n;
    embz_err_t err;
    embz_err_clear(&err);
    fmpz_init(n);
    fmpz_set_si(n, top);
    parse_or_die(w, text);
    int st = embz_tail_init(t, w, n, 64, n, 128, &err);
    ck_assert_msg(st == EMBZ_ERR_UNSUPPORTED || st == EMBZ_ERR_NONSMOOTH,
                  "%s: expected a refusal, got status %d", text, st);
    ck_assert_int_eq(err.code, st);
    ck_assert_msg(strlen(err.text) > 0, "%s: refusal without a message", text);
    embz_tail_clear(t);
    embz_expr_clear(w);
    fmpz_clear(n);
}

START_TEST(test_refuse_sin) { refuse_case("1 + sin(i)/2", 1000000); }
END_TEST
START_TEST(test_refuse_sin_over_i) { refuse_case("(1 + sin(i)/2)/i", 1000000); }
END_TEST
START_TEST(test_refuse_valley) { refuse_case("(i - 100)^2 + 1", 10000); }
END_TEST
START_TEST(test_refuse_floor) { refuse_case("1/floor(sqrt(i))", 10000); }
END_TEST


/* the exact count for the threshold between q and q + 1: k = 0 for 1/i, 1 for sqrt(i) */
static void count_want(fmpz_t want, int k, const fmpz_t q, const fmpz_t upto, slong M)
{
    if (k == 0) {
        /* 1/i > 1/(q + 1/2) iff i <= q: indices M+1 .. min(q, upto) */
        if (fmpz_cmp(q, upto) > 0) fmpz_sub_si(want, upto, M);
        else fmpz_sub_si(want, q, M);
    } else {
        /* sqrt(i) > sqrt(q + 1/2) iff i >= q + 1: indices q+1 .. upto */
        if (fmpz_cmp(q, upto) >= 0) fmpz_zero(want);
        else fmpz_sub(want, upto, q);
    }
}

/* Counts N(v) = #{ M < i <= upto : w(i) > v } on a monotone tail, against closed forms:
 * 1/i > v iff i < 1/v, and sqrt(i) > v iff i > v^2 (exact integer arithmetic in the test). */
START_TEST(test_tail_count)
{
    flint_rand_t st;
    flint_randinit(st);
    slong prec = 128, M = 64;
    const char *texts[2] = { "1/i", "sqrt(i)" };
    for (int k = 0; k < 2; k++) {
        embz_expr_t w;
        embz_tail_t t;
        fmpz_t n, upto, got, want, q;
        arb_t v;
        parse_or_die(w, texts[k]);
        fmpz_init(n); fmpz_init(upto); fmpz_init(got); fmpz_init(want); fmpz_init(q);
        arb_init(v);
        fmpz_set_ui(n, 10);
        fmpz_pow_ui(n, n, 40);
        init_tail(t, w, n, M, n, prec);
        for (int j = 0; j < 200; j++) {
            /* a threshold strictly between integers' weights: v = 1/(m + 1/2) or sqrt(m + 1/2) */
            fmpz_set_ui(q, 1 + n_randint(st, 1000000));
            if (j % 3 == 0) fmpz_mul_2exp(q, q, 100);            /* beyond 10^30 as well */
            fmpz_add_ui(q, q, (ulong) M);
            fmpz_set_ui(upto, 10);
            fmpz_pow_ui(upto, upto, 35);
            arb_set_fmpz(v, q);
            {
                arb_t h;
                arb_init(h);
                arb_set_d(h, 0.5);
                arb_add(v, v, h, prec);
                arb_clear(h);
            }
            if (k == 0) arb_inv(v, v, prec); else arb_sqrt(v, v, prec);
            ck_assert_int_eq(embz_tail_count(got, t, v, upto, prec), EMBZ_OK);
            count_want(want, k, q, upto, M);
            ck_assert_msg(fmpz_equal(got, want), "%s: count mismatch", texts[k]);
        }
        embz_tail_clear(t);
        embz_expr_clear(w);
        fmpz_clear(n); fmpz_clear(upto); fmpz_clear(got); fmpz_clear(want); fmpz_clear(q);
        arb_clear(v);
    }
    flint_randclear(st);
}
END_TEST

/* Counts where weights tie with the threshold at the working precision (64 bits, indices up
 * to 2^120): lo <= N <= hi against the exact count of the closed forms above, the undecided
 * weights above v by at most tie (checked at 512 bits), and lo == hi, tie == 0 when the
 * precision suffices. */
START_TEST(test_tail_count_range)
{
    flint_rand_t st;
    flint_randinit(st);
    slong M = 64;
    const char *texts[2] = { "1/i", "sqrt(i)" };
    for (int k = 0; k < 2; k++) {
        embz_expr_t w;
        embz_tail_t t;
        fmpz_t n, upto, lo, hi, want, q, idx;
        arb_t v, tie, x, y;
        int ties = 0;
        parse_or_die(w, texts[k]);
        fmpz_init(n); fmpz_init(upto); fmpz_init(lo); fmpz_init(hi); fmpz_init(want);
        fmpz_init(q); fmpz_init(idx);
        arb_init(v); arb_init(tie); arb_init(x); arb_init(y);
        fmpz_one(n);
        fmpz_mul_2exp(n, n, 130);
        init_tail(t, w, n, M, n, 64);
        fmpz_one(upto);
        fmpz_mul_2exp(upto, upto, 120);
        for (int j = 0; j < 120; j++) {
            slong prec = (j % 4 == 0) ? 200 : 64;
            fmpz_set_ui(q, 1 + n_randint(st, 1000000));
            fmpz_mul_2exp(q, q, n_randint(st, 100));
            fmpz_add_ui(q, q, (ulong) M);
            /* v = 1/(q + 1/2) or sqrt(q + 1/2) at 512 bits */
            arb_set_fmpz(v, q);
            arb_set_d(x, 0.5);
            arb_add(v, v, x, 512);
            if (k == 0) arb_inv(v, v, 512); else arb_sqrt(v, v, 512);
            ck_assert_int_eq(embz_tail_count_range(lo, hi, tie, t, v, upto, prec), EMBZ_OK);
            count_want(want, k, q, upto, M);
            ck_assert_msg(fmpz_cmp(lo, want) <= 0 && fmpz_cmp(want, hi) <= 0,
                          "%s: the count is outside [lo, hi]", texts[k]);
            ck_assert(arb_is_exact(tie) && !arb_is_negative(tie));
            if (fmpz_cmp(lo, hi) < 0) {
                ties++;
                /* the largest undecided weight: index M + lo + 1 (1/i) or upto - hi + 1 */
                if (k == 0) fmpz_add_si(idx, lo, M + 1);
                else { fmpz_sub(idx, upto, hi); fmpz_add_ui(idx, idx, 1); }
                arb_set_fmpz(x, idx);
                if (k == 0) arb_inv(x, x, 512); else arb_sqrt(x, x, 512);
                arb_sub(y, x, v, 512);
                ck_assert_msg(arb_le(y, tie), "%s: an undecided weight exceeds v by more than tie",
                              texts[k]);
            } else {
                ck_assert(arb_is_zero(tie));
            }
            if (prec == 200 && fmpz_bits(q) < 100)
                ck_assert_msg(fmpz_equal(lo, hi), "%s: undecided at 200 bits", texts[k]);
        }
        ck_assert_msg(ties > 10, "%s: no ties seen (%d)", texts[k], ties);
        embz_tail_clear(t);
        embz_expr_clear(w);
        fmpz_clear(n); fmpz_clear(upto); fmpz_clear(lo); fmpz_clear(hi); fmpz_clear(want);
        fmpz_clear(q); fmpz_clear(idx);
        arb_clear(v); arb_clear(tie); arb_clear(x); arb_clear(y);
    }
    flint_randclear(st);
}
END_TEST

static Suite *sum_suite(void)
{
    Suite *s = suite_create("sum");
    TCase *tc = tcase_create("core");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_harmonic_exact);
    tcase_add_test(tc, test_harmonic_digamma_1e30);
    tcase_add_test(tc, test_harmonic_levels);
    tcase_add_test(tc, test_integral_short);
    tcase_add_test(tc, test_harmonic_digamma_1e1000);
    tcase_add_test(tc, test_zeta_half);
    tcase_add_test(tc, test_zeta_two);
    tcase_add_test(tc, test_zeta_three_halves);
    tcase_add_test(tc, test_zeta_minus_two);
    tcase_add_test(tc, test_explicit_sqrt);
    tcase_add_test(tc, test_explicit_expdecay);
    tcase_add_test(tc, test_explicit_tilted);
    tcase_add_test(tc, test_explicit_lorentz);
    tcase_add_test(tc, test_series_inverse_log);
    tcase_add_test(tc, test_series_power);
    tcase_add_test(tc, test_series_increasing);
    tcase_add_test(tc, test_integral_log);
    tcase_add_test(tc, test_integral_loglog);
    tcase_add_test(tc, test_refuse_sin);
    tcase_add_test(tc, test_refuse_sin_over_i);
    tcase_add_test(tc, test_refuse_valley);
    tcase_add_test(tc, test_refuse_floor);
    tcase_add_test(tc, test_tail_count);
    tcase_add_test(tc, test_tail_count_range);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    Suite *s = sum_suite();
    return tu_run_suite(s);
}
