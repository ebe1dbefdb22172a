/* sh_repl.c - command files and the readline prompt. */
#include "sh_repl.h"
#include "sh_cmd.h"
#include "sh_csv.h"

#include <errno.h>
#include <signal.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <readline/history.h>
#include <readline/readline.h>

#define MAX_LINE (1 << 20)   /* longest command line accepted: 1 MiB */

static void on_sigint(int sig)
{
    (void)sig;
    sh_interrupted = 1;
}

void sh_install_interrupt(void)
{
    struct sigaction sa;
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = on_sigint;
    sigemptyset(&sa.sa_mask);
    sigaction(SIGINT, &sa, NULL);
}

int sh_run_stream(sh_session *s, FILE *f, const char *name, int keep_going)
{
    char *line = NULL;
    size_t cap = 0;
    ssize_t len;
    long lineno = 0;
    int failed = 0;
    while (!s->quit && (len = getline(&line, &cap, f)) >= 0) {
        lineno++;
        char where[1200];
        snprintf(where, sizeof where, "%s:%ld", name, lineno);
        if (len > MAX_LINE) {
            fprintf(stderr, "%s: error: line of %zd bytes is longer than the limit of %d bytes\n", where, len, MAX_LINE);
            failed = 1;
            if (!keep_going)
                break;
            continue;
        }
        while (len > 0 && (line[len - 1] == '\n' || line[len - 1] == '\r'))
            line[--len] = '\0';
        if (lineno == 1 && !strncmp(line, "\xEF\xBB\xBF", 3))
            memmove(line, line + 3, (size_t)len - 2);
        const char *p = line;
        while (*p == ' ' || *p == '\t')
            p++;
        if (!*p || *p == '#')
            continue;
        if (!s->json) {
            printf("> %s\n", p);
            fflush(stdout);
        }
        if (sh_exec_line(s, p, where)) {
            failed = 1;
            if (!keep_going)
                break;
        }
        if (sh_interrupted && !keep_going) {
            fprintf(stderr, "%s: interrupted\n", where);
            failed = 1;
            break;
        }
    }
    if (ferror(f)) {
        fprintf(stderr, "%s: error: read failed: %s\n", name, strerror(errno));
        failed = 1;
    }
    free(line);
    return failed;
}

/* ---- completion --------------------------------------------------------- */

static const sh_command *completing_cmd;
static char **column_names;
static int n_column_names;

static char *dupstr(const char *s)
{
    char *d = malloc(strlen(s) + 1);
    if (d)
        strcpy(d, s);
    return d;
}

static char *command_generator(const char *text, int state)
{
    static int i;
    int n;
    const sh_command *t = sh_command_table(&n);
    if (!state)
        i = 0;
    while (i < n) {
        const char *name = t[i++].name;
        if (!strncmp(name, text, strlen(text)))
            return dupstr(name);
    }
    return NULL;
}

static char *option_generator(const char *text, int state)
{
    static int i;
    if (!state)
        i = 0;
    while (completing_cmd && i < SH_MAX_OPTIONS && completing_cmd->options[i]) {
        char buf[64];
        snprintf(buf, sizeof buf, "%s=", completing_cmd->options[i++]);
        if (!strncmp(buf, text, strlen(text)))
            return dupstr(buf);
    }
    return NULL;
}

static char *column_generator(const char *text, int state)
{
    static int i;
    const char *val = strchr(text, '=');
    size_t klen = val ? (size_t)(val - text) + 1 : 0;
    if (!state)
        i = 0;
    while (i < n_column_names) {
        const char *c = column_names[i++];
        if (!strncmp(c, text + klen, strlen(text + klen))) {
            char buf[512];
            snprintf(buf, sizeof buf, "%.*s%s", (int)klen, text, c);
            return dupstr(buf);
        }
    }
    return NULL;
}

static void free_columns(void)
{
    sh_names_free(column_names, n_column_names);
    column_names = NULL;
    n_column_names = 0;
}

