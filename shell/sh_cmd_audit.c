/* sh_cmd_audit.c - the audit commands: record, note, replay (with verify). */
#include "sh_handlers.h"
#include "sh_journal.h"
#include "sh_journal_read.h"
#include "sh_notes.h"
#include "hn_status.h"
#include "fit_forecast.h"

#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#define MAX_REPLAY_DEPTH 4

/* ---- record ------------------------------------------------------------- */

static int cmd_record(sh_session *s, sh_words *w)
{
    int ai = sh_arg(w, 0);
    if (ai < 0) {
        if (s->journal)
            sh_printf(s, "recording to %s\n", sh_journal_path(s->journal));
        else
            sh_printf(s, "not recording (record FILE starts a journal)\n");
        sh_json_kbool(&s->j, "recording", s->journal != NULL);
        if (s->journal)
            sh_json_kstring(&s->j, "journal", sh_journal_path(s->journal));
        return 0;
    }
    const char *arg = w->word[ai];
    if (!strcmp(arg, "off")) {
        if (!s->journal)
            return sh_fail(s, ai, "not recording");
        char path[1024];
        snprintf(path, sizeof path, "%s", sh_journal_path(s->journal));
        sh_journal_close(s->journal);
        s->journal = NULL;
        sh_printf(s, "journal %s closed\n", path);
        sh_json_kstring(&s->j, "journal", path);
        sh_json_kbool(&s->j, "recording", 0);
        return 0;
    }
    if (s->replaying)
        return sh_fail(s, 0, "record cannot be started during a replay");
    if (s->journal)
        return sh_fail(s, ai, "already recording to %s ('record off' first)", sh_journal_path(s->journal));
    char err[1200];
    s->journal = sh_journal_open(arg, s, err, sizeof err);
    if (!s->journal)
        return sh_fail(s, ai, "%s", err);
    sh_printf(s, "recording to %s (every command and its output; 'record off' stops)\n", arg);
    if (s->loaded || s->nmodels)
        sh_printf(s, "  note: the session already holds data or models; the journal says so, but a\n"
                     "  replay starts empty, so record from the start of a session for a full audit\n");
    sh_json_kstring(&s->j, "journal", arg);
    sh_json_kbool(&s->j, "recording", 1);
    return 0;
}

/* ---- note --------------------------------------------------------------- */

static int cmd_note(sh_session *s, sh_words *w)
{
    int n;
    if (w->n <= 1) {
        const sh_note *v = sh_notes_get(s, &n);
        if (!n)
            sh_printf(s, "no notes yet (note TEXT adds one)\n");
        sh_json_key(&s->j, "notes");
        sh_json_begin_array(&s->j);
        for (int i = 0; i < n; i++) {
            if (v[i].model)
                sh_printf(s, "  %2d  (model %d)  %s\n", i + 1, v[i].model, v[i].text);
            else
                sh_printf(s, "  %2d  %s\n", i + 1, v[i].text);
            sh_json_string(&s->j, v[i].text);
        }
        sh_json_end_array(&s->j);
        return 0;
    }
    char text[2048] = "";
    for (int i = 1; i < w->n; i++) {      /* free text: every word, '=' included */
        size_t l = strlen(text);
        snprintf(text + l, sizeof text - l, "%s%s", i > 1 ? " " : "", w->word[i]);
    }
    int model = s->current >= 0 && s->current < s->nmodels ? s->models[s->current].id : 0;
    if (sh_notes_add(s, model, text))
        return sh_fail(s, -1, "out of memory");
    sh_notes_get(s, &n);
    if (model)
        sh_printf(s, "note %d kept (about model %d)\n", n, model);
    else
        sh_printf(s, "note %d kept\n", n);
    sh_json_kstring(&s->j, "note", text);
    sh_json_kint(&s->j, "model", model);
    return 0;
}

/* ---- replay --------------------------------------------------------------- */

