package statespace

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/lapack"
	"gonum.org/v1/gonum/lapack/gonum"
	"gonum.org/v1/gonum/mat"
)

// Model is a single-input single-output state-space model
// x' = A·x + B·u, y = C·x + D·u.
type Model struct {
	// A is the n×n state matrix; nil when n = 0 (a static gain).
	A *mat.Dense
	// B and C are the input and output vectors, of length n.
	B, C []float64
	// D is the direct feedthrough.
	D float64
	// Scale maps this realisation's state to the companion state of
	// FromTransferFunction: x_companion[i] = Scale[i]·x[i]. The companion
	// state is ξ, ξ', …, ξ^(n−1) (continuous time) or ξ[k], …, ξ[k+n−1]
	// (discrete time) with den(·)ξ = u. Nil for models not built by
	// FromTransferFunction.
	Scale []float64
}

// Order returns the number of states n.
func (m Model) Order() int { return len(m.B) }

// FromTransferFunction returns a realisation of num/den, coefficients
// highest power first. It needs len(num) ≤ len(den) after leading zeros of
// num are dropped (a proper transfer function), den[0] ≠ 0 and finite
// coefficients. An empty num is the zero transfer function.
//
// The realisation is the controllable companion form (Kailath, Linear
// Systems, 1980, Sec. 2.1) transformed by the diagonal similarity
// x_companion = diag(Scale)·x, where Scale[i] = ρ^(i−n)·d[i]: ρ is
// max_k |a_k/a_0|^(1/k), which bounds the root moduli of den within a
// factor 2 (Fujiwara 1916), rounded to a power of two, so that every
// coefficient of the last row becomes a number of the size of the poles;
// d are the power-of-two Parlett–Reinsch balancing factors (Parlett &
// Reinsch 1969, LAPACK Dgebal), which equalise row and column norms. All
// scalings are powers of two, so the realisation has exactly the transfer
// function of the companion form (no rounding is added).
// For a companion matrix of order 24 with poles near 9 this reduces ‖A‖₁
// from about 2e9 to the size of the poles times the binomial spread, which
// is what keeps the matrix exponential accurate (see package response).
func FromTransferFunction(num, den []float64) (Model, error) {
	for i, v := range den {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Model{}, fmt.Errorf("%w: denominator coefficient %d is %v", ErrNotFinite, i, v)
		}
	}
	for i, v := range num {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Model{}, fmt.Errorf("%w: numerator coefficient %d is %v", ErrNotFinite, i, v)
		}
	}
	if len(den) == 0 {
		return Model{}, fmt.Errorf("%w: no coefficients", ErrDenominator)
	}
	if den[0] == 0 {
		return Model{}, fmt.Errorf("%w: leading coefficient is zero", ErrDenominator)
	}
	for len(num) > 0 && num[0] == 0 {
		num = num[1:]
	}
	if len(num) > len(den) {
		return Model{}, fmt.Errorf("%w: numerator degree %d > denominator degree %d", ErrImproper, len(num)-1, len(den)-1)
	}
	n := len(den) - 1
	a := make([]float64, n+1) // monic denominator, a[0] = 1
	b := make([]float64, n+1) // numerator padded to degree n, divided by den[0]
	for i := range den {
		a[i] = den[i] / den[0]
	}
	off := n + 1 - len(num)
	for i, v := range num {
		b[off+i] = v / den[0]
	}
	d := b[0]
	if n == 0 {
		return Model{D: d}, nil
	}
	// c_k = b_k − b_0·a_k: numerator of the strictly proper part.
	c := make([]float64, n+1)
	for k := 1; k <= n; k++ {
		c[k] = b[k] - d*a[k]
	}
	rho := 0.0
	for k := 1; k <= n; k++ {
		if a[k] != 0 {
			rho = math.Max(rho, math.Pow(math.Abs(a[k]), 1/float64(k)))
		}
	}
	if rho == 0 || math.IsInf(rho, 0) {
		rho = 1 // all poles at the origin: no frequency scale to remove
	}
	// Round ρ to a power of two so that every scaling below is exact and
	// the realisation has exactly the transfer function of the rounded
	// companion form (no extra rounding of the coefficients).
	e := math.Round(math.Log2(rho))
	// t[j] = ρ^(j−n), j = 0..n−1: companion state j is scaled by ρ^(j−n),
	// clamped to the normal range of float64.
	t := make([]float64, n)
	for j := range t {
		t[j] = math.Ldexp(1, int(max(-1000, min(1000, e*float64(j-n)))))
	}
	A := make([]float64, n*n)
	for j := 0; j+1 < n; j++ {
		A[j*n+j+1] = t[j+1] / t[j]
	}
	for j := 0; j < n; j++ {
		// Companion last row: −a_{n−j} in column j.
		A[(n-1)*n+j] = -a[n-j] * t[j] / t[n-1]
	}
	B := make([]float64, n)
	B[n-1] = 1 / t[n-1]
	C := make([]float64, n)
	for j := 0; j < n; j++ {
		C[j] = c[n-j] * t[j]
	}
	scale := make([]float64, n)
	gonum.Implementation{}.Dgebal(lapack.Scale, n, A, n, scale)
	for j := 0; j < n; j++ {
		B[j] /= scale[j]
		C[j] *= scale[j]
		scale[j] *= t[j]
	}
	m := Model{A: mat.NewDense(n, n, A), B: B, C: C, D: d, Scale: scale}
	if err := m.checkFinite(); err != nil {
		return Model{}, err
	}
	return m, nil
}

