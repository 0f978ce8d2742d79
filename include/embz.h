/* embz: certified analysis of embezzling families of entangled states. Public API. */
#ifndef EMBZ_H
#define EMBZ_H

#include "embz/flint.h"
#include "embz/err.h"
#include "embz/expr.h"
#include "embz/family.h"
#include "embz/vec.h"
#include "embz/measure.h"
#include "embz/levels.h"
#include "embz/error.h"
#include "embz/fidelity.h"
#include "embz/util.h"
#include "embz/defaults.h"
#include "embz/analysis.h"
#include "embz/render.h"
#include "embz/asym.h"
#include "embz/size.h"
#include "embz/compare.h"
#include "embz/flat.h"
#include "embz/optimal.h"

#define EMBZ_VERSION "0.1.0"

#endif
