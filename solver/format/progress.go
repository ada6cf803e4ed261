package format

import (
	"io"
	"io/fs"
)

// meter counts the readers' work for Options.Progress: the bytes of the
// sites input as they are taken in, and the bytes of a travel matrix as
// each of its two passes gets through them (so a matrix counts twice).
// A nil meter counts nothing.
type meter struct {
	fn    func(done, total int64) error
	done  int64
	total int64
	err   error // the first error fn gave: the load ends with it
}

func newMeter(fn func(done, total int64) error, sites, matrix io.Reader) *meter {
	if fn == nil {
		return nil
	}
	return &meter{fn: fn, total: sizeOf(sites) + 2*sizeOf(matrix)}
}

// sizeOf is the size of what r will give, when it says (0 when not).
func sizeOf(r io.Reader) int64 {
	if r == nil {
		return 0
	}
	if l, ok := r.(interface{ Len() int }); ok {
		return int64(l.Len())
	}
	if st, ok := r.(interface{ Stat() (fs.FileInfo, error) }); ok {
		if fi, err := st.Stat(); err == nil && fi.Mode().IsRegular() {
			return fi.Size()
		}
	}
	return 0
}

// add counts k more bytes done and tells fn; its error is kept and given
// back (and every later call gives it again).
func (m *meter) add(k int64) error {
	if m == nil {
		return nil
	}
	if m.err != nil {
		return m.err
	}
	m.done += k
	if m.total > 0 && m.done > m.total {
		m.total = m.done
	}
	m.err = m.fn(m.done, m.total)
	return m.err
}

// failed is the error fn gave, if any.
func (m *meter) failed() error {
	if m == nil {
		return nil
	}
	return m.err
}

// meteredReader counts what is read through it.
type meteredReader struct {
	r io.Reader
	m *meter
}

func (mr meteredReader) Read(p []byte) (int, error) {
	n, err := mr.r.Read(p)
	if e := mr.m.add(int64(n)); e != nil {
		return n, e
	}
	return n, err
}

// Len keeps the size of the input visible to readText's sizing.
func (mr meteredReader) Len() int {
	if l, ok := mr.r.(interface{ Len() int }); ok {
		return l.Len()
	}
	return -1
}

func (m *meter) reader(r io.Reader) io.Reader {
	if m == nil || r == nil {
		return r
	}
	return meteredReader{r: r, m: m}
}

// pass counts one pass of eachRecord over a text: at reports where the
// pass has got to (a byte offset into the text).
type pass struct {
	m    *meter
	seen int64
}

func (m *meter) pass() *pass {
	if m == nil {
		return nil
	}
	return &pass{m: m}
}

func (p *pass) at(off int64) error {
	if p == nil || off <= p.seen {
		return nil
	}
	k := off - p.seen
	p.seen = off
	return p.m.add(k)
}

// end reports the pass as through text.
func (p *pass) end(text string) error {
	if p == nil {
		return nil
	}
	return p.at(int64(len(text)))
}
