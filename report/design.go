package report

import (
	"fmt"
	"math"
	"strings"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/design"
	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// PlaneAxis is one axis of the loop file's "plane" key: a parameter of
// the expressions, its nominal value and its range.
type PlaneAxis struct {
	// Name is the parameter's name in the expressions.
	Name string
	// Value is the nominal value, at which every other section evaluates
	// the loop.
	Value float64
	// Range is the axis of the plane, finite, low < high.
	Range [2]float64
}

// PlaneSpec is the loop file's "plane" key: two parameters of the
// expressions whose plane is partitioned into stable and unstable regions
// (package design, D-partition).
type PlaneSpec struct{ X, Y PlaneAxis }

// planeKey reads "plane": {"x": {"name": "Kp", "value": 1, "range": [0, 10]}, "y": {...}}.
var planeKey = loopKey{name: "plane", decode: func(v keyValue, lf *Loop) error {
	fields, err := v.fields([]string{"x", "y"})
	if err != nil {
		return err
	}
	ps := &PlaneSpec{}
	seen := map[string]bool{}
	for _, f := range fields {
		ax := &ps.X
		if strings.HasSuffix(f.f.key, ".y") {
			ax = &ps.Y
		}
		seen[f.f.key] = true
		sub, err := f.fields([]string{"name", "value", "range"})
		if err != nil {
			return err
		}
		got := map[string]bool{}
		for _, s := range sub {
			name := s.f.key[strings.LastIndexByte(s.f.key, '.')+1:]
			got[name] = true
			switch name {
			case "name":
				err = s.text(&ax.Name)
			case "value":
				err = s.number(&ax.Value)
			case "range":
				err = decodeRange(s.data, s.f, s.f.key, &ax.Range)
			}
			if err != nil {
				return err
			}
		}
		for _, k := range []string{"name", "value", "range"} {
			if !got[k] {
				return badInput("key %q %s lacks %q; write for example {\"name\": \"Kp\", \"value\": 1, \"range\": [0, 10]}", f.f.key, at(f.data, f.f.valOff), k)
			}
		}
		if !validName(ax.Name) {
			return badInput("key %q %s: %q is not a usable name; use letters, digits and '_', starting with a letter, and not s, z or exp", f.f.key+".name", at(f.data, f.f.valOff), ax.Name)
		}
		if !(ax.Range[0] < ax.Range[1]) || math.IsInf(ax.Range[0], 0) || math.IsInf(ax.Range[1], 0) {
			return badInput("key %q %s: the range must be finite with low < high, got [%g, %g]", f.f.key+".range", at(f.data, f.f.valOff), ax.Range[0], ax.Range[1])
		}
	}
	if !seen["plane.x"] || !seen["plane.y"] {
		return badInput("key \"plane\" %s needs both \"x\" and \"y\"", at(v.data, v.f.valOff))
	}
	if ps.X.Name == ps.Y.Name {
		return badInput("key \"plane\" %s: x and y are the same parameter %q", at(v.data, v.f.valOff), ps.X.Name)
	}
	lf.Plane = ps
	return nil
}}

// planeNominal adds the plane's nominal point to the parameter values used
// to read the expressions (build.go's buildAt).
func (lf *Loop) planeNominal(params map[string]float64) map[string]float64 {
	if lf.Plane == nil {
		return params
	}
	out := map[string]float64{lf.Plane.X.Name: lf.Plane.X.Value, lf.Plane.Y.Name: lf.Plane.Y.Value}
	for k, v := range params {
		out[k] = v
	}
	return out
}

// DesignResult is the "design" section: for the loop gain k (or the
// loop file's parameter), the values that meet each requirement.
type DesignResult struct {
	// Variable is "gain" or the parameter's name.
	Variable string `json:"variable"`
	// Requirements has one entry per requirement of the loop file.
	Requirements []DesignRequirement `json:"requirements"`
	// AllMet are the values where every requirement holds and the loop is
	// stable; [] when there is none.
	AllMet []Interval `json:"all_met"`
	// Suggested is the value in AllMet with the largest smallest relative
	// slack (package design); null when AllMet is empty.
	Suggested Number `json:"suggested"`
	// Binding says in words what limits the design at the ends of AllMet,
	// or which requirements conflict and the best compromise.
	Binding string `json:"binding"`
}

// designFigures keeps what the design figures need (analysis.design).
type designFigures struct {
	result  *design.Result
	plane   *design.PlanePartition
	nominal [2]float64
}

// DesignRequirement is the set of values where one requirement holds.
type DesignRequirement struct {
	// Name is the requirement's key in the loop file.
	Name string `json:"name"`
	// Intervals are the values where it holds, [low, high] with null for
	// an unbounded end.
	Intervals []Interval `json:"intervals"`
	// Ends says what binds at each end, "low end; high end" per interval.
	Ends []string `json:"ends"`
	// Method is "exact" (boundary equations) or "bracketing" (Brent's
	// method on the measured quantity).
	Method string `json:"method"`
}

// PlaneResult is the "plane" section: the D-partition of the plane of
// the loop file's two parameters.
type PlaneResult struct {
	// X and Y are the parameters' names.
	X string `json:"x"`
	Y string `json:"y"`
	// Boundaries are the boundary curves as polylines inside the
	// rectangle.
	Boundaries []PlaneBoundary `json:"boundaries"`
	// StableRegions are closed polygons [[x, y], ...] where the loop is
	// stable.
	StableRegions [][][2]Number `json:"stable_regions"`
	// Regions are every region with its number of unstable closed-loop
	// roots.
	Regions []PlaneRegion `json:"regions"`
	// RequirementRegions are, per requirement (and "all requirements"),
	// the polygons where it holds and the loop is stable.
	RequirementRegions []PlaneRequirementRegion `json:"requirement_regions"`
}

// PlaneBoundary is one boundary curve of the plane.
type PlaneBoundary struct {
	Kind   string      `json:"kind"`
	Points [][2]Number `json:"points"`
}

// PlaneRegion is a polygon with its number of unstable roots.
type PlaneRegion struct {
	Polygon       [][2]Number `json:"polygon"`
	UnstableRoots int         `json:"unstable_roots"`
}

// PlaneRequirementRegion is where one requirement holds in the plane.
type PlaneRequirementRegion struct {
	Name    string        `json:"name"`
	Regions [][][2]Number `json:"regions"`
}

func points(ps [][2]float64) [][2]Number {
	out := make([][2]Number, len(ps))
	for i, p := range ps {
		out[i] = [2]Number{Number(p[0]), Number(p[1])}
	}
	return out
}

// fileRequirements returns the loop file's requirements for package spec.
func (lf *Loop) fileRequirements() spec.Requirements {
	var req spec.Requirements
	for _, r := range lf.Requirements {
		if q, err := spec.ByKey(r.Key, r.Limit); err == nil {
			req = append(req, q)
		}
	}
	return req
}

// designStage runs the one-variable design (with requirements) and the
// plane (with the "plane" key).
func (a *analysis) designStage() {
	lf := a.m.file
	req := lf.fileRequirements()
	if len(req) > 0 {
		a.designVariable(req)
	}
	if lf.Plane != nil {
		a.designPlane(req)
	}
}

func (a *analysis) designVariable(req spec.Requirements) {
	lf := a.m.file
	var v design.Variable
	var err error
	set := &design.Settings{PadeOrder: padeOrder}
	if p := lf.Parameter; p != nil {
		v, err = design.Parameter(p.Name, a.m.loopAt)
		set.Range = design.Range{Min: p.Range[0], Max: p.Range[1]}
	} else {
		v, err = design.Gain(a.m.base)
		if r := lf.GainRange; r != ([2]float64{}) {
			set.Range = design.Range{Min: r[0], Max: r[1]}
		}
	}
	var res design.Result
	if err == nil {
		res, err = design.Solve(v, req, set)
	}
	if err != nil {
		a.warn("design: %s; the design keys are null", short(err))
		return
	}
	if !a.m.unitySensor {
		a.warn("design: the sensor is not 1, but the sets of the design judge the step metrics and the damping ratio on L/(1 + L)")
	}
	if strings.Contains(res.StableNote, "Padé") {
		a.warn("design: stable values: %s", res.StableNote)
	}
	d := &DesignResult{Variable: res.Variable, AllMet: []Interval{}, Suggested: Number(res.Suggested), Binding: res.Binding}
	a.design.result = &res
	for _, rs := range res.Requirements {
		dr := DesignRequirement{Name: rs.Key, Intervals: []Interval{}, Ends: []string{}, Method: rs.Method}
		if rs.Intervals == nil && strings.HasPrefix(rs.Method, "not designed") {
			// Measured on the loop's parts: no set (null), not "nowhere".
			dr.Intervals, dr.Ends = nil, nil
		}
		for _, iv := range rs.Intervals {
			dr.Intervals = append(dr.Intervals, Interval{Number(iv.Lo), Number(iv.Hi)})
			dr.Ends = append(dr.Ends, endWords(iv))
		}
		d.Requirements = append(d.Requirements, dr)
	}
	for _, iv := range res.AllMet {
		d.AllMet = append(d.AllMet, Interval{Number(iv.Lo), Number(iv.Hi)})
	}
	a.rep.Design = d
}

func endWords(iv design.Interval) string {
	w := func(s string) string {
		if s == "" {
			return "—"
		}
		return s
	}
	return w(iv.LoBinding) + "; " + w(iv.HiBinding)
}

// planeLoop returns the loop of the file at the parameter values (x, y),
// built as every other section builds it.
func (a *analysis) planeLoop(x, y float64) (tf.TF, error) {
	lf := a.m.file
	params := map[string]float64{lf.Plane.X.Name: x, lf.Plane.Y.Name: y}
	if p := lf.Parameter; p != nil {
		params[p.Name] = p.Value
	}
	params = lf.uncertainMidpoints(params)
	var parts []tf.TF
	for _, e := range []struct{ key, text string }{{"controller", lf.Controller}, {"plant", lf.Plant}, {"sensor", lf.Sensor}} {
		g, err := lf.parseExpr(e.key, e.text, params)
		if err != nil {
			return tf.TF{}, err
		}
		parts = append(parts, g)
	}
	l, err := lf.product(a.m.gain, parts...)
	if err != nil {
		return tf.TF{}, err
	}
	if d := lf.Discretize; d != nil {
		return discretize(l, d)
	}
	return l, nil
}

func (a *analysis) designPlane(req spec.Requirements) {
	lf := a.m.file
	pl, err := design.PlaneFunc(lf.Plane.X.Name, lf.Plane.Y.Name, a.planeLoop)
	var part design.PlanePartition
	if err == nil {
		part, err = design.Partition(pl, &design.PlaneSettings{
			XRange:       design.Range{Min: lf.Plane.X.Range[0], Max: lf.Plane.X.Range[1]},
			YRange:       design.Range{Min: lf.Plane.Y.Range[0], Max: lf.Plane.Y.Range[1]},
			Requirements: req, PadeOrder: padeOrder,
		})
	}
	if err != nil {
		a.warn("plane: %s; the plane keys are null", short(err))
		return
	}
	pr := &PlaneResult{X: part.X, Y: part.Y, Boundaries: []PlaneBoundary{}, StableRegions: [][][2]Number{}, Regions: []PlaneRegion{},
		RequirementRegions: []PlaneRequirementRegion{}}
	a.design.plane, a.design.nominal = &part, [2]float64{lf.Plane.X.Value, lf.Plane.Y.Value}
	for _, b := range part.Boundaries {
		pr.Boundaries = append(pr.Boundaries, PlaneBoundary{Kind: b.Kind, Points: points(b.Points)})
	}
	for _, r := range part.Regions {
		pr.Regions = append(pr.Regions, PlaneRegion{Polygon: points(r.Polygon), UnstableRoots: r.UnstableRoots})
		if r.UnstableRoots == 0 {
			pr.StableRegions = append(pr.StableRegions, points(r.Polygon))
		}
	}
	for _, rr := range part.RequirementRegions {
		q := PlaneRequirementRegion{Name: rr.Key, Regions: [][][2]Number{}}
		for _, g := range rr.Regions {
			q.Regions = append(q.Regions, points(g))
		}
		pr.RequirementRegions = append(pr.RequirementRegions, q)
	}
	a.rep.Plane = pr
}

func designTables(r *Report) []table {
	var out []table
	if d := r.Design; d != nil {
		t := table{title: "Design over the " + d.Variable}
		for i, rq := range d.Requirements {
			text := intervalsText(rq.Intervals)
			if rq.Intervals == nil && strings.HasPrefix(rq.Method, "not designed") {
				text = "not designed (measured on the plant and the controller apart)"
			}
			t.rows = append(t.rows, row{requirementWords(i, rq.Name, r), text})
		}
		t.rows = append(t.rows, row{"all requirements met for", intervalsText(d.AllMet)}, row{"suggested value", g(d.Suggested)}, row{"what binds", d.Binding})
		out = append(out, t)
	}
	if p := r.Plane; p != nil {
		t := table{title: fmt.Sprintf("Plane of %s and %s", p.X, p.Y)}
		t.rows = append(t.rows, row{"stable regions", fmt.Sprint(len(p.StableRegions))})
		for _, rg := range p.Regions {
			if rg.UnstableRoots != 0 {
				t.rows = append(t.rows, row{"region with unstable roots", fmt.Sprintf("%d unstable roots", rg.UnstableRoots)})
			}
		}
		for _, rr := range p.RequirementRegions {
			t.rows = append(t.rows, row{"regions where " + rr.Name + " holds", fmt.Sprint(len(rr.Regions))})
		}
		out = append(out, t)
	}
	return out
}

// designPlots adds the design axis and the parameter plane (plots.go).
func (a *analysis) designPlots(add func(title, file, caption string, draw func() (*chart.Figure, error))) {
	if d := a.rep.Design; d != nil && a.design.result != nil {
		res := *a.design.result
		add("Design axis", "design-axis",
			fmt.Sprintf("Where each requirement holds over the %s (green bars), where the loop is stable and where all hold (orange), with the suggested value dashed.", d.Variable),
			func() (*chart.Figure, error) { return chart.DesignAxis(res, nil) })
	}
	if p := a.rep.Plane; p != nil && a.design.plane != nil {
		part, nominal := *a.design.plane, a.design.nominal
		add("Parameter plane", "parameter-plane",
			fmt.Sprintf("The plane of %s and %s: stable regions shaded, other regions labelled with their number of unstable closed-loop roots, the stability boundaries (frequency at a few points), the requirement boundaries dashed, where every requirement holds in orange, and the nominal point.", p.X, p.Y),
			func() (*chart.Figure, error) {
				return chart.ParameterPlane(part, &chart.ParameterPlaneSettings{Nominal: &nominal})
			})
	}
}

// designSection computes the values that meet the requirements and the
// plane of two parameters (package design).
var designSection = section{stage: "design", keys: []loopKey{planeKey}, run: (*analysis).designStage, tables: designTables}

// requirementWords names the i-th requirement with its limit, from the
// requirements section ("minimum phase margin 45 °").
func requirementWords(i int, key string, r *Report) string {
	if i < len(r.Requirements) {
		q := r.Requirements[i]
		sep := " "
		if q.Unit == "°" || q.Unit == "" {
			sep = ""
		}
		return fmt.Sprintf("%s %s%s%s", q.Name, g(q.Limit), sep, q.Unit)
	}
	return key
}

// intervalsText writes intervals joined by "and", or "none".
func intervalsText(ivs []Interval) string {
	var out []string
	for _, iv := range ivs {
		out = append(out, intervalText(iv))
	}
	if len(out) == 0 {
		return "none"
	}
	return strings.Join(out, " and ")
}
