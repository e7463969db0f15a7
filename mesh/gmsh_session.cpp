#include "mesh/gmsh_session.h"

#include <gmsh.h>

namespace hv {

GmshSession::GmshSession() {
  run_gmsh("starting", [] {
    gmsh::initialize(0, nullptr, /*readConfigFiles=*/false);
    gmsh::option::setNumber("General.Terminal", 0);  // Gmsh prints Info lines to stdout otherwise
  });
}

GmshSession::~GmshSession() {
  try {
    gmsh::finalize();
  } catch (...) {
    // A destructor must not throw; a failed finalize leaves nothing we could repair.
  }
}

}  // namespace hv
