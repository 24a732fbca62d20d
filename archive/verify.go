package archive

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"

	"github.com/cockroachdb/pebble/v2"

	"reprise/shingle"
)

// Verify checks that the archive is whole: every document's records decode,
// its text hashes to its recorded SHA-256, its units lie inside its text
// (with resplit: are exactly what splitting its text under the archive's
// settings gives, which costs a full split of every text), both indexes (by
// content and by path) point at it and at nothing else, the postings hold
// exactly the documents whose units contain each fingerprint, and the
// document count is right. It returns one line per problem found (none for
// a whole archive); the error is for failures to read.
func (a *Archive) Verify(resplit bool) ([]string, error) {
	var problems []string
	bad := func(format string, args ...any) {
		if len(problems) < 100 {
			problems = append(problems, fmt.Sprintf(format, args...))
		}
	}
	docs, err := a.List()
	if err != nil {
		return nil, err
	}
	sp := shingle.New(shingle.Options{MinWords: a.settings.MinWords, MaxUnitBytes: a.settings.MaxUnitBytes})
	expect := map[uint64][]uint64{} // fingerprint → IDs
	byHash := map[[32]byte]uint64{}
	byPath := map[[32]byte]uint64{}
	next, err := a.counter(keyNext)
	if err != nil {
		return nil, err
	}
	var units []shingle.Unit
	for _, m := range docs {
		d, err := a.Load(m.ID)
		if err != nil {
			bad("document %d (%s): %v", m.ID, m.Path, err)
			continue
		}
		if d.ID >= next {
			bad("document %d (%s): ID not below the next ID %d", d.ID, d.Path, next)
		}
		if ContentHash(d.Text) != d.Hash {
			bad("document %d (%s): text does not match its SHA-256", d.ID, d.Path)
		}
		if d.Units != len(d.UnitList) {
			bad("document %d (%s): %d units recorded, %d stored", d.ID, d.Path, d.Units, len(d.UnitList))
		}
		for _, u := range d.UnitList {
			if u.Start >= u.End || int(u.End) > len(d.Text) {
				bad("document %d (%s): unit [%d, %d) outside its text of %d bytes", d.ID, d.Path, u.Start, u.End, len(d.Text))
				break
			}
		}
		if resplit {
			units, _ = sp.Sentences(d.Text, units[:0])
			if !sameUnits(units, d.UnitList) {
				bad("document %d (%s): stored units differ from the units of its text", d.ID, d.Path)
			}
		}
		for _, fp := range distinct(d.UnitList) {
			expect[fp] = append(expect[fp], d.ID)
		}
		byHash[d.Hash] = d.ID
		byPath[sha256sum(d.Path)] = d.ID
	}
	if n, err := a.Count(); err != nil {
		return nil, err
	} else if n != len(docs) {
		bad("document count says %d, the archive holds %d", n, len(docs))
	}
	for _, idx := range []struct {
		prefix string
		want   map[[32]byte]uint64
		name   string
	}{{"h/", byHash, "content index"}, {"n/", byPath, "path index"}} {
		seen := 0
		err := a.scan(idx.prefix, func(k, v []byte) {
			seen++
			var h [32]byte
			copy(h[:], k[2:])
			id, ok := idx.want[h]
			if len(k) != 34 || len(v) != 8 || !ok || binary.BigEndian.Uint64(v) != id {
				bad("%s entry %x points at no matching document", idx.name, k[2:])
			}
		})
		if err != nil {
			return nil, err
		}
		if seen != len(idx.want) {
			bad("%s has %d entries for %d documents", idx.name, seen, len(idx.want))
		}
	}
	var ids []uint64
	err = a.scan("p/", func(k, v []byte) {
		if len(k) != 10 {
			bad("posting key %x has the wrong length", k)
			return
		}
		fp := binary.BigEndian.Uint64(k[2:])
		var derr error
		ids, derr = decodeIDs(ids[:0], v)
		slices.Sort(ids)
		want := expect[fp]
		delete(expect, fp)
		if derr != nil || !slices.Equal(ids, want) {
			bad("posting %016x holds %v, the documents hold %v", fp, ids, want)
		}
	})
	if err != nil {
		return nil, err
	}
	for fp, want := range expect {
		bad("posting %016x is missing (documents %v)", fp, want)
	}
	slices.Sort(problems)
	return problems, nil
}

func (a *Archive) scan(prefix string, fn func(k, v []byte)) error {
	it, err := a.db.NewIter(&pebble.IterOptions{LowerBound: []byte(prefix), UpperBound: prefixEnd([]byte(prefix))})
	if err != nil {
		return fmt.Errorf("archive: %w", err)
	}
	for it.First(); it.Valid(); it.Next() {
		fn(bytes.Clone(it.Key()), it.Value())
	}
	if err := it.Error(); err != nil {
		it.Close()
		return fmt.Errorf("archive: %w", err)
	}
	return it.Close()
}

// DiskUsage sums the sizes of the files under dir.
func DiskUsage(dir string) (int64, error) {
	var total int64
	err := filepath.WalkDir(dir, func(_ string, d fs.DirEntry, err error) error {
		if err != nil {
			return err
		}
		if d.Type().IsRegular() {
			fi, err := d.Info()
			if err != nil {
				return err
			}
			total += fi.Size()
		}
		return nil
	})
	if err != nil && !os.IsNotExist(err) {
		return total, fmt.Errorf("archive: %w", err)
	}
	return total, nil
}

// sameUnits compares every field of the units (format 2 stores them all,
// word positions included).
func sameUnits(x, y []shingle.Unit) bool { return slices.Equal(x, y) }
