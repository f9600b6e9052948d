/*
 * swathbudget — the survey-system specification: one YAML file -> struct
 * sb_system (system.h).  The file format is described field by field in
 * docs/spec.md.
 *
 * Every uncertain figure in the file is a stated value (units.h), written
 * either as one string "0.02 deg sd" or as a mapping
 * {value: 0.02, unit: deg, type: sd}.  Every input error is SB_EINPUT with
 * the file, line and column (1-based) of the offending text and a message
 * that starts with the field path, e.g.
 *     motion.roll: unit 'm' is a length (expected an angle: deg, ...)
 */
#ifndef SWATHBUDGET_SPEC_H
#define SWATHBUDGET_SPEC_H

#include <stddef.h>

#include "swathbudget/error.h"
#include "swathbudget/system.h"
#include "swathbudget/units.h"
#include "swathbudget/ydoc.h"

#ifdef __cplusplus
extern "C" {
#endif

/*
 * Read the system description in the YAML file at path into *out.
 * out: caller's struct; it is written only on success (on failure it is
 * left as it was).  sys->source receives path.  Nothing is left allocated.
 * Returns SB_OK; SB_EINPUT for any problem in the file (err has the
 * position and "FIELD: what is wrong (what was expected)"); SB_EIO if the
 * file cannot be read; SB_ENOMEM.
 */
int sb_spec_load(const char *path, struct sb_system *out,
                 struct sb_error *err);

/* The same from text in memory (len bytes); name is used in messages and
 * as sys->source. */
int sb_spec_load_string(const char *name, const char *text, size_t len,
                        struct sb_system *out, struct sb_error *err);

/*
 * Read a stated value from a YAML node: a scalar "VALUE UNIT [TYPE]" or a
 * mapping with keys value (number), unit (text) and optional type (text).
 * dims, flags: as for sb_stated_parse (units.h).  what: the field path put
 * in front of every message.  Errors are SB_EINPUT at the node (for the
 * mapping form, at the part that is wrong).  out is untouched on error.
 */
int sb_ynode_stated(const struct sb_ydoc *doc, const struct sb_ynode *node,
                    const char *what, unsigned dims, unsigned flags,
                    struct sb_stated *out, struct sb_error *err);

/*
 * Read a plain quantity "VALUE UNIT" (a nominal value such as a lever-arm
 * coordinate; may be negative) from a scalar node into SI (*si).  Errors
 * as for sb_ynode_stated.
 */
int sb_ynode_quantity(const struct sb_ydoc *doc, const struct sb_ynode *node,
                      const char *what, unsigned dims, double *si,
                      struct sb_error *err);

#ifdef __cplusplus
}
#endif

#endif
