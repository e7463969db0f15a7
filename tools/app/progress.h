// Progress of a long run on stderr: on a terminal the current step on one updating line, otherwise
// one plain line per step that took more than a second. Silent when quiet.
#pragma once

#include <chrono>
#include <string>

namespace hv {

class Progress {
 public:
  explicit Progress(bool quiet);
  ~Progress();
  Progress(const Progress&) = delete;
  Progress& operator=(const Progress&) = delete;

  // Ends the current step (reporting it if it was long) and starts `step`.
  void start(const std::string& step);
  // Ends the current step.
  void finish();

 private:
  bool quiet_;
  bool terminal_;
  std::string step_;
  std::chrono::steady_clock::time_point started_;
};

}  // namespace hv
