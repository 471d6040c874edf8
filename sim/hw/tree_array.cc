#include "hw/tree_array.h"

namespace tritsim {

TreeArray::TreeArray(sc_core::sc_module_name name, const TreeArrayConfig& config,
                     uint64_t period_ps, Scratchpad& sram)
    : TimedComputeUnit(name, period_ps, sram), config_(config) {}

}  // namespace tritsim
