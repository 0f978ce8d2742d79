/* Helpers shared by the renderers: certified decimal printing, JSON escaping, atomic files. */
#ifndef EMBZ_OUTPUT_H
#define EMBZ_OUTPUT_H

#include "embz/flint.h"
#include "embz/err.h"

/* Decimal text of the lower / upper end of the ball, rounded outward, with `digits`
 * significant digits: lo <= x <= hi is guaranteed for the printed strings. malloc'ed. */
char *embz_arb_lo_string(const arb_t x, slong digits);
char *embz_arb_hi_string(const arb_t x, slong digits);
/* Only the digits the ball certifies: the longest decimal prefix shared by both ends, printed
 * as "0.29310[2,3]"-free plain text such as "0.293102" (the value rounds to it either way), or
 * "[lo, hi]" when not even one digit is certain. malloc'ed. */
char *embz_arb_certified_string(const arb_t x, slong max_digits);
/* Midpoint as a double (for JSON "value" fields and plots). */
double embz_arb_mid_d(const arb_t x);

/* Decimal text of an fmpz: all digits when it has at most max_digits digits, else
 * "d.ddddddddde+N" (10 significant digits, truncated; callers that show it to people mark it
 * as shortened). malloc'ed. */
char *embz_fmpz_string(const fmpz_t n, slong max_digits);

/* JSON string escaping (quotes included) appended to a growing buffer. */
typedef struct { char *s; size_t len, alloc; } embz_buf_t;
void embz_buf_init(embz_buf_t *b);
void embz_buf_clear(embz_buf_t *b);
void embz_buf_printf(embz_buf_t *b, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;
void embz_buf_json_string(embz_buf_t *b, const char *text);

/* Write data to path atomically: a temporary file in the same directory, then rename. */
int embz_write_atomic(const char *path, const char *data, size_t len, embz_err_t *err);

#endif
