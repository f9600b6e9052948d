/*
 * The survey-system specification: YAML -> struct sb_system (spec.h).
 * Schema and defaults: docs/spec.md.
 *
 * Every field is checked where it is read, so that each message points at
 * the offending text; sb_system_validate() runs afterwards as a safety net
 * for cross-field rules, and its struct field path is mapped back to the
 * node it came from.
 */
#include "swathbudget/spec.h"

#include "swathbudget/profile.h"
#include "swathbudget/refraction.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define SPEC_PI 3.14159265358979323846
#define DEG (SPEC_PI / 180.0)
#define MAX_SEEN 96
#define PATH_MAX_LEN 128

struct seen {
    const char *field;            /* struct path as sb_system_validate names it */
    char path[PATH_MAX_LEN];      /* YAML path */
    const struct sb_ynode *node;
};

struct loader {
    const struct sb_ydoc *doc;
    struct sb_error *err;
    struct sb_system *sys;
    struct seen seen[MAX_SEEN];
    size_t nseen;
};

/* An allowed interval for a nominal value, in SI, with its wording. */
struct range {
    double lo, hi;
    int lo_open, hi_open;
    const char *expected;
};

/* Copy src to dst + at (dst has size bytes), truncating; returns the new
 * length.  Plain copying rather than snprintf: the paths are short and this
 * keeps gcc's truncation analysis quiet without casts. */
static size_t append(char *dst, size_t size, size_t at, const char *src)
{
    while (*src && at + 1 < size)
        dst[at++] = *src++;
    dst[at] = '\0';
    return at;
}

static void note(struct loader *ld, const char *field, const char *path,
                 const struct sb_ynode *node)
{
    struct seen *s;

    if (ld->nseen >= MAX_SEEN)
        return;
    s = &ld->seen[ld->nseen++];
    s->field = field;
    append(s->path, sizeof s->path, 0, path);
    s->node = node;
}

/* "parent.key" (or "key" at the top) into buf of PATH_MAX_LEN bytes,
 * truncated if it had to be: paths only ever go into messages. */
static const char *join(char *buf, const char *parent, const char *key)
{
    size_t n = 0;

    buf[0] = '\0';
    if (parent && *parent) {
        n = append(buf, PATH_MAX_LEN, n, parent);
        n = append(buf, PATH_MAX_LEN, n, ".");
    }
    append(buf, PATH_MAX_LEN, n, key);
    return buf;
}

/* Fetch map[key] as a mapping whose keys are all in allowed.  Absent and
 * not required: *out = NULL and SB_OK. */
static int section(struct loader *ld, const struct sb_ynode *map,
                   const char *mpath, const char *key, int required,
                   const char *const *allowed, const struct sb_ynode **out,
                   char *path)
{
    const struct sb_ynode *n = sb_ymap_get(map, key);
    int rc;

    join(path, mpath, key);
    *out = NULL;
    if (!n) {
        if (!required)
            return SB_OK;
        return sb_ymap_require(ld->doc, map, key, mpath, &n, ld->err);
    }
    if ((rc = sb_ymap_check_keys(ld->doc, n, path, allowed, ld->err)) !=
        SB_OK)
        return rc;
    *out = n;
    return SB_OK;
}

/* A stated value map[key] (required or optional: left as it is when
 * absent).  Angles must be below 90 deg and relative figures at most
 * 100 %. */
static int get_stated(struct loader *ld, const struct sb_ynode *map,
                      const char *mpath, const char *key, int required,
                      unsigned dims, unsigned flags, struct sb_stated *out,
                      const char *field)
{
    char path[PATH_MAX_LEN];
    const struct sb_ynode *n = sb_ymap_get(map, key);
    struct sb_stated s;
    int rc;

    if (!n) {
        if (!required)
            return SB_OK;
        return sb_ymap_require(ld->doc, map, key, mpath, &n, ld->err);
    }
    join(path, mpath, key);
    if ((rc = sb_ynode_stated(ld->doc, n, path, dims, flags, &s, ld->err)) !=
        SB_OK)
        return rc;
    if (s.dim == SB_DIM_ANGLE && s.value >= 90.0 * DEG)
        return sb_ydoc_error(ld->doc, n, ld->err,
                             "%s: %g %s is not below 90 deg (expected an "
                             "angle uncertainty below 90 deg)",
                             path, s.written, s.unit);
    if (s.dim == SB_DIM_RATIO && s.value > 1.0)
        return sb_ydoc_error(ld->doc, n, ld->err,
                             "%s: %g %s is more than 100 %% (expected a "
                             "relative uncertainty of at most 100 %%)",
                             path, s.written, s.unit);
    *out = s;
    note(ld, field, path, n);
    return SB_OK;
}

/* A nominal quantity map[key] in SI, inside range r. */
static int get_quantity(struct loader *ld, const struct sb_ynode *map,
                        const char *mpath, const char *key, int required,
                        unsigned dims, const struct range *r, double *out,
                        const char *field)
{
    char path[PATH_MAX_LEN];
    const struct sb_ynode *n = sb_ymap_get(map, key);
    double v;
    int rc, ok;

    if (!n) {
        if (!required)
            return SB_OK;
        return sb_ymap_require(ld->doc, map, key, mpath, &n, ld->err);
    }
    join(path, mpath, key);
    if ((rc = sb_ynode_quantity(ld->doc, n, path, dims, &v, ld->err)) !=
        SB_OK)
        return rc;
    ok = (r->lo_open ? v > r->lo : v >= r->lo) &&
         (r->hi_open ? v < r->hi : v <= r->hi);
    if (!ok)
        return sb_ydoc_error(ld->doc, n, ld->err,
                             "%s: '%s' is out of range (expected %s)", path,
                             n->text, r->expected);
    *out = v;
    note(ld, field, path, n);
    return SB_OK;
}

