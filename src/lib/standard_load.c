/*
 * Custom standards (a client's contract specification) from YAML.
 *
 * The format is described field by field in docs/standards.md.  In short:
 *
 *   id: ksha-2024                      # word used in reports and JSON
 *   name: Kestrel Sound ... (2024)     # title
 *   orders:                            # 1 to 16 orders
 *     - id: berths
 *       name: Berths and inner channel
 *       tvu: {a: 0.2 m, b: 0.0075}     # TVU = sqrt(a^2 + (b d)^2)
 *       thu: {constant: 1 m, depth_fraction: 0}   # THU = c + f d
 *       feature: {size: 0.5 m}         # or {fraction: 5%}, or size +
 *                                      #   beyond + fraction, or none
 *       coverage: 200%                 # a percentage or words
 *
 * Lengths must carry a unit ("0.2 m", "20 cm"), converted by
 * sb_quantity_parse: a bare number is refused rather than guessed to be
 * metres.  Fractions are a plain number (0.05) or a percentage ("5%").
 * Every key is required (feature takes the word none); unknown keys are
 * refused.  Every error is reported at FILE:LINE:COL via the ydoc module.
 */
#include "swathbudget/orders.h"

#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/units.h"
#include "swathbudget/ydoc.h"

/* Field paths for messages: "orders[16]" < ORDER_PATH_MAX,
 * "orders[16].feature" < FIELD_PATH_MAX, "...thu.depth_fraction" below
 * LEAF_PATH_MAX. */
#define ORDER_PATH_MAX 24
#define FIELD_PATH_MAX 48
#define LEAF_PATH_MAX 80

/* A whole-text decimal number, finite; 1 if text is one. */
static int parse_plain_number(const char *text, double *out)
{
    char *end;
    double v;

    while (isspace((unsigned char)*text))
        text++;
    if (!*text)
        return 0;
    errno = 0;
    v = strtod(text, &end);
    if (end == text || errno == ERANGE || !isfinite(v))
        return 0;
    while (isspace((unsigned char)*end))
        end++;
    if (*end)
        return 0;
    *out = v;
    return 1;
}

/* "12.5%" or "12.5 %" -> 12.5; 1 if text is a percentage. */
static int parse_percent(const char *text, double *pct)
{
    char buf[64];
    size_t n = strlen(text);

    while (n > 0 && isspace((unsigned char)text[n - 1]))
        n--;
    if (n < 2 || n >= sizeof buf || text[n - 1] != '%')
        return 0;
    memcpy(buf, text, n - 1);
    buf[n - 1] = '\0';
    return parse_plain_number(buf, pct);
}

/* A scalar node's text, or an error naming what was expected. */
static int scalar_text(const struct sb_ydoc *doc, const struct sb_ynode *node,
                       const char *what, const char *expected,
                       const char **text, struct sb_error *err)
{
    if (node->kind != SB_YSCALAR)
        return sb_ydoc_error(doc, node, err, "%s: found a %s (expected %s)", what,
                             node->kind == SB_YMAP ? "mapping" : "list",
                             expected);
    if (!node->text || !node->text[0])
        return sb_ydoc_error(doc, node, err, "%s: found an empty value (expected %s)", what,
                             expected);
    *text = node->text;
    return SB_OK;
}

/* A length >= 0 with its unit ("0.5 m"), converted to metres. */
static int get_length(const struct sb_ydoc *doc, const struct sb_ynode *node,
                      const char *what, double *out_m, struct sb_error *err)
{
    static const char expected[] = "a length >= 0 with its unit, e.g. "
                                   "\"0.5 m\"";
    const char *text = NULL;
    double v;
    int rc;

    rc = scalar_text(doc, node, what, expected, &text, err);
    if (rc)
        return rc;
    if (parse_plain_number(text, &v))
        return sb_ydoc_error(doc, node, err,
                             "%s: \"%s\" has no unit (expected %s)", what, text,
                             expected);
    rc = sb_quantity_parse(text, SB_DIM_LENGTH, &v, NULL, err);
    if (rc != SB_OK) {
        sb_error_prefix(err, what);
        sb_error_at(err, sb_ydoc_name(doc), node->line, node->col);
        return rc;
    }
    if (!(v >= 0.0) || !isfinite(v))
        return sb_ydoc_error(doc, node, err, "%s: negative length \"%s\" (expected %s)",
                             what, text, expected);
    *out_m = v;
    return SB_OK;
}

