/* Conversion between two Schmidt vectors through the flat interface (embz convert): exact
 * convertibility and K in both directions, F_max and P as certified enclosures. */
#include <stdlib.h>
#include <string.h>
#include "impl.h"

#define FID_PREC 256
#define FID_DIGITS 30

static void distance(embz_flat_table *t, long r, const char *dir, const embz_qvec_t p,
                     const embz_qvec_t s)
{
    fmpq_t K;
    fmpq_init(K);
    long argk = 0;
    embz_qvec_distance(K, &argk, p, s);
    char key[64];
    char *ex = fmpq_get_str(NULL, 10, K);
    snprintf(key, sizeof(key), "K_%s", dir);
    _flat_set(t, r, key, ex);
    flint_free(ex);
    arb_t b;
    arb_init(b);
    arb_set_fmpq(b, K, 4 * 25 + 64);   /* as embz convert */
    char *dec = embz_arb_certified_string(b, 25);
    snprintf(key, sizeof(key), "K_%s_decimal", dir);
    _flat_set(t, r, key, dec);
    free(dec);
    snprintf(key, sizeof(key), "K_%s_argk", dir);
    _flat_set_l(t, r, key, argk);
    arb_clear(b);
    fmpq_clear(K);

    arb_t F, P;
    arb_init(F);
    arb_init(P);
    embz_qvec_fidelity(F, NULL, NULL, p, s, FID_PREC);
    embz_qvec_purified(P, p, s, FID_PREC);
    const char *names[2] = { "F", "P" };
    arb_srcptr vals[2] = { F, P };
    for (int k = 0; k < 2; k++) {
        snprintf(key, sizeof(key), "%s_%s", names[k], dir);
        _flat_set_ends(t, r, key, vals[k], FID_DIGITS);
        char *c = embz_arb_certified_string(vals[k], FID_DIGITS);
        char k2[80];
        snprintf(k2, sizeof(k2), "%s_certified", key);
        _flat_set(t, r, k2, c);
        free(c);
    }
    arb_clear(F);
    arb_clear(P);
}

int embz_flat_convert(embz_flat_table **out, const char *from, const char *to, int amplitude,
                      embz_flat_err *err)
{
    *out = NULL;
    embz_qvec_t p, s;
    embz_qvec_init(p);
    embz_qvec_init(s);
    const char *texts[2] = { from, to }, *names[2] = { "from", "to" };
    embz_qvec_struct *vecs[2] = { p, s };
    int st = EMBZ_OK;
    for (int k = 0; k < 2 && st == EMBZ_OK; k++) {
        embz_err_t e;
        embz_err_clear(&e);
        if (texts[k] == NULL) {
            st = _flat_err_set(err, EMBZ_ERR_INPUT, "the vector '%s' is missing", names[k]);
            break;
        }
        st = embz_qvec_parse(vecs[k], texts[k], amplitude != 0, &e);
        if (st != EMBZ_OK) {
            _flat_err_from(err, st, &e);
            char msg[sizeof(err->message)];
            if (err != NULL) {
                snprintf(msg, sizeof(msg), "%s: %.4000s", names[k], err->message);
                snprintf(err->message, sizeof(err->message), "%s", msg);
            }
        }
    }
    if (st == EMBZ_OK) {
        embz_flat_table *t = _flat_table_new();
        long r = _flat_row_add(t);
        _flat_set_l(t, r, "from_len", p->len);
        _flat_set_l(t, r, "to_len", s->len);
        _flat_set_l(t, r, "from_normalised", p->normalised);
        _flat_set_l(t, r, "to_normalised", s->normalised);
        _flat_set_l(t, r, "convertible", embz_qvec_convertible(p, s));
        _flat_set_l(t, r, "reverse_convertible", embz_qvec_convertible(s, p));
        distance(t, r, "forward", p, s);
        distance(t, r, "backward", s, p);
        *out = t;
    }
    embz_qvec_clear(p);
    embz_qvec_clear(s);
    return st;
}
