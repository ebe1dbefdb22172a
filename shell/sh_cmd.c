/* sh_cmd.c - the joined command table, look-up, and the misc commands. */
#include "sh_cmd.h"
#include "sh_handlers.h"

#include <stdlib.h>
#include <string.h>

static const sh_command *const groups[] = { sh_cmds_data, sh_cmds_prefit, sh_cmds_model, sh_cmds_forecast, sh_cmds_sim, sh_cmds_output, sh_cmds_audit, sh_cmds_advise, sh_cmds_misc };

#define MAX_COMMANDS 64
static sh_command table[MAX_COMMANDS];
static int ntable = -1;

const sh_command *sh_command_table(int *n)
{
    if (ntable < 0) {
        ntable = 0;
        for (size_t g = 0; g < sizeof groups / sizeof groups[0]; g++)
            for (const sh_command *c = groups[g]; c->name && ntable < MAX_COMMANDS; c++)
                table[ntable++] = *c;
    }
    if (n)
        *n = ntable;
    return table;
}

const sh_command *sh_command_find(const char *name)
{
    int n;
    const sh_command *t = sh_command_table(&n), *hit = NULL;
    size_t len = strlen(name);
    for (int i = 0; i < n; i++)
        if (!strcmp(t[i].name, name))
            return &t[i];
    if (len < 2)
        return NULL;
    for (int i = 0; i < n; i++)
        if (!strncmp(t[i].name, name, len)) {
            if (hit)
                return NULL;            /* ambiguous prefix */
            hit = &t[i];
        }
    return hit;
}

/* Levenshtein distance, small strings only. */
static int distance(const char *a, const char *b)
{
    int la = (int)strlen(a), lb = (int)strlen(b);
    if (la > 31 || lb > 31)
        return 99;
    int d[32][32];
    for (int i = 0; i <= la; i++) d[i][0] = i;
    for (int j = 0; j <= lb; j++) d[0][j] = j;
    for (int i = 1; i <= la; i++)
        for (int j = 1; j <= lb; j++) {
            int c = d[i - 1][j - 1] + (a[i - 1] != b[j - 1]);
            if (d[i - 1][j] + 1 < c) c = d[i - 1][j] + 1;
            if (d[i][j - 1] + 1 < c) c = d[i][j - 1] + 1;
            d[i][j] = c;
        }
    return d[la][lb];
}

const char *sh_command_suggest(const char *name)
{
    int n, best = 3;
    const sh_command *t = sh_command_table(&n);
    const char *hit = NULL;
    for (int i = 0; i < n; i++) {
        int d = distance(name, t[i].name);
        if (d < best) {
            best = d;
            hit = t[i].name;
        }
    }
    return hit;
}

/* ---- set, help, quit ---------------------------------------------------- */

static int cmd_set(sh_session *s, sh_words *w)
{
    const char *key = w->word[sh_arg(w, 0)];
    int vi = sh_arg(w, 1);
    const char *val = w->word[vi];
    double x;
    long k;
    if (!strcmp(key, "alpha")) {
        if (sh_parse_double(val, &x) || !(x > 0 && x < 0.5))
            return sh_fail(s, vi, "alpha must be a number between 0 and 0.5, e.g. 0.05");
        s->alpha = x;
    } else if (!strcmp(key, "lags")) {
        if (sh_parse_long(val, &k) || k < 0 || k > 400)
            return sh_fail(s, vi, "lags must be a whole number from 0 (the rule) to 400");
        s->lags = (int)k;
    } else if (!strcmp(key, "level")) {
        if (sh_parse_double(val, &x) || !(x > 50 && x < 100))
            return sh_fail(s, vi, "level must be a percentage between 50 and 100, e.g. 95");
        s->level = x;
    } else if (!strcmp(key, "width")) {
        if (sh_parse_long(val, &k) || k < 40 || k > 400)
            return sh_fail(s, vi, "width must be a whole number from 40 to 400");
        s->width = (int)k;
    } else {
        return sh_fail(s, sh_arg(w, 0), "unknown setting '%s' (settings: alpha, lags, level, width)", key);
    }
    sh_printf(s, "%s = %s\n", key, val);
    sh_json_kstring(&s->j, "key", key);
    sh_json_kstring(&s->j, "value", val);
    return 0;
}

static int cmd_help(sh_session *s, sh_words *w)
{
    int n;
    const sh_command *t = sh_command_table(&n);
    if (sh_nargs(w) == 1) {
        int ai = sh_arg(w, 0);
        const sh_command *c = sh_command_find(w->word[ai]);
        if (!c)
            return sh_fail(s, ai, "no command '%s' ('help' lists them)", w->word[ai]);
        sh_printf(s, "%s\n  %s\n\n%s\n", c->usage, c->summary, c->help ? c->help : "");
        sh_json_kstring(&s->j, "topic", c->name);
        sh_json_kstring(&s->j, "usage", c->usage);
        return 0;
    }
    sh_printf(s, "commands (help NAME for details):\n");
    sh_json_key(&s->j, "commands");
    sh_json_begin_array(&s->j);
    for (int i = 0; i < n; i++) {
        if (strlen(t[i].usage) <= 36)
            sh_printf(s, "  %-36s  %s\n", t[i].usage, t[i].summary);
        else
            sh_printf(s, "  %s\n  %-36s  %s\n", t[i].usage, "", t[i].summary);
        sh_json_string(&s->j, t[i].name);
    }
    sh_json_end_array(&s->j);
    sh_printf(s, "one command per line; '#' starts a comment; options are KEY=VALUE.\n");
    return 0;
}

static int cmd_quit(sh_session *s, sh_words *w)
{
    (void)w;
    s->quit = 1;
    return 0;
}

const sh_command sh_cmds_misc[] = {
    { "set", "set KEY VALUE", "change a setting: alpha, lags, level, width", { NULL }, 2, 2, cmd_set,
      "  alpha  level of every check and of the overall verdict (default 0.05)\n"
      "  lags   portmanteau lags m; 0 means the rule min(10, n/5) (default 0)\n"
      "  level  forecast interval level in percent (default 95)\n"
      "  width  chart width in columns (default: the terminal's)\n" },
    { "help", "help [COMMAND]", "list the commands, or explain one", { NULL }, 0, 1, cmd_help, NULL },
    { "quit", "quit", "end the session (also Ctrl-D)", { NULL }, 0, 0, cmd_quit, NULL },
    { NULL, NULL, NULL, { NULL }, 0, 0, NULL, NULL }
};
