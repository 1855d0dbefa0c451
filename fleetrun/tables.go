package fleetrun

import (
	"context"

	"github.com/trussfleet/trussfleet/internal/bridgegeom"
	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/truss"
	"github.com/trussfleet/trussfleet/store"
)

// attachTables reads the joint tables of the bridges whose truss is given as a table and
// hangs each on its bridge. A fleet without such bridges costs no query. A table read after
// its bridge's row may be newer than the version hashed with the row: the next run then
// screens it again, never the reverse.
func attachTables(ctx context.Context, db *store.DB, bridges []screening.Bridge) error {
	var ids []string
	for _, b := range bridges {
		if b.Truss.Type == truss.TableType {
			ids = append(ids, b.ID)
		}
	}
	if len(ids) == 0 {
		return nil
	}
	docs, err := db.TrussTables(ctx, ids)
	if err != nil {
		return err
	}
	for i := range bridges {
		if doc, ok := docs[bridges[i].ID]; ok {
			bridges[i].Table = bridgegeom.Table(doc)
		}
	}
	return nil
}
