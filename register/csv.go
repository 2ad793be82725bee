package register

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"regexp"
	"sort"
	"strings"

	"github.com/shopspring/decimal"
)

// A register as a spreadsheet: a header row, then one row per risk.
//
//	id, title, type, probability, low, likely, high       required
//	owner, category, distribution,
//	response, response_cost, residual_probability,
//	residual_low, residual_likely, residual_high, residual_distribution,
//	schedule_low, schedule_likely, schedule_high, schedule_distribution
//
// Column names are matched ignoring case, and spaces or hyphens count as
// underscores ("Response cost" is response_cost). type is threat or
// opportunity; probabilities are written 30% or 0.3; amounts as plain
// numbers, thousands grouped or not (120,000). An impact is three figures
// (low, likely, high) of a PERT distribution unless distribution says
// triangular, or uniform (low and high); likely alone, or three equal
// figures, is a fixed impact. A response's residual probability and impact
// default to the risk's own when left empty; its cost to 0. Every other
// column is kept, and written back as it was.

// CSV column names.
var (
	requiredColumns = []string{"id", "title", "type", "probability", "low", "likely", "high"}
	optionalColumns = []string{"owner", "category", "distribution", "response", "response_cost",
		"residual_probability", "residual_low", "residual_likely", "residual_high", "residual_distribution",
		"schedule_low", "schedule_likely", "schedule_high", "schedule_distribution"}
)

// Result columns: what WriteCSV adds. A sheet written by it and read again
// drops them (they are written afresh).
var resultColumn = regexp.MustCompile(`^(emv|emv_after|response_net|take_response|rank|share|contribution_p[0-9.]+)$`)

// MaxRisks is the most risks a spreadsheet may hold.
const MaxRisks = 100_000

// MaxCSVBytes is the largest spreadsheet ReadCSV reads.
const MaxCSVBytes = 64 << 20

// maxCSVErrors is how many bad cells a CSVError lists.
const maxCSVErrors = 100

// Table is a register read from a spreadsheet, with the text of every
// cell kept so that it can be written back as it was.
type Table struct {
	Register *Register
	// Header is the columns as written (result columns of an earlier
	// analysis left out); Rows each risk's cells in the header's order.
	Header []string
	Rows   [][]string
}

// CellError is a bad cell: its row (the line of the file the row starts
// on: the spreadsheet's row, the header being row 1) and column (1 the
// first), and what is wrong.
type CellError struct {
	Row, Column int
	Msg         string
}

// Error returns "ROW:COLUMN: MSG".
func (e CellError) Error() string { return fmt.Sprintf("%d:%d: %s", e.Row, e.Column, e.Msg) }

// CSVError is a spreadsheet that cannot be read as a register: every bad
// cell (the first maxCSVErrors; More counts the rest).
type CSVError struct {
	Cells []CellError
	More  int
}

// Error returns the bad cells, one a line.
func (e *CSVError) Error() string { return strings.Join(e.Lines(""), "\n") }

// Lines returns the bad cells as "FILE:ROW:COLUMN: MSG" lines.
func (e *CSVError) Lines(file string) []string {
	var out []string
	for _, c := range e.Cells {
		if file != "" {
			out = append(out, file+":"+c.Error())
		} else {
			out = append(out, c.Error())
		}
	}
	if e.More > 0 {
		out = append(out, fmt.Sprintf("%s: and %d more", strings.TrimSuffix(file, ":"), e.More))
	}
	return out
}

// normalColumn is a header cell as it is matched: lower case, spaces and
// hyphens as underscores.
func normalColumn(s string) string {
	s = strings.ToLower(strings.TrimSpace(s))
	return strings.Join(strings.FieldsFunc(s, func(r rune) bool { return r == ' ' || r == '-' || r == '_' }), "_")
}

// csvReader reads one sheet.
type csvReader struct {
	errs  *CSVError
	col   map[string]int // known column → index
	names []string       // header as written
	line  int            // the row being read
	src   []byte         // the file, to place a syntax error in its column
}

func (r *csvReader) fail(row, col int, format string, a ...any) {
	if len(r.errs.Cells) == maxCSVErrors {
		r.errs.More++
		return
	}
	r.errs.Cells = append(r.errs.Cells, CellError{Row: row, Column: col, Msg: fmt.Sprintf(format, a...)})
}

