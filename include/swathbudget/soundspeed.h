/*
 * swathbudget — sound speed in sea water from temperature, salinity and
 * pressure or depth: a table of the published empirical equations, each
 * with its own temperature scale, vertical input and range of validity, and
 * the UNESCO 1983 conversion between sea pressure and depth.
 *
 * Temperature scales.  Every public entry point that takes an equation
 * number expects ITS-90 temperature; an equation fitted on IPTS-68 gets
 * t68 = 1.00024 * t90 (Saunders 1990, WOCE Newsletter 10; the linear form
 * recommended by Jones & Harris 1992 for the oceanographic range).  The
 * "raw" functions further down take the scale their publication used and
 * say so in the parameter name (t68_degC, t90_degC).
 *
 * Pressure is sea pressure (absolute minus one standard atmosphere) in
 * decibar, the unit of the oceanographic literature (1 dbar = 10 kPa); the
 * names of all pressure arguments end in _dbar.  Depth is metres below the
 * sea surface, positive down.  Salinity is Practical Salinity (PSS-78,
 * dimensionless, written "psu" in headers).  Speeds are m/s.
 */
#ifndef SWATHBUDGET_SOUNDSPEED_H
#define SWATHBUDGET_SOUNDSPEED_H

#include <stddef.h>

#include "swathbudget/error.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The equations, in table order.  Numbers are stable; look them up by name
 * with sb_soundspeed_find(). */
enum sb_ss_equation {
    SB_SS_CHEN_MILLERO = 0,   /* "chen-millero": UNESCO 1983, IPTS-68 */
    SB_SS_CHEN_MILLERO_ITS90, /* "chen-millero-its90": Wong & Zhu 1995 */
    SB_SS_DEL_GROSSO,         /* "del-grosso": Del Grosso 1974, IPTS-68 */
    SB_SS_DEL_GROSSO_ITS90,   /* "del-grosso-its90": Wong & Zhu 1995 */
    SB_SS_MACKENZIE,          /* "mackenzie": Mackenzie 1981 nine-term */
    SB_SS_MEDWIN,             /* "medwin": Medwin 1975 */
    SB_SS_COPPENS,            /* "coppens": Coppens 1981 */
    SB_SS_LEROY,              /* "leroy": Leroy, Robinson & Goldsmith 2008 */
    SB_SS_COUNT
};

/* Used when a cast is loaded with equation -1: the UNESCO 1983 equation
 * (the international standard of its time, valid 0-40 degC, 0-40 psu,
 * 0-10000 dbar, i.e. the whole ocean), fed with ITS-90 input converted to
 * IPTS-68. */
#define SB_SS_DEFAULT SB_SS_CHEN_MILLERO

enum sb_tscale { SB_TSCALE_IPTS68 = 0, SB_TSCALE_ITS90 = 1 };

/* Which vertical coordinate an equation was fitted against. */
enum sb_ss_vertical { SB_SS_BY_PRESSURE = 0, SB_SS_BY_DEPTH = 1 };

/* One row of the equation table.  Ranges are inclusive and in the
 * equation's own terms: temperature on its own scale, the vertical range
 * in dbar (SB_SS_BY_PRESSURE) or metres (SB_SS_BY_DEPTH). */
struct sb_soundspeed_info {
    const char *name;      /* plain lookup name, e.g. "del-grosso" */
    const char *title;     /* short human title */
    const char *citation;  /* author, year, journal */
    enum sb_tscale tscale;
    enum sb_ss_vertical vertical;
    int uses_latitude;     /* 1 if the equation itself has a latitude term */
    double t_min_degC, t_max_degC;
    double s_min_psu, s_max_psu;
    double v_min, v_max;   /* dbar or m, see vertical */
};

/* The table row of equation eq, or NULL when eq is not in [0, SB_SS_COUNT). */
const struct sb_soundspeed_info *sb_soundspeed_info(int eq);

/* The equation number of a name (exact, case-sensitive), or -1. */
int sb_soundspeed_find(const char *name);

/* "chen-millero, chen-millero-its90, ..." into buf (n bytes; truncated but
 * terminated if short; 256 bytes is enough).  Returns buf. */
const char *sb_soundspeed_names(char *buf, size_t n);

/*
 * Sound speed (m/s) by equation eq for salinity s_psu, ITS-90 in-situ
 * temperature t90_degC, and both vertical coordinates of the sample: sea
 * pressure p_dbar and depth depth_m (the caller converts one into the other
 * with the functions below, so that each equation gets the input it was
 * fitted on).  latitude_rad is used only by equations with a latitude term
 * (uses_latitude).  No range check: see sb_soundspeed_check().  Returns NaN
 * for an eq outside the table.  Allocation-free.
 */
