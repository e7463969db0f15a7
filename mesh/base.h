// Shared vocabulary of every hvstress layer: the r-z point, input errors with their place in the
// case file, and the atomic file write. This is the bottom of the dependency chain
// (tools -> postproc -> solver -> mesh), so everything above may use it.
#pragma once

#include <stdexcept>
#include <string>

namespace hv {

// A point of the r-z half plane, in metres: r >= 0 is the distance from the symmetry axis, z the height.
struct Point {
  double r = 0.0;
  double z = 0.0;
};

// Where a value of the case file came from. Line and column are 1-based; 0 means unknown.
struct SourceLocation {
  std::string file;
  int line = 0;
  int column = 0;
  std::string key_path;  // e.g. "shapes[2].circle.radius"
};

// Bad input (case file, option, geometry). Always on; main() maps it to exit code 2.
// what() is the full message: "file:line:col: key.path: problem. hint".
class InputError : public std::runtime_error {
 public:
  InputError(const SourceLocation& where, const std::string& problem, const std::string& hint = "");
  const SourceLocation& where() const { return where_; }
  const std::string& problem() const { return problem_; }
  const std::string& hint() const { return hint_; }

 private:
  SourceLocation where_;
  std::string problem_;
  std::string hint_;
};

// A failure that is not the user's input: solver breakdown, I/O. main() maps it to exit code 1.
class RunError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

// Writes `contents` to `path` through a temporary file in the same folder and a rename, so a reader
// never sees a half-written file. Throws RunError on failure.
void write_file_atomically(const std::string& path, const std::string& contents);

}  // namespace hv
