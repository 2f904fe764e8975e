namespace Seamwright.Pipeline.Report;

/// <summary>The report's own style sheet and script, inlined so the file stands alone.</summary>
internal static class ReportAssets
{
    public const string Css = """
:root{--paper:#f3f0e8;--card:#fffdf8;--ink:#1e2a32;--muted:#5d6b73;--rule:#d9d2c3;--accent:#0d6b6b;
--ok:#1f4e79;--weak:#8a4f9e;--bad:#3b3b3b;--out:#1d8a8a;--mono:ui-monospace,SFMono-Regular,Menlo,Consolas,monospace}
*{box-sizing:border-box}
body{margin:0;background:var(--paper);color:var(--ink);font:15px/1.5 system-ui,-apple-system,"Segoe UI",Roboto,sans-serif}
header{background:var(--ink);color:#f3f0e8;padding:18px 28px;display:flex;gap:18px;align-items:center;flex-wrap:wrap}
header h1{margin:0;font-size:22px;font-weight:600;letter-spacing:.01em}
header .sub{color:#b9c4c9;font-size:13px}
.mark{width:34px;height:34px;flex:none}
.chips{margin-left:auto;display:flex;gap:8px;flex-wrap:wrap}
.chip{border-radius:3px;padding:2px 9px;font-size:12px;font-weight:600;letter-spacing:.04em;text-transform:uppercase;border:1px solid currentColor}
.st-accepted{color:var(--ok)}.st-weak{color:var(--weak)}.st-rejected{color:var(--bad)}
header .chip{background:#f3f0e8}
header .chip.zero{color:#b9c4c9;background:transparent;border-color:#5d6b73;font-weight:400}
main{max-width:1280px;margin:0 auto;padding:20px 28px 40px}
section{background:var(--card);border:1px solid var(--rule);border-radius:4px;margin:18px 0;padding:16px 20px}
h2{font-size:12px;text-transform:uppercase;letter-spacing:.14em;color:var(--accent);margin:0 0 12px;font-weight:700}
.warn{border-left:4px solid var(--weak);background:#f7f0fa}
.problems ul{margin:0;padding-left:18px}
.problems li{margin:2px 0}
.pager{display:flex;gap:10px;align-items:center;margin:0 0 10px;flex-wrap:wrap;font-size:13px}
.pager input,.pager select,.pager button{font:inherit;padding:2px 8px}
.warn ul{margin:0;padding-left:18px}
.top{display:grid;grid-template-columns:minmax(0,3fr) minmax(320px,2fr);gap:18px}
@media (max-width:900px){.top{grid-template-columns:1fr}}
.top section{margin:0}
figure{margin:0}
figure img{display:block;max-width:100%;height:auto;border:1px solid var(--rule);background:#24262b}
figcaption{color:var(--muted);font-size:12px;margin-top:6px}
dl{display:grid;grid-template-columns:auto 1fr;gap:6px 14px;margin:0}
dt{color:var(--muted);font-size:13px}
dd{margin:0;font-family:var(--mono);font-size:13px;word-break:break-word}
dl .wide{grid-column:1/-1}
dd.prose{font-family:inherit;margin:-4px 0 4px}
svg.graph{width:100%;height:auto;background:#fbf9f3;border:1px solid var(--rule)}
svg.graph line{stroke-linecap:round}
svg.graph line.hot{stroke:var(--accent);stroke-width:4}
svg.graph circle{fill:var(--card);stroke:var(--ink);stroke-width:2}
svg.graph circle.ref{fill:var(--accent)}
svg.graph circle.unplaced{stroke-dasharray:3 3;fill:#eee9dd}
svg.graph text{font:11px var(--mono);fill:var(--ink);text-anchor:middle;dominant-baseline:central;pointer-events:none}
svg.graph circle.ref+text{fill:#fff}
.legend{display:flex;gap:16px;font-size:12px;color:var(--muted);margin-top:8px;flex-wrap:wrap}
.legend i{display:inline-block;width:22px;height:0;border-top:3px solid;vertical-align:middle;margin-right:6px}
table{border-collapse:collapse;width:100%;font-size:13px}
th,td{padding:6px 10px;border-bottom:1px solid var(--rule);text-align:left}
td.n{text-align:right;font-family:var(--mono)}
th button{all:unset;cursor:pointer;font-weight:600;color:var(--ink)}
th button::after{content:" \2195";color:var(--muted)}
th[aria-sort=ascending] button::after{content:" \2191";color:var(--accent)}
th[aria-sort=descending] button::after{content:" \2193";color:var(--accent)}
tbody tr:hover{background:#f1ede2}
tr.out td:first-child{box-shadow:inset 4px 0 0 var(--out)}
details{border-bottom:1px solid var(--rule);padding:6px 0}
summary{cursor:pointer;font-weight:600}
details ul{margin:6px 0 4px;padding-left:20px;color:var(--muted)}
.note{color:var(--out)}
.thumbs{display:grid;grid-template-columns:repeat(auto-fill,minmax(190px,1fr));gap:14px}
.thumb{border:1px solid var(--rule);border-radius:4px;padding:8px;background:#fff}
.thumb img{display:block;max-width:100%;height:auto;margin:0 auto 6px;background:#ddd}
.thumb .name{font-weight:600;font-size:13px;word-break:break-all}
.thumb .meta{font-size:12px;color:var(--muted)}
.thumb table.m{margin-top:6px;font:11px/1.3 var(--mono);width:auto;border-left:2px solid var(--rule);border-right:2px solid var(--rule)}
.thumb table.m td{border:0;padding:0 6px;text-align:right}
.badge{font-size:11px;font-weight:700;color:#fff;background:var(--accent);border-radius:3px;padding:1px 6px;margin-left:6px}
footer{color:var(--muted);font-size:12px;text-align:center;padding:0 28px 30px}
footer code{font-family:var(--mono)}
""";

