#!/usr/bin/env bash
# Regenerates the document-format fixtures under corpus/testdata/formats/
# from the invented Markdown sources in corpus/testdata/formats/source/.
# The outputs are committed, so tests and CI never need pandoc; rerun this
# only to change a fixture. It installs what it needs with apt-get (Debian):
# pandoc (.docx .odt .epub .html .rtf .txt), groff and ghostscript (PDF:
# 'pandoc -t ms', then 'groff -ms -t -Tps' (tbl for tables), then 'ps2pdf' without embedded
# fonts, which keeps each PDF under 10 KB; groff's own -Tpdf embeds the
# fonts, 330 KB a file) and poppler-utils (pdftotext, used
# here to check that each planted paragraph sits on the page the tests
# expect).
set -euo pipefail
cd "$(dirname "$0")/../corpus/testdata/formats"

need=()
command -v pandoc >/dev/null || need+=(pandoc)
command -v groff >/dev/null || need+=(groff)
command -v pdftotext >/dev/null || need+=(poppler-utils)
command -v ps2pdf >/dev/null || need+=(ghostscript)
if [ ${#need[@]} -gt 0 ]; then
  apt-get update
  apt-get install -y --no-install-recommends "${need[@]}"
fi
pandoc --version | head -1
groff --version | head -1
gs --version

# Fixed dates and identifiers so that reruns give the same bytes where the
# tools allow it (pandoc stamps EPUBs with the time otherwise).
export SOURCE_DATE_EPOCH=1700000000

for doc in essay policy memo; do
  src=source/$doc.md
  mkdir -p "$doc"
  pandoc "$src" -s -o "$doc/$doc.docx"
  pandoc "$src" -s -o "$doc/$doc.odt"
  pandoc "$src" -s -o "$doc/$doc.rtf"
  pandoc "$src" -s -t html5 -o "$doc/$doc.html"
  pandoc "$src" -s --metadata identifier=urn:reprise:fixture:$doc -o "$doc/$doc.epub"
  pandoc "$src" -t plain --wrap=auto -o "$doc/$doc.txt"
  # PDF: pandoc writes groff ms, groff typesets it as PostScript,
  # ghostscript turns that into PDF.
  pandoc "$src" -s -t ms -o "$doc/$doc.ms"
  groff -ms -t -k -rHY=0 -Tps "$doc/$doc.ms" > "$doc/$doc.ps"
  ps2pdf -dEmbedAllFonts=false "$doc/$doc.ps" "$doc/$doc.pdf"
  rm "$doc/$doc.ms" "$doc/$doc.ps"
done

# The tests expect the essay's "What we learned" section, after the forced
# page break (.bp), on page 2 of essay.pdf.
if ! pdftotext -f 2 -l 2 essay/essay.pdf - | grep -q 'A roof is a harsh place'; then
  echo "make-fixtures: the planted paragraph is not on page 2 of essay.pdf" >&2
  exit 1
fi
du -ch */* | tail -1
