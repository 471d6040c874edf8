#include "hw/vector_unit.h"

namespace tritsim {

VectorUnit::VectorUnit(sc_core::sc_module_name name, const VectorUnitConfig& config,
                       uint64_t period_ps, Scratchpad& sram)
    : TimedComputeUnit(name, period_ps, sram), config_(config) {}

}  // namespace tritsim