// ReadCSV reads a register from a spreadsheet saved as CSV (comma
// separated, UTF-8, a byte-order mark allowed). Every bad cell is
// reported (a *CSVError), not just the first.
func ReadCSV(in io.Reader) (*Table, error) {
	r := &csvReader{errs: &CSVError{}}
	src, err := io.ReadAll(io.LimitReader(in, MaxCSVBytes+1))
	if err != nil {
		r.fail(1, 1, "the file cannot be read: %v", err)
		return nil, r.errs
	}
	if len(src) > MaxCSVBytes {
		r.fail(1, 1, "the file is larger than %d MB; a register of that size is not a spreadsheet anyone reads", MaxCSVBytes>>20)
		return nil, r.errs
	}
	src = bytes.TrimPrefix(src, []byte("\xef\xbb\xbf"))
	r.src = src
	cr := csv.NewReader(bytes.NewReader(src))
	cr.FieldsPerRecord = -1
	header, err := cr.Read()
	if errors.Is(err, io.EOF) {
		r.fail(1, 1, "the file is empty: a register needs a header row (%s) and a row for each risk", strings.Join(requiredColumns, ", "))
		return nil, r.errs
	}
	if err != nil {
		r.parseError(err)
		return nil, r.errs
	}
	if !r.header(header) {
		return nil, r.errs
	}
	t := &Table{Register: &Register{}}
	var keep []int // the header's columns that are not results of an earlier analysis
	for i, name := range header {
		if !resultColumn.MatchString(normalColumn(name)) {
			keep = append(keep, i)
			t.Header = append(t.Header, name)
		}
	}
	firstLine := map[string]int{}
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			r.parseError(err)
			break
		}
		line, _ := cr.FieldPos(0)
		r.line = line
		if blank(rec) {
			continue // an empty row, as spreadsheets export below the data
		}
		if len(rec) != len(header) {
			col := min(len(rec), len(header)) + 1
			r.fail(line, col, "this row has %d cells and the header %d; every row needs one cell for each column (quote a cell that holds a comma)", len(rec), len(header))
			continue
		}
		if len(t.Rows) == MaxRisks {
			r.fail(line, 1, "more than %d risks", MaxRisks)
			break
		}
		k := r.risk(rec)
		if k.ID != "" {
			if first, dup := firstLine[k.ID]; dup {
				r.fail(line, r.col["id"]+1, "the id %q is used twice (first on row %d); give each risk its own", short(k.ID), first)
			} else {
				firstLine[k.ID] = line
			}
		}
		cells := make([]string, len(keep))
		for j, i := range keep {
			cells[j] = rec[i]
		}
		t.Rows = append(t.Rows, cells)
		t.Register.Risks = append(t.Register.Risks, k)
	}
	if len(r.errs.Cells) == 0 && len(t.Rows) == 0 {
		r.fail(2, 1, "the file has a header but no risks: add a row for each risk below it")
	}
	if len(r.errs.Cells) > 0 {
		sort.SliceStable(r.errs.Cells, func(i, j int) bool {
			a, b := r.errs.Cells[i], r.errs.Cells[j]
			return a.Row < b.Row || a.Row == b.Row && a.Column < b.Column
		})
		return nil, r.errs
	}
	return t, nil
}

func blank(rec []string) bool {
	for _, c := range rec {
		if strings.TrimSpace(c) != "" {
			return false
		}
	}
	return true
}

// parseError reports a CSV syntax error (a stray quote, say) where it is.
func (r *csvReader) parseError(err error) {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		r.fail(pe.Line, r.fieldAt(pe.Line, pe.Column), "the file is not valid CSV here: %v (a cell that holds a quote must be in quotes, with the quote doubled: \"6\"\" pipe\")", pe.Err)
		return
	}
	r.fail(max(r.line, 1), 1, "the file cannot be read: %v", err)
}

// fieldAt returns the number of the cell (from 1) that byte col (from 1)
// of the file's line falls in: one more than the commas before it outside
// quotes.
func (r *csvReader) fieldAt(line, col int) int {
	rest := r.src
	for l := 1; l < line; l++ {
		i := bytes.IndexByte(rest, '\n')
		if i < 0 {
			return 1
		}
		rest = rest[i+1:]
	}
	field, quoted := 1, false
	for i := 0; i < len(rest) && i < col-1; i++ {
		switch rest[i] {
		case '"':
			quoted = !quoted
		case ',':
			if !quoted {
				field++
			}
		case '\n':
			return field
		}
	}
	return field
}

