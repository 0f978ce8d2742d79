/* Comparing families for `embz report` and `embz demo`: the rows are computed by the library
 * (embz_compare_run, include/embz/compare.h); here they become words, the report struct, the
 * figures and a plain-text table. Each number is either certified or labelled as an
 * estimate. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <time.h>
#include "cli.h"
#include "compare_impl.h"


char *_cli_cmp_sdup(const char *s)
{
    if (s == NULL) return NULL;
    size_t l = strlen(s) + 1;
    char *d = malloc(l);
    memcpy(d, s, l);
    return d;
}

void cli_compare_opts_init(cli_compare_opts_t *o)
{
    memset(o, 0, sizeof(*o));
    fmpz_init(o->from);
    fmpz_init(o->to);
    embz_default_range(o->from, o->to);
    o->points = EMBZ_RANGE_POINTS;
    o->prec = EMBZ_PREC_MANY;
    o->envelope = 0.1;
    o->threads = 1;
    o->cmd = "report";
}

void cli_compare_opts_clear(cli_compare_opts_t *o)
{
    fmpz_clear(o->from);
    fmpz_clear(o->to);
}

/* ------------------------------------------------------------------ loading */

static int has_param(const embz_family_struct *f, const char *name)
{
    for (long k = 0; k < f->nparams; k++)
        if (strcmp(f->param_names[k], name) == 0) return 1;
    return 0;
}

int cli_compare_load(embz_family_struct *fam, long nfam, const char *const *specs,
                     const cli_args_t *a, const cli_spec_t *spec)
{
    long nset = 0;
    const char *const *sets = NULL;
    for (const cli_opt_t *op = spec->opts; op->name != NULL; op++)
        if (strcmp(op->name, "set") == 0) sets = cli_list(a, "set", &nset);
    embz_setting_t *settings = calloc((size_t) nset + 1, sizeof(embz_setting_t));
    embz_setting_t *mine = calloc((size_t) nset + 1, sizeof(embz_setting_t));
    char **copies = calloc((size_t) nset + 1, sizeof(char *));
    int *used = calloc((size_t) nset + 1, sizeof(int));
    int code = CLI_EXIT_OK, status;
    embz_err_t err;
    embz_err_clear(&err);
    for (long k = 0; k < nset; k++) {
        copies[k] = _cli_cmp_sdup(sets[k]);
        if ((status = embz_setting_split(&settings[k], copies[k], &err)) != EMBZ_OK) {
            code = cli_report(spec->name, status, &err);
            goto done;
        }
        for (long j = 0; j < k; j++)
            if (strcmp(settings[j].name, settings[k].name) == 0) {
                code = cli_usage_error(spec, "parameter '%s' is set twice", settings[k].name);
                goto done;
            }
    }
    for (long i = 0; i < nfam; i++) {
        embz_err_clear(&err);
        status = embz_family_resolve(fam + i, specs[i], NULL, 0, 0, &err);
        if (status == EMBZ_OK && embz_family_is_levels(fam + i)) {
            /* its sizes are numbers of copies or sites: the comparison's sizes, goals and
             * asymptotic columns are not yet defined for it */
            code = cli_usage_error(spec, "'%s' is a level family, which %s does not take yet "
                                   "(use error, sweep, classify, size, plot)", specs[i],
                                   spec->name);
            goto done;
        }
        if (status != EMBZ_OK) {
            /* an inline expression declares its parameters through the settings */
            embz_family_clear(fam + i);
            embz_family_init(fam + i);
            embz_err_clear(&err);
            status = embz_family_resolve(fam + i, specs[i], settings, nset, 0, &err);
            if (status != EMBZ_OK) {
                code = cli_report(spec->name, status, &err);
                goto done;
            }
            /* it keeps only the settings it uses */
            for (long k = 0; k < nset; k++)
                if (has_param(fam + i, settings[k].name)) used[k] = 1;
            continue;
        }
        long nmine = 0;
        for (long k = 0; k < nset; k++)
            if (has_param(fam + i, settings[k].name)) {
                mine[nmine++] = settings[k];
                used[k] = 1;
            }
        status = nmine ? embz_family_apply_settings(fam + i, mine, nmine, &err) : EMBZ_OK;
        if (status != EMBZ_OK) {
            code = cli_report(spec->name, status, &err);
            goto done;
        }
    }
    for (long k = 0; k < nset; k++)
        if (!used[k]) {
            code = cli_usage_error(spec, "no family has a parameter '%s'", settings[k].name);
            goto done;
        }
done:
    for (long k = 0; k < nset; k++) free(copies[k]);
    free(copies);
    free(settings);
    free(mine);
    free(used);
    return code;
}

