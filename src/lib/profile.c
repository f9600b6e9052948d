/*
 * Sound velocity profiles: depth-speed pairs or CTD casts read from CSV and
 * converted with an equation of soundspeed.c.  See
 * include/swathbudget/profile.h for the file format and the rules.
 *
 * The reader holds the whole file in memory: a cast is at most a few
 * thousand lines, and having the text at hand makes every error message
 * point at its exact line and column.
 */
#include "swathbudget/profile.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "swathbudget/decimal.h"
#include "swathbudget/soundspeed.h"

#define DEG (3.14159265358979323846 / 180.0)
#define HALF_PI 1.5707963267948966

/* Sea pressure at 12000 m is about 12300 dbar. */
#define P_MAX_DBAR 13000.0

enum col_kind {
    COL_DEPTH = 0,
    COL_PRESSURE,
    COL_TEMP90,
    COL_TEMP68,
    COL_SALINITY,
    COL_SPEED,
    COL_KINDS
};

static const char *const col_names[COL_KINDS] = {
    "depth_m",        "pressure_dbar", "temperature_degC",
    "temperature_ipts68_degC", "salinity_psu", "speed_m_s"};

#define COL_LIST                                                          \
    "depth_m, pressure_dbar, temperature_degC, temperature_ipts68_degC, " \
    "salinity_psu, speed_m_s"

/* Physical bounds of each column (input errors beyond them). */
static const double col_lo[COL_KINDS] = {0.0,
                                         0.0,
                                         SB_PROFILE_T_MIN_DEGC,
                                         SB_PROFILE_T_MIN_DEGC,
                                         0.0,
                                         SB_PROFILE_SPEED_MIN_MPS};
static const double col_hi[COL_KINDS] = {SB_PROFILE_MAX_DEPTH_M,
                                         P_MAX_DBAR,
                                         SB_PROFILE_T_MAX_DEGC,
                                         SB_PROFILE_T_MAX_DEGC,
                                         SB_PROFILE_S_MAX_PSU,
                                         SB_PROFILE_SPEED_MAX_MPS};
static const char *const col_units[COL_KINDS] = {"m",    "dbar", "degC",
                                                 "degC", "psu",  "m/s"};

/* ---- the profile object ------------------------------------------------ */

void sb_profile_free(struct sb_profile *p)
{
    if (!p)
        return;
    free(p->depth_m);
    free(p->speed_mps);
    free(p->pressure_dbar);
    free(p->temperature_degC);
    free(p->salinity_psu);
    free(p->line);
    free(p->warnings);
    free(p);
}

static struct sb_profile *profile_new(const char *source)
{
    struct sb_profile *p = calloc(1, sizeof *p);

    if (!p)
        return NULL;
    snprintf(p->source, sizeof p->source, "%s", source);
    p->equation = -1;
    p->latitude_rad = NAN;
    return p;
}

static int grow(void **a, size_t size, size_t cap)
{
    void *q;

    if (!*a && cap == 0)
        return 0;
    q = realloc(*a, size * cap);
    if (!q)
        return -1;
    *a = q;
    return 0;
}

/* Add a warning; returns SB_OK or SB_ENOMEM. */
static int warn(struct sb_profile *p, size_t *cap, int line, size_t index,
                double depth_m, const char *msg)
{
    struct sb_profile_warning *w;

    if ((size_t)p->n_warnings == *cap) {
        size_t nc = *cap ? 2 * *cap : 8;
        if (grow((void **)&p->warnings, sizeof *p->warnings, nc))
            return SB_ENOMEM;
        *cap = nc;
    }
    w = &p->warnings[p->n_warnings++];
    w->line = line;
    w->index = index;
    w->depth_m = depth_m;
    snprintf(w->msg, sizeof w->msg, "%s", msg);
    return SB_OK;
}

