package main

import (
	"bufio"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
)

// wordnetDir is where Debian's package wordnet-base (WordNet 3.0,
// Princeton University) puts its database files.
const wordnetDir = "/usr/share/wordnet"

// synonyms maps a lower-case word to the other one-word lemmas of the
// WordNet synsets it is a lemma of, sorted: the synonym source of the
// rewrite level.
type synonyms map[string][]string

// loadSynonyms reads the four data files of WordNet (data.noun, data.verb,
// data.adj, data.adv). Each synset line is "offset lex_filenum ss_type
// w_cnt word lex_id [word lex_id ...] p_cnt ...", w_cnt in hexadecimal
// (WordNet's wndb(5WN) manual page); lines starting with a space are the
// licence header.
func loadSynonyms(dir string) (synonyms, error) {
	seen := map[string]map[string]bool{}
	for _, name := range []string{"data.noun", "data.verb", "data.adj", "data.adv"} {
		f, err := os.Open(filepath.Join(dir, name))
		if err != nil {
			return nil, fmt.Errorf("%w (the rewrite level needs WordNet: apt-get install wordnet-base)", err)
		}
		sc := bufio.NewScanner(f)
		sc.Buffer(make([]byte, 1<<20), 1<<20)
		for sc.Scan() {
			line := sc.Text()
			if line == "" || line[0] == ' ' {
				continue
			}
			fields := strings.Fields(line)
			if len(fields) < 6 {
				continue
			}
			n, err := strconv.ParseUint(fields[3], 16, 16)
			if err != nil || len(fields) < 4+2*int(n) {
				continue
			}
			var lemmas []string
			for k := 0; k < int(n); k++ {
				w := strings.ToLower(fields[4+2*k])
				if i := strings.IndexByte(w, '('); i > 0 { // adjective markers: "(a)", "(p)", "(ip)"
					w = w[:i]
				}
				if isLowerWord(w) {
					lemmas = append(lemmas, w)
				}
			}
			for _, w := range lemmas {
				for _, v := range lemmas {
					if v != w {
						if seen[w] == nil {
							seen[w] = map[string]bool{}
						}
						seen[w][v] = true
					}
				}
			}
		}
		f.Close()
		if err := sc.Err(); err != nil {
			return nil, fmt.Errorf("%s: %w", name, err)
		}
	}
	out := make(synonyms, len(seen))
	for w, vs := range seen {
		list := make([]string, 0, len(vs))
		for v := range vs {
			list = append(list, v)
		}
		slices.Sort(list)
		out[w] = list
	}
	if len(out) == 0 {
		return nil, fmt.Errorf("no synonyms in %s", dir)
	}
	return out, nil
}
