/* Family files: a small line-based text format.
 *
 *   # comment lines start with '#'
 *   name = power
 *   description = one line saying what the family is
 *   param a = -0.5
 *   weight = i^a            (or: amplitude = ..., whose square is the weight)
 *
 * Every error carries the file name and the 1-based line; an error inside the weight
 * expression also carries the column within the expression. */
#include <stdlib.h>
#include <string.h>
#include <errno.h>
#include <sys/stat.h>
#include "family_internal.h"

#define EMBZ_FAMILY_FILE_MAX (1L << 20)

static char *trim(char *s)
{
    while (*s == ' ' || *s == '\t') s++;
    size_t len = strlen(s);
    while (len > 0 && (s[len - 1] == ' ' || s[len - 1] == '\t' || s[len - 1] == '\r'))
        s[--len] = '\0';
    return s;
}

static void where(embz_err_t *err, const char *file_name, long line)
{
    snprintf(err->file, sizeof(err->file), "%s", file_name ? file_name : "");
    err->line = line;
    err->col = 0;
    err->source[0] = '\0';
}

/* Base name of a path without its ".fam" ending. */
static char *default_name(const char *file_name)
{
    const char *b = strrchr(file_name, '/');
    b = b ? b + 1 : file_name;
    char *s = _embz_family_strdup(b);
    size_t len = strlen(s);
    if (len > 4 && strcmp(s + len - 4, ".fam") == 0) s[len - 4] = '\0';
    return s;
}

