/*
 * A YAML document tree with 1-based source positions, built from libyaml's
 * event parser (see include/swathbudget/ydoc.h).
 *
 * Why our own tree rather than libyaml's document API: the document API
 * silently accepts duplicate keys and resolves aliases, and its nodes carry
 * marks but no cheap by-key lookup; we need the strict rules of the project
 * (duplicate keys, aliases, tabs, several documents are all input errors) and
 * one place that words every message the same way.
 */
#include "swathbudget/ydoc.h"

#include <errno.h>
#include <limits.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#include <yaml.h>

/* Nesting deeper than this is refused: it protects the recursive builder's
 * stack against hostile input; no real file comes close. */
#define YDOC_MAX_DEPTH 64

struct ynode {
    struct sb_ynode pub;   /* must stay first: we cast between the two */
    struct ynode *next;    /* chain of every node, for sb_ydoc_free */
    char *text;            /* owned scalar text */
    const char **keys;     /* owned arrays (pub points to them) */
    const struct sb_ynode **key_nodes;
    const struct sb_ynode **items;
    size_t cap;
};

struct sb_ydoc {
    char *name;
    struct ynode *nodes;   /* every node, newest first */
    struct ynode *root;
};

struct builder {
    struct sb_ydoc *doc;
    yaml_parser_t parser;
    const unsigned char *buf; /* the whole input, for positions of reader
                                 errors and for the tab diagnosis */
    size_t len;
    struct sb_error *err;
};

/* ------------------------------------------------------------------ */
/* memory                                                               */

static struct ynode *node_new(struct sb_ydoc *doc, enum sb_ynode_kind kind,
                              const yaml_mark_t *mark)
{
    struct ynode *n = calloc(1, sizeof *n);

    if (!n)
        return NULL;
    n->pub.kind = kind;
    n->pub.line = (int)mark->line + 1; /* libyaml marks are 0-based */
    n->pub.col = (int)mark->column + 1;
    n->next = doc->nodes;
    doc->nodes = n;
    return n;
}

/* Grow the arrays of a map or sequence node to hold one more entry. */
static int node_grow(struct ynode *n)
{
    size_t cap;

    if (n->pub.n < n->cap)
        return SB_OK;
    cap = n->cap ? 2 * n->cap : 8;
    if (n->pub.kind == SB_YMAP) {
        const char **k = realloc(n->keys, cap * sizeof *k);
        const struct sb_ynode **kn;

        if (!k)
            return SB_ENOMEM;
        n->keys = k;
        kn = realloc(n->key_nodes, cap * sizeof *kn);
        if (!kn)
            return SB_ENOMEM;
        n->key_nodes = kn;
    }
    {
        const struct sb_ynode **it = realloc(n->items, cap * sizeof *it);

        if (!it)
            return SB_ENOMEM;
        n->items = it;
    }
    n->cap = cap;
    n->pub.keys = n->keys;
    n->pub.key_nodes = n->key_nodes;
    n->pub.items = n->items;
    return SB_OK;
}

void sb_ydoc_free(struct sb_ydoc *doc)
{
    struct ynode *n, *next;

    if (!doc)
        return;
    for (n = doc->nodes; n; n = next) {
        next = n->next;
        free(n->text);
        free(n->keys);
        free(n->key_nodes);
        free(n->items);
        free(n);
    }
    free(doc->name);
    free(doc);
}

/* ------------------------------------------------------------------ */
/* errors while building                                                */

static int nomem(struct builder *b)
{
    return sb_error_set(b->err, SB_ENOMEM, "", 0, 0,
                        "%s: out of memory while reading YAML", b->doc->name);
}

