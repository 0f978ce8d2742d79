/* Helpers shared by the files of the family module (not public). */
#ifndef EMBZ_FAMILY_INTERNAL_H
#define EMBZ_FAMILY_INTERNAL_H

#include "embz/family.h"

char *_embz_family_strdup(const char *s);
/* 1 if s is an identifier that may name a parameter (not i, n, a constant or a function). */
int _embz_family_param_name_ok(const char *s);
/* Append a parameter (name copied, value copied). */
void _embz_family_add_param(embz_family_t f, const char *name, const fmpq_t value);
/* Index of the parameter called name, or -1. */
long _embz_family_find_param(const embz_family_t f, const char *name);
/* Replace a malloc'ed string field. */
void _embz_family_set_str(char **field, const char *value);

#endif
