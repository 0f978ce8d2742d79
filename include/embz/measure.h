/* Conversion measures: Ky Fan norms, Nielsen's test, the conversion distance K, and the
 * embezzlement error of a family at a given size. */
#ifndef EMBZ_MEASURE_H
#define EMBZ_MEASURE_H

#include "embz/vec.h"
#include "embz/family.h"

/* ---- exact vectors ---- */
/* ||p||_(k) (sum of the k largest entries; 1 for k >= len). */
void embz_qvec_kyfan(fmpq_t res, const embz_qvec_t p, long k);
/* 1 if p can be turned into r exactly by LOCC (p majorized by r), else 0. */
int embz_qvec_convertible(const embz_qvec_t p, const embz_qvec_t r);
/* K(p -> r) = max_k (||p||_(k) - ||r||_(k)) >= 0, exactly; argk receives a maximising k
 * (0 when K = 0). Computed by the threshold form. */
void embz_qvec_distance(fmpq_t K, long *argk, const embz_qvec_t p, const embz_qvec_t r);

/* ---- ball vectors ---- */
void embz_vec_distance_arb(arb_t K, slong *argk, arb_srcptr p, slong plen,
                           arb_srcptr r, slong rlen, slong prec);

/* ---- embezzlement error of a family ---- */
typedef enum { EMBZ_METHOD_AUTO = 0, EMBZ_METHOD_EXPLICIT, EMBZ_METHOD_ANALYTIC } embz_method_t;

typedef struct {
    arb_t error;        /* certified enclosure of E_n(q) */
    double estimate;    /* double fast-path value, NaN if not computed */
    fmpz_t argk;        /* Ky Fan index k at which the maximum is attained (sorted order) */
    int have_bounds;    /* block-mass bounds available (one ebit) */
    arb_t lower, upper; /* max(p1/2, sup B_m) <= E <= max(p1/2, 2 sup B_m) */
    int method;         /* EMBZ_METHOD_EXPLICIT or EMBZ_METHOD_ANALYTIC */
    int order;          /* +1 weights non-increasing in i, -1 non-decreasing, 0 neither (sorted) */
    char detail[256];   /* how it was computed, e.g. "explicit, streaming, arb 128 bits" */
    int decided;        /* decision mode of the analytic engine: +1 when it stopped because E is
                           proven above the threshold (the enclosure's upper end is then only
                           the trivial 1), -1 below, 0 otherwise */
} embz_error_result_struct;
typedef embz_error_result_struct embz_error_result_t[1];

void embz_error_result_init(embz_error_result_t r);
void embz_error_result_clear(embz_error_result_t r);

/* Largest n handled by explicit mode. */
#define EMBZ_EXPLICIT_MAX_N 100000000L

/* E_n(q) by explicit summation over i = 1..n (n <= EMBZ_EXPLICIT_MAX_N). Always fills the
 * double estimate too. Monotone weights are streamed in O(1) memory; otherwise the weights are
 * stored and sorted (n <= 2^24). The enclosure's radius is at least about n d 2^-120 (exact
 * fixed-point sums), whatever prec. */
int embz_error_explicit(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                        const embz_target_t q, slong prec, embz_err_t *err);

/* The double fast path alone (no certification): estimate of E_n(q), the Ky Fan index where
 * the estimate is largest, and the detected order of the weights (+1 non-increasing,
 * -1 non-decreasing, 0 neither: stored and sorted). */
int embz_error_explicit_estimate(double *E, slong *argk, int *order, const embz_family_t f,
                                 const fmpz_t n, const embz_target_t q, embz_err_t *err);

/* E_n(q) by the analytic engine (any n that fits an fmpz). */
int embz_error_analytic(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
                        const embz_target_t q, slong prec, embz_err_t *err);

/* Choose the method (auto: explicit for small n, analytic beyond or when explicit would be slow;
 * falls back with a reason in res->detail). */
int embz_error(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
               const embz_target_t q, int method, slong prec, embz_err_t *err);

/* Parse sizes "1000", "1e6", "10^6", "2^20", "10^(10^4)" is not accepted; "10^10000" is. */
int embz_size_parse(fmpz_t n, const char *s, embz_err_t *err);

#endif
