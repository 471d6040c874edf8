// libsystemc.so defines main() and calls sc_main(); the test binary hands
// control to GoogleTest from there.
#include <gtest/gtest.h>

int sc_main(int argc, char** argv) {
  testing::InitGoogleTest(&argc, argv);
  return RUN_ALL_TESTS();
}
