package web

import (
	"fmt"
	"strings"
	"sync"
	"time"

	"phasecast/planner"
)

// planCache keeps recently planned nights, so that a night's exports and
// printed sheet, opened right after its page, and the Tonight page's
// minutely refresh do not plan the same night again. The key holds every
// input of the plan (site and targets with their versions, the night, the
// constraints and options), so a change anywhere misses the cache.
type planCache struct {
	mu      sync.Mutex
	entries map[string]cachedPlan
}

type cachedPlan struct {
	plan   *planner.Plan
	events planner.NightEvents
	at     time.Time
}

const (
	planCacheSize = 32
	planCacheTTL  = 10 * time.Minute
)

// key describes every input of a night's plan.
func (n *night) key() string {
	var b strings.Builder
	opt := n.req.Options
	opt.Telescope = nil // a pointer: its value is written below, not its address
	fmt.Fprintf(&b, "site %d v%d|%s|%v|%v|%+v|%+v|", n.site.ID, n.site.Version, n.q.date, n.req.From, n.req.To, n.req.Constraints, opt)
	if t := n.req.Options.Telescope; t != nil {
		fmt.Fprintf(&b, "telescope %+v|", *t)
	}
	if n.req.Instrument != nil {
		fmt.Fprintf(&b, "instrument %q|", n.req.Instrument.Name)
	}
	for _, t := range n.targets {
		fmt.Fprintf(&b, "%d v%d,", t.ID, t.Version)
	}
	return b.String()
}

func (c *planCache) get(key string, now time.Time) (cachedPlan, bool) {
	c.mu.Lock()
	defer c.mu.Unlock()
	e, ok := c.entries[key]
	if !ok || now.Sub(e.at) > planCacheTTL || now.Before(e.at) {
		return cachedPlan{}, false
	}
	return e, true
}

func (c *planCache) put(key string, e cachedPlan) {
	c.mu.Lock()
	defer c.mu.Unlock()
	if c.entries == nil {
		c.entries = map[string]cachedPlan{}
	}
	if len(c.entries) >= planCacheSize {
		oldest := ""
		for k, v := range c.entries {
			if oldest == "" || v.at.Before(c.entries[oldest].at) {
				oldest = k
			}
		}
		delete(c.entries, oldest)
	}
	c.entries[key] = e
}
