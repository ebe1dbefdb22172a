/* sh_file.c - atomic output files (temporary file, then rename). */
#include "sh_file.h"

#include <errno.h>
#include <limits.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

int sh_outfile_open(sh_outfile *o, const char *path, char *err, size_t errlen)
{
    struct stat st;
    memset(o, 0, sizeof *o);
    if (!path || !*path) {
        snprintf(err, errlen, "no output file name given");
        return -1;
    }
    if (stat(path, &st) == 0 && S_ISDIR(st.st_mode)) {
        snprintf(err, errlen, "%s is a directory", path);
        return -1;
    }
    /* Write beside the real file when PATH is a symbolic link, so the link
     * survives, and keep an existing file's permission bits. */
    char real[PATH_MAX];
    mode_t mode = 0644;
    const char *target = path;
    if (lstat(path, &st) == 0) {
        if (S_ISLNK(st.st_mode) && realpath(path, real))
            target = real;
        if (stat(target, &st) == 0)
            mode = st.st_mode & 07777;
    }
    if (strlen(target) >= sizeof o->path) {
        snprintf(err, errlen, "output file name too long");
        return -1;
    }
    snprintf(o->path, sizeof o->path, "%s", target);
    snprintf(o->tmp, sizeof o->tmp, "%s.tmp-XXXXXX", target);
    int fd = mkstemp(o->tmp);
    if (fd < 0) {
        snprintf(err, errlen, "cannot write %s: %s", path, strerror(errno));
        return -1;
    }
    fchmod(fd, mode);
    o->f = fdopen(fd, "w");
    if (!o->f) {
        close(fd);
        unlink(o->tmp);
        snprintf(err, errlen, "cannot write %s: %s", path, strerror(errno));
        return -1;
    }
    return 0;
}

int sh_outfile_commit(sh_outfile *o, char *err, size_t errlen)
{
    int bad = fflush(o->f) != 0 || ferror(o->f) || fsync(fileno(o->f)) != 0;
    int e = errno;
    if (fclose(o->f) != 0 && !bad) {
        bad = 1;
        e = errno;
    }
    o->f = NULL;
    if (!bad && rename(o->tmp, o->path) != 0) {
        bad = 1;
        e = errno;
    }
    if (bad) {
        unlink(o->tmp);
        snprintf(err, errlen, "cannot write %s: %s", o->path, strerror(e));
        return -1;
    }
    return 0;
}

void sh_outfile_abort(sh_outfile *o)
{
    if (o->f)
        fclose(o->f);
    o->f = NULL;
    if (o->tmp[0])
        unlink(o->tmp);
}
