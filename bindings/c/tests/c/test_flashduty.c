/* The C interface from C: a case through JSON, a flash, a duty, the duty-specified flash and
 * the error paths (null pointers, wrong buffer lengths, bad values, unknown components,
 * hostile text). Built and run by .ci/run with the system C compiler, and under valgrind
 * where it is installed. Check values: benzene-toluene at 1 atm boils between the pure
 * components' normal boiling points, 353.2 K and 383.8 K (CRC Handbook, from memory). */
#include "flashduty.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static int passed = 0, failed = 0;

#define CHECK(cond, what)                                                      \
    do {                                                                       \
        if (cond) {                                                            \
            passed++;                                                          \
        } else {                                                               \
            failed++;                                                          \
            fprintf(stderr, "FAILED %s (line %d)\n", what, __LINE__);          \
        }                                                                      \
    } while (0)

static void expect_kind(const FdLibrary *lib, const FdCalculator *calc, const char *kind) {
    char buf[128];
    if (lib) fd_library_error(lib, FD_ERROR_PART_KIND, buf, sizeof buf);
    else fd_calculator_error(calc, FD_ERROR_PART_KIND, buf, sizeof buf);
    if (strcmp(buf, kind) != 0) fprintf(stderr, "kind '%s', expected '%s'\n", buf, kind);
    CHECK(strcmp(buf, kind) == 0, kind);
}

