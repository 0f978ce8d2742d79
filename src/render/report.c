/* Report documents: the plain report struct, escaping, and the HTML, Markdown and LaTeX
 * writers. The PDF writer is in report_pdf.c. */
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
        free(f->limit_lo); free(f->limit_hi); free(f->notes);
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
    free(r->title); free(r->subtitle); free(r->intro); free(r->footer);
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
    { "\xcf\x88", "$\\psi$" },
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

#define DASH "\xe2\x80\x93"

static char *fmt(const char *f, const char *a, const char *b)
{
    size_t n = strlen(f) + strlen(a) + (b ? strlen(b) : 0) + 1;
    char *s = malloc(n);
    snprintf(s, n, f, a, b);
    return s;
}

void embz_report_table_build(table_t *t, const embz_report_struct *r)
{
    t->ncols = 6 + r->nsizes + (r->extra_columns ? 3 : 2) * r->ngoals;
    t->nrows = r->nfam;
    t->head = calloc(t->ncols, sizeof(char *));
    t->numeric = calloc(t->ncols, sizeof(int));
    t->cell = calloc(t->ncols * (t->nrows ? t->nrows : 1), sizeof(char *));
    t->owned = calloc(t->nrows ? t->nrows : 1, sizeof(char *));
    slong c = 0;
    t->head[c++] = sdup("family");
    t->head[c++] = sdup("weight");
    t->head[c++] = sdup("verdict");
    t->head[c++] = sdup("law");
    t->head[c++] = sdup("exponent");
    t->numeric[c] = 1;
    t->head[c++] = sdup("limit of E");
    for (slong j = 0; j < r->nsizes; j++) {
        t->numeric[c] = 1;
        t->head[c++] = fmt("E at n = %s", r->sizes[j] ? r->sizes[j] : "?", NULL);
    }
    for (slong j = 0; j < r->ngoals; j++) {
        t->numeric[c] = 1;
        t->head[c++] = fmt("n for E \xe2\x89\xa4 %s", r->goals[j] ? r->goals[j] : "?", NULL);
        t->numeric[c] = 1;
        t->head[c++] = fmt("qubits for E \xe2\x89\xa4 %s", r->goals[j] ? r->goals[j] : "?",
                           NULL);
        if (r->extra_columns) {
            t->numeric[c] = 1;
            t->head[c++] = fmt("extra qubits for E \xe2\x89\xa4 %s",
                               r->goals[j] ? r->goals[j] : "?", NULL);
        }
    }
    for (slong i = 0; i < t->nrows; i++) {
        const embz_report_family_struct *f = r->fam + i;
        const char **row = t->cell + i * t->ncols;
        c = 0;
        row[c++] = f->name;
        row[c++] = f->weight;
        row[c++] = f->verdict;
        row[c++] = f->law;
        row[c++] = f->exponent;
        if (f->limit_lo && f->limit_hi && strcmp(f->limit_lo, f->limit_hi) != 0)
            t->owned[i] = fmt("[%s, %s]", f->limit_lo, f->limit_hi);
        else if (f->limit_lo || f->limit_hi)
            t->owned[i] = sdup(f->limit_lo ? f->limit_lo : f->limit_hi);
        row[c++] = t->owned[i];
        for (slong j = 0; j < r->nsizes; j++)
            row[c++] = f->error_at ? f->error_at[j] : NULL;
        for (slong j = 0; j < r->ngoals; j++) {
            row[c++] = f->need_n ? f->need_n[j] : NULL;
            row[c++] = f->need_qubits ? f->need_qubits[j] : NULL;
            if (r->extra_columns)
                row[c++] = f->extra_qubits ? f->extra_qubits[j] : NULL;
        }
    }
}

