package report

import (
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/emulation"
	"github.com/chromedp/cdproto/page"
	"github.com/chromedp/chromedp"
	"github.com/trussfleet/trussfleet/screening/floor"
)

// browser is a headless Chromium with what its pages wrote to the console.
type browser struct {
	ctx     context.Context
	mu      sync.Mutex
	console []chromedp.ConsoleMessage
	dialogs []string
}

// startBrowser starts Debian's chromium, headless and kept off the network. Without the
// browser the test skips, except in CI, where it fails.
func startBrowser(t *testing.T) *browser {
	t.Helper()
	path, err := exec.LookPath("chromium")
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("chromium is needed for the report's browser test and is not installed: %v", err)
		}
		t.Skip("chromium is not installed (CI installs it)")
	}
	parent, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	t.Cleanup(cancel)
	opts := append(chromedp.DefaultExecAllocatorOptions[:],
		chromedp.ExecPath(path),
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.NoFirstRun,
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1280, 1600),
	)
	actx, cancelA := chromedp.NewExecAllocator(parent, opts...)
	t.Cleanup(cancelA)
	ctx, cancelC := chromedp.NewContext(actx)
	t.Cleanup(cancelC)
	b := &browser{ctx: ctx}
	messages := chromedp.Console(ctx)
	dialogs := chromedp.Events(ctx, page.JavascriptDialogOpening)
	go func() {
		for m, err := range messages {
			if err != nil {
				return
			}
			b.mu.Lock()
			b.console = append(b.console, m)
			b.mu.Unlock()
		}
	}()
	go func() {
		for d, err := range dialogs {
			if err != nil {
				return
			}
			b.mu.Lock()
			b.dialogs = append(b.dialogs, d.Message)
			b.mu.Unlock()
			// Dismiss it, so that the page goes on and the test can report it.
			_, _ = chromedp.Call(ctx, page.HandleJavaScriptDialog, page.HandleJavaScriptDialogParams{Accept: false})
		}
	}()
	return b
}

func (b *browser) do(t *testing.T, steps ...chromedp.Action[chromedp.Void]) {
	t.Helper()
	if err := chromedp.Do(b.ctx, steps...); err != nil {
		t.Fatal(err)
	}
}

func eval[T any](t *testing.T, b *browser, js string) T {
	t.Helper()
	v, err := chromedp.Run(b.ctx, chromedp.Evaluate[T](js))
	if err != nil {
		t.Fatalf("%s: %v", js, err)
	}
	return v
}

// checkConsole fails the test for every error or exception the pages wrote, and for every
// dialog they opened.
func (b *browser) checkConsole(t *testing.T) {
	t.Helper()
	// A round trip, so that messages sent before it have arrived.
	_ = eval[int](t, b, "1")
	time.Sleep(100 * time.Millisecond)
	b.mu.Lock()
	defer b.mu.Unlock()
	for _, m := range b.console {
		if m.Type == "error" || m.IsException() {
			t.Errorf("console %s at %s:%d: %s", m.Type, m.URL, m.Line, m.Text)
		}
	}
	for _, d := range b.dialogs {
		t.Errorf("a page opened a dialog: %q", d)
	}
}

// printFits checks, with print media and a viewport as wide as the printable width of A4
// and of Letter (page width less the 11 mm side margins of the style sheet; landscape: the
// sheets' lengths), that nothing sticks out sideways.
func printFits(t *testing.T, b *browser, what string, landscape bool) {
	t.Helper()
	if _, err := chromedp.Call(b.ctx, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{Media: "print"}); err != nil {
		t.Fatal(err)
	}
	const pxPerMM = 96 / 25.4 // CSS pixels per millimetre
	for _, paper := range []struct {
		name    string
		widthMM float64
	}{{"A4", 210}, {"Letter", 215.9}} {
		if landscape {
			paper.widthMM = map[string]float64{"A4": 297, "Letter": 279.4}[paper.name]
		}
		w := int64((paper.widthMM - 22) * pxPerMM)
		b.do(t, chromedp.EmulateViewport(w, 1000))
		if sw := eval[int64](t, b, "document.documentElement.scrollWidth"); sw > w {
			t.Errorf("%s printed on %s: content %d px wide, printable width %d px", what, paper.name, sw, w)
		}
	}
	if _, err := chromedp.Call(b.ctx, emulation.SetEmulatedMedia, emulation.SetEmulatedMediaParams{}); err != nil {
		t.Fatal(err)
	}
	b.do(t, chromedp.EmulateViewport(1280, 1600))
}

