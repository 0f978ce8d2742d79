/* Replays fuzz inputs without libFuzzer: every argument is a file, or a directory whose
 * regular files are fed (in name order) to LLVMFuzzerTestOneInput. Used by meson test so that
 * the seed corpus and the saved crashes run in every test run, sanitizer builds included.
 * Exit status 0 when all inputs ran (a failed check aborts the program), 1 when an argument
 * cannot be read or a directory holds no input. */
#include <dirent.h>
#include <sys/stat.h>
#include "fuzz_common.h"
#include "embz/flint.h"

static int replay_file(const char *path)
{
    FILE *fp = fopen(path, "rb");
    if (fp == NULL) {
        fprintf(stderr, "replay: cannot open %s\n", path);
        return 1;
    }
    size_t cap = 4096, len = 0, got;
    uint8_t *buf = malloc(cap);
    if (buf == NULL) abort();
    while ((got = fread(buf + len, 1, cap - len, fp)) > 0) {
        len += got;
        if (len == cap) {
            cap *= 2;
            buf = realloc(buf, cap);
            if (buf == NULL) abort();
        }
    }
    int bad = ferror(fp);
    fclose(fp);
    if (bad) {
        fprintf(stderr, "replay: read error on %s\n", path);
        free(buf);
        return 1;
    }
    /* a copy of exactly the input's length, so that ASan sees reads past its end */
    uint8_t *input = malloc(len > 0 ? len : 1);
    if (input == NULL) abort();
    if (len > 0) memcpy(input, buf, len);
    free(buf);
    LLVMFuzzerTestOneInput(input, len);
    free(input);
    return 0;
}

static int by_name(const void *a, const void *b)
{
    return strcmp(*(char *const *) a, *(char *const *) b);
}

static int replay_dir(const char *dir, long *count)
{
    DIR *d = opendir(dir);
    if (d == NULL) {
        fprintf(stderr, "replay: cannot open directory %s\n", dir);
        return 1;
    }
    char **names = NULL;
    long n = 0, alloc = 0;
    struct dirent *e;
    while ((e = readdir(d)) != NULL) {
        if (e->d_name[0] == '.') continue;
        if (n == alloc) {
            alloc = alloc ? 2 * alloc : 64;
            names = realloc(names, (size_t) alloc * sizeof(char *));
            if (names == NULL) abort();
        }
        size_t l = strlen(dir) + strlen(e->d_name) + 2;
        names[n] = malloc(l);
        if (names[n] == NULL) abort();
        snprintf(names[n], l, "%s/%s", dir, e->d_name);
        n++;
    }
    closedir(d);
    if (n > 0) qsort(names, (size_t) n, sizeof(char *), by_name);
    int status = 0;
    for (long k = 0; k < n; k++) {
        struct stat st;
        if (stat(names[k], &st) == 0 && S_ISREG(st.st_mode)) {
            status |= replay_file(names[k]);
            (*count)++;
        }
        free(names[k]);
    }
    free(names);
    return status;
}

int main(int argc, char **argv)
{
    int status = 0;
    long count = 0;
    for (int k = 1; k < argc; k++) {
        struct stat st;
        if (stat(argv[k], &st) == 0 && S_ISDIR(st.st_mode)) {
            long before = count;
            status |= replay_dir(argv[k], &count);
            if (count == before) {
                fprintf(stderr, "replay: no input in %s\n", argv[k]);
                status = 1;
            }
        } else {
            status |= replay_file(argv[k]);
            count++;
        }
    }
    printf("replayed %ld inputs\n", count);
    flint_cleanup();
    return status;
}
