package tabular

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"os"
	"regexp"
	"strconv"
	"strings"

	"github.com/xuri/excelize/v2"
)

// zipMagic starts every .xlsx file (a zip archive).
var zipMagic = []byte("PK\x03\x04")

// IsWorkbook reports whether a file name or its first bytes say .xlsx.
func IsWorkbook(name string, head []byte) bool {
	return strings.HasSuffix(strings.ToLower(name), ".xlsx") || bytes.HasPrefix(head, zipMagic)
}

// Open reads a table from r: a workbook when its first bytes or name say
// so, else delimited text.
func Open(r io.Reader, name string, opt Options) (*Reader, error) {
	br := bufio.NewReader(r)
	head, _ := br.Peek(4)
	if IsWorkbook(name, head) {
		return NewWorkbookReader(br, name, opt)
	}
	return NewReader(br, name, opt)
}

// OpenFile opens path ("-" for os.Stdin is the caller's business) and
// reads it with Open; the returned function closes the file.
func OpenFile(path string, opt Options) (*Reader, func() error, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, err
	}
	r, err := Open(f, path, opt)
	if err != nil {
		f.Close()
		return nil, nil, err
	}
	return r, f.Close, nil
}

// maxWorkbookBytes bounds the workbook read into memory (a workbook is a
// zip archive and is read whole).
const maxWorkbookBytes = 512 << 20

// dateLike matches a cell's displayed text that a date format produced
// ("3/4/25", "2025-03-04", "04.03.2025 14:05").
var dateLike = regexp.MustCompile(`^[0-9]{1,4}[-/.][0-9]{1,2}[-/.][0-9]{1,4}( .*)?$`)

// NewWorkbookReader reads the sheet opt.Sheet (the first if "") of an
// .xlsx workbook. Cells are given as text: numbers as plain decimals with
// a decimal point (the value stored, not its display), date cells as
// YYYY-MM-DD (with " hh:mm:ss" when they hold a time), text as it is.
// Lines are the sheet's row numbers.
func NewWorkbookReader(r io.Reader, name string, opt Options) (*Reader, error) {
	data, err := io.ReadAll(io.LimitReader(r, maxWorkbookBytes+1))
	if err != nil {
		return nil, errorf(name, 0, "", "%v", err)
	}
	if len(data) > maxWorkbookBytes {
		return nil, errorf(name, 0, "", "a workbook larger than %d MiB: save the sheet as CSV instead", maxWorkbookBytes>>20)
	}
	f, err := excelize.OpenReader(bytes.NewReader(data))
	if err != nil {
		return nil, errorf(name, 0, "", "not a readable .xlsx workbook: %v", err)
	}
	defer f.Close()
	sheets := f.GetSheetList()
	if len(sheets) == 0 {
		return nil, errorf(name, 0, "", "the workbook has no sheets")
	}
	sheet := sheets[0]
	if opt.Sheet != "" {
		sheet = ""
		for _, s := range sheets {
			if s == opt.Sheet {
				sheet = s
			}
		}
		if sheet == "" {
			return nil, errorf(name, 0, "", "no sheet %q: the workbook has %s", opt.Sheet, quoteHeader(sheets))
		}
	}
	raw, err := f.GetRows(sheet, excelize.Options{RawCellValue: true})
	if err != nil {
		return nil, errorf(name, 0, "", "sheet %q: %v", sheet, err)
	}
	shown, err := f.GetRows(sheet)
	if err != nil {
		return nil, errorf(name, 0, "", "sheet %q: %v", sheet, err)
	}
	where := fmt.Sprintf("%s[%s]", name, sheet)
	rows := make([][]string, len(raw))
	for i, row := range raw {
		rows[i] = make([]string, len(row))
		for j, v := range row {
			rows[i][j] = workbookCell(v, cellAt(shown, i, j))
		}
	}
	rd := &Reader{Name: where, Dialect: Dialect{Format: "xlsx", Sheet: sheet}}
	i := 0
	rd.next = func() ([]string, int, error) {
		for i < len(rows) {
			row := rows[i]
			i++
			// A sheet stores no trailing empty cells: a short row is
			// padded to the header's width.
			for len(row) < rd.rawWidth {
				row = append(row, "")
			}
			return row, i, nil
		}
		return nil, 0, io.EOF
	}
	for {
		hdr, line, err := rd.next()
		if err == io.EOF {
			return nil, errorf(where, 0, "", "no header row: the sheet is empty")
		}
		if blank(hdr) {
			continue
		}
		rd.rawWidth = len(hdr)
		rd.Header = trimTrailing(append([]string(nil), hdr...))
		for k, h := range rd.Header {
			rd.Header[k] = strings.TrimSpace(h)
		}
		rd.HeaderLine = line
		return rd, nil
	}
}

func cellAt(rows [][]string, i, j int) string {
	if i < len(rows) && j < len(rows[i]) {
		return rows[i][j]
	}
	return ""
}

// workbookCell turns a stored cell value and its display into the text
// the readers parse: a number shown as a date becomes YYYY-MM-DD.
func workbookCell(raw, shown string) string {
	if raw == shown || !dateLike.MatchString(strings.TrimSpace(shown)) {
		return raw
	}
	v, err := strconv.ParseFloat(raw, 64)
	if err != nil || v < 1 || v > 2958465 {
		return raw
	}
	day := int(v)
	t, err := parseSerial(strconv.Itoa(day))
	if err != nil {
		return raw
	}
	frac := v - float64(day)
	if frac <= 0 {
		return t.Format("2006-01-02")
	}
	secs := int(frac*86400 + 0.5)
	return fmt.Sprintf("%s %02d:%02d:%02d", t.Format("2006-01-02"), secs/3600, secs/60%60, secs%60)
}
