/* Reports through the flat interface: the caller's texts laid out by the C renderer (HTML,
 * Markdown, LaTeX, PDF), the document behind `embz report`. */
#include <stdlib.h>
#include <string.h>
#include "impl.h"

#define FIXED_CELLS 8

int embz_flat_report(char **text, const char *title, const char *subtitle, const char *intro,
                     long nsizes, const char *const *sizes, long ngoals,
                     const char *const *goals, long nfam, const char *const *cells,
                     long nfig, const char *const *captions, const char *const *svgs,
                     const char *footer, const char *format, const char *path,
                     embz_flat_err *err)
{
    if (text != NULL) *text = NULL;
    int fmt = embz_report_format_from_name(format ? format : "html");
    if (fmt < 0)
        return _flat_err_set(err, EMBZ_ERR_INPUT, "unknown report format '%.40s' (html, md, "
                             "tex or pdf)", format);
    if (path == NULL && (text == NULL || fmt == EMBZ_REPORT_PDF))
        return _flat_err_set(err, EMBZ_ERR_INPUT, path == NULL && fmt == EMBZ_REPORT_PDF
                             ? "a PDF report needs a file" : "neither a file nor a text asked for");
    if (nsizes < 0 || ngoals < 0 || nfam < 0 || nfig < 0)
        return _flat_err_set(err, EMBZ_ERR_INPUT, "negative count");
    embz_report_t r;
    embz_report_init(r, title ? title : "embz report");
    embz_report_set(&r->subtitle, subtitle);
    embz_report_set(&r->intro, intro);
    embz_report_set(&r->footer, footer);
    embz_report_set_sizes(r, nsizes, sizes);
    embz_report_set_goals(r, ngoals, goals);
    long per = FIXED_CELLS + nsizes + 2 * ngoals;
    for (long k = 0; k < nfam; k++) {
        const char *const *c = cells + k * per;
        embz_report_family_struct *row = embz_report_add_family(r, c[0] ? c[0] : "");
        char **fixed[FIXED_CELLS - 1] = { &row->weight, &row->verdict, &row->law,
                                          &row->exponent, &row->limit_lo, &row->limit_hi,
                                          &row->notes };
        for (int j = 0; j < FIXED_CELLS - 1; j++) embz_report_set(fixed[j], c[1 + j]);
        for (long j = 0; j < nsizes; j++) embz_report_set(row->error_at + j, c[FIXED_CELLS + j]);
        for (long j = 0; j < ngoals; j++) {
            embz_report_set(row->need_n + j, c[FIXED_CELLS + nsizes + j]);
            embz_report_set(row->need_qubits + j, c[FIXED_CELLS + nsizes + ngoals + j]);
        }
    }
    for (long k = 0; k < nfig; k++) {
        embz_report_figure_struct *fg = embz_report_add_figure(r, captions ? captions[k] : NULL,
                                                              NULL);
        embz_report_set(&fg->svg, svgs[k]);
    }
    embz_err_t e;
    embz_err_clear(&e);
    int st;
    if (path != NULL) st = embz_report_write(r, path, fmt, &e);
    else if (fmt == EMBZ_REPORT_HTML) st = embz_report_html(text, r, &e);
    else if (fmt == EMBZ_REPORT_MD) st = embz_report_markdown(text, r, &e);
    else st = embz_report_latex(text, r, &e);
    if (st != EMBZ_OK) _flat_err_from(err, st, &e);
    embz_report_clear(r);
    return st;
}
