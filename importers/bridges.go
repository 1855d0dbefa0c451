package importers

import (
	"errors"
	"io"
	"strconv"
	"strings"

	"github.com/trussfleet/trussfleet/internal/bridgegeom"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
)

// bridgeRecord is a bridges.csv row as text; ParseBridges checks and converts it.
type bridgeRecord struct {
	SrcLine          string `csv:"__line"`
	BridgeID         string `csv:"bridge_id"`
	Name             string `csv:"name"`
	Line             string `csv:"line"`
	ChainageKM       string `csv:"chainage_km"`
	ChainageMi       string `csv:"chainage_mi"`
	TrussType        string `csv:"truss_type"`
	SpanM            string `csv:"span_m"`
	SpanFt           string `csv:"span_ft"`
	Panels           string `csv:"panels"`
	DepthM           string `csv:"depth_m"`
	DepthFt          string `csv:"depth_ft"`
	Deck             string `csv:"deck"`
	EndPosts         string `csv:"end_posts"`
	Trusses          string `csv:"trusses"`
	TrussShare       string `csv:"truss_share"`
	Tracks           string `csv:"tracks"`
	DeadLoadKNPerM   string `csv:"dead_load_kn_per_m"`
	DeadLoadKipPerFt string `csv:"dead_load_kip_per_ft"`
	YearBuilt        string `csv:"year_built"`
	Latitude         string `csv:"latitude"`
	Longitude        string `csv:"longitude"`
	LastInspected    string `csv:"last_inspected"`
	// The cross-section (section.go).
	TrussSpacingM       string `csv:"truss_spacing_m"`
	TrussSpacingFt      string `csv:"truss_spacing_ft"`
	TrackOffsetsM       string `csv:"track_offsets_m"`
	TrackOffsetsFt      string `csv:"track_offsets_ft"`
	LineSpeedKmh        string `csv:"line_speed_kmh"`
	LineSpeedMph        string `csv:"line_speed_mph"`
	FirstFrequencyHz    string `csv:"first_frequency_hz"`
	TrussWeightKNPerM   string `csv:"truss_weight_kn_per_m"`
	TrussWeightKipPerFt string `csv:"truss_weight_kip_per_ft"`
	DepthsM             string `csv:"depths_m"`
	DepthsFt            string `csv:"depths_ft"`
	EndDepthM           string `csv:"end_depth_m"`
	EndDepthFt          string `csv:"end_depth_ft"`
	Spans               string `csv:"spans"`
	// The floor system's columns (floor.go).
	StringerSpacingM      string `csv:"stringer_spacing_m"`
	StringerSpacingFt     string `csv:"stringer_spacing_ft"`
	StringerDeadKNPerM    string `csv:"stringer_dead_kn_per_m"`
	StringerDeadKipPerFt  string `csv:"stringer_dead_kip_per_ft"`
	FloorBeamDeadKNPerM   string `csv:"floor_beam_dead_kn_per_m"`
	FloorBeamDeadKipPerFt string `csv:"floor_beam_dead_kip_per_ft"`
}

var (
	colChainage = column{name: "chainage_km", alt: "chainage_mi", factor: kmPerMile}
	colSpan     = column{name: "span_m", alt: "span_ft", factor: metresPerFoot, required: true}
	colDepth    = column{name: "depth_m", alt: "depth_ft", factor: metresPerFoot, required: true}
	colDeadLoad = column{name: "dead_load_kn_per_m", alt: "dead_load_kip_per_ft", factor: kNPerMPerKipFt, required: true}

	// bridgeColumns are the columns of bridges.csv (docs/inventory.md).
	bridgeColumns = append([]column{
		{name: "bridge_id", required: true, maxChars: maxIDChars}, {name: "name", maxChars: maxNameChars},
		{name: "line", maxChars: maxNameChars}, colChainage,
		{name: "truss_type", required: true}, colSpan, {name: "panels", required: true}, colDepth,
		{name: "deck", required: true}, {name: "end_posts"}, {name: "trusses"}, {name: "truss_share"},
		{name: "tracks"}, colDeadLoad, {name: "year_built"}, {name: "latitude"}, {name: "longitude"},
		{name: "last_inspected"}, colDepths, colEndDepth, {name: "spans"},
		colStringerSpacing, colStringerDead, colFloorBeamDead,
	}, sectionColumns...)
)

// Defaults for optional bridges.csv columns.
const (
	defaultTrusses    = 2
	defaultTrussShare = 0.5 // one centred track between two trusses: half each (lever rule)
	defaultTracks     = 1
)