/* A short text field copied into buf (size n, so at most n-1 chars). */
static int get_text(struct loader *ld, const struct sb_ynode *map,
                    const char *key, int required, char *buf, size_t n,
                    int identifier)
{
    const struct sb_ynode *node = sb_ymap_get(map, key);
    const char *s;
    int rc;

    if (!node) {
        if (!required)
            return SB_OK;
        return sb_ymap_require(ld->doc, map, key, "", &node, ld->err);
    }
    if ((rc = sb_ynode_string(ld->doc, node, key, &s, ld->err)) != SB_OK)
        return rc;
    if (strlen(s) >= n)
        return sb_ydoc_error(ld->doc, node, ld->err,
                             "%s: %zu characters is too long (expected at "
                             "most %zu)",
                             key, strlen(s), n - 1);
    if (identifier && strspn(s, "abcdefghijklmnopqrstuvwxyz"
                                "ABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789._-") !=
                          strlen(s))
        return sb_ydoc_error(ld->doc, node, ld->err,
                             "%s: '%s' contains a character other than a "
                             "letter, digit, '.', '_' or '-' (expected a "
                             "short identifier such as kestrel-launch)",
                             key, s);
    snprintf(buf, n, "%s", s);
    note(ld, key, key, node);
    return SB_OK;
}

/* ------------------------------------------------------------------ */

static const struct range R_LEVER = {-1000.0, 1000.0, 0, 0,
                                     "a coordinate from -1000 m to 1000 m"};

static int read_lever(struct loader *ld, const struct sb_ynode *arms,
                      const char *apath, const char *key,
                      struct sb_lever_arm *la)
{
    static const char *const keys[] = {"x", "y", "z", "uncertainty", NULL};
    /* struct field names for sb_system_validate's messages; static
     * storage because note() keeps the pointers */
    static const char *const fields[3][7] = {
        {"antenna.x", "antenna.y", "antenna.z", "antenna.u_x", "antenna.u_y",
         "antenna.u_z", NULL},
        {"transducer.x", "transducer.y", "transducer.z", "transducer.u_x",
         "transducer.u_y", "transducer.u_z", NULL},
        {"motion_sensor.x", "motion_sensor.y", "motion_sensor.z",
         "motion_sensor.u_x", "motion_sensor.u_y", "motion_sensor.u_z", NULL}};
    const char *const *f = strcmp(key, "antenna") == 0      ? fields[0]
                           : strcmp(key, "transducer") == 0 ? fields[1]
                                                            : fields[2];
    char path[PATH_MAX_LEN], upath[PATH_MAX_LEN];
    const struct sb_ynode *m;
    struct sb_lever_arm v = *la;
    int rc, i;

    if ((rc = section(ld, arms, apath, key, 1, keys, &m, path)) != SB_OK)
        return rc;
    if ((rc = get_quantity(ld, m, path, "x", 1, SB_DIM_LENGTH, &R_LEVER, &v.x,
                           f[0])) ||
        (rc = get_quantity(ld, m, path, "y", 1, SB_DIM_LENGTH, &R_LEVER, &v.y,
                           f[1])) ||
        (rc = get_quantity(ld, m, path, "z", 1, SB_DIM_LENGTH, &R_LEVER, &v.z,
                           f[2])) ||
        (rc = get_stated(ld, m, path, "uncertainty", 1, SB_DIM_LENGTH, 0,
                         &v.u[0], f[3])))
        return rc;
    /* one figure for the three axes (the tape or total-station survey of
     * the vessel is about as good in every direction) */
    v.u[1] = v.u[0];
    v.u[2] = v.u[0];
    join(upath, path, "uncertainty");
    for (i = 4; i < 6; i++)
        note(ld, f[i], upath, sb_ymap_get(m, "uncertainty"));
    *la = v;
    return SB_OK;
}

static int read_lever_arms(struct loader *ld, const struct sb_ynode *root)
{
    static const char *const keys[] = {"antenna", "transducer",
                                       "motion_sensor", NULL};
    char path[PATH_MAX_LEN];
    const struct sb_ynode *m;
    int rc;

    if ((rc = section(ld, root, "", "lever_arms", 1, keys, &m, path)))
        return rc;
    if ((rc = read_lever(ld, m, path, "antenna", &ld->sys->antenna)) ||
        (rc = read_lever(ld, m, path, "transducer", &ld->sys->transducer)) ||
        (rc = read_lever(ld, m, path, "motion_sensor",
                         &ld->sys->motion_sensor)))
        return rc;
    return SB_OK;
}

static int read_positioning(struct loader *ld, const struct sb_ynode *root)
{
    static const char *const keys[] = {"horizontal", "vertical", "latency",
                                       NULL};
    struct sb_positioning *p = &ld->sys->positioning;
    char path[PATH_MAX_LEN];
    const struct sb_ynode *m;
    int rc;

    if ((rc = section(ld, root, "", "positioning", 1, keys, &m, path)))
        return rc;
    /* the horizontal figure is a 2-D one: "95%" is a circle radius */
    if ((rc = get_stated(ld, m, path, "horizontal", 1, SB_DIM_LENGTH,
                         SB_STATED_2D, &p->horizontal,
                         "positioning.horizontal")) ||
        (rc = get_stated(ld, m, path, "vertical", 1, SB_DIM_LENGTH, 0,
                         &p->vertical, "positioning.vertical")) ||
        (rc = get_stated(ld, m, path, "latency", 0, SB_DIM_TIME, 0,
                         &p->latency, "positioning.latency")))
        return rc;
    return SB_OK;
}

