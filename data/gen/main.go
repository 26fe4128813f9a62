// Command gen writes the demo data set: two years of daily issues from the
// spare-parts stores of Brackwater Valley Tramways, an invented light-rail
// operator with two depots, and the items file with each part's costs,
// lead time and current replenishment policy.
//
// Run it from the module root:
//
//	go run ./data/gen
//
// It writes data/history.csv and data/items.csv, a catalogue in which every
// item can be planned, data/receipts.csv, goods receipts of some of its parts
// (see receipts.go), and data/messy/, a small example of items that
// cannot (a part listed before any issue, one whose history holds a
// malformed row, one never issued) beside two that can. The output is a
// pure function of the fixed seed below, so running it again reproduces
// the checked-in files byte for byte.
package main

import (
	"bufio"
	"flag"
	"fmt"
	"log"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"time"
)

// The seed of the demo data.
const seed1, seed2 = 20241202, 20261129

// The history runs over 104 ISO weeks, Monday 2024-12-02 (2024-W49) to
// Sunday 2026-11-29 (2026-W48).
var (
	firstDay = time.Date(2024, 12, 2, 0, 0, 0, 0, time.UTC)
	days     = 728
)

var depots = []string{"harrow-lane", "millbeck"}

// class is how a part's demand arises.
type class int

const (
	smooth       class = iota // consumables issued nearly every day
	erratic                   // issued most weeks, in very uneven quantities
	intermittent              // spares issued a unit or two at a time, now and then
	lumpy                     // spares issued rarely, in large and uneven lots
)

// family is a group of parts that share a demand class and cost ranges.
type family struct {
	prefix   string
	variants []string
	class    class
	cost     [2]float64 // unit cost range
	critical bool       // a tram cannot run without it
}

