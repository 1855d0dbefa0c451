package fleetrun

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"

	"github.com/trussfleet/trussfleet/screening"
	"github.com/trussfleet/trussfleet/screening/traffic"
	"github.com/trussfleet/trussfleet/store"
)

// ResolveTrain finds the train a configuration or an inventory names: a built-in model
// ("lm71:alpha=1"), a stored train (by its name, or its file name with or without .yaml), or
// a train file on disk. The reference keeps the definition, so that the run can be repeated.
func ResolveTrain(ctx context.Context, db *store.DB, asked string) (screening.TrainRef, error) {
	asked = strings.TrimSpace(asked)
	ref := screening.TrainRef{Asked: asked}
	if t, ok, err := traffic.Builtin(asked); ok {
		if err != nil {
			return ref, err
		}
		ref.Name, ref.Builtin = t.Name, asked
		return ref, nil
	}
	st, err := db.FindTrain(ctx, asked)
	switch {
	case err == nil:
		ref.Name, ref.Source, ref.FileName = st.Name, st.Source, st.FileName
		_, err := ref.Train()
		return ref, err
	case !errors.Is(err, store.ErrNotFound):
		return ref, err
	}
	if data, err := os.ReadFile(asked); err == nil {
		t, err := traffic.ParseTrainFile(asked, data)
		if err != nil {
			return ref, err
		}
		ref.Name, ref.Source, ref.FileName = t.Name, string(data), filepath.Base(asked)
		return ref, nil
	}
	return ref, fmt.Errorf("train %q: not a built-in model (%s), not a stored train (import it with `trussfleet import trains`), not a file",
		asked, strings.Join(traffic.BuiltinNames(), "; "))
}