static int read_motion(struct loader *ld, const struct sb_ynode *root)
{
    static const char *const keys[] = {"roll",    "pitch",          "heading",
                                       "heave",   "heave_fraction", "latency",
                                       "alignment", NULL};
    static const char *const akeys[] = {"roll", "pitch", "heading", NULL};
    const unsigned A = SB_DIM_ANGLE;
    struct sb_motion *mo = &ld->sys->motion;
    char path[PATH_MAX_LEN], apath[PATH_MAX_LEN];
    const struct sb_ynode *m, *al;
    int rc;

    if ((rc = section(ld, root, "", "motion", 1, keys, &m, path)))
        return rc;
    if ((rc = get_stated(ld, m, path, "roll", 1, A, 0, &mo->roll,
                         "motion.roll")) ||
        (rc = get_stated(ld, m, path, "pitch", 1, A, 0, &mo->pitch,
                         "motion.pitch")) ||
        (rc = get_stated(ld, m, path, "heading", 1, A, 0, &mo->heading,
                         "motion.heading")) ||
        (rc = get_stated(ld, m, path, "heave", 1, SB_DIM_LENGTH, 0,
                         &mo->heave, "motion.heave")) ||
        (rc = get_stated(ld, m, path, "heave_fraction", 0, SB_DIM_RATIO, 0,
                         &mo->heave_fraction, "motion.heave_fraction")) ||
        (rc = get_stated(ld, m, path, "latency", 0, SB_DIM_TIME, 0,
                         &mo->latency, "motion.latency")))
        return rc;
    if ((rc = section(ld, m, path, "alignment", 1, akeys, &al, apath)))
        return rc;
    if ((rc = get_stated(ld, al, apath, "roll", 1, A, 0, &mo->align_roll,
                         "motion.align_roll")) ||
        (rc = get_stated(ld, al, apath, "pitch", 1, A, 0, &mo->align_pitch,
                         "motion.align_pitch")) ||
        (rc = get_stated(ld, al, apath, "heading", 1, A, 0,
                         &mo->align_heading, "motion.align_heading")))
        return rc;
    return SB_OK;
}

static const struct range R_SOUND = {1300.0, 1800.0, 1, 1,
                                     "a sound speed between 1300 and 1800 m/s"};

/* One speed: its nominal value and uncertainty (absolute or relative, at
 * most 10 % of the speed, as sb_system_validate demands). */
static int read_speed(struct loader *ld, const struct sb_ynode *m,
                      const char *path, double *nominal, struct sb_stated *u,
                      const char *f_nom, const char *f_u)
{
    const struct sb_ynode *un;
    int rc;

    if ((rc = get_quantity(ld, m, path, "nominal", 1, SB_DIM_SPEED, &R_SOUND,
                           nominal, f_nom)) ||
        (rc = get_stated(ld, m, path, "uncertainty", 1,
                         SB_DIM_SPEED | SB_DIM_RATIO, 0, u, f_u)))
        return rc;
    if (sb_system_abs_u(u, *nominal) > 0.1 * *nominal) {
        un = sb_ymap_get(m, "uncertainty");
        return sb_ydoc_error(ld->doc, un, ld->err,
                             "%s.uncertainty: more than 10 %% of the speed "
                             "(expected a standard uncertainty below %.0f "
                             "m/s)",
                             path, 0.1 * *nominal);
    }
    return SB_OK;
}

/* ---- measured profiles (water_column model profile / casts) ---- */

/* Resolve a file named in the spec relative to the spec file's directory
 * (an absolute name is kept).  Returns 0 if it does not fit. */
static int resolve_path(const struct loader *ld, const char *name, char *out,
                        size_t n)
{
    const char *doc = sb_ydoc_name(ld->doc);
    const char *slash = strrchr(doc, '/');
    int w;

    if (name[0] == '/' || !slash)
        w = snprintf(out, n, "%s", name);
    else
        w = snprintf(out, n, "%.*s/%s", (int)(slash - doc + 1) - 1, doc,
                     name);
    return w >= 0 && (size_t)w < n;
}

/* Load one profile file named by the scalar node fn (what = YAML path).
 * Errors inside the file keep the file's own position; a file that cannot
 * be read is reported at fn. */
static int load_profile_file(struct loader *ld, const struct sb_ynode *fn,
                             const char *what, struct sb_profile **out)
{
    char path[SB_ERROR_FILE_MAX];
    const char *name;
    int rc;

    *out = NULL;
    if ((rc = sb_ynode_string(ld->doc, fn, what, &name, ld->err)))
        return rc;
    if (!resolve_path(ld, name, path, sizeof path))
        return sb_ydoc_error(ld->doc, fn, ld->err,
                             "%s: file name too long (expected at most %d "
                             "characters with the spec file's directory)",
                             what, SB_ERROR_FILE_MAX - 1);
    rc = sb_profile_load(path, -1, NAN, out, ld->err);
    if (rc == SB_EIO) {
        char msg[SB_ERROR_MSG_MAX];

        snprintf(msg, sizeof msg, "%s", ld->err ? ld->err->msg : "");
        return sb_ydoc_error(ld->doc, fn, ld->err, "%s: %s", what, msg);
    }
    return rc;
}

