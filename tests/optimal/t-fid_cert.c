/* The certificates of the fidelity-type optimum (fid_cert.c) against outside references:
 *  - the lower end equals O(p, p (x) u_d)^2 computed by measure's explicit overlap of the
 *    state p = a^2 / |a|^2 and the tensor product formed entry by entry (no tree formula),
 *    and F_max of that state (measure's exact hull) is at least it;
 *  - lambda_max of the dense tree matrix, enclosed by arb's matrix code alone (QR, arb's
 *    certified global eigenvalue radius, a dense Rayleigh quotient), lies in the certified
 *    enclosure, f_lower <= lambda^2 / d <= f_upper, for every n <= 40 and d in {2, 3, 5};
 *  - a vector that is not sorted and multipliers that decrease are refused. */
#include "topt.h"

#define PREC 128

static void state_of(embz_qvec_t p, const fmpz *a, slong n)
{
    tu_qvec_alloc(p, n);
    fmpz_t S, t;
    fmpz_init(S); fmpz_init(t);
    for (slong j = 0; j < n; j++) fmpz_addmul(S, a + j, a + j);
    for (slong j = 0; j < n; j++) {
        fmpz_mul(t, a + j, a + j);
        fmpq_set_fmpz_frac(p->p + j, t, S);
    }
    fmpz_clear(S); fmpz_clear(t);
}

/* the measures of p -> p (x) u_d from measure's explicit vector code */
static void explicit_measures(arb_t O2, arb_t F, const embz_qvec_t p, ulong d)
{
    embz_qvec_t u, r;
    embz_qvec_init(u); embz_qvec_init(r);
    tu_qvec_alloc(u, (long) d);
    for (ulong j = 0; j < d; j++) fmpq_set_si(u->p + j, 1, d);
    tu_qvec_tensor(r, p, u);
    embz_qvec_overlap(O2, p, r, PREC);
    arb_sqr(O2, O2, PREC);
    embz_qvec_fidelity(F, NULL, NULL, p, r, PREC);
    embz_qvec_clear(u); embz_qvec_clear(r);
}

/* [lo, hi] <- an enclosure of the largest eigenvalue of the dense tree matrix by arb's matrix
 * code alone: hi = the largest approximate eigenvalue (acb_mat_approx_eig_qr) plus arb's
 * certified radius within which every eigenvalue lies (acb_mat_eig_global_enclosure; the
 * matrix is symmetric, so diagonalisable), lo = the Rayleigh quotient of the approximate
 * eigenvector, in ball arithmetic. Returns 0 if an end is not finite. */
static int dense_lambda(arb_t lo, arb_t hi, slong n, ulong d)
{
    acb_mat_t A, R;
    acb_mat_init(A, n, n);
    acb_mat_init(R, n, n);
    acb_ptr E = _acb_vec_init(n);
    acb_one(acb_mat_entry(A, 0, 0));
    for (slong j = 2; j <= n; j++) {
        slong k = (j + (slong) d - 1) / (slong) d;     /* ceil(j / d), written out here */
        acb_set_d(acb_mat_entry(A, j - 1, k - 1), 0.5);
        acb_set_d(acb_mat_entry(A, k - 1, j - 1), 0.5);
    }
    /* the approximations need not have converged: both ends below are valid for any */
    acb_mat_approx_eig_qr(E, NULL, R, A, NULL, 100 * n, PREC);
    int ok = 1;
    {
        mag_t eps;
        mag_init(eps);
        acb_mat_eig_global_enclosure(eps, A, E, R, PREC);
        slong best = 0;
        for (slong i = 1; i < n; i++)
            if (arf_cmp(arb_midref(acb_realref(E + i)), arb_midref(acb_realref(E + best))) > 0)
                best = i;
        arb_set(hi, acb_realref(E + best));
        arb_add_error_mag(hi, eps);
        arb_t s, t, u, v;
        arb_init(s); arb_init(t); arb_init(u); arb_init(v);
        for (slong i = 0; i < n; i++) {                  /* v^T A v and v^T v */
            arb_zero(u);
            for (slong j = 0; j < n; j++) {
                arb_mul(v, acb_realref(acb_mat_entry(A, i, j)),
                        acb_realref(acb_mat_entry(R, j, best)), PREC);
                arb_add(u, u, v, PREC);
            }
            arb_addmul(s, u, acb_realref(acb_mat_entry(R, i, best)), PREC);
            arb_addmul(t, acb_realref(acb_mat_entry(R, i, best)),
                       acb_realref(acb_mat_entry(R, i, best)), PREC);
        }
        arb_div(lo, s, t, PREC);
        arb_clear(s); arb_clear(t); arb_clear(u); arb_clear(v);
        mag_clear(eps);
        ok = arb_is_finite(lo) && arb_is_finite(hi);
    }
    _acb_vec_clear(E, n);
    acb_mat_clear(A); acb_mat_clear(R);
    return ok;
}

