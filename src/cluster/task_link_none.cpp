// cluster/task_link.hpp without MPI: a process alone has no partners.
#include "cluster/task_link.hpp"

namespace tessera::cluster {

struct TaskLink::State {};

TaskLink::TaskLink(std::string) : state_(std::make_unique<State>()) {}
TaskLink::~TaskLink() = default;
void TaskLink::send(int, const std::string&) {}
std::optional<LinkMessage> TaskLink::poll() { return std::nullopt; }
void TaskLink::watch(int, bool) {}
void TaskLink::close() {}
void share_from_rank0(long long*, int) {}

}  // namespace tessera::cluster
