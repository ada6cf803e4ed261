package format

import "visitline/solver/jsonlite"

// The JSON forms of the plan reports, written by hand (no reflection, for
// the web worker's build): the bytes are those encoding/json writes from
// the structs' tags, field for field in their order, omitempty as the tags
// say (tests compare the two on many plans). The command line's --format
// json and the page's plan messages both write through these.

// EncodeJSON writes the plan as one JSON object.
func (j *PlanReport) EncodeJSON(w *jsonlite.Writer) {
	w.BeginObject()
	if j.Instance != "" {
		w.StringField("instance", j.Instance)
	}
	w.StringField("objective", j.Objective)
	w.FloatField("cost", j.Cost)
	w.BoolField("feasible", j.Feasible)
	w.IntsField("route", j.Route)
	w.StringsField("route_ids", j.RouteIDs)
	optString(w, "shape", j.Shape)
	optString(w, "route_start", j.RouteStart)
	optString(w, "route_end", j.RouteEnd)
	w.Key("schedule")
	visitsJSON(w, j.Schedule)
	if j.Return != nil {
		w.Key("return")
		j.Return.encodeJSON(w)
	}
	w.FloatField("travel", j.Travel)
	w.FloatField("completion", j.Completion)
	w.FloatField("total_lateness", j.TotalLateness)
	w.Key("late")
	if j.Late == nil {
		w.Null()
	} else {
		w.BeginArray()
		for _, l := range j.Late {
			w.BeginObject()
			w.StringField("id", l.ID)
			w.IntField("node", int64(l.Node))
			w.FloatField("by", l.By)
			w.EndObject()
		}
		w.EndArray()
	}
	w.IntField("iterations", int64(j.Iterations))
	w.FloatField("seconds", j.Seconds)
	w.FloatField("seconds_to_best", j.SecondsToBest)
	w.IntField("improvements", int64(j.Improvements))
	optString(w, "found_by", j.FoundBy)
	optString(w, "stop", j.Stop)
	optFloatPtr(w, "lower_bound", j.LowerBound)
	optFloatPtr(w, "gap_bound_pct", j.GapBoundPct)
	w.BoolField("proven_optimal", j.ProvenOptimal)
	optStrings(w, "conflict", j.Conflict)
	optString(w, "reason", j.Reason)
	optString(w, "unit", j.Unit)
	optString(w, "times", j.Times)
	optString(w, "time_origin", j.TimeOrigin)
	optString(w, "travel_source", j.TravelSource)
	optStrings(w, "done", j.Done)
	optString(w, "at", j.At)
	optFloatPtr(w, "now", j.Now)
	optString(w, "now_clock", j.NowClock)
	optStrings(w, "warnings", j.Warnings)
	w.EndObject()
}

func visitsJSON(w *jsonlite.Writer, vs []PlanVisit) {
	if vs == nil {
		w.Null()
		return
	}
	w.BeginArray()
	for k := range vs {
		vs[k].encodeJSON(w)
	}
	w.EndArray()
}

func (v *PlanVisit) encodeJSON(w *jsonlite.Writer) {
	w.BeginObject()
	w.IntField("node", int64(v.Node))
	w.StringField("id", v.ID)
	w.FloatField("arrival", v.Arrival)
	w.FloatField("start", v.Start)
	w.FloatField("wait", v.Wait)
	w.FloatField("departure", v.Departure)
	w.FloatField("earliest", v.Earliest)
	w.FloatPtrField("latest", v.Latest)
	w.FloatPtrField("slack", v.Slack)
	if v.Lateness != 0 {
		w.FloatField("lateness", v.Lateness)
	}
	optString(w, "name", v.Name)
	optString(w, "arrival_clock", v.ArrivalClock)
	optString(w, "start_clock", v.StartClock)
	optString(w, "departure_clock", v.DepartureClock)
	optString(w, "earliest_clock", v.EarliestClock)
	optString(w, "latest_clock", v.LatestClock)
	w.EndObject()
}

// EncodeJSON writes the fleet plan as one JSON object.
func (j *FleetPlanReport) EncodeJSON(w *jsonlite.Writer) {
	w.BeginObject()
	optString(w, "instance", j.Instance)
	w.StringField("objective", j.Objective)
	w.BoolField("minimize_vehicles", j.MinimizeVehicles)
	w.FloatField("cost", j.Cost)
	w.BoolField("feasible", j.Feasible)
	w.IntField("vehicles", int64(j.Vehicles))
	w.IntField("vehicles_used", int64(j.VehiclesUsed))
	w.Key("routes")
	if j.Routes == nil {
		w.Null()
	} else {
		w.BeginArray()
		for k := range j.Routes {
			j.Routes[k].encodeJSON(w)
		}
		w.EndArray()
	}
	w.IntField("served", int64(j.Served))
	w.IntsField("unserved", j.Unserved)
	w.StringsField("unserved_ids", j.UnservedIDs)
	w.Key("unserved_reasons")
	if j.UnservedWhy == nil {
		w.Null()
	} else {
		w.BeginArray()
		for _, u := range j.UnservedWhy {
			w.BeginObject()
			w.IntField("node", int64(u.Node))
			w.StringField("id", u.ID)
			optString(w, "name", u.Name)
			w.StringField("reason", u.Reason)
			w.StringField("why", u.Why)
			w.EndObject()
		}
		w.EndArray()
	}
	w.IntField("unserved_priority", j.UnservedPriority)
	optString(w, "reason", j.Reason)
	if len(j.Route) > 0 {
		w.IntsField("route", j.Route)
	}
	optStrings(w, "route_ids", j.RouteIDs)
	w.IntField("iterations", int64(j.Iterations))
	w.FloatField("seconds", j.Seconds)
	w.FloatField("seconds_to_best", j.SecondsToBest)
	w.IntField("improvements", int64(j.Improvements))
	optString(w, "unit", j.Unit)
	optString(w, "times", j.Times)
	optString(w, "time_origin", j.TimeOrigin)
	optString(w, "travel_source", j.TravelSource)
	optStrings(w, "warnings", j.Warnings)
	w.EndObject()
}

func (r *FleetRouteJSON) encodeJSON(w *jsonlite.Writer) {
	w.BeginObject()
	w.StringField("vehicle", r.Vehicle)
	optString(w, "vehicle_name", r.VehicleName)
	w.IntsField("visits", r.Visits)
	w.StringsField("visit_ids", r.VisitIDs)
	w.StringField("start", r.Start)
	w.StringField("end", r.End)
	w.FloatField("begin", r.Begin)
	optString(w, "begin_clock", r.BeginClock)
	w.FloatField("travel", r.Travel)
	w.FloatField("duration", r.Duration)
	w.FloatField("load", r.Load)
	optFloatPtr(w, "capacity", r.Capacity)
	w.Key("schedule")
	visitsJSON(w, r.Schedule)
	w.FloatField("arrival", r.Arrival)
	optString(w, "arrival_clock", r.ArrivalClock)
	w.EndObject()
}

// optString, optFloatPtr and optStrings write a field tagged omitempty:
// nothing for "", nil or an empty list.
func optString(w *jsonlite.Writer, k, s string) {
	if s != "" {
		w.StringField(k, s)
	}
}

func optFloatPtr(w *jsonlite.Writer, k string, f *float64) {
	if f != nil {
		w.FloatField(k, *f)
	}
}

func optStrings(w *jsonlite.Writer, k string, s []string) {
	if len(s) > 0 {
		w.StringsField(k, s)
	}
}
