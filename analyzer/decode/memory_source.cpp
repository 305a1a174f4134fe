#include "analyzer/decode/memory_source.h"

#include <algorithm>
#include <cstring>
#include <vector>

#include "analyzer/decode/libav_source.h"
#include "analyzer/decode/libav_util.h"

namespace clipwarden::decode {
namespace {

// libav's read position in the bytes.
struct MemoryBytes {
  std::vector<uint8_t> bytes;
  int64_t position = 0;
};

int read_bytes(void* opaque, uint8_t* buffer, int buffer_size) {
  auto* memory = static_cast<MemoryBytes*>(opaque);
  const int64_t left = static_cast<int64_t>(memory->bytes.size()) - memory->position;
  if (left <= 0 || buffer_size <= 0) return AVERROR_EOF;
  const int count = static_cast<int>(std::min<int64_t>(buffer_size, left));
  std::memcpy(buffer, memory->bytes.data() + memory->position, static_cast<size_t>(count));
  memory->position += count;
  return count;
}

// fseek semantics plus AVSEEK_SIZE (the total size); positions outside the
// bytes are refused rather than clamped, like a file that cannot seek there.
int64_t seek_bytes(void* opaque, int64_t offset, int whence) {
  auto* memory = static_cast<MemoryBytes*>(opaque);
  const auto size = static_cast<int64_t>(memory->bytes.size());
  whence &= ~AVSEEK_FORCE;
  if (whence == AVSEEK_SIZE) return size;
  int64_t base = 0;
  if (whence == SEEK_CUR)
    base = memory->position;
  else if (whence == SEEK_END)
    base = size;
  else if (whence != SEEK_SET)
    return AVERROR(EINVAL);
  int64_t target = 0;
  if (__builtin_add_overflow(base, offset, &target) || target < 0 || target > size)
    return AVERROR(EINVAL);
  memory->position = target;
  return target;
}

// Nested opens (HLS segments, concat lists, image sequences) are refused:
// an in-memory clip is exactly its bytes.
int refuse_nested_open(AVFormatContext*, AVIOContext**, const char*, int, AVDictionary**) {
  return AVERROR(EPERM);
}

struct AvioFreer {
  void operator()(AVIOContext* context) const {
    if (!context) return;
    av_freep(&context->buffer);  // libav may have replaced the buffer we gave it
    avio_context_free(&context);
  }
};
using AvioPtr = std::unique_ptr<AVIOContext, AvioFreer>;

// Owns the bytes and the I/O context for the libav reader; members are
// destroyed in reverse order, so the reader (and its format context) goes
// before the I/O context it reads through.
class MemorySource final : public ClipSource {
 public:
  const ClipInfo& info() const override { return reader_->info(); }
  Expected<FrameRead> read(DecodedFrame& frame) override { return reader_->read(frame); }
  StreamFacts stream_facts() const override { return reader_->stream_facts(); }

  std::unique_ptr<MemoryBytes> memory_;
  AvioPtr avio_;
  std::unique_ptr<ClipSource> reader_;
};

constexpr int kIoBufferBytes = 32 * 1024;

}  // namespace

Expected<std::unique_ptr<ClipSource>> open_memory_source(const uint8_t* data, size_t size,
                                                         const std::string& name,
                                                         const SourceOptions& options) {
  install_quiet_av_log();
  if (size == 0) return input_error(name, "file is empty");
  auto source = std::make_unique<MemorySource>();
  source->memory_ = std::make_unique<MemoryBytes>();
  source->memory_->bytes.assign(data, data + size);

  auto* buffer = static_cast<uint8_t*>(av_malloc(kIoBufferBytes));
  if (!buffer) return Error{ErrorKind::internal, name, "out of memory"};
  source->avio_.reset(avio_alloc_context(buffer, kIoBufferBytes, /*write_flag=*/0,
                                         source->memory_.get(), read_bytes, nullptr, seek_bytes));
  if (!source->avio_) {
    av_free(buffer);
    return Error{ErrorKind::internal, name, "out of memory"};
  }
  AVFormatContext* raw = avformat_alloc_context();
  if (!raw) return Error{ErrorKind::internal, name, "out of memory"};
  raw->pb = source->avio_.get();
  raw->flags |= AVFMT_FLAG_CUSTOM_IO;
  raw->io_open = refuse_nested_open;
  clear_av_log_message();
  // On failure avformat_open_input frees the context it was given.
  const int rc = avformat_open_input(&raw, "", nullptr, nullptr);
  if (rc < 0) {
    std::string reason = last_av_log_message();
    if (reason.empty()) reason = av_error_text(rc);
    return input_error(name, "not a video file FFmpeg can read (" + reason + ")");
  }
  auto format = read_stream_headers(FormatPtr(raw), name);
  if (!format) return format.error();
  auto reader = open_libav_source(std::move(*format), name, options);
  if (!reader) return reader.error();
  source->reader_ = std::move(*reader);
  return std::unique_ptr<ClipSource>(std::move(source));
}

}  // namespace clipwarden::decode