int embz_family_parse_text(embz_family_t f, const char *text, const char *file_name,
                           embz_err_t *err)
{
    enum { K_NAME, K_DESC, K_WEIGHT, K_AMPL, K_LEVEL, K_CNT, K_FIRST, K_LAST, NKEYS };
    static const char *const keys[NKEYS] = { "name", "description", "weight", "amplitude",
                                             "level", "count", "first", "last" };
    long seen[NKEYS] = { 0 };
    char *values[NKEYS] = { NULL };
    int status = EMBZ_OK;
    long lineno = 0;
    fmpq_t v;
    embz_family_t g;          /* built here, moved into f on success */

    if (file_name == NULL) file_name = "";
    embz_err_clear(err);
    fmpq_init(v);
    embz_family_init(g);

    /* a UTF-8 byte-order mark (some editors write one) is not part of the first line */
    if ((unsigned char) text[0] == 0xef && (unsigned char) text[1] == 0xbb
        && (unsigned char) text[2] == 0xbf)
        text += 3;
    char *copy = _embz_family_strdup(text);
    char *next = copy;
    while (next != NULL) {
        char *line = next;
        char *nl = strchr(line, '\n');
        if (nl) { *nl = '\0'; next = nl + 1; } else next = NULL;
        lineno++;
        if (nl == NULL && line[0] == '\0') break;   /* text ended with a newline */
        char *s = trim(line);
        if (s[0] == '\0' || s[0] == '#') continue;

        if (strncmp(s, "param", 5) == 0 && (s[5] == ' ' || s[5] == '\t')) {
            char *rest = s + 5;
            char *eq = strchr(rest, '=');
            if (eq == NULL) {
                where(err, file_name, lineno);
                status = embz_err_set(err, EMBZ_ERR_INPUT,
                                      "missing '=' in parameter line (expected: param NAME = VALUE)");
                goto done;
            }
            *eq = '\0';
            char *pname = trim(rest), *pval = trim(eq + 1);
            char qname[300];
            embz_err_quote(qname, sizeof(qname), pname, 64);
            if (!_embz_family_param_name_ok(pname)) {
                where(err, file_name, lineno);
                status = embz_err_set(err, EMBZ_ERR_INPUT,
                                      "bad parameter name '%s' (a letter or '_' followed by "
                                      "letters, digits or '_'; not i, n, a constant or a "
                                      "function name)", qname);
                goto done;
            }
            if (_embz_family_find_param(g, pname) >= 0) {
                where(err, file_name, lineno);
                status = embz_err_set(err, EMBZ_ERR_INPUT, "duplicate parameter '%s'", qname);
                goto done;
            }
            if (embz_number_parse(v, pval) != EMBZ_OK) {
                char qval[300];
                embz_err_quote(qval, sizeof(qval), pval, 64);
                where(err, file_name, lineno);
                if (embz_number_out_of_range(pval))
                    status = embz_err_set(err, EMBZ_ERR_INPUT,
                                          "parameter value '%s' for '%s' is out of range "
                                          "(decimal exponents from -%d to %d)", qval, qname,
                                          EMBZ_NUMBER_MAX_EXP10, EMBZ_NUMBER_MAX_EXP10);
                else
                    status = embz_err_set(err, EMBZ_ERR_INPUT,
                                          "bad parameter value '%s' for '%s' (expected an "
                                          "exact decimal such as -0.5, 1e-3 or 2/3)", qval,
                                          qname);
                goto done;
            }
            _embz_family_add_param(g, pname, v);
            continue;
        }

        char *eq = strchr(s, '=');
        if (eq == NULL) {
            where(err, file_name, lineno);
            status = embz_err_set(err, EMBZ_ERR_INPUT,
                                  "missing '=' (expected KEY = VALUE, or a '#' comment)");
            goto done;
        }
        *eq = '\0';
        char *key = trim(s), *val = trim(eq + 1);
        char qkey[300];
        embz_err_quote(qkey, sizeof(qkey), key, 64);
        int k;
        for (k = 0; k < NKEYS; k++)
            if (strcmp(key, keys[k]) == 0) break;
        if (k == NKEYS) {
            where(err, file_name, lineno);
            status = embz_err_set(err, EMBZ_ERR_INPUT,
                                  "unknown key '%s' (known: name, description, weight, "
                                  "amplitude, level, count, first, last, param NAME)", qkey);
            goto done;
        }
        if (seen[k]) {
            where(err, file_name, lineno);
            status = embz_err_set(err, EMBZ_ERR_INPUT,
                                  "duplicate key '%s' (first given on line %ld)", qkey, seen[k]);
            goto done;
        }
        {
            /* one of weight, amplitude, level */
            int value_keys[3] = { K_WEIGHT, K_AMPL, K_LEVEL }, other = -1;
            for (int j = 0; j < 3; j++)
                if (value_keys[j] != k && seen[value_keys[j]]
                    && (k == K_WEIGHT || k == K_AMPL || k == K_LEVEL))
                    other = value_keys[j];
            if (other >= 0) {
                where(err, file_name, lineno);
                status = embz_err_set(err, EMBZ_ERR_INPUT,
                                      "both '%s' and '%s' given (line %ld); use one", keys[other],
                                      keys[k], seen[other]);
                goto done;
            }
        }
        if (val[0] == '\0' && k != K_DESC) {
            where(err, file_name, lineno);
            status = embz_err_set(err, EMBZ_ERR_INPUT, "empty value for '%s'", qkey);
            goto done;
        }
        seen[k] = lineno;
        values[k] = val;
    }

    if (!seen[K_WEIGHT] && !seen[K_AMPL] && !seen[K_LEVEL]) {
        where(err, file_name, 0);
        status = embz_err_set(err, EMBZ_ERR_INPUT,
                              "missing weight: the file needs a 'weight = ...' or an "
                              "'amplitude = ...' line (or 'level = ...' for a level family)");
        goto done;
    }
    {
        /* level families: count, first and last go with level, and only with it */
        int lk[3] = { K_CNT, K_FIRST, K_LAST };
        for (int j = 0; j < 3; j++) {
            if (seen[K_LEVEL] && !seen[lk[j]]) {
                where(err, file_name, seen[K_LEVEL]);
                status = embz_err_set(err, EMBZ_ERR_INPUT,
                                      "a level family needs '%s = ...' too (level, count, "
                                      "first, last)", keys[lk[j]]);
                goto done;
            }
            if (!seen[K_LEVEL] && seen[lk[j]]) {
                where(err, file_name, seen[lk[j]]);
                status = embz_err_set(err, EMBZ_ERR_INPUT,
                                      "'%s' belongs to a level family: give 'level = ...' "
                                      "instead of a weight", keys[lk[j]]);
                goto done;
            }
        }
    }

    {
        int k = seen[K_WEIGHT] ? K_WEIGHT : seen[K_AMPL] ? K_AMPL : K_LEVEL;
        int parts[4] = { k, K_CNT, K_FIRST, K_LAST };
        embz_expr_struct *dst[4] = { g->raw, g->count_raw, g->first_raw, g->last_raw };
        for (int j = 0; j < (k == K_LEVEL ? 4 : 1); j++) {
            status = embz_expr_parse(dst[j], values[parts[j]],
                                     (const char *const *) g->param_names, g->nparams, err);
            if (status != EMBZ_OK) {
                /* keep the parser's column and source (the expression); add where it sits */
                snprintf(err->file, sizeof(err->file), "%s", file_name);
                err->line = seen[parts[j]];
                if (err->source[0] == '\0')
                    snprintf(err->source, sizeof(err->source), "%s", values[parts[j]]);
                status = EMBZ_ERR_INPUT;
                err->code = status;
                goto done;
            }
        }
        g->amplitude = (k == K_AMPL);
        g->kind = k == K_LEVEL ? EMBZ_FAMILY_LEVELS : EMBZ_FAMILY_WEIGHT;
        _embz_family_set_str(&g->weight_text, values[k]);
    }
    if (seen[K_NAME]) {
        _embz_family_set_str(&g->name, values[K_NAME]);
    } else {
        free(g->name);
        g->name = default_name(file_name);
    }
    if (seen[K_DESC]) _embz_family_set_str(&g->description, values[K_DESC]);
    _embz_family_set_str(&g->origin, file_name[0] ? file_name : "text");
    embz_family_bind(g);

    /* move g into f */
    embz_family_clear(f);
    *f = *g;
    embz_family_init(g);

done:
    embz_family_clear(g);
    fmpq_clear(v);
    free(copy);
    return status;
}

