package store

import (
	"context"
	"fmt"
	"math"
	"sort"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
)

// DemoInfo is what SeedDemo made: the people (an owner, an editor and a
// viewer), the team, its site, list and run, and a one-time sign-in token
// for the owner, to print on the console at first start.
type DemoInfo struct {
	Owner, Editor, Viewer User
	Team                  Team
	Site                  SiteRecord
	List                  TargetList
	Run                   Run
	Targets               []StoredTarget
	SignInToken           string
	SignInExpires         time.Time
}

// DemoSignInTTL is how long the printed first-start sign-in link lasts.
const DemoSignInTTL = 24 * time.Hour

// demoTarget is one invented binary of the demo list. Every name, position
// and ephemeris below is invented for the demonstration; none describes a
// real star.
type demoTarget struct {
	name, ra, dec string
	mag           float64
	band          string // "" = no S/N goals; else the band of mag (and of faint/bright)
	// faint, bright: a variable's magnitudes at phases 0 and 0.5 (both 0:
	// not a variable).
	faint, bright float64
	t0            string
	form          ephem.EpochForm
	std           ephem.TimeStandard
	ephem         ephem.Ephemeris // T0 from t0
	goals         []planner.Goal
	priority      int
	tags          []string
	notes         string
	rv            *planner.RVGoal // a radial-velocity goal (invented)
}

func demoGoal(event string, center, hw, expS, ovhS float64) planner.Goal {
	return planner.Goal{Event: event, Center: center, HalfWidth: hw, ExposureS: expS, OverheadS: ovhS}
}

// withSNR makes g a goal sized by signal-to-noise: with the site's
// instrument each exposure reaches snr under its own sky, expS being used
// without one.
func withSNR(g planner.Goal, snr float64) planner.Goal {
	g.SNR = snr
	return g
}

// demoInstruments are the demo site's invented instruments: an imager
// (zero point from a throughput) and a slit spectrograph.
func demoInstruments() []planner.Instrument {
	return []planner.Instrument{
		{Name: "Imager (invented)", ApertureM: 1.3, Throughput: 0.3, ReadNoiseE: 6, DarkEPerSPix: 0.002, PixelArcsec: 0.45,
			SeeingArcsec: 1.4, Extinction: map[string]float64{"V": 0.17, "R": 0.11}, DarkSky: map[string]float64{"V": 21.5, "R": 20.8}},
		{Name: "Slit spectrograph (invented)", ApertureM: 1.3, Throughput: 0.06, ReadNoiseE: 3, DarkEPerSPix: 0.001, PixelArcsec: 0.6,
			SlitWidthArcsec: 1.5, SeeingArcsec: 1.4, Extinction: map[string]float64{"V": 0.17}},
	}
}