const char *sb_profile_warning_format(const struct sb_profile *p, int i,
                                      char *buf, size_t n)
{
    const struct sb_profile_warning *w;

    if (!buf || n == 0)
        return buf;
    if (!p || i < 0 || i >= p->n_warnings) {
        buf[0] = '\0';
        return buf;
    }
    w = &p->warnings[i];
    if (p->source[0] && w->line > 0)
        snprintf(buf, n, "%s:%d: %s", p->source, w->line, w->msg);
    else if (p->source[0])
        snprintf(buf, n, "%s: %s", p->source, w->msg);
    else
        snprintf(buf, n, "%s", w->msg);
    return buf;
}

/* ---- checks shared by the file reader and the array builder ------------ */

/* Largest allowed step below a sample at depth z (see profile.h). */
static double max_step(double z)
{
    double rel = SB_PROFILE_GAP_REL * z;
    return rel > SB_PROFILE_GAP_ABS_M ? rel : SB_PROFILE_GAP_ABS_M;
}

/* Depth z follows prev (index > 0) or is the first sample.  Fills msg with
 * "what is wrong (what was expected)" and returns -1 on a defect. */
static int check_depth_step(size_t index, double prev, double z, char *msg,
                            size_t n)
{
    if (index == 0) {
        if (z > SB_PROFILE_GAP_ABS_M) {
            snprintf(msg, n,
                     "first sample at %.2f m leaves a gap below the surface "
                     "(expected the first sample at most %g m deep)",
                     z, SB_PROFILE_GAP_ABS_M);
            return -1;
        }
        return 0;
    }
    if (!(z > prev)) {
        snprintf(msg, n,
                 "depth %.3f m is not below the previous sample's %.3f m "
                 "(expected strictly increasing depths)",
                 z, prev);
        return -1;
    }
    if (z - prev > max_step(prev)) {
        snprintf(msg, n,
                 "gap of %.2f m from %.2f m to %.2f m (expected steps of at "
                 "most %.2f m there: the larger of %g m and %g x depth)",
                 z - prev, prev, z, max_step(prev), SB_PROFILE_GAP_ABS_M,
                 SB_PROFILE_GAP_REL);
        return -1;
    }
    return 0;
}

int sb_profile_from_pairs(const double *depth_m, const double *speed_mps,
                          size_t n, struct sb_profile **out,
                          struct sb_error *err)
{
    struct sb_profile *p;
    char msg[SB_ERROR_MSG_MAX];

    if (out)
        *out = NULL;
    if (!out || (n > 0 && (!depth_m || !speed_mps)))
        return sb_error_set(err, SB_EINTERNAL, NULL, 0, 0,
                            "sb_profile_from_pairs: NULL argument");
    if (n < SB_PROFILE_MIN_SAMPLES)
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "profile has %zu sample%s (expected at least %d)",
                            n, n == 1 ? "" : "s", SB_PROFILE_MIN_SAMPLES);
    for (size_t i = 0; i < n; i++) {
        double z = depth_m[i], c = speed_mps[i];
        if (!isfinite(z) || z < 0.0 || z > SB_PROFILE_MAX_DEPTH_M)
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "sample %zu: depth %g m (expected a finite "
                                "depth from 0 to %g m)",
                                i + 1, z, SB_PROFILE_MAX_DEPTH_M);
        if (!isfinite(c) || c < SB_PROFILE_SPEED_MIN_MPS ||
            c > SB_PROFILE_SPEED_MAX_MPS)
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                                "sample %zu: sound speed %g m/s (expected "
                                "%g to %g m/s)",
                                i + 1, c, SB_PROFILE_SPEED_MIN_MPS,
                                SB_PROFILE_SPEED_MAX_MPS);
        if (check_depth_step(i, i ? depth_m[i - 1] : 0.0, z, msg, sizeof msg))
            return sb_error_set(err, SB_EINPUT, NULL, 0, 0, "sample %zu: %s",
                                i + 1, msg);
    }
    p = profile_new("(arrays)");
    if (!p)
        return sb_error_set(err, SB_ENOMEM, NULL, 0, 0, "out of memory");
    p->depth_m = malloc(n * sizeof *p->depth_m);
    p->speed_mps = malloc(n * sizeof *p->speed_mps);
    if (!p->depth_m || !p->speed_mps) {
        sb_profile_free(p);
        return sb_error_set(err, SB_ENOMEM, NULL, 0, 0, "out of memory");
    }
    memcpy(p->depth_m, depth_m, n * sizeof *depth_m);
    memcpy(p->speed_mps, speed_mps, n * sizeof *speed_mps);
    p->n = n;
    p->depth_given = 1;
    *out = p;
    return SB_OK;
}

