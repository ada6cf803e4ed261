package format

import (
	"math"
	"strings"
	"testing"

	"github.com/stretchr/testify/assert"
	"github.com/stretchr/testify/require"
)

// Source: Rosetta Code, task "Haversine formula": Nashville International
// Airport (BNA, N 36°7.2', W 86°40.2') to Los Angeles International Airport
// (LAX, N 33°56.4', W 118°24.0'), on a sphere of radius 6372.8 km, gives
// 2887.2599506071106 km. The figure is recalled from memory of that page,
// not re-read here.
func TestHaversineRosettaCodeExample(t *testing.T) {
	d := HaversineR(36.12, -86.67, 33.94, -118.40, 6372.8)
	assert.InDelta(t, 2887.2599506071106, d, 1e-6)
}

// Source: Ed Williams, "Aviation Formulary", worked example of the
// great-circle distance from LAX (33°57'N, 118°24'W) to JFK (40°38'N,
// 73°47'W): d = 0.623585 radians, about 2144 nautical miles. Figures
// recalled from memory of that page, not re-read here.
func TestHaversineAviationFormularyExample(t *testing.T) {
	lat1, lon1 := 33+57.0/60, -(118 + 24.0/60)
	lat2, lon2 := 40+38.0/60, -(73 + 47.0/60)
	rad := HaversineR(lat1, lon1, lat2, lon2, 1)
	assert.InDelta(t, 0.623585, rad, 1e-6)
	nm := rad * 180 / math.Pi * 60 // one nautical mile is one minute of arc
	assert.InDelta(t, 2144, nm, 0.5)
}

func TestHaversineProperties(t *testing.T) {
	assert.Equal(t, 0.0, Haversine(45, 3, 45, 3))
	// Antipodes: half the circumference, the formula's worst case.
	assert.InDelta(t, math.Pi*EarthRadiusKm, Haversine(0, 0, 0, 180), 1e-6)
	assert.InDelta(t, Haversine(10, 20, 30, 40), Haversine(30, 40, 10, 20), 1e-9)
}

func TestTravelFromXY(t *testing.T) {
	// A 3-4-5 right triangle at 60 units per hour: 5 units take 5 minutes.
	d, err := Load(strings.NewReader("id,x,y\nA,0,0\nB,3,4\n"), nil, Options{Speed: 60})
	require.NoError(t, err)
	assert.Equal(t, 5*SitesScale, d.Instance.T(0, 1))
	assert.Equal(t, 5*SitesScale, d.Instance.T(1, 0))
	// A road factor applies to x,y when given.
	d, err = Load(strings.NewReader("id,x,y\nA,0,0\nB,3,4\n"), nil, Options{Speed: 60, RoadFactor: 1.2})
	require.NoError(t, err)
	assert.Equal(t, 6*SitesScale, d.Instance.T(0, 1))
}

func TestTravelFromLatLonDefaults(t *testing.T) {
	src := "id,lat,lon\nA,45.0,3.0\nB,45.1,3.1\n"
	d, err := Load(strings.NewReader(src), nil, Options{})
	require.NoError(t, err)
	km := Haversine(45, 3, 45.1, 3.1)
	sec := math.Round(km * DefaultRoadFactor / DefaultSpeedKmh * 3600)
	assert.Equal(t, int64(sec)*perSecond, d.Instance.T(0, 1))
	assert.Equal(t, d.Instance.T(0, 1), d.Instance.T(1, 0))
	assert.Contains(t, d.Travel, "road factor 1.3 at 50 km/h")
	require.Len(t, d.LatLon, 2)
	assert.Equal(t, [2]float64{45.1, 3.1}, d.LatLon[1])
}
