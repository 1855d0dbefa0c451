package rating

import (
	"math"
	"testing"

	"github.com/trussfleet/trussfleet/internal/proptest"
	"pgregory.net/rapid"
)

func near(a, b float64) bool { return math.Abs(a-b) <= 1e-9*(1+math.Abs(b)) }

func TestWorkingStressAndFactored(t *testing.T) {
	factored := Method{Factored: true, Phi: 0.9, GammaD: 1.25, GammaL: 1.75, GammaDFavourable: 0.9}
	cases := []struct {
		name  string
		m     Member
		d     Demand
		meth  Method
		sense Sense
		want  float64
	}{
		// RF = (C − D)/(L(1 + I)) (working-stress rating equation, DOMAIN.md; common practice):
		// (1000 − 200)/(400·1.3) = 1.538...
		{"tension chord", Member{CapacityTension: 1000}, Demand{Dead: 200, LiveMax: 400, Impact: 1.3}, WorkingStress, Tension, 800.0 / 520},
		// Compression: C = 1500, D = −300 (compression), L = −600: (1500 − 300)/(600·1.2).
		{"compression chord", Member{CapacityCompression: 1500}, Demand{Dead: -300, LiveMin: -600, Impact: 1.2}, WorkingStress, Compression, 1200.0 / 720},
		// A condition factor of 0.8 scales the capacity: (0.8·1000 − 200)/(400·1.3).
		{"section loss", Member{CapacityTension: 1000, ConditionFactor: 0.8}, Demand{Dead: 200, LiveMax: 400, Impact: 1.3}, WorkingStress, Tension, 600.0 / 520},
		// Dead compression relieves the tension check: (1000 + 100)/(300·1.0).
		{"relieving dead load", Member{CapacityTension: 1000, CapacityCompression: 1000}, Demand{Dead: -100, LiveMax: 300, LiveMin: -200, Impact: 1}, WorkingStress, Tension, 1100.0 / 300},
		// Factored form RF = (φC − γD·D)/(γL·L(1 + I)) with φ 0.9, γD 1.25, γL 1.75 (load and
		// resistance factor rating form; factor values from memory, illustrative only):
		// (0.9·1000 − 1.25·200)/(1.75·400·1.3) = 650/910.
		{"factored", Member{CapacityTension: 1000}, Demand{Dead: 200, LiveMax: 400, Impact: 1.3}, factored, Tension, 650.0 / 910},
		// Favourable dead load takes γD,fav: (0.9·1000 + 0.9·100)/(1.75·300).
		{"factored relieving", Member{CapacityTension: 1000, CapacityCompression: 1}, Demand{Dead: -100, LiveMax: 300, LiveMin: -1, Impact: 1}, factored, Tension, 990.0 / 525},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			rfs, missing := FromCapacities(c.m, c.d, c.meth)
			if len(missing) != 0 {
				t.Fatalf("missing %v", missing)
			}
			for _, f := range rfs {
				if f.Sense == c.sense {
					if !near(f.RF, c.want) {
						t.Errorf("RF %g, want %g", f.RF, c.want)
					}
					return
				}
			}
			t.Fatalf("no %v factor in %+v", c.sense, rfs)
		})
	}
}

func TestMissingSense(t *testing.T) {
	// A diagonal that reverses but holds only a tension capacity (common practice: a member
	// whose force reverses needs both checks).
	rfs, missing := FromCapacities(Member{CapacityTension: 800}, Demand{LiveMax: 300, LiveMin: -50, Impact: 1}, WorkingStress)
	if len(rfs) != 1 || rfs[0].Sense != Tension || len(missing) != 1 || missing[0] != Compression {
		t.Fatalf("rfs %+v missing %v", rfs, missing)
	}
}

// TestLoadEffectRatioAgreesWithCapacity: the stored rating factor of a reference train is
// RF_ref = (C − D)/(L_ref(1 + I_ref)); the load-effect ratio RF_ref·L_ref(1 + I_ref)/(L(1 + I))
// must then give the same RF as the capacity form for any new loading (algebra of the
// working-stress rating equation, DOMAIN.md).
func TestLoadEffectRatioAgreesWithCapacity(t *testing.T) {
	proptest.Check(t, func(rt *rapid.T) {
		c := rapid.Float64Range(100, 1e4).Draw(rt, "C")
		dead := rapid.Float64Range(0, 0.5).Draw(rt, "Dshare") * c
		ref := Demand{Dead: dead, LiveMax: rapid.Float64Range(10, 2e3).Draw(rt, "Lref"), Impact: rapid.Float64Range(1, 1.7).Draw(rt, "Iref")}
		nw := Demand{Dead: dead, LiveMax: rapid.Float64Range(10, 2e3).Draw(rt, "L"), Impact: rapid.Float64Range(1, 1.7).Draw(rt, "I")}
		byCap, _ := FromCapacities(Member{CapacityTension: c}, ref, WorkingStress)
		m := Member{RatingFactor: byCap[0].RF, ReferenceTrain: "ref"}
		got, missing := FromStoredRating(m, ref, nw)
		want, _ := FromCapacities(Member{CapacityTension: c}, nw, WorkingStress)
		if len(missing) != 0 || len(got) != 1 || !near(got[0].RF, want[0].RF) {
			rt.Fatalf("ratio %+v (missing %v), capacity %+v", got, missing, want)
		}
	})
}

