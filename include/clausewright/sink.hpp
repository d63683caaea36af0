// clausewright: clause sinks, the one interface every encoding writes to.
//
// A clause sink is any type with a member
//     void add_clause(std::span<const clausewright::literal> clause);
// Encodings are templates over the sink, so a sink's add_clause is inlined
// into the encoder loop. Sinks here: cnf_buffer (in memory, flat),
// counting_sink (sizes only), guarded_sink (appends a literal to every clause),
// and dynamic_sink / sink_adapter for code that needs a runtime sink.
#pragma once

#include <algorithm>
#include <array>
#include <cstddef>
#include <cstdint>
#include <initializer_list>
#include <span>
#include <vector>

#include <boost/container/small_vector.hpp>

#include "config.hpp"
#include "literal.hpp"

namespace clausewright {

template <class S>
concept clause_sink = requires(S& sink, std::span<const literal> clause) {
  {sink.add_clause(clause)};
};

// A sink that also takes weighted soft clauses (a WCNF writer, a MaxSAT
// solver): violating a soft clause of weight w costs w.
template <class S>
concept weighted_clause_sink = clause_sink<S> && requires(S& sink, std::int64_t w, std::span<const literal> c) {
  {sink.add_soft_clause(w, c)};
};

// A sink that takes the objective itself, term by term: minimise the sum of
// coefficient * [l] over the terms added (a solver with an optimiser). The
// model encoder hands such a sink the objective and the cost of each soft
// constraint (its weight on the negated relaxation literal); a weighted
// sink without this hook gets them as soft unit clauses, as WCNF writes them.
template <class S>
concept objective_sink = requires(S& sink, std::int64_t coefficient, literal l) {
  {sink.add_objective_term(coefficient, l)};
};

// Gives a readable message where a type is used as a sink but is not one.
template <class S>
constexpr bool check_clause_sink() {
  static_assert(clause_sink<S>,
                "clausewright: this type is not a clause sink; it needs a member function "
                "add_clause(std::span<const clausewright::literal>)");
  return true;
}

// Emit one clause of a fixed number of literals, from the stack.
template <class Sink, class... Lits>
inline void emit(Sink& sink, Lits... lits) {
  const std::array<literal, sizeof...(Lits)> clause{lits...};
  sink.add_clause(std::span<const literal>(clause));
}

template <class Sink>
inline void emit_list(Sink& sink, std::initializer_list<literal> clause) {
  sink.add_clause(std::span<const literal>(clause.begin(), clause.size()));
}

// Sizes of an encoding: the numbers the statistics report.
struct encoding_size {
  std::uint64_t variables = 0;       // auxiliary variables added
  std::uint64_t clauses = 0;         // clauses emitted
  std::uint64_t literals = 0;        // literal occurrences over all clauses
  std::uint64_t longest_clause = 0;  // literals in the longest clause

  friend bool operator==(const encoding_size&, const encoding_size&) = default;
  encoding_size& operator+=(const encoding_size& o) {
    variables += o.variables;
    clauses += o.clauses;
    literals += o.literals;
    longest_clause = std::max(longest_clause, o.longest_clause);
    return *this;
  }
};

// Stores nothing: counts clauses and literals. Auxiliary variables are counted
// by the variable_pool (its auxiliary_variables() before and after).
class counting_sink {
 public:
  void add_clause(std::span<const literal> clause) noexcept {
    ++clauses_;
    literals_ += clause.size();
    if (clause.size() > longest_) longest_ = clause.size();
  }
  [[nodiscard]] std::uint64_t clauses() const noexcept { return clauses_; }
  [[nodiscard]] std::uint64_t literals() const noexcept { return literals_; }
  [[nodiscard]] std::uint64_t longest_clause() const noexcept { return longest_; }
  [[nodiscard]] encoding_size size(std::uint64_t variables = 0) const noexcept {
    return {variables, clauses_, literals_, longest_};
  }
  void reset() noexcept { clauses_ = literals_ = longest_ = 0; }

 private:
  std::uint64_t clauses_ = 0;
  std::uint64_t literals_ = 0;
  std::uint64_t longest_ = 0;
};

// In-memory CNF: all literals in one flat buffer, clause k is
// literals()[starts[k] .. starts[k+1]).
class cnf_buffer {
 public:
  cnf_buffer() { starts_.push_back(0); }

  void add_clause(std::span<const literal> clause) {
    literals_.insert(literals_.end(), clause.begin(), clause.end());
    starts_.push_back(literals_.size());
    for (const literal l : clause)
      if (l.var() > max_var_) max_var_ = l.var();
  }
  void add_clause(std::initializer_list<literal> clause) {
    add_clause(std::span<const literal>(clause.begin(), clause.size()));
  }

