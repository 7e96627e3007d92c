#include "cli/input_loading.hpp"

#include "cli/bath_option.hpp"
#include "hamiltonian/memory_budget.hpp"
#include "io/embedding_file.hpp"

namespace gapwise::cli {

RunFiles& RunFiles::problem(const std::string& path, const std::string& role) {
  problem_ = path;
  problem_role_ = role;
  return *this;
}
RunFiles& RunFiles::embedding(const std::string& path) { embedding_ = path; return *this; }
RunFiles& RunFiles::schedule(const std::string& path) { schedule_ = path; return *this; }
RunFiles& RunFiles::bath(const std::string& path) { bath_ = path; return *this; }
RunFiles& RunFiles::candidate_schedules(const std::vector<std::string>& paths) {
  candidate_schedules_ = paths;
  return *this;
}
RunFiles& RunFiles::instance_set(const std::string& path) { instance_set_ = path; return *this; }
RunFiles& RunFiles::plan(FilePlan plan) { plan_ = std::move(plan); return *this; }

void check_run_files(const RunFiles& files) {
  FilePlan plan;
  plan.input_file_or_folder(files.instance_set_, "instance set")
      .input(files.problem_, files.problem_role_)
      .input(files.embedding_, "embedding")
      .input(files.schedule_, "schedule")
      .input(files.bath_, "--bath");
  for (const auto& f : files.candidate_schedules_) plan.input(f, "schedule");
  plan.inputs.insert(plan.inputs.end(), files.plan_.inputs.begin(), files.plan_.inputs.end());
  plan.outputs = files.plan_.outputs;
  check_file_plan(plan);
}

RunInputs read_run_inputs(const RunFiles& files) {
  RunInputs in;
  if (!files.instance_set_.empty()) in.instance_set = read_instance_set(files.instance_set_);
  if (!files.problem_.empty()) in.problem_file = parse_problem_file(files.problem_);
  if (!files.embedding_.empty()) {
    in.embedding = read_embedding_file(files.embedding_);
    in.embedding_file_ = files.embedding_;
  }
  if (!files.schedule_.empty()) in.schedule = read_schedule_file(files.schedule_);
  if (in.embedding && in.problem_file) check_embedding_serves(*in.embedding, in.problem(), files.problem_);
  if (in.problem_file) in.bath = load_bath(files.bath_, in.problem().qubits);
  for (const auto& f : files.candidate_schedules_) in.candidate_schedules.push_back(read_schedule_file(f));
  return in;
}

RunInputs load_run_inputs(const RunFiles& files) {
  check_run_files(files);
  return read_run_inputs(files);
}

void RunInputs::check_memory(int complex_vectors) const {
  if (embedding)
    gapwise::check_memory(embedding->physical_qubits, complex_vectors, 0, embedding_file_);
  else
    gapwise::check_memory(problem().qubits, complex_vectors, 0, problem_file->qubits_place);
}

}  // namespace gapwise::cli
