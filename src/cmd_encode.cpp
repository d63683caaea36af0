// clausewright encode MODEL [-o OUT] [--format cnf|wcnf] [--method NAME]...
//                    [--objective-bound B] [--pick POLICY]
//
// Streams the model constraint by constraint into DIMACS CNF or WCNF. A file
// is written beside its target and renamed into place only when complete
// (a symbolic link is followed to its target; a device or a FIFO is written
// in place, never replaced; the model file itself is refused as output).
// Standard output, a device and a FIFO get the exact header from a dry run
// first (the input is read twice), which also means nothing is written there
// for a malformed model.
// The bytes go through threaded_output: the write system calls run on a
// second thread while the next block is formatted.
#include <sys/stat.h>
#include <unistd.h>

#include <cstdio>
#include <functional>
#include <limits>
#include <memory>
#include <optional>
#include <string>

#include <clausewright/dimacs.hpp>
#include <clausewright/io.hpp>

#include "commands.hpp"
#include "model_file.hpp"
#include "wcnf.hpp"

namespace clausewright::tool {

namespace {

struct encode_request {
  std::string model;
  std::string output;
  std::string format;
  std::vector<std::string> methods;
  std::optional<std::int64_t> objective_bound;
  std::string pick = std::string(to_string(default_policy));
  std::uint64_t budget = default_clause_budget;
  bool older_wcnf = false;
  bool comments = false;
  bool full_equivalence = false;
  bool progress = false;
  bool no_progress = false;
};

bool ends_with(const std::string& s, std::string_view suffix) {
  return s.size() >= suffix.size() && s.compare(s.size() - suffix.size(), suffix.size(), suffix) == 0;
}

// Between the reader and the encoder: writes the header and the optional
// comment lines at the right moments, and keeps the progress line going.
template <class Writer, class Sink>
class encode_front final : public model_handler {
 public:
  encode_front(Writer& writer, model_encoder<Sink>& encoder, std::function<void()> header, bool comments,
               progress_line* progress)
      : writer_(writer),
        encoder_(encoder),
        header_(std::move(header)),
        comments_(comments),
        progress_(progress != nullptr && progress->enabled() ? progress : nullptr) {
    encoder_.on_constraint = [this](const constraint_outcome& o) {
      never_holds_ = o.kind == constraint_kind::constant_false;
      if (comments_)
        comment(o);
      else if (progress_ != nullptr)
        tick();
    };
  }

  void begin(const model_header& h) override {
    if (comments_) {
      writer_.comment("clausewright " CLAUSEWRIGHT_VERSION_STRING " from " + std::string(h.file));
      for (std::int32_t v = 1; v <= h.variables; ++v)
        writer_.comment("variable " + (h.name_of ? h.name_of(v) : "x" + std::to_string(v)) + " " + std::to_string(v));
    }
    if (progress_ != nullptr) progress_->set_total(h.constraints);
    if (header_) header_();
    encoder_.begin(h);
  }
  literal product(std::span<const literal> factors) override { return encoder_.product(factors); }
  void objective(std::span<const term> terms, source_position where) override { encoder_.objective(terms, where); }
  void constraint(const constraint_view& c) override {
    never_holds_ = false;
    encoder_.constraint(c);
    // Normalised to false: the output is unsatisfiable, which is worth a word.
    if (never_holds_) warn_never_holds(c.where(), "encode");
    if (!comments_ && progress_ != nullptr && c.soft() && !weighted_clause_sink<Sink>) tick();
  }
  void end() override { encoder_.end(); }

 private:
  void tick() {
    const model_encoding_summary s = encoder_.summary();
    progress_->update(s.constraints, s.hard_clauses + s.soft_clauses);
  }
  void comment(const constraint_outcome& o) {
    std::string text = "constraint #" + std::to_string(o.index);
    if (!o.name.empty()) text += " " + std::string(o.name);
    text += ": " + std::string(to_string(o.kind));
    if (o.weight > 0) text += ", soft (weight " + std::to_string(o.weight) + ")";
    text += ", method " + (o.method ? std::string(info(*o.method).name) : std::string("none"));
    text += ", " + std::to_string(o.size.clauses) + " clauses, " + std::to_string(o.size.variables) +
            " auxiliary variables";
    writer_.comment(text);
    if (progress_ != nullptr) tick();
  }