// demoTargets are spread over right ascension so that several are up on
// any night of the year at the demo site, with periods from about 10
// minutes to about a day.
func demoTargets() []demoTarget {
	inf, asc, sup := ephem.ConvInferiorConjunction, ephem.ConvAscendingNode, ephem.ConvSuperiorConjunction
	eclipse := demoGoal("eclipse", 0, 0.03, 20, 4)
	ingress := demoGoal("eclipse_ingress", 0, 0.01, 10, 4)
	ingress.EclipseDurDays = 0.00614
	egress := demoGoal("eclipse_egress", 0, 0.01, 10, 4)
	egress.EclipseDurDays = 0.00614
	return []demoTarget{
		{name: "PCX J0032+3741", ra: "00:32:18.42", dec: "+37:41:22.7", mag: 17.2, t0: "2458791.8347", std: ephem.StdBJDTDB,
			ephem: ephem.Ephemeris{T0ErrDays: 0.0002, PeriodDays: 0.1352170, PeriodErr: 5e-7, Convention: inf},
			goals: []planner.Goal{eclipse, ingress, egress, demoGoal("quadratures", 0, 0.04, 300, 10)}, priority: 1,
			tags:  []string{"eclipsing", "white-dwarf", "post-common-envelope"},
			notes: "Eclipsing white dwarf + M dwarf; eclipse 0.00614 d (8.8 min) first to last contact. Timings 2019–2025 refine the discovery ephemeris."},
		{name: "PCX J0218-0917", ra: "02:18:05.91", dec: "-09:17:44.0", mag: 19.4, band: "V", t0: "58962.447213", form: ephem.FormMJD, std: ephem.StdBJDTDB,
			ephem: ephem.Ephemeris{T0ErrDays: 2e-6, PeriodDays: 0.21411782, PeriodErr: 3e-10, Convention: asc},
			goals: []planner.Goal{withSNR(demoGoal("superior_conjunction", 0, 0.05, 600, 10), 50),
				withSNR(demoGoal("inferior_conjunction", 0, 0.05, 600, 10), 50)},
			priority: 2, tags: []string{"pulsar", "irradiated"},
			notes: "Binary millisecond pulsar; T0 is the pulsar's ascending node (TASC) from radio timing, given as MJD on BJD_TDB. The companion's heated face is seen at its superior conjunction."},
		{name: "PCX J0405+2206", ra: "04:05:51.03", dec: "+22:06:10.9", mag: 16.1, t0: "2455940.61233", std: ephem.StdHJDUTC,
			ephem: ephem.Ephemeris{T0ErrDays: 0.0003, PeriodDays: 0.069312, PeriodErr: 1e-8, Convention: inf},
			goals: []planner.Goal{demoGoal("quadratures", 0, 0.05, 240, 8)}, priority: 2, tags: []string{"cataclysmic", "dwarf-nova"},
			notes: "Dwarf nova in quiescence; T0 published as HJD_UTC (converted to BJD_TDB on entry)."},
		{name: "PCX J0631+1452", ra: "06:31:12.77", dec: "+14:52:31.5", mag: 13.1, t0: "2459580.71422", std: ephem.StdBJDTDB,
			ephem: ephem.Ephemeris{T0ErrDays: 0.0002, PeriodDays: 0.3487104, PeriodErr: 4e-7, Convention: inf},
			goals: []planner.Goal{demoGoal("", 0.25, 0.05, 60, 5), demoGoal("", 0.75, 0.05, 60, 5)}, priority: 4,
			tags: []string{"contact", "w-uma"}, notes: "Contact binary; both maxima wanted for the O'Connell effect."},
		{name: "PCX J0814-1133", ra: "08:14:40.18", dec: "-11:33:05.2", mag: 15.6, band: "V", t0: "2459215.5523", std: ephem.StdBJDTDB,
			ephem:    ephem.Ephemeris{T0ErrDays: 0.0008, PeriodDays: 0.438221, PeriodErr: 2e-6, Convention: inf},
			goals:    []planner.Goal{withSNR(demoGoal("quadratures", 0, 0.04, 180, 8), 300), demoGoal("inferior_conjunction", 0, 0.04, 180, 8)},
			priority: 3, tags: []string{"ellipsoidal"}, notes: "Ellipsoidal variable: light maxima at the quadratures.",
			rv: &planner.RVGoal{Model: planner.RVCircular, KKms: 120, SigmaVKms: 6, WantRelK: 0.02}},
		{name: "PCX J1027+4418", ra: "10:27:33.60", dec: "+44:18:47.1", mag: 17.8, band: "R", t0: "2455612.70231", std: ephem.StdBJDTDB,
			ephem: ephem.Ephemeris{T0ErrDays: 0.0004, PeriodDays: 0.0884127, PeriodErr: 4e-7, Convention: inf},
			goals: []planner.Goal{withSNR(demoGoal("", 0, 0.05, 120, 8), 60)}, priority: 3, tags: []string{"drifted", "needs-timing"},
			notes: "Ephemeris from 2011 with a loose period: the phase uncertainty is now a large part of the orbit. Time an eclipse first."},
		{name: "PCX J1305+7612", ra: "13:05:09.85", dec: "+76:12:03.4", mag: 14.9, band: "V", faint: 15.2, bright: 14.6, t0: "2460102.88214", std: ephem.StdBJDTDB,
			ephem: ephem.Ephemeris{T0ErrDays: 0.0001, PeriodDays: 0.2496117, PeriodErr: 3e-7, Convention: inf},
			goals: []planner.Goal{withSNR(demoGoal("", 0.5, 0.06, 150, 8), 400)}, priority: 3, tags: []string{"circumpolar", "reflection"},
			notes: "Never sets from the demo site; reflection effect peaks at phase 0.5."},
		{name: "PCX J1448+1830", ra: "14:48:47.12", dec: "+18:30:16.8", mag: 12.7, t0: "2459730.2241", std: ephem.StdBJDTDB,
			ephem: ephem.Ephemeris{T0ErrDays: 0.002, PeriodDays: 0.873114, PeriodErr: 5e-6, Convention: inf, Ecc: 0.28, OmegaDeg: 142},
			goals: []planner.Goal{demoGoal("periastron", 0, 0.03, 300, 10), demoGoal("max_recession", 0, 0.04, 300, 10),
				demoGoal("max_approach", 0, 0.04, 300, 10)},
			priority: 2, tags: []string{"eccentric", "spectroscopic"}, notes: "Eccentric orbit, e = 0.28, ω = 142°: the quadratures are not half an orbit apart.",
			rv: &planner.RVGoal{Model: planner.RVEccentric, KKms: 42, SigmaVKms: 1.5, WantRelK: 0.01}},
		{name: "PCX J1843+0327", ra: "18:43:26.30", dec: "+03:27:58.9", mag: 18.6, t0: "2459810.61734", std: ephem.StdBJDTDB,
			ephem: ephem.Ephemeris{T0ErrDays: 5e-5, PeriodDays: 0.0072917, PeriodErr: 2e-10, Convention: inf},
			goals: []planner.Goal{demoGoal("", 0, 0.05, 15, 3), demoGoal("", 0.25, 0.05, 15, 3), demoGoal("", 0.5, 0.05, 15, 3),
				demoGoal("", 0.75, 0.05, 15, 3)},
			priority: 1, tags: []string{"ultracompact", "am-cvn"}, notes: "10.5-minute orbit: short exposures only, or the phase smears."},
		{name: "PCX J2117+1805", ra: "21:17:30.50", dec: "+18:05:12.0", mag: 15.3, band: "V", t0: "2459455.41877", std: ephem.StdBJDTDB,
			ephem:    ephem.Ephemeris{T0ErrDays: 3e-5, PeriodDays: 0.1015347, PeriodErr: 8e-9, Convention: sup},
			goals:    []planner.Goal{demoGoal("eclipse", 0, 0.02, 20, 4), withSNR(demoGoal("superior_conjunction", 0, 0.05, 90, 6), 150)},
			priority: 2, tags: []string{"eclipsing", "subdwarf", "reflection"},
			notes: "Hot subdwarf + M dwarf; T0 marks the superior conjunction (reflection maximum), so mid-eclipse is at phase 0.5."},
		{name: "PCX J2339-0541", ra: "23:39:02.66", dec: "-05:41:37.3", mag: 18.9, band: "V", t0: "2459904.55520", std: ephem.StdBJDTDB,
			ephem: ephem.Ephemeris{T0ErrDays: 2e-5, PeriodDays: 0.0290344, PeriodErr: 1e-10, Pdot: -2.1e-12, PdotErr: 3e-13, Convention: inf},
			goals: []planner.Goal{withSNR(demoGoal("quadratures", 0, 0.04, 30, 4), 35)}, priority: 1, tags: []string{"double-white-dwarf", "decaying"},
			notes: "Detached double white dwarf, 41.8-minute orbit shrinking (Ṗ < 0).",
			rv:    &planner.RVGoal{Model: planner.RVCircular, KKms: 310, SigmaVKms: 25, WantRelK: 0.03}},
	}
}