func TestFlags(t *testing.T) {
	th := Thresholds{Flag: 1, Review: 1.1, WorseFraction: 0.1}
	cap1000 := Member{CapacityTension: 1000, CapacityCompression: 1000}
	cases := []struct {
		name     string
		m        Member
		ex, pr   Demand
		want     []Flag
		increase float64
	}{
		// RF existing (1000−200)/500 = 1.6, proposed 800/900 = 0.89: exceeds and worse.
		{"exceeds", cap1000, Demand{Dead: 200, LiveMax: 500, Impact: 1}, Demand{Dead: 200, LiveMax: 900, Impact: 1}, []Flag{Exceeds, Worse}, 0.8},
		// Proposed 800/760 = 1.05: review; existing 800/700 = 1.14, 8 % lower: not worse.
		{"review", cap1000, Demand{Dead: 200, LiveMax: 700, Impact: 1}, Demand{Dead: 200, LiveMax: 760, Impact: 1}, []Flag{Review}, 60.0 / 700},
		// D = 100; existing live −80 keeps D + L ≥ 0; proposed −150 reverses it. The worst RF
		// falls from min(900/100, 1100/80) = 9 to 1100/150 = 7.3, by 19 %: worse too.
		{"new reversal", cap1000, Demand{Dead: 100, LiveMax: 100, LiveMin: -80, Impact: 1}, Demand{Dead: 100, LiveMax: 100, LiveMin: -150, Impact: 1}, []Flag{Worse, NewReversal}, 150.0/80 - 1},
		{"no capacity", Member{}, Demand{LiveMax: 100, Impact: 1}, Demand{LiveMax: 100, Impact: 1}, nil, 0},
		{"passes", cap1000, Demand{Dead: 100, LiveMax: 100, Impact: 1}, Demand{Dead: 100, LiveMax: 110, Impact: 1}, nil, 0.1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			a := Assess(c.m, Loading{Demand: c.ex}, Loading{Demand: c.pr}, WorkingStress, th)
			if len(a.Flags) != len(c.want) {
				t.Fatalf("flags %v, want %v", a.Flags, c.want)
			}
			for i := range c.want {
				if a.Flags[i] != c.want[i] {
					t.Fatalf("flags %v, want %v", a.Flags, c.want)
				}
			}
			if !near(a.DemandIncrease, c.increase) {
				t.Errorf("demand increase %g, want %g", a.DemandIncrease, c.increase)
			}
		})
	}
}

func TestSummariseAndRank(t *testing.T) {
	th := Thresholds{Flag: 1, Review: 1.1, WorseFraction: 0.1}
	m := Member{CapacityTension: 1000}
	mk := func(prLive float64) Assessment {
		return Assess(m, Loading{Demand: Demand{LiveMax: 500, Impact: 1}}, Loading{Demand: Demand{LiveMax: prLive, Impact: 1}}, WorkingStress, th)
	}
	a := Summarise([]Assessment{mk(600), mk(1250), mk(800)})
	// Worst member: 1000/1250 = 0.8; headroom equals it because RF scales as 1/L.
	if a.Worst != 1 || !near(a.WorstPr.RF, 0.8) || !near(a.Headroom, 0.8) || a.FlagCounts[Exceeds] != 1 || !near(a.DemandIncrease, 1.5) {
		t.Fatalf("%+v", a)
	}
	b := Summarise([]Assessment{mk(1250)})
	c := Summarise([]Assessment{mk(400)})
	none := Summarise([]Assessment{Assess(Member{}, Loading{}, Loading{}, WorkingStress, th)})
	order := RankOrder(4, func(i int) Bridge { return []Bridge{c, none, a, b}[i] })
	// a and b tie on RF 0.8; a's demand increase (150 %) equals b's; stable order keeps a first.
	want := []int{2, 3, 0, 1}
	for i := range want {
		if order[i] != want[i] {
			t.Fatalf("order %v, want %v", order, want)
		}
	}
}

