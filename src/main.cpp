// clausewright: the command-line tool. Subcommands are in cmd_<name>.cpp.
#include <sys/ioctl.h>
#include <unistd.h>

#include <algorithm>
#include <csignal>
#include <cstdio>
#include <cstdlib>
#include <exception>
#include <memory>
#include <new>
#include <sstream>
#include <string>

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

// Help text wrapped to the terminal (80 to 100 columns; 100 when it is not
// a terminal): CLI11 2.1 prints each description on one line, however long.
class wrapping_formatter final : public CLI::Formatter {
 public:
  explicit wrapping_formatter(std::size_t width) : width_(width) { column_width(30); }

  std::string make_option_desc(const CLI::Option* opt) const override {
    return wrap(CLI::Formatter::make_option_desc(opt), width_ - get_column_width());
  }
  std::string make_subcommand(const CLI::App* sub) const override {
    std::stringstream out;
    CLI::detail::format_help(out, sub->get_display_name(true),
                             wrap(sub->get_description(), width_ - get_column_width()), get_column_width());
    return out.str();
  }
  std::string make_description(const CLI::App* app) const override {
    return wrap(CLI::Formatter::make_description(app), width_);
  }
  std::string make_footer(const CLI::App* app) const override { return wrap(CLI::Formatter::make_footer(app), width_); }

  // `text` with its spaces turned into line breaks so no line passes
  // `width` (a single longer word stays whole); existing breaks stay.
  static std::string wrap(const std::string& text, std::size_t width) {
    std::string out;
    std::size_t line = 0;  // characters on the current line
    std::size_t i = 0;
    while (i < text.size()) {
      if (text[i] == '\n') {
        out += '\n';
        line = 0;
        ++i;
        continue;
      }
      const std::size_t end = std::min(text.find_first_of(" \n", i), text.size());
      const std::size_t word = end - i;
      if (line != 0 && line + 1 + word > width) {
        out += '\n';
        line = 0;
      } else if (line != 0) {
        out += ' ';
        ++line;
      }
      out.append(text, i, word);
      line += word;
      i = end;
      while (i < text.size() && text[i] == ' ') ++i;
    }
    return out;
  }

 private:
  std::size_t width_;
};

std::size_t help_width() {
  struct winsize size {};
  if (::ioctl(STDOUT_FILENO, TIOCGWINSZ, &size) == 0 && size.ws_col != 0)
    return std::clamp<std::size_t>(size.ws_col, 80, 100);
  return 100;
}

}  // namespace

int main(int argc, char** argv) {
  install_signal_handlers();
  CLI::App app{"clausewright: compile at-most-one, cardinality and pseudo-Boolean constraints into CNF"};
  app.set_version_flag("--version", "clausewright " CLAUSEWRIGHT_VERSION_STRING);
  app.require_subcommand(1);
  app.formatter(std::make_shared<wrapping_formatter>(help_width()));
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
