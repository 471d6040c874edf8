// Decodes a byte address into the DRAM coordinates of the burst holding it.
//
// The address is first divided by the burst size (requests are whole,
// aligned bursts), then read as a mixed-radix number whose digits are the
// fields of DramConfig::address_map, most significant first. Radixes:
// channel = channels, bank group = bank_groups, bank = banks_per_group,
// column = row_bytes / burst_bytes (bursts per row). The row takes all the
// remaining high bits, so it must be the most significant field. When every
// radix is a power of two the decode is shifts and masks; otherwise it falls
// back to division.
#pragma once

#include <array>
#include <cstdint>

#include "config/arch_config.h"

namespace tritsim {

// Where one burst lives.
struct DramAddress {
  uint64_t row = 0;
  uint32_t channel = 0;
  uint32_t bank_group = 0;
  uint32_t bank = 0;    // bank inside its group, [0, banks_per_group)
  uint32_t column = 0;  // burst index inside the row, [0, row_bytes / burst_bytes)
};

class DramAddressMap {
 public:
  // Throws tritsim::Error (kBadInput) naming dram.address_map if the map does
  // not list each field exactly once, if the row is not the most significant
  // field, or if row_bytes is not a whole number of bursts.
  explicit DramAddressMap(const DramConfig& dram);

  DramAddress Decode(uint64_t byte_address) const {
    const uint64_t burst = BurstIndex(byte_address);
    DramAddress where;
    where.row = Digit(burst, AddressField::kRow);
    where.channel = static_cast<uint32_t>(Digit(burst, AddressField::kChannel));
    where.bank_group = static_cast<uint32_t>(Digit(burst, AddressField::kBankGroup));
    where.bank = static_cast<uint32_t>(Digit(burst, AddressField::kBank));
    where.column = static_cast<uint32_t>(Digit(burst, AddressField::kColumn));
    return where;
  }

  // Turns `where` = Decode(a) into Decode(a + burst_bytes()), cheaper: the
  // least significant field counts up and carries into the next.
  void Next(DramAddress& where) const {
    for (AddressField f : low_first_) {
      if (f == AddressField::kRow) {
        ++where.row;
        return;
      }
      uint32_t& digit = DigitOf(where, f);
      if (++digit < radix_[static_cast<size_t>(f)]) return;
      digit = 0;
    }
  }

  // Decode(byte_address).channel, cheaper.
  uint32_t ChannelOf(uint64_t byte_address) const {
    return static_cast<uint32_t>(Digit(BurstIndex(byte_address), AddressField::kChannel));
  }

  // Inverse of Decode: the first byte of the burst at `where`.
  // REQUIRES: every field of `where` inside its range.
  uint64_t Encode(const DramAddress& where) const;

  uint64_t burst_bytes() const { return burst_bytes_; }
  // Bursts from one column of a row to the next (the product of the radixes
  // of the fields less significant than the column) and columns per row.
  uint64_t column_stride() const { return below_[static_cast<size_t>(AddressField::kColumn)]; }
  uint64_t columns() const { return radix_[static_cast<size_t>(AddressField::kColumn)]; }

 private:
  static constexpr int kFields = 5;

  uint64_t RadixOf(const DramConfig& dram, AddressField field) const;
  static uint32_t& DigitOf(DramAddress& where, AddressField field) {
    switch (field) {
      case AddressField::kChannel:
        return where.channel;
      case AddressField::kBankGroup:
        return where.bank_group;
      case AddressField::kBank:
        return where.bank;
      default:
        return where.column;
    }
  }
  uint64_t BurstIndex(uint64_t byte_address) const {
    return power_of_two_ ? byte_address >> burst_shift_ : byte_address / burst_bytes_;
  }
  // Digit `field` of a burst index.
  uint64_t Digit(uint64_t burst, AddressField field) const {
    const size_t f = static_cast<size_t>(field);
    if (power_of_two_) return (burst >> shift_[f]) & mask_[f];
    const uint64_t value = burst / below_[f];
    return radix_[f] == 0 ? value : value % radix_[f];
  }

  uint64_t burst_bytes_ = 64;
  unsigned burst_shift_ = 6;
  bool power_of_two_ = true;
  // Indexed by AddressField. The row's radix is unbounded (0 means "all the
  // remaining bits"); below_ is the product of the radixes of the less
  // significant fields, shift_ its log2 (power-of-two maps only).
  std::array<uint64_t, kFields> radix_{};
  std::array<uint64_t, kFields> below_{};
  std::array<unsigned, kFields> shift_{};
  std::array<uint64_t, kFields> mask_{};           // radix - 1; all ones for the row
  std::array<AddressField, kFields> low_first_{};  // the fields, least significant first
};

}  // namespace tritsim
