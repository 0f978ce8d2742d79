/* Private to src/flat: the handles behind include/embz/flat.h and the helpers that fill
 * tables. */
#ifndef EMBZ_FLAT_IMPL_H
#define EMBZ_FLAT_IMPL_H

#include "embz.h"
#include "embz/flat.h"

struct embz_flat_family_s {
    embz_family_t f;
};

struct embz_flat_target_s {
    embz_target_t q;
};

typedef struct {
    char **key, **val;
    long len, alloc;
} flat_row;

struct embz_flat_table_s {
    flat_row *rows;
    long len, alloc;
};

/* tables (table.c) */
embz_flat_table *_flat_table_new(void);
long _flat_row_add(embz_flat_table *t);                    /* index of the new row */
void _flat_set(embz_flat_table *t, long row, const char *key, const char *value);
void _flat_setf(embz_flat_table *t, long row, const char *key, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 4, 5)))
#endif
    ;
void _flat_set_d(embz_flat_table *t, long row, const char *key, double x);   /* %.17g */
void _flat_set_l(embz_flat_table *t, long row, const char *key, long x);
/* key_lo / key_hi (outward-rounded ends, digits) of a ball; key "" gives "lo" and "hi" */
void _flat_set_ends(embz_flat_table *t, long row, const char *key, const arb_t x, slong digits);
void _flat_set_fmpz(embz_flat_table *t, long row, const char *key, const fmpz_t n);
/* "key" decimal and "key_hex" hexadecimal (a binding reads big integers from hex without a
 * decimal conversion limit) */
void _flat_set_size(embz_flat_table *t, long row, const char *key, const fmpz_t n);

/* errors (table.c): from the library's buffer, or a new message */
void _flat_err_from(embz_flat_err *out, int status, const embz_err_t *e);
int _flat_err_set(embz_flat_err *out, int code, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;

/* sizes: CLI forms or "0x..." hexadecimal; n >= 1 */
int _flat_size_parse(fmpz_t n, const char *text, const char *what, embz_flat_err *err);
/* options: NULL means the defaults */
void _flat_opts_get(embz_flat_opts *o, const embz_flat_opts *given);
/* digits of the outward-rounded ends (the CLI's JSON: 45, more above 128 bits) and of the
 * certified text (30, more above 128 bits) */
slong _flat_end_digits(const embz_flat_opts *o, slong prec);
slong _flat_cert_digits(slong prec);
int _flat_cancelled(const embz_flat_opts *o);
const char *_flat_method_name(int m);
double _flat_now(void);

/* how an error result was computed, malloc'ed (errors.c: the one reader of it) */
char *_flat_how_text(const embz_error_result_struct *res);

/* the sweep's points as rows (sweep.c; used by classify) */
void _flat_sweep_rows(embz_flat_table *t, const embz_sweep_t s, slong digits);

#endif