// header checks the header row and learns where the columns are.
func (r *csvReader) header(h []string) bool {
	r.names = h
	r.col = map[string]int{}
	if len(h) == 1 {
		for _, sep := range []string{";", "\t"} {
			if strings.Contains(h[0], sep) && len(strings.Split(h[0], sep)) >= len(requiredColumns) {
				what := "`;`"
				if sep == "\t" {
					what = "tabs"
				}
				r.fail(1, 1, "the columns are separated by %s, not commas: save the sheet as comma-separated CSV", what)
				return false
			}
		}
	}
	known := map[string]bool{}
	for _, c := range requiredColumns {
		known[c] = true
	}
	for _, c := range optionalColumns {
		known[c] = true
	}
	for i, name := range h {
		n := normalColumn(name)
		if n == "" {
			if strings.TrimSpace(name) == "" && !blank(h) {
				continue // an unnamed column: kept, passed through
			}
		}
		if !known[n] {
			continue
		}
		if prev, dup := r.col[n]; dup {
			r.fail(1, i+1, "the column %q appears twice (first as column %d)", n, prev+1)
			continue
		}
		r.col[n] = i
	}
	for _, c := range requiredColumns {
		if _, ok := r.col[c]; !ok {
			r.fail(1, 1, "the header has no column %q; a register needs the columns %s", c, strings.Join(requiredColumns, ", "))
		}
	}
	return len(r.errs.Cells) == 0
}

// cell returns the text of a known column in rec, "" when the sheet has
// no such column, and its column number.
func (r *csvReader) cell(rec []string, name string) (string, int, bool) {
	i, ok := r.col[name]
	if !ok {
		return "", 0, false
	}
	return strings.TrimSpace(rec[i]), i + 1, true
}

// risk reads one row, reporting its bad cells.
func (r *csvReader) risk(rec []string) Risk {
	var k Risk
	id, col, _ := r.cell(rec, "id")
	if id == "" {
		r.fail(r.line, col, "the id is empty; give each risk an id (R1, R2, …)")
	}
	k.ID = id
	title, col, _ := r.cell(rec, "title")
	if title == "" {
		r.fail(r.line, col, "the title is empty; say in a few words what the risk is")
	}
	k.Title = title
	typ, col, _ := r.cell(rec, "type")
	if kind, ok := ParseKind(typ); ok {
		k.Kind = kind
	} else if typ == "" {
		r.fail(r.line, col, "the type is empty; write threat or opportunity")
	} else {
		r.fail(r.line, col, "the type %q is neither threat nor opportunity", short(typ))
	}
	k.P = r.probability(rec, "probability")
	k.Impact, _ = r.threePoint(rec, "", "the impact", true)
	k.Owner, _, _ = r.cell(rec, "owner")
	k.Category, _, _ = r.cell(rec, "category")
	if d, ok := r.threePoint(rec, "schedule_", "the schedule impact", false); ok {
		k.Delay = &d
	}
	// A response: any of its cells filled.
	action, _, _ := r.cell(rec, "response")
	costText, costCol, _ := r.cell(rec, "response_cost")
	rpText, _, _ := r.cell(rec, "residual_probability")
	residual, hasResidual := r.threePoint(rec, "residual_", "the residual impact", false)
	if action != "" || costText != "" || rpText != "" || hasResidual {
		rs := &Response{Action: action, P: k.P, Impact: k.Impact}
		if costText != "" {
			v, _, msg := parseNumber(costText, false)
			switch {
			case msg != "":
				r.fail(r.line, costCol, "response_cost %s", msg)
			case v.Sign() < 0:
				r.fail(r.line, costCol, "response_cost %s is negative; write what the response costs as a positive amount", v)
			}
			rs.Cost = v
		}
		if rpText != "" {
			rs.P = r.probability(rec, "residual_probability")
		}
		if hasResidual {
			rs.Impact = residual
		}
		k.Response = rs
	}
	for i, name := range r.names {
		n := normalColumn(name)
		if _, known := r.col[n]; known && r.col[n] == i || resultColumn.MatchString(n) {
			continue
		}
		k.Fields = append(k.Fields, Field{Name: name, Value: rec[i]})
	}
	return k
}

// probability reads a probability cell.
func (r *csvReader) probability(rec []string, name string) decimal.Decimal {
	text, col, _ := r.cell(rec, name)
	if text == "" {
		r.fail(r.line, col, "%s is empty; write it as 30%% or 0.3", name)
		return decimal.Zero
	}
	v, pct, msg := parseNumber(text, true)
	switch {
	case msg != "":
		r.fail(r.line, col, "%s %s", name, msg)
	case v.Sign() < 0:
		r.fail(r.line, col, "%s %s is negative; a probability lies between 0%% and 100%%", name, strings.TrimSpace(text))
	case v.GreaterThan(decimal.NewFromInt(1)) && pct:
		r.fail(r.line, col, "%s %s is above 100%%", name, strings.TrimSpace(text))
	case v.GreaterThan(decimal.NewFromInt(1)):
		r.fail(r.line, col, "%s %s is above 1; write %s%% for a percentage, or a decimal such as 0.3", name, strings.TrimSpace(text), strings.TrimSpace(text))
	}
	return v
}

