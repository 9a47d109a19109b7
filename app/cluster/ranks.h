#pragma once
// The processes of one job. Started by an MPI launcher (`mpirun -n N linkrise ...`, a build with LINKRISE_MPI),
// every process runs the same command as one rank of N: the studies share their points out among the ranks and
// exchange the results (app/studies/rank_pool.h), so every rank holds the whole study and takes the same
// decisions; only the first rank writes files and prints. Started any other way — a build without MPI, or no
// launcher (joining MPI alone would cost a second at every start) — the process is rank 0 of 1.
#include <string>
#include <vector>

namespace linkrise::app {

/// Joins the MPI job for the life of the object when a launcher started the process; nothing otherwise.
class RankSession {
 public:
  RankSession(int& argc, char**& argv);
  ~RankSession();
  RankSession(const RankSession&) = delete;
  RankSession& operator=(const RankSession&) = delete;
};

/// This process's rank: 0 without a job.
int rank_index();
/// The job's number of ranks: 1 without a job.
int rank_count();
/// The rank that writes the output files and prints.
inline bool first_rank() { return rank_index() == 0; }

/// Every rank passes its bytes and receives every rank's, in rank order (entry r is rank r's). A collective call:
/// every rank makes it, as often and in the same order. Any size (sent in pieces below 1 GiB).
std::vector<std::string> exchange_bytes(const std::string& mine);

/// Ends every rank of the job at once (MPI_Abort with `exit_code`), for a failure that may have struck this rank
/// alone and would leave the others waiting in an exchange. Returns without a job of more than one rank.
void end_job(int exit_code);

}  // namespace linkrise::app
