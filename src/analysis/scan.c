/* Parameter scans: the verdict at every point of a grid, sharded and threaded. */
#include <stdlib.h>
#include <string.h>
#include <stdio.h>
#include "embz/analysis.h"
#ifdef _OPENMP
#include <omp.h>
#endif

#define GRID_FORM "NAME=LO..HI,count=COUNT, e.g. a=-1.5..-0.5,count=21"

int embz_grid_axis_parse(embz_grid_axis_struct *axis, const char *text, embz_err_t *err)
{
    memset(axis, 0, sizeof(*axis));
    fmpq_init(axis->lo);
    fmpq_init(axis->hi);
    const char *eq = strchr(text, '=');
    if (eq == NULL || eq == text)
        return embz_err_set(err, EMBZ_ERR_INPUT, "grid '%s': expected " GRID_FORM, text);
    size_t nl = (size_t) (eq - text);
    axis->name = malloc(nl + 1);
    memcpy(axis->name, text, nl);
    axis->name[nl] = '\0';
    char buf[256];
    snprintf(buf, sizeof(buf), "%s", eq + 1);
    char *hi, *cnt;
    char *dots = strstr(buf, "..");
    if (dots != NULL) {
        /* LO..HI,count=COUNT */
        char *comma = strchr(dots + 2, ',');
        if (comma == NULL || strncmp(comma + 1, "count=", 6) != 0)
            return embz_err_set(err, EMBZ_ERR_INPUT, "grid '%s': expected " GRID_FORM
                                " (the number of values is required)", text);
        *dots = '\0';
        *comma = '\0';
        hi = dots + 2;
        cnt = comma + 7;
    } else {
        /* the older LO:HI:COUNT */
        char *c1 = strchr(buf, ':');
        char *c2 = c1 ? strchr(c1 + 1, ':') : NULL;
        if (c1 == NULL || c2 == NULL)
            return embz_err_set(err, EMBZ_ERR_INPUT, "grid '%s': expected " GRID_FORM, text);
        *c1 = '\0';
        *c2 = '\0';
        hi = c1 + 1;
        cnt = c2 + 1;
        axis->old_form = 1;
    }
    if (embz_number_parse(axis->lo, buf) != EMBZ_OK)
        return embz_err_set(err, EMBZ_ERR_INPUT, "grid '%s': bad lower end '%s'", text, buf);
    if (embz_number_parse(axis->hi, hi) != EMBZ_OK)
        return embz_err_set(err, EMBZ_ERR_INPUT, "grid '%s': bad upper end '%s'", text, hi);
    char *end;
    long c = strtol(cnt, &end, 10);
    if (end == cnt || *end != '\0' || c < 1 || c > 1000000)
        return embz_err_set(err, EMBZ_ERR_INPUT,
                            "grid '%s': the count must be a whole number from 1 to 1000000", text);
    axis->count = c;
    return EMBZ_OK;
}

void embz_grid_axis_clear(embz_grid_axis_struct *axis)
{
    free(axis->name);
    axis->name = NULL;
    fmpq_clear(axis->lo);
    fmpq_clear(axis->hi);
}

void embz_grid_axis_value(fmpq_t res, const embz_grid_axis_struct *axis, slong j)
{
    if (axis->count <= 1 || j == 0) {
        fmpq_set(res, axis->lo);
        return;
    }
    fmpq_t t;
    fmpz_t d;
    fmpq_init(t);
    fmpz_init_set_si(d, axis->count - 1);
    fmpq_sub(t, axis->hi, axis->lo);
    fmpq_mul_si(t, t, j);
    fmpq_div_fmpz(res, t, d);
    fmpq_add(res, res, axis->lo);
    fmpq_clear(t);
    fmpz_clear(d);
}

void embz_scan_init(embz_scan_t s)
{
    memset(s, 0, sizeof(*s));
}

void embz_scan_clear(embz_scan_t s)
{
    for (slong k = 0; k < s->len; k++) {
        embz_scan_row_struct *r = s->rows + k;
        for (slong a = 0; a < s->naxes; a++) fmpq_clear(r->values + a);
        free(r->values);
        embz_classify_clear(r->c);
    }
    free(s->rows);
    memset(s, 0, sizeof(*s));
}

