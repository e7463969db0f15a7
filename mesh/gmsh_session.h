// The one Gmsh session of a meshing run, as an RAII guard, and the translation of Gmsh's errors
// into ours. Gmsh keeps one global model and is not thread-safe: open one session at a time and
// make every Gmsh call from the thread that opened it. Private to mesh/.
#pragma once

#include <exception>
#include <string>

#include "mesh/base.h"

namespace hv {

// Opens Gmsh (no config files read, terminal output off) and closes it on every exit path.
class GmshSession {
 public:
  GmshSession();
  ~GmshSession();
  GmshSession(const GmshSession&) = delete;
  GmshSession& operator=(const GmshSession&) = delete;
};

// Runs `work` and turns what Gmsh 4.8 throws (a std::string, or a std::exception) into a
// RunError that says what we were doing; our own InputError and RunError pass through.
template <class Work>
auto run_gmsh(const std::string& doing, Work&& work) -> decltype(work()) {
  try {
    return work();
  } catch (const InputError&) {
    throw;
  } catch (const RunError&) {
    throw;
  } catch (const std::string& message) {
    throw RunError("Gmsh failed while " + doing + ": " + message);
  } catch (const std::exception& error) {
    throw RunError("Gmsh failed while " + doing + ": " + error.what());
  }
}

// The same for work whose failure is caused by the input at `where` (e.g. an outline OpenCASCADE
// cannot build): an InputError with the place and a hint.
template <class Work>
auto run_gmsh_on_input(const SourceLocation& where, const std::string& doing, const std::string& hint, Work&& work)
    -> decltype(work()) {
  try {
    return work();
  } catch (const InputError&) {
    throw;
  } catch (const RunError&) {
    throw;
  } catch (const std::string& message) {
    throw InputError(where, doing + " failed in Gmsh: " + message, hint);
  } catch (const std::exception& error) {
    throw InputError(where, doing + " failed in Gmsh: " + error.what(), hint);
  }
}

}  // namespace hv
