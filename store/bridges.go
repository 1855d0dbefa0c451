package store

import (
	"context"
	"errors"
	"fmt"
	"time"

	"github.com/jackc/pgx/v5"
)

// Table bridges: sql/migrations/001_inventory.sql; input_version and its triggers, 010; the
// cross-section, 012_cross_section.sql; the truss forms, 013_truss_forms.sql; the floor
// system, 014_floor_system.sql.

// Bridge is one span of the inventory, a row of the bridges table. Pointer fields are
// optional (NULL when nil).
type Bridge struct {
	BridgeID   string   `json:"bridge_id"` // the owner's asset key
	Name       string   `json:"name"`
	Line       string   `json:"line"` // the railway line the span carries
	ChainageKM *float64 `json:"chainage_km,omitempty"`
	TrussType  string   `json:"truss_type"` // a truss type name, e.g. "pratt"
	SpanM      float64  `json:"span_m"`
	Panels     int      `json:"panels"`
	DepthM     float64  `json:"depth_m"`
	Deck       string   `json:"deck"`      // "through" or "deck"
	EndPosts   string   `json:"end_posts"` // "" takes the type's default
	Trusses    int      `json:"trusses"`
	// TrussShare is the share of one track's load the analysed truss carries.
	TrussShare float64 `json:"truss_share"`
	Tracks     int     `json:"tracks"`
	// DeadLoadKNPerM is the dead load one main truss carries, kN per metre of span.
	DeadLoadKNPerM float64    `json:"dead_load_kn_per_m"`
	YearBuilt      *int       `json:"year_built,omitempty"`
	Latitude       *float64   `json:"latitude,omitempty"`
	Longitude      *float64   `json:"longitude,omitempty"`
	LastInspected  *time.Time `json:"last_inspected,omitempty"` // a date
	// The cross-section (012): the distance between the main trusses, m, and each track's
	// offset from the centre line, m, positive towards truss A; both nil or both set (then
	// TrussShare and Tracks hold their defaults and are not used).
	TrussSpacingM *float64  `json:"truss_spacing_m,omitempty"`
	TrackOffsetsM []float64 `json:"track_offsets_m,omitempty"`
	// LineSpeedKmh is the line speed, km/h; FirstFrequencyHz the measured first bending
	// frequency, Hz.
	LineSpeedKmh     *float64 `json:"line_speed_kmh,omitempty"`
	FirstFrequencyHz *float64 `json:"first_frequency_hz,omitempty"`
	// TrussWeightKNPerM is the part of DeadLoadKNPerM that is the truss's own weight.
	TrussWeightKNPerM float64 `json:"truss_weight_kn_per_m"`
	// DepthsM is a polygonal top chord's depth at every top-chord joint, left to right
	// (nil: parallel chords or a parabola); EndDepthM a parabolic top chord's depth at its
	// first and last joints (0: none); Spans the number of equal spans over which the truss
	// is continuous (migration 013_truss_forms.sql).
	DepthsM   []float64 `json:"depths_m,omitempty"`
	EndDepthM float64   `json:"end_depth_m,omitempty"`
	Spans     int       `json:"spans,omitempty"`
	// InputVersion is new whenever a screening input of the bridge changes: its geometry and
	// loads, or any of its members' rows (sql/migrations/010_input_versions.sql). Read only.
	InputVersion int64 `json:"-"`
	// StringerSpacingM, StringerDeadKNPerM and FloorBeamDeadKNPerM are the floor system's
	// data (migration 014): nil takes the screening's defaults.
	StringerSpacingM    *float64 `json:"stringer_spacing_m,omitempty"`
	StringerDeadKNPerM  *float64 `json:"stringer_dead_kn_per_m,omitempty"`
	FloorBeamDeadKNPerM *float64 `json:"floor_beam_dead_kn_per_m,omitempty"`
}

// BridgeSummary is a bridge with what is stored about its members.
type BridgeSummary struct {
	Bridge
	Members   int       `json:"members"`
	UpdatedAt time.Time `json:"updated_at"`
}

