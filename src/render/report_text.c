/* The report as Markdown and as a LaTeX document, in the order of the HTML page: the answer
 * and the key table, the first figure, the reading notes, a block per family, the other
 * figures, the full numbers. Drawn figures are files beside the document (written by
 * embz_report_write), linked by name. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "embz/util.h"
#include "render_impl.h"

#define DASH "\xe2\x80\x93"
#define BULLET "\xe2\x80\xa2 "

/* ------------------------------------------------------------------ Markdown */

/* Text with its powers in Unicode superscripts, escaped, on one line. */
static void md_text(embz_buf_t *b, const char *s)
{
    char *u = _embz_math_unicode(s);
    char *e = embz_markdown_escape(u);
    for (char *p = e; *p; p++)
        if (*p == '\n')
            *p = ' ';
    embz_buf_printf(b, "%s", e);
    free(e);
    free(u);
}

typedef struct { embz_buf_t *b; } md_ctx;

static void md_para(void *ctx, const char *p)
{
    md_ctx *c = ctx;
    int item = strncmp(p, BULLET, strlen(BULLET)) == 0;
    if (item)
        embz_buf_printf(c->b, "- ");
    md_text(c->b, item ? p + strlen(BULLET) : p);
    embz_buf_printf(c->b, item ? "\n" : "\n\n");
}

static void md_paragraphs(embz_buf_t *b, const char *s)
{
    md_ctx c = { b };
    _embz_render_paragraphs(s, 1, md_para, &c);
    if (b->len >= 2 && b->s[b->len - 1] == '\n' && b->s[b->len - 2] != '\n')
        embz_buf_printf(b, "\n");
}

static void md_table(embz_buf_t *b, const embz_report_table_t *t, int links)
{
    embz_buf_printf(b, "|");
    for (slong c = 0; c < t->ncols; c++) {
        embz_buf_printf(b, " ");
        md_text(b, t->head[c]);
        embz_buf_printf(b, " |");
    }
    embz_buf_printf(b, "\n|");
    for (slong c = 0; c < t->ncols; c++)
        embz_buf_printf(b, "%s|", t->numeric[c] ? "---:" : ":---");
    embz_buf_printf(b, "\n");
    for (slong i = 0; i < t->nrows; i++) {
        embz_buf_printf(b, "|");
        for (slong c = 0; c < t->ncols; c++) {
            const char *v = t->cell[i * t->ncols + c];
            embz_buf_printf(b, " ");
            if (c == 0 && links) {
                char id[32];
                _embz_report_anchor(id, sizeof(id), i);
                embz_buf_printf(b, "[");
                md_text(b, v ? v : DASH);
                embz_buf_printf(b, "](#%s)", id);
            } else if (t->style[c] == EMBZ_COL_CODE && v != NULL) {
                char *e = embz_markdown_escape(v);
                embz_buf_printf(b, "%s", e);
                free(e);
            } else
                md_text(b, v ? v : DASH);
            embz_buf_printf(b, " |");
        }
        embz_buf_printf(b, "\n");
    }
    embz_buf_printf(b, "\n");
}

static void md_figure(embz_buf_t *b, const embz_report_figure_struct *g, slong k,
                      const char *stem)
{
    char *file = NULL;
    if (g->plot != NULL && stem != NULL)
        file = embz_strdup_printf("%s-fig%ld.svg", stem, (long) k + 1);
    else if (g->plot == NULL && g->path != NULL)
        file = embz_strdup_printf("%s", g->path);
    if (file != NULL) {
        embz_buf_printf(b, "![Figure %ld](<", (long) k + 1);
        for (const char *p = file; *p; p++)
            if (*p == '<' || *p == '>' || *p == '\n' || *p == ' ')
                embz_buf_printf(b, "%%%02X", (unsigned char) *p);
            else
                embz_buf_printf(b, "%c", *p);
        embz_buf_printf(b, ">)\n\n");
        free(file);
    } else if (g->plot != NULL) {
        embz_buf_printf(b, "(Figure %ld is written beside the document when the Markdown goes "
                        "to a file.)\n\n", (long) k + 1);
    } else if (g->svg != NULL) {
        embz_buf_printf(b, "(Figure %ld, given as SVG text, is drawn in the HTML report "
                        "only.)\n\n", (long) k + 1);
    }
    embz_buf_printf(b, "**Figure %ld.** ", (long) k + 1);
    md_text(b, g->caption ? g->caption : "");
    embz_buf_printf(b, "\n\n");
}