/* samples: {depth_m: [...], speed_m_s: [...]} -> a checked profile. */
static int read_samples(struct loader *ld, const struct sb_ynode *sn,
                        const char *spath, struct sb_profile **out)
{
    static const char *const keys[] = {"depth_m", "speed_m_s", NULL};
    const struct sb_ynode *col[2];
    char cpath[2][PATH_MAX_LEN];
    double *v[2] = {NULL, NULL};
    size_t i, k, n = 0;
    int rc;

    *out = NULL;
    if ((rc = sb_ynode_expect_map(ld->doc, sn, spath, ld->err)) ||
        (rc = sb_ymap_check_keys(ld->doc, sn, spath, keys, ld->err)))
        return rc;
    for (k = 0; k < 2; k++) {
        join(cpath[k], spath, keys[k]);
        if ((rc = sb_ymap_require(ld->doc, sn, keys[k], spath, &col[k],
                                  ld->err)) ||
            (rc = sb_ynode_expect_seq(ld->doc, col[k], cpath[k], ld->err)))
            return rc;
    }
    n = col[0]->n;
    if (col[1]->n != n)
        return sb_ydoc_error(ld->doc, col[1], ld->err,
                             "%s: %zu speeds for %zu depths (expected one "
                             "speed per depth)",
                             cpath[1], col[1]->n, n);
    if (n < SB_PROFILE_MIN_SAMPLES)
        return sb_ydoc_error(ld->doc, col[0], ld->err,
                             "%s: %zu samples (expected at least %d)",
                             cpath[0], n, SB_PROFILE_MIN_SAMPLES);
    v[0] = malloc(n * sizeof *v[0]);
    v[1] = malloc(n * sizeof *v[1]);
    if (!v[0] || !v[1]) {
        rc = sb_error_set(ld->err, SB_ENOMEM, "", 0, 0, "out of memory");
        goto done;
    }
    for (k = 0; k < 2; k++)
        for (i = 0; i < n; i++)
            if ((rc = sb_ynode_double(ld->doc, col[k]->items[i], cpath[k],
                                      &v[k][i], ld->err)))
                goto done;
    rc = sb_profile_from_pairs(v[0], v[1], n, out, ld->err);
    if (rc == SB_EINPUT) {
        /* "sample N: ..." -> at that depth (or speed) item */
        size_t bad = 0;
        char msg[SB_ERROR_MSG_MAX];
        int speed = ld->err && strstr(ld->err->msg, "speed") != NULL;

        snprintf(msg, sizeof msg, "%s", ld->err ? ld->err->msg : "");
        if (sscanf(msg, "sample %zu", &bad) != 1 || bad < 1 || bad > n)
            bad = 1;
        rc = sb_ydoc_error(ld->doc, col[speed]->items[bad - 1], ld->err,
                           "%s: %s", spath, msg);
    }
done:
    free(v[0]);
    free(v[1]);
    return rc;
}

/* A key that the chosen model does not use is refused, at the key. */
static int refuse_keys(struct loader *ld, const struct sb_ynode *m,
                       const char *path, const char *const *keys,
                       const char *model, const char *expected)
{
    for (size_t j = 0; j < m->n; j++)
        for (size_t i = 0; keys[i]; i++)
            if (strcmp(m->keys[j], keys[i]) == 0)
                return sb_ydoc_error(ld->doc, m->key_nodes[j], ld->err,
                                     "%s.%s: not used with model %s "
                                     "(expected %s)",
                                     path, keys[i], model, expected);
    return SB_OK;
}

