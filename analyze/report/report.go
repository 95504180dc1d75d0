// Package report writes wavsieve's self-contained HTML reports: one file,
// with every plot embedded as inline SVG, no script or style fetched from
// anywhere, readable offline and fit to attach to a work record.
//
// A report is built from the JSON that a run left behind: the manifest of
// an apply run (per file the before/after spectra, the design's response
// and pole/zero diagram, the verification table, and the whole manifest as
// a sortable table), or the document of a survey (per file the spectrum,
// the hum and rumble findings and the suggested spec's response).
package report

import (
	"fmt"
	"html/template"
	"io"
	"strings"

	"github.com/wavsieve/wavsieve/analyze/plots"
)

// Report is the content of one HTML page.
type Report struct {
	Title    string
	Subtitle string
	// Runs lists each run the report gathers (an apply record, a survey)
	// in a line, with its spec; Merge keeps each distinct line once.
	Runs  []string
	Files []File
	// Tables are the runs as sortable tables (the manifests).
	Tables []Table
	// Notes are shown under the title (for example limits of the run).
	Notes []string
}

// File is the section of one input file.
type File struct {
	Heading string
	Facts   [][2]string // label, value
	Status  string      // "done", "skipped", "failed", or "" (survey)
	Error   string
	// Plots are SVG documents, embedded as they are.
	Plots []Plot
	// Tables are shown after the plots (verification checks, hum harmonics).
	Tables []Table
	// Code is preformatted text (a suggested spec).
	Code     string
	CodeName string
}

// Plot is one embedded SVG with its caption.
type Plot struct {
	Caption string
	SVG     []byte
	// Key, when set, names what the plot shows (a design: its spec and
	// rate). Write draws a plot once per key and, where the same key comes
	// again, links to the first instead.
	Key string

	id, ref, refName string // set by Write
}

// Table is a table with a caption; Numeric marks the columns that sort as numbers.
type Table struct {
	Caption string
	Columns []string
	Numeric []bool
	Rows    [][]string
	// RowClass optionally gives each row a class ("pass", "fail",
	// "unmeasurable", "failed", ...), which the page colours.
	RowClass []string
}

var page = template.Must(template.New("page").Funcs(template.FuncMap{
	"svg": func(b []byte) template.HTML {
		s := string(b)
		// Drop an XML declaration or DOCTYPE before the <svg> element: inline
		// SVG in HTML starts at the element.
		if i := strings.Index(s, "<svg"); i > 0 {
			s = s[i:]
		}
		// The plots' text in the page's font family, with its fallbacks.
		s = strings.ReplaceAll(s, "font-family:Liberation Sans;", "font-family:"+strings.ReplaceAll(plots.PageFontFamily, `"`, "'")+";")
		return template.HTML(s) // produced by gonum/plot from our own data
	},
	"fontFamily": func() template.CSS { return template.CSS(plots.PageFontFamily) },
	// long marks a cell that may break anywhere (a path, a message): other
	// cells keep their words whole.
	"long":    func(v string) bool { return len(v) > 24 },
	"numeric": func(t Table, i int) bool { return i < len(t.Numeric) && t.Numeric[i] },
	"rowclass": func(t Table, i int) string {
		if i < len(t.RowClass) {
			return t.RowClass[i]
		}
		return ""
	},
}).Parse(pageHTML))

// drawOnce returns r with each keyed plot drawn at its first appearance
// only (with an anchor) and referred to by a link where it comes again,
// so that a report of many files at one rate holds one design figure.
func drawOnce(r Report) Report {
	type first struct{ id, name string }
	seen := map[string]first{}
	files := make([]File, len(r.Files))
	for i, f := range r.Files {
		f.Plots = append([]Plot(nil), f.Plots...)
		for j := range f.Plots {
			p := &f.Plots[j]
			if p.Key == "" {
				continue
			}
			if fst, ok := seen[p.Key]; ok {
				p.ref, p.refName, p.SVG = fst.id, fst.name, nil
				continue
			}
			p.id = fmt.Sprintf("plot-%d-%d", i, j)
			seen[p.Key] = first{p.id, f.Heading}
		}
		files[i] = f
	}
	r.Files = files
	return r
}

