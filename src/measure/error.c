/* Result objects and the method dispatcher for the embezzlement error. */
#include <string.h>
#include <math.h>
#include "embz/measure.h"

/* Sizes up to this are always done by explicit summation in auto mode. */
#define EMBZ_AUTO_EXPLICIT_N 1000000L

void embz_error_result_init(embz_error_result_t r)
{
    arb_init(r->error);
    arb_indeterminate(r->error);
    r->estimate = NAN;
    fmpz_init(r->argk);
    r->have_bounds = 0;
    arb_init(r->lower);
    arb_init(r->upper);
    r->method = EMBZ_METHOD_AUTO;
    r->order = 0;
    r->decided = 0;
    r->detail[0] = '\0';
}

void embz_error_result_clear(embz_error_result_t r)
{
    arb_clear(r->error);
    fmpz_clear(r->argk);
    arb_clear(r->lower);
    arb_clear(r->upper);
}

/* The analytic engine (src/sum) provides embz_error_analytic. */
int embz_error(embz_error_result_t res, const embz_family_t f, const fmpz_t n,
               const embz_target_t q, int method, slong prec, embz_err_t *err)
{
    if (fmpz_cmp_si(n, 1) < 0) return embz_err_set(err, EMBZ_ERR_INPUT, "n must be at least 1");
    if (method == EMBZ_METHOD_EXPLICIT) return embz_error_explicit(res, f, n, q, prec, err);
    if (method == EMBZ_METHOD_ANALYTIC) return embz_error_analytic(res, f, n, q, prec, err);
    if (method != EMBZ_METHOD_AUTO)
        return embz_err_set(err, EMBZ_ERR_INPUT, "unknown method %d", method);
    if (fmpz_cmp_si(n, EMBZ_AUTO_EXPLICIT_N) <= 0)
        return embz_error_explicit(res, f, n, q, prec, err);
    int st = embz_error_analytic(res, f, n, q, prec, err);
    if (st == EMBZ_ERR_UNSUPPORTED && fmpz_cmp_si(n, EMBZ_EXPLICIT_MAX_N) <= 0) {
        char reason[sizeof(err->text)];
        snprintf(reason, sizeof(reason), "%s", err != NULL ? err->text : "");
        if (err != NULL) embz_err_clear(err);
        st = embz_error_explicit(res, f, n, q, prec, err);
        if (st == EMBZ_OK && reason[0] != '\0') {
            size_t len = strlen(res->detail);
            snprintf(res->detail + len, sizeof(res->detail) - len,
                     " (analytic engine declined: %.120s)", reason);
        }
    }
    return st;
}
