package web

import (
	"testing"
	"time"

	"phasecast/planner"
	"phasecast/store"
)

func TestPlanCacheKey(t *testing.T) {
	base := func() *night {
		return &night{site: store.SiteRecord{ID: 1, Version: 3}, q: nightQuery{date: "2026-03-14"},
			targets: []store.StoredTarget{{ID: 7, Version: 2}, {ID: 9, Version: 1}},
			req:     planner.NightRequest{Constraints: planner.DefaultConstraints()}}
	}
	k0 := base().key()
	tests := []struct {
		name string
		edit func(n *night)
	}{
		{"TargetVersion", func(n *night) { n.targets[1].Version++ }},
		{"SiteVersion", func(n *night) { n.site.Version++ }},
		{"Date", func(n *night) { n.q.date = "2026-03-15" }},
		{"Constraint", func(n *night) { n.req.Constraints.MaxAirmass = 1.5 }},
		{"Fill", func(n *night) { n.req.Options.Fill = true }},
		{"TargetSet", func(n *night) { n.targets = n.targets[:1] }},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			n := base()
			tt.edit(n)
			if n.key() == k0 {
				t.Error("a changed input gives the same cache key")
			}
		})
	}
	if base().key() != k0 {
		t.Error("the same inputs give different keys")
	}
	var c planCache
	now := time.Date(2026, 3, 14, 20, 0, 0, 0, time.UTC)
	c.put(k0, cachedPlan{plan: &planner.Plan{Value: 42}, at: now})
	if e, ok := c.get(k0, now.Add(time.Minute)); !ok || e.plan.Value != 42 {
		t.Error("a fresh entry is not found")
	}
	if _, ok := c.get(k0, now.Add(planCacheTTL+time.Second)); ok {
		t.Error("an expired entry is still served")
	}
}
