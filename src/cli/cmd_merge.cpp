// `lagsieve merge OUT SHARD_DIR...`: joins the folders of `search --shard K/N` runs into the run
// folder one unsharded run writes.
#include <memory>

#include "cli/batch_run.h"
#include "cli/commands.h"
#include "cli/common.h"

namespace lagsieve::cli {

void register_merge(CLI::App& app) {
  auto* cmd = app.add_subcommand(
      "merge", "Join the shard folders of `search --shard K/N` into one run folder");
  auto out = std::make_shared<std::string>();
  auto shards = std::make_shared<std::vector<std::string>>();
  cmd->add_option("OUT", *out, "Run folder to write (replaced as a whole)")->required();
  cmd->add_option("SHARD_DIR", *shards, "Every shard folder of the run, in any order")->required();
  cmd->callback(
      [out, shards] { finish(run_command([&] { return merge_command(*out, *shards); })); });
}

}  // namespace lagsieve::cli
