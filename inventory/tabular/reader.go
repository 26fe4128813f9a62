package tabular

import (
	"bufio"
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strings"
	"unicode/utf8"

	"golang.org/x/text/encoding"
	"golang.org/x/text/encoding/charmap"
	"golang.org/x/text/encoding/htmlindex"
	"golang.org/x/text/encoding/unicode"
	"golang.org/x/text/transform"
)

// Delimiters are the field separators found by detection.
var Delimiters = []rune{',', ';', '\t', '|'}

// Options fix what would otherwise be found from the file.
type Options struct {
	// Delimiter is the field separator; 0 finds it from the header line.
	Delimiter rune
	// Encoding names the text encoding (a WHATWG name such as "utf-8",
	// "utf-16le", "windows-1252" or "iso-8859-15"); "" finds it: a
	// byte-order mark, else UTF-8, else Windows-1252.
	Encoding string
	// Sheet is the sheet of a workbook to read; "" is the first.
	Sheet string
	// Reuse lets Read return the same slice on every call, overwritten by
	// the next (the strings in it stay valid, as with encoding/csv's
	// ReuseRecord): a reader that keeps no record saves an allocation a
	// row.
	Reuse bool
}

// Dialect is what a table was read as; String says it in a few words for
// the summary line.
type Dialect struct {
	Format    string // "csv" or "xlsx"
	Delimiter rune   // csv only
	Encoding  string // csv only: "UTF-8", "UTF-16LE", "windows-1252", ...
	BOM       bool   // a byte-order mark was read
	SepLine   bool   // a leading "sep=X" line named the delimiter
	Titles    int    // title lines skipped above the header
	Sheet     string // xlsx only
}

func (d Dialect) String() string {
	if d.Format == "xlsx" {
		return fmt.Sprintf("workbook, sheet %q", d.Sheet)
	}
	var parts []string
	parts = append(parts, DelimiterName(d.Delimiter)+"-delimited")
	enc := d.Encoding
	if d.BOM {
		enc += " with BOM"
	}
	parts = append(parts, enc)
	if d.SepLine {
		parts = append(parts, "sep= line")
	}
	if d.Titles > 0 {
		parts = append(parts, fmt.Sprintf("%d title line(s) skipped", d.Titles))
	}
	return strings.Join(parts, ", ")
}

// DelimiterName writes a delimiter as a user would type it: ',' ';' '|'
// or "tab".
func DelimiterName(r rune) string {
	if r == '\t' {
		return "tab"
	}
	return fmt.Sprintf("'%c'", r)
}

// ParseDelimiter reads a --delimiter value: one character, or "tab",
// "comma", "semicolon", "pipe"; "" or "auto" for detection (0).
func ParseDelimiter(s string) (rune, error) {
	switch strings.ToLower(s) {
	case "", "auto":
		return 0, nil
	case "tab", `\t`:
		return '\t', nil
	case "comma":
		return ',', nil
	case "semicolon":
		return ';', nil
	case "pipe":
		return '|', nil
	}
	r, n := utf8.DecodeRuneInString(s)
	if n != len(s) || r == '"' || r == '\r' || r == '\n' || r == utf8.RuneError {
		return 0, fmt.Errorf("want one character such as ';', or tab, comma, semicolon, pipe or auto")
	}
	return r, nil
}

// Reader reads the records of a table after its header.
type Reader struct {
	Name       string   // the file, for messages
	Dialect    Dialect  // how it was read
	Header     []string // the header's cells, trailing empty ones removed
	HeaderLine int      // the header's line (row of a workbook)

	rawWidth int // header fields before trimming
	next     func() ([]string, int, error)
}

// ErrFieldCount is wrapped by the *Error of a record whose number of fields
// differs from the header's.
var ErrFieldCount = errors.New("field count differs from the header")

// fieldCountErr is the *Error of a record of n fields.
type fieldCountErr struct {
	n, header, width int
	hint             string
}

func (e fieldCountErr) Error() string {
	return fmt.Sprintf("%d fields, but the header (line %d) has %d%s", e.n, e.header, e.width, e.hint)
}
func (e fieldCountErr) Unwrap() error { return ErrFieldCount }

