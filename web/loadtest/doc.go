// Package loadtest holds reliability tests that run `phasecast serve` as a
// real child process on a real SQLite file, on the loopback interface
// only (127.0.0.1), and drive it over HTTP as browsers would:
//
//   - TestLoad: many concurrent clients mixing page views, night plans,
//     exports and version-checked writes for a fixed time; it fails on any
//     5xx, transport error, unexpected status or "database is locked", and
//     logs p50/p95/p99 latency per route, requests per second and the
//     server's memory at the end.
//   - TestCrashSafety: writes (creates, version-checked updates, all-or-
//     nothing imports) while the server is killed with SIGKILL at seeded
//     random moments and restarted on the same file; after every restart
//     PRAGMA integrity_check is ok and every acknowledged write is there.
//
// Both are slow, so they skip unless asked for by environment variables
// (go test ./... stays quick):
//
//	PHASECAST_LOAD=short go test -count=1 -run TestLoad -v ./web/loadtest/   # 5 s, 50 clients (CI)
//	PHASECAST_LOAD=full  go test -count=1 -run TestLoad -v ./web/loadtest/   # 60 s, 100 clients
//	PHASECAST_CRASH=1    go test -count=1 -run TestCrashSafety -v ./web/loadtest/
//
// Flags after the package override the defaults: -duration 30s -clients 200
// for the load test, -seed 7 -kills 20 for the crash test (also as
// PHASECAST_LOAD_DURATION, PHASECAST_LOAD_CLIENTS, PHASECAST_CRASH_SEED,
// PHASECAST_CRASH_KILLS); PHASECAST_BIN=/path/to/phasecast tests that binary
// instead of building cmd/phasecast. The results and the commands that
// produced them are recorded in docs/reliability.md. The package has no
// non-test code.
package loadtest
