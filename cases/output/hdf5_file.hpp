#pragma once
// murk's thin layer over the HDF5 C API: result files that h5py, netCDF-4 and xarray read
// without murk (cases/RESULT_LAYOUT.md).
//
//   H5Output out("OUT.h5", force, "pass --force to replace it");   // writes OUT.h5.partial
//   H5Group mesh = out.root().group("mesh/body");
//   mesh.write_coordinate("vertex", vertex_index, "1", "vertex index");
//   mesh.write_label_coordinate("xyz", {"x", "y", "z"}, "Cartesian component");
//   mesh.write("vertices", &v[0].x(), {n, 3}, "m", "vertex position").label_dimensions({"vertex", "xyz"});
//   out.commit();                                                   // renames onto OUT.h5
//
// Rules the layer keeps:
//  - every dataset gets `units` (a UDUNITS string, "1" if dimensionless) and `long_name`:
//    they are required arguments, so they cannot be forgotten;
//  - strings are variable-length UTF-8, which h5py reads as str (fixed-length ones come back
//    as bytes);
//  - complex numbers are the compound {r, i} of two doubles, which h5py reads as complex128.
//    The compound is committed once per file as the named datatype /complex: netCDF-C (and so
//    ncdump and xarray's netCDF4 engine) silently leaves out datasets of an anonymous compound
//    type, but reads a named one as a netCDF-4 user-defined type;
//  - a netCDF-4 reader sees a dataset's dimensions through the HDF5 dimension scales attached
//    to it; it finds a scale only in the dataset's own group or a parent group, so murk keeps
//    every group self-contained: label_dimensions() attaches scales of the dataset's own group;
//  - HDF5 never prints its error stack: failures become exceptions. Problems the user can fix
//    (missing file, existing output, wrong file content) are murk::InputError; failures of
//    HDF5 itself are std::runtime_error naming the HDF5 call and the object; misuse by the
//    calling code is std::invalid_argument / std::out_of_range.
//  - closing a file closes everything opened in it (HDF5's "strong" close), so that commit()
//    really finishes the file even while groups and datasets are still in scope; using them
//    afterwards throws, destroying them is harmless.
#include <hdf5.h>

#include <complex>
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <type_traits>
#include <utility>
#include <vector>

namespace murk {

// An HDF5 identifier that closes itself with the H5?close that matches its kind.
template <herr_t (*Close)(hid_t)>
class H5Id {
public:
    H5Id() = default;
    explicit H5Id(hid_t id) : id_(id) {}
    H5Id(H5Id&& other) noexcept : id_(std::exchange(other.id_, H5I_INVALID_HID)) {}
    H5Id& operator=(H5Id&& other) noexcept {
        if (this != &other) {
            reset();
            id_ = std::exchange(other.id_, H5I_INVALID_HID);
        }
        return *this;
    }
    H5Id(const H5Id&) = delete;
    H5Id& operator=(const H5Id&) = delete;
    ~H5Id() { reset(); }