// trussColumn maps the parameter a truss.ParamError names to the column it came from.
var trussColumn = map[string]column{
	"type": {name: "truss_type"}, "span": colSpan, "depth": colDepth, "panels": {name: "panels"},
	"deck": {name: "deck"}, "end_posts": {name: "end_posts"},
	"depths": colDepths, "end_depth": colEndDepth, "spans": {name: "spans"},
}

// Report says what reading a file found besides its rows.
type Report struct {
	// Ignored lists columns the header has that trussfleet does not use.
	Ignored []string
	// Format says how the file was read when it is not UTF-8 text separated by commas:
	// "semicolon-separated, decimal comma", "UTF-16 LE", "sheet \"Bridges\" of an .xlsx
	// workbook"; "" otherwise.
	Format string
	// Sheet is the workbook's sheet read, "" for a text file.
	Sheet string
	// columns maps the header's names to their 1-based positions.
	columns map[string]int
}

// ParseBridges reads a bridges CSV file from r, checking every row, and calls emit with
// each good row (file name is for messages). It stops early only when emit returns false.
// The error, if any, is a *FileErrors holding every problem found; a file with an error
// must not be written.
func ParseBridges(file string, r io.Reader, emit func(store.Staged[store.Bridge]) bool) (Report, error) {
	return parseBridges(file, r, "", emit)
}

// parseBridges is ParseBridges reading the named sheet of a workbook ("": the first).
func parseBridges(file string, r io.Reader, sheet string, emit func(store.Staged[store.Bridge]) bool) (Report, error) {
	return parseRows(file, r, sheet, bridgeColumns, func(rec bridgeRecord, p *row) bool {
		b, ok := parseBridge(rec, p)
		return !ok || emit(store.Staged[store.Bridge]{Line: p.line, Row: b})
	})
}

// parseRows runs the shared part of every CSV parser: the header, the decoding, and the
// gathering of errors.
func parseRows[T record](file string, r io.Reader, sheet string, known []column, f func(T, *row) bool) (Report, error) {
	errs := &errorList{file: file}
	src := newCSVSource(file, r, sheet, errs, known)
	if src == nil {
		return Report{}, errs.err()
	}
	defer src.close()
	rep := Report{Ignored: src.unknown(known), Format: src.input.format, Sheet: src.input.sheet, columns: map[string]int{}}
	for name := range src.index {
		rep.columns[name] = src.col(name)
	}
	err := decode(src, func(rec T) bool {
		line, _ := strconv.Atoi(rec.srcLine())
		return f(rec, &row{src: src, errs: errs, line: line, ok: true})
	})
	// decode has returned, so gocsv's reading goroutine is done with src.errs.
	errs.merge(src.errs)
	if err != nil {
		errs.add(&FieldError{Msg: "reading: " + err.Error()})
	}
	return rep, errs.err()
}

// record is a CSV row type: a struct of string fields with csv tags, one tagged __line.
type record interface{ srcLine() string }

func (r bridgeRecord) srcLine() string { return r.SrcLine }

