package web

import (
	"bytes"
	"crypto/sha256"
	"encoding/base64"
	"encoding/json"
	"fmt"
	"io/fs"
	"strings"

	g "maragu.dev/gomponents"
	h "maragu.dev/gomponents/html"

	"visitline/solver"
)

// ServedCSP is the policy of the served site: everything from its own
// origin only, WebAssembly compilation allowed, no inline code.
const ServedCSP = "default-src 'none'; script-src 'self' 'wasm-unsafe-eval'; worker-src 'self'; connect-src 'self'; " +
	"style-src 'self'; img-src 'self' data:; base-uri 'none'; form-action 'none'"

// singleCSP is the policy of visitline.html: its inline script and style by
// hash, the worker from a blob: URL, and no connection anywhere.
func singleCSP(scriptHash, styleHash string) string {
	return "default-src 'none'; script-src 'sha256-" + scriptHash + "' 'wasm-unsafe-eval'; worker-src blob:; connect-src 'none'; " +
		"style-src 'sha256-" + styleHash + "'; img-src data:; base-uri 'none'; form-action 'none'"
}

// operatorLabels are the page's plain names for the destroy operators.
var operatorLabels = map[string][2]string{
	"random":  {"Random visits", "take out visits at random and put them back"},
	"slice":   {"A stretch of the route", "take out a run of consecutive visits"},
	"related": {"Related visits", "take out visits close in travel and in window"},
	"worst":   {"Costliest visits", "take out the visits that cost the most where they are"},
}

// PageData is what the page is rendered from.
type PageData struct {
	Examples []Example
	// inline, when set, makes the self-contained single-file page.
	inline *inlineParts
}

type inlineParts struct {
	css, app, worker, engineB64, csp string
}

// Page renders index.html (or, with inline parts, visitline.html).
func Page(d PageData) g.Node {
	csp := ServedCSP
	var styleNode, appNode g.Node
	var extra g.Node = g.Group{}
	if d.inline != nil {
		csp = d.inline.csp
		styleNode = h.StyleEl(g.Raw(d.inline.css))
		appNode = h.Script(g.Raw(d.inline.app))
		extra = g.Group{
			h.Script(h.Type("text/plain"), h.ID("worker-source"), g.Raw(d.inline.worker)),
			h.Script(h.Type("application/octet-stream"), h.ID("engine-base64"), g.Raw(d.inline.engineB64)),
		}
	} else {
		styleNode = h.Link(h.Rel("stylesheet"), h.Href("style.css"))
		appNode = g.Group{h.Script(h.Src("engine-client.js")), h.Script(h.Type("module"), h.Src("app.js"))}
	}
	exJSON, _ := json.Marshal(d.Examples)
	return h.Doctype(h.HTML(h.Lang("en"),
		h.Head(
			h.Meta(h.Charset("utf-8")),
			h.Meta(g.Attr("http-equiv", "Content-Security-Policy"), h.Content(csp)),
			h.Meta(h.Name("viewport"), h.Content("width=device-width, initial-scale=1")),
			h.Meta(h.Name("referrer"), h.Content("no-referrer")),
			h.Link(h.Rel("icon"), h.Href("data:,")),
			h.TitleEl(g.Text("Visitline: plan a day of visits")),
			styleNode,
		),
		h.Body(
			h.A(h.Href("#plan-panel"), h.Class("skip"), g.Text("Skip to the day plan")),
			h.Header(h.Class("top"),
				h.Div(h.Class("brand"),
					h.Span(h.Class("mark"), h.Aria("hidden", "true")),
					h.H1(g.Text("Visitline")),
				),
				h.P(h.Class("tagline"), g.Text("Visits for one vehicle or a small team, in an order that meets the time windows. "),
					h.Strong(g.Text("Your data stays in this browser."))),
			),
			runBar(),
			h.Main(h.Class("layout"),
				dataPanel(d.Examples),
				planPanel(),
				settingsPanel(),
			),
			cautions(),
			h.NoScript(h.P(h.Class("noscript"), g.Text("This planner runs in your browser and needs JavaScript turned on."))),
			h.Script(h.Type("application/json"), h.ID("examples-data"), g.Raw(string(exJSON))),
			extra,
			appNode,
		),
	))
}