// ID, Ref and RefName tell the page template where a plot is drawn.
func (p Plot) ID() string      { return p.id }
func (p Plot) Ref() string     { return p.ref }
func (p Plot) RefName() string { return p.refName }

// Merge appends other's files to r, and its tables: rows to a table of
// the same columns, a new table otherwise.
func (r *Report) Merge(other Report) {
	r.Files = append(r.Files, other.Files...)
	for _, t := range other.Tables {
		merged := false
		for i := range r.Tables {
			if strings.Join(r.Tables[i].Columns, "\x00") == strings.Join(t.Columns, "\x00") {
				r.Tables[i].Rows = append(r.Tables[i].Rows, t.Rows...)
				r.Tables[i].RowClass = append(r.Tables[i].RowClass, t.RowClass...)
				merged = true
				break
			}
		}
		if !merged {
			r.Tables = append(r.Tables, t)
		}
	}
	r.Notes = append(r.Notes, other.Notes...)
	for _, run := range other.Runs {
		dup := false
		for _, have := range r.Runs {
			dup = dup || have == run
		}
		if !dup {
			r.Runs = append(r.Runs, run)
		}
	}
}

// Write renders r as one HTML document.
func Write(w io.Writer, r Report) error {
	r = drawOnce(r)
	if err := page.Execute(w, r); err != nil {
		return fmt.Errorf("report: %w", err)
	}
	return nil
}

