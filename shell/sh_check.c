/* sh_check.c - run the battery on a model's residuals with the session's settings. */
#include "sh_report_text.h"
#include "hn_status.h"

diag_options sh_check_options(const sh_session *s, const sh_model *m)
{
    diag_options o = diag_default_options();
    o.alpha = s->alpha;
    o.lags = s->lags;
    o.df_adjust = fit_spec_arma_terms(&m->fit.spec);
    o.standardised = m->fit.spec.garch;
    return o;
}

int sh_check_model(sh_session *s, sh_model *m, const diag_options *opt)
{
    (void)s;
    if (m->checked) {
        diag_battery_free(&m->battery);
        m->checked = 0;
    }
    const fit_result *f = &m->fit;
    const double *x = f->spec.garch ? f->std_resid : f->resid;
    int rc = diag_battery_run(x, f->n_eff, opt, &m->battery);
    if (rc != HN_OK)
        return rc;
    m->bopt = *opt;
    m->checked = 1;
    return HN_OK;
}
