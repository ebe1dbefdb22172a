/* test_commands_doc.c - docs/commands.md holds exactly the reference that the
 * command table generates, so the two cannot drift apart.  After a change to
 * the table, regenerate the file with:
 *   build/tests/test_commands_doc --write docs/commands.md */
#include "testutil.h"
#include "sh_cmddoc.h"
#include "sh_cmd.h"

static char *generated(void)
{
    char *buf = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&buf, &len);
    assert_non_null(f);
    assert_int_equal(sh_cmddoc_markdown(f), 0);
    fclose(f);
    return buf;
}

static char *slurp(const char *path)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return NULL;
    char *buf = NULL;
    size_t len = 0, k;
    FILE *m = open_memstream(&buf, &len);
    char chunk[8192];
    while ((k = fread(chunk, 1, sizeof chunk, f)) > 0)
        fwrite(chunk, 1, k, m);
    fclose(m);
    fclose(f);
    return buf;
}

static void test_reference_matches_table(void **state)
{
    (void)state;
    char *doc = slurp("docs/commands.md");
    if (!doc) {
        print_error("docs/commands.md not found (run from the top of the tree)\n");
        fail();
    }
    char *gen = generated();
    char *b = strstr(doc, SH_CMDDOC_BEGIN);
    char *e = b ? strstr(b, SH_CMDDOC_END) : NULL;
    if (!b || !e) {
        print_error("docs/commands.md lacks the generated section markers\n");
        fail();
    }
    size_t have = (size_t)(e - b) + strlen(SH_CMDDOC_END) + 1;
    if (strlen(gen) != have || memcmp(gen, b, have)) {
        print_error("docs/commands.md is out of date with the command table; regenerate with\n"
                    "  build/tests/test_commands_doc --write docs/commands.md\n");
        fail();
    }
    free(gen);
    free(doc);
}

/* Every command and every option appears in the generated text. */
static void test_reference_complete(void **state)
{
    (void)state;
    char *gen = generated();
    int n;
    const sh_command *t = sh_command_table(&n);
    assert_true(n > 10);
    for (int i = 0; i < n; i++) {
        char want[128];
        snprintf(want, sizeof want, "\n### %s\n", t[i].name);
        assert_non_null(strstr(gen, want));
        for (int o = 0; o < SH_MAX_OPTIONS && t[i].options[o] && !sh_command_free_text(&t[i]); o++) {
            snprintf(want, sizeof want, "`%s=`", t[i].options[o]);
            assert_non_null(strstr(gen, want));
        }
    }
    free(gen);
}

/* --write FILE: replace the generated section of FILE (keeping the rest). */
static int write_doc(const char *path)
{
    char *doc = slurp(path);
    char *gen = NULL;
    size_t glen = 0;
    FILE *m = open_memstream(&gen, &glen);
    if (!m || sh_cmddoc_markdown(m))
        return 1;
    fclose(m);
    char *b = doc ? strstr(doc, SH_CMDDOC_BEGIN) : NULL;
    char *e = b ? strstr(b, SH_CMDDOC_END) : NULL;
    FILE *f = fopen(path, "w");
    if (!f)
        return 1;
    if (b && e) {
        fwrite(doc, 1, (size_t)(b - doc), f);
        fputs(gen, f);
        const char *rest = e + strlen(SH_CMDDOC_END);
        if (*rest == '\n')
            rest++;
        fputs(rest, f);
    } else {
        if (doc)
            fputs(doc, f);
        fputs(gen, f);
    }
    free(doc);
    free(gen);
    return fclose(f) != 0;
}

int main(int argc, char **argv)
{
    if (argc == 3 && !strcmp(argv[1], "--write"))
        return write_doc(argv[2]);
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_reference_matches_table),
        cmocka_unit_test(test_reference_complete),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
