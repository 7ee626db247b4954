#!/usr/bin/python3
"""Generate testdata/sky_astropy.json: reference sky positions and night events.

Run with Debian's interpreter and python3-astropy (offline):

    /usr/bin/python3 testdata/gen/gen_sky_astropy.py            # from the repo root

Writes testdata/sky_astropy.json (path relative to this script). The output is
deterministic apart from the "generated" date in the header.

Two parts:

cases  - random (site, instant, ICRS target) triples 1950-2100: airless
         topocentric alt/az of the target, local apparent sidereal time,
         Sun and Moon altitudes (centres, airless, topocentric), the Moon's
         illuminated fraction, and the Moon-target separation.
nights - random (site, local date, IANA zone) nights: sunset/sunrise,
         civil/nautical/astronomical dusk and dawn, moonrise/moonset between
         local clock noon of DATE and of DATE+1, found on a 2-minute grid and
         refined by bisection; the Moon's illuminated fraction at local
         midnight.

See astropy_setup.py for the offline and UT1/polar-motion/pre-1960 settings.
"""

import datetime
import os
import sys
from zoneinfo import ZoneInfo

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))

import astropy_setup as S  # noqa: E402  (configures astropy on import)
from regions import REGIONS, random_site  # noqa: E402

import astropy.units as u  # noqa: E402
from astropy.coordinates import AltAz, EarthLocation, SkyCoord, get_body  # noqa: E402
from astropy.time import Time  # noqa: E402

SEED = 20260512
N_CASES = 300
N_NIGHTS = 72
OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "sky_astropy.json")

EPOCH = S.UNIX_EPOCH
T_MIN = np.datetime64("1950-01-01T00:00:00", "us")
T_MAX = np.datetime64("2100-12-31T00:00:00", "us")

# Meeus ch. 55: Moon's semidiameter s = asin(k a / Delta) with k = 0.272481
# and a = 6378.14 km (from memory): the Moon's radius 1737.9 km.
MOON_RADIUS_KM = 0.272481 * 6378.14
# Standard horizontal refraction, 34' (Meeus ch. 15, common practice).
HORIZON_REFRACTION_DEG = 34.0 / 60.0

# Sunrise/sunset: the Sun's centre at -0 deg 50' (upper limb on the horizon
# with 34' of refraction; Meeus ch. 15, h0 = -0.8333 deg).
SUNRISE_ALT_DEG = -50.0 / 60.0

SUN_EVENTS = [  # name, Sun-centre altitude (deg, airless), direction
    ("sunset", SUNRISE_ALT_DEG, -1),
    ("civil_dusk", -6.0, -1),
    ("nautical_dusk", -12.0, -1),
    ("astronomical_dusk", -18.0, -1),
    ("astronomical_dawn", -18.0, +1),
    ("nautical_dawn", -12.0, +1),
    ("civil_dawn", -6.0, +1),
    ("sunrise", SUNRISE_ALT_DEG, +1),
]
MOON_EVENTS = [("moonrise", +1), ("moonset", -1)]
GEOCENTRE = EarthLocation.from_geocentric(0.0, 0.0, 0.0, unit=u.m)


unix_jd_pair = S.unix_jd_pair


def times(t64, location=None):
    """Astropy Time (TT scale, UT1 = UT) for UTC instants given as datetime64[us]."""
    return S.make_time(t64, location=location)


def leap_day(t64):
    """True where ERFA's UTC day is not 86400 s long (leap second or 1960s step)."""
    tu = Time(t64, scale="utc")
    j1, j2 = unix_jd_pair(t64)
    return np.abs((tu.jd1 - j1) + (tu.jd2 - j2)) * 86400.0 > 1e-6


def rfc(t64):
    s = np.datetime_as_string(t64, unit="us")
    return str(s) + "Z"


