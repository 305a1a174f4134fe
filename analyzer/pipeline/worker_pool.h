// A fixed set of worker threads taking tasks from one queue. Each task gets
// the index of the worker running it, so per-worker state (an optical flow
// instance, scratch buffers) needs no locking.
#pragma once

#include <functional>
#include <thread>
#include <vector>

#include "analyzer/pipeline/bounded_queue.h"

namespace clipwarden {

class WorkerPool {
 public:
  using Task = std::function<void(int worker)>;

  WorkerPool(int workers, size_t queue_capacity) : tasks_(queue_capacity) {
    for (int i = 0; i < workers; ++i)
      threads_.emplace_back([this, i] {
        while (auto task = tasks_.pop()) (*task)(i);
      });
  }
  ~WorkerPool() {
    tasks_.close();
    for (auto& t : threads_) t.join();
  }
  WorkerPool(const WorkerPool&) = delete;
  WorkerPool& operator=(const WorkerPool&) = delete;

  void submit(Task task) { tasks_.push(std::move(task)); }
  int size() const { return static_cast<int>(threads_.size()); }

 private:
  BoundedQueue<Task> tasks_;
  std::vector<std::thread> threads_;
};

}  // namespace clipwarden
