// The solve of the free system K_ff X = B (one column per conductor at unit potential): CHOLMOD's
// supernodal Cholesky, or conjugate gradients with a p-multigrid preconditioner for large systems
// whose factor would not fit comfortably in memory.
#pragma once

#include <memory>
#include <string>

#include <Eigen/Core>
#include <Eigen/SparseCore>

#include "mesh/mesh.h"

namespace hv {

struct Partition;

enum class LinearSolverKind {
  Automatic,  // direct up to kIterativeFromDofs free unknowns of a P2 (or higher) mesh, else iterative
  Direct,     // CHOLMOD supernodal Cholesky
  Iterative,  // CG with the two-level p-multigrid preconditioner (solver/pcg_multigrid.h)
};

// What the linear solve did; numerical failure is a status, and the caller decides what to say.
struct SolveReport {
  bool ok = false;
  std::string message;     // why it failed, when it did
  std::string method;      // "cholmod-supernodal", "eigen-simplicial-ldlt" or "pcg-p-multigrid"
  int dofs = 0;            // free unknowns
  int iterations = 0;      // CG iterations (the most over the unit solves); 0 for a direct solve
  long long factor_nonzeros = 0;   // of the Cholesky factor (for CG: of the coarse level's)
  double relative_residual = 0.0;  // worst over the unit solves
  double seconds_assemble = 0.0;
  double seconds_factorize = 0.0;  // for CG: building and factorizing the coarse level
  double seconds_solve = 0.0;
};

// Keeps CHOLMOD's symbolic analysis (fill-reducing ordering and supernodal structure) of the last
// K_ff it factorized; a later solve whose K_ff has the same sparsity pattern (the same mesh with other
// permittivities, or a repeated adaptive step) only refactorizes. Holds the factor until destroyed.
class FactorizationCache {
 public:
  FactorizationCache();
  ~FactorizationCache();
  FactorizationCache(const FactorizationCache&) = delete;
  FactorizationCache& operator=(const FactorizationCache&) = delete;

  int analyses() const;  // how many symbolic analyses it has run

 private:
  friend class DirectSolve;
  struct State;
  std::unique_ptr<State> state_;
};

// From this many free unknowns of a P2 (or higher) mesh the automatic choice is CG. Measured on the
// sphere-above-plane case (P2, 2 conductors, OPENBLAS_NUM_THREADS=1): at 9.4e4 unknowns factor+solve
// 2.1 s direct against 2.9 s CG (10 iterations); at 2.7e5 9.5 s against 9.0 s, with the solve's
// peak memory 408 MB against 234 MB; above that the factor's fill grows faster than CG's cost.
// Re-measured after the CG's rework (bench-sphere-box P2, 3 conductors, one OpenMP thread, machine
// loaded by other work): at 1.0e5 unknowns factor+solve 3.4 s direct against 1.4 s CG (10
// iterations), at 4.1e5 15.9 s against 9.7 s; so CG now wins below this threshold too. It stays here
// until the crossover is measured on an idle machine with two threads (figures there were too noisy).
constexpr int kIterativeFromDofs = 250000;

// X = K_ff^-1 B by the method `kind` asks for (Automatic: see kIterativeFromDofs; order-1 meshes
// always direct). `cache` may be null. Fills method, dofs, iterations, factor_nonzeros, the residual
// and the factorize/solve times of `report`; throws RunError when no method succeeds.
// `far_field_c` is the open-boundary constant K_ff was assembled with (the multigrid's coarse level
// needs it).
Eigen::MatrixXd solve_free_system(const Mesh& mesh, double far_field_c, const Partition& partition,
                                  const Eigen::SparseMatrix<double>& K_ff, const Eigen::MatrixXd& B, LinearSolverKind kind,
                                  FactorizationCache* cache, SolveReport& report);

}  // namespace hv
