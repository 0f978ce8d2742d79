/* Utilities of the library (src/util): certified decimal printing, growing text buffers and JSON
 * escaping, safe output files (atomic rename), shared by the renderers and the commands. */
#ifndef EMBZ_UTIL_H
#define EMBZ_UTIL_H

#include "embz/flint.h"
#include "embz/err.h"

/* Decimal text of the lower / upper end of the ball, rounded outward, with `digits`
 * significant digits: lo <= x <= hi is guaranteed for the printed strings. malloc'ed. */
char *embz_arb_lo_string(const arb_t x, slong digits);
char *embz_arb_hi_string(const arb_t x, slong digits);
/* Only the digits the ball certifies: the longest decimal prefix shared by both ends, as
 * plain digits such as "0.293102" (no bracket notation for the uncertain digit), or
 * "[lo, hi]" when not even one digit is certain. malloc'ed. */
char *embz_arb_certified_string(const arb_t x, slong max_digits);
/* Midpoint as a double (for JSON "value" fields and plots). */
double embz_arb_mid_d(const arb_t x);

/* Decimal text of an fmpz: all digits when it has at most max_digits digits, else
 * "d.ddddddddde+N" (10 significant digits, truncated; callers that show it to people mark it
 * as shortened). malloc'ed. */
char *embz_fmpz_string(const fmpz_t n, slong max_digits);

/* JSON string escaping (quotes included) appended to a growing buffer. */
typedef struct { char *s; size_t len, alloc; } embz_buf_t;
void embz_buf_init(embz_buf_t *b);
void embz_buf_clear(embz_buf_t *b);
void embz_buf_printf(embz_buf_t *b, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;
void embz_buf_json_string(embz_buf_t *b, const char *text);
/* A malloc'ed string formatted like printf (the caller frees it). */
char *embz_strdup_printf(const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 1, 2)))
#endif
    ;

/* ------------------------------------------------------------------ output files
 *
 * Every file the library writes goes through embz_afile_t. What a name means:
 *
 *  - "-" and "/dev/stdout": standard output. The bytes are streamed to descriptor 1 as they
 *    come (stdout's stdio buffer is flushed first); nothing is created or renamed, and after a
 *    failure whatever was already written stays written.
 *  - any other name is followed through symbolic links to the name they end at, the target
 *    (the links themselves are kept). The bytes go to a temporary file TARGET.part-XXXXXX in
 *    the target's directory, which is flushed to disk and renamed over the target only when
 *    everything succeeded; on any failure it is removed and an old target is left untouched.
 *    A target that exists keeps its permission bits, and its owner and group as far as the
 *    process may set them; a new one gets 0666 less the umask.
 *  - refused (EMBZ_ERR_INPUT, nothing written): a target that exists but is not a regular file
 *    (directory, device, fifo, socket), a regular file with more than one hard link (a rename
 *    would detach it from its other names), and on Linux a link into /proc/PID/fd such as
 *    /dev/stderr or /dev/fd/N (an open descriptor, not a file to replace).
 *
 * Signals: while temporary files exist their names sit in a fixed table. On first use a
 * handler is installed for SIGINT, SIGTERM, SIGHUP, SIGQUIT, SIGPIPE, SIGALRM, SIGXCPU and
 * SIGXFSZ, for each signal whose action is still the default (an ignored signal stays
 * ignored, a handler of the program is left alone). It removes the temporary files, restores
 * the default action and raises the signal again, so the process ends as it would have,
 * whichever thread the signal reached. A program with its own handlers calls
 * embz_afile_remove_pending() from them. SIGKILL cannot be caught: then a .part- file may
 * remain. */

/* 1 when path names standard output ("-" or "/dev/stdout"), else 0. */
int embz_output_is_stdout(const char *path);

/* Checks, writing nothing, that path can be written as described above: EMBZ_OK, or
 * EMBZ_ERR_INPUT for a refused target, or EMBZ_ERR_IO when the target's directory is missing
 * or not writable ("cannot write PATH: DIR: reason") or the links cannot be followed. For a
 * command to call before its work starts; embz_afile_open checks again. */
int embz_output_check(const char *path, embz_err_t *err);

typedef struct {
    int fd;                  /* descriptor written to (1 for standard output), -1 when closed */
    int to_stdout;           /* streaming to standard output: no temporary file */
    int slot;                /* entry in the table of temporary files, -1 when none */
    char *path;              /* the name as given, for messages */
    char *target;            /* the file replaced (links followed); NULL for standard output */
    char *tmp;               /* the temporary file; NULL for standard output */
    size_t written;          /* bytes accepted so far */
    size_t fail_after;       /* for tests: fail with EIO once more than this would be written
                              * (0: never) */
    int failed;              /* a write failed: commit refuses */
    int saved_errno;
} embz_afile_struct;
typedef embz_afile_struct embz_afile_t[1];

/* Opens path for writing (see above). EMBZ_ERR_INPUT for a refused target, EMBZ_ERR_IO when
 * the temporary file cannot be created; f needs no clean-up after a failure. */
int embz_afile_open(embz_afile_t f, const char *path, embz_err_t *err);
/* Returns 0 on success, -1 after a failure (the failure is reported by commit). */
int embz_afile_write(embz_afile_t f, const void *data, size_t len);
/* Finishes the file: flush, then rename over the target. On failure (an earlier write, the
 * flush, a target that changed into something refused meanwhile, the rename) the temporary
 * file is removed and EMBZ_ERR_IO (EMBZ_ERR_INPUT for the changed target) returned with a
 * message naming path and the reason. f is closed in every case. */
int embz_afile_commit(embz_afile_t f, embz_err_t *err);
/* Drops the file: the temporary file is removed, the target untouched. */
void embz_afile_abort(embz_afile_t f);
/* data to path through an embz_afile_t (fail_after as above, 0: never). */
int embz_afile_write_all(const char *path, const char *data, size_t len, size_t fail_after,
                         embz_err_t *err);
/* The same with fail_after 0. */
int embz_write_atomic(const char *path, const char *data, size_t len, embz_err_t *err);

/* Removes every temporary file still in progress. Async-signal-safe (unlink only): for the
 * signal handlers of programs that have their own. */
void embz_afile_remove_pending(void);

#endif
