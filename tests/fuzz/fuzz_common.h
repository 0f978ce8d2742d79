/* Shared pieces of the fuzz targets (tests/fuzz/fuzz_NAME.c). Each target defines
 * LLVMFuzzerTestOneInput; it is linked either with libFuzzer (meson -Dfuzz=true, clang) or
 * with replay.c, which feeds it the files of a corpus directory (meson test, suite
 * fuzz-replay). A broken invariant aborts, so both drivers report it as a failure. */
#ifndef EMBZ_FUZZ_COMMON_H
#define EMBZ_FUZZ_COMMON_H

#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

/* Abort with the failed condition and its line: libFuzzer saves the input as a crash. The
 * message goes to file descriptor 2 directly, since a target may point stderr elsewhere. */
#define FUZZ_CHECK(cond) \
    do { \
        if (!(cond)) { \
            dprintf(2, "%s:%d: check failed: %s\n", __FILE__, __LINE__, #cond); \
            abort(); \
        } \
    } while (0)

/* The input as a NUL-terminated string (malloc'ed; an embedded NUL ends the text early, as
 * it would for any C string handed to the library). */
static inline char *fuzz_text(const uint8_t *data, size_t size)
{
    char *s = malloc(size + 1);
    if (s == NULL) abort();
    if (size > 0) memcpy(s, data, size);
    s[size] = '\0';
    return s;
}

/* The message of an error must be a terminated string inside its buffer, and formatting it
 * must stay inside the output buffer. */
#define FUZZ_CHECK_ERR(errp) \
    do { \
        char fuzz_msg_[4096]; \
        FUZZ_CHECK(memchr((errp)->text, '\0', sizeof((errp)->text)) != NULL); \
        FUZZ_CHECK(memchr((errp)->source, '\0', sizeof((errp)->source)) != NULL); \
        FUZZ_CHECK(memchr((errp)->file, '\0', sizeof((errp)->file)) != NULL); \
        embz_err_format(fuzz_msg_, sizeof(fuzz_msg_), (errp)); \
        FUZZ_CHECK(memchr(fuzz_msg_, '\0', sizeof(fuzz_msg_)) != NULL); \
    } while (0)

#endif
