/* test_json_parse.c - the JSON writer (round-trip numbers, null reasons) and
 * the command-line word splitter.  Round-trip exactness is the C standard's
 * strtod contract (common practice: 17 significant digits always suffice for
 * IEEE 754 binary64). */
#include "testutil.h"
#include "sh_json.h"
#include "sh_parse.h"
#include "hn_status.h"

static void test_roundtrip(void **state)
{
    (void)state;
    const double xs[] = { 0.1, -0.006190408379994, 1.0 / 3.0, 1e-300, 123456789.123456789,
                          -1106.607881041288, 2.2250738585072014e-308, 5e-324, 0.0 };
    char buf[40];
    for (size_t i = 0; i < sizeof xs / sizeof xs[0]; i++) {
        sh_fmt_double(buf, sizeof buf, xs[i]);
        assert_true(strtod(buf, NULL) == xs[i]);
    }
    sh_fmt_double(buf, sizeof buf, 0.1);
    assert_string_equal(buf, "0.1");
}

static void test_object(void **state)
{
    (void)state;
    sh_json j;
    sh_json_init(&j);
    sh_json_begin_object(&j);
    sh_json_kstring(&j, "command", "fit \"x\"\n");
    sh_json_key(&j, "se");
    sh_json_begin_object(&j);
    sh_json_knumber(&j, "mu", 0.5, NULL);
    sh_json_knumber(&j, "ar1", NAN, "singular");
    sh_json_end_object(&j);
    double v[3] = { 1, INFINITY, 3 };
    sh_json_knumbers(&j, "acf", v, 3, "undefined");
    sh_json_kbool(&j, "ok", 1);
    sh_json_end_object(&j);
    assert_string_equal(sh_json_text(&j),
        "{\"command\":\"fit \\\"x\\\"\\n\",\"se\":{\"mu\":0.5,\"ar1\":null},\"acf\":[1,null,3],"
        "\"ok\":true,\"null_reasons\":{\"se.ar1\":\"singular\",\"acf\":\"undefined\"}}");
    sh_json_reset(&j);
    sh_json_begin_object(&j);
    sh_json_end_object(&j);
    assert_string_equal(sh_json_text(&j), "{}");
    sh_json_free(&j);
}

static void test_words(void **state)
{
    (void)state;
    sh_words w;
    int pos;
    const char *why;
    assert_int_equal(sh_words_split("load \"my file.csv\" column=units  # note", &w, &pos, &why), HN_OK);
    assert_int_equal(w.n, 3);
    assert_string_equal(w.word[1], "my file.csv");
    assert_int_equal(w.offset[2], 19);
    assert_string_equal(sh_words_value(&w, "column"), "units");
    assert_null(sh_words_value(&w, "time"));
    sh_words_free(&w);
    assert_int_equal(sh_words_split("load \"open", &w, &pos, &why), HN_EPARSE);
    assert_int_equal(pos, 5);
    double x;
    long a, b;
    assert_int_equal(sh_parse_double("0.25", &x), 0);
    assert_true(x == 0.25);
    assert_int_not_equal(sh_parse_double("nan", &x), 0);
    assert_int_not_equal(sh_parse_double("1,5", &x), 0);
    assert_int_not_equal(sh_parse_double("1e999", &x), 0);
    assert_int_equal(sh_parse_range("0..3", &a, &b), 0);
    assert_true(a == 0 && b == 3);
    assert_int_not_equal(sh_parse_range("3..1", &a, &b), 0);
    int n;
    char **c = sh_split_commands("load a.csv; fit \"x;y\"; check", &n);
    assert_int_equal(n, 3);
    assert_string_equal(c[1], " fit \"x;y\"");
    sh_free_commands(c, n);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_roundtrip),
        cmocka_unit_test(test_object),
        cmocka_unit_test(test_words),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