var families = []family{
	// Consumables.
	{"WIPE-CAB", []string{"100"}, smooth, [2]float64{4, 6}, false},
	{"GLOVE-NITRILE", []string{"S", "M", "L", "XL"}, smooth, [2]float64{7, 9}, false},
	{"FLANGE-LUB", []string{"1L", "5L"}, smooth, [2]float64{11, 48}, false},
	{"SCREENWASH", []string{"5L"}, smooth, [2]float64{6, 8}, false},
	{"SAND-DRY", []string{"25KG"}, smooth, [2]float64{9, 12}, false},
	{"GREASE-EP2", []string{"400G"}, smooth, [2]float64{5, 7}, false},
	{"CABLE-TIE", []string{"200", "300", "450"}, smooth, [2]float64{3, 6}, false},
	{"FUSE", []string{"5A", "10A", "16A", "32A", "63A"}, smooth, [2]float64{1, 4}, false},
	{"LAMP-SALOON-LED", []string{"T3", "T4"}, smooth, [2]float64{14, 22}, false},
	{"HVAC-FILTER", []string{"T3", "T4"}, smooth, [2]float64{18, 30}, false},
	{"WIPER-BLADE", []string{"T3", "T4"}, smooth, [2]float64{12, 19}, false},
	{"BATTERY-AA", []string{"PACK4"}, smooth, [2]float64{3, 4}, false},
	{"GRAFFITI-REMOVER", []string{"1L"}, smooth, [2]float64{9, 13}, false},
	{"ABSORB-PAD", []string{"50"}, smooth, [2]float64{20, 28}, false},
	{"TAPE-ISO", []string{"19MM"}, smooth, [2]float64{1, 2}, false},
	{"DEGREASER", []string{"5L"}, smooth, [2]float64{14, 18}, false},
	{"HAND-SOAP", []string{"1L"}, smooth, [2]float64{3, 5}, false},
	{"PAPER-TOWEL", []string{"ROLL"}, smooth, [2]float64{2, 3}, false},
	{"HIVIS-VEST", []string{"M", "L", "XL"}, smooth, [2]float64{4, 6}, false},
	{"CONTACT-CLEANER", []string{"400ML"}, smooth, [2]float64{6, 9}, false},
	{"TICKET-ROLL", []string{"80MM"}, smooth, [2]float64{1, 2}, false},
	{"FIRST-AID-REFILL", []string{"KIT"}, smooth, [2]float64{12, 16}, false},
	{"DE-ICER", []string{"5L"}, smooth, [2]float64{8, 11}, false},
	{"RAG-COTTON", []string{"10KG"}, smooth, [2]float64{15, 19}, false},
	{"MARKER-PAINT", []string{"WHITE", "YELLOW"}, smooth, [2]float64{5, 7}, false},
	{"BIN-LINER", []string{"ROLL"}, smooth, [2]float64{2, 4}, false},
	{"CLOTH-MICROFIBRE", []string{"10"}, smooth, [2]float64{6, 9}, false},
	{"SEALANT-MS", []string{"290ML"}, smooth, [2]float64{7, 10}, false},
	{"CABLE-LUG", []string{"6MM", "10MM", "16MM"}, smooth, [2]float64{0.3, 0.8}, false},
	{"HEAT-SHRINK", []string{"6MM", "12MM"}, smooth, [2]float64{1, 2}, false},
	// Fasteners, brake wear parts and seals: issued in uneven lots.
	{"BRAKE-PAD", []string{"T3-FRONT", "T3-REAR", "T4-FRONT", "T4-REAR"}, erratic, [2]float64{60, 95}, true},
	{"BRAKE-SHOE", []string{"T2"}, erratic, [2]float64{40, 55}, true},
	{"BOLT-M10", []string{"25", "40", "60"}, erratic, [2]float64{0.4, 0.9}, false},
	{"BOLT-M12", []string{"40", "60"}, erratic, [2]float64{0.6, 1.2}, false},
	{"NUT-NYLOC", []string{"M10", "M12"}, erratic, [2]float64{0.2, 0.4}, false},
	{"WASHER", []string{"M10", "M12"}, erratic, [2]float64{0.1, 0.2}, false},
	{"RIVET", []string{"4.8X12", "6.4X16"}, erratic, [2]float64{0.1, 0.3}, false},
	{"DOOR-SEAL", []string{"T3", "T4"}, erratic, [2]float64{25, 40}, false},
	{"SANDER-HOSE", []string{"T3", "T4"}, erratic, [2]float64{30, 45}, false},
	{"WINDOW-FILM", []string{"SIDE", "CAB"}, erratic, [2]float64{15, 35}, false},
	{"GRAB-HANDLE-COVER", []string{"GREY"}, erratic, [2]float64{5, 8}, false},
	{"FLOOR-NOSING", []string{"T3", "T4"}, erratic, [2]float64{22, 30}, false},
	{"LABEL-SAFETY", []string{"DOOR", "EXIT", "PRIORITY"}, erratic, [2]float64{1, 3}, false},
	{"SPLIT-PIN", []string{"3X25", "4X32"}, erratic, [2]float64{0.1, 0.2}, false},
	{"HOSE-CLIP", []string{"20-32", "32-50"}, erratic, [2]float64{0.5, 0.9}, false},
	{"PIPE-INSULATION", []string{"22MM"}, erratic, [2]float64{3, 5}, false},
	{"O-RING-KIT", []string{"HYDRAULIC", "PNEUMATIC"}, erratic, [2]float64{18, 26}, false},
	// Spares: a unit or two now and then.
	{"DOOR-SENSOR", []string{"T3-IR", "T3-EDGE", "T4-IR", "T4-EDGE"}, intermittent, [2]float64{120, 260}, true},
	{"PANTO-CARBON", []string{"T3", "T4"}, intermittent, [2]float64{180, 240}, true},
	{"PANTO-HORN", []string{"T3", "T4"}, intermittent, [2]float64{70, 110}, true},
	{"LED-DEST-DISPLAY", []string{"T3-FRONT", "T3-SIDE", "T3-REAR", "T4-FRONT", "T4-SIDE", "T4-REAR"}, intermittent, [2]float64{650, 1400}, false},
	{"MIRROR-CAMERA", []string{"T4-LEFT", "T4-RIGHT"}, intermittent, [2]float64{900, 1300}, true},
	{"CAB-SEAT-CUSHION", []string{"T3", "T4"}, intermittent, [2]float64{85, 130}, false},
	{"HORN-ASSY", []string{"T3", "T4"}, intermittent, [2]float64{140, 190}, true},
	{"WIPER-MOTOR", []string{"T3", "T4"}, intermittent, [2]float64{310, 420}, true},
	{"HVAC-FAN", []string{"T3", "T4"}, intermittent, [2]float64{260, 380}, false},
	{"COUPLER-HEAD", []string{"T3", "T4"}, intermittent, [2]float64{2100, 2900}, true},
	{"DAMPER-PRIMARY", []string{"T3", "T4"}, intermittent, [2]float64{380, 520}, true},
	{"DAMPER-SECONDARY", []string{"T3", "T4"}, intermittent, [2]float64{420, 610}, true},
	{"WHEEL-SENSOR", []string{"T3", "T4"}, intermittent, [2]float64{240, 330}, true},
	{"PA-SPEAKER", []string{"SALOON"}, intermittent, [2]float64{60, 90}, false},
	{"PASSENGER-BUTTON", []string{"DOOR", "STOP"}, intermittent, [2]float64{35, 55}, false},
	{"TICKET-VALIDATOR", []string{"V2"}, intermittent, [2]float64{780, 950}, false},
	{"CCTV-CAMERA", []string{"SALOON", "CAB"}, intermittent, [2]float64{240, 400}, false},
	{"TRACTION-FUSE", []string{"T3", "T4"}, intermittent, [2]float64{95, 150}, true},
	{"BATTERY-24V", []string{"T3", "T4"}, intermittent, [2]float64{520, 700}, true},
	{"BRAKE-CALIPER", []string{"T3", "T4"}, intermittent, [2]float64{1200, 1650}, true},
	{"TRACK-BRAKE-MAGNET", []string{"T3", "T4"}, intermittent, [2]float64{1800, 2400}, true},
	{"DOOR-MOTOR", []string{"T3", "T4"}, intermittent, [2]float64{640, 880}, true},
	{"DOOR-CONTROL-BOARD", []string{"T3", "T4"}, intermittent, [2]float64{980, 1250}, true},
	{"RADIO-HANDSET", []string{"CAB"}, intermittent, [2]float64{310, 380}, false},
	{"SPEEDO-UNIT", []string{"T3", "T4"}, intermittent, [2]float64{700, 900}, true},
	{"INTERIOR-LIGHT-DRIVER", []string{"T3", "T4"}, intermittent, [2]float64{110, 160}, false},
	{"SANDER-VALVE", []string{"T3", "T4"}, intermittent, [2]float64{190, 260}, true},
	{"CABLE-FLEX", []string{"2.5MM"}, intermittent, [2]float64{2, 3}, false},
	{"RELAY-24V", []string{"2P", "4P"}, intermittent, [2]float64{28, 45}, true},
	{"CIRCUIT-BREAKER", []string{"6A", "10A", "16A"}, intermittent, [2]float64{22, 40}, true},
	{"PRESSURE-SWITCH", []string{"BRAKE"}, intermittent, [2]float64{150, 210}, true},
	{"COMPRESSOR-FILTER", []string{"T3", "T4"}, intermittent, [2]float64{45, 70}, false},
	{"HYDRAULIC-HOSE", []string{"BRAKE-T3", "BRAKE-T4"}, intermittent, [2]float64{85, 120}, true},
	{"PANTO-SPRING", []string{"T3", "T4"}, intermittent, [2]float64{60, 90}, true},
	{"HVAC-CONTROLLER", []string{"T3", "T4"}, intermittent, [2]float64{850, 1100}, false},
	{"DRIVER-DISPLAY", []string{"T3", "T4"}, intermittent, [2]float64{1300, 1700}, true},
	{"DOOR-ROLLER", []string{"T3", "T4"}, intermittent, [2]float64{25, 40}, false},
	{"DOOR-LOCK", []string{"T3", "T4"}, intermittent, [2]float64{180, 240}, true},
	// Spares issued rarely and in big lots (overhaul campaigns, accidents).
	{"WHEEL-TYRE", []string{"T3", "T4"}, lumpy, [2]float64{850, 1200}, true},
	{"RESILIENT-RING", []string{"T3", "T4"}, lumpy, [2]float64{140, 210}, true},
	{"BOGIE-OVERHAUL-KIT", []string{"T3", "T4"}, lumpy, [2]float64{3200, 4100}, true},
	{"FLOOR-PANEL", []string{"T3", "T4"}, lumpy, [2]float64{260, 340}, false},
	{"GLAZING-SIDE", []string{"T3", "T4"}, lumpy, [2]float64{480, 700}, false},
	{"GLAZING-WINDSCREEN", []string{"T3", "T4"}, lumpy, [2]float64{2600, 3400}, true},
	{"SEAT-SHELL", []string{"T3", "T4"}, lumpy, [2]float64{95, 140}, false},
	{"SEAT-COVER", []string{"T3", "T4"}, lumpy, [2]float64{38, 55}, false},
	{"GRAB-POLE", []string{"VERTICAL", "HORIZONTAL"}, lumpy, [2]float64{45, 70}, false},
	{"BODY-PANEL-SKIRT", []string{"T3", "T4"}, lumpy, [2]float64{900, 1300}, false},
	{"COUPLER-COVER", []string{"T3", "T4"}, lumpy, [2]float64{160, 230}, false},
	{"GANGWAY-BELLOWS", []string{"T4"}, lumpy, [2]float64{4200, 5200}, true},
	{"HEADLIGHT-UNIT", []string{"T3", "T4"}, lumpy, [2]float64{380, 520}, true},
	{"ANTI-CLIMBER", []string{"T4"}, lumpy, [2]float64{1400, 1800}, false},
	{"MOTOR-BRUSH", []string{"SET"}, lumpy, [2]float64{210, 280}, true},
	{"FLOOR-LAMINATE", []string{"T3", "T4"}, lumpy, [2]float64{120, 170}, false},
	{"VINYL-WRAP", []string{"ROLL"}, lumpy, [2]float64{300, 420}, false},
	// The new T5 trams entered service in September 2026: short histories.
	{"T5-BRAKE-PAD", []string{"FRONT", "REAR"}, erratic, [2]float64{80, 110}, true},
	{"T5-DOOR-SENSOR", []string{"IR"}, intermittent, [2]float64{190, 260}, true},
	{"T5-WIPER-BLADE", []string{"CAB"}, smooth, [2]float64{16, 22}, false},
	{"T5-HVAC-FILTER", []string{"SALOON"}, smooth, [2]float64{24, 32}, false},
	{"T5-PANTO-CARBON", []string{"STRIP"}, intermittent, [2]float64{230, 290}, true},
}