// Read returns the next record, the header's width at least (trailing
// empty fields beyond it removed), and its line. It returns io.EOF after
// the last record. A record with more non-empty fields than the header, or
// fewer fields, is an *Error naming its line that wraps ErrFieldCount; the
// record is returned with it, as read, so that a caller may keep its
// place (reading goes on with the next record).
func (r *Reader) Read() ([]string, int, error) {
	for {
		rec, line, err := r.next()
		if err != nil {
			return nil, line, err
		}
		if blank(rec) {
			continue
		}
		w := len(r.Header)
		if len(rec) < w && r.Dialect.Format == "xlsx" {
			// A sheet's rows end at their last non-empty cell.
			rec = append(rec, make([]string, w-len(rec))...)
		}
		if len(rec) < w {
			return rec, line, &Error{File: r.Name, Line: line, Err: fieldCountErr{len(rec), r.HeaderLine, w, ""}}
		}
		for i := w; i < len(rec); i++ {
			if strings.TrimSpace(rec[i]) != "" {
				hint := ""
				if r.Dialect.Format == "csv" && r.Dialect.Delimiter == ',' {
					hint = " (a decimal comma or a thousands separator in an unquoted number? quote the field, or write the file with ';')"
				}
				return rec, line, &Error{File: r.Name, Line: line, Err: fieldCountErr{len(rec), r.HeaderLine, w, hint}}
			}
		}
		return rec[:w], line, nil
	}
}

func blank(rec []string) bool {
	for _, c := range rec {
		if strings.TrimSpace(c) != "" {
			return false
		}
	}
	return true
}

// trimTrailing removes trailing empty cells.
func trimTrailing(rec []string) []string {
	n := len(rec)
	for n > 0 && strings.TrimSpace(rec[n-1]) == "" {
		n--
	}
	return rec[:n]
}

// sniffSize is how much of a text file is looked at to find its dialect.
const sniffSize = 64 << 10

