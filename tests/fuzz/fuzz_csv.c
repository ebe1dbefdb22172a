/* fuzz_csv.c - libFuzzer target: arbitrary bytes as a CSV file through sh_csv_load.
 *
 * Not part of the Makefile.  Build and run from the top of the tree:
 *   clang -g -O1 -std=c11 -D_DEFAULT_SOURCE -fsanitize=fuzzer,address,undefined \
 *     -Ifit -Ishell tests/fuzz/fuzz_csv.c shell/sh_csv.c shell/sh_csv_num.c shell/sh_time.c \
 *     shell/sh_error.c -lcsv -lm -o build/fuzz_csv
 *   build/fuzz_csv -max_len=4096 tests/fuzz/corpus/csv
 * The first input byte picks the options (value column, time column, missing-value
 * policy, row limit); the rest is the file. */
#include "hn_status.h"
#include "sh_csv.h"

#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static char path[64];

static int open_scratch(void)
{
    if (path[0])
        return 0;
    snprintf(path, sizeof path, "/tmp/fuzz-csv-XXXXXX");
    int fd = mkstemp(path);
    if (fd < 0)
        return -1;
    close(fd);
    return 0;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    static const char *const cols[4] = {NULL, "2", "y", "value"};
    static const char *const times[4] = {NULL, "", "1", "date"};
    if (open_scratch() != 0)
        return 0;
    unsigned sel = size ? data[0] : 0;
    if (size) {
        data++;
        size--;
    }
    FILE *f = fopen(path, "wb");
    if (!f)
        return 0;
    if (size)
        fwrite(data, 1, size, f);
    fclose(f);

    sh_csv_options o = {cols[sel & 3], times[(sel >> 2) & 3], (sh_missing_policy)((sel >> 4) & 3),
                        (sel & 0x40) ? 3 : 0};
    sh_data d;
    sh_error e;
    int rc = sh_csv_load(path, &o, &d, &e);
    if (rc == HN_OK) {
        /* what the struct promises */
        if (d.n == 0 || !d.y || !d.line || (d.has_time && !d.stamp))
            abort();
        for (size_t i = 0; i < d.n; i++) {
            if (d.y[i] != d.y[i] || d.y[i] - d.y[i] != 0.0)
                abort(); /* NaN or infinite */
            if (i && (d.line[i] <= d.line[i - 1] || (d.has_time && d.stamp[i] <= d.stamp[i - 1])))
                abort();
        }
    } else if (!e.message[0] || d.y) {
        abort();
    }
    sh_data_free(&d);

    char **names;
    int n;
    if (sh_column_names(path, &names, &n, &e) == HN_OK)
        sh_names_free(names, n);
    return 0;
}