/* ---- the CSV reader ----------------------------------------------------- */

static int read_file(const char *path, char **text, size_t *len,
                     struct sb_error *err)
{
    FILE *f = fopen(path, "rb");
    size_t cap = 4096, n = 0;
    char *buf;

    if (!f)
        return sb_error_set(err, SB_EIO, NULL, 0, 0,
                            "cannot open '%s': %s (expected a readable CSV "
                            "file)",
                            path, strerror(errno));
    buf = malloc(cap);
    if (!buf) {
        fclose(f);
        return sb_error_set(err, SB_ENOMEM, NULL, 0, 0, "out of memory");
    }
    for (;;) {
        size_t got;
        if (n + 1 >= cap) {
            char *q = realloc(buf, cap * 2);
            if (!q) {
                free(buf);
                fclose(f);
                return sb_error_set(err, SB_ENOMEM, NULL, 0, 0,
                                    "out of memory");
            }
            buf = q;
            cap *= 2;
        }
        got = fread(buf + n, 1, cap - n - 1, f);
        n += got;
        if (got == 0)
            break;
    }
    if (ferror(f)) {
        int e = errno;
        free(buf);
        fclose(f);
        return sb_error_set(err, SB_EIO, NULL, 0, 0,
                            "cannot read '%s': %s (expected a readable CSV "
                            "file)",
                            path, strerror(e));
    }
    fclose(f);
    buf[n] = '\0';
    *text = buf;
    *len = n;
    return SB_OK;
}

/* One field of a line: [start, start + len) trimmed, 1-based column. */
struct field {
    const char *s;
    size_t len;
    int col;
};

#define MAX_FIELDS 16

/* Split line [s, s + n) at commas into at most max fields (trimmed of
 * blanks).  Returns the number of fields found (may exceed max: only the
 * first max are stored). */
static size_t split(const char *s, size_t n, struct field *f, size_t max)
{
    size_t count = 0, i = 0;

    for (;;) {
        size_t a = i, b;
        while (i < n && s[i] != ',')
            i++;
        b = i;
        while (a < b && (s[a] == ' ' || s[a] == '\t'))
            a++;
        while (b > a && (s[b - 1] == ' ' || s[b - 1] == '\t'))
            b--;
        if (count < max) {
            f[count].s = s + a;
            f[count].len = b - a;
            f[count].col = (int)a + 1;
        }
        count++;
        if (i >= n)
            break;
        i++; /* past the comma */
    }
    return count;
}

/* Growable sample arrays while reading. */
struct samples {
    size_t n, cap;
    double *z, *p, *t, *s, *c;
    int *line, *vcol;
};

static void samples_free(struct samples *a)
{
    free(a->z);
    free(a->p);
    free(a->t);
    free(a->s);
    free(a->c);
    free(a->line);
    free(a->vcol);
}

static int samples_push(struct samples *a)
{
    if (a->n == a->cap) {
        size_t nc = a->cap ? 2 * a->cap : 256;
        if (grow((void **)&a->z, sizeof(double), nc) ||
            grow((void **)&a->p, sizeof(double), nc) ||
            grow((void **)&a->t, sizeof(double), nc) ||
            grow((void **)&a->s, sizeof(double), nc) ||
            grow((void **)&a->c, sizeof(double), nc) ||
            grow((void **)&a->line, sizeof(int), nc) ||
            grow((void **)&a->vcol, sizeof(int), nc))
            return -1;
        a->cap = nc;
    }
    a->n++;
    return 0;
}

