/* fuzz_spec.c - libFuzzer target: model-spec text through fit_spec_parse and back.
 *
 * Built and run by 'make fuzz'.  For any input that parses, the canonical
 * text fit_spec_format writes must parse again to an equal spec, format to
 * the same text, and agree with the spec's own counts. */
#include "fit_spec.h"
#include "hn_status.h"

#include <stdint.h>
#include <stdlib.h>
#include <string.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char text[1024], err[256], a[512], b[512];
    if (size >= sizeof text)
        size = sizeof text - 1;
    memcpy(text, data, size);
    text[size] = '\0';

    fit_spec s, t;
    int pos = -1;
    err[0] = '\0';
    int rc = fit_spec_parse(text, &s, err, sizeof err, &pos);
    if (rc != HN_OK) {
        /* a refusal says why and points inside the text (or just past it) */
        if (!err[0] || pos < 0 || (size_t)pos > strlen(text))
            abort();
        return 0;
    }
    if (s.n_ar < 0 || s.n_ar > FIT_MAX_TERMS || s.n_ma < 0 || s.n_ma > FIT_MAX_TERMS)
        abort();
    for (int i = 0; i < s.n_ar; i++)
        if (s.ar_lag[i] < 1 || s.ar_lag[i] > FIT_MAX_LAG || (i && s.ar_lag[i] <= s.ar_lag[i - 1]))
            abort();
    for (int i = 0; i < s.n_ma; i++)
        if (s.ma_lag[i] < 1 || s.ma_lag[i] > FIT_MAX_LAG || (i && s.ma_lag[i] <= s.ma_lag[i - 1]))
            abort();
    int k = fit_spec_nparams(&s);
    if (k < 0 || k > FIT_MAX_PARAMS)
        abort();
    for (int i = 0; i < k; i++) {
        char name[32];
        if (!fit_spec_param_name(&s, i, name, sizeof name) || !name[0])
            abort();
    }

    fit_spec_format(&s, a, sizeof a);
    if (fit_spec_parse(a, &t, err, sizeof err, &pos) != HN_OK)
        abort(); /* the canonical text must parse */
    if (!fit_spec_equal(&s, &t))
        abort();
    fit_spec_format(&t, b, sizeof b);
    if (strcmp(a, b) != 0)
        abort(); /* and format to itself */
    return 0;
}
