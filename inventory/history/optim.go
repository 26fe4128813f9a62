package history

import "math"

// brentRoot finds a zero of f in [a, b], where f(a) and f(b) have opposite
// signs, by Brent's method: R. P. Brent, "Algorithms for Minimization
// without Derivatives" (1973), chapter 4 (procedure zero). tol is the
// absolute tolerance on the root.
func brentRoot(f func(float64) float64, a, b, fa, fb, tol float64, maxIter int) float64 {
	c, fc := a, fa
	d := b - a
	e := d
	for range maxIter {
		if (fb > 0) == (fc > 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		t := 2*2.220446049250313e-16*math.Abs(b) + tol
		m := (c - b) / 2
		if math.Abs(m) <= t || fb == 0 {
			return b
		}
		if math.Abs(e) < t || math.Abs(fa) <= math.Abs(fb) {
			d, e = m, m
		} else {
			s := fb / fa
			var p, q float64
			if a == c {
				p, q = 2*m*s, 1-s
			} else {
				q0 := fa / fc
				r := fb / fc
				p = s * (2*m*q0*(q0-r) - (b-a)*(r-1))
				q = (q0 - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			} else {
				p = -p
			}
			if 2*p < 3*m*q-math.Abs(t*q) && p < math.Abs(e*q/2) {
				e, d = d, p/q
			} else {
				d, e = m, m
			}
		}
		a, fa = b, fb
		if math.Abs(d) > t {
			b += d
		} else if m > 0 {
			b += t
		} else {
			b -= t
		}
		fb = f(b)
	}
	return b
}

// nelderMead2 minimises f over the plane from x0 with initial steps step,
// by the simplex method of J. A. Nelder and R. Mead, "A simplex method for
// function minimization", The Computer Journal 7(4), 308-313 (1965), with
// the standard coefficients (reflection 1, expansion 2, contraction 1/2,
// shrink 1/2) as in Lagarias, Reeds, Wright and Wright, SIAM J. Optim.
// 9(1), 112-147 (1998). It stops when the simplex's function values agree
// within ftol (absolute) and its size is below xtol, or after maxEval
// evaluations, and returns the best vertex and its value.
//
// A small, allocation-free method is used in place of gonum's optimize
// package, whose concurrent driver costs more than the whole fit of a
// two-parameter model on a 104-period series.
func nelderMead2(f func(x, y float64) float64, x0, y0, sx, sy, ftol, xtol float64, maxEval int) (bx, by, bf float64, evals int) {
	type pt struct{ x, y, f float64 }
	eval := func(x, y float64) pt {
		evals++
		v := f(x, y)
		if math.IsNaN(v) {
			v = math.Inf(1)
		}
		return pt{x, y, v}
	}
	s := [3]pt{eval(x0, y0), eval(x0+sx, y0), eval(x0, y0+sy)}
	sort3 := func() {
		if s[1].f < s[0].f {
			s[0], s[1] = s[1], s[0]
		}
		if s[2].f < s[1].f {
			s[1], s[2] = s[2], s[1]
		}
		if s[1].f < s[0].f {
			s[0], s[1] = s[1], s[0]
		}
	}
	for {
		sort3()
		size := math.Max(math.Max(math.Abs(s[1].x-s[0].x), math.Abs(s[2].x-s[0].x)),
			math.Max(math.Abs(s[1].y-s[0].y), math.Abs(s[2].y-s[0].y)))
		if (s[2].f-s[0].f <= ftol && size <= xtol) || evals >= maxEval {
			return s[0].x, s[0].y, s[0].f, evals
		}
		cx, cy := (s[0].x+s[1].x)/2, (s[0].y+s[1].y)/2
		r := eval(2*cx-s[2].x, 2*cy-s[2].y)
		switch {
		case r.f < s[0].f:
			e := eval(3*cx-2*s[2].x, 3*cy-2*s[2].y)
			if e.f < r.f {
				s[2] = e
			} else {
				s[2] = r
			}
		case r.f < s[1].f:
			s[2] = r
		default:
			var c pt
			if r.f < s[2].f { // outside contraction
				c = eval(cx+(r.x-cx)/2, cy+(r.y-cy)/2)
				if c.f <= r.f {
					s[2] = c
					continue
				}
			} else { // inside contraction
				c = eval(cx+(s[2].x-cx)/2, cy+(s[2].y-cy)/2)
				if c.f < s[2].f {
					s[2] = c
					continue
				}
			}
			for i := 1; i < 3; i++ {
				s[i] = eval(s[0].x+(s[i].x-s[0].x)/2, s[0].y+(s[i].y-s[0].y)/2)
			}
		}
	}
}
