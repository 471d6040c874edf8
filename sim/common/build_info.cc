#include "common/build_info.h"

namespace tritsim {

const char* BuildVersion() { return TRITSIM_VERSION; }

}  // namespace tritsim
