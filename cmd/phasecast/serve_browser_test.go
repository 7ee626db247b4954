package main

import (
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"github.com/chromedp/cdproto/browser"
	"github.com/chromedp/cdproto/emulation"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"

	"phasecast/planner/export/exporttest"
)

// chromiumPath is Debian's headless-capable browser.
const chromiumPath = "/usr/bin/chromium"

// e2eTargetsCSV is one invented target in the plan command's CSV format,
// up in the evening sky of the demo site in any season only by luck: the
// test checks the import, not that this target gets a block.
const e2eTargetsCSV = "name,ra,dec,t0_bjd_tdb,period_days,phases,phase_halfwidth,exposure_s,overhead_s,priority\n" +
	"Browser test binary BT-1,07:12:30.0,+21:45:00,2460500.123456,0.0812345,0.25;0.75,0.05,120,10,1\n"

// TestBrowserEndToEnd drives the real server with headless Chromium: sign
// in with the printed one-time link, import a target CSV through the
// preview, plan a night and see its chart and blocks, download the
// iCalendar export, and open a share link signed out. Screenshots go to the
// test's temporary directory, and to $PHASECAST_SCREENSHOTS when set (the
// README's images under docs/). Without Chromium it skips, except under
// CI=true, where it fails.
func TestBrowserEndToEnd(t *testing.T) {
	needChromium(t)
	shots := t.TempDir()
	t0 := time.Now()
	app := startServe(t, filepath.Join(t.TempDir(), "phasecast.db"))
	t.Logf("%-16s %v", "server start", time.Since(t0).Round(time.Millisecond))
	defer func() {
		if err := app.stop(); err != nil {
			t.Errorf("graceful shutdown: %v", err)
		}
	}()
	if app.link == "" {
		t.Fatalf("no sign-in link printed:\n%s", app.stdout.String())
	}
	t0 = time.Now()
	ctx := newBrowser(t)
	t.Logf("%-16s %v", "browser start", time.Since(t0).Round(time.Millisecond))
	step := func(name string, actions ...chromedp.Action[chromedp.Void]) {
		t.Helper()
		start := time.Now()
		sctx, cancel := context.WithTimeout(ctx, 60*time.Second)
		defer cancel()
		if err := chromedp.Do(sctx, actions...); err != nil {
			saveShot(t, ctx, shots, "failed-"+name+".png")
			t.Fatalf("%s: %v", name, err)
		}
		t.Logf("%-16s %v", name, time.Since(start).Round(time.Millisecond))
	}

	// Sign in with the printed link: one click on the page it opens.
	step("sign in", chromedp.Navigate(app.link), chromedp.Click(chromedp.CSS(`[data-testid=link-signin]`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=whoami]`)))

	// Import a CSV through the preview.
	csvPath := filepath.Join(t.TempDir(), "targets.csv")
	if err := os.WriteFile(csvPath, []byte(e2eTargetsCSV), 0o600); err != nil {
		t.Fatal(err)
	}
	step("open import", chromedp.Navigate(app.base+"/targets"), chromedp.Click(chromedp.CSS(`[data-testid=import-link]`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=import-form]`)))
	step("preview import", chromedp.SetUploadFiles(chromedp.CSS(`[data-testid=import-file]`), []string{csvPath}),
		chromedp.Click(chromedp.CSS(`[data-testid=import-preview-submit]`)), chromedp.WaitVisible(chromedp.CSS(`[data-testid=import-preview]`)))
	preview := text(t, ctx, `[data-testid=import-preview]`)
	if !strings.Contains(preview, "BT-1") || !strings.Contains(preview, "add") {
		t.Errorf("preview does not show the new target as an add:\n%s", preview)
	}
	step("confirm import", chromedp.Click(chromedp.CSS(`[data-testid=import-confirm]`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=targets-table]`)))
	if table := text(t, ctx, `[data-testid=targets-table]`); !strings.Contains(table, "BT-1") {
		t.Errorf("the imported target is not in the table")
	}
	saveShot(t, ctx, shots, "targets.png")

	// A target's page: ephemeris, upcoming events, uncertainty, timings.
	step("target detail", chromedp.Evaluate[chromedp.Void](`location.assign(Array.from(document.querySelectorAll('[data-testid=target-row] a')).find(a => a.textContent.includes('J0814')).href)`),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=sigma-chart] svg`)))
	saveShot(t, ctx, shots, "target.png")

	// Plan a night: the demo's first night, at its site, on its list.
	step("plan", chromedp.Navigate(app.base+"/night"), chromedp.WaitVisible(chromedp.CSS(`[data-testid=night-chart] svg`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=blocks]`)))
	rows, err := chromedp.Run(ctx, chromedp.Evaluate[int](`document.querySelectorAll('[data-testid=block-row]').length`))
	if err != nil || rows == 0 {
		t.Errorf("block rows on the night page: %d (err %v), want some", rows, err)
	}
	checkNightLayout(t, ctx, step, shots, app.base+"/night")
	step("scroll to the night", chromedp.Evaluate[chromedp.Void](`document.querySelector('[data-testid=night-result] h2').scrollIntoView()`))

	// Night-vision mode: one click, remembered across pages.
	step("night vision", chromedp.Click(chromedp.CSS(`[data-testid=theme-toggle]`)),
		chromedp.Evaluate[chromedp.Void](`document.querySelector('[data-testid=night-result] h2').scrollIntoView()`))
	if dark, _ := chromedp.Run(ctx, chromedp.Evaluate[bool](`document.documentElement.classList.contains('nightmode')`)); !dark {
		t.Error("the night-vision toggle did not switch the theme")
	}
	saveShot(t, ctx, shots, "night-vision.png")
	step("day mode", chromedp.Click(chromedp.CSS(`[data-testid=theme-toggle]`)))

	// The printable night sheet: one landscape page for a night of up to 30
	// blocks (with its warnings and goals left out), and at most one more
	// for each further 45 block rows of a denser night (its text stays at
	// 7 pt or more). The demo's night depends on the date the suite runs
	// at, so both branches of the rule get exercised across dates.
	step("night sheet", chromedp.Click(chromedp.CSS(`[data-testid=night-sheet]`)), chromedp.WaitVisible(chromedp.CSS(`[data-testid=sheet]`)))
	landscape, background := true, true
	pdf, err := chromedp.Call(ctx, page.PrintToPDF, page.PrintToPDFParams{Landscape: &landscape, PrintBackground: &background, PreferCSSPageSize: &background})
	if err != nil {
		t.Fatalf("print the night sheet: %v", err)
	}
	t.Logf("night sheet: %d blocks on %d pages", rows, pdfPages(pdf.Data))
	if n, most := pdfPages(pdf.Data), 1+(max(rows-30, 0)+44)/45; n < 1 || n > most {
		t.Errorf("the printed night sheet of %d blocks has %d pages, want 1 to %d", rows, n, most)
		os.WriteFile(filepath.Join(shots, "sheet.pdf"), pdf.Data, 0o644)
		chromedp.Call(ctx, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{Media: "print"})
		chromedp.Do(ctx, chromedp.EmulateViewport(1047, 718))
		png, _ := chromedp.Run(ctx, chromedp.FullScreenshot(100))
		os.WriteFile("/tmp/sheet-print.png", png, 0o644)
		chromedp.Call(ctx, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{Media: ""})
	}
	step("back to the night", chromedp.Navigate(app.base+"/night"), chromedp.WaitVisible(chromedp.CSS(`[data-testid=export-night-ics]`)))

	// Download the iCalendar export through the browser.
	dl := t.TempDir()
	if _, err := chromedp.Call(ctx, browser.SetDownloadBehavior, browser.SetDownloadBehaviorParams{
		Behavior: browser.SetDownloadBehaviorBehaviorAllow, DownloadPath: dl}); err != nil {
		t.Fatal(err)
	}
	step("download ics", chromedp.Click(chromedp.CSS(`[data-testid=export-night-ics]`)))
	ics := waitForFile(t, dl, ".ics")
	f, err := os.Open(ics)
	if err != nil {
		t.Fatal(err)
	}
	cal, err := exporttest.ParseICal(f)
	f.Close()
	if err != nil {
		t.Fatalf("the downloaded %s does not parse: %v", filepath.Base(ics), err)
	}
	if len(cal.Events) != rows {
		t.Errorf("iCalendar has %d events, the page %d blocks", len(cal.Events), rows)
	}

	// Plan the demo run with the optimizer (progress page, then the run).
	step("plan run", chromedp.Navigate(app.base+"/runs"), chromedp.Click(chromedp.CSS(`[data-testid=runs] a`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=optimize]`)), chromedp.Click(chromedp.CSS(`[data-testid=optimize]`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=rings] svg`)),
		chromedp.Evaluate[chromedp.Void](`document.getElementById('overview').scrollIntoView()`))
	saveShot(t, ctx, shots, "run.png")

	// Make a share link of the list and open it in a signed-out browser.
	step("share", chromedp.Navigate(app.base+"/targets"), chromedp.Click(chromedp.CSS(`[data-testid=share-create]`)),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=new-share]`)))
	link := strings.TrimSpace(text(t, ctx, `[data-testid=new-share]`))
	// A fresh browser context (its own cookies) in the same browser.
	anon, cancelAnon := chromedp.NewContext(ctx, chromedp.WithNewBrowserContext())
	defer cancelAnon()
	if err := chromedp.Do(anon); err != nil {
		t.Fatalf("new browser context: %v", err)
	}
	sctx, cancel := context.WithTimeout(anon, 30*time.Second)
	defer cancel()
	if err := chromedp.Do(sctx, chromedp.Navigate(link), chromedp.WaitVisible(chromedp.CSS(`[data-testid=share-targets]`))); err != nil {
		t.Fatalf("open the share link signed out: %v", err)
	}
	if n, _ := chromedp.Run(sctx, chromedp.Evaluate[int](`document.querySelectorAll('[data-testid=whoami]').length`)); n != 0 {
		t.Error("the share page shows a signed-in user")
	}
	saveShot(t, anon, shots, "share.png")
	t.Logf("screenshots in %s", shots)
}

