"""Write testdata/sheet_astropy.json: the telescope sheet's places for a
fixture night, from astropy.

The night is the README's: the invented Cerro Quilla site (27.85 S,
69.12 W, 2650 m), evening of 2026-12-01, dark hours 00:00-09:00 UTC. The
stars are the targets of planner/testdata/night_targets.csv (no proper
motion, coordinates at J2000.0) and one fast invented star with coordinates
at J2016.0 (the epoch of modern astrometric catalogues). Each case is a star
at an instant (every 20 minutes); for it:

* ICRS moved to the instant: SkyCoord.apply_space_motion (distance 10 pc,
  radial velocity 0, as gen_pm_astropy.py explains);
* apparent of date (true equator and equinox): the moved ICRS place
  transformed to TETE at the instant (geocentric);
* airless alt/az: AltAz(pressure=0) at the site;
* LST: Time.sidereal_time('apparent', longitude), hours;
* hour angle: LST - RA of date, wrapped to -12..12 h;
* parallactic angle: Meeus (14.1), tan q = sin H / (tan phi cos dec -
  sin dec cos H), from astropy's H and dec of date and the geodetic
  latitude (phasecast adds the site's diurnal aberration, <= 0.32").

Run with Debian's interpreter (see README.md here):
    /usr/bin/python3 -B testdata/gen/gen_sheet_astropy.py
"""

import numpy as np

import astropy_setup as setup  # offline IERS, shared header
import astropy.units as u
from astropy.coordinates import TETE, AltAz, EarthLocation, SkyCoord
from astropy.time import Time

SITE = {"lat_deg": -27.85, "lon_east_deg": -69.12, "elev_m": 2650.0}
STARS = [  # name, ra (deg), dec (deg), pm_ra_cosdec, pm_dec (mas/yr), epoch (Julian year)
    ("Quilla-88m", 15 * (4 + 12 / 60 + 33.9 / 3600), -(12 + 48 / 60 + 7 / 3600), 0.0, 0.0, 2000.0),
    ("Aurel-1", 15 * (8 + 12 / 60 + 40 / 3600), -(41 + 20 / 60), 0.0, 0.0, 2000.0),
    ("Fast-WD", 52.123456, -30.456789, 1850.0, -2420.0, 2016.0),
]

loc = EarthLocation.from_geodetic(SITE["lon_east_deg"] * u.deg, SITE["lat_deg"] * u.deg, SITE["elev_m"] * u.m)
t64 = np.datetime64("2026-12-02T00:00:00", "us") + np.arange(0, 9 * 3600 + 1, 1200) * np.timedelta64(1, "s")
t, _ = setup.make_time(t64, location=loc)
lst = t.sidereal_time("apparent", longitude=loc.lon).hour

cases = []
for name, ra, dec, pmra, pmdec, epoch in STARS:
    c = SkyCoord(ra=ra * u.deg, dec=dec * u.deg, pm_ra_cosdec=pmra * u.mas / u.yr, pm_dec=pmdec * u.mas / u.yr,
                 distance=10 * u.pc, radial_velocity=0 * u.km / u.s, frame="icrs",
                 obstime=Time(epoch, format="jyear", scale="tt"))
    moved = c.apply_space_motion(new_obstime=t)
    icrs = SkyCoord(ra=moved.ra, dec=moved.dec, frame="icrs")
    date = icrs.transform_to(TETE(obstime=t))
    aa = icrs.transform_to(AltAz(obstime=t, location=loc, pressure=0 * u.hPa))
    ha = (lst - date.ra.hour + 12.0) % 24.0 - 12.0
    H = np.radians(ha * 15.0)
    d = date.dec.rad
    phi = np.radians(SITE["lat_deg"])
    q = np.degrees(np.arctan2(np.sin(H), np.tan(phi) * np.cos(d) - np.sin(d) * np.cos(H)))
    for k in range(len(t64)):
        cases.append({
            "star": name, "ra_deg": ra, "dec_deg": dec, "pm_ra_masyr": pmra, "pm_dec_masyr": pmdec, "epoch_jy": epoch,
            "utc": str(np.datetime_as_string(t64[k], unit="s")) + "Z",
            "ra_icrs_deg": float(moved.ra.deg[k]), "dec_icrs_deg": float(moved.dec.deg[k]),
            "ra_date_deg": float(date.ra.deg[k]), "dec_date_deg": float(date.dec.deg[k]),
            "alt_airless_deg": float(aa.alt.deg[k]), "az_deg": float(aa.az.deg[k]),
            "lst_hours": float(lst[k]), "hour_angle_hours": float(ha[k]), "parallactic_deg": float(q[k]),
        })

out = {
    "header": setup.header("testdata/gen/gen_sheet_astropy.py", 0, {
        "site": SITE,
        "method": "apply_space_motion to the instant; TETE (apparent of date); AltAz(pressure=0); "
                  "sidereal_time('apparent'); parallactic angle by Meeus (14.1) from astropy's H and dec of date",
    }),
    "cases": cases,
}
setup.write_json("testdata/sheet_astropy.json", out)
print("wrote testdata/sheet_astropy.json:", len(cases), "cases")