/* A fraction >= 0: a plain number (0.05) or a percentage ("5%"). */
static int get_fraction(const struct sb_ydoc *doc, const struct sb_ynode *node,
                        const char *what, double *out, struct sb_error *err)
{
    static const char expected[] = "a fraction >= 0 as a number such as "
                                   "0.013 or a percentage such as \"5%\"";
    const char *text = NULL;
    double v;
    int rc;

    rc = scalar_text(doc, node, what, expected, &text, err);
    if (rc)
        return rc;
    if (parse_percent(text, &v))
        v /= 100.0;
    else if (!parse_plain_number(text, &v))
        return sb_ydoc_error(doc, node, err, "%s: \"%s\" is not a number (expected %s)",
                             what, text, expected);
    if (v < 0.0)
        return sb_ydoc_error(doc, node, err, "%s: negative value \"%s\" (expected %s)",
                             what, text, expected);
    *out = v;
    return SB_OK;
}

/* An identifier: letters, digits, '-', '_', '.'; 1..max-1 characters. */
static int get_word(const struct sb_ydoc *doc, const struct sb_ynode *node,
                    const char *what, char *dst, size_t max,
                    struct sb_error *err)
{
    const char *text = NULL, *p;
    int rc;

    rc = scalar_text(doc, node, what, "a word of letters, digits, '-', '_' "
                     "or '.'", &text, err);
    if (rc)
        return rc;
    if (strlen(text) >= max)
        return sb_ydoc_error(doc, node, err,
                             "%s: \"%s\" is too long (expected at most %zu characters)",
                             what, text, max - 1);
    for (p = text; *p; p++)
        if (!isalnum((unsigned char)*p) && *p != '-' && *p != '_' && *p != '.')
            return sb_ydoc_error(doc, node, err,
                                 "%s: \"%s\" contains '%c' (expected letters, "
                                 "digits, '-', '_' or '.' only)", what, text, *p);
    memcpy(dst, text, strlen(text) + 1);
    return SB_OK;
}

/* Free text of at most max-1 characters. */
static int get_text(const struct sb_ydoc *doc, const struct sb_ynode *node,
                    const char *what, char *dst, size_t max,
                    struct sb_error *err)
{
    const char *text = NULL;
    int rc;

    rc = scalar_text(doc, node, what, "text", &text, err);
    if (rc)
        return rc;
    if (strlen(text) >= max)
        return sb_ydoc_error(doc, node, err,
                             "%s: text too long (expected at most %zu characters)",
                             what, max - 1);
    memcpy(dst, text, strlen(text) + 1);
    return SB_OK;
}

/* A limit written as a length plus a fraction of depth, both required and
 * not both zero: tvu {a, b} (TVU = sqrt(a^2 + (b d)^2)) and thu {constant,
 * depth_fraction} (THU = constant + fraction d) have the same shape. */
static int load_limit(const struct sb_ydoc *doc, const struct sb_ynode *map,
                      const char *path, const char *len_key,
                      const char *frac_key, double *len_m, double *frac,
                      struct sb_error *err)
{
    const char *const keys[] = {len_key, frac_key, NULL};
    const struct sb_ynode *l, *f;
    char what[LEAF_PATH_MAX];
    int rc;

    if ((rc = sb_ynode_expect_map(doc, map, path, err)) ||
        (rc = sb_ymap_check_keys(doc, map, path, keys, err)) ||
        (rc = sb_ymap_require(doc, map, len_key, path, &l, err)) ||
        (rc = sb_ymap_require(doc, map, frac_key, path, &f, err)))
        return rc;
    snprintf(what, sizeof what, "%s.%s", path, len_key);
    if ((rc = get_length(doc, l, what, len_m, err)))
        return rc;
    snprintf(what, sizeof what, "%s.%s", path, frac_key);
    if ((rc = get_fraction(doc, f, what, frac, err)))
        return rc;
    if (*len_m == 0.0 && *frac == 0.0)
        return sb_ydoc_error(doc, map, err,
                             "%s: %s and %s are both zero (expected a limit "
                             "above zero)", path, len_key, frac_key);
    return SB_OK;
}

/* feature: none | {size} | {fraction} | {size, beyond, fraction} */
static int load_feature(const struct sb_ydoc *doc, const struct sb_ynode *node,
                        const char *path, struct sb_feature_rule *r,
                        struct sb_error *err)
{
    static const char *const keys[] = {"size", "beyond", "fraction", NULL};
    static const char shapes[] = "none, or a map with size, fraction, or "
                                 "size + beyond + fraction";
    const struct sb_ynode *size, *beyond, *frac;
    char what[LEAF_PATH_MAX];
    int rc;

