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
    char file[sizeof(err->file) * 4];
    if (len == 0) return;
    buf[0] = '\0';
#define EMBZ_APPEND(...) do { \
        int w_ = snprintf(buf + pos, len - pos, __VA_ARGS__); \
        if (w_ < 0) return; \
        pos += (size_t) w_; if (pos >= len) { pos = len - 1; return; } } while (0)
    /* names and source lines come from users: control and stray bytes are shown escaped */
    embz_err_quote(file, sizeof(file), err->file, sizeof(err->file));
    if (err->file[0] != '\0' && err->line > 0)
        EMBZ_APPEND("%s:%ld: ", file, err->line);
    else if (err->file[0] != '\0')
        EMBZ_APPEND("%s: ", file);
    if (err->col > 0 && err->source[0] != '\0')
        EMBZ_APPEND("column %ld: ", err->col);
    EMBZ_APPEND("%s", err->text);
    if (err->col > 0 && err->source[0] != '\0') {
        /* the source line, one character per column, then the caret under byte col: tabs
         * are kept (the caret line repeats them), an escaped byte takes four columns, a
         * UTF-8 character one */
        const char *src = err->source;
        long srclen = (long) strlen(src), width = 0, k = 0;
        EMBZ_APPEND("\n  ");
        while (k < srclen) {
            int l = embz_utf8_len(src + k);
            unsigned char c = (unsigned char) src[k];
            if (c == '\t' || l > 1 || (l == 1 && c >= 0x20 && c != 0x7f)) {
                if (l < 1) l = 1;
                EMBZ_APPEND("%.*s", l, src + k);
            } else {
                EMBZ_APPEND("\\x%02x", c);
                l = 1;
            }
            k += l;
        }
        EMBZ_APPEND("\n  ");
        for (k = 0; k < srclen && k < err->col - 1; ) {
            int l = embz_utf8_len(src + k);
            unsigned char c = (unsigned char) src[k];
            if (c == '\t') { EMBZ_APPEND("\t"); k++; continue; }
            width = (l > 1 || (l == 1 && c >= 0x20 && c != 0x7f)) ? 1 : 4;
            EMBZ_APPEND("%*s", (int) width, "");
            k += l > 1 ? l : 1;
        }
        /* a column past the end (a missing token at the end of the text) */
        for (; k < err->col - 1 && k <= srclen; k++) EMBZ_APPEND(" ");
        EMBZ_APPEND("^");
    }
#undef EMBZ_APPEND
}

int embz_utf8_len(const char *s)
{
    const unsigned char *p = (const unsigned char *) s;
    int len;
    unsigned long cp;
    if (p[0] == 0) return 0;
    if (p[0] < 0x80) return 1;
    if (p[0] < 0xc2) return 0;                  /* continuation byte, or overlong 2-byte */
    if (p[0] < 0xe0) { len = 2; cp = p[0] & 0x1f; }
    else if (p[0] < 0xf0) { len = 3; cp = p[0] & 0x0f; }
    else if (p[0] < 0xf5) { len = 4; cp = p[0] & 0x07; }
    else return 0;
    for (int k = 1; k < len; k++) {
        if ((p[k] & 0xc0) != 0x80) return 0;    /* also stops at the NUL */
        cp = (cp << 6) | (p[k] & 0x3f);
    }
    if ((len == 3 && cp < 0x800) || (len == 4 && cp < 0x10000)) return 0;   /* overlong */
    if (cp >= 0xd800 && cp <= 0xdfff) return 0;                             /* surrogate */
    if (cp > 0x10ffff) return 0;
    return len;
}

char *embz_err_quote(char *dst, size_t cap, const char *text, size_t max)
{
    size_t o = 0, i = 0;
    if (cap == 0) return dst;
    dst[0] = '\0';
    if (text == NULL) return dst;
    while (text[i] != '\0' && i < max) {
        int l = embz_utf8_len(text + i);
        unsigned char c = (unsigned char) text[i];
        int plain = l > 1 || (l == 1 && c >= 0x20 && c != 0x7f);
        size_t need = plain ? (size_t) l : 4;
        if (o + need + 4 > cap) break;           /* room for "..." and the NUL */
        if (plain) {
            memcpy(dst + o, text + i, (size_t) l);
            i += (size_t) l;
        } else {
            snprintf(dst + o, cap - o, "\\x%02x", c);
            i++;
        }
        o += need;
    }
    if (text[i] != '\0' && o + 4 <= cap) {
        memcpy(dst + o, "...", 3);
        o += 3;
    }
    dst[o] = '\0';
    return dst;
}
