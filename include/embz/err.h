#ifndef EMBZ_ERR_H
#define EMBZ_ERR_H

/* Status codes returned by library functions. The library never prints and never exits. */
enum {
    EMBZ_OK = 0,
    EMBZ_ERR_INPUT = 2,      /* bad user input: expression, file, vector, option value */
    EMBZ_ERR_DOMAIN = 3,     /* weight negative / NaN / infinite / undefined at some index */
    EMBZ_ERR_NONSMOOTH = 4,  /* an operation (floor, abs, min, max) could not be certified smooth */
    EMBZ_ERR_PREC = 5,       /* precision insufficient to decide something; retry higher */
    EMBZ_ERR_LIMIT = 6,      /* a size or resource limit was hit */
    EMBZ_ERR_UNSUPPORTED = 7,/* the requested method cannot handle this input */
    EMBZ_ERR_IO = 8,
    EMBZ_ERR_NOMEM = 9
};

/* A message for people. col is the 1-based column in the expression text (0 if none),
 * line the 1-based line in a file (0 if none), file the file name (empty if none).
 * text holds the message alone; embz_err_format builds "file:line: msg" plus the caret
 * display when the offending source line is known. */
typedef struct {
    int code;
    long col;
    long line;
    char file[256];
    char source[1024];   /* the offending line of text (for the caret display), or "" */
    char text[512];
} embz_err_t;

void embz_err_clear(embz_err_t *err);
/* printf-style; sets code and text; keeps col/line/file/source as they are. Returns code. */
int embz_err_set(embz_err_t *err, int code, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;
/* Writes a complete human-readable message (with "file:line:" prefix and a caret line under
 * source when col > 0) into buf of size len. */
void embz_err_format(char *buf, size_t len, const embz_err_t *err);

/* Length in bytes (1 to 4) of the well-formed UTF-8 character that starts at s, or 0 when
 * the bytes there are not one: a NUL, a stray continuation byte, a truncated or overlong
 * sequence, a UTF-16 surrogate or a code point above U+10FFFF. */
int embz_utf8_len(const char *s);

/* A copy of untrusted text that is safe to show in a message: bytes below 0x20, 0x7f and
 * bytes that are not part of well-formed UTF-8 are written as \xHH; well-formed non-ASCII
 * characters are kept. At most max bytes of text are shown, then "..." marks the cut. dst
 * (capacity cap >= 4) always ends with a NUL, cut further when needed. Returns dst. */
char *embz_err_quote(char *dst, size_t cap, const char *text, size_t max);

#endif
