package serve

import (
	"context"

	"lotproof/lots/store"
)

// History is what the trend behind the overview and supplier pages reads:
// the store's query API (lots/store), which *store.Store satisfies.
type History interface {
	LotSamples(ctx context.Context, f store.Filter) ([]store.LotValues, error)
	LotVerdicts(ctx context.Context) (map[string][]store.Verdict, error)
	SpecLimits(ctx context.Context) ([]store.SpecLimit, error)
}

var _ History = (*store.Store)(nil)

// Import is one recorded import.
type Import = store.ImportRecord

// Hit is one search result.
type Hit = store.Hit

// MaxHits bounds the results of each kind a search returns.
const MaxHits = store.MaxHits
