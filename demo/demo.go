// Package demo generates the invented data set that `pcqc demo` audits: a
// river-chemistry monitoring survey. Nothing in it was measured; every value
// comes from the planted model below, generated deterministically, so the
// demo shows what pcqc finds when the truth is known.
//
// # The scenario (invented)
//
// Twelve sampling stations, ST01 to ST12, along an invented river system are
// visited once a month from January 2024 to August 2025: 240 water samples.
// Thirteen variables are reported, with their units in their names.
//
// # Planted truth
//
// Three latent processes drive the chemistry, plus independent noise:
//
//  1. Farm runoff: stations with more farmland upstream, more so in the wet
//     months, carry more nitrate, phosphate, turbidity, suspended solids and
//     some ammonium.
//  2. Winter road salt: stations near roads, in the winter months, carry more
//     chloride and sodium, and so a higher conductivity.
//  3. Summer warming and oxygen loss: in summer the water is warmer, holds
//     less dissolved oxygen, grows more algae (chlorophyll a) and its pH rises.
//
// Calcium follows the geology of each station and none of the processes.
//
// Planted anomalies, each breaking the correlation structure:
//
//   - A spill of farm slurry reaches ST07 in March and April 2025 and ST08 in
//     March 2025: ammonium and phosphate far above anything the runoff process
//     produces, dissolved oxygen depleted, while nitrate and turbidity stay
//     ordinary. Sample ids ST07-2025-03, ST07-2025-04, ST08-2025-03.
//   - A unit mix-up: the July 2024 water temperature of ST05 was entered in
//     degrees Fahrenheit. Sample id ST05-2024-07.
//
// A second, later batch (September 2025 to February 2026, the same twelve
// stations, 72 samples) follows the same model but for one planted drift:
// from October 2025 on, the conductivity probes read 450 µS/cm high after a
// faulty recalibration. pcqc demo applies the survey's model to it.
package demo

import (
	"bytes"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
)

// Columns of the demo table, in order. SampleID is the id column and Station
// the group column.
const (
	SampleID = "sample_id"
	Station  = "station"
)

// Variables are the 13 measured variables, with units in their names.
var Variables = []string{
	"nitrate_mg_L",
	"phosphate_mg_L",
	"ammonium_mg_L",
	"turbidity_NTU",
	"suspended_solids_mg_L",
	"chloride_mg_L",
	"sodium_mg_L",
	"conductivity_uS_cm",
	"water_temp_C",
	"dissolved_oxygen_mg_L",
	"pH",
	"chlorophyll_a_ug_L",
	"calcium_mg_L",
}

// Processes is the number of planted latent processes.
const Processes = 3

// DriftVariable, DriftFrom and DriftOffset describe the planted drift of
// the later batch: from that month on the variable reads DriftOffset high.
const (
	DriftVariable = "conductivity_uS_cm"
	DriftFrom     = "2025-10"
	DriftOffset   = 450.0
)

// SpillSamples and UnitMixUpSample are the planted anomalies in the survey.
var (
	SpillSamples    = []string{"ST07-2025-03", "ST07-2025-04", "ST08-2025-03"}
	UnitMixUpSample = "ST05-2024-07"
)

// station holds the invented character of one sampling station.
type station struct {
	code    string
	farm    float64 // share of farmland upstream, 0–1
	road    float64 // exposure to winter road run-off, 0–1
	calcium float64 // geological background, mg/L
}

var stations = func() []station {
	farm := []float64{0.10, 0.15, 0.25, 0.35, 0.45, 0.55, 0.70, 0.80, 0.60, 0.40, 0.20, 0.90}
	road := []float64{0.80, 0.20, 0.60, 0.10, 0.90, 0.30, 0.50, 0.15, 0.70, 0.40, 1.00, 0.05}
	calc := []float64{42, 48, 55, 61, 38, 70, 66, 58, 45, 52, 75, 63}
	out := make([]station, len(farm))
	for s := range out {
		out[s] = station{code: fmt.Sprintf("ST%02d", s+1), farm: farm[s], road: road[s], calcium: calc[s]}
	}
	return out
}()

type month struct{ year, month int }

func (m month) String() string { return fmt.Sprintf("%04d-%02d", m.year, m.month) }

