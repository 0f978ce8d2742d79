/* Families: weight expression in (i, n) + parameters + metadata; family files; the library. */
#ifndef EMBZ_FAMILY_H
#define EMBZ_FAMILY_H

#include "embz/expr.h"

/* What a family's expressions describe. */
typedef enum {
    EMBZ_FAMILY_WEIGHT = 0,  /* the weight w(i, n) of each index i = 1..n */
    EMBZ_FAMILY_LEVELS       /* levels: for i = first(n)..last(n), the value w(i, n) repeated
                                count(i, n) times (n is the family's size, e.g. a number of
                                sites; the dimension is the sum of the counts) */
} embz_family_kind_t;

typedef struct {
    char *name;          /* short name ("inverse", "power", ...) or the inline text */
    char *description;   /* one line */
    char *weight_text;   /* the expression as the user wrote it */
    int amplitude;       /* 1 if the text gives amplitudes (weights are their squares) */
    char *origin;        /* file path, "builtin", or "inline" */
    long nparams;
    char **param_names;
    fmpq *param_values;  /* current values (defaults overridden by --set) */
    embz_expr_t weight;  /* bound weight expression: parameters substituted, squared if amplitude */
    embz_expr_t raw;     /* the text as parsed, parameters still symbolic, not squared */
    int kind;            /* embz_family_kind_t; for EMBZ_FAMILY_LEVELS weight is the level
                            value and these give the counts and the range of i: */
    embz_expr_t count, first, last;              /* bound (parameters substituted) */
    embz_expr_t count_raw, first_raw, last_raw;  /* as parsed */
} embz_family_struct;
typedef embz_family_struct embz_family_t[1];

void embz_family_init(embz_family_t f);
void embz_family_clear(embz_family_t f);

/* One "NAME=VALUE" setting from the command line. */
typedef struct { const char *name; const char *value; } embz_setting_t;

/* Parse a family file's text (file_name only for messages: "file:line: ..."). */
int embz_family_parse_text(embz_family_t f, const char *text, const char *file_name,
                           embz_err_t *err);
/* Load a file from disk. */
int embz_family_load_file(embz_family_t f, const char *path, embz_err_t *err);

/* Resolve a FAMILY argument: a library name (searched in dirs, see embz_family_dirs), a path
 * to a family file, or an inline expression. settings override parameters (an inline expression
 * declares its parameters through settings). amplitude != 0 flips the meaning of the text.
 * Finally binds the parameters into f->weight. */
int embz_family_resolve(embz_family_t f, const char *spec,
                        const embz_setting_t *settings, long nsettings, int amplitude,
                        embz_err_t *err);

/* The directories searched for library families, in order: $EMBZ_FAMILY_PATH (colon separated),
 * then the install data dir, then the source tree's families/ (EMBZ_SOURCE_FAMILIES). Returns a
 * NULL-terminated array of the calling thread's own (thread-local storage), valid until that
 * thread calls again: threads may resolve families at the same time. */
const char *const *embz_family_dirs(void);

/* List the library: fills names (malloc'ed array of malloc'ed paths) sorted by name. */
int embz_family_list(char ***paths, long *count, embz_err_t *err);

/* Weights. i is 1-based. Return EMBZ_OK or EMBZ_ERR_DOMAIN with err naming the index:
 * "weight undefined at i = 7" / "weight is negative at i = 3" / "... infinite ...". */
int embz_family_weight_arb(arb_t w, const embz_family_t f, const fmpz_t i, const fmpz_t n,
                           slong prec, embz_err_t *err);
double embz_family_weight_d(const embz_family_t f, double i, double n);
int embz_family_depends_on_n(const embz_family_t f);
/* g <- a deep copy of f (g initialised). */
void embz_family_set(embz_family_t g, const embz_family_t f);
/* 1 for a level family (EMBZ_FAMILY_LEVELS). */
/* "name (a=1/2, b=2)": the family's name and its parameter values, malloc'ed. */
char *embz_family_label(const embz_family_t f);
int embz_family_is_levels(const embz_family_t f);

/* Set parameters from NAME=VALUE settings (VALUE an exact decimal or p/q) and rebind
 * f->weight. An unknown name or a bad value is EMBZ_ERR_INPUT with a message naming it. */
int embz_family_apply_settings(embz_family_t f, const embz_setting_t *settings, long nsettings,
                               embz_err_t *err);
/* Rebuild f->weight from f->raw, f->param_values and f->amplitude. */
void embz_family_bind(embz_family_t f);
/* Split "NAME=VALUE" (as typed after --set) into a setting pointing into text. Returns
 * EMBZ_OK or EMBZ_ERR_INPUT (no '=' or empty name). */
int embz_setting_split(embz_setting_t *s, char *text, embz_err_t *err);

#endif
