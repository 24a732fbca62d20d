package report

// The page's two pictures, drawn as inline SVG. Go computes every
// coordinate and the template writes the elements (so titles and labels,
// which carry file names, are escaped like the rest of the page). The
// layouts are deterministic: the same Result gives the same picture.
//
// The network places each cluster (a connected component of the reported
// pairs, in the Result's cluster order) on a circle of its own, and packs
// the circles left to right in rows; a force-directed layout would show
// structure inside big clusters better but moves with every change of the
// input and costs iterations, while the circles make "which documents hang
// together" plain at a glance, which is the question the picture answers.

import (
	"math"
	"strconv"
)

const (
	histBins        = 20   // bins of 5 percentage points
	maxNetworkNodes = 400  // documents drawn in the network, at most
	maxNetworkEdges = 1200 // pairs drawn in the network, at most
	netWidth        = 880
)

type histogram struct {
	Width, Height int
	Bars          []histBar
	Max           int
	Ticks         []histTick
	BaseY         int
}

type histBar struct {
	X, Y, W, H int
	Count      int
	Range      string
}

type histTick struct {
	X     int
	Label string
}

// buildHistogram counts the pairs' scores in bins of five percentage points
// (a score of exactly 1 falls in the last bin).
func buildHistogram(r *Result) histogram {
	const left, top, plotW, plotH = 40, 16, 800, 150
	h := histogram{Width: left + plotW + 20, Height: top + plotH + 40, BaseY: top + plotH}
	counts := make([]int, histBins)
	for i := range r.Pairs {
		b := min(histBins-1, int(math.Floor(r.Pairs[i].Score*histBins)))
		counts[max(0, b)]++
	}
	for _, c := range counts {
		h.Max = max(h.Max, c)
	}
	bw := plotW / histBins
	for b, c := range counts {
		bar := histBar{X: left + b*bw + 1, W: bw - 2, Count: c,
			Range: strconv.Itoa(b*100/histBins) + "–" + strconv.Itoa((b+1)*100/histBins) + "%"}
		if h.Max > 0 {
			bar.H = c * plotH / h.Max
			if c > 0 && bar.H < 2 {
				bar.H = 2
			}
		}
		bar.Y = top + plotH - bar.H
		h.Bars = append(h.Bars, bar)
	}
	for p := 0; p <= 100; p += 25 {
		h.Ticks = append(h.Ticks, histTick{X: left + p*plotW/100, Label: strconv.Itoa(p) + "%"})
	}
	return h
}

type network struct {
	Width, Height int
	Nodes         []netNode
	Edges         []netEdge
	Shown, Total  int // documents drawn / documents in reported pairs
	EdgesLeft     int // pairs among drawn documents not drawn (edge cap)
	Labels        bool
}

type netNode struct {
	X, Y   int
	Path   string
	Label  string
	LX, LY int
	Anchor string
}

type netEdge struct {
	X1, Y1, X2, Y2 int
	Width          string
	Title          string
	Rank           int
	ID             string
}

// buildNetwork lays out the documents of the reported pairs, cluster by
// cluster, at most maxNetworkNodes of them (whole clusters, in the
// Result's order) and maxNetworkEdges of their pairs (in rank order).
func buildNetwork(r *Result, detailed int) network {
	n := network{Width: netWidth}
	pos := make(map[string]int)
	x, y, rowH := 10, 10, 0
	for _, c := range r.Clusters {
		n.Total += len(c.Documents)
		if len(n.Nodes)+len(c.Documents) > maxNetworkNodes {
			continue
		}
		m := len(c.Documents)
		radius := max(36, int(float64(m)*28/(2*math.Pi)))
		box := 2*radius + 180 // room for labels either side
		if x+box > netWidth && x > 10 {
			x, y = 10, y+rowH
			rowH = 0
		}
		cx, cy := x+box/2, y+box/2
		for k, p := range c.Documents {
			angle := 2*math.Pi*float64(k)/float64(m) - math.Pi/2
			nx := cx + int(math.Round(float64(radius)*math.Cos(angle)))
			ny := cy + int(math.Round(float64(radius)*math.Sin(angle)))
			node := netNode{X: nx, Y: ny, Path: p, Label: trim(baseName(p), 18)}
			// Labels sit outside the circle, anchored away from its centre.
			node.LX = cx + int(math.Round(float64(radius+10)*math.Cos(angle)))
			node.LY = cy + int(math.Round(float64(radius+10)*math.Sin(angle))) + 4
			switch {
			case node.LX > cx+4:
				node.Anchor = "start"
			case node.LX < cx-4:
				node.Anchor = "end"
			default:
				node.Anchor = "middle"
			}
			pos[p] = len(n.Nodes)
			n.Nodes = append(n.Nodes, node)
		}
		x += box
		rowH = max(rowH, box)
	}
	n.Shown = len(n.Nodes)
	n.Height = max(60, y+rowH+10)
	n.Labels = n.Shown <= 80
	for i := range r.Pairs {
		p := &r.Pairs[i]
		a, okA := pos[p.A]
		b, okB := pos[p.B]
		if !okA || !okB {
			continue
		}
		if len(n.Edges) == maxNetworkEdges {
			n.EdgesLeft++
			continue
		}
		e := netEdge{X1: n.Nodes[a].X, Y1: n.Nodes[a].Y, X2: n.Nodes[b].X, Y2: n.Nodes[b].Y,
			Width: strconv.FormatFloat(1+3*p.Score, 'f', 1, 64), Rank: i + 1,
			Title: "#" + strconv.Itoa(i+1) + " " + percent(p.Score) + ": " + p.A + " ~ " + p.B}
		if i < detailed {
			e.ID = pairID(i + 1)
		}
		n.Edges = append(n.Edges, e)
	}
	return n
}
