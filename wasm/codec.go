package main

import (
	"visitline/solver/format"
	"visitline/solver/jsonlite"
)

// The messages' JSON, written and read by hand through package jsonlite
// (encoding/json, with reflect, fmt and os behind it, was most of a
// megabyte of engine.wasm). The bytes are those encoding/json writes from
// the types' tags (SetEscapeHTML(false)), and the reading is its
// Unmarshal's, errors included; codec_test.go compares the two.

var inboundNames = []string{"type", "name", "text", "matrix", "matrix_name", "options", "vehicles", "vehicles_name", "fleet", "load_id",
	"minimize", "budget", "iterations", "seed", "mix", "fixed", "objective", "fewest_late", "no_bound", "workers", "role", "worker",
	"clicked_at", "route", "routes", "vehicle", "format", "date"}

var optionNames = []string{"start", "end", "shift_start", "matrix_unit", "speed", "road_factor", "done", "now"}

var routeInNames = []string{"vehicle", "visits"}

// decodeInbound reads a message from the page, as json.Unmarshal into an
// inbound would.
func decodeInbound(raw []byte) (inbound, error) {
	var m inbound
	d := jsonlite.NewDecoder(raw)
	d.Object(inboundNames, func(name string) {
		switch name {
		case "type":
			d.String(&m.Type)
		case "name":
			d.String(&m.Name)
		case "text":
			d.String(&m.Text)
		case "matrix":
			d.String(&m.Matrix)
		case "matrix_name":
			d.String(&m.MatrixName)
		case "options":
			o := &m.Options
			d.Object(optionNames, func(name string) {
				switch name {
				case "start":
					d.String(&o.Start)
				case "end":
					d.String(&o.End)
				case "shift_start":
					d.String(&o.ShiftStart)
				case "matrix_unit":
					d.String(&o.MatrixUnit)
				case "speed":
					d.Float(&o.Speed)
				case "road_factor":
					d.Float(&o.RoadFactor)
				case "done":
					d.Strings(&o.Done)
				case "now":
					d.String(&o.Now)
				}
			})
		case "vehicles":
			d.String(&m.Vehicles)
		case "vehicles_name":
			d.String(&m.VehiclesName)
		case "fleet":
			d.IntInt(&m.Fleet)
		case "load_id":
			d.IntInt(&m.LoadID)
		case "minimize":
			d.String(&m.Minimize)
		case "budget":
			d.Float(&m.Budget)
		case "iterations":
			d.IntInt(&m.Iterations)
		case "seed":
			d.Int(&m.Seed)
		case "mix":
			d.FloatMap(&m.Mix)
		case "fixed":
			d.Bool(&m.Fixed)
		case "objective":
			d.String(&m.Objective)
		case "fewest_late":
			d.Bool(&m.FewestLate)
		case "no_bound":
			d.Bool(&m.NoBound)
		case "workers":
			d.IntInt(&m.Workers)
		case "role":
			d.String(&m.Role)
		case "worker":
			d.IntInt(&m.Worker)
		case "clicked_at":
			d.Float(&m.ClickedAt)
		case "route":
			d.Ints(&m.Route)
		case "routes":
			jsonlite.List(d, &m.Routes, func(r *routeIn) {
				d.Object(routeInNames, func(name string) {
					if name == "vehicle" {
						d.String(&r.Vehicle)
					} else {
						d.Ints(&r.Visits)
					}
				})
			})
		case "vehicle":
			d.String(&m.Vehicle)
		case "format":
			d.String(&m.Format)
		case "date":
			d.String(&m.Date)
		}
	})
	return m, d.Err()
}

// outMessage is a worker-to-page message that writes its own JSON.
type outMessage interface {
	encode(w *jsonlite.Writer)
}

// encodeMessage writes m as encoding/json would (no HTML escapes), or
// gives the error for a NaN or an infinity.
func encodeMessage(m outMessage) ([]byte, error) {
	w := jsonlite.NewWriter(false, false)
	m.encode(w)
	return w.Bytes()
}

