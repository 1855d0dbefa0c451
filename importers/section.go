package importers

import (
	"strings"

	"github.com/trussfleet/trussfleet/store"
)

// The cross-section columns of bridges.csv (docs/inventory.md, "The cross-section").
var (
	colTrussSpacing = column{name: "truss_spacing_m", alt: "truss_spacing_ft", factor: metresPerFoot}
	colTrackOffsets = column{name: "track_offsets_m", alt: "track_offsets_ft", factor: metresPerFoot, maxChars: maxOffsetsChars}
	colLineSpeed    = column{name: "line_speed_kmh", alt: "line_speed_mph", factor: kmPerMile}
	colFrequency    = column{name: "first_frequency_hz"}
	colTrussWeight  = column{name: "truss_weight_kn_per_m", alt: "truss_weight_kip_per_ft", factor: kNPerMPerKipFt}

	sectionColumns = []column{colTrussSpacing, colTrackOffsets, colLineSpeed, colFrequency, colTrussWeight}
)

// Bounds of the cross-section's values: beyond them a value is a typing or unit error.
const (
	// maxOffsetsChars bounds the list of track offsets: eight tracks of a few digits each.
	maxOffsetsChars = 128
	// maxTracks bounds the tracks one span carries.
	maxTracks = 8
	// minTrussSpacingM and maxTrussSpacingM bound the distance between main trusses: a
	// track's width at least, and a few tracks' widths at most.
	minTrussSpacingM = 1.0
	maxTrussSpacingM = 50.0
	// maxLineSpeedKmh bounds the line speed; maxFrequencyHz a span's first bending frequency.
	maxLineSpeedKmh = 500.0
	maxFrequencyHz  = 100.0
)

// offsetSeparators separate the values of track_offsets_m: spaces or a vertical bar, never a
// comma, which separates the file's fields (and is the decimal mark of some files).
const offsetSeparators = " |"

// parseSection reads a bridge row's cross-section columns into b: the truss spacing and
// track offsets (which exclude truss_share and tracks), the line speed, the measured
// frequency, and the truss's own weight as part of the dead load deadKNPerM (nil when that
// failed).
func parseSection(r bridgeRecord, p *row, b *store.Bridge, deadKNPerM *float64) {
	spacingRaw := pickRaw(p, colTrussSpacing, r.TrussSpacingM, r.TrussSpacingFt)
	offsetsRaw := pickRaw(p, colTrackOffsets, r.TrackOffsetsM, r.TrackOffsetsFt)
	if spacingRaw != "" || offsetsRaw != "" {
		for _, legacy := range []struct{ name, raw string }{{"truss_share", r.TrussShare}, {"tracks", r.Tracks}} {
			if legacy.raw != "" {
				p.fail(legacy.name, legacy.raw, "give either %s and %s or %s and %s, not both: the shares follow from the spacing and the offsets (lever rule)",
					"truss_share", "tracks", p.pick(colTrussSpacing), p.pick(colTrackOffsets))
			}
		}
		switch {
		case spacingRaw == "":
			p.fail(p.pick(colTrussSpacing), spacingRaw, "give the truss spacing with %s", p.pick(colTrackOffsets))
		case offsetsRaw == "":
			p.fail(p.pick(colTrackOffsets), offsetsRaw, "give one offset per track with %s (0 for one track on the centre line)", p.pick(colTrussSpacing))
		}
	}
	spacing := p.quantity(colTrussSpacing, r.TrussSpacingM, r.TrussSpacingFt)
	if spacing != nil {
		if !(*spacing >= minTrussSpacingM && *spacing <= maxTrussSpacingM) {
			p.fail(p.pick(colTrussSpacing), spacingRaw, "must be from %g m to %g m (centre to centre of the main trusses)", minTrussSpacingM, maxTrussSpacingM)
		} else {
			b.TrussSpacingM = spacing
		}
	}
	if offsetsRaw != "" {
		b.TrackOffsetsM = parseOffsets(p, p.pick(colTrackOffsets), offsetsRaw, spacing)
	}
	if b.TrussSpacingM == nil || b.TrackOffsetsM == nil {
		b.TrussSpacingM, b.TrackOffsetsM = nil, nil
	} else {
		b.Tracks = len(b.TrackOffsetsM) // stored for listings; the offsets govern
	}
	if v := p.quantity(colLineSpeed, r.LineSpeedKmh, r.LineSpeedMph); v != nil {
		name, raw := p.pick(colLineSpeed), pickRaw(p, colLineSpeed, r.LineSpeedKmh, r.LineSpeedMph)
		p.positive(name, raw, v)
		p.atMost(name, raw, v, maxLineSpeedKmh, "km/h")
		b.LineSpeedKmh = v
	}
	if v := p.number(colFrequency.name, r.FirstFrequencyHz, false); v != nil {
		p.positive(colFrequency.name, r.FirstFrequencyHz, v)
		p.atMost(colFrequency.name, r.FirstFrequencyHz, v, maxFrequencyHz, "Hz")
		b.FirstFrequencyHz = v
	}
	if w := p.quantity(colTrussWeight, r.TrussWeightKNPerM, r.TrussWeightKipPerFt); w != nil {
		name, raw := p.pick(colTrussWeight), pickRaw(p, colTrussWeight, r.TrussWeightKNPerM, r.TrussWeightKipPerFt)
		switch {
		case !(*w >= 0):
			p.fail(name, raw, "must be zero or more")
		case deadKNPerM != nil && *w > *deadKNPerM:
			p.fail(name, raw, "the truss's own weight is part of the dead load, so at most %s (%g kN/m), got %g kN/m", p.pick(colDeadLoad), *deadKNPerM, *w)
		default:
			b.TrussWeightKNPerM = *w
		}
	}
}

// parseOffsets reads a list of track offsets (m or ft by the column), one per track; each
// lies within the truss spacing of the centre line when the spacing is known.
func parseOffsets(p *row, name, raw string, spacingM *float64) []float64 {
	fields := strings.FieldsFunc(raw, func(r rune) bool { return strings.ContainsRune(offsetSeparators, r) })
	if len(fields) == 0 || len(fields) > maxTracks {
		p.fail(name, raw, "give one offset per track, 1 to %d values separated by spaces or |, e.g. \"-2.25 2.25\"", maxTracks)
		return nil
	}
	factor := 1.0
	if name == colTrackOffsets.alt {
		factor = colTrackOffsets.factor
	}
	out := make([]float64, 0, len(fields))
	for _, f := range fields {
		v := p.number(name, f, true)
		if v == nil {
			return nil
		}
		e := *v * factor
		if spacingM != nil && !(e >= -*spacingM && e <= *spacingM) {
			p.fail(name, raw, "offset %s lies farther from the centre line than the trusses are apart: a typing or unit error", f)
			return nil
		}
		out = append(out, e)
	}
	return out
}

// parseTruss reads members.csv's truss column: A or B for a row of one main truss's member
// (where the trusses' members differ), empty for a row of both.
func parseTruss(r memberRecord, p *row) string {
	switch t := strings.ToUpper(strings.TrimSpace(r.Truss)); t {
	case "", "A", "B":
		return t
	}
	p.fail("truss", r.Truss, "must be A, B or empty (A: the truss that positive track offsets lean towards; empty: both trusses)")
	return ""
}
