/* Where families come from: the library directories, files, inline expressions. */
#include <stdlib.h>
#include <string.h>
#include <dirent.h>
#include <errno.h>
#include <sys/stat.h>
#include "family_internal.h"
#include "src/family/family_dirs.h"   /* generated: EMBZ_FAMILY_SOURCE_DIR, EMBZ_FAMILY_DATA_DIR */

#define MAX_DIRS 64

const char *const *embz_family_dirs(void)
{
    /* per thread: concurrent resolutions (a scan, a binding's threads) do not share it */
    static _Thread_local char storage[8192];
    static _Thread_local const char *dirs[MAX_DIRS + 1];
    long nd = 0;
    size_t pos = 0;
    const char *env = getenv("EMBZ_FAMILY_PATH");

    if (env != NULL) {
        const char *p = env;
        while (*p != '\0' && nd < MAX_DIRS - 2) {
            const char *colon = strchr(p, ':');
            size_t len = colon ? (size_t) (colon - p) : strlen(p);
            if (len > 0 && pos + len + 1 <= sizeof(storage)) {
                memcpy(storage + pos, p, len);
                storage[pos + len] = '\0';
                dirs[nd++] = storage + pos;
                pos += len + 1;
            }
            if (colon == NULL) break;
            p = colon + 1;
        }
    }
    dirs[nd++] = EMBZ_FAMILY_DATA_DIR;
    dirs[nd++] = EMBZ_FAMILY_SOURCE_DIR;
    dirs[nd] = NULL;
    return dirs;
}

static int is_regular_file(const char *path)
{
    struct stat st;
    return stat(path, &st) == 0 && S_ISREG(st.st_mode);
}

