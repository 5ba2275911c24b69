#include "spoolstep/io/fakes.hpp"

#include <utility>

namespace spoolstep::io {

void ScriptedInputPort::at(std::uint64_t at_us, Change change) {
  changes_.push_back(Scripted{at_us, std::move(change), false});
}

void ScriptedInputPort::fail_from(std::uint64_t at_us, PortError error, std::string what) {
  fail_from_us_ = at_us;
  fail_error_ = error;
  fail_what_ = std::move(what);
}

PortStatus ScriptedInputPort::do_read(core::InputImage& inputs, std::uint64_t scan_time_us) {
  ++reads_;
  if (fail_from_us_ && scan_time_us >= *fail_from_us_) return PortStatus::failed(fail_error_, fail_what_);
  for (Scripted& s : changes_) {
    if (!s.done && s.at_us <= scan_time_us) {
      s.change(inputs);
      s.done = true;
    }
  }
  return PortStatus::ok();
}

void RecordingOutputPort::fail_from(std::uint64_t at_us, PortError error, std::string what) {
  fail_from_us_ = at_us;
  fail_error_ = error;
  fail_what_ = std::move(what);
}

bool RecordingOutputPort::last_is_all_off() const {
  for (bool c : last_.coils) {
    if (c) return false;
  }
  for (const core::PropChannel& p : last_.prop) {
    if (p.value != 0.0f) return false;
  }
  return true;
}

PortStatus RecordingOutputPort::do_write(const core::OutputImage& outputs, std::uint64_t scan_time_us) {
  ++writes_;
  const std::uint64_t t = clock_.now_us();
  for (std::size_t i = 0; i < outputs.coils.size(); ++i) {
    if (outputs.coils[i] != last_.coils[i]) {
      changes_.push_back({t, OutputChange::Channel::kCoil, static_cast<std::uint8_t>(i), outputs.coils[i] ? 1.0f : 0.0f});
    }
  }
  for (std::size_t i = 0; i < outputs.prop.size(); ++i) {
    if (outputs.prop[i].value != last_.prop[i].value) {
      changes_.push_back({t, OutputChange::Channel::kProp, static_cast<std::uint8_t>(i), outputs.prop[i].value});
    }
  }
  last_ = outputs;
  if (fail_from_us_ && scan_time_us >= *fail_from_us_) return PortStatus::failed(fail_error_, fail_what_);
  return PortStatus::ok();
}

}  // namespace spoolstep::io
