/* sh_report.h - the session report as one self-contained HTML file or a PDF. */
#ifndef SH_REPORT_H
#define SH_REPORT_H

#include <stddef.h>
#include "sh_session.h"

typedef struct {
    int models;            /* models listed */
    int charts;            /* charts drawn */
    int notes;             /* analyst's notes included */
    char skipped[256];     /* charts left out and why, "" for none */
} sh_report_info;

/* Write the report of session S to PATH (atomically), as PDF when PDF is 1,
 * else HTML with inline SVG.  H > 0 forecasts H steps for the fan chart;
 * H = 0 uses the session's last forecast of the current model, if any.
 * The current model is checked first when it has not been.  Returns 0 and
 * fills *INFO, or -1 with a message in ERR. */
int sh_report_write(sh_session *s, const char *path, int pdf, int h, sh_report_info *info,
                    char *err, size_t errlen);

#endif
