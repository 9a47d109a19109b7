// The build with MPI (LINKRISE_MPI on). Only the main thread calls MPI (between the worker pool's runs), so the
// job asks for MPI_THREAD_FUNNELED.
#include "app/cluster/ranks.h"

#include <algorithm>
#include <chrono>
#include <cstdint>
#include <cstdlib>
#include <thread>

#include <mpi.h>

namespace linkrise::app {
namespace {

bool joined = false;

// Open MPI's mpirun sets OMPI_COMM_WORLD_SIZE and PMIX_RANK; MPICH's launcher PMI_RANK and PMI_SIZE.
bool started_by_launcher() {
  for (const char* name : {"OMPI_COMM_WORLD_SIZE", "PMIX_RANK", "PMI_RANK", "PMI_SIZE"}) {
    if (std::getenv(name) != nullptr) return true;
  }
  return false;
}

// Below MPI's int counts, with room to spare.
constexpr std::uint64_t kPiece = std::uint64_t{1} << 30;

// Waits until every rank has come, asleep between looks: MPI's blocking calls spin on a core while they wait,
// which would take it from the threads of ranks still computing (several ranks on one machine, or a machine
// shared with other work). A point takes milliseconds, so looking every millisecond costs nothing.
void wait_for_every_rank() {
  MPI_Request request = MPI_REQUEST_NULL;
  MPI_Ibarrier(MPI_COMM_WORLD, &request);
  for (int done = 0;;) {
    MPI_Test(&request, &done, MPI_STATUS_IGNORE);
    if (done) return;
    std::this_thread::sleep_for(std::chrono::milliseconds(1));
  }
}

}  // namespace

RankSession::RankSession(int& argc, char**& argv) {
  if (!started_by_launcher()) return;
  int provided = 0;
  // MPI's default error handler stays: a failed call ends the whole job, so no rank is left waiting.
  MPI_Init_thread(&argc, &argv, MPI_THREAD_FUNNELED, &provided);
  joined = true;
}

RankSession::~RankSession() {
  if (joined) MPI_Finalize();
  joined = false;
}

int rank_index() {
  if (!joined) return 0;
  int rank = 0;
  MPI_Comm_rank(MPI_COMM_WORLD, &rank);
  return rank;
}

int rank_count() {
  if (!joined) return 1;
  int size = 1;
  MPI_Comm_size(MPI_COMM_WORLD, &size);
  return size;
}

std::vector<std::string> exchange_bytes(const std::string& mine) {
  const int ranks = rank_count();
  if (ranks == 1) return {mine};
  // Every rank's size to every rank, then each rank's bytes broadcast from it in pieces.
  wait_for_every_rank();
  std::uint64_t size = mine.size();
  std::vector<std::uint64_t> sizes(static_cast<std::size_t>(ranks));
  MPI_Allgather(&size, 1, MPI_UINT64_T, sizes.data(), 1, MPI_UINT64_T, MPI_COMM_WORLD);
  const int me = rank_index();
  std::vector<std::string> all(static_cast<std::size_t>(ranks));
  for (int root = 0; root < ranks; ++root) {
    std::string& bytes = all[static_cast<std::size_t>(root)];
    bytes = root == me ? mine : std::string(sizes[static_cast<std::size_t>(root)], '\0');
    for (std::uint64_t at = 0; at < bytes.size(); at += kPiece) {
      const auto piece = static_cast<int>(std::min<std::uint64_t>(kPiece, bytes.size() - at));
      MPI_Bcast(bytes.data() + at, piece, MPI_BYTE, root, MPI_COMM_WORLD);
    }
  }
  return all;
}

void end_job(int exit_code) {
  if (joined && rank_count() > 1) MPI_Abort(MPI_COMM_WORLD, exit_code);
}

}  // namespace linkrise::app
