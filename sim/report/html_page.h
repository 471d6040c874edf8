// The frame of a report page (`tritsim report`, docs/report-page.md): one
// self-contained HTML5 file with its CSS and script inline, no network
// reference, no external font, no clock. Tables, headline cards and the
// page skeleton shared by the run page (report/run_page.h) and the sweep
// page (sweep/sweep_page.h).
//
// The page's script is small and only reads the page: it counts script
// errors and console errors into the <html> attribute data-page-errors
// (a test reads it back with a headless browser), sorts any table of class
// "sortable" when a column header is clicked (or on load, from a URL
// fragment #sort=COLUMN, #sort=-COLUMN for descending), and sets
// data-page-ready="1" on <html> when done.
#pragma once

#include <string>
#include <vector>

namespace tritsim {

// One table cell: its text (escaped when written) and, for sorting, its
// value (a number as text sorts numerically; empty: the text).
struct HtmlCell {
  std::string text;
  std::string sort_value;
  std::string css_class;  // e.g. "num" (right-aligned); empty: none
};

struct HtmlColumn {
  std::string title;  // the header text, in words with the unit
  std::string key;    // the data's own name (a CSV column or JSON key); #sort=KEY
};

// A <table>; `sortable` adds click-to-sort on the headers.
std::string HtmlTable(const std::string& id, const std::vector<HtmlColumn>& columns,
                      const std::vector<std::vector<HtmlCell>>& rows, bool sortable);

// A numeric cell: `text` shown, `value` (exact) for sorting.
HtmlCell NumberCell(const std::string& text, double value);

// A headline card: a label, a big value (with the element id `id`, so tests
// and readers can find it) and a small note under it.
std::string HeadlineCard(const std::string& id, const std::string& label, const std::string& value,
                         const std::string& note);

// The whole document around `body` (already HTML).
std::string HtmlDocument(const std::string& title, const std::string& body);

}  // namespace tritsim
