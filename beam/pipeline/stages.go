package pipeline

import (
	"context"
	"fmt"
	"slices"
	"strings"

	"github.com/apache/beam/sdks/v2/go/pkg/beam/register"

	"reprise/corpus"
	"reprise/pairs"
	"reprise/scan"
	"reprise/shingle"
)

// Every DoFn, function and emitter is registered, so portable runners
// (Prism, Flink, Spark) can find them by name in the worker without
// reflection over the binary.
func init() {
	register.DoFn7x1[context.Context, string, func(string), func(string, string), func(string), func(int64, string), func(int64), error](&readFn{})
	register.DoFn5x1[int64, func(*string) bool, int, func(string, string), func(string, int64), error](&basketFn{})
	register.DoFn4x0[string, func(*int64) bool, func(int64, string), func(string)](&pruneFn{})
	register.DoFn3x0[int64, func(*string) bool, func(string, int)](&pairFn{})
	register.DoFn4x1[string, int, func(string), func(string, string), error](&supportFn{})
	register.DoFn6x1[string, func(*string) bool, func(*string) bool, func(*string) bool, func(string), func(string), error](&joinFn{})
	register.Function2x1[int, int, int](sumInts)
	register.Function1x1[string, int](one)
	register.Function1x1[int64, string](formatHash)
	register.Emitter1[string]()
	register.Emitter2[string, string]()
	register.Emitter2[int64, string]()
	register.Emitter2[string, int64]()
	register.Emitter2[string, int]()
	register.Emitter1[int64]()
	register.Iter1[string]()
	register.Iter1[int64]()
}

// readFn reads one path (a file, or a ZIP archive that gives several
// documents), splits every document into sentence units and emits:
// skipped inputs, the document keyed by path, its summary, one
// (fingerprint, path) entry per distinct counted fingerprint, and the
// template fingerprints it contains (for the summary's template count).
type readFn struct {
	MaxFileSize  int64
	MinWords     int
	MaxUnitBytes int
	Excluded     []uint64 // template fingerprints, sorted

	sp *shingle.Splitter
}

func (f *readFn) Setup() {
	f.sp = shingle.New(shingle.Options{MinWords: f.MinWords, MaxUnitBytes: f.MaxUnitBytes})
}

func (f *readFn) ProcessElement(ctx context.Context, path string, emitSkipped func(string), emitDoc func(string, string),
	emitSummary func(string), emitEntry func(int64, string), emitTemplateHit func(int64)) error {
	docs, skipped, err := corpus.Read([]string{path}, corpus.Options{MaxFileSize: f.MaxFileSize, Jobs: 1})
	if err != nil {
		return fmt.Errorf("reprise-beam: read %s: %w", path, err)
	}
	for _, s := range skipped {
		rec, err := encode(skippedRecord{Path: s.Path, Reason: s.Reason})
		if err != nil {
			return err
		}
		emitSkipped(rec)
	}
	var set []uint64
	for _, d := range docs {
		units, st := f.sp.Sentences(d.Text, nil)
		notes := documentNotes(d.Notes, st, d.Text, f.sp.Options())
		doc, err := encode(docRecord{Path: d.Path, Format: d.Format, Encoding: d.Encoding, Notes: notes,
			Words: st.Words, Text: d.Text, Units: shingle.AppendUnits(nil, units), Marks: d.Marks})
		if err != nil {
			return err
		}
		emitDoc(d.Path, doc)
		sum, err := encode(summaryRecord{Path: d.Path, Format: d.Format, Encoding: d.Encoding, Notes: notes,
			Words: st.Words, Units: len(units)})
		if err != nil {
			return err
		}
		emitSummary(sum)
		set = set[:0]
		for _, u := range units {
			set = append(set, u.Hash)
		}
		slices.Sort(set)
		set = slices.Compact(set)
		for _, h := range set {
			if _, excluded := slices.BinarySearch(f.Excluded, h); excluded {
				emitTemplateHit(int64(h))
				continue
			}
			emitEntry(int64(h), d.Path)
		}
	}
	return nil
}

// documentNotes are the notes reprise scan gives a document
// (scan.SplitNotes), never nil so that the record holds a list.
func documentNotes(fromCorpus []string, st shingle.Stats, text string, opt shingle.Options) []string {
	if notes := scan.SplitNotes(fromCorpus, st, text, opt); notes != nil {
		return notes
	}
	return []string{}
}

