/* sh_report_text.h - text and JSON renderings of fits, checks and the model
 * list, shared by every command that shows them. */
#ifndef SH_REPORT_TEXT_H
#define SH_REPORT_TEXT_H

#include "sh_session.h"

void sh_text_fit(sh_session *s, const sh_model *m);
void sh_json_fit(sh_session *s, const sh_model *m);
/* The fit's warnings in words, one per line with PREFIX (text output). */
void sh_text_warnings(sh_session *s, const fit_result *f, const char *prefix);

void sh_text_check(sh_session *s, const sh_model *m);

/* Print TEXT, the cursor being at column INDENT, wrapping at the session
 * width with the same indent; ends with a newline. */
void sh_wrap(sh_session *s, const char *text, int indent);
void sh_json_check(sh_session *s, const sh_model *m);

void sh_text_models(sh_session *s);
void sh_json_models(sh_session *s);

/* Battery options for model M from the session settings. */
diag_options sh_check_options(const sh_session *s, const sh_model *m);
/* Run the battery on M (standardised residuals for GARCH); hn_status. */
int sh_check_model(sh_session *s, sh_model *m, const diag_options *opt);

#endif
