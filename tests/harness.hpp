// The verification harness every encoding goes through.
//
// - Exhaustive equivalence (n <= 12 inputs): for every assignment of the
//   inputs, the encoding's clauses plus that assignment are satisfiable
//   exactly when the original constraint holds. Satisfiability is decided by
//   CaDiCaL, an independent solver; the constraint is evaluated directly on
//   the user's terms, so normalisation is checked too.
// - Propagation strength: for partial assignments of the inputs, unit
//   propagation on the clauses must derive every input literal the constraint
//   implies (decided by brute force over the extensions), and a conflict when
//   the constraint is already violated. The result is measured and reported,
//   not assumed.
// - Random cases use fixed seeds; every failure message names the seed and the
//   constraint.
#pragma once

#include <gtest/gtest.h>

#include <cadical.hpp>
#include <clausewright/clausewright.hpp>
#include <cstdint>
#include <random>
#include <set>
#include <sstream>
#include <string>
#include <vector>

namespace cw_test {

namespace cw = clausewright;

// A constraint as a user states it (before normalisation), with the
// at-most-one sets of the model around it (for the group methods, which rely
// on them): encode() adds them to the formula pairwise, and the checks hold
// the clauses to the constraint and the sets together.
struct raw_constraint {
  std::vector<cw::term> terms;
  cw::relation rel = cw::relation::le;
  std::int64_t bound = 0;
  std::vector<std::vector<cw::literal>> amos = {};  // defaulted: aggregate initialisers may leave it out

  // Whether the constraint and every at-most-one set hold.
  template <class ValueOf>
  [[nodiscard]] bool satisfied(ValueOf&& value) const {
    for (const auto& set : amos) {
      int count = 0;
      for (const cw::literal l : set) {
        const bool v = value(l.var());
        count += (l.negative() ? !v : v) ? 1 : 0;
      }
      if (count > 1) return false;
    }
    return cw::holds(terms, rel, bound, value);
  }

