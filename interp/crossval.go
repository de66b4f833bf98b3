package interp

import (
	"drygrid/internal/pool"
	"math"
)

// Residual is the leave-one-out result of one station.
type Residual struct {
	// Predicted is the estimate at the station from all the other stations
	// (NaN when not counted); Observed is its own value.
	Predicted, Observed float64
	// N is the number of stations the prediction used; when not counted, the
	// number of other stations found within the radius.
	N int
	// Counted is false when fewer than MinStations other stations lie within
	// the radius (the coverage rule): the station is left out of the figures.
	Counted bool
	// PredictedBand and ObservedBand are classify of the two values (0 when
	// not counted or when no classify was given).
	PredictedBand, ObservedBand uint8
}

// CrossValResult are the figures of a parameter set: leave-one-out
// (CrossValidate) or spatial blocks (CrossValidateBlocks).
type CrossValResult struct {
	Params   Params
	Stations []Residual // one per input point, in input order
	// N is the number of counted stations; the figures below are over them,
	// with the residual r = predicted - observed.
	N int
	// RMSE is sqrt(mean r^2), MAE mean |r|, Bias mean r: positive when the
	// map overestimates (too wet), negative when it underestimates (too dry).
	// All NaN when N is 0.
	RMSE, MAE, Bias float64
	// BandAgreement is the share (0..1) of counted stations whose predicted
	// band equals their observed band; NaN when N is 0 or classify was nil.
	BandAgreement float64
	// BlockKm is the block size of spatial block cross-validation
	// (CrossValidateBlocks), 0 for leave-one-out; Blocks the number of
	// blocks holding a station (0 for leave-one-out).
	BlockKm float64
	Blocks  int
}

// CrossValidate leaves each station out in turn and predicts its value from
// the others with the parameters p, exactly as Grid would at that point
// (same radius, neighbours, sectors, weights and 1 m rule; a co-located
// other station gives its value). classify, when not nil, maps a value to a
// band code for BandAgreement. Stations are spread over p.Workers
// goroutines; the result does not depend on their number. It fails only as
// New does (bad parameters or points).
func CrossValidate(pts []Point, p Params, classify func(z float64) uint8) (CrossValResult, error) {
	ip, err := New(pts, p)
	if err != nil {
		return CrossValResult{}, err
	}
	return ip.crossValidate(pts, classify), nil
}

// crossValidate is CrossValidate over the points ip was built from.
func (ip *Interpolator) crossValidate(pts []Point, classify func(z float64) uint8) CrossValResult {
	rank := ip.ranks(len(pts))
	res := ip.predictEach(len(pts), func(c *cands, i int) Residual {
		return ip.leaveOneOut(c, pts[i], rank[i], classify)
	})
	return summarise(ip.p, res, classify != nil)
}

// ranks gives each of the n input points its place in the interpolator's
// sorted order.
func (ip *Interpolator) ranks(n int) []int32 {
	rank := make([]int32, n)
	for r, i := range ip.id {
		rank[i] = int32(r)
	}
	return rank
}

// predictEach runs predict for the points 0..n-1 on the worker pool, each
// worker with its own candidate list, and gives the residuals in order.
func (ip *Interpolator) predictEach(n int, predict func(c *cands, i int) Residual) []Residual {
	res := make([]Residual, n)
	const chunk = 64
	cs := make([]*cands, pool.Count(n, ip.p.Workers, chunk))
	pool.Run(n, ip.p.Workers, chunk, func(w, lo, hi int) {
		if cs[w] == nil {
			cs[w] = newCands(ip.k)
		}
		for i := lo; i < hi; i++ {
			res[i] = predict(cs[w], i)
		}
	})
	return res
}

// leaveOneOut predicts station q (rank self) from the others.
func (ip *Interpolator) leaveOneOut(c *cands, q Point, self int32, classify func(z float64) uint8) Residual {
	m := ip.selectAt(q.Lon, q.Lat, c)
	for j := range m {
		if c.cs[j].rk == self {
			c.cs[j] = c.cs[m-1]
			m--
			break
		}
	}
	return ip.residualAt(c, m, q, classify)
}

// residualAt predicts station q from the first m candidates in c (the
// others once q's own are taken out) and gives the residual, with the
// bands of both values when classify is not nil.
func (ip *Interpolator) residualAt(c *cands, m int, q Point, classify func(z float64) uint8) Residual {
	cx, cy, cz := unitVector(q.Lon, q.Lat)
	v, used, ok := ip.estimateAt(c, m, q.Lon, q.Lat, cx, cy, cz)
	r := Residual{Predicted: math.NaN(), Observed: q.Z, N: used, Counted: ok}
	if ok {
		r.Predicted = v
		if classify != nil {
			r.PredictedBand, r.ObservedBand = classify(v), classify(q.Z)
		}
	}
	return r
}

// summarise adds up the residuals in input order.
func summarise(p Params, res []Residual, banded bool) CrossValResult {
	out := CrossValResult{Params: p, Stations: res}
	var s, sa, s2 float64
	agree := 0
	for _, r := range res {
		if !r.Counted {
			continue
		}
		d := r.Predicted - r.Observed
		s += d
		sa += math.Abs(d)
		s2 += d * d
		out.N++
		agree += b2i(r.PredictedBand == r.ObservedBand)
	}
	if out.N == 0 {
		out.RMSE, out.MAE, out.Bias, out.BandAgreement = math.NaN(), math.NaN(), math.NaN(), math.NaN()
		return out
	}
	nf := float64(out.N)
	out.RMSE, out.MAE, out.Bias = math.Sqrt(s2/nf), sa/nf, s/nf
	out.BandAgreement = math.NaN()
	if banded {
		out.BandAgreement = float64(agree) / nf
	}
	return out
}
