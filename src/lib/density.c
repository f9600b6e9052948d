/*
 * Sounding density on a flat seafloor and the feature-detection limit it
 * puts on the beam angle (formulas and their sources in
 * include/swathbudget/density.h; derivations in docs/report.md).
 */
#include "swathbudget/density.h"

#include <math.h>
#include <stddef.h>

#define PI 3.14159265358979323846 /* M_PI is not C11 */

/* Largest beam angle accepted, rad (89.9 deg: tan and 1/cos stay finite). */
#define SECTOR_MAX (89.9 * PI / 180.0)

int sb_density_check(const struct sb_density_params *p, struct sb_error *err)
{
    if (!p)
        return sb_error_set(err, SB_EINTERNAL, "", 0, 0,
                            "no density parameters (this is a bug)");
    if (p->n_beams < 2 || p->n_beams > 100000)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "echosounder.beams: %d beams (expected 2 to "
                            "100000)", p->n_beams);
    if (p->spacing != SB_SPACING_EQUIANGULAR &&
        p->spacing != SB_SPACING_EQUIDISTANT)
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "echosounder.beam_spacing: unknown mode "
                            "(expected equiangular or equidistant)");
    if (!(p->sector_rad > 0.0 && p->sector_rad <= SECTOR_MAX))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "echosounder.max_beam_angle: %g rad (expected "
                            "more than 0 and at most 89.9 deg)",
                            p->sector_rad);
    if (!(p->beam_across_rad > 0.0 && p->beam_across_rad < PI / 2) ||
        !(p->beam_along_rad > 0.0 && p->beam_along_rad < PI / 2))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "echosounder.beam_width: not a finite positive "
                            "angle (expected a beam width in (0, 90) deg)");
    if (!(p->ping_overhead_s >= 0.0 && isfinite(p->ping_overhead_s)))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "echosounder.ping_overhead: %g s (expected a "
                            "finite time >= 0)", p->ping_overhead_s);
    if (!(p->sound_speed_mps > 0.0 && isfinite(p->sound_speed_mps)))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "sound speed %g m/s (expected a finite speed "
                            "> 0)", p->sound_speed_mps);
    if (!(p->min_soundings > 0.0 && isfinite(p->min_soundings)))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "echosounder.feature_soundings: %g (expected a "
                            "number > 0, e.g. 3)", p->min_soundings);
    return SB_OK;
}

static int check_depth_angle(const struct sb_density_params *p, double d,
                             double angle, struct sb_error *err)
{
    if (!(d > 0.0 && isfinite(d)))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "depth below the transducer %g m (expected a "
                            "finite depth > 0)", d);
    /* a hair of tolerance: callers pass the sector itself converted
     * back and forth through degrees */
    if (!(fabs(angle) <= p->sector_rad * (1.0 + 1e-12)))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "beam angle %g deg (expected at most the "
                            "outermost beam, %g deg)",
                            angle * 180.0 / PI,
                            p->sector_rad * 180.0 / PI);
    return SB_OK;
}

double sb_density_ping_period(const struct sb_density_params *p,
                              double depth_tx_m)
{
    double r_out = depth_tx_m / cos(p->sector_rad);

    return 2.0 * r_out / p->sound_speed_mps + p->ping_overhead_s;
}

double sb_density_across_spacing(const struct sb_density_params *p,
                                 double depth_tx_m, double angle_rad)
{
    double n1 = (double)(p->n_beams - 1);

    if (p->spacing == SB_SPACING_EQUIDISTANT)
        return 2.0 * depth_tx_m * tan(p->sector_rad) / n1;
    {
        double dt = 2.0 * p->sector_rad / n1;

        /* the sin/cos form avoids the cancellation of the tan difference */
        return 2.0 * depth_tx_m * sin(dt) / (cos(2.0 * angle_rad) + cos(dt));
    }
}

int sb_density_at(const struct sb_density_params *p, double depth_tx_m,
                  double speed_mps, double angle_rad,
                  struct sb_density_point *out, struct sb_error *err)
{
    double c, r, b_eff, dx, dy;
    int rc;

    if ((rc = sb_density_check(p, err)) != SB_OK)
        return rc;
    if ((rc = check_depth_angle(p, depth_tx_m, angle_rad, err)) != SB_OK)
        return rc;
    if (!(speed_mps >= 0.0 && isfinite(speed_mps)))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "speed %g m/s (expected a finite speed >= 0)",
                            speed_mps);
    c = cos(angle_rad);
    r = depth_tx_m / c;
    b_eff = p->flat_array ? p->beam_across_rad / c : p->beam_across_rad;
    dx = speed_mps * sb_density_ping_period(p, depth_tx_m);
    dy = sb_density_across_spacing(p, depth_tx_m, angle_rad);
    out->angle_rad = angle_rad;
    out->across_spacing_m = dy;
    out->along_spacing_m = dx;
    out->footprint_across_m = r * b_eff / c;
    out->footprint_along_m = r * p->beam_along_rad;
    out->soundings_per_m2 = dx > 0.0 ? 1.0 / (dx * dy) : INFINITY;
    return SB_OK;
}

