/* Exact Schmidt vectors and embezzlement targets: parsing, normalisation, sorting. */
#include <stdlib.h>
#include <string.h>
#include <ctype.h>
#include <errno.h>
#include <sys/stat.h>
#include "embz/vec.h"
#include "embz/expr.h"

/* Longest single entry we accept (an exact decimal can be long, but not unbounded). */
#define EMBZ_VEC_MAX_TOKEN 4096
/* Largest file we read as a vector (bytes). */
#define EMBZ_VEC_MAX_FILE (64L << 20)
/* Largest number of entries. */
#define EMBZ_VEC_MAX_LEN 100000000L

void embz_qvec_init(embz_qvec_t v)
{
    v->p = NULL;
    v->len = 0;
    v->normalised = 0;
}

void embz_qvec_clear(embz_qvec_t v)
{
    if (v->p != NULL) _fmpq_vec_clear(v->p, v->len);
    v->p = NULL;
    v->len = 0;
    v->normalised = 0;
}

static int qcmp_desc(const void *a, const void *b)
{
    return -fmpq_cmp((const fmpq *) a, (const fmpq *) b);
}

void embz_qvec_sort(embz_qvec_t v)
{
    /* fmpq structs hold either small values or pointers: moving them bytewise is fine */
    if (v->len > 1) qsort(v->p, (size_t) v->len, sizeof(fmpq), qcmp_desc);
}

/* Growing list of rationals used while parsing. */
typedef struct { fmpq *p; long len, alloc; } qlist_t;

static int qlist_push(qlist_t *l, const fmpq_t x)
{
    if (l->len == l->alloc) {
        long na = l->alloc ? 2 * l->alloc : 16;
        fmpq *np = realloc(l->p, (size_t) na * sizeof(fmpq));
        if (np == NULL) return EMBZ_ERR_NOMEM;
        for (long k = l->alloc; k < na; k++) fmpq_init(np + k);
        l->p = np;
        l->alloc = na;
    }
    fmpq_set(l->p + l->len, x);
    l->len++;
    return EMBZ_OK;
}

static void qlist_clear(qlist_t *l)
{
    if (l->p != NULL) _fmpq_vec_clear(l->p, l->alloc);
    l->p = NULL;
    l->len = l->alloc = 0;
}

static int is_sep(int c)
{
    return c == ',' || c == ';' || isspace(c);
}

static void at_line(embz_err_t *err, int in_file, long line, const char *file)
{
    if (!in_file) return;
    snprintf(err->file, sizeof(err->file), "%s", file);
    err->line = line;
}

/* Parse the numbers of one chunk of text (a whole list, or one line of a file after its
 * comment is removed). Entries are separated by blanks and at most one ',' or ';': two
 * of those with nothing but blanks between them, or one before the first entry or after
 * the last, mark an empty entry, which is refused (a number left out by mistake should not
 * silently shorten the vector). in_file: the message carries file:line. */