// basketFn sees one fingerprint's basket: the paths of the documents that
// contain it. A basket of one document pairs nothing; one of more than the
// cap is common text, sent on keyed by its first path (whose text will
// quote it); any other basket sends each member a (path, fingerprint)
// entry, for pruning. The cap needs the document count, a side input.
type basketFn struct {
	MaxDocs int // 0: pairs.DefaultMaxDocs(documents)
}

func (f *basketFn) ProcessElement(h int64, paths func(*string) bool, documents int, emitCommon func(string, string), emitMember func(string, int64)) error {
	var members []string
	var p string
	for paths(&p) {
		members = append(members, p)
	}
	if len(members) < 2 {
		return nil
	}
	limit := f.MaxDocs
	if limit == 0 {
		limit = pairs.DefaultMaxDocs(documents)
	}
	if len(members) > limit {
		ref, err := encode(commonRef{Hash: uint64(h), Docs: len(members)})
		if err != nil {
			return err
		}
		emitCommon(slices.Min(members), ref)
		return nil
	}
	for _, m := range members {
		emitMember(m, h)
	}
	return nil
}

// pruneFn is the A-Priori step: a document in fewer than MinShared
// surviving baskets cannot be in a pair with that support, so it leaves
// every basket (its path goes to the pruned output instead).
type pruneFn struct {
	MinShared int
}

func (f *pruneFn) ProcessElement(path string, hashes func(*int64) bool, emit func(int64, string), emitPruned func(string)) {
	var hs []int64
	var h int64
	for hashes(&h) {
		hs = append(hs, h)
	}
	if len(hs) < f.MinShared {
		emitPruned(path)
		return
	}
	for _, h := range hs {
		emit(h, path)
	}
}

// pairFn emits every pair of documents of one pruned basket, as the key
// "a\x00b" with a < b (paths hold no NUL byte), counted once.
type pairFn struct{}

func (pairFn) ProcessElement(_ int64, paths func(*string) bool, emit func(string, int)) {
	var members []string
	var p string
	for paths(&p) {
		members = append(members, p)
	}
	if len(members) < 2 {
		return
	}
	slices.Sort(members)
	for i, a := range members {
		for _, b := range members[i+1:] {
			emit(a+"\x00"+b, 1)
		}
	}
}

func sumInts(a, b int) int { return a + b }

func one(string) int { return 1 }

func formatHash(h int64) string { return fmt.Sprintf("%016x", uint64(h)) }

// supportFn keeps the pairs counted at least MinShared times: the exact
// support filter. It emits the pair and a mark for each of its documents.
type supportFn struct {
	MinShared int
}

func (f *supportFn) ProcessElement(key string, shared int, emitPair func(string), emitMark func(string, string)) error {
	if shared < f.MinShared {
		return nil
	}
	a, b, ok := strings.Cut(key, "\x00")
	if !ok {
		return fmt.Errorf("reprise-beam: pair key %q has no separator", key)
	}
	rec, err := encode(pairRecord{A: a, B: b, Shared: shared})
	if err != nil {
		return err
	}
	emitPair(rec)
	emitMark(a, "p")
	emitMark(b, "p")
	return nil
}

// joinFn meets, by path, a document with the common units it is the first
// to contain and with the marks of the pairs it is in. It quotes each common
// unit from the document's text (the first unit with that fingerprint, as
// report.Build does), and writes the whole document out when it is paired.
type joinFn struct{}

func (joinFn) ProcessElement(path string, docs, refs, marks func(*string) bool, emitPaired func(string), emitCommon func(string)) error {
	var doc string
	if !docs(&doc) {
		return fmt.Errorf("reprise-beam: %s: a basket names a document that was never read", path)
	}
	var extra string
	if docs(&extra) {
		return fmt.Errorf("reprise-beam: %s: two documents have the same path", path)
	}
	var d *docRecord
	var units []shingle.Unit
	var ref string
	for refs(&ref) {
		if d == nil {
			d = new(docRecord)
			if err := decode(doc, d); err != nil {
				return err
			}
			var err error
			if units, err = unpackUnits(d.Path, d.Units); err != nil {
				return err
			}
		}
		var c commonRef
		if err := decode(ref, &c); err != nil {
			return err
		}
		text := ""
		for _, u := range units {
			if u.Hash == c.Hash {
				text = d.Text[u.Start:u.End]
				break
			}
		}
		rec, err := encode(commonRecord{Hash: c.Hash, Text: text, Docs: c.Docs})
		if err != nil {
			return err
		}
		emitCommon(rec)
	}
	var m string
	if marks(&m) {
		emitPaired(doc)
		for marks(&m) {
		}
	}
	return nil
}
