package report

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"
	"sync"
	"sync/atomic"
	"unicode/utf8"

	"reprise/corpus"
	"reprise/pairs"
	"reprise/shingle"
)

// FormatVersion is the version of the JSON contract, written as "format".
const FormatVersion = 1

// Caution is said by every report, in every format.
const Caution = "Shared passages are leads for a human reviewer, not proof of misconduct. " +
	"Quoted and cited material, common phrases and templates are legitimate reasons for text to match; " +
	"read the passages in context, and decide only under your institution's own procedures."

// Result is a complete report: the JSON contract, and the single source of
// every number any renderer shows.
type Result struct {
	Format   int      `json:"format"`
	Caution  string   `json:"caution"`
	Settings Settings `json:"settings"`
	Summary  Summary  `json:"summary"`
	// NearCopies are the sets of documents that are near-copies of each
	// other, largest first: shown before everything else in every format.
	NearCopies []NearCopySet `json:"near_copies"`
	Documents  []Document    `json:"documents"`
	Skipped    []Skipped     `json:"skipped"`
	Common     []Common      `json:"common"`
	Pairs      []Pair        `json:"pairs"`
	Groups     []Group       `json:"groups"`
	Clusters   []Cluster     `json:"clusters"`
	// Sources and Masters are given by a compare against a reference set
	// (compare.go); a scan has neither.
	Sources []Sources        `json:"sources,omitempty"`
	Masters []MasterCoverage `json:"masters,omitempty"`

	// Texts holds each document's extracted text, parallel to Documents,
	// for renderers that show passages in context (HTML). It is not part of
	// the JSON contract: Build fills it; a Result decoded from JSON has none
	// until the caller re-reads the documents (cmd/reprise's report command).
	Texts []SourceText `json:"-"`
}

// Settings are every effective setting that shaped the result.
type Settings struct {
	Version      string   `json:"version"`
	Unit         string   `json:"unit"`
	MinShared    int      `json:"min_shared"`
	MinWords     int      `json:"min_words"`
	MaxDocs      int      `json:"max_docs"`
	MaxDocsRule  string   `json:"max_docs_rule"`
	MaxUnitBytes int      `json:"max_unit_bytes"`
	Exclude      []string `json:"exclude"`
	Include      []string `json:"include"`
	Skip         []string `json:"skip"`
	MaxFileSize  int64    `json:"max_file_size"`

	Read           *ReadSettings    `json:"read,omitempty"`            // limits and options of reading
	Shingles       *ShingleSettings `json:"shingles,omitempty"`        // word units only
	SkipQuoted     bool             `json:"skip_quoted,omitempty"`     // text in quotation marks gave no unit
	SkipReferences bool             `json:"skip_references,omitempty"` // a trailing references section gave no unit
}

// ShingleSettings are the settings of word-shingle units.
// ReadSettings are the effective limits and options documents were read with.
type ReadSettings struct {
	MaxContainerSize  int64   `json:"max_container_size"`  // uncompressed bytes from one container
	MaxMemberSize     int64   `json:"max_member_size"`     // one ZIP member, and one document's text
	MaxMembers        int     `json:"max_members"`         // entries in one archive
	MaxRatio          int     `json:"max_ratio"`           // compression ratio of one large member
	MaxDepth          int     `json:"max_depth"`           // HTML/XML elements, RTF groups, MIME parts
	PDFTimeoutSeconds float64 `json:"pdf_timeout_seconds"` // pdftotext per PDF
	// FileTimeoutSeconds: extraction per file (a ZIP's members together,
	// a JSON Lines line); 0 in results written before it existed.
	FileTimeoutSeconds float64 `json:"file_timeout_seconds,omitempty"`
	SkipQuotedReplies  bool    `json:"skip_quoted_replies"` // e-mail lines starting with ">" left out
	JSONLID            string  `json:"jsonl_id"`            // JSON Lines: the id field
	JSONLText          string  `json:"jsonl_text"`          // JSON Lines: the text field
	MaxJSONLLine       int64   `json:"max_jsonl_line"`      // JSON Lines: bytes in one line
}

type ShingleSettings struct {
	Words  int `json:"words"`  // K: words per shingle
	Winnow int `json:"winnow"` // W: winnowing window (0: every shingle kept)
	Gap    int `json:"gap"`    // G: passages merge across gaps of up to G words
	// MinPassage: shorter passages (in words) are not shown, unless a pair's largest
	MinPassage int `json:"min_passage"`
	// Reworded: pairs aligned sentence by sentence (--unit reworded).
	Reworded *Reworded `json:"reworded,omitempty"`
}

