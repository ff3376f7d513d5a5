/* The C interface from C: values of every kind printed as
 * "float<TAB>expression<TAB>value" or "exact<TAB>expression<TAB>text"
 * lines, which capi/tests/run.sh compares with recoup on the Rust side;
 * error codes checked here (exit 1 on a wrong one). */
#include <stdio.h>
#include <stdlib.h>
#include "recoup.h"

static int failures = 0;

static void expect(int got, int want, const char *what) {
    if (got != want) {
        fprintf(stderr, "%s: code %d, expected %d\n", what, got, want);
        failures++;
    }
}

static void three_j(int a, int b, int c, int x, int y, int z) {
    double v;
    expect(recoup_3j(a, b, c, x, y, z, &v), RECOUP_OK, "recoup_3j");
    printf("float\t(%d/2, %d/2, %d/2; %d/2, %d/2, %d/2)\t%.17g\n", a, b, c, x, y, z, v);
}

static void six_j(int a, int b, int c, int d, int e, int f) {
    double v;
    expect(recoup_6j(a, b, c, d, e, f, &v), RECOUP_OK, "recoup_6j");
    printf("float\t{%d/2, %d/2, %d/2; %d/2, %d/2, %d/2}\t%.17g\n", a, b, c, d, e, f, v);
}

