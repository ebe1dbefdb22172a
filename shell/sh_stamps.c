/* sh_stamps.c - recover the time stamps of the loaded column from its file. */
#include "sh_stamps.h"
#include "sh_csv.h"
#include "hn_status.h"

#include <stdlib.h>
#include <string.h>

int sh_stamps_load(const sh_session *s, sh_stamps *t)
{
    memset(t, 0, sizeof *t);
    if (!s->loaded || !*s->freq || s->path[0] == '(' || !sh_raw(s))
        return -1;
    static const sh_missing_policy pol[] = { SH_MISSING_REFUSE, SH_MISSING_PREVIOUS, SH_MISSING_INTERPOLATE,
                                             SH_MISSING_DROP };
    for (size_t p = 0; p < sizeof pol / sizeof pol[0]; p++) {
        sh_csv_options o;
        memset(&o, 0, sizeof o);
        o.column = *s->column ? s->column : NULL;
        o.missing = pol[p];
        sh_data d;
        sh_error e;
        if (sh_csv_load(s->path, &o, &d, &e) != HN_OK) {
            sh_data_free(&d);
            continue;
        }
        int ok = d.has_time && d.stamp && d.n == s->n_raw && !memcmp(d.y, sh_raw(s), d.n * sizeof *d.y);
        if (ok) {
            t->stamp = d.stamp;
            d.stamp = NULL;
            t->kind = d.time_kind;
            t->freq = d.freq;
        }
        sh_data_free(&d);
        if (ok)
            return 0;
    }
    return -1;
}
