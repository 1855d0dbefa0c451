package screening

import "testing"

// TestPlanHashNamesTheMethod: a plan's hash changes with the method version and with the
// plan, and not otherwise, so that a run with --changed after a change of method screens
// every bridge again (fleetrun/create.go compares input hashes, the plan hash among them).
func TestPlanHashNamesTheMethod(t *testing.T) {
	p := Plan{Dynamic: "phi3"}
	if p.Hash() != p.hashWith(MethodVersion) || p.Hash() != (Plan{Dynamic: "phi3"}).Hash() {
		t.Error("the hash is not the plan's under the current method, or not stable")
	}
	if p.hashWith(MethodVersion) == p.hashWith(MethodVersion+1) {
		t.Error("a new method leaves the hash as it was")
	}
	if p.Hash() == (Plan{Dynamic: "phi2"}).Hash() {
		t.Error("another plan gives the same hash")
	}
}
