/* The report as one self-contained HTML page: the answer and the key table first (it fits a
 * window 1280 px wide), the first figure beside it, then the reading notes, one structured
 * block per family (linked from the table), the other figures and the full numbers. Math in
 * text is MathML; the page has no script and loads nothing. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "embz/util.h"
#include "render_impl.h"

#define DASH "\xe2\x80\x93"
#define BULLET "\xe2\x80\xa2 "

static void text(embz_buf_t *b, const char *s)
{
    char *e = embz_html_escape(s);
    embz_buf_printf(b, "%s", e);
    free(e);
}

typedef struct { embz_buf_t *b; int in_list; } para_ctx;

/* A paragraph; those starting with a bullet become items of one list. */
static void para(void *ctx, const char *p)
{
    para_ctx *pc = ctx;
    int item = strncmp(p, BULLET, strlen(BULLET)) == 0;
    if (item && !pc->in_list)
        embz_buf_printf(pc->b, "<ul>\n");
    if (!item && pc->in_list)
        embz_buf_printf(pc->b, "</ul>\n");
    pc->in_list = item;
    embz_buf_printf(pc->b, item ? "<li>" : "<p>");
    _embz_math_html(pc->b, item ? p + strlen(BULLET) : p);
    embz_buf_printf(pc->b, item ? "</li>\n" : "</p>\n");
}

static void paragraphs(embz_buf_t *b, const char *s)
{
    para_ctx pc = { b, 0 };
    _embz_render_paragraphs(s, 1, para, &pc);
    if (pc.in_list)
        embz_buf_printf(b, "</ul>\n");
}

/* Colours of our own: warm near-black text on an off-white page, a deep teal for links and
 * the answer, dark umber rules. */
static const char css[] =
    "body{margin:0;background:#fcfbf7;color:#2e2924;"
    "font:15px/1.55 'DejaVu Sans',Verdana,sans-serif}\n"
    "main{max-width:1120px;margin:0 auto;padding:22px 28px 40px}\n"
    "a{color:#0d5f66}\n"
    "h1{font-size:23px;margin:0 0 2px;font-weight:700}\n"
    "h2{font-size:18px;margin:30px 0 8px;padding-bottom:3px;border-bottom:1px solid #d8d2c6}\n"
    "h3{font-size:16px;margin:0 0 6px}\n"
    ".sub{color:#6a6157;margin:0 0 12px}\n"
    ".answer{font-size:17px;margin:10px 0 14px;padding:10px 14px;background:#eaf3f1;"
    "border-left:4px solid #0d5f66}\n"
    ".wrap{overflow-x:auto}\n"
    "table{border-collapse:collapse;font-size:13.5px;background:#fff}\n"
    "table.key{width:100%;font-size:14px}\n"
    "th,td{padding:5px 9px;text-align:left;vertical-align:top}\n"
    "thead th{border-top:2px solid #4a3f35;border-bottom:1px solid #4a3f35;font-weight:600}\n"
    "tbody tr:last-child td{border-bottom:2px solid #4a3f35}\n"
    "tbody tr:nth-child(even) td{background:#f5f2ec}\n"
    "td.num,th.num{text-align:right}\n"
    "td.num{white-space:nowrap}\n"
    "table.key th.num{min-width:5.5em}\n"
    "td.num{font-family:'DejaVu Sans Mono',monospace}\n"
    "td.nw{white-space:nowrap}\n"
    "td.expr,code{font-family:'DejaVu Sans Mono',monospace;font-size:13px}\n"
    "figure{margin:18px 0;background:#fff;border:1px solid #e4dfd4;padding:10px}\n"
    "figure svg,figure img{display:block;max-width:100%;height:auto;margin:0 auto}\n"
    "figcaption{color:#4f473f;font-size:14px;margin-top:6px}\n"
    ".fignum{font-weight:700}\n"
    ".note{background:#fff;border:1px solid #e4dfd4;padding:12px 16px;margin:12px 0}\n"
    ".note:target{border-color:#0d5f66;box-shadow:0 0 0 2px #0d5f6633}\n"
    ".note dl{display:grid;grid-template-columns:max-content 1fr;gap:2px 14px;margin:0 0 8px}\n"
    ".note dt{color:#6a6157}\n"
    ".note dd{margin:0}\n"
    ".note p{margin:6px 0}\n"
    ".note ul{margin:4px 0;padding-left:22px}\n"
    "details summary{cursor:pointer;color:#0d5f66}\n"
    "math{font-size:1.05em}\n"
    "footer{margin-top:30px;color:#6a6157;font-size:13px}\n";