/* Everything the reader knows about the file while it reads it. */
struct reader {
    const char *path;
    int col_of[COL_KINDS]; /* field index of each kind, -1 if absent */
    size_t ncols;
    int header_line;
    int equation;          /* resolved: SB_SS_* or -1 for speed files */
    double lat;            /* radians, resolved (given or default) */
    int lat_given;
    int lat_used;
    struct samples a;
};

static int parse_header(struct reader *r, const char *s, size_t n, int line,
                        struct sb_error *err)
{
    struct field f[MAX_FIELDS];
    size_t count = split(s, n, f, MAX_FIELDS);
    int has_t;

    for (int k = 0; k < COL_KINDS; k++)
        r->col_of[k] = -1;
    if (count > MAX_FIELDS)
        return sb_error_set(err, SB_EINPUT, r->path, line, f[0].col,
                            "header has %zu columns (expected at most %d "
                            "of: " COL_LIST ")",
                            count, MAX_FIELDS);
    for (size_t i = 0; i < count; i++) {
        int k;
        if (f[i].len == 0)
            return sb_error_set(err, SB_EINPUT, r->path, line, f[i].col,
                                "empty column name (expected one of " COL_LIST
                                ")");
        for (k = 0; k < COL_KINDS; k++)
            if (strlen(col_names[k]) == f[i].len &&
                memcmp(col_names[k], f[i].s, f[i].len) == 0)
                break;
        if (k == COL_KINDS)
            return sb_error_set(err, SB_EINPUT, r->path, line, f[i].col,
                                "unknown column '%.*s' (expected one of "
                                COL_LIST ")",
                                (int)(f[i].len > 64 ? 64 : f[i].len), f[i].s);
        if (r->col_of[k] >= 0)
            return sb_error_set(err, SB_EINPUT, r->path, line, f[i].col,
                                "column %s appears twice (expected each "
                                "column once)",
                                col_names[k]);
        r->col_of[k] = (int)i;
    }
    r->ncols = count;
    r->header_line = line;
    if (r->col_of[COL_TEMP90] >= 0 && r->col_of[COL_TEMP68] >= 0)
        return sb_error_set(err, SB_EINPUT, r->path, line,
                            f[r->col_of[COL_TEMP68]].col,
                            "two temperature columns (expected either "
                            "temperature_degC or temperature_ipts68_degC)");
    if (r->col_of[COL_DEPTH] < 0 && r->col_of[COL_PRESSURE] < 0)
        return sb_error_set(err, SB_EINPUT, r->path, line, 1,
                            "no vertical column (expected depth_m or "
                            "pressure_dbar)");
    has_t = r->col_of[COL_TEMP90] >= 0 || r->col_of[COL_TEMP68] >= 0;
    if (r->col_of[COL_SPEED] >= 0) {
        if (has_t || r->col_of[COL_SALINITY] >= 0)
            return sb_error_set(err, SB_EINPUT, r->path, line,
                                f[r->col_of[COL_SPEED]].col,
                                "both speed_m_s and temperature/salinity "
                                "columns (expected either a depth-speed "
                                "profile or a cast)");
        if (r->equation >= 0)
            return sb_error_set(err, SB_EINPUT, r->path, line, 1,
                                "an equation was chosen but the file gives "
                                "speeds (expected temperature and salinity "
                                "columns for an equation to convert)");
        r->equation = -1;
        return SB_OK;
    }
    if (!has_t)
        return sb_error_set(err, SB_EINPUT, r->path, line, 1,
                            "no temperature column (expected speed_m_s, or "
                            "temperature_degC and salinity_psu)");
    if (r->col_of[COL_SALINITY] < 0)
        return sb_error_set(err, SB_EINPUT, r->path, line, 1,
                            "no salinity column (expected salinity_psu "
                            "with the temperature)");
    if (r->equation < 0)
        r->equation = SB_SS_DEFAULT;
    return SB_OK;
}

static int parse_row(struct reader *r, const char *s, size_t n, int line,
                     struct sb_error *err)
{
    struct field f[MAX_FIELDS];
    size_t count = split(s, n, f, MAX_FIELDS);
    double v[COL_KINDS];
    struct samples *a = &r->a;
    size_t i;
    char msg[SB_ERROR_MSG_MAX];
    int vk, vcol;
    double z, p = NAN;