  Writer& writer_;
  model_encoder<Sink>& encoder_;
  std::function<void()> header_;
  bool comments_;
  progress_line* progress_;
  bool never_holds_ = false;
};

// `encode --format opb`: the normalised model in OPB. Hard constraints as
// normalisation leaves them (the literals it forces as unit constraints
// first, then the rest; a constant true constraint drops out, a constant
// false one is written "0 x1 >= 1"), soft constraints and the objective as
// stated ("[w] ..." and "min:"); products expanded into their factors (a
// negated product through the bound: a ~p = a - a p). The tool's reader
// reads it back to the same CNF. Built in memory: the header counts the
// constraints.
class opb_front final : public model_handler {
 public:
  void begin(const model_header& h) override {
    user_ = h.variables;
    next_ = h.variables;
    file_ = std::string(h.file);
  }
  literal product(std::span<const literal> factors) override {
    products_.emplace_back(factors.begin(), factors.end());
    return literal(++next_);
  }
  void objective(std::span<const term> terms, source_position /*where*/) override {
    std::int64_t shift = 0;
    std::string line;
    for (const term& t : terms) add_term(line, t.coefficient, t.lit, shift);
    objective_ = "min:" + line + " ;\n";
    // A negated product leaves a constant OPB cannot state: said in a comment.
    if (shift != 0)
      objective_.insert(0, "* the objective below leaves out the constant " + std::to_string(shift) + "\n");
  }
  void constraint(const constraint_view& v) override {
    if (v.soft()) {
      std::int64_t shift = 0;
      std::string line = " [" + std::to_string(v.weight) + "]";
      for (const term& t : v.terms) add_term(line, t.coefficient, t.lit, shift);
      finish(line, v.rel, v.bound - shift);
      return;
    }
    const normalized_constraint c = normalize_view(v);
    if (c.kind == constraint_kind::constant_false) warn_never_holds(v.where(), "encode");
    for (const literal u : c.units) {
      std::int64_t shift = 0;
      std::string line;
      add_term(line, 1, u, shift);
      finish(line, relation::ge, 1 - shift);
    }
    if (c.kind == constraint_kind::constant_true) return;
    if (c.kind == constraint_kind::constant_false) {
      std::string line;
      finish(line, relation::ge, 1);
      return;
    }
    std::int64_t shift = 0;
    std::string line;
    for (std::size_t i = 0; i < c.literals.size(); ++i) add_term(line, c.coefficients[i], c.literals[i], shift);
    finish(line, c.rel, c.bound - shift);
  }
  void end() override {}

  [[nodiscard]] std::string text() const {
    std::string out =
        "* #variable= " + std::to_string(std::max(user_, 1)) + " #constraint= " + std::to_string(constraints_) + "\n";
    out += "* the model of " + file_ + " as clausewright normalised it\n";
    out += objective_;
    out += body_;
    return out;
  }

 private:
  // " +a x3", " +a x1 x2" (a product), or a negated product as -a p with
  // the constant a added to `shift`.
  void add_term(std::string& line, std::int64_t a, literal l, std::int64_t& shift) const {
    if (a == 0) return;
    const bool product = l.var() > user_;
    if (product && l.negative()) {
      shift += a;
      a = -a;
    }
    line += a > 0 ? " +" : " ";
    line += std::to_string(a);
    if (!product) {
      line += l.negative() ? " ~x" : " x";
      line += std::to_string(l.var());
      return;
    }
    for (const literal f : products_[static_cast<std::size_t>(l.var() - user_ - 1)]) {
      line += f.negative() ? " ~x" : " x";
      line += std::to_string(f.var());
    }
  }
  // Ends a constraint: its terms (" 0 x1" when none are left), relation,
  // bound.
  void finish(std::string& line, relation rel, std::int64_t bound) {
    if (line.empty() || line.back() == ']') line += " 0 x1";
    body_.append(line, 1);
    body_ += ' ';
    body_ += to_string(rel);
    body_ += ' ';
    body_ += std::to_string(bound);
    body_ += " ;\n";
    ++constraints_;
  }

