// benchtau: listing serial ports through libserialport.
#include "drivers/port_list.h"

#include <libserialport.h>

#include <memory>

#include "drivers/serial_port.h"

namespace benchtau {
namespace {

struct ListDeleter {
  void operator()(sp_port** list) const { sp_free_port_list(list); }
};

std::string text(const char* s) { return s ? s : ""; }

}  // namespace

std::vector<PortInfo> list_ports() {
  sp_port** raw = nullptr;
  if (sp_list_ports(&raw) != SP_OK) {
    char* m = sp_last_error_message();
    const std::string why = m ? m : "unknown error";
    sp_free_error_message(m);
    throw PortError("serial ports", PortProblem::other, "cannot list them: " + why);
  }
  const std::unique_ptr<sp_port*, ListDeleter> list(raw);
  std::vector<PortInfo> ports;
  for (sp_port** p = raw; p && *p; ++p) {
    PortInfo info;
    info.name = text(sp_get_port_name(*p));
    info.description = text(sp_get_port_description(*p));
    switch (sp_get_port_transport(*p)) {
      case SP_TRANSPORT_USB: {
        info.transport = "usb";
        int vid = 0, pid = 0;
        if (sp_get_port_usb_vid_pid(*p, &vid, &pid) == SP_OK) {
          info.usb_vid = vid;
          info.usb_pid = pid;
        }
        info.serial = text(sp_get_port_usb_serial(*p));
        break;
      }
      case SP_TRANSPORT_BLUETOOTH:
        info.transport = "bluetooth";
        break;
      case SP_TRANSPORT_NATIVE:
        info.transport = "native";
        break;
    }
    ports.push_back(std::move(info));
  }
  return ports;
}

}  // namespace benchtau