/* A library name: letters, digits, '_', '-', not starting with '-'. */
static int looks_like_name(const char *s)
{
    if (s[0] == '\0' || s[0] == '-' || strlen(s) > 200) return 0;
    for (const char *p = s; *p; p++) {
        char c = *p;
        if (!((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9')
              || c == '_' || c == '-'))
            return 0;
    }
    return 1;
}

/* Path of NAME.fam in the first library directory holding it (malloc'ed), or NULL. */
static char *find_in_library(const char *name)
{
    const char *const *dirs = embz_family_dirs();
    for (long k = 0; dirs[k] != NULL; k++) {
        size_t len = strlen(dirs[k]) + strlen(name) + 8;
        char *path = malloc(len);
        snprintf(path, len, "%s/%s.fam", dirs[k], name);
        if (is_regular_file(path)) return path;
        free(path);
    }
    return NULL;
}

static int ends_with(const char *s, const char *suffix)
{
    size_t a = strlen(s), b = strlen(suffix);
    return a >= b && strcmp(s + a - b, suffix) == 0;
}

/* 1 if the expression (reached from its root) refers to parameter k. */
static int uses_param(const embz_expr_t e, long k)
{
    if (e->root < 0) return 0;
    char *reach = calloc((size_t) e->len, 1);
    int found = 0;
    if (reach == NULL) abort();
    reach[e->root] = 1;
    for (long j = e->root; j >= 0 && !found; j--) {
        if (!reach[j]) continue;
        const embz_node_t *nd = e->nodes + j;
        if (nd->a >= 0) reach[nd->a] = 1;
        if (nd->b >= 0) reach[nd->b] = 1;
        found = nd->op == EMBZ_OP_PARAM && nd->param == k;
    }
    free(reach);
    return found;
}

static int resolve_inline(embz_family_t f, const char *spec, const embz_setting_t *settings,
                          long nsettings, embz_err_t *err)
{
    embz_family_t g;
    fmpq_t v;
    int status = EMBZ_OK;

    embz_family_init(g);
    fmpq_init(v);
    /* the parameters of an inline expression are the names given by the settings */
    for (long s = 0; s < nsettings; s++) {
        if (!_embz_family_param_name_ok(settings[s].name)) {
            char qname[300];
            embz_err_quote(qname, sizeof(qname), settings[s].name, 64);
            status = embz_err_set(err, EMBZ_ERR_INPUT,
                                  "bad parameter name '%s' (a letter or '_' followed by letters, "
                                  "digits or '_'; not i, n, a constant or a function name)",
                                  qname);
            goto done;
        }
        if (embz_number_parse(v, settings[s].value) != EMBZ_OK) {
            status = _embz_family_bad_value(err, settings[s].value, settings[s].name);
            goto done;
        }
        long k = _embz_family_find_param(g, settings[s].name);
        if (k >= 0)
            fmpq_set(g->param_values + k, v);   /* a later setting wins */
        else
            _embz_family_add_param(g, settings[s].name, v);
    }
    status = embz_expr_parse(g->raw, spec, (const char *const *) g->param_names, g->nparams,
                             err);
    if (status == EMBZ_OK) {
        /* only the settings the expression uses become its parameters (the caller decides
         * whether a setting left over is an error) */
        long kept = 0;
        for (long k = 0; k < g->nparams; k++) {
            if (!uses_param(g->raw, k)) continue;
            if (kept != k) {
                free(g->param_names[kept]);
                g->param_names[kept] = g->param_names[k];
                g->param_names[k] = NULL;
                fmpq_swap(g->param_values + kept, g->param_values + k);
            }
            kept++;
        }
        if (kept < g->nparams) {
            for (long k = kept; k < g->nparams; k++) {
                free(g->param_names[k]);
                fmpq_clear(g->param_values + k);
            }
            g->nparams = kept;
            status = embz_expr_parse(g->raw, spec, (const char *const *) g->param_names,
                                     g->nparams, err);
        }
    }
    if (status != EMBZ_OK) {
        if (looks_like_name(spec)) {
            /* most likely a misspelt library name: say so, keep the expression diagnosis */
            char inner[sizeof(err->text)];
            snprintf(inner, sizeof(inner), "%s", err->text);
            embz_err_set(err, EMBZ_ERR_INPUT,
                         "'%s' is not a family in the library (see 'embz families'), not a "
                         "file, and not a valid expression: %.300s", spec, inner);
        }
        status = EMBZ_ERR_INPUT;
        err->code = status;
        goto done;
    }
    _embz_family_set_str(&g->name, spec);
    _embz_family_set_str(&g->weight_text, spec);
    _embz_family_set_str(&g->description, "inline expression");
    _embz_family_set_str(&g->origin, "inline");
    embz_family_bind(g);
    embz_family_clear(f);
    *f = *g;
    embz_family_init(g);
done:
    fmpq_clear(v);
    embz_family_clear(g);
    return status;
}

int embz_family_resolve(embz_family_t f, const char *spec,
                        const embz_setting_t *settings, long nsettings, int amplitude,
                        embz_err_t *err)
{
    int status;
    embz_err_clear(err);
    if (spec == NULL || spec[0] == '\0')
        return embz_err_set(err, EMBZ_ERR_INPUT,
                            "empty family: give a library name, a file or an expression");

    char *path = looks_like_name(spec) ? find_in_library(spec) : NULL;
    int not_file = 0;         /* an existing path that is no regular file: -1 dir, -2 other */
    if (path == NULL) {
        struct stat st;
        errno = 0;
        if (stat(spec, &st) == 0) {
            if (S_ISREG(st.st_mode)) path = _embz_family_strdup(spec);
            else not_file = S_ISDIR(st.st_mode) ? -1 : -2;
        } else if (ends_with(spec, ".fam")) {
            /* a .fam name is no expression: say why the file cannot be had (missing, a
             * symbolic link loop, no permission on a directory on the way, ...) */
            return _embz_family_path_error(err, spec, errno, 0);
        }
    }

    if (path != NULL) {
        status = embz_family_load_file(f, path, err);
        free(path);
        if (status != EMBZ_OK) return status;
        status = embz_family_apply_settings(f, settings, nsettings, err);
        if (status != EMBZ_OK) return status;
    } else {
        status = resolve_inline(f, spec, settings, nsettings, err);
        /* a directory or device that is not a valid expression either was meant as a file */
        if (status != EMBZ_OK && not_file) {
            embz_err_clear(err);
            return _embz_family_path_error(err, spec, 0, not_file);
        }
        if (status != EMBZ_OK) return status;
    }
    if (amplitude && !f->amplitude) {
        f->amplitude = 1;
        embz_family_bind(f);
    }
    return EMBZ_OK;
}

static int cmp_by_base(const void *a, const void *b)
{
    const char *x = *(const char *const *) a, *y = *(const char *const *) b;
    const char *bx = strrchr(x, '/'), *by = strrchr(y, '/');
    return strcmp(bx ? bx + 1 : x, by ? by + 1 : y);
}

int embz_family_list(char ***paths, long *count, embz_err_t *err)
{
    const char *const *dirs = embz_family_dirs();
    char **out = NULL;
    long n = 0, alloc = 0;

    embz_err_clear(err);
    for (long k = 0; dirs[k] != NULL; k++) {
        DIR *d = opendir(dirs[k]);
        if (d == NULL) continue;           /* a missing directory is not an error */
        struct dirent *e;
        while ((e = readdir(d)) != NULL) {
            const char *nm = e->d_name;
            size_t len = strlen(nm);
            if (len <= 4 || strcmp(nm + len - 4, ".fam") != 0 || nm[0] == '.') continue;
            /* the first directory holding a name wins (the same order as resolution) */
            int dup = 0;
            for (long j = 0; j < n && !dup; j++) {
                const char *b = strrchr(out[j], '/');
                dup = strcmp(b ? b + 1 : out[j], nm) == 0;
            }
            if (dup) continue;
            size_t plen = strlen(dirs[k]) + len + 2;
            char *p = malloc(plen);
            snprintf(p, plen, "%s/%s", dirs[k], nm);
            if (!is_regular_file(p)) { free(p); continue; }
            if (n == alloc) {
                alloc = alloc ? 2 * alloc : 16;
                out = realloc(out, (size_t) alloc * sizeof(char *));
            }
            out[n++] = p;
        }
        closedir(d);
    }
    if (n > 1) qsort(out, (size_t) n, sizeof(char *), cmp_by_base);
    *paths = out;
    *count = n;
    return EMBZ_OK;
}