// Summary counts what the run read, set aside and found.
type Summary struct {
	Documents     int    `json:"documents"`
	Skipped       int    `json:"skipped"`
	Words         int    `json:"words"`
	Units         int    `json:"units"`
	Templates     int    `json:"templates"`
	TemplateUnits int    `json:"template_units"`
	CommonUnits   int    `json:"common_units"`
	Pruned        int    `json:"pruned"`
	Counter       string `json:"counter"`
	Pairs         int    `json:"pairs"`
	// Groups counts the groups listed: maximal sets of three or more
	// documents (no listed group lies inside another), ranked by size,
	// then shared units, then the documents' order in Documents.
	Groups int `json:"groups"`
	// GroupsTruncated: the group search stopped at its bound of
	// GroupStepLimit steps; every group listed is still maximal, but
	// others may be missing.
	GroupsTruncated bool `json:"groups_truncated"`
	// GroupSteps is what the group search cost, in steps (each a merge
	// or search of two sorted lists: the units of a set of documents and
	// a document's, or a set of documents and a group found before).
	GroupSteps     int `json:"group_steps"`
	GroupStepLimit int `json:"group_step_limit"`
	// NearCopySets and NearCopyDocuments count the sets of near-copies and
	// the documents in them; PairsNotListed counts the pairs inside large
	// sets that the report does not list (see Input.NearCopyPairs).
	NearCopySets      int `json:"near_copy_sets"`
	NearCopyDocuments int `json:"near_copy_documents"`
	PairsNotListed    int `json:"pairs_not_listed"`
	// GroupsNotListed counts the groups whose documents all lie in one
	// set of near-copies: the set stands for them.
	GroupsNotListed int `json:"groups_not_listed"`
	// CommonWords is the number of words in text set aside as common (a
	// common unit's words once per document it is set aside in);
	// CommonShare is that share of Words.
	CommonWords int     `json:"common_words"`
	CommonShare float64 `json:"common_share"`
	// Unconfirmed counts the engine's pairs in which the reworded
	// alignment (Chaining.Reworded) found no passage: not listed, and left
	// out of groups and clusters.
	Unconfirmed int `json:"unconfirmed,omitempty"`
}

// NearCopySet is a set of documents that are near-copies of each other:
// joined by pairs in which each document holds at least 70% of the other's
// counted units (sentences or shingles not set aside).
type NearCopySet struct {
	// Documents: the representative first, then by resemblance to it,
	// highest first, then by path.
	Documents      []NearCopy `json:"documents"`
	Representative string     `json:"representative"` // the member sharing the most with the others
	DiffersMost    string     `json:"differs_most"`   // the member least like the representative ("" when all are alike)
	Pairs          int        `json:"pairs"`          // pairs of the set
	PairsListed    int        `json:"pairs_listed"`   // of those, listed in the report's pairs
}

// NearCopy is one member of a NearCopySet and how alike it is to the
// representative: Resemblance is the Jaccard index of their counted units
// (Shared of them in common, Units the member's own).
type NearCopy struct {
	Path        string  `json:"path"`
	Resemblance float64 `json:"resemblance"`
	Shared      int     `json:"shared"`
	Units       int     `json:"units"`
}

// Document describes one document that was read.
type Document struct {
	Path     string   `json:"path"`
	Format   string   `json:"format"`
	Encoding string   `json:"encoding"`
	Words    int      `json:"words"`
	Units    int      `json:"units"`
	Reused   float64  `json:"reused"`
	Notes    []string `json:"notes"`
}

// Skipped is an input that gave no document.
type Skipped struct {
	Path   string `json:"path"`
	Reason string `json:"reason"`
}

// Common is a unit set aside because too many documents contain it. It
// still counts in CountedIn of them: documents that are mostly common text
// (automatic cap only).
type Common struct {
	Text      string `json:"text"`
	Documents int    `json:"documents"`
	CountedIn int    `json:"counted_in"`
}

// Pair is two documents that share passages; A sorts before B, unless
// Input.SideA puts a reference or archived document on side A.
type Pair struct {
	A         string    `json:"a"`
	B         string    `json:"b"`
	Shared    int       `json:"shared"`
	CoverageA float64   `json:"coverage_a"`
	CoverageB float64   `json:"coverage_b"`
	Jaccard   float64   `json:"jaccard"`
	Score     float64   `json:"score"`
	Identical bool      `json:"identical"` // the two extracted texts are the same: every score is 1
	Passages  []Passage `json:"passages"`
}

// Passage is a maximal run of shared units, in the same order in both documents.
// Offsets are byte offsets into each document's extracted text, start
// inclusive, end exclusive; lines count from 1.
type Passage struct {
	AStart int    `json:"a_start"`
	AEnd   int    `json:"a_end"`
	BStart int    `json:"b_start"`
	BEnd   int    `json:"b_end"`
	ALine  int    `json:"a_line"`
	BLine  int    `json:"b_line"`
	AWhere string `json:"a_where"`
	BWhere string `json:"b_where"`
	Units  int    `json:"units"`
	Words  int    `json:"words"`
	Text   string `json:"text"`
	// TextCut: Text is the passage's first Input.PassageText bytes (cut
	// at a word), not all of it; the offsets and Words are the whole
	// passage's.
	TextCut bool `json:"text_cut"`
	// Explained: why a reworded passage was reported (Chaining.Reworded).
	Explained *Explained `json:"explained,omitempty"`
}

