// The output folder of a run, made whole or not at all: files go into a staging folder
// "<destination>.tmp-<pid>" beside the destination, which replaces the destination only when every file
// is written (spec/cli.md). Whatever stops the process, the destination holds the earlier complete
// result or the new one, never a mixture, and nothing but an earlier hvstress result is ever removed:
// - The replacement swaps the staging folder and the earlier result in one step
//   (renameat2 RENAME_EXCHANGE, Linux 3.15+), then removes the swapped-out earlier result. Where the
//   file system cannot swap, the earlier result is renamed to "<destination>.old-<pid>" first, so
//   a crash between the two renames leaves no destination (and the earlier result beside it).
// - SIGINT or SIGTERM while the results are being computed or written removes the staging folder
//   and ends the process by the same signal (so the shell reports 130 or 143, and a sweep sees how
//   its variant ended); during the replacement itself the signal waits until the swap is done.
// - SIGKILL leaves the staging (or .old) folder behind; the next run into the same destination
//   removes such folders of processes that no longer exist, when they hold only hvstress output files.
#pragma once

#include <string>

namespace hv {

class OutputFolder {
 public:
  // Checks that `destination` may be written: it must not exist, or be an earlier hvstress result
  // (it holds a summary.json); else throws InputError saying why and what to do. Removes stale
  // staging folders beside it (see above), creates the staging folder and catches SIGINT/SIGTERM
  // until destroyed. Call this before the long work, so a refusal costs nothing. One at a time per
  // process.
  explicit OutputFolder(std::string destination);
  ~OutputFolder();  // removes the staging folder unless committed; restores the signal handlers
  OutputFolder(const OutputFolder&) = delete;
  OutputFolder& operator=(const OutputFolder&) = delete;

  // The staging folder to write into.
  const std::string& staging() const { return staging_; }
  const std::string& destination() const { return destination_; }

  // Moves the finished folder into place, replacing an earlier result. Throws RunError on failure.
  // A SIGINT/SIGTERM that arrived meanwhile ends the process when the replacement is done.
  void commit();

 private:
  std::string destination_;
  std::string staging_;
  bool committed_ = false;
};

// Removes every "<destination>.tmp-<pid>" and "<destination>.old-<pid>" folder beside `destination`
// whose process no longer exists (or whose id is this process's: an ended process's id reused) and
// which holds only hvstress output files (an interrupted run's leftovers). Anything else is left alone.
void remove_stale_staging(const std::string& destination);

}  // namespace hv
