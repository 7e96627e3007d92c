#pragma once
// The one loader of a command's input files: the check of every file a run
// reads and writes (io/output_paths), then the problem, the embedding, the
// schedule and the bath, each read and checked the same way in every command,
// so that a bad file is refused with the same words whichever command reads it.
//
//   const RunInputs loaded = load_run_inputs(   // check_run_files + read_run_inputs
//       RunFiles{}.problem(o.problem).schedule(o.schedule).bath(o.bath)
//           .plan(FilePlan{}.output(o.out, "--out").output(o.csv, "--csv")));
//   ... option checks ...
//   loaded.check_memory(10);                           // "problem.toml:4:10: key 'qubits': ..."
//
// A command that checks its options between the file check and the reading
// (so that a bad option is named before a file is parsed) calls the two halves.
#include <optional>
#include <string>
#include <vector>

#include "dynamics/master_equation.hpp"
#include "io/instance_set_file.hpp"
#include "io/output_paths.hpp"
#include "io/problem_file.hpp"
#include "io/schedule_file.hpp"
#include "problem/embedding.hpp"

namespace gapwise::cli {

struct RunInputs;

/// The files one run reads, by role (a path "" is a role not given), and the
/// outputs it writes. Built by chaining: RunFiles{}.problem(p).schedule(s).
class RunFiles {
 public:
  /// The problem file (TOML, Ising or QUBO); refusals name it by `role`.
  RunFiles& problem(const std::string& path, const std::string& role = "problem");
  /// The embedding file: chains of the problem's qubits (embed-cost).
  RunFiles& embedding(const std::string& path);
  /// The schedule file; none given reads as the default schedule (Schedule{}).
  RunFiles& schedule(const std::string& path);
  /// --bath: a thermal bath file (closed system only when none).
  RunFiles& bath(const std::string& path);
  /// Several schedule files compared with each other (compare-paths), each read
  /// and refused like the one schedule (file:line: key '...').
  RunFiles& candidate_schedules(const std::vector<std::string>& paths);
  /// An instance set: HDF5 file or folder of problem files (ensemble).
  RunFiles& instance_set(const std::string& path);
  /// The run's other inputs (checked after those above; files the command
  /// reads itself) and every output and journal it writes (FilePlan::output,
  /// journal_of).
  RunFiles& plan(FilePlan plan);

 private:
  friend void check_run_files(const RunFiles& files);
  friend RunInputs read_run_inputs(const RunFiles& files);
  std::string problem_, problem_role_ = "problem", embedding_, schedule_, bath_, instance_set_;
  std::vector<std::string> candidate_schedules_;
  FilePlan plan_;
};

/// What read_run_inputs read; a role not given stays empty.
struct RunInputs {
  std::optional<ProblemFile> problem_file;
  std::optional<Embedding> embedding;      ///< checked to serve the problem
  Schedule schedule;                       ///< Schedule{} when no schedule file was given
  std::optional<OhmicBath> bath;           ///< checked to hold the problem's qubits
  std::optional<InstanceSet> instance_set;
  std::vector<Schedule> candidate_schedules;  ///< in the order given

  /// The problem as Ising (a QUBO converted exactly). Only when a problem was given.
  const IsingProblem& problem() const { return problem_file->ising; }
  /// The memory check (hamiltonian/memory_budget) for `complex_vectors` states of
  /// the simulated problem: the physical one of the embedding when there is one
  /// (refusal placed at the embedding file), else the problem (placed at its
  /// `qubits` key).
  void check_memory(int complex_vectors) const;

 private:
  friend RunInputs read_run_inputs(const RunFiles& files);
  std::string embedding_file_;
};

/// The one check of every file before any work: inputs are regular files (the
/// instance set may be a folder), no output is an input or another output, no
/// output is a special file, every output folder is writable. InputError (exit 2).
void check_run_files(const RunFiles& files);

/// Reads the files given, in this order: instance set, problem, embedding
/// (then checks that it serves the problem), schedule, bath (then checks that
/// the problem fits the open-system simulation), candidate schedules. The
/// first refusal is thrown.
RunInputs read_run_inputs(const RunFiles& files);

/// check_run_files, then read_run_inputs: what a command does first.
RunInputs load_run_inputs(const RunFiles& files);

}  // namespace gapwise::cli