static int parse_chunk(qlist_t *out, const char *text, int in_file, long line,
                       const char *file, embz_err_t *err)
{
    const char *s = text;
    char tok[EMBZ_VEC_MAX_TOKEN + 1];
    char shown[200];
    fmpq_t x;
    int status = EMBZ_OK;
    fmpq_init(x);
    for (;;) {
        /* the blanks and separators before the next entry (or the end) */
        const char *run = s, *twice = NULL, *one = NULL;
        while (*s != '\0' && is_sep((unsigned char) *s)) {
            if (*s == ',' || *s == ';') {
                if (one != NULL && twice == NULL) twice = s;
                if (one == NULL) one = s;
            }
            s++;
        }
        const char *why = NULL, *at = NULL;
        if (one != NULL && run == text) {
            why = in_file ? "the line starts with a separator"
                          : "the list starts with a separator";
            at = one;
        } else if (one != NULL && *s == '\0') {
            why = in_file ? "the line ends with a separator"
                          : "the list ends with a separator";
            at = one;
        } else if (twice != NULL) {
            why = "two separators in a row";
            at = twice;
        }
        if (why != NULL) {
            at_line(err, in_file, line, file);
            status = embz_err_set(err, EMBZ_ERR_INPUT, "entry %ld is empty: %s ('%c' at "
                                  "character %ld)", out->len + 1, why, *at,
                                  (long) (at - text) + 1);
            goto done;
        }
        if (*s == '\0') break;
        const char *t0 = s;
        while (*s != '\0' && !is_sep((unsigned char) *s)) s++;
        size_t len = (size_t) (s - t0);
        long pos = out->len + 1;
        if (out->len >= EMBZ_VEC_MAX_LEN) {
            status = embz_err_set(err, EMBZ_ERR_LIMIT, "too many entries (limit %ld)",
                                  EMBZ_VEC_MAX_LEN);
            goto done;
        }
        if (len > EMBZ_VEC_MAX_TOKEN) {
            at_line(err, in_file, line, file);
            status = embz_err_set(err, EMBZ_ERR_INPUT, "entry %ld is too long", pos);
            goto done;
        }
        memcpy(tok, t0, len);
        tok[len] = '\0';
        int bad = embz_number_parse(x, tok) != EMBZ_OK;
        if (bad || fmpq_sgn(x) < 0) {
            at_line(err, in_file, line, file);
            embz_err_quote(shown, sizeof(shown), tok, 60);
            if (bad && embz_number_out_of_range(tok))
                status = embz_err_set(err, EMBZ_ERR_INPUT,
                                      "entry %ld is out of range: '%s' (decimal exponents "
                                      "from -%d to %d)", pos, shown, EMBZ_NUMBER_MAX_EXP10,
                                      EMBZ_NUMBER_MAX_EXP10);
            else if (bad)
                status = embz_err_set(err, EMBZ_ERR_INPUT,
                                      "entry %ld is not a number: '%s'", pos, shown);
            else
                status = embz_err_set(err, EMBZ_ERR_INPUT,
                                      "entry %ld is negative: '%s' (Schmidt weights are >= 0)",
                                      pos, shown);
            goto done;
        }
        status = qlist_push(out, x);
        if (status != EMBZ_OK) {
            embz_err_set(err, status, "out of memory");
            goto done;
        }
    }
done:
    fmpq_clear(x);
    return status;
}

static int parse_file(qlist_t *out, const char *path, embz_err_t *err)
{
    FILE *fp = fopen(path, "rb");
    if (fp == NULL) {
        int e = errno;
        snprintf(err->file, sizeof(err->file), "%s", path);
        /* the file named is the user's input: refusing it is an input error */
        return embz_err_set(err, e == ENOMEM ? EMBZ_ERR_NOMEM : EMBZ_ERR_INPUT,
                            "cannot open the file: %s", strerror(e));
    }
    size_t cap = 4096, len = 0;
    char *buf = malloc(cap);
    int status = EMBZ_OK;
    if (buf == NULL) { fclose(fp); return embz_err_set(err, EMBZ_ERR_NOMEM, "out of memory"); }
    long line = 0;
    for (;;) {
        /* read one line of any length */
        len = 0;
        int c;
        while ((c = fgetc(fp)) != EOF && c != '\n') {
            if (len + 1 >= cap) {
                if (cap >= (size_t) EMBZ_VEC_MAX_FILE) {
                    snprintf(err->file, sizeof(err->file), "%s", path);
                    err->line = line + 1;
                    status = embz_err_set(err, EMBZ_ERR_LIMIT, "line too long");
                    goto done;
                }
                char *nb = realloc(buf, cap * 2);
                if (nb == NULL) { status = embz_err_set(err, EMBZ_ERR_NOMEM, "out of memory"); goto done; }
                buf = nb;
                cap *= 2;
            }
            buf[len++] = (char) c;
        }
        if (c == EOF && len == 0) break;
        line++;
        buf[len] = '\0';
        if (strlen(buf) != len) {
            snprintf(err->file, sizeof(err->file), "%s", path);
            err->line = line;
            status = embz_err_set(err, EMBZ_ERR_INPUT, "binary data (NUL byte) in the file");
            goto done;
        }
        char *hash = strchr(buf, '#');
        if (hash != NULL) *hash = '\0';
        status = parse_chunk(out, buf, 1, line, path, err);
        if (status != EMBZ_OK) goto done;
        if (c == EOF) break;
    }
    if (ferror(fp)) {
        snprintf(err->file, sizeof(err->file), "%s", path);
        status = embz_err_set(err, EMBZ_ERR_IO, "read error");
    }
done:
    free(buf);
    fclose(fp);
    return status;
}

