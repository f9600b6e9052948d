/* Atomic output files: write to a temporary in the same directory, rename
 * on success (rename(2) is atomic within one file system). */
#include "swathbudget/writer.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

int sb_outfile_open(struct sb_outfile *o, const char *path,
                    struct sb_error *err)
{
    int fd;

    memset(o, 0, sizeof o[0]);
    if (!path || !*path)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "empty output file name (expected a path)");
    if (strlen(path) + 16 >= sizeof o->tmp)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "output path too long (expected at most %zu "
                            "characters)", sizeof o->tmp - 16);
    snprintf(o->path, sizeof o->path, "%s", path);
    {
        /* A device or a pipe (/dev/stdout, /dev/full, a FIFO) cannot be
         * replaced by rename: write to it directly. */
        struct stat st;
        if (stat(path, &st) == 0 && !S_ISREG(st.st_mode)) {
            o->f = fopen(path, "w");
            if (!o->f)
                return sb_error_set(err, SB_EIO, path, 0, 0,
                                    "cannot open the output: %s (expected a "
                                    "writable file)", strerror(errno));
            return SB_OK;
        }
    }
    snprintf(o->tmp, sizeof o->tmp, "%s.tmpXXXXXX", path);
    fd = mkstemp(o->tmp);
    if (fd < 0)
        return sb_error_set(err, SB_EIO, path, 0, 0,
                            "cannot create the output file: %s (expected a "
                            "writable directory)", strerror(errno));
    {
        /* mkstemp makes the file private (0600); an output file should
         * get the mode any new file would: 0666 less the umask. */
        mode_t mask = umask(0);
        umask(mask);
        (void)fchmod(fd, 0666 & ~mask);
    }
    o->f = fdopen(fd, "w");
    if (!o->f) {
        int e = errno;
        close(fd);
        unlink(o->tmp);
        return sb_error_set(err, SB_EIO, path, 0, 0,
                            "cannot open the output file: %s", strerror(e));
    }
    return SB_OK;
}

int sb_outfile_commit(struct sb_outfile *o, struct sb_error *err)
{
    int bad = 0, e = 0;

    if (!o->f)
        return sb_error_set(err, SB_EINTERNAL, o->path, 0, 0,
                            "output file committed twice (this is a bug)");
    if (fflush(o->f) != 0 || ferror(o->f)) {
        bad = 1;
        e = errno;
    }
    if (fclose(o->f) != 0 && !bad) {
        bad = 1;
        e = errno;
    }
    o->f = NULL;
    if (!o->tmp[0]) { /* written directly (device or pipe) */
        if (bad)
            return sb_error_set(err, SB_EIO, o->path, 0, 0,
                                "cannot write the output: %s (expected a "
                                "writable file)", strerror(e));
        return SB_OK;
    }
    if (!bad && rename(o->tmp, o->path) != 0) {
        bad = 1;
        e = errno;
    }
    if (bad) {
        unlink(o->tmp);
        return sb_error_set(err, SB_EIO, o->path, 0, 0,
                            "cannot write the output file: %s (nothing was "
                            "written)", strerror(e));
    }
    return SB_OK;
}

void sb_outfile_abort(struct sb_outfile *o)
{
    if (o->f) {
        fclose(o->f);
        o->f = NULL;
    }
    if (o->tmp[0])
        unlink(o->tmp);
}
