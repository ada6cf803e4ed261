package lab

import (
	"fmt"
	"html"
	"math"
	"sort"
	"strings"
)

// chartColours are told apart by hue and by lightness, so that the lines
// stay distinct in grey print too; each line also has its own dash pattern.
var chartColours = []string{"#1b6ca8", "#c2452d", "#2f8f46", "#7a4fa3", "#b58400", "#4a4a4a", "#d16ba5", "#00838f"}
var chartDashes = []string{"", "6 3", "2 3", "8 3 2 3", "1 2", "10 4", "4 2 1 2", "3 5"}

// chartSeries is one family's curve: the sorted times at which its runs
// first reached the best-known value, out of total runs with a best-known.
type chartSeries struct {
	family string
	times  []float64
	total  int
	budget float64
}

func chartData(rows []benchRow) []chartSeries {
	by := map[string]*chartSeries{}
	var order []string
	for _, r := range rows {
		if !r.HasBest {
			continue
		}
		s, ok := by[r.Family]
		if !ok {
			s = &chartSeries{family: r.Family}
			by[r.Family] = s
			order = append(order, r.Family)
		}
		s.total++
		s.budget = math.Max(s.budget, r.Budget)
		if r.AtBest && r.SecondsToBestKnown >= 0 {
			s.times = append(s.times, r.SecondsToBestKnown)
		}
	}
	out := make([]chartSeries, 0, len(order))
	for _, f := range order {
		s := by[f]
		sort.Float64s(s.times)
		out = append(out, *s)
	}
	return out
}

// drawChart renders the share of runs at the best-known value against
// time, one step line per family, on a logarithmic time axis.
func drawChart(rows []benchRow) string {
	series := chartData(rows)
	const (
		w, h                   = 820, 440
		left, right, top, bot  = 64, 260, 36, 56
		minT                   = 0.001
		plotW, plotH           = w - left - right, h - top - bot
		titleText              = "Share of instances at the best-known value against time"
		descriptionOfTheFigure = "One step line per benchmark family: the share of its instances whose run has reached the published best-known travel time by each moment."
	)
	maxT := 1.0
	for _, s := range series {
		maxT = math.Max(maxT, s.budget)
		for _, t := range s.times {
			maxT = math.Max(maxT, t)
		}
	}
	lo, hi := math.Log10(minT), math.Log10(maxT)
	x := func(t float64) float64 {
		if t < minT {
			t = minT
		}
		return left + (math.Log10(t)-lo)/(hi-lo)*plotW
	}
	y := func(share float64) float64 { return top + (1-share)*plotH }

	var b strings.Builder
	fmt.Fprintf(&b, `<svg xmlns="http://www.w3.org/2000/svg" width="%d" height="%d" viewBox="0 0 %d %d" role="img" aria-labelledby="t d" font-family="sans-serif" font-size="12">`+"\n", w, h, w, h)
	fmt.Fprintf(&b, "<title id=\"t\">%s</title>\n<desc id=\"d\">%s</desc>\n", titleText, descriptionOfTheFigure)
	fmt.Fprintf(&b, `<rect width="%d" height="%d" fill="#ffffff"/>`+"\n", w, h)
	fmt.Fprintf(&b, `<text x="%d" y="20" font-size="14" font-weight="bold">%s</text>`+"\n", left, titleText)
	// Grid and axes.
	for k := 0; k <= 4; k++ {
		share := float64(k) / 4
		fmt.Fprintf(&b, `<line x1="%d" y1="%.1f" x2="%d" y2="%.1f" stroke="#dddddd"/>`+"\n", left, y(share), left+plotW, y(share))
		fmt.Fprintf(&b, `<text x="%d" y="%.1f" text-anchor="end" dominant-baseline="middle">%d%%</text>`+"\n", left-6, y(share), k*25)
	}
	ticks := []float64{}
	for e := int(lo); float64(e) <= hi+1e-9; e++ {
		ticks = append(ticks, math.Pow(10, float64(e)))
	}
	// The axis ends at the longest budget; label it when it is no decade.
	if last := ticks[len(ticks)-1]; maxT/last > 1.5 {
		ticks = append(ticks, maxT)
	}
	for _, t := range ticks {
		fmt.Fprintf(&b, `<line x1="%.1f" y1="%d" x2="%.1f" y2="%d" stroke="#dddddd"/>`+"\n", x(t), top, x(t), top+plotH)
		fmt.Fprintf(&b, `<text x="%.1f" y="%d" text-anchor="middle">%s</text>`+"\n", x(t), top+plotH+16, secondsLabel(t))
	}
	fmt.Fprintf(&b, `<rect x="%d" y="%d" width="%d" height="%d" fill="none" stroke="#444444"/>`+"\n", left, top, plotW, plotH)
	fmt.Fprintf(&b, `<text x="%d" y="%d" text-anchor="middle">time since the start of the run (seconds, logarithmic)</text>`+"\n", left+plotW/2, h-14)
	fmt.Fprintf(&b, `<text x="16" y="%d" text-anchor="middle" transform="rotate(-90 16 %d)">instances at best-known</text>`+"\n", top+plotH/2, top+plotH/2)
	// One step line per family.
	for i, s := range series {
		col := chartColours[i%len(chartColours)]
		dash := chartDashes[i%len(chartDashes)]
		var pts []string
		pts = append(pts, fmt.Sprintf("%.1f,%.1f", x(minT), y(0)))
		cur := 0.0
		for k, t := range s.times {
			next := float64(k+1) / float64(s.total)
			pts = append(pts, fmt.Sprintf("%.1f,%.1f", x(t), y(cur)), fmt.Sprintf("%.1f,%.1f", x(t), y(next)))
			cur = next
		}
		end := s.budget
		if end <= 0 {
			end = maxT
		}
		pts = append(pts, fmt.Sprintf("%.1f,%.1f", x(end), y(cur)))
		dashAttr := ""
		if dash != "" {
			dashAttr = fmt.Sprintf(` stroke-dasharray="%s"`, dash)
		}
		fmt.Fprintf(&b, `<polyline fill="none" stroke="%s" stroke-width="2"%s points="%s"><title>%s: %d of %d at best-known</title></polyline>`+"\n",
			col, dashAttr, strings.Join(pts, " "), html.EscapeString(s.family), len(s.times), s.total)
		// Legend.
		ly := top + 8 + i*22
		lx := left + plotW + 14
		fmt.Fprintf(&b, `<line x1="%d" y1="%d" x2="%d" y2="%d" stroke="%s" stroke-width="2"%s/>`+"\n", lx, ly, lx+26, ly, col, dashAttr)
		fmt.Fprintf(&b, `<text x="%d" y="%d" dominant-baseline="middle">%s %d/%d</text>`+"\n", lx+32, ly, html.EscapeString(s.family), len(s.times), s.total)
	}
	if len(series) == 0 {
		fmt.Fprintf(&b, `<text x="%d" y="%d" text-anchor="middle">no runs with a best-known value</text>`+"\n", left+plotW/2, top+plotH/2)
	}
	b.WriteString("</svg>\n")
	return b.String()
}

func secondsLabel(t float64) string {
	switch {
	case t >= 1:
		return fmt.Sprintf("%g s", t)
	case t >= 0.001:
		return fmt.Sprintf("%g ms", t*1000)
	}
	return fmt.Sprintf("%g s", t)
}
