#pragma once
// Long calls that Ctrl-C stops: the work runs on a worker thread with the GIL released, while the
// calling thread wakes every 50 ms to let Python run its signal handlers (PyErr_CheckSignals,
// which only acts on the main thread). When a handler raises (KeyboardInterrupt for Ctrl-C), the
// cancellation flag the work checks between candidates (SearchOptions::cancel) is set, the work
// is waited for (it stops at the next candidate, throwing Cancelled) and the Python exception is
// raised. Nothing is written on the way out: the work computes in memory or in staging folders
// whose owners remove them.
#include <pybind11/pybind11.h>

#include <atomic>
#include <chrono>
#include <condition_variable>
#include <exception>
#include <mutex>
#include <optional>
#include <thread>
#include <type_traits>
#include <utility>

namespace lagsieve::python {

template <class Work>
auto run_interruptible(Work&& work) {
  using Result = std::invoke_result_t<Work&, const std::atomic<bool>*>;
  namespace py = pybind11;
  std::atomic<bool> cancel{false};
  std::optional<Result> result;
  std::exception_ptr error;
  bool interrupted = false;
  {
    py::gil_scoped_release unlocked;
    std::mutex mutex;
    std::condition_variable finished;
    bool done = false;
    std::thread worker([&] {
      try {
        result.emplace(work(&cancel));
      } catch (...) {
        error = std::current_exception();
      }
      std::lock_guard lock(mutex);
      done = true;
      finished.notify_one();
    });
    std::unique_lock lock(mutex);
    while (!done) {
      if (finished.wait_for(lock, std::chrono::milliseconds(50), [&] { return done; })) break;
      if (interrupted) continue;  // waiting for the work to reach its next check
      lock.unlock();
      {
        py::gil_scoped_acquire locked;
        if (PyErr_CheckSignals() != 0) {  // the handler's exception is now pending
          interrupted = true;
          cancel = true;
        }
      }
      lock.lock();
    }
    lock.unlock();
    worker.join();
  }
  if (interrupted) throw py::error_already_set();  // KeyboardInterrupt, whatever the work did
  if (error) std::rethrow_exception(error);
  return std::move(*result);
}

}  // namespace lagsieve::python