static void md_fact(embz_buf_t *b, const char *term, const char *value, int code)
{
    if (value == NULL)
        return;
    embz_buf_printf(b, "- **");
    md_text(b, term);
    embz_buf_printf(b, ":** ");
    if (code) {
        char *e = embz_markdown_escape(value);
        embz_buf_printf(b, "%s", e);
        free(e);
    } else
        md_text(b, value);
    embz_buf_printf(b, "\n");
}

/* the state of a Markdown or LaTeX writer */
typedef struct { embz_buf_t b; const char *stem; } doc_t;

static void md_head(void *ctx, const embz_report_struct *r)
{
    embz_buf_t *b = &((doc_t *) ctx)->b;
    embz_buf_printf(b, "# ");
    md_text(b, r->title ? r->title : "embz report");
    embz_buf_printf(b, "\n\n");
    if (r->subtitle) {
        embz_buf_printf(b, "*");
        md_text(b, r->subtitle);
        embz_buf_printf(b, "*\n\n");
    }
    if (r->answer) {
        embz_buf_printf(b, "**Answer.** ");
        md_text(b, r->answer);
        embz_buf_printf(b, "\n\n");
    }
}

static void md_w_table(void *ctx, const embz_report_table_t *t, int kind)
{
    md_table(&((doc_t *) ctx)->b, t, kind == EMBZ_TABLE_KEY);
}

static int md_w_figure(void *ctx, const embz_report_figure_struct *g, slong k)
{
    md_figure(&((doc_t *) ctx)->b, g, k, ((doc_t *) ctx)->stem);
    return EMBZ_OK;
}

static void md_w_text(void *ctx, const char *s)
{
    md_paragraphs(&((doc_t *) ctx)->b, s);
}

static void md_heading(void *ctx, const char *title, const char *id)
{
    (void) id;
    embz_buf_printf(&((doc_t *) ctx)->b, "## %s\n\n", title);
}

static void md_family(void *ctx, const embz_report_struct *r, slong i)
{
    embz_buf_t *b = &((doc_t *) ctx)->b;
    const embz_report_family_struct *f = r->fam + i;
    char id[32];
    _embz_report_anchor(id, sizeof(id), i);
    embz_buf_printf(b, "<a id=\"%s\"></a>\n\n### ", id);
    md_text(b, f->name);
    embz_buf_printf(b, "\n\n");
    md_fact(b, "weight", f->weight, 1);
    md_fact(b, "verdict", f->verdict, 0);
    md_fact(b, "in short", f->summary, 0);
    embz_buf_printf(b, "\n");
    md_paragraphs(b, f->notes);
}

static const embz_report_writer_t md_writer = {
    md_head, md_w_table, md_w_figure, md_w_text, md_heading, md_family, md_w_text
};

int _embz_report_markdown(char **text, const embz_report_struct *r, const char *stem,
                          embz_err_t *err)
{
    (void) err;
    doc_t d = { { 0 }, stem };
    embz_buf_init(&d.b);
    _embz_report_walk(r, &md_writer, &d);
    *text = d.b.s;
    return EMBZ_OK;
}

int embz_report_markdown(char **text, const embz_report_t r, embz_err_t *err)
{
    return _embz_report_markdown(text, r, NULL, err);
}

/* ------------------------------------------------------------------ LaTeX */

static void tex(embz_buf_t *b, const char *s)
{
    _embz_math_tex(b, s);
}

typedef struct { embz_buf_t *b; int in_list; } tex_ctx;

static void tex_para(void *ctx, const char *p)
{
    tex_ctx *c = ctx;
    int item = strncmp(p, BULLET, strlen(BULLET)) == 0;
    if (item && !c->in_list)
        embz_buf_printf(c->b, "\\begin{itemize}\n");
    if (!item && c->in_list)
        embz_buf_printf(c->b, "\\end{itemize}\n");
    c->in_list = item;
    embz_buf_printf(c->b, item ? "\\item " : "");
    tex(c->b, item ? p + strlen(BULLET) : p);
    embz_buf_printf(c->b, item ? "\n" : "\n\n");
}

static void tex_paragraphs(embz_buf_t *b, const char *s)
{
    tex_ctx c = { b, 0 };
    _embz_render_paragraphs(s, 1, tex_para, &c);
    if (c.in_list)
        embz_buf_printf(b, "\\end{itemize}\n\n");
}

