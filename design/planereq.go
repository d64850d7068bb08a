package design

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/poly"
)

// requirementRegions adds the requirement regions (Solve on each of
// RequirementScanlines lines y = const, each set intersected with the
// stable set) and the boundary curves of the damping-ratio requirements
// (the image of the ζ line, continuous time) and of the phase-margin
// requirements (L = e^(j(φ−180°)) on the axis, rational loops).
func requirementRegions(pl Plane, s *PlaneSettings, a, b, c poly.Poly, rect rectangle, out *PlanePartition) error {
	req := s.Requirements
	ys := linspace(s.YRange.Min, s.YRange.Max, s.RequirementScanlines)
	rows := make([][][]span, len(req)+1)
	for i := range rows {
		rows[i] = make([][]span, len(ys))
	}
	for j, y := range ys {
		if err := s.Context.Err(); err != nil {
			return err
		}
		res, err := Solve(pl.AtY(y), req, &Settings{Range: s.XRange, PadeOrder: s.PadeOrder})
		if err != nil {
			// A line on which the loop degenerates (the characteristic
			// polynomial does not depend on x there) meets nothing.
			continue
		}
		for i, rs := range res.Requirements {
			for _, iv := range intersectSets(res.Stable, rs.Intervals) {
				rows[i][j] = append(rows[i][j], span{iv.Lo, iv.Hi, 0})
			}
		}
		for _, iv := range res.AllMet {
			rows[len(req)][j] = append(rows[len(req)][j], span{iv.Lo, iv.Hi, 0})
		}
	}
	for i := range rows {
		rr := RequirementRegion{Key: "all", Name: "all requirements"}
		if i < len(req) {
			rr = RequirementRegion{Key: req[i].Key(), Name: req[i].String()}
		}
		for _, p := range joinSpans(ys, rows[i]) {
			rr.Regions = append(rr.Regions, p.points)
		}
		out.RequirementRegions = append(out.RequirementRegions, rr)
	}
	for _, r := range req {
		switch r.Key() {
		case keyDamping:
			zeta := r.Limit()
			if pl.ts > 0 || !(zeta >= 0 && zeta < 1) {
				continue
			}
			d := complex(-zeta, math.Sqrt(1-zeta*zeta))
			ev := func(q poly.Poly) func(float64) complex128 {
				return func(w float64) complex128 { return q.EvalComplex(complex(w, 0) * d) }
			}
			kind := fmt.Sprintf("damping ratio ζ = %s", fmtNum(zeta))
			out.Boundaries = append(out.Boundaries, traceCurve(kind, ev(a), ev(b), ev(c), 0, freqScale(a, b, c, 0), rect, s.ChordTolerance)...)
		case keyPhaseMargin:
			if pl.delay > 0 {
				continue
			}
			e := cmplx.Rect(1, (r.Limit()-180)*math.Pi/180)
			ev := func(n, d poly.Poly) func(float64) complex128 {
				return func(w float64) complex128 {
					z := boundaryPoint(w, pl.ts)
					return n.EvalComplex(z) - e*d.EvalComplex(z)
				}
			}
			kind := fmt.Sprintf("phase margin = %s°", fmtNum(r.Limit()))
			out.Boundaries = append(out.Boundaries, traceCurve(kind, ev(pl.n0, pl.d0), ev(pl.nx, pl.dx), ev(pl.ny, pl.dy), pl.ts, freqScale(a, b, c, pl.ts), rect, s.ChordTolerance)...)
		}
	}
	return nil
}