static char **complete(const char *text, int start, int end)
{
    (void)end;
    rl_attempted_completion_over = 0;
    /* The command word. */
    int first = 1;
    for (int i = 0; i < start; i++)
        if (rl_line_buffer[i] != ' ' && rl_line_buffer[i] != '\t')
            first = 0;
    if (first) {
        rl_attempted_completion_over = 1;
        return rl_completion_matches(text, command_generator);
    }
    char cmd[64];
    size_t k = 0;
    const char *p = rl_line_buffer;
    while (*p == ' ' || *p == '\t') p++;
    while (*p && *p != ' ' && *p != '\t' && k + 1 < sizeof cmd) cmd[k++] = *p++;
    cmd[k] = '\0';
    completing_cmd = sh_command_find(cmd);
    if ((!strncmp(text, "column=", 7) || !strncmp(text, "time=", 5)) && completing_cmd &&
        !strcmp(completing_cmd->name, "load")) {
        /* Column names from the header of the file named on the line. */
        char file[1024] = "";
        while (*p == ' ' || *p == '\t') p++;
        k = 0;
        while (*p && *p != ' ' && *p != '\t' && k + 1 < sizeof file) file[k++] = *p++;
        file[k] = '\0';
        free_columns();
        if (*file && !strchr(file, '='))
            sh_column_names(file, &column_names, &n_column_names, NULL);
        rl_attempted_completion_over = 1;
        rl_completion_append_character = ' ';
        return rl_completion_matches(text, column_generator);
    }
    if (completing_cmd && completing_cmd->options[0] && !sh_command_free_text(completing_cmd) && !strchr(text, '/') && !strchr(text, '.')) {
        char **m = rl_completion_matches(text, option_generator);
        if (m) {
            rl_attempted_completion_over = 1;
            rl_completion_append_character = '\0';
            return m;
        }
    }
    return NULL;   /* fall back to file names */
}

static int idle_interrupt_hook(void)
{
    if (sh_interrupted) {
        sh_interrupted = 0;
        rl_replace_line("", 0);
        rl_crlf();
        rl_on_new_line();
        rl_redisplay();
    }
    return 0;
}

static const char *history_path(char *buf, size_t len)
{
    const char *h = getenv("HONE_HISTORY");
    if (h && *h)
        return h;
    const char *home = getenv("HOME");
    if (!home)
        return NULL;
    snprintf(buf, len, "%s/.hone_history", home);
    return buf;
}

int sh_run_interactive(sh_session *s)
{
    char hbuf[1100];
    const char *hist = history_path(hbuf, sizeof hbuf);
    rl_readline_name = "hone";
    rl_attempted_completion_function = complete;
    rl_completer_word_break_characters = " \t\n";   /* keep KEY=VALUE in one word */
    rl_signal_event_hook = idle_interrupt_hook;
    using_history();
    if (hist && read_history(hist) != 0)
        write_history(hist);            /* create it, so appends work */
    stifle_history(2000);
    printf("hone %s - fit, check, refine until the residuals are white noise.\n"
           "Type 'help' for the commands, 'quit' or Ctrl-D to leave.\n", HONE_VERSION);
    while (!s->quit) {
        sh_interrupted = 0;
        char *line = readline("hone> ");
        if (!line) {
            printf("\n");
            break;
        }
        const char *p = line;
        while (*p == ' ' || *p == '\t')
            p++;
        if (*p) {
            HIST_ENTRY *last = history_length ? history_get(history_base + history_length - 1) : NULL;
            if (!last || strcmp(last->line, line))
                add_history(line);
            if (hist)
                append_history(1, hist);
            sh_exec_line(s, p, NULL);
            if (sh_interrupted)
                printf("(interrupted; back at the prompt)\n");
        }
        free(line);
    }
    if (hist)
        history_truncate_file(hist, 2000);
    free_columns();
    return 0;
}
