/* Tests of src/util: messages with a caret, certified decimal printing, JSON escaping,
 * output files (atomic replacement, links, modes, refusals, standard output, signals). The decimal checks compare against MPFR's correctly rounded parsing
 * (mpfr_set_str), an independent reference for the value of a printed string. */
#include <check.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <dirent.h>
#include <fcntl.h>
#include <pthread.h>
#include <signal.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include "embz.h"
#include "testutil.h"

/* the exact value of a decimal string as a ball: [round down, round up] of mpfr parsing */
static void parse_ball(arb_t x, const char *s, slong prec)
{
    mpfr_t lo, hi;
    mpfr_init2(lo, prec);
    mpfr_init2(hi, prec);
    ck_assert_msg(mpfr_set_str(lo, s, 10, MPFR_RNDD) == 0, "not a number: %s", s);
    mpfr_set_str(hi, s, 10, MPFR_RNDU);
    arf_t a, b;
    arf_init(a); arf_init(b);
    arf_set_mpfr(a, lo);
    arf_set_mpfr(b, hi);
    arb_set_interval_arf(x, a, b, prec);
    arf_clear(a); arf_clear(b);
    mpfr_clear(lo);
    mpfr_clear(hi);
}

START_TEST(test_bounds_enclose)
{
    /* lo and hi strings enclose the ball, over many random balls */
    flint_rand_t st;
    flint_randinit(st);
    arb_t x, lo, hi;
    arb_init(x); arb_init(lo); arb_init(hi);
    for (int k = 0; k < 2000; k++) {
        arb_randtest(x, st, 200, 20);
        if (!arb_is_finite(x)) continue;
        slong digits = 1 + n_randint(st, 40);
        char *a = embz_arb_lo_string(x, digits), *b = embz_arb_hi_string(x, digits);
        parse_ball(lo, a, 400);
        parse_ball(hi, b, 400);
        arf_t xl, xh, ll, hh;
        arf_init(xl); arf_init(xh); arf_init(ll); arf_init(hh);
        arb_get_lbound_arf(xl, x, 400);
        arb_get_ubound_arf(xh, x, 400);
        arb_get_ubound_arf(ll, lo, 400);   /* the printed lower end, at its largest */
        arb_get_lbound_arf(hh, hi, 400);   /* the printed upper end, at its smallest */
        ck_assert_msg(arf_cmp(ll, xl) <= 0, "lower string %s above the ball", a);
        ck_assert_msg(arf_cmp(hh, xh) >= 0, "upper string %s below the ball", b);
        arf_clear(xl); arf_clear(xh); arf_clear(ll); arf_clear(hh);
        free(a); free(b);
    }
    arb_clear(x); arb_clear(lo); arb_clear(hi);
    flint_randclear(st);
}
END_TEST

START_TEST(test_certified_digits)
{
    /* every point of the ball rounds to the printed digits: both ends, rounded to that many
     * significant digits, give the same string; and a ball around 1/3 of radius 1e-10
     * prints about ten threes */
    arb_t x;
    arb_init(x);
    arb_set_ui(x, 1);
    arb_div_ui(x, x, 3, 128);
    mag_set_d(arb_radref(x), 1e-10);
    char *s = embz_arb_certified_string(x, 30);
    ck_assert_msg(strncmp(s, "0.333333333", 11) == 0 && strlen(s) <= 13, "got %s", s);
    free(s);
    /* an exact ball prints exactly */
    arb_set_d(x, 0.375);
    s = embz_arb_certified_string(x, 30);
    ck_assert_str_eq(s, "0.375");
    free(s);
    /* a ball too wide for one digit prints as an interval */
    arb_set_d(x, 0.5);
    mag_set_d(arb_radref(x), 0.45);
    s = embz_arb_certified_string(x, 30);
    ck_assert_msg(s[0] == '[', "got %s", s);
    free(s);
    arb_clear(x);
}
END_TEST

START_TEST(test_fmpz_string)
{
    fmpz_t n;
    fmpz_init(n);
    fmpz_set_ui(n, 123456);
    char *s = embz_fmpz_string(n, 10);
    ck_assert_str_eq(s, "123456");
    free(s);
    fmpz_set_ui(n, 10);
    fmpz_pow_ui(n, n, 100);
    fmpz_add_ui(n, n, 7);
    s = embz_fmpz_string(n, 20);
    ck_assert_str_eq(s, "1.000000000e+100");
    free(s);
    fmpz_clear(n);
}
END_TEST

