// The interrupt handler's contract (sim/common/interrupt.h): the first
// SIGINT only sets a flag, named in a one-line exit-130 error; a second one
// takes the default action, and SIGTERM keeps its default action. Each death test runs in its own
// child process, so the handler installed there touches no other test.
#include "common/interrupt.h"

#include <gtest/gtest.h>
#include <unistd.h>

#include <csignal>
#include <string>

#include "common/error.h"

namespace tritsim {
namespace {

// Exit statuses of the death-test children below.
constexpr int kFlagNotSet = 3;
constexpr int kFlagSet = 0;

// In a child: installs the handler, raises `signal_number` once and exits
// kFlagSet if the flag came up with the signal's name, else kFlagNotSet.
void RaiseOnceAndReport(int signal_number, const char* name) {
  InstallInterruptHandler();
  if (InterruptRequested()) ::_exit(kFlagNotSet);
  std::raise(signal_number);
  const bool named = std::string(InterruptSignalName()) == name;
  ::_exit(InterruptRequested() && named ? kFlagSet : kFlagNotSet);
}

TEST(InterruptHandler, NoSignalMeansNoRequest) {
  InstallInterruptHandler();
  EXPECT_FALSE(InterruptRequested());
  EXPECT_STREQ("", InterruptSignalName());
}

TEST(InterruptHandler, FirstSigintOnlySetsTheFlag) {
  EXPECT_EXIT(RaiseOnceAndReport(SIGINT, "SIGINT"), testing::ExitedWithCode(kFlagSet), "");
}

TEST(InterruptHandler, SigtermKeepsItsDefaultAction) {
  EXPECT_EXIT(
      {
        InstallInterruptHandler();
        std::raise(SIGTERM);
        ::_exit(kFlagSet);  // not reached
      },
      testing::KilledBySignal(SIGTERM), "");
}

TEST(InterruptHandler, SecondSigintTakesTheDefaultAction) {
  EXPECT_EXIT(
      {
        InstallInterruptHandler();
        std::raise(SIGINT);
        std::raise(SIGINT);
        ::_exit(kFlagSet);  // not reached: the second SIGINT terminates
      },
      testing::KilledBySignal(SIGINT), "");
}

TEST(InterruptHandler, ThrowInterruptedGivesOneLineExit130Error) {
  try {
    ThrowInterrupted("while simulating op 7 (ffn.down)");
    FAIL() << "ThrowInterrupted returned";
  } catch (const Error& e) {
    EXPECT_EQ(ExitCode::kInterrupted, e.code());
    EXPECT_EQ(130, int(e.code()));  // README "Exit codes": 130 interrupted
    const std::string what = e.what();
    EXPECT_EQ(std::string::npos, what.find('\n'));
    EXPECT_EQ(0u, what.rfind("interrupted", 0)) << what;
    EXPECT_NE(std::string::npos, what.find("while simulating op 7 (ffn.down)")) << what;
  }
}

}  // namespace
}  // namespace tritsim
