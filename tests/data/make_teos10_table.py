#!/usr/bin/env python3
"""Write tests/data/teos10_sound_speed.csv: TEOS-10 sound speed on a grid of
practical salinity, in-situ ITS-90 temperature and sea pressure, the
independent reference against which tests/test_soundspeed.c checks every
sound-speed equation of swathbudget.

Reference: IOC, SCOR & IAPSO (2010), The international thermodynamic equation
of seawater - 2010 (TEOS-10), Manuals and Guides 56; computed with the Gibbs
SeaWater (GSW) library as packaged by Debian (python3-gsw):
    SA = gsw.SA_from_SP(SP, p, lon, lat)   (Absolute Salinity, g/kg)
    CT = gsw.CT_from_t(SA, t, p)           (Conservative Temperature)
    c  = gsw.sound_speed(SA, CT, p)        (75-term expression, m/s)
    z  = gsw.z_from_p(p, lat)              (height, m; depth = -z)
Before writing, the script asserts gsw_sound_speed's documented example
(GSW documentation, gsw_sound_speed, TEOS-10 v3.05, 75-term):
    SA = 34.7118 g/kg, CT = 28.7856 degC, p = 10 dbar -> 1542.426412 m/s.

Only rows of the "oceanographic range" are written: water above its
freezing point, inside the "oceanographic funnel" of McDougall, Jackett,
Wright & Feistel (2003) where the 75-term expression was fitted (bounds of
GSW's gsw_infunnel, written here from memory of that function, which this
gsw release does not export), and inside a coarse envelope of the
temperatures and salinities found in the world ocean at each pressure
(ocean_envelope below; common oceanographic knowledge, not from a single
source: warm water only near the surface, the Red Sea's 21-22 degC and
40.6 psu to about 2000 dbar, the Mediterranean's 13-14 degC and 38.5-38.8 psu
to about 5000 dbar, abyssal water below 3 degC and, in the
trenches below 6000 dbar, no colder than 1 degC in situ).  The equations themselves
are compared only where they are valid: tests/test_soundspeed.c applies
each equation's own validity range.

Run:  /usr/bin/python3 tests/data/make_teos10_table.py > tests/data/teos10_sound_speed.csv
"""
import sys

import gsw
import numpy as np

# Documented check value (GSW documentation of gsw_sound_speed, v3.05).
_check = float(gsw.sound_speed(34.7118, 28.7856, 10.0))
assert abs(_check - 1542.426412) < 5e-7, _check

# Three open-ocean stations (lon, lat in degrees): the Absolute Salinity
# anomaly of SA_from_SP depends on place, and latitude enters depth and the
# latitude term of Leroy et al. (2008).
STATIONS = [(-30.0, 30.0), (150.0, -50.0), (-20.0, 60.0)]
SP = [0.0, 10.0, 20.0, 27.0, 30.0, 34.0, 35.0, 36.0, 38.0, 40.0]
T90 = [-1.5, 0.0, 1.0, 2.0, 4.0, 7.0, 10.0, 13.0, 16.0, 20.0, 24.0, 28.0, 32.0]
P = [0.0, 10.0, 50.0, 100.0, 200.0, 500.0, 1000.0, 1500.0, 2000.0, 3000.0,
     4000.0, 5000.0, 6000.0, 7000.0, 8000.0]


def ocean_envelope(sp, t, p):
    """Coarse (S, t) envelope of real ocean water at sea pressure p."""
    if p <= 200.0:       # surface layer: estuaries to hypersaline lagoons
        return t <= 32.0
    if p <= 500.0:
        return t <= 25.0 and 30.0 <= sp <= 41.0
    if p <= 2000.0:      # Red Sea deep water is the warmest
        return t <= 22.0 and 30.0 <= sp <= 41.0
    if p <= 5000.0:      # Mediterranean deep water is the warmest
        return -1.0 <= t <= 14.0 and 34.0 <= sp <= 39.0
    if p <= 6000.0:      # abyssal plains, Antarctic bottom water
        return -1.0 <= t <= 3.0 and 34.0 <= sp <= 35.5
    # trenches: adiabatic compression warms the water to 1-2.5 degC in situ
    return 1.0 <= t <= 3.0 and 34.0 <= sp <= 35.5


def in_funnel(sa, ct, p):
    """McDougall et al. (2003) oceanographic funnel (gsw_infunnel bounds)."""
    if p > 8000.0 or sa < 0.0 or sa > 42.0:
        return False
    if p < 500.0 and ct < gsw.CT_freezing(sa, p, 0.0):
        return False
    if 500.0 <= p < 6500.0:
        if sa < p * 5e-3 - 2.5:
            return False
        if ct > 31.66666666666667 - p * 3.333333333333334e-3:
            return False
    if p >= 6500.0:
        if sa < 30.0 or ct > 10.0:
            return False
    return True


def main(out):
    out.write("# TEOS-10 sound speed reference table, made by "
              "tests/data/make_teos10_table.py\n")
    out.write("# gsw (python3-gsw) %s: sound_speed(SA_from_SP, CT_from_t, p), "
              "75-term; depth = -z_from_p(p, lat)\n" % gsw.__version__)
    out.write("lon_deg,lat_deg,sp_psu,t90_degC,p_dbar,depth_m,sa_g_kg,"
              "ct_degC,c_teos10_m_s\n")
    n = 0
    for lon, lat in STATIONS:
        for sp in SP:
            for t in T90:
                for p in P:
                    sa = float(gsw.SA_from_SP(sp, p, lon, lat))
                    if t < float(gsw.t_freezing(sa, p, 0.0)):
                        continue
                    if not ocean_envelope(sp, t, p):
                        continue
                    ct = float(gsw.CT_from_t(sa, t, p))
                    if not in_funnel(sa, ct, p):
                        continue
                    c = float(gsw.sound_speed(sa, ct, p))
                    depth = -float(gsw.z_from_p(p, lat))
                    if not np.isfinite(c) or not np.isfinite(depth):
                        continue
                    out.write("%g,%g,%g,%g,%g,%.4f,%.6f,%.6f,%.6f\n" % (
                        lon, lat, sp, t, p, depth, sa, ct, c))
                    n += 1
    sys.stderr.write("%d rows\n" % n)


if __name__ == "__main__":
    main(sys.stdout)
