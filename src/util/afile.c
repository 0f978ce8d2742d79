/* Output files (the rules are in embz/util.h): standard output for "-", otherwise the file a
 * name leads to after its symbolic links, replaced by renaming a finished temporary file over
 * it; a signal handler removes temporary files that are still in progress.
 *
 * The table of temporary names is the one piece of process-wide mutable state in the library:
 * a signal handler can reach nothing else. It is a fixed array of buffers with one atomic
 * state per entry, so the handler needs no lock and no allocation. */
#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <pthread.h>
#include <signal.h>
#include <stdatomic.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>
#ifdef __linux__
#include <sys/vfs.h>
#endif
#include "embz/util.h"

#ifndef PATH_MAX
#define PATH_MAX 4096
#endif

/* ------------------------------------------------------------------ the table */

#define AF_SLOTS 16
#define AF_NAME_MAX (PATH_MAX + 16)
#define AF_FREE 0
#define AF_CLAIMED 1   /* owned by a writer, name not (or no longer) valid for the handler */
#define AF_LIVE 2      /* name[] holds a temporary file the handler must remove */

_Static_assert(ATOMIC_INT_LOCK_FREE == 2, "the signal handler needs lock-free atomic ints");

static atomic_int af_state[AF_SLOTS];
static char af_name[AF_SLOTS][AF_NAME_MAX];

static int slot_claim(void)
{
    for (int i = 0; i < AF_SLOTS; i++) {
        int expected = AF_FREE;
        if (atomic_compare_exchange_strong(&af_state[i], &expected, AF_CLAIMED))
            return i;
    }
    return -1;
}

/* name must be shorter than AF_NAME_MAX (checked by the caller) */
static void slot_publish(int i, const char *name)
{
    atomic_store(&af_state[i], AF_CLAIMED);
    strcpy(af_name[i], name);
    atomic_store(&af_state[i], AF_LIVE);
}

static void slot_release(int i)
{
    if (i >= 0)
        atomic_store(&af_state[i], AF_FREE);
}

void embz_afile_remove_pending(void)
{
    for (int i = 0; i < AF_SLOTS; i++)
        if (atomic_load(&af_state[i]) == AF_LIVE)
            unlink(af_name[i]);
}

/* ------------------------------------------------------------------ signals */

static const int af_signals[] = { SIGINT, SIGTERM, SIGHUP, SIGQUIT, SIGPIPE, SIGALRM,
                                  SIGXCPU, SIGXFSZ };
#define AF_NSIG ((int) (sizeof(af_signals) / sizeof(af_signals[0])))

static void af_on_signal(int sig)
{
    int saved = errno;
    embz_afile_remove_pending();
    /* the default action again, then the same signal: it is blocked while this handler runs,
     * so it is delivered (and ends the process as it would have) when the handler returns */
    signal(sig, SIG_DFL);
    raise(sig);
    errno = saved;
}

static pthread_once_t af_once = PTHREAD_ONCE_INIT;

static void af_install(void)
{
    struct sigaction sa;
    memset(&sa, 0, sizeof(sa));
    sa.sa_handler = af_on_signal;
    sa.sa_flags = SA_RESTART;
    sigemptyset(&sa.sa_mask);
    for (int k = 0; k < AF_NSIG; k++)
        sigaddset(&sa.sa_mask, af_signals[k]);
    for (int k = 0; k < AF_NSIG; k++) {
        struct sigaction old;
        if (sigaction(af_signals[k], NULL, &old) != 0)
            continue;
        if ((old.sa_flags & SA_SIGINFO) == 0 && old.sa_handler == SIG_DFL)
            sigaction(af_signals[k], &sa, NULL);
    }
}

/* ------------------------------------------------------------------ names */

static char *af_strdup(const char *s)
{
    size_t n = strlen(s) + 1;
    char *c = malloc(n);
    memcpy(c, s, n);
    return c;
}

/* The directory part of path ("." when there is none, "/" for "/x"), malloc'ed. */
static char *af_dirname(const char *path)
{
    const char *slash = strrchr(path, '/');
    if (slash == NULL)
        return af_strdup(".");
    size_t n = slash == path ? 1 : (size_t) (slash - path);
    char *d = malloc(n + 1);
    memcpy(d, path, n);
    d[n] = '\0';
    return d;
}

