/* Sentences for how a value was computed: embz_error_how_struct (embz/error.h) and
 * embz_fidelity_how_struct (embz/fidelity.h). */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "embz/render.h"

static char *run_text(const embz_how_run_struct *h)
{
    const char *dir = h->tail_dir > 0 ? "non-increasing" : "non-decreasing";
    if (h->kind == EMBZ_HOW_THRESHOLD && h->d > 0)
        return embz_strdup_printf(
            "analytic: %ld explicit terms + Euler-Maclaurin tail (order %ld, weights %s "
            "beyond i = %ld), threshold form max_t Phi(t) - Phi(%lu t) by branch and "
            "bound over ln t: %ld bounds, %ld series, %ld integrals, arb %ld bits%s",
            (long) h->terms, (long) h->tail_order, dir, (long) h->terms, h->d, (long) h->bounds,
            (long) h->series, (long) h->integrals, (long) h->prec,
            h->budget_reached ? "; search budget reached, upper end loose" : "");
    return embz_strdup_printf(
        "analytic: %ld explicit terms + Euler-Maclaurin tail (order %ld, weights %s "
        "beyond i = %ld), branch and bound: %ld bounds, %ld series, %ld integrals, "
        "arb %ld bits%s",
        (long) h->terms, (long) h->tail_order, dir, (long) h->terms, (long) h->bounds,
        (long) h->series, (long) h->integrals, (long) h->prec,
        h->budget_reached ? "; search budget reached" : "");
}

static char *main_text(const embz_error_how_struct *h)
{
    char *up, *s;
    switch (h->kind) {
    case EMBZ_HOW_EXPLICIT:
        return embz_strdup_printf(
            "explicit, %s, arb %ld bits, exact fixed-point sums in units of 2^%ld",
            h->order > 0 ? "streaming (weights non-increasing)"
            : h->order < 0 ? "streaming (weights non-decreasing)"
            : h->ball_estimates ? "stored and sorted (weights outside double range)"
            : "stored and sorted (weights not monotone)",
            (long) h->prec, (long) h->unit_exp);
    case EMBZ_HOW_KYFAN:
    case EMBZ_HOW_THRESHOLD:
        return run_text(&h->run);
    case EMBZ_HOW_GENERAL:
        up = run_text(&h->upper);
        s = embz_strdup_printf(
            "analytic, general target: max_t Phi(t) - sum_j q_j Phi(t/q_j) by branch and bound "
            "over ln t%s, within E(uniform:%lu) <= E(q) <= E(uniform:%lu) (majorization); %s",
            h->run.budget_reached ? " (budget reached, upper end loose)" : "", h->bracket_lo,
            h->bracket_hi, up);
        free(up);
        return s;
    case EMBZ_HOW_BRACKET:
        up = run_text(&h->upper);
        s = embz_strdup_printf(
            "analytic bounds for a general target: E(uniform:%lu) <= E(q) <= E(uniform:%lu) by "
            "majorization (threshold search: %s); %s",
            h->bracket_lo, h->bracket_hi, h->reason, up);
        free(up);
        return s;
    case EMBZ_HOW_LEVELS:
        return embz_strdup_printf(
            "levels: %ld levels, dimension of %ld bits, Ky Fan norms bounded from the ends of "
            "the level values, arb %ld bits", (long) h->levels, (long) h->dim_bits,
            (long) h->prec);
    case EMBZ_HOW_BLOCKS:
        return embz_strdup_printf(
            "blocks: the weight is constant on %ld blocks of indices up to n (every i inside "
            "floor or ceil; each block proven constant), then level by level, arb %ld bits",
            (long) h->levels, (long) h->prec);
    default:
        return embz_strdup_printf("%s", "");
    }
}

char *embz_error_how_text(const embz_error_how_struct *h)
{
    char *s = main_text(h);
    if (h->fallback == EMBZ_HOW_FALLBACK_NONE) return s;
    char *t = embz_strdup_printf("%s (analytic engine %s: %s)", s,
                                 h->fallback == EMBZ_HOW_DECLINED ? "declined" : "failed",
                                 h->reason);
    free(s);
    return t;
}

char *embz_fidelity_how_text(const embz_fidelity_how_struct *h)
{
    if (h->analytic == 2 && !h->bounds_only) {
        char neg[96] = "";
        if (h->allowance_log2 > -1e299)
            snprintf(neg, sizeof(neg), ", negligible weights dropped (allowance 2^%.0f)",
                     h->allowance_log2);
        return embz_strdup_printf(
            "analytic: exact hull of the first %ld sorted positions (%ld pieces%s), beyond "
            "them %ss = p below (%ld residue classes as Euler-Maclaurin tails) and Lagrange "
            "multipliers above (%s)%s, arb %ld bits", (long) h->terms, (long) h->pieces,
            h->splits > 0 ? ", some split to certify them" : "",
            h->pairs ? "pieces across the block boundaries (the weight proven log-convex) "
                       "and " : "", (long) h->residues,
            h->block_dual ? "one per block of d positions" : "constant from the last vertex",
            neg, (long) h->prec);
    }
    if (h->analytic == 1) {
        char neg[96] = "";
        if (h->allowance_log2 > -1e299)
            snprintf(neg, sizeof(neg), ", negligible weights dropped (allowance 2^%.0f)",
                     h->allowance_log2);
        return embz_strdup_printf(
            "analytic: %ld head weights placed, %ld sorted positions summed term by term, "
            "%ld residue class%s as Euler-Maclaurin tails of sqrt(p_j p_ceil(j/d)) (order up "
            "to %ld%s)%s, arb %ld bits", (long) h->head, (long) h->terms, (long) h->residues,
            h->residues == 1 ? "" : "es", (long) h->tail_order,
            h->tail_neglect ? ", negligible ends bounded" : "", neg, (long) h->prec);
    }
    if (!h->bounds_only)
        return embz_strdup_printf(
            "explicit: weights rounded to %ld-bit integers, exact lower convex hull "
            "(%ld pieces), rounding allowance 2^%.0f, arb %ld bits",
            (long) h->int_bits, (long) h->pieces, h->allowance_log2, (long) h->prec);
    char *k = embz_error_how_text(&h->K);
    char *s = embz_strdup_printf("bounds from K <= P <= sqrt(K(2-K)); K by %s", k);
    free(k);
    return s;
}
