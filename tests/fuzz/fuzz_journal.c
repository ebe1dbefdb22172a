/* fuzz_journal.c - libFuzzer target: arbitrary bytes through the journal reader.
 *
 * Built and run by 'make fuzz'.  Whatever the bytes, sh_jdoc_parse must
 * return, and every span it reports must lie inside the text it copied. */
#include "hn_status.h"
#include "sh_journal_read.h"

#include <stdint.h>
#include <stdlib.h>
#include <string.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static void need_span(const sh_jdoc *d, size_t off, size_t n)
{
    if (off > d->len || n > d->len - off)
        abort();
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    sh_jdoc d;
    char err[512], buf[256];
    long errline = -1;
    memset(&d, 0, sizeof d);
    err[0] = '\0';
    int rc = sh_jdoc_parse((const char *)data, size, &d, err, sizeof err, &errline);
    if (rc == HN_OK) {
        if (!d.text || d.len != size || memcmp(d.text, data, size) != 0 || d.text[size] != '\0')
            abort();
        need_span(&d, d.tool_off, d.tool_len);
        need_span(&d, d.started_off, d.started_len);
        need_span(&d, d.by_off, d.by_len);
        need_span(&d, d.settings_off, d.settings_len);
        need_span(&d, d.cwd_off, d.cwd_len);
        need_span(&d, d.state_off, d.state_len);
        need_span(&d, d.ended_off, d.ended_len);
        if (d.nentries < 0 || d.ninputs < 0 || (d.nentries && !d.entries) || (d.ninputs && !d.inputs))
            abort();
        for (int i = 0; i < d.nentries; i++) {
            const sh_jentry *e = &d.entries[i];
            need_span(&d, e->cmd_off, e->cmd_len);
            need_span(&d, e->raw_off, e->raw_len);
            need_span(&d, e->err_off, e->err_len);
            if (e->status < SH_JENTRY_OK || e->status > SH_JENTRY_INCOMPLETE || e->line < 1 ||
                e->end_line < e->line || e->end_line > d.nlines ||
                (e->status == SH_JENTRY_INCOMPLETE && i != d.nentries - 1))
                abort();
            sh_jdoc_span(&d, e->cmd_off, e->cmd_len, buf, sizeof buf);
        }
        if (d.truncated != (d.nentries > 0 && d.entries[d.nentries - 1].status == SH_JENTRY_INCOMPLETE))
            abort();
        for (int i = 0; i < d.ninputs; i++) {
            const sh_jinput *in = &d.inputs[i];
            need_span(&d, in->path_off, in->path_len);
            if (strlen(in->sha256) != 64 || in->before < 0 || in->before > d.nentries)
                abort();
        }
        sh_jdoc_setting(&d, "alpha", buf, sizeof buf);
        sh_jdoc_setting(&d, "", buf, sizeof buf);
    } else if (!err[0]) {
        abort(); /* every refusal says why */
    }
    sh_jdoc_free(&d);
    sh_jdoc_free(&d); /* repeated frees are promised to be harmless */
    return 0;
}