static void classify_opts_copy(embz_classify_opts_t d, const embz_classify_opts_t o)
{
    embz_classify_opts_init(d);
    fmpz_set(d->from, o->from);
    fmpz_set(d->to, o->to);
    d->points = o->points;
    d->prec = o->prec;
    d->use_analytic = o->use_analytic;
}

int embz_scan_run(embz_scan_t s, const embz_family_t f, const embz_grid_axis_struct *axes,
                  slong naxes, slong shard, slong nshards, int threads,
                  const embz_classify_opts_t o, embz_progress_fn progress, void *ctx,
                  embz_err_t *err)
{
    embz_scan_clear(s);
    if (naxes < 1) return embz_err_set(err, EMBZ_ERR_INPUT, "the grid has no axis");
    if (nshards < 1 || nshards > 1000000 || shard < 0 || shard >= nshards)
        return embz_err_set(err, EMBZ_ERR_INPUT, "bad shard %ld of %ld", (long) shard + 1,
                            (long) nshards);
    slong *pidx = malloc((size_t) naxes * sizeof(slong));
    slong total = 1;
    for (slong a = 0; a < naxes; a++) {
        long k = -1;
        for (long p = 0; p < f->nparams; p++)
            if (strcmp(f->param_names[p], axes[a].name) == 0) k = p;
        if (k < 0) {
            free(pidx);
            if (f->nparams == 0)
                return embz_err_set(err, EMBZ_ERR_INPUT,
                                    "the family has no parameter '%s' (it has no parameters; "
                                    "an inline expression declares them with --set)",
                                    axes[a].name);
            return embz_err_set(err, EMBZ_ERR_INPUT, "the family has no parameter '%s'",
                                axes[a].name);
        }
        for (slong b = 0; b < a; b++)
            if (pidx[b] == k) {
                free(pidx);
                return embz_err_set(err, EMBZ_ERR_INPUT, "parameter '%s' appears in two grids",
                                    axes[a].name);
            }
        pidx[a] = k;
        if (total > 10000000 / axes[a].count) {
            free(pidx);
            return embz_err_set(err, EMBZ_ERR_LIMIT, "the grid has more than 10^7 points");
        }
        total *= axes[a].count;
    }
    /* block bounds (total <= 10^7 and nshards <= 10^6: the products fit) */
    slong start = total * shard / nshards;
    slong stop = total * (shard + 1) / nshards;
    s->total = total;
    s->naxes = naxes;
    s->len = stop - start;
    s->rows = calloc((size_t) (s->len > 0 ? s->len : 1), sizeof(embz_scan_row_struct));
    for (slong r = 0; r < s->len; r++) {
        embz_scan_row_struct *row = s->rows + r;
        row->index = start + r;
        row->values = malloc((size_t) naxes * sizeof(fmpq));
        slong rem = row->index;
        for (slong a = naxes - 1; a >= 0; a--) {
            fmpq_init(row->values + a);
            embz_grid_axis_value(row->values + a, axes + a, rem % axes[a].count);
            rem /= axes[a].count;
        }
        embz_classify_init(row->c);
        row->status = EMBZ_ERR_UNSUPPORTED;
    }

    slong len = s->len, done = 0;
#ifdef _OPENMP
#pragma omp parallel for schedule(dynamic, 1) num_threads(threads > 0 ? threads : 1)
#else
    (void) threads;
#endif
    for (slong r = 0; r < len; r++) {
        embz_scan_row_struct *row = s->rows + r;
        embz_family_t g;
        embz_classify_opts_t oo;
        embz_err_t e2;
        embz_err_clear(&e2);
        embz_family_init(g);
        embz_family_set(g, f);
        classify_opts_copy(oo, o);
        for (slong a = 0; a < naxes; a++) fmpq_set(g->param_values + pidx[a], row->values + a);
        embz_family_bind(g);
        row->status = embz_classify(row->c, g, oo, NULL, NULL, &e2);
        if (row->status != EMBZ_OK) snprintf(row->message, sizeof(row->message), "%.250s", e2.text);
        /* keep only the summary */
        embz_sweep_clear(row->c->sweep);
        embz_fitset_clear(row->c->fits);
        embz_classify_opts_clear(oo);
        embz_family_clear(g);
        if (progress != NULL) {
#ifdef _OPENMP
#pragma omp critical(embz_scan_progress)
#endif
            progress(ctx, ++done, len);
        }
    }
    free(pidx);
    return EMBZ_OK;
}
