package store

import (
	"context"
	"errors"
	"fmt"
	"strings"
)

// DropAbsent deletes, for every bridge the staged file has rows for, the stored rows the file
// does not list (matched on the table's natural key), inside the import's transaction, and
// returns how many it deleted. Bridges the file does not mention keep their rows. Only a
// members import has rows per bridge to replace. The input-version trigger on members
// (migration 010, statement-level AFTER DELETE) renews the versions of the bridges it
// touches, so an incremental run screens them again.
func (im *Import) DropAbsent(ctx context.Context) (int, error) {
	if im.kind != KindMembers {
		return 0, errors.New("replacing applies to a members import only")
	}
	t := tables[im.kind]
	match := make([]string, len(t.key))
	for i, k := range t.key {
		match[i] = "s." + k + " = m." + k
	}
	q := fmt.Sprintf(`DELETE FROM %[1]s m
		WHERE m.bridge_id IN (SELECT DISTINCT bridge_id FROM %[2]s)
		AND NOT EXISTS (SELECT 1 FROM %[2]s s WHERE %[3]s)`,
		t.name, t.stage(), strings.Join(match, " AND "))
	tag, err := im.tx.Exec(ctx, q)
	if err != nil {
		return 0, fmt.Errorf("removing %s rows absent from the file: %w", t.name, err)
	}
	return int(tag.RowsAffected()), nil
}
