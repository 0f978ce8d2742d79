/* Plots through the flat interface: the caller's points drawn by the C renderer. */
#include <stdlib.h>
#include "impl.h"

int embz_flat_plot(char **svg, const char *title, const char *xlabel, const char *ylabel,
                   int xlog, int ylog, long nseries, const char *const *labels,
                   const long *lens, const double *x, const double *y, const double *lo,
                   const double *hi, const char *path, const char *format, embz_flat_err *err)
{
    if (svg != NULL) *svg = NULL;
    if (path == NULL && svg == NULL)
        return _flat_err_set(err, EMBZ_ERR_INPUT, "neither a file nor an SVG string asked for");
    if (nseries < 0 || nseries > 1000)
        return _flat_err_set(err, EMBZ_ERR_INPUT, "bad number of series %ld", nseries);
    embz_plot_t fig;
    embz_plot_init(fig, title);
    slong p = embz_plot_add_panel(fig, NULL, xlabel ? xlabel : "", ylabel ? ylabel : "",
                                  xlog != 0, ylog != 0);
    long at = 0;
    for (long k = 0; k < nseries; k++) {
        slong s = embz_plot_add_series(fig, p, labels != NULL ? labels[k] : NULL,
                                       EMBZ_PLOT_POINTS | EMBZ_PLOT_LINE, -1000);
        for (long j = 0; j < lens[k]; j++, at++)
            embz_plot_push(fig, p, s, x[at], y[at], lo[at], hi[at]);
    }
    embz_err_t e;
    embz_err_clear(&e);
    int st = path == NULL ? embz_plot_svg_string(svg, fig, "embz", &e)
                          : embz_plot_write_format(fig, path, format, &e);
    if (st != EMBZ_OK) _flat_err_from(err, st, &e);
    embz_plot_clear(fig);
    return st;
}
