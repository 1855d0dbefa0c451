package importers

import (
	"archive/zip"
	"bufio"
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"strings"

	"github.com/xuri/excelize/v2"
	"golang.org/x/text/encoding/unicode"
	"golang.org/x/text/transform"
)

// records is what the source reads rows from: a CSV reader, or a sheet of a workbook.
type records interface {
	Read() ([]string, error)
	// FieldPos is the line (the sheet's row) and column where a field of the last record
	// read begins.
	FieldPos(field int) (line, column int)
}

// input is an inventory file opened for reading: its records, and what was recognised.
type input struct {
	recs records
	// bounded is the reader that bounds a text file's lines and rows; nil for a workbook.
	bounded *boundedReader
	// decimalComma accepts "48,5" for 48.5 (semicolon- or tab-separated files).
	decimalComma bool
	// sheet is the workbook's sheet read; "" for a text file.
	sheet string
	// format says how the file was read, for the import's report; "" for UTF-8 CSV with
	// commas.
	format string
	// otherSheets are the workbook's other sheets when the first was read by default.
	otherSheets []string
	close       func()
}

// magics are the first bytes of files that are given by mistake where an inventory is
// expected, and what to say about them.
var magics = []struct {
	prefix, what string
}{
	{"\xD0\xCF\x11\xE0\xA1\xB1\x1A\xE1", "a legacy Excel .xls workbook (or another Office 97-2003 file): save it as .xlsx or as CSV"},
	{"%PDF-", "a PDF document: an inventory is a CSV file or an .xlsx workbook"},
	{"\x1F\x8B", "a gzip-compressed file: unpack it first"},
	{"BZh", "a bzip2-compressed file: unpack it first"},
	{"\xFD7zXZ\x00", "an xz-compressed file: unpack it first"},
	{"7z\xBC\xAF\x27\x1C", "a 7-Zip archive: unpack it first"},
	{"Rar!\x1A\x07", "a RAR archive: unpack it first"},
	{"\x89PNG\r\n\x1A\n", "a PNG image: an inventory is a CSV file or an .xlsx workbook"},
	{"\xFF\xD8\xFF", "a JPEG image: an inventory is a CSV file or an .xlsx workbook"},
	{"{\\rtf", "an RTF document: save it as CSV"},
}

// Bounds on a workbook, which is read whole: a zip archive cannot be streamed.
const (
	// maxWorkbookBytes bounds an .xlsx file as stored: an inventory of 100,000 bridges
	// takes some megabytes.
	maxWorkbookBytes = 64 << 20
	// maxWorkbookUnzipped bounds what its parts take unpacked.
	maxWorkbookUnzipped = 512 << 20
)

// openInput recognises what r holds and opens its records: CSV as UTF-8 (with or without a
// byte-order mark) or UTF-16 with its byte-order mark, separated by commas, semicolons or
// tabs as its header line shows; or the named sheet (the first when sheet is "") of an
// .xlsx workbook. Other files are recognised by their first bytes and refused with what
// they are. Problems are recorded in errs; the input is nil when the file cannot be read.
func openInput(r io.Reader, sheet string, errs *errorList) *input {
	br := bufio.NewReaderSize(r, csvBuffer)
	head, _ := br.Peek(8)
	for _, m := range magics {
		if bytes.HasPrefix(head, []byte(m.prefix)) {
			errs.add(&FieldError{Msg: "not a CSV file: this is " + m.what})
			return nil
		}
	}
	if bytes.HasPrefix(head, []byte("PK\x03\x04")) {
		return openWorkbook(br, sheet, errs)
	}
	if sheet != "" {
		errs.add(&FieldError{Msg: fmt.Sprintf("a sheet (%q) is named, but this is a text file, not an .xlsx workbook", sheet)})
		return nil
	}
	var text io.Reader = br
	var enc string
	switch {
	case bytes.HasPrefix(head, []byte{0xFF, 0xFE}):
		text, enc = transform.NewReader(br, unicode.UTF16(unicode.LittleEndian, unicode.ExpectBOM).NewDecoder()), "UTF-16 LE"
	case bytes.HasPrefix(head, []byte{0xFE, 0xFF}):
		text, enc = transform.NewReader(br, unicode.UTF16(unicode.BigEndian, unicode.ExpectBOM).NewDecoder()), "UTF-16 BE"
	case bytes.HasPrefix(head, []byte("\xEF\xBB\xBF")):
		br.Discard(3)
		enc = "UTF-8 with a byte-order mark"
	}
	// The header line shows the separator. Peeking holds at most one line's worth, the
	// bound of a line anyway.
	tb := bufio.NewReaderSize(text, maxLineBytes)
	peek, _ := tb.Peek(maxLineBytes)
	sep := separator(peek)
	in := &input{bounded: newBoundedReader(tb), close: func() {}}
	cr := csv.NewReader(bufio.NewReaderSize(in.bounded, csvBuffer))
	cr.Comma = sep
	cr.FieldsPerRecord = -1 // checked by the source, to report and go on
	cr.ReuseRecord = false
	// So that ` "a, b"` is a quoted field; not with tabs, where it would eat empty fields.
	cr.TrimLeadingSpace = sep != '\t'
	cr.Comment = '#' // a line starting with # is a note, e.g. the caution of a listing
	in.recs = cr
	var parts []string
	switch sep {
	case ';':
		parts = append(parts, "semicolon-separated, decimal comma")
		in.decimalComma = true
	case '\t':
		parts = append(parts, "tab-separated, decimal comma")
		in.decimalComma = true
	}
	if enc != "" {
		parts = append(parts, enc)
	}
	in.format = strings.Join(parts, ", ")
	return in
}

