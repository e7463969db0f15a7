#include "tools/app/progress.h"

#include <cstdio>
#include <unistd.h>

namespace hv {

namespace {
constexpr double kLongStepSeconds = 1.0;  // steps shorter than this are not worth a line
}

Progress::Progress(bool quiet) : quiet_(quiet), terminal_(::isatty(::fileno(stderr)) != 0) {}

Progress::~Progress() { finish(); }

void Progress::start(const std::string& step) {
  finish();
  step_ = step;
  started_ = std::chrono::steady_clock::now();
  if (quiet_ || !terminal_) return;
  std::fprintf(stderr, "\r\033[K%s ...", step_.c_str());
  std::fflush(stderr);
}

void Progress::finish() {
  if (step_.empty()) return;
  const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - started_).count();
  if (!quiet_) {
    if (terminal_) std::fprintf(stderr, "\r\033[K");
    if (seconds > kLongStepSeconds) std::fprintf(stderr, "%s: %.1f s\n", step_.c_str(), seconds);
    std::fflush(stderr);
  }
  step_.clear();
}

}  // namespace hv
