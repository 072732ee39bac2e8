package inspect

import (
	"strings"
	"unicode/utf8"

	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
)

// ellipsis ends a word cut short by wrapText.
const ellipsis = "…"

// wrapText breaks s into lines no wider than width, as measured with sty
// (its font and text handler), and returns them joined by "\n". Line
// breaks already in s are kept. Words are separated at spaces; a word
// wider than a line is broken after one of "_-./=" (so a long column name
// such as "state_funeral_of_queen_elizabeth_ii" wraps at its underscores)
// and, if that is not possible, cut short and ended with an ellipsis. The
// result is never empty when s has a visible character, so a line of one
// ellipsis is returned when even that is wider than width.
func wrapText(sty text.Style, s string, width vg.Length) string {
	fits := func(t string) bool { return sty.Width(t) <= width }
	var out []string
	for _, para := range strings.Split(s, "\n") {
		line := ""
		for _, word := range strings.Fields(para) {
			if line != "" && fits(line+" "+word) {
				line += " " + word
				continue
			}
			if line != "" {
				out = append(out, line)
				line = ""
			}
			for !fits(word) {
				if cut := breakAt(word, fits); cut > 0 {
					out = append(out, word[:cut])
					word = word[cut:]
					continue
				}
				word = truncate(word, fits)
				break
			}
			line = word
		}
		out = append(out, line)
	}
	return strings.Join(out, "\n")
}

// breakAt returns the largest byte index i such that word[:i] ends with a
// break character and fits, or 0 if there is none.
func breakAt(word string, fits func(string) bool) int {
	best := 0
	for i, r := range word {
		end := i + utf8.RuneLen(r)
		if end == len(word) || !strings.ContainsRune("_-./=", r) {
			continue
		}
		if !fits(word[:end]) {
			break
		}
		best = end
	}
	return best
}

// truncate returns the longest prefix of word that fits with an ellipsis
// after it, or a lone ellipsis.
func truncate(word string, fits func(string) bool) string {
	best := ellipsis
	for i := range word {
		if i == 0 {
			continue
		}
		if !fits(word[:i] + ellipsis) {
			break
		}
		best = word[:i] + ellipsis
	}
	return best
}
