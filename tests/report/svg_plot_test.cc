// The report page's SVG writer and number text (report/svg_plot.h) and the
// fixed plot styles (report/svg_style.h).
#include "report/svg_plot.h"

#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <set>
#include <string>

#include "report/svg_style.h"

namespace tritsim {
namespace {

// printf's %.*g (C99 7.21.6.1), the reference SiText's digits must match.
std::string Printf(double v, int digits) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*g", digits, v);
  return buf;
}

TEST(SiText, PlainBetweenAHundredthAndTenThousandWithPrintfDigits) {
  for (double v : {0.01, 0.5, 1.0, 3.6027737276809138, 269.9900643656313, 6476.468964355943}) {
    EXPECT_EQ(SiText(v), Printf(v, 4)) << v;
  }
  EXPECT_EQ(SiText(3.6027737276809138, "W"), "3.603 W");
  EXPECT_EQ(SiText(0), "0");
}

// SI prefixes: BIPM, The International System of Units, 9th edition
// (2019), table 7 (k 10^3, M 10^6, G 10^9, T 10^12, m 10^-3, micro 10^-6).
TEST(SiText, UsesSiPrefixesOutsideThatRange) {
  EXPECT_EQ(SiText(8191999999999.999, "op/s"), "8.192 Top/s");
  EXPECT_EQ(SiText(25599999999.999996, "B/s"), "25.6 GB/s");
  EXPECT_EQ(SiText(12000), "12 k");
  EXPECT_EQ(SiText(0.0005562867277692875, "J"), "556.3 \u00b5J");
  EXPECT_EQ(SiText(0.008864701723285483, "J"), "8.865 mJ");
}

TEST(SiText, RoundingThatCarriesToAThousandMovesUpAPrefix) {
  EXPECT_EQ(SiText(999960), "1 M");  // 999.96 k at 4 digits would print "1000 k"
  EXPECT_EQ(SiText(999940), "999.9 k");
}

TEST(SiText, NotANumberIsADash) { EXPECT_EQ(SiText(std::nan("")), "-"); }

// The five characters HTML 5 requires escaping in text and attribute
// values (WHATWG HTML, "Serializing HTML fragments", escaping a string).
TEST(HtmlEscape, EscapesTheMarkupCharacters) {
  EXPECT_EQ(HtmlEscape("a<b>&\"c'"), "a&lt;b&gt;&amp;&quot;c&#39;");
  EXPECT_EQ(HtmlEscape("embed,x"), "embed,x");
}

TEST(SvgPlot, DrawsOnlyPointsInsideAndLabelsBothAxes) {
  PlotAxis x("operational intensity (ops per DRAM byte)", AxisScale::kLog, 0.1, 1000);
  PlotAxis y("achieved throughput (ops per second)", AxisScale::kLog, 1e9, 1e14);
  SvgPlot plot("p", "title <1>", x, y);
  plot.Marker({10, 1e12}, MarkerShape::kSquare, "#4477aa", "inside");
  plot.Marker({1e5, 1e12}, MarkerShape::kSquare, "#4477aa", "outside");
  const std::string svg = plot.Render();
  EXPECT_NE(svg.find("<title>inside</title>"), std::string::npos);
  EXPECT_EQ(svg.find("outside"), std::string::npos);
  EXPECT_NE(svg.find("operational intensity (ops per DRAM byte)"), std::string::npos);
  EXPECT_NE(svg.find("title &lt;1&gt;"), std::string::npos);
  // A decade tick per power of ten within the range: 0.1, 1, 10, 100, 1000.
  for (const char* tick : {">0.1<", ">1<", ">10<", ">100<", ">1000<"}) {
    EXPECT_NE(svg.find(tick), std::string::npos) << tick;
  }
}

TEST(StackedBars, LabelsEachSegmentWithItsPercent) {
  const std::vector<NamedColor> categories(kStallColors.begin(), kStallColors.end());
  const std::string svg =
      StackedBars("s", "stalls", categories, {{"prefill", "100 cycles", {25, 75, 0, 0, 0}}});
  EXPECT_NE(svg.find(">25.0%<"), std::string::npos);
  EXPECT_NE(svg.find(">75.0%<"), std::string::npos);
  EXPECT_EQ(svg.find("scratchpad bank conflict: "), std::string::npos) << "a zero segment";
}

TEST(PlotStyle, OpClassesAndSeriesNeverShareAStyle) {
  std::set<std::string> colors;
  for (const OpClassStyle& s : kOpClassStyles) colors.insert(s.color);
  EXPECT_EQ(colors.size(), kOpClassStyles.size()) << "one colour per op class";
  std::set<std::pair<std::string, int>> styles;
  for (size_t i = 0; i < kPalette.size() * kMarkerShapeCount; ++i) {
    const SeriesStyle s = SeriesStyleOf(i);
    styles.insert({s.color, int(s.shape)});
  }
  EXPECT_EQ(styles.size(), kPalette.size() * kMarkerShapeCount);
  EXPECT_EQ(std::set<std::string>(kPalette.begin(), kPalette.end()).size(), kPalette.size());
}

}  // namespace
}  // namespace tritsim
