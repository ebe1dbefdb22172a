/* fuzz_csv.c - libFuzzer target: arbitrary bytes as a CSV file through sh_csv_load, read
 * with the plain-row path and with libcsv alone; both must give the same sh_data or the
 * same message.
 *
 * Built by `make fuzz`; by hand from the top of the tree:
 *   clang -g -O1 -std=c11 -D_DEFAULT_SOURCE -fopenmp -fsanitize=fuzzer,address,undefined \
 *     -Ifit -Ishell tests/fuzz/fuzz_csv.c shell/sh_csv.c shell/sh_csv_fast.c \
 *     shell/sh_csv_num.c shell/sh_time.c shell/sh_error.c -lcsv -lm -o build/fuzz_csv
 *   build/fuzz_csv -max_len=4096 tests/fuzz/corpus/csv
 * The first input byte picks the options (value column, time column, missing-value
 * policy, row limit) and whether the plain rows are cut into pieces of a few bytes; the
 * rest is the file. */
#include "hn_status.h"
#include "sh_csv.h"
#include "sh_csv_fast.h"

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
    sh_data d, g;
    sh_error e, eg;
    sh_csv_fast_tune(1, (sel & 0x80) ? 16 : 0, (sel & 0x80) ? 1 : 0);
    int rc = sh_csv_load(path, &o, &d, &e);
    sh_csv_fast_tune(0, 0, 0);
    int rg = sh_csv_load(path, &o, &g, &eg);
    sh_csv_fast_tune(1, 0, 0);
    if (rc != rg || (rc != HN_OK && strcmp(e.message, eg.message) != 0))
        abort(); /* the two readers disagree */
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
        if (d.n != g.n || d.n_missing != g.n_missing || d.n_rows != g.n_rows ||
            d.column_index != g.column_index || d.time_index != g.time_index ||
            d.time_kind != g.time_kind || d.freq != g.freq || d.n_gaps != g.n_gaps ||
            strcmp(d.first_gap, g.first_gap) != 0 ||
            memcmp(d.y, g.y, d.n * sizeof *d.y) != 0 ||
            memcmp(d.line, g.line, d.n * sizeof *d.line) != 0 ||
            (d.has_time && memcmp(d.stamp, g.stamp, d.n * sizeof *d.stamp) != 0))
            abort();
    } else if (!e.message[0] || d.y) {
        abort();
    }
    sh_data_free(&d);
    sh_data_free(&g);

    char **names;
    int n;
    if (sh_column_names(path, &names, &n, &e) == HN_OK)
        sh_names_free(names, n);
    return 0;
}