// part is one SKU with its generated daily issues per depot.
type part struct {
	sku   string
	fam   family
	cost  float64
	start int        // first day with issues
	issue [][]int    // issue[depot][day]
	trend float64    // relative change of the rate over the two years
	note  string     // what is special about it
	extra [][]string // hand-made rows (sku, date, depot, quantity)
}

func main() {
	dir := flag.String("dir", "data", "directory to write history.csv, items.csv and receipts.csv into")
	flag.Parse()
	rng := rand.New(rand.NewPCG(seed1, seed2))
	parts := makeParts(rng)
	// The clean catalogue leaves out the broken parts' faults; the messy
	// example keeps them, beside two ordinary parts.
	clean := func(p *part) bool { return !messyOnly[p.sku] }
	messy := func(p *part) bool { return messyOnly[p.sku] || messyAlso[p.sku] }
	if err := writeHistory(filepath.Join(*dir, "history.csv"), parts, clean, false); err != nil {
		log.Fatal(err)
	}
	items, err := itemRows(parts, rng)
	if err != nil {
		log.Fatal(err)
	}
	if err := writeItems(filepath.Join(*dir, "items.csv"), items, clean); err != nil {
		log.Fatal(err)
	}
	if err := writeReceipts(filepath.Join(*dir, "receipts.csv"), items, clean); err != nil {
		log.Fatal(err)
	}
	messyDir := filepath.Join(*dir, "messy")
	if err := os.MkdirAll(messyDir, 0o755); err != nil {
		log.Fatal(err)
	}
	if err := writeHistory(filepath.Join(messyDir, "history.csv"), parts, messy, true); err != nil {
		log.Fatal(err)
	}
	if err := writeItems(filepath.Join(messyDir, "items.csv"), items, messy); err != nil {
		log.Fatal(err)
	}
}

