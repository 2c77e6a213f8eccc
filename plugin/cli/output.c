/* output.c: the CLI's --output FILE. What is at the path decides how it is
 * written (see output.h); nothing there is ever turned into another kind of
 * file, and no link is followed or broken. */
#include "output.h"

#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/types.h>
#include <unistd.h>

#include "bm-error.h"

/* Partial files carry at most this many bytes of the target's name, so that
 * the partial name stays within NAME_MAX (255 on every common file system). */
#define NAME_BYTES 200

static gboolean io_error(GError **error, const char *option, const char *path,
                         const char *fmt, ...) G_GNUC_PRINTF(4, 5);
static gboolean io_error(GError **error, const char *option, const char *path,
                         const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    g_autofree char *why = g_strdup_vprintf(fmt, ap);
    va_end(ap);
    g_set_error(error, BM_ERROR, BM_ERROR_IO, "cannot write %s %s: %s", option, path, why);
    return FALSE;
}

gboolean bm_cli_write_all(int fd, const char *text, gsize len, int *err)
{
    while (len > 0) {
        gssize put = write(fd, text, MIN(len, (gsize)1 << 30));
        if (put < 0 && errno == EINTR)
            continue;
        if (put < 0) {
            *err = errno;
            return FALSE;
        }
        text += put;
        len -= (gsize)put;
    }
    return TRUE;
}

/* ".NAME.bandmass-partial-": the prefix of the target's partial files. */
static char *partial_prefix(const char *base)
{
    return g_strdup_printf(".%.*s%s", NAME_BYTES, base, BM_CLI_PARTIAL_TAG);
}

/* Removes partial files a killed run left for this target: the name is
 * PREFIX + PID + "-" + six characters, the PID is no live process, and the
 * file is a regular file of the caller's. */
static void remove_leftovers(const char *dir, const char *base)
{
    g_autofree char *prefix = partial_prefix(base);
    gsize plen = strlen(prefix);
    DIR *d = opendir(dir);
    if (!d)
        return;
    for (struct dirent *e; (e = readdir(d));) {
        if (strncmp(e->d_name, prefix, plen) != 0)
            continue;
        const char *pid_text = e->d_name + plen;
        char *end = NULL;
        errno = 0;
        long long pid = strtoll(pid_text, &end, 10);
        if (errno || end == pid_text || *pid_text == '-' || *pid_text == '+' || pid <= 0
            || pid > G_MAXINT || *end != '-' || strlen(end + 1) != 6)
            continue;
        if ((pid_t)pid != getpid() && (kill((pid_t)pid, 0) == 0 || errno != ESRCH))
            continue;   /* a run still writing it (or one we may not signal) */
        g_autofree char *full = g_build_filename(dir, e->d_name, NULL);
        struct stat st;
        if (lstat(full, &st) == 0 && S_ISREG(st.st_mode) && st.st_uid == geteuid())
            unlink(full);
    }
    closedir(d);
}

/* A character device or a FIFO: opened for writing as it is (no O_CREAT, so
 * nothing is created if it vanished; O_NOFOLLOW, so a link put in its place
 * is not followed), checked to be the same file, written through. */
static gboolean write_through(const char *option, const char *path, const struct stat *before,
                              const char *text, gsize len, GError **error)
{
    int fd;
    do
        fd = open(path, O_WRONLY | O_NOCTTY | O_NOFOLLOW | O_CLOEXEC);
    while (fd < 0 && errno == EINTR);
    if (fd < 0)
        return io_error(error, option, path, "%s", g_strerror(errno));
    struct stat st;
    if (fstat(fd, &st) != 0 || st.st_dev != before->st_dev || st.st_ino != before->st_ino) {
        close(fd);
        return io_error(error, option, path, "it was replaced while being opened");
    }
    /* a FIFO whose reader went away: EPIPE and a message, not a silent death */
    struct sigaction ignore = { .sa_handler = SIG_IGN }, old;
    sigemptyset(&ignore.sa_mask);
    sigaction(SIGPIPE, &ignore, &old);
    int err = 0;
    gboolean ok = bm_cli_write_all(fd, text, len, &err);
    sigaction(SIGPIPE, &old, NULL);
    if (close(fd) != 0 && ok && errno != EINTR) {
        ok = FALSE;
        err = errno;
    }
    return ok ? TRUE : io_error(error, option, path, "%s", g_strerror(err));
}

/* Absent or a regular file with one link: a partial file beside it, renamed
 * over it when complete. old is the replaced file's status, or NULL. */