var bridgesTable = table{
	name: "bridges",
	key:  []string{"bridge_id"},
	cols: []string{"name", "line", "chainage_km", "truss_type", "span_m", "panels", "depth_m", "deck", "end_posts",
		"trusses", "truss_share", "tracks", "dead_load_kn_per_m", "year_built", "latitude", "longitude", "last_inspected",
		"truss_spacing_m", "track_offsets_m", "line_speed_kmh", "first_frequency_hz", "truss_weight_kn_per_m",
		"depths_m", "end_depth_m", "spans", "stringer_spacing_m", "stringer_dead_kn_per_m", "floor_beam_dead_kn_per_m"},
	touch: "updated_at",
}

// bridgeColumns is the select list matching scanBridge.
const bridgeColumns = `b.bridge_id, b.name, b.line, b.chainage_km, b.truss_type, b.span_m, b.panels, b.depth_m, b.deck,
	b.end_posts, b.trusses, b.truss_share, b.tracks, b.dead_load_kn_per_m, b.year_built, b.latitude, b.longitude,
	b.last_inspected, b.truss_spacing_m, b.track_offsets_m, b.line_speed_kmh, b.first_frequency_hz,
	b.truss_weight_kn_per_m, b.input_version, b.depths_m, b.end_depth_m, b.spans,
	b.stringer_spacing_m, b.stringer_dead_kn_per_m, b.floor_beam_dead_kn_per_m`

func (b Bridge) values() []any {
	return []any{b.BridgeID, b.Name, b.Line, b.ChainageKM, b.TrussType, b.SpanM, b.Panels, b.DepthM, b.Deck, b.EndPosts,
		b.Trusses, b.TrussShare, b.Tracks, b.DeadLoadKNPerM, b.YearBuilt, b.Latitude, b.Longitude, b.LastInspected,
		b.TrussSpacingM, b.TrackOffsetsM, b.LineSpeedKmh, b.FirstFrequencyHz, b.TrussWeightKNPerM,
		b.DepthsM, b.EndDepthM, max(b.Spans, 1), b.StringerSpacingM, b.StringerDeadKNPerM, b.FloorBeamDeadKNPerM}
}

func (b *Bridge) pointers() []any {
	return []any{&b.BridgeID, &b.Name, &b.Line, &b.ChainageKM, &b.TrussType, &b.SpanM, &b.Panels, &b.DepthM, &b.Deck,
		&b.EndPosts, &b.Trusses, &b.TrussShare, &b.Tracks, &b.DeadLoadKNPerM, &b.YearBuilt, &b.Latitude, &b.Longitude,
		&b.LastInspected, &b.TrussSpacingM, &b.TrackOffsetsM, &b.LineSpeedKmh, &b.FirstFrequencyHz,
		&b.TrussWeightKNPerM, &b.InputVersion, &b.DepthsM, &b.EndDepthM, &b.Spans,
		&b.StringerSpacingM, &b.StringerDeadKNPerM, &b.FloorBeamDeadKNPerM}
}

// OrZero is an optional number's value, 0 where it is NULL (nil).
func OrZero(p *float64) float64 {
	if p == nil {
		return 0
	}
	return *p
}

// ErrNotFound is returned (wrapped) when a named row does not exist.
var ErrNotFound = errors.New("not found")

// Bridges returns every bridge, ordered by bridge_id.
func (db *DB) Bridges(ctx context.Context) ([]Bridge, error) {
	rows, err := db.Pool.Query(ctx, "SELECT "+bridgeColumns+" FROM bridges b ORDER BY b.bridge_id")
	if err != nil {
		return nil, fmt.Errorf("listing bridges: %w", err)
	}
	return pgx.CollectRows(rows, func(r pgx.CollectableRow) (Bridge, error) {
		var b Bridge
		return b, r.Scan(b.pointers()...)
	})
}

// BridgeIDsFolded returns the bridge ids that equal id but for case (id itself left out), at
// most five: bridge ids are matched exactly, and a command that finds no bridge names these
// as what the user may have meant.
func (db *DB) BridgeIDsFolded(ctx context.Context, id string) ([]string, error) {
	rows, err := db.Pool.Query(ctx, "SELECT bridge_id FROM bridges WHERE lower(bridge_id) = lower($1) AND bridge_id <> $1 ORDER BY bridge_id LIMIT 5", id)
	if err != nil {
		return nil, fmt.Errorf("looking up bridge ids like %q: %w", id, err)
	}
	return pgx.CollectRows(rows, pgx.RowTo[string])
}

