// The one Gmsh session of a meshing run, as an RAII guard, and the translation of Gmsh's errors
// into ours. Gmsh keeps one global model and is not thread-safe: open one session at a time and
// make every Gmsh call from the thread that opened it. Private to mesh/.
#pragma once

#include <exception>
#include <string>
#include <utility>

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

// Runs `work` and turns what Gmsh 4.8 throws (a std::string, or a std::exception) into the error
// that `make_error(message)` returns; our own InputError and RunError pass through.
template <class Work, class MakeError>
auto translate_gmsh_errors(Work&& work, MakeError&& make_error) -> decltype(work()) {
  try {
    return work();
  } catch (const InputError&) {
    throw;
  } catch (const RunError&) {
    throw;
  } catch (const std::string& message) {
    throw make_error(message);
  } catch (const std::exception& error) {
    throw make_error(std::string(error.what()));
  }
}

// Gmsh failing at `doing`: a RunError (exit 1) that says what we were doing.
template <class Work>
auto run_gmsh(const std::string& doing, Work&& work) -> decltype(work()) {
  return translate_gmsh_errors(std::forward<Work>(work), [&](const std::string& message) {
    return RunError("Gmsh failed while " + doing + ": " + message);
  });
}

// The same for work whose failure is caused by the input at `where` (e.g. an outline OpenCASCADE
// cannot build): an InputError with the place and a hint.
template <class Work>
auto run_gmsh_on_input(const SourceLocation& where, const std::string& doing, const std::string& hint, Work&& work)
    -> decltype(work()) {
  return translate_gmsh_errors(std::forward<Work>(work), [&](const std::string& message) {
    return InputError(where, doing + " failed in Gmsh: " + message, hint);
  });
}

}  // namespace hv