START_TEST(test_json_escape)
{
    embz_buf_t b;
    embz_buf_init(&b);
    embz_buf_json_string(&b, "a\"b\\c\n<script>&\x01");
    ck_assert_str_eq(b.s, "\"a\\\"b\\\\c\\n\\u003cscript\\u003e\\u0026\\u0001\"");
    embz_buf_clear(&b);
}
END_TEST

/* Text that is not UTF-8 still gives valid JSON: each stray byte becomes the character of
 * its Latin-1 reading; well-formed UTF-8 (2, 3 and 4 bytes) is kept as it is. */
START_TEST(test_json_utf8)
{
    embz_buf_t b;
    embz_buf_init(&b);
    embz_buf_json_string(&b, "caf\xe9 \xc3\xa9 \xe2\x82\xac \xf0\x9f\x98\x80 \xc3 \xed\xa0\x80");
    ck_assert_str_eq(b.s, "\"caf\\u00e9 \xc3\xa9 \xe2\x82\xac \xf0\x9f\x98\x80 \\u00c3 "
                          "\\u00ed\\u00a0\\u0080\"");
    embz_buf_clear(&b);
}
END_TEST

START_TEST(test_utf8_len)
{
    static const struct { const char *s; int len; } cases[] = {
        { "a", 1 }, { "\x7f", 1 }, { "\xc3\xa9", 2 }, { "\xe2\x82\xac", 3 },
        { "\xf0\x9f\x98\x80", 4 }, { "\xf4\x8f\xbf\xbf", 4 },  /* U+10FFFF */
        { "", 0 }, { "\x80", 0 }, { "\xc0\xaf", 0 }, { "\xc1\xbf", 0 },   /* overlong */
        { "\xe0\x80\xaf", 0 }, { "\xf0\x80\x80\xaf", 0 },              /* overlong */
        { "\xed\xa0\x80", 0 },                                          /* surrogate */
        { "\xf4\x90\x80\x80", 0 }, { "\xf5\x80\x80\x80", 0 },          /* > U+10FFFF */
        { "\xe2\x82", 0 }, { "\xc3", 0 }, { "\xc3" "a", 0 },               /* truncated */
    };
    for (size_t k = 0; k < sizeof(cases) / sizeof(cases[0]); k++)
        ck_assert_msg(embz_utf8_len(cases[k].s) == cases[k].len, "case %zu", k);
}
END_TEST

START_TEST(test_err_quote)
{
    char buf[64];
    ck_assert_str_eq(embz_err_quote(buf, sizeof(buf), "plain 1/i", 100), "plain 1/i");
    ck_assert_str_eq(embz_err_quote(buf, sizeof(buf), "a\x01\x7f\xff\tz", 100),
                     "a\\x01\\x7f\\xff\\x09z");
    ck_assert_str_eq(embz_err_quote(buf, sizeof(buf), "caf\xc3\xa9", 100), "caf\xc3\xa9");
    ck_assert_str_eq(embz_err_quote(buf, sizeof(buf), "abcdefgh", 3), "abc...");
    /* a small buffer: cut with the mark, never overrun */
    ck_assert_str_eq(embz_err_quote(buf, 8, "abcdefgh", 100), "abcd...");
    ck_assert_str_eq(embz_err_quote(buf, 8, "\x01\x02", 100), "\\x01...");
}
END_TEST

START_TEST(test_caret)
{
    embz_err_t e;
    char buf[4096];
    embz_err_clear(&e);
    snprintf(e.source, sizeof(e.source), "1/(i*log(i-7)");
    e.col = 3;
    embz_err_set(&e, EMBZ_ERR_INPUT, "missing ')'");
    embz_err_format(buf, sizeof(buf), &e);
    ck_assert_msg(strstr(buf, "column 3: missing ')'\n  1/(i*log(i-7)\n    ^") != NULL, "%s", buf);
    /* a column beyond the text does not read past it */
    e.col = 500;
    embz_err_format(buf, sizeof(buf), &e);
    ck_assert(strlen(buf) < 600);
    /* file:line prefix */
    embz_err_clear(&e);
    snprintf(e.file, sizeof(e.file), "x.fam");
    e.line = 4;
    embz_err_set(&e, EMBZ_ERR_INPUT, "unknown key 'wieght'");
    embz_err_format(buf, sizeof(buf), &e);
    ck_assert_str_eq(buf, "x.fam:4: unknown key 'wieght'");
    /* control and stray bytes of a source line or file name are escaped, and the caret
     * stays under the byte it points at (four columns per escape, one per UTF-8 character,
     * tabs kept) */
    embz_err_clear(&e);
    snprintf(e.source, sizeof(e.source), "\x01\xc3\xa9\t+x");
    e.col = 6;
    embz_err_set(&e, EMBZ_ERR_INPUT, "unknown name 'x'");
    embz_err_format(buf, sizeof(buf), &e);
    ck_assert_str_eq(buf, "column 6: unknown name 'x'\n  \\x01\xc3\xa9\t+x\n       \t ^");
    embz_err_clear(&e);
    snprintf(e.file, sizeof(e.file), "a\x1b[2Jb");
    e.line = 2;
    embz_err_set(&e, EMBZ_ERR_INPUT, "bad");
    embz_err_format(buf, sizeof(buf), &e);
    ck_assert_str_eq(buf, "a\\x1b[2Jb:2: bad");
}
END_TEST

