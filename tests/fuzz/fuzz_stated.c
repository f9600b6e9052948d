/*
 * libFuzzer target: the stated-value parser (units.h), "VALUE UNIT [TYPE]"
 * and the plain quantity "VALUE UNIT".
 *
 * Byte 0 chooses the accepted dimensions and the 2-D flag; the rest is the
 * text.  Checks: no crash, leak or undefined behaviour; on success every
 * number is finite, the value and u are >= 0 and the dimension is one the
 * field accepts; on failure a one-line message.
 */
#include "fuzz_common.h" /* first: it sets _GNU_SOURCE for memfd */

#include <math.h>

#include "swathbudget/units.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    struct sb_stated st;
    struct sb_error err;
    unsigned dims, flags;
    unsigned qdim = 0;
    double q = 0.0;
    char *text;
    int rc;

    if (size < 1)
        return 0;
    dims = data[0] & 0x3fu;                 /* any mix of the six SB_DIM_* */
    flags = (data[0] & 0x40u) ? SB_STATED_2D : 0u;
    text = fuzz_strndup(data + 1, size - 1);

    sb_error_clear(&err);
    rc = sb_stated_parse(text, dims, flags, &st, &err);
    if (rc == SB_OK) {
        FUZZ_ASSERT(isfinite(st.value) && st.value >= 0.0);
        FUZZ_ASSERT(isfinite(st.u) && st.u >= 0.0);
        FUZZ_ASSERT(isfinite(st.written) && st.written >= 0.0);
        FUZZ_ASSERT((st.dim & dims) != 0 || (dims == 0 && st.dim == 0));
        FUZZ_ASSERT(memchr(st.unit, '\0', sizeof st.unit) != NULL);
        FUZZ_ASSERT((int)st.type >= SB_UTYPE_SD && st.type <= SB_UTYPE_MAX);
    } else {
        FUZZ_ASSERT(rc == SB_EINPUT);
        fuzz_check_input_error(&err, 0);
    }

    sb_error_clear(&err);
    rc = sb_quantity_parse(text, dims, &q, &qdim, &err);
    if (rc == SB_OK)
        FUZZ_ASSERT(isfinite(q));
    else {
        FUZZ_ASSERT(rc == SB_EINPUT);
        fuzz_check_input_error(&err, 0);
    }

    free(text);
    return 0;
}