static int read_sound_speed(struct loader *ld, const struct sb_ynode *root)
{
    static const char *const keys[] = {"transducer", "water_column", "casts",
                                       NULL};
    static const char *const tkeys[] = {"nominal", "uncertainty", NULL};
    static const char *const wkeys[] = {"model",   "nominal", "uncertainty",
                                        "file",    "samples", "reference",
                                        NULL};
    static const char *const models[] = {"constant", "profile", "casts",
                                         NULL};
    static const char *const not_constant[] = {"file", "samples", "reference",
                                               NULL};
    static const char *const not_profile[] = {"nominal", "reference", NULL};
    static const char *const not_casts[] = {"nominal", "file", "samples",
                                            NULL};
    struct sb_sound_speed *ss = &ld->sys->sound_speed;
    char path[PATH_MAX_LEN], sub[PATH_MAX_LEN], mp[PATH_MAX_LEN],
        cp[PATH_MAX_LEN];
    const struct sb_ynode *m, *t, *w, *mn, *casts, *un;
    struct sb_profile *prof[SB_CASTS_MAX] = {NULL};
    size_t ncast = 0, k;
    int rc, model;

    if ((rc = section(ld, root, "", "sound_speed", 1, keys, &m, path)))
        return rc;
    if ((rc = section(ld, m, path, "transducer", 1, tkeys, &t, sub)) ||
        (rc = read_speed(ld, t, sub, &ss->surface, &ss->surface_u,
                         "sound_speed.surface", "sound_speed.surface_u")))
        return rc;
    if ((rc = section(ld, m, path, "water_column", 1, wkeys, &w, sub)) ||
        (rc = sb_ymap_require(ld->doc, w, "model", sub, &mn, ld->err)) ||
        (rc = sb_ynode_choice(ld->doc, mn, join(mp, sub, "model"), models,
                              &model, ld->err)))
        return rc;
    casts = sb_ymap_get(m, "casts");
    join(cp, path, "casts");
    if (casts && model != 2) {
        for (k = 0; k < m->n && m->items[k] != casts; k++)
            ;
        return sb_ydoc_error(ld->doc, m->key_nodes[k], ld->err,
                             "%s: only used with water_column model casts "
                             "(expected no casts with model %s)",
                             cp, models[model]);
    }
    if (model == 0) {
        if ((rc = refuse_keys(ld, w, sub, not_constant, "constant",
                              "nominal and uncertainty")) ||
            (rc = read_speed(ld, w, sub, &ss->column, &ss->column_u,
                             "sound_speed.column", "sound_speed.column_u")))
            return rc;
        return SB_OK;
    }

    if (model == 1) {
        const struct sb_ynode *fn = sb_ymap_get(w, "file");
        const struct sb_ynode *sn = sb_ymap_get(w, "samples");
        char fp[PATH_MAX_LEN];

        if ((rc = refuse_keys(ld, w, sub, not_profile, "profile",
                              "file or samples, and uncertainty")))
            return rc;
        if ((fn != NULL) == (sn != NULL))
            return sb_ydoc_error(ld->doc, fn && sn ? sn : w, ld->err,
                                 "%s: %s (expected exactly one of file and "
                                 "samples)",
                                 sub, fn ? "both file and samples given"
                                         : "no profile given");
        if (fn)
            rc = load_profile_file(ld, fn, join(fp, sub, "file"), &prof[0]);
        else
            rc = read_samples(ld, sn, join(fp, sub, "samples"), &prof[0]);
        if (rc)
            return rc;
        ncast = 1;
    } else {
        const struct sb_ynode *rn;
        const char *ref;
        char rp[PATH_MAX_LEN];
        int reference = SB_REFERENCE_MEAN;

        if ((rc = refuse_keys(ld, w, sub, not_casts, "casts",
                              "reference and uncertainty")))
            return rc;
        if (!casts)
            return sb_ydoc_error(ld->doc, m, ld->err,
                                 "%s: missing key 'casts' (expected a list of "
                                 "at least 2 profile files with water_column "
                                 "model casts)",
                                 path);
        if ((rc = sb_ynode_expect_seq(ld->doc, casts, cp, ld->err)))
            return rc;
        if (casts->n < 2 || casts->n > SB_CASTS_MAX)
            return sb_ydoc_error(ld->doc, casts, ld->err,
                                 "%s: %zu casts (expected 2 to %d files)", cp,
                                 casts->n, SB_CASTS_MAX);
        if ((rc = sb_ymap_require(ld->doc, w, "reference", sub, &rn,
                                  ld->err)) ||
            (rc = sb_ynode_string(ld->doc, rn, join(rp, sub, "reference"),
                                  &ref, ld->err)))
            return rc;
        if (strcmp(ref, "mean") != 0) {
            reference = -1;
            for (k = 0; k < casts->n; k++) {
                const struct sb_ynode *it = casts->items[k];
                if (it->kind == SB_YSCALAR && strcmp(it->text, ref) == 0) {
                    reference = (int)k;
                    break;
                }
            }
            if (reference < 0)
                return sb_ydoc_error(ld->doc, rn, ld->err,
                                     "%s: '%s' is not one of the casts "
                                     "(expected mean or a file exactly as "
                                     "listed in %s)",
                                     rp, ref, cp);
        }
        for (ncast = 0; ncast < casts->n; ncast++) {
            char ip[PATH_MAX_LEN], num[16];
            snprintf(num, sizeof num, "[%d]", (int)ncast + 1);
            append(ip, sizeof ip, append(ip, sizeof ip, 0, cp), num);
            if ((rc = load_profile_file(ld, casts->items[ncast], ip,
                                        &prof[ncast])))
                goto fail;
        }
        {
            const double *z[SB_CASTS_MAX], *c[SB_CASTS_MAX];
            size_t n[SB_CASTS_MAX];
            for (k = 0; k < ncast; k++) {
                z[k] = prof[k]->depth_m;
                c[k] = prof[k]->speed_mps;
                n[k] = prof[k]->n;
            }
            rc = sb_system_set_casts(ld->sys, z, c, n, ncast, reference,
                                     ld->err);
        }
        if (rc) {
            /* "cast K sample I: ..." -> at the list item naming cast K */
            const struct sb_ynode *at = casts;
            size_t bad = 0;
            if (ld->err && sscanf(ld->err->msg, "cast %zu", &bad) == 1 &&
                bad >= 1 && bad <= casts->n)
                at = casts->items[bad - 1];
            sb_error_at(ld->err, sb_ydoc_name(ld->doc), at->line, at->col);
            goto fail;
        }
    }
    if (model == 1) {
        rc = sb_system_set_profile(ld->sys, prof[0]->depth_m,
                                   prof[0]->speed_mps, prof[0]->n, ld->err);
        if (rc) {
            const struct sb_ynode *at = sb_ymap_get(w, "file");
            if (!at)
                at = sb_ymap_get(w, "samples");
            sb_error_at(ld->err, sb_ydoc_name(ld->doc), at->line, at->col);
            goto fail;
        }
        if (prof[0]->source[0] && sb_ymap_get(w, "file"))
            snprintf(ss->refraction->source, sizeof ss->refraction->source,
                     "%s", prof[0]->source);
    }
    for (k = 0; k < ncast; k++)
        sb_profile_free(prof[k]);
    ncast = 0;
    note(ld, "sound_speed.column", mp, mn);
    note(ld, "sound_speed.model", mp, mn);
    if ((rc = get_stated(ld, w, sub, "uncertainty", 1,
                         SB_DIM_SPEED | SB_DIM_RATIO, 0, &ss->column_u,
                         "sound_speed.column_u")))
        return rc;
    if (sb_system_abs_u(&ss->column_u, ss->column) > 0.1 * ss->column) {
        un = sb_ymap_get(w, "uncertainty");
        return sb_ydoc_error(ld->doc, un, ld->err,
                             "%s.uncertainty: more than 10 %% of the mean "
                             "speed (expected a standard uncertainty below "
                             "%.0f m/s)",
                             sub, 0.1 * ss->column);
    }
    return SB_OK;
fail:
    for (k = 0; k < ncast && k < SB_CASTS_MAX; k++)
        sb_profile_free(prof[k]);
    return rc;
}

static const struct range R_FREQ = {0.0, 10e6, 1, 0,
                                    "a frequency above 0 Hz and at most "
                                    "10000 kHz"};
static const struct range R_BEAM = {0.0, 30.0 * DEG, 1, 0,
                                    "a beam width above 0 deg and at most "
                                    "30 deg"};
static const struct range R_MAXANG = {0.0, 90.0 * DEG, 1, 1,
                                      "an angle from nadir above 0 deg and "
                                      "below 90 deg"};
static const struct range R_RATE = {0.0, 1e9, 1, 0,
                                    "a sample rate above 0 Hz"};
static const struct range R_PULSE = {0.0, 1.0, 0, 0,
                                     "a pulse length from 0 s to 1 s"};

static const struct range R_OVERHEAD = {0.0, 10.0, 0, 0,
                                        "a time from 0 s to 10 s"};