    hid_t get() const { return id_; }
    explicit operator bool() const { return id_ >= 0; }
    hid_t release() noexcept { return std::exchange(id_, H5I_INVALID_HID); }
    // Closing can only fail for an id that is already gone (e.g. closed with its file);
    // there is nothing useful to do about that in a destructor.
    void reset() noexcept {
        if (id_ >= 0) Close(id_);
        id_ = H5I_INVALID_HID;
    }

private:
    hid_t id_ = H5I_INVALID_HID;
};

using H5FileId = H5Id<H5Fclose>;
using H5ObjectId = H5Id<H5Oclose>;  // a group or a dataset: H5Oclose closes either
using H5SpaceId = H5Id<H5Sclose>;
using H5TypeId = H5Id<H5Tclose>;
using H5AttributeId = H5Id<H5Aclose>;
using H5PropertyListId = H5Id<H5Pclose>;

// Extents of an array, slowest-varying first (C order), as HDF5 counts them.
using H5Shape = std::vector<hsize_t>;

// Element types a dataset can hold: double, std::int32_t, std::int64_t, std::uint8_t,
// std::complex<double> (and strings, through write_label_coordinate). Anything else fails to link.
template <class T>
inline constexpr bool is_h5_element =
    std::is_same_v<T, double> || std::is_same_v<T, std::int32_t> || std::is_same_v<T, std::int64_t> ||
    std::is_same_v<T, std::uint8_t> || std::is_same_v<T, std::complex<double>>;

// What a dataset holds, for readers that must decide how to read it (murk inspect).
enum class H5Kind { real, integer, complex, text, other };

// How a dataset lies on disk. Contiguous suits small arrays written once. Chunks let a
// dataset be compressed, and be read or written a slice at a time; an empty `chunk` with
// compression (or in create_filled) asks for chunks of about 256 KiB shaped like the array.
struct H5Layout {
    H5Shape chunk;       // empty: contiguous, or automatic where chunks are needed
    int gzip_level = 0;  // 0: no compression; 1 (fast) .. 9 (small)

    static H5Layout contiguous() { return {}; }
    static H5Layout compressed(int gzip_level = 4, H5Shape chunk = {}) { return {std::move(chunk), gzip_level}; }
};

// An array read back: `values` in C order, shape.size() dimensions (none for a scalar).
template <class T>
struct H5Array {
    H5Shape shape;
    std::vector<T> values;
};

// Anything that carries attributes: a group (the root included) or a dataset. Writing an
// attribute that exists replaces it, so a resumed run can update its bookkeeping.
// Copies are further handles on the same object (HDF5 counts the references), so groups and
// datasets can be passed and kept by value; the object closes with its last handle.
class H5Object {
public:
    hid_t id() const { return id_.get(); }
    std::string path() const;  // inside the file, e.g. "/mesh/body"
    std::string file_name() const;

    void set_attribute(std::string_view name, std::string_view value) const;
    void set_attribute(std::string_view name, const char* value) const { set_attribute(name, std::string_view(value)); }
    void set_attribute(std::string_view name, double value) const;
    void set_attribute(std::string_view name, const std::vector<double>& values) const;
    // Text appended to a string attribute on a new line (or set, if it is missing): a
    // resumed run adds itself to `history`.
    void append_to_attribute(std::string_view name, std::string_view line) const;
    // Removes the attribute if it is there.
    void remove_attribute(std::string_view name) const;
    // Any integer (but not bool) is stored as int64.
    template <class I, std::enable_if_t<std::is_integral_v<I> && !std::is_same_v<I, bool>, int> = 0>
    void set_attribute(std::string_view name, I value) const {
        set_int64_attribute(name, static_cast<std::int64_t>(value));
    }

    bool has_attribute(std::string_view name) const;
    // Reading a missing attribute, or one of another kind, is an InputError naming the file.
    std::string string_attribute(std::string_view name) const;  // variable or fixed length
    double double_attribute(std::string_view name) const;       // integers convert
    std::int64_t int_attribute(std::string_view name) const;
    std::vector<double> double_array_attribute(std::string_view name) const;

protected:
    explicit H5Object(H5ObjectId id) : id_(std::move(id)) {}
    // Protected, so that a group or dataset is never sliced into a bare H5Object.
    H5Object(const H5Object& other);
    H5Object& operator=(const H5Object& other);
    H5Object(H5Object&&) noexcept = default;
    H5Object& operator=(H5Object&&) noexcept = default;
    ~H5Object() = default;

private:
    void set_int64_attribute(std::string_view name, std::int64_t value) const;
    H5ObjectId id_;
};

class H5Dataset : public H5Object {
public:
    explicit H5Dataset(H5ObjectId id) : H5Object(std::move(id)) {}

    H5Shape shape() const;
    H5Kind kind() const;

