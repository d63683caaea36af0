// clausewright: the command-line tool. Subcommands are in cmd_<name>.cpp.
#include <cstdio>
#include <exception>
#include <new>

#include <clausewright/config.hpp>
#include <clausewright/error.hpp>

#include "commands.hpp"

namespace cwt = clausewright::tool;

int main(int argc, char** argv) {
  CLI::App app{"clausewright: compile at-most-one, cardinality and pseudo-Boolean constraints into CNF"};
  app.set_version_flag("--version", "clausewright " CLAUSEWRIGHT_VERSION_STRING);
  app.require_subcommand(1);
  app.footer("Exit codes: 0 success, 1 a negative answer (violated constraints, unsatisfiable), 2 bad input or usage.");
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
