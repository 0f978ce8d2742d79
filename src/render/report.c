/* Report documents: the plain report struct, escaping, the table model every writer uses and
 * the writing of files. The writers: report_html.c, report_text.c (Markdown, LaTeX),
 * report_pdf.c; math in text: report_math.c. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include "embz/util.h"
#include "render_impl.h"

#define sdup _embz_render_strdup


/* ------------------------------------------------------------------ the struct */

void embz_report_init(embz_report_t r, const char *title)
{
    memset(r, 0, sizeof(*r));
    r->title = sdup(title);
}

static void free_strings(char **v, slong n)
{
    if (v == NULL)
        return;
    for (slong i = 0; i < n; i++)
        free(v[i]);
    free(v);
}

void embz_report_clear(embz_report_t r)
{
    for (slong i = 0; i < r->nfam; i++) {
        embz_report_family_struct *f = r->fam + i;
        free(f->name); free(f->weight); free(f->verdict); free(f->law); free(f->exponent);
        free(f->limit_lo); free(f->limit_hi); free(f->notes); free(f->summary);
        free_strings(f->error_at, r->nsizes);
        free_strings(f->need_n, r->ngoals);
        free_strings(f->need_qubits, r->ngoals);
        free_strings(f->extra_qubits, r->ngoals);
    }
    free(r->fam);
    for (slong i = 0; i < r->nfig; i++) {
        free(r->fig[i].caption); free(r->fig[i].svg); free(r->fig[i].path);
    }
    free(r->fig);
    free_strings(r->sizes, r->nsizes);
    free_strings(r->goals, r->ngoals);
    free(r->title); free(r->subtitle); free(r->intro); free(r->footer); free(r->answer);
    memset(r, 0, sizeof(*r));
}

void embz_report_set(char **field, const char *text)
{
    char *c = sdup(text);
    free(*field);
    *field = c;
}

static char **copy_strings(slong n, const char *const *v)
{
    char **c = calloc(n > 0 ? n : 1, sizeof(char *));
    for (slong i = 0; i < n; i++)
        c[i] = sdup(v != NULL ? v[i] : NULL);
    return c;
}

void embz_report_set_sizes(embz_report_t r, slong n, const char *const *sizes)
{
    free_strings(r->sizes, r->nsizes);
    r->nsizes = n;
    r->sizes = copy_strings(n, sizes);
}

void embz_report_set_goals(embz_report_t r, slong n, const char *const *goals)
{
    free_strings(r->goals, r->ngoals);
    r->ngoals = n;
    r->goals = copy_strings(n, goals);
}

embz_report_family_struct *embz_report_add_family(embz_report_t r, const char *name)
{
    r->fam = realloc(r->fam, (r->nfam + 1) * sizeof(*r->fam));
    embz_report_family_struct *f = r->fam + r->nfam++;
    memset(f, 0, sizeof(*f));
    f->name = sdup(name);
    f->error_at = copy_strings(r->nsizes, NULL);
    f->need_n = copy_strings(r->ngoals, NULL);
    f->need_qubits = copy_strings(r->ngoals, NULL);
    f->extra_qubits = copy_strings(r->ngoals, NULL);
    return f;
}

embz_report_figure_struct *embz_report_add_figure(embz_report_t r, const char *caption,
                                                 const embz_plot_struct *plot)
{
    r->fig = realloc(r->fig, (r->nfig + 1) * sizeof(*r->fig));
    embz_report_figure_struct *g = r->fig + r->nfig++;
    memset(g, 0, sizeof(*g));
    g->caption = sdup(caption);
    g->plot = plot;
    return g;
}

int embz_report_format_from_name(const char *name)
{
    if (name == NULL)
        return -1;
    if (!strcasecmp(name, "html") || !strcasecmp(name, "htm"))
        return EMBZ_REPORT_HTML;
    if (!strcasecmp(name, "md") || !strcasecmp(name, "markdown"))
        return EMBZ_REPORT_MD;
    if (!strcasecmp(name, "tex") || !strcasecmp(name, "latex"))
        return EMBZ_REPORT_TEX;
    if (!strcasecmp(name, "pdf"))
        return EMBZ_REPORT_PDF;
    return -1;
}

/* ------------------------------------------------------------------ escaping */

char *embz_html_escape(const char *text)
{
    embz_buf_t b;
    embz_buf_init(&b);
    for (const char *p = text ? text : ""; *p; p++) {
        switch (*p) {
        case '&': embz_buf_printf(&b, "&amp;"); break;
        case '<': embz_buf_printf(&b, "&lt;"); break;
        case '>': embz_buf_printf(&b, "&gt;"); break;
        case '"': embz_buf_printf(&b, "&quot;"); break;
        case '\'': embz_buf_printf(&b, "&#39;"); break;
        default:
            if ((unsigned char) *p < 0x20 && *p != '\n' && *p != '\t')
                embz_buf_printf(&b, " ");
            else
                embz_buf_printf(&b, "%c", *p);
        }
    }
    return b.s;
}

