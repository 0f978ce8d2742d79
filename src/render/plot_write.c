/* Figure output: SVG, PDF and PNG files (chosen by extension) and SVG text for inlining. */
#include <ctype.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <cairo.h>
#include <cairo-pdf.h>
#include <cairo-svg.h>
#include "embz/util.h"
#include "render_impl.h"

cairo_status_t embz_afile_cairo_write(void *closure, const unsigned char *data,
                                      unsigned int len)
{
    embz_afile_struct *f = closure;
    return embz_afile_write(f, data, len) == 0 ? CAIRO_STATUS_SUCCESS
                                               : CAIRO_STATUS_WRITE_ERROR;
}

void embz_path_ext(char *buf, size_t len, const char *path)
{
    const char *slash = strrchr(path, '/');
    const char *dot = strrchr(path, '.');
    buf[0] = 0;
    if (dot == NULL || (slash != NULL && dot < slash) || len == 0)
        return;
    size_t i = 0;
    for (dot++; *dot && i + 1 < len; dot++)
        buf[i++] = (char) tolower((unsigned char) *dot);
    buf[i] = 0;
}

static int cairo_failed(cairo_status_t st, const char *path, embz_err_t *err)
{
    if (st == CAIRO_STATUS_WRITE_ERROR)
        return embz_err_set(err, EMBZ_ERR_IO, "cannot write %s", path);
    if (st == CAIRO_STATUS_NO_MEMORY)
        return embz_err_set(err, EMBZ_ERR_NOMEM, "out of memory while drawing %s", path);
    return embz_err_set(err, EMBZ_ERR_IO, "drawing %s failed: %s", path,
                        cairo_status_to_string(st));
}

/* Draw the figure on a surface that streams into the file; png: draw on an image surface and
 * encode it. Returns EMBZ_OK or the error; the file is committed only on success. */
int embz_plot_write(const embz_plot_t fig, const char *path, embz_err_t *err)
{
    return embz_plot_write_format(fig, path, NULL, err);
}

int embz_plot_write_format(const embz_plot_t fig, const char *path, const char *format,
                           embz_err_t *err)
{
    char ext[16];
    if (format != NULL) {
        size_t i = 0;
        for (; format[i] && i + 1 < sizeof(ext); i++)
            ext[i] = (char) tolower((unsigned char) format[i]);
        ext[i] = '\0';
        if (format[i] != '\0')
            ext[0] = '\0';
    } else {
        embz_path_ext(ext, sizeof(ext), path);
    }
    int kind = !strcmp(ext, "svg") ? 0 : !strcmp(ext, "pdf") ? 1 : !strcmp(ext, "png") ? 2 : -1;
    if (kind < 0 && format != NULL)
        return embz_err_set(err, EMBZ_ERR_INPUT, "unknown figure format '%s' (svg, pdf or png)",
                            format);
    if (kind < 0)
        return embz_err_set(err, EMBZ_ERR_INPUT,
                            "cannot tell the format of %s: the name must end in .svg, .pdf or "
                            ".png", path);
    double W, H;
    embz_plot_size(&W, &H, fig);

    embz_afile_t f;
    int st = embz_afile_open(f, path, err);
    if (st != EMBZ_OK)
        return st;
    f->fail_after = fig->fail_after;

    cairo_surface_t *surf;
    double scale = 1;
    if (kind == 0)
        surf = cairo_svg_surface_create_for_stream(embz_afile_cairo_write, f, W, H);
    else if (kind == 1)
        surf = cairo_pdf_surface_create_for_stream(embz_afile_cairo_write, f, W, H);
    else {
        scale = fig->png_scale > 0 ? fig->png_scale : 1;
        int pw = (int) (W * scale + 0.5), ph = (int) (H * scale + 0.5);
        if (pw > 20000 || ph > 20000) {
            embz_afile_abort(f);
            return embz_err_set(err, EMBZ_ERR_LIMIT, "figure too large for PNG (%d x %d)",
                                pw, ph);
        }
        surf = cairo_image_surface_create(CAIRO_FORMAT_RGB24, pw, ph);
    }
    if (kind == 1)
        cairo_pdf_surface_set_metadata(surf, CAIRO_PDF_METADATA_CREATOR, "embz");
    cairo_t *cr = cairo_create(surf);
    embz_plot_draw(cr, fig, 0, 0, scale);
    cairo_status_t cst = cairo_status(cr);
    cairo_destroy(cr);
    if (kind == 2 && cst == CAIRO_STATUS_SUCCESS)
        cst = cairo_surface_write_to_png_stream(surf, embz_afile_cairo_write, f);
    cairo_surface_finish(surf);
    if (cst == CAIRO_STATUS_SUCCESS)
        cst = cairo_surface_status(surf);
    cairo_surface_destroy(surf);
    if (f->failed)   /* commit refuses and names the reason (e.g. no space left) */
        return embz_afile_commit(f, err);
    if (cst != CAIRO_STATUS_SUCCESS) {
        embz_afile_abort(f);
        return cairo_failed(cst, path, err);
    }
    return embz_afile_commit(f, err);
}

