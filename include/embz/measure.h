/* Conversion measures: Ky Fan norms, Nielsen's test and the conversion distance K of
 * Schmidt vectors (the embezzlement error of a family is in embz/error.h). */
#ifndef EMBZ_MEASURE_H
#define EMBZ_MEASURE_H

#include "embz/vec.h"

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

#endif