func months(from month, count int) []month {
	out := make([]month, count)
	y, mo := from.year, from.month
	for i := range out {
		out[i] = month{y, mo}
		mo++
		if mo > 12 {
			y, mo = y+1, 1
		}
	}
	return out
}

// Seasonal drivers, each in [0, 1].
func wetness(m int) float64 { // wettest in April and October, driest in January and July
	return 0.5 + 0.5*math.Cos(4*math.Pi*float64(m-4)/12)
}

func winter(m int) float64 { // road salting from December to March
	switch m {
	case 12, 1, 2:
		return 1
	case 3, 11:
		return 0.5
	}
	return 0
}

func summer(m int) float64 { // 0 in mid-January, 1 in mid-July
	return 0.5 - 0.5*math.Cos(2*math.Pi*float64(m-1)/12)
}

// Survey returns the main survey table (240 samples) as CSV bytes.
func Survey() []byte {
	return generate(months(month{2024, 1}, 20), 20240601, false)
}

// LaterBatch returns the later batch (72 samples, September 2025 to
// February 2026) as CSV bytes, with the planted conductivity drift.
func LaterBatch() []byte {
	return generate(months(month{2025, 9}, 6), 20251201, true)
}

func generate(visits []month, seed uint64, drift bool) []byte {
	rng := rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))
	norm := rng.NormFloat64
	var b bytes.Buffer
	b.WriteString(SampleID + "," + Station)
	for _, v := range Variables {
		b.WriteString("," + v)
	}
	b.WriteString("\n")
	for _, st := range stations {
		for _, m := range visits {
			id := st.code + "-" + m.String()
			// Latent processes, each roughly zero-mean with unit spread.
			runoff := 2.2*(st.farm*(0.5+wetness(m.month))-0.45) + 0.55*norm()
			salt := 1.8*(st.road-0.5) + 0.8*st.road*(winter(m.month)-0.35) + 0.45*norm()
			warm := 2.6*(summer(m.month)-0.5) + 0.5*norm()

			nitrate := math.Exp(math.Log(2.5) + 0.55*runoff + 0.12*norm())
			phosphate := math.Exp(math.Log(0.08) + 0.60*runoff + 0.15*norm())
			ammonium := math.Exp(math.Log(0.05) + 0.30*runoff + 0.25*warm + 0.25*norm())
			turbidity := math.Exp(math.Log(8) + 0.65*runoff + 0.18*norm())
			solids := math.Exp(math.Log(14) + 0.60*runoff + 0.18*norm())
			chloride := math.Exp(math.Log(32) + 0.55*salt + 0.30*norm())
			sodium := math.Exp(math.Log(19) + 0.52*salt + 0.30*norm())
			conductivity := 160 + 2.3*chloride + 2.6*sodium + 3.0*st.calcium + 25*norm()
			temp := math.Max(0.5, 11.5+4.5*warm+2.2*norm())
			saturation := 14.62 - 0.3898*temp + 0.006969*temp*temp // mg/L at sea level
			oxygen := saturation * (0.93 - 0.035*warm + 0.025*norm())
			ph := 7.55 + 0.12*warm - 0.04*runoff + 0.14*norm()
			chlorophyll := math.Exp(math.Log(6) + 0.45*warm + 0.40*norm())
			calcium := st.calcium * math.Exp(0.06*norm())

			switch {
			case contains(SpillSamples, id):
				ammonium = 0.6 + 0.3*rng.Float64()
				phosphate = 0.45 + 0.2*rng.Float64()
				oxygen = 4.0 + 0.8*rng.Float64()
			case id == UnitMixUpSample:
				temp = temp*9/5 + 32
			}
			if drift && m.String() >= DriftFrom {
				conductivity += DriftOffset
			}

			fmt.Fprintf(&b, "%s,%s", id, st.code)
			for _, v := range []struct {
				x   float64
				dec int
			}{
				{nitrate, 2}, {phosphate, 3}, {ammonium, 3}, {turbidity, 1}, {solids, 1},
				{chloride, 1}, {sodium, 1}, {conductivity, 0}, {temp, 1}, {oxygen, 2},
				{ph, 2}, {chlorophyll, 1}, {calcium, 1},
			} {
				b.WriteByte(',')
				b.WriteString(strconv.FormatFloat(v.x, 'f', v.dec, 64))
			}
			b.WriteByte('\n')
		}
	}
	return b.Bytes()
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}