int cli_compare_format(const char *format_opt, const char *path)
{
    if (format_opt != NULL) return embz_report_format_from_name(format_opt);
    if (path == NULL) return -1;
    const char *dot = strrchr(path, '.');
    const char *slash = strrchr(path, '/');
    if (dot == NULL || (slash != NULL && dot < slash)) return -1;
    return embz_report_format_from_name(dot + 1);
}

/* ------------------------------------------------------------------ computing */

static void row_init(cli_compare_row_t *r, embz_family_struct *f, const cli_compare_opts_t *o,
                     const embz_compare_opts_t co)
{
    memset(r, 0, sizeof(*r));
    embz_compare_row_init(&r->d, f, co);
    r->label = cli_family_label(f);
    r->error_text = calloc((size_t) o->nsizes + 1, sizeof(char *));
    r->need_n_text = calloc((size_t) o->ngoals + 1, sizeof(char *));
    r->need_q_text = calloc((size_t) o->ngoals + 1, sizeof(char *));
    r->extra_q_text = calloc((size_t) o->ngoals + 1, sizeof(char *));
}

static void free_strings(char **s, slong n)
{
    if (s == NULL) return;
    for (slong k = 0; k < n; k++) free(s[k]);
    free(s);
}

void cli_compare_rows_clear(cli_compare_row_t *rows, long nfam, const cli_compare_opts_t *o)
{
    embz_compare_opts_t co;
    embz_compare_opts_init(co);
    co->nsizes = o->nsizes;
    co->ngoals = o->ngoals;
    for (long i = 0; i < nfam; i++) {
        cli_compare_row_t *r = rows + i;
        embz_compare_row_clear(&r->d, co);
        free(r->label);
        free(r->verdict); free(r->law); free(r->exponent); free(r->limit_text);
        free_strings(r->error_text, o->nsizes);
        free_strings(r->need_n_text, o->ngoals);
        free_strings(r->need_q_text, o->ngoals);
        free_strings(r->extra_q_text, o->ngoals);
        free(r->why);
        free(r->notes);
    }
    embz_compare_opts_clear(co);
}

/* ------------------------------------------------------------------ texts */

/* n as text: all digits up to 12 of them, else d.dddde+N rounded up (up = 1) or down. */
char *_cli_cmp_size_text(const fmpz_t n, int up)
{
    if (fmpz_sizeinbase(n, 10) <= 12) {
        char *f = fmpz_get_str(NULL, 10, n), *s = _cli_cmp_sdup(f);
        flint_free(f);
        return s;
    }
    {
        /* an exact power of ten as 10^k */
        fmpz_t t;
        fmpz_init_set(t, n);
        slong k = 0;
        while (fmpz_divisible_si(t, 10)) {
            fmpz_divexact_si(t, t, 10);
            k++;
        }
        int pow10 = fmpz_is_one(t);
        fmpz_clear(t);
        if (pow10) return embz_strdup_printf("10^%ld", (long) k);
    }
    slong e = (slong) fmpz_sizeinbase(n, 10) - 1;   /* exact or one too large */
    fmpz_t p, m;
    fmpz_init(p);
    fmpz_init(m);
    for (;;) {
        fmpz_ui_pow_ui(p, 10, (ulong) (e - 4));
        if (up) fmpz_cdiv_q(m, n, p);
        else fmpz_fdiv_q(m, n, p);
        if (fmpz_cmp_ui(m, 10000) >= 0) break;
        e--;
    }
    if (fmpz_cmp_ui(m, 100000) >= 0) {   /* 9.9999x rounded up to 10.0000 */
        fmpz_cdiv_q_ui(m, m, 10);
        e++;
    }
    ulong d = fmpz_get_ui(m);
    char *s = embz_strdup_printf("%lu.%04lue+%ld", d / 10000, d % 10000, (long) e);
    fmpz_clear(p);
    fmpz_clear(m);
    return s;
}

/* "[lo, hi]" with 8 digits, rounded outward */
static char *ball_text(const arb_t x)
{
    char *lo = embz_arb_lo_string(x, 8), *hi = embz_arb_hi_string(x, 8);
    char *s = embz_strdup_printf("[%s, %s]", lo, hi);
    free(lo);
    free(hi);
    return s;
}

/* 10^k <= 2^EMBZ_SIZE_MAX_LOG2, the end of the size search */
long _cli_cmp_search_decades(void)
{
    return (long) floor((double) EMBZ_SIZE_MAX_LOG2 * 0.30102999566398119521);
}

