"""Write testdata/pm_astropy.json: stars with catalogue coordinates at one
Julian epoch (J2016.0, J2000.0, J1991.25) moved by their proper motion to
other epochs with astropy's SkyCoord.apply_space_motion.

Each case is an ICRS position (ra, dec) with proper motion (pm_ra_cosdec,
pm_dec in mas/yr) at epoch `epoch_jy`, and its ICRS position at `to_jy`
(Julian years, TT). phasecast holds no parallax or radial velocity and moves
a star on a straight line in space with its tangential velocity. astropy
(ERFA eraStarpm) needs a distance for that motion to be physical: without
one it takes an enormous distance and caps the superluminal speed that a
large proper motion then implies. So each star is given a distance of 10 pc
(a nearby white dwarf's) and zero radial velocity: its speed is then at most
240 km/s, ERFA's relativistic terms stay below 0.1 mas, and astropy's
motion is the same straight line. At 100 pc the implied 2,400 km/s already
bring ERFA's relativistic factor to 3e-5 of the motion (10 mas here).

Run with Debian's interpreter (see README.md here):
    /usr/bin/python3 -B testdata/gen/gen_pm_astropy.py
"""

import numpy as np

import astropy_setup as setup  # offline IERS, shared header
import astropy.units as u
from astropy.coordinates import SkyCoord
from astropy.time import Time

SEED = 20261204
rng = np.random.default_rng(SEED)

cases = []
epochs = [2016.0, 2000.0, 1991.25]
for i in range(240):
    epoch = epochs[i % len(epochs)]
    ra = rng.uniform(0, 360)
    # uniform on the sphere, plus a few near the poles
    dec = np.degrees(np.arcsin(rng.uniform(-1, 1))) if i % 20 else rng.choice([-1, 1]) * rng.uniform(88.0, 89.9)
    # fast white dwarfs and nearby stars: up to 5"/yr in each coordinate
    scale = [50, 500, 5000][i % 3]
    pmra = rng.uniform(-scale, scale)
    pmdec = rng.uniform(-scale, scale)
    to = rng.uniform(1950, 2080)
    c = SkyCoord(ra=ra * u.deg, dec=dec * u.deg, pm_ra_cosdec=pmra * u.mas / u.yr, pm_dec=pmdec * u.mas / u.yr,
                 distance=10 * u.pc, radial_velocity=0 * u.km / u.s,
                 frame="icrs", obstime=Time(epoch, format="jyear", scale="tt"))
    m = c.apply_space_motion(new_obstime=Time(to, format="jyear", scale="tt"))
    cases.append({
        "ra_deg": ra, "dec_deg": dec, "pm_ra_masyr": pmra, "pm_dec_masyr": pmdec,
        "epoch_jy": epoch, "to_jy": to,
        "want_ra_deg": float(m.ra.deg), "want_dec_deg": float(m.dec.deg),
    })

out = {
    "header": setup.header("testdata/gen/gen_pm_astropy.py", SEED, {
        "method": "SkyCoord(..., obstime=Time(epoch_jy, format='jyear', scale='tt')).apply_space_motion(new_obstime=...)",
        "distance": "10 pc for every star (parallax 100 mas): ERFA's straight-line motion is then physical and its speeds (at most 340 km/s) leave relativistic terms below 0.1 mas",
        "radial_velocity": "0 km/s",
    }),
    "cases": cases,
}
setup.write_json("testdata/pm_astropy.json", out)
print("wrote testdata/pm_astropy.json:", len(cases), "cases")