// Group is a maximal set of three or more documents that all share Shared units.
type Group struct {
	Documents []string `json:"documents"`
	Shared    int      `json:"shared"`
}

// Cluster is a connected component of the reported pairs.
type Cluster struct {
	Documents []string `json:"documents"`
}

// LongestWords is the number of words in the pair's longest passage.
func (p *Pair) LongestWords() int {
	longest := 0
	for _, g := range p.Passages {
		longest = max(longest, g.Words)
	}
	return longest
}

// Doc is one document as the report needs it: its text and its units in
// text order (as shingle produced them). Text and Units are needed only
// for the documents the report quotes: both of every engine pair, and the
// first holder (CommonUnit.First) of each common unit; the others may
// leave them empty and give their number of units in UnitCount, so that a
// large run need not hold every text.
type Doc struct {
	Path      string
	Format    string
	Encoding  string
	Notes     []string
	Text      string
	Words     int
	Units     []shingle.Unit
	UnitCount int           // units, when Units is not given; ignored when it is
	Marks     []corpus.Mark // pages, chapters, paragraphs; none for line-based formats
	// Digest is a 64-bit hash of the extracted text (0: not known): two
	// documents with the same nonzero Digest and Size hold the same text,
	// which the report says (a note, and Pair.Identical with scores of 1).
	Digest uint64
	Size   int // bytes of extracted text, with Digest
}

// unitCount is the number of units the document was split into.
func (d *Doc) unitCount() int {
	if d.Units != nil {
		return len(d.Units)
	}
	return d.UnitCount
}

// given reports whether the document's units were given (or it has none).
func (d *Doc) given() bool { return d.Units != nil || d.UnitCount == 0 }

// Input is everything Build combines.
type Input struct {
	Docs      []Doc // index = document ID given to the engine
	Skipped   []Skipped
	Engine    *pairs.Result
	Excluded  []uint64 // template fingerprints, sorted
	Templates int      // template documents read
	Settings  Settings
	Chaining  *Chaining // word units: passages chained across gaps (chain.go); nil for sentences
	Jobs      int       // pairs aligned at once (0 or 1: one at a time); the result is the same for every value
	// Progress, when set, is told after each pair aligned how many of how
	// many are (from up to Jobs goroutines at once).
	Progress func(done, total int)
	// PassageText bounds the bytes of a passage's Text (0 means
	// DefaultPassageText, -1 no bound): a passage of a megabyte (two
	// copies of a generated file) would make a report nobody can open.
	PassageText int
	// SideA, when set, names the documents that are side A of every pair
	// with a document it does not name (compare's references, the
	// archived documents), whatever their order; in other pairs A is the
	// document with the lower index.
	SideA func(id int) bool
	// NearCopyPairs bounds the pairs listed for one set of near-copies
	// (0 means DefaultNearCopyPairs, -1 means all): a set with more pairs
	// lists only the representative's pairs with the members least like
	// it, so that 1,000 copies of one text cost 1,000 resemblances and
	// NearCopyPairs alignments, not 499,500.
	NearCopyPairs int
	// Load, when set, gives the text and units of the documents the
	// report quotes, which Docs then leave out (UnitCount gives their
	// number); Result.Texts is then left for the caller to fill.
	Load Loader
}

// DefaultPassageText is the bytes of a passage's text a report quotes when
// Input.PassageText is 0.
const DefaultPassageText = 4096

// cutText returns s, or when it is longer than limit bytes (limit > 0) its
// start up to the last space within limit (or a rune boundary when there
// is none), and whether it was cut.
func cutText(s string, limit int) (string, bool) {
	if limit < 0 || len(s) <= limit {
		return s, false
	}
	end := limit
	for end > 0 && !utf8.RuneStart(s[end]) {
		end--
	}
	if sp := strings.LastIndexAny(s[:end], " \n\t"); sp > limit/2 {
		end = sp
	}
	return s[:end], true
}

// DefaultNearCopyPairs is the number of pairs listed for one set of
// near-copies when Input.NearCopyPairs is 0.
const DefaultNearCopyPairs = 100

// A Loader gives the text and units (in text order, as shingle produced
// them) of the document with index id. Build calls it from up to
// Input.Jobs goroutines at once, keeps what it returns only while it works
// on that document, and asks again rather than hold many documents.
type Loader func(id int) (text string, units []shingle.Unit, err error)

// Build aligns every reported pair, scores and ranks them, and assembles the Result.
func Build(in Input) (*Result, error) {
	return BuildContext(context.Background(), in)
}