def moon_illuminated(t):
    """Moon's illuminated fraction, geocentric: Meeus (48.1)-(48.3).

    psi = geocentric elongation of the Moon from the Sun (angular separation
    of astropy's geocentric apparent GCRS Sun and Moon), phase angle
    i = atan2(R sin psi, Delta - R cos psi) with R the Earth-Sun and Delta the
    Earth-Moon distance (48.3), k = (1 + cos i) / 2 (48.1).
    """
    # get_body falls back on t.location when no location is given: name the
    # geocentre explicitly (a topocentric phase angle differs by up to 0.01).
    sun = get_body("sun", t, GEOCENTRE)
    moon = get_body("moon", t, GEOCENTRE)
    psi = sun.separation(moon).rad
    R = sun.distance.to_value(u.km)
    D = moon.distance.to_value(u.km)
    i = np.arctan2(R * np.sin(psi), D - R * np.cos(psi))
    return (1.0 + np.cos(i)) / 2.0


def random_instants(rng, n):
    lo = int((T_MIN - EPOCH).astype(np.int64))
    hi = int((T_MAX - EPOCH).astype(np.int64))
    out = []
    while len(out) < n:
        t64 = EPOCH + np.timedelta64(int(rng.integers(lo, hi)), "us")
        if leap_day(np.array([t64]))[0]:
            continue  # avoid UTC days that are not 86400 s long (see header)
        out.append(t64)
    return np.array(out)


def random_targets(rng, n):
    ra = rng.uniform(0.0, 360.0, n)
    dec = np.degrees(np.arcsin(rng.uniform(-1.0, 1.0, n)))
    has_pm = rng.uniform(size=n) < 0.35
    pmra = np.where(has_pm, rng.uniform(-1500.0, 1500.0, n), 0.0)
    pmdec = np.where(has_pm, rng.uniform(-1500.0, 1500.0, n), 0.0)
    return np.round(ra, 7), np.round(dec, 7), np.round(pmra, 3), np.round(pmdec, 3)


def sky_cases(rng):
    sites = [random_site(rng) for _ in range(N_CASES)]
    t64 = random_instants(rng, N_CASES)
    ra, dec, pmra, pmdec = random_targets(rng, N_CASES)
    lat = np.array([s["lat_deg"] for s in sites])
    lon = np.array([s["lon_east_deg"] for s in sites])
    elev = np.array([s["elev_m"] for s in sites])
    loc = EarthLocation.from_geodetic(lon * u.deg, lat * u.deg, elev * u.m)
    t, dT = times(t64, location=loc)

    # Catalogue place at J2000.0 (TT) moved to the instant by astropy's space
    # motion (ERFA pmsafe; no parallax, no radial velocity given).
    star = SkyCoord(ra=ra * u.deg, dec=dec * u.deg, pm_ra_cosdec=pmra * u.mas / u.yr,
                    pm_dec=pmdec * u.mas / u.yr, frame="icrs", obstime=Time("J2000", scale="tt"))
    moved = star.apply_space_motion(new_obstime=t)
    star_now = SkyCoord(ra=moved.ra, dec=moved.dec, frame="icrs")

    frame = AltAz(obstime=t, location=loc, pressure=0 * u.hPa)
    aa = star_now.transform_to(frame)
    sun_aa = get_body("sun", t, loc).transform_to(frame)
    moon_aa = get_body("moon", t, loc).transform_to(frame)
    sep = aa.separation(moon_aa).deg
    lst = t.sidereal_time("apparent", longitude=loc.lon).hour
    k = moon_illuminated(t)
    tt = t.tt
    tu1, tu2 = unix_jd_pair(t64)

    cases = []
    for i in range(N_CASES):
        s = sites[i]
        cases.append({
            "name": f"sky-{i:03d}-{s['continent'].replace(' ', '')}",
            "continent": s["continent"],
            "lat_deg": s["lat_deg"], "lon_east_deg": s["lon_east_deg"], "elev_m": s["elev_m"],
            "ra_deg": float(ra[i]), "dec_deg": float(dec[i]),
            "pmra_masyr": float(pmra[i]), "pmdec_masyr": float(pmdec[i]),
            "utc": rfc(t64[i]),
            "delta_t_s": None if np.isnan(dT[i]) else float(dT[i]),
            "jd_utc": S.jd_pair(tu1[i], tu2[i]),
            "jd_tt": S.jd_pair(tt.jd1[i], tt.jd2[i]),
            "alt_deg": float(aa.alt.deg[i]),
            "az_deg": float(aa.az.deg[i]),
            "lst_hours": float(lst[i]),
            "sun_alt_deg": float(sun_aa.alt.deg[i]),
            "moon_alt_deg": float(moon_aa.alt.deg[i]),
            "moon_illuminated": float(k[i]),
            "moon_sep_deg": float(sep[i]),
        })
    return cases


