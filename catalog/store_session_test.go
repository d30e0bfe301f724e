package catalog

import (
	"context"
	"errors"
	"reflect"
	"strings"
	"testing"
)

// chunks splits a batch of resistors into batches of n.
func chunks(b *Snapshot, n int) []*Snapshot {
	var out []*Snapshot
	for i := 0; i < len(b.Resistors); i += n {
		out = append(out, &Snapshot{Resistors: b.Resistors[i:min(i+n, len(b.Resistors))]})
	}
	return out
}

// TestSessionChunksEqualOneUpsert checks that a batch written in chunks
// gives the same catalog, history included, as the batch written at once.
func TestSessionChunksEqualOneUpsert(t *testing.T) {
	ctx := context.Background()
	opt := UpsertOptions{Source: "chunked", Now: testTime}
	whole := memStore(t)
	mustUpsert(t, whole, sampleBatch(), opt)
	mustUpsert(t, whole, bigBatch(2500, "CH"), opt)

	chunked := memStore(t)
	us, err := chunked.BeginUpsert(ctx, opt)
	if err != nil {
		t.Fatal(err)
	}
	defer us.Rollback()
	if _, err := us.Add(ctx, sampleBatch()); err != nil {
		t.Fatal(err)
	}
	added := 0
	for _, c := range chunks(bigBatch(2500, "CH"), 700) {
		res, err := us.Add(ctx, c)
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range res {
			if r.Outcome == Added {
				added++
			}
		}
	}
	if err := us.Commit(); err != nil {
		t.Fatal(err)
	}
	if added != 2500 {
		t.Errorf("%d added over the chunks, want 2500", added)
	}
	if got, want := normalise(mustSnapshot(t, chunked)), normalise(mustSnapshot(t, whole)); !reflect.DeepEqual(got, want) {
		t.Error("chunked session and one Upsert give different catalogs")
	}
	for _, part := range []string{"CH-000000", "CH-002499"} {
		h1, _ := whole.History(ctx, part)
		h2, _ := chunked.History(ctx, part)
		if !reflect.DeepEqual(h1, h2) {
			t.Errorf("history of %s: chunked %v, whole %v", part, h2, h1)
		}
	}
}

// TestSessionRepeatsAndRollback covers a part met twice across chunks, a
// bad chunk after good ones (all or nothing, the session's point), a dry
// run, and use after the end.
func TestSessionRepeatsAndRollback(t *testing.T) {
	ctx := context.Background()
	bad := bigBatch(3, "BAD")
	bad.Resistors[2].Tolerance = -1
	tests := []struct {
		name    string
		before  *Snapshot // committed first
		chunks  []*Snapshot
		dryRun  bool
		wantErr error
		want    []Outcome // outcomes of the last chunk
		kept    int       // resistors in the catalog afterwards
	}{
		{"repeat of an added part", nil, []*Snapshot{bigBatch(3, "R"), bigBatch(2, "R")}, false, nil,
			[]Outcome{Repeated, Repeated}, 3},
		{"repeat of an existing part", bigBatch(2, "E"), []*Snapshot{bigBatch(2, "E"), bigBatch(3, "E")}, false, nil,
			[]Outcome{Repeated, Repeated, Added}, 3},
		{"bad chunk rolls back earlier chunks", bigBatch(1, "K"), []*Snapshot{bigBatch(4, "G"), bad}, false, ErrInvalid, nil, 1},
		{"dry run writes nothing", nil, []*Snapshot{bigBatch(4, "D"), bigBatch(5, "D")}, true, nil,
			[]Outcome{Repeated, Repeated, Repeated, Repeated, Added}, 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := memStore(t)
			if tc.before != nil {
				mustUpsert(t, s, tc.before, UpsertOptions{Now: testTime})
			}
			us, err := s.BeginUpsert(ctx, UpsertOptions{Now: testTime, DryRun: tc.dryRun})
			if err != nil {
				t.Fatal(err)
			}
			defer us.Rollback()
			var last []UpsertResult
			for _, c := range tc.chunks {
				if last, err = us.Add(ctx, c); err != nil {
					break
				}
			}
			if tc.wantErr != nil {
				if !errors.Is(err, tc.wantErr) || !strings.Contains(err.Error(), "nothing was written") {
					t.Fatalf("err = %v, want %v saying nothing was written", err, tc.wantErr)
				}
				if _, err := us.Add(ctx, bigBatch(1, "Z")); !errors.Is(err, ErrSessionDone) {
					t.Errorf("Add after a failed Add: %v, want ErrSessionDone", err)
				}
			} else {
				if err != nil {
					t.Fatal(err)
				}
				var got []Outcome
				for _, r := range last {
					got = append(got, r.Outcome)
				}
				if !reflect.DeepEqual(got, tc.want) {
					t.Errorf("outcomes %v, want %v", got, tc.want)
				}
				if err := us.Commit(); err != nil {
					t.Fatal(err)
				}
				if err := us.Commit(); !errors.Is(err, ErrSessionDone) {
					t.Errorf("second Commit: %v, want ErrSessionDone", err)
				}
			}
			if n := len(mustSnapshot(t, s).Resistors); n != tc.kept {
				t.Errorf("%d resistors in the catalog, want %d", n, tc.kept)
			}
		})
	}
}

