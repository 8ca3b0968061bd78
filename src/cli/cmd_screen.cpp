// Placeholder for `lagsieve screen`; replaced by the engineer who owns this command.
#include <fmt/format.h>

#include <memory>
#include <string>

#include "cli/commands.h"
#include "cli/common.h"

namespace lagsieve::cli {

void register_screen(CLI::App& app) {
  auto* cmd = app.add_subcommand("screen", "(not implemented yet)");
  auto path = std::make_shared<std::string>();
  cmd->add_option("CONFIG", *path, "Run configuration (YAML)")->required();
  cmd->callback([] {
    fmt::print(stderr, "lagsieve: screen: not implemented yet\n");
    finish(kExitInternal);
  });
}

}  // namespace lagsieve::cli