/* The beam layout and ping overhead used by the sounding density
 * (density.h): optional as a group; beam_spacing, ping_overhead and
 * feature_soundings only mean something with beams. */
static int read_beam_layout(struct loader *ld, const struct sb_ynode *m,
                            const char *path)
{
    static const char *const spacings[] = {"equiangular", "equidistant",
                                           NULL};
    struct sb_echosounder *e = &ld->sys->echosounder;
    const struct sb_ynode *bn = sb_ymap_get(m, "beams");
    const struct sb_ynode *sn = sb_ymap_get(m, "beam_spacing");
    const struct sb_ynode *on = sb_ymap_get(m, "ping_overhead");
    const struct sb_ynode *fn = sb_ymap_get(m, "feature_soundings");
    char sub[PATH_MAX_LEN];
    long beams;
    double n;
    int rc, spacing;

    if (!bn) {
        const struct sb_ynode *other = sn ? sn : on ? on : fn;

        if (other)
            return sb_ydoc_error(ld->doc, other, ld->err,
                                 "%s: beam_spacing, ping_overhead and "
                                 "feature_soundings need 'beams' (expected "
                                 "the number of beams as well)",
                                 path);
        return SB_OK;
    }
    if ((rc = sb_ynode_int(ld->doc, bn, join(sub, path, "beams"), 2, 100000,
                           &beams, ld->err)))
        return rc;
    e->beams = (int)beams;
    note(ld, "echosounder.beams", sub, bn);
    if (!sn)
        return sb_ydoc_error(ld->doc, m, ld->err,
                             "%s: missing required key 'beam_spacing' "
                             "(expected equiangular or equidistant with "
                             "beams)",
                             path);
    if ((rc = sb_ynode_choice(ld->doc, sn, join(sub, path, "beam_spacing"),
                              spacings, &spacing, ld->err)))
        return rc;
    e->beam_spacing = spacing;
    if ((rc = get_quantity(ld, m, path, "ping_overhead", 0, SB_DIM_TIME,
                           &R_OVERHEAD, &e->ping_overhead,
                           "echosounder.ping_overhead")))
        return rc;
    if (fn) {
        if ((rc = sb_ynode_double(ld->doc, fn,
                                  join(sub, path, "feature_soundings"), &n,
                                  ld->err)))
            return rc;
        if (!(n > 0.0 && n <= 1000.0))
            return sb_ydoc_error(ld->doc, fn, ld->err,
                                 "%s: '%s' is out of range (expected a "
                                 "number above 0 and at most 1000, e.g. 3)",
                                 sub, fn->text);
        e->feature_soundings = n;
        note(ld, "echosounder.feature_soundings", sub, fn);
    }
    return SB_OK;
}

static int read_echosounder(struct loader *ld, const struct sb_ynode *root)
{
    static const char *const keys[] = {
        "frequency",        "beam_width_across", "beam_width_along",
        "array",            "range_resolution",  "sample_rate",
        "pulse_length",     "pointing",          "max_beam_angle",
        "beams",            "beam_spacing",      "ping_overhead",
        "feature_soundings", NULL};
    static const char *const arrays[] = {"flat", "curved", NULL};
    struct sb_echosounder *e = &ld->sys->echosounder;
    char path[PATH_MAX_LEN], sub[PATH_MAX_LEN];
    const struct sb_ynode *m, *an, *rr, *sr, *pl;
    int rc, array;

    if ((rc = section(ld, root, "", "echosounder", 1, keys, &m, path)))
        return rc;
    if ((rc = get_quantity(ld, m, path, "frequency", 1, SB_DIM_FREQ, &R_FREQ,
                           &e->frequency, "echosounder.frequency")) ||
        (rc = get_quantity(ld, m, path, "beam_width_across", 1, SB_DIM_ANGLE,
                           &R_BEAM, &e->beam_across,
                           "echosounder.beam_across")) ||
        (rc = get_quantity(ld, m, path, "beam_width_along", 1, SB_DIM_ANGLE,
                           &R_BEAM, &e->beam_along,
                           "echosounder.beam_along")) ||
        (rc = sb_ymap_require(ld->doc, m, "array", path, &an, ld->err)) ||
        (rc = sb_ynode_choice(ld->doc, an, join(sub, path, "array"), arrays,
                              &array, ld->err)))
        return rc;
    e->array = array == 0 ? SB_ARRAY_FLAT : SB_ARRAY_CURVED;

    /* range: stated directly, or from sampling and pulse (not both) */
    rr = sb_ymap_get(m, "range_resolution");
    sr = sb_ymap_get(m, "sample_rate");
    pl = sb_ymap_get(m, "pulse_length");
    if (rr && (sr || pl)) {
        size_t i;
        int first_given = -1; /* 0: range_resolution, 1: sampling form */

        /* point at the first key of whichever form comes second */
        for (i = 0; i < m->n; i++) {
            int form;

            if (m->items[i] == rr)
                form = 0;
            else if (m->items[i] == sr || m->items[i] == pl)
                form = 1;
            else
                continue;
            if (first_given < 0)
                first_given = form;
            else if (form != first_given)
                return sb_ydoc_error(ld->doc, m->key_nodes[i], ld->err,
                                     "%s: range_resolution given together "
                                     "with sample_rate/pulse_length "
                                     "(expected one of the two forms)",
                                     path);
        }
    }
    if (!rr && !sr && !pl)
        return sb_ydoc_error(ld->doc, m, ld->err,
                             "%s: missing required key 'range_resolution' "
                             "(expected range_resolution, or sample_rate "
                             "and pulse_length)",
                             path);
    if (rr) {
        e->range_mode = SB_RANGE_GIVEN;
        if ((rc = get_stated(ld, m, path, "range_resolution", 1,
                             SB_DIM_LENGTH, 0, &e->range_resolution,
                             "echosounder.range_resolution")))
            return rc;
    } else {
        e->range_mode = SB_RANGE_SAMPLING;
        if ((rc = get_quantity(ld, m, path, "sample_rate", 1, SB_DIM_FREQ,
                               &R_RATE, &e->sample_rate,
                               "echosounder.sample_rate")) ||
            (rc = get_quantity(ld, m, path, "pulse_length", 1, SB_DIM_TIME,
                               &R_PULSE, &e->pulse_length,
                               "echosounder.pulse_length")))
            return rc;
    }
    if ((rc = get_stated(ld, m, path, "pointing", 1,
                         SB_DIM_RATIO | SB_DIM_ANGLE, 0, &e->pointing,
                         "echosounder.pointing")) ||
        (rc = get_quantity(ld, m, path, "max_beam_angle", 1, SB_DIM_ANGLE,
                           &R_MAXANG, &e->max_angle,
                           "echosounder.max_angle")))
        return rc;
    return read_beam_layout(ld, m, path);
}

