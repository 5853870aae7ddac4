#pragma once
// The one exception type for bad input from users and files. Its message is the
// whole line the user sees: it names the file, key or line and says what is wrong.
// The command line turns it into exit status 2. It lives in the lowest layer so
// that every layer can throw it.
#include <stdexcept>
#include <string>

namespace murk {

struct InputError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

}  // namespace murk
