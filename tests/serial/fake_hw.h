/* benchtau tests: the fake hardware layer's controls (the firmware sees only hw.h). */
#ifndef FAKE_HW_H
#define FAKE_HW_H

#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Ticks since the last reset; the ADC pattern is a function of it. */
uint64_t fake_hw_ticks(void);
/* Forgets the UART bytes and restarts the tick count. */
void fake_hw_reset(void);
/* Bytes the firmware has sent since the last reset. */
const uint8_t* fake_hw_uart_data(void);
size_t fake_hw_uart_size(void);
/* The fake ADC: channel 0 a 12-bit sawtooth rising 37 counts a tick, channel 1
   a square wave between 100 and 4000 counts, 50 ticks at each level, and any
   other channel the channel number times 1000. */
uint16_t fake_hw_pattern(uint8_t channel, uint64_t tick);

#ifdef __cplusplus
}
#endif

#endif /* FAKE_HW_H */
