// clausewright methods [--json]: the method table.
#include <cstdio>
#include <memory>
#include <string>

#include <nlohmann/json.hpp>

#include "commands.hpp"

namespace clausewright::tool {

namespace {

std::vector<std::string> applies_names(const method_info& m) {
  std::vector<std::string> out;
  if (m.applies_to_kind(applies::at_most_one)) out.emplace_back("at-most-one");
  if (m.applies_to_kind(applies::cardinality)) out.emplace_back("cardinality");
  if (m.applies_to_kind(applies::linear)) out.emplace_back("linear");
  return out;
}

int run_methods(bool as_json) {
  if (as_json) {
    nlohmann::ordered_json out = nlohmann::ordered_json::array();
    for (const auto& m : method_table) {
      nlohmann::ordered_json row;
      row["name"] = std::string(m.name);
      row["applies_to"] = applies_names(m);
      row["arc_consistent"] = m.arc_consistent;
      row["source"] = std::string(m.source);
      row["size"] = std::string(m.size_note);
      out.push_back(std::move(row));
    }
    out_printf("%s\n", out.dump(2).c_str());
    return exit_success;
  }
  out_printf("%-26s %-36s %-15s %s\n", "method", "applies to", "arc-consistent", "source");
  for (const auto& m : method_table) {
    std::string applies;
    for (const auto& a : applies_names(m)) applies += (applies.empty() ? "" : ", ") + a;
    out_printf("%-26s %-36s %-15s %s\n", std::string(m.name).c_str(), applies.c_str(), m.arc_consistent ? "yes" : "no",
               std::string(m.source).c_str());
  }
  return exit_success;
}

}  // namespace

void register_methods(CLI::App& app, command_context& context) {
  auto* cmd = app.add_subcommand("methods", "List the encoding methods: what each applies to, whether it is "
                                            "arc-consistent (as measured by the tests), and its source");
  auto as_json = std::make_shared<bool>(false);
  cmd->add_flag("--json", *as_json, "Print the table as a JSON array of objects");
  cmd->callback([&context, as_json] { context.exit_code = run_methods(*as_json); });
}

void register_unavailable(CLI::App& app, command_context& context, const std::string& name,
                          const std::string& description) {
  auto* cmd = app.add_subcommand(name, description);
  cmd->allow_extras();
  cmd->callback([&context, name] {
    std::fprintf(stderr, "clausewright: the '%s' command is not available in this build\n", name.c_str());
    context.exit_code = exit_bad_input;
  });
}

}  // namespace clausewright::tool