func testid(v string) g.Node { return h.Data("testid", v) }

// defaultExample is the example the page offers first: the bakery's
// morning, which shows clock times, names and a matrix, where it exists.
func defaultExample(ex []Example) string {
	for _, e := range ex {
		if e.Key == "bakery/sites.csv" {
			return e.Key
		}
	}
	if len(ex) > 0 {
		return ex[0].Key
	}
	return ""
}

// runBar is the band across the top: Start and Stop, the time to search,
// what to make small, the progress and the best plan so far. It fits the
// first screen at 1366x768 and at 390 px.
func runBar() g.Node {
	return h.Section(h.Class("runbar"), h.ID("run-panel"), h.Aria("label", "Search"),
		h.Div(h.Class("run-buttons"),
			h.Button(h.Type("button"), h.ID("start"), testid("start"), h.Class("go"), h.Disabled(), g.Text("Start")),
			h.Button(h.Type("button"), h.ID("stop"), testid("stop"), h.Class("halt"), h.Disabled(), g.Text("Stop")),
		),
		h.Div(h.Class("run-field"),
			h.Label(h.For("budget"), g.Text("Seconds")),
			h.Input(h.Type("number"), h.ID("budget"), testid("budget"), h.Min("0.1"), h.Max("3600"), h.Step("any"), h.Value("10"), g.Attr("inputmode", "decimal")),
		),
		h.Div(h.Class("run-field"),
			h.Label(h.For("objective"), g.Text("Make small")),
			h.Select(h.ID("objective"), testid("objective"),
				h.Option(h.Value("travel"), g.Text("total travel time")),
				h.Option(h.Value("completion"), g.Text("the time the route ends")),
			),
		),
		h.Div(h.Class("run-progress"),
			h.Label(h.For("progress"), h.Class("sr-only"), g.Text("Time used")),
			h.Progress(h.ID("progress"), testid("progress"), h.Max("1"), h.Value("0")),
			h.P(h.ID("status"), testid("status"), h.Class("status"), h.Role("status"), h.Aria("live", "polite"), g.Text("Starting the engine…")),
			h.Button(h.Type("button"), h.ID("cancel-load"), testid("cancel-load"), h.Class("secondary"), g.Attr("hidden", ""), g.Text("Cancel reading")),
		),
		h.Div(h.Class("run-best"),
			h.Span(h.Class("best-label"), g.Text("Best plan")),
			h.Strong(h.ID("best-cost"), testid("best-cost"), g.Text("–")),
			h.Details(h.Class("quality"),
				h.Summary(h.ID("quality"), testid("quality"), g.Text("–")),
				h.P(h.ID("bound-details"), testid("bound-details")),
			),
		),
	)
}

