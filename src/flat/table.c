/* The flat interface's tables, messages, options and size texts (include/embz/flat.h). */
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include "impl.h"

static char *sdup(const char *s)
{
    size_t l = strlen(s) + 1;
    char *d = malloc(l);
    if (d == NULL) abort();
    memcpy(d, s, l);
    return d;
}

void embz_flat_opts_init(embz_flat_opts *o)
{
    memset(o, 0, sizeof(*o));
    o->method = EMBZ_METHOD_AUTO;
    o->measure = EMBZ_MEASURE_K;
    o->threads = 1;
}

const char *embz_flat_version(void)
{
    return EMBZ_VERSION;
}

void embz_flat_str_free(char *s)
{
    free(s);
}

void embz_flat_thread_cleanup(void)
{
    flint_cleanup();
}

/* ------------------------------------------------------------------ tables */

embz_flat_table *_flat_table_new(void)
{
    embz_flat_table *t = calloc(1, sizeof(*t));
    if (t == NULL) abort();
    return t;
}

long _flat_row_add(embz_flat_table *t)
{
    if (t->len == t->alloc) {
        t->alloc = t->alloc ? 2 * t->alloc : 8;
        t->rows = realloc(t->rows, (size_t) t->alloc * sizeof(flat_row));
        if (t->rows == NULL) abort();
    }
    memset(t->rows + t->len, 0, sizeof(flat_row));
    return t->len++;
}

void _flat_set(embz_flat_table *t, long row, const char *key, const char *value)
{
    flat_row *r = t->rows + row;
    for (long j = 0; j < r->len; j++)
        if (strcmp(r->key[j], key) == 0) {
            free(r->val[j]);
            r->val[j] = sdup(value);
            return;
        }
    if (r->len == r->alloc) {
        r->alloc = r->alloc ? 2 * r->alloc : 16;
        r->key = realloc(r->key, (size_t) r->alloc * sizeof(char *));
        r->val = realloc(r->val, (size_t) r->alloc * sizeof(char *));
        if (r->key == NULL || r->val == NULL) abort();
    }
    r->key[r->len] = sdup(key);
    r->val[r->len] = sdup(value);
    r->len++;
}

void _flat_setf(embz_flat_table *t, long row, const char *key, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    int len = vsnprintf(NULL, 0, fmt, ap);
    va_end(ap);
    char *s = malloc((size_t) len + 1);
    if (s == NULL) abort();
    va_start(ap, fmt);
    vsnprintf(s, (size_t) len + 1, fmt, ap);
    va_end(ap);
    _flat_set(t, row, key, s);
    free(s);
}

void _flat_set_d(embz_flat_table *t, long row, const char *key, double x)
{
    _flat_setf(t, row, key, "%.17g", x);
}

void _flat_set_l(embz_flat_table *t, long row, const char *key, long x)
{
    _flat_setf(t, row, key, "%ld", x);
}

void _flat_set_ends(embz_flat_table *t, long row, const char *key, const arb_t x, slong digits)
{
    char k[128];
    char *lo = embz_arb_lo_string(x, digits), *hi = embz_arb_hi_string(x, digits);
    snprintf(k, sizeof(k), "%s%slo", key, key[0] ? "_" : "");
    _flat_set(t, row, k, lo);
    snprintf(k, sizeof(k), "%s%shi", key, key[0] ? "_" : "");
    _flat_set(t, row, k, hi);
    free(lo);
    free(hi);
}

void _flat_set_fmpz(embz_flat_table *t, long row, const char *key, const fmpz_t n)
{
    char *s = fmpz_get_str(NULL, 10, n);
    _flat_set(t, row, key, s);
    flint_free(s);
}

void _flat_set_size(embz_flat_table *t, long row, const char *key, const fmpz_t n)
{
    char k[128];
    _flat_set_fmpz(t, row, key, n);
    char *s = fmpz_get_str(NULL, 16, n);
    snprintf(k, sizeof(k), "%s_hex", key);
    _flat_setf(t, row, k, "0x%s", s);
    flint_free(s);
}

long embz_flat_rows(const embz_flat_table *t)
{
    return t == NULL ? 0 : t->len;
}

long embz_flat_nkeys(const embz_flat_table *t, long row)
{
    if (t == NULL || row < 0 || row >= t->len) return 0;
    return t->rows[row].len;
}