// messyOnly are the parts that cannot be planned: they appear only in the
// messy example. messyAlso are ordinary parts shown beside them.
var (
	messyOnly = map[string]bool{"CABLE-FLEX-2.5MM": true, "DOOR-CONTROL-BOARD-T4": true, "T5-LED-DEST-DISPLAY-FRONT": true}
	messyAlso = map[string]bool{"WIPE-CAB-100": true, "BRAKE-PAD-T4-FRONT": true}
)

// itemRow is one line of an items file, with its part, its lead time in
// weeks and whether unmet demand is lost.
type itemRow struct {
	p    *part
	line string
	lead int
	lost bool
}

func uniform(rng *rand.Rand, r [2]float64) float64 { return r[0] + (r[1]-r[0])*rng.Float64() }

// poisson draws a Poisson variate by inversion (small means only).
func poisson(rng *rand.Rand, m float64) int {
	if m <= 0 {
		return 0
	}
	if m > 30 {
		return max(0, int(math.Round(m+math.Sqrt(m)*rng.NormFloat64())))
	}
	u := rng.Float64()
	p := math.Exp(-m)
	k, c := 0, p
	for u > c && k < 1000 {
		k++
		p *= m / float64(k)
		c += p
	}
	return k
}

func makeParts(rng *rand.Rand) []*part {
	var parts []*part
	for _, f := range families {
		for _, v := range f.variants {
			p := &part{sku: f.prefix + "-" + v, fam: f, cost: round2(uniform(rng, f.cost))}
			p.issue = make([][]int, len(depots))
			for d := range p.issue {
				p.issue[d] = make([]int, days)
			}
			switch {
			case len(f.prefix) > 3 && f.prefix[:3] == "T5-":
				// In service from a day in weeks 94..97: 7 to 10 weeks of history.
				p.start = 7 * (94 + rng.IntN(4))
				p.note = "new T5 part, short history"
			case p.sku == "TICKET-ROLL-80MM":
				p.trend = 1.5 // a new route with paper ticket sales
				p.note = "demand rising"
			case p.sku == "BRAKE-SHOE-T2":
				p.trend = -0.8 // the T2 trams are being withdrawn
				p.note = "demand falling"
			}
			generate(rng, p)
			parts = append(parts, p)
		}
	}
	for _, p := range parts {
		switch p.sku {
		case "CABLE-FLEX-2.5MM":
			// A storeman booked cable in metres instead of whole reels.
			p.extra = append(p.extra, []string{p.sku, day(500), depots[1], "2.5"})
			p.note = "one bad row (quantity 2.5)"
		case "DOOR-CONTROL-BOARD-T4":
			// Two issues, both reversed the same day: only zero rows.
			for d := range p.issue {
				clear(p.issue[d])
			}
			p.extra = append(p.extra, []string{p.sku, day(210), depots[0], "0"}, []string{p.sku, day(433), depots[1], "0"})
			p.note = "no demand in two years"
		}
	}
	return parts
}