START_TEST(test_write_atomic)
{
    char dir[] = "/tmp/embz-util-XXXXXX";
    ck_assert(mkdtemp(dir) != NULL);
    char path[256];
    snprintf(path, sizeof(path), "%s/out.txt", dir);
    embz_err_t e;
    embz_err_clear(&e);
    ck_assert_int_eq(embz_write_atomic(path, "hello\n", 6, &e), EMBZ_OK);
    FILE *f = fopen(path, "r");
    char line[32] = { 0 };
    ck_assert(f != NULL && fgets(line, sizeof(line), f) != NULL);
    fclose(f);
    ck_assert_str_eq(line, "hello\n");
    /* a path in a missing directory fails cleanly */
    char bad[300];
    snprintf(bad, sizeof(bad), "%s/missing/out.txt", dir);
    ck_assert_int_eq(embz_write_atomic(bad, "x", 1, &e), EMBZ_ERR_IO);
    /* nothing but the file is left in the directory */
    DIR *d = opendir(dir);
    int count = 0;
    struct dirent *de;
    while ((de = readdir(d)) != NULL)
        if (de->d_name[0] != '.') count++;
    closedir(d);
    ck_assert_int_eq(count, 1);
    unlink(path);
    rmdir(dir);
}
END_TEST

/* ------------------------------------------------------------------ output files */

static char out_dir[64];

static const char *in_dir(const char *name)
{
    static char buf[4][400];
    static int k;
    k = (k + 1) % 4;
    snprintf(buf[k], sizeof(buf[k]), "%s/%s", out_dir, name);
    return buf[k];
}

static void put(const char *path, const char *text)
{
    FILE *f = fopen(path, "w");
    ck_assert(f != NULL);
    fputs(text, f);
    fclose(f);
}

static int has_text(const char *path, const char *text)
{
    char buf[256] = { 0 };
    FILE *f = fopen(path, "r");
    if (f == NULL) return 0;
    size_t n = fread(buf, 1, sizeof(buf) - 1, f);
    fclose(f);
    buf[n] = '\0';
    return strcmp(buf, text) == 0;
}

/* entries of the test directory whose name contains ".part-" */
static int temp_files(void)
{
    DIR *d = opendir(out_dir);
    int count = 0;
    struct dirent *de;
    while ((de = readdir(d)) != NULL)
        count += strstr(de->d_name, ".part-") != NULL;
    closedir(d);
    return count;
}

static void out_setup(void)
{
    snprintf(out_dir, sizeof(out_dir), "/tmp/embz-out-XXXXXX");
    ck_assert(mkdtemp(out_dir) != NULL);
}

static void out_teardown(void)
{
    DIR *d = opendir(out_dir);
    struct dirent *de;
    while ((de = readdir(d)) != NULL) {
        if (de->d_name[0] == '.' && (de->d_name[1] == 0 || !strcmp(de->d_name, "..")))
            continue;
        const char *p = in_dir(de->d_name);
        if (rmdir(p) != 0) unlink(p);
    }
    closedir(d);
    rmdir(out_dir);
}

