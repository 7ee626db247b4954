// compare.mjs: the astronomy-engine half of the comparison. It reads the work
// set and phasecast's results and timings written by main.go, does the same
// work with astronomy-engine (airless altitude and azimuth, refracted altitude,
// airmass for 100 targets × one night at 1-minute steps), times it the same
// way (best of N, after one untimed warm-up run), and prints the time ratios
// and the largest differences.
//
//   node testdata/compare/compare.mjs testdata/compare/out/phasecast.json [REPS]
//
// Normally run through run.sh, which writes the JSON first.

import { readFileSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import * as Astronomy from 'astronomy-engine';

const here = dirname(fileURLToPath(import.meta.url));
const aePkg = JSON.parse(readFileSync(join(here, 'node_modules', 'astronomy-engine', 'package.json'), 'utf8'));

const inPath = process.argv[2];
if (!inPath) {
  console.error('usage: node compare.mjs PHASECAST_JSON [REPS]');
  process.exit(2);
}
const reps = Number(process.argv[3] ?? 25);
if (!(reps >= 1)) {
  console.error(`REPS: ${process.argv[3]} is not accepted; accepted: a whole number, 1 or more`);
  process.exit(2);
}
const pc = JSON.parse(readFileSync(inPath, 'utf8'));

const nT = pc.targets.length;
const nI = pc.unix.length;
const N = nT * nI;
const observer = new Astronomy.Observer(pc.lat_deg, pc.lon_east_deg, pc.elev_m);
const DEG = Math.PI / 180;

// Each target is one of astronomy-engine's user-defined stars, redefined as
// needed (it has eight slots). DefineStar takes a distance for the star's
// annual parallax; phasecast's targets have none, so put them far enough
// (10⁶ light-years: parallax 3·10⁻⁶″) that it vanishes.
const STAR_DIST_LY = 1e6;

// airmassKY is ephem.Airmass retyped: Kasten & Young (1989), Applied Optics
// 28, 4735, eq. 3, X = 1/(sin h + 0.50572 (h + 6.07995°)^−1.6364), h the
// refracted altitude in degrees; 0 below the horizon (as phasecast stores it).
function airmassKY(h) {
  if (!(h >= 0) || h > 90) return 0;
  return 1 / (Math.sin(h * DEG) + 0.50572 * Math.pow(h + 6.07995, -1.6364));
}

function newResult() {
  return {
    alt_deg: new Float64Array(N),
    az_deg: new Float64Array(N),
    alt_refracted_deg: new Float64Array(N),
    airmass: new Float64Array(N),
  };
}

// finish: refracted altitude with astronomy-engine's own "normal" refraction
// (Saemundsson's formula, Meeus (16.4), unscaled, i.e. 1010 hPa and 10 °C:
// the same formula and atmosphere as phasecast's standard site at airless
// altitudes above −1°), then the airmass from it.
function finish(r, k) {
  const h = r.alt_deg[k] + Astronomy.Refraction('normal', r.alt_deg[k]);
  r.alt_refracted_deg[k] = h;
  r.airmass[k] = airmassKY(h);
}

// perSample: the straightforward use. For every instant and target the
// apparent place of date, topocentric, with aberration (Equator with
// ofdate = true, aberration = true), then the airless horizontal position
// (Horizon without refraction). Instants outermost so that astronomy-engine's
// one-entry caches of nutation and sidereal time serve all 100 targets.
function perSample(r) {
  for (let i = 0; i < nI; i++) {
    const time = Astronomy.MakeTime(new Date(pc.unix[i] * 1000));
    for (let j = 0; j < nT; j++) {
      const t = pc.targets[j];
      Astronomy.DefineStar(Astronomy.Body.Star1, t.ra_deg / 15, t.dec_deg, STAR_DIST_LY);
      const eq = Astronomy.Equator(Astronomy.Body.Star1, time, observer, true, true);
      const hor = Astronomy.Horizon(time, observer, eq.ra, eq.dec);
      const k = j * nI + i;
      r.alt_deg[k] = hor.altitude;
      r.az_deg[k] = hor.azimuth;
      finish(r, k);
    }
  }
}

// oncePerNight: astronomy-engine's own shortcut for the same job, as a user
// who knows that a star's apparent place changes by well under 1″ in a night
// would write it: the apparent place once per target at mid-night, then only
// Horizon per sample.
function oncePerNight(r, altAzOnly = false) {
  const mid = Astronomy.MakeTime(new Date(0.5 * (pc.unix[0] + pc.unix[nI - 1]) * 1000));
  const ra = new Float64Array(nT);
  const dec = new Float64Array(nT);
  for (let j = 0; j < nT; j++) {
    const t = pc.targets[j];
    Astronomy.DefineStar(Astronomy.Body.Star1, t.ra_deg / 15, t.dec_deg, STAR_DIST_LY);
    const eq = Astronomy.Equator(Astronomy.Body.Star1, mid, observer, true, true);
    ra[j] = eq.ra;
    dec[j] = eq.dec;
  }
  for (let i = 0; i < nI; i++) {
    const time = Astronomy.MakeTime(new Date(pc.unix[i] * 1000));
    for (let j = 0; j < nT; j++) {
      const hor = Astronomy.Horizon(time, observer, ra[j], dec[j]);
      const k = j * nI + i;
      r.alt_deg[k] = hor.altitude;
      r.az_deg[k] = hor.azimuth;
      if (!altAzOnly) finish(r, k);
    }
  }
}

function bestOf(what, n, f) {
  const r = newResult();
  f(r); // warm-up: lets the JIT compile the paths before timing
  const all = [];
  for (let rep = 0; rep < n; rep++) {
    const t0 = process.hrtime.bigint();
    f(r);
    all.push(Number(process.hrtime.bigint() - t0) / 1e6);
  }
  return { what, best_ms: Math.min(...all), all_ms: all, result: r };
}

// diurnalAltArcsec: the change of altitude, arcseconds, that diurnal
// aberration makes at airless altitude h and azimuth A (degrees, from north
// through east). The site moves toward the east point at ω·ρcosφ′ ≈ 0.32″·cos φ
// in units of c; a direction s moves by (v/c)(E − (E·s)s), whose altitude
// component is −(v/c) sin h sin A. phasecast applies this in Site.Horizontal;
// astronomy-engine does not (its aberration uses the Earth's orbital velocity
// only), so this accounts for a known part of the difference.
function diurnalAltArcsec(h, A) {
  // ρ cos φ′ for the WGS84-like ellipsoid (Meeus ch. 11): tan u = (b/a) tan φ.
  const ba = 0.99664719;
  const phi = pc.lat_deg * DEG;
  const u = Math.atan(ba * Math.tan(phi));
  const rhoCos = Math.cos(u) + (pc.elev_m / 6378140) * Math.cos(phi);
  const k = 7.292115e-5 * 6378.14 / 299792.458 / DEG * 3600 * rhoCos; // ″
  return -k * Math.sin(h * DEG) * Math.sin(A * DEG);
}

function wrap180(d) {
  d = ((d + 180) % 360 + 360) % 360 - 180;
  return d;
}

// diff: the largest differences of astronomy-engine's result a from
// phasecast's result p, with where they happen.
function diff(a, p, opts = {}) {
  const s = {
    alt_arcsec: 0, alt_at: -1,
    az_cos_alt_arcsec: 0,
    refracted_arcsec: 0,
    airmass_abs: 0, airmass_rel: 0, airmass_n: 0, horizon_disagree: 0,
    alt_minus_diurnal_arcsec: 0,
  };
  for (let k = 0; k < N; k++) {
    const pa = p.alt_deg[k];
    const da = Math.abs(a.alt_deg[k] - pa) * 3600;
    if (da > s.alt_arcsec) { s.alt_arcsec = da; s.alt_at = k; }
    if (opts.diurnal) {
      const dd = Math.abs(a.alt_deg[k] + diurnalAltArcsec(a.alt_deg[k], a.az_deg[k]) / 3600 - pa) * 3600;
      s.alt_minus_diurnal_arcsec = Math.max(s.alt_minus_diurnal_arcsec, dd);
    }
    if (Math.abs(pa) < 89.9) {
      const dz = Math.abs(wrap180(a.az_deg[k] - p.az_deg[k])) * Math.cos(pa * DEG) * 3600;
      s.az_cos_alt_arcsec = Math.max(s.az_cos_alt_arcsec, dz);
    }
    if (a.alt_deg[k] >= -1 && pa >= -1) {
      const dr = Math.abs(a.alt_refracted_deg[k] - p.alt_refracted_deg[k]) * 3600;
      s.refracted_arcsec = Math.max(s.refracted_arcsec, dr);
    }
    const xa = a.airmass[k], xp = p.airmass[k];
    if ((xa > 0) !== (xp > 0)) s.horizon_disagree++;
    if (xa > 0 && xp > 0) {
      s.airmass_n++;
      s.airmass_abs = Math.max(s.airmass_abs, Math.abs(xa - xp));
      s.airmass_rel = Math.max(s.airmass_rel, Math.abs(xa - xp) / xp);
    }
  }
  return s;
}

function where(k) {
  const j = Math.floor(k / nI), i = k % nI;
  const t = pc.targets[j];
  return `target ${j} (RA ${t.ra_deg.toFixed(2)}°, Dec ${t.dec_deg.toFixed(2)}°) at ${new Date(pc.unix[i] * 1000).toISOString().slice(0, 16)}Z`;
}

// --- the runs -------------------------------------------------------------

const nRepsSlow = Math.min(5, reps);
const ae = [
  bestOf('astronomy-engine per sample: Equator(ofdate, aberration) + Horizon (airless) + Refraction("normal") + airmass', nRepsSlow, perSample),
  bestOf('astronomy-engine apparent place once per target per night: Equator at mid-night, then Horizon + Refraction + airmass per sample', reps, oncePerNight),
  bestOf('astronomy-engine apparent place once per target per night, alt/az only: Equator at mid-night, then Horizon per sample', reps, (r) => oncePerNight(r, true)),
];

// Diagnostic, untimed: astronomy-engine with phasecast's TT − UTC (leap-second
// table) in place of its own ΔT model (Espenak & Meeus polynomial).
const aeDeltaT = Astronomy.DeltaT_EspenakMeeus(Astronomy.MakeTime(new Date(pc.unix[0] * 1000)).ut);
Astronomy.SetDeltaTFunction(() => pc.tt_minus_utc_s);
const aeSameDT = newResult();
perSample(aeSameDT);
Astronomy.SetDeltaTFunction(Astronomy.DeltaT_EspenakMeeus);

const pcT = Object.fromEntries(pc.timings.map((t) => [t.key, t]));

// --- the report -----------------------------------------------------------

const as = (x) => x.toFixed(3).padStart(7) + '″';
console.log(`\nastronomy-engine ${aePkg.version} (npm), Node ${process.version}; phasecast ${pc.phasecast_rev}, ${pc.go_version} (GOMAXPROCS ${pc.gomaxprocs})`);
console.log(`site ${pc.lat_deg}° N, ${pc.lon_east_deg}° E, ${pc.elev_m} m (invented); night of ${pc.night_date} (${pc.night_zone}): ${pc.from} to ${pc.to}`);
console.log(`work: ${nT} targets × ${nI} instants at 1-minute steps = ${N} samples; each: airless alt/az, refracted altitude, airmass\n`);

console.log('time, best of N (wall clock, one thread each):');
const rows = [
  ['phasecast fast path, Track.AltAzUnix', pcT.fast],
  ['phasecast fast path, Track.AltAzGrid', pcT.grid],
  ['phasecast full precision, ApparentPlace + Horizontal', pcT.full],
  ['phasecast Observe (full, + Sun, Moon)', pcT.observe],
  ['astronomy-engine, per sample', ae[0]],
  ['astronomy-engine, apparent place once per night', ae[1]],
  ['phasecast fast path, AltAzUnix, alt/az only', pcT.altaz],
  ['astronomy-engine, once per night, alt/az only', ae[2]],
];
for (const [name, t] of rows) {
  const ns = (t.best_ms * 1e6 / N).toFixed(0);
  console.log(`  ${name.padEnd(54)} ${t.best_ms.toFixed(2).padStart(9)} ms  ${ns.padStart(6)} ns/sample  (best of ${t.all_ms.length})`);
}

console.log('\ntime ratio (astronomy-engine time / phasecast time; > 1: phasecast faster):');
const ratio = (a, p) => (a.best_ms / p.best_ms).toFixed(1).padStart(7) + '×';
console.log(`  ${''.padEnd(40)} ${'AE per sample'.padStart(14)} ${'AE once/night'.padStart(14)}`);
for (const [name, t] of rows.slice(0, 4)) {
  console.log(`  ${name.padEnd(40).slice(0, 40)} ${ratio(ae[0], t).padStart(14)} ${ratio(ae[1], t).padStart(14)}`);
}
console.log(`  alt/az only (no refraction, no airmass): AE once per night / phasecast AltAzUnix = ${ratio(ae[2], pcT.altaz).trim()}`);

const dFastPer = diff(ae[0].result, pc.fast, { diurnal: true });
const dFullPer = diff(ae[0].result, pc.full, { diurnal: true });
const dFastOnce = diff(ae[1].result, pc.fast, { diurnal: true });
const dSameDT = diff(aeSameDT, pc.full, { diurnal: true });
let dtShift = 0;
for (let k = 0; k < N; k++) dtShift = Math.max(dtShift, Math.abs(aeSameDT.alt_deg[k] - ae[0].result.alt_deg[k]) * 3600);
let fastFull = 0;
for (let k = 0; k < N; k++) fastFull = Math.max(fastFull, Math.abs(pc.fast.alt_deg[k] - pc.full.alt_deg[k]) * 3600);

console.log('\nlargest differences (astronomy-engine − phasecast), arcseconds:');
console.log(`  ${''.padEnd(46)} ${'alt'.padStart(8)} ${'az·cos alt'.padStart(10)} ${'refracted'.padStart(9)} ${'alt w/o diurnal ab.'.padStart(20)}`);
const line = (name, d) => console.log(`  ${name.padEnd(46)} ${as(d.alt_arcsec)} ${as(d.az_cos_alt_arcsec).padStart(10)} ${as(d.refracted_arcsec).padStart(9)} ${as(d.alt_minus_diurnal_arcsec).padStart(20)}`);
line('AE per sample vs phasecast fast path', dFastPer);
line('AE per sample vs phasecast full precision', dFullPer);
line('AE once per night vs phasecast fast path', dFastOnce);
line('AE per sample, phasecast ΔT, vs full precision', dSameDT);
console.log(`  (largest airless-altitude difference: ${where(dFastPer.alt_at)})`);
console.log(`  phasecast fast path vs its own full precision: ${as(fastFull)} (airless altitude)`);
console.log(`  astronomy-engine with its own ΔT (${aeDeltaT.toFixed(2)} s) vs with phasecast's TT − UTC (${pc.tt_minus_utc_s.toFixed(3)} s): altitudes move by at most ${as(dtShift)}`);
console.log('\nairmass (Kasten & Young 1989 from each side\'s refracted altitude, same Saemundsson refraction at 1010 hPa, 10 °C):');
for (const [name, d] of [['AE per sample vs phasecast fast path', dFastPer], ['AE once per night vs phasecast fast path', dFastOnce]]) {
  console.log(`  ${name.padEnd(46)} max |ΔX| ${d.airmass_abs.toExponential(2)}, max |ΔX|/X ${d.airmass_rel.toExponential(2)} over ${d.airmass_n} samples above the horizon; above the horizon on one side only: ${d.horizon_disagree}`);
}

const rPer = ae[0].best_ms / pcT.fast.best_ms;
const rOnce = ae[1].best_ms / pcT.fast.best_ms;
const worst = Math.max(dFastPer.alt_arcsec, dFastOnce.alt_arcsec);
const yes = (b) => (b ? 'yes' : 'NO');
console.log('\naim: phasecast\'s fast path ≥ 20× faster than astronomy-engine at equal accuracy (within 1″)');
console.log(`  against astronomy-engine used per sample (Equator + Horizon):          ${rPer.toFixed(1)}×  ≥ 20×: ${yes(rPer >= 20)}`);
console.log(`  against astronomy-engine with the once-per-night shortcut (this script): ${rOnce.toFixed(1)}×  ≥ 20×: ${yes(rOnce >= 20)}`);
console.log(`  largest airless-altitude difference ${worst.toFixed(3)}″, airmass from refracted altitude ${dFastOnce.airmass_rel.toExponential(1)} relative  within 1″: ${yes(worst <= 1)}`);

const summary = {
  astronomy_engine_version: aePkg.version,
  node_version: process.version,
  phasecast_rev: pc.phasecast_rev,
  go_version: pc.go_version,
  samples: N,
  timings_ms: Object.fromEntries(rows.map(([n, t]) => [n, { best: t.best_ms, all: t.all_ms }])),
  differences_arcsec: {
    ae_per_sample_vs_fast: dFastPer,
    ae_per_sample_vs_full: dFullPer,
    ae_once_per_night_vs_fast: dFastOnce,
    ae_per_sample_phasecast_dt_vs_full: dSameDT,
    fast_vs_full: fastFull,
    delta_t_shift: dtShift,
  },
};
writeFileSync(join(dirname(inPath), 'summary.json'), JSON.stringify(summary, null, 2) + '\n');