const pageHTML = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>{{.Title}}</title>
<style>
body { font-family: {{fontFamily}}; margin: 1.5em auto; max-width: 1100px; color: #1c2430; padding: 0 1em; }
h1 { font-size: 1.6em; margin-bottom: 0.2em; }
h2 { font-size: 1.25em; border-top: 2px solid #5a7d9a; padding-top: 0.6em; margin-top: 2em; }
.sub { color: #4b5a6a; margin-top: 0; }
.note { background: #f3f1e7; border-left: 4px solid #b49a3c; padding: 0.4em 0.8em; margin: 0.4em 0; }
dl.facts { display: grid; grid-template-columns: max-content minmax(0, 1fr); gap: 0.15em 1em; }
dl.facts dt { color: #4b5a6a; }
dl.facts dd { margin: 0; font-variant-numeric: tabular-nums; overflow-wrap: anywhere; }
h2, figcaption, p { overflow-wrap: anywhere; }
figure { margin: 1em 0; }
figure svg { max-width: 100%; height: auto; }
figcaption { color: #4b5a6a; font-size: 0.9em; }
.scroll { overflow-x: auto; }
table { border-collapse: collapse; margin: 0.8em 0; font-size: 0.9em; }
table.wide { width: 100%; }
td.long { overflow-wrap: anywhere; }
td.num { white-space: nowrap; }
ul.runs { margin: 0.3em 0 0.8em 0; padding-left: 1.2em; color: #4b5a6a; }
p.ref { color: #4b5a6a; font-style: italic; }
@media (max-width: 600px) {
  body { padding: 0 0.4em; }
  table { font-size: 0.8em; }
  table.wide { width: auto; }
  td { overflow-wrap: normal; white-space: nowrap; }
  th, td { padding: 0.2em 0.3em; }
  dl.facts { grid-template-columns: minmax(0, 1fr); }
  dl.facts dd { margin-bottom: 0.3em; }
}
caption { text-align: left; font-weight: bold; padding-bottom: 0.3em; }
th, td { border: 1px solid #c8d0d8; padding: 0.25em 0.5em; }
th { background: #e6edf3; cursor: pointer; user-select: none; }
th.sorted-up::after { content: " \25B2"; }
th.sorted-down::after { content: " \25BC"; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
tr.pass td, tr.done td { background: #eef7ee; }
tr.fail td, tr.failed td { background: #fbeaea; }
tr.unmeasurable td, tr.skipped td { background: #f4f4f4; color: #555; }
.status-failed { color: #9b1c1c; font-weight: bold; }
pre { background: #f6f8fa; padding: 0.6em; overflow-x: auto; }
footer { margin-top: 3em; color: #4b5a6a; font-size: 0.85em; border-top: 1px solid #c8d0d8; padding-top: 0.6em; }
</style>
</head>
<body>
<h1>{{.Title}}</h1>
{{if .Subtitle}}<p class="sub">{{.Subtitle}}</p>{{end}}
{{if .Runs}}<ul class="runs">{{range .Runs}}<li>{{.}}</li>{{end}}</ul>{{end}}
{{range .Notes}}<p class="note">{{.}}</p>{{end}}
{{range .Tables}}{{if .Rows}}{{template "table" .}}{{end}}{{end}}
{{range $i, $f := .Files}}
<section class="file" id="file-{{$i}}">
<h2>{{$f.Heading}}</h2>
{{if $f.Error}}<p class="status-{{$f.Status}}">{{$f.Status}}: {{$f.Error}}</p>{{end}}
{{if $f.Facts}}<dl class="facts">{{range $f.Facts}}<dt>{{index . 0}}</dt><dd>{{index . 1}}</dd>{{end}}</dl>{{end}}
{{range $f.Plots}}{{if .Ref}}<p class="ref">{{.Caption}} The same figure as for <a href="#{{.Ref}}">{{.RefName}}</a>.</p>{{else}}<figure{{if .ID}} id="{{.ID}}"{{end}}>{{svg .SVG}}<figcaption>{{.Caption}}</figcaption></figure>{{end}}{{end}}
{{range $f.Tables}}{{template "table" .}}{{end}}
{{if $f.Code}}<p><b>{{$f.CodeName}}</b></p><pre>{{$f.Code}}</pre>{{end}}
</section>
{{end}}
<footer>
Made by wavsieve. The responses and levels shown are those of the designed filters and of
wavsieve's own measurements on these files; they are no calibrated certification of a
measurement chain. For work done to a standard or a regulation, follow the applicable
standards, local codes and licensed practice. Listen to filtered files at safe levels.
</footer>
<script>
// Sortable tables: click a heading to sort by it; numeric columns sort as numbers.
(function () {
  document.querySelectorAll("table.sortable").forEach(function (table) {
    var heads = table.querySelectorAll("th");
    heads.forEach(function (th, col) {
      th.addEventListener("click", function () {
        var up = !th.classList.contains("sorted-up");
        heads.forEach(function (h) { h.classList.remove("sorted-up", "sorted-down"); });
        th.classList.add(up ? "sorted-up" : "sorted-down");
        var num = th.dataset.numeric === "1";
        var body = table.tBodies[0];
        var rows = Array.prototype.slice.call(body.rows);
        rows.sort(function (a, b) {
          var x = a.cells[col].textContent, y = b.cells[col].textContent;
          var c = num ? (parseFloat(x) || 0) - (parseFloat(y) || 0) : x.localeCompare(y);
          return up ? c : -c;
        });
        rows.forEach(function (r) { body.appendChild(r); });
      });
    });
  });
  document.body.dataset.ready = "1";
})();
</script>
</body>
</html>
{{define "table"}}<div class="scroll"><table class="sortable{{if gt (len .Columns) 6}} wide{{end}}">
{{if .Caption}}<caption>{{.Caption}}</caption>{{end}}
<thead><tr>{{range $i, $c := .Columns}}<th data-numeric="{{if numeric $ $i}}1{{else}}0{{end}}">{{$c}}</th>{{end}}</tr></thead>
<tbody>{{range $r, $row := .Rows}}<tr class="{{rowclass $ $r}}">{{range $i, $v := $row}}<td{{if numeric $ $i}} class="num"{{else if long $v}} class="long"{{end}}>{{$v}}</td>{{end}}</tr>
{{end}}</tbody>
</table></div>{{end}}
`