// demoTimingTruth is the invented "true" ephemeris of PCX J0032+3741 that
// the demo timings follow (with a few seconds of invented scatter).
var (
	demoTruthT0  = ephem.JD2{Day: 2458791.5, Frac: 0.334521}
	demoTruthP   = 0.13521734
	demoCycles   = []int64{0, 270, 2700, 5409, 8120, 10800, 13505, 16230}
	demoScatterS = []float64{8, -12, 4, -6, 15, -3, 9, -10}
)

// SeedDemo fills an EMPTY database with the invented demo scenario, in one
// transaction: three people (owner, editor, viewer; they sign in by link),
// a team, a mountain site, a list of eleven invented binaries of different
// kinds (eclipsing white dwarf with eclipse contacts, a pulsar binary in the
// ascending-node convention, a dwarf nova with an HJD_UTC epoch, a contact
// binary, an ellipsoidal variable, one with a drifted ephemeris, one
// circumpolar at the site, an eccentric orbit, an ultracompact binary, a
// reflection-effect binary in the superior-conjunction convention and a
// decaying double white dwarf), eclipse timings for one target with the
// ephemeris refined from them (ephem.FitEphemeris), a four-night run
// starting the night before now, and observed exposures on its first
// night. now is the instant the scenario is built around (UTC). It
// returns a one-time sign-in token for the owner (valid DemoSignInTTL). A
// database with any user in it is ECONFLICT.
func (s *Store) SeedDemo(ctx context.Context, now time.Time) (DemoInfo, error) {
	const op = "store.SeedDemo"
	t, err := s.beginWrite(ctx, Anonymous())
	if err != nil {
		return DemoInfo{}, wrap(op, err)
	}
	defer t.tx.Rollback()
	t.now = now.UTC()
	info, err := seedDemo(t, now.UTC())
	if err != nil {
		return DemoInfo{}, wrap(op, err)
	}
	return info, commit(t, op)
}