def night_sampler(rng):
    """Yield (site, local date) pairs: 12 high-latitude summer nights, 8
    high-latitude winter nights, the rest anywhere, any date 1950-2100."""
    high = [r for r in REGIONS if min(abs(r[2][0]), abs(r[2][1])) >= 58.0]
    for i in range(N_NIGHTS):
        if i < 20:
            r = high[rng.integers(len(high))]
            site = random_site(rng, r)
            north = site["lat_deg"] > 0
            summer = i < 12
            mid_month = 6 if north == summer else 12
            year = int(rng.integers(1950, 2100))
            day0 = datetime.date(year, mid_month, 21)
            d = day0 + datetime.timedelta(days=int(rng.integers(-25, 26)))
        else:
            site = random_site(rng)
            d = datetime.date(1950, 1, 1) + datetime.timedelta(days=int(rng.integers(0, 55150)))
        yield site, d


def local_noon_utc64(d, zone):
    noon = datetime.datetime(d.year, d.month, d.day, 12, 0, tzinfo=ZoneInfo(zone))
    return np.datetime64(noon.astimezone(datetime.timezone.utc).replace(tzinfo=None), "us")


def local_midnight_utc64(d, zone):
    d1 = d + datetime.timedelta(days=1)
    mid = datetime.datetime(d1.year, d1.month, d1.day, 0, 0, tzinfo=ZoneInfo(zone))
    return np.datetime64(mid.astimezone(datetime.timezone.utc).replace(tzinfo=None), "us")


class NightCurves:
    """Altitude functions over one night for one site (vectorised in time)."""

    def __init__(self, site, start64):
        self.loc = EarthLocation.from_geodetic(site["lon_east_deg"] * u.deg, site["lat_deg"] * u.deg,
                                               site["elev_m"] * u.m)
        self.start64 = start64

    def at(self, sec):
        """Sun-centre altitude and Moon upper-limb function at seconds after start.

        Returns (sun_alt_deg, moon_g_deg) with moon_g = topocentric airless
        centre altitude + topocentric semidiameter + 34' (zero at rise/set).
        """
        t64 = self.start64 + np.round(np.asarray(sec) * 1e6).astype(np.int64).astype("timedelta64[us]")
        t, _ = times(t64, location=self.loc)
        frame = AltAz(obstime=t, location=self.loc, pressure=0 * u.hPa)
        sun = get_body("sun", t, self.loc).transform_to(frame)
        moon = get_body("moon", t, self.loc).transform_to(frame)
        sd = np.degrees(np.arcsin(MOON_RADIUS_KM / moon.distance.to_value(u.km)))
        return sun.alt.deg, moon.alt.deg + sd + HORIZON_REFRACTION_DEG


