// The output folder of a run, made whole or not at all: files go into a temporary folder beside the
// destination, which replaces the destination only when every file is written (spec/cli.md).
#pragma once

#include <string>

namespace hv {

class OutputFolder {
 public:
  // Checks that `destination` may be written: it must not exist, or be an earlier hvstress result
  // (it holds a summary.json); else throws InputError saying why and what to do. Creates the
  // temporary folder. Call this before the long work, so a refusal costs nothing.
  explicit OutputFolder(std::string destination);
  ~OutputFolder();  // removes the temporary folder unless committed
  OutputFolder(const OutputFolder&) = delete;
  OutputFolder& operator=(const OutputFolder&) = delete;

  // The temporary folder to write into.
  const std::string& staging() const { return staging_; }
  const std::string& destination() const { return destination_; }

  // Moves the finished folder into place, replacing an earlier result. Throws RunError on failure.
  void commit();

 private:
  std::string destination_;
  std::string staging_;
  bool committed_ = false;
};

}  // namespace hv
