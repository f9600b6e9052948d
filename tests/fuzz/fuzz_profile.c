/*
 * libFuzzer target: the cast / sound-velocity-profile reader (profile.h),
 * sb_profile_load on a scratch file holding the input.
 *
 * Byte 0 chooses the call: (b0 % 9) - 1 is the equation (-1 = the default
 * one, 0..7 an SB_SS_* equation), bit 7 clear gives latitude NaN
 * (unknown), set gives 51.42 deg.  The rest is the file.
 * Checks: no crash, leak or undefined behaviour; a profile returned has at
 * least SB_PROFILE_MIN_SAMPLES finite samples, depths strictly increasing
 * within [0, SB_PROFILE_MAX_DEPTH_M], speeds within the plausible range;
 * an input error has a position (or a sample-less whole-file message with
 * the file) and a one-line message.
 */
#include "fuzz_common.h" /* first: it sets _GNU_SOURCE for memfd */

#include <math.h>

#include "swathbudget/profile.h"
#include "swathbudget/soundspeed.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    struct sb_profile *p = NULL;
    struct sb_error err;
    const char *path;
    int equation, rc;
    double lat;
    size_t i;

    if (size < 1)
        return 0;
    equation = (int)(data[0] % (SB_SS_COUNT + 1)) - 1;
    lat = (data[0] & 0x80u) ? 0.897448 /* 51.42 deg in rad */ : NAN;
    path = fuzz_write_file("cast.csv", data + 1, size - 1);

    sb_error_clear(&err);
    rc = sb_profile_load(path, equation, lat, &p, &err);
    if (rc == SB_OK) {
        FUZZ_ASSERT(p != NULL);
        FUZZ_ASSERT(p->n >= SB_PROFILE_MIN_SAMPLES);
        for (i = 0; i < p->n; i++) {
            FUZZ_ASSERT(isfinite(p->depth_m[i]) && p->depth_m[i] >= 0.0 &&
                        p->depth_m[i] <= SB_PROFILE_MAX_DEPTH_M);
            FUZZ_ASSERT(isfinite(p->speed_mps[i]) &&
                        p->speed_mps[i] >= SB_PROFILE_SPEED_MIN_MPS &&
                        p->speed_mps[i] <= SB_PROFILE_SPEED_MAX_MPS);
            if (i > 0)
                FUZZ_ASSERT(p->depth_m[i] > p->depth_m[i - 1]);
        }
        sb_profile_free(p);
    } else {
        FUZZ_ASSERT(p == NULL);
        FUZZ_ASSERT(rc == SB_EINPUT || rc == SB_EIO || rc == SB_ENOMEM);
        fuzz_check_input_error(&err, 0);
        if (rc == SB_EINPUT)
            FUZZ_ASSERT(err.file[0] != '\0');
    }
    return 0;
}
