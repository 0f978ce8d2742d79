/* The best F_max, purified distance and overlap at rank n for u_d: the Perron vector of the
 * tree matrix estimated in doubles (fid_perron.c), then the two certificates of fid_cert.c
 * (docs/optimal.md, section 6). */
#include <time.h>
#include "impl.h"

#define FID_PREC 128

void embz_optimal_fid_init(embz_optimal_fid_t r)
{
    r->measure = EMBZ_MEASURE_FIDELITY;
    r->d = 2;
    fmpz_init(r->n);
    r->levels = 0;
    fmpq_init(r->f_lower);
    fmpq_init(r->f_upper);
    arb_init(r->value);
    r->lambda = 0.0;
    r->bits = 0;
    r->seconds = 0.0;
}

void embz_optimal_fid_clear(embz_optimal_fid_t r)
{
    fmpq_clear(r->f_lower);
    fmpq_clear(r->f_upper);
    arb_clear(r->value);
    fmpz_clear(r->n);
}

int embz_optimal_fid(embz_optimal_fid_t res, embz_qvec_t state, const fmpz_t nz,
                     const embz_target_t q, int measure, embz_err_t *err)
{
    return _embz_opt_fid_run(res, state, nz, q, measure, 0, err);
}

int _embz_opt_fid_run(embz_optimal_fid_t res, embz_qvec_t state, const fmpz_t nz,
                      const embz_target_t q, int measure, int by_classes, embz_err_t *err)
{
    if (q->kind != EMBZ_TARGET_UNIFORM)
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "the optimum is known for uniform "
                            "targets only (ebit, ebits:J, uniform:D), not for the target %s",
                            q->label);
    if (measure != EMBZ_MEASURE_FIDELITY && measure != EMBZ_MEASURE_PURIFIED
        && measure != EMBZ_MEASURE_OVERLAP)
        return embz_err_set(err, EMBZ_ERR_UNSUPPORTED, "this optimum is for the measures "
                            "fidelity, purified and overlap");
    if (fmpz_cmp_ui(nz, 1) < 0)
        return embz_err_set(err, EMBZ_ERR_INPUT, "the rank n must be at least 1");
    if (fmpz_bits(nz) > EMBZ_OPTIMAL_FID_MAX_BITS)
        return embz_err_set(err, EMBZ_ERR_LIMIT, "the optimum for the measure %s is computed "
                            "for n < 2^%d only", embz_measure_name(measure),
                            EMBZ_OPTIMAL_FID_MAX_BITS);
    int flat = !by_classes && fmpz_cmp_si(nz, EMBZ_OPTIMAL_FID_MAX_N) <= 0;
    if (!flat && state != NULL)
        return embz_err_set(err, EMBZ_ERR_LIMIT, "the optimal state is formed for n <= %ld "
                            "(2^22) only", (long) EMBZ_OPTIMAL_FID_MAX_N);
    clock_t c0 = clock();
    res->measure = measure;
    res->d = q->d;
    fmpz_set(res->n, nz);
    res->levels = !flat;
    slong n = flat ? fmpz_get_si(nz) : 1;
    double *x = flint_malloc(sizeof(double) * n), *ell = flint_malloc(sizeof(double) * n);
    fmpz *a = _fmpz_vec_init(n);
    int status = EMBZ_OK;
    if (!flat) {
        if (!_embz_opt_fid_levels(res->f_lower, res->f_upper, &res->lambda, &res->bits, nz,
                                  q->d, FID_PREC)) {
            status = embz_err_set(err, EMBZ_ERR_PREC, "the Perron vector of the tree matrix "
                                  "could not be estimated at this n (an entry underflowed)");
            goto done;
        }
    } else if (!_embz_opt_perron_d(x, ell, &res->lambda, n, q->d)) {
        status = embz_err_set(err, EMBZ_ERR_PREC, "the Perron vector of the tree matrix could "
                              "not be estimated at n = %ld (an entry underflowed)", (long) n);
        goto done;
    }
    if (flat) _embz_opt_fid_scale(a, &res->bits, x, n);
    if (flat && (!_embz_opt_fid_lower(res->f_lower, a, n, q->d)
                 || !_embz_opt_fid_upper(res->f_upper, ell, n, q->d, FID_PREC))) {
        status = embz_err_set(err, EMBZ_ERR_PREC, "internal check failed: a certificate of the "
                              "optimum could not be formed at n = %ld", (long) n);
        goto done;
    }
    if (fmpq_cmp(res->f_lower, res->f_upper) > 0) {
        status = embz_err_set(err, EMBZ_ERR_PREC, "internal check failed: the certified lower "
                              "end exceeds the upper end");
        goto done;
    }
    arb_t lo, hi;
    arb_init(lo); arb_init(hi);
    arb_set_fmpq(lo, res->f_lower, FID_PREC);
    arb_set_fmpq(hi, res->f_upper, FID_PREC);
    if (measure == EMBZ_MEASURE_PURIFIED) {
        arb_sub_ui(lo, lo, 1, FID_PREC);
        arb_neg(lo, lo);
        arb_sqrtpos(lo, lo, FID_PREC);             /* sqrt(1 - f_lower): the upper end */
        arb_sub_ui(hi, hi, 1, FID_PREC);
        arb_neg(hi, hi);
        arb_sqrtpos(hi, hi, FID_PREC);
    }
    arb_union(res->value, lo, hi, FID_PREC);   /* the ball holding both ends */
    arb_clear(lo); arb_clear(hi);
    if (state != NULL) {
        fmpz_t S, t;
        fmpz_init(S); fmpz_init(t);
        for (slong j = 0; j < n; j++) fmpz_addmul(S, a + j, a + j);
        embz_qvec_clear(state);
        embz_qvec_init(state);
        state->p = _fmpq_vec_init(n);
        state->len = n;
        state->normalised = 0;
        for (slong j = 0; j < n; j++) {
            fmpz_mul(t, a + j, a + j);
            fmpq_set_fmpz_frac(state->p + j, t, S);
        }
        fmpz_clear(S); fmpz_clear(t);
    }
done:
    res->seconds = (double) (clock() - c0) / CLOCKS_PER_SEC;
    _fmpz_vec_clear(a, n);
    flint_free(x);
    flint_free(ell);
    return status;
}
