/*
 * libFuzzer target: the YAML system-specification loader (spec.h), through
 * sb_spec_load_string.
 *
 * The document is named "<scratch dir>/fuzz.yaml" so that a profile file
 * named in it is looked for in the scratch directory, where one valid cast
 * (c.csv) is written at start-up: seeds can reach the profile path.
 * Inputs naming device or proc files are skipped (reading /dev/zero would
 * be a hang of the harness, not of the loader).
 * Checks: no crash, leak or undefined behaviour; an input error has a
 * position and a one-line message; nothing is left allocated (sanitizer).
 */
#include "fuzz_common.h" /* first: it sets _GNU_SOURCE for memfd */

#include "swathbudget/spec.h"
#include "swathbudget/system.h"

static char doc_name[128];

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
    static const char cast[] =
        "depth_m,speed_m_s\n0,1500\n10,1498\n20,1495.2\n40,1491\n"
        "60,1490\n80,1489\n100,1488.5\n";

    (void)argc;
    (void)argv;
    fuzz_write_disk("c.csv", (const uint8_t *)cast, sizeof cast - 1);
    snprintf(doc_name, sizeof doc_name, "%s/fuzz.yaml", fuzz_scratch_dir());
    return 0;
}

static int names_device(const uint8_t *data, size_t size)
{
    static const char *const bad[] = {"/dev", "/proc", "/sys"};
    size_t i, k;

    for (k = 0; k < sizeof bad / sizeof bad[0]; k++) {
        size_t n = strlen(bad[k]);
        for (i = 0; i + n <= size; i++)
            if (memcmp(data + i, bad[k], n) == 0)
                return 1;
    }
    return 0;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    struct sb_system sys;
    struct sb_error err;
    int rc;

    if (names_device(data, size))
        return 0;
    sb_error_clear(&err);
    rc = sb_spec_load_string(doc_name, (const char *)data, size, &sys, &err);
    if (rc == SB_OK) {
        FUZZ_ASSERT(sb_system_validate(&sys, &err) == SB_OK);
        sb_system_release(&sys);
    } else {
        FUZZ_ASSERT(rc == SB_EINPUT || rc == SB_EIO || rc == SB_ENOMEM);
        fuzz_check_input_error(&err, rc == SB_EINPUT);
    }
    return 0;
}
