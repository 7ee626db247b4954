"""Regions from which the generators draw random observing sites.

Each region is (continent, IANA zone, latitude range, east longitude range).
The zone is the one in use over that box, so that "local noon" is a real
clock noon; sites themselves are random points, not real observatories.
Latitudes stay within +-70 degrees.
"""

REGIONS = [
    # continent, zone, (lat_min, lat_max), (lon_min, lon_max) east-positive
    ("Europe", "Europe/London", (50.0, 58.5), (-6.0, 1.5)),
    ("Europe", "Europe/Madrid", (36.5, 43.5), (-8.5, 3.0)),
    ("Europe", "Europe/Berlin", (47.5, 54.5), (6.5, 14.5)),
    ("Europe", "Europe/Stockholm", (58.0, 68.5), (12.0, 23.5)),
    ("Europe", "Europe/Helsinki", (61.0, 70.0), (22.0, 29.5)),
    ("Europe", "Atlantic/Reykjavik", (63.5, 66.3), (-23.5, -14.0)),
    ("Africa", "Africa/Casablanca", (28.0, 35.0), (-9.5, -2.0)),
    ("Africa", "Africa/Nairobi", (-4.5, 4.5), (34.5, 41.0)),
    ("Africa", "Africa/Johannesburg", (-34.0, -23.0), (17.0, 31.5)),
    ("Africa", "Africa/Windhoek", (-28.0, -18.0), (13.0, 24.0)),
    ("Asia", "Asia/Kolkata", (10.0, 30.0), (72.0, 88.0)),
    ("Asia", "Asia/Shanghai", (22.0, 45.0), (100.0, 122.0)),
    ("Asia", "Asia/Tokyo", (31.0, 43.0), (130.0, 145.0)),
    ("Asia", "Asia/Yakutsk", (60.0, 70.0), (120.0, 135.0)),
    ("Asia", "Asia/Tehran", (27.0, 38.0), (46.0, 60.0)),
    ("North America", "America/Anchorage", (58.0, 70.0), (-158.0, -142.0)),
    ("North America", "America/Los_Angeles", (33.0, 45.0), (-123.0, -117.0)),
    ("North America", "America/Denver", (32.0, 45.0), (-112.0, -104.0)),
    ("North America", "America/New_York", (30.0, 45.0), (-84.0, -72.0)),
    ("North America", "America/Mexico_City", (17.0, 24.0), (-104.0, -97.0)),
    ("North America", "America/Nuuk", (60.0, 70.0), (-54.0, -46.0)),
    ("North America", "Pacific/Honolulu", (19.0, 22.0), (-160.0, -155.0)),
    ("South America", "America/Santiago", (-45.0, -18.0), (-73.0, -68.0)),
    ("South America", "America/Argentina/Ushuaia", (-55.0, -52.0), (-69.0, -64.0)),
    ("South America", "America/Sao_Paulo", (-30.0, -15.0), (-50.0, -40.0)),
    ("South America", "America/Lima", (-15.0, -5.0), (-78.0, -72.0)),
    ("Oceania", "Australia/Sydney", (-37.0, -28.0), (145.0, 153.0)),
    ("Oceania", "Australia/Perth", (-34.0, -20.0), (115.0, 122.0)),
    ("Oceania", "Pacific/Auckland", (-46.0, -35.0), (167.0, 178.0)),
    ("Antarctica", "Antarctica/Casey", (-70.0, -65.0), (100.0, 120.0)),
    ("Antarctica", "Antarctica/Davis", (-70.0, -67.0), (70.0, 90.0)),
    ("Antarctica", "Antarctica/Palmer", (-70.0, -63.0), (-70.0, -58.0)),
]


def random_site(rng, region=None):
    """A random site: dict with continent, zone, lat, lon (east +), elev (m)."""
    if region is None:
        region = REGIONS[rng.integers(len(REGIONS))]
    continent, zone, (la0, la1), (lo0, lo1) = region
    return {
        "continent": continent,
        "zone": zone,
        "lat_deg": round(float(rng.uniform(la0, la1)), 6),
        "lon_east_deg": round(float(rng.uniform(lo0, lo1)), 6),
        "elev_m": round(float(rng.uniform(0.0, 4000.0)), 1),
    }
