// The report page of a sweep (`tritsim report SWEEP.csv --out DIR`,
// docs/report-page.md): a self-contained HTML document drawn from a sweep
// result CSV (docs/sweeps.md) with inline SVG plots: Pareto fronts with
// every front point labelled (its id and axis values), one plot per axis
// and headline metric, and the table of points, sortable by any column.
#pragma once

#include <string>

#include "common/csv.h"

namespace tritsim {

// True when `table` has a sweep CSV's header: "id" first, a "status"
// column after it.
bool IsSweepTable(const CsvTable& table);

// The page's HTML. `source` names the CSV in the page (as given). Pure:
// the same CSV gives the same bytes.
std::string SweepReportPage(const CsvTable& table, const std::string& source);

}  // namespace tritsim
