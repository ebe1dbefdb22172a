/* test_journal_read.c - the journal parser on good, truncated and malformed
 * journals, a writer-reader round trip, and mutated bytes.  The layout is the
 * project's own (shell/sh_journal.h); no outside values are involved. */
#include "testutil.h"
#include "sh_journal_read.h"
#include "sh_journal.h"
#include "sh_session.h"
#include "hn_status.h"

#include <unistd.h>

static const char GOOD[] =
    "hone-journal 1\n"
    "tool      hone 0.1.0 (built Jan  1 2026)\n"
    "started   2026-01-01T10:00:00Z\n"
    "by        ana on desk\n"
    "cwd       /home/ana\n"
    "settings  alpha=0.05 lags=0 level=95 width=80 charts=utf8 color=no\n"
    "input     sha256=4445df814ff8b85db7fbb8dd068d5df6dc7a709bed3d1c9ab793d85261d3c160 bytes=16730 path=data/orders file.csv\n"
    "> load \"data/orders file.csv\"\n"
    "| loaded 730 values\n"
    "|   time column 'date'\n"
    "= ok\n"
    "> fit arma(9,9,9)\n"
    "! model 'arma(9,9,9)': expected ')'\n"
    "> models\n"
    "| \n"
    "| id model\n"
    "= ok\n"
    "ended     2026-01-01T10:05:00Z\n";

static char *span(const sh_jdoc *d, size_t off, size_t n)
{
    static char buf[512];
    return sh_jdoc_span(d, off, n, buf, sizeof buf);
}

static void test_good(void **state)
{
    (void)state;
    sh_jdoc d;
    char err[256], v[64];
    long line = -1;
    assert_int_equal(sh_jdoc_parse(GOOD, strlen(GOOD), &d, err, sizeof err, &line), HN_OK);
    assert_int_equal(d.version, 1);
    assert_int_equal(d.nentries, 3);
    assert_int_equal(d.ninputs, 1);
    assert_false(d.truncated);
    assert_false(d.partial_line);
    assert_string_equal(span(&d, d.by_off, d.by_len), "ana on desk");
    assert_string_equal(span(&d, d.cwd_off, d.cwd_len), "/home/ana");
    assert_string_equal(span(&d, d.ended_off, d.ended_len), "2026-01-01T10:05:00Z");
    assert_int_equal(sh_jdoc_setting(&d, "level", v, sizeof v), 1);
    assert_string_equal(v, "95");
    assert_int_equal(sh_jdoc_setting(&d, "charts", v, sizeof v), 1);
    assert_string_equal(v, "utf8");
    assert_int_equal(sh_jdoc_setting(&d, "alph", v, sizeof v), 0);

    const sh_jentry *e = d.entries;
    assert_int_equal(e[0].line, 8);
    assert_int_equal(e[0].end_line, 11);
    assert_int_equal(e[0].status, SH_JENTRY_OK);
    assert_int_equal(e[0].noutput, 2);
    assert_string_equal(span(&d, e[0].cmd_off, e[0].cmd_len), "load \"data/orders file.csv\"");
    /* the raw span is the entry exactly as written */
    assert_string_equal(span(&d, e[0].raw_off, e[0].raw_len),
                        "> load \"data/orders file.csv\"\n| loaded 730 values\n|   time column 'date'\n= ok\n");
    assert_int_equal(e[1].status, SH_JENTRY_ERROR);
    assert_int_equal(e[1].noutput, 0);
    assert_string_equal(span(&d, e[1].err_off, e[1].err_len), "model 'arma(9,9,9)': expected ')'");
    assert_int_equal(e[2].noutput, 2);
    assert_int_equal(e[2].end_line, 17);

    assert_string_equal(d.inputs[0].sha256, "4445df814ff8b85db7fbb8dd068d5df6dc7a709bed3d1c9ab793d85261d3c160");
    assert_int_equal(d.inputs[0].bytes, 16730);
    assert_int_equal(d.inputs[0].before, 0);
    assert_string_equal(span(&d, d.inputs[0].path_off, d.inputs[0].path_len), "data/orders file.csv");
    sh_jdoc_free(&d);
    sh_jdoc_free(&d);              /* twice is harmless */
}

/* The same journal saved with CRLF line ends reads the same. */
static void test_crlf(void **state)
{
    (void)state;
    size_t n = strlen(GOOD);
    char *buf = malloc(2 * n);
    assert_non_null(buf);
    size_t k = 0;
    for (size_t i = 0; i < n; i++) {
        if (GOOD[i] == '\n')
            buf[k++] = '\r';
        buf[k++] = GOOD[i];
    }
    sh_jdoc d;
    char err[256], v[32];
    assert_int_equal(sh_jdoc_parse(buf, k, &d, err, sizeof err, NULL), HN_OK);
    assert_int_equal(d.nentries, 3);
    assert_false(d.truncated);
    assert_string_equal(span(&d, d.entries[0].cmd_off, d.entries[0].cmd_len), "load \"data/orders file.csv\"");
    assert_string_equal(span(&d, d.entries[1].err_off, d.entries[1].err_len), "model 'arma(9,9,9)': expected ')'");
    assert_string_equal(span(&d, d.inputs[0].path_off, d.inputs[0].path_len), "data/orders file.csv");
    assert_int_equal(sh_jdoc_setting(&d, "color", v, sizeof v), 1);
    assert_string_equal(v, "no");
    sh_jdoc_free(&d);
    free(buf);
}

