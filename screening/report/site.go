package report

import (
	"bytes"
	"crypto/sha256"
	"embed"
	"encoding/base64"
	"errors"
	"fmt"
	"html/template"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"

	"github.com/trussfleet/trussfleet/internal/safetext"
	"github.com/trussfleet/trussfleet/internal/units"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/analysis"
	"github.com/trussfleet/trussfleet/screening/envelope"
	"github.com/trussfleet/trussfleet/screening/floor"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/screening/truss"
)

//go:embed assets/*.tmpl assets/style.css assets/sort.js
var assets embed.FS

// pages holds the parsed templates; the CSS and the script are parsed as templates of
// literal text, so they are written as they are.
var pages = template.Must(parsePages())

// csp allows the pages' own inline style and script (by its hash) and nothing else: no
// network, no other script, even if some text were to slip past the escaping.
var csp string

func parsePages() (*template.Template, error) {
	css, err := assets.ReadFile("assets/style.css")
	if err != nil {
		return nil, err
	}
	js, err := assets.ReadFile("assets/sort.js")
	if err != nil {
		return nil, err
	}
	t := template.New("report")
	if _, err := t.New("css").Parse(string(css)); err != nil {
		return nil, err
	}
	if _, err := t.New("js").Parse(string(js)); err != nil {
		return nil, err
	}
	if _, err := t.New("js-probe").Parse(`<script>{{template "js"}}</script>`); err != nil {
		return nil, err
	}
	if _, err := t.ParseFS(assets, "assets/*.tmpl"); err != nil {
		return nil, err
	}
	// The hash is of the script as the template writes it (html/template drops its
	// comments), which is what the browser checks.
	var probe bytes.Buffer
	if err := t.ExecuteTemplate(&probe, "js-probe", nil); err != nil {
		return nil, err
	}
	script := strings.TrimSuffix(strings.TrimPrefix(probe.String(), "<script>"), "</script>")
	sum := sha256.Sum256([]byte(script))
	csp = "default-src 'none'; style-src 'unsafe-inline'; img-src data:; script-src 'sha256-" + base64.StdEncoding.EncodeToString(sum[:]) + "'"
	return t, nil
}

// marker names the file that says a folder holds a report this package wrote, so that
// WriteSite replaces only its own output.
const marker = ".trussfleet-report"

// WriteSite writes the report of a run into dir: index.html with every row, and one page per
// bridge that is screened and flagged, its detail loaded by bridge(id). The site is built in
// a temporary folder beside dir and then put in place, so dir holds either the previous
// report or the new one, never a half-written one. dir must be absent, empty, or a report
// written before. An error from bridge stops the write and names the bridge.
func WriteSite(dir string, run Run, rows []BridgeRow, bridge func(id string) (Bridge, error)) error {
	return WriteSiteIn(dir, run, rows, bridge, units.SI)
}

// WriteSiteIn is WriteSite with lengths, forces and loads per length shown in units u,
// rounded by internal/units.
func WriteSiteIn(dir string, run Run, rows []BridgeRow, bridge func(id string) (Bridge, error), u units.System) error {
	if dir == "" {
		return errors.New("report folder: empty path")
	}
	dir = filepath.Clean(dir)
	if err := checkTarget(dir); err != nil {
		return err
	}
	parent := filepath.Dir(dir)
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return fmt.Errorf("report folder %s: %w", dir, err)
	}
	tmp, err := os.MkdirTemp(parent, "."+filepath.Base(dir)+".new-*")
	if err != nil {
		return fmt.Errorf("report folder %s: %w", dir, err)
	}
	defer os.RemoveAll(tmp) // a no-op once renamed
	if err := writeAll(tmp, run, rows, bridge, u); err != nil {
		return err
	}
	if err := os.Chmod(tmp, 0o755); err != nil {
		return err
	}
	return swap(tmp, dir)
}

