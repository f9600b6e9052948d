/*
 * Stated values and plain quantities read from YAML nodes (declared in
 * include/swathbudget/spec.h).  The text rules live in units.c; this file
 * adds the two YAML forms and puts every message at the right node with
 * the field path in front.
 */
#include "swathbudget/spec.h"

#include <stdio.h>
#include <string.h>

#include "swathbudget/units.h"
#include "swathbudget/ydoc.h"

/* Give a units.c message (which has no position) the node's position and
 * the field path. */
static int place(const struct sb_ydoc *doc, const struct sb_ynode *node,
                 const char *what, struct sb_error *err)
{
    sb_error_at(err, sb_ydoc_name(doc), node->line, node->col);
    sb_error_prefix(err, what);
    return SB_EINPUT;
}

/* Build "what.key" into buf. */
static const char *child_path(char *buf, size_t n, const char *what,
                              const char *key)
{
    snprintf(buf, n, "%s%s%s", what && *what ? what : "",
             what && *what ? "." : "", key);
    return buf;
}

int sb_ynode_stated(const struct sb_ydoc *doc, const struct sb_ynode *node,
                    const char *what, unsigned dims, unsigned flags,
                    struct sb_stated *out, struct sb_error *err)
{
    static const char *const keys[] = {"value", "unit", "type", NULL};
    char path[256];
    const struct sb_ynode *vn, *un, *tn;
    const char *unit, *type = NULL;
    double v;
    int rc;

    if (!node)
        return sb_ydoc_error(doc, NULL, err, "%s: missing value", what);
    if (node->kind == SB_YSCALAR) {
        if (!node->text[0])
            return sb_ydoc_error(doc, node, err,
                                 "%s: empty value (expected VALUE UNIT "
                                 "[TYPE], e.g. '0.05 m 95%%')",
                                 what);
        if (sb_stated_parse(node->text, dims, flags, out, err) != SB_OK)
            return place(doc, node, what, err);
        return SB_OK;
    }
    if (node->kind != SB_YMAP)
        return sb_ydoc_error(doc, node, err,
                             "%s: found %s (expected 'VALUE UNIT [TYPE]' or "
                             "a mapping with value, unit and type)",
                             what, sb_ynode_kind_name(node));
    if ((rc = sb_ymap_check_keys(doc, node, what, keys, err)) != SB_OK)
        return rc;
    if ((rc = sb_ymap_require(doc, node, "value", what, &vn, err)) != SB_OK)
        return rc;
    if ((rc = sb_ymap_require(doc, node, "unit", what, &un, err)) != SB_OK)
        return rc;
    if ((rc = sb_ynode_double(doc, vn, child_path(path, sizeof path, what,
                                                  "value"),
                              &v, err)) != SB_OK)
        return rc;
    if ((rc = sb_ynode_string(doc, un, child_path(path, sizeof path, what,
                                                  "unit"),
                              &unit, err)) != SB_OK)
        return rc;
    tn = sb_ymap_get(node, "type");
    if (tn && (rc = sb_ynode_string(doc, tn, child_path(path, sizeof path,
                                                        what, "type"),
                                    &type, err)) != SB_OK)
        return rc;
    if (sb_stated_from_parts(v, unit, type, dims, flags, out, err) != SB_OK) {
        /* point at the part that is wrong: the value when it is negative,
         * the type when the unit is fine, else the unit */
        const struct sb_ynode *at = un;
        unsigned dim;

        if (v < 0.0)
            at = vn;
        else if (tn && sb_unit_lookup(unit, &dim, NULL) == SB_OK &&
                 (dim & dims))
            at = tn;
        return place(doc, at, what, err);
    }
    return SB_OK;
}

int sb_ynode_quantity(const struct sb_ydoc *doc, const struct sb_ynode *node,
                      const char *what, unsigned dims, double *si,
                      struct sb_error *err)
{
    if (!node)
        return sb_ydoc_error(doc, NULL, err, "%s: missing value", what);
    if (node->kind != SB_YSCALAR || !node->text[0])
        return sb_ydoc_error(doc, node, err,
                             "%s: found %s (expected a single value: VALUE "
                             "UNIT)",
                             what, sb_ynode_kind_name(node));
    if (sb_quantity_parse(node->text, dims, si, NULL, err) != SB_OK)
        return place(doc, node, what, err);
    return SB_OK;
}
