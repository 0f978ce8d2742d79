/* Families and targets through the flat interface (include/embz/flat.h). */
#include <stdlib.h>
#include <string.h>
#include "impl.h"

static int check_settings_used(const embz_family_struct *f, const char *const *names,
                               long n, embz_flat_err *err)
{
    for (long k = 0; k < n; k++) {
        int found = 0;
        for (long j = 0; j < f->nparams && !found; j++)
            found = strcmp(f->param_names[j], names[k]) == 0;
        for (long j = 0; j < k && found; j++)
            if (strcmp(names[j], names[k]) == 0) {
                char shown[300];
                return _flat_err_set(err, EMBZ_ERR_INPUT, "parameter '%s' is set twice",
                                     embz_err_quote(shown, sizeof(shown), names[k], 64));
            }
        if (found) continue;
        char name[300], fname[300];
        return _flat_err_set(err, EMBZ_ERR_INPUT,
                             "the parameter '%s' is not used by '%s'%s",
                             embz_err_quote(name, sizeof(name), names[k], 64),
                             embz_err_quote(fname, sizeof(fname), f->name, 200),
                             f->nparams == 0 ? " (it has no parameters)" : "");
    }
    return EMBZ_OK;
}

int embz_flat_family_new(embz_flat_family **out, const char *spec, const char *const *names,
                         const char *const *values, long nsettings, int amplitude,
                         embz_flat_err *err)
{
    *out = NULL;
    if (spec == NULL) return _flat_err_set(err, EMBZ_ERR_INPUT, "no family given");
    if (nsettings < 0) nsettings = 0;
    embz_setting_t *s = calloc((size_t) (nsettings ? nsettings : 1), sizeof(embz_setting_t));
    if (s == NULL) return _flat_err_set(err, EMBZ_ERR_NOMEM, "out of memory");
    for (long k = 0; k < nsettings; k++) {
        if (names[k] == NULL || names[k][0] == '\0' || values[k] == NULL) {
            free(s);
            return _flat_err_set(err, EMBZ_ERR_INPUT, "setting %ld has no name or no value",
                                 k + 1);
        }
        s[k].name = names[k];
        s[k].value = values[k];
    }
    embz_flat_family *h = malloc(sizeof(*h));
    if (h == NULL) abort();
    embz_family_init(h->f);
    embz_err_t e;
    embz_err_clear(&e);
    int st = embz_family_resolve(h->f, spec, s, nsettings, amplitude != 0, &e);
    free(s);
    if (st != EMBZ_OK) _flat_err_from(err, st, &e);
    else st = check_settings_used(h->f, names, nsettings, err);
    if (st != EMBZ_OK) {
        embz_family_clear(h->f);
        free(h);
        return st;
    }
    *out = h;
    return EMBZ_OK;
}

void embz_flat_family_free(embz_flat_family *f)
{
    if (f == NULL) return;
    embz_family_clear(f->f);
    free(f);
}

static void family_row(embz_flat_table *t, long r, const embz_family_struct *f)
{
    char *label = embz_family_label(f);
    _flat_set(t, r, "name", f->name);
    _flat_set(t, r, "label", label);
    free(label);
    _flat_set(t, r, "description", f->description ? f->description : "");
    _flat_set(t, r, "weight_text", f->weight_text ? f->weight_text : "");
    char *w = embz_expr_to_string(f->weight);
    _flat_set(t, r, "weight", w);
    free(w);
    _flat_set_l(t, r, "amplitude", f->amplitude);
    _flat_set(t, r, "origin", f->origin ? f->origin : "");
    _flat_set_l(t, r, "depends_on_n", embz_family_depends_on_n(f));
    _flat_set_l(t, r, "nparams", f->nparams);
    for (long k = 0; k < f->nparams; k++) {
        char key[300];
        char *v = fmpq_get_str(NULL, 10, f->param_values + k);
        snprintf(key, sizeof(key), "param:%s", f->param_names[k]);
        _flat_set(t, r, key, v);
        flint_free(v);
    }
}

int embz_flat_family_info(embz_flat_table **out, const embz_flat_family *f, embz_flat_err *err)
{
    (void) err;
    embz_flat_table *t = _flat_table_new();
    family_row(t, _flat_row_add(t), f->f);
    *out = t;
    return EMBZ_OK;
}