static const char *verdict_words(int v)
{
    return v == EMBZ_VERDICT_EMBEZZLER ? "embezzler"
         : v == EMBZ_VERDICT_NOT_EMBEZZLER ? "not embezzler" : "inconclusive";
}

/* The fitted law's value at ln n = x (NaN where undefined). */
double _cli_cmp_law_value(int law, const embz_fit_struct *f, double x)
{
    switch (law) {
    case EMBZ_LAW_POWER_LIMIT: return f->L + f->C * exp(-f->g * x);
    case EMBZ_LAW_LOG: return f->C * pow(x, -f->g);
    case EMBZ_LAW_LOGLOG: return x > 1 ? f->C * pow(log(x), -f->g) : NAN;
    case EMBZ_LAW_LOG_LIMIT: return f->L + f->C * pow(x, -f->g);
    default: return NAN;
    }
}

/* The fit drawn over the target's points: the target sweep's best fit, or the
 * classification's when the target is one ebit. */
const embz_fitset_struct *_cli_cmp_target_fits(const cli_compare_row_t *r)
{
    if (r->d.own_sweep) return r->d.tfit_ok ? r->d.tfits : NULL;
    return r->d.c->law ? r->d.c->fits : NULL;
}

const embz_sweep_struct *_cli_cmp_target_sweep(const cli_compare_row_t *r)
{
    return r->d.own_sweep ? r->d.tsweep : r->d.c->sweep;
}

static const char *rate_words(const cli_compare_row_t *r)
{
    if (r->d.c->analytic_rate[0]) return r->d.c->analytic_rate;
    return r->d.c->law ? embz_law_formula(r->d.c->law) : "an unknown law";
}