    // The whole dataset. Reading into a type that cannot hold what is stored (a real into an
    // integer, int64 into int32) is an InputError rather than a silent conversion.
    template <class T>
    H5Array<T> read() const;

    // A block of `count` elements starting at `offset`, `values` in C order.
    template <class T>
    void write_slab(const H5Shape& offset, const H5Shape& count, const std::vector<T>& values) const;
    template <class T>
    void write_slab(const H5Shape& offset, const H5Shape& count, const T* values) const;
    template <class T>
    std::vector<T> read_slab(const H5Shape& offset, const H5Shape& count) const;

    // Marks this 1-D dataset as the coordinate of a dimension called `dimension_name`, so
    // that netCDF-4 readers see a named dimension. Give it the dataset's own name ("x" for
    // /sweep/x): some readers show the one, some the other.
    void make_scale(std::string_view dimension_name) const;
    // Attaches `scale` (made with make_scale, as long as that dimension) to dimension `dim`.
    void attach_scale(const H5Dataset& scale, unsigned dim) const;
    // Names every dimension, slowest first, by the coordinates (dimension scales) of those
    // names in the dataset's own group. A name with no scale there, or a scale of another
    // length, is a std::invalid_argument: the writer forgot a coordinate.
    const H5Dataset& label_dimensions(const std::vector<std::string>& names) const;

    // CF attributes that must have the dataset's own element type (CF conventions 1.8,
    // sections 2.5.1 and 3.5). `_FillValue`: the value that marks an element as missing,
    // which xarray then shows as NaN; never on complex data (xarray's netCDF4 engine cannot
    // decode a compound _FillValue), and never a value that is a real code.
    template <class T>
    const H5Dataset& set_fill_value(T value) const;
    // `flag_values` and `flag_meanings` of a coded dataset: the codes and one word per code,
    // separated by spaces.
    template <class T>
    const H5Dataset& set_flags(const std::vector<T>& values, std::string_view meanings) const;
};

class H5Group : public H5Object {
public:
    explicit H5Group(H5ObjectId id) : H5Object(std::move(id)) {}

    // Opens the group at `path` (relative, or absolute from the root), creating it and any
    // missing parents.
    H5Group group(std::string_view path) const;
    // Opens an existing group; a missing one is an InputError naming the file.
    H5Group open_group(std::string_view path) const;
    bool exists(std::string_view path) const;
    // Unlinks the group or dataset at `path` if it is there (its space is not reclaimed).
    void remove(std::string_view path) const;

    // Writes a new dataset at `path` (parents are created). `units` is a UDUNITS string
    // ("m", "S m-1", "V", "1" if dimensionless); `long_name` says what the numbers are. An
    // empty shape writes a scalar (one value, no dimensions).
    template <class T>
    H5Dataset write(std::string_view path, const std::vector<T>& values, std::string_view units,
                    std::string_view long_name, const H5Layout& layout = {}) const;
    template <class T>
    H5Dataset write(std::string_view path, const std::vector<T>& values, const H5Shape& shape,
                    std::string_view units, std::string_view long_name, const H5Layout& layout = {}) const;
    template <class T>
    H5Dataset write(std::string_view path, const T* values, const H5Shape& shape, std::string_view units,
                    std::string_view long_name, const H5Layout& layout = {}) const;

    // A chunked dataset of fixed `shape` whose elements read as `fill` until written: a sweep
    // fills it a slab at a time and points never computed keep the fill. Without `fill`:
    // NaN for real and complex numbers, 0 for integers. Real datasets also get _FillValue NaN,
    // and integer ones _FillValue `fill` when it is given (a sentinel such as -1), so that
    // netCDF readers show unwritten elements as missing; an integer 0 is a real value and
    // complex data cannot carry _FillValue (see set_fill_value).
    // The size is fixed, not extendible: nothing grows these datasets, and a fixed maximum
    // keeps a dataset and the fixed-length coordinates of its dimensions from ever disagreeing.
    // (Measured with netCDF-C 4.9 and h5netcdf 1.1: an unlimited maximum under fixed-length
    // coordinates reads the same, as fixed dimensions, so the readers did not force this.)
    template <class T>
    H5Dataset create_filled(std::string_view path, const H5Shape& shape, std::string_view units,
                            std::string_view long_name, const H5Layout& layout = {},
                            std::optional<T> fill = std::nullopt) const;

