/*
 * swathbudget — refraction in the error budget: the sound velocity
 * profile(s) a survey system carries, and the ray tracing the engine does
 * through them on its hot path.
 *
 * A profile (struct sb_svp) is a list of depth-speed samples joined by
 * straight lines: between two samples the speed has a constant gradient, so
 * a ray is an arc of a circle there and every step has a closed form
 * (docs/raytrace.md derives the forms used, equations (1'), (2'), (3)).
 * Above the first sample and below the last the speed is held constant, as
 * in raytrace.h.
 *
 * Why a second tracer beside raytrace.h: the error engine needs things that
 * the general tracer does not keep -- the horizontal offset divided by the
 * Snell parameter (no 0/0 at nadir), the derivatives of the ray with
 * respect to its Snell parameter and its travel time (the Jacobian uses
 * them instead of re-tracing), a cursor that walks down a column of depths
 * in amortised O(1), and a defined continuation past a turning point.  It
 * stores no per-ray table, so a beam stays small (montecarlo.c keeps arrays
 * of beams).  tests/test_refraction.c checks both tracers against each
 * other and against an independent 1 cm slab integration.
 *
 * Units: SI; depth z positive down from the sea surface; q is a Snell
 * parameter sin(theta) / c >= 0 (s/m) in the UNSCALED profile; w is the
 * horizontal offset divided by q (m^2/s), finite for the vertical ray.
 *
 * A speed scale s applied to every speed below the transducer with the
 * Snell parameter p held fixed (a uniform relative error of the profile
 * with the transducer speed known) is the unscaled ray of parameter
 * q = p s travelled s times faster: position after time t in the scaled
 * water = unscaled position for q = p s after time s t, and x = p s w.
 */
#ifndef SWATHBUDGET_REFRACTION_H
#define SWATHBUDGET_REFRACTION_H

#include <stddef.h>

#include "swathbudget/error.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Largest number of casts of one survey (sound_speed.casts). */
#define SB_CASTS_MAX 32
/* Largest number of samples of one profile (the mean of several casts is
 * sampled at the union of their depths). */
#define SB_SVP_MAX_SAMPLES 20000

/* Reference of a set of casts: their mean, or one of them (index >= 0). */
#define SB_REFERENCE_MEAN (-1)
/* Not a set of casts: one profile. */
#define SB_REFERENCE_SINGLE (-2)

/* One profile as the engine traces it.  Read-only after allocation. */
struct sb_svp {
    size_t n;      /* samples, >= 1 */
    double *z;     /* depths, m, strictly increasing */
    double *c;     /* speeds, m/s, > 0 */
    double *g;     /* g[i]: gradient from sample i to i + 1, 1/s;
                      g[n - 1] = 0 (the constant half-space below) */
    double c_mean; /* depth average of the speed from the first to the last
                      sample (c[0] for one sample), m/s */
};

/* The profile(s) of a system, owned by struct sb_system. */
struct sb_refraction {
    struct sb_svp ref;     /* the profile the engine traces: the one
                              profile, the mean of the casts, or the chosen
                              cast */
    size_t n_casts;        /* 0 (one profile) or 2..SB_CASTS_MAX */
    struct sb_svp casts[SB_CASTS_MAX];
    int reference;         /* SB_REFERENCE_SINGLE, SB_REFERENCE_MEAN, or the
                              index of the reference cast */
    char source[SB_ERROR_FILE_MAX]; /* file of the one profile, or
                                       "(inline)"; "" for casts */
    double *block;         /* storage of every array above */
};

/* Where a ray starts: the transducer depth inside a profile. */
struct sb_svp_start {
    size_t k0;  /* first sample strictly below z_t (n if none) */
    double z_t; /* transducer depth, m */
    double c_t; /* profile speed there, m/s */
    double g_t; /* gradient of the first (partial) layer, 1/s */
};

/* A position on a ray in the depth direction, with its derivatives. */
struct sb_svp_point {
    double t;  /* one-way time from the transducer (unscaled), s */
    double w;  /* horizontal offset / q, m^2/s */
    double xq; /* dX/dq at fixed depth, sum of integral c / cos^3 dz, m^2/s */
    double wq; /* dw/dq at fixed depth, m^3/s^2 */
    double c;  /* speed at the point, m/s */
    double co; /* cosine of the ray angle there (> 0) */
};