// NewReader reads a delimited text table from r; name is used in messages.
// Workbooks are read by NewWorkbookReader (OpenFile picks either).
func NewReader(r io.Reader, name string, opt Options) (*Reader, error) {
	br := bufio.NewReaderSize(r, sniffSize)
	head, err := br.Peek(sniffSize)
	if err != nil && err != io.EOF && !errors.Is(err, bufio.ErrBufferFull) {
		return nil, errorf(name, 0, "", "%v", err)
	}
	d := Dialect{Format: "csv"}
	var dec *encoding.Decoder
	switch {
	case opt.Encoding != "":
		e, err := htmlindex.Get(opt.Encoding)
		if err != nil {
			return nil, errorf(name, 0, "", "encoding %q: want a name such as utf-8, utf-16le, windows-1252 or iso-8859-15", opt.Encoding)
		}
		d.Encoding, _ = htmlindex.Name(e)
		dec = e.NewDecoder()
		if bytes.HasPrefix(head, []byte{0xEF, 0xBB, 0xBF}) {
			d.BOM = true
		}
	case bytes.HasPrefix(head, []byte{0xEF, 0xBB, 0xBF}):
		d.Encoding, d.BOM = "UTF-8", true
	case bytes.HasPrefix(head, []byte{0xFF, 0xFE}):
		d.Encoding, d.BOM = "UTF-16LE", true
		dec = unicode.UTF16(unicode.LittleEndian, unicode.ExpectBOM).NewDecoder()
	case bytes.HasPrefix(head, []byte{0xFE, 0xFF}):
		d.Encoding, d.BOM = "UTF-16BE", true
		dec = unicode.UTF16(unicode.BigEndian, unicode.ExpectBOM).NewDecoder()
	case looksUTF16(head, 1):
		d.Encoding = "UTF-16LE"
		dec = unicode.UTF16(unicode.LittleEndian, unicode.IgnoreBOM).NewDecoder()
	case looksUTF16(head, 0):
		d.Encoding = "UTF-16BE"
		dec = unicode.UTF16(unicode.BigEndian, unicode.IgnoreBOM).NewDecoder()
	case utf8.Valid(trimPartialRune(head)):
		d.Encoding = "UTF-8"
	default:
		d.Encoding = "windows-1252"
		dec = charmap.Windows1252.NewDecoder()
	}
	var text io.Reader = br
	if dec != nil {
		text = transform.NewReader(br, dec)
	}
	tr := bufio.NewReaderSize(text, sniffSize)
	if d.BOM && d.Encoding == "UTF-8" || d.BOM && opt.Encoding != "" {
		tr.Discard(3)
	}

	// Lines above the header: a "sep=X" line, then title lines (lines with
	// none of the delimiters while the line after them has some).
	sample, _ := tr.Peek(sniffSize)
	lines := splitLines(sample)
	skip, skipBytes := 0, 0
	delim := opt.Delimiter
	if len(lines) > 0 {
		if l := strings.TrimSpace(lines[0]); strings.HasPrefix(strings.ToLower(l), "sep=") && utf8.RuneCountInString(l) == 5 {
			r, _ := utf8.DecodeRuneInString(l[4:])
			if delim == 0 {
				delim = r
			}
			d.SepLine = true
			skip, skipBytes = 1, len(lines[0])
		}
	}
	for skip < len(lines) && strings.TrimSpace(strings.TrimRight(lines[skip], "\r\n")) == "" && skip < 50 {
		skipBytes += len(lines[skip])
		skip++
	}
	if delim == 0 {
		var titles int
		delim, titles = detectLayout(lines[skip:])
		for i := skip; i < skip+titles; i++ {
			skipBytes += len(lines[i])
			if strings.TrimSpace(lines[i]) != "" {
				d.Titles++
			}
		}
		skip += titles
	} else {
		// The delimiter is known (given, or named by a sep= line): title
		// lines are up to four lines without it above the first line with
		// it, when the two lines after that have it too.
		k := skip
		for k < len(lines) && k-skip < 5 && countOutsideQuotes(lines[k], delim) == 0 {
			k++
		}
		if k > skip && k-skip < 5 && k+2 < len(lines) && countOutsideQuotes(lines[k+1], delim) > 0 && countOutsideQuotes(lines[k+2], delim) > 0 {
			for i := skip; i < k; i++ {
				skipBytes += len(lines[i])
				if strings.TrimSpace(lines[i]) != "" {
					d.Titles++
				}
			}
			skip = k
		}
	}
	d.Delimiter = delim
	tr.Discard(skipBytes)

	cr := csv.NewReader(tr)
	cr.Comma = delim
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = opt.Reuse
	offset := skip
	rd := &Reader{Name: name, Dialect: d}
	utf := d.Encoding == "UTF-8"
	rd.next = func() ([]string, int, error) {
		rec, err := cr.Read()
		line := 0
		if err == nil {
			line, _ = cr.FieldPos(0)
			line += offset
		}
		if err != nil {
			var pe *csv.ParseError
			if errors.As(err, &pe) {
				want := ""
				switch {
				case errors.Is(pe.Err, csv.ErrQuote):
					want = `: want a quoted field closed by " and each " inside it doubled`
				case errors.Is(pe.Err, csv.ErrBareQuote):
					want = `: want a field holding " enclosed in quotes, with the " doubled`
				}
				return nil, pe.StartLine + offset, errorf(name, pe.Line+offset, "", "%v (character %d)%s", pe.Err, pe.Column, want)
			}
			if err == io.EOF {
				return nil, 0, io.EOF
			}
			return nil, 0, errorf(name, 0, "", "%v", err)
		}
		if utf {
			for _, c := range rec {
				if !utf8.ValidString(c) {
					return nil, line, errorf(name, line, "", "bytes that are not UTF-8 (the file's first lines were): give the file's encoding, e.g. --encoding windows-1252")
				}
			}
		}
		return rec, line, nil
	}
	hdr, line, err := rd.next()
	if err == io.EOF {
		return nil, errorf(name, 0, "", "no header line: the file is empty")
	}
	if err != nil {
		return nil, err
	}
	hdr = append([]string(nil), hdr...) // kept: not to be overwritten
	if len(hdr) > 0 {
		hdr[0] = strings.TrimPrefix(hdr[0], "\ufeff")
	}
	rd.rawWidth = len(hdr)
	rd.Header = trimTrailing(hdr)
	rd.HeaderLine = line
	for i, h := range rd.Header {
		rd.Header[i] = strings.TrimSpace(h)
	}
	return rd, nil
}

// looksUTF16 reports whether a sample without a byte-order mark looks like
// UTF-16 text of mostly ASCII: zero bytes at every other position (odd
// positions for little-endian, even for big-endian).
func looksUTF16(b []byte, odd int) bool {
	if len(b) < 4 {
		return false
	}
	zeros, n := 0, 0
	for i := odd; i < len(b); i += 2 {
		n++
		if b[i] == 0 {
			zeros++
		}
	}
	other := 0
	for i := 1 - odd; i < len(b); i += 2 {
		if b[i] == 0 {
			other++
		}
	}
	return zeros*10 >= n*9 && other*10 < n
}

