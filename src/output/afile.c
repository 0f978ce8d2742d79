/* Atomic file output: a temporary file next to the destination, renamed into place on commit.
 * Termination signals are held back while the temporary file exists, so that an interrupted
 * run cannot leave it behind (they are delivered after commit or abort). */
#include <errno.h>
#include <fcntl.h>
#include <pthread.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include "embz/render.h"

_Static_assert(sizeof(sigset_t) <= sizeof(((embz_afile_struct *) 0)->mask),
               "sigset_t does not fit the saved mask");

static void hold_signals(embz_afile_t f)
{
    sigset_t block, old;
    sigemptyset(&block);
    sigaddset(&block, SIGINT);
    sigaddset(&block, SIGTERM);
    sigaddset(&block, SIGHUP);
    sigaddset(&block, SIGQUIT);
    f->have_mask = pthread_sigmask(SIG_BLOCK, &block, &old) == 0;
    if (f->have_mask)
        memcpy(f->mask, &old, sizeof(old));
}

static void release_signals(embz_afile_t f)
{
    if (f->have_mask) {
        sigset_t old;
        memcpy(&old, f->mask, sizeof(old));
        pthread_sigmask(SIG_SETMASK, &old, NULL);
        f->have_mask = 0;
    }
}

static void afile_free(embz_afile_t f)
{
    free(f->path);
    free(f->tmp);
    f->path = f->tmp = NULL;
    f->fd = -1;
    release_signals(f);
}

int embz_afile_open(embz_afile_t f, const char *path, embz_err_t *err)
{
    memset(f, 0, sizeof(*f));
    f->fd = -1;
    size_t n = strlen(path);
    f->path = malloc(n + 1);
    memcpy(f->path, path, n + 1);
    f->tmp = malloc(n + 32);
    snprintf(f->tmp, n + 32, "%s.part-XXXXXX", path);
    hold_signals(f);
    f->fd = mkstemp(f->tmp);
    if (f->fd < 0) {
        int e = errno;
        afile_free(f);
        return embz_err_set(err, EMBZ_ERR_IO, "cannot write %s: %s", path, strerror(e));
    }
    /* mkstemp creates mode 0600; documents are meant to be shared: rw-r--r-- (umask is not
     * consulted: reading it means changing it, which other threads would see) */
    fchmod(f->fd, 0644);
    return EMBZ_OK;
}

int embz_afile_write(embz_afile_t f, const void *data, size_t len)
{
    const char *p = data;
    if (f->failed || f->fd < 0)
        return -1;
    if (f->fail_after > 0 && f->written + len > f->fail_after) {
        f->failed = 1;
        f->saved_errno = EIO;
        return -1;
    }
    size_t off = 0;
    while (off < len) {
        ssize_t w = write(f->fd, p + off, len - off);
        if (w < 0) {
            if (errno == EINTR)
                continue;
            f->failed = 1;
            f->saved_errno = errno;
            return -1;
        }
        off += (size_t) w;
    }
    f->written += len;
    return 0;
}

void embz_afile_abort(embz_afile_t f)
{
    if (f->fd >= 0)
        close(f->fd);
    if (f->tmp != NULL)
        unlink(f->tmp);
    afile_free(f);
}

int embz_afile_commit(embz_afile_t f, embz_err_t *err)
{
    if (f->failed) {
        int e = f->saved_errno;
        embz_err_set(err, EMBZ_ERR_IO, "cannot write %s: %s", f->path, strerror(e));
        embz_afile_abort(f);
        return EMBZ_ERR_IO;
    }
    if (fsync(f->fd) != 0 || close(f->fd) != 0) {
        int e = errno;
        f->fd = -1;
        embz_err_set(err, EMBZ_ERR_IO, "cannot write %s: %s", f->path, strerror(e));
        embz_afile_abort(f);
        return EMBZ_ERR_IO;
    }
    f->fd = -1;
    if (rename(f->tmp, f->path) != 0) {
        int e = errno;
        embz_err_set(err, EMBZ_ERR_IO, "cannot rename into %s: %s", f->path, strerror(e));
        embz_afile_abort(f);
        return EMBZ_ERR_IO;
    }
    afile_free(f);
    return EMBZ_OK;
}

int embz_afile_write_all(const char *path, const char *data, size_t len, size_t fail_after,
                         embz_err_t *err)
{
    embz_afile_t f;
    int st = embz_afile_open(f, path, err);
    if (st != EMBZ_OK)
        return st;
    f->fail_after = fail_after;
    embz_afile_write(f, data, len);
    return embz_afile_commit(f, err);
}