  [[nodiscard]] std::size_t size() const noexcept { return starts_.size() - 1; }
  [[nodiscard]] bool empty() const noexcept { return size() == 0; }
  [[nodiscard]] std::span<const literal> operator[](std::size_t k) const noexcept {
    return {literals_.data() + starts_[k], starts_[k + 1] - starts_[k]};
  }
  [[nodiscard]] std::span<const literal> literals() const noexcept { return literals_; }
  [[nodiscard]] std::int32_t max_variable() const noexcept { return max_var_; }
  [[nodiscard]] bool has_empty_clause() const noexcept {
    for (std::size_t k = 0; k < size(); ++k)
      if (starts_[k] == starts_[k + 1]) return true;
    return false;
  }
  void clear() {
    literals_.clear();
    starts_.assign(1, 0);
    max_var_ = 0;
  }

  // Replay into another sink.
  template <class Sink>
  void replay(Sink& sink) const {
    for (std::size_t k = 0; k < size(); ++k) sink.add_clause((*this)[k]);
  }

  class iterator {
   public:
    using value_type = std::span<const literal>;
    using difference_type = std::ptrdiff_t;
    iterator() = default;
    iterator(const cnf_buffer* owner, std::size_t k) : owner_(owner), k_(k) {}
    value_type operator*() const { return (*owner_)[k_]; }
    iterator& operator++() {
      ++k_;
      return *this;
    }
    iterator operator++(int) {
      iterator old = *this;
      ++k_;
      return old;
    }
    friend bool operator==(const iterator& a, const iterator& b) { return a.k_ == b.k_; }

   private:
    const cnf_buffer* owner_ = nullptr;
    std::size_t k_ = 0;
  };
  [[nodiscard]] iterator begin() const { return {this, 0}; }
  [[nodiscard]] iterator end() const { return {this, size()}; }

 private:
  std::vector<literal> literals_;
  std::vector<std::size_t> starts_;
  std::int32_t max_var_ = 0;
};

// Appends the guard literals to every clause passing through: with guard g,
// the clauses hold only when g is false, i.e. they say "¬g → constraint".
// To make a constraint conditional on r (r → constraint), guard with ¬r.
template <class Sink>
class guarded_sink {
 public:
  guarded_sink(Sink& inner, literal guard) : inner_(inner) { guards_.push_back(guard); }
  guarded_sink(Sink& inner, std::span<const literal> guards) : inner_(inner), guards_(guards.begin(), guards.end()) {}
  guarded_sink(const guarded_sink&) = delete;
  guarded_sink& operator=(const guarded_sink&) = delete;
  ~guarded_sink() = default;

  void add_clause(std::span<const literal> clause) {
    scratch_.assign(clause.begin(), clause.end());
    scratch_.insert(scratch_.end(), guards_.begin(), guards_.end());
    inner_.add_clause(std::span<const literal>(scratch_));
  }
  [[nodiscard]] Sink& inner() noexcept { return inner_; }

 private:
  Sink& inner_;
  boost::container::small_vector<literal, 2> guards_;  // usually one guard: no heap
  std::vector<literal> scratch_;                       // reused: no allocation per clause once warm
};

// A runtime sink, for code that cannot be a template over the sink type.
class dynamic_sink {
 public:
  virtual ~dynamic_sink() = default;
  virtual void add_clause(std::span<const literal> clause) = 0;

 protected:
  dynamic_sink() = default;
  dynamic_sink(const dynamic_sink&) = default;
  dynamic_sink& operator=(const dynamic_sink&) = default;
};

template <class Sink>
class sink_adapter final : public dynamic_sink {
 public:
  explicit sink_adapter(Sink& inner) : inner_(inner) {}
  void add_clause(std::span<const literal> clause) override { inner_.add_clause(clause); }

 private:
  Sink& inner_;
};

// Forwards every clause to two sinks (count while writing, for instance).
template <class A, class B>
class tee_sink {
 public:
  tee_sink(A& a, B& b) : a_(a), b_(b) {}
  void add_clause(std::span<const literal> clause) {
    a_.add_clause(clause);
    b_.add_clause(clause);
  }

 private:
  A& a_;
  B& b_;
};

static_assert(clause_sink<counting_sink>);
static_assert(clause_sink<cnf_buffer>);
static_assert(clause_sink<dynamic_sink>);
static_assert(clause_sink<guarded_sink<cnf_buffer>>);

}  // namespace clausewright
