#pragma once
// The record of a sweep in progress, OUT.h5.partial: every finished point (its
// values and summary) and every dipole check, appended as it finishes, each
// record closed by a CRC-32. A run killed at any instant leaves whole records
// and at most one torn last record, which a resume finds by its length or its
// checksum and cuts off: every point in a whole record is kept exactly as it
// was computed. The result file (HDF5) is written from the journal once, at
// the end, so an interrupted and resumed run writes the same file as one that
// was never interrupted.
//
// The journal is also the run's lock: it is held open with an exclusive lock
// (flock) for the run's whole life, so a second run on the same output is
// refused, naming the live one (process id and host, from the header), and the
// lock goes with the process however it ends.
//
// Writes are plain appends: a killed process loses nothing the kernel has; the
// journal is synced to disk every few seconds and at the end, against a crash
// of the machine.
#include "cases/sweep/point_result.hpp"

#include <cstdint>
#include <string>
#include <vector>

namespace murk {

struct JournalHeader {
    std::string case_sha256;  // 64 hex digits
    std::string murk_version;
    std::uint64_t points = 0, sensors = 0;
    std::uint32_t scalar_bytes = 8;  // 8 real, 16 complex
    std::uint32_t share_index = 0, share_count = 1;
    // Who writes it, for the message that refuses a second run.
    std::int64_t pid = 0;
    std::string host;
    std::string started_utc;
};

// A dipole point re-solved by the exact path.
struct CheckRecord {
    std::uint64_t point = 0;
    double discrepancy = 0, size_to_distance = 0;
};

class PointJournal {
public:
    // A new journal for the run described by `header`, holding the lock. Refuses
    // (InputError) when another run holds the journal at `path`, and when an
    // interrupted run left one there, unless `replace`.
    static PointJournal start(const std::string& path, const JournalHeader& header, bool replace);
    // The journal an interrupted run left at `path`, locked again, its torn last
    // record (if any) cut off. Refuses (InputError) a journal that is missing,
    // held by a live run, of another case, version, size or share.
    static PointJournal reopen(const std::string& path, const JournalHeader& expected);
    // A journal read as it is, for people (murk inspect): no lock taken, nothing cut
    // off, even while a run writes it. InputError when `path` is no journal.
    static PointJournal inspect(const std::string& path);
    // True when `path` starts like a journal (murk inspect tells journals from results).
    static bool is_journal(const std::string& path);
    // True when a live run holds the journal's lock.
    bool held_by_a_run() const { return held_elsewhere_; }

    PointJournal(PointJournal&& other) noexcept;
    PointJournal& operator=(PointJournal&&) = delete;
    PointJournal(const PointJournal&) = delete;
    ~PointJournal();  // releases the lock; the file stays

    const std::string& path() const { return path_; }
    const JournalHeader& header() const { return header_; }
    std::size_t finished() const { return finished_; }
    bool has(std::size_t point) const { return offset_[point] >= 0; }
    PointStatus status(std::size_t point) const;
    PathCode path(std::size_t point) const;
    MaskReason mask(std::size_t point) const;
    const std::vector<CheckRecord>& checks() const { return checks_; }
    std::size_t dropped_bytes() const { return dropped_bytes_; }  // torn tail cut off on reopening

    // Not thread-safe: the caller appends one record at a time. A failed write
    // (a full disk, a file-size limit) throws std::runtime_error saying what is kept.
    template <class S>
    void append(const PointResult<S>& result);
    void append_check(const CheckRecord& check);
    // A line of the result's CF history: each run that works on the journal adds its own.
    void append_history(const std::string& line);
    const std::vector<std::string>& history() const { return history_; }
    template <class S>
    PointResult<S> read(std::size_t point) const;

    void sync();     // to disk (fsync)
    void discard();  // the run is committed: the journal is removed, then unlocked

private:
    PointJournal(std::string path, int fd, JournalHeader header);
    void scan(bool cut_torn_tail);
    void write_record(const std::vector<unsigned char>& bytes);

    std::string path_;
    int fd_ = -1;
    JournalHeader header_;
    std::vector<std::int64_t> offset_;  // per point: its latest record, -1 when not finished
    std::vector<std::uint8_t> status_, path_code_, mask_;
    std::vector<CheckRecord> checks_;
    std::vector<std::string> history_;
    bool held_elsewhere_ = false;
    std::size_t finished_ = 0;
    std::int64_t end_ = 0;  // bytes in the file
    std::size_t dropped_bytes_ = 0;
    double last_sync_ = 0;
};

}  // namespace murk
