// The signals that stop a run or a sweep cleanly (at a step or point boundary, outputs kept,
// resumable), one list for both: SIGINT (Ctrl-C), SIGTERM (kill, schedulers) and SIGUSR1.
// SIGUSR1 is for work under Open MPI's mpirun, which passes SIGUSR1 on to the ranks and waits
// for them, but kills them 1 s after passing on a SIGTERM (docs/guide.md "Running on a
// cluster"); it ends the work as SIGTERM does, with exit code 143.
#pragma once

#include <csignal>
#include <initializer_list>

namespace tessera::cli {

// Installs `handler` for every stop signal, or the default action again when it is null.
inline void catch_stop_signals(void (*handler)(int)) {
    for (int signal : {SIGINT, SIGTERM, SIGUSR1}) std::signal(signal, handler ? handler : SIG_DFL);
}

// "SIGINT", "SIGTERM" or "SIGUSR1", for the message after a stop (0 counts as SIGINT).
inline const char* stop_signal_name(int signal) {
    return signal == SIGTERM ? "SIGTERM" : signal == SIGUSR1 ? "SIGUSR1" : "SIGINT";
}

// 130 after SIGINT, 143 after SIGTERM or SIGUSR1.
inline int stop_exit_code(int signal) { return 128 + (signal == SIGUSR1 || signal == SIGTERM ? SIGTERM : SIGINT); }

}  // namespace tessera::cli