/* Cut GOOD after LEN bytes; expect TRUNC, NENT entries, and the status of the last. */
static void cut(size_t len, int trunc, int nent, int last_status)
{
    sh_jdoc d;
    char err[256];
    int rc = sh_jdoc_parse(GOOD, len, &d, err, sizeof err, NULL);
    if (rc != HN_OK)
        print_error("cut at %zu: %s\n", len, err);
    assert_int_equal(rc, HN_OK);
    assert_int_equal(d.truncated, trunc);
    assert_int_equal(d.nentries, nent);
    if (nent)
        assert_int_equal(d.entries[nent - 1].status, last_status);
    assert_int_equal(d.ended_len, 0);
    sh_jdoc_free(&d);
}

static void test_truncated(void **state)
{
    (void)state;
    const char *p2 = strstr(GOOD, "> fit");
    const char *p3 = strstr(GOOD, "> models");
    const char *p3out = strstr(GOOD, "| id model");
    const char *pend = strstr(GOOD, "ended");
    /* killed between entries: every entry complete */
    cut((size_t)(p2 - GOOD), 0, 1, SH_JENTRY_OK);
    cut((size_t)(p3 - GOOD), 0, 2, SH_JENTRY_ERROR);
    cut((size_t)(pend - GOOD), 0, 3, SH_JENTRY_OK);
    /* killed inside an entry */
    cut((size_t)(p3 - GOOD) + 4, 1, 3, SH_JENTRY_INCOMPLETE);          /* "> mo" */
    cut((size_t)(p3out - GOOD), 1, 3, SH_JENTRY_INCOMPLETE);           /* after one output line */
    cut((size_t)(p3out - GOOD) + 5, 1, 3, SH_JENTRY_INCOMPLETE);       /* inside an output line */
    cut((size_t)(pend - GOOD) - 3, 1, 3, SH_JENTRY_INCOMPLETE);        /* "= o" */
    cut((size_t)(p3 - GOOD) - 5, 1, 2, SH_JENTRY_INCOMPLETE);          /* inside the error line */
    /* the closing line complete but its newline lost */
    cut((size_t)(pend - GOOD) - 1, 0, 3, SH_JENTRY_OK);
    /* only the header */
    cut((size_t)(strstr(GOOD, "> load") - GOOD), 0, 0, 0);
}

static void expect_bad(const char *text, size_t len, long want_line, const char *want_words)
{
    sh_jdoc d;
    char err[256];
    long line = 0;
    int rc = sh_jdoc_parse(text, len, &d, err, sizeof err, &line);
    if (rc != HN_EPARSE || line != want_line || !strstr(err, want_words))
        print_error("got rc %d line %ld '%s'; want line %ld '%s'\n", rc, line, err, want_line, want_words);
    assert_int_equal(rc, HN_EPARSE);
    assert_int_equal(line, want_line);
    assert_non_null(strstr(err, want_words));
    sh_jdoc_free(&d);
}

#define BAD(text, line, words) expect_bad(text, strlen(text), line, words)

static void test_malformed(void **state)
{
    (void)state;
    BAD("", 1, "empty");
    BAD("date,value\n2024-01-01,3\n", 1, "not a hone journal");
    BAD("hone-journal 2\n", 1, "version 2");
    BAD("hone-journal x\n", 1, "bad journal version");
    BAD("hone-journal 1\nsomething else\n", 2, "unexpected line");
    BAD("hone-journal 1\ninput     sha256=abc bytes=1 path=x\n", 2, "bad input line");
    BAD("hone-journal 1\n> load x\n> fit ar(1)\n= ok\n", 3, "not closed");
    BAD("hone-journal 1\n> load x\n|x\n= ok\n", 3, "'| '");
    BAD("hone-journal 1\n> a\n= ok\nended     t\n> b\n= ok\n", 5, "after the 'ended'");
    /* header keywords are not accepted between entries */
    BAD("hone-journal 1\n> a\n= ok\ntool      x\n", 4, "unexpected line");
    static const char nul[] = "hone-journal 1\n> a\0b\n= ok\n";
    expect_bad(nul, sizeof nul - 1, 2, "NUL");
}

