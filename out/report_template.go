package out

// reportHTML is the page template. It is written as XHTML-compatible HTML5:
// every element is closed, void elements end in "/>", boolean attributes
// carry a value and no named entity is used, so the output is also
// well-formed XML (which the tests check). The style is this project's own:
// a paper-white page, one dark-blue accent, and passing versus failing shown
// by words, symbols (✓ ✗ ★) and border style (solid versus dashed), never by
// colour alone.
const reportHTML = `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8"/>
<meta name="viewport" content="width=device-width, initial-scale=1"/>
<meta name="generator" content="accelplan {{.Version}}"/>
<title>{{.Title}}</title>
<style>
:root {
  --paper: #f8f7f3; --card: #ffffff; --ink: #1c2126; --muted: #596067; --rule: #d8d4ca;
  --accent: #22507c; --accent-soft: #e7eef6;
  --pass: #2b6a42; --pass-soft: #ecf5ee;
  --fail: #9a3a00; --fail-soft: #fbf0e7;
  --caution: #6f4300; --caution-soft: #fdf4dc;
}
* { box-sizing: border-box; }
[hidden] { display: none !important; }
html { font-size: 16px; }
body { margin: 0; background: var(--paper); color: var(--ink); font-family: system-ui, sans-serif; line-height: 1.5; }
.wrap { max-width: 74rem; margin: 0 auto; padding: 0 1.5rem; }
.masthead { background: var(--card); border-bottom: 1px solid var(--rule); padding: 1.4rem 0 0.2rem; }
.kicker { margin: 0; text-transform: uppercase; letter-spacing: 0.09em; font-size: 0.76rem; font-weight: 600; color: var(--accent); }
h1 { margin: 0.15rem 0 0.25rem; font-size: 1.85rem; font-weight: 650; line-height: 1.2; }
.meta { margin: 0 0 0.7rem; color: var(--muted); font-size: 0.92rem; }
.meta b { color: var(--ink); font-weight: 600; }
nav.toc { display: flex; flex-wrap: wrap; gap: 0 1.4rem; padding: 0.4rem 0 0.6rem; border-top: 1px solid var(--rule); }
nav.toc a { color: var(--accent); text-decoration: none; font-size: 0.92rem; }
nav.toc a:hover { text-decoration: underline; }
section.part { margin: 2.2rem 0 2.6rem; }
h2 { display: flex; align-items: baseline; gap: 0.6rem; margin: 0 0 1rem; padding-bottom: 0.3rem; border-bottom: 2px solid var(--ink); font-size: 1.3rem; font-weight: 650; }
h2 .num { color: var(--accent); font-size: 0.95rem; font-variant-numeric: tabular-nums; }
h3 { font-size: 1.05rem; margin: 1.4rem 0 0.5rem; font-weight: 650; }
p.lede { margin: 0 0 1rem; color: var(--muted); max-width: 52rem; }
.tnum { font-variant-numeric: tabular-nums; }
a { color: var(--accent); }
a:hover { text-decoration-thickness: 2px; }

.verdict { display: grid; grid-template-columns: minmax(13rem, 17rem) 1fr; gap: 0.4rem 2rem; background: var(--card); border: 1px solid var(--rule); border-top: 6px solid var(--pass); padding: 1.2rem 1.5rem 1.1rem; }
.verdict.none { display: block; border-top: 6px dashed var(--fail); }
.verdict .tag { display: block; font-size: 0.8rem; letter-spacing: 0.06em; text-transform: uppercase; color: var(--pass); font-weight: 700; }
.verdict.none .tag { color: var(--fail); }
.verdict .bigtime { display: block; font-size: 3.1rem; font-weight: 700; line-height: 1.05; font-variant-numeric: tabular-nums; }
.verdict .sub { display: block; color: var(--muted); font-size: 0.95rem; }
.verdict .saved { display: block; margin-top: 0.6rem; font-size: 1.05rem; font-weight: 600; }
.verdict .headline { margin: 0.2rem 0 0.4rem; font-size: 1.4rem; font-weight: 650; }
dl.pickfacts { display: grid; grid-template-columns: max-content 1fr; gap: 0.35rem 1.1rem; margin: 0; }
dl.pickfacts dt { color: var(--muted); font-size: 0.9rem; padding-top: 0.1rem; }
dl.pickfacts dd { margin: 0; }
dl.pickfacts dd.protocol { font-size: 1.15rem; font-weight: 650; }
.caution { margin: 1rem 0 0; padding: 0.75rem 1.1rem; background: var(--caution-soft); border: 1px solid #e5cf93; border-left: 6px double var(--caution); color: #3b2a06; }
.caution strong { display: block; color: var(--caution); text-transform: uppercase; letter-spacing: 0.06em; font-size: 0.8rem; }
.caution p { margin: 0.15rem 0 0; }
dl.facts { display: grid; grid-template-columns: repeat(auto-fill, minmax(22rem, 1fr)); gap: 0 2rem; margin: 0.6rem 0 0; font-size: 0.92rem; }
dl.facts div { display: flex; gap: 0.8rem; border-bottom: 1px dotted var(--rule); padding: 0.25rem 0; }
dl.facts dt { flex: 0 0 9rem; color: var(--muted); }
dl.facts dd { flex: 1 1 auto; margin: 0; }

.tablewrap { overflow-x: auto; background: var(--card); border: 1px solid var(--rule); }
table { border-collapse: collapse; width: 100%; font-size: 0.9rem; }
th, td { padding: 0.35rem 0.7rem; text-align: left; border-bottom: 1px solid #ebe8e1; vertical-align: top; }
th { background: #efede7; font-weight: 650; white-space: nowrap; }
td.n { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td.status { white-space: nowrap; font-weight: 600; }
tr.pass td.status { color: var(--pass); }
tr.fail td.status { color: var(--fail); }
tr.fail td { color: var(--muted); }
tr.fail td.status { font-weight: 500; }
tr.pick td { background: var(--accent-soft); color: var(--ink); font-weight: 650; }
tr.pick td:first-child { box-shadow: inset 4px 0 0 var(--accent); }

figure { margin: 0; }
figure.chart { background: var(--card); border: 1px solid var(--rule); padding: 0.8rem; margin: 0 0 1.2rem; }
figure.chart img { display: block; width: 100%; max-width: 60rem; height: auto; margin: 0 auto; }
figure.chart figcaption { margin-top: 0.4rem; color: var(--muted); font-size: 0.9rem; }
figure.chart figcaption strong { color: var(--ink); margin-right: 0.4rem; }

.scales { display: flex; flex-wrap: wrap; gap: 1rem 2.5rem; margin: 0 0 1rem; }
figure.scale { flex: 0 1 26rem; }
figure.scale img { display: block; width: 100%; height: 14px; border: 1px solid var(--rule); }
figure.scale figcaption { display: flex; justify-content: space-between; gap: 0.6rem; font-size: 0.82rem; color: var(--muted); font-variant-numeric: tabular-nums; }

.stepper { position: sticky; top: 0; z-index: 5; margin: 0 0 1.2rem; padding: 0.7rem 1rem 0.6rem; background: var(--card); border: 1px solid var(--rule); border-radius: 6px; box-shadow: 0 2px 8px rgba(20, 30, 40, 0.08); }
.stepper .row { display: flex; flex-wrap: wrap; align-items: center; gap: 0.5rem 0.8rem; }
.stepper input[type=range] { flex: 1 1 16rem; accent-color: var(--accent); }
.stepper .readout { flex: 1 1 100%; font-size: 0.95rem; font-weight: 600; }
.stepper .keys { color: var(--muted); font-size: 0.8rem; font-weight: 400; margin-left: 0.6rem; }
.stepper label { font-size: 0.85rem; color: var(--muted); }
.stepper select { font: inherit; font-size: 0.88rem; padding: 0.15rem 0.3rem; }
button { font: inherit; font-size: 0.88rem; padding: 0.25rem 0.75rem; color: var(--accent); background: var(--card); border: 1px solid var(--accent); border-radius: 4px; cursor: pointer; }
button:hover { background: var(--accent-soft); }
button:disabled { opacity: 0.4; cursor: default; background: var(--card); }
.strip { display: flex; flex-wrap: wrap; gap: 0.3rem; margin-top: 0.55rem; }
.strip button.tick { font-size: 0.78rem; padding: 0.05rem 0.45rem; font-variant-numeric: tabular-nums; border-radius: 3px; }
.strip button.tick.pass { color: var(--pass); background: var(--pass-soft); border: 1px solid var(--pass); }
.strip button.tick.fail { color: var(--fail); background: var(--card); border: 1px dashed var(--fail); }
.strip button.tick.pick { font-weight: 700; }
.strip button.tick[aria-current=true] { outline: 2px solid var(--ink); outline-offset: 1px; font-weight: 700; }
.hint { color: var(--muted); font-size: 0.9rem; }

article.cand { background: var(--card); border: 1px solid var(--rule); margin: 0 0 1.2rem; padding: 0.9rem 1.2rem 1rem; break-inside: avoid; }
article.cand.pass { border-left: 6px solid var(--pass); }
article.cand.fail { border-left: 6px dashed var(--fail); }
article.cand.pick { box-shadow: 0 0 0 2px var(--accent); }
#cand-list.stepping article.cand { display: none; }
#cand-list.stepping article.cand.current { display: block; }
.cand-head { display: flex; flex-wrap: wrap; align-items: baseline; gap: 0.3rem 0.7rem; }
.cand-no { min-width: 1.9rem; padding: 0 0.35rem; text-align: center; border: 1px solid var(--ink); border-radius: 3px; font-size: 0.85rem; font-variant-numeric: tabular-nums; }
.cand-head h3 { margin: 0; font-size: 1.1rem; }
.badge { font-size: 0.8rem; font-weight: 700; padding: 0.05rem 0.5rem; border-radius: 3px; white-space: nowrap; }
.badge.pass { color: var(--pass); background: var(--pass-soft); border: 1px solid var(--pass); }
.badge.fail { color: var(--fail); background: var(--fail-soft); border: 1px dashed var(--fail); }
.badge.pick { color: #fff; background: var(--accent); border: 1px solid var(--accent); }
.badge.front { color: var(--accent); background: var(--card); border: 1px solid var(--accent); }
.cand-time { margin-left: auto; font-size: 1.15rem; font-weight: 700; font-variant-numeric: tabular-nums; }
.cand-time small { font-weight: 400; color: var(--muted); font-size: 0.85rem; }
.cand-sub { margin: 0.15rem 0 0.7rem; color: var(--muted); font-size: 0.92rem; }
.figs { display: grid; grid-template-columns: repeat(5, minmax(0, 1fr)); gap: 0.8rem; }
.fig img { display: block; width: 100%; height: auto; image-rendering: pixelated; border: 1px solid var(--rule); background: #000; }
.fig .noimg { display: flex; align-items: center; justify-content: center; aspect-ratio: 1 / 1; border: 1px dashed var(--rule); color: var(--muted); font-size: 0.85rem; background: #fafafa; }
.fig figcaption { margin-top: 0.25rem; font-size: 0.85rem; text-align: center; }
.fig figcaption .note { color: var(--muted); font-size: 0.78rem; }
.cand-foot { display: flex; flex-wrap: wrap; gap: 0.5rem 2rem; align-items: flex-start; margin-top: 0.8rem; }
table.values { width: auto; font-size: 0.86rem; background: var(--card); border: 1px solid #ebe8e1; }
table.values th, table.values td { padding: 0.2rem 0.6rem; }
table.values tr.accept td { font-weight: 650; }
table.values tr.accept td:first-child { box-shadow: inset 3px 0 0 var(--accent); }
.cand-notes { flex: 1 1 18rem; margin: 0; font-size: 0.9rem; }
.cand-notes dt { color: var(--muted); font-size: 0.8rem; }
.cand-notes dd { margin: 0 0 0.3rem; }
footer.foot { margin-top: 3rem; padding: 1rem 0 2rem; border-top: 1px solid var(--rule); color: var(--muted); font-size: 0.85rem; }

@media (max-width: 52rem) {
  .verdict { grid-template-columns: 1fr; }
  .figs { grid-template-columns: repeat(2, minmax(0, 1fr)); }
}
@media print {
  @page { margin: 12mm; }
  html { font-size: 10pt; }
  body { background: #fff; }
  .wrap { max-width: none; padding: 0; }
  .tablewrap { overflow: visible; border: none; }
  table { font-size: 8.5pt; }
  th, td { padding: 0.15rem 0.4rem; }
  th { white-space: normal; }
  h2, h3 { break-after: avoid; }
  section.part { margin: 1.2rem 0; }
  .verdict .bigtime { font-size: 2.4rem; }
  article.cand { padding: 0.5rem 0.8rem; margin-bottom: 0.6rem; }
  .masthead, .tablewrap, figure.chart, article.cand, .verdict { background: #fff; }
  nav.toc, .stepper, noscript { display: none !important; }
  #cand-list.stepping article.cand, #cand-list article.cand { display: block !important; }
  article.cand, figure.chart, .verdict, tr { break-inside: avoid; }
  .figs { grid-template-columns: repeat(5, minmax(0, 1fr)); }
}
</style>
</head>
<body>
<header class="masthead">
<div class="wrap">
<p class="kicker">accelerated acquisition plan · evidence report</p>
<h1>{{.Title}}</h1>
<p class="meta">plan <b>{{.PlanName}}</b> · accelplan {{.Version}}{{with .GeneratedAt}} · {{.}}{{end}}</p>
<nav class="toc" aria-label="sections"><a href="#recommendation">1 Recommendation</a><a href="#curves">2 Quality against scan time</a><a href="#table">3 Summary table</a><a href="#candidates">4 Candidates ({{len .Candidates}})</a></nav>
</div>
</header>
<main class="wrap">

<section class="part" id="recommendation">
<h2><span class="num">1</span> Recommendation</h2>
{{if .Pick.Found}}<div class="verdict found">
<div>
<span class="tag">✓ shortest protocol meeting the bar</span>
<span class="bigtime">{{.Pick.Time}}</span>
<span class="sub">scan time{{with .Pick.Seconds}}, {{.}}{{end}}</span>
<span class="saved">{{if .Pick.Longer}}{{.Pick.Saved}} longer ({{.Pick.SavedPct}} more){{else}}saves {{.Pick.Saved}} ({{.Pick.SavedPct}}){{end}}</span>
<span class="sub">against the reference protocol, {{.Reference}}</span>
</div>
<dl class="pickfacts">
<dt>protocol</dt><dd class="protocol">{{.Pick.Protocol}}</dd>
{{with .Pick.Scheme}}<dt>sampling</dt><dd>{{.}}</dd>{{end}}
{{with .Pick.Method}}<dt>reconstruction</dt><dd>{{.}}</dd>{{end}}
{{if or .Pick.R .Pick.Lines}}<dt>acceleration</dt><dd class="tnum">{{with .Pick.R}}R = {{.}}{{end}}{{if and .Pick.R .Pick.Lines}}, {{end}}{{with .Pick.Lines}}{{.}} lines acquired{{end}}</dd>{{end}}
<dt>time saved</dt><dd class="tnum">{{if .Pick.Longer}}{{.Pick.SavedSeconds}} ({{.Pick.SavedPct}}) more than{{else}}{{.Pick.SavedSeconds}} ({{.Pick.SavedPct}}) less than{{end}} the reference protocol{{with .ReferenceLabel}}, {{.}},{{end}} which takes {{.Reference}}</dd>
<dt>quality</dt><dd class="tnum">{{.Metric}} mean <b>{{.Pick.Mean}}</b>, one-sided 95% bound <b>{{.Pick.Bound}}</b>; bar {{.BarShort}}</dd>
<dt>how λ was chosen</dt><dd>{{if .Pick.Lambda}}{{.Pick.Lambda}}{{else}}not recorded{{end}}</dd>
{{with .Pick.Target}}<dt>evidence</dt><dd><a href="#{{.}}">images of this candidate</a></dd>{{end}}
</dl>
</div>{{else}}<div class="verdict none">
<span class="tag">✗ no recommendation</span>
<p class="headline">No candidate meets the bar</p>
<p>None of the {{len .Candidates}} candidates reached {{.BarLong}}. The reference protocol takes {{.Reference}}{{with .ReferenceLabel}} ({{.}}){{end}}. Lower the acceleration, add averages, or revisit the bar; the curves and images below show how far each candidate fell short.</p>
</div>{{end}}
{{with .Caution}}<aside class="caution" role="note"><strong>⚠ Caution</strong><p>{{.}}</p></aside>{{end}}

{{if .PerCurve}}<h3>Shortest passing protocol per scheme and method</h3>
<div class="tablewrap"><table class="percurve">
<thead><tr><th scope="col">sampling</th><th scope="col">reconstruction</th><th scope="col">protocol</th><th scope="col">scan time</th><th scope="col">saved</th><th scope="col">{{.Metric}} mean</th><th scope="col">95% bound</th><th scope="col">λ</th></tr></thead>
<tbody>
{{range .PerCurve}}<tr class="{{if .Found}}pass{{else}}fail{{end}}"><td>{{.Scheme}}</td><td>{{.Method}}</td>{{if .Found}}<td>{{.Protocol}}</td><td class="n">{{.Time}}</td><td class="n">{{if .Longer}}+{{.Saved}}{{else}}{{.Saved}} ({{.SavedPct}}){{end}}</td><td class="n">{{.Mean}}</td><td class="n">{{.Bound}}</td><td>{{.Lambda}}</td>{{else}}<td class="status" colspan="6">✗ no protocol of this curve meets the bar</td>{{end}}</tr>
{{end}}</tbody>
</table></div>{{end}}

{{if .Facts}}<h3>About this run</h3>
<dl class="facts">{{range .Facts}}<div><dt>{{.Name}}</dt><dd>{{.Value}}</dd></div>{{end}}</dl>{{end}}
</section>

<section class="part" id="curves">
<h2><span class="num">2</span> Quality against scan time</h2>
<p class="lede">Each candidate's quality over the scored noise draws, plotted against its scan time. The acceptance bar is {{.BarLong}}.</p>
{{range .Charts}}<figure class="chart"><img {{.Src}} alt="{{.Alt}}"/><figcaption><strong>{{.Name}}</strong>{{.Caption}}</figcaption></figure>
{{else}}<p class="hint">No chart was made for this run.</p>
{{end}}{{if .Pareto}}<h3>Pareto front across all schemes and methods</h3>
<p class="lede">Candidates that no other candidate beats on both scan time and mean {{.Metric}}, shortest first. Marked ◆ in the candidate list.</p>
<div class="tablewrap"><table class="pareto">
<thead><tr><th scope="col">bar</th><th scope="col">scan time</th><th scope="col">candidate</th><th scope="col">sampling</th><th scope="col">reconstruction</th><th scope="col">{{.Metric}} mean</th><th scope="col">95% bound</th></tr></thead>
<tbody>
{{range .Pareto}}<tr class="{{if .Meets}}pass{{else}}fail{{end}}{{if .Pick}} pick{{end}}"><td class="status">{{if .Meets}}✓ meets{{else}}✗ misses{{end}}{{if .Pick}} ★ pick{{end}}</td><td class="n">{{.Time}}</td><td><a href="#{{.ID}}">#{{.Number}} {{.Label}}</a></td><td>{{.Scheme}}</td><td>{{.Method}}</td><td class="n">{{.AcceptMean}}</td><td class="n">{{.AcceptBound}}</td></tr>
{{end}}</tbody>
</table></div>{{end}}
</section>

<section class="part" id="table">
<h2><span class="num">3</span> Summary table</h2>
{{if .Table.Header}}<p class="lede">Rows meeting the bar are marked ✓; rows missing it are marked ✗ and set in grey; the recommendation is marked ★.</p>
<div class="tablewrap"><table class="summary">
<thead><tr><th scope="col">bar</th>{{range .Table.Header}}<th scope="col">{{.}}</th>{{end}}</tr></thead>
<tbody>
{{range .Table.Rows}}<tr class="{{if .Meets}}pass{{else}}fail{{end}}{{if .Pick}} pick{{end}}"><td class="status">{{if .Meets}}✓ meets{{else}}✗ misses{{end}}{{if .Pick}} ★ pick{{end}}</td>{{range .Cells}}<td{{if numericCell .}} class="n"{{end}}>{{.}}</td>{{end}}</tr>
{{end}}</tbody>
</table></div>{{else}}<p class="hint">No summary table was given for this run.</p>{{end}}
</section>

<section class="part" id="candidates">
<h2><span class="num">4</span> Candidates, in order of scan time</h2>
<p class="lede">{{len .Candidates}} candidates, {{.Passing}} meeting the bar. Each shows the reconstruction, the truth, the error map, the sampling pattern and the point-spread function.</p>
{{if or .GrayBar .ErrorBar}}<div class="scales">
{{if .GrayBar}}<figure class="scale"><img {{.GrayBar}} alt="grey scale of reconstructions and truth"/><figcaption><span>{{.GrayLo}}</span><span>reconstruction and truth</span><span>{{.GrayHi}}</span></figcaption></figure>{{end}}
{{if .ErrorBar}}<figure class="scale"><img {{.ErrorBar}} alt="colour scale of the error maps"/><figcaption><span>−{{.ErrorLimit}}</span><span>error{{with .ErrorNote}}, {{.}}{{end}} (one scale for all)</span><span>+{{.ErrorLimit}}</span></figcaption></figure>{{end}}
</div>{{end}}
{{if .Candidates}}<div id="stepper" class="stepper" hidden="hidden" aria-label="candidate stepper">
<div class="row">
<button type="button" id="step-prev" aria-label="shorter scan">◀ shorter</button>
<input type="range" id="step-range" min="0" max="0" step="1" value="0" aria-label="candidate, ordered by scan time"/>
<button type="button" id="step-next" aria-label="longer scan">longer ▶</button>
<label for="step-group">show</label>
<select id="step-group"><option value="">all candidates</option>{{range .Groups}}<option value="{{.}}">{{.}}</option>{{end}}</select>
<button type="button" id="step-toggle" aria-pressed="false">List all</button>
</div>
<div class="row"><span class="readout" id="step-readout" aria-live="polite"></span></div>
<div class="strip" id="step-strip"></div>
<p class="hint" style="margin:0.3rem 0 0">Keys: ← and → step, Home and End jump to the shortest and the longest scan.</p>
</div>
<noscript><p class="hint">Script is off: every candidate is listed below, in order of scan time.</p></noscript>
<div id="cand-list" data-start="{{.StartID}}" data-start-group="{{.StartGroup}}">
{{range .Candidates}}<article class="cand {{if .Meets}}pass{{else}}fail{{end}}{{if .Pick}} pick{{end}}" id="{{.ID}}" data-group="{{.Group}}" data-time="{{.Time}}" data-summary="{{.Label}} · {{.Group}} · {{.Time}} · {{if .Meets}}✓ meets the bar{{else}}✗ misses the bar{{end}}{{if .Pick}} · ★ recommended{{end}}">
<div class="cand-head"><span class="cand-no" title="position in order of scan time">#{{.Number}}</span><h3>{{.Label}}</h3>{{if .Meets}}<span class="badge pass">✓ meets the bar</span>{{else}}<span class="badge fail">✗ misses the bar</span>{{end}}{{if .Pick}}<span class="badge pick">★ recommended</span>{{end}}{{if .Pareto}}<span class="badge front" title="no other candidate is both shorter and better">◆ Pareto front</span>{{end}}<span class="cand-time">{{.Time}}{{with .Seconds}} <small>{{.}}</small>{{end}}</span></div>
<p class="cand-sub">{{with .Scheme}}{{.}}{{end}}{{if and .Scheme .Method}} · {{end}}{{with .Method}}{{.}}{{end}}{{with .R}} · R = {{.}}{{end}}{{with .Lines}} · {{.}} lines{{end}}</p>
<div class="figs">{{range .Figures}}<figure class="fig fig-{{.Kind}}">{{if .Src}}<img {{.Src}} alt="{{.Alt}}"/>{{else}}<div class="noimg">not available</div>{{end}}<figcaption>{{.Caption}}{{with .Note}}<br/><span class="note">{{.}}</span>{{end}}</figcaption></figure>{{end}}</div>
<div class="cand-foot">
{{if .Values}}<table class="values"><thead><tr><th scope="col">metric</th><th scope="col">mean</th><th scope="col">SD</th><th scope="col">95% bound</th><th scope="col">draws</th></tr></thead>
<tbody>{{range .Values}}<tr{{if .Accept}} class="accept"{{end}}><td>{{.Metric}}</td><td class="n">{{.Mean}}</td><td class="n">{{.Std}}</td><td class="n">{{.Bound}}</td><td class="n">{{.N}}</td></tr>{{end}}</tbody></table>{{end}}
{{if or .Lambda .Note}}<dl class="cand-notes">{{with .Lambda}}<dt>how λ was chosen</dt><dd>{{.}}</dd>{{end}}{{with .Note}}<dt>note</dt><dd>{{.}}</dd>{{end}}</dl>{{end}}
</div>
</article>
{{end}}</div>{{else}}<p class="hint">No candidates.</p>{{end}}
</section>
</main>
<footer class="foot"><div class="wrap">Made by accelplan {{.Version}} from plan {{.PlanName}}{{with .GeneratedAt}} on {{.}}{{end}}. This page is self-contained: it needs no network and can be archived, mailed or printed as it is.</div></footer>
<script>{{.Script}}</script>
</body>
</html>
`

