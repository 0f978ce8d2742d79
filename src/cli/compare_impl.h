/* Private to src/cli/compare*.c: the helpers the comparison's words (compare.c) and its
 * report and figures (compare_report.c) share. */
#ifndef EMBZ_CLI_COMPARE_IMPL_H
#define EMBZ_CLI_COMPARE_IMPL_H
#include "cli.h"

char *_cli_cmp_sdup(const char *s);
char *_cli_cmp_size_text(const fmpz_t n, int up);
long _cli_cmp_search_decades(void);
double _cli_cmp_law_value(int law, const embz_fit_struct *f, double x);
const embz_fitset_struct *_cli_cmp_target_fits(const cli_compare_row_t *r);
const embz_sweep_struct *_cli_cmp_target_sweep(const cli_compare_row_t *r);
int _cli_cmp_optimum_rank(fmpz_t m, long *qubits, const embz_target_t q, const char *goal_text);

#endif