func checkTarget(dir string) error {
	entries, err := os.ReadDir(dir)
	switch {
	case errors.Is(err, os.ErrNotExist):
		return nil
	case err != nil:
		return fmt.Errorf("report folder %s: %w", dir, err)
	case len(entries) == 0:
		return nil
	}
	if _, err := os.Stat(filepath.Join(dir, marker)); err != nil {
		return fmt.Errorf("report folder %s: exists and holds files that are not a trussfleet report; name a new or empty folder", dir)
	}
	return nil
}

// swap puts the new site in place of dir, keeping the old one until the new one is there.
func swap(tmp, dir string) error {
	old := ""
	if _, err := os.Stat(dir); err == nil {
		o, err := os.MkdirTemp(filepath.Dir(dir), "."+filepath.Base(dir)+".old-*")
		if err != nil {
			return err
		}
		if err := os.Remove(o); err != nil {
			return err
		}
		if err := os.Rename(dir, o); err != nil {
			return fmt.Errorf("report folder %s: moving the previous report aside: %w", dir, err)
		}
		old = o
	}
	if err := os.Rename(tmp, dir); err != nil {
		if old != "" {
			_ = os.Rename(old, dir)
		}
		return fmt.Errorf("report folder %s: %w", dir, err)
	}
	if old != "" {
		return os.RemoveAll(old)
	}
	return nil
}

func writeAll(dir string, run Run, rows []BridgeRow, bridge func(id string) (Bridge, error), u units.System) error {
	names := pageNames(rows)
	if err := writeFile(filepath.Join(dir, "index.html"), func(w io.Writer) error {
		return pages.ExecuteTemplate(w, "index.tmpl", indexPage(run, rows, names, u))
	}); err != nil {
		return err
	}
	for _, r := range rows {
		name, ok := names[r.BridgeID]
		if !ok {
			continue
		}
		b, err := bridge(r.BridgeID)
		if err != nil {
			return fmt.Errorf("bridge %s: loading its detail: %w", r.BridgeID, err)
		}
		if err := writeFile(filepath.Join(dir, name), func(w io.Writer) error {
			return pages.ExecuteTemplate(w, "bridge.tmpl", bridgePage(run, b, u))
		}); err != nil {
			return fmt.Errorf("bridge %s: %w", r.BridgeID, err)
		}
	}
	return writeFile(filepath.Join(dir, marker), func(w io.Writer) error {
		_, err := fmt.Fprintf(w, "trussfleet report of screening run %d\n", run.ID)
		return err
	})
}

// writeFile renders a page and writes it. The templates and the program's own words hold no
// bidirectional control character, so every one in a page came from the inventory: each is
// written as a visible escape (safetext.ShowBidi), in text, titles and attributes alike,
// and cannot reorder what follows it.
func writeFile(path string, render func(io.Writer) error) error {
	var buf bytes.Buffer
	if err := render(&buf); err != nil {
		return fmt.Errorf("%s: %w", filepath.Base(path), err)
	}
	page := buf.Bytes()
	if bytes.ContainsFunc(page, safetext.IsBidi) {
		page = []byte(safetext.ShowBidi(string(page)))
	}
	return os.WriteFile(path, page, 0o666) // as os.Create: the umask decides
}

// hasPage says whether a row gets a bridge page: screened, with a flag.
func hasPage(r BridgeRow) bool { return r.Status != "failed" && r.Error == "" && len(r.Flags) > 0 }

var safeName = regexp.MustCompile(`^[A-Za-z0-9][A-Za-z0-9._-]{0,80}$`)

// pageNames gives each paged bridge its file name: its ID where that is a plain file name,
// else the ID's plain characters and a hash of it.
func pageNames(rows []BridgeRow) map[string]string {
	out := map[string]string{}
	for _, r := range rows {
		if !hasPage(r) {
			continue
		}
		id := r.BridgeID
		if safeName.MatchString(id) && !strings.EqualFold(id, "index") {
			out[id] = "bridge-" + id + ".html"
			continue
		}
		plain := strings.Map(func(c rune) rune {
			if c < 128 && (c == '-' || c == '_' || c >= '0' && c <= '9' || c >= 'A' && c <= 'Z' || c >= 'a' && c <= 'z') {
				return c
			}
			return -1
		}, id)
		if len(plain) > 40 {
			plain = plain[:40]
		}
		sum := sha256.Sum256([]byte(id))
		out[id] = fmt.Sprintf("bridge-%s-%x.html", plain, sum[:5])
	}
	return out
}