double sb_soundspeed_eval(int eq, double s_psu, double t90_degC, double p_dbar,
                          double depth_m, double latitude_rad);

/* Bits of sb_soundspeed_check()'s result. */
#define SB_SS_OUT_TEMPERATURE 1u
#define SB_SS_OUT_SALINITY 2u
#define SB_SS_OUT_VERTICAL 4u

/*
 * Which inputs of a sample lie outside equation eq's range of validity
 * (same inputs as sb_soundspeed_eval; temperature is compared on the
 * equation's own scale).  Returns a mask of SB_SS_OUT_* (0: all inside).
 * If msg is not NULL and the mask is not 0, a description such as
 *     "temperature 31.50 degC outside 0 to 30 degC; ..."
 * is written into msg (n bytes, truncated but terminated if short).
 */
unsigned sb_soundspeed_check(int eq, double s_psu, double t90_degC,
                             double p_dbar, double depth_m, char *msg,
                             size_t n);

/* ---- temperature scales ------------------------------------------------ */

/* t68 = 1.00024 t90 (Saunders 1990; Jones & Harris 1992), degC. */
double sb_t68_from_t90(double t90_degC);
double sb_t90_from_t68(double t68_degC);

/* ---- pressure and depth (UNESCO 1983) --------------------------------- */

/*
 * Depth (m, positive down) of sea pressure p_dbar at latitude latitude_rad,
 * Saunders & Fofonoff (1976), Deep-Sea Res. 23, 109-111, as given in
 * Fofonoff & Millard (1983, UNESCO Tech. Pap. Mar. Sci. 44, function
 * DEPTH): a standard ocean (S = 35, T = 0 degC)
 * with gravity varying with latitude and pressure.  Check value: 10000 dbar
 * at 30 deg -> 9712.653 m.
 */
double sb_soundspeed_depth_from_pressure(double p_dbar, double latitude_rad);

/*
 * The inverse: sea pressure (dbar) at depth_m (>= 0) and latitude_rad, to
 * 1e-9 dbar.  Returns SB_OK and sets *p_dbar, SB_EINPUT for a negative or
 * non-finite depth or latitude outside [-pi/2, pi/2], SB_ENUM if the
 * iteration fails (it does not for depths up to 12000 m).  err may be NULL.
 */
int sb_soundspeed_pressure_from_depth(double depth_m, double latitude_rad,
                                      double *p_dbar, struct sb_error *err);

/* ---- the equations in their published form ---------------------------- */

/* Chen & Millero (1977), J. Acoust. Soc. Am. 62, 1129-1135, in the form of
 * Fofonoff & Millard (1983) eq. 33 (pressure given in dbar, used in bar).
 * IPTS-68.  Check value 1731.995 m/s at S = 40, T = 40, P = 10000 dbar. */
double sb_soundspeed_chen_millero(double s_psu, double t68_degC,
                                  double p_dbar);

/* The same re-fitted to ITS-90 by Wong & Zhu (1995), J. Acoust. Soc. Am.
 * 97, 1732-1736 (differs from the above by at most 0.024 m/s). */
double sb_soundspeed_chen_millero_its90(double s_psu, double t90_degC,
                                        double p_dbar);

/* Del Grosso (1974), J. Acoust. Soc. Am. 56, 1084-1091, IPTS-68; pressure
 * used in kgf/cm^2 (gauge), p_dbar / 9.80665. */
double sb_soundspeed_del_grosso(double s_psu, double t68_degC, double p_dbar);

/* Del Grosso re-fitted to ITS-90 by Wong & Zhu (1995) (differs by at most
 * 0.017 m/s). */
double sb_soundspeed_del_grosso_its90(double s_psu, double t90_degC,
                                      double p_dbar);

/* Mackenzie (1981), J. Acoust. Soc. Am. 70, 807-812, nine terms; depth in
 * m; IPTS-68.  Check value 1550.744 m/s at T = 25, S = 35, D = 1000 m. */
double sb_soundspeed_mackenzie(double s_psu, double t68_degC, double depth_m);

/* Medwin (1975), J. Acoust. Soc. Am. 58, 1318-1319; depth in m. */
double sb_soundspeed_medwin(double s_psu, double t_degC, double depth_m);

/* Coppens (1981), J. Acoust. Soc. Am. 69, 862-863; depth in m (used in km). */
double sb_soundspeed_coppens(double s_psu, double t_degC, double depth_m);

/* Leroy, Robinson & Goldsmith (2008), J. Acoust. Soc. Am. 124, 2774-2782;
 * ITS-90; depth in m; latitude term (used in degrees). */
double sb_soundspeed_leroy(double s_psu, double t90_degC, double depth_m,
                           double latitude_rad);

#ifdef __cplusplus
}
#endif

#endif