// trimPartialRune drops a UTF-8 sequence cut short at the end of a sample.
func trimPartialRune(b []byte) []byte {
	for i := 0; i < 3 && len(b) > 0; i++ {
		if utf8.Valid(b) {
			return b
		}
		b = b[:len(b)-1]
	}
	return b
}

// splitLines cuts a sample into lines, each with its line end; a last
// line without an end is kept only if the sample is the whole file.
func splitLines(b []byte) []string {
	var out []string
	for len(b) > 0 {
		i := bytes.IndexByte(b, '\n')
		if i < 0 {
			out = append(out, string(b))
			break
		}
		out = append(out, string(b[:i+1]))
		b = b[i+1:]
	}
	return out
}

// countDelims counts the candidate delimiters of a line outside quotes.
func countDelims(line string) int {
	n := 0
	for _, r := range Delimiters {
		n += countOutsideQuotes(line, r)
	}
	return n
}

func countOutsideQuotes(line string, d rune) int {
	n, quoted := 0, false
	for _, r := range line {
		switch {
		case r == '"':
			quoted = !quoted
		case r == d && !quoted:
			n++
		}
	}
	return n
}

// detectLayout finds the delimiter and the number of title lines above the
// header from the first lines of a file. A title is one of up to four lines
// above a line from which, for some candidate delimiter, the header and at
// least two following lines (four in five of them) hold the same positive
// number of delimiters outside quotes while the lines above hold fewer.
// Without titles the header is the first line and the delimiter the
// candidate it holds most often (',' if none).
func detectLayout(lines []string) (rune, int) {
	sample := lines[:min(len(lines), 40)]
	if len(lines) > len(sample) && len(sample) > 0 {
		sample = sample[:len(sample)-1] // may be cut by the sample's end
	}
	counts := map[rune][]int{}
	for _, d := range Delimiters {
		c := make([]int, len(sample))
		for i, l := range sample {
			c[i] = countOutsideQuotes(l, d)
		}
		counts[d] = c
	}
	for k := 1; k < 5 && k < len(sample); k++ {
		best, bestCount := rune(0), 0
		for _, d := range Delimiters {
			c := counts[d]
			if c[k] == 0 || c[k] <= bestCount {
				continue
			}
			above := true
			for _, x := range c[:k] {
				if x >= c[k] {
					above = false
				}
			}
			same, rest := 0, 0
			for _, x := range c[k+1:] {
				rest++
				if x == c[k] {
					same++
				}
			}
			if above && rest >= 2 && same*5 >= rest*4 {
				best, bestCount = d, c[k]
			}
		}
		if best != 0 {
			// Only if the first line is not itself a consistent header.
			c0 := counts[detectDelimiter(sample[0])]
			same := 0
			for _, x := range c0[1:] {
				if x == c0[0] {
					same++
				}
			}
			if c0[0] == 0 || same*5 < (len(c0)-1)*4 {
				return best, k
			}
		}
	}
	if len(lines) > 0 {
		return detectDelimiter(lines[0]), 0
	}
	return ',', 0
}

// detectDelimiter picks the candidate the header line holds most often
// outside quotes; ',' when it holds none.
func detectDelimiter(line string) rune {
	best, count := ',', 0
	for _, r := range Delimiters {
		if n := countOutsideQuotes(line, r); n > count {
			best, count = r, n
		}
	}
	return best
}

// HeaderHint says, for a header that was read as one field or lacks the
// wanted columns, which other delimiter it seems to use; "" if none.
func (r *Reader) HeaderHint() string {
	if r.Dialect.Format != "csv" {
		return ""
	}
	line := strings.Join(r.Header, string(r.Dialect.Delimiter))
	for _, d := range Delimiters {
		if d != r.Dialect.Delimiter && countOutsideQuotes(line, d) > 0 && len(r.Header) <= countOutsideQuotes(line, d) {
			return fmt.Sprintf("the header looks %s-delimited, but the file was read as %s-delimited: give --delimiter %s", DelimiterName(d), DelimiterName(r.Dialect.Delimiter), flagDelimiter(d))
		}
	}
	return ""
}

func flagDelimiter(d rune) string {
	switch d {
	case '\t':
		return "tab"
	case ';':
		return "';'"
	case '|':
		return "'|'"
	}
	return "','"
}
