#pragma once
// Errors the library reports to its callers. The library never exits the process:
// the command-line front turns these into messages and exit codes.
#include <stdexcept>
#include <string>
#include <utility>

namespace lagsieve {

// Bad input from the user (config, CSV, model file, command-line values). The message names the
// spot (file:line, YAML key path, CSV row/column) and says what to do. Exit code 2.
class InputError : public std::runtime_error {
 public:
  explicit InputError(const std::string& message) : std::runtime_error(message) {}
  // With the spot as fields too (the YAML reader knows them), for machine-readable errors.
  InputError(const std::string& message, std::string file, int line, std::string key)
      : std::runtime_error(message), file_(std::move(file)), line_(line), key_(std::move(key)) {}
  const std::string& file() const { return file_; }
  int line() const { return line_; }  // 1-based; 0 when not known
  const std::string& key() const { return key_; }

 private:
  std::string file_;
  int line_ = 0;
  std::string key_;
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