// BuildContext is Build under ctx: once ctx is done, no further pair is
// aligned and ctx's error is returned.
func BuildContext(ctx context.Context, in Input) (*Result, error) {
	eng := in.Engine
	if eng == nil {
		return nil, fmt.Errorf("report: no engine result")
	}
	n := len(in.Docs)
	aside := newSetAside(eng.Common, in.Excluded)

	res := &Result{
		Format:    FormatVersion,
		Caution:   Caution,
		Settings:  in.Settings,
		Documents: make([]Document, n),
		Skipped:   slices.Clone(in.Skipped),
		Common:    make([]Common, 0, len(eng.Common)),
		Pairs:     make([]Pair, 0, len(eng.Pairs)),
		Groups:    make([]Group, 0, len(eng.Groups)),
		Clusters:  make([]Cluster, 0, len(eng.Clusters)),
	}
	if res.Skipped == nil {
		res.Skipped = []Skipped{}
	}
	res.Settings.Exclude = nonNil(res.Settings.Exclude)
	res.Settings.Include = nonNil(res.Settings.Include)
	res.Settings.Skip = nonNil(res.Settings.Skip)

	for _, ep := range eng.Pairs {
		if int(ep.A) >= n || int(ep.B) >= n {
			return nil, fmt.Errorf("report: engine pair (%d, %d) outside %d documents", ep.A, ep.B, n)
		}
	}
	for _, nc := range eng.NearCopies {
		for _, d := range nc.Docs {
			if int(d) >= n {
				return nil, fmt.Errorf("report: near-copy %d outside %d documents", d, n)
			}
		}
	}
	// The pairs to align and list: all but those inside a large set of
	// near-copies beyond the representative's NearCopyPairs.
	enginePairs, listedPerSet := listedPairs(eng, in.NearCopyPairs)
	for _, c := range eng.Common {
		if int(c.First) >= n {
			return nil, fmt.Errorf("report: common unit in document %d outside %d documents", c.First, n)
		}
	}
	// A document that is mostly common text counts common units (the
	// engine kept them in it): only templates are set aside there.
	templatesOnly := newSetAside(nil, in.Excluded)
	mostly := map[uint32]bool{}
	for _, sh := range eng.CommonShares {
		if sh.Mostly {
			mostly[sh.Doc] = true
		}
	}
	load := func(id uint32) (*quoted, error) {
		if mostly[id] {
			return in.quote(id, templatesOnly)
		}
		return in.quote(id, aside)
	}

	// The pairs are aligned a first document at a time (in.Jobs at once):
	// each first document is loaded once for all its pairs, each partner
	// once per pair, and nothing is kept but the pair's numbers and
	// passages, so that memory holds a few documents, not all.
	type ranked struct {
		pair           Pair
		a, b           uint32
		aSpans, bSpans []span
		unconfirmed    bool // the reworded alignment found no passage: not listed
	}
	textLimit := in.PassageText
	if textLimit == 0 {
		textLimit = DefaultPassageText
	}
	rankedPairs := make([]ranked, len(enginePairs))
	var alignedPairs atomic.Int64
	groups := runsBy(len(enginePairs), func(k int) uint32 { return enginePairs[k].A })
	errs := make([]error, len(groups))
	parallel(len(groups), in.Jobs, func(gi int) {
		if errs[gi] = ctx.Err(); errs[gi] != nil {
			return
		}
		a, err := load(enginePairs[groups[gi][0]].A)
		if err != nil {
			errs[gi] = err
			return
		}
		for _, k := range groups[gi] {
			if errs[gi] = ctx.Err(); errs[gi] != nil {
				return
			}
			ep := enginePairs[k]
			b, err := load(ep.B)
			if err != nil {
				errs[gi] = err
				return
			}
			r := &rankedPairs[k]
			r.a, r.b = ep.A, ep.B
			first, second := a, b
			if in.SideA != nil && in.SideA(int(ep.B)) && !in.SideA(int(ep.A)) {
				r.a, r.b, first, second = ep.B, ep.A, b, a
			}
			errs[gi] = alignPair(&r.pair, &r.aSpans, &r.bSpans, in.Chaining, first, second, int(ep.Shared), textLimit)
			if errors.Is(errs[gi], errUnconfirmed) {
				errs[gi], r.unconfirmed = nil, true
			} else if errs[gi] != nil {
				return
			}
			if in.Progress != nil {
				in.Progress(int(alignedPairs.Add(1)), len(enginePairs))
			}
			if sameText(&in.Docs[ep.A], &in.Docs[ep.B]) {
				// The same text is the same text, whatever units some
				// of it gave (a sentence cut at the byte limit, a
				// unit set aside): both coverages are whole.
				p := &r.pair
				p.Identical, p.CoverageA, p.CoverageB, p.Jaccard, p.Score = true, 1, 1, 1, 1
			}
		}
	})
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	if err := errors.Join(errs...); err != nil {
		return nil, err
	}
	rankedPairs, unconfirmed := dropUnconfirmed(rankedPairs, func(r ranked) bool { return r.unconfirmed },
		func(r ranked) pairs.Pair {
			return pairs.Pair{A: min(r.a, r.b), B: max(r.a, r.b), Shared: uint32(r.pair.Shared)}
		})
	reusedSpans := make([][]span, n)
	for k := range rankedPairs {
		r := &rankedPairs[k]
		reusedSpans[r.a] = append(reusedSpans[r.a], r.aSpans...)
		reusedSpans[r.b] = append(reusedSpans[r.b], r.bSpans...)
		r.aSpans, r.bSpans = nil, nil
	}
	slices.SortStableFunc(rankedPairs, func(x, y ranked) int {
		return cmp.Or(
			cmp.Compare(y.pair.Score, x.pair.Score),
			cmp.Compare(y.pair.Shared, x.pair.Shared),
			strings.Compare(x.pair.A, y.pair.A),
			strings.Compare(x.pair.B, y.pair.B),
		)
	})
	for _, rp := range rankedPairs {
		res.Pairs = append(res.Pairs, rp.pair)
	}

	// Each paired document's share of words inside any passage.
	reused := make([]float64, n)
	var withSpans []int
	for i, sp := range reusedSpans {
		if len(sp) > 0 {
			withSpans = append(withSpans, i)
		}
	}
	errs = make([]error, len(withSpans))
	parallel(len(withSpans), in.Jobs, func(k int) {
		i := withSpans[k]
		q, err := in.text(uint32(i))
		if err != nil {
			errs[k] = err
			return
		}
		reused[i] = fraction(wordsIn(q.text, reusedSpans[i]), in.Docs[i].Words)
	})
	if err := errors.Join(errs...); err != nil {
		return nil, err
	}

	if in.Load == nil {
		res.Texts = make([]SourceText, n)
	} // else the caller gives the texts a renderer needs (Loader)
	twins := identicalTexts(in.Docs)
	totalUnits, totalWords := 0, 0
	for i := range in.Docs {
		d := &in.Docs[i]
		res.Documents[i] = Document{
			Path:     d.Path,
			Format:   d.Format,
			Encoding: d.Encoding,
			Words:    d.Words,
			Units:    d.unitCount(),
			Reused:   reused[i],
			Notes:    nonNil(slices.Clone(d.Notes)),
		}
		if in.Load == nil {
			res.Texts[i] = SourceText{Text: d.Text}
		}
		if same := twins[i]; len(same) > 0 {
			res.Documents[i].Notes = append(res.Documents[i].Notes, identicalNote(same, in.Docs))
		}
		totalUnits += d.unitCount()
		totalWords += d.Words
	}

	// Each common unit is quoted from its first holder, each holder loaded
	// once.
	res.Common = res.Common[:len(eng.Common)]
	holders := runsBy(len(eng.Common), func(k int) uint32 { return eng.Common[k].First })
	errs = make([]error, len(holders))
	parallel(len(holders), in.Jobs, func(h int) {
		q, err := in.text(eng.Common[holders[h][0]].First)
		if err != nil {
			errs[h] = err
			return
		}
		for _, k := range holders[h] {
			c := eng.Common[k]
			res.Common[k] = Common{Text: unitText(q, c.Hash), Documents: int(c.Docs), CountedIn: int(c.Kept)}
		}
	})
	if err := errors.Join(errs...); err != nil {
		return nil, err
	}
	slices.SortStableFunc(res.Common, func(x, y Common) int {
		return cmp.Or(cmp.Compare(y.Documents, x.Documents), strings.Compare(x.Text, y.Text))
	})
	commonWords := CommonWords(res.Common)
	for _, sh := range eng.CommonShares {
		if 2*sh.Common > sh.Units {
			notes := &res.Documents[sh.Doc].Notes
			*notes = append(*notes, commonNote(sh, eng.MaxDocs, in.Settings.Unit))
		}
	}

	paths := func(ids []uint32) []string {
		out := make([]string, len(ids))
		for k, id := range ids {
			out[k] = in.Docs[id].Path
		}
		return out
	}
	// A group inside one set of near-copies is not listed: the set stands
	// for it (copies each edited on their own make many overlapping
	// groups of the same text).
	inSet := map[uint32]int{}
	for k, nc := range eng.NearCopies {
		for _, d := range nc.Docs {
			inSet[d] = k + 1
		}
	}
	groupsInSets := 0
	for _, g := range eng.Groups {
		if unconfirmed.splits(g.Docs) {
			continue
		}
		if k := inSet[g.Docs[0]]; k > 0 && !slices.ContainsFunc(g.Docs, func(d uint32) bool { return inSet[d] != k }) {
			groupsInSets++
			continue
		}
		res.Groups = append(res.Groups, Group{Documents: paths(g.Docs), Shared: int(g.Shared)})
	}
	for _, c := range unconfirmed.clusters(eng, n) {
		res.Clusters = append(res.Clusters, Cluster{Documents: paths(c)})
	}
	res.NearCopies = make([]NearCopySet, 0, len(eng.NearCopies))
	nearDocs, notListed := 0, len(eng.Pairs)-len(enginePairs)
	for k := range eng.NearCopies {
		res.NearCopies = append(res.NearCopies, nearCopySet(&eng.NearCopies[k], listedPerSet[k], paths))
		nearDocs += len(eng.NearCopies[k].Docs)
	}

	res.Summary = Summary{
		Documents:       n,
		Skipped:         len(res.Skipped),
		Words:           totalWords,
		Units:           totalUnits,
		Templates:       in.Templates,
		TemplateUnits:   eng.Stats.ExcludedHits,
		CommonUnits:     len(eng.Common),
		Pruned:          eng.Stats.Pruned,
		Counter:         eng.Counter.String(),
		Pairs:           len(res.Pairs),
		Groups:          len(res.Groups),
		GroupsTruncated: eng.GroupsTruncated,
		GroupSteps:      eng.Stats.GroupSteps,
		GroupStepLimit:  eng.GroupStepLimit,

		NearCopySets:      len(res.NearCopies),
		NearCopyDocuments: nearDocs,
		PairsNotListed:    notListed,
		GroupsNotListed:   groupsInSets,
		CommonWords:       commonWords,
		CommonShare:       fraction(commonWords, totalWords),
		Unconfirmed:       len(unconfirmed.dropped),
	}
	return res, nil
}