def find_events(curves, length_s, step_s=120.0, iterations=36):
    """Grid + bisection for every Sun threshold and the Moon's rise/set.

    Returns {name: [(seconds, rate_deg_per_min), ...]} listing every crossing
    in the event's direction (ascending for dawn/rise, descending for
    dusk/set) within [0, length_s], plus the Sun's altitude extremes.
    """
    n = int(np.ceil(length_s / step_s))
    grid = np.linspace(0.0, length_s, n + 1)
    sun, moon = curves.at(grid)
    funcs = {}
    for name, h0, sign in SUN_EVENTS:
        funcs[name] = (sun - h0, sign, 0, h0)
    for name, sign in MOON_EVENTS:
        funcs[name] = (moon, sign, 1, 0.0)
    brackets = []  # (name, a, b, rate)
    for name, (f, sign, which, h0) in funcs.items():
        idx = np.nonzero((np.sign(f[:-1]) != np.sign(f[1:])) & (np.sign(f[1:] - f[:-1]) == sign))[0]
        for j in idx:
            rate = (f[j + 1] - f[j]) / ((grid[j + 1] - grid[j]) / 60.0)
            brackets.append([name, grid[j], grid[j + 1], f[j], rate])
    if brackets:
        a = np.array([b[1] for b in brackets])
        b = np.array([b[2] for b in brackets])
        fa = np.array([b[3] for b in brackets])
        for _ in range(iterations):
            m = 0.5 * (a + b)
            s_m, g_m = curves.at(m)
            fm = np.empty_like(m)
            for k, br in enumerate(brackets):
                name = br[0]
                _, _, which, h0 = funcs[name]
                fm[k] = (s_m[k] - h0) if which == 0 else g_m[k]
            left = np.sign(fm) == np.sign(fa)
            a = np.where(left, m, a)
            fa = np.where(left, fm, fa)
            b = np.where(left, b, m)
        roots = 0.5 * (a + b)
    out = {name: [] for name in funcs}
    for k, br in enumerate(brackets):
        out[br[0]].append((float(roots[k]), float(br[4])))
    for name in out:
        out[name].sort()
    return out, float(sun.min()), float(sun.max()), float(grid[int(np.argmin(sun))])


DUSK_NAMES = {"sunset", "civil_dusk", "nautical_dusk", "astronomical_dusk"}
DAWN_NAMES = {"astronomical_dawn", "nautical_dawn", "civil_dawn", "sunrise"}


def choose(name, crossings, t_low):
    """The crossing that is the night's event, or None.

    Sun: a dusk event is the LAST setting crossing before the Sun's lowest
    point in the window (on the 2-minute grid), a dawn event the FIRST rising
    crossing after it; so a brief afternoon sunrise in polar winter (a zone's
    noon before the Sun's) is not taken for a dawn. Moon: the first rise and
    the first set in the window.
    """
    if name in DUSK_NAMES:
        before = [c for c in crossings if c[0] <= t_low]
        return before[-1] if before else None
    if name in DAWN_NAMES:
        after = [c for c in crossings if c[0] >= t_low]
        return after[0] if after else None
    return crossings[0] if crossings else None


def nights(rng):
    result = []
    for i, (site, d) in enumerate(night_sampler(rng)):
        zone = site["zone"]
        start = local_noon_utc64(d, zone)
        end = local_noon_utc64(d + datetime.timedelta(days=1), zone)
        length = float((end - start).astype(np.int64)) / 1e6
        curves = NightCurves(site, start)
        crossings, smin, smax, t_low = find_events(curves, length)
        events, counts, rates, all_cross = {}, {}, {}, {}
        for name in [e[0] for e in SUN_EVENTS] + [e[0] for e in MOON_EVENTS]:
            lst = crossings[name]
            counts[name] = len(lst)
            pick = choose(name, lst, t_low)
            if pick is not None:
                sec, rate = pick
                t64 = start + np.timedelta64(int(round(sec * 1e6)), "us")
                events[name] = rfc(t64)
                rates[name] = round(rate, 6)
                if len(lst) > 1:
                    all_cross[name] = [rfc(start + np.timedelta64(int(round(s * 1e6)), "us")) for s, _ in lst]
            else:
                events[name] = None
                rates[name] = None
        mid = local_midnight_utc64(d, zone)
        tm, _ = times(np.array([mid]))
        result.append({
            "name": f"night-{i:02d}-{site['continent'].replace(' ', '')}-{d.isoformat()}",
            "continent": site["continent"],
            "lat_deg": site["lat_deg"], "lon_east_deg": site["lon_east_deg"], "elev_m": site["elev_m"],
            "zone": zone,
            "date": d.isoformat(),
            "window_start": rfc(start),
            "window_end": rfc(end),
            "local_midnight": rfc(mid),
            **events,
            "moon_illuminated": float(moon_illuminated(tm)[0]),
            "crossings": counts,
            "all_crossings": all_cross,
            "rate_deg_per_min": rates,
            "sun_alt_min_deg": round(smin, 4),
            "sun_alt_max_deg": round(smax, 4),
            "sun_low": rfc(start + np.timedelta64(int(round(t_low * 1e6)), "us")),
        })
        print(f"night {i + 1}/{N_NIGHTS} {result[-1]['name']}", file=sys.stderr)
    return result


