/* Timing and the progress bar of the long-running commands (sweep, classify): a bar on
 * stderr, shown only on a terminal and only once a run has taken more than a second. */
#include <time.h>
#include <unistd.h>
#include "cli.h"

#define BAR_WIDTH 30
#define CLEAR_WIDTH 100

double cli_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double) ts.tv_sec + 1e-9 * (double) ts.tv_nsec;
}

embz_progress_fn cli_progress_start(cli_progress_t *p, int clear_when_done)
{
    p->t0 = cli_now();
    p->shown = 0;
    p->clear_when_done = clear_when_done;
    p->unit = "sizes";
    return isatty(fileno(stderr)) ? cli_progress_cb : NULL;
}

void cli_progress_cb(void *ctx, slong done, slong total)
{
    cli_progress_t *p = ctx;
    double el = cli_now() - p->t0;
    if (el < 1.0 && !p->shown) return;
    p->shown = 1;
    int fill = (int) (BAR_WIDTH * done / (total > 0 ? total : 1));
    char bar[BAR_WIDTH + 1];
    for (int k = 0; k < BAR_WIDTH; k++) bar[k] = k < fill ? '#' : '.';
    bar[BAR_WIDTH] = '\0';
    /* the time left, extrapolated from the pace so far, is an estimate and says so */
    if (done > 0 && done < total)
        fprintf(stderr, "\r[%s] %ld/%ld %s, %.1f s, about %.0f s left (estimate)  ", bar,
                (long) done, (long) total, p->unit, el, el * (double) (total - done) / (double) done);
    else
        fprintf(stderr, "\r[%s] %ld/%ld %s, %.1f s%*s", bar, (long) done, (long) total, p->unit,
                el, 28, "");
    if (p->clear_when_done && done == total) fprintf(stderr, "\r%*s\r", CLEAR_WIDTH, "");
    fflush(stderr);
}

void cli_progress_end(cli_progress_t *p)
{
    if (!p->shown) return;
    fprintf(stderr, "\r%*s\r", CLEAR_WIDTH, "");
    fflush(stderr);
}
