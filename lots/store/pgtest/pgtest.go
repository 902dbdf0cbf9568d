// Package pgtest makes throw-away PostgreSQL databases for the tests of
// lotproof's packages and commands. Only tests import it.
package pgtest

import (
	"database/sql"
	"fmt"
	"math/rand/v2"
	"os"
	"strings"
	"testing"
	"time"

	_ "github.com/jackc/pgx/v5/stdlib" // driver "pgx"
)

// EnvVar names the environment variable holding the URL of the test
// server (.ci/start-postgres prints one). Tests skip their PostgreSQL
// half when it is not set.
const EnvVar = "LOTPROOF_TEST_PG"

// URL is the test server's URL from EnvVar, "" when not set.
func URL() string { return os.Getenv(EnvVar) }

// Fresh creates a database with a random name on the server of url and
// drops it when the test ends; it returns the URL of the new database
// (url with the database name replaced, its query kept).
func Fresh(t testing.TB, url string) string {
	t.Helper()
	admin, err := sql.Open("pgx", url)
	if err != nil {
		t.Fatal(err)
	}
	defer admin.Close()
	name := fmt.Sprintf("lotproof_t_%d_%d", time.Now().UnixNano(), rand.IntN(1e6))
	if _, err := admin.Exec("CREATE DATABASE " + name); err != nil {
		t.Fatalf("creating a test database: %v", err)
	}
	t.Cleanup(func() {
		a, err := sql.Open("pgx", url)
		if err != nil {
			return
		}
		defer a.Close()
		a.Exec("DROP DATABASE IF EXISTS " + name + " WITH (FORCE)")
	})
	base, q, _ := strings.Cut(url, "?")
	if q != "" {
		q = "?" + q
	}
	return base[:strings.LastIndex(base, "/")+1] + name + q
}
