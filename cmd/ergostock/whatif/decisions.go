package whatif

import (
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"net/http"
	"os"
	"strings"
	"sync"
	"time"

	"ergostock/inventory"
	"ergostock/policies"
	"ergostock/policies/batch"
)

// store keeps the decisions file. Every decision rewrites the whole log
// through batch.CreateAtomic, whose lock file also keeps out a second
// server or a batch run writing the same file; the log is read again under
// that lock, so a decision another process wrote in between is neither
// lost nor silently overwritten.
type store struct {
	path string
	mu   sync.Mutex
	last map[string]batch.Decision // latest decision per planning key, as last read
	now  func() time.Time
	// location: the log has a location column (a run by location).
	location bool
}

func openStore(path string, location bool) (*store, error) {
	s := &store{path: path, last: map[string]batch.Decision{}, now: time.Now, location: location}
	if path == "" {
		return s, nil
	}
	log, err := readDecisionLog(path)
	if err != nil {
		return nil, err
	}
	if err := batch.CheckDecisionsLocation(log, location, path); err != nil {
		return nil, err
	}
	ds := log.Decisions
	s.last = batch.LatestDecisions(ds)
	return s, nil
}

// readDecisions reads the log at path; a missing file has no decisions.
func readDecisions(path string) ([]batch.Decision, error) {
	log, err := readDecisionLog(path)
	if err != nil {
		return nil, err
	}
	return log.Decisions, nil
}

// readDecisionLog reads the log at path with its shape; a missing file
// is an empty log.
func readDecisionLog(path string) (*batch.DecisionLog, error) {
	f, err := os.Open(path)
	if errors.Is(err, fs.ErrNotExist) {
		return &batch.DecisionLog{}, nil
	}
	if err != nil {
		return nil, fmt.Errorf("--decisions: %w", err)
	}
	defer f.Close()
	return batch.ReadDecisionLog(f, path)
}

func (s *store) latest(sku string) (batch.Decision, bool) {
	s.mu.Lock()
	defer s.mu.Unlock()
	d, ok := s.last[sku]
	return d, ok
}

func (s *store) latestAll() map[string]batch.Decision {
	s.mu.Lock()
	defer s.mu.Unlock()
	m := make(map[string]batch.Decision, len(s.last))
	for k, v := range s.last {
		m[k] = v
	}
	return m
}

// conflictError is a decision based on a version that is no longer the
// latest: 409.
type conflictError struct {
	sku, location string
	based, latest int
}

func (e *conflictError) Error() string {
	return fmt.Sprintf("%s: decision based on version %d, but version %d was recorded since (another tab or user); nothing was saved: reload the item to see it", itemName(e.sku, e.location), e.based, e.latest)
}

// record appends d as the next version of its SKU when the latest version
// recorded is basedOn, and returns it as saved.
func (s *store) record(d batch.Decision, basedOn int) (batch.Decision, error) {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.path == "" {
		return d, errors.New("no decisions file")
	}
	af, err := batch.CreateAtomic(s.path)
	if err != nil {
		var be *batch.BusyError
		if errors.As(err, &be) {
			return d, &requestError{status: http.StatusConflict, msg: "decisions file " + s.path + ": " + oneLine(err.Error())}
		}
		return d, fmt.Errorf("decisions file %s: %w", s.path, err)
	}
	defer af.Abort()
	ds, err := readDecisions(s.path)
	if err != nil {
		return d, err
	}
	latest := batch.LatestDecisions(ds)
	s.last = latest
	if v := latest[d.Key()].Version; v != basedOn {
		return d, &conflictError{sku: d.SKU, location: d.Location, based: basedOn, latest: v}
	}
	d.Version = basedOn + 1
	d.At = s.now().UTC().Truncate(time.Second)
	ds = append(ds, d)
	if err := batch.WriteDecisionsLocation(af, ds, s.location); err != nil {
		return d, fmt.Errorf("decisions file %s: %w", s.path, err)
	}
	if err := af.Commit(); err != nil {
		return d, fmt.Errorf("decisions file %s: %w", s.path, err)
	}
	s.last[d.Key()] = d
	return d, nil
}

// DecisionJSON is a decision as the API gives it.
type DecisionJSON struct {
	SKU       string             `json:"sku"`
	Location  string             `json:"location,omitempty"`
	Version   int                `json:"version"`
	Decision  batch.DecisionKind `json:"decision"`
	Policy    *PolicyJSON        `json:"policy"`
	Note      string             `json:"note"`
	DecidedAt string             `json:"decided_at"`
}

func decisionJSON(d batch.Decision) *DecisionJSON {
	p := d.Policy
	return &DecisionJSON{SKU: d.SKU, Location: d.Location, Version: d.Version, Decision: d.Kind, Policy: policyJSON(&p),
		Note: d.Note, DecidedAt: d.At.UTC().Format(time.RFC3339)}
}

// decisions is GET /api/decisions: the latest decision of every SKU, in
// the catalogue's order.
func (s *Server) decisions(w http.ResponseWriter, r *http.Request) {
	latest := s.store.latestAll()
	out := []*DecisionJSON{}
	for _, e := range s.cfg.Catalogue.entries {
		if d, ok := latest[e.key()]; ok {
			out = append(out, decisionJSON(d))
		}
	}
	writeJSON(w, http.StatusOK, map[string]any{"file": s.store.path, "decisions": out})
}

// decisionRequest is the body of POST /api/decisions. Version is the
// version of the SKU's latest decision the page showed (0: none).
type decisionRequest struct {
	SKU           string `json:"sku"`
	Location      string `json:"location"`
	Decision      string `json:"decision"`
	Version       *int   `json:"version"`
	Note          string `json:"note"`
	Policy        string `json:"policy"`
	ReorderPoint  *int   `json:"reorder_point"`
	OrderUpTo     *int   `json:"order_up_to"`
	OrderMultiple *int   `json:"order_multiple"`
}