func seedDemo(t *txn, now time.Time) (DemoInfo, error) {
	var n int
	if err := t.queryRow("SELECT count(*) FROM users").Scan(&n); err != nil {
		return DemoInfo{}, err
	}
	if n > 0 {
		return DemoInfo{}, errConflict("the database is not empty; the demo is seeded only on a first start")
	}
	var info DemoInfo
	var err error
	people := []struct {
		u    *User
		nu   NewUser
		role Role
	}{
		{&info.Owner, NewUser{Email: "wren.halloway@example.org", Name: "Wren Halloway"}, RoleOwner},
		{&info.Editor, NewUser{Email: "piet.amberlane@example.org", Name: "Piet Amberlane"}, RoleEditor},
		{&info.Viewer, NewUser{Email: "juno.castellar@example.org", Name: "Juno Castellar"}, RoleViewer},
	}
	for _, p := range people {
		if *p.u, err = createUser(t, p.nu, ""); err != nil {
			return DemoInfo{}, err
		}
	}
	t.actor = Actor{Kind: ActorUser, UserID: info.Owner.ID, Name: info.Owner.Name, Via: "demo seed"}
	if info.Team, err = createTeam(t, "Short-Period Binaries (demo)"); err != nil {
		return DemoInfo{}, err
	}
	for _, p := range people[1:] {
		if _, err := addMember(t, info.Team.ID, p.u.ID, p.role); err != nil {
			return DemoInfo{}, err
		}
	}
	c := planner.DefaultConstraints()
	c.MinMoonSepDeg = 20
	info.Site, err = createSite(t, info.Team.ID, SiteInput{
		Name: "Juniper Crest Observatory (invented)",
		Site: ephem.Site{LatDeg: 37.2043, LonEastDeg: -113.5712, ElevM: 2340},
		Zone: "America/Denver",
		Horizon: []planner.HorizonPoint{{AzDeg: 0, AltDeg: 4}, {AzDeg: 60, AltDeg: 6}, {AzDeg: 85, AltDeg: 15},
			{AzDeg: 110, AltDeg: 14}, {AzDeg: 140, AltDeg: 5}, {AzDeg: 250, AltDeg: 8}, {AzDeg: 300, AltDeg: 3}},
		Constraints: c,
		Instruments: demoInstruments(),
		Notes:       "An invented 1.3 m telescope on an invented ridge, for the demonstration. A ridge to the east hides the first hour after rising.",
	})
	if err != nil {
		return DemoInfo{}, err
	}
	if info.List, err = createList(t, info.Team.ID, ListInput{Name: "Compact binaries", Description: "The demo programme: invented binaries of many kinds."}); err != nil {
		return DemoInfo{}, err
	}
	for _, d := range demoTargets() {
		ra, err := ephem.ParseRA(d.ra)
		if err != nil {
			return DemoInfo{}, fmt.Errorf("demo %s: %w", d.name, err)
		}
		dec, err := ephem.ParseDec(d.dec)
		if err != nil {
			return DemoInfo{}, fmt.Errorf("demo %s: %w", d.name, err)
		}
		form := d.form
		if form == "" {
			form = ephem.FormJD
		}
		brightPhase := 0.0
		if d.bright != 0 {
			brightPhase = 0.5
		}
		in := TargetInput{
			Target: planner.Target{Name: d.name, RADeg: ra, DecDeg: dec, Mag: d.mag, Band: d.band, FaintMag: d.faint,
				FaintPhase: 0, BrightMag: d.bright, BrightPhase: brightPhase, Ephem: d.ephem, Goals: d.goals,
				Priority: d.priority, AcquireS: 180, Tags: d.tags, Notes: d.notes, RV: d.rv},
			T0:        Epoch{Text: d.t0, Form: form, Standard: d.std},
			EphemNote: "invented for the demo",
		}
		st, err := createTarget(t, info.List.ID, in, SourceDemo)
		if err != nil {
			return DemoInfo{}, fmt.Errorf("demo %s: %w", d.name, err)
		}
		info.Targets = append(info.Targets, st)
	}
	if info.Targets[0], err = seedDemoTimings(t, info.Targets[0]); err != nil {
		return DemoInfo{}, err
	}
	if info.Run, err = seedDemoRun(t, info, now); err != nil {
		return DemoInfo{}, err
	}
	if err := seedDemoObservations(t, info); err != nil {
		return DemoInfo{}, err
	}
	if info.SignInToken, err = createSignInLink(t, info.Owner.ID, DemoSignInTTL); err != nil {
		return DemoInfo{}, err
	}
	info.SignInExpires = now.Add(DemoSignInTTL)
	return info, nil
}

