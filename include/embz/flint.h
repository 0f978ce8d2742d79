/* The one place that knows where FLINT and arb live.
 * FLINT 2.9 (Debian 12): arb is libflint-arb with top-level headers (arb.h, acb.h, ...).
 * FLINT 3: arb is merged into FLINT (<flint/arb.h>). The header itself finds out which one
 * is installed (so that it needs no generated file and works the same in the source tree and
 * in an installed prefix); EMBZ_FLINT3 may also be defined by hand. */
#ifndef EMBZ_FLINT_H
#define EMBZ_FLINT_H

#include <stdio.h>
#include <gmp.h>
#include <mpfr.h>
#if !defined(EMBZ_FLINT3) && defined(__has_include)
#if __has_include(<flint/arb.h>)
#define EMBZ_FLINT3 1
#endif
#endif

#ifdef EMBZ_FLINT3
#include <flint/flint.h>
#include <flint/fmpz.h>
#include <flint/fmpz_vec.h>
#include <flint/fmpq.h>
#include <flint/arith.h>
#include <flint/arb.h>
#include <flint/acb.h>
#include <flint/arb_poly.h>
#include <flint/acb_calc.h>
#include <flint/arb_hypgeom.h>
#include <flint/acb_dirichlet.h>
#include <flint/acb_mat.h>
#else
#include <flint/flint.h>
#include <flint/fmpz.h>
#include <flint/fmpz_vec.h>
#include <flint/fmpq.h>
#include <flint/arith.h>
#include <arb.h>
#include <acb.h>
#include <arb_poly.h>
#include <acb_calc.h>
#include <arb_hypgeom.h>
#include <acb_dirichlet.h>
#include <acb_mat.h>
#endif

#endif
