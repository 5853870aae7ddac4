#pragma once
// A run's stop request: SIGINT or SIGTERM asks a running sweep to stop after the
// points in progress; what is finished stays in the partial file for --resume.
namespace murk {

// Installs SIGINT and SIGTERM handlers that set the request.
void install_stop_handlers();
bool stop_requested();

}  // namespace murk