func dataPanel(ex []Example) g.Node {
	return h.Aside(h.Class("side"), h.ID("data-panel"), h.Aria("labelledby", "data-title"),
		h.H2(h.ID("data-title"), g.Text("Data")),
		h.Div(h.Class("drop"), h.ID("drop-zone"),
			h.Label(h.For("file-input"), h.Class("file-pick"),
				g.Text("Open a file"),
				h.Input(h.Type("file"), h.ID("file-input"), testid("file-input"), h.Accept(".txt,.csv,.tsv,.tw,text/plain,text/csv")),
			),
			h.Span(h.Class("hint"), g.Text("or drop one here")),
		),
		h.Div(h.Class("row example-row"),
			h.Label(h.For("example-pick"), h.Class("sr-only"), g.Text("Invented example")),
			h.Select(h.ID("example-pick"), testid("example-pick"),
				g.Map(ex, func(e Example) g.Node {
					return h.Option(h.Value(e.Key), g.If(e.Key == defaultExample(ex), h.Selected()), g.Text(e.Title))
				}),
			),
			h.Button(h.Type("button"), h.ID("example-load"), testid("example-load"), h.Class("secondary"), g.Text("Try this example")),
		),
		h.P(h.ID("example-about"), testid("example-about"), h.Class("help about")),
		h.Label(h.For("paste-input"), h.Class("field-label"), g.Text("Sites CSV or a travel matrix file, as text")),
		h.Textarea(h.ID("paste-input"), testid("paste-input"), h.Rows("4"), g.Attr("spellcheck", "false"), g.Attr("wrap", "off"), h.AutoComplete("off"),
			h.Placeholder("id,name,open,close,service\nDEPOT,Yard,07:30,18:30,0\nA1,First stop,08:00,10:00,45\n…"), h.Aria("describedby", "paste-help")),
		h.Div(h.Class("row"),
			h.Button(h.Type("button"), h.ID("paste-load"), testid("paste-load"), g.Text("Read the text")),
		),
		teamBox(),
		h.Details(h.Class("help-more"), h.Summary(g.Text("What the text looks like")), h.P(h.ID("paste-help"), h.Class("help"),
			g.Text("A sites CSV has a header row (id, name, earliest, latest, service, and x,y or lat,lon without a matrix); the first site is the start. "+
				"Or the plain matrix format: the number of nodes, a row of travel times per node, then “earliest latest” per node."))),
		h.Div(h.ID("errors"), testid("errors"), h.Class("errors"), h.Role("alert"), h.Hidden("")),
		h.Div(h.ID("warnings"), testid("warnings"), h.Class("warnings"), h.Hidden("")),
		h.Div(h.ID("summary"), testid("summary"), h.Class("summary"), h.Aria("live", "polite"),
			h.P(h.Class("muted"), g.Text("No sites loaded yet."))),
	)
}

// teamBox takes a day for several vehicles: a vehicles file (opened,
// dropped with the sites or pasted), or the table made and changed in
// its small editor (web/assets/vehicle-editor.mjs), which writes the
// text box below it. Read with the sites, and again at Start when it
// changed.
func teamBox() g.Node {
	return h.Details(h.ID("team-box"), testid("team-box"), h.Class("more team"),
		h.Summary(g.Text("Several vehicles")),
		h.P(h.Class("help"), g.Text("Plan a team's day: open a vehicles file (id, name, start, end, shift start, shift end, capacity, max duration), "+
			"or give a count of vehicles and set their shift and capacity here. Sites may add demand and priority columns.")),
		h.Div(h.Class("row"),
			h.Label(h.For("vehicles-file"), h.Class("file-pick small"), g.Text("Open a vehicles file"),
				h.Input(h.Type("file"), h.ID("vehicles-file"), testid("vehicles-file"), h.Accept(".csv,.tsv,.txt,text/csv,text/plain"))),
		),
		h.FieldSet(h.Class("veh-editor"), testid("vehicles-editor"),
			h.Legend(g.Text("The team, vehicle by vehicle")),
			h.Div(h.Class("veh-all"),
				h.Label(h.Class("veh-cell"), h.Span(h.Class("veh-lab"), g.Text("count")),
					h.Input(h.Type("number"), h.ID("fleet-size"), testid("fleet-size"), h.Min("1"), h.Max("200"), h.Step("1"), h.Placeholder("1"),
						g.Attr("inputmode", "numeric"), h.Class("fleet-size"))),
				h.Label(h.Class("veh-cell"), h.Span(h.Class("veh-lab"), g.Text("shift start")),
					h.Input(h.Type("text"), h.ID("all-shift-start"), testid("all-shift-start"), h.AutoComplete("off"), h.Placeholder("08:00"))),
				h.Label(h.Class("veh-cell"), h.Span(h.Class("veh-lab"), g.Text("shift end")),
					h.Input(h.Type("text"), h.ID("all-shift-end"), testid("all-shift-end"), h.AutoComplete("off"), h.Placeholder("16:00"))),
				h.Label(h.Class("veh-cell"), h.Span(h.Class("veh-lab"), g.Text("capacity")),
					h.Input(h.Type("text"), h.ID("all-capacity"), testid("all-capacity"), h.AutoComplete("off"), h.Placeholder("none"))),
			),
			h.Div(h.Class("row"),
				h.Button(h.Type("button"), h.ID("vehicles-set-all"), testid("vehicles-set-all"), h.Class("secondary"), g.Text("Set on every vehicle")),
			),
			h.P(h.Class("help"), g.Text("The count makes the table (vehicles 1, 2, … from the start site) or adds and takes off vehicles at its end; "+
				"the button puts this shift and capacity on every vehicle; each card changes one vehicle. Every change goes straight into the text below.")),
			h.Ol(h.ID("vehicle-cards"), testid("vehicle-cards"), h.Class("veh-cards"), h.Aria("label", "Vehicles"), h.Hidden("")),
			h.P(h.ID("veh-note"), testid("veh-note"), h.Class("help"), h.Role("status")),
			h.Div(h.ID("vehicles-problems"), testid("vehicles-problems"), h.Class("errors veh-problems"), h.Role("alert"), h.Hidden("")),
		),
		h.Label(h.For("vehicles-input"), h.Class("field-label"), g.Text("Vehicles CSV, as text (the editor writes here)")),
		h.Textarea(h.ID("vehicles-input"), testid("vehicles-input"), h.Rows("3"), g.Attr("spellcheck", "false"), g.Attr("wrap", "off"), h.AutoComplete("off"),
			h.Placeholder("id,name,start,end,shift start,shift end,capacity\nT1,Ines,DEPOT,,07:30,16:00,5\n…")),
		h.Label(h.Class("check"), h.Input(h.Type("checkbox"), h.ID("fewest-vehicles"), testid("fewest-vehicles")),
			g.Text(" Use as few vehicles as the day allows, before the least driving")),
		h.P(h.Class("help"), g.Text("Empty the text to plan one vehicle. Start reads the vehicles again when they changed since the sites were read.")),
	)
}