/* What a path names: 1 a regular file, 0 nothing (errno from stat), -1 a directory, -2
 * something else (a device, a pipe, a socket). */
static int path_kind(const char *path, int *stat_errno)
{
    struct stat st;
    *stat_errno = 0;
    if (stat(path, &st) != 0) {
        *stat_errno = errno;
        return 0;
    }
    if (S_ISREG(st.st_mode)) return 1;
    return S_ISDIR(st.st_mode) ? -1 : -2;
}

/* One token without separators that is not a number: most likely the name of a file. */
static int looks_like_path(const char *spec)
{
    fmpq_t x;
    int r = 1;
    if (spec[0] == '\0') return 0;
    for (const char *p = spec; *p; p++)
        if (is_sep((unsigned char) *p)) return 0;
    fmpq_init(x);
    if (embz_number_parse(x, spec) == EMBZ_OK || embz_number_out_of_range(spec)) r = 0;
    fmpq_clear(x);
    return r;
}

int embz_qvec_parse(embz_qvec_t v, const char *spec, int amplitude, embz_err_t *err)
{
    qlist_t l = { NULL, 0, 0 };
    int status;
    int from_file = 0;
    if (spec == NULL) return embz_err_set(err, EMBZ_ERR_INPUT, "empty vector");
    int serr, kind = path_kind(spec, &serr);
    if (kind == 1) {
        from_file = 1;
        status = parse_file(&l, spec, err);
    } else if (kind < 0) {
        snprintf(err->file, sizeof(err->file), "%s", spec);
        return embz_err_set(err, EMBZ_ERR_INPUT, kind == -1
                            ? "is a directory, not a file of numbers"
                            : "is not a regular file (a device, pipe or socket)");
    } else if (looks_like_path(spec)) {
        /* neither numbers nor an existing file: say why the file could not be read */
        snprintf(err->file, sizeof(err->file), "%s", spec);
        if (serr == ENOENT || serr == ENOTDIR)
            return embz_err_set(err, EMBZ_ERR_INPUT,
                                "no such file (and not a list of numbers either)");
        return embz_err_set(err, EMBZ_ERR_INPUT, "cannot read the file: %s", strerror(serr));
    } else {
        status = parse_chunk(&l, spec, 0, 0, "", err);
    }
    if (status != EMBZ_OK) { qlist_clear(&l); return status; }
    if (l.len == 0) {
        if (from_file) snprintf(err->file, sizeof(err->file), "%s", spec);
        qlist_clear(&l);
        return embz_err_set(err, EMBZ_ERR_INPUT, "empty vector: no numbers given");
    }
    fmpq_t sum;
    fmpq_init(sum);
    for (long k = 0; k < l.len; k++) {
        if (amplitude) fmpq_mul(l.p + k, l.p + k, l.p + k);
        fmpq_add(sum, sum, l.p + k);
    }
    if (fmpq_is_zero(sum)) {
        fmpq_clear(sum);
        if (from_file) snprintf(err->file, sizeof(err->file), "%s", spec);
        qlist_clear(&l);
        return embz_err_set(err, EMBZ_ERR_INPUT, "all entries are zero");
    }
    embz_qvec_clear(v);
    v->p = _fmpq_vec_init(l.len);
    v->len = l.len;
    v->normalised = !fmpq_is_one(sum);
    for (long k = 0; k < l.len; k++) fmpq_div(v->p + k, l.p + k, sum);
    fmpq_clear(sum);
    qlist_clear(&l);
    return EMBZ_OK;
}

/* ------------------------------------------------------------------ targets */

void embz_target_init(embz_target_t t)
{
    t->kind = EMBZ_TARGET_UNIFORM;
    t->d = 2;
    embz_qvec_init(t->q);
    snprintf(t->label, sizeof(t->label), "ebit");
}

