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
/* Status for a family file that fopen/stat refused with errnum: EMBZ_ERR_INPUT for the
 * user's problems (missing, permission, loop, ...), EMBZ_ERR_IO / _NOMEM for the system's. */
int _embz_family_open_status(int errnum);
/* Fill err for a family file path that cannot be used: kind -1 a directory, -2 another
 * non-regular file, 0 a failure with errnum. Returns the status. */
int _embz_family_path_error(embz_err_t *err, const char *path, int errnum, int kind);
/* "bad value 'v' for parameter 'p'" (or "out of range" for a too large exponent), with the
 * texts escaped; returns EMBZ_ERR_INPUT. */
int _embz_family_bad_value(embz_err_t *err, const char *value, const char *name);
/* Replace a malloc'ed string field. */
void _embz_family_set_str(char **field, const char *value);

#endif
