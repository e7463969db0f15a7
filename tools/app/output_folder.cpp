#include "tools/app/output_folder.h"

#include <fcntl.h>
#include <signal.h>
#include <unistd.h>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <system_error>
#include <vector>

#include "mesh/base.h"

namespace hv {

namespace fs = std::filesystem;

namespace {

// Every file any command writes into an output folder, and the one subfolder (optimize's best design).
// A folder holding anything else is not ours to remove.
const char* const kOutputFiles[] = {"summary.json", "field.vtu",   "surfaces.vtp", "surface-field.csv",
                                    "onset.csv",    "fieldlines.vtp", "report.md", "report.html",
                                    "mesh.vtu",     "history.csv"};
const char kOutputSubfolder[] = "best";

bool all_digits(const std::string& text) {
  return !text.empty() && text.find_first_not_of("0123456789") == std::string::npos;
}

// An output file, or one being written (write_file_atomically's "<name>.tmp-<pid>").
bool is_output_file_name(const std::string& name) {
  for (const char* known : kOutputFiles) {
    const std::string base = known;
    if (name == base) return true;
    const std::string writing = base + ".tmp-";
    if (name.compare(0, writing.size(), writing) == 0 && all_digits(name.substr(writing.size()))) return true;
  }
  return false;
}

bool holds_only_output_files(const fs::path& folder, bool subfolder_allowed) {
  std::error_code error;
  for (const fs::directory_entry& entry : fs::directory_iterator(folder, error)) {
    const std::string name = entry.path().filename().string();
    const bool ours = entry.is_symlink(error) ? false
                      : entry.is_directory(error)
                          ? subfolder_allowed && name == kOutputSubfolder && holds_only_output_files(entry.path(), false)
                          : entry.is_regular_file(error) && is_output_file_name(name);
    if (!ours) return false;
  }
  return !error;
}

bool process_exists(pid_t pid) { return ::kill(pid, 0) == 0 || errno == EPERM; }

// The pid of "<destination name>.tmp-<pid>" or ".old-<pid>", else 0.
pid_t staging_pid(const std::string& name, const std::string& destination_name) {
  for (const char* kind : {".tmp-", ".old-"}) {
    const std::string prefix = destination_name + kind;
    if (name.compare(0, prefix.size(), prefix) != 0) continue;
    const std::string digits = name.substr(prefix.size());
    if (all_digits(digits) && digits.size() < 10) return static_cast<pid_t>(std::stol(digits));
  }
  return 0;
}

// ---- SIGINT / SIGTERM ----
//
// The handler may run on any thread at any moment, so it only makes async-signal-safe calls
// (POSIX.1-2017, section 2.4.3: unlink, rmdir, signal, raise) on paths prepared beforehand.

enum Phase : int { kIdle = 0, kWriting = 1, kReplacing = 2 };

volatile sig_atomic_t g_phase = kIdle;
volatile sig_atomic_t g_deferred_signal = 0;
std::vector<std::string> g_removable;  // staging files, deepest first, then the folders; fixed while armed
struct sigaction g_previous_interrupt;
struct sigaction g_previous_terminate;

extern "C" void on_stop_signal(int signal_number) {
  if (g_phase != kWriting) {  // replacing: commit() delivers it when the swap is done
    g_deferred_signal = signal_number;
    return;
  }
  const int saved_errno = errno;
  for (const std::string& path : g_removable)
    if (::unlink(path.c_str()) != 0) ::rmdir(path.c_str());
  errno = saved_errno;
  ::signal(signal_number, SIG_DFL);
  ::raise(signal_number);  // blocked while this handler runs: ends the process as it returns
}

// Every path the staging folder can hold, deepest first, ending with the folder itself.
std::vector<std::string> removable_paths(const std::string& staging) {
  std::vector<std::string> paths;
  const std::string writing_suffix = ".tmp-" + std::to_string(::getpid());
  for (const std::string& folder : {staging + "/" + kOutputSubfolder, staging}) {
    for (const char* name : kOutputFiles) {
      paths.push_back(folder + "/" + name);
      paths.push_back(folder + "/" + name + writing_suffix);
    }
    paths.push_back(folder);
  }
  return paths;
}

void catch_stop_signals(const std::string& staging) {
  g_removable = removable_paths(staging);
  g_deferred_signal = 0;
  g_phase = kWriting;
  struct sigaction action {};
  action.sa_handler = on_stop_signal;
  sigemptyset(&action.sa_mask);
  ::sigaction(SIGINT, &action, &g_previous_interrupt);
  ::sigaction(SIGTERM, &action, &g_previous_terminate);
}

void release_stop_signals() {
  ::sigaction(SIGINT, &g_previous_interrupt, nullptr);
  ::sigaction(SIGTERM, &g_previous_terminate, nullptr);
  g_phase = kIdle;
}

// Ends the process by a signal that arrived while the folder was being replaced.
void deliver_deferred_signal() {
  const int signal_number = g_deferred_signal;
  if (signal_number == 0) return;
  ::signal(signal_number, SIG_DFL);
  ::raise(signal_number);
}

// ---- checks and renames ----

// An earlier result of ours is a folder holding a summary.json; anything else is the user's.
void require_replaceable(const fs::path& destination) {
  std::error_code error;
  if (!fs::exists(destination, error)) return;
  SourceLocation where;
  where.key_path = "output folder " + destination.string();
  if (!fs::is_directory(destination, error)) {
    throw InputError(where, "exists and is not a folder", "choose another output folder with -o");
  }
  if (!fs::exists(destination / "summary.json", error) && !fs::is_empty(destination, error)) {
    throw InputError(where, "exists and does not hold an earlier hvstress result (no summary.json), so it is left alone",
                     "choose another output folder with -o, or remove it yourself");
  }
}

// The file system cannot swap: rename the earlier result aside, then the new one into place.
void replace_in_two_steps(const fs::path& staging, const fs::path& destination) {
  std::error_code error;
  const fs::path retired = destination.string() + ".old-" + std::to_string(::getpid());
  fs::rename(destination, retired, error);
  if (error) throw RunError("cannot move the earlier result " + destination.string() + " aside: " + error.message());
  fs::rename(staging, destination, error);
  if (error) {
    std::error_code ignored;
    fs::rename(retired, destination, ignored);
    throw RunError("cannot move the results into " + destination.string() + ": " + error.message());
  }
  fs::remove_all(retired, error);
}

// Swaps the staging folder with the earlier result in one step; the staging path then holds the
// earlier result, which is removed. Falls back to two renames where swapping is not supported.
void replace_earlier_result(const fs::path& staging, const fs::path& destination) {
  if (::renameat2(AT_FDCWD, staging.c_str(), AT_FDCWD, destination.c_str(), RENAME_EXCHANGE) == 0) {
    std::error_code ignored;
    fs::remove_all(staging, ignored);
    return;
  }
  const int swap_error = errno;
  const bool cannot_swap = swap_error == EINVAL || swap_error == ENOSYS || swap_error == ENOTSUP;
  if (!cannot_swap) throw RunError("cannot swap the results into " + destination.string() + ": " + std::strerror(swap_error));
  replace_in_two_steps(staging, destination);
}

}  // namespace

void remove_stale_staging(const std::string& destination) {
  const fs::path final_path = fs::absolute(destination);
  const std::string destination_name = final_path.filename().string();
  std::error_code error;
  for (const fs::directory_entry& entry : fs::directory_iterator(final_path.parent_path(), error)) {
    const pid_t pid = staging_pid(entry.path().filename().string(), destination_name);
    // A folder named with this process's id is a dead process's whose id came round again.
    if (pid <= 0 || (pid != ::getpid() && process_exists(pid))) continue;
    if (!entry.is_directory(error) || entry.is_symlink(error) || !holds_only_output_files(entry.path(), true)) continue;
    std::error_code ignored;
    fs::remove_all(entry.path(), ignored);
  }
}

OutputFolder::OutputFolder(std::string destination) : destination_(std::move(destination)) {
  const fs::path final_path = fs::absolute(destination_);
  require_replaceable(final_path);
  std::error_code error;
  fs::create_directories(final_path.parent_path(), error);
  // A parent that is a file is the user's choice of path, not an I/O failure.
  for (fs::path parent = final_path.parent_path(); !parent.empty() && parent != parent.root_path(); parent = parent.parent_path()) {
    if (fs::exists(parent, error) && !fs::is_directory(parent, error))
      throw InputError(SourceLocation{"", 0, 0, "output folder " + destination_},
                       parent.string() + " is a file, so no folder can be made under it",
                       "choose an output folder with -o whose parents are folders");
  }
  remove_stale_staging(final_path.string());
  staging_ = final_path.string() + ".tmp-" + std::to_string(::getpid());
  if (!fs::create_directory(staging_, error)) {
    throw RunError("cannot create the folder " + staging_ + (error ? ": " + error.message() : ": it exists already"));
  }
  catch_stop_signals(staging_);
}

OutputFolder::~OutputFolder() {
  release_stop_signals();
  if (!committed_) {
    std::error_code ignored;
    fs::remove_all(staging_, ignored);
  }
  deliver_deferred_signal();  // when commit() failed after the signal came
}

void OutputFolder::commit() {
  const fs::path final_path = fs::absolute(destination_);
  g_phase = kReplacing;
  std::error_code error;
  if (fs::exists(final_path, error)) {
    replace_earlier_result(staging_, final_path);
  } else {
    fs::rename(staging_, final_path, error);
    if (error) throw RunError("cannot move the results into " + final_path.string() + ": " + error.message());
  }
  committed_ = true;
  deliver_deferred_signal();
}

}  // namespace hv
