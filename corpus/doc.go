// Package corpus turns the paths a user gives into Documents: UTF-8 text
// with a stable ID, the path as the user will recognise it, its format and
// encoding. It is the first stage of reprise; the later stages see only
// the Documents.
//
// # The problem
//
// Real collections are untidy: folders with hidden version-control
// folders, editor backups and images beside the essays, files saved by old
// Windows editors in Windows-1252 or UTF-16, Markdown whose markup would
// otherwise be counted as words, symbolic links that loop or lead nowhere,
// and the same file reached twice ("docs" and "./docs"). The simple
// approach, reading every file as UTF-8 and dropping whatever fails,
// loses files silently and puts markup and mojibake into the comparison.
// Here nothing is lost silently: every input that gives no document is
// returned in Skipped with a reason in plain words, and every change made
// to a text that a reader should know of is a Note on its Document.
//
// # The walk
//
// Arguments may be files or folders, in any mix. Folders are walked
// recursively, entries in lexical order; a document's Path is the argument
// as given joined with "/" and its path inside the folder ("docs" gives
// "docs/a.txt", "docs/" gives "docs/a.txt", "./docs" gives "./docs/a.txt").
// The walk only lists folders and stats files, and hands each file to
// Options.Jobs workers the moment it finds it, so that the reads go on
// while the walk does (on a folder of 10^5 small files the walk alone takes
// about 0.6 s of one core, BenchmarkWalkFolder). Each file's documents go
// into its own slot, numbered in walk order. Once the walk and the reads
// are over, the files are sorted by Path and the same file reached twice
// (same cleaned absolute path, or same device and inode) is kept once,
// under the Path that sorts first (another name of the same device and
// inode, a link, is listed in Skipped as "same file as …", never dropped
// silently); the slots are then taken in that order,
// so the result does not depend on the number of workers or their timing.
// The price of not waiting for the walk: a file reached twice is read
// twice, and its second reading thrown away. os.ReadDir lists a whole
// folder before its first entry is handed on, so in one huge flat folder
// the listing itself is not overlapped, only the stats.
//
// A worker reads a file with one buffer sized from the walk's stat, and a
// plain UTF-8 text is that buffer (text.go), and a Markdown text is that
// buffer with its markup blanked in place, not a copy. When a ReadEach
// digest does not keep the text (Loan), the worker reads its next file into
// the same buffer (any file when the buffer is at most 1 MiB, else a file
// that fills a quarter of it): a scan of small files then allocates a few
// buffers, not one per file, and a batch of large ones takes no fresh
// pages per file.
//
// Policy, in the order it is applied to each entry:
//
//   - Options.Skip (glob on the base name or on the displayed path): not
//     read and not listed, as the user asked.
//   - Names starting with a dot, inside a walked folder: not read, not
//     descended into, listed once as hidden. A hidden file an
//     Options.Include would have left out anyway is not listed. A dot
//     name given as an argument is read: the user named it.
//   - Options.Include (glob on the base name of files): files that do not
//     match are not read and not listed. It applies to files given as
//     arguments too.
//   - Symbolic links to files are followed; inside a folder, links to
//     folders are listed and not followed (this rules out cycles), broken
//     links and loops are listed. A link given as an argument is followed
//     even to a folder.
//   - Devices, pipes and sockets are listed, never opened.
//   - A file over Options.MaxFileSize is listed from its stat without
//     being opened; reading stops one byte past the limit, so a file that
//     grew meanwhile is caught too.
//   - Unreadable files and folders are listed ("permission denied", ...).
//
// A folder with nothing readable gives no documents and no error; what
// that means is the caller's decision. Read returns an error only for
// invalid options: every glob is checked before anything is read.
//
// # Formats
//
// Each format is an extractor (extract.go) in its own file: text.go,
// markdown.go, docx.go, odt.go, epub.go, html.go, pdf.go, rtf.go,
// email.go, and zip.go for ZIP archives, the one container. The format of
// a file is chosen from its content first, then from its extension: a
// ZIP is told apart by its member names (word/document.xml is DOCX; a
// "mimetype" member naming OpenDocument text or EPUB is ODT or EPUB; any
// other ZIP is an archive), then come the signatures of PDF ("%PDF-"),
// RTF ("{\rtf"), HTML (a doctype or <html> first) and e-mail (a header
// block with From: and Date: or Subject:); without one, the extension
// decides (".docx", ".md", ".eml", ...), and any other file whose content
// is text is read as plain text. PostScript and SVG are listed as
// "unsupported format"; other binary files as "binary file (not text)".
// A file whose extension claims a format its content does not have is
// skipped saying so ("not a DOCX file: no ZIP signature").
//
// Structured formats give text with paragraphs separated by a blank line
// (the sentence splitter's paragraph break), white space inside a
// paragraph collapsed, and a Mark at every paragraph with its number
// (paragraphs.go): a reader's location ("paragraph 12", "chapter 2,
// paragraph 5" for EPUB, "page 3" for PDF). Their offsets refer to the
// extracted text, not to the file. Plain text, Markdown and e-mail keep
// line numbers. Each extractor's own file says which parts of its format
// it reads and which it leaves out (headers and footers, notes in RTF,
// attachments of e-mail), citing the section of its standard.
//
// A ZIP archive given as input gives one document per supported member,
// named "archive.zip!/inner/path.docx", sorted with the other documents;
// a ZIP inside it is read the same way ("a.zip!/b.zip!/c.txt"), one level
// deep only. Members are read into memory, never written to disk under
// their names (a PDF member goes to pdftotext through a private temporary
// file, mode 0600, removed afterwards). Hidden members (a dot name,
// __MACOSX), a second member of the same name, encrypted members and
// members over a limit are listed in Skipped under their member name.
//
// # Untrusted input
//
// Every file may be hostile, so every costly step has a limit (Options,
// limits.go, each with a flag): uncompressed bytes read from one
// container (256 MiB), bytes per member and per extracted text (64 MiB),
// members per archive (10,000), compression ratio of a member over 1 MiB
// (100; checked from the central directory, so a ZIP bomb is refused
// before a byte is inflated), nesting depth of HTML and XML elements, RTF
// groups and MIME parts (256), pdftotext's run time (30 s) and output,
// and the time one file may take to extract (Options.FileTimeout, 60 s).
//
// Every extractor is linear in its input, and each is checked for it on
// generated hostile inputs (internal/hostile: deep nesting, long runs of
// openers that never close or close once far away, many tiny elements,
// long lines, many header fields, many ZIP members) by the growth
// benchmark: time and allocated bytes at n, 2n and 4n, at most 2.5 times
// per doubling (growth_test.go; BENCHMARKS.md, "Hostile inputs"). Where a
// format nests, the depth is capped by MaxDepth and a deeper file refused.
// An EPUB spine of n items used to look each up among the members one by
// one and to read a content document again each time it was named:
// members are now looked up by name, and each is read once (a Note counts
// the repeats). The per-file deadline is a
// backstop behind that, not the defence: it is asked cooperatively
// (deadline.go) by every extractor's loop, at each line, token, group,
// MIME part or member, reading the clock once every 256 questions; when
// it has passed the extraction returns at once, its memory is dropped,
// and the file is skipped with the reason ("--file-timeout"). A ZIP
// archive's members share their archive's deadline (those not reached are
// listed one by one), a PDF's pdftotext run is bounded by what is left of
// it, and a JSON Lines file, a corpus that may take hours, has one per
// line, asked once the line is decoded (encoding/json cannot be
// stopped; the line's size bounds it). Rejected: running each extraction
// in a goroutine abandoned at the deadline, which would leave it running,
// holding a core and its memory, until it ended by itself.
//
// XML is streamed with encoding/xml, which expands no entity a document
// declares; a document that declares some is refused by name. pdftotext
// runs with no shell, its arguments passed directly. A malformed file is
// skipped with a reason; it never stops the others, and the extractors
// are fuzzed (fuzz_test.go). The rejected alternative, a full parse into
// a tree for each format (x/net/html's parser, a DOM for XML), costs
// memory in proportion to the nesting and gains nothing for plain text.
//
// # Decoding
//
// decode.go, in this order: an empty file is skipped; a UTF-16 byte-order
// mark (FF FE or FE FF) means UTF-16, decoded to UTF-8 with the mark
// dropped ("utf-16le", "utf-16be", with a Note that offsets refer to the
// decoded text); a NUL byte anywhere, or more than one byte in ten of the
// first 8 KiB being a control character other than tab, line feed, form
// feed and carriage return, means binary; a UTF-8 byte-order mark and
// valid UTF-8 give "utf-8-bom" with the bytes kept, mark included, so
// offsets are file offsets; valid UTF-8 gives "utf-8", bytes kept; any
// other text is decoded as Windows-1252 (with a Note; offsets then refer
// to the decoded text). Text that is only white space is skipped. UTF-16
// without a byte-order mark is not guessed: its NUL bytes make it binary.
// The cost is one pass over the bytes to test for NUL and control bytes
// and one to validate UTF-8; UTF-8 files, by far the most common, are not
// copied until they become the Document's string.
//
// # Markdown
//
// Markdown is not rendered. Its markup is overwritten, byte for byte, with
// ASCII spaces, so Text has exactly the file's length, every visible word
// stays at its offset, and line ends are never touched, so line numbers
// match the file and a blank line stays blank. Removed: front matter
// (--- YAML --- at the top), ATX heading marks (#, and closing #s), setext
// underlines, thematic breaks, block quote marks, list markers and
// numbers, code fences with their info strings, backslash escapes (the
// backslash; the escaped character stays), emphasis (* _ ~ ~~, paired
// CommonMark style; unpaired runs are literal and stay), inline code
// backticks (the code stays), link and image syntax (the text and alt text
// stay; brackets, destination and title go), reference links' [label] and
// one-line reference definitions, autolink brackets (the address is the
// visible text and stays), HTML tags, comments and declarations, table
// pipes and delimiter rows.
//
// Fenced code is kept: it is visible content, copied code is copied
// content just as much as inline code is, and the boilerplate cap of the
// later stages deals with snippets everybody shares. Its fence lines
// become blank, so the code stands apart from the prose around it.
//
// Headings: a setext heading is followed by its underline, which becomes a
// blank line, so its text is a paragraph of its own. An ATX heading has
// no spare byte after its text in the common case ("# Title\n"), and
// turning any byte into a line break would shift every later line number,
// so a heading directly followed by a text line runs into that line's
// first sentence; with the blank line that most Markdown styles put after
// a heading, it stands alone. This was chosen over dropping such headings
// (which loses their words) and over inserting bytes (which breaks
// offsets). For the same reason consecutive list items and table rows are
// single line breaks apart, so items without closing punctuation read as
// one sentence.
//
// The blanker is a line pass for blocks and a paragraph pass for inline
// markup, linear in the input: every search ahead is remembered for the
// rest of its line or paragraph, so that no prefix is scanned again. The
// thematic-break test of a line of many list markers ("- - - ... x") stops
// where it failed before; a closer searched for (a title's ")" or quote,
// "-->", "?>") is found once and is the answer for every later start
// before it, and its absence is remembered too; backtick runs seen ahead
// are recorded by length, so an opener whose length has no run left fails
// at once; a link that closes leaves the brackets below it to be dropped
// as they surface rather than filtering the stack; and emphasis pairing
// jumps over the delimiter runs a match used up (with path compression),
// as CommonMark removes them from its list. The changes keep the output
// byte for byte: TestMarkdownMatchesReference and
// FuzzMarkdownMatchesReference compare it with the blanker as it was
// before them (markdown_ref_test.go). It is not a CommonMark parser, which was
// rejected for the size of the code and because a parser produces a tree,
// not a length-preserving text: containers are recognised on the line
// where they start (lazy continuation lines are plain text), indented code
// blocks are treated as text (unpaired markup characters in them stay),
// code spans and links must close within their paragraph, a "[text]"
// without a destination is left as it is (its brackets are punctuation,
// which the later stages ignore), HTML entities (&amp;) are kept as
// written, and the contents of <script> and <style> are kept as text.
// It never panics, whatever the input (it is fuzzed).
package corpus