int embz_output_is_stdout(const char *path)
{
    return strcmp(path, "-") == 0 || strcmp(path, "/dev/stdout") == 0;
}

/* The contents of the symbolic link path (size_hint: its lstat size), malloc'ed; NULL with
 * errno set on failure. */
static char *af_readlink(const char *path, off_t size_hint)
{
    size_t cap = size_hint > 0 ? (size_t) size_hint + 1 : 256;
    for (;;) {
        char *buf = malloc(cap);
        ssize_t r = readlink(path, buf, cap);
        if (r < 0) {
            int e = errno;
            free(buf);
            errno = e;
            return NULL;
        }
        if ((size_t) r < cap) {
            buf[r] = '\0';
            return buf;
        }
        free(buf);
        if (cap > 16 * PATH_MAX) {
            errno = ENAMETOOLONG;
            return NULL;
        }
        cap *= 2;
    }
}

/* A link in /proc/PID/fd (what /dev/stderr and /dev/fd/N lead to): an open descriptor. */
static int af_descriptor_link(const char *link)
{
#ifdef __linux__
    char *dir = af_dirname(link);
    struct statfs fs;
    int r = statfs(dir, &fs) == 0 && fs.f_type == 0x9fa0;   /* procfs */
    free(dir);
    return r;
#else
    (void) link;
    return 0;
#endif
}

#define AF_MAX_LINKS 40

/* Follows path through its symbolic links: *target (malloc'ed) is the name they end at,
 * *exists says whether it exists (then *st is its lstat). A missing name, or a name below
 * something that is not a directory, counts as not existing: creating it then reports why. */
static int af_resolve(char **target, struct stat *st, int *exists, const char *path,
                      embz_err_t *err)
{
    char *cur = af_strdup(path);
    *target = NULL;
    *exists = 0;
    for (int hops = 0;; hops++) {
        if (lstat(cur, st) != 0) {
            int e = errno;
            if (e == ENOENT || e == ENOTDIR) {
                *target = cur;
                return EMBZ_OK;
            }
            free(cur);
            return embz_err_set(err, EMBZ_ERR_IO, "cannot write %s: %s", path, strerror(e));
        }
        if (!S_ISLNK(st->st_mode)) {
            *target = cur;
            *exists = 1;
            return EMBZ_OK;
        }
        if (af_descriptor_link(cur)) {
            free(cur);
            return embz_err_set(err, EMBZ_ERR_INPUT,
                                "cannot write %s: it names an open file descriptor, not a file "
                                "('-' writes to standard output)", path);
        }
        if (hops == AF_MAX_LINKS) {
            free(cur);
            return embz_err_set(err, EMBZ_ERR_IO, "cannot write %s: %s", path, strerror(ELOOP));
        }
        char *link = af_readlink(cur, st->st_size);
        if (link == NULL) {
            int e = errno;
            free(cur);
            return embz_err_set(err, EMBZ_ERR_IO, "cannot write %s: %s", path, strerror(e));
        }
        char *next;
        const char *slash = strrchr(cur, '/');
        if (link[0] == '/' || slash == NULL) {
            next = link;
        } else {
            size_t dl = (size_t) (slash - cur) + 1, ll = strlen(link);
            next = malloc(dl + ll + 1);
            memcpy(next, cur, dl);
            memcpy(next + dl, link, ll + 1);
            free(link);
        }
        free(cur);
        cur = next;
    }
}

static const char *af_kind(mode_t m)
{
    return S_ISDIR(m) ? "a directory" : S_ISCHR(m) ? "a character device"
         : S_ISBLK(m) ? "a block device" : S_ISFIFO(m) ? "a fifo"
         : S_ISSOCK(m) ? "a socket" : "not a regular file";
}

