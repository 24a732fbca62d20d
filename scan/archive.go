package scan

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/cespare/xxhash/v2"

	"reprise/archive"
	"reprise/corpus"
	"reprise/pairs"
	"reprise/report"
	"reprise/shingle"
)

// Batch is a set of new documents read and split for the archive: to add,
// or to check against it.
type Batch struct {
	Docs    []corpus.Document
	Skipped []corpus.Skipped
	Units   [][]shingle.Unit // each document's units, in text order
	Stats   []shingle.Stats
	// Unchanged counts the documents left out because the archive holds
	// them already under the same path with the same content.
	Unchanged int
}

// ReadBatch reads and splits the documents under paths on opt.Jobs
// workers. With ar, it leaves out (and counts in Unchanged) those archived
// under the same path with the same content: a resumed add skips them
// quickly.
func ReadBatch(ctx context.Context, paths []string, opt corpus.Options, sopt shingle.Options, ar *archive.Archive) (*Batch, error) {
	docs, _, skipped, err := corpus.ReadEachContext(ctx, paths, opt, keepAll)
	if err != nil {
		return nil, err
	}
	b := &Batch{Skipped: skipped}
	if ar != nil {
		// An empty archive holds none of them: no hashing, no lookups.
		if n, err := ar.Count(); err != nil {
			return nil, err
		} else if n == 0 {
			ar = nil
		}
	}
	if ar != nil {
		kept := docs[:0]
		for _, d := range docs {
			id, ok, err := ar.FindHash(archive.ContentHash(d.Text))
			if err != nil {
				return nil, err
			}
			if ok {
				if m, err := ar.Meta(id); err == nil && m.Path == d.Path {
					b.Unchanged++
					continue
				}
			}
			kept = append(kept, d)
		}
		docs = kept
	}
	b.Docs = docs
	b.Units, b.Stats = shingleAll(docs, sopt, opt.Jobs)
	return b, ctx.Err()
}

// AddBatch adds the batch's documents to ar with archive.AddAll: new
// documents are ingested in chunks (each chunk atomic and durable), the
// others added one atomic batch each; each, when set, is told the outcome
// for every document, in order, once it is in the archive. It returns how
// many documents had each outcome. Once ctx is done it syncs what was
// added and returns ctx's error.
func AddBatch(ctx context.Context, ar *archive.Archive, b *Batch, each func(d *corpus.Document, r archive.AddResult)) (map[archive.Outcome]int, error) {
	counts := map[archive.Outcome]int{}
	docs := make([]archive.Doc, len(b.Docs))
	for i := range b.Docs {
		d := &b.Docs[i]
		docs[i] = archive.Doc{
			Path: d.Path, Format: d.Format, Encoding: d.Encoding, Size: d.Size,
			Words: b.Stats[i].Words, Notes: d.Notes, Marks: d.Marks, Text: d.Text, UnitList: b.Units[i],
		}
	}
	err := ar.AddAll(ctx, docs, time.Now(), func(i int, r archive.AddResult) {
		counts[r.Outcome]++
		if each != nil {
			each(&b.Docs[i], r)
		}
	})
	return counts, err
}

// CheckConfig is an archive check: new documents against everything the
// archive holds.
type CheckConfig struct {
	Corpus    corpus.Options  // how the batch was read, for the report's settings
	Shingle   shingle.Options // must be the archive's
	MinShared int             // 0: the engine's default
	MaxDocs   int             // 0: the automatic cap over the archive and the batch
	Within    bool            // also report pairs of two new documents
	Exclude   []string        // template documents: their units never count
	Jobs      int
	Version   string // recorded in the report's settings
}

// ArchivedName is how an archived document is named in a check's report,
// so it never collides with a new document of the same path.
func ArchivedName(path string) string { return "archive:" + path }

// CheckArchive reports the batch's documents against the archive. The
// templates named by cc.Exclude are read first; a batch document that is
// one of them is moved to b.Skipped (so a later AddBatch leaves it out).
func CheckArchive(ctx context.Context, ar *archive.Archive, b *Batch, cc CheckConfig) (*report.Result, error) {
	cc.Jobs = max(cc.Jobs, 1)
	if cc.MinShared == 0 {
		cc.MinShared = 2
	}
	var excluded []uint64
	if len(cc.Exclude) > 0 {
		templates, err := ReadTemplates(ctx, cc.Exclude, corpus.Options{Jobs: cc.Jobs})
		if err != nil {
			return nil, err
		}
		var kept []int
		b.Docs, b.Skipped, kept = setTemplatesAside(b.Docs, b.Skipped, templates)
		units, stats := make([][]shingle.Unit, len(kept)), make([]shingle.Stats, len(kept))
		for k, i := range kept {
			units[k], stats[k] = b.Units[i], b.Stats[i]
		}
		b.Units, b.Stats = units, stats
		excluded = TemplateUnits(templates, cc.Shingle, cc.Jobs)
	}
	if len(b.Docs) == 0 {
		return nil, ErrNoDocuments
	}
	return checkAgainst(ctx, ar, b.Docs, b.Skipped, b.Units, b.Stats, excluded, &cc)
}