// settingsPanel holds what changes how the data is read and searched, and
// keeping and sharing. Beside the data on wide screens; after the day
// plan on narrow ones.
func settingsPanel() g.Node {
	return h.Aside(h.Class("side settings"), h.ID("settings-panel"), h.Aria("label", "Settings, keeping and sharing"),
		h.Details(h.ID("matrix-box"), h.Class("more"),
			h.Summary(g.Text("Travel matrix")),
			h.Div(h.Class("row"),
				h.Label(h.For("matrix-file"), h.Class("file-pick small"), g.Text("Open a matrix file"),
					h.Input(h.Type("file"), h.ID("matrix-file"), testid("matrix-file"), h.Accept(".csv,.tsv,.txt,text/csv,text/plain"))),
				h.Label(h.For("matrix-unit"), h.Class("field-label inline"), g.Text("in")),
				h.Select(h.ID("matrix-unit"), testid("matrix-unit"),
					h.Option(h.Value("minutes"), g.Text("minutes")), h.Option(h.Value("seconds"), g.Text("seconds"))),
			),
			h.Label(h.For("matrix-input"), h.Class("field-label"), g.Text("Or paste it from a spreadsheet (header row and id column optional)")),
			h.Textarea(h.ID("matrix-input"), testid("matrix-input"), h.Rows("3"), g.Attr("spellcheck", "false"), g.Attr("wrap", "off"), h.AutoComplete("off")),
		),
		h.Details(h.ID("route-box"), h.Class("more"),
			h.Summary(g.Text("Route and travel")),
			h.Div(h.Class("grid2"),
				h.Div(h.Label(h.For("route-end"), h.Class("field-label"), g.Text("The route ends")),
					h.Select(h.ID("route-end"), testid("route-end"),
						h.Option(h.Value("start"), g.Text("back at the start")),
						h.Option(h.Value("free"), g.Text("at the last visit")),
						h.Option(h.Value("site"), g.Text("at the site below")))),
				h.Div(h.Label(h.For("end-site"), h.Class("field-label"), g.Text("End site id")),
					h.Input(h.Type("text"), h.ID("end-site"), testid("end-site"), h.AutoComplete("off"))),
				h.Div(h.Label(h.For("start-site"), h.Class("field-label"), g.Text("Start site id")),
					h.Input(h.Type("text"), h.ID("start-site"), testid("start-site"), h.AutoComplete("off"), h.Placeholder("the first"))),
				h.Div(h.Label(h.For("shift-start"), h.Class("field-label"), g.Text("Leave the start at")),
					h.Input(h.Type("text"), h.ID("shift-start"), testid("shift-start"), h.AutoComplete("off"), h.Placeholder("07:30"))),
				h.Div(h.Label(h.For("speed"), h.Class("field-label"), g.Text("Speed (km/h)")),
					h.Input(h.Type("number"), h.ID("speed"), testid("speed"), h.Min("0"), h.Step("any"), h.Placeholder("50"))),
				h.Div(h.Label(h.For("road-factor"), h.Class("field-label"), g.Text("Road factor")),
					h.Input(h.Type("number"), h.ID("road-factor"), testid("road-factor"), h.Min("1"), h.Step("any"), h.Placeholder("1.3"))),
				h.Div(h.Label(h.For("done-visits"), h.Class("field-label"), g.Text("Visits already made")),
					h.Input(h.Type("text"), h.ID("done-visits"), testid("done-visits"), h.AutoComplete("off"), h.Placeholder("C01, C04"))),
				h.Div(h.Label(h.For("now"), h.Class("field-label"), g.Text("Leaving the last at")),
					h.Input(h.Type("text"), h.ID("now"), testid("now"), h.AutoComplete("off"), h.Placeholder("11:20"))),
			),
			h.P(h.Class("help"), g.Text("Speed and road factor apply to coordinates. All of these take effect at the next Start.")),
		),
		h.Details(h.ID("experts"), testid("experts"), h.Class("more"),
			h.Summary(g.Text("For experts: seed, cores, bound, weights")),
			h.Div(h.Class("grid2"),
				h.Div(h.Label(h.For("seed"), h.Class("field-label"), g.Text("Seed")),
					h.Input(h.Type("number"), h.ID("seed"), testid("seed"), h.Min("0"), h.Step("1"), h.Value("1"), g.Attr("inputmode", "numeric"))),
				h.Div(h.Label(h.For("cores"), h.Class("field-label"), g.Text("Cores to search with")),
					h.Input(h.Type("number"), h.ID("cores"), testid("cores"), h.Min("1"), h.Max("8"), h.Step("1"), h.Value("1"), g.Attr("inputmode", "numeric"))),
			),
			h.Label(h.Class("check"), h.Input(h.Type("checkbox"), h.ID("with-bound"), testid("with-bound"), h.Checked()),
				g.Text(" Work out a lower bound beside the search (small days get a proof of the best)")),
			h.Label(h.Class("check"), h.Input(h.Type("checkbox"), h.ID("fewest-late"), testid("fewest-late")),
				g.Text(" When not every window can be met: fewest late visits (otherwise least lateness in all)")),
			h.FieldSet(h.Class("mix"),
				h.Legend(g.Text("Ways to rework the plan")),
				h.P(h.Class("help"), g.Text("How often the search uses each way of taking visits out of its best plan to put them back better; you can change them while it runs.")),
				g.Map(solver.Operators, func(op string) g.Node {
					lab, ok := operatorLabels[op]
					if !ok {
						lab = [2]string{op, ""}
					}
					id := "mix-" + op
					return h.Div(h.Class("mix-row"),
						h.Label(h.For(id), h.Span(h.Class("mix-name"), g.Text(lab[0])), h.Span(h.Class("mix-op"), g.Text(op)),
							g.If(lab[1] != "", h.Span(h.Class("mix-about"), g.Text(lab[1])))),
						h.Input(h.Type("range"), h.ID(id), testid(id), h.Data("operator", op), h.Min("0"), h.Max("4"), h.Step("0.5"), h.Value("1")),
						g.El("output", h.For(id), h.ID(id+"-value"), g.Text("1")),
						h.Span(h.Class("mix-now"), h.ID(id+"-now"), h.Title("share of the search's choices right now")),
					)
				}),
				h.Label(h.Class("check"), h.Input(h.Type("checkbox"), h.ID("fixed-mix"), testid("fixed-mix")),
					g.Text(" Keep these weights as set (otherwise the search shifts them towards what works)")),
			),
		),
		h.Details(h.ID("numbers"), h.Class("more"),
			h.Summary(g.Text("The search in numbers")),
			h.Dl(h.Class("stats"),
				h.Div(h.Dt(g.Text("Iterations")), h.Dd(h.ID("iterations"), g.Text("–"))),
				h.Div(h.Dt(g.Text("Per second")), h.Dd(h.ID("rate"), g.Text("–"))),
				h.Div(h.Dt(g.Text("Better plans")), h.Dd(h.ID("improvements"), g.Text("–"))),
			),
			h.Figure(h.Class("chart"),
				h.Div(h.ID("chart"), h.Class("chart-box")),
				h.FigCaption(g.Text("Best plan over the search time")),
			),
		),
		h.Div(h.Class("keep"), h.Role("group"), h.Aria("label", "Keep and share"),
			h.Label(h.Class("check"), h.Input(h.Type("checkbox"), h.ID("keep-session"), testid("keep-session")),
				g.Text(" Keep this session in this tab")),
			h.P(h.ID("keep-help"), h.Class("help")),
			h.Div(h.Class("row"),
				h.Button(h.Type("button"), h.ID("share-link"), testid("share-link"), h.Class("secondary"), h.Disabled(), g.Text("Make a share link")),
				h.Button(h.Type("button"), h.ID("forget-session"), testid("forget-session"), h.Class("secondary"), g.Text("Forget")),
			),
			h.Label(h.For("share-url"), h.Class("sr-only"), g.Text("Share link")),
			h.Input(h.Type("text"), h.ID("share-url"), testid("share-url"), h.ReadOnly(), h.Hidden("")),
			h.P(h.ID("keep-note"), testid("keep-note"), h.Class("help")),
		),
	)
}

