#!/usr/bin/python3
"""Generate testdata/bary_astropy.json: reference time scales and barycentric times.

Run with Debian's interpreter and python3-astropy (offline):

    /usr/bin/python3 testdata/gen/gen_bary_astropy.py            # from the repo root

Writes testdata/bary_astropy.json (path relative to this script). The output
is deterministic apart from the "generated" date in the header.

For random (site, instant, ICRS direction) cases 1950-2100: JD on the UTC, TT
and TDB scales, BJD_TDB = TDB + Time.light_travel_time(target, 'barycentric',
location) and HJD_UTC = UTC + Time.light_travel_time(target, 'heliocentric',
location), with astropy's built-in ephemeris (ERFA epv00). See
astropy_setup.py for the offline, UT1 and pre-1960 settings.
"""

import os
import sys

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))

import astropy_setup as S  # noqa: E402  (configures astropy on import)
from regions import random_site  # noqa: E402

import astropy.units as u  # noqa: E402
from astropy.coordinates import EarthLocation, SkyCoord  # noqa: E402
from astropy.time import Time  # noqa: E402

SEED = 20260513
N_CASES = 300
OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "bary_astropy.json")

T_MIN = np.datetime64("1950-01-01T00:00:00", "us")
T_MAX = np.datetime64("2100-12-31T00:00:00", "us")


def leap_day(t64):
    """True where ERFA's UTC day is not 86400 s long (leap second or 1960s step)."""
    tu = Time(t64, scale="utc")
    j1, j2 = S.unix_jd_pair(t64)
    return np.abs((tu.jd1 - j1) + (tu.jd2 - j2)) * 86400.0 > 1e-6


def random_instants(rng, n):
    lo = int((T_MIN - S.UNIX_EPOCH).astype(np.int64))
    hi = int((T_MAX - S.UNIX_EPOCH).astype(np.int64))
    out = []
    while len(out) < n:
        t64 = S.UNIX_EPOCH + np.timedelta64(int(rng.integers(lo, hi)), "us")
        if leap_day(np.array([t64]))[0]:
            continue  # avoid UTC days that are not 86400 s long (see header)
        out.append(t64)
    return np.array(out)


def main():
    rng = np.random.default_rng(SEED)
    sites = [random_site(rng) for _ in range(N_CASES)]
    t64 = random_instants(rng, N_CASES)
    ra = np.round(rng.uniform(0.0, 360.0, N_CASES), 7)
    dec = np.round(np.degrees(np.arcsin(rng.uniform(-1.0, 1.0, N_CASES))), 7)
    lat = np.array([s["lat_deg"] for s in sites])
    lon = np.array([s["lon_east_deg"] for s in sites])
    elev = np.array([s["elev_m"] for s in sites])
    loc = EarthLocation.from_geodetic(lon * u.deg, lat * u.deg, elev * u.m)
    t, dT = S.make_time(t64, location=loc)
    target = SkyCoord(ra=ra * u.deg, dec=dec * u.deg, frame="icrs")

    tt = t.tt
    tdb = t.tdb
    bary = t.light_travel_time(target, kind="barycentric", location=loc, ephemeris="builtin")
    helio = t.light_travel_time(target, kind="heliocentric", location=loc, ephemeris="builtin")
    bjd = tdb + bary
    j1, j2 = S.unix_jd_pair(t64)
    hjd = (j1, j2 + helio.to_value(u.day))

    cases = []
    for i in range(N_CASES):
        s = sites[i]
        cases.append({
            "name": f"bary-{i:03d}-{s['continent'].replace(' ', '')}",
            "continent": s["continent"],
            "lat_deg": s["lat_deg"], "lon_east_deg": s["lon_east_deg"], "elev_m": s["elev_m"],
            "ra_deg": float(ra[i]), "dec_deg": float(dec[i]),
            "pmra_masyr": 0.0, "pmdec_masyr": 0.0,
            "utc": str(np.datetime_as_string(t64[i], unit="us")) + "Z",
            "delta_t_s": None if np.isnan(dT[i]) else float(dT[i]),
            "jd_utc": S.jd_pair(j1[i], j2[i]),
            "jd_tt": S.jd_pair(tt.jd1[i], tt.jd2[i]),
            "jd_tdb": S.jd_pair(tdb.jd1[i], tdb.jd2[i]),
            "bjd_tdb": S.jd_pair(bjd.tdb.jd1[i], bjd.tdb.jd2[i]),
            "hjd_utc": S.jd_pair(hjd[0][i], hjd[1][i]),
            "bary_delay_s": float(bary.to_value(u.s)[i]),
            "helio_delay_s": float(helio.to_value(u.s)[i]),
        })
    continents = sorted({c["continent"] for c in cases})
    assert len(continents) == 7, continents
    head = S.header("testdata/gen/gen_bary_astropy.py", SEED, {
        "description": (
            "phasecast ephem reference: time scales and barycentric/heliocentric times from astropy. "
            "Longitude east-positive; targets ICRS without proper motion."
        ),
        "cases_fields": {
            "utc": "the instant, RFC 3339 UTC; instants on UTC days not 86400 s long "
                   "(leap-second and 1960s step days) are not drawn",
            "jd_utc": "UTC Julian date of utc (86400-s days)",
            "jd_tt": "astropy Time.tt (pre-1960: utc + delta_t_s)",
            "jd_tdb": "astropy Time.tdb with the site as Time.location (ERFA dtdb, topocentric terms included)",
            "bary_delay_s": "Time.light_travel_time(target, 'barycentric', location, ephemeris='builtin'), s",
            "helio_delay_s": "Time.light_travel_time(target, 'heliocentric', location, ephemeris='builtin'), s",
            "bjd_tdb": "jd_tdb + bary_delay_s",
            "hjd_utc": "jd_utc + helio_delay_s",
            "delta_t_s": "Delta T used before 1960 (Espenak & Meeus 2006), null from 1960 on",
            "note": "light_travel_time is the Roemer delay (position . direction / c); no Shapiro delay",
        },
    })
    S.write_json(OUT, {"header": head, "cases": cases})
    print(f"wrote {len(cases)} cases to {os.path.normpath(OUT)}", file=sys.stderr)


if __name__ == "__main__":
    main()