/* EMBZ_OK when the existing target may be replaced, else the refusal. */
static int af_refuse(const char *path, const char *target, const struct stat *st,
                     embz_err_t *err)
{
    int same = strcmp(path, target) == 0;
    if (!S_ISREG(st->st_mode))
        return embz_err_set(err, EMBZ_ERR_INPUT,
                            "cannot write %s%s%s: it is %s, not a regular file ('-' writes to "
                            "standard output)", path, same ? "" : ", a link to ",
                            same ? "" : target, af_kind(st->st_mode));
    if (st->st_nlink > 1)
        return embz_err_set(err, EMBZ_ERR_INPUT,
                            "cannot write %s%s%s: it has %ju hard links, and replacing it "
                            "would detach the other names (remove them or write to another "
                            "name)", path, same ? "" : ", a link to ", same ? "" : target,
                            (uintmax_t) st->st_nlink);
    return EMBZ_OK;
}

int embz_output_check(const char *path, embz_err_t *err)
{
    if (embz_output_is_stdout(path))
        return EMBZ_OK;
    char *target;
    struct stat st;
    int exists;
    int r = af_resolve(&target, &st, &exists, path, err);
    if (r != EMBZ_OK)
        return r;
    if (exists && (r = af_refuse(path, target, &st, err)) != EMBZ_OK) {
        free(target);
        return r;
    }
    /* the directory the file goes to must exist and be writable */
    char *dir = af_dirname(target);
    if (access(dir, W_OK | X_OK) != 0) {
        int e = errno;
        r = embz_err_set(err, EMBZ_ERR_IO, "cannot write %s: %s: %s", path, dir, strerror(e));
    }
    free(dir);
    free(target);
    return r;
}

/* ------------------------------------------------------------------ the writer */

static void af_free(embz_afile_t f)
{
    slot_release(f->slot);
    f->slot = -1;
    free(f->path);
    free(f->target);
    free(f->tmp);
    f->path = f->target = f->tmp = NULL;
    f->fd = -1;
}

static atomic_uint af_counter;

/* TARGET.part-XXXXXX with six random letters and digits (tmp has room for them). */
static void af_temp_name(char *tmp, const char *target)
{
    static const char abc[] = "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789";
    struct timespec ts;
    clock_gettime(CLOCK_REALTIME, &ts);
    uint64_t x = (uint64_t) ts.tv_nsec * 0x9E3779B97F4A7C15u ^ (uint64_t) ts.tv_sec
               ^ ((uint64_t) getpid() << 32) ^ ((uint64_t) atomic_fetch_add(&af_counter, 1) << 48)
               ^ (uint64_t) (uintptr_t) tmp;
    size_t n = strlen(target);
    memcpy(tmp, target, n);
    memcpy(tmp + n, ".part-", 6);
    for (int k = 0; k < 6; k++) {
        x ^= x << 13;
        x ^= x >> 7;
        x ^= x << 17;
        tmp[n + 6 + k] = abc[x % 62];
    }
    tmp[n + 12] = '\0';
}

/* The replaced file's owner, group and permission bits on the new one, as far as allowed;
 * set-user/group-ID bits only where the owner / group could be kept. */
static int af_keep_attributes(int fd, const struct stat *old)
{
    /* owner and group; else the group alone; else the process's (what fstat then shows) */
    if (fchown(fd, old->st_uid, old->st_gid) != 0)
        (void) !fchown(fd, (uid_t) -1, old->st_gid);
    struct stat now;
    mode_t mode = old->st_mode & 07777;
    if (fstat(fd, &now) != 0)
        return -1;
    if (now.st_uid != old->st_uid)
        mode &= ~(mode_t) S_ISUID;
    if (now.st_gid != old->st_gid)
        mode &= ~(mode_t) S_ISGID;
    return fchmod(fd, mode);
}