int embz_flat_family_weights(embz_flat_table **out, const embz_flat_family *f,
                             const char *const *i, long len, const char *n,
                             const embz_flat_opts *given, embz_flat_err *err)
{
    *out = NULL;
    embz_flat_opts o;
    _flat_opts_get(&o, given);
    slong prec = o.prec > 0 ? o.prec : EMBZ_PREC_ONE;
    slong digits = _flat_end_digits(&o, prec);
    fmpz_t fi, fn;
    fmpz_init(fi);
    fmpz_init(fn);
    arb_t w;
    arb_init(w);
    fmpq_t q;
    fmpq_init(q);
    int st = EMBZ_OK;
    if (n != NULL) st = _flat_size_parse(fn, n, "size n", err);
    else if (embz_family_depends_on_n(f->f))
        st = _flat_err_set(err, EMBZ_ERR_INPUT, "the weight uses n: give the size n");
    embz_flat_table *t = _flat_table_new();
    for (long k = 0; k < len && st == EMBZ_OK; k++) {
        st = _flat_size_parse(fi, i[k], "index i", err);
        if (st != EMBZ_OK) break;
        if (n != NULL && fmpz_cmp(fi, fn) > 0) {
            st = _flat_err_set(err, EMBZ_ERR_INPUT, "the index i = %s exceeds the size n = %s",
                               i[k], n);
            break;
        }
        embz_err_t e;
        embz_err_clear(&e);
        st = embz_family_weight_arb(w, f->f, fi, n != NULL ? fn : fi, prec, &e);
        if (st != EMBZ_OK) {
            _flat_err_from(err, st, &e);
            break;
        }
        long r = _flat_row_add(t);
        _flat_set_size(t, r, "i", fi);
        if (fmpz_bits(fi) < 62 && (n == NULL || fmpz_bits(fn) < 62)
            && embz_expr_eval_fmpq(q, f->f->weight, fi, n != NULL ? fn : fi) == EMBZ_OK) {
            char *s = fmpq_get_str(NULL, 10, q);
            _flat_set(t, r, "exact", s);
            flint_free(s);
        }
        _flat_set_ends(t, r, "", w, digits);
        char *c = embz_arb_certified_string(w, _flat_cert_digits(prec));
        _flat_set(t, r, "certified", c);
        free(c);
        _flat_set_d(t, r, "mid", embz_arb_mid_d(w));
    }
    fmpq_clear(q);
    arb_clear(w);
    fmpz_clear(fi);
    fmpz_clear(fn);
    if (st != EMBZ_OK) {
        embz_flat_table_free(t);
        return st;
    }
    *out = t;
    return EMBZ_OK;
}

int embz_flat_family_list(embz_flat_table **out, embz_flat_err *err)
{
    *out = NULL;
    char **paths = NULL;
    long count = 0;
    embz_err_t e;
    embz_err_clear(&e);
    int st = embz_family_list(&paths, &count, &e);
    if (st != EMBZ_OK) {
        _flat_err_from(err, st, &e);
        return st;
    }
    embz_flat_table *t = _flat_table_new();
    for (long k = 0; k < count; k++) {
        embz_family_t f;
        embz_family_init(f);
        embz_err_clear(&e);
        if (embz_family_load_file(f, paths[k], &e) == EMBZ_OK) {
            long r = _flat_row_add(t);
            family_row(t, r, f);
            _flat_set(t, r, "path", paths[k]);
        }
        embz_family_clear(f);
        free(paths[k]);
    }
    free(paths);
    *out = t;
    return EMBZ_OK;
}

/* ------------------------------------------------------------------ targets */

int embz_flat_target_new(embz_flat_target **out, const char *spec, int amplitude,
                         embz_flat_err *err)
{
    *out = NULL;
    if (spec == NULL) return _flat_err_set(err, EMBZ_ERR_INPUT, "no target given");
    embz_flat_target *h = malloc(sizeof(*h));
    if (h == NULL) abort();
    embz_target_init(h->q);
    embz_err_t e;
    embz_err_clear(&e);
    int st = embz_target_parse(h->q, spec, amplitude != 0, &e);
    if (st != EMBZ_OK) {
        _flat_err_from(err, st, &e);
        embz_target_clear(h->q);
        free(h);
        return st;
    }
    *out = h;
    return EMBZ_OK;
}

void embz_flat_target_free(embz_flat_target *t)
{
    if (t == NULL) return;
    embz_target_clear(t->q);
    free(t);
}

const char *embz_flat_target_label(const embz_flat_target *t)
{
    return t == NULL ? "ebit" : t->q->label;
}