/* Send standard output and error to /dev/null (verify runs quietly). */
static void quiet_begin(int saved[2])
{
    fflush(stdout);
    fflush(stderr);
    saved[0] = dup(STDOUT_FILENO);
    saved[1] = dup(STDERR_FILENO);
    int dn = open("/dev/null", O_WRONLY);
    if (dn >= 0) {
        dup2(dn, STDOUT_FILENO);
        dup2(dn, STDERR_FILENO);
        close(dn);
    }
}

static void quiet_end(int saved[2])
{
    fflush(stdout);
    fflush(stderr);
    if (saved[0] >= 0) {
        dup2(saved[0], STDOUT_FILENO);
        close(saved[0]);
    }
    if (saved[1] >= 0) {
        dup2(saved[1], STDERR_FILENO);
        close(saved[1]);
    }
}

/* Is PATH one of the words of a command recorded before entry E (e.g. a file
 * the session itself wrote with file=PATH)? */
static int written_before(const sh_jdoc *d, int e, const char *path)
{
    char cmd[4096];
    size_t pl = strlen(path);
    for (int k = 0; k < e && k < d->nentries; k++) {
        sh_jdoc_span(d, d->entries[k].cmd_off, d->entries[k].cmd_len, cmd, sizeof cmd);
        for (char *p = strstr(cmd, path); p; p = strstr(p + 1, path)) {
            int start_ok = p == cmd || p[-1] == ' ' || p[-1] == '=' || p[-1] == '"';
            int end_ok = p[pl] == '\0' || p[pl] == ' ' || p[pl] == '"';
            if (start_ok && end_ok)
                return 1;
        }
    }
    return 0;
}

/* Compare input I of D with the file now.  0 when it matches; otherwise a
 * description in MSG and -1. */
static int input_matches(const sh_jdoc *d, const sh_jinput *in, char *msg, size_t len)
{
    char path[1024], hex[65];
    long long bytes = 0;
    sh_jdoc_span(d, in->path_off, in->path_len, path, sizeof path);
    if (sh_sha256_file(path, hex, &bytes) != HN_OK) {
        snprintf(msg, len, "%s (journal line %ld): cannot be read now; the journal recorded sha256 %.16s... (%lld bytes)",
                 path, in->line, in->sha256, in->bytes);
        return -1;
    }
    if (strcmp(hex, in->sha256) || bytes != in->bytes) {
        snprintf(msg, len, "%s (journal line %ld) has changed:\n      journal sha256 %s  %lld bytes\n      now     sha256 %s  %lld bytes",
                 path, in->line, in->sha256, in->bytes, hex, bytes);
        return -1;
    }
    return 0;
}

/* First line where the texts A and B differ; fills the two lines and
 * returns the 0-based line index within the entry. */
static int first_diff(const char *a, size_t la, const char *b, size_t lb, char *oa, char *ob, size_t olen)
{
    size_t i = 0, j = 0;
    int line = 0;
    for (;;) {
        size_t ea = i, eb = j;
        while (ea < la && a[ea] != '\n') ea++;
        while (eb < lb && b[eb] != '\n') eb++;
        size_t ca = ea - i, cb = eb - j;          /* content lengths, a CR before the LF ignored */
        if (ca && a[ea - 1] == '\r') ca--;
        if (cb && b[eb - 1] == '\r') cb--;
        if (ca != cb || memcmp(a + i, b + j, ca) || (i >= la) != (j >= lb)) {
            snprintf(oa, olen, "%.*s", i < la ? (int)ca : 0, i < la ? a + i : "");
            snprintf(ob, olen, "%.*s", j < lb ? (int)cb : 0, j < lb ? b + j : "");
            if (i >= la) snprintf(oa, olen, "(nothing: the entry ended)");
            if (j >= lb) snprintf(ob, olen, "(nothing: the entry ended)");
            return line;
        }
        if (ea >= la && eb >= lb)
            return -1;
        i = ea + 1;
        j = eb + 1;
        line++;
    }
}