/* Unicode signs that plain LaTeX does not know, and their spelling there. */
static const char *const tex_unicode[][2] = {
    { "\xe2\x89\x88", "$\\approx$" }, { "\xe2\x89\xa4", "$\\le$" },
    { "\xe2\x89\xa5", "$\\ge$" },     { "\xc3\x97", "$\\times$" },
    { "\xc2\xb1", "$\\pm$" },         { "\xe2\x80\x93", "--" },
    { "\xe2\x80\x94", "---" },        { "\xe2\x80\xa6", "\\ldots{}" },
    { "\xe2\x88\x9e", "$\\infty$" },  { "\xce\xb5", "$\\varepsilon$" },
    { "\xcf\x88", "$\\psi$" },       { "\xe2\x82\x99", "$_n$" },
    { "\xe2\x88\x92", "$-$" },        { "\xe2\x86\x92", "$\\to$" },
    { "\xe2\x8a\x97", "$\\otimes$" },  { "\xc2\xb7", "$\\cdot$" },
    { "\xe2\x89\xa0", "$\\ne$" },
};

char *embz_latex_escape(const char *text)
{
    embz_buf_t b;
    embz_buf_init(&b);
    for (const char *p = text ? text : ""; *p; p++) {
        int done = 0;
        for (size_t k = 0; k < sizeof(tex_unicode) / sizeof(tex_unicode[0]); k++) {
            size_t l = strlen(tex_unicode[k][0]);
            if (!strncmp(p, tex_unicode[k][0], l)) {
                embz_buf_printf(&b, "%s", tex_unicode[k][1]);
                p += l - 1;
                done = 1;
                break;
            }
        }
        if (done)
            continue;
        switch (*p) {
        case '\\': embz_buf_printf(&b, "\\textbackslash{}"); break;
        case '{': case '}': case '#': case '$': case '%': case '&': case '_':
            embz_buf_printf(&b, "\\%c", *p);
            break;
        case '~': embz_buf_printf(&b, "\\textasciitilde{}"); break;
        case '^': embz_buf_printf(&b, "\\textasciicircum{}"); break;
        case '<': embz_buf_printf(&b, "\\textless{}"); break;
        case '>': embz_buf_printf(&b, "\\textgreater{}"); break;
        case '|': embz_buf_printf(&b, "\\textbar{}"); break;
        case '\n': case '\r': case '\t': embz_buf_printf(&b, " "); break;
        default:
            if ((unsigned char) *p < 0x20)
                embz_buf_printf(&b, " ");
            else
                embz_buf_printf(&b, "%c", *p);
        }
    }
    return b.s;
}

char *embz_markdown_escape(const char *text)
{
    embz_buf_t b;
    embz_buf_init(&b);
    for (const char *p = text ? text : ""; *p; p++) {
        if (strchr("\\`*_{}[]<>#|~$", *p) != NULL && *p)
            embz_buf_printf(&b, "\\%c", *p);
        else if (*p == '&')
            embz_buf_printf(&b, "&amp;");
        else if ((unsigned char) *p < 0x20 && *p != '\n')
            embz_buf_printf(&b, " ");
        else
            embz_buf_printf(&b, "%c", *p);
    }
    return b.s;
}

/* ------------------------------------------------------------------ table model */

typedef embz_report_table_t table_t;

static char *fmt(const char *f, const char *a, const char *b)
{
    size_t n = strlen(f) + strlen(a) + (b ? strlen(b) : 0) + 1;
    char *s = malloc(n);
    snprintf(s, n, f, a, b);
    return s;
}

void _embz_report_anchor(char *buf, size_t len, slong i)
{
    snprintf(buf, len, "fam-%ld", (long) i + 1);
}

static slong add_col(table_t *t, char *head, int style)
{
    t->head[t->ncols] = head;
    t->style[t->ncols] = style;
    t->numeric[t->ncols] = style == EMBZ_COL_NUM;
    return t->ncols++;
}

