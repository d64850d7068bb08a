package report

import (
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
		return tf.TF{}, badInput("key \"discretize\": the loop cannot be converted to z: %s", strings.TrimPrefix(err.Error(), "tf: "))
	}
	return out, nil
}
