#include "tools/app/sweep_processes.h"

#include <fcntl.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>

#include "mesh/base.h"

extern char** environ;

namespace hv {

std::vector<std::string> environment_with(const std::vector<std::string>& assignments) {
  std::vector<std::string> environment;
  for (char** entry = environ; *entry != nullptr; ++entry) {
    const std::string text = *entry;
    const std::string name = text.substr(0, text.find('='));
    bool replaced = false;
    for (const std::string& assignment : assignments) replaced = replaced || assignment.substr(0, assignment.find('=')) == name;
    if (!replaced) environment.push_back(text);
  }
  environment.insert(environment.end(), assignments.begin(), assignments.end());
  return environment;
}

namespace {

// The argv/envp arrays execve wants, pointing into `texts` (which must outlive them).
std::vector<char*> c_strings(const std::vector<std::string>& texts) {
  std::vector<char*> pointers;
  for (const std::string& text : texts) pointers.push_back(const_cast<char*>(text.c_str()));
  pointers.push_back(nullptr);
  return pointers;
}

}  // namespace

pid_t start_process(const std::vector<std::string>& arguments, const std::vector<std::string>& environment,
                    const std::string& log_path) {
  // Everything the child needs is prepared here: between fork and exec a child of a process that may
  // run threads (the BLAS library starts some) may only call async-signal-safe functions
  // (POSIX.1-2017, fork()).
  const std::vector<char*> argv = c_strings(arguments);
  const std::vector<char*> envp = c_strings(environment);
  const int log = ::open(log_path.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0644);
  if (log < 0) throw RunError("cannot create the log file " + log_path + ": " + std::strerror(errno));
  static const char kCannotExecute[] = "error: cannot execute the hvstress program for this variant\n";

  const pid_t pid = ::fork();
  if (pid == 0) {
    ::dup2(log, STDOUT_FILENO);
    ::dup2(log, STDERR_FILENO);
    ::execve(argv[0], argv.data(), envp.data());
    [[maybe_unused]] const ssize_t written = ::write(STDERR_FILENO, kCannotExecute, sizeof(kCannotExecute) - 1);
    ::_exit(127);
  }
  const int fork_error = errno;
  ::close(log);
  if (pid < 0) throw RunError(std::string("cannot start a process: ") + std::strerror(fork_error));
  return pid;
}

std::optional<ProcessEnd> poll_process(pid_t pid) {
  int status = 0;
  pid_t reaped = 0;
  do {
    reaped = ::waitpid(pid, &status, WNOHANG);
  } while (reaped < 0 && errno == EINTR);
  if (reaped == 0) return std::nullopt;
  if (reaped < 0) throw RunError(std::string("cannot wait for a variant process: ") + std::strerror(errno));
  ProcessEnd end;
  if (WIFEXITED(status)) end.exit_code = WEXITSTATUS(status);
  if (WIFSIGNALED(status)) end.signal = WTERMSIG(status);
  return end;
}

namespace {

volatile sig_atomic_t g_received_signal = 0;
struct sigaction g_previous_interrupt;
struct sigaction g_previous_terminate;

extern "C" void record_signal(int signal_number) { g_received_signal = signal_number; }

}  // namespace

InterruptCatcher::InterruptCatcher() {
  g_received_signal = 0;
  struct sigaction action {};
  action.sa_handler = record_signal;
  sigemptyset(&action.sa_mask);
  ::sigaction(SIGINT, &action, &g_previous_interrupt);
  ::sigaction(SIGTERM, &action, &g_previous_terminate);
}

InterruptCatcher::~InterruptCatcher() {
  ::sigaction(SIGINT, &g_previous_interrupt, nullptr);
  ::sigaction(SIGTERM, &g_previous_terminate, nullptr);
}

int InterruptCatcher::received() const { return g_received_signal; }

}  // namespace hv
