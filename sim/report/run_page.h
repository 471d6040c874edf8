// The report page of one run (`tritsim report RUN.json --out DIR`,
// docs/report-page.md): a self-contained HTML document drawn from a run
// JSON (schema tritsim.run/1) with inline SVG plots: the headline per phase,
// the per-phase table with the binding resource, stall and energy
// breakdowns per phase, a roofline per phase with every ceiling, the top
// ops and the provenance with the resolved configuration.
#pragma once

#include <string>

#include <nlohmann/json_fwd.hpp>

namespace tritsim {

// The page's HTML. `source` names the JSON in the page (as given). Pure:
// the same JSON gives the same bytes. Throws tritsim::Error (kBadInput)
// naming `source` and the key when a figure the page needs is missing or
// has the wrong type.
std::string RunReportPage(const nlohmann::json& run, const std::string& source);

}  // namespace tritsim
