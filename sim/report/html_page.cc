// The frame of a report page. See html_page.h.
#include "report/html_page.h"

#include <fmt/format.h>

#include <cmath>

#include "report/svg_plot.h"

namespace tritsim {
namespace {

// System font stacks only: the page loads no font.
const char* const kStyle = R"css(
body{font-family:"DejaVu Sans",Verdana,Arial,sans-serif;margin:24px 32px;color:#1a1a1a;
background:#fff;max-width:1200px;font-size:14px}
h1{font-size:22px;margin:0 0 4px}h2{font-size:18px;margin:28px 0 8px;border-bottom:1px solid #ccc;
padding-bottom:3px}h3{font-size:15px;margin:18px 0 6px}
p.sub{color:#555;margin:0 0 14px}
.cards{display:flex;flex-wrap:wrap;gap:10px}
.card{border:1px solid #ccc;border-radius:6px;padding:8px 12px;min-width:150px}
.card .l{font-size:12px;color:#555}.card .v{font-size:20px;font-weight:bold;margin:2px 0}
.card .n{font-size:12px;color:#555}
table{border-collapse:collapse;margin:6px 0 12px;font-size:13px}
th,td{border:1px solid #ccc;padding:3px 7px;text-align:left;vertical-align:top}
th{background:#f2f2f2}td.num{text-align:right;font-variant-numeric:tabular-nums;white-space:nowrap}
td:first-child{white-space:nowrap}
table.sortable th{cursor:pointer}
table.sortable th[aria-sort=ascending]::after{content:" \25B2"}
table.sortable th[aria-sort=descending]::after{content:" \25BC"}
svg.plot{display:block;margin:6px 0 14px;font-size:12px}
svg .grid{stroke:#e3e3e3;stroke-width:1}
svg .pt{font-size:14px;font-weight:bold}svg .pl{font-size:11px}svg .bl{font-size:11px}
pre,code{font-family:"DejaVu Sans Mono",monospace;font-size:12px}
pre{background:#f6f6f6;padding:8px;overflow-x:auto;white-space:pre-wrap;word-break:break-all}
.note{color:#555;font-size:12px}
)css";

// Error counting first, so it sees every later script error.
const char* const kHeadScript = R"js(
(function(){var h=document.documentElement;function bump(){
h.setAttribute('data-page-errors',String(Number(h.getAttribute('data-page-errors')||0)+1));}
window.addEventListener('error',bump);window.addEventListener('unhandledrejection',bump);
var e=console.error;console.error=function(){bump();return e.apply(console,arguments);};})();
)js";

// Click-to-sort for table.sortable: numbers (data-v) numerically, text
// otherwise; empty values last. #sort=KEY or #sort=-KEY sorts on load.
const char* const kBodyScript = R"js(
(function(){
function val(c){var v=c.getAttribute('data-v');return v===null?c.textContent:v;}
function sortBy(th,desc){var t=th.closest('table'),b=t.tBodies[0],i=th.cellIndex;
var rows=Array.prototype.slice.call(b.rows);
rows.sort(function(r,s){var x=val(r.cells[i]),y=val(s.cells[i]);
if(x===''&&y==='')return 0;if(x==='')return 1;if(y==='')return -1;
var a=Number(x),c=Number(y),d=(!isNaN(a)&&!isNaN(c))?a-c:x.localeCompare(y);return desc?-d:d;});
rows.forEach(function(r){b.appendChild(r);});
Array.prototype.forEach.call(t.tHead.rows[0].cells,function(h){h.removeAttribute('aria-sort');});
th.setAttribute('aria-sort',desc?'descending':'ascending');}
var heads=document.querySelectorAll('table.sortable th');
Array.prototype.forEach.call(heads,function(th){th.addEventListener('click',function(){
sortBy(th,th.getAttribute('aria-sort')==='ascending');});});
var m=/^#sort=(-?)(.+)$/.exec(decodeURIComponent(location.hash||''));
if(m){Array.prototype.forEach.call(heads,function(th){
if(th.getAttribute('data-key')===m[2])sortBy(th,m[1]==='-');});}
document.documentElement.setAttribute('data-page-ready','1');})();
)js";

}  // namespace

HtmlCell NumberCell(const std::string& text, double value) {
  return {text, std::isfinite(value) ? fmt::format("{}", value) : "", "num"};
}

std::string HtmlTable(const std::string& id, const std::vector<HtmlColumn>& columns,
                      const std::vector<std::vector<HtmlCell>>& rows, bool sortable) {
  std::string s = "<table id=\"" + HtmlEscape(id) + "\"" + (sortable ? " class=\"sortable\"" : "") +
                  ">\n<thead><tr>";
  for (const HtmlColumn& c : columns) {
    s += "<th data-key=\"" + HtmlEscape(c.key) + "\"" +
         (sortable ? " title=\"click to sort\"" : "") + ">" + HtmlEscape(c.title) + "</th>";
  }
  s += "</tr></thead>\n<tbody>\n";
  for (const auto& row : rows) {
    s += "<tr>";
    for (const HtmlCell& cell : row) {
      s += "<td";
      if (!cell.css_class.empty()) s += " class=\"" + cell.css_class + "\"";
      if (sortable) s += " data-v=\"" + HtmlEscape(cell.sort_value) + "\"";
      s += ">" + HtmlEscape(cell.text) + "</td>";
    }
    s += "</tr>\n";
  }
  return s + "</tbody></table>\n";
}

std::string HeadlineCard(const std::string& id, const std::string& label, const std::string& value,
                         const std::string& note) {
  return "<div class=\"card\"><div class=\"l\">" + HtmlEscape(label) +
         "</div><div class=\"v\" id=\"" + HtmlEscape(id) + "\">" + HtmlEscape(value) +
         "</div><div class=\"n\">" + HtmlEscape(note) + "</div></div>\n";
}

std::string HtmlDocument(const std::string& title, const std::string& body) {
  return std::string("<!DOCTYPE html>\n<html lang=\"en\" data-page-errors=\"0\">\n<head>\n") +
         "<meta charset=\"utf-8\">\n<meta name=\"viewport\" content=\"width=device-width\">\n" +
         "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; " +
         "style-src 'unsafe-inline'; script-src 'unsafe-inline'; img-src data:\">\n" + "<title>" +
         HtmlEscape(title) + "</title>\n<style>" + kStyle + "</style>\n<script>" + kHeadScript +
         "</script>\n</head>\n<body>\n" + body + "<script>" + kBodyScript +
         "</script>\n</body>\n</html>\n";
}

}  // namespace tritsim