/* Write a journal with the writer, read it back with the reader. */
static void test_round_trip(void **state)
{
    (void)state;
    char path[] = "/tmp/hone-jr-XXXXXX", data[] = "/tmp/hone-jd-XXXXXX", err[512];
    int fd = mkstemp(path), fd2 = mkstemp(data);
    assert_true(fd >= 0 && fd2 >= 0);
    close(fd);
    assert_int_equal(write(fd2, "a,b\n1,2\n", 8), 8);
    close(fd2);
    sh_session s;
    sh_session_init(&s);
    sh_journal *j = sh_journal_open(path, &s, err, sizeof err);
    assert_non_null(j);
    assert_int_equal(sh_journal_input(j, data), HN_OK);
    sh_journal_entry(j, "load x.csv", "line one\n\nline three\n", NULL);
    sh_journal_entry(j, "fit\nar(1)", "", "two\nlines");
    sh_journal_close(j);

    sh_jdoc d;
    long line;
    assert_int_equal(sh_jdoc_read(path, &d, err, sizeof err, &line), HN_OK);
    assert_int_equal(d.nentries, 2);
    assert_int_equal(d.ninputs, 1);
    assert_int_equal(d.inputs[0].bytes, 8);
    /* SHA-256 of the 8 bytes "a,b\n1,2\n", from Python 3.11 hashlib.sha256 */
    assert_string_equal(d.inputs[0].sha256, "492d5ea496056f1a6a6592241032fab764c321596317930b4fa0e1e8bc3b7470");
    assert_string_equal(span(&d, d.entries[0].cmd_off, d.entries[0].cmd_len), "load x.csv");
    assert_int_equal(d.entries[0].noutput, 3);
    assert_string_equal(span(&d, d.entries[1].cmd_off, d.entries[1].cmd_len), "fit ar(1)");
    assert_int_equal(d.entries[1].status, SH_JENTRY_ERROR);
    assert_string_equal(span(&d, d.entries[1].err_off, d.entries[1].err_len), "two lines");
    assert_true(d.ended_len > 0);
    char v[32];
    assert_int_equal(sh_jdoc_setting(&d, "alpha", v, sizeof v), 1);
    assert_string_equal(v, "0.05");
    sh_jdoc_free(&d);
    sh_session_free(&s);
    unlink(path);
    unlink(data);
}

/* The memory journal gives each entry's text exactly as a file journal writes it. */
static void test_memory_entry(void **state)
{
    (void)state;
    sh_journal *j = sh_journal_open_memory("label");
    assert_non_null(j);
    size_t len;
    sh_journal_entry(j, "models", "a\nb", NULL);
    const char *t = sh_journal_last(j, &len);
    assert_int_equal(len, strlen("> models\n| a\n| b\n= ok\n"));
    assert_memory_equal(t, "> models\n| a\n| b\n= ok\n", len);
    sh_journal_entry(j, "x", "", "bad");
    t = sh_journal_last(j, &len);
    assert_int_equal(len, 10);
    assert_memory_equal(t, "> x\n! bad\n", len);
    assert_string_equal(sh_journal_path(j), "label");
    sh_journal_close(j);
}

/* Mutated journals: the parser must return, and every span must lie inside. */
static void test_mutations(void **state)
{
    (void)state;
    size_t n = strlen(GOOD);
    char *buf = malloc(n);
    assert_non_null(buf);
    unsigned long long r = 88172645463325252ull;
    int ok = 0, bad = 0;
    for (int it = 0; it < 3000; it++) {
        memcpy(buf, GOOD, n);
        size_t len = n;
        int k = 1 + it % 4;
        for (int m = 0; m < k; m++) {
            r ^= r << 13; r ^= r >> 7; r ^= r << 17;          /* xorshift64 */
            size_t pos = (size_t)(r % n);
            static const char pick[] = "\n\0>|=! x";
            buf[pos] = (r >> 32) & 1 ? pick[(r >> 40) % 8] : (char)(r >> 48);
        }
        if (it % 5 == 0)
            len = (size_t)(r % (n + 1));
        sh_jdoc d;
        char err[128];
        int rc = sh_jdoc_parse(buf, len, &d, err, sizeof err, NULL);
        if (rc == HN_OK) {
            ok++;
            for (int e = 0; e < d.nentries; e++) {
                assert_true(d.entries[e].raw_off + d.entries[e].raw_len <= d.len);
                assert_true(d.entries[e].cmd_off + d.entries[e].cmd_len <= d.len);
                assert_true(d.entries[e].err_off + d.entries[e].err_len <= d.len);
            }
            for (int i = 0; i < d.ninputs; i++)
                assert_true(d.inputs[i].path_off + d.inputs[i].path_len <= d.len);
        } else {
            assert_int_equal(rc, HN_EPARSE);
            bad++;
        }
        sh_jdoc_free(&d);
    }
    free(buf);
    assert_true(ok > 0 && bad > 0);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_good),
        cmocka_unit_test(test_crlf),
        cmocka_unit_test(test_truncated),
        cmocka_unit_test(test_malformed),
        cmocka_unit_test(test_round_trip),
        cmocka_unit_test(test_memory_entry),
        cmocka_unit_test(test_mutations),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
