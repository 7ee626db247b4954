#!/usr/bin/env bash
# Regenerates the examples of docs/api.md against a real server: builds
# phasecast, starts it on a fresh database (the demo scenario), signs in with
# the printed one-time link, makes an API token on the account page, then
# runs every example and prints them as Markdown. Needs curl and jq.
#   docs/api-examples.sh > /tmp/examples.md
set -euo pipefail
work=$(mktemp -d)
go build -o "$work/phasecast" ./cmd/phasecast
"$work/phasecast" serve --addr 127.0.0.1:8099 --db "$work/p.db" >"$work/out.txt" 2>"$work/log.txt" &
pid=$!
trap 'kill $pid; rm -rf "$work"' EXIT
for _ in $(seq 50); do grep -q serving "$work/out.txt" && break; sleep 0.2; done
link=$(grep -o 'http://[^ ]*login/link/[^ ]*' "$work/out.txt")
curl -s -c "$work/jar" -b "$work/jar" -X POST -H 'Sec-Fetch-Site: same-origin' "$link" -o /dev/null
export TOKEN=$(curl -s -c "$work/jar" -b "$work/jar" -X POST -H 'Sec-Fetch-Site: same-origin' --data 'token_name=docs&ttl_days=30' \
  http://127.0.0.1:8099/account/tokens | grep -o 'data-testid="new-token">[^<]*' | sed 's/.*>//')
export B=http://127.0.0.1:8099
cd "$work"
cat >newtarget.json <<'JSON'
{
  "name": "PCX J1122+3344",
  "ra_deg": 170.512,
  "dec_deg": 33.741,
  "priority": 2,
  "tags": ["api", "eclipsing"],
  "ephemeris": {
    "t0": "2460612.4471825",
    "t0_standard": "BJD_TDB",
    "t0_convention": "inferior_conjunction",
    "t0_err_days": 0.00002,
    "period_days": 0.0853127,
    "period_err_days": 0.0000003
  },
  "goals": [
    {"event": "quadratures", "phase_halfwidth": 0.04, "exposure_s": 120, "overhead_s": 8},
    {"phase": 0.0, "phase_halfwidth": 0.03, "exposure_s": 60, "overhead_s": 8, "n_exposures": 6}
  ]
}
JSON
tgt=$(curl -s -H "Authorization: Bearer $TOKEN" $B/api/v1/lists/1/targets | jq '.targets[] | select(.name=="PCX J0814-1133") | .id')
date=$(date -u -d '+2 days' +%F)
week=$(date -u -d '+9 days' +%F)
ex() {
  printf '\n### %s\n\n```console\n$ %s\n' "$1" "$2"
  bash -c "$2" 2>&1
  printf '```\n'
}
ex "Your teams" 'curl -s -H "Authorization: Bearer $TOKEN" $B/api/v1/teams'
ex "The team's lists" 'curl -s -H "Authorization: Bearer $TOKEN" $B/api/v1/lists'
ex "A list's targets (the first one shown)" 'curl -s -H "Authorization: Bearer $TOKEN" $B/api/v1/lists/1/targets | jq "{list, first: .targets[0]}"'
ex "One target" "curl -s -H \"Authorization: Bearer \$TOKEN\" \$B/api/v1/targets/$tgt | jq '{id, version, name, ra_deg, dec_deg, ephemeris: {t0: .ephemeris.t0, t0_standard: .ephemeris.t0_standard, period_days: .ephemeris.period_days}}'"
ex "Create a target" 'cat newtarget.json; curl -s -X POST -H "Authorization: Bearer $TOKEN" -H "Content-Type: application/json" --data @newtarget.json -D - $B/api/v1/lists/1/targets -o created.json | grep -E "^HTTP|^Location"; jq "{id, version, name, ephemeris}" created.json'
ex "Update it: read, change, send back with its version" 'jq ".priority = 1 | .notes = \"raised after the new spectra\"" created.json > edit.json; curl -s -X PUT -H "Authorization: Bearer $TOKEN" -H "Content-Type: application/json" --data @edit.json $B/api/v1/targets/12 | jq "{id, version, priority, notes}"'
ex "A stale version is refused, with the current target" 'curl -s -o stale.json -w "HTTP %{http_code}\n" -X PUT -H "Authorization: Bearer $TOKEN" -H "Content-Type: application/json" --data @edit.json $B/api/v1/targets/12; jq "{error, current: {version: .current.version, priority: .current.priority, notes: .current.notes}}" stale.json'
ex "Bad values: every field named" 'jq ".dec_deg = 95 | .goals[0].phase_halfwidth = 0.7" newtarget.json | curl -s -w "HTTP %{http_code}\n" -X POST -H "Authorization: Bearer $TOKEN" -H "Content-Type: application/json" --data @- $B/api/v1/lists/1/targets'
ex "Plan a night" "curl -s -H \"Authorization: Bearer \$TOKEN\" \"\$B/api/v1/night?date=$date\" | jq '{site, date, night: {nautical_dusk: .night.nautical_dusk, nautical_dawn: .night.nautical_dawn}, n_blocks: (.blocks | length), first_block: .blocks[0], n_unscheduled: (.unscheduled | length), first_unscheduled: .unscheduled[0]}'"
ex "Queue windows of one target over a week" "curl -s -H \"Authorization: Bearer \$TOKEN\" \"\$B/api/v1/windows?t=$tgt&from=$date&to=$week\" | jq '{site, from, to, n: (.windows | length), first: .windows[0]}'"
ex "Queue windows of one goal of that target" "curl -s -H \"Authorization: Bearer \$TOKEN\" \"\$B/api/v1/windows?t=$tgt&from=$date&to=$week&goal=2\" | jq '{site, from, to, goal, n: (.windows | length), first: .windows[0]}'; curl -s -w \"HTTP %{http_code}\\n\" -H \"Authorization: Bearer \$TOKEN\" \"\$B/api/v1/windows?t=$tgt&from=$date&to=$week&goal=3\""
ex "The team's runs" 'curl -s -H "Authorization: Bearer $TOKEN" $B/api/v1/runs'
ex "Plan a run (the first night is over) and save the plan" 'curl -s -X POST -H "Authorization: Bearer $TOKEN" "$B/api/v1/runs/1/plan?past=1" | jq "{run, past_nights, objective, nights: [.nights[] | {date, past, blocks: (.blocks | length)}]}"'
ex "Its coverage, one target" 'curl -s -H "Authorization: Bearer $TOKEN" $B/api/v1/runs/1/coverage | jq "{run, made_at, first: (.targets[0] | {target, goals: [.goals[] | {phase_goal, event, need_exposures, need_nights, observed, planned, nights_met, status}], best_nights})}"'
ex "Its predicted precision (RV goals and timings)" 'curl -s -H "Authorization: Bearer $TOKEN" $B/api/v1/runs/1/plan | jq "[.precision[] | {target, rv: (.rv | if . then {model, k_kms, sigma_v_kms, want_rel_k, after_plan: (.after_plan | {n_exposures, sigma_k_kms, rel_k}), exposures_needed_after_plan} else null end), timing: (.timing | if . then {planned_timings, sigma_p_days_now: .now.sigma_p_days, sigma_p_days_after_plan: .after_plan.sigma_p_days} else null end)}] | .[0:3]"'
ex "Delete a target (with its version)" 'curl -s -o /dev/null -w "HTTP %{http_code}\n" -X DELETE -H "Authorization: Bearer $TOKEN" "$B/api/v1/targets/12?version=2"'
ex "Without a token" 'curl -s -w "HTTP %{http_code}\n" $B/api/v1/lists'