const char *embz_flat_key(const embz_flat_table *t, long row, long j)
{
    if (j < 0 || j >= embz_flat_nkeys(t, row)) return NULL;
    return t->rows[row].key[j];
}

const char *embz_flat_value(const embz_flat_table *t, long row, long j)
{
    if (j < 0 || j >= embz_flat_nkeys(t, row)) return NULL;
    return t->rows[row].val[j];
}

const char *embz_flat_get(const embz_flat_table *t, long row, const char *key)
{
    long n = embz_flat_nkeys(t, row);
    for (long j = 0; j < n; j++)
        if (strcmp(t->rows[row].key[j], key) == 0) return t->rows[row].val[j];
    return NULL;
}

void embz_flat_table_free(embz_flat_table *t)
{
    if (t == NULL) return;
    for (long i = 0; i < t->len; i++) {
        flat_row *r = t->rows + i;
        for (long j = 0; j < r->len; j++) {
            free(r->key[j]);
            free(r->val[j]);
        }
        free(r->key);
        free(r->val);
    }
    free(t->rows);
    free(t);
}

/* ------------------------------------------------------------------ messages */

void _flat_err_from(embz_flat_err *out, int status, const embz_err_t *e)
{
    if (out == NULL) return;
    memset(out, 0, sizeof(*out));
    out->code = e->code ? e->code : status;
    out->col = e->col;
    out->line = e->line;
    snprintf(out->file, sizeof(out->file), "%s", e->file);
    snprintf(out->source, sizeof(out->source), "%s", e->source);
    snprintf(out->text, sizeof(out->text), "%s", e->text);
    embz_err_format(out->message, sizeof(out->message), e);
}

int _flat_err_set(embz_flat_err *out, int code, const char *fmt, ...)
{
    if (out == NULL) return code;
    embz_err_t e;
    embz_err_clear(&e);
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(e.text, sizeof(e.text), fmt, ap);
    va_end(ap);
    e.code = code;
    _flat_err_from(out, code, &e);
    return code;
}

/* ------------------------------------------------------------------ inputs */

int _flat_size_parse(fmpz_t n, const char *text, const char *what, embz_flat_err *err)
{
    char shown[200];
    if (text == NULL) return _flat_err_set(err, EMBZ_ERR_INPUT, "%s is missing", what);
    if (text[0] == '0' && (text[1] == 'x' || text[1] == 'X')) {
        const char *h = text + 2;
        int ok = *h != '\0';
        for (const char *c = h; *c && ok; c++)
            ok = (*c >= '0' && *c <= '9') || (*c >= 'a' && *c <= 'f') || (*c >= 'A' && *c <= 'F');
        if (!ok || fmpz_set_str(n, h, 16) != 0)
            return _flat_err_set(err, EMBZ_ERR_INPUT, "bad %s '%s' (hexadecimal digits expected)",
                                 what, embz_err_quote(shown, sizeof(shown), text, 100));
    } else {
        embz_err_t e;
        embz_err_clear(&e);
        int st = embz_size_parse(n, text, &e);
        if (st != EMBZ_OK)
            return _flat_err_set(err, st, "bad %s '%s': %s", what,
                                 embz_err_quote(shown, sizeof(shown), text, 100), e.text);
    }
    if (fmpz_cmp_ui(n, 1) < 0)
        return _flat_err_set(err, EMBZ_ERR_INPUT, "the %s must be at least 1 (got %s)", what,
                             embz_err_quote(shown, sizeof(shown), text, 100));
    return EMBZ_OK;
}

void _flat_opts_get(embz_flat_opts *o, const embz_flat_opts *given)
{
    if (given != NULL) *o = *given;
    else embz_flat_opts_init(o);
}

slong _flat_end_digits(const embz_flat_opts *o, slong prec)
{
    if (o->digits > 0) return o->digits;
    return 45 + (prec > 128 ? (slong) ((prec - 128) * 0.30103) : 0);
}

slong _flat_cert_digits(slong prec)
{
    return 30 + (prec > 128 ? (slong) ((prec - 128) * 0.30103) : 0);
}

int _flat_cancelled(const embz_flat_opts *o)
{
    return o->cancel != NULL && *o->cancel != 0;
}

const char *_flat_method_name(int m)
{
    return m == EMBZ_METHOD_EXPLICIT ? "explicit" : m == EMBZ_METHOD_ANALYTIC ? "analytic"
                                                                             : "auto";
}

double _flat_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}