// CommonWords is the number of words set aside as common text: each
// common unit's words once per document it is set aside in (those holding
// it, less those it still counts in), as Summary.CommonWords gives it.
func CommonWords(common []Common) int {
	n := 0
	for _, c := range common {
		n += shingle.CountWords(c.Text) * (c.Documents - c.CountedIn)
	}
	return n
}

// CommonShare is CommonWords(common) as a share of words, rounded as
// every fraction is (Summary.CommonShare).
func CommonShare(common []Common, words int) float64 { return fraction(CommonWords(common), words) }

// sameText reports whether two documents are known to hold the same text.
func sameText(a, b *Doc) bool {
	return a.Digest != 0 && a.Digest == b.Digest && a.Size == b.Size
}

// identicalTexts maps each document whose text another one also holds to
// those others, in document order.
func identicalTexts(docs []Doc) map[int][]int {
	type key struct {
		digest uint64
		size   int
	}
	byText := map[key][]int{}
	for i := range docs {
		if docs[i].Digest != 0 {
			k := key{docs[i].Digest, docs[i].Size}
			byText[k] = append(byText[k], i)
		}
	}
	twins := map[int][]int{}
	for _, ids := range byText {
		if len(ids) < 2 {
			continue
		}
		for _, i := range ids {
			for _, j := range ids {
				if j != i {
					twins[i] = append(twins[i], j)
				}
			}
		}
	}
	return twins
}