int sb_density_limit(const struct sb_density_params *p, double depth_tx_m,
                     double speed_mps, double feature_m,
                     struct sb_density_limit *out, struct sb_error *err)
{
    double T, dx, dy_max, dy0, dy_out, s2 = feature_m * feature_m;
    int rc;

    if ((rc = sb_density_check(p, err)) != SB_OK)
        return rc;
    if ((rc = check_depth_angle(p, depth_tx_m, 0.0, err)) != SB_OK)
        return rc;
    if (!(speed_mps >= 0.0 && isfinite(speed_mps)))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "speed %g m/s (expected a finite speed >= 0)",
                            speed_mps);
    if (!(feature_m > 0.0 && isfinite(feature_m)))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "feature size %g m (expected a finite size > 0)",
                            feature_m);
    T = sb_density_ping_period(p, depth_tx_m);
    dx = speed_mps * T;
    out->ping_period_s = T;
    out->along_spacing_m = dx;
    dy0 = sb_density_across_spacing(p, depth_tx_m, 0.0);
    out->count_nadir = dx > 0.0 ? s2 / (dx * dy0) : INFINITY;
    if (dx <= 0.0) {
        out->verdict = SB_DENSITY_SECTOR;
        out->angle_rad = p->sector_rad;
        return SB_OK;
    }
    /* count >= N  <=>  dy <= s^2 / (N dx) */
    dy_max = s2 / (p->min_soundings * dx);
    dy_out = sb_density_across_spacing(p, depth_tx_m, p->sector_rad);
    if (dy0 > dy_max) {
        out->verdict = SB_DENSITY_NADIR;
        out->angle_rad = 0.0;
    } else if (dy_out <= dy_max) {
        out->verdict = SB_DENSITY_SECTOR;
        out->angle_rad = p->sector_rad;
    } else {
        /* only the equiangular layout gets here (equidistant dy is the
         * same at nadir and at the sector) */
        double dt = 2.0 * p->sector_rad / (double)(p->n_beams - 1);
        double c2 = 2.0 * depth_tx_m * sin(dt) / dy_max - cos(dt);

        if (c2 > 1.0)
            c2 = 1.0;
        if (c2 < -1.0)
            c2 = -1.0;
        out->verdict = SB_DENSITY_LIMITED;
        out->angle_rad = 0.5 * acos(c2);
        if (out->angle_rad > p->sector_rad)
            out->angle_rad = p->sector_rad;
    }
    return SB_OK;
}

int sb_density_max_speed(const struct sb_density_params *p,
                         double depth_tx_m, double feature_m,
                         double angle_rad, double *speed_mps,
                         struct sb_error *err)
{
    double T, dy;
    int rc;

    if ((rc = sb_density_check(p, err)) != SB_OK)
        return rc;
    if ((rc = check_depth_angle(p, depth_tx_m, angle_rad, err)) != SB_OK)
        return rc;
    if (!(feature_m > 0.0 && isfinite(feature_m)))
        return sb_error_set(err, SB_EINPUT, "", 0, 0,
                            "feature size %g m (expected a finite size > 0)",
                            feature_m);
    T = sb_density_ping_period(p, depth_tx_m);
    dy = sb_density_across_spacing(p, depth_tx_m, angle_rad);
    *speed_mps = feature_m * feature_m / (p->min_soundings * dy * T);
    return SB_OK;
}

int sb_density_params_from_system(const struct sb_system *sys,
                                  struct sb_density_params *p)
{
    const struct sb_echosounder *e = &sys->echosounder;

    if (e->beams <= 0)
        return 0;
    p->n_beams = e->beams;
    p->spacing = e->beam_spacing == 1 ? SB_SPACING_EQUIDISTANT
                                      : SB_SPACING_EQUIANGULAR;
    p->sector_rad = e->max_angle;
    p->beam_across_rad = e->beam_across;
    p->beam_along_rad = e->beam_along;
    p->flat_array = e->array == SB_ARRAY_FLAT;
    p->ping_overhead_s = e->ping_overhead;
    p->sound_speed_mps = sys->sound_speed.column;
    p->min_soundings = e->feature_soundings;
    return 1;
}

const char *sb_density_verdict_name(enum sb_density_verdict v)
{
    switch (v) {
    case SB_DENSITY_LIMITED: return "limited";
    case SB_DENSITY_SECTOR: return "sector";
    case SB_DENSITY_NADIR: return "nadir";
    }
    return "?";
}

const char *sb_beam_spacing_name(enum sb_beam_spacing s)
{
    switch (s) {
    case SB_SPACING_EQUIANGULAR: return "equiangular";
    case SB_SPACING_EQUIDISTANT: return "equidistant";
    }
    return "?";
}