static void free_models(sh_session *s)
{
    for (int i = 0; i < s->nmodels; i++) {
        fit_result_free(&s->models[i].fit);
        if (s->models[i].checked)
            diag_battery_free(&s->models[i].battery);
    }
    free(s->models);
    s->models = NULL;
    s->nmodels = s->cap = 0;
    s->current = -1;
}

/* Let S take over the data, models and settings of the replayed session T,
 * keeping its own output, journal and terminal fields.  T is left empty. */
static void adopt(sh_session *s, sh_session *t)
{
    free_models(s);
    free(s->raw);
    free(s->y);
    fit_forecast_free(s->last_forecast);
    sh_notes_clear(s);              /* T's notes come with the struct copy below */
    sh_session keep = *s;
    sh_json_free(&t->j);
    if (t->journal)
        sh_journal_close(t->journal);
    *s = *t;
    s->out = keep.out;
    s->j = keep.j;
    s->json = keep.json;
    s->interactive = keep.interactive;
    s->color = keep.color;
    s->utf8 = keep.utf8;
    s->width = keep.width;
    s->journal = keep.journal;
    s->replaying = keep.replaying;
    s->quit = 0;
    memcpy(s->err, keep.err, sizeof s->err);
    s->err_word = keep.err_word;
    memset(t, 0, sizeof *t);
}

static void apply_settings(sh_session *t, const sh_jdoc *d)
{
    char v[64];
    double x;
    long k;
    if (sh_jdoc_setting(d, "alpha", v, sizeof v) && !sh_parse_double(v, &x) && x > 0 && x < 0.5)
        t->alpha = x;
    if (sh_jdoc_setting(d, "lags", v, sizeof v) && !sh_parse_long(v, &k) && k >= 0 && k <= 400)
        t->lags = (int)k;
    if (sh_jdoc_setting(d, "level", v, sizeof v) && !sh_parse_double(v, &x) && x > 50 && x < 100)
        t->level = x;
    if (sh_jdoc_setting(d, "width", v, sizeof v) && !sh_parse_long(v, &k) && k >= 40 && k <= 400)
        t->width = (int)k;
    if (sh_jdoc_setting(d, "charts", v, sizeof v))
        t->utf8 = !strcmp(v, "utf8");
    if (sh_jdoc_setting(d, "color", v, sizeof v))
        t->color = !strcmp(v, "yes");
}