// seedDemoTimings adds eight eclipse timings of the first demo target
// (the two oldest published as HJD_UTC, the rest BJD_TDB) and the
// ephemeris refined from them by ephem.FitEphemeris.
func seedDemoTimings(t *txn, st StoredTarget) (StoredTarget, error) {
	star := st.Target.Star()
	var in []TimingInput
	for i, E := range demoCycles {
		bjd := demoTruthT0.AddDays(float64(E) * demoTruthP).AddSeconds(demoScatterS[i])
		std, v := ephem.StdBJDTDB, bjd
		if i < 2 {
			std = ephem.StdHJDUTC
			h, err := ephem.ConvertEpochGeocentric(bjd, ephem.StdBJDTDB, ephem.StdHJDUTC, star)
			if err != nil {
				return StoredTarget{}, fmt.Errorf("demo timing %d: %w", i, err)
			}
			v = h
		}
		in = append(in, TimingInput{
			T:        Epoch{Text: ephem.FormatEpoch(v, ephem.FormJD, 6), Form: ephem.FormJD, Standard: std},
			ErrDays:  0.0001,
			Observer: "demo team",
			Note:     "mid-eclipse, invented",
		})
	}
	tms, err := addTimings(t, st.ID, in)
	if err != nil {
		return StoredTarget{}, fmt.Errorf("demo timings: %w", err)
	}
	var fitIn []ephem.Timing
	var ids []int64
	for _, tm := range tms {
		fitIn = append(fitIn, ephem.Timing{Value: tm.BJD, Std: ephem.StdBJDTDB, ErrDays: tm.ErrDays})
		ids = append(ids, tm.ID)
	}
	res, err := ephem.FitEphemeris(fitIn, st.Target.Ephem, false)
	if err != nil {
		return StoredTarget{}, fmt.Errorf("demo fit: %w", err)
	}
	return addEphemeris(t, st.ID, st.Version, EphemerisInput{
		Ephem:  res.Ephem,
		T0:     EpochBJD(res.Ephem.T0),
		Source: SourceFit,
		Fit: &FitProvenance{Method: "ephem.FitEphemeris, linear weighted least squares", TimingIDs: ids,
			ChiSq: res.ChiSq, RedChiSq: res.RedChiSq, Note: res.Note},
		Note: "refined from the eight eclipse timings",
	})
}