// generate draws a part's daily issues at each depot.
func generate(rng *rand.Rand, p *part) {
	f := p.fam
	// Per-part rates, drawn once.
	var rate, size, spread float64
	switch f.class {
	case smooth:
		rate = 0.6 + 6*rng.Float64() // units per depot-day
	case erratic:
		rate = 0.25 + 0.2*rng.Float64() // issues per depot-day
		size = math.Log(2 + 10*rng.Float64())
		spread = 0.9 + 0.4*rng.Float64()
	case intermittent:
		rate = 0.008 + 0.03*rng.Float64()
	case lumpy:
		rate = 0.004 + 0.01*rng.Float64()
		size = math.Log(3 + 10*rng.Float64())
		spread = 1.0 + 0.3*rng.Float64()
	}
	pack := 1
	if f.prefix == "BOLT-M10" || f.prefix == "BOLT-M12" || f.prefix == "NUT-NYLOC" || f.prefix == "WASHER" || f.prefix == "RIVET" {
		pack = 10 // fasteners are issued in bags of ten
	}
	for d := range depots {
		share := 1.0
		if d == 1 {
			share = 0.6 // the smaller depot
		}
		for t := p.start; t < days; t++ {
			r := rate * share * (1 + p.trend*(float64(t)/float64(days)-0.5))
			if wd := (t % 7); wd >= 5 {
				r *= 0.4 // weekends: fewer trams in the workshops
			}
			var q int
			switch f.class {
			case smooth:
				q = poisson(rng, r)
			case erratic, lumpy:
				if rng.Float64() < r {
					q = pack * max(1, int(math.Round(math.Exp(size+spread*rng.NormFloat64())/float64(pack))))
				}
			case intermittent:
				if rng.Float64() < r {
					q = 1
					if rng.IntN(5) == 0 {
						q = 2
					}
				}
			}
			p.issue[d][t] = q
		}
	}
}