static int fail_at(struct builder *b, const yaml_mark_t *m, const char *fmt,
                   ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;

static int fail_at(struct builder *b, const yaml_mark_t *m, const char *fmt,
                   ...)
{
    va_list ap;

    sb_error_at(b->err, b->doc->name, (int)m->line + 1, (int)m->column + 1);
    if (b->err) {
        char msg[SB_ERROR_MSG_MAX];

        va_start(ap, fmt);
        vsnprintf(msg, sizeof msg, fmt, ap);
        va_end(ap);
        /* through sb_error_set, which keeps the message on one line */
        sb_error_set(b->err, SB_EINPUT, b->doc->name, (int)m->line + 1,
                     (int)m->column + 1, "%s", msg);
    }
    return SB_EINPUT;
}

/* Line and column (1-based, columns in characters) of a byte offset. */
static void offset_position(const struct builder *b, size_t off, int *line,
                            int *col)
{
    size_t i;
    int l = 1, c = 1;

    if (off > b->len)
        off = b->len;
    for (i = 0; i < off; i++) {
        if (b->buf[i] == '\n') {
            l++;
            c = 1;
        } else if ((b->buf[i] & 0xC0) != 0x80) { /* not a continuation */
            c++;
        }
    }
    *line = l;
    *col = c;
}

/* If the given 1-based line starts with whitespace containing a tab, give
 * the 1-based column of that tab, else 0.  libyaml reports such a tab only
 * as "found character that cannot start any token", which does not tell a
 * surveyor what to fix. */
static int leading_tab_column(const struct builder *b, int line)
{
    size_t i = 0;
    int l = 1, c = 1;

    while (i < b->len && l < line) {
        if (b->buf[i++] == '\n')
            l++;
    }
    if (l != line)
        return 0;
    for (; i < b->len && (b->buf[i] == ' ' || b->buf[i] == '\t'); i++, c++) {
        if (b->buf[i] == '\t')
            return c;
    }
    return 0;
}

/* Turn the parser's error state into one message. */
static int parser_failure(struct builder *b)
{
    const yaml_parser_t *p = &b->parser;
    const char *problem = p->problem ? p->problem : "unknown problem";
    int line, col, tab;

    if (p->error == YAML_MEMORY_ERROR)
        return nomem(b);
    if (p->error == YAML_READER_ERROR) {
        /* reader errors carry a byte offset, not a mark */
        offset_position(b, p->problem_offset, &line, &col);
        return sb_error_set(b->err, SB_EINPUT, b->doc->name, line, col,
                            "not a readable YAML text: %s (expected UTF-8 "
                            "text without control characters)",
                            problem);
    }
    line = (int)p->problem_mark.line + 1;
    col = (int)p->problem_mark.column + 1;
    tab = leading_tab_column(b, line);
    if (tab == 0 && p->problem_mark.index < b->len &&
        b->buf[p->problem_mark.index] == '\t') {
        /* a tab where libyaml wanted a token, e.g. "-<TAB>item" */
        tab = col;
    }
    if (tab > 0)
        return sb_error_set(b->err, SB_EINPUT, b->doc->name, line, tab,
                            "tab character used for indentation (expected "
                            "spaces)");
    if (p->context)
        return sb_error_set(b->err, SB_EINPUT, b->doc->name, line, col,
                            "YAML syntax error: %s (expected well-formed "
                            "YAML; %s at line %d column %d)",
                            problem, p->context,
                            (int)p->context_mark.line + 1,
                            (int)p->context_mark.column + 1);
    return sb_error_set(b->err, SB_EINPUT, b->doc->name, line, col,
                        "YAML syntax error: %s (expected well-formed YAML)",
                        problem);
}

static int next_event(struct builder *b, yaml_event_t *ev)
{
    if (!yaml_parser_parse(&b->parser, ev))
        return parser_failure(b);
    return SB_OK;
}

static const unsigned char *event_anchor(const yaml_event_t *ev)
{
    switch (ev->type) {
    case YAML_SCALAR_EVENT: return ev->data.scalar.anchor;
    case YAML_SEQUENCE_START_EVENT: return ev->data.sequence_start.anchor;
    case YAML_MAPPING_START_EVENT: return ev->data.mapping_start.anchor;
    default: return NULL;
    }
}

/* ------------------------------------------------------------------ */
/* building                                                             */

static int build_node(struct builder *b, yaml_event_t *ev, int depth,
                      struct ynode **out);

static int build_seq(struct builder *b, struct ynode *n, int depth)
{
    yaml_event_t ev;
    struct ynode *child;
    int rc;

    for (;;) {
        if ((rc = next_event(b, &ev)) != SB_OK)
            return rc;
        if (ev.type == YAML_SEQUENCE_END_EVENT) {
            yaml_event_delete(&ev);
            return SB_OK;
        }
        if ((rc = build_node(b, &ev, depth + 1, &child)) != SB_OK)
            return rc;
        if (node_grow(n) != SB_OK)
            return nomem(b);
        n->items[n->pub.n++] = &child->pub;
    }
}

static int build_map(struct builder *b, struct ynode *n, int depth)
{
    yaml_event_t ev;
    struct ynode *key, *val;
    size_t i;
    int rc;

    for (;;) {
        if ((rc = next_event(b, &ev)) != SB_OK)
            return rc;
        if (ev.type == YAML_MAPPING_END_EVENT) {
            yaml_event_delete(&ev);
            return SB_OK;
        }
        if (ev.type == YAML_SEQUENCE_START_EVENT ||
            ev.type == YAML_MAPPING_START_EVENT) {
            rc = fail_at(b, &ev.start_mark,
                         "a %s is used as a mapping key (expected a plain "
                         "word as key)",
                         ev.type == YAML_SEQUENCE_START_EVENT ? "sequence"
                                                              : "mapping");
            yaml_event_delete(&ev);
            return rc;
        }
        if ((rc = build_node(b, &ev, depth + 1, &key)) != SB_OK)
            return rc;
        for (i = 0; i < n->pub.n; i++) {
            if (strcmp(n->keys[i], key->text) == 0)
                return sb_error_set(
                    b->err, SB_EINPUT, b->doc->name, key->pub.line,
                    key->pub.col,
                    "duplicate key '%s' (expected each key once in a "
                    "mapping; first given at line %d column %d)",
                    key->text, n->key_nodes[i]->line, n->key_nodes[i]->col);
        }
        if ((rc = next_event(b, &ev)) != SB_OK)
            return rc;
        if ((rc = build_node(b, &ev, depth + 1, &val)) != SB_OK)
            return rc;
        if (node_grow(n) != SB_OK)
            return nomem(b);
        n->keys[n->pub.n] = key->text;
        n->key_nodes[n->pub.n] = &key->pub;
        n->items[n->pub.n] = &val->pub;
        n->pub.n++;
    }
}

/* Build the node that starts with event ev (consumed here) and, for
 * collections, everything up to its end event. */
static int build_node(struct builder *b, yaml_event_t *ev, int depth,
                      struct ynode **out)
{
    struct ynode *n;
    yaml_mark_t mark = ev->start_mark;
    int rc;

    if (ev->type == YAML_ALIAS_EVENT || event_anchor(ev)) {
        rc = fail_at(b, &mark,
                     "YAML anchors and aliases are not accepted (expected "
                     "every value written out in full)");
        yaml_event_delete(ev);
        return rc;
    }
    if (depth > YDOC_MAX_DEPTH) {
        yaml_event_delete(ev);
        return fail_at(b, &mark,
                       "nesting deeper than %d levels (expected a shallower "
                       "document)",
                       YDOC_MAX_DEPTH);
    }
    switch (ev->type) {
    case YAML_SCALAR_EVENT:
        n = node_new(b->doc, SB_YSCALAR, &mark);
        if (!n || !(n->text = malloc(ev->data.scalar.length + 1))) {
            yaml_event_delete(ev);
            return nomem(b);
        }
        memcpy(n->text, ev->data.scalar.value, ev->data.scalar.length);
        n->text[ev->data.scalar.length] = '\0';
        if (strlen(n->text) != ev->data.scalar.length) {
            yaml_event_delete(ev);
            return fail_at(b, &mark,
                           "NUL character inside a value (expected text)");
        }
        n->pub.text = n->text;
        n->pub.quoted = ev->data.scalar.style != YAML_PLAIN_SCALAR_STYLE;
        yaml_event_delete(ev);
        *out = n;
        return SB_OK;
    case YAML_SEQUENCE_START_EVENT:
    case YAML_MAPPING_START_EVENT: {
        int is_map = ev->type == YAML_MAPPING_START_EVENT;

        yaml_event_delete(ev);
        n = node_new(b->doc, is_map ? SB_YMAP : SB_YSEQ, &mark);
        if (!n)
            return nomem(b);
        /* empty collections still get non-NULL arrays for simple loops */
        if (node_grow(n) != SB_OK)
            return nomem(b);
        rc = is_map ? build_map(b, n, depth) : build_seq(b, n, depth);
        if (rc != SB_OK)
            return rc;
        *out = n;
        return SB_OK;
    }
    default: {
        int type = (int)ev->type;

        yaml_event_delete(ev);
        return sb_error_set(b->err, SB_EINTERNAL, b->doc->name,
                            (int)mark.line + 1, (int)mark.column + 1,
                            "unexpected YAML event %d", type);
    }
    }
}

static int build_document(struct builder *b)
{
    yaml_event_t ev;
    int rc;

    if ((rc = next_event(b, &ev)) != SB_OK) /* STREAM-START */
        return rc;
    yaml_event_delete(&ev);
    if ((rc = next_event(b, &ev)) != SB_OK)
        return rc;
    if (ev.type == YAML_STREAM_END_EVENT) {
        yaml_event_delete(&ev);
        return sb_error_set(b->err, SB_EINPUT, b->doc->name, 1, 1,
                            "empty file (expected a YAML mapping)");
    }
    yaml_event_delete(&ev); /* DOCUMENT-START */
    if ((rc = next_event(b, &ev)) != SB_OK)
        return rc;
    if ((rc = build_node(b, &ev, 0, &b->doc->root)) != SB_OK)
        return rc;
    if ((rc = next_event(b, &ev)) != SB_OK) /* DOCUMENT-END */
        return rc;
    yaml_event_delete(&ev);
    if ((rc = next_event(b, &ev)) != SB_OK)
        return rc;
    if (ev.type != YAML_STREAM_END_EVENT) {
        rc = fail_at(b, &ev.start_mark,
                     "a second YAML document starts here (expected one "
                     "document per file)");
        yaml_event_delete(&ev);
        return rc;
    }
    yaml_event_delete(&ev);
    return SB_OK;
}

int sb_ydoc_load_string(const char *name, const char *text, size_t len,
                        struct sb_ydoc **out, struct sb_error *err)
{
    struct builder b;
    int rc;

    *out = NULL;
    memset(&b, 0, sizeof b);
    b.err = err;
    b.buf = (const unsigned char *)text;
    b.len = len;
    b.doc = calloc(1, sizeof *b.doc);
    if (!b.doc || !(b.doc->name = strdup(name ? name : ""))) {
        free(b.doc);
        return sb_error_set(err, SB_ENOMEM, "", 0, 0,
                            "out of memory while reading YAML");
    }
    if (!yaml_parser_initialize(&b.parser)) {
        sb_ydoc_free(b.doc);
        return sb_error_set(err, SB_ENOMEM, "", 0, 0,
                            "cannot start the YAML parser");
    }
    yaml_parser_set_input_string(&b.parser, b.buf, len);
    rc = build_document(&b);
    yaml_parser_delete(&b.parser);
    if (rc != SB_OK) {
        sb_ydoc_free(b.doc);
        return rc;
    }
    *out = b.doc;
    return SB_OK;
}

int sb_ydoc_load_file(const char *path, struct sb_ydoc **out,
                      struct sb_error *err)
{
    FILE *f;
    char *buf = NULL, *nb;
    size_t len = 0, cap = 0, got;
    int rc;

    *out = NULL;
    f = fopen(path, "rb");
    if (!f)
        return sb_error_set(err, SB_EIO, "", 0, 0, "%s: cannot open: %s",
                            path, strerror(errno));
    for (;;) {
        if (cap - len < 4096) {
            cap = cap ? 2 * cap : 16384;
            nb = realloc(buf, cap);
            if (!nb) {
                free(buf);
                fclose(f);
                return sb_error_set(err, SB_ENOMEM, "", 0, 0,
                                    "%s: out of memory", path);
            }
            buf = nb;
        }
        got = fread(buf + len, 1, cap - len, f);
        len += got;
        if (got == 0)
            break;
    }
    if (ferror(f)) {
        int e = errno;

        free(buf);
        fclose(f);
        return sb_error_set(err, SB_EIO, "", 0, 0, "%s: cannot read: %s",
                            path, strerror(e));
    }
    fclose(f);
    rc = sb_ydoc_load_string(path, buf, len, out, err);
    free(buf);
    return rc;
}

const struct sb_ynode *sb_ydoc_root(const struct sb_ydoc *doc)
{
    return doc && doc->root ? &doc->root->pub : NULL;
}

const char *sb_ydoc_name(const struct sb_ydoc *doc)
{
    return doc ? doc->name : "";
}

/* ------------------------------------------------------------------ */
/* access helpers                                                       */

int sb_ydoc_error(const struct sb_ydoc *doc, const struct sb_ynode *node,
                  struct sb_error *err, const char *fmt, ...)
{
    va_list ap;
    char msg[SB_ERROR_MSG_MAX];

    if (!err)
        return SB_EINPUT;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    /* through sb_error_set, which keeps the message on one line */
    return sb_error_set(err, SB_EINPUT, sb_ydoc_name(doc),
                        node ? node->line : 1, node ? node->col : 1, "%s",
                        msg);
}

const char *sb_ynode_kind_name(const struct sb_ynode *node)
{
    if (!node)
        return "nothing";
    switch (node->kind) {
    case SB_YSCALAR: return node->text[0] ? "a single value" : "an empty value";
    case SB_YMAP: return "a mapping";
    case SB_YSEQ: return "a list";
    }
    return "?";
}

/* "what: " or "" so that messages read well with and without a path. */
static const char *pfx(const char *what)
{
    return what && *what ? what : "";
}

static const char *sep(const char *what)
{
    return what && *what ? ": " : "";
}

const struct sb_ynode *sb_ymap_get(const struct sb_ynode *map, const char *key)
{
    size_t i;

    if (!map || map->kind != SB_YMAP)
        return NULL;
    for (i = 0; i < map->n; i++)
        if (strcmp(map->keys[i], key) == 0)
            return map->items[i];
    return NULL;
}

int sb_ynode_expect_map(const struct sb_ydoc *doc, const struct sb_ynode *node,
                        const char *what, struct sb_error *err)
{
    if (node && node->kind == SB_YMAP)
        return SB_OK;
    return sb_ydoc_error(doc, node, err, "%s%sfound %s (expected a mapping of "
                         "key: value lines)",
                         pfx(what), sep(what), sb_ynode_kind_name(node));
}

int sb_ynode_expect_seq(const struct sb_ydoc *doc, const struct sb_ynode *node,
                        const char *what, struct sb_error *err)
{
    if (node && node->kind == SB_YSEQ)
        return SB_OK;
    return sb_ydoc_error(doc, node, err,
                         "%s%sfound %s (expected a list)", pfx(what),
                         sep(what), sb_ynode_kind_name(node));
}

int sb_ymap_check_keys(const struct sb_ydoc *doc, const struct sb_ynode *map,
                       const char *what, const char *const *allowed,
                       struct sb_error *err)
{
    size_t i, j, used;
    char list[SB_ERROR_MSG_MAX / 2];
    int ok;

    if (sb_ynode_expect_map(doc, map, what, err) != SB_OK)
        return SB_EINPUT;
    for (i = 0; i < map->n; i++) {
        ok = 0;
        for (j = 0; allowed[j]; j++)
            if (strcmp(map->keys[i], allowed[j]) == 0) {
                ok = 1;
                break;
            }
        if (ok)
            continue;
        list[0] = '\0';
        used = 0;
        for (j = 0; allowed[j] && used + 1 < sizeof list; j++) {
            int w = snprintf(list + used, sizeof list - used, "%s%s",
                             j ? ", " : "", allowed[j]);
            if (w < 0)
                break;
            used += (size_t)w;
        }
        return sb_ydoc_error(doc, map->key_nodes[i], err,
                             "%s%sunknown key '%s' (expected one of: %s)",
                             pfx(what), sep(what), map->keys[i], list);
    }
    return SB_OK;
}

int sb_ymap_require(const struct sb_ydoc *doc, const struct sb_ynode *map,
                    const char *key, const char *what,
                    const struct sb_ynode **out, struct sb_error *err)
{
    const struct sb_ynode *v;

    if (sb_ynode_expect_map(doc, map, what, err) != SB_OK)
        return SB_EINPUT;
    v = sb_ymap_get(map, key);
    if (!v)
        return sb_ydoc_error(doc, map, err,
                             "%s%smissing required key '%s' (expected it in "
                             "this mapping)",
                             pfx(what), sep(what), key);
    *out = v;
    return SB_OK;
}

/* A non-empty scalar, or an error naming what was expected. */
static int need_scalar(const struct sb_ydoc *doc, const struct sb_ynode *node,
                       const char *what, const char *expected,
                       struct sb_error *err)
{
    if (node && node->kind == SB_YSCALAR && node->text[0])
        return SB_OK;
    return sb_ydoc_error(doc, node, err, "%s%sfound %s (expected %s)",
                         pfx(what), sep(what), sb_ynode_kind_name(node),
                         expected);
}

/* YAML's and C's spellings of infinity and not-a-number, any case, with an
 * optional sign: ".nan", ".inf", "-.Inf", "nan", "infinity". */
static int is_nonfinite_word(const char *s)
{
    static const char *const words[] = {".nan", ".inf", "nan", "inf",
                                        "infinity", NULL};
    int i;

    if (*s == '+' || *s == '-')
        s++;
    for (i = 0; words[i]; i++)
        if (strcasecmp(s, words[i]) == 0)
            return 1;
    return 0;
}

int sb_ynode_double(const struct sb_ydoc *doc, const struct sb_ynode *node,
                    const char *what, double *out, struct sb_error *err)
{
    const char *s;
    char *end;
    double v;

    if (need_scalar(doc, node, what, "a number", err) != SB_OK)
        return SB_EINPUT;
    s = node->text;
    if (is_nonfinite_word(s))
        return sb_ydoc_error(doc, node, err,
                             "%s%s'%s' is not a finite number (expected a "
                             "finite decimal number)",
                             pfx(what), sep(what), s);
    /* strtod also takes hex, "inf" and "nan": allow decimal forms only */
    if (strspn(s, "0123456789+-.eE") != strlen(s))
        goto bad;
    errno = 0;
    v = strtod(s, &end);
    if (end == s || *end != '\0')
        goto bad;
    if (!isfinite(v) || errno == ERANGE)
        return sb_ydoc_error(doc, node, err,
                             "%s%s'%s' is out of range (expected a finite "
                             "number)",
                             pfx(what), sep(what), s);
    *out = v;
    return SB_OK;
bad:
    return sb_ydoc_error(doc, node, err,
                         "%s%s'%s' is not a number (expected a finite "
                         "decimal number)",
                         pfx(what), sep(what), s);
}

int sb_ynode_int(const struct sb_ydoc *doc, const struct sb_ynode *node,
                 const char *what, long lo, long hi, long *out,
                 struct sb_error *err)
{
    const char *s;
    char *end;
    long v;

    if (need_scalar(doc, node, what, "a whole number", err) != SB_OK)
        return SB_EINPUT;
    s = node->text;
    if (strspn(s, "0123456789+-") != strlen(s))
        goto bad;
    errno = 0;
    v = strtol(s, &end, 10);
    if (end == s || *end != '\0')
        goto bad;
    if (errno == ERANGE || v < lo || v > hi)
        return sb_ydoc_error(doc, node, err,
                             "%s%s%s is out of range (expected a whole number "
                             "from %ld to %ld)",
                             pfx(what), sep(what), s, lo, hi);
    *out = v;
    return SB_OK;
bad:
    return sb_ydoc_error(doc, node, err,
                         "%s%s'%s' is not a whole number (expected a whole "
                         "number from %ld to %ld)",
                         pfx(what), sep(what), s, lo, hi);
}

int sb_ynode_bool(const struct sb_ydoc *doc, const struct sb_ynode *node,
                  const char *what, int *out, struct sb_error *err)
{
    if (need_scalar(doc, node, what, "true or false", err) != SB_OK)
        return SB_EINPUT;
    if (strcmp(node->text, "true") == 0) {
        *out = 1;
        return SB_OK;
    }
    if (strcmp(node->text, "false") == 0) {
        *out = 0;
        return SB_OK;
    }
    return sb_ydoc_error(doc, node, err,
                         "%s%s'%s' is not a yes/no value (expected true or "
                         "false)",
                         pfx(what), sep(what), node->text);
}

int sb_ynode_string(const struct sb_ydoc *doc, const struct sb_ynode *node,
                    const char *what, const char **out, struct sb_error *err)
{
    if (need_scalar(doc, node, what, "a non-empty text value", err) != SB_OK)
        return SB_EINPUT;
    *out = node->text;
    return SB_OK;
}

int sb_ynode_choice(const struct sb_ydoc *doc, const struct sb_ynode *node,
                    const char *what, const char *const *words, int *index,
                    struct sb_error *err)
{
    char list[SB_ERROR_MSG_MAX / 2];
    size_t used = 0;
    int i;

    list[0] = '\0';
    for (i = 0; words[i] && used + 1 < sizeof list; i++) {
        int w = snprintf(list + used, sizeof list - used, "%s%s",
                         i ? ", " : "", words[i]);
        if (w < 0)
            break;
        used += (size_t)w;
    }
    if (node && node->kind == SB_YSCALAR) {
        for (i = 0; words[i]; i++)
            if (strcmp(node->text, words[i]) == 0) {
                *index = i;
                return SB_OK;
            }
        return sb_ydoc_error(doc, node, err,
                             "%s%s'%s' is not a known choice (expected one "
                             "of: %s)",
                             pfx(what), sep(what), node->text, list);
    }
    return sb_ydoc_error(doc, node, err, "%s%sfound %s (expected one of: %s)",
                         pfx(what), sep(what), sb_ynode_kind_name(node), list);
}