/* Walking state of a ray down a profile: the last layer boundary passed.
 * Zero-fill it (or call sb_svp_cursor_reset) to start at the transducer.
 * A cursor belongs to one (profile, start, q); it only moves down. */
struct sb_svp_cursor {
    size_t j;     /* boundary index: 0 the transducer, i >= 1 sample k0+i-1 */
    double t, w;  /* time and w at that boundary */
    double xq, wq; /* sums of the derivative integrals (depth cursor only) */
};

/*
 * A refraction set with one profile (copied): depth_m strictly increasing,
 * finite, >= 0; speed_mps finite in (0, inf); 1 <= n <= SB_SVP_MAX_SAMPLES.
 * source is kept for reports ("(inline)" if NULL).  Errors: SB_EINPUT
 * (naming the 1-based sample, no position), SB_ENOMEM.  *out NULL on error.
 */
int sb_refraction_alloc_profile(const double *depth_m, const double *speed_mps,
                                size_t n, const char *source,
                                struct sb_refraction **out,
                                struct sb_error *err);

/*
 * A refraction set from n_casts casts (2..SB_CASTS_MAX; cast k has n[k]
 * samples depth_m[k][], speed_mps[k][], same rules as above).  reference:
 * SB_REFERENCE_MEAN -- the reference profile is the mean of the casts,
 * sampled at the union of their depths (each cast interpolated linearly,
 * constant beyond its ends) -- or the index of one cast.  Errors: SB_EINPUT
 * ("cast K sample I: ..."), SB_ENOMEM.
 */
int sb_refraction_alloc_casts(const double *const *depth_m,
                              const double *const *speed_mps, const size_t *n,
                              size_t n_casts, int reference,
                              struct sb_refraction **out,
                              struct sb_error *err);

/* Free a set (NULL is fine). */
void sb_refraction_free(struct sb_refraction *r);

/* Speed of a profile at depth z_m (m/s): linear between samples, constant
 * outside them. */
double sb_svp_speed_at(const struct sb_svp *m, double z_m);

/* The start of every ray from a transducer at depth z_t_m (m, finite). */
void sb_svp_start_at(const struct sb_svp *m, double z_t_m,
                     struct sb_svp_start *s);

static inline void sb_svp_cursor_reset(struct sb_svp_cursor *cur)
{
    cur->j = 0;
    cur->t = cur->w = cur->xq = cur->wq = 0.0;
}

/*
 * Planning direction: the ray of unscaled Snell parameter q (>= 0, s/m)
 * from the start s down to depth z_m (m, >= s->z_t).  Fills *out.  cur
 * (optional) is advanced to the last boundary above z_m and reused when
 * the next call is deeper; it is reset internally when z_m lies above it.
 * Returns SB_OK, or SB_ENUM when the ray turns (becomes horizontal) at or
 * above z_m; *out is then untouched.  Allocation-free, O(layers passed).
 */
int sb_svp_to_depth(const struct sb_svp *m, const struct sb_svp_start *s,
                    double q, double z_m, struct sb_svp_cursor *cur,
                    struct sb_svp_point *out);

/*
 * Audit direction: where the ray of unscaled parameter q (>= 0) is after an
 * unscaled one-way time tau (s): depth *z_m (m from the surface) and
 * *w = horizontal offset / q (m^2/s).  A ray that turns before tau comes
 * back up along the mirror image of its way down (the continuation in a
 * stratified medium): the depth is that at the mirrored time and the offset
 * 2 x_turn - x(mirrored); past the transducer depth it stays there.  tau < 0
 * counts as 0.  cur (optional; only j, t, w are used) as for
 * sb_svp_to_depth, for the time.  Returns SB_OK, or SB_ENUM when the ray
 * turned before tau (outputs still finite).  Allocation-free.
 */
int sb_svp_at_time(const struct sb_svp *m, const struct sb_svp_start *s,
                   double q, double tau, struct sb_svp_cursor *cur,
                   double *z_m, double *w);

/*
 * Largest |beam angle| (rad, from the vertical at the transducer, where the
 * speed is s->c_t) whose ray reaches depth z_m without turning:
 * asin(c_t / c_max), c_max the largest speed between the transducer and
 * z_m (Snell's law: the ray turns where p c = 1).  pi/2 when no speed there
 * exceeds c_t.
 */
double sb_svp_turn_angle(const struct sb_svp *m, const struct sb_svp_start *s,
                         double z_m);

#ifdef __cplusplus
}
#endif

#endif
