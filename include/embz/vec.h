/* Schmidt vectors and targets. */
#ifndef EMBZ_VEC_H
#define EMBZ_VEC_H

#include "embz/flint.h"
#include "embz/err.h"

/* An exact probability vector (rational entries, sum 1 after normalisation). */
typedef struct {
    fmpq *p;
    long len;
    int normalised;   /* 1 if the input did not sum to 1 and was rescaled */
} embz_qvec_struct;
typedef embz_qvec_struct embz_qvec_t[1];

void embz_qvec_init(embz_qvec_t v);
void embz_qvec_clear(embz_qvec_t v);
/* From text: comma/whitespace separated numbers, or (if the text names a readable file) the
 * file's numbers, one per line or comma separated. amplitude: square each entry. Normalises.
 * Errors: negative or non-numeric entry (file:line or position), empty, all zero. */
int embz_qvec_parse(embz_qvec_t v, const char *spec, int amplitude, embz_err_t *err);
/* Sort non-increasing in place. */
void embz_qvec_sort(embz_qvec_t v);

/* Limits for targets: ebits:J with 1 <= J <= EMBZ_TARGET_MAX_EBITS, uniform:D with
 * 2 <= D <= EMBZ_TARGET_MAX_D. */
#define EMBZ_TARGET_MAX_EBITS 30
#define EMBZ_TARGET_MAX_D (UWORD(1) << 30)

/* A target state q for embezzlement. */
typedef enum { EMBZ_TARGET_UNIFORM = 0, EMBZ_TARGET_VECTOR = 1 } embz_target_kind_t;
typedef struct {
    int kind;
    ulong d;          /* UNIFORM: d-level maximally entangled (ebit: 2; ebits:J: 2^J) */
    embz_qvec_t q;    /* VECTOR: the Schmidt probabilities, sorted non-increasing */
    char label[64];   /* "ebit", "ebits:3", "uniform:5", "vector[4]" (", normalised to sum 1"
                         added when the entries were divided by their sum) */
} embz_target_struct;
typedef embz_target_struct embz_target_t[1];

void embz_target_init(embz_target_t t);   /* one ebit */
void embz_target_clear(embz_target_t t);
/* "ebit", "ebits:J", "uniform:D", or a vector spec as for embz_qvec_parse. */
int embz_target_parse(embz_target_t t, const char *spec, int amplitude, embz_err_t *err);
/* A uniform target given as a vector (length d) is stored as UNIFORM. Zero entries of a
 * vector target are dropped (they change no Ky Fan norm); a vector with a single nonzero
 * entry is rejected (product state). */

#endif