int _embz_family_open_status(int errnum)
{
    /* the file was named by the user: a missing, unreadable or misplaced one is bad input;
     * only a shortage of the system's resources is a failure of the run */
    switch (errnum) {
    case ENOMEM: return EMBZ_ERR_NOMEM;
    case EMFILE: case ENFILE: case EIO: return EMBZ_ERR_IO;
    default: return EMBZ_ERR_INPUT;
    }
}

int _embz_family_path_error(embz_err_t *err, const char *path, int errnum, int kind)
{
    snprintf(err->file, sizeof(err->file), "%s", path);
    if (kind == -1)
        return embz_err_set(err, EMBZ_ERR_INPUT,
                            "cannot open family file: it is a directory, not a file");
    if (kind == -2)
        return embz_err_set(err, EMBZ_ERR_INPUT, "cannot open family file: it is not a "
                            "regular file (a device, pipe or socket)");
    if (errnum == ENOENT)
        return embz_err_set(err, EMBZ_ERR_INPUT, "cannot open family file: no such file");
    return embz_err_set(err, _embz_family_open_status(errnum), "cannot open family file: %s",
                        strerror(errnum));
}

int embz_family_load_file(embz_family_t f, const char *path, embz_err_t *err)
{
    embz_err_clear(err);
    FILE *fp = fopen(path, "rb");
    if (fp == NULL) return _embz_family_path_error(err, path, errno, 0);
    {
        struct stat st;
        if (fstat(fileno(fp), &st) == 0 && !S_ISREG(st.st_mode)) {
            fclose(fp);
            return _embz_family_path_error(err, path, 0, S_ISDIR(st.st_mode) ? -1 : -2);
        }
    }
    size_t cap = 4096, len = 0;
    char *buf = malloc(cap);
    for (;;) {
        if (len + 4096 + 1 > cap) {
            cap *= 2;
            buf = realloc(buf, cap);
        }
        size_t got = fread(buf + len, 1, cap - len - 1, fp);
        len += got;
        if (got == 0) break;
        if ((long) len > EMBZ_FAMILY_FILE_MAX) {
            fclose(fp);
            free(buf);
            snprintf(err->file, sizeof(err->file), "%s", path);
            return embz_err_set(err, EMBZ_ERR_INPUT, "family file is larger than %ld bytes",
                                EMBZ_FAMILY_FILE_MAX);
        }
    }
    int rerr = ferror(fp);
    fclose(fp);
    if (rerr) {
        free(buf);
        snprintf(err->file, sizeof(err->file), "%s", path);
        return embz_err_set(err, EMBZ_ERR_IO, "read error");
    }
    buf[len] = '\0';
    if (memchr(buf, '\0', len) != NULL) {
        free(buf);
        snprintf(err->file, sizeof(err->file), "%s", path);
        return embz_err_set(err, EMBZ_ERR_INPUT, "not a text file (contains a NUL byte)");
    }
    int status = embz_family_parse_text(f, buf, path, err);
    free(buf);
    return status;
}
