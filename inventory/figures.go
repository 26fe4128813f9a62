package inventory

// Figures are the long-run averages per period that a policy delivers.
// The JSON names are part of the command-line contract.
type Figures struct {
	FillRate            float64 `json:"fill_rate"`
	StockoutProbability float64 `json:"stockout_probability"`
	MeanOnHand          float64 `json:"mean_on_hand"`
	MeanBackorders      float64 `json:"mean_backorders"`
	MeanLostSales       float64 `json:"mean_lost_sales"`
	OrderFrequency      float64 `json:"order_frequency"`
	MeanOrderQuantity   float64 `json:"mean_order_quantity"`
	HoldingCost         float64 `json:"holding_cost"`
	ShortageCost        float64 `json:"shortage_cost"`
	OrderingCost        float64 `json:"ordering_cost"`
	PurchaseCost        float64 `json:"purchase_cost"`
	TotalCost           float64 `json:"total_cost"`
}

// Field is one named figure with its unit, for printers that iterate.
type Field struct {
	Name  string // the JSON name
	Label string // a human label
	Unit  string // e.g. "units", "per period", "cost/period"
	Value float64
}

// Fields lists the figures in their fixed reporting order.
func (f Figures) Fields() []Field {
	return []Field{
		{"fill_rate", "fill rate", "fraction of demand", f.FillRate},
		{"stockout_probability", "stockout probability", "per period", f.StockoutProbability},
		{"mean_on_hand", "mean on hand", "units", f.MeanOnHand},
		{"mean_backorders", "mean backorders", "units", f.MeanBackorders},
		{"mean_lost_sales", "mean lost sales", "units/period", f.MeanLostSales},
		{"order_frequency", "order frequency", "orders/period", f.OrderFrequency},
		{"mean_order_quantity", "mean order quantity", "units/order", f.MeanOrderQuantity},
		{"holding_cost", "holding cost", "cost/period", f.HoldingCost},
		{"shortage_cost", "shortage cost", "cost/period", f.ShortageCost},
		{"ordering_cost", "ordering cost", "cost/period", f.OrderingCost},
		{"purchase_cost", "purchase cost", "cost/period", f.PurchaseCost},
		{"total_cost", "total cost", "cost/period", f.TotalCost},
	}
}

// FromFields builds Figures from values given in the order of Fields.
func FromFields(v []float64) Figures {
	var f Figures
	p := []*float64{&f.FillRate, &f.StockoutProbability, &f.MeanOnHand, &f.MeanBackorders,
		&f.MeanLostSales, &f.OrderFrequency, &f.MeanOrderQuantity, &f.HoldingCost,
		&f.ShortageCost, &f.OrderingCost, &f.PurchaseCost, &f.TotalCost}
	for i := range p {
		if i < len(v) {
			*p[i] = v[i]
		}
	}
	return f
}

// Price fills in the cost figures of f from its physical figures and the
// system's cost rates, with ordered the expected units ordered per period:
//
//	holding  = h * mean on hand
//	shortage = b * mean backorders (backorder mode) or b * mean lost sales (lost mode)
//	ordering = K * order frequency
//	purchase = c * ordered
//	total    = holding + shortage + ordering + purchase
func (f *Figures) Price(sys System, ordered float64) {
	f.HoldingCost = sys.Holding * f.MeanOnHand
	if sys.Mode == Lost {
		f.ShortageCost = sys.Shortage * f.MeanLostSales
	} else {
		f.ShortageCost = sys.Shortage * f.MeanBackorders
	}
	f.OrderingCost = sys.OrderCost * f.OrderFrequency
	f.PurchaseCost = sys.UnitCost * ordered
	f.TotalCost = f.HoldingCost + f.ShortageCost + f.OrderingCost + f.PurchaseCost
}