static void table(embz_buf_t *b, const embz_report_table_t *t, const char *cls, int links)
{
    embz_buf_printf(b, "<div class=\"wrap\"><table%s%s%s>\n<thead><tr>", cls ? " class=\"" : "",
                    cls ? cls : "", cls ? "\"" : "");
    for (slong c = 0; c < t->ncols; c++) {
        embz_buf_printf(b, "<th%s>", t->numeric[c] ? " class=\"num\"" : "");
        _embz_math_html(b, t->head[c]);
        embz_buf_printf(b, "</th>");
    }
    embz_buf_printf(b, "</tr></thead>\n<tbody>\n");
    for (slong i = 0; i < t->nrows; i++) {
        embz_buf_printf(b, "<tr>");
        for (slong c = 0; c < t->ncols; c++) {
            const char *v = t->cell[i * t->ncols + c];
            int st = t->style[c];
            embz_buf_printf(b, "<td%s>", st == EMBZ_COL_NUM ? " class=\"num\""
                                         : st == EMBZ_COL_CODE ? " class=\"expr\""
                                         : st == EMBZ_COL_TEXT ? " class=\"nw\"" : "");
            if (c == 0 && links) {
                char id[32];
                _embz_report_anchor(id, sizeof(id), i);
                embz_buf_printf(b, "<a href=\"#%s\">", id);
                text(b, v ? v : DASH);
                embz_buf_printf(b, "</a>");
            } else if (v == NULL)
                embz_buf_printf(b, DASH);
            else if (st == EMBZ_COL_CODE)
                text(b, v);
            else
                _embz_math_html(b, v);
            embz_buf_printf(b, "</td>");
        }
        embz_buf_printf(b, "</tr>\n");
    }
    embz_buf_printf(b, "</tbody>\n</table></div>\n");
}

static int figure(embz_buf_t *b, const embz_report_figure_struct *g, slong k, embz_err_t *err)
{
    embz_buf_printf(b, "<figure id=\"figure-%ld\">\n", (long) k + 1);
    if (g->plot != NULL) {
        char prefix[32], *svg;
        snprintf(prefix, sizeof(prefix), "fig%ld-", (long) k);
        int st = embz_plot_svg_string(&svg, g->plot, prefix, err);
        if (st != EMBZ_OK)
            return st;
        embz_buf_printf(b, "%s\n", svg);
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
            if (fp == NULL)
                return embz_err_set(err, mime ? EMBZ_ERR_IO : EMBZ_ERR_INPUT,
                                    mime ? "cannot read figure %s"
                                         : "figure %s: only .svg and .png can be embedded",
                                    g->path);
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
        embz_buf_printf(b, "<img alt=\"");
        text(b, g->caption ? g->caption : "figure");
        embz_buf_printf(b, "\" src=\"data:%s;base64,", mime);
        for (size_t i = 0; i < len; i += 3) {
            unsigned v = (unsigned char) data[i] << 16;
            if (i + 1 < len) v |= (unsigned char) data[i + 1] << 8;
            if (i + 2 < len) v |= (unsigned char) data[i + 2];
            embz_buf_printf(b, "%c%c%c%c", b64[(v >> 18) & 63], b64[(v >> 12) & 63],
                            i + 1 < len ? b64[(v >> 6) & 63] : '=',
                            i + 2 < len ? b64[v & 63] : '=');
        }
        embz_buf_printf(b, "\">\n");
        free(data);
    }
    if (g->caption) {
        embz_buf_printf(b, "<figcaption><span class=\"fignum\">Figure %ld.</span> ", (long) k + 1);
        _embz_math_html(b, g->caption);
        embz_buf_printf(b, "</figcaption>\n");
    }
    embz_buf_printf(b, "</figure>\n");
    return EMBZ_OK;
}

static void fact(embz_buf_t *b, const char *term, const char *value, int code)
{
    if (value == NULL)
        return;
    embz_buf_printf(b, "<dt>");
    _embz_math_html(b, term);
    embz_buf_printf(b, "</dt><dd>%s", code ? "<code>" : "");
    if (code)
        text(b, value);
    else
        _embz_math_html(b, value);
    embz_buf_printf(b, "%s</dd>\n", code ? "</code>" : "");
}

/* One family's block: its numbers as a short list of terms, the notes below, the list of
 * reasons folded away. */
