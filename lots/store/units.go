package store

import (
	"context"
	"database/sql"
)

// noteEnteredUnit keeps the unit a property was first entered in (values
// are stored in the internal unit), so that the history shows a modulus
// entered in GPa in GPa (Msi in US units), as summary does.
func (s *Store) noteEnteredUnit(ctx context.Context, tx *sql.Tx, property, symbol string) error {
	_, err := tx.ExecContext(ctx, s.q(`UPDATE properties SET entered_unit = ? WHERE property = ? AND entered_unit = ''`), symbol, property)
	return err
}

// EnteredUnits maps each recorded property to the unit it was first
// entered in ("" for properties recorded before schema version 3).
func (s *Store) EnteredUnits(ctx context.Context) (map[string]string, error) {
	rows, err := s.db.QueryContext(ctx, `SELECT property, entered_unit FROM properties`)
	if err != nil {
		return nil, err
	}
	defer rows.Close()
	out := map[string]string{}
	for rows.Next() {
		var p, u string
		if err := rows.Scan(&p, &u); err != nil {
			return nil, err
		}
		if u != "" {
			out[p] = u
		}
	}
	return out, rows.Err()
}