// separator picks the comma, semicolon or tab, whichever the header line (the first line
// that is neither blank nor a # note) holds most of outside quotes; a comma when it holds
// none.
func separator(text []byte) rune {
	for len(text) > 0 {
		line, rest, _ := bytes.Cut(text, []byte("\n"))
		text = rest
		t := bytes.TrimSpace(line)
		if len(t) == 0 || t[0] == '#' {
			continue
		}
		counts := map[byte]int{}
		quoted := false
		for _, c := range line {
			switch {
			case c == '"':
				quoted = !quoted
			case !quoted && (c == ',' || c == ';' || c == '\t'):
				counts[c]++
			}
		}
		best := byte(',')
		for _, c := range []byte{';', '\t'} {
			if counts[c] > counts[best] {
				best = c
			}
		}
		return rune(best)
	}
	return ','
}

// openWorkbook opens a sheet of an .xlsx workbook read from r.
func openWorkbook(r io.Reader, sheet string, errs *errorList) *input {
	data, err := io.ReadAll(io.LimitReader(r, maxWorkbookBytes+1))
	if err != nil {
		errs.add(&FieldError{Msg: "reading: " + err.Error()})
		return nil
	}
	if len(data) > maxWorkbookBytes {
		errs.add(&FieldError{Msg: fmt.Sprintf("a ZIP archive or workbook larger than %d MiB: not an inventory", maxWorkbookBytes>>20)})
		return nil
	}
	z, err := zip.NewReader(bytes.NewReader(data), int64(len(data)))
	if err != nil {
		errs.add(&FieldError{Msg: "not a CSV file, and not a readable ZIP archive or .xlsx workbook: " + err.Error()})
		return nil
	}
	isXLSX := false
	for _, f := range z.File {
		if f.Name == "xl/workbook.xml" {
			isXLSX = true
		}
	}
	if !isXLSX {
		errs.add(&FieldError{Msg: "not a CSV file: this is a ZIP archive that is not an .xlsx workbook (an .ods or .docx file, or files packed together?): unpack it, or save the inventory as .xlsx or CSV"})
		return nil
	}
	wb, err := excelize.OpenReader(bytes.NewReader(data), excelize.Options{UnzipSizeLimit: maxWorkbookUnzipped})
	if err != nil {
		errs.add(&FieldError{Msg: "an .xlsx workbook that cannot be read: " + err.Error()})
		return nil
	}
	names := wb.GetSheetList()
	var others []string
	switch {
	case len(names) == 0:
		wb.Close()
		errs.add(&FieldError{Msg: "an .xlsx workbook without sheets"})
		return nil
	case sheet == "":
		sheet = names[0]
		others = names[1:]
	default:
		found := false
		for _, n := range names {
			if n == sheet {
				found = true
			}
		}
		if !found {
			wb.Close()
			errs.add(&FieldError{Msg: fmt.Sprintf("the workbook has no sheet %q; its sheets: %s", sheet, strings.Join(names, ", "))})
			return nil
		}
	}
	rows, err := wb.Rows(sheet)
	if err != nil {
		wb.Close()
		errs.add(&FieldError{Msg: fmt.Sprintf("sheet %q cannot be read: %v", sheet, err)})
		return nil
	}
	return &input{
		recs:        &sheetRecords{rows: rows},
		sheet:       sheet,
		otherSheets: others,
		format:      fmt.Sprintf("sheet %q of an .xlsx workbook", sheet),
		close:       func() { rows.Close(); wb.Close() },
	}
}

// sheetRecords reads a sheet's rows as records, with the same bounds as a CSV file's: at
// most maxFields cells and maxRowBytes of text a row. A row whose first cell begins with #
// is a note and is skipped, as a CSV line is; so are empty rows.
type sheetRecords struct {
	rows  *excelize.Rows
	row   int // the sheet's row last read, 1-based
	width int // the cells of the first row given, the header
}

func (s *sheetRecords) Read() ([]string, error) {
	for s.rows.Next() {
		s.row++
		// Raw values: a number as stored (48.5, whatever the cell's format shows); a date
		// as its serial number, which the date columns read.
		cells, err := s.rows.Columns(excelize.Options{RawCellValue: true})
		if err != nil {
			return nil, &sheetError{row: s.row, msg: "this row cannot be read: " + err.Error()}
		}
		if len(cells) > maxFields {
			return nil, &sheetError{row: s.row, msg: fmt.Sprintf("%d cells; at most %d are read", len(cells), maxFields)}
		}
		n := 0
		for _, c := range cells {
			n += len(c)
		}
		if n > maxRowBytes {
			return nil, &sheetError{row: s.row, msg: fmt.Sprintf("the row holds more than %d MiB of text", maxRowBytes>>20)}
		}
		if len(cells) == 0 || strings.HasPrefix(cells[0], "#") {
			continue
		}
		// A sheet leaves out a row's empty cells at its end; a CSV row has them.
		if s.width == 0 {
			s.width = len(cells)
		}
		for len(cells) < s.width {
			cells = append(cells, "")
		}
		return cells, nil
	}
	if err := s.rows.Error(); err != nil {
		return nil, err
	}
	return nil, io.EOF
}

func (s *sheetRecords) FieldPos(field int) (int, int) { return s.row, field + 1 }

// sheetError is a row of a sheet that cannot be read as a record.
type sheetError struct {
	row int
	msg string
}

func (e *sheetError) Error() string { return fmt.Sprintf("row %d: %s", e.row, e.msg) }
