/* The defaults every command and binding shares, in one place (docs/cli.md, "Defaults").
 * A caller that leaves an option at 0 (or NULL) gets these. */
#ifndef EMBZ_DEFAULTS_H
#define EMBZ_DEFAULTS_H

#include "embz/flint.h"

/* Working precision in bits. One rule: a computation that returns one value (embz error,
 * size, convert, optimal; a weight) works at EMBZ_PREC_ONE and prints its certified digits
 * (about 32); one that evaluates many sizes (sweep, classify, scan, plot, report, demo) works
 * at EMBZ_PREC_MANY per size, where its tables print 6 to 10 digits and 64 bits is 1.6 times
 * faster. Every command takes --prec to change it. */
#define EMBZ_PREC_ONE 128
#define EMBZ_PREC_MANY 64

/* The sweep range of every command that sweeps sizes (sweep, classify, scan, plot, report):
 * EMBZ_RANGE_POINTS log-spaced sizes from EMBZ_RANGE_FROM to 10^EMBZ_RANGE_TO_EXP10. */
#define EMBZ_RANGE_FROM 100
#define EMBZ_RANGE_TO_EXP10 120
#define EMBZ_RANGE_POINTS 16

/* Threads: commands default to every processor (embz_threads_available); -j takes 1 to
 * EMBZ_THREADS_MAX. */
#define EMBZ_THREADS_MAX 256

/* from = EMBZ_RANGE_FROM, to = 10^EMBZ_RANGE_TO_EXP10 (both initialised by the caller). */
void embz_default_range(fmpz_t from, fmpz_t to);

#endif
