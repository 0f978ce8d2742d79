#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <errno.h>
#include <unistd.h>
#include <fcntl.h>
#include "embz/util.h"
#include "embz/err.h"

/* Decimal string of an arf rounded in direction rnd (MPFR_RNDD / MPFR_RNDU), digits significant. */
static char *arf_decimal(const arf_t x, slong digits, mpfr_rnd_t rnd)
{
    if (arf_is_zero(x)) {
        char *s = malloc(2);
        strcpy(s, "0");
        return s;
    }
    if (!arf_is_finite(x)) {
        char *s = malloc(8);
        strcpy(s, arf_is_nan(x) ? "nan" : (arf_sgn(x) > 0 ? "inf" : "-inf"));
        return s;
    }
    mpfr_t t;
    slong bits = arf_bits(x) + 2;
    if (bits < 64) bits = 64;
    mpfr_init2(t, bits);
    arf_get_mpfr(t, x, MPFR_RNDN);  /* exact: enough bits */
    size_t cap = (size_t) digits + 64;
    char *s = malloc(cap);
    mpfr_snprintf(s, cap, "%.*R*g", (int) digits, rnd, t);
    mpfr_clear(t);
    return s;
}

char *embz_arb_lo_string(const arb_t x, slong digits)
{
    arf_t lo;
    arf_init(lo);
    arb_get_lbound_arf(lo, x, 4 * digits + 64);
    char *s = arf_decimal(lo, digits, MPFR_RNDD);
    arf_clear(lo);
    return s;
}

char *embz_arb_hi_string(const arb_t x, slong digits)
{
    arf_t hi;
    arf_init(hi);
    arb_get_ubound_arf(hi, x, 4 * digits + 64);
    char *s = arf_decimal(hi, digits, MPFR_RNDU);
    arf_clear(hi);
    return s;
}

double embz_arb_mid_d(const arb_t x)
{
    return arf_get_d(arb_midref(x), ARF_RND_NEAR);
}

char *embz_arb_certified_string(const arb_t x, slong max_digits)
{
    /* Try decreasing digit counts: print both ends rounded to nearest with d digits; if they
     * agree, and the rounded value is within half an ulp of every point of the ball, they
     * agree as strings and that string is certified (every point rounds to it). */
    if (!arb_is_finite(x)) {
        char *s = malloc(8);
        strcpy(s, "nan");
        return s;
    }
    for (slong d = max_digits; d >= 1; d--) {
        arf_t lo, hi;
        arf_init(lo); arf_init(hi);
        arb_get_lbound_arf(lo, x, 4 * max_digits + 64);
        arb_get_ubound_arf(hi, x, 4 * max_digits + 64);
        char *a = arf_decimal(lo, d, MPFR_RNDN);
        char *b = arf_decimal(hi, d, MPFR_RNDN);
        arf_clear(lo); arf_clear(hi);
        if (strcmp(a, b) == 0) {
            free(b);
            return a;
        }
        free(a); free(b);
    }
    char *lo = embz_arb_lo_string(x, 6), *hi = embz_arb_hi_string(x, 6);
    size_t n = strlen(lo) + strlen(hi) + 8;
    char *s = malloc(n);
    snprintf(s, n, "[%s, %s]", lo, hi);
    free(lo); free(hi);
    return s;
}

char *embz_fmpz_string(const fmpz_t n, slong max_digits)
{
    size_t nd = fmpz_sizeinbase(n, 10);
    if ((slong) nd <= max_digits) {
        return fmpz_get_str(NULL, 10, n);
    }
    char *all = fmpz_get_str(NULL, 10, n);
    const char *digits = all;
    int neg = 0;
    if (*digits == '-') { neg = 1; digits++; }
    size_t len = strlen(digits);
    char *s = malloc(64);
    snprintf(s, 64, "%s%c.%.9se+%zu", neg ? "-" : "", digits[0], digits + 1, len - 1);
    free(all);
    return s;
}

void embz_buf_init(embz_buf_t *b)
{
    b->alloc = 256;
    b->len = 0;
    b->s = malloc(b->alloc);
    b->s[0] = '\0';
}

void embz_buf_clear(embz_buf_t *b)
{
    free(b->s);
    b->s = NULL;
    b->len = b->alloc = 0;
}

static void buf_reserve(embz_buf_t *b, size_t extra)
{
    if (b->len + extra + 1 > b->alloc) {
        while (b->len + extra + 1 > b->alloc) b->alloc *= 2;
        b->s = realloc(b->s, b->alloc);
    }
}

void embz_buf_printf(embz_buf_t *b, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    int need = vsnprintf(NULL, 0, fmt, ap);
    va_end(ap);
    if (need < 0) return;
    buf_reserve(b, (size_t) need);
    va_start(ap, fmt);
    vsnprintf(b->s + b->len, b->alloc - b->len, fmt, ap);
    va_end(ap);
    b->len += (size_t) need;
}

char *embz_strdup_printf(const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    int need = vsnprintf(NULL, 0, fmt, ap);
    va_end(ap);
    if (need < 0) need = 0;
    char *s = malloc((size_t) need + 1);
    s[0] = '\0';
    va_start(ap, fmt);
    vsnprintf(s, (size_t) need + 1, fmt, ap);
    va_end(ap);
    return s;
}

/* JSON wants UTF-8: well-formed characters pass through, and a byte that is not part of
 * one (text in Latin-1, say) is written as the character of its Latin-1 reading, \u00XX, so
 * the output stays valid and nothing is lost. */
void embz_buf_json_string(embz_buf_t *b, const char *text)
{
    embz_buf_printf(b, "\"");
    for (const unsigned char *p = (const unsigned char *) text; *p; p++) {
        if (*p >= 0x80) {
            int l = embz_utf8_len((const char *) p);
            if (l == 0) embz_buf_printf(b, "\\u%04x", *p);
            else embz_buf_printf(b, "%.*s", l, (const char *) p);
            if (l > 1) p += l - 1;
            continue;
        }
        switch (*p) {
        case '"': embz_buf_printf(b, "\\\""); break;
        case '\\': embz_buf_printf(b, "\\\\"); break;
        case '\n': embz_buf_printf(b, "\\n"); break;
        case '\r': embz_buf_printf(b, "\\r"); break;
        case '\t': embz_buf_printf(b, "\\t"); break;
        case '<': embz_buf_printf(b, "\\u003c"); break;  /* safe inside HTML script blocks */
        case '>': embz_buf_printf(b, "\\u003e"); break;
        case '&': embz_buf_printf(b, "\\u0026"); break;
        default:
            if (*p < 0x20) embz_buf_printf(b, "\\u%04x", *p);
            else embz_buf_printf(b, "%c", *p);
        }
    }
    embz_buf_printf(b, "\"");
}