    memset(r, 0, sizeof *r);
    if (node->kind == SB_YSCALAR) {
        if (node->text && strcmp(node->text, "none") == 0)
            return SB_OK;
        return sb_ydoc_error(doc, node, err, "%s: \"%s\" is not a rule (expected %s)", path,
                             node->text ? node->text : "", shapes);
    }
    if (node->kind != SB_YMAP)
        return sb_ydoc_error(doc, node, err, "%s: found a list (expected %s)", path,
                             shapes);
    if ((rc = sb_ymap_check_keys(doc, node, path, keys, err)))
        return rc;
    size = sb_ymap_get(node, "size");
    beyond = sb_ymap_get(node, "beyond");
    frac = sb_ymap_get(node, "fraction");
    if (!size && !frac)
        return sb_ydoc_error(doc, node, err,
                             "%s: neither size nor fraction given (expected %s)", path,
                             shapes);
    if (size && frac && !beyond)
        return sb_ydoc_error(doc, node, err,
                             "%s: size and fraction given without beyond "
                             "(expected beyond: the depth past which the "
                             "fraction applies)", path);
    if (beyond && !(size && frac))
        return sb_ydoc_error(doc, beyond, err,
                             "%s.beyond: given without both size and fraction (expected %s)",
                             path, shapes);
    r->specified = 1;
    r->beyond_m = INFINITY; /* size only */
    if (size) {
        snprintf(what, sizeof what, "%s.size", path);
        if ((rc = get_length(doc, size, what, &r->size_m, err)))
            return rc;
        if (r->size_m <= 0.0)
            return sb_ydoc_error(doc, size, err,
                                 "%s: zero size (expected a length above zero)", what);
    }
    if (frac) {
        snprintf(what, sizeof what, "%s.fraction", path);
        if ((rc = get_fraction(doc, frac, what, &r->frac, err)))
            return rc;
        if (r->frac <= 0.0)
            return sb_ydoc_error(doc, frac, err,
                                 "%s: zero fraction (expected a fraction above zero)",
                                 what);
        r->beyond_m = 0.0; /* fraction only: applies at every depth */
    }
    if (beyond) {
        snprintf(what, sizeof what, "%s.beyond", path);
        if ((rc = get_length(doc, beyond, what, &r->beyond_m, err)))
            return rc;
        if (r->beyond_m <= 0.0)
            return sb_ydoc_error(doc, beyond, err,
                                 "%s: zero depth (expected a depth above zero)", what);
    }
    return SB_OK;
}

static int load_coverage(const struct sb_ydoc *doc, const struct sb_ynode *node,
                         const char *path, struct sb_order *o,
                         struct sb_error *err)
{
    double v;
    int rc;

    if ((rc = get_text(doc, node, path, o->coverage, sizeof o->coverage, err)))
        return rc;
    if (parse_plain_number(o->coverage, &v))
        return sb_ydoc_error(doc, node, err,
                             "%s: bare number \"%s\" (expected a percentage such as "
                             "\"100%%\", or words)", path, o->coverage);
    o->coverage_pct = NAN;
    if (parse_percent(o->coverage, &v)) {
        if (v < 0.0)
            return sb_ydoc_error(doc, node, err,
                                 "%s: negative percentage (expected 0%% or more)",
                                 path);
        o->coverage_pct = v;
    }
    return SB_OK;
}

static int load_order(const struct sb_ydoc *doc, const struct sb_ynode *map,
                      const char *path, struct sb_order *o,
                      struct sb_error *err)
{
    static const char *const keys[] = {"id", "name", "tvu", "thu",
                                       "feature", "coverage", NULL};
    const struct sb_ynode *n[6];
    char what[FIELD_PATH_MAX];
    int rc, i;

