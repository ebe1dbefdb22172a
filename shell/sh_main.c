/* sh_main.c - the hone program: options, then the prompt or a command file. */
#include "sh_repl.h"
#include "sh_journal.h"
#include "sh_batch.h"
#include "sh_alloc.h"

#include <gsl/gsl_errno.h>
#include <locale.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/ioctl.h>
#include <unistd.h>

/* Idle OpenMP threads sleep at once instead of spinning, unless the user
 * has chosen (OMP_WAIT_POLICY in the environment).  hone's parallel regions
 * are coarse (a stretch of a CSV file, a battery, a likelihood pass), so a
 * sleeping thread's wake-up costs little, while on shared and virtual
 * machines a spinning one stalls the region it waits for: measured on a
 * 2-core virtual machine, load and fit of 10^5 values ran 27 to 41 %
 * faster, of 10^6 values 1 to 7 %, a scan on two threads 15 %.  The runtime reads its environment in its own
 * constructor, which runs after this one because the program links it
 * statically (Makefile). */
__attribute__((constructor(101))) static void default_wait_policy(void)
{
    setenv("OMP_WAIT_POLICY", "passive", 0);
}

static void usage(FILE *f)
{
    fprintf(f,
            "usage: hone [options] [FILE.hone]\n"
            "       hone batch --commands 'CMD; CMD' FILE.csv ...   (hone batch --help)\n"
            "  (no FILE)          interactive prompt; or commands from standard input when it is not a terminal\n"
            "  FILE, -f FILE      run a command file: commands are echoed; the first error stops (exit 1)\n"
            "  -c 'CMD; CMD'      run commands given on the command line\n"
            "  --json             print one JSON object per command on standard output\n"
            "  --keep-going       do not stop a command file at the first error (exit 1 if any failed)\n"
            "  --record JOURNAL   record the session to an audit journal (see 'help record')\n"
            "  --version, --help\n");
}

static void detect_terminal(sh_session *s)
{
    const char *lang = getenv("LC_ALL");
    if (!lang || !*lang) lang = getenv("LC_CTYPE");
    if (!lang || !*lang) lang = getenv("LANG");
    s->utf8 = lang && (strstr(lang, "UTF-8") || strstr(lang, "utf8") || strstr(lang, "UTF8"));
    s->color = isatty(STDOUT_FILENO) && !getenv("NO_COLOR");
    struct winsize ws;
    if (isatty(STDOUT_FILENO) && ioctl(STDOUT_FILENO, TIOCGWINSZ, &ws) == 0 && ws.ws_col >= 40)
        s->width = ws.ws_col;
}

int main(int argc, char **argv)
{
    const char *file = NULL, *commands = NULL, *record = NULL;
    int json = 0, keep_going = 0;

    setlocale(LC_ALL, "C");
    gsl_set_error_handler_off();
    sh_alloc_policy();
    if (argc > 1 && !strcmp(argv[1], "batch"))
        return sh_batch_main(argc - 1, argv + 1);
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        if (!strcmp(a, "--json")) json = 1;
        else if (!strcmp(a, "--keep-going")) keep_going = 1;
        else if (!strcmp(a, "--version")) { printf("hone %s\n", HONE_VERSION); return 0; }
        else if (!strcmp(a, "--help") || !strcmp(a, "-h")) { usage(stdout); return 0; }
        else if (!strcmp(a, "-c") || !strcmp(a, "-f") || !strcmp(a, "--record")) {
            if (i + 1 >= argc) {
                fprintf(stderr, "hone: %s needs an argument\n", a);
                usage(stderr);
                return 2;
            }
            if (a[1] == 'c') commands = argv[++i];
            else if (a[1] == 'f') file = argv[++i];
            else record = argv[++i];
        } else if (a[0] == '-' && a[1]) {
            fprintf(stderr, "hone: unknown option '%s'\n", a);
            usage(stderr);
            return 2;
        } else if (!file) {
            file = a;
        } else {
            fprintf(stderr, "hone: more than one command file given ('%s' and '%s')\n", file, a);
            return 2;
        }
    }
    if (commands) {
        const char *p = commands;
        while (*p == ' ' || *p == '\t' || *p == ';')
            p++;
        if (!*p) {
            fprintf(stderr, "hone: -c was given no commands\n");
            return 2;
        }
    }
    if (file && commands) {
        fprintf(stderr, "hone: give either a command file or -c, not both\n");
        return 2;
    }

    sh_session s;
    sh_session_init(&s);
    s.json = json;
    detect_terminal(&s);
    sh_install_interrupt();
    if (record) {
        char err[1200];
        s.journal = sh_journal_open(record, &s, err, sizeof err);
        if (!s.journal) {
            fprintf(stderr, "hone: %s\n", err);
            sh_session_free(&s);
            return 2;
        }
    }

    int rc = 0;
    if (commands) {
        int n = 0;
        char **cmds = sh_split_commands(commands, &n);
        if (!cmds) {
            fprintf(stderr, "hone: out of memory\n");
            rc = 1;
        }
        for (int i = 0; cmds && i < n && !s.quit; i++) {
            const char *p = cmds[i];
            while (*p == ' ' || *p == '\t') p++;
            if (!*p)
                continue;
            char where[32];
            snprintf(where, sizeof where, "-c:%d", i + 1);
            if (!json && n > 1)
            {
                printf("> %s\n", p);
                fflush(stdout);
            }
            if (sh_exec_line(&s, p, where)) {
                rc = 1;
                if (!keep_going)
                    break;
            }
        }
        if (cmds)
            sh_free_commands(cmds, n);
    } else if (file) {
        FILE *f = fopen(file, "r");
        if (!f) {
            perror(file);
            rc = 2;
        } else {
            rc = sh_run_stream(&s, f, file, keep_going);
            fclose(f);
        }
    } else if (isatty(STDIN_FILENO)) {
        s.interactive = 1;
        rc = sh_run_interactive(&s);
    } else {
        rc = sh_run_stream(&s, stdin, "<stdin>", keep_going);
    }
    sh_session_free(&s);
    return rc;
}