static int cmd_replay(sh_session *s, sh_words *w)
{
    int fi = sh_arg(w, 0), vi = sh_arg(w, 1);
    const char *path = w->word[fi];
    int verify = 0;
    if (vi >= 0) {
        if (strcmp(w->word[vi], "verify"))
            return sh_fail(s, vi, "replay takes 'verify' or nothing after the journal name");
        verify = 1;
    }
    if (s->replaying >= MAX_REPLAY_DEPTH)
        return sh_fail(s, 0, "replays nested more than %d deep", MAX_REPLAY_DEPTH);

    sh_jdoc d;
    char err[512];
    long eline = 0;
    int rc = sh_jdoc_read(path, &d, err, sizeof err, &eline);
    if (rc != HN_OK) {
        sh_jdoc_free(&d);
        if (rc == HN_EPARSE)
            return sh_fail(s, fi, "%s:%ld: %s; nothing replayed", path, eline, err);
        return sh_fail(s, fi, "%s; nothing replayed", *err ? err : hn_strerror(rc));
    }

    /* A recording session keeps the replayed journal's hash: the state it
     * now builds rests on that journal. */
    if (s->journal)
        sh_journal_input(s->journal, path);

    /* Inputs first: a changed file stops the replay before anything runs. */
    int bad = 0, deferred = 0;
    char msg[1400];
    for (int i = 0; i < d.ninputs; i++) {
        char p[1024];
        struct stat st;
        sh_jdoc_span(&d, d.inputs[i].path_off, d.inputs[i].path_len, p, sizeof p);
        if (stat(p, &st) != 0 && written_before(&d, d.inputs[i].before, p)) {
            deferred++;
            continue;
        }
        if (input_matches(&d, &d.inputs[i], msg, sizeof msg)) {
            sh_printf(s, "  input %s\n", msg);
            bad++;
        }
    }
    if (bad) {
        sh_jdoc_free(&d);
        return sh_fail(s, fi, "%d input file%s of %s differ%s from the journal; nothing replayed", bad,
                       bad == 1 ? "" : "s", path, bad == 1 ? "s" : "");
    }

    int complete = 0;
    for (int e = 0; e < d.nentries; e++)
        complete += d.entries[e].status != SH_JENTRY_INCOMPLETE;

    sh_session t;
    sh_session_init(&t);
    apply_settings(&t, &d);
    t.json = verify ? 0 : s->json;
    t.replaying = s->replaying + 1;
    t.journal = sh_journal_open_memory(path);
    if (!t.journal) {
        sh_session_free(&t);
        sh_jdoc_free(&d);
        return sh_fail(s, -1, "out of memory");
    }

    int saved[2] = { -1, -1 };
    if (verify)
        quiet_begin(saved);
    int ran = 0, same = 0, diff_at = -1, stopped = 0, input_bad = 0;
    char da[600] = "", db[600] = "";
    long diff_line = 0;
    for (int e = 0; e < d.nentries; e++) {
        const sh_jentry *en = &d.entries[e];
        if (en->status == SH_JENTRY_INCOMPLETE)
            break;
        if (sh_interrupted) {
            stopped = 1;
            break;
        }
        for (int i = 0; deferred && i < d.ninputs; i++)
            if (d.inputs[i].before == e && input_matches(&d, &d.inputs[i], msg, sizeof msg)) {
                input_bad = 1;
                break;
            }
        if (input_bad)
            break;
        char where[1100];
        char *cmd = malloc(en->cmd_len + 1);
        if (!cmd) {
            stopped = 1;
            break;
        }
        sh_jdoc_span(&d, en->cmd_off, en->cmd_len, cmd, en->cmd_len + 1);
        snprintf(where, sizeof where, "%s:%ld", path, en->line);
        if (!verify && !s->json) {
            printf("> %s\n", cmd);
            fflush(stdout);
        }
        sh_exec_line(&t, cmd, where);
        free(cmd);
        ran++;
        size_t glen = 0;
        const char *got = sh_journal_last(t.journal, &glen);
        const char *want = d.text + en->raw_off;
        int k = first_diff(want, en->raw_len, got, glen, da, db, sizeof da);
        if (k < 0) {
            same++;
        } else if (diff_at < 0) {
            diff_at = e;
            diff_line = en->line + k;
            if (verify)
                break;
        }
        if (t.quit)
            break;
    }
    if (verify)
        quiet_end(saved);

    int fail = 0;
    char cmd0[4096] = "";
    if (input_bad) {
        sh_printf(s, "  input %s\n", msg);
        sh_fail(s, fi, "an input file of %s changed during the replay; stopped after %d command%s", path, ran,
                ran == 1 ? "" : "s");
        fail = 1;
    } else if (stopped) {
        sh_fail(s, -1, "replay of %s interrupted after %d of %d commands", path, ran, complete);
        fail = 1;
    } else if (diff_at >= 0) {
        const sh_jentry *en = &d.entries[diff_at];
        sh_jdoc_span(&d, en->cmd_off, en->cmd_len, cmd0, sizeof cmd0);
        if (verify) {
            sh_printf(s, "replay of %s differs at command %d of %d (journal line %ld):\n", path, diff_at + 1,
                      complete, en->line);
            sh_printf(s, "  > %s\n", cmd0);
            sh_printf(s, "  journal line %ld:  %s\n", diff_line, da);
            sh_printf(s, "  replay gives:%*s  %s\n", (int)snprintf(NULL, 0, "%ld", diff_line) + 1, "", db);
            if (diff_at)
                sh_printf(s, "  the %d command%s before it reproduced\n", diff_at, diff_at == 1 ? "" : "s");
            sh_fail(s, -1, "replay differs from the journal at line %ld (command '%.200s' of line %ld)", diff_line,
                    cmd0, en->line);
            fail = 1;
        } else {
            sh_printf(s, "replayed %d command%s from %s; %d output%s differ%s from the journal (first at line %ld);"
                         " 'replay %s verify' shows the difference\n", ran, ran == 1 ? "" : "s", path,
                      ran - same, ran - same == 1 ? "" : "s", ran - same == 1 ? "s" : "", diff_line, path);
        }
    } else if (verify) {
        sh_printf(s, "verified %s: all %d command%s reproduced%s", path, ran, ran == 1 ? "" : "s",
                  d.ninputs ? "; inputs matched their SHA-256" : "");
        sh_printf(s, "\n");
    } else {
        sh_printf(s, "replayed %d command%s from %s; every output matched the journal\n", ran, ran == 1 ? "" : "s",
                  path);
    }
    if (d.truncated) {
        const sh_jentry *en = &d.entries[d.nentries - 1];
        sh_jdoc_span(&d, en->cmd_off, en->cmd_len, cmd0, sizeof cmd0);
        sh_printf(s, "  the last entry (journal line %ld, '%.200s') is incomplete: the recording ended while"
                     " writing it, so it was not replayed\n", en->line, cmd0);
    } else if (!d.ended_len && d.nentries) {
        sh_printf(s, "  the journal has no 'ended' line: the recording session did not close it (still running,"
                     " or stopped abruptly); every entry in it is complete\n");
    }
    if (d.state_len) {
        char st[600];
        sh_printf(s, "  caution: recording began part-way through a session (state: %s)\n",
                  sh_jdoc_span(&d, d.state_off, d.state_len, st, sizeof st));
    }

    sh_json_kstring(&s->j, "journal", path);
    sh_json_kbool(&s->j, "verify", verify);
    sh_json_kint(&s->j, "commands", complete);
    sh_json_kint(&s->j, "replayed", ran);
    sh_json_kint(&s->j, "reproduced", same);
    sh_json_kbool(&s->j, "truncated", d.truncated);
    if (diff_at >= 0) {
        sh_json_kint(&s->j, "first_difference_line", diff_line);
        sh_json_kstring(&s->j, "first_difference_command", cmd0);
    }
    if (!verify && !fail)
        adopt(s, &t);
    sh_notes_clear(&t);
    sh_session_free(&t);
    sh_jdoc_free(&d);
    return fail ? -1 : 0;
}

