#include <stdarg.h>
#include <string.h>
#include "embz/err.h"
#include <stdio.h>

void embz_err_clear(embz_err_t *err)
{
    if (err == NULL) return;
    memset(err, 0, sizeof(*err));
}

int embz_err_set(embz_err_t *err, int code, const char *fmt, ...)
{
    if (err == NULL) return code;
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(err->text, sizeof(err->text), fmt, ap);
    va_end(ap);
    err->code = code;
    return code;
}

void embz_err_format(char *buf, size_t len, const embz_err_t *err)
{
    size_t pos = 0;
    if (len == 0) return;
    buf[0] = '\0';
#define EMBZ_APPEND(...) do { \
        int w_ = snprintf(buf + pos, len - pos, __VA_ARGS__); \
        if (w_ < 0) return; \
        pos += (size_t) w_; if (pos >= len) { pos = len - 1; return; } } while (0)
    if (err->file[0] != '\0' && err->line > 0)
        EMBZ_APPEND("%s:%ld: ", err->file, err->line);
    else if (err->file[0] != '\0')
        EMBZ_APPEND("%s: ", err->file);
    if (err->col > 0 && err->source[0] != '\0')
        EMBZ_APPEND("column %ld: ", err->col);
    EMBZ_APPEND("%s", err->text);
    if (err->col > 0 && err->source[0] != '\0') {
        EMBZ_APPEND("\n  %s\n  ", err->source);
        long srclen = (long) strlen(err->source);
        for (long c = 1; c < err->col && c <= srclen + 1; c++) {
            /* keep tabs so the caret lines up under the same character */
            EMBZ_APPEND("%c", (c <= srclen && err->source[c - 1] == '\t') ? '\t' : ' ');
        }
        EMBZ_APPEND("^");
    }
#undef EMBZ_APPEND
}
