/*
 * libFuzzer target: the custom-standard loader (orders.h), through
 * sb_standard_load_string.
 * Checks: no crash, leak or undefined behaviour; on success every order's
 * limits are finite and non-negative and give finite TVU/THU over the
 * depth range; an input error has a position and a one-line message.
 */
#include "fuzz_common.h" /* first: it sets _GNU_SOURCE for memfd */

#include <math.h>

#include "swathbudget/orders.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    struct sb_standard std;
    struct sb_error err;
    int rc, k;

    sb_error_clear(&err);
    rc = sb_standard_load_string("fuzz.yaml", (const char *)data, size, &std,
                                 &err);
    if (rc == SB_OK) {
        FUZZ_ASSERT(std.n_orders >= 1 &&
                    std.n_orders <= SB_STANDARD_ORDERS_MAX);
        for (k = 0; k < std.n_orders; k++) {
            const struct sb_order *o = &std.orders[k];
            double size_m;

            FUZZ_ASSERT(memchr(o->id, '\0', sizeof o->id) != NULL);
            FUZZ_ASSERT(isfinite(o->tvu_a_m) && o->tvu_a_m >= 0.0);
            FUZZ_ASSERT(isfinite(o->tvu_b) && o->tvu_b >= 0.0);
            FUZZ_ASSERT(isfinite(o->thu_c_m) && o->thu_c_m >= 0.0);
            FUZZ_ASSERT(isfinite(o->thu_frac) && o->thu_frac >= 0.0);
            FUZZ_ASSERT(isfinite(sb_order_tvu(o, 11000.0)));
            FUZZ_ASSERT(isfinite(sb_order_thu(o, 11000.0)));
            if (sb_order_feature(o, 100.0, &size_m))
                FUZZ_ASSERT(isfinite(size_m));
            FUZZ_ASSERT(sb_standard_order(&std, o->id) != NULL);
        }
    } else {
        FUZZ_ASSERT(rc == SB_EINPUT || rc == SB_ENOMEM);
        fuzz_check_input_error(&err, rc == SB_EINPUT);
    }
    return 0;
}
