package corpus

import (
	"archive/zip"
	"encoding/xml"
	"fmt"
	"net/url"
	"path"
	"strings"
)

// epubText reads EPUB 3 publications (W3C EPUB 3.3; EPUB 2 packages read
// the same way). META-INF/container.xml names the package document (OCF,
// 4.2.6.3.1: the first rootfile's full-path); the package's manifest maps
// item ids to member paths, resolved against the package document's
// folder (3.3, 5.6), and its spine lists the content documents in reading
// order (5.7). Each spine item that is XHTML or HTML is read by the HTML
// extractor as one chapter: chapter numbers count the spine items that
// gave text, from 1, and paragraph numbers start again in each chapter.
// Items that are not found are listed in a Note rather than failing the
// whole book.
type epubText struct{}

func (epubText) format() string         { return "epub" }
func (epubText) sniff(_ []byte) bool    { return false } // see zipKind
func (epubText) claims(ext string) bool { return ext == ".epub" }

func (epubText) extract(in *input) (extraction, error) {
	if !isZip(in.raw) {
		return extraction{}, refuse("not an EPUB file: no ZIP signature (the extension says EPUB, the content does not)")
	}
	zr, err := openZip(in.raw, in.opt)
	if err != nil {
		return extraction{}, err
	}
	data, err := zipPart(in, "META-INF/container.xml", "EPUB")
	if err != nil {
		return extraction{}, err
	}
	opfPath := ""
	err = xmlWalk(data, "META-INF/container.xml", in.opt.MaxDepth, in.dl, func(tok xml.Token, _ int) error {
		if t, ok := tok.(xml.StartElement); ok && t.Name.Local == "rootfile" && opfPath == "" {
			opfPath = attr(t, "full-path")
		}
		return nil
	})
	if err != nil {
		return extraction{}, err
	}
	if opfPath == "" {
		return extraction{}, refuse("damaged EPUB: META-INF/container.xml names no package document")
	}
	opf, err := zipPart(in, opfPath, "EPUB")
	if err != nil {
		return extraction{}, err
	}
	type item struct{ href, media string }
	manifest := map[string]item{}
	var spine []string
	err = xmlWalk(opf, opfPath, in.opt.MaxDepth, in.dl, func(tok xml.Token, _ int) error {
		t, ok := tok.(xml.StartElement)
		if !ok {
			return nil
		}
		switch t.Name.Local {
		case "item":
			manifest[attr(t, "id")] = item{attr(t, "href"), attr(t, "media-type")}
		case "itemref":
			spine = append(spine, attr(t, "idref"))
		}
		return nil
	})
	if err != nil {
		return extraction{}, err
	}
	if len(spine) == 0 {
		return extraction{}, refuse("damaged EPUB: the package document has an empty spine")
	}
	w := &paraWriter{limit: int(in.opt.MaxMemberBytes)}
	dir := path.Dir(opfPath)
	// The members by name (the first of a name, as findMember), looked up
	// once per spine item: asking findMember each time cost members ×
	// spine items.
	members := make(map[string]*zip.File, len(zr.File))
	for _, f := range zr.File {
		if _, ok := members[f.Name]; !ok {
			members[f.Name] = f
		}
	}
	var missing []string
	read := map[string]bool{}
	repeats := 0
	chapter := 0
	for _, id := range spine {
		it, ok := manifest[id]
		if !ok {
			missing = append(missing, id)
			continue
		}
		if !strings.Contains(it.media, "html") {
			continue
		}
		href, err := url.PathUnescape(it.href)
		if err != nil {
			href = it.href
		}
		name := path.Join(dir, href)
		f := members[name]
		if f == nil {
			missing = append(missing, name)
			continue
		}
		// A content document named again in the spine is not read again:
		// a spine of n items naming one large chapter would otherwise
		// cost n times the chapter from a file of n small items.
		if read[name] {
			repeats++
			continue
		}
		read[name] = true
		raw, err := readMember(f, in)
		if err != nil {
			return extraction{}, fmt.Errorf("%s: %w", name, err)
		}
		mark := len(w.marks)
		w.newChapter(chapter + 1)
		if _, err := htmlInto(w, raw, "", in.opt.MaxDepth, in.dl); err != nil {
			return extraction{}, fmt.Errorf("%s: %w", name, err)
		}
		if len(w.marks) > mark {
			chapter++
		}
	}
	var notes []string
	if repeats > 0 {
		notes = append(notes, fmt.Sprintf("%d spine items name a content document already read: not read again", repeats))
	}
	if len(missing) > 0 {
		notes = append(notes, fmt.Sprintf("%d spine items not found in the package and not read: %s", len(missing), strings.Join(missing, ", ")))
	}
	return w.extraction("utf-8", notes)
}
