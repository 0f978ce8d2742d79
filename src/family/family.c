/* Family objects: life cycle, parameters, binding the weight expression. */
#include <stdlib.h>
#include <string.h>
#include "family_internal.h"
#include "embz/util.h"

char *_embz_family_strdup(const char *s)
{
    size_t len = strlen(s);
    char *d = malloc(len + 1);
    memcpy(d, s, len + 1);
    return d;
}

void _embz_family_set_str(char **field, const char *value)
{
    free(*field);
    *field = _embz_family_strdup(value);
}

void embz_family_init(embz_family_t f)
{
    f->name = _embz_family_strdup("");
    f->description = _embz_family_strdup("");
    f->weight_text = _embz_family_strdup("");
    f->origin = _embz_family_strdup("");
    f->amplitude = 0;
    f->nparams = 0;
    f->param_names = NULL;
    f->param_values = NULL;
    embz_expr_init(f->weight);
    embz_expr_init(f->raw);
    f->kind = EMBZ_FAMILY_WEIGHT;
    embz_expr_init(f->count); embz_expr_init(f->first); embz_expr_init(f->last);
    embz_expr_init(f->count_raw); embz_expr_init(f->first_raw); embz_expr_init(f->last_raw);
}

void embz_family_clear(embz_family_t f)
{
    free(f->name);
    free(f->description);
    free(f->weight_text);
    free(f->origin);
    for (long k = 0; k < f->nparams; k++) {
        free(f->param_names[k]);
        fmpq_clear(f->param_values + k);
    }
    free(f->param_names);
    free(f->param_values);
    embz_expr_clear(f->weight);
    embz_expr_clear(f->raw);
    embz_expr_clear(f->count); embz_expr_clear(f->first); embz_expr_clear(f->last);
    embz_expr_clear(f->count_raw); embz_expr_clear(f->first_raw); embz_expr_clear(f->last_raw);
}

/* Names the expression language gives a meaning of its own; a parameter may not hide them. */
static const char *const reserved_names[] = {
    "i", "n", "pi", "e", "gamma", "euler",
    "log", "ln", "log2", "log10", "exp", "sqrt", "abs", "lgamma", "lngamma", "atan", "sin",
    "cos", "floor", "ceil", "min", "max", "pow", "binom", NULL
};