/* A table as wide as it needs, shrunk to the text width when it is wider (graphicx). The key
 * table instead fills the width, its reason column wrapping (tabularx). */
static void tex_table(embz_buf_t *b, const embz_report_table_t *t, int key, int links)
{
    if (key) {
        embz_buf_printf(b, "\\begin{table}[!htbp]\n\\centering\\small\n"
                        "\\begin{tabularx}{\\textwidth}{");
    } else {
        embz_buf_printf(b, "\\begin{table}[!htbp]\n\\centering\\small\n"
                        "\\sbox\\embzbox{\\begin{tabular}{");
    }
    for (slong c = 0; c < t->ncols; c++)
        /* in the key table the word columns (family, verdict) wrap at a fixed width, so
         * that the reason column keeps most of the line */
        embz_buf_printf(b, "%s", t->style[c] == EMBZ_COL_NUM ? "r"
                                 : key && t->style[c] == EMBZ_COL_PROSE
                                 ? ">{\\raggedright\\arraybackslash}X"
                                 : key ? ">{\\raggedright\\arraybackslash}p{2.3cm}" : "l");
    embz_buf_printf(b, "}\n\\toprule\n");
    for (slong c = 0; c < t->ncols; c++) {
        if (c > 0)
            embz_buf_printf(b, " & ");
        if (key && t->numeric[c]) {
            /* a narrow head: words in lines of about 12 characters */
            embz_buf_printf(b, "\\shortstack[r]{");
            char *h = _embz_render_strdup(t->head[c]);
            size_t line = 0;
            for (char *w = strtok(h, " "); w != NULL; w = strtok(NULL, " ")) {
                if (line > 0 && line + strlen(w) > 12) {
                    embz_buf_printf(b, "\\\\");
                    line = 0;
                } else if (line > 0) {
                    embz_buf_printf(b, " ");
                }
                tex(b, w);
                line += strlen(w) + 1;
            }
            free(h);
            embz_buf_printf(b, "}");
        } else
            tex(b, t->head[c]);
    }
    embz_buf_printf(b, " \\\\\n\\midrule\n");
    for (slong i = 0; i < t->nrows; i++) {
        for (slong c = 0; c < t->ncols; c++) {
            if (c > 0)
                embz_buf_printf(b, " & ");
            const char *v = t->cell[i * t->ncols + c];
            if (v == NULL)
                embz_buf_printf(b, "--");
            else if (t->style[c] == EMBZ_COL_CODE) {
                char *e = embz_latex_escape(v);
                embz_buf_printf(b, "\\texttt{%s}", e);
                free(e);
            } else if (c == 0 && links) {
                char id[32];
                _embz_report_anchor(id, sizeof(id), i);
                embz_buf_printf(b, "\\hyperref[%s]{", id);
                tex(b, v);
                embz_buf_printf(b, "}");
            } else
                tex(b, v);
        }
        embz_buf_printf(b, " \\\\\n");
    }
    if (key)
        embz_buf_printf(b, "\\bottomrule\n\\end{tabularx}\n\\end{table}\n\n");
    else
        embz_buf_printf(b, "\\bottomrule\n\\end{tabular}}%%\n"
                        "\\ifdim\\wd\\embzbox>\\textwidth\\resizebox{\\textwidth}{!}"
                        "{\\usebox\\embzbox}\\else\\usebox\\embzbox\\fi\n\\end{table}\n\n");
}

static void tex_figure(embz_buf_t *b, const embz_report_figure_struct *g, slong k,
                       const char *stem)
{
    char *file = NULL;
    if (g->plot != NULL && stem != NULL)
        file = embz_strdup_printf("%s-fig%ld.pdf", stem, (long) k + 1);
    else if (g->plot == NULL && g->path != NULL)
        file = embz_strdup_printf("%s", g->path);
    embz_buf_printf(b, "\\begin{figure}[!htbp]\n\\centering\n");
    if (file != NULL) {
        char *e = embz_latex_escape(file);
        embz_buf_printf(b, "\\includegraphics[width=\\textwidth]{%s}\n", e);
        free(e);
        free(file);
    } else {
        embz_buf_printf(b, "\\fbox{\\parbox{0.9\\textwidth}{\\centering Figure %ld %s.}}\n",
                        (long) k + 1, g->plot != NULL
                        ? "is written beside the document when the LaTeX goes to a file"
                        : "is drawn in the HTML report only");
    }
    embz_buf_printf(b, "\\caption{");
    tex(b, g->caption ? g->caption : "");
    embz_buf_printf(b, "}\n\\end{figure}\n\n");
}

