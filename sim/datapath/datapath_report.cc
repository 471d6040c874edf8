#include "datapath/datapath_report.h"

#include <iomanip>
#include <nlohmann/json.hpp>

#include "datapath/accumulator_width.h"
#include "datapath/adder_tree.h"

namespace tritsim {
namespace {

using Json = nlohmann::ordered_json;

Json MismatchJson(const std::optional<Mismatch>& m) {
  if (!m) return nullptr;
  return Json{{"row", m->row}, {"col", m->col}, {"got", m->got}, {"expected", m->expected}};
}

Json DesignJson(const ArchConfig& arch) {
  return Json{{"name", arch.name},
              {"fan_in", arch.array.fan_in},
              {"adder_levels", TreeLevels(arch.array.fan_in)},
              {"accumulator_bits", arch.array.accumulator_bits},
              {"packing", PackingName(arch.packing.format)}};
}

Json WeightsJson(const DatapathReport& rep) {
  const DatapathResult& r = rep.result;
  return Json{{"trits", r.shape.k * r.shape.n},
              {"zero_fraction", r.weight_zero_fraction},
              {"gamma", rep.inputs.weight_gamma},
              {"packed_bytes", r.packed_bytes},
              {"bits_per_trit", r.bits_per_trit}};
}

Json AccumulatorJson(const DatapathResult& r) {
  return Json{{"max_magnitude", r.max_accumulator_magnitude},
              {"bits_for_max_magnitude", SignedBitsForMagnitude(r.max_accumulator_magnitude)},
              {"bits_needed_worst_case", AccumulatorBitsNeeded(r.shape.k)},
              {"overflow_events", r.overflow_events},
              {"outputs_with_overflow", r.outputs_with_overflow}};
}

Json ResultJson(const DatapathResult& r) {
  return Json{{"outputs", r.shape.m * r.shape.n},
              {"bit_exact", r.bit_exact()},
              {"matches_reference_modulo_2_pow_a", r.matches_modulo},
              {"first_mismatch", MismatchJson(r.first_mismatch)}};
}

void PrintVerdict(const DatapathResult& r, int accumulator_bits, std::ostream& out) {
  out << "  result       ";
  if (r.bit_exact()) {
    out << "bit-exact against the Eigen reference (" << r.shape.m * r.shape.n << " outputs)\n";
    return;
  }
  const Mismatch& m = *r.first_mismatch;
  out << "MISMATCH at row " << m.row << ", col " << m.col << ": got " << m.got << ", expected "
      << m.expected << "; every output " << (r.matches_modulo ? "equals" : "does NOT equal")
      << " the reference modulo 2^" << accumulator_bits << "\n";
}

}  // namespace

std::string DatapathJsonText(const DatapathReport& rep) {
  const DatapathResult& r = rep.result;
  Json j;
  j["schema"] = kDatapathSchema;
  j["shape"] = Json{{"m", r.shape.m}, {"k", r.shape.k}, {"n", r.shape.n}};
  j["seed"] = rep.seed;
  j["design"] = DesignJson(rep.arch);
  j["weights"] = WeightsJson(rep);
  j["accumulator"] = AccumulatorJson(r);
  j["result"] = ResultJson(r);
  return j.dump(2) + "\n";
}

void PrintDatapath(const DatapathReport& rep, std::ostream& out) {
  const DatapathResult& r = rep.result;
  const TreeArrayConfig& a = rep.arch.array;
  out << "tritsim datapath: " << r.shape.m << " x " << r.shape.k << " x " << r.shape.n << " on '"
      << rep.arch.name << "' (fan-in " << a.fan_in << ", " << TreeLevels(a.fan_in)
      << " adder levels, " << a.accumulator_bits << "-bit accumulator, "
      << PackingName(rep.arch.packing.format) << " packing), seed " << rep.seed << "\n";
  out << std::fixed << std::setprecision(4) << "  weights      " << r.shape.k * r.shape.n
      << " trits, zero fraction " << r.weight_zero_fraction << ", " << r.packed_bytes
      << " bytes packed (" << std::setprecision(3) << r.bits_per_trit << " bits per trit)\n";
  out << "  accumulator  largest |partial sum| " << r.max_accumulator_magnitude << " ("
      << SignedBitsForMagnitude(r.max_accumulator_magnitude) << " bits); K = " << r.shape.k
      << " needs " << AccumulatorBitsNeeded(r.shape.k) << " bits in the worst case; "
      << r.overflow_events << " overflow events in " << r.outputs_with_overflow << " outputs\n";
  PrintVerdict(r, a.accumulator_bits, out);
}

}  // namespace tritsim