type keyValue struct{ Key, Value string }

type pageBase struct {
	Title     string
	BodyClass string
	CSP       string
	Run       Run
	Caution   []string
	// Units names the units of the page's headings.
	Units unitNames
}

// unitNames are the units of a page's lengths, forces and loads per length.
type unitNames struct{ Length, Force, PerLength string }

func base(run Run, title string, u units.System) pageBase {
	return pageBase{Title: title, CSP: csp, Run: run, Caution: Caution,
		Units: unitNames{u.Name(units.Length), u.Name(units.Force), u.Name(units.PerLength)}}
}

type indexView struct {
	pageBase
	Summary  string
	FlagRows []flagRow
	Config   []keyValue
	Rows     []rowView
	// Network is the strip diagram of each line (strips.go).
	Network stripsView
}

type flagRow struct {
	Flags            []string
	Meaning          string
	Members, Bridges int
}

type rowView struct {
	Failed                                  bool
	ID, Name, Line, Href, Truss, Worst      string
	Rank, RankKey, Km, KmKey, Span, SpanKey string
	RFEx, RFExKey, RFPr, RFPrKey, RFClass   string
	Change, ChangeKey, Rise, RiseKey        string
	Unrated, UnratedKey                     string
	Flags                                   []string
	Governing, GovSense, Inspected, Error   string

	// ERating is the Cooper E rating (strips.go); the line categories are in the strips.
	ERating, ERatingKey string
	// GovCase is the governing loading case, marked where AREMA's rocking term is missing.
	GovCase string
}

func indexPage(run Run, rows []BridgeRow, names map[string]string, u units.System) indexView {
	v := indexView{pageBase: base(run, fmt.Sprintf("Screening run %d: priority list", run.ID), u)}
	v.BodyClass = "index"
	total := run.BridgesTotal
	if total == 0 {
		total = len(rows)
	}
	v.Summary = fmt.Sprintf("%d bridges screened, %d flagged, %d failed · status %s", total, run.BridgesFlagged, run.BridgesFailed, orDash(run.Status))
	bridgesPer := map[string]int{}
	var extra []string
	for _, r := range rows {
		for _, f := range r.Flags {
			bridgesPer[f]++
		}
		extra = append(extra, r.Flags...)
	}
	for k := range run.FlagCounts {
		extra = append(extra, k)
	}
	sort.Strings(extra)
	for _, f := range flagOrder(extra) {
		v.FlagRows = append(v.FlagRows, flagRow{Flags: []string{f}, Meaning: orText(flagMeaning[f], "set by the screening run"), Members: run.FlagCounts[f], Bridges: bridgesPer[f]})
	}
	v.Config = runConfig(run)
	v.Network = stripsView{Strips: drawStrips(run, rows, names), Bands: bands(run)}
	for _, r := range rows {
		v.Rows = append(v.Rows, rowOf(run, r, names[r.BridgeID], u))
	}
	return v
}

func runConfig(run Run) []keyValue {
	flag, review := thresholds(run)
	kv := []keyValue{
		{"run", fmt.Sprintf("%d (%s)", run.ID, orDash(run.Status))},
		{"started", timeText(run.StartedAt.IsZero(), run.StartedAt.UTC().Format("2006-01-02 15:04 MST"))},
		{"finished", timeText(run.FinishedAt.IsZero(), run.FinishedAt.UTC().Format("2006-01-02 15:04 MST"))},
	}
	for _, sc := range scenarioNames(run) {
		kv = append(kv, keyValue{sc + " traffic", strings.Join(run.Scenarios[sc], ", ")})
	}
	kv = append(kv,
		keyValue{"dynamic allowance", orDash(run.Dynamic)},
		keyValue{"rating method", orDash(run.Method)},
		keyValue{"equation", equation(run)},
		keyValue{"thresholds", fmt.Sprintf("exceeds below %s, review below %s, worse when more than %s %% below existing, new-reversal when the reversed force is at least %s %% of the larger, unrated members %s",
			num(flag, 2), num(review, 2), num(100*run.WorseFraction, 0), num(100*run.ReversalFraction, 0), map[bool]string{true: "flagged", false: "counted, not flagged"}[run.FlagUnrated])},
		keyValue{"program", orDash(run.ProgramVersion)},
		keyValue{"configuration hash", orDash(shortHash(run.ConfigHash))},
	)
	return kv
}