START_TEST(test_output_links_and_modes)
{
    out_setup();
    embz_err_t e;
    struct stat st;
    /* a symbolic link: its target is replaced, the link stays a link */
    put(in_dir("real"), "old");
    ck_assert_int_eq(symlink("real", in_dir("link")), 0);
    ck_assert_int_eq(embz_write_atomic(in_dir("link"), "new", 3, &e), EMBZ_OK);
    ck_assert(lstat(in_dir("link"), &st) == 0 && S_ISLNK(st.st_mode));
    ck_assert(has_text(in_dir("real"), "new"));
    /* a chain of two relative links through a subdirectory, and a dangling link */
    mkdir(in_dir("sub"), 0755);
    ck_assert_int_eq(symlink("../link", in_dir("sub/l2")), 0);
    ck_assert_int_eq(embz_write_atomic(in_dir("sub/l2"), "chain", 5, &e), EMBZ_OK);
    ck_assert(has_text(in_dir("real"), "chain"));
    ck_assert_int_eq(symlink("made", in_dir("dangling")), 0);
    ck_assert_int_eq(embz_write_atomic(in_dir("dangling"), "x", 1, &e), EMBZ_OK);
    ck_assert(has_text(in_dir("made"), "x"));
    /* a loop of links fails without writing */
    ck_assert_int_eq(symlink("loop2", in_dir("loop1")), 0);
    ck_assert_int_eq(symlink("loop1", in_dir("loop2")), 0);
    ck_assert_int_eq(embz_write_atomic(in_dir("loop1"), "x", 1, &e), EMBZ_ERR_IO);
    /* the permission bits of an existing file are kept: 0600 and 0640 */
    put(in_dir("private"), "old");
    chmod(in_dir("private"), 0600);
    ck_assert_int_eq(embz_write_atomic(in_dir("private"), "new", 3, &e), EMBZ_OK);
    ck_assert(stat(in_dir("private"), &st) == 0);
    ck_assert_int_eq(st.st_mode & 07777, 0600);
    chmod(in_dir("private"), 0640);
    ck_assert_int_eq(embz_write_atomic(in_dir("private"), "newer", 5, &e), EMBZ_OK);
    ck_assert(stat(in_dir("private"), &st) == 0);
    ck_assert_int_eq(st.st_mode & 07777, 0640);
    ck_assert(has_text(in_dir("private"), "newer"));
    /* a new file: 0666 less the umask */
    mode_t mask = umask(022);
    ck_assert_int_eq(embz_write_atomic(in_dir("fresh"), "x", 1, &e), EMBZ_OK);
    umask(077);
    ck_assert_int_eq(embz_write_atomic(in_dir("fresh2"), "x", 1, &e), EMBZ_OK);
    umask(mask);
    ck_assert(stat(in_dir("fresh"), &st) == 0);
    ck_assert_int_eq(st.st_mode & 07777, 0644);
    ck_assert(stat(in_dir("fresh2"), &st) == 0);
    ck_assert_int_eq(st.st_mode & 07777, 0600);
    /* as root: the owner and group of the replaced file are kept */
    if (geteuid() == 0) {
        put(in_dir("owned"), "old");
        ck_assert_int_eq(chown(in_dir("owned"), 65534, 65534), 0);
        ck_assert_int_eq(embz_write_atomic(in_dir("owned"), "new", 3, &e), EMBZ_OK);
        ck_assert(stat(in_dir("owned"), &st) == 0);
        ck_assert_int_eq(st.st_uid, 65534);
        ck_assert_int_eq(st.st_gid, 65534);
    }
    ck_assert_int_eq(temp_files(), 0);
    out_teardown();
}
END_TEST

