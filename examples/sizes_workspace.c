/* The evaluator through the installed library: one family, several sizes, one workspace
 * (the analytic engine certifies the tail once, for the largest size, and reuses it).
 *     cc sizes_workspace.c $(pkg-config --cflags --libs embz)
 *     ./a.out 'WEIGHT' TARGET N1 N2 ...     (defaults: 1/i, ebits:2, 10^10 10^30 10^100)
 * prints for each size the certified lower and upper ends of E_n. */
#include <stdio.h>
#include <stdlib.h>
#include <embz.h>

int main(int argc, char **argv)
{
    static const char *const dflt[3] = { "10^100", "10^30", "10^10" };
    const char *weight = argc > 1 ? argv[1] : "1/i";
    const char *target = argc > 2 ? argv[2] : "ebits:2";
    const char *const *sizes = argc > 3 ? (const char *const *) argv + 3 : dflt;
    int nsizes = argc > 3 ? argc - 3 : 3;
    embz_family_t f;
    embz_target_t q;
    embz_eval_opts_t o;
    embz_eval_t ev;
    embz_eval_work_t w;
    embz_err_t err;
    fmpz_t n, nmax;
    int code = 0;
    embz_err_clear(&err);
    embz_family_init(f);
    embz_target_init(q);
    fmpz_init(n);
    fmpz_init(nmax);
    if (embz_family_resolve(f, weight, NULL, 0, 0, &err) != EMBZ_OK
        || embz_target_parse(q, target, 0, &err) != EMBZ_OK)
        goto fail;
    embz_eval_opts_init(o);                /* the default policy */
    embz_eval_init(ev, f, o, 128);
    embz_eval_work_init(w);
    /* the workspace is prepared once for the largest size */
    for (int j = 0; j < nsizes; j++) {
        if (embz_size_parse(n, sizes[j], &err) != EMBZ_OK) goto fail_eval;
        if (fmpz_cmp(n, nmax) > 0) fmpz_set(nmax, n);
    }
    if (embz_eval_prepare(ev, w, nmax, &err) != EMBZ_OK) goto fail_eval;
    for (int j = 0; j < nsizes; j++) {
        embz_error_result_t res;
        embz_error_result_init(res);
        embz_size_parse(n, sizes[j], &err);
        int st = embz_eval_error(res, ev, w, n, q, &err);
        if (st == EMBZ_OK) {
            char *lo = embz_arb_lo_string(res->error, 25), *hi = embz_arb_hi_string(res->error, 25);
            printf("%s %s %s %s\n", sizes[j], lo, hi,
                   res->method == EMBZ_METHOD_EXPLICIT ? "explicit" : "analytic");
            free(lo);
            free(hi);
        }
        embz_error_result_clear(res);
        if (st != EMBZ_OK) goto fail_eval;
    }
    embz_eval_work_clear(w);
    embz_eval_clear(ev);
    goto done;
fail_eval:
    embz_eval_work_clear(w);
    embz_eval_clear(ev);
fail:
    {
        char msg[2048];
        embz_err_format(msg, sizeof(msg), &err);
        fprintf(stderr, "sizes_workspace: %s\n", msg);
        code = 1;
    }
done:
    fmpz_clear(n);
    fmpz_clear(nmax);
    embz_target_clear(q);
    embz_family_clear(f);
    flint_cleanup();
    return code;
}
