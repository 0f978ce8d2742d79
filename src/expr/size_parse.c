/* Sizes n: "1000", "1e6", "1.5e3", "10^6", "2^20", "3*10^5", "10^10000". */
#include <ctype.h>
#include <string.h>
#include "embz/expr.h"

/* Results above 2^EMBZ_SIZE_MAX_BITS (about 10^400000) are refused up front: beyond, the
 * analytic engine's branch and bound cannot bound E at the default precision (10^500000
 * failed after seconds; 10^400000 gives a few digits in 3 s). */
#define EMBZ_SIZE_MAX_BITS 1330000
#define EMBZ_SIZE_MAX_EXP10 400000
#define TOO_LARGE "too large: sizes up to about 10^400000 are accepted (beyond, E cannot be " \
                  "certified)"

typedef struct { const char *s; long pos; embz_err_t *err; } sp_t;

static void skip_ws(sp_t *P)
{
    while (isspace((unsigned char) P->s[P->pos])) P->pos++;
}

static int fail(sp_t *P, const char *msg)
{
    if (P->err != NULL) {
        P->err->col = P->pos + 1;
        snprintf(P->err->source, sizeof(P->err->source), "%s", P->s);
    }
    return embz_err_set(P->err, EMBZ_ERR_INPUT, "size '%.80s': %s", P->s, msg);
}

/* digits [. digits] [e [+-] digits], an integer value */
static int number(fmpz_t res, sp_t *P)
{
    long start = P->pos, frac = 0, ex = 0;
    int any = 0;
    fmpz_zero(res);
    skip_ws(P);
    start = P->pos;
    while (isdigit((unsigned char) P->s[P->pos])) {
        if (P->pos - start > 100000) return fail(P, "too many digits");
        fmpz_mul_ui(res, res, 10);
        fmpz_add_ui(res, res, (ulong) (P->s[P->pos] - '0'));
        P->pos++;
        any = 1;
    }
    if (P->s[P->pos] == '.') {
        P->pos++;
        while (isdigit((unsigned char) P->s[P->pos])) {
            if (frac > 100000) return fail(P, "too many digits");
            fmpz_mul_ui(res, res, 10);
            fmpz_add_ui(res, res, (ulong) (P->s[P->pos] - '0'));
            P->pos++;
            frac++;
            any = 1;
        }
    }
    if (!any) {
        if (P->s[P->pos] == '-') return fail(P, "n must be a positive integer");
        return fail(P, "expected a number");
    }
    if (P->s[P->pos] == 'e' || P->s[P->pos] == 'E') {
        int neg = 0;
        P->pos++;
        if (P->s[P->pos] == '+' || P->s[P->pos] == '-') { neg = P->s[P->pos] == '-'; P->pos++; }
        if (!isdigit((unsigned char) P->s[P->pos])) return fail(P, "expected an exponent after 'e'");
        while (isdigit((unsigned char) P->s[P->pos])) {
            ex = 10 * ex + (P->s[P->pos] - '0');
            if (ex > EMBZ_SIZE_MAX_EXP10) return fail(P, TOO_LARGE);
            P->pos++;
        }
        if (neg) ex = -ex;
    }
    ex -= frac;
    if (ex >= 0) {
        if (!fmpz_is_zero(res) && ex > EMBZ_SIZE_MAX_EXP10) return fail(P, TOO_LARGE);
        fmpz_t t;
        fmpz_init(t);
        fmpz_ui_pow_ui(t, 10, (ulong) ex);
        fmpz_mul(res, res, t);
        fmpz_clear(t);
    } else {
        fmpz_t t, r;
        fmpz_init(t); fmpz_init(r);
        fmpz_ui_pow_ui(t, 10, (ulong) (-ex));
        fmpz_fdiv_qr(res, r, res, t);
        int frac_left = !fmpz_is_zero(r);
        fmpz_clear(t); fmpz_clear(r);
        if (frac_left) return fail(P, "n must be an integer");
    }
    skip_ws(P);
    return EMBZ_OK;
}

static int term(fmpz_t res, sp_t *P)
{
    int st = number(res, P);
    if (st != EMBZ_OK) return st;
    if (P->s[P->pos] == '^') {
        fmpz_t e;
        fmpz_init(e);
        P->pos++;
        if ((st = number(e, P)) != EMBZ_OK) { fmpz_clear(e); return st; }
        if (P->s[P->pos] == '^') {
            fmpz_clear(e);
            return fail(P, "towers a^b^c are not accepted; write the value of b^c");
        }
        if (fmpz_cmp_ui(res, 1) <= 0) {
            if (fmpz_is_zero(res) && fmpz_is_zero(e)) fmpz_one(res);
            else if (fmpz_is_zero(res)) fmpz_zero(res);
            /* 1^e = 1 */
        } else {
            if (fmpz_cmp_ui(e, EMBZ_SIZE_MAX_BITS) > 0 ||
                (double) fmpz_bits(res) * fmpz_get_d(e) > 2.0 * EMBZ_SIZE_MAX_BITS) {
                fmpz_clear(e);
                return fail(P, TOO_LARGE);
            }
            fmpz_pow_ui(res, res, fmpz_get_ui(e));
        }
        fmpz_clear(e);
    }
    return EMBZ_OK;
}

int embz_size_parse(fmpz_t n, const char *s, embz_err_t *err)
{
    sp_t P = { s, 0, err };
    fmpz_t v, t;
    int st;
    if (s == NULL) return embz_err_set(err, EMBZ_ERR_INPUT, "empty size");
    if (strlen(s) > 200000) return embz_err_set(err, EMBZ_ERR_INPUT, "size text too long");
    fmpz_init(v); fmpz_init(t);
    st = term(v, &P);
    while (st == EMBZ_OK && P.s[P.pos] == '*') {
        P.pos++;
        st = term(t, &P);
        if (st == EMBZ_OK) {
            fmpz_mul(v, v, t);
            if (fmpz_bits(v) > EMBZ_SIZE_MAX_BITS) st = fail(&P, TOO_LARGE);
        }
    }
    if (st == EMBZ_OK && P.s[P.pos] != '\0') {
        if (P.s[P.pos] == '/') st = fail(&P, "n must be an integer (no fractions)");
        else st = fail(&P, "unexpected character");
    }
    /* these two concern the whole value: no caret */
    if (st == EMBZ_OK && fmpz_bits(v) > EMBZ_SIZE_MAX_BITS) {
        st = fail(&P, TOO_LARGE);
        if (err != NULL) err->col = 0;
    }
    if (st == EMBZ_OK && fmpz_sgn(v) < 1) {
        st = fail(&P, "n must be at least 1");
        if (err != NULL) err->col = 0;
    }
    if (st == EMBZ_OK) fmpz_set(n, v);
    fmpz_clear(v); fmpz_clear(t);
    return st;
}
