// libsystemc.so defines main() and calls sc_main(); the test binary hands
// control to GoogleTest from there.
#include <gtest/gtest.h>

// libsystemc.so defines main() and calls sc_main() (declared extern "C" by SystemC).
extern "C" int sc_main(int argc, char* argv[]);
int sc_main(int argc, char* argv[]) {
  testing::InitGoogleTest(&argc, argv);
  return RUN_ALL_TESTS();
}