int _embz_family_param_name_ok(const char *s)
{
    if (s == NULL || s[0] == '\0' || strlen(s) > 64) return 0;
    if (!((s[0] >= 'a' && s[0] <= 'z') || (s[0] >= 'A' && s[0] <= 'Z') || s[0] == '_'))
        return 0;
    for (const char *p = s + 1; *p; p++) {
        char c = *p;
        if (!((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9')
              || c == '_'))
            return 0;
    }
    for (int k = 0; reserved_names[k] != NULL; k++)
        if (strcmp(s, reserved_names[k]) == 0) return 0;
    return 1;
}

int _embz_family_bad_value(embz_err_t *err, const char *value, const char *name)
{
    char qname[300], qval[300];
    embz_err_quote(qname, sizeof(qname), name, 64);
    embz_err_quote(qval, sizeof(qval), value, 64);
    if (embz_number_out_of_range(value))
        return embz_err_set(err, EMBZ_ERR_INPUT,
                            "value '%s' for parameter '%s' is out of range (decimal exponents "
                            "from -%d to %d)", qval, qname, EMBZ_NUMBER_MAX_EXP10,
                            EMBZ_NUMBER_MAX_EXP10);
    return embz_err_set(err, EMBZ_ERR_INPUT,
                        "bad value '%s' for parameter '%s' (expected an exact decimal such as "
                        "-0.7, 1e-3 or 2/3)", qval, qname);
}

long _embz_family_find_param(const embz_family_t f, const char *name)
{
    for (long k = 0; k < f->nparams; k++)
        if (strcmp(f->param_names[k], name) == 0) return k;
    return -1;
}

void _embz_family_add_param(embz_family_t f, const char *name, const fmpq_t value)
{
    long k = f->nparams;
    f->param_names = realloc(f->param_names, (size_t) (k + 1) * sizeof(char *));
    /* fmpq structs move safely with realloc (FLINT keeps no self pointers) */
    f->param_values = realloc(f->param_values, (size_t) (k + 1) * sizeof(fmpq));
    f->param_names[k] = _embz_family_strdup(name);
    fmpq_init(f->param_values + k);
    fmpq_set(f->param_values + k, value);
    f->nparams = k + 1;
}

static void bind_one(embz_expr_t e, const embz_expr_t raw, const embz_family_t f)
{
    embz_expr_set(e, raw);
    if (f->nparams > 0)
        embz_expr_bind(e, f->param_values);
    else
        embz_expr_fold(e);      /* bind folds too */
}

void embz_family_bind(embz_family_t f)
{
    bind_one(f->weight, f->raw, f);
    if (f->amplitude)
        embz_expr_square(f->weight);
    if (f->kind == EMBZ_FAMILY_LEVELS) {
        bind_one(f->count, f->count_raw, f);
        bind_one(f->first, f->first_raw, f);
        bind_one(f->last, f->last_raw, f);
    }
}

void embz_family_set(embz_family_t g, const embz_family_t f)
{
    if (g == f) return;
    embz_family_clear(g);
    embz_family_init(g);
    _embz_family_set_str(&g->name, f->name);
    _embz_family_set_str(&g->description, f->description);
    _embz_family_set_str(&g->weight_text, f->weight_text);
    _embz_family_set_str(&g->origin, f->origin);
    g->amplitude = f->amplitude;
    for (long k = 0; k < f->nparams; k++)
        _embz_family_add_param(g, f->param_names[k], f->param_values + k);
    embz_expr_set(g->raw, f->raw);
    embz_expr_set(g->weight, f->weight);
    g->kind = f->kind;
    embz_expr_set(g->count, f->count);
    embz_expr_set(g->first, f->first);
    embz_expr_set(g->last, f->last);
    embz_expr_set(g->count_raw, f->count_raw);
    embz_expr_set(g->first_raw, f->first_raw);
    embz_expr_set(g->last_raw, f->last_raw);
}

int embz_family_is_levels(const embz_family_t f)
{
    return f->kind == EMBZ_FAMILY_LEVELS;
}

int embz_family_apply_settings(embz_family_t f, const embz_setting_t *settings, long nsettings,
                               embz_err_t *err)
{
    fmpq_t v;
    fmpq_init(v);
    for (long s = 0; s < nsettings; s++) {
        long k = _embz_family_find_param(f, settings[s].name);
        char qname[300];
        embz_err_quote(qname, sizeof(qname), settings[s].name, 64);
        if (k < 0) {
            char known[256] = "";
            size_t pos = 0;
            for (long j = 0; j < f->nparams && pos < sizeof(known); j++) {
                int w = snprintf(known + pos, sizeof(known) - pos, "%s%s", j ? ", " : "",
                                 f->param_names[j]);
                if (w < 0) break;
                pos += (size_t) w;
            }
            fmpq_clear(v);
            if (f->nparams == 0)
                return embz_err_set(err, EMBZ_ERR_INPUT,
                                    "unknown parameter '%s': family '%s' has no parameters",
                                    qname, f->name);
            return embz_err_set(err, EMBZ_ERR_INPUT,
                                "unknown parameter '%s' (family '%s' has: %s)",
                                qname, f->name, known);
        }
        if (embz_number_parse(v, settings[s].value) != EMBZ_OK) {
            fmpq_clear(v);
            return _embz_family_bad_value(err, settings[s].value, settings[s].name);
        }
        fmpq_set(f->param_values + k, v);
    }
    fmpq_clear(v);
    embz_family_bind(f);
    return EMBZ_OK;
}

int embz_setting_split(embz_setting_t *s, char *text, embz_err_t *err)
{
    char *eq = strchr(text, '=');
    if (eq == NULL)
        return embz_err_set(err, EMBZ_ERR_INPUT,
                            "setting '%s' has no '=' (expected NAME=VALUE)", text);
    *eq = '\0';
    /* trim blanks around the name and the value */
    char *name = text, *value = eq + 1;
    while (*name == ' ' || *name == '\t') name++;
    for (char *e = eq - 1; e >= name && (*e == ' ' || *e == '\t'); e--) *e = '\0';
    while (*value == ' ' || *value == '\t') value++;
    size_t vl = strlen(value);
    while (vl > 0 && (value[vl - 1] == ' ' || value[vl - 1] == '\t')) value[--vl] = '\0';
    if (name[0] == '\0') {
        *eq = '=';
        return embz_err_set(err, EMBZ_ERR_INPUT, "setting '%s' has an empty name", text);
    }
    if (value[0] == '\0')
        return embz_err_set(err, EMBZ_ERR_INPUT, "setting '%s=' has an empty value", name);
    s->name = name;
    s->value = value;
    return EMBZ_OK;
}

int embz_family_depends_on_n(const embz_family_t f)
{
    return (embz_expr_uses(f->weight) & EMBZ_USES_N) != 0;
}

char *embz_family_label(const embz_family_t f)
{
    embz_buf_t b;
    embz_buf_init(&b);
    embz_buf_printf(&b, "%s", f->name);
    for (long k = 0; k < f->nparams; k++) {
        char *v = fmpq_get_str(NULL, 10, f->param_values + k);
        embz_buf_printf(&b, "%s%s=%s", k ? ", " : " (", f->param_names[k], v);
        flint_free(v);
    }
    if (f->nparams > 0) embz_buf_printf(&b, ")");
    return b.s;
}