// maxNote is the longest note kept, in bytes.
const maxNote = 2000

// decide is POST /api/decisions.
func (s *Server) decide(w http.ResponseWriter, r *http.Request) {
	d, based, err := s.parseDecision(r.Body)
	if err != nil {
		s.failErr(w, r, "decision", err)
		return
	}
	saved, err := s.store.record(d, based)
	if err != nil {
		s.failErr(w, r, "decision", err)
		return
	}
	writeJSON(w, http.StatusOK, decisionJSON(saved))
}

func (s *Server) parseDecision(body io.Reader) (batch.Decision, int, error) {
	var d batch.Decision
	obj, err := decodeObject(body)
	if err != nil {
		return d, 0, err
	}
	known := map[string]bool{"sku": true, "location": true, "decision": true, "version": true, "note": true, "policy": true,
		"reorder_point": true, "order_up_to": true, "order_multiple": true}
	for k := range obj {
		if !known[k] {
			return d, 0, badRequest("decision: unknown field %q: want sku, (location,) decision, version, note and for an override policy, reorder_point, order_up_to, order_multiple", k)
		}
	}
	var req decisionRequest
	for k, raw := range obj {
		var err error
		switch k {
		case "sku":
			err = jsonInto(raw, &req.SKU)
		case "location":
			err = jsonInto(raw, &req.Location)
		case "decision":
			err = jsonInto(raw, &req.Decision)
		case "version":
			err = jsonInto(raw, &req.Version)
		case "note":
			err = jsonInto(raw, &req.Note)
		case "policy":
			err = jsonInto(raw, &req.Policy)
		case "reorder_point":
			err = jsonInto(raw, &req.ReorderPoint)
		case "order_up_to":
			err = jsonInto(raw, &req.OrderUpTo)
		case "order_multiple":
			err = jsonInto(raw, &req.OrderMultiple)
		}
		if err != nil {
			return d, 0, badRequest("decision: %s %s: %v", k, short(string(raw)), err)
		}
	}
	e, ok := s.cfg.Catalogue.bySKU[batch.PlanKey(req.SKU, req.Location)]
	if !ok {
		if s.cfg.Catalogue.ByLocation {
			return d, 0, badRequest("decision: %s: want a SKU and location of the results file", itemName(req.SKU, req.Location))
		}
		return d, 0, badRequest("decision: sku %q: want a SKU of the results file", req.SKU)
	}
	kind, ok := batch.ParseDecisionKind(req.Decision)
	if !ok {
		return d, 0, badRequest("decision: decision %q: want accept, keep or override", req.Decision)
	}
	if req.Version == nil || *req.Version < 0 {
		return d, 0, badRequest("decision: version: want the version of the latest decision the page showed (0 for none)")
	}
	if len(req.Note) > maxNote || strings.ContainsAny(req.Note, "\x00") {
		return d, 0, badRequest("decision: note: want at most %d bytes of text", maxNote)
	}
	d = batch.Decision{SKU: req.SKU, Location: req.Location, Kind: kind, Note: strings.TrimSpace(oneLine(req.Note))}
	switch kind {
	case batch.Accept:
		if e.rec == nil {
			return d, 0, badRequest("decision: %s has no recommendation to accept (its row failed: %s)", itemName(req.SKU, req.Location), e.Error)
		}
		d.Policy = *e.rec
	case batch.Keep:
		if e.current == nil {
			return d, 0, badRequest("decision: %s has no policy in use to keep (the items file gives no current_* levels)", itemName(req.SKU, req.Location))
		}
		d.Policy = *e.current
	case batch.Override:
		p, err := overridePolicy(req, e.mode)
		if err != nil {
			return d, 0, err
		}
		d.Policy = p
	}
	return d, *req.Version, nil
}

func jsonInto(raw []byte, dst any) error {
	if err := json.Unmarshal(raw, dst); err != nil {
		return errors.New("want " + map[bool]string{true: "a whole number", false: "a string"}[isIntPtr(dst)])
	}
	return nil
}

func isIntPtr(dst any) bool {
	_, ok := dst.(**int)
	return ok
}

// overridePolicy reads an override's levels like evaluate reads its
// flags: order_up_to alone is base-stock; with reorder_point s-S;
// reorder_point with order_multiple s-nQ.
func overridePolicy(req decisionRequest, mode inventory.Mode) (policies.Policy, error) {
	var p policies.Policy
	s, S, q := req.ReorderPoint, req.OrderUpTo, req.OrderMultiple
	switch {
	case S != nil && q != nil:
		return p, badRequest("decision: order_up_to and order_multiple: give one of them, not both")
	case S != nil && s == nil:
		p = policies.Policy{Kind: policies.BaseStock, OrderUpTo: *S}
	case S != nil:
		p = policies.Policy{Kind: policies.SS, ReorderPoint: *s, OrderUpTo: *S}
	case q != nil && s != nil:
		p = policies.Policy{Kind: policies.SNQ, ReorderPoint: *s, OrderMultiple: *q}
	default:
		return p, badRequest("decision: an override needs order_up_to, or reorder_point with order_up_to or order_multiple")
	}
	if req.Policy != "" && !strings.EqualFold(req.Policy, string(p.Kind)) {
		return p, badRequest("decision: policy %q: the levels given make a %s policy", req.Policy, p.Kind)
	}
	if err := p.Validate(mode); err != nil {
		var fe *inventory.FieldError
		if errors.As(err, &fe) {
			return p, badRequest("decision: %s %s: want %s", fe.Field, fe.Value, fe.Want)
		}
		return p, badRequest("decision: policy: %v", err)
	}
	return p, nil
}
