package fleetrun

import (
	"cmp"
	"context"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"math"
	"slices"

	"github.com/jackc/pgx/v5"
	"github.com/trussfleet/trussfleet/store"
)

// InputHash is the digest of everything a bridge's result depends on: the run's plan (its
// hash: trains and settings), the bridge's geometry and loads, and its members' stored data
// in label order. Names, places and dates do not enter it; they change no result.
//
// The fields are written in binary, each text ended by a zero byte (which text in PostgreSQL
// cannot hold) and each optional number preceded by whether it is there, so that two
// different inputs never write the same bytes.
func InputHash(planHash string, b store.Bridge, members []store.Member) string {
	var h inputHasher
	h.text("trussfleet input 1")
	h.text(planHash)
	h.text(b.TrussType)
	h.num(b.SpanM)
	h.int(b.Panels)
	h.num(b.DepthM)
	h.text(b.Deck)
	h.text(b.EndPosts)
	h.int(b.Trusses)
	h.num(b.TrussShare)
	h.int(b.Tracks)
	h.num(b.DeadLoadKNPerM)
	order := make([]int, len(members))
	for i := range order {
		order[i] = i
	}
	slices.SortFunc(order, func(i, j int) int { return cmp.Compare(members[i].Member, members[j].Member) })
	h.int(len(members))
	for _, i := range order {
		m := members[i]
		h.text(m.Member)
		h.optNum(m.CapacityTensionKN)
		h.optNum(m.CapacityCompressionKN)
		h.optNum(m.RatingFactor)
		h.optText(m.ReferenceTrain)
		h.num(m.ConditionFactor)
	}
	sum := sha256.Sum256(h.buf)
	return hex.EncodeToString(sum[:16])
}

// inputHasher collects the bytes InputHash digests.
type inputHasher struct{ buf []byte }

func (h *inputHasher) text(s string) { h.buf = append(append(h.buf, s...), 0) }

func (h *inputHasher) num(v float64) {
	h.buf = binary.BigEndian.AppendUint64(h.buf, math.Float64bits(v))
}

func (h *inputHasher) int(n int) { h.buf = binary.BigEndian.AppendUint64(h.buf, uint64(n)) }

// present writes whether an optional value is there, and returns it.
func (h *inputHasher) present(ok bool) bool {
	b := byte(0)
	if ok {
		b = 1
	}
	h.buf = append(h.buf, b)
	return ok
}

func (h *inputHasher) optNum(v *float64) {
	if h.present(v != nil) {
		h.num(*v)
	}
}

func (h *inputHasher) optText(s *string) {
	if h.present(s != nil) {
		h.text(*s)
	}
}

// inputHashes hashes every bridge of the inventory as InputHash does (store.EachBridge: one
// ordered pass, one bridge's members in memory at a time), and returns the bridges' ids with
// their hashes in id order.
func inputHashes(ctx context.Context, tx pgx.Tx, planHash string) (ids, hashes []string, err error) {
	err = store.EachBridge(ctx, tx, func(b store.Bridge, members []store.Member) {
		ids = append(ids, b.BridgeID)
		hashes = append(hashes, InputHash(planHash, b, members))
	})
	if err != nil {
		return nil, nil, err
	}
	return ids, hashes, nil
}
