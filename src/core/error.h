#pragma once
// Errors the library reports to its callers. The library never exits the process:
// the command-line front turns these into messages and exit codes.
#include <stdexcept>
#include <string>

namespace lagsieve {

// Bad input from the user (config, CSV, model file, command-line values). The message names the
// spot (file:line, YAML key path, CSV row/column) and says what to do. Exit code 2.
class InputError : public std::runtime_error {
 public:
  explicit InputError(const std::string& message) : std::runtime_error(message) {}
};

// A numerical failure that the caller may record as a status rather than abort on.
class NumericalError : public std::runtime_error {
 public:
  explicit NumericalError(const std::string& message) : std::runtime_error(message) {}
};

// The caller asked the work to stop (a cancellation flag set, e.g. Ctrl-C in Python). Thrown
// between candidates, never mid-fit, so nothing is left half-computed; callers that write files
// stage them (run_dir.h) and so leave no half-written run folder.
class Cancelled : public std::runtime_error {
 public:
  Cancelled() : std::runtime_error("cancelled") {}
};

}  // namespace lagsieve
