/* sh_journal.c - write the audit journal, synced after every entry. */
#include "sh_journal.h"
#include "sh_session.h"
#include "hn_status.h"

#include <errno.h>
#include <fcntl.h>
#include <openssl/evp.h>
#include <pwd.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/types.h>
#include <time.h>
#include <unistd.h>

#ifndef HONE_VERSION
#define HONE_VERSION "0.0.0"
#endif

struct sh_journal {
    FILE *f;
    char path[1024];
    int memory;           /* entries kept in memory (replay), not on disk */
    char *mem;            /* memory mode: the text so far (open_memstream) */
    size_t memlen;
    size_t last_off;      /* memory mode: where the last entry starts */
    sh_journal_file inputs[SH_JOURNAL_MAX_LISTED];  /* the first input lines written */
    int ninputs;
};

int sh_sha256_file(const char *path, char hex[65], long long *size)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return HN_EIO;
    EVP_MD_CTX *ctx = EVP_MD_CTX_new();
    unsigned char buf[65536], md[EVP_MAX_MD_SIZE];
    unsigned int mdlen = 0;
    long long total = 0;
    size_t k;
    int ok = ctx && EVP_DigestInit_ex(ctx, EVP_sha256(), NULL) == 1;
    while (ok && (k = fread(buf, 1, sizeof buf, f)) > 0) {
        ok = EVP_DigestUpdate(ctx, buf, k) == 1;
        total += (long long)k;
    }
    ok = ok && !ferror(f) && EVP_DigestFinal_ex(ctx, md, &mdlen) == 1;
    EVP_MD_CTX_free(ctx);
    fclose(f);
    if (!ok)
        return HN_EIO;
    for (unsigned i = 0; i < mdlen && i < 32; i++)
        snprintf(hex + 2 * i, 3, "%02x", md[i]);
    hex[64] = '\0';
    if (size)
        *size = total;
    return HN_OK;
}

static void sync_journal(sh_journal *j)
{
    fflush(j->f);
    if (!j->memory)
        fsync(fileno(j->f));
}

/* The shortest %g text that reads back to X. */
static char *shortest(char *buf, size_t len, double x)
{
    for (int p = 6; p <= 17; p++) {
        snprintf(buf, len, "%.*g", p, x);
        if (strtod(buf, NULL) == x)
            break;
    }
    return buf;
}

static void utc_now(char *when, size_t len)
{
    time_t now = time(NULL);
    struct tm tmv;
    gmtime_r(&now, &tmv);
    strftime(when, len, "%Y-%m-%dT%H:%M:%SZ", &tmv);
}

sh_journal *sh_journal_open(const char *path, const sh_session *s, char *err, size_t errlen)
{
    struct stat st;
    if (stat(path, &st) == 0 && S_ISDIR(st.st_mode)) {
        snprintf(err, errlen, "%s is a directory, not a journal file", path);
        return NULL;
    }
    /* Only an earlier journal may be replaced: a typo must not destroy data. */
    if (stat(path, &st) == 0 && st.st_size > 0) {
        FILE *old = fopen(path, "r");
        char head[32] = "";
        if (old) {
            if (!fgets(head, sizeof head, old))
                head[0] = '\0';
            fclose(old);
        }
        if (strncmp(head, "hone-journal ", 13)) {
            snprintf(err, errlen, "%s exists and is not a hone journal; refusing to overwrite it "
                     "(choose another name or remove the file)", path);
            return NULL;
        }
    }
    sh_journal *j = calloc(1, sizeof *j);
    if (!j) {
        snprintf(err, errlen, "out of memory");
        return NULL;
    }
    snprintf(j->path, sizeof j->path, "%s", path);
    j->f = fopen(path, "w");
    if (!j->f) {
        snprintf(err, errlen, "cannot write journal %s: %s", path, strerror(errno));
        free(j);
        return NULL;
    }
    char host[256] = "unknown", when[64], cwd[2048];
    const char *user = getenv("USER");
    if (!user || !*user)
        user = getenv("LOGNAME");
    if (!user || !*user) {
        const struct passwd *pw = getpwuid(getuid());
        user = pw ? pw->pw_name : NULL;
    }
    gethostname(host, sizeof host - 1);
    host[sizeof host - 1] = '\0';
    utc_now(when, sizeof when);
    if (!getcwd(cwd, sizeof cwd))
        snprintf(cwd, sizeof cwd, "unknown");
    fprintf(j->f, "hone-journal 1\n");
    fprintf(j->f, "tool      hone %s (built %s)\n", HONE_VERSION, __DATE__);
    fprintf(j->f, "started   %s\n", when);
    fprintf(j->f, "by        %s on %s\n", user ? user : "unknown", host);
    fprintf(j->f, "cwd       %s\n", cwd);
    char a[32], l[32];
    fprintf(j->f, "settings  alpha=%s lags=%d level=%s width=%d charts=%s color=%s\n", shortest(a, sizeof a, s->alpha),
            s->lags, shortest(l, sizeof l, s->level), s->width, s->utf8 ? "utf8" : "ascii", s->color ? "yes" : "no");
    if (s->loaded || s->nmodels) {
        /* Started part-way through a session: say what was already there. */
        fprintf(j->f, "state     series from %s%s%s%s%s, %zu values, %d model%s already fitted\n", s->path,
                *s->column ? " column " : "", s->column, *s->transforms ? ", transforms " : "",
                s->transforms, s->n, s->nmodels, s->nmodels == 1 ? "" : "s");
        if (s->loaded && s->path[0] != '(')
            sh_journal_input(j, s->path);
    }
    sync_journal(j);
    return j;
}

