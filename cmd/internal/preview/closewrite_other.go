//go:build !linux

package preview

// closeWatch reports files closed after writing where the system says so
// (closewrite_linux.go); elsewhere there is none, and the quiet period
// alone decides when a rebuild starts.
type closeWatch struct{}

type closeEvent struct{ name string }

func newCloseWatch() *closeWatch                { return nil }
func (c *closeWatch) closed() <-chan closeEvent { return nil }
func (c *closeWatch) current(closeEvent) bool   { return false }
func (c *closeWatch) add(string)                {}
func (c *closeWatch) remove(string)             {}
func (c *closeWatch) close()                    {}
