package policies

// zfResult is the outcome of the Zheng-Federgruen search.
type zfResult struct {
	s, S     int
	cost     float64 // c(s, S), without the purchase term
	ystar    int     // smallest minimiser of G
	sLo      int     // reorder point found in step 0 (s* >= sLo)
	sStop    int     // first S with G(S) > c*: S* < sStop
	computed int     // values c(s, S) computed, incrementally or in full
}

// zhengFedergruen finds an optimal s-S policy in backorder mode by the
// algorithm of Y.-S. Zheng and A. Federgruen, "Finding optimal (s,S)
// policies is about as simple as evaluating a single policy", Operations
// Research 39(4), 1991 (pages 654-665, from memory), with costs
//
//	c(s, S) = [K + sum_{j=0}^{S-s-1} m(j) G(S-j)] / M(S-s)
//
// (see boModel). The steps, with y* the smallest minimiser of G:
//
//  0. S0 = y*; lower s from y* until c(s, S0) <= G(s); c0 = c(s, S0).
//  1. For S = S0+1, S0+2, ... while G(S) <= c0: if c(s, S) < c0, set
//     S0 = S, raise s while c(s, S0) <= G(s+1), and set c0 = c(s, S0).
//
// The paper proves the result (s, S0) optimal over all s < S. The stopping
// rule rests on its bound y* <= S* <= max{y : G(y) <= c*}; the reorder
// point starts at s_0, the value step 0 finds, and only rises. So the
// search reports the ranges s_0..max(y*-1, s*) and y*..S_stop-1, with
// S_stop the first S with G(S) > c*.
//
// Moving s by one changes c(s, S) by one term, so step 0 costs O(1) per
// step; in step 1 a new S and a raise of s cost O(w) each, w the width of
// the demand kernel (see the renewal recursion below). With K = 0 the
// algorithm returns s = y*-1, S = y*: base-stock at the critical fractile.
// zfOnce returns zhengFedergruen's result, computed at the first call: a
// model kept for several searches of one system (DemandTables) runs it
// once.
func (mo *boModel) zfOnce() (zfResult, error) {
	if mo.zf != nil {
		return *mo.zf, nil
	}
	r, err := mo.zhengFedergruen()
	if err == nil {
		mo.zf = &r
	}
	return r, err
}

func (mo *boModel) zhengFedergruen() (zfResult, error) {
	ystar, err := mo.fractile()
	if err != nil {
		return zfResult{}, err
	}
	r := zfResult{ystar: ystar}
	// Step 0.
	S0 := ystar
	s := ystar - 1
	num, den := mo.ssWindow(s, S0)
	r.computed++
	for num/den > mo.G(s) {
		n := S0 - s
		if n >= mo.levelCap() {
			return r, mo.capErr("s-S search", "width S - s", float64(n))
		}
		if err := mo.tick(); err != nil {
			return r, err
		}
		mo.ensureM(n + 1)
		num += mo.m[n] * mo.G(s)
		den = mo.cm[n+1]
		s--
		r.computed++
	}
	r.sLo = s

	// Step 1, with phi(S') = sum_{y=s+1}^{S'} m(S'-y) G(y) kept by the
	// renewal recursion phi(S') = m(0) G(S') + sum_{i>=1} q_i phi(S'-i)
	// (from m(j) = sum_i q_i m(j-i) for j >= 1), so that a new S costs O(w)
	// for w the width of the demand kernel; raising s to s+1 subtracts
	// m(S'-s-1) G(s+1) from the w latest values. Then c(s, S) =
	// (K + phi(S)) / M(S-s).
	w := len(mo.q) - 1
	base := s + 1
	phi := make([]float64, 0, 2*(ystar-s)+16)
	next := func(S int) float64 {
		v := mo.m[0] * mo.G(S)
		hi := min(w, S-s-1)
		for i := mo.qlo; i <= hi; i++ {
			v += mo.q[i] * phi[S-i-base]
		}
		return v
	}
	for Sp := base; Sp <= ystar; Sp++ {
		phi = append(phi, next(Sp))
	}
	c0 := (mo.k + phi[S0-base]) / mo.cm[S0-s]
	S := S0 + 1
	for ; mo.G(S) <= c0; S++ {
		if S-s >= mo.levelCap() {
			return r, mo.capErr("s-S search", "width S - s", float64(S-s))
		}
		if err := mo.tick(); err != nil {
			return r, err
		}
		mo.ensureM(S - s + 1)
		phi = append(phi, next(S))
		cs := (mo.k + phi[S-base]) / mo.cm[S-s]
		r.computed++
		if !(cs < c0) {
			continue
		}
		S0 = S
		for s+1 < S0 && (mo.k+phi[S0-base])/mo.cm[S0-s] <= mo.G(s+1) {
			g := mo.G(s + 1)
			for Sp := max(s+1, S0-w+1); Sp <= S0; Sp++ {
				phi[Sp-base] -= mo.m[Sp-s-1] * g
			}
			s++
			r.computed++
		}
		c0 = (mo.k + phi[S0-base]) / mo.cm[S0-s]
	}
	r.s, r.S, r.sStop = s, S0, S
	r.cost = mo.ssCost(s, S0) // recomputed in full, free of running-sum drift
	return r, nil
}