static gboolean write_replace(const char *option, const char *path, const struct stat *old,
                              const char *text, gsize len, GError **error)
{
    g_autofree char *dir = g_path_get_dirname(path);
    g_autofree char *base = g_path_get_basename(path);
    remove_leftovers(dir, base);

    g_autofree char *prefix = partial_prefix(base);
    g_autofree char *name = g_strdup_printf("%s%ld-XXXXXX", prefix, (long)getpid());
    g_autofree char *tmp = g_build_filename(dir, name, NULL);
    int fd = mkstemp(tmp);   /* mode 0600, O_EXCL */
    if (fd < 0)
        return io_error(error, option, path, "cannot create a partial file in %s: %s", dir,
                        g_strerror(errno));
    fcntl(fd, F_SETFD, FD_CLOEXEC);

    int err = 0;
    const char *why = NULL;
    mode_t mode;
    if (old) {
        mode = old->st_mode & 0777;
        if (old->st_uid != geteuid() && fchown(fd, old->st_uid, (gid_t)-1) != 0)
            why = "it belongs to another user, and the new file could not be given to "
                  "that user (write it as its owner, or remove it first)";
        else if (old->st_gid != getegid() && fchown(fd, (uid_t)-1, old->st_gid) != 0)
            mode &= ~(mode_t)0070;   /* a group it could not keep gets no access */
    } else {
        mode_t mask = umask(0);
        umask(mask);
        mode = 0666 & ~mask;
    }
    if (!why && fchmod(fd, mode) != 0)
        err = errno;
    if (!why && !err && !bm_cli_write_all(fd, text, len, &err)) {
        /* err set */
    }
    if (!why && !err && fsync(fd) != 0 && errno != EINVAL)
        err = errno;
    if (close(fd) != 0 && !why && !err && errno != EINTR)
        err = errno;
    if (!why && !err) {
        /* what is at the path now must still be what was decided on */
        struct stat now;
        gboolean present = lstat(path, &now) == 0;
        if (!old ? present
                 : !present || now.st_dev != old->st_dev || now.st_ino != old->st_ino)
            why = "it was created or replaced by someone else while being written";
        else if (rename(tmp, path) != 0)
            err = errno;
    }
    if (why || err) {
        unlink(tmp);
        return io_error(error, option, path, "%s", why ? why : g_strerror(err));
    }
    return TRUE;
}

gboolean bm_cli_write_output(const char *path, const char *text, gsize len, GError **error)
{
    return bm_cli_write_file("--output", path, text, len, error);
}

/* What is at path, by the rules of output.h; refusals name option and path. */
static gboolean output_kind(const char *option, const char *path, struct stat *st,
                            BmCliOutputKind *kind, GError **error)
{
    if (!*path)
        return io_error(error, option, path, "an empty file name");
    if (lstat(path, st) != 0) {
        if (errno != ENOENT)
            return io_error(error, option, path, "%s", g_strerror(errno));
        *kind = BM_CLI_OUTPUT_ABSENT;
        return TRUE;
    }
    if (S_ISLNK(st->st_mode)) {
        g_autofree char *target = g_file_read_link(path, NULL);
        g_autofree char *shown = target ? g_strescape(target, NULL) : g_strdup("?");
        return io_error(error, option, path, "it is a symbolic link (to \"%s\"%s); output is "
                        "never written through a link: pass the resolved path (realpath %s)",
                        shown, g_file_test(path, G_FILE_TEST_EXISTS) ? "" : ", which does not "
                        "exist", path);
    }
    if (S_ISREG(st->st_mode) && st->st_nlink > 1)
        return io_error(error, option, path, "it has %lu hard links; replacing it would break "
                        "them and writing in place would change every linked name: remove it "
                        "first, or pass another name", (unsigned long)st->st_nlink);
    if (S_ISREG(st->st_mode)) {
        *kind = BM_CLI_OUTPUT_REGULAR;
        return TRUE;
    }
    if (S_ISCHR(st->st_mode) || S_ISFIFO(st->st_mode)) {
        *kind = BM_CLI_OUTPUT_THROUGH;
        return TRUE;
    }
    return io_error(error, option, path, "it is %s; output goes to a regular file, a character "
                    "device or a FIFO", S_ISDIR(st->st_mode) ? "a directory"
                    : S_ISBLK(st->st_mode) ? "a block device"
                    : S_ISSOCK(st->st_mode) ? "a socket" : "not a regular file");
}

gboolean bm_cli_output_kind(const char *path, struct stat *st, BmCliOutputKind *kind,
                            GError **error)
{
    return output_kind("--output", path, st, kind, error);
}

gboolean bm_cli_write_file(const char *option, const char *path, const char *text, gsize len,
                           GError **error)
{
    /* past a file-size limit, write fails with EFBIG and the partial file is
     * removed, instead of the process dying and leaving it behind */
    signal(SIGXFSZ, SIG_IGN);

    struct stat st;
    BmCliOutputKind kind;
    if (!output_kind(option, path, &st, &kind, error))
        return FALSE;
    switch (kind) {
    case BM_CLI_OUTPUT_ABSENT:
        return write_replace(option, path, NULL, text, len, error);
    case BM_CLI_OUTPUT_REGULAR:
        return write_replace(option, path, &st, text, len, error);
    default:
        return write_through(option, path, &st, text, len, error);
    }
}
