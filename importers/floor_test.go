package importers

import (
	"math"
	"strings"
	"testing"

	"github.com/trussfleet/trussfleet/store"
)

// floorStub knows one bridge of 8 panels and one track, with its floor labels as the stored
// geometry gives them.
type floorStub struct{}

func (floorStub) Labels(id string) (map[string]string, []string, string, bool) {
	set, ordered, desc, ok := geometryStub{}.Labels(id)
	if !ok {
		return set, ordered, desc, ok
	}
	ls := &labelSet{set: set, ordered: ordered, desc: desc}
	floorLabels(ls, 8, 1)
	return ls.set, ls.ordered, ls.desc, true
}

func TestFloorMembers(t *testing.T) {
	head := "bridge_id,member,capacity_tension_kn,capacity_moment_knm,capacity_shear_kn,rating_factor,reference_train,rating_sense\n"
	var rows []store.Member
	_, err := ParseMembers("members.csv", strings.NewReader(head+
		"NME-1,S1-3,,420,510,,,\nNME-1,fb4,,900,,,,\nNME-1,FB0,,,,0.9,cooper:e=80,shear\n"), floorStub{},
		func(r store.Staged[store.Member]) bool { rows = append(rows, r.Row); return true })
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != 3 || rows[0].Member != "S1-3" || *rows[0].CapacityMomentKNM != 420 || *rows[0].CapacityShearKN != 510 ||
		rows[1].Member != "FB4" || rows[2].RatingSense == nil || *rows[2].RatingSense != "shear" {
		t.Fatalf("rows %+v", rows)
	}
	badFloorRows(t, head, []badRow{
		{"floor element with a tension capacity", "NME-1,S1-3,100,,,,,", 3, "100", "capacity_moment and capacity_shear"},
		{"truss member with a moment capacity", "NME-1,L0-L1,,100,,,,", 4, "100", "truss member"},
		{"stringer beyond the panels", "NME-1,S1-9,,100,,,,", 2, "S1-9", "FB0 to FB8"},
		{"second track on a single-track bridge", "NME-1,S2-1,,100,,,,", 2, "S2-1", "S1-1 to S1-8"},
		{"floor rating factor without its sense", "NME-1,FB2,,,,0.9,cooper:e=80,", 8, "", "moment or shear"},
		{"floor rating factor in tension", "NME-1,FB2,,,,0.9,cooper:e=80,tension", 8, "tension", "moment or shear"},
		{"negative shear capacity", "NME-1,FB2,,,-5,,,", 5, "-5", "greater than zero"},
	})
}

func TestFloorImperialAndBridgeColumns(t *testing.T) {
	head := "bridge_id,member,capacity_moment_kipft,capacity_shear_kip\n"
	var rows []store.Member
	if _, err := ParseMembers("members.csv", strings.NewReader(head+"NME-1,S1-1,100,50\n"), floorStub{},
		func(r store.Staged[store.Member]) bool { rows = append(rows, r.Row); return true }); err != nil {
		t.Fatal(err)
	}
	// 1 kip-ft = 4.4482216 kN × 0.3048 m = 1.35581795 kN·m (exact definitions of kip and ft)
	if got := *rows[0].CapacityMomentKNM; math.Abs(got-135.581795) > 1e-6 {
		t.Errorf("100 kip-ft read as %v kN·m", got)
	}
	if got := *rows[0].CapacityShearKN; math.Abs(got-222.41108) > 1e-6 {
		t.Errorf("50 kip read as %v kN", got)
	}
	brows, _, err := parseB(t, strings.TrimSuffix(bridgeHeader, "\n")+",stringer_spacing_m,stringer_dead_kn_per_m,floor_beam_dead_kn_per_m\n"+
		"NME-1,A,B,1.0,pratt,48,8,6,through,20,1.8,3.2,4.5\n")
	if err != nil {
		t.Fatal(err)
	}
	b := brows[0].Row
	if b.StringerSpacingM == nil || *b.StringerSpacingM != 1.8 || *b.StringerDeadKNPerM != 3.2 || *b.FloorBeamDeadKNPerM != 4.5 {
		t.Errorf("floor columns %+v", b)
	}
	_, _, err = parseB(t, strings.TrimSuffix(bridgeHeader, "\n")+",stringer_spacing_m\nNME-1,A,B,1.0,pratt,48,8,6,through,20,18\n")
	if e := fieldErrors(t, err)[0]; e.Column != 11 || !strings.Contains(e.Msg, "at most 5 m") {
		t.Errorf("stringer spacing 18 m: %v", e)
	}
}
