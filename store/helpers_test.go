package store_test

import (
	"context"
	"errors"
	"sync"
	"testing"
	"time"

	"phasecast/ephem"
	"phasecast/planner"
	"phasecast/store"
	"phasecast/store/testclock"
	"phasecast/store/testdb"
)

// fastPasswords keeps tests quick; production uses DefaultPasswordParams.
var fastPasswords = store.PasswordParams{Time: 1, MemoryKiB: 1024, Threads: 1, SaltLen: 16, KeyLen: 32}

// clock is a settable test clock.
type clock struct {
	mu sync.Mutex
	t  time.Time
}

func (c *clock) now() time.Time { c.mu.Lock(); defer c.mu.Unlock(); return c.t }
func (c *clock) add(d time.Duration) {
	c.mu.Lock()
	defer c.mu.Unlock()
	c.t = c.t.Add(d)
}

// t0 is the store tests' clock at the start of each test: PHASECAST_TEST_NOW
// when set, else a day in March 2026.
var t0 = testclock.Or(time.Date(2026, 3, 14, 12, 0, 0, 0, time.UTC))

// newStore opens a fresh database: a file under t.TempDir(), or a new
// PostgreSQL database when PHASECAST_TEST_PG is set (testdb.Target).
func newStore(tb testing.TB) (*store.Store, *clock) {
	tb.Helper()
	c := &clock{t: t0}
	s, err := store.Open(context.Background(), testdb.Target(tb, "phasecast.db"),
		c.now, store.WithPasswordParams(fastPasswords))
	if err != nil {
		tb.Fatalf("Open: %v", err)
	}
	tb.Cleanup(func() {
		if err := s.Close(); err != nil {
			tb.Errorf("Close: %v", err)
		}
	})
	return s, c
}

// world is a small team set-up shared by many tests.
type world struct {
	s                            *store.Store
	clk                          *clock
	owner, editor, viewer, other store.Actor
	team, otherTeam              store.Team
	site                         store.SiteRecord
	list                         store.TargetList
	target                       store.StoredTarget
}

func signIn(tb testing.TB, s *store.Store, email, name string) store.Actor {
	tb.Helper()
	ctx := context.Background()
	if _, err := s.CreateUser(ctx, store.NewUser{Email: email, Name: name}); err != nil {
		tb.Fatalf("CreateUser %s: %v", email, err)
	}
	link, err := s.CreateSignInLink(ctx, email, time.Hour)
	if err != nil {
		tb.Fatalf("CreateSignInLink: %v", err)
	}
	_, sess, err := s.RedeemSignInLink(ctx, link)
	if err != nil {
		tb.Fatalf("RedeemSignInLink: %v", err)
	}
	a, err := s.SessionActor(ctx, sess)
	if err != nil {
		tb.Fatalf("SessionActor: %v", err)
	}
	return a
}

func invite(tb testing.TB, s *store.Store, owner store.Actor, teamID int64, role store.Role, who store.Actor) {
	tb.Helper()
	ctx := context.Background()
	_, tok, err := s.CreateInvitation(ctx, owner, teamID, role, time.Hour, "")
	if err != nil {
		tb.Fatalf("CreateInvitation: %v", err)
	}
	if _, err := s.AcceptInvitation(ctx, who, tok); err != nil {
		tb.Fatalf("AcceptInvitation: %v", err)
	}
}

func newWorld(tb testing.TB) *world {
	tb.Helper()
	ctx := context.Background()
	s, c := newStore(tb)
	w := &world{s: s, clk: c}
	w.owner = signIn(tb, s, "owner@example.org", "Orla Owner")
	w.editor = signIn(tb, s, "editor@example.org", "Eddi Editor")
	w.viewer = signIn(tb, s, "viewer@example.org", "Vic Viewer")
	w.other = signIn(tb, s, "other@example.org", "Otto Other")
	var err error
	if w.team, err = s.CreateTeam(ctx, w.owner, "Binary Lab"); err != nil {
		tb.Fatal(err)
	}
	if w.otherTeam, err = s.CreateTeam(ctx, w.other, "Elsewhere"); err != nil {
		tb.Fatal(err)
	}
	invite(tb, s, w.owner, w.team.ID, store.RoleEditor, w.editor)
	invite(tb, s, w.owner, w.team.ID, store.RoleViewer, w.viewer)
	if w.site, err = s.CreateSite(ctx, w.owner, w.team.ID, siteInput("Test Peak")); err != nil {
		tb.Fatal(err)
	}
	if w.list, err = s.CreateList(ctx, w.owner, w.team.ID, store.ListInput{Name: "Main"}); err != nil {
		tb.Fatal(err)
	}
	if w.target, err = s.CreateTarget(ctx, w.owner, w.list.ID, targetInput("PCX J0001+0001", 10, 20)); err != nil {
		tb.Fatal(err)
	}
	return w
}

func siteInput(name string) store.SiteInput {
	return store.SiteInput{
		Name: name, Site: ephem.Site{LatDeg: 31.5, LonEastDeg: -110.2, ElevM: 2400}, Zone: "America/Phoenix",
		Horizon:     []planner.HorizonPoint{{AzDeg: 0, AltDeg: 5}, {AzDeg: 90, AltDeg: 12}},
		Constraints: planner.DefaultConstraints(),
	}
}

func targetInput(name string, ra, dec float64) store.TargetInput {
	t0, err := store.ParseEpoch("2460000.1234567890123", ephem.StdBJDTDB, ephem.FormJD)
	if err != nil {
		panic(err)
	}
	return store.TargetInput{
		Target: planner.Target{
			Name: name, RADeg: ra, DecDeg: dec, Priority: 2,
			Ephem: ephem.Ephemeris{T0ErrDays: 1e-5, PeriodDays: 0.1234, PeriodErr: 1e-8, Convention: ephem.ConvInferiorConjunction},
			Goals: []planner.Goal{{Center: 0.25, HalfWidth: 0.05, ExposureS: 120, OverheadS: 10}},
			Tags:  []string{"eclipsing"},
		},
		T0: t0,
	}
}

// wantCode fails unless err carries the store error code.
func wantCode(tb testing.TB, err error, code string) {
	tb.Helper()
	if got := store.ErrorCode(err); got != code {
		tb.Fatalf("error code = %q (%v), want %q", got, err, code)
	}
}

func asStoreError(err error) *store.Error {
	var e *store.Error
	if errors.As(err, &e) {
		return e
	}
	return nil
}