func (m readyMsg) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("type", m.Type)
	w.StringsField("operators", m.Operators)
	w.EndObject()
}

func optLoadID(w *jsonlite.Writer, id int) {
	if id != 0 {
		w.IntField("load_id", int64(id))
	}
}

func (m loadedMsg) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("type", m.Type)
	optLoadID(w, m.LoadID)
	w.Key("summary")
	m.Summary.encode(w)
	w.EndObject()
}

func (m errorsMsg) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("type", m.Type)
	optLoadID(w, m.LoadID)
	w.Key("errors")
	inputErrorsJSON(w, m.Errors)
	w.EndObject()
}

func inputErrorsJSON(w *jsonlite.Writer, list []InputError) {
	if list == nil {
		w.Null()
		return
	}
	w.BeginArray()
	for _, e := range list {
		w.BeginObject()
		w.StringField("file", e.File)
		w.IntField("line", int64(e.Line))
		w.IntField("column", int64(e.Column))
		w.StringField("field", e.Field)
		w.StringField("message", e.Message)
		w.StringField("text", e.Text)
		w.EndObject()
	}
	w.EndArray()
}

func (m readingMsg) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("type", m.Type)
	optLoadID(w, m.LoadID)
	w.IntField("done", m.Done)
	w.IntField("total", m.Total)
	w.EndObject()
}

func (m loadCancelledMsg) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("type", m.Type)
	optLoadID(w, m.LoadID)
	w.EndObject()
}

func (m startedMsg) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("type", m.Type)
	w.IntField("run", int64(m.Run))
	optString(w, "role", m.Role)
	w.FloatField("budget", m.Budget)
	w.IntField("seed", m.Seed)
	w.Key("mix")
	w.FloatMap(m.Mix)
	w.BoolField("fixed", m.Fixed)
	w.StringField("objective", m.Objective)
	w.EndObject()
}

// rawJSON is a value already written as JSON; encoding/json compacts it.
type rawJSON []byte

// MarshalJSON gives the value as it is, for encoding/json (the tests).
func (r rawJSON) MarshalJSON() ([]byte, error) { return r, nil }

func (m planMsg) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("type", m.Type)
	w.IntField("run", int64(m.Run))
	w.Key("plan")
	switch p := m.Plan.(type) {
	case format.PlanReport:
		p.EncodeJSON(w)
	case *format.PlanReport:
		p.EncodeJSON(w)
	case rawJSON:
		w.Raw(jsonlite.Compact(nil, p))
	default:
		w.Null()
	}
	optString(w, "csv", m.CSV)
	optString(w, "json", m.JSON)
	w.EndObject()
}

func (m progressMsg) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("type", m.Type)
	w.IntField("run", int64(m.Run))
	w.IntField("iterations", int64(m.Iterations))
	w.FloatField("elapsed", m.Elapsed)
	w.FloatField("best_cost", m.BestCost)
	w.BoolField("feasible", m.Feasible)
	if len(m.Weights) > 0 {
		w.Key("weights")
		w.FloatMap(m.Weights)
	}
	if m.Explaining {
		w.BoolField("explaining", true)
	}
	if m.VehiclesUsed != 0 {
		w.IntField("vehicles_used", int64(m.VehiclesUsed))
	}
	if m.UnservedPriority != 0 {
		w.IntField("unserved_priority", m.UnservedPriority)
	}
	optString(w, "phase", m.Phase)
	w.EndObject()
}

func (m boundMsg) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("type", m.Type)
	w.IntField("run", int64(m.Run))
	w.FloatPtrField("lower_bound", m.LowerBound)
	optString(w, "method", m.Method)
	w.BoolField("proven_optimal", m.ProvenOptimal)
	w.BoolField("infeasible", m.Infeasible)
	if len(m.Conflict) > 0 {
		w.StringsField("conflict", m.Conflict)
	}
	optString(w, "reason", m.Reason)
	w.EndObject()
}