    // A coordinate: the 1-D dataset `name` made the dimension scale of dimension `name`.
    template <class T>
    H5Dataset write_coordinate(std::string_view name, const std::vector<T>& values, std::string_view units,
                               std::string_view long_name) const;
    // A coordinate of text labels ("x", "y", "z"; electrode names), variable-length UTF-8. It
    // has a long_name but no units: labels are not quantities.
    H5Dataset write_label_coordinate(std::string_view name, const std::vector<std::string>& labels,
                                     std::string_view long_name) const;

    // Opens an existing dataset; a missing one is an InputError naming the file.
    H5Dataset dataset(std::string_view path) const;
    template <class T>
    H5Array<T> read(std::string_view path) const { return dataset(path).read<T>(); }
};

// An HDF5 file. Groups and datasets opened in it are closed with it (see the top of this file).
class H5File {
public:
    // A new file; an existing one at `path`, or a directory that is missing, is an InputError.
    static H5File create(const std::string& path);
    static H5File open_readwrite(const std::string& path);
    static H5File open_readonly(const std::string& path);

    H5File(H5File&&) noexcept = default;
    H5File& operator=(H5File&&) noexcept = default;
    ~H5File() = default;  // closes quietly; call close() to hear about failures

    const std::string& path() const { return path_; }
    H5Group root() const;

    // Pushes everything written so far to the operating system, so that a run killed later
    // leaves a file that opens and can be resumed.
    void flush();
    void close();
    bool is_open() const { return static_cast<bool>(id_); }

private:
    H5File(H5FileId id, std::string path) : id_(std::move(id)), path_(std::move(path)) {}
    H5FileId id_;
    std::string path_;
};

// A result file that appears under its name only when complete. Everything is written to a
// temporary file in the same directory; commit() closes it, syncs it to disk and renames it
// onto `path`. Destroyed without commit() (an exception, a failed run), it removes the
// temporary file; a process that is killed may leave it, and the next run replaces it.
class H5Output {
public:
    // Without `overwrite`, an existing `path` is an InputError "<path> exists; <hint>".
    // The file is written under `temp` (default: partial_path(path)); one left there by a
    // run that died is replaced.
    H5Output(const std::string& path, bool overwrite, std::string_view exists_hint = {}, const std::string& temp = {});
    static std::string partial_path(const std::string& path) { return path + ".partial"; }
    // The same, starting from a copy of the file `source` (murk merge builds a result on one
    // of its parts).
    static H5Output copy_of(const std::string& source, const std::string& path, bool overwrite,
                            std::string_view exists_hint, const std::string& temp);

    H5Output(H5Output&& other) noexcept;
    H5Output& operator=(H5Output&&) = delete;
    H5Output(const H5Output&) = delete;
    ~H5Output();

    H5File& file();
    H5Group root() { return file().root(); }
    const std::string& path() const { return path_; }

    // If `path` appeared meanwhile and overwrite is off, throws InputError and keeps the
    // partial file, so the work is not lost. `once_named` (if any) runs the moment the
    // result has its name, before anything else: what it discards (a run's journal)
    // is then left beside a finished result only if the process dies in between.
    void commit(const std::function<void()>& once_named = {});

private:
    H5Output(std::string path, bool overwrite, std::string exists_hint, std::string temp, H5File file);
    std::string path_;
    std::string temp_;  // where the file is written until commit()
    bool overwrite_;
    std::string exists_hint_;
    H5File file_;
    bool done_ = false;  // committed, or handed over: the partial file is not ours to remove
};

}  // namespace murk