func planPanel() g.Node {
	return h.Section(h.Class("plan"), h.ID("plan-panel"), h.Aria("labelledby", "plan-title"), h.TabIndex("-1"),
		h.Div(h.Class("plan-head"),
			h.H2(h.ID("plan-title"), g.Text("Day plan")),
			h.Div(h.Class("exports"), h.Role("group"), h.Aria("label", "Take the plan with you"),
				h.Label(h.ID("export-vehicle-box"), h.Class("export-vehicle"), h.Hidden(""),
					h.Span(g.Text("For")), h.Select(h.ID("export-vehicle"), testid("export-vehicle"), h.Aria("label", "CSV, calendar and print for"))),
				h.Button(h.Type("button"), h.ID("export-csv"), testid("export-csv"), h.Class("secondary"), h.Disabled(), g.Text("CSV")),
				h.Button(h.Type("button"), h.ID("export-json"), testid("export-json"), h.Class("secondary"), h.Disabled(), g.Text("JSON")),
				h.Button(h.Type("button"), h.ID("export-ics"), testid("export-ics"), h.Class("secondary"), h.Disabled(), g.Text("Calendar")),
				h.Button(h.Type("button"), h.ID("print-plan"), testid("print-plan"), h.Class("secondary"), h.Disabled(), g.Text("Print")),
			),
		),
		h.P(h.Class("caution-line"), g.Text("Travel times are estimates. Drive within traffic law and working-time rules; local regulations and professional judgement prevail.")),
		h.Div(h.Class("row ics-day"), h.ID("ics-day-row"), h.Hidden(""),
			h.Label(h.For("ics-date"), h.Class("field-label inline"), g.Text("Day of the plan, for the calendar")),
			h.Input(h.Type("date"), h.ID("ics-date"), testid("ics-date")),
		),
		h.Div(h.ID("why"), testid("why"), h.Class("why"), h.Role("note"), h.Hidden("")),
		h.Div(h.ID("unserved"), testid("unserved"), h.Class("unserved"), h.Role("note"), h.Hidden("")),
		h.P(h.ID("print-title"), h.Class("print-only")),
		h.Ul(h.Class("legend"), h.Aria("label", "How to read the day plan"),
			h.Li(h.Span(h.Class("key key-window")), g.Text("time window")),
			h.Li(h.Span(h.Class("key key-travel")), g.Text("driving")),
			h.Li(h.Span(h.Class("key key-wait")), g.Text("waiting")),
			h.Li(h.Span(h.Class("key key-service")), g.Text("service")),
			h.Li(h.Span(h.Class("key key-late")), g.Text("late")),
		),
		h.Div(h.ID("timeline"), testid("timeline"), h.Class("timeline"), h.Role("list"), h.Aria("label", "Visits in route order"),
			h.P(h.Class("muted"), g.Text("The plan appears here as soon as the search finds one."))),
		h.Div(h.ID("visit-detail"), testid("visit-detail"), h.Class("visit-detail"), h.Aria("live", "polite")),
		// The table in a box that the browser may leave unlaid while it is
		// out of view (CSS content-visibility): at 1,000 visits laying it out
		// takes a tenth of a second or more, and it sits below the timeline.
		h.Div(h.Class("table-wrap"), h.Table(h.ID("plan-table"), testid("plan-table"),
			h.Caption(g.Text("The plan in words"), h.Span(h.ID("table-day"), testid("table-day"), h.Class("units"))),
			h.THead(h.Tr(
				h.Th(h.Scope("col"), h.Class("c-ord"), g.Text("Order")), h.Th(h.Scope("col"), h.Class("c-site"), g.Text("Site")),
				h.Th(h.Scope("col"), h.Class("name-col"), g.Text("Name")),
				h.Th(h.Scope("col"), h.Class("c-arr"), g.Text("Arrival")), h.Th(h.Scope("col"), h.Class("c-start"), g.Text("Start")),
				h.Th(h.Scope("col"), h.Class("c-wait"), g.Text("Wait")), h.Th(h.Scope("col"), h.Class("c-dep"), g.Text("Departure")),
				h.Th(h.Scope("col"), h.Class("win-col"), g.Text("Window")), h.Th(h.Scope("col"), h.Class("c-slack"), g.Text("Slack")),
			)),
			h.TBody(),
		)),
		h.Div(h.ID("print-team"), testid("print-team"), h.Class("print-team")),
	)
}