static void tex_head(void *ctx, const embz_report_struct *r)
{
    embz_buf_t *b = &((doc_t *) ctx)->b;
    embz_buf_printf(b, "%% Written by embz: a complete document (pdflatex; figures are the "
                    "PDF files beside it).\n\\documentclass[a4paper,10pt]{article}\n"
                    "\\usepackage[T1]{fontenc}\n\\usepackage[utf8]{inputenc}\n"
                    "\\usepackage[margin=2cm]{geometry}\n"
                    "\\usepackage{booktabs,tabularx,array,graphicx,amsmath}\n"
                    "\\usepackage[hidelinks]{hyperref}\n\\newsavebox\\embzbox\n"
                    "\\setlength{\\parindent}{0pt}\\setlength{\\parskip}{4pt}\n"
                    "\\begin{document}\n\\section*{");
    tex(b, r->title ? r->title : "embz report");
    embz_buf_printf(b, "}\n");
    if (r->subtitle) {
        embz_buf_printf(b, "\\textit{");
        tex(b, r->subtitle);
        embz_buf_printf(b, "}\n\n");
    }
    if (r->answer) {
        embz_buf_printf(b, "\\paragraph{Answer.} ");
        tex(b, r->answer);
        embz_buf_printf(b, "\n\n");
    }
}

static void tex_w_table(void *ctx, const embz_report_table_t *t, int kind)
{
    int key = kind == EMBZ_TABLE_KEY;
    tex_table(&((doc_t *) ctx)->b, t, key, key);
}

static int tex_w_figure(void *ctx, const embz_report_figure_struct *g, slong k)
{
    tex_figure(&((doc_t *) ctx)->b, g, k, ((doc_t *) ctx)->stem);
    return EMBZ_OK;
}

static void tex_w_text(void *ctx, const char *s)
{
    tex_paragraphs(&((doc_t *) ctx)->b, s);
}

static void tex_heading(void *ctx, const char *title, const char *id)
{
    (void) id;
    embz_buf_printf(&((doc_t *) ctx)->b, "\\subsection*{%s}\n\n", title);
}

static void tex_item(embz_buf_t *b, const char *term, const char *value, int code)
{
    if (value == NULL)
        return;
    embz_buf_printf(b, "\\item[%s] ", term);
    if (code) {
        char *e = embz_latex_escape(value);
        embz_buf_printf(b, "\\texttt{%s}", e);
        free(e);
    } else
        tex(b, value);
    embz_buf_printf(b, "\n");
}

static void tex_family(void *ctx, const embz_report_struct *r, slong i)
{
    embz_buf_t *b = &((doc_t *) ctx)->b;
    const embz_report_family_struct *f = r->fam + i;
    char id[32];
    _embz_report_anchor(id, sizeof(id), i);
    embz_buf_printf(b, "\\subsubsection*{");
    tex(b, f->name);
    embz_buf_printf(b, "}\\label{%s}\n\\begin{description}\n", id);
    tex_item(b, "weight", f->weight, 1);
    tex_item(b, "verdict", f->verdict, 0);
    tex_item(b, "in short", f->summary, 0);
    embz_buf_printf(b, "\\end{description}\n");
    tex_paragraphs(b, f->notes);
}

static void tex_footer(void *ctx, const char *s)
{
    embz_buf_t *b = &((doc_t *) ctx)->b;
    embz_buf_printf(b, "{\\footnotesize ");
    tex_paragraphs(b, s);
    embz_buf_printf(b, "}\n");
}

static const embz_report_writer_t tex_writer = {
    tex_head, tex_w_table, tex_w_figure, tex_w_text, tex_heading, tex_family, tex_footer
};

int _embz_report_latex(char **text, const embz_report_struct *r, const char *stem,
                       embz_err_t *err)
{
    (void) err;
    doc_t d = { { 0 }, stem };
    embz_buf_init(&d.b);
    _embz_report_walk(r, &tex_writer, &d);
    embz_buf_printf(&d.b, "\\end{document}\n");
    *text = d.b.s;
    return EMBZ_OK;
}

int embz_report_latex(char **text, const embz_report_t r, embz_err_t *err)
{
    return _embz_report_latex(text, r, NULL, err);
}