    if ((rc = sb_ynode_expect_map(doc, map, path, err)) ||
        (rc = sb_ymap_check_keys(doc, map, path, keys, err)))
        return rc;
    for (i = 0; keys[i]; i++)
        if ((rc = sb_ymap_require(doc, map, keys[i], path, &n[i], err)))
            return rc;
    snprintf(what, sizeof what, "%s.id", path);
    if ((rc = get_word(doc, n[0], what, o->id, sizeof o->id, err)))
        return rc;
    snprintf(what, sizeof what, "%s.name", path);
    if ((rc = get_text(doc, n[1], what, o->name, sizeof o->name, err)))
        return rc;
    snprintf(what, sizeof what, "%s.tvu", path);
    if ((rc = load_limit(doc, n[2], what, "a", "b", &o->tvu_a_m,
                         &o->tvu_b, err)))
        return rc;
    snprintf(what, sizeof what, "%s.thu", path);
    if ((rc = load_limit(doc, n[3], what, "constant", "depth_fraction",
                         &o->thu_c_m, &o->thu_frac, err)))
        return rc;
    snprintf(what, sizeof what, "%s.feature", path);
    if ((rc = load_feature(doc, n[4], what, &o->feature, err)))
        return rc;
    snprintf(what, sizeof what, "%s.coverage", path);
    return load_coverage(doc, n[5], what, o, err);
}

/* The document's root into *out (which the caller has zeroed). */
static int load_root(const struct sb_ydoc *doc, struct sb_standard *out,
                     struct sb_error *err)
{
    static const char *const keys[] = {"id", "name", "orders", NULL};
    const struct sb_ynode *root = sb_ydoc_root(doc);
    const struct sb_ynode *id, *name, *orders;
    char what[ORDER_PATH_MAX];
    size_t i;
    int rc, j;

    if ((rc = sb_ynode_expect_map(doc, root, "standard", err)) ||
        (rc = sb_ymap_check_keys(doc, root, "standard", keys, err)) ||
        (rc = sb_ymap_require(doc, root, "id", "standard", &id, err)) ||
        (rc = sb_ymap_require(doc, root, "name", "standard", &name, err)) ||
        (rc = sb_ymap_require(doc, root, "orders", "standard", &orders, err)))
        return rc;
    if ((rc = get_word(doc, id, "id", out->id, sizeof out->id, err)))
        return rc;
    if (sb_standard_builtin(out->id))
        return sb_ydoc_error(doc, id, err,
                             "id: \"%s\" is a compiled-in standard (expected "
                             "an id of your own)", out->id);
    if ((rc = get_text(doc, name, "name", out->title, sizeof out->title, err)))
        return rc;
    if ((rc = sb_ynode_expect_seq(doc, orders, "orders", err)))
        return rc;
    if (orders->n == 0 || orders->n > SB_STANDARD_ORDERS_MAX)
        return sb_ydoc_error(doc, orders, err,
                             "orders: %zu orders (expected 1 to %d)", orders->n,
                             SB_STANDARD_ORDERS_MAX);
    for (i = 0; i < orders->n; i++) {
        struct sb_order *o = &out->orders[i];

        snprintf(what, sizeof what, "orders[%d]", (int)i + 1);
        if ((rc = load_order(doc, orders->items[i], what, o, err)))
            return rc;
        for (j = 0; j < (int)i; j++)
            if (strcmp(out->orders[j].id, o->id) == 0)
                return sb_ydoc_error(doc, sb_ymap_get(orders->items[i], "id"),
                                     err, "%s.id: \"%s\" used twice (expected "
                                     "ids unique within the standard)", what,
                                     o->id);
        out->n_orders = (int)i + 1;
    }
    return SB_OK;
}

static int load_doc(struct sb_ydoc *doc, struct sb_standard *out,
                    struct sb_error *err)
{
    int rc = load_root(doc, out, err);

    if (rc == SB_OK) /* the figures come from this file */
        snprintf(out->source, sizeof out->source, "%s", sb_ydoc_name(doc));
    sb_ydoc_free(doc);
    if (rc != SB_OK)
        memset(out, 0, sizeof *out);
    return rc;
}

int sb_standard_load(const char *path, struct sb_standard *out,
                     struct sb_error *err)
{
    struct sb_ydoc *doc = NULL;
    int rc;

    memset(out, 0, sizeof *out);
    rc = sb_ydoc_load_file(path, &doc, err);
    if (rc != SB_OK)
        return rc;
    return load_doc(doc, out, err);
}

int sb_standard_load_string(const char *name, const char *text, size_t len,
                            struct sb_standard *out, struct sb_error *err)
{
    struct sb_ydoc *doc = NULL;
    int rc;

    memset(out, 0, sizeof *out);
    rc = sb_ydoc_load_string(name, text, len, &doc, err);
    if (rc != SB_OK)
        return rc;
    return load_doc(doc, out, err);
}