func (m mixMsg) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("type", m.Type)
	w.IntField("run", int64(m.Run))
	w.Key("mix")
	w.FloatMap(m.Mix)
	w.BoolField("running", m.Running)
	w.FloatField("elapsed", m.Elapsed)
	w.EndObject()
}

func (m finishedMsg) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("type", m.Type)
	w.IntField("run", int64(m.Run))
	w.StringField("why", m.Why.String())
	optString(w, "message", m.Message)
	optString(w, "note", m.Note)
	w.IntField("iterations", int64(m.Iterations))
	w.FloatField("elapsed", m.Elapsed)
	w.IntField("improvements", int64(m.Improvements))
	if m.BestCost != nil {
		w.FloatField("best_cost", *m.BestCost)
	}
	w.BoolField("feasible", m.Feasible)
	w.EndObject()
}

func (m exportMsg) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("type", m.Type)
	w.StringField("format", m.Format)
	w.StringField("text", m.Text)
	w.StringField("error", m.Error)
	w.EndObject()
}

func (m failedMsg) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("type", m.Type)
	w.StringField("message", m.Message)
	w.EndObject()
}

func (s *Summary) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("name", s.Name)
	w.IntField("sites", int64(s.Sites))
	w.IntField("nodes", int64(s.Nodes))
	w.StringField("start", s.Start)
	optString(w, "end", s.End)
	w.StringField("shape", s.Shape)
	w.FloatField("day_start", s.DayStart)
	w.FloatField("day_end", s.DayEnd)
	w.FloatField("tightness", s.Tightness)
	w.FloatField("narrowest_window", s.NarrowestWindow)
	w.FloatField("widest_window", s.WidestWindow)
	w.IntField("open_windows", int64(s.OpenWindows))
	w.FloatField("asymmetry", s.Asymmetry)
	w.IntField("asymmetric_pairs", int64(s.AsymmetricPairs))
	w.IntField("pairs", int64(s.Pairs))
	w.IntField("scale", s.Scale)
	optString(w, "unit", s.Unit)
	optString(w, "times", s.Times)
	optString(w, "time_origin", s.TimeOrigin)
	w.StringField("day_start_text", s.DayStartText)
	w.StringField("day_end_text", s.DayEndText)
	optString(w, "travel", s.Travel)
	w.Key("warnings")
	inputErrorsJSON(w, s.Warnings)
	if len(s.Done) > 0 {
		w.StringsField("done", s.Done)
	}
	optString(w, "at", s.At)
	if s.Fleet != nil {
		w.Key("fleet")
		s.Fleet.encode(w)
	}
	w.EndObject()
}

func (f *FleetSummary) encode(w *jsonlite.Writer) {
	w.BeginObject()
	w.Key("vehicles")
	if f.Vehicles == nil {
		w.Null()
	} else {
		w.BeginArray()
		for _, v := range f.Vehicles {
			w.BeginObject()
			w.StringField("id", v.ID)
			optString(w, "name", v.Name)
			w.StringField("start", v.Start)
			w.StringField("end", v.End)
			w.FloatField("shift_start", v.ShiftStart)
			w.FloatField("shift_end", v.ShiftEnd)
			w.StringField("shift_start_text", v.ShiftStartText)
			w.StringField("shift_end_text", v.ShiftEndText)
			if v.Capacity != nil {
				w.FloatField("capacity", *v.Capacity)
			}
			if v.MaxDuration != nil {
				w.FloatField("max_duration", *v.MaxDuration)
			}
			w.EndObject()
		}
		w.EndArray()
	}
	w.BoolField("demand", f.Demand)
	w.EndObject()
}

func optString(w *jsonlite.Writer, k, s string) {
	if s != "" {
		w.StringField(k, s)
	}
}