    if (count < r->ncols)
        return sb_error_set(err, SB_EINPUT, r->path, line, (int)n + 1,
                            "row has %zu field%s (expected %zu, as in the "
                            "header on line %d)",
                            count, count == 1 ? "" : "s", r->ncols,
                            r->header_line);
    if (count > r->ncols)
        return sb_error_set(err, SB_EINPUT, r->path, line,
                            r->ncols < MAX_FIELDS ? f[r->ncols].col
                                                  : (int)n + 1,
                            "row has %zu fields (expected %zu, as in the "
                            "header on line %d)",
                            count, r->ncols, r->header_line);
    for (int k = 0; k < COL_KINDS; k++) {
        int c = r->col_of[k], rc;
        if (c < 0) {
            v[k] = NAN;
            continue;
        }
        rc = sb_decimal_parse(f[c].s, f[c].len, '.', &v[k]);
        if (rc == SB_DECIMAL_EMPTY)
            return sb_error_set(err, SB_EINPUT, r->path, line, f[c].col,
                                "missing value of %s (expected a number: "
                                "gaps in a profile are not filled in)",
                                col_names[k]);
        if (rc == SB_DECIMAL_NONFINITE)
            return sb_error_set(err, SB_EINPUT, r->path, line, f[c].col,
                                "%s value '%.*s' is not finite (expected a "
                                "finite number in %s)",
                                col_names[k], (int)(f[c].len > 40 ? 40 : f[c].len),
                                f[c].s, col_units[k]);
        if (rc != SB_DECIMAL_OK)
            return sb_error_set(err, SB_EINPUT, r->path, line, f[c].col,
                                "%s value '%.*s' is not a number (expected a "
                                "decimal number in %s, e.g. 12.5)",
                                col_names[k], (int)(f[c].len > 40 ? 40 : f[c].len),
                                f[c].s, col_units[k]);
        if (!(v[k] >= col_lo[k] && v[k] <= col_hi[k]))
            return sb_error_set(err, SB_EINPUT, r->path, line, f[c].col,
                                "%s %g %s out of bounds (expected %g to %g %s)",
                                col_names[k], v[k], col_units[k], col_lo[k],
                                col_hi[k], col_units[k]);
    }
    if (r->col_of[COL_TEMP68] >= 0)
        v[COL_TEMP90] = sb_t90_from_t68(v[COL_TEMP68]);

    /* Vertical coordinate: the depth column if given, else pressure
     * converted with the UNESCO 1983 formula at the station latitude. */
    i = a->n;
    if (r->col_of[COL_PRESSURE] >= 0) {
        p = v[COL_PRESSURE];
        if (i > 0 && !(p > a->p[i - 1]))
            return sb_error_set(err, SB_EINPUT, r->path, line,
                                f[r->col_of[COL_PRESSURE]].col,
                                "pressure %.3f dbar is not above the previous "
                                "sample's %.3f dbar (expected strictly "
                                "increasing pressures)",
                                p, a->p[i - 1]);
    }
    if (r->col_of[COL_DEPTH] >= 0) {
        vk = COL_DEPTH;
        z = v[COL_DEPTH];
    } else {
        vk = COL_PRESSURE;
        z = sb_soundspeed_depth_from_pressure(p, r->lat);
        r->lat_used = 1;
    }
    vcol = f[r->col_of[vk]].col;
    if (check_depth_step(i, i ? a->z[i - 1] : 0.0, z, msg, sizeof msg))
        return sb_error_set(err, SB_EINPUT, r->path, line, vcol, "%s", msg);

    if (samples_push(a))
        return sb_error_set(err, SB_ENOMEM, NULL, 0, 0, "out of memory");
    a->z[i] = z;
    a->p[i] = p;
    a->t[i] = v[COL_TEMP90];
    a->s[i] = v[COL_SALINITY];
    a->c[i] = v[COL_SPEED];
    a->line[i] = line;
    a->vcol[i] = vcol;
    return SB_OK;
}