static const struct range R_DRAFT = {0.0, 50.0, 0, 0,
                                     "a draft from 0 m to 50 m"};
static const struct range R_DDRAFT = {-10.0, 10.0, 0, 0,
                                      "a change from -10 m to 10 m"};

/* {nominal: L, uncertainty: L} under vertical_reference. */
static int read_level(struct loader *ld, const struct sb_ynode *m,
                      const char *mpath, const char *key, int required,
                      const struct range *r, double *nominal,
                      struct sb_stated *u, const char *f_nom,
                      const char *f_u)
{
    static const char *const keys[] = {"nominal", "uncertainty", NULL};
    char path[PATH_MAX_LEN];
    const struct sb_ynode *s;
    int rc;

    if ((rc = section(ld, m, mpath, key, required, keys, &s, path)))
        return rc;
    if (!s)
        return SB_OK;
    if ((rc = get_quantity(ld, s, path, "nominal", 1, SB_DIM_LENGTH, r,
                           nominal, f_nom)) ||
        (rc = get_stated(ld, s, path, "uncertainty", 1, SB_DIM_LENGTH, 0, u,
                         f_u)))
        return rc;
    return SB_OK;
}

static int read_vertical(struct loader *ld, const struct sb_ynode *root)
{
    static const char *const keys[] = {"method",     "draft",  "squat",
                                       "loading",    "water_level",
                                       "zoning",     "separation", NULL};
    static const char *const methods[] = {"tide_gauge", "ellipsoid", NULL};
    static const char *const tide_only[] = {"water_level", "zoning", NULL};
    static const char *const ell_only[] = {"separation", NULL};
    struct sb_vertical_ref *v = &ld->sys->vertical;
    char path[PATH_MAX_LEN], sub[PATH_MAX_LEN];
    const struct sb_ynode *m, *mn, *dn;
    const char *const *foreign;
    int rc, method, i;

    if ((rc = section(ld, root, "", "vertical_reference", 1, keys, &m, path)) ||
        (rc = sb_ymap_require(ld->doc, m, "method", path, &mn, ld->err)) ||
        (rc = sb_ynode_choice(ld->doc, mn, join(sub, path, "method"), methods,
                              &method, ld->err)))
        return rc;
    v->method = method == 0 ? SB_VREF_TIDE : SB_VREF_ELLIPSOID;
    note(ld, "vertical.method", sub, mn);
    /* a figure of the other method would be silently unused: refuse it */
    foreign = method == 0 ? ell_only : tide_only;
    for (i = 0; foreign[i]; i++) {
        size_t j;

        for (j = 0; j < m->n; j++)
            if (strcmp(m->keys[j], foreign[i]) == 0)
                return sb_ydoc_error(
                    ld->doc, m->key_nodes[j], ld->err,
                    "%s.%s: not used with method %s (expected %s)", path,
                    foreign[i], methods[method],
                    method == 0 ? "water_level and zoning for tide_gauge"
                                : "separation for ellipsoid");
    }
    if ((rc = read_level(ld, m, path, "draft", 1, &R_DRAFT, &v->draft,
                         &v->draft_u, "vertical.draft", "vertical.draft_u")) ||
        (rc = read_level(ld, m, path, "squat", 0, &R_DDRAFT, &v->squat,
                         &v->squat_u, "vertical.squat", "vertical.squat_u")) ||
        (rc = read_level(ld, m, path, "loading", 0, &R_DDRAFT, &v->loading,
                         &v->loading_u, "vertical.loading",
                         "vertical.loading_u")))
        return rc;
    if (v->draft + v->squat + v->loading < 0.0) {
        dn = sb_ymap_get(m, "draft");
        return sb_ydoc_error(ld->doc, dn, ld->err,
                             "%s.draft: draft + squat + loading is %.3f m, "
                             "the transducer would be above the water "
                             "(expected a total of at least 0 m)",
                             path, v->draft + v->squat + v->loading);
    }
    if (method == 0) {
        if ((rc = get_stated(ld, m, path, "water_level", 1, SB_DIM_LENGTH, 0,
                             &v->water_level, "vertical.water_level")) ||
            (rc = get_stated(ld, m, path, "zoning", 1, SB_DIM_LENGTH, 0,
                             &v->zoning, "vertical.zoning")))
            return rc;
    } else {
        if ((rc = get_stated(ld, m, path, "separation", 1, SB_DIM_LENGTH, 0,
                             &v->separation, "vertical.separation")))
            return rc;
    }
    return SB_OK;
}

static const struct range R_SPEED = {0.0, 30.0, 0, 0,
                                     "a speed from 0 to 30 m/s (58 kn)"};
static const struct range R_TILT = {0.0, 45.0 * DEG, 0, 1,
                                    "an amplitude from 0 deg to below 45 deg"};
static const struct range R_PERIOD = {0.0, 3600.0, 1, 0,
                                      "a period above 0 s and at most 3600 s"};