// identicalNote names up to three of the documents holding the same text.
func identicalNote(same []int, docs []Doc) string {
	const named = 3
	names := make([]string, 0, named)
	for _, j := range same[:min(len(same), named)] {
		names = append(names, docs[j].Path)
	}
	note := "identical text to " + strings.Join(names, ", ")
	if len(same) > named {
		note += fmt.Sprintf(" and %d more", len(same)-named)
	}
	return note
}

// commonNote says how much of a document is common text, and what became
// of it.
func commonNote(sh pairs.CommonShare, maxDocs int, unit string) string {
	share := fmt.Sprintf("%.0f%% of this document's %ss are each in more than %s", 100*float64(sh.Common)/float64(max(sh.Units, 1)), unit, plural(maxDocs, "document"))
	if sh.Mostly {
		return share + ": counted all the same, since they make up most of it (it is a copy of a common text, not a document that quotes one)"
	}
	return share + " and were set aside as common text (--max-docs)"
}

// ListedPairs returns the engine pairs Build aligns and lists for the
// given Input.NearCopyPairs, in the engine's order: the documents a caller
// must be able to load are theirs (and the first holders of common units).
func ListedPairs(eng *pairs.Result, nearCopyPairs int) []pairs.Pair {
	ps, _ := listedPairs(eng, nearCopyPairs)
	return ps
}