// firstScreen is a script that returns, for each CSS selector, why its
// element's bounding box is not inside the viewport ("" when it is).
const firstScreen = `(sels) => sels.map(s => {
	const e = document.querySelector(s);
	if (!e) return s + " missing";
	const r = e.getBoundingClientRect();
	return (r.top >= 0 && r.left >= 0 && r.bottom <= innerHeight && r.right <= innerWidth) ? "" :
		s + " at " + [r.left, r.top, r.right, r.bottom].map(Math.round).join(",") + " in " + innerWidth + "×" + innerHeight;
}).filter(x => x).join("; ")`

// checkNightLayout loads the night page at 1,400 × 900 and at a phone's
// 390 px: the next block and the chart lie in the first screen, the page
// with its details folded is at most 2.5 screens tall, and the phone view
// has no page-level horizontal scroll with the next block on its first
// screen. It writes night.png and phone.png.
func checkNightLayout(t *testing.T, ctx context.Context, step func(string, ...chromedp.Action[chromedp.Void]), shots, url string) {
	t.Helper()
	step("night 1400x900", chromedp.EmulateViewport(1400, 900), chromedp.Navigate(url),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=next-block]`)))
	out, err := chromedp.Run(ctx, chromedp.Evaluate[string]("("+firstScreen+")(['[data-testid=next-block]', '[data-testid=night-summary]', '[data-testid=night-chart] .chartbox'])"))
	if err != nil || out != "" {
		t.Errorf("at 1400×900 not on the first screen: %s (err %v)", out, err)
	}
	tall, err := chromedp.Run(ctx, chromedp.Evaluate[float64](`document.querySelectorAll('details[open]').forEach(d => d.open = false), document.scrollingElement.scrollHeight / innerHeight`))
	if err != nil || tall > 2.5 {
		t.Errorf("the night page is %.2f screens tall with its details folded, want ≤ 2.5 (err %v)", tall, err)
	}
	t.Logf("night page: %.2f screens tall at 1400×900", tall)
	saveShot(t, ctx, shots, "night.png")
	step("focus a block", chromedp.Evaluate[chromedp.Void](`document.querySelector('svg.lanes g.block').focus()`))
	if tip, _ := chromedp.Run(ctx, chromedp.Evaluate[string](`document.getElementById('chart-tip').hidden ? "" : document.getElementById('chart-tip').textContent`)); !strings.Contains(tip, "LST") || !strings.Contains(tip, "UT") {
		t.Errorf("focus on a block shows %q, want its figures", tip)
	}
	saveShot(t, ctx, shots, "night-focus.png")
	step("night 390", chromedp.EmulateViewport(390, 844, chromedp.EmulateMobile), chromedp.Navigate(url),
		chromedp.WaitVisible(chromedp.CSS(`[data-testid=next-block]`)))
	wide, err := chromedp.Run(ctx, chromedp.Evaluate[bool](`document.scrollingElement.scrollWidth <= window.innerWidth`))
	if err != nil || !wide {
		w, _ := chromedp.Run(ctx, chromedp.Evaluate[string](`document.scrollingElement.scrollWidth + " > " + innerWidth`))
		t.Errorf("at 390 px the page scrolls sideways: %s (err %v)", w, err)
	}
	out, err = chromedp.Run(ctx, chromedp.Evaluate[string]("("+firstScreen+")(['[data-testid=next-block]'])"))
	if err != nil || out != "" {
		t.Errorf("at 390 px the next block is not on the first screen: %s (err %v)", out, err)
	}
	saveShot(t, ctx, shots, "phone.png")
	step("back to the desktop", chromedp.EmulateViewport(1280, 900))
}

// needChromium skips the test when Chromium is missing, except under
// CI=true, where it fails.
func needChromium(t *testing.T) {
	t.Helper()
	if _, err := exec.LookPath(chromiumPath); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("chromium not found at %s (CI installs it: apt-get install -y chromium)", chromiumPath)
		}
		t.Skipf("skipped: chromium not found at %s", chromiumPath)
	}
}

// newBrowser starts a headless Chromium with its own profile and returns
// its context.
func newBrowser(t *testing.T) context.Context {
	t.Helper()
	opts := append(chromedp.DefaultExecAllocatorOptions[:],
		chromedp.ExecPath(chromiumPath), chromedp.NoSandbox, chromedp.DisableGPU,
		chromedp.Flag("disable-quic", true), chromedp.Flag("disable-component-update", true),
		chromedp.UserDataDir(t.TempDir()), chromedp.WindowSize(1280, 900))
	actx, cancelA := chromedp.NewExecAllocator(context.Background(), opts...)
	ctx, cancel := chromedp.NewContext(actx)
	t.Cleanup(func() { cancel(); cancelA() })
	// Start the browser and its tab on ctx itself, so that the steps' own
	// timeouts (derived contexts) do not close it.
	if err := chromedp.Do(ctx); err != nil {
		t.Fatalf("start chromium: %v", err)
	}
	return ctx
}

// text returns the text of the first element matching css.
func text(t *testing.T, ctx context.Context, css string) string {
	t.Helper()
	s, err := chromedp.Run(ctx, chromedp.Text(chromedp.CSS(css)))
	if err != nil {
		t.Fatalf("text of %s: %v", css, err)
	}
	return s
}

// saveShot writes a PNG screenshot of the browser window (1280 × 900) to
// dir and, when PHASECAST_SCREENSHOTS is set, to that directory too. A
// window, not the whole page: long tables would make it slow and large.
func saveShot(t *testing.T, ctx context.Context, dir, name string) {
	t.Helper()
	png, err := chromedp.Run(ctx, chromedp.CaptureScreenshot())
	if err != nil {
		t.Logf("screenshot %s: %v", name, err)
		return
	}
	for _, d := range []string{dir, os.Getenv("PHASECAST_SCREENSHOTS")} {
		if d == "" {
			continue
		}
		if err := os.WriteFile(filepath.Join(d, name), png, 0o644); err != nil {
			t.Errorf("save screenshot: %v", err)
		}
	}
}

// pdfPages counts the pages of a PDF: its "/Type /Page" objects (not the
// "/Type /Pages" tree nodes).
func pdfPages(pdf []byte) int {
	return len(regexp.MustCompile(`/Type\s*/Page([^s]|$)`).FindAll(pdf, -1))
}

// waitForFile waits up to 20 s for a finished download with suffix in dir.
func waitForFile(t *testing.T, dir, suffix string) string {
	t.Helper()
	// Chromium may create the file under its final name before it has
	// written all of it: wait until no partial download remains and the
	// size has stayed the same for half a second.
	deadline := time.Now().Add(20 * time.Second)
	var found string
	lastSize, stableSince := int64(-1), time.Time{}
	for time.Now().Before(deadline) {
		entries, _ := os.ReadDir(dir)
		partial := false
		found = ""
		for _, e := range entries {
			switch {
			case strings.HasSuffix(e.Name(), ".crdownload"):
				partial = true
			case strings.HasSuffix(e.Name(), suffix):
				found = filepath.Join(dir, e.Name())
			}
		}
		if found != "" && !partial {
			if fi, err := os.Stat(found); err == nil {
				if fi.Size() != lastSize {
					lastSize, stableSince = fi.Size(), time.Now()
				} else if fi.Size() > 0 && time.Since(stableSince) >= 500*time.Millisecond {
					return found
				}
			}
		}
		time.Sleep(100 * time.Millisecond)
	}
	t.Fatalf("no complete %s file downloaded into %s (last seen %q, %d bytes)", suffix, dir, found, lastSize)
	return ""
}
