/* Exact Schmidt vectors and embezzlement targets: parsing, normalisation, sorting. */
#include <stdlib.h>
#include <string.h>
#include <ctype.h>
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

/* Parse the numbers of one chunk of text (a whole list, or one line of a file after its
 * comment is removed). in_file: messages use err->line (set by the caller) rather than the
 * entry position. */
static int parse_chunk(qlist_t *out, const char *text, int in_file, long line,
                       const char *file, embz_err_t *err)
{
    const char *s = text;
    char tok[EMBZ_VEC_MAX_TOKEN + 1];
    fmpq_t x;
    int status = EMBZ_OK;
    fmpq_init(x);
    while (*s != '\0') {
        while (*s != '\0' && is_sep((unsigned char) *s)) s++;
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
            if (in_file) {
                snprintf(err->file, sizeof(err->file), "%s", file);
                err->line = line;
            }
            status = embz_err_set(err, EMBZ_ERR_INPUT, "entry %ld is too long", pos);
            goto done;
        }
        memcpy(tok, t0, len);
        tok[len] = '\0';
        int bad = embz_number_parse(x, tok) != EMBZ_OK;
        if (bad || fmpq_sgn(x) < 0) {
            if (in_file) {
                snprintf(err->file, sizeof(err->file), "%s", file);
                err->line = line;
            }
            if (bad)
                status = embz_err_set(err, EMBZ_ERR_INPUT,
                                      "entry %ld is not a number: '%.60s'", pos, tok);
            else
                status = embz_err_set(err, EMBZ_ERR_INPUT,
                                      "entry %ld is negative: '%.60s' (Schmidt weights are >= 0)",
                                      pos, tok);
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
        snprintf(err->file, sizeof(err->file), "%s", path);
        return embz_err_set(err, EMBZ_ERR_IO, "cannot open the file");
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

static int is_regular_file(const char *path)
{
    struct stat st;
    return stat(path, &st) == 0 && S_ISREG(st.st_mode);
}

int embz_qvec_parse(embz_qvec_t v, const char *spec, int amplitude, embz_err_t *err)
{
    qlist_t l = { NULL, 0, 0 };
    int status;
    int from_file = 0;
    if (spec == NULL) return embz_err_set(err, EMBZ_ERR_INPUT, "empty vector");
    if (is_regular_file(spec)) {
        from_file = 1;
        status = parse_file(&l, spec, err);
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