// BenchmarkUpsertSession100k writes the same 100,000 resistors as
// BenchmarkUpsert100k through one session in chunks of 4096, as an import
// does: the cost of chunking (one lookup of existing parts and one flush
// per chunk) against one batch.
func BenchmarkUpsertSession100k(b *testing.B) {
	benchWrites(b, "BS", func(ctx context.Context, s *Store, batch *Snapshot) error {
		us, err := s.BeginUpsert(ctx, UpsertOptions{Source: "bench", Now: testTime})
		if err != nil {
			return err
		}
		defer us.Rollback()
		for _, c := range chunks(batch, 4096) {
			if _, err := us.Add(ctx, c); err != nil {
				return err
			}
		}
		return us.Commit()
	})
}

// TestSessionIndexesRestored: a session into an empty table drops its
// secondary indexes and builds them again at Commit (deferIndexes); after
// a commit, a failed chunk, a dry run or a session into a table that
// already holds parts, the catalog has the same indexes, to the SQL, as a
// new one, and the value index answers a query.
func TestSessionIndexesRestored(t *testing.T) {
	ctx := context.Background()
	bad := bigBatch(3, "BAD")
	bad.Resistors[2].Tolerance = -1
	indexes := func(s *Store) map[string]string {
		var xs []struct {
			Name string `db:"name"`
			SQL  string `db:"sql"`
		}
		if err := s.db.SelectContext(ctx, &xs, "SELECT name, sql FROM sqlite_master WHERE type = 'index' AND sql IS NOT NULL"); err != nil {
			t.Fatal(err)
		}
		out := map[string]string{}
		for _, x := range xs {
			out[x.Name] = x.SQL
		}
		return out
	}
	want := indexes(memStore(t))
	if want["resistors_value"] == "" || want["part_history_part"] == "" {
		t.Fatalf("a new catalog's indexes %v lack the value or history index", want)
	}
	tests := []struct {
		name   string
		before *Snapshot
		chunks []*Snapshot
		dryRun bool
		commit bool
		kept   int
	}{
		{"commit into an empty catalog", nil, []*Snapshot{bigBatch(40, "A"), bigBatch(30, "B")}, false, true, 70},
		{"failed chunk into an empty catalog", nil, []*Snapshot{bigBatch(40, "A"), bad}, false, false, 0},
		{"dry run into an empty catalog", nil, []*Snapshot{bigBatch(40, "A")}, true, true, 0},
		{"commit into a catalog with parts", bigBatch(5, "E"), []*Snapshot{bigBatch(40, "A")}, false, true, 45},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := memStore(t)
			if tc.before != nil {
				mustUpsert(t, s, tc.before, UpsertOptions{Now: testTime})
			}
			us, err := s.BeginUpsert(ctx, UpsertOptions{Now: testTime, DryRun: tc.dryRun})
			if err != nil {
				t.Fatal(err)
			}
			defer us.Rollback()
			for _, c := range tc.chunks {
				if _, err = us.Add(ctx, c); err != nil {
					break
				}
			}
			if tc.commit {
				if err != nil {
					t.Fatal(err)
				}
				if err := us.Commit(); err != nil {
					t.Fatal(err)
				}
			} else if err == nil {
				t.Fatal("the bad chunk was taken")
			}
			if got := indexes(s); !reflect.DeepEqual(got, want) {
				t.Errorf("indexes after the session %v, want %v", got, want)
			}
			var n int
			if err := s.db.GetContext(ctx, &n, "SELECT COUNT(*) FROM resistors INDEXED BY resistors_value WHERE value_ohm > 0"); err != nil || n != tc.kept {
				t.Errorf("%d resistors through the value index (%v), want %d", n, err, tc.kept)
			}
		})
	}
}