// listedPairs returns the engine pairs the report aligns and lists, in the
// engine's order, and how many of each set of near-copies are among them:
// every pair, except that a set with more than limit pairs (0: the
// default; -1: no limit) keeps only the representative's pairs with the
// limit members least like it.
func listedPairs(eng *pairs.Result, limit int) ([]pairs.Pair, []int) {
	if limit == 0 {
		limit = DefaultNearCopyPairs
	}
	listed := make([]int, len(eng.NearCopies))
	setOf := map[uint32]int{}
	keep := map[[2]uint32]bool{}
	for k := range eng.NearCopies {
		nc := &eng.NearCopies[k]
		if limit < 0 || nc.Pairs <= limit {
			continue
		}
		for _, d := range nc.Docs {
			setOf[d] = k
		}
		order := make([]int, 0, len(nc.Docs))
		for i, d := range nc.Docs {
			if d != nc.Representative {
				order = append(order, i)
			}
		}
		r := resemblances(nc)
		slices.SortStableFunc(order, func(x, y int) int { return cmp.Compare(r[x], r[y]) })
		for _, i := range order[:min(limit, len(order))] {
			a, b := min(nc.Representative, nc.Docs[i]), max(nc.Representative, nc.Docs[i])
			keep[[2]uint32{a, b}] = true
		}
	}
	out := eng.Pairs
	if len(setOf) > 0 {
		out = make([]pairs.Pair, 0, len(eng.Pairs))
		for _, p := range eng.Pairs {
			ka, inA := setOf[p.A]
			kb, inB := setOf[p.B]
			if inA && inB && ka == kb && !keep[[2]uint32{p.A, p.B}] {
				continue
			}
			out = append(out, p)
		}
	}
	near := map[uint32]int{}
	for k := range eng.NearCopies {
		for _, d := range eng.NearCopies[k].Docs {
			near[d] = k
		}
	}
	for _, p := range out {
		if ka, ok := near[p.A]; ok {
			if kb, ok := near[p.B]; ok && ka == kb {
				listed[ka]++
			}
		}
	}
	return out, listed
}

// resemblances gives each member's Jaccard index of counted units with the
// representative, rounded as every fraction is.
func resemblances(nc *pairs.NearCopies) []float64 {
	rep := slices.Index(nc.Docs, nc.Representative)
	r := make([]float64, len(nc.Docs))
	for i := range nc.Docs {
		shared := int(nc.Shared[i])
		r[i] = fraction(shared, int(nc.Units[rep])+int(nc.Units[i])-shared)
	}
	return r
}

// nearCopySet turns the engine's set into the report's: members with paths
// and resemblances, the representative first.
func nearCopySet(nc *pairs.NearCopies, listed int, paths func([]uint32) []string) NearCopySet {
	names := paths(nc.Docs)
	r := resemblances(nc)
	set := NearCopySet{Pairs: nc.Pairs, PairsListed: listed}
	for i, name := range names {
		set.Documents = append(set.Documents, NearCopy{Path: name, Resemblance: r[i], Shared: int(nc.Shared[i]), Units: int(nc.Units[i])})
	}
	rep := names[slices.Index(nc.Docs, nc.Representative)]
	set.Representative = rep
	slices.SortStableFunc(set.Documents, func(x, y NearCopy) int {
		return cmp.Or(
			cmp.Compare(b2i(y.Path == rep), b2i(x.Path == rep)),
			cmp.Compare(y.Resemblance, x.Resemblance),
			strings.Compare(x.Path, y.Path),
		)
	})
	// The member least like the representative: the lowest resemblance,
	// the first by path among equals.
	least := set.Documents[1]
	for _, m := range set.Documents[2:] {
		if m.Resemblance < least.Resemblance {
			least = m
		}
	}
	if least.Resemblance < 1 {
		set.DiffersMost = least.Path // none when all are alike in every counted unit
	}
	return set
}

func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}

// runsBy orders 0..n-1 by key, stably, and cuts the order into runs of
// one key each: the work of one loaded document.
func runsBy(n int, key func(int) uint32) [][]int {
	order := make([]int, n)
	for k := range order {
		order[k] = k
	}
	slices.SortStableFunc(order, func(x, y int) int { return cmp.Compare(key(x), key(y)) })
	var runs [][]int
	for lo := 0; lo < n; {
		hi := lo + 1
		for hi < n && key(order[hi]) == key(order[lo]) {
			hi++
		}
		runs = append(runs, order[lo:hi])
		lo = hi
	}
	return runs
}

// unitText quotes the first unit of q with the given fingerprint.
func unitText(q *quoted, hash uint64) string {
	for _, u := range q.units {
		if u.Hash == hash {
			return strings.Clone(q.text[u.Start:u.End])
		}
	}
	return ""
}

// quoted is a document loaded for aligning and quoting.
type quoted struct {
	doc   *Doc
	text  string
	units []shingle.Unit
	seq   sequence
	lines lineIndex
	terms *termText // --unit reworded: the text's sentences and words (built on first use)
}

// quote loads document id for aligning: its text and units, and their
// sequence.
func (in *Input) quote(id uint32, aside setAside) (*quoted, error) {
	q, err := in.text(id)
	if err != nil {
		return nil, err
	}
	q.seq = newSequence(q.units, aside)
	return q, nil
}

// text loads document id's text and units: from its Doc, or from in.Load
// when set.
func (in *Input) text(id uint32) (*quoted, error) {
	d := &in.Docs[id]
	q := &quoted{doc: d, text: d.Text, units: d.Units}
	if in.Load != nil {
		var err error
		if q.text, q.units, err = in.Load(int(id)); err != nil {
			return nil, fmt.Errorf("report: %s: %w", d.Path, err)
		}
		if len(q.units) != d.UnitCount {
			return nil, fmt.Errorf("report: %s: %d units loaded, %d counted", d.Path, len(q.units), d.UnitCount)
		}
	} else if !d.given() {
		return nil, fmt.Errorf("report: %s is quoted but its units were not given", d.Path)
	}
	return q, nil
}

