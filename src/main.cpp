// clausewright: the command-line tool. Subcommands are in cmd_<name>.cpp.
#include <csignal>
#include <cstdio>
#include <exception>
#include <new>

#include <clausewright/config.hpp>
#include <clausewright/error.hpp>
#include <clausewright/io.hpp>

#include "commands.hpp"

namespace cwt = clausewright::tool;

namespace {

// SIGINT, SIGTERM, SIGHUP: the temporary output file being written goes,
// then the signal's default action ends the program as it would have.
extern "C" void on_ending_signal(int signal) {
  clausewright::remove_pending_temporary();
  static_cast<void>(std::signal(signal, SIG_DFL));
  static_cast<void>(std::raise(signal));  // delivered when the handler returns
}

void install_signal_handlers() {
  for (const int signal : {SIGINT, SIGTERM, SIGHUP}) {
    struct sigaction previous {};
    // A signal ignored by whoever started us (nohup, a background job)
    // stays ignored.
    if (::sigaction(signal, nullptr, &previous) != 0 || previous.sa_handler == SIG_IGN) continue;
    struct sigaction action {};
    action.sa_handler = on_ending_signal;
    sigemptyset(&action.sa_mask);
    static_cast<void>(::sigaction(signal, &action, nullptr));
  }
  // Past a file-size limit, write() fails with EFBIG instead of the signal
  // killing the program: the error path reports it and removes the
  // temporary file.
  static_cast<void>(std::signal(SIGXFSZ, SIG_IGN));
}

}  // namespace

int main(int argc, char** argv) {
  install_signal_handlers();
  CLI::App app{"clausewright: compile at-most-one, cardinality and pseudo-Boolean constraints into CNF"};
  app.set_version_flag("--version", "clausewright " CLAUSEWRIGHT_VERSION_STRING);
  app.require_subcommand(1);
  app.footer(cwt::exit_code_text);
  cwt::command_context context;
  cwt::register_encode(app, context);
  cwt::register_decode(app, context);
  cwt::register_stats(app, context);
  cwt::register_methods(app, context);
  cwt::register_report(app, context);
#ifdef CLAUSEWRIGHT_TOOL_HAS_SOLVE
  cwt::register_solve(app, context);
#else
  cwt::register_unavailable(app, context, "solve", "Solve a model with the built-in SAT solver (not in this build)");
#endif
  try {
    app.parse(argc, argv);
    // Output lost on a full disk or a closed pipe is an error, not success.
    cwt::finish_standard_output();
  } catch (const CLI::Success& e) {
    return app.exit(e);  // --help, --version
  } catch (const CLI::ParseError& e) {
    (void)app.exit(e);
    return cwt::exit_bad_input;
  } catch (const clausewright::error& e) {
    if (e.where().file.empty())
      std::fprintf(stderr, "clausewright: %s\n", e.what());
    else
      std::fprintf(stderr, "%s\n", e.what());
    return cwt::exit_bad_input;
  } catch (const std::bad_alloc&) {
    std::fprintf(stderr, "clausewright: out of memory\n");
    return cwt::exit_bad_input;
  } catch (const std::exception& e) {
    std::fprintf(stderr, "clausewright: %s\n", e.what());
    return cwt::exit_bad_input;
  }
  return context.exit_code;
}