// Bridge returns one bridge by its asset key.
func (db *DB) Bridge(ctx context.Context, bridgeID string) (Bridge, error) {
	var b Bridge
	err := db.Pool.QueryRow(ctx, "SELECT "+bridgeColumns+" FROM bridges b WHERE b.bridge_id = $1", bridgeID).Scan(b.pointers()...)
	if errors.Is(err, pgx.ErrNoRows) {
		return b, fmt.Errorf("bridge %q: %w", bridgeID, ErrNotFound)
	}
	if err != nil {
		return b, fmt.Errorf("reading bridge %q: %w", bridgeID, err)
	}
	return b, nil
}

// BridgeSummaries returns every bridge with its member count, ordered by bridge_id.
func (db *DB) BridgeSummaries(ctx context.Context) ([]BridgeSummary, error) {
	rows, err := db.Pool.Query(ctx, "SELECT "+bridgeColumns+`, b.updated_at,
		(SELECT count(*) FROM members m WHERE m.bridge_id = b.bridge_id)
		FROM bridges b ORDER BY b.bridge_id`)
	if err != nil {
		return nil, fmt.Errorf("listing bridges: %w", err)
	}
	return pgx.CollectRows(rows, func(r pgx.CollectableRow) (BridgeSummary, error) {
		var s BridgeSummary
		return s, r.Scan(append(s.pointers(), &s.UpdatedAt, &s.Members)...)
	})
}

// PendingBridgesOf reads those of the bridges ids that are still pending in the run, in id
// order, with the members of all of ids.
//
// Both reads see one snapshot (a read-only repeatable-read transaction): the members are
// those of the bridges' rows as read, so each bridge's InputVersion names exactly the inputs
// returned.
func (db *DB) PendingBridgesOf(ctx context.Context, runID int64, ids []string) (bridges []Bridge, members []Member, err error) {
	err = pgx.BeginTxFunc(ctx, db.Pool, pgx.TxOptions{IsoLevel: pgx.RepeatableRead, AccessMode: pgx.ReadOnly}, func(tx pgx.Tx) error {
		bridges, members, err = pendingBridgesOf(ctx, tx, runID, ids)
		return err
	})
	return bridges, members, err
}

func pendingBridgesOf(ctx context.Context, tx pgx.Tx, runID int64, ids []string) ([]Bridge, []Member, error) {
	// r.bridge_id = ANY($2) as well as the join: a run just created may have no statistics,
	// and then the planner may read all the run's bridges to join 50 of them.
	rows, err := tx.Query(ctx, "SELECT "+bridgeColumns+` FROM bridges b
		JOIN run_bridges r ON r.bridge_id = b.bridge_id AND r.run_id = $1 AND r.status = 'pending'
			AND r.bridge_id = ANY($2)
		WHERE b.bridge_id = ANY($2) ORDER BY b.bridge_id`, runID, ids)
	if err != nil {
		return nil, nil, err
	}
	bridges, err := pgx.CollectRows(rows, func(r pgx.CollectableRow) (Bridge, error) {
		var b Bridge
		return b, r.Scan(b.pointers()...)
	})
	if err != nil {
		return nil, nil, err
	}
	rows, err = tx.Query(ctx, "SELECT "+memberColumns+" FROM members WHERE bridge_id = ANY($1)", ids)
	if err != nil {
		return nil, nil, err
	}
	members, err := collectMembers(rows)
	if err != nil {
		return nil, nil, err
	}
	return bridges, members, nil
}

// InputVersions lists every bridge of the inventory with its input version, in id order.
func InputVersions(ctx context.Context, tx pgx.Tx) (ids []string, versions []int64, err error) {
	rows, err := tx.Query(ctx, "SELECT bridge_id, input_version FROM bridges ORDER BY bridge_id")
	if err != nil {
		return nil, nil, err
	}
	var id string
	var v int64
	_, err = pgx.ForEachRow(rows, []any{&id, &v}, func() error {
		ids, versions = append(ids, id), append(versions, v)
		return nil
	})
	return ids, versions, err
}