    /// <summary>
    /// Sorts the confidence table by a clicked column, filters it by image name and status, shows it
    /// a page of 100 rows at a time, and highlights a pair's edge on hover.
    /// </summary>
    public const string Script = """
(function () {
  var table = document.getElementById('pairs');
  if (!table) { return; }
  var body = table.tBodies[0];
  var heads = table.tHead.rows[0].cells;
  var pageSize = 100, page = 0;
  var filter = document.getElementById('filter'), status = document.getElementById('status');
  var label = document.getElementById('page');
  function matching() {
    var text = filter ? filter.value.trim().toLowerCase() : '';
    var want = status ? status.value : '';
    return Array.prototype.filter.call(body.rows, function (r) {
      if (want && r.cells[2].getAttribute('data-v') !== want) { return false; }
      return !text || r.cells[0].getAttribute('data-v').toLowerCase().indexOf(text) >= 0
        || r.cells[1].getAttribute('data-v').toLowerCase().indexOf(text) >= 0;
    });
  }
  function show() {
    var rows = matching();
    var pages = Math.max(1, Math.ceil(rows.length / pageSize));
    page = Math.min(Math.max(page, 0), pages - 1);
    Array.prototype.forEach.call(body.rows, function (r) { r.hidden = true; });
    rows.slice(page * pageSize, (page + 1) * pageSize).forEach(function (r) { r.hidden = false; });
    if (label) { label.textContent = 'page ' + (page + 1) + ' of ' + pages + ' (' + rows.length + ' of ' + body.rows.length + ' pairs)'; }
  }
  Array.prototype.forEach.call(heads, function (th, col) {
    var button = th.querySelector('button');
    if (!button) { return; }
    button.addEventListener('click', function () {
      var ascending = th.getAttribute('aria-sort') !== 'ascending';
      Array.prototype.forEach.call(heads, function (h) { h.removeAttribute('aria-sort'); });
      th.setAttribute('aria-sort', ascending ? 'ascending' : 'descending');
      var numeric = th.getAttribute('data-type') === 'num';
      var rows = Array.prototype.slice.call(body.rows);
      rows.sort(function (a, b) {
        var x = a.cells[col].getAttribute('data-v'), y = b.cells[col].getAttribute('data-v');
        var c = numeric ? (parseFloat(x) - parseFloat(y)) : x.localeCompare(y);
        if (c === 0) { c = parseInt(a.getAttribute('data-i'), 10) - parseInt(b.getAttribute('data-i'), 10); }
        return ascending ? c : -c;
      });
      rows.forEach(function (r) { body.appendChild(r); });
      show();
    });
  });
  if (filter) { filter.addEventListener('input', function () { page = 0; show(); }); }
  if (status) { status.addEventListener('change', function () { page = 0; show(); }); }
  var prev = document.getElementById('prev'), next = document.getElementById('next');
  if (prev) { prev.addEventListener('click', function () { page--; show(); }); }
  if (next) { next.addEventListener('click', function () { page++; show(); }); }
  Array.prototype.forEach.call(body.rows, function (row) {
    var edge = document.getElementById('edge-' + row.getAttribute('data-i'));
    if (!edge) { return; }
    row.addEventListener('mouseenter', function () { edge.classList.add('hot'); });
    row.addEventListener('mouseleave', function () { edge.classList.remove('hot'); });
  });
  show();
})();
""";

    /// <summary>The report's mark: two overlapping sheets joined by a stitched seam.</summary>
    public const string Mark = """
<svg class="mark" viewBox="0 0 34 34" aria-hidden="true"><rect x="2" y="6" width="18" height="22" rx="2" fill="none" stroke="#7fc4c4" stroke-width="2"/><rect x="14" y="4" width="18" height="22" rx="2" fill="none" stroke="#f3f0e8" stroke-width="2"/><path d="M17 8v16" stroke="#e0a526" stroke-width="2" stroke-dasharray="2 2"/></svg>
""";
}