// TestStoredRatingOneSense: a stored rating factor rates the sense it was rated in, and the
// load-effect ratio RF = RF_ref · L_ref(1 + I_ref)/(L (1 + I)) (DOMAIN.md) applies to that
// sense only; the other sense comes from a capacity where one is held, or is unrated.
func TestStoredRatingOneSense(t *testing.T) {
	comp := Compression
	// The reported Howe diagonal, governing in compression under its reference train:
	// D = −150, reference L_c = −400, L_t = +171.7 (I = 0 throughout). Governing sense by the
	// larger total force: |−150 − 400| = 550 against −150 + 171.7 = 21.7: compression.
	howeRef := Demand{Dead: -150, LiveMax: 171.7, LiveMin: -400, Impact: 1}
	// Proposed: L_c = −450, L_t = +187.0 (a tension reversal: −150 + 187 = +37 kN).
	howeNew := Demand{Dead: -150, LiveMax: 187.0, LiveMin: -450, Impact: 1}
	cases := []struct {
		name        string
		m           Member
		ref, nw     Demand
		want        map[Sense]float64 // expected RF per rated sense
		wantMissing []Sense
	}{
		// Compression: 1.02·400/450 = 0.9067. Before the fix tension was rated too, as
		// 1.02·171.7/187.0 = 0.94 (exceeds), from a factor that says nothing of tension.
		{"governing sense from the reference loading, other sense unrated",
			Member{RatingFactor: 1.02, ReferenceTrain: "r"}, howeRef, howeNew,
			map[Sense]float64{Compression: 1.02 * 400 / 450}, []Sense{Tension}},
		// The tension sense takes the held tension capacity: (800 − (−150))/187 = 5.080.
		{"other sense from its capacity",
			Member{RatingFactor: 1.02, ReferenceTrain: "r", CapacityTension: 800}, howeRef, howeNew,
			map[Sense]float64{Tension: 950.0 / 187, Compression: 1.02 * 400 / 450}, nil},
		// The inventory says the factor was rated in compression: the same as found.
		{"sense given",
			Member{RatingFactor: 1.02, ReferenceTrain: "r", RatingSense: comp, RatingSenseGiven: true}, howeRef, howeNew,
			map[Sense]float64{Compression: 1.02 * 400 / 450}, []Sense{Tension}},
		// A chord in tension: D = +200, L_ref,t = 500 (I_ref = 1.2), new L_t = 600 (I = 1.25):
		// 1.1·500·1.2/(600·1.25) = 0.88; compression is not loaded.
		{"tension chord, impact differs",
			Member{RatingFactor: 1.1, ReferenceTrain: "r"}, Demand{Dead: 200, LiveMax: 500, Impact: 1.2}, Demand{Dead: 200, LiveMax: 600, Impact: 1.25},
			map[Sense]float64{Tension: 1.1 * 600 / 750}, nil},
		// Dead load decides the sense: D = −300, L_t = 250, L_c = −100: tension total −50,
		// compression total 400: compression governs though the live tension is larger.
		// New: L_t = 260, L_c = −120: compression 1.0·100/120. D + L_t = −40 kN: the member
		// stays in compression, so no tension rating is needed: not unrated.
		{"dead load governs the sense",
			Member{RatingFactor: 1.0, ReferenceTrain: "r"}, Demand{Dead: -300, LiveMax: 250, LiveMin: -100, Impact: 1}, Demand{Dead: -300, LiveMax: 260, LiveMin: -120, Impact: 1},
			map[Sense]float64{Compression: 100.0 / 120}, nil},
		// The same with L_t = 320: D + L_t = +20 kN, tension acts: unrated in tension.
		{"small tension acts: unrated",
			Member{RatingFactor: 1.0, ReferenceTrain: "r"}, Demand{Dead: -300, LiveMax: 250, LiveMin: -100, Impact: 1}, Demand{Dead: -300, LiveMax: 320, LiveMin: -120, Impact: 1},
			map[Sense]float64{Compression: 100.0 / 120}, []Sense{Tension}},
		// Given as tension, but the reference train loads no tension: no ratio can be formed.
		{"given sense the reference does not load",
			Member{RatingFactor: 1.0, ReferenceTrain: "r", RatingSenseGiven: true}, Demand{LiveMin: -100, Impact: 1}, Demand{LiveMax: 50, LiveMin: -120, Impact: 1},
			map[Sense]float64{}, []Sense{Tension, Compression}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			ref := c.ref
			rfs, missing := Rate(c.m, Loading{Demand: c.nw, Reference: &ref}, WorkingStress)
			if len(rfs) != len(c.want) {
				t.Fatalf("rfs %+v, want %v", rfs, c.want)
			}
			for _, f := range rfs {
				w, ok := c.want[f.Sense]
				if !ok || !near(f.RF, w) {
					t.Errorf("%v RF %g, want %v", f.Sense, f.RF, c.want)
				}
			}
			if len(missing) != len(c.wantMissing) {
				t.Fatalf("missing %v, want %v", missing, c.wantMissing)
			}
			for i := range missing {
				if missing[i] != c.wantMissing[i] {
					t.Fatalf("missing %v, want %v", missing, c.wantMissing)
				}
			}
		})
	}
}

