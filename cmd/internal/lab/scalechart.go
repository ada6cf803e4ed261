package lab

import (
	"fmt"
	"math"
	"sort"
	"strings"
)

// drawScaleChart plots the time per iteration against n on log-log axes,
// one line per window tightness, with guides of slope 1 (linear) and 2
// (quadratic) through the smallest measured point: a line steeper than the
// quadratic guide would break the target.
func drawScaleChart(rows []scaleRow) string {
	const (
		w, h                  = 720, 420
		left, right, top, bot = 70, 210, 36, 56
		plotW, plotH          = w - left - right, h - top - bot
		title                 = "Time per search iteration against the number of sites"
	)
	by := map[string][]scaleRow{}
	var order []string
	minN, maxN := math.Inf(1), math.Inf(-1)
	minY, maxY := math.Inf(1), math.Inf(-1)
	for _, r := range rows {
		if r.SecondsPerIteration <= 0 {
			continue
		}
		if _, ok := by[r.Tightness]; !ok {
			order = append(order, r.Tightness)
		}
		by[r.Tightness] = append(by[r.Tightness], r)
		ms := 1000 * r.SecondsPerIteration
		minN, maxN = math.Min(minN, float64(r.N)), math.Max(maxN, float64(r.N))
		minY, maxY = math.Min(minY, ms), math.Max(maxY, ms)
	}
	sort.SliceStable(order, func(i, j int) bool { return tightRank(order[i]) < tightRank(order[j]) })
	var b strings.Builder
	fmt.Fprintf(&b, `<svg xmlns="http://www.w3.org/2000/svg" width="%d" height="%d" viewBox="0 0 %d %d" role="img" aria-labelledby="t d" font-family="sans-serif" font-size="12">`+"\n", w, h, w, h)
	fmt.Fprintf(&b, "<title id=\"t\">%s</title>\n<desc id=\"d\">Milliseconds of CPU per iteration for generated instances of growing size, one line per window tightness, with linear and quadratic guides.</desc>\n", title)
	fmt.Fprintf(&b, `<rect width="%d" height="%d" fill="#ffffff"/>`+"\n", w, h)
	fmt.Fprintf(&b, `<text x="%d" y="20" font-size="14" font-weight="bold">%s</text>`+"\n", left, title)
	if len(order) == 0 {
		fmt.Fprintf(&b, `<text x="%d" y="%d" text-anchor="middle">no rows with a time per iteration</text>`+"\n</svg>\n", left+plotW/2, top+plotH/2)
		return b.String()
	}
	if maxN <= minN {
		maxN = minN * 10
	}
	// The quadratic guide sets the top of the y range.
	maxY = math.Max(maxY, minY*math.Pow(maxN/minN, 2))
	xlo, xhi := math.Log10(minN/1.25), math.Log10(maxN*1.25)
	ylo, yhi := math.Floor(math.Log10(minY)), math.Ceil(math.Log10(maxY))
	x := func(n float64) float64 { return left + (math.Log10(n)-xlo)/(xhi-xlo)*plotW }
	y := func(v float64) float64 { return top + (yhi-math.Log10(v))/(yhi-ylo)*plotH }
	for e := math.Floor(xlo); e <= xhi; e++ {
		for _, m := range []float64{1, 2, 5} {
			n := m * math.Pow(10, e)
			if math.Log10(n) < xlo || math.Log10(n) > xhi {
				continue
			}
			fmt.Fprintf(&b, `<line x1="%.1f" y1="%d" x2="%.1f" y2="%d" stroke="#dddddd"/>`+"\n", x(n), top, x(n), top+plotH)
			fmt.Fprintf(&b, `<text x="%.1f" y="%d" text-anchor="middle">%g</text>`+"\n", x(n), top+plotH+16, n)
		}
	}
	for e := ylo; e <= yhi; e++ {
		v := math.Pow(10, e)
		fmt.Fprintf(&b, `<line x1="%d" y1="%.1f" x2="%d" y2="%.1f" stroke="#dddddd"/>`+"\n", left, y(v), left+plotW, y(v))
		fmt.Fprintf(&b, `<text x="%d" y="%.1f" text-anchor="end" dominant-baseline="middle">%g ms</text>`+"\n", left-6, y(v), v)
	}
	fmt.Fprintf(&b, `<rect x="%d" y="%d" width="%d" height="%d" fill="none" stroke="#444444"/>`+"\n", left, top, plotW, plotH)
	fmt.Fprintf(&b, `<text x="%d" y="%d" text-anchor="middle">sites n (logarithmic)</text>`+"\n", left+plotW/2, h-14)
	fmt.Fprintf(&b, `<text x="16" y="%d" text-anchor="middle" transform="rotate(-90 16 %d)">time per iteration (logarithmic)</text>`+"\n", top+plotH/2, top+plotH/2)
	// Guides through the smallest n's fastest point.
	for k, g := range []struct {
		p    float64
		name string
	}{{1, "∝ n"}, {2, "∝ n²"}} {
		y0 := minY
		fmt.Fprintf(&b, `<line x1="%.1f" y1="%.1f" x2="%.1f" y2="%.1f" stroke="#999999" stroke-dasharray="4 4"/>`+"\n", x(minN), y(y0), x(maxN), y(y0*math.Pow(maxN/minN, g.p)))
		fmt.Fprintf(&b, `<text x="%.1f" y="%.1f" fill="#666666">%s</text>`+"\n", x(maxN)+4, y(y0*math.Pow(maxN/minN, g.p))+float64(4*k), g.name)
	}
	for i, t := range order {
		rs := by[t]
		sort.Slice(rs, func(a, c int) bool { return rs[a].N < rs[c].N })
		col := chartColours[i%len(chartColours)]
		dash := chartDashes[i%len(chartDashes)]
		dashAttr := ""
		if dash != "" {
			dashAttr = fmt.Sprintf(` stroke-dasharray="%s"`, dash)
		}
		var pts []string
		for _, r := range rs {
			pts = append(pts, fmt.Sprintf("%.1f,%.1f", x(float64(r.N)), y(1000*r.SecondsPerIteration)))
		}
		k, _ := slope(rs)
		fmt.Fprintf(&b, `<polyline fill="none" stroke="%s" stroke-width="2"%s points="%s"><title>%s windows: slope %.2f</title></polyline>`+"\n", col, dashAttr, strings.Join(pts, " "), t, k)
		for _, p := range pts {
			xy := strings.Split(p, ",")
			fmt.Fprintf(&b, `<circle cx="%s" cy="%s" r="3" fill="%s"/>`+"\n", xy[0], xy[1], col)
		}
		ly := top + 8 + i*22
		lx := left + plotW + 44
		fmt.Fprintf(&b, `<line x1="%d" y1="%d" x2="%d" y2="%d" stroke="%s" stroke-width="2"%s/>`+"\n", lx, ly, lx+26, ly, col, dashAttr)
		label := t
		if !math.IsNaN(k) {
			label = fmt.Sprintf("%s (slope %.2f)", t, k)
		}
		fmt.Fprintf(&b, `<text x="%d" y="%d" dominant-baseline="middle">%s</text>`+"\n", lx+32, ly, label)
	}
	b.WriteString("</svg>\n")
	return b.String()
}