int main(void) {
    FdLibrary *lib = fd_library_new();
    CHECK(lib != NULL, "library");
    CHECK(fd_library_len(lib) >= 31, "built-in components");

    /* A case through JSON: the outcome is the command-line tool's --json object. */
    char *out = NULL;
    FdStatus s = fd_run_case(lib, "bubble",
                             "{\"components\": [\"benzene\", \"toluene\"], \"z\": [0.5, 0.5], \"P\": \"1 atm\"}", &out);
    CHECK(s == FD_STATUS_OK, "bubble case");
    const char *t = out ? strstr(out, "\"T_K\":") : NULL;
    double tb = t ? atof(t + 6) : 0.0;
    CHECK(tb > 353.2 && tb < 383.8, "bubble T between the boiling points");
    fd_string_free(out);

    /* A bad case: status, JSON error and the handle's error. */
    s = fd_run_case(lib, "flash", "{\"components\": [\"water\"], \"z\": [1], \"T\": \"hot\", \"P\": 1e5}", &out);
    CHECK(s == FD_STATUS_INPUT, "bad T refused");
    CHECK(out && strstr(out, "\"error\"") && strstr(out, "\"field\":\"T\""), "JSON error names the field");
    fd_string_free(out);
    char message[256];
    size_t need = fd_library_error(lib, FD_ERROR_PART_MESSAGE, message, sizeof message);
    CHECK(need > 0 && strncmp(message, "T: ", 3) == 0, "message starts with the field");
    char tiny[4];
    fd_library_error(lib, FD_ERROR_PART_MESSAGE, tiny, sizeof tiny);
    CHECK(strlen(tiny) == 3, "message truncated to the buffer");
    s = fd_run_case(lib, "boil", "{}", NULL);
    CHECK(s == FD_STATUS_INPUT, "unknown command");
    expect_kind(lib, NULL, "unknown-command");
    s = fd_run_case(lib, "flash", "{not json", NULL);
    CHECK(s == FD_STATUS_INPUT, "malformed JSON");
    CHECK(fd_run_case(NULL, "flash", "{}", NULL) == FD_STATUS_NULL_POINTER, "null library");
    CHECK(fd_run_case(lib, NULL, "{}", NULL) == FD_STATUS_NULL_POINTER, "null command");
    CHECK(fd_run_case(lib, "flash", "{\"components\": [\"water\"], \"z\": [1], \"T\": 300, \"P\": 1e5}", NULL) == FD_STATUS_OK,
          "null out_json allowed");
    /* Hostile text: a long name, invalid UTF-8. */
    size_t big = 1 << 16;
    char *hostile = malloc(big + 64);
    strcpy(hostile, "{\"components\": [\"");
    memset(hostile + strlen(hostile), 'x', big);
    strcpy(hostile + 17 + big, "\"], \"z\": [1], \"P\": 1e5}");
    CHECK(fd_run_case(lib, "bubble", hostile, NULL) == FD_STATUS_INPUT, "long unknown name refused");
    free(hostile);
    CHECK(fd_run_case(lib, "bubble", "{\"components\": [\"\xff\"]}", NULL) == FD_STATUS_UTF8, "invalid UTF-8");

    /* User components from a JSON string: a bad one is refused naming the field. */
    CHECK(fd_library_add_json(lib, "{\"schema\": \"flashduty-components/1\"}") == FD_STATUS_INPUT, "bad component JSON");
    CHECK(fd_library_add_file(lib, "/nonexistent/components.json") == FD_STATUS_INPUT, "missing component file");

    /* A calculator: flash, duty, duty-specified flash. */
    const char *names[] = {"benzene", "toluene"};
    const double z[] = {0.5, 0.5};
    FdOptions opts = fd_options_default();
    FdCalculator *calc = fd_calculator_new(lib, names, z, 2, 1.0, &opts);
    CHECK(calc != NULL && fd_calculator_len(calc) == 2, "calculator");
    double x[2], y[2];
    FdSplit split;
    s = fd_calculator_tp_flash(calc, 370.0, 101325.0, &split, x, y, 2);
    CHECK(s == FD_STATUS_OK && split.phase == FD_PHASE_TWO_PHASE, "two-phase flash");
    for (int i = 0; i < 2; i++) {
        double back = split.liquid_fraction * x[i] + split.vapour_fraction * y[i];
        CHECK(fabs(back - z[i]) < 1e-14, "material balance");
    }
    CHECK(fd_calculator_tp_flash(calc, 365.0, 101325.0, &split, NULL, NULL, 0) == FD_STATUS_OK, "flash without compositions");
    FdState in = {FD_STATE_SPEC_TEMPERATURE_PRESSURE, 298.15, 101325.0, 0.0};
    FdState outlet = {FD_STATE_SPEC_TEMPERATURE_PRESSURE, 400.0, 101325.0, 0.0};
    FdDuty d;
    s = fd_calculator_duty(calc, in, outlet, &d);
    CHECK(s == FD_STATUS_OK && d.duty_w > 0.0 && d.outlet.phase == FD_PHASE_VAPOUR, "heater duty");
    CHECK(d.has_dduty_dt && d.dduty_dt_out_w_per_k > 0.0, "dQ/dT at a T-P outlet");
    FdDuty back;
    s = fd_calculator_outlet_for_duty(calc, in, d.duty_w, 101325.0, &back);
    CHECK(s == FD_STATUS_OK && fabs(back.outlet.temperature_k - 400.0) < 1e-6, "duty-specified flash inverts the duty");
    FdState mid = {FD_STATE_SPEC_PRESSURE_VAPOUR_FRACTION, 0.0, 101325.0, 0.5};
    CHECK(fd_calculator_duty(calc, in, mid, &d) == FD_STATUS_OK && fabs(d.outlet.vapour_fraction - 0.5) < 1e-12,
          "outlet by vapour fraction");

    /* Error paths of the calculator. */
    CHECK(fd_calculator_tp_flash(calc, 365.0, 101325.0, &split, x, y, 3) == FD_STATUS_BUFFER_LENGTH, "wrong length");
    expect_kind(NULL, calc, "buffer-length");
    CHECK(fd_calculator_tp_flash(calc, -5.0, 101325.0, &split, NULL, NULL, 0) == FD_STATUS_INPUT, "negative T");
    fd_calculator_error(calc, FD_ERROR_PART_FIELD, message, sizeof message);
    CHECK(strcmp(message, "T") == 0, "the field is T");
    CHECK(fd_calculator_tp_flash(calc, NAN, 101325.0, &split, NULL, NULL, 0) == FD_STATUS_INPUT, "NaN T");
    CHECK(fd_calculator_tp_flash(calc, 365.0, 101325.0, NULL, NULL, NULL, 0) == FD_STATUS_NULL_POINTER, "null out");
    CHECK(fd_calculator_tp_flash(NULL, 365.0, 101325.0, &split, NULL, NULL, 0) == FD_STATUS_NULL_POINTER, "null calculator");
    FdState bad = {FD_STATE_SPEC_PRESSURE_VAPOUR_FRACTION, 0.0, 101325.0, 1.5};
    CHECK(fd_calculator_duty(calc, in, bad, &d) == FD_STATUS_INPUT, "vapour fraction above 1");
    expect_kind(NULL, calc, "vapour-fraction-out-of-range");
    CHECK(fd_calculator_outlet_for_duty(calc, in, INFINITY, 101325.0, &d) == FD_STATUS_INPUT, "infinite duty");
    fd_calculator_free(calc);

    /* Calculators that cannot be made. */
    const char *unknown[] = {"benzene", "unobtainium"};
    CHECK(fd_calculator_new(lib, unknown, z, 2, 1.0, NULL) == NULL, "unknown component");
    expect_kind(lib, NULL, "unknown-component");
    const double negative[] = {1.2, -0.2};
    CHECK(fd_calculator_new(lib, names, negative, 2, 1.0, NULL) == NULL, "negative mole fraction");
    expect_kind(lib, NULL, "negative-mole-fraction");
    const double nan_z[] = {NAN, 0.5};
    CHECK(fd_calculator_new(lib, names, nan_z, 2, 1.0, NULL) == NULL, "NaN mole fraction");
    CHECK(fd_calculator_new(lib, NULL, z, 2, 1.0, NULL) == NULL, "null names");
    CHECK(fd_calculator_new(lib, names, z, 2, -1.0, NULL) == NULL, "negative flow");
    const char *wet[] = {"water", "toluene"};
    FdOptions water = fd_options_default();
    water.immiscible_water = true;
    const double zw[] = {0.5, 0.5};
    FdCalculator *w = fd_calculator_new(lib, wet, zw, 2, 1.0, &water);
    CHECK(w != NULL, "water-phase calculator");
    FdState bubble = {FD_STATE_SPEC_PRESSURE_VAPOUR_FRACTION, 0.0, 101325.0, 0.0};
    /* CRC azeotrope table (from memory): water-toluene boils at 84.1 degC at 1 atm. */
    CHECK(fd_calculator_duty(w, in, bubble, &d) == FD_STATUS_OK && fabs(d.outlet.temperature_k - 357.25) < 1.0,
          "water-toluene boils at the heterogeneous azeotrope");
    fd_calculator_free(w);
    const char *miscible[] = {"water", "ethanol"};
    CHECK(fd_calculator_new(lib, miscible, zw, 2, 1.0, &water) == NULL, "miscible pair refused");
    expect_kind(lib, NULL, "miscible-with-water");

    fd_library_free(lib);
    fd_library_free(NULL);
    fd_calculator_free(NULL);
    fd_string_free(NULL);
    printf("c: %d passed, %d failed\n", passed, failed);
    return failed == 0 ? 0 : 1;
}
