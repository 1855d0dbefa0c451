package fleetrun

import (
	"context"
	"errors"
	"fmt"
	"io/fs"
	"strings"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/store"
)

// Lookup finds trains and bridges for a command that works without a database as long as
// nothing stored is asked for (envelope): it opens the database at the first question only
// the database can answer, once, and Close closes it. A zero Lookup with Open set is ready.
type Lookup struct {
	// Examples are the train files shipped with the program (configs/trains); may be nil.
	Examples fs.FS
	// Open connects to the database; it is called at most once.
	Open func(context.Context) (*store.DB, error)

	db      *store.DB
	openErr error
	opened  bool
}

// DB opens the database on first use.
func (l *Lookup) DB(ctx context.Context) (*store.DB, error) {
	if !l.opened {
		l.opened = true
		l.db, l.openErr = l.Open(ctx)
	}
	return l.db, l.openErr
}

// Close closes the database if Lookup opened it.
func (l *Lookup) Close() {
	if l.db != nil {
		l.db.Close()
		l.db = nil
	}
}

// Train resolves a train as a screening run does (ResolveTrain), but reads the database
// only for a name that is no built-in model, no train file on disk and no example train:
// a file or an example train of the same name as a stored train is therefore taken before
// the stored train. The error for a name found nowhere lists what was tried.
func (l *Lookup) Train(ctx context.Context, asked string) (*traffic.Train, error) {
	asked = strings.TrimSpace(asked)
	t, err := traffic.ParseSpec(asked, l.Examples)
	if !errors.Is(err, traffic.ErrUnknownTrain) {
		return t, err
	}
	db, derr := l.DB(ctx)
	if derr != nil {
		return nil, fmt.Errorf("%w; the stored trains could not be read: %w", err, derr)
	}
	st, serr := db.FindTrain(ctx, asked)
	switch {
	case errors.Is(serr, store.ErrNotFound):
		return nil, fmt.Errorf("%w; no stored train of that name or file name either (import one with `trussfleet import trains`)", err)
	case serr != nil:
		return nil, serr
	}
	ref := screening.TrainRef{Asked: asked, Name: st.Name, Source: st.Source, FileName: st.FileName}
	t, err = ref.Train()
	if err != nil {
		return nil, fmt.Errorf("stored train %q: %w", st.Name, err)
	}
	return t, nil
}

// Bridge reads a stored bridge (matched exactly by its id) as screening sees it, without
// members: its truss and its live-load share (screening.Bridge.LiveShare).
func (l *Lookup) Bridge(ctx context.Context, id string) (screening.Bridge, error) {
	db, err := l.DB(ctx)
	if err != nil {
		return screening.Bridge{}, err
	}
	b, err := db.Bridge(ctx, id)
	if err != nil {
		return screening.Bridge{}, err
	}
	sb := []screening.Bridge{ScreeningInput(b, nil)}
	if err := attachTables(ctx, db, sb); err != nil {
		return screening.Bridge{}, err
	}
	return sb[0], nil
}