// seedDemoRun makes a run of four full nights, the first being the night
// that began on the local evening before now's local date.
func seedDemoRun(t *txn, info DemoInfo, now time.Time) (Run, error) {
	loc, err := time.LoadLocation(info.Site.Zone)
	if err != nil {
		return Run{}, err
	}
	local := now.In(loc)
	first := time.Date(local.Year(), local.Month(), local.Day()-1, 12, 0, 0, 0, loc)
	var nights []RunNight
	for i := range 4 {
		nights = append(nights, RunNight{Date: first.AddDate(0, 0, i).Format("2006-01-02"), Part: NightFull})
	}
	return createRun(t, info.Team.ID, RunInput{
		Name:        fmt.Sprintf("Juniper Crest %s", first.Format("2006 January")),
		SiteID:      info.Site.ID,
		ListID:      info.List.ID,
		Nights:      nights,
		Constraints: info.Site.PlanConstraints(),
		Notes:       "Demo run: four nights; the first is over and partly observed.",
	})
}

// seedDemoObservations records exposures on the run's first night: blocks
// of the three targets highest at the night's middle, the last one lost to
// (invented) cloud.
func seedDemoObservations(t *txn, info DemoInfo) error {
	loc, err := time.LoadLocation(info.Site.Zone)
	if err != nil {
		return err
	}
	y, m, d, err := ephem.ParseDate(info.Run.Nights[0].Date)
	if err != nil {
		return err
	}
	ev := ephem.Night(info.Site.Site, y, m, d, loc)
	if ev.NauticalDusk == nil || ev.NauticalDawn == nil {
		return fmt.Errorf("demo: no nautical night at the demo site on %s", info.Run.Nights[0].Date)
	}
	dusk, dawn := *ev.NauticalDusk, *ev.NauticalDawn
	mid := dusk.Add(dawn.Sub(dusk) / 2)
	type cand struct {
		st  StoredTarget
		alt float64
	}
	var cs []cand
	for _, st := range info.Targets {
		cs = append(cs, cand{st, ephem.Observe(info.Site.Site, st.Target.Star(), mid).AltDeg})
	}
	sort.SliceStable(cs, func(i, j int) bool { return cs[i].alt > cs[j].alt })
	var in []ObservationInput
	step := dawn.Sub(dusk) / 3
	for k, c := range cs[:3] {
		g := c.st.Target.Goals[0]
		start := dusk.Add(time.Duration(k)*step + 15*time.Minute).Truncate(time.Second)
		status, note := ObsDone, ""
		if k == 2 {
			status, note = ObsFailed, "lost to cloud (invented)"
		}
		for i := range 5 {
			at := start.Add(time.Duration(float64(i) * (g.ExposureS + g.OverheadS) * float64(time.Second)))
			gc := goalCenterFor(c.st.Target, g)
			in = append(in, ObservationInput{TargetID: c.st.ID, RunID: info.Run.ID, StartUTC: at, ExposureS: g.ExposureS,
				Status: status, Source: ObsFromDemo, GoalCenter: gc, Note: note})
		}
	}
	_, err = addObservations(t, in)
	return err
}

// goalCenterFor returns the phase centre of a goal (resolving a named
// event; the first of "quadratures"), or nil.
func goalCenterFor(tg planner.Target, g planner.Goal) *float64 {
	one := tg
	one.Goals = []planner.Goal{g}
	rs, err := one.ResolveGoals()
	if err != nil || len(rs) == 0 || math.IsNaN(rs[0].Center) {
		return nil
	}
	c := rs[0].Center
	return &c
}
