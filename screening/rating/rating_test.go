package rating

import (
	"math"
	"testing"

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
	rapid.Check(t, func(rt *rapid.T) {
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
		{"no capacity", Member{}, Demand{LiveMax: 100, Impact: 1}, Demand{LiveMax: 100, Impact: 1}, []Flag{NoCapacity}, 0},
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

// TestStoredRatingBothSenses: a reversing diagonal rated by a stored factor. The stored factor
// is the lower of the two senses' factors, so applying it to the other sense by the
// load-effect ratio understates that sense (conservative, by the algebra of the
// working-stress equation). A sense the reference hardly loads is not covered.
func TestStoredRatingBothSenses(t *testing.T) {
	ref := Demand{LiveMax: 400, LiveMin: -100, Impact: 1.2}
	nw := Demand{LiveMax: 500, LiveMin: -150, Impact: 1.2}
	rfs, missing := FromStoredRating(Member{RatingFactor: 1.2, ReferenceTrain: "r"}, ref, nw)
	if len(missing) != 0 || len(rfs) != 2 || !near(rfs[0].RF, 1.2*400/500) || !near(rfs[1].RF, 1.2*100/150) {
		t.Fatalf("rfs %+v missing %v", rfs, missing)
	}
	// The reference loads compression by 1 % of its tension; the new loading by 30 %.
	rfs, missing = FromStoredRating(Member{RatingFactor: 1.2, ReferenceTrain: "r"}, Demand{LiveMax: 400, LiveMin: -4, Impact: 1}, Demand{LiveMax: 500, LiveMin: -150, Impact: 1})
	if len(rfs) != 1 || rfs[0].Sense != Tension || len(missing) != 1 || missing[0] != Compression {
		t.Fatalf("rfs %+v missing %v", rfs, missing)
	}
}