static void make_texts(cli_compare_row_t *r, const cli_compare_opts_t *o,
                       const embz_target_t q)
{
    /* ebits:J (uniform over a power of two): the words used since "never" was only those */
    int several_ebits = q->kind == EMBZ_TARGET_UNIFORM && q->d >= 2 && (q->d & (q->d - 1)) == 0;
    const embz_classify_struct *c = r->d.c;
    if (r->d.status != EMBZ_OK) {
        r->verdict = _cli_cmp_sdup("failed");
        r->why = embz_strdup_printf("failed: %s", r->d.message);
        r->notes = embz_strdup_printf("The computation failed: %s", r->d.message);
        return;
    }
    r->verdict = _cli_cmp_sdup(verdict_words(c->verdict));
    if (c->disagree) {
        free(r->verdict);
        r->verdict = _cli_cmp_sdup("inconclusive (routes disagree)");
    }
    if (c->law && isfinite(c->exponent)) {
        r->law = embz_strdup_printf("%s", embz_law_formula(c->law));
        r->exponent = embz_strdup_printf("g \xe2\x89\x88 %.3g (est.)", c->exponent);
    } else if (c->law) {
        r->law = _cli_cmp_sdup("constant (settled)");
    }
    if (r->d.limit_known) {
        char *l = embz_arb_certified_string(r->d.limit, 6);
        r->limit_text = embz_strdup_printf("%s (derived)", l);
        free(l);
    } else if (c->limit_by_criterion) {
        r->limit_text = _cli_cmp_sdup("0 (criterion)");
    } else if (isfinite(c->limit_value)) {
        r->limit_text = embz_strdup_printf("\xe2\x89\x88 %.4g (est.)", c->limit_value);
    }
    for (slong j = 0; j < o->nsizes; j++)
        r->error_text[j] = r->d.err_status[j] == EMBZ_OK
                         ? embz_arb_certified_string(r->d.err_at + j, 6) : NULL;
    for (slong j = 0; j < o->ngoals; j++) {
        const embz_size_result_struct *s = r->d.need + j;
        if (r->d.need_status[j] != EMBZ_OK) continue;
        if (s->status == EMBZ_SIZE_FOUND) {
            long qb = s->qubits;
            char *nt = _cli_cmp_size_text(s->n, 1);
            if (s->exhaustive) r->need_n_text[j] = nt;
            else {
                r->need_n_text[j] = embz_strdup_printf("\xe2\x89\xa4 %s", nt);
                free(nt);
            }
            r->need_q_text[j] = embz_strdup_printf("%ld", qb);
        } else if (s->status == EMBZ_SIZE_NOT_REACHED) {
            if (r->d.never[j]) {
                r->need_n_text[j] = _cli_cmp_sdup("never");
                r->need_q_text[j] = _cli_cmp_sdup("never");
            } else {
                r->need_n_text[j] = embz_strdup_printf("not by 10^%ld", _cli_cmp_search_decades());
            }
        } else {
            r->need_n_text[j] = _cli_cmp_sdup("undecided");
        }
    }

    /* the one-line why, about the first goal */
    embz_buf_t w;
    embz_buf_init(&w);
    const embz_size_result_struct *s0 = o->ngoals > 0 && r->d.need_status[0] == EMBZ_OK
                                      ? r->d.need : NULL;
    if (c->verdict == EMBZ_VERDICT_NOT_EMBEZZLER) {
        if (r->d.limit_known) {
            char *l = embz_arb_certified_string(r->d.limit, 6);
            embz_buf_printf(&w, "positive limit: one-ebit error tends to %s (derived)", l);
            free(l);
        } else if (r->d.summable == 1) {
            embz_buf_printf(&w, "summable weights: one-ebit error levels off near %.3g (est.)",
                            c->limit_value);
        } else {
            embz_buf_printf(&w, "one-ebit error levels off near %.3g (est.)", c->limit_value);
        }
    } else if (c->verdict == EMBZ_VERDICT_EMBEZZLER) {
        if (s0 != NULL && s0->status == EMBZ_SIZE_FOUND) {
            embz_buf_printf(&w, "decays like %s: slow, but gets there", rate_words(r));
        } else if (s0 != NULL && s0->status == EMBZ_SIZE_NOT_REACHED) {
            char *e = embz_arb_certified_string(s0->err_largest, 3);
            embz_buf_printf(&w, "too slow (%s): E = %s at 2^%ld", rate_words(r), e,
                            (long) fmpz_bits(s0->largest) - 1);
            free(e);
        } else {
            embz_buf_printf(&w, "error decays like %s", rate_words(r));
        }
    } else {
        char *t = c->nfacts > 0 ? embz_classify_fact_text(c->facts + c->nfacts - 1) : NULL;
        embz_buf_printf(&w, "%s", t != NULL ? t : "no clear trend over the sweep");
        free(t);
    }
    r->why = w.s;

    /* notes: the why, the sizes' evidence, the classification's reasons */
    embz_buf_t nb;
    embz_buf_init(&nb);
    if (r->d.fam->amplitude)
        embz_buf_printf(&nb, "The family is given by its amplitude %s; the weight is its "
                        "square.", r->d.fam->weight_text);
    for (slong j = 0; j < o->ngoals; j++) {
        const embz_size_result_struct *s = r->d.need + j;
        if (r->d.need_status[j] != EMBZ_OK) continue;
        if (s->status == EMBZ_SIZE_FOUND) {
            char *e = ball_text(s->err_n), *el = ball_text(s->err_prev);
            char *nt = _cli_cmp_size_text(s->n, 1), *lt = _cli_cmp_size_text(s->n_low, 0);
            if (s->exhaustive)
                embz_buf_printf(&nb, "\n\nGoal %s: n = %s is the smallest size (every smaller "
                                "size checked); E there is in %s (certified).", o->goal_text[j],
                                nt, e);
            else
                embz_buf_printf(&nb, "\n\nGoal %s: E in %s at a size n \xe2\x89\xa4 %s, and E "
                                "in %s, above the goal, at a size \xe2\x89\xa5 %s (certified); "
                                "both sizes need %ld qubits per side. The exact smallest size "
                                "is not computed.", o->goal_text[j], e, nt, el, lt,
                                r->need_q_text[j] ? atol(r->need_q_text[j]) : 0L);
            free(e); free(el); free(nt); free(lt);
        } else if (s->status == EMBZ_SIZE_NOT_REACHED) {
            char *e = embz_arb_certified_string(s->err_largest, 6);
            embz_buf_printf(&nb, "\n\nGoal %s: not reached by the search, which stops at n = "
                            "2^%ld, where E = %s (certified).", o->goal_text[j],
                            (long) fmpz_bits(s->largest) - 1, e);
            if (r->d.never[j]) {
                char *l = embz_arb_certified_string(r->d.limit, 8);
                embz_buf_printf(&nb, " Never: the one-ebit error tends to %s [derived], above "
                                "the goal, and %s cannot do better.", l,
                                several_ebits ? "a target of several ebits"
                                              : "a target majorized by one ebit");
                free(l);
            }
            free(e);
        }
    }
    /* a size without an enclosure shows '–' in the table: the reason belongs here */
    for (slong j = 0; j < o->nsizes; j++)
        if (r->d.err_status[j] != EMBZ_OK && r->d.err_why[j] != NULL)
            embz_buf_printf(&nb, "\n\nE at n = %s: not certified (%s).", o->size_text[j],
                            r->d.err_why[j]);
    embz_buf_printf(&nb, "\n\nClassification (one ebit, sizes swept as set for this document):");
    for (slong k = 0; k < c->nfacts; k++) {
        char *t = embz_classify_fact_text(c->facts + k);
        embz_buf_printf(&nb, "\n\n\xe2\x80\xa2 %s", t);
        free(t);
    }
    r->notes = nb.s;
}

