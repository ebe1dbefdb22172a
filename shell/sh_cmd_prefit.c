/* sh_cmd_prefit.c - the pre-fit look: unit-root and stationarity tests. */
#include "sh_handlers.h"
#include "sh_fmt.h"
#include "diag_unitroot.h"
#include "hn_status.h"

#include <math.h>
#include <string.h>

static void text_ur(sh_session *s, const diag_ur_test *t, const char *null_words)
{
    char a[32], p[32], c1[32], c5[32], c10[32];
    if (!t->valid) {
        sh_printf(s, "  %-5s not computed: %s\n", t->name, t->detail);
        return;
    }
    const char *pb = t->p_bound < 0 ? "<= " : t->p_bound > 0 ? ">= " : "";
    sh_printf(s, "  %-5s %-34s statistic %9s  p %s%-8s  critical 1/5/10 %%: %s %s %s  -> %s\n", t->name,
              null_words, sh_num(a, sizeof a, t->statistic, 5), pb, sh_pval(p, sizeof p, t->p),
              sh_num(c1, sizeof c1, t->crit[0], 4), sh_num(c5, sizeof c5, t->crit[1], 4),
              sh_num(c10, sizeof c10, t->crit[2], 4), t->reject ? "rejected" : "not rejected");
    sh_printf(s, "        %s\n", t->detail);
}

static void json_ur(sh_session *s, const char *key, const diag_ur_test *t)
{
    sh_json *j = &s->j;
    sh_json_key(j, key);
    sh_json_begin_object(j);
    sh_json_kbool(j, "valid", t->valid);
    sh_json_knumber(j, "statistic", t->valid ? t->statistic : NAN, t->detail);
    sh_json_knumber(j, "p", t->valid ? t->p : NAN, t->detail);
    sh_json_kstring(j, "p_bound", t->p_bound < 0 ? "upper" : t->p_bound > 0 ? "lower" : "none");
    sh_json_kint(j, "lags", t->lags);
    sh_json_kint(j, "nobs", (long long)t->nobs);
    sh_json_knumbers(j, "critical", t->crit, DIAG_UR_NLEVELS, "not computed");
    sh_json_kbool(j, "reject", t->reject);
    sh_json_kstring(j, "detail", t->detail);
    sh_json_end_object(j);
}

static int cmd_stationarity(sh_session *s, sh_words *w)
{
    if (!s->loaded)
        return sh_fail(s, -1, "no series loaded (use 'load FILE column=NAME')");
    const char *v;
    int trend = 0;
    double level = 0.05;
    if ((v = sh_words_value(w, "trend"))) {
        if (strcmp(v, "yes") && strcmp(v, "no"))
            return sh_fail(s, sh_words_option(w, "trend"), "trend= takes yes or no");
        trend = !strcmp(v, "yes");
    }
    if ((v = sh_words_value(w, "level"))) {
        if (sh_parse_double(v, &level) || (level != 0.01 && level != 0.05 && level != 0.10))
            return sh_fail(s, sh_words_option(w, "level"), "level= takes 0.01, 0.05 or 0.10 (the tabulated levels)");
    }
    diag_unitroot u;
    int rc = diag_unitroot_check(s->y, s->n, trend, level, &u);
    if (rc != HN_OK && !u.adf.valid && !u.kpss.valid)
        return sh_fail(s, -1, "cannot test the working series: %s", hn_strerror(rc));
    sh_printf(s, "stationarity of the working series (%zu values%s%s), level %g\n", s->n,
              *s->transforms ? "; transforms: " : "", s->transforms, level);
    text_ur(s, &u.adf, trend ? "null: unit root (const + trend)" : "null: unit root (with constant)");
    text_ur(s, &u.kpss, trend ? "null: stationary about a trend" : "null: stationary about a level");
    sh_printf(s, "  conclusion: %s\n", u.conclusion);
    json_ur(s, "adf", &u.adf);
    json_ur(s, "kpss", &u.kpss);
    sh_json_knumber(&s->j, "level", level, NULL);
    sh_json_kstring(&s->j, "difference", u.difference > 0 ? "yes" : u.difference == 0 ? "no" : "undecided");
    sh_json_kstring(&s->j, "conclusion", u.conclusion);
    return 0;
}

const sh_command sh_cmds_prefit[] = {
    { "stationarity", "stationarity [trend=no|yes] [level=0.05]",
      "unit-root (ADF) and stationarity (KPSS) tests on the working series: difference or not?",
      { "trend", "level", NULL }, 0, 0, cmd_stationarity,
      "  ADF: null of a unit root, MacKinnon (2010) response-surface critical values;\n"
      "  KPSS: null of stationarity, critical values of Kwiatkowski et al. (1992) Table 1.\n"
      "  Lag and bandwidth rules are printed with the results.  ADF rejecting while\n"
      "  KPSS does not says stationary; the reverse says difference; otherwise undecided.\n" },
    { NULL, NULL, NULL, { NULL }, 0, 0, NULL, NULL }
};