// scenarioNames lists existing and proposed first, then any others.
func scenarioNames(run Run) []string {
	var out []string
	for _, s := range []string{"existing", "proposed"} {
		if _, ok := run.Scenarios[s]; ok {
			out = append(out, s)
		}
	}
	var rest []string
	for s := range run.Scenarios {
		if s != "existing" && s != "proposed" {
			rest = append(rest, s)
		}
	}
	sort.Strings(rest)
	return append(out, rest...)
}

func timeText(zero bool, s string) string {
	if zero {
		return dash
	}
	return s
}

func orDash(s string) string { return orText(s, dash) }

func orText(s, alt string) string {
	if s == "" {
		return alt
	}
	return s
}

func rowOf(run Run, r BridgeRow, href string, u units.System) rowView {
	v := rowView{
		Failed: r.Status == "failed" || r.Error != "",
		ID:     r.BridgeID, Name: r.Name, Line: r.Line, Href: href,
		Truss: r.TrussType, Worst: orDash(r.WorstMember),
		Rank: strconv.Itoa(r.Rank), RankKey: strconv.Itoa(r.Rank),
		Km: optNum(r.ChainageKm, 3), KmKey: sortKey(r.ChainageKm),
		Span: qty(u, units.Length, r.SpanM), SpanKey: sortKey(&r.SpanM),
		RFEx: rfText(r.RFExisting), RFExKey: sortKey(r.RFExisting),
		RFPr: rfText(r.RFProposed), RFPrKey: sortKey(r.RFProposed), RFClass: rfClass(run, r.RFProposed),
		Change: pctText(r.Change), ChangeKey: sortKey(r.Change),
		Rise: pctText(&r.DemandIncrease), RiseKey: sortKey(&r.DemandIncrease),
		Flags: r.Flags, Inspected: orDash(r.LastInspected), Error: r.Error,
		Unrated: strconv.Itoa(r.Unrated), UnratedKey: strconv.Itoa(r.Unrated),
	}
	if r.Rank == 0 {
		v.Rank, v.RankKey = dash, ""
	}
	if r.Panels > 0 {
		v.Truss = fmt.Sprintf("%s, %d panels", r.TrussType, r.Panels)
	}
	if r.GoverningTrain != "" {
		v.Governing, v.GovSense = r.GoverningTrain, r.GoverningSense
	}
	v.ERating, v.ERatingKey = eText(r.ERating), sortKey(r.ERating)
	v.GovCase = CaseCell(r)
	return v
}

// unratedFact is the bridge page's line on its unrated members.
func unratedFact(run Run, n int) string {
	if n == 0 {
		return "none"
	}
	s := fmt.Sprintf("%d with dead plus live force acting in a sense with no capacity and no stored RF rated in it", n)
	if !run.FlagUnrated {
		s += " (not flagged: thresholds.flag_unrated is off)"
	}
	return s
}

func rfClass(run Run, rf *float64) string {
	switch bandOf(run, rf).Key {
	case "below":
		return "rf-below"
	case "review":
		return "rf-review"
	}
	return ""
}

type bridgeView struct {
	pageBase
	Row BridgeRow
	// Where is the bridge's chainage and rank, after its line (Row.Line), which the page
	// isolates as inventory text.
	Where      string
	Facts      []keyValue
	Problem    string
	Elevation  *elevation
	FloorPlan  *elevation // floor.go
	Bands      []band
	DeckWord   string
	MemberRows []memberRow
	Equation   string
	Sections   []section
	// SupportWord says where the bearings are (forms.go).
	SupportWord string
	// Trusses lists the members whose trusses' proposed RF differ (other_truss.go).
	Trusses []trussRow
}