/* The goal text as an exact rational (checked by the command before). */
static void goal_fmpq(fmpq_t g, const char *text)
{
    if (embz_number_parse(g, text) != EMBZ_OK) fmpq_zero(g);
}

/* The optimum for a goal: m <- the smallest rank with OPT_m(q) <= goal (the closed form of
 * docs/optimal.md, exact) and *qubits <- ceil(log2 m). Returns EMBZ_OK, EMBZ_ERR_UNSUPPORTED
 * for a target that is not uniform, or embz_optimal_eps's status. */
int _cli_cmp_optimum_rank(fmpz_t m, long *qubits, const embz_target_t q, const char *goal_text)
{
    if (q->kind != EMBZ_TARGET_UNIFORM) return EMBZ_ERR_UNSUPPORTED;
    fmpq_t g;
    fmpq_init(g);
    goal_fmpq(g, goal_text);
    embz_err_t err;
    embz_err_clear(&err);
    int status = fmpq_sgn(g) > 0 ? embz_optimal_eps(m, g, q, &err) : EMBZ_ERR_INPUT;
    fmpq_clear(g);
    *qubits = status == EMBZ_OK && fmpz_cmp_ui(m, 1) > 0 ? (long) fmpz_clog_ui(m, 2) : 0;
    return status;
}

/* The extra qubits per side of each goal: the family's (when its size was found) minus the
 * optimum's; "n/a" for a target that is not uniform (the optimum is not known there). */
static void make_extra_texts(cli_compare_row_t *r, const cli_compare_opts_t *o,
                             const embz_target_t q)
{
    if (r->d.status != EMBZ_OK) return;
    fmpz_t m;
    fmpz_init(m);
    for (slong j = 0; j < o->ngoals; j++) {
        long oq;
        int st = _cli_cmp_optimum_rank(m, &oq, q, o->goal_text[j]);
        if (st == EMBZ_ERR_UNSUPPORTED) {
            r->extra_q_text[j] = _cli_cmp_sdup("n/a");
            continue;
        }
        if (st != EMBZ_OK || r->d.need_status[j] != EMBZ_OK
            || r->d.need[j].status != EMBZ_SIZE_FOUND)
            continue;
        r->extra_q_text[j] = embz_strdup_printf("%ld", (long) r->d.need[j].qubits - oq);
    }
    fmpz_clear(m);
}

typedef struct {
    const cli_compare_row_t *rows;
    const cli_compare_opts_t *o;
    double t0;
} progress_ctx;

static void row_done(void *ctx, slong i, slong done, slong total)
{
    const progress_ctx *p = ctx;
    (void) done;
    (void) total;
    fprintf(stderr, "embz %s: %s done (%.1f s; %.1f s elapsed)\n", p->o->cmd,
            p->rows[i].label, p->rows[i].d.seconds, cli_now() - p->t0);
    fflush(stderr);
}

int cli_compare_run(cli_compare_row_t *rows, embz_family_struct *fam, long nfam,
                    const cli_compare_opts_t *o)
{
    embz_compare_opts_t co;
    embz_target_t q;
    embz_err_t err;
    embz_compare_opts_init(co);
    embz_target_init(q);
    embz_err_clear(&err);
    fmpq *goals = _fmpq_vec_init(o->ngoals > 0 ? o->ngoals : 1);
    for (slong j = 0; j < o->ngoals; j++) goal_fmpq(goals + j, o->goal_text[j]);
    fmpz_set(co->from, o->from);
    fmpz_set(co->to, o->to);
    co->points = o->points;
    co->prec = o->prec;
    co->nsizes = o->nsizes;
    co->sizes = o->sizes;
    co->ngoals = o->ngoals;
    co->goals = goals;
    co->threads = o->threads;
    int tst = o->target_text != NULL ? embz_target_parse(q, o->target_text, 0, &err) : EMBZ_OK;
    co->target = q;
    for (long i = 0; i < nfam; i++) row_init(rows + i, fam + i, o, co);
    progress_ctx pc = { rows, o, cli_now() };
    int code = CLI_EXIT_OK;
    if (tst != EMBZ_OK) {
        /* checked by the command before: only a broken invariant gets here */
        for (long i = 0; i < nfam; i++) {
            rows[i].d.status = tst;
            embz_err_format(rows[i].d.message, sizeof(rows[i].d.message), &err);
        }
    } else {
        embz_compare_row_struct **rp = malloc((size_t) (nfam > 0 ? nfam : 1) * sizeof(*rp));
        for (long i = 0; i < nfam; i++) rp[i] = &rows[i].d;
        embz_compare_run(rp, nfam, co, o->progress ? row_done : NULL, &pc);
        free(rp);
    }
    for (long i = 0; i < nfam; i++) {
        make_texts(rows + i, o, q);
        make_extra_texts(rows + i, o, q);
        if (rows[i].d.status != EMBZ_OK) {
            fprintf(stderr, "embz %s: %s: %s\n", o->cmd, rows[i].label, rows[i].d.message);
            int c = cli_exit_code(rows[i].d.status);
            if (c > code) code = c;
        }
    }
    _fmpq_vec_clear(goals, o->ngoals > 0 ? o->ngoals : 1);
    embz_target_clear(q);
    embz_compare_opts_clear(co);
    return code;
}