void embz_report_table_build(table_t *t, const embz_report_struct *r, int kind)
{
    slong max = 8 + r->nsizes + 3 * r->ngoals;
    memset(t, 0, sizeof(*t));
    t->nrows = r->nfam;
    t->head = calloc(max, sizeof(char *));
    t->numeric = calloc(max, sizeof(int));
    t->style = calloc(max, sizeof(int));
    add_col(t, sdup("family"), EMBZ_COL_TEXT);
    if (kind == EMBZ_TABLE_KEY) {
        add_col(t, sdup("verdict"), EMBZ_COL_TEXT);
        for (slong j = 0; j < r->ngoals; j++) {
            const char *g = r->goals[j] ? r->goals[j] : "?";
            add_col(t, fmt("qubits per side for E \xe2\x89\xa4 %s", g, NULL), EMBZ_COL_NUM);
            if (r->extra_columns)
                add_col(t, sdup("extra"), EMBZ_COL_NUM);   /* of the goal before it */
        }
        if (r->nsizes > 0)
            add_col(t, fmt("E at n = %s", r->sizes[r->nsizes - 1] ? r->sizes[r->nsizes - 1]
                                                                  : "?", NULL), EMBZ_COL_NUM);
        add_col(t, sdup("in short"), EMBZ_COL_PROSE);
    } else if (kind == EMBZ_TABLE_CLASS) {
        add_col(t, sdup("weight"), EMBZ_COL_CODE);
        add_col(t, sdup("verdict"), EMBZ_COL_TEXT);
        add_col(t, sdup("law"), EMBZ_COL_PROSE);
        add_col(t, sdup("exponent"), EMBZ_COL_TEXT);
        add_col(t, sdup("limit of E"), EMBZ_COL_NUM);
    } else {
        for (slong j = 0; j < r->nsizes; j++)
            add_col(t, fmt("E at n = %s", r->sizes[j] ? r->sizes[j] : "?", NULL), EMBZ_COL_NUM);
        for (slong j = 0; j < r->ngoals; j++) {
            const char *g = r->goals[j] ? r->goals[j] : "?";
            add_col(t, fmt("n for E \xe2\x89\xa4 %s", g, NULL), EMBZ_COL_NUM);
            add_col(t, fmt("qubits for E \xe2\x89\xa4 %s", g, NULL), EMBZ_COL_NUM);
            if (r->extra_columns)
                add_col(t, fmt("extra qubits for E \xe2\x89\xa4 %s", g, NULL), EMBZ_COL_NUM);
        }
    }
    slong nc = t->ncols, n = t->nrows ? t->nrows : 1;
    t->cell = calloc(nc * n, sizeof(char *));
    t->owned = calloc(nc * n, sizeof(char *));
    for (slong i = 0; i < t->nrows; i++) {
        const embz_report_family_struct *f = r->fam + i;
        const char **row = t->cell + i * nc;
        char **own = t->owned + i * nc;
        slong c = 0;
        row[c++] = f->name;
        if (kind == EMBZ_TABLE_KEY) {
            row[c++] = f->verdict;
            for (slong j = 0; j < r->ngoals; j++) {
                row[c++] = f->need_qubits[j] ? f->need_qubits[j] : f->need_n[j];
                if (r->extra_columns)
                    row[c++] = f->extra_qubits[j];
            }
            if (r->nsizes > 0)
                row[c++] = f->error_at[r->nsizes - 1];
            row[c++] = f->summary;
        } else if (kind == EMBZ_TABLE_CLASS) {
            row[c++] = f->weight;
            row[c++] = f->verdict;
            row[c++] = f->law;
            row[c++] = f->exponent;
            if (f->limit_lo && f->limit_hi && strcmp(f->limit_lo, f->limit_hi) != 0)
                own[c] = fmt("[%s, %s]", f->limit_lo, f->limit_hi);
            else if (f->limit_lo || f->limit_hi)
                own[c] = sdup(f->limit_lo ? f->limit_lo : f->limit_hi);
            row[c] = own[c];
            c++;
        } else {
            for (slong j = 0; j < r->nsizes; j++)
                row[c++] = f->error_at[j];
            for (slong j = 0; j < r->ngoals; j++) {
                row[c++] = f->need_n[j];
                row[c++] = f->need_qubits[j];
                if (r->extra_columns)
                    row[c++] = f->extra_qubits[j];
            }
        }
    }
}

void embz_report_table_clear(table_t *t)
{
    free_strings(t->head, t->ncols);
    free_strings(t->owned, t->ncols * (t->nrows ? t->nrows : 1));
    free(t->numeric);
    free(t->style);
    free(t->cell);
}