type memberRow struct {
	Label, Kind, Anchor, Sense            string
	D, DKey, LMax, LMaxKey, LMin, LMinKey string
	RFEx, RFExKey, RFPr, RFPrKey, RFClass string
	Flags                                 []string
}

type section struct {
	Label, Kind, Anchor string
	Flags, Reasons      []string
	Chart               *ilChart
	Captions            []string
	Calc                []calcView
	Notes               []string
	// Fatigue draws a fatigue-flagged member's stress history and ranges (nil: none).
	Fatigue *fatigueChart
	// Unit is the unit of Calc's effects: a force, or a floor element's moment.
	Unit string
}

type calcView struct {
	Scenario, Sense, Basis          string
	Held, Cond, C, D, L, Impact, RF string
	Governs                         bool
}

func bridgePage(run Run, b Bridge, u units.System) bridgeView {
	r := b.Row
	v := bridgeView{pageBase: base(run, fmt.Sprintf("%s %s: screening run %d", r.BridgeID, r.Name, run.ID), u), Row: r, Bands: bands(run), Equation: equation(run)}
	v.BodyClass = "bridge"
	where := []string{}
	if r.ChainageKm != nil {
		where = append(where, "km "+num(*r.ChainageKm, 3))
	}
	if r.Rank > 0 {
		where = append(where, fmt.Sprintf("rank %d of %d", r.Rank, max(run.BridgesTotal, r.Rank)))
	}
	v.Where = strings.Join(where, " · ")
	p := b.Truss
	deck := orText(p.Deck, truss.Through)
	v.DeckWord = map[bool]string{true: "deck truss, deck on the top chord", false: "through truss, deck on the bottom chord"}[deck == truss.DeckTop]
	v.Facts = []keyValue{
		{"truss", fmt.Sprintf("%s, %s", orDash(p.Type), deck)},
		{"span", qty(u, units.Length, p.SpanM) + " " + u.Name(units.Length)},
		{"panels", strconv.Itoa(p.Panels)},
		{"depth", qty(u, units.Length, p.DepthM) + " " + u.Name(units.Length)},
		{"tracks", strconv.Itoa(max(b.Tracks, 1))},
		{"truss share", num(b.TrussShare, 3)},
		{"dead load", qty(u, units.PerLength, b.DeadLoadKNPerM) + " " + u.Name(units.PerLength) + " per truss"},
		{"worst member", orDash(r.WorstMember)},
		{"RF existing → proposed", rfText(r.RFExisting) + " → " + rfText(r.RFProposed)},
		{"headroom", optNum(r.Headroom, 2) + " × proposed"},
		{"unrated members", unratedFact(run, r.Unrated)},
		{"floor system", floorFact(b)},
		{"inspected", orDash(r.LastInspected)},
	}
	v.Facts = sectionFacts(v.Facts, b, u)
	v.Facts = append(v.Facts, networkFacts(r)...)
	byLabel := map[string]Member{}
	for _, m := range b.Members {
		byLabel[m.Label] = m
	}
	t, aopt, err := screening.Geometry(p, b.Table)
	var lines *analysis.Lines
	if err == nil {
		lines, err = analysis.InfluenceLines(t, aopt)
	}
	v.SupportWord = "Pin at the left bearing, roller at the right."
	if err == nil {
		v.SupportWord = supportWord(t)
	}
	if err == nil && specialForm(t) {
		v.Facts = append(v.Facts, keyValue{"form", formCaption(t, u)})
	}
	if err != nil {
		v.Problem = "The truss could not be rebuilt from its stored geometry, so it is not drawn: " + err.Error()
	} else {
		e := drawElevation(t, run, byLabel, u)
		v.Elevation = &e
		v.FloorPlan = floorPlan(run, b, t, u)
		v.Trusses = trussRows(b.Members)
	}
	// Most severe first: the member that matters is not to be found 24th in the geometry's
	// order.
	for _, i := range severityOrder(b.Members) {
		m := b.Members[i]
		anchor := ""
		if len(m.Flags) > 0 {
			anchor = fmt.Sprintf("m-%d", i)
		}
		q := effectQty(m.Label)
		v.MemberRows = append(v.MemberRows, memberRow{
			Label: m.Label, Kind: m.Kind, Anchor: anchor, Sense: orDash(m.SenseProposed),
			D: signedQty(u, q, m.DeadKN), DKey: sortKey(&m.DeadKN),
			LMax: qty(u, q, m.Proposed.LiveMaxKN), LMaxKey: sortKey(&m.Proposed.LiveMaxKN),
			LMin: qty(u, q, m.Proposed.LiveMinKN), LMinKey: sortKey(&m.Proposed.LiveMinKN),
			RFEx: rfText(m.RFExisting), RFExKey: sortKey(m.RFExisting),
			RFPr: rfText(m.RFProposed), RFPrKey: sortKey(m.RFProposed), RFClass: rfClass(run, m.RFProposed),
			Flags: m.Flags,
		})
		if anchor != "" {
			v.Sections = append(v.Sections, memberSection(run, b, t, lines, i, anchor, u))
		}
	}
	return v
}