// checkAgainst builds the report of the new documents against the archive.
//
// A unit's document frequency is its posting length plus the new documents
// holding it; above the cap it is common text, over the whole archive. An
// archived document is a candidate when it shares at least --min-shared
// counted units with some new document. The engine then counts the new
// documents and the candidates together, with the archive-wide common units
// excluded and no further cap, and only pairs with one side new and the
// other archived (and, with --within, pairs of new documents) are kept —
// the same rule as compare.
func checkAgainst(ctx context.Context, ar *archive.Archive, docs []corpus.Document, skipped []corpus.Skipped, units [][]shingle.Unit,
	stats []shingle.Stats, excluded []uint64, f *CheckConfig) (*report.Result, error) {
	sopt := f.Shingle
	newSets := fingerprintSets(units)
	batchDF := map[uint64]int{}
	firstDoc := map[uint64]int{}
	for i, set := range newSets {
		for _, fp := range set {
			if _, ok := slices.BinarySearch(excluded, fp); ok {
				continue
			}
			if batchDF[fp] == 0 {
				firstDoc[fp] = i
			}
			batchDF[fp]++
		}
	}
	archived, err := ar.Count()
	if err != nil {
		return nil, err
	}
	maxDocs, rule := f.MaxDocs, "set by --max-docs"
	if maxDocs == 0 {
		maxDocs = pairs.DefaultMaxDocs(archived + len(docs))
		rule = "default: half the documents of the archive and the batch, at least 5, at most 1000"
	}
	fps := make([]uint64, 0, len(batchDF))
	for fp := range batchDF {
		fps = append(fps, fp)
	}
	slices.Sort(fps)
	postings := make(map[uint64][]uint64, len(fps))
	dfs := make(map[uint64]int, len(fps))
	for _, fp := range fps {
		ids, err := ar.Postings(fp, nil)
		if err != nil {
			return nil, err
		}
		dfs[fp] = len(ids) + batchDF[fp]
		if len(ids) > 0 {
			postings[fp] = ids
		}
	}
	frequent := func(fp uint64) bool { return dfs[fp] > maxDocs }
	// The automatic cap's rule, as in scan: in a new document more than
	// half of whose units are common text, common units still count.
	mostlyNew := make([]bool, len(newSets))
	if f.MaxDocs == 0 {
		for i, set := range newSets {
			mostlyNew[i] = mostlyFrequent(set, frequent)
		}
	}
	keptIn := map[uint64]int{} // common unit -> mostly-common new documents holding it
	for i, set := range newSets {
		if mostlyNew[i] {
			for _, fp := range set {
				if frequent(fp) {
					keptIn[fp]++
				}
			}
		}
	}
	var commonFPs []uint64
	for _, fp := range fps {
		if frequent(fp) {
			commonFPs = append(commonFPs, fp)
			if keptIn[fp] == 0 {
				delete(postings, fp) // set aside in every new document
			}
		}
	}
	// A new document's counted set: common units are left out unless it is
	// mostly common text.
	countedSets := make([][]uint64, len(newSets))
	for i, set := range newSets {
		countedSets[i] = set
		if !mostlyNew[i] && len(commonFPs) > 0 {
			countedSets[i] = slices.DeleteFunc(slices.Clone(set), frequent)
		}
	}
	// A new document archived before under the same path with the same
	// content is the same document: it is not compared with itself.
	self := make([]int64, len(docs))
	for i, d := range docs {
		self[i] = -1
		if id, ok, err := ar.FindHash(archive.ContentHash(d.Text)); err != nil {
			return nil, err
		} else if ok {
			if m, err := ar.Meta(id); err == nil && m.Path == d.Path {
				self[i] = int64(id)
			}
		}
	}
	// Candidates: archived documents sharing enough counted units with a new one.
	candidate := map[uint64]bool{}
	shared := map[uint64]int{}
	for i, set := range countedSets {
		clear(shared)
		for _, fp := range set {
			for _, id := range postings[fp] {
				shared[id]++
			}
		}
		for id, n := range shared {
			if n >= f.MinShared && int64(id) != self[i] {
				candidate[id] = true
			}
		}
	}
	ids := make([]uint64, 0, len(candidate))
	for id := range candidate {
		ids = append(ids, id)
	}
	slices.Sort(ids)

	// All documents of the report: the archived ones first, then the new
	// ones, each sorted by name, so that in every pair with an archived
	// document that document is A and the passage text is the archived
	// side's. isRef marks archived ones.
	type entry struct {
		doc    report.Doc
		set    []uint64
		isRef  bool
		mostly bool  // mostly common text: common units count in it
		batch  int   // index among the new documents, -1 for archived ones
		id     int64 // archived ID, or the ID of the new document's own archived version, or -1
	}
	eff := shingle.New(sopt).Options()
	all := make([]entry, 0, len(docs)+len(ids))
	for i, d := range docs {
		rd := reportDoc(d, units[i], stats[i], eff)
		if self[i] >= 0 {
			rd.Notes = append(rd.Notes, fmt.Sprintf("already archived as document %d (same path and content): not compared with itself", self[i]))
		}
		all = append(all, entry{doc: rd, set: countedSets[i], batch: i, id: self[i], mostly: mostlyNew[i]})
	}
	for _, id := range ids {
		d, err := ar.Load(id)
		if err != nil {
			return nil, err
		}
		notes := slices.Clone(d.Notes)
		notes = append(notes, fmt.Sprintf("archived document %d, added %s", d.ID, d.Added.Format("2006-01-02")))
		set := fingerprintSets([][]shingle.Unit{d.UnitList})[0]
		mostly := f.MaxDocs == 0 && mostlyFrequent(set, frequent)
		if !mostly && len(commonFPs) > 0 {
			set = slices.DeleteFunc(set, frequent)
		}
		all = append(all, entry{
			doc: report.Doc{Path: ArchivedName(d.Path), Format: d.Format, Encoding: d.Encoding, Notes: notes,
				Text: d.Text, Words: d.Words, Units: d.UnitList, Marks: d.Marks,
				Digest: xxhash.Sum64String(d.Text), Size: len(d.Text)},
			set: set, isRef: true, batch: -1, id: int64(d.ID), mostly: mostly,
		})
	}
	slices.SortStableFunc(all, func(x, y entry) int {
		if x.isRef != y.isRef {
			if x.isRef {
				return -1
			}
			return 1
		}
		return strings.Compare(x.doc.Path, y.doc.Path)
	})
	at := make([]int, len(docs)) // new document index → report index
	in := pairs.Input{Docs: make([][]uint64, len(all))}
	isRef := make([]bool, len(all))
	rdocs := make([]report.Doc, len(all))
	for k, e := range all {
		in.Docs[k], isRef[k], rdocs[k] = e.set, e.isRef, e.doc
		if e.batch >= 0 {
			at[e.batch] = k
		}
	}
	// Common units, each set aside in the documents that are not mostly
	// common text; Kept counts the mostly-common ones of this check that
	// hold it (new, and archived candidates).
	var common []pairs.CommonUnit
	var shares []pairs.CommonShare
	for k, e := range all {
		if e.mostly {
			shares = append(shares, pairs.CommonShare{Doc: uint32(k), Mostly: true})
			if e.isRef {
				for _, fp := range e.set {
					if frequent(fp) {
						keptIn[fp]++
					}
				}
			}
		}
	}
	for _, fp := range commonFPs {
		if keptIn[fp] < dfs[fp] {
			common = append(common, pairs.CommonUnit{Hash: fp, Docs: uint32(dfs[fp]), First: uint32(at[firstDoc[fp]]), Kept: uint32(keptIn[fp])})
		}
	}
	slices.SortFunc(common, func(x, y pairs.CommonUnit) int {
		return cmp.Or(cmp.Compare(y.Docs, x.Docs), cmp.Compare(x.Hash, y.Hash))
	})
	in.Excluded = excluded
	eng, err := pairs.CountContext(ctx, in, pairs.Options{MinShared: f.MinShared, MaxDocs: max(2, len(all))})
	if err != nil {
		return nil, err
	}
	keepCrossPairs(eng, isRef, f.Within, func(a, b uint32) bool {
		return isRef[a] != isRef[b] && all[a].id >= 0 && all[a].id == all[b].id
	})
	eng.NearCopies = pairs.NearCopiesOf(in, eng, 0)
	eng.Common = common
	eng.CommonShares = shares
	eng.MaxDocs = maxDocs
	eng.Stats.ExcludedHits = countHits(newSets, excluded)

	rin := report.Input{
		Docs:      rdocs,
		Skipped:   make([]report.Skipped, len(skipped)),
		Engine:    eng,
		Excluded:  excluded,
		Templates: len(f.Exclude),
		Jobs:      f.Jobs,
		Settings: report.Settings{
			Version: f.Version, Unit: "sentence", MinShared: eng.MinShared, MinWords: eff.MinWords,
			MaxDocs: maxDocs, MaxDocsRule: rule, MaxUnitBytes: eff.MaxUnitBytes,
			Exclude: slices.Clone(f.Exclude), Include: slices.Clone(f.Corpus.Include), Skip: slices.Clone(f.Corpus.Skip),
			MaxFileSize: f.Corpus.MaxFileSize,
		},
	}
	UnitSettings(&rin.Settings, eff, nil)
	for i, s := range skipped {
		rin.Skipped[i] = report.Skipped{Path: s.Path, Reason: s.Reason}
	}
	return report.BuildContext(ctx, rin)
}