void _embz_render_paragraphs(const char *text, int skip_blank,
                             void (*fn)(void *ctx, const char *para), void *ctx)
{
    if (text == NULL)
        return;
    const char *p = text;
    while (*p) {
        const char *e = strstr(p, "\n\n");
        size_t l = e ? (size_t) (e - p) : strlen(p);
        char *para = malloc(l + 1);
        memcpy(para, p, l);
        para[l] = 0;
        int blank = 1;
        for (size_t i = 0; i < l; i++)
            if (para[i] != ' ' && para[i] != '\n' && para[i] != '\t')
                blank = 0;
        if (!(skip_blank && blank))
            fn(ctx, para);
        free(para);
        p += l;
        while (*p == '\n')
            p++;
    }
}

/* ------------------------------------------------------------------ the order */

static void walk_table(const embz_report_struct *r, const embz_report_writer_t *w, void *ctx,
                       int kind)
{
    table_t t;
    embz_report_table_build(&t, r, kind);
    if (t.ncols > 1)
        w->table(ctx, &t, kind);
    embz_report_table_clear(&t);
}

int _embz_report_walk(const embz_report_struct *r, const embz_report_writer_t *w, void *ctx)
{
    int st = EMBZ_OK;
    w->head(ctx, r);
    walk_table(r, w, ctx, EMBZ_TABLE_KEY);
    if (r->nfig > 0 && (st = w->figure(ctx, r->fig, 0)) != EMBZ_OK)
        return st;
    w->text(ctx, r->intro);
    if (r->nfam > 0) {
        w->heading(ctx, "Family by family", "families");
        for (slong i = 0; i < r->nfam; i++)
            w->family(ctx, r, i);
    }
    for (slong k = 1; k < r->nfig; k++)
        if ((st = w->figure(ctx, r->fig + k, k)) != EMBZ_OK)
            return st;
    w->heading(ctx, "All numbers", "numbers");
    walk_table(r, w, ctx, EMBZ_TABLE_CLASS);
    walk_table(r, w, ctx, EMBZ_TABLE_NUMBERS);
    if (r->footer)
        w->footer(ctx, r->footer);
    return EMBZ_OK;
}

/* ------------------------------------------------------------------ files */

char *embz_report_figure_path(const char *path, slong k, int format)
{
    if ((format != EMBZ_REPORT_MD && format != EMBZ_REPORT_TEX) || path == NULL
        || embz_output_is_stdout(path))
        return NULL;
    char *stem = sdup(path);
    char *dot = strrchr(stem, '.'), *slash = strrchr(stem, '/');
    if (dot != NULL && (slash == NULL || dot > slash))
        *dot = 0;
    char *name = embz_strdup_printf("%s-fig%ld.%s", stem, (long) k + 1,
                                    format == EMBZ_REPORT_MD ? "svg" : "pdf");
    free(stem);
    return name;
}

/* Markdown and LaTeX: the drawn figures as files beside the document. */
static int write_figures(const embz_report_t r, const char *path, int format, embz_err_t *err)
{
    int st = EMBZ_OK;
    for (slong k = 0; k < r->nfig && st == EMBZ_OK; k++) {
        if (r->fig[k].plot == NULL)
            continue;
        char *name = embz_report_figure_path(path, k, format);
        st = embz_output_check(name, err);
        if (st == EMBZ_OK)
            st = embz_plot_write(r->fig[k].plot, name, err);
        free(name);
    }
    return st;
}

/* The stem of the figure names as the document links them: the base name without the
 * extension (the figures sit in the document's directory). */
static char *link_stem(const char *path)
{
    const char *slash = strrchr(path, '/');
    char *stem = sdup(slash ? slash + 1 : path);
    char *dot = strrchr(stem, '.');
    if (dot != NULL)
        *dot = 0;
    return stem;
}

int embz_report_write(const embz_report_t r, const char *path, int format, embz_err_t *err)
{
    char *text = NULL, *stem = NULL;
    int st = EMBZ_OK, to_file = !embz_output_is_stdout(path);
    if (to_file && (format == EMBZ_REPORT_MD || format == EMBZ_REPORT_TEX)) {
        st = write_figures(r, path, format, err);
        if (st != EMBZ_OK)
            return st;
        stem = link_stem(path);
    }
    switch (format) {
    case EMBZ_REPORT_HTML: st = embz_report_html(&text, r, err); break;
    case EMBZ_REPORT_MD: st = _embz_report_markdown(&text, r, stem, err); break;
    case EMBZ_REPORT_TEX: st = _embz_report_latex(&text, r, stem, err); break;
    case EMBZ_REPORT_PDF: return embz_report_pdf_write(r, path, err);
    default: return embz_err_set(err, EMBZ_ERR_INPUT, "unknown report format");
    }
    free(stem);
    if (st != EMBZ_OK)
        return st;
    st = embz_afile_write_all(path, text, strlen(text), r->fail_after, err);
    free(text);
    return st;
}
