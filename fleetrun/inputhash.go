package fleetrun

import (
	"context"
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"

	"github.com/jackc/pgx/v5"
	"github.com/trussfleet/trussfleet/store"
)

// InputHash names the inputs a bridge's result depends on: the run's plan (its hash: trains
// and settings) and the bridge's input version, which the database renews whenever the
// bridge's geometry and loads or any of its members' rows change (store.Bridge.InputVersion).
// Equal hashes, equal inputs: a nightly run carries forward a bridge whose hash equals the
// one its base run screened. Names, places and dates change no version.
func InputHash(planHash string, inputVersion int64) string {
	buf := make([]byte, 0, 64)
	buf = append(buf, "trussfleet input 2\x00"...)
	buf = append(append(buf, planHash...), 0)
	buf = binary.BigEndian.AppendUint64(buf, uint64(inputVersion))
	sum := sha256.Sum256(buf)
	return hex.EncodeToString(sum[:16])
}

// inputHashes takes InputHash of every bridge of the inventory, reading only the bridges'
// ids and versions, and returns the ids with their hashes in id order.
func inputHashes(ctx context.Context, tx pgx.Tx, planHash string) (ids, hashes []string, err error) {
	ids, versions, err := store.InputVersions(ctx, tx)
	if err != nil {
		return nil, nil, err
	}
	hashes = make([]string, len(ids))
	for i, v := range versions {
		hashes[i] = InputHash(planHash, v)
	}
	return ids, hashes, nil
}