static cairo_status_t buf_write(void *closure, const unsigned char *data, unsigned int len)
{
    embz_buf_t *b = closure;
    if (b->len + len + 1 > b->alloc) {
        size_t a = b->alloc ? b->alloc : 4096;
        while (a < b->len + len + 1)
            a *= 2;
        char *s = realloc(b->s, a);
        if (s == NULL)
            return CAIRO_STATUS_NO_MEMORY;
        b->s = s;
        b->alloc = a;
    }
    memcpy(b->s + b->len, data, len);
    b->len += len;
    b->s[b->len] = 0;
    return CAIRO_STATUS_SUCCESS;
}

/* Does s at position i start an id reference we rewrite? Returns the length of the matched
 * prefix ("id=\"", "href=\"#", "url(#") or 0. */
static size_t id_site(const char *s)
{
    if (!strncmp(s, " id=\"", 5))
        return 5;
    if (!strncmp(s, "href=\"#", 7))
        return 7;
    if (!strncmp(s, "url(#", 5))
        return 5;
    return 0;
}

int embz_plot_svg_string(char **svg, const embz_plot_t fig, const char *id_prefix,
                         embz_err_t *err)
{
    double W, H;
    embz_plot_size(&W, &H, fig);
    embz_buf_t raw;
    embz_buf_init(&raw);
    cairo_surface_t *surf = cairo_svg_surface_create_for_stream(buf_write, &raw, W, H);
    cairo_t *cr = cairo_create(surf);
    embz_plot_draw(cr, fig, 0, 0, 1);
    cairo_status_t cst = cairo_status(cr);
    cairo_destroy(cr);
    cairo_surface_finish(surf);
    if (cst == CAIRO_STATUS_SUCCESS)
        cst = cairo_surface_status(surf);
    cairo_surface_destroy(surf);
    *svg = NULL;
    if (cst != CAIRO_STATUS_SUCCESS || raw.s == NULL) {
        embz_buf_clear(&raw);
        return embz_err_set(err, cst == CAIRO_STATUS_NO_MEMORY ? EMBZ_ERR_NOMEM : EMBZ_ERR_IO,
                            "drawing the figure failed: %s", cairo_status_to_string(cst));
    }
    /* drop the XML declaration, make the size relative, prefix every id */
    const char *p = strstr(raw.s, "<svg");
    if (p == NULL) {
        embz_buf_clear(&raw);
        return embz_err_set(err, EMBZ_ERR_IO, "the SVG surface produced no <svg> element");
    }
    const char *prefix = id_prefix ? id_prefix : "";
    for (const char *c = prefix; *c; c++)
        if (!(isalnum((unsigned char) *c) || *c == '-' || *c == '_')) {
            embz_buf_clear(&raw);
            return embz_err_set(err, EMBZ_ERR_INPUT, "bad SVG id prefix \"%s\"", prefix);
        }
    embz_buf_t out;
    embz_buf_init(&out);
    const char *tag_end = strchr(p, '>');
    embz_buf_printf(&out, "<svg xmlns=\"http://www.w3.org/2000/svg\" "
                    "xmlns:xlink=\"http://www.w3.org/1999/xlink\" "
                    "viewBox=\"0 0 %.0f %.0f\" width=\"100%%\" "
                    "style=\"max-width:%.0fpx;height:auto\" role=\"img\">", W, H, W);
    for (const char *s = tag_end + 1; *s; ) {
        size_t m = id_site(s);
        if (m > 0) {
            embz_buf_printf(&out, "%.*s%s", (int) m, s, prefix);
            s += m;
        } else {
            const char *q = s + 1;
            while (*q && *q != ' ' && *q != 'h' && *q != 'u')
                q++;
            embz_buf_printf(&out, "%.*s", (int) (q - s), s);
            s = q;
        }
    }
    embz_buf_clear(&raw);
    *svg = out.s;
    return EMBZ_OK;
}
