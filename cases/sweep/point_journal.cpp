#include "cases/sweep/point_journal.hpp"

#include "geometry/input_error.hpp"

#include <errno.h>
#include <fcntl.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>
#include <zlib.h>

#include <algorithm>
#include <chrono>
#include <complex>
#include <cstring>
#include <stdexcept>
#include <utility>

namespace murk {

namespace {

// The journal's bytes are this machine's: it is read back only by the run that
// continues it, on the same kind of machine; the result file is the portable one.
constexpr char kMagic[8] = {'m', 'u', 'r', 'k', 'J', 'N', 'L', '1'};
constexpr std::uint8_t kPointRecord = 1, kCheckRecord = 2, kHistoryRecord = 3;
// Seconds between syncs to disk (a killed process loses nothing the kernel has;
// this bounds what a crash of the machine can lose).
constexpr double kSyncInterval = 10.0;

double now_seconds() {
    return std::chrono::duration<double>(std::chrono::steady_clock::now().time_since_epoch()).count();
}

std::string errno_text() { return std::strerror(errno); }

class Writer {
public:
    template <class T>
    void put(const T& v) {
        const auto* p = reinterpret_cast<const unsigned char*>(&v);
        bytes.insert(bytes.end(), p, p + sizeof(T));
    }
    void put_text(const std::string& s) {
        put(static_cast<std::uint16_t>(s.size()));
        bytes.insert(bytes.end(), s.begin(), s.end());
    }
    std::vector<unsigned char> bytes;
};

class Reader {
public:
    Reader(const unsigned char* data, std::size_t size) : data_(data), size_(size) {}
    template <class T>
    bool get(T& v) {
        if (size_ - at_ < sizeof(T)) return false;
        std::memcpy(&v, data_ + at_, sizeof(T));
        at_ += sizeof(T);
        return true;
    }
    bool get_text(std::string& s) {
        std::uint16_t n = 0;
        if (!get(n) || size_ - at_ < n) return false;
        s.assign(reinterpret_cast<const char*>(data_ + at_), n);
        at_ += n;
        return true;
    }
    std::size_t at() const { return at_; }

private:
    const unsigned char* data_;
    std::size_t size_, at_ = 0;
};

std::uint32_t crc_of(const unsigned char* p, std::size_t n) {
    return static_cast<std::uint32_t>(crc32(crc32(0L, Z_NULL, 0), p, static_cast<uInt>(n)));
}

std::vector<unsigned char> header_bytes(const JournalHeader& h) {
    Writer w;
    w.bytes.insert(w.bytes.end(), kMagic, kMagic + 8);
    w.put(h.points), w.put(h.sensors), w.put(h.scalar_bytes), w.put(h.share_index), w.put(h.share_count), w.put(h.pid);
    w.put_text(h.case_sha256), w.put_text(h.murk_version), w.put_text(h.host), w.put_text(h.started_utc);
    // The header's own length first, so that a reader knows where the records start.
    Writer framed;
    framed.put(static_cast<std::uint32_t>(w.bytes.size()));
    framed.bytes.insert(framed.bytes.end(), w.bytes.begin(), w.bytes.end());
    framed.put(crc_of(framed.bytes.data(), framed.bytes.size()));
    return framed.bytes;
}

bool pread_all(int fd, void* buffer, std::size_t n, std::int64_t at) {
    auto* p = static_cast<unsigned char*>(buffer);
    while (n > 0) {
        const ssize_t got = ::pread(fd, p, n, at);
        if (got <= 0) return false;
        p += got, n -= std::size_t(got), at += got;
    }
    return true;
}

// The header at the start of the file, or false when it is not a whole journal header.
bool read_header(int fd, JournalHeader& h, std::int64_t& end) {
    std::uint32_t length = 0;
    if (!pread_all(fd, &length, sizeof length, 0) || length > 4096) return false;
    std::vector<unsigned char> bytes(sizeof length + length + 4);
    if (!pread_all(fd, bytes.data(), bytes.size(), 0)) return false;
    std::uint32_t crc = 0;
    std::memcpy(&crc, bytes.data() + sizeof length + length, 4);
    if (crc != crc_of(bytes.data(), sizeof length + length)) return false;
    Reader r(bytes.data() + sizeof length, length);
    char magic[8];
    for (char& c : magic)
        if (!r.get(c)) return false;
    if (std::memcmp(magic, kMagic, 8) != 0) return false;
    if (!(r.get(h.points) && r.get(h.sensors) && r.get(h.scalar_bytes) && r.get(h.share_index) && r.get(h.share_count) &&
          r.get(h.pid) && r.get_text(h.case_sha256) && r.get_text(h.murk_version) && r.get_text(h.host) &&
          r.get_text(h.started_utc)))
        return false;
    end = std::int64_t(bytes.size());
    return true;
}

std::string holder(const JournalHeader& h) {
    return "murk process " + std::to_string(h.pid) + " on " + h.host + " (started " + h.started_utc + ")";
}

// Locks the journal file open on `fd`; when another process holds it, says who.
void lock_or_refuse(int fd, const std::string& path) {
    if (::flock(fd, LOCK_EX | LOCK_NB) == 0) return;
    JournalHeader other;
    std::int64_t end = 0;
    const std::string who = read_header(fd, other, end) ? holder(other) : "another murk process";
    ::close(fd);
    throw InputError(path + " is being written by " + who +
                     "; wait for that run to finish, stop it, or write to another output");
}

// The open file still has this name (not removed or replaced since it was opened).
bool still_named(int fd, const std::string& path) {
    struct stat by_fd {}, by_name {};
    return ::fstat(fd, &by_fd) == 0 && ::stat(path.c_str(), &by_name) == 0 && by_fd.st_ino == by_name.st_ino &&
           by_fd.st_dev == by_name.st_dev;
}

template <class S>
constexpr std::uint32_t scalar_bytes() {
    return sizeof(S);
}

}  // namespace

PointJournal::PointJournal(std::string path, int fd, JournalHeader header)
    : path_(std::move(path)), fd_(fd), header_(std::move(header)), offset_(header_.points, -1),
      status_(header_.points, 0), path_code_(header_.points, 0), mask_(header_.points, 0), last_sync_(now_seconds()) {}

PointJournal::PointJournal(PointJournal&& o) noexcept
    : path_(std::move(o.path_)), fd_(std::exchange(o.fd_, -1)), header_(std::move(o.header_)),
      offset_(std::move(o.offset_)), status_(std::move(o.status_)), path_code_(std::move(o.path_code_)),
      mask_(std::move(o.mask_)), checks_(std::move(o.checks_)), history_(std::move(o.history_)),
      held_elsewhere_(o.held_elsewhere_), finished_(o.finished_), end_(o.end_),
      dropped_bytes_(o.dropped_bytes_), last_sync_(o.last_sync_) {}

PointJournal::~PointJournal() {
    if (fd_ >= 0) ::close(fd_);  // closing releases the lock
}

PointJournal PointJournal::start(const std::string& path, const JournalHeader& header, bool replace) {
    const std::vector<unsigned char> head = header_bytes(header);
    for (int attempt = 0; attempt < 3; ++attempt) {
        int fd = ::open(path.c_str(), O_RDWR | O_CLOEXEC);
        if (fd >= 0) {
            lock_or_refuse(fd, path);
            if (!still_named(fd, path)) {  // removed by the run that held it: look again
                ::close(fd);
                continue;
            }
            if (!replace) {
                ::close(fd);
                throw InputError(path + " holds the points of an interrupted run; pass --resume to finish it, "
                                        "or --force to start over");
            }
            if (::ftruncate(fd, 0) != 0 || ::pwrite(fd, head.data(), head.size(), 0) != ssize_t(head.size())) {
                const std::string why = errno_text();
                ::close(fd);
                throw std::runtime_error("cannot write " + path + ": " + why);
            }
            PointJournal j(path, fd, header);
            j.end_ = std::int64_t(head.size());
            return j;
        }
        if (errno != ENOENT) throw InputError(path + ": cannot open (" + errno_text() + ")");
        // A new journal is made whole and locked under a name of its own, then linked
        // to its name, which fails if another run got there first.
        const std::string fresh = path + ".new-" + std::to_string(::getpid());
        fd = ::open(fresh.c_str(), O_RDWR | O_CREAT | O_EXCL | O_CLOEXEC, 0644);
        if (fd < 0) throw InputError(path + ": cannot create (" + errno_text() + ")");
        if (::flock(fd, LOCK_EX) != 0 || ::write(fd, head.data(), head.size()) != ssize_t(head.size())) {
            const std::string why = errno_text();
            ::close(fd), ::unlink(fresh.c_str());
            throw std::runtime_error("cannot write " + path + ": " + why);
        }
        const int linked = ::link(fresh.c_str(), path.c_str());
        const int link_errno = errno;
        ::unlink(fresh.c_str());
        if (linked == 0) {
            PointJournal j(path, fd, header);
            j.end_ = std::int64_t(head.size());
            return j;
        }
        ::close(fd);
        if (link_errno != EEXIST) throw InputError(path + ": cannot create (" + std::strerror(link_errno) + ")");
    }
    throw InputError(path + ": another run keeps replacing it; write to another output");
}

PointJournal PointJournal::reopen(const std::string& path, const JournalHeader& expected) {
    const int fd = ::open(path.c_str(), O_RDWR | O_CLOEXEC);
    if (fd < 0) throw InputError(path + ": no such file, so there is nothing to resume");
    lock_or_refuse(fd, path);
    JournalHeader h;
    std::int64_t end = 0;
    if (!read_header(fd, h, end)) {
        ::close(fd);
        throw InputError(path + ": is not a journal of this murk (an earlier murk's partial file, or damaged); "
                                "start over with --force");
    }
    const auto refuse = [&](const std::string& why) {
        ::close(fd);
        throw InputError(path + ": " + why + "; start over with --force");
    };
    if (h.case_sha256 != expected.case_sha256) {
        ::close(fd);
        throw InputError(path + ": was started from a different case file; refusing to resume it with this one");
    }
    if (h.murk_version != expected.murk_version)
        refuse("was written by murk " + h.murk_version + ", this is murk " + expected.murk_version);
    if (h.points != expected.points || h.sensors != expected.sensors || h.scalar_bytes != expected.scalar_bytes)
        refuse("holds a sweep of another size");
    if (h.share_index != expected.share_index || h.share_count != expected.share_count)
        refuse("holds share " + std::to_string(h.share_index + 1) + "/" + std::to_string(h.share_count) +
               ", not share " + std::to_string(expected.share_index + 1) + "/" + std::to_string(expected.share_count));
    // The new holder's name goes into the header, for the messages of others.
    JournalHeader mine = h;
    mine.pid = expected.pid, mine.host = expected.host, mine.started_utc = expected.started_utc;
    const std::vector<unsigned char> head = header_bytes(mine);
    PointJournal j(path, fd, mine);
    j.end_ = end;
    j.scan(true);
    // Rewrite the header in place only when its length is unchanged (it is, unless the
    // host name changed length); otherwise the old holder's name stays, which is harmless.
    if (std::int64_t(head.size()) == end) (void)::pwrite(fd, head.data(), head.size(), 0);
    return j;
}

bool PointJournal::is_journal(const std::string& path) {
    const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
    if (fd < 0) return false;
    char magic[12] = {};
    const bool ok = pread_all(fd, magic, sizeof magic, 0) && std::memcmp(magic + 4, kMagic, 8) == 0;
    ::close(fd);
    return ok;
}

PointJournal PointJournal::inspect(const std::string& path) {
    const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
    if (fd < 0) throw InputError(path + ": cannot open (" + errno_text() + ")");
    JournalHeader h;
    std::int64_t end = 0;
    if (!read_header(fd, h, end)) {
        ::close(fd);
        throw InputError(path + ": is not a journal of this murk");
    }
    PointJournal j(path, fd, h);
    j.end_ = end;
    // A shared lock is refused while a run holds its exclusive one; either way it is let go at once.
    j.held_elsewhere_ = ::flock(fd, LOCK_SH | LOCK_NB) != 0;
    if (!j.held_elsewhere_) ::flock(fd, LOCK_UN);
    j.scan(false);
    return j;
}

void PointJournal::scan(bool cut_torn_tail) {
    std::int64_t at = end_;
    std::vector<unsigned char> body;
    for (;;) {
        std::uint32_t length = 0;
        if (!pread_all(fd_, &length, sizeof length, at)) break;
        if (length < 9 || length > std::max<std::uint64_t>(128 + header_.sensors * header_.scalar_bytes, 65600)) break;
        body.resize(length + 4);
        if (!pread_all(fd_, body.data(), body.size(), at + std::int64_t(sizeof length))) break;
        std::uint32_t crc = 0;
        std::memcpy(&crc, body.data() + length, 4);
        std::vector<unsigned char> framed(sizeof length);
        std::memcpy(framed.data(), &length, sizeof length);
        framed.insert(framed.end(), body.begin(), body.begin() + length);
        if (crc != crc_of(framed.data(), framed.size())) break;
        Reader r(body.data(), length);
        std::uint8_t kind = 0;
        std::uint64_t point = 0;
        if (!r.get(kind) || !r.get(point) || point >= header_.points) break;
        if (kind == kPointRecord) {
            std::uint8_t status = 0, path = 0, mask = 0;
            if (!r.get(status) || !r.get(path) || !r.get(mask)) break;
            if (offset_[point] < 0) ++finished_;
            offset_[point] = at;
            status_[point] = status, path_code_[point] = path, mask_[point] = mask;
        } else if (kind == kCheckRecord) {
            CheckRecord c;
            c.point = point;
            if (!r.get(c.discrepancy) || !r.get(c.size_to_distance)) break;
            checks_.push_back(c);
        } else if (kind == kHistoryRecord) {
            std::string line;
            if (!r.get_text(line)) break;
            history_.push_back(line);
        } else {
            break;
        }
        at += std::int64_t(sizeof length + length + 4);
    }
    // Whatever follows the last whole record is the torn write of a killed run.
    struct stat st {};
    if (::fstat(fd_, &st) == 0 && st.st_size > at) {
        dropped_bytes_ = std::size_t(st.st_size - at);
        if (cut_torn_tail && ::ftruncate(fd_, at) != 0)
            throw std::runtime_error("cannot cut the torn end off " + path_ + ": " + errno_text());
    }
    end_ = at;
}

PointStatus PointJournal::status(std::size_t point) const { return PointStatus(status_[point]); }
PathCode PointJournal::path(std::size_t point) const { return PathCode(path_code_[point]); }
MaskReason PointJournal::mask(std::size_t point) const { return MaskReason(mask_[point]); }

void PointJournal::write_record(const std::vector<unsigned char>& payload) {
    Writer w;
    w.put(static_cast<std::uint32_t>(payload.size()));
    w.bytes.insert(w.bytes.end(), payload.begin(), payload.end());
    w.put(crc_of(w.bytes.data(), w.bytes.size()));
    std::size_t done = 0;
    while (done < w.bytes.size()) {
        const ssize_t n = ::pwrite(fd_, w.bytes.data() + done, w.bytes.size() - done, end_ + std::int64_t(done));
        if (n < 0 && errno == EINTR) continue;
        if (n <= 0) {
            const std::string why = errno_text();
            // The torn bytes would be cut off by a resume; cut them now to keep the file whole.
            (void)::ftruncate(fd_, end_);
            throw std::runtime_error("cannot write to " + path_ + " (" + why + "); the " + std::to_string(finished_) +
                                     " finished points before it are kept there; make room and run again with --resume");
        }
        done += std::size_t(n);
    }
    end_ += std::int64_t(w.bytes.size());
    if (now_seconds() - last_sync_ > kSyncInterval) sync();
}

template <class S>
void PointJournal::append(const PointResult<S>& r) {
    if (scalar_bytes<S>() != header_.scalar_bytes) throw std::logic_error("journal: values of the wrong type");
    Writer w;
    const PointStatus status = r.mask == MaskReason::none ? PointStatus::computed : PointStatus::masked;
    w.put(kPointRecord);
    w.put(static_cast<std::uint64_t>(r.point));
    w.put(static_cast<std::uint8_t>(status)), w.put(static_cast<std::uint8_t>(r.path)),
        w.put(static_cast<std::uint8_t>(r.mask));
    w.put(static_cast<std::int32_t>(r.mask == MaskReason::none ? std::int32_t(r.image.peak_sensor) : -1));
    w.put(r.centre.x()), w.put(r.centre.y()), w.put(r.centre.z());
    w.put(r.image.peak), w.put(r.image.width), w.put(r.snr), w.put(r.detection_probability);
    w.put(static_cast<std::uint32_t>(r.change.size()));
    for (const S& v : r.change) w.put(v);
    const std::int64_t at = end_;
    write_record(w.bytes);
    if (offset_[r.point] < 0) ++finished_;
    offset_[r.point] = at;
    status_[r.point] = std::uint8_t(status), path_code_[r.point] = std::uint8_t(r.path), mask_[r.point] = std::uint8_t(r.mask);
}

void PointJournal::append_check(const CheckRecord& c) {
    Writer w;
    w.put(kCheckRecord);
    w.put(c.point), w.put(c.discrepancy), w.put(c.size_to_distance);
    write_record(w.bytes);
    checks_.push_back(c);
}

void PointJournal::append_history(const std::string& line) {
    Writer w;
    w.put(kHistoryRecord);
    w.put(std::uint64_t(0));  // every record names a point; this one none in particular
    w.put_text(line.substr(0, 60000));
    write_record(w.bytes);
    history_.push_back(line);
}

template <class S>
PointResult<S> PointJournal::read(std::size_t point) const {
    const std::int64_t at = offset_.at(point);
    if (at < 0) throw std::logic_error("journal: point " + std::to_string(point) + " is not finished");
    std::uint32_t length = 0;
    std::vector<unsigned char> body;
    if (pread_all(fd_, &length, sizeof length, at)) {
        body.resize(length);
        if (!pread_all(fd_, body.data(), length, at + std::int64_t(sizeof length))) body.clear();
    }
    Reader r(body.data(), body.size());
    PointResult<S> p;
    std::uint8_t kind = 0, status = 0, path = 0, mask = 0;
    std::uint64_t index = 0;
    std::int32_t peak_sensor = 0;
    double c[3];
    std::uint32_t n = 0;
    const bool whole = r.get(kind) && r.get(index) && r.get(status) && r.get(path) && r.get(mask) &&
                       r.get(peak_sensor) && r.get(c[0]) && r.get(c[1]) && r.get(c[2]) && r.get(p.image.peak) &&
                       r.get(p.image.width) && r.get(p.snr) && r.get(p.detection_probability) && r.get(n);
    if (!whole || index != point) throw std::runtime_error(path_ + ": the record of point " + std::to_string(point) + " cannot be read back");
    p.point = point;
    p.path = PathCode(path);
    p.mask = MaskReason(mask);
    p.centre = Vec3(c[0], c[1], c[2]);
    p.image.peak_sensor = peak_sensor < 0 ? 0 : std::size_t(peak_sensor);
    p.change.resize(n);
    for (S& v : p.change)
        if (!r.get(v)) throw std::runtime_error(path_ + ": the record of point " + std::to_string(point) + " is short");
    return p;
}

void PointJournal::sync() {
    if (fd_ >= 0 && ::fsync(fd_) != 0)
        throw std::runtime_error("cannot sync " + path_ + " to disk (" + errno_text() + "); the finished points are "
                                 "kept there as far as the disk took them; run again with --resume");
    last_sync_ = now_seconds();
}

void PointJournal::discard() {
    ::unlink(path_.c_str());  // removed while still locked, so no other run takes it over half-gone
    ::close(fd_);
    fd_ = -1;
}

template void PointJournal::append(const PointResult<double>&);
template void PointJournal::append(const PointResult<Complex>&);
template PointResult<double> PointJournal::read(std::size_t) const;
template PointResult<Complex> PointJournal::read(std::size_t) const;

}  // namespace murk
