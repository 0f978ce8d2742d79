/* Certified partial sums of a weight function at astronomically large sizes:
 * explicit head + Euler–Maclaurin tail with a rigorous remainder bound. */
#ifndef EMBZ_SUM_H
#define EMBZ_SUM_H

#include "embz/family.h"

#endif
