package corpus

import (
	"archive/zip"
	"bytes"
	"errors"
	"fmt"
	"io"
	"path"
	"slices"
	"strings"
)

// archive reads ZIP archives given as inputs: every member becomes a part
// named "!/member/path" after the archive's display path, read through the
// same extractors as files on disk. Members are read into memory only,
// never written out under their names (PDF members go to a private
// temporary file, see pdf.go). Nested ZIPs are read one level deep.
type archive struct{}

func (archive) format() string         { return "zip" }
func (archive) sniff(_ []byte) bool    { return false } // see zipKind
func (archive) claims(ext string) bool { return ext == ".zip" }
func (archive) extract(*input) (extraction, error) {
	return extraction{}, refuse("a ZIP archive holds documents, it is not one")
}

// maxZipDepth: a ZIP inside a ZIP given as input is read; one deeper is not.
const maxZipDepth = 1

// Reasons for archives and members.
const (
	reasonEncrypted = "encrypted (password-protected) ZIP member: not read"
	reasonZipHidden = "hidden or system metadata in the archive (name starts with a dot, or __MACOSX)"
	reasonZipDup    = "a member of the same name comes earlier in the archive: this one is not read"
	reasonZipDeep   = "ZIP archive nested more than one level deep: not read"
)

// openZip reads the central directory of raw, checking the members limit.
func openZip(raw []byte, opt *Options) (*zip.Reader, error) {
	zr, err := zip.NewReader(bytes.NewReader(raw), int64(len(raw)))
	if err != nil && !errors.Is(err, zip.ErrInsecurePath) { // names are never paths here
		return nil, zipError(err)
	}
	if len(zr.File) > opt.MaxMembers {
		return nil, refuse(fmt.Sprintf("ZIP archive has %d members, more than the limit of %d (--max-members)", len(zr.File), opt.MaxMembers))
	}
	return zr, nil
}

// zipError puts a damaged archive's error in plain words.
func zipError(err error) error {
	switch {
	case errors.Is(err, zip.ErrFormat):
		return refuse("damaged ZIP archive: not a valid ZIP file (truncated, or not a ZIP at all)")
	case errors.Is(err, zip.ErrAlgorithm):
		return refuse("ZIP member uses an unsupported compression method")
	case errors.Is(err, zip.ErrChecksum):
		return refuse("damaged ZIP archive: a member fails its CRC-32 check")
	case errors.Is(err, io.ErrUnexpectedEOF):
		return refuse("damaged ZIP archive: a member is truncated")
	}
	return refuse("damaged ZIP archive: " + err.Error())
}

// readMember reads one member into memory after checking, from the
// central directory and before any byte is decompressed: encryption
// (general purpose flag bit 0, APPNOTE 4.4.4), the per-member size limit,
// the compression ratio (a ZIP bomb is refused unread) and what is left
// of the container budget. The read itself is bounded too: archive/zip
// fails a member that inflates to more than its declared size
// (zip.ErrFormat), and the reader stops one byte past the allowed size.
func readMember(f *zip.File, in *input) ([]byte, error) {
	opt := in.opt
	if f.Flags&0x1 != 0 {
		return nil, refuse(reasonEncrypted)
	}
	size := f.UncompressedSize64
	if size > MinRatioCheck {
		comp := max(f.CompressedSize64, 1)
		if ratio := size / comp; ratio > uint64(opt.MaxRatio) {
			return nil, refuse(fmt.Sprintf("compression ratio %d exceeds limit %d (--max-ratio): possible ZIP bomb, not read", ratio, opt.MaxRatio))
		}
	}
	if size > uint64(opt.MaxMemberBytes) {
		return nil, refuse(fmt.Sprintf("ZIP member of %s uncompressed, larger than the %s limit (--max-member-size)", formatSize(int64(min(size, 1<<62))), formatSize(opt.MaxMemberBytes)))
	}
	if int64(size) > *in.budget {
		return nil, refuse(fmt.Sprintf("the archive's members exceed the %s limit on uncompressed bytes read from one container (--max-container-size)", formatSize(opt.MaxContainerBytes)))
	}
	rc, err := f.Open()
	if err != nil {
		return nil, zipError(err)
	}
	defer rc.Close()
	b, err := io.ReadAll(io.LimitReader(rc, int64(size)+1))
	if err != nil {
		return nil, zipError(err)
	}
	if uint64(len(b)) > size {
		return nil, refuse("damaged ZIP archive: a member inflates to more than its declared size")
	}
	*in.budget -= int64(len(b))
	return b, nil
}

// readSmall reads a member known to be at most limit bytes (zipKind's
// look at "mimetype"), outside any budget: it is tiny.
func readSmall(f *zip.File, limit int64) ([]byte, error) {
	rc, err := f.Open()
	if err != nil {
		return nil, err
	}
	defer rc.Close()
	return io.ReadAll(io.LimitReader(rc, limit))
}

// findMember returns the member of that exact name, or nil.
func findMember(zr *zip.Reader, name string) *zip.File {
	for _, f := range zr.File {
		if f.Name == name {
			return f
		}
	}
	return nil
}

// extractZip turns an archive into one part per member (folders give
// none). Members are taken in name order; the second of two members with
// the same name is listed, not read. Include and Skip globs apply to
// members' base names as they do to files in folders.
func extractZip(in *input) []part {
	if in.depth > maxZipDepth {
		return []part{{reason: reasonZipDeep}}
	}
	zr, err := openZip(in.raw, in.opt)
	if err != nil {
		return []part{{reason: reasonOf(err)}}
	}
	files := slices.Clone(zr.File)
	slices.SortStableFunc(files, func(a, b *zip.File) int { return strings.Compare(a.Name, b.Name) })
	var parts []part
	w := walker{opt: *in.opt}
	for i, f := range files {
		name := f.Name
		if strings.HasSuffix(name, "/") {
			continue
		}
		sub := "!/" + name
		base := path.Base(name)
		if w.skipped(base, name) || !w.included(base) {
			continue
		}
		if in.dl.passed() { // this member and the rest are listed, not read
			parts = append(parts, part{sub: sub, reason: reasonOf(in.dl.err())})
			continue
		}
		if i > 0 && files[i-1].Name == name {
			parts = append(parts, part{sub: sub, reason: reasonZipDup})
			continue
		}
		if hiddenMember(name) {
			parts = append(parts, part{sub: sub, reason: reasonZipHidden})
			continue
		}
		raw, err := readMember(f, in)
		if err != nil {
			parts = append(parts, part{sub: sub, reason: reasonOf(err)})
			continue
		}
		inner := &input{raw: raw, opt: in.opt, budget: in.budget, depth: in.depth + 1, dl: in.dl, scratch: in.scratch}
		for _, p := range extractFile(base, inner) {
			p.sub = sub + p.sub
			parts = append(parts, p)
		}
	}
	if len(parts) == 0 {
		return []part{{reason: "ZIP archive with no files"}}
	}
	return parts
}

// hiddenMember reports names a folder walk would treat as hidden, and the
// resource forks macOS adds to the archives it makes.
func hiddenMember(name string) bool {
	for seg := range strings.SplitSeq(name, "/") {
		if seg != "." && seg != ".." && strings.HasPrefix(seg, ".") || seg == "__MACOSX" {
			return true
		}
	}
	return false
}