void embz_report_table_clear(table_t *t)
{
    free_strings(t->head, t->ncols);
    free_strings(t->owned, t->nrows);
    free(t->numeric);
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

/* Paragraphs of free text: emit for each non-empty paragraph. */
typedef struct { embz_buf_t *b; void (*emit)(embz_buf_t *, const char *); } para_ctx;

static void para_emit(void *ctx, const char *para)
{
    para_ctx *pc = ctx;
    pc->emit(pc->b, para);
}

static void paragraphs(embz_buf_t *b, const char *text, void (*emit)(embz_buf_t *, const char *))
{
    para_ctx pc = { b, emit };
    _embz_render_paragraphs(text, 1, para_emit, &pc);
}

/* ------------------------------------------------------------------ HTML */

static void html_text(embz_buf_t *b, const char *s)
{
    char *e = embz_html_escape(s);
    embz_buf_printf(b, "%s", e);
    free(e);
}

static void html_para(embz_buf_t *b, const char *s)
{
    embz_buf_printf(b, "<p>");
    html_text(b, s);
    embz_buf_printf(b, "</p>\n");
}

static const char html_css[] =
    "body{margin:0;background:#fbfbf9;color:#24272f;"
    "font:15px/1.55 'DejaVu Sans',Verdana,sans-serif}\n"
    "main{max-width:1120px;margin:0 auto;padding:26px 28px 40px}\n"
    "h1{font-size:23px;margin:0 0 2px;font-weight:700}\n"
    "h2{font-size:17px;margin:30px 0 8px;padding-bottom:3px;border-bottom:1px solid #d5d5d0}\n"
    "h3{font-size:15px;margin:18px 0 4px}\n"
    ".sub{color:#5b5f66;margin:0 0 16px}\n"
    ".wrap{overflow-x:auto}\n"
    "table{border-collapse:collapse;font-size:13px;background:#fff}\n"
    "th,td{padding:5px 11px;text-align:left;vertical-align:top}\n"
    "thead th{border-top:2px solid #3a3f45;border-bottom:1px solid #3a3f45;font-weight:600}\n"
    "tbody tr:last-child td{border-bottom:2px solid #3a3f45}\n"
    "tbody tr:nth-child(even) td{background:#f3f4f1}\n"
    "td.num,th.num{text-align:right;white-space:nowrap;"
    "font-family:'DejaVu Sans Mono',monospace}\n"
    "th.num{font-family:inherit}\n"
    "td.nw{white-space:nowrap}\n"
    "td.expr{font-family:'DejaVu Sans Mono',monospace}\n"
    "figure{margin:22px 0;background:#fff;border:1px solid #e2e2dc;padding:10px}\n"
    "figure svg,figure img{display:block;max-width:100%;height:auto}\n"
    "figcaption{color:#4a4f57;font-size:13px;margin-top:6px}\n"
    "footer{margin-top:30px;color:#5b5f66;font-size:12.5px}\n";

int embz_report_html(char **text, const embz_report_t r, embz_err_t *err)
{
    embz_buf_t b;
    embz_buf_init(&b);
    embz_buf_printf(&b, "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
                    "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
                    "<meta name=\"generator\" content=\"embz\">\n<title>");
    html_text(&b, r->title ? r->title : "embz report");
    embz_buf_printf(&b, "</title>\n<style>\n%s</style>\n</head>\n<body>\n<main>\n<h1>",
                    html_css);
    html_text(&b, r->title ? r->title : "embz report");
    embz_buf_printf(&b, "</h1>\n");
    if (r->subtitle) {
        embz_buf_printf(&b, "<p class=\"sub\">");
        html_text(&b, r->subtitle);
        embz_buf_printf(&b, "</p>\n");
    }
    paragraphs(&b, r->intro, html_para);

    table_t t;
    embz_report_table_build(&t, r);
    embz_buf_printf(&b, "<h2>Summary</h2>\n<div class=\"wrap\"><table>\n<thead><tr>");
    for (slong c = 0; c < t.ncols; c++) {
        embz_buf_printf(&b, "<th%s>", t.numeric[c] ? " class=\"num\"" : "");
        html_text(&b, t.head[c]);
        embz_buf_printf(&b, "</th>");
    }
    embz_buf_printf(&b, "</tr></thead>\n<tbody>\n");
    for (slong i = 0; i < t.nrows; i++) {
        embz_buf_printf(&b, "<tr>");
        for (slong c = 0; c < t.ncols; c++) {
            const char *v = t.cell[i * t.ncols + c];
            embz_buf_printf(&b, "<td%s>", t.numeric[c] ? " class=\"num\""
                                          : c == 1 ? " class=\"expr\"" : c > 1 ? " class=\"nw\"" : "");
            html_text(&b, v ? v : DASH);
            embz_buf_printf(&b, "</td>");
        }
        embz_buf_printf(&b, "</tr>\n");
    }
    embz_buf_printf(&b, "</tbody>\n</table></div>\n");
    embz_report_table_clear(&t);

    int any_notes = 0;
    for (slong i = 0; i < r->nfam; i++)
        any_notes |= r->fam[i].notes != NULL && r->fam[i].notes[0];
    if (any_notes) {
        embz_buf_printf(&b, "<h2>Notes</h2>\n");
        for (slong i = 0; i < r->nfam; i++) {
            if (r->fam[i].notes == NULL || !r->fam[i].notes[0])
                continue;
            embz_buf_printf(&b, "<h3>");
            html_text(&b, r->fam[i].name);
            embz_buf_printf(&b, "</h3>\n");
            paragraphs(&b, r->fam[i].notes, html_para);
        }
    }

    if (r->nfig > 0)
        embz_buf_printf(&b, "<h2>Figures</h2>\n");
    for (slong k = 0; k < r->nfig; k++) {
        const embz_report_figure_struct *g = r->fig + k;
        embz_buf_printf(&b, "<figure>\n");
        if (g->plot != NULL) {
            char prefix[32], *svg;
            snprintf(prefix, sizeof(prefix), "fig%ld-", (long) k);
            int st = embz_plot_svg_string(&svg, g->plot, prefix, err);
            if (st != EMBZ_OK) {
                embz_buf_clear(&b);
                *text = NULL;
                return st;
            }
            embz_buf_printf(&b, "%s\n", svg);
            free(svg);
        } else if (g->svg != NULL || g->path != NULL) {
            /* foreign images go in as data URIs of <img>: no script in them can run */
            char *data = NULL;
            size_t len = 0;
            const char *mime = "image/svg+xml";
            if (g->svg != NULL) {
                len = strlen(g->svg);
                data = malloc(len + 1);
                memcpy(data, g->svg, len + 1);
            } else {
                char ext[16];
                embz_path_ext(ext, sizeof(ext), g->path);
                mime = !strcmp(ext, "png") ? "image/png" : !strcmp(ext, "svg") ? "image/svg+xml"
                                                                               : NULL;
                FILE *fp = mime ? fopen(g->path, "rb") : NULL;
                if (fp == NULL) {
                    embz_buf_clear(&b);
                    *text = NULL;
                    return embz_err_set(err, mime ? EMBZ_ERR_IO : EMBZ_ERR_INPUT,
                                        mime ? "cannot read figure %s"
                                             : "figure %s: only .svg and .png can be embedded",
                                        g->path);
                }
                size_t cap = 65536;
                data = malloc(cap);
                size_t got;
                while ((got = fread(data + len, 1, cap - len, fp)) > 0) {
                    len += got;
                    if (len == cap)
                        data = realloc(data, cap *= 2);
                }
                fclose(fp);
            }
            static const char b64[] =
                "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
            embz_buf_printf(&b, "<img alt=\"");
            html_text(&b, g->caption ? g->caption : "figure");
            embz_buf_printf(&b, "\" src=\"data:%s;base64,", mime);
            for (size_t i = 0; i < len; i += 3) {
                unsigned v = (unsigned char) data[i] << 16;
                if (i + 1 < len) v |= (unsigned char) data[i + 1] << 8;
                if (i + 2 < len) v |= (unsigned char) data[i + 2];
                embz_buf_printf(&b, "%c%c%c%c", b64[(v >> 18) & 63], b64[(v >> 12) & 63],
                                i + 1 < len ? b64[(v >> 6) & 63] : '=',
                                i + 2 < len ? b64[v & 63] : '=');
            }
            embz_buf_printf(&b, "\">\n");
            free(data);
        }
        if (g->caption) {
            embz_buf_printf(&b, "<figcaption>");
            html_text(&b, g->caption);
            embz_buf_printf(&b, "</figcaption>\n");
        }
        embz_buf_printf(&b, "</figure>\n");
    }
    if (r->footer) {
        embz_buf_printf(&b, "<footer>");
        paragraphs(&b, r->footer, html_para);
        embz_buf_printf(&b, "</footer>\n");
    }
    embz_buf_printf(&b, "</main>\n</body>\n</html>\n");
    *text = b.s;
    return EMBZ_OK;
}

/* ------------------------------------------------------------------ Markdown */

static void md_text(embz_buf_t *b, const char *s)
{
    char *e = embz_markdown_escape(s);
    for (char *p = e; *p; p++)
        if (*p == '\n')
            *p = ' ';
    embz_buf_printf(b, "%s", e);
    free(e);
}

static void md_para(embz_buf_t *b, const char *s)
{
    md_text(b, s);
    embz_buf_printf(b, "\n\n");
}

int embz_report_markdown(char **text, const embz_report_t r, embz_err_t *err)
{
    (void) err;
    embz_buf_t b;
    embz_buf_init(&b);
    embz_buf_printf(&b, "# ");
    md_text(&b, r->title ? r->title : "embz report");
    embz_buf_printf(&b, "\n\n");
    if (r->subtitle) {
        embz_buf_printf(&b, "*");
        md_text(&b, r->subtitle);
        embz_buf_printf(&b, "*\n\n");
    }
    paragraphs(&b, r->intro, md_para);
    table_t t;
    embz_report_table_build(&t, r);
    embz_buf_printf(&b, "## Summary\n\n|");
    for (slong c = 0; c < t.ncols; c++) {
        embz_buf_printf(&b, " ");
        md_text(&b, t.head[c]);
        embz_buf_printf(&b, " |");
    }
    embz_buf_printf(&b, "\n|");
    for (slong c = 0; c < t.ncols; c++)
        embz_buf_printf(&b, "%s|", t.numeric[c] ? "---:" : ":---");
    embz_buf_printf(&b, "\n");
    for (slong i = 0; i < t.nrows; i++) {
        embz_buf_printf(&b, "|");
        for (slong c = 0; c < t.ncols; c++) {
            const char *v = t.cell[i * t.ncols + c];
            embz_buf_printf(&b, " ");
            md_text(&b, v ? v : DASH);
            embz_buf_printf(&b, " |");
        }
        embz_buf_printf(&b, "\n");
    }
    embz_buf_printf(&b, "\n");
    embz_report_table_clear(&t);
    for (slong i = 0; i < r->nfam; i++) {
        if (r->fam[i].notes == NULL || !r->fam[i].notes[0])
            continue;
        embz_buf_printf(&b, "### ");
        md_text(&b, r->fam[i].name);
        embz_buf_printf(&b, "\n\n");
        paragraphs(&b, r->fam[i].notes, md_para);
    }
    int any = 0;
    for (slong k = 0; k < r->nfig; k++) {
        const embz_report_figure_struct *g = r->fig + k;
        if (g->path == NULL)
            continue;
        if (!any)
            embz_buf_printf(&b, "## Figures\n\n");
        any = 1;
        embz_buf_printf(&b, "![");
        md_text(&b, g->caption ? g->caption : "figure");
        embz_buf_printf(&b, "](<");
        for (const char *p = g->path; *p; p++)
            if (*p == '<' || *p == '>' || *p == '\n')
                embz_buf_printf(&b, "%%%02X", (unsigned char) *p);
            else
                embz_buf_printf(&b, "%c", *p);
        embz_buf_printf(&b, ">)\n\n");
    }
    if (r->footer)
        paragraphs(&b, r->footer, md_para);
    *text = b.s;
    return EMBZ_OK;
}

/* ------------------------------------------------------------------ LaTeX */

/* A cell: "B^K" with digits only is typeset as math; anything else escaped text. */
static void tex_cell(embz_buf_t *b, const char *s)
{
    const char *caret = strchr(s, '^');
    if (caret != NULL && caret > s) {
        int ok = 1;
        for (const char *p = s; p < caret; p++)
            ok &= (*p >= '0' && *p <= '9');
        const char *q = caret + 1;
        if (*q == '-')
            q++;
        ok &= *q != 0;
        for (; *q; q++)
            ok &= (*q >= '0' && *q <= '9');
        if (ok) {
            embz_buf_printf(b, "$%.*s^{%s}$", (int) (caret - s), s, caret + 1);
            return;
        }
    }
    char *e = embz_latex_escape(s);
    embz_buf_printf(b, "%s", e);
    free(e);
}

int embz_report_latex(char **text, const embz_report_t r, embz_err_t *err)
{
    (void) err;
    embz_buf_t b;
    embz_buf_init(&b);
    table_t t;
    embz_report_table_build(&t, r);
    embz_buf_printf(&b, "%% Summary table written by embz. Needs \\usepackage{booktabs}.\n"
                    "\\begin{table}[htbp]\n\\centering\n\\small\n\\begin{tabular}{");
    for (slong c = 0; c < t.ncols; c++)
        embz_buf_printf(&b, "%c", t.numeric[c] ? 'r' : 'l');
    embz_buf_printf(&b, "}\n\\toprule\n");
    for (slong c = 0; c < t.ncols; c++) {
        if (c > 0)
            embz_buf_printf(&b, " & ");
        /* heads: "E at n = 10^6" shows the size in math */
        const char *h = t.head[c];
        const char *eq = strstr(h, "= ");
        const char *le = strstr(h, "\xe2\x89\xa4 ");
        const char *split = eq ? eq + 2 : le ? le + 4 : NULL;
        if (split) {
            char *pre = malloc(split - h + 1);
            memcpy(pre, h, split - h);
            pre[split - h] = 0;
            tex_cell(&b, pre);
            tex_cell(&b, split);
            free(pre);
        } else {
            tex_cell(&b, h);
        }
    }
    embz_buf_printf(&b, " \\\\\n\\midrule\n");
    for (slong i = 0; i < t.nrows; i++) {
        for (slong c = 0; c < t.ncols; c++) {
            if (c > 0)
                embz_buf_printf(&b, " & ");
            const char *v = t.cell[i * t.ncols + c];
            if (v == NULL)
                embz_buf_printf(&b, "--");
            else if (c == 1) {
                embz_buf_printf(&b, "\\texttt{");
                tex_cell(&b, v);
                embz_buf_printf(&b, "}");
            } else
                tex_cell(&b, v);
        }
        embz_buf_printf(&b, " \\\\\n");
    }
    embz_buf_printf(&b, "\\bottomrule\n\\end{tabular}\n\\caption{");
    tex_cell(&b, r->title ? r->title : "embz report");
    if (r->subtitle) {
        embz_buf_printf(&b, " (");
        tex_cell(&b, r->subtitle);
        embz_buf_printf(&b, ")");
    }
    embz_buf_printf(&b, "}\n\\end{table}\n");
    embz_report_table_clear(&t);
    *text = b.s;
    return EMBZ_OK;
}

/* ------------------------------------------------------------------ files */

int embz_report_write(const embz_report_t r, const char *path, int format, embz_err_t *err)
{
    char *text = NULL;
    int st;
    switch (format) {
    case EMBZ_REPORT_HTML: st = embz_report_html(&text, r, err); break;
    case EMBZ_REPORT_MD: st = embz_report_markdown(&text, r, err); break;
    case EMBZ_REPORT_TEX: st = embz_report_latex(&text, r, err); break;
    case EMBZ_REPORT_PDF: return embz_report_pdf_write(r, path, err);
    default: return embz_err_set(err, EMBZ_ERR_INPUT, "unknown report format");
    }
    if (st != EMBZ_OK)
        return st;
    st = embz_afile_write_all(path, text, strlen(text), r->fail_after, err);
    free(text);
    return st;
}
