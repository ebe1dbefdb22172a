/* sh_cmddoc.c - write the command reference from the command table. */
#include "sh_cmddoc.h"
#include "sh_cmd.h"

#include <string.h>

int sh_cmddoc_markdown(FILE *f)
{
    int n;
    const sh_command *t = sh_command_table(&n);
    fprintf(f, "%s\n\n", SH_CMDDOC_BEGIN);
    fprintf(f, "| command | what it does |\n|---|---|\n");
    for (int i = 0; i < n; i++)
        fprintf(f, "| [`%s`](#%s) | %s |\n", t[i].name, t[i].name, t[i].summary);
    for (int i = 0; i < n; i++) {
        const sh_command *c = &t[i];
        fprintf(f, "\n### %s\n\n```\n%s\n```\n\n%c%s.\n", c->name, c->usage,
                c->summary[0] >= 'a' && c->summary[0] <= 'z' ? c->summary[0] - 'a' + 'A' : c->summary[0],
                c->summary + 1);
        if (c->options[0] && !sh_command_free_text(c)) {
            fprintf(f, "\nOptions:");
            for (int o = 0; o < SH_MAX_OPTIONS && c->options[o]; o++)
                fprintf(f, "%s `%s=`", o ? "," : "", c->options[o]);
            fprintf(f, ".\n");
        }
        if (c->max_args == 0)
            fprintf(f, "\nTakes no positional arguments.\n");
        else if (c->min_args == c->max_args)
            fprintf(f, "\nTakes %d positional argument%s.\n", c->min_args, c->min_args == 1 ? "" : "s");
        else
            fprintf(f, "\nTakes %d to %d positional arguments.\n", c->min_args, c->max_args);
        if (c->help && *c->help)
            fprintf(f, "\n```\n%s%s```\n", c->help, c->help[strlen(c->help) - 1] == '\n' ? "" : "\n");
    }
    fprintf(f, "\n%s\n", SH_CMDDOC_END);
    return ferror(f) ? -1 : 0;
}