START_TEST(test_against_dense)
{
    ulong ds[] = { 2, 3, 5 };
    arb_t lam, lam2, t, O2, F;
    fmpq_t lo, hi;
    arb_init(lam); arb_init(lam2); arb_init(t); arb_init(O2); arb_init(F);
    fmpq_init(lo); fmpq_init(hi);
    for (int k = 0; k < 3; k++) {
        ulong d = ds[k];
        for (slong n = 1; n <= 40; n++) {
            double *x = malloc(sizeof(double) * n), *ell = malloc(sizeof(double) * n), l;
            fmpz *a = _fmpz_vec_init(n);
            slong bits;
            ck_assert(_embz_opt_perron_d(x, ell, &l, n, d));
            _embz_opt_fid_scale(a, &bits, x, n);
            ck_assert(_embz_opt_fid_lower(lo, a, n, d));
            ck_assert(_embz_opt_fid_upper(hi, ell, n, d, PREC));
            /* the lower end is the state's overlap squared, by the explicit code */
            embz_qvec_t p;
            embz_qvec_init(p);
            state_of(p, a, n);
            explicit_measures(O2, F, p, d);
            arb_set_fmpq(t, lo, PREC);
            ck_assert_msg(arb_overlaps(t, O2), "lower end != explicit overlap at n=%ld d=%lu",
                          (long) n, d);
            arb_sub(t, F, t, PREC);
            ck_assert(!arb_is_negative(t));                     /* F_max >= O^2 */
            arb_set_fmpq(t, hi, PREC);
            arb_sub(t, t, F, PREC);
            ck_assert(!arb_is_negative(t));                     /* F_max <= upper end */
            embz_qvec_clear(p);
            /* the dense eigenvalue lies in the enclosure: lo <= lambda_hi^2/d and
               lambda_lo^2/d <= hi */
            ck_assert_msg(dense_lambda(lam, lam2, n, d), "no dense enclosure at n=%ld", (long) n);
            arb_sub(t, lam2, lam, PREC);
            ck_assert_msg(arb_is_finite(t) && arf_cmpabs_2exp_si(arb_midref(t), -60) < 0,
                          "the dense enclosure is too wide at n=%ld d=%lu", (long) n, d);
            arb_sqr(lam2, lam2, PREC);
            arb_div_ui(lam2, lam2, d, PREC);
            arb_set_fmpq(t, lo, PREC);
            arb_sub(t, lam2, t, PREC);
            ck_assert_msg(!arb_is_negative(t), "lambda^2/d below the lower end at n=%ld d=%lu",
                          (long) n, d);
            arb_sqr(lam, lam, PREC);
            arb_div_ui(lam, lam, d, PREC);
            arb_set_fmpq(t, hi, PREC);
            arb_sub(t, t, lam, PREC);
            ck_assert_msg(!arb_is_negative(t), "lambda^2/d above the upper end at n=%ld d=%lu",
                          (long) n, d);
            /* and the enclosure is narrow */
            fmpq_t w;
            fmpq_init(w);
            fmpq_sub(w, hi, lo);
            ck_assert(fmpq_sgn(w) >= 0 && fmpq_get_d(w) < 1e-13);
            fmpq_clear(w);
            _fmpz_vec_clear(a, n);
            free(x); free(ell);
        }
    }
    arb_clear(lam); arb_clear(lam2); arb_clear(t); arb_clear(O2); arb_clear(F);
    fmpq_clear(lo); fmpq_clear(hi);
}
END_TEST

START_TEST(test_refusals)
{
    fmpz a[3];
    fmpq_t f;
    fmpq_init(f);
    for (int i = 0; i < 3; i++) fmpz_init(a + i);
    fmpz_set_ui(a + 0, 5); fmpz_set_ui(a + 1, 3); fmpz_set_ui(a + 2, 4);   /* not sorted */
    ck_assert(!_embz_opt_fid_lower(f, a, 3, 2));
    fmpz_set_ui(a + 2, 0);                                              /* not positive */
    ck_assert(!_embz_opt_fid_lower(f, a, 3, 2));
    fmpz_set_ui(a + 2, 3);
    ck_assert(_embz_opt_fid_lower(f, a, 3, 2));
    double ell[3] = { 1.0, 1.5, 1.2 };                                  /* decreasing */
    ck_assert(!_embz_opt_fid_upper(f, ell, 3, 2, PREC));
    ell[2] = 1.5;
    ck_assert(_embz_opt_fid_upper(f, ell, 3, 2, PREC));
    for (int i = 0; i < 3; i++) fmpz_clear(a + i);
    fmpq_clear(f);
}
END_TEST

int main(void)
{
    Suite *s = suite_create("optimal-fid_cert");
    TCase *tc = tcase_create("fid_cert");
    tcase_set_timeout(tc, 600);
    tcase_add_test(tc, test_against_dense);
    tcase_add_test(tc, test_refusals);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