/* Walk the text line by line: comments and blank lines skipped, the first
 * other line is the header, the rest are samples. */
static int parse_text(struct reader *r, const char *text, size_t len,
                      struct sb_error *err)
{
    size_t pos = 0;
    int line = 0, have_header = 0, rc;

    /* A UTF-8 byte order mark written by some spreadsheet programs. */
    if (len >= 3 && memcmp(text, "\xEF\xBB\xBF", 3) == 0)
        pos = 3;
    while (pos < len) {
        size_t end = pos, n, k;
        while (end < len && text[end] != '\n')
            end++;
        line++;
        n = end - pos;
        if (n > 0 && text[pos + n - 1] == '\r')
            n--;
        for (k = 0; k < n; k++)
            if (text[pos + k] == '\0' || text[pos + k] == '\r')
                return sb_error_set(err, SB_EINPUT, r->path, line, (int)k + 1,
                                    "stray control character (expected "
                                    "plain text lines)");
        k = 0;
        while (k < n && (text[pos + k] == ' ' || text[pos + k] == '\t'))
            k++;
        if (k < n && text[pos + k] != '#') {
            rc = have_header ? parse_row(r, text + pos, n, line, err)
                             : parse_header(r, text + pos, n, line, err);
            if (rc != SB_OK)
                return rc;
            have_header = 1;
        }
        pos = end + 1;
    }
    if (!have_header)
        return sb_error_set(err, SB_EINPUT, r->path, line > 0 ? line : 1, 1,
                            "no header line (expected a header such as "
                            "depth_m,temperature_degC,salinity_psu)");
    if (r->a.n < SB_PROFILE_MIN_SAMPLES)
        return sb_error_set(err, SB_EINPUT, r->path, line > 0 ? line : 1, 1,
                            "%zu sample%s after the header (expected at "
                            "least %d)",
                            r->a.n, r->a.n == 1 ? "" : "s",
                            SB_PROFILE_MIN_SAMPLES);
    return SB_OK;
}