int sh_journal_input(sh_journal *j, const char *path)
{
    char hex[65];
    long long size = 0;
    int rc = sh_sha256_file(path, hex, &size);
    if (rc != HN_OK)
        return rc;
    fprintf(j->f, "input     sha256=%s bytes=%lld path=%s\n", hex, size, path);
    sync_journal(j);
    if (j->ninputs < SH_JOURNAL_MAX_LISTED) {
        sh_journal_file *in = &j->inputs[j->ninputs++];
        snprintf(in->path, sizeof in->path, "%s", path);
        memcpy(in->sha256, hex, sizeof in->sha256);
        in->bytes = size;
    }
    return HN_OK;
}

static void put_lines(FILE *f, const char *prefix, const char *text)
{
    const char *p = text;
    while (*p) {
        const char *e = strchr(p, '\n');
        size_t l = e ? (size_t)(e - p) : strlen(p);
        fprintf(f, "%s%.*s\n", prefix, (int)l, p);
        p += l + (e ? 1 : 0);
    }
}

void sh_journal_entry(sh_journal *j, const char *line, const char *output, const char *error)
{
    if (j->memory) {
        fflush(j->f);
        j->last_off = j->memlen;
    }
    /* A command line never spans lines in the journal. */
    fputs("> ", j->f);
    for (const char *p = line; *p; p++)
        fputc(*p == '\n' || *p == '\r' ? ' ' : *p, j->f);
    fputc('\n', j->f);
    put_lines(j->f, "| ", output);
    if (error) {
        fputs("! ", j->f);
        for (const char *p = error; *p; p++)
            fputc(*p == '\n' ? ' ' : *p, j->f);
        fputc('\n', j->f);
    } else {
        fputs("= ok\n", j->f);
    }
    sync_journal(j);
}

const char *sh_journal_path(const sh_journal *j) { return j->path; }

const sh_journal_file *sh_journal_inputs(const sh_journal *j, int *n)
{
    *n = j->ninputs;
    return j->inputs;
}

sh_journal *sh_journal_open_memory(const char *label)
{
    sh_journal *j = calloc(1, sizeof *j);
    if (!j)
        return NULL;
    j->memory = 1;
    snprintf(j->path, sizeof j->path, "%s", label ? label : "(memory)");
    j->f = open_memstream(&j->mem, &j->memlen);
    if (!j->f) {
        free(j);
        return NULL;
    }
    return j;
}

const char *sh_journal_last(sh_journal *j, size_t *len)
{
    if (!j->memory) {
        if (len)
            *len = 0;
        return "";
    }
    fflush(j->f);
    if (!j->mem || j->last_off > j->memlen) {
        if (len)
            *len = 0;
        return "";
    }
    if (len)
        *len = j->memlen - j->last_off;
    return j->mem + j->last_off;
}

void sh_journal_close(sh_journal *j)
{
    if (!j)
        return;
    if (j->f) {
        if (!j->memory) {
            char when[64];
            utc_now(when, sizeof when);
            fprintf(j->f, "ended     %s\n", when);
        }
        sync_journal(j);
        fclose(j->f);
    }
    free(j->mem);
    free(j);
}