const sh_command sh_cmds_audit[] = {
    { "record", "record [FILE|off]", "record the session to an audit journal, or stop recording",
      { NULL }, 0, 1, cmd_record,
      "  The journal is plain text: a header (tool version, start time, user,\n"
      "  host, directory, settings), the SHA-256 and size of every file read,\n"
      "  and each command with its full output and '= ok' or '! error'.  It is\n"
      "  synced to disk after every command.  'record off' closes it; 'record'\n"
      "  alone says where the session is recording.  hone --record FILE does\n"
      "  the same from the first command.\n" },
    { "note", "note [TEXT...]", "keep the analyst's own words in the journal and the report",
      { SH_FREE_TEXT, NULL }, 0, 60, cmd_note,
      "  The note is tied to the current model.  'note' alone lists the notes.\n"
      "  Everything after 'note' is kept as written, '=' included.\n" },
    { "replay", "replay JOURNAL [verify]", "re-run the commands of a journal; verify compares every output",
      { NULL }, 1, 2, cmd_replay,
      "  The input files are checked against the journal's SHA-256 first; if\n"
      "  one changed, nothing runs.  The commands run in a fresh session with\n"
      "  the journal's settings; without 'verify' their output is shown and the\n"
      "  replayed session then replaces the current one.  With 'verify' the\n"
      "  output of every command is compared with the recorded text and the\n"
      "  first difference is shown with its journal line; the current session\n"
      "  is left as it was.  A journal cut short (the recording process was\n"
      "  killed) replays every complete entry and says that the last was not.\n" },
    { NULL, NULL, NULL, { NULL }, 0, 0, NULL, NULL }
};