// alignPair finds the passages of a and b, which share shared units, and
// fills p with them and its scores; aSpans and bSpans get the passages'
// byte spans in each document.
func alignPair(p *Pair, aSpans, bSpans *[]span, ch *Chaining, a, b *quoted, shared, textLimit int) error {
	if ch != nil && ch.Reworded != nil {
		return alignReworded(p, aSpans, bSpans, ch, a, b, shared, textLimit)
	}
	da, db := a.doc, b.doc
	da2, db2 := *da, *db
	da2.Text, da2.Units = a.text, a.units
	db2.Text, db2.Units = b.text, b.units
	passages := pairPassages(ch, &a.seq, &b.seq, &da2, &db2)
	if len(passages) == 0 {
		return fmt.Errorf("report: %s and %s share %d units but no passage aligns", da.Path, db.Path, shared)
	}
	*p = Pair{A: da.Path, B: db.Path, Shared: shared}
	for _, l := range passages {
		ua, ub := a.units[l.aFirst], b.units[l.bFirst]
		la, lb := a.units[l.aLast], b.units[l.bLast]
		g := Passage{
			AStart: int(ua.Start), AEnd: int(la.End),
			BStart: int(ub.Start), BEnd: int(lb.End),
			Units: l.n,
		}
		whole := a.text[g.AStart:g.AEnd]
		g.Words = shingle.CountWords(whole)
		g.Text, g.TextCut = cutText(whole, textLimit)
		g.Text = strings.Clone(g.Text)
		g.ALine = a.lines.line(a.text, g.AStart)
		g.BLine = b.lines.line(b.text, g.BStart)
		g.AWhere = where(da.Marks, g.AStart, g.ALine)
		g.BWhere = where(db.Marks, g.BStart, g.BLine)
		*aSpans = append(*aSpans, span{g.AStart, g.AEnd})
		*bSpans = append(*bSpans, span{g.BStart, g.BEnd})
		p.Passages = append(p.Passages, g)
	}
	p.CoverageA = fraction(wordsIn(a.text, *aSpans), da.Words)
	p.CoverageB = fraction(wordsIn(b.text, *bSpans), db.Words)
	union := a.seq.distinct + b.seq.distinct - shared
	p.Jaccard = fraction(shared, union)
	p.Score = max(p.CoverageA, p.CoverageB)
	return nil
}

// fraction is part/whole rounded to four decimals (0 when whole is 0),
// the only place a score's precision is decided.
func fraction(part, whole int) float64 {
	if whole <= 0 {
		return 0
	}
	f := float64(part) / float64(whole)
	return math.Round(min(f, 1)*10000) / 10000
}

func nonNil[T any](s []T) []T {
	if s == nil {
		return []T{}
	}
	return s
}

// where names the place of offset that a reader can find in the original:
// the page, chapter and paragraph of the last mark at or before it, or the
// line for formats without marks.
func where(marks []corpus.Mark, offset, line int) string {
	k, found := slices.BinarySearchFunc(marks, offset, func(m corpus.Mark, off int) int { return cmp.Compare(m.Offset, off) })
	if !found {
		k--
	}
	if k < 0 {
		return "line " + strconv.Itoa(line)
	}
	m := marks[k]
	var parts []string
	if m.Chapter > 0 {
		parts = append(parts, "chapter "+strconv.Itoa(m.Chapter))
	}
	if m.Page > 0 {
		parts = append(parts, "page "+strconv.Itoa(m.Page))
	}
	if m.Paragraph > 0 {
		parts = append(parts, "paragraph "+strconv.Itoa(m.Paragraph))
	}
	if len(parts) == 0 {
		return "line " + strconv.Itoa(line)
	}
	return strings.Join(parts, ", ")
}

// lineIndex maps byte offsets to 1-based line numbers, built on first use.
type lineIndex struct {
	starts []int // byte offset at which each line starts
}

func (x *lineIndex) line(text string, offset int) int {
	if x.starts == nil {
		x.starts = append(x.starts, 0)
		for i := 0; i < len(text); i++ {
			if text[i] == '\n' {
				x.starts = append(x.starts, i+1)
			}
		}
	}
	// The line is the number of line starts at or before offset.
	k, found := slices.BinarySearch(x.starts, offset)
	if found {
		return k + 1
	}
	return k
}

// parallel calls do(k) for every k in [0, n), on up to jobs goroutines;
// each k is done once, by one goroutine.
func parallel(n, jobs int, do func(k int)) {
	jobs = max(1, min(jobs, n))
	if jobs == 1 {
		for k := range n {
			do(k)
		}
		return
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for range jobs {
		wg.Go(func() {
			for k := int(next.Add(1) - 1); k < n; k = int(next.Add(1) - 1) {
				do(k)
			}
		})
	}
	wg.Wait()
}
