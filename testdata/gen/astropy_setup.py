"""Shared set-up for phasecast's astropy reference generators.

Imported by gen_sky_astropy.py and gen_bary_astropy.py. It makes astropy
work offline and match phasecast's stated assumptions:

* IERS: no downloads (auto_download False, auto_max_age None, degraded
  accuracy only warns).
* UT1 - UTC = 0 (set on every Time object through delta_ut1_utc).
* Polar motion zero (get_polar_motion monkeypatched to return (0, 0) in every
  module that imported it).
* Solar-system positions from astropy's built-in ephemeris (ERFA epv00 for
  the Earth and Sun, ERFA moon98 for the Moon): no JPL kernel is fetched.

Time scales before 1960 (see make_time): UTC had no defined relation to TAI,
and ERFA then takes TAI - UTC = 0, while phasecast takes TT - UT = Delta T
from Meeus' table 10.A. So that the comparison is free of either convention,
an instant before 1960-01-01 is given to astropy on the TT scale as
UT + Delta T, with Delta T from the Espenak & Meeus (2006) polynomial for
1941-1961 (from memory), and UT1 is forced equal to the UT instant.
"""

import datetime
import json
import sys
import warnings

import numpy as np

from astropy.utils import iers

iers.conf.auto_download = False
iers.conf.auto_max_age = None
iers.conf.iers_degraded_accuracy = "warn"

import astropy  # noqa: E402
import astropy.units as u  # noqa: E402
import erfa  # noqa: E402
from astropy.coordinates import solar_system_ephemeris  # noqa: E402
from astropy.time import Time  # noqa: E402

import astropy.coordinates.builtin_frames.utils as _frame_utils  # noqa: E402
import astropy.coordinates.builtin_frames.intermediate_rotation_transforms as _irt  # noqa: E402
import astropy.coordinates.erfa_astrom as _erfa_astrom  # noqa: E402


def _zero_polar_motion(time):
    """Polar motion x_p = y_p = 0 rad, as phasecast assumes."""
    shape = np.shape(getattr(time, "jd1", time))
    return np.zeros(shape), np.zeros(shape)


# Time.sidereal_time imports get_polar_motion from the utils module at call
# time; the frame transforms bound it at import: patch every binding.
for _mod in (_frame_utils, _irt, _erfa_astrom):
    _mod.get_polar_motion = _zero_polar_motion

solar_system_ephemeris.set("builtin")

# The warnings below are expected and harmless here: ERFA flags years after
# its release as "dubious" (it still applies the last TAI-UTC), before-1960
# years as "dubious" (we do not use its UTC there), and IERS tables do not
# reach the whole range (UT1-UTC and polar motion are forced to zero anyway).
warnings.filterwarnings("ignore", category=erfa.ErfaWarning)
warnings.filterwarnings("ignore", module="astropy")

JD_UTC_1960 = 2436934.5  # 1960-01-01T00:00:00 UTC, start of the TAI-UTC table
TT_MINUS_TAI = 32.184
C_KM_S = 299792.458


def delta_t_em2006(jd_ut):
    """Delta T = TT - UT in seconds for 1941-1961.

    Espenak & Meeus (2006), "Five Millennium Canon of Solar Eclipses",
    polynomial for 1941-1961 (from memory):
    Delta T = 29.07 + 0.407 u - u^2/233 + u^3/2547, u = y - 1950,
    with y the decimal year (here 2000 + (JD - 2451545)/365.25).
    """
    y = 2000.0 + (np.asarray(jd_ut) - 2451545.0) / 365.25
    uu = y - 1950.0
    return 29.07 + 0.407 * uu - uu**2 / 233.0 + uu**3 / 2547.0


US_PER_DAY = 86_400_000_000
UNIX_EPOCH = np.datetime64("1970-01-01T00:00:00", "us")


def unix_jd_pair(t64):
    """Two-part UTC Julian date of datetime64[us] instants, counting 86400-s
    days as phasecast's JDUTC does (equal to ERFA's UTC JD except on days
    that are not 86400 s long)."""
    us = (np.asarray(t64, dtype="datetime64[us]") - UNIX_EPOCH).astype(np.int64)
    days = us // US_PER_DAY
    rem = us - days * US_PER_DAY
    return 2440587.5 + days.astype(float), rem.astype(float) / US_PER_DAY