void embz_target_clear(embz_target_t t)
{
    embz_qvec_clear(t->q);
}

/* Strict decimal integer in [lo, hi]. */
static int parse_ulong(ulong *res, const char *s, ulong lo, ulong hi)
{
    ulong v = 0;
    if (*s == '\0') return 0;
    for (; *s != '\0'; s++) {
        if (!isdigit((unsigned char) *s)) return 0;
        if (v > (hi + 9) / 10) return 0;
        v = 10 * v + (ulong) (*s - '0');
        if (v > hi) return 0;
    }
    if (v < lo) return 0;
    *res = v;
    return 1;
}

static void set_uniform(embz_target_t t, ulong d)
{
    embz_qvec_clear(t->q);
    t->kind = EMBZ_TARGET_UNIFORM;
    t->d = d;
}

int embz_target_parse(embz_target_t t, const char *spec, int amplitude, embz_err_t *err)
{
    ulong v;
    if (spec == NULL) return embz_err_set(err, EMBZ_ERR_INPUT, "empty target");
    if (strcmp(spec, "ebit") == 0) {
        set_uniform(t, 2);
        snprintf(t->label, sizeof(t->label), "ebit");
        return EMBZ_OK;
    }
    if (strncmp(spec, "ebits:", 6) == 0) {
        if (!parse_ulong(&v, spec + 6, 1, EMBZ_TARGET_MAX_EBITS))
            return embz_err_set(err, EMBZ_ERR_INPUT,
                                "target '%.60s': J in ebits:J must be an integer from 1 to %d",
                                spec, EMBZ_TARGET_MAX_EBITS);
        set_uniform(t, UWORD(1) << v);
        snprintf(t->label, sizeof(t->label), "ebits:%lu", (unsigned long) v);
        return EMBZ_OK;
    }
    if (strncmp(spec, "uniform:", 8) == 0) {
        if (!parse_ulong(&v, spec + 8, 2, EMBZ_TARGET_MAX_D))
            return embz_err_set(err, EMBZ_ERR_INPUT,
                                "target '%.60s': D in uniform:D must be an integer from 2 to %lu",
                                spec, (unsigned long) EMBZ_TARGET_MAX_D);
        set_uniform(t, v);
        snprintf(t->label, sizeof(t->label), "uniform:%lu", (unsigned long) v);
        return EMBZ_OK;
    }
    embz_qvec_t q;
    embz_qvec_init(q);
    int status = embz_qvec_parse(q, spec, amplitude, err);
    if (status != EMBZ_OK) { embz_qvec_clear(q); return status; }
    embz_qvec_sort(q);
    /* drop zero entries: they do not change any Ky Fan norm of p (x) q */
    long m = q->len;
    while (m > 0 && fmpq_is_zero(q->p + m - 1)) m--;
    int uniform = 1;
    for (long k = 1; k < m; k++)
        if (!fmpq_equal(q->p + k, q->p)) { uniform = 0; break; }
    if (m == 1) {
        embz_qvec_clear(q);
        return embz_err_set(err, EMBZ_ERR_INPUT,
                            "target '%.60s' is a product state (one nonzero entry): "
                            "nothing to embezzle", spec);
    }
    if (uniform && (ulong) m <= EMBZ_TARGET_MAX_D) {
        embz_qvec_clear(q);
        set_uniform(t, (ulong) m);
        if (m == 2) snprintf(t->label, sizeof(t->label), "ebit");
        else snprintf(t->label, sizeof(t->label), "uniform:%ld", m);
        return EMBZ_OK;
    }
    embz_qvec_clear(t->q);
    t->kind = EMBZ_TARGET_VECTOR;
    t->d = 0;
    t->q->p = _fmpq_vec_init(m);
    t->q->len = m;
    t->q->normalised = q->normalised;
    for (long k = 0; k < m; k++) fmpq_set(t->q->p + k, q->p + k);
    embz_qvec_clear(q);
    /* entries that did not sum to 1 were divided by their sum: say so wherever the label is
     * shown */
    snprintf(t->label, sizeof(t->label), "vector[%ld]%s", m,
             t->q->normalised ? ", normalised to sum 1" : "");
    return EMBZ_OK;
}
