package robust

// mpoly is a real polynomial in the scaled parameters t ∈ [−1, 1]ⁿ, where
// parameter i is mid_i + rad_i·t_i. The zero value is the zero polynomial.
type mpoly struct {
	terms []term
}

type term struct {
	exp []int // exponent per parameter
	c   float64
}

func (p mpoly) isZero() bool { return len(p.terms) == 0 }

// eval returns p(t) at a point.
func (p mpoly) eval(t []float64) float64 {
	var s float64
	for _, tm := range p.terms {
		v := tm.c
		for i, e := range tm.exp {
			for range e {
				v *= t[i]
			}
		}
		s += v
	}
	return s
}

// evalInterval returns an enclosure of p over the box (natural interval
// extension, outward rounded).
func (p mpoly) evalInterval(box []interval) interval {
	s := point(0)
	for _, tm := range p.terms {
		v := point(tm.c)
		for i, e := range tm.exp {
			if e > 0 {
				v = v.mul(box[i].pow(e))
			}
		}
		s = s.add(v)
	}
	return s
}

// totalDegree returns the largest sum of exponents of a term (−1 for zero).
func (p mpoly) totalDegree() int {
	d := -1
	for _, tm := range p.terms {
		s := 0
		for _, e := range tm.exp {
			s += e
		}
		d = max(d, s)
	}
	return d
}

// maxVarDegree returns the largest exponent of any one parameter.
func (p mpoly) maxVarDegree() int {
	d := 0
	for _, tm := range p.terms {
		for _, e := range tm.exp {
			d = max(d, e)
		}
	}
	return d
}

// uses reports whether parameter i appears in p.
func (p mpoly) uses(i int) bool {
	for _, tm := range p.terms {
		if tm.exp[i] > 0 {
			return true
		}
	}
	return false
}

// linear returns the coefficient of t_i alone.
func (p mpoly) linear(i int) float64 {
	for _, tm := range p.terms {
		ok := tm.exp[i] == 1
		for j, e := range tm.exp {
			if j != i && e != 0 {
				ok = false
			}
		}
		if ok {
			return tm.c
		}
	}
	return 0
}

// combine returns Σ w_k p_k (used for the exact bilinear map of discrete
// families, whose coefficients are fixed linear combinations).
func combine(ps []mpoly, w []float64, n int) mpoly {
	acc := map[string]*term{}
	var order []string
	for k, p := range ps {
		if w[k] == 0 {
			continue
		}
		for _, tm := range p.terms {
			key := expKey(tm.exp)
			if a, ok := acc[key]; ok {
				a.c += w[k] * tm.c
				continue
			}
			e := append([]int(nil), tm.exp...)
			acc[key] = &term{exp: e, c: w[k] * tm.c}
			order = append(order, key)
		}
	}
	var out mpoly
	for _, key := range order {
		if acc[key].c != 0 {
			out.terms = append(out.terms, *acc[key])
		}
	}
	return out
}

func expKey(e []int) string {
	b := make([]byte, len(e))
	for i, v := range e {
		b[i] = byte(v)
	}
	return string(b)
}