// TestReversalThreshold: a reversal counts where the reversed force reaches the set share of
// the larger force (10 % by default; common practice, configs/default.yaml).
func TestReversalThreshold(t *testing.T) {
	th := Thresholds{Flag: 0.01, Review: 0.01, WorseFraction: 0.99, ReversalFraction: 0.10}
	strong := Member{CapacityTension: 5000, CapacityCompression: 5000}
	cases := []struct {
		name   string
		ex, pr Demand
		share  float64
		want   bool
	}{
		// The reported case: −548.8 kN to +6.5 kN. D = −300, L_t = 306.5, L_c = −248.8:
		// D + L_t = +6.5, D + L_c = −548.8; share 6.5/548.8 = 1.2 %: no flag.
		{"small tension tip", Demand{Dead: -300, LiveMax: 250, LiveMin: -240, Impact: 1}, Demand{Dead: -300, LiveMax: 306.5, LiveMin: -248.8, Impact: 1}, 6.5 / 548.8, false},
		// D = −300, L_t = 400: +100 against −548.8; share 18.2 %: flagged.
		{"real reversal", Demand{Dead: -300, LiveMax: 250, LiveMin: -240, Impact: 1}, Demand{Dead: -300, LiveMax: 400, LiveMin: -248.8, Impact: 1}, 100 / 548.8, true},
		// Exactly at the threshold counts: D = 0, L_t = 100, L_c = −1000 → 100/1000 = 10 %.
		{"at the threshold", Demand{LiveMin: -1000, Impact: 1}, Demand{LiveMax: 100, LiveMin: -1000, Impact: 1}, 0.10, true},
		// Reverses by 30 % under both: not new.
		{"reversed already", Demand{LiveMax: 300, LiveMin: -1000, Impact: 1}, Demand{LiveMax: 300, LiveMin: -1000, Impact: 1}, 0.30, false},
		// Existing reversal of 5 % (below), proposed 20 %: new.
		{"small before, large now", Demand{LiveMax: 50, LiveMin: -1000, Impact: 1}, Demand{LiveMax: 200, LiveMin: -1000, Impact: 1}, 0.20, true},
		// Impact scales both: D = −100, L_t = 60·1.5 = 90 → −10: no reversal at all.
		{"no change of sign", Demand{Dead: -100, LiveMin: -100, Impact: 1.5}, Demand{Dead: -100, LiveMax: 60, LiveMin: -100, Impact: 1.5}, 0, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := c.pr.ReversalShare(); !near(got, c.share) {
				t.Errorf("reversal share %g, want %g", got, c.share)
			}
			a := Assess(strong, Loading{Demand: c.ex}, Loading{Demand: c.pr}, WorkingStress, th)
			if a.Has(NewReversal) != c.want {
				t.Errorf("new-reversal %v, want %v (flags %v)", a.Has(NewReversal), c.want, a.Flags)
			}
		})
	}
}

// TestUnratedCounted: members with no rating in a loaded sense are counted per bridge, and
// flagged only where the settings ask (configs/default.yaml, thresholds.flag_unrated).
func TestUnratedCounted(t *testing.T) {
	ld := Loading{Demand: Demand{LiveMax: 100, Impact: 1}}
	cases := []struct {
		name        string
		flagUnrated bool
		wantFlags   int // members flagged no-capacity
	}{
		{"counted, not flagged", false, 0},
		{"flagged on request", true, 2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			th := Thresholds{Flag: 1, Review: 1.1, WorseFraction: 0.1, FlagUnrated: c.flagUnrated}
			// Two members without data, one with C = 1000 (RF 1000/100 = 10: no flag).
			ms := []Assessment{
				Assess(Member{}, ld, ld, WorkingStress, th),
				Assess(Member{CapacityTension: 1000}, ld, ld, WorkingStress, th),
				Assess(Member{}, ld, ld, WorkingStress, th),
			}
			b := Summarise(ms)
			if b.Unrated != 2 || b.FlagCounts[NoCapacity] != c.wantFlags || b.Worst != 1 || !near(b.WorstPr.RF, 10) {
				t.Fatalf("%+v", b)
			}
		})
	}
}