func memberSection(run Run, b Bridge, t *truss.Truss, lines *analysis.Lines, i int, anchor string, u units.System) section {
	m := b.Members[i]
	s := section{Label: m.Label, Kind: m.Kind, Anchor: anchor, Flags: m.Flags, Reasons: reasons(run, m, u), Unit: u.Name(effectQty(m.Label))}
	for _, c := range append(senses(m, "existing", m.Existing), senses(m, "proposed", m.Proposed)...) {
		s.Calc = append(s.Calc, calcOf(c, u))
	}
	if n := storedNote(m, m.ReferenceTrain); n != "" {
		s.Notes = append(s.Notes, n)
	}
	if lines == nil {
		return s
	}
	if _, _, ok := floor.ResultEffect(m.Label); ok {
		return floorSection(run, b, t, s, i, u)
	}
	k := t.Member(m.Label)
	if k < 0 {
		s.Captions = append(s.Captions, fmt.Sprintf("Member %s is not in the rebuilt %s geometry; its influence line is not drawn.", m.Label, t.Params.Type))
		return s
	}
	eta := lines.Members[k].Ordinates
	sign := governing(m)
	ex, tr := m.Proposed.Max, m.Proposed.MaxTrain
	sense := "tension"
	if sign < 0 {
		ex, tr, sense = m.Proposed.Min, m.Proposed.MinTrain, "compression"
	}
	ex, same := placementOf(tr, ex, lines.X, eta, m.Proposed.shareOf(sign, b), sign)
	var ob onBridge
	if same {
		ob = placeTrain(tr, ex.Placement, t.SpanM(), lines.X, eta, sign)
	} else if tr != nil && ex.Loaded {
		s.Captions = append(s.Captions, fmt.Sprintf("Train %s as now defined does not give the run's force here: its definition has changed since the run, so its loads are not drawn.", ex.Train))
		tr = nil
	}
	c := drawIL(fmt.Sprintf("m%d", i), m.Label, t.SpanM(), lines.X, eta, ob, ex.Direction == 0, ex.HeadM, ex.Loaded && tr != nil, u, false)
	s.Chart = &c
	pos, neg := analysis.Areas(lines.X, eta)
	lu, fu := u.Name(units.Length), u.Name(units.Force)
	s.Captions = append(s.Captions, fmt.Sprintf("Influence line of %s: member force per unit load at each deck panel point; areas %s and %s %s. Dead load D = %s %s × net area %s %s = %s %s.",
		m.Label, signedQty(u, units.Length, clean(pos)), signedQty(u, units.Length, clean(neg)), lu, qty(u, units.PerLength, b.DeadLoadKNPerM), u.Name(units.PerLength),
		signedQty(u, units.Length, clean(pos+neg)), lu, signedQty(u, units.Force, analysis.DeadLoad(lines.X, eta, b.DeadLoadKNPerM)), fu))
	s.Captions = append(s.Captions, placementText(ex, tr, ob, lines.X, eta, sense, m.Proposed.shareOf(sign, b), u))
	s.Captions = append(s.Captions, sectionCaptions(m)...)
	s.Fatigue = drawFatigue(run, b, m, lines.X, eta, t.SpanM())
	return s
}

