/* xoshiro128** 1.1 as in the authors' reference xoshiro128starstar.c (Blackman & Vigna, 2018),
   state seeded by the splitmix32 of lib/math/random.ts. */
#include <stdint.h>
#include <stdio.h>
static inline uint32_t rotl(const uint32_t x, int k) { return (x << k) | (x >> (32 - k)); }
static uint32_t s[4];
uint32_t next(void) {
	const uint32_t result = rotl(s[1] * 5, 7) * 9;
	const uint32_t t = s[1] << 9;
	s[2] ^= s[0];
	s[3] ^= s[1];
	s[1] ^= s[2];
	s[0] ^= s[3];
	s[2] ^= t;
	s[3] = rotl(s[3], 11);
	return result;
}
int main(void) {
  uint32_t st = 42;
  for (int k = 0; k < 4; k++) { st += 0x9e3779b9u; uint32_t z = st; z = (z ^ (z >> 16)) * 0x85ebca6bu; z = (z ^ (z >> 13)) * 0xc2b2ae35u; s[k] = z ^ (z >> 16); }
  printf("seed 42 state %u %u %u %u\n", s[0], s[1], s[2], s[3]);
  for (int i = 0; i < 8; i++) printf("%u\n", next());
  s[0]=1; s[1]=2; s[2]=3; s[3]=4;
  printf("state 1 2 3 4\n");
  for (int i = 0; i < 8; i++) printf("%u\n", next());
}