  [[nodiscard]] std::string describe() const {
    std::ostringstream os;
    for (std::size_t i = 0; i < terms.size(); ++i) {
      if (i) os << " + ";
      os << terms[i].coefficient << "*" << (terms[i].lit.negative() ? "~x" : "x") << terms[i].lit.var();
    }
    if (terms.empty()) os << "0";
    os << " " << cw::to_string(rel) << " " << bound;
    for (const auto& set : amos) {
      os << (&set == &amos.front() ? "; at most one of" : ",");
      for (const cw::literal l : set) os << (l.negative() ? " ~x" : " x") << l.var();
    }
    return os.str();
  }
  // Distinct input variables (sorted).
  [[nodiscard]] std::vector<std::int32_t> inputs() const {
    std::set<std::int32_t> s;
    for (const auto& t : terms) s.insert(t.lit.var());
    return {s.begin(), s.end()};
  }
  [[nodiscard]] std::int32_t max_var() const {
    std::int32_t m = 0;
    for (const auto& t : terms) m = std::max(m, t.lit.var());
    return m;
  }
  // Normalised, with its groups found from the at-most-one sets.
  [[nodiscard]] cw::normalized_constraint normalized() const {
    cw::normalized_constraint c = cw::normalize(terms, rel, bound);
    if (!amos.empty()) cw::assign_groups(c, cw::at_most_one_index(amos));
    return c;
  }
};

inline raw_constraint cardinality(std::int32_t n, cw::relation rel, std::int64_t k, bool negate_some = false) {
  raw_constraint c;
  for (std::int32_t v = 1; v <= n; ++v) c.terms.push_back({1, cw::lit(negate_some && v % 2 == 0 ? -v : v)});
  c.rel = rel;
  c.bound = k;
  return c;
}

struct encoded {
  cw::cnf_buffer cnf;
  cw::variable_pool pool;
  cw::normalized_constraint normal;
};

// Normalises and encodes with `method`; the user's variables are 1..max_var.
inline encoded encode(const raw_constraint& c, cw::method_id method, const cw::encode_options& options = {}) {
  encoded e;
  e.pool.reserve_user(std::max<std::int32_t>(c.max_var(), 1));
  e.normal = c.normalized();
  for (const auto& set : c.amos)
    for (std::size_t i = 0; i < set.size(); ++i)
      for (std::size_t j = i + 1; j < set.size(); ++j) cw::emit(e.cnf, ~set[i], ~set[j]);
  cw::encode_with(method, e.cnf, e.pool, e.normal, options);
  return e;
}

inline void add_to_solver(CaDiCaL::Solver& solver, const cw::cnf_buffer& cnf) {
  for (const auto clause : cnf) {
    for (const cw::literal l : clause) solver.add(l.dimacs());
    solver.add(0);
  }
}

// Exhaustive equivalence against CaDiCaL. With full_equivalence also that
// the auxiliary variables are defined in both directions: for every input
// assignment that satisfies the constraint, exactly one model of the clauses
// extends it (the first model found is blocked, and CaDiCaL must find no
// other).
inline ::testing::AssertionResult equivalent(const raw_constraint& c, cw::method_id method,
                                             const cw::encode_options& options = {}, const std::string& context = {}) {
  const auto inputs = c.inputs();
  if (inputs.size() > 16) return ::testing::AssertionFailure() << "too many inputs for the exhaustive check";
  encoded e;
  try {
    e = encode(c, method, options);
  } catch (const std::exception& ex) {
    return ::testing::AssertionFailure() << context << " " << c.describe() << ": encoding threw: " << ex.what();
  }
  CaDiCaL::Solver solver;
  add_to_solver(solver, e.cnf);
  const std::uint64_t assignments = std::uint64_t{1} << inputs.size();
  // Selectors of the blocking clauses of the full-equivalence check come
  // after every variable of the encoding.
  std::int32_t next_selector = e.pool.top();
  for (std::uint64_t bits = 0; bits < assignments; ++bits) {
    auto value = [&](std::int32_t var) {
      for (std::size_t i = 0; i < inputs.size(); ++i)
        if (inputs[i] == var) return ((bits >> i) & 1U) != 0;
      return false;
    };
    for (std::size_t i = 0; i < inputs.size(); ++i) solver.assume(((bits >> i) & 1U) ? inputs[i] : -inputs[i]);
    const int status = solver.solve();
    const bool sat = status == 10;
    const bool expected = c.satisfied(value);
    if (status != 10 && status != 20) return ::testing::AssertionFailure() << "CaDiCaL returned " << status;
    if (sat != expected) {
      std::ostringstream os;
      for (std::size_t i = 0; i < inputs.size(); ++i) os << (((bits >> i) & 1U) ? "" : "~") << "x" << inputs[i] << " ";
      return ::testing::AssertionFailure()
             << context << " method " << cw::info(method).name << (options.full_equivalence ? " (full)" : "") << " on "
             << c.describe() << ": under " << os.str() << "the clauses are " << (sat ? "satisfiable" : "unsatisfiable")
             << " but the constraint " << (expected ? "holds" : "is violated");
    }
    if (sat && options.full_equivalence && e.pool.top() > e.pool.user_variables()) {
      // With full equivalence every auxiliary variable is a function of the
      // inputs: no second model differs from the first on them. The first
      // model is blocked under a fresh selector, so the clause stays inactive
      // for the other assignments.
      const std::int32_t selector = ++next_selector;
      std::ostringstream first;
      std::vector<int> blocking;  // read every value before adding (adding leaves the satisfied state)
      for (std::int32_t v = e.pool.user_variables() + 1; v <= e.pool.top(); ++v) {
        const int value = solver.val(v);
        blocking.push_back(value > 0 ? -v : v);
        first << (value > 0 ? "" : "~") << "a" << v << " ";
      }
      for (const int l : blocking) solver.add(l);
      solver.add(-selector);
      solver.add(0);
      for (std::size_t i = 0; i < inputs.size(); ++i) solver.assume(((bits >> i) & 1U) ? inputs[i] : -inputs[i]);
      solver.assume(selector);
      const int again = solver.solve();
      if (again != 20) {
        std::ostringstream os;
        for (std::size_t i = 0; i < inputs.size(); ++i)
          os << (((bits >> i) & 1U) ? "" : "~") << "x" << inputs[i] << " ";
        return ::testing::AssertionFailure()
               << context << " method " << cw::info(method).name << " (full) on " << c.describe() << ": under "
               << os.str() << "the auxiliary variables are not determined: a second model differs from " << first.str();
      }
    }
  }
  return ::testing::AssertionSuccess();
}

// Unit propagation over a CNF, independent of the encoders. Values indexed by
// variable: 0 unassigned, 1 true, -1 false.
class propagator {
 public:
  explicit propagator(const cw::cnf_buffer& cnf, std::int32_t vars) : cnf_(cnf), vars_(vars) {}

