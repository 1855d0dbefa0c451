// Package floor rates a truss bridge's floor system: the stringers that carry the rails from
// floor beam to floor beam, and the floor beams that carry the stringers to the trusses.
//
// Idealisation (common practice; DOMAIN.md, "The floor system"):
//   - A track's two stringer lines stand StringerSpacingM apart, centred under the track, one
//     under each rail: each carries half the track's axle loads. The stringers of a panel span
//     simply between the floor beams at its panel points (length p). A stringer is rated for
//     its absolute largest bending moment anywhere along the span, and for its end shear
//     (influence line 1 at the support falling to 0). Labels: S<track>-<panel>, panels
//     numbered 1 to n from the left bearing; the label stands for both lines of the track in
//     that panel (their loads are equal; enter the weaker line's capacity).
//   - A floor beam stands at each deck panel point, spanning between the trusses (the truss
//     spacing b). Its reaction R from one track follows a triangle of height 1 over the two
//     adjacent panels (one panel for an end floor beam), which the envelope package sweeps
//     exactly. Each stringer line brings R/2 where it meets the floor beam; the moment (under
//     a stringer line, where a simple beam's moment under point loads peaks) and the end shear
//     follow by statics. Tracks are placed by their offsets from the centre line (the lever
//     rule); each track alone and all tracks loaded at once are checked, as for the trusses
//     (trains on different tracks stand independently, and every influence here is
//     non-negative, so the tracks' largest reactions add). Without the truss spacing the
//     floor beams are not rated, and Notes counts them. Without track offsets every track
//     stands on the centre line (for one track: a centred track). Labels: FB<point>, points 0
//     to n.
//   - Hangers. In a through Pratt truss the hanger (the vertical at the first interior panel
//     point, and any vertical that carries only its floor beam) carries the floor beam's
//     reaction from both trusses' share: its influence line is the same triangle, times the
//     truss's share. The trusses already compute and rate it as a truss member (kind
//     vertical) with the truss's dynamic allowance; it is not rated again here. Check that
//     member's result against the floor beams next to it: where the floor system governs, the
//     hanger often does too.
//
// Every result is one element's one effect: label "S1-3:M" (moment, kN·m) or "FB4:V" (shear,
// kN). Live effects are exact, as for the truss members, no train position is stepped: the
// shears and reactions come from the envelope package, the stringer's absolute largest
// moment from MaxMoment (piecewise polynomials in the train's position, see there). Effects
// are non-negative under gravity loads, so a part applied where unfavourable is applied over
// its whole extent and a trailing part cut at the unfavourable length runs on for ever.
//
// Dead loads: per stringer line (kN/m; default 2.5, an assumption of this program) and the
// floor beam's own weight (kN/m; default 3.0, assumed), with the stringers' dead reactions.
// The largest dead and live moments are added even where they stand at slightly different
// sections (conservative).
//
// Dynamic allowance per element (Element.Impact): EN 1991-2 Table 6.2 determinant lengths
// (stringer p + 3 m, floor beam 2 b, end floor beam 3.6 m; Lengths, configurable) or AREMA's
// (the stringer's length; the longer adjacent panel for a floor beam), values from memory.
//
// Fatigue (System.FatigueLine): a floor element's bending moment at its fatigue section as an
// influence line along the track with each track's factor, for screening/fatigue's exact
// passages: a stringer at mid-span (a triangle of height p/4, half the track's axles on a
// line), a floor beam under the stringer line where its largest live moment stands (its
// reaction triangle times the moment per unit reaction of each track, by statics). The fatigue
// stress is that moment over the element's section modulus (screening/floor_fatigue.go).
// Shear is not checked for fatigue.
//
// Units are kN and m throughout. Inputs are never modified.
//
//	els, notes, err := floor.System{PanelX: x, TrussSpacingM: 5.5}.Elements()
//	var a floor.Analyser // one per goroutine
//	live, err := a.Live(sys, els, loads)
package floor