  std::int32_t user_ = 0;
  std::int32_t next_ = 0;
  std::string file_;
  std::vector<std::vector<literal>> products_;
  std::string objective_;
  std::string body_;
  std::uint64_t constraints_ = 0;
};

model_encoding_summary dry_run_cnf(model_stream& in, const model_encoding_settings& settings) {
  counting_sink sink;
  variable_pool pool;
  model_encoder<counting_sink> encoder(sink, pool, settings);
  in.run(encoder);
  return encoder.summary();
}

model_encoding_summary dry_run_wcnf(model_stream& in, const model_encoding_settings& settings) {
  measuring_sink sink(std::numeric_limits<std::uint64_t>::max());
  variable_pool pool;
  model_encoder<measuring_sink> encoder(sink, pool, settings);
  in.run(encoder);
  return encoder.summary();
}

model_encoding_summary write_cnf(model_stream& in, byte_output& out, const model_encoding_settings& settings,
                                 const std::optional<model_encoding_summary>& exact, const encode_request& r,
                                 progress_line& progress) {
  dimacs_writer writer(out);
  variable_pool pool;
  model_encoder<dimacs_writer> encoder(writer, pool, settings);
  std::function<void()> header = [&] {
    if (exact)
      writer.begin(exact->variables, exact->hard_clauses);
    else
      writer.begin_patched();
  };
  encode_front<dimacs_writer, dimacs_writer> front(writer, encoder, header, r.comments, &progress);
  in.run(front);
  writer.finish(pool.top());
  const model_encoding_summary s = encoder.summary();
  progress.done(s.constraints, s.hard_clauses);
  return s;
}

model_encoding_summary write_wcnf(model_stream& in, byte_output& out, const model_encoding_settings& settings,
                                  const std::optional<model_encoding_summary>& exact, const encode_request& r,
                                  progress_line& progress) {
  wcnf_writer writer(out, r.older_wcnf ? wcnf_style::older : wcnf_style::current);
  variable_pool pool;
  model_encoder<wcnf_writer> encoder(writer, pool, settings);
  std::function<void()> header;
  if (r.older_wcnf) {
    header = [&] {
      const auto top = static_cast<std::int64_t>(exact->soft_weight_sum) + 1;
      writer.begin_older(exact->variables, exact->hard_clauses + exact->soft_clauses, top);
    };
  }
  encode_front<wcnf_writer, wcnf_writer> front(writer, encoder, header, r.comments, &progress);
  in.run(front);
  writer.finish();
  const model_encoding_summary s = encoder.summary();
  if (exact && (s.hard_clauses != exact->hard_clauses || s.soft_clauses != exact->soft_clauses ||
                s.variables != exact->variables))
    throw error(error_id::usage, "the written WCNF differs from its dry run");
  progress.done(s.constraints, s.hard_clauses + s.soft_clauses);
  return s;
}

int run_encode(const encode_request& r) {
  model_encoding_settings settings;
  settings.policy = policy_from_name(r.pick);
  apply_method_options(r.methods, settings);
  settings.options.full_equivalence = r.full_equivalence;
  settings.clause_budget = r.budget;
  settings.objective_bound = r.objective_bound;
  bool wcnf = r.format == "wcnf" || (r.format.empty() && (ends_with(r.output, ".wcnf") || r.older_wcnf));
  if (r.format == "cnf" && r.older_wcnf)
    throw error(error_id::usage, "--older-wcnf asks for WCNF, but --format is cnf");
  if (r.format != "cnf" && r.format != "wcnf" && r.format != "opb" && !r.format.empty())
    throw error(error_id::usage, "unknown format '" + r.format + "'; valid formats: cnf, wcnf, opb");
  const bool opb = r.format == "opb";
  if (opb && r.older_wcnf) throw error(error_id::usage, "--older-wcnf asks for WCNF, but --format is opb");
  wcnf = wcnf || r.older_wcnf;
  const bool to_stdout = r.output.empty() || r.output == "-";

  model_stream in(r.model);
  // The model is never overwritten by its own encoding: the output path may
  // name the same file (also through a symbolic or a hard link).
  if (!to_stdout && in.identity()) {
    struct stat st {};
    if (::stat(r.output.c_str(), &st) == 0 &&
        file_identity{static_cast<std::uint64_t>(st.st_dev), static_cast<std::uint64_t>(st.st_ino)} == *in.identity())
      throw error(error_id::usage, "the output " + r.output + " is the model file " + in.name() +
                                       " itself: writing it would destroy the model");
  }
  // A file output: a temporary renamed into place, or, for a device or a
  // FIFO, the target itself (never replaced).
  std::optional<atomic_file_output> file;
  if (!to_stdout) file.emplace(r.output);
  const bool direct = to_stdout || file->direct();
  progress_line progress(r.progress, r.no_progress || (to_stdout && ::isatty(STDOUT_FILENO) == 1));
  // The exact header needs a dry run first where the output cannot be patched
  // (standard output, a device, a FIFO; this also means nothing is written
  // there for a malformed model), and for the older WCNF form (its header
  // carries the top weight).
  if (opb) {
    opb_front front;
    in.run(front);
    const std::string text = front.text();
    const auto put = [&](byte_output& target) {
      threaded_output out(target);
      out.write(text.data(), text.size());
      out.finish();
    };
    if (to_stdout) {
      fd_output standard_output(STDOUT_FILENO, "standard output");
      put(standard_output);
    } else {
      put(*file);
      file->commit();
    }
    return exit_success;
  }
  std::optional<model_encoding_summary> exact;
  if (direct || (wcnf && r.older_wcnf)) exact = wcnf ? dry_run_wcnf(in, settings) : dry_run_cnf(in, settings);
  // Writes through threaded_output into standard output, or into a file
  // renamed into place only when complete.
  const auto write = [&](byte_output& target) {
    threaded_output out(target);
    model_encoding_summary written =
        wcnf ? write_wcnf(in, out, settings, exact, r, progress) : write_cnf(in, out, settings, exact, r, progress);
    out.finish();
    return written;
  };
  model_encoding_summary s;
  if (to_stdout) {
    fd_output standard_output(STDOUT_FILENO, "standard output");
    s = write(standard_output);
  } else {
    s = write(*file);
    file->commit();
  }
  if (!wcnf && s.skipped_soft != 0)
    std::fprintf(stderr, "clausewright: note: %llu soft constraints are not part of CNF output (use --format wcnf)\n",
                 static_cast<unsigned long long>(s.skipped_soft));
  return exit_success;
}

}  // namespace

void register_encode(CLI::App& app, command_context& context) {
  auto* cmd = app.add_subcommand("encode", "Encode a model (OPB or JSON) into DIMACS CNF or WCNF");
  auto r = std::make_shared<encode_request>();
  cmd->add_option("MODEL", r->model, "Model file (.opb or .json, else by content), or - for standard input")
      ->required();
  cmd->add_option("-o,--output", r->output, "Output file (default: standard output)");
  cmd->add_option("--format", r->format,
                  "cnf, wcnf or opb (default: wcnf when OUT ends in .wcnf, else cnf); CNF keeps the hard constraints "
                  "only; opb writes the model as normalised (products expanded, the objective) for OPB readers");
  // One name per --method: a vector option would otherwise swallow MODEL too.
  cmd->add_option("--method", r->methods,
                  "METHOD: encode every constraint this method can encode with it (repeatable; the first that "
                  "applies wins); NAME=METHOD: the constraints named NAME (an fnmatch pattern such as 'cap*'; #3 "
                  "is unnamed constraint 3) with METHOD, before the others; the rest follow the model's choice "
                  "or the policy")
      ->allow_extra_args(false);
  cmd->add_option("--objective-bound", r->objective_bound, "Add \"objective <= B\" as a hard constraint");
  cmd->add_option("--pick", r->pick,
                  "Selection policy: smallest, smallest-arc-consistent, balanced, propagating (default)");
  cmd->add_flag("--older-wcnf", r->older_wcnf, "WCNF with the older 'p wcnf V C TOP' header and weighted hard clauses");
  cmd->add_flag("--comments", r->comments,
                "Write comment lines: the variable map (name and number), and per constraint its method and size");
  cmd->add_flag("--full-equivalence", r->full_equivalence,
                "Define auxiliary variables in both directions (default: only the direction needed)");
  cmd->add_option("--budget", r->budget,
                  "Clauses one constraint may have, picked or forced (1 to 10^15, default 50000000): a method past "
                  "it is refused")
      ->check(budget_check());
  cmd->add_flag("--progress", r->progress, "Show the progress line on standard error even when it is not a terminal");
  cmd->add_flag("--no-progress", r->no_progress, "Never show the progress line");
  cmd->callback([&context, r] { context.exit_code = run_encode(*r); });
}

}  // namespace clausewright::tool
