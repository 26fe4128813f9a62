package batch

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"hash"
	"strconv"
	"strings"
)

// MetaPrefix starts the header record of a results file.
const MetaPrefix = "# ergostock results v"

// MetaFormat is the format version of the results file written now. Files
// of version 1 (before the header record) have no header record.
const MetaFormat = 2

// Meta is the header record of a results file: the comment line before
// the CSV header that says what the rows were computed from, e.g.
//
//	# ergostock results v2; period=week; run=5d0c1a2b3e4f5a6b; items=0a1b2c3d4e5f6a7b; history=8c9d0e1f2a3b4c5d; max_states=5000000; shard=0/1; version=0.1.0; item_count=196; costs=per week
//
// period is the planning period: every figure is a long-run average per
// period, and costs= says so in words (costs are money per period).
// Fields are "key=value" separated by "; "; no value holds a comma, so the
// line is one cell in a spreadsheet. Digests are the first 16 hex digits
// (64 bits) of SHA-256: items and history of those files' bytes ("none"
// without a history file); run of everything that shapes the figures (the
// format, period, items and history digests, max_states and the program
// version), so the parts of one catalogue run over shards share one run
// digest and parts of different runs do not. Readers ignore keys they do
// not know, so later versions may add some.
type Meta struct {
	Format    int
	Period    string // day, week or month
	Run       string
	Items     string
	History   string
	MaxStates int
	Shard     Shard
	Version   string
	// ItemCount is the number of items (data rows) of the whole items
	// file, in every shard's record (item_count=; 0 means not recorded),
	// so that a merge can tell a complete set of parts.
	ItemCount int
	// Cells is how the cells were written; the keys decimal= and digits=
	// appear only when they differ from the plain form (decimal point,
	// full precision), so plain files keep their header record.
	Cells Format
	// Uncertainty describes the resampling of a run with --uncertainty
	// (e.g. "iid,resamples=200,seed=1"); "" for a plain run, whose record
	// and run digest then stay as they were.
	Uncertainty string
	// Reading is a digest of the reader options that change what is read
	// from the inputs (decimal mark, date layout, column maps, returns,
	// quantity scale, encoding, sheets) when any differs from its default,
	// so that parts read differently never share a run digest; "" for a
	// run read with the defaults, whose record and digest stay as they
	// were. Unit is the unit the quantities count in when the history was
	// scaled (--quantity-scale 10: "0.1"), else "".
	Reading, Unit string
	// ReviewPeriod and LeadTimeModel are the defaults the run gave the
	// items without a review_period or lead_time_model cell (batch
	// --review-period, --lead-time-model), recorded (review_period=,
	// lead_time_model=) and folded into the run digest only when they
	// differ from review every period and sequential deliveries, so that a
	// plain run's record and digest stay as they were; 0 and "" mean those.
	ReviewPeriod  int
	LeadTimeModel string
	// Decisions is the digest of the decisions file a run took the
	// policies in use from (batch --decisions), recorded (decisions=) and
	// folded into the run digest only then: the decisions change
	// current_total_cost and saving. "" for a run without one.
	Decisions string
}

// NewDigest returns the hash whose sum DigestSum prints.
func NewDigest() hash.Hash { return sha256.New() }

// DigestSum prints the digest of h as in the header record.
func DigestSum(h hash.Hash) string { return hex.EncodeToString(h.Sum(nil))[:16] }

// RunDigest computes m's run digest from its other fields.
func (m Meta) RunDigest() string {
	h := NewDigest()
	fmt.Fprintf(h, "ergostock results v%d\nperiod=%s\nitems=%s\nhistory=%s\nmax_states=%d\nversion=%s\n",
		m.Format, m.Period, m.Items, m.History, m.MaxStates, m.Version)
	if m.Uncertainty != "" {
		fmt.Fprintf(h, "uncertainty=%s\n", m.Uncertainty)
	}
	if m.Reading != "" {
		fmt.Fprintf(h, "reading=%s\nunit=%s\n", m.Reading, m.Unit)
	}
	if m.ReviewPeriod > 1 {
		fmt.Fprintf(h, "review_period=%d\n", m.ReviewPeriod)
	}
	if m.LeadTimeModel != "" {
		fmt.Fprintf(h, "lead_time_model=%s\n", m.LeadTimeModel)
	}
	if m.Decisions != "" {
		fmt.Fprintf(h, "decisions=%s\n", m.Decisions)
	}
	return DigestSum(h)
}