func day(t int) string { return firstDay.AddDate(0, 0, t).Format("2006-01-02") }

func round2(x float64) float64 { return math.Round(x*100) / 100 }

// writeHistory writes the issues of the parts that keep accepts; the
// hand-made rows only when withExtra is set. A part whose faults are kept
// out of the clean catalogue is left out of it whole.
func writeHistory(path string, all []*part, keep func(*part) bool, withExtra bool) error {
	var parts []*part
	for _, p := range all {
		if keep(p) {
			parts = append(parts, p)
		}
	}
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := bufio.NewWriter(f)
	fmt.Fprintln(w, "date,depot,sku,quantity")
	extra := map[string][][]string{}
	for _, p := range parts {
		if !withExtra {
			break
		}
		for _, e := range p.extra {
			extra[e[1]] = append(extra[e[1]], e)
		}
	}
	for t := 0; t < days; t++ {
		ds := day(t)
		for d, dep := range depots {
			for _, p := range parts {
				if q := p.issue[d][t]; q > 0 {
					fmt.Fprintf(w, "%s,%s,%s,%d\n", ds, dep, p.sku, q)
				}
			}
		}
		for _, e := range extra[ds] {
			fmt.Fprintf(w, "%s,%s,%s,%s\n", e[1], e[2], e[0], e[3])
		}
	}
	if err := w.Flush(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// weekly returns the mean and standard deviation of a part's weekly
// demand (both depots), over the weeks since its start.
func weekly(p *part) (mean, sd float64) {
	var ws []float64
	for w := p.start / 7; w < days/7; w++ {
		s := 0
		for d := range depots {
			for t := 7 * w; t < 7*w+7; t++ {
				s += p.issue[d][t]
			}
		}
		ws = append(ws, float64(s))
	}
	for _, x := range ws {
		mean += x
	}
	mean /= float64(len(ws))
	for _, x := range ws {
		sd += (x - mean) * (x - mean)
	}
	if len(ws) > 1 {
		sd = math.Sqrt(sd / float64(len(ws)-1))
	}
	return mean, sd
}

// recent returns the mean and standard deviation of the last n weeks.
func recent(p *part, n int) (mean, sd float64) {
	q := *p
	q.start = days - 7*n
	return weekly(&q)
}

func ftoa(x float64) string { return strconv.FormatFloat(x, 'f', -1, 64) }

// writeItems writes the items file: lead time in weeks, costs per week, and
// the policy the stores use today, set by a rule of thumb (cover the lead
// time plus a safety margin of z standard deviations, z drawn per part).
//
// itemRows draws every part's row in one pass, so that the draws of one
// part do not depend on which file it goes to.
func itemRows(parts []*part, rng *rand.Rand) ([]itemRow, error) {
	var out []itemRow
	rows := append([]*part{}, parts...)
	// A part listed for the new T5 trams that has not been issued yet.
	rows = append(rows, &part{sku: "T5-LED-DEST-DISPLAY-FRONT", fam: family{class: intermittent, critical: false}, cost: 1480, note: "newly listed, no history"})
	for _, p := range rows {
		f := p.fam
		var lead int
		switch f.class {
		case smooth:
			lead = 1 + rng.IntN(2)
		case erratic:
			lead = 1 + rng.IntN(4)
		default:
			lead = 2 + rng.IntN(11)
		}
		hold := math.Round(p.cost*0.25/52*10000) / 10000 // 25% a year, per week
		if hold == 0 {
			hold = 0.0001
		}
		short := round2(p.cost * (0.3 + 0.7*rng.Float64()))
		if f.critical {
			short = round2(150 + 250*rng.Float64() + 0.2*p.cost) // a tram held out of service
		}
		unmet, policy, minFill, demand := "", "", "", ""
		order := round2(25 + 95*rng.Float64())
		if f.class == smooth && rng.IntN(3) == 0 {
			order = 0 // on a vendor-managed contract: no cost per order
		}
		if f.class == smooth && !f.critical && rng.IntN(4) == 0 {
			unmet = "lost" // staff buy locally when the store is out
			short = round2(p.cost * (1.2 + rng.Float64()))
		}
		mult := 0
		switch {
		case f.prefix == "GLOVE-NITRILE" || f.prefix == "CABLE-TIE" || f.prefix == "FUSE":
			policy, mult = "s-nQ", []int{10, 20, 25}[rng.IntN(3)]
		case f.critical && (f.class == intermittent) && rng.IntN(3) == 0:
			policy = "base-stock"
			minFill = []string{"0.95", "0.98"}[rng.IntN(2)]
		case f.critical && rng.IntN(6) == 0:
			minFill = "0.95"
		}
		switch p.sku {
		case "T5-BRAKE-PAD-FRONT":
			demand = "poisson:mean=6" // the manufacturer's estimate for the new fleet
		case "TICKET-ROLL-80MM":
			// The planner's view of the current, higher level: the last
			// eight weeks.
			m, sd := recent(p, 8)
			demand = fmt.Sprintf("normal:mean=%g,sd=%g", math.Round(m), math.Max(1, math.Round(sd)))
		}
		var cur [3]string // reorder point, order-up-to, multiple
		if p.issue != nil {
			m, sd := weekly(p)
			z := 0.3 + 2.2*rng.Float64()
			s := int(math.Ceil(m*float64(lead+1) + z*sd*math.Sqrt(float64(lead+1))))
			q := max(1, int(math.Round(m*float64(2+rng.IntN(6)))))
			effective := policy
			if effective == "" {
				effective = "s-S"
				if order == 0 {
					effective = "base-stock"
				}
			}
			switch effective {
			case "base-stock":
				cur[1] = strconv.Itoa(s + 1)
			case "s-S":
				cur[0], cur[1] = strconv.Itoa(s), strconv.Itoa(s+q)
			case "s-nQ":
				cur[0], cur[2] = strconv.Itoa(s), strconv.Itoa(mult)
			}
			if rng.IntN(12) == 0 {
				cur = [3]string{} // no policy on record
			}
		}
		out = append(out, itemRow{p: p, lead: lead, lost: unmet == "lost", line: fmt.Sprintf("%s,%d,%s,%s,%s,%s,%s,%s,%s,%s,%s,%s,%s\n", p.sku, lead, ftoa(hold), ftoa(short), ftoa(order),
			ftoa(p.cost), unmet, policy, minFill, quote(demand), cur[0], cur[1], cur[2])})
	}
	return out, nil
}

// writeItems writes the items file with the rows whose part keep accepts.
func writeItems(path string, rows []itemRow, keep func(*part) bool) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := bufio.NewWriter(f)
	fmt.Fprintln(w, "sku,lead_time,holding_cost,shortage_cost,order_cost,unit_cost,unmet,policy,min_fill_rate,demand,current_reorder_point,current_order_up_to,current_order_multiple")
	for _, r := range rows {
		if keep(r.p) {
			w.WriteString(r.line)
		}
	}
	if err := w.Flush(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// quote wraps a field holding commas in double quotes (RFC 4180).
func quote(s string) string {
	for i := 0; i < len(s); i++ {
		if s[i] == ',' || s[i] == '"' {
			return strconv.Quote(s)
		}
	}
	return s
}