func cautions() g.Node {
	return h.Footer(h.Class("cautions"), h.Aria("labelledby", "cautions-title"),
		h.H2(h.ID("cautions-title"), g.Text("Before anyone drives this plan")),
		h.Ul(
			h.Li(g.Text("Travel times are estimates. Real roads, weather and loading take their own time.")),
			h.Li(g.Text("Obey traffic law and the working-time and rest rules that apply to the driver.")),
			h.Li(g.Text("Local regulations and professional judgement prevail over any plan this page proposes.")),
		),
		h.P(h.Class("fine"), g.Text("Visitline runs entirely on this computer. The page makes no connection beyond the place it was opened from.")),
	)
}

func sha(s string) string {
	sum := sha256.Sum256([]byte(s))
	return base64.StdEncoding.EncodeToString(sum[:])
}

// SingleFile renders visitline.html: the page with its style, script,
// worker and engine inside, for opening from disk with no network. The
// engine client and the bundled modules make one inline script.
func SingleFile(opts Options, ex []Example) ([]byte, error) {
	worker := string(opts.WasmExec) + "\n;\n" + string(asset("worker.js"))
	sub, err := fs.Sub(assets, "assets")
	if err != nil {
		return nil, err
	}
	bundle, err := Bundle(sub, "app.js")
	if err != nil {
		return nil, err
	}
	app, css := string(asset("engine-client.js"))+"\n;\n"+bundle, string(asset("style.css"))
	for name, s := range map[string]string{"wasm_exec.js and worker.js": worker, "the page script": app, "style.css": css} {
		if strings.Contains(strings.ToLower(s), "</script") || strings.Contains(strings.ToLower(s), "</style") {
			return nil, fmt.Errorf("web: %s holds a closing tag and cannot be inlined", name)
		}
	}
	parts := &inlineParts{css: css, app: app, worker: worker,
		engineB64: base64.StdEncoding.EncodeToString(opts.Engine), csp: singleCSP(sha(app), sha(css))}
	var b bytes.Buffer
	if err := Page(PageData{Examples: ex, inline: parts}).Render(&b); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}
