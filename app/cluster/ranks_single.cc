// The build without MPI (LINKRISE_MPI off): one process, rank 0 of 1. No MPI header is needed.
#include "app/cluster/ranks.h"

namespace linkrise::app {

RankSession::RankSession(int&, char**&) {}
RankSession::~RankSession() = default;

int rank_index() { return 0; }
int rank_count() { return 1; }

std::vector<std::string> exchange_bytes(const std::string& mine) { return {mine}; }

void end_job(int) {}

}  // namespace linkrise::app
