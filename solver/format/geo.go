package format

import "math"

// EarthRadiusKm is the mean Earth radius (the IUGG mean radius R1) used by
// Haversine.
const EarthRadiusKm = 6371.0

// Defaults for travel times computed from coordinates. A road factor of
// about 1.3 between straight-line and road distance, and 50 km/h as an
// average speed for mixed town and country driving, are common practice
// for rough planning; real road times differ, so measured matrices are
// better where they exist.
const (
	DefaultSpeedKmh   = 50.0
	DefaultRoadFactor = 1.3
)

// Haversine is the great-circle distance in km between two points given in
// decimal degrees, by the haversine formula on a sphere of EarthRadiusKm.
func Haversine(lat1, lon1, lat2, lon2 float64) float64 {
	return HaversineR(lat1, lon1, lat2, lon2, EarthRadiusKm)
}

// HaversineR is Haversine on a sphere of radius r (the unit of the result).
func HaversineR(lat1, lon1, lat2, lon2, r float64) float64 {
	const rad = math.Pi / 180
	p1, p2 := lat1*rad, lat2*rad
	dp := (lat2 - lat1) * rad
	dl := (lon2 - lon1) * rad
	a := math.Sin(dp/2)*math.Sin(dp/2) + math.Cos(p1)*math.Cos(p2)*math.Sin(dl/2)*math.Sin(dl/2)
	if a > 1 {
		a = 1
	}
	return 2 * r * math.Asin(math.Sqrt(a))
}

// travelSeconds converts a road distance to internal units at speed (per
// hour), rounded to whole seconds: estimates carry no finer precision.
func travelSeconds(dist, speed float64) int64 {
	sec := math.Round(dist / speed * 3600)
	return int64(sec) * perSecond
}

// coordTravel builds the travel matrix of s from coordinates: haversine on
// lat,lon (when latlon) or Euclidean on x,y, times factor, at speed.
func coordTravel(s *Sites, latlon bool, speed, factor float64) []int64 {
	n := len(s.Sites)
	t := make([]int64, n*n)
	for i, a := range s.Sites {
		for j, b := range s.Sites {
			if i == j {
				continue
			}
			var d float64
			if latlon {
				d = Haversine(a.Lat, a.Lon, b.Lat, b.Lon)
			} else {
				d = math.Hypot(a.X-b.X, a.Y-b.Y)
			}
			t[i*n+j] = travelSeconds(d*factor, speed)
		}
	}
	return t
}