// liveShare is the factor on a train's load for the analysed truss, by screening's rule.
func (b Bridge) liveShare() float64 {
	return screening.Bridge{TrussShare: b.TrussShare, Tracks: b.Tracks}.LiveShare()
}

// placementText says where the governing train stood and checks its effect against L.
func placementText(ex envelope.Extreme, tr *traffic.Train, ob onBridge, xs, eta []float64, sense string, share float64, u units.System) string {
	if !ex.Loaded {
		return fmt.Sprintf("No train loads the member in %s under the proposed traffic.", sense)
	}
	l, lu, fu := func(v float64) string { return qty(u, units.Length, v) }, u.Name(units.Length), u.Name(units.Force)
	s := fmt.Sprintf("Proposed traffic, governing in %s: %s, %s, front at x = %s %s", sense, orDash(ex.Train), ex.Direction, l(ex.HeadM), lu)
	if ex.Count > 0 && tr != nil && tr.Variable() {
		s += fmt.Sprintf(", %d vehicles in its last group", ex.Count)
	}
	if ex.LoadedToM > ex.LoadedFromM {
		s += fmt.Sprintf("; loads x = %s to %s %s", l(ex.LoadedFromM), l(ex.LoadedToM), lu)
	}
	s += "."
	if tr == nil {
		return s + " (The train's definition is not held, so its loads are not drawn.)"
	}
	var parts []string
	if n := len(ob.Axles); n > 0 {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, a := range ob.Axles {
			lo, hi = math.Min(lo, a.LoadKN), math.Max(hi, a.LoadKN)
		}
		loads := qty(u, units.Force, lo) + " " + fu
		if hi > lo {
			loads = qty(u, units.Force, lo) + " to " + qty(u, units.Force, hi) + " " + fu
		}
		parts = append(parts, fmt.Sprintf("%d axles on the bridge (%s)", n, loads))
	}
	for _, st := range ob.Stretches {
		parts = append(parts, fmt.Sprintf("%s %s over x = %s to %s %s", qty(u, units.PerLength, st.QKNPerM), u.Name(units.PerLength), l(st.FromM), l(st.ToM), lu))
	}
	if len(parts) > 0 {
		eff := ob.effect(xs, eta)
		f := func(v float64) string { return signedQty(u, units.Force, v) }
		s += fmt.Sprintf(" %s. ΣP·η + Σq·∫η = %s %s; × truss share %s = %s %s (L %s %s).", strings.Join(parts, "; "), f(eff), fu, num(share, 3), f(eff*share), fu, f(ex.Value), fu)
	}
	return s
}

// calcOf is the arithmetic of one sense as shown, forces in units u.
func calcOf(c senseCalc, u units.System) calcView {
	f := units.Force
	if c.Moment {
		f = units.Moment
	}
	v := calcView{Scenario: c.Scenario, Sense: c.Sense, Basis: orDash(c.Basis), Held: optQty(u, f, c.HeldKN), Cond: num(c.Condition, 2), C: optQty(u, f, c.CKN),
		D: signedQty(u, f, c.DKN), L: qty(u, f, c.LKN), Impact: num(c.Impact, 3), RF: rfText(c.RF), Governs: c.Governs}
	if c.HeldKN == nil {
		v.Cond = dash
	}
	if c.RF == nil {
		// Basis says whether the sense is unrated or needs no rating.
		v.RF = "none held"
	}
	return v
}

// shortHash is enough of a hash to tell runs apart on a page (the full one is in the
// database and in `trussfleet runs show`).
func shortHash(h string) string {
	if len(h) > 16 {
		return h[:16] + "…"
	}
	return h
}