/* ------------------------------------------------------------------ order and answer */

/* rank for the display order: found (fewest qubits first), not reached, never, failed */
static long row_rank(const cli_compare_row_t *r, const cli_compare_opts_t *o, long *qubits)
{
    *qubits = 0;
    if (r->d.status != EMBZ_OK) return 4;
    if (o->ngoals == 0 || r->d.need_status[0] != EMBZ_OK)
        return r->d.c->verdict == EMBZ_VERDICT_EMBEZZLER ? 1 : 2;
    if (r->d.need[0].status == EMBZ_SIZE_FOUND) {
        *qubits = r->d.need[0].qubits;
        return 0;
    }
    if (r->d.never[0]) return 3;
    return r->d.c->verdict == EMBZ_VERDICT_EMBEZZLER ? 1 : 2;
}

void cli_compare_order(long *order, const cli_compare_row_t *rows, long nfam,
                       const cli_compare_opts_t *o)
{
    long *rank = malloc((size_t) (nfam > 0 ? nfam : 1) * sizeof(long));
    long *qb = malloc((size_t) (nfam > 0 ? nfam : 1) * sizeof(long));
    for (long i = 0; i < nfam; i++) {
        order[i] = i;
        rank[i] = row_rank(rows + i, o, qb + i);
    }
    for (long i = 1; i < nfam; i++)   /* insertion sort, stable */
        for (long j = i; j > 0; j--) {
            long x = order[j - 1], y = order[j];
            if (rank[x] > rank[y] || (rank[x] == rank[y] && rank[x] == 0 && qb[x] > qb[y])) {
                order[j - 1] = y;
                order[j] = x;
            } else
                break;
        }
    free(rank);
    free(qb);
}

/* "a, b and c" of the rows in order whose rank is k (empty when none) */
static int names_of_rank(embz_buf_t *b, const cli_compare_row_t *rows, const long *order,
                         long nfam, const cli_compare_opts_t *o, long k)
{
    long n = 0, total = 0, q;
    for (long i = 0; i < nfam; i++) total += row_rank(rows + order[i], o, &q) == k;
    for (long i = 0; i < nfam; i++) {
        if (row_rank(rows + order[i], o, &q) != k) continue;
        n++;
        embz_buf_printf(b, "%s%s", n == 1 ? "" : n == total ? " and " : ", ",
                        rows[order[i]].label);
    }
    return (int) total;
}

