/* test_spec.c - the model-spec grammar: parse, format, errors with positions.
 * Conventions are the project's own (fit_spec.h); no external source. */
#include "testutil.h"
#include "fit_spec.h"
#include "hn_status.h"

static void roundtrip(const char *in, const char *want)
{
    fit_spec s;
    char err[128], buf[256];
    int pos = -1;
    int rc = fit_spec_parse(in, &s, err, sizeof err, &pos);
    if (rc != HN_OK)
        print_error("parse '%s': %s at %d\n", in, err, pos);
    assert_int_equal(rc, HN_OK);
    assert_string_equal(fit_spec_format(&s, buf, sizeof buf), want);
    fit_spec t;
    assert_int_equal(fit_spec_parse(buf, &t, err, sizeof err, &pos), HN_OK);
    assert_true(fit_spec_equal(&s, &t));
}

static void test_forms(void **state)
{
    (void)state;
    roundtrip("arma(2,1)", "arma(2,1)");
    roundtrip("ARMA( 2 , 1 )", "arma(2,1)");
    roundtrip("ar(1)", "ar(1)");
    roundtrip("ma(2)", "ma(2)");
    roundtrip("arma(0,0)", "arma(0,0)");
    roundtrip("arma(0,1)", "ma(1)");
    roundtrip("garch(1,1)", "garch(1,1)");
    roundtrip("ar(1)+garch(1,1)", "ar(1)+garch(1,1)");
    roundtrip("arma(1,1)+garch(1,1) t", "arma(1,1)+garch(1,1) t");
    roundtrip("ar[1,7]", "ar[1,7]");
    roundtrip("ar[7,1]+ma(1)", "ar[1,7]+ma(1)");
    roundtrip("ar(1)+ar[12]", "ar[1,12]");
    roundtrip("ar(2) nomean", "ar(2) nomean");
}

static void test_params(void **state)
{
    (void)state;
    fit_spec s;
    char buf[32];
    assert_int_equal(fit_spec_parse("ar[1,7]+ma(1)+garch(1,1) t", &s, NULL, 0, NULL), HN_OK);
    assert_int_equal(fit_spec_nparams(&s), 1 + 2 + 1 + 3 + 1);
    const char *want[] = { "mu", "ar1", "ar7", "ma1", "omega", "alpha1", "beta1", "nu" };
    for (int i = 0; i < 8; i++)
        assert_string_equal(fit_spec_param_name(&s, i, buf, sizeof buf), want[i]);
    assert_int_equal(fit_spec_max_ar(&s), 7);
    assert_int_equal(fit_spec_arma_terms(&s), 3);
}

static void bad(const char *in, int want_pos, const char *want_words)
{
    fit_spec s;
    char err[160];
    int pos = -1;
    assert_int_equal(fit_spec_parse(in, &s, err, sizeof err, &pos), HN_EPARSE);
    if (pos != want_pos || !strstr(err, want_words))
        print_error("'%s': got '%s' at %d\n", in, err, pos);
    assert_int_equal(pos, want_pos);
    assert_non_null(strstr(err, want_words));
}

static void test_errors(void **state)
{
    (void)state;
    bad("", 0, "empty");
    bad("arma(2)", 6, "expected ','");
    bad("armx(1,1)", 0, "unknown model term");
    bad("ar(1)+", 6, "expected a model term");
    bad("garch(2,1)", 6, "only garch(1,1)");
    bad("ar(1) x", 6, "unknown word");
    bad("ar(1) t", 0, "need a variance model");
    bad("ar(500)", 3, "too large");
    bad("ar(40)", 3, "at most 32");
    bad("ar[1,1]", 5, "twice");
    bad("ar[0]", 3, "start at 1");
    bad("ar(1,7)", 3, "ar[1,7]");
    bad("ar(1)+ar(1)", 9, "twice");
    bad("garch(1,1)+garch(1,1)", 11, "twice");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_forms),
        cmocka_unit_test(test_params),
        cmocka_unit_test(test_errors),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
