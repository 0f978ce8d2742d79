/* A user-written weight at n = 10^30, through the installed library:
 *     cc certified_error.c $(pkg-config --cflags --libs embz)
 * prints the certified embezzlement error of one ebit for w(i) = 1/(i log(i + 1)). */
#include <stdio.h>
#include <stdlib.h>
#include <embz.h>

int main(int argc, char **argv)
{
    const char *weight = argc > 1 ? argv[1] : "1/(i*log(i+1))";
    embz_family_t f;
    embz_target_t q;
    embz_error_result_t res;
    embz_err_t err;
    fmpz_t n;
    int code = 0;
    embz_err_clear(&err);
    embz_family_init(f);
    embz_target_init(q);                      /* one ebit */
    embz_error_result_init(res);
    fmpz_init(n);
    fmpz_set_ui(n, 10);
    fmpz_pow_ui(n, n, 30);
    if (embz_family_resolve(f, weight, NULL, 0, 0, &err) != EMBZ_OK
        || embz_error(res, f, n, q, EMBZ_METHOD_AUTO, 128, &err) != EMBZ_OK) {
        char msg[2048];
        embz_err_format(msg, sizeof(msg), &err);
        fprintf(stderr, "certified_error: %s\n", msg);
        code = 1;
    } else {
        char *s = embz_arb_certified_string(res->error, 30);
        printf("E at n = 10^30 for w = %s: %s (certified digits)\n", weight, s);
        free(s);
    }
    fmpz_clear(n);
    embz_error_result_clear(res);
    embz_target_clear(q);
    embz_family_clear(f);
    flint_cleanup();
    return code;
}