char *cli_compare_answer(const cli_compare_row_t *rows, const long *order, long nfam,
                         const cli_compare_opts_t *o)
{
    embz_buf_t b;
    embz_buf_init(&b);
    long q0;
    if (o->ngoals == 0) {
        embz_buf_printf(&b, "Embezzlers (one ebit): ");
        if (!names_of_rank(&b, rows, order, nfam, o, 1)) embz_buf_printf(&b, "none");
        embz_buf_printf(&b, ". Not embezzlers or inconclusive: ");
        if (!names_of_rank(&b, rows, order, nfam, o, 2)) embz_buf_printf(&b, "none");
        embz_buf_printf(&b, ".");
        return b.s;
    }
    const char *g = o->goal_text[0];
    const cli_compare_row_t *best = nfam > 0 && row_rank(rows + order[0], o, &q0) == 0
                                  ? rows + order[0] : NULL;
    if (best != NULL) {
        embz_buf_printf(&b, "Fewest qubits for E \xe2\x89\xa4 %s: %s, %s qubits per side (a size "
                        "n %s reaches the goal, certified)", g, best->label,
                        best->need_q_text[0], best->need_n_text[0]);
        if (best->extra_q_text[0] != NULL && strcmp(best->extra_q_text[0], "n/a") != 0)
            embz_buf_printf(&b, ", %s more than the optimum over all states",
                            best->extra_q_text[0]);
        embz_buf_printf(&b, ".");
    } else {
        embz_buf_printf(&b, "No family reaches E \xe2\x89\xa4 %s within the search.", g);
    }
    embz_buf_t n;
    embz_buf_init(&n);
    int k = names_of_rank(&n, rows, order, nfam, o, 1);
    if (k) embz_buf_printf(&b, " Too slow to get there by n = 10^%ld: %s.",
                           _cli_cmp_search_decades(), n.s);
    embz_buf_clear(&n);
    embz_buf_init(&n);
    k = names_of_rank(&n, rows, order, nfam, o, 2);
    if (k) embz_buf_printf(&b, " Not embezzlers, not there by n = 10^%ld: %s.",
                           _cli_cmp_search_decades(), n.s);
    embz_buf_clear(&n);
    embz_buf_init(&n);
    k = names_of_rank(&n, rows, order, nfam, o, 3);
    if (k) embz_buf_printf(&b, " Never (the error tends to a limit above the goal): %s.", n.s);
    embz_buf_clear(&n);
    embz_buf_init(&n);
    k = names_of_rank(&n, rows, order, nfam, o, 4);
    if (k) embz_buf_printf(&b, " Failed: %s.", n.s);
    embz_buf_clear(&n);
    return b.s;
}

/* ------------------------------------------------------------------ terminal table */

/* display width of UTF-8 text (code points) */
static long uwidth(const char *s)
{
    long w = 0;
    for (; *s; s++)
        if (((unsigned char) *s & 0xC0) != 0x80) w++;
    return w;
}

static void pad(embz_buf_t *b, const char *s, long width)
{
    embz_buf_printf(b, "%s", s);
    for (long k = uwidth(s); k < width; k++) embz_buf_printf(b, " ");
}

void cli_compare_text(embz_buf_t *b, const cli_compare_row_t *rows, const long *order,
                      long nfam, const cli_compare_opts_t *o)
{
    if (o->ngoals > 0) {
        /* the optimum does not depend on the family: one line above the table */
        embz_target_t q;
        embz_err_t err;
        embz_target_init(q);
        embz_err_clear(&err);
        if (o->target_text != NULL) embz_target_parse(q, o->target_text, 0, &err);
        fmpz_t m;
        fmpz_init(m);
        long oq;
        int st = _cli_cmp_optimum_rank(m, &oq, q, o->goal_text[0]);
        if (st == EMBZ_OK) {
            char *mt = _cli_cmp_size_text(m, 1);
            embz_buf_printf(b, "Optimum over all states (docs/optimal.md, exact): %ld qubits/side "
                            "for E<=%s (Schmidt rank %s)\n\n", oq, o->goal_text[0], mt);
            free(mt);
        } else {
            embz_buf_printf(b, "Optimum over all states (docs/optimal.md): n/a for the target %s "
                            "(known for uniform targets only)\n\n", q->label);
        }
        fmpz_clear(m);
        embz_target_clear(q);
    }
    char h2[80], h3[80];
    snprintf(h2, sizeof(h2), "qubits/side E<=%s", o->ngoals > 0 ? o->goal_text[0] : "-");
    snprintf(h3, sizeof(h3), "E at n=%s", o->nsizes > 0 ? o->size_text[0] : "-");
    enum { NC = 6 };
    const char *head[NC] = { "family", "verdict", h2, "extra", h3, "why" };
    long width[NC];
    for (int k = 0; k < NC; k++) width[k] = uwidth(head[k]);
    const char **cells = calloc((size_t) nfam * NC + 1, sizeof(char *));
    for (long ii = 0; ii < nfam; ii++) {
        const cli_compare_row_t *r = rows + (order ? order[ii] : ii);
        const char **c = cells + NC * ii;
        c[0] = r->label;
        c[1] = r->verdict;
        c[2] = o->ngoals > 0 && r->need_q_text[0] ? r->need_q_text[0]
             : o->ngoals > 0 && r->need_n_text[0] ? r->need_n_text[0] : "-";
        c[3] = o->ngoals > 0 && r->extra_q_text[0] ? r->extra_q_text[0] : "-";
        c[4] = o->nsizes > 0 && r->error_text[0] ? r->error_text[0] : "-";
        c[5] = r->why ? r->why : "";
        for (int k = 0; k < NC - 1; k++)
            if (uwidth(c[k]) > width[k]) width[k] = uwidth(c[k]);
    }
    for (int k = 0; k < NC; k++) {
        if (k < NC - 1) pad(b, head[k], width[k] + 2);
        else embz_buf_printf(b, "%s\n", head[k]);
    }
    for (int k = 0; k < NC - 1; k++) {
        for (long m = 0; m < width[k]; m++) embz_buf_printf(b, "-");
        embz_buf_printf(b, "  ");
    }
    embz_buf_printf(b, "---\n");
    for (long ii = 0; ii < nfam; ii++) {
        const char **c = cells + NC * ii;
        for (int k = 0; k < NC - 1; k++) pad(b, c[k], width[k] + 2);
        embz_buf_printf(b, "%s\n", c[NC - 1]);
    }
    free(cells);
}

