/* Streaming JSON emitter (see include/swathbudget/writer.h). */
#include "swathbudget/writer.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

int sb_format_parse(const char *text, enum sb_format *out)
{
    if (!text)
        return SB_EINPUT;
    if (strcmp(text, "table") == 0)
        *out = SB_FORMAT_TABLE;
    else if (strcmp(text, "csv") == 0)
        *out = SB_FORMAT_CSV;
    else if (strcmp(text, "json") == 0)
        *out = SB_FORMAT_JSON;
    else
        return SB_EINPUT;
    return SB_OK;
}

static void fail(struct sb_json *j, int status, const char *what)
{
    if (j->status == SB_OK) {
        j->status = status;
        snprintf(j->what, sizeof j->what, "%s", what);
    }
}

void sb_json_init(struct sb_json *j, FILE *f)
{
    memset(j, 0, sizeof *j);
    j->f = f;
}

/* Comma and indentation before a value or a key. */
static void separate(struct sb_json *j)
{
    if (j->after_key) {
        j->after_key = 0;
        return;
    }
    if (j->depth > 0) {
        if (j->count[j->depth - 1]++ > 0)
            fputc(',', j->f);
        fputc('\n', j->f);
        for (int i = 0; i < j->depth; i++)
            fputs("  ", j->f);
    }
}

static void open_level(struct sb_json *j, int is_object, char c)
{
    separate(j);
    fputc(c, j->f);
    if (j->depth >= SB_JSON_MAX_DEPTH) {
        fail(j, SB_EINTERNAL, "JSON nested too deeply");
        return;
    }
    j->is_object[j->depth] = is_object;
    j->count[j->depth] = 0;
    j->depth++;
}

static void close_level(struct sb_json *j, int is_object, char c)
{
    if (j->depth == 0 || j->is_object[j->depth - 1] != is_object ||
        j->after_key) {
        fail(j, SB_EINTERNAL, "JSON nesting broken");
        return;
    }
    j->depth--;
    if (j->count[j->depth] > 0) {
        fputc('\n', j->f);
        for (int i = 0; i < j->depth; i++)
            fputs("  ", j->f);
    }
    fputc(c, j->f);
}

void sb_json_begin_object(struct sb_json *j) { open_level(j, 1, '{'); }
void sb_json_end_object(struct sb_json *j) { close_level(j, 1, '}'); }
void sb_json_begin_array(struct sb_json *j) { open_level(j, 0, '['); }
void sb_json_end_array(struct sb_json *j) { close_level(j, 0, ']'); }

static void put_string(FILE *f, const char *s)
{
    fputc('"', f);
    for (const unsigned char *p = (const unsigned char *)s; *p; p++) {
        switch (*p) {
        case '"': fputs("\\\"", f); break;
        case '\\': fputs("\\\\", f); break;
        case '\n': fputs("\\n", f); break;
        case '\r': fputs("\\r", f); break;
        case '\t': fputs("\\t", f); break;
        default:
            if (*p < 0x20)
                fprintf(f, "\\u%04x", *p);
            else
                fputc(*p, f);
        }
    }
    fputc('"', f);
}

void sb_json_key(struct sb_json *j, const char *key)
{
    if (j->depth == 0 || !j->is_object[j->depth - 1] || j->after_key) {
        fail(j, SB_EINTERNAL, "JSON key outside an object");
        return;
    }
    separate(j);
    put_string(j->f, key);
    fputs(": ", j->f);
    j->after_key = 1;
}

void sb_json_number(struct sb_json *j, double v, int digits)
{
    separate(j);
    if (!isfinite(v)) {
        /* A NaN or infinity here is a bug upstream: refuse it loudly. */
        fail(j, SB_EINTERNAL, "a non-finite number reached the JSON writer");
        fputs("null", j->f);
        return;
    }
    if (v == 0.0)
        v = 0.0; /* no "-0" in the output */
    fprintf(j->f, "%.*g", digits, v);
}

void sb_json_integer(struct sb_json *j, long long v)
{
    separate(j);
    fprintf(j->f, "%lld", v);
}

void sb_json_string(struct sb_json *j, const char *s)
{
    separate(j);
    put_string(j->f, s ? s : "");
}

void sb_json_bool(struct sb_json *j, int v)
{
    separate(j);
    fputs(v ? "true" : "false", j->f);
}

void sb_json_null(struct sb_json *j)
{
    separate(j);
    fputs("null", j->f);
}

void sb_json_kv_number(struct sb_json *j, const char *key, double v, int digits)
{
    sb_json_key(j, key);
    sb_json_number(j, v, digits);
}

void sb_json_kv_string(struct sb_json *j, const char *key, const char *s)
{
    sb_json_key(j, key);
    sb_json_string(j, s);
}

int sb_json_finish(struct sb_json *j, struct sb_error *err)
{
    if (j->depth != 0)
        fail(j, SB_EINTERNAL, "JSON document left open");
    fputc('\n', j->f);
    if (fflush(j->f) != 0 || ferror(j->f))
        fail(j, SB_EIO, "write error on the output");
    if (j->status != SB_OK)
        sb_error_set(err, j->status, "", 0, 0, "%s (%s)", j->what,
                     j->status == SB_EIO ? "expected a writable output"
                                         : "this is a bug; please report it");
    return j->status;
}