// mostlyFrequent reports whether more than half of a document's distinct
// units are common text (the automatic cap's rule, pairs.CommonShare).
func mostlyFrequent(set []uint64, frequent func(uint64) bool) bool {
	n := 0
	for _, fp := range set {
		if frequent(fp) {
			n++
		}
	}
	return n > 0 && 2*n > len(set)
}

// countHits counts the distinct excluded fingerprints found in the sets.
func countHits(sets [][]uint64, excluded []uint64) int {
	hit := map[uint64]bool{}
	for _, set := range sets {
		for _, fp := range set {
			if _, ok := slices.BinarySearch(excluded, fp); ok {
				hit[fp] = true
			}
		}
	}
	return len(hit)
}

// RemoveFromArchive removes documents named by archived path or by ID,
// then compacts the store so that their text leaves every file of the
// folder. Every target is resolved first: when one names no archived
// document, all such targets are reported and nothing is removed. A
// document named twice (by path and by ID, say) is removed once. Once one
// removal has succeeded the compaction always runs, even when a later
// removal fails or ctx is done, so no removed document stays in the
// folder's files; the error is still returned. removed, when set, is told
// each document removed, and then (id 0, path "") that the store was
// compacted.
func RemoveFromArchive(ctx context.Context, ar *archive.Archive, targets []string, removed func(id uint64, path string)) error {
	return removeFrom(ctx, ar, targets, (*archive.Archive).Remove, removed)
}

