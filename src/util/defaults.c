/* The shared defaults of embz/defaults.h that need code. */
#include "embz.h"

void embz_default_range(fmpz_t from, fmpz_t to)
{
    fmpz_set_ui(from, EMBZ_RANGE_FROM);
    fmpz_ui_pow_ui(to, 10, EMBZ_RANGE_TO_EXP10);
}
