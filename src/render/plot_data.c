/* A figure's data as CSV (embz_plot_data_csv): what each series draws, for plotting again
 * elsewhere. */
#include <math.h>
#include <string.h>
#include "embz/render.h"
#include "embz/util.h"

/* a CSV field, quoted when it holds a comma, a quote or a line break */
static void field(embz_buf_t *b, const char *s)
{
    if (s == NULL) s = "";
    if (strpbrk(s, ",\"\r\n") == NULL) {
        embz_buf_printf(b, "%s", s);
        return;
    }
    embz_buf_printf(b, "\"");
    for (const char *p = s; *p; p++) embz_buf_printf(b, *p == '"' ? "\"\"" : "%c", *p);
    embz_buf_printf(b, "\"");
}

/* an axis coordinate back to the value (10^c on a log axis); "" when there is none */
static void value(embz_buf_t *b, double c, int logscale)
{
    embz_buf_printf(b, ",");
    if (!isfinite(c)) return;
    embz_buf_printf(b, "%.17g", logscale ? pow(10.0, c) : c);
}

char *embz_plot_data_csv(const embz_plot_t fig)
{
    embz_buf_t b;
    embz_buf_init(&b);
    embz_buf_printf(&b, "panel,series,x,y,y_lo,y_hi\n");
    for (slong p = 0; p < fig->npanels; p++) {
        const embz_plot_panel_struct *pa = fig->panels + p;
        if (pa->kind != EMBZ_PANEL_XY) continue;
        for (slong s = 0; s < pa->nseries; s++) {
            const embz_plot_series_struct *se = pa->series + s;
            for (slong j = 0; j < se->len; j++) {
                if (!isfinite(se->x[j])) continue;       /* a break in the line */
                field(&b, pa->title);
                embz_buf_printf(&b, ",");
                field(&b, se->label);
                value(&b, se->x[j], pa->xlog);
                value(&b, se->y[j], pa->ylog);
                value(&b, se->lo[j], pa->ylog);
                value(&b, se->hi[j], pa->ylog);
                embz_buf_printf(&b, "\n");
            }
        }
    }
    return b.s;
}
