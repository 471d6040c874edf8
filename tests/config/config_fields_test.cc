// The field tables (config_fields.h) are the one place a key's range, unit
// and default live: docs/config-reference.md must list every key of each
// file kind with the table's rendered range, unit and default, and nothing
// else; the loader must take exactly the table's keys.
#include "config/config_fields.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <vector>

#include "common/error.h"
#include "config/config_loader.h"

namespace tritsim {
namespace {

// One row of a markdown table whose first cell is a key in backticks.
struct DocsRow {
  std::vector<std::string> cells;  // trimmed cells, first to last
  std::string allowed() const { return cells.back(); }
};

std::string ReadDocs() {
  std::ifstream in(std::string(TRITSIM_SOURCE_DIR) + "/docs/config-reference.md");
  std::stringstream text;
  text << in.rdbuf();
  return text.str();
}

std::string Trim(const std::string& s) {
  const size_t first = s.find_first_not_of(' ');
  return first == std::string::npos ? "" : s.substr(first, s.find_last_not_of(' ') - first + 1);
}

std::vector<std::string> Cells(const std::string& line) {
  std::vector<std::string> cells;
  std::string cell;
  std::istringstream in(line.substr(1));  // after the leading '|'
  while (std::getline(in, cell, '|')) cells.push_back(Trim(cell));
  if (!cells.empty() && cells.back().empty()) cells.pop_back();
  return cells;
}

// Key -> rows of the docs between heading `from` and heading `to`.
std::map<std::string, std::vector<DocsRow>> DocsRows(const std::string& from,
                                                     const std::string& to) {
  const std::string docs = ReadDocs();
  const size_t start = docs.find(from);
  std::istringstream lines(docs.substr(start, docs.find(to, start) - start));
  std::map<std::string, std::vector<DocsRow>> rows;
  for (std::string line; std::getline(lines, line);) {
    if (line.rfind("| `", 0) != 0) continue;
    const std::vector<std::string> cells = Cells(line);
    const std::string key = cells[0].substr(1, cells[0].find('`', 1) - 1);
    rows[key].push_back(DocsRow{cells});
  }
  return rows;
}

std::string StripBackticks(std::string s) {
  s.erase(std::remove(s.begin(), s.end(), '`'), s.end());
  return s;
}

bool StartsWith(const std::string& s, const std::string& prefix) { return s.rfind(prefix, 0) == 0; }

// The docs may follow the range with a cross-key rule after ';' or ','.
bool AllowedMatches(const std::string& docs, const std::string& table) {
  return docs == table || StartsWith(docs, table + ";") || StartsWith(docs, table + ",");
}

template <typename Config>
void ExpectDocsMatch(const std::vector<ConfigField<Config>>& fields, const std::string& from,
                     const std::string& to) {
  auto rows = DocsRows(from, to);
  for (const ConfigField<Config>& f : fields) {
    ASSERT_EQ(rows[f.key].size(), 1u) << f.key << " should be listed once under " << from;
    const DocsRow& row = rows[f.key].front();
    EXPECT_TRUE(AllowedMatches(row.allowed(), AllowedText(f)))
        << f.key << ": docs say '" << row.allowed() << "', the table '" << AllowedText(f) << "'";
    if (row.cells.size() == 5) {  // key | meaning | unit | default | allowed
      EXPECT_EQ(row.cells[2], f.unit) << f.key;
      EXPECT_TRUE(StartsWith(StripBackticks(row.cells[3]), DefaultText(f)))
          << f.key << ": docs default '" << row.cells[3] << "', the table '" << DefaultText(f)
          << "'";
    }
    rows.erase(f.key);
  }
  for (const auto& [key, unused] : rows) ADD_FAILURE() << key << " is in the docs, not the table";
}

TEST(ConfigFields, DocsListEveryModelKeyWithItsRangeUnitAndDefault) {
  ExpectDocsMatch(ModelFields(), "## Model description", "## Architecture (design point)");
}

TEST(ConfigFields, DocsListEveryArchKeyWithItsRangeUnitAndDefault) {
  ExpectDocsMatch(ArchFields(), "## Architecture (design point)", "## DRAM presets");
}

TEST(ConfigFields, RangeTextReadsLikeTheDocs) {
  EXPECT_EQ(AllowedText(FieldKind::kInt, IntRule{2, 4096, true}, {0, 0}, {}, {}),
            "power of two in [2, 4096]");
  EXPECT_EQ(AllowedText(FieldKind::kReal, {0, 0}, RealRule{0.0, 1e6, true, false}, {}, {}),
            "real in (0, 1000000]");
  EXPECT_EQ(AllowedText(FieldKind::kIntChoice, {0, 0}, {0, 0}, {16, 32, 64}, {}), "16, 32 or 64");
  EXPECT_EQ(AllowedText(FieldKind::kChoice, {0, 0}, {0, 0}, {}, {"open", "closed"}),
            "`open`, `closed`");
}

// Every key of the table is read: a value out of its range is refused with
// the key path in the message (so no key is in the table but ignored).
TEST(ConfigFields, LoaderRefusesAnOutOfRangeValueForEveryIntegerKey) {
  for (const ArchField& f : ArchFields()) {
    if (f.kind != FieldKind::kInt) continue;
    const std::string bad = std::to_string(f.int_rule.hi + 1);
    try {
      DefaultArch({{f.key, bad}});
      ADD_FAILURE() << f.key << "=" << bad << " was accepted";
    } catch (const Error& e) {
      EXPECT_NE(std::string(e.what()).find(f.key), std::string::npos) << e.what();
    }
  }
}

TEST(ConfigFields, EveryKeyIsUniqueAndEveryFieldCanStoreAndShow) {
  std::map<std::string, int> seen;
  for (const ArchField& f : ArchFields()) {
    EXPECT_EQ(++seen["arch." + f.key], 1) << f.key;
    EXPECT_TRUE(f.set && f.show) << f.key;
  }
  for (const ModelField& f : ModelFields()) {
    EXPECT_EQ(++seen["model." + f.key], 1) << f.key;
    EXPECT_TRUE(f.set && f.show) << f.key;
  }
}

TEST(ConfigFields, UnknownKeySuggestionsComeFromTheTable) {
  try {
    DefaultArch({{"dram.timing.tRDC", "20"}});
    FAIL() << "accepted an unknown key";
  } catch (const Error& e) {
    EXPECT_NE(std::string(e.what()).find("did you mean 'arch.dram.timing.tRCD'"), std::string::npos)
        << e.what();
  }
}

}  // namespace
}  // namespace tritsim