func screenshot(t *testing.T, b *browser, name string) {
	t.Helper()
	png, err := chromedp.Run(b.ctx, chromedp.CaptureScreenshot())
	if err != nil {
		t.Fatal(err)
	}
	// Kept with go test -artifacts; docs/ holds the copies the README shows.
	if err := os.WriteFile(filepath.Join(t.ArtifactDir(), name), png, 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestReportInBrowser opens the report of the invented demo fleet in headless Chromium.
func TestReportInBrowser(t *testing.T) {
	f := demoFleet(t, 40)
	dir := filepath.Join(t.TempDir(), "report")
	if err := WriteSite(dir, f.Run, f.Rows, f.bridge); err != nil {
		t.Fatal(err)
	}
	b := startBrowser(t)
	b.do(t, chromedp.EmulateViewport(1280, 1600), chromedp.Navigate("file://"+filepath.Join(dir, "index.html")))

	if n := eval[int](t, b, `document.querySelectorAll("#ranked tbody tr").length`); n != len(f.Rows) {
		t.Errorf("index shows %d rows, want one per screened bridge (%d)", n, len(f.Rows))
	}
	screenshot(t, b, "report-index.png")

	// Sorting by proposed RF (column 10): ascending, then descending; empty values last.
	sorted := func() []string {
		return eval[[]string](t, b, `(document.querySelector("#ranked thead th:nth-child(10) button").click(),
			Array.from(document.querySelectorAll("#ranked tbody tr"), r => r.cells[9].getAttribute("data-sort")))`)
	}
	for _, asc := range []bool{true, false} {
		keys := sorted()
		prev, empty := 0.0, false
		for i, k := range keys {
			if k == "" {
				empty = true
				continue
			}
			v, err := strconv.ParseFloat(k, 64)
			if err != nil || empty {
				t.Fatalf("sort keys %v: %q at %d (a number after an empty value, or not a number)", keys, k, i)
			}
			if i > 0 && ((asc && v < prev) || (!asc && v > prev)) {
				t.Errorf("after sorting (ascending %v) row %d has RF %v after %v", asc, i, v, prev)
			}
			prev = v
		}
	}
	printFits(t, b, "index", true)

	var first string
	labels := 0
	for _, r := range f.Rows {
		if !hasPage(r) {
			continue
		}
		d := f.Bridges[r.BridgeID]
		b.do(t, chromedp.Navigate("file://"+filepath.Join(dir, "bridge-"+r.BridgeID+".html")))
		// The elevation draws the truss members; floor elements are in the floor plan.
		trussMembers := 0
		for _, m := range d.Members {
			if _, _, ok := floor.ResultEffect(m.Label); !ok {
				trussMembers++
			}
		}
		if n := eval[int](t, b, `document.querySelectorAll("svg.elevation path.member").length`); n != trussMembers {
			t.Errorf("%s: elevation has %d member paths, the bridge %d members", r.BridgeID, n, trussMembers)
		}
		flagged := 0
		for _, m := range d.Members {
			if len(m.Flags) > 0 {
				flagged++
			}
		}
		if n := eval[int](t, b, `document.querySelectorAll("section.member svg.il").length`); n != flagged {
			t.Errorf("%s: %d influence-line drawings for %d flagged members", r.BridgeID, n, flagged)
		}
		// The labels as the browser sets them: no two meet, and none meets a joint name.
		labels += eval[int](t, b, `document.querySelectorAll("svg.elevation text.mlabel").length`)
		if hits := eval[[]string](t, b, `(() => {
			const ls = Array.from(document.querySelectorAll("svg.elevation text.mlabel"));
			const all = ls.concat(Array.from(document.querySelectorAll("svg.elevation text.joint")));
			const bb = all.map(e => e.getBBox());
			const out = [];
			for (let i = 0; i < ls.length; i++) for (let k = i + 1; k < all.length; k++) {
				const a = bb[i], c = bb[k];
				if (a.x < c.x + c.width && c.x < a.x + a.width && a.y < c.y + c.height && c.y < a.y + a.height)
					out.push(all[i].textContent + " / " + all[k].textContent);
			}
			return out;
		})()`); len(hits) > 0 {
			t.Errorf("%s: elevation texts overlap: %v", r.BridgeID, hits)
		}
		if first == "" {
			first = r.BridgeID
			screenshot(t, b, "report-bridge.png")
			printFits(t, b, "bridge page "+r.BridgeID, false)
		}
	}
	if first == "" {
		t.Fatal("the demo fleet flags no bridge")
	}
	if labels == 0 {
		t.Error("no elevation carries a member label: the overlap check above checked nothing")
	}
	b.checkConsole(t)
}

// TestEscapedTextInBrowser shows that a bridge named like a script is shown as text and run
// as nothing.
func TestEscapedTextInBrowser(t *testing.T) {
	const name = `<script>alert(1)</script>`
	in := pratt48(t, "NER-90009", name, 0.9)
	in.Line = `"><img src=x onerror=alert(2)>`
	f := screenFleet(t, []invented{in})
	dir := filepath.Join(t.TempDir(), "report")
	if err := WriteSite(dir, f.Run, f.Rows, f.bridge); err != nil {
		t.Fatal(err)
	}
	b := startBrowser(t)
	for _, p := range []string{"index.html", "bridge-NER-90009.html"} {
		b.do(t, chromedp.Navigate("file://"+filepath.Join(dir, p)))
		got := eval[[]string](t, b, `[document.body.textContent.includes(`+strconv.Quote(name)+`), document.querySelectorAll("img, body script:not(:last-of-type)").length]`+".map(String)")
		if got[0] != "true" || got[1] != "0" {
			t.Errorf("%s: name shown as text %s, injected elements %s", p, got[0], got[1])
		}
	}
	b.checkConsole(t)
}