START_TEST(test_output_refused)
{
    out_setup();
    embz_err_t e;
    struct stat st;
    /* several hard links: refused before and at writing, both names keep the old text */
    put(in_dir("h1"), "old");
    ck_assert_int_eq(link(in_dir("h1"), in_dir("h2")), 0);
    embz_err_clear(&e);
    ck_assert_int_eq(embz_output_check(in_dir("h1"), &e), EMBZ_ERR_INPUT);
    ck_assert_ptr_nonnull(strstr(e.text, "hard links"));
    ck_assert_int_eq(embz_write_atomic(in_dir("h1"), "new", 3, &e), EMBZ_ERR_INPUT);
    ck_assert_ptr_nonnull(strstr(e.text, in_dir("h1")));
    ck_assert(has_text(in_dir("h1"), "old") && has_text(in_dir("h2"), "old"));
    ck_assert(stat(in_dir("h1"), &st) == 0 && st.st_nlink == 2);
    /* a directory, a fifo, a character device, and a link to a directory */
    mkdir(in_dir("dir"), 0755);
    ck_assert_int_eq(mkfifo(in_dir("fifo"), 0644), 0);
    ck_assert_int_eq(symlink("dir", in_dir("dirlink")), 0);
    const char *refused[] = { in_dir("dir"), in_dir("fifo"), "/dev/null", in_dir("dirlink") };
    for (int k = 0; k < 4; k++) {
        embz_err_clear(&e);
        ck_assert_int_eq(embz_output_check(refused[k], &e), EMBZ_ERR_INPUT);
        ck_assert_ptr_nonnull(strstr(e.text, refused[k]));
        ck_assert_ptr_nonnull(strstr(e.text, "not a regular file"));
        ck_assert_int_eq(embz_write_atomic(refused[k], "x", 1, &e), EMBZ_ERR_INPUT);
    }
    ck_assert(lstat(in_dir("fifo"), &st) == 0 && S_ISFIFO(st.st_mode));
    ck_assert(lstat("/dev/null", &st) == 0 && S_ISCHR(st.st_mode));
    ck_assert(lstat(in_dir("dirlink"), &st) == 0 && S_ISLNK(st.st_mode));
#ifdef __linux__
    /* a link to an open descriptor */
    ck_assert_int_eq(embz_output_check("/dev/stderr", &e), EMBZ_ERR_INPUT);
    ck_assert_ptr_nonnull(strstr(e.text, "descriptor"));
#endif
    /* what is allowed: a new name, standard output; a missing directory is an I/O error */
    ck_assert_int_eq(embz_output_check(in_dir("new.txt"), &e), EMBZ_OK);
    ck_assert_int_eq(embz_output_check("-", &e), EMBZ_OK);
    ck_assert_int_eq(embz_output_check(in_dir("missing/x"), &e), EMBZ_ERR_IO);
    ck_assert(embz_output_is_stdout("-") && embz_output_is_stdout("/dev/stdout"));
    ck_assert(!embz_output_is_stdout("./-") && !embz_output_is_stdout("/dev/stderr"));
    ck_assert_int_eq(temp_files(), 0);
    ck_assert_int_eq(access(in_dir("new.txt"), F_OK), -1);
    out_teardown();
}
END_TEST

