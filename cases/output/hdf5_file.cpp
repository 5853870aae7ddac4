#include "cases/output/hdf5_file.hpp"

#include "geometry/input_error.hpp"

#include <hdf5_hl.h>

#include <fcntl.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <filesystem>
#include <limits>
#include <memory>
#include <stdexcept>

namespace murk {
namespace {

namespace fs = std::filesystem;

// HDF5 prints its whole error stack on stderr for every failure, including the ones we expect
// and turn into one clear message. Switched off once, before any other HDF5 call of ours.
void silence_hdf5() {
    static const bool silenced = [] {
        // No clean-up at exit by HDF5 itself: after a failed close (a full disk) it tries to
        // flush the file again while the process ends, and crashes. murk closes every file
        // it finishes explicitly, so there is nothing left for that clean-up to do.
        H5dont_atexit();
        H5Eset_auto2(H5E_DEFAULT, nullptr, nullptr);
        return true;
    }();
    (void)silenced;
}

// The most specific description on HDF5's error stack ("name already exists", "unable to
// lock file, errno = 11, ..."): the part of a failure that says why. Must be read before any
// other HDF5 call, which would clear the stack.
std::string hdf5_reason() {
    std::string reason;
    H5Ewalk2(
        H5E_DEFAULT, H5E_WALK_UPWARD,
        [](unsigned n, const H5E_error2_t* error, void* out) -> herr_t {
            if (n == 0 && error->desc) *static_cast<std::string*>(out) = error->desc;
            return 0;
        },
        &reason);
    H5Eclear2(H5E_DEFAULT);
    if (reason.empty()) return "no reason given by HDF5";
    // A failed write of the operating system carries its own words ("..., errno = 28, error
    // message = 'No space left on device', ..."): those say why, in one line.
    const std::string key = "error message = '";
    const std::size_t at = reason.find(key);
    if (at != std::string::npos) {
        const std::size_t end = reason.find('\'', at + key.size());
        const std::string system = reason.substr(at + key.size(), end == std::string::npos ? std::string::npos : end - at - key.size());
        const bool full = system.find("No space left") != std::string::npos || system.find("too large") != std::string::npos ||
                          system.find("quota") != std::string::npos;
        return (full ? "the disk is full or a file-size limit was reached (" : "the system refused a write (") + system + ")";
    }
    for (char& c : reason)
        if (c == '\n' || c == '\r') c = ' ';
    return reason;
}

std::string object_path(hid_t id) {
    const ssize_t n = H5Iget_name(id, nullptr, 0);
    if (n < 0) return "?";
    std::string name(static_cast<std::size_t>(n) + 1, '\0');
    H5Iget_name(id, name.data(), name.size());
    name.resize(static_cast<std::size_t>(n));
    return name;
}

std::string object_file(hid_t id) {
    const ssize_t n = H5Fget_name(id, nullptr, 0);
    if (n < 0) return "?";
    std::string name(static_cast<std::size_t>(n) + 1, '\0');
    H5Fget_name(id, name.data(), name.size());
    name.resize(static_cast<std::size_t>(n));
    return name;
}

// "/mesh/body", or with a child name "/mesh/body/vertices".
std::string inside(hid_t id, std::string_view child = {}) {
    std::string path = object_path(id);
    if (child.empty()) return path;
    if (child.front() == '/') return std::string(child);
    return path + (path == "/" ? "" : "/") + std::string(child);
}

// "out.h5:/mesh/body/vertices"
std::string where(hid_t id, std::string_view child = {}) { return object_file(id) + ":" + inside(id, child); }

[[noreturn]] void fail(const char* call, hid_t id, std::string_view child = {}, std::string_view what = {}) {
    const std::string reason = hdf5_reason();  // first: where() makes HDF5 calls
    std::string message = std::string(call) + " failed on " + where(id, child);
    if (!what.empty()) message += " (" + std::string(what) + ")";
    throw std::runtime_error(message + ": " + reason);
}

template <class R>
R checked(R result, const char* call, hid_t id, std::string_view child = {}, std::string_view what = {}) {
    if (result < 0) fail(call, id, child, what);
    return result;
}

[[noreturn]] void fail_file(const char* call, const std::string& path) {
    throw std::runtime_error(std::string(call) + " failed on " + path + ": " + hdf5_reason());
}

H5TypeId copy_type(hid_t predefined) {
    H5TypeId type(H5Tcopy(predefined));
    if (!type) fail_file("H5Tcopy", "(predefined type)");
    return type;
}

// std::complex<double> is laid out as double[2] ([complex.numbers]); HDF5 has no complex type,
// and {r, i} is the compound h5py and numpy read as complex128.
H5TypeId complex_type(hid_t part) {
    H5TypeId type(H5Tcreate(H5T_COMPOUND, 2 * sizeof(double)));
    if (!type || H5Tinsert(type.get(), "r", 0, part) < 0 || H5Tinsert(type.get(), "i", sizeof(double), part) < 0)
        fail_file("H5Tcreate", "(complex type)");
    return type;
}

H5TypeId utf8_string_type() {
    H5TypeId type = copy_type(H5T_C_S1);
    if (H5Tset_size(type.get(), H5T_VARIABLE) < 0 || H5Tset_cset(type.get(), H5T_CSET_UTF8) < 0)
        fail_file("H5Tset_size", "(string type)");
    return type;
}

// The name of the committed complex type, at the root of every file that holds complex data.
constexpr const char* kComplexTypeName = "complex";

// The file's named complex type (see the header for why it is named), committed at the root
// the first time a complex dataset is created. `id` is any object of the file.
H5TypeId committed_complex_type(hid_t id) {
    const H5ObjectId root(checked(H5Gopen2(id, "/", H5P_DEFAULT), "H5Gopen2", id, "/"));
    if (checked(H5Lexists(root.get(), kComplexTypeName, H5P_DEFAULT), "H5Lexists", root.get(), kComplexTypeName) > 0) {
        H5TypeId type(checked(H5Topen2(root.get(), kComplexTypeName, H5P_DEFAULT), "H5Topen2", root.get(),
                              kComplexTypeName));
        if (H5Tget_class(type.get()) != H5T_COMPOUND || H5Tget_size(type.get()) != 2 * sizeof(double) ||
            H5Tget_member_index(type.get(), "r") != 0 || H5Tget_member_index(type.get(), "i") != 1)
            throw InputError(object_file(id) + ": /" + kComplexTypeName +
                             " is not the complex type {r, i} of two doubles that murk writes");
        return type;
    }
    H5TypeId type = complex_type(H5T_IEEE_F64LE);
    checked(H5Tcommit2(root.get(), kComplexTypeName, type.get(), H5P_DEFAULT, H5P_DEFAULT, H5P_DEFAULT), "H5Tcommit2",
            root.get(), kComplexTypeName);
    return type;
}

// Per element type: the type in memory, the type in the file (fixed little-endian so files
// are alike on every machine), and the value of elements never written.
template <class T>
struct Element;

template <>
struct Element<double> {
    static constexpr const char* name = "double";
    static constexpr H5Kind kind = H5Kind::real;
    static H5TypeId memory() { return copy_type(H5T_NATIVE_DOUBLE); }
    static H5TypeId file() { return copy_type(H5T_IEEE_F64LE); }
    static double fill() { return std::numeric_limits<double>::quiet_NaN(); }
};
template <>
struct Element<std::complex<double>> {
    static constexpr const char* name = "complex<double>";
    static constexpr H5Kind kind = H5Kind::complex;
    static H5TypeId memory() { return complex_type(H5T_NATIVE_DOUBLE); }
    static H5TypeId file() { return complex_type(H5T_IEEE_F64LE); }
    static std::complex<double> fill() {
        const double nan = std::numeric_limits<double>::quiet_NaN();
        return {nan, nan};
    }
};
template <>
struct Element<std::int32_t> {
    static constexpr const char* name = "int32";
    static constexpr H5Kind kind = H5Kind::integer;
    static H5TypeId memory() { return copy_type(H5T_NATIVE_INT32); }
    static H5TypeId file() { return copy_type(H5T_STD_I32LE); }
    static std::int32_t fill() { return 0; }
};
template <>
struct Element<std::int64_t> {
    static constexpr const char* name = "int64";
    static constexpr H5Kind kind = H5Kind::integer;
    static H5TypeId memory() { return copy_type(H5T_NATIVE_INT64); }
    static H5TypeId file() { return copy_type(H5T_STD_I64LE); }
    static std::int64_t fill() { return 0; }
};
template <>
struct Element<std::uint8_t> {
    static constexpr const char* name = "uint8";
    static constexpr H5Kind kind = H5Kind::integer;
    static H5TypeId memory() { return copy_type(H5T_NATIVE_UINT8); }
    static H5TypeId file() { return copy_type(H5T_STD_U8LE); }
    static std::uint8_t fill() { return 0; }
};

H5Kind kind_of(hid_t type) {
    switch (H5Tget_class(type)) {
    case H5T_FLOAT: return H5Kind::real;
    case H5T_INTEGER: return H5Kind::integer;
    case H5T_STRING: return H5Kind::text;
    case H5T_COMPOUND: {
        if (H5Tget_nmembers(type) != 2) return H5Kind::other;
        const int r = H5Tget_member_index(type, "r");
        const int i = H5Tget_member_index(type, "i");
        if (r < 0 || i < 0) return H5Kind::other;
        const bool real_parts = H5Tget_member_class(type, static_cast<unsigned>(r)) == H5T_FLOAT &&
                                H5Tget_member_class(type, static_cast<unsigned>(i)) == H5T_FLOAT;
        return real_parts ? H5Kind::complex : H5Kind::other;
    }
    default: return H5Kind::other;
    }
}

std::string describe_type(hid_t type) {
    const std::string bits = std::to_string(8 * H5Tget_size(type)) + "-bit ";
    switch (kind_of(type)) {
    case H5Kind::real: return bits + "reals";
    case H5Kind::integer: return bits + (H5Tget_sign(type) == H5T_SGN_2 ? "signed" : "unsigned") + " integers";
    case H5Kind::complex: return "complex numbers";
    case H5Kind::text: return "strings";
    default: return "values of an unsupported type";
    }
}

// Whether every value of integer type "from" is a value of integer type "to": HDF5 would
// otherwise clip out-of-range integers without a word.
bool integer_range_fits(bool from_signed, std::size_t from_size, bool to_signed, std::size_t to_size) {
    if (from_signed) return to_signed && from_size <= to_size;
    return to_signed ? from_size < to_size : from_size <= to_size;
}

// Whether values stored as `file_type` can be read into T without loss (read) or values of T
// stored into `file_type` without loss (!read).
template <class T>
bool convertible(hid_t file_type, bool read) {
    if (kind_of(file_type) != Element<T>::kind) return false;
    if constexpr (std::is_integral_v<T>) {
        const bool file_signed = H5Tget_sign(file_type) == H5T_SGN_2;
        const std::size_t file_size = H5Tget_size(file_type);
        return read ? integer_range_fits(file_signed, file_size, std::is_signed_v<T>, sizeof(T))
                    : integer_range_fits(std::is_signed_v<T>, sizeof(T), file_signed, file_size);
    } else if constexpr (std::is_same_v<T, double>) {
        return read || H5Tget_size(file_type) >= sizeof(double);
    } else {
        return true;
    }
}

hsize_t element_count(const H5Shape& shape) {
    hsize_t n = 1;
    for (hsize_t d : shape) n *= d;
    return n;
}

// The number of values a read of `shape` holds, refused (as damaged input) when the
// shape's product overflows or the values would not fit in this machine's memory:
// the shape comes from the file, and a damaged or hostile file can claim anything.
std::size_t readable_count(const H5Shape& shape, std::size_t element_size, const std::string& what) {
    hsize_t n = 1;
    bool overflow = false;
    for (hsize_t d : shape) overflow = overflow || __builtin_mul_overflow(n, d, &n);
    const double memory = double(sysconf(_SC_PHYS_PAGES)) * double(sysconf(_SC_PAGESIZE));
    if (overflow || double(n) * double(element_size) > memory)
        throw InputError(what + " claims more values than this machine's memory holds; the file is damaged or not "
                                "one of murk's");
    return static_cast<std::size_t>(n);
}

std::string shape_text(const H5Shape& shape) {
    std::string text = "(";
    for (std::size_t k = 0; k < shape.size(); ++k) text += (k ? ", " : "") + std::to_string(shape[k]);
    return text + ")";
}

// Chunks of about 256 KiB: large enough that gzip has material and per-chunk overhead stays
// small, small enough to sit many times in HDF5's default 1 MiB chunk cache when a sweep
// writes one point at a time. Halving the longest side keeps the chunk shaped like the array.
H5Shape automatic_chunk(const H5Shape& shape, std::size_t element_size) {
    H5Shape chunk;
    for (hsize_t d : shape) chunk.push_back(std::max<hsize_t>(d, 1));
    const hsize_t target = std::max<hsize_t>(1, 256 * 1024 / element_size);
    while (element_count(chunk) > target) {
        hsize_t& longest = *std::max_element(chunk.begin(), chunk.end());
        longest = (longest + 1) / 2;
    }
    return chunk;
}

// Splits "a/b/c" into its non-empty components.
std::vector<std::string> components(std::string_view path) {
    std::vector<std::string> parts;
    std::size_t start = 0;
    while (start <= path.size()) {
        std::size_t end = path.find('/', start);
        if (end == std::string_view::npos) end = path.size();
        if (end > start && path.substr(start, end - start) != ".")
            parts.emplace_back(path.substr(start, end - start));
        start = end + 1;
    }
    return parts;
}

// A fresh handle on the starting point of `path` seen from `id`: the root if the path is
// absolute, otherwise `id` itself.
H5ObjectId start_of(hid_t id, std::string_view path) {
    const char* name = !path.empty() && path.front() == '/' ? "/" : ".";
    return H5ObjectId(checked(H5Oopen(id, name, H5P_DEFAULT), "H5Oopen", id, name));
}

// Creation properties that keep the order in which things were written, so that readers
// (h5py, murk inspect) list them in that order rather than alphabetically; netCDF-4 also
// expects link order to be tracked before it will add to a file.
H5PropertyListId group_creation_properties(hid_t plist_class) {
    H5PropertyListId plist(H5Pcreate(plist_class));
    const unsigned order = H5P_CRT_ORDER_TRACKED | H5P_CRT_ORDER_INDEXED;
    if (!plist || H5Pset_link_creation_order(plist.get(), order) < 0 || H5Pset_attr_creation_order(plist.get(), order) < 0)
        fail_file("H5Pset_link_creation_order", "(group properties)");
    return plist;
}

H5AttributeId open_attribute(hid_t id, std::string_view name) {
    const std::string n(name);
    if (checked(H5Aexists(id, n.c_str()), "H5Aexists", id, {}, "attribute " + n) == 0)
        throw InputError(object_file(id) + ": " + object_path(id) + " has no attribute '" + n + "'");
    return H5AttributeId(checked(H5Aopen(id, n.c_str(), H5P_DEFAULT), "H5Aopen", id, {}, "attribute " + n));
}

void write_attribute(hid_t id, std::string_view name, hid_t file_type, hid_t memory_type, hid_t space,
                     const void* data) {
    const std::string n(name);
    const std::string what = "attribute " + n;
    if (checked(H5Aexists(id, n.c_str()), "H5Aexists", id, {}, what) > 0)
        checked(H5Adelete(id, n.c_str()), "H5Adelete", id, {}, what);
    H5AttributeId attribute(checked(H5Acreate2(id, n.c_str(), file_type, space, H5P_DEFAULT, H5P_DEFAULT),
                                    "H5Acreate2", id, {}, what));
    checked(H5Awrite(attribute.get(), memory_type, data), "H5Awrite", id, {}, what);
}

H5SpaceId scalar_space() {
    H5SpaceId space(H5Screate(H5S_SCALAR));
    if (!space) fail_file("H5Screate", "(scalar space)");
    return space;
}

H5SpaceId simple_space(const H5Shape& shape) {
    H5SpaceId space(H5Screate_simple(static_cast<int>(shape.size()), shape.data(), nullptr));
    if (!space) fail_file("H5Screate_simple", shape_text(shape));
    return space;
}

// The dataspace of a dataset: scalar for an empty shape (a netCDF scalar variable).
H5SpaceId dataset_space(const H5Shape& shape) { return shape.empty() ? scalar_space() : simple_space(shape); }

// Reads a numeric attribute as doubles (or int64 when memory_type says so), after checking
// that it holds numbers of an acceptable kind.
template <class T>
std::vector<T> read_numbers(hid_t id, std::string_view name, hid_t memory_type, bool allow_integer,
                            bool allow_real, const char* expected) {
    H5AttributeId attribute = open_attribute(id, name);
    const std::string what = "attribute " + std::string(name);
    H5TypeId type(checked(H5Aget_type(attribute.get()), "H5Aget_type", id, {}, what));
    const H5Kind kind = kind_of(type.get());
    if (!((kind == H5Kind::integer && allow_integer) || (kind == H5Kind::real && allow_real)))
        throw InputError(object_file(id) + ": attribute '" + std::string(name) + "' of " + object_path(id) +
                         " holds " + describe_type(type.get()) + ", expected " + expected);
    H5SpaceId space(checked(H5Aget_space(attribute.get()), "H5Aget_space", id, {}, what));
    const hssize_t n = checked(H5Sget_simple_extent_npoints(space.get()), "H5Sget_simple_extent_npoints", id, {}, what);
    std::vector<T> values(static_cast<std::size_t>(n));
    if (n > 0) checked(H5Aread(attribute.get(), memory_type, values.data()), "H5Aread", id, {}, what);
    return values;
}

template <class T>
T single(std::vector<T> values, hid_t id, std::string_view name) {
    if (values.size() != 1)
        throw InputError(object_file(id) + ": attribute '" + std::string(name) + "' of " + object_path(id) + " holds " +
                         std::to_string(values.size()) + " values, expected one");
    return values.front();
}

void sync_to_disk(const std::string& path) {
    const int fd = ::open(path.c_str(), O_RDONLY);
    if (fd < 0 || ::fsync(fd) != 0) {
        const std::string error = std::strerror(errno);
        if (fd >= 0) ::close(fd);
        throw std::runtime_error("fsync failed on " + path + ": " + error);
    }
    ::close(fd);
}

// A missing directory is the user's to fix; say so before HDF5 says something vaguer.
void check_directory_of(const std::string& path) {
    const fs::path directory = fs::path(path).parent_path();
    std::error_code error;
    if (!directory.empty() && !fs::is_directory(directory, error))
        throw InputError(path + ": directory " + directory.string() + " does not exist");
}

H5PropertyListId file_access_properties() {
    H5PropertyListId fapl(H5Pcreate(H5P_FILE_ACCESS));
    // Closing a file closes everything opened in it, so that closing really ends the file
    // (HDF5's default keeps it open while any group or dataset handle lives).
    if (!fapl || H5Pset_fclose_degree(fapl.get(), H5F_CLOSE_STRONG) < 0)
        fail_file("H5Pset_fclose_degree", "(file access properties)");
    return fapl;
}

std::string exists_message(const std::string& path, std::string_view hint) {
    return path + " exists" + (hint.empty() ? "" : "; " + std::string(hint));
}

}  // namespace

// ---- H5Object ------------------------------------------------------------------------------

namespace {

// Another reference to the same open object; an id that is already closed stays closed.
hid_t share(hid_t id) { return id >= 0 && H5Iinc_ref(id) >= 0 ? id : H5I_INVALID_HID; }

}  // namespace

H5Object::H5Object(const H5Object& other) : id_(share(other.id())) {}

H5Object& H5Object::operator=(const H5Object& other) {
    if (this != &other) id_ = H5ObjectId(share(other.id()));
    return *this;
}

std::string H5Object::path() const { return object_path(id()); }
std::string H5Object::file_name() const { return object_file(id()); }

void H5Object::set_attribute(std::string_view name, std::string_view value) const {
    const H5TypeId type = utf8_string_type();
    const H5SpaceId space = scalar_space();
    const std::string text(value);
    const char* pointer = text.c_str();
    write_attribute(id(), name, type.get(), type.get(), space.get(), &pointer);
}

void H5Object::set_attribute(std::string_view name, double value) const {
    const H5SpaceId space = scalar_space();
    write_attribute(id(), name, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, space.get(), &value);
}

void H5Object::set_int64_attribute(std::string_view name, std::int64_t value) const {
    const H5SpaceId space = scalar_space();
    write_attribute(id(), name, H5T_STD_I64LE, H5T_NATIVE_INT64, space.get(), &value);
}

void H5Object::set_attribute(std::string_view name, const std::vector<double>& values) const {
    const H5SpaceId space = simple_space({values.size()});
    write_attribute(id(), name, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, space.get(), values.data());
}

void H5Object::append_to_attribute(std::string_view name, std::string_view line) const {
    if (!has_attribute(name)) return set_attribute(name, line);
    set_attribute(name, string_attribute(name) + "\n" + std::string(line));
}

void H5Object::remove_attribute(std::string_view name) const {
    if (!has_attribute(name)) return;
    const std::string n(name);
    checked(H5Adelete(id(), n.c_str()), "H5Adelete", id(), {}, "attribute " + n);
}

bool H5Object::has_attribute(std::string_view name) const {
    const std::string n(name);
    return checked(H5Aexists(id(), n.c_str()), "H5Aexists", id(), {}, "attribute " + n) > 0;
}

std::string H5Object::string_attribute(std::string_view name) const {
    H5AttributeId attribute = open_attribute(id(), name);
    const std::string what = "attribute " + std::string(name);
    H5TypeId type(checked(H5Aget_type(attribute.get()), "H5Aget_type", id(), {}, what));
    if (kind_of(type.get()) != H5Kind::text)
        throw InputError(file_name() + ": attribute '" + std::string(name) + "' of " + path() + " holds " +
                         describe_type(type.get()) + ", expected a string");
    H5SpaceId space(checked(H5Aget_space(attribute.get()), "H5Aget_space", id(), {}, what));
    if (H5Sget_simple_extent_npoints(space.get()) != 1)
        throw InputError(file_name() + ": attribute '" + std::string(name) + "' of " + path() +
                         " holds several strings, expected one");

    if (checked(H5Tis_variable_str(type.get()), "H5Tis_variable_str", id(), {}, what) > 0) {
        H5TypeId memory = utf8_string_type();
        checked(H5Tset_cset(memory.get(), H5Tget_cset(type.get())), "H5Tset_cset", id(), {}, what);
        char* raw = nullptr;
        checked(H5Aread(attribute.get(), memory.get(), &raw), "H5Aread", id(), {}, what);
        const std::unique_ptr<char, herr_t (*)(void*)> owned(raw, H5free_memory);
        return raw ? std::string(raw) : std::string();
    }
    // Fixed length, as other tools (and H5DS for its NAME attribute) write them.
    H5TypeId memory(checked(H5Tcopy(type.get()), "H5Tcopy", id(), {}, what));
    std::string text(H5Tget_size(type.get()), '\0');
    checked(H5Aread(attribute.get(), memory.get(), text.data()), "H5Aread", id(), {}, what);
    if (H5Tget_strpad(type.get()) == H5T_STR_SPACEPAD) {
        text.erase(text.find_last_not_of(' ') + 1);
    } else {
        const std::size_t end = text.find('\0');
        if (end != std::string::npos) text.resize(end);
    }
    return text;
}

double H5Object::double_attribute(std::string_view name) const {
    return single(read_numbers<double>(id(), name, H5T_NATIVE_DOUBLE, true, true, "a number"), id(), name);
}

std::int64_t H5Object::int_attribute(std::string_view name) const {
    return single(read_numbers<std::int64_t>(id(), name, H5T_NATIVE_INT64, true, false, "an integer"), id(), name);
}

std::vector<double> H5Object::double_array_attribute(std::string_view name) const {
    return read_numbers<double>(id(), name, H5T_NATIVE_DOUBLE, true, true, "numbers");
}

// ---- H5Dataset ------------------------------------------------------------------------------

H5Shape H5Dataset::shape() const {
    H5SpaceId space(checked(H5Dget_space(id()), "H5Dget_space", id()));
    const int rank = checked(H5Sget_simple_extent_ndims(space.get()), "H5Sget_simple_extent_ndims", id());
    H5Shape dims(static_cast<std::size_t>(rank));
    checked(H5Sget_simple_extent_dims(space.get(), dims.data(), nullptr), "H5Sget_simple_extent_dims", id());
    return dims;
}

H5Kind H5Dataset::kind() const {
    H5TypeId type(checked(H5Dget_type(id()), "H5Dget_type", id()));
    return kind_of(type.get());
}

template <class T>
H5Array<T> H5Dataset::read() const {
    H5TypeId type(checked(H5Dget_type(id()), "H5Dget_type", id()));
    if (!convertible<T>(type.get(), true))
        throw InputError(file_name() + ": dataset " + path() + " holds " + describe_type(type.get()) +
                         ", which cannot be read as " + Element<T>::name);
    H5Array<T> array{shape(), {}};
    array.values.resize(readable_count(array.shape, sizeof(T), file_name() + ": dataset " + path()));
    if (!array.values.empty()) {
        const H5TypeId memory = Element<T>::memory();
        checked(H5Dread(id(), memory.get(), H5S_ALL, H5S_ALL, H5P_DEFAULT, array.values.data()), "H5Dread", id());
    }
    return array;
}

namespace {

// The file-side selection for a slab, after checking it lies inside the dataset: HDF5's own
// complaint ("selection + offset not within extent") does not say which numbers were wrong.
H5SpaceId slab_selection(const H5Dataset& dataset, const H5Shape& offset, const H5Shape& count) {
    const H5Shape shape = dataset.shape();
    bool inside = offset.size() == shape.size() && count.size() == shape.size();
    for (std::size_t k = 0; inside && k < shape.size(); ++k) inside = count[k] <= shape[k] && offset[k] <= shape[k] - count[k];
    if (!inside)
        throw std::out_of_range("slab at " + shape_text(offset) + " of " + shape_text(count) + " lies outside " +
                                dataset.file_name() + ":" + dataset.path() + " of shape " + shape_text(shape));
    H5SpaceId space(checked(H5Dget_space(dataset.id()), "H5Dget_space", dataset.id()));
    checked(H5Sselect_hyperslab(space.get(), H5S_SELECT_SET, offset.data(), nullptr, count.data(), nullptr),
            "H5Sselect_hyperslab", dataset.id());
    return space;
}

}  // namespace

template <class T>
void H5Dataset::write_slab(const H5Shape& offset, const H5Shape& count, const T* values) const {
    H5TypeId type(checked(H5Dget_type(id()), "H5Dget_type", id()));
    if (!convertible<T>(type.get(), false))
        throw std::invalid_argument("cannot write " + std::string(Element<T>::name) + " into " + file_name() + ":" +
                                    path() + ", which holds " + describe_type(type.get()));
    const H5SpaceId file_space = slab_selection(*this, offset, count);
    if (element_count(count) == 0) return;
    const H5SpaceId memory_space = simple_space(count);
    const H5TypeId memory = Element<T>::memory();
    checked(H5Dwrite(id(), memory.get(), memory_space.get(), file_space.get(), H5P_DEFAULT, values), "H5Dwrite", id());
}

template <class T>
void H5Dataset::write_slab(const H5Shape& offset, const H5Shape& count, const std::vector<T>& values) const {
    if (values.size() != element_count(count))
        throw std::invalid_argument("slab of " + shape_text(count) + " for " + path() + " needs " +
                                    std::to_string(element_count(count)) + " values, got " +
                                    std::to_string(values.size()));
    write_slab(offset, count, values.data());
}

template <class T>
std::vector<T> H5Dataset::read_slab(const H5Shape& offset, const H5Shape& count) const {
    H5TypeId type(checked(H5Dget_type(id()), "H5Dget_type", id()));
    if (!convertible<T>(type.get(), true))
        throw InputError(file_name() + ": dataset " + path() + " holds " + describe_type(type.get()) +
                         ", which cannot be read as " + Element<T>::name);
    const H5SpaceId file_space = slab_selection(*this, offset, count);
    std::vector<T> values(readable_count(count, sizeof(T), file_name() + ": dataset " + path()));
    if (values.empty()) return values;
    const H5SpaceId memory_space = simple_space(count);
    const H5TypeId memory = Element<T>::memory();
    checked(H5Dread(id(), memory.get(), memory_space.get(), file_space.get(), H5P_DEFAULT, values.data()), "H5Dread",
            id());
    return values;
}

void H5Dataset::make_scale(std::string_view dimension_name) const {
    if (shape().size() != 1) throw std::invalid_argument("dimension scale " + path() + " must be one-dimensional");
    const std::string name(dimension_name);
    checked(H5DSset_scale(id(), name.c_str()), "H5DSset_scale", id());
}

void H5Dataset::attach_scale(const H5Dataset& scale, unsigned dim) const {
    const H5Shape dims = shape();
    if (dim >= dims.size())
        throw std::invalid_argument(path() + " has no dimension " + std::to_string(dim) + " to attach " + scale.path() + " to");
    if (checked(H5DSis_scale(scale.id()), "H5DSis_scale", scale.id()) <= 0)
        throw std::invalid_argument(scale.path() + " is not a dimension scale; call make_scale first");
    const H5Shape scale_dims = scale.shape();
    if (scale_dims.size() != 1 || scale_dims[0] != dims[dim])
        throw std::invalid_argument("scale " + scale.path() + " of shape " + shape_text(scale_dims) +
                                    " does not fit dimension " + std::to_string(dim) + " of " + path() + " " +
                                    shape_text(dims));
    checked(H5DSattach_scale(id(), scale.id(), dim), "H5DSattach_scale", id(), {}, "scale " + scale.path());
}

const H5Dataset& H5Dataset::label_dimensions(const std::vector<std::string>& names) const {
    if (names.size() != shape().size())
        throw std::invalid_argument(path() + " has " + std::to_string(shape().size()) + " dimensions, " +
                                    std::to_string(names.size()) + " names given");
    const std::string own = path();
    const std::string parent = own.substr(0, std::max<std::size_t>(own.rfind('/'), 1));  // "/sweep/status" -> "/sweep"
    const H5ObjectId group(checked(H5Oopen(id(), parent.c_str(), H5P_DEFAULT), "H5Oopen", id(), parent));
    for (std::size_t k = 0; k < names.size(); ++k) {
        if (checked(H5Lexists(group.get(), names[k].c_str(), H5P_DEFAULT), "H5Lexists", group.get(), names[k]) <= 0)
            throw std::invalid_argument(path() + ": no coordinate '" + names[k] + "' in its group to name dimension " +
                                        std::to_string(k));
        const H5Dataset scale(H5ObjectId(checked(H5Oopen(group.get(), names[k].c_str(), H5P_DEFAULT), "H5Oopen",
                                                 group.get(), names[k])));
        attach_scale(scale, static_cast<unsigned>(k));
    }
    return *this;
}

namespace {

// An attribute holding `values` in the element type of `dataset` (what CF asks of _FillValue
// and flag_values).
template <class T>
void set_attribute_in_data_type(const H5Dataset& dataset, std::string_view name, const std::vector<T>& values) {
    static_assert(!std::is_same_v<T, std::complex<double>>, "complex attributes are not written");
    const H5TypeId type(checked(H5Dget_type(dataset.id()), "H5Dget_type", dataset.id()));
    if (!convertible<T>(type.get(), false))
        throw std::invalid_argument(dataset.path() + " holds " + describe_type(type.get()) + ": attribute " +
                                    std::string(name) + " of " + Element<T>::name + " would not have its type");
    const H5SpaceId space = simple_space({values.size()});
    const H5TypeId memory = Element<T>::memory();
    write_attribute(dataset.id(), name, type.get(), memory.get(), space.get(), values.data());
}

}  // namespace

template <class T>
const H5Dataset& H5Dataset::set_fill_value(T value) const {
    set_attribute_in_data_type(*this, "_FillValue", std::vector<T>{value});
    return *this;
}

template <class T>
const H5Dataset& H5Dataset::set_flags(const std::vector<T>& values, std::string_view meanings) const {
    std::size_t words = 0;
    for (std::size_t k = 0; k < meanings.size(); ++k)
        words += meanings[k] != ' ' && (k == 0 || meanings[k - 1] == ' ');
    if (values.empty() || words != values.size())
        throw std::invalid_argument(path() + ": " + std::to_string(values.size()) + " flag values for the " +
                                    std::to_string(words) + " words of '" + std::string(meanings) + "'");
    set_attribute_in_data_type(*this, "flag_values", values);
    set_attribute("flag_meanings", meanings);
    return *this;
}

// ---- H5Group --------------------------------------------------------------------------------

H5Group H5Group::group(std::string_view path) const {
    H5ObjectId current = start_of(id(), path);
    for (const std::string& part : components(path)) {
        const hid_t here = current.get();
        if (checked(H5Lexists(here, part.c_str(), H5P_DEFAULT), "H5Lexists", here, part) > 0) {
            current = H5ObjectId(checked(H5Gopen2(here, part.c_str(), H5P_DEFAULT), "H5Gopen2", here, part));
        } else {
            const H5PropertyListId gcpl = group_creation_properties(H5P_GROUP_CREATE);
            current = H5ObjectId(checked(H5Gcreate2(here, part.c_str(), H5P_DEFAULT, gcpl.get(), H5P_DEFAULT),
                                         "H5Gcreate2", here, part));
        }
    }
    return H5Group(std::move(current));
}

void H5Group::remove(std::string_view path) const {
    if (!exists(path)) return;
    const std::string p(path);
    checked(H5Ldelete(id(), p.c_str(), H5P_DEFAULT), "H5Ldelete", id(), p);
}

bool H5Group::exists(std::string_view path) const {
    H5ObjectId current = start_of(id(), path);
    for (const std::string& part : components(path)) {
        const hid_t here = current.get();
        if (H5Iget_type(here) != H5I_GROUP) return false;
        if (checked(H5Lexists(here, part.c_str(), H5P_DEFAULT), "H5Lexists", here, part) <= 0) return false;
        // A dangling soft link exists as a link but leads nowhere.
        if (checked(H5Oexists_by_name(here, part.c_str(), H5P_DEFAULT), "H5Oexists_by_name", here, part) <= 0)
            return false;
        current = H5ObjectId(checked(H5Oopen(here, part.c_str(), H5P_DEFAULT), "H5Oopen", here, part));
    }
    return true;
}

H5Group H5Group::open_group(std::string_view path) const {
    if (!exists(path)) throw InputError(file_name() + ": no group " + inside(id(), path));
    const std::string p(path);
    H5ObjectId object(checked(H5Oopen(id(), p.c_str(), H5P_DEFAULT), "H5Oopen", id(), p));
    if (H5Iget_type(object.get()) != H5I_GROUP)
        throw InputError(file_name() + ": " + object_path(object.get()) + " is not a group");
    return H5Group(std::move(object));
}

H5Dataset H5Group::dataset(std::string_view path) const {
    if (!exists(path))
        throw InputError(file_name() + ": no dataset " + inside(id(), path));
    const std::string p(path);
    H5ObjectId object(checked(H5Oopen(id(), p.c_str(), H5P_DEFAULT), "H5Oopen", id(), p));
    if (H5Iget_type(object.get()) != H5I_DATASET)
        throw InputError(file_name() + ": " + object_path(object.get()) + " is not a dataset");
    return H5Dataset(std::move(object));
}

namespace {

// Creates the dataset `path` below `group` with everything but its values: type, shape,
// layout, fill value and the units and long_name every murk dataset carries.
template <class T>
H5Dataset create_dataset(const H5Group& group, std::string_view path, const H5Shape& shape, const T* fill,
                         std::string_view units, std::string_view long_name, const H5Layout& layout) {
    const std::string target = where(group.id(), path);
    if (units.empty() || long_name.empty())
        throw std::invalid_argument(target + ": every dataset needs units (\"1\" if dimensionless) and a long_name");
    if (shape.empty() && (fill || layout.gzip_level > 0 || !layout.chunk.empty()))
        throw std::invalid_argument(target + ": a scalar is neither chunked nor compressed");
    if (layout.gzip_level < 0 || layout.gzip_level > 9)
        throw std::invalid_argument(target + ": gzip level must be 0..9");

    const std::size_t slash = path.find_last_of('/');
    const std::string leaf(slash == std::string_view::npos ? path : path.substr(slash + 1));
    const std::string_view parent_path = slash == std::string_view::npos ? std::string_view() : path.substr(0, slash + 1);
    if (leaf.empty()) throw std::invalid_argument(target + ": a dataset needs a name");
    const H5Group parent = group.group(parent_path);

    const H5PropertyListId dcpl(checked(H5Pcreate(H5P_DATASET_CREATE), "H5Pcreate", parent.id(), leaf));
    const unsigned order = H5P_CRT_ORDER_TRACKED | H5P_CRT_ORDER_INDEXED;
    checked(H5Pset_attr_creation_order(dcpl.get(), order), "H5Pset_attr_creation_order", parent.id(), leaf);

    // HDF5 cannot chunk a fixed dimension of length 0: an empty array stays contiguous.
    const bool chunked = (fill || layout.gzip_level > 0 || !layout.chunk.empty()) && element_count(shape) > 0;
    if (chunked) {
        const H5Shape chunk = layout.chunk.empty() ? automatic_chunk(shape, sizeof(T)) : layout.chunk;
        if (chunk.size() != shape.size())
            throw std::invalid_argument(target + ": chunk " + shape_text(chunk) + " and shape " + shape_text(shape) +
                                        " differ in rank");
        checked(H5Pset_chunk(dcpl.get(), static_cast<int>(chunk.size()), chunk.data()), "H5Pset_chunk", parent.id(), leaf);
        if (layout.gzip_level > 0) {
            // Byte shuffling groups the exponents of neighbouring doubles, which gzip then finds.
            checked(H5Pset_shuffle(dcpl.get()), "H5Pset_shuffle", parent.id(), leaf);
            checked(H5Pset_deflate(dcpl.get(), static_cast<unsigned>(layout.gzip_level)), "H5Pset_deflate", parent.id(), leaf);
        }
    }
    const H5TypeId memory = Element<T>::memory();
    const H5TypeId file = std::is_same_v<T, std::complex<double>> ? committed_complex_type(parent.id()) : Element<T>::file();
    if (fill) checked(H5Pset_fill_value(dcpl.get(), memory.get(), fill), "H5Pset_fill_value", parent.id(), leaf);
    const H5SpaceId space = dataset_space(shape);
    H5Dataset dataset(H5ObjectId(checked(H5Dcreate2(parent.id(), leaf.c_str(), file.get(), space.get(), H5P_DEFAULT,
                                                    dcpl.get(), H5P_DEFAULT),
                                         "H5Dcreate2", parent.id(), leaf)));
    dataset.set_attribute("units", units);
    dataset.set_attribute("long_name", long_name);
    return dataset;
}

}  // namespace

template <class T>
H5Dataset H5Group::write(std::string_view path, const T* values, const H5Shape& shape, std::string_view units,
                         std::string_view long_name, const H5Layout& layout) const {
    H5Dataset dataset = create_dataset<T>(*this, path, shape, nullptr, units, long_name, layout);
    if (element_count(shape) > 0) {
        const H5TypeId memory = Element<T>::memory();
        checked(H5Dwrite(dataset.id(), memory.get(), H5S_ALL, H5S_ALL, H5P_DEFAULT, values), "H5Dwrite", dataset.id());
    }
    return dataset;
}

template <class T>
H5Dataset H5Group::write(std::string_view path, const std::vector<T>& values, const H5Shape& shape,
                         std::string_view units, std::string_view long_name, const H5Layout& layout) const {
    if (values.size() != element_count(shape))
        throw std::invalid_argument(where(id(), path) + ": shape " + shape_text(shape) + " needs " +
                                    std::to_string(element_count(shape)) + " values, got " + std::to_string(values.size()));
    return write(path, values.data(), shape, units, long_name, layout);
}

template <class T>
H5Dataset H5Group::write(std::string_view path, const std::vector<T>& values, std::string_view units,
                         std::string_view long_name, const H5Layout& layout) const {
    return write(path, values.data(), H5Shape{values.size()}, units, long_name, layout);
}

template <class T>
H5Dataset H5Group::create_filled(std::string_view path, const H5Shape& shape, std::string_view units,
                                 std::string_view long_name, const H5Layout& layout, std::optional<T> fill) const {
    if (shape.empty()) throw std::invalid_argument(where(id(), path) + ": a filled dataset needs dimensions");
    const T value = fill.value_or(Element<T>::fill());
    H5Dataset dataset = create_dataset<T>(*this, path, shape, &value, units, long_name, layout);
    if constexpr (std::is_same_v<T, double>) dataset.set_fill_value(value);
    else if constexpr (std::is_integral_v<T>) {
        if (fill) dataset.set_fill_value(value);
    }
    return dataset;
}

template <class T>
H5Dataset H5Group::write_coordinate(std::string_view name, const std::vector<T>& values, std::string_view units,
                                    std::string_view long_name) const {
    H5Dataset dataset = write(name, values, units, long_name);
    dataset.make_scale(name);
    return dataset;
}

H5Dataset H5Group::write_label_coordinate(std::string_view name, const std::vector<std::string>& labels,
                                          std::string_view long_name) const {
    if (long_name.empty()) throw std::invalid_argument(where(id(), name) + ": a coordinate needs a long_name");
    if (name.empty() || name.find('/') != std::string_view::npos)
        throw std::invalid_argument(where(id(), name) + ": a coordinate is named by one path component");
    const std::string leaf(name);
    const H5PropertyListId dcpl(checked(H5Pcreate(H5P_DATASET_CREATE), "H5Pcreate", id(), leaf));
    const unsigned order = H5P_CRT_ORDER_TRACKED | H5P_CRT_ORDER_INDEXED;
    checked(H5Pset_attr_creation_order(dcpl.get(), order), "H5Pset_attr_creation_order", id(), leaf);
    const H5TypeId type = utf8_string_type();
    const H5SpaceId space = simple_space({labels.size()});
    H5Dataset dataset(H5ObjectId(checked(
        H5Dcreate2(id(), leaf.c_str(), type.get(), space.get(), H5P_DEFAULT, dcpl.get(), H5P_DEFAULT), "H5Dcreate2",
        id(), leaf)));
    std::vector<const char*> pointers;
    for (const std::string& label : labels) pointers.push_back(label.c_str());
    if (!pointers.empty())
        checked(H5Dwrite(dataset.id(), type.get(), H5S_ALL, H5S_ALL, H5P_DEFAULT, pointers.data()), "H5Dwrite",
                dataset.id());
    dataset.set_attribute("long_name", long_name);
    dataset.make_scale(name);
    return dataset;
}

#define MURK_H5_INSTANTIATE(T)                                                                                          \
    template H5Array<T> H5Dataset::read<T>() const;                                                                     \
    template void H5Dataset::write_slab<T>(const H5Shape&, const H5Shape&, const T*) const;                                   \
    template void H5Dataset::write_slab<T>(const H5Shape&, const H5Shape&, const std::vector<T>&) const;                      \
    template std::vector<T> H5Dataset::read_slab<T>(const H5Shape&, const H5Shape&) const;                              \
    template H5Dataset H5Group::write<T>(std::string_view, const T*, const H5Shape&, std::string_view, std::string_view, \
                                         const H5Layout&) const;                                                        \
    template H5Dataset H5Group::write<T>(std::string_view, const std::vector<T>&, const H5Shape&, std::string_view,     \
                                         std::string_view, const H5Layout&) const;                                      \
    template H5Dataset H5Group::write<T>(std::string_view, const std::vector<T>&, std::string_view, std::string_view,   \
                                         const H5Layout&) const;                                                        \
    template H5Dataset H5Group::create_filled<T>(std::string_view, const H5Shape&, std::string_view, std::string_view,  \
                                                 const H5Layout&, std::optional<T>) const;

MURK_H5_INSTANTIATE(double)
MURK_H5_INSTANTIATE(std::int32_t)
MURK_H5_INSTANTIATE(std::int64_t)
MURK_H5_INSTANTIATE(std::uint8_t)
MURK_H5_INSTANTIATE(std::complex<double>)
#undef MURK_H5_INSTANTIATE

#define MURK_H5_INSTANTIATE_REAL(T)                                                                         \
    template const H5Dataset& H5Dataset::set_fill_value<T>(T) const;                                         \
    template const H5Dataset& H5Dataset::set_flags<T>(const std::vector<T>&, std::string_view) const;       \
    template H5Dataset H5Group::write_coordinate<T>(std::string_view, const std::vector<T>&, std::string_view, \
                                                    std::string_view) const;

MURK_H5_INSTANTIATE_REAL(double)
MURK_H5_INSTANTIATE_REAL(std::int32_t)
MURK_H5_INSTANTIATE_REAL(std::int64_t)
MURK_H5_INSTANTIATE_REAL(std::uint8_t)
#undef MURK_H5_INSTANTIATE_REAL

// ---- H5File ---------------------------------------------------------------------------------

H5File H5File::create(const std::string& path) {
    silence_hdf5();
    std::error_code error;
    if (fs::exists(path, error)) throw InputError(path + " exists");
    check_directory_of(path);
    const H5PropertyListId fcpl = group_creation_properties(H5P_FILE_CREATE);
    const H5PropertyListId fapl = file_access_properties();
    H5FileId id(H5Fcreate(path.c_str(), H5F_ACC_EXCL, fcpl.get(), fapl.get()));
    if (!id) {
        const std::string reason = hdf5_reason();
        const fs::path directory = fs::path(path).parent_path();
        if (::access(directory.empty() ? "." : directory.c_str(), W_OK) != 0)
            throw InputError(path + ": cannot create file, directory is not writable");
        throw std::runtime_error("H5Fcreate failed on " + path + ": " + reason);
    }
    return H5File(std::move(id), path);
}

namespace {

H5FileId open_file(const std::string& path, unsigned flags) {
    silence_hdf5();
    std::error_code error;
    if (!fs::exists(path, error)) throw InputError(path + ": no such file");
    if (fs::is_directory(path, error)) throw InputError(path + " is a directory, not an HDF5 file");
    const htri_t is_hdf5 = H5Fis_hdf5(path.c_str());
    if (is_hdf5 == 0) throw InputError(path + " is not an HDF5 file");
    if (is_hdf5 < 0) throw InputError(path + ": cannot read file (" + hdf5_reason() + ")");
    const H5PropertyListId fapl = file_access_properties();
    H5FileId id(H5Fopen(path.c_str(), flags, fapl.get()));
    if (!id) {
        const std::string reason = hdf5_reason();
        if (flags == H5F_ACC_RDWR && ::access(path.c_str(), W_OK) != 0)
            throw InputError(path + ": cannot write to file, it is read-only");
        // An HDF5 file that does not open is one cut short or damaged (a copy that stopped, a
        // disk that filled): a problem of the file given, said in one line.
        throw InputError(path + ": is damaged or cut short, HDF5 cannot open it (" + reason +
                         "); use a complete copy, or make it again");
    }
    return id;
}

}  // namespace

H5File H5File::open_readwrite(const std::string& path) { return H5File(open_file(path, H5F_ACC_RDWR), path); }
H5File H5File::open_readonly(const std::string& path) { return H5File(open_file(path, H5F_ACC_RDONLY), path); }

H5Group H5File::root() const {
    if (!id_) throw std::logic_error(path_ + " is closed");
    return H5Group(H5ObjectId(checked(H5Gopen2(id_.get(), "/", H5P_DEFAULT), "H5Gopen2", id_.get(), "/")));
}

void H5File::flush() {
    if (!id_) throw std::logic_error(path_ + " is closed");
    checked(H5Fflush(id_.get(), H5F_SCOPE_GLOBAL), "H5Fflush", id_.get());
}

void H5File::close() {
    if (!id_) return;
    const hid_t id = id_.release();
    if (H5Fclose(id) < 0) fail_file("H5Fclose", path_);
}

// ---- H5Output -------------------------------------------------------------------------------

H5Output::H5Output(std::string path, bool overwrite, std::string exists_hint, std::string temp, H5File file)
    : path_(std::move(path)), temp_(std::move(temp)), overwrite_(overwrite), exists_hint_(std::move(exists_hint)),
      file_(std::move(file)) {}

namespace {

void check_output_allowed(const std::string& path, bool overwrite, std::string_view hint) {
    std::error_code error;
    if (!overwrite && fs::exists(path, error)) throw InputError(exists_message(path, hint));
    check_directory_of(path);
}

H5File start_temporary(const std::string& path, const std::string& temp, bool overwrite, std::string_view hint) {
    check_output_allowed(path, overwrite, hint);
    // A file here was left by a run that died while writing; starting afresh means starting without it.
    std::error_code error;
    fs::remove(temp, error);
    return H5File::create(temp);
}

}  // namespace

H5Output::H5Output(const std::string& path, bool overwrite, std::string_view exists_hint, const std::string& temp)
    : H5Output(path, overwrite, std::string(exists_hint), temp.empty() ? partial_path(path) : temp,
               start_temporary(path, temp.empty() ? partial_path(path) : temp, overwrite, exists_hint)) {}

H5Output H5Output::copy_of(const std::string& source, const std::string& path, bool overwrite,
                           std::string_view exists_hint, const std::string& temp) {
    check_output_allowed(path, overwrite, exists_hint);
    std::error_code error;
    fs::copy_file(source, temp, fs::copy_options::overwrite_existing, error);
    if (error) throw InputError(temp + ": cannot copy " + source + " there (" + error.message() + ")");
    return H5Output(path, overwrite, std::string(exists_hint), temp, H5File::open_readwrite(temp));
}

H5Output::H5Output(H5Output&& other) noexcept
    : path_(std::move(other.path_)),
      temp_(std::move(other.temp_)),
      overwrite_(other.overwrite_),
      exists_hint_(std::move(other.exists_hint_)),
      file_(std::move(other.file_)),
      done_(std::exchange(other.done_, true)) {}

H5Output::~H5Output() {
    if (done_) return;
    try {
        file_.close();
    } catch (...) {
        // Being removed anyway; a destructor has no one to tell.
    }
    std::error_code error;
    fs::remove(temp_, error);
}

H5File& H5Output::file() {
    if (done_) throw std::logic_error(path_ + " is already committed");
    return file_;
}

void H5Output::commit(const std::function<void()>& once_named) {
    if (done_) throw std::logic_error(path_ + " is already committed");
    const std::string& partial = temp_;
    file_.close();
    // On disk before it gets its name: otherwise a power cut after the rename could leave a
    // complete-looking name over incomplete data.
    sync_to_disk(partial);
    // From here the partial file is a finished result: whatever goes wrong, keep it.
    done_ = true;

    std::error_code error;
    bool once_named_done = false;
    if (overwrite_) {
        fs::rename(partial, path_, error);
    } else {
        // A hard link fails if the name is taken, so an output that appeared meanwhile is never
        // replaced; rename() would replace it without asking.
        fs::create_hard_link(partial, path_, error);
        if (!error) {
            if (once_named) once_named();
            once_named_done = true;
            fs::remove(partial, error);
        } else if (error == std::errc::file_exists) {
            throw InputError(exists_message(path_, exists_hint_) + " (it appeared while running; the result is in " +
                             partial + ")");
        } else {
            // File systems without hard links: check, then rename.
            std::error_code exists_error;
            if (fs::exists(path_, exists_error))
                throw InputError(exists_message(path_, exists_hint_) + " (it appeared while running; the result is in " +
                                 partial + ")");
            error.clear();
            fs::rename(partial, path_, error);
        }
    }
    if (error)
        throw InputError(path_ + ": cannot put the result there (" + error.message() + "); it is in " + partial);
    if (once_named && !once_named_done) once_named();
    // Makes the new name itself survive a power cut. The result is already in place, so a
    // failure here is not worth an error.
    const fs::path directory = fs::path(path_).parent_path();
    const int fd = ::open(directory.empty() ? "." : directory.c_str(), O_RDONLY | O_DIRECTORY);
    if (fd >= 0) {
        ::fsync(fd);
        ::close(fd);
    }
}

}  // namespace murk