func (m Model) checkFinite() error {
	bad := func(v float64) bool { return math.IsNaN(v) || math.IsInf(v, 0) }
	if m.A != nil {
		for _, v := range m.A.RawMatrix().Data {
			if bad(v) {
				return fmt.Errorf("%w: state matrix entry %v (coefficients out of range)", ErrNotFinite, v)
			}
		}
	}
	for i := range m.B {
		if bad(m.B[i]) || bad(m.C[i]) || (m.Scale != nil && bad(m.Scale[i])) {
			return fmt.Errorf("%w: realisation entry %d (coefficients out of range)", ErrNotFinite, i)
		}
	}
	if bad(m.D) {
		return fmt.Errorf("%w: direct term %v", ErrNotFinite, m.D)
	}
	return nil
}

func checkStep(m Model, T float64) error {
	if math.IsNaN(T) || math.IsInf(T, 0) {
		return fmt.Errorf("%w: sample period %v s", ErrNotFinite, T)
	}
	if T <= 0 {
		return fmt.Errorf("%w: got %v s", ErrSampleTime, T)
	}
	if m.A == nil || len(m.B) == 0 {
		return ErrNoState
	}
	return nil
}

// blockExp returns exp of the (n+extra)×(n+extra) matrix whose top-left
// block is A·T, whose column n is B·T, and whose remaining rows are zero
// except the superdiagonal ones in the extra block.
func (m Model) blockExp(T float64, extra int) (*mat.Dense, error) {
	n := m.Order()
	N := n + extra
	M := mat.NewDense(N, N, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			M.Set(i, j, m.A.At(i, j)*T)
		}
		M.Set(i, n, m.B[i]*T)
	}
	for i := n; i+1 < N; i++ {
		M.Set(i, i+1, 1)
	}
	// mat.Exp does not return on infinite entries (its scaling loop never
	// ends), so an overflowing A·T is an error before the call.
	for _, v := range M.RawMatrix().Data {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("%w: A·T overflows at sample period %v s", ErrNotFinite, T)
		}
	}
	var E mat.Dense
	E.Exp(M)
	for _, v := range E.RawMatrix().Data {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("%w: matrix exponential overflowed at sample period %v s", ErrNotFinite, T)
		}
	}
	return &E, nil
}

// ZeroOrderHold returns the exact zero-order-hold equivalent of the model
// at sample period T > 0 seconds: x[k+1] = Φ·x[k] + Γ·u[k] with
// Φ = e^(A·T) and Γ = ∫₀ᵀ e^(A·η) dη·B, the state of the continuous model
// at the sample instants when u is held constant between them.
//
// Both come from one matrix exponential of the block matrix
// [[A·T, B·T], [0, 0]], whose exponential is [[Φ, Γ], [0, 1]] (Van Loan,
// "Computing integrals involving the matrix exponential", IEEE Trans.
// Automatic Control 23(3), 1978), computed by gonum's mat.Exp (Higham's
// scaling and squaring Padé method, Functions of Matrices, 2008, Alg. 10.20),
// accurate to a modest multiple of machine precision times ‖A·T‖ for the
// well-scaled realisations of FromTransferFunction.
func (m Model) ZeroOrderHold(T float64) (phi *mat.Dense, gamma []float64, err error) {
	if err := checkStep(m, T); err != nil {
		return nil, nil, err
	}
	n := m.Order()
	E, err := m.blockExp(T, 1)
	if err != nil {
		return nil, nil, err
	}
	phi = mat.DenseCopyOf(E.Slice(0, n, 0, n))
	gamma = make([]float64, n)
	for i := range gamma {
		gamma[i] = E.At(i, n)
	}
	return phi, gamma, nil
}

// FirstOrderHold returns the exact triangle-hold (first-order-hold,
// non-causal linear interpolation) equivalent of the model at sample
// period T > 0 seconds, for inputs that are linear between samples:
//
//	x[k+1] = Φ·x[k] + Γ1·u[k] + Γ2·(u[k+1] − u[k])
//	Φ  = e^(A·T)
//	Γ1 = ∫₀ᵀ e^(A·η) dη·B                  (the zero-order-hold Γ)
//	Γ2 = (1/T)·∫₀ᵀ e^(A·η)·(T − η) dη·B
//
// Equivalently x[k+1] = Φ·x[k] + (Γ1 − Γ2)·u[k] + Γ2·u[k+1]. This is the
// triangle-hold equivalent of Franklin, Powell & Workman, Digital Control of
// Dynamic Systems, 3rd ed., 1998, Sec. 6.3.2 (recalled from memory; the
// formulas above are derived here and checked in the tests against the
// closed-form ramp response). All three come from one exponential of the
// (n+2)×(n+2) block matrix [[A·T, B·T, 0], [0, 0, 1], [0, 0, 0]], whose
// exponential is [[Φ, Γ1, Γ2], [0, 1, 1], [0, 0, 1]] (Van Loan 1978),
// computed with gonum's mat.Exp.
func (m Model) FirstOrderHold(T float64) (phi *mat.Dense, gamma1, gamma2 []float64, err error) {
	if err := checkStep(m, T); err != nil {
		return nil, nil, nil, err
	}
	n := m.Order()
	E, err := m.blockExp(T, 2)
	if err != nil {
		return nil, nil, nil, err
	}
	phi = mat.DenseCopyOf(E.Slice(0, n, 0, n))
	gamma1 = make([]float64, n)
	gamma2 = make([]float64, n)
	for i := 0; i < n; i++ {
		gamma1[i] = E.At(i, n)
		gamma2[i] = E.At(i, n+1)
	}
	return phi, gamma1, gamma2, nil
}