  // Returns false on conflict. `assumed` are the decisions.
  bool run(const std::vector<cw::literal>& assumed) {
    value_.assign(static_cast<std::size_t>(vars_) + 1, 0);
    for (const auto l : assumed) {
      int& v = value_[static_cast<std::size_t>(l.var())];
      const int want = l.negative() ? -1 : 1;
      if (v == -want) return false;
      v = want;
    }
    for (bool changed = true; changed;) {
      changed = false;
      for (const auto clause : cnf_) {
        int unassigned = 0;
        cw::literal last;
        bool satisfied = false;
        for (const auto l : clause) {
          const int v = val(l);
          if (v > 0) {
            satisfied = true;
            break;
          }
          if (v == 0) {
            ++unassigned;
            last = l;
          }
        }
        if (satisfied) continue;
        if (unassigned == 0) return false;
        if (unassigned == 1) {
          value_[static_cast<std::size_t>(last.var())] = last.negative() ? -1 : 1;
          changed = true;
        }
      }
    }
    return true;
  }
  [[nodiscard]] int val(cw::literal l) const {
    const int v = value_[static_cast<std::size_t>(l.var())];
    return l.negative() ? -v : v;
  }

 private:
  const cw::cnf_buffer& cnf_;
  std::int32_t vars_;
  std::vector<int> value_;
};

struct propagation_report {
  bool arc_consistent = true;
  std::uint64_t partial_assignments = 0;
  std::string counterexample;  // first missed implication or conflict
};

// Measures propagation strength. Exhaustive over all 3^n partial assignments
// when that is at most `exhaustive_limit`, else `samples` random ones from
// `seed`.
inline propagation_report measure_propagation(const raw_constraint& c, cw::method_id method,
                                              const cw::encode_options& options = {}, std::uint32_t seed = 1,
                                              std::uint64_t samples = 2000, std::uint64_t exhaustive_limit = 20000) {
  propagation_report report;
  const auto inputs = c.inputs();
  const std::size_t n = inputs.size();
  const encoded e = encode(c, method, options);
  propagator up(e.cnf, std::max(e.pool.top(), e.cnf.max_variable()));

  std::uint64_t total = 1;
  bool exhaustive = true;
  for (std::size_t i = 0; i < n; ++i) {
    total *= 3;
    if (total > exhaustive_limit) {
      exhaustive = false;
      break;
    }
  }
  std::mt19937_64 rng(seed);
  const std::uint64_t rounds = exhaustive ? total : samples;
  std::vector<int> partial(n);  // 0 free, 1 true, -1 false
  for (std::uint64_t r = 0; r < rounds; ++r) {
    if (exhaustive) {
      std::uint64_t code = r;
      for (std::size_t i = 0; i < n; ++i) {
        partial[i] = static_cast<int>(code % 3) - 1;
        code /= 3;
      }
    } else {
      for (std::size_t i = 0; i < n; ++i) partial[i] = static_cast<int>(rng() % 3) - 1;
    }
    ++report.partial_assignments;
    // Brute force over extensions: which free inputs are forced?
    std::vector<std::size_t> free;
    for (std::size_t i = 0; i < n; ++i)
      if (partial[i] == 0) free.push_back(i);
    std::vector<int> can_be(n, 0);  // bit 1: can be true, bit 2: can be false
    bool satisfiable = false;
    for (std::uint64_t bits = 0; bits < (std::uint64_t{1} << free.size()); ++bits) {
      std::vector<int> full = partial;
      for (std::size_t f = 0; f < free.size(); ++f) full[free[f]] = ((bits >> f) & 1U) ? 1 : -1;
      auto value = [&](std::int32_t var) {
        for (std::size_t i = 0; i < n; ++i)
          if (inputs[i] == var) return full[i] > 0;
        return false;
      };
      if (!c.satisfied(value)) continue;
      satisfiable = true;
      for (std::size_t f : free) can_be[f] |= full[f] > 0 ? 1 : 2;
    }
    std::vector<cw::literal> assumed;
    for (std::size_t i = 0; i < n; ++i)
      if (partial[i] != 0) assumed.push_back(cw::lit(partial[i] > 0 ? inputs[i] : -inputs[i]));
    const bool no_conflict = up.run(assumed);
    auto describe_partial = [&] {
      std::ostringstream os;
      for (std::size_t i = 0; i < n; ++i)
        if (partial[i] != 0) os << (partial[i] > 0 ? "" : "~") << "x" << inputs[i] << " ";
      const std::string assigned = os.str();
      return assigned.empty() ? std::string("no assignment ") : assigned;
    };
    if (!satisfiable) {
      if (no_conflict && report.arc_consistent) {
        report.arc_consistent = false;
        report.counterexample =
            "under " + describe_partial() + "the constraint is violated but propagation finds no conflict";
      }
      continue;
    }
    if (!no_conflict) {
      report.arc_consistent = false;
      report.counterexample = "UNSOUND: under " + describe_partial() + "propagation conflicts but the constraint holds";
      return report;  // an encoding bug, not weak propagation
    }
    for (std::size_t f : free) {
      if (can_be[f] == 3) continue;
      const cw::literal implied = cw::lit(can_be[f] == 1 ? inputs[f] : -inputs[f]);
      if (up.val(implied) <= 0 && report.arc_consistent) {
        report.arc_consistent = false;
        report.counterexample = "under " + describe_partial() + "the constraint implies " +
                                (implied.negative() ? "~x" : "x") + std::to_string(implied.var()) +
                                " but propagation does not derive it";
      }
    }
  }
  return report;
}

// Random linear constraints over variables 1..n for the corner cases of
// normalisation: negative and zero coefficients, repeated variables,
// complementary literals, coefficients above the bound.
inline raw_constraint random_linear(std::mt19937_64& rng, std::int32_t n, std::int64_t max_coefficient,
                                    bool allow_negative, bool allow_repeats) {
  raw_constraint c;
  std::uniform_int_distribution<std::int64_t> coef(allow_negative ? -max_coefficient : 0, max_coefficient);
  const std::int32_t terms = allow_repeats ? n + static_cast<std::int32_t>(rng() % 3) : n;
  for (std::int32_t i = 0; i < terms; ++i) {
    const std::int32_t var = i < n ? i + 1 : 1 + static_cast<std::int32_t>(rng() % static_cast<std::uint64_t>(n));
    const bool neg = (rng() & 1U) != 0;
    c.terms.push_back({coef(rng), cw::lit(neg ? -var : var)});
  }
  std::int64_t positive = 0;
  for (const auto& t : c.terms) positive += t.coefficient > 0 ? t.coefficient : 0;
  std::uniform_int_distribution<std::int64_t> bound(-2, positive + 2);
  c.bound = bound(rng);
  c.rel = static_cast<cw::relation>(rng() % 3);
  return c;
}

// A row over variables 1..n whose terms fall into at-most-one sets: blocks of
// 1 to 3 consecutive terms, each set the block's literals as the row states
// them (positive coefficients, so normalisation keeps the literals and the
// groups are the blocks). `unit`: every coefficient 1 (a cardinality row).
inline raw_constraint random_grouped(std::mt19937_64& rng, std::int32_t n, std::int64_t max_coefficient, bool unit) {
  raw_constraint c;
  std::uniform_int_distribution<std::int64_t> coef(1, max_coefficient);
  std::int64_t most = 0;
  for (std::int32_t v = 1; v <= n;) {
    const std::int32_t size = std::min<std::int32_t>(n - v + 1, 1 + static_cast<std::int32_t>(rng() % 3));
    std::vector<cw::literal> set;
    std::int64_t block_most = 0;
    for (std::int32_t i = 0; i < size; ++i, ++v) {
      const cw::literal l = cw::lit((rng() & 3U) == 0 ? -v : v);
      const std::int64_t a = unit ? 1 : coef(rng);
      c.terms.push_back({a, l});
      set.push_back(l);
      block_most = std::max(block_most, a);
    }
    most += block_most;
    if (set.size() > 1) c.amos.push_back(std::move(set));
  }
  std::uniform_int_distribution<std::int64_t> bound(0, most + 1);
  c.bound = bound(rng);
  c.rel = static_cast<cw::relation>(rng() % 3);
  return c;
}

}  // namespace cw_test

namespace cw_test {

// The cardinality suite every cardinality or at-most-one method runs:
// n = 1..max_n, every k from 0 to n+1, every relation, plain and with negated
// inputs, one-directional and full. Constraints the method cannot encode after
// normalisation (for an at-most-one method, anything but at-most-one or
// exactly-one) are skipped, and the number checked is returned so a test can
// assert it did check something.
inline std::uint64_t cardinality_suite(cw::method_id method, std::int32_t max_n, std::int32_t min_n = 1) {
  std::uint64_t checked = 0;
  for (std::int32_t n = min_n; n <= max_n; ++n)
    for (std::int64_t k = 0; k <= n + 1; ++k)
      for (const auto rel : {cw::relation::le, cw::relation::ge, cw::relation::eq})
        for (const bool negated : {false, true})
          for (const bool full : {false, true}) {
            const raw_constraint c = cardinality(n, rel, k, negated);
            if (!cw::can_encode(method, c.normalized())) continue;
            const std::string context = "n=" + std::to_string(n) + " k=" + std::to_string(k);
            EXPECT_TRUE(equivalent(c, method, cw::encode_options{full}, context));
            ++checked;
          }
  return checked;
}

}  // namespace cw_test
