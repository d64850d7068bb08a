package report

import (
	"errors"
	"fmt"
	"strings"

	"github.com/loopwise/loopwise/tf"
)

// discretize converts the continuous loop l as the "discretize" key asks.
func discretize(l tf.TF, d *Discretize) (tf.TF, error) {
	method, err := tf.ParseDiscretizeMethod(d.Method)
	if err != nil {
		return tf.TF{}, badInput("key \"discretize.method\": %v", strings.TrimPrefix(err.Error(), "tf: "))
	}
	var set *tf.DiscretizeSettings
	if d.PrewarpRadPerSec > 0 {
		set = &tf.DiscretizeSettings{PrewarpRadPerSec: d.PrewarpRadPerSec}
	}
	out, err := l.Discretize(d.SampleTimeSec, method, set)
	if err != nil {
		msg := short(err)
		if errors.Is(err, tf.ErrNotFinite) || strings.Contains(msg, "NaN") || strings.Contains(msg, "Inf") {
			// The details name intermediate values (a state matrix, a
			// mapped root of +Inf); the cause is the sample time.
			msg = fmt.Sprintf("the conversion overflows double precision: the sample time %s s is too long for the loop's poles (e^(pT) overflows); use a shorter sample time", g(Number(d.SampleTimeSec)))
		}
		return tf.TF{}, badInput("key \"discretize\": the loop cannot be converted to z: %s", msg)
	}
	return out, nil
}
