// The demo model and design point compiled into the binary (see
// cmake/embed_defaults.cmake). Used when no --model / --arch is given.
#pragma once

namespace tritsim {

extern const char* const kDefaultModelName;  // label used in error messages
extern const char* const kDefaultModelYaml;
extern const char* const kDefaultArchName;
extern const char* const kDefaultArchYaml;

}  // namespace tritsim