static void note(embz_buf_t *b, const embz_report_struct *r, slong i)
{
    const embz_report_family_struct *f = r->fam + i;
    char id[32];
    _embz_report_anchor(id, sizeof(id), i);
    embz_buf_printf(b, "<section class=\"note\" id=\"%s\">\n<h3>", id);
    text(b, f->name);
    embz_buf_printf(b, "</h3>\n<dl>\n");
    fact(b, "weight", f->weight, 1);
    fact(b, "verdict", f->verdict, 0);
    fact(b, "in short", f->summary, 0);
    if (f->law) {
        char *l = f->exponent ? embz_strdup_printf("%s; %s", f->law, f->exponent)
                              : embz_strdup_printf("%s", f->law);
        fact(b, "fitted law", l, 0);
        free(l);
    }
    if (f->limit_lo && f->limit_hi && strcmp(f->limit_lo, f->limit_hi) != 0) {
        char *l = embz_strdup_printf("[%s, %s]", f->limit_lo, f->limit_hi);
        fact(b, "limit of E", l, 0);
        free(l);
    } else
        fact(b, "limit of E", f->limit_lo ? f->limit_lo : f->limit_hi, 0);
    for (slong j = 0; j < r->ngoals; j++) {
        if (f->need_n[j] == NULL && f->need_qubits[j] == NULL)
            continue;
        char *term = embz_strdup_printf("E \xe2\x89\xa4 %s", r->goals[j] ? r->goals[j] : "?");
        char *v = f->need_qubits[j] && f->need_n[j] && strcmp(f->need_qubits[j], f->need_n[j])
                ? embz_strdup_printf("n %s%s, %s qubits per side%s%s%s",
                                     strncmp(f->need_n[j], "\xe2\x89\xa4", 3) ? "= " : "",
                                     f->need_n[j],
                                     f->need_qubits[j], f->extra_qubits[j] ? " (" : "",
                                     f->extra_qubits[j] ? f->extra_qubits[j] : "",
                                     f->extra_qubits[j] ? " more than the optimum)" : "")
                : embz_strdup_printf("%s", f->need_n[j] ? f->need_n[j] : f->need_qubits[j]);
        fact(b, term, v, 0);
        free(term);
        free(v);
    }
    embz_buf_printf(b, "</dl>\n");
    /* the notes: paragraphs up to the first list stay open, the list is folded */
    const char *n = f->notes ? f->notes : "";
    const char *list = strstr(n, "\n\n" BULLET);
    if (list == NULL) {
        paragraphs(b, n);
    } else {
        /* the paragraph before the list is its title */
        const char *head = list;
        while (head > n && !(head[-1] == '\n' && head - 1 > n && head[-2] == '\n'))
            head--;
        char *before = malloc(head - n + 1);
        memcpy(before, n, head - n);
        before[head - n] = 0;
        paragraphs(b, before);
        free(before);
        char *title = malloc(list - head + 1);
        memcpy(title, head, list - head);
        title[list - head] = 0;
        embz_buf_printf(b, "<details><summary>");
        _embz_math_html(b, title);
        embz_buf_printf(b, "</summary>\n");
        paragraphs(b, list + 2);
        embz_buf_printf(b, "</details>\n");
        free(title);
    }
    embz_buf_printf(b, "</section>\n");
}

typedef struct { embz_buf_t b; embz_err_t *err; } html_t;

static void w_head(void *ctx, const embz_report_struct *r)
{
    embz_buf_t *b = &((html_t *) ctx)->b;
    embz_buf_printf(b, "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
                    "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
                    "<meta name=\"generator\" content=\"embz\">\n<title>");
    text(b, r->title ? r->title : "embz report");
    embz_buf_printf(b, "</title>\n<style>\n%s</style>\n</head>\n<body>\n<main>\n<h1>", css);
    text(b, r->title ? r->title : "embz report");
    embz_buf_printf(b, "</h1>\n");
    if (r->subtitle) {
        embz_buf_printf(b, "<p class=\"sub\">");
        _embz_math_html(b, r->subtitle);
        embz_buf_printf(b, "</p>\n");
    }
    if (r->answer) {
        embz_buf_printf(b, "<p class=\"answer\" id=\"answer\">");
        _embz_math_html(b, r->answer);
        embz_buf_printf(b, "</p>\n");
    }
}

static void w_table(void *ctx, const embz_report_table_t *t, int kind)
{
    embz_buf_t *b = &((html_t *) ctx)->b;
    if (kind == EMBZ_TABLE_NUMBERS)
        embz_buf_printf(b, "<p></p>\n");
    table(b, t, kind == EMBZ_TABLE_KEY ? "key" : NULL, 1);
    if (kind == EMBZ_TABLE_KEY)
        embz_buf_printf(b, "<p class=\"sub\">Each name leads to the family's notes; the full "
                        "numbers are in <a href=\"#numbers\">All numbers</a>.</p>\n");
}

static int w_figure(void *ctx, const embz_report_figure_struct *g, slong k)
{
    html_t *h = ctx;
    return figure(&h->b, g, k, h->err);
}

static void w_text(void *ctx, const char *s)
{
    paragraphs(&((html_t *) ctx)->b, s);
}

static void w_heading(void *ctx, const char *title, const char *id)
{
    embz_buf_t *b = &((html_t *) ctx)->b;
    embz_buf_printf(b, "<h2 id=\"%s\">", id);
    text(b, title);
    embz_buf_printf(b, "</h2>\n");
}

static void w_family(void *ctx, const embz_report_struct *r, slong i)
{
    note(&((html_t *) ctx)->b, r, i);
}

static void w_footer(void *ctx, const char *s)
{
    embz_buf_t *b = &((html_t *) ctx)->b;
    embz_buf_printf(b, "<footer>");
    paragraphs(b, s);
    embz_buf_printf(b, "</footer>\n");
}

static const embz_report_writer_t writer = {
    w_head, w_table, w_figure, w_text, w_heading, w_family, w_footer
};

int embz_report_html(char **out, const embz_report_t r, embz_err_t *err)
{
    html_t h;
    embz_buf_init(&h.b);
    h.err = err;
    int st = _embz_report_walk(r, &writer, &h);
    if (st != EMBZ_OK) {
        embz_buf_clear(&h.b);
        *out = NULL;
        return st;
    }
    embz_buf_printf(&h.b, "</main>\n</body>\n</html>\n");
    *out = h.b.s;
    return EMBZ_OK;
}