// threePoint reads the LOW, LIKELY and HIGH columns with the given prefix
// (and its distribution column). ok is false when all three are empty;
// required says that is an error.
func (r *csvReader) threePoint(rec []string, prefix, what string, required bool) (Amount, bool) {
	lo, loCol, _ := r.cell(rec, prefix+"low")
	ml, mlCol, _ := r.cell(rec, prefix+"likely")
	hi, hiCol, _ := r.cell(rec, prefix+"high")
	shape, shapeCol, hasShape := r.cell(rec, prefix+"distribution")
	if !hasShape && prefix != "" {
		// The impact's distribution applies to its residual and schedule
		// figures when they have none of their own.
		shape, shapeCol, _ = r.cell(rec, "distribution")
	}
	shape = strings.ToLower(shape)
	if lo == "" && ml == "" && hi == "" {
		if required { // the impact's columns are required: loCol is there
			r.fail(r.line, loCol, "%s is empty: give low, likely and high, or likely alone for a fixed figure", what)
		}
		return Amount{}, false
	}
	num := func(text string, col int, name string) (decimal.Decimal, bool) {
		v, _, msg := parseNumber(text, false)
		if msg != "" {
			r.fail(r.line, col, "%s %s", prefix+name, msg)
			return v, false
		}
		return v, true
	}
	switch shape {
	case "", "pert", "triangular", "uniform":
	default:
		r.fail(r.line, shapeCol, "the distribution %q is none of pert, triangular or uniform", short(shape))
		return Amount{}, true
	}
	if shape == "" {
		shape = "pert"
	}
	if shape == "uniform" {
		if lo == "" || hi == "" {
			col := loCol
			if lo != "" {
				col = hiCol
			}
			r.fail(r.line, max(col, loCol, hiCol, mlCol), "a uniform distribution needs %slow and %shigh", prefix, prefix)
			return Amount{}, true
		}
		if ml != "" {
			r.fail(r.line, mlCol, "a uniform distribution has no likely figure; leave %slikely empty", prefix)
			return Amount{}, true
		}
		a, ok1 := num(lo, loCol, "low")
		b, ok2 := num(hi, hiCol, "high")
		if !ok1 || !ok2 {
			return Amount{}, true
		}
		if a.GreaterThan(b) {
			r.fail(r.line, loCol, "%slow %s is above %shigh %s", prefix, a, prefix, b)
			return Amount{}, true
		}
		amt, err := Written("uniform", a, b)
		if err != nil {
			r.fail(r.line, loCol, "%s: %v", what, err)
		}
		return amt, true
	}
	if lo == "" && hi == "" {
		v, ok := num(ml, mlCol, "likely")
		if !ok {
			return Amount{}, true
		}
		return FixedAmount(v), true
	}
	// A figure left out: its cell empty, or its column missing from the
	// sheet (the message then says so, at a column of the three that is
	// there).
	anchor := max(loCol, mlCol, hiCol)
	missing := func(name string, col int, msg string) {
		if col == 0 {
			r.fail(r.line, anchor, "the sheet has no %s%s column; give %slow, %slikely and %shigh", prefix, name, prefix, prefix, prefix)
			return
		}
		r.fail(r.line, col, "%s%s is empty; %s", prefix, name, msg)
	}
	switch {
	case ml == "":
		missing("likely", mlCol, "give the most likely figure between low and high")
		return Amount{}, true
	case lo == "":
		missing("low", loCol, "give the lowest figure, or leave low and high empty for a fixed one")
		return Amount{}, true
	case hi == "":
		missing("high", hiCol, "give the highest figure, or leave low and high empty for a fixed one")
		return Amount{}, true
	}
	a, ok1 := num(lo, loCol, "low")
	m, ok2 := num(ml, mlCol, "likely")
	b, ok3 := num(hi, hiCol, "high")
	if !ok1 || !ok2 || !ok3 {
		return Amount{}, true
	}
	switch {
	case a.GreaterThan(b):
		r.fail(r.line, loCol, "%slow %s is above %shigh %s", prefix, a, prefix, b)
		return Amount{}, true
	case m.LessThan(a) || m.GreaterThan(b):
		r.fail(r.line, mlCol, "%slikely %s lies outside %slow .. %shigh (%s .. %s)", prefix, m, prefix, prefix, a, b)
		return Amount{}, true
	case a.Equal(b):
		return FixedAmount(a), true
	}
	amt, err := Written(shape, a, m, b)
	if err != nil {
		r.fail(r.line, loCol, "%s: %v", what, err)
	}
	return amt, true
}
