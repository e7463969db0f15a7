// Child processes for `hvstress sweep` (POSIX): start a command with its output in a log file, ask
// whether it has ended without blocking, and catch Ctrl-C (SIGINT) and SIGTERM so the sweep can stop
// its children and clean up instead of dying mid-way.
#pragma once

#include <sys/types.h>

#include <optional>
#include <string>
#include <vector>

namespace hv {

// The environment of this process with `NAME=VALUE` entries added or replaced.
std::vector<std::string> environment_with(const std::vector<std::string>& assignments);

// Starts `arguments[0]` (a path, not searched on PATH) with `arguments` and `environment`; its
// stdout and stderr go to `log_path` (created or truncated). Returns the child's process id.
// Throws RunError when the log cannot be opened or the process cannot be created; a program that
// cannot be executed makes the child exit with code 127 after saying so in the log.
pid_t start_process(const std::vector<std::string>& arguments, const std::vector<std::string>& environment,
                    const std::string& log_path);

// How a child ended: its exit code, or the signal that ended it.
struct ProcessEnd {
  int exit_code = -1;    // -1 when ended by a signal
  int signal = 0;        // 0 when it exited
};

// The end of child `pid` if it has ended (and reaps it), else nothing. Does not block.
std::optional<ProcessEnd> poll_process(pid_t pid);

// While alive, SIGINT and SIGTERM only record that they arrived (the previous handlers come back
// when it is destroyed). One at a time per process.
class InterruptCatcher {
 public:
  InterruptCatcher();
  ~InterruptCatcher();
  InterruptCatcher(const InterruptCatcher&) = delete;
  InterruptCatcher& operator=(const InterruptCatcher&) = delete;

  // The signal that arrived (SIGINT or SIGTERM), or 0.
  int received() const;
};

}  // namespace hv
