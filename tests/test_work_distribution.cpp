// Dynamic distribution of independent tasks on threads (the MPI path is covered
// by test_ensemble_mpi, which runs the tool under mpirun).
#include <doctest/doctest.h>

#include <map>
#include <stdexcept>

#include "io/input_error.hpp"
#include "studies/work_distribution.hpp"

using namespace gapwise;

TEST_CASE("every task runs once and its result reaches the collector unchanged") {
  std::vector<std::size_t> order;
  for (std::size_t i = 0; i < 40; ++i) order.push_back((i * 7) % 40);  // a permutation
  for (int threads : {1, 2, 5}) {
    std::map<std::size_t, std::string> got;
    distribute_work(
        order, [](std::size_t i) { return std::string(i + 1, static_cast<char>('a' + i % 26)); },
        [&](std::size_t i, std::string r) { CHECK(got.emplace(i, std::move(r)).second); }, {threads});
    REQUIRE(got.size() == 40);
    for (const auto& [i, r] : got) CHECK(r == std::string(i + 1, static_cast<char>('a' + i % 26)));
  }
  // Nothing to do is fine.
  int calls = 0;
  distribute_work({}, [](std::size_t) { return std::string(); }, [&](std::size_t, std::string) { ++calls; }, {3});
  CHECK(calls == 0);
}

TEST_CASE("a failing task stops the work and its error reaches the caller") {
  std::vector<std::size_t> order(30);
  for (std::size_t i = 0; i < order.size(); ++i) order[i] = i;
  int collected = 0;
  auto task = [](std::size_t i) -> std::string {
    if (i == 3) throw InputError({"instance 3", 0, 0, ""}, "bad instance", "fix it");
    return "ok";
  };
  CHECK_THROWS_WITH_AS(distribute_work(order, task, [&](std::size_t, std::string) { ++collected; }, {2}),
                       doctest::Contains("bad instance"), InputError);
  CHECK(collected < 30);
  // A failing collector (say, a full disk) stops the work, too.
  CHECK_THROWS_WITH_AS(distribute_work(order, [](std::size_t) { return std::string("x"); },
                                       [](std::size_t, std::string) { throw std::runtime_error("disk full"); }, {2}),
                       doctest::Contains("disk full"), std::runtime_error);
}

TEST_CASE("outside mpirun the process group is this process alone") {
  const ProcessGroup& g = ProcessGroup::instance();
  CHECK(g.size() == 1);
  CHECK(g.rank() == 0);
  CHECK(g.is_collector());
  CHECK_FALSE(g.uses_mpi());
  CHECK(g.describe() == "threads");
}
