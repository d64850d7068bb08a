package spec_test

import (
	"testing"

	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// BenchmarkDampingDeadTime times the damping-ratio requirement of loops
// with dead time judged on the dominant exact roots (the default) side by
// side with the baseline it replaces, the poles of the Padé(6) closed loop
// (Settings.PadeDeadTime); compare the two lines of each loop in one run.
func BenchmarkDampingDeadTime(b *testing.B) {
	req := spec.Requirements{spec.MinDampingRatio(0.3)}
	for _, l := range []struct{ name, text string }{
		{"integrator", "exp(-s)/s"},
		{"oven", "1.92*exp(-0.8s)*(4s+1)/(4s*(6s+1)*(s+1))"},
		{"order6", "50*exp(-0.05s)/((s+1)(s+2)(s+3)(s+4)(s+5)(s+6))"},
	} {
		loop := tf.MustParse(l.text)
		for _, m := range []struct {
			name string
			set  *spec.Settings
		}{{"exact", nil}, {"pade6", &spec.Settings{PadeDeadTime: true}}} {
			if r := spec.CheckWith(loop, req, m.set).Results[0]; r.Err != nil {
				b.Fatalf("%s %s: %v", l.name, m.name, r.Err)
			}
			b.Run(l.name+"/"+m.name, func(b *testing.B) {
				for b.Loop() {
					spec.CheckWith(loop, req, m.set)
				}
			})
		}
	}
}
