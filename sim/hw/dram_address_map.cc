#include "hw/dram_address_map.h"

#include <string>

#include "common/error.h"

namespace tritsim {
namespace {

constexpr int64_t kBitsPerByte = 8;
constexpr size_t kFieldCount = 5;

bool IsPowerOfTwo(uint64_t x) { return x != 0 && (x & (x - 1)) == 0; }

unsigned Log2(uint64_t x) {
  unsigned bits = 0;
  while (x > 1) {
    x >>= 1;
    ++bits;
  }
  return bits;
}

size_t Index(AddressField f) { return static_cast<size_t>(f); }

Error MapError(const std::string& message) {
  return InputError("architecture", 0, "dram.address_map", message);
}

void CheckEachFieldOnce(const DramConfig& dram) {
  if (dram.address_map.size() != kFieldCount)
    throw MapError("must list row, bank, bank group, column and channel exactly once, got " +
                   std::to_string(dram.address_map.size()) + " fields");
  int seen[kFieldCount] = {};
  for (AddressField f : dram.address_map) {
    if (++seen[Index(f)] > 1)
      throw MapError("lists a field twice; each of row, bank, bank group, column, channel once");
  }
  if (dram.address_map.front() != AddressField::kRow)
    throw MapError("the row must be the most significant field (it takes the remaining high bits)");
}

}  // namespace

DramAddressMap::DramAddressMap(const DramConfig& dram) {
  CheckEachFieldOnce(dram);
  burst_bytes_ =
      static_cast<uint64_t>(dram.bus_width_bits / kBitsPerByte * dram.timing.burst_length);
  if (burst_bytes_ == 0 || dram.row_bytes <= 0 ||
      static_cast<uint64_t>(dram.row_bytes) % burst_bytes_ != 0)
    throw InputError("architecture", 0, "dram.row_bytes",
                     std::to_string(dram.row_bytes) + " is not a whole number of " +
                         std::to_string(burst_bytes_) + "-byte bursts");
  power_of_two_ = IsPowerOfTwo(burst_bytes_);
  burst_shift_ = Log2(burst_bytes_);
  uint64_t below = 1;
  // address_map is most significant first; walk it from the least significant end.
  for (size_t i = kFieldCount; i-- > 0;) {
    const size_t f = Index(dram.address_map[i]);
    low_first_[kFieldCount - 1 - i] = dram.address_map[i];
    radix_[f] = RadixOf(dram, dram.address_map[i]);
    below_[f] = below;
    shift_[f] = Log2(below);
    mask_[f] = radix_[f] == 0 ? ~uint64_t{0} : radix_[f] - 1;
    power_of_two_ = power_of_two_ && IsPowerOfTwo(below);
    below *= radix_[f] == 0 ? 1 : radix_[f];
  }
}

uint64_t DramAddressMap::RadixOf(const DramConfig& dram, AddressField field) const {
  switch (field) {
    case AddressField::kChannel:
      return static_cast<uint64_t>(dram.channels);
    case AddressField::kBankGroup:
      return static_cast<uint64_t>(dram.bank_groups);
    case AddressField::kBank:
      return static_cast<uint64_t>(dram.banks_per_group);
    case AddressField::kColumn:
      return static_cast<uint64_t>(dram.row_bytes) / burst_bytes_;
    case AddressField::kRow:
      break;
  }
  return 0;  // the row: unbounded
}

uint64_t DramAddressMap::Encode(const DramAddress& where) const {
  const uint64_t burst = where.row * below_[Index(AddressField::kRow)] +
                         where.channel * below_[Index(AddressField::kChannel)] +
                         where.bank_group * below_[Index(AddressField::kBankGroup)] +
                         where.bank * below_[Index(AddressField::kBank)] +
                         where.column * below_[Index(AddressField::kColumn)];
  return burst * burst_bytes_;
}

}  // namespace tritsim
