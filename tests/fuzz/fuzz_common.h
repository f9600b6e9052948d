/*
 * swathbudget fuzz harnesses — helpers shared by the libFuzzer targets.
 *
 * Built only by `make fuzz` (clang -fsanitize=fuzzer,address,undefined);
 * never part of the library or of `make check`.
 */
#ifndef SB_FUZZ_COMMON_H
#define SB_FUZZ_COMMON_H

/* memfd_create (Linux): the scratch "file" lives in memory, so that a
 * million inputs do not become a million disk writes. */
#if defined(__linux__) && !defined(_GNU_SOURCE)
#define _GNU_SOURCE 1
#endif

#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#if defined(__linux__)
#include <sys/mman.h>
#endif

#include "swathbudget/error.h"

/* Stop the run: libFuzzer records the input that got here as a crash. */
#define FUZZ_ASSERT(cond)                                                    \
    do {                                                                     \
        if (!(cond)) {                                                       \
            fprintf(stderr, "fuzz: %s:%d: assertion '%s' failed\n",          \
                    __FILE__, __LINE__, #cond);                              \
            abort();                                                         \
        }                                                                    \
    } while (0)

/* The contract every loader promises for an input error (error.h and the
 * project rules): one line, a message, and a position with a file. */
static inline void fuzz_check_input_error(const struct sb_error *err,
                                          int need_position)
{
    FUZZ_ASSERT(err->msg[0] != '\0');
    FUZZ_ASSERT(strchr(err->msg, '\n') == NULL);
    FUZZ_ASSERT(strchr(err->file, '\n') == NULL);
    if (need_position) {
        FUZZ_ASSERT(err->file[0] != '\0');
        FUZZ_ASSERT(err->line >= 1);
        FUZZ_ASSERT(err->col >= 1);
    }
}

/* A NUL-terminated copy of the input (the caller frees it). */
static inline char *fuzz_strndup(const uint8_t *data, size_t size)
{
    char *s = malloc(size + 1);

    if (!s)
        abort();
    if (size)
        memcpy(s, data, size);
    s[size] = '\0';
    return s;
}

/* Loaders that only read by path get the input through one scratch file,
 * made once per process in a private directory and rewritten for each
 * input; the directory and what was written in it go at exit. */
static char fuzz_dir[64];
static char fuzz_written[4][160];

static void fuzz_cleanup(void)
{
    int k;

    for (k = 0; k < 4; k++)
        if (fuzz_written[k][0])
            remove(fuzz_written[k]);
    if (fuzz_dir[0])
        rmdir(fuzz_dir);
}

/* The private scratch directory (made on first use). */
static inline const char *fuzz_scratch_dir(void)
{
    char *dir = fuzz_dir;

    if (!dir[0]) {
        const char *t = getenv("TMPDIR");
        snprintf(dir, sizeof fuzz_dir, "%s/sbfuzz.XXXXXX",
                 t && t[0] && strlen(t) < 40 ? t : "/tmp");
        if (!mkdtemp(dir)) {
            perror("fuzz: mkdtemp");
            abort();
        }
        atexit(fuzz_cleanup);
    }
    return dir;
}

/* Write the scratch file `name` in the scratch directory; its path. */
static inline const char *fuzz_write_disk(const char *name,
                                          const uint8_t *data, size_t size)
{
    static char path[128];
    FILE *f;

    int k;

    snprintf(path, sizeof path, "%s/%s", fuzz_scratch_dir(), name);
    for (k = 0; k < 4; k++)
        if (!fuzz_written[k][0] || strcmp(fuzz_written[k], path) == 0) {
            snprintf(fuzz_written[k], sizeof fuzz_written[k], "%s", path);
            break;
        }
    f = fopen(path, "wb");
    if (!f || (size && fwrite(data, 1, size, f) != size) || fclose(f)) {
        perror("fuzz: scratch file");
        abort();
    }
    return path;
}

/* Hand the input to a loader that reads by path: in memory where the
 * system allows it, else on disk. */
static inline const char *fuzz_write_file(const char *name,
                                          const uint8_t *data, size_t size)
{
    static char path[128];

#if defined(__linux__) && defined(MFD_CLOEXEC)
    {
        /* One memory file per name; its /proc/self/fd path opens it
         * afresh (own offset) like any file.  Up to 4 names. */
        static char names[4][32];
        static int fds[4] = {-1, -1, -1, -1};
        int k;

        for (k = 0; k < 4; k++)
            if (fds[k] < 0 || strcmp(names[k], name) == 0)
                break;
        if (k < 4) {
            if (fds[k] < 0) {
                fds[k] = memfd_create(name, MFD_CLOEXEC);
                snprintf(names[k], sizeof names[k], "%s", name);
            }
            if (fds[k] >= 0) {
                size_t done = 0;

                if (ftruncate(fds[k], 0) != 0)
                    abort();
                while (done < size) {
                    ssize_t w = pwrite(fds[k], data + done, size - done,
                                       (off_t)done);
                    if (w <= 0)
                        abort();
                    done += (size_t)w;
                }
                snprintf(path, sizeof path, "/proc/self/fd/%d", fds[k]);
                return path;
            }
        }
    }
#endif
    return fuzz_write_disk(name, data, size);
}

#endif
