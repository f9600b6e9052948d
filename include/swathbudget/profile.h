/*
 * swathbudget — sound velocity profiles: depth-speed pairs, either given
 * directly or derived from a CTD cast (temperature and salinity against
 * depth or pressure) with one of the equations of soundspeed.h.
 *
 * File format (docs/soundspeed.md has the full description): CSV, lines
 * starting with '#' and blank lines ignored, a header line naming the
 * columns with their units, then one sample per line.  Columns:
 *
 *     depth_m                  depth below the sea surface, positive down
 *     pressure_dbar            sea pressure (gauge)
 *     temperature_degC         in-situ temperature, ITS-90
 *     temperature_ipts68_degC  in-situ temperature, IPTS-68 (older data)
 *     salinity_psu             Practical Salinity (PSS-78)
 *     speed_m_s                sound speed
 *
 * A file has depth_m or pressure_dbar (or both) and either speed_m_s (a
 * depth-speed profile) or one temperature column and salinity_psu (a cast).
 * Any other column, a repeated column, or both kinds is an input error.
 *
 * Samples must be finite, in physical bounds (SB_PROFILE_* below), strictly
 * increasing in depth (and pressure), and without gaps: the first sample
 * no deeper than SB_PROFILE_GAP_ABS_M, and each step no larger than
 * max(SB_PROFILE_GAP_ABS_M, SB_PROFILE_GAP_REL x the shallower depth) --
 * sound speed changes fastest near the surface, so close sampling matters
 * there, while deep profiles are customarily given at wider standard levels
 * (0, 10, 20, 30, 50, 75, 100, 125, 150, 200, 250, 300, 400, 500, ...,
 * 1500, 1750, 2000, 2500, ... m all pass).
 */
#ifndef SWATHBUDGET_PROFILE_H
#define SWATHBUDGET_PROFILE_H

#include <stddef.h>

#include "swathbudget/error.h"

#ifdef __cplusplus
extern "C" {
#endif

#define SB_PROFILE_GAP_ABS_M 20.0  /* m: largest first depth / small step */
#define SB_PROFILE_GAP_REL 0.5     /* step allowed as a fraction of depth */
#define SB_PROFILE_MIN_SAMPLES 2
#define SB_PROFILE_MAX_DEPTH_M 12000.0  /* deeper than any ocean */
#define SB_PROFILE_SPEED_MIN_MPS 1300.0 /* plausible for any natural water */
#define SB_PROFILE_SPEED_MAX_MPS 1800.0
#define SB_PROFILE_T_MIN_DEGC -5.0      /* liquid natural water */
#define SB_PROFILE_T_MAX_DEGC 50.0
#define SB_PROFILE_S_MAX_PSU 50.0
/* Latitude used for pressure <-> depth (and Leroy's latitude term) when
 * the caller gives none (NaN); every use of it adds a warning. */
#define SB_PROFILE_DEFAULT_LATITUDE_DEG 45.0

#define SB_PROFILE_WARNING_MAX 200

/* Something accepted but worth telling the user, e.g. a sample outside the
 * validity range of the equation that converted it. */
struct sb_profile_warning {
    int line;        /* line in the source file; 0 for the whole profile or
                        for profiles built from arrays */
    size_t index;    /* sample index (0-based); (size_t)-1 for the profile */
    double depth_m;  /* depth of the sample; NaN for the whole profile */
    char msg[SB_PROFILE_WARNING_MAX]; /* "what": no file/line prefix */
};

struct sb_profile {
    size_t n;          /* number of samples, >= SB_PROFILE_MIN_SAMPLES */
    double *depth_m;   /* positive down from the surface, strictly
                          increasing */
    double *speed_mps; /* m/s */
    char source[256];  /* file name, or "(arrays)" */
    int n_warnings;
    struct sb_profile_warning *warnings; /* n_warnings of them */

    /* Cast inputs, NULL for a depth-speed profile.  Temperature is
     * ITS-90 whatever the file gave. */
    double *pressure_dbar;    /* given or derived; NULL if never needed
                                 (depth-speed profile by depth) */
    double *temperature_degC; /* in-situ, ITS-90 */
    double *salinity_psu;
    int *line;                /* source line of each sample (NULL for
                                 arrays) */
    int equation;             /* SB_SS_* used to derive speeds; -1 when
                                 speeds were given */
    int pressure_given;       /* 1 if the file had pressure_dbar */
    int depth_given;          /* 1 if the file had depth_m */
    double latitude_rad;      /* used for conversions; NaN if none needed */
    int latitude_assumed;     /* 1 if SB_PROFILE_DEFAULT_LATITUDE_DEG */
};

/*
 * Read a profile or cast from the CSV file path.
 * equation: SB_SS_* to convert a cast, or -1 for SB_SS_DEFAULT; it must be
 *   -1 for a depth-speed file (an equation cannot apply: input error).
 * latitude_rad: station latitude in radians, used to convert pressure to
 *   depth or back (UNESCO 1983) and by Leroy's equation; NaN when unknown,
 *   in which case SB_PROFILE_DEFAULT_LATITUDE_DEG is used where needed and a
 *   warning says so.  A finite value outside [-pi/2, pi/2] is an input
 *   error.
 * On success returns SB_OK and *out (free with sb_profile_free); samples
 * outside the equation's validity range are kept and listed as warnings.
 * Errors: SB_EIO (unreadable file), SB_EINPUT with err = FILE:LINE:COL and
 * "what is wrong (what was expected)" for every defect of the file (bad
 * header, ragged row, unparsable or non-finite number, missing value,
 * value out of physical bounds, non-increasing depth, gap, too few
 * samples), SB_ENOMEM.  *out is NULL on error.
 */
int sb_profile_load(const char *path, int equation, double latitude_rad,
                    struct sb_profile **out, struct sb_error *err);

/*
 * A depth-speed profile from arrays (copied).  Same checks as the loader
 * (finite, depth >= 0 and <= SB_PROFILE_MAX_DEPTH_M, strictly increasing,
 * no gap, plausible speeds, n >= SB_PROFILE_MIN_SAMPLES); errors carry no
 * file and name the 1-based sample.  Returns SB_OK, SB_EINPUT or
 * SB_ENOMEM; *out is NULL on error.
 */
int sb_profile_from_pairs(const double *depth_m, const double *speed_mps,
                          size_t n, struct sb_profile **out,
                          struct sb_error *err);

/* Free a profile (NULL is fine). */
void sb_profile_free(struct sb_profile *p);

/* Format warning i as "FILE:LINE: msg" (or "FILE: msg" without a line,
 * "msg" without a file) into buf.  Returns buf. */
const char *sb_profile_warning_format(const struct sb_profile *p, int i,
                                      char *buf, size_t n);

#ifdef __cplusplus
}
#endif

#endif