int embz_afile_open(embz_afile_t f, const char *path, embz_err_t *err)
{
    memset(f, 0, sizeof(*f));
    f->fd = -1;
    f->slot = -1;
    f->path = af_strdup(path);
    if (embz_output_is_stdout(path)) {
        fflush(stdout);   /* what the program printed through stdio comes first */
        f->to_stdout = 1;
        f->fd = STDOUT_FILENO;
        return EMBZ_OK;
    }
    struct stat st;
    int exists, r;
    if ((r = af_resolve(&f->target, &st, &exists, path, err)) != EMBZ_OK
        || (exists && (r = af_refuse(path, f->target, &st, err)) != EMBZ_OK)) {
        af_free(f);
        return r;
    }
    size_t n = strlen(f->target) + 13;
    if (n > AF_NAME_MAX) {
        af_free(f);
        return embz_err_set(err, EMBZ_ERR_IO, "cannot write %s: %s", path,
                            strerror(ENAMETOOLONG));
    }
    pthread_once(&af_once, af_install);
    if ((f->slot = slot_claim()) < 0) {
        af_free(f);
        return embz_err_set(err, EMBZ_ERR_IO, "cannot write %s: more than %d files open at "
                            "once", path, AF_SLOTS);
    }
    f->tmp = malloc(n);
    int e = EEXIST;
    for (int tries = 0; tries < 100 && f->fd < 0 && e == EEXIST; tries++) {
        af_temp_name(f->tmp, f->target);
        /* published before it exists: a signal right after the creation still finds it */
        slot_publish(f->slot, f->tmp);
        f->fd = open(f->tmp, O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, exists ? 0600 : 0666);
        e = errno;
        if (f->fd < 0)
            atomic_store(&af_state[f->slot], AF_CLAIMED);
    }
    if (f->fd < 0) {
        af_free(f);
        return embz_err_set(err, EMBZ_ERR_IO, "cannot write %s: %s", path, strerror(e));
    }
    if (exists && af_keep_attributes(f->fd, &st) != 0) {
        e = errno;
        embz_afile_abort(f);
        return embz_err_set(err, EMBZ_ERR_IO, "cannot write %s: cannot keep its permissions: "
                            "%s", path, strerror(e));
    }
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
    if (!f->to_stdout) {
        if (f->fd >= 0)
            close(f->fd);
        if (f->tmp != NULL && f->slot >= 0 && atomic_load(&af_state[f->slot]) == AF_LIVE)
            unlink(f->tmp);   /* before the entry is released: no window without either */
    }
    af_free(f);
}

/* Best effort: the rename reaches the disk with the directory. */
static void af_sync_dir(const char *target)
{
    char *dir = af_dirname(target);
    int fd = open(dir, O_RDONLY | O_CLOEXEC);
    if (fd >= 0) {
        fsync(fd);
        close(fd);
    }
    free(dir);
}

int embz_afile_commit(embz_afile_t f, embz_err_t *err)
{
    int e, r = EMBZ_OK;
    if (f->to_stdout) {
        if (f->failed)
            r = embz_err_set(err, EMBZ_ERR_IO, "cannot write standard output: %s",
                             strerror(f->saved_errno));
        af_free(f);
        return r;
    }
    if (f->failed) {
        e = f->saved_errno;
        goto io_error;
    }
    if (fsync(f->fd) != 0) {
        e = errno;
        goto io_error;
    }
    int fd = f->fd;
    f->fd = -1;
    if (close(fd) != 0) {
        e = errno;
        goto io_error;
    }
    /* the target may have changed since open: what was refused then is refused now */
    struct stat st;
    if (lstat(f->target, &st) == 0) {
        if (S_ISLNK(st.st_mode))
            r = embz_err_set(err, EMBZ_ERR_INPUT, "cannot write %s: %s became a symbolic link "
                             "while the file was written", f->path, f->target);
        else
            r = af_refuse(f->path, f->target, &st, err);
        if (r != EMBZ_OK) {
            embz_afile_abort(f);
            return r;
        }
    }
    if (rename(f->tmp, f->target) != 0) {
        e = errno;
        r = embz_err_set(err, EMBZ_ERR_IO, "cannot rename into %s: %s", f->path, strerror(e));
        embz_afile_abort(f);
        return r;
    }
    af_sync_dir(f->target);
    af_free(f);
    return EMBZ_OK;

io_error:
    r = embz_err_set(err, EMBZ_ERR_IO, "cannot write %s: %s", f->path, strerror(e));
    embz_afile_abort(f);
    return r;
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

int embz_write_atomic(const char *path, const char *data, size_t len, embz_err_t *err)
{
    return embz_afile_write_all(path, data, len, 0, err);
}