/* Move the reader's arrays into the profile, derive what is missing. */
static int finish(struct reader *r, struct sb_profile *p, struct sb_error *err)
{
    struct samples *a = &r->a;
    size_t wcap = 0;
    int cast = r->equation >= 0;
    const struct sb_soundspeed_info *eq =
        cast ? sb_soundspeed_info(r->equation) : NULL;
    char msg[SB_PROFILE_WARNING_MAX];
    int rc;

    p->n = a->n;
    p->depth_m = a->z;
    a->z = NULL;
    p->line = a->line;
    a->line = NULL;
    p->equation = r->equation;
    p->pressure_given = r->col_of[COL_PRESSURE] >= 0;
    p->depth_given = r->col_of[COL_DEPTH] >= 0;
    /* Keep pressures when given or needed by the equation; a depth cast
     * through a depth equation has none (pressure_dbar stays NULL). */
    if (p->pressure_given ||
        (cast && eq->vertical == SB_SS_BY_PRESSURE)) {
        p->pressure_dbar = a->p;
        a->p = NULL;
    }
    if (cast) {
        p->temperature_degC = a->t;
        a->t = NULL;
        p->salinity_psu = a->s;
        a->s = NULL;
        p->speed_mps = malloc(a->n * sizeof *p->speed_mps);
        if (!p->speed_mps)
            return sb_error_set(err, SB_ENOMEM, NULL, 0, 0, "out of memory");
    } else {
        p->speed_mps = a->c;
        a->c = NULL;
    }

    if (cast && !p->pressure_given &&
        eq->vertical == SB_SS_BY_PRESSURE) {
        /* A depth cast converted by a pressure equation. */
        for (size_t i = 0; i < p->n; i++) {
            rc = sb_soundspeed_pressure_from_depth(p->depth_m[i], r->lat,
                                                   &p->pressure_dbar[i], err);
            if (rc != SB_OK) {
                sb_error_at(err, r->path, p->line[i], a->vcol[i]);
                return rc;
            }
        }
        r->lat_used = 1;
    }
    /* Latitude served the conversion (above or while reading) and/or the
     * equation's own latitude term. */
    if (r->lat_used || (cast && eq->uses_latitude)) {
        int by_eq = cast && eq->uses_latitude;
        p->latitude_rad = r->lat;
        if (!r->lat_given) {
            p->latitude_assumed = 1;
            snprintf(msg, sizeof msg,
                     "latitude not given: %g deg assumed for %s%s%s (give "
                     "the station latitude)",
                     SB_PROFILE_DEFAULT_LATITUDE_DEG,
                     r->lat_used ? "pressure-depth conversion" : "",
                     r->lat_used && by_eq ? " and " : "",
                     by_eq ? "the equation's latitude term" : "");
            if (warn(p, &wcap, 0, (size_t)-1, NAN, msg))
                return sb_error_set(err, SB_ENOMEM, NULL, 0, 0,
                                    "out of memory");
        }
    }
    if (!cast)
        return SB_OK;

    for (size_t i = 0; i < p->n; i++) {
        double pr = p->pressure_dbar ? p->pressure_dbar[i] : NAN;
        double c = sb_soundspeed_eval(p->equation, p->salinity_psu[i],
                                      p->temperature_degC[i], pr,
                                      p->depth_m[i], r->lat);
        char what[160];

        if (!isfinite(c))
            return sb_error_set(err, SB_ENUM, r->path, p->line[i], 1,
                                "sound speed is not finite (expected a "
                                "finite result of %s)",
                                eq->name);
        p->speed_mps[i] = c;
        if (sb_soundspeed_check(p->equation, p->salinity_psu[i],
                                p->temperature_degC[i], pr, p->depth_m[i],
                                what, sizeof what)) {
            snprintf(msg, sizeof msg, "%s: %s", eq->name, what);
            if (warn(p, &wcap, p->line[i], i, p->depth_m[i], msg))
                return sb_error_set(err, SB_ENOMEM, NULL, 0, 0,
                                    "out of memory");
        }
    }
    return SB_OK;
}

int sb_profile_load(const char *path, int equation, double latitude_rad,
                    struct sb_profile **out, struct sb_error *err)
{
    struct reader r;
    struct sb_profile *p;
    char *text = NULL;
    size_t len = 0;
    int rc;

    if (out)
        *out = NULL;
    if (!path || !out)
        return sb_error_set(err, SB_EINTERNAL, NULL, 0, 0,
                            "sb_profile_load: NULL argument");
    if (equation != -1 && !sb_soundspeed_info(equation))
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "unknown sound-speed equation %d (expected -1 or "
                            "0 to %d)",
                            equation, SB_SS_COUNT - 1);
    if (!isnan(latitude_rad) &&
        !(isfinite(latitude_rad) && fabs(latitude_rad) <= HALF_PI))
        return sb_error_set(err, SB_EINPUT, NULL, 0, 0,
                            "latitude %g deg out of range (expected -90 to "
                            "90 deg)",
                            latitude_rad / DEG);

    memset(&r, 0, sizeof r);
    r.path = path;
    r.equation = equation;
    r.lat_given = !isnan(latitude_rad);
    r.lat = r.lat_given ? latitude_rad : SB_PROFILE_DEFAULT_LATITUDE_DEG * DEG;

    rc = read_file(path, &text, &len, err);
    if (rc != SB_OK)
        return rc;
    rc = parse_text(&r, text, len, err);
    free(text);
    if (rc != SB_OK) {
        samples_free(&r.a);
        return rc;
    }
    p = profile_new(path);
    if (!p) {
        samples_free(&r.a);
        return sb_error_set(err, SB_ENOMEM, NULL, 0, 0, "out of memory");
    }
    rc = finish(&r, p, err);
    samples_free(&r.a);
    if (rc != SB_OK) {
        sb_profile_free(p);
        return rc;
    }
    *out = p;
    return SB_OK;
}