void cli_compare_data(embz_buf_t *b, const cli_compare_row_t *rows, const long *order,
                      long nfam, const cli_compare_opts_t *o, int json)
{
    const char *target = o->target_text != NULL ? o->target_text : "ebit";
    if (json) {
        embz_buf_printf(b, "{\"target\": ");
        embz_buf_json_string(b, target);
        embz_buf_printf(b, ", \"goals\": [");
        for (long g = 0; g < o->ngoals; g++) {
            embz_buf_printf(b, "%s", g ? ", " : "");
            embz_buf_json_string(b, o->goal_text[g]);
        }
        embz_buf_printf(b, "], \"sizes\": [");
        for (long s = 0; s < o->nsizes; s++) {
            embz_buf_printf(b, "%s", s ? ", " : "");
            embz_buf_json_string(b, o->size_text[s]);
        }
        embz_buf_printf(b, "], \"rows\": [");
    } else {
        embz_buf_printf(b, "family,verdict");
        for (long g = 0; g < o->ngoals; g++)
            embz_buf_printf(b, ",qubits_per_side_eps_%s,size_eps_%s,extra_qubits_eps_%s",
                            o->goal_text[g], o->goal_text[g], o->goal_text[g]);
        for (long s = 0; s < o->nsizes; s++) embz_buf_printf(b, ",error_at_%s", o->size_text[s]);
        embz_buf_printf(b, ",why\n");
    }
    for (long ii = 0; ii < nfam; ii++) {
        const cli_compare_row_t *r = rows + (order ? order[ii] : ii);
        if (json) {
            embz_buf_printf(b, "%s\n  {\"family\": ", ii ? "," : "");
            embz_buf_json_string(b, r->label);
            cli_buf_json_key_string(b, "verdict", r->verdict ? r->verdict : "");
            const char *keys[3] = { "qubits_per_side", "size", "extra_qubits" };
            for (int k = 0; k < 3; k++) {
                embz_buf_printf(b, ", \"%s\": [", keys[k]);
                for (long g = 0; g < o->ngoals; g++) {
                    char *const *t = k == 0 ? r->need_q_text : k == 1 ? r->need_n_text
                                                                      : r->extra_q_text;
                    embz_buf_printf(b, "%s", g ? ", " : "");
                    embz_buf_json_string(b, t && t[g] ? t[g] : "");
                }
                embz_buf_printf(b, "]");
            }
            embz_buf_printf(b, ", \"error\": [");
            for (long s = 0; s < o->nsizes; s++) {
                embz_buf_printf(b, "%s", s ? ", " : "");
                embz_buf_json_string(b, r->error_text && r->error_text[s] ? r->error_text[s] : "");
            }
            embz_buf_printf(b, "]");
            cli_buf_json_key_string(b, "why", r->why ? r->why : "");
            embz_buf_printf(b, "}");
        } else {
            cli_buf_csv_field(b, r->label);
            embz_buf_printf(b, ",");
            cli_buf_csv_field(b, r->verdict ? r->verdict : "");
            for (long g = 0; g < o->ngoals; g++) {
                const char *t[3] = { r->need_q_text[g], r->need_n_text[g],
                                     r->extra_q_text ? r->extra_q_text[g] : NULL };
                for (int k = 0; k < 3; k++) {
                    embz_buf_printf(b, ",");
                    cli_buf_csv_field(b, t[k] ? t[k] : "");
                }
            }
            for (long s = 0; s < o->nsizes; s++) {
                embz_buf_printf(b, ",");
                cli_buf_csv_field(b, r->error_text[s] ? r->error_text[s] : "");
            }
            embz_buf_printf(b, ",");
            cli_buf_csv_field(b, r->why ? r->why : "");
            embz_buf_printf(b, "\n");
        }
    }
    if (json) embz_buf_printf(b, "\n]}\n");
}