// removeFrom is RemoveFromArchive with the removal of one document given
// (tests make it fail).
func removeFrom(ctx context.Context, ar *archive.Archive, targets []string, removeOne func(*archive.Archive, uint64) error, removed func(id uint64, path string)) (err error) {
	if removed == nil {
		removed = func(uint64, string) {}
	}
	var ids []uint64
	seen := map[uint64]bool{}
	var unknown []string
	for _, t := range targets {
		id, ok, err := ar.FindPath(t)
		if err != nil {
			return err
		}
		if !ok {
			n, perr := strconv.ParseUint(t, 10, 64)
			if perr == nil {
				if _, merr := ar.Meta(n); merr == nil {
					id, ok = n, true
				}
			}
		}
		switch {
		case !ok:
			if !slices.Contains(unknown, t) {
				unknown = append(unknown, t)
			}
		case !seen[id]:
			seen[id] = true
			ids = append(ids, id)
		}
	}
	if len(unknown) > 0 {
		q := make([]string, len(unknown))
		for i, x := range unknown {
			q[i] = strconv.Quote(x)
		}
		return fmt.Errorf("no archived document has the path or ID %s (see 'reprise archive list'); nothing was removed", strings.Join(q, ", "))
	}
	done := 0
	defer func() {
		if done == 0 {
			return
		}
		// Not under ctx: the removed text must leave the files.
		if eerr := ar.Erase(context.WithoutCancel(ctx)); eerr != nil {
			err = errors.Join(err, eerr)
			return
		}
		removed(0, "")
	}()
	var errs []error
	for _, id := range ids {
		if err := ctx.Err(); err != nil {
			errs = append(errs, err)
			break
		}
		d, err := ar.Meta(id)
		if err == nil {
			err = removeOne(ar, id)
		}
		if err != nil {
			errs = append(errs, fmt.Errorf("document %d: %w", id, err))
			continue
		}
		done++
		removed(id, d.Path)
	}
	return errors.Join(errs...)
}