func parseBridge(r bridgeRecord, p *row) (store.Bridge, bool) {
	b := store.Bridge{
		BridgeID:  p.text("bridge_id", r.BridgeID, true),
		Name:      r.Name,
		Line:      r.Line,
		TrussType: strings.ToLower(p.text("truss_type", r.TrussType, true)),
		Deck:      strings.ToLower(p.text("deck", r.Deck, true)),
		EndPosts:  strings.ToLower(r.EndPosts),
	}
	b.ChainageKM = p.quantity(colChainage, r.ChainageKM, r.ChainageMi)
	span := p.quantity(colSpan, r.SpanM, r.SpanFt)
	p.positive(p.pick(colSpan), pickRaw(p, colSpan, r.SpanM, r.SpanFt), span)
	form := parseForm(r, p, &b)
	depth := p.quantity(depthColumn(form), r.DepthM, r.DepthFt)
	p.positive(p.pick(colDepth), pickRaw(p, colDepth, r.DepthM, r.DepthFt), depth)
	if depth == nil && form.listed {
		depth = new(float64) // the largest listed depth, filled in by the geometry
	}
	dead := p.quantity(colDeadLoad, r.DeadLoadKNPerM, r.DeadLoadKipPerFt)
	p.positive(p.pick(colDeadLoad), pickRaw(p, colDeadLoad, r.DeadLoadKNPerM, r.DeadLoadKipPerFt), dead)
	p.atMost(p.pick(colDeadLoad), pickRaw(p, colDeadLoad, r.DeadLoadKNPerM, r.DeadLoadKipPerFt), dead, maxDeadLoadKNPerM, "kN/m")
	b.Panels = p.integer("panels", r.Panels, true, 0)
	if r.Panels != "" && b.Panels <= 0 {
		p.fail("panels", r.Panels, "must be a whole number greater than zero")
	}
	if b.Deck != "" && b.Deck != truss.Through && b.Deck != truss.DeckTop {
		p.fail("deck", r.Deck, "must be %q or %q", truss.Through, truss.DeckTop)
	}
	b.Trusses = p.integer("trusses", r.Trusses, false, defaultTrusses)
	if b.Trusses < 1 {
		p.fail("trusses", r.Trusses, "must be at least 1")
	}
	b.TrussShare = defaultTrussShare
	if f := p.number("truss_share", r.TrussShare, false); f != nil {
		b.TrussShare = *f
		if !(*f > 0 && *f <= 1) {
			p.fail("truss_share", r.TrussShare, "must be greater than 0 and at most 1 (the analysed truss's share of one track's load)")
		}
	}
	b.Tracks = p.integer("tracks", r.Tracks, false, defaultTracks)
	if b.Tracks < 1 {
		p.fail("tracks", r.Tracks, "must be at least 1")
	}
	if r.YearBuilt != "" {
		y := p.integer("year_built", r.YearBuilt, false, 0)
		switch last := maxYearBuilt(); {
		case p.failed["year_built"]:
		case y < minYearBuilt || y > last:
			p.fail("year_built", r.YearBuilt, "must be a year from %d to %d (next year); leave it empty when not known", minYearBuilt, last)
		default:
			b.YearBuilt = &y
		}
	}
	b.Latitude = p.number("latitude", r.Latitude, false)
	b.Longitude = p.number("longitude", r.Longitude, false)
	if b.Latitude != nil && (*b.Latitude < -90 || *b.Latitude > 90) {
		p.fail("latitude", r.Latitude, "must be between -90 and 90 degrees")
	}
	if b.Longitude != nil && (*b.Longitude < -180 || *b.Longitude > 180) {
		p.fail("longitude", r.Longitude, "must be between -180 and 180 degrees")
	}
	if (r.Latitude == "") != (r.Longitude == "") {
		p.fail("latitude", r.Latitude, "give latitude and longitude together, or neither")
	}
	b.LastInspected = p.date("last_inspected", r.LastInspected)
	parseSection(r, p, &b, dead)
	parseBridgeFloor(r, p, &b)
	if span == nil || depth == nil {
		return b, false
	}
	b.SpanM, b.DepthM = *span, *depth
	if dead != nil {
		b.DeadLoadKNPerM = *dead
	}
	// The geometry is checked even when another field of the row failed, so that the row's
	// every problem is reported at once.

	if b.TrussType == truss.TableType {
		// The joint table, imported after the bridges, is checked on its own import; the
		// row's span, panels and depth describe the truss for listings.
		tableRowForm(r, p, b)
		return b, p.ok && dead != nil
	}
	// The geometry generator is the judge of type, panels, proportions, deck and end posts.
	t, err := truss.Build(geometryOf(b))
	var pe *truss.ParamError
	switch {
	case errors.As(err, &pe):
		c := trussColumn[pe.Param]
		name := p.pick(c)
		if !p.failed[name] { // a column already reported says why already
			p.fail(name, rawOf(r, name), "%s", pe.Allowed)
		}
		return b, false
	case err != nil:
		p.fail("truss_type", r.TrussType, "this truss cannot be built: %v", err)
		return b, false
	}
	// Store what was built, defaults filled in: a later change of default must not change
	// what a stored bridge means.
	b.TrussType, b.Deck, b.EndPosts = t.Params.Type, t.Params.Deck, t.Params.EndPosts
	b.DepthM = t.Params.DepthM
	return b, p.ok && dead != nil
}

// geometryOf gives the truss parameters of a stored bridge.
func geometryOf(b store.Bridge) truss.Params {
	return bridgegeom.Params(b)
}

func pickRaw(p *row, c column, metric, imperial string) string {
	if p.src.has(c.alt) {
		return imperial
	}
	return metric
}

// rawOf returns the text of a named column of a record, for a message.
func rawOf(r bridgeRecord, name string) string {
	switch name {
	case "truss_type":
		return r.TrussType
	case "span_m":
		return r.SpanM
	case "span_ft":
		return r.SpanFt
	case "depth_m":
		return r.DepthM
	case "depth_ft":
		return r.DepthFt
	case "panels":
		return r.Panels
	case "deck":
		return r.Deck
	case "end_posts":
		return r.EndPosts
	case "depths_m":
		return r.DepthsM
	case "depths_ft":
		return r.DepthsFt
	case "end_depth_m":
		return r.EndDepthM
	case "end_depth_ft":
		return r.EndDepthFt
	case "spans":
		return r.Spans
	}
	return ""
}