START_TEST(test_output_stdout)
{
    out_setup();
    /* "-" streams to descriptor 1, after what stdio had buffered */
    int saved = dup(1);
    int fd = open(in_dir("captured"), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    ck_assert(saved >= 0 && fd >= 0);
    fflush(stdout);
    dup2(fd, 1);
    close(fd);
    embz_err_t e;
    printf("first ");
    int st = embz_write_atomic("-", "streamed\n", 9, &e);
    fflush(stdout);
    dup2(saved, 1);
    close(saved);
    ck_assert_int_eq(st, EMBZ_OK);
    ck_assert(has_text(in_dir("captured"), "first streamed\n"));
    /* a write error on standard output: EMBZ_ERR_IO naming it */
    fd = open("/dev/full", O_WRONLY);
    if (fd >= 0) {
        saved = dup(1);
        dup2(fd, 1);
        close(fd);
        st = embz_write_atomic("-", "x", 1, &e);
        dup2(saved, 1);
        close(saved);
        ck_assert_int_eq(st, EMBZ_ERR_IO);
        ck_assert_ptr_nonnull(strstr(e.text, "standard output"));
    }
    out_teardown();
}
END_TEST

START_TEST(test_output_failure_keeps_old)
{
    out_setup();
    embz_err_t e;
    put(in_dir("keep"), "old");
    /* a write failure (injected) leaves the old file and no temporary file */
    ck_assert_int_eq(embz_afile_write_all(in_dir("keep"), "new text", 8, 4, &e), EMBZ_ERR_IO);
    ck_assert_ptr_nonnull(strstr(e.text, in_dir("keep")));
    ck_assert(has_text(in_dir("keep"), "old"));
    ck_assert_int_eq(temp_files(), 0);
    /* an aborted file likewise */
    embz_afile_t f;
    ck_assert_int_eq(embz_afile_open(f, in_dir("keep"), &e), EMBZ_OK);
    ck_assert_int_eq(temp_files(), 1);
    embz_afile_write(f, "abc", 3);
    embz_afile_abort(f);
    ck_assert(has_text(in_dir("keep"), "old"));
    ck_assert_int_eq(temp_files(), 0);
    /* the clean-up a signal handler calls removes the file in progress; commit then fails */
    ck_assert_int_eq(embz_afile_open(f, in_dir("keep"), &e), EMBZ_OK);
    embz_afile_write(f, "abc", 3);
    ck_assert_int_eq(temp_files(), 1);
    embz_afile_remove_pending();
    ck_assert_int_eq(temp_files(), 0);
    ck_assert_int_eq(embz_afile_commit(f, &e), EMBZ_ERR_IO);
    ck_assert(has_text(in_dir("keep"), "old"));
    /* a target that turned into a directory while the file was written is not replaced */
    ck_assert_int_eq(embz_afile_open(f, in_dir("late"), &e), EMBZ_OK);
    embz_afile_write(f, "abc", 3);
    mkdir(in_dir("late"), 0755);
    ck_assert_int_eq(embz_afile_commit(f, &e), EMBZ_ERR_INPUT);
    struct stat st;
    ck_assert(stat(in_dir("late"), &st) == 0 && S_ISDIR(st.st_mode));
    ck_assert_int_eq(temp_files(), 0);
    out_teardown();
}
END_TEST

static void *sleeper(void *arg)
{
    (void) arg;
    for (;;) pause();
    return NULL;
}

/* The child of test_output_signals, run as "test_util --interrupted-writer SIG OTHER FILE" in a
 * fresh program (exec): the test runner's own signal handlers are gone, as in a command run
 * from a shell. It starts writing FILE and stops itself with SIG; with OTHER = 1 the writing
 * thread blocks SIG, so a second thread takes it. Returns only when the signal failed to end
 * the process. */
static int interrupted_writer(int sig, int other_thread, const char *path)
{
    if (signal(sig, SIG_DFL) == SIG_ERR)   /* an inherited "ignored" would test nothing */
        return 3;
    pthread_t t;
    if (other_thread && pthread_create(&t, NULL, sleeper, NULL) != 0)
        return 4;
    embz_afile_t f;
    embz_err_t e;
    if (embz_afile_open(f, path, &e) != EMBZ_OK)
        return 5;
    embz_afile_write(f, "partial", 7);
    if (other_thread) {
        sigset_t set;
        sigemptyset(&set);
        sigaddset(&set, sig);
        pthread_sigmask(SIG_BLOCK, &set, NULL);
        kill(getpid(), sig);
        sleep(10);
        return 6;
    }
    raise(sig);
    return 7;
}

/* Runs interrupted_writer in a child; it must die by sig and leave the old file and no
 * temporary file. */
static void interrupted_child(int sig, int other_thread)
{
    char sig_text[16], other_text[4];
    snprintf(sig_text, sizeof(sig_text), "%d", sig);
    snprintf(other_text, sizeof(other_text), "%d", other_thread);
    const char *path = in_dir("keep");
    pid_t pid = fork();
    ck_assert(pid >= 0);
    if (pid == 0) {
        execl("/proc/self/exe", "test_util", "--interrupted-writer", sig_text, other_text, path,
              (char *) NULL);
        _exit(2);
    }
    int status;
    ck_assert_int_eq(waitpid(pid, &status, 0), pid);
    ck_assert_msg(WIFSIGNALED(status) && WTERMSIG(status) == sig,
                  "child status %d, expected death by signal %d", status, sig);
    ck_assert(has_text(in_dir("keep"), "old"));
    ck_assert_int_eq(temp_files(), 0);
}

START_TEST(test_output_signals)
{
    out_setup();
    put(in_dir("keep"), "old");
    int sigs[] = { SIGINT, SIGTERM, SIGHUP };
    for (int k = 0; k < 3; k++) {
        interrupted_child(sigs[k], 0);
        interrupted_child(sigs[k], 1);
    }
    out_teardown();
}
END_TEST

int main(int argc, char **argv)
{
    if (argc == 5 && strcmp(argv[1], "--interrupted-writer") == 0)
        return interrupted_writer(atoi(argv[2]), atoi(argv[3]), argv[4]);
    Suite *s = suite_create("util");
    TCase *tc = tcase_create("core");
    tcase_add_test(tc, test_bounds_enclose);
    tcase_add_test(tc, test_certified_digits);
    tcase_add_test(tc, test_fmpz_string);
    tcase_add_test(tc, test_json_escape);
    tcase_add_test(tc, test_json_utf8);
    tcase_add_test(tc, test_utf8_len);
    tcase_add_test(tc, test_err_quote);
    tcase_add_test(tc, test_caret);
    tcase_add_test(tc, test_write_atomic);
    tcase_add_test(tc, test_output_links_and_modes);
    tcase_add_test(tc, test_output_refused);
    tcase_add_test(tc, test_output_stdout);
    tcase_add_test(tc, test_output_failure_keeps_old);
    tcase_add_test(tc, test_output_signals);
    suite_add_tcase(s, tc);
    return tu_run_suite(s);
}
