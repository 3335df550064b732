/* benchtau tests: a fake hardware layer for the reference firmware: a known ADC pattern and a
   UART that appends to a buffer. */
#include <stdlib.h>
#include <string.h>

#include "fake_hw.h"
#include "hw.h"

static uint64_t ticks;
static uint8_t* uart;
static size_t uart_size;
static size_t uart_capacity;

uint64_t fake_hw_ticks(void) { return ticks; }

void fake_hw_reset(void) {
  ticks = 0;
  uart_size = 0;
}

const uint8_t* fake_hw_uart_data(void) { return uart; }
size_t fake_hw_uart_size(void) { return uart_size; }

uint16_t fake_hw_pattern(uint8_t channel, uint64_t tick) {
  if (channel == 0) return (uint16_t)((tick * 37u) % 4096u);
  if (channel == 1) return (uint16_t)(((tick / 50u) % 2u) ? 4000u : 100u);
  return (uint16_t)(channel * 1000u);
}

void hw_init(uint32_t sample_rate_Hz, uint32_t baud) {
  (void)sample_rate_Hz;
  (void)baud;
  fake_hw_reset();
}

/* The sample taken after the n-th wait belongs to tick n - 1. */
void hw_wait_tick(void) { ++ticks; }

uint16_t hw_adc_read(uint8_t channel) { return fake_hw_pattern(channel, ticks - 1u); }

void hw_uart_write(const uint8_t* data, size_t length) {
  if (uart_size + length > uart_capacity) {
    size_t capacity = uart_capacity ? uart_capacity : 4096u;
    uint8_t* grown;
    while (capacity < uart_size + length) capacity *= 2u;
    grown = (uint8_t*)realloc(uart, capacity);
    if (!grown) abort();
    uart = grown;
    uart_capacity = capacity;
  }
  memcpy(uart + uart_size, data, length);
  uart_size += length;
}