int main(int argc, char **argv) {
    double v;
    three_j(2, 2, 0, 0, 0, 0);
    three_j(3, 2, 1, 1, -2, 1);
    three_j(200, 180, 60, 10, -30, 20);
    three_j(2000, 2000, 2000, 0, 0, 0);
    six_j(2, 2, 2, 2, 2, 2);
    six_j(3, 4, 5, 4, 3, 4);
    six_j(400, 402, 398, 404, 396, 400);
    expect(recoup_cg(2, 2, 1, -1, 1, 1, &v), RECOUP_OK, "recoup_cg");
    printf("float\t<1, 1; 1/2, -1/2 | 1/2, 1/2>\t%.17g\n", v);
    int nine[9] = {2, 2, 2, 2, 2, 2, 2, 2, 2};
    expect(recoup_9j(nine, &v), RECOUP_OK, "recoup_9j");
    printf("float\t{1, 1, 1; 1, 1, 1; 1, 1, 1}\t%.17g\n", v);
    int nine2[9] = {1, 1, 2, 2, 3, 1, 3, 4, 1};
    expect(recoup_9j(nine2, &v), RECOUP_OK, "recoup_9j");
    printf("float\t{1/2, 1/2, 1; 1, 3/2, 1/2; 3/2, 2, 1/2}\t%.17g\n", v);

    char text[64];
    size_t needed = 0;
    expect(recoup_3j_exact(3, 2, 1, 1, -2, 1, text, sizeof text, &needed), RECOUP_OK,
           "recoup_3j_exact");
    printf("exact\t(3/2, 1, 1/2; 1/2, -1, 1/2)\t%s\n", text);
    expect(recoup_6j_exact(2, 2, 2, 2, 2, 2, text, sizeof text, &needed), RECOUP_OK,
           "recoup_6j_exact");
    printf("exact\t{1, 1, 1; 1, 1, 1}\t%s\n", text);

    expect(recoup_cg_exact(2, 2, 1, -1, 1, 1, text, sizeof text, &needed), RECOUP_OK,
           "recoup_cg_exact");
    printf("exact\t<1, 1; 1/2, -1/2 | 1/2, 1/2>\t%s\n", text);
    expect(recoup_9j_exact(nine2, text, sizeof text, &needed), RECOUP_OK, "recoup_9j_exact");
    printf("exact\t{1/2, 1/2, 1; 1, 3/2, 1/2; 3/2, 2, 1/2}\t%s\n", text);

    /* a family: ask for its size, then fill */
    int first = 0;
    size_t count = 0;
    expect(recoup_3j_family(20, 16, 4, -2, &first, NULL, 0, &count), RECOUP_ERR_BUFFER,
           "family size query");
    double *values = malloc(count * sizeof *values);
    expect(recoup_3j_family(20, 16, 4, -2, &first, values, count, &count), RECOUP_OK,
           "recoup_3j_family");
    for (size_t i = 0; i < count; i++)
        printf("float\t(%d/2, 10, 8; -1, 2, -1)\t%.17g\n", first + 2 * (int)i, values[i]);
    free(values);
    expect(recoup_6j_family(4, 6, 4, 6, 4, &first, NULL, 0, &count), RECOUP_ERR_BUFFER,
           "6j family size query");
    values = malloc(count * sizeof *values);
    expect(recoup_6j_family(4, 6, 4, 6, 4, &first, values, count, &count), RECOUP_OK,
           "recoup_6j_family");
    for (size_t i = 0; i < count; i++)
        printf("float\t{%d/2, 2, 3; 2, 3, 2}\t%.17g\n", first + 2 * (int)i, values[i]);
    free(values);

    /* bad arguments are codes, never a crash */
    expect(recoup_3j(-2, 2, 0, 0, 0, 0, &v), RECOUP_ERR_ARGUMENT, "negative j");
    expect(recoup_3j(2, 2, 0, 0, 0, 0, NULL), RECOUP_ERR_BUFFER, "null output");
    expect(recoup_6j(2000000000, 2, 2, 2, 2, 2, &v), RECOUP_ERR_ARGUMENT, "huge j");
    expect(recoup_9j(NULL, &v), RECOUP_ERR_BUFFER, "null 9j arguments");
    expect(recoup_3j_exact(2, 2, 0, 0, 0, 0, text, 3, &needed), RECOUP_ERR_BUFFER,
           "short text buffer");
    if (needed != 11) {
        fprintf(stderr, "needed %zu bytes, expected 11\n", needed);
        failures++;
    }
    /* a symbol outside its selection rules is 0, not an error */
    expect(recoup_3j(2, 2, 6, 0, 0, 0, &v), RECOUP_OK, "triangle broken");
    if (v != 0.0) {
        fprintf(stderr, "a broken triangle gave %g\n", v);
        failures++;
    }

    /* a table written by `recoup tabulate 3j` (path in argv[1]) */
    if (argc > 1) {
        struct RecoupTable *table = NULL;
        expect(recoup_table_open(argv[1], &table), RECOUP_OK, "recoup_table_open");
        int rows[][6] = {{2, 2, 0, 2, -2, 0}, {6, 4, 4, 2, -4, 2}, {12, 10, 8, -6, 4, 2},
                         {11, 9, 4, 5, -7, 2}, {12, 12, 12, 0, 0, 0}};
        for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
            int *r = rows[i];
            expect(recoup_table_3j(table, r[0], r[1], r[2], r[3], r[4], r[5], &v), RECOUP_OK,
                   "recoup_table_3j");
            printf("float\t(%d/2, %d/2, %d/2; %d/2, %d/2, %d/2)\t%.17g\n", r[0], r[1], r[2],
                   r[3], r[4], r[5], v);
        }
        expect(recoup_table_cg(table, 4, 2, 3, -1, 5, 1, &v), RECOUP_OK, "recoup_table_cg");
        printf("float\t<2, 1; 3/2, -1/2 | 5/2, 1/2>\t%.17g\n", v);
        expect(recoup_table_3j(table, 40, 40, 40, 0, 0, 0, &v), RECOUP_ERR_OUTSIDE,
               "beyond the table");
        expect(recoup_table_3j(NULL, 2, 2, 0, 0, 0, 0, &v), RECOUP_ERR_BUFFER, "null table");
        recoup_table_close(table);
        struct RecoupTable *none = NULL;
        expect(recoup_table_open("/nonexistent/table.r3j", &none), RECOUP_ERR_FILE,
               "missing table file");
        expect(recoup_table_open(argv[0], &none), RECOUP_ERR_FILE, "not a table file");
    }
    /* a 6j table (path in argv[2]) */
    if (argc > 2) {
        struct RecoupTable *table = NULL;
        expect(recoup_table_open(argv[2], &table), RECOUP_OK, "recoup_table_open 6j");
        int rows[][6] = {{2, 2, 2, 2, 2, 2}, {8, 6, 4, 6, 8, 4}, {3, 4, 5, 4, 3, 4},
                         {12, 12, 12, 12, 12, 12}, {1, 12, 11, 8, 9, 4}};
        for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
            int *r = rows[i];
            expect(recoup_table_6j(table, r[0], r[1], r[2], r[3], r[4], r[5], &v), RECOUP_OK,
                   "recoup_table_6j");
            printf("float\t{%d/2, %d/2, %d/2; %d/2, %d/2, %d/2}\t%.17g\n", r[0], r[1], r[2],
                   r[3], r[4], r[5], v);
        }
        expect(recoup_table_3j(table, 2, 2, 0, 0, 0, 0, &v), RECOUP_ERR_ARGUMENT,
               "3j from a 6j table");
        expect(recoup_table_6j(table, 14, 14, 14, 14, 14, 14, &v), RECOUP_ERR_OUTSIDE,
               "beyond the 6j table");
        recoup_table_close(table);
    }
    return failures == 0 ? 0 : 1;
}