static const struct range R_HEAVE = {0.0, 50.0, 0, 0,
                                     "an amplitude from 0 m to 50 m"};

static int read_conditions(struct loader *ld, const struct sb_ynode *root)
{
    static const char *const keys[] = {
        "speed",           "roll_amplitude",  "roll_period",
        "pitch_amplitude", "pitch_period",    "heave_amplitude",
        "heave_period",    NULL};
    struct sb_conditions *c = &ld->sys->conditions;
    char path[PATH_MAX_LEN];
    const struct sb_ynode *m;
    int rc;

    if ((rc = section(ld, root, "", "conditions", 1, keys, &m, path)))
        return rc;
    if ((rc = get_quantity(ld, m, path, "speed", 1, SB_DIM_SPEED, &R_SPEED,
                           &c->speed, "conditions.speed")) ||
        (rc = get_quantity(ld, m, path, "roll_amplitude", 1, SB_DIM_ANGLE,
                           &R_TILT, &c->roll_amplitude,
                           "conditions.roll_amplitude")) ||
        (rc = get_quantity(ld, m, path, "roll_period", 1, SB_DIM_TIME,
                           &R_PERIOD, &c->roll_period,
                           "conditions.roll_period")) ||
        (rc = get_quantity(ld, m, path, "pitch_amplitude", 1, SB_DIM_ANGLE,
                           &R_TILT, &c->pitch_amplitude,
                           "conditions.pitch_amplitude")) ||
        (rc = get_quantity(ld, m, path, "pitch_period", 1, SB_DIM_TIME,
                           &R_PERIOD, &c->pitch_period,
                           "conditions.pitch_period")) ||
        (rc = get_quantity(ld, m, path, "heave_amplitude", 1, SB_DIM_LENGTH,
                           &R_HEAVE, &c->heave_amplitude,
                           "conditions.heave_amplitude")) ||
        (rc = get_quantity(ld, m, path, "heave_period", 0, SB_DIM_TIME,
                           &R_PERIOD, &c->heave_period,
                           "conditions.heave_period")))
        return rc;
    return SB_OK;
}

/* Put a message of sb_system_validate() at the node its field came from,
 * with the YAML path in place of the struct path. */
static int place_validation(struct loader *ld, const struct sb_ynode *root)
{
    struct sb_error *err = ld->err;
    const char *colon;
    size_t i, flen;
    char rest[SB_ERROR_MSG_MAX];

    if (!err)
        return SB_EINPUT;
    colon = strstr(err->msg, ": ");
    flen = colon ? (size_t)(colon - err->msg) : 0;
    for (i = 0; colon && i < ld->nseen; i++) {
        if (strlen(ld->seen[i].field) == flen &&
            strncmp(ld->seen[i].field, err->msg, flen) == 0) {
            snprintf(rest, sizeof rest, "%s", colon + 2);
            return sb_ydoc_error(ld->doc, ld->seen[i].node, err, "%s: %s",
                                 ld->seen[i].path, rest);
        }
    }
    sb_error_at(err, sb_ydoc_name(ld->doc), root->line, root->col);
    return SB_EINPUT;
}

static int load_doc(const struct sb_ydoc *doc, struct sb_system *out,
                    struct sb_error *err)
{
    static const char *const keys[] = {
        "name",        "title",       "lever_arms",         "positioning",
        "motion",      "sound_speed", "echosounder",        "vertical_reference",
        "conditions",  NULL};
    struct loader ld;
    struct sb_system sys;
    const struct sb_ynode *root = sb_ydoc_root(doc);
    int rc;

    memset(&ld, 0, sizeof ld);
    ld.doc = doc;
    ld.err = err;
    ld.sys = &sys;
    sb_system_init_defaults(&sys);
    snprintf(sys.source, sizeof sys.source, "%s", sb_ydoc_name(doc));

    if (!root || root->kind != SB_YMAP)
        return sb_ydoc_error(doc, root, err,
                             "found %s at the top of the file (expected a "
                             "mapping of sections: name, lever_arms, "
                             "positioning, ...)",
                             sb_ynode_kind_name(root));
    if ((rc = sb_ymap_check_keys(doc, root, "", keys, err)) ||
        (rc = get_text(&ld, root, "name", 1, sys.name, sizeof sys.name, 1)) ||
        (rc = get_text(&ld, root, "title", 0, sys.title, sizeof sys.title,
                       0)) ||
        (rc = read_lever_arms(&ld, root)) ||
        (rc = read_positioning(&ld, root)) ||
        (rc = read_motion(&ld, root)) ||
        (rc = read_sound_speed(&ld, root)) ||
        (rc = read_echosounder(&ld, root)) ||
        (rc = read_vertical(&ld, root)) ||
        (rc = read_conditions(&ld, root))) {
        sb_system_release(&sys); /* a profile read before the error */
        return rc;
    }
    rc = sb_system_validate(&sys, err);
    if (rc == SB_EINPUT)
        rc = place_validation(&ld, root);
    if (rc != SB_OK) {
        sb_system_release(&sys);
        return rc;
    }
    *out = sys;
    return SB_OK;
}

int sb_spec_load(const char *path, struct sb_system *out,
                 struct sb_error *err)
{
    struct sb_ydoc *doc;
    int rc;

    if ((rc = sb_ydoc_load_file(path, &doc, err)) != SB_OK)
        return rc;
    rc = load_doc(doc, out, err);
    sb_ydoc_free(doc);
    return rc;
}

int sb_spec_load_string(const char *name, const char *text, size_t len,
                        struct sb_system *out, struct sb_error *err)
{
    struct sb_ydoc *doc;
    int rc;

    if ((rc = sb_ydoc_load_string(name, text, len, &doc, err)) != SB_OK)
        return rc;
    rc = load_doc(doc, out, err);
    sb_ydoc_free(doc);
    return rc;
}