def main():
    rng = np.random.default_rng(SEED)
    cases = sky_cases(rng)
    continents = sorted({c["continent"] for c in cases})
    assert len(continents) == 7, continents
    night_list = nights(rng)
    head = S.header("testdata/gen/gen_sky_astropy.py", SEED, {
        "tzdata": S.tzdata_version() + " (system /usr/share/zoneinfo, Python zoneinfo)",
        "description": (
            "phasecast ephem reference: random sky cases and night events from astropy. "
            "Angles in degrees, azimuth from north through east, longitude east-positive."
        ),
        "cases_fields": {
            "utc": "the instant, RFC 3339 UTC; instants on UTC days not 86400 s long "
                   "(leap-second and 1960s step days) are not drawn, so jd_utc is also astropy's UTC JD",
            "jd_utc": "UTC Julian date of utc (86400-s days)",
            "jd_tt": "astropy Time.tt (pre-1960: utc + delta_t_s)",
            "delta_t_s": "Delta T used before 1960 (Espenak & Meeus 2006), null from 1960 on",
            "ra_deg,dec_deg,pmra_masyr,pmdec_masyr": "ICRS at J2000.0 (TT); pmra includes cos(dec); "
                   "moved to the instant with SkyCoord.apply_space_motion (ERFA pmsafe, no parallax)",
            "alt_deg,az_deg": "AltAz(pressure=0): airless topocentric apparent, az from north through east "
                   "(astropy: ICRS->observed via ERFA apco/atciqz/atioq; includes light deflection "
                   "and diurnal aberration)",
            "lst_hours": "Time.sidereal_time('apparent', longitude) (IAU2006A), hours",
            "sun_alt_deg,moon_alt_deg": "get_body(body, t, location) -> AltAz(pressure=0): centres, "
                   "airless, topocentric",
            "moon_illuminated": "geocentric: Meeus (48.2) elongation from astropy's geocentric Sun and "
                   "Moon, phase angle i = atan2(R sin psi, Delta - R cos psi) (48.3), k = (1+cos i)/2 (48.1)",
            "moon_sep_deg": "angular separation of the target and the topocentric Moon, both in the airless AltAz frame",
        },
        "nights_fields": {
            "window": "local clock noon of date to local clock noon of date+1 in zone (Python zoneinfo), UTC",
            "sun events": "Sun centre, airless, topocentric, at -50' = -0.8333 (sunset/sunrise), -6, -12, -18 deg",
            "moon events": "upper limb at the refracted horizon: topocentric airless centre altitude = "
                   "-(s + 34'), s = asin(k a / d), k a = 0.272481 x 6378.14 km (Meeus ch. 55, from memory), "
                   "d topocentric distance",
            "method": "2-minute grid of astropy altitudes, then 36 bisection steps per sign change",
            "choice": "Sun: a dusk event (sunset, civil/nautical/astronomical dusk) is the LAST setting "
                   "crossing of its level before the Sun's lowest point in the window (2-minute grid), a dawn "
                   "event the FIRST rising crossing after it, null if none (so a brief afternoon sunrise in "
                   "polar winter, when the zone's noon comes before the Sun's, is not a dawn). Moon: first rise and first set "
                   "in the window. crossings counts all crossings in the event's direction, all_crossings lists "
                   "them where there is more than one; sun_low is the Sun's lowest grid point",
            "rate_deg_per_min": "altitude rate at the crossing from the grid (diagnostic: small = grazing)",
            "moon_illuminated": "at local_midnight (00:00 local of date+1), as for cases",
        },
    })
    S.write_json(OUT, {"header": head, "cases": cases, "nights": night_list})
    print(f"wrote {len(cases)} cases and {len(night_list)} nights to {os.path.normpath(OUT)}", file=sys.stderr)


if __name__ == "__main__":
    main()
