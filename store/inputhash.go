package store

import (
	"cmp"
	"context"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"math"
	"slices"

	"github.com/jackc/pgx/v5"
)

// InputHash is the digest of everything a bridge's result depends on: the run's plan (its
// hash: trains and settings), the bridge's geometry and loads, and its members' stored data
// in label order. Names, places and dates do not enter it; they change no result.
//
// The fields are written in binary, each text ended by a zero byte (which text in PostgreSQL
// cannot hold) and each optional number preceded by whether it is there, so that two
// different inputs never write the same bytes.
func InputHash(planHash string, b Bridge, members []Member) string {
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

// inputHashes hashes every bridge of the inventory as InputHash does, reading the bridges
// with their members in one ordered pass (one bridge's members in memory at a time), and
// returns the bridges' ids with their hashes in id order.
func inputHashes(ctx context.Context, tx pgx.Tx, planHash string) (ids, hashes []string, err error) {
	rows, err := tx.Query(ctx, "SELECT "+bridgeColumns+`, m.member IS NOT NULL, coalesce(m.member, ''),
		m.capacity_tension_kn, m.capacity_compression_kn, m.rating_factor, m.reference_train,
		coalesce(m.condition_factor, 1)
		FROM bridges b LEFT JOIN members m ON m.bridge_id = b.bridge_id ORDER BY b.bridge_id, m.member`)
	if err != nil {
		return nil, nil, err
	}
	defer rows.Close()
	var cur Bridge
	var members []Member
	flush := func() {
		if cur.BridgeID != "" {
			ids = append(ids, cur.BridgeID)
			hashes = append(hashes, InputHash(planHash, cur, members))
		}
	}
	for rows.Next() {
		var b Bridge
		var m Member
		var hasMember bool
		dest := append(b.pointers(), &hasMember, &m.Member, &m.CapacityTensionKN, &m.CapacityCompressionKN,
			&m.RatingFactor, &m.ReferenceTrain, &m.ConditionFactor)
		if err := rows.Scan(dest...); err != nil {
			return nil, nil, err
		}
		if b.BridgeID != cur.BridgeID {
			flush()
			cur, members = b, members[:0]
		}
		if hasMember {
			m.BridgeID = b.BridgeID
			members = append(members, m)
		}
	}
	if err := rows.Err(); err != nil {
		return nil, nil, err
	}
	flush()
	return ids, hashes, nil
}
