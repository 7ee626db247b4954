package main

import (
	"context"
	"fmt"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/chromedp"
)

// TestBrowserObserverTrial walks, in headless Chromium against the real
// server, what an observer trial found broken: the horizon preview shades
// the blocked sky (the browser's own point-in-fill on the drawn mask), a
// bad constraint shows its error without opening anything, Tonight follows
// the run's saved plan with its marks, and a lost night stays over across
// replans. Without Chromium it skips, except under CI=true.
func TestBrowserObserverTrial(t *testing.T) {
	needChromium(t)
	shots := t.TempDir()
	app := startServe(t, filepath.Join(t.TempDir(), "phasecast.db"))
	defer func() {
		if err := app.stop(); err != nil {
			t.Errorf("graceful shutdown: %v", err)
		}
	}()
	if app.link == "" {
		t.Fatalf("no sign-in link printed:\n%s", app.stdout.String())
	}
	ctx := newBrowser(t)
	step := func(name string, actions ...chromedp.Action[chromedp.Void]) {
		t.Helper()
		sctx, cancel := context.WithTimeout(ctx, 90*time.Second)
		defer cancel()
		if err := chromedp.Do(sctx, actions...); err != nil {
			saveShot(t, ctx, shots, "failed-"+name+".png")
			t.Fatalf("%s: %v", name, err)
		}
	}
	eval := func(name, js string) string {
		t.Helper()
		v, err := chromedp.Run(ctx, chromedp.Evaluate[string](js))
		if err != nil {
			saveShot(t, ctx, shots, "failed-"+name+".png")
			t.Fatalf("%s: %v", name, err)
		}
		return v
	}
	// clickAndLoad clicks css and waits until a new page whose URL holds
	// want has loaded (a step's WaitVisible alone may match the old page).
	clickAndLoad := func(name, css, want string) {
		t.Helper()
		step(name, chromedp.Evaluate[chromedp.Void](`window.stale = true`), chromedp.Click(chromedp.CSS(css)))
		deadline := time.Now().Add(90 * time.Second)
		for {
			done, err := chromedp.Run(ctx, chromedp.Evaluate[bool](fmt.Sprintf(`!window.stale && document.readyState === 'complete' && location.href.includes(%q)`, want)))
			if err == nil && done {
				return
			}
			if time.Now().After(deadline) {
				saveShot(t, ctx, shots, "failed-"+name+".png")
				t.Fatalf("%s: no page with %q loaded within 90 s", name, want)
			}
			time.Sleep(100 * time.Millisecond)
		}
	}
	step("sign in", chromedp.Navigate(app.link), chromedp.Click(chromedp.CSS(`[data-testid=link-signin]`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=whoami]`)))

	// 1. The horizon preview: the browser's fill test on the drawn mask.
	step("new site", chromedp.Navigate(app.base+"/sites/new"), chromedp.WaitVisible(chromedp.CSS(`[data-testid=field-horizon]`)),
		chromedp.Evaluate[chromedp.Void](`(() => {
			const set = (n, v) => { document.querySelector('[name="' + n + '"]').value = v; };
			set('name', 'Preview ridge'); set('lat', '-30.2'); set('lon', '-70.7'); set('elev', '2200'); set('zone', 'America/Santiago');
			set('horizon', '0 20\n90 30\n180 20\n270 40');
		})()`),
		chromedp.Click(chromedp.CSS(`[data-testid=horizon-preview-submit]`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=horizon-preview] path.mask`)))
	// The preview is 280 px: centre 140, horizon radius 116 (web/chart).
	fill := eval("mask fill", `(() => {
		const p = document.querySelector('[data-testid=horizon-preview] path.mask');
		const at = (az, alt) => { const r = 116 * (90 - alt) / 90, a = az * Math.PI / 180;
			const q = p.ownerSVGElement.createSVGPoint(); q.x = 140 + r * Math.sin(a); q.y = 140 - r * Math.cos(a); return p.isPointInFill(q) ? 'filled' : 'clear'; };
		return [at(0, 90), at(0, 45), at(0, 10), at(90, 15), at(270, 30), at(270, 60)].join(' ');
	})()`)
	if want := "clear clear filled filled filled clear"; fill != want {
		t.Errorf("zenith, above N, below N, below E, below W, above W: %s, want %s", fill, want)
	}
	step("show preview", chromedp.Evaluate[chromedp.Void](`document.querySelector('[data-testid=horizon-preview]').scrollIntoView()`))
	saveShot(t, ctx, shots, "horizon.png")

	// 2. A bad constraint: the summary at the top and the field's message,
	// both visible without opening the Constraints box.
	step("bad constraint", chromedp.Navigate(app.base+"/night?max_airmass=0.5&min_alt=high"),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=error-summary]`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=err-max_airmass]`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=err-min_alt]`)))
	if sum := text(t, ctx, `[data-testid=error-summary]`); !strings.Contains(sum, "Maximum airmass") || !strings.Contains(sum, "Minimum altitude") {
		t.Errorf("the summary does not list both fields: %q", sum)
	}
	saveShot(t, ctx, shots, "night-errors.png")

	// Plan the demo run, whose nights hold tonight.
	step("open run", chromedp.Navigate(app.base+"/runs"), chromedp.Click(chromedp.CSS(`[data-testid=runs] a`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=optimize]`)))
	clickAndLoad("plan run", `[data-testid=optimize]`, "m=run-saved")
	runURL := eval("run url", `location.pathname`)

	// 3. Tonight follows the saved plan.
	step("tonight", chromedp.Navigate(app.base+"/tonight"), chromedp.WaitVisible(chromedp.CSS(`[data-testid=tonight-source]`)))
	if src := text(t, ctx, `[data-testid=tonight-source]`); !strings.Contains(src, "Following the saved plan") {
		t.Fatalf("Tonight does not follow the run's saved plan: %q", src)
	}
	m := regexp.MustCompile(`night of (\d{4}-\d{2}-\d{2})`).FindStringSubmatch(text(t, ctx, `[data-testid=clock]`))
	if m == nil {
		t.Fatal("Tonight does not name its night")
	}
	tonight := m[1]
	// Mark tonight's first unmarked block lost on the run page.
	step("run page", chromedp.Navigate(app.base+runURL), chromedp.WaitVisible(chromedp.CSS(`[data-testid=optimize]`)))
	lost := eval("find tonight's block", fmt.Sprintf(`(() => {
		const h = Array.from(document.querySelectorAll('h3')).find(h => h.textContent.trim().startsWith(%q));
		let el = h && h.nextElementSibling;
		while (el && el.tagName !== 'H3' && !el.querySelector('[data-testid=mark-lost]')) { el = el.nextElementSibling; }
		if (!el || el.tagName === 'H3') { return ''; }
		const b = el.querySelector('[data-testid=mark-lost]');
		const row = b.closest('tr');
		const span = row.cells[2].textContent.trim();
		b.setAttribute('data-pick', '1');
		return row.cells[0].textContent.trim() + '|' + span;
	})()`, tonight))
	if lost == "" {
		t.Logf("no unmarked block on tonight's night (%s) of the demo run at this hour: the mark is not walked", tonight)
	} else {
		clickAndLoad("mark lost", `[data-pick="1"]`, "m=marked")
		step("tonight after the mark", chromedp.Navigate(app.base+"/tonight"), chromedp.WaitVisible(chromedp.CSS(`[data-testid=tonight-source]`)))
		if src := text(t, ctx, `[data-testid=tonight-source]`); !regexp.MustCompile(`\d+ blocks? marked done or lost`).MatchString(src) {
			t.Errorf("Tonight does not say marked blocks are left out: %q", src)
		}
		span := strings.SplitN(lost, "|", 2)[1]
		shown := eval("now and next", `Array.from(document.querySelectorAll('[data-testid=observe-now],[data-testid=observe-next]')).map(e => e.textContent).join(' ')`)
		if strings.Contains(shown, span) {
			t.Errorf("Tonight still shows the lost block %s: %q", lost, shown)
		}
		t.Logf("marked %s lost; Tonight now shows %q", lost, shown)
		saveShot(t, ctx, shots, "tonight.png")
	}

	// 9. The whole first night lost, then two replans: it stays over.
	step("whole night lost", chromedp.Navigate(app.base+runURL), chromedp.WaitVisible(chromedp.CSS(`[data-testid=optimize]`)))
	if n, _ := chromedp.Run(ctx, chromedp.Evaluate[int](`document.querySelectorAll('[data-testid=mark-night-lost]').length`)); n > 0 {
		clickAndLoad("lose a night", `[data-testid=mark-night-lost]`, "m=marked")
	}
	past := func() string {
		t.Helper()
		return eval("past box", `document.querySelector('[data-testid=field-past]').value`)
	}
	before := past()
	t.Logf("Nights already over: %s", before)
	if before == "0" {
		t.Errorf("after losing the first night the Nights already over box says 0")
	}
	for i := range 2 {
		clickAndLoad(fmt.Sprintf("replan %d", i+1), `[data-testid=optimize]`, "m=run-saved")
		if got := past(); got != before {
			t.Errorf("after replan %d the box says %s nights over, before %s", i+1, got, before)
		}
		if over := eval("nights over", `Array.from(document.querySelectorAll('h3')).filter(h => h.textContent.includes('(over)')).length + ''`); over == "0" {
			t.Errorf("after replan %d no night is shown over", i+1)
		}
	}
	saveShot(t, ctx, shots, "run-replanned.png")
	t.Logf("screenshots in %s", shots)
}