// reportScript is the stepper: it shows one candidate at a time, in order
// of scan time, with buttons, a range slider, a row of time marks and the
// arrow keys, and can switch back to the full list. Without script the page
// lists every candidate. It is wrapped in a CDATA section behind comments so
// that the page stays well-formed XML.
const reportScript = `/*<![CDATA[*/
(function () {
  "use strict";
  var list = document.getElementById("cand-list");
  var panel = document.getElementById("stepper");
  if (!list || !panel || !list.querySelectorAll || !list.classList) { return; }
  var all = Array.prototype.slice.call(list.querySelectorAll("article.cand"));
  if (all.length === 0) { return; }
  var range = document.getElementById("step-range");
  var prev = document.getElementById("step-prev");
  var next = document.getElementById("step-next");
  var readout = document.getElementById("step-readout");
  var group = document.getElementById("step-group");
  var toggle = document.getElementById("step-toggle");
  var strip = document.getElementById("step-strip");
  var shown = all, pos = 0, stepping = false;

  function choose(g) {
    shown = all.filter(function (a) { return g === "" || a.getAttribute("data-group") === g; });
    if (shown.length === 0) { shown = all; }
    while (strip.firstChild) { strip.removeChild(strip.firstChild); }
    shown.forEach(function (a, i) {
      var b = document.createElement("button");
      var ok = a.classList.contains("pass");
      b.type = "button";
      b.className = "tick " + (ok ? "pass" : "fail") + (a.classList.contains("pick") ? " pick" : "");
      b.textContent = a.getAttribute("data-time") + (ok ? " \u2713" : " \u2717") + (a.classList.contains("pick") ? " \u2605" : "");
      b.title = a.getAttribute("data-summary");
      b.addEventListener("click", function () { go(i); });
      strip.appendChild(b);
    });
    range.max = String(shown.length - 1);
  }

  function go(i) {
    if (isNaN(i)) { i = pos; }
    pos = Math.max(0, Math.min(shown.length - 1, i));
    all.forEach(function (a) { a.classList.remove("current"); });
    var a = shown[pos];
    a.classList.add("current");
    range.value = String(pos);
    prev.disabled = !stepping || pos === 0;
    next.disabled = !stepping || pos === shown.length - 1;
    readout.textContent = (pos + 1) + " of " + shown.length + " \u00b7 " + a.getAttribute("data-summary");
    Array.prototype.forEach.call(strip.children, function (b, j) {
      b.setAttribute("aria-current", j === pos ? "true" : "false");
    });
    list.setAttribute("data-current", a.id);
  }

  function setStepping(on) {
    stepping = on;
    if (on) { list.classList.add("stepping"); } else { list.classList.remove("stepping"); }
    toggle.textContent = on ? "List all" : "Step through";
    toggle.setAttribute("aria-pressed", on ? "false" : "true");
    range.disabled = !on;
    group.disabled = !on;
    go(pos);
  }

  range.addEventListener("input", function () { go(parseInt(range.value, 10)); });
  prev.addEventListener("click", function () { go(pos - 1); });
  next.addEventListener("click", function () { go(pos + 1); });
  toggle.addEventListener("click", function () { setStepping(!stepping); });
  group.addEventListener("change", function () {
    var cur = shown[pos];
    choose(group.value);
    var j = shown.indexOf(cur);
    go(j >= 0 ? j : shown.length - 1);
  });
  document.addEventListener("keydown", function (e) {
    if (!stepping || e.altKey || e.ctrlKey || e.metaKey) { return; }
    var t = e.target, tag = t && t.tagName ? t.tagName : "";
    if (t === range || tag === "SELECT" || tag === "TEXTAREA" || tag === "INPUT") { return; }
    if (e.key === "ArrowLeft") { go(pos - 1); }
    else if (e.key === "ArrowRight") { go(pos + 1); }
    else if (e.key === "Home") { go(0); }
    else if (e.key === "End") { go(shown.length - 1); }
    else { return; }
    e.preventDefault();
  });

  var startGroup = list.getAttribute("data-start-group") || "";
  group.value = startGroup;
  if (group.value !== startGroup) { group.value = ""; }
  choose(group.value);
  var s = shown.indexOf(document.getElementById(list.getAttribute("data-start")));
  pos = s >= 0 ? s : shown.length - 1;
  panel.hidden = false;
  panel.removeAttribute("hidden");
  setStepping(true);
  document.documentElement.setAttribute("data-stepper", "ready");
})();
/*]]>*/`
