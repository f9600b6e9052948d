/*
 * swathbudget — a small YAML document tree with source positions.
 *
 * libyaml is an event parser; every loader in swathbudget (system spec,
 * custom standards, areas) needs the same things on top of it: a tree it can
 * walk in any order, the line and column of every node for error messages,
 * and the same strict rules everywhere (no duplicate keys, no unknown keys,
 * no tabs, no aliases, scalars of the expected type).  This module gives that
 * once.  Positions are 1-based, as printed in "FILE:LINE:COL:" messages.
 */
#ifndef SWATHBUDGET_YDOC_H
#define SWATHBUDGET_YDOC_H

#include <stddef.h>

#include "swathbudget/error.h"

#ifdef __cplusplus
extern "C" {
#endif

enum sb_ynode_kind { SB_YSCALAR, SB_YMAP, SB_YSEQ };

struct sb_ynode {
    enum sb_ynode_kind kind;
    int line, col;            /* where the node starts (1-based) */
    const char *text;         /* SB_YSCALAR: the scalar, NUL-terminated */
    int quoted;               /* SB_YSCALAR: 1 if written in quotes */
    size_t n;                 /* SB_YMAP: pairs; SB_YSEQ: items */
    const char **keys;        /* SB_YMAP: key texts */
    const struct sb_ynode **key_nodes; /* SB_YMAP: key nodes (positions) */
    const struct sb_ynode **items;     /* SB_YMAP: values; SB_YSEQ: items */
};

struct sb_ydoc;

/* Load a whole YAML file (one document).  Syntax errors, tabs used for
 * indentation, duplicate keys, anchors/aliases and multiple documents are
 * SB_EINPUT with the file position.  An empty file is an error too. */
int sb_ydoc_load_file(const char *path, struct sb_ydoc **out,
                      struct sb_error *err);
/* The same from memory; name is used in messages. */
int sb_ydoc_load_string(const char *name, const char *text, size_t len,
                        struct sb_ydoc **out, struct sb_error *err);
void sb_ydoc_free(struct sb_ydoc *doc);

const struct sb_ynode *sb_ydoc_root(const struct sb_ydoc *doc);
const char *sb_ydoc_name(const struct sb_ydoc *doc); /* file name */

/* "a mapping", "a list", "a single value", "an empty value" (for messages
 * such as "found a list (expected a number)"); "nothing" for NULL. */
const char *sb_ynode_kind_name(const struct sb_ynode *node);

/* Fill err with a message at node's position (printf-style); returns code.*/
int sb_ydoc_error(const struct sb_ydoc *doc, const struct sb_ynode *node,
                  struct sb_error *err, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 4, 5)))
#endif
    ;

/* Map helpers.  sb_ymap_get returns NULL when the key is absent. */
const struct sb_ynode *sb_ymap_get(const struct sb_ynode *map, const char *key);

/* Require node to be a map (what = field path for the message). */
int sb_ynode_expect_map(const struct sb_ydoc *doc, const struct sb_ynode *node,
                        const char *what, struct sb_error *err);
int sb_ynode_expect_seq(const struct sb_ydoc *doc, const struct sb_ynode *node,
                        const char *what, struct sb_error *err);

/* Every key of map must be in the NULL-terminated list allowed; the first
 * other key is SB_EINPUT at the key's position, naming the allowed keys. */
int sb_ymap_check_keys(const struct sb_ydoc *doc, const struct sb_ynode *map,
                       const char *what, const char *const *allowed,
                       struct sb_error *err);

/* Fetch a required child of a map (SB_EINPUT at the map if missing). */
int sb_ymap_require(const struct sb_ydoc *doc, const struct sb_ynode *map,
                    const char *key, const char *what,
                    const struct sb_ynode **out, struct sb_error *err);

/* Scalar conversions, strict (whole text must be used; finite only). */
int sb_ynode_double(const struct sb_ydoc *doc, const struct sb_ynode *node,
                    const char *what, double *out, struct sb_error *err);
int sb_ynode_int(const struct sb_ydoc *doc, const struct sb_ynode *node,
                 const char *what, long lo, long hi, long *out,
                 struct sb_error *err);
int sb_ynode_bool(const struct sb_ydoc *doc, const struct sb_ynode *node,
                  const char *what, int *out, struct sb_error *err);
/* The scalar's text (non-empty) or SB_EINPUT if node is not a scalar. */
int sb_ynode_string(const struct sb_ydoc *doc, const struct sb_ynode *node,
                    const char *what, const char **out, struct sb_error *err);
/* One of a NULL-terminated list of words; *index receives its position. */
int sb_ynode_choice(const struct sb_ydoc *doc, const struct sb_ynode *node,
                    const char *what, const char *const *words, int *index,
                    struct sb_error *err);

#ifdef __cplusplus
}
#endif

#endif