def make_time(t64, location=None):
    """Astropy Time on the TT scale for UTC instants (datetime64[us]), with UT1 = UT.

    From 1960 on: ERFA's UTC with its TAI-UTC table (1960-1972 rubber
    seconds included) and UT1 = UTC.
    Before 1960: TT = UT + Delta T (delta_t_em2006) and UT1 = UT, both set
    explicitly (astropy sees TAI = UTC there, so delta_ut1_utc is set to
    32.184 s - Delta T to make its UT1 equal the given UT).
    Returns (time, delta_t_seconds_or_nan).
    """
    t64 = np.atleast_1d(np.asarray(t64, dtype="datetime64[us]"))
    j1, j2 = unix_jd_pair(t64)
    pre = (j1 - JD_UTC_1960) + j2 < 0
    tu = Time(t64, scale="utc")
    tt_post = tu.tt
    dT = np.where(pre, delta_t_em2006(j1 + j2), np.nan)
    tt1 = np.where(pre, j1, tt_post.jd1)
    tt2 = np.where(pre, j2 + np.nan_to_num(dT) / 86400.0, tt_post.jd2)
    dut1 = np.where(pre, TT_MINUS_TAI - np.nan_to_num(dT), 0.0)
    t = Time(tt1, tt2, format="jd", scale="tt", location=location)
    t.delta_ut1_utc = dut1
    # ERFA's utcut1 takes TAI-UTC at 0h of the day, so during the 1960-1972
    # drifting ("rubber second") UTC its UT1 misses UTC + DUT1 by up to
    # 2.6 ms. Correct delta_ut1_utc by that residual so that UT1 = UT exactly.
    ut1 = t.ut1
    resid = (ut1.jd1 - j1) + (ut1.jd2 - j2)
    t = Time(tt1, tt2, format="jd", scale="tt", location=location)
    t.delta_ut1_utc = dut1 - resid * 86400.0
    ut1 = t.ut1
    err = np.abs((ut1.jd1 - j1) + (ut1.jd2 - j2)) * 86400.0
    assert np.all(err < 1e-6), f"UT1 differs from UT by {np.max(err)} s"
    return t, dT


def jd_pair(jd1, jd2):
    """Two-part Julian date [day, frac]: day a half-integer, 0 <= frac < 1."""
    s = (float(jd1) - 0.5)
    whole = np.floor(s)
    frac = (s - whole) + float(jd2)
    carry = np.floor(frac)
    return [float(whole + carry + 0.5), float(frac - carry)]


def rfc3339(dt):
    """RFC 3339 UTC string with microseconds, e.g. 2031-04-05T06:07:08.123456Z."""
    dt = dt.astimezone(datetime.timezone.utc)
    return dt.strftime("%Y-%m-%dT%H:%M:%S.%fZ")


def tzdata_version():
    try:
        with open("/usr/share/zoneinfo/tzdata.zi") as f:
            return f.readline().strip().lstrip("# ").replace("version ", "")
    except OSError:
        return "unknown"


def header(script, seed, extra):
    """Common fixture header: provenance, versions and settings."""
    h = {
        "generator": script,
        "generated": datetime.date.today().isoformat(),
        "seed": seed,
        "libraries": {
            "astropy": astropy.__version__,
            "pyerfa": erfa.__version__,
            "erfa_c": erfa.version.erfa_version,
            "numpy": np.__version__,
            "python": sys.version.split()[0],
            "python_interpreter": "/usr/bin/python3 (Debian python3-astropy)",
        },
        "settings": {
            "iers.conf.auto_download": False,
            "iers.conf.auto_max_age": None,
            "iers.conf.iers_degraded_accuracy": "warn",
            "ut1_minus_utc_s": 0.0,
            "polar_motion": "zero (get_polar_motion monkeypatched to return (0, 0))",
            "solar_system_ephemeris": "builtin (ERFA epv00 Earth/Sun, ERFA moon98 Moon)",
            "time_scales": (
                "from 1960-01-01 UTC: ERFA UTC with its TAI-UTC table (1960-1972 "
                "rubber seconds included), TT = TAI + 32.184 s. Before 1960: "
                "TT = UT + Delta T with Delta T = 29.07 + 0.407u - u^2/233 + "
                "u^3/2547, u = year - 1950 (Espenak & Meeus 2006, 1941-1961 "
                "polynomial, from memory), UT1 = UT = the given instant; "
                "delta_t_s records the value used (null from 1960 on)."
            ),
            "jd_format": "two-part Julian dates [day, frac]: day half-integer, 0 <= frac < 1",
        },
    }
    h.update(extra)
    return h


def write_json(path, obj):
    with open(path, "w") as f:
        json.dump(obj, f, indent=1, allow_nan=False)
        f.write("\n")
