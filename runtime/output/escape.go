package output

import (
	"strconv"
	"strings"
)

// Names and labels come from the script: whatever they hold, they are shown as text, never
// read as markup by a code host or as a formula by a spreadsheet.

// mdEscaper writes text for Markdown that a code host renders: HTML is shown as text (the
// entities), and the characters that open links, code, emphasis or table cells are escaped.
var mdEscaper = strings.NewReplacer(
	"&", "&amp;", "<", "&lt;", ">", "&gt;",
	`\`, `\\`, "`", "\\`", "*", `\*`, "[", `\[`, "]", `\]`, "|", `\|`,
	"\r\n", " ", "\n", " ", "\r", " ",
)

// md is s as Markdown text.
func md(s string) string { return mdEscaper.Replace(s) }

// csvCell keeps a text cell from being read as a formula: a spreadsheet evaluates a cell that
// starts with = + - @ (or a tab or carriage return), so such a cell gets a leading apostrophe,
// which spreadsheets take as "text". Numbers (-3, +1.5e-3) stay as they are.
func csvCell(s string) string {
	if s == "" || !strings.ContainsRune("=+-@\t\r", rune(s[0])) {
		return s
	}
	if _, err := strconv.ParseFloat(s, 64); err == nil {
		return s
	}
	return "'" + s
}
