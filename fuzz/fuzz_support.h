#pragma once
// Shared by the fuzz targets: the rule that a documented refusal (InputError, NumericalError) is
// an answer and anything else escaping the library is a finding. libFuzzer treats the abort as
// a crash and saves the input.
#include <cstdio>
#include <cstdlib>
#include <exception>
#include <string>

#include "core/error.h"

namespace lagsieve::fuzz {

template <typename Body>
void refusals_only(Body&& body) {
  try {
    body();
  } catch (const InputError&) {
  } catch (const NumericalError&) {
  } catch (const std::exception& e) {
    std::fprintf(stderr, "fuzz: an exception other than InputError/NumericalError: %s\n", e.what());
    std::abort();
  }
}

}  // namespace lagsieve::fuzz
