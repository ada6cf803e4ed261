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

// TestTravelFromLatLonDefaults checks travel from lat,lon at the defaults
// (mean Earth radius 6371 km, road factor 1.3, 50 km/h) against distances
// that do not come from the code:
//   - one degree along a meridian is an arc of 6371·π/180 = 111.19493 km
//     (arc length = radius × angle, geometry);
//   - Nashville BNA to Los Angeles LAX is 2887.2599506 km on a sphere of
//     6372.8 km (Rosetta Code, "Haversine formula", recalled from memory),
//     so 2887.2599506 × 6371/6372.8 = 2886.44444 km on one of 6371 km.
//
// Travel is km × 1.3 / 50 h, in whole seconds.
func TestTravelFromLatLonDefaults(t *testing.T) {
	cases := []struct {
		name, sites string
		// seconds worked by hand: km × 1.3 / 50 × 3600, rounded
		sec int64
	}{
		// 111.19493 × 1.3 / 50 × 3600 = 10407.85 s
		{"a degree of meridian", "id,lat,lon\nA,0,0\nB,1,0\n", 10408},
		{"a degree of meridian, southern", "id,lat,lon\nA,-45.5,7.25\nB,-44.5,7.25\n", 10408},
		// 2886.44444 × 1.3 / 50 × 3600 = 270171.20 s
		{"BNA to LAX", "id,latitude,longitude\nBNA,36.12,-86.67\nLAX,33.94,-118.40\n", 270171},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d, err := Load(strings.NewReader(c.sites), nil, Options{})
			require.NoError(t, err)
			assert.Equal(t, c.sec*SitesScale/60, d.Instance.T(0, 1), "%d s", c.sec)
			assert.Equal(t, d.Instance.T(0, 1), d.Instance.T(1, 0), "great-circle travel is symmetric")
			assert.Contains(t, d.Travel, "road factor 1.3 at 50 km/h")
		})
	}
	d, err := Load(strings.NewReader("id,lat,lon\nA,45.0,3.0\nB,45.1,3.1\n"), nil, Options{})
	require.NoError(t, err)
	require.Len(t, d.LatLon, 2)
	assert.Equal(t, [2]float64{45.1, 3.1}, d.LatLon[1])
}
