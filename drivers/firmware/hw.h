/* benchtau reference firmware: the hardware layer a port to a new board provides. */
#ifndef BT_HW_H
#define BT_HW_H

#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Sets up the ADC, a timer that ticks sample_rate_Hz times a second, and the
   UART at baud, 8 data bits, no parity, one stop bit. */
void hw_init(uint32_t sample_rate_Hz, uint32_t baud);

/* Blocks until the next sample tick. A timer interrupt that sets a flag and a
   loop that waits for it is enough; the ticks must not drift. */
void hw_wait_tick(void);

/* One conversion of the given input, right-aligned counts (0 .. 2^bits - 1). */
uint16_t hw_adc_read(uint8_t channel);

/* Sends length bytes. It may block, or queue them for an interrupt or DMA to
   send, as long as no byte is dropped or reordered. */
void hw_uart_write(const uint8_t* data, size_t length);

#ifdef __cplusplus
}
#endif

#endif /* BT_HW_H */
