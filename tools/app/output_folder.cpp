#include "tools/app/output_folder.h"

#include <filesystem>
#include <system_error>
#include <unistd.h>

#include "mesh/base.h"

namespace hv {

namespace fs = std::filesystem;

namespace {

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

}  // namespace

OutputFolder::OutputFolder(std::string destination) : destination_(std::move(destination)) {
  const fs::path final_path = fs::absolute(destination_);
  require_replaceable(final_path);
  std::error_code error;
  fs::create_directories(final_path.parent_path(), error);
  staging_ = final_path.string() + ".tmp-" + std::to_string(::getpid());
  fs::remove_all(staging_, error);
  if (!fs::create_directory(staging_, error)) {
    throw RunError("cannot create the folder " + staging_ + ": " + error.message());
  }
}

OutputFolder::~OutputFolder() {
  if (committed_) return;
  std::error_code ignored;
  fs::remove_all(staging_, ignored);
}

void OutputFolder::commit() {
  const fs::path final_path = fs::absolute(destination_);
  std::error_code error;
  const fs::path retired = final_path.string() + ".old-" + std::to_string(::getpid());
  const bool had_earlier = fs::exists(final_path, error);
  if (had_earlier) {
    fs::rename(final_path, retired, error);
    if (error) throw RunError("cannot move the earlier result " + final_path.string() + " aside: " + error.message());
  }
  fs::rename(staging_, final_path, error);
  if (error) {
    if (had_earlier) fs::rename(retired, final_path, error);
    throw RunError("cannot move the results into " + final_path.string() + ": " + error.message());
  }
  committed_ = true;
  if (had_earlier) fs::remove_all(retired, error);
}

}  // namespace hv