// String prints the header record (without a line end).
func (m Meta) String() string {
	s := fmt.Sprintf("%s%d; period=%s; run=%s; items=%s; history=%s; max_states=%d; shard=%s; version=%s",
		MetaPrefix, m.Format, m.Period, m.Run, m.Items, m.History, m.MaxStates, m.Shard, m.Version)
	if m.Uncertainty != "" {
		s += "; uncertainty=" + m.Uncertainty
	}
	if m.ItemCount > 0 {
		s += fmt.Sprintf("; item_count=%d", m.ItemCount)
	}
	if m.Reading != "" {
		s += "; reading=" + m.Reading
	}
	if m.Unit != "" {
		s += "; unit=" + m.Unit
	}
	if m.ReviewPeriod > 1 {
		s += fmt.Sprintf("; review_period=%d", m.ReviewPeriod)
	}
	if m.LeadTimeModel != "" {
		s += "; lead_time_model=" + m.LeadTimeModel
	}
	if m.Decisions != "" {
		s += "; decisions=" + m.Decisions
	}
	s += "; costs=per " + m.Period
	if m.Cells.decimal() == ',' {
		s += "; decimal=comma"
	}
	if m.Cells.Digits > 0 {
		s += fmt.Sprintf("; digits=%d", m.Cells.Digits)
	}
	return s
}

// ParseMeta reads a header record written by Meta.String; name and line
// are used in errors. It refuses a line that is not one and a format
// version it does not know.
func ParseMeta(s, name string, line int) (*Meta, error) {
	s = strings.TrimRight(s, "\r\n")
	rest, ok := strings.CutPrefix(s, MetaPrefix)
	if !ok {
		return nil, fmt.Errorf("%s:%d: header record %q: want a line starting %q", name, line, s, MetaPrefix)
	}
	fields := strings.Split(rest, ";")
	v, err := strconv.Atoi(strings.TrimSpace(fields[0]))
	if err != nil || v < 2 {
		return nil, fmt.Errorf("%s:%d: header record %q: want format version 2 or later", name, line, s)
	}
	if v > MetaFormat {
		return nil, fmt.Errorf("%s:%d: results format v%d: this ergostock reads up to v%d; use a newer version", name, line, v, MetaFormat)
	}
	m := &Meta{Format: v}
	for _, f := range fields[1:] {
		k, val, ok := strings.Cut(strings.TrimSpace(f), "=")
		if !ok {
			continue
		}
		switch k {
		case "period":
			m.Period = val
		case "run":
			m.Run = val
		case "items":
			m.Items = val
		case "history":
			m.History = val
		case "max_states":
			m.MaxStates, _ = strconv.Atoi(val)
		case "shard":
			if sh, err := ParseShard(val); err == nil {
				m.Shard = sh
			}
		case "version":
			m.Version = val
		case "item_count":
			if n, err := strconv.Atoi(val); err == nil && n > 0 {
				m.ItemCount = n
			}
		case "decimal":
			if val == "comma" {
				m.Cells.Decimal = ','
			}
		case "digits":
			if d, err := strconv.Atoi(val); err == nil && d > 0 && d <= MaxDigits {
				m.Cells.Digits = d
			}
		case "uncertainty":
			m.Uncertainty = val
		case "reading":
			m.Reading = val
		case "unit":
			m.Unit = val
		case "review_period":
			if r, err := strconv.Atoi(val); err == nil && r > 1 {
				m.ReviewPeriod = r
			}
		case "lead_time_model":
			m.LeadTimeModel = val
		case "decisions":
			m.Decisions = val
		}
	}
	if m.Period == "" || m.Items == "" {
		return nil, fmt.Errorf("%s:%d: header record %q: want period= and items= fields", name, line, s)
	}
	return m, nil
}
